//! Making a sealed test-and-balance submittal, the one path `annulus system -o` takes and
//! `annulus verify` re-renders through; and re-deriving a submittal's results from what it embeds.
//!
//! A submittal embeds the system file, every duct's survey and readings (and calibration records),
//! the terminals CSV and the system's results JSON, byte-exact, under their paths relative to the
//! system file; the manifest lists them with kind `submittal`, and the seal covers every page.
//! Must not read files, print or look at the clock.

use super::make::{identity, program, renderer_id, Made, MakeError, Unsealed};
use super::manifest::{DocKind, Manifest, SignerEntry, MANIFEST_NAME, RESULTS_NAME};
use super::seal::{placeholder, seal_pdf};
use super::verify::recompute::{compare_values, embedded_results, first_problem, Recomputation};
use super::verify::rerender::Rerendering;
use super::SecretKey;
use crate::config::SignoffDefaults;
use crate::display::UnitSystem;
use crate::input::system_file::{load_system_from, LoadedSystem, SystemInput};
use crate::pdf::parts::DocumentParts;
use crate::report::submittal::submittal_data;
use crate::report::{Attachment, Engine, RenderOptions};
use crate::submittal::{evaluate_system, SystemEvaluation};
use std::collections::HashMap;

/// Everything a submittal is made from besides the evaluated system.
#[derive(Debug, Clone)]
pub struct SubmittalSettings {
    /// The date written into the PDF.
    pub document_date: chrono::NaiveDate,
    /// Who signs: the name printed in the sign-off block and the public key.
    pub signer: Option<SignerEntry>,
    /// The user configuration's firm, technician and certificate for what the inputs leave empty.
    pub defaults: SignoffDefaults,
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

fn describe(role: &str, path: &str) -> (&'static str, String) {
    match role {
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
    }
}

/// The system's results document as a submittal embeds it: pretty JSON with a final newline.
pub fn results_bytes(e: &SystemEvaluation) -> Vec<u8> {
    let mut v = serde_json::to_vec_pretty(&e.doc()).unwrap_or_default();
    v.push(b'\n');
    v
}

/// The inputs, the results and the manifest of a submittal, as attachments (the seal's
/// placeholder last).
fn pack(
    loaded: &LoadedSystem,
    convention: &str,
    results: Vec<u8>,
    settings: &SubmittalSettings,
) -> Result<(Manifest, Vec<Attachment>), MakeError> {
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
        results,
    ));
    let mut m = Manifest::new(
        &program(),
        convention,
        &loaded.spec.date.to_string(),
        files
            .iter()
            .map(|(n, p, r, b)| Manifest::entry(n, p, r, b))
            .collect(),
    );
    m.kind = Some(DocKind::Submittal);
    m.renderer = Some(renderer_id(DocKind::Submittal));
    m.document_date = Some(settings.document_date.to_string());
    m.signer = settings.signer.clone();
    m.defaults = (!settings.defaults.is_empty()).then(|| settings.defaults.clone());
    let mut attachments = Vec::new();
    for (name, path, role, bytes) in files {
        let (mime, what) = describe(role, &path);
        attachments.push(Attachment::new(name, bytes, mime, what).map_err(MakeError::Attachment)?);
    }
    attachments.push(
        Attachment::new(
            MANIFEST_NAME,
            m.canonical_bytes(),
            "application/json",
            "manifest: SHA-256 of every embedded file; its own SHA-256 is the content fingerprint",
        )
        .map_err(MakeError::Attachment)?,
    );
    attachments.push(placeholder().map_err(MakeError::Attachment)?);
    Ok((m, attachments))
}

/// Lays out the submittal of an evaluated system with a placeholder seal.
pub fn render_submittal(
    engine: &Engine,
    e: &SystemEvaluation,
    settings: &SubmittalSettings,
) -> Result<Unsealed, MakeError> {
    let convention = e
        .ducts
        .first()
        .map(|(ev, _)| ev.loaded.survey.convention.name())
        .unwrap_or_default();
    let (manifest, attachments) = pack(&e.loaded, convention, results_bytes(e), settings)?;
    let identity = identity(&manifest, settings.signer.as_ref(), &settings.defaults);
    let data = submittal_data(e, &identity);
    let options = RenderOptions {
        date: settings.document_date,
        attachments,
    };
    let rendered = engine
        .render_submittal(&data, &options)
        .map_err(MakeError::Render)?;
    Ok(Unsealed {
        pdf: rendered.pdf,
        manifest,
        warnings: rendered.warnings,
    })
}

