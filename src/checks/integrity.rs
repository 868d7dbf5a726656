//! Data-integrity findings for reviewers: identical reading sequences, runs of repeated values,
//! readings finer than the gauge can show, too many round numbers, and reported results that the
//! data do not reproduce.
//!
//! These are indicators, not proof: all but the reported-value comparison warn. They work on the
//! readings as recorded (file order, the decimals written) and on the computed results. Owns the
//! `[reported]` data model ([`ReportedValue`]); `input::assess_config` builds it. No files, no
//! printing.

use super::{
    CheckDef, Finding, Group, Judge, LimitDefault, LimitKind, LimitSpec, Rule, RunView, Status,
    Stricter, Subject, ALL,
};
use crate::display::{in_unit, list, number, percent, q, Kind, Text};
use crate::flow::design::{flow_on_basis, Flows};
use crate::flow::{Convention, RunResult};
use crate::readings::{Dp, Reading};
use crate::text;
use crate::units::FlowBasis;
use crate::units::{convert_out, Dimension, Unit};

const FRACTION: LimitKind = LimitKind::Quantity(Kind::Percent);
/// Two recorded values are the same when they agree to this relative tolerance (they come from
/// the same decimal text through the same unit factor, so any real difference is far larger).
const SAME_REL: f64 = 1e-9;
/// Shortest line compared by `identical-sequences`.
const MIN_SEQUENCE: usize = 3;
/// Fewest readings `round-numbers` judges (the share of a few readings says nothing).
const MIN_ROUND_SAMPLE: usize = 10;

pub static IDENTICAL_SEQUENCES: CheckDef = CheckDef {
    id: "identical-sequences",
    group: Group::Data,
    description:
        "two traverse lines (in one run or across runs) with the same Δp readings point for point",
    source: "common practice (data review)",
    criterion: "no two lines of 3 points or more with identical Δp sequences",
    limits: &[],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Warn,
    judge: Judge::Survey(identical_sequences),
};

pub static REPEATED_VALUES: CheckDef = CheckDef {
    id: "repeated-values",
    group: Group::Data,
    description: "the longest run of equal consecutive Δp readings, in the order recorded",
    source: "common practice (data review)",
    criterion: "",
    limits: &[LimitSpec {
        key: "longest_run",
        text: "no more than {} equal readings in a row",
        default: LimitDefault::Fixed(4.0),
        kind: LimitKind::Count,
        stricter: Stricter::Lower,
        quoting: &[],
    }],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Warn,
    judge: Judge::Run(repeated_values),
};

pub static RECORDED_RESOLUTION: CheckDef = CheckDef {
    id: "recorded-resolution",
    group: Group::Data,
    description: "readings recorded finer than the Δp gauge's stated resolution",
    source: "common practice (data review)",
    criterion:
        "every reading a whole number of the gauge's resolution steps ([instruments.dp] resolution)",
    limits: &[],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Warn,
    judge: Judge::Run(recorded_resolution),
};

pub static ROUND_NUMBERS: CheckDef = CheckDef {
    id: "round-numbers",
    group: Group::Data,
    description:
        "share of Δp readings whose last recorded digit is 0 or 5 (about 20 % for honest readings)",
    source: "common practice (data review; digit-preference screening)",
    criterion: "judged on runs of 10 readings or more",
    limits: &[LimitSpec {
        key: "share",
        text: "at most {} of readings ending in 0 or 5",
        default: LimitDefault::Fixed(0.5),
        kind: FRACTION,
        stricter: Stricter::Lower,
        quoting: &[],
    }],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Warn,
    judge: Judge::Run(round_numbers),
};

pub static REPORTED_VALUES: CheckDef = CheckDef {
    id: "reported-values",
    group: Group::Data,
    description: "values stated in [reported] agree with the results recomputed from the readings",
    source: "common practice (QA review; a figure recomputed from √(mean Δp) instead of the mean of √Δp is a known slip)",
    criterion: "",
    limits: &[LimitSpec {
        key: "tolerance",
        text: "reported within ±{} of the recomputed value",
        default: LimitDefault::Fixed(0.005),
        kind: FRACTION,
        stricter: Stricter::Lower,
        quoting: &[],
    }],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Survey(reported_values),
};

