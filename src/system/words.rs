//! How a system's results read on a screen and on a page: flows in the job's units on their basis
//! and rounded as test-and-balance reports round them, the relations and the fan in sentences, the
//! notes a reader needs. One wording for the terminal table and the submittal PDF.
//!
//! Formats only: every figure is computed in [`super::evaluate()`] and the modules it calls.

use super::fan::{FanResult, MotorFinding};
use super::relations::{BranchSum, OutsideAir, OutsideAirMethod};
use super::rules::{DEFAULT_TOLERANCE, DEFAULT_TOLERANCE_SOURCE, FAN_LAWS_SOURCE};
use super::terminals::TerminalSum;
use super::{DuctResult, SystemSpec};
use crate::checks::Status;
use crate::display::{fixed, DisplayTable, Kind};
use crate::geometry::{Duct, Shape};
use crate::units::FlowBasis;

/// A flow on its basis, rounded as TAB reports round it (`8,120 acfm`).
pub fn flow(dt: &DisplayTable, basis: FlowBasis, m3_s: f64) -> String {
    dt.tab_format(Kind::flow(basis), m3_s)
}

/// The number alone (`8,120`).
pub fn flow_number(dt: &DisplayTable, basis: FlowBasis, m3_s: f64) -> String {
    dt.tab_number(Kind::flow(basis), m3_s)
}

/// A flow difference with its sign (`+320 acfm`, `−320 acfm`).
pub fn signed_flow(dt: &DisplayTable, basis: FlowBasis, m3_s: f64) -> String {
    let text = flow(dt, basis, m3_s);
    if text.starts_with('\u{2212}') || m3_s == 0.0 || text.starts_with("0 ") {
        text
    } else {
        format!("+{text}")
    }
}

/// A percentage to one decimal (`101.5 %`), or an em dash when there is none.
pub fn percent(p: Option<f64>) -> String {
    match p {
        Some(p) => format!("{} %", fixed(p, 1)),
        None => "\u{2014}".into(),
    }
}

/// A signed percentage (`+1.5 %`, `−3.9 %`).
pub fn signed_percent(p: Option<f64>) -> String {
    match p {
        Some(p) if fixed(p, 1).starts_with('\u{2212}') || fixed(p, 1) == "0.0" => percent(Some(p)),
        Some(p) => format!("+{}", percent(Some(p))),
        None => percent(None),
    }
}

/// `±10 %`.
pub fn tolerance(percent: f64) -> String {
    format!("±{} %", trim_zeros(fixed(percent, 1)))
}

fn trim_zeros(s: String) -> String {
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// The verdict word of a judged item.
pub fn verdict(status: Status) -> &'static str {
    match status {
        Status::Pass => "within",
        Status::Fail => "outside",
        Status::Warn => "warn",
        Status::NotApplicable => "\u{2014}",
    }
}

/// Where a duct's tolerance comes from.
pub fn tolerance_source(d: &DuctResult) -> String {
    match (d.tolerance_from, &d.tolerance_reason) {
        ("duct", Some(r)) => format!("this duct: {r}"),
        ("duct", None) => "this duct".into(),
        ("system", Some(r)) => format!("system file: {r}"),
        ("system", None) => "system file".into(),
        _ => DEFAULT_TOLERANCE_SOURCE.into(),
    }
}

/// The system's tolerance with its source (`±10 % of design (common practice: …)`).
pub fn system_tolerance(spec: &SystemSpec) -> String {
    let t = tolerance(100.0 * spec.tolerance.fraction);
    match (spec.tolerance_given, &spec.tolerance.reason) {
        (false, _) => format!("{t} of design ({DEFAULT_TOLERANCE_SOURCE})"),
        (true, Some(r)) => format!("{t} of design (system file: {r})"),
        (true, None) => format!("{t} of design (system file)"),
    }
}

/// The duct's inside size (`36 × 24 in`, `Ø 20 in`, `900 × 600 mm`).
pub fn size(dt: &DisplayTable, duct: &Duct) -> String {
    let len = dt.get(Kind::Length);
    let n = |m: f64| trim_zeros(fixed(len.value(m), if len.decimals > 0 { 1 } else { 0 }));
    match duct.shape() {
        Shape::Round { diameter_m } => format!("Ø {} {}", n(diameter_m), len.symbol),
        Shape::Rectangular { width_m, height_m } => {
            format!("{} × {} {}", n(width_m), n(height_m), len.symbol)
        }
    }
}

