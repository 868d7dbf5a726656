//! A small, bounded PDF reader: what `annulus verify` needs to read a report and nothing more
//! (and what the report's own attachment reading uses).
//!
//! Owns the cross-reference sections (classic tables and cross-reference streams, followed through
//! `/Prev` as a viewer would, ISO 32000-1 §7.5), indirect objects (also inside object streams,
//! §7.5.7), stream data, and the file's revision structure (how many updates were appended after
//! the first end of file). Objects are parsed lazily, each at most once, so the cost is linear in
//! the bytes actually looked at; every count and size has a cap ([`Limits`]), so a hostile file
//! costs bounded time and memory and ends in a [`PdfError`], never a panic.
//!
//! Must not read files or print: it works on the bytes the caller hands in.
//!
//! [`parts`] turns a document into the digests a seal records; [`splice`] replaces one stream
//! object in a file this program wrote.

pub mod files;
pub mod filters;
pub mod parts;
pub mod splice;
pub mod syntax;

use std::cell::{Cell, RefCell};
use std::collections::{HashMap, HashSet};
use std::fmt;
use std::ops::Range;
use std::rc::Rc;

pub use syntax::{Dict, Object, Ref};
use syntax::{Parser, SyntaxError};

/// Caps on what one file may make the reader do. The defaults are far above anything a report
/// holds (the sample report has about 2 000 objects, one revision and a 64 KB largest
/// attachment) and far below what exhausts a machine.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Limits {
    /// Objects listed in the cross-reference sections.
    pub max_objects: usize,
    /// Cross-reference sections (revisions) followed through `/Prev`.
    pub max_revisions: usize,
    /// Bytes one stream may inflate to.
    pub max_stream: usize,
    /// Bytes all inflated streams of one file may add up to.
    pub max_inflated_total: usize,
    /// Objects all part digests together may visit: shared resources are walked once per part
    /// that uses them, so a file of thousands of pages sharing a huge resource tree would
    /// otherwise cost pages × objects. A real report visits well under 100 000.
    pub max_visits: usize,
}

impl Default for Limits {
    fn default() -> Self {
        Limits {
            max_objects: 1_000_000,
            max_revisions: 100,
            max_stream: 64 << 20,
            max_inflated_total: 256 << 20,
            max_visits: 10_000_000,
        }
    }
}

/// `12 MiB`, `640 KiB`, `900 bytes`.
pub fn bytes_text(n: usize) -> String {
    if n >= 1 << 20 && n.is_multiple_of(1 << 20) {
        format!("{} MiB", n >> 20)
    } else if n >= 1 << 10 && n.is_multiple_of(1 << 10) {
        format!("{} KiB", n >> 10)
    } else {
        format!("{n} bytes")
    }
}

/// Why a PDF could not be read.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum PdfError {
    /// The bytes do not start like a PDF (`%PDF-` in the first kilobyte).
    NotPdf,
    /// A PDF whose structure is broken (truncated, bad cross-reference, bad object syntax).
    Damaged(String),
    /// A cap of [`Limits`] was reached.
    Limit(String),
}

impl fmt::Display for PdfError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            PdfError::NotPdf => write!(f, "not a PDF (no `%PDF-` header)"),
            PdfError::Damaged(m) => write!(f, "{m}"),
            PdfError::Limit(m) => write!(f, "{m}"),
        }
    }
}

impl std::error::Error for PdfError {}

fn damaged(what: impl Into<String>) -> PdfError {
    PdfError::Damaged(what.into())
}

fn syntax(context: &str, e: SyntaxError) -> PdfError {
    PdfError::Damaged(format!("{context}: {e}"))
}

/// Where an object lives.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Entry {
    Free,
    At { offset: usize, gen: u16 },
    Packed { stream: u32, index: usize },
}

/// An indirect object: a direct object, or a stream (dictionary + raw data in the file).
#[derive(Debug, Clone, PartialEq)]
pub enum Indirect {
    Object(Object),
    Stream(Stream),
}

