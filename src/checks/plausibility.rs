//! Plausibility checks: values that can be measured but are unlikely to be right, named so a
//! reviewer looks at them before the report is signed. The impossible values are refused earlier,
//! by the input layer against `crate::plausibility`.
//!
//! Owns: a point far out of line with its neighbours, Δp against the gauge's resolution, the duct
//! against a typical size range, the dry composition against what combustion in air allows, the
//! moisture against saturation, the Method 4 sample volume, probe marks against the probe's length,
//! and the Method 2H conditions (the default factor on large traverses, the wall-effects traverse).
//! No files, no printing.

use super::{
    CheckDef, Finding, Group, Judge, LimitKind, LimitSpec, Rule, RunView, Status, Stricter,
    Subject, ALL, EPA, HVAC, STACK,
};
use crate::display::{list, number, percent, q, Kind, Text};
use crate::flow::wall_effects::{DremSource, MIN_WALL_POINTS};
use crate::layout::{probe_marks, MarkStep, Reach};
use crate::survey::{DryGas, WallFactor};
use crate::text;

const FRACTION: LimitKind = LimitKind::Quantity(Kind::Percent);
const LENGTH: LimitKind = LimitKind::Quantity(Kind::Length);
const VOLUME: LimitKind = LimitKind::Quantity(Kind::GasVolume);
const CMP_TOL: f64 = 1e-9;

pub static POINT_OUTLIER: CheckDef = CheckDef {
    id: "point-outlier",
    group: Group::Data,
    description: "a single Δp far out of line with its neighbours on the same line (a slipped decimal point or a mis-keyed reading)",
    source: "common practice (data plausibility: velocity profiles change gradually from point to point)",
    criterion: "an inner point against both neighbours, an end point against the one beside it (higher only)",
    limits: &[LimitSpec::fixed(
        "ratio",
        "no Δp more than {} times its neighbours' (or less than its reciprocal)",
        4.0,
        LimitKind::Number,
        Stricter::Lower,
    )],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Run(point_outlier),
};

pub static DP_RESOLUTION: CheckDef = CheckDef {
    id: "dp-resolution",
    group: Group::Data,
    description: "each Δp reading spans enough steps of the gauge's resolution to be read to a few percent",
    source: "common practice (a reading of n resolution steps carries up to ±1/(2n) from the resolution alone)",
    criterion: "the resolution is [instruments.dp] resolution, else the step the readings were written to",
    limits: &[LimitSpec::fixed(
        "steps",
        "every non-zero reading ≥ {} resolution steps",
        10.0,
        LimitKind::Number,
        Stricter::Higher,
    )],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Warn,
    judge: Judge::Run(dp_resolution),
};

pub static GEOMETRY_RANGE_STACK: CheckDef = CheckDef {
    id: "geometry-range-stack",
    group: Group::Plane,
    description: "the stack's size against the range stacks are built in (catches a dimension in the wrong unit)",
    source: "common practice (stacks traversed by Method 1 are 12 in and larger; the widest are about 50 ft)",
    criterion: "",
    limits: &[
        LimitSpec::fixed("minimum", "(equivalent) diameter ≥ {}", 0.3, LENGTH, Stricter::Higher),
        LimitSpec::fixed("maximum", "and ≤ {}", 15.0, LENGTH, Stricter::Lower),
    ],
    conventions: STACK,
    from_memory: false,
    on_violation: Status::Warn,
    judge: Judge::Survey(geometry_range),
};

pub static GEOMETRY_RANGE_HVAC: CheckDef = CheckDef {
    id: "geometry-range-hvac",
    group: Group::Plane,
    description: "the duct's size against the range air-handling ducts are built in (catches a dimension in the wrong unit)",
    source: "common practice (HVAC ducts from 4 in to about 16 ft)",
    criterion: "",
    limits: &[
        LimitSpec::fixed("minimum", "(equivalent) diameter ≥ {}", 0.1, LENGTH, Stricter::Higher),
        LimitSpec::fixed("maximum", "and ≤ {}", 5.0, LENGTH, Stricter::Lower),
    ],
    conventions: HVAC,
    from_memory: false,
    on_violation: Status::Warn,
    judge: Judge::Survey(geometry_range),
};

