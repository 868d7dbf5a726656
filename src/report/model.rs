//! The presentation model: everything a test report or a blank field data sheet shows.
//!
//! Owns the one structure each template receives ([`ReportData`] for `templates/report.typ`,
//! [`FieldSheetData`] for `templates/field-sheet.typ`). The engine serialises it to a single JSON
//! blob that the template reads with `json(…)`; the field names here are the template's vocabulary.
//!
//! Must not compute results, read files or look at the clock. Every printed number arrives already
//! formatted as a string (Typst prints floats without trailing zeros, so `12.50` would become
//! `12.5`), together with its unit label. Raw `f64` values are kept only where charts need geometry
//! or velocities; those are SI with the unit in the name (`position_m`, `velocity_m_s`).
//!
//! [`ReportData::validate`] checks what the templates and charts rely on (matching column counts,
//! finite positive dimensions, a SHA-256 fingerprint, known line names) so that a malformed model
//! is rejected with a message instead of surfacing as a Typst error.

use std::collections::BTreeSet;
use std::fmt;

use serde::Serialize;

/// Everything the signed-off PDF test report shows, in reading order of the report.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ReportData {
    pub header: Header,
    /// Unit labels (and SI→display factors for the charts) of the convention in use.
    pub units: DisplayUnits,
    pub conditions: Conditions,
    pub summary: Summary,
    /// Results per run and their average, convention units with SI alongside.
    pub results: ResultsTable,
    pub plane: Plane,
    /// Readings and velocity field of each run, in run order.
    pub runs: Vec<RunData>,
    pub checks: Vec<CheckRow>,
    pub uncertainty: UncertaintyBudget,
    pub instruments: Vec<InstrumentRow>,
    pub notes: Vec<String>,
    pub deviations: Vec<String>,
    /// Safety cautions printed near the end; [`standard_safety_cautions`] gives the usual text.
    pub safety: Vec<String>,
    pub signoff: SignOff,
}

/// Identification of the report, printed on the cover block and in every page header/footer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Header {
    pub title: String,
    pub client: String,
    pub site: String,
    /// Where the measurement plane is (free text from the survey's `plane`).
    pub plane_location: String,
    /// Test date as printed, e.g. `2026-10-14`.
    pub test_date: String,
    /// Short report id printed in the page header and the sign-off block.
    pub report_id: String,
    /// SHA-256 of the report's content, 64 lowercase hex digits.
    pub content_sha256: String,
    /// Fingerprint of the signing key, when the report is signed.
    pub signer_key_fingerprint: Option<String>,
    /// Program name and version, e.g. `annulus 0.1.0`.
    pub software: String,
    pub paper: Paper,
}

/// Paper size of the report.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Paper {
    A4,
    UsLetter,
}

/// Unit labels of the convention, and the factors the charts use to print SI values in them.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DisplayUnits {
    /// Length label, e.g. `in` or `mm`.
    pub length: String,
    /// Display length units per metre (39.370… for inches).
    pub length_per_m: f64,
    /// Decimals for lengths printed on charts.
    pub length_decimals: usize,
    /// Velocity label, e.g. `ft/s` or `m/s`.
    pub velocity: String,
    /// Display velocity units per m/s (3.2808… for ft/s).
    pub velocity_per_m_s: f64,
    /// Decimals for velocities printed on charts.
    pub velocity_decimals: usize,
    /// Differential pressure label of the readings tables, e.g. `inH2O` or `Pa`.
    pub dp: String,
    /// Temperature label of the readings tables, e.g. `°F`.
    pub temperature: String,
}

/// A labelled value in the convention's units with its SI equivalent (empty when the convention is
/// SI or the value has no unit).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Quantity {
    pub label: String,
    pub value: String,
    pub si: String,
}

impl Quantity {
    /// A labelled value with its SI equivalent.
    pub fn new(label: impl Into<String>, value: impl Into<String>, si: impl Into<String>) -> Self {
        Quantity {
            label: label.into(),
            value: value.into(),
            si: si.into(),
        }
    }
}

