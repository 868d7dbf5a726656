//! Duct cross-sections: shape, inside dimensions, area, equivalent diameter.
//!
//! Owns the plane's geometry only. A [`Duct`] that exists has positive, finite inside dimensions; the
//! liner (subtracted twice, once per wall) is taken off at construction, so nothing downstream
//! re-checks or re-subtracts. No unit parsing here: lengths arrive in metres.

use std::fmt;

/// The cross-section of the measurement plane, inside dimensions in metres.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
#[serde(tag = "shape", rename_all = "lowercase")]
pub enum Shape {
    Round {
        diameter_m: f64,
    },
    /// `width_m` is the side the ports are in (traverse lines are spread across it); the points of a
    /// line run along `height_m`.
    Rectangular {
        width_m: f64,
        height_m: f64,
    },
}

/// A validated duct cross-section.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Duct {
    shape: Shape,
}

/// Why a duct could not be made.
#[derive(Debug, Clone, PartialEq)]
pub enum GeometryError {
    NotPositive {
        what: &'static str,
        value_m: f64,
    },
    /// Larger than any duct or stack ([`crate::limits::MAX_DUCT_SIZE_M`]).
    TooLarge {
        what: &'static str,
        value_m: f64,
    },
    LinerTooThick {
        side: &'static str,
        side_m: f64,
        liner_m: f64,
    },
    NegativeLiner {
        liner_m: f64,
    },
}

impl fmt::Display for GeometryError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            GeometryError::NotPositive { what, value_m } => {
                write!(f, "the {what} must be a positive length, found {value_m} m")
            }
            GeometryError::TooLarge { what, value_m } => write!(
                f,
                "the {what} must be at most {} m, found {value_m:e} m",
                crate::limits::MAX_DUCT_SIZE_M
            ),
            GeometryError::LinerTooThick {
                side,
                side_m,
                liner_m,
            } => write!(
                f,
                "a {liner_m} m liner on both walls leaves nothing of the {side_m} m {side}"
            ),
            GeometryError::NegativeLiner { liner_m } => {
                write!(
                    f,
                    "the liner thickness cannot be negative, found {liner_m} m"
                )
            }
        }
    }
}

impl std::error::Error for GeometryError {}

fn positive(what: &'static str, value_m: f64) -> Result<f64, GeometryError> {
    if !(value_m.is_finite() && value_m > 0.0) {
        Err(GeometryError::NotPositive { what, value_m })
    } else if value_m > crate::limits::MAX_DUCT_SIZE_M {
        Err(GeometryError::TooLarge { what, value_m })
    } else {
        Ok(value_m)
    }
}

impl Duct {
    /// A round duct or stack of the given inside diameter.
    pub fn round(diameter_m: f64) -> Result<Duct, GeometryError> {
        Ok(Duct {
            shape: Shape::Round {
                diameter_m: positive("diameter", diameter_m)?,
            },
        })
    }

    /// A rectangular duct from its inside width (port side) and height.
    pub fn rectangular(width_m: f64, height_m: f64) -> Result<Duct, GeometryError> {
        Ok(Duct {
            shape: Shape::Rectangular {
                width_m: positive("width", width_m)?,
                height_m: positive("height", height_m)?,
            },
        })
    }

    /// A rectangular duct from sheet-metal dimensions with an internal liner: the liner is
    /// subtracted twice from each side (both walls are lined).
    pub fn rectangular_lined(
        width_m: f64,
        height_m: f64,
        liner_m: f64,
    ) -> Result<Duct, GeometryError> {
        let w = positive("width", width_m)?;
        let h = positive("height", height_m)?;
        if !(liner_m.is_finite() && liner_m >= 0.0) {
            return Err(GeometryError::NegativeLiner { liner_m });
        }
        for (side, side_m) in [("width", w), ("height", h)] {
            if side_m - 2.0 * liner_m <= 0.0 {
                return Err(GeometryError::LinerTooThick {
                    side,
                    side_m,
                    liner_m,
                });
            }
        }
        Duct::rectangular(w - 2.0 * liner_m, h - 2.0 * liner_m)
    }

