//! Never a panic, and the right answer class for every generated case: the whole pipeline
//! (load → evaluate → assess) on rewritten copies of the stack sample, where each generator knows
//! whether its case must succeed or be rejected (exit code 0 vs 1), and asserts it. A success must
//! carry finite results; a rejection must be an input diagnostic (never an environment failure),
//! located where the generator broke the file when it broke one cell.

use annulus::diag::{Diagnostics, Error};
use annulus::input::{load_with, MemoryFiles};
use annulus::pipeline::evaluate_and_assess;
use annulus::results::ResultsDoc;
use proptest::prelude::*;
use std::path::Path;

fn sample(path: &str) -> Vec<u8> {
    std::fs::read(
        Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("sample-data")
            .join(path),
    )
    .unwrap()
}

fn sample_text(path: &str) -> String {
    String::from_utf8(sample(path)).unwrap()
}

/// What a case came to: the results JSON, or the input problems.
enum Outcome {
    Success(serde_json::Value),
    Rejected(Diagnostics),
}

/// The stack sample (three runs and the shared calibration) from memory, with the given survey
/// and readings.
fn outcome(survey: &[u8], runs: &[Vec<u8>; 3]) -> Outcome {
    let mut files = MemoryFiles::new();
    files.insert("m/survey.toml", survey.to_vec());
    for (i, r) in runs.iter().enumerate() {
        files.insert(format!("m/run{}.csv", i + 1), r.clone());
    }
    files.insert(
        "m/../calibration/ts-0417.toml",
        sample("calibration/ts-0417.toml"),
    );
    files.insert(
        "m/../calibration/ts-0417.csv",
        sample("calibration/ts-0417.csv"),
    );
    let result =
        load_with(Path::new("m/survey.toml"), &|p| files.read(p)).and_then(evaluate_and_assess);
    match result {
        Ok((e, a)) => Outcome::Success(serde_json::to_value(ResultsDoc::new(&e, &a)).unwrap()),
        Err(Error::Input(d)) => Outcome::Rejected(d),
        Err(Error::Environment(m)) => panic!("an environment failure from memory input: {m}"),
    }
}

fn sample_runs() -> [Vec<u8>; 3] {
    [
        sample("stack/run1.csv"),
        sample("stack/run2.csv"),
        sample("stack/run3.csv"),
    ]
}

/// Asserts success with finite flows in every run and in the average.
fn assert_success(o: Outcome) {
    let v = match o {
        Outcome::Success(v) => v,
        Outcome::Rejected(d) => panic!("rejected, but must succeed:\n{d}"),
    };
    let keys = [
        "mean_velocity_m_s",
        "actual_flow_m3_s",
        "standard_flow_m3_s",
        "dry_standard_flow_m3_s",
        "mass_flow_kg_s",
    ];
    let runs = v["runs"].as_array().expect("runs");
    assert_eq!(runs.len(), 3);
    for r in runs.iter().chain(std::iter::once(&v["average"])) {
        for k in keys {
            let x = r[k].as_f64().unwrap_or(f64::NAN);
            assert!(x.is_finite() && x > 0.0, "{k} = {}", r[k]);
        }
    }
}

/// Asserts rejection; returns the problems.
fn assert_rejected(o: Outcome) -> Diagnostics {
    match o {
        Outcome::Rejected(d) => d,
        Outcome::Success(_) => panic!("succeeded, but must be rejected"),
    }
}

#[test]
fn the_sample_succeeds() {
    assert_success(outcome(&sample("stack/survey.toml"), &sample_runs()));
}

/// One way of writing the same readings differently.
#[derive(Debug, Clone)]
enum Rewrite {
    /// Every Δp times this factor (a stronger or weaker flow: still valid).
    Scale(f64),
    /// Rows in another order.
    Shuffle(Vec<usize>),
    /// A comment line before data row `i`.
    Comment(usize),
    /// A blank line before data row `i`.
    Blank(usize),
    /// Windows line ends.
    Crlf,
    /// Every cell quoted.
    Quote,
    /// Spaces around every cell.
    Pad,
    /// A spreadsheet's byte-order mark.
    Bom,
}

/// A data line (not a comment or blank line an earlier rewrite added).
fn data(l: &str) -> bool {
    !l.trim().is_empty() && !l.starts_with('#')
}

