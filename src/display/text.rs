//! A [`Text`] bound to the job's display table: it prints (`Display`) and serialises as the
//! string the job's units give, which is what the JSON `message` keys carry.

use super::{significant, DisplayTable, Kind, Render, Text};
use serde::{Serialize, Serializer};
use std::fmt;

impl Render for DisplayTable {
    fn quantity(&self, kind: Kind, si: f64) -> String {
        self.quote(kind, si)
    }

    fn number(&self, x: f64, sig: usize) -> String {
        significant(x, sig)
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
    use crate::wording::{in_unit, list, number, percent, q, Text};

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
