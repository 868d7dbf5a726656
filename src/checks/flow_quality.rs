//! Flow-quality checks of one run's traverse: flow angles, the EN 15259 plane criteria, the
//! distribution rule, zero and negative readings, gauge sensitivity, the Method 2F velocity floor,
//! and two profile indicators (line-to-line asymmetry, an off-centre peak).
//!
//! Owns the acceptance rules of methods.md §3–4 as they judge a computed run. Works on the run's
//! point results (layout order, Δp in Pa, angles in degrees). No files, no printing.

use super::{
    CheckDef, Finding, Group, Judge, LimitKind, LimitSpec, Rule, RunView, Status, Stricter,
    Subject, ALL, EPA, HVAC, ISO,
};
use crate::display::{list, number, number_sig, percent, q, Kind, Text};
use crate::flow::{EpaForm, PointResult};
use crate::survey::{AngleCorrection, NegativePolicy};
use crate::text;
use crate::units::{PA_PER_INH2O, PA_PER_MMH2O};

const ANGLE: LimitKind = LimitKind::Quantity(Kind::Angle);
const FRACTION: LimitKind = LimitKind::Quantity(Kind::Percent);
const PRESSURE: LimitKind = LimitKind::Quantity(Kind::VelocityPressure);
/// Comparisons of computed means with limits absorb floating-point noise of this size.
const CMP_TOL: f64 = 1e-9;

pub static CYCLONIC_FLOW: CheckDef = CheckDef {
    id: "cyclonic-flow",
    group: Group::Flow,
    description: "mean null (yaw) angle over all points, unrotated points counting 0°",
    source: "EPA Method 1 (40 CFR 60 App. A-1) §11.4",
    criterion: "",
    limits: &[LimitSpec::fixed(
        "limit",
        "mean |yaw| ≤ {}",
        20.0,
        ANGLE,
        Stricter::Lower,
    )],
    conventions: EPA,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Run(cyclonic_flow),
};

pub static RESULTANT_ANGLE: CheckDef = CheckDef {
    id: "resultant-angle",
    group: Group::Flow,
    description: "alternative site procedure: resultant angle R = arccos(cos Y·cos P), its mean and sample standard deviation",
    source: "EPA Method 1 (40 CFR 60 App. A-1) §11.5 alternative procedure (from memory)",
    criterion: "",
    limits: &[
        LimitSpec::fixed("mean", "mean R ≤ {}", 20.0, ANGLE, Stricter::Lower),
        LimitSpec::fixed("std_dev", "standard deviation of R ≤ {}", 10.0, ANGLE, Stricter::Lower),
    ],
    conventions: EPA,
    from_memory: true,
    on_violation: Status::Fail,
    judge: Judge::Run(resultant_angle),
};

pub static EN15259_FLOW_ANGLE: CheckDef = CheckDef {
    id: "en15259-flow-angle",
    group: Group::Flow,
    description: "flow angle to the duct axis at every point (resultant of yaw and pitch where pitch is read)",
    source: "EN 15259 measurement-plane criteria (from memory)",
    criterion: "",
    limits: &[LimitSpec::fixed("limit", "every point's flow angle < {}", 15.0, ANGLE, Stricter::Lower)],
    conventions: ISO,
    from_memory: true,
    on_violation: Status::Fail,
    judge: Judge::Run(en15259_flow_angle),
};

pub static EN15259_REVERSE_FLOW: CheckDef = CheckDef {
    id: "en15259-reverse-flow",
    group: Group::Flow,
    description: "no local negative (reverse) flow in the plane",
    source: "EN 15259 measurement-plane criteria (from memory)",
    criterion: "no negative Δp at any point",
    limits: &[],
    conventions: ISO,
    from_memory: true,
    on_violation: Status::Fail,
    judge: Judge::Run(en15259_reverse_flow),
};

pub static EN15259_MINIMUM_DP: CheckDef = CheckDef {
    id: "en15259-minimum-dp",
    group: Group::Flow,
    description: "every pitot differential pressure above the EN 15259 minimum",
    source: "EN 15259 measurement-plane criteria (from memory)",
    criterion: "",
    limits: &[LimitSpec::fixed(
        "limit",
        "every Δp > {}",
        5.0,
        PRESSURE,
        Stricter::Higher,
    )],
    conventions: ISO,
    from_memory: true,
    on_violation: Status::Fail,
    judge: Judge::Run(en15259_minimum_dp),
};

pub static EN15259_VELOCITY_RATIO: CheckDef = CheckDef {
    id: "en15259-velocity-ratio",
    group: Group::Flow,
    description: "ratio of the highest to the lowest point velocity",
    source: "EN 15259 measurement-plane criteria (from memory)",
    criterion: "",
    limits: &[LimitSpec::fixed(
        "limit",
        "v_max/v_min < {}",
        3.0,
        LimitKind::Number,
        Stricter::Lower,
    )],
    conventions: ISO,
    from_memory: true,
    on_violation: Status::Fail,
    judge: Judge::Run(en15259_velocity_ratio),
};

pub static DISTRIBUTION: CheckDef = CheckDef {
    id: "distribution",
    group: Group::Flow,
    description: "share of velocity-pressure readings above a tenth of the largest, and none negative",
    source: "AMCA Publication 203 distribution rule, as restated in TAB procedures (AMCA wording from memory)",
    criterion: "no negative reading",
    limits: &[
        LimitSpec::fixed("share", "more than {} of the readings", 0.75, FRACTION, Stricter::Higher),
        LimitSpec::fixed("fraction_of_max", "above {} of the largest (a reading exactly there does not count)", 0.10, FRACTION, Stricter::Higher),
    ],
    conventions: HVAC,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Run(distribution),
};

pub static NEGATIVE_READINGS: CheckDef = CheckDef {
    id: "negative-readings",
    group: Group::Flow,
    description:
        "every zero or negative Δp reading, with the treatment the survey chose for the average",
    source: "TAB procedures; EPA Method 2 practice",
    criterion: "no zero or negative Δp",
    limits: &[],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Run(negative_readings),
};

