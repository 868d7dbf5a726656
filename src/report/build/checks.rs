//! The checks section: the checks judged once for the survey in one table, the checks judged per
//! run as one check × run matrix (each limit and source printed once), and remarks for what a
//! matrix cell cannot hold. A survey's change to a check is printed once, under Deviations
//! (`notes.rs`); here a changed check only says so.

use super::{status, Job};
use crate::checks::{Finding, Group};
use crate::display::{fixed, significant, Kind};
use crate::report::model::{
    CheckCell, CheckMatrix, CheckRow, ChecksSection, MatrixRow, Status, MAX_RUN_COLUMNS,
};

pub(super) fn section(job: &Job) -> ChecksSection {
    let survey = job
        .a
        .checks
        .iter()
        .map(|f| CheckRow {
            group: group_name(f.group).into(),
            id: id_text(f),
            status: status(f.status),
            measured: measured(job, f),
            limit: f.limit.to_string(),
            source: f.source.to_string(),
            message: message(f),
        })
        .collect();
    let (rows, remarks) = matrix_rows(job);
    let run_names: Vec<String> = job.a.runs.iter().map(|r| format!("Run {}", r.id)).collect();
    let matrices = (0..run_names.len())
        .step_by(MAX_RUN_COLUMNS)
        .map(|start| {
            let end = (start + MAX_RUN_COLUMNS).min(run_names.len());
            CheckMatrix {
                runs: run_names[start..end].to_vec(),
                rows: rows
                    .iter()
                    .map(|r| MatrixRow {
                        cells: r.cells[start..end].to_vec(),
                        ..r.clone()
                    })
                    .collect(),
            }
        })
        .collect();
    ChecksSection {
        survey,
        matrices,
        remarks,
    }
}

fn group_name(g: Group) -> &'static str {
    match g {
        Group::Plane => "Plane",
        Group::Flow => "Flow",
        Group::Run => "Run",
        Group::Records => "Records",
        Group::Data => "Data",
    }
}

fn id_text(f: &Finding) -> String {
    match &f.subject {
        Some(sub) => format!("{} ({sub})", f.id),
        None => f.id.to_string(),
    }
}

/// The finding in words without the survey's setting (printed once, under Deviations).
fn message(f: &Finding) -> String {
    match &f.setting {
        Some(s) if s.to_string().starts_with("disabled") => {
            "disabled by the survey (see Deviations)".into()
        }
        Some(_) => format!(
            "{} (limit set by the survey, see Deviations)",
            f.message_without_setting()
        ),
        None => f.message.to_string(),
    }
}

/// The run-scope checks in registry order, one row each with a cell per run, and the remarks.
fn matrix_rows(job: &Job) -> (Vec<MatrixRow>, Vec<String>) {
    let mut ids: Vec<&str> = Vec::new();
    for r in &job.a.runs {
        for f in &r.checks {
            if !ids.contains(&f.id.as_ref()) {
                ids.push(&f.id);
            }
        }
    }
    if !super::runs::leak_checks_shown(job) {
        ids.retain(|id| *id != "leak-check");
    }
    let mut rows = Vec::new();
    let mut remarks = Vec::new();
    for id in ids {
        let found: Vec<(&str, Option<&Finding>)> = job
            .a
            .runs
            .iter()
            .map(|r| (r.id.as_str(), r.checks.iter().find(|f| f.id == id)))
            .collect();
        let Some(first) = found.iter().find_map(|(_, f)| *f) else {
            continue;
        };
        let messages: Vec<String> = found.iter().filter_map(|(_, f)| f.map(message)).collect();
        let same = messages.windows(2).all(|w| w[0] == w[1]);
        if !same {
            for (run, f) in &found {
                if let Some(f) = f.filter(|f| f.status != crate::checks::Status::Pass) {
                    remarks.push(format!("Run {run} · {id}: {}", message(f)));
                }
            }
        }
        rows.push(MatrixRow {
            group: group_name(first.group).into(),
            id: id.to_string(),
            limit: first.limit.to_string(),
            source: first.source.to_string(),
            cells: found
                .iter()
                .map(|(_, f)| match f {
                    Some(f) => CheckCell {
                        status: status(f.status),
                        measured: measured(job, f),
                    },
                    None => CheckCell {
                        status: Status::NotApplicable,
                        measured: "—".into(),
                    },
                })
                .collect(),
            message: if same {
                messages.first().cloned().unwrap_or_default()
            } else {
                String::new()
            },
        });
    }
    (rows, remarks)
}

