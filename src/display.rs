//! The display table: in which unit, with which symbol and how many decimals every kind of quantity
//! is shown, for each unit system. One table, asked by every screen, CSV, check message, report,
//! certificate, field sheet and `init`, so a job read in inches of water is shown in inches of water
//! everywhere.
//!
//! Owns the choice of display units and the number formatting rules (true minus, no negative zero,
//! thousands grouping). Must not convert for calculation: values stay SI inside the program and are
//! converted here only to be printed. Conversion factors come from the unit table in
//! [`crate::units`]; this module only chooses among its symbols.
//!
//! The unit system comes from the convention ([`UnitSystem::of`]; a computed job's own table is
//! `flow::Convention::display_table`) unless the user overrides it
//! (`--si`, `--units`). Flow labels also depend on the convention: an EPA job speaks of dscfm, an
//! HVAC job of scfm of standard air, an EN ISO 16911 job of m³/h at normal conditions.

mod text;

pub use crate::wording::{in_unit, list, number, number_sig, percent, q, Arg, Kind, Render, Text};
pub use text::Message;

use crate::survey::ConventionId;
use crate::units::{lookup_unit, Unit};
use serde::Serialize;

/// A family of display units.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum UnitSystem {
    /// Inches, inches of water and of mercury, °F, ft/s or fpm, cfm.
    InchPound,
    /// mm, Pa, kPa, °C, m/s, m³/h.
    Si,
    /// EPA Method 2's metric form: mm of water and of mercury, °C, m/s, dscm/h.
    EpaMetric,
}

impl UnitSystem {
    pub const ALL: [UnitSystem; 3] = [UnitSystem::InchPound, UnitSystem::Si, UnitSystem::EpaMetric];

    /// The name used on the command line (`--units`) and in JSON.
    pub fn name(self) -> &'static str {
        match self {
            UnitSystem::InchPound => "inch-pound",
            UnitSystem::Si => "si",
            UnitSystem::EpaMetric => "epa-metric",
        }
    }

    pub fn parse(text: &str) -> Option<UnitSystem> {
        let t = text.trim().to_ascii_lowercase();
        UnitSystem::ALL.into_iter().find(|u| u.name() == t)
    }

    /// The system a convention reads and prints in: EPA Method 2 English and hvac-ip in
    /// inch-pound units, EPA Method 2 metric in its own metric units, the others in SI.
    pub fn of(convention: ConventionId, epa_metric: bool) -> UnitSystem {
        match convention {
            ConventionId::EpaMethod2 if epa_metric => UnitSystem::EpaMetric,
            ConventionId::EpaMethod2 | ConventionId::HvacIp => UnitSystem::InchPound,
            ConventionId::Iso16911 | ConventionId::HvacSi => UnitSystem::Si,
        }
    }

    pub fn is_inch_pound(self) -> bool {
        self == UnitSystem::InchPound
    }
}

/// How one kind of quantity is shown.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Shown {
    /// The symbol as printed on screens and pages (`inH2O`, `°F`, `ft²`, `m³/h`).
    pub symbol: &'static str,
    /// The same unit as the input parser accepts it, for CSV headers (`inH2O`, `F`, `ft2`,
    /// `m3/h`). Every `ascii` symbol is in the unit table, so what is printed can be read back.
    pub ascii: &'static str,
    /// Decimals printed by default.
    pub decimals: usize,
    /// Words naming the quantity where the unit alone does not (flows: "dry standard flow").
    pub label: &'static str,
    /// Relative to SI: `shown = si · factor + offset` (°F and °C have offsets).
    factor: f64,
    offset: f64,
}

impl Shown {
    fn new(
        symbol: &'static str,
        ascii: &'static str,
        decimals: usize,
        label: &'static str,
    ) -> Shown {
        // `ascii` symbols are literals of this file, checked by the tests against the unit
        // table; a miss would be a programming error caught there.
        let (factor, offset) = match ascii {
            "1" => (1.0, 0.0),
            "%" => (100.0, 0.0),
            "g/mol" | "lb/lb-mol" => (1.0, 0.0),
            other => match lookup_unit(other) {
                Some(Unit { factor, offset, .. }) => (1.0 / factor, -offset / factor),
                None => (f64::NAN, 0.0),
            },
        };
        Shown {
            symbol,
            ascii,
            decimals,
            label,
            factor,
            offset,
        }
    }

    /// An SI value in this unit.
    pub fn value(&self, si: f64) -> f64 {
        si * self.factor + self.offset
    }

