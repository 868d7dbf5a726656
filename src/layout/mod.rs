//! Traverse point layouts: where on each line the probe tip goes, and with what weight.
//!
//! Owns the layout methods (one file each), the EPA Method 1 wall rule, the point-count advisor and
//! the probe insertion marks. A [`Layout`] that exists is valid: every point strictly inside the duct,
//! every line symmetric about the centre, every weight positive. Positions are in metres from the
//! inside of the near wall (the port side). No files, no printing, no unit parsing.

pub mod advisor;
pub mod marks;
mod rect;
mod round;
pub mod tables;
pub mod wall;

use crate::geometry::{Duct, Shape};
use std::fmt;

pub use advisor::{advise, Advice};
pub use marks::{probe_marks, MarkStep, ProbeMark};
pub use rect::table_1_1_grid;

/// The Table 1-1 grid (width × height counts) with exactly `total` points, if there is one.
pub fn rect_grid_for(width_m: f64, height_m: f64, total: usize) -> Option<(usize, usize)> {
    table_1_1_grid(width_m, height_m, total).filter(|(w, h)| w * h == total)
}
pub use wall::WallRule;

/// The rule that places the points.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Method {
    /// Centroids of equal areas (EPA Method 1; ISO 10780 / EN 15259 tangential method).
    EqualArea,
    /// Log-linear rule (ISO 3966 / ISO 5802), round ducts.
    LogLinear,
    /// Log-Tchebycheff rule (ISO 5802 round; ASHRAE 111 rectangular).
    LogTchebycheff,
}

impl Method {
    pub const ALL: [Method; 3] = [Method::EqualArea, Method::LogLinear, Method::LogTchebycheff];

    pub fn name(self) -> &'static str {
        match self {
            Method::EqualArea => "equal-area",
            Method::LogLinear => "log-linear",
            Method::LogTchebycheff => "log-tchebycheff",
        }
    }

    pub fn parse(text: &str) -> Option<Method> {
        Method::ALL.into_iter().find(|m| m.name() == text.trim())
    }
}

impl fmt::Display for Method {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// How far each traverse line reaches into a round duct.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Reach {
    /// Each port's line crosses the whole diameter (the usual traverse).
    #[default]
    Diameter,
    /// Each port's line stops at the centre: large stacks traversed from ports spaced evenly round
    /// the stack (4 ports at 90°), each covering the near half of a diameter (EPA Method 1 §11.2.1
    /// allows the points of a diameter to be reached from opposite ports; common practice on
    /// stacks too wide for one probe).
    Radius,
}

impl Reach {
    pub fn name(self) -> &'static str {
        match self {
            Reach::Diameter => "diameter",
            Reach::Radius => "radius",
        }
    }
}

/// One traverse point.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Point {
    /// Traverse line label: `A`, `B`, … in port order.
    pub line: String,
    /// Index of the line, 0-based (for lookups; labels are what users see).
    #[serde(skip)]
    pub line_index: usize,
    /// 1-based index counting from the near wall.
    pub point: usize,
    /// Distance from the inside of the near wall along the line, m.
    pub position_m: f64,
    /// `position_m` over the line's length.
    pub fraction: f64,
    /// Relative weight in the average (equal for the shipped methods).
    pub weight: f64,
    /// Moved by a wall rule.
    pub adjusted: bool,
    /// Rectangular: distance of the line from the side wall, m.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub line_offset_m: Option<f64>,
    /// Round: angle of the diameter, degrees.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub line_angle_deg: Option<f64>,
}

/// A validated set of traverse points for one plane.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Layout {
    method: Method,
    duct: Duct,
    lines: usize,
    points_per_line: usize,
    points: Vec<Point>,
    /// Where the rule's positions came from, for the report.
    source: String,
    /// Wall rule applied, if any, with its minimum distance.
    wall_rule: Option<(WallRule, f64)>,
    reach: Reach,
}

