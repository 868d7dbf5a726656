//! Relative accuracy test audit (RATA) of a flow monitor against reference-method traverses
//! (40 CFR 75 Appendix A §7; calculations.md §7).
//!
//! Owns the paired-run statistics (d̄, S_d, confidence coefficient, relative accuracy), the
//! low-velocity alternative, the bias test and adjustment factor, and the limits as data. Pure
//! computation: never reads files or prints; the `rata` command formats the result.
//!
//! The equation forms and limits follow calculations.md §7, which marks them **from memory**;
//! every limit lives in [`PART_75_FLOW_LIMITS`] so it can be confirmed against the regulation
//! and corrected in one place.

use std::fmt;

use crate::uncertainty::t_975;

/// Metres per foot, exact by definition (international foot, 1959).
const M_PER_FT: f64 = 0.3048;

/// Limits of a flow-monitor RATA, with their source.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct RataLimits {
    /// Fewest runs that must remain after rejections.
    pub min_used_runs: usize,
    /// Most runs that may be rejected.
    pub max_rejected_runs: usize,
    /// Relative accuracy at or below which the test passes, %.
    pub ra_pass_percent: f64,
    /// Relative accuracy at or below which the reduced (annual) test frequency is earned, %.
    pub ra_incentive_percent: f64,
    /// Reference-method mean velocity at or below which the low-velocity alternative applies, m/s.
    pub low_velocity_threshold_m_s: f64,
    /// Low-velocity alternative: largest |RM_avg − CEM_avg| that passes, m/s.
    pub low_velocity_pass_m_s: f64,
    /// Low-velocity alternative: largest |RM_avg − CEM_avg| that earns the annual frequency, m/s.
    pub low_velocity_incentive_m_s: f64,
    /// Where the limits come from, for the report.
    pub source: &'static str,
}

/// Part 75 flow-monitor limits (calculations.md §7): ≥ 9 used runs, ≤ 3 rejected; RA ≤ 10.0 %
/// (≤ 7.5 % for the annual frequency); when RM_avg ≤ 10 ft/s, alternatively |RM_avg − CEM_avg|
/// ≤ 2.0 ft/s (1.5 ft/s). From memory, to confirm against 40 CFR 75 App. A §7 and App. B §2.3.
pub const PART_75_FLOW_LIMITS: RataLimits = RataLimits {
    min_used_runs: 9,
    max_rejected_runs: 3,
    ra_pass_percent: 10.0,
    ra_incentive_percent: 7.5,
    low_velocity_threshold_m_s: 10.0 * M_PER_FT,
    low_velocity_pass_m_s: 2.0 * M_PER_FT,
    low_velocity_incentive_m_s: 1.5 * M_PER_FT,
    source: "40 CFR 75 App. A §7 / App. B §2.3 (from memory, to confirm)",
};

/// What the paired values are. The low-velocity alternative needs velocities.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RataQuantity {
    /// Values are gas velocities in m/s.
    VelocityMS,
    /// Values are volumetric flows, all in one unit of the caller's choice.
    Flow,
}

/// One reference-method run paired with the monitor's value over the same period.
#[derive(Debug, Clone, PartialEq)]
pub struct RataRun {
    id: String,
    reference: f64,
    monitor: f64,
    rejection: Option<String>,
}

impl RataRun {
    /// A run used in the statistics. Both values finite and greater than zero.
    pub fn used(id: impl Into<String>, reference: f64, monitor: f64) -> Result<Self, RataError> {
        Self::build(id.into(), reference, monitor, None)
    }

    /// A run rejected for `reason` (non-empty); it is still reported. Both values finite and
    /// not negative.
    pub fn rejected(
        id: impl Into<String>,
        reference: f64,
        monitor: f64,
        reason: impl Into<String>,
    ) -> Result<Self, RataError> {
        let id = id.into();
        let reason = reason.into();
        if reason.trim().is_empty() {
            return Err(RataError::MissingRejectionReason { run_id: id });
        }
        Self::build(id, reference, monitor, Some(reason))
    }

