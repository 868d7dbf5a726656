//! The invented sample stack survey the latency and verify benchmarks render, in memory: as it is
//! in sample-data/stack (3 runs, 2 lines × 12 points), or as a 40 × 40 rectangular grid of the
//! same stack (1 600 points per run, invented readings; its report is about 10 MB).

#![allow(dead_code)] // each including target uses part of it

use annulus::input::MemoryFiles;

pub const SURVEY_PATH: &str = "stack/survey.toml";
pub const GRID: usize = 40;

const SURVEY: &str = include_str!("../../sample-data/stack/survey.toml");
const RUNS: [&str; 3] = [
    include_str!("../../sample-data/stack/run1.csv"),
    include_str!("../../sample-data/stack/run2.csv"),
    include_str!("../../sample-data/stack/run3.csv"),
];
const CALIBRATION: &str = include_str!("../../sample-data/calibration/ts-0417.toml");
const CALIBRATION_READINGS: &str = include_str!("../../sample-data/calibration/ts-0417.csv");

/// The sample survey (`grid: false`) or its 40 × 40 grid, under `stack/` (the survey names
/// `../calibration/ts-0417.toml`; paths are joined, not normalised).
pub fn files(grid: bool) -> MemoryFiles {
    let mut f = MemoryFiles::new();
    f.insert("stack/../calibration/ts-0417.toml", CALIBRATION);
    f.insert("stack/../calibration/ts-0417.csv", CALIBRATION_READINGS);
    if !grid {
        f.insert(SURVEY_PATH, SURVEY);
        for (i, r) in RUNS.iter().enumerate() {
            f.insert(format!("stack/run{}.csv", i + 1), *r);
        }
        return f;
    }
    const N: usize = GRID;
    let survey = SURVEY
        .replace(
            "shape = \"round\"\ndiameter = \"96 in\"",
            "shape = \"rectangular\"\nwidth = \"200 in\"\nheight = \"200 in\"",
        )
        .replace("lines = 2", &format!("lines = {N}"))
        .replace("points_per_line = 12", &format!("points_per_line = {N}"));
    assert!(
        survey.contains("rectangular") && survey.contains(&format!("points_per_line = {N}")),
        "the sample stack survey changed: update benches/common/stack.rs"
    );
    f.insert(SURVEY_PATH, survey);
    let line = |i: usize| {
        if i < 26 {
            ((b'A' + i as u8) as char).to_string()
        } else {
            format!("A{}", (b'A' + (i - 26) as u8) as char)
        }
    };
    let mut x: u64 = 0x2545_f491_4f6c_dd1d;
    for r in 1..=3 {
        let mut csv = String::from("line,point,dp[inH2O],temperature[F],yaw[deg]\n");
        for l in 0..N {
            for p in 1..=N {
                x ^= x << 13;
                x ^= x >> 7;
                x ^= x << 17;
                let shape = (p as f64 / N as f64 * std::f64::consts::PI).sin();
                let dp = 0.4 + 0.3 * shape + (x % 200) as f64 / 10_000.0;
                csv += &format!("{},{p},{dp:.3},{},{}\n", line(l), 300 + x % 3, x % 7);
            }
        }
        f.insert(format!("stack/run{r}.csv"), csv);
    }
    f
}
