//! Archive side of a report: what it holds, how it is sealed and signed, how it is verified, and the
//! review of whole folders.
//!
//! A report embeds its inputs byte-exact (survey, readings, calibration record, the template when a
//! firm's own was used) and the results JSON ([`bundle`]). The [`manifest`] lists the SHA-256 of
//! each, the program, the renderer, the document date and the signer; its own SHA-256 is the
//! report's content fingerprint, printed on every page. The [`seal`] records a digest of every part
//! of the finished PDF a reader sees ([`crate::pdf::parts`]) and is what an Ed25519 signature
//! (`ed25519-dalek`, [`keys`]) covers; [`make`] renders and seals. [`verify`] judges a PDF's
//! content, signature (against a [`trust`] list), results and, where needed, re-renders it;
//! [`review`] does that for every file of a folder, with [`forensics`] naming known mistakes. The
//! PDF reading is [`crate::pdf`], bounded against hostile files. No file reading here except through the
//! caller's bytes.

pub mod bundle;
pub mod forensics;
pub mod keys;
pub mod make;
pub mod manifest;
pub mod review;
pub mod seal;
pub mod submittal;
pub mod trust;
pub mod verify;

/// Digests live in `crate::digest` (the report's attachments use them too).
pub use crate::digest::{hex, sha256_hex};
pub use keys::{KeyError, PublicKey, SecretKey};
pub use manifest::{FileEntry, Manifest, Signature};

/// Bytes from hex; `None` on odd length or a non-hex digit.
pub fn unhex(text: &str) -> Option<Vec<u8>> {
    let t = text.trim();
    if !t.len().is_multiple_of(2) {
        return None;
    }
    (0..t.len())
        .step_by(2)
        .map(|i| u8::from_str_radix(t.get(i..i + 2)?, 16).ok())
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sha256_known_values() {
        // FIPS 180-2 Appendix B.1 test vector: SHA-256("abc")
        assert_eq!(
            sha256_hex(b"abc"),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
        assert_eq!(unhex(&hex(&[0, 1, 254, 255])), Some(vec![0, 1, 254, 255]));
        assert_eq!(unhex("abc"), None);
        assert_eq!(unhex("zz"), None);
    }
}
