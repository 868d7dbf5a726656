//! The fan against its design: measured flow (the sum of the ducts that carry its air), and from
//! the fan laws the speed that would give design flow, the static pressure, power and (as a stated
//! estimate) motor current at that speed, set against the design and the motor nameplate.
//!
//! The fan laws hold for one fan in one unchanged system (no damper, filter or coil change) at
//! constant air density; see [`super::rules::FAN_LAWS_SOURCE`].

use super::rules::{
    judge_percent_of_design, percent_of, FAN_LAW_FLOW_EXPONENT, FAN_LAW_POWER_EXPONENT,
    FAN_LAW_PRESSURE_EXPONENT,
};
use super::spec::SystemSpec;
use super::DuctMeasurement;
use crate::checks::Status;
use crate::units::FlowBasis;
use serde::Serialize;

/// Something about the motor worth a warning.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum MotorFinding {
    /// The motor already draws more than its nameplate current.
    CurrentAboveRating { measured_a: f64, rated_a: f64 },
    /// At the speed for design flow the estimated current exceeds the nameplate.
    CurrentWouldExceedRating { estimate_a: f64, rated_a: f64 },
    /// The measured power exceeds the motor's rated power.
    PowerAboveRating { measured_w: f64, rated_w: f64 },
    /// At the speed for design flow the power would exceed the motor's rating.
    PowerWouldExceedRating { estimate_w: f64, rated_w: f64 },
}

/// The fan sheet. Speeds in rpm, pressures in Pa, currents in A, powers in W. "At design rpm"
/// means at `rpm_for_design`, the speed the fan laws give for design flow.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FanResult {
    pub tag: String,
    pub basis: FlowBasis,
    /// The ducts whose flows make the fan's.
    pub ducts: Vec<String>,
    pub design_flow_m3_s: f64,
    pub measured_flow_m3_s: f64,
    pub percent_of_design: Option<f64>,
    pub tolerance_percent: f64,
    pub within_tolerance: bool,
    pub status: Status,
    /// design flow / measured flow: the speed ratio that would give design flow.
    pub speed_ratio: Option<f64>,
    pub design_rpm: Option<f64>,
    pub measured_rpm: Option<f64>,
    pub rpm_for_design: Option<f64>,
    pub design_static_pa: Option<f64>,
    pub measured_static_pa: Option<f64>,
    pub static_at_design_rpm_pa: Option<f64>,
    pub motor_amps_rated: Option<f64>,
    pub measured_amps: Option<f64>,
    /// Estimate: current proportional to shaft power ([`super::rules::MOTOR_CURRENT_ESTIMATE`]).
    pub amps_at_design_rpm: Option<f64>,
    pub motor_power_rated_w: Option<f64>,
    pub measured_power_w: Option<f64>,
    pub power_at_design_rpm_w: Option<f64>,
    /// Warn when the motor is, or would be, above its rating.
    pub motor: Status,
    pub motor_findings: Vec<MotorFinding>,
}

