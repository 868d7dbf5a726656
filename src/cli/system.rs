//! `annulus system`: an air system against its design — every duct, the branch sums, the outside
//! air, the fan and the terminals — as a table, JSON or CSV, or the submittal PDF (`-o`). Exit
//! code 3 when anything is outside tolerance, whether printed or written.

use super::output::{csv_text, json_text, status, Ctx, Format, Table};
use crate::archive::make::MakeError;
use crate::archive::submittal::{make_submittal, SubmittalSettings};
use crate::archive::SecretKey;
use crate::checks::Status;
use crate::diag::Error;
use crate::display::{fixed, DisplayTable, Kind, UnitSystem};
use crate::input::fs::Place;
use crate::input::system_file::load_system;
use crate::report::Engine;
use crate::submittal::{evaluate_system, SystemEvaluation};
use crate::system::words;
use crate::units::FlowBasis;
use crate::write::Destination;
use clap::Args;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct SystemArgs {
    /// The system file (its ducts' surveys and the terminals CSV are read relative to it).
    pub system: PathBuf,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Print in SI units (m³/h, m/s, Pa) whatever the surveys' convention.
    #[arg(long)]
    pub si: bool,
    /// Write the submittal PDF instead of printing: a file (written whole or not at all, never
    /// over an input), a folder (the PDF is named after the system file), or `-` for standard
    /// output.
    #[arg(short, long, value_name = "OUT.pdf")]
    pub output: Option<PathBuf>,
    /// Sign the submittal with this Ed25519 secret key (see `annulus keygen`); its name is printed
    /// in the sign-off block. `--sign` without a path uses `signing_key` of the configuration file.
    #[arg(long, value_name = "KEY", num_args = 0..=1, requires = "output")]
    #[allow(clippy::option_option)]
    pub sign: Option<Option<PathBuf>>,
}

/// The word a judged item shows, coloured when asked.
fn mark(s: Status, color: bool) -> String {
    match s {
        Status::Pass => status("pass", color),
        Status::Fail => status("fail", color),
        Status::Warn => status("warn", color),
        Status::NotApplicable => "\u{2014}".into(),
    }
}

pub fn run(args: SystemArgs, ctx: &Ctx) -> Result<i32, Error> {
    let key = args
        .sign
        .as_ref()
        .map(super::report::signing_key)
        .transpose()?;
    let loaded = load_system(&args.system)?;
    note_outside(&loaded, ctx);
    // the destination is checked before any work, against every input and the key
    let out = match &args.output {
        Some(arg) => {
            loaded.check_embeddable()?;
            let mut inputs = loaded.input_paths();
            inputs.extend(key.iter().map(|(_, p)| p.clone()));
            let dest = super::files::destination(arg, &args.system, &inputs)?;
            Some((dest, inputs))
        }
        None => None,
    };
    let units = args.si.then_some(UnitSystem::Si);
    let e = evaluate_system(loaded, units)?;
    let code = if e.result.verdict == Status::Fail {
        3
    } else {
        0
    };
    if let Some((dest, inputs)) = &out {
        write_pdf(&e, dest, inputs, key.as_ref(), ctx)?;
        return Ok(code);
    }
    let text = match args.format {
        Format::Json => json_text(&e.doc()),
        Format::Csv => csv(&e),
        Format::Table => table(&e, ctx),
    };
    super::emit(&text)?;
    Ok(code)
}

/// Prints a note (unless `--quiet`) for each file read from outside the system file's folder
/// (a duct's survey, the terminals CSV) and from outside a survey's own folder.
fn note_outside(loaded: &crate::input::system_file::LoadedSystem, ctx: &Ctx) {
    if !ctx.quiet {
        let written = loaded
            .spec
            .ducts
            .iter()
            .map(|d| (format!("duct {}'s survey", d.tag), d.survey.as_str()))
            .chain(
                loaded
                    .terminals
                    .iter()
                    .map(|t| ("the terminals file".to_string(), t.name.as_str())),
            );
        for (what, path) in written {
            match crate::input::fs::classify_reference(path) {
                Place::Inside => {}
                Place::Absolute => eprintln!("note: `{path}` ({what}) is an absolute path"),
                Place::Above => {
                    eprintln!("note: `{path}` ({what}) is outside the system file's folder")
                }
            }
        }
    }
    for d in &loaded.ducts {
        super::files::note_outside(d, ctx);
    }
}