/// The duct's inside size without its unit (`36 × 24`, `Ø 20`), for a table whose head names it.
pub fn size_number(dt: &DisplayTable, duct: &Duct) -> String {
    let text = size(dt, duct);
    let unit = dt.get(Kind::Length).symbol;
    text.strip_suffix(unit)
        .map(|t| t.trim_end().to_string())
        .unwrap_or(text)
}

/// The basis in words, saying that `cfm` is actual (`actual (cfm, acfm)`).
pub fn basis(basis: FlowBasis) -> &'static str {
    match basis {
        FlowBasis::Actual => "actual air at duct conditions",
        FlowBasis::Standard => "standard air (by density)",
        FlowBasis::DryStandard => "standard air, dry",
        FlowBasis::Normal => "normal conditions (0 °C, 101.325 kPa), wet",
        FlowBasis::NormalDry => "normal conditions (0 °C, 101.325 kPa), dry",
    }
}

/// One sentence for a branch sum; no cause is claimed for a difference.
pub fn branch_sum(dt: &DisplayTable, b: &BranchSum) -> String {
    format!(
        "branches {} sum to {} against {} measured in {}: {} ({}), {} {}",
        b.branches.join(" + "),
        flow(dt, b.basis, b.sum_m3_s),
        flow(dt, b.basis, b.main_m3_s),
        b.of,
        signed_flow(dt, b.basis, b.difference_m3_s),
        signed_percent(b.difference_percent),
        verdict(b.status),
        tolerance(b.tolerance_percent)
    )
}

/// One sentence for the terminals of a branch summed against its traverse.
pub fn terminal_sum(dt: &DisplayTable, t: &TerminalSum) -> String {
    format!(
        "{} terminals on {} sum to {} (design {}) against the traverse's {}: {} ({}), {} {}",
        t.terminals.len(),
        t.branch,
        flow(dt, t.basis, t.sum_m3_s),
        flow(dt, t.basis, t.design_sum_m3_s),
        flow(dt, t.basis, t.branch_m3_s),
        signed_flow(dt, t.basis, t.difference_m3_s),
        signed_percent(t.difference_percent),
        verdict(t.status),
        tolerance(t.tolerance_percent)
    )
}

/// The outside air in a few lines.
pub fn outside_air(dt: &DisplayTable, o: &OutsideAir) -> Vec<String> {
    let b = o.basis;
    let mut lines = Vec::new();
    let u = o
        .uncertainty_m3_s
        .map(|u| format!(" (± {} at about 95 %)", flow(dt, b, u)))
        .unwrap_or_default();
    match o.method {
        OutsideAirMethod::Difference => lines.push(format!(
            "outside air by difference, supply {} − return {}: {} − {} = {}{u}",
            o.supply_ducts.join(" + "),
            o.return_ducts.join(" + "),
            flow(dt, b, o.supply_m3_s),
            flow(dt, b, o.return_m3_s.unwrap_or(0.0)),
            flow(dt, b, o.flow_m3_s)
        )),
        OutsideAirMethod::Measured => lines.push(format!(
            "outside air measured in {}: {}{u}",
            o.outside_ducts.join(" + "),
            flow(dt, b, o.flow_m3_s)
        )),
    }
    lines.push(format!(
        "{} of the supply's {}{}",
        percent(o.percent_of_supply),
        flow(dt, b, o.supply_m3_s),
        match (o.design_flow_m3_s, o.design_percent_of_supply) {
            (Some(d), Some(p)) => format!(
                "; design {} ({} of supply design){}",
                flow(dt, b, d),
                percent(Some(p)),
                if o.design_converted {
                    ", a design on another basis put on this one at its duct's measured conditions"
                } else {
                    ""
                }
            ),
            _ => "; no design for the outside air (the supply design does not exceed the return's)"
                .into(),
        }
    ));
    if let Some(p) = o.percent_of_design {
        lines.push(format!(
            "{} of design, {} {}",
            percent(Some(p)),
            verdict(o.status),
            tolerance(o.tolerance_percent)
        ));
    }
    if o.method == OutsideAirMethod::Difference {
        lines.push(
            "by difference the outside air carries the errors of both traverses; a direct \
             traverse of the outside-air duct is the firmer figure"
                .into(),
        );
    }
    if let Some(c) = &o.by_difference {
        lines.push(format!(
            "by difference (supply − return) {}: {} ({}) from the measurement{}",
            flow(dt, b, c.flow_m3_s),
            signed_flow(dt, b, c.difference_m3_s),
            signed_percent(c.difference_percent),
            match (c.uncertainty_m3_s, c.consistent) {
                (Some(u), Some(true)) =>
                    format!(", within the ± {} the traverses allow", flow(dt, b, u)),
                (Some(u), Some(false)) => {
                    format!(", more than the ± {} the traverses allow", flow(dt, b, u))
                }
                _ => String::new(),
            }
        ));
    }
    lines
}

