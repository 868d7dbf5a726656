//! Conventions: the named sets of constants and choices each rule book computes with.
//!
//! Each convention is data with its source; the report prints [`Convention::describe`] so a reader
//! can recompute. A regulatory convention reproduces its published equations exactly (EPA Method 2
//! with 85.49, 460, 13.6, 528 °R, 29.92 inHg, 18.0); an SI convention uses exact constants.

use crate::survey::{ConventionId, ReferenceOverride};
use crate::units::{PA_PER_INH2O, PA_PER_INHG, PA_PER_MMH2O, PA_PER_MMHG};
use serde::Serialize;

/// EPA Method 2 eq. 2-9 pitot constant, English units: 85.49 ft/s·[(lb/lb-mol)(inHg)/((°R)(inH2O))]^½.
pub const EPA_KP_ENGLISH: f64 = 85.49;
/// EPA Method 2 eq. 2-9 pitot constant, metric units: 34.97 m/s·[(g/g-mol)(mmHg)/((K)(mmH2O))]^½.
pub const EPA_KP_METRIC: f64 = 34.97;
/// EPA Method 2: absolute temperature = °F + 460 (English) or °C + 273 (metric).
pub const EPA_RANKINE_OFFSET: f64 = 460.0;
pub const EPA_KELVIN_OFFSET: f64 = 273.0;
/// EPA Method 2 eq. 2-6: Ps = Pbar + Pg/13.6 (Pg in inH2O or mmH2O).
pub const EPA_HG_TO_H2O: f64 = 13.6;
/// EPA Method 2 §2-10 standard conditions: 528 °R / 29.92 inHg, 293 K / 760 mmHg.
pub const EPA_TSTD_R: f64 = 528.0;
pub const EPA_PSTD_INHG: f64 = 29.92;
pub const EPA_TSTD_K: f64 = 293.0;
pub const EPA_PSTD_MMHG: f64 = 760.0;
/// EN ISO 16911-1 normal conditions: 273.15 K, 101.325 kPa.
pub const ISO_TREF_K: f64 = 273.15;
pub const ISO_PREF_PA: f64 = 101_325.0;
/// HVAC inch-pound velocity constant: V\[fpm\] = 1096.2·√(VP\[inH2O\]/ρ\[lb/ft³\]) (TAB/ASHRAE
/// practice; the value implies an inch of water of about 248.4 Pa, i.e. water near 70 °F).
pub const HVAC_IP_CONSTANT: f64 = 1096.2;
/// HVAC dry-air density shortcut ρ\[lb/ft³\] = 1.325·Pb\[inHg\]/T\[°R\] (ASHRAE/TAB practice).
pub const HVAC_IP_DRY_AIR_FACTOR: f64 = 1.325;
/// Standard air 0.075 lb/ft³ (HVAC/AMCA definition) and 1.2 kg/m³ (ISO 5801).
pub const HVAC_IP_STANDARD_LB_FT3: f64 = 0.075;
pub const HVAC_SI_STANDARD_KG_M3: f64 = 1.2;
pub const KG_M3_PER_LB_FT3: f64 = 16.018_463_373_960_14;

/// Which EPA Method 2 unit form the survey's numbers are reduced in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum EpaForm {
    English,
    Metric,
}

/// A convention with its reference conditions resolved.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Convention {
    pub id: ConventionId,
    pub epa_form: EpaForm,
    /// Reference (standard / normal) temperature and pressure.
    pub reference_temperature_k: f64,
    pub reference_pressure_pa: f64,
    /// Whether the headline standard flow is on a dry basis.
    pub dry_basis: bool,
    /// HVAC: standard air density that defines standard flow.
    pub standard_density_kg_m3: Option<f64>,
    pub overridden: bool,
}

