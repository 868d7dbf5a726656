//! Verification of a finished document (flow test report, calibration certificate, RATA summary):
//! is what a reader sees what was sealed, do the results follow from the embedded inputs, and who
//! signed it?
//!
//! Owns the judgement [`verify`] makes on the bytes of a PDF, in four separate answers:
//!
//! - **content** — `intact`, `altered` or `damaged`. The file must be one revision ending at its
//!   own end of file (an appended update is named); every part a reader sees (each page's content
//!   and annotations, each document information entry, the XMP metadata, each embedded file, the
//!   rest of the catalog) must match the digest the seal records ([`crate::archive::seal`]); every
//!   embedded file must match the manifest; and, when a re-render is done, every part must match
//!   what the embedded inputs render to ([`rerender`]). Each difference is named ("page 1
//!   content", "an annotation on page 2", "document information: Author").
//! - **signature** — trusted / unknown-key / unsigned / invalid ([`signer`]).
//! - **recomputation** — the results re-derived from the embedded inputs and compared value by
//!   value with the embedded results ([`recompute`]).
//! - **re-rendering** — done when the seal alone cannot settle the question (see
//!   [`RerenderPolicy`]).
//!
//! A document is *verified* when its content is intact, its results are reproduced and its
//! signature counts under the trust policy (with a trust list in force: trusted only).
//!
//! Must not read files, print or look at the clock: the caller hands in the PDF bytes, the trust
//! list and the policy. Reading is bounded ([`crate::pdf::Limits`]): a hostile file ends
//! as `damaged` with the cap it hit.

pub mod documents;
pub mod files;
pub mod recompute;
pub mod rerender;
pub mod signer;

pub use files::{FileCheck, FileState};
pub use recompute::{numbers_agree, Difference, Recomputation, Recomputed, REL_TOL};
pub use rerender::{RerenderPolicy, Rerendering};
pub use signer::{SignatureReport, SignatureStatus, TrustPolicy};

use super::manifest::{
    DocKind, Manifest, Signature, FORMAT, FORMAT_V1, MANIFEST_NAME, SIGNATURE_NAME,
};
use super::seal::{Seal, SealSignatureState, SEAL_FORMAT, SEAL_NAME};
use super::sha256_hex;
use super::trust::TrustList;
use crate::assess::Verdict;
use crate::pdf::parts::{compare, document_parts, DocumentParts};
use crate::pdf::{files::embedded, looks_like_pdf, Limits, Pdf, PdfError};
use serde::Serialize;
use std::collections::HashMap;
use std::fmt;

/// Why the bytes are not a document of ours (`annulus verify` exits with 1).
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "reason", rename_all = "kebab-case")]
pub enum NotAReport {
    /// Not a PDF at all.
    NotPdf { detail: String },
    /// A PDF without an annulus manifest or seal among its attachments.
    NoManifest { attachments: Vec<String> },
}

impl fmt::Display for NotAReport {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            NotAReport::NotPdf { detail } => write!(f, "not a PDF ({detail})"),
            NotAReport::NoManifest { attachments } if attachments.is_empty() => write!(
                f,
                "a PDF, but not an annulus report: it has no embedded files (no `{MANIFEST_NAME}`)"
            ),
            NotAReport::NoManifest { attachments } => write!(
                f,
                "a PDF, but not an annulus report: no `{MANIFEST_NAME}` among its {} embedded file{} ({})",
                attachments.len(),
                if attachments.len() == 1 { "" } else { "s" },
                attachments.join(", ")
            ),
        }
    }
}

impl std::error::Error for NotAReport {}

/// Whether what a reader sees is what was sealed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum ContentState {
    Intact,
    Altered,
    /// The file cannot be read as a whole (truncated, broken structure, beyond a reading cap).
    Damaged,
}

impl ContentState {
    pub fn name(self) -> &'static str {
        match self {
            ContentState::Intact => "intact",
            ContentState::Altered => "altered",
            ContentState::Damaged => "damaged",
        }
    }
}

/// What the pages were checked against.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum PagesBasis {
    /// Re-rendered from the embedded inputs and found identical.
    Rerendered,
    /// The seal, with a valid signature.
    SignedSeal,
    /// The seal without a (valid) signature: it catches edits but anyone can recompute it.
    UnsignedSeal,
    /// Nothing: a first-format report, which sealed only its embedded files.
    NotCovered,
}

