//! Dry flue-gas composition and its molar mass.
//!
//! Owns [`DryComposition`] (O2, CO2, CO and optionally Ar as mole fractions of the dry gas, N2 the
//! balance) and the two rules for the dry molar mass Md: EPA Method 3 coefficients and exact
//! molar masses. It must not decide which rule a convention uses, nor add moisture (see
//! [`super::molar_mass::wet_molar_mass`]).
//!
//! ## Argon
//! EPA Method 3 weights the balance at 0.28 (`Md = 0.44·%CO2 + 0.32·%O2 + 0.28·(%N2 + %CO)`).
//! An Orsat or an O2/CO2 analyser cannot tell argon from nitrogen, so the balance EPA calls "N2"
//! already holds the argon. Under [`DryMolarMassRule::EpaMethod3`] a given Ar fraction is therefore
//! counted in that balance at 0.28 (Md is the same whether or not Ar is given), which keeps a
//! regulatory recomputation identical to EPA's. Under [`DryMolarMassRule::Exact`] a given Ar is
//! weighted at 39.948 g/mol and the remaining balance at 28.0134; without Ar the whole balance is
//! weighted as N2, as the EN-style worked example (calculations.md §8) does.

use super::error::{fraction, GasError};
use super::molar_mass::{MolarMass, AR_G_MOL, CO2_G_MOL, CO_G_MOL, N2_G_MOL, O2_G_MOL};

/// EPA Method 3 dry molecular weight coefficients, g/mol per unit mole fraction (the printed
/// 0.44/0.32/0.28 are per percent). 40 CFR 60 App. A-2, Method 3 equation for Md; transcribed from
/// the project reference calculations.md §2 \[P\].
pub const EPA_METHOD3_CO2_G_MOL: f64 = 44.0;
/// O2 coefficient (source as [`EPA_METHOD3_CO2_G_MOL`]).
pub const EPA_METHOD3_O2_G_MOL: f64 = 32.0;
/// Coefficient for the balance N2 + CO (and, here, Ar; see the module notes).
pub const EPA_METHOD3_N2_CO_G_MOL: f64 = 28.0;

/// Dry molecular weight EPA allows to assign to gas that is essentially air, g/mol
/// (reference calculations.md §2 \[P\], EPA Methods 2/3).
pub const EPA_ASSIGNED_AIR_MD_G_MOL: f64 = 29.0;
/// Dry molecular weight that may be assigned for natural-gas, coal or oil firing, g/mol
/// (reference calculations.md §2 \[P\], EPA Method 3).
pub const EPA_ASSIGNED_COMBUSTION_MD_G_MOL: f64 = 30.0;

/// Slack on the sum of the measured components, so that analyser readings which add to 100 % up to
/// floating-point rounding (e.g. 9 % + 9.5 % + 81.5 % handed over as fractions) are not rejected.
/// Common practice; far below any analyser resolution.
const SUM_SLACK: f64 = 1e-9;

/// How the dry molar mass is computed from a composition.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DryMolarMassRule {
    /// EPA Method 3 coefficients 0.44 / 0.32 / 0.28 (regulatory recomputation).
    EpaMethod3,
    /// Exact molar masses of each species (SI-exact conventions).
    Exact,
}

/// Composition of the dry gas as mole (volume) fractions, 0.09 for 9 %. N2 is the balance.
/// Exists only if every fraction is in 0..=1 and O2 + CO2 + CO + Ar ≤ 1.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DryComposition {
    o2: f64,
    co2: f64,
    co: f64,
    ar: Option<f64>,
}

impl DryComposition {
    /// Validates a dry composition. `ar_fraction` is `None` when argon was not measured (it is
    /// then inside the N2 balance).
    pub fn new(
        o2_fraction: f64,
        co2_fraction: f64,
        co_fraction: f64,
        ar_fraction: Option<f64>,
    ) -> Result<Self, GasError> {
        let o2 = fraction("O2 fraction", o2_fraction)?;
        let co2 = fraction("CO2 fraction", co2_fraction)?;
        let co = fraction("CO fraction", co_fraction)?;
        let ar = match ar_fraction {
            Some(a) => Some(fraction("Ar fraction", a)?),
            None => None,
        };
        let sum = o2 + co2 + co + ar.unwrap_or(0.0);
        if sum > 1.0 + SUM_SLACK {
            return Err(GasError::CompositionOverfull { sum });
        }
        Ok(Self { o2, co2, co, ar })
    }

    /// O2 mole fraction of the dry gas.
    pub fn o2_fraction(&self) -> f64 {
        self.o2
    }

    /// CO2 mole fraction of the dry gas.
    pub fn co2_fraction(&self) -> f64 {
        self.co2
    }

