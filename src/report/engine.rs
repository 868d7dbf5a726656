//! The Typst engine: fonts, the compile world, diagnostics with file:line:col, and PDF export.
//!
//! Owns everything that touches Typst. [`Engine::new`] builds the standard library and the font
//! book once (typst-assets fonts plus DejaVu Sans from the `dejavu` crate; no system fonts, no
//! network, no package resolution) and is reused for every render; it is `Send + Sync`.
//!
//! A render is one in-memory world with these files:
//!
//! | path | content |
//! |---|---|
//! | `/main.typ` | the engine's entry point: `set document(…)`, the template, then `pdf.attach` per attachment |
//! | `/template.typ` | the layout template (built-in `templates/report.typ` or a user's) |
//! | `/data.json` | the presentation model ([`ReportData`] or [`FieldSheetData`]) |
//! | `/charts.json` | the SVG charts as strings: `plane`, and `runs[i].map` / `runs[i].profiles` |
//! | `/meta.json` | document metadata and the attachment list |
//! | `/attachments/N` | the bytes of attachment N |
//!
//! The entry point, not the template, sets the metadata and embeds the attachments, so a user
//! template (`--template PATH`) cannot drop the data `annulus verify` relies on; templates hold
//! layout only.
//!
//! Must not read files or the clock: template text, the document date and attachment bytes arrive
//! as parameters. `World::today` answers with the document date, so even a template calling
//! `datetime.today()` is reproducible. The output is byte-identical for the same input: the
//! document date is pinned, the PDF identifier is derived from the report id and content
//! fingerprint (`PdfOptions::ident`), and no creation timestamp beyond the document date is
//! written.
//!
//! **PDF/A-3b** (ISO 19005-3, level B) is used for reports: it is an archival profile that permits
//! embedded files (PDF/A-2b refuses them), which the data-carrying report needs; it requires a
//! document date and a description for every attachment, both of which the engine always supplies.
//! The blank field sheet has no attachments and is exported as PDF/A-2b.

use std::fmt;

use serde::Serialize;
use typst::diag::{FileError, FileResult, Severity, SourceDiagnostic, Warned};
use typst::foundations::{Bytes, Datetime, Smart};
use typst::syntax::{DiagSpan, FileId, RootedPath, Source, VirtualPath, VirtualRoot};
use typst::text::{Font, FontBook};
use typst::utils::LazyHash;
use typst::{Library, LibraryExt, World, WorldExt};
use typst_layout::PagedDocument;
use typst_pdf::{PdfOptions, PdfStandard, PdfStandards};

use super::attach::{check_unique, Attachment, AttachmentError};
use super::charts::{plane_svg, profiles_svg, velocity_map_svg, ColourScale};
use super::model::{FieldSheetData, ModelError, ReportData};

/// The built-in report layout.
pub const REPORT_TEMPLATE: &str = include_str!("../../templates/report.typ");
/// The built-in blank field data sheet.
pub const FIELD_SHEET_TEMPLATE: &str = include_str!("../../templates/field-sheet.typ");

/// The engine's entry point (see the module docs). Kept in Rust so the metadata and attachments do
/// not depend on the template.
const MAIN: &str = r#"// annulus entry point: metadata and attachments; the layout is in /template.typ.
#let meta = json("/meta.json")
#set document(
  title: meta.title,
  author: meta.author,
  keywords: meta.keywords,
  description: meta.description,
  date: datetime(year: meta.date.year, month: meta.date.month, day: meta.date.day),
)
#for a in meta.attachments {
  pdf.attach(
    a.name,
    read(a.path, encoding: none),
    mime-type: a.mime,
    relationship: "data",
    description: a.description,
  )
}
#include "/template.typ"
"#;

/// Display names used in diagnostics for the built-in files.
const MAIN_NAME: &str = "annulus-main.typ";
const REPORT_NAME: &str = "report.typ";
const FIELD_SHEET_NAME: &str = "field-sheet.typ";

/// Builds fonts and the standard library once; renders any number of documents.
pub struct Engine {
    library: LazyHash<Library>,
    book: LazyHash<FontBook>,
    fonts: Vec<Font>,
}

impl Default for Engine {
    fn default() -> Self {
        Engine::new()
    }
}

