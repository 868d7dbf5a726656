//! Number formatting for the presentation model: fixed decimals, thousands separators, a true
//! minus. The rules live in [`crate::display`] (one place for every screen and page); this module
//! keeps the report's short names for them.

pub use crate::display::{fixed, grouped};
