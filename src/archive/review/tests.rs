//! Unit tests of the review: statuses, findings and skipping, on surveys held in memory.

use super::*;
use std::collections::HashMap;
use std::path::PathBuf;
use std::sync::Arc;

const SURVEY: &str = r#"
[survey]
title = "Review unit test stack"
date = "2026-10-14"
convention = "epa-method-2"
runs_required = 1
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

const READINGS: &str = include_str!("../../../tests/data/epa-english/run1.csv");

fn archive(files: &[(&str, &str)]) -> HashMap<PathBuf, Vec<u8>> {
    files
        .iter()
        .map(|(p, t)| (PathBuf::from(p), t.as_bytes().to_vec()))
        .collect()
}

fn run(files: &[(&str, &str)]) -> Review {
    let map = Arc::new(archive(files));
    let mut paths: Vec<PathBuf> = map.keys().filter(|p| is_candidate(p)).cloned().collect();
    paths.push(PathBuf::from("gone/survey.toml"));
    let source: SharedSource = Arc::new(move |p: &Path| {
        map.get(p)
            .cloned()
            .ok_or_else(|| std::io::Error::from(std::io::ErrorKind::NotFound))
    });
    review_all(paths, source, Arc::new(ReviewSettings::default()))
}

fn file<'a>(r: &'a Review, path: &str) -> &'a Reviewed {
    r.files.iter().find(|f| f.file == path).expect("reviewed")
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
        ("f/survey.toml", ""),
        ("g/survey.toml", "[survey\ntitle = \"x\""),
        ("h/rata.toml", "[rata]\nmonitor = \"FM-1\"\n"),
    ]);
    let paths: Vec<&str> = r.files.iter().map(|f| f.file.as_str()).collect();
    assert_eq!(
        paths,
        [
            "a/survey.toml",
            "b/survey.toml",
            "d/broken.toml",
            "e/notes.pdf",
            "f/survey.toml",
            "g/survey.toml",
            "gone/survey.toml"
        ]
    );
    assert_eq!(r.files[0].kind, Kind::Survey);
    assert!(
        r.files[0].status < ReviewStatus::Suspect,
        "{:?}",
        r.files[0]
    );
    assert_eq!(r.files[0].key_figure_unit.as_deref(), Some("dscfm"));
    assert_eq!(r.files[0].title.as_deref(), Some("Review unit test stack"));
    assert_eq!(r.files[0].date.as_deref(), Some("2026-10-14"));
    assert!(r.files[0].key_figure.unwrap() > 1000.0);
    assert_eq!(r.files[1].status, ReviewStatus::Error);
    assert!(
        matches!(&r.files[1].findings[0], Note::BadInput { message, .. } if message.contains("b/survey.toml")),
        "{:?}",
        r.files[1].findings
    );
    assert_eq!(r.files[2].kind, Kind::File);
    assert!(r.files[2].findings[0].short().contains("not valid TOML"));
    assert!(
        matches!(r.files[3].findings[0], Note::Damaged { .. }),
        "{:?}",
        r.files[3]
    );
    assert_eq!(r.files[3].status, ReviewStatus::Error);
    // an emptied survey.toml and a damaged one are errors, never skipped
    for i in [4, 5] {
        assert_eq!(r.files[i].status, ReviewStatus::Error, "{:?}", r.files[i]);
        assert_eq!(r.files[i].kind, Kind::Survey);
    }
    assert!(r.files[4].findings[0].short().contains("no [survey] table"));
    assert!(matches!(r.files[6].findings[0], Note::Unreadable { .. }));
    let skipped: Vec<&str> = r.skipped.iter().map(|s| s.file.as_str()).collect();
    assert_eq!(skipped, ["c/probe-cal.toml", "h/rata.toml"]);
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
    // reported ≠ recomputed is a data-integrity finding
    assert_eq!(f.status, ReviewStatus::Suspect, "{:?}", f.findings);
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
    assert!(f.status < ReviewStatus::Suspect, "{:?}", f.findings);
    assert!(f.mistakes().is_empty());
    assert!(!f.findings.iter().any(|n| matches!(n, Note::Discrepancy(_))));
}

