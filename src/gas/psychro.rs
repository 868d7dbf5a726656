//! Humid air by ASHRAE Handbook — Fundamentals, ch. 1 "Psychrometrics" (SI equations).
//!
//! Owns the humidity ratio W (kg water per kg dry air) from relative humidity, wet-bulb or
//! dew-point temperature, the moist-air specific volume and density, and the water-vapour mole
//! fraction. It must not pick the pressure or temperature to use (the caller passes the absolute
//! duct pressure and the dry-bulb temperature) nor compute saturation pressure itself (see
//! [`super::saturation`]).
//!
//! Relative humidity is taken against the saturation pressure at the dry-bulb temperature over
//! water at or above 0 °C and over ice below it, as ASHRAE defines it with Table 3 / eq. 5–6.

use super::error::{finite, fraction, non_negative, positive, GasError};
use super::saturation::{saturation_pressure_pa, ICE_RANGE_K, WATER_RANGE_K, ZERO_CELSIUS_K};

/// Ratio of the molar masses of water and dry air, 18.015268 / 28.966. ASHRAE Fundamentals
/// (2009/2017 SI) ch. 1, eq. 20/22 (`W = 0.621945·p_w/(p − p_w)`); transcribed from the project
/// reference calculations.md §2 \[P\].
pub const WATER_TO_DRY_AIR_MOLAR_MASS_RATIO: f64 = 0.621_945;

/// Gas constant of dry air, J/(kg·K): ASHRAE ch. 1, eq. 26/28 writes
/// `v = 0.287042·(t + 273.15)·(1 + 1.607858·W)/p` with p in kPa; here p is in Pa, so 287.042.
/// Transcribed from reference calculations.md §2 \[P\].
pub const DRY_AIR_GAS_CONSTANT_J_KG_K: f64 = 287.042;

/// `1/0.621945` to the precision ASHRAE prints it in the specific-volume equation (same source as
/// [`DRY_AIR_GAS_CONSTANT_J_KG_K`]).
pub const MOIST_VOLUME_FACTOR: f64 = 1.607_858;

/// How the humidity of the air was given.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum HumiditySpec {
    /// Relative humidity as a fraction, 0..=1.
    RelativeHumidity(f64),
    /// Thermodynamic wet-bulb temperature, K.
    WetBulbK(f64),
    /// Dew-point (frost-point below 0 °C) temperature, K.
    DewPointK(f64),
    /// Humidity ratio, kg water / kg dry air.
    HumidityRatioKgKg(f64),
}

/// The dry-bulb range the psychrometric relations here accept: that of the saturation-pressure
/// correlations, −100 to 200 °C (ASHRAE Fundamentals ch. 1, eq. 5–6).
const DRY_BULB_RANGE_K: (f64, f64) = (ICE_RANGE_K.0, WATER_RANGE_K.1);

fn dry_bulb(temperature_k: f64) -> Result<f64, GasError> {
    let t = finite("dry-bulb temperature", temperature_k)?;
    if t >= DRY_BULB_RANGE_K.0 && t <= DRY_BULB_RANGE_K.1 {
        Ok(t)
    } else {
        Err(GasError::TemperatureOutOfRange {
            quantity: "dry-bulb temperature",
            temperature_k,
            min_k: DRY_BULB_RANGE_K.0,
            max_k: DRY_BULB_RANGE_K.1,
            correlation: "the ASHRAE psychrometric relations",
        })
    }
}

fn not_above_dry_bulb(
    quantity: &'static str,
    temperature_k: f64,
    dry_bulb_k: f64,
) -> Result<f64, GasError> {
    let t = finite(quantity, temperature_k)?;
    if t > dry_bulb_k {
        Err(GasError::AboveDryBulb {
            quantity,
            temperature_k,
            dry_bulb_k,
        })
    } else {
        Ok(t)
    }
}

