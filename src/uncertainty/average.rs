//! The budget of a result averaged over several runs.
//!
//! Owns how per-run budgets and the run-to-run scatter combine. Must not average the results
//! themselves; the caller passes them.
//!
//! Choice (common practice, conservative): every per-run component is treated as fully
//! correlated between runs, so averaging does not reduce it, and for each component name the
//! largest contribution over the runs is kept. The scatter of the run results is added as a
//! Type A component, s/(√N·x̄) with ν = N − 1 (JCGM 100:2008 §4.2.3). The random parts of the
//! per-run terms (spatial, resolution) are then counted twice, once in themselves and once in the
//! scatter, which errs on the safe side.

use super::budget::Budget;
use super::component::Component;
use super::error::UncertaintyError;
use super::sensitivity::FlowInput;

/// Name of the run-to-run component (stable; printed in the report).
pub const RUN_TO_RUN_COMPONENT: &str = "run-to-run variation";

/// Budget of the mean of `run_results` (one per run, any one unit: only ratios matter) whose
/// per-run budgets are `run_budgets` (same order). Needs at least two runs.
pub fn build_average_budget(
    run_budgets: &[Budget],
    run_results: &[f64],
) -> Result<Budget, UncertaintyError> {
    if run_budgets.len() != run_results.len() {
        return Err(UncertaintyError::LengthMismatch {
            quantity: "run budgets and run results".to_string(),
            expected: run_budgets.len(),
            found: run_results.len(),
        });
    }
    let mut kept: Vec<Component> = Vec::new();
    for component in run_budgets.iter().flat_map(Budget::components) {
        match kept.iter_mut().find(|k| k.name() == component.name()) {
            Some(k) if component.contribution() > k.contribution() => *k = component.clone(),
            Some(_) => {}
            None => kept.push(component.clone()),
        }
    }
    kept.push(Component::type_a_from_sample(
        RUN_TO_RUN_COMPONENT,
        run_results,
        FlowInput::MeanVelocity.relative_sensitivity(),
        format!("s/(√N·x̄) over {} runs, ν = N − 1", run_results.len()),
    )?);
    Budget::new(kept)
}

#[cfg(test)]
mod tests {
    use super::super::component::EvaluationKind;
    use super::*;

    /// Values derived by hand from exact arithmetic.
    const REL_TOL_DERIVED: f64 = 1e-12;

    fn budget(parts: &[(&str, f64)]) -> Budget {
        Budget::new(
            parts
                .iter()
                .map(|(n, u)| {
                    Component::new(*n, *u, 1.0, f64::INFINITY, EvaluationKind::TypeB, "")
                        .expect("valid")
                })
                .collect(),
        )
        .expect("valid")
    }

    #[test]
    fn keeps_the_largest_of_each_component_and_adds_run_to_run() {
        let runs = [
            budget(&[("pitot coefficient", 0.010), ("spatial integration", 0.004)]),
            budget(&[("pitot coefficient", 0.010), ("spatial integration", 0.006)]),
            budget(&[("pitot coefficient", 0.010), ("spatial integration", 0.005)]),
        ];
        // Derived by hand: results 99, 100, 101 → s 1, /√3, /100; ν 2.
        let avg = build_average_budget(&runs, &[99.0, 100.0, 101.0]).expect("valid");
        assert_eq!(avg.components().len(), 3);
        let spatial = avg.component("spatial integration").map(Component::u_rel);
        assert_eq!(spatial, Some(0.006));
        let r2r = avg.component(RUN_TO_RUN_COMPONENT).expect("present");
        assert!((r2r.u_rel() - 1.0 / 3.0_f64.sqrt() / 100.0).abs() <= REL_TOL_DERIVED);
        assert_eq!(r2r.dof(), 2.0);
        assert_eq!(r2r.kind(), EvaluationKind::TypeA);
        // Never below the worst single run.
        assert!(runs.iter().all(|b| avg.combined_rel() >= b.combined_rel()));
    }

    #[test]
    fn needs_matching_lengths_and_two_runs() {
        let one = budget(&[("pitot coefficient", 0.01)]);
        assert!(matches!(
            build_average_budget(std::slice::from_ref(&one), &[1.0, 2.0]),
            Err(UncertaintyError::LengthMismatch { .. })
        ));
        assert!(matches!(
            build_average_budget(&[one], &[1.0]),
            Err(UncertaintyError::TooFewValues { .. })
        ));
    }
}
