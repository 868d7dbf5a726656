//! The bodies of the fuzz targets, shared by the libFuzzer binaries (`fuzz_targets/*.rs`) and the
//! seed replay test of the main crate (`tests/fuzz_seeds.rs`, which runs them on stable in CI, so
//! they always compile against the library).
//!
//! Each takes arbitrary bytes as one input file, reads it with the companion files of a sample
//! (from memory, as `verify` reads a report's embedded files) and asserts what must hold for any
//! input: no panic; an answer that is a success or an input rejection, never an environment
//! failure; finite results on success; at least one problem on rejection.

#![allow(dead_code)] // each libFuzzer binary uses one of these functions

use annulus::diag::Error;
use annulus::input::{load_with, MemoryFiles};
use std::path::Path;

const STACK_SURVEY: &[u8] = include_bytes!("../sample-data/stack/survey.toml");
const STACK_RUNS: [&[u8]; 3] = [
    include_bytes!("../sample-data/stack/run1.csv"),
    include_bytes!("../sample-data/stack/run2.csv"),
    include_bytes!("../sample-data/stack/run3.csv"),
];
const CALIBRATION: &[u8] = include_bytes!("../sample-data/calibration/ts-0417.toml");
const CALIBRATION_READINGS: &[u8] = include_bytes!("../sample-data/calibration/ts-0417.csv");

/// A rejection must say something.
fn rejected(e: Error) {
    match e {
        Error::Input(d) => assert!(!d.is_empty(), "a rejection without a problem"),
        Error::Environment(m) => panic!("an environment failure from memory input: {m}"),
    }
}

/// The stack sample with `survey` and `runs` in its place, loaded and evaluated.
fn stack(survey: &[u8], runs: [&[u8]; 3]) {
    let mut files = MemoryFiles::new();
    files.insert("job/survey.toml", survey);
    for (i, r) in runs.iter().enumerate() {
        files.insert(format!("job/run{}.csv", i + 1), *r);
    }
    files.insert("job/../calibration/ts-0417.toml", CALIBRATION);
    files.insert("job/../calibration/ts-0417.csv", CALIBRATION_READINGS);
    let result = load_with(Path::new("job/survey.toml"), &|p| files.read(p))
        .and_then(annulus::pipeline::evaluate_and_assess);
    match result {
        Ok((e, a)) => {
            let doc = serde_json_value(&annulus::results::ResultsDoc::new(&e, &a));
            for run in doc["runs"].as_array().into_iter().flatten() {
                let flow = &run["actual_flow_m3_s"];
                assert!(
                    flow.as_f64().is_some_and(f64::is_finite),
                    "run {} flow is {flow}",
                    run["id"]
                );
            }
        }
        Err(e) => rejected(e),
    }
}

fn serde_json_value<T: serde::Serialize>(v: &T) -> serde_json::Value {
    serde_json::to_value(v).expect("results serialise")
}

/// Any bytes as a survey (with the stack sample's readings and calibration).
pub fn survey(data: &[u8]) {
    stack(data, STACK_RUNS);
}

/// Any bytes as run 1's readings of the stack sample.
pub fn readings(data: &[u8]) {
    stack(STACK_SURVEY, [data, STACK_RUNS[1], STACK_RUNS[2]]);
}

/// Any bytes as a calibration file (its readings file is the sample's, wherever it points).
pub fn calibration(data: &[u8]) {
    let files = std::cell::RefCell::new(MemoryFiles::new());
    files.borrow_mut().insert("cal/ts-0417.toml", data);
    let source = |p: &Path| {
        // whatever path the calibration names for its readings, serve the sample's
        if p != Path::new("cal/ts-0417.toml") {
            files.borrow_mut().insert(p, CALIBRATION_READINGS);
        }
        files.borrow().read(p)
    };
    calibrated(annulus::input::calibration_file::load_with(
        Path::new("cal/ts-0417.toml"),
        &source,
    ));
}

/// Any bytes as a calibration's paired-readings CSV.
pub fn calibration_readings(data: &[u8]) {
    let mut files = MemoryFiles::new();
    files.insert("cal/ts-0417.toml", CALIBRATION);
    files.insert("cal/ts-0417.csv", data);
    calibrated(annulus::input::calibration_file::load_with(
        Path::new("cal/ts-0417.toml"),
        &|p| files.read(p),
    ));
}

