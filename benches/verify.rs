//! `annulus verify` in process: the sample stack report and a report of about 10 MB (3 runs of a
//! 40 × 40 grid, invented readings), both signed by a trusted key so the verdict rests on the seal
//! (the default for trusted signers), with every page-bound check: cross-reference and revision
//! structure, every object a reader sees digested part by part and compared with the seal, every
//! embedded file inflated and hashed against the manifest, the signature, and the results
//! recomputed from the embedded survey and readings. Throughput is in bytes, so equal MB/s at both
//! sizes means linear.
//!
//! Also measured: `verify_bytes` (no trust list, no re-render: the fuzz target's entry point), and,
//! for the record, the stages alone (reading the structure and digests; the
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
use annulus::archive::verify::{verify, verify_bytes, RerenderPolicy, TrustPolicy, VerifyOptions};
use annulus::archive::SecretKey;
use annulus::input::load_with;
use annulus::pdf::{files, parts::document_parts, Limits, Pdf};
use annulus::pipeline::evaluate_and_assess;
use annulus::report::Engine;
use criterion::{criterion_group, criterion_main, Criterion, Throughput};
use std::hint::black_box;
use std::path::Path;
use std::time::Duration;

#[path = "common/stack.rs"]
mod stack;

fn report(engine: &Engine, big: bool, key: &SecretKey) -> Vec<u8> {
    let f = stack::files(big);
    let loaded = load_with(Path::new(stack::SURVEY_PATH), &|p| f.read(p)).expect("loads");
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
        // what the `verify_pdf` fuzz target runs: no trust list, no re-render
        g.bench_function(format!("verify-bytes-untrusted/{name}"), |b| {
            b.iter(|| black_box(verify_bytes(pdf).expect("a report")))
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
