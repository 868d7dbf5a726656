//! Velocity profiles: point velocity against position along each traverse line, one series per
//! line.
//!
//! Owns the profile chart of one run. Must not compute velocities. Series differ by colour, dash
//! pattern and marker shape (see [`super::colour`]), so the chart reads in greyscale. Excluded
//! points are drawn hollow in grey and not joined; every point marker carries `class="pt"`.

use super::axis;
use super::colour::{LINE_COLOURS, LINE_DASHES};
use super::svg::{esc, num, Anchor, Svg};
use crate::report::model::{ChartUnits, FieldPoint, Plane};

const WIDTH: f64 = 300.0;
const HEIGHT: f64 = 250.0;
const LABEL: &str = "#1d232a";
const GRID: &str = "#dde2e6";
const EXCLUDED: &str = "#8a8f94";
const PLOT_LEFT: f64 = 44.0;
const PLOT_RIGHT: f64 = 292.0;
const PLOT_TOP: f64 = 30.0;
const PLOT_BOTTOM: f64 = 212.0;

#[derive(Clone, Copy)]
enum Shape {
    Circle,
    Square,
    Triangle,
    Diamond,
}

const SHAPES: [Shape; 4] = [
    Shape::Circle,
    Shape::Square,
    Shape::Triangle,
    Shape::Diamond,
];

/// A marker; `counted` adds `class="pt"` (legend samples are not counted).
fn marker(svg: &mut Svg, shape: Shape, x: f64, y: f64, fill: &str, stroke: &str, counted: bool) {
    let s = 2.6;
    let class = if counted { " class=\"pt\"" } else { "" };
    let d = match shape {
        Shape::Circle => {
            svg.push(format_args!(
                "<circle{class} cx=\"{}\" cy=\"{}\" r=\"{s}\" fill=\"{fill}\" stroke=\"{stroke}\" stroke-width=\"0.9\"/>",
                num(x),
                num(y)
            ));
            return;
        }
        Shape::Square => format!(
            "M{} {} h{} v{} h{} Z",
            num(x - s),
            num(y - s),
            num(2.0 * s),
            num(2.0 * s),
            num(-2.0 * s)
        ),
        Shape::Triangle => format!(
            "M{} {} L{} {} L{} {} Z",
            num(x),
            num(y - s * 1.2),
            num(x + s * 1.1),
            num(y + s * 0.9),
            num(x - s * 1.1),
            num(y + s * 0.9)
        ),
        Shape::Diamond => format!(
            "M{} {} L{} {} L{} {} L{} {} Z",
            num(x),
            num(y - s * 1.3),
            num(x + s * 1.1),
            num(y),
            num(x),
            num(y + s * 1.3),
            num(x - s * 1.1),
            num(y)
        ),
    };
    svg.push(format_args!(
        "<path{class} d=\"{d}\" fill=\"{fill}\" stroke=\"{stroke}\" stroke-width=\"0.9\"/>"
    ));
}

/// The chart's axes: the distance along the line (display units) and the velocity range.
struct Scale {
    length: f64,
    y_lo: f64,
    y_hi: f64,
    y_ticks: Vec<f64>,
    x_ticks: Vec<f64>,
}

impl Scale {
    /// The velocity axis spans the valid points (an excluded reading, e.g. a negative one, must
    /// not squash the profiles); excluded points outside it are drawn at the edge.
    fn new(plane: &Plane, field: &[FieldPoint], units: &ChartUnits) -> Scale {
        let length = plane.line_length_m() * units.length_per_m;
        let valid_v: Vec<f64> = field
            .iter()
            .filter(|p| !p.excluded)
            .map(|p| p.velocity_m_s * units.velocity_per_m_s)
            .collect();
        let v_max = valid_v.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let v_min = valid_v.iter().copied().fold(f64::INFINITY, f64::min);
        let (v_min, v_max) = if v_min.is_finite() && v_max > v_min {
            (v_min, v_max)
        } else if v_min.is_finite() {
            (v_min - 1.0, v_max + 1.0)
        } else {
            (0.0, 1.0)
        };
        let y_ticks = axis::ticks_covering(v_min, v_max, 5);
        Scale {
            length,
            y_lo: y_ticks.first().copied().unwrap_or(v_min),
            y_hi: y_ticks.last().copied().unwrap_or(v_max),
            y_ticks,
            x_ticks: axis::ticks_within(0.0, length, 6),
        }
    }

    fn x(&self, x: f64) -> f64 {
        PLOT_LEFT + x / self.length * (PLOT_RIGHT - PLOT_LEFT)
    }

    fn y(&self, v: f64) -> f64 {
        let v = v.clamp(self.y_lo, self.y_hi);
        PLOT_BOTTOM - (v - self.y_lo) / (self.y_hi - self.y_lo) * (PLOT_BOTTOM - PLOT_TOP)
    }
}

/// The profile chart of one run as an SVG document.
pub fn profiles_svg(plane: &Plane, field: &[FieldPoint], units: &ChartUnits) -> String {
    let mut svg = Svg::new(WIDTH, HEIGHT);
    let scale = Scale::new(plane, field, units);
    axes(&mut svg, &scale, units);
    // One series per line, in plane order; legend along the top.
    svg.text(PLOT_LEFT, 17.0, 8.0, Anchor::Start, LABEL, "Line");
    let mut legend_x = PLOT_LEFT + 22.0;
    for (i, line) in plane.lines.iter().enumerate() {
        let style = SeriesStyle::nth(i);
        series(&mut svg, &scale, &line.name, field, units, &style);
        legend_x = legend_entry(&mut svg, legend_x, &line.name, &style);
    }
    if field.iter().any(|p| p.excluded) {
        svg.push(format_args!(
            "<circle cx=\"{}\" cy=\"14\" r=\"2.6\" fill=\"#ffffff\" stroke=\"{EXCLUDED}\" stroke-width=\"0.9\"/>",
            num(legend_x + 4.0)
        ));
        svg.text(legend_x + 10.0, 17.0, 8.0, Anchor::Start, LABEL, "excluded");
    }
    svg.finish()
}

