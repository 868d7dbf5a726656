//! Digests of everything a reader of a PDF sees, part by part, so a change can be named.
//!
//! Owns [`DocumentParts`] (what a seal records), [`document_parts`] (computing them from a parsed
//! file) and [`compare`] (naming each part that differs). The parts are: each page's content (the
//! page dictionary with its inherited attributes, content streams, fonts, images and other
//! resources), each page's annotations, each entry of the document information dictionary, the
//! XMP metadata, each embedded file (its file specification and data), and each other entry of
//! the document catalog (page tree, tagged structure, bookmarks, output intent, name trees …).
//! Objects nothing refers to are invisible to a reader and not covered; the revision structure
//! (appended updates) is judged separately from [`super::Revisions`].
//!
//! A part's digest is SHA-256 over a canonical walk of the objects it reaches: dictionary keys
//! sorted, references numbered in the order the walk meets them (so renumbering objects changes
//! nothing), numbers as a reader takes them (a whole real is an integer, other reals count to
//! single precision), stream data by the SHA-256 of its bytes as stored together with its
//! `/Filter`, and
//! every object that belongs to another part (another page, an annotation, an embedded file, the
//! seal's own data) written as a named token instead of being walked. Each stream's data is hashed
//! once however many parts use it. One stream is left out entirely: the data of the embedded file
//! named by the caller (the seal that records these digests).

use super::{text_string, Indirect, Object, Pdf, PdfError, Ref, Resolved};
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};
use std::cell::RefCell;
use std::collections::{BTreeMap, HashMap, HashSet, VecDeque};
use std::fmt;

/// The parts of one page.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct PageParts {
    /// The page as drawn: dictionary, inherited attributes, content streams, resources.
    pub content: String,
    /// The page's annotations, when it has any.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub annotations: Option<String>,
}

/// Hex SHA-256 digests of every part a reader sees.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize, Default)]
pub struct DocumentParts {
    pub pages: Vec<PageParts>,
    /// Document information dictionary, per key (`Title`, `Author`, `CreationDate` …).
    pub information: BTreeMap<String, String>,
    /// The catalog's XMP metadata stream.
    pub xmp: Option<String>,
    /// Embedded files by name (the seal's own data excluded).
    pub attachments: BTreeMap<String, String>,
    /// Other catalog entries by key (`Pages`, `StructTreeRoot`, `Outlines`, `Names` …).
    pub structure: BTreeMap<String, String>,
}

/// What happened to a part.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum How {
    Changed,
    Added,
    Removed,
}

/// One part of a document that differs from what was recorded (or re-rendered).
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
#[serde(tag = "part", rename_all = "kebab-case")]
pub enum Change {
    PageContent { page: usize, how: How },
    PageAnnotations { page: usize, how: How },
    Information { key: String, how: How },
    Xmp { how: How },
    Attachment { name: String, how: How },
    Structure { key: String, how: How },
}

/// Words for a catalog entry a reader may not know by its key.
fn catalog_words(key: &str) -> String {
    let words = match key {
        "Pages" => "the page tree (page order)",
        "StructTreeRoot" => "the tagged structure (what assistive technology reads)",
        "Outlines" => "the bookmarks",
        "Names" => "the document's name trees",
        "AF" => "the list of associated files",
        "OutputIntents" => "the output intent (colour profile)",
        "OpenAction" => "an action run when the document opens",
        "AA" => "actions run on document events",
        "AcroForm" => "an interactive form",
        "MarkInfo" => "the tagging flags",
        "ViewerPreferences" => "the viewer preferences",
        "Lang" => "the document language",
        "PageLabels" => "the page labels",
        "Dests" => "the named destinations",
        "OCProperties" => "the optional content (layers)",
        _ => "",
    };
    if words.is_empty() {
        format!("the catalog entry /{key}")
    } else {
        format!("{words} (/{key})")
    }
}

impl fmt::Display for Change {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Change::PageContent {
                page,
                how: How::Added,
            } => write!(f, "an added page {page}"),
            Change::PageContent {
                page,
                how: How::Removed,
            } => write!(f, "page {page} removed"),
            Change::PageContent { page, .. } => write!(f, "page {page} content"),
            Change::PageAnnotations {
                page,
                how: How::Added,
            } => write!(f, "an annotation on page {page}"),
            Change::PageAnnotations {
                page,
                how: How::Removed,
            } => write!(f, "the annotations of page {page} removed"),
            Change::PageAnnotations { page, .. } => write!(f, "the annotations of page {page}"),
            Change::Information { key, how } => {
                write!(f, "document information: {key}")?;
                suffix(f, *how)
            }
            Change::Xmp { how } => {
                write!(f, "XMP metadata")?;
                suffix(f, *how)
            }
            Change::Attachment { name, how } => {
                write!(f, "embedded file `{name}`")?;
                suffix(f, *how)
            }
            Change::Structure { key, how } => {
                write!(f, "{}", catalog_words(key))?;
                suffix(f, *how)
            }
        }
    }
}

