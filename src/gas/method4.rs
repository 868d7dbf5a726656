//! EPA Method 4 moisture train: impinger and silica-gel gains and the dry gas meter, reduced to the
//! water vapour mole fraction Bws with every intermediate kept for the report.
//!
//! Owns the three reductions a survey can ask for ([`Method4Form`]): the method's English equations
//! with its own printed constants, its metric equations with theirs, and an SI-exact mole balance for
//! conventions that are not EPA's. It must not judge the train (leak checks, sampling rate), cap the
//! result at saturation (see [`super::moisture::limit_to_saturation`]) nor choose the form: the caller
//! says which applies.
//!
//! # Equations (40 CFR 60 App. A-3, Method 4, §12.1; equation and clause numbers from memory)
//! - eq. 4-1 `Vwc(std) = K1·(Vf − Vi)`: water condensed in the impingers, K1 = 0.04706 ft³/mL
//!   (English) or 0.001333 m³/mL (metric).
//! - eq. 4-2 `Vwsg(std) = K2·(Wf − Wi)`: water taken up by the silica gel, K2 = 0.04715 ft³/g or
//!   0.001335 m³/g.
//! - eq. 4-3 `Vm(std) = K3·Y·Vm·Pm/Tm`: dry gas metered, at standard conditions, K3 = 17.64 °R/inHg
//!   or 0.3855 K/mmHg, `Tm` = °F + 460 or °C + 273, `Pm` absolute at the meter.
//! - eq. 4-4 `Bws = (Vwc(std) + Vwsg(std)) / (Vwc(std) + Vwsg(std) + Vm(std))`.
//!
//! The constants are the printed ones. They follow from the §12.1 nomenclature (ρw 0.9982 g/mL or
//! 0.002201 lb/mL, R 0.06236 mmHg·m³/(g-mole·K) or 21.85 inHg·ft³/(lb-mole·°R), Mw 18.0, Tstd 293 K or
//! 528 °R, Pstd 760 mmHg or 29.92 inHg; nomenclature as transcribed in a public copy of the method's
//! §12.1): metric K1 = 0.9982·0.06236·293/(760·18.0) = 0.0013332, K2 = 0.06236·293/(760·18.0) =
//! 0.0013356, K3 = 293/760 = 0.38553; English K3 = 528/29.92 = 17.647. The printed English K1 and K2
//! (0.04706, 0.04715) sit 0.17 % below what that nomenclature gives (0.04714, 0.04723); the method's
//! numbers are used as printed, because reviewers recompute with them.
//!
//! A meter pressure given as the orifice differential ΔH is added to the barometric pressure as
//! `Pm = Pbar + ΔH/13.6` (Method 5 eq. 5-1, the form Method 4 trains are worked up with; inH2O to inHg
//! or mmH2O to mmHg). An impinger gain weighed in grams is taken as that many millilitres (1 g of
//! water = 1 mL, as the methods convert weighed impinger gains; Method 5 §11.2.3, from memory).

use super::error::{non_negative, positive, GasError};
use super::molar_mass::H2O_G_MOL;
use crate::units::{PA_PER_INH2O, PA_PER_INHG, PA_PER_MMH2O, PA_PER_MMHG};
use serde::Serialize;

/// K1, ft³ of vapour at standard conditions per mL condensed (Method 4 eq. 4-1, English).
pub const K1_FT3_PER_ML: f64 = 0.047_06;
/// K1, m³ per mL (Method 4 eq. 4-1, metric).
pub const K1_M3_PER_ML: f64 = 0.001_333;
/// K2, ft³ of vapour at standard conditions per g taken up by the silica gel (eq. 4-2, English).
pub const K2_FT3_PER_G: f64 = 0.047_15;
/// K2, m³ per g (eq. 4-2, metric).
pub const K2_M3_PER_G: f64 = 0.001_335;
/// K3 = Tstd/Pstd, °R/inHg (eq. 4-3, English: 528/29.92 printed as 17.64).
pub const K3_R_PER_INHG: f64 = 17.64;
/// K3 = Tstd/Pstd, K/mmHg (eq. 4-3, metric: 293/760 printed as 0.3855).
pub const K3_K_PER_MMHG: f64 = 0.385_5;
/// Method 4/5 absolute temperature: °F + 460 (English) and °C + 273 (metric).
pub const RANKINE_OFFSET: f64 = 460.0;
pub const KELVIN_OFFSET: f64 = 273.0;
/// Specific gravity of mercury used to add ΔH (water column) to Pbar (mercury column), Method 5
/// eq. 5-1 nomenclature: "13.6 = specific gravity of mercury".
pub const MERCURY_SG: f64 = 13.6;
/// Density of water used to turn a volume gain into a mass in the SI-exact form, g/mL (Method 4
/// §12.1 nomenclature ρw = 0.9982 g/mL, water near 20 °C).
pub const WATER_G_PER_ML: f64 = 0.998_2;
/// Molar gas constant, J/(mol·K) (exact since 2019, CODATA 2018).
const R_J_MOL_K: f64 = 8.314_462_618;
/// m³ per ft³, exact (international foot).
pub const M3_PER_FT3: f64 = 0.028_316_846_592;

