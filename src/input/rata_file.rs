//! Reads a flow-monitor RATA file (TOML) into validated paired runs, resolves runs whose
//! reference-method value comes from a survey, and evaluates the RATA through
//! [`crate::rata::evaluate_rata`].
//!
//! Owns the RATA file format and its located diagnostics. Must not print, render or decide exit
//! codes (the `rata` command does); the statistics live in [`crate::rata`], survey results come
//! from [`crate::pipeline`].
//!
//! # Format
//!
//! ```toml
//! [rata]
//! title = "Unit 2 stack flow monitor, annual RATA"
//! facility = "…"
//! unit = "Unit 2"                    # the emission unit or stack the monitor serves
//! location = "…"                     # optional: where the reference traverses were made
//! date = "2026-09-22"
//! quantity = "velocity"              # velocity | flow
//! display_unit = "ft/s"              # optional: print in this unit (default: the first run's)
//! basis = "standard"                 # flow only: actual | standard | dry-standard (survey runs)
//! level = "normal load"              # optional: operating level
//! tested_by = "…"                    # optional
//! organisation = "…"                 # optional
//! reviewed_by = "…"                  # optional
//! notes = ["…"]                      # optional
//!
//! [monitor]
//! id = "FM-2"
//! serial = "…"                       # optional
//! description = "…"                  # optional
//!
//! [[run]]
//! id = "1"
//! reference = "52.40 ft/s"           # reference-method value, or instead:
//! # survey = "run-1/survey.toml"     # a survey; its average over valid runs is the value
//! monitor = "51.95 ft/s"             # the monitor's value over the same period
//! period = "08:10–08:52"             # optional
//! rejected = "reason"                # optional: reported but left out of the statistics
//! ```
//!
//! Values are quantity strings: velocities (`m/s`, `ft/s`, `fpm`) for `quantity = "velocity"`,
//! volume flows (`cfm`, `m3/h`, `m3/s`, `L/s`) for `quantity = "flow"`. For a flow RATA a
//! survey reference gives the survey's flow on `basis` (default `standard`: flow monitors under
//! 40 CFR 75 report wet-basis flow at standard conditions, from memory).

use super::text::{span_location, Spanned};
use super::{read_text, SourceFile};
use crate::diag::{Diagnostic, Diagnostics, Error, Location};
use crate::rata::{
    evaluate_rata, RataError, RataQuantity, RataResult, RataRun, PART_75_FLOW_LIMITS,
};
use crate::units::{lookup_unit, parse_quantity, symbols_for, Dimension, Unit};
use chrono::NaiveDate;
use serde::Deserialize;
use std::path::Path;

type S = Spanned<String>;

const HINT_FORMAT: &str =
    "see the RATA format in sample-data/rata/README.md (unit2-rata.toml is a complete example)";

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    rata: RawRata,
    monitor: RawMonitor,
    #[serde(default, rename = "run")]
    runs: Vec<RawRun>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRata {
    title: String,
    facility: Option<String>,
    unit: Option<String>,
    location: Option<String>,
    date: Spanned<toml::Value>,
    quantity: S,
    display_unit: Option<S>,
    basis: Option<S>,
    level: Option<String>,
    tested_by: Option<String>,
    organisation: Option<String>,
    reviewed_by: Option<String>,
    notes: Option<Vec<String>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawMonitor {
    id: S,
    serial: Option<String>,
    description: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRun {
    id: Spanned<toml::Value>,
    reference: Option<S>,
    survey: Option<S>,
    monitor: S,
    period: Option<String>,
    rejected: Option<S>,
}

/// Which survey flow a flow RATA takes from a survey reference.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FlowBasis {
    Actual,
    Standard,
    DryStandard,
}

impl FlowBasis {
    pub const ALL: [FlowBasis; 3] = [
        FlowBasis::Actual,
        FlowBasis::Standard,
        FlowBasis::DryStandard,
    ];

    /// The name used in the file.
    pub const fn name(self) -> &'static str {
        match self {
            FlowBasis::Actual => "actual",
            FlowBasis::Standard => "standard",
            FlowBasis::DryStandard => "dry-standard",
        }
    }

    /// Plain words for tables and the report.
    pub const fn words(self) -> &'static str {
        match self {
            FlowBasis::Actual => "actual flow at stack conditions",
            FlowBasis::Standard => "wet flow at standard conditions",
            FlowBasis::DryStandard => "dry flow at standard conditions",
        }
    }
}