/// Renders, seals and (with a key) signs the submittal, every input embedded, and writes it to
/// `out` under the output rules (never over one of `inputs`).
fn write_pdf(
    e: &SystemEvaluation,
    out: &Destination,
    inputs: &[PathBuf],
    key: Option<&(SecretKey, PathBuf)>,
    ctx: &Ctx,
) -> Result<(), Error> {
    let signer = key.map(|(k, path)| super::report::signer_entry(k, path));
    let settings = SubmittalSettings {
        document_date: super::report::document_date(e.loaded.spec.date)?,
        signer: signer.clone(),
        defaults: super::report::signoff_defaults()?,
    };
    let made = make_submittal(&Engine::new(), e, &settings, key.map(|(k, _)| k)).map_err(
        |err| match err {
            MakeError::Render(r) => {
                Error::Environment(format!("the built-in submittal template failed: {r}"))
            }
            other => Error::Environment(other.to_string()),
        },
    )?;
    crate::write::write(out, &made.pdf, inputs)?;
    if !ctx.quiet {
        for w in &made.warnings {
            eprintln!("warning: {w}");
        }
        eprintln!(
            "wrote {out} — submittal {}{}; system: {}",
            made.manifest.report_id(),
            match (&signer, key) {
                (Some(s), Some((k, _))) =>
                    format!(", signed by {} (key {})", s.name, k.public().fingerprint()),
                _ => ", unsigned".into(),
            },
            match e.result.verdict {
                Status::Pass => "within tolerance",
                Status::Warn => "within tolerance, with warnings",
                _ => "OUTSIDE tolerance (see the summary page)",
            }
        );
    }
    Ok(())
}

fn table(e: &SystemEvaluation, ctx: &Ctx) -> String {
    let dt = &e.display;
    let spec = &e.loaded.spec;
    let r = &e.result;
    let mut out = format!("{}\n", spec.title);
    let mut head = Table::new(&["", ""]);
    let mut field = |k: &str, v: String| head.row(vec![k.to_string(), v]);
    if let Some(s) = &spec.site {
        field("site", s.clone());
    }
    field("date", spec.date.to_string());
    if let Some(o) = &spec.organisation {
        field("organisation", o.clone());
    }
    if let Some(t) = &e.loaded.signoff.tested_by {
        field("tested by", t.clone());
    }
    field("tolerance", words::system_tolerance(spec));
    field(
        "units",
        format!(
            "{}; flows rounded to {} {}, velocities to {} {} (TAB practice)",
            match dt.system {
                UnitSystem::InchPound => "inch-pound",
                UnitSystem::Si | UnitSystem::EpaMetric => "SI",
            },
            fixed(dt.tab_step(Kind::ActualFlow).unwrap_or(1.0), 0),
            dt.get(Kind::ActualFlow).symbol.trim_start_matches('a'),
            tab_step_text(dt),
            dt.get(Kind::Velocity).symbol
        ),
    );
    // the header table's own rule line is noise here: keep its rows only
    out += &head
        .render()
        .lines()
        .skip(2)
        .map(|l| format!("{l}\n"))
        .collect::<String>();

    out += &duct_table(e, ctx);
    out += &relations_and_fan(e, ctx);
    out += &terminal_table(e, ctx);
    if !spec.deficiencies.is_empty() {
        out += "\ndeficiencies\n";
        for d in &spec.deficiencies {
            out += &format!(
                "{:8}  {}{}\n",
                d.status.name(),
                d.item,
                d.note
                    .as_ref()
                    .map(|n| format!(" ({n})"))
                    .unwrap_or_default()
            );
        }
    }

    let notes = words::notes(spec, &r.ducts);
    if !notes.is_empty() || e.mixed_units {
        out += "\nnotes\n";
        for n in notes {
            out += &format!("- {n}\n");
        }
        if e.mixed_units {
            out += "- the surveys are in different unit systems; shown in the first duct's\n";
        }
    }

    let judged = r.statuses().filter(|s| *s != Status::NotApplicable).count();
    let open = spec
        .deficiencies
        .iter()
        .filter(|d| d.status == crate::system::DeficiencyStatus::Open)
        .count();
    out += &format!(
        "\nverdict: {} ({} of {} items outside tolerance{}{})\n",
        mark(r.verdict, ctx.color),
        r.failures(),
        judged,
        match &r.fan {
            Some(f) if f.motor == Status::Warn => "; motor warning",
            _ => "",
        },
        if open > 0 {
            format!(
                "; {open} open deficienc{}",
                if open == 1 { "y" } else { "ies" }
            )
        } else {
            String::new()
        }
    );
    out
}

