//! Rectangular ducts: equal-area grids (EPA Method 1 Table 1-1, explicit k × m, or the TAB spacing
//! rule) and the ASHRAE 111 log-Tchebycheff grid. Lines are spread across the width (the port side);
//! the points of a line run along the height.

use super::tables::RECT_LOG_TCHEBYCHEFF;
use super::{LayoutError, LayoutSpec, LinePlacement, Method, Plan};

const IN: f64 = 0.0254;

/// EPA Method 1 Table 1-1 cross-section layouts for rectangular stacks: (total, longer side,
/// shorter side). From memory with high confidence (methods.md §2.1 [M]); shown on reports as such.
pub const TABLE_1_1: &[(usize, usize, usize)] = &[
    (9, 3, 3),
    (12, 4, 3),
    (16, 4, 4),
    (20, 5, 4),
    (25, 5, 5),
    (30, 6, 5),
    (36, 6, 6),
    (42, 7, 6),
    (49, 7, 7),
];

/// TAB field procedures (methods.md §2.1 [P]): readings no more than 6 in (150 mm) apart, end points
/// half a spacing from the wall, at least 2 per side, 16 to 64 readings in all.
pub const TAB_MAX_SPACING_M: f64 = 6.0 * IN;
pub const TAB_MIN_READINGS: usize = 16;
pub const TAB_MAX_READINGS: usize = 64;

/// ASHRAE 111 choice of points per side from the side length (methods.md §2.2 [P]):
/// under 30 in -> 5; 30 to 36 in -> 6; over 36 in -> 7.
pub fn log_tchebycheff_per_side(side_m: f64) -> usize {
    if side_m < 30.0 * IN {
        5
    } else if side_m <= 36.0 * IN {
        6
    } else {
        7
    }
}

/// Points per side (width, height) from the TAB spacing rule.
pub fn tab_spacing_counts(width_m: f64, height_m: f64) -> (usize, usize) {
    // Each side gets at least 2 points, so neither can have more than TAB_MAX_READINGS / 2 once
    // the cap is applied: starting there keeps the loops below a few steps long for any size
    // (a 1e12 in side would otherwise count down from 1.7e11, and overflow the product first).
    let most = (TAB_MAX_READINGS / 2) as f64;
    let per = |l: f64| {
        let n = ((l / TAB_MAX_SPACING_M) - 1e-9).ceil();
        if n.is_nan() {
            2
        } else {
            n.clamp(2.0, most) as usize
        }
    };
    let (mut kw, mut kh) = (per(width_m), per(height_m));
    while kw * kh < TAB_MIN_READINGS {
        if width_m / kw as f64 >= height_m / kh as f64 {
            kw += 1;
        } else {
            kh += 1;
        }
    }
    while kw * kh > TAB_MAX_READINGS {
        if (width_m / kw as f64 <= height_m / kh as f64 && kw > 2) || kh <= 2 {
            kw -= 1;
        } else {
            kh -= 1;
        }
    }
    (kw, kh)
}

/// The smallest Table 1-1 grid with at least `minimum` points, larger count on the longer side.
pub fn table_1_1_grid(width_m: f64, height_m: f64, minimum: usize) -> Option<(usize, usize)> {
    let &(_, long, short) = TABLE_1_1.iter().find(|(n, _, _)| *n >= minimum)?;
    Some(if width_m >= height_m {
        (long, short)
    } else {
        (short, long)
    })
}

fn centroids(k: usize) -> Vec<f64> {
    (1..=k)
        .map(|m| (2 * m - 1) as f64 / (2 * k) as f64)
        .collect()
}

fn bad(what: &'static str, found: usize, allowed: &str) -> LayoutError {
    LayoutError::BadCount {
        what,
        found,
        allowed: allowed.to_string(),
    }
}

