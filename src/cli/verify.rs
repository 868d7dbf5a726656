//! `annulus verify` (being written).

use super::output::Ctx;
use crate::diag::Error;
use clap::Args;

#[derive(Debug, Args)]
pub struct VerifyArgs {
    /// Input file or folder.
    pub input: std::path::PathBuf,
}

pub fn run(_args: VerifyArgs, _ctx: &Ctx) -> Result<i32, Error> {
    Err(Error::Environment(
        "`annulus verify` is not built yet".into(),
    ))
}