/// The descriptive part of a RATA file.
#[derive(Debug, Clone, PartialEq)]
pub struct RataMeta {
    pub title: String,
    pub facility: Option<String>,
    pub unit: Option<String>,
    pub location: Option<String>,
    pub date: NaiveDate,
    pub level: Option<String>,
    pub tested_by: Option<String>,
    pub organisation: Option<String>,
    pub reviewed_by: Option<String>,
    pub notes: Vec<String>,
    pub monitor_id: String,
    pub monitor_serial: Option<String>,
    pub monitor_description: Option<String>,
}

/// Where a run's reference-method value comes from.
#[derive(Debug, Clone, PartialEq)]
pub enum ReferenceSpec {
    /// Entered as a quantity: SI value and the text as written.
    Value { si: f64, raw: String },
    /// A survey file, relative to the RATA file.
    Survey { path: String, at: Location },
}

/// One `[[run]]` as parsed.
#[derive(Debug, Clone, PartialEq)]
pub struct RunSpec {
    pub id: String,
    pub reference: ReferenceSpec,
    /// Monitor value, SI (m/s or m³/s), and the text as written.
    pub monitor_si: f64,
    pub monitor_raw: String,
    pub period: Option<String>,
    pub rejected: Option<String>,
    /// Where the run's `id` is, for later messages.
    pub at: Location,
    /// Where its `rejected` is, if it has one.
    pub rejected_at: Option<Location>,
}

/// A parsed RATA TOML.
#[derive(Debug, Clone, PartialEq)]
pub struct RataSpec {
    pub meta: RataMeta,
    pub quantity: RataQuantity,
    pub display_unit: &'static Unit,
    pub basis: FlowBasis,
    pub runs: Vec<RunSpec>,
}

/// Where a resolved reference-method value came from.
#[derive(Debug, Clone, PartialEq)]
pub enum ReferenceSource {
    /// Entered in the RATA file, as written.
    Entered { raw: String },
    /// The average of a survey's valid runs.
    Survey {
        /// As written in the RATA file.
        path: String,
        title: String,
        /// Ids of the survey runs averaged.
        runs: Vec<String>,
    },
}

/// A RATA file with every survey reference resolved, and the evaluated RATA.
#[derive(Debug, Clone)]
pub struct LoadedRata {
    pub file: SourceFile,
    pub spec: RataSpec,
    /// Per run (same order as `spec.runs`): where the reference value came from.
    pub sources: Vec<ReferenceSource>,
    /// Survey and readings files read for survey references, each with the id of the RATA run
    /// that referenced it.
    pub survey_files: Vec<(String, SourceFile)>,
    pub result: RataResult,
}

/// The SI dimension of a quantity's values.
pub fn dimension_of(quantity: RataQuantity) -> Dimension {
    match quantity {
        RataQuantity::VelocityMS => Dimension::Velocity,
        RataQuantity::Flow => Dimension::Flow,
    }
}

struct Ctx<'a> {
    file: &'a str,
    text: &'a str,
    diags: Diagnostics,
}

impl Ctx<'_> {
    fn loc(&self, span: std::ops::Range<usize>, key: &str) -> Location {
        span_location(self.file, self.text, span.start).with_context(format!("`{key}`"))
    }

    fn error(&mut self, span: std::ops::Range<usize>, key: &str, msg: String, hint: Option<&str>) {
        let mut d = Diagnostic::new(msg).at(self.loc(span, key));
        if let Some(h) = hint {
            d = d.hint(h);
        }
        self.diags.push(d);
    }

    fn quantity(&mut self, v: &S, key: &str, dim: Option<Dimension>) -> Option<f64> {
        let dim = dim?;
        match parse_quantity(v.get_ref(), dim) {
            Ok(x) => Some(x),
            Err(e) => {
                let hint = e.hint();
                self.error(v.span(), key, format!("`{key}`: {e}"), Some(&hint));
                None
            }
        }
    }
}

