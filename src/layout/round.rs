//! Round ducts: equal-area centroids by formula, log-linear and log-Tchebycheff by table.

use super::tables::{ROUND_LOG_LINEAR, ROUND_LOG_TCHEBYCHEFF};
use super::{LayoutError, LayoutSpec, LinePlacement, Method, Plan, Reach};

/// Field practice for round ducts with the log rules (TAB procedures, methods.md §1.2): 3 diameters
/// at 60° are preferred; 6 points per diameter up to 10 in, 8 above.
const LOG_RULE_DEFAULT_LINES: usize = 3;
const LOG_RULE_SMALL_DUCT_M: f64 = 10.0 * 0.0254;
/// Equal-area default when nothing asks for more: 2 diameters (common practice for stacks).
const EQUAL_AREA_DEFAULT_LINES: usize = 2;
/// Equal-area default per diameter with no minimum given: 12 points in all (EPA Method 1 §11.2.1
/// minimum for stacks over 24 in meeting the 8/2 criterion).
const EQUAL_AREA_DEFAULT_TOTAL: usize = 12;
const MAX_LINES: usize = 8;
/// Half-diameter traverses: 4 ports at 90° unless the survey says otherwise (common practice on
/// large stacks, where one probe cannot cross the whole diameter).
const RADIUS_DEFAULT_LINES: usize = 4;

/// Equal-area centroid positions for `n` points on a diameter (n even), fractions of D from the
/// wall: ring i (1 = innermost) of n/2 sits at r/R = sqrt((2i-1)/n) (EPA Method 1 §12.1; the rule
/// behind Table 1-2).
pub fn equal_area_fractions(n: usize) -> Vec<f64> {
    let rings = n / 2;
    let r = |i: usize| ((2 * i - 1) as f64 / (2 * rings) as f64).sqrt();
    let mut v: Vec<f64> = (1..=rings).rev().map(|i| (1.0 - r(i)) / 2.0).collect();
    v.extend((1..=rings).map(|i| (1.0 + r(i)) / 2.0));
    v
}

fn check_lines(lines: usize) -> Result<usize, LayoutError> {
    if (1..=MAX_LINES).contains(&lines) {
        Ok(lines)
    } else {
        Err(LayoutError::BadCount {
            what: "traverse diameters",
            found: lines,
            allowed: format!("use 1 to {MAX_LINES} diameters"),
        })
    }
}

pub(super) fn plan(diameter_m: f64, spec: &LayoutSpec) -> Result<Plan, LayoutError> {
    let (lines, fractions, source) = match spec.method {
        Method::EqualArea => {
            let lines = check_lines(spec.lines.unwrap_or(EQUAL_AREA_DEFAULT_LINES))?;
            let n = match spec.points_per_line {
                Some(n) => n,
                None => {
                    let total = spec.minimum_points.unwrap_or(EQUAL_AREA_DEFAULT_TOTAL);
                    let per = total.div_ceil(lines);
                    per + per % 2
                }
            };
            if n < 2 || n % 2 != 0 || n > 100 {
                return Err(LayoutError::BadCount {
                    what: "points per diameter",
                    found: n,
                    allowed: "equal-area needs an even count from 2 to 100 (one per half-ring)"
                        .into(),
                });
            }
            if spec.printed_table {
                // Table 1-2 is the formula rounded to 0.1 % of D; rounding keeps the mirror pairs
                // summing to 100 % (checked by Layout::new).
                let f = equal_area_fractions(n)
                    .into_iter()
                    .map(|x| (x * 1000.0).round() / 1000.0)
                    .collect();
                (
                    lines,
                    f,
                    "EPA Method 1 (40 CFR 60 App. A-1) Table 1-2, percent of diameter as printed (0.1 %)"
                        .to_string(),
                )
            } else {
                (
                    lines,
                    equal_area_fractions(n),
                    "EPA Method 1 (40 CFR 60 App. A-1) §12.1 equal-area centroids (exact); Table 1-2"
                        .to_string(),
                )
            }
        }
        Method::LogLinear | Method::LogTchebycheff => {
            let table = if spec.method == Method::LogLinear {
                ROUND_LOG_LINEAR
            } else {
                ROUND_LOG_TCHEBYCHEFF
            };
            let lines = check_lines(spec.lines.unwrap_or(LOG_RULE_DEFAULT_LINES))?;
            let n = spec
                .points_per_line
                .unwrap_or(if diameter_m <= LOG_RULE_SMALL_DUCT_M {
                    6
                } else {
                    8
                });
            let row = table.row(n).ok_or_else(|| LayoutError::BadCount {
                what: "points per diameter",
                found: n,
                allowed: format!(
                    "the {} table has rows for {:?} points",
                    table.name,
                    table.counts()
                ),
            })??;
            (lines, row.to_vec(), table.source.to_string())
        }
    };
    let lines = (0..lines)
        .map(|k| LinePlacement {
            offset_m: None,
            angle_deg: Some(180.0 * k as f64 / lines as f64),
        })
        .collect();
    Ok(Plan {
        lines,
        fractions,
        source,
    })
}

