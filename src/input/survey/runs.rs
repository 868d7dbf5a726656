//! `[[run]]`: each run's id, readings file, form, start and end, leak checks, a crew's void, the
//! Method 2H wall-effects readings file, and the conditions it gives in place of `[gas]` (read by
//! [`super::gas::read_run_conditions`]).

use crate::diag::{Diagnostic, Location};
use crate::input::toml_doc::Table;
use crate::survey::{LeakCheck, LeakResult, ReadingsForm, RunSpec};

/// A run as read, with where the survey names its readings file.
#[derive(Debug, Clone)]
pub struct RunEntry {
    pub spec: RunSpec,
    /// Where the `readings = "…"` value is (its byte span in the survey), where a readings file
    /// that cannot be read is reported; worded as a location only then
    /// ([`crate::input::toml_doc::TomlDoc::location`]).
    pub readings_at: Option<Named>,
    /// The same for the `wall_readings = "…"` value, when the run has one.
    pub wall_readings_at: Option<Named>,
}

/// A value's span in the survey and its dotted key (`run.readings`).
#[derive(Debug, Clone)]
pub struct Named {
    pub span: std::ops::Range<usize>,
    pub key: String,
}

/// Reads every `[[run]]`; a survey without one is a recorded problem. Runs with a problem of
/// their own are left out (the problem is recorded).
pub fn read_runs(root: &Table) -> Vec<RunEntry> {
    let tables = root.tables("run");
    if tables.is_empty() && root.get("run").is_none() {
        root.doc().push(
            Diagnostic::new("the survey has no [[run]]")
                .at(Location::file(root.doc().file()))
                .hint("add [[run]] id = \"1\" readings = \"run1.csv\""),
        );
    }
    let mut runs: Vec<RunEntry> = Vec::new();
    for t in &tables {
        let Some(spec) = read_run(t) else { continue };
        if runs.iter().any(|r| r.spec.id == spec.id) {
            t.error_at("id", format!("run id `{}` is used twice", spec.id), None);
            continue;
        }
        let named = |f: crate::input::toml_doc::Field| Named {
            span: f.span.clone(),
            key: f.path(),
        };
        let readings_at = t.get("readings").map(named);
        let wall_readings_at = t.get("wall_readings").map(named);
        runs.push(RunEntry {
            spec,
            readings_at,
            wall_readings_at,
        });
    }
    runs
}

/// Reads one `[[run]]`.
pub fn read_run(t: &Table) -> Option<RunSpec> {
    let id = t.required("id", "\"1\"").map(|f| f.text());
    let readings = t.text("readings", "\"run1.csv\"");
    let form = match t.get("matrix") {
        None => Some(ReadingsForm::Rows),
        Some(f) => f.str().map(|h| ReadingsForm::Matrix {
            header: h.to_string(),
        }),
    };
    let started = t.get("started").map(|f| f.text());
    let ended = t.get("ended").map(|f| f.text());
    let void = t.get("void").and_then(|f| {
        let reason = f.str()?.trim().to_string();
        if reason.is_empty() {
            f.error(
                "a run voided without a reason".into(),
                Some("write the reason, e.g. void = \"probe struck the wall at B4\"; it is printed in the report".into()),
            );
            None
        } else {
            Some(reason)
        }
    });
    let void_bad = t.peek("void").is_some() && void.is_none();
    let wall_readings = t.opt_text("wall_readings");
    let conditions = super::gas::read_run_conditions(t);
    // a leak check that cannot be read is recorded; the run is still returned so that its
    // readings file is checked in the same pass (the recorded problem stops the survey)
    let leak_check = match t.opt_table("leak_check") {
        None => LeakCheck::default(),
        Some(l) => {
            let leak = |k: &'static str| l.get(k).and_then(|f| f.choice(&LeakResult::choices()));
            LeakCheck {
                before: leak("before"),
                after: leak("after"),
            }
        }
    };
    if void_bad {
        return None;
    }
    Some(RunSpec {
        id: id?,
        readings: readings?,
        form: form?,
        started,
        ended,
        leak_check,
        void,
        conditions: conditions?,
        wall_readings,
    })
}
