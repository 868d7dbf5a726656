//! Plausibility ranges: the values no measurement of a duct or stack can take, as data with their
//! reason. The input layer refuses a value outside its range (exit 1) before anything is computed,
//! so no result can be infinite, NaN, or built on a unit slip of a factor of a thousand; softer
//! "typical range" rules are acceptance checks (`checks::plausibility`) that warn.
//!
//! Pure data and one comparison: no files, no printing.

use std::fmt;

/// A closed range of SI values a quantity must lie in, with why.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Range {
    /// What the value is, in words (`"duct diameter"`).
    pub what: &'static str,
    pub min: f64,
    pub max: f64,
    /// The SI unit of `min` and `max`, for messages.
    pub unit: &'static str,
    /// Why the limits are where they are.
    pub reason: &'static str,
}

/// Why a value was refused.
#[derive(Debug, Clone, PartialEq)]
pub struct OutOfRange {
    pub range: Range,
    pub value: f64,
}

impl OutOfRange {
    /// The refusal in words with the range's bounds in `unit` (the unit the value was written
    /// in, so an inch-pound job reads inches), or in SI when `unit` is `None` or of another
    /// dimension than the range.
    pub fn words_in(&self, unit: Option<&crate::units::Unit>) -> String {
        if !self.value.is_finite() {
            return format!("{} must be a finite number", self.range.what);
        }
        let num = crate::checks::num;
        let si = format!(
            "{} {u} to {} {u}",
            num(self.range.min),
            num(self.range.max),
            u = self.range.unit
        );
        // the bounds in the writer's own unit first, SI beside them
        let bounds = match (unit, crate::units::lookup_unit(self.range.unit)) {
            (Some(u), Some(base)) if u.dimension == base.dimension && u.symbol != base.symbol => {
                format!(
                    "{} {s} to {} {s}, that is {si}",
                    crate::display::significant(crate::units::convert_out(self.range.min, u), 4),
                    crate::display::significant(crate::units::convert_out(self.range.max, u), 4),
                    s = u.symbol
                )
            }
            _ => si,
        };
        format!(
            "{} is outside what can be measured ({bounds}: {})",
            self.range.what, self.range.reason,
        )
    }
}

impl fmt::Display for OutOfRange {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.words_in(None))
    }
}

impl Range {
    /// `Ok(value)` when finite and within the range.
    pub fn check(&self, value: f64) -> Result<f64, OutOfRange> {
        if value.is_finite() && value >= self.min && value <= self.max {
            Ok(value)
        } else {
            Err(OutOfRange {
                range: *self,
                value,
            })
        }
    }
}

const fn range(
    what: &'static str,
    min: f64,
    max: f64,
    unit: &'static str,
    reason: &'static str,
) -> Range {
    Range {
        what,
        min,
        max,
        unit,
        reason,
    }
}

/// Inside dimensions of a duct or stack: 5 mm to 100 m (no traversed duct is smaller than a
/// pitot's tip spacing or larger than the widest stacks, about 15 m; common practice).
pub const DUCT_DIMENSION: Range = range(
    "an inside dimension",
    0.005,
    100.0,
    "m",
    "a duct or stack is between a pitot's width and 100 m across",
);
/// Port nipple and wall: 0 to 5 m (common practice).
pub const PORT_LENGTH: Range = range(
    "the port length",
    0.0,
    5.0,
    "m",
    "a port nipple and wall are less than 5 m long",
);
/// A probe's usable length: 0.1 to 30 m (common practice: the longest stack probes are about 20 m).
pub const PROBE_LENGTH: Range = range(
    "the probe length",
    0.1,
    30.0,
    "m",
    "probes are between 10 cm and 30 m long",
);
/// Duct static (gauge) pressure: ±50 kPa (about ±200 inH2O; fans and stacks stay far inside it;
/// common practice).
pub const STATIC_PRESSURE: Range = range(
    "the static pressure",
    -50_000.0,
    50_000.0,
    "Pa",
    "duct static pressures are within ±50 kPa (±200 inH2O)",
);
/// Gas temperature: −100 °C to 2000 °C (common practice: beyond either, no pitot traverse is made).
pub const GAS_TEMPERATURE: Range = range(
    "the gas temperature",
    173.15,
    2273.15,
    "K",
    "gas traversed with a pitot is between −100 °C and 2000 °C",
);
/// One velocity-pressure reading: ±25 kPa (about ±100 inH2O, a velocity near 200 m/s in air; a
/// reading past it is a slipped decimal point; common practice).
pub const VELOCITY_PRESSURE: Range = range(
    "the velocity pressure",
    -25_000.0,
    25_000.0,
    "Pa",
    "pitot readings in ducts and stacks stay within ±25 kPa (±100 inH2O)",
);
/// Dry molar mass: 2 to 100 g/mol (from hydrogen to the heaviest process gases).
pub const DRY_MOLAR_MASS: Range = range(
    "the dry molar mass",
    2.0,
    100.0,
    "g/mol",
    "a gas mixture's molar mass lies between hydrogen's and 100 g/mol",
);
/// Oxygen in the dry gas: 0 to 20.9 % (ambient air; combustion only consumes it).
pub const O2_FRACTION: Range = range(
    "O2",
    0.0,
    0.209,
    "(fraction)",
    "no flue gas or air holds more oxygen than air's 20.9 %",
);
/// Method 4 dry gas meter volume: 1 L to 50 m³ (common practice: trains meter 0.5 to 5 m³).
pub const METER_VOLUME: Range = range(
    "the meter volume",
    0.001,
    50.0,
    "m3",
    "a moisture train meters between 1 L and 50 m³",
);
/// Method 4 gains (impingers, silica gel): 0 to 5 kg (common practice).
pub const TRAIN_GAIN: Range = range(
    "a moisture-train gain",
    0.0,
    5.0,
    "kg",
    "impinger and silica-gel gains are below 5 kg (5 L)",
);
/// Dry gas meter Y: 0.5 to 1.5 (a calibrated meter reads within a few percent of true; Y far
/// from 1 is a typing slip; common practice).
pub const METER_Y: Range = range(
    "the meter Y",
    0.5,
    1.5,
    "(ratio)",
    "a dry gas meter's calibration factor is close to 1",
);
/// Orifice ΔH: 0 to 25 kPa (about 100 inH2O; common practice).
pub const ORIFICE_DH: Range = range(
    "the orifice ΔH",
    0.0,
    25_000.0,
    "Pa",
    "an orifice meter's ΔH is below 25 kPa (100 inH2O)",
);
/// Meter absolute pressure: 30 to 150 kPa (common practice).
pub const METER_PRESSURE: Range = range(
    "the meter pressure",
    30_000.0,
    150_000.0,
    "Pa",
    "a dry gas meter works near atmospheric pressure",
);
/// Meter temperature: −40 °C to 100 °C (common practice: the meter box is near ambient).
pub const METER_TEMPERATURE: Range = range(
    "the meter temperature",
    233.15,
    373.15,
    "K",
    "a dry gas meter is near ambient temperature",
);