/// The convention and reference conditions the results are stated under.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Conditions {
    /// Display name, e.g. `EPA Method 2`.
    pub convention: String,
    /// Identifier as in the survey file, e.g. `epa-method-2`.
    pub convention_id: String,
    pub reference_temperature: Quantity,
    pub reference_pressure: Quantity,
    /// `dry` or `wet`, as stated for the standard flows.
    pub basis: String,
    /// One sentence stating T, p and basis together, printed under the results.
    pub statement: String,
    /// Gas and duct conditions during the test (barometric, static, composition, moisture, density
    /// …).
    pub gas: Vec<Quantity>,
}

/// Outcome of a check, as in the JSON output of `annulus check`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Status {
    Pass,
    Warn,
    Fail,
    NotApplicable,
}

/// The summary block at the top of the report.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Summary {
    /// Overall verdict of the acceptance checks.
    pub verdict: Status,
    /// The verdict in words, e.g. `All 9 checks pass.`
    pub verdict_text: String,
    /// Key figures (usually of the average), printed large.
    pub headline: Vec<Quantity>,
    /// Design flow and percent of design, when the survey gives a design flow.
    pub design: Option<Design>,
    /// What the average is over, e.g. `Average of runs 1–3`.
    pub basis_text: String,
}

/// Design comparison (HVAC).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Design {
    pub flow: Quantity,
    /// Measured flow as percent of design, e.g. `106.4 %`.
    pub percent: String,
}

/// Results per run (one column each) and their average (usually the last column).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ResultsTable {
    /// Column heads, e.g. `Run 1`, `Run 2`, `Run 3`, `Average`.
    pub columns: Vec<String>,
    pub rows: Vec<ResultRow>,
}

/// One result quantity across the runs.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ResultRow {
    pub label: String,
    /// Convention unit label, e.g. `dscfm`.
    pub unit: String,
    /// One value per column.
    pub values: Vec<String>,
    /// SI unit label, e.g. `m³/s`; empty when there is no SI line (dimensionless or already SI).
    pub si_unit: String,
    /// One SI value per column (or empty when `si_unit` is empty).
    pub si_values: Vec<String>,
}

/// The measurement plane: shape, dimensions, traverse lines and every point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Plane {
    pub shape: Shape,
    /// In words, e.g. `Round stack, 40.00 in inside diameter`.
    pub description: String,
    /// Dimensions table: inside diameter or sides, area, port length, construction …
    pub dimensions: Vec<Quantity>,
    /// Layout method in words, e.g. `Equal-area (centroids of equal-area annuli)`.
    pub method: String,
    /// Where the method's positions come from, e.g. `EPA Method 1, Table 1-2`.
    pub method_source: String,
    /// Points used, e.g. `24`.
    pub point_count: String,
    /// Points required and why, e.g. `24 (EPA Method 1, Figure 1-1, 4.2 D upstream)`.
    pub points_required: String,
    pub point_count_status: Status,
    pub straight_runs: Vec<StraightRun>,
    /// Traverse lines in layout order (A, B, …).
    pub lines: Vec<TraverseLine>,
}

/// Inside dimensions of the plane, for drawing. Rectangular: the ports are in the `width_m` side
/// and the points of a line run along `height_m` (as `annulus layout --rect WxH`).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Shape {
    Round { diameter_m: f64 },
    Rectangular { width_m: f64, height_m: f64 },
}

/// A straight run upstream or downstream of the plane, against its requirement.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StraightRun {
    pub label: String,
    pub value: String,
    pub requirement: String,
    pub status: Status,
}

/// Where a traverse line lies in the cross-section.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum LineOrientation {
    /// Round duct: a diameter whose port sits on the wall at this angle, measured clockwise from
    /// the top of the drawing; the probe travels through the centre to the far wall.
    AngleDeg(f64),
    /// Rectangular duct: a line entering through the top (`width_m`) side at this distance from the
    /// left side wall, running down along the height.
    OffsetM(f64),
}

/// One traverse line (a port and the points reached through it).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TraverseLine {
    /// Line name as in the readings CSV, e.g. `A`.
    pub name: String,
    /// Port in words, e.g. `Port A (north)`.
    pub port: String,
    pub orientation: LineOrientation,
    /// Orientation in words, e.g. `0°` or `4.80 in from the left wall`.
    pub orientation_text: String,
    /// Length of the line inside the duct, e.g. `40.00 in`.
    pub length: String,
    pub points: Vec<PointPosition>,
}

