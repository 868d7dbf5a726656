//! Verification of a finished report: do its embedded files, its results and its signature still
//! say what they said when it was made?
//!
//! Owns the judgement [`verify`] makes on the bytes of a PDF: every manifest entry's SHA-256 and
//! size against the attachment it names, every attachment listed in the manifest, the results
//! re-derived from the embedded survey, readings and calibration record, if the survey names one
//! (through `input::load_with` on the attachment
//! bytes and `pipeline::evaluate_and_assess`, the same path `annulus report` took) and compared
//! number by number with the embedded `results.json`, and the Ed25519 signature over the manifest.
//! Must not read files, print or look at the clock: the caller hands in the PDF bytes and the key.
//!
//! Why each part is needed: the hashes show whether an embedded file changed after signing; the
//! recomputation shows whether the results follow from the inputs at all (a report can be
//! internally inconsistent even when nothing changed since it was made, or when the manifest was
//! re-hashed to hide an edit); the signature shows the manifest, hence every hash, is the signer's.

use super::manifest::{Manifest, Signature, FORMAT, MANIFEST_NAME, SIGNATURE_NAME};
use super::{sha256_hex, PublicKey};
use crate::assess::{Assessment, Verdict};
use crate::diag::Error;
use crate::input::load_with;
use crate::pipeline::{evaluate_and_assess, Evaluation};
use crate::report::attach::{embedded_files, ExtractError};
use crate::results::ResultsDoc;
use serde::Serialize;
use serde_json::Value;
use std::collections::HashMap;
use std::fmt;
use std::path::Path;

/// Relative tolerance when comparing a recomputed number with the embedded one. The embedded
/// results are this program's own output written as JSON (shortest round-trip decimal), so an
/// honest report matches to the last bit or within a parser's rounding; 1e-9 leaves room for that
/// and for summation order, and is far below any figure a report prints.
pub const REL_TOL: f64 = 1e-9;

/// Top-level keys of the results document that are not derived from the inputs and are left out
/// of the comparison: `program` names the version that made the report (shown separately as
/// `made_by`; a different version recomputing is not a discrepancy in itself).
const NOT_DERIVED: [&str; 1] = ["program"];

/// Where the embedded files are placed for the recomputation (only a name: nothing is on disk).
const VIRTUAL_DIR: &str = "embedded";

/// Why the bytes are not a report of ours (`annulus verify` exits with 1).
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "reason", rename_all = "kebab-case")]
pub enum NotAReport {
    /// Not a PDF lopdf can read.
    NotPdf { detail: String },
    /// A PDF, but its structure could not be walked to the embedded files.
    Malformed { detail: String },
    /// A PDF without an annulus manifest among its attachments.
    NoManifest { attachments: Vec<String> },
}

impl fmt::Display for NotAReport {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            NotAReport::NotPdf { detail } => write!(f, "not a PDF ({detail})"),
            NotAReport::Malformed { detail } => {
                write!(f, "a PDF whose attachments cannot be read ({detail})")
            }
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

/// What was found for one file: a manifest entry or an attachment.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "state", rename_all = "kebab-case")]
pub enum FileState {
    /// Present, with the SHA-256 and size the manifest records.
    Intact,
    /// Present, but its bytes are not the ones the manifest records.
    Changed {
        manifest_sha256: String,
        found_sha256: String,
        manifest_bytes: usize,
        found_bytes: usize,
    },
    /// Listed in the manifest, not embedded.
    Missing,
    /// Embedded, not listed in the manifest.
    Unlisted { sha256: String, bytes: usize },
    /// Embedded a second time under a name already seen (only the first is used).
    Duplicate { sha256: String, bytes: usize },
}

/// One file's check.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct FileCheck {
    /// Attachment name.
    pub name: String,
    /// Role in the manifest (`survey`, `readings`, `results`); `None` for unlisted files.
    pub role: Option<String>,
    #[serde(flatten)]
    pub state: FileState,
}

impl FileCheck {
    pub fn holds(&self) -> bool {
        self.state == FileState::Intact
    }

