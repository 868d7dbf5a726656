//! `annulus compute`: velocities, density and flows for each run and their average.

use super::output::{csv_text, json_text, paragraph, Ctx, Format, Table, UnitsArgs};
use crate::diag::Error;
use crate::display::{DisplayTable, Kind, UnitSystem};
use crate::flow::EpaForm;
use crate::pipeline::{evaluate_and_assess, run_is_valid, Evaluation};
use crate::results::{PointDoc, ResultsDoc};
use clap::Args;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct ComputeArgs {
    /// The survey file (its [[run]] readings files are read relative to it).
    pub survey: PathBuf,
    /// Output format: a table, the results JSON (SI), or per-point CSV (the table's units).
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Show every point's reading and velocity in the table.
    #[arg(long)]
    pub points: bool,
    #[command(flatten)]
    pub units: UnitsArgs,
}

pub fn run(args: ComputeArgs, ctx: &Ctx) -> Result<i32, Error> {
    let (e, a) = evaluate_and_assess(super::files::load_noted(&args.survey, ctx)?)?;
    let doc = ResultsDoc::new(&e, &a);
    let units = args.units.table(e.convention.display_table());
    let text = match args.format {
        Format::Json => json_text(&doc),
        Format::Csv => points_csv(&doc, &units),
        Format::Table => table(&e, &doc, args.points, &units, ctx),
    };
    super::emit(&text)?;
    Ok(0)
}

/// Every point of every run, in `t`'s units (the unit in each header, as the readings parser
/// reads it).
fn points_csv(doc: &ResultsDoc, t: &DisplayTable) -> String {
    let (pos, dp, temp, angle, vel) = (
        t.get(Kind::Position),
        t.get(Kind::VelocityPressure),
        t.get(Kind::Temperature),
        t.get(Kind::Angle),
        t.get(Kind::Velocity),
    );
    let mut rows = Vec::new();
    for r in &doc.runs {
        for p in &r.points {
            rows.push(vec![
                r.id.clone(),
                p.line.clone(),
                p.point.to_string(),
                pos.csv(p.position_m),
                dp.csv(p.dp_pa),
                temp.csv(p.temperature_k),
                p.yaw_deg.map(|v| angle.csv(v)).unwrap_or_default(),
                vel.csv(p.velocity_m_s),
                format!("{}", p.weight),
                p.adjusted.to_string(),
                p.negative.to_string(),
            ]);
        }
    }
    csv_text(
        &[
            "run",
            "line",
            "point",
            &pos.header("position"),
            &dp.header("dp"),
            &temp.header("temperature"),
            &angle.header("yaw"),
            &vel.header("velocity"),
            "weight",
            "adjusted",
            "negative",
        ],
        &rows,
    )
}

/// The Method 2 working figures in the method's own units, shown when the screen is in them.
fn epa_figures(f: &crate::flow::run::EpaFigures, t: &DisplayTable) -> Option<String> {
    let (own, root, temp, pressure) = match f.form {
        EpaForm::English => (UnitSystem::InchPound, "√inH2O", "°R", "inHg"),
        EpaForm::Metric => (UnitSystem::EpaMetric, "√mmH2O", "K", "mmHg"),
    };
    (t.system == own).then(|| {
        format!(
            "Method 2 working figures: (√Δp)avg {:.6} {root}, Ts {:.1} {temp}, Ps {:.4} {pressure}",
            f.sqrt_dp_avg, f.ts_abs, f.ps
        )
    })
}

