//! Files on the command line: output destinations (`-o`, `--pdf`) checked against the command's
//! inputs before any work is done, and the notes a command prints about the files it read.
//!
//! The rules themselves live in [`crate::write`] (outputs) and [`crate::input::fs`] (inputs); this
//! file only connects them to the arguments and prints.

use super::output::Ctx;
use crate::diag::Error;
use crate::input::fs::{outside_references, Place};
use crate::input::Loaded;
use crate::write::{default_name, Destination};
use std::path::{Path, PathBuf};

/// The destination an output argument names (`-`, a folder, or a file), checked against the
/// rules and the command's `inputs` now, so a refusal comes before the work. A folder gets the
/// PDF named after `named_after` (`unit4.toml` → `unit4.pdf`).
pub(crate) fn destination(
    arg: &Path,
    named_after: &Path,
    inputs: &[PathBuf],
) -> Result<Destination, Error> {
    let dest = named(arg, named_after);
    crate::write::check(&dest, inputs)?;
    Ok(dest)
}

/// The destination an output argument names, not yet checked (the write checks it).
pub(crate) fn named(arg: &Path, named_after: &Path) -> Destination {
    Destination::from_arg(arg, &default_name(named_after, "pdf", "annulus.pdf"))
}

/// Reads a survey and its readings, and notes every file read from outside the survey's folder.
pub(crate) fn load_noted(path: &Path, ctx: &Ctx) -> Result<Loaded, Error> {
    let loaded = crate::input::load(path)?;
    note_outside(&loaded, ctx);
    Ok(loaded)
}

/// Prints a note (unless `--quiet`) for each file a survey reads from outside its own folder.
pub(crate) fn note_outside(loaded: &Loaded, ctx: &Ctx) {
    if ctx.quiet {
        return;
    }
    for r in outside_references(loaded) {
        let how = match r.place {
            Place::Absolute => "an absolute path",
            _ => "outside the survey's folder",
        };
        eprintln!("note: `{}` ({}) is {how}", r.written, r.what);
    }
}
