//! Every PDF annulus writes: the signed-off test report, the blank field data sheet, the pitot
//! calibration certificate and the RATA summary. Presentation models, charts, Typst rendering,
//! embedded data files and atomic output.
//!
//! Owns presentation only. [`model`] is the structure the report and field-sheet templates
//! receive (numbers already formatted in the job's units, SI raw values only where charts need
//! them); [`build`] fills it from an evaluation, one section per file; [`certificate`] and
//! [`rata`] are the typed models of the other documents ([`documents::Presentation`]; a new
//! document, such as the system submittal, goes beside them); [`charts`] draws SVG from the
//! model; [`engine`] compiles the templates in `templates/` with embedded fonts and exports PDF;
//! [`attach`] carries the embedded files in and reads them back out; [`crate::write`] puts a
//! file on disk by the output rules. Must not compute results, read input files or look at the
//! clock: the caller passes the evaluation, the document date and the attachment bytes in.
//!
//! Typical use:
//!
//! ```no_run
//! use annulus::report::build::{report_data, Identity};
//! use annulus::report::{write_atomic, Engine, RenderOptions};
//! let loaded = annulus::input::load(std::path::Path::new("survey.toml")).unwrap();
//! let (e, a) = annulus::pipeline::evaluate_and_assess(loaded).unwrap();
//! let id = Identity {
//!     report_id: "AN-0123456789AB".into(),
//!     content_sha256: "0".repeat(64),
//!     signer_key_fingerprint: None,
//!     signer_name: None,
//!     defaults: Default::default(),
//! };
//! let options = RenderOptions {
//!     date: e.loaded.survey.date,
//!     attachments: vec![],
//! };
//! let rendered = Engine::new()
//!     .render_report(&report_data(&e, &a, &id), &options)
//!     .unwrap();
//! write_atomic(std::path::Path::new("report.pdf"), &rendered.pdf).unwrap();
//! ```

pub mod attach;
pub mod build;
pub mod certificate;
pub mod charts;
pub mod documents;
pub mod engine;
pub mod model;
pub mod rata;
pub mod submittal;

pub use crate::write::{write_atomic, WriteError};
pub use attach::{embedded_files, Attachment, AttachmentError, EmbeddedFile, ExtractError};
pub use documents::{DocumentMeta, Presentation};
pub use engine::{Diagnostic, Engine, RenderError, RenderOptions, Rendered, UserTemplate};
pub use model::{FieldSheetData, ReportData};

#[cfg(test)]
mod testkit;
#[cfg(test)]
mod tests;
