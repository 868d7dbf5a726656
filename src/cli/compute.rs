//! `annulus compute`: velocities, density and flows for each run and their average.

use super::output::{csv_text, json_text, Ctx, Format, Table};
use crate::diag::Error;
use crate::input::load;
use crate::pipeline::{evaluate_and_assess, run_is_valid, Evaluation};
use crate::results::{DisplayUnits, ResultsDoc};
use crate::units::to_unit;
use clap::Args;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct ComputeArgs {
    /// The survey file (its [[run]] readings files are read relative to it).
    pub survey: PathBuf,
    /// Output format: a table, the results JSON, or per-point CSV.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Show every point's reading and velocity in the table.
    #[arg(long)]
    pub points: bool,
    /// Print the table in SI units (m/s, m³/h, kg/h, °C) whatever the convention.
    #[arg(long)]
    pub si: bool,
}

pub fn run(args: ComputeArgs, ctx: &Ctx) -> Result<i32, Error> {
    let (e, a) = evaluate_and_assess(load(&args.survey)?)?;
    let doc = ResultsDoc::new(&e, &a);
    let text = match args.format {
        Format::Json => json_text(&doc),
        Format::Csv => points_csv(&doc),
        Format::Table => table(&e, &doc, args.points, args.si, ctx),
    };
    super::emit(&text)?;
    Ok(0)
}

fn points_csv(doc: &ResultsDoc) -> String {
    let mut rows = Vec::new();
    for r in &doc.runs {
        for p in &r.points {
            rows.push(vec![
                r.id.clone(),
                p.line.clone(),
                p.point.to_string(),
                format!("{:.6}", p.position_m),
                format!("{:.4}", p.dp_pa),
                format!("{:.3}", p.temperature_k),
                p.yaw_deg.map(|v| format!("{v}")).unwrap_or_default(),
                format!("{:.5}", p.velocity_m_s),
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
            "position[m]",
            "dp[Pa]",
            "temperature[K]",
            "yaw[deg]",
            "velocity[m/s]",
            "weight",
            "adjusted",
            "negative",
        ],
        &rows,
    )
}

fn table(e: &Evaluation, doc: &ResultsDoc, points: bool, si: bool, ctx: &Ctx) -> String {
    let s = &e.loaded.survey;
    let u = if si {
        DisplayUnits::si()
    } else {
        DisplayUnits::for_convention(&e.convention)
    };
    let mut out = format!("{}\n", s.title);
    if let Some(site) = &s.site {
        out += &format!("site        {site}\n");
    }
    out += &format!("date        {}\n", s.date);
    out += &format!(
        "plane       {} points ({}), area {:.4} m²\n",
        doc.points_per_run, doc.layout_method, doc.area_m2
    );
    out += &format!("convention  {}\n", e.convention.id.name());
    if !ctx.quiet {
        for n in &doc.convention_notes {
            out += &format!("            {n}\n");
        }
    }
    out.push('\n');
    let (tu, tdec) = match (si, s.convention.unit_system()) {
        (false, crate::units::UnitSystem::Us) => ("F", 1),
        _ => ("C", 1),
    };
    let mut t = Table::new(&[
        "run",
        "",
        &format!("T [°{tu}]"),
        "ρ [kg/m³]",
        &format!("v [{}]", u.velocity.unit),
        &format!("Q [{}]", u.actual.unit),
        &format!("Q [{}]", u.standard.unit),
        &format!("Q [{}]", u.dry_standard.unit),
        &format!("ṁ [{}]", u.mass.unit),
    ])
    .right(&[2, 3, 4, 5, 6, 7, 8]);
    for (r, spec) in doc.runs.iter().zip(&s.runs) {
        let valid = run_is_valid(spec, s.convention);
        t.row(vec![
            r.id.clone(),
            if valid {
                String::new()
            } else {
                super::output::status("excluded", ctx.color)
            },
            format!("{:.tdec$}", to_unit(r.mean_temperature_k, tu)),
            format!("{:.4}", r.density_kg_m3),
            u.velocity.fmt(r.mean_velocity_m_s),
            u.actual.fmt(r.actual_flow_m3_s),
            u.standard.fmt(r.standard_flow_m3_s),
            u.dry_standard.fmt(r.dry_standard_flow_m3_s),
            u.mass.fmt(r.mass_flow_kg_s),
        ]);
    }
    if let Some(a) = &doc.average {
        t.row(vec![
            "average".into(),
            format!(
                "{} run{}",
                a.runs.len(),
                if a.runs.len() == 1 { "" } else { "s" }
            ),
            String::new(),
            String::new(),
            u.velocity.fmt(a.mean_velocity_m_s),
            u.actual.fmt(a.actual_flow_m3_s),
            u.standard.fmt(a.standard_flow_m3_s),
            u.dry_standard.fmt(a.dry_standard_flow_m3_s),
            u.mass.fmt(a.mass_flow_kg_s),
        ]);
    }
    out += &t.render();
    let u95 = |u: &Option<crate::assess::UncertaintyReport>| {
        u.as_ref()
            .map(|x| format!("±{:.1} %", x.expanded_relative * 100.0))
            .unwrap_or_else(|| "—".into())
    };
    out += &format!(
        "expanded uncertainty (95 %): {}{}
",
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
            let diff = (r.sqrt_of_mean_dp_velocity_m_s / r.mean_velocity_m_s - 1.0) * 100.0;
            let mut line = format!(
                "run {}: Bws {:.2} % ({}), Ms {:.3} g/mol, p {:.0} Pa",
                r.id,
                r.moisture_fraction * 100.0,
                r.moisture_basis,
                r.wet_molar_mass_g_mol,
                r.absolute_pressure_pa
            );
            if let Some(f) = &r.epa {
                line += &format!(
                    "; (√Δp)avg {:.6}, Ts {:.1}, Ps {:.5}, Ms {:.3}",
                    f.sqrt_dp_avg, f.ts_abs, f.ps, f.ms
                );
            }
            if r.wall_factor != 1.0 {
                line += &format!("; wall factor {:.4}", r.wall_factor);
            }
            out += &line;
            out.push('\n');
            out += &format!(
                "        √(mean Δp) instead of mean √Δp would report {} {} ({:+.3} %)\n",
                u.velocity.fmt(r.sqrt_of_mean_dp_velocity_m_s),
                u.velocity.unit,
                diff
            );
        }
    }
    if points {
        for r in &doc.runs {
            out += &format!("\nrun {} points\n", r.id);
            let mut t = Table::new(&[
                "line",
                "point",
                "Δp [Pa]",
                &format!("T [°{tu}]"),
                "yaw [°]",
                &format!("v [{}]", u.velocity.unit),
                "note",
            ])
            .right(&[1, 2, 3, 4, 5]);
            for p in &r.points {
                let mut note = Vec::new();
                if p.adjusted {
                    note.push("adjusted");
                }
                if p.negative {
                    note.push("negative Δp");
                }
                t.row(vec![
                    p.line.clone(),
                    p.point.to_string(),
                    format!("{:.2}", p.dp_pa),
                    format!("{:.1}", to_unit(p.temperature_k, tu)),
                    p.yaw_deg.map(|y| format!("{y:.0}")).unwrap_or_default(),
                    u.velocity.fmt(p.velocity_m_s),
                    note.join(", "),
                ]);
            }
            out += &t.render();
        }
    }
    out
}
