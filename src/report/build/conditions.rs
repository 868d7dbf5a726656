//! The conditions block: the convention, the reference conditions the standard flows are stated
//! at, and the gas (or air) and duct conditions during the test, in the job's units.

use super::{Job, Trade};
use crate::display::{fixed, Kind};
use crate::flow::{Convention, EpaForm};
use crate::report::model::{Conditions, Quantity};
use crate::survey::{ConventionId, DryGas};

pub(super) fn section(job: &Job) -> Conditions {
    let c = &job.e.convention;
    Conditions {
        convention: convention_name(c),
        convention_id: c.id.name().to_string(),
        reference: reference(job),
        statement: statement(job),
        gas_heading: match job.trade {
            Trade::Stack => "Stack gas and duct".into(),
            Trade::Hvac => "Air and duct".into(),
        },
        gas: gas(job),
    }
}

/// The convention in words.
pub(crate) fn convention_name(c: &Convention) -> String {
    match (c.id, c.epa_form) {
        (ConventionId::EpaMethod2, EpaForm::English) => "EPA Method 2 (English units)".into(),
        (ConventionId::EpaMethod2, EpaForm::Metric) => "EPA Method 2 (metric units)".into(),
        (ConventionId::Iso16911, _) => "EN ISO 16911-1 style (SI, exact constants)".into(),
        (ConventionId::HvacIp, _) => "HVAC, inch-pound".into(),
        (ConventionId::HvacSi, _) => "HVAC, SI".into(),
    }
}

/// The reference temperature as the convention states it. EPA Method 2 states its standard
/// temperature as an absolute value with its own offset (528 °R = 68 °F + 460; 293 K = 20 °C +
/// 273, §12.1 and eq. 2-10), which a general conversion would print as 68.3 °F: the method's own
/// figures are printed instead.
fn reference_temperature(job: &Job) -> String {
    let c = &job.e.convention;
    match (c.id, c.epa_form, c.overridden) {
        (ConventionId::EpaMethod2, EpaForm::English, false) => {
            let r = c.epa_reference().0;
            format!("{} °F ({} °R)", fixed(r - 460.0, 0), fixed(r, 0))
        }
        (ConventionId::EpaMethod2, EpaForm::Metric, false) => {
            let k = c.epa_reference().0;
            format!("{} °C ({} K)", fixed(k - 273.0, 0), fixed(k, 0))
        }
        _ => job.text(Kind::Temperature, c.reference_temperature_k),
    }
}

fn reference(job: &Job) -> Vec<Quantity> {
    let c = &job.e.convention;
    let mut out = vec![
        Quantity::new(
            "Reference temperature",
            reference_temperature(job),
            job.si_text(Kind::Temperature, c.reference_temperature_k),
        ),
        job.quantity(
            "Reference pressure",
            Kind::AbsolutePressure,
            c.reference_pressure_pa,
        ),
    ];
    if let Some(rho) = c.standard_density_kg_m3 {
        out.push(job.quantity("Standard air density", Kind::Density, rho));
    }
    out.push(Quantity::new("Basis of standard flows", basis(c), ""));
    out
}

fn basis(c: &Convention) -> &'static str {
    if c.dry_basis {
        "dry"
    } else {
        "wet (standard air by density)"
    }
}

fn statement(job: &Job) -> String {
    let c = &job.e.convention;
    let set = if c.overridden {
        ", as set in the survey"
    } else {
        ""
    };
    match c.standard_density_kg_m3 {
        Some(rho) => format!(
            "Standard air flow is the actual flow scaled by the air's density to standard air of {}{set}.",
            job.text(Kind::Density, rho)
        ),
        None => format!(
            "Standard flows are stated at {} and {}, {} basis{set}.",
            reference_temperature(job),
            job.text(Kind::AbsolutePressure, c.reference_pressure_pa),
            basis(c)
        ),
    }
}

fn gas(job: &Job) -> Vec<Quantity> {
    let s = job.survey();
    let Some(r) = job.e.runs.first() else {
        return vec![
            job.quantity("Barometric pressure", Kind::Barometric, s.gas.barometric_pa),
            job.quantity("Static pressure", Kind::StaticPressure, s.gas.static_pa),
        ];
    };
    // Runs that give their own conditions: the survey's values hold for the others, and each
    // run's own are in its column of the results table.
    let per_run = s.runs.iter().any(|r| !r.conditions.is_empty())
        || job.e.runs.iter().any(|x| x.gas.bws != r.gas.bws);
    let unless = if per_run { " (survey default)" } else { "" };
    let by_run = || Quantity::new("", "per run (results table)", "");
    let labelled = |mut q: Quantity, label: &str| {
        q.label = label.to_string();
        q
    };
    let mut out = vec![
        job.quantity(
            &format!("Barometric pressure{unless}"),
            Kind::Barometric,
            s.gas.barometric_pa,
        ),
        job.quantity(
            &format!("Static pressure{unless}"),
            Kind::StaticPressure,
            s.gas.static_pa,
        ),
    ];
    out.push(if per_run {
        labelled(by_run(), "Absolute duct pressure")
    } else {
        job.quantity(
            "Absolute duct pressure",
            Kind::AbsolutePressure,
            r.gas.absolute_pressure_pa,
        )
    });
    let moisture = if per_run {
        "per run (results table)".to_string()
    } else {
        format!(
            "{} by volume ({})",
            job.text(Kind::Percent, r.gas.bws),
            r.gas.moisture_basis
        )
    };
    if job.trade == Trade::Hvac {
        out.push(Quantity::new("Water vapour", moisture, ""));
        return out;
    }
    if let Some(t) = composition(&s.gas.dry) {
        out.push(Quantity::new(format!("Dry composition{unless}"), t, ""));
    }
    out.push(if per_run {
        labelled(by_run(), "Dry molar mass Md")
    } else {
        job.plain(
            "Dry molar mass Md",
            Kind::MolarMass,
            r.gas.dry_molar_mass_g_mol,
        )
    });
    out.push(Quantity::new("Moisture Bws", moisture, ""));
    out.push(if per_run {
        labelled(by_run(), "Wet molar mass Ms")
    } else {
        job.plain(
            "Wet molar mass Ms",
            Kind::MolarMass,
            r.gas.wet_molar_mass_g_mol,
        )
    });
    if job.e.runs.iter().any(|x| x.gas.method4.is_some()) {
        out.push(Quantity::new(
            "Moisture method",
            "EPA Method 4 train per run (see Moisture)",
            "",
        ));
    }
    if r.wall_factor != 1.0 {
        out.push(Quantity::new(
            "Wall-effects factor",
            fixed(r.wall_factor, 4),
            "",
        ));
    }
    out
}

