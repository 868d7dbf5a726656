//! Helpers shared by the integration tests (each test file includes this module with `mod common;`
//! and uses what it needs).
#![allow(dead_code)]

use std::path::PathBuf;

/// The repository's root folder (where `sample-data/` and `tests/golden/` live).
pub fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Compares `found` with `tests/golden/<name>`; with `UPDATE_GOLDEN` set, writes it instead.
pub fn golden(name: &str, found: &str) {
    let path = root().join("tests/golden").join(name);
    if std::env::var_os("UPDATE_GOLDEN").is_some() {
        std::fs::write(&path, found).expect("golden file written");
        return;
    }
    let want = std::fs::read_to_string(&path).unwrap_or_else(|_| {
        panic!(
            "missing golden file {}; run with UPDATE_GOLDEN=1",
            path.display()
        )
    });
    assert_eq!(found, want, "output differs from {}", path.display());
}