/// A traverse point on a line.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PointPosition {
    /// Counts from the near (port) wall starting at 1.
    pub point: u32,
    /// Distance from the inside of the near wall along the line.
    pub position_m: f64,
    /// `position_m` as printed, e.g. `1.00 in`.
    pub position: String,
    /// Position as a fraction of the line length, e.g. `2.5 %`.
    pub fraction: String,
    /// Probe insertion mark (position plus port length), e.g. `6.00 in`.
    pub insertion: String,
    /// Moved by a wall rule.
    pub adjusted: bool,
}

/// Readings and velocity field of one run.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RunData {
    /// Run id as in the survey, e.g. `1`.
    pub id: String,
    /// Heading, e.g. `Run 1`.
    pub label: String,
    pub started: String,
    pub ended: String,
    /// Leak checks in words, e.g. `before: pass · after: pass`.
    pub leak_check: String,
    pub readings: Vec<ReadingRow>,
    /// Run figures printed under its readings table (mean √Δp, mean temperature, mean velocity …).
    pub summary: Vec<Quantity>,
    /// Point velocities placed in the cross-section, for the colour map and the profiles.
    pub field: Vec<FieldPoint>,
}

/// One row of a readings table, as printed.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ReadingRow {
    pub line: String,
    pub point: u32,
    pub position: String,
    pub dp: String,
    pub temperature: String,
    /// Yaw (null) angle, or `—` when not measured.
    pub yaw: String,
    pub velocity: String,
    /// The point was moved by a wall rule.
    pub adjusted: bool,
    /// Δp read negative.
    pub negative: bool,
    /// Left out of the average (the reason goes in `note`).
    pub excluded: bool,
    pub note: String,
}

/// A point velocity placed in the cross-section. Coordinates have their origin at the centre of the
/// plane, `x_m` to the right and `y_m` up, as drawn (see [`Plane::point_xy`]).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FieldPoint {
    pub line: String,
    pub point: u32,
    /// Distance from the near wall along the line (the profile chart's axis).
    pub position_m: f64,
    pub x_m: f64,
    pub y_m: f64,
    /// Axial point velocity; negative when Δp read negative.
    pub velocity_m_s: f64,
    pub excluded: bool,
}

/// One acceptance check or data-quality finding.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CheckRow {
    /// Family, e.g. `Site`, `Traverse`, `Equipment`.
    pub group: String,
    pub id: String,
    pub status: Status,
    pub measured: String,
    pub limit: String,
    /// The rule's source, e.g. `EPA Method 1 §11.4`.
    pub source: String,
    pub message: String,
}

/// The uncertainty budget (GUM, JCGM 100:2008) of the reported flow.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UncertaintyBudget {
    /// What the budget is for, e.g. `Dry standard flow, average of runs 1–3`.
    pub applies_to: String,
    /// Name of the spatial-integration option used, e.g. `scatter of point velocities (s/√n)`.
    pub spatial_method: String,
    pub rows: Vec<BudgetRow>,
    /// Combined standard uncertainty, e.g. `2.41 %`.
    pub combined: String,
    /// Welch–Satterthwaite effective degrees of freedom, e.g. `38.2`.
    pub effective_dof: String,
    /// Coverage factor, e.g. `2.02`.
    pub coverage_factor: String,
    /// Expanded relative uncertainty, e.g. `±4.9 %`.
    pub expanded: String,
    /// Expanded uncertainty in flow units, e.g. `±1,030 dscfm (±0.49 m³/s)`.
    pub expanded_absolute: String,
    /// Confidence statement, e.g. `about 95 % coverage`.
    pub note: String,
}

/// One component of the budget.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BudgetRow {
    pub name: String,
    /// Relative standard uncertainty, e.g. `1.00 %`.
    pub relative_u: String,
    /// Sensitivity coefficient, e.g. `0.5`.
    pub sensitivity: String,
    /// Degrees of freedom, e.g. `50` or `∞`.
    pub dof: String,
    /// Share of u_c², e.g. `31 %`.
    pub contribution: String,
}

/// An instrument used, with its calibration.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct InstrumentRow {
    pub name: String,
    pub identifier: String,
    /// Range, coefficient, resolution …
    pub detail: String,
    pub calibrated: String,
    pub due: String,
    /// Calibration certificate or reference.
    pub reference: String,
}

