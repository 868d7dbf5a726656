//! Re-rendering a report from its embedded inputs and comparing the pages part by part.
//!
//! This settles what a seal alone cannot: an unsigned seal (or one signed by a key outside the
//! trust list) can be recomputed by whoever edited the pages, but the pages the embedded survey,
//! readings, calibration and template render to cannot be faked. Rendering is byte-reproducible
//! for the same program and built-in templates (`archive::make::renderer_id`), so an honest report
//! re-renders to the same digests in every part; a report made by another version cannot be
//! re-rendered identically, and is said to be so rather than called altered.

use super::recompute::Recomputed;
use crate::archive::make::{program, render_report, renderer_id, ReportSettings};
use crate::archive::manifest::{DocKind, Manifest};
use crate::archive::seal::digests;
use crate::pdf::parts::{compare, DocumentParts};
use crate::report::{Engine, UserTemplate};
use serde::Serialize;
use std::collections::HashMap;
use std::sync::OnceLock;

/// When `verify` re-renders.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum RerenderPolicy {
    /// When the seal alone cannot settle the question: the document is unsigned, signed by a key
    /// outside the trust list, carries an invalid signature, or has no seal.
    #[default]
    Auto,
    /// Always (a reviewer who does not trust the signer's software).
    Always,
    /// Never (the seal alone; fastest).
    Never,
}

/// What re-rendering found.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "state", rename_all = "kebab-case")]
pub enum Rerendering {
    /// Not attempted, and why.
    NotDone { reason: String },
    /// Every part of the document is what the embedded inputs render to.
    Matches,
    /// These parts differ from what the embedded inputs render to.
    Differs { changes: Vec<String> },
    /// Could not be done, and why (another version made the report, the inputs do not load …).
    Impossible { reason: String },
}

impl Rerendering {
    pub fn describe(&self) -> String {
        match self {
            Rerendering::NotDone { reason } => format!("not re-rendered: {reason}"),
            Rerendering::Matches => {
                "re-rendered from the embedded inputs: every page, the metadata and every embedded file are identical".into()
            }
            Rerendering::Differs { changes } => format!(
                "re-rendered from the embedded inputs: {} part{} differ{} ({})",
                changes.len(),
                if changes.len() == 1 { "" } else { "s" },
                if changes.len() == 1 { "s" } else { "" },
                changes.join("; ")
            ),
            Rerendering::Impossible { reason } => format!("cannot re-render: {reason}"),
        }
    }
}

/// Longest a re-render may take before it is abandoned (the sample takes a fraction of a second).
pub const RERENDER_TIME_LIMIT: std::time::Duration = std::time::Duration::from_secs(120);

/// One engine for every re-render of a process (fonts are loaded once).
fn engine() -> &'static Engine {
    static ENGINE: OnceLock<Engine> = OnceLock::new();
    ENGINE.get_or_init(Engine::new)
}

