//! Reads a flow-monitor RATA file (TOML) into validated paired runs, and reads the surveys (with
//! their readings) that runs take their reference-method value from.
//!
//! Owns the RATA file format and its located diagnostics. Loading produces values only: the
//! surveys are computed and the RATA evaluated by [`crate::pipeline::rata`]; the statistics live
//! in [`crate::rata`]. Must not print, render or decide exit codes (the `rata` command does).
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
//! # survey = "day1/survey.toml#2"    # or one run of a survey (`#` and the run's id)
//! monitor = "51.95 ft/s"             # the monitor's value over the same period
//! period = "08:10–08:52"             # optional
//! rejected = "reason"                # optional: reported but left out of the statistics
//! level = "low"                      # optional: operating level of this run (else rata.level)
//! ```
//!
//! Runs at several operating levels (`level` per run) are RATAs of their own: each level is
//! evaluated, counted (≥ 9 used, ≤ 3 rejected) and reported on its own.
//!
//! Values are quantity strings: velocities (`m/s`, `ft/s`, `fpm`) for `quantity = "velocity"`,
//! volume flows (`cfm`, `m3/h`, `m3/s`, `L/s`) for `quantity = "flow"`. For a flow RATA a
//! survey reference gives the survey's flow on `basis` (default `standard`: flow monitors under
//! 40 CFR 75 report wet-basis flow at standard conditions, from memory).

use super::toml_doc::{Field, Table, TomlDoc};
use super::{read_text_with, FileKind, FileSource, Loaded, SourceFile};
use crate::diag::{Diagnostic, Error, Location};
use crate::rata::{RataQuantity, PART_75_FLOW_LIMITS};
use crate::units::{lookup_unit, symbols_for, Dimension, Unit};
use chrono::NaiveDate;
use std::path::Path;

const HINT_FORMAT: &str =
    "see the RATA format in sample-data/rata/README.md (unit2-rata.toml is a complete example)";

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
    /// A survey file, relative to the RATA file; `run` is the id after `#` when the value is one
    /// run of the survey rather than the average of its valid runs.
    Survey {
        path: String,
        run: Option<String>,
        at: Location,
    },
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
    /// Operating level of the run (its own `level`, else the file's).
    pub level: Option<String>,
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

/// A RATA file as read, with every survey its runs reference (and their readings).
#[derive(Debug, Clone)]
pub struct RataInput {
    pub file: SourceFile,
    pub spec: RataSpec,
    /// Per run (same order as `spec.runs`): the survey it references, loaded.
    pub surveys: Vec<Option<Loaded>>,
}

/// The SI dimension of a quantity's values.
pub fn dimension_of(quantity: RataQuantity) -> Dimension {
    match quantity {
        RataQuantity::VelocityMS => Dimension::Velocity,
        RataQuantity::Flow => Dimension::Flow,
    }
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
    let doc = TomlDoc::parse(file, text, "RATA file")?.with_guide(HINT_FORMAT);
    let spec = {
        let root = doc.root();
        read_rata(&root)
    };
    doc.finish(spec)
}

fn read_rata(root: &Table) -> Option<RataSpec> {
    let r = root.table("rata");
    let m = root.table("monitor");
    let quantity = r.as_ref().and_then(|r| {
        r.choice(
            "quantity",
            &[
                ("velocity", RataQuantity::VelocityMS),
                ("flow", RataQuantity::Flow),
            ],
        )
    });
    let dim = quantity.map(dimension_of);
    let meta = r
        .as_ref()
        .zip(m.as_ref())
        .and_then(|(r, m)| read_meta(r, m));
    let basis = r.as_ref().and_then(|r| read_basis(r, quantity));
    let tables = root.tables("run");
    // a run without its own level is at the file's
    let file_level = meta.as_ref().and_then(|m| m.level.clone());
    let runs = read_runs(root, &tables, dim).map(|runs| {
        runs.into_iter()
            .map(|mut run| {
                if run.level.is_none() {
                    run.level = file_level.clone();
                }
                run
            })
            .collect::<Vec<_>>()
    });
    let display_unit = r.as_ref().and_then(|r| read_display_unit(r, dim, &tables));
    let runs = runs.and_then(|runs| check_run_counts(root, runs));
    Some(RataSpec {
        meta: meta?,
        quantity: quantity?,
        display_unit: display_unit?,
        basis: basis?,
        runs: runs?,
    })
}