impl Indirect {
    /// The object, or the stream's dictionary.
    pub fn dict(&self) -> Option<&Dict> {
        match self {
            Indirect::Object(o) => o.as_dict(),
            Indirect::Stream(s) => Some(&s.dict),
        }
    }
}

/// A stream: its dictionary and where its raw (still encoded) bytes are in the file.
#[derive(Debug, Clone, PartialEq)]
pub struct Stream {
    pub dict: Dict,
    pub data: Range<usize>,
}

/// How the file was saved: one revision as written, or updates appended after it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Revisions {
    /// Cross-reference sections reached from the last `startxref` (1 for a file saved once).
    pub sections: usize,
    /// `startxref` keywords in the whole file (1 for a file saved once).
    pub startxrefs: usize,
    /// Byte offset just after the first `%%EOF` marker: the end of the file as first written.
    pub first_end: Option<usize>,
    /// Bytes after the last `%%EOF` marker, other than white space.
    pub trailing: usize,
    pub file_len: usize,
}

impl Revisions {
    /// Whether the file is one revision ending at its own end-of-file marker.
    pub fn single(&self) -> bool {
        self.sections == 1 && self.startxrefs == 1 && self.trailing == 0
    }

    /// Bytes after the end of the first revision (0 for a single revision).
    pub fn appended(&self) -> usize {
        match self.first_end {
            Some(end) if !self.single() => self.file_len.saturating_sub(end),
            _ => 0,
        }
    }
}

/// A decoded object stream: the bytes and each member's (number, offset).
#[derive(Debug)]
struct ObjStm {
    data: Vec<u8>,
    members: Vec<(u32, usize)>,
}

/// A parsed PDF file (lazily: objects are read on first use and kept).
pub struct Pdf<'a> {
    bytes: &'a [u8],
    limits: Limits,
    entries: HashMap<u32, Entry>,
    trailer: Dict,
    revisions: Revisions,
    cache: RefCell<HashMap<u32, Rc<Indirect>>>,
    objstms: RefCell<HashMap<u32, Rc<ObjStm>>>,
    inflated: Cell<usize>,
    /// Depth of nested `get` calls (stream lengths, object streams), bounded.
    nesting: Cell<usize>,
    /// Offset of the cross-reference section `startxref` points to.
    xref_at: usize,
}

/// Deepest chain of lookups one lookup may start (a `/Length` in an object stream …).
const MAX_LOOKUP_NESTING: usize = 8;

fn find_last(hay: &[u8], needle: &[u8]) -> Option<usize> {
    if needle.len() > hay.len() {
        return None;
    }
    (0..=hay.len() - needle.len())
        .rev()
        .find(|&i| &hay[i..i + needle.len()] == needle)
}

/// Every position of `needle` in `hay` (a linear scan).
fn find_all(hay: &[u8], needle: &[u8]) -> Vec<usize> {
    let mut out = Vec::new();
    let first = needle[0];
    let mut i = 0;
    while i + needle.len() <= hay.len() {
        match hay[i..].iter().position(|&b| b == first) {
            Some(p) => {
                let at = i + p;
                if at + needle.len() <= hay.len() && &hay[at..at + needle.len()] == needle {
                    out.push(at);
                }
                i = at + 1;
            }
            None => break,
        }
    }
    out
}

/// Whether `bytes` start like a PDF: `%PDF-` within the first 1024 bytes (ISO 32000-1 §7.5.2
/// allows leading bytes; readers search the first kilobyte).
pub fn looks_like_pdf(bytes: &[u8]) -> bool {
    let head = &bytes[..bytes.len().min(1024)];
    !find_all(head, b"%PDF-").is_empty()
}

