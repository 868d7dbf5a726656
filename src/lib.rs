//! # annulus
//!
//! Pitot-tube velocity traverses of ducts and stacks, from raw readings to verified flow results and
//! signed PDF test reports.
//!
//! The pipeline, in the order data flows (nothing flows backwards):
//!
//! 1. **Read** — [`input`] is the only code that touches files: the survey (TOML) and the readings
//!    (CSV) become validated domain values, every problem carrying its file, line and column.
//! 2. **Lay out** — [`geometry`] gives the plane's shape and area; [`layout`] places the traverse
//!    points (equal-area, log-linear, log-Tchebycheff), applies wall rules and advises point counts.
//! 3. **Correct** — [`gas`] turns composition, moisture and pressure into gas density.
//! 4. **Integrate** — [`flow`] computes point velocities and flows under a named convention.
//! 5. **Judge** — [`checks`] runs acceptance checks; [`uncertainty`] builds the GUM budget.
//! 6. **Present** — [`report`] renders Typst PDFs; [`archive`] signs, verifies and reviews them;
//!    [`cli`] prints tables, JSON and CSV.
//!
//! A test-and-balance submittal runs this pipeline once per duct of an air system and then
//! [`system`] compares the ducts with their design and with each other ([`submittal`] joins the two).
//!
//! The calculation modules ([`units`], [`geometry`], [`layout`], [`gas`], [`flow`], [`checks`],
//! [`uncertainty`], [`calibration`], [`rata`], [`system`]) never read files, print, or look at the
//! clock.

// Diagnostics carry file, line, column, context and a hint by value; boxing them would buy nothing
// on paths that end the command.
#![allow(clippy::result_large_err)]

pub mod archive;
pub mod assess;
pub mod calibration;
pub mod checks;
pub mod cli;
pub mod config;
pub mod diag;
pub mod digest;
pub mod display;
pub mod evaluation;
pub mod flow;
pub mod gas;
pub mod geometry;
pub mod input;
pub mod layout;
pub mod limits;
pub mod pdf;
pub mod pipeline;
pub mod plane;
pub mod plausibility;
pub mod rata;
pub mod readings;
pub mod report;
pub mod results;
pub mod submittal;
pub mod survey;
pub mod system;
pub mod uncertainty;
pub mod units;
pub mod wording;
pub mod write;
