//! The velocity colour map of the cross-section, with its scale bar.
//!
//! Owns the map of one run's point velocities. Must not compute velocities: it draws the model's
//! [`FieldPoint`]s. Every measured point gets a marker with `class="pt"` (excluded points a cross).
//!
//! **Round ducts — radial/angular interpolation.** The points of a traverse lie on diameters, i.e.
//! on rays from the centre at a few angles. The map is painted on a polar grid; at a cell centre
//! (r, φ) the velocity is interpolated linearly in r along each of the two rays that bracket φ,
//! then linearly in angle between those rays. Beyond the outermost point of a ray the value is held
//! (no extrapolation into the wall layer); between the centre and the innermost point it runs
//! linearly from the centre value, which is the mean of the innermost valid point of every ray (or
//! of any point at the centre). This follows the geometry of the measurement — velocity profiles in
//! round ducts vary mostly with radius — and, unlike inverse-distance weighting, does not pull the
//! map toward the nearest line between lines. Excluded points take no part.
//!
//! **Rectangular ducts — cells.** Each point owns the sub-rectangle bounded by the midpoints to its
//! neighbours (the wall at the edges), filled with its own velocity and labelled with it; an
//! excluded point's cell is grey. Nothing is interpolated, so the map shows exactly what was
//! measured.
//!
//! All runs of a report share one [`ColourScale`] so their maps compare directly.

use super::axis;
use super::colour::{hex, text_on, viridis, VIRIDIS_STOPS};
use super::svg::{num, Anchor, Svg};
use crate::report::model::{ChartUnits, FieldPoint, Plane, Shape};

const WIDTH: f64 = 300.0;
const HEIGHT: f64 = 250.0;
const LABEL: &str = "#1d232a";
const WALL: &str = "#2b2f33";
/// Polar grid of the round map: rings × sectors (4° sectors).
const RINGS: usize = 32;
const SECTORS: usize = 90;
/// Colour levels after quantising; neighbouring polar cells of one level are merged into one path.
const LEVELS: f64 = 96.0;

/// The velocity range the colour map spans, in m/s.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ColourScale {
    pub min_m_s: f64,
    pub max_m_s: f64,
}

impl ColourScale {
    /// The range of the valid (not excluded) points of all the given fields; a range of zero width
    /// is widened by ±5 % (or ±0.1 m/s at zero) so the map still has a scale.
    pub fn spanning<'a>(fields: impl IntoIterator<Item = &'a [FieldPoint]>) -> ColourScale {
        let mut lo = f64::INFINITY;
        let mut hi = f64::NEG_INFINITY;
        for field in fields {
            for p in field
                .iter()
                .filter(|p| !p.excluded && p.velocity_m_s.is_finite())
            {
                lo = lo.min(p.velocity_m_s);
                hi = hi.max(p.velocity_m_s);
            }
        }
        if !(lo.is_finite() && hi.is_finite()) {
            return ColourScale {
                min_m_s: 0.0,
                max_m_s: 1.0,
            };
        }
        if hi - lo < 1e-9 {
            let pad = if lo.abs() > 1e-9 {
                lo.abs() * 0.05
            } else {
                0.1
            };
            lo -= pad;
            hi += pad;
        }
        ColourScale {
            min_m_s: lo,
            max_m_s: hi,
        }
    }

    fn t(&self, v: f64) -> f64 {
        (v - self.min_m_s) / (self.max_m_s - self.min_m_s)
    }
}

/// The colour map of one run as an SVG document.
pub fn velocity_map_svg(
    plane: &Plane,
    field: &[FieldPoint],
    units: &ChartUnits,
    scale: ColourScale,
) -> String {
    let mut svg = Svg::new(WIDTH, HEIGHT);
    match plane.shape {
        Shape::Round { diameter_m } => round_map(&mut svg, field, diameter_m, scale),
        Shape::Rectangular { width_m, height_m } => {
            rect_map(&mut svg, field, units, width_m, height_m, scale)
        }
    }
    scale_bar(&mut svg, units, scale);
    svg.finish()
}

/// A ray from the centre with its samples (radius in m, velocity in m/s), sorted by radius.
struct Ray {
    angle: f64,
    samples: Vec<(f64, f64)>,
}

/// Angle clockwise from the top of the drawing, in [0, 2π).
fn compass(x: f64, y: f64) -> f64 {
    let a = x.atan2(y);
    if a < 0.0 {
        a + std::f64::consts::TAU
    } else {
        a
    }
}

