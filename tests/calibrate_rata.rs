//! End-to-end: `annulus calibrate` and `annulus rata` on the real binary, through the real file
//! formats. Reference values come from calculations.md §6 (printed, six decimals) and from an
//! independent numpy/scipy computation (tests/reference/calibrate_rata_gen.py → calibrate_rata.json,
//! numpy 2.4.6, scipy 1.17.1) that reads the same fixture files itself. Bad-input fixtures are
//! checked for their exact located diagnostics; the PDFs are read back with poppler's `pdftotext`
//! and their embedded files compared byte for byte.
//!
//! Terminal tables of the sample files are golden files under tests/golden/, regenerated with
//! `UPDATE_GOLDEN=1 cargo test --test calibrate_rata` and reviewed in the diff.

mod common;
use common::{golden, root};
use std::path::Path;
use std::process::Command;

use serde_json::Value;

/// calculations.md §6 prints six decimals: half a unit in the last place.
const ABS_TOL_PRINTED_6DP: f64 = 0.000_000_5;
/// Agreement with the numpy/scipy reference (printed to 17 significant digits; the two
/// computations differ only in summation order and the t quantile algorithm).
const REL_TOL_INDEPENDENT: f64 = 1e-9;

fn annulus(args: &[&str]) -> (i32, String, String) {
    common::run(&root(), args, &[])
}

fn json_of(args: &[&str], want_code: i32) -> Value {
    let mut all = args.to_vec();
    all.extend(["--format", "json"]);
    let (code, out, err) = annulus(&all);
    assert_eq!(code, want_code, "{args:?}: {err}");
    serde_json::from_str(&out).expect("JSON output")
}

fn reference() -> Value {
    let text = std::fs::read_to_string(root().join("tests/reference/calibrate_rata.json"))
        .expect("tests/reference/calibrate_rata.json (run calibrate_rata_gen.py)");
    serde_json::from_str(&text).expect("reference JSON")
}

fn num(v: &Value) -> f64 {
    v.as_f64()
        .unwrap_or_else(|| panic!("expected a number, found {v}"))
}

fn close(found: &Value, want: &Value, what: &str) {
    let (f, w) = (num(found), num(want));
    assert!(
        (f - w).abs() <= REL_TOL_INDEPENDENT * w.abs().max(1e-12),
        "{what}: annulus {f}, reference {w}"
    );
}

fn pdf_text(path: &Path) -> String {
    let out = Command::new("pdftotext")
        .args(["-layout", path.to_str().expect("UTF-8 path"), "-"])
        .output()
        .expect("pdftotext is installed (poppler-utils; .ci/run installs it)");
    String::from_utf8_lossy(&out.stdout).into_owned()
}

