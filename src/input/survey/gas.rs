//! `[gas]`: pressures, dry composition, moisture (one of its forms, `[gas.method4]` among them)
//! and the temperature used where readings have none; and the same keys in a `[[run]]`, which
//! replace `[gas]` for that run. Values no stack or duct can have are refused against
//! `crate::plausibility`.

use crate::input::toml_doc::{Field, Table};
use crate::plausibility as range;
use crate::survey::{DryGas, DryOverride, Gas, Method4Data, Moisture, RunConditions};
use crate::units::Dimension;

/// Barometric pressures outside this range (Pa) are typing errors, not weather.
const BAROMETRIC_RANGE_PA: std::ops::RangeInclusive<f64> = 50_000.0..=120_000.0;

/// The ways a moisture content can be given; a table gives at most one.
pub const MOISTURE_KEYS: [&str; 5] = ["moisture", "method4", "rh", "wet_bulb", "dew_point"];

/// Reads `[gas]`.
pub fn read_gas(t: &Table) -> Option<Gas> {
    let barometric_pa = read_barometric(t);
    let static_pa = read_static(t).unwrap_or(0.0);
    let dry = read_dry_gas(t);
    let moisture = read_moisture(t);
    let temperature_k = read_temperature(t);
    Some(Gas {
        barometric_pa: barometric_pa?,
        static_pa,
        dry: dry?,
        moisture: moisture?,
        temperature_k,
    })
}

/// The conditions a `[[run]]` gives in place of `[gas]` (the same keys, each optional); `None`
/// after a recorded problem.
pub fn read_run_conditions(t: &Table) -> Option<RunConditions> {
    let barometric_pa = match t.get("barometric") {
        Some(f) => Some(barometric(&f)?),
        None => None,
    };
    let static_pa = read_static(t);
    let temperature_k = read_temperature(t);
    let dry = read_dry_override(t)?;
    let moisture = match MOISTURE_KEYS.iter().any(|k| t.peek(k).is_some()) {
        true => Some(read_moisture(t)?),
        false => {
            t.allow(&MOISTURE_KEYS);
            None
        }
    };
    let bad = (t.peek("static").is_some() && static_pa.is_none())
        || (t.peek("temperature").is_some() && temperature_k.is_none());
    (!bad).then_some(RunConditions {
        barometric_pa,
        static_pa,
        temperature_k,
        dry,
        moisture,
    })
}

/// The keys a `[[run]]` may give in place of `[gas]`.
pub const RUN_CONDITION_KEYS: [&str; 13] = [
    "barometric",
    "static",
    "temperature",
    "o2",
    "co2",
    "co",
    "ar",
    "dry_molar_mass",
    "moisture",
    "method4",
    "rh",
    "wet_bulb",
    "dew_point",
];

fn read_static(t: &Table) -> Option<f64> {
    let f = t.get("static")?;
    let pa = f.quantity_like(Dimension::Pressure, "-0.85 inH2O")?;
    f.within(pa, range::STATIC_PRESSURE)
}

fn read_temperature(t: &Table) -> Option<f64> {
    t.opt_quantity_in(
        "temperature",
        Dimension::Temperature,
        range::GAS_TEMPERATURE,
    )
}

/// A run's dry-gas keys: `Some(None)` when it gives none, `None` after a recorded problem.
fn read_dry_override(t: &Table) -> Option<Option<DryOverride>> {
    let keys = ["o2", "co2", "co", "ar", "dry_molar_mass"];
    if !keys.iter().any(|k| t.peek(k).is_some()) {
        t.allow(&keys);
        return Some(None);
    }
    let md = match t.get("dry_molar_mass") {
        Some(f) => Some(dry_molar_mass(&f)?),
        None => None,
    };
    let o2 = read_o2(t);
    let d = DryOverride {
        o2,
        co2: t.opt_fraction("co2"),
        co: t.opt_fraction("co"),
        ar: t.opt_fraction("ar"),
        dry_molar_mass: md,
    };
    let failed = [("o2", d.o2), ("co2", d.co2), ("co", d.co), ("ar", d.ar)]
        .iter()
        .any(|(k, v)| t.peek(k).is_some() && v.is_none());
    (!failed).then_some(Some(d))
}

/// O2 of the dry gas: a fraction no higher than air's 20.9 %.
fn read_o2(t: &Table) -> Option<f64> {
    let x = t.opt_fraction("o2")?;
    match range::O2_FRACTION.check(x) {
        Ok(x) => Some(x),
        Err(e) => {
            t.error_at(
                "o2",
                format!("`{}` = `{}`: {e}", t.key_path("o2"), pct_text(t, "o2")),
                Some("O2 is the dry-basis percentage the analyser reads, e.g. \"8.1 %\"".into()),
            );
            None
        }
    }
}

fn pct_text(t: &Table, key: &'static str) -> String {
    t.peek(key)
        .map(crate::input::toml_doc::value_text)
        .unwrap_or_default()
}

