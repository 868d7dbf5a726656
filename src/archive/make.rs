//! Making a sealed flow test report: the one path `annulus report` takes and `annulus verify`
//! re-renders through, so a re-render is the same computation as the original.
//!
//! Owns [`render_report`] (pack the inputs and results, fill the manifest with the document's
//! kind, renderer, document date, signer and template, lay the pages out with a placeholder seal)
//! and [`make_report`] (render, then seal and sign). Must not read files, print or look at the
//! clock: the caller gives the evaluated survey, the template text, the document date and the key.

use super::bundle::pack;
use super::keys::SecretKey;
use super::manifest::{DocKind, Manifest, SignerEntry};
use super::seal::{placeholder, seal_pdf, SealError};
use super::sha256_hex;
use crate::assess::Assessment;
use crate::pipeline::Evaluation;
use crate::report::build::{report_data, Identity};
use crate::report::certificate::Certificate;
use crate::report::documents::Presentation;
use crate::report::engine::REPORT_TEMPLATE;
use crate::report::rata::RataSummary;
use crate::report::{AttachmentError, Engine, RenderError, RenderOptions, UserTemplate};
use crate::results::ResultsDoc;
use std::fmt;

/// This program, as a manifest names it.
pub fn program() -> String {
    format!("annulus {}", env!("CARGO_PKG_VERSION"))
}

/// What lays a document of `kind` out: this program and a digest of its built-in template. Two
/// renders are byte-identical only when this matches (a firm's own template is embedded and
/// re-used as it is).
pub fn renderer_id(kind: DocKind) -> String {
    let template = match kind {
        DocKind::Report => REPORT_TEMPLATE,
        DocKind::Calibration => Certificate::TEMPLATE,
        DocKind::Rata => RataSummary::TEMPLATE,
        DocKind::Submittal => crate::report::submittal::SUBMITTAL_TEMPLATE,
    };
    format!(
        "{} (built-in {} template {})",
        program(),
        kind.name(),
        &sha256_hex(template.as_bytes())[..12]
    )
}

/// The results document as a report embeds it: pretty JSON with a final newline.
pub fn results_bytes(doc: &ResultsDoc) -> Vec<u8> {
    let mut v = serde_json::to_vec_pretty(doc).unwrap_or_default();
    v.push(b'\n');
    v
}

/// Everything a report is made from besides the evaluated survey.
#[derive(Debug, Clone)]
pub struct ReportSettings<'a> {
    /// A firm's own template (embedded in the report so it can be re-rendered).
    pub template: Option<&'a UserTemplate>,
    /// The date written into the PDF.
    pub document_date: chrono::NaiveDate,
    /// Who signs: the name printed in the sign-off block and the public key.
    pub signer: Option<SignerEntry>,
    /// The user configuration's firm, technician and certificate for a sign-off the inputs leave
    /// empty (recorded in the manifest when any is given).
    pub defaults: crate::config::SignoffDefaults,
}

/// A report laid out with a placeholder seal.
#[derive(Debug, Clone)]
pub struct Unsealed {
    pub pdf: Vec<u8>,
    pub manifest: Manifest,
    pub warnings: Vec<crate::report::Diagnostic>,
}

/// Why a report could not be made.
#[derive(Debug, Clone)]
pub enum MakeError {
    /// The template did not compile or the PDF could not be written by the engine.
    Render(RenderError),
    Attachment(AttachmentError),
    Seal(SealError),
}

impl fmt::Display for MakeError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            MakeError::Render(e) => write!(f, "{e}"),
            MakeError::Attachment(e) => write!(f, "cannot embed the data files: {e}"),
            MakeError::Seal(e) => write!(f, "{e}"),
        }
    }
}

impl std::error::Error for MakeError {}

/// The template's attachment name: its file name, or `template.typ`.
fn template_name(t: &UserTemplate) -> String {
    std::path::Path::new(&t.display_name)
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .filter(|n| !n.starts_with('.') && !n.is_empty())
        .unwrap_or_else(|| "template.typ".to_string())
}

/// Lays out the report of an evaluated survey with a placeholder seal.
pub fn render_report(
    engine: &Engine,
    e: &Evaluation,
    a: &Assessment,
    settings: &ReportSettings<'_>,
) -> Result<Unsealed, MakeError> {
    let doc = ResultsDoc::new(e, a);
    let mut bundle = pack(&e.loaded, results_bytes(&doc), &program());
    if let Some(t) = settings.template {
        let name = template_name(t);
        bundle.add(
            &name,
            &name,
            "template",
            t.text.clone().into_bytes(),
            "template",
        );
    }
    let m = &mut bundle.manifest;
    m.kind = Some(DocKind::Report);
    m.renderer = Some(renderer_id(DocKind::Report));
    m.document_date = Some(settings.document_date.to_string());
    m.signer = settings.signer.clone();
    m.defaults = (!settings.defaults.is_empty()).then(|| settings.defaults.clone());
    let manifest = bundle.manifest.clone();
    let identity = identity(&manifest, settings.signer.as_ref(), &settings.defaults);
    let data = report_data(e, a, &identity);
    let mut attachments = bundle.attachments().map_err(MakeError::Attachment)?;
    attachments.push(placeholder().map_err(MakeError::Attachment)?);
    let options = RenderOptions {
        date: settings.document_date,
        attachments,
    };
    let rendered = match settings.template {
        Some(t) => engine.render_report_with_template(t, &data, &options),
        None => engine.render_report(&data, &options),
    }
    .map_err(MakeError::Render)?;
    Ok(Unsealed {
        pdf: rendered.pdf,
        manifest,
        warnings: rendered.warnings,
    })
}