fn toml_error(file: &str, text: &str, e: toml::de::Error) -> Error {
    let loc = match e.span() {
        Some(span) => span_location(file, text, span.start),
        None => Location::file(file),
    };
    Error::input(
        Diagnostic::new(format!(
            "the RATA file is not valid: {}",
            e.message().trim()
        ))
        .at(loc)
        .hint(HINT_FORMAT),
    )
}

/// The unit part of a quantity string (`"52.4 ft/s"` → `ft/s`), when it is a known unit.
fn unit_of(raw: &str) -> Option<&'static Unit> {
    let t = raw.trim();
    let start = t
        .char_indices()
        .find(|(_, c)| !(c.is_ascii_digit() || matches!(c, '.' | '-' | '+' | 'e' | 'E')))
        .map(|(i, _)| i)?;
    lookup_unit(t[start..].trim())
}

/// Parses a RATA TOML. `file` names it in diagnostics. Survey references are not read here.
pub fn parse_rata(file: &str, text: &str) -> Result<RataSpec, Error> {
    let raw: RawFile = toml::from_str(text).map_err(|e| toml_error(file, text, e))?;
    let mut cx = Ctx {
        file,
        text,
        diags: Diagnostics::new(),
    };
    let r = &raw.rata;
    let (date_text, parsed) = super::text::toml_date(r.date.get_ref());
    let date = match parsed {
        Some(d) => Some(d),
        None => {
            cx.error(
                r.date.span(),
                "rata.date",
                format!("`rata.date` is not a date: `{date_text}`"),
                Some("write the date as YYYY-MM-DD, e.g. \"2026-09-22\""),
            );
            None
        }
    };
    let quantity = match r.quantity.get_ref().trim() {
        "velocity" => Some(RataQuantity::VelocityMS),
        "flow" => Some(RataQuantity::Flow),
        other => {
            cx.error(
                r.quantity.span(),
                "rata.quantity",
                format!("`rata.quantity` must be one of velocity | flow, found `{other}`"),
                None,
            );
            None
        }
    };
    let dim = quantity.map(dimension_of);
    let basis = match (&r.basis, quantity) {
        (None, _) => Some(FlowBasis::Standard),
        (Some(v), Some(RataQuantity::VelocityMS)) => {
            cx.error(
                v.span(),
                "rata.basis",
                "`rata.basis` applies to a flow RATA only; this one compares velocities".into(),
                Some("remove `basis`, or set quantity = \"flow\""),
            );
            None
        }
        (Some(v), _) => {
            let found = v.get_ref().trim();
            match FlowBasis::ALL.iter().find(|b| b.name() == found) {
                Some(b) => Some(*b),
                None => {
                    cx.error(
                        v.span(),
                        "rata.basis",
                        format!(
                            "`rata.basis` must be one of actual | standard | dry-standard, found `{found}`"
                        ),
                        None,
                    );
                    None
                }
            }
        }
    };
    let m = &raw.monitor;
    if m.id.get_ref().trim().is_empty() {
        cx.error(
            m.id.span(),
            "monitor.id",
            "`monitor.id` is empty".into(),
            Some("write the monitor's identifier, e.g. id = \"FM-2\""),
        );
    }

    if raw.runs.is_empty() {
        cx.diags.push(
            Diagnostic::new("the RATA file has no [[run]]")
                .at(Location::file(file))
                .hint("add one [[run]] per paired reference-method run: id, reference or survey, monitor"),
        );
    }
    let mut runs: Vec<RunSpec> = Vec::new();
    // Ids seen so far, also of runs with other problems (so a duplicate is still found).
    let mut seen: Vec<String> = Vec::new();
    for run in &raw.runs {
        let id = match run.id.get_ref() {
            toml::Value::String(s) => s.trim().to_string(),
            toml::Value::Integer(i) => i.to_string(),
            other => other.to_string(),
        };
        let at = cx.loc(run.id.span(), "run.id");
        if id.is_empty() {
            cx.error(
                run.id.span(),
                "run.id",
                "every RATA run needs an id, found an empty one".into(),
                None,
            );
        } else if seen.contains(&id) {
            cx.error(
                run.id.span(),
                "run.id",
                format!("each RATA run id must be unique, found `{id}` twice"),
                None,
            );
        }
        seen.push(id.clone());
        let reference = match (&run.reference, &run.survey) {
            (Some(v), None) => {
                cx.quantity(v, "run.reference", dim)
                    .map(|si| ReferenceSpec::Value {
                        si,
                        raw: v.get_ref().trim().to_string(),
                    })
            }
            (None, Some(p)) if !p.get_ref().trim().is_empty() => Some(ReferenceSpec::Survey {
                path: p.get_ref().trim().to_string(),
                at: cx.loc(p.span(), "run.survey"),
            }),
            (None, Some(p)) => {
                cx.error(p.span(), "run.survey", "`run.survey` is empty".into(), None);
                None
            }
            (Some(v), Some(_)) => {
                cx.error(
                    v.span(),
                    "run.reference",
                    format!("run `{id}` gives both `reference` and `survey`"),
                    Some(
                        "keep one: the reference-method value, or the survey it was computed from",
                    ),
                );
                None
            }
            (None, None) => {
                cx.error(
                    run.id.span(),
                    "run.id",
                    format!("run `{id}` has no reference-method value"),
                    Some("add reference = \"52.4 ft/s\" or survey = \"run-1/survey.toml\""),
                );
                None
            }
        };
        let monitor = cx.quantity(&run.monitor, "run.monitor", dim);
        let rejected = match &run.rejected {
            Some(v) if v.get_ref().trim().is_empty() => {
                cx.error(
                    v.span(),
                    "run.rejected",
                    format!("run `{id}` is rejected, so it needs a reason, found none"),
                    Some("write why, e.g. rejected = \"monitor in daily calibration during the run\""),
                );
                None
            }
            Some(v) => Some(Some(v.get_ref().trim().to_string())),
            None => Some(None),
        };
        // A used run needs positive values; a rejected one may hold zero (monitor off line).
        let used = matches!(rejected, Some(None));
        let mut positive = |v: Option<f64>, raw: &S, key: &str| {
            let x = v?;
            let ok = if used { x > 0.0 } else { x >= 0.0 };
            if ok {
                return Some(x);
            }
            cx.error(
                raw.span(),
                key,
                format!(
                    "`{key}` of run `{id}` must be {}, found `{}`",
                    if used {
                        "greater than zero"
                    } else {
                        "zero or greater"
                    },
                    raw.get_ref().trim()
                ),
                None,
            );
            None
        };
        let monitor = positive(monitor, &run.monitor, "run.monitor");
        let reference = match (reference, &run.reference) {
            (Some(ReferenceSpec::Value { si, raw }), Some(text)) => {
                positive(Some(si), text, "run.reference").map(|si| ReferenceSpec::Value { si, raw })
            }
            (other, _) => other,
        };
        if let (Some(reference), Some(monitor_si), Some(rejected)) = (reference, monitor, rejected)
        {
            runs.push(RunSpec {
                id,
                reference,
                monitor_si,
                monitor_raw: run.monitor.get_ref().trim().to_string(),
                period: run.period.clone(),
                rejected,
                at,
                rejected_at: run
                    .rejected
                    .as_ref()
                    .map(|v| cx.loc(v.span(), "run.rejected")),
            });
        }
    }

    // The run-count rules (≤ 3 rejected, ≥ 9 used), located where they can be.
    let limits = PART_75_FLOW_LIMITS;
    if cx.diags.is_empty() {
        let rejected: Vec<&RunSpec> = runs.iter().filter(|r| r.rejected.is_some()).collect();
        if rejected.len() > limits.max_rejected_runs {
            let extra = rejected[limits.max_rejected_runs];
            let mut d = Diagnostic::new(format!(
                "at most {} runs may be rejected, found {}",
                limits.max_rejected_runs,
                rejected.len()
            ))
            .hint("a RATA may reject up to three runs (40 CFR 75 App. A §7, from memory); repeat runs instead");
            if let Some(at) = &extra.rejected_at {
                d = d.at(at.clone());
            }
            cx.diags.push(d);
        }
        let used = runs.len() - rejected.len();
        if used < limits.min_used_runs {
            cx.diags.push(
                Diagnostic::new(format!(
                    "at least {} runs must remain after rejections, found {used}",
                    limits.min_used_runs
                ))
                .at(Location::file(file))
                .hint("a flow RATA needs nine or more paired runs that are not rejected (40 CFR 75 App. A §7, from memory)"),
            );
        }
    }

    let display_unit = match (&r.display_unit, dim) {
        (Some(v), Some(dim)) => match lookup_unit(v.get_ref()) {
            Some(u) if u.dimension == dim => Some(u),
            _ => {
                cx.error(
                    v.span(),
                    "rata.display_unit",
                    format!(
                        "`rata.display_unit` must be a unit of {}, found `{}`",
                        dim.name(),
                        v.get_ref()
                    ),
                    Some(&format!("use one of: {}", symbols_for(dim).join(", "))),
                );
                None
            }
        },
        (None, Some(dim)) => raw
            .runs
            .first()
            .and_then(|run| unit_of(run.monitor.get_ref()))
            .filter(|u| u.dimension == dim)
            .or_else(|| lookup_unit(dim.si_symbol())),
        (_, None) => None,
    };

    match (date, quantity, basis, display_unit) {
        (Some(date), Some(quantity), Some(basis), Some(display_unit)) if cx.diags.is_empty() => {
            Ok(RataSpec {
                meta: RataMeta {
                    title: r.title.clone(),
                    facility: r.facility.clone(),
                    unit: r.unit.clone(),
                    location: r.location.clone(),
                    date,
                    level: r.level.clone(),
                    tested_by: r.tested_by.clone(),
                    organisation: r.organisation.clone(),
                    reviewed_by: r.reviewed_by.clone(),
                    notes: r.notes.clone().unwrap_or_default(),
                    monitor_id: m.id.get_ref().trim().to_string(),
                    monitor_serial: m.serial.clone(),
                    monitor_description: m.description.clone(),
                },
                quantity,
                display_unit,
                basis,
                runs,
            })
        }
        _ => {
            if cx.diags.is_empty() {
                cx.diags.push(
                    Diagnostic::new("the RATA file could not be read").at(Location::file(file)),
                );
            }
            Err(Error::Input(cx.diags))
        }
    }
}

