//! Relations between ducts: branches summed against the duct they are taken off, and the outside
//! air (supply − return, or measured in its own duct and then compared with the difference).
//!
//! Relations compare flows on one basis: the design basis of the duct they are measured against
//! (the main for its branches, the first supply duct for outside air). A difference is reported as
//! a difference; no cause (leakage, a reading error, an untested branch) is claimed.

use super::rules::{difference_percent, judge_difference, judge_percent_of_design, percent_of};
use super::spec::{Role, SystemSpec};
use super::DuctMeasurement;
use crate::checks::Status;
use crate::units::FlowBasis;
use serde::Serialize;

/// The branches of one duct summed and compared with the duct's own traverse.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BranchSum {
    /// The duct the branches are taken off.
    pub of: String,
    /// The basis the flows are compared on (the main's design basis).
    pub basis: FlowBasis,
    pub branches: Vec<String>,
    pub sum_m3_s: f64,
    pub main_m3_s: f64,
    /// sum − main.
    pub difference_m3_s: f64,
    /// (sum − main) / main · 100; `null` when the main measured no flow.
    pub difference_percent: Option<f64>,
    pub tolerance_percent: f64,
    pub within_tolerance: bool,
    pub status: Status,
}

/// Sums the branches of every duct that has any, in the order the mains appear in the file.
pub fn branch_sums(spec: &SystemSpec, measured: &[DuctMeasurement]) -> Vec<BranchSum> {
    let mut out = Vec::new();
    for (mi, main) in spec.ducts.iter().enumerate() {
        let children: Vec<usize> = spec
            .ducts
            .iter()
            .enumerate()
            .filter(|(_, d)| d.role == Role::Branch && d.of.as_deref() == Some(main.tag.as_str()))
            .map(|(i, _)| i)
            .collect();
        if children.is_empty() {
            continue;
        }
        let basis = main.design.basis;
        let sum: f64 = children.iter().map(|&i| measured[i].flows.on(basis)).sum();
        let main_flow = measured[mi].flows.on(basis);
        let tolerance = spec.tolerance_of(main).fraction;
        let diff_pct = difference_percent(sum, main_flow);
        let status = judge_difference(diff_pct, tolerance);
        out.push(BranchSum {
            of: main.tag.clone(),
            basis,
            branches: children
                .iter()
                .map(|&i| spec.ducts[i].tag.clone())
                .collect(),
            sum_m3_s: sum,
            main_m3_s: main_flow,
            difference_m3_s: sum - main_flow,
            difference_percent: diff_pct,
            tolerance_percent: 100.0 * tolerance,
            within_tolerance: status == Status::Pass,
            status,
        });
    }
    out
}

/// How the outside air flow was found.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum OutsideAirMethod {
    /// Supply − return.
    Difference,
    /// Traversed in its own duct(s).
    Measured,
}

/// The outside air by difference set beside the outside air measured in its duct.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DifferenceCheck {
    /// Supply − return.
    pub flow_m3_s: f64,
    /// (supply − return) − measured.
    pub difference_m3_s: f64,
    /// Of the measured outside air; `null` when that is zero.
    pub difference_percent: Option<f64>,
    /// Expanded uncertainty of the difference between the two figures, when every duct involved
    /// has a budget: √(U(S)² + U(R)² + U(OA)²), the root-sum-square of independent expanded
    /// uncertainties (an approximation when coverage factors differ).
    pub uncertainty_m3_s: Option<f64>,
    /// |difference| ≤ its uncertainty: the two figures agree within what the traverses can tell.
    pub consistent: Option<bool>,
}

