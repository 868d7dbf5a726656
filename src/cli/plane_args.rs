//! Arguments that describe a plane (shared by `layout` and `init`) and their validation.

use super::choices::one_of;
use super::output::UnitsArgs;
use crate::diag::{Diagnostic, Diagnostics, Error, Location};
use crate::display::{DisplayTable, UnitSystem};
use crate::geometry::Duct;
use crate::layout::{MarkStep, Method};
use crate::survey::{ConventionId, LayoutRequest};
use crate::units::{parse_quantity, Dimension};
use clap::Args;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct PlaneArgs {
    /// Round duct or stack of this inside diameter, e.g. `60in`, `1.52m`.
    #[arg(long, value_name = "DIAMETER", conflicts_with = "rect")]
    pub round: Option<String>,
    /// Rectangular duct, inside WIDTHxHEIGHT with ports in the width side, e.g. `48inx24in`.
    #[arg(long, value_name = "WxH")]
    pub rect: Option<String>,
    /// Internal liner thickness, subtracted twice from each dimension, e.g. `1in`.
    #[arg(long, value_name = "THICKNESS")]
    pub liner: Option<String>,
    /// Layout method.
    #[arg(long, value_parser = one_of(&Method::ALL, Method::name))]
    pub method: Option<Method>,
    /// Traverse lines (diameters of a round duct, ports of a rectangular one).
    #[arg(long)]
    pub lines: Option<usize>,
    /// Total traverse points, all lines together (e.g. 12 or 24, as EPA Method 1 counts them);
    /// must divide evenly by the number of lines.
    #[arg(long)]
    pub points: Option<usize>,
    /// Port nipple plus wall thickness, added to the insertion marks, e.g. `5in`.
    #[arg(long, value_name = "LENGTH")]
    pub port_length: Option<String>,
    /// Rule book the plane is laid out for (sets the minimum point count and the wall rule).
    #[arg(long, value_parser = one_of(&ConventionId::ALL, ConventionId::name))]
    pub convention: Option<ConventionId>,
    /// Straight run from the upstream disturbance to the plane, e.g. `6.2D` or `30ft`.
    #[arg(long, value_name = "DISTANCE")]
    pub upstream: Option<String>,
    /// Straight run from the plane to the next disturbance or the exit, e.g. `3D`.
    #[arg(long, value_name = "DISTANCE")]
    pub downstream: Option<String>,
    /// Rounding of insertion marks: `1/8in`, `1mm`, `none` (default by the units shown).
    #[arg(long, value_name = "STEP")]
    pub mark_step: Option<String>,
    /// Round stacks: `radius` traverses each port's line only to the centre (large stacks, ports
    /// round the stack, e.g. `--lines 4 --reach radius`); `diameter` crosses the stack.
    #[arg(long, value_parser = ["diameter", "radius"])]
    pub reach: Option<String>,
    #[command(flatten)]
    pub units: UnitsArgs,
}

/// A validated plane description.
#[derive(Debug, Clone)]
pub struct PlaneSetting {
    pub duct: Duct,
    pub request: LayoutRequest,
    pub convention: ConventionId,
    pub upstream_d: Option<f64>,
    pub downstream_d: Option<f64>,
    pub port_length_m: f64,
    pub mark_step: MarkStep,
    pub survey_path: Option<PathBuf>,
    /// The job's own units: the convention's, EPA metric when the survey reduces in metric.
    pub job: DisplayTable,
    /// The units the plane is shown in: the job's, or what `--si` / `--units` asked for.
    pub table: DisplayTable,
}

fn flag_err(flag: &str, raw: &str, e: impl std::fmt::Display, hint: String) -> Diagnostic {
    Diagnostic::new(format!("--{flag}: {e}"))
        .at(Location::file("command line").with_context(format!("--{flag} {raw}")))
        .hint(hint)
}

fn quantity(d: &mut Diagnostics, flag: &str, raw: &str, dim: Dimension) -> Option<f64> {
    match parse_quantity(raw, dim) {
        Ok(v) => Some(v),
        Err(e) => {
            d.push(flag_err(flag, raw, &e, e.hint()));
            None
        }
    }
}

fn distance(d: &mut Diagnostics, flag: &str, raw: &str, duct: Option<&Duct>) -> Option<f64> {
    if let Ok(x) = parse_quantity(raw, Dimension::Diameters) {
        return Some(x);
    }
    let len = quantity(d, flag, raw, Dimension::Length)?;
    duct.map(|duct| len / duct.equivalent_diameter_m())
}

