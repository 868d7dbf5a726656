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

fn problems(text: &str) -> Vec<crate::diag::Diagnostic> {
    match parse_survey("s.toml", text) {
        Err(Error::Input(d)) => d.items().to_vec(),
        Err(e) => panic!("{e}"),
        Ok(_) => panic!("accepted"),
    }
}

/// 1-based (line, column) of the first `needle` in `text`.
fn at(text: &str, needle: &str) -> (Option<usize>, Option<usize>) {
    let i = text.find(needle).unwrap_or_else(|| panic!("no `{needle}`"));
    let (l, c) = crate::input::text::line_column(text, i);
    (Some(l), Some(c))
}

fn position(d: &crate::diag::Diagnostic) -> (Option<usize>, Option<usize>) {
    let l = d.location.as_ref().expect("located");
    (l.line, l.column)
}

#[test]
fn design_flows_keep_the_basis_their_unit_names() {
    use crate::units::FlowBasis;
    // contract.md "Flow units with a basis": cfm and acfm actual, scfm and wscfm standard wet,
    // dscfm dry standard, m3/h m3/s L/s actual, Nm3/h normal wet, dNm3/h normal dry
    for (flow, basis) in [
        ("8000 cfm", FlowBasis::Actual),
        ("8000 acfm", FlowBasis::Actual),
        ("8000 scfm", FlowBasis::Standard),
        ("8000 wscfm", FlowBasis::Standard),
        ("8000 dscfm", FlowBasis::DryStandard),
        ("13600 m3/h", FlowBasis::Actual),
        ("13600 m³/h", FlowBasis::Actual),
        ("3.8 m3/s", FlowBasis::Actual),
        ("3800 L/s", FlowBasis::Actual),
        ("12000 Nm3/h", FlowBasis::Normal),
        ("11000 dNm3/h", FlowBasis::NormalDry),
    ] {
        let s = parse_survey("s.toml", &format!("{GOOD}\n[design]\nflow = \"{flow}\"\n"))
            .unwrap_or_else(|e| panic!("{flow}: {e}"));
        let d = s.design.unwrap();
        assert_eq!((d.basis, d.raw.as_str()), (basis, flow));
    }
    // 8000 ft³/min = 8000 × 0.028316846592 / 60 m³/s (exact)
    let s = parse_survey(
        "s.toml",
        &format!("{GOOD}\n[design]\nflow = \"8000 acfm\"\n"),
    )
    .unwrap();
    assert!((s.design.unwrap().m3_s - 8000.0 * 0.028316846592 / 60.0).abs() < 1e-12);
    // a design with no unit is located and says which units name which basis
    let text = format!("{GOOD}\n[design]\nflow = \"8000\"\n");
    let d = problems(&text);
    assert_eq!(d.len(), 1);
    assert_eq!(position(&d[0]), at(&text, "\"8000\""));
    assert!(d[0]
        .hint
        .as_deref()
        .unwrap()
        .contains("dscfm (dry standard)"));
}

/// The trade's spellings read in a survey as in a flag or a header.
#[test]
fn trade_units_in_a_survey() {
    let text = GOOD
        .replace("diameter = \"96 in\"", "diameter = '96\"'")
        .replace("static = \"-0.85 inH2O\"", "static = \"-0.85 in. w.c.\"")
        .replace("port_length = \"5 in\"", "port_length = \"5\\\"\"");
    let s = parse_survey("s.toml", &text).unwrap();
    // 96 in = 2.4384 m, 5 in = 0.127 m (exact); 0.85 inH2O conventional = 211.7256 Pa (NIST SP 811)
    assert!((s.duct.line_length_m() - 2.4384).abs() < 1e-12);
    assert!((s.port_length_m - 0.127).abs() < 1e-12);
    assert!((s.gas.static_pa + 0.85 * 249.0889).abs() < 1e-3);
    let text = GOOD.replace("moisture = \"9.8 %\"\n", "").replace(
        "temperature = \"300 F\"",
        "temperature = \"300 F\"\n[gas.method4]\nimpinger_gain = \"180 mL\"\nsilica_gain = \"12.5 grams\"\nmeter_volume = \"32.5 dcf\"\nmeter_y = 1.002\nmeter_pressure = \"29.70 \\\"Hg\"\nmeter_temperature = \"75 °F\"",
    );
    let s = parse_survey("s.toml", &text).unwrap();
    let Moisture::Method4(m) = s.gas.moisture else {
        panic!("not Method 4")
    };
    // 12.5 g = 0.0125 kg; 32.5 ft³ = 0.92029751 m³ (1 ft³ = 0.028316846592 m³)
    assert!((m.silica_gain_kg - 0.0125).abs() < 1e-15);
    assert!((m.meter_volume_m3 - 32.5 * 0.028316846592).abs() < 1e-12);
}

