//! End-to-end: `annulus keygen`, `annulus verify` and `annulus review` run as the real binary on
//! copies of the sample data in temporary folders.
//!
//! Two reports are rendered once (signed and unsigned, in parallel) and shared through a
//! `OnceLock`; every tampering case rewrites an attachment of a copy with lopdf, exactly as someone
//! editing the PDF would, and leaves the rest of the file as it was.

use annulus::archive::manifest::{Manifest, MANIFEST_NAME};
use annulus::archive::PublicKey;
use lopdf::{dictionary, Document, Object, ObjectId, Stream};
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::OnceLock;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn annulus_in(dir: &Path, args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_annulus"))
        .args(args)
        .current_dir(dir)
        .env("NO_COLOR", "1")
        .env_remove("SOURCE_DATE_EPOCH")
        .output()
        .expect("binary runs");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

fn copy_dir(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).unwrap();
    for e in std::fs::read_dir(from).unwrap() {
        let e = e.unwrap();
        if e.file_type().unwrap().is_file() {
            std::fs::copy(e.path(), to.join(e.file_name())).unwrap();
        }
    }
}

struct Fixture {
    dir: tempfile::TempDir,
    signed: Vec<u8>,
    unsigned: Vec<u8>,
    signer_fingerprint: String,
    other_fingerprint: String,
}

impl Fixture {
    fn path(&self) -> &Path {
        self.dir.path()
    }
}

fn fingerprint_of(stdout: &str) -> String {
    stdout
        .trim()
        .strip_prefix("key fingerprint ")
        .unwrap_or_else(|| panic!("no fingerprint in {stdout:?}"))
        .to_string()
}

fn fixture() -> &'static Fixture {
    static F: OnceLock<Fixture> = OnceLock::new();
    F.get_or_init(|| {
        let dir = tempfile::tempdir().unwrap();
        let d = dir.path().to_path_buf();
        copy_dir(&root().join("sample-data/stack"), &d.join("stack"));
        // the stack survey takes its Cp from ../calibration/ts-0417.toml
        copy_dir(
            &root().join("sample-data/calibration"),
            &d.join("calibration"),
        );
        let (code, out, err) = annulus_in(&d, &["keygen", "signer"]);
        assert_eq!(code, 0, "{err}");
        let signer_fingerprint = fingerprint_of(&out);
        let (code, out, err) = annulus_in(&d, &["keygen", "other"]);
        assert_eq!(code, 0, "{err}");
        let other_fingerprint = fingerprint_of(&out);
        let (d1, d2) = (d.clone(), d.clone());
        let signed = std::thread::spawn(move || {
            annulus_in(
                &d1,
                &[
                    "report",
                    "stack/survey.toml",
                    "-o",
                    "signed.pdf",
                    "--sign",
                    "signer.key",
                ],
            )
        });
        let unsigned = std::thread::spawn(move || {
            annulus_in(&d2, &["report", "stack/survey.toml", "-o", "unsigned.pdf"])
        });
        for h in [signed, unsigned] {
            let (code, _, err) = h.join().unwrap();
            assert_eq!(code, 0, "{err}");
        }
        Fixture {
            signed: std::fs::read(d.join("signed.pdf")).unwrap(),
            unsigned: std::fs::read(d.join("unsigned.pdf")).unwrap(),
            dir,
            signer_fingerprint,
            other_fingerprint,
        }
    })
}

// ---- PDF surgery (lopdf): what someone editing a report's attachments would do ----

