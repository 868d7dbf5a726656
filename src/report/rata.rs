//! The flow-monitor RATA summary: its typed model, built from a loaded RATA, and the words
//! `annulus rata` prints in its table too.
//!
//! Formatting only: the statistics and grades come from [`crate::rata`]. Values are printed in the
//! RATA file's own unit (`display_unit`); the low-velocity alternative, which 40 CFR 75 states in
//! ft/s, is printed in the velocity unit of the file's unit system with ft/s beside when that is
//! not ft/s.

use serde::Serialize;

use super::certificate::{Fact, FileHash};
use super::documents::{DocumentMeta, Presentation};
use super::{Attachment, AttachmentError};
use crate::digest::sha256_hex;
use crate::display::{fixed, grouped, DisplayTable, Kind, UnitSystem};
use crate::input::SourceFile;
use crate::pipeline::rata::{RataEvaluation, ReferenceSource};
use crate::rata::{LowVelocity, RataGrade, RataQuantity};
use crate::survey::ConventionId;
use crate::units::{convert_out, Unit};

/// Decimals of the relative accuracy (the limits are given to 0.1 %).
pub const RA_DECIMALS: usize = 2;
/// Decimals of the bias adjustment factor; three places, as it is commonly reported (from
/// memory, to confirm against 40 CFR 75 App. A §7.6.5).
pub const BAF_DECIMALS: usize = 3;

/// Everything the RATA summary shows (`templates/rata.typ`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RataSummary {
    pub title: String,
    pub monitor: String,
    pub date: String,
    pub facts: Vec<Fact>,
    /// The unit every value is printed in, e.g. `ft/s`.
    pub unit: String,
    pub runs: Vec<RataRunRow>,
    /// Statistics in label/value pairs, read across two columns.
    pub stats: Vec<Fact>,
    pub criteria: Vec<Criterion>,
    /// `pass` or `fail`.
    pub verdict: &'static str,
    pub verdict_sentence: String,
    pub relative_accuracy: String,
    pub frequency: &'static str,
    pub baf: String,
    pub source: String,
    pub method: String,
    pub notes: Vec<String>,
    pub signoff: RataSignOff,
    pub statement: String,
    pub files: Vec<FileHash>,
    pub software: String,
    #[serde(skip)]
    pub meta: DocumentMeta,
}

/// One paired run.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RataRunRow {
    pub id: String,
    pub period: String,
    pub reference: String,
    pub monitor: String,
    pub difference: String,
    pub source: String,
    pub used: bool,
    pub rejection: String,
}

/// A criterion with what was found and its limit.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Criterion {
    pub label: String,
    pub value: String,
    pub limit: String,
    /// `pass`, `fail` or `not-applicable`.
    pub status: &'static str,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RataSignOff {
    pub tested_by: String,
    pub organisation: String,
    pub reviewed_by: String,
}

impl Presentation for RataSummary {
    const TEMPLATE: &'static str = include_str!("../../templates/rata.typ");
    const TEMPLATE_NAME: &'static str = "rata.typ";
    fn meta(&self) -> DocumentMeta {
        self.meta.clone()
    }
}

/// Prints values in the file's display unit with decimals that suit their size.
pub struct RataUnits {
    pub unit: &'static Unit,
    decimals: usize,
    /// The velocity display of the file's unit system, for the ft/s limits.
    table: DisplayTable,
}

impl RataUnits {
    pub fn of(r: &RataEvaluation) -> RataUnits {
        let unit = r.spec.display_unit;
        let size = convert_out(r.result.reference_mean, unit).abs();
        let decimals = if size >= 1000.0 {
            0
        } else if size >= 100.0 {
            1
        } else {
            2
        };
        RataUnits {
            unit,
            decimals,
            table: DisplayTable::new(ConventionId::EpaMethod2, system_of(unit)),
        }
    }

    /// The number in the file's unit.
    pub fn num(&self, si: f64) -> String {
        grouped(convert_out(si, self.unit), self.decimals)
    }

    pub fn with_unit(&self, si: f64) -> String {
        format!("{} {}", self.num(si), self.unit.symbol)
    }