/// How to lay out a plane; counts left as `None` are chosen by the method's own rule.
#[derive(Debug, Clone, PartialEq)]
pub struct LayoutSpec {
    pub method: Method,
    pub lines: Option<usize>,
    pub points_per_line: Option<usize>,
    /// The minimum total the caller wants met when counts are chosen automatically (from the
    /// advisor), e.g. 12 or 24 under EPA Method 1.
    pub minimum_points: Option<usize>,
    pub wall_rule: Option<WallRule>,
    /// Round equal-area positions as EPA Method 1 Table 1-2 prints them (percent of the diameter
    /// to 0.1 %), so marks agree with a crew's printed table, instead of the exact centroids.
    pub printed_table: bool,
    /// Diameters, or half-diameters from ports spaced evenly round a round duct.
    pub reach: Reach,
}

impl LayoutSpec {
    pub fn new(method: Method) -> Self {
        LayoutSpec {
            method,
            lines: None,
            points_per_line: None,
            minimum_points: None,
            wall_rule: None,
            printed_table: false,
            reach: Reach::Diameter,
        }
    }
}

/// Why a layout could not be made.
#[derive(Debug, Clone, PartialEq)]
pub enum LayoutError {
    Unsupported {
        method: Method,
        shape: &'static str,
        why: String,
    },
    BadCount {
        what: &'static str,
        found: usize,
        allowed: String,
    },
    Table(tables::TableError),
    Invalid(String),
}

impl fmt::Display for LayoutError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            LayoutError::Unsupported { method, shape, why } => {
                write!(
                    f,
                    "the {method} method is not available for {shape} ducts: {why}"
                )
            }
            LayoutError::BadCount {
                what,
                found,
                allowed,
            } => write!(f, "{found} {what} cannot be laid out: {allowed}"),
            LayoutError::Table(e) => write!(f, "a position table failed its check: {e}"),
            LayoutError::Invalid(m) => write!(f, "invalid layout: {m}"),
        }
    }
}

impl std::error::Error for LayoutError {}

impl From<tables::TableError> for LayoutError {
    fn from(e: tables::TableError) -> Self {
        LayoutError::Table(e)
    }
}

/// Label for the line with 0-based index `i`: A … Z, then AA, AB …
pub fn line_label(i: usize) -> String {
    let letters = b"ABCDEFGHIJKLMNOPQRSTUVWXYZ";
    if i < 26 {
        (letters[i] as char).to_string()
    } else {
        format!(
            "{}{}",
            letters[(i / 26 - 1) % 26] as char,
            letters[i % 26] as char
        )
    }
}

/// Places the traverse points for `duct` according to `spec`.
pub fn locate_points(duct: &Duct, spec: &LayoutSpec) -> Result<Layout, LayoutError> {
    let plan = match (duct.shape(), spec.reach) {
        (Shape::Round { diameter_m }, Reach::Diameter) => round::plan(diameter_m, spec)?,
        (Shape::Round { diameter_m }, Reach::Radius) => round::plan_radii(diameter_m, spec)?,
        (Shape::Rectangular { width_m, height_m }, Reach::Diameter) => {
            rect::plan(width_m, height_m, spec)?
        }
        (Shape::Rectangular { .. }, Reach::Radius) => {
            return Err(LayoutError::Unsupported {
                method: spec.method,
                shape: "rectangular",
                why: "half-diameter traverses are for round stacks; a rectangular duct is traversed side to side"
                    .into(),
            })
        }
    };
    let mut points = Vec::with_capacity(plan.lines.len() * plan.fractions.len());
    // plan fractions are of the diameter (or side) for every reach
    let across = duct.line_length_m();
    let line_len = match spec.reach {
        Reach::Diameter => across,
        Reach::Radius => across / 2.0,
    };
    for (li, line) in plan.lines.iter().enumerate() {
        for (pi, &f) in plan.fractions.iter().enumerate() {
            points.push(Point {
                line: line_label(li),
                line_index: li,
                point: pi + 1,
                position_m: f * across,
                fraction: f * across / line_len,
                weight: 1.0,
                adjusted: false,
                line_offset_m: line.offset_m,
                line_angle_deg: line.angle_deg,
            });
        }
    }
    let wall_rule = match spec.wall_rule {
        Some(rule) => {
            let min_m = rule.minimum_distance_m(duct);
            wall::apply(rule, duct, &mut points, line_len);
            Some((rule, min_m))
        }
        None => None,
    };
    Layout::new(
        spec.method,
        *duct,
        plan.lines.len(),
        plan.fractions.len(),
        points,
        plan.source,
        wall_rule,
    )
    .map(|l| l.with_reach(spec.reach))
    .and_then(Layout::check_reach)
}

