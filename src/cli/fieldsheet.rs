//! Field data sheet PDF for `annulus layout --pdf`.

use super::plane_args::PlaneSetting;
use crate::diag::Error;
use crate::layout::ProbeMark;
use crate::plane::Plane;
use crate::report::build::field_sheet_data;
use crate::report::{write_atomic, Engine};
use std::path::Path;

pub fn write(out: &Path, s: &PlaneSetting, p: &Plane, marks: &[ProbeMark]) -> Result<(), Error> {
    let title = s
        .survey_path
        .as_ref()
        .map(|p| format!("Field data sheet — {}", p.display()))
        .unwrap_or_else(|| "Field data sheet".to_string());
    let data = field_sheet_data(
        &p.layout,
        marks,
        s.convention,
        s.port_length_m,
        s.upstream_d,
        s.downstream_d,
        p.required_points,
        &title,
    );
    // A blank sheet is dated the day it is printed (SOURCE_DATE_EPOCH pins it); the command line is
    // the edge where the clock may be read.
    let date = super::report::document_date(chrono::Local::now().date_naive())?;
    let rendered = Engine::new()
        .render_field_sheet(&data, date)
        .map_err(|e| Error::Environment(format!("the field sheet template failed: {e}")))?;
    write_atomic(out, &rendered.pdf)
        .map_err(|e| Error::Environment(format!("cannot write `{}`: {e}", out.display())))
}