    /// An SI difference (a spread, an uncertainty) in this unit: no offset.
    pub fn difference(&self, si: f64) -> f64 {
        si * self.factor
    }

    /// The number alone, with the default decimals (`0.464`).
    pub fn number(&self, si: f64) -> String {
        fixed(self.value(si), self.decimals)
    }

    /// The number alone with `decimals` places.
    pub fn number_with(&self, si: f64, decimals: usize) -> String {
        fixed(self.value(si), decimals)
    }

    /// The number with thousands grouped (`93,249`), for flows on pages.
    pub fn grouped(&self, si: f64) -> String {
        grouped(self.value(si), self.decimals)
    }

    /// Number and unit (`0.464 inH2O`, `301.2 °F`, `12 %`).
    pub fn format(&self, si: f64) -> String {
        self.with_unit(self.number(si))
    }

    /// Number (to `sig` significant figures, at least the unit's decimals' worth of sense) and
    /// unit, for check messages that quote a measured value (`0.0512 inH2O`).
    pub fn format_sig(&self, si: f64, sig: usize) -> String {
        self.with_unit(significant(self.value(si), sig))
    }

    /// The number for a CSV cell: three decimals more than the screen shows, trailing zeros
    /// dropped, an ASCII minus (machines read CSV), empty for a non-finite value.
    pub fn csv(&self, si: f64) -> String {
        let v = self.value(si);
        if !v.is_finite() {
            return String::new();
        }
        let s = format!("{v:.*}", self.decimals + 3);
        let s = if s.contains('.') {
            s.trim_end_matches('0').trim_end_matches('.')
        } else {
            &s
        };
        match s {
            "-0" => "0".to_string(),
            other => other.to_string(),
        }
    }

    /// The value as a survey file writes it (`29.62 inHg`, `-0.85 inH2O`, `1500 mm`): the
    /// table's decimals without trailing zeros, an ASCII minus and the parseable symbol.
    pub fn input(&self, si: f64) -> String {
        let v = self.value(si);
        let s = format!("{v:.*}", self.decimals);
        let s = if s.contains('.') {
            s.trim_end_matches('0').trim_end_matches('.')
        } else {
            &s
        };
        let s = if s == "-0" { "0" } else { s };
        match self.ascii {
            "1" => s.to_string(),
            unit => format!("{s} {unit}"),
        }
    }

    /// A header cell for CSV (`dp[inH2O]`): the name and the parseable symbol.
    pub fn header(&self, name: &str) -> String {
        format!("{name}[{}]", self.ascii)
    }

    /// `text` followed by the printed symbol with the spacing the symbol wants (`12 %`,
    /// `45°`, `301.2 °F`).
    pub fn with_unit(&self, text: String) -> String {
        match self.symbol {
            "" => text,
            "°" => format!("{text}°"),
            s => format!("{text} {s}"),
        }
    }
}

/// The display table of one job: its unit system and its convention.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DisplayTable {
    pub system: UnitSystem,
    pub convention: ConventionId,
    /// The convention's reference conditions were overridden by the survey (flows at reference
    /// conditions are then not "normal" or "standard" in the usual sense).
    pub reference_overridden: bool,
}

impl DisplayTable {
    /// The table a convention implies, or the one the user asked for.
    pub fn new(convention: ConventionId, system: UnitSystem) -> DisplayTable {
        DisplayTable {
            system,
            convention,
            reference_overridden: false,
        }
    }

    /// Marks the reference conditions as the survey's own.
    pub fn with_reference_overridden(mut self, overridden: bool) -> DisplayTable {
        self.reference_overridden = overridden;
        self
    }