impl PagesBasis {
    pub fn describe(self) -> &'static str {
        match self {
            PagesBasis::Rerendered => "a re-rendering from the embedded inputs",
            PagesBasis::SignedSeal => "the signed seal",
            PagesBasis::UnsignedSeal => {
                "an unsigned seal only (it catches edits, but whoever edits can recompute it)"
            }
            PagesBasis::NotCovered => {
                "nothing: this report was made before pages were sealed (only its embedded files are covered)"
            }
        }
    }
}

/// One thing found changed, in words, with what found it.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct ContentChange {
    /// `seal`, `re-render`, `manifest` or `file structure`.
    pub found_by: &'static str,
    pub what: String,
}

/// Everything verification found about one document.
#[derive(Debug, Clone, Serialize)]
pub struct Verification {
    /// `report`, `calibration` or `rata`.
    pub kind: Option<DocKind>,
    /// `AN-…` id from the manifest (absent when the manifest is unreadable).
    pub report_id: Option<String>,
    /// SHA-256 of the embedded manifest: the content fingerprint printed on every page.
    pub content_sha256: Option<String>,
    /// The program the manifest says made the document.
    pub made_by: Option<String>,
    /// This program.
    pub verified_by: String,
    pub convention: Option<String>,
    pub survey_date: Option<String>,
    pub content: ContentState,
    /// Every part found changed (empty when intact).
    pub changes: Vec<ContentChange>,
    /// Why the file counts as damaged.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub damage: Option<String>,
    /// What the pages were checked against.
    pub pages: PagesBasis,
    pub signature: SignatureReport,
    /// Why the manifest itself is not usable, when it is not.
    pub manifest_problem: Option<String>,
    /// Manifest entries in manifest order, then attachments the manifest does not list.
    pub files: Vec<FileCheck>,
    pub recomputation: Recomputation,
    pub rerendering: Rerendering,
    /// The verdict of the recomputed acceptance checks (what the report should show).
    pub checks_verdict: Option<Verdict>,
    /// Content intact, results reproduced and the signature counts.
    pub verified: bool,
    #[serde(skip)]
    pub recomputed: Option<Box<Recomputed>>,
    /// The identity fields of the embedded survey (title, site …) for reviews.
    #[serde(skip)]
    pub identity: Option<documents::Identity>,
    /// SHA-256 of each embedded input by role (for matching a report to the survey beside it).
    #[serde(skip)]
    pub inputs: Vec<(String, String, String)>,
}

/// How to verify.
#[derive(Debug, Clone, Copy)]
pub struct VerifyOptions<'a> {
    pub trust: TrustPolicy<'a>,
    pub rerender: RerenderPolicy,
    pub limits: Limits,
}

impl<'a> VerifyOptions<'a> {
    /// No trust list, automatic re-rendering, default caps.
    pub fn open(list: &'a TrustList) -> Self {
        VerifyOptions {
            trust: TrustPolicy {
                list,
                required: false,
            },
            rerender: RerenderPolicy::Auto,
            limits: Limits::default(),
        }
    }
}

impl Verification {
    fn damaged(reason: String) -> Verification {
        Verification {
            kind: None,
            report_id: None,
            content_sha256: None,
            made_by: None,
            verified_by: super::make::program(),
            convention: None,
            survey_date: None,
            content: ContentState::Damaged,
            changes: Vec::new(),
            damage: Some(reason.clone()),
            pages: PagesBasis::NotCovered,
            signature: SignatureReport::unreadable("the file is damaged"),
            manifest_problem: None,
            files: Vec::new(),
            recomputation: Recomputation::Impossible {
                reason: "the file is damaged".into(),
            },
            rerendering: Rerendering::NotDone {
                reason: "the file is damaged".into(),
            },
            checks_verdict: None,
            verified: false,
            recomputed: None,
            identity: None,
            inputs: Vec::new(),
        }
    }

