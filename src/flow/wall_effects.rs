//! EPA Method 2H calculational procedure: the wall effects adjustment factor (WAF) of one traverse
//! from its Method 1 point velocities and its wall-effects traverse near each exterior point.
//!
//! Owns the integration of the near-wall profile over the Method 1 equal-area sector closest to the
//! wall and the factor that follows. It must not decide which runs carry wall readings nor average
//! factors over runs (the pipeline does, Method 2H §2.3), and it must not compute point velocities
//! (the run computation does, with the run's own gas).
//!
//! # The procedure (40 CFR 60 App. A-2, Method 2H §8.2 and §12)
//! The section and symbol names follow the method's §12 nomenclature (transcribed from a public copy
//! of the method); the equations are written out here from those definitions, since the equation
//! numbers could not be read against the published text:
//! - each Method 1 exterior sector *j* (the sector closest to the wall) has wall-effects traverse
//!   points at distances `d` from the wall (1 in apart, 2.5 cm in metric units, up to `dlast`), with
//!   measured velocities `v_d`, and `v_0 = 0` at the wall;
//! - `vdec_d = (v_(d−1) + v_d)/2` over the annular sub-sector `A_d = π[(r − d_(k−1))² − (r − d)²]`,
//!   `Q_d = vdec_d·A_d`, summed from the wall to `dlast`;
//! - the sector's inner edge is at radius `r·√((p − 2)/p)` (p = Method 1 points per diameter);
//!   the remaining sub-sector `A_drem = π(r − dlast)² − π·r²·(p − 2)/p` has its centroid (the radius
//!   that halves its area) at `drem = r − √([(r − dlast)² + r²(p − 2)/p]/2)` and carries
//!   `Q_drem = vdrem·A_drem`;
//! - `Q_T = Q_(d1→dlast) + Q_drem` and the replacement velocity `V_ej = Q_T / (π·r²·2/p)` (the
//!   sector's share of the annulus cancels: sub-sector areas and the sector area scale alike);
//! - `vavg = (Σ v_iI + Σ v_ej)/n`, `VAVG = (Σ v_iI + Σ V_ej)/n`, `WAF = VAVG/vavg`.
//!
//! `vdrem` is the velocity measured at `drem`: a last wall-effects reading within
//! [`DREM_TOLERANCE_M`] of the `drem` that the readings before it define is taken as that
//! measurement. Without one, the reading (wall point or the sector's Method 1 point) nearest to
//! `drem` stands in for it, and the result says so: that substitution is this program's, not the
//! method's.

use super::FlowError;
use crate::layout::{Layout, Method, Reach};
use serde::Serialize;

/// A wall-effects reading counts as taken at `drem` when within 1/4 in of it (common practice: the
/// resolution a probe can be positioned to by its marks).
pub const DREM_TOLERANCE_M: f64 = 0.25 * 0.0254;
/// Method 2H §8.2: at least eight wall-effects traverse points in all (§2.2.1).
pub const MIN_WALL_POINTS: usize = 8;
/// Method 2H §1.2: not for stacks under 3.3 ft (1.0 m).
pub const MIN_DIAMETER_M: f64 = 1.0;
/// Method 2H §2.2.1: the calculational procedure uses at least 16 Method 1 points.
pub const MIN_METHOD1_POINTS: usize = 16;

/// One wall-effects point's velocity, computed like any traverse point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WallPointVelocity {
    /// Line and Method 1 exterior point the wall traverse belongs to.
    pub line: String,
    pub point: usize,
    /// Distance from the wall nearest that point, m.
    pub distance_m: f64,
    pub velocity_m_s: f64,
    /// 1-based line of the wall readings file.
    pub source_line: usize,
}

/// Where `vdrem` came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum DremSource {
    /// A wall-effects reading within 1/4 in of `drem`.
    Measured,
    /// The nearest wall-effects reading stands in.
    NearestWallPoint,
    /// The sector's Method 1 point is nearer `drem` than any wall reading and stands in.
    Method1Point,
}

