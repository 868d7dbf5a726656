//! What a report carries: the survey and readings byte-exact, the calibration record it names,
//! the results JSON, the template when a firm's own was used, and the manifest, as PDF
//! attachments with their names and roles. (The document seal is added by `archive::make`.)

use super::manifest::{Manifest, MANIFEST_NAME, RESULTS_NAME};
use crate::input::Loaded;
use crate::report::{Attachment, AttachmentError};

/// The embedded files of a report, before the manifest and signature are added.
#[derive(Debug, Clone)]
pub struct Bundle {
    pub files: Vec<(String, String, &'static str, Vec<u8>)>,
    pub manifest: Manifest,
}

fn file_name(path: &str) -> String {
    std::path::Path::new(path)
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| path.to_string())
}

/// A path as the manifest records it: relative to the survey's folder, as written. An absolute
/// path is never recorded (it would carry this machine's folder names into the report): only its
/// file name is. `annulus report` refuses such surveys anyway ([`crate::input::fs::check_embeddable`]).
fn manifest_path(written: &str) -> String {
    match crate::input::fs::classify_reference(written) {
        crate::input::fs::Place::Absolute => file_name(written),
        _ => written.to_string(),
    }
}

/// Packs the inputs and results of an evaluated survey. Attachment names are file names, made
/// unique by prefixing the run id where two runs' files share a name.
pub fn pack(loaded: &Loaded, results_json: Vec<u8>, program: &str) -> Bundle {
    let s = &loaded.survey;
    let mut files: Vec<(String, String, &'static str, Vec<u8>)> = vec![(
        file_name(&loaded.survey_file.name),
        loaded.survey_file.name.clone(),
        "survey",
        loaded.survey_file.bytes.clone(),
    )];
    for (spec, (src, _)) in s.runs.iter().zip(&loaded.runs) {
        let mut name = file_name(&src.name);
        if files.iter().any(|(n, _, _, _)| *n == name) {
            name = format!("run{}-{name}", spec.id);
        }
        files.push((
            name,
            manifest_path(&src.name),
            "readings",
            src.bytes.clone(),
        ));
    }
    for (spec, wall) in s.runs.iter().zip(&loaded.wall_readings) {
        let Some((src, _)) = wall else { continue };
        let mut name = file_name(&src.name);
        if files.iter().any(|(n, _, _, _)| *n == name) {
            name = format!("run{}-{name}", spec.id);
        }
        files.push((name, src.name.clone(), "wall-readings", src.bytes.clone()));
    }
    if let (Some((cal, cal_readings)), Some(pc)) = (&loaded.calibration, &s.probe.calibration) {
        // paths relative to the survey's folder, so the files can be laid out again from the PDF
        let dir = loaded
            .survey_file
            .path
            .parent()
            .unwrap_or(std::path::Path::new(""));
        let readings_rel = cal_readings
            .path
            .strip_prefix(dir)
            .map(|p| p.to_string_lossy().into_owned())
            .map(|p| manifest_path(&p))
            .unwrap_or_else(|_| cal_readings.name.clone());
        for (src, path, role) in [
            (cal, manifest_path(&pc.file), "calibration"),
            (cal_readings, readings_rel, "calibration-readings"),
        ] {
            let mut name = file_name(&src.name);
            if files.iter().any(|(n, _, _, _)| *n == name) {
                name = format!("calibration-{name}");
            }
            files.push((name, path, role, src.bytes.clone()));
        }
    }
    files.push((
        RESULTS_NAME.to_string(),
        RESULTS_NAME.to_string(),
        "results",
        results_json,
    ));
    let manifest = Manifest::new(
        program,
        s.convention.name(),
        &s.date.to_string(),
        files
            .iter()
            .map(|(n, p, r, b)| Manifest::entry(n, p, r, b))
            .collect(),
    );
    Bundle { files, manifest }
}

impl Bundle {
    /// Adds a file after the others (before the results), recording it in the manifest; the
    /// name is made unique with `prefix` when taken.
    pub fn add(
        &mut self,
        name: &str,
        path: &str,
        role: &'static str,
        bytes: Vec<u8>,
        prefix: &str,
    ) {
        let mut name = file_name(name);
        if self.files.iter().any(|(n, _, _, _)| *n == name) {
            name = format!("{prefix}-{name}");
        }
        let at = self
            .files
            .iter()
            .position(|(_, _, r, _)| *r == "results")
            .unwrap_or(self.files.len());
        self.manifest
            .files
            .insert(at, Manifest::entry(&name, path, role, &bytes));
        self.files.insert(at, (name, path.to_string(), role, bytes));
    }

    /// The PDF attachments: every file, then the manifest.
    pub fn attachments(&self) -> Result<Vec<Attachment>, AttachmentError> {
        let mut v = Vec::new();
        for (name, path, role, bytes) in &self.files {
            let (mime, what) = match *role {
                "survey" => ("application/toml", format!("survey file `{path}` as read")),
                "readings" => ("text/csv", format!("readings `{path}` as read")),
                "wall-readings" => (
                    "text/csv",
                    format!("Method 2H wall-effects readings `{path}` as read"),
                ),
                "calibration" => (
                    "application/toml",
                    format!("pitot calibration `{path}` as read"),
                ),
                "calibration-readings" => (
                    "text/csv",
                    format!("pitot calibration readings `{path}` as read"),
                ),
                "template" => (
                    "text/plain",
                    format!("report template `{path}` the pages were laid out with, as read"),
                ),
                "rata" => ("application/toml", format!("RATA file `{path}` as read")),
                "rata-input" => (
                    "application/octet-stream",
                    format!("RATA input `{path}` as read"),
                ),
                _ => (
                    "application/json",
                    "results as computed (SI, contract keys)".to_string(),
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
        Ok(v)
    }
}
