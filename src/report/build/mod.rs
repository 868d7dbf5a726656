//! Fills the report model from computed results, one section per file: an [`Evaluation`] with its
//! [`Assessment`] becomes a [`ReportData`].
//!
//! Formatting only: every number here was computed upstream; these files choose words, units and
//! decimals. Units come from the job's display table ([`crate::display`]): a job read in inches of
//! water is shown in inches of water, with SI beside it only where a section deliberately prints
//! both (inch-pound jobs' key results, labelled `SI`). Words come from the trade (`Trade`): an
//! HVAC report speaks of air, velocity pressure and fpm; a stack report of gas, Δp and dscfm.
//!
//! | file | section |
//! |---|---|
//! | `header.rs` | identity block, page header and footer |
//! | `summary.rs` | verdict, headline figures, design comparison |
//! | `results.rs` | results per run and their average |
//! | `conditions.rs` | reference conditions, gas or air during the test |
//! | `moisture.rs` | Method 4 moisture trains and their intermediates |
//! | `plane.rs` | the plane, its lines and probe marks (also the field sheet's) |
//! | `runs.rs` | readings tables and velocity fields |
//! | `checks.rs` | survey checks, the check × run matrix, remarks |
//! | `uncertainty.rs` | the GUM budget of the headline flow |
//! | `instruments.rs` | instruments, calibrations and budget inputs |
//! | `notes.rs` | notes and deviations |
//! | `safety.rs` | safety cautions per trade |
//! | `signoff.rs` | the sign-off block |
//!
//! Each section has unit tests on a real evaluation of a sample survey (`report::testkit`), and
//! `tests/report_model.rs` keeps the whole model of every sample survey as golden JSON.

mod checks;
mod conditions;
mod header;
mod instruments;
mod moisture;
mod notes;
mod plane;
mod results;
mod runs;
mod safety;
mod signoff;
mod summary;
mod uncertainty;
mod words;

pub(crate) use header::software;
pub use plane::{field_sheet_data, mark_step, SheetPlane};
pub(crate) use words::Trade;

use super::model::{ChartUnits, Quantity, ReportData};
use crate::assess::Assessment;
use crate::display::{DisplayTable, Kind, UnitSystem};
use crate::flow::{Average, RunResult};
use crate::pipeline::Evaluation;
use crate::survey::Survey;

/// What the report's identity block needs besides the results.
#[derive(Debug, Clone)]
pub struct Identity {
    pub report_id: String,
    pub content_sha256: String,
    pub signer_key_fingerprint: Option<String>,
    /// The signing key's name (`annulus keygen NAME`), printed in the sign-off block.
    pub signer_name: Option<String>,
    /// The user configuration's firm, technician and certificate, for a sign-off the survey
    /// leaves empty.
    pub defaults: crate::config::SignoffDefaults,
}

/// Builds the report model.
pub fn report_data(e: &Evaluation, a: &Assessment, id: &Identity) -> ReportData {
    let job = Job::new(e, a);
    let plane = plane::section(&job);
    ReportData {
        header: header::section(&job, id),
        units: chart_units(&job.table),
        conditions: conditions::section(&job),
        summary: summary::section(&job),
        results: results::section(&job),
        moisture: moisture::section(&job),
        readings: runs::columns(&job),
        runs: runs::section(&job, &plane),
        plane,
        checks: checks::section(&job),
        uncertainty: uncertainty::section(&job),
        instruments: instruments::section(&job),
        notes: notes::notes(&job),
        deviations: notes::deviations(&job),
        safety: safety::cautions(job.trade),
        signoff: signoff::section(&job, id),
    }
}

/// The HVAC safety cautions, for documents about air systems (the submittal).
pub(crate) fn hvac_cautions() -> Vec<String> {
    safety::cautions(Trade::Hvac)
}

/// One report being built: the results, the job's display table and its trade.
pub(crate) struct Job<'a> {
    pub e: &'a Evaluation,
    pub a: &'a Assessment,
    pub table: DisplayTable,
    pub trade: Trade,
}

impl<'a> Job<'a> {
    pub fn new(e: &'a Evaluation, a: &'a Assessment) -> Job<'a> {
        let s = &e.loaded.survey;
        let system = UnitSystem::of(s.convention, s.options.epa_metric);
        Job {
            e,
            a,
            table: DisplayTable::new(s.convention, system)
                .with_reference_overridden(e.convention.overridden),
            trade: Trade::of(s.convention),
        }
    }

    pub fn survey(&self) -> &'a Survey {
        &self.e.loaded.survey
    }

    /// A value with its unit in the job's units, thousands grouped (`93,249 dscfm`).
    pub fn text(&self, kind: Kind, si: f64) -> String {
        text(&self.table, kind, si)
    }

    /// The number alone in the job's units (`93,249`).
    pub fn number(&self, kind: Kind, si: f64) -> String {
        self.table.get(kind).grouped(si)
    }

    /// Whether key results also print in SI: inch-pound jobs only (SI and EPA metric jobs are
    /// already metric).
    pub fn si_beside(&self) -> bool {
        self.table.system == UnitSystem::InchPound
    }

    /// The same value in SI when the job shows SI beside, else `""`.
    pub fn si_text(&self, kind: Kind, si: f64) -> String {
        if self.si_beside() {
            text(&self.table.si(), kind, si)
        } else {
            String::new()
        }
    }

    /// A labelled value in the job's units with SI beside where the job shows it.
    pub fn quantity(&self, label: &str, kind: Kind, si: f64) -> Quantity {
        Quantity::new(label, self.text(kind, si), self.si_text(kind, si))
    }

    /// A labelled value in the job's units only.
    pub fn plain(&self, label: &str, kind: Kind, si: f64) -> Quantity {
        Quantity::new(label, self.text(kind, si), "")
    }
}