/// A traverse line as a method places it.
#[derive(Debug, Clone, Copy, PartialEq)]
struct LinePlacement {
    offset_m: Option<f64>,
    angle_deg: Option<f64>,
}

/// What a method file returns: the lines and the fractions along each line.
#[derive(Debug, Clone, PartialEq)]
struct Plan {
    lines: Vec<LinePlacement>,
    fractions: Vec<f64>,
    source: String,
}

impl Layout {
    /// Builds a layout from points, checking the invariants every layout obeys.
    pub fn new(
        method: Method,
        duct: Duct,
        lines: usize,
        points_per_line: usize,
        points: Vec<Point>,
        source: String,
        wall_rule: Option<(WallRule, f64)>,
    ) -> Result<Layout, LayoutError> {
        if lines == 0 || points_per_line == 0 || points.len() != lines * points_per_line {
            return Err(LayoutError::Invalid(format!(
                "{} points do not make {lines} lines of {points_per_line}",
                points.len()
            )));
        }
        let len = duct.line_length_m();
        let tol = 1e-9 * len;
        for line in 0..lines {
            let pts = &points[line * points_per_line..(line + 1) * points_per_line];
            for (i, p) in pts.iter().enumerate() {
                if p.line_index != line || p.point != i + 1 {
                    return Err(LayoutError::Invalid(format!(
                        "points of line {} are out of order",
                        line_label(line)
                    )));
                }
                if !(p.position_m > 0.0 && p.position_m < len) {
                    return Err(LayoutError::Invalid(format!(
                        "line {} point {} at {} m is not inside the duct",
                        p.line, p.point, p.position_m
                    )));
                }
                if !(p.weight.is_finite() && p.weight > 0.0) {
                    return Err(LayoutError::Invalid(format!(
                        "line {} point {} has weight {}",
                        p.line, p.point, p.weight
                    )));
                }
                if i > 0 && p.position_m < pts[i - 1].position_m - tol {
                    return Err(LayoutError::Invalid(format!(
                        "line {} point {} is nearer the wall than point {}",
                        p.line,
                        p.point,
                        p.point - 1
                    )));
                }
                let mirror = &pts[points_per_line - 1 - i];
                // half-diameter lines are checked by `check_reach` (opposite lines pair up)
                let half = 2.0 * pts[points_per_line - 1].position_m < len;
                if !half && (p.position_m + mirror.position_m - len).abs() > 1e-6 * len {
                    return Err(LayoutError::Invalid(format!(
                        "line {} is not symmetric at point {}",
                        p.line, p.point
                    )));
                }
            }
        }
        Ok(Layout {
            method,
            duct,
            lines,
            points_per_line,
            points,
            source,
            wall_rule,
            reach: Reach::Diameter,
        })
    }

    /// The layout with its lines reaching `reach` (checked by [`Layout::check_reach`]).
    fn with_reach(mut self, reach: Reach) -> Layout {
        self.reach = reach;
        self
    }

    /// Half-diameter lines: an even number of ports spaced evenly round the stack (so opposite
    /// lines make whole diameters), every point between the near wall and the centre.
    fn check_reach(self) -> Result<Layout, LayoutError> {
        if self.reach == Reach::Diameter {
            return Ok(self);
        }
        let r = self.duct.line_length_m() / 2.0;
        if self.lines < 2 || !self.lines.is_multiple_of(2) {
            return Err(LayoutError::BadCount {
                what: "half-diameter lines",
                found: self.lines,
                allowed: "ports spaced evenly round the stack in opposite pairs (2, 4, 6 or 8)"
                    .into(),
            });
        }
        if let Some(p) = self.points.iter().find(|p| p.position_m >= r) {
            return Err(LayoutError::Invalid(format!(
                "line {} point {} at {} m is past the centre of a half-diameter line",
                p.line, p.point, p.position_m
            )));
        }
        Ok(self)
    }

