//! `[gas]`: pressures, dry composition, moisture (one of its forms, `[gas.method4]` among them)
//! and the temperature used where readings have none.

use crate::input::toml_doc::Table;
use crate::survey::{DryGas, Gas, Method4Data, Moisture};
use crate::units::Dimension;

/// Barometric pressures outside this range (Pa) are typing errors, not weather.
const BAROMETRIC_RANGE_PA: std::ops::RangeInclusive<f64> = 50_000.0..=120_000.0;

/// The ways a moisture content can be given; a table gives at most one.
pub const MOISTURE_KEYS: [&str; 5] = ["moisture", "method4", "rh", "wet_bulb", "dew_point"];

/// Reads `[gas]`.
pub fn read_gas(t: &Table) -> Option<Gas> {
    let barometric_pa = read_barometric(t);
    let static_pa = t
        .get("static")
        .and_then(|f| f.quantity_like(Dimension::Pressure, "-0.85 inH2O"))
        .unwrap_or(0.0);
    let dry = read_dry_gas(t);
    let moisture = read_moisture(t);
    let temperature_k = t.opt_quantity("temperature", Dimension::Temperature);
    Some(Gas {
        barometric_pa: barometric_pa?,
        static_pa,
        dry: dry?,
        moisture: moisture?,
        temperature_k,
    })
}

fn read_barometric(t: &Table) -> Option<f64> {
    let f = t.required("barometric", "\"29.92 inHg\"")?;
    let b = f.quantity(Dimension::Pressure)?;
    if BAROMETRIC_RANGE_PA.contains(&b) {
        Some(b)
    } else {
        f.error(
            format!(
                "barometric pressure `{}` is outside 50 to 120 kPa",
                f.text()
            ),
            Some("barometric pressure is absolute, e.g. \"29.62 inHg\" or \"100.3 kPa\"".into()),
        );
        None
    }
}

/// The dry gas: a molar mass (a plain number in g/mol or a quantity such as "29.4 g/mol"), a
/// composition (N2 the balance), or air when neither is given.
pub fn read_dry_gas(t: &Table) -> Option<DryGas> {
    let composition = ["o2", "co2", "co", "ar"].map(|k| t.get(k).is_some());
    if let Some(f) = t.get("dry_molar_mass") {
        let g_mol = match f.value {
            toml::de::DeValue::String(_) => f.quantity(Dimension::MolarMass),
            _ => f.number(),
        }?;
        return Some(DryGas::MolarMass { g_mol });
    }
    if !composition.contains(&true) {
        return Some(DryGas::Air);
    }
    let o2 = t.opt_fraction("o2").unwrap_or(0.0);
    let co2 = t.opt_fraction("co2").unwrap_or(0.0);
    let co = t.opt_fraction("co").unwrap_or(0.0);
    let ar = t.opt_fraction("ar");
    Some(DryGas::Composition { o2, co2, co, ar })
}

/// The moisture in whichever one form the table gives; dry when none.
pub fn read_moisture(t: &Table) -> Option<Moisture> {
    let given: Vec<&str> = MOISTURE_KEYS
        .into_iter()
        .filter(|k| t.get(k).is_some())
        .collect();
    if given.len() > 1 {
        t.error_at(
            given[1],
            format!(
                "{} gives moisture more than one way: {}",
                t.name(),
                given.join(", ")
            ),
            Some("keep one of moisture, method4, rh, wet_bulb or dew_point".into()),
        );
    }
    match given.first().copied() {
        None => Some(Moisture::Dry),
        Some("moisture") => t
            .opt_fraction("moisture")
            .map(|bws| Moisture::Fraction { bws }),
        Some("method4") => t
            .opt_table("method4")
            .and_then(|m| read_method4(&m))
            .map(Moisture::Method4),
        Some("rh") => t
            .opt_fraction("rh")
            .map(|rh| Moisture::RelativeHumidity { rh }),
        Some("wet_bulb") => t
            .opt_quantity("wet_bulb", Dimension::Temperature)
            .map(|temperature_k| Moisture::WetBulb { temperature_k }),
        Some(_) => t
            .opt_quantity("dew_point", Dimension::Temperature)
            .map(|temperature_k| Moisture::DewPoint { temperature_k }),
    }
}

/// Reads an EPA Method 4 train (`[gas.method4]`).
pub fn read_method4(m: &Table) -> Option<Method4Data> {
    let impinger = m.quantity("impinger_gain", Dimension::Volume);
    let silica = m.quantity("silica_gain", Dimension::Mass);
    let volume = m.quantity("meter_volume", Dimension::Volume);
    let y = m.required("meter_y", "1.002").and_then(|f| f.number());
    let pressure = m.quantity("meter_pressure", Dimension::Pressure);
    let temperature = m.quantity("meter_temperature", Dimension::Temperature);
    Some(Method4Data {
        impinger_gain_m3: impinger?,
        silica_gain_kg: silica?,
        meter_volume_m3: volume?,
        meter_y: y?,
        meter_pressure_pa: pressure?,
        meter_temperature_k: temperature?,
    })
}
