//! The trade a page speaks to, and the words that differ between them. A stack crew writes Δp,
//! stack gas and dscfm; a test-and-balance technician writes velocity pressure (VP), air and cfm.
//! Every section asks here instead of choosing its own words.

use crate::survey::ConventionId;

/// Stack testing (EPA Methods, EN 15259 / EN ISO 16911-1) or HVAC test and balance.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Trade {
    Stack,
    Hvac,
}

impl Trade {
    pub fn of(convention: ConventionId) -> Trade {
        if convention.is_hvac() {
            Trade::Hvac
        } else {
            Trade::Stack
        }
    }

    /// What flows through the duct: `gas` or `air`.
    pub fn gas(self) -> &'static str {
        match self {
            Trade::Stack => "gas",
            Trade::Hvac => "air",
        }
    }

    /// The pitot reading's short name: `Δp` (stack methods) or `VP` (velocity pressure, TAB).
    pub fn dp(self) -> &'static str {
        match self {
            Trade::Stack => "Δp",
            Trade::Hvac => "VP",
        }
    }

    /// The document's kind, printed above the title.
    pub fn document(self) -> &'static str {
        match self {
            Trade::Stack => "Flow test report",
            Trade::Hvac => "Duct traverse report",
        }
    }

    /// A budget input or component named in the calculation's words (`gas temperature`), in
    /// the trade's (`air temperature` for HVAC).
    pub fn name(self, name: &str) -> String {
        let name = match name.strip_prefix("dp ") {
            Some(rest) => format!("{} {rest}", self.dp()),
            None => name.to_string(),
        };
        match self {
            Trade::Stack => name,
            Trade::Hvac => name
                .replace("gas composition and moisture", "air moisture")
                .replace("gas ", "air "),
        }
    }

    /// Whether the trade's procedure records pitot leak checks (EPA Method 2 §8.1 does; TAB
    /// traverses do not).
    pub fn records_leak_checks(self) -> bool {
        self == Trade::Stack
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hvac_speaks_of_air_and_velocity_pressure() {
        let h = Trade::of(ConventionId::HvacIp);
        assert_eq!((h.gas(), h.dp()), ("air", "VP"));
        assert!(!h.records_leak_checks());
        assert_eq!(h.name("gas temperature"), "air temperature");
        assert_eq!(h.name("gas composition and moisture"), "air moisture");
        assert_eq!(h.name("dp resolution"), "VP resolution");
        assert_eq!(Trade::Stack.name("dp zero offset"), "Δp zero offset");
        let s = Trade::of(ConventionId::Iso16911);
        assert_eq!((s.gas(), s.dp()), ("gas", "Δp"));
        assert!(s.records_leak_checks());
    }
}
