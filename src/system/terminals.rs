//! Terminals (grilles, registers, diffusers): each against its design, and their sum per branch
//! against the branch's traverse.

use super::rules::{difference_percent, judge_difference, judge_percent_of_design, percent_of};
use super::spec::{SystemSpec, TerminalReading};
use super::DuctMeasurement;
use crate::checks::Status;
use crate::units::FlowBasis;
use serde::Serialize;

/// One terminal against its design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TerminalResult {
    pub tag: String,
    pub branch: String,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub room: Option<String>,
    #[serde(skip_serializing_if = "Option::is_none", rename = "type")]
    pub kind: Option<String>,
    pub basis: FlowBasis,
    pub design_flow_m3_s: f64,
    pub measured_flow_m3_s: f64,
    /// For a velocity reading: the face velocity and the area factor it was multiplied by.
    pub velocity_m_s: Option<f64>,
    pub area_m2: Option<f64>,
    pub percent_of_design: Option<f64>,
    pub tolerance_percent: f64,
    pub within_tolerance: bool,
    pub status: Status,
}

/// The terminals of one duct summed and compared with the duct's traverse.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TerminalSum {
    pub branch: String,
    pub basis: FlowBasis,
    pub terminals: Vec<String>,
    pub design_sum_m3_s: f64,
    pub sum_m3_s: f64,
    /// The branch's traverse on the terminals' basis.
    pub branch_m3_s: f64,
    /// sum − branch.
    pub difference_m3_s: f64,
    /// (sum − branch) / branch · 100.
    pub difference_percent: Option<f64>,
    pub tolerance_percent: f64,
    pub within_tolerance: bool,
    pub status: Status,
}

/// Every terminal against its design, with the system's tolerance.
pub fn terminals(spec: &SystemSpec) -> Vec<TerminalResult> {
    let tolerance = spec.tolerance.fraction;
    spec.terminals
        .iter()
        .map(|t| {
            let measured = t.reading.flow_m3_s();
            let pct = percent_of(measured, t.design_flow_m3_s);
            let status = pct
                .map(|p| judge_percent_of_design(p, tolerance))
                .unwrap_or(Status::NotApplicable);
            let (velocity, area) = match t.reading {
                TerminalReading::Flow { .. } => (None, None),
                TerminalReading::VelocityArea {
                    velocity_m_s,
                    area_m2,
                } => (Some(velocity_m_s), Some(area_m2)),
            };
            TerminalResult {
                tag: t.tag.clone(),
                branch: t.branch.clone(),
                room: t.room.clone(),
                kind: t.kind.clone(),
                basis: t.basis,
                design_flow_m3_s: t.design_flow_m3_s,
                measured_flow_m3_s: measured,
                velocity_m_s: velocity,
                area_m2: area,
                percent_of_design: pct,
                tolerance_percent: 100.0 * tolerance,
                within_tolerance: status == Status::Pass,
                status,
            }
        })
        .collect()
}

