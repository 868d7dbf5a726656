//! Ed25519 key pairs in a small text format of our own:
//!
//! ```text
//! annulus ed25519 secret key
//! <64 hex digits: the 32-byte seed>
//! ```
//!
//! and `annulus ed25519 public key` with the 32-byte public key. The key fingerprint printed on
//! reports is the first 16 hex digits of SHA-256 of the public key bytes, grouped by four.

use super::{hex, sha256_hex, unhex};
use ed25519_dalek::{Signer, SigningKey, Verifier, VerifyingKey};
use std::fmt;

const SECRET_HEADER: &str = "annulus ed25519 secret key";
const PUBLIC_HEADER: &str = "annulus ed25519 public key";

#[derive(Debug, Clone, PartialEq, Eq)]
pub enum KeyError {
    NotAKeyFile { expected: &'static str },
    BadKey(String),
    NoRandomness(String),
}

impl fmt::Display for KeyError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            KeyError::NotAKeyFile { expected } => {
                write!(
                    f,
                    "not an annulus key file (expected a first line `{expected}`)"
                )
            }
            KeyError::BadKey(m) => write!(f, "the key is damaged: {m}"),
            KeyError::NoRandomness(m) => write!(f, "the system random source failed: {m}"),
        }
    }
}

impl std::error::Error for KeyError {}

/// A signing key.
pub struct SecretKey(SigningKey);

/// A verifying key.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PublicKey(VerifyingKey);

impl SecretKey {
    /// A new key from the operating system's random source.
    pub fn generate() -> Result<SecretKey, KeyError> {
        let mut seed = [0u8; 32];
        getrandom::getrandom(&mut seed).map_err(|e| KeyError::NoRandomness(e.to_string()))?;
        Ok(SecretKey(SigningKey::from_bytes(&seed)))
    }

    pub fn from_seed(seed: [u8; 32]) -> SecretKey {
        SecretKey(SigningKey::from_bytes(&seed))
    }

    pub fn to_text(&self) -> String {
        format!("{SECRET_HEADER}\n{}\n", hex(&self.0.to_bytes()))
    }

    pub fn parse(text: &str) -> Result<SecretKey, KeyError> {
        let bytes = body(text, SECRET_HEADER)?;
        let seed: [u8; 32] = bytes
            .try_into()
            .map_err(|_| KeyError::BadKey("a secret key is 32 bytes".into()))?;
        Ok(SecretKey::from_seed(seed))
    }

    pub fn public(&self) -> PublicKey {
        PublicKey(self.0.verifying_key())
    }

    pub fn sign(&self, message: &[u8]) -> Vec<u8> {
        self.0.sign(message).to_bytes().to_vec()
    }
}

fn body(text: &str, header: &'static str) -> Result<Vec<u8>, KeyError> {
    let mut lines = text.lines().map(str::trim).filter(|l| !l.is_empty());
    if lines.next() != Some(header) {
        return Err(KeyError::NotAKeyFile { expected: header });
    }
    let hexline = lines
        .next()
        .ok_or_else(|| KeyError::BadKey("the key line is missing".into()))?;
    unhex(hexline).ok_or_else(|| KeyError::BadKey("the key line is not hex".into()))
}

impl PublicKey {
    pub fn to_text(&self) -> String {
        format!("{PUBLIC_HEADER}\n{}\n", self.to_hex())
    }

    pub fn to_hex(&self) -> String {
        hex(self.0.as_bytes())
    }

    pub fn from_hex(h: &str) -> Result<PublicKey, KeyError> {
        let bytes: [u8; 32] = unhex(h)
            .ok_or_else(|| KeyError::BadKey("not hex".into()))?
            .try_into()
            .map_err(|_| KeyError::BadKey("a public key is 32 bytes".into()))?;
        VerifyingKey::from_bytes(&bytes)
            .map(PublicKey)
            .map_err(|e| KeyError::BadKey(e.to_string()))
    }

    pub fn parse(text: &str) -> Result<PublicKey, KeyError> {
        let bytes = body(text, PUBLIC_HEADER)?;
        PublicKey::from_hex(&hex(&bytes))
    }

    /// Short fingerprint printed on reports, e.g. `3f2a 9c01 77be 4d10`.
    pub fn fingerprint(&self) -> String {
        let h = sha256_hex(self.0.as_bytes());
        (0..4)
            .map(|i| &h[4 * i..4 * i + 4])
            .collect::<Vec<_>>()
            .join(" ")
    }

    /// Whether `signature` is this key's signature of `message`.
    pub fn verify(&self, message: &[u8], signature: &[u8]) -> bool {
        let Ok(bytes) = <[u8; 64]>::try_from(signature) else {
            return false;
        };
        let sig = ed25519_dalek::Signature::from_bytes(&bytes);
        self.0.verify(message, &sig).is_ok()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rfc_8032_test_vector_1() {
        // RFC 8032 §7.1 TEST 1: secret key 9d61…7f60, empty message
        let seed: [u8; 32] =
            unhex("9d61b19deffd5a60ba844af492ec2cc44449c5697b326919703bac031cae7f60")
                .unwrap()
                .try_into()
                .unwrap();
        let k = SecretKey::from_seed(seed);
        assert_eq!(
            k.public().to_hex(),
            "d75a980182b10ab7d54bfed3c964073a0ee172f3daa62325af021a68f707511a"
        );
        let sig = k.sign(b"");
        assert_eq!(
            hex(&sig),
            "e5564300c360ac729086e2cc806e828a84877f1eb8e5d974d873e065224901555fb8821590a33bacc61e39701cf9b46bd25bf5f0595bbe24655141438e7a100b"
        );
        assert!(k.public().verify(b"", &sig));
        assert!(!k.public().verify(b"x", &sig));
    }

    #[test]
    fn text_round_trip_and_refusals() {
        let k = SecretKey::generate().unwrap();
        let k2 = SecretKey::parse(&k.to_text()).unwrap();
        assert_eq!(k.public(), k2.public());
        let p = PublicKey::parse(&k.public().to_text()).unwrap();
        assert_eq!(p, k.public());
        assert!(matches!(
            PublicKey::parse(&k.to_text()),
            Err(KeyError::NotAKeyFile { .. })
        ));
        assert!(SecretKey::parse("annulus ed25519 secret key\nabcd\n").is_err());
        assert_eq!(k.public().fingerprint().len(), 19);
    }
}
