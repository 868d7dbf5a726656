//! Molar mass as a validated quantity, and the molar masses of the flue-gas species.
//!
//! Owns [`MolarMass`] (always positive and finite; stored in kg/mol, handed out in kg/mol or g/mol)
//! and the species table the exact dry and wet molar masses are built from. It must not decide
//! which rule (EPA Method 3 coefficients or exact masses) a convention uses: the caller chooses.

use super::error::{fraction, positive, GasError};

/// Molar mass of O2, g/mol. IUPAC standard atomic weights; transcribed from the project reference
/// calculations.md §2 ("exact molar masses" \[P\]).
pub const O2_G_MOL: f64 = 31.9988;
/// Molar mass of CO2, g/mol (source as [`O2_G_MOL`]).
pub const CO2_G_MOL: f64 = 44.0095;
/// Molar mass of N2, g/mol (source as [`O2_G_MOL`]).
pub const N2_G_MOL: f64 = 28.0134;
/// Molar mass of Ar, g/mol (source as [`O2_G_MOL`]).
pub const AR_G_MOL: f64 = 39.948;
/// Molar mass of CO, g/mol (source as [`O2_G_MOL`]).
pub const CO_G_MOL: f64 = 28.0101;
/// Molar mass of H2O, g/mol (source as [`O2_G_MOL`]).
pub const H2O_G_MOL: f64 = 18.0153;
/// Molar mass of H2O used by EPA Method 2/4 for the wet molecular weight, g/mol:
/// `Ms = Md(1 − Bws) + 18.0·Bws` (40 CFR 60 App. A, Method 2 equation for Ms; reference
/// calculations.md §2 \[P\]).
pub const H2O_EPA_G_MOL: f64 = 18.0;

/// A molar mass. Exists only if positive and finite.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct MolarMass {
    kg_mol: f64,
}

impl MolarMass {
    /// From g/mol (numerically the same as lb/lb-mol, the unit EPA forms use).
    pub fn from_g_mol(g_mol: f64) -> Result<Self, GasError> {
        let g_mol = positive("molar mass", g_mol, "g/mol")?;
        Ok(Self {
            kg_mol: g_mol / 1000.0,
        })
    }

    /// From kg/mol.
    pub fn from_kg_mol(kg_mol: f64) -> Result<Self, GasError> {
        let kg_mol = positive("molar mass", kg_mol, "kg/mol")?;
        Ok(Self { kg_mol })
    }

    /// For values computed here from already validated parts (a composition, a moisture fraction),
    /// which are positive and finite by construction.
    pub(super) fn from_validated_g_mol(g_mol: f64) -> Self {
        Self {
            kg_mol: g_mol / 1000.0,
        }
    }

    /// The value in kg/mol (SI).
    pub fn kg_mol(self) -> f64 {
        self.kg_mol
    }

    /// The value in g/mol (= lb/lb-mol).
    pub fn g_mol(self) -> f64 {
        self.kg_mol * 1000.0
    }
}

/// Which molar mass of water the wet molar mass uses. The caller chooses, because a regulatory
/// recomputation must reproduce EPA's 18.0 while an SI-exact convention uses 18.0153.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum WaterMolarMass {
    /// 18.0 g/mol, as written in the EPA Method 2 equation for Ms.
    Epa,
    /// 18.0153 g/mol (IUPAC).
    Exact,
}

impl WaterMolarMass {
    /// The value in g/mol.
    pub fn g_mol(self) -> f64 {
        match self {
            WaterMolarMass::Epa => H2O_EPA_G_MOL,
            WaterMolarMass::Exact => H2O_G_MOL,
        }
    }
}

