//! The presentation model: everything a test report or a blank field data sheet shows.
//!
//! Owns the one structure each template receives ([`ReportData`] for `templates/report.typ`,
//! [`FieldSheetData`] for `templates/field-sheet.typ`). The engine serialises it to a single JSON
//! blob that the template reads with `json(…)`; the field names here are the template's vocabulary.
//! The calibration certificate and the RATA summary have their own models
//! ([`crate::report::certificate`], [`crate::report::rata`]).
//!
//! Must not compute results, read files or look at the clock. Every printed number arrives already
//! formatted as a string in the job's units (Typst prints floats without trailing zeros, so
//! `12.50` would become `12.5`). Raw `f64` values are kept only where charts need geometry or
//! velocities; those are SI with the unit in the name (`position_m`, `velocity_m_s`).
//!
//! [`ReportData::validate`] checks what the templates and charts rely on (matching column counts,
//! finite positive dimensions, a SHA-256 fingerprint, known line names) so that a malformed model
//! is rejected with a message instead of surfacing as a Typst error.

mod plane;
mod sheet;
mod validate;

pub use plane::{LineOrientation, Plane, PointPosition, Shape, StraightRun, TraverseLine};
pub use sheet::{FieldSheetData, SheetFields};
pub use validate::ModelError;

use serde::Serialize;

/// Everything the signed-off PDF test report shows, in reading order of the report.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ReportData {
    pub header: Header,
    /// Unit labels and SI→display factors the charts use.
    pub units: ChartUnits,
    pub conditions: Conditions,
    pub summary: Summary,
    /// Results per run and their average; several tables when there are many runs, so that each
    /// fits the page width.
    pub results: Vec<ResultsTable>,
    /// Each run's moisture train (EPA Method 4) with every intermediate; empty when no run's
    /// moisture is from a train.
    pub moisture: Vec<ResultsTable>,
    pub plane: Plane,
    /// Column heads of the readings tables.
    pub readings: ReadingsColumns,
    /// Readings and velocity field of each run, in run order.
    pub runs: Vec<RunData>,
    pub checks: ChecksSection,
    pub uncertainty: UncertaintyBudget,
    pub instruments: Vec<InstrumentRow>,
    pub notes: Vec<String>,
    pub deviations: Vec<String>,
    /// Safety cautions fitting the trade (stack or HVAC), printed near the end.
    pub safety: Vec<String>,
    pub signoff: SignOff,
}

/// Identification of the report, printed on the cover block and in every page header/footer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Header {
    /// The kind of document in words, e.g. `Flow test report` or `Duct traverse report`.
    pub kind: String,
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
    /// Name of the signing key (`annulus keygen NAME`), when the report is signed.
    pub signer_name: Option<String>,
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

/// Unit labels of the job, and the factors the charts use to print SI values in them.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ChartUnits {
    /// Length label, e.g. `in` or `mm`.
    pub length: String,
    /// Display length units per metre (39.370… for inches).
    pub length_per_m: f64,
    /// Decimals for lengths printed on charts.
    pub length_decimals: usize,
    /// Velocity label, e.g. `ft/s`, `fpm` or `m/s`.
    pub velocity: String,
    /// Display velocity units per m/s (3.2808… for ft/s).
    pub velocity_per_m_s: f64,
    /// Decimals for velocities printed on charts.
    pub velocity_decimals: usize,
    /// The drawing also prints dimensions in metres (inch-pound jobs only).
    pub si_beside: bool,
}

/// A labelled value in the job's units, with the same value in SI where the page shows both
/// (empty otherwise).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Quantity {
    pub label: String,
    pub value: String,
    pub si: String,
}

impl Quantity {
    /// A labelled value with its SI equivalent (`""` for none).
    pub fn new(label: impl Into<String>, value: impl Into<String>, si: impl Into<String>) -> Self {
        Quantity {
            label: label.into(),
            value: value.into(),
            si: si.into(),
        }
    }
}

/// The convention and reference conditions the results are stated under, and the conditions of
/// the gas (or air) during the test.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Conditions {
    /// Display name, e.g. `EPA Method 2 (English units)`.
    pub convention: String,
    /// Identifier as in the survey file, e.g. `epa-method-2`.
    pub convention_id: String,
    /// Reference conditions and the basis of the standard flows.
    pub reference: Vec<Quantity>,
    /// One sentence stating the reference conditions and basis together, printed under the results.
    pub statement: String,
    /// Heading of the gas list, e.g. `Stack gas` or `Air`.
    pub gas_heading: String,
    /// Gas (or air) and duct conditions during the test.
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
    /// The verdict in words, e.g. `All 9 applicable checks pass.`
    pub verdict_text: String,
    /// Key figures (usually of the average), printed large.
    pub headline: Vec<Quantity>,
    /// Design flow and percent of design, when the survey gives a design flow.
    pub design: Option<Design>,
    /// What the average is over, e.g. `Average of runs 1, 2, 3`.
    pub basis_text: String,
}

