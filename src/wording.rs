//! Words with quantities in them, kept as values until they are printed, and the kinds of
//! quantity those values are.
//!
//! A check finding, a rule of the layout advisor or a budget input says things like "nearest
//! point 2.016 in from a wall, limit 1 in". Such text is built as a [`Text`]: fixed words with the
//! quantities held as SI values and the [`Kind`] they are, rendered only when someone prints it,
//! by whatever implements [`Render`] (the display table, `crate::display::DisplayTable`). The
//! same finding then reads in inches of water on an inch-pound screen and in Pa under `--si`, and
//! no number is formatted for a finding nobody reads (`review` judges thousands of surveys and
//! prints a line each).
//!
//! Owns the words, not the units: which unit and how many figures a kind is shown with is the
//! display table's. Imports nothing but `units`, so the calculation modules (the layout advisor,
//! the checks) can word their results without depending on how they are shown.

use crate::units::{convert_out, Dimension, Unit};
use serde::Serialize;
use std::borrow::Cow;

/// What a number on a screen or page is: the kinds of quantity the program prints. Finer than
/// [`Dimension`]: a velocity pressure and a barometric pressure are both pressures
/// but are read in different units.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Kind {
    /// Duct dimensions, port lengths, wall distances.
    Length,
    /// Traverse point positions and probe marks (one step finer than [`Kind::Length`]).
    Position,
    /// Straight runs in duct diameters (`8.5 D`), the same in every system.
    Diameters,
    /// Plane and terminal areas.
    Area,
    /// Pitot differential (velocity) pressure Δp.
    VelocityPressure,
    /// Duct static (gauge) pressure.
    StaticPressure,
    /// Barometric pressure.
    Barometric,
    /// Absolute duct pressure.
    AbsolutePressure,
    /// Dry gas meter orifice pressure ΔH (EPA Method 4 / 5 trains).
    OrificePressure,
    Temperature,
    TemperatureDifference,
    Velocity,
    ActualFlow,
    /// Standard (wet) flow, or normal flow under EN ISO 16911-1.
    StandardFlow,
    /// Dry standard flow (dscfm, dscm/h, m³/h at normal conditions dry).
    DryStandardFlow,
    MassFlow,
    Density,
    MolarMass,
    /// A fraction shown in percent (moisture, composition, percent of design).
    Percent,
    Angle,
    /// Condensed water volume (impingers), mL everywhere.
    LiquidVolume,
    /// Weighed water (silica gel), g everywhere.
    Mass,
    /// Dry gas meter volume.
    GasVolume,
    /// Flow at normal conditions (0 °C, 101.325 kPa), wet.
    NormalFlow,
    /// Flow at normal conditions, dry.
    NormalDryFlow,
    /// Fan speed (held in rpm, the unit of nameplates and drives).
    FanSpeed,
    /// Motor current.
    Current,
    /// Fan shaft or motor power.
    Power,
}

impl Kind {
    pub const ALL: [Kind; 28] = [
        Kind::Length,
        Kind::Position,
        Kind::Diameters,
        Kind::Area,
        Kind::VelocityPressure,
        Kind::StaticPressure,
        Kind::Barometric,
        Kind::AbsolutePressure,
        Kind::OrificePressure,
        Kind::Temperature,
        Kind::TemperatureDifference,
        Kind::Velocity,
        Kind::ActualFlow,
        Kind::StandardFlow,
        Kind::DryStandardFlow,
        Kind::MassFlow,
        Kind::Density,
        Kind::MolarMass,
        Kind::Percent,
        Kind::Angle,
        Kind::LiquidVolume,
        Kind::Mass,
        Kind::GasVolume,
        Kind::NormalFlow,
        Kind::NormalDryFlow,
        Kind::FanSpeed,
        Kind::Current,
        Kind::Power,
    ];

    /// A volume flow of any basis.
    pub fn is_flow(self) -> bool {
        matches!(
            self,
            Kind::ActualFlow
                | Kind::StandardFlow
                | Kind::DryStandardFlow
                | Kind::NormalFlow
                | Kind::NormalDryFlow
        )
    }

