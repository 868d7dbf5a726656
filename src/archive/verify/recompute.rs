//! Re-deriving a report's results from its embedded inputs and comparing them, value by value,
//! with the embedded `results.json`.
//!
//! Why: the hashes show whether an embedded file changed after the report was made; the
//! recomputation shows whether the results follow from the inputs at all (a report can be
//! internally inconsistent even when nothing changed since it was made, or when the manifest was
//! re-hashed to hide an edit).

use crate::archive::manifest::Manifest;
use crate::assess::Assessment;
use crate::diag::Error;
use crate::input::load_with;
use crate::pipeline::{evaluate_and_assess, Evaluation};
use crate::results::ResultsDoc;
use serde::Serialize;
use serde_json::Value;
use std::collections::HashMap;
use std::fmt;
use std::path::Path;

/// Relative tolerance when comparing a recomputed number with the embedded one. The embedded
/// results are this program's own output written as JSON (shortest round-trip decimal), so an
/// honest report matches to the last bit or within a parser's rounding; 1e-9 leaves room for that
/// and for summation order, and is far below any figure a report prints.
pub const REL_TOL: f64 = 1e-9;

/// Top-level keys of the results document that are not derived from the inputs and are left out
/// of the comparison: `program` names the version that made the report (shown separately as
/// `made_by`; a different version recomputing is not a discrepancy in itself).
const NOT_DERIVED: [&str; 1] = ["program"];

/// Keys whose values are descriptive text, not results: another version of annulus may word them
/// differently without any number, status or verdict changing.
const PROSE: [&str; 5] = ["message", "source", "limit", "basis", "convention_notes"];

/// Where the embedded files are placed for the recomputation (only a name: nothing is on disk).
const VIRTUAL_DIR: &str = "embedded";

/// The correct results re-derived from the embedded inputs (not serialised).
#[derive(Debug, Clone)]
pub struct Recomputed {
    pub evaluation: Evaluation,
    pub assessment: Assessment,
}

/// One number (or other value) of the embedded results that the recomputation does not reproduce.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Difference {
    /// Where in the results document, e.g. `runs[1].dry_standard_flow_m3_s`.
    pub path: String,
    /// The embedded value as JSON text; `None` when the embedded results lack it.
    pub embedded: Option<String>,
    /// The recomputed value as JSON text; `None` when the recomputation has no such value.
    pub recomputed: Option<String>,
}

impl fmt::Display for Difference {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let v = |x: &Option<String>| x.clone().unwrap_or_else(|| "(absent)".to_string());
        write!(
            f,
            "{}: embedded {}, recomputed {}",
            self.path,
            v(&self.embedded),
            v(&self.recomputed)
        )
    }
}

/// The outcome of re-deriving the results from the embedded inputs.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "state", rename_all = "kebab-case")]
pub enum Recomputation {
    /// Every compared value agrees. A report made by another annulus version may word its
    /// descriptive texts (a check's source, limit or message, the convention's notes) differently:
    /// those are listed in `reworded` and do not count against it.
    Matches {
        compared: usize,
        #[serde(default, skip_serializing_if = "Vec::is_empty")]
        reworded: Vec<Difference>,
    },
    /// Some values differ.
    Differs {
        compared: usize,
        differences: Vec<Difference>,
    },
    /// The results could not be re-derived (a file is missing, or the inputs do not load).
    Impossible { reason: String },
    /// Not re-derived, by design, and why (not a failure).
    NotDone { reason: String },
}

impl Recomputation {
    pub fn holds(&self) -> bool {
        matches!(
            self,
            Recomputation::Matches { .. } | Recomputation::NotDone { .. }
        )
    }
}

/// The embedded `results.json` of a certificate, RATA summary or submittal, parsed; why not, in
/// words, when it is missing or is not JSON.
pub(crate) fn embedded_results(
    manifest: &Manifest,
    by_name: &HashMap<&str, &[u8]>,
) -> Result<Value, String> {
    let results = manifest
        .files
        .iter()
        .find(|e| e.role == "results")
        .and_then(|e| by_name.get(e.name.as_str()))
        .ok_or_else(|| "the embedded results are missing".to_string())?;
    serde_json::from_slice(results).map_err(|e| format!("the embedded results are not JSON: {e}"))
}

pub(crate) fn first_problem(e: &Error) -> String {
    match e {
        Error::Input(d) => {
            let first = d
                .items()
                .first()
                .map(|x| {
                    let at = x
                        .location
                        .as_ref()
                        .map(|l| format!(" ({l})"))
                        .unwrap_or_default();
                    format!("{}{at}", x.message)
                })
                .unwrap_or_else(|| "input rejected".to_string());
            if d.len() > 1 {
                format!("{first}; {} more problems", d.len() - 1)
            } else {
                first
            }
        }
        Error::Environment(m) => m.clone(),
    }
}