/// Reads a RATA file, resolves its survey references (relative to the file) and evaluates the
/// RATA; every input problem, also those inside referenced surveys, is reported in one pass.
pub fn load(path: &Path) -> Result<LoadedRata, Error> {
    let name = path.display().to_string();
    let (bytes, text) = read_text(path, &name)?;
    let spec = parse_rata(&name, &text)?;
    let dir = path.parent().unwrap_or(Path::new("."));
    let mut diags = Diagnostics::new();
    let mut sources = Vec::new();
    let mut survey_files = Vec::new();
    let mut runs = Vec::new();
    for run in &spec.runs {
        let (reference, source) = match &run.reference {
            ReferenceSpec::Value { si, raw } => {
                (*si, ReferenceSource::Entered { raw: raw.clone() })
            }
            ReferenceSpec::Survey { path: rel, at } => {
                match survey_reference(&dir.join(rel), rel, at, spec.quantity, spec.basis) {
                    Ok((value, source, files)) => {
                        survey_files.extend(files.into_iter().map(|f| (run.id.clone(), f)));
                        (value, source)
                    }
                    Err(Error::Input(d)) => {
                        diags.extend(d);
                        continue;
                    }
                    Err(e) => return Err(e),
                }
            }
        };
        let built = match &run.rejected {
            None => RataRun::used(&run.id, reference, run.monitor_si),
            Some(reason) => RataRun::rejected(&run.id, reference, run.monitor_si, reason),
        };
        match built {
            Ok(r) => {
                runs.push(r);
                sources.push(source);
            }
            Err(e) => diags.push(core_diagnostic(e, &name, &spec)),
        }
    }
    if !diags.is_empty() {
        return Err(Error::Input(diags));
    }
    let result = evaluate_rata(runs, spec.quantity, PART_75_FLOW_LIMITS)
        .map_err(|e| Error::input(core_diagnostic(e, &name, &spec)))?;
    Ok(LoadedRata {
        file: SourceFile {
            name: path
                .file_name()
                .map(|n| n.to_string_lossy().to_string())
                .unwrap_or(name),
            path: path.to_path_buf(),
            bytes,
        },
        spec,
        sources,
        survey_files,
        result,
    })
}