/// A result the survey says was reported.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ReportedQuantity {
    Velocity,
    ActualFlow,
    StandardFlow,
    DryStandardFlow,
    /// At 273.15 K and 101.325 kPa, wet (`Nm3/h`).
    NormalFlow,
    /// At 273.15 K and 101.325 kPa, dry (`dNm3/h`).
    DryNormalFlow,
    Density,
}

impl ReportedQuantity {
    pub const ALL: [ReportedQuantity; 7] = [
        ReportedQuantity::Velocity,
        ReportedQuantity::ActualFlow,
        ReportedQuantity::StandardFlow,
        ReportedQuantity::DryStandardFlow,
        ReportedQuantity::NormalFlow,
        ReportedQuantity::DryNormalFlow,
        ReportedQuantity::Density,
    ];

    /// Key in `[reported]`.
    pub fn key(self) -> &'static str {
        match self {
            ReportedQuantity::Velocity => "velocity",
            ReportedQuantity::ActualFlow => "actual_flow",
            ReportedQuantity::StandardFlow => "standard_flow",
            ReportedQuantity::DryStandardFlow => "dry_standard_flow",
            ReportedQuantity::NormalFlow => "normal_flow",
            ReportedQuantity::DryNormalFlow => "dry_normal_flow",
            ReportedQuantity::Density => "density",
        }
    }

    /// The key, or the trade's abbreviations `acfm`, `scfm`, `dscfm`.
    pub fn parse(key: &str) -> Option<ReportedQuantity> {
        match key.trim() {
            "acfm" => Some(ReportedQuantity::ActualFlow),
            "scfm" => Some(ReportedQuantity::StandardFlow),
            "dscfm" => Some(ReportedQuantity::DryStandardFlow),
            k => ReportedQuantity::ALL.into_iter().find(|q| q.key() == k),
        }
    }

    /// The flow of `basis`.
    pub fn flow(basis: FlowBasis) -> ReportedQuantity {
        match basis {
            FlowBasis::Actual => ReportedQuantity::ActualFlow,
            FlowBasis::Standard => ReportedQuantity::StandardFlow,
            FlowBasis::DryStandard => ReportedQuantity::DryStandardFlow,
            FlowBasis::Normal => ReportedQuantity::NormalFlow,
            FlowBasis::NormalDry => ReportedQuantity::DryNormalFlow,
        }
    }

    /// The basis of a flow; `None` for velocity and density.
    pub fn basis(self) -> Option<FlowBasis> {
        match self {
            ReportedQuantity::ActualFlow => Some(FlowBasis::Actual),
            ReportedQuantity::StandardFlow => Some(FlowBasis::Standard),
            ReportedQuantity::DryStandardFlow => Some(FlowBasis::DryStandard),
            ReportedQuantity::NormalFlow => Some(FlowBasis::Normal),
            ReportedQuantity::DryNormalFlow => Some(FlowBasis::NormalDry),
            ReportedQuantity::Velocity | ReportedQuantity::Density => None,
        }
    }

    pub fn dimension(self) -> Dimension {
        match self {
            ReportedQuantity::Velocity => Dimension::Velocity,
            ReportedQuantity::Density => Dimension::Density,
            _ => Dimension::Flow,
        }
    }

    pub fn name(self) -> &'static str {
        match self {
            ReportedQuantity::Velocity => "mean velocity",
            ReportedQuantity::ActualFlow => "actual flow",
            ReportedQuantity::StandardFlow => "standard flow",
            ReportedQuantity::DryStandardFlow => "dry standard flow",
            ReportedQuantity::NormalFlow => "normal flow",
            ReportedQuantity::DryNormalFlow => "dry normal flow",
            ReportedQuantity::Density => "gas density",
        }
    }

    /// Whether an error in the averaging of Δp scales this quantity (all but density).
    fn scales_with_velocity(self) -> bool {
        self != ReportedQuantity::Density
    }

    /// The recomputed value of a run; flows on the quantity's basis ([`flow_on_basis`]).
    fn of_run(self, r: &RunResult, convention: &Convention) -> f64 {
        let flows = Flows {
            actual_m3_s: r.actual_flow_m3_s,
            standard_m3_s: r.standard_flow_m3_s,
            dry_standard_m3_s: r.dry_standard_flow_m3_s,
        };
        match self.basis() {
            Some(b) => flow_on_basis(flows, b, convention),
            None if self == ReportedQuantity::Velocity => r.mean_velocity_m_s,
            None => r.density_kg_m3,
        }
    }
}