/// The integration over one exterior sector.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ExteriorSector {
    pub line: String,
    pub point: usize,
    /// v_ej: the Method 1 point velocity, unadjusted, m/s.
    pub unadjusted_m_s: f64,
    /// Wall-effects readings, (distance m, velocity m/s), nearest the wall first (with the
    /// reading at `drem`, when there is one, last).
    pub wall_points: Vec<(f64, f64)>,
    pub dlast_m: f64,
    pub drem_m: f64,
    pub vdrem_m_s: f64,
    pub vdrem_source: DremSource,
    /// Q_(d1→dlast) + Q_drem over the whole annulus, m³/s.
    pub total_flow_m3_s: f64,
    /// V_ej: the replacement velocity, m/s.
    pub replacement_m_s: f64,
}

/// The wall effects adjustment factor of one traverse.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WallEffects {
    /// Method 1 points per diameter (p).
    pub points_per_diameter: usize,
    pub sectors: Vec<ExteriorSector>,
    /// vavg: mean of the Method 1 point velocities, m/s.
    pub unadjusted_mean_m_s: f64,
    /// VAVG: the same with each exterior point replaced by V_ej, m/s.
    pub adjusted_mean_m_s: f64,
    /// WAF = VAVG/vavg.
    pub factor: f64,
    pub wall_point_count: usize,
}

fn err(message: String, hint: &str) -> FlowError {
    FlowError::Gas {
        message,
        hint: hint.to_string(),
    }
}