impl<'a> Pdf<'a> {
    /// Reads the cross-reference structure and trailer of `bytes`.
    pub fn parse(bytes: &'a [u8], limits: Limits) -> Result<Pdf<'a>, PdfError> {
        if !looks_like_pdf(bytes) {
            return Err(PdfError::NotPdf);
        }
        let tail_from = bytes.len().saturating_sub(2048);
        let Some(sx) = find_last(&bytes[tail_from..], b"startxref").map(|i| i + tail_from) else {
            return Err(damaged(
                "no `startxref` near the end of the file (the file is truncated or not a finished PDF)",
            ));
        };
        let mut p = Parser::new(bytes, sx + b"startxref".len());
        let xref_at = p
            .uint()
            .map_err(|e| syntax("the `startxref` offset", e))
            .and_then(|v| {
                usize::try_from(v)
                    .ok()
                    .filter(|&v| v < bytes.len())
                    .ok_or_else(|| damaged("`startxref` points outside the file"))
            })?;
        let eofs = find_all(bytes, b"%%EOF");
        let last_eof = eofs
            .iter()
            .rev()
            .find(|&&e| e > sx)
            .copied()
            .ok_or_else(|| {
                damaged("no `%%EOF` after the last `startxref` (the file is truncated)")
            })?;
        let trailing = bytes[last_eof + 5..]
            .iter()
            .filter(|b| !syntax::is_white(**b))
            .count();
        let first_end = eofs.first().map(|&e| {
            let mut end = e + 5;
            // the end-of-line marker after %%EOF belongs to the revision
            if bytes.get(end) == Some(&b'\r') {
                end += 1;
            }
            if bytes.get(end) == Some(&b'\n') {
                end += 1;
            }
            end
        });
        let mut pdf = Pdf {
            bytes,
            limits,
            entries: HashMap::new(),
            trailer: Dict::default(),
            revisions: Revisions {
                sections: 0,
                startxrefs: find_all(bytes, b"startxref").len(),
                first_end,
                trailing,
                file_len: bytes.len(),
            },
            cache: RefCell::new(HashMap::new()),
            objstms: RefCell::new(HashMap::new()),
            inflated: Cell::new(0),
            nesting: Cell::new(0),
            xref_at,
        };
        pdf.read_xref_chain(xref_at)?;
        if pdf.trailer.get(b"Root").and_then(Object::as_ref).is_none() {
            return Err(damaged("the trailer has no `/Root` reference"));
        }
        Ok(pdf)
    }

    pub fn bytes(&self) -> &'a [u8] {
        self.bytes
    }

    pub fn trailer(&self) -> &Dict {
        &self.trailer
    }

    pub fn revisions(&self) -> &Revisions {
        &self.revisions
    }

    pub fn limits(&self) -> Limits {
        self.limits
    }

    /// Offset of the cross-reference section the file's `startxref` names.
    pub fn xref_offset(&self) -> usize {
        self.xref_at
    }

    /// Object numbers in use, sorted.
    pub fn object_numbers(&self) -> Vec<u32> {
        let mut v: Vec<u32> = self
            .entries
            .iter()
            .filter(|(_, e)| !matches!(e, Entry::Free))
            .map(|(n, _)| *n)
            .collect();
        v.sort_unstable();
        v
    }

    /// Where object `num` starts in the file, when it is not inside an object stream.
    pub fn offset_of(&self, num: u32) -> Option<usize> {
        match self.entries.get(&num) {
            Some(Entry::At { offset, .. }) => Some(*offset),
            _ => None,
        }
    }

    /// The generation number the cross-reference gives object `num` (stored on its own).
    pub fn generation_of(&self, num: u32) -> Option<u16> {
        match self.entries.get(&num) {
            Some(Entry::At { gen, .. }) => Some(*gen),
            _ => None,
        }
    }

    /// Every cross-reference section, newest first: entries of newer sections win.
    fn read_xref_chain(&mut self, start: usize) -> Result<(), PdfError> {
        let mut seen = HashSet::new();
        let mut next = Some(start);
        let mut newest = true;
        while let Some(at) = next {
            if !seen.insert(at) {
                return Err(damaged("the cross-reference sections form a loop"));
            }
            if seen.len() > self.limits.max_revisions {
                return Err(PdfError::Limit(format!(
                    "more than {} cross-reference sections",
                    self.limits.max_revisions
                )));
            }
            let trailer = self.read_xref_section(at)?;
            self.revisions.sections += 1;
            next = match trailer.get(b"Prev") {
                Some(Object::Int(p)) => Some(
                    usize::try_from(*p)
                        .ok()
                        .filter(|&p| p < self.bytes.len())
                        .ok_or_else(|| damaged("`/Prev` points outside the file"))?,
                ),
                _ => None,
            };
            if newest {
                self.trailer = trailer;
                newest = false;
            }
        }
        Ok(())
    }