    fn build(
        id: String,
        reference: f64,
        monitor: f64,
        rejection: Option<String>,
    ) -> Result<Self, RataError> {
        if id.trim().is_empty() {
            return Err(RataError::MissingRunId);
        }
        let used = rejection.is_none();
        for (which, value) in [
            ("reference-method value", reference),
            ("monitor value", monitor),
        ] {
            let ok = value.is_finite() && if used { value > 0.0 } else { value >= 0.0 };
            if !ok {
                return Err(RataError::BadValue {
                    run_id: id,
                    which,
                    expected: if used {
                        "greater than zero"
                    } else {
                        "zero or greater"
                    },
                    value,
                });
            }
        }
        Ok(Self {
            id,
            reference,
            monitor,
            rejection,
        })
    }

    /// The run's id.
    pub fn id(&self) -> &str {
        &self.id
    }

    /// Reference-method value.
    pub fn reference(&self) -> f64 {
        self.reference
    }

    /// Monitor value.
    pub fn monitor(&self) -> f64 {
        self.monitor
    }

    /// Why the run was rejected, if it was.
    pub fn rejection(&self) -> Option<&str> {
        self.rejection.as_deref()
    }

    /// d = RM − CEM.
    pub fn difference(&self) -> f64 {
        self.reference - self.monitor
    }
}

/// Grade of a criterion.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum RataGrade {
    /// Above the pass limit.
    Fail,
    /// Within the pass limit.
    Pass,
    /// Within the tighter limit that earns the reduced (annual) frequency.
    PassAnnualFrequency,
}

impl RataGrade {
    /// Stable label: `fail`, `pass`, `pass-annual-frequency`.
    pub const fn label(self) -> &'static str {
        match self {
            Self::Fail => "fail",
            Self::Pass => "pass",
            Self::PassAnnualFrequency => "pass-annual-frequency",
        }
    }

    fn of(value: f64, pass: f64, incentive: f64) -> Self {
        if value <= incentive {
            Self::PassAnnualFrequency
        } else if value <= pass {
            Self::Pass
        } else {
            Self::Fail
        }
    }
}

/// The low-velocity alternative criterion.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum LowVelocity {
    /// Not evaluated, and why.
    NotApplicable {
        /// Plain-words reason for the report.
        reason: &'static str,
    },
    /// Evaluated on |RM_avg − CEM_avg|.
    Evaluated {
        /// |RM_avg − CEM_avg|, m/s.
        abs_mean_difference_m_s: f64,
        /// Grade against the alternative limits.
        grade: RataGrade,
    },
}

/// The bias test.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BiasTest {
    /// False when d̄ > |cc|: the monitor reads low beyond the confidence coefficient.
    pub passed: bool,
    /// BAF = 1 + |d̄|/CEM_avg when the test fails, otherwise 1.
    pub adjustment_factor: f64,
}

/// Which way the monitor reads against the reference method on average.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BiasDirection {
    /// The monitor reads below the reference method (d̄ = RM − CEM > 0).
    Low,
    /// The monitor reads above the reference method (d̄ < 0).
    High,
    /// No difference on average.
    None,
}

/// The complete RATA.
#[derive(Debug, Clone, PartialEq)]
pub struct RataResult {
    /// What the values are.
    pub quantity: RataQuantity,
    /// Every run, used and rejected, in input order.
    pub runs: Vec<RataRun>,
    /// Number of used runs n.
    pub used_runs: usize,
    /// Mean difference d̄ over the used runs.
    pub mean_difference: f64,
    /// Standard deviation of the differences S_d.
    pub std_dev_difference: f64,
    /// t_0.975(n − 1).
    pub t_value: f64,
    /// Confidence coefficient cc = t·S_d/√n.
    pub confidence_coefficient: f64,
    /// Mean reference-method value RM_avg.
    pub reference_mean: f64,
    /// Mean monitor value CEM_avg.
    pub monitor_mean: f64,
    /// RA = (|d̄| + |cc|)/RM_avg × 100, %.
    pub relative_accuracy_percent: f64,
    /// Grade of the relative accuracy.
    pub ra_grade: RataGrade,
    /// The low-velocity alternative.
    pub low_velocity: LowVelocity,
    /// The bias test.
    pub bias: BiasTest,
    /// The limits applied.
    pub limits: RataLimits,
}

