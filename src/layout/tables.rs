//! Tabulated point positions, as printed in the standards, with their sources.
//!
//! Owns the published rows and the checks that make a misprinted row impossible to load: a row must
//! have the stated count, be strictly increasing, lie strictly inside (0, 1) and be symmetric
//! (p_i + p_(N+1-i) = 1 to the table's printed precision). Methods that follow from a formula
//! (equal-area) are not tabulated here; their tests compare against the published tables.

use std::fmt;

/// One printed row: positions as fractions of the traverse line from the near wall.
#[derive(Debug, Clone, Copy)]
pub struct Row {
    pub points: usize,
    pub fractions: &'static [f64],
}

/// A published table of rows with its source, printed on reports.
#[derive(Debug, Clone, Copy)]
pub struct Table {
    pub name: &'static str,
    pub source: &'static str,
    /// Printed precision of the entries (3 decimals -> 0.0005 half-unit); the symmetry check allows
    /// twice this (two rounded entries).
    pub printed_half_unit: f64,
    pub rows: &'static [Row],
}

/// ISO 5802:2001 / ISO 3966 log-linear rule for round ducts (equal weights), y/D from the wall.
pub const ROUND_LOG_LINEAR: Table = Table {
    name: "log-linear, round",
    source: "ISO 5802:2001 (log-linear rule; also ISO 3966), y/D to 3 decimals",
    printed_half_unit: 0.0005,
    rows: &[
        Row {
            points: 6,
            fractions: &[0.032, 0.135, 0.321, 0.679, 0.865, 0.968],
        },
        Row {
            points: 8,
            fractions: &[0.021, 0.117, 0.184, 0.345, 0.655, 0.816, 0.883, 0.979],
        },
        Row {
            points: 10,
            fractions: &[
                0.019, 0.077, 0.153, 0.217, 0.361, 0.639, 0.783, 0.847, 0.923, 0.981,
            ],
        },
    ],
};

/// ISO 5802:2001 log-Tchebycheff rule for round ducts (equal weights), y/D from the wall.
pub const ROUND_LOG_TCHEBYCHEFF: Table = Table {
    name: "log-Tchebycheff, round",
    source: "ISO 5802:2001 (log-Tchebycheff rule), y/D to 3 decimals",
    printed_half_unit: 0.0005,
    rows: &[
        Row {
            points: 6,
            fractions: &[0.032, 0.137, 0.312, 0.688, 0.863, 0.968],
        },
        Row {
            points: 8,
            fractions: &[0.024, 0.100, 0.194, 0.334, 0.666, 0.806, 0.900, 0.976],
        },
    ],
};

/// ASHRAE Standard 111-1988 Fig. D-10 (with its 1997 errata): log-Tchebycheff positions for
/// rectangular ducts, fractions of a side from the wall, the same rule on both axes, equal weights.
pub const RECT_LOG_TCHEBYCHEFF: Table = Table {
    name: "log-Tchebycheff, rectangular",
    source: "ASHRAE Standard 111-1988, Fig. D-10 with 1997 errata",
    printed_half_unit: 0.0005,
    rows: &[
        Row {
            points: 5,
            fractions: &[0.074, 0.288, 0.500, 0.712, 0.926],
        },
        Row {
            points: 6,
            fractions: &[0.061, 0.235, 0.437, 0.563, 0.765, 0.939],
        },
        Row {
            points: 7,
            fractions: &[0.053, 0.203, 0.366, 0.500, 0.634, 0.797, 0.947],
        },
    ],
};

/// Why a table row was refused.
#[derive(Debug, Clone, PartialEq)]
pub enum TableError {
    WrongCount {
        table: &'static str,
        stated: usize,
        found: usize,
    },
    NotIncreasing {
        table: &'static str,
        points: usize,
        index: usize,
    },
    OutsideLine {
        table: &'static str,
        points: usize,
        index: usize,
    },
    NotSymmetric {
        table: &'static str,
        points: usize,
        index: usize,
        sum: f64,
    },
}

impl fmt::Display for TableError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            TableError::WrongCount {
                table,
                stated,
                found,
            } => write!(f, "{table}: row for {stated} points holds {found} values"),
            TableError::NotIncreasing {
                table,
                points,
                index,
            } => write!(
                f,
                "{table}: {points}-point row is out of order at point {index}"
            ),
            TableError::OutsideLine {
                table,
                points,
                index,
            } => write!(
                f,
                "{table}: {points}-point row, point {index} is not inside the duct"
            ),
            TableError::NotSymmetric {
                table,
                points,
                index,
                sum,
            } => write!(
                f,
                "{table}: {points}-point row is not symmetric at point {index} (p + mirror = {sum})"
            ),
        }
    }
}

impl std::error::Error for TableError {}

/// Checks one row against the rules every published row obeys.
pub fn validate_row(table: &Table, row: &Row) -> Result<(), TableError> {
    let n = row.fractions.len();
    if n != row.points {
        return Err(TableError::WrongCount {
            table: table.name,
            stated: row.points,
            found: n,
        });
    }
    // order first: a misprinted entry shows up where it breaks the sequence
    for (i, &p) in row.fractions.iter().enumerate() {
        if !(p > 0.0 && p < 1.0) {
            return Err(TableError::OutsideLine {
                table: table.name,
                points: n,
                index: i + 1,
            });
        }
        if i > 0 && p <= row.fractions[i - 1] {
            return Err(TableError::NotIncreasing {
                table: table.name,
                points: n,
                index: i + 1,
            });
        }
    }
    for (i, &p) in row.fractions.iter().enumerate() {
        let sum = p + row.fractions[n - 1 - i];
        if (sum - 1.0).abs() > 2.0 * table.printed_half_unit + 1e-12 {
            return Err(TableError::NotSymmetric {
                table: table.name,
                points: n,
                index: i + 1,
                sum,
            });
        }
    }
    Ok(())
}

