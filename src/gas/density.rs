//! Gas density from the ideal-gas law, and the absolute pressure it needs.
//!
//! Owns `ρ = p·M/(R·T)` and `p = p_bar + p_static`. It must not compute molar mass or humidity
//! (see [`super::composition`], [`super::molar_mass`], [`super::psychro`]) nor convert gauge
//! readings from liquid columns (the units layer does that).

use super::error::{finite, positive, GasError};
use super::molar_mass::MolarMass;

/// Molar gas constant, J/(mol·K): exact since the 2019 SI redefinition (CODATA 2018);
/// transcribed from reference calculations.md §2 \[P\].
pub const MOLAR_GAS_CONSTANT_J_MOL_K: f64 = 8.314_462_618;

/// Absolute pressure in the duct: barometric plus static (gauge, usually negative on
/// induced-draught stacks). Reference calculations.md §2 \[P\]; EPA writes it `Ps = Pbar + Pg/13.6`
/// in inHg with Pg in inH2O. The result must be positive.
pub fn absolute_pressure_pa(barometric_pa: f64, static_gauge_pa: f64) -> Result<f64, GasError> {
    let pbar = positive("barometric pressure", barometric_pa, "Pa")?;
    let pg = finite("static pressure", static_gauge_pa)?;
    positive(
        "absolute duct pressure (barometric + static)",
        pbar + pg,
        "Pa",
    )
}

