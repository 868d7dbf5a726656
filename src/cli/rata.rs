//! `annulus rata`: a flow-monitor relative accuracy test audit from paired runs, printed as a
//! table, JSON or CSV, and optionally rendered as a RATA summary PDF.
//!
//! Exit codes: 0 the RATA passes (a failed bias test alone does not fail it: it sets the bias
//! adjustment factor); 3 the RATA fails (results still printed, the PDF still written); 1 bad
//! input; 2 the PDF could not be rendered or written.

use super::output::{csv_text, json_text, status, Ctx, Format, Table};
use crate::diag::Error;
use crate::input::rata_file::{load, LoadedRata, ReferenceSource};
use crate::input::SourceFile;
use crate::rata::{LowVelocity, RataGrade, RataQuantity};
use crate::report::documents::{Document, RATA_TEMPLATE};
use crate::report::format::{fixed, grouped};
use crate::report::{write_atomic, Attachment, Engine};
use crate::units::convert_out;
use clap::Args;
use serde_json::{json, Map, Value};
use sha2::{Digest, Sha256};
use std::path::PathBuf;

/// Decimals of the relative accuracy (the limits are given to 0.1 %).
const RA_DECIMALS: usize = 2;
/// Decimals of the bias adjustment factor; three places, as it is commonly reported (from
/// memory, to confirm against 40 CFR 75 App. A §7.6.5).
const BAF_DECIMALS: usize = 3;

#[derive(Debug, Args)]
pub struct RataArgs {
    /// The RATA file (TOML); survey references in it are read relative to it.
    pub file: PathBuf,
    /// Output format: a table, the RATA as JSON, or per-run CSV.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Also write the RATA summary PDF, with the RATA file (and any referenced surveys and
    /// readings) embedded.
    #[arg(short = 'o', long = "output", value_name = "OUT.pdf")]
    pub output: Option<PathBuf>,
}

pub fn run(args: RataArgs, ctx: &Ctx) -> Result<i32, Error> {
    let r = load(&args.file)?;
    let text = match args.format {
        Format::Json => json_text(&json_doc(&r)),
        Format::Csv => runs_csv(&r),
        Format::Table => table(&r, ctx),
    };
    super::emit(&text)?;
    if let Some(out) = &args.output {
        write_summary(&r, out)?;
        if !ctx.quiet {
            eprintln!("wrote RATA summary {}", out.display());
        }
    }
    Ok(if r.result.grade() == RataGrade::Fail {
        3
    } else {
        0
    })
}

/// Prints values in the file's display unit with decimals that suit their size.
struct Shown {
    unit: &'static crate::units::Unit,
    decimals: usize,
}

impl Shown {
    fn of(r: &LoadedRata) -> Shown {
        let unit = r.spec.display_unit;
        let size = convert_out(r.result.reference_mean, unit).abs();
        let decimals = if size >= 1000.0 {
            0
        } else if size >= 100.0 {
            1
        } else {
            2
        };
        Shown { unit, decimals }
    }

    fn num(&self, si: f64) -> String {
        grouped(convert_out(si, self.unit), self.decimals)
    }

    fn with_unit(&self, si: f64) -> String {
        format!("{} {}", self.num(si), self.unit.symbol)
    }
}

fn grade_word(g: RataGrade) -> &'static str {
    match g {
        RataGrade::Fail => "fail",
        RataGrade::Pass | RataGrade::PassAnnualFrequency => "pass",
    }
}

/// The test frequency a grade earns (40 CFR 75 App. B §2.3.1, from memory: ≤ 7.5 % earns the
/// reduced, annual frequency; otherwise semiannual).
fn frequency(g: RataGrade) -> &'static str {
    match g {
        RataGrade::PassAnnualFrequency => "annual (reduced frequency earned)",
        RataGrade::Pass => "semiannual",
        RataGrade::Fail => "none: the RATA failed",
    }
}

fn quantity_text(r: &LoadedRata) -> String {
    match r.spec.quantity {
        RataQuantity::VelocityMS => format!("velocity, {}", r.spec.display_unit.symbol),
        RataQuantity::Flow => {
            let survey = r
                .sources
                .iter()
                .any(|s| matches!(s, ReferenceSource::Survey { .. }));
            if survey {
                format!(
                    "flow, {} (survey references: {})",
                    r.spec.display_unit.symbol,
                    r.spec.basis.words()
                )
            } else {
                format!("flow, {}", r.spec.display_unit.symbol)
            }
        }
    }
}

