#![no_main]
//! libFuzzer target: see `targets::calibration_readings`.

#[path = "../targets.rs"]
mod targets;

libfuzzer_sys::fuzz_target!(|data: &[u8]| targets::calibration_readings(data));
