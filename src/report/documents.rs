//! Generic documents: render any layout template against a JSON value, with metadata and embedded
//! files, for the PDFs that are not the flow test report (the pitot calibration certificate, the
//! RATA summary).
//!
//! Owns the [`Document`] description and [`Engine::render_document`]. Must not compute, read
//! files or look at the clock: the caller gives the template text, the data (numbers already
//! formatted), the document date and the attachment bytes.
//!
//! The world a document compiles in has the same shape as the report's (see [`super::engine`]):
//!
//! | path | content |
//! |---|---|
//! | `/main.typ` | entry point: `set document(…)`, the template, then `pdf.attach` per attachment |
//! | `/template.typ` | the layout template |
//! | `/data.json` | [`Document::data`] |
//! | `/meta.json` | metadata and the attachment list |
//! | `/attachments/N` | the bytes of attachment N |
//!
//! As for the report, the entry point (not the template) sets the metadata and embeds the files,
//! and `World::today` answers with the document date. Documents are PDF/A-3b (ISO 19005-3), the
//! archival profile that allows embedded files.
//!
//! The engine's own world, fonts and library are private to [`super::engine`], so this module
//! keeps a second, lazily built set of the same fonts (typst-assets plus DejaVu Sans) and library.
//! When `engine.rs` exposes a hook for arbitrary data, [`Engine::render_document`] should call it
//! instead and the world below goes away.

use std::sync::OnceLock;

use chrono::Datelike;
use serde::Serialize;
use typst::diag::{FileError, FileResult, Severity, SourceDiagnostic, Warned};
use typst::foundations::{Bytes, Datetime, Smart};
use typst::syntax::{FileId, RootedPath, Source, VirtualPath, VirtualRoot};
use typst::text::{Font, FontBook};
use typst::utils::LazyHash;
use typst::{Library, LibraryExt, World, WorldExt};
use typst_layout::PagedDocument;
use typst_pdf::{PdfOptions, PdfStandard, PdfStandards};

use super::attach::{check_unique, Attachment};
use super::engine::{Diagnostic, Engine, RenderError, Rendered};

/// The built-in Type S pitot calibration certificate.
pub const CALIBRATION_TEMPLATE: &str = include_str!("../../templates/calibration.typ");
/// The built-in RATA summary.
pub const RATA_TEMPLATE: &str = include_str!("../../templates/rata.typ");

/// Entry point: metadata and attachments come from here, so a template cannot drop them.
const MAIN: &str = r#"// annulus document entry point: metadata and attachments; the layout is in /template.typ.
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
const MAIN_NAME: &str = "annulus-document.typ";

/// A document to render.
#[derive(Debug, Clone)]
pub struct Document {
    /// Typst layout text; reads `json("/data.json")`.
    pub template: String,
    /// Name diagnostics give the template (`calibration.typ`).
    pub template_name: String,
    /// The data the template lays out (numbers already formatted as strings).
    pub data: serde_json::Value,
    pub title: String,
    /// Authors; empty entries are dropped.
    pub author: Vec<String>,
    pub keywords: Vec<String>,
    pub description: String,
    /// Stable PDF identifier seed (`PdfOptions::ident`): the same for the same document.
    pub ident: String,
    /// Document date (and Typst's "today"). Never the clock.
    pub date: chrono::NaiveDate,
    pub attachments: Vec<Attachment>,
}

#[derive(Serialize)]
struct Meta<'a> {
    title: &'a str,
    author: Vec<&'a str>,
    keywords: &'a [String],
    description: &'a str,
    date: MetaDate,
    attachments: Vec<MetaAttachment<'a>>,
}

#[derive(Serialize)]
struct MetaDate {
    year: i32,
    month: u32,
    day: u32,
}

#[derive(Serialize)]
struct MetaAttachment<'a> {
    name: &'a str,
    path: String,
    mime: &'a str,
    description: &'a str,
}

/// Fonts and the standard library, built once per process.
struct Toolkit {
    library: LazyHash<Library>,
    book: LazyHash<FontBook>,
    fonts: Vec<Font>,
}

fn toolkit() -> &'static Toolkit {
    static TOOLKIT: OnceLock<Toolkit> = OnceLock::new();
    TOOLKIT.get_or_init(|| {
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
        Toolkit {
            library: LazyHash::new(Library::builder().build()),
            book: LazyHash::new(FontBook::from_fonts(&fonts)),
            fonts,
        }
    })
}

struct DocWorld {
    kit: &'static Toolkit,
    main: FileId,
    sources: Vec<(Source, String)>,
    files: Vec<(FileId, Bytes)>,
    today: Datetime,
}

fn file_id(path: &str) -> Result<FileId, RenderError> {
    let vpath = VirtualPath::new(path)
        .map_err(|e| RenderError::Internal(format!("virtual path `{path}`: {e}")))?;
    Ok(RootedPath::new(VirtualRoot::Project, vpath).intern())
}

fn not_found(id: FileId) -> FileError {
    FileError::NotFound(id.vpath().get_with_slash().into())
}

impl World for DocWorld {
    fn library(&self) -> &LazyHash<Library> {
        &self.kit.library
    }

    fn book(&self) -> &LazyHash<FontBook> {
        &self.kit.book
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
        self.kit.fonts.get(index).cloned()
    }

    fn today(&self, _offset: Option<typst::foundations::Duration>) -> Option<Datetime> {
        Some(self.today)
    }
}

