//! Notes (the survey's own, the equations used, the negative-reading policy, the layout) and
//! deviations (runs left out, checks the survey changed, rules quoted from memory). Each change a
//! survey makes to a check is printed here, once.

use super::{run_range, Job};
use crate::pipeline::run_is_valid;
use crate::survey::{ConventionId, NegativePolicy};

pub(super) fn notes(job: &Job) -> Vec<String> {
    let s = job.survey();
    let layout = &job.e.plane.layout;
    let mut out: Vec<String> = s.notes.clone();
    out.extend(job.e.convention.formulas());
    out.push(format!(
        "Negative {} readings: policy `{}`.",
        job.trade.dp(),
        match s.options.negative {
            NegativePolicy::Reject => "reject (a run with one is not computed)",
            NegativePolicy::Zero => "zero (counted as no flow)",
            NegativePolicy::Signed => "signed (reverse flow subtracts)",
        }
    ));
    out.push(format!(
        "Layout: {} ({}).",
        layout.method().name(),
        layout.source()
    ));
    out
}

pub(super) fn deviations(job: &Job) -> Vec<String> {
    let s = job.survey();
    let mut out = Vec::new();
    let excluded: Vec<String> = s
        .runs
        .iter()
        .filter(|r| !run_is_valid(r, s.convention))
        .map(|r| r.id.clone())
        .collect();
    if !excluded.is_empty() {
        out.push(format!(
            "{} reported but left out of the average: post-run leak check failed or not recorded.",
            super::capitalised(&run_range(&excluded))
        ));
    }
    // a run-scope setting reads the same for every run: print it once
    let mut settings: Vec<String> = Vec::new();
    for f in job.a.findings() {
        if let Some(set) = &f.setting {
            let line = format!("Check {}: {set}.", f.id);
            if !settings.contains(&line) {
                settings.push(line);
            }
        }
    }
    out.extend(settings);
    let advice = &job.e.plane.advice;
    for (r, convention) in [
        (&advice.epa_method_1, ConventionId::EpaMethod2),
        (&advice.en_15259, ConventionId::Iso16911),
    ] {
        if !r.confirmed && s.convention == convention {
            out.push(format!(
                "The {} point-count step used is quoted from memory and not yet confirmed \
                 against the published text: {}",
                r.framework,
                r.basis.render(&job.table)
            ));
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::testkit::{evaluated, evaluated_text};

    #[test]
    fn notes_carry_the_equations_without_internal_references() {
        let (e, a) = evaluated("stack");
        let n = notes(&Job::new(&e, &a));
        assert!(n.iter().any(|x| x.contains("85.49")), "{n:?}");
        assert!(n.iter().any(|x| x.starts_with("Layout: equal-area")));
        assert!(
            n.iter().all(|x| !x.contains(".md") && !x.contains(" Pa,")),
            "{n:?}"
        );
        let (e, a) = evaluated("hvac");
        let n = notes(&Job::new(&e, &a));
        assert!(n.iter().any(|x| x.starts_with("Negative VP readings")));
    }

    #[test]
    fn excluded_runs_and_settings_are_deviations_printed_once() {
        let (e, a) = evaluated("bad-plane");
        let d = deviations(&Job::new(&e, &a));
        assert!(d[0].starts_with("Run 2 reported but left out"), "{d:?}");
        // a run-scope check relaxed for every run is one deviation, not one per run
        let (e, a) = evaluated_text(
            "stack",
            "\n[checks.line-asymmetry]\nlimit = \"30 %\"\nreason = \"bend two diameters upstream\"\n",
        );
        let d = deviations(&Job::new(&e, &a));
        let n = d
            .iter()
            .filter(|x| x.contains("bend two diameters upstream"))
            .count();
        assert_eq!(n, 1, "{d:?}");
    }
}