impl Convention {
    pub fn new(
        id: ConventionId,
        epa_form: EpaForm,
        reference: Option<ReferenceOverride>,
    ) -> Convention {
        let (t, p, dry, rho) = match (id, epa_form) {
            (ConventionId::EpaMethod2, EpaForm::English) => {
                (EPA_TSTD_R / 1.8, EPA_PSTD_INHG * PA_PER_INHG, true, None)
            }
            (ConventionId::EpaMethod2, EpaForm::Metric) => {
                (EPA_TSTD_K, EPA_PSTD_MMHG * PA_PER_MMHG, true, None)
            }
            (ConventionId::Iso16911, _) => (ISO_TREF_K, ISO_PREF_PA, true, None),
            (ConventionId::HvacIp, _) => (
                // 0.075 lb/ft³ is dry air near 70 °F and 29.92 inHg
                (70.0 + 459.67) / 1.8,
                EPA_PSTD_INHG * PA_PER_INHG,
                false,
                Some(HVAC_IP_STANDARD_LB_FT3 * KG_M3_PER_LB_FT3),
            ),
            (ConventionId::HvacSi, _) => (
                // 1.2 kg/m³ is dry air near 20 °C and 101.325 kPa
                293.15,
                ISO_PREF_PA,
                false,
                Some(HVAC_SI_STANDARD_KG_M3),
            ),
        };
        match reference {
            Some(r) => Convention {
                id,
                epa_form,
                reference_temperature_k: r.temperature_k,
                reference_pressure_pa: r.pressure_pa,
                dry_basis: dry,
                // dry air at the given conditions (R_da = 287.042 J/(kg·K), ASHRAE Fundamentals ch. 1)
                standard_density_kg_m3: rho.map(|_| r.pressure_pa / (287.042 * r.temperature_k)),
                overridden: true,
            },
            None => Convention {
                id,
                epa_form,
                reference_temperature_k: t,
                reference_pressure_pa: p,
                dry_basis: dry,
                standard_density_kg_m3: rho,
                overridden: false,
            },
        }
    }

    /// Δp in the convention's gauge unit (inH2O, mmH2O) or Pa.
    pub fn epa_dp(&self, dp_pa: f64) -> f64 {
        match self.epa_form {
            EpaForm::English => dp_pa / PA_PER_INH2O,
            EpaForm::Metric => dp_pa / PA_PER_MMH2O,
        }
    }

    /// EPA absolute temperature: °F + 460 (°R) or °C + 273 (K).
    pub fn epa_absolute_t(&self, t_k: f64) -> f64 {
        match self.epa_form {
            EpaForm::English => (t_k * 1.8 - 459.67) + EPA_RANKINE_OFFSET,
            EpaForm::Metric => (t_k - 273.15) + EPA_KELVIN_OFFSET,
        }
    }

    /// EPA eq. 2-6 absolute stack pressure in inHg or mmHg: Pbar + Pg/13.6.
    pub fn epa_ps(&self, barometric_pa: f64, static_pa: f64) -> f64 {
        match self.epa_form {
            EpaForm::English => {
                barometric_pa / PA_PER_INHG + (static_pa / PA_PER_INH2O) / EPA_HG_TO_H2O
            }
            EpaForm::Metric => {
                barometric_pa / PA_PER_MMHG + (static_pa / PA_PER_MMH2O) / EPA_HG_TO_H2O
            }
        }
    }

    /// EPA reference temperature and pressure in the form's own units.
    pub fn epa_reference(&self) -> (f64, f64) {
        match self.epa_form {
            EpaForm::English => (
                self.reference_temperature_k * 1.8,
                self.reference_pressure_pa / PA_PER_INHG,
            ),
            EpaForm::Metric => (
                self.reference_temperature_k,
                self.reference_pressure_pa / PA_PER_MMHG,
            ),
        }
    }

    /// Lines that say how the numbers were made, printed with every result: the formulas, then
    /// the reference conditions in SI (screens print those in their own units, see
    /// [`Convention::formulas`] and [`Convention::basis_words`]).
    pub fn describe(&self) -> Vec<String> {
        let mut v = self.formulas();
        v.push(format!(
            "reference {:.2} K, {:.1} Pa, {}",
            self.reference_temperature_k,
            self.reference_pressure_pa,
            self.basis_words()
        ));
        v
    }

