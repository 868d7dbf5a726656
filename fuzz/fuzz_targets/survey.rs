#![no_main]
//! libFuzzer target: see `targets::survey`.

#[path = "../targets.rs"]
mod targets;

libfuzzer_sys::fuzz_target!(|data: &[u8]| targets::survey(data));
