//! Test helpers: survey text and readings in memory → an evaluation → an assessment, through the
//! same parsing a user's files go through (the pattern of tests/reference.rs).

use crate::assess::{assess, Assessment};
use crate::checks::Finding;
use crate::input::assess_config::load_assess_config;
use crate::input::load_with;
use crate::pipeline::{evaluate, Evaluation};
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// An EPA Method 2 stack, 5 ft, 2 lines × 6 points, at a preferred site (8 D / 2 D). The gas and
/// Δp of calculations.md §8 (EPA Method 2, English). The fixtures are single traverses
/// (`runs_required = 1`) unless a test asks for a test of several runs ([`with_runs_required`]).
pub const EPA_SURVEY: &str = r#"
[survey]
title = "check test stack"
site = "Fenmoor test works (fictional)"
date = "2026-10-14"
convention = "epa-method-2"
runs_required = 1
[duct]
shape = "round"
diameter = "5.0 ft"
upstream = "8 D"
downstream = "2 D"
[layout]
lines = 2
points_per_line = 6
[probe]
kind = "s-type"
coefficient = 0.84
calibrated = "2026-05-11"
[gas]
barometric = "29.50 inHg"
static = "-0.50 inH2O"
o2 = "8 %"
co2 = "10 %"
co = "0 %"
moisture = "10 %"
temperature = "300 F"
"#;

/// EN-style stack of calculations.md §8: D 2.4 m, 2 lines × 10 points, K 0.84.
pub const ISO_SURVEY: &str = r#"
[survey]
title = "check test EN stack"
date = "2026-10-14"
convention = "iso-16911"
runs_required = 1
[duct]
shape = "round"
diameter = "2.4 m"
upstream = "6 D"
downstream = "3 D"
[layout]
lines = 2
points_per_line = 10
[probe]
kind = "s-type"
coefficient = 0.84
calibrated = "2026-05-11"
[gas]
barometric = "100.70 kPa"
o2 = "9 %"
co2 = "9.5 %"
moisture = "11 %"
temperature = "140 C"
"#;

/// HVAC rectangular duct 24 × 16 in, equal-area 4 lines × 5 points (20 readings).
pub const HVAC_SURVEY: &str = r#"
[survey]
title = "check test supply duct"
date = "2026-10-14"
convention = "hvac-ip"
[duct]
shape = "rectangular"
width = "24 in"
height = "16 in"
upstream = "8 D"
downstream = "3 D"
[layout]
method = "equal-area"
lines = 4
points_per_line = 5
[probe]
kind = "standard"
coefficient = 0.99
[gas]
barometric = "29.42 inHg"
temperature = "85 F"
[flow]
negative = "zero"
"#;

/// `base` asking for `n` valid runs.
pub fn with_runs_required(base: &str, n: usize) -> String {
    base.replace("runs_required = 1", &format!("runs_required = {n}"))
}

/// calculations.md §8 EPA Method 2 English Δp, inH2O, lines A and B.
pub const EPA_DP_A: [f64; 6] = [0.50, 0.55, 0.60, 0.62, 0.58, 0.52];
pub const EPA_DP_B: [f64; 6] = [0.48, 0.54, 0.61, 0.63, 0.57, 0.51];
/// calculations.md §8 EPA Method 2 English point temperatures, °F.
pub const EPA_T_F: [f64; 12] = [
    300., 302., 305., 306., 304., 301., 299., 303., 305., 307., 304., 300.,
];

/// A `[[run]]` block; `before`/`after` are leak-check results or `None` to leave them out.
pub fn run_block(id: &str, before: Option<&str>, after: Option<&str>) -> String {
    let mut leak = Vec::new();
    if let Some(b) = before {
        leak.push(format!("before = \"{b}\""));
    }
    if let Some(a) = after {
        leak.push(format!("after = \"{a}\""));
    }
    let mut s = format!("\n[[run]]\nid = \"{id}\"\nreadings = \"run{id}.csv\"\n");
    if !leak.is_empty() {
        s += &format!("leak_check = {{ {} }}\n", leak.join(", "));
    }
    s
}

