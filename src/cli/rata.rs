//! `annulus rata`: a flow-monitor relative accuracy test audit from paired runs, printed as a
//! table, JSON or CSV, and optionally rendered as a RATA summary PDF.
//!
//! Exit codes: 0 the RATA passes (a failed bias test alone does not fail it: it sets the bias
//! adjustment factor); 3 the RATA fails (results still printed, the PDF still written); 1 bad
//! input; 2 the PDF could not be rendered or written.

use super::output::{csv_text, json_text, status, Ctx, Format, Table};
use crate::diag::Error;
use crate::display::fixed;
use crate::input::rata_file::load;
use crate::pipeline::rata::{evaluate_levels, RataEvaluation, ReferenceSource};
use crate::rata::{LowVelocity, RataGrade, RataLimits, RataQuantity};
use crate::report::rata::{
    attachments, bias_text, frequency, grade_word, low_velocity_text, monitor_text, quantity_text,
    source_text, summary, verdict_text, RataUnits, RA_DECIMALS,
};
use crate::report::Engine;
use crate::units::convert_out;
use crate::write::Destination;
use clap::Args;
use serde::Serialize;
use std::collections::BTreeMap;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct RataArgs {
    /// The RATA file (TOML); survey references in it are read relative to it.
    pub file: PathBuf,
    /// Output format: a table, the RATA as JSON, or per-run CSV.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Also write the RATA summary PDF, with the RATA file (and any referenced surveys and
    /// readings) embedded.
    /// A folder gets the PDF named after the input file; `-` is standard output (the table is
    /// then not printed).
    #[arg(short = 'o', long = "output", value_name = "OUT.pdf")]
    pub output: Option<PathBuf>,
}

pub fn run(args: RataArgs, ctx: &Ctx) -> Result<i32, Error> {
    let levels = evaluate_levels(load(&args.file)?)?;
    let text = match (args.format, levels.as_slice()) {
        (Format::Json, [one]) => json_text(&json_doc(one)),
        (Format::Json, _) => json_text(&LevelsJson {
            levels: levels.iter().map(json_doc).collect(),
        }),
        (Format::Csv, [one]) => runs_csv(one),
        (Format::Csv, _) => levels
            .iter()
            .map(|r| {
                format!(
                    "# level: {}\n{}",
                    r.spec.meta.level.as_deref().unwrap_or(""),
                    runs_csv(r)
                )
            })
            .collect(),
        (Format::Table, _) => levels
            .iter()
            .map(|r| table(r, ctx))
            .collect::<Vec<_>>()
            .join("\n"),
    };
    // never written over: the files this command read
    let protect: Vec<PathBuf> = levels
        .iter()
        .flat_map(|r| {
            std::iter::once(r.file.path.clone())
                .chain(r.survey_files.iter().map(|(_, f)| f.path.clone()))
        })
        .collect();
    // results first, then the PDF (the write checks the output rules)
    let out = args
        .output
        .as_deref()
        .map(|o| super::files::named(o, &args.file));
    if levels.len() > 1 && out.as_ref().is_some_and(|d| d.is_stdout()) {
        return Err(Error::input(
            crate::diag::Diagnostic::new(format!(
                "this RATA has {} load levels, so one summary per level, and `-o -` carries only one",
                levels.len()
            ))
            .hint("give a file name (each level's summary gets the level's name added) or a folder"),
        ));
    }
    // the PDF on standard output is the whole output
    if !out.as_ref().is_some_and(|d| d.is_stdout()) {
        super::emit(&text)?;
    }
    if let Some(out) = &out {
        for r in &levels {
            let dest = match out {
                Destination::File(path) => Destination::File(level_path(path, &levels, r)),
                Destination::Stdout => Destination::Stdout,
            };
            write_summary(r, &dest, &protect)?;
            if !ctx.quiet {
                eprintln!("wrote RATA summary {dest}");
            }
        }
    }
    Ok(
        if levels.iter().any(|r| r.result.grade() == RataGrade::Fail) {
            3
        } else {
            0
        },
    )
}