/// Re-renders the report `manifest` describes from the recomputed evaluation and the embedded
/// template, and compares every part with `actual`.
pub fn rerender(
    manifest: &Manifest,
    by_name: &HashMap<&str, &[u8]>,
    recomputed: Option<&Recomputed>,
    actual: &DocumentParts,
    time_limit: std::time::Duration,
) -> Rerendering {
    let impossible = |reason: String| Rerendering::Impossible { reason };
    if manifest.doc_kind() != DocKind::Report {
        return impossible(format!(
            "re-rendering is done for flow test reports; this is a {}",
            manifest.doc_kind().words()
        ));
    }
    let ours = renderer_id(DocKind::Report);
    match &manifest.renderer {
        Some(r) if *r == ours => {}
        Some(r) => {
            return impossible(format!(
                "it was laid out by {r}; this is {ours}: another annulus version (or other built-in templates) cannot re-render it byte-identically, which says nothing about whether it was altered"
            ))
        }
        None => {
            return impossible(format!(
                "it was made by {} before reports recorded their renderer",
                manifest.program
            ))
        }
    }
    let Some(r) = recomputed else {
        return impossible(
            "the embedded inputs could not be evaluated (see the recomputation)".into(),
        );
    };
    let Some(date) = manifest.document_day() else {
        return impossible("the manifest records no document date".into());
    };
    let template = match manifest.files.iter().find(|e| e.role == "template") {
        None => None,
        Some(e) => match by_name
            .get(e.name.as_str())
            .map(|b| String::from_utf8(b.to_vec()))
        {
            Some(Ok(text)) => Some(UserTemplate {
                display_name: e.path.clone(),
                text,
            }),
            _ => {
                return impossible(format!(
                    "the embedded template `{}` is missing or not text",
                    e.name
                ))
            }
        },
    };
    // The render runs the embedded template, which a forger may have written to never finish:
    // it runs on its own thread and is abandoned after `time_limit`.
    let (tx, rx) = std::sync::mpsc::channel();
    let (r, signer) = (r.clone(), manifest.signer.clone());
    let defaults = manifest.defaults.clone().unwrap_or_default();
    std::thread::spawn(move || {
        let settings = ReportSettings {
            template: template.as_ref(),
            document_date: date,
            signer,
            defaults,
        };
        let _ = tx.send(render_report(
            engine(),
            &r.evaluation,
            &r.assessment,
            &settings,
        ));
    });
    compare_rendered(
        &rx,
        time_limit,
        " (the embedded template may be built never to finish)",
        actual,
    )
}

/// Waits up to `time_limit` for a re-render running on its own thread and compares its pages,
/// metadata and files with the document's; `timeout_note` says why a re-render might not finish.
pub(crate) fn compare_rendered(
    rx: &std::sync::mpsc::Receiver<
        Result<crate::archive::make::Unsealed, crate::archive::make::MakeError>,
    >,
    time_limit: std::time::Duration,
    timeout_note: &str,
    actual: &DocumentParts,
) -> Rerendering {
    let impossible = |reason: String| Rerendering::Impossible { reason };
    let unsealed = match rx.recv_timeout(time_limit) {
        Ok(Ok(u)) => u,
        Ok(Err(e)) => return impossible(format!("the embedded inputs do not render: {e}")),
        Err(_) => {
            return impossible(format!(
                "the re-render did not finish within {} s{timeout_note}",
                time_limit.as_secs_f64()
            ))
        }
    };
    let parts = match digests(&unsealed.pdf) {
        Ok(p) => p,
        Err(e) => {
            return impossible(format!(
                "the re-rendered document cannot be read: {e} (a bug in {})",
                program()
            ))
        }
    };
    let changes: Vec<String> = compare(&parts, actual)
        .iter()
        .map(|c| c.to_string())
        .collect();
    if changes.is_empty() {
        Rerendering::Matches
    } else {
        Rerendering::Differs { changes }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::archive::manifest::Manifest;

    #[test]
    fn another_version_is_said_to_be_another_version_not_altered() {
        let mut m = Manifest::new("annulus 0.0.9", "epa-method-2", "2026-10-14", vec![]);
        m.kind = Some(DocKind::Report);
        m.renderer = Some("annulus 0.0.9 (built-in report template 0123456789ab)".into());
        let r = rerender(
            &m,
            &HashMap::new(),
            None,
            &DocumentParts::default(),
            RERENDER_TIME_LIMIT,
        );
        let Rerendering::Impossible { reason } = r else {
            panic!("{r:?}")
        };
        assert!(reason.contains("another annulus version"), "{reason}");
        assert!(
            reason.contains("says nothing about whether it was altered"),
            "{reason}"
        );
        // a certificate is not re-rendered
        m.kind = Some(DocKind::Calibration);
        let r = rerender(
            &m,
            &HashMap::new(),
            None,
            &DocumentParts::default(),
            RERENDER_TIME_LIMIT,
        );
        assert!(matches!(r, Rerendering::Impossible { .. }), "{r:?}");
    }
}
