//! Type S pitot tube calibration against a standard pitot tube (EPA Method 2 §10.1;
//! calculations.md §6).
//!
//! Owns the per-reading coefficient, the per-leg mean and deviation, and the acceptance limits as
//! data. Pure computation: never reads files or prints; the `calibrate` command formats the
//! result.

use std::fmt;

/// Coefficient assigned to the standard pitot tube when its own calibration is not known
/// (EPA Method 2 §10.1, calculations.md §6 \[P\]).
pub const DEFAULT_STANDARD_COEFFICIENT: f64 = 0.99;

/// Readings needed with each leg facing the flow. EPA Method 2 §10.1 prescribes three per leg
/// (calculations.md §6 \[P\]); more are accepted and averaged the same way.
pub const MIN_READINGS_PER_SIDE: usize = 3;

/// Acceptance limits of a calibration, with their source.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AcceptanceLimits {
    /// Largest allowed deviation σ of either leg (dimensionless).
    pub max_leg_deviation: f64,
    /// Largest allowed |C̄p(A) − C̄p(B)| (dimensionless).
    pub max_leg_difference: f64,
    /// Where the limits come from, for the report.
    pub source: &'static str,
}

/// EPA Method 2 limits: σ ≤ 0.01 per leg, |C̄p(A) − C̄p(B)| ≤ 0.01 (calculations.md §6 \[P\];
/// the clause numbering inside §10.1 is from memory).
pub const METHOD_2_LIMITS: AcceptanceLimits = AcceptanceLimits {
    max_leg_deviation: 0.01,
    max_leg_difference: 0.01,
    source: "EPA Method 2 (40 CFR 60 App. A-1) §10.1",
};

/// Which leg of the Type S tube faced the flow.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Leg {
    /// Leg A facing the flow.
    A,
    /// Leg B facing the flow.
    B,
}

impl Leg {
    /// `"A"` or `"B"`.
    pub const fn label(self) -> &'static str {
        match self {
            Self::A => "A",
            Self::B => "B",
        }
    }
}

/// One simultaneous pair of velocity-pressure readings at the same point. Only the ratio
/// enters the coefficient, but the values are Pa like everything inside the crate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PairedReading {
    /// Standard pitot tube Δp, Pa.
    pub standard_dp_pa: f64,
    /// Type S pitot tube Δp, Pa.
    pub s_type_dp_pa: f64,
}

/// Results for one leg.
#[derive(Debug, Clone, PartialEq)]
pub struct LegResult {
    /// Which leg faced the flow.
    pub leg: Leg,
    /// Cp(s) of each reading, in input order.
    pub coefficients: Vec<f64>,
    /// Mean C̄p.
    pub mean: f64,
    /// σ = Σ|Cp − C̄p|/n: the mean absolute deviation, as Method 2 defines it (not the standard
    /// deviation).
    pub deviation: f64,
}

/// One acceptance criterion and its outcome.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CalibrationCheck {
    /// Stable id: `leg-a-deviation`, `leg-b-deviation` or `leg-difference`.
    pub id: &'static str,
    /// The value found.
    pub value: f64,
    /// The limit it must not exceed.
    pub limit: f64,
    /// `value ≤ limit`.
    pub passed: bool,
}

/// A complete calibration.
#[derive(Debug, Clone, PartialEq)]
pub struct Calibration {
    /// Cp(std) used.
    pub standard_coefficient: f64,
    /// True when Cp(std) was not given and [`DEFAULT_STANDARD_COEFFICIENT`] was used.
    pub standard_coefficient_assumed: bool,
    /// Leg A facing the flow.
    pub leg_a: LegResult,
    /// Leg B facing the flow.
    pub leg_b: LegResult,
    /// |C̄p(A) − C̄p(B)|.
    pub leg_difference: f64,
    /// The limits applied.
    pub limits: AcceptanceLimits,
}

impl Calibration {
    /// The three acceptance checks, in a fixed order.
    pub fn checks(&self) -> [CalibrationCheck; 3] {
        let check = |id, value: f64, limit: f64| CalibrationCheck {
            id,
            value,
            limit,
            passed: value <= limit,
        };
        [
            check(
                "leg-a-deviation",
                self.leg_a.deviation,
                self.limits.max_leg_deviation,
            ),
            check(
                "leg-b-deviation",
                self.leg_b.deviation,
                self.limits.max_leg_deviation,
            ),
            check(
                "leg-difference",
                self.leg_difference,
                self.limits.max_leg_difference,
            ),
        ]
    }

