//! End-to-end: `annulus system` on the sample building and on bad system files, checking stdout,
//! stderr and the exit code. Golden files under tests/golden/, regenerated with
//! `UPDATE_GOLDEN=1 cargo test --test system` and reviewed in the diff.

mod common;
use common::{golden, root, run, run_bytes};
use std::process::Command;

fn annulus(args: &[&str]) -> (i32, String, String) {
    annulus_cfg(args, "")
}

/// Runs the binary with the configuration file `config` (empty: no configuration at all, so a
/// configuration on the machine running the tests changes nothing).
fn annulus_cfg(args: &[&str], config: &str) -> (i32, String, String) {
    run(&root(), args, &[("ANNULUS_CONFIG", Some(config))])
}

const SAMPLE: &str = "sample-data/building/ahu-2.toml";

/// 1 cfm in m³/s (1 ft = 0.3048 m exactly).
const CFM: f64 = 0.028_316_846_592 / 60.0;

#[test]
fn the_sample_building_prints_its_submittal_and_exits_3_for_the_failing_diffuser() {
    let (code, out, err) = annulus(&["system", SAMPLE]);
    // one diffuser (D-204, 410 of 500 cfm = 82 %) is outside ±10 %: exit code 3 (contract)
    assert_eq!(code, 3, "{err}");
    assert_eq!(err, "");
    golden("system-building.txt", &out);
}

#[test]
fn the_json_carries_the_contract_keys_and_hand_checkable_values() {
    let (code, json, err) = annulus(&["system", SAMPLE, "--format", "json"]);
    assert_eq!(code, 3, "{err}");
    let v: serde_json::Value = serde_json::from_str(&json).expect("JSON");
    // contract.md, "System file": the keys of `annulus system --format json`
    for k in [
        "ducts",
        "branches",
        "outside_air",
        "fan",
        "terminals",
        "verdict",
    ] {
        assert!(v.get(k).is_some(), "no `{k}`");
    }
    for k in [
        "tag",
        "role",
        "design_flow_m3_s",
        "design_basis",
        "measured_flow_m3_s",
        "percent_of_design",
        "within_tolerance",
    ] {
        assert!(v["ducts"][0].get(k).is_some(), "no ducts[0].{k}");
    }
    for k in ["of", "sum_m3_s", "main_m3_s", "difference_percent"] {
        assert!(v["branches"][0].get(k).is_some(), "no branches[0].{k}");
    }
    for k in ["flow_m3_s", "percent_of_supply", "method"] {
        assert!(v["outside_air"].get(k).is_some(), "no outside_air.{k}");
    }
    for k in [
        "measured_flow_m3_s",
        "percent_of_design",
        "rpm_for_design",
        "static_at_design_rpm_pa",
        "amps_at_design_rpm",
    ] {
        assert!(v["fan"].get(k).is_some(), "no fan.{k}");
    }
    for k in [
        "tag",
        "branch",
        "design_flow_m3_s",
        "measured_flow_m3_s",
        "percent_of_design",
        "within_tolerance",
    ] {
        assert!(v["terminals"][0].get(k).is_some(), "no terminals[0].{k}");
    }
    assert_eq!(v["verdict"], "fail");
    assert_eq!(v["outside_air"]["method"], "measured");
    // `cfm` in the system file is actual air (contract: flow units with a basis)
    assert_eq!(v["ducts"][0]["design_basis"], "actual");
    assert!((v["ducts"][0]["design_flow_m3_s"].as_f64().unwrap() - 6000.0 * CFM).abs() < 1e-12);

    let num = |x: &serde_json::Value| x.as_f64().expect("number");
    // contract: percent_of_design = measured / design · 100 (each duct)
    for d in v["ducts"].as_array().unwrap() {
        let p = 100.0 * num(&d["measured_flow_m3_s"]) / num(&d["design_flow_m3_s"]);
        assert!((num(&d["percent_of_design"]) - p).abs() < 1e-9);
        assert_eq!(d["within_tolerance"], (p - 100.0).abs() <= 10.0);
    }
    // contract: difference_percent = (sum − main)/main · 100, the sum being the branches'
    let ducts = v["ducts"].as_array().unwrap();
    let flow_of =
        |tag: &str| num(&ducts.iter().find(|d| d["tag"] == tag).unwrap()["measured_flow_m3_s"]);
    let b = &v["branches"][0];
    let sum = flow_of("SA-1") + flow_of("SA-2") + flow_of("SA-3");
    assert!((num(&b["sum_m3_s"]) - sum).abs() < 1e-12);
    let main = flow_of("SA-main");
    assert!((num(&b["difference_percent"]) - 100.0 * (sum - main) / main).abs() < 1e-9);
    // contract: percent_of_supply = outside / supply · 100
    let oa = &v["outside_air"];
    assert!((num(&oa["percent_of_supply"]) - 100.0 * flow_of("OA") / main).abs() < 1e-9);
    // fan laws: speed for design flow = measured speed · design flow / measured flow
    let fan = &v["fan"];
    assert!((num(&fan["rpm_for_design"]) - 1150.0 * 6000.0 * CFM / main).abs() < 1e-9);
    // terminal D-203 read as velocity × area factor: 560 fpm × 0.90 ft² = 504 cfm (hand-worked)
    let d203 = v["terminals"]
        .as_array()
        .unwrap()
        .iter()
        .find(|t| t["tag"] == "D-203")
        .unwrap();
    assert!((num(&d203["measured_flow_m3_s"]) / CFM - 504.0).abs() < 1e-9);
    // D-204: 410/500 = 82 %, outside ±10 %
    let d204 = v["terminals"]
        .as_array()
        .unwrap()
        .iter()
        .find(|t| t["tag"] == "D-204")
        .unwrap();
    assert!((num(&d204["percent_of_design"]) - 82.0).abs() < 1e-9);
    assert_eq!(d204["within_tolerance"], false);
}

