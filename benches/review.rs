//! Throughput of `annulus review`'s per-file work: recompute + checks over a generated archive of
//! 10 000 surveys (2 lines × 12 points, 3 runs each), held in memory so the figure is the
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
//! runs a smaller archive.

// The same allocator as the annulus binary (src/main.rs), so the figures are the program's.
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

use annulus::archive::review::{
    review_all, review_path, FileContext, Review, ReviewSettings, SharedSource,
};
use annulus::archive::trust::TrustList;
use annulus::archive::verify::VerifyOptions;
use criterion::{criterion_group, criterion_main, Criterion, Throughput};
use std::collections::HashMap;
use std::hint::black_box;
use std::path::{Path, PathBuf};
use std::sync::Arc;
use std::time::Duration;

const DEFAULT_SURVEYS: usize = 10_000;
const RUNS: usize = 3;
const LINES: [&str; 2] = ["A", "B"];
const POINTS: usize = 12;

/// A stack survey like sample-data/stack (invented), varied per index.
fn survey_text(i: usize, reported: bool) -> String {
    let mut s = format!(
        r#"# generated benchmark survey {i} (invented)
[survey]
title = "Bench stack {i}"
site = "Bench site (fictional)"
date = "2026-10-14"
convention = "epa-method-2"

[duct]
shape = "round"
diameter = "{diameter} in"
construction = "steel"
upstream = "8.5 D"
downstream = "2.4 D"
port_length = "6 in"

[layout]
method = "equal-area"
lines = 2
points_per_line = 12

[probe]
kind = "s-type"
coefficient = 0.84
serial = "TS-0417"
calibrated = "2026-05-11"

[gas]
barometric = "29.{baro:02} inHg"
static = "-0.85 inH2O"
o2 = "8.1 %"
co2 = "10.6 %"
co = "0 %"
moisture = "9.8 %"
"#,
        diameter = 72 + i % 48,
        baro = 40 + i % 50,
    );
    for r in 1..=RUNS {
        s += &format!(
            "\n[[run]]\nid = \"{r}\"\nreadings = \"run{r}.csv\"\nleak_check = {{ before = \"pass\", after = \"pass\" }}\n"
        );
    }
    if reported {
        s += "\n[reported]\naverage = { dscfm = \"50000 cfm\" }\n";
    }
    s
}

/// A readings CSV with a plausible profile; `seed` varies the values.
fn readings_text(seed: usize) -> String {
    let mut x = (seed as u64).wrapping_mul(6_364_136_223_846_793_005) | 1;
    let mut next = || {
        x = x
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        ((x >> 33) % 1000) as f64 / 1000.0
    };
    let mut s = String::from("line,point,dp[inH2O],temperature[F],yaw[deg]\n");
    for line in LINES {
        for p in 1..=POINTS {
            let centre = 1.0 - ((p as f64 - 6.5) / 6.5).abs();
            let dp = 0.30 + 0.45 * centre + 0.03 * next();
            let t = 299.0 + 4.0 * next();
            let yaw = (next() * 20.0 - 10.0).round();
            s += &format!("{line},{p},{dp:.3},{t:.0},{yaw}\n");
        }
    }
    s
}

/// The archive in memory: `survey-N/survey.toml` and its three readings files.
fn archive(n: usize) -> (Vec<PathBuf>, HashMap<PathBuf, Vec<u8>>) {
    let mut files = HashMap::new();
    let mut paths = Vec::new();
    for i in 0..n {
        let dir = PathBuf::from(format!("archive/survey-{i:05}"));
        let survey = dir.join("survey.toml");
        // one survey in ten states a reported figure, so the forensics path runs too
        files.insert(survey.clone(), survey_text(i, i % 10 == 0).into_bytes());
        for r in 1..=RUNS {
            files.insert(
                dir.join(format!("run{r}.csv")),
                readings_text(i * RUNS + r).into_bytes(),
            );
        }
        paths.push(survey);
    }
    (paths, files)
}

fn bench_review(c: &mut Criterion) {
    let n = std::env::var("ANNULUS_BENCH_SURVEYS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(DEFAULT_SURVEYS);
    let (paths, files) = archive(n);
    let files = Arc::new(files);
    let shared: SharedSource = {
        let files = files.clone();
        Arc::new(move |p: &Path| {
            files
                .get(p)
                .cloned()
                .ok_or_else(|| std::io::Error::from(std::io::ErrorKind::NotFound))
        })
    };
    let source = |p: &Path| shared(p);
    let settings = Arc::new(ReviewSettings::default());
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
            .all(|f| f.kind == annulus::archive::review::Kind::Survey
                && f.status != annulus::archive::review::ReviewStatus::Error),
        "generated surveys do not load: {:?}",
        check.files.first().map(|f| &f.findings)
    );

    let mut g = c.benchmark_group("review");
    g.throughput(Throughput::Elements(n as u64));
    g.sample_size(10);
    g.warm_up_time(Duration::from_secs(1));
    g.measurement_time(Duration::from_secs(30));
    g.bench_function(format!("parallel/{n}-surveys"), |b| {
        b.iter(|| black_box(review_all(paths.clone(), shared.clone(), settings.clone())))
    });
    let list = TrustList::new();
    let cx = FileContext {
        verify: VerifyOptions::open(&list),
        reports: None,
    };
    g.bench_function(format!("single-thread/{n}-surveys"), |b| {
        b.iter(|| {
            black_box(Review::collect(
                paths.iter().map(|p| review_path(p, &source, &cx)),
            ))
        })
    });
    g.finish();
}

criterion_group!(benches, bench_review);
criterion_main!(benches);
