//! Review of a whole archive: every survey recomputed and checked, every report (and calibration
//! certificate, and RATA summary) verified, every reported figure compared with the recomputed one
//! and, where it differs, the known mistake that reproduces it named (`archive::forensics`); each
//! survey matched with the reports made from it.
//!
//! Owns the per-file judgement ([`review_path`]), the five statuses ([`ReviewStatus`]) and the
//! identity of each file (report id, title, site, date, tested by, signer, convention, key
//! figure). [`pool`] runs the files in parallel under a per-file time and size budget and hands
//! each record out as soon as it is done; [`matching`] pairs surveys with reports. One bad file
//! never stops a review: an unreadable file, a survey with an input error, a PDF that is not a
//! report, a file over budget each become a [`Reviewed`] entry with the finding. Must not print,
//! walk directories or touch the file system itself: the caller lists the paths and hands in the
//! [`Source`] that reads them (the disk in the CLI, memory in tests and benchmarks).

pub mod matching;
pub mod pool;

use super::forensics::{identify, recomputed, Explanation, Quantity};
use super::verify::{
    documents::Identity, verify, ContentState, SignatureStatus, Verification, VerifyOptions,
};
use crate::assess::judge;
use crate::checks::integrity::{ReportedQuantity, ReportedScope, ReportedValue};
use crate::checks::Finding;
use crate::checks::{num, pct, Group, Status};
use crate::diag::Error;
use crate::input::assess_config::load_assess_config;
use crate::input::load_with;
use crate::pipeline::{evaluate, Evaluation};
use crate::units::convert_out;
use matching::ReportIndex;
use serde::Serialize;
use std::path::Path;

pub use pool::{review_all, review_stream, ReviewSettings, SharedSource};

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
    /// A flow test report PDF.
    Report,
    /// A pitot calibration certificate PDF.
    Calibration,
    /// A RATA summary PDF.
    Rata,
    /// A test-and-balance submittal PDF (`annulus system -o`).
    Submittal,
    /// A file that could not be told apart (unreadable, not text, not TOML, not a PDF of ours).
    File,
}

impl Kind {
    pub fn name(self) -> &'static str {
        match self {
            Kind::Survey => "survey",
            Kind::Report => "report",
            Kind::Calibration => "calibration",
            Kind::Rata => "rata",
            Kind::Submittal => "submittal",
            Kind::File => "file",
        }
    }
}

/// The outcome for one file, worst last.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum ReviewStatus {
    Pass,
    /// A check warns (not a failure).
    Warn,
    /// Data-integrity findings: copied sequences, repeated values, too-round or too-fine
    /// readings, a reported figure the data do not reproduce, a survey that disagrees with its
    /// report.
    Suspect,
    /// A check failed, or a report did not verify.
    Fail,
    /// The file could not be reviewed: unreadable, bad input, damaged, not ours, over budget.
    Error,
}

impl ReviewStatus {
    pub const ALL: [ReviewStatus; 5] = [
        ReviewStatus::Pass,
        ReviewStatus::Warn,
        ReviewStatus::Suspect,
        ReviewStatus::Fail,
        ReviewStatus::Error,
    ];

    pub fn name(self) -> &'static str {
        match self {
            ReviewStatus::Pass => "pass",
            ReviewStatus::Warn => "warn",
            ReviewStatus::Suspect => "suspect",
            ReviewStatus::Fail => "fail",
            ReviewStatus::Error => "error",
        }
    }

    pub fn parse(text: &str) -> Option<ReviewStatus> {
        ReviewStatus::ALL
            .into_iter()
            .find(|s| s.name() == text.trim())
    }
}