/// The fan sheet as label and value pairs.
pub fn fan(dt: &DisplayTable, f: &FanResult) -> Vec<(String, String)> {
    let b = f.basis;
    let sp = dt.get(Kind::StaticPressure);
    let rpm = |v: f64| dt.format(Kind::FanSpeed, v);
    let amps = |v: f64| dt.format(Kind::Current, v);
    let power = |v: f64| dt.format(Kind::Power, v);
    let mut rows = vec![(
        "flow".to_string(),
        format!(
            "{} measured ({}) against {} design: {}, {} {}",
            flow(dt, b, f.measured_flow_m3_s),
            f.ducts.join(" + "),
            flow(dt, b, f.design_flow_m3_s),
            percent(f.percent_of_design),
            verdict(f.status),
            tolerance(f.tolerance_percent)
        ),
    )];
    let mut speed = Vec::new();
    if let Some(m) = f.measured_rpm {
        speed.push(format!("{} measured", rpm(m)));
    }
    if let Some(d) = f.design_rpm {
        speed.push(format!("{} design", rpm(d)));
    }
    if let Some(n) = f.rpm_for_design {
        speed.push(format!("{} for design flow", rpm(n)));
    }
    if !speed.is_empty() {
        rows.push(("speed".into(), speed.join("; ")));
    }
    let mut stat = Vec::new();
    if let Some(m) = f.measured_static_pa {
        stat.push(format!("{} measured", sp.format(m)));
    }
    if let Some(d) = f.design_static_pa {
        stat.push(format!("{} design", sp.format(d)));
    }
    if let Some(p) = f.static_at_design_rpm_pa {
        stat.push(format!("{} at the speed for design flow", sp.format(p)));
    }
    if !stat.is_empty() {
        rows.push(("external static".into(), stat.join("; ")));
    }
    let mut pw = Vec::new();
    if let Some(m) = f.measured_power_w {
        pw.push(format!("{} measured", power(m)));
    }
    if let Some(r) = f.motor_power_rated_w {
        pw.push(format!("{} rated", power(r)));
    }
    if let Some(p) = f.power_at_design_rpm_w {
        pw.push(format!("{} at the speed for design flow", power(p)));
    } else if let Some(k) = f.speed_ratio {
        pw.push(format!(
            "at the speed for design flow about {} of today's power",
            percent(Some(100.0 * k.powi(3)))
        ));
    }
    if !pw.is_empty() {
        rows.push(("power".into(), pw.join("; ")));
    }
    let mut cur = Vec::new();
    if let Some(m) = f.measured_amps {
        cur.push(format!("{} measured", amps(m)));
    }
    if let Some(r) = f.motor_amps_rated {
        cur.push(format!("{} nameplate", amps(r)));
    }
    if let Some(e) = f.amps_at_design_rpm {
        cur.push(format!(
            "about {} at the speed for design flow (estimate)",
            amps(e)
        ));
    }
    if !cur.is_empty() {
        rows.push(("motor current".into(), cur.join("; ")));
    }
    for m in &f.motor_findings {
        rows.push(("warning".into(), motor_finding(dt, m)));
    }
    rows
}

