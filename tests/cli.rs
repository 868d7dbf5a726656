//! End-to-end: the real binary on every sample survey and on each bad-input fixture, checking
//! stdout, stderr and the exit code. Outputs are golden files under tests/golden/, regenerated with
//! `UPDATE_GOLDEN=1 cargo test --test cli` and reviewed in the diff.

mod common;
use common::{golden, root};
use std::path::Path;

fn annulus(args: &[&str]) -> (i32, String, String) {
    // not a terminal: tables fit the 100-column default
    common::run(&root(), args, &[("COLUMNS", None)])
}

#[test]
fn compute_runs_on_every_sample_survey() {
    for dir in ["stack", "en-stack", "hvac", "stack-metric"] {
        let survey = format!("sample-data/{dir}/survey.toml");
        let (code, out, err) = annulus(&["compute", &survey]);
        assert_eq!(code, 0, "{err}");
        // stack/ takes its probe coefficient from the calibration shared in ../calibration: a
        // file outside the survey's folder is accepted with a note
        let note = match dir {
            "stack" => "note: `../calibration/ts-0417.toml` (the probe calibration) is outside the survey's folder\n",
            _ => "",
        };
        assert_eq!(err, note);
        golden(&format!("compute-{dir}.txt"), &out);
        let (code, json, _) = annulus(&["compute", &survey, "--format", "json"]);
        assert_eq!(code, 0);
        let v: serde_json::Value = serde_json::from_str(&json).unwrap();
        // contract.md: every key of the results JSON is present
        for k in ["convention", "reference", "area_m2", "runs", "average"] {
            assert!(v.get(k).is_some(), "{dir}: no `{k}`");
        }
        for k in ["temperature_k", "pressure_pa", "dry"] {
            assert!(v["reference"].get(k).is_some(), "{dir}: no reference.{k}");
        }
        let run = &v["runs"][0];
        for k in [
            "id",
            "points",
            "density_kg_m3",
            "mean_velocity_m_s",
            "actual_flow_m3_s",
            "standard_flow_m3_s",
            "dry_standard_flow_m3_s",
            "mass_flow_kg_s",
        ] {
            assert!(run.get(k).is_some(), "{dir}: no runs[0].{k}");
        }
        for k in [
            "line",
            "point",
            "position_m",
            "dp_pa",
            "temperature_k",
            "velocity_m_s",
            "weight",
        ] {
            assert!(run["points"][0].get(k).is_some(), "{dir}: no point key {k}");
        }
        for k in [
            "mean_velocity_m_s",
            "actual_flow_m3_s",
            "standard_flow_m3_s",
            "dry_standard_flow_m3_s",
            "mass_flow_kg_s",
        ] {
            assert!(v["average"].get(k).is_some(), "{dir}: no average.{k}");
        }
        let (code, csv, _) = annulus(&["compute", &survey, "--format", "csv"]);
        assert_eq!(code, 0);
        // the display units in the headers, as the readings parser reads them
        let dp = match dir {
            "stack" => "position[in],dp[inH2O],temperature[F]",
            "hvac" => "position[in],dp[inH2O],temperature[F]",
            "en-stack" => "position[mm],dp[Pa],temperature[C]",
            _ => "position[mm],dp[mmH2O],temperature[C]",
        };
        assert!(
            csv.starts_with(&format!("run,line,point,{dp}")),
            "{dir}: {csv}"
        );
    }
}

/// The unit system a sample survey is written and shown in.
const SAMPLES: [(&str, System); 4] = [
    ("stack", System::InchPound),
    ("hvac", System::InchPound),
    ("en-stack", System::Si),
    ("stack-metric", System::EpaMetric),
];

#[derive(Debug, Clone, Copy, PartialEq)]
enum System {
    InchPound,
    Si,
    EpaMetric,
}

