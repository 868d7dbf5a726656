//! Run checks: pitot leak checks (which decide whether a run counts), temperature plausibility,
//! run-to-run agreement and the Method 1A steady-flow rule.
//!
//! Owns the rules of methods.md §4 that judge a run as a whole or runs against each other. Whether
//! a run is valid is decided once, by `pipeline::run_is_valid` (the caller passes it in
//! [`RunView::valid`]); the leak-check finding only explains it. No files, no printing.

use super::{
    CheckDef, Finding, Group, Judge, LimitKind, LimitSpec, Rule, RunView, Status, Stricter,
    Subject, ALL, EPA, HVAC, STACK,
};
use crate::display::{number, percent, q, Kind, Text};
use crate::layout::advisor::{EPA_MIN_AREA_M2, EPA_MIN_DIAMETER_M};
use crate::survey::LeakResult;
use crate::text;

const TEMPERATURE: LimitKind = LimitKind::Quantity(Kind::Temperature);
const SPREAD: LimitKind = LimitKind::Quantity(Kind::TemperatureDifference);
const FRACTION: LimitKind = LimitKind::Quantity(Kind::Percent);
/// EPA Method 1A lower size limit, 4 in (Method 1A §1.2).
const METHOD_1A_MIN_M: f64 = 4.0 * 0.0254;

pub static LEAK_CHECK: CheckDef = CheckDef {
    id: "leak-check",
    group: Group::Run,
    description: "pitot leak checks before and after the run recorded and passed; a failed or missing post-run check voids the run",
    source: "EPA Method 2 (40 CFR 60 App. A-1) §8.1 post-test leak check",
    criterion: "pre- and post-run leak checks recorded and passed",
    limits: &[],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Run(leak_check),
};

pub static RUNS_COMPLETE: CheckDef = CheckDef {
    id: "runs-complete",
    group: Group::Run,
    description: "the test has as many valid runs as it needs; void runs are reported and left out",
    source: "the survey's runs_required (default 3 runs for a stack test, as 40 CFR 60.8(f) asks of performance tests; 1 for an HVAC traverse)",
    criterion: "valid runs ≥ runs_required",
    limits: &[],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Survey(runs_complete),
};

pub static STACK_TEMPERATURE_RANGE: CheckDef = CheckDef {
    id: "stack-temperature-range",
    group: Group::Run,
    description: "point gas temperatures plausible for a stack, and their spread across the plane",
    source: "common practice (plausibility: catches unit slips such as °C written as °F)",
    criterion: "",
    limits: &[
        LimitSpec::fixed(
            "minimum",
            "every point ≥ {}",
            253.15,
            TEMPERATURE,
            Stricter::Higher,
        ),
        LimitSpec::fixed("maximum", "and ≤ {}", 1073.15, TEMPERATURE, Stricter::Lower),
        LimitSpec::fixed(
            "spread",
            "warning when points differ by more than {}",
            50.0,
            SPREAD,
            Stricter::Lower,
        ),
    ],
    conventions: STACK,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Run(temperature_range),
};

pub static AIR_TEMPERATURE_RANGE: CheckDef = CheckDef {
    id: "air-temperature-range",
    group: Group::Run,
    description:
        "point air temperatures plausible for an HVAC duct, and their spread across the plane",
    source: "common practice (plausibility: catches unit slips such as °C written as °F)",
    criterion: "",
    limits: &[
        LimitSpec::fixed(
            "minimum",
            "every point ≥ {}",
            233.15,
            TEMPERATURE,
            Stricter::Higher,
        ),
        LimitSpec::fixed("maximum", "and ≤ {}", 353.15, TEMPERATURE, Stricter::Lower),
        LimitSpec::fixed(
            "spread",
            "warning when points differ by more than {}",
            20.0,
            SPREAD,
            Stricter::Lower,
        ),
    ],
    conventions: HVAC,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Run(temperature_range),
};

pub static RUN_AGREEMENT: CheckDef = CheckDef {
    id: "run-agreement",
    group: Group::Run,
    description: "relative standard deviation of the valid runs' actual flow",
    source: "common practice (no published limit for traverse runs)",
    criterion: "",
    limits: &[LimitSpec::fixed(
        "limit",
        "relative standard deviation ≤ {}",
        0.05,
        FRACTION,
        Stricter::Lower,
    )],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Warn,
    judge: Judge::Survey(run_agreement),
};

