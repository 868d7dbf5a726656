//! The summary block: the verdict of the checks, the headline figures of the average and, for a
//! survey with a design flow, the measured flow against it.

use super::{average_value, capitalised, headline_flow, run_range, Job, Trade};
use crate::assess::Verdict;
use crate::checks::Status as CheckStatus;
use crate::display::{fixed, grouped, Kind};
use crate::flow::design::{flow_on_basis, Flows};
use crate::report::model::{Design, Quantity, Status, Summary};
use crate::units::FlowBasis;

pub(super) fn section(job: &Job) -> Summary {
    Summary {
        verdict: match job.a.verdict {
            Verdict::Pass => Status::Pass,
            Verdict::Warn => Status::Warn,
            Verdict::Fail => Status::Fail,
        },
        verdict_text: verdict_text(job),
        headline: headline(job),
        design: design(job),
        basis_text: basis_text(job),
    }
}

/// The verdict in words, counting the findings that apply.
fn verdict_text(job: &Job) -> String {
    let judged: Vec<CheckStatus> = job
        .a
        .findings()
        .map(|f| f.status)
        .filter(|s| *s != CheckStatus::NotApplicable)
        .collect();
    let n = judged.len();
    let count = |s: CheckStatus| judged.iter().filter(|x| **x == s).count();
    match (count(CheckStatus::Fail), count(CheckStatus::Warn)) {
        (0, 0) => format!("All {n} applicable checks pass."),
        (0, w) => format!("No check fails; {w} of {n} give a warning."),
        (f, 0) => format!("{f} of {n} checks fail."),
        (f, w) => format!("{f} of {n} checks fail, {w} warn."),
    }
}

/// The figures printed large: the trade's headline flow first, then the other flow the trade
/// quotes, the mean velocity and the expanded uncertainty of the average.
fn headline(job: &Job) -> Vec<Quantity> {
    let Some(av) = &job.e.average else {
        return Vec::new();
    };
    let second = match job.trade {
        Trade::Stack => Kind::ActualFlow,
        Trade::Hvac => Kind::StandardFlow,
    };
    let mut out: Vec<Quantity> = [headline_flow(job.trade), second, Kind::Velocity]
        .into_iter()
        .map(|kind| {
            let label = match kind {
                Kind::Velocity => "Mean velocity".to_string(),
                k => capitalised(job.table.get(k).label),
            };
            job.quantity(&label, kind, average_value(kind, av))
        })
        .collect();
    if let Some(u) = job.a.average.as_ref().and_then(|x| x.uncertainty.as_ref()) {
        out.push(Quantity::new(
            "Expanded uncertainty (95 %)",
            format!("±{} %", fixed(u.expanded_relative * 100.0, 1)),
            "",
        ));
    }
    out
}

/// The design comparison: the average's flow on the basis the design's unit names (actual for
/// `cfm`, dry standard for `dscfm` …; see `flow::design`).
fn design(job: &Job) -> Option<Design> {
    let d = job.survey().design.as_ref()?;
    let av = job.e.average.as_ref()?;
    let percent = av.percent_of_design?;
    let flows = Flows {
        actual_m3_s: av.actual_flow_m3_s,
        standard_m3_s: av.standard_flow_m3_s,
        dry_standard_m3_s: av.dry_standard_flow_m3_s,
    };
    let measured = flow_on_basis(flows, d.basis, &job.e.convention);
    let kind = match d.basis {
        FlowBasis::Actual => Some(Kind::ActualFlow),
        FlowBasis::Standard => Some(Kind::StandardFlow),
        FlowBasis::DryStandard => Some(Kind::DryStandardFlow),
        FlowBasis::Normal | FlowBasis::NormalDry => None,
    };
    let (design, measured, compared) = match kind {
        Some(k) => (
            job.quantity("Design flow", k, d.m3_s),
            job.quantity("Measured", k, measured),
            job.table.get(k).label.to_string(),
        ),
        // normal conditions (0 °C, 101.325 kPa) are the design's own, not the job's reference
        None => {
            let unit = if d.basis.is_dry() {
                "dNm³/h"
            } else {
                "Nm³/h"
            };
            let normal = |si: f64| format!("{} {unit}", grouped(si * 3600.0, 0));
            (
                Quantity::new("Design flow", normal(d.m3_s), ""),
                Quantity::new("Measured", normal(measured), ""),
                d.basis.flow_words().to_string(),
            )
        }
    };
    Some(Design {
        design,
        measured,
        compared,
        percent: format!("{} %", fixed(percent, 1)),
    })
}

