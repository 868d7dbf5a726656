//! The results table: each run and the average, in the job's units, with SI beside the flows of an
//! inch-pound job. Many runs are split into several tables so that each fits the page.

use super::{average_value, capitalised, run_value, Job, Trade};
use crate::display::{fixed, Kind};
use crate::report::model::{ResultRow, ResultsTable, MAX_RUN_COLUMNS};

pub(super) fn section(job: &Job) -> Vec<ResultsTable> {
    let runs = job.e.runs.len();
    let mut columns: Vec<String> = job.e.runs.iter().map(|r| format!("Run {}", r.id)).collect();
    if job.e.average.is_some() {
        columns.push("Average".into());
    }
    let rows = rows(job);
    // groups of runs that fit the page; the average goes with the last group
    let mut out = Vec::new();
    let mut start = 0;
    while start < columns.len() {
        let mut end = (start + MAX_RUN_COLUMNS).min(runs);
        if end == runs {
            end = columns.len();
        }
        out.push(ResultsTable {
            columns: columns[start..end].to_vec(),
            rows: rows.iter().map(|r| slice(r, start, end)).collect(),
        });
        start = end;
    }
    out
}

fn slice(r: &ResultRow, start: usize, end: usize) -> ResultRow {
    ResultRow {
        values: r.values[start..end].to_vec(),
        si_values: if r.si_values.is_empty() {
            Vec::new()
        } else {
            r.si_values[start..end].to_vec()
        },
        ..r.clone()
    }
}

/// The flows a trade reports: HVAC leaves out the dry-air standard flow, which TAB does not use.
fn flow_kinds(trade: Trade) -> &'static [Kind] {
    match trade {
        Trade::Stack => &[
            Kind::Velocity,
            Kind::ActualFlow,
            Kind::StandardFlow,
            Kind::DryStandardFlow,
            Kind::MassFlow,
        ],
        Trade::Hvac => &[
            Kind::Velocity,
            Kind::ActualFlow,
            Kind::StandardFlow,
            Kind::MassFlow,
        ],
    }
}

fn rows(job: &Job) -> Vec<ResultRow> {
    let e = job.e;
    let gas = job.trade.gas();
    let blank_average = |mut v: Vec<String>| {
        if e.average.is_some() {
            v.push(String::new());
        }
        v
    };
    let mut rows = vec![
        plain_row(
            job,
            &format!("Mean {gas} temperature"),
            Kind::Temperature,
            blank_average(
                e.runs
                    .iter()
                    .map(|r| job.number(Kind::Temperature, r.mean_temperature_k))
                    .collect(),
            ),
        ),
        plain_row(
            job,
            &capitalised(&format!("{gas} density")),
            Kind::Density,
            blank_average(
                e.runs
                    .iter()
                    .map(|r| job.number(Kind::Density, r.density_kg_m3))
                    .collect(),
            ),
        ),
    ];
    rows.extend(run_conditions(job));
    for &kind in flow_kinds(job.trade) {
        rows.push(flow_row(job, kind));
    }
    rows.push(uncertainty_row(job));
    rows
}

/// Each run's own conditions in its column (a run may give its own barometric and static pressure,
/// composition and moisture), and whether the run counts. HVAC pages show the status only when a
/// run is void.
fn run_conditions(job: &Job) -> Vec<ResultRow> {
    let e = job.e;
    let blank_average = |mut v: Vec<String>| {
        if e.average.is_some() {
            v.push(String::new());
        }
        v
    };
    let per_run = |f: &dyn Fn(&crate::flow::RunResult) -> String| {
        blank_average(e.runs.iter().map(f).collect())
    };
    let mut rows = Vec::new();
    if e.validity.iter().any(|v| !v.valid) {
        let mut values: Vec<String> = e
            .validity
            .iter()
            .map(|v| if v.valid { "counts" } else { "VOID" }.to_string())
            .collect();
        if e.average.is_some() {
            values.push(format!("{} runs", e.valid_runs()));
        }
        rows.push(ResultRow {
            label: "Run status".into(),
            unit: String::new(),
            values,
            si_unit: String::new(),
            si_values: Vec::new(),
        });
    }
    if job.trade == Trade::Hvac {
        return rows;
    }
    rows.push(plain_row(
        job,
        "Barometric pressure",
        Kind::Barometric,
        per_run(&|r| job.number(Kind::Barometric, r.gas.barometric_pa)),
    ));
    rows.push(plain_row(
        job,
        "Static pressure",
        Kind::StaticPressure,
        per_run(&|r| job.number(Kind::StaticPressure, r.gas.static_pa)),
    ));
    rows.push(plain_row(
        job,
        "Dry molar mass Md",
        Kind::MolarMass,
        per_run(&|r| job.number(Kind::MolarMass, r.gas.dry_molar_mass_g_mol)),
    ));
    rows.push(plain_row(
        job,
        "Moisture Bws (used)",
        Kind::Percent,
        per_run(&|r| job.number(Kind::Percent, r.gas.bws)),
    ));
    rows.push(plain_row(
        job,
        "Wet molar mass Ms",
        Kind::MolarMass,
        per_run(&|r| job.number(Kind::MolarMass, r.gas.wet_molar_mass_g_mol)),
    ));
    rows
}

