//! Relative sensitivity coefficients of the flow model.
//!
//! Owns the model `Q = A·C·sqrt(2Δp/ρ)·F` with `ρ = p·M/(R·T)` and the coefficients
//! ∂ln Q/∂ln x of each input (calculations.md §5 \[P\]; JCGM 100:2008 §5.1.6 for a product of
//! powers, where the relative sensitivity is the exponent). Must not hold magnitudes.

/// The flow model the coefficients belong to, for printing beside the budget.
pub const FLOW_MODEL: &str = "Q = A·C·sqrt(2·Δp/ρ)·F, ρ = p·M/(R·T)";

/// Inputs of the flow model.
///
/// The coefficients are those of the *actual* volumetric flow. A reference-condition flow
/// `Q·(T_ref/T)·(p/p_ref)` flips the signs of the T and p coefficients (+½ − 1 = −½, −½ + 1 = +½)
/// but not their magnitudes, so the combined uncertainty is the same; a dry-basis factor
/// (1 − Bws) is not in the model and needs its own component.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FlowInput {
    /// Plane area A (exponent 1).
    Area,
    /// Pitot coefficient C (exponent 1).
    PitotCoefficient,
    /// Velocity pressure Δp (exponent ½).
    DifferentialPressure,
    /// Gas density ρ (exponent −½).
    Density,
    /// Absolute gas temperature T, through ρ ∝ 1/T (exponent +½).
    Temperature,
    /// Absolute gas pressure p, through ρ ∝ p (exponent −½).
    AbsolutePressure,
    /// Molar mass of the wet gas M (composition and moisture), through ρ ∝ M (exponent −½) \[D\].
    MolarMass,
    /// A multiplicative factor F such as the wall-effects adjustment (exponent 1).
    Factor,
    /// Inside diameter D of a round duct, through A = πD²/4 (exponent 2) \[D\].
    RoundDiameter,
    /// One side (width or height) of a rectangular duct, through A = W·H (exponent 1) \[D\].
    RectangularSide,
    /// The mean velocity as a whole (spatial integration, positioning, temporal terms) (exponent 1).
    MeanVelocity,
}

impl FlowInput {
    /// ∂ln Q/∂ln x.
    pub const fn relative_sensitivity(self) -> f64 {
        match self {
            Self::Area
            | Self::PitotCoefficient
            | Self::Factor
            | Self::RectangularSide
            | Self::MeanVelocity => 1.0,
            Self::DifferentialPressure | Self::Temperature => 0.5,
            Self::Density | Self::AbsolutePressure | Self::MolarMass => -0.5,
            Self::RoundDiameter => 2.0,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The exponents are exact.
    const ABS_TOL_EXACT: f64 = 0.0;

    #[test]
    fn coefficients_match_the_model() {
        // calculations.md §5 [P]: A 1, C 1, Δp ½, ρ −½, T +½, p −½, F 1.
        let expected = [
            (FlowInput::Area, 1.0),
            (FlowInput::PitotCoefficient, 1.0),
            (FlowInput::DifferentialPressure, 0.5),
            (FlowInput::Density, -0.5),
            (FlowInput::Temperature, 0.5),
            (FlowInput::AbsolutePressure, -0.5),
            (FlowInput::Factor, 1.0),
        ];
        for (input, c) in expected {
            assert!(
                (input.relative_sensitivity() - c).abs() <= ABS_TOL_EXACT,
                "{input:?}"
            );
        }
    }

    #[test]
    fn derived_coefficients_follow_from_the_exponents() {
        // Derived: ρ = pM/(RT) → M enters like ρ; A = πD²/4 → D exponent 2; A = W·H → 1 each.
        assert_eq!(
            FlowInput::MolarMass.relative_sensitivity(),
            FlowInput::Density.relative_sensitivity()
        );
        assert_eq!(
            FlowInput::RoundDiameter.relative_sensitivity(),
            2.0 * FlowInput::Area.relative_sensitivity()
        );
        assert_eq!(FlowInput::RectangularSide.relative_sensitivity(), 1.0);
    }

    #[test]
    fn numerical_derivative_agrees() {
        // Derived: central difference of ln Q on the model, ±1e-6 relative steps.
        const ABS_TOL_NUMERIC: f64 = 1e-6;
        let q = |a: f64, c: f64, dp: f64, p: f64, m: f64, t: f64, f: f64| {
            let rho = p * m / (8.314462618 * t);
            a * c * (2.0 * dp / rho).sqrt() * f
        };
        let base = [1.7, 0.84, 150.0, 100_000.0, 0.0288, 420.0, 0.995];
        let inputs = [
            FlowInput::Area,
            FlowInput::PitotCoefficient,
            FlowInput::DifferentialPressure,
            FlowInput::AbsolutePressure,
            FlowInput::MolarMass,
            FlowInput::Temperature,
            FlowInput::Factor,
        ];
        let h = 1e-6;
        for (i, input) in inputs.iter().enumerate() {
            let mut up = base;
            let mut dn = base;
            up[i] *= 1.0 + h;
            dn[i] *= 1.0 - h;
            let eval = |x: [f64; 7]| q(x[0], x[1], x[2], x[3], x[4], x[5], x[6]).ln();
            let d = (eval(up) - eval(dn)) / ((1.0 + h).ln() - (1.0 - h).ln());
            assert!(
                (d - input.relative_sensitivity()).abs() <= ABS_TOL_NUMERIC,
                "{input:?}: {d}"
            );
        }
    }
}
