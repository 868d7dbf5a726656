//! The uncertainty budget (GUM, JCGM 100:2008) of the headline flow: of the average when it has
//! one, otherwise of the first run.

use super::{average_value, capitalised, headline_flow, run_range, run_value, Job};
use crate::assess::UncertaintyReport;
use crate::display::fixed;
use crate::report::model::{BudgetRow, UncertaintyBudget};

pub(super) fn section(job: &Job) -> UncertaintyBudget {
    let kind = headline_flow(job.trade);
    let name = job.table.get(kind).label;
    let (a, e) = (job.a, job.e);
    let name = capitalised(name);
    let (report, applies_to, flow) = match (&a.average, &e.average) {
        (Some(avg), Some(av)) if avg.uncertainty.is_some() => (
            avg.uncertainty.as_ref(),
            format!("{name}, average of {}", run_range(&avg.runs)),
            Some(average_value(kind, av)),
        ),
        _ => (
            a.runs.first().and_then(|r| r.uncertainty.as_ref()),
            format!(
                "{name}, run {}",
                e.runs.first().map(|r| r.id.as_str()).unwrap_or("—")
            ),
            e.runs.first().map(|r| run_value(kind, r)),
        ),
    };
    let Some(u) = report else {
        return UncertaintyBudget {
            applies_to,
            spatial_method: "—".into(),
            rows: Vec::new(),
            combined: "—".into(),
            effective_dof: "—".into(),
            coverage_factor: "—".into(),
            expanded: "—".into(),
            expanded_absolute: "—".into(),
            note: a
                .average
                .as_ref()
                .and_then(|x| x.uncertainty_note.clone())
                .unwrap_or_else(|| "no budget could be formed".into()),
        };
    };
    let absolute = flow.map(|q| q * u.expanded_relative);
    UncertaintyBudget {
        applies_to,
        spatial_method: u.spatial_method.to_string(),
        rows: rows(job, u),
        combined: format!("{} %", fixed(u.combined_relative * 100.0, 2)),
        effective_dof: u
            .effective_dof
            .map(|d| fixed(d, 1))
            .unwrap_or_else(|| "∞".into()),
        coverage_factor: fixed(u.coverage_factor, 2),
        expanded: format!("±{} %", fixed(u.expanded_relative * 100.0, 1)),
        expanded_absolute: match absolute {
            Some(x) => match job.si_text(kind, x) {
                si if si.is_empty() => format!("±{}", job.text(kind, x)),
                si => format!("±{} (±{si} SI)", job.text(kind, x)),
            },
            None => "—".into(),
        },
        note: "expanded uncertainty at about 95 % coverage: k from Student's t at the \
               Welch–Satterthwaite effective degrees of freedom (GUM, JCGM 100:2008)"
            .into(),
    }
}

fn rows(job: &Job, u: &UncertaintyReport) -> Vec<BudgetRow> {
    let uc2: f64 = u
        .components
        .iter()
        .map(|c| (c.relative * c.sensitivity).powi(2))
        .sum();
    u.components
        .iter()
        .map(|c| BudgetRow {
            name: job.trade.name(&c.name),
            relative_u: format!("{} %", fixed(c.relative * 100.0, 2)),
            sensitivity: fixed(c.sensitivity, 2),
            dof: c.dof.map(|d| fixed(d, 0)).unwrap_or_else(|| "∞".into()),
            contribution: if uc2 > 0.0 {
                format!(
                    "{} %",
                    fixed(100.0 * (c.relative * c.sensitivity).powi(2) / uc2, 0)
                )
            } else {
                "—".into()
            },
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::testkit::evaluated;

    #[test]
    fn the_budget_of_the_stack_average_in_dscfm() {
        let (e, a) = evaluated("stack");
        let b = section(&Job::new(&e, &a));
        assert_eq!(b.applies_to, "Dry standard flow, average of runs 1, 2, 3");
        let u = a.average.as_ref().unwrap().uncertainty.as_ref().unwrap();
        assert_eq!(b.rows.len(), u.components.len());
        assert_eq!(
            b.expanded,
            format!("±{} %", fixed(u.expanded_relative * 100.0, 1))
        );
        assert!(
            b.expanded_absolute.contains(" dscfm"),
            "{}",
            b.expanded_absolute
        );
        assert!(
            b.expanded_absolute.ends_with(" m³/h SI)"),
            "{}",
            b.expanded_absolute
        );
        // the shares of u_c² add up to about 100 % (each rounded to a whole percent)
        let total: f64 = b
            .rows
            .iter()
            .map(|r| {
                r.contribution
                    .trim_end_matches(" %")
                    .parse::<f64>()
                    .unwrap()
            })
            .sum();
        assert!(
            (total - 100.0).abs() <= b.rows.len() as f64 * 0.5,
            "{total}"
        );
    }

    #[test]
    fn the_hvac_budget_is_of_the_actual_flow_in_cfm() {
        let (e, a) = evaluated("hvac");
        let b = section(&Job::new(&e, &a));
        assert!(
            b.applies_to.starts_with("Actual flow, "),
            "{}",
            b.applies_to
        );
        assert!(b.rows.iter().any(|r| r.name == "air temperature"));
        assert!(b.rows.iter().all(|r| !r.name.contains("gas")));
        assert!(b.expanded_absolute.contains(" acfm"));
    }
}