#[test]
fn the_csv_has_one_row_per_judged_item_in_the_job_units() {
    let (code, csv, _) = annulus(&["system", SAMPLE, "--format", "csv"]);
    assert_eq!(code, 3);
    let mut lines = csv.lines();
    assert_eq!(
        lines.next(),
        Some("item,tag,role,of,basis,unit,design,measured,percent_of_design,compared_with,difference,difference_percent,tolerance_percent,status")
    );
    // 6 ducts, 1 branch sum, outside air, fan, 12 terminals, 3 terminal sums
    assert_eq!(lines.clone().count(), 24);
    assert!(lines.any(|l| l.starts_with("terminal,D-204,,SA-2,actual,acfm,500.0,410.0,82.00,")));
    assert!(!csv.contains('\u{2212}'), "ASCII minus in CSV");
}

#[test]
fn bad_system_files_are_rejected_with_located_diagnostics() {
    for case in [
        "missing-survey",
        "unknown-branch",
        "circle",
        "design-no-unit",
        "bad-terminals",
    ] {
        let file = format!("tests/data/system/{case}.toml");
        let (code, out, err) = annulus(&["system", &file]);
        assert_eq!(code, 1, "{case}: {err}");
        assert_eq!(out, "", "{case}: nothing on stdout");
        golden(&format!("system-bad-{case}.txt"), &err);
    }
}

mod never_panics {
    //! Mutated system files and terminal CSVs through the reader and the whole evaluation: every
    //! outcome is `Ok` or a diagnostic.
    use annulus::input::system_file::load_system_with;
    use annulus::submittal::evaluate_system;
    use proptest::prelude::*;
    use std::path::Path;

    fn sample(name: &str) -> Vec<u8> {
        std::fs::read(super::root().join("sample-data/building").join(name)).unwrap()
    }

