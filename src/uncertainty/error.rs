//! Errors raised while building uncertainty components and budgets.
//!
//! Owns only the error type and its wording; it must not decide policy. Messages say what was
//! expected, what was found, and quote the raw value.

use std::fmt;

/// Why a component or budget could not be built.
#[derive(Debug, Clone, PartialEq)]
pub enum UncertaintyError {
    /// A number was NaN or infinite where a finite value is required.
    NotFinite {
        /// The quantity, e.g. `"temperature standard uncertainty"`.
        quantity: String,
        /// The raw value.
        value: f64,
    },
    /// A number was outside the range the quantity allows.
    OutOfRange {
        /// The quantity.
        quantity: String,
        /// The allowed range, in words, e.g. `"greater than zero"`.
        expected: &'static str,
        /// The raw value.
        value: f64,
    },
    /// Too few values to evaluate a statistic.
    TooFewValues {
        /// What the values are, e.g. `"point velocities"`.
        quantity: String,
        /// The least number accepted.
        needed: usize,
        /// How many were given.
        found: usize,
    },
    /// One value of a series was not acceptable.
    BadValueInSeries {
        /// What the series is.
        quantity: String,
        /// 1-based position in the series.
        position: usize,
        /// The allowed range, in words.
        expected: &'static str,
        /// The raw value.
        value: f64,
    },
    /// Two series that must pair up have different lengths.
    LengthMismatch {
        /// What must match.
        quantity: String,
        /// Length of the first series.
        expected: usize,
        /// Length of the second series.
        found: usize,
    },
    /// A budget with no components has no combined uncertainty.
    EmptyBudget,
    /// The chosen spatial-integration option needs an input that was not given.
    MissingSpatialInput {
        /// The option's stable name.
        method: &'static str,
        /// What is missing.
        missing: &'static str,
    },
}

impl fmt::Display for UncertaintyError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::NotFinite { quantity, value } => {
                write!(f, "{quantity} must be a finite number, found `{value}`")
            }
            Self::OutOfRange {
                quantity,
                expected,
                value,
            } => write!(f, "{quantity} must be {expected}, found `{value}`"),
            Self::TooFewValues {
                quantity,
                needed,
                found,
            } => write!(
                f,
                "{quantity}: at least {needed} values are needed, found {found}"
            ),
            Self::BadValueInSeries {
                quantity,
                position,
                expected,
                value,
            } => write!(
                f,
                "{quantity} #{position} must be {expected}, found `{value}`"
            ),
            Self::LengthMismatch {
                quantity,
                expected,
                found,
            } => write!(
                f,
                "{quantity}: expected {expected} values to pair up, found {found}"
            ),
            Self::EmptyBudget => write!(
                f,
                "an uncertainty budget needs at least one component, found none"
            ),
            Self::MissingSpatialInput { method, missing } => {
                write!(
                    f,
                    "spatial-integration option `{method}` needs {missing}, which was not given"
                )
            }
        }
    }
}

impl std::error::Error for UncertaintyError {}

/// Checks that `value` is finite and not negative.
pub(crate) fn non_negative(quantity: &str, value: f64) -> Result<f64, UncertaintyError> {
    finite(quantity, value)?;
    if value < 0.0 {
        return Err(UncertaintyError::OutOfRange {
            quantity: quantity.to_string(),
            expected: "zero or greater",
            value,
        });
    }
    Ok(value)
}

/// Checks that `value` is finite and greater than zero.
pub(crate) fn positive(quantity: &str, value: f64) -> Result<f64, UncertaintyError> {
    finite(quantity, value)?;
    if value <= 0.0 {
        return Err(UncertaintyError::OutOfRange {
            quantity: quantity.to_string(),
            expected: "greater than zero",
            value,
        });
    }
    Ok(value)
}

/// Checks that `value` is finite.
pub(crate) fn finite(quantity: &str, value: f64) -> Result<f64, UncertaintyError> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(UncertaintyError::NotFinite {
            quantity: quantity.to_string(),
            value,
        })
    }
}
