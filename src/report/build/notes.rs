//! Notes (the survey's own, the equations used, the negative-reading policy, the layout) and
//! deviations (runs left out, checks the survey changed, rules quoted from memory). Each change a
//! survey makes to a check is printed here, once.

use super::Job;
use crate::survey::{ConventionId, NegativePolicy};

pub(super) fn notes(job: &Job) -> Vec<String> {
    let s = job.survey();
    let layout = &job.e.plane.layout;
    let mut out: Vec<String> = s.notes.clone();
    out.extend(job.e.convention.formulas());
    out.extend(crate::flow::method_notes(
        s,
        &job.e.convention,
        &job.e.runs,
        job.e.wall_effects.len(),
    ));
    out.extend(wall_effects(job));
    if s.runs.iter().any(|r| !r.conditions.is_empty()) {
        out.push(
            "Runs that give their own barometric or static pressure, composition or moisture are \
             computed with them; each run's values are in its column of the results table."
                .to_string(),
        );
    }
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

/// The Method 2H calculational procedure of each traverse, sector by sector, in the job's units.
fn wall_effects(job: &Job) -> Vec<String> {
    use crate::display::{fixed, Kind};
    use crate::flow::wall_effects::DremSource;
    job.e
        .wall_effects
        .iter()
        .map(|(id, w)| {
            let sectors: Vec<String> = w
                .sectors
                .iter()
                .map(|sec| {
                    format!(
                        "{}{}: {} wall points to {}, drem {}, vdrem {} ({}), Vej {} against {}",
                        sec.line,
                        sec.point,
                        sec.wall_points.len(),
                        job.text(Kind::Length, sec.dlast_m),
                        job.text(Kind::Length, sec.drem_m),
                        job.text(Kind::Velocity, sec.vdrem_m_s),
                        match sec.vdrem_source {
                            DremSource::Measured => "measured",
                            DremSource::NearestWallPoint => "nearest wall point stands in",
                            DremSource::Method1Point => "Method 1 point stands in",
                        },
                        job.text(Kind::Velocity, sec.replacement_m_s),
                        job.text(Kind::Velocity, sec.unadjusted_m_s),
                    )
                })
                .collect();
            format!(
                "Method 2H wall-effects traverse, run {id}: vavg {}, VAVG {}, WAF {} (p = {}); {}.",
                job.text(Kind::Velocity, w.unadjusted_mean_m_s),
                job.text(Kind::Velocity, w.adjusted_mean_m_s),
                fixed(w.factor, 4),
                w.points_per_diameter,
                sectors.join("; ")
            )
        })
        .collect()
}

pub(super) fn deviations(job: &Job) -> Vec<String> {
    let s = job.survey();
    let mut out = Vec::new();
    for (spec, v) in s.runs.iter().zip(&job.e.validity) {
        if let Some(reason) = &v.void_reason {
            out.push(format!(
                "Run {} is void ({reason}): reported, left out of the average.",
                spec.id
            ));
        }
    }
    let (valid, required) = (job.e.valid_runs(), job.e.runs_required());
    if valid < required {
        out.push(format!(
            "The test is short: {valid} valid run{} of {required} required.",
            if valid == 1 { "" } else { "s" }
        ));
    } else if job.e.validity.iter().any(|v| !v.valid) {
        out.push(format!(
            "With the void runs replaced the test has {valid} valid runs of {required} required."
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
        assert!(
            d[0].starts_with("Run 2 is void (post-run leak check failed): reported, left out"),
            "{d:?}"
        );
        assert!(
            d[1].starts_with("The test is short: 1 valid run of 3 required"),
            "{d:?}"
        );
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