pub static STEADY_FLOW_METHOD_1A: CheckDef = CheckDef {
    id: "steady-flow-method-1a",
    group: Group::Run,
    description:
        "small-duct (Method 1A) velocity traverses before and after agree, showing steady flow",
    source: "EPA Method 1A (40 CFR 60 App. A-1) steady-flow requirement",
    criterion: "",
    limits: &[LimitSpec::fixed(
        "limit",
        "each traverse within ±{} of the one before",
        0.10,
        FRACTION,
        Stricter::Lower,
    )],
    conventions: EPA,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Survey(steady_flow_method_1a),
};

fn leak_name(r: Option<LeakResult>) -> &'static str {
    match r {
        Some(LeakResult::Pass) => "passed",
        Some(LeakResult::Fail) => "FAILED",
        None => "not recorded",
    }
}

fn leak_check(rule: &Rule, s: &Subject, run: &RunView) -> Finding {
    let lc = run.spec.leak_check;
    if s.survey.convention.is_hvac() && lc.before.is_none() && lc.after.is_none() {
        return rule.not_applicable("HVAC traverses do not record pitot leak checks");
    }
    let state = text!(
        "pre-run leak check {}, post-run {}",
        leak_name(lc.before),
        leak_name(lc.after)
    );
    let leak_void = match (lc.before, lc.after) {
        (_, Some(LeakResult::Fail)) => Some("the post-run leak check failed"),
        (_, None) if !s.survey.convention.is_hvac() => {
            Some("the post-run leak check is not recorded")
        }
        (Some(LeakResult::Fail), _) => Some("the pre-run leak check failed"),
        _ => None,
    };
    if !run.valid {
        if let Some(why) = leak_void {
            let tally = text!(
                "{} valid run{} of {} required",
                s.valid_runs(),
                if s.valid_runs() == 1 { "" } else { "s" },
                s.runs_required
            );
            return if s.complete() {
                rule.finding(
                    Status::Warn,
                    None,
                    "",
                    text!(
                        "run {} is void and replaced: {} ({}); it is reported but left out of the average, and the test is complete with {}",
                        run.spec.id.clone(),
                        why,
                        state,
                        tally
                    ),
                    &[],
                )
            } else {
                rule.finding(
                    rule.violated(),
                    None,
                    "",
                    text!(
                        "RUN {} IS VOID AND EXCLUDED FROM THE AVERAGE: {} ({}); a failed or missing post-run leak check voids the run, and the test has only {}",
                        run.spec.id.clone(),
                        why,
                        state,
                        tally
                    ),
                    &[],
                )
            };
        }
    }
    let voided = run
        .void_reason
        .filter(|_| !run.valid)
        .map(|r| format!(" (run voided by the crew: {r})"))
        .unwrap_or_default();
    let (status, msg) = match (lc.before, lc.after) {
        (Some(LeakResult::Pass), Some(LeakResult::Pass)) => {
            (Status::Pass, text!("{}{}", state, voided))
        }
        _ => (
            Status::Warn,
            text!(
                "{}: the run counts, but the record is incomplete{}",
                state,
                voided
            ),
        ),
    };
    rule.finding(status, None, "", msg, &[])
}

fn runs_complete(rule: &Rule, s: &Subject) -> Vec<Finding> {
    let valid = s.valid_runs();
    let required = s.runs_required;
    let void: Vec<Text> = s
        .runs
        .iter()
        .filter(|r| !r.valid)
        .map(|r| {
            text!(
                "run {} void: {}",
                r.spec.id.clone(),
                r.void_reason.unwrap_or("does not count").to_string()
            )
        })
        .collect();
    let voids = if void.is_empty() {
        Text::new()
    } else {
        text!(" ({})", Text::join(void.clone(), "; "))
    };
    let plural = |n: usize| if n == 1 { "" } else { "s" };
    let f = if valid >= required {
        let replaced = if void.is_empty() {
            ""
        } else {
            ", void runs replaced"
        };
        rule.finding(
            Status::Pass,
            Some(valid as f64),
            "1",
            text!(
                "{} valid run{} of {} required{}{}",
                valid,
                plural(valid),
                required,
                replaced,
                voids
            ),
            &[],
        )
    } else {
        let missing = required - valid;
        rule.finding(
            rule.violated(),
            Some(valid as f64),
            "1",
            text!(
                "the test is short: {} valid run{} of {} required, {} more valid run{} needed{}",
                valid,
                plural(valid),
                required,
                missing,
                if missing == 1 { " is" } else { "s are" },
                voids
            ),
            &[],
        )
    };
    // the definition's source names both trades; a page quotes only its own
    let mut f = f;
    f.source = if s.convention.id.is_hvac() {
        "the survey's runs_required (default 1 run for an HVAC traverse: common practice)".into()
    } else {
        "the survey's runs_required (default 3 runs for a stack test, as 40 CFR 60.8(f) asks of performance tests)".into()
    };
    vec![f]
}