/// The ducts against design, with what each flow unit means.
fn duct_table(e: &SystemEvaluation, ctx: &Ctx) -> String {
    let dt = &e.display;
    let r = &e.result;
    let mut out = String::new();
    out += "\nducts\n";
    let mut t = Table::new(&[
        "tag",
        "role",
        "of",
        "size",
        "design",
        "measured",
        "% design",
        "tolerance",
        "velocity",
        "static",
        "verdict",
    ])
    .right(&[4, 5, 6, 8, 9]);
    let sp = dt.get(Kind::StaticPressure);
    for (d, (ev, _)) in r.ducts.iter().zip(&e.ducts) {
        t.row(vec![
            d.tag.clone(),
            d.role.words().to_string(),
            d.of.clone().unwrap_or_default(),
            words::size(dt, &ev.loaded.survey.duct),
            words::flow(dt, d.design_basis, d.design_flow_m3_s),
            words::flow(dt, d.design_basis, d.measured_flow_m3_s),
            words::percent(d.percent_of_design),
            words::tolerance(d.tolerance_percent),
            dt.tab_format(Kind::Velocity, d.mean_velocity_m_s),
            d.static_pa.map(|p| sp.format(p)).unwrap_or_default(),
            mark(d.status, ctx.color),
        ]);
    }
    out += &t.render();
    let bases: Vec<FlowBasis> = {
        let mut v: Vec<FlowBasis> = r.ducts.iter().map(|d| d.design_basis).collect();
        v.dedup();
        v
    };
    for b in bases {
        out += &format!("{}: {}\n", dt.get(Kind::flow(b)).symbol, words::basis(b));
    }

    out
}

/// The branch sums, the outside air and the fan sheet.
fn relations_and_fan(e: &SystemEvaluation, ctx: &Ctx) -> String {
    let dt = &e.display;
    let r = &e.result;
    let mut out = String::new();
    if !r.branches.is_empty() || r.outside_air.is_some() {
        out += "\nrelations\n";
        for b in &r.branches {
            out += &format!(
                "{}  {}\n",
                mark(b.status, ctx.color),
                words::branch_sum(dt, b)
            );
        }
        if let Some(o) = &r.outside_air {
            for (i, l) in words::outside_air(dt, o).into_iter().enumerate() {
                let m = if i == 0 {
                    mark(o.status, ctx.color)
                } else {
                    String::new()
                };
                out += &format!("{m:4}  {l}\n");
            }
        }
    }

    if let Some(f) = &r.fan {
        out += &format!("\nfan {}\n", f.tag);
        let mut ft = Table::new(&["", ""]);
        for (k, v) in words::fan(dt, f) {
            ft.row(vec![k, v]);
        }
        out += &ft
            .render()
            .lines()
            .skip(2)
            .map(|l| format!("{l}\n"))
            .collect::<String>();
        if !ctx.quiet {
            for s in words::fan_sources() {
                out += &format!("  note: {s}\n");
            }
        }
    }

    out
}

/// The terminals against design and their sums per branch.
fn terminal_table(e: &SystemEvaluation, ctx: &Ctx) -> String {
    let dt = &e.display;
    let r = &e.result;
    let spec = &e.loaded.spec;
    let mut out = String::new();
    if !r.terminals.is_empty() {
        out += &format!(
            "\nterminals ({})\n",
            spec.terminal_file.as_deref().unwrap_or("")
        );
        let mut t = Table::new(&[
            "tag", "branch", "room", "design", "measured", "% design", "verdict",
        ])
        .right(&[3, 4, 5]);
        for x in &r.terminals {
            t.row(vec![
                x.tag.clone(),
                x.branch.clone(),
                x.room.clone().unwrap_or_default(),
                words::flow(dt, x.basis, x.design_flow_m3_s),
                words::flow(dt, x.basis, x.measured_flow_m3_s),
                words::percent(x.percent_of_design),
                mark(x.status, ctx.color),
            ]);
        }
        out += &t.render();
        for s in &r.terminal_sums {
            out += &format!(
                "{}  {}\n",
                mark(s.status, ctx.color),
                words::terminal_sum(dt, s)
            );
        }
    }

    out
}

fn tab_step_text(dt: &DisplayTable) -> String {
    match dt.tab_step(Kind::Velocity) {
        Some(s) if s >= 1.0 => fixed(s, 0),
        Some(s) => fixed(s, 2),
        None => "—".into(),
    }
}