/// The measured flow against the design flow (HVAC).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Design {
    pub design: Quantity,
    pub measured: Quantity,
    /// Which measured flow is compared, e.g. `actual flow`.
    pub compared: String,
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
    /// Unit label in the job's units, e.g. `dscfm`.
    pub unit: String,
    /// One value per column.
    pub values: Vec<String>,
    /// SI unit label where the page shows SI beside, e.g. `m³/h (SI)`; empty otherwise.
    pub si_unit: String,
    /// One SI value per column (or empty when `si_unit` is empty).
    pub si_values: Vec<String>,
}

/// Column heads of the readings tables, in the job's words and units.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ReadingsColumns {
    pub position: String,
    /// e.g. `Δp (inH2O)` or `VP (inH2O)`.
    pub dp: String,
    pub temperature: String,
    /// `None` when no run recorded a yaw angle (the column is left out).
    pub yaw: Option<String>,
    pub velocity: String,
}

/// Readings and velocity field of one run.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RunData {
    /// Run id as in the survey, e.g. `1`.
    pub id: String,
    /// Heading, e.g. `Run 1`.
    pub label: String,
    /// Start and end as recorded, e.g. `2026-10-14T09:12`; empty when not recorded.
    pub started: String,
    pub ended: String,
    /// Leak checks in words, e.g. `before: pass · after: pass`; `None` when the trade does not
    /// record them and none were recorded.
    pub leak_check: Option<String>,
    pub readings: Vec<ReadingRow>,
    /// Run figures printed under its readings table (mean velocity, mean temperature …).
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
    /// Yaw (null) angle, `—` when not measured, empty when the report has no yaw column.
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

/// The acceptance checks: the plane and the test as a whole in one table, then each run's checks
/// as a check × run matrix with each limit and source printed once.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ChecksSection {
    /// Checks judged once for the survey (plane, records, data across runs).
    pub survey: Vec<CheckRow>,
    /// Checks judged per run; one matrix per group of at most [`MAX_RUN_COLUMNS`] runs.
    pub matrices: Vec<CheckMatrix>,
    /// What a matrix cell does not show: the findings of runs that warn or fail, and reasons
    /// that differ between runs, e.g. `Run 2 · line-asymmetry: …`.
    pub remarks: Vec<String>,
}

/// Runs per check matrix (and per results table): more are split into further tables so that
/// every table fits the page width.
pub const MAX_RUN_COLUMNS: usize = 5;

/// One check judged once for the survey.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CheckRow {
    /// Family, e.g. `Plane`, `Records`.
    pub group: String,
    /// Check id, with what it is about when a check yields several, e.g. `instrument-calibration (dp)`.
    pub id: String,
    pub status: Status,
    pub measured: String,
    pub limit: String,
    /// The rule's source, e.g. `EPA Method 1 §11.4`.
    pub source: String,
    pub message: String,
}

/// Checks judged per run, for a group of runs.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CheckMatrix {
    /// Column heads, e.g. `Run 1`.
    pub runs: Vec<String>,
    pub rows: Vec<MatrixRow>,
}

/// One run-scope check across the runs of a matrix.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MatrixRow {
    pub group: String,
    pub id: String,
    pub limit: String,
    pub source: String,
    /// One cell per run of the matrix.
    pub cells: Vec<CheckCell>,
    /// The finding when it reads the same for every run (e.g. why the check does not apply);
    /// empty otherwise.
    pub message: String,
}

/// A check's outcome for one run.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CheckCell {
    pub status: Status,
    pub measured: String,
}

/// The uncertainty budget (GUM, JCGM 100:2008) of the reported flow.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UncertaintyBudget {
    /// What the budget is for, e.g. `Dry standard flow, average of runs 1, 2, 3`.
    pub applies_to: String,
    /// Name of the spatial-integration option used, e.g. `point-scatter`.
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
    /// Expanded uncertainty in flow units, e.g. `±4,570 dscfm`.
    pub expanded_absolute: String,
    /// Confidence statement, e.g. `about 95 % coverage`.
    pub note: String,
}

/// One component of the budget.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BudgetRow {
    pub name: String,
    /// Relative standard uncertainty, e.g. `0.50 %`.
    pub relative_u: String,
    /// Sensitivity coefficient, e.g. `0.50`.
    pub sensitivity: String,
    /// Degrees of freedom, e.g. `∞` or `23`.
    pub dof: String,
    /// Share of the combined variance, e.g. `12 %`.
    pub contribution: String,
}

/// One instrument (or budget input) with its calibration.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct InstrumentRow {
    pub name: String,
    pub identifier: String,
    /// Range, coefficient, resolution …
    pub detail: String,
    pub calibrated: String,
    /// Last day the calibration covers, from the interval the calibration check uses.
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