    /// The flow kind that shows a flow on `basis`.
    pub fn flow(basis: crate::units::FlowBasis) -> Kind {
        use crate::units::FlowBasis;
        match basis {
            FlowBasis::Actual => Kind::ActualFlow,
            FlowBasis::Standard => Kind::StandardFlow,
            FlowBasis::DryStandard => Kind::DryStandardFlow,
            FlowBasis::Normal => Kind::NormalFlow,
            FlowBasis::NormalDry => Kind::NormalDryFlow,
        }
    }

    /// The dimension a value of this kind is parsed as (`None` for molar masses, which are
    /// plain numbers in input).
    pub fn dimension(self) -> Option<Dimension> {
        Some(match self {
            Kind::Length | Kind::Position => Dimension::Length,
            Kind::Diameters => Dimension::Diameters,
            Kind::Area => Dimension::Area,
            Kind::VelocityPressure
            | Kind::StaticPressure
            | Kind::Barometric
            | Kind::AbsolutePressure
            | Kind::OrificePressure => Dimension::Pressure,
            Kind::Temperature => Dimension::Temperature,
            Kind::TemperatureDifference => Dimension::TemperatureDifference,
            Kind::Velocity => Dimension::Velocity,
            Kind::ActualFlow
            | Kind::StandardFlow
            | Kind::DryStandardFlow
            | Kind::NormalFlow
            | Kind::NormalDryFlow => Dimension::Flow,
            Kind::FanSpeed => Dimension::RotationalSpeed,
            Kind::Current => Dimension::Current,
            Kind::Power => Dimension::Power,
            Kind::MassFlow => Dimension::MassFlow,
            Kind::Density => Dimension::Density,
            Kind::MolarMass => return None,
            Kind::Percent => Dimension::Fraction,
            Kind::Angle => Dimension::Angle,
            Kind::LiquidVolume | Kind::GasVolume => Dimension::Volume,
            Kind::Mass => Dimension::Mass,
        })
    }
}

/// How the values of a [`Text`] are written: the display table implements it.
pub trait Render {
    /// A quantity (SI) with its unit, as running text quotes it (`2.016 in`).
    fn quantity(&self, kind: Kind, si: f64) -> String;
    /// A plain number to `sig` significant figures.
    fn number(&self, x: f64, sig: usize) -> String;
}

/// Words and quantities, rendered when printed.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Text {
    parts: Vec<Part>,
}

#[derive(Debug, Clone, PartialEq)]
enum Part {
    /// Fixed words with `{}` where each argument goes, in order.
    Template(&'static str, Vec<Arg>),
    Arg(Arg),
}

/// One value in a [`Text`].
#[derive(Debug, Clone, PartialEq)]
pub enum Arg {
    Str(Cow<'static, str>),
    /// A quantity (SI) quoted the way running text quotes it ([`Render::quantity`]).
    Quantity(Kind, f64),
    /// A plain number to this many significant figures.
    Number(f64, usize),
    /// A fraction shown in percent, four significant figures (`12.5 %`).
    Percent(f64),
    Int(i64),
    /// A value (SI) in a unit fixed by the data itself, e.g. the unit a reading was recorded
    /// in: the same on every screen.
    InUnit(&'static Unit, f64),
    Text(Text),
    /// Up to `max` items, then "and N more".
    List(Vec<Text>, usize),
}

/// A quantity, quoted in the display unit of its kind.
pub fn q(kind: Kind, si: f64) -> Arg {
    Arg::Quantity(kind, si)
}

/// A plain number to five significant figures.
pub fn number(x: f64) -> Arg {
    Arg::Number(x, 5)
}

/// A plain number to `sig` significant figures.
pub fn number_sig(x: f64, sig: usize) -> Arg {
    Arg::Number(x, sig)
}

/// A fraction in percent (`0.7` → `70 %`).
pub fn percent(fraction: f64) -> Arg {
    Arg::Percent(fraction)
}

/// A value in a unit the data fixed (`0.352 inH2O` as recorded).
pub fn in_unit(unit: &'static Unit, si: f64) -> Arg {
    Arg::InUnit(unit, si)
}

/// Up to `max` items, then "and N more".
pub fn list(items: Vec<Text>, max: usize) -> Arg {
    Arg::List(items, max)
}

impl From<&'static str> for Arg {
    fn from(s: &'static str) -> Arg {
        Arg::Str(Cow::Borrowed(s))
    }
}

impl From<String> for Arg {
    fn from(s: String) -> Arg {
        Arg::Str(Cow::Owned(s))
    }
}

impl From<Text> for Arg {
    fn from(t: Text) -> Arg {
        Arg::Text(t)
    }
}

macro_rules! int_arg {
    ($($t:ty),*) => {$(
        impl From<$t> for Arg {
            fn from(n: $t) -> Arg {
                Arg::Int(n as i64)
            }
        }
    )*};
}
int_arg!(usize, u32, i32, i64);

/// Builds a [`Text`] from fixed words with `{}` holes and one argument per hole, each anything
/// that converts into an [`Arg`]: `text!("mean |yaw| {} over {} points", q(Kind::Angle, m), n)`.
#[macro_export]
macro_rules! text {
    ($template:literal $(, $arg:expr)* $(,)?) => {
        $crate::wording::Text::template($template, vec![$($crate::wording::Arg::from($arg)),*])
    };
}

impl Text {
    pub fn new() -> Text {
        Text::default()
    }

