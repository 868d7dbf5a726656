//! Generic documents: render any layout template against a typed presentation model, with
//! metadata and embedded files, for the PDFs that are not the flow test report.
//!
//! Owns the [`Presentation`] trait (a typed model that knows its template and its PDF metadata),
//! [`Engine::render`] and the lower-level [`Document`] description. The models live beside it:
//! [`super::certificate::Certificate`] (the pitot calibration certificate) and
//! [`super::rata::RataSummary`] (the RATA summary). A new document (the system submittal, say) is a
//! struct in its own file under `report/` implementing [`Presentation`], with its template in
//! `templates/`. Must not compute, read files or look at the clock: the caller gives the model
//! (numbers already formatted), the document date and the attachment bytes.
//!
//! The world a document compiles in has the same shape as the report's (see [`super::engine`]):
//!
//! | path | content |
//! |---|---|
//! | `/main.typ` | entry point: `set document(…)`, the template, then `pdf.attach` per attachment |
//! | `/template.typ` | the layout template |
//! | `/data.json` | the presentation model |
//! | `/meta.json` | metadata and the attachment list |
//! | `/attachments/N` | the bytes of attachment N |
//!
//! As for the report, the entry point (not the template) sets the metadata and embeds the files,
//! and `World::today` answers with the document date. Documents are PDF/A-3b (ISO 19005-3), the
//! archival profile that allows embedded files.
//!
//! It is compiled by the engine's own job runner (same fonts, same world, same entry point).

use typst_pdf::PdfStandard;

use super::attach::{check_unique, Attachment};
use super::engine::{
    meta_attachments, meta_date, to_json, Engine, Job, Meta, RenderError, Rendered,
};
use typst::foundations::Bytes;

/// The PDF metadata of a document.
#[derive(Debug, Clone, PartialEq)]
pub struct DocumentMeta {
    pub title: String,
    /// Authors; empty entries are dropped.
    pub author: Vec<String>,
    pub keywords: Vec<String>,
    pub description: String,
    /// Stable PDF identifier seed (`PdfOptions::ident`): the same for the same document.
    pub ident: String,
    /// Document date (and Typst's "today"). Never the clock.
    pub date: chrono::NaiveDate,
}

/// A typed presentation model with its built-in template: what [`Engine::render`] lays out.
pub trait Presentation: serde::Serialize {
    /// The built-in layout template (Typst text reading `json("/data.json")`).
    const TEMPLATE: &'static str;
    /// The template's name in diagnostics, e.g. `calibration.typ`.
    const TEMPLATE_NAME: &'static str;
    /// The document's PDF metadata.
    fn meta(&self) -> DocumentMeta;
}

/// A document to render: a template, its data and metadata, and the files to embed.
#[derive(Debug, Clone)]
pub struct Document {
    /// Typst layout text; reads `json("/data.json")`.
    pub template: String,
    /// Name diagnostics give the template (`calibration.typ`).
    pub template_name: String,
    /// The data the template lays out, as JSON bytes (numbers already formatted as strings).
    pub data: Vec<u8>,
    pub meta: DocumentMeta,
    pub attachments: Vec<Attachment>,
}

impl Engine {
    /// Renders a typed presentation model with its built-in template, embedding `attachments`.
    pub fn render<P: Presentation>(
        &self,
        model: &P,
        attachments: Vec<Attachment>,
    ) -> Result<Rendered, RenderError> {
        let data = serde_json::to_vec(model).map_err(|e| RenderError::Internal(e.to_string()))?;
        self.render_document(&Document {
            template: P::TEMPLATE.to_string(),
            template_name: P::TEMPLATE_NAME.to_string(),
            data,
            meta: model.meta(),
            attachments,
        })
    }
}

impl Engine {
    /// Renders `doc` to a PDF/A-3b file. The output is byte-identical for the same document.
    pub fn render_document(&self, doc: &Document) -> Result<Rendered, RenderError> {
        check_unique(&doc.attachments)?;
        let m = &doc.meta;
        let meta = Meta {
            title: &m.title,
            author: m
                .author
                .iter()
                .map(String::as_str)
                .filter(|a| !a.trim().is_empty())
                .collect(),
            keywords: m.keywords.clone(),
            description: m.description.clone(),
            date: meta_date(m.date),
            attachments: meta_attachments(&doc.attachments),
        };
        self.run(Job {
            template: &doc.template,
            template_name: &doc.template_name,
            data: Bytes::new(doc.data.clone()),
            charts: Bytes::new(b"{}".to_vec()),
            meta: to_json(&meta)?,
            attachments: &doc.attachments,
            date: m.date,
            ident: m.ident.clone(),
            standard: PdfStandard::A_3b,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::embedded_files;

    fn doc(template: &str) -> Document {
        Document {
            template: template.to_string(),
            template_name: "t.typ".into(),
            data: br#"{ "greeting": "hello from data" }"#.to_vec(),
            meta: DocumentMeta {
                title: "A test document".into(),
                author: vec!["Tester".into(), " ".into()],
                keywords: vec!["test".into()],
                description: "A document made by a test".into(),
                ident: "annulus-test/1".into(),
                date: chrono::NaiveDate::from_ymd_opt(2026, 5, 11).expect("valid date"),
            },
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
