//! Review of a whole archive: every survey recomputed and checked, every report verified, every
//! reported figure compared with the recomputed one and, where it differs, the known mistake that
//! reproduces it named (`archive::forensics`).
//!
//! Owns the per-file judgement ([`review_path`]) and the parallel review of a list of files
//! ([`review_all`], rayon). One bad file never stops a review: an unreadable file, a survey with an
//! input error, a PDF that is not a report each become a [`Reviewed`] entry with the finding. Must
//! not print, walk directories or touch the file system itself: the caller lists the paths and
//! hands in the [`Source`] that reads them (the disk in the CLI, memory in tests and benchmarks).

use super::forensics::{identify, recomputed, Explanation, Quantity};
use super::verify::{verify, Verification};
use super::PublicKey;
use crate::assess::{assess, Assessment};
use crate::checks::integrity::{ReportedQuantity, ReportedScope, ReportedValue};
use crate::checks::{num, pct, Status};
use crate::diag::Error;
use crate::input::assess_config::load_assess_config;
use crate::input::load_with;
use crate::pipeline::{evaluate, Evaluation};
use crate::units::convert_out;
use rayon::prelude::*;
use serde::Serialize;
use std::path::{Path, PathBuf};

/// Where file bytes come from; shared by the worker threads.
pub type Source<'a> = &'a (dyn Fn(&Path) -> std::io::Result<Vec<u8>> + Sync);

/// A modelled mistake is named when it reproduces the reported figure to 0.1 %: reported figures
/// are usually rounded to four significant figures or more (at most 0.05 % rounding), and the
/// mistakes the model separates differ from each other and from the correct value by more than
/// that (common practice; the same tolerance tests/forensics.rs uses).
pub const MISTAKE_MATCH_TOL: f64 = 1e-3;

/// The id of the check that compares `[reported]` values (`checks::integrity`).
const REPORTED_CHECK: &str = "reported-values";

/// What a file was taken to be.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Kind {
    Survey,
    Report,
    /// A file that could not be told apart (unreadable, not text, not TOML).
    File,
}

impl Kind {
    pub fn name(self) -> &'static str {
        match self {
            Kind::Survey => "survey",
            Kind::Report => "report",
            Kind::File => "file",
        }
    }
}

/// The outcome for one file, worst last.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum ReviewStatus {
    Pass,
    Warn,
    /// A check failed, the report did not verify, or a reported figure is wrong.
    Fail,
    /// The file could not be reviewed: unreadable, bad input, not a report.
    Error,
}

impl ReviewStatus {
    pub fn name(self) -> &'static str {
        match self {
            ReviewStatus::Pass => "pass",
            ReviewStatus::Warn => "warn",
            ReviewStatus::Fail => "fail",
            ReviewStatus::Error => "error",
        }
    }

    pub fn failed(self) -> bool {
        self >= ReviewStatus::Fail
    }
}

/// The headline figure of a survey: the average of its valid runs in the convention's units
/// (dry standard flow for stack conventions, actual flow for HVAC).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct KeyFigure {
    pub quantity: &'static str,
    pub value_si: f64,
    /// As the convention prints it, e.g. `36803 dscfm`.
    pub shown: String,
}

/// A reported figure that differs from the recomputed one.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Discrepancy {
    /// `run 1` or `average`.
    pub scope: String,
    /// The `[reported]` key, e.g. `dry_standard_flow`.
    pub quantity: &'static str,
    /// As written, e.g. `36803 cfm`.
    pub reported: String,
    pub reported_si: f64,
    pub recomputed_si: Option<f64>,
    /// (reported − recomputed) / recomputed.
    pub relative_difference: Option<f64>,
    /// The check's own words.
    pub message: String,
    /// The known mistake that reproduces the reported figure, if one does.
    pub mistake: Option<Explanation>,
    /// The mistake's value in the unit the figure was reported in.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub mistake_shown: Option<String>,
}