/// A user-supplied layout template (`--template PATH`): its text and the name diagnostics print
/// (usually the path as the user typed it). The caller reads the file.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct UserTemplate {
    pub display_name: String,
    pub text: String,
}

/// Inputs of a render that are not part of the presentation model.
#[derive(Debug, Clone)]
pub struct RenderOptions {
    /// The document date written to the PDF: the survey date, or a date the caller derived from
    /// `SOURCE_DATE_EPOCH`. Never the clock.
    pub date: chrono::NaiveDate,
    /// Files to embed (survey, readings CSVs, results JSON …).
    pub attachments: Vec<Attachment>,
}

/// A finished PDF and the warnings Typst gave while making it.
#[derive(Debug, Clone)]
pub struct Rendered {
    pub pdf: Vec<u8>,
    pub warnings: Vec<Diagnostic>,
}

/// A Typst error or warning, resolved to a file, line and column where it has one.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Diagnostic {
    pub warning: bool,
    /// File as the user knows it (`report.typ`, or the `--template` path).
    pub file: Option<String>,
    /// 1-based line.
    pub line: Option<usize>,
    /// 1-based column, in characters.
    pub column: Option<usize>,
    pub message: String,
    pub hints: Vec<String>,
}

impl fmt::Display for Diagnostic {
    /// `template.typ:4:10: error: unclosed delimiter`, then one `  = hint: …` line per hint.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let kind = if self.warning { "warning" } else { "error" };
        match (&self.file, self.line, self.column) {
            (Some(file), Some(line), Some(col)) => write!(f, "{file}:{line}:{col}: ")?,
            (Some(file), _, _) => write!(f, "{file}: ")?,
            _ => {}
        }
        write!(f, "{kind}: {}", self.message)?;
        for hint in &self.hints {
            write!(f, "\n  = hint: {hint}")?;
        }
        Ok(())
    }
}

/// Why a document could not be rendered.
#[derive(Debug, Clone, PartialEq)]
pub enum RenderError {
    /// The presentation model is inconsistent.
    Model(ModelError),
    Attachment(AttachmentError),
    /// The document date cannot be represented.
    Date {
        date: chrono::NaiveDate,
    },
    /// The template did not compile.
    Template(Vec<Diagnostic>),
    /// The PDF exporter refused the document (e.g. a PDF/A rule).
    Export(Vec<Diagnostic>),
    /// A value could not be serialised for the template (a bug).
    Internal(String),
}

impl fmt::Display for RenderError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            RenderError::Model(e) => write!(f, "report data rejected: {e}"),
            RenderError::Attachment(e) => write!(f, "{e}"),
            RenderError::Date { date } => {
                write!(
                    f,
                    "document date `{date}` is outside the range a PDF can hold"
                )
            }
            RenderError::Template(diags) | RenderError::Export(diags) => {
                let what = if matches!(self, RenderError::Template(_)) {
                    "the report template did not compile"
                } else {
                    "the PDF could not be written"
                };
                write!(f, "{what}")?;
                for d in diags {
                    write!(f, "\n{d}")?;
                }
                Ok(())
            }
            RenderError::Internal(m) => write!(f, "internal error while rendering: {m}"),
        }
    }
}

impl std::error::Error for RenderError {}

impl From<ModelError> for RenderError {
    fn from(e: ModelError) -> Self {
        RenderError::Model(e)
    }
}

impl From<AttachmentError> for RenderError {
    fn from(e: AttachmentError) -> Self {
        RenderError::Attachment(e)
    }
}

/// Charts handed to the report template.
/// The charts of one report (or one traverse of a submittal), as SVG text.
#[derive(Serialize)]
pub(crate) struct Charts {
    plane: String,
    runs: Vec<RunCharts>,
}

#[derive(Serialize)]
struct RunCharts {
    map: String,
    profiles: String,
}

/// The plane drawing and each run's velocity map and profiles of a report model; the maps share
/// one colour scale.
pub(crate) fn report_charts(data: &ReportData) -> Charts {
    let scale = ColourScale::spanning(data.runs.iter().map(|r| r.field.as_slice()));
    Charts {
        plane: plane_svg(&data.plane, &data.units),
        runs: data
            .runs
            .iter()
            .map(|run| RunCharts {
                map: velocity_map_svg(&data.plane, &run.field, &data.units, scale),
                profiles: profiles_svg(&data.plane, &run.field, &data.units),
            })
            .collect(),
    }
}