impl Table {
    /// The row for `points`, validated; `None` when the table has no such row.
    pub fn row(&self, points: usize) -> Option<Result<&'static [f64], TableError>> {
        self.rows
            .iter()
            .find(|r| r.points == points)
            .map(|r| validate_row(self, r).map(|()| r.fractions))
    }

    /// The counts this table offers.
    pub fn counts(&self) -> Vec<usize> {
        self.rows.iter().map(|r| r.points).collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::f64::consts::FRAC_1_SQRT_2;

    #[test]
    fn every_shipped_row_is_valid() {
        for t in [
            ROUND_LOG_LINEAR,
            ROUND_LOG_TCHEBYCHEFF,
            RECT_LOG_TCHEBYCHEFF,
        ] {
            for r in t.rows {
                validate_row(&t, r).unwrap();
            }
        }
    }

    #[test]
    fn known_misprints_are_refused() {
        // methods.md §1.2: misprinted copies print "0.32" for 0.032 and end an 8-point row with 0.981
        let bad1 = Table {
            rows: &[Row {
                points: 6,
                fractions: &[0.32, 0.135, 0.321, 0.679, 0.865, 0.968],
            }],
            ..ROUND_LOG_LINEAR
        };
        assert!(matches!(
            validate_row(&bad1, &bad1.rows[0]),
            Err(TableError::NotIncreasing { index: 2, .. })
        ));
        let bad2 = Table {
            rows: &[Row {
                points: 8,
                fractions: &[0.021, 0.117, 0.184, 0.345, 0.655, 0.816, 0.883, 0.981],
            }],
            ..ROUND_LOG_LINEAR
        };
        assert!(matches!(
            validate_row(&bad2, &bad2.rows[0]),
            Err(TableError::NotSymmetric { index: 1, .. })
        ));
        let bad3 = Table {
            rows: &[Row {
                points: 5,
                fractions: &[0.074, 0.288, 0.5, 0.712],
            }],
            ..RECT_LOG_TCHEBYCHEFF
        };
        assert!(matches!(
            validate_row(&bad3, &bad3.rows[0]),
            Err(TableError::WrongCount { .. })
        ));
    }

    /// methods.md §2.2 [D]: the construction "wall points at 1/(n·e), inner points at Chebyshev
    /// nodes of the centre part" reproduces every ASHRAE 111 row to 3 decimals. This checks the
    /// copy of the table against that independent construction.
    #[test]
    fn rect_log_tchebycheff_matches_its_construction() {
        let nodes: [&[f64]; 5] = [
            &[0.0],
            &[-0.5773503, 0.5773503],
            &[-FRAC_1_SQRT_2, 0.0, FRAC_1_SQRT_2],
            &[-0.7946545, -0.1875925, 0.1875925, 0.7946545],
            &[-0.8324975, -0.3745414, 0.0, 0.3745414, 0.8324975],
        ];
        for row in RECT_LOG_TCHEBYCHEFF.rows {
            let n = row.points as f64;
            let wall = 1.0 / (n * std::f64::consts::E);
            let mut built = vec![wall];
            for t in nodes[row.points - 3] {
                built.push(0.5 + (0.5 - 1.0 / n) * t);
            }
            built.push(1.0 - wall);
            for (a, b) in built.iter().zip(row.fractions) {
                assert!(
                    (a - b).abs() <= 0.0005 + 1e-9,
                    "n={} {a} vs {b}",
                    row.points
                );
            }
        }
    }

    /// methods.md §1.3 [D]: the log-Tchebycheff round construction (outer annulus point at the
    /// area-weighted mean of ln(1 - r/R), inner Chebyshev nodes in (r/r_b)²) reproduces ISO 5802.
    #[test]
    fn round_log_tchebycheff_matches_its_construction() {
        // Chebyshev equal-weight nodes on [-1, 1] for 2 and 3 nodes.
        let nodes: [&[f64]; 2] = [
            &[-0.5773503, 0.5773503],
            &[-FRAC_1_SQRT_2, 0.0, FRAC_1_SQRT_2],
        ];
        for row in ROUND_LOG_TCHEBYCHEFF.rows {
            let n = row.points / 2; // annuli per radius
            let rb = ((n as f64 - 1.0) / n as f64).sqrt();
            // mean of ln(1-r) over the annulus rb..1 weighted by r dr, by fine midpoint integration
            let steps = 200_000;
            let (mut num, mut den) = (0.0, 0.0);
            for k in 0..steps {
                let r = rb + (1.0 - rb) * (k as f64 + 0.5) / steps as f64;
                num += (1.0 - r).ln() * r;
                den += r;
            }
            let r_outer = 1.0 - (num / den).exp();
            let mut radii: Vec<f64> = nodes[n - 3]
                .iter()
                .map(|t| rb * ((1.0 + t) / 2.0).sqrt())
                .collect();
            radii.push(r_outer);
            radii.sort_by(|a, b| b.partial_cmp(a).unwrap());
            // near half: y/D = (1 - r/R)/2, outermost first
            for (i, r) in radii.iter().enumerate() {
                let y = (1.0 - r) / 2.0;
                assert!(
                    (y - row.fractions[i]).abs() <= 0.0005 + 1e-6,
                    "n={} i={i} {y} vs {}",
                    row.points,
                    row.fractions[i]
                );
            }
        }
    }
}