/// Units that must not appear in an output of `system`: symbols that are never words, found
/// anywhere, and short symbols (`in`, `F`, `m` …) found after a number or as a CSV header unit.
fn foreign_units(system: System) -> (&'static [&'static str], &'static [&'static str]) {
    const METRIC: &[&str] = &[
        "Pa", "kPa", "hPa", "mmH2O", "mmHg", "m/s", "°C", "kg/m³", "kg/m3", "m²", "m2", "m³/h",
        "m3/h", "Nm³/h", "dNm³/h", "wscm/h", "dscm/h", "kg/h", "kg/s", "g/mol", "mm", "m³", "m3",
    ];
    const INCH_POUND: &[&str] = &[
        "inH2O",
        "inHg",
        "°F",
        "°R",
        "fpm",
        "cfm",
        "acfm",
        "scfm",
        "wscfm",
        "dscfm",
        "ft/s",
        "ft²",
        "ft2",
        "ft³",
        "ft3",
        "lb/ft³",
        "lb/ft3",
        "lb/h",
        "lb/min",
        "lb/lb-mol",
    ];
    match system {
        System::InchPound => (METRIC, &["C", "K", "m", "cm"]),
        System::Si => (INCH_POUND, &["in", "F", "ft", "R", "lb"]),
        // EPA Method 2 metric: mm of water and mercury, °C, m/s; never Pa or kPa
        System::EpaMetric => (
            &[
                "Pa",
                "kPa",
                "hPa",
                "inH2O",
                "inHg",
                "°F",
                "°R",
                "fpm",
                "cfm",
                "acfm",
                "scfm",
                "wscfm",
                "dscfm",
                "ft/s",
                "ft²",
                "ft2",
                "ft³",
                "lb/ft³",
                "lb/h",
                "lb/lb-mol",
            ],
            &["in", "F", "ft", "R", "lb"],
        ),
    }
}

/// Every unit of another system in `text`, with its line. A line with the token `SI` shows SI
/// beside the job's units on purpose and is skipped.
fn units_of_another_system(text: &str, system: System) -> Vec<String> {
    let (anywhere, after_number) = foreign_units(system);
    let is_number = |t: &str| {
        let t = t.trim_start_matches(['−', '-', '+', '±']).replace(',', "");
        !t.is_empty() && t.parse::<f64>().is_ok()
    };
    let mut found = Vec::new();
    for line in text.lines() {
        // (token, the character before it)
        let mut tokens: Vec<(&str, Option<char>)> = Vec::new();
        let mut start = None;
        for (i, c) in line.char_indices().chain([(line.len(), ' ')]) {
            let delimiter = c.is_whitespace() || "()[],;:".contains(c);
            match (start, delimiter) {
                (None, false) => start = Some(i),
                (Some(s), true) => {
                    tokens.push((&line[s..i], line[..s].chars().last()));
                    start = None;
                }
                _ => {}
            }
        }
        if tokens.iter().any(|(t, _)| *t == "SI") {
            continue;
        }
        for (i, (t, before)) in tokens.iter().enumerate() {
            let t = t.trim_end_matches('.');
            let header_unit = line.contains(&format!("[{t}]"));
            let after = i > 0 && *before == Some(' ') && is_number(tokens[i - 1].0);
            if anywhere.contains(&t) || (after_number.contains(&t) && (after || header_unit)) {
                found.push(format!("`{t}` in: {line}"));
            }
        }
    }
    found
}