/// Derives the WAF of one traverse. `point_velocities` are the run's Method 1 point velocities in
/// layout order (unadjusted for wall effects); `wall` the wall-effects point velocities.
pub fn wall_effects(
    layout: &Layout,
    point_velocities: &[f64],
    wall: &[WallPointVelocity],
) -> Result<WallEffects, FlowError> {
    const HINT: &str = "see the Method 2H wall-effects readings in the README";
    let diameter = match layout.duct().shape() {
        crate::geometry::Shape::Round { diameter_m } => diameter_m,
        _ => {
            return Err(err(
                "Method 2H applies to circular stacks only (Method 2H §1.1)".into(),
                "remove wall_factor, or give a factor measured another way",
            ))
        }
    };
    if layout.method() != Method::EqualArea {
        return Err(err(
            "a Method 2H wall factor is derived from a Method 1 equal-area traverse".into(),
            "use [layout] method = \"equal-area\"",
        ));
    }
    if point_velocities.len() != layout.total_points() {
        return Err(err("point velocities do not match the layout".into(), ""));
    }
    let r = diameter / 2.0;
    let ppl = layout.points_per_line();
    let (p, exterior): (usize, Vec<usize>) = match layout.reach() {
        Reach::Diameter => (ppl, vec![1, ppl]),
        Reach::Radius => (2 * ppl, vec![1]),
    };
    if p < 4 {
        return Err(err(
            format!("Method 2H needs at least 4 Method 1 points per diameter, found {p}"),
            HINT,
        ));
    }
    let pf = p as f64;
    let r_in_sq = r * r * (pf - 2.0) / pf;
    let sector_depth = r - r_in_sq.sqrt();
    let annulus = std::f64::consts::PI * (r * r - r_in_sq);
    let mut sectors = Vec::new();
    let mut sum_unadjusted = 0.0;
    let mut sum_adjusted = 0.0;
    let n = layout.total_points() as f64;
    for (pt, &v) in layout.points().iter().zip(point_velocities) {
        sum_unadjusted += v;
        if !exterior.contains(&pt.point) {
            sum_adjusted += v;
            continue;
        }
        // distance of the Method 1 point from the wall it is near
        let d_e = pt.position_m.min(diameter - pt.position_m);
        let mut pts: Vec<(f64, f64)> = wall
            .iter()
            .filter(|w| w.line == pt.line && w.point == pt.point)
            .map(|w| (w.distance_m, w.velocity_m_s))
            .collect();
        pts.sort_by(|a, b| a.0.total_cmp(&b.0));
        if pts.is_empty() {
            return Err(err(
                format!(
                    "line {} point {} is a Method 1 exterior point but has no wall-effects readings",
                    pt.line, pt.point
                ),
                "Method 2H replaces every exterior point's velocity: give wall readings for each",
            ));
        }
        if let Some(w) = pts.windows(2).find(|w| w[1].0 - w[0].0 <= 0.0) {
            return Err(err(
                format!(
                    "line {} point {}: two wall-effects readings at {:.4} m from the wall",
                    pt.line, pt.point, w[0].0
                ),
                "each wall-effects point is at its own distance",
            ));
        }
        if pts[0].0 <= 0.0 || pts[pts.len() - 1].0 >= sector_depth {
            return Err(err(
                format!(
                    "line {} point {}: wall-effects points must lie between the wall and the sector's inner edge ({:.4} m from the wall), found {:.4} m",
                    pt.line, pt.point, sector_depth,
                    if pts[0].0 <= 0.0 { pts[0].0 } else { pts[pts.len() - 1].0 }
                ),
                HINT,
            ));
        }
        let drem_after = |dlast: f64| r - (((r - dlast).powi(2) + r_in_sq) / 2.0).sqrt();
        // A last reading taken at the drem of the readings before it is the vdrem reading, not
        // one more 1-in point.
        let measured_drem = pts.len() >= 2 && {
            let before = pts[pts.len() - 2].0;
            (pts[pts.len() - 1].0 - drem_after(before)).abs() <= DREM_TOLERANCE_M
        };
        let drem_reading = if measured_drem { pts.pop() } else { None };
        let dlast = pts[pts.len() - 1].0;
        let mut q = 0.0;
        let (mut d_prev, mut v_prev) = (0.0, 0.0);
        for &(d, vd) in &pts {
            let area = std::f64::consts::PI * ((r - d_prev).powi(2) - (r - d).powi(2));
            q += 0.5 * (v_prev + vd) * area;
            d_prev = d;
            v_prev = vd;
        }
        let a_rem = std::f64::consts::PI * ((r - dlast).powi(2) - r_in_sq);
        let drem = drem_after(dlast);
        let nearest_wall = pts
            .iter()
            .min_by(|a, b| (a.0 - drem).abs().total_cmp(&(b.0 - drem).abs()))
            .copied()
            .unwrap_or((dlast, v_prev));
        let (vdrem, source) = match drem_reading {
            Some((_, v_at)) => (v_at, DremSource::Measured),
            None if (nearest_wall.0 - drem).abs() <= DREM_TOLERANCE_M => {
                (nearest_wall.1, DremSource::Measured)
            }
            None if (d_e - drem).abs() < (nearest_wall.0 - drem).abs() => {
                (v, DremSource::Method1Point)
            }
            None => (nearest_wall.1, DremSource::NearestWallPoint),
        };
        if let Some(reading) = drem_reading {
            pts.push(reading);
        }
        let total = q + vdrem * a_rem;
        let replacement = total / annulus;
        sum_adjusted += replacement;
        sectors.push(ExteriorSector {
            line: pt.line.clone(),
            point: pt.point,
            unadjusted_m_s: v,
            wall_points: pts,
            dlast_m: dlast,
            drem_m: drem,
            vdrem_m_s: vdrem,
            vdrem_source: source,
            total_flow_m3_s: total,
            replacement_m_s: replacement,
        });
    }
    let vavg = sum_unadjusted / n;
    let vavg_adj = sum_adjusted / n;
    if vavg.is_nan() || vavg <= 0.0 {
        return Err(err(
            "the traverse's mean velocity is not positive: no wall factor can be derived".into(),
            HINT,
        ));
    }
    Ok(WallEffects {
        points_per_diameter: p,
        wall_point_count: sectors.iter().map(|s| s.wall_points.len()).sum(),
        sectors,
        unadjusted_mean_m_s: vavg,
        adjusted_mean_m_s: vavg_adj,
        factor: vavg_adj / vavg,
    })
}