/// One thing the review found about a file.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Note {
    /// An acceptance check failed.
    FailedCheck {
        id: String,
        run: Option<String>,
        subject: Option<String>,
        message: String,
    },
    /// Checks that warn (not a failure).
    Warnings { ids: Vec<String> },
    /// A `[reported]` figure the recomputation does not reproduce.
    Discrepancy(Discrepancy),
    /// The file could not be read.
    Unreadable { message: String },
    /// A survey whose input was rejected: the first diagnostic and how many there were.
    BadInput { message: String, problems: usize },
    /// A PDF that is not an annulus report.
    NotAReport { message: String },
    /// A part of a report's verification that failed.
    Verification { message: String },
    /// How a verified report is signed (not a failure).
    Signature { message: String },
}

impl Note {
    /// Whether this finding makes the file fail the review.
    pub fn fails(&self) -> bool {
        !matches!(self, Note::Warnings { .. } | Note::Signature { .. })
    }

    /// A few words for the summary table.
    pub fn short(&self) -> String {
        match self {
            Note::FailedCheck {
                id, run, subject, ..
            } => match (run, subject) {
                (_, Some(s)) => format!("failed {id} ({s})"),
                (Some(r), None) => format!("failed {id} (run {r})"),
                (None, None) => format!("failed {id}"),
            },
            Note::Warnings { ids } => format!(
                "{} warning{}",
                ids.len(),
                if ids.len() == 1 { "" } else { "s" }
            ),
            Note::Discrepancy(d) => match &d.mistake {
                Some(m) => format!("{} {} wrong: mistake {}", d.scope, d.quantity, m.id),
                None => format!("{} {} wrong: no known mistake", d.scope, d.quantity),
            },
            Note::Unreadable { message } => format!("unreadable: {message}"),
            Note::BadInput { message, .. } => format!("bad input: {message}"),
            Note::NotAReport { message } => format!("not a report: {message}"),
            Note::Verification { message } => message.clone(),
            Note::Signature { message } => message.clone(),
        }
    }

    /// The full explanation.
    pub fn long(&self) -> String {
        match self {
            Note::FailedCheck {
                id, run, message, ..
            } => match run {
                Some(r) => format!("check {id}, run {r}: {message}"),
                None => format!("check {id}: {message}"),
            },
            Note::Warnings { ids } => format!("warnings: {}", ids.join(", ")),
            Note::Discrepancy(d) => match (&d.mistake, &d.mistake_shown) {
                (Some(m), shown) => format!(
                    "{}; reproduced by a known mistake [{}]: {}{}",
                    d.message,
                    m.id,
                    m.description,
                    shown
                        .as_ref()
                        .map(|s| format!(", which gives {s}"))
                        .unwrap_or_default()
                ),
                (None, _) => format!("{}; no known mistake reproduces it", d.message),
            },
            Note::BadInput { message, problems } if *problems > 1 => {
                format!(
                    "input rejected: {message} (and {} more problems)",
                    problems - 1
                )
            }
            Note::BadInput { message, .. } => format!("input rejected: {message}"),
            other => other.short(),
        }
    }
}

/// The review of one file.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Reviewed {
    pub path: String,
    pub kind: Kind,
    pub status: ReviewStatus,
    pub convention: Option<String>,
    pub key_figure: Option<KeyFigure>,
    /// For a report: whether it verified.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub verified: Option<bool>,
    pub findings: Vec<Note>,
}

impl Reviewed {
    /// A file that could not be read at all (also for folders the caller could not list).
    pub fn unreadable(path: &Path, kind: Kind, message: impl Into<String>) -> Reviewed {
        Reviewed::of(
            path,
            kind,
            None,
            None,
            vec![Note::Unreadable {
                message: message.into(),
            }],
        )
    }