/// Document metadata and the attachment list the entry point reads from `/meta.json`.
#[derive(Serialize)]
pub(crate) struct Meta<'a> {
    pub(crate) title: &'a str,
    pub(crate) author: Vec<&'a str>,
    pub(crate) keywords: Vec<String>,
    pub(crate) description: String,
    pub(crate) date: MetaDate,
    pub(crate) attachments: Vec<MetaAttachment<'a>>,
}

#[derive(Serialize)]
pub(crate) struct MetaDate {
    year: i32,
    month: u32,
    day: u32,
}

#[derive(Serialize)]
pub(crate) struct MetaAttachment<'a> {
    name: &'a str,
    path: String,
    mime: &'a str,
    description: &'a str,
}

/// The attachment list of `/meta.json`: attachment `i` is served at `/attachments/i`.
pub(crate) fn meta_attachments(attachments: &[Attachment]) -> Vec<MetaAttachment<'_>> {
    attachments
        .iter()
        .enumerate()
        .map(|(i, a)| MetaAttachment {
            name: a.name(),
            path: format!("/attachments/{i}"),
            mime: a.mime(),
            description: a.description(),
        })
        .collect()
}

fn file_id(path: &str) -> Result<FileId, RenderError> {
    let vpath = VirtualPath::new(path)
        .map_err(|e| RenderError::Internal(format!("virtual path `{path}`: {e}")))?;
    Ok(RootedPath::new(VirtualRoot::Project, vpath).intern())
}

pub(crate) fn to_json(value: &impl Serialize) -> Result<Bytes, RenderError> {
    serde_json::to_vec(value)
        .map(Bytes::new)
        .map_err(|e| RenderError::Internal(e.to_string()))
}

/// One compile: sources and binary files by id, the display name of each source, the pinned date.
struct RenderWorld<'a> {
    engine: &'a Engine,
    main: FileId,
    sources: Vec<(Source, String)>,
    files: Vec<(FileId, Bytes)>,
    today: Datetime,
}

impl World for RenderWorld<'_> {
    fn library(&self) -> &LazyHash<Library> {
        &self.engine.library
    }

    fn book(&self) -> &LazyHash<FontBook> {
        &self.engine.book
    }

    fn main(&self) -> FileId {
        self.main
    }

    fn source(&self, id: FileId) -> FileResult<Source> {
        self.sources
            .iter()
            .find(|(s, _)| s.id() == id)
            .map(|(s, _)| s.clone())
            .ok_or_else(|| not_found(id))
    }

    fn file(&self, id: FileId) -> FileResult<Bytes> {
        if let Some((_, bytes)) = self.files.iter().find(|(f, _)| *f == id) {
            return Ok(bytes.clone());
        }
        self.sources
            .iter()
            .find(|(s, _)| s.id() == id)
            .map(|(s, _)| Bytes::from_string(s.text().to_string()))
            .ok_or_else(|| not_found(id))
    }

    fn font(&self, index: usize) -> Option<Font> {
        self.engine.fonts.get(index).cloned()
    }

    fn today(&self, _offset: Option<typst::foundations::Duration>) -> Option<Datetime> {
        Some(self.today)
    }
}

fn not_found(id: FileId) -> FileError {
    FileError::NotFound(id.vpath().get_with_slash().into())
}

impl RenderWorld<'_> {
    fn display_name(&self, id: FileId) -> String {
        self.sources
            .iter()
            .find(|(s, _)| s.id() == id)
            .map(|(_, name)| name.clone())
            .unwrap_or_else(|| id.vpath().get_without_slash().to_string())
    }

    fn resolve(&self, diag: &SourceDiagnostic) -> Diagnostic {
        let (file, line, column) = self.locate(diag.span);
        Diagnostic {
            warning: diag.severity == Severity::Warning,
            file,
            line,
            column,
            message: diag.message.to_string(),
            hints: diag.hints.iter().map(|h| h.v.to_string()).collect(),
        }
    }

    fn locate(&self, span: DiagSpan) -> (Option<String>, Option<usize>, Option<usize>) {
        let Some(id) = span.id() else {
            return (None, None, None);
        };
        let file = Some(self.display_name(id));
        let position = self.range(span).and_then(|range| {
            let source = self.source(id).ok()?;
            source.lines().byte_to_line_column(range.start)
        });
        match position {
            Some((line, col)) => (file, Some(line + 1), Some(col + 1)),
            None => (file, None, None),
        }
    }
}

