//! `[survey]`, `[duct]` and `[layout]`: what the survey is and the plane it measures.

use crate::geometry::{Duct, GeometryError};
use crate::input::toml_doc::Value;
use crate::input::toml_doc::{Field, Table};
use crate::layout::Method;
use crate::survey::{Construction, ConventionId, LayoutRequest, ReferenceOverride};
use crate::units::{parse_quantity, Dimension};
use chrono::NaiveDate;

/// The descriptive part of `[survey]`.
pub struct Meta {
    pub title: String,
    pub site: Option<String>,
    pub client: Option<String>,
    pub plane: Option<String>,
    pub date: NaiveDate,
    pub reference: Option<ReferenceOverride>,
}

/// Reads `[survey]` except `convention` (read with the plane).
pub fn read_meta(t: &Table) -> Option<Meta> {
    let title = t
        .required("title", "\"Unit 4 stack, annual flow test\"")
        .and_then(|f| f.str().map(str::to_string));
    let site = t.opt_text("site");
    let client = t.opt_text("client");
    let plane = t.opt_text("plane");
    let date = t.date("date", "2026-10-14");
    let reference = t.opt_table("reference").map(|r| {
        let temperature = r.quantity_in(
            "temperature",
            Dimension::Temperature,
            crate::plausibility::REFERENCE_TEMPERATURE,
        );
        let pressure = r.quantity_in(
            "pressure",
            Dimension::Pressure,
            crate::plausibility::REFERENCE_PRESSURE,
        );
        Some(ReferenceOverride {
            temperature_k: temperature?,
            pressure_pa: pressure?,
        })
    });
    Some(Meta {
        title: title?,
        site,
        client,
        plane,
        date: date?,
        reference: match reference {
            None => None,
            Some(r) => Some(r?),
        },
    })
}

/// The plane parts of a survey (convention, duct, straight runs, port, layout request).
pub struct PlaneParts {
    pub convention: ConventionId,
    pub duct: Duct,
    pub construction: Construction,
    pub upstream_d: Option<f64>,
    pub downstream_d: Option<f64>,
    pub port_length_m: f64,
    pub liner_m: f64,
    pub layout: LayoutRequest,
    /// The survey's title, site and plane, for the blank field sheet's heading.
    pub title: String,
    pub site: Option<String>,
    pub plane: Option<String>,
    /// `[flow] epa_units = "metric"` (the sheet is printed in Method 2's metric units).
    pub epa_metric: bool,
}

/// The keys of `[survey]` [`read_meta`] reads.
pub const META_KEYS: [&str; 7] = [
    "title",
    "site",
    "client",
    "plane",
    "date",
    "reference",
    "runs_required",
];

/// Reads `[survey] convention` (from `survey`, the `[survey]` table when there is one),
/// `[duct]` and `[layout]` from the top level.
pub fn read_plane(root: &Table, survey: Option<&Table>) -> Option<PlaneParts> {
    let convention = survey.and_then(|t| {
        let choices = ConventionId::ALL.map(|c| (c.name(), c));
        t.choice("convention", &choices)
    });
    let duct = root.table("duct").and_then(|t| read_duct(&t));
    let layout = read_layout(root);
    // glanced at, not read: `[survey]`'s and `[flow]`'s own readers check them
    let text = |key: &'static str| match survey.and_then(|t| t.peek(key)) {
        Some(Value::String(s)) => Some(s.to_string()),
        _ => None,
    };
    let epa_metric = match root.peek("flow") {
        Some(Value::Table(f)) => f
            .get("epa_units")
            .is_some_and(|v| matches!(v.get_ref(), Value::String(s) if s.trim() == "metric")),
        _ => false,
    };
    let duct = duct?;
    Some(PlaneParts {
        convention: convention?,
        duct: duct.duct,
        construction: duct.construction,
        upstream_d: duct.upstream_d,
        downstream_d: duct.downstream_d,
        port_length_m: duct.port_length_m,
        liner_m: duct.liner_m,
        layout: layout?,
        title: text("title").unwrap_or_default(),
        site: text("site"),
        plane: text("plane"),
        epa_metric,
    })
}

struct DuctParts {
    duct: Duct,
    construction: Construction,
    upstream_d: Option<f64>,
    downstream_d: Option<f64>,
    port_length_m: f64,
    liner_m: f64,
}

fn read_duct(t: &Table) -> Option<DuctParts> {
    let shape = t.choice("shape", &[("round", true), ("rectangular", false)]);
    let liner_m = t.opt_quantity("liner", Dimension::Length).unwrap_or(0.0);
    let diameter = t.get("diameter");
    let (width, height) = (t.get("width"), t.get("height"));
    let duct = match shape {
        Some(true) => round_duct(t, diameter.as_ref(), liner_m),
        Some(false) => rectangular_duct(t, width.as_ref(), height.as_ref(), liner_m),
        None => None,
    };
    let construction = t.choice_or(
        "construction",
        &Construction::choices(),
        Construction::Steel,
    );
    let upstream_d = distance(t, "upstream", duct.as_ref());
    let downstream_d = distance(t, "downstream", duct.as_ref());
    let port_length_m = t
        .opt_quantity_in(
            "port_length",
            Dimension::Length,
            crate::plausibility::PORT_LENGTH,
        )
        .unwrap_or(0.0);
    Some(DuctParts {
        duct: duct?,
        construction: construction?,
        upstream_d,
        downstream_d,
        port_length_m,
        liner_m,
    })
}

