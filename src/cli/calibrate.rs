//! `annulus calibrate`: a Type S pitot calibration against a standard pitot (EPA Method 2 §10.1),
//! printed as a table, JSON or CSV, and optionally rendered as a calibration certificate PDF.
//!
//! Exit codes: 0 accepted; 3 the calibration fails an acceptance criterion (the results are still
//! printed and the certificate, if asked for, still written, saying so); 1 bad input; 2 the PDF
//! could not be rendered or written.

use super::output::{csv_text, json_text, status, Ctx, Format, Table};
use crate::diag::Error;
use crate::display::fixed;
use crate::input::calibration_file::{load, LoadedCalibration};
use crate::report::certificate::{
    attachments, calibrated_by, certificate, check_label, per_reading, standard_text, status_word,
    velocity_text, verdict_text, CP_DECIMALS,
};
use crate::report::Engine;
use clap::Args;
use serde::Serialize;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct CalibrateArgs {
    /// The calibration file (TOML); its readings CSV is read relative to it.
    pub file: PathBuf,
    /// Output format: a table, the calibration as JSON, or per-reading CSV.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Also write the calibration certificate PDF, with the calibration file and readings
    /// embedded.
    /// A folder gets the PDF named after the input file; `-` is standard output (the table is
    /// then not printed).
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
    // never written over: the files this command read
    let protect: Vec<PathBuf> = vec![c.file.path.clone(), c.readings_file.path.clone()];
    // results first, then the PDF (the write checks the output rules)
    let out = args
        .output
        .as_deref()
        .map(|o| super::files::named(o, &args.file));
    // the PDF on standard output is the whole output
    if !out.as_ref().is_some_and(|d| d.is_stdout()) {
        super::emit(&text)?;
    }
    if let Some(out) = &out {
        write_certificate(&c, out, &protect)?;
        if !ctx.quiet {
            eprintln!("wrote calibration certificate {out}");
        }
    }
    Ok(if c.calibration.accepted() { 0 } else { 3 })
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
    out += &format!("calibrated by   {}\n", calibrated_by(c));
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

/// `calibrate --format json`: SI values, the contract's habit of units in key names.
#[derive(Serialize)]
struct CalibrationJson<'a> {
    probe: &'a str,
    serial: Option<&'a str>,
    date: String,
    calibrated_by: &'a str,
    organisation: Option<&'a str>,
    location: Option<&'a str>,
    velocity_m_s: Option<f64>,
    assembly: Option<&'a str>,
    standard: StandardJson<'a>,
    readings: Vec<ReadingJson<'a>>,
    legs: Vec<LegJson>,
    leg_difference: f64,
    checks: Vec<CheckJson>,
    accepted: bool,
    assigned_coefficient: f64,
    source: &'a str,
    files: [&'a str; 2],
}

#[derive(Serialize)]
struct StandardJson<'a> {
    id: Option<&'a str>,
    coefficient: f64,
    assumed: bool,
}

#[derive(Serialize)]
struct ReadingJson<'a> {
    leg: &'static str,
    reading: usize,
    standard_dp_pa: f64,
    s_type_dp_pa: f64,
    coefficient: f64,
    abs_deviation: f64,
    note: Option<&'a str>,
    source_line: usize,
}

#[derive(Serialize)]
struct LegJson {
    leg: &'static str,
    pairs: usize,
    mean: f64,
    deviation: f64,
}

#[derive(Serialize)]
struct CheckJson {
    id: &'static str,
    value: f64,
    limit: f64,
    status: &'static str,
}

fn json_doc(c: &LoadedCalibration) -> CalibrationJson<'_> {
    let m = &c.meta;
    let cal = &c.calibration;
    CalibrationJson {
        probe: &m.probe,
        serial: m.serial.as_deref(),
        date: m.date.to_string(),
        calibrated_by: &m.calibrated_by,
        organisation: m.organisation.as_deref(),
        location: m.location.as_deref(),
        velocity_m_s: m.velocity.as_ref().map(|(v, _)| *v),
        assembly: m.assembly.as_deref(),
        standard: StandardJson {
            id: m.standard_id.as_deref(),
            coefficient: cal.standard_coefficient,
            assumed: cal.standard_coefficient_assumed,
        },
        readings: c
            .readings
            .rows
            .iter()
            .zip(per_reading(c))
            .map(|(r, (cp, dev))| ReadingJson {
                leg: r.leg.label(),
                reading: r.number,
                standard_dp_pa: r.standard_dp_pa,
                s_type_dp_pa: r.s_type_dp_pa,
                coefficient: cp,
                abs_deviation: dev,
                note: r.note.as_deref(),
                source_line: r.source_line,
            })
            .collect(),
        legs: [&cal.leg_a, &cal.leg_b]
            .iter()
            .map(|l| LegJson {
                leg: l.leg.label(),
                pairs: l.coefficients.len(),
                mean: l.mean,
                deviation: l.deviation,
            })
            .collect(),
        leg_difference: cal.leg_difference,
        checks: cal
            .checks()
            .iter()
            .map(|k| CheckJson {
                id: k.id,
                value: k.value,
                limit: k.limit,
                status: status_word(k.passed),
            })
            .collect(),
        accepted: cal.accepted(),
        assigned_coefficient: cal.assigned_coefficient(),
        source: cal.limits.source,
        files: [&c.file.name, &c.readings_file.name],
    }
}

fn readings_csv(c: &LoadedCalibration) -> String {
    let rows: Vec<Vec<String>> = c
        .readings
        .rows
        .iter()
        .zip(per_reading(c))
        .map(|(r, (cp, dev))| {
            let leg = match r.leg {
                crate::calibration::Leg::A => &c.calibration.leg_a,
                crate::calibration::Leg::B => &c.calibration.leg_b,
            };
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

fn write_certificate(
    c: &LoadedCalibration,
    out: &crate::write::Destination,
    protect: &[PathBuf],
) -> Result<(), Error> {
    let files = attachments(c)
        .map_err(|e| Error::Environment(format!("cannot embed the calibration files: {e}")))?;
    // sealed with its inputs, results and manifest, so `annulus verify` checks it like a report
    let (inputs, results) = crate::archive::make::calibration_inputs(c);
    let pdf = crate::archive::make::seal_presentation(
        &Engine::new(),
        &certificate(c),
        files,
        crate::archive::manifest::DocKind::Calibration,
        &inputs,
        results,
    )
    .map_err(|e| Error::Environment(e.to_string()))?;
    Ok(crate::write::write(out, &pdf, protect)?)
}
