//! The Type S pitot calibration certificate (EPA Method 2 §10.1): its typed model, built from a
//! loaded calibration, and the words `annulus calibrate` prints in its table too.
//!
//! Formatting only: the coefficients, leg statistics and acceptance come from
//! [`crate::calibration`]. Readings are printed as they were read, in the file's own units.

use serde::Serialize;

use super::documents::{DocumentMeta, Presentation};
use super::Attachment;
use crate::calibration::{CalibrationCheck, Leg, LegResult};
use crate::digest::sha256_hex;
use crate::display::fixed;
use crate::input::calibration_file::LoadedCalibration;
use crate::input::SourceFile;

/// Decimals of coefficients and deviations in tables and the certificate: the limits are given
/// to 0.01, so four places show a margin of a hundredth of the limit.
pub const CP_DECIMALS: usize = 4;

/// Everything the certificate shows (`templates/calibration.typ`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Certificate {
    pub certificate_id: String,
    pub probe: String,
    pub date: String,
    /// The session in label/value pairs (probe, serial, date, who, where, velocity …).
    pub session: Vec<Fact>,
    /// Units of the two Δp columns as the readings file gives them.
    pub standard_unit: String,
    pub s_type_unit: String,
    pub readings: Vec<CertificateReading>,
    pub legs: Vec<LegRow>,
    pub checks: Vec<CriterionRow>,
    /// `pass` or `fail`.
    pub verdict: &'static str,
    /// One sentence in bold under the checks.
    pub verdict_short: String,
    /// The assigned coefficient, or `none`.
    pub assigned: String,
    pub source: String,
    pub method: String,
    pub notes: Vec<String>,
    pub statement: String,
    pub files: Vec<FileHash>,
    pub software: String,
    #[serde(skip)]
    pub meta: DocumentMeta,
}

/// A labelled value.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Fact {
    pub label: String,
    pub value: String,
}

impl Fact {
    pub fn new(label: impl Into<String>, value: impl Into<String>) -> Fact {
        Fact {
            label: label.into(),
            value: value.into(),
        }
    }
}

/// One pair of readings.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CertificateReading {
    pub leg: &'static str,
    pub number: String,
    /// Δp as read, e.g. `0.570`.
    pub standard: String,
    pub s_type: String,
    pub cp: String,
    pub deviation: String,
    pub note: String,
}

/// A leg's mean and deviation.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LegRow {
    pub leg: &'static str,
    pub pairs: String,
    pub mean: String,
    pub deviation: String,
}

/// An acceptance criterion with its value and limit.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CriterionRow {
    pub id: &'static str,
    pub label: &'static str,
    pub value: String,
    pub limit: String,
    pub status: &'static str,
}

/// An embedded file and its SHA-256.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FileHash {
    pub name: String,
    pub sha256: String,
}

impl Presentation for Certificate {
    const TEMPLATE: &'static str = include_str!("../../templates/calibration.typ");
    const TEMPLATE_NAME: &'static str = "calibration.typ";
    fn meta(&self) -> DocumentMeta {
        self.meta.clone()
    }
}

/// A criterion in words.
pub fn check_label(id: &str) -> &'static str {
    match id {
        "leg-a-deviation" => "leg A deviation σ",
        "leg-b-deviation" => "leg B deviation σ",
        "leg-difference" => "|mean A − mean B|",
        _ => "criterion",
    }
}

pub fn status_word(passed: bool) -> &'static str {
    if passed {
        "pass"
    } else {
        "fail"
    }
}

fn leg_of(c: &LoadedCalibration, leg: Leg) -> &LegResult {
    match leg {
        Leg::A => &c.calibration.leg_a,
        Leg::B => &c.calibration.leg_b,
    }
}

/// (coefficient, |Cp − leg mean|) of each reading, in file order.
pub fn per_reading(c: &LoadedCalibration) -> Vec<(f64, f64)> {
    c.readings
        .rows
        .iter()
        .map(|r| {
            let leg = leg_of(c, r.leg);
            let cp = leg
                .coefficients
                .get(r.number.saturating_sub(1))
                .copied()
                .unwrap_or(f64::NAN);
            (cp, (cp - leg.mean).abs())
        })
        .collect()
}

/// The standard pitot and its coefficient, given or assumed.
pub fn standard_text(c: &LoadedCalibration) -> String {
    let cal = &c.calibration;
    let id = c
        .meta
        .standard_id
        .as_deref()
        .map(|s| format!("{s}, "))
        .unwrap_or_default();
    if cal.standard_coefficient_assumed {
        format!(
            "{id}Cp(std) {} assumed (none given; EPA Method 2 §10.1)",
            fixed(cal.standard_coefficient, 2)
        )
    } else {
        format!(
            "{id}Cp(std) {} (given)",
            fixed(cal.standard_coefficient, CP_DECIMALS)
        )
    }
}