fn suffix(f: &mut fmt::Formatter<'_>, how: How) -> fmt::Result {
    match how {
        How::Changed => Ok(()),
        How::Added => write!(f, " (added)"),
        How::Removed => write!(f, " (removed)"),
    }
}

fn compare_maps(
    a: &BTreeMap<String, String>,
    b: &BTreeMap<String, String>,
    make: impl Fn(String, How) -> Change,
    out: &mut Vec<Change>,
) {
    for (k, va) in a {
        match b.get(k) {
            Some(vb) if vb == va => {}
            Some(_) => out.push(make(k.clone(), How::Changed)),
            None => out.push(make(k.clone(), How::Removed)),
        }
    }
    for k in b.keys() {
        if !a.contains_key(k) {
            out.push(make(k.clone(), How::Added));
        }
    }
}

/// Every part of `found` that differs from `expected`, pages first.
pub fn compare(expected: &DocumentParts, found: &DocumentParts) -> Vec<Change> {
    let mut out = Vec::new();
    for i in 0..expected.pages.len().max(found.pages.len()) {
        let page = i + 1;
        match (expected.pages.get(i), found.pages.get(i)) {
            (Some(e), Some(f)) => {
                if e.content != f.content {
                    out.push(Change::PageContent {
                        page,
                        how: How::Changed,
                    });
                }
                match (&e.annotations, &f.annotations) {
                    (a, b) if a == b => {}
                    (None, Some(_)) => out.push(Change::PageAnnotations {
                        page,
                        how: How::Added,
                    }),
                    (Some(_), None) => out.push(Change::PageAnnotations {
                        page,
                        how: How::Removed,
                    }),
                    _ => out.push(Change::PageAnnotations {
                        page,
                        how: How::Changed,
                    }),
                }
            }
            (None, Some(_)) => out.push(Change::PageContent {
                page,
                how: How::Added,
            }),
            (Some(_), None) => out.push(Change::PageContent {
                page,
                how: How::Removed,
            }),
            (None, None) => {}
        }
    }
    compare_maps(
        &expected.information,
        &found.information,
        |key, how| Change::Information { key, how },
        &mut out,
    );
    match (&expected.xmp, &found.xmp) {
        (a, b) if a == b => {}
        (None, Some(_)) => out.push(Change::Xmp { how: How::Added }),
        (Some(_), None) => out.push(Change::Xmp { how: How::Removed }),
        _ => out.push(Change::Xmp { how: How::Changed }),
    }
    compare_maps(
        &expected.attachments,
        &found.attachments,
        |name, how| Change::Attachment { name, how },
        &mut out,
    );
    let mut structure = Vec::new();
    compare_maps(
        &expected.structure,
        &found.structure,
        |key, how| Change::Structure { key, how },
        &mut structure,
    );
    // an added or removed page necessarily changes the page tree: the page says it already
    let pages_differ = expected.pages.len() != found.pages.len();
    out.extend(structure.into_iter().filter(|c| {
        !(pages_differ && matches!(c, Change::Structure { key, .. } if key == "Pages"))
    }));
    out
}

/// An object that belongs to another part, written as a token.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
enum Token {
    Page(usize),
    PageTree,
    Annotation(usize, usize),
    File(String),
    Seal,
    Catalog,
    Information,
    Xmp,
}

impl Token {
    fn bytes(&self) -> Vec<u8> {
        match self {
            Token::Page(n) => format!("page:{n}").into_bytes(),
            Token::PageTree => b"pages".to_vec(),
            Token::Annotation(p, k) => format!("annot:{p}:{k}").into_bytes(),
            Token::File(n) => format!("file:{n}").into_bytes(),
            Token::Seal => b"seal".to_vec(),
            Token::Catalog => b"catalog".to_vec(),
            Token::Information => b"info".to_vec(),
            Token::Xmp => b"xmp".to_vec(),
        }
    }
}

