//! Reads a survey file (TOML) into a validated [`Survey`].
//!
//! Every quantity is a string with a unit, parsed by `units`; every problem (a syntax error, a
//! missing or unknown key, a value of the wrong type, a bad quantity or an implausible value) is
//! located (file, line, column of the value) and all of them are reported in one pass before
//! anything is computed. The file is read through [`TomlDoc`], one function per table:
//!
//! | table | read by |
//! |---|---|
//! | `[survey]`, `[duct]`, `[layout]` | [`plane`] |
//! | `[probe]` | [`probe`] |
//! | `[gas]`, `[gas.method4]` (and the same keys in a `[[run]]`) | [`gas`] |
//! | `[design]`, `[flow]`, `[signoff]`, `notes` | [`options`] |
//! | `[[run]]`, `[run.method4]` | [`runs`] |
//! | `[checks]`, `[instruments]`, `[reported]` | [`super::assess_config`] |
//!
//! To add a key, ask its table for it in that table's function (the getter checks type and unit
//! and records the key as known) and put the value in the domain type in `crate::survey`.

pub mod gas;
pub mod options;
pub mod plane;
pub mod probe;
pub mod runs;

use super::toml_doc::{Table, TomlDoc};
use crate::diag::{Error, Location};
use crate::input::calibration_file::CalibrationRecord;
use crate::survey::*;

pub use plane::PlaneParts;

/// Reads a calibration file a survey references: the path as written in the survey and where
/// the survey names it (for a file that cannot be read).
pub type CalibrationResolver<'a> = &'a dyn Fn(&str, &Location) -> Result<CalibrationRecord, Error>;

/// Sections of a survey read by other parsers (`input::assess_config`).
pub const OTHER_SECTIONS: [&str; 3] = ["checks", "instruments", "reported"];

/// Parses survey text. `file` names it in diagnostics.
pub fn parse_survey(file: &str, text: &str) -> Result<Survey, Error> {
    parse_survey_with(file, text, None)
}

/// [`parse_survey`] with a way to read a `[probe] calibration` file; without one such a survey is
/// refused with a hint (files are read by `input::load`).
pub fn parse_survey_with(
    file: &str,
    text: &str,
    calibration: Option<CalibrationResolver>,
) -> Result<Survey, Error> {
    let doc = TomlDoc::parse(file, text, "survey")?;
    let (survey, _) = {
        let root = doc.root();
        read_survey(&root, calibration)
    };
    doc.finish(survey)
}

/// Reads a survey from its document's top level. Problems are recorded in the document; the
/// runs that could be read are returned also when the survey as a whole could not be, so their
/// readings files are still checked in the same pass.
pub fn read_survey(
    root: &Table,
    calibration: Option<CalibrationResolver>,
) -> (Option<Survey>, Vec<runs::RunEntry>) {
    root.allow(&OTHER_SECTIONS);
    let survey_table = root.table("survey");
    let meta = survey_table.as_ref().map(plane::read_meta);
    let plane = plane::read_plane(root, survey_table.as_ref());
    let probe_table = root.table("probe");
    let probe = probe_table
        .as_ref()
        .and_then(|t| probe::read_probe(t, calibration));
    let gas = root.table("gas").and_then(|t| gas::read_gas(&t));
    let design = options::read_design(root);
    let options = options::read_flow_options(root);
    let signoff = options::read_signoff(root);
    let notes = root.opt_strings("notes");
    let runs = runs::read_runs(root);
    let runs_required = survey_table
        .as_ref()
        .and_then(|t| t.opt_count("runs_required", 1..=100));
    if let (Some(p), Some(plane), Some(t)) = (&probe, &plane, &probe_table) {
        if p.gauge_gas_column && plane.convention == ConventionId::EpaMethod2 {
            t.error_at(
                "gauge_gas_column",
                "EPA Method 2 takes a liquid-column reading as h × SG inches of water, with no gas-column correction".into(),
                Some("remove gauge_gas_column under the epa-method-2 convention".into()),
            );
        }
    }
    let survey = (|| {
        let meta = meta??;
        let plane = plane?;
        Some(Survey {
            convention: plane.convention,
            duct: plane.duct,
            construction: plane.construction,
            upstream_d: plane.upstream_d,
            downstream_d: plane.downstream_d,
            port_length_m: plane.port_length_m,
            liner_m: plane.liner_m,
            layout: plane.layout,
            title: meta.title,
            site: meta.site,
            client: meta.client,
            plane: meta.plane,
            date: meta.date,
            reference: meta.reference,
            probe: probe?,
            gas: gas?,
            design: design?,
            options: options?,
            signoff,
            runs: runs.iter().map(|r| r.spec.clone()).collect(),
            runs_required: runs_required.unwrap_or_else(|| default_runs_required(plane.convention)),
            notes: notes.unwrap_or_default(),
        })
    })();
    (survey, runs)
}

/// Parses only the plane of a survey (for `annulus layout` on a survey still being filled in):
/// problems in other sections are ignored, problems in the plane are reported.
pub fn parse_plane(file: &str, text: &str) -> Result<PlaneParts, Error> {
    let doc = TomlDoc::parse(file, text, "survey")?;
    let plane = {
        let root = doc.root();
        // only the plane's tables are read: the others are not checked here
        root.allow(&[
            "probe",
            "gas",
            "design",
            "flow",
            "signoff",
            "run",
            "notes",
            "checks",
            "instruments",
            "reported",
        ]);
        let survey = root.table("survey");
        if let Some(t) = &survey {
            t.allow(&plane::META_KEYS);
        }
        plane::read_plane(&root, survey.as_ref())
    };
    doc.finish(plane)
}

#[cfg(test)]
mod tests;
