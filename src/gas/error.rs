//! The one error type of the gas-properties core.
//!
//! Owns the wording of every rejection made by [`crate::gas`]: what was expected, what was found,
//! and the raw value. It must not know about files, lines or columns: the input layer wraps these
//! errors with the location the value came from.

use std::fmt;

/// Why a gas-property input or result was rejected.
#[derive(Debug, Clone, PartialEq)]
pub enum GasError {
    /// A number that has to be finite was NaN or infinite.
    NotFinite {
        /// What the value is, in words (`"O2 fraction"`).
        quantity: &'static str,
        /// The raw value.
        value: f64,
    },
    /// A mole fraction or relative humidity outside 0..=1.
    FractionOutOfRange {
        /// What the value is, in words.
        quantity: &'static str,
        /// The raw value (a fraction, 0.09 for 9 %).
        value: f64,
    },
    /// The measured dry components add up to more than the whole gas.
    CompositionOverfull {
        /// O2 + CO2 + CO (+ Ar), as a fraction.
        sum: f64,
    },
    /// A quantity that has to be strictly positive (pressure, temperature, molar mass, volume).
    NotPositive {
        /// What the value is, in words.
        quantity: &'static str,
        /// The raw value, in the SI unit named by `unit`.
        value: f64,
        /// The unit of `value`.
        unit: &'static str,
    },
    /// A quantity that may be zero but not negative (a weight or volume gain).
    Negative {
        /// What the value is, in words.
        quantity: &'static str,
        /// The raw value, in the SI unit named by `unit`.
        value: f64,
        /// The unit of `value`.
        unit: &'static str,
    },
    /// A temperature outside the range a correlation was fitted over.
    TemperatureOutOfRange {
        /// What the temperature is, in words (`"dry-bulb temperature"`).
        quantity: &'static str,
        /// The raw value.
        temperature_k: f64,
        /// Lowest accepted value.
        min_k: f64,
        /// Highest accepted value.
        max_k: f64,
        /// The correlation and its source, for the message.
        correlation: &'static str,
    },
    /// A wet-bulb or dew-point temperature above the dry-bulb temperature.
    AboveDryBulb {
        /// `"wet-bulb temperature"` or `"dew-point temperature"`.
        quantity: &'static str,
        /// The offending temperature.
        temperature_k: f64,
        /// The dry-bulb temperature it was compared with.
        dry_bulb_k: f64,
    },
    /// The water vapour pressure is not below the total pressure, so no humidity ratio exists.
    VapourPressureNotBelowTotal {
        /// Partial pressure of the water vapour.
        vapour_pressure_pa: f64,
        /// Total (absolute) pressure.
        pressure_pa: f64,
    },
    /// The ASHRAE wet-bulb relation gave a negative humidity ratio: the wet-bulb depression is larger
    /// than any real air at this dry-bulb temperature can produce.
    WetBulbDepressionTooLarge {
        /// Dry-bulb temperature.
        dry_bulb_k: f64,
        /// Wet-bulb temperature.
        wet_bulb_k: f64,
        /// The (negative) humidity ratio the relation produced.
        humidity_ratio: f64,
    },
    /// A water vapour mole fraction of 1 or more: there is no dry gas left to refer results to.
    NoDryGas {
        /// The raw value.
        bws: f64,
    },
}

