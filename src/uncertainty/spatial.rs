//! The spatial-integration term: how well a finite set of points represents the plane mean.
//!
//! Owns the three options of calculations.md §5 \[D\] and their stable names, so the report can
//! print which one was used. Must not pick the option for the user.

use super::component::Component;
use super::error::{positive, UncertaintyError};
use super::sensitivity::FlowInput;

/// Name of the spatial-integration component in every budget.
pub const SPATIAL_COMPONENT: &str = "spatial integration";

/// How the spatial-integration uncertainty is evaluated.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SpatialMethod {
    /// Scatter of the point velocities, s_v/(√n·v̄), ν = n − 1 (Type A). Conservative: it treats
    /// the true profile's variation as if it were random error.
    Scatter,
    /// Half the difference of the means of two independent traverse lines, ν = 1 (Type A);
    /// for m > 2 lines the standard error of the line means, ν = m − 1, which reduces to the
    /// half-difference when m = 2.
    LineHalfDifference,
    /// A judged bound on the integration-model bias, rectangular, Type B.
    ModelBias,
}

impl SpatialMethod {
    /// All options, in the order they are documented.
    pub const ALL: [SpatialMethod; 3] = [Self::Scatter, Self::LineHalfDifference, Self::ModelBias];

    /// Stable identifier (part of the report and JSON; do not change).
    pub const fn name(self) -> &'static str {
        match self {
            Self::Scatter => "point-scatter",
            Self::LineHalfDifference => "line-half-difference",
            Self::ModelBias => "model-bias",
        }
    }

    /// The option with this stable name.
    pub fn from_name(name: &str) -> Option<Self> {
        Self::ALL.into_iter().find(|m| m.name() == name)
    }
}

/// Scatter of the point velocities (m/s): u = s_v/(√n·v̄), ν = n − 1 (calculations.md §5 \[D\]).
pub fn spatial_scatter(point_velocities_m_s: &[f64]) -> Result<Component, UncertaintyError> {
    positive_mean("point velocities", point_velocities_m_s)?;
    Component::type_a_from_sample(
        SPATIAL_COMPONENT,
        point_velocities_m_s,
        FlowInput::MeanVelocity.relative_sensitivity(),
        format!(
            "{}: s_v/(√n·v̄) over {} point velocities, ν = n − 1",
            SpatialMethod::Scatter.name(),
            point_velocities_m_s.len()
        ),
    )
}

/// Means of independent traverse lines (m/s): half-difference for two lines, ν = 1
/// (calculations.md §5 \[D\]); standard error of the line means for more.
pub fn spatial_line_half_difference(line_means_m_s: &[f64]) -> Result<Component, UncertaintyError> {
    positive_mean("line mean velocities", line_means_m_s)?;
    let basis = if line_means_m_s.len() == 2 {
        format!(
            "{}: |v̄₁ − v̄₂|/2 of two independent lines, ν = 1",
            SpatialMethod::LineHalfDifference.name()
        )
    } else {
        format!(
            "{}: s/√m of {} independent line means, ν = m − 1",
            SpatialMethod::LineHalfDifference.name(),
            line_means_m_s.len()
        )
    };
    Component::type_a_from_sample(
        SPATIAL_COMPONENT,
        line_means_m_s,
        FlowInput::MeanVelocity.relative_sensitivity(),
        basis,
    )
}

/// Judged bound ±a (fraction of the mean) on the integration-model bias, rectangular, u = a/√3,
/// ν = ∞ (bound taken as reliable, JCGM 100:2008 §G.4.2; common practice).
pub fn spatial_model_bias(half_width_fraction: f64) -> Result<Component, UncertaintyError> {
    Component::type_b_rectangular(
        SPATIAL_COMPONENT,
        half_width_fraction,
        FlowInput::MeanVelocity.relative_sensitivity(),
        f64::INFINITY,
        format!(
            "{}: rectangular ±{:.3} % judged bound, ν = ∞",
            SpatialMethod::ModelBias.name(),
            half_width_fraction * 100.0
        ),
    )
}

/// Velocities are magnitudes: each must be finite and the mean must be positive.
fn positive_mean(quantity: &str, values: &[f64]) -> Result<(), UncertaintyError> {
    if values.is_empty() {
        return Err(UncertaintyError::TooFewValues {
            quantity: quantity.to_string(),
            needed: 2,
            found: 0,
        });
    }
    let mean = values.iter().sum::<f64>() / values.len() as f64;
    if mean.is_finite() {
        positive(&format!("mean of the {quantity}"), mean)?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::super::component::EvaluationKind;
    use super::*;

    /// Values derived by hand from exact arithmetic.
    const REL_TOL_DERIVED: f64 = 1e-12;

    #[test]
    fn names_are_stable_and_round_trip() {
        assert_eq!(SpatialMethod::Scatter.name(), "point-scatter");
        assert_eq!(
            SpatialMethod::LineHalfDifference.name(),
            "line-half-difference"
        );
        assert_eq!(SpatialMethod::ModelBias.name(), "model-bias");
        for m in SpatialMethod::ALL {
            assert_eq!(SpatialMethod::from_name(m.name()), Some(m));
        }
        assert_eq!(SpatialMethod::from_name("nonsense"), None);
    }

    #[test]
    fn scatter_is_standard_error_over_mean() {
        // Derived by hand: 10, 12, 14 m/s → v̄ 12, s 2, u = 2/(√3·12), ν 2.
        let c = spatial_scatter(&[10.0, 12.0, 14.0]).expect("valid");
        assert!((c.u_rel() - 2.0 / (3.0_f64.sqrt() * 12.0)).abs() <= REL_TOL_DERIVED);
        assert_eq!(c.dof(), 2.0);
        assert!(c.basis().starts_with("point-scatter"));
    }

    #[test]
    fn two_lines_give_the_half_difference_with_one_dof() {
        // Derived by hand: lines 15.0 and 15.6 m/s → |Δ|/2 = 0.3, mean 15.3, u = 0.3/15.3, ν 1.
        let c = spatial_line_half_difference(&[15.0, 15.6]).expect("valid");
        assert!((c.u_rel() - 0.3 / 15.3).abs() <= REL_TOL_DERIVED);
        assert_eq!(c.dof(), 1.0);
        assert_eq!(c.kind(), EvaluationKind::TypeA);
    }

    #[test]
    fn model_bias_is_rectangular_type_b() {
        // JCGM 100:2008 §4.3.7: ±2 % → 2 %/√3.
        let c = spatial_model_bias(0.02).expect("valid");
        assert!((c.u_rel() - 0.02 / 3.0_f64.sqrt()).abs() <= REL_TOL_DERIVED);
        assert_eq!(c.dof(), f64::INFINITY);
        assert_eq!(c.kind(), EvaluationKind::TypeB);
    }

    #[test]
    fn rejects_unusable_series() {
        assert!(spatial_scatter(&[]).is_err());
        assert!(spatial_scatter(&[5.0]).is_err());
        assert!(spatial_scatter(&[-5.0, 4.0]).is_err());
        assert!(spatial_line_half_difference(&[12.0]).is_err());
        assert!(spatial_model_bias(-0.01).is_err());
    }
}