/// Golden outputs for an inch-pound, an SI and an EPA metric survey: the `compute` screen,
/// `compute --points`, the per-point CSV and `check --all`, and no unit of another system in any
/// of them, nor in `check` and `layout` (screen and CSV).
#[test]
fn each_job_is_shown_in_its_own_units() {
    for (dir, system) in SAMPLES {
        let survey = format!("sample-data/{dir}/survey.toml");
        let runs = [
            ("compute", vec!["compute", survey.as_str()], "txt"),
            (
                "compute-points",
                vec!["compute", survey.as_str(), "--points"],
                "txt",
            ),
            (
                "points",
                vec!["compute", survey.as_str(), "--format", "csv"],
                "csv",
            ),
            ("check", vec!["check", survey.as_str()], "txt"),
            ("check-all", vec!["check", survey.as_str(), "--all"], "txt"),
            ("layout", vec!["layout", survey.as_str()], "txt"),
            (
                "layout-csv",
                vec!["layout", survey.as_str(), "--format", "csv"],
                "csv",
            ),
        ];
        for (name, args, ext) in runs {
            let (code, out, err) = annulus(&args);
            assert!(
                code == 0 || (name.starts_with("check") && code == 3),
                "{err}"
            );
            // the stack survey's probe calibration is shared in ../calibration: a file outside
            // the survey's folder is read with a note (layout reads no calibration)
            let note = match (dir, name.starts_with("layout")) {
                ("stack", false) => "note: `../calibration/ts-0417.toml` (the probe calibration) is outside the survey's folder\n",
                _ => "",
            };
            assert_eq!(err, note, "{dir} {name}");
            // `check` without --all shows only warnings and failures: the golden keeps every
            // finding's words
            if !matches!(name, "check" | "layout" | "layout-csv") {
                golden(&format!("{name}-{dir}.{ext}"), &out);
            }
            let foreign = units_of_another_system(&out, system);
            assert!(
                foreign.is_empty(),
                "{dir} {name} shows units of another system:\n{}",
                foreign.join("\n")
            );
            for line in out.lines().filter(|_| ext == "txt") {
                assert!(
                    line.chars().count() <= 100,
                    "{dir} {name}: wider than 100 columns: {line}"
                );
            }
        }
    }
}

/// The words of `check --format csv` (limits and messages) are in the job's units too; the
/// `measured` and `unit` columns are SI on purpose (the unit is named on every row).
#[test]
fn check_csv_words_are_in_the_jobs_units() {
    for (dir, system) in SAMPLES {
        let survey = format!("sample-data/{dir}/survey.toml");
        let (_, out, _) = annulus(&["check", &survey, "--format", "csv"]);
        let mut rows = csv::Reader::from_reader(out.as_bytes());
        let header = rows.headers().unwrap().clone();
        let col = |name: &str| header.iter().position(|h| h == name).unwrap();
        let (limit, message) = (col("limit"), col("message"));
        let mut n = 0;
        for row in rows.records() {
            let row = row.unwrap();
            for text in [&row[limit], &row[message]] {
                let foreign = units_of_another_system(text, system);
                assert!(foreign.is_empty(), "{dir}: {}", foreign.join("\n"));
            }
            n += 1;
        }
        assert!(n > 10, "{dir}: {n} findings");
    }
}

/// The scan itself finds what it is meant to find.
#[test]
fn the_unit_scan_catches_a_foreign_unit() {
    assert!(units_of_another_system("area 0.5574 m²", System::InchPound).len() == 1);
    assert!(units_of_another_system("dp[Pa],v", System::InchPound).len() == 1);
    assert!(units_of_another_system("limit 12 in", System::Si).len() == 1);
    assert!(units_of_another_system("temperature[F]", System::Si).len() == 1);
    assert!(units_of_another_system("T [°F]  v [m/s]", System::EpaMetric).len() == 1);
    assert!(units_of_another_system("mean Δp 12.45 Pa", System::EpaMetric).len() == 1);
    // words are not units; a line marked SI shows SI on purpose
    assert!(
        units_of_another_system("points in all; K = 0.005 inH2O", System::InchPound).is_empty()
    );
    assert!(units_of_another_system("dp [inH2O]  dp SI [Pa]", System::InchPound).is_empty());
}

#[test]
fn bad_inputs_are_rejected_with_located_diagnostics() {
    // one problem each (issue policy), then fixtures with several problems reported in one pass
    for case in [
        "ragged-row",
        "text-in-number",
        "one-missing-point",
        "duplicate-point",
        "unknown-unit",
        "negative-diameter",
        "unknown-key",
        "empty-file",
        "cell-typo",
        "survey-units",
        "missing-point",
        "negative",
    ] {
        let survey = format!("tests/data/bad/{case}.toml");
        let (code, out, err) = annulus(&["compute", &survey]);
        assert_eq!(code, 1, "{case}: {err}");
        assert_eq!(out, "", "{case}: nothing on stdout");
        golden(&format!("bad-{case}.txt"), &err);
    }
}