/// Which result a reported value belongs to.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum ReportedScope {
    Run(String),
    Average,
}

/// A reported value as written, with its SI value and unit.
#[derive(Debug, Clone, PartialEq)]
pub struct ReportedValue {
    pub scope: ReportedScope,
    pub quantity: ReportedQuantity,
    pub value_si: f64,
    /// The text as written, e.g. `"36803 cfm"`.
    pub raw: String,
    /// The unit it was written in (the recomputed value is shown in it too).
    pub unit: &'static Unit,
}

/// The value of a reading in the unit it was recorded in, rounded to the decimals written.
pub fn recorded_value(r: &Reading, unit: &Unit) -> f64 {
    let si = match r.dp {
        Dp::Pressure { pa } => pa,
        Dp::Column { height_m } => height_m,
    };
    let v = convert_out(si, unit);
    let scale = 10f64.powi(r.dp_decimals.min(12) as i32);
    (v * scale).round() / scale
}

fn same(a: f64, b: f64) -> bool {
    (a - b).abs() <= SAME_REL * a.abs().max(b.abs()).max(1e-300)
}

fn dp_si(r: &Reading) -> f64 {
    match r.dp {
        Dp::Pressure { pa } => pa,
        Dp::Column { height_m } => height_m,
    }
}

fn identical_sequences(rule: &Rule, s: &Subject) -> Vec<Finding> {
    // (run id, line label, Δp sequence in point order)
    let mut lines: Vec<(&str, &str, Vec<f64>)> = Vec::new();
    for run in &s.runs {
        let mut labels: Vec<&str> = Vec::new();
        for p in &run.result.points {
            if !labels.contains(&p.line.as_str()) {
                labels.push(&p.line);
            }
        }
        for l in labels {
            let seq: Vec<f64> = run
                .result
                .points
                .iter()
                .filter(|p| p.line == l)
                .map(|p| p.dp_pa)
                .collect();
            if seq.len() >= MIN_SEQUENCE {
                lines.push((&run.spec.id, l, seq));
            }
        }
    }
    let mut pairs = Vec::new();
    for i in 0..lines.len() {
        for j in i + 1..lines.len() {
            let ((run_a, line_a, a), (run_b, line_b, b)) = (&lines[i], &lines[j]);
            if a.len() == b.len() && a.iter().zip(b).all(|(x, y)| same(*x, *y)) {
                pairs.push(Text::from(format!(
                    "run {run_a} line {line_a} = run {run_b} line {line_b}"
                )));
            }
        }
    }
    let f = if pairs.is_empty() {
        rule.finding(
            Status::Pass,
            Some(0.0),
            "1",
            text!(
                "no two of the {} traverse lines have identical Δp sequences",
                lines.len()
            ),
            &[],
        )
    } else {
        rule.finding(
            rule.violated(),
            Some(pairs.len() as f64),
            "1",
            text!(
                "identical Δp sequences point for point: {}; copied data or a re-used sheet?",
                list(pairs, 6)
            ),
            &[],
        )
    };
    vec![f]
}