    /// Fixed words with `{}` where each of `args` goes (see the `text!` macro).
    pub fn template(template: &'static str, args: Vec<Arg>) -> Text {
        debug_assert_eq!(
            template.matches("{}").count(),
            args.len(),
            "holes and arguments differ in `{template}`"
        );
        Text {
            parts: vec![Part::Template(template, args)],
        }
    }

    pub fn is_empty(&self) -> bool {
        self.parts.is_empty()
    }

    /// Appends more text.
    pub fn push(&mut self, more: impl Into<Text>) {
        self.parts.extend(more.into().parts);
    }

    /// This text followed by `more`.
    pub fn and(mut self, more: impl Into<Text>) -> Text {
        self.push(more);
        self
    }

    /// The items separated by `sep`.
    pub fn join(items: impl IntoIterator<Item = Text>, sep: &'static str) -> Text {
        let mut out = Text::new();
        for (i, t) in items.into_iter().enumerate() {
            if i > 0 {
                out.push(sep);
            }
            out.push(t);
        }
        out
    }

    /// The words with every quantity as `table` shows it.
    pub fn render(&self, table: &impl Render) -> String {
        let mut out = String::new();
        self.render_into(table, &mut out);
        out
    }

    pub fn render_into(&self, table: &impl Render, out: &mut String) {
        for p in &self.parts {
            match p {
                Part::Arg(a) => a.render_into(table, out),
                Part::Template(template, args) => {
                    let mut args = args.iter();
                    let mut rest = *template;
                    while let Some(i) = rest.find("{}") {
                        out.push_str(&rest[..i]);
                        if let Some(a) = args.next() {
                            a.render_into(table, out);
                        }
                        rest = &rest[i + 2..];
                    }
                    out.push_str(rest);
                }
            }
        }
    }
}

impl Arg {
    fn render_into(&self, t: &impl Render, out: &mut String) {
        match self {
            Arg::Str(s) => out.push_str(s),
            Arg::Quantity(kind, si) => out.push_str(&t.quantity(*kind, *si)),
            Arg::Number(x, sig) => out.push_str(&t.number(*x, *sig)),
            Arg::Percent(f) => {
                out.push_str(&t.number(f * 100.0, 4));
                out.push_str(" %");
            }
            Arg::Int(n) => out.push_str(&n.to_string()),
            Arg::InUnit(unit, si) => {
                out.push_str(&t.number(convert_out(*si, unit), 5));
                out.push(' ');
                out.push_str(unit.symbol);
            }
            Arg::Text(text) => text.render_into(t, out),
            Arg::List(items, max) => {
                for (i, item) in items.iter().take(*max).enumerate() {
                    if i > 0 {
                        out.push_str(", ");
                    }
                    item.render_into(t, out);
                }
                if items.len() > *max {
                    out.push_str(&format!(" and {} more", items.len() - max));
                }
            }
        }
    }
}

impl From<&'static str> for Text {
    fn from(s: &'static str) -> Text {
        Text {
            parts: vec![Part::Arg(Arg::from(s))],
        }
    }
}

impl From<String> for Text {
    fn from(s: String) -> Text {
        Text {
            parts: vec![Part::Arg(Arg::from(s))],
        }
    }
}

impl From<Arg> for Text {
    fn from(a: Arg) -> Text {
        Text {
            parts: vec![Part::Arg(a)],
        }
    }
}