fn read_meta(r: &Table, m: &Table) -> Option<RataMeta> {
    let title = r
        .required("title", "\"Unit 2 stack flow monitor, annual RATA\"")
        .and_then(|f| f.str().map(str::to_string));
    let date = r.date("date", "2026-09-22");
    let monitor_id = m
        .required("id", "\"FM-2\"")
        .and_then(|f| f.filled("write the monitor's identifier, e.g. id = \"FM-2\""));
    // every key is asked before a missing one ends the reading (a key not asked is reported
    // as unknown)
    let (facility, unit, location) = (
        r.opt_text("facility"),
        r.opt_text("unit"),
        r.opt_text("location"),
    );
    let (level, tested_by) = (r.opt_text("level"), r.opt_text("tested_by"));
    let (organisation, reviewed_by) = (r.opt_text("organisation"), r.opt_text("reviewed_by"));
    let notes = r.opt_strings("notes").unwrap_or_default();
    let (monitor_serial, monitor_description) = (m.opt_text("serial"), m.opt_text("description"));
    Some(RataMeta {
        title: title?,
        facility,
        unit,
        location,
        date: date?,
        level,
        tested_by,
        organisation,
        reviewed_by,
        notes,
        monitor_id: monitor_id?,
        monitor_serial,
        monitor_description,
    })
}

fn read_basis(r: &Table, quantity: Option<RataQuantity>) -> Option<FlowBasis> {
    let Some(f) = r.get("basis") else {
        return Some(FlowBasis::Standard);
    };
    if quantity == Some(RataQuantity::VelocityMS) {
        f.error(
            "`rata.basis` applies to a flow RATA only; this one compares velocities".into(),
            Some("remove `basis`, or set quantity = \"flow\"".into()),
        );
        return None;
    }
    f.choice(&FlowBasis::ALL.map(|b| (b.name(), b)))
}

fn read_display_unit(r: &Table, dim: Option<Dimension>, runs: &[Table]) -> Option<&'static Unit> {
    let dim = dim?;
    match r.get("display_unit") {
        Some(f) => {
            let text = f.str()?;
            match lookup_unit(text) {
                Some(u) if u.dimension == dim => Some(u),
                _ => {
                    f.error(
                        format!(
                            "`rata.display_unit` must be a unit of {}, found `{text}`",
                            dim.name()
                        ),
                        Some(format!("use one of: {}", symbols_for(dim).join(", "))),
                    );
                    None
                }
            }
        }
        None => runs
            .first()
            .and_then(|run| run.get("monitor"))
            .and_then(|f| match f.value {
                crate::input::toml_doc::Value::String(s) => unit_of(s),
                _ => None,
            })
            .filter(|u| u.dimension == dim)
            .or_else(|| lookup_unit(dim.si_symbol())),
    }
}

/// Every `[[run]]`; `None` when one has a problem (recorded).
fn read_runs(root: &Table, tables: &[Table], dim: Option<Dimension>) -> Option<Vec<RunSpec>> {
    if tables.is_empty() {
        root.doc().push(
            Diagnostic::new("the RATA file has no [[run]]")
                .at(Location::file(root.doc().file()))
                .hint("add one [[run]] per paired reference-method run: id, reference or survey, monitor"),
        );
    }
    let mut runs = Vec::new();
    // Ids seen so far, also of runs with other problems (so a duplicate is still found).
    let mut seen: Vec<String> = Vec::new();
    let mut ok = true;
    for t in tables {
        match read_run(t, dim, &mut seen) {
            Some(run) => runs.push(run),
            None => ok = false,
        }
    }
    ok.then_some(runs)
}