/// The fan sheet, when the system has a fan.
pub fn fan(spec: &SystemSpec, measured: &[DuctMeasurement]) -> Option<FanResult> {
    let f = spec.fan.as_ref()?;
    let basis = f.design_flow.basis;
    let ducts: Vec<usize> = spec
        .fan_ducts()
        .iter()
        .filter_map(|d| spec.ducts.iter().position(|e| e.tag == d.tag))
        .collect();
    let flow: f64 = ducts.iter().map(|&i| measured[i].flows.on(basis)).sum();
    let tolerance = f.tolerance.as_ref().unwrap_or(&spec.tolerance).fraction;
    let pct = percent_of(flow, f.design_flow.m3_s);
    let status = pct
        .map(|p| judge_percent_of_design(p, tolerance))
        .unwrap_or(Status::NotApplicable);
    // Fan laws: N2/N1 = Q2/Q1, p2/p1 = (N2/N1)², P2/P1 = (N2/N1)³.
    let ratio = (flow > 0.0).then(|| f.design_flow.m3_s / flow);
    let law = |exp: i32, v: Option<f64>| -> Option<f64> { Some(v? * ratio?.powi(exp)) };
    let amps = law(FAN_LAW_POWER_EXPONENT, f.measured_amps);
    let power = law(FAN_LAW_POWER_EXPONENT, f.measured_power_w);
    let mut findings = Vec::new();
    if let (Some(m), Some(r)) = (f.measured_amps, f.motor_amps_rated) {
        if m > r {
            findings.push(MotorFinding::CurrentAboveRating {
                measured_a: m,
                rated_a: r,
            });
        }
    }
    if let (Some(e), Some(r)) = (amps, f.motor_amps_rated) {
        if e > r {
            findings.push(MotorFinding::CurrentWouldExceedRating {
                estimate_a: e,
                rated_a: r,
            });
        }
    }
    if let (Some(m), Some(r)) = (f.measured_power_w, f.motor_power_rated_w) {
        if m > r {
            findings.push(MotorFinding::PowerAboveRating {
                measured_w: m,
                rated_w: r,
            });
        }
    }
    if let (Some(e), Some(r)) = (power, f.motor_power_rated_w) {
        if e > r {
            findings.push(MotorFinding::PowerWouldExceedRating {
                estimate_w: e,
                rated_w: r,
            });
        }
    }
    Some(FanResult {
        tag: f.tag.clone(),
        basis,
        ducts: ducts.iter().map(|&i| spec.ducts[i].tag.clone()).collect(),
        design_flow_m3_s: f.design_flow.m3_s,
        measured_flow_m3_s: flow,
        percent_of_design: pct,
        tolerance_percent: 100.0 * tolerance,
        within_tolerance: status == Status::Pass,
        status,
        speed_ratio: ratio,
        design_rpm: f.design_rpm,
        measured_rpm: f.measured_rpm,
        rpm_for_design: law(FAN_LAW_FLOW_EXPONENT, f.measured_rpm),
        design_static_pa: f.design_static_pa,
        measured_static_pa: f.measured_static_pa,
        static_at_design_rpm_pa: law(FAN_LAW_PRESSURE_EXPONENT, f.measured_static_pa),
        motor_amps_rated: f.motor_amps_rated,
        measured_amps: f.measured_amps,
        amps_at_design_rpm: amps,
        motor_power_rated_w: f.motor_power_rated_w,
        measured_power_w: f.measured_power_w,
        power_at_design_rpm_w: power,
        motor: if findings.is_empty() {
            Status::Pass
        } else {
            Status::Warn
        },
        motor_findings: findings,
    })
}

#[cfg(test)]
mod tests {
    use super::super::spec::testkit::*;
    use super::super::spec::{DesignFlow, FanSpec, Role};
    use super::*;
    use crate::units::PA_PER_INH2O;

    fn close(a: f64, b: f64, rel: f64) -> bool {
        (a - b).abs() <= rel * b.abs()
    }

    fn contract_fan() -> FanSpec {
        // The contract's example fan: 8000 cfm at 1150 rpm and 2.5 inH2O; measured 1100 rpm,
        // 2.2 inH2O, 18.4 A on a 21 A motor.
        FanSpec {
            tag: "SF-1".into(),
            design_flow: DesignFlow {
                m3_s: 8000.0 * CFM,
                basis: FlowBasis::Actual,
                raw: "8000 cfm".into(),
            },
            ducts: vec![],
            design_rpm: Some(1150.0),
            measured_rpm: Some(1100.0),
            design_static_pa: Some(2.5 * PA_PER_INH2O),
            measured_static_pa: Some(2.2 * PA_PER_INH2O),
            motor_amps_rated: Some(21.0),
            measured_amps: Some(18.4),
            motor_power_rated_w: None,
            measured_power_w: None,
            tolerance: None,
        }
    }

