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
//! The `report` group also renders the sample stack as a 40 × 40 grid (1 600 points per run) and
//! times the presentation model alone (`report/model/*`), so the Typst share is the difference.
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
use annulus::report::build::{report_data, Identity};
use annulus::report::Engine;
use annulus::results::ResultsDoc;
use criterion::{criterion_group, criterion_main, Criterion};
use std::hint::black_box;
use std::path::Path;
use std::time::Duration;

#[path = "common/stack.rs"]
mod stack;

fn bench_latency(c: &mut Criterion) {
    let files = stack::files(false);
    let source = |p: &Path| files.read(p);
    let survey = Path::new(stack::SURVEY_PATH);

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
    for grid in [false, true] {
        let files = stack::files(grid);
        let source = |p: &Path| files.read(p);
        let name = if grid {
            format!("grid-{}-points-per-run", stack::GRID * stack::GRID)
        } else {
            "sample-stack".to_string()
        };
        let loaded = load_with(survey, &source).expect("survey loads");
        let (e, a) = evaluate_and_assess(loaded).expect("survey evaluates");
        let identity = Identity {
            report_id: "AN-BENCH".into(),
            content_sha256: "0".repeat(64),
            signer_key_fingerprint: None,
            signer_name: None,
            defaults: Default::default(),
        };
        // the presentation model alone (every section, every readings row formatted)
        g.bench_function(format!("model/{name}"), |b| {
            b.iter(|| black_box(report_data(&e, &a, &identity)))
        });
        g.bench_function(format!("render-signed/{name}"), |b| {
            b.iter(|| {
                let loaded = load_with(survey, &source).expect("survey loads");
                let (e, a) = evaluate_and_assess(loaded).expect("survey evaluates");
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
    }
    g.finish();
}

criterion_group!(benches, bench_latency);
criterion_main!(benches);