/// Sign-off block.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SignOff {
    pub tested_by: String,
    pub certificate: String,
    pub tested_date: String,
    pub reviewed_by: String,
    pub reviewed_date: String,
    pub organisation: String,
    /// Attestation printed above the signature lines.
    pub statement: String,
}

/// The blank field data sheet for one plane: probe marks per line and empty boxes per point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FieldSheetData {
    pub title: String,
    pub site: String,
    pub plane_location: String,
    pub plane: Plane,
    pub units: DisplayUnits,
    /// Header fields; `None` prints an empty box to fill in on site.
    pub fields: SheetFields,
    /// Whether to print a yaw column.
    pub yaw_column: bool,
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
    pub barometric: Option<String>,
    pub static_pressure: Option<String>,
    pub tester: Option<String>,
}

impl Plane {
    /// Places a point of a line in the cross-section, origin at the centre, `x` right and `y` up.
    ///
    /// Round: the port of a line at angle θ (clockwise from the top) sits on the wall at `R·(sin θ,
    /// cos θ)`; a point `p` from that wall lies at `(R − p)·(sin θ, cos θ)`, so points past the
    /// centre land on the opposite side. Rectangular: the line enters the top side at `offset` from
    /// the left wall and a point lies `p` below the top wall.
    pub fn point_xy(&self, orientation: LineOrientation, position_m: f64) -> (f64, f64) {
        match (self.shape, orientation) {
            (Shape::Round { diameter_m }, LineOrientation::AngleDeg(angle)) => {
                let r = diameter_m / 2.0 - position_m;
                let t = angle.to_radians();
                (r * t.sin(), r * t.cos())
            }
            (Shape::Rectangular { width_m, height_m }, LineOrientation::OffsetM(offset)) => {
                (offset - width_m / 2.0, height_m / 2.0 - position_m)
            }
            // A mismatched pair is rejected by `validate`; place it somewhere harmless.
            (Shape::Round { diameter_m }, LineOrientation::OffsetM(offset)) => {
                (offset - diameter_m / 2.0, diameter_m / 2.0 - position_m)
            }
            (Shape::Rectangular { height_m, .. }, LineOrientation::AngleDeg(_)) => {
                (0.0, height_m / 2.0 - position_m)
            }
        }
    }

    /// The line with this name.
    pub fn line(&self, name: &str) -> Option<&TraverseLine> {
        self.lines.iter().find(|l| l.name == name)
    }

    /// Length of a traverse line inside the duct (diameter, or height for a rectangle).
    pub fn line_length_m(&self) -> f64 {
        match self.shape {
            Shape::Round { diameter_m } => diameter_m,
            Shape::Rectangular { height_m, .. } => height_m,
        }
    }