    fn run(system: Vec<u8>, terminals: Vec<u8>) {
        let dir = super::root().join("sample-data/building");
        let sys_path = dir.join("ahu-2.toml");
        let term_path = dir.join("terminals.csv");
        let src = |p: &Path| {
            if p == sys_path {
                Ok(system.clone())
            } else if p == term_path {
                Ok(terminals.clone())
            } else {
                std::fs::read(p)
            }
        };
        if let Ok(loaded) = load_system_with(&sys_path, &src) {
            let _ = evaluate_system(loaded, None);
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
        #![proptest_config(ProptestConfig { cases: 48, .. ProptestConfig::default() })]

        #[test]
        fn mutated_system_files_never_panic(edits in prop::collection::vec((any::<usize>(), prop::sample::select(b"0123456789.-=\"[] \nx%ASbranchof".to_vec())), 1..6)) {
            run(mutate(sample("ahu-2.toml"), &edits), sample("terminals.csv"));
        }

        #[test]
        fn mutated_terminals_never_panic(edits in prop::collection::vec((any::<usize>(), prop::sample::select(b"0123456789.,-e\n\"#xSA ".to_vec())), 1..8)) {
            run(sample("ahu-2.toml"), mutate(sample("terminals.csv"), &edits));
        }
    }

    #[test]
    fn zero_and_huge_terminal_readings_do_not_panic() {
        for v in ["0", "1e-300", "1e300"] {
            let csv = format!("tag,branch,design[cfm],measured[cfm]\nD-1,SA-1,600,{v}\n");
            run(sample("ahu-2.toml"), csv.into_bytes());
        }
    }
}

/// Text of a PDF via poppler's `pdftotext` (CI installs poppler-utils).
fn pdf_text(path: &std::path::Path) -> String {
    let out = Command::new("pdftotext")
        .args(["-layout"])
        .arg(path)
        .arg("-")
        .output()
        .expect("pdftotext (poppler-utils) must be installed for the PDF tests");
    assert!(out.status.success(), "pdftotext failed");
    String::from_utf8_lossy(&out.stdout).into_owned()
}

#[test]
fn the_submittal_pdf_embeds_every_input_speaks_hvac_and_is_reproducible() {
    let dir = std::env::temp_dir().join(format!("annulus-system-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let a = dir.join("a.pdf");
    let b = dir.join("b.pdf");
    let (code, out, err) = annulus(&["system", SAMPLE, "-o", a.to_str().unwrap()]);
    // written, and still exit 3: a diffuser is outside tolerance
    assert_eq!(code, 3, "{err}");
    assert_eq!(out, "");
    assert!(err.starts_with(&format!("wrote {}", a.display())), "{err}");
    let (code, _, _) = annulus(&["system", SAMPLE, "-o", b.to_str().unwrap()]);
    assert_eq!(code, 3);
    let (pa, pb) = (std::fs::read(&a).unwrap(), std::fs::read(&b).unwrap());
    assert_eq!(pa, pb, "the same inputs give the same bytes");

    let files = annulus::report::embedded_files(&pa).expect("attachments readable");
    let names: Vec<&str> = files.iter().map(|f| f.name.as_str()).collect();
    for n in [
        "ahu-2.toml",
        "terminals.csv",
        "sa-main-survey.toml",
        "sa-main-traverse.csv",
        "oa-traverse.csv",
        "results.json",
        "annulus-manifest.json",
    ] {
        assert!(names.contains(&n), "{n} not embedded: {names:?}");
    }
    // the embedded system file is the file as read
    let system = files.iter().find(|f| f.name == "ahu-2.toml").unwrap();
    assert_eq!(system.bytes, std::fs::read(root().join(SAMPLE)).unwrap());

    let text = pdf_text(&a);
    for phrase in [
        "AHU-2 air system, test and balance",
        "Saltmarsh Air Balance Ltd (fictional)",
        "Tomasz Okafor-Lind",
        "TAB-FIC-52210",
        "Ducts against design",
        "Relations between ducts",
        "Fan SF-2",
        "D-204",
        "Duct traverses",
        "Deficiencies",
        "Balancing damper VD-204",
        "Rotating equipment",
        "Sign-off",
        "Flows in acfm; a velocity reading is the face",
        "that the readings of every duct and terminal were",
    ] {
        assert!(
            text.contains(phrase),
            "`{phrase}` missing from the PDF text"
        );
    }
    // HVAC wording: no stack cautions or leak-check lines, no references to files the reader lacks
    for word in ["toxic", "sampling platform", "leak check", "methods.md"] {
        assert!(!text.contains(word), "`{word}` on an HVAC submittal");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn the_submittal_is_never_written_over_an_input() {
    let (code, out, err) = annulus(&["system", SAMPLE, "-o", "sample-data/building/terminals.csv"]);
    assert_eq!(code, 1, "{err}");
    assert_eq!(out, "");
    // the output rules' refusal (src/write.rs), before anything is computed
    assert!(err.contains("it is one of this command's inputs"), "{err}");
    assert!(err.contains("nothing was computed"), "{err}");
}

#[test]
fn a_signed_submittal_verifies_recomputes_and_re_renders_and_an_edit_is_caught() {
    let dir = std::env::temp_dir().join(format!("annulus-system-signed-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let key = dir.join("balancer");
    let (code, _, err) = annulus(&["keygen", key.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    let (secret, public) = (dir.join("balancer.key"), dir.join("balancer.pub"));
    // a folder as the destination: the PDF is named after the system file
    let (code, _, err) = annulus(&[
        "system",
        SAMPLE,
        "-o",
        &format!("{}/", dir.display()),
        "--sign",
        secret.to_str().unwrap(),
    ]);
    assert_eq!(code, 3, "{err}");
    let pdf = dir.join("ahu-2.pdf");
    assert!(err.contains("signed by balancer"), "{err}");

    let (code, out, err) = annulus(&[
        "verify",
        pdf.to_str().unwrap(),
        "--key",
        public.to_str().unwrap(),
        "--rerender",
        "always",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0, "{out}{err}");
    let v: serde_json::Value = serde_json::from_str(&out).expect("verify JSON");
    assert_eq!(v["kind"], "submittal");
    assert_eq!(v["content"], "intact");
    assert_eq!(v["signature"]["status"], "trusted");
    assert_eq!(v["signature"]["signer"], "balancer");
    assert_eq!(v["pages"], "rerendered");
    // every value of the embedded results re-derived from the embedded inputs, and the pages
    // laid out again byte for byte
    assert_eq!(v["recomputation"]["state"], "matches");
    assert!(v["recomputation"]["compared"].as_u64().unwrap() > 100);
    assert_eq!(v["rerendering"]["state"], "matches");
    assert_eq!(v["checks_verdict"], "fail", "the failing diffuser");

    // one byte of the document changed (the first `AHU-` is in the document title): the seal
    // no longer matches
    let mut bytes = std::fs::read(&pdf).unwrap();
    let at = bytes
        .windows(4)
        .position(|w| w == b"AHU-")
        .expect("the title is in the PDF");
    bytes[at] = b'X';
    let edited = dir.join("edited.pdf");
    std::fs::write(&edited, &bytes).unwrap();
    let (code, out, _) = annulus(&["verify", edited.to_str().unwrap(), "--format", "json"]);
    assert_ne!(code, 0, "an edited submittal must not verify: {out}");
    let v: serde_json::Value = serde_json::from_str(&out).expect("verify JSON");
    assert_eq!(v["content"], "altered", "{out}");

    // review names the kind and fails the submittal on its system verdict, re-derived
    let archive = dir.join("archive");
    std::fs::create_dir_all(&archive).unwrap();
    std::fs::copy(&pdf, archive.join("ahu-2.pdf")).unwrap();
    let (code, out, err) = annulus(&[
        "review",
        archive.to_str().unwrap(),
        "--key",
        public.to_str().unwrap(),
        "--format",
        "json",
    ]);
    assert_eq!(code, 3, "{out}{err}");
    let v: serde_json::Value = serde_json::from_str(&out).expect("review JSON");
    let f = &v["files"][0];
    assert_eq!(f["kind"], "submittal");
    assert_eq!(f["status"], "fail");
    assert_eq!(f["title"], "AHU-2 air system, test and balance");
    assert_eq!(f["tested_by"], "Tomasz Okafor-Lind");
    assert!(
        f["findings"].to_string().contains("system-tolerance"),
        "{f}"
    );
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn the_submittal_goes_to_standard_output_with_a_dash() {
    let (code, stdout, _) = run_bytes(
        &root(),
        &["system", SAMPLE, "-o", "-", "--quiet"],
        &[("ANNULUS_CONFIG", Some(""))],
    );
    assert_eq!(code, 3);
    assert!(stdout.starts_with(b"%PDF-"), "a PDF on standard output");
    let files = annulus::report::embedded_files(&stdout).expect("attachments readable");
    assert!(files.iter().any(|f| f.name == "ahu-2.toml"));
}

#[test]
fn the_user_configuration_names_the_firm_signs_and_sets_the_convention_of_new_surveys() {
    let dir = std::env::temp_dir().join(format!("annulus-system-config-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let (code, _, err) = annulus(&["keygen", dir.join("crew").to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    let cfg = dir.join("config.toml");
    std::fs::write(
        &cfg,
        "organisation = \"Configured Balancing Co (fictional)\"\ntechnician = \"Ada \\\"Q\\\" Tester\"\n\
         certificate = \"CFG-0001\"\nsigning_key = \"crew.key\"\nconvention = \"hvac-ip\"\n",
    )
    .unwrap();
    let cfg = cfg.to_str().unwrap();

    // init: the configured convention when none is given, the configured names in the sign-off
    let job = dir.join("job");
    let (code, _, err) = annulus_cfg(
        &[
            "init",
            job.to_str().unwrap(),
            "--round",
            "18in",
            "--date",
            "2026-11-20",
        ],
        cfg,
    );
    assert_eq!(code, 0, "{err}");
    let survey = std::fs::read_to_string(job.join("survey.toml")).unwrap();
    assert!(survey.contains("convention = \"hvac-ip\""), "{survey}");
    // quoted as TOML (a literal string keeps the double quotes of the name)
    assert!(
        survey.contains("tested_by = 'Ada \"Q\" Tester'"),
        "{survey}"
    );
    assert!(survey.contains("certificate = \"CFG-0001\""), "{survey}");
    assert!(
        survey.contains("organisation = \"Configured Balancing Co (fictional)\""),
        "{survey}"
    );
    // a --convention given on the command line wins
    let (code, _, err) = annulus_cfg(
        &[
            "init",
            dir.join("stack").to_str().unwrap(),
            "--round",
            "60in",
            "--convention",
            "epa-method-2",
        ],
        cfg,
    );
    assert_eq!(code, 0, "{err}");
    let stack = std::fs::read_to_string(dir.join("stack/survey.toml")).unwrap();
    assert!(stack.contains("convention = \"epa-method-2\""));

    // the single HVAC report: the sample names its technician but no firm, so the
    // configuration's firm is printed and the survey's technician kept
    let report = dir.join("hvac.pdf");
    let (code, _, err) = annulus_cfg(
        &[
            "report",
            "sample-data/hvac/survey.toml",
            "-o",
            report.to_str().unwrap(),
        ],
        cfg,
    );
    assert_eq!(code, 0, "{err}");
    let text = pdf_text(&report);
    assert!(
        text.contains("Configured Balancing Co (fictional)"),
        "{text}"
    );
    assert!(text.contains("Sam Adeyemi-Hart"));
    // the design sentence names the flow it compares (sample-data/hvac: design 6,500 acfm)
    assert!(
        text.contains("Design flow 6,500 acfm; measured actual flow"),
        "{text}"
    );
    assert!(
        !text.contains("Ada"),
        "the survey's technician is not replaced"
    );
    // what the configuration filled is recorded, so the report re-renders identically
    let (code, out, err) = annulus(&[
        "verify",
        report.to_str().unwrap(),
        "--rerender",
        "always",
        "--format",
        "json",
    ]);
    assert_eq!(code, 0, "{out}{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["rerendering"]["state"], "matches", "{out}");

    // `system --sign` without a path signs with the configured key
    let pdf = dir.join("sub.pdf");
    let (code, _, err) = annulus_cfg(
        &["system", SAMPLE, "-o", pdf.to_str().unwrap(), "--sign"],
        cfg,
    );
    assert_eq!(code, 3, "{err}");
    assert!(err.contains("signed by crew"), "{err}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_submittal_refuses_an_absolute_survey_path_before_any_work() {
    let dir = std::env::temp_dir().join(format!("annulus-system-abs-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let survey = root().join("sample-data/building/sa-main/survey.toml");
    let system = dir.join("abs.toml");
    std::fs::write(
        &system,
        format!(
            "[system]\ntitle = \"absolute\"\ndate = \"2026-11-20\"\n\n[[duct]]\ntag = \"SA-main\"\n\
             survey = {}\nrole = \"supply\"\ndesign = \"6000 cfm\"\n",
            toml_string(survey.to_str().unwrap())
        ),
    )
    .unwrap();
    // printed: an absolute path is only a note's matter
    let (code, _, err) = annulus(&["system", system.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    assert!(
        err.contains("(duct SA-main's survey) is an absolute path"),
        "{err}"
    );
    // written: refused at the line that names it, and no PDF
    let pdf = dir.join("abs.pdf");
    let (code, _, err) = annulus(&[
        "system",
        system.to_str().unwrap(),
        "-o",
        pdf.to_str().unwrap(),
    ]);
    assert_eq!(code, 1, "{err}");
    assert!(
        err.contains("is an absolute path, which a submittal does not carry"),
        "{err}"
    );
    assert!(err.contains("abs.toml:7:10"), "{err}");
    assert!(!pdf.exists());
    let _ = std::fs::remove_dir_all(&dir);
}

/// A TOML literal string (paths on Windows hold backslashes).
fn toml_string(s: &str) -> String {
    format!("'{s}'")
}
