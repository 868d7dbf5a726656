//! Field data sheet PDF for `annulus layout --pdf` (wired to the report engine).

use super::plane_args::PlaneSetting;
use crate::diag::Error;
use crate::layout::ProbeMark;
use crate::plane::Plane;
use std::path::Path;

pub fn write(_out: &Path, _s: &PlaneSetting, _p: &Plane, _m: &[ProbeMark]) -> Result<(), Error> {
    Err(Error::Environment(
        "field data sheets are not wired yet".into(),
    ))
}