/// Humidity ratio from the water vapour partial pressure: `W = 0.621945·p_w/(p − p_w)`
/// (ASHRAE Fundamentals ch. 1, eq. 20).
pub fn humidity_ratio_from_vapour_pressure(
    vapour_pressure_pa: f64,
    pressure_pa: f64,
) -> Result<f64, GasError> {
    let p = positive("absolute pressure", pressure_pa, "Pa")?;
    let pw = non_negative("water vapour pressure", vapour_pressure_pa, "Pa")?;
    if pw >= p {
        return Err(GasError::VapourPressureNotBelowTotal {
            vapour_pressure_pa: pw,
            pressure_pa: p,
        });
    }
    Ok(WATER_TO_DRY_AIR_MOLAR_MASS_RATIO * pw / (p - pw))
}

/// Humidity ratio from relative humidity (a fraction 0..=1): `p_w = φ·p_ws(t)` then eq. 20
/// (ASHRAE Fundamentals ch. 1, eq. 22/24).
pub fn humidity_ratio_from_relative_humidity(
    dry_bulb_k: f64,
    relative_humidity: f64,
    pressure_pa: f64,
) -> Result<f64, GasError> {
    let t = dry_bulb(dry_bulb_k)?;
    let rh = fraction("relative humidity", relative_humidity)?;
    let pws = saturation_pressure_pa(t)?;
    humidity_ratio_from_vapour_pressure(rh * pws, pressure_pa)
}

/// Humidity ratio from the dew-point temperature: `p_w = p_ws(t_d)` (ASHRAE Fundamentals ch. 1,
/// eq. 39 in the 2017 numbering, "eqn 13" in psychrolib's). Below 0 °C the dew point is a frost
/// point and uses the over-ice saturation pressure. The dew point must not exceed the dry bulb.
pub fn humidity_ratio_from_dew_point(
    dry_bulb_k: f64,
    dew_point_k: f64,
    pressure_pa: f64,
) -> Result<f64, GasError> {
    let t = dry_bulb(dry_bulb_k)?;
    let td = not_above_dry_bulb("dew-point temperature", dew_point_k, t)?;
    let pw = saturation_pressure_pa(td)?;
    humidity_ratio_from_vapour_pressure(pw, pressure_pa)
}

/// Humidity ratio from the thermodynamic wet-bulb temperature t* (ASHRAE Fundamentals 2017 SI,
/// ch. 1, eq. 33 for t* ≥ 0 °C and eq. 35 for t* < 0 °C, an ice-covered bulb; the 2009 edition
/// numbers them 35 and 37):
///
/// - t* ≥ 0 °C: `W = ((2501 − 2.326·t*)·W*s − 1.006·(t − t*)) / (2501 + 1.86·t − 4.186·t*)`
/// - t* < 0 °C: `W = ((2830 − 0.24·t*)·W*s − 1.006·(t − t*)) / (2830 + 1.86·t − 2.1·t*)`
///
/// with t, t* in °C and W*s the saturation humidity ratio at t* (over ice below 0 °C). Coefficients
/// from memory, confirmed against the PyPI psychrolib 2.5.0 source and its tabulated output. A
/// wet bulb above the dry bulb, or a depression so large that W would be negative, is rejected.
pub fn humidity_ratio_from_wet_bulb(
    dry_bulb_k: f64,
    wet_bulb_k: f64,
    pressure_pa: f64,
) -> Result<f64, GasError> {
    let t_k = dry_bulb(dry_bulb_k)?;
    let twb_k = not_above_dry_bulb("wet-bulb temperature", wet_bulb_k, t_k)?;
    let pws = saturation_pressure_pa(twb_k)?;
    let ws_star = humidity_ratio_from_vapour_pressure(pws, pressure_pa)?;
    let t = t_k - ZERO_CELSIUS_K;
    let tw = twb_k - ZERO_CELSIUS_K;
    let w = if tw >= 0.0 {
        ((2501.0 - 2.326 * tw) * ws_star - 1.006 * (t - tw)) / (2501.0 + 1.86 * t - 4.186 * tw)
    } else {
        ((2830.0 - 0.24 * tw) * ws_star - 1.006 * (t - tw)) / (2830.0 + 1.86 * t - 2.1 * tw)
    };
    if w < 0.0 {
        return Err(GasError::WetBulbDepressionTooLarge {
            dry_bulb_k: t_k,
            wet_bulb_k: twb_k,
            humidity_ratio: w,
        });
    }
    Ok(w)
}