/// What the average is over, and which runs were left out and why.
fn basis_text(job: &Job) -> String {
    let s = job.survey();
    let void: Vec<String> = s
        .runs
        .iter()
        .zip(&job.e.validity)
        .filter_map(|(r, v)| {
            v.void_reason
                .as_ref()
                .map(|why| format!("run {} void: {why}", r.id))
        })
        .collect();
    match &job.e.average {
        Some(av) if void.is_empty() => format!("Average of {}", run_range(&av.runs)),
        Some(av) => format!("Average of {}; {}", run_range(&av.runs), void.join("; ")),
        None => format!("No valid run to average: {}", void.join("; ")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::testkit::{evaluated, evaluated_text};

    #[test]
    fn stack_headline_is_dry_standard_flow_with_si_beside() {
        let (e, a) = evaluated("stack");
        let s = section(&Job::new(&e, &a));
        assert_eq!(s.verdict, Status::Pass);
        let labels: Vec<&str> = s.headline.iter().map(|q| q.label.as_str()).collect();
        assert_eq!(
            labels,
            [
                "Dry standard flow",
                "Actual flow",
                "Mean velocity",
                "Expanded uncertainty (95 %)"
            ]
        );
        // the average dry standard flow as `compute` prints it (tests/golden/compute-stack.txt)
        assert_eq!(s.headline[0].value, "93,147 dscfm");
        assert!(s.headline[0].si.ends_with(" m³/h"), "{}", s.headline[0].si);
        assert!(s.headline[2].value.ends_with(" ft/s"));
        assert_eq!(s.basis_text, "Average of runs 1, 2, 3");
        assert!(s.design.is_none());
        assert!(s.verdict_text.starts_with("All ") && s.verdict_text.ends_with(" checks pass."));
    }

    #[test]
    fn hvac_headline_is_actual_flow_against_design() {
        let (e, a) = evaluated("hvac");
        let s = section(&Job::new(&e, &a));
        assert_eq!(s.headline[0].label, "Actual flow");
        assert!(s.headline[0].value.ends_with(" acfm"));
        assert_eq!(s.headline[1].label, "Standard air flow");
        assert!(s.headline[1].value.ends_with(" scfm"));
        assert!(s.headline[2].value.ends_with(" fpm"));
        let d = s.design.expect("the hvac sample states a design flow");
        // sample-data/hvac: design flow = "6500 cfm"
        assert_eq!(d.design.value, "6,500 acfm");
        assert_eq!(d.compared, "actual flow");
        // percent of design = measured actual flow / design × 100, as `compute` computes it
        let p = e.average.as_ref().unwrap().percent_of_design.unwrap();
        assert_eq!(d.percent, format!("{} %", fixed(p, 1)));
        assert_eq!(s.verdict, Status::Warn);
        assert!(s.verdict_text.starts_with("No check fails;"));
    }

    #[test]
    fn a_metric_job_shows_no_si_beside() {
        let (e, a) = evaluated("stack-metric");
        let s = section(&Job::new(&e, &a));
        assert!(s.headline[0].value.ends_with(" dscm/h"));
        assert!(s.headline.iter().all(|q| q.si.is_empty()));
        let (e, a) = evaluated("bad-plane");
        let s = section(&Job::new(&e, &a));
        assert_eq!(s.verdict, Status::Fail);
        assert!(s.verdict_text.contains("checks fail"), "{}", s.verdict_text);
    }

    /// A design in dscfm is compared with the dry standard flow, and the page says so.
    #[test]
    fn a_design_is_compared_on_the_basis_its_unit_names() {
        let (e, a) = evaluated_text("stack", "\n[design]\nflow = \"60000 dscfm\"\n");
        let s = section(&Job::new(&e, &a));
        let d = s.design.expect("a design flow");
        assert_eq!(d.design.value, "60,000 dscfm");
        assert_eq!(d.compared, "dry standard flow");
        let av = e.average.as_ref().unwrap();
        // percent of design = dry standard flow / design × 100 (flow::design)
        let dscfm = av.dry_standard_flow_m3_s * 60.0 / 0.028316846592;
        assert_eq!(
            d.percent,
            format!("{} %", fixed(100.0 * dscfm / 60000.0, 1))
        );
        // a design at normal conditions is shown in its own unit
        let (e, a) = evaluated_text("stack", "\n[design]\nflow = \"95000 dNm3/h\"\n");
        let d = section(&Job::new(&e, &a)).design.expect("a design flow");
        assert_eq!(d.design.value, "95,000 dNm³/h");
        assert_eq!(d.compared, "flow at normal conditions (dry)");
    }
}
