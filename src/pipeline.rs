//! The pipeline from loaded inputs to results: plane → match readings → compute each run →
//! average, then the checks and uncertainty ([`evaluate_and_assess`]); a RATA's surveys and
//! statistics in [`rata`]. Inputs arrive loaded (`input`); nothing here reads files, prints or
//! looks at the clock.

pub mod rata;

use crate::diag::{Diagnostic, Diagnostics, Error, Location};
pub use crate::evaluation::{run_is_valid, run_validity, Evaluation, RunValidity};
use crate::flow::{
    self, average_runs, wall_effects::combined_factor, Convention, EpaForm, FlowError, RunResult,
};
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
    let base_waf = flow::wall_factor(s);
    for ((spec, (_, readings)), labelled) in s.runs.iter().zip(&loaded.runs).zip(labelled) {
        if !labelled {
            continue;
        }
        if let Err(Error::Input(d)) = match_to_layout(readings, &plane.layout) {
            diags.extend(d);
            continue;
        }
        match flow::compute_run(s, &convention, &plane.layout, spec, readings, base_waf) {
            Ok(r) => runs.push(r),
            Err(e) => diags.push(flow_diag(e, &readings.file)),
        }
    }
    if !diags.is_empty() {
        return Err(Error::Input(diags));
    }
    let mut wall_effects = Vec::new();
    if s.options.wall_factor == WallFactor::Method2hCalculated {
        for ((spec, run), wall) in s.runs.iter().zip(&runs).zip(&loaded.wall_readings) {
            let Some((_, wall)) = wall else { continue };
            let located = |e: FlowError| flow_diag(e, &wall.file);
            let w = flow::wall_point_velocities(s, &convention, spec, run, wall)
                .and_then(|v| {
                    let pv: Vec<f64> = run.points.iter().map(|p| p.velocity_m_s).collect();
                    flow::wall_effects(&plane.layout, &pv, &v)
                })
                .map_err(located);
            match w {
                Ok(w) => wall_effects.push((spec.id.clone(), w)),
                Err(d) => diags.push(d),
            }
        }
        if !diags.is_empty() {
            return Err(Error::Input(diags));
        }
        let factors: Vec<f64> = wall_effects.iter().map(|(_, w)| w.factor).collect();
        let Some(waf) = combined_factor(&factors) else {
            return Err(Error::input(
                Diagnostic::new(
                    "wall_factor = \"method-2h-calculated\" needs a wall-effects traverse in at least one run",
                )
                .at(Location::file(&loaded.survey_file.name).with_context("[flow] wall_factor"))
                .hint("add wall_readings = \"…csv\" to a [[run]], or use \"method-2h-default\""),
            ));
        };
        runs = s
            .runs
            .iter()
            .zip(&loaded.runs)
            .map(|(spec, (_, readings))| {
                flow::compute_run(s, &convention, &plane.layout, spec, readings, waf)
                    .map_err(|e| Error::input(flow_diag(e, &readings.file)))
            })
            .collect::<Result<_, _>>()?;
    }
    let validity: Vec<RunValidity> = s
        .runs
        .iter()
        .map(|spec| run_validity(spec, s.convention))
        .collect();
    let included: Vec<&RunResult> = runs
        .iter()
        .zip(&validity)
        .filter(|(_, v)| v.valid)
        .map(|(r, _)| r)
        .collect();
    let average = average_runs(&included, s.design.as_ref(), &convention);
    Ok(Evaluation {
        convention,
        plane,
        average,
        runs,
        validity,
        wall_effects,
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

#[cfg(test)]
mod tests {
    use crate::checks::testkit::{assess_text, epa_csv, eval, survey, EPA_SURVEY};
    use crate::checks::Status;
    use crate::units::{parse_flow, FlowBasis};

    fn with_design(flow: &str) -> crate::evaluation::Evaluation {
        let s = survey(
            EPA_SURVEY,
            &["1"],
            &format!("[design]\nflow = \"{flow}\"\n"),
        );
        eval(&s, &[("run1.csv", epa_csv())])
    }

    /// Percent of design compares the measured flow on the basis the design's unit names
    /// (common practice: a dscfm design against dscfm, an acfm design against acfm).
    #[test]
    fn percent_of_design_is_on_the_designs_basis() {
        for (flow, basis) in [
            ("8000 acfm", FlowBasis::Actual),
            ("8000 cfm", FlowBasis::Actual),
            ("8000 wscfm", FlowBasis::Standard),
            ("8000 dscfm", FlowBasis::DryStandard),
            ("13000 dNm3/h", FlowBasis::NormalDry),
        ] {
            let e = with_design(flow);
            let avg = e.average.as_ref().unwrap();
            let (design, _) = parse_flow(flow).unwrap();
            let measured = match basis {
                FlowBasis::Actual => avg.actual_flow_m3_s,
                FlowBasis::Standard => avg.standard_flow_m3_s,
                FlowBasis::DryStandard => avg.dry_standard_flow_m3_s,
                // EPA English standard conditions 528 °R, 29.92 inHg to 273.15 K, 101.325 kPa
                _ => avg.dry_standard_flow_m3_s * crate::flow::design::normal_factor(&e.convention),
            };
            assert_eq!(avg.design_basis, Some(basis), "{flow}");
            let p = avg.percent_of_design.unwrap();
            assert!((p - 100.0 * measured / design).abs() < 1e-9, "{flow}: {p}");
            let run = &e.runs[0];
            assert!((run.percent_of_design.unwrap() - p).abs() < 1e-9, "{flow}");
        }
        // the same figure on two bases gives two answers: the stack gas is hot and wet
        let a = with_design("8000 acfm")
            .average
            .unwrap()
            .percent_of_design
            .unwrap();
        let d = with_design("8000 dscfm")
            .average
            .unwrap()
            .percent_of_design
            .unwrap();
        assert!(d < 0.8 * a, "{a} {d}");
    }

    /// `[reported]` figures are compared with the recomputed flow of their basis.
    #[test]
    fn reported_flows_compare_on_their_basis() {
        let e = eval(&survey(EPA_SURVEY, &["1"], ""), &[("run1.csv", epa_csv())]);
        let r = &e.runs[0];
        let dscfm = r.dry_standard_flow_m3_s * 60.0 / 0.028316846592;
        let acfm = r.actual_flow_m3_s * 60.0 / 0.028316846592;
        let extra =
            format!("[reported.run.1]\nflow = \"{dscfm:.0} dscfm\"\nacfm = \"{acfm:.0} cfm\"\n");
        let statuses = |extra: &str| -> Vec<Status> {
            let a = assess_text(
                &survey(EPA_SURVEY, &["1"], extra),
                &[("run1.csv", epa_csv())],
            );
            a.checks
                .iter()
                .filter(|f| f.id == "reported-values")
                .map(|f| f.status)
                .collect()
        };
        assert_eq!(statuses(&extra), [Status::Pass, Status::Pass]);
        // the dscfm figure under `flow` compared with the actual flow would have failed
        let extra = format!("[reported.run.1]\nflow = \"{dscfm:.0} acfm\"\n");
        assert_eq!(statuses(&extra), [Status::Fail]);
    }
}