/// The tunnel velocity as the calibration file states it (its own units).
pub fn velocity_text(c: &LoadedCalibration) -> Option<String> {
    c.meta.velocity.as_ref().map(|(_, raw)| raw.clone())
}

fn failed_checks(c: &LoadedCalibration) -> Vec<CalibrationCheck> {
    c.calibration
        .checks()
        .into_iter()
        .filter(|k| !k.passed)
        .collect()
}

/// The outcome in one line, as the table prints it.
pub fn verdict_text(c: &LoadedCalibration) -> String {
    let cal = &c.calibration;
    if cal.accepted() {
        format!(
            "accepted: Cp(s) = {} (mean of the leg A and leg B means), per {}",
            fixed(cal.assigned_coefficient(), CP_DECIMALS),
            cal.limits.source
        )
    } else {
        let why: Vec<String> = failed_checks(c)
            .iter()
            .map(|k| {
                format!(
                    "{} {} exceeds {}",
                    check_label(k.id),
                    fixed(k.value, CP_DECIMALS),
                    fixed(k.limit, CP_DECIMALS)
                )
            })
            .collect();
        format!(
            "REJECTED: {} ({}); repair or re-check the probe and calibrate again",
            why.join("; "),
            cal.limits.source
        )
    }
}

/// Who calibrated, with the organisation.
pub fn calibrated_by(c: &LoadedCalibration) -> String {
    match &c.meta.organisation {
        Some(o) => format!("{}, {o}", c.meta.calibrated_by),
        None => c.meta.calibrated_by.clone(),
    }
}

/// A certificate number from the probe id and the date: the same calibration always gets the
/// same number.
pub fn certificate_id(c: &LoadedCalibration) -> String {
    let probe: String = c
        .meta
        .probe
        .chars()
        .map(|ch| {
            if ch.is_ascii_alphanumeric() {
                ch.to_ascii_uppercase()
            } else {
                '-'
            }
        })
        .collect();
    format!("CAL-{probe}-{}", c.meta.date.format("%Y%m%d"))
}

/// The calibration file and its readings, to embed byte for byte.
pub fn attachments(c: &LoadedCalibration) -> Result<Vec<Attachment>, super::AttachmentError> {
    let make = |f: &SourceFile, mime: &str, description: &str| {
        Attachment::new(f.name.clone(), f.bytes.clone(), mime, description)
    };
    Ok(vec![
        make(
            &c.file,
            "application/toml",
            "Calibration file (TOML) as read",
        )?,
        make(
            &c.readings_file,
            "text/csv",
            "Paired readings, standard pitot and Type S pitot (CSV) as read",
        )?,
    ])
}

/// Builds the certificate.
pub fn certificate(c: &LoadedCalibration) -> Certificate {
    let m = &c.meta;
    let cal = &c.calibration;
    Certificate {
        certificate_id: certificate_id(c),
        probe: m.probe.clone(),
        date: m.date.to_string(),
        session: session(c),
        standard_unit: c.readings.standard_unit.clone(),
        s_type_unit: c.readings.s_type_unit.clone(),
        readings: readings(c),
        legs: [&cal.leg_a, &cal.leg_b]
            .iter()
            .map(|l| LegRow {
                leg: l.leg.label(),
                pairs: l.coefficients.len().to_string(),
                mean: fixed(l.mean, CP_DECIMALS),
                deviation: fixed(l.deviation, CP_DECIMALS),
            })
            .collect(),
        checks: cal
            .checks()
            .iter()
            .map(|k| CriterionRow {
                id: k.id,
                label: check_label(k.id),
                value: fixed(k.value, CP_DECIMALS),
                limit: fixed(k.limit, CP_DECIMALS),
                status: status_word(k.passed),
            })
            .collect(),
        verdict: status_word(cal.accepted()),
        verdict_short: verdict_short(c),
        assigned: if cal.accepted() {
            fixed(cal.assigned_coefficient(), CP_DECIMALS)
        } else {
            "none".to_string()
        },
        source: cal.limits.source.to_string(),
        method: method(c),
        notes: m.notes.clone(),
        statement: STATEMENT.into(),
        files: [&c.file, &c.readings_file]
            .iter()
            .map(|f| FileHash {
                name: f.name.clone(),
                sha256: sha256_hex(&f.bytes),
            })
            .collect(),
        software: super::build::software(),
        meta: meta(c),
    }
}

fn session(c: &LoadedCalibration) -> Vec<Fact> {
    let m = &c.meta;
    let mut out = vec![Fact::new("Probe", &m.probe)];
    if let Some(s) = &m.serial {
        out.push(Fact::new("Serial", s));
    }
    out.push(Fact::new("Calibration date", m.date.to_string()));
    out.push(Fact::new("Calibrated by", calibrated_by(c)));
    if let Some(l) = &m.location {
        out.push(Fact::new("Tunnel or duct", l));
    }
    if let Some(v) = velocity_text(c) {
        out.push(Fact::new("Nominal velocity", v));
    }
    if let Some(a) = &m.assembly {
        out.push(Fact::new("Assembly", a));
    }
    out.push(Fact::new("Standard pitot", standard_text(c)));
    out
}

