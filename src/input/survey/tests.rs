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

fn errors(text: &str) -> Vec<crate::diag::Diagnostic> {
    match parse_survey("s.toml", text) {
        Err(Error::Input(d)) => d.items().to_vec(),
        other => panic!("accepted: {other:?}"),
    }
}

#[test]
fn impossible_values_are_input_errors_at_their_place() {
    // O2 42 %: more than air holds
    let d = errors(&GOOD.replace("o2 = \"8.1 %\"", "o2 = \"42 %\""));
    assert_eq!(d.len(), 1, "{d:?}");
    assert!(
        d[0].message.contains("`gas.o2` = `42 %`"),
        "{}",
        d[0].message
    );
    assert!(d[0].message.contains("20.9 %"), "{}", d[0].message);
    let loc = d[0].location.as_ref().unwrap();
    assert_eq!(loc.line, Some(27));
    // a diameter of 1e308 in is finite but would make an infinite area
    let d = errors(&GOOD.replace("\"96 in\"", "\"1e308 in\""));
    assert!(
        d[0].message.contains("`duct.diameter` = `1e308 in`"),
        "{}",
        d[0].message
    );
    // a static pressure of 900 inH2O
    let d = errors(&GOOD.replace("-0.85 inH2O", "-900 inH2O"));
    assert!(d[0].message.contains("gas.static"), "{}", d[0].message);
    // 100 % moisture leaves no dry gas
    let d = errors(&GOOD.replace("\"9.8 %\"", "\"100 %\""));
    assert!(
        d[0].message.contains("leaves no dry gas"),
        "{}",
        d[0].message
    );
    // the same values that make sense pass
    assert!(parse_survey("s.toml", &GOOD.replace("o2 = \"8.1 %\"", "o2 = \"20.9 %\"")).is_ok());
}

const TRAIN: &str = "[gas.method4]\nimpinger_gain = \"152.3 g\"\nsilica_gain = \"18.7 g\"\nmeter_volume = \"34.215 dcf\"\nmeter_y = 0.987\nmeter_dh = \"1.85 inH2O\"\nmeter_temperature = \"84 F\"\n";

fn with_train(train: &str) -> String {
    GOOD.replace("moisture = \"9.8 %\"\n", "").replace(
        "temperature = \"300 F\"\n",
        &format!("temperature = \"300 F\"\n{train}"),
    )
}

#[test]
fn method4_keys_take_grams_dcf_and_orifice_dh() {
    let s = parse_survey("s.toml", &with_train(TRAIN)).unwrap();
    let Moisture::Method4(m) = s.gas.moisture else {
        panic!("{:?}", s.gas.moisture)
    };
    assert!(
        matches!(m.impinger_gain, crate::gas::ImpingerGain::Mass { kg } if (kg - 0.1523).abs() < 1e-15)
    );
    assert!((m.meter_volume_m3 - 34.215 * 0.028_316_846_592).abs() < 1e-12);
    assert!(matches!(
        m.meter_pressure,
        crate::gas::MeterPressure::OrificeDh { .. }
    ));
    // mL and an absolute meter pressure
    let t = TRAIN.replace("152.3 g", "152.3 mL").replace(
        "meter_dh = \"1.85 inH2O\"",
        "meter_pressure = \"29.75 inHg\"",
    );
    let s = parse_survey("s.toml", &with_train(&t)).unwrap();
    let Moisture::Method4(m) = s.gas.moisture else {
        panic!()
    };
    assert!(matches!(
        m.impinger_gain,
        crate::gas::ImpingerGain::Volume { .. }
    ));
    assert!(matches!(
        m.meter_pressure,
        crate::gas::MeterPressure::Absolute { .. }
    ));
    // both or neither pressure: refused
    let both = TRAIN.replace(
        "meter_dh = \"1.85 inH2O\"",
        "meter_dh = \"1.85 inH2O\"\nmeter_pressure = \"29.75 inHg\"",
    );
    assert!(errors(&with_train(&both))[0].message.contains("both"));
    let neither = TRAIN.replace("meter_dh = \"1.85 inH2O\"\n", "");
    assert!(errors(&with_train(&neither))[0]
        .message
        .contains("needs the pressure at the meter"));
    // a meter volume typed in the wrong unit: 34.215 m3 is fine, 34215 m3 is not
    let big = TRAIN.replace("34.215 dcf", "34215 m3");
    assert!(errors(&with_train(&big))[0]
        .message
        .contains("meter_volume"));
}