/// Renders, seals and (with `key`) signs a submittal.
pub fn make_submittal(
    engine: &Engine,
    e: &SystemEvaluation,
    settings: &SubmittalSettings,
    key: Option<&SecretKey>,
) -> Result<Made, MakeError> {
    let u = render_submittal(engine, e, settings)?;
    let pdf = seal_pdf(&u.pdf, &u.manifest.fingerprint(), key).map_err(MakeError::Seal)?;
    Ok(Made {
        pdf,
        manifest: u.manifest,
        warnings: u.warnings,
    })
}

/// Re-derives a submittal's results from its embedded inputs (the system file, the surveys and
/// readings, the terminals CSV, placed at their manifest paths) as `annulus system` did, and
/// compares them value by value with the embedded `results.json`. The evaluation is returned for
/// the re-render.
pub fn recompute(
    manifest: &Manifest,
    by_name: &HashMap<&str, &[u8]>,
) -> (Recomputation, Option<Box<SystemEvaluation>>) {
    let impossible = |reason: String| (Recomputation::Impossible { reason }, None);
    let embedded = match embedded_results(manifest, by_name) {
        Ok(v) => v,
        Err(why) => return impossible(why),
    };
    let roles = [
        "system",
        "survey",
        "readings",
        "terminals",
        "calibration",
        "calibration-readings",
    ];
    let mut inputs = Vec::new();
    for e in manifest
        .files
        .iter()
        .filter(|e| roles.contains(&e.role.as_str()))
    {
        let Some(bytes) = by_name.get(e.name.as_str()) else {
            return impossible(format!("`{}` is not embedded", e.name));
        };
        let role = roles
            .iter()
            .find(|r| **r == e.role)
            .copied()
            .unwrap_or("system");
        inputs.push(SystemInput {
            role,
            path: e.path.clone(),
            bytes: bytes.to_vec(),
        });
    }
    let loaded = match load_system_from(&inputs) {
        Ok(l) => l,
        Err(e) => {
            return impossible(format!(
                "the embedded system file, surveys and readings do not load: {}",
                first_problem(&e)
            ))
        }
    };
    // the unit system the submittal was shown in (`--si`) is part of its results
    let units = embedded
        .get("units")
        .and_then(|u| u.as_str())
        .and_then(UnitSystem::parse);
    let e = match evaluate_system(loaded, units) {
        Ok(e) => e,
        Err(err) => {
            return impossible(format!(
                "the embedded inputs cannot be evaluated: {}",
                first_problem(&err)
            ))
        }
    };
    let recomputed = match serde_json::to_value(e.doc()) {
        Ok(v) => v,
        Err(err) => return impossible(format!("the recomputed results cannot be written: {err}")),
    };
    let other_version = manifest.program != crate::archive::make::program();
    (
        compare_values(&embedded, &recomputed, other_version),
        Some(Box::new(e)),
    )
}

/// Re-renders the submittal `manifest` describes from the recomputed system and compares every
/// part with `actual`.
pub fn rerender(
    manifest: &Manifest,
    recomputed: Option<&SystemEvaluation>,
    actual: &DocumentParts,
    time_limit: std::time::Duration,
) -> Rerendering {
    let impossible = |reason: String| Rerendering::Impossible { reason };
    let ours = renderer_id(DocKind::Submittal);
    match &manifest.renderer {
        Some(r) if *r == ours => {}
        Some(r) => {
            return impossible(format!(
                "it was laid out by {r}; this is {ours}: another annulus version cannot re-render it byte-identically, which says nothing about whether it was altered"
            ))
        }
        None => return impossible("the manifest records no renderer".into()),
    }
    let Some(e) = recomputed else {
        return impossible(
            "the embedded inputs could not be evaluated (see the recomputation)".into(),
        );
    };
    let Some(date) = manifest.document_day() else {
        return impossible("the manifest records no document date".into());
    };
    let settings = SubmittalSettings {
        document_date: date,
        signer: manifest.signer.clone(),
        defaults: manifest.defaults.clone().unwrap_or_default(),
    };
    // built-in template only, but the same time limit as a report's re-render
    let (tx, rx) = std::sync::mpsc::channel();
    let e = e.clone();
    std::thread::spawn(move || {
        let _ = tx.send(render_submittal(&Engine::new(), &e, &settings));
    });
    crate::archive::verify::rerender::compare_rendered(&rx, time_limit, "", actual)
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
