//! The manifest: what a document holds (every embedded file with its role, size and SHA-256), what
//! kind of document it is, what laid it out, its document date and who signs it. Its SHA-256 is
//! the content fingerprint printed on every page; the report id is made from it.

use super::{hex, sha256_hex, unhex, PublicKey, SecretKey};
use serde::{Deserialize, Serialize};

/// Attachment names inside a report.
pub const MANIFEST_NAME: &str = "annulus-manifest.json";
/// The signature of a manifest, as reports made before the document seal carried it.
pub const SIGNATURE_NAME: &str = "annulus-signature.json";
pub const RESULTS_NAME: &str = "results.json";
/// The manifest format this program writes.
pub const FORMAT: &str = "annulus-manifest/2";
/// The first format: attachments only, signed by [`SIGNATURE_NAME`]; still read.
pub const FORMAT_V1: &str = "annulus-manifest/1";

/// One embedded file.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct FileEntry {
    /// Attachment name inside the PDF (a file name, no directories).
    pub name: String,
    /// The path as the survey wrote it (readings) or the survey's own file name.
    pub path: String,
    /// `survey`, `readings`, `calibration`, `calibration-readings`, `results`, `template`,
    /// `rata`, `rata-readings`.
    pub role: String,
    pub sha256: String,
    pub bytes: usize,
}

/// What kind of document a manifest belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum DocKind {
    /// A flow test report (`annulus report`).
    Report,
    /// A pitot calibration certificate (`annulus calibrate -o`).
    Calibration,
    /// A RATA summary (`annulus rata -o`).
    Rata,
    /// A test-and-balance submittal (`annulus system -o`).
    Submittal,
}

impl DocKind {
    pub fn name(self) -> &'static str {
        match self {
            DocKind::Report => "report",
            DocKind::Calibration => "calibration",
            DocKind::Rata => "rata",
            DocKind::Submittal => "submittal",
        }
    }

    /// The document in words: `flow test report`, `calibration certificate`, `RATA summary`.
    pub fn words(self) -> &'static str {
        match self {
            DocKind::Report => "flow test report",
            DocKind::Calibration => "calibration certificate",
            DocKind::Rata => "RATA summary",
            DocKind::Submittal => "test and balance submittal",
        }
    }
}

/// Who the document says signs it: the key's name (printed in the sign-off block) and the public
/// key.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct SignerEntry {
    pub name: String,
    pub public_key: String,
}

impl SignerEntry {
    pub fn new(name: &str, key: &PublicKey) -> SignerEntry {
        SignerEntry {
            name: name.to_string(),
            public_key: key.to_hex(),
        }
    }

    pub fn key(&self) -> Option<PublicKey> {
        PublicKey::from_hex(&self.public_key).ok()
    }
}

/// The manifest, serialised with a fixed key order so its bytes are canonical. Fields added after
/// the first format are optional, so a first-format manifest reads back to the same bytes.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Manifest {
    pub format: String,
    pub program: String,
    /// The document kind; absent (a report) in the first format.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub kind: Option<DocKind>,
    /// What laid the pages out: the program and a digest of its built-in templates. A re-render is
    /// byte-identical only under the same renderer.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub renderer: Option<String>,
    pub convention: String,
    pub survey_date: String,
    /// The date written into the PDF (the survey date, or one from `SOURCE_DATE_EPOCH`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub document_date: Option<String>,
    /// The signer the sign-off block names, when the document is signed.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub signer: Option<SignerEntry>,
    /// The user configuration's firm, technician and certificate the sign-off block took where the
    /// inputs name nobody; recorded so a re-render prints the same names.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub defaults: Option<crate::config::SignoffDefaults>,
    pub files: Vec<FileEntry>,
}

impl Manifest {
    /// The recorded document date as a date (`None` when absent or not `YYYY-MM-DD`).
    pub fn document_day(&self) -> Option<chrono::NaiveDate> {
        self.document_date
            .as_deref()
            .and_then(|d| chrono::NaiveDate::parse_from_str(d, "%Y-%m-%d").ok())
    }

    /// A manifest of the current format listing `files`; the caller fills in the document's kind,
    /// renderer, document date and signer (see `archive::make`).
    pub fn new(program: &str, convention: &str, survey_date: &str, files: Vec<FileEntry>) -> Self {
        Manifest {
            format: FORMAT.to_string(),
            program: program.to_string(),
            kind: None,
            renderer: None,
            convention: convention.to_string(),
            survey_date: survey_date.to_string(),
            document_date: None,
            signer: None,
            defaults: None,
            files,
        }
    }

    pub fn entry(name: &str, path: &str, role: &str, bytes: &[u8]) -> FileEntry {
        FileEntry {
            name: name.to_string(),
            path: path.to_string(),
            role: role.to_string(),
            sha256: sha256_hex(bytes),
            bytes: bytes.len(),
        }
    }