#[test]
fn toml_files_are_told_apart() {
    assert_eq!(toml_kind("# x\n[survey]\ntitle = 1"), Ok(TomlKind::Survey));
    assert_eq!(toml_kind("  [survey] # comment\n"), Ok(TomlKind::Survey));
    assert_eq!(
        toml_kind("survey = { title = \"x\" }"),
        Ok(TomlKind::Survey)
    );
    assert_eq!(toml_kind("[survey.extra]\n"), Ok(TomlKind::Survey));
    assert_eq!(
        toml_kind("[rata]\nsurvey = \"x\""),
        Ok(TomlKind::Other("rata".into()))
    );
    assert_eq!(toml_kind("x = 1\n"), Ok(TomlKind::Empty));
    assert!(toml_kind("[surveyx\n").is_err());
    assert!(named_as_survey(Path::new("a/survey.toml")));
    assert!(named_as_survey(Path::new("a/Boiler2-Survey.toml")));
    assert!(!named_as_survey(Path::new("a/probe-cal.toml")));
}

#[test]
fn copied_readings_make_a_survey_suspect() {
    // run 1's line B copied from line A, point for point
    let mut lines: Vec<String> = READINGS.lines().map(str::to_string).collect();
    let a: Vec<String> = lines
        .iter()
        .filter(|l| l.starts_with("A,"))
        .cloned()
        .collect();
    let mut k = 0;
    for l in lines.iter_mut() {
        if l.starts_with("B,") && k < a.len() {
            *l = a[k].replacen("A,", "B,", 1);
            k += 1;
        }
    }
    let copied = lines.join("\n") + "\n";
    let r = run(&[
        ("s/survey.toml", &SURVEY.replace("REPORTED", "")),
        ("s/run1.csv", &copied),
    ]);
    let f = file(&r, "s/survey.toml");
    assert_eq!(f.status, ReviewStatus::Suspect, "{:?}", f.findings);
    assert!(
        f.findings
            .iter()
            .any(|n| matches!(n, Note::Integrity { id, .. } if id == "identical-sequences")),
        "{:?}",
        f.findings
    );
}

#[test]
fn a_file_over_the_time_budget_becomes_an_error_row_and_the_review_finishes() {
    let map = Arc::new(archive(&[
        ("a/survey.toml", &SURVEY.replace("REPORTED", "")),
        ("a/run1.csv", READINGS),
        ("slow/survey.toml", "[survey]\n"),
    ]));
    let source: SharedSource = Arc::new(move |p: &Path| {
        if p.starts_with("slow") {
            // a file that never finishes reading (a FIFO nobody writes to, a hung share)
            std::thread::sleep(std::time::Duration::from_secs(3600));
        }
        map.get(p)
            .cloned()
            .ok_or_else(|| std::io::Error::from(std::io::ErrorKind::NotFound))
    });
    let settings = ReviewSettings {
        time_budget: std::time::Duration::from_millis(300),
        threads: 2,
        ..ReviewSettings::default()
    };
    let started = std::time::Instant::now();
    let r = review_all(
        vec![
            PathBuf::from("slow/survey.toml"),
            PathBuf::from("a/survey.toml"),
        ],
        source,
        Arc::new(settings),
    );
    assert!(started.elapsed() < std::time::Duration::from_secs(5));
    let slow = file(&r, "slow/survey.toml");
    assert_eq!(slow.status, ReviewStatus::Error);
    assert!(
        matches!(&slow.findings[0], Note::OverBudget { message } if message.contains("time budget of 0.3 s")),
        "{:?}",
        slow.findings
    );
    assert!(file(&r, "a/survey.toml").status < ReviewStatus::Suspect);
}