/// A motor warning in words.
pub fn motor_finding(dt: &DisplayTable, m: &MotorFinding) -> String {
    let amps = |v: f64| dt.format(Kind::Current, v);
    let power = |v: f64| dt.format(Kind::Power, v);
    match *m {
        MotorFinding::CurrentAboveRating {
            measured_a,
            rated_a,
        } => format!(
            "the motor draws {} now, above its nameplate {}",
            amps(measured_a),
            amps(rated_a)
        ),
        MotorFinding::CurrentWouldExceedRating {
            estimate_a,
            rated_a,
        } => format!(
            "at the speed for design flow the motor would draw about {}, above its nameplate {}: \
             check the motor and drive before speeding the fan up",
            amps(estimate_a),
            amps(rated_a)
        ),
        MotorFinding::PowerAboveRating {
            measured_w,
            rated_w,
        } => format!(
            "the measured power {} is above the motor's rated {}",
            power(measured_w),
            power(rated_w)
        ),
        MotorFinding::PowerWouldExceedRating {
            estimate_w,
            rated_w,
        } => format!(
            "at the speed for design flow the fan would need about {}, above the motor's rated {}",
            power(estimate_w),
            power(rated_w)
        ),
    }
}

/// The sources behind the fan sheet, for a footnote.
pub fn fan_sources() -> Vec<String> {
    vec![
        format!(
            "speed, static pressure and power at the speed for design flow from the {FAN_LAWS_SOURCE}: \
             flow ∝ speed, pressure ∝ speed², power ∝ speed³, for the same system and air density"
        ),
        format!(
            "motor current at another speed: an estimate, {}",
            super::rules::MOTOR_CURRENT_ESTIMATE
        ),
    ]
}

/// Notes a reader of the submittal needs: relaxed tolerances without a reason, traverses whose
/// own checks failed.
pub fn notes(spec: &SystemSpec, ducts: &[DuctResult]) -> Vec<String> {
    let mut notes = Vec::new();
    let relaxed = |f: f64| f > DEFAULT_TOLERANCE + 1e-12;
    if spec.tolerance_given && relaxed(spec.tolerance.fraction) && spec.tolerance.reason.is_none() {
        notes.push(format!(
            "the system's tolerance {} is wider than the usual {} and the system file gives no reason (tolerance_reason)",
            tolerance(100.0 * spec.tolerance.fraction),
            tolerance(100.0 * DEFAULT_TOLERANCE)
        ));
    }
    for d in ducts {
        if d.tolerance_from == "duct"
            && relaxed(d.tolerance_percent / 100.0)
            && d.tolerance_reason.is_none()
        {
            notes.push(format!(
                "{}: tolerance {} is wider than the usual {} and no reason is given (tolerance_reason)",
                d.tag,
                tolerance(d.tolerance_percent),
                tolerance(100.0 * DEFAULT_TOLERANCE)
            ));
        }
        if d.traverse_checks == Status::Fail {
            notes.push(format!(
                "{}: the traverse failed one of its own acceptance checks; its flow is less certain (see the duct's traverse)",
                d.tag
            ));
        }
    }
    notes
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::survey::ConventionId;

    const CFM: f64 = 0.028_316_846_592 / 60.0;

    #[test]
    fn flows_and_differences_read_as_a_balancer_writes_them() {
        let dt = DisplayTable::new(ConventionId::HvacIp, crate::display::UnitSystem::InchPound);
        assert_eq!(flow(&dt, FlowBasis::Actual, 8118.0 * CFM), "8,120 acfm");
        assert_eq!(flow(&dt, FlowBasis::Standard, 8118.0 * CFM), "8,120 scfm");
        assert_eq!(
            signed_flow(&dt, FlowBasis::Actual, -320.0 * CFM),
            "\u{2212}320 acfm"
        );
        assert_eq!(
            signed_flow(&dt, FlowBasis::Actual, 320.0 * CFM),
            "+320 acfm"
        );
        assert_eq!(signed_percent(Some(-3.94)), "\u{2212}3.9 %");
        assert_eq!(signed_percent(Some(10.3)), "+10.3 %");
        assert_eq!(tolerance(10.0), "±10 %");
        assert_eq!(tolerance(7.5), "±7.5 %");
        assert_eq!(percent(None), "\u{2014}");
        let d = Duct::rectangular(36.0 * 0.0254, 24.0 * 0.0254).expect("duct");
        assert_eq!(size(&dt, &d), "36 × 24 in");
        let si = DisplayTable::new(ConventionId::HvacSi, crate::display::UnitSystem::Si);
        let r = Duct::round(0.5).expect("duct");
        assert_eq!(size(&si, &r), "Ø 500 mm");
    }
}