    /// One line per problem found (empty when the document verifies).
    pub fn problems(&self) -> Vec<String> {
        let mut v = Vec::new();
        if let Some(d) = &self.damage {
            v.push(format!("damaged: {d}"));
        }
        for c in &self.changes {
            v.push(format!("altered: {}", c.what));
        }
        if let Some(p) = &self.manifest_problem {
            v.push(format!("manifest: {p}"));
        }
        match &self.recomputation {
            Recomputation::Matches { .. } => {}
            Recomputation::Differs { differences, .. } => {
                let n = differences.len();
                let first = differences
                    .first()
                    .map(|d| format!(", first {d}"))
                    .unwrap_or_default();
                v.push(format!(
                    "recomputation: {n} value{} of the embedded results not reproduced{first}",
                    if n == 1 { "" } else { "s" }
                ));
            }
            Recomputation::Impossible { reason } if self.damage.is_none() => {
                v.push(format!("recomputation not possible: {reason}"))
            }
            Recomputation::Impossible { .. } | Recomputation::NotDone { .. } => {}
        }
        if !self.signature.accepted {
            v.push(format!("signature: {}", self.signature.detail));
        }
        v
    }

    /// The content verdict in words: `intact, checked against the signed seal` …
    pub fn content_words(&self) -> String {
        match self.content {
            ContentState::Intact => format!("intact, checked against {}", self.pages.describe()),
            ContentState::Altered => format!(
                "altered: {}",
                self.changes
                    .iter()
                    .map(|c| c.what.clone())
                    .collect::<Vec<_>>()
                    .join("; ")
            ),
            ContentState::Damaged => format!(
                "damaged: {}",
                self.damage.as_deref().unwrap_or("the file cannot be read")
            ),
        }
    }
}

/// The first occurrence of each attachment name, and later ones as duplicates.
fn index(embedded: &[crate::pdf::files::EmbeddedFile]) -> (HashMap<&str, &[u8]>, Vec<FileCheck>) {
    let mut by_name: HashMap<&str, &[u8]> = HashMap::new();
    let mut duplicates = Vec::new();
    for f in embedded {
        if by_name.contains_key(f.name.as_str()) {
            duplicates.push(FileCheck {
                name: f.name.clone(),
                role: None,
                state: FileState::Duplicate {
                    sha256: sha256_hex(&f.bytes),
                    bytes: f.bytes.len(),
                },
            });
        } else {
            by_name.insert(f.name.as_str(), &f.bytes);
        }
    }
    (by_name, duplicates)
}

/// Verifies untrusted bytes with no trust list, no re-render and the default reading caps: the
/// whole reading path of `annulus verify` (cross-references, objects, streams, embedded files,
/// digests, manifest, seal, signature, recomputation). The entry point of the `verify_pdf` fuzz
/// target.
pub fn verify_bytes(pdf: &[u8]) -> Result<Verification, NotAReport> {
    let list = TrustList::new();
    let options = VerifyOptions {
        rerender: RerenderPolicy::Never,
        ..VerifyOptions::open(&list)
    };
    verify(pdf, &options)
}

/// An incremental update or bytes appended after the report's end of file, as a change.
fn appended_revisions(doc: &Pdf) -> Option<ContentChange> {
    let revisions = doc.revisions();
    if revisions.single() {
        return None;
    }
    let what = if revisions.appended() > 0 {
        format!(
            "an incremental update appended after the report's end of file ({} bytes, {} cross-reference section{})",
            revisions.appended(),
            revisions.sections,
            if revisions.sections == 1 { "" } else { "s" }
        )
    } else {
        format!(
            "{} bytes appended after the report's end of file",
            revisions.trailing
        )
    };
    Some(ContentChange {
        found_by: "file structure",
        what,
    })
}