    /// What was found, in words (without the file name).
    pub fn describe(&self) -> String {
        match &self.state {
            FileState::Intact => "SHA-256 and size match the manifest".to_string(),
            FileState::Changed {
                manifest_sha256,
                found_sha256,
                manifest_bytes,
                found_bytes,
            } => format!(
                "changed: the manifest records SHA-256 {}… ({manifest_bytes} bytes), the embedded file has {}… ({found_bytes} bytes)",
                short(manifest_sha256),
                short(found_sha256)
            ),
            FileState::Missing => "listed in the manifest but not embedded".to_string(),
            FileState::Unlisted { bytes, .. } => {
                format!("embedded ({bytes} bytes) but not listed in the manifest")
            }
            FileState::Duplicate { bytes, .. } => {
                format!("embedded a second time under the same name ({bytes} bytes)")
            }
        }
    }
}

fn short(sha: &str) -> &str {
    sha.get(..12).unwrap_or(sha)
}

/// One number (or other value) of the embedded results that the recomputation does not reproduce.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Difference {
    /// Where in the results document, e.g. `runs[1].dry_standard_flow_m3_s`.
    pub path: String,
    /// The embedded value as JSON text; `None` when the embedded results lack it.
    pub embedded: Option<String>,
    /// The recomputed value as JSON text; `None` when the recomputation has no such value.
    pub recomputed: Option<String>,
}

impl fmt::Display for Difference {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let v = |x: &Option<String>| x.clone().unwrap_or_else(|| "(absent)".to_string());
        write!(
            f,
            "{}: embedded {}, recomputed {}",
            self.path,
            v(&self.embedded),
            v(&self.recomputed)
        )
    }
}

/// The outcome of re-deriving the results from the embedded inputs.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "state", rename_all = "kebab-case")]
pub enum Recomputation {
    /// Every compared value agrees.
    Matches { compared: usize },
    /// Some values differ.
    Differs {
        compared: usize,
        differences: Vec<Difference>,
    },
    /// The results could not be re-derived (a file is missing, or the inputs do not load).
    Impossible { reason: String },
}

impl Recomputation {
    pub fn holds(&self) -> bool {
        matches!(self, Recomputation::Matches { .. })
    }
}

/// The signature's state.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "state", rename_all = "kebab-case")]
pub enum SignatureState {
    /// No signature, and none was asked for: reported, not a failure.
    Unsigned,
    /// A key was given but the report carries no signature.
    MissingButExpected { expected_fingerprint: String },
    /// Valid for the manifest; made by the given key when one was given.
    Valid { fingerprint: String },
    /// Valid for the manifest, but made by a key other than the one given.
    ByAnotherKey {
        signer_fingerprint: String,
        expected_fingerprint: String,
    },
    /// Present but not a valid signature of this manifest.
    Invalid { reason: String },
}

impl SignatureState {
    pub fn holds(&self) -> bool {
        matches!(
            self,
            SignatureState::Unsigned | SignatureState::Valid { .. }
        )
    }

    pub fn describe(&self) -> String {
        match self {
            SignatureState::Unsigned => "unsigned (no signature embedded)".to_string(),
            SignatureState::MissingButExpected { expected_fingerprint } => format!(
                "presented as signed but carries no signature (expected key {expected_fingerprint})"
            ),
            SignatureState::Valid { fingerprint } => {
                format!("valid Ed25519 signature of the manifest by key {fingerprint}")
            }
            SignatureState::ByAnotherKey {
                signer_fingerprint,
                expected_fingerprint,
            } => format!(
                "signed by another key: the signature is by {signer_fingerprint}, the given key is {expected_fingerprint}"
            ),
            SignatureState::Invalid { reason } => format!("not a valid signature: {reason}"),
        }
    }
}

/// The correct results re-derived from the embedded inputs (not serialised).
#[derive(Debug, Clone)]
pub struct Recomputed {
    pub evaluation: Evaluation,
    pub assessment: Assessment,
}

/// Everything verification found about one report.
#[derive(Debug, Clone, Serialize)]
pub struct Verification {
    /// `AN-…` id from the manifest (absent when the manifest is unreadable).
    pub report_id: Option<String>,
    /// SHA-256 of the canonical manifest: the content fingerprint printed on the report.
    pub content_sha256: Option<String>,
    /// The program the manifest says made the report.
    pub made_by: Option<String>,
    /// This program.
    pub verified_by: String,
    pub convention: Option<String>,
    pub survey_date: Option<String>,
    /// Why the manifest itself is not usable, when it is not.
    pub manifest_problem: Option<String>,
    /// Manifest entries in manifest order, then attachments the manifest does not list.
    pub files: Vec<FileCheck>,
    pub recomputation: Recomputation,
    pub signature: SignatureState,
    /// The verdict of the recomputed acceptance checks (what the report should show).
    pub checks_verdict: Option<Verdict>,
    /// True when every part holds.
    pub verified: bool,
    #[serde(skip)]
    pub recomputed: Option<Box<Recomputed>>,
}

