//! The moisture trains: each run's Method 4 train data as recorded and every intermediate of the
//! method's equations, in the method's own units, so a reviewer can recompute Bws by hand.
//!
//! Formatting only: the figures come from `gas::method4` through each run's gas state.

use super::Job;
use crate::display::fixed;
use crate::gas::{Method4Form, Method4Result};
use crate::report::model::{ResultRow, ResultsTable, MAX_RUN_COLUMNS};

/// One run's train: column label, the reduced train, Bws used, saturation Bws.
type Train<'a> = (String, &'a Method4Result, f64, Option<f64>);

/// The trains of the runs that have one; empty when no run's moisture is from a train.
pub(super) fn section(job: &Job) -> Vec<ResultsTable> {
    let trains: Vec<Train> = job
        .e
        .runs
        .iter()
        .filter_map(|r| {
            r.gas
                .method4
                .as_ref()
                .map(|m| (format!("Run {}", r.id), m, r.gas.bws, r.gas.saturation_bws))
        })
        .collect();
    let Some(form) = trains.first().map(|t| t.1.form) else {
        return Vec::new();
    };
    let u = Units::of(form);
    let row = |label: &str, unit: &str, f: &dyn Fn(&Train) -> String| ResultRow {
        label: label.to_string(),
        unit: unit.to_string(),
        values: trains.iter().map(f).collect(),
        si_unit: String::new(),
        si_values: Vec::new(),
    };
    let pct = |x: f64| fixed(x * 100.0, 2);
    let rows = vec![
        row("Impinger gain Vf − Vi", "mL", &|t| {
            format!(
                "{}{}",
                fixed(t.1.impinger_ml, 1),
                if t.1.impinger_weighed { " (g)" } else { "" }
            )
        }),
        row("Silica gel gain Wf − Wi", "g", &|t| {
            fixed(t.1.silica_gel_g, 1)
        }),
        row("Meter volume Vm", u.volume, &|t| {
            fixed(t.1.meter_volume, u.volume_decimals)
        }),
        row("Meter Y", "", &|t| fixed(t.1.meter_y, 3)),
        row(
            &if trains.iter().all(|t| t.1.meter_dh_given) {
                format!("{}{}", u.pm_label, u.dh_note)
            } else {
                u.pm_label.to_string()
            },
            u.pressure,
            &|t| fixed(t.1.meter_pressure, u.pressure_decimals),
        ),
        row(u.tm_label, u.temperature, &|t| {
            fixed(t.1.meter_temperature_abs, 1)
        }),
        row("Vwc(std)", u.std_volume, &|t| {
            fixed(t.1.vwc_std, u.std_decimals)
        }),
        row("Vwsg(std)", u.std_volume, &|t| {
            fixed(t.1.vwsg_std, u.std_decimals)
        }),
        row("Vm(std)", u.dry_std_volume, &|t| {
            fixed(t.1.vm_std, u.std_decimals)
        }),
        row("Bws, train", "%", &|t| pct(t.1.bws)),
        row(
            "Bws, saturation at stack temperature",
            "%",
            &|t| match t.3 {
                Some(s) if s >= 1.0 => "above 100".to_string(),
                Some(s) => pct(s),
                None => "—".to_string(),
            },
        ),
        row("Bws, used (the lower)", "%", &|t| pct(t.2)),
    ];
    let columns: Vec<String> = trains.iter().map(|t| t.0.clone()).collect();
    columns
        .chunks(MAX_RUN_COLUMNS)
        .enumerate()
        .map(|(k, cols)| {
            let (a, b) = (k * MAX_RUN_COLUMNS, k * MAX_RUN_COLUMNS + cols.len());
            ResultsTable {
                columns: cols.to_vec(),
                rows: rows
                    .iter()
                    .map(|r| ResultRow {
                        values: r.values[a..b].to_vec(),
                        ..r.clone()
                    })
                    .collect(),
            }
        })
        .collect()
}

/// Units and labels of one Method 4 form.
struct Units {
    volume: &'static str,
    volume_decimals: usize,
    pressure: &'static str,
    pressure_decimals: usize,
    pm_label: &'static str,
    dh_note: &'static str,
    tm_label: &'static str,
    temperature: &'static str,
    std_volume: &'static str,
    dry_std_volume: &'static str,
    std_decimals: usize,
}

impl Units {
    fn of(form: Method4Form) -> Units {
        match form {
            Method4Form::EpaEnglish => Units {
                volume: "dcf",
                volume_decimals: 3,
                pressure: "inHg",
                pressure_decimals: 3,
                pm_label: "Meter pressure Pm",
                dh_note: " = Pbar + ΔH/13.6",
                tm_label: "Meter temperature Tm (°F + 460)",
                temperature: "°R",
                std_volume: "scf",
                dry_std_volume: "dscf",
                std_decimals: 3,
            },
            Method4Form::EpaMetric => Units {
                volume: "m³",
                volume_decimals: 4,
                pressure: "mmHg",
                pressure_decimals: 1,
                pm_label: "Meter pressure Pm",
                dh_note: " = Pbar + ΔH/13.6",
                tm_label: "Meter temperature Tm (°C + 273)",
                temperature: "K",
                std_volume: "scm",
                dry_std_volume: "dscm",
                std_decimals: 4,
            },
            Method4Form::Exact { .. } => Units {
                volume: "m³",
                volume_decimals: 4,
                pressure: "Pa",
                pressure_decimals: 0,
                pm_label: "Meter pressure Pm",
                dh_note: " = Pbar + ΔH",
                tm_label: "Meter temperature Tm",
                temperature: "K",
                std_volume: "m³ (ref)",
                dry_std_volume: "m³ (ref, dry)",
                std_decimals: 4,
            },
        }
    }
}
