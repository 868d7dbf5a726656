//! Instruments and calibration: the pitot, each instrument `[instruments]` dates, and every input
//! of the uncertainty budget with its value (in the job's units) and where it came from. Due dates
//! are the calibration checks' own ([`crate::checks::records::calibration_dues`]).

use super::Job;
use crate::assess::AssumedValue;
use crate::checks::records::CalibrationDue;
use crate::display::fixed;
use crate::report::model::InstrumentRow;
use crate::survey::ProbeKind;

pub(super) fn section(job: &Job) -> Vec<InstrumentRow> {
    let mut out = vec![probe(job)];
    for due in job.a.calibrations.iter().filter(|d| d.key != "pitot") {
        out.push(InstrumentRow {
            name: due.instrument.to_string(),
            identifier: due.serial.clone().unwrap_or_else(|| "—".into()),
            detail: String::new(),
            calibrated: due.calibrated.to_string(),
            due: due_text(due),
            reference: "survey [instruments]".into(),
        });
    }
    for asm in &job.a.assumptions {
        out.push(InstrumentRow {
            name: job.trade.name(asm.input),
            identifier: "—".into(),
            detail: value_text(job, &asm.value),
            calibrated: "—".into(),
            due: "—".into(),
            reference: asm.basis.clone(),
        });
    }
    out
}

fn due_text(due: &CalibrationDue) -> String {
    match due.valid_until {
        Some(d) => format!("{d} ({} months)", due.interval_months),
        None => "—".into(),
    }
}

fn probe(job: &Job) -> InstrumentRow {
    let p = &job.survey().probe;
    let due = job.a.calibrations.iter().find(|d| d.key == "pitot");
    let (detail, reference) = match &p.calibration {
        Some(c) => (
            format!(
                "Cp {} (assigned by the calibration)",
                fixed(p.coefficient, 4)
            ),
            // the report embeds the calibration file under its own name
            format!(
                "calibration file {} (attached)",
                std::path::Path::new(&c.file)
                    .file_name()
                    .map(|n| n.to_string_lossy().into_owned())
                    .unwrap_or_else(|| c.file.clone())
            ),
        ),
        None => (
            format!("Cp {}", fixed(p.coefficient, 3)),
            "survey [probe]".to_string(),
        ),
    };
    InstrumentRow {
        name: match p.kind {
            ProbeKind::SType => "Type S pitot tube".into(),
            ProbeKind::Standard => "Standard pitot tube".into(),
        },
        identifier: p.serial.clone().unwrap_or_else(|| "—".into()),
        detail,
        calibrated: p
            .calibrated
            .map(|d| d.to_string())
            .unwrap_or_else(|| "not recorded".into()),
        due: due.map(due_text).unwrap_or_else(|| "—".into()),
        reference,
    }
}

/// A budget input in the job's units: `±0.10 inHg`, `0.001 inH2O`, or its words.
fn value_text(job: &Job, v: &AssumedValue) -> String {
    match v {
        AssumedValue::Words(w) => w.clone(),
        AssumedValue::Quantity {
            kind,
            si,
            plus_minus,
        } => {
            let shown = job.table.get(*kind);
            // a bound or a step: three significant figures say enough
            let text = shown.format_sig(*si, 3);
            if *plus_minus {
                format!("±{text}")
            } else {
                text
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::testkit::{evaluated, evaluated_text};

    fn row<'a>(rows: &'a [InstrumentRow], name: &str) -> &'a InstrumentRow {
        rows.iter()
            .find(|r| r.name == name)
            .unwrap_or_else(|| panic!("no `{name}`"))
    }

    #[test]
    fn budget_inputs_are_in_the_jobs_units() {
        let (e, a) = evaluated("hvac");
        let rows = section(&Job::new(&e, &a));
        // readings recorded to 0.001 inH2O: the resolution is one step of the last decimal
        assert_eq!(row(&rows, "VP resolution").detail, "0.001 inH2O");
        assert_eq!(row(&rows, "VP zero").detail, "±0.0005 inH2O");
        // defaults: barometer ±0.1 inHg, static ±0.1 inH2O, thermometer ±1 K = ±1.8 °F, tape ±1/8 in
        assert_eq!(row(&rows, "barometric pressure").detail, "±0.1 inHg");
        assert_eq!(row(&rows, "static pressure").detail, "±0.1 inH2O");
        assert_eq!(row(&rows, "air temperature").detail, "±1.8 °F");
        assert_eq!(row(&rows, "duct dimensions").detail, "±0.125 in");
        assert!(rows.iter().all(|r| !r.reference.contains(".md")));
    }

    #[test]
    fn a_calibrated_probe_names_its_attached_certificate() {
        let (e, a) = evaluated("stack");
        let rows = section(&Job::new(&e, &a));
        // sample-data/stack takes Cp from ../calibration/ts-0417.toml, assigned 0.8396
        assert_eq!(rows[0].detail, "Cp 0.8396 (assigned by the calibration)");
        assert_eq!(
            rows[0].reference,
            "calibration file ts-0417.toml (attached)"
        );
        assert_eq!(rows[0].due, "2027-05-11 (12 months)");
    }

    #[test]
    fn the_due_date_is_the_checks_own() {
        // a survey that relaxes the probe's interval to 18 months: the instrument table and the
        // check both say 2027-08-20 (calibrated 2026-02-20 + 18 calendar months)
        let (e, a) = evaluated_text(
            "hvac",
            "\n[checks.probe-calibration]\ninterval_months = 18\nreason = \"manufacturer's interval\"\n",
        );
        let rows = section(&Job::new(&e, &a));
        assert_eq!(rows[0].due, "2027-08-20 (18 months)");
        let f = a
            .checks
            .iter()
            .find(|f| f.id == "probe-calibration")
            .unwrap();
        assert!(
            f.message.to_string().contains("valid until 2027-08-20"),
            "{}",
            f.message
        );
    }
}
