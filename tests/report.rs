//! The report, read back as a reviewer would: text through poppler's `pdftotext`, attachments
//! through the PDF's embedded-file tree. Each sample survey is rendered once (debug renders take
//! seconds) and shared by the tests.

mod common;
use annulus::report::embedded_files;
use common::root;
use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::OnceLock;

fn annulus(args: &[&str]) -> (i32, Vec<u8>, String) {
    common::run_bytes(&root(), args, &[])
}

struct Rendered {
    _dir: tempfile::TempDir,
    pdf: Vec<u8>,
    path: PathBuf,
}

fn render(survey: &str) -> Rendered {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("report.pdf");
    let (code, _, err) = annulus(&["report", survey, "-o", path.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    Rendered {
        pdf: std::fs::read(&path).unwrap(),
        path,
        _dir: dir,
    }
}

fn stack() -> &'static Rendered {
    static R: OnceLock<Rendered> = OnceLock::new();
    R.get_or_init(|| render("sample-data/stack/survey.toml"))
}

fn hvac() -> &'static Rendered {
    static R: OnceLock<Rendered> = OnceLock::new();
    R.get_or_init(|| render("sample-data/hvac/survey.toml"))
}

fn text(path: &Path) -> String {
    let out = Command::new("pdftotext")
        .args(["-layout", path.to_str().unwrap(), "-"])
        .output()
        .expect("pdftotext is installed (poppler-utils; .ci/run installs it)");
    String::from_utf8_lossy(&out.stdout).into_owned()
}

#[test]
fn every_section_is_present_with_page_numbers_and_safety() {
    for r in [stack(), hvac()] {
        let t = text(&r.path);
        for heading in [
            "Summary",
            "Measurement plane",
            "Readings",
            "Velocity field",
            "Checks and uncertainty",
            "Instruments and calibration",
            "Notes and deviations",
            "Safety cautions",
            "Sign-off",
        ] {
            assert!(t.contains(heading), "no section `{heading}`");
        }
        assert!(t.contains("Page 1 of"), "no page numbers");
        assert!(
            t.contains("licensed professional") || t.contains("professional judgment"),
            "no professional-judgment caution"
        );
    }
}

#[test]
fn printed_results_equal_the_compute_json() {
    let (code, json, _) = annulus(&[
        "compute",
        "sample-data/stack/survey.toml",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_slice(&json).unwrap();
    let t = text(&stack().path);
    // the average dry standard flow in dscfm and each run's, as printed (0 decimals, grouped)
    let dscfm = |m3s: f64| {
        let x = (m3s * 60.0 / 0.028_316_846_592).round() as i64;
        let s = x.to_string();
        let mut out = String::new();
        for (i, c) in s.chars().enumerate() {
            if i > 0 && (s.len() - i).is_multiple_of(3) {
                out.push(',');
            }
            out.push(c);
        }
        out
    };
    let avg = v["average"]["dry_standard_flow_m3_s"].as_f64().unwrap();
    assert!(
        t.contains(&format!("{} dscfm", dscfm(avg))),
        "average {} not printed",
        dscfm(avg)
    );
    for run in v["runs"].as_array().unwrap() {
        let q = dscfm(run["dry_standard_flow_m3_s"].as_f64().unwrap());
        assert!(t.contains(&q), "run flow {q} not printed");
    }
    // and the embedded results.json is the compute JSON byte for byte
    let files = embedded_files(&stack().pdf).unwrap();
    let results = files
        .iter()
        .find(|f| f.name == "results.json")
        .expect("results attached");
    assert_eq!(results.bytes, json);
}

#[test]
fn attachments_are_the_inputs_byte_for_byte() {
    let files = embedded_files(&stack().pdf).unwrap();
    let by = |n: &str| {
        files
            .iter()
            .find(|f| f.name == n)
            .unwrap_or_else(|| panic!("no {n}"))
    };
    assert_eq!(
        by("survey.toml").bytes,
        std::fs::read(root().join("sample-data/stack/survey.toml")).unwrap()
    );
    for i in 1..=3 {
        let name = format!("run{i}.csv");
        assert_eq!(
            by(&name).bytes,
            std::fs::read(root().join("sample-data/stack").join(&name)).unwrap()
        );
        assert_eq!(by(&name).mime.as_deref(), Some("text/csv"));
    }
    // the manifest lists every other attachment with its SHA-256 (all but itself and the seal,
    // which records the manifest's own SHA-256)
    let m = annulus::archive::Manifest::parse(&by("annulus-manifest.json").bytes).unwrap();
    assert_eq!(m.files.len(), files.len() - 2);
    assert!(by("annulus-seal.json").bytes.starts_with(b"{"));
    for e in &m.files {
        assert_eq!(
            e.sha256,
            annulus::archive::sha256_hex(&by(&e.name).bytes),
            "{}",
            e.name
        );
    }
    let t = text(&stack().path);
    assert!(t.contains(&m.report_id()), "report id printed");
    assert!(t.contains(&m.fingerprint()[..16]), "fingerprint printed");
}

#[test]
fn two_renders_are_byte_identical_and_metadata_is_set() {
    let again = render("sample-data/stack/survey.toml");
    assert!(
        again.pdf == stack().pdf,
        "two renders of the same input differ"
    );
    let info = Command::new("pdfinfo").arg(&again.path).output().unwrap();
    let info = String::from_utf8_lossy(&info.stdout);
    assert!(info.contains("Boiler 2 stack, annual flow test"), "{info}");
    assert!(info.contains("2026"), "{info}");
}

#[test]
fn hvac_report_states_design_and_standard_air() {
    let t = text(&hvac().path);
    assert!(
        t.contains("% of design") || t.contains("design"),
        "design comparison"
    );
    assert!(t.contains("scfm"));
    assert!(t.contains("1096.2"), "the IP velocity constant is printed");
}

#[test]
fn a_broken_user_template_is_located() {
    let dir = tempfile::tempdir().unwrap();
    let tpl = dir.path().join("firm.typ");
    std::fs::write(
        &tpl,
        "#let d = json(\"/data.json\")\n= #d.header.title\n#(1 +\n",
    )
    .unwrap();
    let out = dir.path().join("r.pdf");
    let (code, _, err) = annulus(&[
        "report",
        "sample-data/hvac/survey.toml",
        "-o",
        out.to_str().unwrap(),
        "--template",
        tpl.to_str().unwrap(),
    ]);
    assert_eq!(code, 1, "{err}");
    assert!(err.contains("firm.typ:3:"), "{err}");
    assert!(!out.exists(), "no half-written report");
}