/// The impinger gain as recorded.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum ImpingerGain {
    /// Vf − Vi measured as a liquid volume, m³ (1 mL = 1e-6 m³).
    Volume { m3: f64 },
    /// Weighed gain, kg; taken as 1 mL per g in the EPA forms.
    Mass { kg: f64 },
}

impl ImpingerGain {
    /// The gain in mL as the EPA equations take it (1 g = 1 mL for a weighed gain).
    pub fn ml(self) -> f64 {
        match self {
            ImpingerGain::Volume { m3 } => m3 * 1e6,
            ImpingerGain::Mass { kg } => kg * 1e3,
        }
    }

    /// The gain as a mass of water, g (a volume at ρw = 0.9982 g/mL).
    pub fn grams(self) -> f64 {
        match self {
            ImpingerGain::Volume { m3 } => m3 * 1e6 * WATER_G_PER_ML,
            ImpingerGain::Mass { kg } => kg * 1e3,
        }
    }
}

/// The pressure at the meter as recorded.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum MeterPressure {
    /// Absolute pressure at the meter, Pa.
    Absolute { pa: f64 },
    /// Orifice differential ΔH, Pa; Pm = Pbar + ΔH/13.6 in the EPA forms, Pbar + ΔH exactly in SI.
    OrificeDh { pa: f64 },
}

/// Which equations reduce the train.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Method4Form {
    /// Method 4 English units: mL, g, ft³, inHg, °R (°F + 460), K1 0.04706, K2 0.04715, K3 17.64.
    EpaEnglish,
    /// Method 4 metric units: mL, g, m³, mmHg, K (°C + 273), K1 0.001333, K2 0.001335, K3 0.3855.
    EpaMetric,
    /// SI-exact mole balance: water (g) / 18.0153 against Y·Vm·Pm/(R·Tm), standard volumes at the
    /// given reference.
    Exact {
        reference_temperature_k: f64,
        reference_pressure_pa: f64,
    },
}

impl Method4Form {
    /// The unit the form's gas volumes are in: `ft3` or `m3`.
    pub fn volume_unit(self) -> &'static str {
        match self {
            Method4Form::EpaEnglish => "ft3",
            _ => "m3",
        }
    }

    /// The unit of the form's meter pressure: `inHg`, `mmHg` or `Pa`.
    pub fn pressure_unit(self) -> &'static str {
        match self {
            Method4Form::EpaEnglish => "inHg",
            Method4Form::EpaMetric => "mmHg",
            Method4Form::Exact { .. } => "Pa",
        }
    }

    /// The equations in words, for the report.
    pub fn describe(self) -> Vec<String> {
        match self {
            Method4Form::EpaEnglish => vec![
                "EPA Method 4 (40 CFR 60 App. A-3) eqs. 4-1 to 4-4, English units".into(),
                "Vwc(std) = 0.04706·(Vf − Vi) [mL]; Vwsg(std) = 0.04715·(Wf − Wi) [g]".into(),
                "Vm(std) = 17.64·Y·Vm·Pm/Tm; Pm = Pbar + ΔH/13.6 [inHg]; Tm = °F + 460".into(),
                "Bws = (Vwc(std) + Vwsg(std))/(Vwc(std) + Vwsg(std) + Vm(std)); the lower of the train value and saturation is used".into(),
            ],
            Method4Form::EpaMetric => vec![
                "EPA Method 4 (40 CFR 60 App. A-3) eqs. 4-1 to 4-4, metric units".into(),
                "Vwc(std) = 0.001333·(Vf − Vi) [mL]; Vwsg(std) = 0.001335·(Wf − Wi) [g]".into(),
                "Vm(std) = 0.3855·Y·Vm·Pm/Tm; Pm = Pbar + ΔH/13.6 [mmHg]; Tm = °C + 273".into(),
                "Bws = (Vwc(std) + Vwsg(std))/(Vwc(std) + Vwsg(std) + Vm(std)); the lower of the train value and saturation is used".into(),
            ],
            Method4Form::Exact { .. } => vec![
                "moisture train, SI-exact mole balance: n_w = m_water/18.0153 g/mol (volume gains at 0.9982 g/mL)".into(),
                "n_dry = Y·Vm·Pm/(R·Tm), R = 8.314462618 J/(mol·K); Pm = Pbar + ΔH".into(),
                "Bws = n_w/(n_w + n_dry); volumes at the convention's reference conditions".into(),
            ],
        }
    }
}

