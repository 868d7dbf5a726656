//! An air system measured against its design: the arithmetic of a test-and-balance submittal.
//!
//! Owns what is computed over a whole system: each duct's measured flow on the basis of its design,
//! percent of design and the tolerance verdict; branches summed against their duct; outside air
//! (by difference or measured); the fan against its design through the fan laws; terminals against
//! their design and summed against their branch; the system's verdict.
//!
//! Must not read files, print, or look at the clock: each duct's measurement arrives as a
//! [`DuctMeasurement`] the pipeline computed from the duct's survey, and the system description as
//! a [`SystemSpec`] that `input::system_file` read. Wording for screens and pages is in [`words`].

pub mod evaluate;
pub mod fan;
pub mod relations;
pub mod rules;
pub mod spec;
pub mod terminals;
pub mod words;

pub use evaluate::{evaluate, DuctResult, SystemResult};
pub use spec::{
    validate, Deficiency, DeficiencyStatus, DesignFlow, DuctSpec, FanSpec, Role, SpecError,
    SystemSpec, TerminalReading, TerminalSpec, Tolerance,
};

use crate::checks::Status;
use crate::units::FlowBasis;
use serde::Serialize;

/// A duct's measured flow on every basis (the average of its survey's valid runs), m³/s.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct FlowSet {
    pub actual_m3_s: f64,
    /// Standard flow under the survey's convention (HVAC: standard air by density).
    pub standard_m3_s: f64,
    pub dry_standard_m3_s: f64,
    /// At 0 °C and 101.325 kPa, wet and dry.
    pub normal_m3_s: f64,
    pub normal_dry_m3_s: f64,
}

impl FlowSet {
    /// The flow on `basis`.
    pub fn on(&self, basis: FlowBasis) -> f64 {
        match basis {
            FlowBasis::Actual => self.actual_m3_s,
            FlowBasis::Standard => self.standard_m3_s,
            FlowBasis::DryStandard => self.dry_standard_m3_s,
            FlowBasis::Normal => self.normal_m3_s,
            FlowBasis::NormalDry => self.normal_dry_m3_s,
        }
    }

    /// A flow of `basis` expressed on `to` at this duct's measured conditions (the ratio of the
    /// two measured flows). Used to put a design given on one basis beside flows on another.
    pub fn convert(&self, flow_m3_s: f64, from: FlowBasis, to: FlowBasis) -> f64 {
        if from == to {
            return flow_m3_s;
        }
        let f = self.on(from);
        if f > 0.0 {
            flow_m3_s * self.on(to) / f
        } else {
            flow_m3_s
        }
    }
}

/// What the survey of one duct measured, as the system needs it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DuctMeasurement {
    pub flows: FlowSet,
    /// Mean (face) velocity over the plane.
    pub mean_velocity_m_s: f64,
    pub area_m2: f64,
    /// The duct's static (gauge) pressure at the plane, when the survey gives it.
    pub static_pa: Option<f64>,
    /// Relative expanded uncertainty of the duct's flow (about 95 %), when a budget was made.
    pub expanded_uncertainty: Option<f64>,
    /// The verdict of the survey's own acceptance checks.
    pub traverse_checks: Status,
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_flow_set_answers_on_each_basis_and_converts_at_measured_conditions() {
        let f = FlowSet {
            actual_m3_s: 4.0,
            standard_m3_s: 3.8,
            dry_standard_m3_s: 3.75,
            normal_m3_s: 3.6,
            normal_dry_m3_s: 3.55,
        };
        for (b, v) in [
            (FlowBasis::Actual, 4.0),
            (FlowBasis::Standard, 3.8),
            (FlowBasis::DryStandard, 3.75),
            (FlowBasis::Normal, 3.6),
            (FlowBasis::NormalDry, 3.55),
        ] {
            assert_eq!(f.on(b), v);
        }
        // 2.0 actual at these conditions is 2.0 · 3.8/4.0 = 1.9 standard (ratio of the measured flows)
        assert!((f.convert(2.0, FlowBasis::Actual, FlowBasis::Standard) - 1.9).abs() < 1e-12);
        assert_eq!(
            f.convert(2.0, FlowBasis::Standard, FlowBasis::Standard),
            2.0
        );
    }
}
