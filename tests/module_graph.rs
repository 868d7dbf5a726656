//! The module graph, read from the source: which top-level module of `src/` refers to which
//! (`crate::x` anywhere in non-test code: `use` items, paths in expressions and types, macro
//! bodies). Items and modules under `#[cfg(test)]` are left out: tests may use the whole crate.
//!
//! Checked: there is no cycle between top-level modules; the calculation modules refer to
//! nothing that reads files, prints, renders or runs the pipeline; loading inputs (`input`) does
//! not run the pipeline or the assessment; the assessment reads nothing from `input`; the file
//! system is touched only by `input` (reading inputs), `cli` (keys, templates, folders, the
//! report to verify) and `report` (writing the PDF); the clock is read only in `cli`.

use proc_macro2::{Delimiter, TokenStream, TokenTree};
use quote::ToTokens;
use std::collections::{BTreeMap, BTreeSet};
use std::path::{Path, PathBuf};

/// The modules that compute: no files, no printing, no clock, no presentation.
const CALCULATION: &[&str] = &[
    "units",
    "geometry",
    "layout",
    "gas",
    "flow",
    "checks",
    "uncertainty",
    "calibration",
    "rata",
    "survey",
    "readings",
    "plane",
];

/// What the calculation modules must not refer to.
const OUTER: &[&str] = &[
    "input", "pipeline", "assess", "results", "report", "archive", "cli",
];

type Graph = BTreeMap<String, BTreeSet<String>>;

fn src() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("src")
}

/// `#[cfg(test)]` (or `#[cfg(all(test, …))]`) on an item.
fn is_test_only(attrs: &[syn::Attribute]) -> bool {
    attrs.iter().any(|a| {
        a.path().is_ident("cfg") && {
            let t = a.meta.to_token_stream().to_string();
            t.contains("test") && !t.contains("not (test")
        }
    })
}

/// Marks for what a module touches besides other modules: the file system, the clock.
const FS: &str = "#fs";
const CLOCK: &str = "#clock";

/// `a :: b` at `i` in `tokens` (an ident, two colons, an ident).
fn path_pair(tokens: &[TokenTree], i: usize, a: &str, b: &str) -> bool {
    matches!(
        (tokens.get(i), tokens.get(i + 1), tokens.get(i + 2), tokens.get(i + 3)),
        (Some(TokenTree::Ident(x)), Some(TokenTree::Punct(p)), Some(TokenTree::Punct(q)), Some(TokenTree::Ident(y)))
            if x == a && p.as_char() == ':' && q.as_char() == ':' && y == b
    )
}

/// Top-level module names after `crate ::` in a token stream (also inside `crate::{a, b}`),
/// and [`FS`] / [`CLOCK`] where `std::fs` or a clock (`Local::now`, `Utc::now`,
/// `SystemTime::now`) is used.
fn crate_refs(tokens: TokenStream, out: &mut BTreeSet<String>) {
    let tokens: Vec<TokenTree> = tokens.into_iter().collect();
    for (i, t) in tokens.iter().enumerate() {
        if path_pair(&tokens, i, "std", "fs") {
            out.insert(FS.to_string());
        }
        if ["Local", "Utc", "SystemTime"]
            .iter()
            .any(|c| path_pair(&tokens, i, c, "now"))
        {
            out.insert(CLOCK.to_string());
        }
        match t {
            TokenTree::Group(g) => crate_refs(g.stream(), out),
            TokenTree::Ident(id) if id == "crate" => {
                let colons = matches!(
                    (tokens.get(i + 1), tokens.get(i + 2)),
                    (Some(TokenTree::Punct(a)), Some(TokenTree::Punct(b)))
                        if a.as_char() == ':' && b.as_char() == ':'
                );
                if !colons {
                    continue;
                }
                match tokens.get(i + 3) {
                    Some(TokenTree::Ident(m)) => {
                        out.insert(m.to_string());
                    }
                    Some(TokenTree::Group(g)) if g.delimiter() == Delimiter::Brace => {
                        // `crate::{a::x, b}`: the first ident of each path
                        let mut first = true;
                        for t in g.stream() {
                            match t {
                                TokenTree::Ident(m) if first => {
                                    out.insert(m.to_string());
                                    first = false;
                                }
                                TokenTree::Punct(p) if p.as_char() == ',' => first = true,
                                _ => {}
                            }
                        }
                    }
                    _ => {}
                }
            }
            _ => {}
        }
    }
}

/// The references of a file's non-test items; file modules it declares are followed.
fn scan_file(path: &Path, out: &mut BTreeSet<String>) {
    scan_file_except(path, None, out);
}