    fn add_entry(&mut self, num: u32, entry: Entry) -> Result<(), PdfError> {
        if !self.entries.contains_key(&num) {
            if self.entries.len() >= self.limits.max_objects {
                return Err(PdfError::Limit(format!(
                    "more than {} objects",
                    self.limits.max_objects
                )));
            }
            self.entries.insert(num, entry);
        }
        Ok(())
    }

    /// One section (table or stream) at `at`; returns its trailer dictionary.
    fn read_xref_section(&mut self, at: usize) -> Result<Dict, PdfError> {
        let mut p = Parser::new(self.bytes, at);
        if p.eat_keyword(b"xref") {
            // Collect first, add after: a hybrid file's /XRefStm entries come before the table's.
            let mut table = Vec::new();
            loop {
                p.skip_ws();
                if p.eat_keyword(b"trailer") {
                    break;
                }
                let start = p
                    .uint()
                    .map_err(|e| syntax("the cross-reference table", e))?;
                let count = p
                    .uint()
                    .map_err(|e| syntax("the cross-reference table", e))?;
                if count > self.limits.max_objects as u64 || start > u64::from(u32::MAX) {
                    return Err(PdfError::Limit(format!(
                        "a cross-reference subsection of {count} entries"
                    )));
                }
                for i in 0..count {
                    let offset = p.uint().map_err(|e| syntax("a cross-reference entry", e))?;
                    let gen = p.uint().map_err(|e| syntax("a cross-reference entry", e))?;
                    p.skip_ws();
                    let kind = p.peek_word();
                    let num = u32::try_from(start + i)
                        .map_err(|_| damaged("an object number out of range"))?;
                    let entry = match kind {
                        b"n" => Entry::At {
                            offset: usize::try_from(offset)
                                .ok()
                                .filter(|&o| o < self.bytes.len())
                                .ok_or_else(|| {
                                    damaged(format!(
                                        "object {num} is listed beyond the end of the file"
                                    ))
                                })?,
                            gen: u16::try_from(gen).unwrap_or(u16::MAX),
                        },
                        b"f" => Entry::Free,
                        _ => {
                            return Err(syntax(
                                "a cross-reference entry",
                                p.err("expected `n` or `f`"),
                            ))
                        }
                    };
                    p.pos += 1;
                    if table.len() >= self.limits.max_objects {
                        return Err(PdfError::Limit(format!(
                            "more than {} objects",
                            self.limits.max_objects
                        )));
                    }
                    table.push((num, entry));
                }
            }
            p.skip_ws();
            if p.buf.get(p.pos..p.pos + 2) != Some(b"<<") {
                return Err(damaged("the trailer is not a dictionary"));
            }
            let trailer = p.dict(0).map_err(|e| syntax("the trailer", e))?;
            if let Some(Object::Int(s)) = trailer.get(b"XRefStm") {
                let s = usize::try_from(*s)
                    .ok()
                    .filter(|&s| s < self.bytes.len())
                    .ok_or_else(|| damaged("`/XRefStm` points outside the file"))?;
                self.revisions.sections += 1;
                self.read_xref_stream(s)?;
            }
            for (num, entry) in table {
                self.add_entry(num, entry)?;
            }
            Ok(trailer)
        } else {
            self.read_xref_stream(at)
        }
    }