fn round_duct(t: &Table, diameter: Option<&Field>, liner_m: f64) -> Option<Duct> {
    let Some(v) = diameter else {
        t.error_at(
            "shape",
            "a round duct needs `diameter` (inside diameter)".into(),
            Some("add e.g. diameter = \"96 in\" to [duct]".into()),
        );
        return None;
    };
    let dm = upper_bound(v, v.quantity(Dimension::Length)?)?;
    Duct::round_lined(dm, liner_m)
        .map_err(|e| {
            let msg = match e {
                GeometryError::NotPositive { .. } => format!(
                    "`duct.diameter` must be a positive length, found `{}`",
                    v.text()
                ),
                other => other.to_string(),
            };
            v.error(msg, Some("give the inside diameter, e.g. \"96 in\"".into()));
        })
        .ok()
}

fn rectangular_duct(
    t: &Table,
    width: Option<&Field>,
    height: Option<&Field>,
    liner_m: f64,
) -> Option<Duct> {
    let (Some(w), Some(h)) = (width, height) else {
        t.error_at(
            "shape",
            "a rectangular duct needs `width` (port side) and `height`".into(),
            Some("add e.g. width = \"48 in\" and height = \"24 in\" to [duct]".into()),
        );
        return None;
    };
    let wm = w
        .quantity(Dimension::Length)
        .and_then(|x| upper_bound(w, x));
    let hm = h
        .quantity(Dimension::Length)
        .and_then(|x| upper_bound(h, x));
    Duct::rectangular_lined(wm?, hm?, liner_m)
        .map_err(|e| {
            let (msg, at) = match e {
                GeometryError::NotPositive { what, .. } => {
                    let f = if what == "width" { w } else { h };
                    (
                        format!(
                            "`duct.{what}` must be a positive length, found `{}`",
                            f.text()
                        ),
                        f,
                    )
                }
                other => (other.to_string(), w),
            };
            at.error(
                msg,
                Some("give inside dimensions, e.g. width = \"48 in\"".into()),
            );
        })
        .ok()
}

/// A duct dimension within the plausible maximum (a non-positive one is left for the duct's
/// constructor, which words that case).
fn upper_bound(f: &Field, x: f64) -> Option<f64> {
    if x <= 0.0 {
        return Some(x);
    }
    f.within(x, crate::plausibility::DUCT_DIMENSION)
}

/// A straight run: `"6.2 D"` in diameters, or a length divided by the (equivalent) diameter.
fn distance(t: &Table, key: &'static str, duct: Option<&Duct>) -> Option<f64> {
    let f = t.get(key)?;
    if !matches!(f.value, crate::input::toml_doc::Value::String(_)) {
        f.wrong_type(
            "a distance with its unit",
            Some(format!(
                "write it in duct diameters or as a length, in quotes: {key} = \"6.2 D\" or \"30 ft\""
            )),
        );
        return None;
    }
    let text = f.text();
    if text.trim().is_empty() {
        // a straight run is written in diameters first
        return f.quantity_like(Dimension::Diameters, "6.2 D");
    }
    match parse_quantity(&text, Dimension::Diameters) {
        Ok(x) if x >= 0.0 => Some(x),
        Ok(_) => {
            f.error(format!("`{}` cannot be negative", f.path()), None);
            None
        }
        Err(_) => {
            let len = f.quantity(Dimension::Length)?;
            duct.map(|d| len / d.equivalent_diameter_m())
        }
    }
}

fn read_layout(root: &Table) -> Option<LayoutRequest> {
    let Some(l) = root.opt_table("layout") else {
        return Some(LayoutRequest {
            method: Method::EqualArea,
            lines: None,
            points_per_line: None,
            reach: crate::layout::Reach::Diameter,
        });
    };
    let methods = Method::ALL.map(|m| (m.name(), m));
    let method = l.choice_or("method", &methods, Method::EqualArea);
    let lines = l.opt_count("lines", 1..=1000);
    let points_per_line = l.opt_count("points_per_line", 1..=1000);
    let reach = l.choice_or(
        "reach",
        &[
            ("diameter", crate::layout::Reach::Diameter),
            ("radius", crate::layout::Reach::Radius),
        ],
        crate::layout::Reach::Diameter,
    );
    Some(LayoutRequest {
        reach: reach?,
        method: method?,
        lines,
        points_per_line,
    })
}
