//! The blank field data sheet for one plane: probe marks per line and empty boxes per point.

use serde::Serialize;

use super::{ChartUnits, ModelError, Paper, Plane, ReadingsColumns};

/// The blank field data sheet for one plane (`annulus layout --pdf`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FieldSheetData {
    /// The survey's title, or `Field data sheet` for a plane given by flags.
    pub title: String,
    /// Site and plane as the survey names them; `None` prints a box to fill in on site.
    pub site: Option<String>,
    pub plane_location: Option<String>,
    pub plane: Plane,
    pub units: ChartUnits,
    /// Column heads of the readings boxes, in the job's words and units.
    pub readings: ReadingsColumns,
    /// Header fields; `None` prints an empty box to fill in on site.
    pub fields: SheetFields,
    /// Whether the sheet asks for pitot leak checks (stack work).
    pub leak_checks: bool,
    /// The remark under the tables (how to read and record), in the trade's words.
    pub footnote: String,
    pub paper: Paper,
    /// Program name and version, printed in the footer.
    pub software: String,
}

/// Header fields of a field data sheet, pre-filled where known.
#[derive(Debug, Clone, PartialEq, Default, Serialize)]
pub struct SheetFields {
    pub date: Option<String>,
    pub run: Option<String>,
    pub probe: Option<String>,
    pub cp: Option<String>,
    /// Labels carry the job's unit, e.g. `Barometric pressure (inHg)`.
    pub barometric_label: String,
    pub barometric: Option<String>,
    pub static_label: String,
    pub static_pressure: Option<String>,
    pub temperature_label: String,
    pub tester: Option<String>,
}

impl FieldSheetData {
    /// Checks what the field-sheet template and the plane drawing rely on.
    pub fn validate(&self) -> Result<(), ModelError> {
        self.units.validate()?;
        self.plane.validate()
    }
}