/// Computes a referenced survey and takes its average.
fn survey_reference(
    path: &Path,
    rel: &str,
    at: &Location,
    quantity: RataQuantity,
    basis: FlowBasis,
) -> Result<(f64, ReferenceSource, Vec<SourceFile>), Error> {
    if !path.is_file() {
        return Err(Error::input(
            Diagnostic::new(format!("the survey `{rel}` cannot be read: no such file"))
                .at(at.clone())
                .hint("survey paths in a RATA file are relative to the RATA file"),
        ));
    }
    let evaluation = crate::pipeline::evaluate(crate::input::load(path)?)?;
    let Some(avg) = &evaluation.average else {
        return Err(Error::input(
            Diagnostic::new(format!(
                "the survey `{rel}` has no valid run to average (see its leak checks)"
            ))
            .at(at.clone())
            .hint("a run counts when its post-run leak check passed; check the survey with `annulus check`"),
        ));
    };
    let value = match (quantity, basis) {
        (RataQuantity::VelocityMS, _) => avg.mean_velocity_m_s,
        (RataQuantity::Flow, FlowBasis::Actual) => avg.actual_flow_m3_s,
        (RataQuantity::Flow, FlowBasis::Standard) => avg.standard_flow_m3_s,
        (RataQuantity::Flow, FlowBasis::DryStandard) => avg.dry_standard_flow_m3_s,
    };
    let loaded = &evaluation.loaded;
    let mut files = vec![loaded.survey_file.clone()];
    files.extend(loaded.runs.iter().map(|(f, _)| f.clone()));
    Ok((
        value,
        ReferenceSource::Survey {
            path: rel.to_string(),
            title: loaded.survey.title.clone(),
            runs: avg.runs.clone(),
        },
        files,
    ))
}

