//! The report model of every sample survey, kept as golden JSON (what each report shows, before
//! layout): `tests/golden/report-model-<sample>.json`. Regenerate with
//! `UPDATE_GOLDEN=1 cargo test --test report_model` and review the diff.
//!
//! The model is built as `annulus report` builds it: the survey read from `sample-data/`,
//! evaluated and assessed, its identity (report id and content fingerprint) taken from the
//! archive bundle of its files and results.

mod common;
use annulus::archive::bundle::pack;
use annulus::input::load;
use annulus::pipeline::evaluate_and_assess;
use annulus::report::build::{report_data, Identity};
use annulus::report::ReportData;
use annulus::results::ResultsDoc;
use common::{golden, root};

/// The model of `sample-data/<name>/survey.toml`, with the identity `annulus report` gives it.
fn model(name: &str) -> ReportData {
    let loaded = load(&root().join("sample-data").join(name).join("survey.toml"))
        .unwrap_or_else(|e| panic!("{name} loads: {e:?}"));
    let (e, a) = evaluate_and_assess(loaded).unwrap_or_else(|e| panic!("{name}: {e:?}"));
    let mut results = serde_json::to_string_pretty(&ResultsDoc::new(&e, &a)).unwrap();
    results.push('\n');
    let bundle = pack(&e.loaded, results.into_bytes(), "annulus test");
    let id = Identity {
        report_id: bundle.manifest.report_id(),
        content_sha256: bundle.manifest.fingerprint(),
        signer_key_fingerprint: None,
        signer_name: None,
        defaults: Default::default(),
    };
    report_data(&e, &a, &id)
}

const SAMPLES: [&str; 5] = ["stack", "hvac", "en-stack", "stack-metric", "bad-plane"];

#[test]
fn the_model_of_every_sample_survey_matches_its_golden_json() {
    for name in SAMPLES {
        let data = model(name);
        data.validate()
            .unwrap_or_else(|e| panic!("{name}: invalid model: {e}"));
        let mut json = serde_json::to_string_pretty(&data).unwrap();
        json.push('\n');
        golden(&format!("report-model-{name}.json"), &json);
    }
}

/// Strings the report itself words, with where they sit. Left out: the SI shown deliberately
/// beside (`si`, `si_unit`, `si_values`, labelled SI on the page), the survey's own free text
/// (`title`, `site`, `client`, `plane_location`), the equations of the method and the survey's
/// notes (`notes`), and what the checks word (`limit`, `source`, `message`, `remarks`), which the
/// check messages' own tests cover.
fn report_strings(v: &serde_json::Value, path: &str, out: &mut Vec<(String, String)>) {
    const SKIP: [&str; 12] = [
        "si",
        "si_unit",
        "si_values",
        "title",
        "site",
        "client",
        "plane_location",
        "notes",
        "limit",
        "source",
        "message",
        "remarks",
    ];
    match v {
        serde_json::Value::String(s) => out.push((path.to_string(), s.clone())),
        serde_json::Value::Array(a) => {
            for (i, x) in a.iter().enumerate() {
                report_strings(x, &format!("{path}[{i}]"), out);
            }
        }
        serde_json::Value::Object(o) => {
            for (k, x) in o {
                if !SKIP.contains(&k.as_str()) {
                    report_strings(x, &format!("{path}.{k}"), out);
                }
            }
        }
        _ => {}
    }
}

/// Unit symbols that follow a number (`12.3 Pa`) or stand in brackets (`(Pa)`) in `text`; a
/// value the page labels SI (`(±10,153 m³/h SI)`) is shown beside on purpose and not counted.
fn units_used(text: &str) -> Vec<String> {
    let tokens: Vec<&str> = text.split_whitespace().collect();
    let mut out = Vec::new();
    for (i, t) in tokens.iter().enumerate() {
        let labelled_si = tokens
            .get(i + 1)
            .is_some_and(|n| n.trim_end_matches([')', ',', '.']) == "SI");
        if labelled_si {
            continue;
        }
        let bare = t.trim_end_matches([',', ';', ':', '.', ')']);
        if let Some(inner) = bare.strip_prefix('(') {
            out.push(inner.to_string());
        }
        let after_number = i > 0
            && tokens[i - 1]
                .trim_start_matches(['±', '(', '≥', '≤', '\u{2212}'])
                .starts_with(|c: char| c.is_ascii_digit());
        if after_number {
            out.push(bare.to_string());
        }
    }
    out
}

fn assert_units(name: &str, forbidden: &[&str]) {
    let json = serde_json::to_value(model(name)).unwrap();
    let mut strings = Vec::new();
    report_strings(&json, "", &mut strings);
    for (path, s) in &strings {
        for u in units_used(s) {
            assert!(
                !forbidden.contains(&u.as_str()),
                "{name}: `{u}` at {path}: {s}"
            );
        }
    }
}

#[test]
fn an_inch_pound_report_shows_no_si_value_except_beside() {
    for name in ["stack", "hvac"] {
        assert_units(
            name,
            &[
                "m", "mm", "m/s", "Pa", "kPa", "°C", "K", "m³/h", "m³/s", "kg/m³", "kg/s", "kg/h",
                "m²", "mmH2O", "mmHg", "g/mol",
            ],
        );
    }
}

#[test]
fn an_si_report_shows_no_inch_pound_value() {
    assert_units(
        "en-stack",
        &[
            "in", "ft", "ft/s", "fpm", "inH2O", "inHg", "°F", "°R", "acfm", "scfm", "dscfm",
            "wscfm", "lb/ft³", "lb/h", "ft²", "mmH2O", "mmHg",
        ],
    );
}

#[test]
fn an_epa_metric_report_shows_its_own_units() {
    assert_units(
        "stack-metric",
        &[
            "in", "ft", "ft/s", "fpm", "inH2O", "inHg", "°F", "°R", "acfm", "dscfm", "wscfm",
            "lb/ft³", "lb/h", "ft²", "Pa", "kPa",
        ],
    );
}

#[test]
fn hvac_reports_speak_hvac_and_cite_only_what_the_reader_has() {
    let hvac = serde_json::to_string(&model("hvac")).unwrap();
    for stack_word in [
        "sampling platform",
        "toxic",
        "stack gas",
        "Δp (",
        "leak check",
    ] {
        assert!(
            !hvac.contains(stack_word),
            "the HVAC report says `{stack_word}`"
        );
    }
    for name in SAMPLES {
        let text = serde_json::to_string(&model(name)).unwrap();
        for internal in ["methods.md", "calculations.md"] {
            assert!(!text.contains(internal), "{name} cites `{internal}`");
        }
    }
}