#[test]
fn layout_rejects_the_bad_survey_fixtures() {
    for case in ["unknown-unit", "negative-diameter", "unknown-key"] {
        let survey = format!("tests/data/bad/{case}.toml");
        let (code, out, err) = annulus(&["layout", &survey]);
        assert_eq!(code, 1, "{case}");
        assert_eq!(out, "");
        golden(&format!("layout-bad-{case}.txt"), &err);
    }
}

#[test]
fn layout_of_the_72_inch_example() {
    // issue example: EPA Method 1 Table 1-2 positions for 2 × 6 points on 72 in, marks + 6 in port
    let (code, out, _) = annulus(&[
        "layout",
        "--round",
        "72in",
        "--method",
        "equal-area",
        "--lines",
        "2",
        "--points",
        "12",
        "--port-length",
        "6in",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let pos: Vec<f64> = v["points"].as_array().unwrap()[..6]
        .iter()
        .map(|p| p["position_m"].as_f64().unwrap() / 0.0254)
        .collect();
    // methods.md §1.1 [D] from Table 1-2: 3.168, 10.512, 21.312, 50.688, 61.488, 68.832 in
    for (a, b) in pos
        .iter()
        .zip([3.168, 10.512, 21.312, 50.688, 61.488, 68.832])
    {
        assert!((a - b).abs() < 1e-9, "{a} vs {b}");
    }
    let ins = v["points"][0]["insertion_m"].as_f64().unwrap() / 0.0254;
    assert!((ins - 9.168).abs() < 1e-9);
}

#[test]
fn completions_and_man_pages() {
    let (code, out, _) = annulus(&["completions", "bash"]);
    assert_eq!(code, 0);
    assert!(out.contains("annulus") && out.contains("layout"));
    let dir = tempfile::tempdir().unwrap();
    let (code, _, _) = annulus(&["man", "-o", dir.path().to_str().unwrap()]);
    assert_eq!(code, 0);
    let page = std::fs::read_to_string(dir.path().join("annulus-layout.1")).unwrap();
    assert!(
        page.contains("port"),
        "layout man page documents its options"
    );
    // every subcommand's help carries an example
    for sub in [
        "layout",
        "init",
        "compute",
        "check",
        "report",
        "verify",
        "review",
        "keygen",
        "calibrate",
        "rata",
        "completions",
        "man",
    ] {
        let (code, out, _) = annulus(&[sub, "--help"]);
        assert_eq!(code, 0, "{sub}");
        assert!(out.contains("Example"), "{sub} --help has no example");
    }
}

#[test]
fn layout_from_flags_and_from_a_survey() {
    let (code, out, err) = annulus(&[
        "layout",
        "--round",
        "60in",
        "--upstream",
        "8D",
        "--downstream",
        "2D",
        "--points",
        "12",
    ]);
    assert_eq!(code, 0, "{err}");
    golden("layout-round.txt", &out);
    let (code, json, _) = annulus(&[
        "layout",
        "--rect",
        "48inx36in",
        "--method",
        "equal-area",
        "--lines",
        "4",
        "--points",
        "12",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    // methods.md §2.1 [D]: 48 × 36 in, 4 × 3 -> line offsets 6, 18, 30, 42 in; points 6, 18, 30 in
    let pts = v["points"].as_array().unwrap();
    assert_eq!(pts.len(), 12);
    let offs: Vec<f64> = pts
        .iter()
        .step_by(3)
        .map(|p| p["line_offset_m"].as_f64().unwrap() / 0.0254)
        .collect();
    for (a, b) in offs.iter().zip([6.0, 18.0, 30.0, 42.0]) {
        assert!((a - b).abs() < 1e-9);
    }
    for k in [
        "line",
        "point",
        "position_m",
        "fraction",
        "insertion_m",
        "weight",
        "adjusted",
    ] {
        assert!(pts[0].get(k).is_some(), "no {k}");
    }
    assert!(v.get("area_m2").is_some());
    let (code, out, _) = annulus(&["layout", "sample-data/stack/survey.toml", "--format", "csv"]);
    assert_eq!(code, 0);
    assert_eq!(out.lines().count(), 25);
}

#[test]
fn layout_refuses_bad_flags() {
    let (code, _, err) = annulus(&["layout", "--round", "60 furlong"]);
    assert_eq!(code, 1);
    assert!(err.contains("unknown unit `furlong`"), "{err}");
    let (code, _, err) = annulus(&["layout", "--rect", "48in"]);
    assert_eq!(code, 1);
    assert!(err.contains("WIDTHxHEIGHT"), "{err}");
    let (code, _, err) = annulus(&[
        "layout",
        "--round",
        "60in",
        "--method",
        "log-tchebycheff",
        "--lines",
        "2",
        "--points",
        "20",
    ]);
    assert_eq!(code, 1);
    assert!(err.contains("rows for [6, 8] points"), "{err}");
    let (code, _, _) = annulus(&["layout"]);
    assert_eq!(code, 1);
    let (code, _, _) = annulus(&["frobnicate"]);
    assert_eq!(code, 1);
}

#[test]
fn init_writes_a_survey_that_round_trips_and_never_overwrites() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path().to_str().unwrap();
    let (code, _, err) = annulus(&[
        "init",
        d,
        "--round",
        "96in",
        "--runs",
        "2",
        "--date",
        "2026-12-01",
        "--upstream",
        "8D",
        "--downstream",
        "2D",
    ]);
    assert_eq!(code, 0, "{err}");
    let sheet = std::fs::read_to_string(Path::new(d).join("run1.csv")).unwrap();
    assert_eq!(sheet.lines().count(), 1 + 12, "{sheet}");
    assert!(sheet.starts_with("line,point,dp[inH2O],temperature[F],yaw[deg]\nA,1,,,\n"));
    // the blank survey names its empty fields when computed
    let survey = Path::new(d).join("survey.toml");
    let (code, _, err) = annulus(&["compute", survey.to_str().unwrap()]);
    assert_eq!(code, 1);
    assert!(err.contains("gas.barometric"), "{err}");
    // and its layout is the one init printed
    let (code, out, _) = annulus(&["layout", survey.to_str().unwrap(), "--format", "csv"]);
    assert_eq!(code, 0);
    assert_eq!(out.lines().count(), 13);
    let (code, _, err) = annulus(&["init", d, "--round", "96in"]);
    assert_eq!(code, 1);
    assert!(err.contains("already exists"), "{err}");
}

#[test]
fn check_passes_the_samples_and_fails_the_bad_plane() {
    let (code, out, err) = annulus(&["check", "sample-data/stack/survey.toml"]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("verdict: pass"), "{out}");
    let (code, out, _) = annulus(&["check", "sample-data/bad-plane/survey.toml"]);
    assert_eq!(code, 3);
    for id in [
        "straight-run-epa",
        "cyclonic-flow",
        "leak-check",
        "probe-calibration",
    ] {
        assert!(out.contains(id), "bad-plane: no `{id}` finding");
    }
    assert!(out.contains("RUN 2 IS VOID AND EXCLUDED FROM THE AVERAGE"));
    let (code, json, _) = annulus(&[
        "check",
        "sample-data/bad-plane/survey.toml",
        "--format",
        "json",
    ]);
    assert_eq!(code, 3);
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    assert_eq!(v["verdict"], "fail");
    let (code, json, _) = annulus(&[
        "compute",
        "sample-data/bad-plane/survey.toml",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0, "compute reports, check judges");
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    assert_eq!(
        v["average"]["runs"],
        serde_json::json!(["1"]),
        "the run with a failed leak check is left out"
    );
    // contract: every run carries its checks and uncertainty
    for k in [
        "expanded_relative",
        "coverage_factor",
        "effective_dof",
        "components",
    ] {
        assert!(
            v["runs"][0]["uncertainty"].get(k).is_some(),
            "no uncertainty.{k}"
        );
    }
    for k in ["id", "status", "message", "source"] {
        assert!(
            v["runs"][0]["checks"][0].get(k).is_some(),
            "no checks[].{k}"
        );
    }
}

#[test]
fn a_survey_takes_its_coefficient_from_a_calibration_file() {
    let dir = tempfile::tempdir().unwrap();
    let stack = root().join("sample-data/stack");
    let survey = std::fs::read_to_string(stack.join("survey.toml")).unwrap();
    for i in 1..=3 {
        std::fs::copy(
            stack.join(format!("run{i}.csv")),
            dir.path().join(format!("run{i}.csv")),
        )
        .unwrap();
    }
    let cal = root().join("tests/data/calibration");
    for f in ["rejected.toml", "rejected.csv"] {
        std::fs::copy(cal.join(f), dir.path().join(f)).unwrap();
    }
    // a calibration that fails Method 2 §10.1 acceptance is a failed finding
    let rejected = survey.replace("../calibration/ts-0417.toml", "rejected.toml");
    let p = dir.path().join("rejected-survey.toml");
    std::fs::write(&p, rejected).unwrap();
    let (code, out, err) = annulus(&["check", p.to_str().unwrap()]);
    assert_eq!(code, 3, "{err}");
    assert!(out.contains("FAILS Method 2 §10.1 acceptance"), "{out}");
    // a coefficient that contradicts the calibration is refused, located
    let sub = dir.path().join("stack");
    let calib = dir.path().join("calibration");
    std::fs::create_dir_all(&sub).unwrap();
    std::fs::create_dir_all(&calib).unwrap();
    for f in ["ts-0417.toml", "ts-0417.csv"] {
        std::fs::copy(
            root().join("sample-data/calibration").join(f),
            calib.join(f),
        )
        .unwrap();
    }
    for i in 1..=3 {
        std::fs::copy(
            stack.join(format!("run{i}.csv")),
            sub.join(format!("run{i}.csv")),
        )
        .unwrap();
    }
    let conflicting = survey.replace(
        "serial = \"TS-0417\"",
        "serial = \"TS-0417\"\ncoefficient = 0.81",
    );
    let q = sub.join("survey.toml");
    std::fs::write(&q, conflicting).unwrap();
    let (code, _, err) = annulus(&["compute", q.to_str().unwrap()]);
    assert_eq!(code, 1);
    assert!(
        err.contains("differs from 0.8396 assigned by the calibration file"),
        "{err}"
    );
}

#[test]
fn compute_prints_si_on_request() {
    let (code, us, _) = annulus(&["compute", "sample-data/stack/survey.toml"]);
    assert_eq!(code, 0);
    assert!(us.contains("dscfm"));
    let (code, si, _) = annulus(&["compute", "sample-data/stack/survey.toml", "--si"]);
    assert_eq!(code, 0);
    assert!(
        si.contains("Q std dry [m³/h]") && !si.contains("dscfm"),
        "{si}"
    );
    // the method's formulas keep its own units; the figures are all SI (--quiet drops the notes)
    let (_, si, _) = annulus(&[
        "compute",
        "sample-data/stack/survey.toml",
        "--si",
        "--quiet",
    ]);
    assert!(units_of_another_system(&si, System::Si).is_empty(), "{si}");
    // --units names the system; SI and EPA metric per-point CSVs read their own units
    let (code, csv, _) = annulus(&[
        "compute",
        "sample-data/hvac/survey.toml",
        "--units",
        "si",
        "--format",
        "csv",
    ]);
    assert_eq!(code, 0);
    assert!(csv.starts_with("run,line,point,position[mm],dp[Pa],temperature[C]"));
    let (code, check, _) = annulus(&[
        "check",
        "sample-data/stack/survey.toml",
        "--units",
        "epa-metric",
    ]);
    assert_eq!(code, 0);
    assert!(
        units_of_another_system(&check, System::EpaMetric).is_empty(),
        "{check}"
    );
    let (code, _, err) = annulus(&[
        "compute",
        "sample-data/stack/survey.toml",
        "--units",
        "metric",
    ]);
    assert_eq!(code, 1);
    assert!(
        err.contains("inch-pound") && err.contains("epa-metric"),
        "{err}"
    );
    // JSON stays SI whatever the screen's units
    let (_, a, _) = annulus(&[
        "compute",
        "sample-data/stack/survey.toml",
        "--format",
        "json",
    ]);
    let (_, b, _) = annulus(&[
        "compute",
        "sample-data/stack/survey.toml",
        "--format",
        "json",
        "--si",
    ]);
    assert_eq!(a, b);
}

#[test]
fn init_writes_each_job_in_its_own_units() {
    let dir = tempfile::tempdir().unwrap();
    // the convention's own units, and EPA Method 2 reduced in metric on request
    for (convention, units, system, want_sheet, want_survey) in [
        (
            "hvac-ip",
            None,
            System::InchPound,
            "dp[inH2O],temperature[F]",
            "\"29.62 inHg\"",
        ),
        (
            "iso-16911",
            None,
            System::Si,
            "dp[Pa],temperature[C]",
            "\"100.3 kPa\"",
        ),
        (
            "epa-method-2",
            Some("epa-metric"),
            System::EpaMetric,
            "dp[mmH2O],temperature[C]",
            "epa_units = \"metric\"",
        ),
    ] {
        let d = dir.path().join(convention);
        let mut args = vec![
            "init",
            d.to_str().unwrap(),
            "--round",
            "1.5m",
            "--convention",
            convention,
            "--upstream",
            "8D",
            "--downstream",
            "2D",
            "--date",
            "2026-12-01",
        ];
        if let Some(u) = units {
            args.extend(["--units", u]);
        }
        let (code, _, err) = annulus(&args);
        assert_eq!(code, 0, "{err}");
        let sheet = std::fs::read_to_string(d.join("run1.csv")).unwrap();
        assert!(
            sheet.starts_with(&format!("line,point,{want_sheet}")),
            "{sheet}"
        );
        let survey = std::fs::read_to_string(d.join("survey.toml")).unwrap();
        assert!(survey.contains(want_survey), "{convention}: {survey}");
        // the units the file is written in, comment examples included
        let foreign = units_of_another_system(&survey.replace('"', " "), system);
        assert!(foreign.is_empty(), "{convention}: {}", foreign.join("\n"));
        // and the layout read back from it shows the same units
        let (code, out, err) = annulus(&["layout", d.join("survey.toml").to_str().unwrap()]);
        assert_eq!(code, 0, "{err}");
        assert!(
            units_of_another_system(&out, system).is_empty(),
            "{convention}: {out}"
        );
    }
}

/// One run reports every problem of a survey, its assessment sections, the files it names and
/// its readings: structural (unknown key, wrong type, missing key), values (a date, empty
/// quantities whose hints fit their kind), [checks] and [reported], a readings file that cannot
/// be read (located at the survey line naming it) and a bad cell.
#[test]
fn every_problem_of_a_survey_and_its_files_in_one_run() {
    let (code, out, err) = annulus(&["compute", "tests/data/bad/many-problems.toml"]);
    assert_eq!(code, 1);
    assert_eq!(out, "");
    let expect = [
        (
            "error: `survey.date` is not a date: `14/10/2026`",
            "tests/data/bad/many-problems.toml:7:8 (`survey.date`)",
            "write the date as YYYY-MM-DD, e.g. \"2026-10-14\"",
        ),
        (
            "error: unknown key `port_lenght` in [duct]",
            "tests/data/bad/many-problems.toml:15:1",
            "did you mean `port_length`?",
        ),
        (
            "error: `layout.points_per_line` must be a whole number, found the string `12`",
            "tests/data/bad/many-problems.toml:20:19 (`layout.points_per_line`)",
            "write the number without quotes: points_per_line = 12",
        ),
        (
            "error: [gas] has no `barometric`",
            "tests/data/bad/many-problems.toml:26:1 (`gas`)",
            "add barometric = \"29.92 inHg\"",
        ),
        (
            "error: `gas.static`: expected a pressure, found nothing",
            "tests/data/bad/many-problems.toml:27:10 (`gas.static`)",
            "write a number and a unit, e.g. `-0.85 inH2O`",
        ),
        (
            "error: `gas.moisture`: expected a percentage, found nothing",
            "tests/data/bad/many-problems.toml:30:12 (`gas.moisture`)",
            "write a number and a unit, e.g. `8.1 %`",
        ),
        (
            "error: unknown check `cyclonic`",
            "tests/data/bad/many-problems.toml:33:1 (`checks`)",
            "valid check ids: straight-run-epa",
        ),
        (
            "error: [reported] names run `7`, which the survey does not have",
            "tests/data/bad/many-problems.toml:35:15 (`reported.run`)",
            "the survey's runs are: 1, 2",
        ),
        (
            "error: cannot read the readings file `many-problems-run2.csv` (resolved to `tests/data/bad/many-problems-run2.csv`): ",
            "tests/data/bad/many-problems.toml:45:12 (`run.readings`)",
            "readings paths are relative to the survey file",
        ),
        (
            "error: differential pressure is not a number: `0.3l`",
            "tests/data/bad/many-problems.csv:3:3 (line A, point 2, column `dp[inH2O]`)",
            "use `.` as the decimal separator",
        ),
    ];
    let lines: Vec<&str> = err.lines().collect();
    assert_eq!(lines.len(), expect.len() * 3 + 1, "{err}");
    for (i, (message, at, hint)) in expect.iter().enumerate() {
        let block = &lines[i * 3..i * 3 + 3];
        assert!(block[0].starts_with(message), "{i}: {}", block[0]);
        assert_eq!(block[1], format!(" --> {at}"), "{i}");
        assert!(
            block[2].starts_with(&format!("   = hint: {hint}")),
            "{i}: {}",
            block[2]
        );
    }
    assert_eq!(
        lines.last(),
        Some(&"10 problems found; nothing was computed")
    );
}

/// Dimensions as drawings write them: `36"x24"` is 36 in by 24 in, `5'` five feet (common practice).
#[test]
fn layout_reads_inch_and_foot_marks() {
    let (code, marks, err) = annulus(&["layout", "--rect", "36\"x24\"", "--format", "json"]);
    assert_eq!(code, 0, "{err}");
    let (_, plain, _) = annulus(&["layout", "--rect", "36inx24in", "--format", "json"]);
    assert_eq!(marks, plain);
    let (code, feet, err) = annulus(&["layout", "--round", "5'", "--format", "json"]);
    assert_eq!(code, 0, "{err}");
    let (_, inches, _) = annulus(&["layout", "--round", "60in", "--format", "json"]);
    assert_eq!(feet, inches);
}

#[test]
fn a_voided_and_replaced_run_completes_the_test_and_a_short_test_fails() {
    // EPA Method 2 §8.1 via methods.md §4: a failed post-run leak check voids the run. With the
    // run repeated the test has its three valid runs: `check` exits 0 (nothing else fails).
    let (code, out, err) = annulus(&[
        "check",
        "tests/data/runs/replaced.toml",
        "--all",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0, "{out}{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let message = |checks: &serde_json::Value, id: &str| {
        checks
            .as_array()
            .unwrap()
            .iter()
            .find(|c| c["id"] == id)
            .map(|c| c["message"].as_str().unwrap().to_string())
            .unwrap_or_default()
    };
    assert_eq!(
        message(&v["checks"], "runs-complete"),
        "3 valid runs of 3 required, void runs replaced (run 2 void: post-run leak check failed)"
    );
    assert_eq!(v["runs"][1]["valid"], false);
    assert!(
        message(&v["runs"][1]["checks"], "leak-check").contains("void and replaced"),
        "{out}"
    );
    let (code, json, _) = annulus(&[
        "compute",
        "tests/data/runs/replaced.toml",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    assert_eq!(v["runs"][1]["valid"], false);
    assert_eq!(v["runs"][1]["void_reason"], "post-run leak check failed");
    assert_eq!(v["runs"][0]["void_reason"], serde_json::Value::Null);
    assert!(v["runs"][0]["moisture_fraction"].as_f64().unwrap() > 0.0);
    assert_eq!(v["complete"], true);
    assert_eq!(v["average"]["runs"], serde_json::json!(["1", "3", "4"]));
    // without the repeat the test is short by one run: exit 3, and the finding says so
    let (code, out, _) = annulus(&["check", "tests/data/runs/short.toml", "--format", "json"]);
    assert_eq!(code, 3, "{out}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(
        message(&v["checks"], "runs-complete"),
        "the test is short: 2 valid runs of 3 required, 1 more valid run is needed \
         (run 2 void: post-run leak check failed)"
    );
}