/// Reads the seal (or, in the first format, the manifest's own signature): the state of its
/// signature and the parts it records; what does not match goes into `changes`.
#[allow(clippy::too_many_arguments)]
fn check_seal(
    seal_bytes: Option<&[u8]>,
    manifest: Option<&Manifest>,
    manifest_bytes: &[u8],
    signature_bytes: Option<&[u8]>,
    manifest_sha256: &str,
    actual: &DocumentParts,
    v2: bool,
    changes: &mut Vec<ContentChange>,
) -> (SealSignatureState, Option<DocumentParts>) {
    let mut seal_state = SealSignatureState::Unsigned;
    let mut sealed_parts: Option<DocumentParts> = None;
    match seal_bytes.map(Seal::parse) {
        None if v2 || manifest.is_none() => changes.push(ContentChange {
            found_by: "seal",
            what: format!("the document seal `{SEAL_NAME}` was removed: no page is covered"),
        }),
        None => {
            // first format: the manifest's own signature, if any
            if let (Some(b), Some(m)) = (signature_bytes, manifest) {
                seal_state = match Signature::parse(b) {
                    Some(s) if s.verifies(manifest_bytes) => match s.public() {
                        Some(k) => SealSignatureState::Valid(k),
                        None => SealSignatureState::Invalid("the recorded key is damaged".into()),
                    },
                    Some(_) => SealSignatureState::Invalid(
                        "the manifest signature does not match this manifest".into(),
                    ),
                    None => SealSignatureState::Invalid(format!(
                        "`{SIGNATURE_NAME}` is not a readable signature record"
                    )),
                };
                let _ = m;
            }
        }
        Some(None) => {
            seal_state = SealSignatureState::Invalid("the seal cannot be read".into());
            changes.push(ContentChange {
                found_by: "seal",
                what: format!("the document seal `{SEAL_NAME}` is not readable"),
            });
        }
        Some(Some(seal)) => {
            seal_state = seal.signature_state();
            if seal.payload.format != SEAL_FORMAT {
                changes.push(ContentChange {
                    found_by: "seal",
                    what: format!(
                        "the seal's format `{}` is not `{SEAL_FORMAT}`",
                        seal.payload.format
                    ),
                });
            }
            if seal.payload.manifest_sha256 != *manifest_sha256 {
                changes.push(ContentChange {
                    found_by: "seal",
                    what: format!(
                        "the manifest is not the one the seal records (the seal belongs to report {})",
                        super::manifest::id_of(&seal.payload.manifest_sha256)
                    ),
                });
            }
            for c in compare(&seal.payload.document, actual) {
                changes.push(ContentChange {
                    found_by: "seal",
                    what: c.to_string(),
                });
            }
            sealed_parts = Some(seal.payload.document);
        }
    }
    (seal_state, sealed_parts)
}

/// The verdict on a document whose manifest is embedded but cannot be read.
fn unreadable_manifest(
    embedded: &[crate::report::EmbeddedFile],
    changes: Vec<ContentChange>,
    signature: SignatureReport,
) -> Verification {
    let mut v = Verification::damaged(String::new());
    v.damage = None;
    v.content = ContentState::Altered;
    v.manifest_problem = Some(format!(
        "`{MANIFEST_NAME}` is embedded but is not a readable annulus manifest"
    ));
    v.changes = changes;
    v.files = embedded
        .iter()
        .filter(|f| ![MANIFEST_NAME, SIGNATURE_NAME, SEAL_NAME].contains(&f.name.as_str()))
        .map(|f| FileCheck {
            name: f.name.clone(),
            role: None,
            state: FileState::Unlisted {
                sha256: sha256_hex(&f.bytes),
                bytes: f.bytes.len(),
            },
        })
        .collect();
    v.recomputation = Recomputation::Impossible {
        reason: "without a readable manifest the inputs are not known".into(),
    };
    v.rerendering = Rerendering::Impossible {
        reason: "without a readable manifest the inputs are not known".into(),
    };
    v.signature = signature;
    v.pages = PagesBasis::NotCovered;
    v
}