fn dry_molar_mass(f: &Field) -> Option<f64> {
    let g_mol = match f.value {
        crate::input::toml_doc::Value::String(_) => f.quantity(Dimension::MolarMass),
        _ => f.number(),
    }?;
    f.within(g_mol, range::DRY_MOLAR_MASS)
}

fn read_barometric(t: &Table) -> Option<f64> {
    let f = t.required("barometric", "\"29.92 inHg\"")?;
    barometric(&f)
}

/// A barometric pressure: absolute, 50 to 120 kPa.
fn barometric(f: &Field) -> Option<f64> {
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
        let g_mol = dry_molar_mass(&f)?;
        return Some(DryGas::MolarMass { g_mol });
    }
    if !composition.contains(&true) {
        return Some(DryGas::Air);
    }
    if t.peek("o2").is_some() && read_o2(t).is_none() {
        return None;
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
        Some("moisture") => {
            let bws = t.opt_fraction("moisture")?;
            if bws >= 1.0 {
                t.error_at(
                    "moisture",
                    format!(
                        "`{}` = `{}` leaves no dry gas",
                        t.key_path("moisture"),
                        pct_text(t, "moisture")
                    ),
                    Some(
                        "moisture is the water vapour share of the wet gas, e.g. \"9.8 %\"".into(),
                    ),
                );
                return None;
            }
            Some(Moisture::Fraction { bws })
        }
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

/// Reads an EPA Method 4 train (`[gas.method4]` or `[run.method4]`): the impinger gain as a volume
/// (mL) or a weighed mass (g), the silica-gel gain, the meter volume as read (ft³, dcf, m³, L), Y,
/// the meter pressure as absolute (`meter_pressure`) or as the orifice ΔH (`meter_dh`, added to
/// the barometric pressure) and the meter temperature; each within what a train can record.
pub fn read_method4(m: &Table) -> Option<Method4Data> {
    use crate::gas::{ImpingerGain, MeterPressure};
    let impinger = m.required("impinger_gain", "\"152.3 g\"").and_then(|f| {
        let text = f.str()?;
        // a volume read off the impingers, or their weighed gain
        if let Ok(m3) = crate::units::parse_quantity(text, Dimension::Volume) {
            f.within(m3 * 1000.0, range::TRAIN_GAIN)
                .map(|_| ImpingerGain::Volume { m3 })
        } else if let Ok(kg) = crate::units::parse_quantity(text, Dimension::Mass) {
            f.within(kg, range::TRAIN_GAIN)
                .map(|kg| ImpingerGain::Mass { kg })
        } else {
            let e = crate::units::parse_quantity(text, Dimension::Volume).unwrap_err();
            f.error(
                format!("`{}`: {e}", f.path()),
                Some(
                    "give the impinger gain as a volume (\"152 mL\") or a weight (\"152.3 g\")"
                        .into(),
                ),
            );
            None
        }
    });
    let silica = m.quantity_in("silica_gain", Dimension::Mass, range::TRAIN_GAIN);
    let volume = m.quantity_in("meter_volume", Dimension::Volume, range::METER_VOLUME);
    let y = m
        .required("meter_y", "1.002")
        .and_then(|f| f.number().and_then(|y| f.within(y, range::METER_Y)));
    let pressure = match (m.get("meter_pressure"), m.get("meter_dh")) {
        (Some(f), None) => f
            .quantity_in(Dimension::Pressure, range::METER_PRESSURE)
            .map(|pa| MeterPressure::Absolute { pa }),
        // an orifice ΔH is a few inches of water, not a barometric pressure: the hint says so
        (None, Some(f)) => f
            .quantity_like(Dimension::Pressure, "1.85 inH2O")
            .and_then(|pa| f.within(pa, range::ORIFICE_DH))
            .map(|pa| MeterPressure::OrificeDh { pa }),
        (Some(f), Some(_)) => {
            f.error(
                format!("{} gives both `meter_pressure` and `meter_dh`", m.name()),
                Some("keep meter_pressure (absolute) or meter_dh (orifice ΔH, added to the barometric pressure)".into()),
            );
            None
        }
        (None, None) => {
            m.doc().error(
                m.span(),
                m.path(),
                format!("{} needs the pressure at the meter", m.name()),
                Some("add meter_dh = \"1.85 inH2O\" (orifice ΔH) or meter_pressure = \"29.55 inHg\" (absolute)".into()),
            );
            None
        }
    };
    let temperature = m.quantity_in(
        "meter_temperature",
        Dimension::Temperature,
        range::METER_TEMPERATURE,
    );
    Some(Method4Data {
        impinger_gain: impinger?,
        silica_gain_kg: silica?,
        meter_volume_m3: volume?,
        meter_y: y?,
        meter_pressure: pressure?,
        meter_temperature_k: temperature?,
    })
}
