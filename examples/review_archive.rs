//! Writes the generated review archive (`benches/common/archive.rs`) to a folder, for the
//! whole-command timings and the Python reviewers of `benches/timing.py`: the same invented
//! surveys `cargo bench --bench review` holds in memory.
//!
//! ```text
//! cargo run --release --locked --example review_archive -- OUT_DIR [SURVEYS] [--calibration]
//! ```
//!
//! SURVEYS defaults to 10 000. With `--calibration` every survey takes its pitot coefficient from
//! one shared calibration record instead of stating it. Refuses an `OUT_DIR` that is not empty.

#[path = "../benches/common/archive.rs"]
mod archive;

use std::path::PathBuf;
use std::process::ExitCode;

fn main() -> ExitCode {
    let mut args: Vec<String> = std::env::args().skip(1).collect();
    let calibration = args.iter().any(|a| a == "--calibration");
    args.retain(|a| a != "--calibration");
    let Some(out) = args.first().map(PathBuf::from) else {
        eprintln!("usage: review_archive OUT_DIR [SURVEYS] [--calibration]");
        return ExitCode::from(2);
    };
    let n = match args.get(1).map(|s| s.parse::<usize>()) {
        None => archive::DEFAULT_SURVEYS,
        Some(Ok(n)) => n,
        Some(Err(_)) => {
            eprintln!("SURVEYS must be a whole number");
            return ExitCode::from(2);
        }
    };
    if out.read_dir().is_ok_and(|mut d| d.next().is_some()) {
        eprintln!("{} is not empty: nothing written", out.display());
        return ExitCode::from(1);
    }
    let (_, files) = archive::archive(&out, n, calibration);
    for (path, bytes) in files {
        let written = path
            .parent()
            .map_or(Ok(()), std::fs::create_dir_all)
            .and_then(|()| std::fs::write(&path, bytes));
        if let Err(e) = written {
            eprintln!("cannot write {}: {e}", path.display());
            return ExitCode::from(1);
        }
    }
    println!("{n} surveys in {}", out.display());
    ExitCode::SUCCESS
}
