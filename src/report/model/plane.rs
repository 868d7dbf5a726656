//! The measurement plane as pages show it: shape, dimensions, traverse lines and every point with
//! its probe mark. Shared by the test report and the blank field data sheet.

use serde::Serialize;

use super::{ModelError, Quantity, Status};

/// The measurement plane: shape, dimensions, traverse lines and every point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Plane {
    pub shape: Shape,
    /// In words, e.g. `Round stack, 40.00 in inside diameter`.
    pub description: String,
    /// Dimensions table: inside diameter or sides, area, port length, construction …
    pub dimensions: Vec<Quantity>,
    /// Layout method in words, e.g. `Equal-area (centroids of equal areas)`.
    pub method: String,
    /// Where the method's positions come from, e.g. `EPA Method 1, Table 1-2`.
    pub method_source: String,
    /// Points used, e.g. `24 (2 lines × 12)`.
    pub point_count: String,
    /// Points required and by which rule, e.g. `≥ 12 points (EPA Method 1 …)`.
    pub points_required: String,
    pub point_count_status: Status,
    /// Straight runs against their requirement, as the straight-run check judged them.
    pub straight_runs: Vec<StraightRun>,
    /// Traverse lines in layout order (A, B, …).
    pub lines: Vec<TraverseLine>,
    /// How probe marks are written, e.g. `inches and eighths, from the outer end of the port`.
    pub marks_note: String,
}

/// Inside dimensions of the plane, for drawing. Rectangular: the ports are in the `width_m` side
/// and the points of a line run along `height_m` (as `annulus layout --rect WxH`).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Shape {
    Round { diameter_m: f64 },
    Rectangular { width_m: f64, height_m: f64 },
}

/// A straight run upstream or downstream of the plane, against its requirement.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct StraightRun {
    pub label: String,
    pub value: String,
    pub requirement: String,
    pub status: Status,
}

/// Where a traverse line lies in the cross-section.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum LineOrientation {
    /// Round duct: a diameter whose port sits on the wall at this angle, measured clockwise from
    /// the top of the drawing; the probe travels through the centre to the far wall.
    AngleDeg(f64),
    /// Rectangular duct: a line entering through the top (`width_m`) side at this distance from the
    /// left side wall, running down along the height.
    OffsetM(f64),
}

/// One traverse line (a port and the points reached through it).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TraverseLine {
    /// Line name as in the readings CSV, e.g. `A`.
    pub name: String,
    /// Port in words, e.g. `Port A`.
    pub port: String,
    pub orientation: LineOrientation,
    /// Orientation in words, e.g. `0°` or `4.80 in from the left wall`.
    pub orientation_text: String,
    /// Length of the line inside the duct, e.g. `40.00 in`.
    pub length: String,
    pub points: Vec<PointPosition>,
}

/// A traverse point on a line.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PointPosition {
    /// Counts from the near (port) wall starting at 1.
    pub point: u32,
    /// Distance from the inside of the near wall along the line.
    pub position_m: f64,
    /// `position_m` as printed, e.g. `1.00 in`.
    pub position: String,
    /// Position as a fraction of the line length, e.g. `2.5 %`.
    pub fraction: String,
    /// Probe mark (position plus port length, rounded to the marking step), e.g. `6 1/8 in`.
    pub insertion: String,
    /// Moved by a wall rule.
    pub adjusted: bool,
}

impl Plane {
    /// Places a point of a line in the cross-section, origin at the centre, `x` right and `y` up.
    ///
    /// Round: the port of a line at angle θ (clockwise from the top) sits on the wall at `R·(sin θ,
    /// cos θ)`; a point `p` from that wall lies at `(R − p)·(sin θ, cos θ)`, so points past the
    /// centre land on the opposite side. Rectangular: the line enters the top side at `offset` from
    /// the left wall and a point lies `p` below the top wall.
    pub fn point_xy(&self, orientation: LineOrientation, position_m: f64) -> (f64, f64) {
        match (self.shape, orientation) {
            (Shape::Round { diameter_m }, LineOrientation::AngleDeg(angle)) => {
                let r = diameter_m / 2.0 - position_m;
                let t = angle.to_radians();
                (r * t.sin(), r * t.cos())
            }
            (Shape::Rectangular { width_m, height_m }, LineOrientation::OffsetM(offset)) => {
                (offset - width_m / 2.0, height_m / 2.0 - position_m)
            }
            // A mismatched pair is rejected by `validate`; place it somewhere harmless.
            (Shape::Round { diameter_m }, LineOrientation::OffsetM(offset)) => {
                (offset - diameter_m / 2.0, diameter_m / 2.0 - position_m)
            }
            (Shape::Rectangular { height_m, .. }, LineOrientation::AngleDeg(_)) => {
                (0.0, height_m / 2.0 - position_m)
            }
        }
    }

    /// The line with this name.
    pub fn line(&self, name: &str) -> Option<&TraverseLine> {
        self.lines.iter().find(|l| l.name == name)
    }

    /// Length of a traverse line inside the duct (diameter, or height for a rectangle).
    pub fn line_length_m(&self) -> f64 {
        match self.shape {
            Shape::Round { diameter_m } => diameter_m,
            Shape::Rectangular { height_m, .. } => height_m,
        }
    }

    pub(crate) fn validate(&self) -> Result<(), ModelError> {
        let dims: &[(&'static str, f64)] = match &self.shape {
            Shape::Round { diameter_m } => &[("diameter_m", *diameter_m)],
            Shape::Rectangular { width_m, height_m } => {
                &[("width_m", *width_m), ("height_m", *height_m)]
            }
        };
        for &(what, value) in dims {
            if !(value.is_finite() && value > 0.0) {
                return Err(ModelError::BadNumber {
                    what: format!("plane.shape.{what}"),
                    value,
                });
            }
        }
        if self.lines.is_empty() {
            return Err(ModelError::Empty {
                what: "plane.lines".into(),
            });
        }
        let mut names = std::collections::BTreeSet::new();
        for line in &self.lines {
            if !names.insert(line.name.as_str()) {
                return Err(ModelError::Duplicate {
                    what: "traverse line".into(),
                    name: line.name.clone(),
                });
            }
            self.validate_line(line)?;
        }
        Ok(())
    }

    fn validate_line(&self, line: &TraverseLine) -> Result<(), ModelError> {
        let ok = match (self.shape, line.orientation) {
            (Shape::Round { .. }, LineOrientation::AngleDeg(a)) => a.is_finite(),
            (Shape::Rectangular { width_m, .. }, LineOrientation::OffsetM(o)) => {
                o.is_finite() && (0.0..=width_m).contains(&o)
            }
            _ => false,
        };
        if !ok {
            return Err(ModelError::BadLine {
                line: line.name.clone(),
                reason: "orientation does not fit the shape (round needs angle_deg, \
                         rectangular needs offset_m within the width)",
            });
        }
        for p in &line.points {
            if !(p.position_m.is_finite()
                && p.position_m >= 0.0
                && p.position_m <= self.line_length_m())
            {
                return Err(ModelError::BadNumber {
                    what: format!("plane.lines[{}].points[{}].position_m", line.name, p.point),
                    value: p.position_m,
                });
            }
        }
        Ok(())
    }
}