/// A core error the parser did not already catch (it checks the same rules with locations; a
/// survey-derived value can still be out of range).
fn core_diagnostic(e: RataError, file: &str, spec: &RataSpec) -> Diagnostic {
    let at = match &e {
        RataError::BadValue { run_id, .. }
        | RataError::DuplicateRunId { run_id }
        | RataError::MissingRejectionReason { run_id } => spec
            .runs
            .iter()
            .find(|r| &r.id == run_id)
            .map(|r| r.at.clone()),
        _ => None,
    };
    Diagnostic::new(e.to_string()).at(at.unwrap_or_else(|| Location::file(file)))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn runs_text(n: usize) -> String {
        (1..=n)
            .map(|i| {
                format!(
                    "[[run]]\nid = \"{i}\"\nreference = \"{}.0 ft/s\"\nmonitor = \"{}.5 ft/s\"\n\n",
                    50 + i,
                    49 + i
                )
            })
            .collect()
    }

    fn head(quantity: &str) -> String {
        format!(
            "[rata]\ntitle = \"T\"\ndate = \"2026-09-22\"\nquantity = \"{quantity}\"\n\n[monitor]\nid = \"FM-2\"\n\n"
        )
    }

    fn input_err<T: std::fmt::Debug>(r: Result<T, Error>) -> Diagnostics {
        match r {
            Err(Error::Input(d)) => d,
            other => panic!("accepted: {other:?}"),
        }
    }

    #[test]
    fn parses_runs_to_si() {
        let spec = parse_rata("r.toml", &(head("velocity") + &runs_text(9))).expect("valid");
        assert_eq!(spec.runs.len(), 9);
        assert_eq!(spec.quantity, RataQuantity::VelocityMS);
        assert_eq!(spec.display_unit.symbol, "ft/s");
        // 51.0 ft/s × 0.3048 m/ft (exact).
        assert!(
            matches!(spec.runs[0].reference, ReferenceSpec::Value { si, .. } if (si - 51.0 * 0.3048).abs() < 1e-12)
        );
        assert!((spec.runs[0].monitor_si - 50.5 * 0.3048).abs() < 1e-12);
        assert_eq!(spec.runs[0].at.line, Some(10));
    }

    #[test]
    fn wrong_dimension_and_missing_reference_are_located() {
        let text = head("flow") + &runs_text(9).replacen("reference = \"51.0 ft/s\"\n", "", 1);
        let d = input_err(parse_rata("r.toml", &text));
        // run 1 has no reference; every other value is a velocity in a flow RATA.
        assert_eq!(d.len(), 18, "{d}");
        let first = &d.items()[0];
        assert_eq!(first.message, "run `1` has no reference-method value");
        let loc = first.location.as_ref().unwrap();
        assert_eq!((loc.line, loc.column), (Some(10), Some(6)));
        assert_eq!(
            d.items()[1].to_string(),
            "error: `run.monitor`: expected a volume flow, found `50.5 ft/s` (`ft/s` is a unit of velocity)\n --> r.toml:11:11 (`run.monitor`)\n   = hint: a volume flow takes one of: m3/s, m3/h, L/s, cfm, ft3/min, ft3/h, cfh, acfm, scfm, wscfm, dscfm, scfh, wscfh, dscfh, wscm/h, dscm/h, Nm3/h, dNm3/h"
        );
    }

    #[test]
    fn run_count_rules_are_located() {
        let mut text = head("velocity") + &runs_text(12);
        for i in [2, 5, 7, 11] {
            text = text.replace(
                &format!("id = \"{i}\"\n"),
                &format!("id = \"{i}\"\nrejected = \"probe plugged\"\n"),
            );
        }
        let d = input_err(parse_rata("r.toml", &text));
        assert_eq!(d.len(), 2, "{d}");
        assert_eq!(
            d.items()[0].message,
            "at most 3 runs may be rejected, found 4"
        );
        assert!(d.items()[0].location.as_ref().unwrap().line.is_some());
        assert_eq!(
            d.items()[1].message,
            "at least 9 runs must remain after rejections, found 8"
        );
    }

    #[test]
    fn duplicates_empty_reasons_and_zero_values() {
        let text = (head("velocity") + &runs_text(9))
            .replace("id = \"3\"", "id = \"2\"")
            .replace("monitor = \"54.5 ft/s\"", "monitor = \"0 ft/s\"")
            .replace("id = \"6\"\n", "id = \"6\"\nrejected = \" \"\n");
        let d = input_err(parse_rata("r.toml", &text));
        let s = d.to_string();
        assert_eq!(d.len(), 3, "{s}");
        assert!(
            s.contains("each RATA run id must be unique, found `2` twice"),
            "{s}"
        );
        assert!(
            s.contains("`run.monitor` of run `5` must be greater than zero, found `0 ft/s`"),
            "{s}"
        );
        assert!(
            s.contains("run `6` is rejected, so it needs a reason, found none"),
            "{s}"
        );
        // A rejected run may hold a zero monitor value.
        let ok = (head("velocity") + &runs_text(10))
            .replace("monitor = \"54.5 ft/s\"", "monitor = \"0 ft/s\"")
            .replace(
                "id = \"5\"\n",
                "id = \"5\"\nrejected = \"monitor off line\"\n",
            );
        assert!(parse_rata("r.toml", &ok).is_ok());
    }

    #[test]
    fn basis_and_display_unit_are_checked() {
        let text = head("velocity").replace(
            "quantity = \"velocity\"",
            "quantity = \"velocity\"\nbasis = \"standard\"\ndisplay_unit = \"cfm\"",
        ) + &runs_text(9);
        let d = input_err(parse_rata("r.toml", &text));
        assert_eq!(d.len(), 2, "{d}");
        assert!(d.items()[0].message.contains("applies to a flow RATA only"));
        assert!(d.items()[1]
            .message
            .contains("must be a unit of velocity, found `cfm`"));
    }
}