/// Attachment name → object id of its embedded-file stream.
fn attachment_streams(doc: &Document) -> BTreeMap<String, ObjectId> {
    let mut out = BTreeMap::new();
    let catalog = doc.catalog().unwrap();
    let names = catalog.get_deref(b"Names", doc).unwrap().as_dict().unwrap();
    let tree = names.get(b"EmbeddedFiles").unwrap();
    let mut pending: Vec<Object> = vec![tree.clone()];
    while let Some(node) = pending.pop() {
        let (_, node) = doc.dereference(&node).unwrap();
        let node = node.as_dict().unwrap();
        if let Ok(kids) = node.get_deref(b"Kids", doc) {
            pending.extend(kids.as_array().unwrap().iter().cloned());
        }
        if let Ok(pairs) = node.get_deref(b"Names", doc) {
            for pair in pairs.as_array().unwrap().chunks(2) {
                let key = match doc.dereference(&pair[0]).unwrap().1 {
                    Object::String(s, _) => String::from_utf8_lossy(s).into_owned(),
                    other => panic!("name-tree key {other:?}"),
                };
                let spec = doc.dereference(&pair[1]).unwrap().1.as_dict().unwrap();
                let ef = spec.get_deref(b"EF", doc).unwrap().as_dict().unwrap();
                let stream = ef.get(b"F").unwrap().as_reference().unwrap();
                out.insert(key, stream);
            }
        }
    }
    out
}

/// The `Names` array of the embedded-files name tree (a flat tree, as the reports have), wherever
/// it sits: each step may be an indirect object or inline in its parent.
fn names_array_mut(doc: &mut Document) -> &mut Vec<Object> {
    let mut holder = doc.trailer.get(b"Root").unwrap().as_reference().unwrap();
    let mut inline: Vec<&[u8]> = Vec::new();
    for key in [b"Names".as_slice(), b"EmbeddedFiles", b"Names"] {
        let next = {
            let mut o = doc.get_object(holder).unwrap();
            for k in &inline {
                o = o.as_dict().unwrap().get(k).unwrap();
            }
            match o.as_dict().unwrap().get(key).unwrap() {
                Object::Reference(id) => Some(*id),
                _ => None,
            }
        };
        match next {
            Some(id) => {
                holder = id;
                inline.clear();
            }
            None => inline.push(key),
        }
    }
    let mut o = doc.get_object_mut(holder).unwrap();
    for k in inline {
        o = o.as_dict_mut().unwrap().get_mut(k).unwrap();
    }
    o.as_array_mut().unwrap()
}

fn load(pdf: &[u8]) -> Document {
    Document::load_mem(pdf).unwrap()
}

fn save(mut doc: Document) -> Vec<u8> {
    let mut v = Vec::new();
    doc.save_to(&mut v).unwrap();
    v
}

fn attachment(pdf: &[u8], name: &str) -> Vec<u8> {
    let doc = load(pdf);
    let streams = attachment_streams(&doc);
    let id = streams[name];
    doc.get_object(id)
        .unwrap()
        .as_stream()
        .unwrap()
        .get_plain_content()
        .unwrap()
}

/// The PDF with attachment `name` replaced by `bytes` (nothing else touched).
fn with_attachment(pdf: &[u8], name: &str, bytes: Vec<u8>) -> Vec<u8> {
    let mut doc = load(pdf);
    let streams = attachment_streams(&doc);
    let id = *streams.get(name).unwrap_or_else(|| panic!("no {name}"));
    doc.get_object_mut(id)
        .unwrap()
        .as_stream_mut()
        .unwrap()
        .set_plain_content(bytes);
    save(doc)
}

/// The PDF with two attachments' contents exchanged.
fn swapped(pdf: &[u8], a: &str, b: &str) -> Vec<u8> {
    let (ba, bb) = (attachment(pdf, a), attachment(pdf, b));
    with_attachment(&with_attachment(pdf, a, bb), b, ba)
}

/// The PDF with one more embedded file, listed in the name tree.
fn with_extra(pdf: &[u8], name: &str, bytes: &[u8]) -> Vec<u8> {
    let mut doc = load(pdf);
    let stream = doc.add_object(Stream::new(
        dictionary! { "Type" => "EmbeddedFile" },
        bytes.to_vec(),
    ));
    let spec = doc.add_object(dictionary! {
        "Type" => "Filespec",
        "F" => Object::string_literal(name),
        "UF" => Object::string_literal(name),
        "Desc" => Object::string_literal("added later"),
        "EF" => dictionary! { "F" => stream },
    });
    let names = names_array_mut(&mut doc);
    names.push(Object::string_literal(name));
    names.push(Object::Reference(spec));
    save(doc)
}