/// Half-diameter lines: ports spaced evenly round the stack, each traversed from its wall to the
/// centre. Opposite ports together hold one diameter's points, so the positions are the near half of
/// the diameter layout with twice the points per line (`points_per_line` counts the points of one
/// port's line).
pub(super) fn plan_radii(diameter_m: f64, spec: &LayoutSpec) -> Result<Plan, LayoutError> {
    let ports = check_lines(spec.lines.unwrap_or(RADIUS_DEFAULT_LINES))?;
    let mut diameters = spec.clone();
    diameters.reach = Reach::Diameter;
    diameters.lines = Some((ports / 2).max(1));
    diameters.points_per_line = spec.points_per_line.map(|n| 2 * n);
    let whole = plan(diameter_m, &diameters)?;
    let half = whole.fractions.len() / 2;
    let lines = (0..ports)
        .map(|k| LinePlacement {
            offset_m: None,
            angle_deg: Some(360.0 * k as f64 / ports as f64),
        })
        .collect();
    Ok(Plan {
        lines,
        fractions: whole.fractions[..half].to_vec(),
        source: format!(
            "{}; {ports} ports, each traversed to the centre",
            whole.source
        ),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// EPA Method 1 Table 1-2 is printed to 0.1 % of D.
    const TABLE_1_2_TOL_PCT: f64 = 0.05 + 1e-9;

    #[test]
    fn equal_area_matches_method_1_table_1_2() {
        // EPA Method 1 (40 CFR 60 App. A-1), Table 1-2, transcribed via methods.md §1.1 (% of D)
        let table: &[(usize, &[f64])] = &[
            (2, &[14.6, 85.4]),
            (4, &[6.7, 25.0, 75.0, 93.3]),
            (6, &[4.4, 14.6, 29.6, 70.4, 85.4, 95.6]),
            (8, &[3.2, 10.5, 19.4, 32.3, 67.7, 80.6, 89.5, 96.8]),
            (
                10,
                &[2.6, 8.2, 14.6, 22.6, 34.2, 65.8, 77.4, 85.4, 91.8, 97.4],
            ),
            (
                12,
                &[
                    2.1, 6.7, 11.8, 17.7, 25.0, 35.6, 64.4, 75.0, 82.3, 88.2, 93.3, 97.9,
                ],
            ),
        ];
        for (n, row) in table {
            let f = equal_area_fractions(*n);
            for (a, b) in f.iter().zip(row.iter()) {
                assert!(
                    (a * 100.0 - b).abs() <= TABLE_1_2_TOL_PCT,
                    "n={n}: {a} vs {b}"
                );
            }
        }
        // EPA Method 1 Table 1-2, 24 points, near half, transcribed
        let near24 = [
            1.1, 3.2, 5.5, 7.9, 10.5, 13.2, 16.1, 19.4, 23.0, 27.2, 32.3, 39.8,
        ];
        let f = equal_area_fractions(24);
        for (i, b) in near24.iter().enumerate() {
            assert!((f[i] * 100.0 - b).abs() <= TABLE_1_2_TOL_PCT, "24/{i}");
            assert!((f[23 - i] * 100.0 - (100.0 - b)).abs() <= TABLE_1_2_TOL_PCT);
        }
        // methods.md §1.1 rounding trap: point 7 of 24 is 16.1498 %
        assert!((f[6] * 100.0 - 16.1498).abs() < 5e-4);
    }

    #[test]
    fn printed_table_positions_are_table_1_2_exactly() {
        // methods.md §1.1 [D]: D = 72 in, N = 12 (2 × 6) -> 3.168, 10.512, 21.312 in from Table 1-2
        let mut spec = LayoutSpec::new(Method::EqualArea);
        spec.points_per_line = Some(6);
        spec.printed_table = true;
        let p = plan(72.0 * 0.0254, &spec).unwrap();
        for (f, want) in p
            .fractions
            .iter()
            .zip([3.168, 10.512, 21.312, 50.688, 61.488, 68.832])
        {
            assert!((f * 72.0 - want).abs() < 1e-9, "{f}");
        }
        // the N = 24 rounding trap: 16.1498 % prints as 16.1 (mirror 83.9)
        spec.points_per_line = Some(24);
        let p = plan(1.0, &spec).unwrap();
        assert_eq!(p.fractions[6], 0.161);
        assert_eq!(p.fractions[17], 0.839);
    }

    #[test]
    fn equal_area_annuli_sum_to_the_area() {
        // each centroid ring boundary: ring i spans r_(i-1/2)..r_(i+1/2) with r² = i/n; the n rings
        // of equal area πR²/n sum to πR² (house-style invariant)
        for rings in 1..40usize {
            let total: f64 = (1..=rings)
                .map(|i| (i as f64 / rings as f64) - ((i - 1) as f64 / rings as f64))
                .sum();
            assert!((total - 1.0).abs() < 1e-12);
            // and the centroid radius sqrt((2i-1)/2n) splits its ring into equal halves
            for i in 1..=rings {
                let inner = (i - 1) as f64 / rings as f64;
                let outer = i as f64 / rings as f64;
                let c = (2 * i - 1) as f64 / (2 * rings) as f64;
                assert!(((c - inner) - (outer - c)).abs() < 1e-12);
            }
        }
    }

    #[test]
    fn default_counts() {
        let spec = LayoutSpec::new(Method::LogLinear);
        let p = plan(0.2, &spec).unwrap();
        assert_eq!(p.lines.len(), 3);
        assert_eq!(p.fractions.len(), 6);
        let p = plan(0.5, &spec).unwrap();
        assert_eq!(p.fractions.len(), 8);
        assert_eq!(p.lines[1].angle_deg, Some(60.0));
        let mut spec = LayoutSpec::new(Method::EqualArea);
        spec.minimum_points = Some(20);
        let p = plan(2.0, &spec).unwrap();
        assert_eq!((p.lines.len(), p.fractions.len()), (2, 10));
        spec.minimum_points = Some(18);
        assert_eq!(plan(2.0, &spec).unwrap().fractions.len(), 10);
    }

    #[test]
    fn refuses_counts_the_tables_do_not_have() {
        let mut spec = LayoutSpec::new(Method::LogTchebycheff);
        spec.points_per_line = Some(10);
        assert!(matches!(
            plan(1.0, &spec),
            Err(LayoutError::BadCount { found: 10, .. })
        ));
        let mut spec = LayoutSpec::new(Method::EqualArea);
        spec.points_per_line = Some(7);
        assert!(matches!(
            plan(1.0, &spec),
            Err(LayoutError::BadCount { found: 7, .. })
        ));
        spec.points_per_line = Some(6);
        spec.lines = Some(0);
        assert!(plan(1.0, &spec).is_err());
    }

    #[test]
    fn iso_5802_rows_are_used_verbatim() {
        // ISO 5802:2001 log-linear 6-point row, transcribed via methods.md §1.2
        let mut spec = LayoutSpec::new(Method::LogLinear);
        spec.points_per_line = Some(6);
        assert_eq!(
            plan(0.5, &spec).unwrap().fractions,
            vec![0.032, 0.135, 0.321, 0.679, 0.865, 0.968]
        );
    }

    #[test]
    fn half_diameter_lines_hold_the_near_half_of_each_diameter() {
        // 96 in stack, 4 ports at 90°, 6 points each to the centre: the positions are the first
        // six of EPA Method 1's 12-point diameter (Table 1-2: 2.1, 6.7, 11.8, 17.7, 25.0, 35.6 %
        // of D), 24 points in all like 2 diameters × 12.
        let d = 96.0 * 0.0254;
        let mut spec = LayoutSpec::new(Method::EqualArea);
        spec.reach = Reach::Radius;
        spec.lines = Some(4);
        spec.points_per_line = Some(6);
        let l =
            super::super::locate_points(&crate::geometry::Duct::round(d).unwrap(), &spec).unwrap();
        assert_eq!(l.total_points(), 24);
        assert_eq!(l.reach(), Reach::Radius);
        assert!((l.line_length_m() - d / 2.0).abs() < 1e-12);
        let table = [2.1, 6.7, 11.8, 17.7, 25.0, 35.6];
        for (p, pct) in l.points()[..6].iter().zip(table) {
            assert!(
                (p.position_m / d * 100.0 - pct).abs() <= TABLE_1_2_TOL_PCT,
                "{}",
                p.position_m
            );
            assert!((p.fraction - p.position_m / (d / 2.0)).abs() < 1e-12);
        }
        let angles: Vec<f64> = (0..4)
            .map(|k| l.points()[6 * k].line_angle_deg.unwrap())
            .collect();
        assert_eq!(angles, [0.0, 90.0, 180.0, 270.0]);
        // the deepest mark is the last point plus the port, not the far wall
        let marks = crate::layout::probe_marks(&l, 6.0 * 0.0254, crate::layout::MarkStep::None);
        let deepest = marks.iter().map(|m| m.insertion_m).fold(0.0, f64::max);
        assert!(deepest < d / 2.0 + 6.0 * 0.0254, "{deepest}");
        // an odd number of ports cannot pair into diameters; rectangular ducts are refused
        spec.lines = Some(3);
        assert!(
            super::super::locate_points(&crate::geometry::Duct::round(d).unwrap(), &spec).is_err()
        );
        spec.lines = Some(4);
        assert!(super::super::locate_points(
            &crate::geometry::Duct::rectangular(2.0, 1.0).unwrap(),
            &spec
        )
        .is_err());
    }
}