/// What one compile is made of.
pub(crate) struct Job<'a> {
    pub(crate) template: &'a str,
    pub(crate) template_name: &'a str,
    pub(crate) data: Bytes,
    pub(crate) charts: Bytes,
    pub(crate) meta: Bytes,
    pub(crate) attachments: &'a [Attachment],
    pub(crate) date: chrono::NaiveDate,
    pub(crate) ident: String,
    pub(crate) standard: PdfStandard,
}

impl Engine {
    /// Loads the embedded fonts and builds the standard library. Takes a few milliseconds
    /// (release); build it once and reuse it.
    pub fn new() -> Engine {
        let sans: [&'static [u8]; 4] = [
            dejavu::sans::regular(),
            dejavu::sans::bold(),
            dejavu::sans::oblique(),
            dejavu::sans::bold_oblique(),
        ];
        let fonts: Vec<Font> = typst_assets::fonts()
            .chain(sans)
            .flat_map(|data| Font::iter(Bytes::new(data)))
            .collect();
        let book = FontBook::from_fonts(&fonts);
        Engine {
            library: LazyHash::new(Library::builder().build()),
            book: LazyHash::new(book),
            fonts,
        }
    }

    /// Font families the engine can use (for messages and tests).
    pub fn font_families(&self) -> Vec<String> {
        let mut families: Vec<String> = self
            .book
            .families()
            .map(|(name, _)| name.to_string())
            .collect();
        families.dedup();
        families
    }

    /// Renders the signed-off test report with the built-in template.
    pub fn render_report(
        &self,
        data: &ReportData,
        options: &RenderOptions,
    ) -> Result<Rendered, RenderError> {
        self.report_job(data, options, REPORT_TEMPLATE, REPORT_NAME)
    }

    /// Renders the report with a user template against the same data, charts and attachments.
    /// Diagnostics name the template by `template.display_name`.
    pub fn render_report_with_template(
        &self,
        template: &UserTemplate,
        data: &ReportData,
        options: &RenderOptions,
    ) -> Result<Rendered, RenderError> {
        self.report_job(data, options, &template.text, &template.display_name)
    }

    /// Renders a blank field data sheet for a plane. `date` is the document date (e.g. the planned
    /// test date, or one derived from `SOURCE_DATE_EPOCH`).
    pub fn render_field_sheet(
        &self,
        sheet: &FieldSheetData,
        date: chrono::NaiveDate,
    ) -> Result<Rendered, RenderError> {
        sheet.validate()?;
        let charts = Charts {
            plane: plane_svg(&sheet.plane, &sheet.units),
            runs: Vec::new(),
        };
        let meta = Meta {
            title: &sheet.title,
            author: vec![sheet.software.as_str()],
            keywords: vec!["field data sheet".into(), "velocity traverse".into()],
            description: format!(
                "Blank velocity traverse data sheet: {}",
                sheet.plane_location.as_deref().unwrap_or(&sheet.title)
            ),
            date: meta_date(date),
            attachments: Vec::new(),
        };
        self.run(Job {
            template: FIELD_SHEET_TEMPLATE,
            template_name: FIELD_SHEET_NAME,
            data: to_json(sheet)?,
            charts: to_json(&charts)?,
            meta: to_json(&meta)?,
            attachments: &[],
            date,
            ident: format!(
                "annulus-field-sheet/{}/{}",
                sheet.title,
                sheet.plane_location.as_deref().unwrap_or_default()
            ),
            standard: PdfStandard::A_2b,
        })
    }