/// [`scan_file`] leaving out the child module `skip` (and its files).
fn scan_file_except(path: &Path, skip: Option<&str>, out: &mut BTreeSet<String>) {
    let text = std::fs::read_to_string(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    let file = syn::parse_file(&text).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    // a file `x.rs` keeps its child modules in `x/`, a `mod.rs` or `lib.rs` beside itself
    let dir = match path.file_name().and_then(|n| n.to_str()) {
        Some("mod.rs") | Some("lib.rs") => path.parent().unwrap().to_path_buf(),
        _ => path.with_extension(""),
    };
    scan_items(&file.items, &dir, skip, out);
}

fn scan_items(items: &[syn::Item], dir: &Path, skip: Option<&str>, out: &mut BTreeSet<String>) {
    for item in items {
        match item {
            syn::Item::Mod(m) if is_test_only(&m.attrs) => {}
            syn::Item::Mod(m) if skip.is_some_and(|s| m.ident == s) => {}
            syn::Item::Mod(m) => match &m.content {
                Some((_, inner)) => scan_items(inner, &dir.join(m.ident.to_string()), None, out),
                None => {
                    let name = m.ident.to_string();
                    let file = dir.join(format!("{name}.rs"));
                    let path = if file.exists() {
                        file
                    } else {
                        dir.join(&name).join("mod.rs")
                    };
                    scan_file(&path, out);
                }
            },
            other => {
                let attrs: &[syn::Attribute] = match other {
                    syn::Item::Fn(f) => &f.attrs,
                    syn::Item::Use(u) => &u.attrs,
                    syn::Item::Impl(i) => &i.attrs,
                    syn::Item::Struct(s) => &s.attrs,
                    syn::Item::Enum(e) => &e.attrs,
                    syn::Item::Const(c) => &c.attrs,
                    syn::Item::Static(s) => &s.attrs,
                    syn::Item::Type(t) => &t.attrs,
                    syn::Item::Trait(t) => &t.attrs,
                    syn::Item::Macro(m) => &m.attrs,
                    _ => &[],
                };
                if !is_test_only(attrs) {
                    crate_refs(other.to_token_stream(), out);
                }
            }
        }
    }
}

/// Every top-level module (as `lib.rs` declares them) and the modules it refers to.
fn graph() -> Graph {
    let lib = std::fs::read_to_string(src().join("lib.rs")).unwrap();
    let lib = syn::parse_file(&lib).unwrap();
    let mut g = Graph::new();
    for item in &lib.items {
        let syn::Item::Mod(m) = item else { continue };
        if is_test_only(&m.attrs) {
            continue;
        }
        let name = m.ident.to_string();
        let file = src().join(format!("{name}.rs"));
        let path = if file.exists() {
            file
        } else {
            src().join(&name).join("mod.rs")
        };
        let mut refs = BTreeSet::new();
        scan_file(&path, &mut refs);
        refs.remove(&name);
        g.insert(name, refs);
    }
    g
}

/// The modules that touch `mark` ([`FS`], [`CLOCK`]).
fn touching(g: &Graph, mark: &str) -> Vec<String> {
    g.iter()
        .filter(|(_, refs)| refs.contains(mark))
        .map(|(m, _)| m.clone())
        .collect()
}

/// The module graph without the marks.
fn modules() -> Graph {
    let mut g = graph();
    for refs in g.values_mut() {
        refs.retain(|r| !r.starts_with('#'));
    }
    g
}

/// A cycle through `start`, if there is one.
fn cycle_from(g: &Graph, start: &str) -> Option<Vec<String>> {
    fn walk(
        g: &Graph,
        node: &str,
        start: &str,
        path: &mut Vec<String>,
        seen: &mut BTreeSet<String>,
    ) -> bool {
        for next in g.get(node).into_iter().flatten() {
            if next == start {
                path.push(next.clone());
                return true;
            }
            if seen.insert(next.clone()) {
                path.push(next.clone());
                if walk(g, next, start, path, seen) {
                    return true;
                }
                path.pop();
            }
        }
        false
    }
    let mut path = vec![start.to_string()];
    walk(g, start, start, &mut path, &mut BTreeSet::new()).then_some(path)
}

#[test]
fn the_reader_finds_references() {
    let mut refs = BTreeSet::new();
    let tokens: TokenStream =
        "use crate::{checks::Finding, flow}; fn f() { crate::units::to_unit(1.0, \"m\"); }"
            .parse()
            .unwrap();
    crate_refs(tokens, &mut refs);
    assert_eq!(
        refs.into_iter().collect::<Vec<_>>(),
        ["checks", "flow", "units"]
    );
    let g = graph();
    // the graph covers the crate: these edges exist in non-test code
    assert!(g["pipeline"].contains("flow"), "{g:?}");
    assert!(g["cli"].contains("input"), "{g:?}");
    assert!(g.len() >= 20, "{g:?}");
}

#[test]
fn no_module_cycle() {
    let g = modules();
    for m in g.keys() {
        if let Some(c) = cycle_from(&g, m) {
            panic!("module cycle: {}", c.join(" → "));
        }
    }
}

#[test]
fn calculation_modules_import_nothing_from_the_outer_layers() {
    let g = graph();
    for m in CALCULATION {
        let refs = g.get(*m).unwrap_or_else(|| panic!("no module `{m}`"));
        let bad: Vec<_> = refs
            .iter()
            .filter(|r| OUTER.contains(&r.as_str()))
            .collect();
        assert!(bad.is_empty(), "`{m}` refers to {bad:?}");
    }
}

#[test]
fn loading_inputs_does_not_evaluate_them() {
    let g = graph();
    for outer in ["pipeline", "assess", "results", "report", "archive", "cli"] {
        assert!(!g["input"].contains(outer), "`input` refers to `{outer}`");
    }
    assert!(!g["assess"].contains("input"), "`assess` refers to `input`");
}

#[test]
fn files_and_the_clock_are_touched_at_the_edges_only() {
    let g = graph();
    // `input` reads, `write` writes (by the output rules), `cli` lists folders and makes them
    assert_eq!(touching(&g, FS), ["cli", "input", "write"], "{g:?}");
    assert_eq!(touching(&g, CLOCK), ["cli"], "{g:?}");
}

/// The longest a function in `src/` may be, in lines from `fn` to its closing brace: long enough
/// for a table of rules, short enough that every function can be read and tested as one piece.
const MAX_FUNCTION_LINES: usize = 180;

/// Every function and method in `src/` with its first line and length in lines.
fn function_sizes() -> Vec<(String, usize, usize)> {
    struct Sizes<'a> {
        file: &'a str,
        out: &'a mut Vec<(String, usize, usize)>,
    }
    impl Sizes<'_> {
        fn record(&mut self, name: &syn::Ident, span: proc_macro2::Span) {
            let (start, end) = (span.start().line, span.end().line);
            self.out.push((
                format!("{}:{start} {name}", self.file),
                start,
                end - start + 1,
            ));
        }
    }
    impl<'ast> syn::visit::Visit<'ast> for Sizes<'_> {
        fn visit_item_fn(&mut self, f: &'ast syn::ItemFn) {
            let span = quote::ToTokens::to_token_stream(f)
                .into_iter()
                .fold(None::<proc_macro2::Span>, |acc, t| {
                    Some(acc.map_or(t.span(), |a| a.join(t.span()).unwrap_or(a)))
                });
            if let Some(span) = span {
                self.record(&f.sig.ident, span);
            }
            syn::visit::visit_item_fn(self, f);
        }
        fn visit_impl_item_fn(&mut self, f: &'ast syn::ImplItemFn) {
            let first = f.sig.fn_token.span;
            let last = f.block.brace_token.span.close();
            let span = first.join(last).unwrap_or(first);
            self.record(&f.sig.ident, span);
            syn::visit::visit_impl_item_fn(self, f);
        }
    }
    let mut out = Vec::new();
    let mut stack = vec![src()];
    while let Some(dir) = stack.pop() {
        for e in std::fs::read_dir(&dir).unwrap() {
            let p = e.unwrap().path();
            if p.is_dir() {
                stack.push(p);
            } else if p.extension().is_some_and(|x| x == "rs") {
                let text = std::fs::read_to_string(&p).unwrap();
                let file = syn::parse_file(&text).unwrap();
                let name = p.strip_prefix(src()).unwrap().display().to_string();
                let mut v = Sizes {
                    file: &name,
                    out: &mut out,
                };
                syn::visit::Visit::visit_file(&mut v, &file);
            }
        }
    }
    out
}

#[test]
fn the_size_reader_measures_functions() {
    let sizes = function_sizes();
    // the crate has hundreds of functions, `main` among them, each at least one line long
    assert!(sizes.len() > 500, "{} functions", sizes.len());
    assert!(sizes
        .iter()
        .any(|(n, _, len)| n.starts_with("main.rs:") && *len >= 1));
    assert!(sizes.iter().all(|(_, start, len)| *start >= 1 && *len >= 1));
}

#[test]
fn no_function_in_src_is_longer_than_the_limit() {
    let mut long: Vec<_> = function_sizes()
        .into_iter()
        .filter(|(_, _, len)| *len > MAX_FUNCTION_LINES)
        .collect();
    long.sort_by_key(|(_, _, len)| std::cmp::Reverse(*len));
    assert!(
        long.is_empty(),
        "functions over {MAX_FUNCTION_LINES} lines (split them into named parts): {long:?}"
    );
}