/// Verifies a document from its PDF bytes. `Err` only when the bytes are not a PDF, or a PDF that
/// is not ours; a damaged file is a verdict (`content: damaged`).
pub fn verify(pdf: &[u8], options: &VerifyOptions<'_>) -> Result<Verification, NotAReport> {
    if !looks_like_pdf(pdf) {
        return Err(NotAReport::NotPdf {
            detail: "no `%PDF-` header".into(),
        });
    }
    let doc = match Pdf::parse(pdf, options.limits) {
        Ok(d) => d,
        Err(PdfError::NotPdf) => {
            return Err(NotAReport::NotPdf {
                detail: "no `%PDF-` header".into(),
            })
        }
        Err(e) => return Ok(Verification::damaged(e.to_string())),
    };
    let embedded: Vec<_> = match embedded(&doc, &[]) {
        Ok(v) => v.into_iter().map(|(f, _)| f).collect(),
        Err(e) => return Ok(Verification::damaged(e.to_string())),
    };
    let actual = match document_parts(&doc, SEAL_NAME) {
        Ok(p) => p,
        Err(e) => return Ok(Verification::damaged(e.to_string())),
    };
    let (by_name, duplicates) = index(&embedded);
    let seal_bytes = by_name.get(SEAL_NAME).copied();
    let Some(manifest_bytes) = by_name.get(MANIFEST_NAME).copied() else {
        if seal_bytes.is_none() {
            return Err(NotAReport::NoManifest {
                attachments: embedded.iter().map(|f| f.name.clone()).collect(),
            });
        }
        let mut v = Verification::damaged(String::new());
        v.content = ContentState::Altered;
        v.damage = None;
        v.changes.push(ContentChange {
            found_by: "manifest",
            what: format!("the manifest `{MANIFEST_NAME}` was removed"),
        });
        v.signature = SignatureReport::unreadable("the manifest the seal names is missing");
        return Ok(v);
    };
    let manifest = Manifest::parse(manifest_bytes);
    let manifest_sha256 = sha256_hex(manifest_bytes);
    let mut changes = Vec::new();
    changes.extend(appended_revisions(&doc));

    // the seal: digests of every part, the manifest it belongs to, the signature
    let v2 = manifest.as_ref().is_some_and(|m| m.format != FORMAT_V1);
    let (seal_state, sealed_parts) = check_seal(
        seal_bytes,
        manifest.as_ref(),
        manifest_bytes,
        by_name.get(SIGNATURE_NAME).copied(),
        &manifest_sha256,
        &actual,
        v2,
        &mut changes,
    );
    let signature = signer::judge(manifest.as_ref(), seal_state.clone(), options.trust);
    let verified_by = super::make::program();

    let Some(manifest) = manifest else {
        return Ok(unreadable_manifest(&embedded, changes, signature));
    };
    let manifest_problem = (manifest.format != FORMAT && manifest.format != FORMAT_V1).then(|| {
        format!(
            "format `{}` is not one this program reads (`{FORMAT}`, `{FORMAT_V1}`)",
            manifest.format
        )
    });
    let files = files::check_files(&manifest, &embedded, &by_name, duplicates);
    for f in files.iter().filter(|f| !f.holds()) {
        changes.push(ContentChange {
            found_by: "manifest",
            what: format!("embedded file `{}`: {}", f.name, f.describe()),
        });
    }
    let kind = manifest.doc_kind();
    let (recomputation, rederived) = Rederived::recompute(kind, &manifest, &by_name);

    // re-render where the seal alone cannot settle the question
    let settled = sealed_parts.is_some()
        && signature.status == SignatureStatus::Trusted
        && signature.accepted;
    let rerendering = match options.rerender {
        RerenderPolicy::Never => Rerendering::NotDone {
            reason: "--rerender never".into(),
        },
        RerenderPolicy::Auto if settled => Rerendering::NotDone {
            reason: "not needed: the seal is signed by a trusted key (--rerender always re-renders anyway)".into(),
        },
        RerenderPolicy::Auto if !v2 => Rerendering::NotDone {
            reason: format!(
                "made by {} before reports were sealed; it cannot be re-rendered as it was",
                manifest.program
            ),
        },
        _ => rederived.rerender(kind, &manifest, &by_name, &actual),
    };
    if let Rerendering::Differs { changes: c } = &rerendering {
        for what in c {
            changes.push(ContentChange {
                found_by: "re-render",
                what: format!("{what} (differs from what the embedded inputs render to)"),
            });
        }
    }
    let content = if changes.is_empty() {
        ContentState::Intact
    } else {
        ContentState::Altered
    };
    let pages = if rerendering == Rerendering::Matches {
        PagesBasis::Rerendered
    } else if sealed_parts.is_none() {
        PagesBasis::NotCovered
    } else if matches!(seal_state, SealSignatureState::Valid(_)) {
        PagesBasis::SignedSeal
    } else {
        PagesBasis::UnsignedSeal
    };
    let identity = rederived.identity();
    let inputs = manifest
        .files
        .iter()
        .map(|e| (e.role.clone(), e.path.clone(), e.sha256.clone()))
        .collect();
    let mut v = Verification {
        kind: Some(kind),
        report_id: Some(super::manifest::id_of(&manifest_sha256)),
        content_sha256: Some(manifest_sha256),
        made_by: Some(manifest.program.clone()),
        verified_by,
        convention: Some(manifest.convention.clone()).filter(|c| !c.is_empty()),
        survey_date: Some(manifest.survey_date.clone()),
        content,
        changes,
        damage: None,
        pages,
        signature,
        manifest_problem,
        files,
        recomputation,
        rerendering,
        checks_verdict: rederived.verdict(),
        verified: false,
        recomputed: rederived.report,
        identity,
        inputs,
    };
    v.verified = v.content == ContentState::Intact
        && v.manifest_problem.is_none()
        && v.recomputation.holds()
        && v.signature.accepted;
    Ok(v)
}

