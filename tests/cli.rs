//! End-to-end: the real binary on every sample survey and on each bad-input fixture, checking
//! stdout, stderr and the exit code. Outputs are golden files under tests/golden/, regenerated with
//! `UPDATE_GOLDEN=1 cargo test --test cli` and reviewed in the diff.

use std::path::{Path, PathBuf};
use std::process::Command;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn annulus(args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_annulus"))
        .args(args)
        .current_dir(root())
        .env("NO_COLOR", "1")
        .env_remove("SOURCE_DATE_EPOCH")
        .output()
        .expect("binary runs");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

fn golden(name: &str, found: &str) {
    let path = root().join("tests/golden").join(name);
    if std::env::var_os("UPDATE_GOLDEN").is_some() {
        std::fs::write(&path, found).unwrap();
        return;
    }
    let want = std::fs::read_to_string(&path).unwrap_or_else(|_| {
        panic!(
            "missing golden file {}; run with UPDATE_GOLDEN=1",
            path.display()
        )
    });
    assert_eq!(found, want, "output differs from {}", path.display());
}

#[test]
fn compute_runs_on_every_sample_survey() {
    for dir in ["stack", "hvac"] {
        let survey = format!("sample-data/{dir}/survey.toml");
        let (code, out, err) = annulus(&["compute", &survey]);
        assert_eq!(code, 0, "{err}");
        assert_eq!(err, "");
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
        assert!(csv.starts_with("run,line,point,position[m],dp[Pa]"));
    }
}

#[test]
fn bad_inputs_are_rejected_with_located_diagnostics() {
    for case in ["cell-typo", "survey-units", "missing-point", "negative"] {
        let survey = format!("tests/data/bad/{case}.toml");
        let (code, out, err) = annulus(&["compute", &survey]);
        assert_eq!(code, 1, "{case}: {err}");
        assert_eq!(out, "", "{case}: nothing on stdout");
        golden(&format!("bad-{case}.txt"), &err);
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
        "6",
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
        "3",
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
        "--points",
        "10",
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
