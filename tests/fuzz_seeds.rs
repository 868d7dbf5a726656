//! The fuzz targets on stable: every seed in `fuzz/seeds/<target>/` and a few hundred random
//! variations of them go through the same target bodies the libFuzzer binaries run
//! (`fuzz/targets.rs`), so the targets compile with the library and their invariants hold on CI.
//! Fuzzing proper (coverage-guided, for hours) is `cargo +nightly fuzz run …`: see DEVELOPERS.md.

#[path = "../fuzz/targets.rs"]
mod targets;

use proptest::prelude::*;
use std::path::{Path, PathBuf};

type Target = fn(&[u8]);

const TARGETS: [(&str, Target); 7] = [
    ("survey", targets::survey),
    ("readings", targets::readings),
    ("calibration", targets::calibration),
    ("calibration_readings", targets::calibration_readings),
    ("rata", targets::rata),
    ("system", targets::system),
    ("terminals", targets::terminals),
];

fn seeds(target: &str) -> Vec<(PathBuf, Vec<u8>)> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("fuzz/seeds")
        .join(target);
    let mut v: Vec<(PathBuf, Vec<u8>)> = std::fs::read_dir(&dir)
        .unwrap_or_else(|e| panic!("{}: {e}", dir.display()))
        .map(|e| {
            let p = e.unwrap().path();
            let b = std::fs::read(&p).unwrap();
            (p, b)
        })
        .collect();
    v.sort();
    assert!(!v.is_empty(), "no seeds for {target}");
    v
}

#[test]
fn every_seed_passes_its_target() {
    for (name, target) in TARGETS {
        for (path, bytes) in seeds(name) {
            eprintln!("{name}: {}", path.display());
            target(&bytes);
        }
    }
}

/// The `verify_pdf` target's body (`fuzz/fuzz_targets/verify_pdf.rs`) on its seeds.
#[test]
fn the_pdf_seed_is_verified_without_panic() {
    for (_, bytes) in seeds("verify_pdf") {
        let _ = annulus::archive::verify::verify_bytes(&bytes);
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, .. ProptestConfig::default() })]

    /// A seed with a few bytes overwritten, inserted or cut, through each target.
    #[test]
    fn mutated_seeds_pass_their_targets(
        which in 0usize..TARGETS.len(),
        seed in any::<prop::sample::Index>(),
        edits in prop::collection::vec((any::<prop::sample::Index>(), any::<u8>(), 0u8..3), 1..10),
    ) {
        let (name, target) = TARGETS[which];
        let all = seeds(name);
        let mut bytes = all[seed.index(all.len())].1.clone();
        for (at, byte, op) in edits {
            if bytes.is_empty() {
                bytes.push(byte);
                continue;
            }
            let i = at.index(bytes.len());
            match op {
                0 => bytes[i] = byte,
                1 => bytes.insert(i, byte),
                _ => {
                    bytes.remove(i);
                }
            }
        }
        target(&bytes);
    }
}
