//! The direct reader against the `toml` crate: whatever it takes, it must read exactly as the
//! crate does (values, key order, every span); whatever the crate refuses, it must leave to it.

use super::*;
use proptest::prelude::*;

/// The crate's reading of `text`, converted (`None`: a syntax error).
fn by_crate(text: &str) -> Option<Map<'_>> {
    DeTable::parse(text)
        .ok()
        .map(|t| from_table(t.into_inner()))
}

/// The direct reader agrees with the crate on `text`, or leaves it to the crate; returns
/// whether it read the text itself.
fn agrees(text: &str) -> bool {
    match parse_plain(text) {
        Some(plain) => {
            let reference = by_crate(text)
                .unwrap_or_else(|| panic!("read directly, but the crate refuses:\n{text}"));
            assert_eq!(plain, reference, "different trees for:\n{text}");
            true
        }
        None => false,
    }
}

#[test]
fn plain_documents_are_read_directly_and_exactly_as_the_crate_reads_them() {
    let cases = [
        "",
        "\n\n# only a comment",
        "top = 1\n[survey]\ntitle = \"Bench\"   # note\nn = -12\nf = 0.84\ne = 1e3\np = +5\n",
        "[a.b]\nx = 'lit'\n[a]\ny = true\narr = [ 1, 2,\n  3, ]\ninl = { before = \"pass\", after = \"pass\" }\n",
        "[[run]]\nid = \"1\"\n[[run]]\nid = \"2\"\n[run.sub]\nz = 1\n",
        "[x.y.z]\nk = 1\n[[p.q]]\nm = 2\n[ s . t ]\nv = \"a\"\r\nw = []\n[u]\n",
        "a = \"x\\ty\"\nb = \"\\u00e9 \\U0001F600 \\\\ \\\" \\n\"\nc = 1.0e-3\nd = -0.0\ne = 'C:\\path'",
        "e = {}\nf = [[1, 2], [\"a\"], [{ k = 1 }, { k = 2 }]]\ng = [ # c\n  1, # d\n\n  2\n]\n",
        "k-1 = 0\nk_2 = 1E5\nK = 2.5E-3\n3 = \"numeric key\"\n",
        "t = \"ünïcödé\" # ¡comentario!\n",
        "[a.b]\n[a.c]\n[a]\nx = 1\n",
    ];
    for text in cases {
        assert!(agrees(text), "not read directly:\n{text}");
    }
}

#[test]
fn anything_else_is_left_to_the_crate() {
    // valid TOML outside the plain form, and errors: all go to the crate, which reads or
    // reports them
    let cases = [
        "\"quoted key\" = 1",
        "a.b = 1",
        "s = \"\"\"multi\nline\"\"\"",
        "s = '''lit'''",
        "d = 1979-05-27",
        "t = 07:32:00",
        "h = 0xff",
        "u = 1_000",
        "i = inf",
        "n = nan",
        "z = 007",
        "big = 12345678901234567890",
        "x = 1e999",
        "e = \"\\e\"",
        "i = { a = 1,\n b = 2 }",
        "i = { a = 1, }",
        "\u{feff}a = 1",
        "a = 1\ra = 2",
        "a = 1\na = 2",
        "[a]\n[a]",
        "[a]\nb = 1\n[a.b]",
        "a = {}\n[a.b]",
        "a = []\n[[a]]",
        "[[a]]\n[a]",
        "[a]\n[[a]]",
        "[a.b]\n[a.b]",
        "a = \"unterminated",
        "a = \"tab\tok but bell\u{7}\"",
        "# bell \u{7}",
        "a = ",
        "= 1",
        "[a",
        "[[a]",
        "[ [a]]",
        "a = 1 b = 2",
        "a = truex",
        "a = 1.",
        "a = .5",
    ];
    for text in cases {
        assert!(!agrees(text), "read directly:\n{text}");
        // and the public entry point gives what the crate gives
        match (parse(text), by_crate(text)) {
            (Ok(a), Some(b)) => assert_eq!(a, b, "{text}"),
            (Err(e), None) => assert!(!e.is_empty()),
            (a, b) => panic!("{text}: {a:?} vs {b:?}"),
        }
    }
}