    /// A round duct with an internal liner: the diameter loses twice the liner.
    pub fn round_lined(diameter_m: f64, liner_m: f64) -> Result<Duct, GeometryError> {
        let d = positive("diameter", diameter_m)?;
        if !(liner_m.is_finite() && liner_m >= 0.0) {
            return Err(GeometryError::NegativeLiner { liner_m });
        }
        if d - 2.0 * liner_m <= 0.0 {
            return Err(GeometryError::LinerTooThick {
                side: "diameter",
                side_m: d,
                liner_m,
            });
        }
        Duct::round(d - 2.0 * liner_m)
    }

    pub fn shape(&self) -> Shape {
        self.shape
    }

    pub fn is_round(&self) -> bool {
        matches!(self.shape, Shape::Round { .. })
    }

    /// Inside cross-sectional area.
    pub fn area_m2(&self) -> f64 {
        match self.shape {
            Shape::Round { diameter_m } => std::f64::consts::PI * diameter_m * diameter_m / 4.0,
            Shape::Rectangular { width_m, height_m } => width_m * height_m,
        }
    }

    /// The diameter for rules written in diameters: the inside diameter of a round duct, the
    /// equivalent diameter `2LW/(L+W)` of a rectangular one (EPA Method 1 Eq. 1-1, equal to the
    /// hydraulic diameter 4A/P).
    pub fn equivalent_diameter_m(&self) -> f64 {
        match self.shape {
            Shape::Round { diameter_m } => diameter_m,
            Shape::Rectangular { width_m, height_m } => {
                2.0 * width_m * height_m / (width_m + height_m)
            }
        }
    }

    /// Length of one traverse line: the diameter, or the height of a rectangular duct.
    pub fn line_length_m(&self) -> f64 {
        match self.shape {
            Shape::Round { diameter_m } => diameter_m,
            Shape::Rectangular { height_m, .. } => height_m,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const REL_TOL: f64 = 1e-9;
    const IN: f64 = 0.0254;

    #[test]
    fn round_area() {
        let d = Duct::round(5.0 * 0.3048).unwrap();
        // calculations.md §8, EPA Method 2 English example: D 5.0 ft -> A 19.63495 ft² (derived)
        let a_ft2 = d.area_m2() / (0.3048 * 0.3048);
        assert!((a_ft2 - 19.63495).abs() < 1e-5);
    }

    #[test]
    fn liner_is_subtracted_twice() {
        // calculations.md §3 [P]: 22 × 15 in with a 1 in liner -> 20 × 13 in -> 1.8056 ft²
        let d = Duct::rectangular_lined(22.0 * IN, 15.0 * IN, 1.0 * IN).unwrap();
        let a_ft2 = d.area_m2() / (0.3048 * 0.3048);
        assert!((a_ft2 - 1.8056).abs() < 5e-5, "{a_ft2}");
    }

    #[test]
    fn equivalent_diameter() {
        // methods.md §2.4 [D]: EPA Method 1 Eq. 1-1, 48 × 36 in -> 41.1429 in
        let d = Duct::rectangular(48.0 * IN, 36.0 * IN).unwrap();
        assert!((d.equivalent_diameter_m() / IN - 41.142857).abs() < 1e-4);
        // 4A/P is the same number
        let (w, h) = (48.0 * IN, 36.0 * IN);
        assert!((d.equivalent_diameter_m() - 4.0 * w * h / (2.0 * (w + h))).abs() < REL_TOL);
    }

    #[test]
    fn rejects_impossible_ducts() {
        assert!(matches!(
            Duct::round(0.0),
            Err(GeometryError::NotPositive { .. })
        ));
        assert!(matches!(
            Duct::round(f64::NAN),
            Err(GeometryError::NotPositive { .. })
        ));
        assert!(matches!(
            Duct::rectangular(1.0, -2.0),
            Err(GeometryError::NotPositive { what: "height", .. })
        ));
        assert!(matches!(
            Duct::rectangular_lined(0.1, 0.05, 0.03),
            Err(GeometryError::LinerTooThick { side: "height", .. })
        ));
        assert!(matches!(
            Duct::rectangular_lined(0.1, 0.05, -0.01),
            Err(GeometryError::NegativeLiner { .. })
        ));
    }
}