fn sha256_hex(bytes: &[u8]) -> String {
    use sha2::Digest;
    sha2::Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

// ---- calibrate -------------------------------------------------------------------------------------

#[test]
fn calibrate_worked_example_through_the_file_format() {
    let v = json_of(
        &["calibrate", "tests/data/calibration/method2-example.toml"],
        0,
    );
    let legs = &v["legs"];
    // calculations.md §6 [D], from the EPA Method 2 §10.1 equations (transcribed): Cp(std) 0.99
    // assumed; means 0.835055 / 0.831741, σ 0.001098 / 0.002999, |A−B| 0.003315, accept.
    for (got, want) in [
        (&legs[0]["mean"], 0.835055),
        (&legs[1]["mean"], 0.831741),
        (&legs[0]["deviation"], 0.001098),
        (&legs[1]["deviation"], 0.002999),
        (&v["leg_difference"], 0.003315),
    ] {
        assert!(
            (num(got) - want).abs() <= ABS_TOL_PRINTED_6DP,
            "{got} vs {want}"
        );
    }
    // calculations.md §6 [D]: leg A readings 0.836703, 0.833779, 0.834684.
    let a: Vec<f64> = v["readings"]
        .as_array()
        .expect("readings")
        .iter()
        .filter(|r| r["leg"] == "A")
        .map(|r| num(&r["coefficient"]))
        .collect();
    for (got, want) in a.iter().zip([0.836703, 0.833779, 0.834684]) {
        assert!((got - want).abs() <= ABS_TOL_PRINTED_6DP, "{got} vs {want}");
    }
    assert_eq!(v["accepted"], true);
    assert_eq!(v["standard"]["assumed"], true);
    assert_eq!(num(&v["standard"]["coefficient"]), 0.99);
    // Independent numpy computation from the same files (calibrate_rata_gen.py).
    let r = &reference()["calibration"]["method2-example"];
    close(
        &v["assigned_coefficient"],
        &r["assigned_coefficient"],
        "assigned Cp",
    );
    close(&legs[1]["deviation"], &r["legs"]["B"]["deviation"], "σ B");
}

#[test]
fn calibrate_rejects_a_scattered_leg_with_exit_3() {
    let v = json_of(&["calibrate", "tests/data/calibration/rejected.toml"], 3);
    // Independent numpy computation (calibrate_rata_gen.py) from the invented fixture: leg B
    // Cp 0.856614, 0.808807, 0.837793 → σ 0.017065 > 0.01; legs agree within 0.005171.
    let r = &reference()["calibration"]["rejected"];
    assert_eq!(r["accepted"], false);
    close(&v["legs"][0]["mean"], &r["legs"]["A"]["mean"], "mean A");
    close(&v["legs"][1]["mean"], &r["legs"]["B"]["mean"], "mean B");
    close(
        &v["legs"][1]["deviation"],
        &r["legs"]["B"]["deviation"],
        "σ B",
    );
    close(&v["leg_difference"], &r["leg_difference"], "|A − B|");
    assert_eq!(v["accepted"], false);
    assert_eq!(v["standard"]["assumed"], false);
    let status: Vec<&str> = v["checks"]
        .as_array()
        .expect("checks")
        .iter()
        .map(|c| c["status"].as_str().unwrap_or(""))
        .collect();
    assert_eq!(status, ["pass", "fail", "pass"]);
    let (code, out, _) = annulus(&["calibrate", "tests/data/calibration/rejected.toml"]);
    assert_eq!(code, 3);
    assert!(
        out.contains("REJECTED: leg B deviation σ 0.0171 exceeds 0.0100"),
        "{out}"
    );
}

#[test]
fn calibrate_sample_prints_the_table_and_csv() {
    let (code, out, err) = annulus(&["calibrate", "sample-data/calibration/ts-0417.toml"]);
    assert_eq!(code, 0, "{err}");
    assert_eq!(err, "");
    golden("calibrate-ts-0417.txt", &out);
    let (code, csv, _) = annulus(&[
        "calibrate",
        "sample-data/calibration/ts-0417.toml",
        "--format",
        "csv",
    ]);
    assert_eq!(code, 0);
    let lines: Vec<&str> = csv.lines().collect();
    assert_eq!(
        lines[0],
        "leg,reading,standard_dp[Pa],s_type_dp[Pa],cp,abs_deviation,leg_mean,leg_deviation"
    );
    assert_eq!(lines.len(), 7, "header and six readings");
    assert!(lines[4].starts_with("B,1,"), "{}", lines[4]);
}

#[test]
fn calibrate_bad_readings_are_located_in_one_pass() {
    let (code, out, err) = annulus(&["calibrate", "tests/data/calibration/bad-cells.toml"]);
    assert_eq!(code, 1);
    assert_eq!(out, "");
    assert_eq!(
        err,
        "error: row has 4 fields, the header has 3
 --> tests/data/calibration/bad-cells.csv:3:1
   = hint: a decimal comma splits a number into two fields: use `.` as the decimal separator
error: leg must be `A` or `B`, found `C`
 --> tests/data/calibration/bad-cells.csv:5:1 (column `leg`)
   = hint: write which leg of the Type S tube faced the flow: A or B
error: Type S pitot Δp must be greater than zero, found `-0.789`
 --> tests/data/calibration/bad-cells.csv:6:3 (leg B, column `s_type_dp[inH2O]`)
   = hint: a calibration reading is a velocity pressure in a flowing tunnel; check the gauge connections
error: Type S pitot Δp is not a number: `0.8O1`
 --> tests/data/calibration/bad-cells.csv:7:3 (leg B, column `s_type_dp[inH2O]`)
   = hint: use `.` as the decimal separator; put units in the header, not the cell
4 problems found; nothing was computed
"
    );
}

#[test]
fn calibrate_bad_file_is_located() {
    let (code, out, err) = annulus(&["calibrate", "tests/data/calibration/bad-file.toml"]);
    assert_eq!(code, 1);
    assert_eq!(out, "");
    assert_eq!(
        err,
        "error: `calibration.date` is not a date: `2026-13-11`
 --> tests/data/calibration/bad-file.toml:4:8 (`calibration.date`)
   = hint: write the date as YYYY-MM-DD, e.g. \"2026-05-11\"
error: `calibration.velocity`: expected a velocity, found `3000 rpm` (`rpm` is a unit of rotational speed)
 --> tests/data/calibration/bad-file.toml:6:12 (`calibration.velocity`)
   = hint: a velocity takes one of: m/s, ft/s, fpm, ft/min
error: a standard pitot coefficient of 0.099 is not plausible
 --> tests/data/calibration/bad-file.toml:10:15 (`standard.coefficient`)
   = hint: a standard pitot tube is near 0.99; leave `coefficient` out to use 0.99
3 problems found; nothing was computed
"
    );
    let (code, _, err) = annulus(&["calibrate", "tests/data/calibration/no-such.toml"]);
    assert_eq!(code, 1);
    assert!(
        err.starts_with("error: cannot read `tests/data/calibration/no-such.toml`"),
        "{err}"
    );
}

#[test]
fn calibrate_certificate_pdf_carries_the_numbers_and_the_files() {
    let dir = tempfile::tempdir().expect("temp dir");
    let pdf = dir.path().join("cert.pdf");
    let (code, _, err) = annulus(&[
        "calibrate",
        "sample-data/calibration/ts-0417.toml",
        "-o",
        pdf.to_str().expect("UTF-8"),
    ]);
    assert_eq!(code, 0, "{err}");
    assert!(err.contains("wrote calibration certificate"), "{err}");
    let bytes = std::fs::read(&pdf).expect("PDF written");
    let text = pdf_text(&pdf);
    for key in [
        "ACCEPTED",
        "CAL-TS-0417-20260511",
        "Probe TS-0417",
        "0.8396", // assigned: (0.840256 + 0.838947)/2, printed to four places
        "0.8403",
        "0.8389",
        "0.0010",
        "0.0009",
        "0.0013",
        "0.99 assumed",
        "2026-05-11",
        "Oren Castellan",
        "qualified professional",
        "Page 1 of 1",
    ] {
        assert!(text.contains(key), "certificate lacks `{key}`:\n{text}");
    }
    let toml = std::fs::read(root().join("sample-data/calibration/ts-0417.toml")).expect("toml");
    let csv = std::fs::read(root().join("sample-data/calibration/ts-0417.csv")).expect("csv");
    // The SHA-256 of each embedded file is printed (pdftotext may wrap it; check a prefix).
    assert!(text.contains(&sha256_hex(&csv)[..32]), "{text}");
    let files = annulus::report::embedded_files(&bytes).expect("attachments readable");
    let mut names: Vec<&str> = files.iter().map(|f| f.name.as_str()).collect();
    names.sort_unstable();
    // the inputs, plus what makes the certificate verifiable: results, manifest and seal
    assert_eq!(
        names,
        [
            "annulus-manifest.json",
            "annulus-seal.json",
            "results.json",
            "ts-0417.csv",
            "ts-0417.toml"
        ]
    );
    let get = |name: &str| files.iter().find(|f| f.name == name).expect("embedded");
    assert_eq!(
        get("ts-0417.toml").bytes,
        toml,
        "TOML embedded byte for byte"
    );
    assert_eq!(get("ts-0417.csv").bytes, csv, "CSV embedded byte for byte");
    assert_eq!(get("ts-0417.csv").mime.as_deref(), Some("text/csv"));
    // Pinned to the calibration date: the same files give the same PDF.
    let again = dir.path().join("again.pdf");
    let (code, _, _) = annulus(&[
        "calibrate",
        "sample-data/calibration/ts-0417.toml",
        "--quiet",
        "-o",
        again.to_str().expect("UTF-8"),
    ]);
    assert_eq!(code, 0);
    assert_eq!(std::fs::read(&again).expect("PDF"), bytes, "reproducible");
}

#[test]
fn a_rejected_calibration_still_gets_a_certificate_that_says_so() {
    let dir = tempfile::tempdir().expect("temp dir");
    let pdf = dir.path().join("rejected.pdf");
    let (code, _, err) = annulus(&[
        "calibrate",
        "tests/data/calibration/rejected.toml",
        "-o",
        pdf.to_str().expect("UTF-8"),
    ]);
    assert_eq!(code, 3, "{err}");
    let text = pdf_text(&pdf);
    for key in ["REJECTED", "0.0171", "FAIL", "no coefficient is assigned"] {
        assert!(text.contains(key), "certificate lacks `{key}`:\n{text}");
    }
}

#[test]
fn an_unwritable_output_leaves_nothing_behind() {
    let dir = tempfile::tempdir().expect("temp dir");
    let pdf = dir.path().join("no-such-dir/cert.pdf");
    let (code, out, err) = annulus(&[
        "calibrate",
        "sample-data/calibration/ts-0417.toml",
        "-o",
        pdf.to_str().expect("UTF-8"),
    ]);
    assert_eq!(code, 2, "{err}");
    assert!(out.contains("accepted"), "results are printed first");
    assert!(err.starts_with("error: cannot write"), "{err}");
    assert!(!pdf.exists());
}

// ---- rata --------------------------------------------------------------------------------------

/// Compares the `annulus rata --format json` statistics with the independent reference.
fn check_rata(file: &str, name: &str, code: i32) -> Value {
    let v = json_of(&["rata", file], code);
    let r = &reference()["rata"][name];
    let s = if v["quantity"] == "velocity" {
        "m_s"
    } else {
        "m3_s"
    };
    assert_eq!(v["used_runs"], r["used_runs"], "{name}");
    for (key, reference_key) in [
        (format!("mean_difference_{s}"), "mean_difference"),
        (format!("std_dev_difference_{s}"), "std_dev_difference"),
        ("t_value".to_string(), "t_value"),
        (
            format!("confidence_coefficient_{s}"),
            "confidence_coefficient",
        ),
        (format!("reference_mean_{s}"), "reference_mean"),
        (format!("monitor_mean_{s}"), "monitor_mean"),
        (
            "relative_accuracy_percent".to_string(),
            "relative_accuracy_percent",
        ),
    ] {
        close(&v[&key], &r[reference_key], &format!("{name} {key}"));
    }
    assert_eq!(v["bias"]["passed"], r["bias_passed"], "{name}");
    close(
        &v["bias"]["adjustment_factor"],
        &r["adjustment_factor"],
        &format!("{name} BAF"),
    );
    v
}

#[test]
fn rata_passing_set_matches_the_independent_computation() {
    // Reference: numpy/scipy from the fixture (calibrate_rata_gen.py); run 7 is rejected and
    // must not count: 9 used, RA 0.4746 %, annual frequency, bias passes.
    let v = check_rata("tests/data/rata/passing.toml", "passing", 0);
    assert_eq!(v["runs"].as_array().map(Vec::len), Some(10));
    assert_eq!(v["runs"][6]["used"], false);
    assert_eq!(
        v["runs"][6]["rejection"],
        "monitor purge cycle during the run"
    );
    assert_eq!(v["grade"], "pass-annual-frequency");
    assert_eq!(v["low_velocity"]["applicable"], false);
}

#[test]
fn rata_low_monitor_fails_the_bias_test_and_gets_a_baf() {
    // Reference: numpy/scipy (calibrate_rata_gen.py): flows in cfm converted with
    // 1 cfm = 0.3048³/60 m³/s; monitor about 7.5 % low → RA 7.80 % (semiannual), d̄ > |cc|,
    // BAF = 1 + |d̄|/CEM avg ≈ 1.081.
    let v = check_rata("tests/data/rata/bias-fail.toml", "bias-fail", 0);
    assert_eq!(v["grade"], "pass");
    assert_eq!(v["bias"]["passed"], false);
    assert!(num(&v["bias"]["adjustment_factor"]) > 1.08);
    assert_eq!(v["frequency"], "semiannual");
    let (code, out, _) = annulus(&["rata", "tests/data/rata/bias-fail.toml"]);
    assert_eq!(code, 0, "a failed bias test alone does not fail the RATA");
    assert!(out.contains("BAF = 1 + |mean d|/CEM avg = 1.081"), "{out}");
    assert!(out.contains("mean RM        161,867 cfm"), "{out}");
}

#[test]
fn rata_low_velocity_alternative_and_a_failure() {
    // Reference: numpy/scipy (calibrate_rata_gen.py): RM avg 9.07 ft/s ≤ 10 ft/s; RA 10.4 %
    // fails, |RM − CEM| 0.91 ft/s ≤ 1.5 ft/s earns the annual frequency on the alternative.
    let v = check_rata("tests/data/rata/low-velocity.toml", "low-velocity", 0);
    let r = &reference()["rata"]["low-velocity"];
    assert_eq!(v["ra_grade"], "fail");
    assert_eq!(v["low_velocity"]["applicable"], true);
    close(
        &v["low_velocity"]["abs_mean_difference_m_s"],
        &r["abs_mean_difference_m_s"],
        "|RM − CEM|",
    );
    assert_eq!(v["low_velocity"]["grade"], "pass-annual-frequency");
    assert_eq!(v["grade"], "pass-annual-frequency");
    // Reference: numpy/scipy: a scattered monitor, RA 12.18 % > 10 % → exit 3.
    let v = check_rata("tests/data/rata/failing.toml", "failing", 3);
    assert_eq!(v["passed"], false);
    let (code, out, _) = annulus(&["rata", "tests/data/rata/failing.toml"]);
    assert_eq!(code, 3);
    assert!(
        out.contains("FAIL: the relative accuracy exceeds its limit"),
        "{out}"
    );
}

#[test]
fn rata_survey_references_use_the_survey_average() {
    let v = json_of(&["rata", "sample-data/rata/unit2-rata.toml"], 0);
    for (i, dir) in ["run-01", "run-02", "run-03"].iter().enumerate() {
        let survey = format!("sample-data/rata/{dir}/survey.toml");
        let c = json_of(&["compute", &survey], 0);
        let want = num(&c["average"]["mean_velocity_m_s"]);
        let got = num(&v["runs"][i]["reference_m_s"]);
        assert!((got - want).abs() <= 1e-12 * want, "{dir}: {got} vs {want}");
        assert_eq!(
            v["runs"][i]["reference_source"]["survey"],
            format!("{dir}/survey.toml")
        );
    }
    assert_eq!(v["runs"][6]["used"], false);
    assert_eq!(v["used_runs"], 11);
    let (code, out, err) = annulus(&["rata", "sample-data/rata/unit2-rata.toml"]);
    assert_eq!(code, 0, "{err}");
    assert_eq!(err, "");
    golden("rata-unit2.txt", &out);
    let (code, csv, _) = annulus(&[
        "rata",
        "sample-data/rata/unit2-rata.toml",
        "--format",
        "csv",
    ]);
    assert_eq!(code, 0);
    let lines: Vec<&str> = csv.lines().collect();
    assert_eq!(
        lines[0],
        "run,reference[ft/s],monitor[ft/s],difference[ft/s],used,rejection,reference_from"
    );
    assert_eq!(lines.len(), 13);
}

#[test]
fn rata_flow_survey_references_take_the_named_basis() {
    let v = json_of(&["rata", "tests/data/rata/flow-surveys.toml"], 0);
    assert_eq!(v["basis"], "dry-standard");
    for (i, dir) in ["run-01", "run-02", "run-03"].iter().enumerate() {
        let c = json_of(
            &["compute", &format!("sample-data/rata/{dir}/survey.toml")],
            0,
        );
        let want = num(&c["average"]["dry_standard_flow_m3_s"]);
        let got = num(&v["runs"][i]["reference_m3_s"]);
        assert!((got - want).abs() <= 1e-12 * want, "{dir}: {got} vs {want}");
    }
    // 250 000 m³/h entered → m³/s (÷ 3600, exact).
    assert!((num(&v["runs"][0]["monitor_m3_s"]) - 250_000.0 / 3600.0).abs() < 1e-9);
}

#[test]
fn rata_bad_values_are_located_in_one_pass() {
    let (code, out, err) = annulus(&["rata", "tests/data/rata/bad-values.toml"]);
    assert_eq!(code, 1);
    assert_eq!(out, "");
    assert_eq!(
        err,
        "error: `run.reference`: not a number: `15,21 m/s`
 --> tests/data/rata/bad-values.toml:12:13 (`run.reference`)
   = hint: use `.` as the decimal separator and no thousands separators
error: `run.monitor`: expected a velocity, found `15.52 cfm` (`cfm` is a unit of volume flow)
 --> tests/data/rata/bad-values.toml:18:11 (`run.monitor`)
   = hint: a velocity takes one of: m/s, ft/s, fpm, ft/min
error: each RATA run id must be unique, found `2` twice
 --> tests/data/rata/bad-values.toml:21:6 (`run.id`)
error: run `4` is rejected, so it needs a reason, found none
 --> tests/data/rata/bad-values.toml:29:12 (`run.rejected`)
   = hint: write why, e.g. rejected = \"monitor in daily calibration during the run\"
4 problems found; nothing was computed
"
    );
}

#[test]
fn rata_bad_survey_references_are_located_in_their_own_files() {
    let (code, out, err) = annulus(&["rata", "tests/data/rata/bad-survey.toml"]);
    assert_eq!(code, 1);
    assert_eq!(out, "");
    assert_eq!(
        err,
        "error: cannot read the survey `no-such/survey.toml` (resolved to `tests/data/rata/no-such/survey.toml`): No such file or directory (os error 2)
 --> tests/data/rata/bad-survey.toml:57:10 (`run.survey`)
   = hint: survey paths in a RATA file are relative to the RATA file
error: differential pressure is not a number: `0.6l`
 --> tests/data/rata/bad-survey/traverse.csv:4:3 (line A, point 3, column `dp[inH2O]`)
   = hint: use `.` as the decimal separator; put units in the header, not the cell
2 problems found; nothing was computed
"
    );
}

#[test]
fn rata_summary_pdf_carries_the_numbers_and_the_files() {
    let dir = tempfile::tempdir().expect("temp dir");
    let pdf = dir.path().join("rata.pdf");
    let (code, _, err) = annulus(&[
        "rata",
        "sample-data/rata/unit2-rata.toml",
        "-o",
        pdf.to_str().expect("UTF-8"),
    ]);
    assert_eq!(code, 0, "{err}");
    let bytes = std::fs::read(&pdf).expect("PDF written");
    let text = pdf_text(&pdf);
    for key in [
        "Paired runs",
        "Relative accuracy",
        "Unit 2 stack flow monitor, annual RATA",
        "PASS",
        "0.51 %",
        "50.56 ft/s",
        "50.46 ft/s",
        "2.228",
        "1.000",
        "monitor ran its daily calibration",
        "survey run-01/survey.toml",
        "Kestrel Ridge Generating Station (fictional)",
        "qualified professional",
    ] {
        assert!(text.contains(key), "summary lacks `{key}`:\n{text}");
    }
    let files = annulus::report::embedded_files(&bytes).expect("attachments readable");
    let get = |name: &str| {
        files
            .iter()
            .find(|f| f.name == name)
            .unwrap_or_else(|| panic!("no embedded `{name}`"))
            .bytes
            .clone()
    };
    let read = |p: &str| std::fs::read(root().join(p)).expect("fixture");
    assert_eq!(
        get("unit2-rata.toml"),
        read("sample-data/rata/unit2-rata.toml")
    );
    assert_eq!(
        get("run-1--survey.toml"),
        read("sample-data/rata/run-01/survey.toml")
    );
    assert_eq!(
        get("run-3--traverse.csv"),
        read("sample-data/rata/run-03/traverse.csv")
    );
    assert_eq!(
        files.len(),
        10,
        "the RATA file and three surveys with their readings, then results, manifest and seal"
    );

    let pdf = dir.path().join("bias.pdf");
    let (code, _, _) = annulus(&[
        "rata",
        "tests/data/rata/bias-fail.toml",
        "--quiet",
        "-o",
        pdf.to_str().expect("UTF-8"),
    ]);
    assert_eq!(code, 0);
    let text = pdf_text(&pdf);
    for key in ["BAF 1.081.", "monitor reads low", "semiannual", "7.80 %"] {
        assert!(text.contains(key), "summary lacks `{key}`:\n{text}");
    }
}

#[test]
fn help_shows_the_examples_and_they_run() {
    for (cmd, example) in [
        (
            "calibrate",
            "annulus calibrate sample-data/calibration/ts-0417.toml",
        ),
        ("rata", "annulus rata sample-data/rata/unit2-rata.toml"),
    ] {
        let (code, out, _) = annulus(&[cmd, "--help"]);
        assert_eq!(code, 0);
        assert!(out.contains(example), "{out}");
        assert!(out.contains("--format"), "{out}");
        assert!(out.contains("-o, --output <OUT.pdf>"), "{out}");
        let args: Vec<&str> = example.split(' ').skip(1).collect();
        assert_eq!(annulus(&args).0, 0, "{example}");
    }
}

#[test]
fn rata_levels_one_run_of_a_survey_and_the_calibration_embedded() {
    // Two load levels in one file: each is a RATA of its own with its own result.
    let v = json_of(&["rata", "tests/data/rata/levels.toml"], 0);
    let levels = v["levels"].as_array().expect("one document per level");
    assert_eq!(levels.len(), 2);
    assert_eq!(levels[0]["level"], "low");
    assert_eq!(levels[1]["level"], "high");
    assert_eq!(levels[0]["used_runs"], 9);
    assert_eq!(levels[1]["used_runs"], 9);
    // the low level reads low by 0.02 m/s within cc; the high level reads low beyond it
    assert_eq!(levels[0]["bias"]["monitor_reads"], "low");
    assert_eq!(levels[0]["bias"]["passed"], true);
    assert_eq!(levels[1]["bias"]["passed"], false);
    assert!(levels[1]["bias"]["words"]
        .as_str()
        .unwrap()
        .starts_with("the monitor reads LOW"));
    // runs H1–H3 take one run each of the three-run survey (`path#run`): its value is that
    // run's mean velocity as `compute` reports it, not the survey's average
    let c = json_of(&["compute", "tests/data/rata/levels-survey/survey.toml"], 0);
    for i in 0..3 {
        let want = num(&c["runs"][i]["mean_velocity_m_s"]);
        let got = num(&levels[1]["runs"][i]["reference_m_s"]);
        assert!(
            (got - want).abs() <= 1e-12 * want,
            "run {i}: {got} vs {want}"
        );
        assert_eq!(
            levels[1]["runs"][i]["reference_source"]["runs"],
            serde_json::json!([format!("{}", i + 1)])
        );
    }
    // one summary per level; each embeds the surveys it used and the calibration they took
    // their probe coefficient from
    let dir = tempfile::tempdir().expect("temp dir");
    let pdf = dir.path().join("levels.pdf");
    let (code, _, err) = annulus(&[
        "rata",
        "tests/data/rata/levels.toml",
        "-o",
        pdf.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    assert!(dir.path().join("levels-low.pdf").exists());
    let high = std::fs::read(dir.path().join("levels-high.pdf")).expect("high-level PDF");
    let files = annulus::report::embedded_files(&high).expect("attachments readable");
    let names: Vec<&str> = files.iter().map(|f| f.name.as_str()).collect();
    for want in [
        "levels.toml",
        "run-H1--survey.toml",
        "run-H1--ts-0417.toml",
        "run-H1--ts-0417.csv",
    ] {
        assert!(names.contains(&want), "{want} not in {names:?}");
    }
    let cal = files
        .iter()
        .find(|f| f.name == "run-H1--ts-0417.toml")
        .unwrap();
    assert_eq!(
        cal.bytes,
        std::fs::read(root().join("sample-data/calibration/ts-0417.toml")).unwrap()
    );
    // the same survey is embedded once although three runs use it
    assert!(!names.contains(&"run-H2--survey.toml"), "{names:?}");
    let text = pdf_text(&dir.path().join("levels-high.pdf"));
    assert!(text.contains("reads LOW"), "{text}");
}

#[test]
fn a_void_survey_run_cannot_be_a_reference_value() {
    // run 2 of the fixture is void (failed post-run leak check): naming it is an input error
    let dir = tempfile::tempdir().expect("temp dir");
    let text = std::fs::read_to_string(root().join("tests/data/rata/passing.toml")).unwrap();
    let text = text.replacen(
        "reference = \"15.21 m/s\"",
        &format!(
            "survey = \"{}#2\"",
            root().join("tests/data/runs/replaced.toml").display()
        ),
        1,
    );
    let file = dir.path().join("void.toml");
    std::fs::write(&file, text).unwrap();
    let (code, _, err) = annulus(&["rata", file.to_str().unwrap()]);
    assert_eq!(code, 1, "{err}");
    assert!(
        err.contains("run `2` of the survey")
            && err.contains("is void (post-run leak check failed)"),
        "{err}"
    );
}
