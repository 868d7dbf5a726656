//! The system's rules as data, each with its source: the default tolerance, how a percent of
//! design is judged, and the fan laws' exponents.

use crate::checks::Status;

/// Default ± tolerance on percent of design for ducts, relations, the fan and terminals.
/// Common practice: test-and-balance specifications most often accept ±10 % of design for air
/// flows; a specification's own figure goes in the system file (`tolerance`).
pub const DEFAULT_TOLERANCE: f64 = 0.10;

/// Where the default tolerance comes from, for screens and pages.
pub const DEFAULT_TOLERANCE_SOURCE: &str =
    "common practice: test-and-balance specifications most often accept ±10 % of design";

/// Floating-point slack when judging a percentage exactly on its limit (110.000 % of design
/// passes ±10 %): values are compared at a billionth of a percent.
const EDGE: f64 = 1e-9;

/// A measured percentage of design against ± `tolerance` (a fraction): pass when
/// |percent − 100| ≤ 100·tolerance.
pub fn judge_percent_of_design(percent: f64, tolerance: f64) -> Status {
    if !percent.is_finite() {
        return Status::NotApplicable;
    }
    if (percent - 100.0).abs() <= 100.0 * tolerance + EDGE {
        Status::Pass
    } else {
        Status::Fail
    }
}

/// A relative difference in percent (`(sum − main)/main·100`) against ± `tolerance`.
pub fn judge_difference(difference_percent: Option<f64>, tolerance: f64) -> Status {
    match difference_percent {
        Some(d) if d.is_finite() => judge_percent_of_design(100.0 + d, tolerance),
        _ => Status::NotApplicable,
    }
}

/// `measured / design · 100`, or `None` when the design is not positive.
pub fn percent_of(measured: f64, design: f64) -> Option<f64> {
    (design > 0.0 && measured.is_finite()).then(|| 100.0 * measured / design)
}

/// `(value − reference) / reference · 100`, or `None` when the reference is not positive.
pub fn difference_percent(value: f64, reference: f64) -> Option<f64> {
    (reference > 0.0 && value.is_finite()).then(|| 100.0 * (value - reference) / reference)
}

/// The fan laws (affinity laws) for one fan in one system at constant air density: flow varies
/// as speed, pressure as speed squared, power as speed cubed. Published in AMCA Publication 201
/// (Fans and Systems) and the ASHRAE Handbook—HVAC Systems and Equipment, chapter "Fans" (its
/// table of fan laws; chapter and table numbers from memory).
pub const FAN_LAWS_SOURCE: &str =
    "fan laws (AMCA Publication 201; ASHRAE Handbook—HVAC Systems and Equipment, Fans)";
/// Exponents of the speed ratio for flow, pressure and power.
pub const FAN_LAW_FLOW_EXPONENT: i32 = 1;
pub const FAN_LAW_PRESSURE_EXPONENT: i32 = 2;
pub const FAN_LAW_POWER_EXPONENT: i32 = 3;

/// The motor current at another speed is estimated as proportional to shaft power (so to the
/// cube of the speed ratio). A stated approximation (common practice for a first estimate): an
/// induction motor's current also carries a magnetising part that does not change with load,
/// so the estimate overstates the change — high when speeding up, low when slowing down — and
/// is no substitute for reading the amps after the drive is changed.
pub const MOTOR_CURRENT_ESTIMATE: &str = "motor current taken as proportional to shaft power \
     (speed ratio cubed); overstates the change, as the magnetising current does not scale";

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn percent_of_design_is_judged_inclusively_at_the_limit() {
        // ±10 %: 90.0 and 110.0 % pass, 89.9 and 110.1 % fail (the tolerance is a closed band,
        // common practice)
        assert_eq!(judge_percent_of_design(110.0, 0.10), Status::Pass);
        assert_eq!(judge_percent_of_design(90.0, 0.10), Status::Pass);
        assert_eq!(judge_percent_of_design(110.1, 0.10), Status::Fail);
        assert_eq!(judge_percent_of_design(89.9, 0.10), Status::Fail);
        assert_eq!(
            judge_percent_of_design(f64::NAN, 0.10),
            Status::NotApplicable
        );
        // (7600 − 8000)/8000 = −5 %: within ±5 % exactly
        assert_eq!(
            judge_difference(difference_percent(7600.0, 8000.0), 0.05),
            Status::Pass
        );
        assert_eq!(judge_difference(None, 0.05), Status::NotApplicable);
        assert_eq!(percent_of(1.0, 0.0), None);
    }
}
