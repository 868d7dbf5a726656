//! Calibration certificates and RATA summaries: the results they embed, re-derived from their
//! embedded inputs on verification; and the identity of a document for reviews.
//!
//! A certificate embeds the calibration file, its readings and a [`CalibrationResults`]; a RATA
//! summary embeds the RATA file, any survey files it references and a [`RataResults`]. Verifying
//! reloads the inputs from the attachments (by their manifest paths, in a virtual folder), computes
//! the summary again and compares it value by value with the embedded one.

use super::recompute::{compare_values, embedded_results, first_problem, Recomputation};
use crate::archive::manifest::{DocKind, Manifest};
use crate::input::calibration_file::LoadedCalibration;
use crate::input::rata_file::{parse_rata, ReferenceSpec};
use crate::pipeline::rata::RataEvaluation;
use crate::rata::{evaluate_rata, RataResult, RataRun, PART_75_FLOW_LIMITS};
use crate::survey::Survey;
use serde::{Deserialize, Serialize};
use std::collections::HashMap;
use std::path::Path;

/// Who and what a document is about, as a review lists it.
#[derive(Debug, Clone, Default, PartialEq, Eq, Serialize)]
pub struct Identity {
    pub title: String,
    pub site: Option<String>,
    pub date: String,
    pub tested_by: Option<String>,
}

impl Identity {
    /// A submittal's: the system file's title, site and date, and who tested the system.
    pub fn of_system(e: &crate::submittal::SystemEvaluation) -> Identity {
        let spec = &e.loaded.spec;
        Identity {
            title: spec.title.clone(),
            site: spec.site.clone(),
            date: spec.date.to_string(),
            tested_by: Some(
                crate::report::submittal::identity_of(e, &Default::default())
                    .1
                    .tested_by,
            )
            .filter(|t| !t.is_empty()),
        }
    }

    pub fn of_survey(s: &Survey) -> Identity {
        Identity {
            title: s.title.clone(),
            site: s.site.clone(),
            date: s.date.to_string(),
            tested_by: s.signoff.tested_by.clone(),
        }
    }
}

/// What a calibration certificate states, as it embeds it (`results.json`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CalibrationResults {
    pub probe: String,
    pub serial: Option<String>,
    pub date: String,
    pub standard_coefficient: f64,
    pub leg_a_mean: f64,
    pub leg_a_deviation: f64,
    pub leg_b_mean: f64,
    pub leg_b_deviation: f64,
    pub leg_difference: f64,
    pub accepted: bool,
    /// Cp(s) assigned, when accepted.
    pub assigned_coefficient: Option<f64>,
}

impl CalibrationResults {
    pub fn of(c: &LoadedCalibration) -> CalibrationResults {
        let cal = &c.calibration;
        CalibrationResults {
            probe: c.meta.probe.clone(),
            serial: c.meta.serial.clone(),
            date: c.meta.date.to_string(),
            standard_coefficient: cal.standard_coefficient,
            leg_a_mean: cal.leg_a.mean,
            leg_a_deviation: cal.leg_a.deviation,
            leg_b_mean: cal.leg_b.mean,
            leg_b_deviation: cal.leg_b.deviation,
            leg_difference: cal.leg_difference,
            accepted: cal.accepted(),
            assigned_coefficient: cal.accepted().then(|| cal.assigned_coefficient()),
        }
    }
}

/// What a RATA summary states, as it embeds it (`results.json`), SI.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RataResults {
    pub monitor_id: String,
    pub date: String,
    pub used_runs: usize,
    pub reference_mean_si: f64,
    pub monitor_mean_si: f64,
    pub mean_difference_si: f64,
    pub std_dev_difference_si: f64,
    pub confidence_coefficient_si: f64,
    pub relative_accuracy_percent: f64,
    pub grade: String,
    pub bias_passed: bool,
    pub bias_adjustment_factor: f64,
}

impl RataResults {
    pub fn of(monitor_id: &str, date: &str, r: &RataResult) -> RataResults {
        RataResults {
            monitor_id: monitor_id.to_string(),
            date: date.to_string(),
            used_runs: r.used_runs,
            reference_mean_si: r.reference_mean,
            monitor_mean_si: r.monitor_mean,
            mean_difference_si: r.mean_difference,
            std_dev_difference_si: r.std_dev_difference,
            confidence_coefficient_si: r.confidence_coefficient,
            relative_accuracy_percent: r.relative_accuracy_percent,
            grade: format!("{:?}", r.ra_grade),
            bias_passed: r.bias.passed,
            bias_adjustment_factor: r.bias.adjustment_factor,
        }
    }

