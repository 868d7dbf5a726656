//! `annulus verify` in process: the sample stack report and a report of about 10 MB (3 runs of a
//! 40 × 40 grid, invented readings), both signed by a trusted key so the verdict rests on the seal
//! (the default for trusted signers), with every page-bound check: cross-reference and revision
//! structure, every object a reader sees digested part by part and compared with the seal, every
//! embedded file inflated and hashed against the manifest, the signature, and the results
//! recomputed from the embedded survey and readings. Throughput is in bytes, so equal MB/s at both
//! sizes means linear.
//!
//! Also measured, for the record: the stages alone (reading the structure and digests; the
//! embedded files), the cost of a re-render (what `--rerender always`, or an unsigned report,
//! adds), and lopdf 0.36's `Document::load_mem`, the reader `verify` used before, on the sample
//! (on the 10 MB file it takes over 10 s a load).
//!
//! Run (release build; the first build takes a while):
//!
//! ```text
//! cargo bench --bench verify
//! ```

// The same allocator as the annulus binary (src/main.rs), so the figures are the program's.
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

use annulus::archive::make::{make_report, ReportSettings};
use annulus::archive::manifest::SignerEntry;
use annulus::archive::seal::SEAL_NAME;
use annulus::archive::trust::TrustList;
use annulus::archive::verify::{verify, RerenderPolicy, TrustPolicy, VerifyOptions};
use annulus::archive::SecretKey;
use annulus::input::{load_with, MemoryFiles};
use annulus::pdf::{files, parts::document_parts, Limits, Pdf};
use annulus::pipeline::evaluate_and_assess;
use annulus::report::Engine;
use criterion::{criterion_group, criterion_main, Criterion, Throughput};
use std::hint::black_box;
use std::path::Path;
use std::time::Duration;

const SURVEY: &str = include_str!("../sample-data/stack/survey.toml");
const RUNS: [&str; 3] = [
    include_str!("../sample-data/stack/run1.csv"),
    include_str!("../sample-data/stack/run2.csv"),
    include_str!("../sample-data/stack/run3.csv"),
];
const CALIBRATION: &str = include_str!("../sample-data/calibration/ts-0417.toml");
const CALIBRATION_READINGS: &str = include_str!("../sample-data/calibration/ts-0417.csv");

/// The sample survey, or a 40 × 40 rectangular grid of the same stack (invented readings).
fn files(big: bool) -> MemoryFiles {
    let mut f = MemoryFiles::new();
    f.insert("stack/../calibration/ts-0417.toml", CALIBRATION);
    f.insert("stack/../calibration/ts-0417.csv", CALIBRATION_READINGS);
    if !big {
        f.insert("stack/survey.toml", SURVEY);
        for (i, r) in RUNS.iter().enumerate() {
            f.insert(format!("stack/run{}.csv", i + 1), *r);
        }
        return f;
    }
    const N: usize = 40;
    let survey = SURVEY
        .replace(
            "shape = \"round\"\ndiameter = \"96 in\"",
            "shape = \"rectangular\"\nwidth = \"200 in\"\nheight = \"200 in\"",
        )
        .replace("lines = 2", &format!("lines = {N}"))
        .replace("points_per_line = 12", &format!("points_per_line = {N}"));
    f.insert("stack/survey.toml", survey);
    let line = |i: usize| {
        if i < 26 {
            ((b'A' + i as u8) as char).to_string()
        } else {
            format!("A{}", (b'A' + (i - 26) as u8) as char)
        }
    };
    let mut x: u64 = 0x2545_f491_4f6c_dd1d;
    for r in 1..=3 {
        let mut csv = String::from("line,point,dp[inH2O],temperature[F],yaw[deg]\n");
        for l in 0..N {
            for p in 1..=N {
                x ^= x << 13;
                x ^= x >> 7;
                x ^= x << 17;
                let shape = (p as f64 / N as f64 * std::f64::consts::PI).sin();
                let dp = 0.4 + 0.3 * shape + (x % 200) as f64 / 10_000.0;
                csv += &format!("{},{p},{dp:.3},{},{}\n", line(l), 300 + x % 3, x % 7);
            }
        }
        f.insert(format!("stack/run{r}.csv"), csv);
    }
    f
}

fn report(engine: &Engine, big: bool, key: &SecretKey) -> Vec<u8> {
    let f = files(big);
    let loaded = load_with(Path::new("stack/survey.toml"), &|p| f.read(p)).expect("loads");
    let (e, a) = evaluate_and_assess(loaded).expect("evaluates");
    let settings = ReportSettings {
        template: None,
        document_date: e.loaded.survey.date,
        signer: Some(SignerEntry::new("bench-signer", &key.public())),
        defaults: Default::default(),
    };
    make_report(engine, &e, &a, &settings, Some(key))
        .expect("renders")
        .pdf
}

fn bench_verify(c: &mut Criterion) {
    let engine = Engine::new();
    let key = SecretKey::from_seed([11; 32]);
    let mut trust = TrustList::new();
    trust.add("bench-signer", key.public()).expect("a key");
    let options = |rerender| VerifyOptions {
        trust: TrustPolicy {
            list: &trust,
            required: true,
        },
        rerender,
        limits: Limits::default(),
    };
    let docs = [
        ("sample", report(&engine, false, &key)),
        ("grid-40x40", report(&engine, true, &key)),
    ];
    for (name, pdf) in &docs {
        let v = verify(pdf, &options(RerenderPolicy::Auto)).expect("a report");
        assert!(v.verified, "{name} must verify: {:?}", v.problems());
        eprintln!("{name}: {} bytes", pdf.len());
    }

    let mut g = c.benchmark_group("verify");
    g.sample_size(10);
    g.warm_up_time(Duration::from_secs(1));
    g.measurement_time(Duration::from_secs(10));
    for (name, pdf) in &docs {
        g.throughput(Throughput::Bytes(pdf.len() as u64));
        g.bench_function(format!("signed-trusted/{name}"), |b| {
            b.iter(|| black_box(verify(pdf, &options(RerenderPolicy::Auto)).expect("a report")))
        });
        g.bench_function(format!("stage-structure-and-digests/{name}"), |b| {
            b.iter(|| {
                let doc = Pdf::parse(pdf, Limits::default()).expect("parses");
                black_box(document_parts(&doc, SEAL_NAME).expect("digests"))
            })
        });
        g.bench_function(format!("stage-embedded-files/{name}"), |b| {
            b.iter(|| {
                let doc = Pdf::parse(pdf, Limits::default()).expect("parses");
                black_box(files::embedded(&doc, &[]).expect("files"))
            })
        });
        // lopdf 0.36 takes over 10 s on the large file: measured on the sample only
        if *name == "sample" {
            g.bench_function(format!("lopdf-0.36-load/{name}"), |b| {
                b.iter(|| black_box(lopdf::Document::load_mem(pdf).expect("lopdf reads it")))
            });
        }
    }
    g.finish();

    let mut g = c.benchmark_group("rerender");
    g.sample_size(10);
    g.measurement_time(Duration::from_secs(20));
    let (_, sample) = &docs[0];
    g.bench_function("signed-trusted-rerender-always/sample", |b| {
        b.iter(|| black_box(verify(sample, &options(RerenderPolicy::Always)).expect("a report")))
    });
    g.finish();
}

criterion_group!(benches, bench_verify);
criterion_main!(benches);