/// Loads the embedded survey, readings and calibration record (from their manifest paths, in a
/// virtual folder), evaluates and assesses them as `annulus report` did, and compares the results
/// number by number with the embedded `results.json`.
pub fn recompute(
    manifest: &Manifest,
    by_name: &HashMap<&str, &[u8]>,
) -> (Recomputation, Option<Box<Recomputed>>) {
    let impossible = |reason: String| (Recomputation::Impossible { reason }, None);
    let surveys: Vec<_> = manifest
        .files
        .iter()
        .filter(|e| e.role == "survey")
        .collect();
    let survey = match surveys.as_slice() {
        [one] => *one,
        [] => return impossible("the manifest lists no survey file".to_string()),
        _ => return impossible("the manifest lists more than one survey file".to_string()),
    };
    let Some(results_entry) = manifest.files.iter().find(|e| e.role == "results") else {
        return impossible("the manifest lists no results file".to_string());
    };
    let Some(survey_bytes) = by_name.get(survey.name.as_str()) else {
        return impossible(format!("the survey file `{}` is not embedded", survey.name));
    };
    let Some(results_bytes) = by_name.get(results_entry.name.as_str()) else {
        return impossible(format!(
            "the results file `{}` is not embedded",
            results_entry.name
        ));
    };
    let embedded_results: Value = match serde_json::from_slice(results_bytes) {
        Ok(v) => v,
        Err(e) => {
            return impossible(format!(
                "the embedded `{}` is not JSON: {e}",
                results_entry.name
            ))
        }
    };

    // The survey at a virtual path; every other input (readings, a calibration record and its
    // readings) where its manifest path, relative to the survey's folder, points.
    let survey_path = Path::new(VIRTUAL_DIR).join(&survey.path);
    let dir = survey_path
        .parent()
        .map(Path::to_path_buf)
        .unwrap_or_default();
    let mut files = crate::input::MemoryFiles::new();
    files.insert(survey_path.clone(), survey_bytes.to_vec());
    for e in manifest
        .files
        .iter()
        .filter(|e| !matches!(e.role.as_str(), "survey" | "results" | "template"))
    {
        if let Some(b) = by_name.get(e.name.as_str()) {
            files.insert(dir.join(&e.path), b.to_vec());
        }
    }
    let source = |p: &Path| files.read(p);
    let loaded = match load_with(&survey_path, &source) {
        Ok(l) => l,
        Err(e) => {
            return impossible(format!(
                "the embedded survey and readings do not load: {}",
                first_problem(&e)
            ))
        }
    };
    let (evaluation, assessment) = match evaluate_and_assess(loaded) {
        Ok(x) => x,
        Err(e) => {
            return impossible(format!(
                "the embedded survey and readings cannot be evaluated: {}",
                first_problem(&e)
            ))
        }
    };
    let doc = ResultsDoc::new(&evaluation, &assessment);
    let recomputed_results = match serde_json::to_value(&doc) {
        Ok(v) => v,
        Err(e) => return impossible(format!("the recomputed results cannot be written: {e}")),
    };
    let mut cmp = Comparison {
        lenient_prose: manifest.program != super::super::make::program(),
        ..Comparison::default()
    };
    if let (Value::Object(a), Value::Object(b)) = (&embedded_results, &recomputed_results) {
        let mut a = a.clone();
        let mut b = b.clone();
        for k in NOT_DERIVED {
            a.remove(k);
            b.remove(k);
        }
        cmp.walk("", &Value::Object(a), &Value::Object(b));
    } else {
        cmp.walk("", &embedded_results, &recomputed_results);
    }
    // The manifest's own statements about the survey must agree with it too.
    let s = &evaluation.loaded.survey;
    cmp.leaf(
        "manifest.convention",
        &Value::String(manifest.convention.clone()),
        &Value::String(s.convention.name().to_string()),
    );
    cmp.leaf(
        "manifest.survey_date",
        &Value::String(manifest.survey_date.clone()),
        &Value::String(s.date.to_string()),
    );
    let result = if cmp.differences.is_empty() {
        Recomputation::Matches {
            compared: cmp.compared,
            reworded: cmp.reworded,
        }
    } else {
        Recomputation::Differs {
            compared: cmp.compared,
            differences: cmp.differences,
        }
    };
    (
        result,
        Some(Box::new(Recomputed {
            evaluation,
            assessment,
        })),
    )
}

/// Compares embedded results with recomputed ones, every leaf; with `lenient_prose` (a document
/// made by another version) descriptive texts that differ are listed as reworded, not as differences.
pub fn compare_values(embedded: &Value, recomputed: &Value, lenient_prose: bool) -> Recomputation {
    let mut cmp = Comparison {
        lenient_prose,
        ..Comparison::default()
    };
    cmp.walk("", embedded, recomputed);
    if cmp.differences.is_empty() {
        Recomputation::Matches {
            compared: cmp.compared,
            reworded: cmp.reworded,
        }
    } else {
        Recomputation::Differs {
            compared: cmp.compared,
            differences: cmp.differences,
        }
    }
}