/// Ideal-gas density, kg/m³: `ρ = p·M/(R·T)` (reference calculations.md §2 \[P\]).
pub fn ideal_gas_density_kg_m3(
    pressure_pa: f64,
    molar_mass: MolarMass,
    temperature_k: f64,
) -> Result<f64, GasError> {
    let p = positive("absolute pressure", pressure_pa, "Pa")?;
    let t = positive("gas temperature", temperature_k, "K")?;
    Ok(p * molar_mass.kg_mol() / (MOLAR_GAS_CONSTANT_J_MOL_K * t))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::gas::composition::{DryComposition, DryMolarMassRule};
    use crate::gas::molar_mass::{wet_molar_mass, WaterMolarMass};
    use proptest::prelude::*;

    /// Half a unit in the last printed decimal of the §8 values (28.5853 g/mol, 0.83797 kg/m³).
    const ABS_TOL_PUBLISHED_G_MOL: f64 = 5e-5;
    const ABS_TOL_PUBLISHED_KG_M3: f64 = 5e-6;

    /// The EN-style stack of reference calculations.md §8: 140 °C, 100.70 kPa, O2 9 %, CO2 9.5 %,
    /// N2 81.5 % dry, H2O 11 %.
    fn en_stack_wet_molar_mass(rule: DryMolarMassRule, water: WaterMolarMass) -> MolarMass {
        let dry = DryComposition::new(0.09, 0.095, 0.0, None)
            .unwrap()
            .dry_molar_mass(rule);
        wet_molar_mass(dry, 0.11, water).unwrap()
    }

    #[test]
    fn en_style_stack_density() {
        // Reference calculations.md §8, EN-style stack (derived from the published formulas):
        // M_wet 28.5853 g/mol, ρ 0.83797 kg/m³. Exact molar masses for both the dry gas and water
        // (18.0153) reproduce it: 29.8917155·0.89 + 18.0153·0.11 = 28.5853098 g/mol.
        let ms = en_stack_wet_molar_mass(DryMolarMassRule::Exact, WaterMolarMass::Exact);
        assert!(
            (ms.g_mol() - 28.5853).abs() <= ABS_TOL_PUBLISHED_G_MOL,
            "{}",
            ms.g_mol()
        );
        let rho = ideal_gas_density_kg_m3(100_700.0, ms, 140.0 + 273.15).unwrap();
        assert!((rho - 0.83797).abs() <= ABS_TOL_PUBLISHED_KG_M3, "{rho}");
    }

    #[test]
    fn en_style_stack_needs_exact_masses() {
        // Derived here: the EPA coefficients (Md 29.880 -> Ms 28.5732) or the EPA water mass
        // (Ms 28.5836) do not reproduce the §8 value, so that example is an SI-exact computation.
        let epa_dry = en_stack_wet_molar_mass(DryMolarMassRule::EpaMethod3, WaterMolarMass::Epa);
        assert!((epa_dry.g_mol() - 28.5732).abs() <= ABS_TOL_PUBLISHED_G_MOL);
        let epa_water = en_stack_wet_molar_mass(DryMolarMassRule::Exact, WaterMolarMass::Epa);
        assert!((epa_water.g_mol() - 28.5836).abs() <= ABS_TOL_PUBLISHED_G_MOL);
        for m in [epa_dry, epa_water] {
            assert!((m.g_mol() - 28.5853).abs() > 10.0 * ABS_TOL_PUBLISHED_G_MOL);
        }
    }

    #[test]
    fn ashrae_moist_air_density_is_the_ideal_gas_mixture() {
        // ASHRAE Fundamentals ch. 1 builds v on M_da 28.966 and M_w 18.015268 g/mol
        // (287.042 = 8314.462618/28.966; eq. for W uses their ratio 0.621945) — from memory.
        // The ideal-gas density of that mixture must equal ρ = (1 + W)/v to the rounding of the
        // printed constants (287.042 and 1.607858 carry 6–7 significant figures).
        const REL_TOL_PRINTED_CONSTANTS: f64 = 2e-6;
        for (t, w, p) in [
            (301.15, 0.00958, 99_750.0),
            (263.15, 0.001, 90_000.0),
            (333.15, 0.1, 101_325.0),
        ] {
            let x = crate::gas::psychro::vapour_mole_fraction(w).unwrap();
            let m = MolarMass::from_g_mol(28.966 * (1.0 - x) + 18.015_268 * x).unwrap();
            let ideal = ideal_gas_density_kg_m3(p, m, t).unwrap();
            let ashrae = crate::gas::psychro::moist_air_density_kg_m3(t, w, p).unwrap();
            assert!(
                ((ideal - ashrae) / ashrae).abs() <= REL_TOL_PRINTED_CONSTANTS,
                "{ideal} {ashrae}"
            );
        }
    }

    #[test]
    fn absolute_pressure_adds_static() {
        assert_eq!(absolute_pressure_pa(99_500.0, 250.0), Ok(99_750.0));
        assert_eq!(absolute_pressure_pa(100_000.0, -500.0), Ok(99_500.0));
        assert!(matches!(
            absolute_pressure_pa(1_000.0, -2_000.0),
            Err(GasError::NotPositive { value, .. }) if value == -1_000.0
        ));
        assert!(absolute_pressure_pa(0.0, 0.0).is_err());
        assert!(absolute_pressure_pa(100_000.0, f64::INFINITY).is_err());
    }

    #[test]
    fn rejects_non_physical_states() {
        let m = MolarMass::from_g_mol(29.0).unwrap();
        assert!(ideal_gas_density_kg_m3(0.0, m, 300.0).is_err());
        assert!(ideal_gas_density_kg_m3(100_000.0, m, -1.0).is_err());
        assert!(ideal_gas_density_kg_m3(f64::NAN, m, 300.0).is_err());
    }

    proptest! {
        #[test]
        fn density_increases_with_pressure(p in 1_000.0f64..1e6, dp in 1.0f64..1e4, m in 2.0f64..100.0, t in 100.0f64..1500.0) {
            let mm = MolarMass::from_g_mol(m).unwrap();
            let a = ideal_gas_density_kg_m3(p, mm, t).unwrap();
            let b = ideal_gas_density_kg_m3(p + dp, mm, t).unwrap();
            prop_assert!(b > a);
        }

        #[test]
        fn density_falls_with_temperature(p in 1_000.0f64..1e6, m in 2.0f64..100.0, t in 100.0f64..1500.0, dt in 0.1f64..100.0) {
            let mm = MolarMass::from_g_mol(m).unwrap();
            let a = ideal_gas_density_kg_m3(p, mm, t).unwrap();
            let b = ideal_gas_density_kg_m3(p, mm, t + dt).unwrap();
            prop_assert!(b < a);
        }
    }
}
