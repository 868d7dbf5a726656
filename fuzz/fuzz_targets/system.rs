#![no_main]
//! libFuzzer target: see `targets::system`.

#[path = "../targets.rs"]
mod targets;

libfuzzer_sys::fuzz_target!(|data: &[u8]| targets::system(data));