    /// True when every check passes.
    pub fn accepted(&self) -> bool {
        self.checks().iter().all(|c| c.passed)
    }

    /// Mean of the two leg means, the value commonly assigned to the tube when it is accepted
    /// (from memory, to confirm against Method 2 §10.1).
    pub fn assigned_coefficient(&self) -> f64 {
        (self.leg_a.mean + self.leg_b.mean) / 2.0
    }
}

/// Why a calibration could not be computed.
#[derive(Debug, Clone, PartialEq)]
pub enum CalibrationError {
    /// Fewer than [`MIN_READINGS_PER_SIDE`] readings for a leg.
    TooFewReadings {
        /// The leg.
        leg: Leg,
        /// The least number accepted.
        needed: usize,
        /// How many were given.
        found: usize,
    },
    /// A Δp that is not a positive finite number.
    BadReading {
        /// The leg.
        leg: Leg,
        /// 1-based reading number within the leg.
        reading: usize,
        /// `"standard pitot dp"` or `"Type S dp"`.
        which: &'static str,
        /// The raw value, Pa.
        value_pa: f64,
    },
    /// A given Cp(std) that is not a positive finite number.
    BadStandardCoefficient {
        /// The raw value.
        value: f64,
    },
}

impl fmt::Display for CalibrationError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::TooFewReadings { leg, needed, found } => write!(
                f,
                "leg {} needs at least {needed} paired readings, found {found}",
                leg.label()
            ),
            Self::BadReading {
                leg,
                reading,
                which,
                value_pa,
            } => write!(
                f,
                "leg {}, reading {reading}: {which} must be greater than zero, found `{value_pa} Pa`",
                leg.label()
            ),
            Self::BadStandardCoefficient { value } => write!(
                f,
                "standard pitot coefficient must be a number greater than zero, found `{value}`"
            ),
        }
    }
}

impl std::error::Error for CalibrationError {}

/// Calibrates a Type S tube from paired readings with leg A and with leg B facing the flow.
///
/// `standard_coefficient`: Cp(std), or `None` for [`DEFAULT_STANDARD_COEFFICIENT`].
/// Per reading Cp(s) = Cp(std)·√(Δp_std/Δp_s) (EPA Method 2 §10.1, calculations.md §6 \[P\]).
pub fn calibrate(
    leg_a: &[PairedReading],
    leg_b: &[PairedReading],
    standard_coefficient: Option<f64>,
    limits: AcceptanceLimits,
) -> Result<Calibration, CalibrationError> {
    let (cp_std, assumed) = match standard_coefficient {
        Some(v) if v.is_finite() && v > 0.0 => (v, false),
        Some(v) => return Err(CalibrationError::BadStandardCoefficient { value: v }),
        None => (DEFAULT_STANDARD_COEFFICIENT, true),
    };
    let leg_a = leg_result(Leg::A, leg_a, cp_std)?;
    let leg_b = leg_result(Leg::B, leg_b, cp_std)?;
    Ok(Calibration {
        standard_coefficient: cp_std,
        standard_coefficient_assumed: assumed,
        leg_difference: (leg_a.mean - leg_b.mean).abs(),
        leg_a,
        leg_b,
        limits,
    })
}

