//! `annulus calibrate`: a Type S pitot calibration against a standard pitot (EPA Method 2 §10.1),
//! printed as a table, JSON or CSV, and optionally rendered as a calibration certificate PDF.
//!
//! Exit codes: 0 accepted; 3 the calibration fails an acceptance criterion (the results are still
//! printed and the certificate, if asked for, still written, saying so); 1 bad input; 2 the PDF
//! could not be rendered or written.

use super::output::{csv_text, json_text, status, Ctx, Format, Table};
use crate::calibration::{CalibrationCheck, Leg, LegResult};
use crate::diag::Error;
use crate::input::calibration_file::{load, LoadedCalibration};
use crate::input::SourceFile;
use crate::report::documents::{Document, CALIBRATION_TEMPLATE};
use crate::report::format::fixed;
use crate::report::{write_atomic, Attachment, Engine};
use crate::units::to_unit;
use clap::Args;
use serde_json::{json, Value};
use sha2::{Digest, Sha256};
use std::path::PathBuf;

/// Decimals of coefficients and deviations in tables and the certificate: the limits are given
/// to 0.01, so four places show a margin of a hundredth of the limit.
const CP_DECIMALS: usize = 4;

#[derive(Debug, Args)]
pub struct CalibrateArgs {
    /// The calibration file (TOML); its readings CSV is read relative to it.
    pub file: PathBuf,
    /// Output format: a table, the calibration as JSON, or per-reading CSV.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Also write the calibration certificate PDF, with the calibration file and readings
    /// embedded.
    #[arg(short = 'o', long = "output", value_name = "OUT.pdf")]
    pub output: Option<PathBuf>,
}

pub fn run(args: CalibrateArgs, ctx: &Ctx) -> Result<i32, Error> {
    let c = load(&args.file)?;
    let text = match args.format {
        Format::Json => json_text(&json_doc(&c)),
        Format::Csv => readings_csv(&c),
        Format::Table => table(&c, ctx),
    };
    super::emit(&text)?;
    if let Some(out) = &args.output {
        write_certificate(&c, out)?;
        if !ctx.quiet {
            eprintln!("wrote calibration certificate {}", out.display());
        }
    }
    Ok(if c.calibration.accepted() { 0 } else { 3 })
}

fn leg_of(c: &LoadedCalibration, leg: Leg) -> &LegResult {
    match leg {
        Leg::A => &c.calibration.leg_a,
        Leg::B => &c.calibration.leg_b,
    }
}

/// (coefficient, |Cp − leg mean|) of each reading, in file order.
fn per_reading(c: &LoadedCalibration) -> Vec<(f64, f64)> {
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

fn check_label(id: &str) -> &'static str {
    match id {
        "leg-a-deviation" => "leg A deviation σ",
        "leg-b-deviation" => "leg B deviation σ",
        "leg-difference" => "|mean A − mean B|",
        _ => "criterion",
    }
}

fn status_word(passed: bool) -> &'static str {
    if passed {
        "pass"
    } else {
        "fail"
    }
}