/// One row per judged item, in the job's units (the unit column names the basis). Sums put the
/// flow they are compared with (the main's or the branch's traverse) in `compared_with`.
fn csv(e: &SystemEvaluation) -> String {
    let dt = &e.display;
    let r = &e.result;
    // plain ASCII numbers for spreadsheets (no true minus, no grouping)
    let n = |b: FlowBasis, si: f64| format!("{:.1}", dt.get(Kind::flow(b)).value(si) + 0.0);
    let unit = |b: FlowBasis| dt.get(Kind::flow(b)).ascii.to_string();
    let pct = |p: Option<f64>| p.map(|p| format!("{p:.2}")).unwrap_or_default();
    let mut rows = Vec::new();
    for d in &r.ducts {
        rows.push(vec![
            "duct".into(),
            d.tag.clone(),
            d.role.name().into(),
            d.of.clone().unwrap_or_default(),
            d.design_basis.name().into(),
            unit(d.design_basis),
            n(d.design_basis, d.design_flow_m3_s),
            n(d.design_basis, d.measured_flow_m3_s),
            pct(d.percent_of_design),
            String::new(),
            String::new(),
            String::new(),
            format!("{:.1}", d.tolerance_percent),
            d.status.name().into(),
        ]);
    }
    for b in &r.branches {
        rows.push(vec![
            "branch-sum".into(),
            b.of.clone(),
            String::new(),
            b.branches.join(" "),
            b.basis.name().into(),
            unit(b.basis),
            String::new(),
            n(b.basis, b.sum_m3_s),
            String::new(),
            n(b.basis, b.main_m3_s),
            n(b.basis, b.difference_m3_s),
            pct(b.difference_percent),
            format!("{:.1}", b.tolerance_percent),
            b.status.name().into(),
        ]);
    }
    if let Some(o) = &r.outside_air {
        rows.push(vec![
            "outside-air".into(),
            o.outside_ducts.join(" "),
            match o.method {
                crate::system::relations::OutsideAirMethod::Difference => "difference".into(),
                crate::system::relations::OutsideAirMethod::Measured => "measured".into(),
            },
            String::new(),
            o.basis.name().into(),
            unit(o.basis),
            o.design_flow_m3_s
                .map(|d| n(o.basis, d))
                .unwrap_or_default(),
            n(o.basis, o.flow_m3_s),
            pct(o.percent_of_design),
            String::new(),
            String::new(),
            String::new(),
            format!("{:.1}", o.tolerance_percent),
            o.status.name().into(),
        ]);
    }
    if let Some(f) = &r.fan {
        rows.push(vec![
            "fan".into(),
            f.tag.clone(),
            String::new(),
            f.ducts.join(" "),
            f.basis.name().into(),
            unit(f.basis),
            n(f.basis, f.design_flow_m3_s),
            n(f.basis, f.measured_flow_m3_s),
            pct(f.percent_of_design),
            String::new(),
            String::new(),
            String::new(),
            format!("{:.1}", f.tolerance_percent),
            f.status.name().into(),
        ]);
    }
    for t in &r.terminals {
        rows.push(vec![
            "terminal".into(),
            t.tag.clone(),
            String::new(),
            t.branch.clone(),
            t.basis.name().into(),
            unit(t.basis),
            n(t.basis, t.design_flow_m3_s),
            n(t.basis, t.measured_flow_m3_s),
            pct(t.percent_of_design),
            String::new(),
            String::new(),
            String::new(),
            format!("{:.1}", t.tolerance_percent),
            t.status.name().into(),
        ]);
    }
    for s in &r.terminal_sums {
        rows.push(vec![
            "terminal-sum".into(),
            s.branch.clone(),
            String::new(),
            s.terminals.join(" "),
            s.basis.name().into(),
            unit(s.basis),
            n(s.basis, s.design_sum_m3_s),
            n(s.basis, s.sum_m3_s),
            String::new(),
            n(s.basis, s.branch_m3_s),
            n(s.basis, s.difference_m3_s),
            pct(s.difference_percent),
            format!("{:.1}", s.tolerance_percent),
            s.status.name().into(),
        ]);
    }
    csv_text(
        &[
            "item",
            "tag",
            "role",
            "of",
            "basis",
            "unit",
            "design",
            "measured",
            "percent_of_design",
            "compared_with",
            "difference",
            "difference_percent",
            "tolerance_percent",
            "status",
        ],
        &rows,
    )
}
