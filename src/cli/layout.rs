//! `annulus layout`: point positions, probe marks, and the count the rule books ask for.

use super::output::{csv_text, json_text, paragraph, Ctx, Format, Table};
use super::plane_args::{PlaneArgs, PlaneSetting};
use crate::diag::Error;
use crate::display::{DisplayTable, Kind};
use crate::geometry::Shape;
use crate::layout::advisor::{Requirement, SiteRating};
use crate::layout::{probe_marks, Point, ProbeMark};
use crate::plane::{lay_out, Plane};
use clap::Args;
use serde::Serialize;
use std::path::{Path, PathBuf};

#[derive(Debug, Args)]
pub struct LayoutArgs {
    /// A survey file to take the plane from (flags override its values).
    pub survey: Option<PathBuf>,
    #[command(flatten)]
    pub plane: PlaneArgs,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Also write the blank field data sheet as a PDF: a file, a folder (named after the
    /// survey), or `-` for standard output (the table is then not printed).
    #[arg(long, value_name = "OUT.pdf")]
    pub pdf: Option<PathBuf>,
}

#[derive(Serialize)]
struct JsonPoint<'a> {
    line: &'a str,
    point: usize,
    position_m: f64,
    fraction: f64,
    insertion_m: f64,
    mark_m: f64,
    weight: f64,
    adjusted: bool,
    #[serde(skip_serializing_if = "Option::is_none")]
    line_offset_m: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    line_angle_deg: Option<f64>,
}

/// A rule book's minimum, its words in the job's units.
#[derive(Serialize)]
struct JsonRequirement {
    framework: &'static str,
    minimum_points: Option<usize>,
    site: SiteRating,
    confirmed: bool,
    basis: String,
}

impl JsonRequirement {
    fn new(r: &Requirement, table: &DisplayTable) -> JsonRequirement {
        JsonRequirement {
            framework: r.framework,
            minimum_points: r.minimum_points,
            site: r.site,
            confirmed: r.confirmed,
            basis: r.basis.render(table),
        }
    }
}

#[derive(Serialize)]
struct JsonAdvice {
    epa_method_1: JsonRequirement,
    en_15259: JsonRequirement,
    hvac: JsonRequirement,
}

#[derive(Serialize)]
struct JsonLayout<'a> {
    area_m2: f64,
    method: &'a str,
    source: &'a str,
    convention: &'a str,
    lines: usize,
    points_per_line: usize,
    required_points: Option<usize>,
    wall_rule: Option<String>,
    advice: JsonAdvice,
    points: Vec<JsonPoint<'a>>,
}

/// Loads a survey file for its plane only: readings and the other sections may still be blank.
pub(crate) fn survey_only(
    path: &std::path::Path,
) -> Result<crate::input::survey::PlaneParts, Error> {
    let name = path.display().to_string();
    let (_, text) = crate::input::read_text(path, &name, crate::limits::FileKind::Survey)?;
    crate::input::survey::parse_plane(&name, &text)
}

pub(crate) fn plane_for(setting: &PlaneSetting) -> Result<Plane, Error> {
    lay_out(
        &setting.duct,
        &setting.request,
        setting.convention,
        setting.upstream_d,
        setting.downstream_d,
    )
    .map_err(|e| {
        Error::input(
            crate::diag::Diagnostic::new(format!("cannot lay out this plane: {e}"))
                .hint("see `annulus layout --help` for the counts each method takes"),
        )
    })
}

pub fn run(args: LayoutArgs, ctx: &Ctx) -> Result<i32, Error> {
    let survey = match &args.survey {
        Some(p) => Some((p.clone(), survey_only(p)?)),
        None => None,
    };
    let names = survey
        .as_ref()
        .map(|(_, p)| super::fieldsheet::SheetNames::of(p));
    let inputs: Vec<PathBuf> = args.survey.iter().cloned().collect();
    let pdf = match &args.pdf {
        Some(o) => {
            let named_after = args.survey.as_deref().unwrap_or(Path::new("field-sheet"));
            Some(super::files::destination(o, named_after, &inputs)?)
        }
        None => None,
    };
    let setting = args.plane.settle(survey)?;
    let plane = plane_for(&setting)?;
    let marks = probe_marks(&plane.layout, setting.port_length_m, setting.mark_step);
    let text = match args.format {
        Format::Json => json_text(&json(&setting, &plane, &marks)),
        Format::Csv => csv(&plane, &marks, &setting.table),
        Format::Table => table(&setting, &plane, &marks, ctx),
    };
    // the PDF on standard output is the whole output
    if !pdf.as_ref().is_some_and(|d| d.is_stdout()) {
        super::emit(&text)?;
    }
    if let Some(out) = &pdf {
        super::fieldsheet::write(out, &inputs, &setting, &plane, &marks, names.as_ref())?;
        if !ctx.quiet {
            eprintln!("wrote field data sheet {out}");
        }
    }
    Ok(0)
}

