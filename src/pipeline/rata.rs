//! A RATA evaluated: each run's reference-method value (entered, or the average of a referenced
//! survey computed through the survey pipeline) paired with the monitor's, and the statistics of
//! [`crate::rata::evaluate_rata`].
//!
//! The RATA file and its surveys are read by [`crate::input::rata_file`]; nothing here reads
//! files, prints or looks at the clock.

use crate::diag::{Diagnostic, Diagnostics, Error, Location};
use crate::input::rata_file::{FlowBasis, RataInput, RataSpec, ReferenceSpec};
use crate::input::{Loaded, SourceFile};
use crate::rata::{
    evaluate_rata, RataError, RataQuantity, RataResult, RataRun, PART_75_FLOW_LIMITS,
};

/// Where a resolved reference-method value came from.
#[derive(Debug, Clone, PartialEq)]
pub enum ReferenceSource {
    /// Entered in the RATA file, as written.
    Entered { raw: String },
    /// The average of a survey's valid runs, or one run of it.
    Survey {
        /// As written in the RATA file (without a `#run`).
        path: String,
        title: String,
        /// Ids of the survey runs averaged (the one run, when the file names one).
        runs: Vec<String>,
        /// The RATA file names one run of the survey (`path#run`).
        one_run: bool,
    },
}

/// A RATA file with every survey reference resolved, and the evaluated RATA.
#[derive(Debug, Clone)]
pub struct RataEvaluation {
    pub file: SourceFile,
    pub spec: RataSpec,
    /// Per run (same order as `spec.runs`): where the reference value came from.
    pub sources: Vec<ReferenceSource>,
    /// Survey and readings files read for survey references, each with the id of the RATA run
    /// that referenced it.
    pub survey_files: Vec<(String, SourceFile)>,
    pub result: RataResult,
}

/// Computes every referenced survey and evaluates the RATA; every problem (also those of the
/// surveys' computations) is reported in one pass.
pub fn evaluate(input: RataInput) -> Result<RataEvaluation, Error> {
    let RataInput {
        file,
        spec,
        surveys,
    } = input;
    let name = file.path.display().to_string();
    let mut diags = Diagnostics::new();
    let mut sources = Vec::new();
    let mut survey_files = Vec::new();
    let mut runs = Vec::new();
    for (run, loaded) in spec.runs.iter().zip(surveys) {
        let (reference, source) = match (&run.reference, loaded) {
            (ReferenceSpec::Value { si, raw }, _) => {
                (*si, ReferenceSource::Entered { raw: raw.clone() })
            }
            (ReferenceSpec::Survey { path, run: one, at }, Some(loaded)) => {
                match survey_reference(loaded, path, one.as_deref(), at, spec.quantity, spec.basis)
                {
                    Ok((value, source, files)) => {
                        survey_files.extend(files.into_iter().map(|f| (run.id.clone(), f)));
                        (value, source)
                    }
                    Err(Error::Input(d)) => {
                        diags.extend(d);
                        continue;
                    }
                    Err(e) => return Err(e),
                }
            }
            (ReferenceSpec::Survey { path, at, .. }, None) => {
                diags.push(
                    Diagnostic::new(format!("the survey `{path}` was not read")).at(at.clone()),
                );
                continue;
            }
        };
        let built = match &run.rejected {
            None => RataRun::used(&run.id, reference, run.monitor_si),
            Some(reason) => RataRun::rejected(&run.id, reference, run.monitor_si, reason),
        };
        match built {
            Ok(r) => {
                runs.push(r);
                sources.push(source);
            }
            Err(e) => diags.push(core_diagnostic(e, &name, &spec)),
        }
    }
    if !diags.is_empty() {
        return Err(Error::Input(diags));
    }
    let result = evaluate_rata(runs, spec.quantity, PART_75_FLOW_LIMITS)
        .map_err(|e| Error::input(core_diagnostic(e, &name, &spec)))?;
    Ok(RataEvaluation {
        file,
        spec,
        sources,
        survey_files,
        result,
    })
}

