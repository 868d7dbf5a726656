//! The embedded files against the manifest: each listed file present with its recorded SHA-256
//! and size, nothing embedded that the manifest does not list.

use crate::archive::manifest::{Manifest, MANIFEST_NAME, SIGNATURE_NAME};
use crate::archive::seal::SEAL_NAME;
use crate::archive::sha256_hex;
use crate::pdf::files::EmbeddedFile;
use serde::Serialize;
use std::collections::HashMap;

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
/// Every manifest entry against the attachment it names, then every attachment the manifest does
/// not list (the manifest, the seal and a first-format signature excepted), then duplicates.
pub fn check_files(
    manifest: &Manifest,
    embedded: &[EmbeddedFile],
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
        if listed || f.name == MANIFEST_NAME || f.name == SIGNATURE_NAME || f.name == SEAL_NAME {
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
