//! `annulus rata` (being written).

use super::output::Ctx;
use crate::diag::Error;
use clap::Args;

#[derive(Debug, Args)]
pub struct RataArgs {
    /// Input file or folder.
    pub input: std::path::PathBuf,
}

pub fn run(_args: RataArgs, _ctx: &Ctx) -> Result<i32, Error> {
    Err(Error::Environment("`annulus rata` is not built yet".into()))
}