/// What a Method 4 train collected and metered. Exists only if valid.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Method4Train {
    impinger: ImpingerGain,
    silica_gel_gain_kg: f64,
    meter_volume_m3: f64,
    meter_y: f64,
    meter_pressure: MeterPressure,
    meter_temperature_k: f64,
}

impl Method4Train {
    /// Validates a train: gains ≥ 0, meter volume, Y, absolute pressure and temperature > 0, ΔH ≥ 0.
    pub fn new(
        impinger: ImpingerGain,
        silica_gel_gain_kg: f64,
        meter_volume_m3: f64,
        meter_y: f64,
        meter_pressure: MeterPressure,
        meter_temperature_k: f64,
    ) -> Result<Self, GasError> {
        match impinger {
            ImpingerGain::Volume { m3 } => {
                non_negative("impinger liquid gain", m3, "m³")?;
            }
            ImpingerGain::Mass { kg } => {
                non_negative("impinger weight gain", kg, "kg")?;
            }
        }
        match meter_pressure {
            MeterPressure::Absolute { pa } => {
                positive("meter absolute pressure", pa, "Pa")?;
            }
            MeterPressure::OrificeDh { pa } => {
                non_negative("orifice ΔH", pa, "Pa")?;
            }
        }
        Ok(Self {
            impinger,
            silica_gel_gain_kg: non_negative("silica gel gain", silica_gel_gain_kg, "kg")?,
            meter_volume_m3: positive("dry gas meter volume", meter_volume_m3, "m³")?,
            meter_y: positive("dry gas meter Y", meter_y, "(dimensionless)")?,
            meter_pressure,
            meter_temperature_k: positive("meter temperature", meter_temperature_k, "K")?,
        })
    }

    pub fn impinger(&self) -> ImpingerGain {
        self.impinger
    }
    pub fn meter_pressure(&self) -> MeterPressure {
        self.meter_pressure
    }

    /// Absolute meter pressure in Pa as the form computes it (ΔH/13.6 in the EPA forms).
    fn meter_pressure_form(&self, form: Method4Form, barometric_pa: f64) -> f64 {
        match (self.meter_pressure, form) {
            (MeterPressure::Absolute { pa }, Method4Form::EpaEnglish) => pa / PA_PER_INHG,
            (MeterPressure::Absolute { pa }, Method4Form::EpaMetric) => pa / PA_PER_MMHG,
            (MeterPressure::Absolute { pa }, Method4Form::Exact { .. }) => pa,
            (MeterPressure::OrificeDh { pa }, Method4Form::EpaEnglish) => {
                barometric_pa / PA_PER_INHG + (pa / PA_PER_INH2O) / MERCURY_SG
            }
            (MeterPressure::OrificeDh { pa }, Method4Form::EpaMetric) => {
                barometric_pa / PA_PER_MMHG + (pa / PA_PER_MMH2O) / MERCURY_SG
            }
            (MeterPressure::OrificeDh { pa }, Method4Form::Exact { .. }) => barometric_pa + pa,
        }
    }