    /// A cross-reference stream (§7.5.8) at `at`; returns its dictionary (the trailer).
    fn read_xref_stream(&mut self, at: usize) -> Result<Dict, PdfError> {
        let (_, ind) = self.parse_at(at, None)?;
        let Indirect::Stream(s) = ind else {
            return Err(damaged(
                "`startxref` points neither at `xref` nor at a cross-reference stream",
            ));
        };
        if s.dict.type_name() != Some(b"XRef") {
            return Err(damaged(
                "`startxref` points at an object that is not a cross-reference stream",
            ));
        }
        let data = self.decode(&s)?;
        let w: Vec<usize> = s
            .dict
            .get(b"W")
            .and_then(Object::as_array)
            .map(|a| {
                a.iter()
                    .map(|o| {
                        o.as_int()
                            .and_then(|i| usize::try_from(i).ok())
                            .unwrap_or(99)
                    })
                    .collect()
            })
            .unwrap_or_default();
        if w.len() != 3 || w.iter().any(|&x| x > 8) {
            return Err(damaged("a cross-reference stream with bad `/W` widths"));
        }
        let size = s.dict.get(b"Size").and_then(Object::as_int).unwrap_or(0);
        let index: Vec<i64> = match s.dict.get(b"Index").and_then(Object::as_array) {
            Some(a) => a.iter().filter_map(Object::as_int).collect(),
            None => vec![0, size],
        };
        let row = w[0] + w[1] + w[2];
        if row == 0 {
            return Err(damaged("a cross-reference stream with zero-width rows"));
        }
        let field = |b: &[u8]| b.iter().fold(0u64, |n, &x| (n << 8) | u64::from(x));
        let mut rows = data.chunks_exact(row);
        for pair in index.chunks(2) {
            let [start, count] = pair else {
                return Err(damaged("a cross-reference stream with an odd `/Index`"));
            };
            if *start < 0 || *count < 0 || *count as u64 > self.limits.max_objects as u64 {
                return Err(damaged("a cross-reference stream with a bad `/Index`"));
            }
            for i in 0..*count {
                let Some(r) = rows.next() else {
                    return Err(damaged(
                        "a cross-reference stream shorter than its `/Index`",
                    ));
                };
                let kind = if w[0] == 0 { 1 } else { field(&r[..w[0]]) };
                let f2 = field(&r[w[0]..w[0] + w[1]]);
                let f3 = field(&r[w[0] + w[1]..]);
                let num = u32::try_from(start + i)
                    .map_err(|_| damaged("an object number out of range"))?;
                let entry = match kind {
                    0 => Entry::Free,
                    1 => Entry::At {
                        offset: usize::try_from(f2)
                            .ok()
                            .filter(|&o| o < self.bytes.len())
                            .ok_or_else(|| {
                                damaged(format!(
                                    "object {num} is listed beyond the end of the file"
                                ))
                            })?,
                        gen: u16::try_from(f3).unwrap_or(u16::MAX),
                    },
                    2 => Entry::Packed {
                        stream: u32::try_from(f2)
                            .map_err(|_| damaged("an object stream number out of range"))?,
                        index: usize::try_from(f3).unwrap_or(usize::MAX),
                    },
                    _ => continue, // reserved types are ignored, as §7.5.8.3 asks
                };
                self.add_entry(num, entry)?;
            }
        }
        Ok(s.dict)
    }

    /// Parses `num gen obj … endobj` at `at`; `expect` is the number the cross-reference gives.
    fn parse_at(&self, at: usize, expect: Option<u32>) -> Result<(Ref, Indirect), PdfError> {
        self.parse_span(at, expect).map(|(r, o, _)| (r, o))
    }