/// Attributes a page inherits from its ancestors in the page tree (ISO 32000-1 §7.7.3.4).
const INHERITED: [&[u8]; 4] = [b"Resources", b"MediaBox", b"CropBox", b"Rotate"];

/// Deepest page tree or name tree followed.
const MAX_TREE_DEPTH: usize = 64;

struct Walk<'p, 'a> {
    pdf: &'p Pdf<'a>,
    tokens: &'p HashMap<Ref, Token>,
    streams: &'p RefCell<HashMap<Ref, [u8; 32]>>,
    visits: std::cell::Cell<usize>,
}

impl Walk<'_, '_> {
    /// The digest of the objects reachable from `roots`; references in `walk_into` are walked even
    /// when they have a token.
    fn digest(&self, roots: &[Object], walk_into: &[Ref]) -> Result<String, PdfError> {
        let mut st = State {
            h: Sha256::new(),
            local: HashMap::new(),
            queue: VecDeque::new(),
        };
        for r in roots {
            self.write(&mut st, r, walk_into, 0)?;
        }
        while let Some((r, idx)) = st.queue.pop_front() {
            self.visits.set(self.visits.get() + 1);
            let cap = self.pdf.limits().max_visits;
            if self.visits.get() > cap {
                return Err(PdfError::Limit(format!(
                    "the document's parts reach more than {cap} objects in all (a file built to be slow)"
                )));
            }
            st.h.update(b"O");
            st.h.update((idx as u64).to_le_bytes());
            let ind = self.pdf.get(r)?;
            match ind.as_ref() {
                Indirect::Object(o) => self.write(&mut st, o, walk_into, 0)?,
                Indirect::Stream(s) => {
                    self.write_dict(&mut st, &s.dict, walk_into, &[b"Length"], 0)?;
                    let cached = self.streams.borrow().get(&r).copied();
                    let d = match cached {
                        Some(d) => d,
                        None => {
                            let d: [u8; 32] = Sha256::digest(self.pdf.raw(s)).into();
                            self.streams.borrow_mut().insert(r, d);
                            d
                        }
                    };
                    st.h.update(b"S");
                    st.h.update(d);
                }
            }
        }
        Ok(crate::digest::hex(&st.h.finalize()))
    }

    fn write(
        &self,
        st: &mut State,
        o: &Object,
        walk_into: &[Ref],
        depth: usize,
    ) -> Result<(), PdfError> {
        if depth > super::syntax::MAX_NESTING {
            return Err(super::damaged("objects nested too deeply"));
        }
        let h = &mut st.h;
        match o {
            Object::Null => h.update(b"n"),
            Object::Bool(b) => h.update(if *b { b"T" } else { b"F" }),
            Object::Int(i) => {
                h.update(b"i");
                h.update(i.to_le_bytes());
            }
            // A whole real is the integer it equals; other reals count to single precision, the
            // precision PDF readers work to (ISO 32000-1 Annex C.2), so a writer that prints
            // `-51.757813` for `-51.757812` changes nothing a reader sees.
            Object::Real(r) if r.fract() == 0.0 && r.abs() < 9.0e15 => {
                h.update(b"i");
                h.update((*r as i64).to_le_bytes());
            }
            Object::Real(r) => {
                h.update(b"r");
                h.update((*r as f32).to_bits().to_le_bytes());
            }
            Object::Str(s) => {
                h.update(b"s");
                h.update((s.len() as u64).to_le_bytes());
                h.update(s);
            }
            Object::Name(n) => {
                h.update(b"/");
                h.update((n.len() as u64).to_le_bytes());
                h.update(n);
            }
            Object::Array(a) => {
                h.update(b"[");
                h.update((a.len() as u64).to_le_bytes());
                for x in a {
                    self.write(st, x, walk_into, depth + 1)?;
                }
            }
            Object::Dict(d) => self.write_dict(st, d, walk_into, &[], depth + 1)?,
            Object::Ref(r) => {
                if let (Some(t), false) = (self.tokens.get(r), walk_into.contains(r)) {
                    let t = t.bytes();
                    h.update(b"#");
                    h.update((t.len() as u64).to_le_bytes());
                    h.update(t);
                } else {
                    let next = st.local.len();
                    let idx = *st.local.entry(*r).or_insert_with(|| {
                        st.queue.push_back((*r, next));
                        next
                    });
                    st.h.update(b"@");
                    st.h.update((idx as u64).to_le_bytes());
                }
            }
        }
        Ok(())
    }

