//! Test support: report models made through the real pipeline from the sample surveys in
//! `sample-data/` (read, evaluate, assess, build), never from a second copy of the arithmetic.

use std::path::{Path, PathBuf};

use super::build::{field_sheet_data, report_data, Identity, SheetPlane};
use super::model::{FieldSheetData, ReportData};
use crate::assess::Assessment;
use crate::display::UnitSystem;
use crate::layout::probe_marks;
use crate::pipeline::{evaluate_and_assess, Evaluation};

/// `sample-data/<name>` in the source tree.
pub(crate) fn sample_dir(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-data")
        .join(name)
}

/// The sample survey `sample-data/<name>/survey.toml`, evaluated and assessed.
pub(crate) fn evaluated(name: &str) -> (Evaluation, Assessment) {
    evaluated_text(name, "")
}

/// The sample survey with `extra` TOML appended to its survey file (e.g. a `[checks]` setting),
/// its readings read from the sample folder.
pub(crate) fn evaluated_text(name: &str, extra: &str) -> (Evaluation, Assessment) {
    let path = sample_dir(name).join("survey.toml");
    let mut text = std::fs::read_to_string(&path).expect("sample survey readable");
    text.push_str(extra);
    let source = |p: &Path| {
        if p == path {
            Ok(text.clone().into_bytes())
        } else {
            std::fs::read(p)
        }
    };
    let loaded = crate::input::load_with(&path, &source)
        .unwrap_or_else(|e| panic!("sample `{name}` loads: {e:?}"));
    evaluate_and_assess(loaded).unwrap_or_else(|e| panic!("sample `{name}` evaluates: {e:?}"))
}

/// The stack sample with its three runs read twice more (runs 4–6 repeat runs 1–3): a survey
/// with more runs than fit one table.
pub(crate) fn six_runs() -> (Evaluation, Assessment) {
    let extra: String = (4..=6)
        .map(|i| {
            format!(
                "\n[[run]]\nid = \"{i}\"\nreadings = \"run{}.csv\"\n\
                 leak_check = {{ before = \"pass\", after = \"pass\" }}\n",
                i - 3
            )
        })
        .collect();
    evaluated_text("stack", &extra)
}

/// A fixed identity: the report's id and fingerprint come from the archive bundle, which these
/// tests do not make.
pub(crate) fn identity() -> Identity {
    Identity {
        report_id: "AN-TEST00000000".into(),
        content_sha256: "0123456789abcdef".repeat(4),
        signer_key_fingerprint: None,
        signer_name: None,
        defaults: Default::default(),
    }
}

/// The report model of a sample survey.
pub(crate) fn report(name: &str) -> ReportData {
    let (e, a) = evaluated(name);
    report_data(&e, &a, &identity())
}

/// The blank field sheet of a sample survey's plane, in the convention's units.
pub(crate) fn field_sheet(name: &str) -> FieldSheetData {
    let (e, _) = evaluated(name);
    let s = &e.loaded.survey;
    let system = UnitSystem::of(s.convention, s.options.epa_metric);
    let marks = probe_marks(
        &e.plane.layout,
        s.port_length_m,
        super::build::mark_step(system),
    );
    field_sheet_data(&SheetPlane {
        layout: &e.plane.layout,
        marks: &marks,
        convention: s.convention,
        system,
        port_length_m: s.port_length_m,
        required_points: e.plane.required_points,
        title: Some(s.title.clone()),
        site: s.site.clone(),
        plane_location: s.plane.clone(),
    })
}