/// `value unit` with thousands grouped, in `table`'s units.
pub(crate) fn text(table: &DisplayTable, kind: Kind, si: f64) -> String {
    let shown = table.get(kind);
    shown.with_unit(shown.grouped(si))
}

/// Unit labels and factors for the charts, from the display table.
pub(crate) fn chart_units(table: &DisplayTable) -> ChartUnits {
    let length = table.get(Kind::Length);
    let velocity = table.get(Kind::Velocity);
    ChartUnits {
        length: length.symbol.to_string(),
        length_per_m: length.value(1.0),
        // one decimal of an inch, whole millimetres
        length_decimals: length.decimals.min(1),
        velocity: velocity.symbol.to_string(),
        velocity_per_m_s: velocity.value(1.0),
        velocity_decimals: velocity.decimals.min(1),
        si_beside: table.system == UnitSystem::InchPound,
    }
}

/// The flow a trade reports first: dry standard for stacks (what emission rates are computed
/// from), actual for HVAC (what a design flow states).
pub(crate) fn headline_flow(trade: Trade) -> Kind {
    match trade {
        Trade::Stack => Kind::DryStandardFlow,
        Trade::Hvac => Kind::ActualFlow,
    }
}

/// The average's value of a flow, velocity or mass-flow kind, SI.
pub(crate) fn average_value(kind: Kind, a: &Average) -> f64 {
    match kind {
        Kind::Velocity => a.mean_velocity_m_s,
        Kind::ActualFlow => a.actual_flow_m3_s,
        Kind::StandardFlow => a.standard_flow_m3_s,
        Kind::DryStandardFlow => a.dry_standard_flow_m3_s,
        Kind::MassFlow => a.mass_flow_kg_s,
        _ => f64::NAN,
    }
}

/// A run's value of a flow, velocity or mass-flow kind, SI.
pub(crate) fn run_value(kind: Kind, r: &RunResult) -> f64 {
    match kind {
        Kind::Velocity => r.mean_velocity_m_s,
        Kind::ActualFlow => r.actual_flow_m3_s,
        Kind::StandardFlow => r.standard_flow_m3_s,
        Kind::DryStandardFlow => r.dry_standard_flow_m3_s,
        Kind::MassFlow => r.mass_flow_kg_s,
        _ => f64::NAN,
    }
}

/// A check's status as the model spells it.
pub(crate) fn status(s: crate::checks::Status) -> crate::report::model::Status {
    use crate::checks::Status as C;
    use crate::report::model::Status;
    match s {
        C::Pass => Status::Pass,
        C::Warn => Status::Warn,
        C::Fail => Status::Fail,
        C::NotApplicable => Status::NotApplicable,
    }
}

/// "run 1" or "runs 1, 2, 3".
pub(crate) fn run_range(ids: &[String]) -> String {
    match ids.len() {
        0 => "no runs".into(),
        1 => format!("run {}", ids[0]),
        _ => format!("runs {}", ids.join(", ")),
    }
}

/// The first letter in upper case.
pub(crate) fn capitalised(s: &str) -> String {
    let mut c = s.chars();
    match c.next() {
        Some(f) => f.to_uppercase().chain(c).collect(),
        None => String::new(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::testkit::evaluated;

    #[test]
    fn the_job_speaks_in_its_own_units() {
        let (e, a) = evaluated("hvac");
        let job = Job::new(&e, &a);
        assert_eq!(job.trade, Trade::Hvac);
        // 1000 fpm = 5.08 m/s exactly (1 ft = 0.3048 m)
        assert_eq!(job.text(Kind::Velocity, 5.08), "1,000 fpm");
        assert_eq!(job.si_text(Kind::Velocity, 5.08), "5.08 m/s");
        let (e, a) = evaluated("stack-metric");
        let job = Job::new(&e, &a);
        assert_eq!(job.table.system, UnitSystem::EpaMetric);
        // 12 mmH2O = 117.6798 Pa (conventional mm of water, NIST SP 811 B.8)
        assert_eq!(job.text(Kind::VelocityPressure, 117.6798), "12.00 mmH2O");
        assert_eq!(
            job.si_text(Kind::Velocity, 5.08),
            "",
            "a metric job has no SI beside"
        );
    }

    #[test]
    fn chart_units_follow_the_table() {
        let (e, a) = evaluated("stack");
        let u = chart_units(&Job::new(&e, &a).table);
        assert_eq!((u.length.as_str(), u.velocity.as_str()), ("in", "ft/s"));
        // 1 m = 39.370 in; 1 m/s = 3.2808 ft/s
        assert!((u.length_per_m - 1.0 / 0.0254).abs() < 1e-9);
        assert!((u.velocity_per_m_s - 1.0 / 0.3048).abs() < 1e-9);
        assert_eq!(capitalised("dry standard flow"), "Dry standard flow");
        assert_eq!(run_range(&["1".into(), "3".into()]), "runs 1, 3");
    }
}
