//! The trust list: the named public keys whose signatures count.
//!
//! Owns [`TrustList`] (validated: every key once, every key named) and the text forms it is built
//! from: a `.pub` file of `annulus keygen` (one key, named by its `name:` line or the file's stem)
//! and a trust list file (TOML, any number of keys):
//!
//! ```toml
//! # keys whose signatures this office accepts
//! [[key]]
//! name = "dana-ferrow"
//! public_key = "<64 hex digits>"
//! ```
//!
//! Reading folders and files is the command line's job (`cli::trust`); this module only judges text.

use super::keys::{check_name, KeyError, NamedKey, PublicKey};
use std::fmt;

/// Keys whose signatures count, each with the name verification reports.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct TrustList {
    keys: Vec<(String, PublicKey)>,
    /// Where the keys came from, for messages (`--key a.pub`, `trusted/`, the config file).
    pub sources: Vec<String>,
}

/// Why keys could not be added to a trust list.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum TrustError {
    Key(KeyError),
    /// Not a `.pub` file and not a trust list file.
    NotATrustList(String),
    /// The same key twice under two names.
    Ambiguous {
        fingerprint: String,
        first: String,
        second: String,
    },
}

impl fmt::Display for TrustError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            TrustError::Key(e) => write!(f, "{e}"),
            TrustError::NotATrustList(m) => write!(f, "{m}"),
            TrustError::Ambiguous {
                fingerprint,
                first,
                second,
            } => write!(
                f,
                "key {fingerprint} is listed twice, as `{first}` and as `{second}`; a key has one name"
            ),
        }
    }
}

impl std::error::Error for TrustError {}

impl From<KeyError> for TrustError {
    fn from(e: KeyError) -> Self {
        TrustError::Key(e)
    }
}

#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct ListFile {
    #[serde(default)]
    key: Vec<ListEntry>,
}

#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct ListEntry {
    name: String,
    public_key: String,
}

impl TrustList {
    pub fn new() -> Self {
        Self::default()
    }

    pub fn is_empty(&self) -> bool {
        self.keys.is_empty()
    }

    pub fn len(&self) -> usize {
        self.keys.len()
    }

    /// Adds `key` under `name`; the same key under the same name again is ignored.
    pub fn add(&mut self, name: &str, key: PublicKey) -> Result<(), TrustError> {
        let name = check_name(name)?;
        if let Some((n, _)) = self.keys.iter().find(|(_, k)| *k == key) {
            if *n == name {
                return Ok(());
            }
            return Err(TrustError::Ambiguous {
                fingerprint: key.fingerprint(),
                first: n.clone(),
                second: name,
            });
        }
        self.keys.push((name, key));
        Ok(())
    }

    /// The name the list gives `key`, if it is trusted.
    pub fn name_of(&self, key: &PublicKey) -> Option<&str> {
        self.keys
            .iter()
            .find(|(_, k)| k == key)
            .map(|(n, _)| n.as_str())
    }

    /// Names and fingerprints, in the order added.
    pub fn entries(&self) -> impl Iterator<Item = (&str, &PublicKey)> {
        self.keys.iter().map(|(n, k)| (n.as_str(), k))
    }

    /// Adds the keys of a `.pub` file or a trust list file; `stem` names a `.pub` file's key when
    /// the file records no name.
    pub fn add_text(&mut self, text: &str, stem: &str) -> Result<usize, TrustError> {
        let text = text.strip_prefix('\u{feff}').unwrap_or(text);
        if text.trim_start().starts_with("annulus ed25519 public key") {
            let k = NamedKey::parse(text)?;
            self.add(k.name.as_deref().unwrap_or(stem), k.key)?;
            return Ok(1);
        }
        if text.trim_start().starts_with("annulus ed25519 secret key") {
            return Err(TrustError::NotATrustList(
                "this is a secret key: give the .pub file (the public half), and keep the .key file private"
                    .into(),
            ));
        }
        let list: ListFile = toml::from_str(text).map_err(|e| {
            TrustError::NotATrustList(format!(
                "neither a .pub file nor a trust list ([[key]] tables with `name` and `public_key`): {}",
                e.message().trim()
            ))
        })?;
        for e in &list.key {
            let key = PublicKey::from_hex(&e.public_key).map_err(|err| {
                TrustError::NotATrustList(format!("the key named `{}`: {err}", e.name))
            })?;
            self.add(&e.name, key)?;
        }
        Ok(list.key.len())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::archive::SecretKey;

    #[test]
    fn pub_files_and_list_files_add_named_keys() {
        let a = SecretKey::from_seed([1; 32]).public();
        let b = SecretKey::from_seed([2; 32]).public();
        let mut t = TrustList::new();
        let named = NamedKey {
            name: Some("dana-ferrow".into()),
            key: a.clone(),
        };
        assert_eq!(t.add_text(&named.to_text(), "file-stem").unwrap(), 1);
        assert_eq!(t.name_of(&a), Some("dana-ferrow"));
        // an unnamed .pub takes its file's stem
        let mut u = TrustList::new();
        u.add_text(&b.to_text(), "erin").unwrap();
        assert_eq!(u.name_of(&b), Some("erin"));
        // a list file
        let list = format!(
            "# office keys\n[[key]]\nname = \"Erin Okafor\"\npublic_key = \"{}\"\n",
            b.to_hex()
        );
        assert_eq!(t.add_text(&list, "x").unwrap(), 1);
        assert_eq!(t.name_of(&b), Some("Erin Okafor"));
        assert_eq!(t.len(), 2);
        // the same key under another name is refused; under the same name it is no change
        assert!(matches!(
            t.add("someone", a.clone()),
            Err(TrustError::Ambiguous { .. })
        ));
        t.add("dana-ferrow", a.clone()).unwrap();
        assert_eq!(t.len(), 2);
        // secret keys and other text are refused with a reason
        let e = t
            .add_text(&SecretKey::from_seed([1; 32]).to_text(), "k")
            .unwrap_err();
        assert!(e.to_string().contains("secret key"), "{e}");
        assert!(t.add_text("[[key]]\nname = \"x\"\n", "k").is_err());
        assert!(t
            .add_text("[[key]]\nname = \"x\"\npublic_key = \"zz\"\n", "k")
            .is_err());
    }
}
