//! Saturation pressure of water vapour (Hyland–Wexler, as published in ASHRAE Handbook —
//! Fundamentals, ch. 1 "Psychrometrics").
//!
//! Owns the two correlations (over liquid water, over ice) and the switch between them. It must not
//! decide what the saturation pressure is used for (humidity ratio, Method 4 saturation cap).
//!
//! Switch point: ASHRAE states the ice correlation for −100 to 0 °C and the water correlation for
//! 0 to 200 °C, so [`saturation_pressure_pa`] uses ice below 273.15 K and water from 273.15 K up.
//! (PyPI psychrolib switches at the triple point, 0.01 °C, instead; the two correlations differ by
//! about 0.01 % there, 611.15 Pa over ice against 611.21 Pa over water at 0 °C.)

use super::error::{finite, GasError};

/// 0 °C in kelvin (definition of the Celsius scale).
pub const ZERO_CELSIUS_K: f64 = 273.15;

/// Over-water coefficients C8..C13 of `ln p_ws = C8/T + C9 + C10·T + C11·T² + C12·T³ + C13·ln T`
/// (p_ws in Pa, T in K). ASHRAE Handbook — Fundamentals (2009/2017 SI), ch. 1, eq. 6
/// (Hyland & Wexler 1983); transcribed from the project reference calculations.md §2 \[P\].
const WATER_C8_C13: [f64; 6] = [
    -5.800_220_6e3,
    1.391_499_3,
    -4.864_023_9e-2,
    4.176_476_8e-5,
    -1.445_209_3e-8,
    6.545_967_3,
];

/// Over-ice coefficients C1..C7 of
/// `ln p_ws = C1/T + C2 + C3·T + C4·T² + C5·T³ + C6·T⁴ + C7·ln T` (p_ws in Pa, T in K).
/// ASHRAE Handbook — Fundamentals (2009/2017 SI), ch. 1, eq. 5 (Hyland & Wexler 1983); from memory,
/// confirmed against the PyPI psychrolib 2.5.0 source and its tabulated output
/// (tests/reference/psychrolib.csv).
const ICE_C1_C7: [f64; 7] = [
    -5.674_535_9e3,
    6.392_524_7,
    -9.677_843_0e-3,
    6.221_570_1e-7,
    2.074_782_5e-9,
    -9.484_024_0e-13,
    4.163_501_9,
];

/// Range of the over-water correlation, K: 0 to 200 °C (ASHRAE Fundamentals ch. 1, eq. 6).
pub const WATER_RANGE_K: (f64, f64) = (273.15, 473.15);
/// Range of the over-ice correlation, K: −100 to 0 °C (ASHRAE Fundamentals ch. 1, eq. 5).
pub const ICE_RANGE_K: (f64, f64) = (173.15, 273.15);

fn in_range(
    quantity: &'static str,
    temperature_k: f64,
    range_k: (f64, f64),
    correlation: &'static str,
) -> Result<f64, GasError> {
    let t = finite(quantity, temperature_k)?;
    if t >= range_k.0 && t <= range_k.1 {
        Ok(t)
    } else {
        Err(GasError::TemperatureOutOfRange {
            quantity,
            temperature_k,
            min_k: range_k.0,
            max_k: range_k.1,
            correlation,
        })
    }
}

/// Saturation pressure over liquid water, Pa, for 273.15 K ≤ T ≤ 473.15 K.
pub fn saturation_pressure_over_water_pa(temperature_k: f64) -> Result<f64, GasError> {
    let t = in_range(
        "temperature",
        temperature_k,
        WATER_RANGE_K,
        "the ASHRAE saturation pressure over water",
    )?;
    Ok(over_water(t))
}

/// Saturation pressure over ice, Pa, for 173.15 K ≤ T ≤ 273.15 K.
pub fn saturation_pressure_over_ice_pa(temperature_k: f64) -> Result<f64, GasError> {
    let t = in_range(
        "temperature",
        temperature_k,
        ICE_RANGE_K,
        "the ASHRAE saturation pressure over ice",
    )?;
    Ok(over_ice(t))
}

/// Saturation pressure, Pa: over ice below 0 °C, over water from 0 °C to 200 °C.
pub fn saturation_pressure_pa(temperature_k: f64) -> Result<f64, GasError> {
    let t = in_range(
        "temperature",
        temperature_k,
        (ICE_RANGE_K.0, WATER_RANGE_K.1),
        "the ASHRAE saturation pressure",
    )?;
    Ok(if t < ZERO_CELSIUS_K {
        over_ice(t)
    } else {
        over_water(t)
    })
}

fn over_water(t: f64) -> f64 {
    let [c8, c9, c10, c11, c12, c13] = WATER_C8_C13;
    (c8 / t + c9 + t * (c10 + t * (c11 + t * c12)) + c13 * t.ln()).exp()
}