    fn of(
        path: &Path,
        kind: Kind,
        convention: Option<String>,
        key_figure: Option<KeyFigure>,
        findings: Vec<Note>,
    ) -> Reviewed {
        let error = findings.iter().any(|n| {
            matches!(
                n,
                Note::Unreadable { .. } | Note::BadInput { .. } | Note::NotAReport { .. }
            )
        });
        let status = if error {
            ReviewStatus::Error
        } else if findings.iter().any(Note::fails) {
            ReviewStatus::Fail
        } else if findings.iter().any(|n| matches!(n, Note::Warnings { .. })) {
            ReviewStatus::Warn
        } else {
            ReviewStatus::Pass
        };
        Reviewed {
            path: path.display().to_string(),
            kind,
            status,
            convention,
            key_figure,
            verified: None,
            findings,
        }
    }

    /// The known mistakes named for this file.
    pub fn mistakes(&self) -> Vec<&'static str> {
        self.findings
            .iter()
            .filter_map(|n| match n {
                Note::Discrepancy(d) => d.mistake.as_ref().map(|m| m.id),
                _ => None,
            })
            .collect()
    }
}

/// A file that was looked at and left out (a TOML file that is not a survey).
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Skipped {
    pub path: String,
    pub reason: String,
}

/// What reviewing one path gave.
#[derive(Debug, Clone, PartialEq)]
pub enum Outcome {
    Reviewed(Reviewed),
    Skipped(Skipped),
}

/// The review of a list of files, sorted by path.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Review {
    pub files: Vec<Reviewed>,
    pub skipped: Vec<Skipped>,
}

impl Review {
    /// True when any file fails or could not be reviewed (the CLI exits with 3).
    pub fn failed(&self) -> bool {
        self.files.iter().any(|f| f.status.failed())
    }

    /// How many files ended with `status`.
    pub fn count(&self, status: ReviewStatus) -> usize {
        self.files.iter().filter(|f| f.status == status).count()
    }

    /// Sorts outcomes into a review (by path, so output does not depend on thread timing).
    pub fn collect(outcomes: impl IntoIterator<Item = Outcome>) -> Review {
        let mut files = Vec::new();
        let mut skipped = Vec::new();
        for o in outcomes {
            match o {
                Outcome::Reviewed(r) => files.push(r),
                Outcome::Skipped(s) => skipped.push(s),
            }
        }
        files.sort_by(|a, b| a.path.cmp(&b.path));
        skipped.sort_by(|a, b| a.path.cmp(&b.path));
        Review { files, skipped }
    }
}

/// Whether a path is one a review looks at (`.toml` or `.pdf`, any case).
pub fn is_candidate(path: &Path) -> bool {
    extension(path).is_some()
}

fn extension(path: &Path) -> Option<Kind> {
    let ext = path.extension()?.to_string_lossy().to_ascii_lowercase();
    match ext.as_str() {
        "toml" => Some(Kind::Survey),
        "pdf" => Some(Kind::Report),
        _ => None,
    }
}

/// Reviews every path in parallel (rayon), calling `done` after each file (for a progress bar).
pub fn review_all(
    paths: &[PathBuf],
    source: Source,
    key: Option<&PublicKey>,
    done: &(dyn Fn() + Sync),
) -> Review {
    let outcomes: Vec<Outcome> = paths
        .par_iter()
        .map(|p| {
            let o = review_path(p, source, key);
            done();
            o
        })
        .collect();
    Review::collect(outcomes)
}

/// Reviews one file: a `.toml` as a survey (skipped when it has no `[survey]` table), a `.pdf` as
/// a report; anything else is skipped.
pub fn review_path(path: &Path, source: Source, key: Option<&PublicKey>) -> Outcome {
    let kind = extension(path);
    let bytes = match source(path) {
        Ok(b) => b,
        Err(e) => {
            return Outcome::Reviewed(Reviewed::unreadable(
                path,
                kind.unwrap_or(Kind::File),
                format!("cannot read: {e}"),
            ))
        }
    };
    match kind {
        Some(Kind::Survey) => review_toml(path, bytes, source),
        Some(Kind::Report) => Outcome::Reviewed(review_report(path, &bytes, key)),
        _ => Outcome::Skipped(Skipped {
            path: path.display().to_string(),
            reason: "neither a survey (.toml) nor a report (.pdf)".to_string(),
        }),
    }
}