    /// Reduces the train by `form`. `barometric_pa` is the run's barometric pressure, used when the
    /// meter pressure is given as ΔH.
    pub fn reduce(&self, form: Method4Form, barometric_pa: f64) -> Result<Method4Result, GasError> {
        let pbar = positive("barometric pressure", barometric_pa, "Pa")?;
        let pm = self.meter_pressure_form(form, pbar);
        let t_f_or_c = |t_k: f64| match form {
            Method4Form::EpaEnglish => t_k * 1.8 - 459.67,
            _ => t_k - 273.15,
        };
        let (tm, vm, vwc, vwsg, vm_std, water_volume_unit) = match form {
            Method4Form::EpaEnglish => {
                let tm = t_f_or_c(self.meter_temperature_k) + RANKINE_OFFSET;
                let vm = self.meter_volume_m3 / M3_PER_FT3;
                (
                    tm,
                    vm,
                    K1_FT3_PER_ML * self.impinger.ml(),
                    K2_FT3_PER_G * self.silica_gel_gain_kg * 1e3,
                    K3_R_PER_INHG * self.meter_y * vm * pm / tm,
                    M3_PER_FT3,
                )
            }
            Method4Form::EpaMetric => {
                let tm = t_f_or_c(self.meter_temperature_k) + KELVIN_OFFSET;
                let vm = self.meter_volume_m3;
                (
                    tm,
                    vm,
                    K1_M3_PER_ML * self.impinger.ml(),
                    K2_M3_PER_G * self.silica_gel_gain_kg * 1e3,
                    K3_K_PER_MMHG * self.meter_y * vm * pm / tm,
                    1.0,
                )
            }
            Method4Form::Exact {
                reference_temperature_k,
                reference_pressure_pa,
            } => {
                let tm = self.meter_temperature_k;
                let vm = self.meter_volume_m3;
                let to_std = R_J_MOL_K * reference_temperature_k / reference_pressure_pa;
                let n_imp = self.impinger.grams() / H2O_G_MOL;
                let n_sg = self.silica_gel_gain_kg * 1e3 / H2O_G_MOL;
                let n_dry = self.meter_y * vm * pm / (R_J_MOL_K * tm);
                (tm, vm, n_imp * to_std, n_sg * to_std, n_dry * to_std, 1.0)
            }
        };
        positive("absolute meter temperature", tm, "(form units)")?;
        positive("absolute meter pressure", pm, "(form units)")?;
        let water = vwc + vwsg;
        Ok(Method4Result {
            form,
            impinger_ml: self.impinger.ml(),
            impinger_weighed: matches!(self.impinger, ImpingerGain::Mass { .. }),
            silica_gel_g: self.silica_gel_gain_kg * 1e3,
            meter_volume: vm,
            meter_y: self.meter_y,
            meter_pressure: pm,
            meter_dh_given: matches!(self.meter_pressure, MeterPressure::OrificeDh { .. }),
            meter_temperature_abs: tm,
            vwc_std: vwc,
            vwsg_std: vwsg,
            vm_std,
            condensed_vapour_std_m3: vwc * water_volume_unit,
            silica_gel_vapour_std_m3: vwsg * water_volume_unit,
            meter_volume_std_m3: vm_std * water_volume_unit,
            // Vm(std) > 0 (every factor is > 0), so Bws is in 0..1.
            bws: water / (water + vm_std),
        })
    }
}

