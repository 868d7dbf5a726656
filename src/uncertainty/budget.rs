//! The combined budget: root-sum-square combination, Welch–Satterthwaite effective degrees of
//! freedom, coverage factor and expanded uncertainty.
//!
//! Owns the arithmetic of JCGM 100:2008 §5.1.2 (uncorrelated inputs), §G.4 and §6. Must not
//! choose components; callers (or [`super::run`], [`super::average`]) supply them.

use super::component::Component;
use super::coverage::t_975;
use super::error::UncertaintyError;

/// A set of uncorrelated components and the results derived from them. All values are relative
/// (fractions). Results are computed once, on construction.
#[derive(Debug, Clone, PartialEq)]
pub struct Budget {
    components: Vec<Component>,
    combined_rel: f64,
    effective_dof: f64,
    coverage_factor: f64,
    expanded_rel: f64,
}

impl Budget {
    /// Combines `components` (at least one).
    ///
    /// * u_c = √Σ(c_i·u_i)² (JCGM 100:2008 eq. 10, relative form of eq. 12 for a product model);
    /// * ν_eff = u_c⁴ / Σ (c_i·u_i)⁴/ν_i (JCGM 100:2008 eq. G.2b); components with ν = ∞ add
    ///   nothing to the denominator; when it is zero (all ν infinite, or u_c = 0) ν_eff = ∞;
    /// * k = t_0.975(ν_eff) (JCGM 100:2008 §G.4.1), U = k·u_c (§6.2.1).
    pub fn new(components: Vec<Component>) -> Result<Self, UncertaintyError> {
        if components.is_empty() {
            return Err(UncertaintyError::EmptyBudget);
        }
        let combined_rel = components
            .iter()
            .map(|c| c.contribution() * c.contribution())
            .sum::<f64>()
            .sqrt();
        let effective_dof = welch_satterthwaite(&components, combined_rel);
        let coverage_factor = t_975(effective_dof)?;
        Ok(Self {
            components,
            combined_rel,
            effective_dof,
            coverage_factor,
            expanded_rel: coverage_factor * combined_rel,
        })
    }

    /// A new budget with `component` appended.
    pub fn with_component(&self, component: Component) -> Result<Self, UncertaintyError> {
        let mut components = self.components.clone();
        components.push(component);
        Self::new(components)
    }

    /// The components, in the order given.
    pub fn components(&self) -> &[Component] {
        &self.components
    }

    /// The first component with this name, if any.
    pub fn component(&self, name: &str) -> Option<&Component> {
        self.components.iter().find(|c| c.name() == name)
    }

    /// Relative combined standard uncertainty u_c (fraction).
    pub fn combined_rel(&self) -> f64 {
        self.combined_rel
    }

    /// Welch–Satterthwaite effective degrees of freedom (may be infinite).
    pub fn effective_dof(&self) -> f64 {
        self.effective_dof
    }

    /// Coverage factor k = t_0.975(ν_eff).
    pub fn coverage_factor(&self) -> f64 {
        self.coverage_factor
    }

    /// Relative expanded uncertainty U = k·u_c at about 95 % coverage (fraction).
    pub fn expanded_rel(&self) -> f64 {
        self.expanded_rel
    }
}

/// ν_eff computed on contributions scaled by u_c, so the fourth powers neither underflow nor
/// overflow for any realistic magnitude.
fn welch_satterthwaite(components: &[Component], combined_rel: f64) -> f64 {
    if combined_rel == 0.0 {
        return f64::INFINITY;
    }
    let denominator: f64 = components
        .iter()
        .filter(|c| c.dof().is_finite())
        .map(|c| (c.contribution() / combined_rel).powi(4) / c.dof())
        .sum();
    if denominator == 0.0 {
        f64::INFINITY
    } else {
        1.0 / denominator
    }
}

#[cfg(test)]
mod tests {
    use super::super::component::EvaluationKind;
    use super::*;
    use proptest::prelude::*;

    /// calculations.md §5 prints u_c to 5 significant figures.
    const ABS_TOL_UC_PRINTED: f64 = 0.00005e-2;
    /// ν_eff printed to 2 decimals.
    const ABS_TOL_DOF_PRINTED: f64 = 0.005;
    /// k printed to 3 decimals.
    const ABS_TOL_K_PRINTED: f64 = 0.0005;
    /// U printed to 2 decimals of a percent.
    const ABS_TOL_U_PRINTED: f64 = 0.005e-2;
    /// Slack for floating-point rounding in the property tests.
    const REL_TOL_ROUNDING: f64 = 1e-9;