fn repeated_values(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let rs = &run.readings.readings;
    let limit = rule.value("longest_run");
    let mut best = (0usize, 0usize); // (length, start index)
    let mut i = 0;
    while i < rs.len() {
        let mut j = i + 1;
        while j < rs.len() && same(dp_si(&rs[i]), dp_si(&rs[j])) {
            j += 1;
        }
        if j - i > best.0 {
            best = (j - i, i);
        }
        i = j;
    }
    if rs.is_empty() {
        return rule.not_applicable("the run has no readings");
    }
    let first = &rs[best.1];
    // as recorded: in the unit of the readings file
    let value = match (run.dp_unit, first.dp) {
        (Some(u), _) => text!("{} {}", number(recorded_value(first, u)), u.symbol),
        (None, Dp::Pressure { pa }) => Text::from(q(Kind::VelocityPressure, pa)),
        (None, Dp::Column { height_m }) => Text::from(q(Kind::Length, height_m)),
    };
    let status = if best.0 as f64 > limit {
        rule.violated()
    } else {
        Status::Pass
    };
    rule.finding(
        status,
        Some(best.0 as f64),
        "1",
        text!(
            "longest run of equal readings in a row: {} ({}, from line {} point {}, file line {}), limit {}",
            best.0,
            value,
            first.line.clone(),
            first.point,
            first.source_line,
            limit as i64
        ),
        &[],
    )
}

fn pressure_unit(run: &RunView) -> Result<&'static Unit, &'static str> {
    match run.dp_unit {
        None => Err("the unit of the Δp column is not known"),
        Some(u) if u.dimension != Dimension::Pressure => {
            Err("Δp is read as a liquid column; state the resolution of the gauge in its own scale")
        }
        Some(u) => Ok(u),
    }
}

fn recorded_resolution(rule: &Rule, s: &Subject, run: &RunView) -> Finding {
    let Some(res_pa) = s.instruments.dp.resolution_pa.filter(|r| *r > 0.0) else {
        return rule.not_applicable("[instruments.dp] states no resolution");
    };
    let unit = match pressure_unit(run) {
        Ok(u) => u,
        Err(why) => return rule.not_applicable(why),
    };
    let step = convert_out(res_pa, unit);
    let finer: Vec<Text> = run
        .readings
        .readings
        .iter()
        .filter(|r| {
            let steps = recorded_value(r, unit) / step;
            (steps - steps.round()).abs() > 1e-6 * steps.abs().max(1.0)
        })
        .map(|r| {
            text!(
                "{}{} {}",
                r.line.clone(),
                r.point,
                number(recorded_value(r, unit))
            )
        })
        .collect();
    let n = run.readings.readings.len();
    // the resolution in the unit the readings were recorded in
    let res = in_unit(unit, res_pa);
    if finer.is_empty() {
        rule.finding(
            Status::Pass,
            Some(0.0),
            "1",
            text!(
                "all {} readings are whole steps of the stated resolution {}",
                n,
                res
            ),
            &[],
        )
    } else {
        rule.finding(
            rule.violated(),
            Some(finer.len() as f64),
            "1",
            text!(
                "{} of {} readings are finer than the gauge's stated resolution {}: {}",
                finer.len(),
                n,
                res,
                list(finer, 6)
            ),
            &[],
        )
    }
}

fn round_numbers(rule: &Rule, s: &Subject, run: &RunView) -> Finding {
    let Some(unit) = run.dp_unit else {
        return rule.not_applicable("the unit of the Δp column is not known");
    };
    let rs = &run.readings.readings;
    let decimals = rs.iter().map(|r| r.dp_decimals).max().unwrap_or(0).min(12);
    let scale = 10f64.powi(decimals as i32);
    let digits: Vec<i64> = rs
        .iter()
        .map(|r| (recorded_value(r, unit).abs() * scale).round() as i64)
        .filter(|k| *k != 0)
        .collect();
    if digits.len() < MIN_ROUND_SAMPLE {
        return rule.not_applicable(text!(
            "{} non-zero readings: too few to judge digit preference",
            digits.len()
        ));
    }
    if let (Some(res_pa), Dimension::Pressure) = (s.instruments.dp.resolution_pa, unit.dimension) {
        let steps = convert_out(res_pa, unit) * scale;
        let r5 = steps / 5.0;
        if steps >= 5.0 - 1e-9 && (r5 - r5.round()).abs() < 1e-6 {
            return rule.not_applicable(text!(
                "the gauge's stated resolution {} makes every reading end in 0 or 5",
                in_unit(unit, res_pa)
            ));
        }
    }
    let limit = rule.value("share");
    let round = digits.iter().filter(|k| *k % 5 == 0).count();
    let share = round as f64 / digits.len() as f64;
    let status = if share > limit + 1e-12 {
        rule.violated()
    } else {
        Status::Pass
    };
    rule.finding(
        status,
        Some(share),
        "1",
        text!(
            "{} of {} readings ({}) end in 0 or 5 at {} decimal{} of {}, limit {}{}",
            round,
            digits.len(),
            percent(share),
            decimals,
            if decimals == 1 { "" } else { "s" },
            unit.symbol,
            percent(limit),
            if status == Status::Pass {
                ""
            } else {
                ": estimated rather than read?"
            }
        ),
        &[],
    )
}

