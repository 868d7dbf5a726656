//! One line of an uncertainty budget: a named input with its relative standard uncertainty,
//! sensitivity coefficient, degrees of freedom, evaluation type and basis.
//!
//! Owns the component type and the GUM evaluation recipes (Type A from a sample, Type B from a
//! rectangular bound or a certificate, ν from judged reliability). Must not combine components
//! (that is [`super::budget`]) nor know which inputs a flow test has (that is [`super::run`]).

use super::error::{finite, non_negative, positive, UncertaintyError};

/// How a component's standard uncertainty was evaluated (JCGM 100:2008 §4.2, §4.3).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum EvaluationKind {
    /// Statistical analysis of a series of observations (JCGM 100:2008 §4.2).
    TypeA,
    /// Any other means: specifications, certificates, judgement (JCGM 100:2008 §4.3).
    TypeB,
}

impl EvaluationKind {
    /// Stable short label for reports: `"A"` or `"B"`.
    pub const fn label(self) -> &'static str {
        match self {
            Self::TypeA => "A",
            Self::TypeB => "B",
        }
    }
}

/// A validated budget component. All uncertainties are *relative* (fractions: 0.01 = 1 %), and
/// the sensitivity is the relative one, ∂ln Q/∂ln x, so the contribution to the relative combined
/// uncertainty is |c|·u.
#[derive(Debug, Clone, PartialEq)]
pub struct Component {
    name: String,
    u_rel: f64,
    sensitivity: f64,
    dof: f64,
    kind: EvaluationKind,
    basis: String,
}

impl Component {
    /// A component from already-evaluated values.
    ///
    /// `u_rel` ≥ 0 and finite; `sensitivity` finite; `dof` > 0 (`f64::INFINITY` allowed).
    pub fn new(
        name: impl Into<String>,
        u_rel: f64,
        sensitivity: f64,
        dof: f64,
        kind: EvaluationKind,
        basis: impl Into<String>,
    ) -> Result<Self, UncertaintyError> {
        let name = name.into();
        non_negative(&format!("relative standard uncertainty of `{name}`"), u_rel)?;
        finite(&format!("sensitivity coefficient of `{name}`"), sensitivity)?;
        check_dof(&name, dof)?;
        Ok(Self {
            name,
            u_rel,
            sensitivity,
            dof,
            kind,
            basis: basis.into(),
        })
    }

    /// Type A from repeated observations of one quantity (JCGM 100:2008 §4.2.2–4.2.3, §G.3.3):
    /// the standard uncertainty of the mean u = s/√n with ν = n − 1, made relative to |x̄|.
    ///
    /// Needs at least two finite values and a non-zero mean.
    pub fn type_a_from_sample(
        name: impl Into<String>,
        values: &[f64],
        sensitivity: f64,
        basis: impl Into<String>,
    ) -> Result<Self, UncertaintyError> {
        let name = name.into();
        let summary = SampleSummary::of(&name, values)?;
        if summary.mean == 0.0 {
            return Err(UncertaintyError::OutOfRange {
                quantity: format!("mean of the values for `{name}`"),
                expected: "non-zero (the uncertainty is relative to it)",
                value: summary.mean,
            });
        }
        let n = summary.count as f64;
        let u_rel = summary.std_dev / n.sqrt() / summary.mean.abs();
        Self::new(
            name,
            u_rel,
            sensitivity,
            n - 1.0,
            EvaluationKind::TypeA,
            basis,
        )
    }

    /// Type B from a rectangular distribution of relative half-width `a` (JCGM 100:2008 §4.3.7):
    /// u = a/√3.
    pub fn type_b_rectangular(
        name: impl Into<String>,
        half_width_rel: f64,
        sensitivity: f64,
        dof: f64,
        basis: impl Into<String>,
    ) -> Result<Self, UncertaintyError> {
        let name = name.into();
        let a = non_negative(&format!("relative half-width of `{name}`"), half_width_rel)?;
        Self::new(
            name,
            rectangular_standard_uncertainty(a),
            sensitivity,
            dof,
            EvaluationKind::TypeB,
            basis,
        )
    }