fn json<'a>(s: &'a PlaneSetting, plane: &'a Plane, marks: &'a [ProbeMark]) -> JsonLayout<'a> {
    let l = &plane.layout;
    JsonLayout {
        area_m2: l.duct().area_m2(),
        method: l.method().name(),
        source: l.source(),
        convention: s.convention.name(),
        lines: l.lines(),
        points_per_line: l.points_per_line(),
        required_points: plane.required_points,
        wall_rule: l
            .wall_rule()
            .map(|(r, m)| format!("{} ({:.4} m from the wall)", r.citation(), m)),
        advice: {
            // numbers in the keys stay SI; the sentences are in the job's units
            let job = s.job;
            let a = &plane.advice;
            JsonAdvice {
                epa_method_1: JsonRequirement::new(&a.epa_method_1, &job),
                en_15259: JsonRequirement::new(&a.en_15259, &job),
                hvac: JsonRequirement::new(&a.hvac, &job),
            }
        },
        points: l
            .points()
            .iter()
            .zip(marks)
            .map(|(p, m)| JsonPoint {
                line: &p.line,
                point: p.point,
                position_m: p.position_m,
                fraction: p.fraction,
                insertion_m: m.insertion_m,
                mark_m: m.mark_m,
                weight: p.weight,
                adjusted: p.adjusted,
                line_offset_m: p.line_offset_m,
                line_angle_deg: p.line_angle_deg,
            })
            .collect(),
    }
}

/// The points as CSV, lengths in the screen's units (the unit in each header).
fn csv(plane: &Plane, marks: &[ProbeMark], table: &DisplayTable) -> String {
    let pos = table.get(Kind::Position);
    let rows: Vec<Vec<String>> = plane
        .layout
        .points()
        .iter()
        .zip(marks)
        .map(|(p, m): (&Point, &ProbeMark)| {
            vec![
                p.line.clone(),
                p.point.to_string(),
                pos.csv(p.position_m),
                format!("{:.6}", p.fraction),
                pos.csv(m.insertion_m),
                pos.csv(m.mark_m),
                format!("{}", p.weight),
                p.adjusted.to_string(),
            ]
        })
        .collect();
    csv_text(
        &[
            "line",
            "point",
            &pos.header("position"),
            "fraction",
            &pos.header("insertion"),
            &pos.header("mark"),
            "weight",
            "adjusted",
        ],
        &rows,
    )
}

fn table(s: &PlaneSetting, plane: &Plane, marks: &[ProbeMark], ctx: &Ctx) -> String {
    let l = &plane.layout;
    let t = &s.table;
    let length = |m: f64| t.format(Kind::Length, m);
    let mut out = String::new();
    let shape = match l.duct().shape() {
        Shape::Round { diameter_m } => format!("round, {} inside diameter", length(diameter_m)),
        Shape::Rectangular { width_m, height_m } => format!(
            "rectangular, {} wide (port side) × {} high",
            length(width_m),
            length(height_m)
        ),
    };
    out += &format!("plane      {shape}\n");
    out += &format!("area       {}\n", t.format(Kind::Area, l.duct().area_m2()));
    out += &paragraph(
        "method     ",
        &format!(
            "{} — {} lines × {} points = {} ({})",
            l.method(),
            l.lines(),
            l.points_per_line(),
            l.total_points(),
            l.source()
        ),
        ctx.width,
    );
    if let Some((rule, min)) = l.wall_rule() {
        out += &format!(
            "wall rule  {}: no point nearer the wall than {}\n",
            rule.citation(),
            t.quote(Kind::Length, min)
        );
    }
    let req = match plane.required_points {
        Some(n) => format!("{n}"),
        None => "not set by the rule book".into(),
    };
    out += &format!("required   {req} under {}\n", s.convention.name());
    if !ctx.quiet {
        for r in [
            &plane.advice.epa_method_1,
            &plane.advice.en_15259,
            &plane.advice.hvac,
        ] {
            out += &paragraph(
                &format!("  {:<20} ", r.framework),
                &r.basis.render(t),
                ctx.width,
            );
        }
    }
    if let Some(n) = plane.required_points {
        if l.total_points() < n {
            out += &format!(
                "warning: {} points chosen, {} required — add points or lines\n",
                l.total_points(),
                n
            );
        }
    }
    out.push('\n');
    let pos = t.get(Kind::Position);
    let mut table = Table::new(&[
        "line",
        "point",
        "% of line",
        &format!("from wall [{}]", pos.symbol),
        &format!("mark [{}]", pos.symbol),
        "note",
    ])
    .right(&[1, 2, 3, 4])
    .wrap(&[5]);
    for (p, m) in l.points().iter().zip(marks) {
        table.row(vec![
            p.line.clone(),
            p.point.to_string(),
            crate::display::fixed(p.fraction * 100.0, 1),
            pos.number(p.position_m),
            pos.number(m.mark_m),
            if p.adjusted {
                "adjusted to the wall limit".into()
            } else {
                String::new()
            },
        ]);
    }
    out += &table.fit(ctx.width);
    if !ctx.quiet {
        out += "\nMarks add the port length; measure from the outer end of the port nipple.\n";
    }
    out
}