pub static GAUGE_SENSITIVITY: CheckDef = CheckDef {
    id: "gauge-sensitivity",
    group: Group::Flow,
    description: "whether the Δp gauge is sensitive enough: the low-reading criteria, or the T factor of Eq. 2-1",
    source: "EPA Method 2 (40 CFR 60 App. A-1) §8.1 and Eq. 2-1 (K and T published; criteria limits from memory)",
    criterion: "",
    limits: &[
        LimitSpec::fixed("mean_dp", "mean Δp ≥ {}", 0.05 * PA_PER_INH2O, PRESSURE, Stricter::Higher),
        LimitSpec::fixed("fraction_below", "with 12 points or more at most {} of readings below it (fewer points: at most one)", 0.10, FRACTION, Stricter::Lower),
        LimitSpec::fixed("t_factor", "otherwise T = Σ√(Δp+K)/Σ√Δp ≤ {}", 1.05, LimitKind::Number, Stricter::Lower),
    ],
    conventions: EPA,
    from_memory: true,
    on_violation: Status::Fail,
    judge: Judge::Run(gauge_sensitivity),
};

pub static METHOD_2F_VELOCITY: CheckDef = CheckDef {
    id: "method-2f-velocity",
    group: Group::Flow,
    description: "Method 2F (yaw and pitch correction) is used only at or above the method's minimum average velocity",
    source: "EPA Method 2F (40 CFR 60 App. A-2) §1.2",
    criterion: "",
    limits: &[LimitSpec::fixed(
        "limit",
        "mean velocity ≥ {}",
        20.0 * 0.3048,
        LimitKind::Quantity(Kind::Velocity),
        Stricter::Higher,
    )],
    conventions: EPA,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Run(method_2f_velocity),
};

pub static LINE_ASYMMETRY: CheckDef = CheckDef {
    id: "line-asymmetry",
    group: Group::Flow,
    description:
        "spread of the traverse lines' mean velocities (a skewed profile or a changing flow)",
    source: "common practice (indicator, threshold not from a standard)",
    criterion: "",
    limits: &[LimitSpec::fixed(
        "limit",
        "(highest − lowest line mean)/plane mean ≤ {}",
        0.10,
        FRACTION,
        Stricter::Lower,
    )],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Warn,
    judge: Judge::Run(line_asymmetry),
};

pub static OFF_CENTRE_PEAK: CheckDef = CheckDef {
    id: "off-centre-peak",
    group: Group::Flow,
    description:
        "where each line's highest velocity sits (a peak near a wall suggests a disturbed profile)",
    source: "common practice (indicator, threshold not from a standard)",
    criterion: "",
    limits: &[LimitSpec::fixed(
        "limit",
        "each line's peak within {} of the line length from the centre",
        0.25,
        FRACTION,
        Stricter::Lower,
    )],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Warn,
    judge: Judge::Run(off_centre_peak),
};

fn label(p: &PointResult) -> String {
    format!("{}{}", p.line, p.point)
}

/// `A3 (−0.02 inH2O)`: a point and its Δp.
fn label_dp(p: &PointResult) -> Text {
    text!("{} ({})", label(p), q(Kind::VelocityPressure, p.dp_pa))
}

fn velocity(v: f64) -> crate::display::Arg {
    q(Kind::Velocity, v)
}

fn mean(x: &[f64]) -> f64 {
    x.iter().sum::<f64>() / x.len() as f64
}

/// Sample standard deviation (n − 1); 0 for fewer than two values.
fn sample_sd(x: &[f64]) -> f64 {
    if x.len() < 2 {
        return 0.0;
    }
    let m = mean(x);
    (x.iter().map(|v| (v - m).powi(2)).sum::<f64>() / (x.len() as f64 - 1.0)).sqrt()
}

/// Resultant angle to the duct axis, degrees: R = arccos(cos Y·cos P) (methods.md §3).
pub fn resultant_angle_deg(yaw_deg: f64, pitch_deg: f64) -> f64 {
    (yaw_deg.to_radians().cos() * pitch_deg.to_radians().cos())
        .clamp(-1.0, 1.0)
        .acos()
        .to_degrees()
}

fn cyclonic_flow(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let pts = &run.result.points;
    let yaws: Vec<f64> = pts.iter().filter_map(|p| p.yaw_deg).map(f64::abs).collect();
    if yaws.is_empty() {
        return rule.not_applicable(
            "no yaw angles recorded: add a yaw[deg] column where cyclonic flow is possible (after cyclones, swirl, tangential inlets)",
        );
    }
    let limit = rule.value("limit");
    let m = mean(&yaws);
    let missing = pts.len() - yaws.len();
    let status = if m > limit + CMP_TOL {
        rule.violated()
    } else if missing > 0 {
        Status::Warn
    } else {
        Status::Pass
    };
    let mut msg = text!(
        "mean |yaw| {} over {} points, limit {}",
        q(Kind::Angle, m),
        yaws.len(),
        q(Kind::Angle, limit)
    );
    if status == rule.violated() && status == Status::Fail {
        msg.push(": the flow is cyclonic and the site is unacceptable for Method 1");
    }
    if missing > 0 {
        msg.push(text!("; {} points have no yaw angle", missing));
    }
    rule.finding(status, Some(m), "deg", msg, &[])
}

fn resultant_angle(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let pts = &run.result.points;
    let r: Option<Vec<f64>> = pts
        .iter()
        .map(|p| Some(resultant_angle_deg(p.yaw_deg?, p.pitch_deg?)))
        .collect();
    let Some(r) = r.filter(|r| r.len() >= 2) else {
        return rule.not_applicable(
            "yaw and pitch are not both recorded at every point: the alternative site procedure was not done",
        );
    };
    let (lm, ls) = (rule.value("mean"), rule.value("std_dev"));
    let (m, sd) = (mean(&r), sample_sd(&r));
    let bad_mean = m > lm + CMP_TOL;
    let bad_sd = sd > ls + CMP_TOL;
    let status = if bad_mean || bad_sd {
        rule.violated()
    } else {
        Status::Pass
    };
    let why = match (bad_mean, bad_sd) {
        (true, true) => ": both exceed their limits",
        (true, false) => ": the mean exceeds its limit",
        (false, true) => ": the spread exceeds its limit",
        _ => "",
    };
    rule.finding(
        status,
        Some(m),
        "deg",
        text!(
            "resultant angle mean {} (limit {}), standard deviation {} (limit {}) over {} points{}",
            q(Kind::Angle, m),
            q(Kind::Angle, lm),
            q(Kind::Angle, sd),
            q(Kind::Angle, ls),
            r.len(),
            why
        ),
        &[],
    )
}

