//! The readings of each run as recorded, in the job's units, with the run's figures and the point
//! velocities placed in the cross-section for the charts.

use super::Job;
use crate::display::{fixed, Kind};
use crate::flow::{EpaForm, PointResult, RunResult};
use crate::readings::{Dp, RunReadings};
use crate::report::model::{FieldPoint, Plane, Quantity, ReadingRow, ReadingsColumns, RunData};
use crate::survey::{LeakResult, NegativePolicy, RunSpec};

/// Column heads of the readings tables. The yaw column appears only when a run recorded yaw.
pub(super) fn columns(job: &Job) -> ReadingsColumns {
    let unit = |k: Kind| job.table.get(k).symbol;
    ReadingsColumns {
        position: format!("Position ({})", unit(Kind::Length)),
        dp: format!("{} ({})", job.trade.dp(), unit(Kind::VelocityPressure)),
        temperature: format!("T ({})", unit(Kind::Temperature)),
        yaw: has_yaw(job).then(|| "Yaw (°)".to_string()),
        velocity: format!("Velocity ({})", unit(Kind::Velocity)),
    }
}

fn has_yaw(job: &Job) -> bool {
    job.e
        .runs
        .iter()
        .flat_map(|r| &r.points)
        .any(|p| p.yaw_deg.is_some())
}

pub(super) fn section(job: &Job, plane: &Plane) -> Vec<RunData> {
    let s = job.survey();
    let yaw = has_yaw(job);
    job.e
        .runs
        .iter()
        .zip(&s.runs)
        .zip(&job.e.loaded.runs)
        .zip(&job.e.validity)
        .map(|(((r, spec), (_, readings)), v)| {
            let valid = v.valid;
            RunData {
                id: r.id.clone(),
                label: match &v.void_reason {
                    Some(why) => format!("Run {} — VOID: {why}", r.id),
                    None => format!("Run {}", r.id),
                },
                started: spec.started.clone().unwrap_or_default(),
                ended: spec.ended.clone().unwrap_or_default(),
                leak_check: leak_check(job, spec),
                readings: r
                    .points
                    .iter()
                    .map(|p| reading_row(job, p, readings, valid, yaw))
                    .collect(),
                summary: summary(job, r),
                field: field(plane, r, valid),
            }
        })
        .collect()
}

/// Whether the report speaks of pitot leak checks: always for a trade that records them,
/// otherwise only when the survey recorded one.
pub(super) fn leak_checks_shown(job: &Job) -> bool {
    job.trade.records_leak_checks()
        || job
            .survey()
            .runs
            .iter()
            .any(|r| r.leak_check.before.is_some() || r.leak_check.after.is_some())
}

/// Leak checks in words, when the report speaks of them.
fn leak_check(job: &Job, spec: &RunSpec) -> Option<String> {
    let lc = &spec.leak_check;
    if !leak_checks_shown(job) {
        return None;
    }
    let word = |x: Option<LeakResult>| match x {
        Some(LeakResult::Pass) => "pass",
        Some(LeakResult::Fail) => "FAIL",
        None => "not recorded",
    };
    Some(format!(
        "before: {} · after: {}",
        word(lc.before),
        word(lc.after)
    ))
}

fn reading_row(
    job: &Job,
    p: &PointResult,
    readings: &RunReadings,
    valid: bool,
    yaw: bool,
) -> ReadingRow {
    let recorded = readings
        .readings
        .iter()
        .find(|x| x.line == p.line && x.point == p.point);
    let dp = match recorded.map(|x| x.dp) {
        // a liquid column is shown as read, in the job's length unit
        Some(Dp::Column { height_m }) => {
            let len = job.table.get(Kind::Length);
            format!("{} {} col.", len.number_with(height_m, 3), len.symbol)
        }
        _ => job.number(Kind::VelocityPressure, p.dp_pa),
    };
    let mut note = Vec::new();
    if p.adjusted {
        note.push("moved to the wall limit".to_string());
    }
    if p.negative {
        note.push(
            match job.survey().options.negative {
                NegativePolicy::Zero => "negative, counted as zero",
                NegativePolicy::Signed => "negative, signed velocity",
                NegativePolicy::Reject => "negative",
            }
            .to_string(),
        );
    }
    if !valid {
        note.push("void run".into());
    }
    ReadingRow {
        line: p.line.clone(),
        point: p.point as u32,
        position: job.number(Kind::Length, p.position_m),
        dp,
        temperature: job.number(Kind::Temperature, p.temperature_k),
        yaw: match (yaw, p.yaw_deg) {
            (false, _) => String::new(),
            (true, Some(y)) => fixed(y, 0),
            (true, None) => "—".into(),
        },
        velocity: job.number(Kind::Velocity, p.velocity_m_s),
        adjusted: p.adjusted,
        negative: p.negative,
        excluded: !valid,
        note: note.join("; "),
    }
}