/// A plain PDF with one empty page and no attachments.
fn plain_pdf() -> Vec<u8> {
    let mut doc = Document::with_version("1.7");
    let pages_id = doc.new_object_id();
    let page = doc.add_object(dictionary! {
        "Type" => "Page",
        "Parent" => pages_id,
        "MediaBox" => vec![0.into(), 0.into(), 595.into(), 842.into()],
    });
    doc.objects.insert(
        pages_id,
        Object::Dictionary(dictionary! {
            "Type" => "Pages",
            "Kids" => vec![page.into()],
            "Count" => 1,
        }),
    );
    let catalog = doc.add_object(dictionary! { "Type" => "Catalog", "Pages" => pages_id });
    doc.trailer.set("Root", catalog);
    save(doc)
}

/// Writes `pdf` to a fresh temporary folder and runs `annulus verify` on it.
fn verify(pdf: &[u8], extra: &[&str]) -> (i32, String, String) {
    let f = fixture();
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("r.pdf"), pdf).unwrap();
    for k in ["signer.pub", "other.pub"] {
        std::fs::copy(f.path().join(k), dir.path().join(k)).unwrap();
    }
    let mut args = vec!["verify", "r.pdf"];
    args.extend_from_slice(extra);
    annulus_in(dir.path(), &args)
}

fn edit_text(bytes: &[u8], from: &str, to: &str) -> Vec<u8> {
    let t = String::from_utf8(bytes.to_vec()).unwrap();
    assert!(t.contains(from), "`{from}` not in the file");
    t.replacen(from, to, 1).into_bytes()
}

// ---- keygen ----

#[test]
fn keygen_writes_an_owner_only_secret_and_never_overwrites() {
    let dir = tempfile::tempdir().unwrap();
    let (code, out, err) = annulus_in(dir.path(), &["keygen", "dana"]);
    assert_eq!(code, 0, "{err}");
    let public =
        PublicKey::parse(&std::fs::read_to_string(dir.path().join("dana.pub")).unwrap()).unwrap();
    assert_eq!(fingerprint_of(&out), public.fingerprint());
    let secret = std::fs::read(dir.path().join("dana.key")).unwrap();
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        let mode = |n: &str| {
            std::fs::metadata(dir.path().join(n))
                .unwrap()
                .permissions()
                .mode()
                & 0o777
        };
        assert_eq!(mode("dana.key"), 0o600);
        assert_eq!(mode("dana.pub"), 0o644);
    }
    // a second run refuses and leaves both files as they were
    let (code, _, err) = annulus_in(dir.path(), &["keygen", "dana"]);
    assert_eq!(code, 1);
    assert!(err.contains("already exists"), "{err}");
    assert_eq!(std::fs::read(dir.path().join("dana.key")).unwrap(), secret);
    // an existing .pub alone also blocks, and no .key is left behind
    std::fs::write(dir.path().join("solo.pub"), "x").unwrap();
    let (code, _, _) = annulus_in(dir.path(), &["keygen", "solo"]);
    assert_eq!(code, 1);
    assert!(!dir.path().join("solo.key").exists());
}

// ---- verify ----

#[test]
fn an_untouched_signed_report_verifies() {
    let f = fixture();
    let (code, out, err) = verify(&f.signed, &["--key", "signer.pub"]);
    assert_eq!(code, 0, "{out}{err}");
    assert!(out.contains("verdict: pass"), "{out}");
    assert!(
        out.contains(&format!(
            "valid Ed25519 signature of the manifest by key {}",
            f.signer_fingerprint
        )),
        "{out}"
    );
    for part in [
        "survey.toml (survey)",
        "run1.csv (readings)",
        "results.json (results)",
    ] {
        let line = out.lines().find(|l| l.contains(part)).unwrap_or("");
        assert!(line.starts_with("pass"), "{part}: {out}");
    }
    // without --key it verifies too, and JSON says so
    let (code, json, _) = verify(&f.signed, &["--format", "json"]);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    assert_eq!(v["verified"], true);
    assert_eq!(v["recomputation"]["state"], "matches");
    assert_eq!(v["signature"]["state"], "valid");
}