    fn validate(&self) -> Result<(), ModelError> {
        let dims: &[(&'static str, f64)] = match &self.shape {
            Shape::Round { diameter_m } => &[("diameter_m", *diameter_m)],
            Shape::Rectangular { width_m, height_m } => {
                &[("width_m", *width_m), ("height_m", *height_m)]
            }
        };
        for &(what, value) in dims {
            if !(value.is_finite() && value > 0.0) {
                return Err(ModelError::BadNumber {
                    what: format!("plane.shape.{what}"),
                    value,
                });
            }
        }
        if self.lines.is_empty() {
            return Err(ModelError::Empty {
                what: "plane.lines".into(),
            });
        }
        let mut names = BTreeSet::new();
        for line in &self.lines {
            if !names.insert(line.name.as_str()) {
                return Err(ModelError::Duplicate {
                    what: "traverse line".into(),
                    name: line.name.clone(),
                });
            }
            let ok = match (self.shape, line.orientation) {
                (Shape::Round { .. }, LineOrientation::AngleDeg(a)) => a.is_finite(),
                (Shape::Rectangular { width_m, .. }, LineOrientation::OffsetM(o)) => {
                    o.is_finite() && (0.0..=width_m).contains(&o)
                }
                _ => false,
            };
            if !ok {
                return Err(ModelError::BadLine {
                    line: line.name.clone(),
                    reason: "orientation does not fit the shape (round needs angle_deg, \
                             rectangular needs offset_m within the width)",
                });
            }
            for p in &line.points {
                if !(p.position_m.is_finite()
                    && p.position_m >= 0.0
                    && p.position_m <= self.line_length_m())
                {
                    return Err(ModelError::BadNumber {
                        what: format!("plane.lines[{}].points[{}].position_m", line.name, p.point),
                        value: p.position_m,
                    });
                }
            }
        }
        Ok(())
    }
}

impl DisplayUnits {
    fn validate(&self) -> Result<(), ModelError> {
        for (what, value) in [
            ("units.length_per_m", self.length_per_m),
            ("units.velocity_per_m_s", self.velocity_per_m_s),
        ] {
            if !(value.is_finite() && value > 0.0) {
                return Err(ModelError::BadNumber {
                    what: what.into(),
                    value,
                });
            }
        }
        Ok(())
    }
}

fn validate_field(plane: &Plane, run: &str, field: &[FieldPoint]) -> Result<(), ModelError> {
    for p in field {
        if plane.line(&p.line).is_none() {
            return Err(ModelError::UnknownLine {
                run: run.to_string(),
                line: p.line.clone(),
            });
        }
        for (what, value) in [
            ("position_m", p.position_m),
            ("x_m", p.x_m),
            ("y_m", p.y_m),
            ("velocity_m_s", p.velocity_m_s),
        ] {
            if !value.is_finite() {
                return Err(ModelError::BadNumber {
                    what: format!("run {run}, line {} point {}: {what}", p.line, p.point),
                    value,
                });
            }
        }
    }
    Ok(())
}

impl ReportData {
    /// Checks what the template and the charts rely on. The engine calls this before rendering.
    pub fn validate(&self) -> Result<(), ModelError> {
        let hex = &self.header.content_sha256;
        if hex.len() != 64 || !hex.bytes().all(|b| b.is_ascii_hexdigit()) {
            return Err(ModelError::BadFingerprint { found: hex.clone() });
        }
        if self.header.report_id.trim().is_empty() {
            return Err(ModelError::Empty {
                what: "header.report_id".into(),
            });
        }
        self.units.validate()?;
        self.plane.validate()?;
        let columns = self.results.columns.len();
        for row in &self.results.rows {
            let si_ok = if row.si_unit.is_empty() {
                row.si_values.is_empty() || row.si_values.len() == columns
            } else {
                row.si_values.len() == columns
            };
            if row.values.len() != columns || !si_ok {
                return Err(ModelError::ColumnCount {
                    row: row.label.clone(),
                    expected: columns,
                    found: row.values.len(),
                });
            }
        }
        let mut ids = BTreeSet::new();
        for run in &self.runs {
            if !ids.insert(run.id.as_str()) {
                return Err(ModelError::Duplicate {
                    what: "run".into(),
                    name: run.id.clone(),
                });
            }
            validate_field(&self.plane, &run.id, &run.field)?;
        }
        Ok(())
    }
}

impl FieldSheetData {
    /// Checks what the field-sheet template and the plane drawing rely on.
    pub fn validate(&self) -> Result<(), ModelError> {
        self.units.validate()?;
        self.plane.validate()
    }
}

/// Why a presentation model was rejected.
#[derive(Debug, Clone, PartialEq)]
pub enum ModelError {
    BadFingerprint {
        found: String,
    },
    BadNumber {
        what: String,
        value: f64,
    },
    Empty {
        what: String,
    },
    Duplicate {
        what: String,
        name: String,
    },
    BadLine {
        line: String,
        reason: &'static str,
    },
    UnknownLine {
        run: String,
        line: String,
    },
    ColumnCount {
        row: String,
        expected: usize,
        found: usize,
    },
}

impl fmt::Display for ModelError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ModelError::BadFingerprint { found } => write!(
                f,
                "content fingerprint must be 64 hex digits (SHA-256), found `{found}`"
            ),
            ModelError::BadNumber { what, value } => {
                write!(
                    f,
                    "{what} must be a finite number in range, found `{value}`"
                )
            }
            ModelError::Empty { what } => write!(f, "{what} must not be empty"),
            ModelError::Duplicate { what, name } => write!(f, "{what} `{name}` appears twice"),
            ModelError::BadLine { line, reason } => write!(f, "traverse line `{line}`: {reason}"),
            ModelError::UnknownLine { run, line } => write!(
                f,
                "run `{run}` has a point on line `{line}`, which the plane does not have"
            ),
            ModelError::ColumnCount {
                row,
                expected,
                found,
            } => write!(
                f,
                "results row `{row}` must have {expected} values (one per column), found {found}"
            ),
        }
    }
}