struct RadialField {
    rays: Vec<Ray>,
    centre: f64,
}

impl RadialField {
    fn new(field: &[FieldPoint], radius_m: f64) -> Option<RadialField> {
        let eps = radius_m * 1e-6;
        let mut rays: Vec<Ray> = Vec::new();
        let mut centre_samples = Vec::new();
        for p in field.iter().filter(|p| !p.excluded) {
            let r = p.x_m.hypot(p.y_m);
            if r < eps {
                centre_samples.push(p.velocity_m_s);
                continue;
            }
            let angle = compass(p.x_m, p.y_m);
            // Points of one line on one side share an angle up to rounding.
            match rays
                .iter_mut()
                .find(|ray| angular_gap(ray.angle, angle) < 1e-3)
            {
                Some(ray) => ray.samples.push((r, p.velocity_m_s)),
                None => rays.push(Ray {
                    angle,
                    samples: vec![(r, p.velocity_m_s)],
                }),
            }
        }
        if rays.is_empty() && centre_samples.is_empty() {
            return None;
        }
        for ray in &mut rays {
            ray.samples.sort_by(|a, b| a.0.total_cmp(&b.0));
        }
        rays.sort_by(|a, b| a.angle.total_cmp(&b.angle));
        let centre = if centre_samples.is_empty() {
            let inner: Vec<f64> = rays.iter().map(|r| r.samples[0].1).collect();
            inner.iter().sum::<f64>() / inner.len() as f64
        } else {
            centre_samples.iter().sum::<f64>() / centre_samples.len() as f64
        };
        Some(RadialField { rays, centre })
    }

    fn along(&self, ray: &Ray, r: f64) -> f64 {
        let s = &ray.samples;
        let (r0, v0) = s[0];
        if r <= r0 {
            return self.centre + (v0 - self.centre) * (r / r0);
        }
        for pair in s.windows(2) {
            let ((ra, va), (rb, vb)) = (pair[0], pair[1]);
            if r <= rb {
                let f = if rb - ra > 0.0 {
                    (r - ra) / (rb - ra)
                } else {
                    0.0
                };
                return va + (vb - va) * f;
            }
        }
        s[s.len() - 1].1
    }

    fn at(&self, r: f64, angle: f64) -> f64 {
        let n = self.rays.len();
        if n == 0 {
            return self.centre;
        }
        if n == 1 {
            return self.along(&self.rays[0], r);
        }
        // The rays are sorted by angle; find the pair bracketing `angle` (wrapping past 2π).
        let next = self
            .rays
            .iter()
            .position(|ray| ray.angle > angle)
            .unwrap_or(0);
        let prev = (next + n - 1) % n;
        let (a, b) = (&self.rays[prev], &self.rays[next]);
        let span = forward_gap(a.angle, b.angle);
        let f = if span > 0.0 {
            forward_gap(a.angle, angle) / span
        } else {
            0.0
        };
        let (va, vb) = (self.along(a, r), self.along(b, r));
        va + (vb - va) * f
    }
}

/// Angle turned clockwise (the drawing's positive direction) from `from` to `to`, in [0, 2π).
fn forward_gap(from: f64, to: f64) -> f64 {
    (to - from).rem_euclid(std::f64::consts::TAU)
}

fn angular_gap(a: f64, b: f64) -> f64 {
    let d = forward_gap(a, b);
    d.min(std::f64::consts::TAU - d)
}

fn marker(svg: &mut Svg, x: f64, y: f64, excluded: bool) {
    if excluded {
        svg.push(format_args!(
            "<path class=\"pt\" d=\"M{} {} L{} {} M{} {} L{} {}\" stroke=\"#c0392b\" stroke-width=\"1.4\"/>",
            num(x - 3.0),
            num(y - 3.0),
            num(x + 3.0),
            num(y + 3.0),
            num(x - 3.0),
            num(y + 3.0),
            num(x + 3.0),
            num(y - 3.0)
        ));
    } else {
        svg.push(format_args!(
            "<circle class=\"pt\" cx=\"{}\" cy=\"{}\" r=\"1.9\" fill=\"#ffffff\" stroke=\"#111111\" stroke-width=\"0.7\"/>",
            num(x),
            num(y)
        ));
    }
}