    #[test]
    fn fan_laws_give_speed_static_and_current_for_design_flow() {
        let mut s = system(vec![duct("SA", Role::Supply, None, 8000.0)]);
        s.fan = Some(contract_fan());
        let r = fan(&s, &[measured(7600.0, None)]).expect("fan");
        // hand-worked: 7600/8000 = 95.0 % of design, within ±10 % (common practice tolerance)
        assert!(close(r.percent_of_design.unwrap_or(0.0), 95.0, 1e-12));
        assert_eq!(r.status, Status::Pass);
        // fan laws (AMCA Publication 201; ASHRAE Handbook—HVAC Systems and Equipment, Fans):
        // N = 1100 · 8000/7600 = 1157.895 rpm
        assert!(close(
            r.rpm_for_design.unwrap_or(0.0),
            1_157.894_736_842_105,
            1e-12
        ));
        // p = 2.2 · (8000/7600)² = 2.437 673 inH2O
        assert!(close(
            r.static_at_design_rpm_pa.unwrap_or(0.0) / PA_PER_INH2O,
            2.437_673_130_193_905,
            1e-12
        ));
        // I ≈ 18.4 · (8000/7600)³ = 21.4609 A (stated estimate: current ∝ shaft power) > 21 A
        assert!(close(
            r.amps_at_design_rpm.unwrap_or(0.0),
            21.460_854_351_946_345,
            1e-12
        ));
        assert_eq!(r.motor, Status::Warn);
        assert_eq!(
            r.motor_findings,
            vec![MotorFinding::CurrentWouldExceedRating {
                estimate_a: r.amps_at_design_rpm.unwrap_or(0.0),
                rated_a: 21.0
            }]
        );
    }

    #[test]
    fn power_follows_the_cube_and_is_set_against_the_motor_rating() {
        let mut s = system(vec![
            duct("SA-1", Role::Supply, None, 4000.0),
            duct("SA-2", Role::Supply, None, 4000.0),
        ]);
        let mut f = contract_fan();
        f.measured_power_w = Some(4000.0);
        f.motor_power_rated_w = Some(5595.0);
        f.measured_amps = Some(15.0);
        s.fan = Some(f);
        let r = fan(&s, &[measured(3900.0, None), measured(4100.0, None)]).expect("fan");
        // the fan's flow is the sum of the supply ducts: 3900 + 4100 = 8000 cfm → ratio 1
        assert_eq!(r.ducts, ["SA-1", "SA-2"]);
        assert!(close(r.percent_of_design.unwrap_or(0.0), 100.0, 1e-12));
        assert!(close(r.power_at_design_rpm_w.unwrap_or(0.0), 4000.0, 1e-12));
        assert_eq!(r.motor, Status::Pass);

        // 25 % short: ratio 4/3, power 4000 · (4/3)³ = 9481.48 W > 5595 W rated; 75 % of design fails
        let r = fan(&s, &[measured(3000.0, None), measured(3000.0, None)]).expect("fan");
        assert!(close(r.percent_of_design.unwrap_or(0.0), 75.0, 1e-12));
        assert_eq!(r.status, Status::Fail);
        assert!(close(
            r.power_at_design_rpm_w.unwrap_or(0.0),
            4000.0 * 64.0 / 27.0,
            1e-12
        ));
        assert!(r.motor_findings.iter().any(|m| matches!(
            m,
            MotorFinding::PowerWouldExceedRating { rated_w, .. } if *rated_w == 5595.0
        )));
    }

    #[test]
    fn a_fan_on_named_ducts_without_readings_gives_no_fan_law_figures() {
        let mut s = system(vec![
            duct("SA", Role::Supply, None, 8000.0),
            duct("RA", Role::Return, None, 6400.0),
        ]);
        let mut f = contract_fan();
        f.ducts = vec!["RA".into()];
        f.design_flow.m3_s = 6400.0 * CFM;
        f.measured_rpm = None;
        f.measured_static_pa = None;
        f.measured_amps = None;
        s.fan = Some(f);
        let r = fan(&s, &[measured(8000.0, None), measured(6000.0, None)]).expect("fan");
        assert_eq!(r.ducts, ["RA"]);
        // 6000/6400 = 93.75 %
        assert!(close(r.percent_of_design.unwrap_or(0.0), 93.75, 1e-12));
        assert!(close(r.speed_ratio.unwrap_or(0.0), 6400.0 / 6000.0, 1e-12));
        assert_eq!(r.rpm_for_design, None);
        assert_eq!(r.static_at_design_rpm_pa, None);
        assert_eq!(r.amps_at_design_rpm, None);
    }
}