    /// A velocity limit 40 CFR 75 states in ft/s: in the job's velocity unit, with ft/s beside
    /// when that is another unit.
    pub fn velocity_limit(&self, m_s: f64, decimals: usize) -> String {
        let v = self.table.get(Kind::Velocity);
        let own = v.with_unit(v.number_with(m_s, decimals));
        if v.ascii == "ft/s" {
            own
        } else {
            format!("{own} = {} ft/s", fixed(m_s / 0.3048, decimals))
        }
    }
}

/// The unit system whose display table prints `unit` (inch-pound when none does).
fn system_of(unit: &Unit) -> UnitSystem {
    let kinds = [
        Kind::Velocity,
        Kind::ActualFlow,
        Kind::StandardFlow,
        Kind::DryStandardFlow,
    ];
    UnitSystem::ALL
        .into_iter()
        .find(|s| {
            [ConventionId::EpaMethod2, ConventionId::Iso16911]
                .iter()
                .any(|c| {
                    let t = DisplayTable::new(*c, *s);
                    kinds.iter().any(|k| t.get(*k).ascii == unit.symbol)
                })
        })
        .unwrap_or(UnitSystem::InchPound)
}

pub fn grade_word(g: RataGrade) -> &'static str {
    match g {
        RataGrade::Fail => "fail",
        RataGrade::Pass | RataGrade::PassAnnualFrequency => "pass",
    }
}

/// The test frequency a grade earns (40 CFR 75 App. B §2.3.1, from memory: ≤ 7.5 % earns the
/// reduced, annual frequency; otherwise semiannual).
pub fn frequency(g: RataGrade) -> &'static str {
    match g {
        RataGrade::PassAnnualFrequency => "annual (reduced frequency earned)",
        RataGrade::Pass => "semiannual",
        RataGrade::Fail => "none: the RATA failed",
    }
}

pub fn quantity_text(r: &RataEvaluation) -> String {
    match r.spec.quantity {
        RataQuantity::VelocityMS => format!("velocity, {}", r.spec.display_unit.symbol),
        RataQuantity::Flow => {
            let survey = r
                .sources
                .iter()
                .any(|s| matches!(s, ReferenceSource::Survey { .. }));
            if survey {
                format!(
                    "flow, {} (survey references: {})",
                    r.spec.display_unit.symbol,
                    r.spec.basis.words()
                )
            } else {
                format!("flow, {}", r.spec.display_unit.symbol)
            }
        }
    }
}

pub fn source_text(s: &ReferenceSource) -> String {
    match s {
        ReferenceSource::Entered { .. } => "entered".to_string(),
        ReferenceSource::Survey {
            path,
            runs,
            one_run: true,
            ..
        } => format!("survey {path}, run {}", runs.join(", ")),
        ReferenceSource::Survey { path, runs, .. } => format!(
            "survey {path} (mean of run{} {})",
            if runs.len() == 1 { "" } else { "s" },
            runs.join(", ")
        ),
    }
}

/// The low-velocity alternative in words and its status (`n/a` when it does not apply).
pub fn low_velocity_text(r: &RataEvaluation, u: &RataUnits) -> (String, &'static str) {
    let lim = &r.result.limits;
    match r.result.low_velocity {
        LowVelocity::NotApplicable { reason } => (format!("not applicable: {reason}"), "n/a"),
        LowVelocity::Evaluated {
            abs_mean_difference_m_s,
            grade,
        } => (
            format!(
                "|RM avg − CEM avg| {} (limit {}, {} for the annual frequency)",
                u.velocity_limit(abs_mean_difference_m_s, 2),
                u.velocity_limit(lim.low_velocity_pass_m_s, 1),
                u.velocity_limit(lim.low_velocity_incentive_m_s, 1),
            ),
            grade_word(grade),
        ),
    }
}

/// The mean difference is written `mean d`, not d̄: a combining macron upsets terminal column
/// widths and comes out of PDF text extraction garbled.
/// The bias test in words: which way the monitor reads, against the confidence coefficient, and
/// the bias adjustment factor (40 CFR 75 App. A §7.6, from memory).
pub fn bias_text(r: &RataEvaluation, u: &RataUnits) -> String {
    let res = &r.result;
    let baf = fixed(res.bias.adjustment_factor, BAF_DECIMALS);
    let words = res.bias_words(&|v| u.with_unit(v));
    if res.bias.passed {
        format!("pass: {words}; BAF {baf}")
    } else {
        format!("fail: {words}, BAF = 1 + |mean d|/CEM avg = {baf}")
    }
}

