//! The signed-off PDF test report and the blank field data sheet: presentation model, charts, Typst
//! rendering, embedded data files and atomic output.
//!
//! Owns presentation only. [`model`] is the one structure a template receives (numbers already
//! formatted, SI raw values only where charts need them); [`charts`] draws SVG from it; [`engine`]
//! compiles `templates/report.typ` or `templates/field-sheet.typ` with embedded fonts and exports
//! PDF; [`attach`] carries the embedded files in and reads them back out; [`write`](mod@write) puts
//! a file on disk atomically. Must not compute results, read input files or look at the clock: the
//! caller fills the model from the compute results and passes the document date and attachment
//! bytes in.
//!
//! Typical use:
//!
//! ```no_run
//! use annulus::report::{Engine, RenderOptions, ReportData, write_atomic};
//! let engine = Engine::new();
//! let data = ReportData::demo();
//! let options = RenderOptions {
//!     date: chrono::NaiveDate::from_ymd_opt(2026, 10, 14).unwrap(),
//!     attachments: vec![],
//! };
//! let rendered = engine.render_report(&data, &options).unwrap();
//! write_atomic(std::path::Path::new("report.pdf"), &rendered.pdf).unwrap();
//! ```

pub mod attach;
pub mod build;
pub mod charts;
mod demo;
pub mod documents;
pub mod engine;
pub mod format;
pub mod model;
pub mod write;

pub use attach::{embedded_files, Attachment, AttachmentError, EmbeddedFile, ExtractError};
pub use engine::{Diagnostic, Engine, RenderError, RenderOptions, Rendered, UserTemplate};
pub use model::{FieldSheetData, ReportData};
pub use write::{write_atomic, WriteError};

#[cfg(test)]
mod tests;