impl RataResult {
    /// Which way the monitor reads on average.
    pub fn bias_direction(&self) -> BiasDirection {
        if self.mean_difference > 0.0 {
            BiasDirection::Low
        } else if self.mean_difference < 0.0 {
            BiasDirection::High
        } else {
            BiasDirection::None
        }
    }

    /// The bias result in words, saying which way the monitor reads; `show` formats a value of
    /// the RATA's quantity (SI in, text with its unit out). The bias test corrects a monitor that
    /// reads low by more than the confidence coefficient (40 CFR 75 App. A §7.6, from memory).
    pub fn bias_words(&self, show: &dyn Fn(f64) -> String) -> String {
        let d = show(self.mean_difference.abs());
        let cc = show(self.confidence_coefficient.abs());
        match (self.bias_direction(), self.bias.passed) {
            (BiasDirection::Low, false) => format!(
                "the monitor reads LOW: on average {d} below the reference method, more than the confidence coefficient {cc}; its readings are to be multiplied by the bias adjustment factor"
            ),
            (BiasDirection::Low, true) => format!(
                "the monitor reads low by {d} on average, within the confidence coefficient {cc}: no significant bias, no adjustment"
            ),
            (BiasDirection::High, _) => format!(
                "the monitor reads high by {d} on average (confidence coefficient {cc}); the bias test adjusts only a monitor that reads low: no adjustment"
            ),
            (BiasDirection::None, _) => {
                "the monitor and the reference method agree on average: no adjustment".to_string()
            }
        }
    }

    /// Overall grade: the relative accuracy, or the low-velocity alternative where it applies
    /// and grades better.
    pub fn grade(&self) -> RataGrade {
        match self.low_velocity {
            LowVelocity::Evaluated { grade, .. } => self.ra_grade.max(grade),
            LowVelocity::NotApplicable { .. } => self.ra_grade,
        }
    }
}

/// Why a RATA could not be computed.
#[derive(Debug, Clone, PartialEq)]
pub enum RataError {
    /// A run had an empty id.
    MissingRunId,
    /// Two runs share an id.
    DuplicateRunId {
        /// The repeated id.
        run_id: String,
    },
    /// A rejected run was given no reason.
    MissingRejectionReason {
        /// The run.
        run_id: String,
    },
    /// A value was not usable.
    BadValue {
        /// The run.
        run_id: String,
        /// `"reference-method value"` or `"monitor value"`.
        which: &'static str,
        /// The allowed range, in words.
        expected: &'static str,
        /// The raw value.
        value: f64,
    },
    /// More runs rejected than allowed.
    TooManyRejected {
        /// Most allowed.
        allowed: usize,
        /// How many were rejected.
        found: usize,
    },
    /// Too few runs remain after rejections.
    TooFewUsed {
        /// Fewest required.
        needed: usize,
        /// How many remain.
        found: usize,
    },
}

impl fmt::Display for RataError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::MissingRunId => write!(f, "every RATA run needs an id, found an empty one"),
            Self::DuplicateRunId { run_id } => {
                write!(f, "each RATA run id must be unique, found `{run_id}` twice")
            }
            Self::MissingRejectionReason { run_id } => {
                write!(
                    f,
                    "run `{run_id}` is rejected, so it needs a reason, found none"
                )
            }
            Self::BadValue {
                run_id,
                which,
                expected,
                value,
            } => write!(
                f,
                "run `{run_id}`: {which} must be {expected}, found `{value}`"
            ),
            Self::TooManyRejected { allowed, found } => {
                write!(f, "at most {allowed} runs may be rejected, found {found}")
            }
            Self::TooFewUsed { needed, found } => write!(
                f,
                "at least {needed} runs must remain after rejections, found {found}"
            ),
        }
    }
}