fn table(e: &Evaluation, doc: &ResultsDoc, points: bool, t: &DisplayTable, ctx: &Ctx) -> String {
    let s = &e.loaded.survey;
    let c = &e.convention;
    let sh = |k: Kind| t.get(k);
    let mut out = format!("{}\n", s.title);
    if let Some(site) = &s.site {
        out += &format!("site        {site}\n");
    }
    out += &format!("date        {}\n", s.date);
    out += &format!(
        "plane       {} points ({}), area {}\n",
        doc.points_per_run,
        doc.layout_method,
        t.format(Kind::Area, doc.area_m2)
    );
    out += &format!("convention  {}\n", c.id.name());
    if !ctx.quiet {
        for n in c.formulas() {
            out += &paragraph("            ", &n, ctx.width);
        }
        let own_units = t.system == UnitSystem::of(c.id, c.epa_form == EpaForm::Metric);
        let reference = match c.reference_as_written() {
            Some(words) if own_units => words.to_string(),
            _ => t.reference(c.reference_temperature_k, c.reference_pressure_pa),
        };
        out += &format!("            reference {reference}, {}\n", c.basis_words());
    }
    if t.system != UnitSystem::of(c.id, c.epa_form == EpaForm::Metric) {
        out += &format!("units       {} (asked for)\n", t.system.name());
    }
    out.push('\n');
    let heading = |name: &str, k: Kind| format!("{name} [{}]", sh(k).symbol);
    let mut table = Table::new(&[
        "run",
        "",
        &heading("T", Kind::Temperature),
        &heading("ρ", Kind::Density),
        &heading("v", Kind::Velocity),
        &t.flow_heading(Kind::ActualFlow),
        &t.flow_heading(Kind::StandardFlow),
        &t.flow_heading(Kind::DryStandardFlow),
        &heading("ṁ", Kind::MassFlow),
    ])
    .right(&[2, 3, 4, 5, 6, 7, 8]);
    for (r, spec) in doc.runs.iter().zip(&s.runs) {
        let valid = run_is_valid(spec, s.convention);
        table.row(vec![
            r.id.clone(),
            if valid {
                String::new()
            } else {
                super::output::status("excluded", ctx.color)
            },
            t.number(Kind::Temperature, r.mean_temperature_k),
            t.number(Kind::Density, r.density_kg_m3),
            t.number(Kind::Velocity, r.mean_velocity_m_s),
            t.number(Kind::ActualFlow, r.actual_flow_m3_s),
            t.number(Kind::StandardFlow, r.standard_flow_m3_s),
            t.number(Kind::DryStandardFlow, r.dry_standard_flow_m3_s),
            t.number(Kind::MassFlow, r.mass_flow_kg_s),
        ]);
    }
    if let Some(a) = &doc.average {
        table.row(vec![
            "average".into(),
            format!(
                "{} run{}",
                a.runs.len(),
                if a.runs.len() == 1 { "" } else { "s" }
            ),
            String::new(),
            String::new(),
            t.number(Kind::Velocity, a.mean_velocity_m_s),
            t.number(Kind::ActualFlow, a.actual_flow_m3_s),
            t.number(Kind::StandardFlow, a.standard_flow_m3_s),
            t.number(Kind::DryStandardFlow, a.dry_standard_flow_m3_s),
            t.number(Kind::MassFlow, a.mass_flow_kg_s),
        ]);
    }
    out += &table.fit(ctx.width);
    let u95 = |u: &Option<crate::assess::UncertaintyReport>| {
        u.as_ref()
            .map(|x| format!("±{:.1} %", x.expanded_relative * 100.0))
            .unwrap_or_else(|| "—".into())
    };
    out += &format!(
        "expanded uncertainty (95 %): {}{}\n",
        doc.runs
            .iter()
            .map(|r| format!("run {} {}", r.id, u95(&r.uncertainty)))
            .collect::<Vec<_>>()
            .join(", "),
        if doc.average.is_some() {
            format!(", average {}", u95(&doc.average_uncertainty))
        } else {
            String::new()
        }
    );
    let findings: Vec<&crate::checks::Finding> = doc
        .checks
        .iter()
        .chain(doc.runs.iter().flat_map(|r| r.checks.iter()))
        .collect();
    let count = |s: crate::checks::Status| findings.iter().filter(|f| f.status == s).count();
    out += &format!(
        "checks: {} — {} fail, {} warn (details: annulus check)\n",
        super::output::status(
            match doc.verdict {
                crate::assess::Verdict::Pass => "pass",
                crate::assess::Verdict::Warn => "warn",
                crate::assess::Verdict::Fail => "fail",
            },
            ctx.color
        ),
        count(crate::checks::Status::Fail),
        count(crate::checks::Status::Warn)
    );
    if let Some(a) = &doc.average {
        if a.runs.len() > 1 {
            out += &format!(
                "run-to-run spread of actual flow: {:.2} % (relative standard deviation)\n",
                a.flow_relative_std_dev * 100.0
            );
        }
        if let (Some(p), Some(b)) = (a.percent_of_design, a.design_basis) {
            out += &format!("measured {} is {p:.1} % of design\n", b.flow_words());
        }
    } else {
        out += "no valid run: nothing to average (see the leak checks)\n";
    }
    for (r, spec) in doc.runs.iter().zip(&s.runs) {
        if !run_is_valid(spec, s.convention) {
            out += &format!(
                "run {} is excluded from the average: post-run leak check {}\n",
                r.id,
                match spec.leak_check.after {
                    Some(crate::survey::LeakResult::Fail) => "failed",
                    _ => "not recorded",
                }
            );
        }
    }
    if !ctx.quiet {
        out.push('\n');
        for r in &doc.runs {
            out += &run_notes(r, t, ctx.width);
        }
    }
    if points {
        for r in &doc.runs {
            out += &format!("\nrun {} points\n", r.id);
            out += &points_table(&r.points, t).fit(ctx.width);
        }
    }
    out
}