/// The reduced train, every figure in the form's own units (ft³, inHg, °R for English; m³, mmHg, K
/// for metric; m³, Pa, K for SI) so a reviewer can recompute it by hand, and the standard volumes
/// also in m³.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Method4Result {
    pub form: Method4Form,
    /// Vf − Vi as the equations take it, mL (a weighed gain at 1 g/mL).
    pub impinger_ml: f64,
    /// The impinger gain was weighed (g) rather than read as a volume.
    pub impinger_weighed: bool,
    /// Wf − Wi, g.
    pub silica_gel_g: f64,
    /// Vm as read, ft³ or m³.
    pub meter_volume: f64,
    pub meter_y: f64,
    /// Pm, absolute, inHg, mmHg or Pa.
    pub meter_pressure: f64,
    /// Pm was made as Pbar + ΔH/13.6.
    pub meter_dh_given: bool,
    /// Tm, °R (°F + 460), K (°C + 273) or K.
    pub meter_temperature_abs: f64,
    /// Vwc(std), ft³ or m³.
    pub vwc_std: f64,
    /// Vwsg(std), ft³ or m³.
    pub vwsg_std: f64,
    /// Vm(std), dscf or dscm.
    pub vm_std: f64,
    pub condensed_vapour_std_m3: f64,
    pub silica_gel_vapour_std_m3: f64,
    pub meter_volume_std_m3: f64,
    /// Water vapour mole fraction of the sampled gas, as the train measured it.
    pub bws: f64,
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The equations are evaluated in the form's units; the only residue is the SI round trip of
    /// the inputs (units.rs factors), far below 1e-12 relative.
    const REL_TOL_EXACT_FORM: f64 = 1e-12;
    /// Half a unit in the 5th decimal of a printed Bws.
    const ABS_TOL_PUBLISHED_BWS: f64 = 5e-6;

    const ML: f64 = 1e-6;
    const G: f64 = 1e-3;

    fn rel(a: f64, b: f64) -> f64 {
        ((a - b) / b).abs()
    }

    fn f_to_k(f: f64) -> f64 {
        (f + 459.67) / 1.8
    }

    #[test]
    fn reference_train_english() {
        // Reference calculations.md §2 [D], derived from the Method 4 equations: 100 mL, 10 g,
        // 30.000 ft³, Y 1, 29.92 inHg, 68 °F (528 °R with +460) -> Bws 0.14723.
        let t = Method4Train::new(
            ImpingerGain::Volume { m3: 100.0 * ML },
            10.0 * G,
            30.0 * M3_PER_FT3,
            1.0,
            MeterPressure::Absolute {
                pa: 29.92 * PA_PER_INHG,
            },
            f_to_k(68.0),
        )
        .unwrap();
        let r = t
            .reduce(Method4Form::EpaEnglish, 29.92 * PA_PER_INHG)
            .unwrap();
        assert!(
            (r.bws - 0.14723).abs() <= ABS_TOL_PUBLISHED_BWS,
            "{}",
            r.bws
        );
        // Derived by hand: Vwc = 0.04706·100 = 4.706 ft³; Vwsg = 0.04715·10 = 0.4715 ft³;
        // Vm(std) = 17.64·1·30·29.92/528 = 29.988 dscf; Bws = 5.1775/35.1655 = 0.147232373.
        assert!(rel(r.vwc_std, 4.706) < REL_TOL_EXACT_FORM);
        assert!(rel(r.vwsg_std, 0.4715) < REL_TOL_EXACT_FORM);
        assert!(rel(r.vm_std, 29.988) < REL_TOL_EXACT_FORM, "{}", r.vm_std);
        assert!(rel(r.meter_temperature_abs, 528.0) < REL_TOL_EXACT_FORM);
        assert!(rel(r.bws, 5.1775 / 35.1655) < REL_TOL_EXACT_FORM);
    }

    #[test]
    fn english_form_with_grams_dcf_and_orifice_dh() {
        // Derived by hand from Method 4 eqs. 4-1 to 4-4 (English) with Method 5 eq. 5-1's
        // Pm = Pbar + ΔH/13.6: impingers weighed +152.3 g (taken as 152.3 mL), silica gel +18.7 g,
        // meter 34.215 dcf, Y 0.987, Pbar 29.40 inHg, ΔH 1.85 inH2O, meter 84 °F.
        //   Vwc  = 0.04706·152.3 = 7.167238 ft³
        //   Vwsg = 0.04715·18.7  = 0.881705 ft³
        //   Pm   = 29.40 + 1.85/13.6 = 29.536029 inHg;  Tm = 84 + 460 = 544 °R
        //   Vm(std) = 17.64·0.987·34.215·29.536029/544 = 32.343386 dscf
        //   Bws = 8.048943/(8.048943 + 32.343386) = 0.19927
        let t = Method4Train::new(
            ImpingerGain::Mass { kg: 152.3 * G },
            18.7 * G,
            34.215 * M3_PER_FT3,
            0.987,
            MeterPressure::OrificeDh {
                pa: 1.85 * PA_PER_INH2O,
            },
            f_to_k(84.0),
        )
        .unwrap();
        let r = t
            .reduce(Method4Form::EpaEnglish, 29.40 * PA_PER_INHG)
            .unwrap();
        let pm = 29.40 + 1.85 / 13.6;
        let vm_std = 17.64 * 0.987 * 34.215 * pm / 544.0;
        let (vwc, vwsg) = (0.04706 * 152.3, 0.04715 * 18.7);
        assert!(rel(r.meter_pressure, pm) < REL_TOL_EXACT_FORM);
        assert!(rel(r.meter_temperature_abs, 544.0) < REL_TOL_EXACT_FORM);
        assert!(rel(r.vwc_std, vwc) < REL_TOL_EXACT_FORM);
        assert!(rel(r.vwsg_std, vwsg) < REL_TOL_EXACT_FORM);
        assert!(rel(r.vm_std, vm_std) < REL_TOL_EXACT_FORM);
        assert!(rel(r.bws, (vwc + vwsg) / (vwc + vwsg + vm_std)) < REL_TOL_EXACT_FORM);
        // The hand value above, to 5 decimals.
        assert!(
            (r.bws - 0.19927).abs() <= ABS_TOL_PUBLISHED_BWS,
            "{}",
            r.bws
        );
        assert!(r.impinger_weighed && r.meter_dh_given);
    }

    #[test]
    fn metric_form_with_grams_and_litres() {
        // Derived by hand from Method 4 eqs. 4-1 to 4-4 (metric): impingers +118.4 g, silica gel
        // +12.6 g, meter 905.0 L (0.905 m³), Y 1.012, Pbar 748.0 mmHg, ΔH 38 mmH2O, meter 26 °C.
        //   Vwc = 0.001333·118.4 = 0.1578272 m³; Vwsg = 0.001335·12.6 = 0.016821 m³
        //   Pm = 748.0 + 38/13.6 = 750.794118 mmHg; Tm = 26 + 273 = 299 K
        //   Vm(std) = 0.3855·1.012·0.905·750.794118/299 = 0.886550 dscm
        //   Bws = 0.1746482/(0.1746482 + 0.886550) = 0.16458
        let t = Method4Train::new(
            ImpingerGain::Mass { kg: 118.4 * G },
            12.6 * G,
            0.905,
            1.012,
            MeterPressure::OrificeDh {
                pa: 38.0 * PA_PER_MMH2O,
            },
            26.0 + 273.15,
        )
        .unwrap();
        let r = t
            .reduce(Method4Form::EpaMetric, 748.0 * PA_PER_MMHG)
            .unwrap();
        let pm = 748.0 + 38.0 / 13.6;
        let vm_std = 0.3855 * 1.012 * 0.905 * pm / 299.0;
        let (vwc, vwsg) = (0.001333 * 118.4, 0.001335 * 12.6);
        assert!(rel(r.meter_temperature_abs, 299.0) < REL_TOL_EXACT_FORM);
        assert!(rel(r.vm_std, vm_std) < REL_TOL_EXACT_FORM);
        assert!(rel(r.bws, (vwc + vwsg) / (vwc + vwsg + vm_std)) < REL_TOL_EXACT_FORM);
        assert!(
            (r.bws - 0.16458).abs() <= ABS_TOL_PUBLISHED_BWS,
            "{}",
            r.bws
        );
    }

    #[test]
    fn english_and_metric_forms_differ_by_their_printed_constants() {
        // The same train reduced both ways, each with its own printed constants (derived by hand):
        // metric: Vm = 30 ft³ = 0.849505 m³, Pm = 29.92 inHg = 759.968 mmHg, Tm = 20 + 273 = 293 K,
        // Vm(std) = 0.3855·0.849505·759.968/293 = 0.849420 dscm, water 0.1333 + 0.01335 m³,
        // Bws = 0.14665/0.996070 = 0.147229; English gives 0.147232. The forms round their
        // constants differently, so the results differ (by 1.7e-5 relative here): each form must
        // use its own.
        let t = Method4Train::new(
            ImpingerGain::Volume { m3: 100.0 * ML },
            10.0 * G,
            30.0 * M3_PER_FT3,
            1.0,
            MeterPressure::Absolute {
                pa: 29.92 * PA_PER_INHG,
            },
            f_to_k(68.0),
        )
        .unwrap();
        let e = t.reduce(Method4Form::EpaEnglish, 101_325.0).unwrap();
        let m = t.reduce(Method4Form::EpaMetric, 101_325.0).unwrap();
        assert!(rel(m.meter_temperature_abs, 293.0) < REL_TOL_EXACT_FORM);
        let vm_std = 0.3855 * (30.0 * M3_PER_FT3) * (29.92 * 25.4) / 293.0;
        assert!(rel(m.vm_std, vm_std) < REL_TOL_EXACT_FORM);
        assert!(rel(m.bws, 0.14665 / (0.14665 + vm_std)) < REL_TOL_EXACT_FORM);
        assert!((m.bws - 0.1472298).abs() < 5e-8, "{}", m.bws);
        assert!(rel(e.bws, m.bws) > 1e-5, "{} {}", e.bws, m.bws);
    }

    #[test]
    fn exact_form_is_a_mole_balance() {
        // 18.0153 g of water (one mole, by mass) against one mole of dry gas metered:
        // Vm = R·T/p with Y 1 -> Bws = 0.5 exactly.
        let (t, p) = (293.15, 101_325.0);
        let vm = R_J_MOL_K * t / p;
        let tr = Method4Train::new(
            ImpingerGain::Mass {
                kg: H2O_G_MOL * 1e-3,
            },
            0.0,
            vm,
            1.0,
            MeterPressure::Absolute { pa: p },
            t,
        )
        .unwrap();
        let r = tr
            .reduce(
                Method4Form::Exact {
                    reference_temperature_k: 273.15,
                    reference_pressure_pa: 101_325.0,
                },
                p,
            )
            .unwrap();
        assert!((r.bws - 0.5).abs() < 1e-12, "{}", r.bws);
        // one mole at 0 °C, 101.325 kPa: 22.414 L
        assert!((r.vm_std - 0.022_413_97).abs() < 1e-8, "{}", r.vm_std);
    }

    #[test]
    fn dry_train_gives_zero_moisture() {
        let t = Method4Train::new(
            ImpingerGain::Volume { m3: 0.0 },
            0.0,
            0.5,
            1.0,
            MeterPressure::Absolute { pa: 100_000.0 },
            293.0,
        )
        .unwrap();
        assert_eq!(
            t.reduce(Method4Form::EpaMetric, 100_000.0).unwrap().bws,
            0.0
        );
    }

    #[test]
    fn rejects_bad_trains() {
        let ok_p = MeterPressure::Absolute { pa: 100_000.0 };
        let vol = |m3| ImpingerGain::Volume { m3 };
        assert_eq!(
            Method4Train::new(vol(-1e-6), 0.0, 0.5, 1.0, ok_p, 293.0),
            Err(GasError::Negative {
                quantity: "impinger liquid gain",
                value: -1e-6,
                unit: "m³"
            })
        );
        assert!(
            Method4Train::new(ImpingerGain::Mass { kg: -0.1 }, 0.0, 0.5, 1.0, ok_p, 293.0).is_err()
        );
        assert!(Method4Train::new(vol(0.0), -0.001, 0.5, 1.0, ok_p, 293.0).is_err());
        assert!(Method4Train::new(vol(0.0), 0.0, 0.0, 1.0, ok_p, 293.0).is_err());
        assert!(Method4Train::new(vol(0.0), 0.0, 0.5, 0.0, ok_p, 293.0).is_err());
        assert!(Method4Train::new(
            vol(0.0),
            0.0,
            0.5,
            1.0,
            MeterPressure::Absolute { pa: -1.0 },
            293.0
        )
        .is_err());
        assert!(Method4Train::new(
            vol(0.0),
            0.0,
            0.5,
            1.0,
            MeterPressure::OrificeDh { pa: -1.0 },
            293.0
        )
        .is_err());
        assert!(Method4Train::new(vol(0.0), 0.0, 0.5, 1.0, ok_p, f64::NAN).is_err());
        assert!(Method4Train::new(vol(0.0), 0.0, f64::INFINITY, 1.0, ok_p, 293.0).is_err());
    }
}