pub static GAS_COMPOSITION: CheckDef = CheckDef {
    id: "gas-composition",
    group: Group::Run,
    description: "the dry composition against what combustion in air allows",
    source: "common practice (burning fuel in air turns O2 into CO2 and water: CO2 + O2 stays at or below air's 20.9 %, and CO2 below about 20 %; calcining kilns and oxygen-enriched firing exceed it and need a reason)",
    criterion: "",
    limits: &[
        LimitSpec::fixed("co2", "CO2 ≤ {}", 0.20, FRACTION, Stricter::Lower),
        LimitSpec::fixed("o2_plus_co2", "O2 + CO2 ≤ {}", 0.21, FRACTION, Stricter::Lower),
    ],
    conventions: STACK,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Run(gas_composition),
};

pub static MOISTURE_SATURATION: CheckDef = CheckDef {
    id: "moisture-saturation",
    group: Group::Run,
    description: "the measured or given moisture against saturation at the stack temperature (the lower is used)",
    source: "EPA Method 4 (40 CFR 60 App. A-3) §12.1.7: in saturated gas the lower of the train value and saturation is used (clause number from memory)",
    criterion: "",
    limits: &[LimitSpec::fixed(
        "far",
        "a value more than {} times saturation is named as a likely error",
        1.25,
        LimitKind::Number,
        Stricter::Lower,
    )],
    conventions: STACK,
    from_memory: false,
    on_violation: Status::Warn,
    judge: Judge::Run(moisture_saturation),
};

pub static METHOD4_SAMPLE_VOLUME: CheckDef = CheckDef {
    id: "method4-sample-volume",
    group: Group::Run,
    description: "a Method 4 train metered at least the method's minimum dry gas volume",
    source: "EPA Method 4 (40 CFR 60 App. A-3) §8.1: at least 0.60 dscm (21 dscf) at standard conditions",
    criterion: "",
    limits: &[LimitSpec::fixed(
        "minimum",
        "Vm(std) ≥ {}",
        0.60,
        VOLUME,
        Stricter::Higher,
    )],
    conventions: STACK,
    from_memory: true,
    on_violation: Status::Fail,
    judge: Judge::Run(method4_sample_volume),
};

pub static PROBE_REACH: CheckDef = CheckDef {
    id: "probe-reach",
    group: Group::Plane,
    description: "the deepest probe mark against the probe's stated length",
    source: "common practice (a probe must reach every mark; a plane too wide for the probe is traversed to the centre from ports on opposite sides)",
    criterion: "deepest insertion (point + port) ≤ [probe] length",
    limits: &[],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Warn,
    judge: Judge::Survey(probe_reach),
};

pub static METHOD_2H_DEFAULT_POINTS: CheckDef = CheckDef {
    id: "method-2h-default-points",
    group: Group::Plane,
    description: "the Method 2H default wall factor is used on a traverse of no more than 16 points",
    source: "EPA Method 2H (40 CFR 60 App. A-2) §2.2.2 defaults, derived from 16-point traverses; EPA guidance that more points may over-correct (from memory)",
    criterion: "",
    limits: &[LimitSpec::fixed(
        "maximum_points",
        "Method 1 points ≤ {}",
        16.0,
        LimitKind::Count,
        Stricter::Lower,
    )],
    conventions: EPA,
    from_memory: true,
    on_violation: Status::Warn,
    judge: Judge::Survey(method_2h_default_points),
};

pub static METHOD_2H_WALL_TRAVERSE: CheckDef = CheckDef {
    id: "method-2h-wall-traverse",
    group: Group::Plane,
    description: "the wall-effects traverse behind a calculated Method 2H factor",
    source: "EPA Method 2H (40 CFR 60 App. A-2) §2.2.1, §8.2: at least eight wall-effects points, 1 in (2.5 cm) apart from the wall",
    criterion: "velocity at drem measured, not stood in for",
    limits: &[LimitSpec::fixed(
        "minimum_points",
        "≥ {} wall-effects points per traverse",
        MIN_WALL_POINTS as f64,
        LimitKind::Count,
        Stricter::Higher,
    )],
    conventions: EPA,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Survey(method_2h_wall_traverse),
};

/// Positive Δp readings of each line, in point order: (line, point, Δp Pa).
fn lines_of<'a>(run: &'a RunView) -> Vec<Vec<(&'a str, usize, f64)>> {
    let mut out: Vec<Vec<(&str, usize, f64)>> = Vec::new();
    for p in &run.result.points {
        match out.iter_mut().find(|l| l[0].0 == p.line) {
            Some(l) => l.push((&p.line, p.point, p.dp_pa)),
            None => out.push(vec![(&p.line, p.point, p.dp_pa)]),
        }
    }
    for l in &mut out {
        l.sort_by_key(|x| x.1);
    }
    out
}

