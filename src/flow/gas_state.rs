//! The gas of one run: absolute pressure, molar masses, moisture and the density rule.
//!
//! Resolves the survey's gas description under a convention: EPA uses the Method 3 coefficients and
//! 18.0 for water, the SI conventions exact molar masses, HVAC humid air the ASHRAE psychrometric
//! equations. The density at any temperature then follows from [`GasState::density_kg_m3`].

use super::convention::{Convention, HVAC_IP_DRY_AIR_FACTOR, KG_M3_PER_LB_FT3};
use super::FlowError;
use crate::gas::{
    self, absolute_pressure_pa, ideal_gas_density_kg_m3, limit_to_saturation, psychro,
    wet_molar_mass, DryComposition, DryMolarMassRule, HumiditySpec, MoistureBasis, MolarMass,
    WaterMolarMass,
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
    pub absolute_pressure_pa: f64,
    pub dry_molar_mass_g_mol: f64,
    /// Water vapour mole fraction used.
    pub bws: f64,
    /// The measured value before the saturation cap, when that applies.
    pub measured_bws: Option<f64>,
    pub moisture_basis: String,
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
    let (bws, measured, basis, w) = match &gas.moisture {
        Moisture::Dry => (0.0, None, "dry gas".to_string(), None),
        Moisture::Fraction { bws } => capped(*bws, mean_temperature_k, p, "given")?,
        Moisture::Method4(m) => {
            let train = gas::Method4Train::new(
                m.impinger_gain_m3,
                m.silica_gain_kg,
                m.meter_volume_m3,
                m.meter_y,
                m.meter_pressure_pa,
                m.meter_temperature_k,
            )
            .map_err(|e| gas_err(e, "check [gas.method4]"))?;
            capped(train.reduce().bws, mean_temperature_k, p, "EPA Method 4")?
        }
        Moisture::RelativeHumidity { rh } => {
            let (w, x) = humid(HumiditySpec::RelativeHumidity(*rh))?;
            (
                x,
                None,
                format!("from {:.0} % RH (ASHRAE)", rh * 100.0),
                Some(w),
            )
        }
        Moisture::WetBulb { temperature_k } => {
            let (w, x) = humid(HumiditySpec::WetBulbK(*temperature_k))?;
            (x, None, "from wet bulb (ASHRAE)".to_string(), Some(w))
        }
        Moisture::DewPoint { temperature_k } => {
            let (w, x) = humid(HumiditySpec::DewPointK(*temperature_k))?;
            (x, None, "from dew point (ASHRAE)".to_string(), Some(w))
        }
    };
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
        absolute_pressure_pa: p,
        dry_molar_mass_g_mol: md.g_mol(),
        bws,
        measured_bws: measured,
        moisture_basis: basis,
        wet_molar_mass_g_mol: ms.g_mol(),
        density_rule,
    })
}

/// EPA Method 4 §12.1.7 / Method 2: in saturated gas take the lower of measured and saturation.
fn capped(
    measured: f64,
    t_k: f64,
    p_pa: f64,
    what: &str,
) -> Result<(f64, Option<f64>, String, Option<f64>), FlowError> {
    let m = limit_to_saturation(measured, t_k, p_pa)
        .map_err(|e| gas_err(e, "check the moisture and the stack temperature"))?;
    Ok(match m.basis {
        MoistureBasis::Measured => (m.bws, None, format!("{what} moisture"), None),
        MoistureBasis::Saturation => (
            m.bws,
            Some(m.measured_bws),
            format!(
                "saturation at stack temperature (lower than the {what} {:.2} %)",
                m.measured_bws * 100.0
            ),
            None,
        ),
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