    /// Type B from a certificate quoting an expanded uncertainty U with coverage factor k
    /// (JCGM 100:2008 §4.3.3): u = U/k.
    pub fn type_b_certificate(
        name: impl Into<String>,
        expanded_rel: f64,
        coverage_factor: f64,
        sensitivity: f64,
        dof: f64,
        basis: impl Into<String>,
    ) -> Result<Self, UncertaintyError> {
        let name = name.into();
        let big_u = non_negative(
            &format!("certificate expanded uncertainty of `{name}`"),
            expanded_rel,
        )?;
        let k = positive(
            &format!("certificate coverage factor of `{name}`"),
            coverage_factor,
        )?;
        Self::new(
            name,
            big_u / k,
            sensitivity,
            dof,
            EvaluationKind::TypeB,
            basis,
        )
    }

    /// The component's name, as printed in the budget.
    pub fn name(&self) -> &str {
        &self.name
    }

    /// Relative standard uncertainty of the input (fraction).
    pub fn u_rel(&self) -> f64 {
        self.u_rel
    }

    /// Relative sensitivity coefficient ∂ln Q/∂ln x.
    pub fn sensitivity(&self) -> f64 {
        self.sensitivity
    }

    /// Degrees of freedom (may be infinite).
    pub fn dof(&self) -> f64 {
        self.dof
    }

    /// Type A or Type B.
    pub fn kind(&self) -> EvaluationKind {
        self.kind
    }

    /// Free-text note on how the value was obtained.
    pub fn basis(&self) -> &str {
        &self.basis
    }

    /// Contribution to the relative combined uncertainty, |c·u| (fraction).
    pub fn contribution(&self) -> f64 {
        (self.sensitivity * self.u_rel).abs()
    }
}

/// Standard uncertainty of a rectangular distribution of half-width `a`: a/√3
/// (JCGM 100:2008 §4.3.7, eq. 7).
pub fn rectangular_standard_uncertainty(half_width: f64) -> f64 {
    half_width / 3.0_f64.sqrt()
}

/// Degrees of freedom of a Type B evaluation from the judged relative reliability Δu/u of the
/// standard uncertainty itself: ν ≈ ½ (Δu/u)⁻² (JCGM 100:2008 eq. G.3; 25 % gives 8).
/// A reliability of 0 (the value is taken as exactly known) gives ν = ∞.
pub fn dof_from_reliability(relative_reliability: f64) -> Result<f64, UncertaintyError> {
    let r = non_negative(
        "relative reliability of a standard uncertainty",
        relative_reliability,
    )?;
    if r == 0.0 {
        return Ok(f64::INFINITY);
    }
    Ok(0.5 / (r * r))
}

fn check_dof(name: &str, dof: f64) -> Result<(), UncertaintyError> {
    if dof.is_nan() || dof <= 0.0 {
        return Err(UncertaintyError::OutOfRange {
            quantity: format!("degrees of freedom of `{name}`"),
            expected: "greater than zero (infinity allowed)",
            value: dof,
        });
    }
    Ok(())
}

/// Count, mean and sample standard deviation (n − 1 divisor) of a finite series.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct SampleSummary {
    pub count: usize,
    pub mean: f64,
    pub std_dev: f64,
}