/// Sums the terminals per duct, in the order the ducts first appear among the terminals, and
/// compares each sum with the duct's traverse (on the terminals' basis) within the duct's tolerance.
pub fn terminal_sums(
    spec: &SystemSpec,
    results: &[TerminalResult],
    measured: &[DuctMeasurement],
) -> Vec<TerminalSum> {
    let mut order: Vec<&str> = Vec::new();
    for t in results {
        if !order.contains(&t.branch.as_str()) {
            order.push(&t.branch);
        }
    }
    order
        .into_iter()
        .filter_map(|branch| {
            let di = spec.ducts.iter().position(|d| d.tag == branch)?;
            let mine: Vec<&TerminalResult> =
                results.iter().filter(|t| t.branch == branch).collect();
            let basis = mine.first()?.basis;
            let sum: f64 = mine.iter().map(|t| t.measured_flow_m3_s).sum();
            let design: f64 = mine.iter().map(|t| t.design_flow_m3_s).sum();
            let traverse = measured[di].flows.on(basis);
            let tolerance = spec.tolerance_of(&spec.ducts[di]).fraction;
            let diff = difference_percent(sum, traverse);
            let status = judge_difference(diff, tolerance);
            Some(TerminalSum {
                branch: branch.to_string(),
                basis,
                terminals: mine.iter().map(|t| t.tag.clone()).collect(),
                design_sum_m3_s: design,
                sum_m3_s: sum,
                branch_m3_s: traverse,
                difference_m3_s: sum - traverse,
                difference_percent: diff,
                tolerance_percent: 100.0 * tolerance,
                within_tolerance: status == Status::Pass,
                status,
            })
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::super::spec::testkit::*;
    use super::super::spec::{Role, TerminalSpec};
    use super::*;

    const FPM: f64 = 0.00508; // 1 ft/min in m/s (exact)
    const FT2: f64 = 0.092_903_04; // 1 ft² in m² (exact)

    fn t(tag: &str, branch: &str, design_cfm: f64, reading: TerminalReading) -> TerminalSpec {
        TerminalSpec {
            tag: tag.into(),
            branch: branch.into(),
            room: None,
            kind: None,
            design_flow_m3_s: design_cfm * CFM,
            basis: FlowBasis::Actual,
            reading,
        }
    }

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= 1e-9 * b.abs().max(1.0)
    }

    #[test]
    fn terminals_against_design_and_summed_per_branch() {
        let mut s = system(vec![
            duct("SA", Role::Supply, None, 2000.0),
            duct("SA-1", Role::Branch, Some("SA"), 1000.0),
        ]);
        s.terminals = vec![
            t(
                "D-1",
                "SA-1",
                250.0,
                TerminalReading::Flow {
                    flow_m3_s: 262.0 * CFM,
                },
            ),
            t(
                "D-2",
                "SA-1",
                250.0,
                TerminalReading::Flow {
                    flow_m3_s: 221.0 * CFM,
                },
            ),
            // velocity × area factor: 480 fpm × 0.55 ft² = 264 cfm
            t(
                "D-3",
                "SA-1",
                250.0,
                TerminalReading::VelocityArea {
                    velocity_m_s: 480.0 * FPM,
                    area_m2: 0.55 * FT2,
                },
            ),
            t(
                "D-4",
                "SA-1",
                250.0,
                TerminalReading::Flow {
                    flow_m3_s: 240.0 * CFM,
                },
            ),
        ];
        let r = terminals(&s);
        // hand-worked: 262/250 = 104.8 % pass; 221/250 = 88.4 % fail (±10 %, common practice);
        // 264/250 = 105.6 % pass; 240/250 = 96 % pass
        let pct: Vec<f64> = r
            .iter()
            .map(|t| t.percent_of_design.unwrap_or(0.0))
            .collect();
        for (p, want) in pct.iter().zip([104.8, 88.4, 105.6, 96.0]) {
            assert!(close(*p, want), "{p} vs {want}");
        }
        let st: Vec<Status> = r.iter().map(|t| t.status).collect();
        assert_eq!(st, [Status::Pass, Status::Fail, Status::Pass, Status::Pass]);
        assert!(close(r[2].measured_flow_m3_s / CFM, 264.0));

        let sums = terminal_sums(&s, &r, &[measured(2000.0, None), measured(1030.0, None)]);
        assert_eq!(sums.len(), 1);
        // 262 + 221 + 264 + 240 = 987 cfm against the branch traverse 1030 cfm:
        // (987 − 1030)/1030 = −4.1748 % (common practice: outlets summed against the branch)
        assert!(close(sums[0].sum_m3_s / CFM, 987.0));
        assert!(close(sums[0].design_sum_m3_s / CFM, 1000.0));
        assert!(close(
            sums[0].difference_percent.unwrap_or(0.0),
            -4.174_757_281_553_398
        ));
        assert_eq!(sums[0].status, Status::Pass);
    }
}