fn read_run(t: &Table, dim: Option<Dimension>, seen: &mut Vec<String>) -> Option<RunSpec> {
    let id_field = t.required("id", "\"1\"")?;
    let id = id_field.text().trim().to_string();
    let at = id_field.doc.location(id_field.span.clone(), "run.id");
    if id.is_empty() {
        id_field.error(
            "every RATA run needs an id, found an empty one".into(),
            None,
        );
    } else if seen.contains(&id) {
        id_field.error(
            format!("each RATA run id must be unique, found `{id}` twice"),
            None,
        );
    }
    seen.push(id.clone());
    let (reference_field, survey_field) = (t.get("reference"), t.get("survey"));
    let reference = read_reference(
        &id,
        &id_field,
        reference_field.as_ref(),
        survey_field.as_ref(),
        dim,
    );
    let monitor_field = t.required("monitor", "\"51.95 ft/s\"");
    let monitor = monitor_field.as_ref().and_then(|f| f.quantity(dim?));
    let rejected = match t.get("rejected") {
        Some(f) => match f.str().map(str::trim) {
            Some("") => {
                f.error(
                    format!("run `{id}` is rejected, so it needs a reason, found none"),
                    Some("write why, e.g. rejected = \"monitor in daily calibration during the run\"".into()),
                );
                None
            }
            Some(reason) => Some(Some((
                reason.to_string(),
                f.doc.location(f.span.clone(), "run.rejected"),
            ))),
            None => None,
        },
        None => Some(None),
    };
    // A used run needs positive values; a rejected one may hold zero (monitor off line).
    let used = matches!(rejected, Some(None));
    let positive = |v: Option<f64>, f: Option<&Field>, key: &str| -> Option<f64> {
        let x = v?;
        if (used && x > 0.0) || (!used && x >= 0.0) {
            return Some(x);
        }
        if let Some(f) = f {
            f.error(
                format!(
                    "`{key}` of run `{id}` must be {}, found `{}`",
                    if used {
                        "greater than zero"
                    } else {
                        "zero or greater"
                    },
                    f.text().trim()
                ),
                None,
            );
        }
        None
    };
    let monitor_si = positive(monitor, monitor_field.as_ref(), "run.monitor");
    let reference = match reference {
        Some(ReferenceSpec::Value { si, raw }) => {
            positive(Some(si), reference_field.as_ref(), "run.reference")
                .map(|si| ReferenceSpec::Value { si, raw })
        }
        other => other,
    };
    // asked before a problem above ends the reading (a key not asked is reported as unknown)
    let (period, level) = (t.opt_text("period"), t.opt_text("level"));
    let (rejected, rejected_at) = match rejected? {
        Some((reason, at)) => (Some(reason), Some(at)),
        None => (None, None),
    };
    Some(RunSpec {
        id,
        reference: reference?,
        monitor_si: monitor_si?,
        monitor_raw: monitor_field?.text().trim().to_string(),
        period,
        rejected,
        level,
        at,
        rejected_at,
    })
}

fn read_reference(
    id: &str,
    id_field: &Field,
    reference: Option<&Field>,
    survey: Option<&Field>,
    dim: Option<Dimension>,
) -> Option<ReferenceSpec> {
    match (reference, survey) {
        (Some(v), None) => {
            let si = v.quantity(dim?)?;
            Some(ReferenceSpec::Value {
                si,
                raw: v.text().trim().to_string(),
            })
        }
        (None, Some(p)) => {
            let written = p.str()?.trim().to_string();
            // `path#run`: one run of the survey
            let (path, run) = match written.rsplit_once('#') {
                Some((path, run)) => (path.trim().to_string(), Some(run.trim().to_string())),
                None => (written.clone(), None),
            };
            if path.is_empty() || run.as_deref() == Some("") {
                p.error(
                    format!("`run.survey` = `{written}` names no survey or no run"),
                    Some("write survey = \"run-1/survey.toml\", or \"day1/survey.toml#2\" for run 2 of it".into()),
                );
                return None;
            }
            Some(ReferenceSpec::Survey {
                path,
                run,
                at: p.doc.location(p.span.clone(), "run.survey"),
            })
        }
        (Some(v), Some(_)) => {
            v.error(
                format!("run `{id}` gives both `reference` and `survey`"),
                Some(
                    "keep one: the reference-method value, or the survey it was computed from"
                        .into(),
                ),
            );
            None
        }
        (None, None) => {
            id_field.error(
                format!("run `{id}` has no reference-method value"),
                Some("add reference = \"52.4 ft/s\" or survey = \"run-1/survey.toml\"".into()),
            );
            None
        }
    }
}