/// The recomputed value of a reported quantity and what √(mean Δp) averaging would have given.
fn recomputed(s: &Subject, v: &ReportedValue) -> Result<(f64, Option<f64>), String> {
    let wrong_ratio = |r: &RunResult| {
        (r.mean_velocity_m_s != 0.0).then(|| r.wrong_average_velocity_m_s / r.mean_velocity_m_s)
    };
    match &v.scope {
        ReportedScope::Run(id) => {
            let run = s
                .runs
                .iter()
                .find(|r| &r.spec.id == id)
                .ok_or_else(|| format!("the survey has no run `{id}`"))?;
            let x = v.quantity.of_run(run.result, s.convention);
            let wrong = v
                .quantity
                .scales_with_velocity()
                .then(|| wrong_ratio(run.result).map(|k| x * k))
                .flatten();
            Ok((x, wrong))
        }
        ReportedScope::Average => {
            let avg = s
                .average
                .ok_or_else(|| "no valid run: there is no average".to_string())?;
            let flows = Flows {
                actual_m3_s: avg.actual_flow_m3_s,
                standard_m3_s: avg.standard_flow_m3_s,
                dry_standard_m3_s: avg.dry_standard_flow_m3_s,
            };
            let x = match (v.quantity, v.quantity.basis()) {
                (_, Some(b)) => flow_on_basis(flows, b, s.convention),
                (ReportedQuantity::Velocity, None) => avg.mean_velocity_m_s,
                (_, None) => return Err("density is compared per run only".to_string()),
            };
            let runs: Vec<&RunResult> = s
                .runs
                .iter()
                .filter(|r| avg.runs.contains(&r.spec.id))
                .map(|r| r.result)
                .collect();
            let wrong: Option<Vec<f64>> = runs
                .iter()
                .map(|r| wrong_ratio(r).map(|k| k * v.quantity.of_run(r, s.convention)))
                .collect();
            let wrong = wrong
                .filter(|w| !w.is_empty())
                .map(|w| w.iter().sum::<f64>() / w.len() as f64);
            Ok((x, wrong))
        }
    }
}

