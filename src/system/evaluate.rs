//! The whole system against its design: every duct, the relations, the fan, the terminals, and
//! the verdict.

use super::fan::{fan, FanResult};
use super::relations::{branch_sums, outside_air, BranchSum, OutsideAir};
use super::rules::{judge_percent_of_design, percent_of};
use super::spec::{validate, Role, SpecError, SystemSpec};
use super::terminals::{terminal_sums, terminals, TerminalResult, TerminalSum};
use super::DuctMeasurement;
use crate::checks::Status;
use crate::units::FlowBasis;
use serde::Serialize;

/// One duct against its design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DuctResult {
    pub tag: String,
    pub role: Role,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub of: Option<String>,
    pub design_flow_m3_s: f64,
    pub design_basis: FlowBasis,
    /// The duct's measured flow on the design's basis.
    pub measured_flow_m3_s: f64,
    pub percent_of_design: Option<f64>,
    pub tolerance_percent: f64,
    /// Where the tolerance comes from: `default`, `system` or `duct`.
    pub tolerance_from: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub tolerance_reason: Option<String>,
    pub within_tolerance: bool,
    pub status: Status,
    pub mean_velocity_m_s: f64,
    pub area_m2: f64,
    pub static_pa: Option<f64>,
    /// Relative expanded uncertainty of the measured flow (about 95 %), when budgeted.
    pub expanded_uncertainty: Option<f64>,
    /// The verdict of the duct's own traverse acceptance checks.
    pub traverse_checks: Status,
}

/// Everything computed over the system. Serialised with the contract's keys (`ducts`,
/// `branches`, `outside_air`, `fan`, `terminals`, `verdict`) and more.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SystemResult {
    pub ducts: Vec<DuctResult>,
    pub branches: Vec<BranchSum>,
    pub outside_air: Option<OutsideAir>,
    pub fan: Option<FanResult>,
    pub terminals: Vec<TerminalResult>,
    pub terminal_sums: Vec<TerminalSum>,
    /// `fail` when a duct, a relation, the fan or a terminal is outside tolerance; `warn` when the
    /// motor is or would be above its rating or a duct's traverse failed its acceptance checks;
    /// else `pass`.
    pub verdict: Status,
}

impl SystemResult {
    /// Every judged item's status, for the verdict and for counts.
    pub fn statuses(&self) -> impl Iterator<Item = Status> + '_ {
        self.ducts
            .iter()
            .map(|d| d.status)
            .chain(self.branches.iter().map(|b| b.status))
            .chain(self.outside_air.iter().map(|o| o.status))
            .chain(self.fan.iter().map(|f| f.status))
            .chain(self.terminals.iter().map(|t| t.status))
            .chain(self.terminal_sums.iter().map(|t| t.status))
    }

    /// How many judged items are outside tolerance.
    pub fn failures(&self) -> usize {
        self.statuses().filter(|s| *s == Status::Fail).count()
    }
}

/// Why a system cannot be evaluated.
#[derive(Debug, Clone, PartialEq)]
pub enum EvaluateError {
    /// The description does not stand (see [`validate`]).
    Spec(Vec<SpecError>),
    /// One measurement per duct is needed, in the spec's order.
    MeasurementCount { ducts: usize, measurements: usize },
}

/// Evaluates a system from its description and one measurement per duct (in the spec's order).
pub fn evaluate(
    spec: &SystemSpec,
    measured: &[DuctMeasurement],
) -> Result<SystemResult, EvaluateError> {
    let errors = validate(spec);
    if !errors.is_empty() {
        return Err(EvaluateError::Spec(errors));
    }
    if measured.len() != spec.ducts.len() {
        return Err(EvaluateError::MeasurementCount {
            ducts: spec.ducts.len(),
            measurements: measured.len(),
        });
    }
    let ducts: Vec<DuctResult> = spec
        .ducts
        .iter()
        .zip(measured)
        .map(|(d, m)| {
            let (tolerance, from) = match &d.tolerance {
                Some(t) => (t, "duct"),
                None if spec.tolerance_given => (&spec.tolerance, "system"),
                None => (&spec.tolerance, "default"),
            };
            let flow = m.flows.on(d.design.basis);
            let pct = percent_of(flow, d.design.m3_s);
            let status = pct
                .map(|p| judge_percent_of_design(p, tolerance.fraction))
                .unwrap_or(Status::NotApplicable);
            DuctResult {
                tag: d.tag.clone(),
                role: d.role,
                of: d.of.clone(),
                design_flow_m3_s: d.design.m3_s,
                design_basis: d.design.basis,
                measured_flow_m3_s: flow,
                percent_of_design: pct,
                tolerance_percent: 100.0 * tolerance.fraction,
                tolerance_from: from,
                tolerance_reason: tolerance.reason.clone(),
                within_tolerance: status == Status::Pass,
                status,
                mean_velocity_m_s: m.mean_velocity_m_s,
                area_m2: m.area_m2,
                static_pa: m.static_pa,
                expanded_uncertainty: m.expanded_uncertainty,
                traverse_checks: m.traverse_checks,
            }
        })
        .collect();
    let terminal_results = terminals(spec);
    let mut result = SystemResult {
        branches: branch_sums(spec, measured),
        outside_air: outside_air(spec, measured),
        fan: fan(spec, measured),
        terminal_sums: terminal_sums(spec, &terminal_results, measured),
        terminals: terminal_results,
        ducts,
        verdict: Status::Pass,
    };
    let warned = result.fan.as_ref().is_some_and(|f| f.motor == Status::Warn)
        || result
            .ducts
            .iter()
            .any(|d| d.traverse_checks == Status::Fail);
    result.verdict = if result.failures() > 0 {
        Status::Fail
    } else if warned {
        Status::Warn
    } else {
        Status::Pass
    };
    Ok(result)
}

