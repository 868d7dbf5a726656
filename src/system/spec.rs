//! What a system file says, validated: the ducts and their roles, their designs, the fan, the
//! terminals and the deficiencies. Built by `input::system_file`; [`validate`] is the one place the
//! relations between ducts are checked (tags unique, every branch has a known parent, no circle).

use crate::units::FlowBasis;
use chrono::NaiveDate;
use serde::Serialize;

/// What a duct is in the air system.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Role {
    /// Supply air leaving the air handler (a main).
    Supply,
    /// Return air back to the air handler.
    Return,
    /// Outside (fresh) air into the air handler.
    Outside,
    /// Air exhausted from the building.
    Exhaust,
    /// Air relieved from the return to outdoors.
    Relief,
    /// A branch taken off another duct (`of`).
    Branch,
}

impl Role {
    pub const ALL: [Role; 6] = [
        Role::Supply,
        Role::Return,
        Role::Outside,
        Role::Exhaust,
        Role::Relief,
        Role::Branch,
    ];

    /// The name in system files and JSON.
    pub fn name(self) -> &'static str {
        match self {
            Role::Supply => "supply",
            Role::Return => "return",
            Role::Outside => "outside",
            Role::Exhaust => "exhaust",
            Role::Relief => "relief",
            Role::Branch => "branch",
        }
    }

    /// Words for a page.
    pub fn words(self) -> &'static str {
        match self {
            Role::Outside => "outside air",
            other => other.name(),
        }
    }
}

/// A design flow and the basis its unit names (`8000 cfm` actual, `8000 scfm` standard): the
/// survey's own type, so a duct's design and a survey's `[design] flow` are one concept.
pub use crate::survey::DesignFlow;

/// A ± tolerance on percent of design, as a fraction (0.10 = ±10 %).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Tolerance {
    pub fraction: f64,
    /// Why the tolerance differs from the default, as written in the system file.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub reason: Option<String>,
}

impl Tolerance {
    pub fn new(fraction: f64) -> Tolerance {
        Tolerance {
            fraction,
            reason: None,
        }
    }
}

/// One traversed duct of the system.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DuctSpec {
    pub tag: String,
    /// The survey file as written in the system file (a label here; `input` reads it).
    pub survey: String,
    pub role: Role,
    /// For a branch: the tag of the duct it is taken off.
    pub of: Option<String>,
    pub design: DesignFlow,
    /// A per-duct tolerance replacing the system's.
    pub tolerance: Option<Tolerance>,
}

/// The fan serving the system, from its nameplate, the design and field readings. Speeds in rpm
/// (the nameplate's unit), pressures in Pa, currents in A, powers in W.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FanSpec {
    pub tag: String,
    pub design_flow: DesignFlow,
    /// The ducts whose measured flows add up to the fan's flow; empty means the supply ducts.
    pub ducts: Vec<String>,
    pub design_rpm: Option<f64>,
    pub measured_rpm: Option<f64>,
    /// External static pressure at design and as measured.
    pub design_static_pa: Option<f64>,
    pub measured_static_pa: Option<f64>,
    pub motor_amps_rated: Option<f64>,
    pub measured_amps: Option<f64>,
    pub motor_power_rated_w: Option<f64>,
    pub measured_power_w: Option<f64>,
    pub tolerance: Option<Tolerance>,
}

/// How a terminal's flow was measured.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum TerminalReading {
    /// A flow read directly (a capture hood, a flow grid).
    Flow { flow_m3_s: f64 },
    /// A face velocity times the terminal's area factor (effective area).
    VelocityArea { velocity_m_s: f64, area_m2: f64 },
}

impl TerminalReading {
    /// The measured flow (velocity × area factor for a velocity reading).
    pub fn flow_m3_s(self) -> f64 {
        match self {
            TerminalReading::Flow { flow_m3_s } => flow_m3_s,
            TerminalReading::VelocityArea {
                velocity_m_s,
                area_m2,
            } => velocity_m_s * area_m2,
        }
    }
}

/// One grille, register or diffuser.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TerminalSpec {
    pub tag: String,
    /// The duct (usually a branch) the terminal is served by.
    pub branch: String,
    /// Where it is (a room), when the readings say.
    pub room: Option<String>,
    /// What it is (a diffuser model, a grille size), when the readings say.
    pub kind: Option<String>,
    pub design_flow_m3_s: f64,
    /// Basis of the design and of the measured flow (the readings' header units name it).
    pub basis: FlowBasis,
    pub reading: TerminalReading,
}