/// The run-count rules (≤ 3 rejected, ≥ 9 used), for each operating level, located where they can
/// be; checked only when every run could be read.
fn check_run_counts(root: &Table, runs: Vec<RunSpec>) -> Option<Vec<RunSpec>> {
    let doc = root.doc();
    if doc.has_errors() {
        return Some(runs);
    }
    let limits = PART_75_FLOW_LIMITS;
    let mut ok = true;
    for level in levels(&runs) {
        let of_level: Vec<&RunSpec> = runs.iter().filter(|r| r.level == level).collect();
        let at_level = match &level {
            Some(l) if levels(&runs).len() > 1 => format!(" at level `{l}`"),
            _ => String::new(),
        };
        let rejected: Vec<&&RunSpec> = of_level.iter().filter(|r| r.rejected.is_some()).collect();
        if rejected.len() > limits.max_rejected_runs {
            let extra = rejected[limits.max_rejected_runs];
            let mut d = Diagnostic::new(format!(
                "at most {} runs may be rejected{at_level}, found {}",
                limits.max_rejected_runs,
                rejected.len()
            ))
            .hint("a RATA may reject up to three runs (40 CFR 75 App. A §7, from memory); repeat runs instead");
            if let Some(at) = &extra.rejected_at {
                d = d.at(at.clone());
            }
            doc.push(d);
            ok = false;
        }
        let used = of_level.len() - rejected.len();
        if used < limits.min_used_runs {
            doc.push(
                Diagnostic::new(format!(
                    "at least {} runs must remain after rejections{at_level}, found {used}",
                    limits.min_used_runs
                ))
                .at(Location::file(doc.file()))
                .hint("a flow RATA needs nine or more paired runs that are not rejected at each level (40 CFR 75 App. A §7, from memory)"),
            );
            ok = false;
        }
    }
    ok.then_some(runs)
}

/// The operating levels of the runs, in the order they first appear.
pub fn levels(runs: &[RunSpec]) -> Vec<Option<String>> {
    let mut out: Vec<Option<String>> = Vec::new();
    for r in runs {
        if !out.contains(&r.level) {
            out.push(r.level.clone());
        }
    }
    out
}

/// Reads a RATA file and every survey its runs reference (relative to the file), with their
/// readings; every input problem, also those inside referenced surveys, is reported in one
/// pass. Nothing is computed: [`crate::pipeline::rata::evaluate`] does that.
pub fn load(path: &Path) -> Result<RataInput, Error> {
    load_with(path, &|p| super::fs::read_file(p))
}

/// [`load`] with the bytes of each file supplied by `source`.
pub fn load_with(path: &Path, source: FileSource) -> Result<RataInput, Error> {
    let name = path.display().to_string();
    let (bytes, text) = read_text_with(path, &name, crate::limits::FileKind::Rata, source)?;
    let spec = parse_rata(&name, &text)?;
    super::fs::check_count(&name, "runs", spec.runs.len(), crate::limits::MAX_RATA_RUNS)?;
    let dir = path.parent().unwrap_or(Path::new("."));
    let mut diags = crate::diag::Diagnostics::new();
    let mut surveys = Vec::new();
    for run in &spec.runs {
        let loaded = match &run.reference {
            ReferenceSpec::Value { .. } => None,
            ReferenceSpec::Survey { path: rel, at, .. } => {
                match super::load_referenced(&dir.join(rel), rel, at, FileKind::Survey, source) {
                    Ok(l) => Some(l),
                    Err(Error::Input(d)) => {
                        diags.extend(d);
                        None
                    }
                    Err(e) => return Err(e),
                }
            }
        };
        surveys.push(loaded);
    }
    diags.finish(RataInput {
        file: SourceFile {
            name: path
                .file_name()
                .map(|n| n.to_string_lossy().to_string())
                .unwrap_or(name),
            path: path.to_path_buf(),
            bytes,
        },
        spec,
        surveys,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::diag::Diagnostics;

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
    fn a_missing_field_does_not_make_the_keys_after_it_unknown() {
        // an empty monitor id, a title missing: the keys read after them are still known
        let text = (head("velocity") + &runs_text(9))
            .replace("title = \"T\"\n", "facility = \"Unit 2\"\n")
            .replace("id = \"FM-2\"\n", "id = \" \"\nserial = \"S-1\"\n");
        let d = input_err(parse_rata("r.toml", &text));
        let s = d.to_string();
        assert_eq!(d.len(), 2, "{s}");
        assert!(
            s.contains("has no `title`") && s.contains("`monitor.id` is empty"),
            "{s}"
        );
        assert!(!s.contains("unknown key"), "{s}");
        // a run with no reference keeps its period and level known
        let text = head("velocity")
            + &runs_text(9).replacen(
                "reference = \"51.0 ft/s\"\n",
                "period = \"09:00-09:21\"\nlevel = \"100 %\"\n",
                1,
            );
        let s = input_err(parse_rata("r.toml", &text)).to_string();
        assert!(
            s.contains("has no reference") && !s.contains("unknown key"),
            "{s}"
        );
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