impl DocWorld {
    fn resolve(&self, diag: &SourceDiagnostic) -> Diagnostic {
        let (file, line, column) = match diag.span.id() {
            None => (None, None, None),
            Some(id) => {
                let name = self
                    .sources
                    .iter()
                    .find(|(s, _)| s.id() == id)
                    .map(|(_, n)| n.clone())
                    .unwrap_or_else(|| id.vpath().get_without_slash().to_string());
                let position = self.range(diag.span).and_then(|range| {
                    self.source(id)
                        .ok()?
                        .lines()
                        .byte_to_line_column(range.start)
                });
                match position {
                    Some((l, c)) => (Some(name), Some(l + 1), Some(c + 1)),
                    None => (Some(name), None, None),
                }
            }
        };
        Diagnostic {
            warning: diag.severity == Severity::Warning,
            file,
            line,
            column,
            message: diag.message.to_string(),
            hints: diag.hints.iter().map(|h| h.v.to_string()).collect(),
        }
    }
}

fn to_json(value: &impl Serialize) -> Result<Bytes, RenderError> {
    serde_json::to_vec(value)
        .map(Bytes::new)
        .map_err(|e| RenderError::Internal(e.to_string()))
}

impl Engine {
    /// Renders `doc` to a PDF/A-3b file. The output is byte-identical for the same document.
    pub fn render_document(&self, doc: &Document) -> Result<Rendered, RenderError> {
        check_unique(&doc.attachments)?;
        let today = u8::try_from(doc.date.month())
            .ok()
            .zip(u8::try_from(doc.date.day()).ok())
            .and_then(|(m, d)| Datetime::from_ymd(doc.date.year(), m, d))
            .ok_or(RenderError::Date { date: doc.date })?;
        let meta = Meta {
            title: &doc.title,
            author: doc
                .author
                .iter()
                .map(String::as_str)
                .filter(|a| !a.trim().is_empty())
                .collect(),
            keywords: &doc.keywords,
            description: &doc.description,
            date: MetaDate {
                year: doc.date.year(),
                month: doc.date.month(),
                day: doc.date.day(),
            },
            attachments: doc
                .attachments
                .iter()
                .enumerate()
                .map(|(i, a)| MetaAttachment {
                    name: a.name(),
                    path: format!("/attachments/{i}"),
                    mime: a.mime(),
                    description: a.description(),
                })
                .collect(),
        };
        let main = file_id("/main.typ")?;
        let template = file_id("/template.typ")?;
        let mut files = vec![
            (file_id("/data.json")?, to_json(&doc.data)?),
            (file_id("/meta.json")?, to_json(&meta)?),
        ];
        for (i, a) in doc.attachments.iter().enumerate() {
            files.push((
                file_id(&format!("/attachments/{i}"))?,
                Bytes::new(a.bytes().to_vec()),
            ));
        }
        let world = DocWorld {
            kit: toolkit(),
            main,
            sources: vec![
                (Source::new(main, MAIN.to_string()), MAIN_NAME.to_string()),
                (
                    Source::new(template, doc.template.clone()),
                    doc.template_name.clone(),
                ),
            ],
            files,
            today,
        };
        let result = compile_and_export(&world, doc.ident.clone());
        // Free this render's memoisation caches (a batch would otherwise keep growing).
        typst::comemo::evict(0);
        result
    }
}

fn compile_and_export(world: &DocWorld, ident: String) -> Result<Rendered, RenderError> {
    let Warned { output, warnings } = typst::compile::<PagedDocument>(world);
    let warnings: Vec<Diagnostic> = warnings.iter().map(|d| world.resolve(d)).collect();
    let document = output.map_err(|errors| {
        RenderError::Template(errors.iter().map(|d| world.resolve(d)).collect())
    })?;
    let standards = PdfStandards::new(&[PdfStandard::A_3b])
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::embedded_files;

    fn doc(template: &str) -> Document {
        Document {
            template: template.to_string(),
            template_name: "t.typ".into(),
            data: serde_json::json!({ "greeting": "hello from data" }),
            title: "A test document".into(),
            author: vec!["Tester".into(), " ".into()],
            keywords: vec!["test".into()],
            description: "A document made by a test".into(),
            ident: "annulus-test/1".into(),
            date: chrono::NaiveDate::from_ymd_opt(2026, 5, 11).expect("valid date"),
            attachments: vec![Attachment::new(
                "data.csv",
                b"a,b\n1,2\n".to_vec(),
                "text/csv",
                "test data",
            )
            .expect("valid attachment")],
        }
    }

    #[test]
    fn renders_data_and_embeds_attachments_reproducibly() {
        let engine = Engine::new();
        let d = doc(
            "#let data = json(\"/data.json\")\n#set text(font: \"DejaVu Sans\")\n#data.greeting\n",
        );
        let a = engine.render_document(&d).expect("renders");
        assert!(a.warnings.is_empty(), "{:?}", a.warnings);
        assert!(a.pdf.starts_with(b"%PDF-"));
        let files = embedded_files(&a.pdf).expect("readable");
        assert_eq!(files.len(), 1);
        assert_eq!(files[0].name, "data.csv");
        assert_eq!(files[0].bytes, b"a,b\n1,2\n");
        let b = engine.render_document(&d).expect("renders");
        assert_eq!(a.pdf, b.pdf, "same document, same bytes");
    }

    #[test]
    fn template_errors_are_located() {
        let engine = Engine::new();
        let Err(RenderError::Template(diags)) = engine.render_document(&doc("ok\n#let x = (\n"))
        else {
            panic!("compiled a broken template")
        };
        assert_eq!(diags[0].file.as_deref(), Some("t.typ"));
        assert_eq!(diags[0].line, Some(2));
    }

    #[test]
    fn duplicate_attachment_names_are_refused() {
        let mut d = doc("x");
        d.attachments.push(d.attachments[0].clone());
        assert!(matches!(
            Engine::new().render_document(&d),
            Err(RenderError::Attachment(_))
        ));
    }
}