impl PlaneArgs {
    /// Validates the flags, starting from `survey` when one is given.
    pub fn settle(
        &self,
        survey: Option<(PathBuf, crate::input::survey::PlaneParts)>,
    ) -> Result<PlaneSetting, Error> {
        let mut d = Diagnostics::new();
        let base = survey.as_ref().map(|(_, s)| s);
        let liner = self
            .liner
            .as_deref()
            .and_then(|raw| quantity(&mut d, "liner", raw, Dimension::Length))
            .unwrap_or(0.0);
        let duct = if let Some(raw) = &self.round {
            quantity(&mut d, "round", raw, Dimension::Length).and_then(|dm| {
                Duct::round_lined(dm, liner)
                    .map_err(|e| {
                        d.push(flag_err("round", raw, e, "give the inside diameter".into()))
                    })
                    .ok()
            })
        } else if let Some(raw) = &self.rect {
            let parts: Vec<&str> = raw.split(['x', 'X', '×']).collect();
            if parts.len() != 2 {
                d.push(flag_err(
                    "rect",
                    raw,
                    "expected WIDTHxHEIGHT",
                    "write e.g. --rect 48inx24in (ports in the width side)".into(),
                ));
                None
            } else {
                let w = quantity(&mut d, "rect", parts[0], Dimension::Length);
                let h = quantity(&mut d, "rect", parts[1], Dimension::Length);
                match (w, h) {
                    (Some(w), Some(h)) => Duct::rectangular_lined(w, h, liner)
                        .map_err(|e| {
                            d.push(flag_err("rect", raw, e, "give inside dimensions".into()))
                        })
                        .ok(),
                    _ => None,
                }
            }
        } else if let Some(s) = base {
            Some(s.duct)
        } else {
            d.push(
                Diagnostic::new("no duct given")
                    .at(Location::file("command line"))
                    .hint("give a survey file, --round DIAMETER or --rect WIDTHxHEIGHT"),
            );
            None
        };
        let convention = match self.convention {
            Some(c) => c,
            None => base
                .map(|s| s.convention)
                .unwrap_or(ConventionId::EpaMethod2),
        };
        let method = match self.method {
            Some(m) => m,
            None => base
                .map(|s| s.layout.method)
                .unwrap_or(if convention.is_hvac() {
                    Method::LogTchebycheff
                } else {
                    Method::EqualArea
                }),
        };
        let lines = self.lines.or(base.and_then(|s| s.layout.lines));
        let points_per_line = match self.points {
            None => base.and_then(|s| s.layout.points_per_line),
            Some(total) => {
                let is_round = duct.as_ref().map(|d| d.is_round()).unwrap_or(true);
                let l = match (lines, is_round, method) {
                    (Some(l), _, _) => Some(l),
                    // the methods' own default line counts (layout::round)
                    (None, true, Method::EqualArea) => Some(2),
                    (None, true, _) => Some(3),
                    (None, false, _) => duct
                        .as_ref()
                        .and_then(|d| match d.shape() {
                            crate::geometry::Shape::Rectangular { width_m, height_m } => {
                                crate::layout::rect_grid_for(width_m, height_m, total)
                            }
                            _ => None,
                        })
                        .map(|(w, _)| w),
                };
                match l {
                    Some(l) if l > 0 && total % l == 0 && total > 0 => Some(total / l),
                    Some(l) => {
                        d.push(flag_err(
                            "points",
                            &total.to_string(),
                            format!("{total} points do not divide evenly over {l} lines"),
                            "give a total that is a multiple of --lines, e.g. --lines 2 --points 24".into(),
                        ));
                        None
                    }
                    None => {
                        d.push(flag_err(
                            "points",
                            &total.to_string(),
                            format!("{total} points is not an EPA Method 1 Table 1-1 grid"),
                            "give --lines as well (the ports across the width)".into(),
                        ));
                        None
                    }
                }
            }
        };
        let request = LayoutRequest {
            method,
            lines,
            points_per_line,
            reach: match self.reach.as_deref() {
                Some("radius") => crate::layout::Reach::Radius,
                Some(_) => crate::layout::Reach::Diameter,
                None => base.map(|s| s.layout.reach).unwrap_or_default(),
            },
        };
        let upstream_d = match &self.upstream {
            Some(raw) => distance(&mut d, "upstream", raw, duct.as_ref()),
            None => base.and_then(|s| s.upstream_d),
        };
        let downstream_d = match &self.downstream {
            Some(raw) => distance(&mut d, "downstream", raw, duct.as_ref()),
            None => base.and_then(|s| s.downstream_d),
        };
        let port_length_m = match &self.port_length {
            Some(raw) => quantity(&mut d, "port-length", raw, Dimension::Length).unwrap_or(0.0),
            None => base.map(|s| s.port_length_m).unwrap_or(0.0),
        };
        let epa_metric =
            convention == ConventionId::EpaMethod2 && base.is_some_and(|s| s.epa_metric);
        let job = DisplayTable::new(convention, UnitSystem::of(convention, epa_metric));
        let table = self.units.table(job);
        let mark_step = match self.mark_step.as_deref() {
            Some("none") => MarkStep::None,
            Some(raw) => match quantity(&mut d, "mark-step", raw, Dimension::Length) {
                Some(v) if v > 0.0 => MarkStep::Increment(v),
                Some(_) => {
                    d.push(flag_err(
                        "mark-step",
                        raw,
                        "must be positive",
                        "e.g. 1/8in or 1mm".into(),
                    ));
                    MarkStep::None
                }
                None => MarkStep::None,
            },
            None if table.system.is_inch_pound() => MarkStep::EIGHTH_INCH,
            None => MarkStep::MILLIMETRE,
        };
        let survey_path = survey.map(|(p, _)| p);
        match duct {
            Some(duct) if d.is_empty() => Ok(PlaneSetting {
                duct,
                request,
                convention,
                upstream_d,
                downstream_d,
                port_length_m,
                mark_step,
                survey_path,
                job,
                table,
            }),
            _ => Err(Error::Input(d)),
        }
    }
}
