//! Never a panic on input: the whole pipeline (load → evaluate → assess) on mutated copies of the
//! sample files and on arbitrary text. Every outcome must be `Ok` or a diagnostic.

use annulus::input::load_with;
use annulus::pipeline::evaluate_and_assess;
use proptest::prelude::*;
use std::collections::HashMap;
use std::path::{Path, PathBuf};

fn sample(name: &str) -> Vec<u8> {
    std::fs::read(
        Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("sample-data/stack")
            .join(name),
    )
    .unwrap()
}

fn run(survey: Vec<u8>, readings: Vec<u8>) {
    let mut map: HashMap<PathBuf, Vec<u8>> = HashMap::new();
    map.insert(PathBuf::from("m/survey.toml"), survey);
    for i in 1..=3 {
        map.insert(PathBuf::from(format!("m/run{i}.csv")), readings.clone());
    }
    let src = move |p: &Path| {
        map.get(p)
            .cloned()
            .ok_or_else(|| std::io::Error::from(std::io::ErrorKind::NotFound))
    };
    if let Ok(loaded) = load_with(Path::new("m/survey.toml"), &src) {
        let _ = evaluate_and_assess(loaded);
    }
}

fn mutate(mut bytes: Vec<u8>, edits: &[(usize, u8)]) -> Vec<u8> {
    for &(pos, b) in edits {
        if !bytes.is_empty() {
            let i = pos % bytes.len();
            bytes[i] = b;
        }
    }
    bytes
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, .. ProptestConfig::default() })]

    #[test]
    fn mutated_readings_never_panic(edits in prop::collection::vec((any::<usize>(), prop::sample::select(b"0123456789.,-e\n\"#xAB ".to_vec())), 1..8)) {
        run(sample("survey.toml"), mutate(sample("run1.csv"), &edits));
    }

    #[test]
    fn mutated_surveys_never_panic(edits in prop::collection::vec((any::<usize>(), prop::sample::select(b"0123456789.-=\"[] \nx%DFinm".to_vec())), 1..6)) {
        run(mutate(sample("survey.toml"), &edits), sample("run1.csv"));
    }

    #[test]
    fn arbitrary_text_never_panics(survey in "\\PC{0,400}", readings in "\\PC{0,400}") {
        run(survey.into_bytes(), readings.into_bytes());
    }
}

#[test]
fn extreme_but_valid_numbers_do_not_panic() {
    let csv = String::from_utf8(sample("run1.csv")).unwrap();
    for v in ["0", "1e-300", "1e300", "-0.000001", "99999"] {
        let mut lines: Vec<String> = csv.lines().map(str::to_string).collect();
        for l in lines.iter_mut().skip(1) {
            let mut f: Vec<&str> = l.split(',').collect();
            f[2] = v;
            *l = f.join(",");
        }
        run(
            sample("survey.toml"),
            (lines.join("\n") + "\n").into_bytes(),
        );
    }
}