impl std::error::Error for RataError {}

/// Evaluates a RATA on `runs` (all reported; rejected ones left out of the statistics).
///
/// d_i = RM_i − CEM_i; S_d = √(Σ(d − d̄)²/(n − 1)), the two-pass form of
/// √((Σd² − (Σd)²/n)/(n − 1)); cc = t_0.975(n − 1)·S_d/√n; RA = (|d̄| + |cc|)/RM_avg × 100;
/// bias fails when d̄ > |cc| and then BAF = 1 + |d̄|/CEM_avg (calculations.md §7, \[M\]).
pub fn evaluate_rata(
    runs: Vec<RataRun>,
    quantity: RataQuantity,
    limits: RataLimits,
) -> Result<RataResult, RataError> {
    for (i, run) in runs.iter().enumerate() {
        if runs[..i].iter().any(|r| r.id == run.id) {
            return Err(RataError::DuplicateRunId {
                run_id: run.id.clone(),
            });
        }
    }
    let used: Vec<&RataRun> = runs.iter().filter(|r| r.rejection.is_none()).collect();
    let rejected = runs.len() - used.len();
    if rejected > limits.max_rejected_runs {
        return Err(RataError::TooManyRejected {
            allowed: limits.max_rejected_runs,
            found: rejected,
        });
    }
    let needed = limits.min_used_runs.max(2);
    if used.len() < needed {
        return Err(RataError::TooFewUsed {
            needed,
            found: used.len(),
        });
    }

    let n = used.len() as f64;
    let mean = |f: fn(&RataRun) -> f64| used.iter().map(|r| f(r)).sum::<f64>() / n;
    let mean_difference = mean(RataRun::difference);
    let reference_mean = mean(RataRun::reference);
    let monitor_mean = mean(RataRun::monitor);
    let ss: f64 = used
        .iter()
        .map(|r| (r.difference() - mean_difference).powi(2))
        .sum();
    let std_dev_difference = (ss / (n - 1.0)).sqrt();
    // n ≥ 2, so n − 1 ≥ 1 and the quantile exists; the fallback is never taken.
    let t_value = t_975(n - 1.0).unwrap_or(f64::NAN);
    let confidence_coefficient = t_value * std_dev_difference / n.sqrt();
    let relative_accuracy_percent =
        (mean_difference.abs() + confidence_coefficient.abs()) / reference_mean * 100.0;
    let ra_grade = RataGrade::of(
        relative_accuracy_percent,
        limits.ra_pass_percent,
        limits.ra_incentive_percent,
    );

    let low_velocity = match quantity {
        RataQuantity::Flow => LowVelocity::NotApplicable {
            reason: "values are flows; the low-velocity alternative needs velocities",
        },
        RataQuantity::VelocityMS if reference_mean > limits.low_velocity_threshold_m_s => {
            LowVelocity::NotApplicable {
                reason: "reference-method mean velocity is above the low-velocity threshold",
            }
        }
        RataQuantity::VelocityMS => {
            let d = (reference_mean - monitor_mean).abs();
            LowVelocity::Evaluated {
                abs_mean_difference_m_s: d,
                grade: RataGrade::of(
                    d,
                    limits.low_velocity_pass_m_s,
                    limits.low_velocity_incentive_m_s,
                ),
            }
        }
    };

    let passed = mean_difference <= confidence_coefficient.abs();
    let bias = BiasTest {
        passed,
        adjustment_factor: if passed {
            1.0
        } else {
            1.0 + mean_difference.abs() / monitor_mean
        },
    };

    Ok(RataResult {
        quantity,
        used_runs: used.len(),
        runs,
        mean_difference,
        std_dev_difference,
        t_value,
        confidence_coefficient,
        reference_mean,
        monitor_mean,
        relative_accuracy_percent,
        ra_grade,
        low_velocity,
        bias,
        limits,
    })
}