/// Grid, tick labels, frame and axis titles.
fn axes(svg: &mut Svg, scale: &Scale, units: &ChartUnits) {
    let grid = format!("stroke=\"{GRID}\" stroke-width=\"0.6\"");
    let y_dec = axis::decimals_for(axis::nice_step(scale.y_hi - scale.y_lo, 5));
    for &v in &scale.y_ticks {
        let y = scale.y(v);
        svg.line(PLOT_LEFT, y, PLOT_RIGHT, y, &grid);
        svg.text(
            PLOT_LEFT - 4.0,
            y + 2.6,
            7.0,
            Anchor::End,
            LABEL,
            &axis::label(v, y_dec),
        );
    }
    let x_dec = axis::decimals_for(axis::nice_step(scale.length, 6));
    for &x in &scale.x_ticks {
        let px = scale.x(x);
        svg.line(px, PLOT_TOP, px, PLOT_BOTTOM, &grid);
        svg.text(
            px,
            PLOT_BOTTOM + 10.0,
            7.0,
            Anchor::Middle,
            LABEL,
            &axis::label(x, x_dec),
        );
    }
    svg.push(format_args!(
        "<rect x=\"{PLOT_LEFT}\" y=\"{PLOT_TOP}\" width=\"{}\" height=\"{}\" fill=\"none\" stroke=\"{LABEL}\" stroke-width=\"0.8\"/>",
        num(PLOT_RIGHT - PLOT_LEFT),
        num(PLOT_BOTTOM - PLOT_TOP)
    ));
    svg.text(
        (PLOT_LEFT + PLOT_RIGHT) / 2.0,
        HEIGHT - 8.0,
        8.0,
        Anchor::Middle,
        LABEL,
        &format!("distance from the port wall ({})", units.length),
    );
    svg.text_rotated(
        11.0,
        (PLOT_TOP + PLOT_BOTTOM) / 2.0,
        8.0,
        Anchor::Middle,
        LABEL,
        -90.0,
        &format!("velocity ({})", units.velocity),
    );
}

/// Colour, dash pattern and marker shape of the n-th series: series are told apart by more than
/// colour.
struct SeriesStyle {
    colour: &'static str,
    dash_attr: String,
    shape: Shape,
}

impl SeriesStyle {
    fn nth(i: usize) -> SeriesStyle {
        let dash = LINE_DASHES[i % LINE_DASHES.len()];
        SeriesStyle {
            colour: LINE_COLOURS[i % LINE_COLOURS.len()],
            dash_attr: if dash.is_empty() {
                String::new()
            } else {
                format!(" stroke-dasharray=\"{dash}\"")
            },
            shape: SHAPES[i % SHAPES.len()],
        }
    }
}

/// One line's points and the polyline through its valid ones.
fn series(
    svg: &mut Svg,
    scale: &Scale,
    line: &str,
    field: &[FieldPoint],
    units: &ChartUnits,
    style: &SeriesStyle,
) {
    let mut points: Vec<&FieldPoint> = field.iter().filter(|p| p.line == line).collect();
    points.sort_by(|a, b| a.position_m.total_cmp(&b.position_m));
    let coords = |p: &FieldPoint| {
        (
            scale.x(p.position_m * units.length_per_m),
            scale.y(p.velocity_m_s * units.velocity_per_m_s),
        )
    };
    let valid: Vec<String> = points
        .iter()
        .filter(|p| !p.excluded)
        .map(|p| {
            let (x, y) = coords(p);
            format!("{},{}", num(x), num(y))
        })
        .collect();
    let (colour, dash_attr) = (style.colour, &style.dash_attr);
    if valid.len() > 1 {
        svg.push(format_args!(
            "<polyline points=\"{}\" fill=\"none\" stroke=\"{colour}\" stroke-width=\"1.4\"{dash_attr}/>",
            valid.join(" ")
        ));
    }
    for p in &points {
        let (x, y) = coords(p);
        if p.excluded {
            marker(svg, style.shape, x, y, "#ffffff", EXCLUDED, true);
        } else {
            marker(svg, style.shape, x, y, colour, colour, true);
        }
    }
}

/// A legend entry (a line sample with the marker, then the line name); returns where the next
/// one starts.
fn legend_entry(svg: &mut Svg, x: f64, name: &str, style: &SeriesStyle) -> f64 {
    let ly = 14.0;
    let (colour, dash_attr) = (style.colour, &style.dash_attr);
    svg.push(format_args!(
        "<line x1=\"{}\" y1=\"{ly}\" x2=\"{}\" y2=\"{ly}\" stroke=\"{colour}\" stroke-width=\"1.4\"{dash_attr}/>",
        num(x),
        num(x + 18.0)
    ));
    marker(svg, style.shape, x + 9.0, ly, colour, colour, false);
    svg.push(format_args!(
        "<text x=\"{}\" y=\"{}\" font-size=\"8\" fill=\"{LABEL}\">{}</text>",
        num(x + 21.0),
        num(ly + 3.0),
        esc(name)
    ));
    x + 21.0 + 5.5 * name.chars().count() as f64 + 8.0
}