    /// How `kind` is shown in this job.
    pub fn get(&self, kind: Kind) -> Shown {
        use UnitSystem::*;
        let s = Shown::new;
        let hvac = self.convention.is_hvac();
        match (kind, self.system) {
            (Kind::Length, InchPound) => s("in", "in", 2, "length"),
            (Kind::Length, _) => s("mm", "mm", 0, "length"),
            (Kind::Position, InchPound) => s("in", "in", 3, "position"),
            (Kind::Position, _) => s("mm", "mm", 1, "position"),
            (Kind::Diameters, _) => s("D", "D", 1, "straight run"),
            (Kind::Area, InchPound) => s("ft²", "ft2", 4, "area"),
            (Kind::Area, _) => s("m²", "m2", 4, "area"),
            (Kind::VelocityPressure, InchPound) => s("inH2O", "inH2O", 3, "velocity pressure"),
            (Kind::VelocityPressure, Si) => s("Pa", "Pa", 1, "velocity pressure"),
            (Kind::VelocityPressure, EpaMetric) => s("mmH2O", "mmH2O", 2, "velocity pressure"),
            (Kind::StaticPressure, InchPound) => s("inH2O", "inH2O", 2, "static pressure"),
            (Kind::StaticPressure, Si) => s("Pa", "Pa", 0, "static pressure"),
            (Kind::StaticPressure, EpaMetric) => s("mmH2O", "mmH2O", 1, "static pressure"),
            (Kind::OrificePressure, InchPound) => s("inH2O", "inH2O", 2, "orifice pressure"),
            (Kind::OrificePressure, Si) => s("Pa", "Pa", 0, "orifice pressure"),
            (Kind::OrificePressure, EpaMetric) => s("mmH2O", "mmH2O", 1, "orifice pressure"),
            (Kind::Barometric, InchPound) => s("inHg", "inHg", 2, "barometric pressure"),
            (Kind::Barometric, Si) => s("kPa", "kPa", 2, "barometric pressure"),
            (Kind::Barometric, EpaMetric) => s("mmHg", "mmHg", 1, "barometric pressure"),
            (Kind::AbsolutePressure, InchPound) => s("inHg", "inHg", 3, "absolute pressure"),
            (Kind::AbsolutePressure, Si) => s("kPa", "kPa", 3, "absolute pressure"),
            (Kind::AbsolutePressure, EpaMetric) => s("mmHg", "mmHg", 1, "absolute pressure"),
            (Kind::Temperature, InchPound) => s("°F", "F", 1, "temperature"),
            (Kind::Temperature, _) => s("°C", "C", 1, "temperature"),
            (Kind::TemperatureDifference, InchPound) => s("°F", "R", 1, "temperature difference"),
            (Kind::TemperatureDifference, _) => s("K", "K", 1, "temperature difference"),
            (Kind::Velocity, InchPound) if hvac => s("fpm", "fpm", 0, "velocity"),
            (Kind::Velocity, InchPound) => s("ft/s", "ft/s", 2, "velocity"),
            (Kind::Velocity, _) if hvac => s("m/s", "m/s", 2, "velocity"),
            (Kind::Velocity, _) => s("m/s", "m/s", 2, "velocity"),
            (Kind::ActualFlow | Kind::StandardFlow | Kind::DryStandardFlow, _) => self.flow(kind),
            (Kind::MassFlow, InchPound) if hvac => s("lb/min", "lb/min", 1, "mass flow"),
            (Kind::MassFlow, InchPound) => s("lb/h", "lb/h", 0, "mass flow"),
            (Kind::MassFlow, _) if hvac => s("kg/s", "kg/s", 3, "mass flow"),
            (Kind::MassFlow, _) => s("kg/h", "kg/h", 0, "mass flow"),
            (Kind::Density, InchPound) => s("lb/ft³", "lb/ft3", 4, "density"),
            (Kind::Density, _) => s("kg/m³", "kg/m3", 3, "density"),
            (Kind::MolarMass, InchPound) => s("lb/lb-mol", "lb/lb-mol", 2, "molar mass"),
            (Kind::MolarMass, _) => s("g/mol", "g/mol", 2, "molar mass"),
            (Kind::Percent, _) => s("%", "%", 1, "percent"),
            (Kind::Angle, _) => s("°", "deg", 0, "angle"),
            (Kind::LiquidVolume, _) => s("mL", "mL", 1, "condensed water"),
            (Kind::Mass, _) => s("g", "g", 1, "mass"),
            (Kind::GasVolume, InchPound) => s("ft³", "ft3", 3, "gas volume"),
            (Kind::GasVolume, _) => s("m³", "m3", 4, "gas volume"),
            (Kind::NormalFlow, _) => s("Nm³/h", "Nm3/h", 0, "normal flow, wet"),
            (Kind::NormalDryFlow, _) => s("dNm³/h", "dNm3/h", 0, "normal flow, dry"),
            (Kind::FanSpeed, _) => s("rpm", "rpm", 0, "fan speed"),
            (Kind::Current, _) => s("A", "A", 1, "motor current"),
            (Kind::Power, InchPound) => s("hp", "hp", 2, "power"),
            (Kind::Power, _) => s("kW", "kW", 2, "power"),
        }
    }