/// Whether a deficiency is still to be put right.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum DeficiencyStatus {
    Open,
    Resolved,
}

impl DeficiencyStatus {
    pub fn name(self) -> &'static str {
        match self {
            DeficiencyStatus::Open => "open",
            DeficiencyStatus::Resolved => "resolved",
        }
    }
}

/// A deficiency found during the test, as the technician wrote it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Deficiency {
    pub item: String,
    pub status: DeficiencyStatus,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub note: Option<String>,
}

/// The air system as its file describes it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SystemSpec {
    pub title: String,
    pub site: Option<String>,
    pub date: NaiveDate,
    pub organisation: Option<String>,
    /// The system's tolerance (the default unless the file gives one).
    pub tolerance: Tolerance,
    /// True when the system file set the tolerance.
    pub tolerance_given: bool,
    pub fan: Option<FanSpec>,
    pub ducts: Vec<DuctSpec>,
    /// The terminal readings file as written in the system file, if any.
    pub terminal_file: Option<String>,
    pub terminals: Vec<TerminalSpec>,
    pub deficiencies: Vec<Deficiency>,
}

impl SystemSpec {
    /// The duct with `tag`.
    pub fn duct(&self, tag: &str) -> Option<&DuctSpec> {
        self.ducts.iter().find(|d| d.tag == tag)
    }

    /// The tolerance that applies to a duct: its own, else the system's.
    pub fn tolerance_of<'a>(&'a self, duct: &'a DuctSpec) -> &'a Tolerance {
        duct.tolerance.as_ref().unwrap_or(&self.tolerance)
    }

    /// The ducts whose flows make the fan's flow: those the fan names, else the supply ducts.
    pub fn fan_ducts(&self) -> Vec<&DuctSpec> {
        match &self.fan {
            Some(f) if !f.ducts.is_empty() => f.ducts.iter().filter_map(|t| self.duct(t)).collect(),
            _ => self.ducts_of_role(Role::Supply),
        }
    }

    pub fn ducts_of_role(&self, role: Role) -> Vec<&DuctSpec> {
        self.ducts.iter().filter(|d| d.role == role).collect()
    }
}