fn rewrite(text: &str, how: &Rewrite) -> String {
    let mut lines: Vec<String> = text.lines().map(str::to_string).collect();
    let (header, rows) = lines.split_at_mut(1);
    match how {
        Rewrite::Scale(k) => {
            for l in rows.iter_mut().filter(|l| data(l)) {
                let mut f: Vec<String> = l.split(',').map(str::to_string).collect();
                let dp: f64 = f[2].trim().trim_matches('"').parse().unwrap();
                f[2] = format!("{:.6}", dp * k);
                *l = f.join(",");
            }
        }
        Rewrite::Shuffle(order) => {
            let mut keyed: Vec<(usize, String)> = rows
                .iter()
                .enumerate()
                .map(|(i, r)| (order[i % order.len()] * 1000 + i, r.clone()))
                .collect();
            keyed.sort();
            for (slot, (_, r)) in rows.iter_mut().zip(keyed) {
                *slot = r;
            }
        }
        Rewrite::Comment(i) => {
            let i = i % rows.len();
            rows[i] = format!("# re-read after purge\n{}", rows[i]);
        }
        Rewrite::Blank(i) => {
            let i = i % rows.len();
            rows[i] = format!("\n{}", rows[i]);
        }
        Rewrite::Crlf => {
            return lines.join("\r\n") + "\r\n";
        }
        Rewrite::Quote => {
            for l in header.iter_mut().chain(rows.iter_mut()).filter(|l| data(l)) {
                *l = l
                    .split(',')
                    .map(|c| match c.trim() {
                        q if q.starts_with('"') => q.to_string(),
                        c => format!("\"{c}\""),
                    })
                    .collect::<Vec<_>>()
                    .join(",");
            }
        }
        Rewrite::Pad => {
            for l in rows.iter_mut().filter(|l| data(l)) {
                // quoted cells keep their quotes first: a space before a quote makes it text
                *l = l
                    .split(',')
                    .map(|c| match c.trim_start().starts_with('"') {
                        true => c.to_string(),
                        false => format!("  {c} "),
                    })
                    .collect::<Vec<_>>()
                    .join(",");
            }
        }
        Rewrite::Bom => return format!("\u{feff}{text}"),
    }
    lines.join("\n") + "\n"
}

fn a_rewrite() -> impl Strategy<Value = Rewrite> {
    prop_oneof![
        (0.25f64..4.0).prop_map(Rewrite::Scale),
        prop::collection::vec(0usize..24, 24).prop_map(Rewrite::Shuffle),
        (0usize..24).prop_map(Rewrite::Comment),
        (0usize..24).prop_map(Rewrite::Blank),
        Just(Rewrite::Crlf),
        Just(Rewrite::Quote),
        Just(Rewrite::Pad),
        Just(Rewrite::Bom),
    ]
}