    /// Flows: the unit names the basis the way the job's trade writes it.
    fn flow(&self, kind: Kind) -> Shown {
        use UnitSystem::*;
        let s = Shown::new;
        let hvac = self.convention.is_hvac();
        let iso = self.convention == ConventionId::Iso16911;
        let ov = self.reference_overridden;
        match (kind, self.system) {
            (Kind::ActualFlow, InchPound) => s("acfm", "acfm", 0, "actual flow"),
            (Kind::ActualFlow, _) => s("m³/h", "m3/h", 0, "actual flow"),
            // HVAC: standard air by density (0.075 lb/ft³ or 1.2 kg/m³).
            (Kind::StandardFlow, InchPound) if hvac => s("scfm", "scfm", 0, "standard air flow"),
            (Kind::DryStandardFlow, InchPound) if hvac => {
                s("scfm", "scfm", 0, "standard air flow, dry air")
            }
            (Kind::StandardFlow, _) if hvac => s("m³/h", "m3/h", 0, "standard air flow"),
            (Kind::DryStandardFlow, _) if hvac => {
                s("m³/h", "m3/h", 0, "standard air flow, dry air")
            }
            (Kind::StandardFlow, InchPound) => s("wscfm", "wscfm", 0, "wet standard flow"),
            (Kind::DryStandardFlow, InchPound) => s("dscfm", "dscfm", 0, "dry standard flow"),
            (Kind::StandardFlow, EpaMetric) => s("wscm/h", "wscm/h", 0, "wet standard flow"),
            (Kind::DryStandardFlow, EpaMetric) => s("dscm/h", "dscm/h", 0, "dry standard flow"),
            (Kind::StandardFlow, _) if iso && !ov => s("Nm³/h", "Nm3/h", 0, "normal flow, wet"),
            (Kind::DryStandardFlow, _) if iso && !ov => {
                s("dNm³/h", "dNm3/h", 0, "normal flow, dry")
            }
            (Kind::StandardFlow, _) => s("m³/h", "m3/h", 0, "standard flow, wet"),
            (Kind::DryStandardFlow, _) => s("m³/h", "m3/h", 0, "standard flow, dry"),
            _ => unreachable!("flow() is called for flow kinds only"),
        }
    }

    /// How running text (a check message, a rule) quotes a value: significant figures rather
    /// than fixed decimals, so `2.016 in`, `0.05 inH2O`, `4.5833°`, `8.5 D`, `12.5 %`;
    /// temperatures keep the table's decimals (`299.0 °F`).
    pub fn quote(&self, kind: Kind, si: f64) -> String {
        let sh = self.get(kind);
        // an area under a square foot reads in square inches (Method 1's 113 in²)
        const SQUARE_FOOT_M2: f64 = 0.09290304;
        if kind == Kind::Area && self.system.is_inch_pound() && si.abs() < SQUARE_FOOT_M2 {
            return Shown::new("in²", "in2", 2, "area").format_sig(si, 4);
        }
        match kind {
            Kind::Temperature => sh.format(si),
            Kind::Angle => sh.format_sig(si, 5),
            Kind::Diameters => sh.format_sig(si, 3),
            _ => sh.format_sig(si, 4),
        }
    }

    /// The column heading of a flow (`Q [acfm]`, `Q std dry [m³/h]`): the unit alone where it
    /// names the basis, else a qualifier in front, so the three flows of a table never share a
    /// heading. An actual flow is never qualified (`m³/h` and `cfm` are actual by default), nor
    /// a standard flow whose unit differs from the actual one (`scfm` is standard air).
    pub fn flow_heading(&self, kind: Kind) -> String {
        let symbol = |k| self.get(k).symbol;
        let hvac = self.convention.is_hvac();
        let qualifier = match kind {
            Kind::StandardFlow if symbol(kind) == symbol(Kind::ActualFlow) => {
                if hvac {
                    " std air"
                } else {
                    " std wet"
                }
            }
            Kind::DryStandardFlow
                if symbol(kind) == symbol(Kind::ActualFlow)
                    || symbol(kind) == symbol(Kind::StandardFlow) =>
            {
                if hvac && symbol(Kind::StandardFlow) != symbol(Kind::ActualFlow) {
                    " dry air"
                } else if hvac {
                    " std dry air"
                } else {
                    " std dry"
                }
            }
            _ => "",
        };
        format!("Q{qualifier} [{}]", symbol(kind))
    }

    /// The reference conditions in this table's units (`68.3 °F, 29.920 inHg`).
    pub fn reference(&self, temperature_k: f64, pressure_pa: f64) -> String {
        format!(
            "{}, {}",
            self.format(Kind::Temperature, temperature_k),
            self.format(Kind::AbsolutePressure, pressure_pa)
        )
    }

