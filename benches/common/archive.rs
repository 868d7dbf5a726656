//! The generated review archive the benchmarks share (`benches/review.rs` in memory,
//! `examples/review_archive.rs` on disk for the whole-command timings and the Python reviewers):
//! `survey-NNNNN/survey.toml` stack surveys like sample-data/stack (invented), 2 lines × 12 points,
//! three runs each with its readings CSV, values varied per survey. One survey in ten states a
//! reported figure, so the forensics path runs too. With `calibration`, every survey takes its
//! pitot coefficient from one shared calibration record (`calibration/ts-0417.toml` and its
//! readings) instead of stating it, as a crew's surveys do when one probe served them all.

#![allow(dead_code)] // each including target uses part of it

use std::path::PathBuf;

pub const DEFAULT_SURVEYS: usize = 10_000;
pub const RUNS: usize = 3;
pub const LINES: [&str; 2] = ["A", "B"];
pub const POINTS: usize = 12;

const CALIBRATION: &str = include_str!("../../sample-data/calibration/ts-0417.toml");
const CALIBRATION_READINGS: &str = include_str!("../../sample-data/calibration/ts-0417.csv");

/// A stack survey like sample-data/stack (invented), varied per index.
pub fn survey_text(i: usize, reported: bool, calibration: bool) -> String {
    let probe = if calibration {
        "calibration = \"../calibration/ts-0417.toml\""
    } else {
        "coefficient = 0.84\ncalibrated = \"2026-05-11\""
    };
    let mut s = format!(
        r#"# generated benchmark survey {i} (invented)
[survey]
title = "Bench stack {i}"
site = "Bench site (fictional)"
date = "2026-10-14"
convention = "epa-method-2"

[duct]
shape = "round"
diameter = "{diameter} in"
construction = "steel"
upstream = "8.5 D"
downstream = "2.4 D"
port_length = "6 in"

[layout]
method = "equal-area"
lines = 2
points_per_line = 12

[probe]
kind = "s-type"
serial = "TS-0417"
{probe}

[gas]
barometric = "29.{baro:02} inHg"
static = "-0.85 inH2O"
o2 = "8.1 %"
co2 = "10.6 %"
co = "0 %"
moisture = "9.8 %"
"#,
        diameter = 72 + i % 48,
        baro = 40 + i % 50,
    );
    for r in 1..=RUNS {
        s += &format!(
            "\n[[run]]\nid = \"{r}\"\nreadings = \"run{r}.csv\"\nleak_check = {{ before = \"pass\", after = \"pass\" }}\n"
        );
    }
    if reported {
        s += "\n[reported]\naverage = { dscfm = \"50000 cfm\" }\n";
    }
    s
}

/// A readings CSV with a plausible profile; `seed` varies the values.
pub fn readings_text(seed: usize) -> String {
    let mut x = (seed as u64).wrapping_mul(6_364_136_223_846_793_005) | 1;
    let mut next = || {
        x = x
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        ((x >> 33) % 1000) as f64 / 1000.0
    };
    let mut s = String::from("line,point,dp[inH2O],temperature[F],yaw[deg]\n");
    for line in LINES {
        for p in 1..=POINTS {
            let centre = 1.0 - ((p as f64 - 6.5) / 6.5).abs();
            let dp = 0.30 + 0.45 * centre + 0.03 * next();
            let t = 299.0 + 4.0 * next();
            let yaw = (next() * 20.0 - 10.0).round();
            s += &format!("{line},{p},{dp:.3},{t:.0},{yaw}\n");
        }
    }
    s
}

/// The archive of `n` surveys under `root`: the survey paths (sorted) and every file with its
/// bytes (surveys, readings and, with `calibration`, the shared record).
pub fn archive(
    root: &std::path::Path,
    n: usize,
    calibration: bool,
) -> (Vec<PathBuf>, Vec<(PathBuf, Vec<u8>)>) {
    let mut files = Vec::new();
    let mut paths = Vec::new();
    if calibration {
        let dir = root.join("calibration");
        files.push((dir.join("ts-0417.toml"), CALIBRATION.as_bytes().to_vec()));
        files.push((
            dir.join("ts-0417.csv"),
            CALIBRATION_READINGS.as_bytes().to_vec(),
        ));
    }
    for i in 0..n {
        let dir = root.join(format!("survey-{i:05}"));
        let survey = dir.join("survey.toml");
        files.push((
            survey.clone(),
            survey_text(i, i % 10 == 0, calibration).into_bytes(),
        ));
        for r in 1..=RUNS {
            files.push((
                dir.join(format!("run{r}.csv")),
                readings_text(i * RUNS + r).into_bytes(),
            ));
        }
        paths.push(survey);
    }
    (paths, files)
}