pub fn verdict_text(r: &RataEvaluation) -> String {
    let res = &r.result;
    match res.grade() {
        RataGrade::Fail => "FAIL: the relative accuracy exceeds its limit".to_string(),
        g if res.ra_grade < g => format!(
            "pass on the low-velocity alternative; test frequency {}",
            frequency(g)
        ),
        g => format!("pass; test frequency {}", frequency(g)),
    }
}

/// One sentence for the PDF: the outcome, on which criterion, the frequency and the BAF.
fn verdict_sentence(r: &RataEvaluation) -> String {
    let res = &r.result;
    let lim = &res.limits;
    let ra = fixed(res.relative_accuracy_percent, RA_DECIMALS);
    let outcome = match res.grade() {
        RataGrade::Fail => format!(
            "The monitor fails: relative accuracy {ra} % exceeds {} %",
            fixed(lim.ra_pass_percent, 1)
        ),
        g if res.ra_grade < g => format!(
            "The monitor passes on the low-velocity alternative (relative accuracy {ra} %); \
             test frequency {}",
            frequency(g)
        ),
        g => format!(
            "The monitor passes: relative accuracy {ra} % (limit {} %); test frequency {}",
            fixed(lim.ra_pass_percent, 1),
            frequency(g)
        ),
    };
    let baf = fixed(res.bias.adjustment_factor, BAF_DECIMALS);
    let bias = if res.bias.passed {
        match res.bias_direction() {
            crate::rata::BiasDirection::High => {
                format!("bias test passed (the monitor reads high on average), BAF {baf}")
            }
            crate::rata::BiasDirection::Low => {
                format!("bias test passed (the monitor reads low, within the confidence coefficient), BAF {baf}")
            }
            crate::rata::BiasDirection::None => format!("bias test passed, BAF {baf}"),
        }
    } else {
        format!("bias test failed (monitor reads low), BAF {baf}")
    };
    format!("{outcome}; {bias}.")
}

/// A plain file name for an embedded copy: attachment names may not hold path separators.
fn flat_name(s: &str) -> String {
    s.chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() || matches!(c, '.' | '-' | '_') {
                c
            } else {
                '-'
            }
        })
        .collect()
}

/// The RATA file and every reference survey with its readings, to embed byte for byte.
pub fn attachments(r: &RataEvaluation) -> Result<Vec<Attachment>, AttachmentError> {
    let make = |name: String, f: &SourceFile, description: String| {
        let mime = if name.ends_with(".csv") {
            "text/csv"
        } else {
            "application/toml"
        };
        Attachment::new(name, f.bytes.clone(), mime, description)
    };
    let mut v = vec![make(
        r.file.name.clone(),
        &r.file,
        "RATA file (TOML) as read".into(),
    )?];
    let mut embedded: Vec<(&std::path::Path, &[u8])> = Vec::new();
    for (run, f) in &r.survey_files {
        let name = flat_name(&format!("run-{run}--{}", f.name));
        // a survey several runs take values from (and its calibration) is embedded once
        if v.iter().any(|a| a.name() == name)
            || embedded.contains(&(f.path.as_path(), f.bytes.as_slice()))
        {
            continue;
        }
        embedded.push((f.path.as_path(), f.bytes.as_slice()));
        v.push(make(
            name,
            f,
            format!("RATA run {run}: reference-method file {} as read", f.name),
        )?);
    }
    Ok(v)
}

/// Builds the summary; `files` are the attachments it lists with their SHA-256.
pub fn summary(r: &RataEvaluation, files: &[Attachment]) -> RataSummary {
    let m = &r.spec.meta;
    let res = &r.result;
    let u = RataUnits::of(r);
    RataSummary {
        title: m.title.clone(),
        monitor: m.monitor_id.clone(),
        date: m.date.to_string(),
        facts: facts(r),
        unit: u.unit.symbol.to_string(),
        runs: runs(r, &u),
        stats: stats(r, &u),
        criteria: criteria(r, &u),
        verdict: grade_word(res.grade()),
        verdict_sentence: verdict_sentence(r),
        relative_accuracy: format!("{} %", fixed(res.relative_accuracy_percent, RA_DECIMALS)),
        frequency: frequency(res.grade()),
        baf: fixed(res.bias.adjustment_factor, BAF_DECIMALS),
        source: res.limits.source.to_string(),
        method: METHOD.into(),
        notes: m.notes.clone(),
        signoff: RataSignOff {
            tested_by: m.tested_by.clone().unwrap_or_default(),
            organisation: m.organisation.clone().unwrap_or_default(),
            reviewed_by: m.reviewed_by.clone().unwrap_or_default(),
        },
        statement: STATEMENT.into(),
        files: files
            .iter()
            .map(|a| FileHash {
                name: a.name().to_string(),
                sha256: sha256_hex(a.bytes()),
            })
            .collect(),
        software: super::build::software(),
        meta: meta(r, files),
    }
}

