//! The gas of one run: absolute pressure, molar masses, moisture and the density rule.
//!
//! Resolves the survey's gas description under a convention: EPA uses the Method 3 coefficients and
//! 18.0 for water, the SI conventions exact molar masses, HVAC humid air the ASHRAE psychrometric
//! equations. The density at any temperature then follows from [`GasState::density_kg_m3`].

use super::convention::{Convention, EpaForm, HVAC_IP_DRY_AIR_FACTOR, KG_M3_PER_LB_FT3};
use super::FlowError;
use crate::gas::{
    self, absolute_pressure_pa, ideal_gas_density_kg_m3, limit_to_saturation, psychro,
    wet_molar_mass, DryComposition, DryMolarMassRule, HumiditySpec, Method4Form, Method4Result,
    MoistureBasis, MolarMass, WaterMolarMass,
};
use crate::survey::{ConventionId, DryGas, Gas, Moisture};
use crate::units::PA_PER_INHG;
use serde::Serialize;

/// Dry air molar mass, 28.966 g/mol (ASHRAE Fundamentals 2017 ch. 1, Table 1 basis).
pub const DRY_AIR_G_MOL: f64 = 28.966;

/// How density is obtained from temperature.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum DensityRule {
    /// ρ = p·Ms/(R·T).
    IdealGas,
    /// HVAC inch-pound dry-air shortcut ρ = 1.325·Pb/T[°R] (lb/ft³).
    HvacIpShortcut,
    /// ASHRAE moist-air density with humidity ratio W.
    MoistAir { humidity_ratio: f64 },
}

/// The resolved gas of a run.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GasState {
    /// The run's barometric and static pressure (its own, or the survey's).
    pub barometric_pa: f64,
    pub static_pa: f64,
    pub absolute_pressure_pa: f64,
    /// The run's dry gas as given.
    pub dry: DryGas,
    pub dry_molar_mass_g_mol: f64,
    /// Water vapour mole fraction used.
    pub bws: f64,
    /// The measured or given value before the saturation cap, when saturation was considered
    /// (a given fraction or a Method 4 train).
    pub measured_bws: Option<f64>,
    /// p_ws(Ts)/Ps at the run's mean stack temperature, when saturation was considered and the
    /// correlation reaches the temperature (may exceed 1 above the boiling point).
    pub saturation_bws: Option<f64>,
    /// Which value is used, in words.
    pub moisture_basis: String,
    /// The Method 4 train reduced with every intermediate, when the run's moisture is a train.
    pub method4: Option<Method4Result>,
    pub wet_molar_mass_g_mol: f64,
    pub density_rule: DensityRule,
}

fn gas_err(e: gas::GasError, hint: &str) -> FlowError {
    FlowError::Gas {
        message: e.to_string(),
        hint: hint.to_string(),
    }
}

/// Resolves the survey gas for a convention at the run's mean temperature (used for humidity and
/// the saturation cap).
pub fn resolve_gas(
    gas: &Gas,
    convention: &Convention,
    mean_temperature_k: f64,
) -> Result<GasState, FlowError> {
    let p = absolute_pressure_pa(gas.barometric_pa, gas.static_pa)
        .map_err(|e| gas_err(e, "check [gas] barometric and static"))?;
    let epa = convention.id == ConventionId::EpaMethod2;
    let rule = if epa {
        DryMolarMassRule::EpaMethod3
    } else {
        DryMolarMassRule::Exact
    };
    let water = if epa {
        WaterMolarMass::Epa
    } else {
        WaterMolarMass::Exact
    };
    let md = match &gas.dry {
        DryGas::Composition { o2, co2, co, ar } => DryComposition::new(*o2, *co2, *co, *ar)
            .map_err(|e| gas_err(e, "o2, co2, co and ar are dry-basis percentages"))?
            .dry_molar_mass(rule),
        DryGas::MolarMass { g_mol } => MolarMass::from_g_mol(*g_mol)
            .map_err(|e| gas_err(e, "dry_molar_mass is in g/mol, e.g. 29.0"))?,
        DryGas::Air => MolarMass::from_g_mol(if epa {
            gas::composition::EPA_ASSIGNED_AIR_MD_G_MOL
        } else {
            DRY_AIR_G_MOL
        })
        .map_err(|e| gas_err(e, ""))?,
    };
    let humid = |spec: HumiditySpec| -> Result<(f64, f64), FlowError> {
        let w = psychro::humidity_ratio(mean_temperature_k, p, spec)
            .map_err(|e| gas_err(e, "check the humidity and the gas temperature"))?;
        let x = psychro::vapour_mole_fraction(w).map_err(|e| gas_err(e, ""))?;
        Ok((w, x))
    };
    let mut method4 = None;
    let (cap, w) = match &gas.moisture {
        Moisture::Dry => (
            Capped {
                bws: 0.0,
                measured: None,
                saturation: None,
                basis: "dry gas".to_string(),
            },
            None,
        ),
        Moisture::Fraction { bws } => (capped(*bws, mean_temperature_k, p, "given")?, None),
        Moisture::Method4(m) => {
            let train = gas::Method4Train::new(
                m.impinger_gain,
                m.silica_gain_kg,
                m.meter_volume_m3,
                m.meter_y,
                m.meter_pressure,
                m.meter_temperature_k,
            )
            .map_err(|e| {
                gas_err(
                    e,
                    "check the Method 4 train data ([gas.method4] or [run.method4])",
                )
            })?;
            let form = method4_form(convention);
            let r = train
                .reduce(form, gas.barometric_pa)
                .map_err(|e| gas_err(e, "check the Method 4 train data and [gas] barometric"))?;
            method4 = Some(r);
            (
                capped(r.bws, mean_temperature_k, p, "Method 4 train")?,
                None,
            )
        }
        Moisture::RelativeHumidity { rh } => {
            let (w, x) = humid(HumiditySpec::RelativeHumidity(*rh))?;
            (
                Capped::plain(x, format!("from {:.0} % RH (ASHRAE)", rh * 100.0)),
                Some(w),
            )
        }
        Moisture::WetBulb { temperature_k } => {
            let (w, x) = humid(HumiditySpec::WetBulbK(*temperature_k))?;
            (Capped::plain(x, "from wet bulb (ASHRAE)".into()), Some(w))
        }
        Moisture::DewPoint { temperature_k } => {
            let (w, x) = humid(HumiditySpec::DewPointK(*temperature_k))?;
            (Capped::plain(x, "from dew point (ASHRAE)".into()), Some(w))
        }
    };
    let bws = cap.bws;
    let ms = wet_molar_mass(md, bws, water).map_err(|e| gas_err(e, "check [gas] moisture"))?;
    let density_rule = match (convention.id, w) {
        (ConventionId::HvacIp | ConventionId::HvacSi, Some(w)) => {
            DensityRule::MoistAir { humidity_ratio: w }
        }
        (ConventionId::HvacIp, None) if matches!(gas.dry, DryGas::Air) => {
            DensityRule::HvacIpShortcut
        }
        (ConventionId::HvacIp | ConventionId::HvacSi, None)
        | (ConventionId::EpaMethod2 | ConventionId::Iso16911, _) => DensityRule::IdealGas,
    };
    Ok(GasState {
        barometric_pa: gas.barometric_pa,
        static_pa: gas.static_pa,
        absolute_pressure_pa: p,
        dry: gas.dry.clone(),
        dry_molar_mass_g_mol: md.g_mol(),
        bws,
        measured_bws: cap.measured,
        saturation_bws: cap.saturation,
        moisture_basis: cap.basis,
        method4,
        wet_molar_mass_g_mol: ms.g_mol(),
        density_rule,
    })
}