fn point_outlier(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let k = rule.value("ratio");
    let mut named: Vec<Text> = Vec::new();
    let mut worst: f64 = 1.0;
    let dp = |pa: f64| q(Kind::VelocityPressure, pa);
    for line in lines_of(run) {
        for (i, &(l, p, v)) in line.iter().enumerate() {
            if v <= 0.0 {
                continue;
            }
            let prev = i.checked_sub(1).map(|j| line[j].2).filter(|d| *d > 0.0);
            let next = line.get(i + 1).map(|x| x.2).filter(|d| *d > 0.0);
            let (ratio, flagged) = match (prev, next) {
                (Some(a), Some(b)) => {
                    let (ra, rb): (f64, f64) = (v / a, v / b);
                    let high = ra.min(rb);
                    let low = (1.0 / ra).min(1.0 / rb);
                    (
                        high.max(low),
                        (ra > k && rb > k) || (ra < 1.0 / k && rb < 1.0 / k),
                    )
                }
                (Some(a), None) | (None, Some(a)) => (v / a, v / a > k),
                (None, None) => (1.0, false),
            };
            worst = worst.max(ratio);
            if flagged {
                let around: Vec<Text> = [prev, next]
                    .iter()
                    .flatten()
                    .map(|x| Text::from(dp(*x)))
                    .collect();
                named.push(text!(
                    "line {} point {} reads {} against {}",
                    l.to_string(),
                    p,
                    dp(v),
                    Text::join(around, " and ")
                ));
            }
        }
    }
    if named.is_empty() {
        rule.finding(
            Status::Pass,
            Some(worst),
            "1",
            text!(
                "no point stands out from its neighbours (largest ratio {})",
                number(worst)
            ),
            &[],
        )
    } else {
        rule.finding(
            rule.violated(),
            Some(worst),
            "1",
            text!(
                "{}: a slipped decimal point or a mis-keyed reading; re-read or correct the point",
                list(named, 4)
            ),
            &[],
        )
    }
}

fn dp_resolution(rule: &Rule, s: &Subject, run: &RunView) -> Finding {
    let min_steps = rule.value("steps");
    let (step_pa, basis) = match s.instruments.dp.resolution_pa.filter(|r| *r > 0.0) {
        Some(r) => (r, "the gauge's stated resolution"),
        None => {
            let Some(unit) = run.dp_unit else {
                return rule.not_applicable("the gauge's resolution is not known");
            };
            if unit.dimension != crate::units::Dimension::Pressure {
                return rule.not_applicable(
                    "readings are liquid columns: state [instruments.dp] resolution",
                );
            }
            let decimals = run
                .readings
                .readings
                .iter()
                .map(|r| r.dp_decimals)
                .max()
                .unwrap_or(0)
                .min(12);
            (
                unit.factor * 10f64.powi(-(decimals as i32)),
                "the step the readings were written to",
            )
        }
    };
    let small: Vec<Text> = run
        .result
        .points
        .iter()
        .filter(|p| p.dp_pa.abs() > 0.0 && p.dp_pa.abs() / step_pa < min_steps - CMP_TOL)
        .map(|p| {
            text!(
                "{}{} ({} steps)",
                p.line.clone(),
                p.point,
                number((p.dp_pa.abs() / step_pa).round())
            )
        })
        .collect();
    let step = q(Kind::VelocityPressure, step_pa);
    if small.is_empty() {
        rule.finding(
            Status::Pass,
            Some(0.0),
            "1",
            text!(
                "every reading spans at least {} steps of {} ({})",
                number(min_steps),
                step,
                basis
            ),
            &[],
        )
    } else {
        let n = small.len();
        rule.finding(
            rule.violated(),
            Some(n as f64),
            "1",
            text!(
                "{} reading{} span fewer than {} steps of {} ({}): {}; use a more sensitive gauge",
                n,
                if n == 1 { "" } else { "s" },
                number(min_steps),
                step,
                basis,
                list(small, 6)
            ),
            &[],
        )
    }
}

fn geometry_range(rule: &Rule, s: &Subject) -> Vec<Finding> {
    let duct = s.plane.layout.duct();
    let de = duct.equivalent_diameter_m();
    let (lo, hi) = (rule.value("minimum"), rule.value("maximum"));
    let what = if duct.is_round() {
        "diameter"
    } else {
        "equivalent diameter"
    };
    let size = text!("{} {}", what, q(Kind::Length, de));
    let range = text!(
        "typical range {} to {}",
        q(Kind::Length, lo),
        q(Kind::Length, hi)
    );
    let f = if de < lo * (1.0 - CMP_TOL) || de > hi * (1.0 + CMP_TOL) {
        rule.finding(
            rule.violated(),
            Some(de),
            "m",
            text!(
                "{} is outside the {}: check the number and its unit in [duct]",
                size,
                range
            ),
            &[],
        )
    } else {
        rule.finding(
            Status::Pass,
            Some(de),
            "m",
            text!("{}, {}", size, range),
            &[],
        )
    };
    vec![f]
}