/// What a document's embedded inputs re-derive: a report's evaluation and assessment, or a
/// submittal's evaluated system (certificates and RATA summaries are compared as documents).
struct Rederived {
    report: Option<Box<Recomputed>>,
    system: Option<Box<crate::submittal::SystemEvaluation>>,
}

impl Rederived {
    /// Recomputes a document of `kind` from its embedded inputs.
    fn recompute(
        kind: DocKind,
        manifest: &Manifest,
        by_name: &HashMap<&str, &[u8]>,
    ) -> (Recomputation, Rederived) {
        let (mut report, mut system) = (None, None);
        let recomputation = match kind {
            DocKind::Report => {
                let (r, e) = recompute::recompute(manifest, by_name);
                report = e;
                r
            }
            DocKind::Submittal => {
                let (r, e) = crate::archive::submittal::recompute(manifest, by_name);
                system = e;
                r
            }
            other => documents::recompute(other, manifest, by_name),
        };
        (recomputation, Rederived { report, system })
    }

    /// Lays the document out again from what was re-derived and compares it with `actual`.
    fn rerender(
        &self,
        kind: DocKind,
        manifest: &Manifest,
        by_name: &HashMap<&str, &[u8]>,
        actual: &DocumentParts,
    ) -> Rerendering {
        let limit = rerender::RERENDER_TIME_LIMIT;
        match kind {
            DocKind::Submittal => {
                crate::archive::submittal::rerender(manifest, self.system.as_deref(), actual, limit)
            }
            _ => rerender::rerender(manifest, by_name, self.report.as_deref(), actual, limit),
        }
    }

    /// Title, site, date and tester, from the re-derived inputs.
    fn identity(&self) -> Option<documents::Identity> {
        self.report
            .as_ref()
            .map(|r| documents::Identity::of_survey(&r.evaluation.loaded.survey))
            .or_else(|| {
                self.system
                    .as_ref()
                    .map(|e| documents::Identity::of_system(e))
            })
    }

    /// The checks' verdict (a report's) or the system's (a submittal's).
    fn verdict(&self) -> Option<Verdict> {
        self.report
            .as_ref()
            .map(|r| r.assessment.verdict)
            .or_else(|| self.system.as_ref().map(|e| e.verdict()))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn garbage_plain_and_truncated_pdfs() {
        let list = TrustList::new();
        let o = VerifyOptions::open(&list);
        assert!(matches!(
            verify(b"not a pdf at all", &o),
            Err(NotAReport::NotPdf { .. })
        ));
        let d = NotAReport::NoManifest {
            attachments: vec!["a.csv".into()],
        };
        assert!(d.to_string().contains("no `annulus-manifest.json`"));
        // a truncated PDF is a damaged document, not "not a PDF"
        let b = crate::pdf::tests::sample();
        let v = verify(&b[..b.len() / 2], &o).unwrap();
        assert_eq!(v.content, ContentState::Damaged);
        assert!(!v.verified);
        assert!(
            v.problems()[0].starts_with("damaged: "),
            "{:?}",
            v.problems()
        );
        // a whole PDF with files but no manifest is not ours
        assert!(matches!(verify(&b, &o), Err(NotAReport::NoManifest { .. })));
    }
}