fn temperature_range(rule: &Rule, _s: &Subject, run: &RunView) -> Finding {
    let pts = &run.result.points;
    let (lo, hi) = (rule.value("minimum"), rule.value("maximum"));
    let spread_limit = rule.value("spread");
    let tmin = pts
        .iter()
        .map(|p| p.temperature_k)
        .fold(f64::INFINITY, f64::min);
    let tmax = pts
        .iter()
        .map(|p| p.temperature_k)
        .fold(f64::NEG_INFINITY, f64::max);
    let out: Vec<Text> = pts
        .iter()
        .filter(|p| p.temperature_k < lo || p.temperature_k > hi)
        .take(6)
        .map(|p| {
            text!(
                "{}{} {}",
                p.line.clone(),
                p.point,
                q(Kind::Temperature, p.temperature_k)
            )
        })
        .collect();
    let t = |x| q(Kind::Temperature, x);
    let range = text!(
        "point temperatures {} to {}, plausible range {} to {}",
        t(tmin),
        t(tmax),
        t(lo),
        t(hi)
    );
    let spread = tmax - tmin;
    let (status, msg) = if !out.is_empty() {
        (
            rule.violated(),
            text!(
                "{}: outside it at {}; check the unit in the temperature header",
                range,
                Text::join(out, ", ")
            ),
        )
    } else if spread > spread_limit + 1e-9 {
        (
            Status::Warn,
            text!(
                "{}; the points differ by {} (more than {}): stratified gas or a mistyped value",
                range,
                q(Kind::TemperatureDifference, spread),
                q(Kind::TemperatureDifference, spread_limit)
            ),
        )
    } else {
        (Status::Pass, range)
    };
    rule.finding(status, Some(spread), "K", msg, &[])
}

fn run_agreement(rule: &Rule, s: &Subject) -> Vec<Finding> {
    let Some(avg) = s.average.filter(|a| a.runs.len() >= 2) else {
        return vec![rule.not_applicable("fewer than two valid runs: nothing to compare")];
    };
    let limit = rule.value("limit");
    let rsd = avg.flow_relative_std_dev;
    let status = if rsd <= limit + 1e-12 {
        Status::Pass
    } else {
        rule.violated()
    };
    vec![rule.finding(
        status,
        Some(rsd),
        "1",
        text!(
            "actual flow of runs {}: relative standard deviation {}, largest deviation from the mean {}, limit {}",
            avg.runs.join(", "),
            percent(rsd),
            percent(avg.flow_max_deviation),
            percent(limit)
        ),
        &[],
    )]
}