fn plain_row(job: &Job, label: &str, kind: Kind, values: Vec<String>) -> ResultRow {
    ResultRow {
        label: label.to_string(),
        unit: job.table.get(kind).symbol.to_string(),
        values,
        si_unit: String::new(),
        si_values: Vec::new(),
    }
}

/// A velocity or flow across the runs and the average; SI beside for inch-pound jobs.
fn flow_row(job: &Job, kind: Kind) -> ResultRow {
    let e = job.e;
    let mut si: Vec<f64> = e.runs.iter().map(|r| run_value(kind, r)).collect();
    if let Some(av) = &e.average {
        si.push(average_value(kind, av));
    }
    let label = match kind {
        Kind::Velocity => "Mean velocity".to_string(),
        k => capitalised(job.table.get(k).label),
    };
    let si_table = job.table.si();
    ResultRow {
        label,
        unit: job.table.get(kind).symbol.to_string(),
        values: si.iter().map(|v| job.number(kind, *v)).collect(),
        si_unit: if job.si_beside() {
            format!("{} (SI)", si_table.get(kind).symbol)
        } else {
            String::new()
        },
        si_values: if job.si_beside() {
            si.iter().map(|v| si_table.get(kind).grouped(*v)).collect()
        } else {
            Vec::new()
        },
    }
}

fn uncertainty_row(job: &Job) -> ResultRow {
    let text = |u: Option<&crate::assess::UncertaintyReport>| {
        u.map(|x| format!("±{}", fixed(x.expanded_relative * 100.0, 1)))
            .unwrap_or_else(|| "—".into())
    };
    let mut values: Vec<String> = job
        .a
        .runs
        .iter()
        .map(|r| text(r.uncertainty.as_ref()))
        .collect();
    if job.e.average.is_some() {
        values.push(text(
            job.a.average.as_ref().and_then(|x| x.uncertainty.as_ref()),
        ));
    }
    ResultRow {
        label: "Expanded uncertainty (95 %)".into(),
        unit: "%".into(),
        values,
        si_unit: String::new(),
        si_values: Vec::new(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::testkit::evaluated;

    fn labels(t: &ResultsTable) -> Vec<&str> {
        t.rows.iter().map(|r| r.label.as_str()).collect()
    }

    #[test]
    fn stack_results_in_inch_pound_with_si_rows_labelled() {
        let (e, a) = evaluated("stack");
        let tables = section(&Job::new(&e, &a));
        assert_eq!(tables.len(), 1);
        let t = &tables[0];
        assert_eq!(t.columns, ["Run 1", "Run 2", "Run 3", "Average"]);
        assert_eq!(
            labels(t),
            [
                "Mean gas temperature",
                "Gas density",
                "Barometric pressure",
                "Static pressure",
                "Dry molar mass Md",
                "Moisture Bws (used)",
                "Wet molar mass Ms",
                "Mean velocity",
                "Actual flow",
                "Wet standard flow",
                "Dry standard flow",
                "Mass flow",
                "Expanded uncertainty (95 %)"
            ]
        );
        let dry = &t.rows[10];
        assert_eq!(dry.unit, "dscfm");
        assert_eq!(dry.values[3], "93,147", "as `compute` prints the average");
        assert_eq!(dry.si_unit, "m³/h (SI)");
        assert_eq!(t.rows[0].unit, "°F");
        assert_eq!(t.rows[1].unit, "lb/ft³");
        assert!(t.rows[0].si_unit.is_empty());
    }

    #[test]
    fn hvac_results_speak_of_air_without_the_dry_standard_row() {
        let (e, a) = evaluated("hvac");
        let t = &section(&Job::new(&e, &a))[0];
        assert_eq!(t.columns, ["Run 1", "Average"]);
        assert_eq!(
            labels(t),
            [
                "Mean air temperature",
                "Air density",
                "Mean velocity",
                "Actual flow",
                "Standard air flow",
                "Mass flow",
                "Expanded uncertainty (95 %)"
            ]
        );
        assert_eq!(t.rows[2].unit, "fpm");
        // whole fpm, as TAB reports velocities (common practice)
        assert!(
            !t.rows[2].values[0].contains('.'),
            "{}",
            t.rows[2].values[0]
        );
    }

    #[test]
    fn metric_and_si_jobs_have_no_si_rows() {
        for name in ["stack-metric", "en-stack"] {
            let (e, a) = evaluated(name);
            let t = &section(&Job::new(&e, &a))[0];
            assert!(t.rows.iter().all(|r| r.si_unit.is_empty()), "{name}");
        }
        let (e, a) = evaluated("en-stack");
        let t = &section(&Job::new(&e, &a))[0];
        assert_eq!(t.rows[10].unit, "dNm³/h");
    }

    #[test]
    fn many_runs_split_into_tables_that_fit() {
        let (e, a) = crate::report::testkit::six_runs();
        let tables = section(&Job::new(&e, &a));
        assert_eq!(tables.len(), 2);
        assert_eq!(tables[0].columns.len(), MAX_RUN_COLUMNS);
        assert_eq!(tables[1].columns, ["Run 6", "Average"]);
        for t in &tables {
            for r in &t.rows {
                assert_eq!(r.values.len(), t.columns.len(), "{}", r.label);
                assert!(r.si_values.is_empty() || r.si_values.len() == t.columns.len());
            }
        }
    }
}