fn en15259_flow_angle(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let pts = &run.result.points;
    let angles: Vec<(String, f64)> = pts
        .iter()
        .filter_map(|p| {
            let y = p.yaw_deg?;
            Some((
                label(p),
                match p.pitch_deg {
                    Some(pitch) => resultant_angle_deg(y, pitch),
                    None => y.abs(),
                },
            ))
        })
        .collect();
    if angles.is_empty() {
        return rule.not_applicable("no flow angles recorded (yaw[deg], pitch[deg] columns)");
    }
    let limit = rule.value("limit");
    let max = angles.iter().map(|a| a.1).fold(0.0, f64::max);
    let over: Vec<Text> = angles
        .iter()
        .filter(|a| a.1 >= limit - CMP_TOL)
        .map(|a| text!("{} {}", a.0.clone(), q(Kind::Angle, a.1)))
        .collect();
    let missing = pts.len() - angles.len();
    let status = if !over.is_empty() {
        rule.violated()
    } else if missing > 0 {
        Status::Warn
    } else {
        Status::Pass
    };
    let mut msg = text!(
        "largest flow angle {} over {} points, limit < {}",
        q(Kind::Angle, max),
        angles.len(),
        q(Kind::Angle, limit)
    );
    let over_any = !over.is_empty();
    if over_any {
        msg.push(text!("; at or over the limit: {}", list(over, 6)));
    }
    if missing > 0 {
        msg.push(text!("; {} points have no angle", missing));
    }
    rule.finding(status, Some(max), "deg", msg, &[])
}

fn en15259_reverse_flow(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let pts = &run.result.points;
    let neg: Vec<Text> = pts.iter().filter(|p| p.dp_pa < 0.0).map(label_dp).collect();
    let min = pts.iter().map(|p| p.dp_pa).fold(f64::INFINITY, f64::min);
    if neg.is_empty() {
        rule.finding(
            Status::Pass,
            Some(min),
            "Pa",
            text!("no negative Δp; lowest {}", q(Kind::VelocityPressure, min)),
            &[],
        )
    } else {
        rule.finding(
            rule.violated(),
            Some(min),
            "Pa",
            text!(
                "reverse flow at {} of {} points: {}",
                neg.len(),
                pts.len(),
                list(neg, 6)
            ),
            &[],
        )
    }
}

fn en15259_minimum_dp(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let pts = &run.result.points;
    let limit = rule.value("limit");
    let min = pts.iter().map(|p| p.dp_pa).fold(f64::INFINITY, f64::min);
    let low: Vec<Text> = pts
        .iter()
        .filter(|p| p.dp_pa <= limit)
        .map(label_dp)
        .collect();
    let status = if low.is_empty() {
        Status::Pass
    } else {
        rule.violated()
    };
    let mut msg = text!(
        "lowest Δp {}, limit > {}",
        q(Kind::VelocityPressure, min),
        q(Kind::VelocityPressure, limit)
    );
    if !low.is_empty() {
        msg.push(text!(
            "; {} of {} points at or below it: {}",
            low.len(),
            pts.len(),
            list(low, 6)
        ));
    }
    rule.finding(status, Some(min), "Pa", msg, &[])
}

fn en15259_velocity_ratio(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let pts = &run.result.points;
    let limit = rule.value("limit");
    let vmax = pts
        .iter()
        .map(|p| p.velocity_m_s)
        .fold(f64::NEG_INFINITY, f64::max);
    let vmin = pts
        .iter()
        .map(|p| p.velocity_m_s)
        .fold(f64::INFINITY, f64::min);
    if vmin <= 0.0 {
        return rule.finding(
            rule.violated(),
            None,
            "1",
            text!(
                "the lowest point velocity is {}: the ratio to the highest ({}) is unbounded, limit {}:1",
                velocity(vmin),
                velocity(vmax),
                number(limit)
            ),
            &[],
        );
    }
    let ratio = vmax / vmin;
    let status = if ratio < limit - CMP_TOL {
        Status::Pass
    } else {
        rule.violated()
    };
    rule.finding(
        status,
        Some(ratio),
        "1",
        text!(
            "highest/lowest point velocity {} / {} = {}:1, limit < {}:1",
            velocity(vmax),
            velocity(vmin),
            number_sig(ratio, 3),
            number(limit)
        ),
        &[],
    )
}

/// The distribution rule's count: readings strictly above `fraction_of_max` of the largest.
/// A reading that equals the threshold (to rounding) does not count (methods.md §4).
pub fn distribution_share(dp: &[f64], fraction_of_max: f64) -> (usize, f64) {
    let max = dp.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let threshold = fraction_of_max * max;
    let tol = CMP_TOL * max.abs();
    let above = dp.iter().filter(|&&x| x > threshold + tol).count();
    (above, threshold)
}

fn distribution(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let pts = &run.result.points;
    let dp: Vec<f64> = pts.iter().map(|p| p.dp_pa).collect();
    let share = rule.value("share");
    let fmax = rule.value("fraction_of_max");
    let (above, threshold) = distribution_share(&dp, fmax);
    let frac = above as f64 / dp.len() as f64;
    let neg: Vec<Text> = pts.iter().filter(|p| p.dp_pa < 0.0).map(label_dp).collect();
    let enough = frac > share + 1e-12;
    let status = if enough && neg.is_empty() {
        Status::Pass
    } else {
        rule.violated()
    };
    let mut msg = text!(
        "{} of {} readings ({}) are above {} of the largest ({}); more than {} are needed",
        above,
        dp.len(),
        percent(frac),
        percent(fmax),
        q(Kind::VelocityPressure, threshold),
        percent(share)
    );
    if !neg.is_empty() {
        msg.push(text!(
            "; {} negative reading{}: {}",
            neg.len(),
            if neg.len() == 1 { "" } else { "s" },
            list(neg, 6)
        ));
    }
    rule.finding(status, Some(frac), "1", msg, &[])
}