/// Outside air: its flow, its share of the supply, and both against design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct OutsideAir {
    pub method: OutsideAirMethod,
    pub basis: FlowBasis,
    pub flow_m3_s: f64,
    /// outside / supply · 100.
    pub percent_of_supply: Option<f64>,
    pub supply_m3_s: f64,
    pub supply_ducts: Vec<String>,
    pub return_m3_s: Option<f64>,
    pub return_ducts: Vec<String>,
    pub outside_ducts: Vec<String>,
    /// Expanded uncertainty (about 95 %) of `flow_m3_s`, from the ducts' budgets.
    pub uncertainty_m3_s: Option<f64>,
    /// The outside air the design calls for: the outside-air ducts' designs, or supply design −
    /// return design when there is no outside-air duct.
    pub design_flow_m3_s: Option<f64>,
    pub design_percent_of_supply: Option<f64>,
    /// A design on another basis was put on `basis` at its duct's measured conditions.
    pub design_converted: bool,
    pub percent_of_design: Option<f64>,
    pub tolerance_percent: f64,
    pub within_tolerance: bool,
    pub status: Status,
    /// With an outside-air duct and a return: the difference set beside the measurement.
    pub by_difference: Option<DifferenceCheck>,
}

/// Root-sum-square of expanded uncertainties of independent flows, `None` when one is missing.
fn combined_uncertainty(parts: &[(f64, Option<f64>)]) -> Option<f64> {
    let mut sum = 0.0;
    for (flow, u) in parts {
        let u = (*u)?;
        sum += (flow * u).powi(2);
    }
    Some(sum.sqrt())
}

/// The outside air, when the system has a supply and a return or an outside-air duct.
pub fn outside_air(spec: &SystemSpec, measured: &[DuctMeasurement]) -> Option<OutsideAir> {
    let idx = |role: Role| -> Vec<usize> {
        spec.ducts
            .iter()
            .enumerate()
            .filter(|(_, d)| d.role == role)
            .map(|(i, _)| i)
            .collect()
    };
    let (supply, ret, outside) = (idx(Role::Supply), idx(Role::Return), idx(Role::Outside));
    let first_supply = *supply.first()?;
    if ret.is_empty() && outside.is_empty() {
        return None;
    }
    let basis = spec.ducts[first_supply].design.basis;
    let mut converted = false;
    let mut design_on_basis = |i: usize| {
        let d = &spec.ducts[i].design;
        converted |= d.basis != basis;
        measured[i].flows.convert(d.m3_s, d.basis, basis)
    };
    let flow = |set: &[usize]| {
        set.iter()
            .map(|&i| measured[i].flows.on(basis))
            .sum::<f64>()
    };
    let parts = |set: &[usize]| -> Vec<(f64, Option<f64>)> {
        set.iter()
            .map(|&i| {
                (
                    measured[i].flows.on(basis),
                    measured[i].expanded_uncertainty,
                )
            })
            .collect()
    };
    let tags =
        |set: &[usize]| -> Vec<String> { set.iter().map(|&i| spec.ducts[i].tag.clone()).collect() };
    let supply_flow = flow(&supply);
    let supply_design: f64 = supply.iter().map(|&i| design_on_basis(i)).sum();
    let return_flow = (!ret.is_empty()).then(|| flow(&ret));
    let return_design: f64 = ret.iter().map(|&i| design_on_basis(i)).sum();
    let sr_parts: Vec<(f64, Option<f64>)> = parts(&supply).into_iter().chain(parts(&ret)).collect();

    let (method, oa_flow, design, uncertainty, by_difference) = if outside.is_empty() {
        let oa = supply_flow - return_flow.unwrap_or(0.0);
        let design = supply_design - return_design;
        (
            OutsideAirMethod::Difference,
            oa,
            (design > 0.0).then_some(design),
            combined_uncertainty(&sr_parts),
            None,
        )
    } else {
        let oa = flow(&outside);
        let design: f64 = outside.iter().map(|&i| design_on_basis(i)).sum();
        let u_oa = combined_uncertainty(&parts(&outside));
        let check = return_flow.map(|r| {
            let by_diff = supply_flow - r;
            let u = match (combined_uncertainty(&sr_parts), u_oa) {
                (Some(a), Some(b)) => Some((a * a + b * b).sqrt()),
                _ => None,
            };
            DifferenceCheck {
                flow_m3_s: by_diff,
                difference_m3_s: by_diff - oa,
                difference_percent: difference_percent(by_diff, oa),
                uncertainty_m3_s: u,
                consistent: u.map(|u| (by_diff - oa).abs() <= u),
            }
        });
        (OutsideAirMethod::Measured, oa, Some(design), u_oa, check)
    };
    // One outside-air duct with its own tolerance keeps it; otherwise the system's.
    let tolerance = match outside.as_slice() {
        [only] => spec.tolerance_of(&spec.ducts[*only]).fraction,
        _ => spec.tolerance.fraction,
    };
    let pct_design = design.and_then(|d| percent_of(oa_flow, d));
    let status = match pct_design {
        Some(p) => judge_percent_of_design(p, tolerance),
        None => Status::NotApplicable,
    };
    Some(OutsideAir {
        method,
        basis,
        flow_m3_s: oa_flow,
        percent_of_supply: percent_of(oa_flow, supply_flow),
        supply_m3_s: supply_flow,
        supply_ducts: tags(&supply),
        return_m3_s: return_flow,
        return_ducts: tags(&ret),
        outside_ducts: tags(&outside),
        uncertainty_m3_s: uncertainty,
        design_flow_m3_s: design,
        design_percent_of_supply: design.and_then(|d| percent_of(d, supply_design)),
        design_converted: converted,
        percent_of_design: pct_design,
        tolerance_percent: 100.0 * tolerance,
        within_tolerance: status == Status::Pass,
        status,
        by_difference,
    })
}

