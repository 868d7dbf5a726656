//! End-to-end: `annulus keygen`, `annulus verify` and `annulus review` run as the real binary on
//! copies of the sample data in temporary folders.
//!
//! Four reports are rendered once (in parallel) and shared through a `OnceLock`: the stack sample
//! signed by `dana-ferrow`, the same unsigned, the same signed by `erin-okafor`, and a variant of
//! the stack sample (another barometric pressure) signed by `dana-ferrow`. Every tampering case
//! rewrites a copy the way someone editing the PDF would: with lopdf (which rewrites the whole
//! file), or by appending an incremental update byte by byte, or by cutting it short.

mod common;
use annulus::archive::manifest::{Manifest, MANIFEST_NAME};
use annulus::archive::seal::{Seal, SEAL_NAME};
use annulus::archive::PublicKey;
use annulus::pdf::{Limits, Object as PObject, Pdf};
use common::root;
use lopdf::{dictionary, Document, Object, ObjectId, Stream};
use std::collections::BTreeMap;
use std::path::Path;
use std::process::Command;
use std::sync::OnceLock;

/// Runs the binary in `dir` with no user configuration (unless `config` names one).
fn annulus_cfg(dir: &Path, args: &[&str], config: &str) -> (i32, String, String) {
    // wide enough that no finding wraps: these tests read the words, not the layout
    let env = [("COLUMNS", Some("400")), ("ANNULUS_CONFIG", Some(config))];
    common::run(dir, args, &env)
}

fn annulus_in(dir: &Path, args: &[&str]) -> (i32, String, String) {
    annulus_cfg(dir, args, "")
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
    /// The stack sample signed by another key.
    other: Vec<u8>,
    /// A variant of the stack sample, signed by the same key as `signed`.
    signed2: Vec<u8>,
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
        copy_dir(&root().join("sample-data/stack"), &d.join("stack2"));
        let s = std::fs::read_to_string(d.join("stack2/survey.toml")).unwrap();
        std::fs::write(
            d.join("stack2/survey.toml"),
            s.replace("barometric = \"29.62 inHg\"", "barometric = \"29.48 inHg\""),
        )
        .unwrap();
        let (code, out, err) = annulus_in(&d, &["keygen", "dana-ferrow"]);
        assert_eq!(code, 0, "{err}");
        let signer_fingerprint = fingerprint_of(&out);
        let (code, out, err) = annulus_in(&d, &["keygen", "erin-okafor"]);
        assert_eq!(code, 0, "{err}");
        let other_fingerprint = fingerprint_of(&out);
        let jobs: Vec<(&str, Vec<&str>)> = vec![
            (
                "signed.pdf",
                vec!["stack/survey.toml", "--sign", "dana-ferrow.key"],
            ),
            ("unsigned.pdf", vec!["stack/survey.toml"]),
            (
                "other.pdf",
                vec!["stack/survey.toml", "--sign", "erin-okafor.key"],
            ),
            (
                "signed2.pdf",
                vec!["stack2/survey.toml", "--sign", "dana-ferrow.key"],
            ),
        ];
        let handles: Vec<_> = jobs
            .into_iter()
            .map(|(out, args)| {
                let d = d.clone();
                let mut a: Vec<String> = vec!["report".into()];
                a.extend(args.iter().map(|s| s.to_string()));
                a.push("-o".into());
                a.push(out.into());
                std::thread::spawn(move || {
                    let args: Vec<&str> = a.iter().map(String::as_str).collect();
                    annulus_in(&d, &args)
                })
            })
            .collect();
        for h in handles {
            let (code, _, err) = h.join().unwrap();
            assert_eq!(code, 0, "{err}");
        }
        let read = |n: &str| std::fs::read(d.join(n)).unwrap();
        Fixture {
            signed: read("signed.pdf"),
            unsigned: read("unsigned.pdf"),
            other: read("other.pdf"),
            signed2: read("signed2.pdf"),
            dir,
            signer_fingerprint,
            other_fingerprint,
        }
    })
}

// ---- PDF surgery: what someone editing a report would do ----

/// Attachment name → object id of its embedded-file stream.
fn attachment_streams(doc: &Document) -> BTreeMap<String, ObjectId> {
    let mut out = BTreeMap::new();
    let names = names_array(doc);
    for pair in names.chunks(2) {
        let key = match &pair[0] {
            Object::String(s, _) => String::from_utf8_lossy(s).into_owned(),
            other => panic!("name-tree key {other:?}"),
        };
        let spec = doc.dereference(&pair[1]).unwrap().1.as_dict().unwrap();
        let ef = spec.get_deref(b"EF", doc).unwrap().as_dict().unwrap();
        out.insert(key, ef.get(b"F").unwrap().as_reference().unwrap());
    }
    out
}

/// The `Names` array of the embedded-files name tree (a flat tree, inline in the catalog, as the
/// engine writes it).
fn names_array(doc: &Document) -> Vec<Object> {
    let catalog = doc.catalog().unwrap();
    let names = catalog.get_deref(b"Names", doc).unwrap().as_dict().unwrap();
    let tree = names
        .get_deref(b"EmbeddedFiles", doc)
        .unwrap()
        .as_dict()
        .unwrap();
    tree.get_deref(b"Names", doc)
        .unwrap()
        .as_array()
        .unwrap()
        .clone()
}

fn names_array_mut(doc: &mut Document) -> &mut Vec<Object> {
    let root = doc.trailer.get(b"Root").unwrap().as_reference().unwrap();
    let catalog = doc.get_object_mut(root).unwrap().as_dict_mut().unwrap();
    let names = catalog.get_mut(b"Names").unwrap().as_dict_mut().unwrap();
    let tree = names
        .get_mut(b"EmbeddedFiles")
        .unwrap()
        .as_dict_mut()
        .unwrap();
    tree.get_mut(b"Names").unwrap().as_array_mut().unwrap()
}

/// The PDF loaded with lopdf; the fixture's reports are loaded once and cloned (lopdf's parser is
/// slow in a debug build).
fn load(pdf: &[u8]) -> Document {
    type Loaded = std::sync::Mutex<Vec<(Vec<u8>, Document)>>;
    static CACHE: OnceLock<Loaded> = OnceLock::new();
    let cache = CACHE.get_or_init(Default::default);
    if let Some((_, d)) = cache.lock().unwrap().iter().find(|(b, _)| b == pdf) {
        return d.clone();
    }
    let d = Document::load_mem(pdf).unwrap();
    let f = fixture();
    if [&f.signed, &f.unsigned, &f.other, &f.signed2]
        .iter()
        .any(|b| b.as_slice() == pdf)
    {
        cache.lock().unwrap().push((pdf.to_vec(), d.clone()));
    }
    d
}

fn save(mut doc: Document) -> Vec<u8> {
    let mut v = Vec::new();
    doc.save_to(&mut v).unwrap();
    v
}

/// An attachment's bytes (read with the program's own reader, which is fast).
fn attachment(pdf: &[u8], name: &str) -> Vec<u8> {
    annulus::report::embedded_files(pdf)
        .unwrap()
        .into_iter()
        .find(|f| f.name == name)
        .unwrap_or_else(|| panic!("no attachment {name}"))
        .bytes
}

/// The PDF with attachment `name` replaced by `bytes` (nothing else touched).
fn with_attachment(pdf: &[u8], name: &str, bytes: Vec<u8>) -> Vec<u8> {
    with_attachments(pdf, &[(name, bytes)])
}