fn negative_readings(rule: &Rule, s: &Subject, run: &RunView) -> Finding {
    let pts = &run.result.points;
    let bad: Vec<Text> = pts
        .iter()
        .filter(|p| p.dp_pa <= 0.0)
        .map(label_dp)
        .collect();
    if bad.is_empty() {
        return rule.finding(
            Status::Pass,
            Some(0.0),
            "1",
            text!("all {} readings are positive", pts.len()),
            &[],
        );
    }
    let treatment = match s.survey.options.negative {
        NegativePolicy::Zero => "negative readings count as zero velocity in the average ([flow] negative = \"zero\")",
        NegativePolicy::Signed => "negative readings enter the average as signed velocities −C·√(2|Δp|/ρ) ([flow] negative = \"signed\")",
        NegativePolicy::Reject => "the survey rejects negative readings",
    };
    rule.finding(
        rule.violated(),
        Some(bad.len() as f64),
        "1",
        text!(
            "{} of {} readings are zero or negative: {}; {}",
            bad.len(),
            pts.len(),
            list(bad, 8),
            treatment
        ),
        &[],
    )
}

/// EPA Method 2 Eq. 2-1: T = Σ√(Δp_i + K)/Σ√Δp_i (negative readings count as zero).
pub fn t_factor(dp: &[f64], k: f64) -> f64 {
    let num: f64 = dp.iter().map(|d| (d.max(0.0) + k).sqrt()).sum();
    let den: f64 = dp.iter().map(|d| d.max(0.0).sqrt()).sum();
    num / den
}

/// EPA Method 2 §8.1 / Eq. 2-1 constant K: 0.005 in H2O (English), 0.13 mm H2O (metric).
pub const T_FACTOR_K_ENGLISH_PA: f64 = 0.005 * PA_PER_INH2O;
pub const T_FACTOR_K_METRIC_PA: f64 = 0.13 * PA_PER_MMH2O;

fn gauge_sensitivity(rule: &Rule, s: &Subject, run: &RunView) -> Finding {
    let dp: Vec<f64> = run.result.points.iter().map(|p| p.dp_pa).collect();
    let n = dp.len();
    let low_limit = rule.value("mean_dp");
    let share_limit = rule.value("fraction_below");
    let t_limit = rule.value("t_factor");
    let k = match s.convention.epa_form {
        EpaForm::English => T_FACTOR_K_ENGLISH_PA,
        EpaForm::Metric => T_FACTOR_K_METRIC_PA,
    };
    let m = mean(&dp);
    let below = dp.iter().filter(|&&d| d < low_limit).count();
    let crit_a = m < low_limit;
    let crit_bc = if n >= 12 {
        below as f64 / n as f64 > share_limit + 1e-12
    } else {
        below > 1
    };
    let t = t_factor(&dp, k);
    let shown = |x: f64| q(Kind::VelocityPressure, x);
    let readings = text!(
        "mean Δp {}, {} of {} readings below {}",
        shown(m),
        below,
        n,
        shown(low_limit)
    );
    let t_text = if t.is_finite() {
        text!("T = {} (K = {})", number(t), shown(k))
    } else {
        Text::from("T cannot be formed (no positive reading)")
    };
    let (status, msg) = if !crit_a && !crit_bc {
        (
            Status::Pass,
            text!("{}: the gauge is sensitive enough; {}", readings, t_text),
        )
    } else if t.is_finite() && t <= t_limit + CMP_TOL {
        (
            Status::Pass,
            text!(
                "{}, but {} ≤ {}: the Eq. 2-1 alternative accepts the gauge",
                readings,
                t_text,
                number(t_limit)
            ),
        )
    } else {
        (
            rule.violated(),
            text!(
                "{} and {} exceeds {}: the velocity-head data are unacceptable; use a more sensitive gauge",
                readings,
                t_text,
                number(t_limit)
            ),
        )
    };
    rule.finding(status, Some(t), "1", msg, &[])
}

fn method_2f_velocity(rule: &Rule, s: &Subject, run: &RunView) -> Finding {
    if s.survey.options.angles != AngleCorrection::YawPitch {
        return rule.not_applicable("the survey does not correct for yaw and pitch (Method 2F)");
    }
    let limit = rule.value("limit");
    let v = run.result.mean_velocity_m_s;
    let status = if v >= limit - CMP_TOL {
        Status::Pass
    } else {
        rule.violated()
    };
    rule.finding(
        status,
        Some(v),
        "m/s",
        text!(
            "mean velocity {}, Method 2F needs at least {}",
            velocity(v),
            velocity(limit)
        ),
        &[],
    )
}

/// Weighted mean velocity of each line, in layout order.
fn line_means(points: &[PointResult]) -> Vec<(String, f64)> {
    let mut out: Vec<(String, f64, f64)> = Vec::new();
    for p in points {
        match out.iter_mut().find(|(l, _, _)| *l == p.line) {
            Some(e) => {
                e.1 += p.velocity_m_s * p.weight;
                e.2 += p.weight;
            }
            None => out.push((p.line.clone(), p.velocity_m_s * p.weight, p.weight)),
        }
    }
    out.into_iter().map(|(l, s, w)| (l, s / w)).collect()
}

