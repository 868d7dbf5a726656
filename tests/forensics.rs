//! Forensics: each known mistake is identified from a reported figure that was worked out by hand
//! with the mistake made (EPA Method 2 eqs. 2-9/2-10 on the English worked example of
//! calculations.md §8), not by the model under test.

use annulus::archive::forensics::{identify, Quantity};
use annulus::input::load_with;
use annulus::pipeline::{evaluate, Evaluation};
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// A mistake is named when it reproduces the reported figure to 0.1 %.
const MATCH_TOL: f64 = 1e-3;
const FT3: f64 = 0.028_316_846_592;

const SURVEY: &str = r#"
[survey]
title = "EPA English worked example"
date = "2026-10-14"
convention = "epa-method-2"
[duct]
shape = "round"
diameter = "5.0 ft"
upstream = "8 D"
downstream = "2 D"
LINER
[layout]
lines = 2
points_per_line = 6
[probe]
kind = "s-type"
coefficient = CP
[gas]
barometric = "29.50 inHg"
static = "-0.50 inH2O"
o2 = "8 %"
co2 = "10 %"
moisture = "10 %"
FLOW
[[run]]
id = "1"
readings = "run1.csv"
leak_check = { before = "pass", after = "pass" }
"#;

const READINGS: &str = include_str!("data/epa-english/run1.csv");

fn eval(survey: &str) -> Evaluation {
    let mut map: HashMap<PathBuf, Vec<u8>> = HashMap::new();
    map.insert(PathBuf::from("m/s.toml"), survey.as_bytes().to_vec());
    map.insert(PathBuf::from("m/run1.csv"), READINGS.as_bytes().to_vec());
    let src = move |p: &Path| {
        map.get(p)
            .cloned()
            .ok_or_else(|| std::io::Error::from(std::io::ErrorKind::NotFound))
    };
    evaluate(load_with(Path::new("m/s.toml"), &src).unwrap()).unwrap()
}

fn base() -> Evaluation {
    eval(
        &SURVEY
            .replace("LINER", "")
            .replace("CP", "0.84")
            .replace("FLOW", ""),
    )
}

/// EPA eq. 2-9 (ft/s) and eq. 2-10 (dscfm) from the worked intermediates, with a chosen mistake.
/// The arguments are the equations' own variables, kept apart so each mistake changes one.
#[allow(clippy::too_many_arguments)]
fn epa(
    sqrt_dp: f64,
    ts: f64,
    ps: f64,
    ms: f64,
    cp: f64,
    area_ft2: f64,
    bws: f64,
    tstd: f64,
) -> (f64, f64) {
    let vs = 85.49 * cp * sqrt_dp * (ts / (ps * ms)).sqrt();
    let dscfm = 60.0 * (1.0 - bws) * vs * area_ft2 * (tstd / ts) * (ps / 29.92);
    (vs, dscfm)
}

// calculations.md §8 worked intermediates (derived from Method 2)
const SQ: f64 = 0.747080;
const TS: f64 = 763.0;
const PS: f64 = 29.46324;
const MS: f64 = 28.728;
const A: f64 = 19.63495;

fn named(e: &Evaluation, q: Quantity, reported_si: f64) -> &'static str {
    identify(e, Some(0), q, reported_si, MATCH_TOL)
        .map(|x| x.id)
        .unwrap_or("none")
}

#[test]
fn the_correct_figure_is_not_a_mistake() {
    let e = base();
    // 36 803.0 dscfm is the correct answer: it must not be "explained" by any mistake
    assert_eq!(
        named(&e, Quantity::DryStandardFlow, 36_803.0 * FT3 / 60.0),
        "none"
    );
}

#[test]
fn each_mistake_is_named() {
    let e = base();
    let dscfm = |x: f64| x * FT3 / 60.0;
    // √(mean Δp) = 0.747774 (calculations.md §8)
    let (_, q) = epa(0.747774, TS, PS, MS, 0.84, A, 0.10, 528.0);
    assert_eq!(
        named(&e, Quantity::DryStandardFlow, dscfm(q)),
        "sqrt-of-mean-dp"
    );
    // 459.67 instead of 460: Ts = 762.67 °R
    let (_, q) = epa(SQ, TS - 0.33, PS, MS, 0.84, A, 0.10, 528.0);
    assert_eq!(
        named(&e, Quantity::DryStandardFlow, dscfm(q)),
        "absolute-temperature-offset"
    );
    // 70 °F standard temperature: 530 °R
    let (_, q) = epa(SQ, TS, PS, MS, 0.84, A, 0.10, 530.0);
    assert_eq!(
        named(&e, Quantity::DryStandardFlow, dscfm(q)),
        "standard-temperature-70f"
    );
    // Pg added without ÷13.6: Ps = 29.50 − 0.50
    let (v, _) = epa(SQ, TS, 29.00, MS, 0.84, A, 0.10, 528.0);
    assert_eq!(
        named(&e, Quantity::Velocity, v * 0.3048),
        "static-without-13.6"
    );
    // wet standard flow reported as dry
    let (_, q) = epa(SQ, TS, PS, MS, 0.84, A, 0.0, 528.0);
    assert_eq!(
        named(&e, Quantity::DryStandardFlow, dscfm(q)),
        "wet-for-dry"
    );
    // Md 29.0: Ms = 29.0·0.9 + 18·0.1 = 27.9
    let (v, _) = epa(SQ, TS, PS, 27.9, 0.84, A, 0.10, 528.0);
    assert_eq!(
        named(&e, Quantity::Velocity, v * 0.3048),
        "molecular-weight-29"
    );
}

#[test]
fn calibration_liner_and_wall_factor_mistakes() {
    // calibrated Cp 0.81; the report used the nominal 0.84
    let e = eval(
        &SURVEY
            .replace("LINER", "")
            .replace("CP", "0.81")
            .replace("FLOW", ""),
    );
    let (v, _) = epa(SQ, TS, PS, MS, 0.84, A, 0.10, 528.0);
    assert_eq!(named(&e, Quantity::Velocity, v * 0.3048), "nominal-cp");
    // a 1 in liner: inside diameter 58 in, the report used 60 in for the area
    let e = eval(
        &SURVEY
            .replace("LINER", "liner = \"1 in\"")
            .replace("CP", "0.84")
            .replace("FLOW", ""),
    );
    let r = &e.runs[0];
    let reported = r.actual_flow_m3_s * (60.0f64 / 58.0).powi(2);
    assert_eq!(named(&e, Quantity::ActualFlow, reported), "missed-liner");
    // the Method 2H default 0.995 left out
    let e = eval(
        &SURVEY
            .replace("LINER", "")
            .replace("CP", "0.84")
            .replace("FLOW", "[flow]\nwall_factor = \"method-2h-default\""),
    );
    let (_, q) = epa(SQ, TS, PS, MS, 0.84, A, 0.10, 528.0);
    assert_eq!(
        named(&e, Quantity::DryStandardFlow, q * FT3 / 60.0),
        "missing-wall-factor"
    );
}