fn level_colour(scale: ColourScale, v: f64) -> [u8; 3] {
    let t = (scale.t(v) * LEVELS).round() / LEVELS;
    viridis(t)
}

fn round_map(svg: &mut Svg, field: &[FieldPoint], diameter_m: f64, scale: ColourScale) {
    let (cx, cy, r_px) = (118.0, 125.0, 108.0);
    let radius_m = diameter_m / 2.0;
    let to_px = r_px / radius_m;
    let point = |r: f64, a: f64| (cx + r * a.sin(), cy - r * a.cos());
    match RadialField::new(field, radius_m) {
        None => {
            svg.push(format_args!(
                "<circle cx=\"{cx}\" cy=\"{cy}\" r=\"{r_px}\" fill=\"#e6e6e6\"/>"
            ));
            svg.text(cx, cy, 9.0, Anchor::Middle, LABEL, "no valid points");
        }
        Some(map) => {
            let d_angle = std::f64::consts::TAU / SECTORS as f64;
            for ring in 0..RINGS {
                let (r0, r1) = (
                    r_px * ring as f64 / RINGS as f64,
                    r_px * (ring + 1) as f64 / RINGS as f64,
                );
                let r_mid_m = (r0 + r1) / 2.0 / to_px;
                let colours: Vec<[u8; 3]> = (0..SECTORS)
                    .map(|s| level_colour(scale, map.at(r_mid_m, (s as f64 + 0.5) * d_angle)))
                    .collect();
                // Merge runs of equal colour along the ring, at most half a turn per path.
                let mut s = 0;
                while s < SECTORS {
                    let mut e = s + 1;
                    while e < SECTORS && colours[e] == colours[s] && e - s < SECTORS / 2 {
                        e += 1;
                    }
                    let (a0, a1) = (s as f64 * d_angle, e as f64 * d_angle);
                    let c = hex(colours[s]);
                    let (p0, p1) = (point(r1, a0), point(r1, a1));
                    let mut d = format!(
                        "M{} {} A{} {} 0 0 1 {} {}",
                        num(p0.0),
                        num(p0.1),
                        num(r1),
                        num(r1),
                        num(p1.0),
                        num(p1.1)
                    );
                    if ring == 0 {
                        d.push_str(&format!(" L{cx} {cy} Z"));
                    } else {
                        let (q1, q0) = (point(r0, a1), point(r0, a0));
                        d.push_str(&format!(
                            " L{} {} A{} {} 0 0 0 {} {} Z",
                            num(q1.0),
                            num(q1.1),
                            num(r0),
                            num(r0),
                            num(q0.0),
                            num(q0.1)
                        ));
                    }
                    svg.push(format_args!(
                        "<path d=\"{d}\" fill=\"{c}\" stroke=\"{c}\" stroke-width=\"0.5\"/>"
                    ));
                    s = e;
                }
            }
        }
    }
    svg.push(format_args!(
        "<circle cx=\"{cx}\" cy=\"{cy}\" r=\"{r_px}\" fill=\"none\" stroke=\"{WALL}\" stroke-width=\"2\"/>"
    ));
    for p in field {
        marker(svg, cx + p.x_m * to_px, cy - p.y_m * to_px, p.excluded);
    }
}

/// Cell edges for sorted centres: midpoints between neighbours, the walls at the ends.
fn edges(centres: &[f64], lo: f64, hi: f64) -> Vec<(f64, f64)> {
    let n = centres.len();
    (0..n)
        .map(|i| {
            let a = if i == 0 {
                lo
            } else {
                (centres[i - 1] + centres[i]) / 2.0
            };
            let b = if i + 1 == n {
                hi
            } else {
                (centres[i] + centres[i + 1]) / 2.0
            };
            (a, b)
        })
        .collect()
}

/// A cell label's size: the cell width over this many ems (a value of about four characters),
/// within the smallest and largest label sizes, in SVG px.
const CELL_WIDTH_IN_EMS: f64 = 4.2;
const MIN_LABEL_PX: f64 = 5.0;
const MAX_LABEL_PX: f64 = 8.0;
/// The gap between a point's dot and its label below it.
const LABEL_GAP_PX: f64 = 2.5;