impl Verification {
    /// Whether the manifest, every file, the recomputation and the signature hold.
    pub fn holds(&self) -> bool {
        self.manifest_problem.is_none()
            && self.files.iter().all(FileCheck::holds)
            && self.recomputation.holds()
            && self.signature.holds()
    }

    /// One line per problem found (empty when the report verifies).
    pub fn problems(&self) -> Vec<String> {
        let mut v = Vec::new();
        if let Some(p) = &self.manifest_problem {
            v.push(format!("manifest: {p}"));
        }
        for f in self.files.iter().filter(|f| !f.holds()) {
            v.push(format!("`{}`: {}", f.name, f.describe()));
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
                    "recomputation: {n} value{} of results.json not reproduced{first}",
                    if n == 1 { "" } else { "s" }
                ));
            }
            Recomputation::Impossible { reason } => {
                v.push(format!("recomputation not possible: {reason}"))
            }
        }
        if !self.signature.holds() {
            v.push(format!("signature: {}", self.signature.describe()));
        }
        v
    }
}

/// Verifies a report from its PDF bytes. With `key`, the report must carry a valid signature by
/// that key. `Err` when the bytes are not a report of ours at all.
pub fn verify(pdf: &[u8], key: Option<&PublicKey>) -> Result<Verification, NotAReport> {
    let embedded = embedded_files(pdf).map_err(|e| match e {
        ExtractError::NotPdf { detail } => NotAReport::NotPdf { detail },
        other @ ExtractError::Malformed { .. } => NotAReport::Malformed {
            detail: other.to_string(),
        },
    })?;
    // first occurrence of each name wins; later ones are flagged
    let mut by_name: HashMap<&str, &[u8]> = HashMap::new();
    let mut duplicates = Vec::new();
    for f in &embedded {
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
    let Some(manifest_bytes) = by_name.get(MANIFEST_NAME).copied() else {
        return Err(NotAReport::NoManifest {
            attachments: embedded.iter().map(|f| f.name.clone()).collect(),
        });
    };
    let verified_by = format!("annulus {}", env!("CARGO_PKG_VERSION"));
    let signature_bytes = by_name.get(SIGNATURE_NAME).copied();

    let Some(manifest) = Manifest::parse(manifest_bytes) else {
        // Nothing can be checked against an unreadable manifest: every file is unaccounted for.
        let mut files: Vec<FileCheck> = embedded
            .iter()
            .filter(|f| f.name != MANIFEST_NAME && f.name != SIGNATURE_NAME)
            .map(|f| FileCheck {
                name: f.name.clone(),
                role: None,
                state: FileState::Unlisted {
                    sha256: sha256_hex(&f.bytes),
                    bytes: f.bytes.len(),
                },
            })
            .collect();
        files.sort_by(|a, b| a.name.cmp(&b.name));
        let signature = match (signature_bytes, key) {
            (None, None) => SignatureState::Unsigned,
            (None, Some(k)) => SignatureState::MissingButExpected {
                expected_fingerprint: k.fingerprint(),
            },
            (Some(_), _) => SignatureState::Invalid {
                reason: "the manifest it signs is unreadable".to_string(),
            },
        };
        let mut v = Verification {
            report_id: None,
            content_sha256: None,
            made_by: None,
            verified_by,
            convention: None,
            survey_date: None,
            manifest_problem: Some(format!(
                "`{MANIFEST_NAME}` is embedded but is not a readable annulus manifest"
            )),
            files,
            recomputation: Recomputation::Impossible {
                reason: "without a readable manifest the survey file is not known".to_string(),
            },
            signature,
            checks_verdict: None,
            verified: false,
            recomputed: None,
        };
        v.verified = v.holds();
        return Ok(v);
    };

    let manifest_problem = (manifest.format != FORMAT).then(|| {
        format!(
            "format `{}` is not the `{FORMAT}` this program writes",
            manifest.format
        )
    });
    let files = check_files(&manifest, &embedded, &by_name, duplicates);
    let (recomputation, recomputed) = recompute(&manifest, &by_name);
    let signature = check_signature(&manifest, signature_bytes, key);
    let mut v = Verification {
        report_id: Some(manifest.report_id()),
        content_sha256: Some(manifest.fingerprint()),
        made_by: Some(manifest.program.clone()),
        verified_by,
        convention: Some(manifest.convention.clone()),
        survey_date: Some(manifest.survey_date.clone()),
        manifest_problem,
        files,
        recomputation,
        signature,
        checks_verdict: recomputed.as_ref().map(|r| r.assessment.verdict),
        verified: false,
        recomputed,
    };
    v.verified = v.holds();
    Ok(v)
}

fn check_files(
    manifest: &Manifest,
    embedded: &[crate::report::EmbeddedFile],
    by_name: &HashMap<&str, &[u8]>,
    duplicates: Vec<FileCheck>,
) -> Vec<FileCheck> {
    let mut out: Vec<FileCheck> = manifest
        .files
        .iter()
        .map(|entry| {
            let state = match by_name.get(entry.name.as_str()) {
                None => FileState::Missing,
                Some(bytes) => {
                    let sha = sha256_hex(bytes);
                    if sha == entry.sha256 && bytes.len() == entry.bytes {
                        FileState::Intact
                    } else {
                        FileState::Changed {
                            manifest_sha256: entry.sha256.clone(),
                            found_sha256: sha,
                            manifest_bytes: entry.bytes,
                            found_bytes: bytes.len(),
                        }
                    }
                }
            };
            FileCheck {
                name: entry.name.clone(),
                role: Some(entry.role.clone()),
                state,
            }
        })
        .collect();
    let mut seen: Vec<&str> = Vec::new();
    for f in embedded {
        let listed = manifest.files.iter().any(|e| e.name == f.name);
        if listed || f.name == MANIFEST_NAME || f.name == SIGNATURE_NAME {
            continue;
        }
        if seen.contains(&f.name.as_str()) {
            continue; // flagged as a duplicate below
        }
        seen.push(&f.name);
        out.push(FileCheck {
            name: f.name.clone(),
            role: None,
            state: FileState::Unlisted {
                sha256: sha256_hex(&f.bytes),
                bytes: f.bytes.len(),
            },
        });
    }
    out.extend(duplicates);
    out
}

fn check_signature(
    manifest: &Manifest,
    bytes: Option<&[u8]>,
    key: Option<&PublicKey>,
) -> SignatureState {
    let Some(bytes) = bytes else {
        return match key {
            None => SignatureState::Unsigned,
            Some(k) => SignatureState::MissingButExpected {
                expected_fingerprint: k.fingerprint(),
            },
        };
    };
    let Some(sig) = Signature::parse(bytes) else {
        return SignatureState::Invalid {
            reason: format!("`{SIGNATURE_NAME}` is not a readable signature record"),
        };
    };
    let Some(signer) = sig.public() else {
        return SignatureState::Invalid {
            reason: "the recorded public key is damaged".to_string(),
        };
    };
    if !sig.verifies(manifest) {
        return SignatureState::Invalid {
            reason: format!(
                "the signature recorded for key {} does not match this manifest (the manifest changed after signing, or the signature is forged)",
                signer.fingerprint()
            ),
        };
    }
    match key {
        Some(k) if *k != signer => SignatureState::ByAnotherKey {
            signer_fingerprint: signer.fingerprint(),
            expected_fingerprint: k.fingerprint(),
        },
        _ => SignatureState::Valid {
            fingerprint: signer.fingerprint(),
        },
    }
}

/// The first diagnostic of an input error, on one line.
fn first_problem(e: &Error) -> String {
    match e {
        Error::Input(d) => {
            let first = d
                .items()
                .first()
                .map(|x| {
                    let at = x
                        .location
                        .as_ref()
                        .map(|l| format!(" ({l})"))
                        .unwrap_or_default();
                    format!("{}{at}", x.message)
                })
                .unwrap_or_else(|| "input rejected".to_string());
            if d.len() > 1 {
                format!("{first}; {} more problems", d.len() - 1)
            } else {
                first
            }
        }
        Error::Environment(m) => m.clone(),
    }
}

fn recompute(
    manifest: &Manifest,
    by_name: &HashMap<&str, &[u8]>,
) -> (Recomputation, Option<Box<Recomputed>>) {
    let impossible = |reason: String| (Recomputation::Impossible { reason }, None);
    let surveys: Vec<_> = manifest
        .files
        .iter()
        .filter(|e| e.role == "survey")
        .collect();
    let survey = match surveys.as_slice() {
        [one] => *one,
        [] => return impossible("the manifest lists no survey file".to_string()),
        _ => return impossible("the manifest lists more than one survey file".to_string()),
    };
    let Some(results_entry) = manifest.files.iter().find(|e| e.role == "results") else {
        return impossible("the manifest lists no results file".to_string());
    };
    let Some(survey_bytes) = by_name.get(survey.name.as_str()) else {
        return impossible(format!("the survey file `{}` is not embedded", survey.name));
    };
    let Some(results_bytes) = by_name.get(results_entry.name.as_str()) else {
        return impossible(format!(
            "the results file `{}` is not embedded",
            results_entry.name
        ));
    };
    let embedded_results: Value = match serde_json::from_slice(results_bytes) {
        Ok(v) => v,
        Err(e) => {
            return impossible(format!(
                "the embedded `{}` is not JSON: {e}",
                results_entry.name
            ))
        }
    };

    // The survey at a virtual path; every other input (readings, a calibration record and its
    // readings) where its manifest path, relative to the survey's folder, points.
    let survey_path = Path::new(VIRTUAL_DIR).join(&survey.path);
    let dir = survey_path
        .parent()
        .map(Path::to_path_buf)
        .unwrap_or_default();
    let mut files = crate::input::MemoryFiles::new();
    files.insert(survey_path.clone(), survey_bytes.to_vec());
    for e in manifest
        .files
        .iter()
        .filter(|e| e.role != "survey" && e.role != "results")
    {
        if let Some(b) = by_name.get(e.name.as_str()) {
            files.insert(dir.join(&e.path), b.to_vec());
        }
    }
    let source = |p: &Path| files.read(p);
    let loaded = match load_with(&survey_path, &source) {
        Ok(l) => l,
        Err(e) => {
            return impossible(format!(
                "the embedded survey and readings do not load: {}",
                first_problem(&e)
            ))
        }
    };
    let (evaluation, assessment) = match evaluate_and_assess(loaded) {
        Ok(x) => x,
        Err(e) => {
            return impossible(format!(
                "the embedded survey and readings cannot be evaluated: {}",
                first_problem(&e)
            ))
        }
    };
    let doc = ResultsDoc::new(&evaluation, &assessment);
    let recomputed_results = match serde_json::to_value(&doc) {
        Ok(v) => v,
        Err(e) => return impossible(format!("the recomputed results cannot be written: {e}")),
    };
    let mut cmp = Comparison::default();
    if let (Value::Object(a), Value::Object(b)) = (&embedded_results, &recomputed_results) {
        let mut a = a.clone();
        let mut b = b.clone();
        for k in NOT_DERIVED {
            a.remove(k);
            b.remove(k);
        }
        cmp.walk("", &Value::Object(a), &Value::Object(b));
    } else {
        cmp.walk("", &embedded_results, &recomputed_results);
    }
    // The manifest's own statements about the survey must agree with it too.
    let s = &evaluation.loaded.survey;
    cmp.leaf(
        "manifest.convention",
        &Value::String(manifest.convention.clone()),
        &Value::String(s.convention.name().to_string()),
    );
    cmp.leaf(
        "manifest.survey_date",
        &Value::String(manifest.survey_date.clone()),
        &Value::String(s.date.to_string()),
    );
    let result = if cmp.differences.is_empty() {
        Recomputation::Matches {
            compared: cmp.compared,
        }
    } else {
        Recomputation::Differs {
            compared: cmp.compared,
            differences: cmp.differences,
        }
    };
    (
        result,
        Some(Box::new(Recomputed {
            evaluation,
            assessment,
        })),
    )
}

/// Walks two JSON values side by side, recording every leaf that differs.
#[derive(Debug, Default)]
struct Comparison {
    compared: usize,
    differences: Vec<Difference>,
}

/// Two numbers agree within [`REL_TOL`] of the larger magnitude (exactly, when both are zero).
pub fn numbers_agree(a: f64, b: f64) -> bool {
    a == b || (a - b).abs() <= REL_TOL * a.abs().max(b.abs())
}

/// JSON text of a value, shortened for subtrees.
fn text(v: &Value) -> String {
    match v {
        Value::Object(m) => format!("{{{} keys}}", m.len()),
        Value::Array(a) => format!("[{} items]", a.len()),
        other => other.to_string(),
    }
}

fn join(path: &str, key: &str) -> String {
    if path.is_empty() {
        key.to_string()
    } else {
        format!("{path}.{key}")
    }
}

impl Comparison {
    fn differ(&mut self, path: &str, a: Option<&Value>, b: Option<&Value>) {
        self.differences.push(Difference {
            path: path.to_string(),
            embedded: a.map(text),
            recomputed: b.map(text),
        });
    }

    fn leaf(&mut self, path: &str, a: &Value, b: &Value) {
        self.compared += 1;
        let same = match (a, b) {
            (Value::Number(x), Value::Number(y)) => match (x.as_f64(), y.as_f64()) {
                (Some(x), Some(y)) => numbers_agree(x, y),
                _ => x == y,
            },
            _ => a == b,
        };
        if !same {
            self.differ(path, Some(a), Some(b));
        }
    }

    fn walk(&mut self, path: &str, a: &Value, b: &Value) {
        match (a, b) {
            (Value::Object(x), Value::Object(y)) => {
                for (k, va) in x {
                    let p = join(path, k);
                    match y.get(k) {
                        Some(vb) => self.walk(&p, va, vb),
                        None => self.differ(&p, Some(va), None),
                    }
                }
                for (k, vb) in y {
                    if !x.contains_key(k) {
                        self.differ(&join(path, k), None, Some(vb));
                    }
                }
            }
            (Value::Array(x), Value::Array(y)) => {
                for i in 0..x.len().max(y.len()) {
                    let p = format!("{path}[{i}]");
                    match (x.get(i), y.get(i)) {
                        (Some(va), Some(vb)) => self.walk(&p, va, vb),
                        (va, vb) => self.differ(&p, va, vb),
                    }
                }
            }
            _ => self.leaf(path, a, b),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    fn compare(a: Value, b: Value) -> Comparison {
        let mut c = Comparison::default();
        c.walk("", &a, &b);
        c
    }

    #[test]
    fn comparison_names_each_differing_path() {
        let c = compare(
            json!({"runs": [{"q": 12.31, "id": "1"}, {"q": 1.0}], "area_m2": 2.0, "x": true}),
            json!({"runs": [{"q": 12.25, "id": "1"}, {"q": 1.0}], "area_m2": 2.0, "y": 1}),
        );
        let shown: Vec<String> = c.differences.iter().map(|d| d.to_string()).collect();
        assert_eq!(
            shown,
            [
                "runs[0].q: embedded 12.31, recomputed 12.25",
                "x: embedded true, recomputed (absent)",
                "y: embedded (absent), recomputed 1",
            ]
        );
        assert_eq!(c.compared, 4);
    }

    #[test]
    fn numbers_within_the_tolerance_agree_and_strings_are_exact() {
        // policy: REL_TOL relative, exact zero
        assert!(numbers_agree(1.0, 1.0 + 0.5e-9));
        assert!(!numbers_agree(1.0, 1.0 + 2e-9));
        assert!(numbers_agree(0.0, 0.0));
        assert!(!numbers_agree(0.0, 1e-300));
        let c = compare(json!({"s": "pass"}), json!({"s": "Pass"}));
        assert_eq!(c.differences.len(), 1);
        let c = compare(json!([1, 2, 3]), json!([1, 2]));
        assert_eq!(
            c.differences[0].to_string(),
            "[2]: embedded 3, recomputed (absent)"
        );
        let c = compare(json!({"a": {"b": 1}}), json!({"a": [1]}));
        assert_eq!(
            c.differences[0].to_string(),
            "a: embedded {1 keys}, recomputed [1 items]"
        );
    }

    const SURVEY: &str = r#"
[survey]
title = "Verify unit test stack"
date = "2026-10-14"
convention = "epa-method-2"
[duct]
shape = "round"
diameter = "5.0 ft"
upstream = "8 D"
downstream = "2 D"
[layout]
lines = 2
points_per_line = 6
[probe]
kind = "s-type"
coefficient = 0.84
[gas]
barometric = "29.50 inHg"
static = "-0.50 inH2O"
o2 = "8 %"
co2 = "10 %"
moisture = "10 %"
[[run]]
id = "1"
readings = "data/run1.csv"
leak_check = { before = "pass", after = "pass" }
"#;

    const READINGS: &str = include_str!("../../tests/data/epa-english/run1.csv");

    /// The attachments `annulus report` would embed (name → bytes) and the manifest.
    fn packed() -> (HashMap<String, Vec<u8>>, Manifest) {
        let mut files = crate::input::MemoryFiles::new();
        files.insert("site/s.toml", SURVEY);
        files.insert("site/data/run1.csv", READINGS);
        let src = |p: &Path| files.read(p);
        let (e, a) =
            evaluate_and_assess(load_with(Path::new("site/s.toml"), &src).unwrap()).unwrap();
        let json = serde_json::to_vec_pretty(&ResultsDoc::new(&e, &a)).unwrap();
        let b = crate::archive::bundle::pack(&e.loaded, json, "annulus test");
        let map = b
            .files
            .iter()
            .map(|(n, _, _, bytes)| (n.clone(), bytes.clone()))
            .collect();
        (map, b.manifest)
    }

    fn view(m: &HashMap<String, Vec<u8>>) -> HashMap<&str, &[u8]> {
        m.iter().map(|(k, v)| (k.as_str(), v.as_slice())).collect()
    }

    #[test]
    fn embedded_inputs_reproduce_their_results_and_an_edit_is_located() {
        let (mut files, manifest) = packed();
        let (r, recomputed) = recompute(&manifest, &view(&files));
        assert!(
            matches!(r, Recomputation::Matches { compared } if compared > 100),
            "{r:?}"
        );
        assert!(recomputed.is_some());
        // one reading edited: A,3 is the third point of line A
        let edited = READINGS.replace("A,3,0.60,", "A,3,0.70,");
        files.insert("run1.csv".into(), edited.into_bytes());
        let checks = check_files(&manifest, &[], &view(&files), Vec::new());
        for c in &checks {
            let changed = matches!(c.state, FileState::Changed { .. });
            assert_eq!(changed, c.name == "run1.csv", "{c:?}");
        }
        let (r, _) = recompute(&manifest, &view(&files));
        let Recomputation::Differs { differences, .. } = r else {
            panic!("{r:?}")
        };
        let paths: Vec<&str> = differences.iter().map(|d| d.path.as_str()).collect();
        assert!(paths.contains(&"runs[0].points[2].dp_pa"), "{paths:?}");
        assert!(
            paths.contains(&"runs[0].dry_standard_flow_m3_s"),
            "{paths:?}"
        );
        assert!(!paths.contains(&"runs[0].points[1].dp_pa"), "{paths:?}");
        // a missing readings file makes the recomputation impossible, with the reason
        files.remove("run1.csv");
        let (r, _) = recompute(&manifest, &view(&files));
        assert!(
            matches!(&r, Recomputation::Impossible { reason } if reason.contains("do not load")),
            "{r:?}"
        );
    }

    #[test]
    fn signatures_are_judged_against_the_manifest_and_the_expected_key() {
        let (_, manifest) = packed();
        let signer = crate::archive::SecretKey::from_seed([1; 32]);
        let other = crate::archive::SecretKey::from_seed([2; 32]).public();
        let sig = Signature::sign(&manifest, &signer).to_bytes();
        assert_eq!(
            check_signature(&manifest, None, None),
            SignatureState::Unsigned
        );
        assert!(matches!(
            check_signature(&manifest, None, Some(&other)),
            SignatureState::MissingButExpected { .. }
        ));
        assert_eq!(
            check_signature(&manifest, Some(&sig), Some(&signer.public())),
            SignatureState::Valid {
                fingerprint: signer.public().fingerprint()
            }
        );
        assert_eq!(
            check_signature(&manifest, Some(&sig), Some(&other)),
            SignatureState::ByAnotherKey {
                signer_fingerprint: signer.public().fingerprint(),
                expected_fingerprint: other.fingerprint(),
            }
        );
        let mut changed = manifest.clone();
        changed.files[0].sha256 = sha256_hex(b"something else");
        assert!(matches!(
            check_signature(&changed, Some(&sig), None),
            SignatureState::Invalid { .. }
        ));
        assert!(matches!(
            check_signature(&manifest, Some(b"{}"), None),
            SignatureState::Invalid { .. }
        ));
    }

    #[test]
    fn garbage_and_plain_pdfs_are_not_reports() {
        assert!(matches!(
            verify(b"not a pdf at all", None),
            Err(NotAReport::NotPdf { .. })
        ));
        let d = NotAReport::NoManifest {
            attachments: vec!["a.csv".into()],
        };
        assert!(d.to_string().contains("no `annulus-manifest.json`"));
    }
}