/// Whether TOML text declares a `[survey]` table. A line test first (fast, and it also catches a
/// survey too broken to parse, which then gets the survey parser's located diagnostics); a full
/// parse only for files that do not look like surveys.
fn survey_table(text: &str) -> Result<bool, String> {
    let header = text.lines().any(|l| {
        let l = l.trim_start();
        l.strip_prefix("[survey]")
            .is_some_and(|rest| rest.trim().is_empty() || rest.trim_start().starts_with('#'))
    });
    if header {
        return Ok(true);
    }
    match text.parse::<toml::Table>() {
        Ok(t) => Ok(t.get("survey").is_some_and(|v| v.is_table())),
        Err(e) => Err(format!("not valid TOML: {}", e.message().trim())),
    }
}

fn review_toml(path: &Path, bytes: Vec<u8>, source: Source) -> Outcome {
    let text = match std::str::from_utf8(&bytes) {
        Ok(t) => t.strip_prefix('\u{feff}').unwrap_or(t),
        Err(_) => {
            return Outcome::Reviewed(Reviewed::unreadable(path, Kind::File, "not UTF-8 text"))
        }
    };
    match survey_table(text) {
        Ok(true) => {}
        Ok(false) => {
            return Outcome::Skipped(Skipped {
                path: path.display().to_string(),
                reason: "TOML without a [survey] table (calibration, RATA or other file)"
                    .to_string(),
            })
        }
        Err(message) => {
            return Outcome::Reviewed(Reviewed::unreadable(path, Kind::File, message));
        }
    }
    // The survey's own bytes are already here; only its readings are read again.
    let read = |p: &Path| {
        if p == path {
            Ok(bytes.clone())
        } else {
            source(p)
        }
    };
    Outcome::Reviewed(review_survey(path, &read))
}

/// Recomputes and checks one survey (the survey file and its readings come from `source`).
pub fn review_survey(path: &Path, source: crate::input::FileSource) -> Reviewed {
    let bad = |e: Error| Reviewed::of(path, Kind::Survey, None, None, vec![bad_input(e)]);
    let loaded = match load_with(path, source) {
        Ok(l) => l,
        Err(e) => return bad(e),
    };
    let config = match load_assess_config(&loaded) {
        Ok(c) => c,
        Err(e) => return bad(e),
    };
    let eval = match evaluate(loaded) {
        Ok(e) => e,
        Err(e) => return bad(e),
    };
    let assessment = assess(&eval, &config);
    let notes = assessment_notes(&eval, &assessment, &config.reported);
    Reviewed::of(
        path,
        Kind::Survey,
        Some(eval.convention.id.name().to_string()),
        key_figure(&eval),
        notes,
    )
}

fn bad_input(e: Error) -> Note {
    match e {
        Error::Input(d) => Note::BadInput {
            message: d
                .items()
                .first()
                .map(|x| match &x.location {
                    Some(l) => format!("{} ({l})", x.message),
                    None => x.message.clone(),
                })
                .unwrap_or_else(|| "input rejected".to_string()),
            problems: d.len(),
        },
        Error::Environment(m) => Note::Unreadable { message: m },
    }
}