/// Every TOML file of the repository (samples, test data, examples) is read as the crate reads
/// it, and the survey samples take the direct route.
#[test]
fn the_repository_input_files_read_the_same_by_both_routes() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut files = Vec::new();
    let mut dirs = vec![root.join("sample-data"), root.join("tests")];
    while let Some(d) = dirs.pop() {
        for e in std::fs::read_dir(&d).unwrap().flatten() {
            let p = e.path();
            if p.is_dir() {
                dirs.push(p);
            } else if p.extension().is_some_and(|x| x == "toml") {
                files.push(p);
            }
        }
    }
    assert!(files.len() > 20, "{files:?}");
    let mut direct = 0;
    for f in &files {
        let text = std::fs::read_to_string(f).unwrap();
        direct += usize::from(agrees(&text));
    }
    // most are plain TOML; the rest were read by the crate, and agreed where both read
    assert!(direct * 2 > files.len(), "{direct} of {}", files.len());
    let sample = std::fs::read_to_string(root.join("sample-data/stack/survey.toml")).unwrap();
    assert!(parse_plain(&sample).is_some());
}

/// Pieces of documents, valid and not, for generated documents.
const LINES: &[&str] = &[
    "a = 1",
    "b = \"text\"",
    "c = 'lit'",
    "id = \"2\"",
    "x-y = -0.5",
    "k_1 = 1e-3",
    "n = +7",
    "z = 0",
    "t = true",
    "f = false",
    "arr = [1, 2, 3]",
    "arr = [\n  \"a\", # c\n  \"b\",\n]",
    "nest = [[1], [\"x\", 'y'], []]",
    "inl = { before = \"pass\", after = 'fail' }",
    "inl = {}",
    "aot = [{ a = 1 }, { b = 2 }]",
    "esc = \"a\\tb\\u00e9\\\"\"",
    "# a comment",
    "",
    "   ",
    "[a]",
    "[b]",
    "[a.b]",
    "[a.b.c]",
    "[ a . c ]",
    "[run]",
    "[[run]]",
    "[run.sub]",
    "[[run.sub]]",
    "[[a.b]]",
    "a.b = 1",
    "\"q\" = 1",
    "d = 2026-10-14",
    "h = 0x1F",
    "u = 1_000",
    "m = \"\"\"x\"\"\"",
    "bad = ",
    "bad = \"open",
    "[open",
    "inl = { a = 1, }",
    "z = 01",
    "e = 1e",
    "w = 1.5 # trailing",
    "v = \"ü\"",
];

fn document() -> impl Strategy<Value = String> {
    (
        proptest::collection::vec(0..LINES.len(), 0..14),
        proptest::bool::ANY,
        proptest::bool::ANY,
    )
        .prop_map(|(picks, crlf, final_newline)| {
            let sep = if crlf { "\r\n" } else { "\n" };
            let mut text = picks
                .iter()
                .map(|&i| LINES[i])
                .collect::<Vec<_>>()
                .join(sep);
            if final_newline {
                text.push_str(sep);
            }
            text
        })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(3000))]

    /// Generated documents (valid and invalid): read directly only when the crate reads them
    /// the same.
    #[test]
    fn generated_documents_read_directly_only_as_the_crate_reads_them(text in document()) {
        agrees(&text);
    }

    /// The sample survey with one byte changed, inserted or removed: the same property.
    #[test]
    fn a_damaged_survey_is_read_directly_only_as_the_crate_reads_it(
        at in 0usize..4000,
        byte in proptest::sample::select(b" \t\r\n\"'#=[]{},.-+_0123456789aetfx\\".to_vec()),
        how in 0u8..3,
    ) {
        let sample = include_str!("../../../sample-data/stack/survey.toml");
        let mut bytes = sample.as_bytes().to_vec();
        let at = at % bytes.len();
        match how {
            0 => bytes[at] = byte,
            1 => bytes.insert(at, byte),
            _ => { bytes.remove(at); }
        }
        if let Ok(text) = String::from_utf8(bytes) {
            agrees(&text);
        }
    }
}