fn with_attachments(pdf: &[u8], files: &[(&str, Vec<u8>)]) -> Vec<u8> {
    let mut doc = load(pdf);
    let streams = attachment_streams(&doc);
    for (name, bytes) in files {
        let id = *streams
            .get(*name)
            .unwrap_or_else(|| panic!("no attachment {name}"));
        let s = doc.get_object_mut(id).unwrap().as_stream_mut().unwrap();
        s.dict.remove(b"Filter");
        s.set_plain_content(bytes.clone());
    }
    save(doc)
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

/// The PDF with attachment `name` dropped from the name tree.
fn without_attachment(pdf: &[u8], name: &str) -> Vec<u8> {
    let mut doc = load(pdf);
    let names = names_array_mut(&mut doc);
    let at = names
        .iter()
        .position(|o| matches!(o, Object::String(s, _) if s == name.as_bytes()))
        .unwrap();
    names.drain(at..at + 2);
    save(doc)
}

/// Page 1's content with one glyph of its first text run changed (a text edit in place).
fn edit_page_text(pdf: &[u8], page: u32) -> Vec<u8> {
    let mut doc = load(pdf);
    let id = doc.get_pages()[&page];
    let mut content = doc.get_page_content(id).unwrap();
    let bt = find(&content, b"BT").unwrap();
    let lt = bt + find(&content[bt..], b"<").unwrap();
    content[lt + 1] = if content[lt + 1] == b'0' { b'1' } else { b'0' };
    doc.change_page_content(id, content).unwrap();
    save(doc)
}

fn find(hay: &[u8], needle: &[u8]) -> Option<usize> {
    hay.windows(needle.len()).position(|w| w == needle)
}

/// An incremental update appended to `pdf` that replaces (or adds) the objects given.
fn append_update(pdf: &[u8], objects: &[(u32, Vec<u8>)]) -> Vec<u8> {
    let doc = Pdf::parse(pdf, Limits::default()).unwrap();
    let prev = doc.xref_offset();
    let t = doc.trailer();
    let size = t.get(b"Size").and_then(PObject::as_int).unwrap();
    let root = t.get(b"Root").and_then(PObject::as_ref).unwrap();
    let info = t.get(b"Info").and_then(PObject::as_ref).unwrap();
    let size = objects
        .iter()
        .map(|(n, _)| i64::from(*n) + 1)
        .max()
        .unwrap_or(0)
        .max(size);
    let mut out = pdf.to_vec();
    out.push(b'\n');
    let mut xref = String::from("xref\n");
    for (num, body) in objects {
        let at = out.len();
        out.extend_from_slice(format!("{num} 0 obj\n").as_bytes());
        out.extend_from_slice(body);
        out.extend_from_slice(b"\nendobj\n");
        xref += &format!("{num} 1\n{at:010} 00000 n\r\n");
    }
    let xref_at = out.len();
    out.extend_from_slice(xref.as_bytes());
    out.extend_from_slice(
        format!(
            "trailer\n<</Size {size}/Root {} 0 R/Info {} 0 R/Prev {prev}>>\nstartxref\n{xref_at}\n%%EOF\n",
            root.num, info.num
        )
        .as_bytes(),
    );
    out
}

/// Object number of page `n` (1-based) and its dictionary as written, from our own reader.
fn page_object(pdf: &[u8], n: usize) -> (u32, String) {
    let doc = load(pdf);
    let id = doc.get_pages()[&(n as u32)];
    let span = Pdf::parse(pdf, Limits::default())
        .unwrap()
        .object_span(id.0)
        .unwrap();
    let text = String::from_utf8_lossy(&pdf[span]).into_owned();
    let body = text[text.find("obj").unwrap() + 3..text.rfind("endobj").unwrap()]
        .trim()
        .to_string();
    (id.0, body)
}

/// Writes `pdf` to a fresh temporary folder beside copies of both public keys and runs
/// `annulus verify` on it.
fn verify(pdf: &[u8], extra: &[&str]) -> (i32, String, String) {
    let f = fixture();
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("r.pdf"), pdf).unwrap();
    for k in ["dana-ferrow.pub", "erin-okafor.pub"] {
        std::fs::copy(f.path().join(k), dir.path().join(k)).unwrap();
    }
    let mut args = vec!["verify", "r.pdf"];
    args.extend_from_slice(extra);
    annulus_in(dir.path(), &args)
}

/// `verify --format json` with the signer's key trusted.
fn verify_json(pdf: &[u8], extra: &[&str]) -> (i32, serde_json::Value) {
    let mut args = vec!["--format", "json"];
    args.extend_from_slice(extra);
    let (code, out, err) = verify(pdf, &args);
    let v = serde_json::from_str(&out).unwrap_or_else(|e| panic!("{e}: {out}{err}"));
    (code, v)
}

/// The changes `verify` names.
fn changes(v: &serde_json::Value) -> Vec<String> {
    v["changes"]
        .as_array()
        .unwrap()
        .iter()
        .map(|c| c["what"].as_str().unwrap().to_string())
        .collect()
}

/// Asserts a tampered report fails with content altered and `what` among the changes named.
fn assert_altered(pdf: &[u8], extra: &[&str], what: &[&str]) -> serde_json::Value {
    let (code, v) = verify_json(pdf, extra);
    assert_eq!(code, 3, "{v}");
    assert_eq!(v["content"], "altered", "{v}");
    assert_eq!(v["verified"], false);
    let named = changes(&v);
    for w in what {
        assert!(
            named.iter().any(|c| c.contains(w)),
            "`{w}` not named among {named:?}"
        );
    }
    v
}

const TRUST: [&str; 2] = ["--key", "dana-ferrow.pub"];

fn edit_text(bytes: &[u8], from: &str, to: &str) -> Vec<u8> {
    let t = String::from_utf8(bytes.to_vec()).unwrap();
    assert!(t.contains(from), "`{from}` not in the file");
    t.replacen(from, to, 1).into_bytes()
}

// ---- keygen ----