fn composition(dry: &DryGas) -> Option<String> {
    match dry {
        DryGas::Composition { o2, co2, co, ar } => {
            let pct = |x: f64| fixed(x * 100.0, 1);
            let mut t = format!("O₂ {} %, CO₂ {} %, CO {} %", pct(*o2), pct(*co2), pct(*co));
            if let Some(ar) = ar {
                t += &format!(", Ar {} %", fixed(ar * 100.0, 2));
            }
            t += ", N₂ balance (dry basis)";
            Some(t)
        }
        DryGas::MolarMass { .. } | DryGas::Air => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::testkit::evaluated;

    fn find<'a>(q: &'a [Quantity], label: &str) -> &'a Quantity {
        q.iter()
            .find(|x| x.label == label)
            .unwrap_or_else(|| panic!("no `{label}`"))
    }

    #[test]
    fn epa_english_reference_is_the_methods_own_figures() {
        let (e, a) = evaluated("stack");
        let c = section(&Job::new(&e, &a));
        assert_eq!(c.convention, "EPA Method 2 (English units)");
        // EPA Method 2 §12.1: Tstd 528 °R (68 °F with the method's 460), Pstd 29.92 inHg
        assert_eq!(
            find(&c.reference, "Reference temperature").value,
            "68 °F (528 °R)"
        );
        assert_eq!(
            find(&c.reference, "Reference pressure").value,
            "29.920 inHg"
        );
        assert_eq!(
            c.statement,
            "Standard flows are stated at 68 °F (528 °R) and 29.920 inHg, dry basis."
        );
        // sample-data/stack: barometric = "29.62 inHg", static = "-0.85 inH2O"; runs 2 and 3 give
        // their own barometric pressure and every run has its Method 4 train, so the moisture
        // and molar masses are per run
        let b = find(&c.gas, "Barometric pressure (survey default)");
        assert_eq!(b.value, "29.62 inHg");
        assert!(!b.si.is_empty());
        assert_eq!(
            find(&c.gas, "Static pressure (survey default)").value,
            "\u{2212}0.85 inH2O"
        );
        assert!(find(&c.gas, "Moisture Bws").value.starts_with("per run"));
        assert!(find(&c.gas, "Dry molar mass Md")
            .value
            .starts_with("per run"));
        // a survey whose runs share one gas states it once
        let (e, a) = evaluated("stack-metric");
        let c = section(&Job::new(&e, &a));
        assert!(find(&c.gas, "Moisture Bws")
            .value
            .starts_with("8.0 % by volume"));
        assert!(
            find(&c.gas, "Dry molar mass Md").value.ends_with(" g/mol"),
            "{:?}",
            find(&c.gas, "Dry molar mass Md")
        );
    }

    #[test]
    fn epa_metric_reference_and_gas_in_mm() {
        let (e, a) = evaluated("stack-metric");
        let c = section(&Job::new(&e, &a));
        // EPA Method 2 §12.1 metric: 293 K (20 °C with the method's 273), 760 mmHg
        assert_eq!(
            find(&c.reference, "Reference temperature").value,
            "20 °C (293 K)"
        );
        assert_eq!(find(&c.reference, "Reference pressure").value, "760.0 mmHg");
        // sample-data/stack-metric: barometric = "750 mmHg", static = "-25 mmH2O"
        assert_eq!(find(&c.gas, "Barometric pressure").value, "750.0 mmHg");
        assert_eq!(find(&c.gas, "Static pressure").value, "\u{2212}25.0 mmH2O");
        assert!(c.gas.iter().all(|q| q.si.is_empty()));
    }

    #[test]
    fn hvac_states_standard_air_and_no_stack_terms() {
        let (e, a) = evaluated("hvac");
        let c = section(&Job::new(&e, &a));
        assert_eq!(c.gas_heading, "Air and duct");
        // standard air 0.075 lb/ft³ (HVAC/AMCA definition)
        assert_eq!(
            find(&c.reference, "Standard air density").value,
            "0.0750 lb/ft³"
        );
        assert!(c.statement.contains("standard air of 0.0750 lb/ft³"));
        assert!(c.gas.iter().all(|q| !q.label.contains("molar")));
        assert!(find(&c.gas, "Water vapour").value.contains("38 % RH"));
        assert_eq!(find(&c.gas, "Static pressure").value, "1.35 inH2O");
    }
}