/// Humidity ratio from whichever humidity measure was given.
pub fn humidity_ratio(
    dry_bulb_k: f64,
    pressure_pa: f64,
    humidity: HumiditySpec,
) -> Result<f64, GasError> {
    match humidity {
        HumiditySpec::RelativeHumidity(rh) => {
            humidity_ratio_from_relative_humidity(dry_bulb_k, rh, pressure_pa)
        }
        HumiditySpec::WetBulbK(twb) => humidity_ratio_from_wet_bulb(dry_bulb_k, twb, pressure_pa),
        HumiditySpec::DewPointK(td) => humidity_ratio_from_dew_point(dry_bulb_k, td, pressure_pa),
        HumiditySpec::HumidityRatioKgKg(w) => {
            dry_bulb(dry_bulb_k)?;
            positive("absolute pressure", pressure_pa, "Pa")?;
            non_negative("humidity ratio", w, "kg/kg")
        }
    }
}

/// Specific volume of moist air per kg of dry air, m³/kg:
/// `v = 287.042·T·(1 + 1.607858·W)/p` (ASHRAE Fundamentals ch. 1, eq. 26 in 2017 numbering,
/// written there with p in kPa and 0.287042).
pub fn moist_air_specific_volume_m3_kg(
    dry_bulb_k: f64,
    humidity_ratio_kg_kg: f64,
    pressure_pa: f64,
) -> Result<f64, GasError> {
    let t = positive("dry-bulb temperature", dry_bulb_k, "K")?;
    let w = non_negative("humidity ratio", humidity_ratio_kg_kg, "kg/kg")?;
    let p = positive("absolute pressure", pressure_pa, "Pa")?;
    Ok(DRY_AIR_GAS_CONSTANT_J_KG_K * t * (1.0 + MOIST_VOLUME_FACTOR * w) / p)
}

/// Density of moist air, kg/m³: `ρ = (1 + W)/v` (ASHRAE Fundamentals ch. 1, eq. 11).
pub fn moist_air_density_kg_m3(
    dry_bulb_k: f64,
    humidity_ratio_kg_kg: f64,
    pressure_pa: f64,
) -> Result<f64, GasError> {
    let v = moist_air_specific_volume_m3_kg(dry_bulb_k, humidity_ratio_kg_kg, pressure_pa)?;
    Ok((1.0 + humidity_ratio_kg_kg) / v)
}

