//! Coverage factor for a 95 % coverage interval: the two-sided Student's t quantile t_0.975(ν).
//!
//! Owns the t quantile used by the budget (JCGM 100:2008 §G.3–G.4, Table G.2) and re-used by the
//! RATA confidence coefficient. Must not decide which ν applies; callers pass it.

use statrs::distribution::{ContinuousCDF, StudentsT};

use super::error::UncertaintyError;

/// Coverage probability of the expanded uncertainty. EN ISO 16911-1 requires the expanded
/// uncertainty at 95 % (calculations.md §5); JCGM 100:2008 §6.2–6.3 and Annex G.
pub const COVERAGE_PROBABILITY: f64 = 0.95;

/// Upper quantile that gives a two-sided interval of [`COVERAGE_PROBABILITY`].
const UPPER_QUANTILE: f64 = 0.5 + COVERAGE_PROBABILITY / 2.0;

/// Standard normal 0.975 quantile, used for ν = ∞. JCGM 100:2008 Table G.2 prints 1.960;
/// this is the value to double precision (well-known constant, Φ⁻¹(0.975)).
pub const NORMAL_QUANTILE_975: f64 = 1.959_963_984_540_054;

/// Above this ν the quantile comes from the asymptotic expansion in 1/ν instead of statrs'
/// incomplete-beta inversion, which loses accuracy for large ν (measured with statrs 0.18:
/// error 7e-6 at ν = 1e5, 0.13 at ν = 1e7). At ν = 1000 statrs and the expansion agree to 1e-8
/// and the expansion's first omitted term is below 1e-13.
const EXPANSION_FROM_DOF: f64 = 1000.0;

/// t_0.975(ν): the coverage factor for a 95 % two-sided interval with ν degrees of freedom.
///
/// ν may be fractional (Welch–Satterthwaite gives fractional ν; JCGM 100:2008 G.4.1 allows
/// interpolation, the continuous t distribution is used here) and may be `f64::INFINITY`.
pub fn t_975(dof: f64) -> Result<f64, UncertaintyError> {
    if dof.is_nan() || dof <= 0.0 {
        return Err(UncertaintyError::OutOfRange {
            quantity: "degrees of freedom".to_string(),
            expected: "greater than zero (infinity allowed)",
            value: dof,
        });
    }
    if dof == f64::INFINITY {
        return Ok(NORMAL_QUANTILE_975);
    }
    if dof > EXPANSION_FROM_DOF {
        return Ok(t_quantile_expansion(NORMAL_QUANTILE_975, dof));
    }
    let t = StudentsT::new(0.0, 1.0, dof).map_err(|_| UncertaintyError::OutOfRange {
        quantity: "degrees of freedom".to_string(),
        expected: "greater than zero (infinity allowed)",
        value: dof,
    })?;
    Ok(t.inverse_cdf(UPPER_QUANTILE))
}

/// Student's t quantile from the normal quantile `z`, expanded in 1/ν (Abramowitz & Stegun,
/// Handbook of Mathematical Functions, 1964, eq. 26.7.5; Cornish–Fisher type), four terms.
fn t_quantile_expansion(z: f64, dof: f64) -> f64 {
    let z2 = z * z;
    let g1 = (z2 + 1.0) * z / 4.0;
    let g2 = ((5.0 * z2 + 16.0) * z2 + 3.0) * z / 96.0;
    let g3 = (((3.0 * z2 + 19.0) * z2 + 17.0) * z2 - 15.0) * z / 384.0;
    let g4 = ((((79.0 * z2 + 776.0) * z2 + 1482.0) * z2 - 1920.0) * z2 - 945.0) * z / 92160.0;
    let r = 1.0 / dof;
    z + r * (g1 + r * (g2 + r * (g3 + r * g4)))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// NIST TN 1297 Table B.1 prints three decimals, so agreement is to half a unit in the last place.
    const ABS_TOL_TABLE_3DP: f64 = 0.0005;
    /// Agreement with a high-precision reference value.
    const ABS_TOL_PRECISE: f64 = 1e-6;

    #[test]
    fn matches_nist_tn_1297_table_b1() {
        // NIST Technical Note 1297 (1994 edition), Table B.1, column p = 95 %, transcribed.
        let table = [
            (1.0, 12.706),
            (2.0, 4.303),
            (5.0, 2.571),
            (8.0, 2.306),
            (10.0, 2.228),
            (20.0, 2.086),
            (30.0, 2.042),
            (f64::INFINITY, 1.960),
        ];
        for (dof, expected) in table {
            let t = t_975(dof).expect("valid dof");
            assert!(
                (t - expected).abs() <= ABS_TOL_TABLE_3DP,
                "t_0.975({dof}) = {t}, table {expected}"
            );
        }
    }

    #[test]
    fn infinite_dof_is_the_normal_quantile() {
        // Φ⁻¹(0.975) = 1.959963984540054 (standard normal, well-known constant).
        let t = t_975(f64::INFINITY).expect("valid dof");
        assert!((t - 1.959_964).abs() <= ABS_TOL_PRECISE);
    }

    #[test]
    fn large_finite_dof_joins_the_normal_smoothly() {
        // Derived: t − z ≈ (z³ + z)/(4ν) (A&S 26.7.5 first term), 2.37e-6 at ν = 1e6.
        let t = t_975(1.0e6).expect("valid dof");
        let first_term = (NORMAL_QUANTILE_975.powi(3) + NORMAL_QUANTILE_975) / 4.0e6;
        assert!((t - NORMAL_QUANTILE_975 - first_term).abs() <= 1e-11);
        // Decreasing in ν on both sides of the switch to the expansion.
        let nus = [
            200.0,
            999.0,
            1000.0,
            1000.001,
            1001.0,
            1e4,
            1e5,
            1e9,
            f64::INFINITY,
        ];
        let ts: Vec<f64> = nus.iter().map(|&n| t_975(n).expect("valid")).collect();
        assert!(ts.windows(2).all(|w| w[0] >= w[1]), "{ts:?}");
    }

    #[test]
    fn expansion_agrees_with_statrs_at_the_switch() {
        // Two independent evaluations of t_0.975(1000): statrs' beta inversion and A&S 26.7.5.
        let exact = StudentsT::new(0.0, 1.0, EXPANSION_FROM_DOF)
            .expect("valid")
            .inverse_cdf(UPPER_QUANTILE);
        let series = t_quantile_expansion(NORMAL_QUANTILE_975, EXPANSION_FROM_DOF);
        assert!((exact - series).abs() <= 1e-8, "{exact} vs {series}");
        // Far below the switch the expansion is still close: ν = 100, statrs 1.983971519.
        let exact_100 = StudentsT::new(0.0, 1.0, 100.0)
            .expect("valid")
            .inverse_cdf(UPPER_QUANTILE);
        assert!((t_quantile_expansion(NORMAL_QUANTILE_975, 100.0) - exact_100).abs() <= 1e-6);
    }

    #[test]
    fn fractional_dof_lies_between_neighbours() {
        // ν_eff = 12.28 must fall between t(12) and t(13) (NIST TN 1297 B.1 does not list 12.28).
        let lo = t_975(13.0).expect("valid");
        let hi = t_975(12.0).expect("valid");
        let t = t_975(12.28).expect("valid");
        assert!(lo < t && t < hi, "{lo} < {t} < {hi}");
    }

    #[test]
    fn rejects_non_positive_and_nan_dof() {
        assert!(t_975(0.0).is_err());
        assert!(t_975(-3.0).is_err());
        assert!(t_975(f64::NAN).is_err());
    }
}