/// Verifies one report and reviews the survey it embeds.
pub fn review_report(path: &Path, pdf: &[u8], key: Option<&PublicKey>) -> Reviewed {
    let v = match verify(pdf, key) {
        Ok(v) => v,
        Err(e) => {
            return Reviewed::of(
                path,
                Kind::Report,
                None,
                None,
                vec![Note::NotAReport {
                    message: e.to_string(),
                }],
            )
        }
    };
    let mut notes: Vec<Note> = v
        .problems()
        .into_iter()
        .map(|message| Note::Verification { message })
        .collect();
    if v.signature.holds() {
        notes.push(Note::Signature {
            message: signature_words(&v),
        });
    }
    let (convention, figure) = match &v.recomputed {
        Some(r) => {
            let reported = load_assess_config(&r.evaluation.loaded)
                .map(|c| c.reported)
                .unwrap_or_default();
            notes.extend(assessment_notes(&r.evaluation, &r.assessment, &reported));
            (
                Some(r.evaluation.convention.id.name().to_string()),
                key_figure(&r.evaluation),
            )
        }
        None => (v.convention.clone(), None),
    };
    let mut r = Reviewed::of(path, Kind::Report, convention, figure, notes);
    r.verified = Some(v.verified);
    r
}

fn signature_words(v: &Verification) -> String {
    let signed = match &v.signature {
        super::verify::SignatureState::Valid { fingerprint } => {
            format!("signed by key {fingerprint}")
        }
        _ => "unsigned".to_string(),
    };
    if v.verified {
        format!("verified, {signed}")
    } else {
        signed
    }
}

/// Failed checks, warnings and `[reported]` discrepancies (each with its mistake named).
fn assessment_notes(eval: &Evaluation, a: &Assessment, reported: &[ReportedValue]) -> Vec<Note> {
    let mut notes = Vec::new();
    let mut warnings = Vec::new();
    let runs = a
        .runs
        .iter()
        .flat_map(|r| r.checks.iter().map(move |f| (Some(&r.id), f)));
    // the reported-values check yields one finding per reported value, in order
    let judged: Vec<_> = a.checks.iter().filter(|f| f.id == REPORTED_CHECK).collect();
    let paired = judged.len() == reported.len()
        && reported
            .iter()
            .zip(&judged)
            .all(|(v, f)| f.subject.as_deref() == Some(subject(v).as_str()));
    for (run, f) in a.checks.iter().map(|f| (None, f)).chain(runs) {
        if paired && f.id == REPORTED_CHECK {
            continue; // judged below, with the mistake named
        }
        match f.status {
            Status::Fail => notes.push(Note::FailedCheck {
                id: f.id.clone(),
                run: run.cloned(),
                subject: f.subject.clone(),
                message: f.message.to_string(),
            }),
            Status::Warn if !warnings.contains(&f.id) => warnings.push(f.id.clone()),
            _ => {}
        }
    }
    if paired {
        for (v, f) in reported.iter().zip(judged) {
            if f.status == Status::Fail {
                notes.push(Note::Discrepancy(discrepancy(
                    eval,
                    v,
                    &f.message.to_string(),
                )));
            }
        }
    }
    if !warnings.is_empty() {
        notes.push(Note::Warnings { ids: warnings });
    }
    notes
}

/// The subject the reported-values check gives a value's finding (`run 1 velocity`).
fn subject(v: &ReportedValue) -> String {
    match &v.scope {
        ReportedScope::Run(id) => format!("run {id} {}", v.quantity.key()),
        ReportedScope::Average => format!("average {}", v.quantity.key()),
    }
}

fn forensic_quantity(q: ReportedQuantity) -> Option<Quantity> {
    match q {
        ReportedQuantity::Velocity => Some(Quantity::Velocity),
        ReportedQuantity::ActualFlow => Some(Quantity::ActualFlow),
        ReportedQuantity::StandardFlow => Some(Quantity::StandardFlow),
        ReportedQuantity::DryStandardFlow => Some(Quantity::DryStandardFlow),
        ReportedQuantity::NormalFlow
        | ReportedQuantity::DryNormalFlow
        | ReportedQuantity::Density => None,
    }
}