fn steady_flow_method_1a(rule: &Rule, s: &Subject) -> Vec<Finding> {
    let duct = s.plane.layout.duct();
    let de = duct.equivalent_diameter_m();
    let method_1a =
        (de < EPA_MIN_DIAMETER_M || duct.area_m2() < EPA_MIN_AREA_M2) && de >= METHOD_1A_MIN_M;
    if !method_1a {
        return vec![rule.not_applicable(text!(
            "the duct is not in Method 1A's {} to {} range",
            q(Kind::Length, METHOD_1A_MIN_M),
            q(Kind::Length, EPA_MIN_DIAMETER_M)
        ))];
    }
    let valid: Vec<_> = s.runs.iter().filter(|r| r.valid).collect();
    if valid.len() < 2 {
        return vec![rule.not_applicable(
            "Method 1A needs velocity traverses before and after sampling: fewer than two valid runs",
        )];
    }
    let limit = rule.value("limit");
    let mut worst = (0.0f64, "", "");
    for w in valid.windows(2) {
        let (a, b) = (w[0].result.actual_flow_m3_s, w[1].result.actual_flow_m3_s);
        let dev = ((b - a) / a).abs();
        if dev >= worst.0 {
            worst = (dev, w[0].spec.id.as_str(), w[1].spec.id.as_str());
        }
    }
    let status = if worst.0 <= limit + 1e-12 {
        Status::Pass
    } else {
        rule.violated()
    };
    vec![rule.finding(
        status,
        Some(worst.0),
        "1",
        text!(
            "largest change between consecutive traverses {} (run {} to run {}), limit ±{}{}",
            percent(worst.0),
            worst.1.to_string(),
            worst.2.to_string(),
            percent(limit),
            if status == Status::Pass {
                Text::new()
            } else {
                text!(
                    ": the flow was not steady (largest change {} %)",
                    number(worst.0 * 100.0)
                )
            }
        ),
        &[],
    )]
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::checks::testkit::*;

    /// Values derived here by exact arithmetic.
    const REL_TOL_DERIVED: f64 = 1e-9;

    fn scaled(k: f64) -> String {
        let a: Vec<f64> = EPA_DP_A.iter().map(|d| d * k).collect();
        let b: Vec<f64> = EPA_DP_B.iter().map(|d| d * k).collect();
        csv(
            &[("A", &a), ("B", &b)],
            "inH2O",
            &[("temperature[F]", &EPA_T_F)],
        )
    }

    #[test]
    fn failed_or_missing_post_run_leak_check_excludes_the_run() {
        // methods.md §4 [P secondary]: a failed post-test leak check voids the run. A test of
        // three runs with two voided is short: the void runs fail.
        let mut s = with_runs_required(EPA_SURVEY, 3);
        s += &run_block("1", Some("pass"), Some("pass"));
        s += &run_block("2", Some("pass"), Some("fail"));
        s += &run_block("3", Some("pass"), None);
        s += &run_block("4", None, Some("pass"));
        let files = [
            ("run1.csv", epa_csv()),
            ("run2.csv", scaled(1.21)),
            ("run3.csv", scaled(1.44)),
            ("run4.csv", epa_csv()),
        ];
        let e = eval(&s, &files);
        assert_eq!(e.average.as_ref().unwrap().runs, vec!["1", "4"]);
        let a = assess_text(&s, &files);
        assert_eq!(run_finding(&a, 0, "leak-check").status, Status::Pass);
        let f = run_finding(&a, 1, "leak-check");
        assert_eq!(f.status, Status::Fail);
        assert!(
            f.message.to_string().starts_with(
                "RUN 2 IS VOID AND EXCLUDED FROM THE AVERAGE: the post-run leak check failed"
            ),
            "{}",
            f.message
        );
        let f = run_finding(&a, 2, "leak-check");
        assert_eq!(f.status, Status::Fail);
        assert!(
            f.message.to_string().contains("not recorded"),
            "{}",
            f.message
        );
        // a missing pre-run check is a warning; the run counts
        assert_eq!(run_finding(&a, 3, "leak-check").status, Status::Warn);
        assert_eq!(
            a.runs.iter().map(|r| r.valid).collect::<Vec<_>>(),
            [true, false, false, true]
        );
        assert!(a.failed());
        // the average budget covers the valid runs only
        assert_eq!(a.average.as_ref().unwrap().runs, vec!["1", "4"]);
        // runs 1 and 4 are the same data: run agreement is perfect although run 2 differs
        assert_eq!(survey_finding(&a, "run-agreement").measured, Some(0.0));
    }

    #[test]
    fn a_voided_and_replaced_run_completes_the_test() {
        // Run 2's post-run leak check failed (Method 2 §8.1: the run is void); run 4 repeats it.
        // Three valid runs of three required: the test is complete and does not fail.
        let mut s = with_runs_required(EPA_SURVEY, 3);
        s += &run_block("1", Some("pass"), Some("pass"));
        s += &run_block("2", Some("pass"), Some("fail"));
        s += &run_block("3", Some("pass"), Some("pass"));
        s += &run_block("4", Some("pass"), Some("pass"));
        let files = [
            ("run1.csv", epa_csv()),
            ("run2.csv", scaled(1.21)),
            ("run3.csv", epa_csv()),
            ("run4.csv", epa_csv()),
        ];
        let e = eval(&s, &files);
        assert_eq!(e.average.as_ref().unwrap().runs, vec!["1", "3", "4"]);
        assert!(e.complete());
        assert_eq!(
            e.validity[1].void_reason.as_deref(),
            Some("post-run leak check failed")
        );
        let a = assess_text(&s, &files);
        let f = run_finding(&a, 1, "leak-check");
        assert_eq!(f.status, Status::Warn);
        assert!(
            f.message.to_string().contains("void and replaced"),
            "{}",
            f.message
        );
        let f = survey_finding(&a, "runs-complete");
        assert_eq!(f.status, Status::Pass);
        assert_eq!(f.measured, Some(3.0));
        assert!(
            f.message
                .to_string()
                .contains("3 valid runs of 3 required, void runs replaced (run 2 void: post-run leak check failed)"),
            "{}",
            f.message
        );
        assert!(
            !a.failed(),
            "{:?}",
            a.findings()
                .filter(|f| f.status == Status::Fail)
                .collect::<Vec<_>>()
        );
    }

    #[test]
    fn a_short_test_fails_saying_how_many_runs_are_missing() {
        let mut s = with_runs_required(EPA_SURVEY, 3);
        s += &run_block("1", Some("pass"), Some("pass"));
        s += &run_block("2", Some("pass"), Some("fail"));
        s += &run_block("3", Some("pass"), Some("pass"));
        let files = [
            ("run1.csv", epa_csv()),
            ("run2.csv", epa_csv()),
            ("run3.csv", epa_csv()),
        ];
        let a = assess_text(&s, &files);
        let f = survey_finding(&a, "runs-complete");
        assert_eq!(f.status, Status::Fail);
        assert!(
            f.message.to_string().starts_with(
                "the test is short: 2 valid runs of 3 required, 1 more valid run is needed"
            ),
            "{}",
            f.message
        );
        assert!(a.failed());
    }

    #[test]
    fn the_crew_can_void_a_run_with_a_reason() {
        let mut s = with_runs_required(EPA_SURVEY, 2);
        s += &run_block("1", Some("pass"), Some("pass"));
        s += &run_block("2", Some("pass"), Some("pass"));
        s += "void = \"probe struck the far wall at B5\"\n";
        s += &run_block("3", Some("pass"), Some("pass"));
        let files = [
            ("run1.csv", epa_csv()),
            ("run2.csv", scaled(2.0)),
            ("run3.csv", epa_csv()),
        ];
        let e = eval(&s, &files);
        assert_eq!(e.average.as_ref().unwrap().runs, vec!["1", "3"]);
        assert_eq!(
            e.validity[1].void_reason.as_deref(),
            Some("probe struck the far wall at B5")
        );
        let a = assess_text(&s, &files);
        assert_eq!(survey_finding(&a, "runs-complete").status, Status::Pass);
        let f = run_finding(&a, 1, "leak-check");
        assert_eq!(f.status, Status::Pass);
        assert!(
            f.message.to_string().contains("voided by the crew"),
            "{}",
            f.message
        );
        // an HVAC traverse needs one run by default
        assert_eq!(
            crate::survey::default_runs_required(crate::survey::ConventionId::HvacIp),
            1
        );
        assert_eq!(
            crate::survey::default_runs_required(crate::survey::ConventionId::Iso16911),
            3
        );
    }

    #[test]
    fn hvac_without_leak_checks_is_not_applicable() {
        let row = [0.2, 0.25, 0.3, 0.25, 0.2];
        let csv = csv(
            &[("A", &row), ("B", &row), ("C", &row), ("D", &row)],
            "inH2O",
            &[],
        );
        let s = format!("{HVAC_SURVEY}{}", run_block("1", None, None));
        let a = assess_text(&s, &[("run1.csv", csv)]);
        assert_eq!(
            run_finding(&a, 0, "leak-check").status,
            Status::NotApplicable
        );
        assert!(a.runs[0].valid);
    }

    #[test]
    fn temperature_plausibility() {
        // common practice: the §8 temperatures (299–307 °F) pass; 3000 °F is outside the range
        let f = run_finding(&epa_one_run(""), 0, "stack-temperature-range").clone();
        assert_eq!(f.status, Status::Pass, "{}", f.message);
        assert!((f.measured.unwrap() - 8.0 / 1.8).abs() < 1e-9);
        let mut t = EPA_T_F;
        t[3] = 3000.0;
        let c = csv(
            &[("A", &EPA_DP_A), ("B", &EPA_DP_B)],
            "inH2O",
            &[("temperature[F]", &t)],
        );
        let a = assess_text(&survey(EPA_SURVEY, &["1"], ""), &[("run1.csv", c)]);
        let f = run_finding(&a, 0, "stack-temperature-range");
        assert_eq!(f.status, Status::Fail);
        assert!(f.message.to_string().contains("A4"), "{}", f.message);
        // a 100 °F spread (55.6 K > 50 K) warns
        let mut t = EPA_T_F;
        t[0] = 200.0;
        let c = csv(
            &[("A", &EPA_DP_A), ("B", &EPA_DP_B)],
            "inH2O",
            &[("temperature[F]", &t)],
        );
        let a = assess_text(&survey(EPA_SURVEY, &["1"], ""), &[("run1.csv", c)]);
        assert_eq!(
            run_finding(&a, 0, "stack-temperature-range").status,
            Status::Warn
        );
    }

    #[test]
    fn run_to_run_agreement() {
        // derived: Δp × 1.21 gives flow × 1.1; two runs 1 and 1.1: s/mean = 0.1/√2/1.05 = 6.73 %
        // > 5 % → warn; × 1.0201 (flow × 1.01) gives 0.673 % → pass
        let two = |k: f64| {
            assess_text(
                &survey(EPA_SURVEY, &["1", "2"], ""),
                &[("run1.csv", epa_csv()), ("run2.csv", scaled(k))],
            )
        };
        let a = two(1.21);
        let f = survey_finding(&a, "run-agreement");
        assert_eq!(f.status, Status::Warn);
        assert!(
            (f.measured.unwrap() - 0.1 / 2f64.sqrt() / 1.05).abs() < REL_TOL_DERIVED,
            "{}",
            f.message
        );
        let f = survey_finding(&two(1.0201), "run-agreement").clone();
        assert_eq!(f.status, Status::Pass);
        assert_eq!(
            survey_finding(&epa_one_run(""), "run-agreement").status,
            Status::NotApplicable
        );
    }

    #[test]
    fn method_1a_steady_flow() {
        // EPA Method 1A [P secondary]: before/after within ±10 %. 8 in duct, standard pitot;
        // derived: Δp × 1.25 → flow × 1.118 (11.8 % > 10 %) fails; Δp × 1.1 → 4.9 % passes
        let base = EPA_SURVEY
            .replace("diameter = \"5.0 ft\"", "diameter = \"8 in\"")
            .replace("kind = \"s-type\"", "kind = \"standard\"")
            .replace("coefficient = 0.84", "coefficient = 0.99");
        let two = |k: f64| {
            assess_text(
                &survey(&base, &["1", "2"], ""),
                &[("run1.csv", epa_csv()), ("run2.csv", scaled(k))],
            )
        };
        let a = two(1.25);
        let f = survey_finding(&a, "steady-flow-method-1a");
        assert_eq!(f.status, Status::Fail, "{}", f.message);
        assert!((f.measured.unwrap() - (1.25f64.sqrt() - 1.0)).abs() < REL_TOL_DERIVED);
        let f = survey_finding(&two(1.1), "steady-flow-method-1a").clone();
        assert_eq!(f.status, Status::Pass, "{}", f.message);
        assert_eq!(
            survey_finding(&epa_one_run(""), "steady-flow-method-1a").status,
            Status::NotApplicable
        );
    }

    #[test]
    fn air_temperature_plausibility() {
        // common practice: 85 °F air passes; 185 °F is above the 80 °C (176 °F) HVAC range
        let row = [0.21, 0.25, 0.33, 0.26, 0.19];
        let hvac = |t: &str| {
            let s = survey(HVAC_SURVEY, &["1"], "").replace("\"85 F\"", t);
            let c = csv(
                &[("A", &row), ("B", &row), ("C", &row), ("D", &row)],
                "inH2O",
                &[],
            );
            assess_text(&s, &[("run1.csv", c)])
        };
        assert_eq!(
            run_finding(&hvac("\"85 F\""), 0, "air-temperature-range").status,
            Status::Pass
        );
        let a = hvac("\"185 F\"");
        let f = run_finding(&a, 0, "air-temperature-range");
        assert_eq!(f.status, Status::Fail, "{}", f.message);
        assert!(f.message.to_string().contains("176.0 °F"), "{}", f.message);
    }
}