fn source_text(s: &ReferenceSource) -> String {
    match s {
        ReferenceSource::Entered { .. } => "entered".to_string(),
        ReferenceSource::Survey { path, runs, .. } => format!(
            "survey {path} (mean of run{} {})",
            if runs.len() == 1 { "" } else { "s" },
            runs.join(", ")
        ),
    }
}

fn low_velocity_text(r: &LoadedRata, u: &Shown) -> (String, &'static str) {
    let lim = &r.result.limits;
    match r.result.low_velocity {
        LowVelocity::NotApplicable { reason } => (format!("not applicable: {reason}"), "n/a"),
        LowVelocity::Evaluated {
            abs_mean_difference_m_s,
            grade,
        } => {
            // The limits are in ft/s; show the difference in ft/s too when the file's unit is not.
            let in_ft_s = if u.unit.symbol == "ft/s" {
                String::new()
            } else {
                format!(" = {} ft/s", fixed(abs_mean_difference_m_s / 0.3048, 2))
            };
            (
                format!(
                    "|RM avg − CEM avg| {}{in_ft_s} (limit {} ft/s, {} ft/s for the annual frequency)",
                    u.with_unit(abs_mean_difference_m_s),
                    fixed(lim.low_velocity_pass_m_s / 0.3048, 1),
                    fixed(lim.low_velocity_incentive_m_s / 0.3048, 1),
                ),
                grade_word(grade),
            )
        }
    }
}

/// The mean difference is written `mean d`, not d̄: a combining macron upsets terminal column
/// widths and comes out of PDF text extraction garbled.
fn bias_text(r: &LoadedRata, u: &Shown) -> String {
    let res = &r.result;
    if res.bias.passed {
        format!(
            "pass: mean d {} ≤ |cc| {}; BAF {}",
            u.with_unit(res.mean_difference),
            u.with_unit(res.confidence_coefficient.abs()),
            fixed(res.bias.adjustment_factor, BAF_DECIMALS)
        )
    } else {
        format!(
            "fail: mean d {} > |cc| {} (the monitor reads low); BAF = 1 + |mean d|/CEM avg = {}",
            u.with_unit(res.mean_difference),
            u.with_unit(res.confidence_coefficient.abs()),
            fixed(res.bias.adjustment_factor, BAF_DECIMALS)
        )
    }
}

fn verdict_text(r: &LoadedRata) -> String {
    let res = &r.result;
    match res.grade() {
        RataGrade::Fail => "FAIL: the relative accuracy exceeds its limit".to_string(),
        g if res.ra_grade < g => format!(
            "pass on the low-velocity alternative; test frequency {}",
            frequency(g)
        ),
        g => format!("pass; test frequency {}", frequency(g)),
    }
}

/// One sentence for the PDF: the outcome, on which criterion, the frequency and the BAF.
fn verdict_sentence(r: &LoadedRata) -> String {
    let res = &r.result;
    let lim = &res.limits;
    let ra = fixed(res.relative_accuracy_percent, RA_DECIMALS);
    let on_alternative = res.ra_grade < res.grade();
    let outcome = match res.grade() {
        RataGrade::Fail => format!(
            "The monitor fails: relative accuracy {ra} % exceeds {} %",
            fixed(lim.ra_pass_percent, 1)
        ),
        _ if on_alternative => format!(
            "The monitor passes on the low-velocity alternative (relative accuracy {ra} %); test frequency {}",
            frequency(res.grade())
        ),
        g => format!(
            "The monitor passes: relative accuracy {ra} % (limit {} %); test frequency {}",
            fixed(lim.ra_pass_percent, 1),
            frequency(g)
        ),
    };
    let bias = if res.bias.passed {
        format!(
            "bias test passed, BAF {}",
            fixed(res.bias.adjustment_factor, BAF_DECIMALS)
        )
    } else {
        format!(
            "bias test failed (monitor reads low), BAF {}",
            fixed(res.bias.adjustment_factor, BAF_DECIMALS)
        )
    };
    format!("{outcome}; {bias}.")
}

