//! The plane drawing: the cross-section to scale with its ports, traverse lines, numbered points
//! and dimension labels.
//!
//! Owns the drawing of one [`Plane`]. Must not compute positions: every point comes from the model
//! (placed with [`Plane::point_xy`]). Every point marker carries `class="pt"` so tests can count
//! them.

use super::svg::{num, Anchor, Svg};
use crate::report::model::{ChartUnits, LineOrientation, Plane, Shape};

const WIDTH: f64 = 360.0;
const HEIGHT: f64 = 330.0;
const WALL: &str = "#2b2f33";
const LINE: &str = "#5b6670";
const POINT: &str = "#0b4f8a";
const LABEL: &str = "#1d232a";
/// Port nipples are drawn at a fixed size so they stay visible on large stacks (not to scale).
const NIPPLE_LEN: f64 = 14.0;
const NIPPLE_WIDTH: f64 = 9.0;

/// A dimension in the job's length unit, with metres beside for an inch-pound job.
fn length_text(units: &ChartUnits, metres: f64) -> String {
    let own = format!(
        "{} {}",
        crate::display::fixed(metres * units.length_per_m, units.length_decimals),
        units.length
    );
    if units.si_beside {
        format!("{own} ({} m)", crate::display::fixed(metres, 3))
    } else {
        own
    }
}

/// The plane drawing as an SVG document.
pub fn plane_svg(plane: &Plane, units: &ChartUnits) -> String {
    match plane.shape {
        Shape::Round { diameter_m } => round(plane, units, diameter_m),
        Shape::Rectangular { width_m, height_m } => rectangular(plane, units, width_m, height_m),
    }
}

/// Numbers beside the points, alternating sides so close points near the wall stay legible.
fn point_labels(svg: &mut Svg, x: f64, y: f64, nx: f64, ny: f64, point: u32) {
    let side = if point % 2 == 1 { 1.0 } else { -1.0 };
    let (lx, ly) = (x + nx * 7.5 * side, y + ny * 7.5 * side + 2.4);
    svg.text(lx, ly, 6.5, Anchor::Middle, LABEL, &point.to_string());
}

/// A point marker; `counted` adds `class="pt"` (legend samples are not counted).
fn point_marker(svg: &mut Svg, x: f64, y: f64, adjusted: bool, counted: bool) {
    let class = if counted { " class=\"pt\"" } else { "" };
    if adjusted {
        svg.push(format_args!(
            "<circle{class} cx=\"{}\" cy=\"{}\" r=\"2.6\" fill=\"#ffffff\" stroke=\"{POINT}\" stroke-width=\"1.1\"/>",
            num(x),
            num(y)
        ));
    } else {
        svg.push(format_args!(
            "<circle{class} cx=\"{}\" cy=\"{}\" r=\"2.6\" fill=\"{POINT}\"/>",
            num(x),
            num(y)
        ));
    }
}

fn legend(svg: &mut Svg, plane: &Plane, y: f64) {
    let any_adjusted = plane
        .lines
        .iter()
        .any(|l| l.points.iter().any(|p| p.adjusted));
    point_marker(svg, 12.0, y - 2.5, false, false);
    svg.text(19.0, y, 7.5, Anchor::Start, LABEL, "traverse point");
    if any_adjusted {
        point_marker(svg, 90.0, y - 2.5, true, false);
        svg.text(97.0, y, 7.5, Anchor::Start, LABEL, "moved by the wall rule");
    }
    svg.text(WIDTH - 8.0, y, 7.5, Anchor::End, LINE, "ports not to scale");
}