    /// [`Self::parse_at`], also giving the offset just after `endobj`.
    fn parse_span(
        &self,
        at: usize,
        expect: Option<u32>,
    ) -> Result<(Ref, Indirect, usize), PdfError> {
        let what = |n: Option<u32>| match n {
            Some(n) => format!("object {n}"),
            None => format!("the object at byte {at}"),
        };
        let mut p = Parser::new(self.bytes, at);
        let num = p.uint().map_err(|e| syntax(&what(expect), e))?;
        let gen = p.uint().map_err(|e| syntax(&what(expect), e))?;
        if !p.eat_keyword(b"obj") {
            return Err(damaged(format!(
                "{} is not where the cross-reference says (no `obj` at byte {at})",
                what(expect)
            )));
        }
        let r = Ref {
            num: u32::try_from(num).map_err(|_| damaged("object number out of range"))?,
            gen: u16::try_from(gen).unwrap_or(u16::MAX),
        };
        if let Some(n) = expect {
            if n != r.num {
                return Err(damaged(format!(
                    "object {n} is not where the cross-reference says (found object {} at byte {at})",
                    r.num
                )));
            }
        }
        let obj = p.object(0).map_err(|e| syntax(&what(Some(r.num)), e))?;
        let ind = if p.eat_keyword(b"stream") {
            let Object::Dict(dict) = obj else {
                return Err(damaged(format!(
                    "{} has a stream without a dictionary",
                    what(Some(r.num))
                )));
            };
            // the keyword is followed by CRLF or LF (§7.3.8.1)
            match (p.buf.get(p.pos), p.buf.get(p.pos + 1)) {
                (Some(b'\r'), Some(b'\n')) => p.pos += 2,
                (Some(b'\n'), _) | (Some(b'\r'), _) => p.pos += 1,
                _ => {}
            }
            let start = p.pos;
            let len = match dict.get(b"Length") {
                Some(Object::Int(n)) => *n,
                Some(Object::Ref(lr)) if lr.num != r.num => match self.get(*lr)?.as_ref() {
                    Indirect::Object(Object::Int(n)) => *n,
                    _ => {
                        return Err(damaged(format!(
                            "{}: `/Length` is not a number",
                            what(Some(r.num))
                        )))
                    }
                },
                _ => {
                    return Err(damaged(format!(
                        "{}: stream without a usable `/Length`",
                        what(Some(r.num))
                    )))
                }
            };
            let end = usize::try_from(len)
                .ok()
                .and_then(|l| start.checked_add(l))
                .filter(|&e| e <= self.bytes.len())
                .ok_or_else(|| {
                    damaged(format!(
                        "{}: its stream runs past the end of the file (the file is truncated)",
                        what(Some(r.num))
                    ))
                })?;
            p.pos = end;
            if !p.eat_keyword(b"endstream") {
                return Err(damaged(format!(
                    "{}: no `endstream` where `/Length` says the stream ends",
                    what(Some(r.num))
                )));
            }
            Indirect::Stream(Stream {
                dict,
                data: start..end,
            })
        } else {
            Indirect::Object(obj)
        };
        if !p.eat_keyword(b"endobj") {
            return Err(damaged(format!("{}: no `endobj`", what(Some(r.num)))));
        }
        Ok((r, ind, p.pos))
    }

    /// The byte range of object `num` as written (`num gen obj` … `endobj` and its end of line).
    pub fn object_span(&self, num: u32) -> Result<Range<usize>, PdfError> {
        let at = self
            .offset_of(num)
            .ok_or_else(|| damaged(format!("object {num} is not stored on its own")))?;
        let (_, _, mut end) = self.parse_span(at, Some(num))?;
        match (self.bytes.get(end), self.bytes.get(end + 1)) {
            (Some(b'\r'), Some(b'\n')) => end += 2,
            (Some(b'\n'), _) | (Some(b'\r'), _) => end += 1,
            _ => {}
        }
        Ok(at..end)
    }

    /// The indirect object `r` (a missing or free object is `null`, as §7.3.10 says).
    pub fn get(&self, r: Ref) -> Result<Rc<Indirect>, PdfError> {
        if let Some(o) = self.cache.borrow().get(&r.num) {
            return Ok(o.clone());
        }
        let depth = self.nesting.get();
        if depth >= MAX_LOOKUP_NESTING {
            return Err(damaged(format!(
                "{r}: lookups nested more than {MAX_LOOKUP_NESTING} deep"
            )));
        }
        self.nesting.set(depth + 1);
        let result = self.load(r);
        self.nesting.set(depth);
        let ind = Rc::new(result?);
        self.cache.borrow_mut().insert(r.num, ind.clone());
        Ok(ind)
    }

