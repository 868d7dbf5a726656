//! What a test-and-balance submittal carries: the system file, every duct's survey and readings
//! (and calibration records), the terminals CSV and the results JSON, byte-exact, with the
//! manifest of their hashes and, when signed, the signature.

use super::manifest::{Manifest, Signature, MANIFEST_NAME, RESULTS_NAME, SIGNATURE_NAME};
use crate::input::system_file::LoadedSystem;
use crate::report::{Attachment, AttachmentError};

/// The embedded files of a submittal, before the manifest and signature are added: attachment
/// name, path relative to the system file's folder, role, bytes.
#[derive(Debug, Clone)]
pub struct SubmittalBundle {
    pub files: Vec<(String, String, &'static str, Vec<u8>)>,
    pub manifest: Manifest,
}

/// An attachment name for a relative path: its folders joined with `-` (attachment names carry no
/// directories), made unique with a number when two paths give the same name.
fn attachment_name(path: &str, taken: &[String]) -> String {
    let base = path
        .split('/')
        .filter(|p| !p.is_empty() && *p != "." && *p != "..")
        .collect::<Vec<_>>()
        .join("-");
    let base = if base.is_empty() {
        "file".to_string()
    } else {
        base
    };
    if !taken.contains(&base) {
        return base;
    }
    (2..)
        .map(|n| format!("{n}-{base}"))
        .find(|n| !taken.contains(n))
        .unwrap_or(base)
}

/// Packs the inputs and results of an evaluated system.
pub fn pack_system(
    loaded: &LoadedSystem,
    convention: &str,
    results_json: Vec<u8>,
    program: &str,
) -> SubmittalBundle {
    let mut files: Vec<(String, String, &'static str, Vec<u8>)> = Vec::new();
    for input in loaded.inputs() {
        let taken: Vec<String> = files.iter().map(|f| f.0.clone()).collect();
        let name = attachment_name(&input.path, &taken);
        files.push((name, input.path, input.role, input.bytes));
    }
    files.push((
        RESULTS_NAME.to_string(),
        RESULTS_NAME.to_string(),
        "results",
        results_json,
    ));
    let manifest = Manifest::new(
        program,
        convention,
        &loaded.spec.date.to_string(),
        files
            .iter()
            .map(|(n, p, r, b)| Manifest::entry(n, p, r, b))
            .collect(),
    );
    SubmittalBundle { files, manifest }
}

impl SubmittalBundle {
    /// The PDF attachments: every file, the manifest, and the signature when given.
    pub fn attachments(
        &self,
        signature: Option<&Signature>,
    ) -> Result<Vec<Attachment>, AttachmentError> {
        let mut v = Vec::new();
        for (name, path, role, bytes) in &self.files {
            let (mime, what) = match *role {
                "system" => ("application/toml", format!("system file `{path}` as read")),
                "survey" => ("application/toml", format!("survey file `{path}` as read")),
                "readings" => ("text/csv", format!("readings `{path}` as read")),
                "terminals" => ("text/csv", format!("terminal readings `{path}` as read")),
                "calibration" => (
                    "application/toml",
                    format!("pitot calibration `{path}` as read"),
                ),
                "calibration-readings" => (
                    "text/csv",
                    format!("pitot calibration readings `{path}` as read"),
                ),
                _ => (
                    "application/json",
                    "system results as computed (SI, contract keys)".to_string(),
                ),
            };
            v.push(Attachment::new(name.clone(), bytes.clone(), mime, what)?);
        }
        v.push(Attachment::new(
            MANIFEST_NAME,
            self.manifest.canonical_bytes(),
            "application/json",
            "manifest: SHA-256 of every embedded file; its own SHA-256 is the content fingerprint",
        )?);
        if let Some(sig) = signature {
            v.push(Attachment::new(
                SIGNATURE_NAME,
                sig.to_bytes(),
                "application/json",
                "Ed25519 signature of the manifest",
            )?);
        }
        Ok(v)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn attachment_names_are_flat_and_unique() {
        let taken = vec!["sa-main-survey.toml".to_string()];
        assert_eq!(
            attachment_name("sa-main/survey.toml", &[]),
            "sa-main-survey.toml"
        );
        assert_eq!(
            attachment_name("sa-main/survey.toml", &taken),
            "2-sa-main-survey.toml"
        );
        assert_eq!(
            attachment_name("../../sample-data/b/oa.csv", &[]),
            "sample-data-b-oa.csv"
        );
    }
}