    /// CO mole fraction of the dry gas.
    pub fn co_fraction(&self) -> f64 {
        self.co
    }

    /// Ar mole fraction, if it was given.
    pub fn ar_fraction(&self) -> Option<f64> {
        self.ar
    }

    /// The N2 balance: 1 − O2 − CO2 − CO − Ar (Ar only if given), never negative.
    pub fn n2_fraction(&self) -> f64 {
        (1.0 - self.o2 - self.co2 - self.co - self.ar.unwrap_or(0.0)).max(0.0)
    }

    /// Dry molar mass Md by the chosen rule.
    pub fn dry_molar_mass(&self, rule: DryMolarMassRule) -> MolarMass {
        let n2 = self.n2_fraction();
        let ar = self.ar.unwrap_or(0.0);
        let g_mol = match rule {
            // Ar joins the balance at 0.28: see the module notes.
            DryMolarMassRule::EpaMethod3 => {
                EPA_METHOD3_CO2_G_MOL * self.co2
                    + EPA_METHOD3_O2_G_MOL * self.o2
                    + EPA_METHOD3_N2_CO_G_MOL * (n2 + self.co + ar)
            }
            DryMolarMassRule::Exact => {
                CO2_G_MOL * self.co2
                    + O2_G_MOL * self.o2
                    + CO_G_MOL * self.co
                    + AR_G_MOL * ar
                    + N2_G_MOL * n2
            }
        };
        MolarMass::from_validated_g_mol(g_mol)
    }
}

/// Where the dry molar mass of a run comes from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DryMolarMass {
    /// Computed from a measured composition by a rule.
    Composition {
        /// The measured dry composition.
        composition: DryComposition,
        /// The rule applied to it.
        rule: DryMolarMassRule,
    },
    /// Given directly (for example [`EPA_ASSIGNED_AIR_MD_G_MOL`]).
    Assigned(MolarMass),
}