fn standard_text(c: &LoadedCalibration) -> String {
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

fn velocity_text(c: &LoadedCalibration) -> Option<String> {
    c.meta.velocity.as_ref().map(|(v, raw)| {
        if raw.ends_with("m/s") {
            format!("{raw} ({} fpm)", fixed(to_unit(*v, "fpm"), 0))
        } else {
            format!("{raw} ({} m/s)", fixed(*v, 2))
        }
    })
}

fn failed_checks(c: &LoadedCalibration) -> Vec<CalibrationCheck> {
    c.calibration
        .checks()
        .into_iter()
        .filter(|k| !k.passed)
        .collect()
}

fn verdict_text(c: &LoadedCalibration) -> String {
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

fn table(c: &LoadedCalibration, ctx: &Ctx) -> String {
    let m = &c.meta;
    let cal = &c.calibration;
    let mut out = format!("Type S pitot calibration: probe {}", m.probe);
    if let Some(s) = &m.serial {
        out += &format!(" (serial {s})");
    }
    out += "\n";
    out += &format!("date            {}\n", m.date);
    let who = match &m.organisation {
        Some(o) => format!("{}, {o}", m.calibrated_by),
        None => m.calibrated_by.clone(),
    };
    out += &format!("calibrated by   {who}\n");
    if let Some(l) = &m.location {
        out += &format!("where           {l}\n");
    }
    if let Some(v) = velocity_text(c) {
        out += &format!("velocity        {v}\n");
    }
    if let Some(a) = &m.assembly {
        out += &format!("assembly        {a}\n");
    }
    out += &format!("standard pitot  {}\n\n", standard_text(c));

    let mut t = Table::new(&[
        "leg",
        "#",
        &format!("Δp std [{}]", c.readings.standard_unit),
        &format!("Δp S [{}]", c.readings.s_type_unit),
        "Cp(s)",
        "|Cp(s) − mean|",
        "note",
    ])
    .right(&[1, 2, 3, 4, 5]);
    for (r, (cp, dev)) in c.readings.rows.iter().zip(per_reading(c)) {
        t.row(vec![
            r.leg.label().to_string(),
            r.number.to_string(),
            r.standard_raw.clone(),
            r.s_type_raw.clone(),
            fixed(cp, CP_DECIMALS),
            fixed(dev, CP_DECIMALS),
            r.note.clone().unwrap_or_default(),
        ]);
    }
    out += &t.render();
    out.push('\n');

    let mut t = Table::new(&["leg", "pairs", "mean Cp(s)", "deviation σ"]).right(&[1, 2, 3]);
    for leg in [&cal.leg_a, &cal.leg_b] {
        t.row(vec![
            leg.leg.label().to_string(),
            leg.coefficients.len().to_string(),
            fixed(leg.mean, CP_DECIMALS),
            fixed(leg.deviation, CP_DECIMALS),
        ]);
    }
    out += &t.render();
    out.push('\n');

    let mut t = Table::new(&["criterion", "value", "limit", "status"]).right(&[1, 2]);
    for k in cal.checks() {
        t.row(vec![
            check_label(k.id).to_string(),
            fixed(k.value, CP_DECIMALS),
            fixed(k.limit, CP_DECIMALS),
            status(status_word(k.passed), ctx.color),
        ]);
    }
    out += &t.render();
    out += &format!("\n{}\n", verdict_text(c));
    if !ctx.quiet {
        out += "σ is a leg's mean absolute deviation Σ|Cp(s) − mean|/n, as Method 2 defines it (not the standard deviation).\n";
    }
    out
}

fn json_doc(c: &LoadedCalibration) -> Value {
    let m = &c.meta;
    let cal = &c.calibration;
    let readings: Vec<Value> = c
        .readings
        .rows
        .iter()
        .zip(per_reading(c))
        .map(|(r, (cp, dev))| {
            json!({
                "leg": r.leg.label(),
                "reading": r.number,
                "standard_dp_pa": r.standard_dp_pa,
                "s_type_dp_pa": r.s_type_dp_pa,
                "coefficient": cp,
                "abs_deviation": dev,
                "note": r.note,
                "source_line": r.source_line,
            })
        })
        .collect();
    let legs: Vec<Value> = [&cal.leg_a, &cal.leg_b]
        .iter()
        .map(|l| {
            json!({
                "leg": l.leg.label(),
                "pairs": l.coefficients.len(),
                "mean": l.mean,
                "deviation": l.deviation,
            })
        })
        .collect();
    let checks: Vec<Value> = cal
        .checks()
        .iter()
        .map(|k| {
            json!({
                "id": k.id,
                "value": k.value,
                "limit": k.limit,
                "status": status_word(k.passed),
            })
        })
        .collect();
    json!({
        "probe": m.probe,
        "serial": m.serial,
        "date": m.date.to_string(),
        "calibrated_by": m.calibrated_by,
        "organisation": m.organisation,
        "location": m.location,
        "velocity_m_s": m.velocity.as_ref().map(|(v, _)| *v),
        "assembly": m.assembly,
        "standard": {
            "id": m.standard_id,
            "coefficient": cal.standard_coefficient,
            "assumed": cal.standard_coefficient_assumed,
        },
        "readings": readings,
        "legs": legs,
        "leg_difference": cal.leg_difference,
        "checks": checks,
        "accepted": cal.accepted(),
        "assigned_coefficient": cal.assigned_coefficient(),
        "source": cal.limits.source,
        "files": [c.file.name, c.readings_file.name],
    })
}

fn readings_csv(c: &LoadedCalibration) -> String {
    let rows: Vec<Vec<String>> = c
        .readings
        .rows
        .iter()
        .zip(per_reading(c))
        .map(|(r, (cp, dev))| {
            let leg = leg_of(c, r.leg);
            vec![
                r.leg.label().to_string(),
                r.number.to_string(),
                format!("{:.4}", r.standard_dp_pa),
                format!("{:.4}", r.s_type_dp_pa),
                format!("{cp:.6}"),
                format!("{dev:.6}"),
                format!("{:.6}", leg.mean),
                format!("{:.6}", leg.deviation),
            ]
        })
        .collect();
    csv_text(
        &[
            "leg",
            "reading",
            "standard_dp[Pa]",
            "s_type_dp[Pa]",
            "cp",
            "abs_deviation",
            "leg_mean",
            "leg_deviation",
        ],
        &rows,
    )
}

fn sha256_hex(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

fn attachment(f: &SourceFile, mime: &str, description: &str) -> Result<Attachment, Error> {
    Attachment::new(f.name.clone(), f.bytes.clone(), mime, description)
        .map_err(|e| Error::Environment(format!("cannot embed `{}`: {e}", f.name)))
}

/// A certificate number from the probe id and the date: the same calibration always gets the
/// same number.
fn certificate_id(c: &LoadedCalibration) -> String {
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

/// The presentation data the certificate template lays out (every number already a string).
fn certificate_data(c: &LoadedCalibration) -> Value {
    let m = &c.meta;
    let cal = &c.calibration;
    let mut session = vec![json!(["Probe", m.probe])];
    if let Some(s) = &m.serial {
        session.push(json!(["Serial", s]));
    }
    session.push(json!(["Calibration date", m.date.to_string()]));
    let who = match &m.organisation {
        Some(o) => format!("{}, {o}", m.calibrated_by),
        None => m.calibrated_by.clone(),
    };
    session.push(json!(["Calibrated by", who]));
    if let Some(l) = &m.location {
        session.push(json!(["Tunnel or duct", l]));
    }
    if let Some(v) = velocity_text(c) {
        session.push(json!(["Nominal velocity", v]));
    }
    if let Some(a) = &m.assembly {
        session.push(json!(["Assembly", a]));
    }
    session.push(json!(["Standard pitot", standard_text(c)]));
    let readings: Vec<Value> = c
        .readings
        .rows
        .iter()
        .zip(per_reading(c))
        .map(|(r, (cp, dev))| {
            json!({
                "leg": r.leg.label(),
                "number": r.number.to_string(),
                "standard": r.standard_raw,
                "s_type": r.s_type_raw,
                "cp": fixed(cp, CP_DECIMALS),
                "deviation": fixed(dev, CP_DECIMALS),
                "note": r.note.clone().unwrap_or_default(),
            })
        })
        .collect();
    let legs: Vec<Value> = [&cal.leg_a, &cal.leg_b]
        .iter()
        .map(|l| {
            json!({
                "leg": l.leg.label(),
                "pairs": l.coefficients.len().to_string(),
                "mean": fixed(l.mean, CP_DECIMALS),
                "deviation": fixed(l.deviation, CP_DECIMALS),
            })
        })
        .collect();
    let checks: Vec<Value> = cal
        .checks()
        .iter()
        .map(|k| {
            json!({
                "id": k.id,
                "label": check_label(k.id),
                "value": fixed(k.value, CP_DECIMALS),
                "limit": fixed(k.limit, CP_DECIMALS),
                "status": status_word(k.passed),
            })
        })
        .collect();
    let files: Vec<Value> = [&c.file, &c.readings_file]
        .iter()
        .map(|f| json!({ "name": f.name, "sha256": sha256_hex(&f.bytes) }))
        .collect();
    json!({
        "certificate_id": certificate_id(c),
        "probe": m.probe,
        "date": m.date.to_string(),
        "session": session,
        "units": {
            "standard": c.readings.standard_unit,
            "s_type": c.readings.s_type_unit,
        },
        "readings": readings,
        "legs": legs,
        "checks": checks,
        "verdict": status_word(cal.accepted()),
        "verdict_text": verdict_text(c),
        "verdict_short": if cal.accepted() {
            format!(
                "Accepted: assign Cp(s) = {}, the mean of the leg A and leg B means.",
                fixed(cal.assigned_coefficient(), CP_DECIMALS)
            )
        } else {
            let why: Vec<&str> = failed_checks(c).iter().map(|k| check_label(k.id)).collect();
            format!(
                "Rejected on {}: no coefficient is assigned; repair or re-check the probe and calibrate again.",
                why.join(" and ")
            )
        },
        "assigned": if cal.accepted() { fixed(cal.assigned_coefficient(), CP_DECIMALS) } else { "none".to_string() },
        "source": cal.limits.source,
        "method": format!(
            "Each pair was read at the same point with the standard pitot and the Type S pitot. \
             Cp(s) = Cp(std)·√(Δp std / Δp S) per reading; per leg the mean and the deviation \
             σ = Σ|Cp(s) − mean|/n (mean absolute deviation, not the standard deviation). \
             Accepted when σ ≤ {} for each leg and |mean A − mean B| ≤ {} ({}).",
            fixed(cal.limits.max_leg_deviation, 2),
            fixed(cal.limits.max_leg_difference, 2),
            cal.limits.source
        ),
        "notes": m.notes,
        "statement": "This certificate records the calibration of the probe named above, in the \
             configuration and at the velocity stated, from the readings embedded in this file. It \
             applies only while the probe keeps that configuration and is undamaged: inspect the \
             tube openings and alignment before each use and recalibrate after any repair or \
             damage. Tunnel work exposes staff to moving air and fans: keep guards in place and \
             hands clear of the test section. The certificate supports, and does not replace, the \
             judgement of a competent, qualified professional responsible for the measurements \
             this probe is used for.",
        "files": files,
        "software": format!("annulus {}", env!("CARGO_PKG_VERSION")),
    })
}

fn write_certificate(c: &LoadedCalibration, out: &std::path::Path) -> Result<(), Error> {
    let attachments = vec![
        attachment(
            &c.file,
            "application/toml",
            "Calibration file (TOML) as read",
        )?,
        attachment(
            &c.readings_file,
            "text/csv",
            "Paired readings, standard pitot and Type S pitot (CSV) as read",
        )?,
    ];
    let m = &c.meta;
    let doc = Document {
        template: CALIBRATION_TEMPLATE.to_string(),
        template_name: "calibration.typ".into(),
        data: certificate_data(c),
        title: format!("Type S pitot calibration certificate, probe {}", m.probe),
        author: vec![
            m.calibrated_by.clone(),
            m.organisation.clone().unwrap_or_default(),
        ],
        keywords: vec![
            "pitot calibration".into(),
            "EPA Method 2".into(),
            certificate_id(c),
        ],
        description: format!(
            "Type S pitot calibration {} for probe {} on {}: {}",
            certificate_id(c),
            m.probe,
            m.date,
            if c.calibration.accepted() {
                "accepted"
            } else {
                "rejected"
            }
        ),
        ident: format!(
            "annulus-calibration/{}/{}",
            certificate_id(c),
            sha256_hex(&[c.file.bytes.as_slice(), c.readings_file.bytes.as_slice()].concat())
        ),
        date: m.date,
        attachments,
    };
    let rendered = Engine::new()
        .render_document(&doc)
        .map_err(|e| Error::Environment(e.to_string()))?;
    write_atomic(out, &rendered.pdf).map_err(|e| Error::Environment(e.to_string()))
}
