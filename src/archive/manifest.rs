//! The manifest: what a report holds and how to tell if any of it changed.

use super::{hex, sha256_hex, unhex, PublicKey, SecretKey};
use serde::{Deserialize, Serialize};

/// Attachment names inside a report.
pub const MANIFEST_NAME: &str = "annulus-manifest.json";
pub const SIGNATURE_NAME: &str = "annulus-signature.json";
pub const RESULTS_NAME: &str = "results.json";
pub const FORMAT: &str = "annulus-manifest/1";

/// One embedded file.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct FileEntry {
    /// Attachment name inside the PDF (a file name, no directories).
    pub name: String,
    /// The path as the survey wrote it (readings) or the survey's own file name.
    pub path: String,
    /// `survey`, `readings` or `results`.
    pub role: String,
    pub sha256: String,
    pub bytes: usize,
}

/// The manifest, serialised with a fixed key order so its bytes are canonical.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Manifest {
    pub format: String,
    pub program: String,
    pub convention: String,
    pub survey_date: String,
    pub files: Vec<FileEntry>,
}

impl Manifest {
    pub fn new(program: &str, convention: &str, survey_date: &str, files: Vec<FileEntry>) -> Self {
        Manifest {
            format: FORMAT.to_string(),
            program: program.to_string(),
            convention: convention.to_string(),
            survey_date: survey_date.to_string(),
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
        let f = self.fingerprint();
        format!("AN-{}", f[..12].to_uppercase())
    }

    pub fn parse(bytes: &[u8]) -> Option<Manifest> {
        serde_json::from_slice(bytes).ok()
    }
}

/// A signature over the canonical manifest bytes.
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

    /// Whether this signature is valid for `manifest` under its recorded key.
    pub fn verifies(&self, manifest: &Manifest) -> bool {
        match (self.public(), unhex(&self.signature)) {
            (Some(k), Some(sig)) if self.algorithm == "ed25519" => {
                k.verify(&manifest.canonical_bytes(), &sig)
            }
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
    fn signatures_bind_key_and_content() {
        let k = SecretKey::from_seed([7; 32]);
        let m = manifest();
        let s = Signature::sign(&m, &k);
        assert!(s.verifies(&m));
        let mut changed = manifest();
        changed.convention = "iso-16911".into();
        assert!(!s.verifies(&changed));
        // a signature made by another key but carrying this key's public half fails
        let other = Signature::sign(&m, &SecretKey::from_seed([8; 32]));
        let forged = Signature {
            public_key: s.public_key.clone(),
            ..other
        };
        assert!(!forged.verifies(&m));
        assert_eq!(Signature::parse(&s.to_bytes()), Some(s));
    }
}