/// A survey: `base` with one passing run per id, then `extra` (whole sections).
pub fn survey(base: &str, runs: &[&str], extra: &str) -> String {
    let mut s = base.to_string();
    for id in runs {
        s += &run_block(id, Some("pass"), Some("pass"));
    }
    s.push('\n');
    s += extra;
    s
}

/// A readings CSV in row form: lines of Δp in `unit`, plus extra columns (one value per reading,
/// in the same order).
pub fn csv(lines: &[(&str, &[f64])], unit: &str, extra: &[(&str, &[f64])]) -> String {
    let mut s = format!("line,point,dp[{unit}]");
    for (h, _) in extra {
        s += &format!(",{h}");
    }
    s.push('\n');
    let mut k = 0;
    for (label, dps) in lines {
        for (i, dp) in dps.iter().enumerate() {
            s += &format!("{label},{},{dp}", i + 1);
            for (_, col) in extra {
                s += &format!(",{}", col[k]);
            }
            s.push('\n');
            k += 1;
        }
    }
    s
}

/// The two-line EPA readings of calculations.md §8 with their temperatures.
pub fn epa_csv() -> String {
    csv(
        &[("A", &EPA_DP_A), ("B", &EPA_DP_B)],
        "inH2O",
        &[("temperature[F]", &EPA_T_F)],
    )
}

/// Loads and evaluates a survey with in-memory readings (`runN.csv` for run id N).
pub fn eval(survey: &str, files: &[(&str, String)]) -> Evaluation {
    let mut map: HashMap<PathBuf, Vec<u8>> = HashMap::new();
    map.insert(PathBuf::from("mem/survey.toml"), survey.as_bytes().to_vec());
    for (n, t) in files {
        map.insert(Path::new("mem").join(n), t.as_bytes().to_vec());
    }
    let source = move |p: &Path| {
        map.get(p)
            .cloned()
            .ok_or_else(|| std::io::Error::new(std::io::ErrorKind::NotFound, "no such file"))
    };
    let loaded = load_with(Path::new("mem/survey.toml"), &source).unwrap_or_else(|e| panic!("{e}"));
    evaluate(loaded).unwrap_or_else(|e| panic!("{e}"))
}

/// Evaluates and assesses, reading `[checks]`, `[instruments]` and `[reported]` from the survey.
pub fn assess_text(survey: &str, files: &[(&str, String)]) -> Assessment {
    let e = eval(survey, files);
    let config = load_assess_config(&e.loaded).unwrap_or_else(|err| panic!("{err}"));
    assess(&e, &config)
}

/// The survey-level finding with this id (the first, if several).
pub fn survey_finding<'a>(a: &'a Assessment, id: &str) -> &'a Finding {
    a.checks.iter().find(|f| f.id == id).unwrap_or_else(|| {
        panic!(
            "no survey finding `{id}`; have {:?}",
            a.checks.iter().map(|f| &f.id).collect::<Vec<_>>()
        )
    })
}

/// Run `i`'s finding with this id.
pub fn run_finding<'a>(a: &'a Assessment, i: usize, id: &str) -> &'a Finding {
    a.runs[i]
        .checks
        .iter()
        .find(|f| f.id == id)
        .unwrap_or_else(|| {
            panic!(
                "no run finding `{id}`; have {:?}",
                a.runs[i].checks.iter().map(|f| &f.id).collect::<Vec<_>>()
            )
        })
}

/// One EPA run of the §8 readings, assessed.
pub fn epa_one_run(extra: &str) -> Assessment {
    assess_text(
        &survey(EPA_SURVEY, &["1"], extra),
        &[("run1.csv", epa_csv())],
    )
}