/// One operating (load) level of a RATA and its result.
#[derive(Debug, Clone, PartialEq)]
pub struct LevelResult {
    /// The level's name as the file gives it (`""` when the file names none).
    pub level: String,
    pub result: Result<RataResult, RataError>,
}

/// Evaluates a RATA run at several operating levels: the runs of each level (in the order the
/// levels first appear) are a RATA of their own, with its own relative accuracy and bias
/// (40 CFR 75 App. A §6.5.2: flow RATAs at two or three load levels, from memory).
pub fn evaluate_levels(
    runs: Vec<(String, RataRun)>,
    quantity: RataQuantity,
    limits: RataLimits,
) -> Vec<LevelResult> {
    let mut levels: Vec<(String, Vec<RataRun>)> = Vec::new();
    for (level, run) in runs {
        match levels.iter_mut().find(|(l, _)| *l == level) {
            Some((_, v)) => v.push(run),
            None => levels.push((level, vec![run])),
        }
    }
    levels
        .into_iter()
        .map(|(level, runs)| LevelResult {
            level,
            result: evaluate_rata(runs, quantity, limits),
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Agreement with the independent numpy/scipy computation pasted below (printed to 10 decimals).
    const REL_TOL_INDEPENDENT: f64 = 1e-9;
    /// NIST TN 1297 Table B.1 prints three decimals.
    const ABS_TOL_TABLE_3DP: f64 = 0.0005;

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= REL_TOL_INDEPENDENT * b.abs().max(1.0)
    }

    fn used_runs(rm: &[f64], cem: &[f64]) -> Vec<RataRun> {
        rm.iter()
            .zip(cem)
            .enumerate()
            .map(|(i, (r, c))| RataRun::used(format!("{}", i + 1), *r, *c).expect("valid"))
            .collect()
    }

    // Expected values below were obtained with a one-off Python script (numpy 2.4.6,
    // scipy 1.17.1): d = rm − cem; dbar = d.mean(); sd = d.std(ddof=1);
    // t = scipy.stats.t.ppf(0.975, n − 1); cc = t·sd/√n; RA = (|dbar| + |cc|)/rm.mean()·100;
    // BAF = 1 + |dbar|/cem.mean() when dbar > |cc|.

    /// Set 1, constructed: nine velocity runs near 15.3 m/s (≈ 50 ft/s); CEM = RM − d with
    /// d = +0.12, −0.08, +0.05, −0.10, +0.15, −0.03, +0.02, −0.06, +0.07 m/s (scatter both ways).
    const RM1: [f64; 9] = [
        15.20, 15.45, 14.98, 15.62, 15.10, 15.33, 15.51, 14.87, 15.25,
    ];
    const D1: [f64; 9] = [0.12, -0.08, 0.05, -0.10, 0.15, -0.03, 0.02, -0.06, 0.07];

    #[test]
    fn set_1_passes_with_the_annual_frequency_and_no_bias() {
        let cem: Vec<f64> = RM1.iter().zip(D1).map(|(r, d)| r - d).collect();
        let res = evaluate_rata(
            used_runs(&RM1, &cem),
            RataQuantity::VelocityMS,
            PART_75_FLOW_LIMITS,
        )
        .expect("valid");
        // Independent (numpy/scipy, see above): dbar 0.0155555556, sd 0.0890380693,
        // t 2.3060041352, cc 0.0684407186, RM 15.2566666667, CEM 15.2411111111, RA 0.5505545610 %.
        assert_eq!(res.used_runs, 9);
        assert!(close(res.mean_difference, 0.0155555556));
        assert!(close(res.std_dev_difference, 0.0890380693));
        assert!(close(res.t_value, 2.3060041352));
        assert!(close(res.confidence_coefficient, 0.0684407186));
        assert!(close(res.reference_mean, 15.2566666667));
        assert!(close(res.monitor_mean, 15.2411111111));
        assert!(close(res.relative_accuracy_percent, 0.5505545610));
        assert_eq!(res.ra_grade, RataGrade::PassAnnualFrequency);
        assert!(matches!(
            res.low_velocity,
            LowVelocity::NotApplicable { .. }
        ));
        assert!(res.bias.passed);
        assert_eq!(res.bias.adjustment_factor, 1.0);
        assert_eq!(res.grade(), RataGrade::PassAnnualFrequency);
    }

    /// Set 2, constructed: twelve flow runs near 120 m³/s with the monitor about 3 % low;
    /// runs 4, 7 and 11 carry wild monitor values and are rejected (so they must not count).
    const RM2: [f64; 12] = [
        121.4, 119.8, 122.6, 120.9, 118.7, 121.9, 120.3, 119.5, 122.1, 121.0, 120.6, 119.9,
    ];
    const CEM2: [f64; 12] = [
        117.6, 116.5, 118.4, 110.2, 115.3, 117.9, 124.8, 116.2, 118.0, 117.6, 108.9, 116.1,
    ];

    fn set_2_runs() -> Vec<RataRun> {
        (0..12)
            .map(|i| {
                let id = format!("R{}", i + 1);
                if [3, 6, 10].contains(&i) {
                    RataRun::rejected(id, RM2[i], CEM2[i], "monitor in daily calibration")
                } else {
                    RataRun::used(id, RM2[i], CEM2[i])
                }
                .expect("valid")
            })
            .collect()
    }

    #[test]
    fn set_2_fails_the_bias_test_and_gets_a_baf() {
        let res =
            evaluate_rata(set_2_runs(), RataQuantity::Flow, PART_75_FLOW_LIMITS).expect("valid");
        // Independent (numpy/scipy, used runs only): dbar 3.7, sd 0.3570714214, cc 0.2744693915,
        // RM 120.7666666667, CEM 117.0666666667, RA 3.2910317898 %, bias fails, BAF 1.0316059226.
        assert_eq!(res.runs.len(), 12);
        assert_eq!(res.used_runs, 9);
        assert_eq!(
            res.runs[3].rejection(),
            Some("monitor in daily calibration")
        );
        assert!(close(res.mean_difference, 3.7));
        assert!(close(res.std_dev_difference, 0.3570714214));
        assert!(close(res.confidence_coefficient, 0.2744693915));
        assert!(close(res.reference_mean, 120.7666666667));
        assert!(close(res.monitor_mean, 117.0666666667));
        assert!(close(res.relative_accuracy_percent, 3.2910317898));
        assert_eq!(res.ra_grade, RataGrade::PassAnnualFrequency);
        assert!(!res.bias.passed);
        assert!(close(res.bias.adjustment_factor, 1.0316059226));
        assert!(matches!(
            res.low_velocity,
            LowVelocity::NotApplicable { .. }
        ));
    }

    /// Set 3, constructed: nine velocity runs near 2.81 m/s (9.22 ft/s, below 10 ft/s) with the
    /// monitor about 0.35 m/s high, so RA alone fails but the low-velocity alternative passes.
    const RM3: [f64; 9] = [2.81, 2.74, 2.90, 2.86, 2.69, 2.78, 2.95, 2.83, 2.72];
    const CEM3: [f64; 9] = [3.20, 3.05, 3.31, 3.15, 3.10, 3.08, 3.33, 3.22, 3.02];

    #[test]
    fn set_3_low_velocity_alternative_rescues_a_failing_ra() {
        let res = evaluate_rata(
            used_runs(&RM3, &CEM3),
            RataQuantity::VelocityMS,
            PART_75_FLOW_LIMITS,
        )
        .expect("valid");
        // Independent (numpy/scipy): dbar −0.3533333333, RA 13.9944714549 %,
        // |RM − CEM| = 1.1592300962 ft/s; bias passes (monitor reads high).
        assert!(close(res.mean_difference, -0.3533333333));
        assert!(close(res.relative_accuracy_percent, 13.9944714549));
        assert_eq!(res.ra_grade, RataGrade::Fail);
        match res.low_velocity {
            LowVelocity::Evaluated {
                abs_mean_difference_m_s,
                grade,
            } => {
                assert!(close(abs_mean_difference_m_s / M_PER_FT, 1.1592300962));
                assert_eq!(grade, RataGrade::PassAnnualFrequency);
            }
            other => panic!("expected the low-velocity alternative, got {other:?}"),
        }
        assert_eq!(res.grade(), RataGrade::PassAnnualFrequency);
        assert!(res.bias.passed);
        assert_eq!(res.bias.adjustment_factor, 1.0);
    }

    #[test]
    fn same_values_as_flows_do_not_get_the_alternative() {
        let res = evaluate_rata(
            used_runs(&RM3, &CEM3),
            RataQuantity::Flow,
            PART_75_FLOW_LIMITS,
        )
        .expect("valid");
        assert!(matches!(
            res.low_velocity,
            LowVelocity::NotApplicable { .. }
        ));
        assert_eq!(res.grade(), RataGrade::Fail);
    }

    #[test]
    fn t_at_eight_degrees_of_freedom() {
        // NIST TN 1297 (1994) Table B.1, ν = 8, p = 95 %: 2.306 (transcribed).
        let cem: Vec<f64> = RM1.iter().zip(D1).map(|(r, d)| r - d).collect();
        let res = evaluate_rata(
            used_runs(&RM1, &cem),
            RataQuantity::VelocityMS,
            PART_75_FLOW_LIMITS,
        )
        .expect("valid");
        assert!((res.t_value - 2.306).abs() <= ABS_TOL_TABLE_3DP);
    }

    #[test]
    fn limits_convert_feet_per_second_exactly() {
        // 40 CFR 75 (from memory): 10, 2.0 and 1.5 ft/s; 1 ft = 0.3048 m exactly.
        assert!((PART_75_FLOW_LIMITS.low_velocity_threshold_m_s - 3.048).abs() <= 1e-12);
        assert!((PART_75_FLOW_LIMITS.low_velocity_pass_m_s - 0.6096).abs() <= 1e-12);
        assert!((PART_75_FLOW_LIMITS.low_velocity_incentive_m_s - 0.4572).abs() <= 1e-12);
    }

    #[test]
    fn run_count_rules() {
        let mut runs = set_2_runs();
        runs[0] = RataRun::rejected("R1", RM2[0], CEM2[0], "probe plugged").expect("valid");
        assert_eq!(
            evaluate_rata(runs, RataQuantity::Flow, PART_75_FLOW_LIMITS),
            Err(RataError::TooManyRejected {
                allowed: 3,
                found: 4
            })
        );
        let eight = used_runs(&RM1[..8], &RM1[..8]);
        assert_eq!(
            evaluate_rata(eight, RataQuantity::VelocityMS, PART_75_FLOW_LIMITS),
            Err(RataError::TooFewUsed {
                needed: 9,
                found: 8
            })
        );
        let mut dup = used_runs(&RM1, &RM1);
        dup[5] = RataRun::used("2", 15.0, 15.0).expect("valid");
        assert_eq!(
            evaluate_rata(dup, RataQuantity::VelocityMS, PART_75_FLOW_LIMITS),
            Err(RataError::DuplicateRunId {
                run_id: "2".to_string()
            })
        );
    }

    #[test]
    fn run_constructors_validate() {
        assert!(matches!(
            RataRun::used("1", 0.0, 15.0),
            Err(RataError::BadValue {
                which: "reference-method value",
                ..
            })
        ));
        assert!(RataRun::used("1", 15.0, f64::NAN).is_err());
        assert!(RataRun::used(" ", 15.0, 15.0).is_err());
        assert_eq!(
            RataRun::rejected("3", 15.0, 0.0, "  "),
            Err(RataError::MissingRejectionReason {
                run_id: "3".to_string()
            })
        );
        // A rejected run may carry a zero monitor value (e.g. the monitor was off line).
        assert!(RataRun::rejected("3", 15.0, 0.0, "monitor off line").is_ok());
        assert_eq!(
            RataRun::used("7", -1.0, 15.0)
                .map(|_| ())
                .unwrap_err()
                .to_string(),
            "run `7`: reference-method value must be greater than zero, found `-1`"
        );
    }

    #[test]
    fn the_bias_line_says_which_way_the_monitor_reads() {
        let show = |v: f64| format!("{v:.2} m/s");
        // set 2: d̄ = +3.7 > cc 0.274 -> low, adjusted
        let low = evaluate_rata(set_2_runs(), RataQuantity::Flow, PART_75_FLOW_LIMITS).unwrap();
        assert_eq!(low.bias_direction(), BiasDirection::Low);
        let w = low.bias_words(&show);
        assert!(
            w.starts_with("the monitor reads LOW: on average 3.70 m/s below"),
            "{w}"
        );
        assert!(w.ends_with("bias adjustment factor"), "{w}");
        // set 1: d̄ = +0.0156 within cc 0.068 -> low but not significant
        let cem: Vec<f64> = RM1.iter().zip(D1).map(|(r, d)| r - d).collect();
        let ok = evaluate_rata(
            used_runs(&RM1, &cem),
            RataQuantity::VelocityMS,
            PART_75_FLOW_LIMITS,
        )
        .unwrap();
        assert!(ok
            .bias_words(&show)
            .contains("reads low by 0.02 m/s on average, within"));
        // set 3: the monitor reads above the reference method
        let high = evaluate_rata(
            used_runs(&RM3, &CEM3),
            RataQuantity::VelocityMS,
            PART_75_FLOW_LIMITS,
        )
        .unwrap();
        assert_eq!(high.bias_direction(), BiasDirection::High);
        assert!(high.bias_words(&show).starts_with("the monitor reads high"));
        assert_eq!(high.bias.adjustment_factor, 1.0);
    }

    #[test]
    fn each_load_level_gets_its_own_result() {
        let cem: Vec<f64> = RM1.iter().zip(D1).map(|(r, d)| r - d).collect();
        let mut runs = Vec::new();
        for (i, (r, c)) in RM1.iter().zip(&cem).enumerate() {
            runs.push((
                "high".to_string(),
                RataRun::used(format!("H{i}"), *r, *c).unwrap(),
            ));
        }
        for (i, (r, c)) in RM3.iter().zip(&CEM3).enumerate() {
            runs.push((
                "low".to_string(),
                RataRun::used(format!("L{i}"), *r, *c).unwrap(),
            ));
        }
        let levels = evaluate_levels(runs, RataQuantity::VelocityMS, PART_75_FLOW_LIMITS);
        assert_eq!(levels.len(), 2);
        assert_eq!(levels[0].level, "high");
        let high = levels[0].result.as_ref().unwrap();
        // the high level alone is set 1 (checked above against the same numbers)
        assert!(close(high.relative_accuracy_percent, 0.5505545610));
        let low = levels[1].result.as_ref().unwrap();
        assert_eq!(low.used_runs, 9);
        assert_eq!(low.bias_direction(), BiasDirection::High);
        // a level with too few runs fails on its own without hiding the other
        let few = vec![("x".to_string(), RataRun::used("1", 1.0, 1.0).unwrap())];
        let r = evaluate_levels(few, RataQuantity::Flow, PART_75_FLOW_LIMITS);
        assert!(matches!(r[0].result, Err(RataError::TooFewUsed { .. })));
    }
}