/// The Method 4 equations a convention reduces a train with: EPA Method 2 surveys use the method's
/// own English or metric form (with its printed constants); other conventions an SI-exact mole
/// balance at their reference conditions.
pub fn method4_form(convention: &Convention) -> Method4Form {
    match (convention.id, convention.epa_form) {
        (ConventionId::EpaMethod2, EpaForm::English) => Method4Form::EpaEnglish,
        (ConventionId::EpaMethod2, EpaForm::Metric) => Method4Form::EpaMetric,
        _ => Method4Form::Exact {
            reference_temperature_k: convention.reference_temperature_k,
            reference_pressure_pa: convention.reference_pressure_pa,
        },
    }
}

/// The moisture a run uses and what it was chosen from.
struct Capped {
    bws: f64,
    measured: Option<f64>,
    saturation: Option<f64>,
    basis: String,
}

impl Capped {
    fn plain(bws: f64, basis: String) -> Capped {
        Capped {
            bws,
            measured: None,
            saturation: None,
            basis,
        }
    }
}

/// In saturated gas take the lower of the measured value and saturation (EPA Method 4 §12.1.7,
/// clause number from memory; rule per reference calculations.md §2 \[P\]).
fn capped(measured: f64, t_k: f64, p_pa: f64, what: &str) -> Result<Capped, FlowError> {
    let m = limit_to_saturation(measured, t_k, p_pa)
        .map_err(|e| gas_err(e, "check the moisture and the stack temperature"))?;
    Ok(Capped {
        bws: m.bws,
        measured: Some(m.measured_bws),
        saturation: m.saturation_bws,
        basis: match m.basis {
            MoistureBasis::Measured => format!("{what} moisture"),
            MoistureBasis::Saturation => format!(
                "saturation at stack temperature (lower than the {what} value {:.2} %)",
                m.measured_bws * 100.0
            ),
        },
    })
}

impl GasState {
    /// Gas density at temperature `t_k` by the run's rule.
    pub fn density_kg_m3(&self, t_k: f64) -> Result<f64, FlowError> {
        match self.density_rule {
            DensityRule::IdealGas => {
                let m =
                    MolarMass::from_g_mol(self.wet_molar_mass_g_mol).map_err(|e| gas_err(e, ""))?;
                ideal_gas_density_kg_m3(self.absolute_pressure_pa, m, t_k)
                    .map_err(|e| gas_err(e, "check the gas temperature"))
            }
            DensityRule::HvacIpShortcut => {
                if t_k <= 0.0 {
                    return Err(FlowError::Gas {
                        message: format!("temperature {t_k} K is not absolute"),
                        hint: String::new(),
                    });
                }
                let lb_ft3 = HVAC_IP_DRY_AIR_FACTOR * (self.absolute_pressure_pa / PA_PER_INHG)
                    / (t_k * 1.8);
                Ok(lb_ft3 * KG_M3_PER_LB_FT3)
            }
            DensityRule::MoistAir { humidity_ratio } => {
                psychro::moist_air_density_kg_m3(t_k, humidity_ratio, self.absolute_pressure_pa)
                    .map_err(|e| gas_err(e, "check the gas temperature"))
            }
        }
    }

    /// Humidity ratio W (kg water per kg dry gas) implied by Bws and the molar masses.
    pub fn humidity_ratio(&self) -> f64 {
        match self.density_rule {
            DensityRule::MoistAir { humidity_ratio } => humidity_ratio,
            _ => self.bws * 18.0153 / ((1.0 - self.bws).max(1e-12) * self.dry_molar_mass_g_mol),
        }
    }
}
