//! Ed25519 key pairs in a small text format of our own:
//!
//! ```text
//! annulus ed25519 secret key
//! name: dana-ferrow
//! <64 hex digits: the 32-byte seed>
//! ```
//!
//! and `annulus ed25519 public key` with the key's name and the 32-byte public key. The name is
//! the one given to `annulus keygen NAME`; a signed report prints it in its sign-off block, and a
//! trust list made of `.pub` files knows each key by it. Files written before keys had names (no
//! `name:` line) are still read; their name is `None`. The key fingerprint printed on reports is
//! the first 16 hex digits of SHA-256 of the public key bytes, grouped by four.

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

/// Longest key name accepted.
pub const MAX_NAME_CHARS: usize = 100;

/// A signing key and the name it was made with.
pub struct SecretKey {
    key: SigningKey,
    name: Option<String>,
}

/// A verifying key.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PublicKey(VerifyingKey);

impl SecretKey {
    /// A new key from the operating system's random source.
    pub fn generate() -> Result<SecretKey, KeyError> {
        let mut seed = [0u8; 32];
        getrandom::getrandom(&mut seed).map_err(|e| KeyError::NoRandomness(e.to_string()))?;
        Ok(SecretKey::from_seed(seed))
    }

    pub fn from_seed(seed: [u8; 32]) -> SecretKey {
        SecretKey {
            key: SigningKey::from_bytes(&seed),
            name: None,
        }
    }

    /// The same key under `name` (refused when empty, too long or holding a control character).
    pub fn named(self, name: &str) -> Result<SecretKey, KeyError> {
        Ok(SecretKey {
            name: Some(check_name(name)?),
            ..self
        })
    }

    /// The name the key was made with, if its file records one.
    pub fn name(&self) -> Option<&str> {
        self.name.as_deref()
    }

    pub fn to_text(&self) -> String {
        format!(
            "{SECRET_HEADER}\n{}{}\n",
            name_line(self.name.as_deref()),
            hex(&self.key.to_bytes())
        )
    }

    pub fn parse(text: &str) -> Result<SecretKey, KeyError> {
        let (name, bytes) = body(text, SECRET_HEADER)?;
        let seed: [u8; 32] = bytes
            .try_into()
            .map_err(|_| KeyError::BadKey("a secret key is 32 bytes".into()))?;
        Ok(SecretKey {
            key: SigningKey::from_bytes(&seed),
            name,
        })
    }

    pub fn public(&self) -> PublicKey {
        PublicKey(self.key.verifying_key())
    }

    pub fn sign(&self, message: &[u8]) -> Vec<u8> {
        self.key.sign(message).to_bytes().to_vec()
    }
}

/// A usable key name: trimmed, not empty, at most [`MAX_NAME_CHARS`], no control characters.
pub fn check_name(name: &str) -> Result<String, KeyError> {
    let n = name.trim();
    if n.is_empty() {
        return Err(KeyError::BadKey("the key name is empty".into()));
    }
    if n.chars().count() > MAX_NAME_CHARS {
        return Err(KeyError::BadKey(format!(
            "the key name is longer than {MAX_NAME_CHARS} characters"
        )));
    }
    if n.chars().any(char::is_control) {
        return Err(KeyError::BadKey(
            "the key name holds a control character".into(),
        ));
    }
    Ok(n.to_string())
}

fn name_line(name: Option<&str>) -> String {
    name.map(|n| format!("name: {n}\n")).unwrap_or_default()
}

/// The optional `name:` line and the key bytes after `header`.
fn body(text: &str, header: &'static str) -> Result<(Option<String>, Vec<u8>), KeyError> {
    let mut lines = text.lines().map(str::trim).filter(|l| !l.is_empty());
    if lines.next() != Some(header) {
        return Err(KeyError::NotAKeyFile { expected: header });
    }
    let mut line = lines
        .next()
        .ok_or_else(|| KeyError::BadKey("the key line is missing".into()))?;
    let mut name = None;
    if let Some(n) = line.strip_prefix("name:") {
        name = Some(check_name(n)?);
        line = lines
            .next()
            .ok_or_else(|| KeyError::BadKey("the key line is missing".into()))?;
    }
    let bytes = unhex(line).ok_or_else(|| KeyError::BadKey("the key line is not hex".into()))?;
    Ok((name, bytes))
}

/// A public key and the name its file gives it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct NamedKey {
    pub name: Option<String>,
    pub key: PublicKey,
}

impl NamedKey {
    /// Reads a `.pub` file's text.
    pub fn parse(text: &str) -> Result<NamedKey, KeyError> {
        let (name, bytes) = body(text, PUBLIC_HEADER)?;
        Ok(NamedKey {
            name,
            key: PublicKey::from_hex(&hex(&bytes))?,
        })
    }

    pub fn to_text(&self) -> String {
        format!(
            "{PUBLIC_HEADER}\n{}{}\n",
            name_line(self.name.as_deref()),
            self.key.to_hex()
        )
    }
}

impl PublicKey {
    /// The `.pub` file text without a name (see [`NamedKey::to_text`]).
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

    /// Reads a `.pub` file's text (its name, if any, is dropped: see [`NamedKey::parse`]).
    pub fn parse(text: &str) -> Result<PublicKey, KeyError> {
        NamedKey::parse(text).map(|k| k.key)
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

    #[test]
    fn names_are_kept_validated_and_optional() {
        let k = SecretKey::from_seed([3; 32]).named("dana-ferrow").unwrap();
        let text = k.to_text();
        assert!(text.starts_with("annulus ed25519 secret key\nname: dana-ferrow\n"));
        let back = SecretKey::parse(&text).unwrap();
        assert_eq!(back.name(), Some("dana-ferrow"));
        assert_eq!(back.public(), k.public());
        let public = NamedKey {
            name: Some("dana-ferrow".into()),
            key: k.public(),
        };
        assert_eq!(NamedKey::parse(&public.to_text()).unwrap(), public);
        // a file from before names were recorded
        let old = format!("annulus ed25519 public key\n{}\n", k.public().to_hex());
        assert_eq!(NamedKey::parse(&old).unwrap().name, None);
        assert!(SecretKey::from_seed([3; 32]).named(" ").is_err());
        assert!(SecretKey::from_seed([3; 32]).named("a\u{7}").is_err());
        assert!(SecretKey::from_seed([3; 32])
            .named(&"x".repeat(MAX_NAME_CHARS + 1))
            .is_err());
    }
}