impl DryMolarMass {
    /// The dry molar mass Md.
    pub fn molar_mass(&self) -> MolarMass {
        match self {
            DryMolarMass::Composition { composition, rule } => composition.dry_molar_mass(*rule),
            DryMolarMass::Assigned(m) => *m,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// Half a unit in the last printed decimal of a g/mol check value (3–4 decimals).
    const ABS_TOL_PUBLISHED_G_MOL: f64 = 5e-4;
    /// Agreement of two computations of the same exact sum.
    const ABS_TOL_ARITHMETIC_G_MOL: f64 = 1e-10;

    #[test]
    fn epa_method3_example() {
        // Reference calculations.md §2 and §8 (derived from the EPA Method 3 equation for Md):
        // CO2 10 %, O2 8 %, CO 0, N2 balance -> Md 29.920.
        let c = DryComposition::new(0.08, 0.10, 0.0, None).unwrap();
        let md = c.dry_molar_mass(DryMolarMassRule::EpaMethod3).g_mol();
        assert!((md - 29.920).abs() <= ABS_TOL_PUBLISHED_G_MOL, "{md}");
        assert!((c.n2_fraction() - 0.82).abs() < 1e-12);
    }

    #[test]
    fn exact_rule_en_style_example() {
        // Derived here from the exact molar masses (calculations.md §2): O2 9 %, CO2 9.5 %,
        // N2 81.5 % -> 0.09·31.9988 + 0.095·44.0095 + 0.815·28.0134 = 29.8917155 g/mol.
        let c = DryComposition::new(0.09, 0.095, 0.0, None).unwrap();
        let md = c.dry_molar_mass(DryMolarMassRule::Exact).g_mol();
        assert!(
            (md - 29.891_715_5).abs() <= ABS_TOL_ARITHMETIC_G_MOL,
            "{md}"
        );
        // The EPA coefficients give 29.880 for the same gas (0.44·9.5 + 0.32·9 + 0.28·81.5).
        let epa = c.dry_molar_mass(DryMolarMassRule::EpaMethod3).g_mol();
        assert!((epa - 29.880).abs() <= ABS_TOL_ARITHMETIC_G_MOL, "{epa}");
    }

    #[test]
    fn argon_is_in_the_epa_balance_but_weighted_exactly_otherwise() {
        let without = DryComposition::new(0.209, 0.0004, 0.0, None).unwrap();
        let with = DryComposition::new(0.209, 0.0004, 0.0, Some(0.0093)).unwrap();
        let epa_without = without.dry_molar_mass(DryMolarMassRule::EpaMethod3).g_mol();
        let epa_with = with.dry_molar_mass(DryMolarMassRule::EpaMethod3).g_mol();
        assert!((epa_without - epa_with).abs() <= ABS_TOL_ARITHMETIC_G_MOL);
        // Dry air with argon, exact: 28.96 g/mol (common practice value for dry air is 28.965).
        let exact_with = with.dry_molar_mass(DryMolarMassRule::Exact).g_mol();
        let exact_without = without.dry_molar_mass(DryMolarMassRule::Exact).g_mol();
        assert!((exact_with - exact_without - 0.0093 * (AR_G_MOL - N2_G_MOL)).abs() < 1e-10);
        assert!((exact_with - 28.96).abs() < 0.01, "{exact_with}");
        assert!((with.n2_fraction() - (1.0 - 0.209 - 0.0004 - 0.0093)).abs() < 1e-12);
    }

    #[test]
    fn co_is_weighted_with_the_balance_by_epa_and_exactly_otherwise() {
        let c = DryComposition::new(0.05, 0.12, 0.01, None).unwrap();
        let epa = c.dry_molar_mass(DryMolarMassRule::EpaMethod3).g_mol();
        assert!((epa - (0.44 * 12.0 + 0.32 * 5.0 + 0.28 * 83.0)).abs() < 1e-10);
        let exact = c.dry_molar_mass(DryMolarMassRule::Exact).g_mol();
        let by_hand = 0.05 * O2_G_MOL + 0.12 * CO2_G_MOL + 0.01 * CO_G_MOL + 0.82 * N2_G_MOL;
        assert!((exact - by_hand).abs() < 1e-10);
    }

    #[test]
    fn rejects_negative_fractions() {
        assert_eq!(
            DryComposition::new(-0.01, 0.1, 0.0, None),
            Err(GasError::FractionOutOfRange {
                quantity: "O2 fraction",
                value: -0.01
            })
        );
        assert!(DryComposition::new(0.08, -0.1, 0.0, None).is_err());
        assert!(DryComposition::new(0.08, 0.1, -1e-6, None).is_err());
        assert!(DryComposition::new(0.08, 0.1, 0.0, Some(-0.01)).is_err());
        // A percentage passed where a fraction is expected (8 instead of 0.08).
        assert!(matches!(
            DryComposition::new(8.0, 0.1, 0.0, None),
            Err(GasError::FractionOutOfRange { .. })
        ));
    }

    #[test]
    fn rejects_sum_over_one() {
        let e = DryComposition::new(0.5, 0.4, 0.1, Some(0.05)).unwrap_err();
        assert!(matches!(e, GasError::CompositionOverfull { sum } if (sum - 1.05).abs() < 1e-12));
        assert_eq!(
            e.to_string(),
            "O2 + CO2 + CO (+ Ar) must not exceed 100 % of the dry gas (N2 is the balance), found 105 %"
        );
        // Exactly 100 % leaves no N2 and is accepted.
        let full = DryComposition::new(0.5, 0.5, 0.0, None).unwrap();
        assert_eq!(full.n2_fraction(), 0.0);
    }

    #[test]
    fn assigned_md_is_used_as_given() {
        let m = MolarMass::from_g_mol(EPA_ASSIGNED_AIR_MD_G_MOL).unwrap();
        assert_eq!(DryMolarMass::Assigned(m).molar_mass().g_mol(), 29.0);
        let c = DryComposition::new(0.08, 0.10, 0.0, None).unwrap();
        let from_c = DryMolarMass::Composition {
            composition: c,
            rule: DryMolarMassRule::EpaMethod3,
        };
        assert!((from_c.molar_mass().g_mol() - 29.92).abs() < 1e-10);
    }

    proptest! {
        #[test]
        fn exact_md_lies_between_lightest_and_heaviest_species(
            o2 in 0.0f64..0.25, co2 in 0.0f64..0.25, co in 0.0f64..0.05, ar in 0.0f64..0.02
        ) {
            let c = DryComposition::new(o2, co2, co, Some(ar)).unwrap();
            let md = c.dry_molar_mass(DryMolarMassRule::Exact).g_mol();
            prop_assert!((CO_G_MOL - 1e-9..=CO2_G_MOL + 1e-9).contains(&md));
            let fractions = c.o2_fraction() + c.co2_fraction() + c.co_fraction()
                + c.ar_fraction().unwrap_or(0.0) + c.n2_fraction();
            prop_assert!((fractions - 1.0).abs() < 1e-12);
        }

        #[test]
        fn more_co2_in_place_of_n2_raises_md(o2 in 0.0f64..0.2, co2 in 0.0f64..0.2, d in 1e-4f64..0.1) {
            for rule in [DryMolarMassRule::EpaMethod3, DryMolarMassRule::Exact] {
                let a = DryComposition::new(o2, co2, 0.0, None).unwrap().dry_molar_mass(rule);
                let b = DryComposition::new(o2, co2 + d, 0.0, None).unwrap().dry_molar_mass(rule);
                prop_assert!(b.g_mol() > a.g_mol());
            }
        }
    }
}