/// The headline figure of a survey: the average of its valid runs in the convention's units
/// (dry standard flow for stack conventions, actual flow for HVAC).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct KeyFigure {
    pub quantity: &'static str,
    /// In `unit`, as printed.
    pub value: f64,
    pub unit: &'static str,
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
    /// A data-integrity check that flags the readings (copied, repeated, too round, too fine).
    Integrity {
        id: String,
        run: Option<String>,
        subject: Option<String>,
        message: String,
    },
    /// A `[reported]` figure the recomputation does not reproduce.
    Discrepancy(Discrepancy),
    /// A survey and a report made from it that disagree.
    Mismatch { report: String, message: String },
    /// The report made from this survey, found in the same review (not a finding against it).
    Matched { report: String, report_id: String },
    /// The file could not be read.
    Unreadable { message: String },
    /// A survey whose input was rejected: the first diagnostic and how many there were.
    BadInput { message: String, problems: usize },
    /// A PDF that is not an annulus document.
    NotAReport { message: String },
    /// A PDF that cannot be read as a whole (truncated, broken, beyond a reading cap).
    Damaged { message: String },
    /// The file exceeded the review's per-file time or size budget.
    OverBudget { message: String },
    /// A part of a report's verification that failed.
    Verification { message: String },
    /// How a report is signed (a finding only when the signature does not count).
    Signature { message: String, counts: bool },
}

impl Note {
    /// The status this finding gives a file on its own.
    pub fn severity(&self) -> ReviewStatus {
        match self {
            Note::FailedCheck { .. } | Note::Verification { .. } => ReviewStatus::Fail,
            Note::Signature { counts: false, .. } => ReviewStatus::Fail,
            Note::Signature { .. } | Note::Matched { .. } => ReviewStatus::Pass,
            Note::Warnings { .. } => ReviewStatus::Warn,
            Note::Integrity { .. } | Note::Discrepancy(_) | Note::Mismatch { .. } => {
                ReviewStatus::Suspect
            }
            Note::Unreadable { .. }
            | Note::BadInput { .. }
            | Note::NotAReport { .. }
            | Note::Damaged { .. }
            | Note::OverBudget { .. } => ReviewStatus::Error,
        }
    }

    /// Whether this finding is worth listing among a file's problems.
    pub fn fails(&self) -> bool {
        self.severity() >= ReviewStatus::Suspect
    }

