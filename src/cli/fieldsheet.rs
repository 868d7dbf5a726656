//! Field data sheet PDF for `annulus layout --pdf`.

use super::plane_args::PlaneSetting;
use crate::diag::Error;
use crate::display::UnitSystem;
use crate::input::survey::PlaneParts;
use crate::layout::ProbeMark;
use crate::plane::Plane;
use crate::report::build::{field_sheet_data, SheetPlane};
use crate::report::Engine;
use crate::write::Destination;
use std::path::PathBuf;

/// What the sheet takes from a survey file besides its plane: the names in its heading and the
/// EPA unit form.
pub struct SheetNames {
    pub title: String,
    pub site: Option<String>,
    pub plane: Option<String>,
    pub epa_metric: bool,
}

impl SheetNames {
    pub fn of(p: &PlaneParts) -> SheetNames {
        SheetNames {
            title: p.title.clone(),
            site: p.site.clone(),
            plane: p.plane.clone(),
            epa_metric: p.epa_metric,
        }
    }
}

pub fn write(
    out: &Destination,
    inputs: &[PathBuf],
    s: &PlaneSetting,
    p: &Plane,
    marks: &[ProbeMark],
    names: Option<&SheetNames>,
) -> Result<(), Error> {
    let data = field_sheet_data(&SheetPlane {
        layout: &p.layout,
        marks,
        convention: s.convention,
        system: UnitSystem::of(s.convention, names.is_some_and(|n| n.epa_metric)),
        port_length_m: s.port_length_m,
        required_points: p.required_points,
        title: names.map(|n| n.title.clone()),
        site: names.and_then(|n| n.site.clone()),
        plane_location: names.and_then(|n| n.plane.clone()),
    });
    // A blank sheet is dated the day it is printed (SOURCE_DATE_EPOCH pins it); the command line is
    // the edge where the clock may be read.
    let date = super::report::document_date(super::today())?;
    let rendered = Engine::new()
        .render_field_sheet(&data, date)
        .map_err(|e| Error::Environment(format!("the field sheet template failed: {e}")))?;
    Ok(crate::write::write(out, &rendered.pdf, inputs)?)
}