    /// The job's own display table: the convention's unit system (EPA Method 2's metric units
    /// when the survey reduces in metric), and whether the survey set the reference conditions.
    pub fn display_table(&self) -> crate::display::DisplayTable {
        use crate::display::{DisplayTable, UnitSystem};
        let metric = self.epa_form == EpaForm::Metric;
        DisplayTable::new(self.id, UnitSystem::of(self.id, metric))
            .with_reference_overridden(self.overridden)
    }

    /// The standard conditions as the method itself writes them, in its own units (`528 °R,
    /// 29.92 inHg` for EPA Method 2 English; `293 K, 760 mmHg` metric), where the method fixes
    /// them and the survey did not set its own. EPA Method 2 converts with 460 and 273, so these
    /// are 68 °F and 20 °C in the method's arithmetic.
    pub fn reference_as_written(&self) -> Option<&'static str> {
        match (self.id, self.epa_form, self.overridden) {
            (ConventionId::EpaMethod2, EpaForm::English, false) => {
                Some("528 °R (68 °F), 29.92 inHg")
            }
            (ConventionId::EpaMethod2, EpaForm::Metric, false) => Some("293 K (20 °C), 760 mmHg"),
            _ => None,
        }
    }

    /// The basis of the standard flows in words (`dry basis`, or `wet (by density) basis` and
    /// whether the survey set the reference conditions).
    pub fn basis_words(&self) -> String {
        format!(
            "{} basis{}",
            if self.dry_basis {
                "dry"
            } else {
                "wet (by density)"
            },
            if self.overridden {
                " (set by the survey)"
            } else {
                ""
            }
        )
    }

    /// The equations the convention computes with, in the form's own units (the report prints
    /// them; the reference conditions it states in the job's units on its own).
    pub fn formulas(&self) -> Vec<String> {
        match (self.id, self.epa_form) {
            (ConventionId::EpaMethod2, EpaForm::English) => vec![
                "EPA Method 2 (40 CFR 60 App. A-1) eqs. 2-6 to 2-10, English units".to_string(),
                "vs = 85.49·Cp·(√Δp)avg·√(Ts/(Ps·Ms)); Ts = °F + 460; Ps = Pbar + Pg/13.6".to_string(),
                "Md = 0.44·%CO2 + 0.32·%O2 + 0.28·(%N2 + %CO); Ms = Md(1 − Bws) + 18.0·Bws".to_string(),
                "(√Δp)avg is the mean of the square roots; Ts the mean absolute temperature".to_string(),
            ],
            (ConventionId::EpaMethod2, EpaForm::Metric) => vec![
                "EPA Method 2 (40 CFR 60 App. A-1) eqs. 2-6 to 2-10, metric units".to_string(),
                "vs = 34.97·Cp·(√Δp)avg·√(Ts/(Ps·Ms)); Ts = °C + 273; Ps = Pbar + Pg/13.6 (mmHg, mmH2O)".to_string(),
                "Md = 0.44·%CO2 + 0.32·%O2 + 0.28·(%N2 + %CO); Ms = Md(1 − Bws) + 18.0·Bws".to_string(),
                "(√Δp)avg is the mean of the square roots; Ts the mean absolute temperature".to_string(),
            ],
            (ConventionId::Iso16911, _) => vec![
                "EN ISO 16911-1 style: v_i = K·√(2Δp_i/ρ_i), ρ_i = p·M/(R·T_i), R = 8.314462618 J/(mol·K)".to_string(),
                "exact molar masses; mean of point velocities; normal flow from Σ(v_i/T_i)".to_string(),
            ],
            (ConventionId::HvacIp, _) => vec![
                "HVAC inch-pound: V[fpm] = C·1096.2·√(VP[inH2O]/ρ[lb/ft³])".to_string(),
                "dry air ρ = 1.325·Pb[inHg]/T[°R]; moist air by ASHRAE Fundamentals ch. 1".to_string(),
                "standard flow by density: scfm = acfm·ρ/0.075".to_string(),
            ],
            (ConventionId::HvacSi, _) => vec![
                "HVAC SI: v = C·√(2·Δp/ρ); moist air density by ASHRAE Fundamentals ch. 1".to_string(),
                "standard flow by density: Q_std = Q·ρ/1.2".to_string(),
            ],
        }
    }
}