#[cfg(test)]
mod tests {
    use super::super::spec::testkit::*;
    use super::*;

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= 1e-9 * b.abs().max(1.0)
    }

    #[test]
    fn branches_are_summed_against_their_main() {
        let s = system(vec![
            duct("SA", Role::Supply, None, 8000.0),
            duct("SA-1", Role::Branch, Some("SA"), 3000.0),
            duct("SA-2", Role::Branch, Some("SA"), 2800.0),
            duct("SA-3", Role::Branch, Some("SA"), 2200.0),
            duct("RA", Role::Return, None, 6400.0),
        ]);
        let m = [
            measured(8120.0, None),
            measured(3050.0, None),
            measured(2710.0, None),
            measured(2040.0, None),
            measured(6300.0, None),
        ];
        let sums = branch_sums(&s, &m);
        assert_eq!(sums.len(), 1);
        let b = &sums[0];
        assert_eq!(b.branches, ["SA-1", "SA-2", "SA-3"]);
        // hand-worked: 3050 + 2710 + 2040 = 7800 cfm; (7800 − 8120)/8120 = −3.9409 % (common
        // practice: branch traverses summed against the main's)
        assert!(close(b.sum_m3_s / CFM, 7800.0));
        assert!(close(b.difference_m3_s / CFM, -320.0));
        assert!(close(
            b.difference_percent.unwrap_or(0.0),
            -3.940_886_699_507_389
        ));
        assert_eq!(b.status, Status::Pass);
        assert_eq!(b.basis, FlowBasis::Actual);
    }

    #[test]
    fn branch_sums_outside_tolerance_fail_and_follow_the_main_basis() {
        let mut s = system(vec![
            duct("SA", Role::Supply, None, 8000.0),
            duct("SA-1", Role::Branch, Some("SA"), 3000.0),
        ]);
        s.ducts[0].design.basis = FlowBasis::Standard;
        let m = [measured(8000.0, None), measured(3000.0, None)];
        let b = &branch_sums(&s, &m)[0];
        // on the standard basis: 0.98·3000 vs 0.98·8000 → (2940 − 7840)/7840 = −62.5 %
        assert_eq!(b.basis, FlowBasis::Standard);
        assert!(close(b.difference_percent.unwrap_or(0.0), -62.5));
        assert_eq!(b.status, Status::Fail);
        assert!(!b.within_tolerance);
    }

    #[test]
    fn outside_air_by_difference() {
        let s = system(vec![
            duct("SA", Role::Supply, None, 8000.0),
            duct("RA", Role::Return, None, 6400.0),
        ]);
        let m = [measured(8120.0, Some(0.05)), measured(6300.0, Some(0.06))];
        let oa = outside_air(&s, &m).expect("supply and return");
        assert_eq!(oa.method, OutsideAirMethod::Difference);
        // hand-worked: 8120 − 6300 = 1820 cfm; 1820/8120 = 22.4138 % of supply;
        // design 8000 − 6400 = 1600 cfm (20 % of supply design); 1820/1600 = 113.75 % → outside
        // ±10 % (common practice: outside air = supply − return when not measured directly)
        assert!(close(oa.flow_m3_s / CFM, 1820.0));
        assert!(close(
            oa.percent_of_supply.unwrap_or(0.0),
            22.413_793_103_448_278
        ));
        assert!(close(oa.design_flow_m3_s.unwrap_or(0.0) / CFM, 1600.0));
        assert!(close(oa.design_percent_of_supply.unwrap_or(0.0), 20.0));
        assert!(close(oa.percent_of_design.unwrap_or(0.0), 113.75));
        assert_eq!(oa.status, Status::Fail);
        // GUM (JCGM 100:2008) §5.1.2 with sensitivities ±1: √((0.05·8120)² + (0.06·6300)²)
        // = √(406² + 378²) = 554.72 cfm
        assert!(close(
            oa.uncertainty_m3_s.unwrap_or(0.0) / CFM,
            (406.0f64.powi(2) + 378.0f64.powi(2)).sqrt()
        ));
        assert!(oa.by_difference.is_none());
    }

    #[test]
    fn measured_outside_air_is_compared_with_the_difference() {
        let s = system(vec![
            duct("SA", Role::Supply, None, 8000.0),
            duct("RA", Role::Return, None, 6400.0),
            duct("OA", Role::Outside, None, 1600.0),
        ]);
        let m = [
            measured(8120.0, Some(0.05)),
            measured(6300.0, Some(0.06)),
            measured(1650.0, Some(0.08)),
        ];
        let oa = outside_air(&s, &m).expect("outside air");
        assert_eq!(oa.method, OutsideAirMethod::Measured);
        // 1650/1600 = 103.125 % of design; 1650/8120 = 20.3202 % of supply
        assert!(close(oa.percent_of_design.unwrap_or(0.0), 103.125));
        assert!(close(
            oa.percent_of_supply.unwrap_or(0.0),
            20.320_197_044_334_975
        ));
        assert_eq!(oa.status, Status::Pass);
        let c = oa.by_difference.as_ref().expect("return present");
        // 1820 by difference − 1650 measured = 170 cfm, 10.303 % of the measurement
        assert!(close(c.difference_m3_s / CFM, 170.0));
        assert!(close(
            c.difference_percent.unwrap_or(0.0),
            10.303_030_303_030_303
        ));
        // √(406² + 378² + 132²) = 566.27 cfm ≥ 170: consistent (|E_n| ≤ 1, ISO/IEC 17043 Annex B form)
        let u = (406.0f64.powi(2) + 378.0f64.powi(2) + 132.0f64.powi(2)).sqrt();
        assert!(close(c.uncertainty_m3_s.unwrap_or(0.0) / CFM, u));
        assert_eq!(c.consistent, Some(true));
    }

    #[test]
    fn no_outside_air_without_a_supply_or_a_second_duct() {
        let s = system(vec![duct("SA", Role::Supply, None, 8000.0)]);
        assert!(outside_air(&s, &[measured(8000.0, None)]).is_none());
        let s = system(vec![duct("RA", Role::Return, None, 8000.0)]);
        assert!(outside_air(&s, &[measured(8000.0, None)]).is_none());
    }

    #[test]
    fn designs_on_another_basis_are_converted_at_measured_conditions() {
        let mut s = system(vec![
            duct("SA", Role::Supply, None, 8000.0),
            duct("RA", Role::Return, None, 6400.0),
        ]);
        s.ducts[1].design.basis = FlowBasis::Standard;
        let m = [measured(8000.0, None), measured(6272.0, None)];
        let oa = outside_air(&s, &m).expect("outside air");
        // RA design 6400 scfm at the return's measured ratio actual/standard = 1/0.98 → 6530.6 acfm
        assert!(oa.design_converted);
        assert!(close(
            oa.design_flow_m3_s.unwrap_or(0.0) / CFM,
            8000.0 - 6400.0 / 0.98
        ));
    }
}