impl SampleSummary {
    /// Needs at least two values, all finite. Two passes (mean, then squared deviations) keep
    /// the variance accurate when the values are large and close together.
    pub fn of(quantity: &str, values: &[f64]) -> Result<Self, UncertaintyError> {
        if values.len() < 2 {
            return Err(UncertaintyError::TooFewValues {
                quantity: quantity.to_string(),
                needed: 2,
                found: values.len(),
            });
        }
        for (i, &v) in values.iter().enumerate() {
            if !v.is_finite() {
                return Err(UncertaintyError::BadValueInSeries {
                    quantity: quantity.to_string(),
                    position: i + 1,
                    expected: "a finite number",
                    value: v,
                });
            }
        }
        let n = values.len() as f64;
        let mean = values.iter().sum::<f64>() / n;
        let ss: f64 = values.iter().map(|v| (v - mean) * (v - mean)).sum();
        Ok(Self {
            count: values.len(),
            mean,
            std_dev: (ss / (n - 1.0)).sqrt(),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Tolerance for values derived by hand from exact arithmetic.
    const REL_TOL_DERIVED: f64 = 1e-12;

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= REL_TOL_DERIVED * b.abs().max(1.0)
    }

    #[test]
    fn type_a_is_standard_error_of_the_mean() {
        // Derived by hand: values 9, 10, 11 → mean 10, s = 1, u = 1/√3, relative 1/(10√3), ν = 2.
        let c = Component::type_a_from_sample("x", &[9.0, 10.0, 11.0], 1.0, "test").expect("valid");
        assert!(close(c.u_rel(), 1.0 / (10.0 * 3.0_f64.sqrt())));
        assert_eq!(c.dof(), 2.0);
        assert_eq!(c.kind(), EvaluationKind::TypeA);
    }

    #[test]
    fn type_a_rejects_short_or_bad_samples() {
        assert!(matches!(
            Component::type_a_from_sample("x", &[1.0], 1.0, ""),
            Err(UncertaintyError::TooFewValues { found: 1, .. })
        ));
        assert!(matches!(
            Component::type_a_from_sample("x", &[1.0, f64::NAN], 1.0, ""),
            Err(UncertaintyError::BadValueInSeries { position: 2, .. })
        ));
        assert!(Component::type_a_from_sample("x", &[-1.0, 1.0], 1.0, "").is_err());
    }

    #[test]
    fn type_b_rectangular_divides_by_root_three() {
        // JCGM 100:2008 §4.3.7: u = a/√3; a = 0.03 → 0.017320508...
        let c =
            Component::type_b_rectangular("x", 0.03, 0.5, f64::INFINITY, "spec").expect("valid");
        assert!(close(c.u_rel(), 0.03 / 3.0_f64.sqrt()));
        assert!(close(c.contribution(), 0.015 / 3.0_f64.sqrt()));
        assert_eq!(c.kind(), EvaluationKind::TypeB);
    }

    #[test]
    fn type_b_certificate_divides_by_k() {
        // JCGM 100:2008 §4.3.3: U = 2 %, k = 2 → u = 1 %.
        let c = Component::type_b_certificate("x", 0.02, 2.0, 1.0, f64::INFINITY, "cert")
            .expect("valid");
        assert!(close(c.u_rel(), 0.01));
        assert!(Component::type_b_certificate("x", 0.02, 0.0, 1.0, 8.0, "").is_err());
    }

    #[test]
    fn reliability_25_percent_gives_8_dof() {
        // JCGM 100:2008 §G.4.2 example: Δu/u = 0.25 → ν = 8 (also calculations.md §5).
        assert!(close(dof_from_reliability(0.25).expect("valid"), 8.0));
        assert_eq!(dof_from_reliability(0.0).expect("valid"), f64::INFINITY);
        assert!(dof_from_reliability(-0.1).is_err());
    }

    #[test]
    fn constructor_rejects_invalid_values() {
        let k = EvaluationKind::TypeB;
        assert!(Component::new("x", -0.01, 1.0, 5.0, k, "").is_err());
        assert!(Component::new("x", f64::NAN, 1.0, 5.0, k, "").is_err());
        assert!(Component::new("x", 0.01, f64::INFINITY, 5.0, k, "").is_err());
        assert!(Component::new("x", 0.01, 1.0, 0.0, k, "").is_err());
        assert!(Component::new("x", 0.01, 1.0, f64::NAN, k, "").is_err());
        assert!(Component::new("x", 0.01, 1.0, f64::INFINITY, k, "").is_ok());
    }
}