/// Walks two JSON values side by side, recording every leaf that differs.
#[derive(Debug, Default)]
struct Comparison {
    compared: usize,
    differences: Vec<Difference>,
    /// Set for a document made by another version: descriptive texts that differ go to
    /// `reworded` instead of `differences`.
    lenient_prose: bool,
    reworded: Vec<Difference>,
}

/// Two numbers agree within [`REL_TOL`] of the larger magnitude (exactly, when both are zero).
pub fn numbers_agree(a: f64, b: f64) -> bool {
    a == b || (a - b).abs() <= REL_TOL * a.abs().max(b.abs())
}

/// JSON text of a value, shortened for subtrees.
fn text(v: &Value) -> String {
    match v {
        Value::Object(m) => format!("{{{} keys}}", m.len()),
        Value::Array(a) => format!("[{} items]", a.len()),
        other => other.to_string(),
    }
}

/// Whether the leaf at `path` (`checks[5].source`, `convention_notes[2]`) is descriptive text.
fn is_prose(path: &str) -> bool {
    let last = path.rsplit('.').next().unwrap_or(path);
    let key = last.split('[').next().unwrap_or(last);
    PROSE.contains(&key)
}

fn join(path: &str, key: &str) -> String {
    if path.is_empty() {
        key.to_string()
    } else {
        format!("{path}.{key}")
    }
}

impl Comparison {
    fn differ(&mut self, path: &str, a: Option<&Value>, b: Option<&Value>) {
        self.differences.push(Difference {
            path: path.to_string(),
            embedded: a.map(text),
            recomputed: b.map(text),
        });
    }

    fn leaf(&mut self, path: &str, a: &Value, b: &Value) {
        self.compared += 1;
        let same = match (a, b) {
            (Value::Number(x), Value::Number(y)) => match (x.as_f64(), y.as_f64()) {
                (Some(x), Some(y)) => numbers_agree(x, y),
                _ => x == y,
            },
            _ => a == b,
        };
        if same {
            return;
        }
        if self.lenient_prose && a.is_string() && b.is_string() && is_prose(path) {
            self.reworded.push(Difference {
                path: path.to_string(),
                embedded: Some(text(a)),
                recomputed: Some(text(b)),
            });
        } else {
            self.differ(path, Some(a), Some(b));
        }
    }