    fn comp(u_rel: f64, dof: f64) -> Component {
        Component::new("x", u_rel, 1.0, dof, EvaluationKind::TypeB, "test").expect("valid")
    }

    #[test]
    fn worked_welch_satterthwaite_example() {
        // calculations.md §5 [D], derived from JCGM 100:2008 eq. 10 and G.2b:
        // 1.0 % (ν 4), 0.8 % (ν 10), 0.5 % (ν ∞) → u_c 1.3748 %, ν_eff 12.28, k 2.173, U 2.99 %.
        let b = Budget::new(vec![
            comp(0.010, 4.0),
            comp(0.008, 10.0),
            comp(0.005, f64::INFINITY),
        ])
        .expect("valid");
        assert!((b.combined_rel() - 0.013748).abs() <= ABS_TOL_UC_PRINTED);
        assert!((b.effective_dof() - 12.28).abs() <= ABS_TOL_DOF_PRINTED);
        assert!((b.coverage_factor() - 2.173).abs() <= ABS_TOL_K_PRINTED);
        assert!((b.expanded_rel() - 0.0299).abs() <= ABS_TOL_U_PRINTED);
    }

    #[test]
    fn all_infinite_dof_uses_the_normal_quantile() {
        // JCGM 100:2008 Table G.2, ν = ∞: 1.960 (1.959964 to 6 decimals).
        let b =
            Budget::new(vec![comp(0.01, f64::INFINITY), comp(0.02, f64::INFINITY)]).expect("valid");
        assert_eq!(b.effective_dof(), f64::INFINITY);
        assert!((b.coverage_factor() - 1.959964).abs() <= 1e-6);
    }

    #[test]
    fn zero_budget_has_zero_expanded_uncertainty() {
        let b = Budget::new(vec![comp(0.0, 3.0)]).expect("valid");
        assert_eq!(b.combined_rel(), 0.0);
        assert_eq!(b.expanded_rel(), 0.0);
        assert_eq!(b.effective_dof(), f64::INFINITY);
    }

    #[test]
    fn sensitivity_scales_the_contribution() {
        // Derived: c = −½, u = 2 % → contribution 1 %; the sign does not matter.
        let c = Component::new("rho", 0.02, -0.5, f64::INFINITY, EvaluationKind::TypeB, "")
            .expect("valid");
        let b = Budget::new(vec![c]).expect("valid");
        assert!((b.combined_rel() - 0.01).abs() <= 1e-15);
    }

    #[test]
    fn empty_budget_is_rejected() {
        assert_eq!(Budget::new(vec![]), Err(UncertaintyError::EmptyBudget));
    }

    fn component_strategy() -> impl Strategy<Value = Component> {
        (1e-5f64..0.2, -2.0f64..2.0, 1.0f64..200.0)
            .prop_filter("non-zero sensitivity", |(_, c, _)| c.abs() > 1e-3)
            .prop_map(|(u, c, nu)| {
                Component::new("p", u, c, nu, EvaluationKind::TypeA, "").expect("valid")
            })
    }

    proptest! {
        #[test]
        fn adding_a_component_never_lowers_uc(
            parts in prop::collection::vec(component_strategy(), 1..8),
            extra in component_strategy(),
        ) {
            let before = Budget::new(parts.clone()).expect("valid");
            let after = before.with_component(extra).expect("valid");
            prop_assert!(after.combined_rel() >= before.combined_rel());
        }

        #[test]
        fn effective_dof_between_min_and_sum(parts in prop::collection::vec(component_strategy(), 1..8)) {
            let b = Budget::new(parts.clone()).expect("valid");
            let min = parts.iter().map(Component::dof).fold(f64::INFINITY, f64::min);
            let sum: f64 = parts.iter().map(Component::dof).sum();
            prop_assert!(b.effective_dof() >= min * (1.0 - REL_TOL_ROUNDING));
            prop_assert!(b.effective_dof() <= sum * (1.0 + REL_TOL_ROUNDING));
        }

        #[test]
        fn expanded_is_at_least_normal_multiple(parts in prop::collection::vec(component_strategy(), 1..8)) {
            // t_0.975(ν) ≥ z_0.975 for every finite ν, so U ≥ 1.96·u_c.
            let b = Budget::new(parts).expect("valid");
            prop_assert!(b.expanded_rel() >= 1.959_96 * b.combined_rel());
        }
    }
}