fn leg_result(
    leg: Leg,
    readings: &[PairedReading],
    cp_std: f64,
) -> Result<LegResult, CalibrationError> {
    if readings.len() < MIN_READINGS_PER_SIDE {
        return Err(CalibrationError::TooFewReadings {
            leg,
            needed: MIN_READINGS_PER_SIDE,
            found: readings.len(),
        });
    }
    let mut coefficients = Vec::with_capacity(readings.len());
    for (i, r) in readings.iter().enumerate() {
        for (which, value_pa) in [
            ("standard pitot dp", r.standard_dp_pa),
            ("Type S dp", r.s_type_dp_pa),
        ] {
            if !(value_pa.is_finite() && value_pa > 0.0) {
                return Err(CalibrationError::BadReading {
                    leg,
                    reading: i + 1,
                    which,
                    value_pa,
                });
            }
        }
        coefficients.push(cp_std * (r.standard_dp_pa / r.s_type_dp_pa).sqrt());
    }
    let n = coefficients.len() as f64;
    let mean = coefficients.iter().sum::<f64>() / n;
    let deviation = coefficients.iter().map(|c| (c - mean).abs()).sum::<f64>() / n;
    Ok(LegResult {
        leg,
        coefficients,
        mean,
        deviation,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// calculations.md §6 prints six decimals: half a unit in the last place.
    const ABS_TOL_PRINTED_6DP: f64 = 0.000_000_5;
    /// Values constructed to be exact up to rounding.
    const ABS_TOL_CONSTRUCTED: f64 = 1e-12;
    /// The example is in inH2O; only ratios matter, so any Pa-per-inH2O factor gives the same
    /// coefficients. 249.0889 Pa (water at 4 °C) is used.
    const PA_PER_INH2O: f64 = 249.0889;

    fn pairs(standard_inh2o: &[f64], s_type_inh2o: &[f64]) -> Vec<PairedReading> {
        standard_inh2o
            .iter()
            .zip(s_type_inh2o)
            .map(|(s, t)| PairedReading {
                standard_dp_pa: s * PA_PER_INH2O,
                s_type_dp_pa: t * PA_PER_INH2O,
            })
            .collect()
    }

    const STD: [f64; 3] = [0.600, 0.610, 0.590];

    #[test]
    fn worked_example_is_accepted() {
        // calculations.md §6 [D], from the EPA Method 2 §10.1 equations: Cp(std) 0.99 (default);
        // A 0.836703, 0.833779, 0.834684, mean 0.835055, σ 0.001098; B mean 0.831741,
        // σ 0.002999; |A−B| 0.003315 → accept.
        let a = pairs(&STD, &[0.840, 0.860, 0.830]);
        let b = pairs(&STD, &[0.850, 0.855, 0.845]);
        let cal = calibrate(&a, &b, None, METHOD_2_LIMITS).expect("valid");
        assert!(cal.standard_coefficient_assumed);
        assert_eq!(cal.standard_coefficient, 0.99);
        for (got, want) in cal
            .leg_a
            .coefficients
            .iter()
            .zip([0.836703, 0.833779, 0.834684])
        {
            assert!((got - want).abs() <= ABS_TOL_PRINTED_6DP, "{got} vs {want}");
        }
        assert!((cal.leg_a.mean - 0.835055).abs() <= ABS_TOL_PRINTED_6DP);
        assert!((cal.leg_a.deviation - 0.001098).abs() <= ABS_TOL_PRINTED_6DP);
        assert!((cal.leg_b.mean - 0.831741).abs() <= ABS_TOL_PRINTED_6DP);
        assert!((cal.leg_b.deviation - 0.002999).abs() <= ABS_TOL_PRINTED_6DP);
        assert!((cal.leg_difference - 0.003315).abs() <= ABS_TOL_PRINTED_6DP);
        assert!(cal.accepted());
        assert!(cal.checks().iter().all(|c| c.passed));
    }

    /// Type S readings that give exactly the wanted coefficients: Δp_s = Δp_std·(Cp(std)/Cp)².
    fn constructed(cp_std: f64, wanted: &[f64]) -> Vec<PairedReading> {
        STD.iter()
            .zip(wanted)
            .map(|(s, cp)| PairedReading {
                standard_dp_pa: s * PA_PER_INH2O,
                s_type_dp_pa: s * PA_PER_INH2O * (cp_std / cp).powi(2),
            })
            .collect()
    }

    #[test]
    fn scattered_leg_is_rejected_on_its_deviation() {
        // Constructed: leg B readings chosen (Δp_s = Δp_std·(0.99/Cp)²) to give Cp 0.80, 0.83,
        // 0.86 → mean 0.83, σ = (0.03 + 0 + 0.03)/3 = 0.02 > 0.01; the leg means still agree
        // (|0.835055 − 0.83| = 0.005055 ≤ 0.01), so only the leg-B deviation check fails.
        let a = pairs(&STD, &[0.840, 0.860, 0.830]);
        let b = constructed(0.99, &[0.80, 0.83, 0.86]);
        let cal = calibrate(&a, &b, None, METHOD_2_LIMITS).expect("valid");
        assert!((cal.leg_b.mean - 0.83).abs() <= ABS_TOL_CONSTRUCTED);
        assert!((cal.leg_b.deviation - 0.02).abs() <= ABS_TOL_CONSTRUCTED);
        let checks = cal.checks();
        assert!(checks[0].passed);
        assert!(!checks[1].passed);
        assert_eq!(checks[1].id, "leg-b-deviation");
        assert!(checks[2].passed);
        assert!(!cal.accepted());
    }

    #[test]
    fn disagreeing_legs_are_rejected_on_the_difference() {
        // Constructed: leg B at exactly Cp 0.82 three times with a given Cp(std) 0.99 →
        // σ_B = 0, |0.835055 − 0.82| = 0.015055 > 0.01.
        let a = pairs(&STD, &[0.840, 0.860, 0.830]);
        let b = constructed(0.99, &[0.82, 0.82, 0.82]);
        let cal = calibrate(&a, &b, Some(0.99), METHOD_2_LIMITS).expect("valid");
        assert!(!cal.standard_coefficient_assumed);
        assert!(cal.leg_b.deviation <= ABS_TOL_CONSTRUCTED);
        assert!((cal.leg_difference - 0.015055).abs() <= ABS_TOL_PRINTED_6DP);
        assert!(!cal.checks()[2].passed);
        assert!(!cal.accepted());
    }

    #[test]
    fn deviation_is_mean_absolute_not_standard_deviation() {
        // Derived: Cp 0.80, 0.83, 0.86 has s.d. 0.03 but mean absolute deviation 0.02.
        let b = constructed(0.99, &[0.80, 0.83, 0.86]);
        let cal = calibrate(&b, &b, None, METHOD_2_LIMITS).expect("valid");
        assert!((cal.leg_a.deviation - 0.03).abs() > 0.005);
    }

    #[test]
    fn standard_coefficient_scales_every_reading() {
        // Derived: Cp(s) is proportional to Cp(std).
        let a = pairs(&STD, &[0.840, 0.860, 0.830]);
        let c99 = calibrate(&a, &a, None, METHOD_2_LIMITS).expect("valid");
        let c100 = calibrate(&a, &a, Some(1.0), METHOD_2_LIMITS).expect("valid");
        assert!((c100.leg_a.mean - c99.leg_a.mean / 0.99).abs() <= ABS_TOL_CONSTRUCTED);
    }

    #[test]
    fn rejects_short_legs_and_bad_readings() {
        let a = pairs(&STD, &[0.840, 0.860, 0.830]);
        let short = pairs(&STD[..2], &[0.850, 0.855]);
        assert_eq!(
            calibrate(&a, &short, None, METHOD_2_LIMITS),
            Err(CalibrationError::TooFewReadings {
                leg: Leg::B,
                needed: 3,
                found: 2
            })
        );
        let mut bad = a.clone();
        bad[1].s_type_dp_pa = 0.0;
        let err = calibrate(&bad, &a, None, METHOD_2_LIMITS).expect_err("zero dp");
        assert_eq!(
            err,
            CalibrationError::BadReading {
                leg: Leg::A,
                reading: 2,
                which: "Type S dp",
                value_pa: 0.0
            }
        );
        assert_eq!(
            err.to_string(),
            "leg A, reading 2: Type S dp must be greater than zero, found `0 Pa`"
        );
        let mut neg = a.clone();
        neg[2].standard_dp_pa = -1.0;
        assert!(matches!(
            calibrate(&a, &neg, None, METHOD_2_LIMITS),
            Err(CalibrationError::BadReading {
                leg: Leg::B,
                reading: 3,
                which: "standard pitot dp",
                ..
            })
        ));
        assert!(calibrate(&a, &a, Some(f64::NAN), METHOD_2_LIMITS).is_err());
        assert!(calibrate(&a, &a, Some(0.0), METHOD_2_LIMITS).is_err());
    }
}