/// A RATA at several operating levels, as JSON: one RATA document per level.
#[derive(Serialize)]
struct LevelsJson<'a> {
    levels: Vec<RataJson<'a>>,
}

/// Where a level's summary goes: `out` for a RATA at one level, `out` with the level's name
/// before the extension for several (`unit2-rata-low.pdf`).
fn level_path(out: &std::path::Path, levels: &[RataEvaluation], r: &RataEvaluation) -> PathBuf {
    if levels.len() <= 1 {
        return out.to_path_buf();
    }
    let slug: String = r
        .spec
        .meta
        .level
        .as_deref()
        .unwrap_or("level")
        .chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() {
                c.to_ascii_lowercase()
            } else {
                '-'
            }
        })
        .collect();
    let stem = out
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "rata".into());
    let ext = out
        .extension()
        .map(|e| e.to_string_lossy().into_owned())
        .unwrap_or_else(|| "pdf".into());
    out.with_file_name(format!("{stem}-{}.{ext}", slug.trim_matches('-')))
}

fn table(r: &RataEvaluation, ctx: &Ctx) -> String {
    let m = &r.spec.meta;
    let res = &r.result;
    let u = RataUnits::of(r);
    let mut out = format!("{}\n", m.title);
    let mut fact = |label: &str, value: &str| {
        out += &format!("{label:<13}{value}\n");
    };
    if let Some(f) = &m.facility {
        fact("facility", f);
    }
    if let Some(x) = &m.unit {
        fact("unit", x);
    }
    if let Some(x) = &m.location {
        fact("location", x);
    }
    let mut monitor = monitor_text(r);
    if let Some(d) = &m.monitor_description {
        monitor += &format!(", {d}");
    }
    fact("monitor", &monitor);
    fact("date", &m.date.to_string());
    if let Some(l) = &m.level {
        fact("level", l);
    }
    fact("quantity", &quantity_text(r));
    out.push('\n');

    let sym = u.unit.symbol;
    let mut t = Table::new(&[
        "run",
        &format!("RM [{sym}]"),
        &format!("CEM [{sym}]"),
        &format!("d = RM − CEM [{sym}]"),
        "reference from",
        "status",
    ])
    .right(&[1, 2, 3]);
    for (run, src) in res.runs.iter().zip(&r.sources) {
        t.row(vec![
            run.id().to_string(),
            u.num(run.reference()),
            u.num(run.monitor()),
            u.num(run.difference()),
            source_text(src),
            match run.rejection() {
                None => "used".to_string(),
                Some(why) => format!("{}: {why}", status("rejected", ctx.color)),
            },
        ]);
    }
    out += &t.render();
    out.push('\n');

    let rejected = res.runs.len() - res.used_runs;
    let lim = &res.limits;
    let (lv_text, lv_status) = low_velocity_text(r, &u);
    let rows: Vec<(String, String, String)> = vec![
        (
            "runs".into(),
            format!("{} used, {rejected} rejected", res.used_runs),
            String::new(),
        ),
        (
            "mean RM".into(),
            u.with_unit(res.reference_mean),
            String::new(),
        ),
        (
            "mean CEM".into(),
            u.with_unit(res.monitor_mean),
            String::new(),
        ),
        (
            "mean d".into(),
            u.with_unit(res.mean_difference),
            String::new(),
        ),
        (
            "S_d".into(),
            u.with_unit(res.std_dev_difference),
            String::new(),
        ),
        (
            format!("t0.975 ({} df)", res.used_runs.saturating_sub(1)),
            fixed(res.t_value, 3),
            String::new(),
        ),
        (
            "cc".into(),
            u.with_unit(res.confidence_coefficient),
            String::new(),
        ),
        (
            "RA".into(),
            format!(
                "{} % (limit {} %, {} % for the annual frequency)",
                fixed(res.relative_accuracy_percent, RA_DECIMALS),
                fixed(lim.ra_pass_percent, 1),
                fixed(lim.ra_incentive_percent, 1)
            ),
            status(grade_word(res.ra_grade), ctx.color),
        ),
        (
            "low velocity".into(),
            lv_text,
            if lv_status == "n/a" {
                String::new()
            } else {
                status(lv_status, ctx.color)
            },
        ),
        (
            "bias".into(),
            bias_text(r, &u),
            status(if res.bias.passed { "pass" } else { "fail" }, ctx.color),
        ),
    ];
    let mut t = Table::new(&["statistic", "value", "status"]);
    for (a, b, c) in rows {
        t.row(vec![a, b, c]);
    }
    out += &t.render();
    out += &format!("\n{}\n", verdict_text(r));
    if !ctx.quiet {
        out += &format!("limits: {}\n", lim.source);
    }
    out
}