    fn load(&self, r: Ref) -> Result<Indirect, PdfError> {
        match self.entries.get(&r.num).copied() {
            None | Some(Entry::Free) => Ok(Indirect::Object(Object::Null)),
            Some(Entry::At { offset, .. }) => self.parse_at(offset, Some(r.num)).map(|(_, o)| o),
            Some(Entry::Packed { stream, index }) => {
                let os = self.object_stream(stream)?;
                let Some(&(num, off)) = os.members.get(index) else {
                    return Err(damaged(format!(
                        "{r}: object stream {stream} has no member {index}"
                    )));
                };
                if num != r.num {
                    return Err(damaged(format!(
                        "{r}: object stream {stream} holds object {num} where the cross-reference expects it"
                    )));
                }
                let mut p = Parser::new(&os.data, off);
                p.object(0)
                    .map(Indirect::Object)
                    .map_err(|e| syntax(&format!("{r} in object stream {stream}"), e))
            }
        }
    }

    fn object_stream(&self, num: u32) -> Result<Rc<ObjStm>, PdfError> {
        if let Some(os) = self.objstms.borrow().get(&num) {
            return Ok(os.clone());
        }
        let ind = self.get(Ref { num, gen: 0 })?;
        let Indirect::Stream(s) = ind.as_ref() else {
            return Err(damaged(format!("object {num} should be an object stream")));
        };
        let data = self.decode(s)?;
        let n = s.dict.get(b"N").and_then(Object::as_int).unwrap_or(-1);
        let first = s.dict.get(b"First").and_then(Object::as_int).unwrap_or(-1);
        if n < 0 || first < 0 || first as u64 > data.len() as u64 || n as u64 > data.len() as u64 {
            return Err(damaged(format!(
                "object stream {num} has a bad `/N` or `/First`"
            )));
        }
        let mut p = Parser::new(&data, 0);
        let mut members = Vec::with_capacity(n as usize);
        for _ in 0..n {
            let m = p
                .uint()
                .map_err(|e| syntax(&format!("object stream {num}"), e))?;
            let o = p
                .uint()
                .map_err(|e| syntax(&format!("object stream {num}"), e))?;
            let at = usize::try_from(o)
                .ok()
                .and_then(|o| o.checked_add(first as usize))
                .filter(|&a| a < data.len())
                .ok_or_else(|| {
                    damaged(format!(
                        "object stream {num} has a member offset outside it"
                    ))
                })?;
            members.push((u32::try_from(m).unwrap_or(u32::MAX), at));
        }
        let os = Rc::new(ObjStm { data, members });
        self.objstms.borrow_mut().insert(num, os.clone());
        Ok(os)
    }

    /// `o` with references followed (a chain of references is followed up to a few steps).
    pub fn resolve(&self, o: &Object) -> Result<Resolved, PdfError> {
        let mut cur = match o {
            Object::Ref(r) => *r,
            other => return Ok(Resolved::Direct(other.clone())),
        };
        for _ in 0..MAX_LOOKUP_NESTING {
            let ind = self.get(cur)?;
            match ind.as_ref() {
                Indirect::Object(Object::Ref(next)) => cur = *next,
                _ => return Ok(Resolved::Indirect(cur, ind)),
            }
        }
        Err(damaged(format!("{cur}: a chain of references too long")))
    }

    /// The dictionary `o` is or refers to (a stream's dictionary counts).
    pub fn dict_of(&self, o: &Object) -> Result<Option<Dict>, PdfError> {
        Ok(match self.resolve(o)? {
            Resolved::Direct(Object::Dict(d)) => Some(d),
            Resolved::Indirect(_, ind) => ind.dict().cloned(),
            _ => None,
        })
    }