/// The monitor, its serial and description in one line.
pub fn monitor_text(r: &RataEvaluation) -> String {
    let m = &r.spec.meta;
    let mut monitor = m.monitor_id.clone();
    if let Some(s) = &m.monitor_serial {
        monitor += &format!(" (serial {s})");
    }
    monitor
}

fn facts(r: &RataEvaluation) -> Vec<Fact> {
    let m = &r.spec.meta;
    let who = match (&m.tested_by, &m.organisation) {
        (Some(t), Some(o)) => Some(format!("{t}, {o}")),
        (Some(t), None) => Some(t.clone()),
        (None, Some(o)) => Some(o.clone()),
        (None, None) => None,
    };
    [
        ("Facility", m.facility.clone()),
        ("Unit", m.unit.clone()),
        ("Location", m.location.clone()),
        ("Monitor", Some(monitor_text(r))),
        ("Monitor type", m.monitor_description.clone()),
        ("Test date", Some(m.date.to_string())),
        ("Operating level", m.level.clone()),
        ("Quantity", Some(quantity_text(r))),
        ("Tested by", who),
    ]
    .into_iter()
    .filter_map(|(label, v)| v.map(|v| Fact::new(label, v)))
    .collect()
}

fn runs(r: &RataEvaluation, u: &RataUnits) -> Vec<RataRunRow> {
    r.result
        .runs
        .iter()
        .zip(&r.sources)
        .zip(&r.spec.runs)
        .map(|((run, src), spec)| RataRunRow {
            id: run.id().to_string(),
            period: spec.period.clone().unwrap_or_default(),
            reference: u.num(run.reference()),
            monitor: u.num(run.monitor()),
            difference: u.num(run.difference()),
            source: source_text(src),
            used: run.rejection().is_none(),
            rejection: run.rejection().unwrap_or("").to_string(),
        })
        .collect()
}

/// Read across in two columns: counts and means on the left, the spread on the right.
fn stats(r: &RataEvaluation, u: &RataUnits) -> Vec<Fact> {
    let res = &r.result;
    vec![
        Fact::new(
            "Runs used / rejected",
            format!("{} / {}", res.used_runs, res.runs.len() - res.used_runs),
        ),
        Fact::new("Mean difference (mean d)", u.with_unit(res.mean_difference)),
        Fact::new(
            "Mean reference method, RM avg",
            u.with_unit(res.reference_mean),
        ),
        Fact::new(
            "Standard deviation of d, S_d",
            u.with_unit(res.std_dev_difference),
        ),
        Fact::new("Mean monitor, CEM avg", u.with_unit(res.monitor_mean)),
        Fact::new(
            format!(
                "t0.975 ({} degrees of freedom)",
                res.used_runs.saturating_sub(1)
            ),
            fixed(res.t_value, 3),
        ),
        Fact::new("", ""),
        Fact::new(
            "Confidence coefficient, cc",
            u.with_unit(res.confidence_coefficient),
        ),
    ]
}

fn criteria(r: &RataEvaluation, u: &RataUnits) -> Vec<Criterion> {
    let res = &r.result;
    let lim = &res.limits;
    let (lv_text, lv_status) = low_velocity_text(r, u);
    vec![
        Criterion {
            label: "Relative accuracy".into(),
            value: format!("{} %", fixed(res.relative_accuracy_percent, RA_DECIMALS)),
            limit: format!(
                "≤ {} % (≤ {} % for the annual frequency)",
                fixed(lim.ra_pass_percent, 1),
                fixed(lim.ra_incentive_percent, 1)
            ),
            status: grade_word(res.ra_grade),
        },
        Criterion {
            label: "Low-velocity alternative".into(),
            value: lv_text,
            limit: format!(
                "applies when RM avg ≤ {}",
                u.velocity_limit(lim.low_velocity_threshold_m_s, 0)
            ),
            status: if lv_status == "n/a" {
                "not-applicable"
            } else {
                lv_status
            },
        },
        Criterion {
            label: "Bias test".into(),
            value: bias_text(r, u),
            limit: "fails when mean d > |cc|".into(),
            status: if res.bias.passed { "pass" } else { "fail" },
        },
    ]
}

