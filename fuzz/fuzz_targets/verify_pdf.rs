//! Fuzz target: `annulus verify`'s PDF reading on arbitrary bytes. Every input must end in a
//! verdict or a refusal (not a PDF, not ours), never a panic, a hang or unbounded memory: the
//! reader caps objects, revisions, nesting and inflated sizes (`pdf::Limits`).
//!
//! Seed it with real reports so mutations start from our own structure, e.g.
//! `annulus report sample-data/stack/survey.toml -o fuzz/corpus/verify_pdf/stack.pdf`, then
//! `cargo fuzz run verify_pdf`.

#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let _ = annulus::archive::verify::verify_bytes(data);
});