#[test]
fn an_unsigned_report_is_reported_as_unsigned() {
    let (code, out, _) = verify(&fixture().unsigned, &[]);
    assert_eq!(code, 0, "{out}");
    assert!(out.contains("unsigned (no signature embedded)"), "{out}");
    let (code, csv, _) = verify(&fixture().unsigned, &["--format", "csv"]);
    assert_eq!(code, 0);
    assert!(csv.starts_with("part,role,result,finding\n"), "{csv}");
    assert!(csv.contains("\nrun1.csv,readings,pass,"), "{csv}");
}

#[test]
fn an_edited_reading_is_named_and_its_effect_listed() {
    let f = fixture();
    let csv = attachment(&f.signed, "run2.csv");
    let pdf = with_attachment(
        &f.signed,
        "run2.csv",
        edit_text(&csv, "A,2,0.490,", "A,2,0.590,"),
    );
    let (code, out, _) = verify(&pdf, &["--key", "signer.pub"]);
    assert_eq!(code, 3, "{out}");
    let line = out
        .lines()
        .find(|l| l.contains("run2.csv (readings)"))
        .unwrap();
    assert!(
        line.starts_with("fail") && line.contains("changed"),
        "{line}"
    );
    assert!(out.contains("runs[1].actual_flow_m3_s: embedded"), "{out}");
    // the signature still matches the manifest: it is the files that changed
    assert!(out.contains("valid Ed25519 signature"), "{out}");
    // the readings edit changes run 2's results (and the average), never runs 1 or 3
    let paths = differing_paths(&pdf);
    for p in [
        "runs[1].points[1].dp_pa",
        "runs[1].mean_velocity_m_s",
        "average.actual_flow_m3_s",
    ] {
        assert!(paths.iter().any(|x| x == p), "{p} not in {paths:?}");
    }
    assert!(
        !paths
            .iter()
            .any(|p| p.starts_with("runs[0].") || p.starts_with("runs[2].")),
        "{paths:?}"
    );
}

/// The differing paths `verify --format json` lists.
fn differing_paths(pdf: &[u8]) -> Vec<String> {
    let (code, json, _) = verify(pdf, &["--format", "json"]);
    assert_eq!(code, 3);
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    assert_eq!(v["recomputation"]["state"], "differs");
    v["recomputation"]["differences"]
        .as_array()
        .unwrap()
        .iter()
        .map(|d| d["path"].as_str().unwrap().to_string())
        .collect()
}

#[test]
fn an_edited_survey_value_is_named() {
    let f = fixture();
    let survey = attachment(&f.signed, "survey.toml");
    let pdf = with_attachment(
        &f.signed,
        "survey.toml",
        edit_text(
            &survey,
            "barometric = \"29.62 inHg\"",
            "barometric = \"29.92 inHg\"",
        ),
    );
    let (code, out, _) = verify(&pdf, &[]);
    assert_eq!(code, 3, "{out}");
    let line = out
        .lines()
        .find(|l| l.contains("survey.toml (survey)"))
        .unwrap();
    assert!(
        line.starts_with("fail") && line.contains("changed"),
        "{line}"
    );
    let paths = differing_paths(&pdf);
    for run in 0..3 {
        let p = format!("runs[{run}].mean_velocity_m_s");
        assert!(paths.contains(&p), "{p} not in {paths:?}");
    }
}

#[test]
fn an_edited_calibration_record_is_named() {
    // the stack survey takes its Cp from the embedded calibration; a changed reading changes Cp
    let f = fixture();
    let csv = attachment(&f.unsigned, "ts-0417.csv");
    let pdf = with_attachment(
        &f.unsigned,
        "ts-0417.csv",
        edit_text(&csv, "A,0.570,0.790,", "A,0.570,0.690,"),
    );
    let (code, out, _) = verify(&pdf, &[]);
    assert_eq!(code, 3, "{out}");
    let line = out
        .lines()
        .find(|l| l.contains("ts-0417.csv (calibration-readings)"))
        .unwrap();
    assert!(
        line.starts_with("fail") && line.contains("changed"),
        "{line}"
    );
    assert!(out.contains("runs[0].mean_velocity_m_s: embedded"), "{out}");
}