/// The measured value in the job's units. Findings carry SI values with the SI symbol of their
/// unit (`m`, `Pa`, `m/s`, `K` for a temperature spread, `deg`, `d` for days, `D` for
/// diameters, `1` for counts and ratios).
fn measured(job: &Job, f: &Finding) -> String {
    let Some(v) = f.measured else {
        return "—".into();
    };
    match f.unit {
        "m" => job.text(Kind::Length, v),
        "Pa" => job.text(Kind::VelocityPressure, v),
        "m/s" => job.text(Kind::Velocity, v),
        "K" => {
            let t = job.table.get(Kind::TemperatureDifference);
            t.with_unit(fixed(t.difference(v), t.decimals))
        }
        "deg" => {
            let a = job.table.get(Kind::Angle);
            a.with_unit(fixed(v, 1))
        }
        "d" => format!("{} days", fixed(v, 0)),
        "D" => format!("{} D", fixed(v, 1)),
        "1" | "" if v.fract() == 0.0 && v.abs() < 1e9 => fixed(v, 0),
        "1" | "" => significant(v, 4),
        other => format!("{} {other}", significant(v, 4)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::testkit::evaluated;

    #[test]
    fn stack_checks_are_one_matrix_with_each_limit_once() {
        let (e, a) = evaluated("stack");
        let c = section(&Job::new(&e, &a));
        assert_eq!(c.matrices.len(), 1);
        let m = &c.matrices[0];
        assert_eq!(m.runs, ["Run 1", "Run 2", "Run 3"]);
        // every run-scope check once, with one cell per run
        let run_checks = a.runs[0].checks.len();
        assert_eq!(m.rows.len(), run_checks);
        assert!(m.rows.iter().all(|r| r.cells.len() == 3));
        let ids: Vec<&str> = m.rows.iter().map(|r| r.id.as_str()).collect();
        let mut unique = ids.clone();
        unique.dedup();
        assert_eq!(ids, unique);
        // the survey-scope table holds the plane and records checks
        assert_eq!(c.survey.len(), a.checks.len());
        assert!(c.survey.iter().any(|r| r.id == "point-count"));
        // measured values in the job's units: the nearest wall distance in inches, not metres
        let wall = c
            .survey
            .iter()
            .find(|r| r.id == "wall-distance-epa")
            .unwrap();
        assert!(wall.measured.ends_with(" in"), "{}", wall.measured);
        assert!(c.remarks.is_empty(), "{:?}", c.remarks);
    }

    #[test]
    fn hvac_measured_values_are_inch_pound() {
        let (e, a) = evaluated("hvac");
        let c = section(&Job::new(&e, &a));
        let cells: Vec<&CheckCell> = c.matrices[0].rows.iter().map(|r| &r.cells[0]).collect();
        // the temperature spread is a difference in °F, not kelvin
        let spread = c.matrices[0]
            .rows
            .iter()
            .find(|r| r.id == "air-temperature-range")
            .unwrap();
        assert!(
            spread.cells[0].measured.ends_with(" °F"),
            "{}",
            spread.cells[0].measured
        );
        assert!(cells.iter().all(|x| !x.measured.ends_with(" K")));
        // the one warning's finding is in the row (a single run reads the same everywhere)
        // no leak-check row: TAB traverses record none and the survey recorded none
        assert!(c.matrices[0].rows.iter().all(|r| r.id != "leak-check"));
        let asym = c.matrices[0]
            .rows
            .iter()
            .find(|r| r.id == "line-asymmetry")
            .unwrap();
        assert_eq!(asym.cells[0].status, Status::Warn);
        assert!(!asym.message.is_empty());
    }

    #[test]
    fn many_runs_make_several_matrices_that_fit_the_page() {
        let (e, a) = crate::report::testkit::six_runs();
        let c = section(&Job::new(&e, &a));
        assert_eq!(c.matrices.len(), 2);
        assert_eq!(c.matrices[0].runs.len(), MAX_RUN_COLUMNS);
        assert_eq!(c.matrices[1].runs, ["Run 6"]);
        assert!(c
            .matrices
            .iter()
            .all(|m| m.rows.iter().all(|r| r.cells.len() == m.runs.len())));
    }

    #[test]
    fn a_changed_check_says_so_without_repeating_the_reason() {
        let (e, a) = evaluated("bad-plane");
        let c = section(&Job::new(&e, &a));
        let all: Vec<String> = c
            .survey
            .iter()
            .map(|r| r.message.clone())
            .chain(
                c.matrices
                    .iter()
                    .flat_map(|m| m.rows.iter().map(|r| r.message.clone())),
            )
            .chain(c.remarks.clone())
            .collect();
        for f in a.findings().filter(|f| f.setting.is_some()) {
            let set = f.setting.as_ref().unwrap().to_string();
            assert!(
                all.iter().all(|m| !m.contains(&set)),
                "the setting `{set}` is printed in the checks; it belongs under Deviations"
            );
        }
        assert!(c.survey.iter().any(|r| r.status == Status::Fail));
    }
}