/// Computes a referenced survey and takes its average, or the value of its run `one_run`. The
/// files it read (the survey, its readings, its wall-effects readings and the probe calibration
/// its coefficient came from) are returned to be embedded in the summary.
fn survey_reference(
    loaded: Loaded,
    rel: &str,
    one_run: Option<&str>,
    at: &Location,
    quantity: RataQuantity,
    basis: FlowBasis,
) -> Result<(f64, ReferenceSource, Vec<SourceFile>), Error> {
    let evaluation = super::evaluate(loaded)?;
    let pick = |velocity: f64, actual: f64, standard: f64, dry: f64| match (quantity, basis) {
        (RataQuantity::VelocityMS, _) => velocity,
        (RataQuantity::Flow, FlowBasis::Actual) => actual,
        (RataQuantity::Flow, FlowBasis::Standard) => standard,
        (RataQuantity::Flow, FlowBasis::DryStandard) => dry,
    };
    let (value, runs) = match one_run {
        Some(id) => {
            let Some(i) = evaluation.runs.iter().position(|r| r.id == id) else {
                let ids: Vec<&str> = evaluation.runs.iter().map(|r| r.id.as_str()).collect();
                return Err(Error::input(
                    Diagnostic::new(format!("the survey `{rel}` has no run `{id}`"))
                        .at(at.clone())
                        .hint(format!("its runs are {}", ids.join(", "))),
                ));
            };
            if let Some(why) = &evaluation.validity[i].void_reason {
                return Err(Error::input(
                    Diagnostic::new(format!(
                        "run `{id}` of the survey `{rel}` is void ({why}): it cannot be a reference-method value"
                    ))
                    .at(at.clone())
                    .hint("name a valid run, or reject the RATA run with a reason"),
                ));
            }
            let r = &evaluation.runs[i];
            (
                pick(
                    r.mean_velocity_m_s,
                    r.actual_flow_m3_s,
                    r.standard_flow_m3_s,
                    r.dry_standard_flow_m3_s,
                ),
                vec![id.to_string()],
            )
        }
        None => {
            let Some(avg) = &evaluation.average else {
                return Err(Error::input(
                    Diagnostic::new(format!(
                        "the survey `{rel}` has no valid run to average (see its leak checks)"
                    ))
                    .at(at.clone())
                    .hint("a run counts when its post-run leak check passed; check the survey with `annulus check`"),
                ));
            };
            (
                pick(
                    avg.mean_velocity_m_s,
                    avg.actual_flow_m3_s,
                    avg.standard_flow_m3_s,
                    avg.dry_standard_flow_m3_s,
                ),
                avg.runs.clone(),
            )
        }
    };
    let loaded = &evaluation.loaded;
    let mut files = vec![loaded.survey_file.clone()];
    files.extend(loaded.runs.iter().map(|(f, _)| f.clone()));
    files.extend(
        loaded
            .wall_readings
            .iter()
            .flatten()
            .map(|(f, _)| f.clone()),
    );
    if let Some((cal, cal_readings)) = &loaded.calibration {
        files.push(cal.clone());
        files.push(cal_readings.clone());
    }
    Ok((
        value,
        ReferenceSource::Survey {
            path: rel.to_string(),
            title: loaded.survey.title.clone(),
            runs,
            one_run: one_run.is_some(),
        },
        files,
    ))
}

/// A RATA file whose runs are at several operating levels, evaluated level by level: each level
/// is a RATA of its own (in the order the levels first appear). A file with one level gives one.
pub fn evaluate_levels(input: RataInput) -> Result<Vec<RataEvaluation>, Error> {
    let levels = crate::input::rata_file::levels(&input.spec.runs);
    if levels.len() <= 1 {
        return Ok(vec![evaluate(input)?]);
    }
    let mut out = Vec::new();
    let mut diags = Diagnostics::new();
    for level in levels {
        let mut spec = input.spec.clone();
        let (mut runs, mut surveys) = (Vec::new(), Vec::new());
        for (run, survey) in input.spec.runs.iter().zip(&input.surveys) {
            if run.level == level {
                runs.push(run.clone());
                surveys.push(survey.clone());
            }
        }
        spec.runs = runs;
        spec.meta.level = level;
        match evaluate(RataInput {
            file: input.file.clone(),
            spec,
            surveys,
        }) {
            Ok(e) => out.push(e),
            Err(Error::Input(d)) => diags.extend(d),
            Err(e) => return Err(e),
        }
    }
    diags.finish(out)
}

/// A core error the parser did not already catch (it checks the same rules with locations; a
/// survey-derived value can still be out of range).
fn core_diagnostic(e: RataError, file: &str, spec: &RataSpec) -> Diagnostic {
    let at = match &e {
        RataError::BadValue { run_id, .. }
        | RataError::DuplicateRunId { run_id }
        | RataError::MissingRejectionReason { run_id } => spec
            .runs
            .iter()
            .find(|r| &r.id == run_id)
            .map(|r| r.at.clone()),
        _ => None,
    };
    Diagnostic::new(e.to_string()).at(at.unwrap_or_else(|| Location::file(file)))
}