fn readings(c: &LoadedCalibration) -> Vec<CertificateReading> {
    c.readings
        .rows
        .iter()
        .zip(per_reading(c))
        .map(|(r, (cp, dev))| CertificateReading {
            leg: r.leg.label(),
            number: r.number.to_string(),
            standard: r.standard_raw.clone(),
            s_type: r.s_type_raw.clone(),
            cp: fixed(cp, CP_DECIMALS),
            deviation: fixed(dev, CP_DECIMALS),
            note: r.note.clone().unwrap_or_default(),
        })
        .collect()
}

fn verdict_short(c: &LoadedCalibration) -> String {
    let cal = &c.calibration;
    if cal.accepted() {
        format!(
            "Accepted: assign Cp(s) = {}, the mean of the leg A and leg B means.",
            fixed(cal.assigned_coefficient(), CP_DECIMALS)
        )
    } else {
        let why: Vec<&str> = failed_checks(c).iter().map(|k| check_label(k.id)).collect();
        format!(
            "Rejected on {}: no coefficient is assigned; repair or re-check the probe and \
             calibrate again.",
            why.join(" and ")
        )
    }
}

fn method(c: &LoadedCalibration) -> String {
    let cal = &c.calibration;
    format!(
        "Each pair was read at the same point with the standard pitot and the Type S pitot. \
         Cp(s) = Cp(std)·√(Δp std / Δp S) per reading; per leg the mean and the deviation \
         σ = Σ|Cp(s) − mean|/n (mean absolute deviation, not the standard deviation). \
         Accepted when σ ≤ {} for each leg and |mean A − mean B| ≤ {} ({}).",
        fixed(cal.limits.max_leg_deviation, 2),
        fixed(cal.limits.max_leg_difference, 2),
        cal.limits.source
    )
}

const STATEMENT: &str = "This certificate records the calibration of the probe named above, in \
    the configuration and at the velocity stated, from the readings embedded in this file. It \
    applies only while the probe keeps that configuration and is undamaged: inspect the tube \
    openings and alignment before each use and recalibrate after any repair or damage. Tunnel \
    work exposes staff to moving air and fans: keep guards in place and hands clear of the test \
    section. The certificate supports, and does not replace, local codes, the permit and the \
    judgment of a competent, qualified professional responsible for the measurements this probe \
    is used for.";

fn meta(c: &LoadedCalibration) -> DocumentMeta {
    let m = &c.meta;
    let id = certificate_id(c);
    DocumentMeta {
        title: format!("Type S pitot calibration certificate, probe {}", m.probe),
        author: vec![
            m.calibrated_by.clone(),
            m.organisation.clone().unwrap_or_default(),
        ],
        keywords: vec![
            "pitot calibration".into(),
            "EPA Method 2".into(),
            id.clone(),
        ],
        description: format!(
            "Type S pitot calibration {id} for probe {} on {}: {}",
            m.probe,
            m.date,
            if c.calibration.accepted() {
                "accepted"
            } else {
                "rejected"
            }
        ),
        ident: format!(
            "annulus-calibration/{id}/{}",
            sha256_hex(&[c.file.bytes.as_slice(), c.readings_file.bytes.as_slice()].concat())
        ),
        date: m.date,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sample() -> LoadedCalibration {
        crate::input::calibration_file::load(
            &std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
                .join("sample-data/calibration/ts-0417.toml"),
        )
        .expect("sample calibration loads")
    }

    #[test]
    fn the_certificate_of_the_sample_probe() {
        let c = certificate(&sample());
        assert_eq!(c.certificate_id, "CAL-TS-0417-20260511");
        assert_eq!(c.verdict, "pass");
        // assigned: (0.840256 + 0.838947)/2 to four places (tests/calibrate_rata.rs)
        assert_eq!(c.assigned, "0.8396");
        assert_eq!(c.standard_unit, "inH2O");
        assert_eq!(c.readings[0].standard, "0.570", "as read");
        let velocity = c.session.iter().find(|f| f.label == "Nominal velocity");
        assert_eq!(velocity.map(|f| f.value.as_str()), Some("3000 fpm"));
        assert_eq!(c.files.len(), 2);
        assert_eq!(c.meta.date.to_string(), "2026-05-11");
        let json = serde_json::to_value(&c).unwrap();
        assert!(
            json.get("meta").is_none(),
            "metadata goes to the PDF, not the template"
        );
        assert_eq!(json["session"][0]["label"], "Probe");
    }
}