/// Why a system description cannot stand. Indices point into the spec's lists so the reader of
/// the file can place each problem at its line.
#[derive(Debug, Clone, PartialEq)]
pub enum SpecError {
    /// Two ducts share a tag (`index` repeats the tag of `first`).
    DuplicateTag { index: usize, first: usize },
    /// A branch without `of`.
    BranchWithoutParent { index: usize },
    /// `of` on a duct that is not a branch.
    ParentOnNonBranch { index: usize },
    /// `of` names no duct of the system.
    UnknownParent { index: usize },
    /// Following `of` from this duct comes back to it (the path, starting and ending here).
    Circle { index: usize, path: Vec<String> },
    /// A design flow that is not positive.
    DesignNotPositive { index: usize },
    /// A tolerance outside (0, 100 %).
    ToleranceOutOfRange { duct: Option<usize> },
    /// The fan names a duct the system does not have (`index` into the fan's list).
    FanDuctUnknown { index: usize },
    /// The fan names no duct and the system has no supply duct to take its flow from.
    FanWithoutDuct,
    /// A fan figure that must be positive is not (the key's name).
    FanValueNotPositive { key: &'static str },
    /// A terminal's branch names no duct of the system.
    TerminalBranchUnknown { index: usize },
    /// A terminal's design is not positive or its reading is negative.
    TerminalValueNotPositive { index: usize },
    /// Two terminals share a tag.
    DuplicateTerminal { index: usize, first: usize },
}

/// Checks the relations of a system; every problem is returned, in file order.
pub fn validate(spec: &SystemSpec) -> Vec<SpecError> {
    let mut errors = Vec::new();
    let positive = |x: f64| x.is_finite() && x > 0.0;
    let tolerance_ok =
        |t: &Tolerance| t.fraction.is_finite() && t.fraction > 0.0 && t.fraction < 1.0;
    if !tolerance_ok(&spec.tolerance) {
        errors.push(SpecError::ToleranceOutOfRange { duct: None });
    }
    for (i, d) in spec.ducts.iter().enumerate() {
        if let Some(first) = spec.ducts[..i].iter().position(|e| e.tag == d.tag) {
            errors.push(SpecError::DuplicateTag { index: i, first });
        }
        if !positive(d.design.m3_s) {
            errors.push(SpecError::DesignNotPositive { index: i });
        }
        if d.tolerance.as_ref().is_some_and(|t| !tolerance_ok(t)) {
            errors.push(SpecError::ToleranceOutOfRange { duct: Some(i) });
        }
        match (d.role, &d.of) {
            (Role::Branch, None) => errors.push(SpecError::BranchWithoutParent { index: i }),
            (Role::Branch, Some(of)) => {
                if spec.duct(of).is_none() {
                    errors.push(SpecError::UnknownParent { index: i });
                }
            }
            (_, Some(_)) => errors.push(SpecError::ParentOnNonBranch { index: i }),
            (_, None) => {}
        }
    }
    errors.extend(circles(spec));
    if let Some(fan) = &spec.fan {
        for (i, t) in fan.ducts.iter().enumerate() {
            if spec.duct(t).is_none() {
                errors.push(SpecError::FanDuctUnknown { index: i });
            }
        }
        if fan.ducts.is_empty() && spec.ducts_of_role(Role::Supply).is_empty() {
            errors.push(SpecError::FanWithoutDuct);
        }
        let figures = [
            ("design_flow", Some(fan.design_flow.m3_s)),
            ("design_rpm", fan.design_rpm),
            ("measured_rpm", fan.measured_rpm),
            ("motor_amps_rated", fan.motor_amps_rated),
            ("measured_amps", fan.measured_amps),
            ("motor_power_rated", fan.motor_power_rated_w),
            ("measured_power", fan.measured_power_w),
        ];
        for (key, v) in figures {
            if v.is_some_and(|v| !positive(v)) {
                errors.push(SpecError::FanValueNotPositive { key });
            }
        }
        if fan.tolerance.as_ref().is_some_and(|t| !tolerance_ok(t)) {
            errors.push(SpecError::ToleranceOutOfRange { duct: None });
        }
    }
    for (i, t) in spec.terminals.iter().enumerate() {
        if spec.duct(&t.branch).is_none() {
            errors.push(SpecError::TerminalBranchUnknown { index: i });
        }
        let reading_ok = match t.reading {
            TerminalReading::Flow { flow_m3_s } => flow_m3_s.is_finite() && flow_m3_s >= 0.0,
            TerminalReading::VelocityArea {
                velocity_m_s,
                area_m2,
            } => velocity_m_s.is_finite() && velocity_m_s >= 0.0 && positive(area_m2),
        };
        if !positive(t.design_flow_m3_s) || !reading_ok {
            errors.push(SpecError::TerminalValueNotPositive { index: i });
        }
        if let Some(first) = spec.terminals[..i].iter().position(|e| e.tag == t.tag) {
            errors.push(SpecError::DuplicateTerminal { index: i, first });
        }
    }
    errors
}

/// Each circle of `of` links once, reported at the first duct of the circle in file order.
fn circles(spec: &SystemSpec) -> Vec<SpecError> {
    let index_of = |tag: &str| spec.ducts.iter().position(|d| d.tag == tag);
    let mut reported: Vec<usize> = Vec::new();
    let mut out = Vec::new();
    for start in 0..spec.ducts.len() {
        let mut path = vec![start];
        let mut at = start;
        while let Some(next) = spec.ducts[at].of.as_deref().and_then(index_of) {
            if let Some(pos) = path.iter().position(|&p| p == next) {
                let circle = &path[pos..];
                let first = *circle.iter().min().unwrap_or(&next);
                if !reported.contains(&first) {
                    reported.extend_from_slice(circle);
                    // the path from the first duct of the circle round to itself
                    let k = circle.iter().position(|&p| p == first).unwrap_or(0);
                    let mut tags: Vec<String> = circle[k..]
                        .iter()
                        .chain(&circle[..k])
                        .map(|&p| spec.ducts[p].tag.clone())
                        .collect();
                    tags.push(spec.ducts[first].tag.clone());
                    out.push(SpecError::Circle {
                        index: first,
                        path: tags,
                    });
                }
                break;
            }
            path.push(next);
            at = next;
        }
    }
    out
}

#[cfg(test)]
pub(crate) mod testkit {
    use super::super::{DuctMeasurement, FlowSet};
    use super::*;
    use crate::checks::Status;

    /// 1 cfm in m³/s (1 ft = 0.3048 m exactly).
    pub const CFM: f64 = 0.028_316_846_592 / 60.0;

    pub fn duct(tag: &str, role: Role, of: Option<&str>, design_cfm: f64) -> DuctSpec {
        DuctSpec {
            tag: tag.into(),
            survey: format!("{tag}.toml"),
            role,
            of: of.map(String::from),
            design: DesignFlow {
                m3_s: design_cfm * CFM,
                basis: FlowBasis::Actual,
                raw: format!("{design_cfm} cfm"),
            },
            tolerance: None,
        }
    }