impl fmt::Display for GasError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            GasError::NotFinite { quantity, value } => {
                write!(f, "{quantity} must be a finite number, found `{value}`")
            }
            GasError::FractionOutOfRange { quantity, value } => write!(
                f,
                "{quantity} must be between 0 and 1 (0 % to 100 %), found {value} ({} %)",
                value * 100.0
            ),
            GasError::CompositionOverfull { sum } => write!(
                f,
                "O2 + CO2 + CO (+ Ar) must not exceed 100 % of the dry gas (N2 is the balance), \
                 found {} %",
                sum * 100.0
            ),
            GasError::NotPositive {
                quantity,
                value,
                unit,
            } => write!(f, "{quantity} must be greater than zero, found {value} {unit}"),
            GasError::Negative {
                quantity,
                value,
                unit,
            } => write!(f, "{quantity} must not be negative, found {value} {unit}"),
            GasError::TemperatureOutOfRange {
                quantity,
                temperature_k,
                min_k,
                max_k,
                correlation,
            } => write!(
                f,
                "{quantity} must be between {:.2} °C and {:.2} °C for {correlation}, found {:.2} °C \
                 ({temperature_k} K)",
                min_k - 273.15,
                max_k - 273.15,
                temperature_k - 273.15
            ),
            GasError::AboveDryBulb {
                quantity,
                temperature_k,
                dry_bulb_k,
            } => write!(
                f,
                "{quantity} must not exceed the dry-bulb temperature ({:.2} °C), found {:.2} °C \
                 ({temperature_k} K)",
                dry_bulb_k - 273.15,
                temperature_k - 273.15
            ),
            GasError::VapourPressureNotBelowTotal {
                vapour_pressure_pa,
                pressure_pa,
            } => write!(
                f,
                "water vapour pressure must be below the total pressure ({pressure_pa} Pa), \
                 found {vapour_pressure_pa} Pa"
            ),
            GasError::WetBulbDepressionTooLarge {
                dry_bulb_k,
                wet_bulb_k,
                humidity_ratio,
            } => write!(
                f,
                "wet-bulb temperature {:.2} °C is too far below the dry-bulb temperature {:.2} °C: \
                 the ASHRAE wet-bulb relation gives a humidity ratio of {humidity_ratio} (expected \
                 at least 0)",
                wet_bulb_k - 273.15,
                dry_bulb_k - 273.15
            ),
            GasError::NoDryGas { bws } => write!(
                f,
                "water vapour mole fraction must be below 1 (100 %), found {bws} ({} %)",
                bws * 100.0
            ),
        }
    }
}

impl std::error::Error for GasError {}

/// Rejects NaN and infinities.
pub(crate) fn finite(quantity: &'static str, value: f64) -> Result<f64, GasError> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(GasError::NotFinite { quantity, value })
    }
}

/// Accepts a finite value strictly above zero.
pub(crate) fn positive(
    quantity: &'static str,
    value: f64,
    unit: &'static str,
) -> Result<f64, GasError> {
    finite(quantity, value)?;
    if value > 0.0 {
        Ok(value)
    } else {
        Err(GasError::NotPositive {
            quantity,
            value,
            unit,
        })
    }
}

/// Accepts a finite value at or above zero.
pub(crate) fn non_negative(
    quantity: &'static str,
    value: f64,
    unit: &'static str,
) -> Result<f64, GasError> {
    finite(quantity, value)?;
    if value >= 0.0 {
        Ok(value)
    } else {
        Err(GasError::Negative {
            quantity,
            value,
            unit,
        })
    }
}

/// Accepts a finite fraction in 0..=1.
pub(crate) fn fraction(quantity: &'static str, value: f64) -> Result<f64, GasError> {
    finite(quantity, value)?;
    if (0.0..=1.0).contains(&value) {
        Ok(value)
    } else {
        Err(GasError::FractionOutOfRange { quantity, value })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn messages_quote_the_raw_value() {
        let e = fraction("O2 fraction", -0.02).unwrap_err();
        assert_eq!(
            e.to_string(),
            "O2 fraction must be between 0 and 1 (0 % to 100 %), found -0.02 (-2 %)"
        );
        let e = positive("stack pressure", 0.0, "Pa").unwrap_err();
        assert_eq!(
            e.to_string(),
            "stack pressure must be greater than zero, found 0 Pa"
        );
        let e = non_negative("silica gel gain", -1.0, "kg").unwrap_err();
        assert_eq!(
            e.to_string(),
            "silica gel gain must not be negative, found -1 kg"
        );
        let e = finite("meter Y", f64::NAN).unwrap_err();
        assert_eq!(
            e.to_string(),
            "meter Y must be a finite number, found `NaN`"
        );
    }

    #[test]
    fn helpers_pass_valid_values_through() {
        assert_eq!(fraction("x", 0.0), Ok(0.0));
        assert_eq!(fraction("x", 1.0), Ok(1.0));
        assert_eq!(non_negative("x", 0.0, "kg"), Ok(0.0));
        assert_eq!(positive("x", 1e-9, "Pa"), Ok(1e-9));
        assert!(positive("x", f64::INFINITY, "Pa").is_err());
    }
}
