//! Minimum distance of a traverse point from the wall.
//!
//! EPA Method 1 §11.3 (40 CFR 60 App. A-1): on stacks with a diameter over 0.61 m (24 in) no point
//! may be within 2.5 cm (1.00 in) of the wall; on smaller stacks 1.3 cm (0.50 in). Points inside the
//! limit move out to it and are marked *adjusted*; two points that collapse onto one position stay two
//! readings (each keeps its own weight, so the position counts twice). The rule is applied at both
//! walls of every line. Rectangular ducts use the equivalent diameter for the size class and the rule
//! on both axes (the line offsets too); that reading of §11.3 is common practice, not its wording.

use super::Point;
use crate::geometry::{Duct, Shape};

/// A wall rule that can be applied to a layout.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum WallRule {
    EpaMethod1,
}

/// EPA Method 1 §11.3 size class boundary and limits.
pub const EPA_LARGE_STACK_M: f64 = 0.61;
pub const EPA_MIN_LARGE_M: f64 = 0.0254;
pub const EPA_MIN_SMALL_M: f64 = 0.0127;

impl WallRule {
    pub fn minimum_distance_m(self, duct: &Duct) -> f64 {
        match self {
            WallRule::EpaMethod1 => {
                if duct.equivalent_diameter_m() > EPA_LARGE_STACK_M {
                    EPA_MIN_LARGE_M
                } else {
                    EPA_MIN_SMALL_M
                }
            }
        }
    }

    pub fn citation(self) -> &'static str {
        match self {
            WallRule::EpaMethod1 => "EPA Method 1 §11.3",
        }
    }
}

fn clamp(value: f64, len: f64, min: f64) -> (f64, bool) {
    if value < min {
        (min, true)
    } else if value > len - min {
        (len - min, true)
    } else {
        (value, false)
    }
}

/// Moves points (and rectangular line offsets) out to the minimum wall distance.
/// `line_len` is the length of each line (the diameter, or the radius for half-diameter lines),
/// for the points' fractions.
pub(super) fn apply(rule: WallRule, duct: &Duct, points: &mut [Point], line_len: f64) {
    let min = rule.minimum_distance_m(duct);
    let len = duct.line_length_m();
    for p in points.iter_mut() {
        let (pos, moved) = clamp(p.position_m, len, min);
        p.position_m = pos;
        p.fraction = pos / line_len;
        p.adjusted |= moved;
        if let (Shape::Rectangular { width_m, .. }, Some(off)) = (duct.shape(), p.line_offset_m) {
            let (o, moved) = clamp(off, width_m, min);
            p.line_offset_m = Some(o);
            p.adjusted |= moved;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::{locate_points, LayoutSpec, Method};
    use super::*;

    const IN: f64 = 0.0254;
    const TOL_IN: f64 = 1e-3;

    fn epa(d_in: f64, n: usize) -> super::super::Layout {
        let mut s = LayoutSpec::new(Method::EqualArea);
        s.points_per_line = Some(n);
        s.wall_rule = Some(WallRule::EpaMethod1);
        locate_points(&Duct::round(d_in * IN).unwrap(), &s).unwrap()
    }

    #[test]
    fn large_stack_moves_points_to_one_inch() {
        // methods.md §1.1 [D]: D = 36 in, N = 24 (2 × 12) -> first point 0.756 in -> 1.000 in,
        // last 35.244 in -> 35.000 in
        let l = epa(36.0, 12);
        let a: Vec<_> = l.points().iter().filter(|p| p.line == "A").collect();
        assert!((a[0].position_m / IN - 1.0).abs() < TOL_IN && a[0].adjusted);
        assert!((a[11].position_m / IN - 35.0).abs() < TOL_IN && a[11].adjusted);
        // point 2 at 6.7 % of 36 in = 2.4 in stays
        assert!(!a[1].adjusted);
    }

    #[test]
    fn small_stack_uses_half_an_inch() {
        // methods.md §1.1 [D]: D = 14 in, N = 24 (2 × 12) -> 0.294 in -> 0.500 in
        let l = epa(14.0, 12);
        let p = &l.points()[0];
        assert!((p.position_m / IN - 0.5).abs() < TOL_IN && p.adjusted);
        assert!(!l.points()[1].adjusted);
        // 24 per diameter on 14 in: 1.1 % and 3.2 % (0.15, 0.45 in) collapse onto 0.5 in; both stay
        let l = epa(14.0, 24);
        assert!((l.points()[1].position_m / IN - 0.5).abs() < TOL_IN && l.points()[1].adjusted);
        assert_eq!(l.points()[0].position_m, l.points()[1].position_m);
        assert_eq!(l.points().len(), 48);
    }

    #[test]
    fn no_adjustment_when_clear_of_the_wall() {
        // methods.md §1.1 [D]: D = 72 in, N = 12 -> 3.168, 10.512, 21.312, 50.688, 61.488, 68.832 in
        let l = epa(72.0, 6);
        let want = [3.168, 10.512, 21.312, 50.688, 61.488, 68.832];
        let a: Vec<_> = l.points().iter().filter(|p| p.line == "A").collect();
        // those values were worked from Table 1-2's rounded percentages: compare to the table's
        // printed precision, 0.05 % of D
        let table_tol_in = 0.0005 * 72.0 + 1e-9;
        for (p, w) in a.iter().zip(want) {
            assert!((p.position_m / IN - w).abs() < table_tol_in, "{}", p.point);
        }
        assert!(l.points().iter().all(|p| !p.adjusted));
    }
}