#[test]
fn structural_problems_come_together_with_value_problems() {
    let text = GOOD
        .replace("barometric = \"29.62 inHg\"\n", "")
        .replace("lines = 2", "lines = \"2\"")
        .replace("kind = \"s-type\"", "kind = \"s-type\"\nserail = \"P-7\"")
        .replace("\"9.8 %\"", "\"\"")
        .replace("\"96 in\"", "\"-96 in\"");
    let d = problems(&text);
    let messages: Vec<&str> = d.iter().map(|x| x.message.as_str()).collect();
    assert_eq!(
        messages,
        [
            "`duct.diameter` must be a positive length, found `-96 in`",
            "`layout.lines` must be a whole number, found the string `2`",
            "unknown key `serail` in [probe]",
            "[gas] has no `barometric`",
            "`gas.moisture`: expected a percentage, found nothing",
        ]
    );
    assert_eq!(position(&d[1]), at(&text, "\"2\""));
    assert_eq!(d[2].hint.as_deref(), Some("did you mean `serial`?"));
    assert_eq!(position(&d[3]), at(&text, "[gas]"));
    // the hint of an empty quantity shows a value of its own kind
    assert_eq!(
        d[4].hint.as_deref(),
        Some("write a number and a unit, e.g. `8.1 %`")
    );
}

#[test]
fn missing_sections_and_wrong_types_are_located() {
    let text = GOOD.replace("[probe]\nkind = \"s-type\"\ncoefficient = 0.84\n", "");
    let d = problems(&text);
    assert_eq!(d[0].message, "the survey has no [probe] section");
    let text = GOOD.replace("coefficient = 0.84", "coefficient = \"0.84\"");
    let d = problems(&text);
    assert_eq!(
        d[0].message,
        "`probe.coefficient` must be a plain number, found the string `0.84`"
    );
    assert_eq!(
        d[0].hint.as_deref(),
        Some("write the number without quotes: coefficient = 0.84")
    );
    let text = GOOD.replace("\"6.2 D\"", "6.2");
    let d = problems(&text);
    assert!(
        d[0].message.starts_with(
            "`duct.upstream` must be a distance with its unit, found the number `6.2`"
        ),
        "{}",
        d[0].message
    );
    let text = GOOD.replace("[survey]", "[survey]\nnotes = 3");
    let d = problems(&text);
    assert_eq!(d[0].message, "unknown key `notes` in [survey]");
    // TOML syntax errors are all reported, located
    let text = GOOD
        .replace("site = \"Harrow", "site = Harrow")
        .replace("lines = 2", "lines = ");
    let d = problems(&text);
    assert_eq!(d.len(), 2, "{d:?}");
    assert!(d[0].message.starts_with("the survey is not valid TOML"));
}

#[test]
fn value_lists_come_from_the_enums() {
    use crate::survey::{AngleCorrection, Construction, LeakResult, NegativePolicy, ProbeKind};
    // the names in files are the serde names the JSON carries
    for c in Construction::ALL {
        assert_eq!(serde_json::to_value(c).unwrap(), c.name());
    }
    for k in ProbeKind::ALL {
        assert_eq!(serde_json::to_value(k).unwrap(), k.name());
    }
    for n in NegativePolicy::ALL {
        assert_eq!(serde_json::to_value(n).unwrap(), n.name());
    }
    for a in AngleCorrection::ALL {
        assert_eq!(serde_json::to_value(a).unwrap(), a.name());
    }
    for l in LeakResult::ALL {
        assert_eq!(serde_json::to_value(l).unwrap(), l.name());
    }
    let d = problems(&GOOD.replace("kind = \"s-type\"", "kind = \"pitot\""));
    assert_eq!(
        d[0].message,
        "`probe.kind` must be one of s-type | standard, found `pitot`"
    );
}