    /// The step a test-and-balance report rounds `kind` to, in the shown unit, or `None` where
    /// the table's decimals already are the rule. Common practice (TAB reports): airflow to the
    /// nearest 5 cfm (5 m³/h), duct velocities to the nearest 5 fpm (0.05 m/s); instruments
    /// read flow to a few percent, and finer figures suggest a precision the test does not have.
    /// Only HVAC jobs round this way.
    pub fn tab_step(&self, kind: Kind) -> Option<f64> {
        if !self.convention.is_hvac() {
            return None;
        }
        let ip = self.system.is_inch_pound();
        match kind {
            k if k.is_flow() => Some(5.0),
            Kind::Velocity if ip => Some(5.0),
            Kind::Velocity => Some(0.05),
            _ => None,
        }
    }

    /// The number as a test-and-balance report prints it: rounded to [`DisplayTable::tab_step`],
    /// flows grouped in thousands (`8,015`), velocities not (`1090`).
    pub fn tab_number(&self, kind: Kind, si: f64) -> String {
        let shown = self.get(kind);
        let (value, decimals) = match self.tab_step(kind) {
            Some(step) => (
                (shown.value(si) / step).round() * step,
                if step >= 1.0 { 0 } else { shown.decimals },
            ),
            None => (shown.value(si), shown.decimals),
        };
        if kind.is_flow() {
            grouped(value, decimals)
        } else {
            fixed(value, decimals)
        }
    }

    /// [`DisplayTable::tab_number`] with the unit (`8,015 acfm`).
    pub fn tab_format(&self, kind: Kind, si: f64) -> String {
        let shown = self.get(kind);
        shown.with_unit(self.tab_number(kind, si))
    }

    /// Shorthand: `get(kind).format(si)`.
    pub fn format(&self, kind: Kind, si: f64) -> String {
        self.get(kind).format(si)
    }

    /// Shorthand: `get(kind).number(si)`.
    pub fn number(&self, kind: Kind, si: f64) -> String {
        self.get(kind).number(si)
    }

    /// The same quantity in SI, for a page that shows SI beside the job's units.
    pub fn si(&self) -> DisplayTable {
        DisplayTable {
            system: UnitSystem::Si,
            ..*self
        }
    }
}

/// Fixed decimals, with a true minus sign and no negative zero; never `inf` or `NaN` (a
/// non-finite value prints as an em dash: it is a bug upstream, but a page must not show it).
pub fn fixed(value: f64, decimals: usize) -> String {
    if !value.is_finite() {
        return "\u{2014}".to_string();
    }
    let s = format!("{value:.decimals$}");
    if s.trim_start_matches('-')
        .chars()
        .all(|c| c == '0' || c == '.')
    {
        return s.trim_start_matches('-').to_string();
    }
    match s.strip_prefix('-') {
        Some(rest) => format!("\u{2212}{rest}"),
        None => s,
    }
}

/// Fixed decimals with thousands separated by commas.
pub fn grouped(value: f64, decimals: usize) -> String {
    if !value.is_finite() {
        return fixed(value, decimals);
    }
    let s = fixed(value.abs(), decimals);
    let (int, frac) = match s.split_once('.') {
        Some((i, f)) => (i.to_string(), format!(".{f}")),
        None => (s.clone(), String::new()),
    };
    let mut out = String::new();
    for (i, c) in int.chars().enumerate() {
        if i > 0 && (int.len() - i) % 3 == 0 {
            out.push(',');
        }
        out.push(c);
    }
    let sign = if value < 0.0 && fixed(value, decimals).starts_with('\u{2212}') {
        "\u{2212}"
    } else {
        ""
    };
    format!("{sign}{out}{frac}")
}

/// A length in inches to the nearest eighth, as a probe is marked or a tape read: `12 3/8`, `7`,
/// `1/4` (the 1/8 in marking increment is common practice on inch-scale probes). `None` when
/// `inches` is not within 0.001 in of an eighth (marks made to another step keep their decimals).
pub fn inch_eighths(inches: f64) -> Option<String> {
    let eighths = (inches * 8.0).round();
    if !inches.is_finite() || (inches - eighths / 8.0).abs() > 1e-3 {
        return None;
    }
    let sign = if eighths < 0.0 { "\u{2212}" } else { "" };
    let n = eighths.abs() as u64;
    let (whole, rest) = (n / 8, n % 8);
    // reduce k/8 to its lowest terms
    let (num, den) = match rest {
        2 | 6 => (rest / 2, 4),
        4 => (1, 2),
        r => (r, 8),
    };
    Some(match (whole, rest) {
        (w, 0) => format!("{sign}{w}"),
        (0, _) => format!("{sign}{num}/{den}"),
        (w, _) => format!("{sign}{w} {num}/{den}"),
    })
}