/// The run's figures under its table; EPA Method 2 intermediates in the method's own units so a
/// reviewer can recompute eqs. 2-6 to 2-10 by hand.
fn summary(job: &Job, r: &RunResult) -> Vec<Quantity> {
    let gas = job.trade.gas();
    let mut out = vec![
        job.plain("Mean velocity", Kind::Velocity, r.mean_velocity_m_s),
        job.plain(
            &format!("Mean {gas} temperature"),
            Kind::Temperature,
            r.mean_temperature_k,
        ),
        job.plain(
            &super::capitalised(&format!("{gas} density")),
            Kind::Density,
            r.density_kg_m3,
        ),
        Quantity::new(
            format!("√(mean {}) would give", job.trade.dp()),
            format!(
                "{} ({:+.2} %)",
                job.text(Kind::Velocity, r.wrong_average_velocity_m_s),
                (r.wrong_average_velocity_m_s / r.mean_velocity_m_s - 1.0) * 100.0
            ),
            "",
        ),
    ];
    if let Some(f) = &r.epa {
        let (dpu, tu, pu) = match f.form {
            EpaForm::English => ("inH2O", "°R", "inHg"),
            EpaForm::Metric => ("mmH2O", "K", "mmHg"),
        };
        out.push(Quantity::new(
            "(√Δp)avg",
            format!("{} √{dpu}", fixed(f.sqrt_dp_avg, 6)),
            "",
        ));
        out.push(Quantity::new(
            "Ts (mean)",
            format!("{} {tu}", fixed(f.ts_abs, 1)),
            "",
        ));
        out.push(Quantity::new("Ps", format!("{} {pu}", fixed(f.ps, 5)), ""));
    }
    out
}

fn field(plane: &Plane, r: &RunResult, valid: bool) -> Vec<FieldPoint> {
    r.points
        .iter()
        .map(|p| {
            let (x, y) = plane
                .line(&p.line)
                .map(|l| plane.point_xy(l.orientation, p.position_m))
                .unwrap_or((0.0, 0.0));
            FieldPoint {
                line: p.line.clone(),
                point: p.point as u32,
                position_m: p.position_m,
                x_m: x,
                y_m: y,
                velocity_m_s: p.velocity_m_s,
                excluded: !valid,
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::testkit::evaluated;

    #[test]
    fn stack_readings_as_recorded_with_yaw_and_leak_checks() {
        let (e, a) = evaluated("stack");
        let job = Job::new(&e, &a);
        let cols = columns(&job);
        assert_eq!(cols.dp, "Δp (inH2O)");
        assert_eq!(cols.temperature, "T (°F)");
        assert_eq!(cols.yaw.as_deref(), Some("Yaw (°)"));
        let plane = super::super::plane::section(&job);
        let runs = section(&job, &plane);
        assert_eq!(runs.len(), 3);
        assert_eq!(
            runs[0].leak_check.as_deref(),
            Some("before: pass · after: pass")
        );
        let row = &runs[0].readings[0];
        // sample-data/stack/run1.csv, line A point 1: Δp read in inH2O to three places
        let csv =
            std::fs::read_to_string(crate::report::testkit::sample_dir("stack").join("run1.csv"))
                .unwrap();
        let first = csv.lines().nth(1).unwrap();
        let dp_read: f64 = first.split(',').nth(2).unwrap().parse().unwrap();
        assert_eq!(row.dp, fixed(dp_read, 3));
        assert!(row.velocity.contains('.'), "ft/s to two places");
        assert_eq!(runs[0].field.len(), 24);
        assert!(runs[0].summary.iter().any(|q| q.label == "(√Δp)avg"));
    }

    #[test]
    fn hvac_readings_speak_velocity_pressure_without_leak_checks_or_yaw() {
        let (e, a) = evaluated("hvac");
        let job = Job::new(&e, &a);
        let cols = columns(&job);
        assert_eq!(cols.dp, "VP (inH2O)");
        assert_eq!(cols.velocity, "Velocity (fpm)");
        assert_eq!(cols.yaw, None);
        let runs = section(&job, &super::super::plane::section(&job));
        assert_eq!(runs[0].leak_check, None);
        let row = &runs[0].readings[0];
        assert!(!row.velocity.contains('.'), "whole fpm: {}", row.velocity);
        assert_eq!(row.yaw, "");
        assert_eq!(runs[0].summary[1].label, "Mean air temperature");
        assert_eq!(runs[0].summary[3].label, "√(mean VP) would give");
    }

    #[test]
    fn metric_readings_in_mm_of_water_and_celsius() {
        let (e, a) = evaluated("stack-metric");
        let job = Job::new(&e, &a);
        let cols = columns(&job);
        assert_eq!(cols.dp, "Δp (mmH2O)");
        assert_eq!(cols.temperature, "T (°C)");
        assert_eq!(cols.position, "Position (mm)");
        let runs = section(&job, &super::super::plane::section(&job));
        assert!(runs[0].summary.iter().any(|q| q.value.ends_with(" √mmH2O")));
    }
}
