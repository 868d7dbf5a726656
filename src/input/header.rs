//! `name[unit]` CSV headers, shared by every CSV the program reads (readings, calibration
//! readings, and any new table): the name, the unit in brackets, and the problems a header can
//! have, each with one hint.

use crate::units::{lookup_unit, symbols_for, Dimension, Unit};

/// A header problem: the message and its hint.
pub type HeaderError = (String, String);

/// A header cell split into its name and its unit (`dp[inH2O]` → `dp`, `inH2O`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Header<'a> {
    pub name: &'a str,
    pub unit: Option<&'a str>,
}

impl<'a> Header<'a> {
    /// Splits `name[unit]`; spaces around either part are ignored.
    pub fn parse(h: &'a str) -> Result<Header<'a>, HeaderError> {
        let h = h.trim();
        match h.split_once('[') {
            Some((n, rest)) => match rest.strip_suffix(']') {
                Some(u) => Ok(Header {
                    name: n.trim(),
                    unit: Some(u.trim()),
                }),
                None => Err((
                    format!("header `{h}` has no closing `]`"),
                    "write units as name[unit], e.g. dp[inH2O]".into(),
                )),
            },
            None => Ok(Header {
                name: h,
                unit: None,
            }),
        }
    }

    /// The unit of a column that needs one, of one of `dimensions`; `example` is a whole header
    /// such as `dp[inH2O]`, for the hint.
    pub fn unit_of(
        &self,
        dimensions: &[Dimension],
        example: &str,
    ) -> Result<&'static Unit, HeaderError> {
        let name = self.name;
        let Some(u) = self.unit else {
            return Err((
                format!("column `{name}` needs a unit in its header"),
                format!("write e.g. `{example}`"),
            ));
        };
        match lookup_unit(u) {
            Some(unit) if dimensions.contains(&unit.dimension) => Ok(unit),
            _ => Err((
                format!("unit `{u}` cannot be used for column `{name}`"),
                format!(
                    "`{name}` takes one of: {}",
                    dimensions
                        .iter()
                        .flat_map(|d| symbols_for(*d))
                        .collect::<Vec<_>>()
                        .join(", ")
                ),
            )),
        }
    }

    /// Checks a column that takes no unit, or only `allowed` (an angle's `deg`).
    pub fn no_unit(&self, allowed: Option<&str>) -> Result<(), HeaderError> {
        let name = self.name;
        match (self.unit, allowed) {
            (None, _) => Ok(()),
            (Some(u), Some(a)) if lookup_unit(u) == lookup_unit(a) => Ok(()),
            (Some(u), _) => Err((
                format!("column `{name}` takes no unit `{u}`"),
                match allowed {
                    Some(a) => format!("write `{name}[{a}]`"),
                    None => format!("write `{name}`"),
                },
            )),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn splits_names_and_units() {
        let h = Header::parse(" dp [ inH2O ] ").unwrap();
        assert_eq!((h.name, h.unit), ("dp", Some("inH2O")));
        assert_eq!(Header::parse("line").unwrap().unit, None);
        let (msg, hint) = Header::parse("dp[inH2O").unwrap_err();
        assert!(msg.contains("no closing"), "{msg}");
        assert!(hint.contains("name[unit]"), "{hint}");
    }

    #[test]
    fn units_are_checked_against_the_column() {
        let h = Header::parse("dp[in wg]").unwrap();
        assert_eq!(
            h.unit_of(&[Dimension::Pressure], "dp[inH2O]")
                .unwrap()
                .symbol,
            "inH2O"
        );
        let (msg, hint) = Header::parse("dp")
            .unwrap()
            .unit_of(&[Dimension::Pressure], "dp[inH2O]")
            .unwrap_err();
        assert_eq!(msg, "column `dp` needs a unit in its header");
        assert_eq!(hint, "write e.g. `dp[inH2O]`");
        let (msg, _) = Header::parse("dp[F]")
            .unwrap()
            .unit_of(&[Dimension::Pressure], "dp[inH2O]")
            .unwrap_err();
        assert_eq!(msg, "unit `F` cannot be used for column `dp`");
        assert!(Header::parse("yaw[deg]")
            .unwrap()
            .no_unit(Some("deg"))
            .is_ok());
        assert!(Header::parse("yaw[°]")
            .unwrap()
            .no_unit(Some("deg"))
            .is_ok());
        assert!(Header::parse("line[m]").unwrap().no_unit(None).is_err());
    }
}