fn reported_values(rule: &Rule, s: &Subject) -> Vec<Finding> {
    if s.reported.is_empty() {
        return vec![rule.not_applicable("the survey reports no values ([reported])")];
    }
    let tol = rule.value("tolerance");
    let mut out = Vec::new();
    for v in s.reported {
        let scope = match &v.scope {
            ReportedScope::Run(id) => format!("run {id}"),
            ReportedScope::Average => "average".to_string(),
        };
        let subject = format!("{scope} {}", v.quantity.key());
        let mut f = match recomputed(s, v) {
            Err(why) => rule.not_applicable(text!(
                "{} {} reported as `{}`: {}",
                scope.clone(),
                v.quantity.name(),
                v.raw.clone(),
                why
            )),
            Ok((x, wrong)) => {
                // in the unit the value was reported in, so the two read side by side
                let shown = |si: f64| in_unit(v.unit, si);
                let diff = if x != 0.0 {
                    (v.value_si - x) / x.abs()
                } else {
                    f64::INFINITY
                };
                let head = text!(
                    "{} {} reported `{}`, recomputed {} ({}{})",
                    scope.clone(),
                    v.quantity.name(),
                    v.raw.clone(),
                    shown(x),
                    if diff >= 0.0 { "+" } else { "" },
                    percent(diff)
                );
                if diff.abs() <= tol + 1e-12 {
                    rule.finding(
                        Status::Pass,
                        Some(diff),
                        "1",
                        text!("{}: within ±{}", head, percent(tol)),
                        &[],
                    )
                } else {
                    let classic = wrong
                        .filter(|w| *w != 0.0 && ((v.value_si - w) / w).abs() <= tol + 1e-12)
                        .map(|w| {
                            text!(
                                "; it matches {} from √(mean Δp), the classic error: average the square roots, not Δp",
                                shown(w)
                            )
                        })
                        .unwrap_or_default();
                    let excluded = match &v.scope {
                        ReportedScope::Run(id)
                            if s.runs.iter().any(|r| &r.spec.id == id && !r.valid) =>
                        {
                            " (this run is excluded from the average)"
                        }
                        _ => "",
                    };
                    rule.finding(
                        rule.violated(),
                        Some(diff),
                        "1",
                        text!(
                            "{}: differs by more than ±{}{}{}",
                            head,
                            percent(tol),
                            classic,
                            excluded
                        ),
                        &[],
                    )
                }
            }
        };
        f.subject = Some(subject);
        out.push(f);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::checks::testkit::*;

    /// The reported-value comparisons are relative; derived values carry this slack.
    const REL_TOL_DERIVED: f64 = 1e-9;
    const FT3_M3: f64 = 0.028_316_846_592;

    fn one(lines: &[(&str, &[f64])], extra: &str) -> crate::assess::Assessment {
        assess_text(
            &survey(EPA_SURVEY, &["1"], extra),
            &[("run1.csv", csv(lines, "inH2O", &[]))],
        )
    }

    #[test]
    fn identical_sequences_across_runs_and_lines() {
        let a = assess_text(
            &survey(EPA_SURVEY, &["1", "2"], ""),
            &[("run1.csv", epa_csv()), ("run2.csv", epa_csv())],
        );
        let f = survey_finding(&a, "identical-sequences");
        assert_eq!(f.status, Status::Warn);
        assert!(
            f.message
                .to_string()
                .contains("run 1 line A = run 2 line A")
                && f.message
                    .to_string()
                    .contains("run 1 line B = run 2 line B"),
            "{}",
            f.message
        );
        assert_eq!(f.measured, Some(2.0));
        let a = one(&[("A", &EPA_DP_A), ("B", &EPA_DP_A)], "");
        assert!(survey_finding(&a, "identical-sequences")
            .message
            .to_string()
            .contains("run 1 line A = run 1 line B"));
        assert_eq!(
            survey_finding(&epa_one_run(""), "identical-sequences").status,
            Status::Pass
        );
    }

    #[test]
    fn repeated_values_in_file_order() {
        let a = one(
            &[("A", &[0.5, 0.5, 0.5, 0.5, 0.5, 0.6]), ("B", &EPA_DP_B)],
            "",
        );
        let f = run_finding(&a, 0, "repeated-values");
        assert_eq!(f.status, Status::Warn);
        assert_eq!(f.measured, Some(5.0));
        assert!(
            f.message
                .to_string()
                .contains("in a row: 5 (0.5 inH2O, from line A point 1"),
            "{}",
            f.message
        );
        // four in a row is within the default limit
        let a = one(
            &[("A", &[0.5, 0.5, 0.5, 0.5, 0.6, 0.6]), ("B", &EPA_DP_B)],
            "",
        );
        assert_eq!(run_finding(&a, 0, "repeated-values").status, Status::Pass);
    }

    #[test]
    fn readings_finer_than_the_gauge() {
        let extra = "[instruments]\ndp = { resolution = \"0.01 inH2O\" }\n";
        let a = one(
            &[
                ("A", &[0.50, 0.553, 0.60, 0.62, 0.58, 0.525]),
                ("B", &EPA_DP_B),
            ],
            extra,
        );
        let f = run_finding(&a, 0, "recorded-resolution");
        assert_eq!(f.status, Status::Warn);
        assert_eq!(f.measured, Some(2.0));
        assert!(
            f.message.to_string().contains("A2 0.553")
                && f.message.to_string().contains("0.01 inH2O"),
            "{}",
            f.message
        );
        let a = epa_one_run(extra);
        assert_eq!(
            run_finding(&a, 0, "recorded-resolution").status,
            Status::Pass
        );
        assert_eq!(
            run_finding(&epa_one_run(""), 0, "recorded-resolution").status,
            Status::NotApplicable
        );
    }

    #[test]
    fn too_many_round_numbers() {
        // 10 of 12 end in 0 or 5 (83 %) > 50 % → warn; the §8 data have 3 of 12 (25 %)
        let a = one(
            &[
                ("A", &[0.50, 0.55, 0.60, 0.65, 0.55, 0.50]),
                ("B", &[0.45, 0.55, 0.60, 0.63, 0.57, 0.50]),
            ],
            "",
        );
        let f = run_finding(&a, 0, "round-numbers");
        assert_eq!(f.status, Status::Warn, "{}", f.message);
        assert!((f.measured.unwrap() - 10.0 / 12.0).abs() < REL_TOL_DERIVED);
        let f = run_finding(&epa_one_run(""), 0, "round-numbers").clone();
        assert_eq!((f.status, f.measured), (Status::Pass, Some(0.25)));
        // a gauge read in 0.05 inH2O steps, recorded to 2 decimals, only shows endings 0 or 5
        let a = one(
            &[
                ("A", &[0.50, 0.55, 0.60, 0.65, 0.55, 0.50]),
                ("B", &[0.45, 0.55, 0.60, 0.63, 0.57, 0.50]),
            ],
            "[instruments]\ndp = { resolution = \"0.05 inH2O\" }\n",
        );
        assert_eq!(
            run_finding(&a, 0, "round-numbers").status,
            Status::NotApplicable
        );
    }

    #[test]
    fn reported_values_against_recomputed() {
        // calculations.md §8 EPA Method 2 English [D]: Qsd 36 803.0 dscfm, 60 008 acfm, vs 50.9367 ft/s
        let a = epa_one_run(
            "[reported]\naverage = { dscfm = \"36803 cfm\" }\n[reported.run.1]\nvelocity = \"50.94 ft/s\"\nacfm = \"60008 cfm\"\nstandard_flow = \"38000 cfm\"\n",
        );
        let found: Vec<_> = a
            .checks
            .iter()
            .filter(|f| f.id == "reported-values")
            .collect();
        assert_eq!(found.len(), 4);
        let by = |s: &str| {
            found
                .iter()
                .find(|f| f.subject.as_deref() == Some(s))
                .unwrap()
        };
        for s in [
            "average dry_standard_flow",
            "run 1 velocity",
            "run 1 actual_flow",
        ] {
            assert_eq!(by(s).status, Status::Pass, "{}", by(s).message);
        }
        let bad = by("run 1 standard_flow");
        assert_eq!(bad.status, Status::Fail);
        assert!(
            bad.message.to_string().contains("reported `38000 cfm`"),
            "{}",
            bad.message
        );
        assert!(a.failed());
        // the dry standard flow is recomputed to the §8 value
        let e = eval(&survey(EPA_SURVEY, &["1"], ""), &[("run1.csv", epa_csv())]);
        let q = e.runs[0].dry_standard_flow_m3_s * 60.0 / FT3_M3;
        assert!((q / 36_803.0 - 1.0).abs() < 1e-5);
    }

    #[test]
    fn reported_value_from_the_wrong_average_is_named() {
        // calculations.md §8: √(mean Δp) gives 0.747774 instead of 0.747080, i.e. every flow
        // × 1.000929: 36 803 → 36 837 dscfm. At a ±0.05 % tolerance (tightened: no reason needed)
        // that is a mismatch, and it matches the classic error.
        let wrong = 36_803.0 * 0.747774 / 0.747080;
        let a = epa_one_run(&format!(
            "[checks.reported-values]\ntolerance = \"0.05 %\"\n[reported]\naverage = {{ dscfm = \"{wrong:.0} cfm\" }}\n"
        ));
        let f = survey_finding(&a, "reported-values");
        assert_eq!(f.status, Status::Fail, "{}", f.message);
        assert!(
            f.message.to_string().contains("the classic error"),
            "{}",
            f.message
        );
        assert_eq!(
            f.setting.as_ref().map(|s| s.to_string()).as_deref(),
            Some("limit tightened from 0.5 % to 0.05 %")
        );
    }
}