    fn report_job(
        &self,
        data: &ReportData,
        options: &RenderOptions,
        template: &str,
        template_name: &str,
    ) -> Result<Rendered, RenderError> {
        data.validate()?;
        check_unique(&options.attachments)?;
        let charts = report_charts(data);
        let h = &data.header;
        let mut author = vec![data.signoff.tested_by.as_str()];
        if !data.signoff.organisation.is_empty() {
            author.push(data.signoff.organisation.as_str());
        }
        author.retain(|a| !a.trim().is_empty());
        let meta = Meta {
            title: &h.title,
            author,
            keywords: vec![
                "velocity traverse".into(),
                "flow test report".into(),
                data.conditions.convention_id.clone(),
                h.report_id.clone(),
                format!("sha256:{}", h.content_sha256),
            ],
            description: format!(
                "Flow test report {} — {}, {}; content SHA-256 {}",
                h.report_id, h.site, h.plane_location, h.content_sha256
            ),
            date: meta_date(options.date),
            attachments: meta_attachments(&options.attachments),
        };
        self.run(Job {
            template,
            template_name,
            data: to_json(data)?,
            charts: to_json(&charts)?,
            meta: to_json(&meta)?,
            attachments: &options.attachments,
            date: options.date,
            ident: format!("annulus-report/{}/{}", h.report_id, h.content_sha256),
            standard: PdfStandard::A_3b,
        })
    }

    /// Compiles and exports one job in a world that serves exactly its files.
    pub(crate) fn run(&self, job: Job<'_>) -> Result<Rendered, RenderError> {
        use chrono::Datelike;
        let today = u8::try_from(job.date.month())
            .ok()
            .zip(u8::try_from(job.date.day()).ok())
            .and_then(|(m, d)| Datetime::from_ymd(job.date.year(), m, d))
            .ok_or(RenderError::Date { date: job.date })?;
        let main = file_id("/main.typ")?;
        let template = file_id("/template.typ")?;
        let mut files = vec![
            (file_id("/data.json")?, job.data),
            (file_id("/charts.json")?, job.charts),
            (file_id("/meta.json")?, job.meta),
        ];
        for (i, a) in job.attachments.iter().enumerate() {
            files.push((
                file_id(&format!("/attachments/{i}"))?,
                Bytes::new(a.bytes().to_vec()),
            ));
        }
        let world = RenderWorld {
            engine: self,
            main,
            sources: vec![
                (Source::new(main, MAIN.to_string()), MAIN_NAME.to_string()),
                (
                    Source::new(template, job.template.to_string()),
                    job.template_name.to_string(),
                ),
            ],
            files,
            today,
        };
        let result = compile_and_export(&world, job.ident, job.standard);
        // Free the memoisation caches of this render; a batch would otherwise keep growing.
        typst::comemo::evict(0);
        result
    }
}

pub(crate) fn meta_date(date: chrono::NaiveDate) -> MetaDate {
    use chrono::Datelike;
    MetaDate {
        year: date.year(),
        month: date.month(),
        day: date.day(),
    }
}

fn compile_and_export(
    world: &RenderWorld<'_>,
    ident: String,
    standard: PdfStandard,
) -> Result<Rendered, RenderError> {
    let Warned { output, warnings } = typst::compile::<PagedDocument>(world);
    let warnings: Vec<Diagnostic> = warnings.iter().map(|d| world.resolve(d)).collect();
    let document = output.map_err(|errors| {
        RenderError::Template(errors.iter().map(|d| world.resolve(d)).collect())
    })?;
    // The layout's memoisation caches are not needed for the export: freed here, they do not add
    // to the export's peak (a few per cent of a 1,600-point report's peak, measured with
    // benches/timing.py's grid; the caches are freed again after the export for batches).
    typst::comemo::evict(0);
    let standards = PdfStandards::new(&[standard])
        .map_err(|e| RenderError::Internal(format!("PDF standard: {}", e.message())))?;
    let options = PdfOptions {
        ident: Smart::Custom(ident),
        creator: Smart::Custom(Some(format!("annulus {}", env!("CARGO_PKG_VERSION")))),
        timestamp: None,
        page_ranges: None,
        standards,
        tagged: true,
        pretty: false,
    };
    let pdf = typst_pdf::pdf(&document, &options)
        .map_err(|errors| RenderError::Export(errors.iter().map(|d| world.resolve(d)).collect()))?;
    Ok(Rendered { pdf, warnings })
}