impl std::error::Error for ModelError {}

/// The usual safety cautions for traverse work, printed in every report.
///
/// Common practice (no single source): the hazards named are those stack-testing and TAB field
/// procedures warn about. The wording is the project's own.
pub fn standard_safety_cautions() -> Vec<String> {
    [
        "Work at height: sampling platforms, ladders and roofs need fall protection, guard rails and \
         toe boards in good condition; keep tools and probes tethered and the area below kept clear.",
        "Hot and toxic gases: stack and duct gases may be hot, under positive pressure, oxygen-deficient \
         or contain carbon monoxide, sulphur dioxide or other toxic components. Open ports only with \
         suitable gloves, eye and face protection and gas monitoring; stand upwind and clear of the port.",
        "Hot surfaces and probes: a probe withdrawn from a hot stack stays hot; handle it with heat-resistant \
         gloves and lay it where no one can touch it.",
        "Moving air and machinery: fans, dampers and belts can start without warning; high-velocity air \
         can pull in loose clothing, paper and instruments. Keep hands out of open ducts and access doors.",
        "Confined spaces: never enter a duct, plenum or stack interior without a confined-space permit, \
         atmospheric testing, ventilation and a standby attendant.",
        "Lock-out: isolate and lock out fans and process equipment before opening access doors or working \
         inside air-handling units, and verify zero energy before starting.",
        "Electrical: keep instrument leads and extension cables clear of hot surfaces and water; use \
         equipment rated for the area classification where flammable gases or dusts may be present.",
        "These cautions are general. They do not replace site rules, local codes and regulations, \
         permits to work, or the judgement of a competent, licensed professional responsible for the work.",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn validate_names_what_is_wrong() {
        let mut data = ReportData::demo();
        data.results.rows[0].values.pop();
        assert!(matches!(
            data.validate(),
            Err(ModelError::ColumnCount {
                expected: 4,
                found: 3,
                ..
            })
        ));

        let mut data = ReportData::demo();
        data.runs[0].field[0].line = "Z".into();
        let e = data.validate().unwrap_err();
        assert_eq!(
            e.to_string(),
            "run `1` has a point on line `Z`, which the plane does not have"
        );

        let mut data = ReportData::demo();
        data.plane.shape = Shape::Round { diameter_m: -1.0 };
        assert!(matches!(data.validate(), Err(ModelError::BadNumber { .. })));

        let mut data = ReportData::demo_rectangular();
        data.plane.lines[0].orientation = LineOrientation::AngleDeg(0.0);
        assert!(matches!(data.validate(), Err(ModelError::BadLine { .. })));
    }

    #[test]
    fn points_are_placed_as_drawn() {
        const TOL_M: f64 = 1e-12;
        let round = ReportData::demo().plane;
        // Line A (0°) enters at the top: a point 0.1 m in is 0.1 m below the top wall.
        let (x, y) = round.point_xy(LineOrientation::AngleDeg(0.0), 0.1);
        assert!(x.abs() < TOL_M && (y - (0.508 - 0.1)).abs() < TOL_M);
        // Line B (90°) enters on the right.
        let (x, y) = round.point_xy(LineOrientation::AngleDeg(90.0), 0.1);
        assert!((x - 0.408).abs() < TOL_M && y.abs() < TOL_M);
        let rect = ReportData::demo_rectangular().plane;
        let (x, y) = rect.point_xy(LineOrientation::OffsetM(0.0), 0.0);
        assert!((x + 0.3048).abs() < TOL_M && (y - 0.2032).abs() < TOL_M);
    }

    #[test]
    fn the_model_serialises_with_our_field_names() {
        let json = serde_json::to_value(ReportData::demo()).unwrap();
        assert_eq!(json["plane"]["shape"]["kind"], "round");
        assert_eq!(json["plane"]["lines"][1]["orientation"]["angle_deg"], 90.0);
        assert_eq!(json["summary"]["verdict"], "pass");
        assert_eq!(json["header"]["paper"], "us-letter");
        let rect = serde_json::to_value(ReportData::demo_rectangular()).unwrap();
        assert_eq!(rect["checks"][6]["status"], "not-applicable");
    }
}