fn doctored_results(pdf: &[u8]) -> (Vec<u8>, f64, f64) {
    let bytes = attachment(pdf, "results.json");
    let mut v: serde_json::Value = serde_json::from_slice(&bytes).unwrap();
    let was = v["runs"][1]["dry_standard_flow_m3_s"].as_f64().unwrap();
    let now = was * 1.005;
    v["runs"][1]["dry_standard_flow_m3_s"] = serde_json::json!(now);
    let mut text = serde_json::to_string_pretty(&v).unwrap();
    text.push('\n');
    (text.into_bytes(), was, now)
}

#[test]
fn an_edited_results_number_is_named_with_both_values() {
    let f = fixture();
    let (results, was, now) = doctored_results(&f.signed);
    let pdf = with_attachment(&f.signed, "results.json", results);
    let (code, out, _) = verify(&pdf, &[]);
    assert_eq!(code, 3, "{out}");
    assert!(
        out.contains(&format!(
            "runs[1].dry_standard_flow_m3_s: embedded {now}, recomputed {was}"
        )),
        "{out}"
    );
    let line = out
        .lines()
        .find(|l| l.contains("results.json (results)"))
        .unwrap();
    assert!(line.starts_with("fail"), "{line}");
    assert!(out.contains("1 of "), "exactly one value differs: {out}");
}

#[test]
fn a_rehashed_manifest_breaks_the_signature() {
    // The forger edits a number and updates the manifest so every hash matches again.
    let f = fixture();
    let (results, was, now) = doctored_results(&f.signed);
    let mut manifest = Manifest::parse(&attachment(&f.signed, MANIFEST_NAME)).unwrap();
    for e in &mut manifest.files {
        if e.name == "results.json" {
            *e = Manifest::entry(&e.name, &e.path, &e.role, &results);
        }
    }
    let pdf = with_attachment(&f.signed, "results.json", results);
    let pdf = with_attachment(&pdf, MANIFEST_NAME, manifest.canonical_bytes());
    let (code, out, _) = verify(&pdf, &["--key", "signer.pub"]);
    assert_eq!(code, 3, "{out}");
    let line = out
        .lines()
        .find(|l| l.contains("results.json (results)"))
        .unwrap();
    assert!(
        line.starts_with("pass"),
        "hashes were made to match: {line}"
    );
    assert!(
        out.contains(&format!(
            "runs[1].dry_standard_flow_m3_s: embedded {now}, recomputed {was}"
        )),
        "{out}"
    );
    assert!(out.contains("does not match this manifest"), "{out}");
}

#[test]
fn swapped_and_added_attachments_are_named() {
    let f = fixture();
    let pdf = swapped(&f.signed, "run1.csv", "run3.csv");
    let (code, out, _) = verify(&pdf, &[]);
    assert_eq!(code, 3, "{out}");
    for name in ["run1.csv (readings)", "run3.csv (readings)"] {
        let line = out.lines().find(|l| l.contains(name)).unwrap();
        assert!(
            line.starts_with("fail") && line.contains("changed"),
            "{line}"
        );
    }
    let line = out.lines().find(|l| l.contains("run2.csv")).unwrap();
    assert!(line.starts_with("pass"), "{line}");

    let pdf = with_extra(&f.signed, "run4.csv", b"line,point,dp[inH2O]\nA,1,0.5\n");
    let (code, out, _) = verify(&pdf, &[]);
    assert_eq!(code, 3, "{out}");
    let line = out.lines().find(|l| l.contains("run4.csv")).unwrap();
    assert!(
        line.starts_with("fail") && line.contains("not listed in the manifest"),
        "{line}"
    );
}

#[test]
fn a_signature_by_another_key_names_both_keys() {
    let f = fixture();
    let (code, out, _) = verify(&f.signed, &["--key", "other.pub"]);
    assert_eq!(code, 3, "{out}");
    assert!(
        out.contains(&format!(
            "signed by another key: the signature is by {}, the given key is {}",
            f.signer_fingerprint, f.other_fingerprint
        )),
        "{out}"
    );
}

#[test]
fn an_unsigned_report_presented_as_signed_fails() {
    let (code, out, _) = verify(&fixture().unsigned, &["--key", "signer.pub"]);
    assert_eq!(code, 3, "{out}");
    assert!(
        out.contains("presented as signed but carries no signature"),
        "{out}"
    );
}