fn sfx(q: RataQuantity) -> &'static str {
    match q {
        RataQuantity::VelocityMS => "m_s",
        RataQuantity::Flow => "m3_s",
    }
}

/// `rata --format json`: SI values; keys of values carry their unit (`_m_s` for a velocity RATA,
/// `_m3_s` for a flow RATA).
#[derive(Serialize)]
struct RataJson<'a> {
    title: &'a str,
    facility: Option<&'a str>,
    unit: Option<&'a str>,
    location: Option<&'a str>,
    date: String,
    level: Option<&'a str>,
    monitor: MonitorJson<'a>,
    quantity: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    basis: Option<&'static str>,
    display_unit: &'static str,
    runs: Vec<RunJson<'a>>,
    used_runs: usize,
    /// `mean_difference_m_s`, `reference_mean_m_s` … (the suffix names the unit).
    #[serde(flatten)]
    statistics: BTreeMap<String, f64>,
    t_value: f64,
    relative_accuracy_percent: f64,
    ra_grade: &'static str,
    low_velocity: LowVelocityJson,
    bias: BiasJson,
    grade: &'static str,
    passed: bool,
    frequency: &'static str,
    limits: RataLimits,
}

#[derive(Serialize)]
struct MonitorJson<'a> {
    id: &'a str,
    serial: Option<&'a str>,
    description: Option<&'a str>,
}

#[derive(Serialize)]
struct RunJson<'a> {
    id: &'a str,
    #[serde(flatten)]
    values: BTreeMap<String, f64>,
    used: bool,
    rejection: Option<&'a str>,
    period: Option<&'a str>,
    reference_source: SourceJson<'a>,
}

#[derive(Serialize)]
#[serde(untagged)]
enum SourceJson<'a> {
    Entered {
        entered: &'a str,
    },
    Survey {
        survey: &'a str,
        title: &'a str,
        runs: &'a [String],
    },
}

#[derive(Serialize)]
#[serde(untagged)]
enum LowVelocityJson {
    NotApplicable {
        applicable: bool,
        reason: &'static str,
    },
    Evaluated {
        applicable: bool,
        abs_mean_difference_m_s: f64,
        grade: &'static str,
    },
}

#[derive(Serialize)]
struct BiasJson {
    passed: bool,
    adjustment_factor: f64,
    /// `low`, `high` or `none`: which way the monitor reads on average.
    monitor_reads: &'static str,
    /// The bias result in words, in the RATA's display unit.
    words: String,
}

