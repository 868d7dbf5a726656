//! `annulus review` (being written).

use super::output::Ctx;
use crate::diag::Error;
use clap::Args;

#[derive(Debug, Args)]
pub struct ReviewArgs {
    /// Input file or folder.
    pub input: std::path::PathBuf,
}

pub fn run(_args: ReviewArgs, _ctx: &Ctx) -> Result<i32, Error> {
    Err(Error::Environment(
        "`annulus review` is not built yet".into(),
    ))
}