    /// The raw (encoded) bytes of a stream.
    pub fn raw(&self, s: &Stream) -> &'a [u8] {
        &self.bytes[s.data.clone()]
    }

    /// The decoded bytes of a stream: unfiltered, or `FlateDecode` (with a PNG predictor when
    /// `/DecodeParms` asks), within the caps of [`Limits`].
    pub fn decode(&self, s: &Stream) -> Result<Vec<u8>, PdfError> {
        let raw = self.raw(s);
        let filters: Vec<Vec<u8>> = match s.dict.get(b"Filter") {
            None | Some(Object::Null) => Vec::new(),
            Some(Object::Name(n)) => vec![n.clone()],
            Some(Object::Array(a)) => a
                .iter()
                .filter_map(|o| o.as_name().map(<[u8]>::to_vec))
                .collect(),
            Some(_) => {
                return Err(damaged(
                    "a stream's `/Filter` is neither a name nor an array",
                ))
            }
        };
        let mut data = raw.to_vec();
        for (i, f) in filters.iter().enumerate() {
            match f.as_slice() {
                b"FlateDecode" | b"Fl" => {
                    let budget = self
                        .limits
                        .max_inflated_total
                        .saturating_sub(self.inflated.get());
                    let cap = self.limits.max_stream.min(budget);
                    data = filters::inflate(&data, cap).map_err(|e| match e {
                        filters::FilterError::TooLarge { .. } if cap < self.limits.max_stream => {
                            PdfError::Limit(format!(
                                "the streams of this file inflate beyond the cap of {} in total",
                                bytes_text(self.limits.max_inflated_total)
                            ))
                        }
                        filters::FilterError::TooLarge { .. } => PdfError::Limit(format!(
                            "a stream inflates beyond the cap of {}",
                            bytes_text(self.limits.max_stream)
                        )),
                        other => damaged(format!("a stream: {other}")),
                    })?;
                    self.inflated.set(self.inflated.get() + data.len());
                    let parms = match s.dict.get(b"DecodeParms") {
                        Some(Object::Array(a)) => a.get(i).and_then(Object::as_dict),
                        Some(Object::Dict(d)) => Some(d),
                        _ => None,
                    };
                    if let Some(p) = parms {
                        let get = |k: &[u8], d: i64| p.get(k).and_then(Object::as_int).unwrap_or(d);
                        let predictor = get(b"Predictor", 1);
                        if predictor > 1 {
                            let as_usize = |v: i64| usize::try_from(v).unwrap_or(0);
                            data = filters::unpredict(
                                &data,
                                predictor,
                                as_usize(get(b"Colors", 1)),
                                as_usize(get(b"BitsPerComponent", 8)),
                                as_usize(get(b"Columns", 1)),
                            )
                            .map_err(|e| damaged(format!("a stream: {e}")))?;
                        }
                    }
                }
                other => {
                    return Err(damaged(format!(
                        "a stream's filter `{}` is not one this reader decodes",
                        String::from_utf8_lossy(other)
                    )))
                }
            }
        }
        Ok(data)
    }

    /// The document catalog.
    pub fn catalog(&self) -> Result<(Ref, Dict), PdfError> {
        let r = self
            .trailer
            .get(b"Root")
            .and_then(Object::as_ref)
            .ok_or_else(|| damaged("the trailer has no `/Root` reference"))?;
        match self.get(r)?.as_ref() {
            Indirect::Object(Object::Dict(d)) => Ok((r, d.clone())),
            _ => Err(damaged("the document catalog is not a dictionary")),
        }
    }
}

/// An object after following references.
#[derive(Debug, Clone)]
pub enum Resolved {
    Direct(Object),
    Indirect(Ref, Rc<Indirect>),
}

/// A PDF text string (§7.9.2.2): UTF-16BE with a byte-order mark, UTF-8 with one (PDF 2.0), else
/// PDFDocEncoding (read as Latin-1, which agrees with it for the characters names use).
pub fn text_string(bytes: &[u8]) -> String {
    if bytes.len() >= 2 && bytes[0] == 0xFE && bytes[1] == 0xFF {
        let units: Vec<u16> = bytes[2..]
            .chunks_exact(2)
            .map(|c| u16::from_be_bytes([c[0], c[1]]))
            .collect();
        String::from_utf16_lossy(&units)
    } else if bytes.len() >= 3 && bytes[..3] == [0xEF, 0xBB, 0xBF] {
        String::from_utf8_lossy(&bytes[3..]).into_owned()
    } else {
        bytes.iter().map(|&b| b as char).collect()
    }
}

#[cfg(test)]
pub(crate) mod tests;
