//! `annulus keygen` (being written).

use super::output::Ctx;
use crate::diag::Error;
use clap::Args;

#[derive(Debug, Args)]
pub struct KeygenArgs {
    /// Input file or folder.
    pub input: std::path::PathBuf,
}

pub fn run(_args: KeygenArgs, _ctx: &Ctx) -> Result<i32, Error> {
    Err(Error::Environment(
        "`annulus keygen` is not built yet".into(),
    ))
}