fn round(plane: &Plane, units: &ChartUnits, diameter_m: f64) -> String {
    let mut svg = Svg::new(WIDTH, HEIGHT);
    let (cx, cy, r_px) = (175.0, 160.0, 112.0);
    let scale = r_px / (diameter_m / 2.0);
    svg.push(format_args!(
        "<circle cx=\"{cx}\" cy=\"{cy}\" r=\"{r_px}\" fill=\"#f3f5f7\" stroke=\"{WALL}\" stroke-width=\"2.5\"/>"
    ));
    svg.push(format_args!(
        "<circle cx=\"{cx}\" cy=\"{cy}\" r=\"1.5\" fill=\"{LINE}\"/>"
    ));
    for line in &plane.lines {
        let LineOrientation::AngleDeg(angle) = line.orientation else {
            continue;
        };
        let t = angle.to_radians();
        // Unit vector from the centre to the port, in screen coordinates (y down).
        let (ux, uy) = (t.sin(), -t.cos());
        let at = |r: f64| (cx + ux * r, cy + uy * r);
        let (x0, y0) = at(r_px + NIPPLE_LEN);
        let (x1, y1) = at(-r_px);
        svg.line(
            x0,
            y0,
            x1,
            y1,
            &format!("stroke=\"{LINE}\" stroke-width=\"0.8\" stroke-dasharray=\"5 3\""),
        );
        // Port nipple: a short rectangle outside the wall, centred on the line.
        let (px, py) = at(r_px + NIPPLE_LEN / 2.0);
        svg.push(format_args!(
            "<rect x=\"{}\" y=\"{}\" width=\"{NIPPLE_LEN}\" height=\"{NIPPLE_WIDTH}\" fill=\"#d9dee3\" stroke=\"{WALL}\" stroke-width=\"1.2\" transform=\"rotate({} {} {})\"/>",
            num(px - NIPPLE_LEN / 2.0),
            num(py - NIPPLE_WIDTH / 2.0),
            num(angle - 90.0),
            num(px),
            num(py)
        ));
        let (lx, ly) = at(r_px + NIPPLE_LEN + 11.0);
        svg.push(format_args!(
            "<text x=\"{}\" y=\"{}\" font-size=\"11\" font-weight=\"bold\" text-anchor=\"middle\" fill=\"{LABEL}\">{}</text>",
            num(lx),
            num(ly + 4.0),
            super::svg::esc(&line.name)
        ));
        // Normal to the line for the point numbers.
        let (nx, ny) = (-uy, ux);
        for p in &line.points {
            let (x, y) = plane.point_xy(line.orientation, p.position_m);
            let (sx, sy) = (cx + x * scale, cy - y * scale);
            point_labels(&mut svg, sx, sy, nx, ny, p.point);
            point_marker(&mut svg, sx, sy, p.adjusted, true);
        }
    }
    // Diameter dimension below the circle.
    let dy = cy + r_px + 24.0;
    let style = format!("stroke=\"{LABEL}\" stroke-width=\"0.7\"");
    svg.line(
        cx - r_px,
        cy,
        cx - r_px,
        dy + 4.0,
        &format!("stroke=\"{LINE}\" stroke-width=\"0.5\" stroke-dasharray=\"2 2\""),
    );
    svg.line(
        cx + r_px,
        cy,
        cx + r_px,
        dy + 4.0,
        &format!("stroke=\"{LINE}\" stroke-width=\"0.5\" stroke-dasharray=\"2 2\""),
    );
    dimension(&mut svg, cx - r_px, dy, cx + r_px, dy, &style);
    svg.text(
        cx,
        dy + 13.0,
        8.5,
        Anchor::Middle,
        LABEL,
        &format!("Ø {}", length_text(units, diameter_m)),
    );
    legend(&mut svg, plane, HEIGHT - 6.0);
    svg.finish()
}

/// A dimension line with arrowheads at both ends (horizontal or vertical).
fn dimension(svg: &mut Svg, x1: f64, y1: f64, x2: f64, y2: f64, style: &str) {
    svg.line(x1, y1, x2, y2, style);
    let (dx, dy) = (x2 - x1, y2 - y1);
    let len = (dx * dx + dy * dy).sqrt().max(1e-9);
    let (ux, uy) = (dx / len, dy / len);
    let (nx, ny) = (-uy, ux);
    for (x, y, s) in [(x1, y1, 1.0), (x2, y2, -1.0)] {
        let (bx, by) = (x + ux * 6.0 * s, y + uy * 6.0 * s);
        svg.push(format_args!(
            "<path d=\"M{} {} L{} {} L{} {} Z\" fill=\"{LABEL}\"/>",
            num(x),
            num(y),
            num(bx + nx * 2.2),
            num(by + ny * 2.2),
            num(bx - nx * 2.2),
            num(by - ny * 2.2)
        ));
    }
}

