//! Latency of one survey through `compute` (load from memory, evaluate, checks and budgets, the
//! results JSON) and of one `report` render (report model, bundle and manifest, Typst layout and
//! PDF export with the files embedded, then the document seal and its signature), on the invented sample-data/stack survey.
//!
//! Run (release build; the first build takes a while):
//!
//! ```text
//! cargo bench --bench latency
//! ```
//!
//! Criterion prints the time per survey or per report. The `stage/*` figures split the compute
//! path (the per-survey work of `annulus review`) into its stages, to show where time goes.

// The same allocator as the annulus binary (src/main.rs), so the figures are the program's.
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

use annulus::archive::make::{make_report, ReportSettings};
use annulus::archive::manifest::SignerEntry;
use annulus::archive::SecretKey;
use annulus::assess::assess;
use annulus::input::assess_config::load_assess_config;
use annulus::input::load_with;
use annulus::pipeline::{evaluate, evaluate_and_assess};
use annulus::report::Engine;
use annulus::results::ResultsDoc;
use criterion::{criterion_group, criterion_main, Criterion};
use std::collections::HashMap;
use std::hint::black_box;
use std::path::{Path, PathBuf};
use std::time::Duration;

const SURVEY: &str = include_str!("../sample-data/stack/survey.toml");
const RUN1: &str = include_str!("../sample-data/stack/run1.csv");
const RUN2: &str = include_str!("../sample-data/stack/run2.csv");
const RUN3: &str = include_str!("../sample-data/stack/run3.csv");
const CALIBRATION: &str = include_str!("../sample-data/calibration/ts-0417.toml");
const CALIBRATION_READINGS: &str = include_str!("../sample-data/calibration/ts-0417.csv");

fn files() -> HashMap<PathBuf, Vec<u8>> {
    [
        ("stack/survey.toml", SURVEY),
        ("stack/run1.csv", RUN1),
        ("stack/run2.csv", RUN2),
        ("stack/run3.csv", RUN3),
        // the survey names `../calibration/ts-0417.toml`; paths are joined, not normalised
        ("stack/../calibration/ts-0417.toml", CALIBRATION),
        ("stack/../calibration/ts-0417.csv", CALIBRATION_READINGS),
    ]
    .into_iter()
    .map(|(p, t)| (PathBuf::from(p), t.as_bytes().to_vec()))
    .collect()
}

fn bench_latency(c: &mut Criterion) {
    let files = files();
    let source = |p: &Path| {
        files
            .get(p)
            .cloned()
            .ok_or_else(|| std::io::Error::from(std::io::ErrorKind::NotFound))
    };
    let survey = Path::new("stack/survey.toml");

    c.bench_function("compute/sample-stack", |b| {
        b.iter(|| {
            let loaded = load_with(survey, &source).expect("sample survey loads");
            let (e, a) = evaluate_and_assess(loaded).expect("sample survey evaluates");
            black_box(serde_json::to_vec_pretty(&ResultsDoc::new(&e, &a)).expect("serialises"))
        })
    });

    let loaded = load_with(survey, &source).expect("sample survey loads");
    let config = load_assess_config(&loaded).expect("sample assessment config");
    let evaluated = evaluate(loaded.clone()).expect("sample survey evaluates");
    let assessed = assess(&evaluated, &config);
    let mut g = c.benchmark_group("stage");
    g.bench_function("load-survey-and-readings", |b| {
        b.iter(|| black_box(load_with(survey, &source).expect("loads")))
    });
    g.bench_function("parse-assess-config", |b| {
        b.iter(|| black_box(load_assess_config(&loaded).expect("parses")))
    });
    g.bench_function("evaluate", |b| {
        b.iter(|| black_box(evaluate(loaded.clone()).expect("evaluates")))
    });
    g.bench_function("assess", |b| {
        b.iter(|| black_box(assess(&evaluated, &config)))
    });
    g.bench_function("results-doc-json", |b| {
        b.iter(|| {
            black_box(
                serde_json::to_vec_pretty(&ResultsDoc::new(&evaluated, &assessed))
                    .expect("serialises"),
            )
        })
    });
    g.finish();

    let engine = Engine::new();
    let key = SecretKey::from_seed([7; 32]);
    let mut g = c.benchmark_group("report");
    g.sample_size(10);
    g.warm_up_time(Duration::from_secs(2));
    g.measurement_time(Duration::from_secs(20));
    g.bench_function("render-signed/sample-stack", |b| {
        b.iter(|| {
            let loaded = load_with(survey, &source).expect("sample survey loads");
            let (e, a) = evaluate_and_assess(loaded).expect("sample survey evaluates");
            // bundle and manifest, Typst layout and PDF export, then the seal and its signature
            let settings = ReportSettings {
                template: None,
                document_date: e.loaded.survey.date,
                signer: Some(SignerEntry::new("bench", &key.public())),
                defaults: Default::default(),
            };
            black_box(make_report(&engine, &e, &a, &settings, Some(&key)).expect("renders"))
        })
    });
    g.finish();
}

criterion_group!(benches, bench_latency);
criterion_main!(benches);