    pub fn of_evaluation(r: &RataEvaluation) -> RataResults {
        let m = &r.spec.meta;
        RataResults::of(&m.monitor_id, &m.date.to_string(), &r.result)
    }
}

/// The results document a certificate or RATA summary embeds.
pub fn results_bytes<T: Serialize>(summary: &T) -> Vec<u8> {
    let mut v = serde_json::to_vec_pretty(summary).unwrap_or_default();
    v.push(b'\n');
    v
}

/// Re-derives a certificate's or a RATA summary's results from its embedded inputs.
pub fn recompute(
    kind: DocKind,
    manifest: &Manifest,
    by_name: &HashMap<&str, &[u8]>,
) -> Recomputation {
    let impossible = |reason: String| Recomputation::Impossible { reason };
    let embedded = match embedded_results(manifest, by_name) {
        Ok(v) => v,
        Err(why) => return impossible(why),
    };
    let role = match kind {
        DocKind::Calibration => "calibration",
        DocKind::Rata => "rata",
        DocKind::Report | DocKind::Submittal => {
            return impossible("not a certificate or RATA summary".into())
        }
    };
    let Some(main) = manifest.files.iter().find(|e| e.role == role) else {
        return impossible(format!("the manifest lists no {role} file"));
    };
    let Some(main_bytes) = by_name.get(main.name.as_str()) else {
        return impossible(format!("`{}` is not embedded", main.name));
    };
    let recomputed = match kind {
        DocKind::Calibration => {
            let dir = Path::new("embedded");
            let mut files = crate::input::MemoryFiles::new();
            let path = dir.join(&main.path);
            files.insert(path.clone(), main_bytes.to_vec());
            let parent = path.parent().unwrap_or(dir).to_path_buf();
            for e in manifest
                .files
                .iter()
                .filter(|e| e.role == "calibration-readings")
            {
                if let Some(b) = by_name.get(e.name.as_str()) {
                    files.insert(parent.join(&e.path), b.to_vec());
                }
            }
            match crate::input::calibration_file::load_with(&path, &|p| files.read(p)) {
                Ok(c) => serde_json::to_value(CalibrationResults::of(&c)),
                Err(e) => {
                    return impossible(format!(
                        "the embedded calibration does not load: {}",
                        first_problem(&e)
                    ))
                }
            }
        }
        _ => {
            let Ok(text) = std::str::from_utf8(main_bytes) else {
                return impossible("the embedded RATA file is not UTF-8".into());
            };
            let spec = match parse_rata(&main.path, text) {
                Ok(s) => s,
                Err(e) => {
                    return impossible(format!(
                        "the embedded RATA file does not load: {}",
                        first_problem(&e)
                    ))
                }
            };
            let mut runs = Vec::new();
            for run in &spec.runs {
                let ReferenceSpec::Value { si, .. } = run.reference else {
                    return Recomputation::NotDone {
                        reason: "its reference-method values come from survey files, which are embedded and hashed but not re-evaluated here".into(),
                    };
                };
                let built = match &run.rejected {
                    None => RataRun::used(&run.id, si, run.monitor_si),
                    Some(reason) => RataRun::rejected(&run.id, si, run.monitor_si, reason),
                };
                match built {
                    Ok(r) => runs.push(r),
                    Err(e) => return impossible(format!("run {}: {e}", run.id)),
                }
            }
            match evaluate_rata(runs, spec.quantity, PART_75_FLOW_LIMITS) {
                Ok(r) => serde_json::to_value(RataResults::of(
                    &spec.meta.monitor_id,
                    &spec.meta.date.to_string(),
                    &r,
                )),
                Err(e) => return impossible(format!("the RATA cannot be evaluated: {e}")),
            }
        }
    };
    match recomputed {
        Ok(v) => compare_values(
            &embedded,
            &v,
            manifest.program != crate::archive::make::program(),
        ),
        Err(e) => impossible(format!("the recomputed results cannot be written: {e}")),
    }
}