    fn walk(&mut self, path: &str, a: &Value, b: &Value) {
        match (a, b) {
            (Value::Object(x), Value::Object(y)) => {
                for (k, va) in x {
                    let p = join(path, k);
                    match y.get(k) {
                        Some(vb) => self.walk(&p, va, vb),
                        None => self.differ(&p, Some(va), None),
                    }
                }
                for (k, vb) in y {
                    if !x.contains_key(k) {
                        self.differ(&join(path, k), None, Some(vb));
                    }
                }
            }
            (Value::Array(x), Value::Array(y)) => {
                for i in 0..x.len().max(y.len()) {
                    let p = format!("{path}[{i}]");
                    match (x.get(i), y.get(i)) {
                        (Some(va), Some(vb)) => self.walk(&p, va, vb),
                        (va, vb) => self.differ(&p, va, vb),
                    }
                }
            }
            _ => self.leaf(path, a, b),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    fn compare(a: Value, b: Value) -> Comparison {
        let mut c = Comparison::default();
        c.walk("", &a, &b);
        c
    }

    #[test]
    fn another_versions_wording_is_listed_but_its_numbers_and_statuses_still_count() {
        let a = json!({"checks": [{"source": "old words", "status": "pass", "measured": 1.0}],
                       "convention_notes": ["old note"]});
        let b = json!({"checks": [{"source": "new words", "status": "fail", "measured": 1.0}],
                       "convention_notes": ["new note"]});
        // the same version: every difference counts, words included
        let same = compare(a.clone(), b.clone());
        assert_eq!(same.differences.len(), 3);
        assert!(same.reworded.is_empty());
        // another version: the two texts are reworded; the status still differs
        let mut other = Comparison {
            lenient_prose: true,
            ..Comparison::default()
        };
        other.walk("", &a, &b);
        let paths = |d: &[Difference]| d.iter().map(|x| x.path.clone()).collect::<Vec<_>>();
        assert_eq!(paths(&other.differences), ["checks[0].status"]);
        assert_eq!(
            paths(&other.reworded),
            ["checks[0].source", "convention_notes[0]"]
        );
        assert!(is_prose("runs[2].budget[3].basis") && !is_prose("runs[0].id"));
    }

    #[test]
    fn comparison_names_each_differing_path() {
        let c = compare(
            json!({"runs": [{"q": 12.31, "id": "1"}, {"q": 1.0}], "area_m2": 2.0, "x": true}),
            json!({"runs": [{"q": 12.25, "id": "1"}, {"q": 1.0}], "area_m2": 2.0, "y": 1}),
        );
        let shown: Vec<String> = c.differences.iter().map(|d| d.to_string()).collect();
        assert_eq!(
            shown,
            [
                "runs[0].q: embedded 12.31, recomputed 12.25",
                "x: embedded true, recomputed (absent)",
                "y: embedded (absent), recomputed 1",
            ]
        );
        assert_eq!(c.compared, 4);
    }

    #[test]
    fn numbers_within_the_tolerance_agree_and_strings_are_exact() {
        // policy: REL_TOL relative, exact zero
        assert!(numbers_agree(1.0, 1.0 + 0.5e-9));
        assert!(!numbers_agree(1.0, 1.0 + 2e-9));
        assert!(numbers_agree(0.0, 0.0));
        assert!(!numbers_agree(0.0, 1e-300));
        let c = compare(json!({"s": "pass"}), json!({"s": "Pass"}));
        assert_eq!(c.differences.len(), 1);
        let c = compare(json!([1, 2, 3]), json!([1, 2]));
        assert_eq!(
            c.differences[0].to_string(),
            "[2]: embedded 3, recomputed (absent)"
        );
        let c = compare(json!({"a": {"b": 1}}), json!({"a": [1]}));
        assert_eq!(
            c.differences[0].to_string(),
            "a: embedded {1 keys}, recomputed [1 items]"
        );
    }

    const SURVEY: &str = r#"
[survey]
title = "Verify unit test stack"
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
[[run]]
id = "1"
readings = "data/run1.csv"
leak_check = { before = "pass", after = "pass" }
"#;

    const READINGS: &str = include_str!("../../../tests/data/epa-english/run1.csv");

    /// The attachments `annulus report` would embed (name → bytes) and the manifest.
    fn packed() -> (HashMap<String, Vec<u8>>, Manifest) {
        let mut files = crate::input::MemoryFiles::new();
        files.insert("site/s.toml", SURVEY);
        files.insert("site/data/run1.csv", READINGS);
        let src = |p: &Path| files.read(p);
        let (e, a) =
            evaluate_and_assess(load_with(Path::new("site/s.toml"), &src).unwrap()).unwrap();
        let json = serde_json::to_vec_pretty(&ResultsDoc::new(&e, &a)).unwrap();
        let b = crate::archive::bundle::pack(&e.loaded, json, "annulus test");
        let map = b
            .files
            .iter()
            .map(|(n, _, _, bytes)| (n.clone(), bytes.clone()))
            .collect();
        (map, b.manifest)
    }

    fn view(m: &HashMap<String, Vec<u8>>) -> HashMap<&str, &[u8]> {
        m.iter().map(|(k, v)| (k.as_str(), v.as_slice())).collect()
    }

    #[test]
    fn embedded_inputs_reproduce_their_results_and_an_edit_is_located() {
        let (mut files, manifest) = packed();
        let (r, recomputed) = recompute(&manifest, &view(&files));
        assert!(
            matches!(r, Recomputation::Matches { compared, .. } if compared > 100),
            "{r:?}"
        );
        assert!(recomputed.is_some());
        // one reading edited: A,3 is the third point of line A
        let edited = READINGS.replace("A,3,0.60,", "A,3,0.70,");
        files.insert("run1.csv".into(), edited.into_bytes());
        let checks = super::super::files::check_files(&manifest, &[], &view(&files), Vec::new());
        for c in &checks {
            let changed = matches!(c.state, super::super::files::FileState::Changed { .. });
            assert_eq!(changed, c.name == "run1.csv", "{c:?}");
        }
        let (r, _) = recompute(&manifest, &view(&files));
        let Recomputation::Differs { differences, .. } = r else {
            panic!("{r:?}")
        };
        let paths: Vec<&str> = differences.iter().map(|d| d.path.as_str()).collect();
        assert!(paths.contains(&"runs[0].points[2].dp_pa"), "{paths:?}");
        assert!(
            paths.contains(&"runs[0].dry_standard_flow_m3_s"),
            "{paths:?}"
        );
        assert!(!paths.contains(&"runs[0].points[1].dp_pa"), "{paths:?}");
        // a missing readings file makes the recomputation impossible, with the reason
        files.remove("run1.csv");
        let (r, _) = recompute(&manifest, &view(&files));
        assert!(
            matches!(&r, Recomputation::Impossible { reason } if reason.contains("do not load")),
            "{r:?}"
        );
    }
}