#[test]
fn other_pdfs_and_other_files_are_not_reports() {
    let (code, out, err) = verify(&plain_pdf(), &[]);
    assert_eq!(code, 1, "{out}{err}");
    assert_eq!(out, "");
    assert!(err.contains("not an annulus report"), "{err}");
    let (code, _, err) = verify(b"line,point,dp[inH2O]\nA,1,0.5\n", &[]);
    assert_eq!(code, 1);
    assert!(err.contains("not a PDF"), "{err}");
    // a report stripped of its manifest is no longer recognisable as ours
    let f = fixture();
    let mut doc = load(&f.signed);
    let names = names_array_mut(&mut doc);
    let at = names
        .iter()
        .position(|o| matches!(o, Object::String(s, _) if s == MANIFEST_NAME.as_bytes()))
        .unwrap();
    names.drain(at..at + 2);
    let (code, _, err) = verify(&save(doc), &[]);
    assert_eq!(code, 1);
    assert!(err.contains("no `annulus-manifest.json`"), "{err}");
}

// ---- review ----

/// Run 1 velocity of the stack sample as reported with the static pressure added without the ÷13.6
/// inH2O→inHg conversion: EPA Method 2 eq. 2-9 gives v ∝ 1/√Ps, Ps = Pbar + Pg/13.6 (derived).
fn static_mistake_velocity_ft_s(dir: &Path) -> f64 {
    let (code, json, err) = annulus_in(dir, &["compute", "good/survey.toml", "--format", "json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    let correct_ft_s = v["runs"][0]["mean_velocity_m_s"].as_f64().unwrap() / 0.3048;
    // sample-data/stack/survey.toml: barometric 29.62 inHg, static −0.85 inH2O
    let right: f64 = 29.62 - 0.85 / 13.6;
    let wrong = 29.62 - 0.85;
    correct_ft_s * (right / wrong).sqrt()
}

#[test]
fn review_reports_every_kind_of_file_and_names_the_mistake() {
    let f = fixture();
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("archive");
    let stack = root().join("sample-data/stack");
    copy_dir(&stack, &a.join("good"));
    // the calibration record the stack surveys name (a TOML file that is not a survey: skipped)
    copy_dir(
        &root().join("sample-data/calibration"),
        &a.join("calibration"),
    );
    copy_dir(&root().join("sample-data/hvac"), &a.join("hvac"));
    // bad input: a typo in a readings cell
    copy_dir(&stack, &a.join("bad"));
    let csv = std::fs::read(a.join("bad/run2.csv")).unwrap();
    std::fs::write(
        a.join("bad/run2.csv"),
        edit_text(&csv, "A,2,0.490,", "A,2,0.49O,"),
    )
    .unwrap();
    // corrupted files
    std::fs::create_dir_all(a.join("junk")).unwrap();
    std::fs::write(a.join("junk/garbled.toml"), [0xff, 0xfe, 0x00, 0x5b]).unwrap();
    std::fs::write(a.join("junk/half.pdf"), &f.signed[..f.signed.len() / 2]).unwrap();
    // other TOML: skipped, not failed
    std::fs::write(
        a.join("junk/probe-cal.toml"),
        "[calibration]\nserial = \"TS-0417\"\n",
    )
    .unwrap();
    // a survey whose reported velocity carries a known mistake
    copy_dir(&stack, &a.join("doctored"));
    let wrong = static_mistake_velocity_ft_s(&a);
    let survey = std::fs::read_to_string(a.join("doctored/survey.toml")).unwrap();
    std::fs::write(
        a.join("doctored/survey.toml"),
        format!("{survey}\n[reported.run.1]\nvelocity = \"{wrong:.2} ft/s\"\n"),
    )
    .unwrap();
    // reports: one good, one with an edited reading
    std::fs::create_dir_all(a.join("reports")).unwrap();
    std::fs::write(a.join("reports/good.pdf"), &f.signed).unwrap();
    let run2 = attachment(&f.signed, "run2.csv");
    std::fs::write(
        a.join("reports/tampered.pdf"),
        with_attachment(
            &f.signed,
            "run2.csv",
            edit_text(&run2, "A,2,0.490,", "A,2,0.590,"),
        ),
    )
    .unwrap();

    let (code, json, err) = annulus_in(dir.path(), &["review", "archive", "--format", "json"]);
    assert_eq!(code, 3, "{err}");
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    let files = v["files"].as_array().unwrap();
    let paths: Vec<&str> = files.iter().map(|f| f["path"].as_str().unwrap()).collect();
    let want = [
        "archive/bad/survey.toml",
        "archive/doctored/survey.toml",
        "archive/good/survey.toml",
        "archive/hvac/survey.toml",
        "archive/junk/garbled.toml",
        "archive/junk/half.pdf",
        "archive/reports/good.pdf",
        "archive/reports/tampered.pdf",
    ];
    assert_eq!(paths, want, "sorted by path");
    let get = |p: &str| files.iter().find(|f| f["path"] == p).unwrap();
    let status = |p: &str| get(p)["status"].as_str().unwrap().to_string();
    let first = |p: &str| get(p)["findings"][0].clone();

    assert_eq!(status("archive/good/survey.toml"), "pass");
    assert!(get("archive/good/survey.toml")["key_figure"]["shown"]
        .as_str()
        .unwrap()
        .ends_with("dscfm"));
    assert!(!get("archive/hvac/survey.toml")["status"]
        .as_str()
        .unwrap()
        .starts_with("fail"));
    assert_eq!(status("archive/bad/survey.toml"), "error");
    assert_eq!(first("archive/bad/survey.toml")["kind"], "bad-input");
    let msg = first("archive/bad/survey.toml")["message"]
        .as_str()
        .unwrap()
        .to_string();
    assert!(
        msg.contains("`0.49O`") && msg.contains("archive/bad/run2.csv:3:3"),
        "{msg}"
    );
    assert_eq!(status("archive/doctored/survey.toml"), "fail");
    let d = get("archive/doctored/survey.toml")["findings"]
        .as_array()
        .unwrap()
        .iter()
        .find(|n| n["kind"] == "discrepancy")
        .cloned()
        .unwrap();
    assert_eq!(d["scope"], "run 1");
    assert_eq!(d["mistake"]["id"], "static-without-13.6", "{d}");
    assert_eq!(status("archive/junk/garbled.toml"), "error");
    assert_eq!(first("archive/junk/garbled.toml")["kind"], "unreadable");
    assert_eq!(status("archive/junk/half.pdf"), "error");
    assert_eq!(first("archive/junk/half.pdf")["kind"], "not-a-report");
    assert_eq!(status("archive/reports/good.pdf"), "pass");
    assert_eq!(get("archive/reports/good.pdf")["verified"], true);
    assert_eq!(status("archive/reports/tampered.pdf"), "fail");
    assert_eq!(get("archive/reports/tampered.pdf")["verified"], false);
    assert!(get("archive/reports/tampered.pdf")["findings"]
        .to_string()
        .contains("run2.csv"));
    let skipped: Vec<&str> = v["skipped"]
        .as_array()
        .unwrap()
        .iter()
        .map(|s| s["path"].as_str().unwrap())
        .collect();
    assert_eq!(
        skipped,
        [
            "archive/calibration/ts-0417.toml",
            "archive/junk/probe-cal.toml"
        ]
    );
    assert_eq!(v["summary"]["error"], 3);

    // the table names the mistake in words; CSV has one row per file
    let (code, table, _) = annulus_in(dir.path(), &["review", "archive"]);
    assert_eq!(code, 3);
    assert!(table.contains("mistake static-without-13.6"), "{table}");
    assert!(
        table.contains("static pressure added without the ÷13.6"),
        "{table}"
    );
    assert!(table.contains("8 files reviewed"), "{table}");
    let (code, csv, _) = annulus_in(dir.path(), &["review", "archive", "--format", "csv"]);
    assert_eq!(code, 3);
    assert!(
        csv.starts_with("file,kind,status,convention,key_figure,key_figure_si,findings,mistakes\n")
    );
    assert_eq!(csv.lines().count(), 1 + want.len());

    // a folder of good files alone passes
    let (code, out, err) = annulus_in(dir.path(), &["review", "archive/good"]);
    assert_eq!(code, 0, "{out}{err}");
}
