//! The document seal: digests of every part of a finished PDF a reader sees, bound to the
//! manifest and signed when the document is signed. It is the last embedded file,
//! [`SEAL_NAME`], and the only part of the PDF its own digests leave out.
//!
//! Owns the seal's format ([`Seal`], [`SealPayload`]), making it ([`seal_pdf`]: the engine renders
//! the document with a placeholder seal, the digests are taken, and the placeholder's data is
//! replaced in place by [`crate::pdf::splice`], so the file stays one revision and byte-
//! reproducible) and checking its signature ([`Seal::signature_state`]). Must not read files,
//! print or look at the clock.
//!
//! What the signature covers: the payload, which names the manifest's SHA-256 (hence every
//! embedded file, the signer's name and key, the document date) and holds the digest of each page
//! (content and annotations), each document information entry, the XMP metadata, each embedded
//! file and each other catalog entry ([`crate::pdf::parts`]). A signed report therefore binds
//! what is printed to what is embedded; an unsigned one carries the same digests, which catch an
//! edit but can be recomputed by anyone (verification then re-renders, see `archive::verify`).

use super::keys::{PublicKey, SecretKey};
use super::{hex, unhex};
use crate::pdf::parts::{document_parts, DocumentParts};
use crate::pdf::{files, Limits, Object, Pdf, PdfError};
use crate::report::{Attachment, AttachmentError};
use serde::{Deserialize, Serialize};
use std::fmt;

/// The seal's attachment name.
pub const SEAL_NAME: &str = "annulus-seal.json";
/// The seal format this program writes.
pub const SEAL_FORMAT: &str = "annulus-seal/1";
/// Prefix of the signed message, so a seal signature can never be taken for another kind.
const SIGNED_CONTEXT: &[u8] = b"annulus document seal\n";

/// What the seal records.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct SealPayload {
    pub format: String,
    /// SHA-256 of the embedded manifest's bytes (the content fingerprint).
    pub manifest_sha256: String,
    pub document: DocumentParts,
}

impl SealPayload {
    /// The bytes the signature is made over.
    pub fn signed_bytes(&self) -> Vec<u8> {
        let mut v = SIGNED_CONTEXT.to_vec();
        v.extend_from_slice(&serde_json::to_vec(self).unwrap_or_default());
        v
    }
}

/// An Ed25519 signature of the payload.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct SealSignature {
    pub algorithm: String,
    pub public_key: String,
    pub value: String,
}

/// The seal: payload and, for a signed document, its signature.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct Seal {
    pub payload: SealPayload,
    pub signature: Option<SealSignature>,
}

/// What a seal's signature says, before any trust list is consulted.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum SealSignatureState {
    Unsigned,
    /// Valid for the payload, made by this key.
    Valid(PublicKey),
    Invalid(String),
}

impl Seal {
    pub fn to_bytes(&self) -> Vec<u8> {
        let mut v = serde_json::to_vec_pretty(self).unwrap_or_default();
        v.push(b'\n');
        v
    }

    pub fn parse(bytes: &[u8]) -> Option<Seal> {
        serde_json::from_slice(bytes).ok()
    }

    /// Whether the signature (if any) is a valid signature of the payload, and by which key.
    pub fn signature_state(&self) -> SealSignatureState {
        let Some(sig) = &self.signature else {
            return SealSignatureState::Unsigned;
        };
        if sig.algorithm != "ed25519" {
            return SealSignatureState::Invalid(format!(
                "the signature algorithm `{}` is not ed25519",
                sig.algorithm
            ));
        }
        let Ok(key) = PublicKey::from_hex(&sig.public_key) else {
            return SealSignatureState::Invalid("the recorded public key is damaged".into());
        };
        let Some(value) = unhex(&sig.value) else {
            return SealSignatureState::Invalid("the signature value is not hex".into());
        };
        if key.verify(&self.payload.signed_bytes(), &value) {
            SealSignatureState::Valid(key)
        } else {
            SealSignatureState::Invalid(format!(
                "the signature by key {} does not match the seal (the seal changed after signing, or the signature is forged)",
                key.fingerprint()
            ))
        }
    }
}

/// The placeholder seal the engine embeds; [`seal_pdf`] replaces its data.
pub fn placeholder() -> Result<Attachment, AttachmentError> {
    Attachment::new(
        SEAL_NAME,
        b"{}".to_vec(),
        "application/json",
        "document seal: SHA-256 of every page, the metadata and every other embedded file, signed when the document is signed",
    )
}

/// Why a rendered document could not be sealed (a bug or a broken render: never bad input).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SealError(pub String);

impl fmt::Display for SealError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "cannot seal the document: {}", self.0)
    }
}

impl std::error::Error for SealError {}

impl From<PdfError> for SealError {
    fn from(e: PdfError) -> Self {
        SealError(e.to_string())
    }
}

