//! Stack-gas moisture: the EPA Method 4 sampling train and the saturation limit.
//!
//! Owns the reduction of a Method 4 train (impinger and silica-gel gains, dry gas meter) to the
//! water vapour mole fraction Bws, and the rule that in saturated gas the lower of the measured and
//! the saturation value is used. It must not judge the train (leak checks, isokinetic rate) nor pick
//! the stack temperature: the caller passes the temperature and absolute pressure to use.
//!
//! Units: inputs and outputs are SI. Method 4's constants K1, K2, K3 are inch-pound, so the inputs
//! are converted to ml, g, ft³, inHg and °R on the way in and the standard volumes back to m³ on the
//! way out; Bws itself is a ratio and does not depend on the unit system.

use super::error::{fraction, non_negative, positive, GasError};
use super::saturation::{saturation_pressure_pa, ICE_RANGE_K, WATER_RANGE_K};

/// K1, ft³ of water vapour at standard conditions per ml of condensed water (EPA Method 4,
/// 40 CFR 60 App. A-3, eq. 4-1). From memory per reference calculations.md §2 \[M\].
pub const METHOD4_K1_FT3_PER_ML: f64 = 0.047_06;
/// K2, ft³ of water vapour at standard conditions per g collected in the silica gel (Method 4,
/// eq. 4-2). From memory per reference calculations.md §2 \[M\].
pub const METHOD4_K2_FT3_PER_G: f64 = 0.047_15;
/// K3 = Tstd/Pstd, °R/inHg (Method 4, eq. 4-3: 528 °R / 29.92 inHg, printed as 17.64). From memory
/// per reference calculations.md §2 \[M\].
pub const METHOD4_K3_R_PER_INHG: f64 = 17.64;

/// m³ per ft³: exact (international foot = 0.3048 m; NIST SP 811, 2008, Appendix B.8).
pub const M3_PER_FT3: f64 = 0.028_316_846_592;
/// Pa per inch of mercury, conventional (0 °C): NIST SP 811 (2008), Appendix B.8, 3.386 389 E+03.
pub const PA_PER_INHG: f64 = 3_386.389;
/// °R per K: exact (definition of the Rankine scale).
pub const RANKINE_PER_KELVIN: f64 = 1.8;
/// ml per m³ and g per kg: SI prefixes.
const ML_PER_M3: f64 = 1.0e6;
const G_PER_KG: f64 = 1.0e3;

/// What a Method 4 moisture train collected and metered. Exists only if valid.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Method4Train {
    impinger_gain_m3: f64,
    silica_gel_gain_kg: f64,
    meter_volume_m3: f64,
    meter_y: f64,
    meter_pressure_pa: f64,
    meter_temperature_k: f64,
}

impl Method4Train {
    /// Validates a train.
    ///
    /// - `impinger_gain_m3`: liquid volume gained by the impingers, Vf − Vi (1 ml = 1e-6 m³), ≥ 0.
    /// - `silica_gel_gain_kg`: mass gained by the silica gel (1 g = 1e-3 kg), ≥ 0.
    /// - `meter_volume_m3`: dry gas volume through the meter, as read, > 0.
    /// - `meter_y`: dry gas meter calibration factor Y, > 0.
    /// - `meter_pressure_pa`: absolute pressure at the meter (barometric + orifice ΔH), > 0.
    /// - `meter_temperature_k`: average meter temperature, > 0.
    pub fn new(
        impinger_gain_m3: f64,
        silica_gel_gain_kg: f64,
        meter_volume_m3: f64,
        meter_y: f64,
        meter_pressure_pa: f64,
        meter_temperature_k: f64,
    ) -> Result<Self, GasError> {
        Ok(Self {
            impinger_gain_m3: non_negative("impinger liquid gain", impinger_gain_m3, "m³")?,
            silica_gel_gain_kg: non_negative("silica gel gain", silica_gel_gain_kg, "kg")?,
            meter_volume_m3: positive("dry gas meter volume", meter_volume_m3, "m³")?,
            meter_y: positive("dry gas meter Y", meter_y, "(dimensionless)")?,
            meter_pressure_pa: positive("meter absolute pressure", meter_pressure_pa, "Pa")?,
            meter_temperature_k: positive("meter temperature", meter_temperature_k, "K")?,
        })
    }

    /// Reduces the train (Method 4 eq. 4-1 to 4-4):
    /// `Vwc = K1·(Vf − Vi)`, `Vwsg = K2·ΔW`, `Vm(std) = K3·Y·Vm·Pm/Tm`,
    /// `Bws = (Vwc + Vwsg)/(Vwc + Vwsg + Vm(std))`.
    pub fn reduce(&self) -> Method4Result {
        let impinger_ml = self.impinger_gain_m3 * ML_PER_M3;
        let silica_g = self.silica_gel_gain_kg * G_PER_KG;
        let vm_ft3 = self.meter_volume_m3 / M3_PER_FT3;
        let pm_inhg = self.meter_pressure_pa / PA_PER_INHG;
        let tm_r = self.meter_temperature_k * RANKINE_PER_KELVIN;

        let vwc_ft3 = METHOD4_K1_FT3_PER_ML * impinger_ml;
        let vwsg_ft3 = METHOD4_K2_FT3_PER_G * silica_g;
        let vm_std_ft3 = METHOD4_K3_R_PER_INHG * self.meter_y * vm_ft3 * pm_inhg / tm_r;
        let water_ft3 = vwc_ft3 + vwsg_ft3;
        Method4Result {
            condensed_vapour_std_m3: vwc_ft3 * M3_PER_FT3,
            silica_gel_vapour_std_m3: vwsg_ft3 * M3_PER_FT3,
            meter_volume_std_m3: vm_std_ft3 * M3_PER_FT3,
            // The meter volume is > 0, so the denominator is > 0 and Bws is in 0..1.
            bws: water_ft3 / (water_ft3 + vm_std_ft3),
        }
    }
}

