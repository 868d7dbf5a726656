//! The pipeline from loaded inputs to results: plane → match readings → compute each run →
//! average, then the checks and uncertainty ([`evaluate_and_assess`]); a RATA's surveys and
//! statistics in [`rata`]. Inputs arrive loaded (`input`); nothing here reads files, prints or
//! looks at the clock.

pub mod rata;

use crate::diag::{Diagnostic, Diagnostics, Error, Location};
pub use crate::evaluation::{run_is_valid, Evaluation};
use crate::flow::{self, average_runs, Convention, EpaForm, FlowError, RunResult};
use crate::input::readings::{label_lines, match_to_layout};
use crate::input::Loaded;
use crate::plane::{lay_out, Plane};
use crate::survey::WallFactor;

fn flow_diag(e: FlowError, file: &str) -> Diagnostic {
    match e {
        FlowError::Reading {
            line,
            point,
            source_line,
            message,
            hint,
        } => {
            let loc = if source_line > 0 {
                Location::at(file, source_line, 1)
            } else {
                Location::file(file)
            };
            Diagnostic::new(format!("line {line}, point {point}: {message}"))
                .at(loc.with_context(format!("line {line}, point {point}")))
                .hint(hint)
        }
        FlowError::Gas { message, hint } => {
            let d = Diagnostic::new(format!("the gas cannot be resolved: {message}"))
                .at(Location::file(file));
            if hint.is_empty() {
                d
            } else {
                d.hint(hint)
            }
        }
    }
}

/// Runs the calculation pipeline on a loaded survey, reporting every input problem found.
pub fn evaluate(mut loaded: Loaded) -> Result<Evaluation, Error> {
    let (convention, plane) = lay_out_survey(&loaded)?;
    let mut diags = Diagnostics::new();
    // line labels as the layout names them; a run whose labels match no line gets one problem
    let mut labelled = Vec::new();
    for (_, readings) in &mut loaded.runs {
        let ok = label_lines(readings, &plane.layout).map_err(|d| diags.push(d));
        labelled.push(ok.is_ok());
    }
    let s = &loaded.survey;
    let mut runs = Vec::new();
    for ((spec, (_, readings)), labelled) in s.runs.iter().zip(&loaded.runs).zip(labelled) {
        if !labelled {
            continue;
        }
        if let Err(Error::Input(d)) = match_to_layout(readings, &plane.layout) {
            diags.extend(d);
            continue;
        }
        match flow::compute_run(s, &convention, &plane.layout, &spec.id, readings) {
            Ok(r) => runs.push(r),
            Err(e) => diags.push(flow_diag(e, &readings.file)),
        }
    }
    if !diags.is_empty() {
        return Err(Error::Input(diags));
    }
    let included: Vec<&RunResult> = runs
        .iter()
        .zip(&s.runs)
        .filter(|(_, spec)| run_is_valid(spec, s.convention))
        .map(|(r, _)| r)
        .collect();
    let average = average_runs(&included, s.design.as_ref(), &convention);
    Ok(Evaluation {
        convention,
        plane,
        average,
        runs,
        loaded,
    })
}

/// The survey's convention and its plane laid out.
fn lay_out_survey(loaded: &Loaded) -> Result<(Convention, Plane), Error> {
    let s = &loaded.survey;
    let survey_name = loaded.survey_file.name.clone();
    let convention = Convention::new(
        s.convention,
        if s.options.epa_metric {
            EpaForm::Metric
        } else {
            EpaForm::English
        },
        s.reference,
    );
    let plane = lay_out(
        &s.duct,
        &s.layout,
        s.convention,
        s.upstream_d,
        s.downstream_d,
    )
    .map_err(|e| {
        Error::input(
            Diagnostic::new(format!("the survey's layout cannot be made: {e}"))
                .at(Location::file(&survey_name).with_context("[layout]"))
                .hint("check [layout] method, lines and points_per_line against the duct shape"),
        )
    })?;
    if matches!(s.options.wall_factor, WallFactor::Method2hDefault) && !s.duct.is_round() {
        return Err(Error::input(
            Diagnostic::new("the Method 2H default wall factor applies to circular stacks only")
                .at(Location::file(&survey_name).with_context("[flow] wall_factor"))
                .hint("remove wall_factor or give a measured factor"),
        ));
    }
    Ok((convention, plane))
}

/// Evaluates a loaded survey and runs the acceptance checks and uncertainty budgets on it.
pub fn evaluate_and_assess(
    loaded: Loaded,
) -> Result<(Evaluation, crate::assess::Assessment), Error> {
    let config = loaded.config.clone();
    let eval = evaluate(loaded)?;
    let assessment = crate::assess::assess(&eval, &config);
    Ok((eval, assessment))
}
