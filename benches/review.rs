//! Throughput of `annulus review`'s per-file work: recompute + checks over a generated archive of
//! 10 000 surveys (2 lines × 12 points, 3 runs each; `benches/common/archive.rs`), held in memory so the figure is the
//! program's, not the disk's. Measured twice over the same paths: in parallel (worker threads, as the CLI
//! runs it) and single-threaded (a plain iterator), so the speed-up is measured, not assumed.
//!
//! Run (release build; the first build takes a while):
//!
//! ```text
//! cargo bench --bench review
//! ```
//!
//! Criterion prints the time per pass and `thrpt`, the surveys per second; the ratio of the two
//! `thrpt` figures is the parallel speed-up. `ANNULUS_BENCH_SURVEYS=1000 cargo bench --bench review`
//! runs a smaller archive. `one-survey` is the latency of one survey's review (read from memory,
//! recompute, every check, the findings); the `-shared-calibration` figures are the same archive
//! with every survey taking its pitot coefficient from one calibration record.

// The same allocator as the annulus binary (src/main.rs), so the figures are the program's.
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

use annulus::archive::review::{
    review_all, review_path, FileContext, Kind, Review, ReviewSettings, ReviewStatus, SharedSource,
};
use annulus::archive::trust::TrustList;
use annulus::archive::verify::VerifyOptions;
use criterion::{criterion_group, criterion_main, Criterion, Throughput};
use std::collections::HashMap;
use std::hint::black_box;
use std::path::{Component, Path, PathBuf};
use std::sync::Arc;
use std::time::Duration;

#[path = "common/archive.rs"]
mod archive;

/// The archive in memory, with or without a shared calibration record.
fn in_memory(n: usize, calibration: bool) -> (Vec<PathBuf>, SharedSource) {
    let (paths, files) = archive::archive(Path::new("archive"), n, calibration);
    let files: Arc<HashMap<PathBuf, Vec<u8>>> = Arc::new(files.into_iter().collect());
    let source: SharedSource = Arc::new(move |p: &Path| {
        // `survey-N/../calibration/…` as the disk would resolve it
        let mut resolved = PathBuf::new();
        for c in p.components() {
            match c {
                Component::ParentDir => {
                    resolved.pop();
                }
                Component::CurDir => {}
                c => resolved.push(c),
            }
        }
        files
            .get(&resolved)
            .cloned()
            .ok_or_else(|| std::io::Error::from(std::io::ErrorKind::NotFound))
    });
    (paths, source)
}

fn bench_review(c: &mut Criterion) {
    let n = std::env::var("ANNULUS_BENCH_SURVEYS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(archive::DEFAULT_SURVEYS);
    let settings = Arc::new(ReviewSettings::default());
    let list = TrustList::new();
    let cx = FileContext {
        verify: VerifyOptions::open(&list),
        reports: None,
    };

    let mut g = c.benchmark_group("review");
    g.sample_size(10);
    g.warm_up_time(Duration::from_secs(1));
    g.measurement_time(Duration::from_secs(30));
    for calibration in [false, true] {
        let (paths, shared) = in_memory(n, calibration);
        // every generated survey must load: a benchmark of error paths would measure nothing useful
        let check = review_all(
            paths[..n.min(20)].to_vec(),
            shared.clone(),
            settings.clone(),
        );
        assert!(
            check
                .files
                .iter()
                .all(|f| f.kind == Kind::Survey && f.status != ReviewStatus::Error),
            "generated surveys do not load: {:?}",
            check.files.first().map(|f| &f.findings)
        );
        let tag = if calibration {
            "-shared-calibration"
        } else {
            ""
        };
        let source = |p: &Path| shared(p);
        g.throughput(Throughput::Elements(1));
        g.bench_function(format!("one-survey{tag}"), |b| {
            b.iter(|| black_box(review_path(&paths[1], &source, &cx)))
        });
        g.throughput(Throughput::Elements(n as u64));
        g.bench_function(format!("parallel/{n}-surveys{tag}"), |b| {
            b.iter(|| black_box(review_all(paths.clone(), shared.clone(), settings.clone())))
        });
        if !calibration {
            g.bench_function(format!("single-thread/{n}-surveys"), |b| {
                b.iter(|| {
                    black_box(Review::collect(
                        paths.iter().map(|p| review_path(p, &source, &cx)),
                    ))
                })
            });
        }
    }
    g.finish();
}

criterion_group!(benches, bench_review);
criterion_main!(benches);
