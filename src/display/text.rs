//! Words with quantities in them, kept as values until they are printed.
//!
//! A check finding, a rule from the layout advisor or a budget input says things like "nearest
//! point 2.016 in from a wall, limit 1 in". Such text is built as a [`Text`]: fixed words with the
//! quantities held as SI values and the [`Kind`] they are, rendered with a [`DisplayTable`] only
//! when someone prints it. The same finding then reads in inches of water on an inch-pound screen,
//! in Pa under `--si`, and no number is formatted for a finding nobody reads (`review` judges
//! thousands of surveys and prints a line each).
//!
//! [`Message`] is a text bound to the job's own table: it prints (`Display`) and serialises as the
//! string the job's units give, which is what the JSON `message` keys carry.

use super::{significant, DisplayTable, Kind};
use crate::units::{convert_out, Unit};
use serde::{Serialize, Serializer};
use std::borrow::Cow;
use std::fmt;

/// Words and quantities, rendered with a display table when printed.
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
    /// A quantity (SI) quoted the way running text quotes it ([`DisplayTable::quote`]).
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
        $crate::display::Text::template($template, vec![$($crate::display::Arg::from($arg)),*])
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

    /// The words with every quantity in `table`'s units.
    pub fn render(&self, table: &DisplayTable) -> String {
        let mut out = String::new();
        self.render_into(table, &mut out);
        out
    }

    pub fn render_into(&self, table: &DisplayTable, out: &mut String) {
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
    fn render_into(&self, t: &DisplayTable, out: &mut String) {
        match self {
            Arg::Str(s) => out.push_str(s),
            Arg::Quantity(kind, si) => out.push_str(&t.quote(*kind, *si)),
            Arg::Number(x, sig) => out.push_str(&significant(*x, *sig)),
            Arg::Percent(f) => {
                out.push_str(&significant(f * 100.0, 4));
                out.push_str(" %");
            }
            Arg::Int(n) => out.push_str(&n.to_string()),
            Arg::InUnit(unit, si) => {
                out.push_str(&significant(convert_out(*si, unit), 5));
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

/// A [`Text`] bound to the job's display table: prints and serialises as the job's words.
#[derive(Debug, Clone, PartialEq)]
pub struct Message {
    text: Text,
    table: DisplayTable,
}

impl Message {
    pub fn new(text: impl Into<Text>, table: DisplayTable) -> Message {
        Message {
            text: text.into(),
            table,
        }
    }

    pub fn text(&self) -> &Text {
        &self.text
    }

    pub fn text_mut(&mut self) -> &mut Text {
        &mut self.text
    }

    /// The job's own table.
    pub fn table(&self) -> &DisplayTable {
        &self.table
    }

    /// The words in another table's units (a screen's `--si` or `--units`).
    pub fn render(&self, table: &DisplayTable) -> String {
        self.text.render(table)
    }
}

impl fmt::Display for Message {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.text.render(&self.table))
    }
}

impl Serialize for Message {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_str(self)
    }
}

impl PartialEq<str> for Message {
    fn eq(&self, other: &str) -> bool {
        self.text.render(&self.table) == other
    }
}

impl PartialEq<&str> for Message {
    fn eq(&self, other: &&str) -> bool {
        self.text.render(&self.table) == *other
    }
}

#[cfg(test)]
mod tests {
    use super::super::UnitSystem;
    use super::*;
    use crate::survey::ConventionId;
    use crate::units::{lookup_unit, PA_PER_INH2O};

    fn tables() -> (DisplayTable, DisplayTable) {
        (
            DisplayTable::new(ConventionId::EpaMethod2, UnitSystem::InchPound),
            DisplayTable::new(ConventionId::EpaMethod2, UnitSystem::Si),
        )
    }

    #[test]
    fn one_text_reads_in_each_system() {
        let (ip, si) = tables();
        // 1 in = 25.4 mm exactly; 0.05 inH2O = 12.454 Pa (NIST SP 811 B.8, 249.0889 Pa per inH2O)
        let t = crate::text!(
            "nearest point {} from a wall, limit {}; mean Δp {}",
            q(Kind::Length, 2.016 * 0.0254),
            q(Kind::Length, 0.0254),
            q(Kind::VelocityPressure, 0.05 * PA_PER_INH2O)
        );
        assert_eq!(
            t.render(&ip),
            "nearest point 2.016 in from a wall, limit 1 in; mean Δp 0.05 inH2O"
        );
        assert_eq!(
            t.render(&si),
            "nearest point 51.21 mm from a wall, limit 25.4 mm; mean Δp 12.45 Pa"
        );
    }

    #[test]
    fn numbers_lists_and_pushes() {
        let (ip, _) = tables();
        let items: Vec<Text> = (1..=8).map(|i| crate::text!("A{}", i)).collect();
        let mut t = crate::text!(
            "{} of {} ({}); {}",
            3usize,
            24usize,
            percent(0.125),
            list(items, 6)
        );
        t.push("; T = ");
        t.push(Text::from(number(1.004_71)));
        assert_eq!(
            t.render(&ip),
            "3 of 24 (12.5 %); A1, A2, A3, A4, A5, A6 and 2 more; T = 1.0047"
        );
        let recorded = lookup_unit("inH2O").unwrap();
        assert_eq!(
            Text::from(in_unit(recorded, 0.352 * PA_PER_INH2O)).render(&ip),
            "0.352 inH2O"
        );
        assert_eq!(
            Text::join([Text::from("a"), Text::from("b")], "; ").render(&ip),
            "a; b"
        );
    }

    #[test]
    fn a_message_prints_and_serialises_in_the_jobs_units() {
        let (ip, si) = tables();
        // 68 °F = 293.15 K (definition of the scales)
        let m = Message::new(crate::text!("air {}", q(Kind::Temperature, 293.15)), ip);
        assert_eq!(m.to_string(), "air 68.0 °F");
        assert_eq!(m, "air 68.0 °F");
        assert_eq!(serde_json::to_string(&m).unwrap(), "\"air 68.0 °F\"");
        assert_eq!(m.render(&si), "air 20.0 °C");
    }
}
