//! `[probe]`: the pitot tube, its coefficient (given, or from a calibration file), its length and
//! the gauge fluid.

use super::CalibrationResolver;
use crate::diag::Error;
use crate::input::toml_doc::{Field, Table};
use crate::survey::{Probe, ProbeCalibration, ProbeKind};

/// A coefficient and the one a calibration assigns agree when within this (the calibration
/// prints four decimals).
const COEFFICIENT_AGREEMENT: f64 = 0.0005;

/// Reads `[probe]`; a `calibration` file is read through `resolver`.
pub fn read_probe(t: &Table, resolver: Option<CalibrationResolver>) -> Option<Probe> {
    let kind = t.choice("kind", &ProbeKind::choices());
    let given = t.get("coefficient").and_then(|f| {
        let c = f.number()?;
        if c > 0.5 && c <= 1.05 {
            Some((c, f))
        } else {
            f.error(
                format!("a pitot coefficient of {c} is not plausible"),
                Some("S-type pitots calibrate near 0.84, standard pitots 0.99".into()),
            );
            None
        }
    });
    let coefficient_written = t.get("coefficient").is_some();
    let serial = t.opt_text("serial");
    let mut calibrated = t.opt_date("calibrated", "2026-10-14");
    let gauge_fluid_sg = t.get("gauge_fluid_sg").and_then(|f| {
        let sg = f.number()?;
        if sg > 0.0 && sg < 20.0 {
            Some(sg)
        } else {
            f.error(format!("specific gravity {sg} is not plausible"), None);
            None
        }
    });
    let gauge_gas_column = t
        .get("gauge_gas_column")
        .and_then(|f| f.bool())
        .unwrap_or(false);
    let length_m = t.opt_quantity_in(
        "length",
        crate::units::Dimension::Length,
        crate::plausibility::PROBE_LENGTH,
    );
    let mut calibration = None;
    let coefficient = match (t.get("calibration"), given) {
        (None, Some((c, _))) => Some(c),
        (None, None) => {
            if !coefficient_written {
                t.error_at(
                    "kind",
                    "[probe] needs a `coefficient` or a `calibration` file".into(),
                    Some("add coefficient = 0.84, or calibration = \"ts-0417.toml\" (annulus calibrate format)".into()),
                );
            }
            None
        }
        (Some(path), given) => {
            let found = from_calibration(&path, given.as_ref(), resolver)?;
            if calibrated.is_none() {
                calibrated = Some(found.date);
            }
            let assigned = found.assigned_coefficient;
            calibration = Some(found);
            Some(given.map(|(c, _)| c).unwrap_or(assigned))
        }
    };
    Some(Probe {
        kind: kind?,
        coefficient: coefficient?,
        serial,
        calibrated,
        gauge_fluid_sg,
        calibration,
        gauge_gas_column,
        length_m,
    })
}

/// Reads the calibration file `path` names and checks a given coefficient against it.
fn from_calibration(
    path: &Field,
    given: Option<&(f64, Field)>,
    resolver: Option<CalibrationResolver>,
) -> Option<ProbeCalibration> {
    let file = path.str()?.to_string();
    let Some(resolve) = resolver else {
        path.error(
            "a calibration file is read only when the survey is loaded with its files".into(),
            None,
        );
        return None;
    };
    let at = path.doc.location(path.span.clone(), &path.path());
    let rec = match resolve(&file, &at) {
        Ok(rec) => rec,
        Err(Error::Input(d)) => {
            path.doc.extend(d);
            return None;
        }
        Err(other) => {
            path.error(other.to_string(), None);
            return None;
        }
    };
    let assigned = rec.assigned_coefficient;
    if let Some((c, f)) = given {
        if (c - assigned).abs() > COEFFICIENT_AGREEMENT {
            f.error(
                format!(
                    "coefficient {c} differs from {assigned:.4} assigned by the calibration file `{file}`"
                ),
                Some("remove `coefficient` to use the calibration's, or fix one of them".into()),
            );
        }
    }
    Some(ProbeCalibration {
        file,
        probe: rec.probe.clone(),
        date: rec.date,
        assigned_coefficient: assigned,
        accepted: rec.accepted,
    })
}