fn rect_map(
    svg: &mut Svg,
    field: &[FieldPoint],
    units: &ChartUnits,
    width_m: f64,
    height_m: f64,
    scale: ColourScale,
) {
    let (box_w, box_h) = (225.0, 215.0);
    let to_px = (box_w / width_m).min(box_h / height_m);
    let (w_px, h_px) = (width_m * to_px, height_m * to_px);
    let (left, top) = (8.0 + (box_w - w_px) / 2.0, 18.0 + (box_h - h_px) / 2.0);
    let (cx, cy) = (left + w_px / 2.0, top + h_px / 2.0);
    // Columns by line (x), then cells along each column (y).
    let mut columns: Vec<(f64, Vec<&FieldPoint>)> = Vec::new();
    for p in field {
        match columns
            .iter_mut()
            .find(|(x, _)| (x - p.x_m).abs() < width_m * 1e-6)
        {
            Some((_, pts)) => pts.push(p),
            None => columns.push((p.x_m, vec![p])),
        }
    }
    columns.sort_by(|a, b| a.0.total_cmp(&b.0));
    let xs: Vec<f64> = columns.iter().map(|c| c.0).collect();
    let x_edges = edges(&xs, -width_m / 2.0, width_m / 2.0);
    let cell_w = w_px / columns.len().max(1) as f64;
    let font_fit = cell_w / CELL_WIDTH_IN_EMS;
    let font = font_fit.clamp(MIN_LABEL_PX, MAX_LABEL_PX);
    // A value is printed in its cell only when the cells can hold it at the smallest legible size
    // (across, and below the point's dot); on a fine grid (a 40 × 40 duct has 6 px cells) the
    // numbers would overprint one another, and the colour carries the value.
    let rows = columns.iter().map(|c| c.1.len()).max().unwrap_or(1).max(1);
    let labelled =
        font_fit >= MIN_LABEL_PX && h_px / rows as f64 >= 2.0 * MIN_LABEL_PX + LABEL_GAP_PX;
    for ((_, pts), (x0, x1)) in columns.iter_mut().zip(x_edges) {
        pts.sort_by(|a, b| a.y_m.total_cmp(&b.y_m));
        let ys: Vec<f64> = pts.iter().map(|p| p.y_m).collect();
        for (p, (y0, y1)) in pts.iter().zip(edges(&ys, -height_m / 2.0, height_m / 2.0)) {
            let (sx, sy) = (cx + x0 * to_px, cy - y1 * to_px);
            let (sw, sh) = ((x1 - x0) * to_px, (y1 - y0) * to_px);
            let (fill, ink) = if p.excluded {
                ("#c8c8c8".to_string(), "#1d232a")
            } else {
                let c = viridis(scale.t(p.velocity_m_s));
                (hex(c), text_on(c))
            };
            svg.push(format_args!(
                "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"{fill}\" stroke=\"#ffffff\" stroke-width=\"0.6\"/>",
                num(sx),
                num(sy),
                num(sw),
                num(sh)
            ));
            let (px, py) = (cx + p.x_m * to_px, cy - p.y_m * to_px);
            if labelled {
                let value = axis::label(
                    p.velocity_m_s * units.velocity_per_m_s,
                    units.velocity_decimals,
                );
                svg.text(
                    px,
                    py + font + LABEL_GAP_PX,
                    font,
                    Anchor::Middle,
                    ink,
                    &value,
                );
            }
            marker(svg, px, py, p.excluded);
        }
    }
    svg.push(format_args!(
        "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"none\" stroke=\"{WALL}\" stroke-width=\"2\"/>",
        num(left),
        num(top),
        num(w_px),
        num(h_px)
    ));
    svg.text(cx, top - 6.0, 7.0, Anchor::Middle, LABEL, "ports (top)");
}