fn gas_composition(rule: &Rule, s: &Subject, run: &RunView) -> Finding {
    let gas = s.survey.gas_for(run.spec);
    let DryGas::Composition { o2, co2, .. } = gas.dry else {
        return rule.not_applicable("no dry composition is given (a molar mass or air)");
    };
    let (max_co2, max_sum) = (rule.value("co2"), rule.value("o2_plus_co2"));
    let state = text!(
        "O2 {}, CO2 {}, O2 + CO2 {}",
        percent(o2),
        percent(co2),
        percent(o2 + co2)
    );
    let mut wrong = Vec::new();
    if co2 > max_co2 + CMP_TOL {
        wrong.push(text!("CO2 above {}", percent(max_co2)));
    }
    if o2 + co2 > max_sum + CMP_TOL {
        wrong.push(text!(
            "O2 + CO2 above the {} combustion in air allows",
            percent(max_sum)
        ));
    }
    if wrong.is_empty() {
        rule.finding(Status::Pass, Some(o2 + co2), "1", state, &[])
    } else {
        rule.finding(
            rule.violated(),
            Some(o2 + co2),
            "1",
            text!(
                "{}: {}; check the analyser readings (wet against dry basis, a swapped O2 and CO2)",
                state,
                Text::join(wrong, ", ")
            ),
            &[],
        )
    }
}

fn moisture_saturation(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let g = &run.result.gas;
    let (Some(measured), what) = (
        g.measured_bws,
        if g.method4.is_some() {
            "the Method 4 train gives"
        } else {
            "the given moisture is"
        },
    ) else {
        return rule.not_applicable("the moisture is not measured or given as a fraction");
    };
    let t = q(Kind::Temperature, run.result.mean_temperature_k);
    let Some(sat) = g.saturation_bws else {
        return rule.finding(
            Status::Pass,
            Some(measured),
            "1",
            text!(
                "{} {}; at {} the gas cannot be saturated at this pressure",
                what,
                percent(measured),
                t
            ),
            &[],
        );
    };
    let far = rule.value("far");
    let id = run.spec.id.clone();
    let (status, msg) = if measured <= sat + CMP_TOL {
        (
            Status::Pass,
            if sat >= 1.0 {
                text!(
                    "{} {}; at {} saturation is above 100 % (the gas is above its boiling point) and cannot limit it",
                    what,
                    percent(measured),
                    t
                )
            } else {
                text!(
                    "{} {}, below saturation {} at {}",
                    what,
                    percent(measured),
                    percent(sat),
                    t
                )
            },
        )
    } else if measured > far * sat {
        (
            rule.violated(),
            text!(
                "{} {} for run {}, far above saturation {} at {}: saturation is used, but a value this high points to a weighing or meter-volume error",
                what,
                percent(measured),
                id,
                percent(sat),
                t
            ),
        )
    } else {
        (
            rule.violated(),
            text!(
                "{} {} for run {}, above saturation {} at {}: water droplets in the gas; saturation is used (the lower value)",
                what,
                percent(measured),
                id,
                percent(sat),
                t
            ),
        )
    };
    rule.finding(status, Some(measured), "1", msg, &[])
}

fn method4_sample_volume(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let Some(m4) = &run.result.gas.method4 else {
        return rule.not_applicable("the run's moisture is not from a Method 4 train");
    };
    let min = rule.value("minimum");
    let v = m4.meter_volume_std_m3;
    let vol = |m3: f64| q(Kind::GasVolume, m3);
    if v >= min * (1.0 - CMP_TOL) {
        rule.finding(
            Status::Pass,
            Some(v),
            "m3",
            text!("Vm(std) {} ≥ {}", vol(v), vol(min)),
            &[],
        )
    } else {
        rule.finding(
            rule.violated(),
            Some(v),
            "m3",
            text!(
                "run {}: Vm(std) {} is below the {} a Method 4 train meters; check the meter reading (a dropped digit?)",
                run.spec.id.clone(),
                vol(v),
                vol(min)
            ),
            &[],
        )
    }
}