/// The factor applied to every run: the mean of the traverses' factors (Method 2H §2.3: one
/// traverse's factor may be applied to all runs of a test, or the average of several).
pub fn combined_factor(per_run: &[f64]) -> Option<f64> {
    (!per_run.is_empty()).then(|| per_run.iter().sum::<f64>() / per_run.len() as f64)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::geometry::Duct;
    use crate::layout::{locate_points, LayoutSpec};

    const IN: f64 = 0.0254;
    const FT: f64 = 0.3048;
    /// The hand arithmetic below is carried to 7 significant figures.
    const REL_TOL_HAND: f64 = 2e-7;

    /// 120 in stack, 2 diameters × 8 equal-area points (a 16-point Method 1 traverse, p = 8).
    fn layout(reach: Reach) -> Layout {
        let mut spec = LayoutSpec::new(Method::EqualArea);
        spec.reach = reach;
        match reach {
            Reach::Diameter => {
                spec.lines = Some(2);
                spec.points_per_line = Some(8);
            }
            Reach::Radius => {
                spec.lines = Some(4);
                spec.points_per_line = Some(4);
            }
        }
        locate_points(&Duct::round(120.0 * IN).unwrap(), &spec).unwrap()
    }

    fn wall_for(l: &Layout, exterior: &[usize], profile: &[(f64, f64)]) -> Vec<WallPointVelocity> {
        let mut v = Vec::new();
        for line in l.line_labels() {
            for &point in exterior {
                for &(d_in, v_ft_s) in profile {
                    v.push(WallPointVelocity {
                        line: line.clone(),
                        point,
                        distance_m: d_in * IN,
                        velocity_m_s: v_ft_s * FT,
                        source_line: 0,
                    });
                }
            }
        }
        v
    }

    #[test]
    fn worked_case_derived_by_hand() {
        // Worked case, derived by hand from the Method 2H §12 definitions (see the module notes):
        // r = 60 in, p = 8 -> inner edge radius 60·√(6/8) = 51.961524 in (8.038476 in from the wall).
        // Every Method 1 point reads 50 ft/s, so vavg = 50 ft/s. Wall points at every exterior
        // sector: d = 1, 2, 3, 4 in with 40, 44, 46, 47 ft/s (v0 = 0 at the wall).
        //   A_1 = π(60² − 59²) = π·119;  vdec_1 = (0 + 40)/2 = 20   -> 2380π
        //   A_2 = π(59² − 58²) = π·117;  vdec_2 = (40 + 44)/2 = 42  -> 4914π
        //   A_3 = π(58² − 57²) = π·115;  vdec_3 = 45               -> 5175π
        //   A_4 = π(57² − 56²) = π·113;  vdec_4 = 46.5             -> 5254.5π
        //   Q(d1→dlast) = 17723.5π ft·in²/s
        //   A_drem = π(56² − 3600·6/8) = π(3136 − 2700) = 436π
        //   drem = 60 − √((3136 + 2700)/2) = 60 − √2918 = 60 − 54.018515 = 5.981485 in
        //   the Method 1 exterior point is at 60 − 60·√(7/8) = 3.875 in from the wall; the
        //   nearest reading to drem is the 4 in wall point (47 ft/s), 1.98 in away -> vdrem = 47
        //   Q_drem = 47·436π = 20492π;  Q_T = 38215.5π
        //   V_ej = Q_T/(π·(3600 − 2700)) = 38215.5/900 = 42.461667 ft/s
        //   VAVG = (12·50 + 4·42.461667)/16 = 48.115417 ft/s;  WAF = 48.115417/50 = 0.9623083
        let l = layout(Reach::Diameter);
        let v = vec![50.0 * FT; 16];
        let profile = [(1.0, 40.0), (2.0, 44.0), (3.0, 46.0), (4.0, 47.0)];
        let w = wall_effects(&l, &v, &wall_for(&l, &[1, 8], &profile)).unwrap();
        assert_eq!(w.points_per_diameter, 8);
        assert_eq!(w.sectors.len(), 4);
        assert_eq!(w.wall_point_count, 16);
        let s = &w.sectors[0];
        assert!((s.drem_m / IN - 5.981485).abs() < 1e-6, "{}", s.drem_m / IN);
        assert_eq!(s.vdrem_source, DremSource::NearestWallPoint);
        assert!(((s.replacement_m_s / FT) - 42.461667).abs() / 42.461667 < REL_TOL_HAND);
        assert!((w.unadjusted_mean_m_s / FT - 50.0).abs() < 1e-9);
        assert!(
            (w.factor - 0.9623083).abs() / 0.9623083 < REL_TOL_HAND,
            "{}",
            w.factor
        );
    }

    #[test]
    fn a_reading_at_drem_is_used() {
        // The worked case with one more reading at 6.0 in (within 1/4 in of drem = 5.981 in)
        // reading 48 ft/s: it is the vdrem measurement, so Q_drem = 48·436π = 20928π,
        // Q_T = 17723.5π + 20928π = 38651.5π, V_ej = 38651.5/900 = 42.946111 ft/s.
        let l = layout(Reach::Diameter);
        let v = vec![50.0 * FT; 16];
        let profile = [
            (1.0, 40.0),
            (2.0, 44.0),
            (3.0, 46.0),
            (4.0, 47.0),
            (6.0, 48.0),
        ];
        let w = wall_effects(&l, &v, &wall_for(&l, &[1, 8], &profile)).unwrap();
        let s = &w.sectors[0];
        assert_eq!(s.vdrem_source, DremSource::Measured);
        assert!((s.dlast_m / IN - 4.0).abs() < 1e-12);
        assert!((s.replacement_m_s / FT - 42.946111).abs() / 42.946111 < REL_TOL_HAND);
        // A fifth reading at 5.0 in is one more 1-in point: dlast = 5 in, A_5 = π(56² − 55²) = 111π
        // with vdec 47.5 -> Q = 17723.5π + 5272.5π = 22996π; A_drem = π(55² − 2700) = 325π,
        // drem = 60 − √((3025 + 2700)/2) = 6.498 in; nearest reading the 5 in one (48 ft/s):
        // Q_T = 22996π + 15600π = 38596π, V_ej = 42.884444 ft/s.
        let profile = [
            (1.0, 40.0),
            (2.0, 44.0),
            (3.0, 46.0),
            (4.0, 47.0),
            (5.0, 48.0),
        ];
        let w = wall_effects(&l, &v, &wall_for(&l, &[1, 8], &profile)).unwrap();
        let s = &w.sectors[0];
        assert_eq!(s.vdrem_source, DremSource::NearestWallPoint);
        assert!((s.replacement_m_s / FT - 42.884444).abs() / 42.884444 < REL_TOL_HAND);
    }

    #[test]
    fn half_diameter_lines_have_one_exterior_point_each() {
        // 4 ports × 4 points to the centre is the same 16-point plane as 2 diameters × 8, so the
        // factor is the same as the worked case.
        let l = layout(Reach::Radius);
        let v = vec![50.0 * FT; 16];
        let profile = [(1.0, 40.0), (2.0, 44.0), (3.0, 46.0), (4.0, 47.0)];
        let w = wall_effects(&l, &v, &wall_for(&l, &[1], &profile)).unwrap();
        assert_eq!(w.sectors.len(), 4);
        assert!(
            (w.factor - 0.9623083).abs() / 0.9623083 < REL_TOL_HAND,
            "{}",
            w.factor
        );
    }

    #[test]
    fn missing_or_misplaced_wall_readings_are_refused() {
        let l = layout(Reach::Diameter);
        let v = vec![50.0 * FT; 16];
        let only_near = wall_for(&l, &[1], &[(1.0, 40.0), (2.0, 44.0)]);
        let e = wall_effects(&l, &v, &only_near).unwrap_err();
        assert!(e.to_string().contains("point 8"), "{e}");
        // past the sector's inner edge (8.04 in from the wall)
        let deep = wall_for(&l, &[1, 8], &[(1.0, 40.0), (9.0, 49.0)]);
        assert!(wall_effects(&l, &v, &deep).is_err());
        let twice = wall_for(&l, &[1, 8], &[(1.0, 40.0), (1.0, 41.0)]);
        assert!(wall_effects(&l, &v, &twice).is_err());
    }

    #[test]
    fn combined_factor_is_the_mean() {
        assert_eq!(combined_factor(&[]), None);
        assert!((combined_factor(&[0.98, 0.99]).unwrap() - 0.985).abs() < 1e-15);
    }
}