    fn write_dict(
        &self,
        st: &mut State,
        d: &super::Dict,
        walk_into: &[Ref],
        skip: &[&[u8]],
        depth: usize,
    ) -> Result<(), PdfError> {
        let mut keys: Vec<&(Vec<u8>, Object)> =
            d.0.iter()
                .filter(|(k, _)| !skip.contains(&k.as_slice()))
                .collect();
        keys.sort_by(|a, b| a.0.cmp(&b.0));
        keys.dedup_by(|a, b| a.0 == b.0);
        st.h.update(b"<");
        st.h.update((keys.len() as u64).to_le_bytes());
        for (k, v) in keys {
            st.h.update((k.len() as u64).to_le_bytes());
            st.h.update(k);
            self.write(st, v, walk_into, depth)?;
        }
        Ok(())
    }
}

struct State {
    h: Sha256,
    local: HashMap<Ref, usize>,
    queue: VecDeque<(Ref, usize)>,
}

/// A page found in the page tree: its reference and its dictionary with inherited attributes.
struct Page {
    r: Ref,
    dict: super::Dict,
}

/// Attributes inherited so far on the way down the page tree.
type Inherited = Vec<(Vec<u8>, Object)>;

/// The page tree's leaves in order, and its inner nodes.
fn pages(pdf: &Pdf, root: &Object) -> Result<(Vec<Page>, HashSet<Ref>), PdfError> {
    let mut out = Vec::new();
    let mut nodes = HashSet::new();
    let mut seen = HashSet::new();
    // (node, inherited attributes so far, depth); children pushed in reverse to keep order
    let mut pending: Vec<(Object, Inherited, usize)> = vec![(root.clone(), Vec::new(), 0)];
    while let Some((node, inherited, depth)) = pending.pop() {
        if depth > MAX_TREE_DEPTH {
            return Err(super::damaged("the page tree is nested too deeply"));
        }
        let r = node.as_ref();
        if let Some(r) = r {
            if !seen.insert(r) {
                return Err(super::damaged(
                    "the page tree refers to a page twice (a loop)",
                ));
            }
        }
        if seen.len() > pdf.limits().max_objects {
            return Err(PdfError::Limit("too many pages".into()));
        }
        let Some(dict) = pdf.dict_of(&node)? else {
            return Err(super::damaged("a page tree node is not a dictionary"));
        };
        let is_node = dict.type_name() == Some(b"Pages")
            || (dict.type_name() != Some(b"Page") && dict.get(b"Kids").is_some());
        let mut inherit = inherited.clone();
        for k in INHERITED {
            if let Some(v) = dict.get(k) {
                inherit.retain(|(key, _)| key.as_slice() != k);
                inherit.push((k.to_vec(), v.clone()));
            }
        }
        if is_node {
            if let Some(r) = r {
                nodes.insert(r);
            }
            let kids = match dict.get(b"Kids") {
                Some(k) => match pdf.resolve(k)? {
                    Resolved::Direct(Object::Array(a)) => a,
                    Resolved::Indirect(_, ind) => match ind.as_ref() {
                        Indirect::Object(Object::Array(a)) => a.clone(),
                        _ => {
                            return Err(super::damaged("a page tree node's /Kids is not an array"))
                        }
                    },
                    _ => return Err(super::damaged("a page tree node's /Kids is not an array")),
                },
                None => Vec::new(),
            };
            for kid in kids.into_iter().rev() {
                pending.push((kid, inherit.clone(), depth + 1));
            }
        } else {
            let Some(r) = r else {
                return Err(super::damaged("a page is not an indirect object"));
            };
            let mut d = dict;
            for (k, v) in inherit {
                if d.get(&k).is_none() {
                    d.0.push((k, v));
                }
            }
            out.push(Page { r, dict: d });
        }
    }
    Ok((out, nodes))
}