fn probe_reach(rule: &Rule, s: &Subject) -> Vec<Finding> {
    let Some(length) = s.survey.probe.length_m else {
        return vec![rule.not_applicable("[probe] states no length")];
    };
    let marks = probe_marks(&s.plane.layout, s.survey.port_length_m, MarkStep::None);
    let Some(deepest) = marks
        .iter()
        .max_by(|a, b| a.insertion_m.total_cmp(&b.insertion_m))
    else {
        return vec![rule.not_applicable("the plane has no points")];
    };
    let l = |m: f64| q(Kind::Position, m);
    let f = if deepest.insertion_m <= length * (1.0 + CMP_TOL) {
        rule.finding(
            Status::Pass,
            Some(deepest.insertion_m),
            "m",
            text!(
                "deepest mark {} ({}{}) within the {} probe",
                l(deepest.insertion_m),
                deepest.line.clone(),
                deepest.point,
                q(Kind::Length, length)
            ),
            &[],
        )
    } else {
        let hint = if s.plane.layout.reach() == Reach::Diameter && s.plane.layout.duct().is_round()
        {
            "; traverse half-diameters from ports round the stack ([layout] reach = \"radius\", lines = 4)"
        } else {
            "; a longer probe is needed"
        };
        let beyond: Vec<Text> = marks
            .iter()
            .filter(|m| m.insertion_m > length * (1.0 + CMP_TOL))
            .map(|m| text!("{}{}", m.line.clone(), m.point))
            .collect();
        rule.finding(
            rule.violated(),
            Some(deepest.insertion_m),
            "m",
            text!(
                "marks reach {} but the probe is {} long: {} beyond it{}",
                l(deepest.insertion_m),
                q(Kind::Length, length),
                list(beyond, 6),
                hint
            ),
            &[],
        )
    };
    vec![f]
}

fn method_2h_default_points(rule: &Rule, s: &Subject) -> Vec<Finding> {
    if s.survey.options.wall_factor != WallFactor::Method2hDefault {
        return vec![rule.not_applicable("the Method 2H default wall factor is not used")];
    }
    let n = s.plane.layout.total_points();
    let max = rule.value("maximum_points");
    let f = if (n as f64) <= max + CMP_TOL {
        rule.finding(
            Status::Pass,
            Some(n as f64),
            "1",
            text!("{} Method 1 points: the default factor applies", n),
            &[],
        )
    } else {
        rule.finding(
            rule.violated(),
            Some(n as f64),
            "1",
            text!(
                "the default wall factor is used on {} points: the defaults were derived from 16-point traverses and may over-correct a traverse with points nearer the wall; derive the factor from a wall-effects traverse (wall_factor = \"method-2h-calculated\")",
                n
            ),
            &[],
        )
    };
    vec![f]
}

