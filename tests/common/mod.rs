//! Helpers shared by the integration tests (each test file includes this module with `mod common;`
//! and uses what it needs).
#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::process::Command;

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

/// Runs the built binary in `dir` with plain output: no colour and no fixed build time
/// (`SOURCE_DATE_EPOCH` removed), then each of `env` set (`None` removes the variable). The exit
/// code, standard output and standard error.
pub fn run_bytes(
    dir: &Path,
    args: &[&str],
    env: &[(&str, Option<&str>)],
) -> (i32, Vec<u8>, String) {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_annulus"));
    cmd.args(args)
        .current_dir(dir)
        .env("NO_COLOR", "1")
        .env_remove("SOURCE_DATE_EPOCH");
    for (k, v) in env {
        match v {
            Some(v) => cmd.env(k, v),
            None => cmd.env_remove(k),
        };
    }
    let out = cmd.output().expect("binary runs");
    (
        out.status.code().unwrap_or(-1),
        out.stdout,
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// [`run_bytes`] with standard output as text.
pub fn run(dir: &Path, args: &[&str], env: &[(&str, Option<&str>)]) -> (i32, String, String) {
    let (code, out, err) = run_bytes(dir, args, env);
    (code, String::from_utf8_lossy(&out).into_owned(), err)
}