/// A design flow: 0.1 L/s to 100 000 m³/s (from a small terminal to the largest stacks; common
/// practice). Keeps a percent of design finite.
pub const DESIGN_FLOW: Range = range(
    "the design flow",
    1e-4,
    1e5,
    "m3/s",
    "design flows lie between a small terminal's and the largest stack's",
);
/// Reference (standard or normal) temperature: −50 °C to 100 °C (the rule books use 0 to 25 °C;
/// common practice).
pub const REFERENCE_TEMPERATURE: Range = range(
    "the reference temperature",
    223.15,
    373.15,
    "K",
    "reference conditions are near 0 to 25 °C",
);
/// Reference pressure: 50 to 120 kPa (the rule books use 101.3 kPa; common practice).
pub const REFERENCE_PRESSURE: Range = range(
    "the reference pressure",
    50_000.0,
    120_000.0,
    "Pa",
    "reference conditions are near one atmosphere",
);

#[cfg(test)]
mod tests {
    #[test]
    fn the_bounds_are_shown_in_the_unit_the_value_was_written_in() {
        let inch = crate::units::lookup_unit("in").unwrap();
        let e = DUCT_DIMENSION.check(1e-4).unwrap_err();
        // 0.005 m / 0.0254 m per inch (exact) = 0.19685 in; 100 m = 3937.0 in
        assert_eq!(
            e.words_in(Some(inch)),
            "an inside dimension is outside what can be measured (0.1969 in to 3937 in, that is \
             0.005 m to 100 m: a duct or stack is between a pitot's width and 100 m across)"
        );
        // a temperature keeps its offset: 173.15 K = −148 °F, 2273.15 K = 3632 °F
        let f = crate::units::lookup_unit("F").unwrap();
        let t = GAS_TEMPERATURE.check(5000.0).unwrap_err().words_in(Some(f));
        assert!(
            t.contains("(−148 F to 3632 F, that is 173.15 K to 2273.2 K"),
            "{t}"
        );
        // no unit, or one of another dimension: SI only
        let pa = VELOCITY_PRESSURE.check(1e9).unwrap_err();
        assert_eq!(pa.words_in(Some(inch)), pa.words_in(None));
        assert!(!pa.words_in(None).contains("that is"));
    }

    use super::*;

    #[test]
    fn each_range_passes_inside_and_refuses_outside_and_non_finite() {
        for r in [
            DUCT_DIMENSION,
            PORT_LENGTH,
            PROBE_LENGTH,
            STATIC_PRESSURE,
            GAS_TEMPERATURE,
            VELOCITY_PRESSURE,
            DRY_MOLAR_MASS,
            O2_FRACTION,
            METER_VOLUME,
            TRAIN_GAIN,
            METER_Y,
            ORIFICE_DH,
            METER_PRESSURE,
            METER_TEMPERATURE,
            DESIGN_FLOW,
            REFERENCE_TEMPERATURE,
            REFERENCE_PRESSURE,
        ] {
            let mid = (r.min + r.max) / 2.0;
            assert_eq!(r.check(mid), Ok(mid), "{}", r.what);
            assert!(r.check(r.max * 1.01 + 1e-9).is_err(), "{}", r.what);
            assert!(r.check(f64::NAN).is_err(), "{}", r.what);
            assert!(r.check(f64::INFINITY).is_err(), "{}", r.what);
            assert!(r.min < r.max && !r.reason.is_empty());
        }
        // "1e308 in" is finite but absurd
        assert!(DUCT_DIMENSION.check(1e308 * 0.0254).is_err());
        // O2 42 % is refused, 20.9 % accepted
        assert!(O2_FRACTION.check(0.42).is_err());
        assert!(O2_FRACTION.check(0.209).is_ok());
        // a Δp of 464 inH2O (0.464 with a slipped point) is refused
        assert!(VELOCITY_PRESSURE.check(464.0 * 249.08891).is_err());
        assert!(VELOCITY_PRESSURE.check(0.464 * 249.08891).is_ok());
        let e = O2_FRACTION.check(0.42).unwrap_err();
        assert!(e.to_string().contains("20.9 %"), "{e}");
        assert!(DUCT_DIMENSION
            .check(f64::INFINITY)
            .unwrap_err()
            .to_string()
            .contains("finite"));
    }
}
