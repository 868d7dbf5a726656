//! `annulus calibrate` (being written).

use super::output::Ctx;
use crate::diag::Error;
use clap::Args;

#[derive(Debug, Args)]
pub struct CalibrateArgs {
    /// Input file or folder.
    pub input: std::path::PathBuf,
}

pub fn run(_args: CalibrateArgs, _ctx: &Ctx) -> Result<i32, Error> {
    Err(Error::Environment(
        "`annulus calibrate` is not built yet".into(),
    ))
}