#[test]
fn runs_carry_their_own_conditions() {
    let text = GOOD.to_string()
        + "\n[[run]]\nid = \"2\"\nreadings = \"run2.csv\"\nbarometric = \"29.58 inHg\"\nstatic = \"-0.80 inH2O\"\n\
           temperature = \"305 F\"\no2 = \"7.9 %\"\nmoisture = \"10.4 %\"\nended = \"2026-10-14T11:40\"\n\
           void = \"probe struck the wall at B4\"\n"
        + "\n[[run]]\nid = \"3\"\nreadings = \"run3.csv\"\n"
        + &TRAIN.replace("[gas.method4]", "[run.method4]");
    let s = parse_survey("s.toml", &text).unwrap();
    assert_eq!(s.runs_required, 3);
    let r2 = &s.runs[1];
    assert_eq!(r2.void.as_deref(), Some("probe struck the wall at B4"));
    assert_eq!(r2.ended.as_deref(), Some("2026-10-14T11:40"));
    let g2 = s.gas_for(r2);
    assert!((g2.barometric_pa - 29.58 * crate::units::PA_PER_INHG).abs() < 1e-9);
    // O2 from the run, CO2 kept from [gas]
    assert!(
        matches!(g2.dry, DryGas::Composition { o2, co2, .. } if (o2 - 0.079).abs() < 1e-12 && (co2 - 0.106).abs() < 1e-12)
    );
    assert!(matches!(g2.moisture, Moisture::Fraction { bws } if (bws - 0.104).abs() < 1e-12));
    let g3 = s.gas_for(&s.runs[2]);
    assert!(matches!(g3.moisture, Moisture::Method4(_)));
    assert_eq!(g3.barometric_pa, s.gas.barometric_pa);
    // run 1 is the survey's gas
    assert_eq!(s.gas_for(&s.runs[0]), s.gas);
}

#[test]
fn run_and_survey_keys_are_checked() {
    // a run giving moisture twice
    let text = GOOD.to_string() + "moisture = \"10 %\"\nrh = \"50 %\"\n";
    assert!(errors(&text)[0].message.contains("more than one way"));
    // void without a reason
    let text = GOOD.to_string() + "void = \" \"\n";
    assert!(errors(&text)[0].message.contains("without a reason"));
    let text = GOOD.replace(
        "convention = \"epa-method-2\"",
        "convention = \"epa-method-2\"\nruns_required = 0",
    );
    assert!(errors(&text)[0].message.contains("runs_required"));
    // EPA takes a liquid column as h × SG: no gas-column correction
    let text = GOOD.replace(
        "coefficient = 0.84",
        "coefficient = 0.84\ngauge_gas_column = true",
    );
    assert!(errors(&text)[0].message.contains("h × SG"));
    // half-diameter traverses and a probe length
    let text = GOOD
        .replace("lines = 2", "lines = 4\nreach = \"radius\"")
        .replace("points_per_line = 12", "points_per_line = 6")
        .replace(
            "coefficient = 0.84",
            "coefficient = 0.84\nlength = \"8 ft\"",
        );
    let s = parse_survey("s.toml", &text).unwrap();
    assert_eq!(s.layout.reach, crate::layout::Reach::Radius);
    assert!((s.probe.length_m.unwrap() - 8.0 * 0.3048).abs() < 1e-12);
}

#[test]
fn the_signoff_names_the_firm() {
    let s = parse_survey(
        "s.toml",
        &format!("{GOOD}\n[signoff]\ntested_by = \"A. Tester\"\norganisation = \"Test firm\"\n"),
    )
    .expect("valid");
    assert_eq!(s.signoff.organisation.as_deref(), Some("Test firm"));
    assert_eq!(s.signoff.tested_by.as_deref(), Some("A. Tester"));
}