fn line_asymmetry(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let means = line_means(&run.result.points);
    if means.len() < 2 {
        return rule.not_applicable("one traverse line: nothing to compare");
    }
    let limit = rule.value("limit");
    let plane = run
        .result
        .points
        .iter()
        .map(|p| p.velocity_m_s * p.weight)
        .sum::<f64>()
        / run.result.points.iter().map(|p| p.weight).sum::<f64>();
    let (lo, hi) = means.iter().fold((&means[0], &means[0]), |(lo, hi), m| {
        (
            if m.1 < lo.1 { m } else { lo },
            if m.1 > hi.1 { m } else { hi },
        )
    });
    let lines = Text::join(
        means
            .iter()
            .map(|(l, v)| text!("{} {}", l.clone(), velocity(*v))),
        ", ",
    );
    if plane <= 0.0 {
        return rule.finding(
            rule.violated(),
            None,
            "1",
            text!(
                "the plane mean velocity is not positive; line means {}",
                lines
            ),
            &[],
        );
    }
    let spread = (hi.1 - lo.1) / plane;
    let status = if spread <= limit + CMP_TOL {
        Status::Pass
    } else {
        rule.violated()
    };
    rule.finding(
        status,
        Some(spread),
        "1",
        text!(
            "line means {}: spread {} of the plane mean{}, limit {}",
            lines,
            percent(spread),
            if spread > 0.0 {
                format!(" (line {} high, {} low)", hi.0, lo.0)
            } else {
                String::new()
            },
            percent(limit)
        ),
        &[],
    )
}