    /// A few words for the summary table.
    pub fn short(&self) -> String {
        match self {
            Note::FailedCheck {
                id, run, subject, ..
            }
            | Note::Integrity {
                id, run, subject, ..
            } => {
                let what = if matches!(self, Note::Integrity { .. }) {
                    "suspect"
                } else {
                    "failed"
                };
                match (run, subject) {
                    (_, Some(s)) => format!("{what} {id} ({s})"),
                    (Some(r), None) => format!("{what} {id} (run {r})"),
                    (None, None) => format!("{what} {id}"),
                }
            }
            Note::Warnings { ids } => format!(
                "{} warning{}",
                ids.len(),
                if ids.len() == 1 { "" } else { "s" }
            ),
            Note::Discrepancy(d) => match &d.mistake {
                Some(m) => format!("{} {} wrong: mistake {}", d.scope, d.quantity, m.id),
                None => format!("{} {} wrong: no known mistake", d.scope, d.quantity),
            },
            Note::Mismatch { report, .. } => format!("disagrees with report {report}"),
            Note::Matched { report_id, .. } => format!("matches report {report_id}"),
            Note::Unreadable { message } => format!("unreadable: {message}"),
            Note::BadInput { message, .. } => format!("bad input: {message}"),
            Note::NotAReport { message } => format!("not a report: {message}"),
            Note::Damaged { message } => format!("damaged: {message}"),
            Note::OverBudget { message } => message.clone(),
            Note::Verification { message } => message.clone(),
            Note::Signature { message, .. } => message.clone(),
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
            Note::Integrity {
                id, run, message, ..
            } => match run {
                Some(r) => format!("data integrity {id}, run {r}: {message}"),
                None => format!("data integrity {id}: {message}"),
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
            Note::Mismatch { report, message } => format!("report {report}: {message}"),
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

/// The review of one file, with the identity columns a reviewer sorts by.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Reviewed {
    pub file: String,
    pub kind: Kind,
    pub status: ReviewStatus,
    /// `AN-…` (reports, certificates and RATA summaries).
    pub report_id: Option<String>,
    pub title: Option<String>,
    pub site: Option<String>,
    /// The test date.
    pub date: Option<String>,
    pub tested_by: Option<String>,
    /// For a PDF: the trusted signer's name, `unknown key`, `unsigned` or `invalid`.
    pub signer: Option<String>,
    pub convention: Option<String>,
    /// The headline figure in its unit (`key_figure_unit`).
    pub key_figure: Option<f64>,
    pub key_figure_unit: Option<String>,
    /// The headline figure in SI, and what it is.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub key_figure_detail: Option<KeyFigure>,
    /// For a PDF: whether it verified, and its content state.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub verified: Option<bool>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub content: Option<ContentState>,
    pub findings: Vec<Note>,
}

impl Reviewed {
    /// A file with findings and nothing else known (unreadable, over budget, bad input).
    pub fn bare(path: &Path, kind: Kind, findings: Vec<Note>) -> Reviewed {
        let mut r = Reviewed {
            file: path.display().to_string(),
            kind,
            status: ReviewStatus::Pass,
            report_id: None,
            title: None,
            site: None,
            date: None,
            tested_by: None,
            signer: None,
            convention: None,
            key_figure: None,
            key_figure_unit: None,
            key_figure_detail: None,
            verified: None,
            content: None,
            findings,
        };
        r.judge();
        r
    }

    /// A file that could not be read at all (also for folders the caller could not list).
    pub fn unreadable(path: &Path, kind: Kind, message: impl Into<String>) -> Reviewed {
        Reviewed::bare(
            path,
            kind,
            vec![Note::Unreadable {
                message: message.into(),
            }],
        )
    }

    /// Sets the status from the findings: the worst finding's severity.
    pub fn judge(&mut self) {
        self.status = self
            .findings
            .iter()
            .map(Note::severity)
            .max()
            .unwrap_or(ReviewStatus::Pass);
    }

    fn identify(&mut self, id: &Identity) {
        self.title = Some(id.title.clone());
        self.site = id.site.clone();
        self.date = Some(id.date.clone());
        self.tested_by = id.tested_by.clone();
    }

    fn figure(&mut self, k: Option<KeyFigure>) {
        if let Some(k) = &k {
            self.key_figure = Some(k.value);
            self.key_figure_unit = Some(k.unit.to_string());
        }
        self.key_figure_detail = k;
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
    pub file: String,
    pub reason: String,
}

/// What reviewing one path gave.
#[derive(Debug, Clone, PartialEq)]
// Most outcomes are reviews; boxing them would add an allocation per file for nothing.
#[allow(clippy::large_enum_variant)]
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
        files.sort_by(|a, b| a.file.cmp(&b.file));
        skipped.sort_by(|a, b| a.file.cmp(&b.file));
        Review { files, skipped }
    }
}

/// Whether a path is one a review looks at (`.toml` or `.pdf`, any case).
pub fn is_candidate(path: &Path) -> bool {
    extension(path).is_some()
}

/// The kind a path's extension suggests (`.toml` a survey, `.pdf` a report).
pub fn extension(path: &Path) -> Option<Kind> {
    let ext = path.extension()?.as_encoded_bytes();
    if ext.eq_ignore_ascii_case(b"toml") {
        Some(Kind::Survey)
    } else if ext.eq_ignore_ascii_case(b"pdf") {
        Some(Kind::Report)
    } else {
        None
    }
}

/// What one file's review may consult besides the file.
#[derive(Clone, Copy)]
pub struct FileContext<'a> {
    pub verify: VerifyOptions<'a>,
    /// Reports already reviewed, to match surveys with (`None`: no matching).
    pub reports: Option<&'a ReportIndex>,
}

/// Reviews one file: a `.toml` as a survey (skipped when it is clearly something else), a `.pdf`
/// as a report; anything else is skipped.
pub fn review_path(path: &Path, source: Source, cx: &FileContext<'_>) -> Outcome {
    let kind = extension(path);
    let bytes = match source(path) {
        Ok(b) => b,
        Err(e) => {
            let k = kind.unwrap_or(Kind::File);
            let note = if e.kind() == std::io::ErrorKind::FileTooLarge {
                Note::OverBudget {
                    message: e.to_string(),
                }
            } else {
                Note::Unreadable {
                    message: format!("cannot read: {e}"),
                }
            };
            return Outcome::Reviewed(Reviewed::bare(path, k, vec![note]));
        }
    };
    match kind {
        Some(Kind::Survey) => review_toml(path, bytes, source, cx),
        Some(_) => Outcome::Reviewed(review_report(path, &bytes, &cx.verify).0),
        None => Outcome::Skipped(Skipped {
            file: path.display().to_string(),
            reason: "neither a survey (.toml) nor a report (.pdf)".to_string(),
        }),
    }
}

/// What a TOML file declares itself to be.
#[derive(Debug, Clone, PartialEq, Eq)]
enum TomlKind {
    Survey,
    /// Clearly something else: the top-level table that says what.
    Other(String),
    /// No top-level table at all (an empty or emptied file).
    Empty,
}

/// Whether TOML text declares a `[survey]` table. A line test first (fast, and it also catches a
/// survey too broken to parse, which then gets the survey parser's located diagnostics); a full
/// parse only for files that do not look like surveys.
fn toml_kind(text: &str) -> Result<TomlKind, String> {
    let header = text.lines().any(|l| {
        let l = l.trim_start();
        l.strip_prefix("[survey]")
            .is_some_and(|rest| rest.trim().is_empty() || rest.trim_start().starts_with('#'))
    });
    if header {
        return Ok(TomlKind::Survey);
    }
    match text.parse::<toml::Table>() {
        Ok(t) if t.get("survey").is_some_and(|v| v.is_table()) => Ok(TomlKind::Survey),
        Ok(t) => match t.iter().find(|(_, v)| v.is_table() || v.is_array()) {
            Some((k, _)) => Ok(TomlKind::Other(k.clone())),
            None => Ok(TomlKind::Empty),
        },
        Err(e) => Err(format!("not valid TOML: {}", e.message().trim())),
    }
}

/// A file named like a survey (`survey.toml`, `…-survey.toml`, `survey-….toml`): one without a
/// `[survey]` table has been emptied or damaged, never "something else".
fn named_as_survey(path: &Path) -> bool {
    path.file_stem()
        .map(|s| s.to_string_lossy().to_ascii_lowercase())
        .is_some_and(|s| s == "survey" || s.starts_with("survey-") || s.ends_with("-survey"))
}

fn review_toml(path: &Path, bytes: Vec<u8>, source: Source, cx: &FileContext<'_>) -> Outcome {
    let text = match std::str::from_utf8(&bytes) {
        Ok(t) => t.strip_prefix('\u{feff}').unwrap_or(t),
        Err(_) => {
            return Outcome::Reviewed(Reviewed::unreadable(path, Kind::File, "not UTF-8 text"))
        }
    };
    match toml_kind(text) {
        Ok(TomlKind::Survey) => {}
        Ok(other) if named_as_survey(path) => {
            let what = match other {
                TomlKind::Other(t) => format!("its top-level table is `[{t}]`"),
                _ => "it holds no table at all".to_string(),
            };
            return Outcome::Reviewed(Reviewed::bare(
                path,
                Kind::Survey,
                vec![Note::BadInput {
                    message: format!(
                        "a survey file with no [survey] table ({what}): emptied or damaged"
                    ),
                    problems: 1,
                }],
            ));
        }
        Ok(TomlKind::Other(table)) => {
            return Outcome::Skipped(Skipped {
                file: path.display().to_string(),
                reason: format!(
                    "TOML with a [{table}] table, not a survey (calibration, RATA or other file)"
                ),
            })
        }
        Ok(TomlKind::Empty) => {
            return Outcome::Skipped(Skipped {
                file: path.display().to_string(),
                reason: "TOML with no tables (not a survey)".to_string(),
            })
        }
        Err(message) if named_as_survey(path) => {
            return Outcome::Reviewed(Reviewed::bare(
                path,
                Kind::Survey,
                vec![Note::BadInput {
                    message,
                    problems: 1,
                }],
            ));
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
    Outcome::Reviewed(review_survey(path, &read, cx.reports))
}

/// Recomputes and checks one survey (the survey file and its readings come from `source`); with
/// `reports`, matches it against the reports made from it.
pub fn review_survey(
    path: &Path,
    source: crate::input::FileSource,
    reports: Option<&ReportIndex>,
) -> Reviewed {
    let bad = |e: Error| Reviewed::bare(path, Kind::Survey, vec![bad_input(e)]);
    let loaded = match load_with(path, source) {
        Ok(l) => l,
        Err(e) => return bad(e),
    };
    let matched = reports
        .filter(|r| !r.is_empty())
        .map(|r| r.match_survey(&loaded));
    let config = match load_assess_config(&loaded) {
        Ok(c) => c,
        Err(e) => return bad(e),
    };
    let eval = match evaluate(loaded) {
        Ok(e) => e,
        Err(e) => return bad(e),
    };
    // the findings alone: a review prints no budget
    let judgement = judge(&eval, &config);
    let runs: Vec<_> = judgement
        .runs
        .iter()
        .map(|r| (&r.id, &r.checks[..]))
        .collect();
    let mut notes = assessment_notes(&eval, &judgement.checks, &runs, &config.reported);
    notes.extend(matched.into_iter().flatten());
    let mut r = Reviewed::bare(path, Kind::Survey, notes);
    r.identify(&Identity::of_survey(&eval.loaded.survey));
    r.convention = Some(eval.convention.id.name().to_string());
    r.figure(key_figure(&eval));
    r
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

/// Verifies one PDF and reviews the survey it embeds; also gives the verification (for matching).
pub fn review_report(
    path: &Path,
    pdf: &[u8],
    options: &VerifyOptions<'_>,
) -> (Reviewed, Option<Verification>) {
    let v = match verify(pdf, options) {
        Ok(v) => v,
        Err(e) => {
            let r = Reviewed::bare(
                path,
                Kind::File,
                vec![Note::NotAReport {
                    message: e.to_string(),
                }],
            );
            return (r, None);
        }
    };
    let kind = match v.kind {
        Some(super::manifest::DocKind::Calibration) => Kind::Calibration,
        Some(super::manifest::DocKind::Rata) => Kind::Rata,
        Some(super::manifest::DocKind::Submittal) => Kind::Submittal,
        _ => Kind::Report,
    };
    let mut notes = Vec::new();
    if v.content == ContentState::Damaged {
        notes.push(Note::Damaged {
            message: v.damage.clone().unwrap_or_default(),
        });
    } else {
        for c in &v.changes {
            notes.push(Note::Verification {
                message: format!("altered: {}", c.what),
            });
        }
        if let Some(p) = &v.manifest_problem {
            notes.push(Note::Verification {
                message: format!("manifest: {p}"),
            });
        }
        for p in v
            .problems()
            .into_iter()
            .filter(|p| p.starts_with("recomputation"))
        {
            notes.push(Note::Verification { message: p });
        }
        let unknown_without_list = v.signature.status == SignatureStatus::UnknownKey;
        notes.push(Note::Signature {
            message: v.signature.detail.clone(),
            counts: v.signature.accepted,
        });
        if unknown_without_list && v.signature.accepted {
            // a signature nobody vouches for: reported, and a warning
            notes.push(Note::Warnings {
                ids: vec!["signer-not-in-a-trust-list".into()],
            });
        }
        // a submittal's verdict, re-derived from its embedded inputs, as a report's checks are
        if kind == Kind::Submittal {
            match v.checks_verdict {
                Some(crate::assess::Verdict::Fail) => notes.push(Note::FailedCheck {
                    id: "system-tolerance".into(),
                    run: None,
                    subject: None,
                    message: "a duct, a relation, the fan or a terminal is outside its tolerance \
                              (see the submittal's summary page)"
                        .into(),
                }),
                Some(crate::assess::Verdict::Warn) => notes.push(Note::Warnings {
                    ids: vec!["system-warning".into()],
                }),
                _ => {}
            }
        }
    }
    let mut figure = None;
    let mut convention = v.convention.clone();
    if let Some(r) = &v.recomputed {
        let reported = load_assess_config(&r.evaluation.loaded)
            .map(|c| c.reported)
            .unwrap_or_default();
        let runs: Vec<_> = (r.assessment.runs.iter())
            .map(|run| (&run.id, &run.checks[..]))
            .collect();
        notes.extend(assessment_notes(
            &r.evaluation,
            &r.assessment.checks,
            &runs,
            &reported,
        ));
        convention = Some(r.evaluation.convention.id.name().to_string());
        figure = key_figure(&r.evaluation);
    }
    let mut r = Reviewed::bare(path, kind, notes);
    if let Some(id) = &v.identity {
        r.identify(id);
    } else {
        r.date = v.survey_date.clone();
    }
    r.report_id = v.report_id.clone();
    r.signer = (v.content != ContentState::Damaged).then(|| v.signature.column());
    r.convention = convention;
    r.figure(figure);
    r.verified = Some(v.verified);
    r.content = Some(v.content);
    (r, Some(v))
}

/// Failed checks, warnings, data-integrity findings and `[reported]` discrepancies (each with its
/// mistake named), from the survey-level findings `checks` and each run's (`runs`, by run id).
fn assessment_notes(
    eval: &Evaluation,
    checks: &[Finding],
    runs: &[(&String, &[Finding])],
    reported: &[ReportedValue],
) -> Vec<Note> {
    let mut notes = Vec::new();
    let mut warnings = Vec::new();
    let runs = runs
        .iter()
        .flat_map(|(id, checks)| checks.iter().map(move |f| (Some(*id), f)));
    // the reported-values check yields one finding per reported value, in order
    let judged: Vec<_> = checks.iter().filter(|f| f.id == REPORTED_CHECK).collect();
    let paired = judged.len() == reported.len()
        && reported
            .iter()
            .zip(&judged)
            .all(|(v, f)| f.subject.as_deref() == Some(subject(v).as_str()));
    for (run, f) in checks.iter().map(|f| (None, f)).chain(runs) {
        if paired && f.id == REPORTED_CHECK {
            continue; // judged below, with the mistake named
        }
        match (f.status, f.group) {
            (Status::Fail | Status::Warn, Group::Data) => notes.push(Note::Integrity {
                id: f.id.to_string(),
                run: run.cloned(),
                subject: f.subject.clone(),
                message: f.message.to_string(),
            }),
            (Status::Fail, _) => notes.push(Note::FailedCheck {
                id: f.id.to_string(),
                run: run.cloned(),
                subject: f.subject.clone(),
                message: f.message.to_string(),
            }),
            (Status::Warn, _) if !warnings.iter().any(|w| *w == f.id) => {
                warnings.push(f.id.to_string())
            }
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
    let number = shown.number(si);
    Some(KeyFigure {
        quantity: shown.label,
        value: number.parse().unwrap_or(shown.value(si)),
        unit: shown.symbol,
        value_si: si,
        shown: shown.format(si),
    })
}

#[cfg(test)]
mod tests;
