use super::*;
use crate::input::toml_doc::edit_distance;

pub const GOOD: &str = r#"
[survey]
title = "Unit 4 stack, annual flow test"
site = "Harrow Fen works (fictional)"
date = "2026-10-14"
convention = "epa-method-2"

[duct]
shape = "round"
diameter = "96 in"
upstream = "6.2 D"
downstream = "3.1 D"
port_length = "5 in"

[layout]
method = "equal-area"
lines = 2
points_per_line = 12

[probe]
kind = "s-type"
coefficient = 0.84

[gas]
barometric = "29.62 inHg"
static = "-0.85 inH2O"
o2 = "8.1 %"
co2 = "10.6 %"
moisture = "9.8 %"
temperature = "300 F"

[[run]]
id = "1"
readings = "run1.csv"
leak_check = { before = "pass", after = "pass" }
"#;

#[test]
fn parses_a_complete_survey() {
    let s = parse_survey("s.toml", GOOD).unwrap();
    assert_eq!(s.convention, ConventionId::EpaMethod2);
    assert!((s.duct.line_length_m() - 96.0 * 0.0254).abs() < 1e-12);
    assert!((s.upstream_d.unwrap() - 6.2).abs() < 1e-12);
    assert!((s.port_length_m - 0.127).abs() < 1e-12);
    assert!(matches!(s.gas.moisture, Moisture::Fraction { bws } if (bws - 0.098).abs() < 1e-12));
    assert_eq!(s.runs[0].leak_check.after, Some(LeakResult::Pass));
    assert_eq!(s.layout.points_per_line, Some(12));
}

#[test]
fn a_bad_quantity_is_located_with_its_raw_value() {
    let text = GOOD.replace("\"96 in\"", "\"96 furlong\"");
    let Err(Error::Input(d)) = parse_survey("s.toml", &text) else {
        panic!("accepted")
    };
    let first = &d.items()[0];
    assert!(first.message.contains("`96 furlong`"), "{}", first.message);
    let loc = first.location.as_ref().unwrap();
    // line 10 of GOOD (the leading newline is line 1), column of the value's opening quote
    assert_eq!((loc.line, loc.column), (Some(10), Some(12)));
}

#[test]
fn reports_every_problem_in_one_pass() {
    let text = GOOD
        .replace("\"96 in\"", "\"-96 in\"")
        .replace("\"epa-method-2\"", "\"epa\"")
        .replace("\"8.1 %\"", "\"181 %\"");
    let Err(Error::Input(d)) = parse_survey("s.toml", &text) else {
        panic!("accepted")
    };
    assert_eq!(d.len(), 3, "{d}");
}

#[test]
fn unknown_keys_get_a_suggestion() {
    let text = GOOD.replace("port_length", "port_lenght");
    let Err(Error::Input(d)) = parse_survey("s.toml", &text) else {
        panic!("accepted")
    };
    assert_eq!(
        d.items()[0].hint.as_deref(),
        Some("did you mean `port_length`?")
    );
    assert_eq!(edit_distance("kitten", "sitting"), 3);
}

#[test]
fn unknown_keys_are_refused_with_location() {
    let text = GOOD.replace("port_length", "port_lenght");
    let Err(Error::Input(d)) = parse_survey("s.toml", &text) else {
        panic!("accepted")
    };
    let msg = d.to_string();
    assert!(msg.contains("port_lenght"), "{msg}");
    assert!(msg.contains("s.toml:"), "{msg}");
}