const METHOD: &str = "d = RM − CEM per run; the mean d and S_d = √((Σd² − (Σd)²/n)/(n − 1)) \
    over the used runs; cc = t0.975(n − 1)·S_d/√n; RA = (|mean d| + |cc|)/RM avg × 100. Rejected \
    runs are listed but not used. The bias test fails when mean d > |cc| (the monitor reads \
    low); the bias adjustment factor is then BAF = 1 + |mean d|/CEM avg, otherwise 1.";

const STATEMENT: &str = "This summary is computed from the paired runs embedded in this file \
    under the limits named above. It supports, and does not replace, the judgment of a \
    competent, qualified professional, the applicable regulation, local codes, the permit and \
    the facility's QA plan. Reference-method traverses involve work at height, hot and toxic \
    gases and hot probes: follow site rules and permits to work.";

fn meta(r: &RataEvaluation, files: &[Attachment]) -> DocumentMeta {
    let m = &r.spec.meta;
    let fingerprint = sha256_hex(
        &files
            .iter()
            .flat_map(|a| a.bytes().iter().copied())
            .collect::<Vec<u8>>(),
    );
    DocumentMeta {
        title: m.title.clone(),
        author: vec![
            m.tested_by.clone().unwrap_or_default(),
            m.organisation.clone().unwrap_or_default(),
        ],
        keywords: vec!["RATA".into(), "flow monitor".into(), m.monitor_id.clone()],
        description: format!(
            "Flow-monitor RATA of {} on {}: RA {} %, {}",
            m.monitor_id,
            m.date,
            fixed(r.result.relative_accuracy_percent, RA_DECIMALS),
            grade_word(r.result.grade())
        ),
        ident: format!("annulus-rata/{}/{}/{fingerprint}", m.monitor_id, m.date),
        date: m.date,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sample() -> RataEvaluation {
        let input = crate::input::rata_file::load(
            &std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
                .join("sample-data/rata/unit2-rata.toml"),
        )
        .expect("sample RATA loads");
        crate::pipeline::rata::evaluate(input).expect("sample RATA evaluates")
    }

    #[test]
    fn the_summary_of_the_sample_rata() {
        let r = sample();
        let files = attachments(&r).unwrap();
        let s = summary(&r, &files);
        assert_eq!(s.unit, "ft/s");
        assert_eq!(s.verdict, "pass");
        // tests/calibrate_rata.rs: RA 0.51 %, RM avg 50.56 ft/s
        assert_eq!(s.relative_accuracy, "0.51 %");
        assert!(s.stats.iter().any(|f| f.value == "50.56 ft/s"));
        assert_eq!(s.files.len(), files.len());
        assert_eq!(s.runs.len(), r.result.runs.len());
        assert!(s.runs.iter().any(|x| !x.used && !x.rejection.is_empty()));
        assert_eq!(s.criteria[1].limit, "applies when RM avg ≤ 10 ft/s");
    }

    #[test]
    fn a_metric_rata_shows_the_ft_s_limits_beside_its_own_unit() {
        assert_eq!(
            system_of(crate::units::lookup_unit("m/s").unwrap()),
            UnitSystem::Si
        );
        assert_eq!(
            system_of(crate::units::lookup_unit("ft/s").unwrap()),
            UnitSystem::InchPound
        );
        let u = RataUnits {
            unit: crate::units::lookup_unit("m/s").unwrap(),
            decimals: 2,
            table: DisplayTable::new(ConventionId::EpaMethod2, UnitSystem::Si),
        };
        // 40 CFR 75 low-velocity limit 1.5 ft/s = 0.4572 m/s
        assert_eq!(u.velocity_limit(1.5 * 0.3048, 1), "0.5 m/s = 1.5 ft/s");
    }
}