fn discrepancy(eval: &Evaluation, v: &ReportedValue, message: &str) -> Discrepancy {
    let (scope, run) = match &v.scope {
        ReportedScope::Run(id) => (
            format!("run {id}"),
            Some(eval.runs.iter().position(|r| &r.id == id)),
        ),
        ReportedScope::Average => ("average".to_string(), None),
    };
    let run_index = run.flatten();
    let known_run = run.is_none() || run_index.is_some();
    let q = forensic_quantity(v.quantity).filter(|_| known_run);
    let correct = match (q, v.quantity) {
        (Some(q), _) => recomputed(eval, run_index, q),
        (None, ReportedQuantity::Density) => run_index
            .and_then(|i| eval.runs.get(i))
            .map(|r| r.density_kg_m3),
        (None, _) => None,
    };
    let mistake = q.and_then(|q| identify(eval, run_index, q, v.value_si, MISTAKE_MATCH_TOL));
    let mistake_shown = mistake.as_ref().map(|m| {
        format!(
            "{} {} ({} from the reported figure)",
            num(convert_out(m.value_si, v.unit)),
            v.unit.symbol,
            pct(m.relative_difference)
        )
    });
    Discrepancy {
        scope,
        quantity: v.quantity.key(),
        reported: v.raw.clone(),
        reported_si: v.value_si,
        recomputed_si: correct,
        relative_difference: correct
            .filter(|c| *c != 0.0)
            .map(|c| (v.value_si - c) / c.abs()),
        message: message.to_string(),
        mistake,
        mistake_shown,
    }
}