    /// A duct that measured `cfm` (actual), with standard air 2 % less and no other differences.
    pub fn measured(cfm: f64, u: Option<f64>) -> DuctMeasurement {
        let q = cfm * CFM;
        DuctMeasurement {
            flows: FlowSet {
                actual_m3_s: q,
                standard_m3_s: 0.98 * q,
                dry_standard_m3_s: 0.97 * q,
                normal_m3_s: 0.9 * q,
                normal_dry_m3_s: 0.89 * q,
            },
            mean_velocity_m_s: 5.0,
            area_m2: q / 5.0,
            static_pa: None,
            expanded_uncertainty: u,
            traverse_checks: Status::Pass,
        }
    }

    pub fn system(ducts: Vec<DuctSpec>) -> SystemSpec {
        SystemSpec {
            title: "test system".into(),
            site: None,
            date: NaiveDate::from_ymd_opt(2026, 11, 20).unwrap_or_default(),
            organisation: None,
            tolerance: Tolerance::new(0.10),
            tolerance_given: false,
            fan: None,
            ducts,
            terminal_file: None,
            terminals: Vec::new(),
            deficiencies: Vec::new(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::testkit::*;
    use super::*;

    #[test]
    fn a_sound_tree_passes() {
        let s = system(vec![
            duct("SA", Role::Supply, None, 8000.0),
            duct("SA-1", Role::Branch, Some("SA"), 3000.0),
            duct("SA-1a", Role::Branch, Some("SA-1"), 1000.0),
            duct("RA", Role::Return, None, 6400.0),
        ]);
        assert_eq!(validate(&s), vec![]);
    }

    #[test]
    fn unknown_parents_missing_parents_and_stray_of_are_found() {
        let s = system(vec![
            duct("SA", Role::Supply, Some("RA"), 8000.0),
            duct("SA-1", Role::Branch, Some("SA-9"), 3000.0),
            duct("SA-2", Role::Branch, None, 3000.0),
            duct("SA-2", Role::Branch, Some("SA"), 3000.0),
            duct("RA", Role::Return, None, 0.0),
        ]);
        assert_eq!(
            validate(&s),
            vec![
                SpecError::ParentOnNonBranch { index: 0 },
                SpecError::UnknownParent { index: 1 },
                SpecError::BranchWithoutParent { index: 2 },
                SpecError::DuplicateTag { index: 3, first: 2 },
                SpecError::DesignNotPositive { index: 4 },
            ]
        );
    }

    #[test]
    fn a_circle_is_reported_once_with_its_path() {
        let s = system(vec![
            duct("SA", Role::Supply, None, 8000.0),
            duct("B1", Role::Branch, Some("B3"), 1000.0),
            duct("B2", Role::Branch, Some("B1"), 1000.0),
            duct("B3", Role::Branch, Some("B2"), 1000.0),
            duct("B4", Role::Branch, Some("B4"), 1000.0),
            duct("B5", Role::Branch, Some("B2"), 1000.0),
        ]);
        assert_eq!(
            validate(&s),
            vec![
                SpecError::Circle {
                    index: 1,
                    path: vec!["B1".into(), "B3".into(), "B2".into(), "B1".into()]
                },
                SpecError::Circle {
                    index: 4,
                    path: vec!["B4".into(), "B4".into()]
                },
            ]
        );
    }

    #[test]
    fn a_fan_needs_a_duct_to_take_its_flow_from() {
        let mut s = system(vec![duct("RA", Role::Return, None, 6400.0)]);
        s.fan = Some(FanSpec {
            tag: "SF-1".into(),
            design_flow: DesignFlow {
                m3_s: 1.0,
                basis: FlowBasis::Actual,
                raw: "1 m3/s".into(),
            },
            ducts: vec![],
            design_rpm: None,
            measured_rpm: Some(0.0),
            design_static_pa: None,
            measured_static_pa: None,
            motor_amps_rated: None,
            measured_amps: None,
            motor_power_rated_w: None,
            measured_power_w: None,
            tolerance: None,
        });
        assert_eq!(
            validate(&s),
            vec![
                SpecError::FanWithoutDuct,
                SpecError::FanValueNotPositive {
                    key: "measured_rpm"
                }
            ]
        );
        if let Some(f) = s.fan.as_mut() {
            f.ducts = vec!["RA".into(), "EA".into()];
            f.measured_rpm = Some(1100.0);
        }
        assert_eq!(validate(&s), vec![SpecError::FanDuctUnknown { index: 1 }]);
    }
}
