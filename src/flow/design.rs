//! A measured flow on a named basis: what a design flow (or a reported figure) is compared with.
//!
//! A design written `8000 acfm` is compared with the actual flow, `8000 scfm` with the standard
//! (wet) flow of the job's convention, `dscfm` with the dry standard flow. A design at normal
//! conditions (`Nm3/h`, `dNm3/h`: 273.15 K, 101.325 kPa) is compared with the measured flow
//! converted to normal conditions, whatever the job's own reference conditions:
//!
//! - under a stack convention the standard flow is a gas volume at the convention's reference
//!   temperature and pressure, so the ideal gas law moves it to normal conditions:
//!   Q_N = Q_ref · (T_N / T_ref) · (P_ref / P_N) (on an EN ISO 16911-1 job, whose reference is
//!   normal, the factor is exactly 1);
//! - under an HVAC convention the standard flow is the mass flow over the standard air density
//!   (ASHRAE: 0.075 lb/ft³, 1.2 kg/m³), so the normal flow is the mass flow over the density of dry
//!   air at normal conditions, ρ_N = P_N / (R_da · T_N) = 1.2923 kg/m³ (R_da = 287.042 J/(kg·K),
//!   ASHRAE Handbook Fundamentals ch. 1, as for the reference-condition override): Q_N = Q_std ·
//!   ρ_std / ρ_N.
//!
//! Either way the report says which flow was compared ([`FlowBasis::words`]).

use super::Convention;
use crate::survey::DesignFlow;
use crate::units::FlowBasis;

/// Specific gas constant of dry air, J/(kg·K) (ASHRAE Handbook Fundamentals ch. 1), as
/// `flow::convention` uses it.
const R_DRY_AIR: f64 = 287.042;

/// The three flows a result carries, m³/s.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Flows {
    pub actual_m3_s: f64,
    pub standard_m3_s: f64,
    pub dry_standard_m3_s: f64,
}

/// The factor from the convention's standard flow to the flow at normal conditions.
pub fn normal_factor(convention: &Convention) -> f64 {
    let (t_n, p_n) = FlowBasis::Normal.reference().unwrap_or((273.15, 101_325.0));
    match convention.standard_density_kg_m3 {
        Some(rho_std) => rho_std / (p_n / (R_DRY_AIR * t_n)),
        None => {
            (t_n / convention.reference_temperature_k) * (convention.reference_pressure_pa / p_n)
        }
    }
}

/// The measured flow on `basis`, m³/s.
pub fn flow_on_basis(flows: Flows, basis: FlowBasis, convention: &Convention) -> f64 {
    match basis {
        FlowBasis::Actual => flows.actual_m3_s,
        FlowBasis::Standard => flows.standard_m3_s,
        FlowBasis::DryStandard => flows.dry_standard_m3_s,
        FlowBasis::Normal => flows.standard_m3_s * normal_factor(convention),
        FlowBasis::NormalDry => flows.dry_standard_m3_s * normal_factor(convention),
    }
}

/// The measured flow as a percentage of the design, both on the design's basis.
pub fn percent_of_design(design: &DesignFlow, flows: Flows, convention: &Convention) -> f64 {
    100.0 * flow_on_basis(flows, design.basis, convention) / design.m3_s
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::flow::EpaForm;
    use crate::survey::ConventionId;

    const FLOWS: Flows = Flows {
        actual_m3_s: 4.0,
        standard_m3_s: 3.5,
        dry_standard_m3_s: 3.2,
    };

    fn design(m3_s: f64, basis: FlowBasis) -> DesignFlow {
        DesignFlow {
            m3_s,
            basis,
            raw: String::new(),
        }
    }

    #[test]
    fn each_basis_compares_its_own_flow() {
        let c = Convention::new(ConventionId::HvacIp, EpaForm::English, None);
        // percent of design = measured / design × 100 on the same basis (common practice)
        assert_eq!(
            percent_of_design(&design(4.0, FlowBasis::Actual), FLOWS, &c),
            100.0
        );
        assert_eq!(
            percent_of_design(&design(3.5, FlowBasis::Standard), FLOWS, &c),
            100.0
        );
        assert_eq!(
            percent_of_design(&design(3.2, FlowBasis::DryStandard), FLOWS, &c),
            100.0
        );
    }

    #[test]
    fn normal_conditions_on_an_iso_job_are_its_reference() {
        // EN ISO 16911-1 reference conditions are 273.15 K and 101.325 kPa: the factor is 1
        let c = Convention::new(ConventionId::Iso16911, EpaForm::English, None);
        assert!((normal_factor(&c) - 1.0).abs() < 1e-15);
        assert_eq!(flow_on_basis(FLOWS, FlowBasis::NormalDry, &c), 3.2);
    }

    #[test]
    fn normal_conditions_on_an_epa_job_follow_the_gas_law() {
        // EPA Method 2 English standard conditions 528 °R (293.33 K) and 29.92 inHg; ideal gas:
        // Q_N = Q_std · (273.15 / 293.333…) · (101 320.7 / 101 325) (derived)
        let c = Convention::new(ConventionId::EpaMethod2, EpaForm::English, None);
        let k = (273.15 / (528.0 / 1.8)) * (29.92 * crate::units::PA_PER_INHG / 101_325.0);
        assert!((normal_factor(&c) - k).abs() < 1e-12);
        assert!((k - 0.931_154).abs() < 1e-6);
    }

    #[test]
    fn normal_conditions_on_an_hvac_job_use_air_density() {
        // hvac-si standard air 1.2 kg/m³; dry air at 0 °C, 101.325 kPa: 101325 / (287.042 ×
        // 273.15) = 1.292 320 kg/m³ (derived from ASHRAE Fundamentals ch. 1, R_da)
        let c = Convention::new(ConventionId::HvacSi, EpaForm::English, None);
        assert!((normal_factor(&c) - 1.2 / 1.292_320).abs() < 1e-6);
        let q = flow_on_basis(FLOWS, FlowBasis::Normal, &c);
        assert!((q - 3.5 * 0.928_563).abs() < 1e-5);
    }
}