/// Water vapour mole fraction from the humidity ratio: `x_w = W/(0.621945 + W)` (eq. 20 solved for
/// p_w/p). This is the Bws the flow computation uses for dry-basis results.
pub fn vapour_mole_fraction(humidity_ratio_kg_kg: f64) -> Result<f64, GasError> {
    let w = non_negative("humidity ratio", humidity_ratio_kg_kg, "kg/kg")?;
    Ok(w / (WATER_TO_DRY_AIR_MOLAR_MASS_RATIO + w))
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// Half a unit in the 6th significant figure of a printed check value.
    const REL_TOL_PUBLISHED_6SF: f64 = 5e-6;
    /// Two forms of the same exact expression.
    const REL_TOL_ARITHMETIC: f64 = 1e-12;

    fn rel(a: f64, b: f64) -> f64 {
        ((a - b) / b).abs()
    }

    #[test]
    fn si_round_duct_example_density() {
        // Reference calculations.md §8, "SI round 500 mm" (derived from the ASHRAE ch. 1 equations):
        // 28 °C, p = 99 500 + 250 Pa, RH 40 % -> ρ 1.14733 kg/m³.
        let t = 28.0 + ZERO_CELSIUS_K;
        let p = 99_500.0 + 250.0;
        let w = humidity_ratio_from_relative_humidity(t, 0.40, p).unwrap();
        let rho = moist_air_density_kg_m3(t, w, p).unwrap();
        assert!(rel(rho, 1.14733) <= REL_TOL_PUBLISHED_6SF, "{rho}");
    }

    #[test]
    fn dry_air_at_20_c() {
        // Reference calculations.md §2 [P]: 1.204 kg/m³ is dry air at 20 °C, 101.325 kPa
        // (printed to 4 significant figures).
        let rho = moist_air_density_kg_m3(293.15, 0.0, 101_325.0).unwrap();
        assert!((rho - 1.204).abs() <= 5e-4, "{rho}");
    }

    #[test]
    fn saturated_air_agrees_three_ways() {
        // At saturation the wet bulb and dew point equal the dry bulb and RH is 1 (ASHRAE ch. 1:
        // eq. 33 reduces to W = W*s when t* = t).
        for t_c in [-20.0, -5.0, 0.0, 15.0, 35.0, 60.0] {
            let t = t_c + ZERO_CELSIUS_K;
            let p = 101_325.0;
            let by_rh = humidity_ratio_from_relative_humidity(t, 1.0, p).unwrap();
            let by_wb = humidity_ratio_from_wet_bulb(t, t, p).unwrap();
            let by_dp = humidity_ratio_from_dew_point(t, t, p).unwrap();
            assert!(
                rel(by_wb, by_rh) <= REL_TOL_ARITHMETIC,
                "{t_c}: {by_wb} {by_rh}"
            );
            assert!(
                rel(by_dp, by_rh) <= REL_TOL_ARITHMETIC,
                "{t_c}: {by_dp} {by_rh}"
            );
        }
    }

    #[test]
    fn wet_bulb_typical_room() {
        // ASHRAE Fundamentals ch. 1, worked example with 30 °C dry bulb, 20 °C wet bulb at
        // 101.325 kPa (from memory, taken to 3 significant figures): W = 0.0105 kg/kg.
        let w = humidity_ratio_from_wet_bulb(303.15, 293.15, 101_325.0).unwrap();
        assert!((w - 0.0105).abs() <= 5e-5, "{w}");
    }

    #[test]
    fn rejects_bad_humidity_inputs() {
        assert_eq!(
            humidity_ratio_from_relative_humidity(300.0, 1.2, 101_325.0),
            Err(GasError::FractionOutOfRange {
                quantity: "relative humidity",
                value: 1.2
            })
        );
        assert!(humidity_ratio_from_relative_humidity(300.0, -0.1, 101_325.0).is_err());
        let e = humidity_ratio_from_wet_bulb(300.0, 301.0, 101_325.0).unwrap_err();
        assert_eq!(
            e,
            GasError::AboveDryBulb {
                quantity: "wet-bulb temperature",
                temperature_k: 301.0,
                dry_bulb_k: 300.0
            }
        );
        assert_eq!(
            e.to_string(),
            "wet-bulb temperature must not exceed the dry-bulb temperature (26.85 °C), found \
             27.85 °C (301 K)"
        );
        assert!(matches!(
            humidity_ratio_from_dew_point(300.0, 300.5, 101_325.0),
            Err(GasError::AboveDryBulb {
                quantity: "dew-point temperature",
                ..
            })
        ));
        // 60 °C dry bulb with a 10 °C wet bulb is drier than dry air.
        assert!(matches!(
            humidity_ratio_from_wet_bulb(333.15, 283.15, 101_325.0),
            Err(GasError::WetBulbDepressionTooLarge { humidity_ratio, .. }) if humidity_ratio < 0.0
        ));
        // Saturated air at 120 °C and atmospheric pressure does not exist (water boils).
        assert!(matches!(
            humidity_ratio_from_relative_humidity(393.15, 1.0, 101_325.0),
            Err(GasError::VapourPressureNotBelowTotal { .. })
        ));
        assert!(humidity_ratio_from_relative_humidity(500.0, 0.5, 101_325.0).is_err());
        assert!(humidity_ratio_from_relative_humidity(300.0, 0.5, 0.0).is_err());
        assert!(moist_air_density_kg_m3(300.0, -0.001, 101_325.0).is_err());
        assert!(vapour_mole_fraction(-1.0).is_err());
        assert!(
            humidity_ratio(300.0, 101_325.0, HumiditySpec::HumidityRatioKgKg(f64::NAN)).is_err()
        );
    }

    #[test]
    fn spec_dispatches_to_each_relation() {
        let (t, p) = (298.15, 100_000.0);
        assert_eq!(
            humidity_ratio(t, p, HumiditySpec::RelativeHumidity(0.5)),
            humidity_ratio_from_relative_humidity(t, 0.5, p)
        );
        assert_eq!(
            humidity_ratio(t, p, HumiditySpec::WetBulbK(290.0)),
            humidity_ratio_from_wet_bulb(t, 290.0, p)
        );
        assert_eq!(
            humidity_ratio(t, p, HumiditySpec::DewPointK(285.0)),
            humidity_ratio_from_dew_point(t, 285.0, p)
        );
        assert_eq!(
            humidity_ratio(t, p, HumiditySpec::HumidityRatioKgKg(0.01)),
            Ok(0.01)
        );
    }

    #[test]
    fn wet_bulb_relation_jumps_at_freezing() {
        // Derived from ASHRAE ch. 1 eq. 33/35 (and reproduced by psychrolib 2.5.0): at 7.9 °C dry
        // bulb and 80 kPa an ice-covered bulb just below 0 °C means about 23 % more moisture than a
        // water-covered bulb at 0 °C. Which form applies is decided by the sign of t* alone.
        let t = 7.9 + ZERO_CELSIUS_K;
        let ice = humidity_ratio_from_wet_bulb(t, ZERO_CELSIUS_K - 1e-9, 80_000.0).unwrap();
        let water = humidity_ratio_from_wet_bulb(t, ZERO_CELSIUS_K, 80_000.0).unwrap();
        assert!(ice > water * 1.2, "{ice} {water}");
    }

    #[test]
    fn mole_fraction_inverts_eq_20() {
        let (pw, p) = (1_500.0, 99_750.0);
        let w = humidity_ratio_from_vapour_pressure(pw, p).unwrap();
        let x = vapour_mole_fraction(w).unwrap();
        assert!(rel(x, pw / p) <= REL_TOL_ARITHMETIC);
        assert_eq!(vapour_mole_fraction(0.0), Ok(0.0));
    }

    proptest! {
        #[test]
        fn humidity_ratio_increases_with_rh(
            t in 240.0f64..340.0, rh in 0.0f64..0.99, d in 0.001f64..0.01, p in 70_000.0f64..110_000.0
        ) {
            let a = humidity_ratio_from_relative_humidity(t, rh, p).unwrap();
            let b = humidity_ratio_from_relative_humidity(t, rh + d, p).unwrap();
            prop_assert!(b > a);
        }

        #[test]
        fn humidity_ratio_increases_with_wet_bulb(
            t in 275.0f64..330.0, depression in 0.5f64..8.0, p in 80_000.0f64..110_000.0
        ) {
            let (low, high) = (t - depression, t - depression + 0.25);
            // The relation switches from the ice-bulb to the water-bulb form at t* = 0 °C and is
            // not continuous there (ASHRAE eq. 33 vs 35), so compare only on one side of it.
            prop_assume!((low < ZERO_CELSIUS_K) == (high < ZERO_CELSIUS_K));
            // Where the lower wet bulb is physical, the higher one is too and gives moister air.
            if let Ok(a) = humidity_ratio_from_wet_bulb(t, low, p) {
                let b = humidity_ratio_from_wet_bulb(t, high, p);
                prop_assert!(matches!(b, Ok(b) if b > a));
            }
        }

        #[test]
        fn moist_air_is_lighter_than_dry_air(t in 250.0f64..340.0, w in 1e-4f64..0.1, p in 70_000.0f64..110_000.0) {
            let dry = moist_air_density_kg_m3(t, 0.0, p).unwrap();
            let moist = moist_air_density_kg_m3(t, w, p).unwrap();
            prop_assert!(moist < dry);
        }

        #[test]
        fn density_increases_with_pressure(t in 250.0f64..340.0, w in 0.0f64..0.05, p in 50_000.0f64..150_000.0, dp in 1.0f64..1000.0) {
            let a = moist_air_density_kg_m3(t, w, p).unwrap();
            let b = moist_air_density_kg_m3(t, w, p + dp).unwrap();
            prop_assert!(b > a);
        }
    }
}