/// The reduced Method 4 train. Standard volumes are at Method 4's standard conditions
/// (528 °R = 293.33 K, 29.92 inHg), expressed in m³.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Method4Result {
    /// Vwc(std): water vapour condensed in the impingers.
    pub condensed_vapour_std_m3: f64,
    /// Vwsg(std): water vapour collected in the silica gel.
    pub silica_gel_vapour_std_m3: f64,
    /// Vm(std): dry gas sampled.
    pub meter_volume_std_m3: f64,
    /// Water vapour mole fraction of the sampled gas, as measured.
    pub bws: f64,
}

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

    /// Half a unit in the 5th decimal of a printed Bws.
    const ABS_TOL_PUBLISHED_BWS: f64 = 5e-6;
    /// Unit conversions there and back.
    const REL_TOL_ROUNDTRIP: f64 = 1e-12;

    /// The reference train, given in Method 4's own units and converted to SI here.
    fn reference_train() -> Method4Train {
        let ml = 1e-6;
        let g = 1e-3;
        Method4Train::new(
            100.0 * ml,
            10.0 * g,
            30.000 * M3_PER_FT3,
            1.0,
            29.92 * PA_PER_INHG,
            528.0 / RANKINE_PER_KELVIN,
        )
        .unwrap()
    }

    #[test]
    fn method4_reference_train() {
        // Reference calculations.md §2 [D], derived from the EPA Method 4 equations: 100 ml, 10 g,
        // 30.000 ft³, Y 1, 29.92 inHg, 528 °R -> Bws 0.14723.
        let r = reference_train().reduce();
        assert!(
            (r.bws - 0.14723).abs() <= ABS_TOL_PUBLISHED_BWS,
            "{}",
            r.bws
        );
        // Intermediate volumes (derived by hand: 4.706 ft³, 0.4715 ft³, 17.64·30·29.92/528 ft³).
        let vwc = r.condensed_vapour_std_m3 / M3_PER_FT3;
        let vwsg = r.silica_gel_vapour_std_m3 / M3_PER_FT3;
        let vm = r.meter_volume_std_m3 / M3_PER_FT3;
        assert!((vwc - 4.706).abs() <= REL_TOL_ROUNDTRIP * 4.706);
        assert!((vwsg - 0.4715).abs() <= REL_TOL_ROUNDTRIP * 0.4715);
        let vm_hand = 17.64 * 30.0 * 29.92 / 528.0;
        assert!((vm - vm_hand).abs() <= REL_TOL_ROUNDTRIP * vm_hand);
    }

    #[test]
    fn dry_train_gives_zero_moisture() {
        let t = Method4Train::new(0.0, 0.0, 0.5, 1.0, 100_000.0, 293.0).unwrap();
        assert_eq!(t.reduce().bws, 0.0);
    }

    #[test]
    fn rejects_bad_trains() {
        assert_eq!(
            Method4Train::new(-1e-6, 0.0, 0.5, 1.0, 100_000.0, 293.0),
            Err(GasError::Negative {
                quantity: "impinger liquid gain",
                value: -1e-6,
                unit: "m³"
            })
        );
        assert!(Method4Train::new(0.0, -0.001, 0.5, 1.0, 100_000.0, 293.0).is_err());
        assert!(Method4Train::new(0.0, 0.0, 0.0, 1.0, 100_000.0, 293.0).is_err());
        assert!(Method4Train::new(0.0, 0.0, 0.5, 0.0, 100_000.0, 293.0).is_err());
        assert!(Method4Train::new(0.0, 0.0, 0.5, 1.0, -1.0, 293.0).is_err());
        assert!(Method4Train::new(0.0, 0.0, 0.5, 1.0, 100_000.0, f64::NAN).is_err());
    }

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
        fn bws_in_unit_interval_and_grows_with_water(
            ml in 0.0f64..500.0, g in 0.0f64..50.0, ft3 in 1.0f64..60.0, y in 0.9f64..1.1,
            extra in 0.1f64..20.0
        ) {
            let mk = |ml: f64| Method4Train::new(ml * 1e-6, g * 1e-3, ft3 * M3_PER_FT3, y, 100_000.0, 295.0).unwrap();
            let a = mk(ml).reduce().bws;
            let b = mk(ml + extra).reduce().bws;
            prop_assert!((0.0..1.0).contains(&a));
            prop_assert!(b > a);
        }

        #[test]
        fn limited_value_never_exceeds_either(bws in 0.0f64..0.6, t in 275.0f64..373.0, p in 80_000.0f64..120_000.0) {
            let m = limit_to_saturation(bws, t, p).unwrap();
            prop_assert!(m.bws <= bws);
            if let Some(s) = m.saturation_bws { prop_assert!(m.bws <= s); }
        }
    }
}
