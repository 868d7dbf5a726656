//! Probe insertion marks: how far the probe goes in through the port for each point.
//!
//! Insertion depth = position from the inside wall + port length (nipple and wall thickness), rounded
//! to the marking increment a crew can actually tape or scribe on the probe (1/8 in, 1 mm, or none).

use super::{Layout, Point};

/// Rounding of the marks.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub enum MarkStep {
    None,
    /// Round to the nearest multiple of this length, m.
    Increment(f64),
}

impl MarkStep {
    /// 1/8 in, the common marking increment on inch-scale probes (common practice).
    pub const EIGHTH_INCH: MarkStep = MarkStep::Increment(0.0254 / 8.0);
    /// 1 mm (common practice on metric probes).
    pub const MILLIMETRE: MarkStep = MarkStep::Increment(0.001);

    pub fn round(self, value_m: f64) -> f64 {
        match self {
            MarkStep::None => value_m,
            MarkStep::Increment(step) if step > 0.0 => (value_m / step).round() * step,
            MarkStep::Increment(_) => value_m,
        }
    }
}

/// One probe mark.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ProbeMark {
    pub line: String,
    pub point: usize,
    /// Exact insertion: position + port length, m.
    pub insertion_m: f64,
    /// Rounded to the marking step, m.
    pub mark_m: f64,
}

/// The marks for every point of a layout, in layout order.
pub fn probe_marks(layout: &Layout, port_length_m: f64, step: MarkStep) -> Vec<ProbeMark> {
    layout
        .points()
        .iter()
        .map(|p: &Point| {
            let insertion_m = p.position_m + port_length_m;
            ProbeMark {
                line: p.line.clone(),
                point: p.point,
                insertion_m,
                mark_m: step.round(insertion_m),
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::super::{locate_points, LayoutSpec, Method};
    use super::*;
    use crate::geometry::Duct;

    const IN: f64 = 0.0254;

    #[test]
    fn marks_add_the_port_and_round() {
        // 72 in stack, 6 per diameter, 5 in port: first point 3.137 in + 5 in = 8.137 -> 8 1/8 in
        let mut spec = LayoutSpec::new(Method::EqualArea);
        spec.points_per_line = Some(6);
        let l = locate_points(&Duct::round(72.0 * IN).unwrap(), &spec).unwrap();
        let m = probe_marks(&l, 5.0 * IN, MarkStep::EIGHTH_INCH);
        assert_eq!(m.len(), 12);
        assert!((m[0].insertion_m - (l.points()[0].position_m + 5.0 * IN)).abs() < 1e-12);
        assert!(
            (m[0].mark_m / IN - 8.125).abs() < 1e-9,
            "{}",
            m[0].mark_m / IN
        );
        let m = probe_marks(&l, 0.127, MarkStep::MILLIMETRE);
        assert!((m[0].mark_m * 1000.0 - (m[0].mark_m * 1000.0).round()).abs() < 1e-9);
        let m = probe_marks(&l, 0.127, MarkStep::None);
        assert_eq!(m[0].mark_m, m[0].insertion_m);
    }
}