/// The embedded files of the catalog's `/Names /EmbeddedFiles` tree: (name, file specification).
pub(crate) fn embedded_file_specs(pdf: &Pdf) -> Result<Vec<(String, Object)>, PdfError> {
    let (_, catalog) = pdf.catalog()?;
    let Some(names) = catalog.get(b"Names") else {
        return Ok(Vec::new());
    };
    let Some(names) = pdf.dict_of(names)? else {
        return Err(super::damaged("the catalog's /Names is not a dictionary"));
    };
    let Some(tree) = names.get(b"EmbeddedFiles") else {
        return Ok(Vec::new());
    };
    let mut out = Vec::new();
    let mut seen = HashSet::new();
    let mut pending = vec![(tree.clone(), 0usize)];
    while let Some((node, depth)) = pending.pop() {
        if depth > MAX_TREE_DEPTH {
            return Err(super::damaged(
                "the embedded-files name tree is nested too deeply",
            ));
        }
        if let Some(r) = node.as_ref() {
            if !seen.insert(r) {
                return Err(super::damaged("the embedded-files name tree has a loop"));
            }
        }
        let Some(d) = pdf.dict_of(&node)? else {
            return Err(super::damaged(
                "an embedded-files name tree node is not a dictionary",
            ));
        };
        let array = |key: &[u8]| -> Result<Vec<Object>, PdfError> {
            Ok(match d.get(key) {
                None => Vec::new(),
                Some(o) => match pdf.resolve(o)? {
                    Resolved::Direct(Object::Array(a)) => a,
                    Resolved::Indirect(_, ind) => match ind.as_ref() {
                        Indirect::Object(Object::Array(a)) => a.clone(),
                        _ => return Err(super::damaged("a name tree array is not an array")),
                    },
                    _ => return Err(super::damaged("a name tree array is not an array")),
                },
            })
        };
        for kid in array(b"Kids")?.into_iter().rev() {
            pending.push((kid, depth + 1));
        }
        let pairs = array(b"Names")?;
        if pairs.len() % 2 != 0 {
            return Err(super::damaged(
                "the embedded-files name tree has an odd /Names array",
            ));
        }
        for pair in pairs.chunks(2) {
            let key = match pdf.resolve(&pair[0])? {
                Resolved::Direct(Object::Str(s)) => text_string(&s),
                Resolved::Indirect(_, ind) => match ind.as_ref() {
                    Indirect::Object(Object::Str(s)) => text_string(s),
                    _ => return Err(super::damaged("an embedded-files key is not a string")),
                },
                _ => return Err(super::damaged("an embedded-files key is not a string")),
            };
            if out.len() >= pdf.limits().max_objects {
                return Err(PdfError::Limit("too many embedded files".into()));
            }
            out.push((key, pair[1].clone()));
        }
    }
    Ok(out)
}

/// The reference of the data stream of a file specification (`/EF /F`).
pub(crate) fn file_stream_ref(pdf: &Pdf, spec: &Object) -> Result<Option<Ref>, PdfError> {
    let Some(spec) = pdf.dict_of(spec)? else {
        return Ok(None);
    };
    let Some(ef) = spec.get(b"EF") else {
        return Ok(None);
    };
    let Some(ef) = pdf.dict_of(ef)? else {
        return Ok(None);
    };
    Ok(ef.get(b"F").and_then(Object::as_ref))
}