    pub fn method(&self) -> Method {
        self.method
    }
    pub fn duct(&self) -> &Duct {
        &self.duct
    }
    pub fn lines(&self) -> usize {
        self.lines
    }
    pub fn points_per_line(&self) -> usize {
        self.points_per_line
    }
    pub fn points(&self) -> &[Point] {
        &self.points
    }
    pub fn total_points(&self) -> usize {
        self.points.len()
    }
    pub fn source(&self) -> &str {
        &self.source
    }
    pub fn wall_rule(&self) -> Option<(WallRule, f64)> {
        self.wall_rule
    }
    /// Whether lines cross the diameter or stop at the centre.
    pub fn reach(&self) -> Reach {
        self.reach
    }
    /// Length of each traverse line: the diameter (or side), or the radius for half-diameter lines.
    pub fn line_length_m(&self) -> f64 {
        match self.reach {
            Reach::Diameter => self.duct.line_length_m(),
            Reach::Radius => self.duct.line_length_m() / 2.0,
        }
    }
    /// Labels of the lines in order.
    pub fn line_labels(&self) -> Vec<String> {
        (0..self.lines).map(line_label).collect()
    }
    /// The point on line `line` (label) with 1-based index `point`.
    pub fn find(&self, line: &str, point: usize) -> Option<&Point> {
        let li = (0..self.lines).find(|&i| line_label(i) == line)?;
        if point == 0 || point > self.points_per_line {
            return None;
        }
        self.points.get(li * self.points_per_line + point - 1)
    }

    /// Cartesian position of a point in the cross-section, m: origin at the centre of a round duct
    /// (port of line at angle θ sits at (R cos θ, R sin θ)); origin at the lower left corner of a
    /// rectangular duct, ports in the top side.
    pub fn xy_m(&self, p: &Point) -> (f64, f64) {
        match self.duct.shape() {
            Shape::Round { diameter_m } => {
                let r = diameter_m / 2.0;
                let th = p.line_angle_deg.unwrap_or(0.0).to_radians();
                let s = r - p.position_m;
                (s * th.cos(), s * th.sin())
            }
            Shape::Rectangular { height_m, .. } => {
                (p.line_offset_m.unwrap_or(0.0), height_m - p.position_m)
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    const IN: f64 = 0.0254;

    #[test]
    fn labels() {
        assert_eq!(line_label(0), "A");
        assert_eq!(line_label(25), "Z");
        assert_eq!(line_label(26), "AA");
    }

    #[test]
    fn find_and_xy() {
        let duct = Duct::round(1.0).unwrap();
        let mut spec = LayoutSpec::new(Method::EqualArea);
        spec.lines = Some(2);
        spec.points_per_line = Some(4);
        let l = locate_points(&duct, &spec).unwrap();
        let p = l.find("B", 1).unwrap();
        assert_eq!(p.line_angle_deg, Some(90.0));
        let (x, y) = l.xy_m(p);
        // B1 is nearest the port at 90°: x ≈ 0, y = R - 0.067 D
        assert!(x.abs() < 1e-12);
        assert!((y - (0.5 - p.position_m)).abs() < 1e-12);
        assert!(l.find("C", 1).is_none());
        assert!(l.find("A", 5).is_none());
    }

    proptest! {
        /// house-style invariant: positions symmetric and strictly inside the duct, for every method
        /// and shape that accepts the counts.
        #[test]
        fn layouts_are_symmetric_and_inside(
            d_in in 12.0f64..240.0,
            w_in in 8.0f64..200.0,
            h_in in 8.0f64..200.0,
            method in 0usize..3,
            epa in any::<bool>(),
        ) {
            let method = Method::ALL[method];
            for duct in [Duct::round(d_in * IN).unwrap(), Duct::rectangular(w_in * IN, h_in * IN).unwrap()] {
                let mut spec = LayoutSpec::new(method);
                if epa { spec.wall_rule = Some(WallRule::EpaMethod1); }
                let Ok(l) = locate_points(&duct, &spec) else { continue };
                let len = duct.line_length_m();
                for p in l.points() {
                    prop_assert!(p.position_m > 0.0 && p.position_m < len);
                    let m = l.find(&p.line, l.points_per_line() + 1 - p.point).unwrap();
                    prop_assert!((p.position_m + m.position_m - len).abs() < 1e-9 * len);
                }
            }
        }
    }
}