fn off_centre_peak(rule: &Rule, s: &Subject, run: &RunView) -> Finding {
    let limit = rule.value("limit");
    let len = s.plane.layout.duct().line_length_m();
    let mut worst = 0.0f64;
    let mut off = Vec::new();
    let mut lines: Vec<&str> = Vec::new();
    for p in &run.result.points {
        if !lines.contains(&p.line.as_str()) {
            lines.push(&p.line);
        }
    }
    for line in &lines {
        let pts: Vec<&PointResult> = run
            .result
            .points
            .iter()
            .filter(|p| p.line == *line)
            .collect();
        let vmax = pts
            .iter()
            .map(|p| p.velocity_m_s)
            .fold(f64::NEG_INFINITY, f64::max);
        // of equal highest readings, the one nearest the centre
        let offset = pts
            .iter()
            .filter(|p| p.velocity_m_s >= vmax - 1e-12 * vmax.abs())
            .map(|p| (p, (p.position_m / len - 0.5).abs()))
            .min_by(|a, b| a.1.total_cmp(&b.1));
        if let Some((p, o)) = offset {
            worst = worst.max(o);
            if o > limit + 1e-12 {
                off.push(text!(
                    "line {} peaks at point {} ({} of the line)",
                    line.to_string(),
                    p.point,
                    percent(p.position_m / len)
                ));
            }
        }
    }
    let status = if off.is_empty() {
        Status::Pass
    } else {
        rule.violated()
    };
    let msg = if off.is_empty() {
        text!(
            "every line's peak is within {} of the centre (furthest {})",
            percent(limit),
            percent(worst)
        )
    } else {
        text!(
            "{}: more than {} of the line from the centre; check for a disturbance upstream",
            Text::join(off, "; "),
            percent(limit)
        )
    };
    rule.finding(status, Some(worst), "1", msg, &[])
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::checks::testkit::*;

    /// methods.md worked values are printed to 3 decimals of a degree.
    const ABS_TOL_DEG_PRINTED: f64 = 5e-4;
    /// methods.md §4 prints T to 4 decimals.
    const ABS_TOL_T_PRINTED: f64 = 5e-5;
    /// Values derived here by exact arithmetic.
    const REL_TOL_DERIVED: f64 = 1e-9;

    fn epa_with(columns: &[(&str, &[f64])], extra: &str) -> crate::assess::Assessment {
        let mut cols: Vec<(&str, &[f64])> = vec![("temperature[F]", &EPA_T_F)];
        cols.extend_from_slice(columns);
        let csv = csv(&[("A", &EPA_DP_A), ("B", &EPA_DP_B)], "inH2O", &cols);
        assess_text(&survey(EPA_SURVEY, &["1"], extra), &[("run1.csv", csv)])
    }

    #[test]
    fn cyclonic_flow_worked_values() {
        // methods.md §3 [D] (EPA Method 1 §11.4 rule): α = 0,5,10,15,25,30,35,20,10,5,0,45
        // → mean 16.667° → pass
        let yaw = [0., 5., 10., 15., 25., 30., 35., 20., 10., 5., 0., 45.];
        let a = epa_with(&[("yaw[deg]", &yaw)], "");
        let f = run_finding(&a, 0, "cyclonic-flow");
        assert_eq!(f.status, Status::Pass, "{}", f.message);
        assert!((f.measured.unwrap() - 16.667).abs() < ABS_TOL_DEG_PRINTED);
        assert!(
            f.message.to_string().contains("16.667°")
                && f.message.to_string().contains("limit 20°"),
            "{}",
            f.message
        );
        // methods.md §3 [D]: 20,25,30,15,25,20,30,25,20,15,25,20 → 22.5° → fail
        let yaw = [20., 25., 30., 15., 25., 20., 30., 25., 20., 15., 25., 20.];
        let a = epa_with(&[("yaw[deg]", &yaw)], "");
        let f = run_finding(&a, 0, "cyclonic-flow");
        assert_eq!(f.status, Status::Fail);
        assert!((f.measured.unwrap() - 22.5).abs() < ABS_TOL_DEG_PRINTED);
        assert!(a.failed());
        // signs do not matter: |α|
        let neg: Vec<f64> = yaw.iter().map(|y| -y).collect();
        let a = epa_with(&[("yaw[deg]", &neg)], "");
        assert_eq!(run_finding(&a, 0, "cyclonic-flow").status, Status::Fail);
        // no yaw column → not applicable
        let a = epa_one_run("");
        assert_eq!(
            run_finding(&a, 0, "cyclonic-flow").status,
            Status::NotApplicable
        );
    }

    #[test]
    fn resultant_angle_of_constructed_examples() {
        // Derived: with Y = 0 the resultant equals P, with P = 0 it equals Y, and
        // Y = P = 45° gives arccos(½) = 60° exactly (methods.md §3 formula R = arccos(cos Y cos P)).
        assert!((resultant_angle_deg(45.0, 45.0) - 60.0).abs() < 1e-9);
        assert!((resultant_angle_deg(0.0, 17.0) - 17.0).abs() < 1e-9);
        // R = 10 ×6 (yaw) and 20 ×6 (pitch): mean 15°, s.d. = √(12·25/11) = 5.2223° → pass
        let yaw = [10., 10., 10., 10., 10., 10., 0., 0., 0., 0., 0., 0.];
        let pitch = [0., 0., 0., 0., 0., 0., 20., 20., 20., 20., 20., 20.];
        let a = epa_with(&[("yaw[deg]", &yaw), ("pitch[deg]", &pitch)], "");
        let f = run_finding(&a, 0, "resultant-angle");
        assert_eq!(f.status, Status::Pass, "{}", f.message);
        assert!((f.measured.unwrap() - 15.0).abs() < REL_TOL_DERIVED * 15.0);
        assert!(f.message.to_string().contains("5.2223°"), "{}", f.message);
        // R = 20 ×6 (yaw) and 25 ×6 (yaw 15°, pitch arccos(cos 25°/cos 15°)): mean 22.5° > 20°,
        // s.d. 2.611° → fails on the mean only
        let p25 = (25f64.to_radians().cos() / 15f64.to_radians().cos())
            .acos()
            .to_degrees();
        let yaw = [20., 20., 20., 20., 20., 20., 15., 15., 15., 15., 15., 15.];
        let pitch = [0., 0., 0., 0., 0., 0., p25, p25, p25, p25, p25, p25];
        let a = epa_with(&[("yaw[deg]", &yaw), ("pitch[deg]", &pitch)], "");
        let f = run_finding(&a, 0, "resultant-angle");
        assert_eq!(f.status, Status::Fail);
        assert!((f.measured.unwrap() - 22.5).abs() < 1e-6, "{}", f.message);
        assert!(
            f.message.to_string().contains("the mean exceeds"),
            "{}",
            f.message
        );
        // R = 0 ×6, 30 ×6: mean 15° passes but s.d. √(12·225/11) = 15.667° > 10° → fail
        let yaw = [0., 0., 0., 0., 0., 0., 30., 30., 30., 30., 30., 30.];
        let pitch = [0.; 12];
        let a = epa_with(&[("yaw[deg]", &yaw), ("pitch[deg]", &pitch)], "");
        let f = run_finding(&a, 0, "resultant-angle");
        assert_eq!(f.status, Status::Fail);
        assert!(
            f.message.to_string().contains("the spread exceeds"),
            "{}",
            f.message
        );
        assert!(
            f.message.to_string().contains("from memory"),
            "{}",
            f.message
        );
    }

    #[test]
    fn t_factor_worked_value_and_edge() {
        // methods.md §4 [D] (EPA Method 2 Eq. 2-1, K = 0.005 inH2O):
        // 0.02,0.03,0.03,0.04,0.04,0.05,0.05,0.04,0.03,0.03,0.02,0.02 → T = 1.0757
        let dp = [
            0.02, 0.03, 0.03, 0.04, 0.04, 0.05, 0.05, 0.04, 0.03, 0.03, 0.02, 0.02,
        ];
        let t = t_factor(&dp, 0.005);
        assert!((t - 1.0757).abs() < ABS_TOL_T_PRINTED, "{t}");
        let a = assess_text(
            &survey(EPA_SURVEY, &["1"], ""),
            &[(
                "run1.csv",
                csv(&[("A", &dp[..6]), ("B", &dp[6..])], "inH2O", &[]),
            )],
        );
        let f = run_finding(&a, 0, "gauge-sensitivity");
        assert_eq!(f.status, Status::Fail, "{}", f.message);
        assert!((f.measured.unwrap() - 1.0757).abs() < ABS_TOL_T_PRINTED);
        assert!(
            f.message.to_string().contains("T = 1.0757") && f.message.to_string().contains("1.05"),
            "{}",
            f.message
        );
        // Edge, derived: six readings of 0.050 and six of 0.049 inH2O; the mean 0.0495 is below
        // 0.05 (criterion a fails) but T = (6√0.055 + 6√0.054)/(6√0.05 + 6√0.049) = 1.04929 ≤ 1.05,
        // so the Eq. 2-1 alternative accepts the gauge.
        let dp = [
            0.05, 0.049, 0.05, 0.049, 0.05, 0.049, 0.049, 0.05, 0.049, 0.05, 0.049, 0.05,
        ];
        let want = (0.055f64.sqrt() + 0.054f64.sqrt()) / (0.05f64.sqrt() + 0.049f64.sqrt());
        assert!((want - 1.04929).abs() < 1e-5);
        let a = assess_text(
            &survey(EPA_SURVEY, &["1"], ""),
            &[(
                "run1.csv",
                csv(&[("A", &dp[..6]), ("B", &dp[6..])], "inH2O", &[]),
            )],
        );
        let f = run_finding(&a, 0, "gauge-sensitivity");
        assert_eq!(f.status, Status::Pass, "{}", f.message);
        assert!((f.measured.unwrap() - want).abs() < REL_TOL_DERIVED);
        assert!(
            f.message.to_string().contains("alternative accepts"),
            "{}",
            f.message
        );
        // ordinary readings pass on the criteria alone
        let f = run_finding(&epa_one_run(""), 0, "gauge-sensitivity").clone();
        assert_eq!(f.status, Status::Pass);
        assert!(
            f.message.to_string().contains("sensitive enough"),
            "{}",
            f.message
        );
    }

    #[test]
    fn gauge_sensitivity_counts_low_readings() {
        let run = |dp: &[f64], points: usize| {
            let sv = survey(EPA_SURVEY, &["1"], "").replace(
                "points_per_line = 6",
                &format!("points_per_line = {points}"),
            );
            let a = assess_text(
                &sv,
                &[(
                    "run1.csv",
                    csv(&[("A", &dp[..points]), ("B", &dp[points..])], "inH2O", &[]),
                )],
            );
            run_finding(&a, 0, "gauge-sensitivity").clone()
        };
        // EPA Method 2 §8.1 (criteria from memory): 12 points, 4 below 0.05 inH2O (33 % > 10 %);
        // derived T = (4√0.015 + 8√0.305)/(4·0.1 + 8√0.3) = 1.0264 ≤ 1.05 → accepted by Eq. 2-1
        let mut dp = [0.30; 12];
        dp[..4].copy_from_slice(&[0.01; 4]);
        assert!((t_factor(&dp, 0.005) - 1.0264).abs() < ABS_TOL_T_PRINTED);
        let f = run(&dp, 6);
        assert_eq!(f.status, Status::Pass);
        assert!(
            f.message.to_string().contains("4 of 12 readings below")
                && f.message.to_string().contains("alternative"),
            "{}",
            f.message
        );
        // 8 of 12 at 0.01: T = (8√0.015 + 4√0.305)/(8·0.1 + 4√0.3) = 1.0662 > 1.05 → fail
        let mut dp = [0.30; 12];
        dp[..8].copy_from_slice(&[0.01; 8]);
        assert!((t_factor(&dp, 0.005) - 1.0662).abs() < ABS_TOL_T_PRINTED);
        assert_eq!(run(&dp, 6).status, Status::Fail);
        // fewer than 12 points: one low reading is allowed, two are not (then T decides)
        let mut dp = [0.30; 8];
        dp[0] = 0.04;
        assert!(run(&dp, 4).message.to_string().contains("sensitive enough"));
        dp[5] = 0.04;
        assert!(run(&dp, 4)
            .message
            .to_string()
            .contains("alternative accepts"));
    }

    fn hvac(lines: &[(&str, &[f64])], extra: &str) -> crate::assess::Assessment {
        assess_text(
            &survey(HVAC_SURVEY, &["1"], extra),
            &[("run1.csv", csv(lines, "inH2O", &[]))],
        )
    }

    #[test]
    fn distribution_worked_example_fails() {
        // methods.md §4 [D] (AMCA 203 rule via TAB procedures): these 20 readings, threshold 0.05
        // (a tenth of 0.50); 14/20 = 70 % are above it → fails, and the negative reading fails too.
        let dp = [
            0.50, 0.45, 0.40, 0.30, 0.04, 0.03, 0.02, 0.01, -0.01, 0.35, 0.42, 0.48, 0.44, 0.38,
            0.30, 0.20, 0.10, 0.06, 0.05, 0.46,
        ];
        let a = hvac(
            &[
                ("A", &dp[..5]),
                ("B", &dp[5..10]),
                ("C", &dp[10..15]),
                ("D", &dp[15..]),
            ],
            "",
        );
        let f = run_finding(&a, 0, "distribution");
        assert_eq!(f.status, Status::Fail, "{}", f.message);
        assert!((f.measured.unwrap() - 0.70).abs() < REL_TOL_DERIVED);
        assert!(
            f.message.to_string().contains("14 of 20") && f.message.to_string().contains("70 %"),
            "{}",
            f.message
        );
        assert!(
            f.message.to_string().contains("negative reading")
                && f.message.to_string().contains("B4"),
            "{}",
            f.message
        );
        // the reading exactly at a tenth (0.05) is not counted
        let (above, _) = distribution_share(&[0.5, 0.05, 0.051], 0.1);
        assert_eq!(above, 2);
        let neg = run_finding(&a, 0, "negative-readings");
        assert_eq!(neg.status, Status::Fail);
        assert!(
            neg.message.to_string().contains("count as zero"),
            "{}",
            neg.message
        );
    }

    #[test]
    fn distribution_passes_a_good_traverse() {
        // calculations.md §8 HVAC example: distribution rule 25/25 pass; here its first four rows
        let rows: [&[f64]; 4] = [
            &[0.18, 0.22, 0.24, 0.22, 0.17],
            &[0.22, 0.28, 0.31, 0.28, 0.21],
            &[0.24, 0.30, 0.33, 0.30, 0.23],
            &[0.22, 0.27, 0.30, 0.27, 0.21],
        ];
        let a = hvac(
            &[
                ("A", rows[0]),
                ("B", rows[1]),
                ("C", rows[2]),
                ("D", rows[3]),
            ],
            "",
        );
        let f = run_finding(&a, 0, "distribution");
        assert_eq!(f.status, Status::Pass, "{}", f.message);
        assert_eq!(f.measured, Some(1.0));
        assert_eq!(run_finding(&a, 0, "negative-readings").status, Status::Pass);
    }

    fn iso(
        a: &[f64],
        b: &[f64],
        columns: &[(&str, &[f64])],
        extra: &str,
    ) -> crate::assess::Assessment {
        assess_text(
            &survey(ISO_SURVEY, &["1"], extra),
            &[("run1.csv", csv(&[("A", a), ("B", b)], "Pa", columns))],
        )
    }

    /// calculations.md §8 EN-style stack Δp, Pa.
    const ISO_A: [f64; 10] = [118., 142., 161., 170., 176., 181., 178., 169., 151., 124.];
    const ISO_B: [f64; 10] = [126., 149., 166., 174., 179., 183., 177., 165., 147., 119.];

    #[test]
    fn en15259_plane_criteria() {
        let yaw = [5.0; 20];
        let a = iso(&ISO_A, &ISO_B, &[("yaw[deg]", &yaw)], "");
        for id in [
            "en15259-flow-angle",
            "en15259-reverse-flow",
            "en15259-minimum-dp",
            "en15259-velocity-ratio",
        ] {
            let f = run_finding(&a, 0, id);
            assert_eq!(f.status, Status::Pass, "{id}: {}", f.message);
        }
        // EN 15259 [M]: every angle < 15°: exactly 15° fails
        let mut yaw = [5.0; 20];
        yaw[7] = 15.0;
        let a = iso(&ISO_A, &ISO_B, &[("yaw[deg]", &yaw)], "");
        let f = run_finding(&a, 0, "en15259-flow-angle");
        assert_eq!(f.status, Status::Fail);
        assert!(f.message.to_string().contains("A8 15°"), "{}", f.message);
        // Δp > 5 Pa at every point: 5 Pa itself fails; 5 Pa against 181 Pa is also a velocity
        // ratio of √(183/5) = 6.05 > 3
        let mut low = ISO_A;
        low[0] = 5.0;
        let a = iso(&low, &ISO_B, &[], "");
        assert_eq!(
            run_finding(&a, 0, "en15259-minimum-dp").status,
            Status::Fail
        );
        let f = run_finding(&a, 0, "en15259-velocity-ratio");
        assert_eq!(f.status, Status::Fail);
        assert!(
            (f.measured.unwrap() - (183.0f64 / 5.0).sqrt()).abs() < 1e-6,
            "{}",
            f.message
        );
        assert_eq!(
            run_finding(&a, 0, "en15259-flow-angle").status,
            Status::NotApplicable
        );
    }

    #[test]
    fn en15259_reverse_flow_fails() {
        let mut neg = ISO_A;
        neg[9] = -20.0;
        let a = iso(&neg, &ISO_B, &[], "[flow]\nnegative = \"signed\"\n");
        let f = run_finding(&a, 0, "en15259-reverse-flow");
        assert_eq!(f.status, Status::Fail, "{}", f.message);
        assert!(
            f.message.to_string().contains("A10 (\u{2212}20 Pa)"),
            "{}",
            f.message
        );
        let f = run_finding(&a, 0, "negative-readings");
        assert!(f.message.to_string().contains("signed"), "{}", f.message);
        assert_eq!(
            run_finding(&a, 0, "en15259-velocity-ratio").status,
            Status::Fail
        );
    }

    #[test]
    fn method_2f_needs_20_ft_s() {
        // EPA Method 2F §1.2 [P]: average velocity ≥ 20 ft/s. The §8 data give 50.9 ft/s; a
        // quarter of the Δp gives half the velocity, 25 ft/s, and a twelfth 14.7 ft/s.
        let yaw = [0.0; 12];
        let extra = "[flow]\nangles = \"yaw-pitch\"\n";
        let a = epa_with(&[("yaw[deg]", &yaw), ("pitch[deg]", &yaw)], extra);
        assert_eq!(
            run_finding(&a, 0, "method-2f-velocity").status,
            Status::Pass
        );
        let low_a: Vec<f64> = EPA_DP_A.iter().map(|d| d / 12.0).collect();
        let low_b: Vec<f64> = EPA_DP_B.iter().map(|d| d / 12.0).collect();
        let csv = csv(
            &[("A", &low_a), ("B", &low_b)],
            "inH2O",
            &[("yaw[deg]", &yaw), ("pitch[deg]", &yaw)],
        );
        let a = assess_text(
            &survey(
                EPA_SURVEY
                    .replace("temperature = \"300 F\"", "temperature = \"303 F\"")
                    .as_str(),
                &["1"],
                extra,
            ),
            &[("run1.csv", csv)],
        );
        let f = run_finding(&a, 0, "method-2f-velocity");
        assert_eq!(f.status, Status::Fail, "{}", f.message);
        assert!(f.message.to_string().contains("20 ft/s"), "{}", f.message);
        assert_eq!(
            run_finding(&epa_one_run(""), 0, "method-2f-velocity").status,
            Status::NotApplicable
        );
    }

    #[test]
    fn profile_indicators_warn() {
        // line B at 1.5 × the Δp of line A: velocities √1.5 = 1.2247 ×, spread 2(k−1)/(1+k)
        // = 20.2 % of the plane mean > 10 % → warn
        let b: Vec<f64> = EPA_DP_A.iter().map(|d| d * 1.5).collect();
        let a = assess_text(
            &survey(EPA_SURVEY, &["1"], ""),
            &[(
                "run1.csv",
                csv(&[("A", &EPA_DP_A), ("B", &b)], "inH2O", &[]),
            )],
        );
        let f = run_finding(&a, 0, "line-asymmetry");
        assert_eq!(f.status, Status::Warn);
        let k = 1.5f64.sqrt();
        assert!((f.measured.unwrap() - 2.0 * (k - 1.0) / (1.0 + k)).abs() < 1e-9);
        assert_eq!(a.verdict, crate::assess::Verdict::Warn);
        assert_eq!(
            run_finding(&epa_one_run(""), 0, "line-asymmetry").status,
            Status::Pass
        );
        // a peak at the wall point (4.4 % of D: 45.6 % from the centre) → warn
        let skew = [0.70, 0.55, 0.50, 0.45, 0.40, 0.35];
        let a = assess_text(
            &survey(EPA_SURVEY, &["1"], ""),
            &[(
                "run1.csv",
                csv(&[("A", &skew), ("B", &EPA_DP_B)], "inH2O", &[]),
            )],
        );
        let f = run_finding(&a, 0, "off-centre-peak");
        assert_eq!(f.status, Status::Warn, "{}", f.message);
        assert!(
            f.message.to_string().contains("line A peaks at point 1"),
            "{}",
            f.message
        );
        assert_eq!(
            run_finding(&epa_one_run(""), 0, "off-centre-peak").status,
            Status::Pass
        );
    }

    proptest::proptest! {
        /// Invariants of the two Δp statistics (derived from their definitions): T ≥ 1 and it
        /// does not depend on the pressure unit (Δp and K scaled together); the distribution share
        /// does not change when every reading is scaled or the readings are reordered.
        #[test]
        fn t_factor_and_share_invariants(
            dp in proptest::collection::vec(0.001f64..2.0, 4..30),
            k in 0.0001f64..0.05,
            scale in 0.01f64..1000.0,
            rot in 0usize..30,
        ) {
            let t = t_factor(&dp, k);
            proptest::prop_assert!(t >= 1.0);
            let scaled: Vec<f64> = dp.iter().map(|d| d * scale).collect();
            proptest::prop_assert!((t_factor(&scaled, k * scale) - t).abs() < 1e-9 * t);
            let (n, _) = distribution_share(&dp, 0.1);
            proptest::prop_assert_eq!(distribution_share(&scaled, 0.1).0, n);
            let mut turned = dp.clone();
            let len = turned.len();
            turned.rotate_left(rot % len);
            proptest::prop_assert_eq!(distribution_share(&turned, 0.1).0, n);
        }
    }
}