#[test]
fn keygen_writes_named_keys_an_owner_only_secret_and_never_overwrites() {
    let dir = tempfile::tempdir().unwrap();
    let (code, out, err) = annulus_in(dir.path(), &["keygen", "dana"]);
    assert_eq!(code, 0, "{err}");
    let text = std::fs::read_to_string(dir.path().join("dana.pub")).unwrap();
    assert!(text.contains("\nname: dana\n"), "{text}");
    let public = PublicKey::parse(&text).unwrap();
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

#[test]
fn a_bare_sign_option_takes_the_configured_key() {
    let dir = tempfile::tempdir().unwrap();
    copy_dir(&root().join("sample-data/stack"), &dir.path().join("stack"));
    // no configuration: a located refusal before anything is computed
    let (code, _, err) = annulus_in(
        dir.path(),
        &["report", "stack/survey.toml", "-o", "r.pdf", "--sign"],
    );
    assert_eq!(code, 1, "{err}");
    assert!(
        err.contains("no configuration names a `signing_key`"),
        "{err}"
    );
    assert!(!dir.path().join("r.pdf").exists());
    // a configuration whose key file is missing: the path it resolved to is named
    std::fs::write(
        dir.path().join("config.toml"),
        "signing_key = \"keys/me.key\"\n",
    )
    .unwrap();
    let cfg = dir.path().join("config.toml");
    let (code, _, err) = annulus_cfg(
        dir.path(),
        &["report", "stack/survey.toml", "-o", "r.pdf", "--sign"],
        cfg.to_str().unwrap(),
    );
    assert_eq!(code, 1, "{err}");
    assert!(err.contains("keys/me.key"), "{err}");
    // a broken configuration is a located error
    std::fs::write(&cfg, "signing_key = \"keys/me.key\"\ntrusts = \"x\"\n").unwrap();
    let (code, _, err) = annulus_cfg(dir.path(), &["verify", "r.pdf"], cfg.to_str().unwrap());
    assert_eq!(code, 1, "{err}");
    assert!(err.contains("config.toml:2:1"), "{err}");
}

// ---- verify: untouched reports ----

#[test]
fn an_untouched_signed_report_verifies_and_names_its_signer() {
    let f = fixture();
    let (code, out, err) = verify(&f.signed, &TRUST);
    assert_eq!(code, 0, "{out}{err}");
    assert!(
        out.contains(
            "verdict: verified — content intact, signature signed by dana-ferrow (trusted)"
        ),
        "{out}"
    );
    assert!(
        out.contains(&format!(
            "trusted: signed by dana-ferrow (key {}), a key in the trust list",
            f.signer_fingerprint
        )),
        "{out}"
    );
    for part in [
        "survey.toml (survey)",
        "run1.csv (readings)",
        "results.json (results)",
        "content intact",
    ] {
        let line = out
            .lines()
            .find(|l| {
                l.split_whitespace()
                    .skip(1)
                    .collect::<Vec<_>>()
                    .join(" ")
                    .starts_with(part)
            })
            .unwrap_or("");
        assert!(line.starts_with("pass"), "{part}: {out}");
    }
    let (code, v) = verify_json(&f.signed, &TRUST);
    assert_eq!(code, 0);
    assert_eq!(v["verified"], true);
    assert_eq!(v["content"], "intact");
    assert_eq!(v["pages"], "signed-seal");
    assert_eq!(v["signature"]["status"], "trusted");
    assert_eq!(v["signature"]["signer"], "dana-ferrow");
    assert_eq!(v["recomputation"]["state"], "matches");
    assert_eq!(v["rerendering"]["state"], "not-done");
    // the name shown on the page is the key's name
    let text = pdf_text(&f.signed);
    assert!(
        text.contains(&format!("dana-ferrow, key {}", f.signer_fingerprint)),
        "sign-off block: {}",
        &text[text.len().saturating_sub(1500)..]
    );
    // a trust folder and a trust list file work the same way
    let d = tempfile::tempdir().unwrap();
    std::fs::create_dir(d.path().join("trusted")).unwrap();
    std::fs::copy(
        f.path().join("dana-ferrow.pub"),
        d.path().join("trusted/dana-ferrow.pub"),
    )
    .unwrap();
    std::fs::write(d.path().join("r.pdf"), &f.signed).unwrap();
    let (code, out, err) = annulus_in(d.path(), &["verify", "r.pdf", "--trust", "trusted"]);
    assert_eq!(code, 0, "{out}{err}");
    let key = PublicKey::parse(&std::fs::read_to_string(f.path().join("dana-ferrow.pub")).unwrap())
        .unwrap();
    std::fs::write(
        d.path().join("office.toml"),
        format!(
            "[[key]]\nname = \"dana-ferrow\"\npublic_key = \"{}\"\n",
            key.to_hex()
        ),
    )
    .unwrap();
    let (code, out, _) = annulus_in(d.path(), &["verify", "r.pdf", "--trust", "office.toml"]);
    assert_eq!(code, 0, "{out}");
    // and from the configuration file
    std::fs::write(d.path().join("config.toml"), "trust = \"trusted\"\n").unwrap();
    let cfg = d.path().join("config.toml");
    let (code, out, _) = annulus_cfg(d.path(), &["verify", "r.pdf"], cfg.to_str().unwrap());
    assert_eq!(code, 0, "{out}");
    assert!(out.contains("signed by dana-ferrow (trusted)"), "{out}");
}

fn pdf_text(pdf: &[u8]) -> String {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("r.pdf");
    std::fs::write(&p, pdf).unwrap();
    let out = Command::new("pdftotext")
        .args([p.to_str().unwrap(), "-"])
        .output();
    match out {
        Ok(o) if o.status.success() => String::from_utf8_lossy(&o.stdout).into_owned(),
        // without poppler, fall back on the seal's record of who signed
        _ => String::from_utf8_lossy(&attachment(pdf, MANIFEST_NAME)).into_owned(),
    }
}

#[test]
fn a_report_signed_by_a_key_outside_the_trust_list_fails() {
    let f = fixture();
    let (code, v) = verify_json(&f.other, &TRUST);
    assert_eq!(code, 3, "{v}");
    assert_eq!(v["content"], "intact");
    assert_eq!(v["signature"]["status"], "unknown-key");
    assert_eq!(v["signature"]["signer"], serde_json::Value::Null);
    assert_eq!(v["signature"]["shown_name"], "erin-okafor");
    assert!(v["signature"]["detail"]
        .as_str()
        .unwrap()
        .contains(&f.other_fingerprint));
    // without any trust list it is reported, not failed; the pages are re-rendered to be sure
    let (code, out, _) = verify(&f.other, &["--rerender", "never"]);
    assert_eq!(code, 0, "{out}");
    assert!(
        out.contains("unknown-key: signed by a key not in any trust list"),
        "{out}"
    );
    // several --key options make one trust list
    let (code, v) = verify_json(
        &f.other,
        &["--key", "dana-ferrow.pub", "--key", "erin-okafor.pub"],
    );
    assert_eq!(code, 0, "{v}");
    assert_eq!(v["signature"]["signer"], "erin-okafor");
}

#[test]
fn an_unsigned_report_is_re_rendered_and_said_to_be_unsigned() {
    let f = fixture();
    let (code, v) = verify_json(&f.unsigned, &[]);
    assert_eq!(code, 0, "{v}");
    assert_eq!(v["signature"]["status"], "unsigned");
    assert_eq!(v["content"], "intact");
    assert_eq!(v["rerendering"]["state"], "matches", "{v}");
    assert_eq!(v["pages"], "rerendered");
    // with a trust list in force, an unsigned report does not count
    let (code, v) = verify_json(
        &f.unsigned,
        &["--key", "dana-ferrow.pub", "--rerender", "never"],
    );
    assert_eq!(code, 3);
    assert_eq!(v["signature"]["status"], "unsigned");
    let (code, csv, _) = verify(&f.unsigned, &["--format", "csv", "--rerender", "never"]);
    assert_eq!(code, 0);
    assert!(csv.starts_with("part,role,result,finding\n"), "{csv}");
    assert!(csv.contains("\nrun1.csv,readings,pass,"), "{csv}");
}

// ---- verify: every tamper case, each named ----

#[test]
fn page_text_edited_in_place_is_named() {
    let pdf = edit_page_text(&fixture().signed, 1);
    let v = assert_altered(&pdf, &TRUST, &["page 1 content"]);
    // nothing else was touched
    assert_eq!(changes(&v).len(), 1, "{:?}", changes(&v));
    // the signature itself is still good: it is the pages that changed
    assert_eq!(v["signature"]["status"], "trusted");
}

#[test]
fn page_text_edited_as_an_incremental_update_is_named() {
    let f = fixture();
    let doc = load(&f.signed);
    let page = doc.get_pages()[&1];
    let content_id = doc.get_page_contents(page)[0];
    let mut content = doc.get_page_content(page).unwrap();
    let lt = find(&content, b"<").unwrap();
    content[lt + 1] = if content[lt + 1] == b'0' { b'1' } else { b'0' };
    let mut body = format!("<</Length {}>>\nstream\n", content.len()).into_bytes();
    body.extend_from_slice(&content);
    body.extend_from_slice(b"\nendstream");
    let pdf = append_update(&f.signed, &[(content_id.0, body)]);
    assert_altered(
        &pdf,
        &TRUST,
        &[
            "an incremental update appended after the report's end of file",
            "page 1 content",
        ],
    );
}

#[test]
fn a_white_box_and_new_figure_appended_as_an_update_are_named() {
    let f = fixture();
    let (num, dict) = page_object(&f.signed, 1);
    let size = Pdf::parse(&f.signed, Limits::default())
        .unwrap()
        .trailer()
        .get(b"Size")
        .and_then(PObject::as_int)
        .unwrap() as u32;
    // a white rectangle over the headline and "83,249" drawn on it
    let overlay = b"q 1 1 1 rg 60 560 220 40 re f Q BT /Helv 18 Tf 70 575 Td (83,249 dscfm) Tj ET";
    let mut stream = format!("<</Length {}>>\nstream\n", overlay.len()).into_bytes();
    stream.extend_from_slice(overlay);
    stream.extend_from_slice(b"\nendstream");
    let contents_at = dict.find("/Contents").unwrap();
    let old = dict[contents_at..]
        .split_once(" R")
        .map(|(a, _)| format!("{a} R"))
        .unwrap();
    let new_dict = dict.replacen(
        &old,
        &format!("/Contents[{} {size} 0 R]", &old["/Contents".len()..]),
        1,
    );
    let pdf = append_update(&f.signed, &[(num, new_dict.into_bytes()), (size, stream)]);
    assert_altered(
        &pdf,
        &TRUST,
        &["an incremental update appended", "page 1 content"],
    );
}

#[test]
fn an_added_page_is_named() {
    let f = fixture();
    let mut doc = load(&f.signed);
    let pages = doc.get_pages();
    let added = format!("an added page {}", pages.len() + 1);
    let first = doc
        .get_object(pages[&1])
        .unwrap()
        .as_dict()
        .unwrap()
        .clone();
    let new_page = doc.add_object(first);
    let root = doc
        .catalog()
        .unwrap()
        .get(b"Pages")
        .unwrap()
        .as_reference()
        .unwrap();
    let tree = doc.get_object_mut(root).unwrap().as_dict_mut().unwrap();
    tree.get_mut(b"Kids")
        .unwrap()
        .as_array_mut()
        .unwrap()
        .push(Object::Reference(new_page));
    let count = tree.get(b"Count").unwrap().as_i64().unwrap();
    tree.set("Count", count + 1);
    let pdf = save(doc);
    let v = assert_altered(&pdf, &TRUST, &[&added]);
    assert_eq!(changes(&v), [added]);
}

#[test]
fn an_added_annotation_is_named() {
    let f = fixture();
    let mut doc = load(&f.signed);
    let page = doc.get_pages()[&2];
    let annot = doc.add_object(dictionary! {
        "Type" => "Annot",
        "Subtype" => "FreeText",
        "Rect" => vec![100.into(), 600.into(), 300.into(), 640.into()],
        "Contents" => Object::string_literal("Approved: 83,249 dscfm"),
        "DA" => Object::string_literal("/Helv 12 Tf 0 g"),
    });
    doc.get_object_mut(page)
        .unwrap()
        .as_dict_mut()
        .unwrap()
        .set("Annots", vec![Object::Reference(annot)]);
    let pdf = save(doc);
    let v = assert_altered(&pdf, &TRUST, &["an annotation on page 2"]);
    assert_eq!(changes(&v), ["an annotation on page 2"]);
}

#[test]
fn attachments_swapped_in_from_another_report_by_the_same_signer_are_named() {
    let f = fixture();
    let names: Vec<String> = attachment_streams(&load(&f.signed2)).into_keys().collect();
    let files: Vec<(&str, Vec<u8>)> = names
        .iter()
        .map(|n| (n.as_str(), attachment(&f.signed2, n)))
        .collect();
    let pdf = with_attachments(&f.signed, &files);
    // the seal is the other report's, validly signed by the same key: the pages are not its pages
    let v = assert_altered(
        &pdf,
        &TRUST,
        &["page 1 content", "document information: Subject"],
    );
    assert_eq!(v["signature"]["status"], "trusted", "{v}");
    // and when the seal is kept, every swapped file is named
    let files: Vec<(&str, Vec<u8>)> = files.into_iter().filter(|(n, _)| *n != SEAL_NAME).collect();
    let pdf = with_attachments(&f.signed, &files);
    assert_altered(
        &pdf,
        &TRUST,
        &[
            "embedded file `survey.toml`",
            "embedded file `annulus-manifest.json`",
            "the manifest is not the one the seal records",
        ],
    );
}

#[test]
fn author_and_date_edits_in_the_information_dictionary_and_xmp_are_named() {
    let f = fixture();
    let mut doc = load(&f.signed);
    let info = doc.trailer.get(b"Info").unwrap().as_reference().unwrap();
    let d = doc.get_object_mut(info).unwrap().as_dict_mut().unwrap();
    d.set("Author", Object::string_literal("Erin Okafor"));
    d.set("CreationDate", Object::string_literal("D:20261101000000Z"));
    let pdf = save(doc);
    let v = assert_altered(
        &pdf,
        &TRUST,
        &[
            "document information: Author",
            "document information: CreationDate",
        ],
    );
    assert_eq!(changes(&v).len(), 2, "{:?}", changes(&v));

    let mut doc = load(&f.signed);
    let meta = doc
        .catalog()
        .unwrap()
        .get(b"Metadata")
        .unwrap()
        .as_reference()
        .unwrap();
    let s = doc.get_object_mut(meta).unwrap().as_stream_mut().unwrap();
    let xmp = String::from_utf8(s.content.clone()).unwrap();
    assert!(xmp.contains("Dana Ferrow"), "{xmp}");
    s.set_content(xmp.replace("Dana Ferrow", "Erin Okafor").into_bytes());
    let pdf = save(doc);
    let v = assert_altered(&pdf, &TRUST, &["XMP metadata"]);
    assert_eq!(changes(&v), ["XMP metadata"]);
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
    let v = assert_altered(&pdf, &TRUST, &["embedded file `run2.csv`"]);
    assert_eq!(v["recomputation"]["state"], "differs");
    let paths: Vec<&str> = v["recomputation"]["differences"]
        .as_array()
        .unwrap()
        .iter()
        .map(|d| d["path"].as_str().unwrap())
        .collect();
    // the readings edit changes run 2's results (and the average), never runs 1 or 3
    for p in [
        "runs[1].points[1].dp_pa",
        "runs[1].mean_velocity_m_s",
        "average.actual_flow_m3_s",
    ] {
        assert!(paths.contains(&p), "{p} not in {paths:?}");
    }
    assert!(
        !paths
            .iter()
            .any(|p| p.starts_with("runs[0].") || p.starts_with("runs[2].")),
        "{paths:?}"
    );
    let (_, out, _) = verify(&pdf, &TRUST);
    let line = out
        .lines()
        .find(|l| l.contains("run2.csv (readings)"))
        .unwrap();
    assert!(
        line.starts_with("fail") && line.contains("changed"),
        "{line}"
    );
    assert!(out.contains("runs[1].actual_flow_m3_s: embedded"), "{out}");
}

#[test]
fn an_edited_survey_and_calibration_record_are_named() {
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
    let v = assert_altered(&pdf, &TRUST, &["embedded file `survey.toml`"]);
    let text = v["recomputation"].to_string();
    // the sample's runs 2 and 3 give their own barometric pressure: the edit of [gas] changes
    // run 1 only
    assert!(text.contains("runs[0].mean_velocity_m_s"), "{text}");
    for run in 1..3 {
        let p = format!("runs[{run}].mean_velocity_m_s");
        assert!(!text.contains(&p), "{p} in {text}");
    }
    let csv = attachment(&f.signed, "ts-0417.csv");
    let pdf = with_attachment(
        &f.signed,
        "ts-0417.csv",
        edit_text(&csv, "A,0.570,0.790,", "A,0.570,0.690,"),
    );
    let v = assert_altered(&pdf, &TRUST, &["embedded file `ts-0417.csv`"]);
    assert!(v["recomputation"]
        .to_string()
        .contains("runs[0].mean_velocity_m_s"));
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
fn edited_results_are_named_with_both_values_even_when_rehashed() {
    let f = fixture();
    let (results, was, now) = doctored_results(&f.signed);
    let pdf = with_attachment(&f.signed, "results.json", results.clone());
    let (code, out, _) = verify(&pdf, &TRUST);
    assert_eq!(code, 3, "{out}");
    assert!(
        out.contains(&format!(
            "runs[1].dry_standard_flow_m3_s: embedded {now}, recomputed {was}"
        )),
        "{out}"
    );
    assert!(out.contains("1 of "), "exactly one value differs: {out}");
    // the forger updates the manifest so every hash matches again: the seal still names it
    let mut manifest = Manifest::parse(&attachment(&f.signed, MANIFEST_NAME)).unwrap();
    for e in &mut manifest.files {
        if e.name == "results.json" {
            *e = Manifest::entry(&e.name, &e.path, &e.role, &results);
        }
    }
    let pdf = with_attachments(
        &f.signed,
        &[
            ("results.json", results),
            (MANIFEST_NAME, manifest.canonical_bytes()),
        ],
    );
    let v = assert_altered(
        &pdf,
        &TRUST,
        &[
            "the manifest is not the one the seal records",
            "embedded file `results.json`",
        ],
    );
    let files = v["files"].as_array().unwrap();
    let r = files.iter().find(|x| x["name"] == "results.json").unwrap();
    assert_eq!(r["state"], "intact", "hashes were made to match: {r}");
}

#[test]
fn swapped_and_added_attachments_are_named() {
    let f = fixture();
    let (a, b) = (
        attachment(&f.signed, "run1.csv"),
        attachment(&f.signed, "run3.csv"),
    );
    let pdf = with_attachments(&f.signed, &[("run1.csv", b), ("run3.csv", a)]);
    let v = assert_altered(
        &pdf,
        &TRUST,
        &["embedded file `run1.csv`", "embedded file `run3.csv`"],
    );
    assert!(!changes(&v).iter().any(|c| c.contains("run2.csv")));
    let pdf = with_extra(&f.signed, "run4.csv", b"line,point,dp[inH2O]\nA,1,0.5\n");
    assert_altered(
        &pdf,
        &TRUST,
        &[
            "embedded file `run4.csv` (added)",
            "not listed in the manifest",
        ],
    );
}

#[test]
fn a_seal_re_signed_with_another_key_is_invalid() {
    let f = fixture();
    let mut seal = Seal::parse(&attachment(&f.signed, SEAL_NAME)).unwrap();
    let other = std::fs::read_to_string(f.path().join("erin-okafor.key")).unwrap();
    let other = annulus::archive::SecretKey::parse(&other).unwrap();
    let sig = seal.signature.as_mut().unwrap();
    sig.public_key = other.public().to_hex();
    sig.value = annulus::archive::hex(&other.sign(&seal.payload.signed_bytes()));
    let pdf = with_attachment(&f.signed, SEAL_NAME, seal.to_bytes());
    let (code, v) = verify_json(
        &pdf,
        &["--key", "dana-ferrow.pub", "--key", "erin-okafor.pub"],
    );
    assert_eq!(code, 3, "{v}");
    assert_eq!(v["content"], "intact");
    assert_eq!(v["signature"]["status"], "invalid");
    let detail = v["signature"]["detail"].as_str().unwrap();
    assert!(
        detail.contains(&format!("the signature is by key {}", f.other_fingerprint))
            && detail.contains("names `dana-ferrow`"),
        "{detail}"
    );
}

#[test]
fn a_removed_signature_is_named() {
    let f = fixture();
    // the signature taken out of the seal
    let mut seal = Seal::parse(&attachment(&f.signed, SEAL_NAME)).unwrap();
    seal.signature = None;
    let pdf = with_attachment(&f.signed, SEAL_NAME, seal.to_bytes());
    let (code, v) = verify_json(&pdf, &["--rerender", "never"]);
    assert_eq!(code, 3, "{v}");
    assert_eq!(v["signature"]["status"], "invalid");
    assert!(v["signature"]["detail"]
        .as_str()
        .unwrap()
        .contains("names signer `dana-ferrow`"));
    assert!(v["signature"]["detail"]
        .as_str()
        .unwrap()
        .contains("it was removed"));
    // the whole seal taken out
    let pdf = without_attachment(&f.signed, SEAL_NAME);
    let v = assert_altered(
        &pdf,
        &["--rerender", "never"],
        &["the document seal `annulus-seal.json` was removed"],
    );
    assert_eq!(v["signature"]["status"], "invalid");
}

#[test]
fn a_truncated_report_is_damaged_and_fails() {
    let f = fixture();
    for cut in [f.signed.len() / 2, f.signed.len() - 100] {
        let (code, out, err) = verify(&f.signed[..cut], &[]);
        assert_eq!(code, 3, "{out}{err}");
        assert!(out.contains("damaged"), "{out}");
        assert!(!err.contains("not a PDF"), "{err}");
        let (_, v) = verify_json(&f.signed[..cut], &[]);
        assert_eq!(v["content"], "damaged");
    }
}

#[test]
fn an_unsigned_report_whose_page_and_seal_were_both_remade_is_caught_by_re_rendering() {
    // The headline attack on an unsigned report: edit a page and recompute the seal so the
    // digests match again. Only re-rendering from the embedded inputs can tell.
    let f = fixture();
    let edited = edit_page_text(&f.unsigned, 1);
    let doc = Pdf::parse(&edited, Limits::default()).unwrap();
    let parts = annulus::pdf::parts::document_parts(&doc, SEAL_NAME).unwrap();
    let mut seal = Seal::parse(&attachment(&f.unsigned, SEAL_NAME)).unwrap();
    seal.payload.document = parts;
    let forged = with_attachment(&edited, SEAL_NAME, seal.to_bytes());
    // the seal alone is fooled …
    let (code, v) = verify_json(&forged, &["--rerender", "never"]);
    assert_eq!(code, 0, "{v}");
    assert_eq!(v["pages"], "unsigned-seal");
    // … the re-render is not
    let v = assert_altered(
        &forged,
        &[],
        &["page 1 content (differs from what the embedded inputs render to)"],
    );
    assert_eq!(v["rerendering"]["state"], "differs");
}

#[test]
fn other_pdfs_and_other_files_are_not_reports() {
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
    let (code, out, err) = verify(&save(doc), &[]);
    assert_eq!(code, 1, "{out}{err}");
    assert_eq!(out, "");
    assert!(err.contains("not an annulus report"), "{err}");
    let (code, _, err) = verify(b"line,point,dp[inH2O]\nA,1,0.5\n", &[]);
    assert_eq!(code, 1);
    assert!(err.contains("not a PDF"), "{err}");
}

// ---- hostile PDFs ----

#[test]
fn hostile_pdfs_cost_bounded_time_and_end_in_a_clear_verdict() {
    let f = fixture();
    // an attachment that inflates far beyond the cap: 64 MiB of zeros in about 64 KiB
    let bomb = zlib_zeros(80 << 20);
    let mut doc = load(&f.signed);
    let id = attachment_streams(&doc)["run1.csv"];
    let s = doc.get_object_mut(id).unwrap().as_stream_mut().unwrap();
    s.dict.set("Filter", "FlateDecode");
    s.set_content(bomb);
    let pdf = save(doc);
    let t = std::time::Instant::now();
    let (code, out, err) = verify(&pdf, &["--rerender", "never"]);
    assert!(
        t.elapsed() < std::time::Duration::from_secs(20),
        "{:?}",
        t.elapsed()
    );
    assert_eq!(code, 3, "{out}{err}");
    assert!(
        out.contains("damaged") && out.contains("inflates beyond the cap of 64 MiB"),
        "{out}"
    );
    // random corruption anywhere: a verdict or a refusal, never a crash, always quickly
    let mut x: u64 = 0x9e37_79b9_7f4a_7c15;
    let t = std::time::Instant::now();
    for _ in 0..12 {
        let mut b = f.signed.clone();
        for _ in 0..8 {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            let at = (x as usize) % b.len();
            b[at] = (x >> 32) as u8;
        }
        let list = annulus::archive::trust::TrustList::new();
        let mut o = annulus::archive::verify::VerifyOptions::open(&list);
        o.rerender = annulus::archive::verify::RerenderPolicy::Never;
        let _ = annulus::archive::verify::verify(&b, &o);
    }
    assert!(
        t.elapsed() < std::time::Duration::from_secs(60),
        "{:?}",
        t.elapsed()
    );
}

/// A zlib stream that inflates to `n` zero bytes (`n` a multiple of 258), written by hand so the
/// test does not have to compress the zeros: one fixed-Huffman block (RFC 1951 §3.2.6) of a
/// literal 0 followed by length-258, distance-1 matches, then the Adler-32 of `n` zeros
/// (RFC 1950 §8: a = 1, b = n mod 65521).
fn zlib_zeros(n: usize) -> Vec<u8> {
    struct Bits {
        out: Vec<u8>,
        bit: u32,
    }
    impl Bits {
        fn push(&mut self, b: u32) {
            if self.bit == 0 {
                self.out.push(0);
            }
            *self.out.last_mut().unwrap() |= (b as u8) << self.bit;
            self.bit = (self.bit + 1) % 8;
        }
        /// A Huffman code, most significant bit first.
        fn code(&mut self, c: u32, len: u32) {
            for i in (0..len).rev() {
                self.push((c >> i) & 1);
            }
        }
    }
    let mut w = Bits {
        out: vec![0x78, 0x01],
        bit: 0,
    };
    w.push(1); // BFINAL
    w.push(1); // BTYPE = 01 (fixed Huffman), least significant bit first
    w.push(0);
    w.code(0x30, 8); // literal 0
    let matches = (n - 1) / 258;
    for _ in 0..matches {
        w.code(0b1100_0101, 8); // length code 285: 258
        w.code(0, 5); // distance code 0: 1
    }
    let rest = n - 1 - matches * 258;
    for _ in 0..rest {
        w.code(0x30, 8);
    }
    w.code(0, 7); // end of block
    let b = (n % 65521) as u32;
    w.out.extend_from_slice(&((b << 16) | 1).to_be_bytes());
    w.out
}

#[test]
fn the_hand_made_bomb_is_what_it_says() {
    let z = zlib_zeros(258 * 40 + 1);
    let plain = miniz_oxide::inflate::decompress_to_vec_zlib(&z).unwrap();
    assert_eq!(plain.len(), 258 * 40 + 1);
    assert!(plain.iter().all(|&b| b == 0));
}

// ---- calibration certificates and RATA summaries ----

#[test]
fn certificates_and_rata_summaries_verify_and_an_edit_is_named() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    copy_dir(
        &root().join("sample-data/calibration"),
        &d.join("calibration"),
    );
    let (code, _, err) = annulus_in(
        d,
        &["calibrate", "calibration/ts-0417.toml", "-o", "cert.pdf"],
    );
    assert_eq!(code, 0, "{err}");
    let (code, v) = {
        let (c, out, _) = annulus_in(d, &["verify", "cert.pdf", "--format", "json"]);
        (c, serde_json::from_str::<serde_json::Value>(&out).unwrap())
    };
    assert_eq!(code, 0, "{v}");
    assert_eq!(v["kind"], "calibration");
    assert_eq!(v["content"], "intact");
    assert_eq!(v["recomputation"]["state"], "matches");
    // an edited reading in the certificate
    let cert = std::fs::read(d.join("cert.pdf")).unwrap();
    let csv = attachment(&cert, "ts-0417.csv");
    let edited = with_attachment(
        &cert,
        "ts-0417.csv",
        edit_text(&csv, "A,0.570,0.790,", "A,0.570,0.690,"),
    );
    std::fs::write(d.join("edited.pdf"), edited).unwrap();
    let (code, out, _) = annulus_in(d, &["verify", "edited.pdf"]);
    assert_eq!(code, 3, "{out}");
    assert!(out.contains("embedded file `ts-0417.csv`"), "{out}");
    assert!(out.contains("leg_a_mean: embedded"), "{out}");
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

/// An archive mixing every case a reviewer meets; returns its parent folder.
fn review_archive() -> tempfile::TempDir {
    let f = fixture();
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("archive");
    let stack = root().join("sample-data/stack");
    // the calibration record the stack surveys name (a TOML file that is not a survey: skipped)
    copy_dir(
        &root().join("sample-data/calibration"),
        &a.join("calibration"),
    );
    // clean: the survey and the signed report made from it, side by side
    copy_dir(&stack, &a.join("good"));
    std::fs::write(a.join("good/report.pdf"), &f.signed).unwrap();
    copy_dir(&root().join("sample-data/hvac"), &a.join("hvac"));
    // a forged page
    std::fs::create_dir_all(a.join("forged")).unwrap();
    std::fs::write(a.join("forged/report.pdf"), edit_page_text(&f.signed, 1)).unwrap();
    // signed by a key outside the trust list
    std::fs::create_dir_all(a.join("unknown")).unwrap();
    std::fs::write(a.join("unknown/report.pdf"), &f.other).unwrap();
    // fabricated data: run 2's line B copied from line A (and retitled, so it is not the report's)
    copy_dir(&stack, &a.join("fabricated"));
    let survey = std::fs::read_to_string(a.join("fabricated/survey.toml")).unwrap();
    std::fs::write(
        a.join("fabricated/survey.toml"),
        survey.replace("Boiler 2 stack", "Boiler 3 stack"),
    )
    .unwrap();
    let csv = std::fs::read_to_string(a.join("fabricated/run2.csv")).unwrap();
    let line_a: Vec<&str> = csv.lines().filter(|l| l.starts_with("A,")).collect();
    let mut k = 0;
    let copied: Vec<String> = csv
        .lines()
        .map(|l| {
            if l.starts_with("B,") && k < line_a.len() {
                k += 1;
                line_a[k - 1].replacen("A,", "B,", 1)
            } else {
                l.to_string()
            }
        })
        .collect();
    std::fs::write(a.join("fabricated/run2.csv"), copied.join("\n") + "\n").unwrap();
    // damaged: a truncated report
    std::fs::create_dir_all(a.join("damaged")).unwrap();
    std::fs::write(
        a.join("damaged/report.pdf"),
        &f.signed[..f.signed.len() / 3],
    )
    .unwrap();
    // mismatched: the report's own survey, with a reading changed after the report was made
    copy_dir(&stack, &a.join("changed"));
    let csv = std::fs::read(a.join("changed/run2.csv")).unwrap();
    std::fs::write(
        a.join("changed/run2.csv"),
        edit_text(&csv, "A,2,0.490,", "A,2,0.500,"),
    )
    .unwrap();
    // bad input: a typo in a readings cell
    copy_dir(&stack, &a.join("bad"));
    let csv = std::fs::read(a.join("bad/run2.csv")).unwrap();
    std::fs::write(
        a.join("bad/run2.csv"),
        edit_text(&csv, "A,2,0.490,", "A,2,0.49O,"),
    )
    .unwrap();
    // an emptied survey file, garbled TOML, and other TOML (skipped)
    std::fs::create_dir_all(a.join("junk")).unwrap();
    std::fs::write(a.join("junk/survey.toml"), "").unwrap();
    std::fs::write(a.join("junk/garbled.toml"), [0xff, 0xfe, 0x00, 0x5b]).unwrap();
    std::fs::write(
        a.join("junk/probe-cal.toml"),
        "[calibration]\nserial = \"TS-0417\"\n",
    )
    .unwrap();
    // a reported figure that carries a known mistake
    copy_dir(&stack, &a.join("doctored"));
    let wrong = static_mistake_velocity_ft_s(&a);
    let survey = std::fs::read_to_string(a.join("doctored/survey.toml")).unwrap();
    std::fs::write(
        a.join("doctored/survey.toml"),
        format!(
            "{}\n[reported.run.1]\nvelocity = \"{wrong:.2} ft/s\"\n",
            survey.replace("Boiler 2 stack", "Boiler 2 stack (doctored copy)")
        ),
    )
    .unwrap();
    std::fs::copy(
        f.path().join("dana-ferrow.pub"),
        dir.path().join("dana-ferrow.pub"),
    )
    .unwrap();
    dir
}

#[test]
fn review_gives_every_file_its_status_identity_and_findings() {
    let dir = review_archive();
    let (code, json, err) = annulus_in(
        dir.path(),
        &[
            "review",
            "archive",
            "--key",
            "dana-ferrow.pub",
            "--format",
            "json",
        ],
    );
    assert_eq!(code, 3, "{err}");
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    let files = v["files"].as_array().unwrap();
    let get = |p: &str| {
        files
            .iter()
            .find(|f| f["file"] == p)
            .unwrap_or_else(|| panic!("{p} not reviewed: {json}"))
    };
    let status = |p: &str| get(p)["status"].as_str().unwrap().to_string();
    let kinds = |p: &str| -> Vec<String> {
        get(p)["findings"]
            .as_array()
            .unwrap()
            .iter()
            .map(|n| n["kind"].as_str().unwrap().to_string())
            .collect()
    };
    let expected = [
        ("archive/good/report.pdf", "pass"),
        ("archive/forged/report.pdf", "fail"),
        ("archive/unknown/report.pdf", "fail"),
        ("archive/fabricated/survey.toml", "suspect"),
        ("archive/damaged/report.pdf", "error"),
        ("archive/changed/survey.toml", "suspect"),
        ("archive/bad/survey.toml", "error"),
        ("archive/junk/survey.toml", "error"),
        ("archive/junk/garbled.toml", "error"),
        ("archive/doctored/survey.toml", "suspect"),
    ];
    for (p, s) in expected {
        assert_eq!(status(p), s, "{p}: {}", get(p));
    }
    assert!(
        status("archive/good/survey.toml") == "pass"
            || status("archive/good/survey.toml") == "warn"
    );
    assert!(!status("archive/hvac/survey.toml").starts_with("fail"));

    // identity columns of a clean report
    let good = get("archive/good/report.pdf");
    assert_eq!(good["kind"], "report");
    assert!(good["report_id"].as_str().unwrap().starts_with("AN-"));
    assert_eq!(good["title"], "Boiler 2 stack, annual flow test");
    assert_eq!(good["site"], "Tessaly Board Mill (fictional)");
    assert_eq!(good["date"], "2026-10-14");
    assert_eq!(good["tested_by"], "Dana Ferrow");
    assert_eq!(good["signer"], "dana-ferrow");
    assert_eq!(good["convention"], "epa-method-2");
    assert_eq!(good["key_figure_unit"], "dscfm");
    let figure = good["key_figure"].as_f64().unwrap();
    assert!(figure > 10_000.0, "{figure}");
    assert_eq!(good["verified"], true);
    // the survey beside it is the one it was made from
    let g = get("archive/good/survey.toml");
    assert_eq!(g["key_figure"], good["key_figure"]);
    assert!(kinds("archive/good/survey.toml").contains(&"matched".to_string()));
    assert_eq!(g["signer"], serde_json::Value::Null);

    // what each finding says
    let forged = get("archive/forged/report.pdf");
    assert_eq!(forged["content"], "altered");
    assert!(forged["findings"].to_string().contains("page 1 content"));
    assert_eq!(get("archive/unknown/report.pdf")["signer"], "unknown key");
    assert!(kinds("archive/fabricated/survey.toml").contains(&"integrity".to_string()));
    assert!(get("archive/fabricated/survey.toml")["findings"]
        .to_string()
        .contains("identical-sequences"));
    assert_eq!(kinds("archive/damaged/report.pdf"), ["damaged"]);
    let changed = get("archive/changed/survey.toml");
    assert!(kinds("archive/changed/survey.toml").contains(&"mismatch".to_string()));
    assert!(
        changed["findings"]
            .to_string()
            .contains("`run2.csv` here differs"),
        "{changed}"
    );
    let bad = get("archive/bad/survey.toml")["findings"][0].clone();
    assert_eq!(bad["kind"], "bad-input");
    let msg = bad["message"].as_str().unwrap();
    assert!(
        msg.contains("`0.49O`") && msg.contains("archive/bad/run2.csv:3:3"),
        "{msg}"
    );
    assert!(get("archive/junk/survey.toml")["findings"]
        .to_string()
        .contains("no [survey] table"));
    let d = get("archive/doctored/survey.toml")["findings"]
        .as_array()
        .unwrap()
        .iter()
        .find(|n| n["kind"] == "discrepancy")
        .cloned()
        .unwrap();
    assert_eq!(d["scope"], "run 1");
    assert_eq!(d["mistake"]["id"], "static-without-13.6", "{d}");
    let skipped: Vec<&str> = v["skipped"]
        .as_array()
        .unwrap()
        .iter()
        .map(|s| s["file"].as_str().unwrap())
        .collect();
    assert_eq!(
        skipped,
        [
            "archive/calibration/ts-0417.toml",
            "archive/junk/probe-cal.toml"
        ]
    );
    assert_eq!(v["summary"]["suspect"], 3);
    assert_eq!(v["summary"]["error"], 4);

    // CSV: the identity columns, one row per file; the table names the mistake in words
    let (code, csv, _) = annulus_in(
        dir.path(),
        &[
            "review",
            "archive",
            "--key",
            "dana-ferrow.pub",
            "--format",
            "csv",
            "--rerender",
            "never",
        ],
    );
    assert_eq!(code, 3);
    assert!(csv.starts_with(
        "file,kind,status,report_id,title,site,date,tested_by,signer,convention,key_figure,key_figure_unit,findings,"
    ), "{csv}");
    assert_eq!(csv.lines().count(), 1 + files.len());
    let row = csv
        .lines()
        .find(|l| l.starts_with("archive/good/report.pdf,"))
        .unwrap();
    assert!(
        row.contains(",report,pass,AN-") && row.contains(",dana-ferrow,epa-method-2,"),
        "{row}"
    );
    let (_, table, _) = annulus_in(
        dir.path(),
        &[
            "review",
            "archive",
            "--key",
            "dana-ferrow.pub",
            "--rerender",
            "never",
        ],
    );
    assert!(
        table.contains("static pressure added without the ÷13.6"),
        "{table}"
    );
    assert!(table.contains("3 suspect"), "{table}");
}

#[test]
fn review_streams_ndjson_and_fail_on_chooses_the_exit_code() {
    let f = fixture();
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("archive");
    copy_dir(
        &root().join("sample-data/calibration"),
        &a.join("calibration"),
    );
    let stack = root().join("sample-data/stack");
    for i in 0..4 {
        copy_dir(&stack, &a.join(format!("s{i}")));
    }
    // one suspect survey: a reported figure the data do not reproduce
    let s = std::fs::read_to_string(a.join("s0/survey.toml")).unwrap();
    std::fs::write(
        a.join("s0/survey.toml"),
        format!("{s}\n[reported]\naverage = {{ dscfm = \"12345 cfm\" }}\n"),
    )
    .unwrap();
    std::fs::write(a.join("s1/report.pdf"), &f.signed).unwrap();
    let (code, out, err) = annulus_in(
        dir.path(),
        &[
            "review",
            "archive",
            "--format",
            "ndjson",
            "--rerender",
            "never",
        ],
    );
    assert_eq!(
        code, 0,
        "suspect is not in the default --fail-on: {out}{err}"
    );
    let lines: Vec<serde_json::Value> = out
        .lines()
        .map(|l| serde_json::from_str(l).unwrap_or_else(|e| panic!("{e}: {l}")))
        .collect();
    // 4 surveys, 1 report, 1 skipped calibration record: one line each
    assert_eq!(lines.len(), 6, "{out}");
    // reports are reviewed before surveys, so a report's line comes first
    assert_eq!(lines[0]["kind"], "report");
    assert!(lines.iter().any(|l| l["skipped"].is_string()));
    let s0 = lines
        .iter()
        .find(|l| l["file"] == "archive/s0/survey.toml")
        .unwrap();
    assert_eq!(s0["status"], "suspect");
    assert!(err.contains("1 suspect"), "{err}");
    let (code, _, _) = annulus_in(
        dir.path(),
        &[
            "review",
            "archive",
            "--format",
            "ndjson",
            "--fail-on",
            "suspect,fail,error",
        ],
    );
    assert_eq!(code, 3);
    let (code, _, err) = annulus_in(dir.path(), &["review", "archive", "--fail-on", "bogus"]);
    assert_eq!(code, 1, "{err}");
}

#[test]
fn review_budgets_turn_a_hostile_file_into_an_error_row() {
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("archive");
    copy_dir(
        &root().join("sample-data/calibration"),
        &a.join("calibration"),
    );
    copy_dir(&root().join("sample-data/stack"), &a.join("ok"));
    std::fs::create_dir_all(a.join("big")).unwrap();
    // a survey larger than the size budget
    std::fs::write(
        a.join("big/survey.toml"),
        format!("[survey]\n# {}\n", "x".repeat(2 << 20)),
    )
    .unwrap();
    let (code, json, err) = annulus_in(
        dir.path(),
        &[
            "review",
            "archive",
            "--format",
            "json",
            "--file-size-limit",
            "1",
        ],
    );
    assert_eq!(code, 3, "{err}");
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    let big = v["files"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["file"] == "archive/big/survey.toml")
        .unwrap();
    assert_eq!(big["status"], "error");
    assert_eq!(big["findings"][0]["kind"], "over-budget");
    assert!(big["findings"][0]["message"]
        .as_str()
        .unwrap()
        .contains("size budget of 1 MiB (--file-size-limit)"));
    let ok = v["files"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["file"] == "archive/ok/survey.toml")
        .unwrap();
    assert_ne!(ok["status"], "error");
    // a readings file that is a pipe is an error row at once, never a wait
    #[cfg(unix)]
    {
        let fifo = a.join("ok/run2.csv");
        std::fs::remove_file(&fifo).unwrap();
        let status = Command::new("mkfifo").arg(&fifo).status();
        if status.is_ok_and(|s| s.success()) {
            let t = std::time::Instant::now();
            let (code, json, _) =
                annulus_in(dir.path(), &["review", "archive", "--format", "json"]);
            assert!(t.elapsed() < std::time::Duration::from_secs(60));
            assert_eq!(code, 3);
            assert!(json.contains("not a regular file"), "{json}");
        }
    }
}

#[test]
fn a_report_laid_out_with_a_firms_template_embeds_it_and_re_renders_from_it() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    copy_dir(&root().join("sample-data/stack"), &d.join("stack"));
    copy_dir(
        &root().join("sample-data/calibration"),
        &d.join("calibration"),
    );
    std::fs::write(
        d.join("firm.typ"),
        "#let data = json(\"/data.json\")\n#set text(font: \"DejaVu Sans\")\n= #data.header.title\nReport #data.header.report_id\n",
    )
    .unwrap();
    let (code, _, err) = annulus_in(
        d,
        &[
            "report",
            "stack/survey.toml",
            "-o",
            "r.pdf",
            "--template",
            "firm.typ",
        ],
    );
    assert_eq!(code, 0, "{err}");
    let pdf = std::fs::read(d.join("r.pdf")).unwrap();
    assert_eq!(
        attachment(&pdf, "firm.typ"),
        std::fs::read(d.join("firm.typ")).unwrap()
    );
    let (code, out, err) = annulus_in(d, &["verify", "r.pdf", "--format", "json"]);
    assert_eq!(code, 0, "{out}{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["rerendering"]["state"], "matches", "{v}");
    // an edited embedded template is named (the pages no longer follow from it)
    let t = String::from_utf8(attachment(&pdf, "firm.typ")).unwrap();
    let edited = with_attachment(
        &pdf,
        "firm.typ",
        t.replace("Report", "Rapport").into_bytes(),
    );
    std::fs::write(d.join("e.pdf"), edited).unwrap();
    let (code, out, _) = annulus_in(d, &["verify", "e.pdf", "--format", "json"]);
    assert_eq!(code, 3);
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let named = changes(&v);
    assert!(
        named.iter().any(|c| c.contains("embedded file `firm.typ`")),
        "{named:?}"
    );
    assert!(
        named
            .iter()
            .any(|c| c.contains("page 1 content (differs from what the embedded inputs render to)")),
        "{named:?}"
    );
}