fn json_doc(r: &RataEvaluation) -> RataJson<'_> {
    let m = &r.spec.meta;
    let res = &r.result;
    let s = sfx(r.spec.quantity);
    let keyed = |pairs: &[(&str, f64)]| -> BTreeMap<String, f64> {
        pairs
            .iter()
            .map(|(k, v)| (format!("{k}_{s}"), *v))
            .collect()
    };
    RataJson {
        title: &m.title,
        facility: m.facility.as_deref(),
        unit: m.unit.as_deref(),
        location: m.location.as_deref(),
        date: m.date.to_string(),
        level: m.level.as_deref(),
        monitor: MonitorJson {
            id: &m.monitor_id,
            serial: m.monitor_serial.as_deref(),
            description: m.monitor_description.as_deref(),
        },
        quantity: match r.spec.quantity {
            RataQuantity::VelocityMS => "velocity",
            RataQuantity::Flow => "flow",
        },
        basis: (r.spec.quantity == RataQuantity::Flow).then(|| r.spec.basis.name()),
        display_unit: r.spec.display_unit.symbol,
        runs: res
            .runs
            .iter()
            .zip(&r.sources)
            .zip(&r.spec.runs)
            .map(|((run, src), spec)| RunJson {
                id: run.id(),
                values: keyed(&[
                    ("reference", run.reference()),
                    ("monitor", run.monitor()),
                    ("difference", run.difference()),
                ]),
                used: run.rejection().is_none(),
                rejection: run.rejection(),
                period: spec.period.as_deref(),
                reference_source: match src {
                    ReferenceSource::Entered { raw } => SourceJson::Entered { entered: raw },
                    ReferenceSource::Survey {
                        path, title, runs, ..
                    } => SourceJson::Survey {
                        survey: path,
                        title,
                        runs,
                    },
                },
            })
            .collect(),
        used_runs: res.used_runs,
        statistics: keyed(&[
            ("mean_difference", res.mean_difference),
            ("std_dev_difference", res.std_dev_difference),
            ("confidence_coefficient", res.confidence_coefficient),
            ("reference_mean", res.reference_mean),
            ("monitor_mean", res.monitor_mean),
        ]),
        t_value: res.t_value,
        relative_accuracy_percent: res.relative_accuracy_percent,
        ra_grade: res.ra_grade.label(),
        low_velocity: match res.low_velocity {
            LowVelocity::NotApplicable { reason } => LowVelocityJson::NotApplicable {
                applicable: false,
                reason,
            },
            LowVelocity::Evaluated {
                abs_mean_difference_m_s,
                grade,
            } => LowVelocityJson::Evaluated {
                applicable: true,
                abs_mean_difference_m_s,
                grade: grade.label(),
            },
        },
        bias: BiasJson {
            passed: res.bias.passed,
            adjustment_factor: res.bias.adjustment_factor,
            monitor_reads: match res.bias_direction() {
                crate::rata::BiasDirection::Low => "low",
                crate::rata::BiasDirection::High => "high",
                crate::rata::BiasDirection::None => "none",
            },
            words: {
                let u = RataUnits::of(r);
                res.bias_words(&|v| u.with_unit(v))
            },
        },
        grade: res.grade().label(),
        passed: res.grade() != RataGrade::Fail,
        frequency: frequency(res.grade()),
        limits: res.limits,
    }
}

fn runs_csv(r: &RataEvaluation) -> String {
    let sym = r.spec.display_unit.symbol;
    let u = r.spec.display_unit;
    let rows: Vec<Vec<String>> = r
        .result
        .runs
        .iter()
        .zip(&r.sources)
        .map(|(run, src)| {
            vec![
                run.id().to_string(),
                format!("{}", convert_out(run.reference(), u)),
                format!("{}", convert_out(run.monitor(), u)),
                format!("{}", convert_out(run.difference(), u)),
                run.rejection().is_none().to_string(),
                run.rejection().unwrap_or("").to_string(),
                source_text(src),
            ]
        })
        .collect();
    let h = [
        "run".to_string(),
        format!("reference[{sym}]"),
        format!("monitor[{sym}]"),
        format!("difference[{sym}]"),
        "used".into(),
        "rejection".into(),
        "reference_from".into(),
    ];
    let h: Vec<&str> = h.iter().map(String::as_str).collect();
    csv_text(&h, &rows)
}

fn write_summary(
    r: &RataEvaluation,
    out: &crate::write::Destination,
    protect: &[PathBuf],
) -> Result<(), Error> {
    let files = attachments(r)
        .map_err(|e| Error::Environment(format!("cannot embed the RATA files: {e}")))?;
    let model = summary(r, &files);
    // sealed with its inputs, results and manifest, so `annulus verify` checks it like a report
    let (inputs, results) = crate::archive::make::rata_inputs(r);
    let pdf = crate::archive::make::seal_presentation(
        &Engine::new(),
        &model,
        files,
        crate::archive::manifest::DocKind::Rata,
        &inputs,
        results,
    )
    .map_err(|e| Error::Environment(e.to_string()))?;
    Ok(crate::write::write(out, &pdf, protect)?)
}
