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
    /// The average of a survey's valid runs.
    Survey {
        /// As written in the RATA file.
        path: String,
        title: String,
        /// Ids of the survey runs averaged.
        runs: Vec<String>,
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
            (ReferenceSpec::Survey { path, at }, Some(loaded)) => {
                match survey_reference(loaded, path, at, spec.quantity, spec.basis) {
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
            (ReferenceSpec::Survey { path, at }, None) => {
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

/// Computes a referenced survey and takes its average.
fn survey_reference(
    loaded: Loaded,
    rel: &str,
    at: &Location,
    quantity: RataQuantity,
    basis: FlowBasis,
) -> Result<(f64, ReferenceSource, Vec<SourceFile>), Error> {
    let evaluation = super::evaluate(loaded)?;
    let Some(avg) = &evaluation.average else {
        return Err(Error::input(
            Diagnostic::new(format!(
                "the survey `{rel}` has no valid run to average (see its leak checks)"
            ))
            .at(at.clone())
            .hint("a run counts when its post-run leak check passed; check the survey with `annulus check`"),
        ));
    };
    let value = match (quantity, basis) {
        (RataQuantity::VelocityMS, _) => avg.mean_velocity_m_s,
        (RataQuantity::Flow, FlowBasis::Actual) => avg.actual_flow_m3_s,
        (RataQuantity::Flow, FlowBasis::Standard) => avg.standard_flow_m3_s,
        (RataQuantity::Flow, FlowBasis::DryStandard) => avg.dry_standard_flow_m3_s,
    };
    let loaded = &evaluation.loaded;
    let mut files = vec![loaded.survey_file.clone()];
    files.extend(loaded.runs.iter().map(|(f, _)| f.clone()));
    Ok((
        value,
        ReferenceSource::Survey {
            path: rel.to_string(),
            title: loaded.survey.title.clone(),
            runs: avg.runs.clone(),
        },
        files,
    ))
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