/// How a run's gas was worked out, the method's own figures, and what the √(mean Δp) mistake
/// would have reported.
fn run_notes(r: &crate::results::RunDoc, t: &DisplayTable, width: usize) -> String {
    let lead = format!("run {}: ", r.id);
    let indent = " ".repeat(lead.chars().count());
    let percent = t.get(Kind::Percent);
    let molar = t.get(Kind::MolarMass);
    let mut line = format!(
        "Bws {} ({}), Ms {}, p {}",
        percent.with_unit(percent.number_with(r.moisture_fraction, 2)),
        r.moisture_basis,
        molar.with_unit(molar.number_with(r.wet_molar_mass_g_mol, 3)),
        t.format(Kind::AbsolutePressure, r.absolute_pressure_pa)
    );
    if r.wall_factor != 1.0 {
        line += &format!("; wall factor {:.4}", r.wall_factor);
    }
    let mut out = paragraph(&lead, &line, width);
    if let Some(f) = r.epa.as_ref().and_then(|f| epa_figures(f, t)) {
        out += &paragraph(&indent, &f, width);
    }
    let diff = (r.sqrt_of_mean_dp_velocity_m_s / r.mean_velocity_m_s - 1.0) * 100.0;
    out += &paragraph(
        &indent,
        &format!(
            "√(mean Δp) instead of mean √Δp would report {} ({:+.3} %)",
            t.format(Kind::Velocity, r.sqrt_of_mean_dp_velocity_m_s),
            diff
        ),
        width,
    );
    out
}

/// One run's points: reading, temperature, yaw and velocity in `t`'s units.
fn points_table(points: &[PointDoc], t: &DisplayTable) -> Table {
    let heading = |name: &str, k: Kind| format!("{name} [{}]", t.get(k).symbol);
    let mut table = Table::new(&[
        "line",
        "point",
        &heading("Δp", Kind::VelocityPressure),
        &heading("T", Kind::Temperature),
        &heading("yaw", Kind::Angle),
        &heading("v", Kind::Velocity),
        "note",
    ])
    .right(&[1, 2, 3, 4, 5])
    .wrap(&[6]);
    for p in points {
        let mut note = Vec::new();
        if p.adjusted {
            note.push("adjusted");
        }
        if p.negative {
            note.push("negative Δp");
        }
        table.row(vec![
            p.line.clone(),
            p.point.to_string(),
            t.number(Kind::VelocityPressure, p.dp_pa),
            t.number(Kind::Temperature, p.temperature_k),
            p.yaw_deg
                .map(|y| t.number(Kind::Angle, y))
                .unwrap_or_default(),
            t.number(Kind::Velocity, p.velocity_m_s),
            note.join(", "),
        ]);
    }
    table
}