/// Cell values that are not readings, each with the column it is tried in: 3 = dp, 4 =
/// temperature, 5 = yaw (1-based, as in messages).
const BAD_CELLS: &[(&str, usize)] = &[
    ("x", 3),
    ("0.3l", 3),
    ("1..2", 3),
    ("--1", 3),
    ("NaN", 3),
    ("inf", 3),
    ("1e999", 3),
    ("1e308", 3), // finite, but not in pascals
    ("0x10", 3),
    ("½", 3),
    ("", 3), // a point left unread
    ("warm", 4),
    ("-500", 4), // below absolute zero in °F
    ("95", 5),   // a flow angle beyond 90°
    ("left", 5),
];

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, .. ProptestConfig::default() })]

    /// The same readings written another way (or a uniformly stronger or weaker flow): success.
    #[test]
    fn valid_rewrites_succeed(hows in prop::collection::vec(a_rewrite(), 1..4), run in 0usize..3) {
        let mut runs = sample_runs();
        let mut text = String::from_utf8(runs[run].clone()).unwrap();
        // a byte-order mark only at the very start, so apply it last
        let (bom, others): (Vec<_>, Vec<_>) = hows.into_iter().partition(|h| matches!(h, Rewrite::Bom));
        for how in others.iter().chain(bom.iter().take(1)) {
            text = rewrite(&text, how);
        }
        runs[run] = text.into_bytes();
        assert_success(outcome(&sample("stack/survey.toml"), &runs));
    }

    /// One cell that is not a reading: rejected, and the problem is located at that cell.
    #[test]
    fn a_bad_cell_is_rejected_where_it_is(cell in 0usize..BAD_CELLS.len(), row in 1usize..25, run in 0usize..3) {
        let (bad, column) = BAD_CELLS[cell];
        let mut runs = sample_runs();
        let text = String::from_utf8(runs[run].clone()).unwrap();
        let mut lines: Vec<String> = text.lines().map(str::to_string).collect();
        let mut f: Vec<String> = lines[row].split(',').map(str::to_string).collect();
        f[column - 1] = bad.to_string();
        lines[row] = f.join(",");
        runs[run] = (lines.join("\n") + "\n").into_bytes();
        let d = assert_rejected(outcome(&sample("stack/survey.toml"), &runs));
        let file = format!("m/run{}.csv", run + 1);
        let located = d.items().iter().any(|x| {
            x.location.as_ref().is_some_and(|l| {
                l.file == file && l.line == Some(row + 1) && l.column == Some(column)
            })
        });
        prop_assert!(located, "`{bad}` at {file}:{}:{column} not located:\n{d}", row + 1);
    }

    /// A survey broken in one known way: rejected.
    #[test]
    fn a_broken_survey_is_rejected(which in 0usize..8, note in "[a-z ]{0,20}") {
        let s = sample_text("stack/survey.toml");
        let broken = match which {
            0 => s.replace("\"29.62 inHg\"", "\"29.62 furlongs\""),
            1 => s.replace("diameter = \"96 in\"\n", ""),
            2 => s.replace("\"96 in\"", "\"1e400 in\""),
            3 => s.replace("date = \"2026-10-14\"", "date = \"2026-13-45\""),
            4 => s.replace("id = \"2\"", "id = \"1\""),
            5 => s.replace("readings = \"run3.csv\"", "readings = \"run9.csv\""),
            6 => s.replace("points_per_line = 12", "points_per_line = 11"),
            _ => s.replace("\"8.1 %\"", "\"eight %\""),
        };
        prop_assert_ne!(&broken, &s);
        // a comment anywhere does not rescue it
        let broken = format!("# {note}\n{broken}");
        assert_rejected(outcome(broken.as_bytes(), &sample_runs()));
    }

    /// Arbitrary text is neither a survey nor a readings sheet.
    #[test]
    fn arbitrary_text_is_rejected(survey in "\\PC{0,400}", readings in "\\PC{0,400}") {
        assert_rejected(outcome(survey.as_bytes(), &sample_runs()));
        let runs = [readings.clone().into_bytes(), sample("stack/run2.csv"), sample("stack/run3.csv")];
        assert_rejected(outcome(&sample("stack/survey.toml"), &runs));
    }

    /// Random bytes written over the readings: whatever they hit, the answer is a success with
    /// finite results or an input rejection, never a panic or an environment failure. (Which of
    /// the two is not known for a random byte; the generators above know it.)
    #[test]
    fn random_bytes_give_success_or_rejection(
        edits in prop::collection::vec((any::<usize>(), prop::sample::select(b"0123456789.,-e\n\"#xAB ".to_vec())), 1..8)
    ) {
        let mut runs = sample_runs();
        let bytes = &mut runs[0];
        for &(pos, b) in &edits {
            let i = pos % bytes.len();
            bytes[i] = b;
        }
        if let Outcome::Success(v) = outcome(&sample("stack/survey.toml"), &runs) {
            let x = v["average"]["actual_flow_m3_s"].as_f64().unwrap_or(f64::NAN);
            prop_assert!(x.is_finite(), "average flow {}", v["average"]["actual_flow_m3_s"]);
        }
    }
}

#[test]
fn extreme_but_valid_numbers_succeed_and_stay_finite() {
    let csv = sample_text("stack/run1.csv");
    // the largest: just inside the ±25 kPa (±100 inH2O) plausibility range of a pitot reading
    for v in ["0.000001", "1e-6", "99.9", "100.3"] {
        let mut lines: Vec<String> = csv.lines().map(str::to_string).collect();
        for l in lines.iter_mut().skip(1) {
            let mut f: Vec<&str> = l.split(',').collect();
            f[2] = v;
            *l = f.join(",");
        }
        let mut runs = sample_runs();
        runs[0] = (lines.join("\n") + "\n").into_bytes();
        assert_success(outcome(&sample("stack/survey.toml"), &runs));
    }
    // beyond the range, a finite reading is an input error that names the range, not a result
    let mut lines: Vec<String> = csv.lines().map(str::to_string).collect();
    for l in lines.iter_mut().skip(1) {
        let mut f: Vec<&str> = l.split(',').collect();
        f[2] = "1000";
        *l = f.join(",");
    }
    let mut runs = sample_runs();
    runs[0] = (lines.join("\n") + "\n").into_bytes();
    match outcome(&sample("stack/survey.toml"), &runs) {
        Outcome::Rejected(d) => assert!(d.to_string().contains("25000 Pa"), "{d}"),
        Outcome::Success(_) => panic!("1000 inH2O must be refused as out of range"),
    }
}
