//! Pairing surveys with the reports made from them.
//!
//! A report embeds its survey byte-exact and the manifest records the survey's SHA-256 (its
//! fingerprint). A survey in the same review whose bytes have that fingerprint is the survey the
//! report was made from: its readings and calibration record must then be the ones the report
//! embeds too, and any that differ is a finding. A survey with another fingerprint but the same
//! title, site and test date as a report is a survey that changed after the report was made (or a
//! report made from another version of it): also a finding.

use super::Note;
use crate::archive::sha256_hex;
use crate::archive::verify::Verification;
use crate::input::Loaded;
use std::collections::HashMap;

/// What a report says about the survey it was made from.
#[derive(Debug, Clone)]
struct Entry {
    file: String,
    report_id: String,
    /// (role, path as the manifest records it, SHA-256) of each embedded input.
    inputs: Vec<(String, String, String)>,
}

/// The reports of a review, by their survey's fingerprint and by title, site and date.
#[derive(Debug, Clone, Default)]
pub struct ReportIndex {
    entries: Vec<Entry>,
    by_survey: HashMap<String, Vec<usize>>,
    by_identity: HashMap<(String, Option<String>, String), Vec<usize>>,
}

impl ReportIndex {
    pub fn new() -> Self {
        Self::default()
    }

    pub fn is_empty(&self) -> bool {
        self.entries.is_empty()
    }

    pub fn len(&self) -> usize {
        self.entries.len()
    }

    /// Adds a verified flow test report.
    pub fn add(&mut self, file: &str, v: &Verification) {
        let Some(report_id) = v.report_id.clone() else {
            return;
        };
        let Some((_, _, survey_sha)) = v.inputs.iter().find(|(r, _, _)| r == "survey") else {
            return;
        };
        let i = self.entries.len();
        self.by_survey
            .entry(survey_sha.clone())
            .or_default()
            .push(i);
        if let Some(id) = &v.identity {
            self.by_identity
                .entry((id.title.clone(), id.site.clone(), id.date.clone()))
                .or_default()
                .push(i);
        }
        self.entries.push(Entry {
            file: file.to_string(),
            report_id,
            inputs: v.inputs.clone(),
        });
    }

    /// What the reports in the index say about this survey: `Matched` for each report made from
    /// exactly these files, `Mismatch` for each that disagrees.
    pub fn match_survey(&self, loaded: &Loaded) -> Vec<Note> {
        let sha = sha256_hex(&loaded.survey_file.bytes);
        let mut notes = Vec::new();
        if let Some(found) = self.by_survey.get(&sha) {
            // the survey's own inputs: (role, path as written, SHA-256)
            let mut mine: Vec<(&str, String, String)> = loaded
                .runs
                .iter()
                .map(|(f, _)| ("readings", f.name.clone(), sha256_hex(&f.bytes)))
                .collect();
            if let (Some((cal, cal_readings)), Some(pc)) =
                (&loaded.calibration, &loaded.survey.probe.calibration)
            {
                mine.push(("calibration", pc.file.clone(), sha256_hex(&cal.bytes)));
                mine.push((
                    "calibration-readings",
                    String::new(),
                    sha256_hex(&cal_readings.bytes),
                ));
            }
            for &i in found {
                let e = &self.entries[i];
                let mut problems = Vec::new();
                for (role, path, hash) in &mine {
                    let theirs = e.inputs.iter().find(|(r, p, _)| {
                        r == role && (path.is_empty() || p == path || p.ends_with(path.as_str()))
                    });
                    match theirs {
                        None => problems.push(format!("the report embeds no {role} file `{path}`")),
                        Some((_, p, h)) if h != hash => problems.push(format!(
                            "the {role} file `{p}` here differs from the one the report embeds"
                        )),
                        _ => {}
                    }
                }
                let theirs_readings = e.inputs.iter().filter(|(r, _, _)| r == "readings").count();
                let my_readings = mine.iter().filter(|(r, _, _)| *r == "readings").count();
                if theirs_readings > my_readings {
                    problems.push(format!(
                        "the report embeds {theirs_readings} readings files, the survey here names {my_readings}"
                    ));
                }
                if problems.is_empty() {
                    notes.push(Note::Matched {
                        report: e.file.clone(),
                        report_id: e.report_id.clone(),
                    });
                } else {
                    notes.push(Note::Mismatch {
                        report: format!("{} ({})", e.report_id, e.file),
                        message: format!("made from this survey file, but {}", problems.join("; ")),
                    });
                }
            }
            return notes;
        }
        let s = &loaded.survey;
        let key = (s.title.clone(), s.site.clone(), s.date.to_string());
        for &i in self.by_identity.get(&key).into_iter().flatten() {
            let e = &self.entries[i];
            notes.push(Note::Mismatch {
                report: format!("{} ({})", e.report_id, e.file),
                message: "the report is of a survey with this title, site and test date, but embeds a different survey file: this survey changed after the report was made, or the report was made from another version of it".into(),
            });
        }
        notes
    }
}