fn method_2h_wall_traverse(rule: &Rule, s: &Subject) -> Vec<Finding> {
    if s.survey.options.wall_factor != WallFactor::Method2hCalculated {
        return vec![rule.not_applicable("no calculated Method 2H factor")];
    }
    let min = rule.value("minimum_points");
    // Method 2H §8.2: 1 in apart, 2.5 cm in metric units
    let metric = s.table().system != crate::display::UnitSystem::InchPound;
    let increment = if metric { 0.025 } else { 0.0254 };
    let mut out = Vec::new();
    for (id, w) in s.wall_effects {
        let mut problems: Vec<Text> = Vec::new();
        if (w.wall_point_count as f64) < min - CMP_TOL {
            problems.push(text!(
                "{} wall-effects points, fewer than {}",
                w.wall_point_count,
                number(min)
            ));
        }
        let uneven: Vec<Text> = w
            .sectors
            .iter()
            .filter(|sec| {
                let n = if sec.vdrem_source == DremSource::Measured && sec.wall_points.len() > 1 {
                    sec.wall_points.len() - 1
                } else {
                    sec.wall_points.len()
                };
                sec.wall_points[..n]
                    .iter()
                    .enumerate()
                    .any(|(i, p)| (p.0 - increment * (i + 1) as f64).abs() > 0.002)
            })
            .map(|sec| text!("{}{}", sec.line.clone(), sec.point))
            .collect();
        let stand_in: Vec<Text> = w
            .sectors
            .iter()
            .filter(|sec| sec.vdrem_source != DremSource::Measured)
            .map(|sec| text!("{}{}", sec.line.clone(), sec.point))
            .collect();
        let status = if !problems.is_empty() {
            rule.violated()
        } else if !uneven.is_empty() || !stand_in.is_empty() {
            Status::Warn
        } else {
            Status::Pass
        };
        let mut msg = text!(
            "run {}: WAF {} from {} wall-effects points (vavg {}, VAVG {})",
            id.clone(),
            number(w.factor),
            w.wall_point_count,
            q(Kind::Velocity, w.unadjusted_mean_m_s),
            q(Kind::Velocity, w.adjusted_mean_m_s)
        );
        if !problems.is_empty() {
            msg.push(text!("; {}", Text::join(problems, "; ")));
        }
        if !uneven.is_empty() {
            msg.push(text!(
                "; points not at {} steps from the wall at {}",
                q(Kind::Length, increment),
                list(uneven, 6)
            ));
        }
        if !stand_in.is_empty() {
            msg.push(text!(
                "; no reading at drem for {}: the nearest reading stands in for it",
                list(stand_in, 6)
            ));
        }
        let mut f = rule.finding(status, Some(w.factor), "1", msg, &[]);
        f.subject = Some(format!("run {id}"));
        out.push(f);
    }
    if out.is_empty() {
        out.push(rule.finding(
            rule.violated(),
            None,
            "",
            "no run has a wall-effects traverse",
            &[],
        ));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::checks::testkit::*;

    fn one_run(survey_text: &str, csv_text: String) -> crate::assess::Assessment {
        assess_text(&survey(survey_text, &["1"], ""), &[("run1.csv", csv_text)])
    }

    fn epa_with(from: &str, to: &str) -> String {
        assert!(EPA_SURVEY.contains(from), "{from}");
        EPA_SURVEY.replace(from, to)
    }

    #[test]
    fn point_outlier_names_the_point() {
        // common practice: the §8 traverse changes gradually
        let a = epa_one_run("");
        assert_eq!(run_finding(&a, 0, "point-outlier").status, Status::Pass);
        // A3 typed 6.0 instead of 0.60: ten times both neighbours
        let mut a3 = EPA_DP_A;
        a3[2] = 6.0;
        let c = csv(
            &[("A", &a3), ("B", &EPA_DP_B)],
            "inH2O",
            &[("temperature[F]", &EPA_T_F)],
        );
        let a = one_run(EPA_SURVEY, c);
        let f = run_finding(&a, 0, "point-outlier");
        assert_eq!(f.status, Status::Fail);
        assert!(
            f.message
                .to_string()
                .starts_with("line A point 3 reads 6 inH2O against 0.55 inH2O and 0.62 inH2O"),
            "{}",
            f.message
        );
    }

    #[test]
    fn dp_against_the_gauge_resolution() {
        // §8 readings written to 0.01 inH2O: 48 to 63 steps, more than 10
        let a = epa_one_run("");
        assert_eq!(run_finding(&a, 0, "dp-resolution").status, Status::Pass);
        // with a gauge of 0.1 inH2O resolution the same readings are 5 to 6 steps
        let a = epa_one_run("[instruments.dp]\nresolution = \"0.1 inH2O\"\n");
        let f = run_finding(&a, 0, "dp-resolution");
        assert_eq!(f.status, Status::Warn);
        assert!(
            f.message
                .to_string()
                .contains("12 readings span fewer than 10 steps"),
            "{}",
            f.message
        );
    }

    #[test]
    fn geometry_against_the_typical_range() {
        let a = epa_one_run("");
        assert_eq!(
            survey_finding(&a, "geometry-range-stack").status,
            Status::Pass
        );
        // 60 ft: larger than any stack (a dimension in the wrong unit)
        let a = one_run(
            &epa_with("diameter = \"5.0 ft\"", "diameter = \"60 ft\""),
            epa_csv(),
        );
        let f = survey_finding(&a, "geometry-range-stack");
        assert_eq!(f.status, Status::Warn);
        assert!(
            f.message.to_string().contains("outside the typical range"),
            "{}",
            f.message
        );
        // HVAC: a 24 × 16 in duct passes, 24 × 16 ft does not
        let row = [0.2, 0.25, 0.3, 0.25, 0.2];
        let c = csv(
            &[("A", &row), ("B", &row), ("C", &row), ("D", &row)],
            "inH2O",
            &[],
        );
        let hv = |t: &str| format!("{t}{}", run_block("1", None, None));
        let a = assess_text(&hv(HVAC_SURVEY), &[("run1.csv", c.clone())]);
        assert_eq!(
            survey_finding(&a, "geometry-range-hvac").status,
            Status::Pass
        );
        let big = HVAC_SURVEY
            .replace("width = \"24 in\"", "width = \"24 ft\"")
            .replace("height = \"16 in\"", "height = \"16 ft\"");
        let a = assess_text(&hv(&big), &[("run1.csv", c)]);
        assert_eq!(
            survey_finding(&a, "geometry-range-hvac").status,
            Status::Warn
        );
    }

    #[test]
    fn composition_against_combustion_in_air() {
        let a = epa_one_run("");
        assert_eq!(run_finding(&a, 0, "gas-composition").status, Status::Pass);
        // CO2 22 %: above 20 %
        let a = one_run(&epa_with("co2 = \"10 %\"", "co2 = \"22 %\""), epa_csv());
        let f = run_finding(&a, 0, "gas-composition");
        assert_eq!(f.status, Status::Fail);
        assert!(
            f.message.to_string().contains("CO2 above 20 %"),
            "{}",
            f.message
        );
        // O2 12 % and CO2 12 %: 24 % together, more than the air burned held
        let s =
            epa_with("o2 = \"8 %\"", "o2 = \"12 %\"").replace("co2 = \"10 %\"", "co2 = \"12 %\"");
        let a = one_run(&s, epa_csv());
        let f = run_finding(&a, 0, "gas-composition");
        assert_eq!(f.status, Status::Fail);
        assert!(
            f.message.to_string().contains("O2 + CO2 above"),
            "{}",
            f.message
        );
        // a calcining kiln relaxes it with a reason
        let a = one_run(&epa_with("co2 = \"10 %\"", "co2 = \"22 %\""), epa_csv());
        assert!(a.failed());
    }

    #[test]
    fn moisture_against_saturation() {
        // 300 °F at 29.5 inHg: saturation is above 100 %, 10 % passes
        let a = epa_one_run("");
        let f = run_finding(&a, 0, "moisture-saturation");
        assert_eq!(f.status, Status::Pass);
        assert!(
            f.message.to_string().contains("cannot limit"),
            "{}",
            f.message
        );
        // a 120 °F scrubbed stack: saturation 11.6 % (ASHRAE p_ws 11.68 kPa at 48.9 °C over
        // 100.2 kPa); 12 % is just above (droplets), 20 % far above (an error)
        let cool = |m: &str| {
            let c = csv(
                &[("A", &EPA_DP_A), ("B", &EPA_DP_B)],
                "inH2O",
                &[("temperature[F]", &[120.0; 12])],
            );
            one_run(
                &epa_with("moisture = \"10 %\"", &format!("moisture = \"{m}\"")),
                c,
            )
        };
        let a = cool("8 %");
        assert_eq!(
            run_finding(&a, 0, "moisture-saturation").status,
            Status::Pass
        );
        let a = cool("12 %");
        let f = run_finding(&a, 0, "moisture-saturation");
        assert_eq!(f.status, Status::Warn);
        assert!(
            f.message.to_string().contains("water droplets"),
            "{}",
            f.message
        );
        let a = cool("20 %");
        let f = run_finding(&a, 0, "moisture-saturation");
        assert_eq!(f.status, Status::Warn);
        assert!(
            f.message.to_string().contains("far above saturation"),
            "{}",
            f.message
        );
    }

    const TRAIN: &str = "[gas.method4]\nimpinger_gain = \"152.3 g\"\nsilica_gain = \"18.7 g\"\nmeter_volume = \"VOLUME\"\nmeter_y = 0.987\nmeter_dh = \"1.85 inH2O\"\nmeter_temperature = \"84 F\"\n";

    #[test]
    fn method4_sample_volume_catches_a_dropped_digit() {
        let with_train = |v: &str| {
            let s = EPA_SURVEY.replace("moisture = \"10 %\"\n", "") + &TRAIN.replace("VOLUME", v);
            one_run(&s, epa_csv())
        };
        // 34.215 dcf meters 32.45 dscf (≥ 21 dscf, Method 4 §8.1 from memory)
        let a = with_train("34.215 dcf");
        let f = run_finding(&a, 0, "method4-sample-volume");
        assert_eq!(f.status, Status::Pass, "{}", f.message);
        // 3.4215 dcf: a dropped digit
        let a = with_train("3.4215 dcf");
        let f = run_finding(&a, 0, "method4-sample-volume");
        assert_eq!(f.status, Status::Fail);
        assert!(f.message.to_string().contains("3.245"), "{}", f.message);
        // without a train the check does not apply
        let a = epa_one_run("");
        assert_eq!(
            run_finding(&a, 0, "method4-sample-volume").status,
            Status::NotApplicable
        );
    }

    #[test]
    fn probe_marks_against_the_probe_length() {
        let a = epa_one_run("");
        assert_eq!(
            survey_finding(&a, "probe-reach").status,
            Status::NotApplicable
        );
        let long = epa_with(
            "coefficient = 0.84",
            "coefficient = 0.84\nlength = \"6 ft\"",
        );
        let a = one_run(&long, epa_csv());
        assert_eq!(survey_finding(&a, "probe-reach").status, Status::Pass);
        // a 4 ft probe cannot reach the far points of a 5 ft stack (57.7 in deep)
        let short = epa_with(
            "coefficient = 0.84",
            "coefficient = 0.84\nlength = \"4 ft\"",
        );
        let a = one_run(&short, epa_csv());
        let f = survey_finding(&a, "probe-reach");
        assert_eq!(f.status, Status::Warn);
        assert!(
            f.message.to_string().contains("reach = \"radius\""),
            "{}",
            f.message
        );
    }

    #[test]
    fn method_2h_default_factor_on_more_than_16_points() {
        let a = epa_one_run("[flow]\nwall_factor = \"method-2h-default\"\n");
        assert_eq!(
            survey_finding(&a, "method-2h-default-points").status,
            Status::Pass
        );
        // 2 × 12 points: 24 > 16
        let dp: Vec<f64> = [EPA_DP_A, EPA_DP_A].concat();
        let t: Vec<f64> = [EPA_T_F, EPA_T_F].concat();
        let c = csv(
            &[("A", &dp), ("B", &dp)],
            "inH2O",
            &[("temperature[F]", &t)],
        );
        let s = survey(
            &EPA_SURVEY.replace("points_per_line = 6", "points_per_line = 12"),
            &["1"],
            "[flow]\nwall_factor = \"method-2h-default\"\n",
        );
        let a = assess_text(&s, &[("run1.csv", c)]);
        let f = survey_finding(&a, "method-2h-default-points");
        assert_eq!(f.status, Status::Warn);
        assert!(f.message.to_string().contains("24 points"), "{}", f.message);
        assert!(
            f.message.to_string().contains("method-2h-calculated"),
            "{}",
            f.message
        );
    }

    /// A 16-point plane (2 × 8) with a wall-effects traverse at every exterior point.
    fn calculated(wall_rows: &str) -> crate::assess::Assessment {
        let dp = [0.50, 0.55, 0.60, 0.62, 0.62, 0.58, 0.52, 0.48];
        let c = csv(&[("A", &dp), ("B", &dp)], "inH2O", &[]);
        let s = survey(
            &EPA_SURVEY.replace("points_per_line = 6", "points_per_line = 8"),
            &["1"],
            "[flow]\nwall_factor = \"method-2h-calculated\"\n",
        )
        .replace(
            "readings = \"run1.csv\"\n",
            "readings = \"run1.csv\"\nwall_readings = \"wall1.csv\"\n",
        );
        let mut wall = "line,point,distance[in],dp[inH2O]\n".to_string();
        for (line, point) in [("A", 1), ("A", 8), ("B", 1), ("B", 8)] {
            for row in wall_rows.lines() {
                wall += &format!("{line},{point},{row}\n");
            }
        }
        assess_text(&s, &[("run1.csv", c), ("wall1.csv", wall)])
    }

    #[test]
    fn method_2h_wall_traverse() {
        // 1, 2, 3 in from the wall at each of 4 exterior points (12 points), then a reading
        // at drem (r = 30 in, p = 8: inner edge at √675 = 25.98 in, dlast 3 in,
        // drem = 30 − √((27² + 675)/2) = 3.505 in)
        let a = calculated("1,0.30\n2,0.38\n3,0.42\n3.5,0.45");
        let f = survey_finding(&a, "method-2h-wall-traverse");
        assert_eq!(f.status, Status::Pass, "{}", f.message);
        assert!(
            f.measured.unwrap() < 1.0 && f.measured.unwrap() > 0.9,
            "{f:?}"
        );
        // one wall point per sector: 4 in all, fewer than 8
        let a = calculated("1,0.30");
        let f = survey_finding(&a, "method-2h-wall-traverse");
        assert_eq!(f.status, Status::Fail);
        assert!(
            f.message
                .to_string()
                .contains("4 wall-effects points, fewer than 8"),
            "{}",
            f.message
        );
        // 1 and 2 in only (8 points): drem = 30 − √((28² + 675)/2) = 2.99 in has no reading
        // within 1/4 in, so the nearest stands in: a warning
        let a = calculated("1,0.30\n2,0.38");
        let f = survey_finding(&a, "method-2h-wall-traverse");
        assert_eq!(f.status, Status::Warn);
        assert!(f.message.to_string().contains("stands in"), "{}", f.message);
    }
}