/// `sig` significant figures, never in exponent form, with trailing zeros of the fraction kept
/// only up to the significance asked (`0.05120` → `0.0512`).
pub fn significant(value: f64, sig: usize) -> String {
    if !value.is_finite() {
        return fixed(value, 0);
    }
    if value == 0.0 {
        return "0".to_string();
    }
    let magnitude = value.abs().log10().floor() as i64;
    let decimals = (sig as i64 - 1 - magnitude).clamp(0, 12) as usize;
    let s = fixed(value, decimals);
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::{parse_quantity, Dimension};

    fn all_tables() -> Vec<DisplayTable> {
        let mut v = Vec::new();
        for c in ConventionId::ALL {
            for s in UnitSystem::ALL {
                v.push(DisplayTable::new(c, s));
                v.push(DisplayTable::new(c, s).with_reference_overridden(true));
            }
        }
        v
    }

    /// Everything the program prints can be read back: each CSV symbol is in the unit table and
    /// converts back to the SI value it came from.
    #[test]
    fn every_shown_unit_reads_back() {
        for t in all_tables() {
            for k in Kind::ALL {
                let sh = t.get(k);
                assert!(sh.factor.is_finite(), "{:?} {:?}: {}", t, k, sh.ascii);
                if matches!(sh.ascii, "1" | "%" | "g/mol" | "lb/lb-mol") {
                    continue;
                }
                let unit = lookup_unit(sh.ascii).expect("ascii symbol in the unit table");
                let si = 1.2345;
                let dim = if k == Kind::TemperatureDifference {
                    Dimension::TemperatureDifference
                } else {
                    unit.dimension
                };
                let shown = if k == Kind::TemperatureDifference {
                    sh.difference(si)
                } else {
                    sh.value(si)
                };
                let back = parse_quantity(&format!("{shown} {}", sh.ascii), dim).unwrap();
                assert!((back - si).abs() < 1e-9, "{k:?} {}", sh.ascii);
            }
        }
    }

    #[test]
    fn a_job_read_in_inches_of_water_is_shown_in_inches_of_water() {
        let t = DisplayTable::new(ConventionId::HvacIp, UnitSystem::InchPound);
        // NIST SP 811 B.8: 1 inH2O (conventional) = 249.0889 Pa
        assert_eq!(
            t.format(Kind::VelocityPressure, 0.464 * 249.0889),
            "0.464 inH2O"
        );
        // 68 °F = 293.15 K (definition of the scales)
        assert_eq!(t.format(Kind::Temperature, 293.15), "68.0 °F");
        // 1000 fpm = 5.08 m/s (1 ft = 0.3048 m exactly)
        assert_eq!(t.format(Kind::Velocity, 5.08), "1000 fpm");
        assert_eq!(t.get(Kind::ActualFlow).symbol, "acfm");
        // 1 ft² = 0.09290304 m²
        assert_eq!(t.format(Kind::Area, 0.557_418_24), "6.0000 ft²");
        let stack = DisplayTable::new(ConventionId::EpaMethod2, UnitSystem::InchPound);
        assert_eq!(stack.get(Kind::Velocity).symbol, "ft/s");
        assert_eq!(stack.get(Kind::DryStandardFlow).symbol, "dscfm");
        // 29.92 inHg = 101320.7 Pa (NIST SP 811 B.8 conventional inch of mercury)
        assert_eq!(
            stack.format(Kind::Barometric, 29.92 * 3386.389),
            "29.92 inHg"
        );
    }

    #[test]
    fn epa_metric_and_si_are_their_own() {
        let m = DisplayTable::new(ConventionId::EpaMethod2, UnitSystem::EpaMetric);
        // 1 mmH2O (conventional) = 9.80665 Pa
        assert_eq!(
            m.format(Kind::VelocityPressure, 12.0 * 9.80665),
            "12.00 mmH2O"
        );
        assert_eq!(m.format(Kind::Temperature, 423.15), "150.0 °C");
        assert_eq!(m.get(Kind::DryStandardFlow).symbol, "dscm/h");
        let iso = DisplayTable::new(ConventionId::Iso16911, UnitSystem::Si);
        assert_eq!(iso.get(Kind::DryStandardFlow).symbol, "dNm³/h");
        assert_eq!(
            iso.with_reference_overridden(true)
                .get(Kind::DryStandardFlow)
                .symbol,
            "m³/h"
        );
        assert_eq!(iso.format(Kind::StaticPressure, -250.4), "\u{2212}250 Pa");
        assert_eq!(
            UnitSystem::of(ConventionId::EpaMethod2, true),
            UnitSystem::EpaMetric
        );
        assert_eq!(
            UnitSystem::of(ConventionId::HvacIp, false),
            UnitSystem::InchPound
        );
        assert_eq!(UnitSystem::of(ConventionId::HvacSi, false), UnitSystem::Si);
        for s in UnitSystem::ALL {
            assert_eq!(UnitSystem::parse(s.name()), Some(s));
        }
    }

    #[test]
    fn input_text_reads_back_through_the_parser() {
        use crate::units::PA_PER_INHG;
        for system in UnitSystem::ALL {
            let t = DisplayTable::new(ConventionId::EpaMethod2, system);
            for (kind, si) in [
                (Kind::Barometric, 29.62 * PA_PER_INHG),
                (Kind::StaticPressure, -211.7),
                (Kind::Position, 1.5),
                (Kind::Temperature, 293.15),
            ] {
                let sh = t.get(kind);
                let text = sh.input(si);
                assert!(text.is_ascii(), "{text}");
                let back = parse_quantity(&text, kind.dimension().unwrap()).unwrap();
                // the text is rounded to the table's decimals
                let step = 10f64.powi(-(sh.decimals as i32)) / sh.factor.abs();
                assert!((back - si).abs() <= step, "{system:?} {kind:?}: {text}");
            }
        }
        let ip = DisplayTable::new(ConventionId::HvacIp, UnitSystem::InchPound);
        // 0.85 inH2O: NIST SP 811 B.8 conventional inch of water
        assert_eq!(
            ip.get(Kind::StaticPressure)
                .input(-0.85 * crate::units::PA_PER_INH2O),
            "-0.85 inH2O"
        );
        // 1 in = 0.0254 m exactly: 60 1/8 in
        assert_eq!(ip.get(Kind::Position).input(60.125 * 0.0254), "60.125 in");
        let si = DisplayTable::new(ConventionId::Iso16911, UnitSystem::Si);
        assert_eq!(si.get(Kind::Position).input(1.5), "1500 mm");
    }

    #[test]
    fn csv_headers_carry_parseable_symbols() {
        let t = DisplayTable::new(ConventionId::EpaMethod2, UnitSystem::InchPound);
        assert_eq!(t.get(Kind::VelocityPressure).header("dp"), "dp[inH2O]");
        assert_eq!(
            t.get(Kind::Temperature).header("temperature"),
            "temperature[F]"
        );
        assert_eq!(
            t.si().get(Kind::Temperature).header("temperature"),
            "temperature[C]"
        );
    }

    #[test]
    fn numbers_never_print_inf_nan_or_negative_zero() {
        assert_eq!(fixed(-0.85, 2), "\u{2212}0.85");
        assert_eq!(fixed(-0.0004, 3), "0.000");
        assert_eq!(fixed(f64::INFINITY, 1), "\u{2014}");
        assert_eq!(fixed(f64::NAN, 1), "\u{2014}");
        assert_eq!(grouped(1234567.891, 1), "1,234,567.9");
        assert_eq!(grouped(-5318.8, 0), "\u{2212}5,319");
        assert_eq!(grouped(999.0, 0), "999");
        assert_eq!(significant(0.051_204, 3), "0.0512");
        assert_eq!(significant(93_249.4, 4), "93249");
        assert_eq!(significant(-2.5, 3), "\u{2212}2.5");
    }

    #[test]
    fn probe_marks_read_in_eighths() {
        assert_eq!(inch_eighths(12.375).as_deref(), Some("12 3/8"));
        assert_eq!(inch_eighths(8.0).as_deref(), Some("8"));
        assert_eq!(inch_eighths(0.25).as_deref(), Some("1/4"));
        assert_eq!(inch_eighths(30.5).as_deref(), Some("30 1/2"));
        assert_eq!(inch_eighths(2.875).as_deref(), Some("2 7/8"));
        assert_eq!(inch_eighths(2.016), None, "not a mark to the eighth");
    }

    #[test]
    fn flow_headings_name_their_basis() {
        let heads = |c, s| {
            let t = DisplayTable::new(c, s);
            [Kind::ActualFlow, Kind::StandardFlow, Kind::DryStandardFlow].map(|k| t.flow_heading(k))
        };
        // the unit names the basis: EPA English and EN ISO 16911
        assert_eq!(
            heads(ConventionId::EpaMethod2, UnitSystem::InchPound),
            ["Q [acfm]", "Q [wscfm]", "Q [dscfm]"]
        );
        assert_eq!(
            heads(ConventionId::Iso16911, UnitSystem::Si),
            ["Q [m³/h]", "Q [Nm³/h]", "Q [dNm³/h]"]
        );
        // scfm is standard air; the dry-air figure says so
        assert_eq!(
            heads(ConventionId::HvacIp, UnitSystem::InchPound),
            ["Q [acfm]", "Q [scfm]", "Q dry air [scfm]"]
        );
        // the same unit three times: qualified
        assert_eq!(
            heads(ConventionId::EpaMethod2, UnitSystem::Si),
            ["Q [m³/h]", "Q std wet [m³/h]", "Q std dry [m³/h]"]
        );
        assert_eq!(
            heads(ConventionId::HvacSi, UnitSystem::Si),
            ["Q [m³/h]", "Q std air [m³/h]", "Q std dry air [m³/h]"]
        );
    }

    #[test]
    fn running_text_quotes_to_significant_figures() {
        let ip = DisplayTable::new(ConventionId::EpaMethod2, UnitSystem::InchPound);
        // 1 in = 0.0254 m exactly: EPA Method 1 §1.2's 113 in² and 12 in
        assert_eq!(ip.quote(Kind::Area, 113.0 * 0.0254 * 0.0254), "113 in²");
        assert_eq!(ip.quote(Kind::Area, 4.0 * 0.09290304), "4 ft²");
        assert_eq!(ip.quote(Kind::Length, 12.0 * 0.0254), "12 in");
        assert_eq!(ip.quote(Kind::Diameters, 8.5), "8.5 D");
        assert_eq!(ip.quote(Kind::Temperature, 293.15), "68.0 °F");
        assert_eq!(
            ip.si().quote(Kind::Area, 113.0 * 0.0254 * 0.0254),
            "0.0729 m²"
        );
    }

    #[test]
    fn tab_reports_round_flows_and_velocities_to_the_trade_step() {
        use crate::units::FlowBasis;
        let ip = DisplayTable::new(ConventionId::HvacIp, UnitSystem::InchPound);
        // 1 cfm = 0.028316846592/60 m³/s; common practice: airflow to 5 cfm, velocity to 5 fpm
        let cfm = 0.028_316_846_592 / 60.0;
        assert_eq!(ip.tab_format(Kind::ActualFlow, 8013.0 * cfm), "8,015 acfm");
        assert_eq!(ip.tab_number(Kind::StandardFlow, 1087.4 * cfm), "1,085");
        // 1 fpm = 0.00508 m/s
        assert_eq!(ip.tab_format(Kind::Velocity, 1088.0 * 0.00508), "1090 fpm");
        let si = DisplayTable::new(ConventionId::HvacSi, UnitSystem::Si);
        assert_eq!(si.tab_format(Kind::Velocity, 5.437), "5.45 m/s");
        // stack jobs keep the table's own decimals
        let stack = DisplayTable::new(ConventionId::EpaMethod2, UnitSystem::InchPound);
        assert_eq!(stack.tab_step(Kind::ActualFlow), None);
        assert_eq!(
            ip.tab_format(Kind::FanSpeed, 1147.6),
            "1148 rpm",
            "fan speeds have no TAB step"
        );
        assert_eq!(Kind::flow(FlowBasis::DryStandard), Kind::DryStandardFlow);
        // NIST SP 811 B.8: 1 hp (550 ft·lbf/s) = 745.6999 W
        assert_eq!(ip.format(Kind::Power, 745.699_872 * 7.5), "7.50 hp");
        assert_eq!(si.format(Kind::Power, 5500.0), "5.50 kW");
    }

    #[test]
    fn percent_and_angles_take_their_own_spacing() {
        let t = DisplayTable::new(ConventionId::EpaMethod2, UnitSystem::InchPound);
        assert_eq!(t.format(Kind::Percent, 0.098), "9.8 %");
        assert_eq!(t.format(Kind::Angle, 12.0), "12°");
    }
}