/// The survey's headline figure.
pub fn key_figure(e: &Evaluation) -> Option<KeyFigure> {
    let avg = e.average.as_ref()?;
    let table = e.convention.display_table();
    let (kind, si) = if e.convention.id.is_hvac() {
        (crate::display::Kind::ActualFlow, avg.actual_flow_m3_s)
    } else {
        (
            crate::display::Kind::DryStandardFlow,
            avg.dry_standard_flow_m3_s,
        )
    };
    let shown = table.get(kind);
    Some(KeyFigure {
        quantity: shown.label,
        value_si: si,
        shown: shown.format(si),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::collections::HashMap;

    const SURVEY: &str = r#"
[survey]
title = "Review unit test stack"
date = "2026-10-14"
convention = "epa-method-2"
[duct]
shape = "round"
diameter = "5.0 ft"
upstream = "8 D"
downstream = "2 D"
[layout]
lines = 2
points_per_line = 6
[probe]
kind = "s-type"
coefficient = 0.84
[gas]
barometric = "29.50 inHg"
static = "-0.50 inH2O"
o2 = "8 %"
co2 = "10 %"
moisture = "10 %"
REPORTED
[[run]]
id = "1"
readings = "run1.csv"
leak_check = { before = "pass", after = "pass" }
"#;

    const READINGS: &str = include_str!("../../tests/data/epa-english/run1.csv");

    fn archive(files: &[(&str, &str)]) -> HashMap<PathBuf, Vec<u8>> {
        files
            .iter()
            .map(|(p, t)| (PathBuf::from(p), t.as_bytes().to_vec()))
            .collect()
    }

    fn run(files: &[(&str, &str)]) -> Review {
        let map = archive(files);
        let mut paths: Vec<PathBuf> = map.keys().filter(|p| is_candidate(p)).cloned().collect();
        paths.push(PathBuf::from("gone/survey.toml"));
        let source = |p: &Path| {
            map.get(p)
                .cloned()
                .ok_or_else(|| std::io::Error::from(std::io::ErrorKind::NotFound))
        };
        review_all(&paths, &source, None, &|| {})
    }

    fn file<'a>(r: &'a Review, path: &str) -> &'a Reviewed {
        r.files.iter().find(|f| f.path == path).expect("reviewed")
    }

    #[test]
    fn good_bad_other_and_missing_files_each_get_their_finding() {
        let good = SURVEY.replace("REPORTED", "");
        let bad = good.replace("coefficient = 0.84", "coefficient = \"x\"");
        let r = run(&[
            ("a/survey.toml", &good),
            ("a/run1.csv", READINGS),
            ("b/survey.toml", &bad),
            ("b/run1.csv", READINGS),
            ("c/probe-cal.toml", "[calibration]\nserial = \"P-1\"\n"),
            ("d/broken.toml", "this is = = not toml"),
            ("e/notes.pdf", "%PDF-1.4 garbage"),
        ]);
        let paths: Vec<&str> = r.files.iter().map(|f| f.path.as_str()).collect();
        assert_eq!(
            paths,
            [
                "a/survey.toml",
                "b/survey.toml",
                "d/broken.toml",
                "e/notes.pdf",
                "gone/survey.toml"
            ]
        );
        assert_eq!(r.files[0].kind, Kind::Survey);
        assert!(!r.files[0].status.failed(), "{:?}", r.files[0]);
        assert!(r.files[0]
            .key_figure
            .as_ref()
            .unwrap()
            .shown
            .ends_with(" dscfm"));
        assert_eq!(r.files[1].status, ReviewStatus::Error);
        assert!(
            matches!(&r.files[1].findings[0], Note::BadInput { message, .. } if message.contains("b/survey.toml")),
            "{:?}",
            r.files[1].findings
        );
        assert_eq!(r.files[2].kind, Kind::File);
        assert!(r.files[2].findings[0].short().contains("not valid TOML"));
        assert!(matches!(r.files[3].findings[0], Note::NotAReport { .. }));
        assert!(matches!(r.files[4].findings[0], Note::Unreadable { .. }));
        assert_eq!(r.skipped.len(), 1);
        assert_eq!(r.skipped[0].path, "c/probe-cal.toml");
        assert!(r.failed());
    }

    #[test]
    fn a_doctored_reported_figure_has_its_mistake_named() {
        // calculations.md §8 worked example: 36 803 dscfm at Bws = 0.10 (derived from Method 2
        // eq. 2-10); the wet standard flow reported as dry is 36 803 / 0.9 ≈ 40 892 cfm (derived).
        let reported = "[reported]\naverage = { dscfm = \"40892 cfm\" }\n";
        let r = run(&[
            ("s/survey.toml", &SURVEY.replace("REPORTED", reported)),
            ("s/run1.csv", READINGS),
        ]);
        let f = file(&r, "s/survey.toml");
        assert_eq!(f.status, ReviewStatus::Fail, "{:?}", f.findings);
        assert_eq!(f.mistakes(), ["wet-for-dry"]);
        let Some(Note::Discrepancy(d)) = f
            .findings
            .iter()
            .find(|n| matches!(n, Note::Discrepancy(_)))
        else {
            panic!("no discrepancy: {:?}", f.findings)
        };
        assert_eq!(d.scope, "average");
        assert!(d.relative_difference.unwrap() > 0.0);
        assert!(d.mistake_shown.as_ref().unwrap().contains("cfm"));
        // the correct figure is no discrepancy
        let ok = "[reported]\naverage = { dscfm = \"36803 cfm\" }\n";
        let r = run(&[
            ("s/survey.toml", &SURVEY.replace("REPORTED", ok)),
            ("s/run1.csv", READINGS),
        ]);
        let f = file(&r, "s/survey.toml");
        assert!(!f.status.failed(), "{:?}", f.findings);
        assert!(f.mistakes().is_empty());
        assert!(!f.findings.iter().any(|n| matches!(n, Note::Discrepancy(_))));
    }

    #[test]
    fn survey_tables_are_told_from_other_toml() {
        assert_eq!(survey_table("# x\n[survey]\ntitle = 1"), Ok(true));
        assert_eq!(survey_table("  [survey] # comment\n"), Ok(true));
        assert_eq!(survey_table("survey = { title = \"x\" }"), Ok(true));
        assert_eq!(survey_table("[survey.extra]\n"), Ok(true));
        assert_eq!(survey_table("[rata]\nsurvey = \"x\""), Ok(false));
        assert!(survey_table("[surveyx\n").is_err());
    }
}