/// The digests of every part of `pdf` a reader sees, leaving out the data of the embedded file
/// named `excluded` (the seal).
pub fn document_parts(pdf: &Pdf, excluded: &str) -> Result<DocumentParts, PdfError> {
    let (catalog_ref, catalog) = pdf.catalog()?;
    let mut tokens: HashMap<Ref, Token> = HashMap::new();
    tokens.insert(catalog_ref, Token::Catalog);
    if let Some(r) = pdf.trailer().get(b"Info").and_then(Object::as_ref) {
        tokens.insert(r, Token::Information);
    }
    if let Some(r) = catalog.get(b"Metadata").and_then(Object::as_ref) {
        tokens.insert(r, Token::Xmp);
    }
    let page_root = catalog
        .get(b"Pages")
        .ok_or_else(|| super::damaged("the catalog has no /Pages"))?;
    let (pages, nodes) = pages(pdf, page_root)?;
    for n in &nodes {
        tokens.insert(*n, Token::PageTree);
    }
    for (i, p) in pages.iter().enumerate() {
        tokens.insert(p.r, Token::Page(i + 1));
    }
    // annotations: (page index, their references)
    let mut annots: Vec<(Option<Object>, Vec<Ref>)> = Vec::with_capacity(pages.len());
    for (i, p) in pages.iter().enumerate() {
        let arr = p.dict.get(b"Annots").cloned();
        let mut refs = Vec::new();
        if let Some(a) = &arr {
            let items = match pdf.resolve(a)? {
                Resolved::Direct(Object::Array(a)) => a,
                Resolved::Indirect(r, ind) => {
                    refs.push(r);
                    match ind.as_ref() {
                        Indirect::Object(Object::Array(a)) => a.clone(),
                        _ => Vec::new(),
                    }
                }
                _ => Vec::new(),
            };
            for (k, item) in items.iter().enumerate() {
                if let Some(r) = item.as_ref() {
                    tokens.entry(r).or_insert(Token::Annotation(i + 1, k + 1));
                    refs.push(r);
                }
            }
        }
        let non_empty = match &arr {
            None => None,
            Some(a) => match pdf.resolve(a)? {
                Resolved::Direct(Object::Array(x)) if x.is_empty() => None,
                Resolved::Indirect(_, ind) if matches!(ind.as_ref(), Indirect::Object(Object::Array(x)) if x.is_empty()) => {
                    None
                }
                _ => Some(a.clone()),
            },
        };
        annots.push((non_empty, refs));
    }
    let files = embedded_file_specs(pdf)?;
    for (name, spec) in &files {
        if let Some(r) = spec.as_ref() {
            tokens.entry(r).or_insert(Token::File(name.clone()));
        }
        if name == excluded {
            if let Some(r) = file_stream_ref(pdf, spec)? {
                tokens.insert(r, Token::Seal);
            }
        }
    }

    let streams = RefCell::new(HashMap::new());
    let w = Walk {
        pdf,
        tokens: &tokens,
        streams: &streams,
        visits: std::cell::Cell::new(0),
    };
    let mut parts = DocumentParts::default();
    for (p, (arr, refs)) in pages.iter().zip(&annots) {
        let mut d = p.dict.clone();
        d.0.retain(|(k, _)| k.as_slice() != b"Parent" && k.as_slice() != b"Annots");
        let content = w.digest(&[Object::Dict(d)], &[])?;
        let annotations = match arr {
            Some(a) => Some(w.digest(std::slice::from_ref(a), refs)?),
            None => None,
        };
        parts.pages.push(PageParts {
            content,
            annotations,
        });
    }
    if let Some(info) = pdf.trailer().get(b"Info") {
        if let Some(d) = pdf.dict_of(info)? {
            for (k, v) in d.iter() {
                let key = String::from_utf8_lossy(k).into_owned();
                parts
                    .information
                    .entry(key)
                    .or_insert(w.digest(std::slice::from_ref(v), &[])?);
            }
        }
    }
    if let Some(m) = catalog.get(b"Metadata") {
        let walk_into: Vec<Ref> = m.as_ref().into_iter().collect();
        parts.xmp = Some(w.digest(std::slice::from_ref(m), &walk_into)?);
    }
    for (name, spec) in &files {
        let walk_into: Vec<Ref> = spec.as_ref().into_iter().collect();
        let d = w.digest(std::slice::from_ref(spec), &walk_into)?;
        // a name given twice: both copies count
        match parts.attachments.get_mut(name) {
            Some(prev) => *prev = crate::digest::sha256_hex(format!("{prev}{d}").as_bytes()),
            None => {
                parts.attachments.insert(name.clone(), d);
            }
        }
    }
    let node_refs: Vec<Ref> = nodes.iter().copied().collect();
    for (k, v) in catalog.iter() {
        if k == b"Metadata" || k == b"Type" {
            continue;
        }
        let walk_into: &[Ref] = if k == b"Pages" { &node_refs } else { &[] };
        let key = String::from_utf8_lossy(k).into_owned();
        let d = w.digest(std::slice::from_ref(v), walk_into)?;
        parts.structure.entry(key).or_insert(d);
    }
    Ok(parts)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parts(pages: &[&str], info: &[(&str, &str)]) -> DocumentParts {
        DocumentParts {
            pages: pages
                .iter()
                .map(|c| PageParts {
                    content: c.to_string(),
                    annotations: None,
                })
                .collect(),
            information: info
                .iter()
                .map(|(k, v)| (k.to_string(), v.to_string()))
                .collect(),
            ..Default::default()
        }
    }

    #[test]
    fn changes_are_named_part_by_part() {
        let a = parts(&["p1", "p2"], &[("Author", "x"), ("Title", "t")]);
        let mut b = parts(&["p1", "P2", "p3"], &[("Author", "y"), ("Keywords", "k")]);
        b.pages[0].annotations = Some("a".into());
        let shown: Vec<String> = compare(&a, &b).iter().map(|c| c.to_string()).collect();
        assert_eq!(
            shown,
            [
                "an annotation on page 1",
                "page 2 content",
                "an added page 3",
                "document information: Author",
                "document information: Title (removed)",
                "document information: Keywords (added)",
            ]
        );
        assert!(compare(&a, &a).is_empty());
    }
}