/// A finished report: the sealed PDF and what was printed about it.
#[derive(Debug, Clone)]
pub struct Made {
    pub pdf: Vec<u8>,
    pub manifest: Manifest,
    pub warnings: Vec<crate::report::Diagnostic>,
}

/// Renders, seals and (with `key`) signs a report. `settings.signer` must name `key`'s public
/// half when a key is given.
pub fn make_report(
    engine: &Engine,
    e: &Evaluation,
    a: &Assessment,
    settings: &ReportSettings<'_>,
    key: Option<&SecretKey>,
) -> Result<Made, MakeError> {
    let u = render_report(engine, e, a, settings)?;
    let pdf = seal_pdf(&u.pdf, &u.manifest.fingerprint(), key).map_err(MakeError::Seal)?;
    Ok(Made {
        pdf,
        manifest: u.manifest,
        warnings: u.warnings,
    })
}

/// One embedded input of a certificate or RATA summary: its attachment name, role and path (as
/// its loader resolves it, relative to the main file's folder).
pub type InputRole = (String, &'static str, String);

/// Renders a calibration certificate or RATA summary whose attachments are its inputs, adding the
/// results, the manifest and the seal (unsigned), so `annulus verify` checks it like a report.
pub fn seal_document(
    engine: &Engine,
    mut doc: crate::report::documents::Document,
    kind: DocKind,
    inputs: &[InputRole],
    results: Vec<u8>,
) -> Result<Vec<u8>, MakeError> {
    use super::manifest::{MANIFEST_NAME, RESULTS_NAME};
    use crate::report::Attachment;
    let mut files = Vec::new();
    for a in &doc.attachments {
        let (role, path) = inputs
            .iter()
            .find(|(n, _, _)| n == a.name())
            .map(|(_, r, p)| (*r, p.clone()))
            .unwrap_or(("input", a.name().to_string()));
        files.push(Manifest::entry(a.name(), &path, role, a.bytes()));
    }
    files.push(Manifest::entry(
        RESULTS_NAME,
        RESULTS_NAME,
        "results",
        &results,
    ));
    doc.attachments.push(
        Attachment::new(
            RESULTS_NAME,
            results,
            "application/json",
            "results as computed from the embedded inputs (SI)",
        )
        .map_err(MakeError::Attachment)?,
    );
    let mut m = Manifest::new(&program(), "", &doc.meta.date.to_string(), files);
    m.kind = Some(kind);
    m.renderer = Some(renderer_id(kind));
    m.document_date = Some(doc.meta.date.to_string());
    doc.attachments.push(
        Attachment::new(
            MANIFEST_NAME,
            m.canonical_bytes(),
            "application/json",
            "manifest: SHA-256 of every embedded file; its own SHA-256 is the content fingerprint",
        )
        .map_err(MakeError::Attachment)?,
    );
    doc.attachments
        .push(placeholder().map_err(MakeError::Attachment)?);
    let rendered = engine.render_document(&doc).map_err(MakeError::Render)?;
    seal_pdf(&rendered.pdf, &m.fingerprint(), None).map_err(MakeError::Seal)
}

/// [`seal_document`] for a typed presentation model laid out with its built-in template (the
/// calibration certificate, the RATA summary).
pub fn seal_presentation<P: Presentation>(
    engine: &Engine,
    model: &P,
    attachments: Vec<crate::report::Attachment>,
    kind: DocKind,
    inputs: &[InputRole],
    results: Vec<u8>,
) -> Result<Vec<u8>, MakeError> {
    let data = serde_json::to_vec(model)
        .map_err(|e| MakeError::Render(RenderError::Internal(e.to_string())))?;
    let doc = crate::report::documents::Document {
        template: P::TEMPLATE.to_string(),
        template_name: P::TEMPLATE_NAME.to_string(),
        data,
        meta: model.meta(),
        attachments,
    };
    seal_document(engine, doc, kind, inputs, results)
}

/// The inputs and results a calibration certificate embeds.
pub fn calibration_inputs(
    c: &crate::input::calibration_file::LoadedCalibration,
) -> (Vec<InputRole>, Vec<u8>) {
    let dir = c.file.path.parent().unwrap_or(std::path::Path::new(""));
    let readings_path = c
        .readings_file
        .path
        .strip_prefix(dir)
        .map(|p| p.to_string_lossy().into_owned())
        .unwrap_or_else(|_| c.readings_file.name.clone());
    let inputs = vec![
        (c.file.name.clone(), "calibration", c.file.name.clone()),
        (
            c.readings_file.name.clone(),
            "calibration-readings",
            readings_path,
        ),
    ];
    let summary = super::verify::documents::CalibrationResults::of(c);
    (inputs, super::verify::documents::results_bytes(&summary))
}

/// The inputs and results a RATA summary embeds (its attachments other than the RATA file are
/// the survey files it references).
pub fn rata_inputs(r: &crate::pipeline::rata::RataEvaluation) -> (Vec<InputRole>, Vec<u8>) {
    let inputs = vec![(r.file.name.clone(), "rata", r.file.name.clone())];
    let summary = super::verify::documents::RataResults::of_evaluation(r);
    (inputs, super::verify::documents::results_bytes(&summary))
}

/// The identity block of a document made from `manifest`: its id and content digest, the signer
/// the sign-off names, and the configuration's names for a sign-off the inputs leave empty.
pub(super) fn identity(
    manifest: &Manifest,
    signer: Option<&SignerEntry>,
    defaults: &crate::config::SignoffDefaults,
) -> Identity {
    Identity {
        report_id: manifest.report_id(),
        content_sha256: manifest.fingerprint(),
        signer_key_fingerprint: signer.and_then(SignerEntry::key).map(|k| k.fingerprint()),
        signer_name: signer.map(|s| s.name.clone()),
        defaults: defaults.clone(),
    }
}
