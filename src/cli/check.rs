//! `annulus check`: acceptance checks and data-quality findings, grouped, then the uncertainty
//! budgets and a verdict. Exit code 3 when any check fails.

use super::output::{csv_text, json_text, status, Ctx, Format, Table, UnitsArgs};
use crate::assess::{Assessment, UncertaintyReport, Verdict};
use crate::checks::{Finding, Group};
use crate::diag::Error;
use crate::display::DisplayTable;
use crate::pipeline::evaluate_and_assess;
use clap::Args;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct CheckArgs {
    /// The survey file.
    pub survey: PathBuf,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Show passing and not-applicable checks too (the table shows warnings and failures first).
    #[arg(long)]
    pub all: bool,
    #[command(flatten)]
    pub units: UnitsArgs,
}

const GROUPS: [(Group, &str); 5] = [
    (Group::Plane, "plane and site"),
    (Group::Flow, "flow quality"),
    (Group::Run, "runs"),
    (Group::Records, "records"),
    (Group::Data, "data integrity"),
];

fn rows(a: &Assessment) -> Vec<(Option<&str>, &Finding)> {
    let mut v: Vec<(Option<&str>, &Finding)> = a.checks.iter().map(|f| (None, f)).collect();
    for r in &a.runs {
        v.extend(r.checks.iter().map(|f| (Some(r.id.as_str()), f)));
    }
    v
}

fn budget_table(name: &str, u: &UncertaintyReport, width: usize) -> String {
    let mut t = Table::new(&["component", "u (rel)", "sensitivity", "dof"]).right(&[1, 2, 3]);
    for c in &u.components {
        t.row(vec![
            c.name.clone(),
            format!("{:.2} %", c.relative * 100.0),
            format!("{:.2}", c.sensitivity),
            c.dof
                .map(|d| format!("{d:.0}"))
                .unwrap_or_else(|| "∞".into()),
        ]);
    }
    format!(
        "\nuncertainty, {name} (spatial integration: {})\n{}combined {:.2} %, effective dof {}, k = {:.3}, expanded ±{:.2} % (about 95 %)\n",
        u.spatial_method,
        t.fit(width),
        u.combined_relative * 100.0,
        u.effective_dof.map(|d| format!("{d:.1}")).unwrap_or_else(|| "∞".into()),
        u.coverage_factor,
        u.expanded_relative * 100.0
    )
}

/// A finding's words in the screen's units, with how the survey changed the check.
fn message(f: &Finding, units: &DisplayTable) -> String {
    let mut msg = f.message.render(units);
    if let Some(s) = &f.setting {
        msg += &format!(" [{}]", s.render(units));
    }
    msg
}

pub fn run(args: CheckArgs, ctx: &Ctx) -> Result<i32, Error> {
    let (e, a) = evaluate_and_assess(super::files::load_noted(&args.survey, ctx)?)?;
    let units = args.units.table(e.convention.display_table());
    let text = match args.format {
        Format::Json => json_text(&a),
        Format::Csv => {
            let r: Vec<Vec<String>> = rows(&a)
                .into_iter()
                .map(|(run, f)| {
                    vec![
                        run.unwrap_or("").to_string(),
                        format!("{:?}", f.group).to_lowercase(),
                        f.id.to_string(),
                        f.status.name().to_string(),
                        f.measured.map(|m| format!("{m}")).unwrap_or_default(),
                        f.unit.to_string(),
                        f.limit.render(&units),
                        f.source.to_string(),
                        f.message.render(&units),
                    ]
                })
                .collect();
            // `measured` is SI, in the `unit` the next column names; the words are in the
            // screen's units
            csv_text(
                &[
                    "run", "group", "id", "status", "measured", "unit", "limit", "source",
                    "message",
                ],
                &r,
            )
        }
        Format::Table => {
            let mut out = format!("{}\n", e.loaded.survey.title);
            let all = rows(&a);
            for (g, name) in GROUPS {
                let mut t = Table::new(&["status", "run", "check", "finding"]).wrap(&[3]);
                let mut shown = 0;
                let mut hidden = 0;
                let mut items: Vec<&(Option<&str>, &Finding)> =
                    all.iter().filter(|(_, f)| f.group == g).collect();
                items.sort_by_key(|x| std::cmp::Reverse(x.1.status));
                for (run, f) in items {
                    if !args.all
                        && matches!(
                            f.status,
                            crate::checks::Status::Pass | crate::checks::Status::NotApplicable
                        )
                    {
                        hidden += 1;
                        continue;
                    }
                    shown += 1;
                    let msg = message(f, &units);
                    t.row(vec![
                        status(f.status.name(), ctx.color),
                        run.unwrap_or("").to_string(),
                        match &f.subject {
                            Some(s) => format!("{} ({s})", f.id),
                            None => f.id.to_string(),
                        },
                        msg,
                    ]);
                }
                out += &format!("\n{name}");
                if hidden > 0 {
                    out += &format!(
                        " ({hidden} passing or not applicable not shown; --all shows them)"
                    );
                }
                out.push('\n');
                if shown > 0 {
                    out += &t.fit(ctx.width);
                }
            }
            if !ctx.quiet {
                for r in &a.runs {
                    match &r.uncertainty {
                        Some(u) => out += &budget_table(&format!("run {}", r.id), u, ctx.width),
                        None => {
                            if let Some(n) = &r.uncertainty_note {
                                out += &format!("\nuncertainty, run {}: {n}\n", r.id);
                            }
                        }
                    }
                }
                if let Some(avg) = &a.average {
                    if let Some(u) = &avg.uncertainty {
                        out += &budget_table(
                            &format!("average of runs {}", avg.runs.join(", ")),
                            u,
                            ctx.width,
                        );
                    }
                }
            }
            let fails = all
                .iter()
                .filter(|(_, f)| f.status == crate::checks::Status::Fail)
                .count();
            let warns = all
                .iter()
                .filter(|(_, f)| f.status == crate::checks::Status::Warn)
                .count();
            out += &format!(
                "\nverdict: {} ({} fail, {} warn, {} checks)\n",
                status(
                    match a.verdict {
                        Verdict::Pass => "pass",
                        Verdict::Warn => "warn",
                        Verdict::Fail => "fail",
                    },
                    ctx.color
                ),
                fails,
                warns,
                all.len()
            );
            out
        }
    };
    super::emit(&text)?;
    Ok(if a.verdict == Verdict::Fail { 3 } else { 0 })
}