fn table(r: &LoadedRata, ctx: &Ctx) -> String {
    let m = &r.spec.meta;
    let res = &r.result;
    let u = Shown::of(r);
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
    let mut monitor = m.monitor_id.clone();
    if let Some(s) = &m.monitor_serial {
        monitor += &format!(" (serial {s})");
    }
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

fn json_doc(r: &LoadedRata) -> Value {
    let m = &r.spec.meta;
    let res = &r.result;
    let s = sfx(r.spec.quantity);
    let key = |name: &str| format!("{name}_{s}");
    let runs: Vec<Value> = res
        .runs
        .iter()
        .zip(&r.sources)
        .zip(&r.spec.runs)
        .map(|((run, src), spec)| {
            let mut o = Map::new();
            o.insert("id".into(), json!(run.id()));
            o.insert(key("reference"), json!(run.reference()));
            o.insert(key("monitor"), json!(run.monitor()));
            o.insert(key("difference"), json!(run.difference()));
            o.insert("used".into(), json!(run.rejection().is_none()));
            o.insert("rejection".into(), json!(run.rejection()));
            o.insert("period".into(), json!(spec.period));
            o.insert(
                "reference_source".into(),
                match src {
                    ReferenceSource::Entered { raw } => json!({ "entered": raw }),
                    ReferenceSource::Survey { path, title, runs } => {
                        json!({ "survey": path, "title": title, "runs": runs })
                    }
                },
            );
            Value::Object(o)
        })
        .collect();
    let mut o = Map::new();
    o.insert("title".into(), json!(m.title));
    o.insert("facility".into(), json!(m.facility));
    o.insert("unit".into(), json!(m.unit));
    o.insert("location".into(), json!(m.location));
    o.insert("date".into(), json!(m.date.to_string()));
    o.insert("level".into(), json!(m.level));
    o.insert(
        "monitor".into(),
        json!({ "id": m.monitor_id, "serial": m.monitor_serial, "description": m.monitor_description }),
    );
    o.insert(
        "quantity".into(),
        json!(match r.spec.quantity {
            RataQuantity::VelocityMS => "velocity",
            RataQuantity::Flow => "flow",
        }),
    );
    if r.spec.quantity == RataQuantity::Flow {
        o.insert("basis".into(), json!(r.spec.basis.name()));
    }
    o.insert("display_unit".into(), json!(r.spec.display_unit.symbol));
    o.insert("runs".into(), Value::Array(runs));
    o.insert("used_runs".into(), json!(res.used_runs));
    o.insert(key("mean_difference"), json!(res.mean_difference));
    o.insert(key("std_dev_difference"), json!(res.std_dev_difference));
    o.insert("t_value".into(), json!(res.t_value));
    o.insert(
        key("confidence_coefficient"),
        json!(res.confidence_coefficient),
    );
    o.insert(key("reference_mean"), json!(res.reference_mean));
    o.insert(key("monitor_mean"), json!(res.monitor_mean));
    o.insert(
        "relative_accuracy_percent".into(),
        json!(res.relative_accuracy_percent),
    );
    o.insert("ra_grade".into(), json!(res.ra_grade.label()));
    o.insert(
        "low_velocity".into(),
        match res.low_velocity {
            LowVelocity::NotApplicable { reason } => {
                json!({ "applicable": false, "reason": reason })
            }
            LowVelocity::Evaluated {
                abs_mean_difference_m_s,
                grade,
            } => json!({
                "applicable": true,
                "abs_mean_difference_m_s": abs_mean_difference_m_s,
                "grade": grade.label(),
            }),
        },
    );
    o.insert(
        "bias".into(),
        json!({ "passed": res.bias.passed, "adjustment_factor": res.bias.adjustment_factor }),
    );
    o.insert("grade".into(), json!(res.grade().label()));
    o.insert("passed".into(), json!(res.grade() != RataGrade::Fail));
    o.insert("frequency".into(), json!(frequency(res.grade())));
    let l = &res.limits;
    o.insert(
        "limits".into(),
        json!({
            "min_used_runs": l.min_used_runs,
            "max_rejected_runs": l.max_rejected_runs,
            "ra_pass_percent": l.ra_pass_percent,
            "ra_incentive_percent": l.ra_incentive_percent,
            "low_velocity_threshold_m_s": l.low_velocity_threshold_m_s,
            "low_velocity_pass_m_s": l.low_velocity_pass_m_s,
            "low_velocity_incentive_m_s": l.low_velocity_incentive_m_s,
            "source": l.source,
        }),
    );
    Value::Object(o)
}

fn runs_csv(r: &LoadedRata) -> String {
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

fn sha256_hex(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// A plain file name for an embedded copy: attachment names may not hold path separators.
fn flat_name(s: &str) -> String {
    s.chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || matches!(c, '.' | '-' | '_') {
                c
            } else {
                '-'
            }
        })
        .collect()
}

fn attachments(r: &LoadedRata) -> Result<Vec<Attachment>, Error> {
    let make = |name: String, f: &SourceFile, description: String| {
        let mime = if name.ends_with(".csv") {
            "text/csv"
        } else {
            "application/toml"
        };
        Attachment::new(name.clone(), f.bytes.clone(), mime, description)
            .map_err(|e| Error::Environment(format!("cannot embed `{name}`: {e}")))
    };
    let mut v = vec![make(
        r.file.name.clone(),
        &r.file,
        "RATA file (TOML) as read".into(),
    )?];
    for (run, f) in &r.survey_files {
        let name = flat_name(&format!("run-{run}--{}", f.name));
        if v.iter().any(|a| a.name() == name) {
            continue;
        }
        v.push(make(
            name,
            f,
            format!("RATA run {run}: reference-method file {} as read", f.name),
        )?);
    }
    Ok(v)
}

fn summary_data(r: &LoadedRata, files: &[Attachment]) -> Value {
    let m = &r.spec.meta;
    let res = &r.result;
    let u = Shown::of(r);
    let mut facts = Vec::new();
    let mut fact = |label: &str, value: Option<&String>| {
        if let Some(v) = value {
            facts.push(json!([label, v]));
        }
    };
    fact("Facility", m.facility.as_ref());
    fact("Unit", m.unit.as_ref());
    fact("Location", m.location.as_ref());
    let mut monitor = m.monitor_id.clone();
    if let Some(s) = &m.monitor_serial {
        monitor += &format!(" (serial {s})");
    }
    fact("Monitor", Some(&monitor));
    fact("Monitor type", m.monitor_description.as_ref());
    fact("Test date", Some(&m.date.to_string()));
    fact("Operating level", m.level.as_ref());
    fact("Quantity", Some(&quantity_text(r)));
    let who = match (&m.tested_by, &m.organisation) {
        (Some(t), Some(o)) => Some(format!("{t}, {o}")),
        (Some(t), None) => Some(t.clone()),
        (None, Some(o)) => Some(o.clone()),
        (None, None) => None,
    };
    fact("Tested by", who.as_ref());
    let runs: Vec<Value> = res
        .runs
        .iter()
        .zip(&r.sources)
        .zip(&r.spec.runs)
        .map(|((run, src), spec)| {
            json!({
                "id": run.id(),
                "period": spec.period.clone().unwrap_or_default(),
                "reference": u.num(run.reference()),
                "monitor": u.num(run.monitor()),
                "difference": u.num(run.difference()),
                "source": source_text(src),
                "used": run.rejection().is_none(),
                "rejection": run.rejection().unwrap_or(""),
            })
        })
        .collect();
    let (lv_text, lv_status) = low_velocity_text(r, &u);
    let lim = &res.limits;
    // Read across in two columns: counts and means on the left, the spread on the right.
    let stats = vec![
        json!([
            "Runs used / rejected",
            format!("{} / {}", res.used_runs, res.runs.len() - res.used_runs)
        ]),
        json!(["Mean difference (mean d)", u.with_unit(res.mean_difference)]),
        json!([
            "Mean reference method, RM avg",
            u.with_unit(res.reference_mean)
        ]),
        json!([
            "Standard deviation of d, S_d",
            u.with_unit(res.std_dev_difference)
        ]),
        json!(["Mean monitor, CEM avg", u.with_unit(res.monitor_mean)]),
        json!([
            format!(
                "t0.975 ({} degrees of freedom)",
                res.used_runs.saturating_sub(1)
            ),
            fixed(res.t_value, 3)
        ]),
        json!(["", ""]),
        json!([
            "Confidence coefficient, cc",
            u.with_unit(res.confidence_coefficient)
        ]),
    ];
    let criteria = vec![
        json!({
            "label": "Relative accuracy",
            "value": format!("{} %", fixed(res.relative_accuracy_percent, RA_DECIMALS)),
            "limit": format!("≤ {} % (≤ {} % for the annual frequency)", fixed(lim.ra_pass_percent, 1), fixed(lim.ra_incentive_percent, 1)),
            "status": grade_word(res.ra_grade),
        }),
        json!({
            "label": "Low-velocity alternative",
            "value": lv_text,
            "limit": format!("applies when RM avg ≤ {} ft/s", fixed(lim.low_velocity_threshold_m_s / 0.3048, 0)),
            "status": if lv_status == "n/a" { "not-applicable" } else { lv_status },
        }),
        json!({
            "label": "Bias test",
            "value": bias_text(r, &u),
            "limit": "fails when mean d > |cc|",
            "status": if res.bias.passed { "pass" } else { "fail" },
        }),
    ];
    let files: Vec<Value> = files
        .iter()
        .map(|a| json!({ "name": a.name(), "sha256": sha256_hex(a.bytes()) }))
        .collect();
    json!({
        "title": m.title,
        "monitor": m.monitor_id,
        "date": m.date.to_string(),
        "facts": facts,
        "unit": u.unit.symbol,
        "runs": runs,
        "stats": stats,
        "criteria": criteria,
        "verdict": grade_word(res.grade()),
        "verdict_text": verdict_text(r),
        "verdict_sentence": verdict_sentence(r),
        "relative_accuracy": format!("{} %", fixed(res.relative_accuracy_percent, RA_DECIMALS)),
        "frequency": frequency(res.grade()),
        "baf": fixed(res.bias.adjustment_factor, BAF_DECIMALS),
        "source": lim.source,
        "method": "d = RM − CEM per run; the mean d and S_d = √((Σd² − (Σd)²/n)/(n − 1)) over the \
            used runs; cc = t0.975(n − 1)·S_d/√n; RA = (|mean d| + |cc|)/RM avg × 100. Rejected runs \
            are listed but not used. The bias test fails when mean d > |cc| (the monitor reads low); \
            the bias adjustment factor is then BAF = 1 + |mean d|/CEM avg, otherwise 1.",
        "notes": m.notes,
        "signoff": {
            "tested_by": m.tested_by.clone().unwrap_or_default(),
            "organisation": m.organisation.clone().unwrap_or_default(),
            "reviewed_by": m.reviewed_by.clone().unwrap_or_default(),
        },
        "statement": "This summary is computed from the paired runs embedded in this file under the \
            limits named above. It supports, and does not replace, the judgement of a competent, \
            qualified professional, the applicable regulation and permit, and the facility's QA plan. \
            Reference-method traverses involve work at height, hot and toxic gases and hot probes: \
            follow site rules and permits to work.",
        "files": files,
        "software": format!("annulus {}", env!("CARGO_PKG_VERSION")),
    })
}

fn write_summary(r: &LoadedRata, out: &std::path::Path) -> Result<(), Error> {
    let files = attachments(r)?;
    let m = &r.spec.meta;
    let fingerprint = sha256_hex(
        &files
            .iter()
            .flat_map(|a| a.bytes().iter().copied())
            .collect::<Vec<u8>>(),
    );
    let doc = Document {
        template: RATA_TEMPLATE.to_string(),
        template_name: "rata.typ".into(),
        data: summary_data(r, &files),
        title: m.title.clone(),
        author: vec![
            m.tested_by.clone().unwrap_or_default(),
            m.organisation.clone().unwrap_or_default(),
        ],
        keywords: vec!["RATA".into(), "flow monitor".into(), m.monitor_id.clone()],
        description: format!(
            "Flow-monitor RATA of {} on {}: RA {} %, {}",
            m.monitor_id,
            m.date,
            fixed(r.result.relative_accuracy_percent, RA_DECIMALS),
            grade_word(r.result.grade())
        ),
        ident: format!("annulus-rata/{}/{}/{fingerprint}", m.monitor_id, m.date),
        date: m.date,
        attachments: files,
    };
    let rendered = Engine::new()
        .render_document(&doc)
        .map_err(|e| Error::Environment(e.to_string()))?;
    write_atomic(out, &rendered.pdf).map_err(|e| Error::Environment(e.to_string()))
}