fn scale_bar(svg: &mut Svg, units: &ChartUnits, scale: ColourScale) {
    let (x, y0, y1, w) = (250.0, 28.0, 222.0, 11.0);
    svg.raw("<defs><linearGradient id=\"vmap\" x1=\"0\" y1=\"1\" x2=\"0\" y2=\"0\">");
    for (i, c) in VIRIDIS_STOPS.iter().enumerate() {
        svg.push(format_args!(
            "<stop offset=\"{}\" stop-color=\"{}\"/>",
            num(i as f64 / (VIRIDIS_STOPS.len() - 1) as f64),
            hex(*c)
        ));
    }
    svg.raw("</linearGradient></defs>");
    svg.push(format_args!(
        "<rect x=\"{x}\" y=\"{y0}\" width=\"{w}\" height=\"{}\" fill=\"url(#vmap)\" stroke=\"{LABEL}\" stroke-width=\"0.5\"/>",
        num(y1 - y0)
    ));
    svg.text(
        x + w / 2.0,
        y0 - 9.0,
        8.0,
        Anchor::Middle,
        LABEL,
        &units.velocity,
    );
    let (lo, hi) = (
        scale.min_m_s * units.velocity_per_m_s,
        scale.max_m_s * units.velocity_per_m_s,
    );
    let ticks = axis::ticks_within(lo, hi, 5);
    let decimals = axis::decimals_for(axis::nice_step(hi - lo, 5));
    for v in ticks {
        let y = y1 - (v - lo) / (hi - lo) * (y1 - y0);
        svg.line(
            x + w,
            y,
            x + w + 3.0,
            y,
            &format!("stroke=\"{LABEL}\" stroke-width=\"0.6\""),
        );
        svg.text(
            x + w + 5.0,
            y + 2.6,
            7.0,
            Anchor::Start,
            LABEL,
            &axis::label(v, decimals),
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pt(x: f64, y: f64, v: f64) -> FieldPoint {
        FieldPoint {
            line: "A".into(),
            point: 1,
            position_m: 0.0,
            x_m: x,
            y_m: y,
            velocity_m_s: v,
            excluded: false,
        }
    }

    #[test]
    fn radial_interpolation_is_linear_and_holds_at_the_wall() {
        // Two rays: up (0°) and right (90°).
        let field = [
            pt(0.0, 0.2, 10.0),
            pt(0.0, 0.8, 6.0),
            pt(0.2, 0.0, 14.0),
            pt(0.8, 0.0, 8.0),
        ];
        let map = RadialField::new(&field, 1.0).unwrap();
        assert_eq!(map.rays.len(), 2);
        const TOL: f64 = 1e-9;
        // Centre value: mean of the innermost points.
        assert!((map.centre - 12.0).abs() < TOL);
        // On a ray, halfway between its samples.
        assert!((map.at(0.5, 0.0) - 8.0).abs() < TOL);
        // Beyond the outermost sample the value is held.
        assert!((map.at(0.95, 0.0) - 6.0).abs() < TOL);
        // Halfway in angle between the two rays.
        assert!((map.at(0.2, std::f64::consts::FRAC_PI_4) - 12.0).abs() < TOL);
        // Between the centre and the innermost point.
        assert!((map.at(0.1, 0.0) - 11.0).abs() < TOL);
    }

    /// The cell labels of a rectangular map of an n × n grid of equal cells in a 1 m square duct,
    /// each point's velocity 12.345 m/s (printed as 12.3).
    fn rect_labels(n: usize) -> usize {
        let units = ChartUnits {
            length: "m".into(),
            length_per_m: 1.0,
            length_decimals: 1,
            velocity: "m/s".into(),
            velocity_per_m_s: 1.0,
            velocity_decimals: 1,
            si_beside: false,
        };
        let at = |i: usize| (i as f64 + 0.5) / n as f64 - 0.5;
        let field: Vec<FieldPoint> = (0..n)
            .flat_map(|i| (0..n).map(move |j| (i, j)))
            .map(|(i, j)| pt(at(i), at(j), 12.345))
            .collect();
        let mut svg = Svg::new(WIDTH, HEIGHT);
        let scale = ColourScale::spanning([field.as_slice()]);
        rect_map(&mut svg, &field, &units, 1.0, 1.0, scale);
        svg.finish().matches(">12.3<").count()
    }

    #[test]
    fn cells_are_labelled_only_where_a_label_fits() {
        // 225 px across: 8 cells of 28 px hold a 5 px+ label; 40 cells of 5.6 px do not
        assert_eq!(rect_labels(8), 64);
        assert_eq!(rect_labels(10), 100);
        assert_eq!(rect_labels(40), 0);
    }

    #[test]
    fn scale_spans_valid_points_only() {
        let mut field = vec![pt(0.0, 0.1, 5.0), pt(0.0, 0.2, 9.0)];
        field.push(FieldPoint {
            excluded: true,
            ..pt(0.0, 0.3, 100.0)
        });
        let s = ColourScale::spanning([field.as_slice()]);
        assert_eq!((s.min_m_s, s.max_m_s), (5.0, 9.0));
        let flat = ColourScale::spanning([&field[..1]]);
        assert!(flat.max_m_s > flat.min_m_s);
    }
}