/// The velocity equations a survey's angle correction uses, in words: EPA Methods 2G and 2F
/// replace the (√Δp)avg equation with per-point axial velocities that are then averaged.
pub fn angle_notes(c: &Convention, angles: crate::survey::AngleCorrection) -> Vec<String> {
    use crate::survey::AngleCorrection;
    let (k, t) = match (c.id, c.epa_form) {
        (ConventionId::EpaMethod2, EpaForm::English) => ("85.49", "Ts(i) = °F + 460"),
        (ConventionId::EpaMethod2, EpaForm::Metric) => ("34.97", "Ts(i) = °C + 273"),
        _ => ("", ""),
    };
    let point = if k.is_empty() {
        "v(i) = K·√(2Δp(i)/ρ(i))".to_string()
    } else {
        format!("v(i) = {k}·Cp·√(Δp(i)·Ts(i)/(Ps·Ms)), {t}")
    };
    match angles {
        AngleCorrection::None => Vec::new(),
        AngleCorrection::Yaw => vec![
            "EPA Method 2G (yaw-corrected): va(i) = v(i)·cos θy(i) at each point".to_string(),
            format!("{point}; vs = mean of va(i) (point velocities averaged, not (√Δp)avg)"),
        ],
        AngleCorrection::YawPitch => vec![
            "EPA Method 2F (yaw and pitch): va(i) = v(i)·cos θy(i)·cos θp(i) at each point".to_string(),
            format!("{point}; vs = mean of va(i) (point velocities averaged, not (√Δp)avg); 3-D probe calibration coefficients are not applied"),
        ],
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn epa_absolute_units_use_460_and_273() {
        let c = Convention::new(ConventionId::EpaMethod2, EpaForm::English, None);
        // 300 °F -> 760 °R by the Method 2 rule (460), not 759.67
        let t_k = (300.0 + 459.67) / 1.8;
        assert!((c.epa_absolute_t(t_k) - 760.0).abs() < 1e-9);
        let m = Convention::new(ConventionId::EpaMethod2, EpaForm::Metric, None);
        assert!((m.epa_absolute_t(423.15) - 423.0).abs() < 1e-9);
        // calculations.md §8 English: Pbar 29.50 inHg, Pg −0.50 inH2O -> Ps 29.46324 inHg
        let ps = c.epa_ps(29.50 * PA_PER_INHG, -0.50 * PA_PER_INH2O);
        assert!((ps - 29.463235).abs() < 1e-6, "{ps}");
        let (t, p) = c.epa_reference();
        assert!((t - 528.0).abs() < 1e-9 && (p - 29.92).abs() < 1e-12);
    }

    #[test]
    fn override_replaces_reference() {
        let c = Convention::new(
            ConventionId::Iso16911,
            EpaForm::English,
            Some(ReferenceOverride {
                temperature_k: 298.15,
                pressure_pa: 101_325.0,
            }),
        );
        assert_eq!(c.reference_temperature_k, 298.15);
        assert!(c.describe().last().unwrap().contains("set by the survey"));
    }

    #[test]
    fn methods_2g_and_2f_name_their_per_point_equations() {
        use crate::survey::AngleCorrection;
        let c = Convention::new(ConventionId::EpaMethod2, EpaForm::English, None);
        assert!(angle_notes(&c, AngleCorrection::None).is_empty());
        let g = angle_notes(&c, AngleCorrection::Yaw).join(" ");
        // EPA Method 2G: axial velocity v·cos(yaw) at each point, point velocities averaged
        assert!(g.contains("Method 2G") && g.contains("cos θy(i)"), "{g}");
        assert!(
            g.contains("85.49·Cp·√(Δp(i)·Ts(i)/(Ps·Ms)), Ts(i) = °F + 460"),
            "{g}"
        );
        let f = angle_notes(&c, AngleCorrection::YawPitch).join(" ");
        assert!(
            f.contains("Method 2F") && f.contains("cos θy(i)·cos θp(i)"),
            "{f}"
        );
        let m = Convention::new(ConventionId::EpaMethod2, EpaForm::Metric, None);
        assert!(angle_notes(&m, AngleCorrection::Yaw)
            .join(" ")
            .contains("34.97"));
    }
}