fn calibrated(r: Result<annulus::input::calibration_file::LoadedCalibration, Error>) {
    match r {
        Ok(c) => {
            let cp = c.calibration.assigned_coefficient();
            assert!(cp.is_finite(), "assigned coefficient {cp}");
        }
        Err(e) => rejected(e),
    }
}

/// Any bytes as a RATA file (parsed; survey references are not followed).
pub fn rata(data: &[u8]) {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Err(e) = annulus::input::rata_file::parse_rata("unit2-rata.toml", text) {
        rejected(e);
    }
}

/// The sample building's files besides its system file and terminals CSV, by their paths
/// relative to the system file.
const BUILDING: [(&str, &[u8]); 12] = [
    (
        "sa-main/survey.toml",
        include_bytes!("../sample-data/building/sa-main/survey.toml"),
    ),
    (
        "sa-main/traverse.csv",
        include_bytes!("../sample-data/building/sa-main/traverse.csv"),
    ),
    (
        "sa-1/survey.toml",
        include_bytes!("../sample-data/building/sa-1/survey.toml"),
    ),
    (
        "sa-1/traverse.csv",
        include_bytes!("../sample-data/building/sa-1/traverse.csv"),
    ),
    (
        "sa-2/survey.toml",
        include_bytes!("../sample-data/building/sa-2/survey.toml"),
    ),
    (
        "sa-2/traverse.csv",
        include_bytes!("../sample-data/building/sa-2/traverse.csv"),
    ),
    (
        "sa-3/survey.toml",
        include_bytes!("../sample-data/building/sa-3/survey.toml"),
    ),
    (
        "sa-3/traverse.csv",
        include_bytes!("../sample-data/building/sa-3/traverse.csv"),
    ),
    (
        "ra-main/survey.toml",
        include_bytes!("../sample-data/building/ra-main/survey.toml"),
    ),
    (
        "ra-main/traverse.csv",
        include_bytes!("../sample-data/building/ra-main/traverse.csv"),
    ),
    (
        "oa/survey.toml",
        include_bytes!("../sample-data/building/oa/survey.toml"),
    ),
    (
        "oa/traverse.csv",
        include_bytes!("../sample-data/building/oa/traverse.csv"),
    ),
];
const BUILDING_SYSTEM: &[u8] = include_bytes!("../sample-data/building/ahu-2.toml");
const BUILDING_TERMINALS: &[u8] = include_bytes!("../sample-data/building/terminals.csv");

/// The sample building with `system` and `terminals` in their places, read and evaluated: on
/// success every duct's and terminal's measured flow and percent of design are finite.
fn building(system: &[u8], terminals: &[u8]) {
    let mut files = MemoryFiles::new();
    files.insert("bldg/ahu-2.toml", system);
    files.insert("bldg/terminals.csv", terminals);
    for (path, bytes) in BUILDING {
        files.insert(format!("bldg/{path}"), bytes);
    }
    let result =
        annulus::input::system_file::load_system_with(Path::new("bldg/ahu-2.toml"), &|p| {
            files.read(p)
        })
        .and_then(|l| annulus::submittal::evaluate_system(l, None));
    match result {
        Ok(e) => {
            let doc = serde_json_value(&e.doc());
            for key in ["ducts", "terminals"] {
                for item in doc[key].as_array().into_iter().flatten() {
                    for field in ["measured_flow_m3_s", "percent_of_design"] {
                        assert!(
                            item[field].as_f64().is_some_and(f64::is_finite),
                            "{key} {}: {field} is {}",
                            item["tag"],
                            item[field]
                        );
                    }
                }
            }
        }
        Err(e) => rejected(e),
    }
}

/// Any bytes as a system file (with the sample building's surveys and terminals).
pub fn system(data: &[u8]) {
    building(data, BUILDING_TERMINALS);
}

/// Any bytes as the sample building's terminals CSV.
pub fn terminals(data: &[u8]) {
    building(BUILDING_SYSTEM, data);
}