#[cfg(test)]
mod tests {
    use super::super::spec::testkit::*;
    use super::super::spec::Tolerance;
    use super::*;

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= 1e-9 * b.abs().max(1.0)
    }

    #[test]
    fn each_duct_on_its_design_basis_with_its_tolerance() {
        let mut s = system(vec![
            duct("SA", Role::Supply, None, 8000.0),
            duct("SA-1", Role::Branch, Some("SA"), 3000.0),
            duct("RA", Role::Return, None, 6400.0),
        ]);
        s.ducts[1].tolerance = Some(Tolerance {
            fraction: 0.05,
            reason: Some("critical branch".into()),
        });
        s.ducts[2].design.basis = FlowBasis::Standard;
        let m = [
            measured(8720.0, None),
            measured(3160.0, None),
            measured(6400.0, None),
        ];
        let r = evaluate(&s, &m).expect("valid");
        // hand-worked: 8720/8000 = 109.0 % → within ±10 % (default, common practice)
        assert!(close(r.ducts[0].percent_of_design.unwrap_or(0.0), 109.0));
        assert_eq!(r.ducts[0].status, Status::Pass);
        assert_eq!(r.ducts[0].tolerance_from, "default");
        // 3160/3000 = 105.333 % → outside the duct's own ±5 %
        assert!(close(
            r.ducts[1].percent_of_design.unwrap_or(0.0),
            105.333_333_333_333_33
        ));
        assert_eq!(r.ducts[1].status, Status::Fail);
        assert_eq!(r.ducts[1].tolerance_from, "duct");
        // the return's design is in scfm: its standard flow 0.98 · 6400 = 6272 against 6400 = 98 %
        assert!(close(r.ducts[2].measured_flow_m3_s / CFM, 6272.0));
        assert!(close(r.ducts[2].percent_of_design.unwrap_or(0.0), 98.0));
        assert_eq!(r.verdict, Status::Fail);
        // three items outside tolerance: SA-1, the branch sum of SA (one branch of 3160 against
        // 8720) and the outside air by difference (8720 − 6400 = 2320 against a design of
        // 8000 − 6400/0.98 = 1469 acfm)
        assert_eq!(r.failures(), 3);
        assert_eq!(r.branches[0].status, Status::Fail);
        assert_eq!(r.outside_air.as_ref().map(|o| o.status), Some(Status::Fail));
    }

    #[test]
    fn a_system_within_tolerance_passes_and_a_failed_traverse_warns() {
        let s = system(vec![duct("SA", Role::Supply, None, 8000.0)]);
        let mut m = measured(8000.0, None);
        assert_eq!(
            evaluate(&s, std::slice::from_ref(&m)).map(|r| r.verdict),
            Ok(Status::Pass)
        );
        m.traverse_checks = Status::Fail;
        assert_eq!(evaluate(&s, &[m]).map(|r| r.verdict), Ok(Status::Warn));
    }

    #[test]
    fn an_invalid_system_or_a_missing_measurement_is_refused() {
        let s = system(vec![duct("B", Role::Branch, Some("X"), 1.0)]);
        assert_eq!(
            evaluate(&s, &[measured(1.0, None)]),
            Err(EvaluateError::Spec(vec![SpecError::UnknownParent {
                index: 0
            }]))
        );
        let s = system(vec![duct("SA", Role::Supply, None, 1.0)]);
        assert_eq!(
            evaluate(&s, &[]),
            Err(EvaluateError::MeasurementCount {
                ducts: 1,
                measurements: 0
            })
        );
    }
}