fn rectangular(plane: &Plane, units: &ChartUnits, width_m: f64, height_m: f64) -> String {
    let mut svg = Svg::new(WIDTH, HEIGHT);
    // Fit the section into the drawing area, keeping its aspect ratio.
    let (box_w, box_h) = (270.0, 210.0);
    let scale = (box_w / width_m).min(box_h / height_m);
    let (w_px, h_px) = (width_m * scale, height_m * scale);
    let (left, top) = (58.0 + (box_w - w_px) / 2.0, 52.0 + (box_h - h_px) / 2.0);
    let (cx, cy) = (left + w_px / 2.0, top + h_px / 2.0);
    svg.push(format_args!(
        "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"#f3f5f7\" stroke=\"{WALL}\" stroke-width=\"2.5\"/>",
        num(left),
        num(top),
        num(w_px),
        num(h_px)
    ));
    for line in &plane.lines {
        let LineOrientation::OffsetM(_) = line.orientation else {
            continue;
        };
        let (x, _) = plane.point_xy(line.orientation, 0.0);
        let sx = cx + x * scale;
        svg.line(
            sx,
            top - NIPPLE_LEN,
            sx,
            top + h_px,
            &format!("stroke=\"{LINE}\" stroke-width=\"0.8\" stroke-dasharray=\"5 3\""),
        );
        svg.push(format_args!(
            "<rect x=\"{}\" y=\"{}\" width=\"{NIPPLE_WIDTH}\" height=\"{NIPPLE_LEN}\" fill=\"#d9dee3\" stroke=\"{WALL}\" stroke-width=\"1.2\"/>",
            num(sx - NIPPLE_WIDTH / 2.0),
            num(top - NIPPLE_LEN)
        ));
        svg.push(format_args!(
            "<text x=\"{}\" y=\"{}\" font-size=\"11\" font-weight=\"bold\" text-anchor=\"middle\" fill=\"{LABEL}\">{}</text>",
            num(sx),
            num(top - NIPPLE_LEN - 5.0),
            super::svg::esc(&line.name)
        ));
        for p in &line.points {
            let (px, py) = plane.point_xy(line.orientation, p.position_m);
            let (sx, sy) = (cx + px * scale, cy - py * scale);
            svg.text(
                sx + 4.5,
                sy - 3.5,
                6.5,
                Anchor::Start,
                LABEL,
                &p.point.to_string(),
            );
            point_marker(&mut svg, sx, sy, p.adjusted, true);
        }
    }
    let style = format!("stroke=\"{LABEL}\" stroke-width=\"0.7\"");
    let ext = format!("stroke=\"{LINE}\" stroke-width=\"0.5\" stroke-dasharray=\"2 2\"");
    // Width below, height on the left.
    let dy = top + h_px + 16.0;
    svg.line(left, top + h_px, left, dy + 4.0, &ext);
    svg.line(left + w_px, top + h_px, left + w_px, dy + 4.0, &ext);
    dimension(&mut svg, left, dy, left + w_px, dy, &style);
    svg.text(
        cx,
        dy + 12.0,
        8.5,
        Anchor::Middle,
        LABEL,
        &format!("W {}", length_text(units, width_m)),
    );
    let dx = left - 16.0;
    svg.line(left, top, dx - 4.0, top, &ext);
    svg.line(left, top + h_px, dx - 4.0, top + h_px, &ext);
    dimension(&mut svg, dx, top, dx, top + h_px, &style);
    svg.text_rotated(
        dx - 5.0,
        cy,
        8.5,
        Anchor::Middle,
        LABEL,
        -90.0,
        &format!("H {}", length_text(units, height_m)),
    );
    legend(&mut svg, plane, HEIGHT - 6.0);
    svg.finish()
}