fn over_ice(t: f64) -> f64 {
    let [c1, c2, c3, c4, c5, c6, c7] = ICE_C1_C7;
    (c1 / t + c2 + t * (c3 + t * (c4 + t * (c5 + t * c6))) + c7 * t.ln()).exp()
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// ASHRAE's Table 3 is computed from a newer formulation (IAPWS) than Hyland–Wexler; the two
    /// agree to about 0.015 % between 0 and 100 °C (ASHRAE Fundamentals ch. 1 discussion). Policy:
    /// 0.02 % against the table.
    const REL_TOL_ASHRAE_TABLE: f64 = 2e-4;
    /// A value computed from the same published formula and printed to 6 significant figures.
    const REL_TOL_FORMULA_6SF: f64 = 5e-6;

    fn rel(a: f64, b: f64) -> f64 {
        ((a - b) / b).abs()
    }

    #[test]
    fn ashrae_table_values() {
        // ASHRAE Handbook — Fundamentals, ch. 1, Table 3 (thermodynamic properties of water at
        // saturation), p_ws column; transcribed via reference calculations.md §2 [P].
        for (t_c, table_pa) in [
            (5.0, 872.6),
            (25.0, 3169.7),
            (50.0, 12351.3),
            (100.0, 101418.0),
        ] {
            let p = saturation_pressure_pa(t_c + ZERO_CELSIUS_K).unwrap();
            assert!(rel(p, table_pa) <= REL_TOL_ASHRAE_TABLE, "{t_c} °C: {p} Pa");
        }
    }

    #[test]
    fn formula_value_at_25_c() {
        // Reference calculations.md §2: the Hyland–Wexler formula gives 3169.22 Pa at 25 °C
        // (derived from the published formula).
        let p = saturation_pressure_over_water_pa(298.15).unwrap();
        assert!(rel(p, 3169.22) <= REL_TOL_FORMULA_6SF, "{p}");
    }

    #[test]
    fn ice_below_zero() {
        // ASHRAE Handbook — Fundamentals, ch. 1, Table 3, over ice: −10 °C 0.25990 kPa,
        // −20 °C 0.10326 kPa (from memory; the psychrolib comparison checks the formula itself).
        let p10 = saturation_pressure_pa(263.15).unwrap();
        assert!(rel(p10, 259.90) <= REL_TOL_ASHRAE_TABLE, "{p10}");
        let p20 = saturation_pressure_pa(253.15).unwrap();
        assert!(rel(p20, 103.26) <= REL_TOL_ASHRAE_TABLE, "{p20}");
        assert_eq!(
            saturation_pressure_over_ice_pa(263.15).unwrap(),
            saturation_pressure_pa(263.15).unwrap()
        );
        // Ice and supercooled water are different curves: at −10 °C over water is higher
        // (ASHRAE ch. 1; 286 Pa against 260 Pa), so the switch matters.
        assert!(saturation_pressure_over_water_pa(263.15).is_err());
    }

    #[test]
    fn switch_at_zero_celsius_is_nearly_continuous() {
        // The published correlations meet to within 0.02 % at 0 °C (derived: 611.15 vs 611.21 Pa).
        let ice = saturation_pressure_over_ice_pa(ZERO_CELSIUS_K).unwrap();
        let water = saturation_pressure_over_water_pa(ZERO_CELSIUS_K).unwrap();
        assert!(rel(ice, water) < REL_TOL_ASHRAE_TABLE, "{ice} {water}");
        assert_eq!(saturation_pressure_pa(ZERO_CELSIUS_K).unwrap(), water);
        assert_eq!(
            saturation_pressure_pa(ZERO_CELSIUS_K - 1e-9).unwrap(),
            over_ice(ZERO_CELSIUS_K - 1e-9)
        );
    }

    #[test]
    fn rejects_out_of_range_temperatures() {
        let e = saturation_pressure_pa(480.0).unwrap_err();
        assert_eq!(
            e,
            GasError::TemperatureOutOfRange {
                quantity: "temperature",
                temperature_k: 480.0,
                min_k: 173.15,
                max_k: 473.15,
                correlation: "the ASHRAE saturation pressure",
            }
        );
        assert_eq!(
            e.to_string(),
            "temperature must be between -100.00 °C and 200.00 °C for the ASHRAE saturation \
             pressure, found 206.85 °C (480 K)"
        );
        assert!(saturation_pressure_pa(170.0).is_err());
        assert!(saturation_pressure_pa(f64::NAN).is_err());
        assert!(saturation_pressure_over_ice_pa(274.0).is_err());
    }

    proptest! {
        #[test]
        fn increases_with_temperature(t in 173.15f64..473.0, dt in 0.01f64..0.15) {
            let a = saturation_pressure_pa(t).unwrap();
            let b = saturation_pressure_pa(t + dt).unwrap();
            prop_assert!(b > a);
        }
    }
}