/// Molar mass of the wet gas: `Ms = Md·(1 − Bws) + Mw·Bws` (EPA Method 2 equation for Ms, with
/// Mw = 18.0; reference calculations.md §2 \[P\]). `bws` is the water vapour mole fraction, 0 ≤ Bws < 1.
pub fn wet_molar_mass(
    dry: MolarMass,
    bws: f64,
    water: WaterMolarMass,
) -> Result<MolarMass, GasError> {
    let bws = fraction("water vapour mole fraction", bws)?;
    if bws >= 1.0 {
        return Err(GasError::NoDryGas { bws });
    }
    Ok(MolarMass::from_validated_g_mol(
        dry.g_mol() * (1.0 - bws) + water.g_mol() * bws,
    ))
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// Published check values are printed to 3–4 decimals; this is half a unit of the last one.
    const ABS_TOL_PUBLISHED_G_MOL: f64 = 5e-4;

    const REL_TOL_ROUNDTRIP: f64 = 1e-15;

    #[test]
    fn units_round_trip() {
        let m = MolarMass::from_g_mol(28.9647).unwrap();
        assert!((m.kg_mol() - 0.0289647).abs() <= REL_TOL_ROUNDTRIP * 0.0289647);
        assert!((m.g_mol() - 28.9647).abs() <= REL_TOL_ROUNDTRIP * 28.9647);
        let k = MolarMass::from_kg_mol(0.018).unwrap();
        assert!((k.g_mol() - 18.0).abs() <= REL_TOL_ROUNDTRIP * 18.0);
    }

    #[test]
    fn rejects_non_positive_and_non_finite() {
        assert_eq!(
            MolarMass::from_g_mol(0.0),
            Err(GasError::NotPositive {
                quantity: "molar mass",
                value: 0.0,
                unit: "g/mol"
            })
        );
        assert!(MolarMass::from_g_mol(-29.0).is_err());
        assert!(MolarMass::from_kg_mol(f64::NAN).is_err());
    }

    #[test]
    fn water_choice() {
        assert_eq!(WaterMolarMass::Epa.g_mol(), 18.0);
        assert_eq!(WaterMolarMass::Exact.g_mol(), 18.0153);
    }

    #[test]
    fn wet_molar_mass_epa_example() {
        // Reference calculations.md §8, EPA Method 2 English example (derived from the Method 2
        // equation for Ms): Md 29.920, Bws 0.10, Mw 18.0 -> Ms 28.728.
        let md = MolarMass::from_g_mol(29.920).unwrap();
        let ms = wet_molar_mass(md, 0.10, WaterMolarMass::Epa).unwrap();
        assert!((ms.g_mol() - 28.728).abs() <= ABS_TOL_PUBLISHED_G_MOL);
    }

    #[test]
    fn wet_molar_mass_metric_example() {
        // Reference calculations.md §8, EPA Method 2 metric example (derived): Md 30.16, Bws 0.08,
        // Mw 18.0 -> Ms 29.1872.
        let md = MolarMass::from_g_mol(30.16).unwrap();
        let ms = wet_molar_mass(md, 0.08, WaterMolarMass::Epa).unwrap();
        assert!((ms.g_mol() - 29.1872).abs() <= ABS_TOL_PUBLISHED_G_MOL);
    }

    #[test]
    fn wet_molar_mass_rejects_bad_moisture() {
        let md = MolarMass::from_g_mol(29.0).unwrap();
        assert_eq!(
            wet_molar_mass(md, 1.0, WaterMolarMass::Exact),
            Err(GasError::NoDryGas { bws: 1.0 })
        );
        assert_eq!(
            wet_molar_mass(md, -0.01, WaterMolarMass::Exact),
            Err(GasError::FractionOutOfRange {
                quantity: "water vapour mole fraction",
                value: -0.01
            })
        );
        assert!(wet_molar_mass(md, f64::NAN, WaterMolarMass::Epa).is_err());
    }

    proptest! {
        #[test]
        fn wet_molar_mass_lies_between_water_and_dry(md in 20.0f64..50.0, bws in 0.0f64..0.999) {
            let dry = MolarMass::from_g_mol(md).unwrap();
            let ms = wet_molar_mass(dry, bws, WaterMolarMass::Exact).unwrap().g_mol();
            let (lo, hi) = if md < H2O_G_MOL { (md, H2O_G_MOL) } else { (H2O_G_MOL, md) };
            prop_assert!(ms >= lo - 1e-12 && ms <= hi + 1e-12);
        }
    }
}