/// The digests of a rendered document (its seal's data left out).
pub fn digests(pdf: &[u8]) -> Result<DocumentParts, PdfError> {
    let doc = Pdf::parse(pdf, Limits::default())?;
    document_parts(&doc, SEAL_NAME)
}

/// Seals a document rendered with the [`placeholder`]: records its digests and the manifest's
/// SHA-256, signs them with `key` when given, and writes the seal in place of the placeholder.
pub fn seal_pdf(
    unsealed: &[u8],
    manifest_sha256: &str,
    key: Option<&SecretKey>,
) -> Result<Vec<u8>, SealError> {
    let doc = Pdf::parse(unsealed, Limits::default())?;
    let payload = SealPayload {
        format: SEAL_FORMAT.to_string(),
        manifest_sha256: manifest_sha256.to_string(),
        document: document_parts(&doc, SEAL_NAME)?,
    };
    let signature = key.map(|k| SealSignature {
        algorithm: "ed25519".into(),
        public_key: k.public().to_hex(),
        value: hex(&k.sign(&payload.signed_bytes())),
    });
    let seal = Seal { payload, signature };
    let found = files::embedded(&doc, &[SEAL_NAME])?;
    let Some((_, Some(r))) = found.iter().find(|(f, _)| f.name == SEAL_NAME) else {
        return Err(SealError(format!(
            "the rendered document has no `{SEAL_NAME}`"
        )));
    };
    let Some(dict) = doc.get(*r)?.dict().cloned() else {
        return Err(SealError("the placeholder seal is not a stream".into()));
    };
    let data = seal.to_bytes();
    // the stream is written uncompressed: drop the filter, and give the new size (§7.11.4)
    let mut d = dict;
    d.0.retain(|(k, _)| !matches!(k.as_slice(), b"Filter" | b"DecodeParms" | b"Length"));
    for (k, v) in d.0.iter_mut() {
        if k.as_slice() == b"Params" {
            if let Object::Dict(p) = v {
                for (pk, pv) in p.0.iter_mut() {
                    if pk.as_slice() == b"Size" {
                        *pv = Object::Int(data.len() as i64);
                    }
                }
            }
        }
    }
    Ok(crate::pdf::splice::replace_stream(&doc, r.num, &d, &data)?)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::pdf::tests::sample_with_seal;

    #[test]
    fn a_sealed_file_keeps_its_digests_and_its_signature_verifies() {
        let unsealed = sample_with_seal(SEAL_NAME);
        let before = digests(&unsealed).unwrap();
        let k = SecretKey::from_seed([9; 32]);
        let fp = "12".repeat(32);
        let sealed = seal_pdf(&unsealed, &fp, Some(&k)).unwrap();
        assert_eq!(digests(&sealed).unwrap(), before);
        let doc = Pdf::parse(&sealed, Limits::default()).unwrap();
        assert!(doc.revisions().single());
        let found = files::embedded(&doc, &[]).unwrap();
        let (seal_file, _) = found.iter().find(|(f, _)| f.name == SEAL_NAME).unwrap();
        let seal = Seal::parse(&seal_file.bytes).unwrap();
        assert_eq!(seal.payload.document, before);
        assert_eq!(seal.payload.manifest_sha256, fp);
        assert_eq!(
            seal.signature_state(),
            SealSignatureState::Valid(k.public())
        );
        // reproducible, and unsigned sealing works the same way
        assert_eq!(seal_pdf(&unsealed, &fp, Some(&k)).unwrap(), sealed);
        let plain = seal_pdf(&unsealed, &fp, None).unwrap();
        assert_eq!(digests(&plain).unwrap(), before);
    }

    #[test]
    fn seal_signatures_bind_the_payload() {
        let k = SecretKey::from_seed([5; 32]);
        let payload = SealPayload {
            format: SEAL_FORMAT.into(),
            manifest_sha256: "ab".repeat(32),
            document: DocumentParts::default(),
        };
        let sig = SealSignature {
            algorithm: "ed25519".into(),
            public_key: k.public().to_hex(),
            value: hex(&k.sign(&payload.signed_bytes())),
        };
        let seal = Seal {
            payload: payload.clone(),
            signature: Some(sig.clone()),
        };
        assert_eq!(
            seal.signature_state(),
            SealSignatureState::Valid(k.public())
        );
        assert_eq!(Seal::parse(&seal.to_bytes()), Some(seal.clone()));
        let mut changed = seal.clone();
        changed.payload.manifest_sha256 = "cd".repeat(32);
        assert!(matches!(
            changed.signature_state(),
            SealSignatureState::Invalid(_)
        ));
        // a signature of the bare payload (without the context) is not accepted
        let mut bare = seal.clone();
        bare.signature.as_mut().unwrap().value =
            hex(&k.sign(&serde_json::to_vec(&payload).unwrap()));
        assert!(matches!(
            bare.signature_state(),
            SealSignatureState::Invalid(_)
        ));
        let unsigned = Seal {
            payload,
            signature: None,
        };
        assert_eq!(unsigned.signature_state(), SealSignatureState::Unsigned);
    }
}
