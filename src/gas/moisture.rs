//! Stack-gas moisture: the rule that in saturated gas the lower of the measured and the saturation
//! value is used.
//!
//! Owns [`limit_to_saturation`]. The Method 4 train itself is reduced in [`super::method4`]. It must
//! not pick the stack temperature: the caller passes the temperature and absolute pressure to use.

use super::error::{fraction, positive, GasError};
use super::saturation::{saturation_pressure_pa, ICE_RANGE_K, WATER_RANGE_K};

/// Which value [`limit_to_saturation`] kept.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MoistureBasis {
    /// The measured Bws (it was at or below saturation, or saturation cannot limit).
    Measured,
    /// The saturation value p_ws(Ts)/Ps, lower than the measured one (droplets in the gas).
    Saturation,
}

/// The moisture a run uses, with what it was chosen from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StackMoisture {
    /// The Bws to use.
    pub bws: f64,
    /// The measured Bws.
    pub measured_bws: f64,
    /// p_ws(Ts)/Ps (may exceed 1 where the gas is above its boiling point). `None` above 200 °C,
    /// beyond the saturation correlation, where saturation cannot limit (see
    /// [`limit_to_saturation`]).
    pub saturation_bws: Option<f64>,
    /// Which one [`StackMoisture::bws`] is.
    pub basis: MoistureBasis,
}

/// In saturated gas Method 4 takes the lower of the measured Bws and the saturation value
/// p_ws(Ts)/Ps (EPA Method 4 §12.1.7 (clause number from memory); rule per reference
/// calculations.md §2 \[P\]). p_ws is the ASHRAE Hyland–Wexler correlation ([`super::saturation`]).
///
/// Above 200 °C the correlation ends, but p_ws(200 °C) is already 1.55 MPa: where the stack
/// pressure is below that, saturation exceeds Bws = 1 and cannot limit, so the measured value is
/// kept with `saturation_bws: None`. A stack hotter than 200 °C at a higher pressure is rejected.
pub fn limit_to_saturation(
    measured_bws: f64,
    stack_temperature_k: f64,
    stack_pressure_pa: f64,
) -> Result<StackMoisture, GasError> {
    let measured = fraction("measured water vapour mole fraction", measured_bws)?;
    if measured >= 1.0 {
        return Err(GasError::NoDryGas { bws: measured });
    }
    let ps = positive("stack absolute pressure", stack_pressure_pa, "Pa")?;
    let ts = positive("stack temperature", stack_temperature_k, "K")?;
    let saturation_bws = if ts > WATER_RANGE_K.1 {
        let pws_at_limit = saturation_pressure_pa(WATER_RANGE_K.1)?;
        if pws_at_limit >= ps {
            None
        } else {
            return Err(GasError::TemperatureOutOfRange {
                quantity: "stack temperature",
                temperature_k: ts,
                min_k: ICE_RANGE_K.0,
                max_k: WATER_RANGE_K.1,
                correlation: "the saturation limit at this pressure (ASHRAE saturation pressure)",
            });
        }
    } else {
        Some(saturation_pressure_pa(ts)? / ps)
    };
    Ok(match saturation_bws {
        Some(sat) if sat < measured => StackMoisture {
            bws: sat,
            measured_bws: measured,
            saturation_bws,
            basis: MoistureBasis::Saturation,
        },
        _ => StackMoisture {
            bws: measured,
            measured_bws: measured,
            saturation_bws,
            basis: MoistureBasis::Measured,
        },
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    #[test]
    fn saturation_limits_a_wet_measurement() {
        // 50 °C at 101 325 Pa: p_ws 12 349.9 Pa (ASHRAE formula) -> saturation Bws 0.12188.
        let m = limit_to_saturation(0.15, 323.15, 101_325.0).unwrap();
        assert_eq!(m.basis, MoistureBasis::Saturation);
        assert!((m.bws - 12_349.856 / 101_325.0).abs() < 1e-6, "{}", m.bws);
        assert_eq!(m.measured_bws, 0.15);
        assert_eq!(m.saturation_bws, Some(m.bws));
    }

    #[test]
    fn measured_value_kept_below_saturation() {
        let m = limit_to_saturation(0.10, 323.15, 101_325.0).unwrap();
        assert_eq!(m.basis, MoistureBasis::Measured);
        assert_eq!(m.bws, 0.10);
        let sat = m.saturation_bws.unwrap();
        assert!(sat > 0.12 && sat < 0.13);
    }

    #[test]
    fn hot_stacks_cannot_be_saturation_limited() {
        // 140 °C: p_ws 361 kPa > 100.7 kPa, so the ratio is above 1 and the measurement stands.
        let m = limit_to_saturation(0.11, 413.15, 100_700.0).unwrap();
        assert_eq!(m.basis, MoistureBasis::Measured);
        assert!(m.saturation_bws.unwrap() > 1.0);
        // 300 °C is beyond the correlation but far above boiling at 1 atm.
        let m = limit_to_saturation(0.11, 573.15, 101_325.0).unwrap();
        assert_eq!(m.basis, MoistureBasis::Measured);
        assert_eq!(m.saturation_bws, None);
        // ... at 2 MPa it could be limiting and is out of range.
        assert!(matches!(
            limit_to_saturation(0.11, 573.15, 2.0e6),
            Err(GasError::TemperatureOutOfRange { .. })
        ));
    }

    #[test]
    fn rejects_bad_moisture_or_conditions() {
        assert_eq!(
            limit_to_saturation(1.0, 320.0, 101_325.0),
            Err(GasError::NoDryGas { bws: 1.0 })
        );
        assert!(limit_to_saturation(-0.1, 320.0, 101_325.0).is_err());
        assert!(limit_to_saturation(0.1, 0.0, 101_325.0).is_err());
        assert!(limit_to_saturation(0.1, 320.0, 0.0).is_err());
        assert!(limit_to_saturation(0.1, 150.0, 101_325.0).is_err());
    }

    proptest! {
        #[test]
        fn limited_value_never_exceeds_either(bws in 0.0f64..0.6, t in 275.0f64..373.0, p in 80_000.0f64..120_000.0) {
            let m = limit_to_saturation(bws, t, p).unwrap();
            prop_assert!(m.bws <= bws);
            if let Some(s) = m.saturation_bws { prop_assert!(m.bws <= s); }
        }
    }
}