    /// The document kind (a first-format manifest is a report's).
    pub fn doc_kind(&self) -> DocKind {
        self.kind.unwrap_or(DocKind::Report)
    }

    /// Canonical bytes: compact JSON in struct order (the order is part of the format).
    pub fn canonical_bytes(&self) -> Vec<u8> {
        serde_json::to_vec(self).unwrap_or_default()
    }

    /// The content fingerprint: SHA-256 of the canonical manifest.
    pub fn fingerprint(&self) -> String {
        sha256_hex(&self.canonical_bytes())
    }

    /// Short report id: the first 12 hex digits of the fingerprint.
    pub fn report_id(&self) -> String {
        id_of(&self.fingerprint())
    }

    pub fn parse(bytes: &[u8]) -> Option<Manifest> {
        serde_json::from_slice(bytes).ok()
    }
}

/// The `AN-…` id of a content fingerprint.
pub fn id_of(fingerprint: &str) -> String {
    format!(
        "AN-{}",
        fingerprint.get(..12).unwrap_or(fingerprint).to_uppercase()
    )
}

/// A signature over the canonical manifest bytes, as first-format reports carry it. Only read:
/// this program signs the document seal instead (`archive::seal`).
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Signature {
    pub algorithm: String,
    pub public_key: String,
    pub fingerprint: String,
    pub signature: String,
}

impl Signature {
    pub fn sign(manifest: &Manifest, key: &SecretKey) -> Signature {
        let public = key.public();
        Signature {
            algorithm: "ed25519".to_string(),
            public_key: public.to_hex(),
            fingerprint: public.fingerprint(),
            signature: hex(&key.sign(&manifest.canonical_bytes())),
        }
    }

    /// The signer's key, if the recorded one is well-formed.
    pub fn public(&self) -> Option<PublicKey> {
        PublicKey::from_hex(&self.public_key).ok()
    }

    /// Whether this signature is valid for `manifest_bytes` under its recorded key.
    pub fn verifies(&self, manifest_bytes: &[u8]) -> bool {
        match (self.public(), unhex(&self.signature)) {
            (Some(k), Some(sig)) if self.algorithm == "ed25519" => k.verify(manifest_bytes, &sig),
            _ => false,
        }
    }

    pub fn to_bytes(&self) -> Vec<u8> {
        serde_json::to_vec_pretty(self).unwrap_or_default()
    }

    pub fn parse(bytes: &[u8]) -> Option<Signature> {
        serde_json::from_slice(bytes).ok()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn manifest() -> Manifest {
        Manifest::new(
            "annulus 0.1.0",
            "epa-method-2",
            "2026-10-14",
            vec![
                Manifest::entry("survey.toml", "survey.toml", "survey", b"[survey]"),
                Manifest::entry("run1.csv", "run1.csv", "readings", b"line,point"),
            ],
        )
    }

    #[test]
    fn fingerprint_is_stable_and_sensitive() {
        let m = manifest();
        assert_eq!(m.fingerprint(), manifest().fingerprint());
        let mut m2 = manifest();
        m2.files[1].sha256 = sha256_hex(b"line,point ");
        assert_ne!(m.fingerprint(), m2.fingerprint());
        assert!(m.report_id().starts_with("AN-") && m.report_id().len() == 15);
        assert_eq!(Manifest::parse(&m.canonical_bytes()), Some(m));
    }

    #[test]
    fn first_format_manifests_read_back_to_their_own_bytes() {
        let v1 = r#"{"format":"annulus-manifest/1","program":"annulus 0.1.0","convention":"epa-method-2","survey_date":"2026-10-14","files":[]}"#;
        let m = Manifest::parse(v1.as_bytes()).unwrap();
        assert_eq!(m.doc_kind(), DocKind::Report);
        assert_eq!(m.canonical_bytes(), v1.as_bytes());
        let mut v2 = manifest();
        v2.kind = Some(DocKind::Calibration);
        v2.signer = Some(SignerEntry::new(
            "dana",
            &SecretKey::from_seed([7; 32]).public(),
        ));
        assert_eq!(Manifest::parse(&v2.canonical_bytes()), Some(v2.clone()));
        assert_eq!(
            v2.signer.unwrap().key(),
            Some(SecretKey::from_seed([7; 32]).public())
        );
    }

    #[test]
    fn signatures_bind_key_and_content() {
        let k = SecretKey::from_seed([7; 32]);
        let m = manifest();
        let s = Signature::sign(&m, &k);
        assert!(s.verifies(&m.canonical_bytes()));
        let mut changed = manifest();
        changed.convention = "iso-16911".into();
        assert!(!s.verifies(&changed.canonical_bytes()));
        // a signature made by another key but carrying this key's public half fails
        let other = Signature::sign(&m, &SecretKey::from_seed([8; 32]));
        let forged = Signature {
            public_key: s.public_key.clone(),
            ..other
        };
        assert!(!forged.verifies(&m.canonical_bytes()));
        assert_eq!(Signature::parse(&s.to_bytes()), Some(s));
    }
}