pub(super) fn plan(width_m: f64, height_m: f64, spec: &LayoutSpec) -> Result<Plan, LayoutError> {
    let (across, along, source): (Vec<f64>, Vec<f64>, String) = match spec.method {
        Method::EqualArea => {
            let (kw, kh, source) = match (spec.lines, spec.points_per_line, spec.minimum_points) {
                (Some(w), Some(h), _) => (w, h, "equal-area grid, centroids of equal rectangles"),
                (Some(w), None, Some(min)) => (
                    w,
                    min.div_ceil(w.max(1)),
                    "equal-area grid sized to the required count",
                ),
                (None, Some(h), Some(min)) => (
                    min.div_ceil(h.max(1)),
                    h,
                    "equal-area grid sized to the required count",
                ),
                (None, None, Some(min)) => {
                    let (w, h) = table_1_1_grid(width_m, height_m, min).ok_or_else(|| {
                        bad("points", min, "EPA Method 1 Table 1-1 goes up to 49 points; give --lines and --points")
                    })?;
                    (
                        w,
                        h,
                        "EPA Method 1 Table 1-1 grid (table from memory, high confidence)",
                    )
                }
                (w, h, None) => {
                    let (tw, th) = tab_spacing_counts(width_m, height_m);
                    (
                        w.unwrap_or(tw),
                        h.unwrap_or(th),
                        "equal-area grid, TAB spacing rule (≤ 6 in apart, 16-64 readings)",
                    )
                }
            };
            if kw == 0 || kw > 40 {
                return Err(bad("traverse lines", kw, "use 1 to 40 lines"));
            }
            if kh == 0 || kh > 40 {
                return Err(bad("points per line", kh, "use 1 to 40 points per line"));
            }
            (centroids(kw), centroids(kh), source.to_string())
        }
        Method::LogTchebycheff => {
            let kw = spec
                .lines
                .unwrap_or_else(|| log_tchebycheff_per_side(width_m));
            let kh = spec
                .points_per_line
                .unwrap_or_else(|| log_tchebycheff_per_side(height_m));
            let row = |k: usize, what: &'static str| {
                RECT_LOG_TCHEBYCHEFF
                    .row(k)
                    .ok_or_else(|| bad(what, k, "ASHRAE 111 Fig. D-10 gives 5, 6 or 7 per side"))?
                    .map_err(LayoutError::from)
            };
            (
                row(kw, "traverse lines")?.to_vec(),
                row(kh, "points per line")?.to_vec(),
                RECT_LOG_TCHEBYCHEFF.source.to_string(),
            )
        }
        Method::LogLinear => {
            return Err(LayoutError::Unsupported {
                method: Method::LogLinear,
                shape: "rectangular",
                why: "the ISO 3966 rectangular log-linear grid (unequal weights) is not yet \
                      confirmed against the standard; use log-tchebycheff or equal-area"
                    .to_string(),
            })
        }
    };
    Ok(Plan {
        lines: across
            .iter()
            .map(|f| LinePlacement {
                offset_m: Some(f * width_m),
                angle_deg: None,
            })
            .collect(),
        fractions: along,
        source,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn equal_area_centroids() {
        // methods.md §2.1 [D]: 48 × 36 in, 4 × 3 -> x = 6, 18, 30, 42 in; y = 6, 18, 30 in
        let mut spec = LayoutSpec::new(Method::EqualArea);
        spec.minimum_points = Some(12);
        let p = plan(48.0 * IN, 36.0 * IN, &spec).unwrap();
        let xs: Vec<f64> = p.lines.iter().map(|l| l.offset_m.unwrap() / IN).collect();
        for (a, b) in xs.iter().zip([6.0, 18.0, 30.0, 42.0]) {
            assert!((a - b).abs() < 1e-9);
        }
        for (a, b) in p.fractions.iter().zip([6.0, 18.0, 30.0]) {
            assert!((a * 36.0 - b).abs() < 1e-9);
        }
    }

    #[test]
    fn table_1_1_gives_the_longer_side_more() {
        // EPA Method 1 Table 1-1 (from memory, methods.md §2.1): 20 -> 5 × 4, 25 -> 5 × 5
        assert_eq!(table_1_1_grid(2.0, 1.0, 20), Some((5, 4)));
        assert_eq!(table_1_1_grid(1.0, 2.0, 20), Some((4, 5)));
        assert_eq!(table_1_1_grid(1.0, 1.0, 21), Some((5, 5)));
        assert_eq!(table_1_1_grid(1.0, 1.0, 50), None);
    }

    #[test]
    fn tab_spacing_rule() {
        // 48 × 24 in: 8 × 4 = 32 readings, 6 in apart (TAB procedures, methods.md §2.1)
        assert_eq!(tab_spacing_counts(48.0 * IN, 24.0 * IN), (8, 4));
        // small duct 12 × 8 in: spacing gives 2 × 2, raised to 16 readings
        let (w, h) = tab_spacing_counts(12.0 * IN, 8.0 * IN);
        assert!(w * h >= 16 && w >= 2 && h >= 2, "{w}×{h}");
        // very large duct 120 × 96 in: capped at 64 readings
        let (w, h) = tab_spacing_counts(120.0 * IN, 96.0 * IN);
        assert!(w * h <= 64, "{w}×{h}");
    }

    #[test]
    fn tab_spacing_rule_is_bounded_for_any_size() {
        // the same counts as the rule without the starting cap for every duct up to 1000 in a
        // side (the plain rule below, which counts down one step at a time) ...
        let plain = |width_m: f64, height_m: f64| {
            let per = |l: f64| ((l / TAB_MAX_SPACING_M) - 1e-9).ceil().max(2.0) as usize;
            let (mut kw, mut kh) = (per(width_m), per(height_m));
            while kw * kh < TAB_MIN_READINGS {
                if width_m / kw as f64 >= height_m / kh as f64 {
                    kw += 1;
                } else {
                    kh += 1;
                }
            }
            while kw * kh > TAB_MAX_READINGS {
                if (width_m / kw as f64 <= height_m / kh as f64 && kw > 2) || kh <= 2 {
                    kw -= 1;
                } else {
                    kh -= 1;
                }
            }
            (kw, kh)
        };
        for w in (1..=1000).step_by(7) {
            for h in (1..=1000).step_by(11) {
                let (w, h) = (w as f64 * IN, h as f64 * IN);
                assert_eq!(tab_spacing_counts(w, h), plain(w, h), "{w} × {h} m");
            }
        }
        // ... and a few steps for absurd ones (this used to count down from 1.7e11, or overflow)
        let t = std::time::Instant::now();
        for (w, h) in [
            (1e12 * IN, 24.0 * IN),
            (24.0 * IN, 1e12 * IN),
            (1e300, 1e300),
            (f64::MAX, 1e-300),
        ] {
            let (kw, kh) = tab_spacing_counts(w, h);
            assert!(
                kw >= 2 && kh >= 2 && kw * kh <= TAB_MAX_READINGS,
                "{kw}×{kh}"
            );
        }
        assert!(t.elapsed() < std::time::Duration::from_secs(1));
    }

    #[test]
    fn log_tchebycheff_side_choice_and_depths() {
        // ASHRAE 111 rule restated in methods.md §2.2 [P]: <30 in 5, 30-36 in 6, >36 in 7
        assert_eq!(log_tchebycheff_per_side(29.9 * IN), 5);
        assert_eq!(log_tchebycheff_per_side(30.0 * IN), 6);
        assert_eq!(log_tchebycheff_per_side(36.0 * IN), 6);
        assert_eq!(log_tchebycheff_per_side(36.1 * IN), 7);
        // methods.md §2.2 [P]: insertion depths for a 20 in side, 5 points: 1.48, 5.76, 10, 14.24, 18.52 in
        let spec = LayoutSpec::new(Method::LogTchebycheff);
        let p = plan(24.0 * IN, 20.0 * IN, &spec).unwrap();
        for (f, want) in p.fractions.iter().zip([1.48, 5.76, 10.0, 14.24, 18.52]) {
            assert!((f * 20.0 - want).abs() < 0.005, "{f}");
        }
        let mut spec = LayoutSpec::new(Method::LogTchebycheff);
        spec.lines = Some(4);
        assert!(plan(1.0, 1.0, &spec).is_err());
    }

    #[test]
    fn log_linear_rectangular_is_refused_with_a_reason() {
        let e = plan(1.0, 1.0, &LayoutSpec::new(Method::LogLinear)).unwrap_err();
        assert!(e.to_string().contains("not yet"), "{e}");
    }
}
