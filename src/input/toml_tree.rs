//! The tree a TOML input file is read into, and a direct parser for the plain TOML that input
//! files are written in.
//!
//! Owns [`parse`]: the text's tree with the byte span of every key and value, or the syntax
//! errors. A survey is read by `review` ten thousand times a second; the general TOML parser
//! (the `toml` crate) took about a tenth of that time, most of it on features an input file
//! seldom uses. So a document written in plain TOML (bare keys, one-line basic and literal
//! strings with the common escapes, decimal numbers, booleans, arrays, one-line inline tables,
//! `[table]` and `[[array]]` headers, comments) is read here directly; anything else (quoted or
//! dotted keys, multi-line strings, dates, hexadecimal numbers, underscores in numbers, any
//! syntax error) gives up at once and the whole text goes to the `toml` crate, whose tree is
//! converted. Both routes give the same tree with the same spans (tested against the crate on
//! every input file of the repository and on generated documents), so what a user sees, error
//! locations included, does not depend on the route. Must not read files or know any file
//! format.

use std::borrow::Cow;
use std::ops::Range;
use toml::de::{DeTable, DeValue};
pub use toml::Spanned;

/// A TOML value.
#[derive(Debug, Clone, PartialEq)]
pub enum Value<'a> {
    String(Cow<'a, str>),
    Integer(Integer<'a>),
    Float(Float<'a>),
    Boolean(bool),
    Datetime(toml::value::Datetime),
    Array(Array<'a>),
    Table(Map<'a>),
}

/// An integer as written: its digits (with any sign) and their base.
#[derive(Debug, Clone, PartialEq)]
pub struct Integer<'a> {
    digits: Cow<'a, str>,
    radix: u32,
}

impl Integer<'_> {
    /// The digits in a form [`i64::from_str_radix`] takes, with [`Integer::radix`].
    pub fn as_str(&self) -> &str {
        &self.digits
    }

    /// The base of [`Integer::as_str`]: 2, 8, 10 or 16.
    pub fn radix(&self) -> u32 {
        self.radix
    }
}

impl std::fmt::Display for Integer<'_> {
    /// As TOML writes it: `0x`, `0o` or `0b` before digits of another base.
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let prefix = match self.radix {
            2 => "0b",
            8 => "0o",
            16 => "0x",
            _ => "",
        };
        write!(f, "{prefix}{}", self.digits)
    }
}

/// A float as written, in a form [`str::parse`] takes.
#[derive(Debug, Clone, PartialEq)]
pub struct Float<'a>(Cow<'a, str>);

impl Float<'_> {
    pub fn as_str(&self) -> &str {
        &self.0
    }
}

impl std::fmt::Display for Float<'_> {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.0)
    }
}

/// An array, `[1, 2]` or the tables of `[[name]]` headers.
#[derive(Debug, Clone, Default)]
pub struct Array<'a> {
    items: Vec<Spanned<Value<'a>>>,
    /// Made by `[[name]]` headers (only those may add to it).
    of_headers: bool,
}

impl PartialEq for Array<'_> {
    /// Equal items with equal spans.
    fn eq(&self, other: &Self) -> bool {
        self.items.len() == other.items.len()
            && self
                .items
                .iter()
                .zip(&other.items)
                .all(|(a, b)| a.span() == b.span() && a.get_ref() == b.get_ref())
    }
}

impl<'a> std::ops::Deref for Array<'a> {
    type Target = [Spanned<Value<'a>>];
    fn deref(&self) -> &Self::Target {
        &self.items
    }
}

/// How a table came to be, which decides what may still be added to it by a header.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
enum Origin {
    /// The document, or a table the `toml` crate read.
    #[default]
    Done,
    /// Named on the way to another header's table (`a` of `[a.b]`): `[a]` may still define it.
    Implied,
    /// Defined by its own header.
    Header,
    /// Written inline, `{ … }`: complete as written.
    Inline,
}

/// A table: its entries sorted by key (as the `toml` crate's tree iterates them).
#[derive(Debug, Clone, Default)]
pub struct Map<'a> {
    entries: Vec<(Spanned<Cow<'a, str>>, Spanned<Value<'a>>)>,
    origin: Origin,
}

impl PartialEq for Map<'_> {
    /// Equal entries with equal spans (how a table came to be is the parser's business).
    fn eq(&self, other: &Self) -> bool {
        self.entries.len() == other.entries.len()
            && self.entries.iter().zip(&other.entries).all(|(a, b)| {
                a.0.span() == b.0.span()
                    && a.0.get_ref() == b.0.get_ref()
                    && a.1.span() == b.1.span()
                    && a.1.get_ref() == b.1.get_ref()
            })
    }
}

impl<'a> Map<'a> {
    fn with_origin(origin: Origin) -> Self {
        Map {
            entries: Vec::new(),
            origin,
        }
    }

    fn find(&self, key: &str) -> Result<usize, usize> {
        self.entries
            .binary_search_by(|(k, _)| k.get_ref().as_ref().cmp(key))
    }

    /// The value of `key`.
    pub fn get(&self, key: &str) -> Option<&Spanned<Value<'a>>> {
        self.get_key_value(key).map(|(_, v)| v)
    }

    /// `key` as written (with its span) and its value.
    pub fn get_key_value(
        &self,
        key: &str,
    ) -> Option<(&Spanned<Cow<'a, str>>, &Spanned<Value<'a>>)> {
        // an input file's tables hold a few keys each, and most keys asked for are not there:
        // one pass comparing lengths first beats ordering strings by halves
        let i = if self.entries.len() <= 16 {
            (self.entries.iter()).position(|(k, _)| k.get_ref().as_ref() == key)?
        } else {
            self.find(key).ok()?
        };
        let (k, v) = &self.entries[i];
        Some((k, v))
    }

    /// The entries in key order.
    pub fn iter(&self) -> impl Iterator<Item = (&Spanned<Cow<'a, str>>, &Spanned<Value<'a>>)> + '_ {
        self.entries.iter().map(|(k, v)| (k, v))
    }
}

/// Parses a TOML document: its top-level table, or every syntax error (with the `toml` crate's
/// recovery and words).
pub fn parse(text: &str) -> Result<Map<'_>, Vec<toml::de::Error>> {
    if let Some(root) = parse_plain(text) {
        return Ok(root);
    }
    let (root, errors) = DeTable::parse_recoverable(text);
    if errors.is_empty() {
        Ok(from_table(root.into_inner()))
    } else {
        Err(errors)
    }
}

fn from_table(t: DeTable<'_>) -> Map<'_> {
    // the crate's map iterates in key order: the entries arrive sorted
    Map {
        entries: t
            .into_iter()
            .map(|(k, v)| {
                let span = v.span();
                (k, Spanned::new(span, from_value(v.into_inner())))
            })
            .collect(),
        origin: Origin::Done,
    }
}

fn from_value(v: DeValue<'_>) -> Value<'_> {
    match v {
        DeValue::String(s) => Value::String(s),
        DeValue::Integer(i) => Value::Integer(Integer {
            radix: i.radix(),
            digits: Cow::Owned(i.as_str().to_string()),
        }),
        DeValue::Float(f) => Value::Float(Float(Cow::Owned(f.as_str().to_string()))),
        DeValue::Boolean(b) => Value::Boolean(b),
        DeValue::Datetime(d) => Value::Datetime(d),
        DeValue::Array(a) => Value::Array(Array {
            items: a
                .into_iter()
                .map(|item| {
                    let span = item.span();
                    Spanned::new(span, from_value(item.into_inner()))
                })
                .collect(),
            // only matters while parsing
            of_headers: false,
        }),
        DeValue::Table(t) => Value::Table(from_table(t)),
    }
}

/// A document in plain TOML read directly; `None` at the first thing this reader does not take
/// (which may be valid TOML, or an error): the caller then reads it with the `toml` crate.
pub fn parse_plain(text: &str) -> Option<Map<'_>> {
    let mut p = Plain {
        text,
        b: text.as_bytes(),
        at: 0,
    };
    let mut root = Map::with_origin(Origin::Done);
    // the keys of the table the key/value lines go into
    let mut current: Vec<&str> = Vec::new();
    loop {
        p.blank();
        match p.peek() {
            None => return Some(root),
            Some(b'\n') => p.at += 1,
            Some(b'\r') => p.newline()?,
            Some(b'#') => {
                p.comment()?;
                p.newline()?;
            }
            Some(b'[') => {
                current = p.header(&mut root)?;
                p.end_of_line()?;
            }
            Some(_) => {
                let table = table_at(&mut root, &current)?;
                p.key_value(table, 0)?;
                p.end_of_line()?;
            }
        }
    }
}

/// The table `path` leads to from `root` (through the last table of an array of tables).
fn table_at<'m, 'a>(root: &'m mut Map<'a>, path: &[&str]) -> Option<&'m mut Map<'a>> {
    let mut t = root;
    for key in path {
        let i = t.find(key).ok()?;
        t = match t.entries[i].1.get_mut() {
            Value::Table(m) => m,
            Value::Array(a) if a.of_headers => match a.items.last_mut()?.get_mut() {
                Value::Table(m) => m,
                _ => return None,
            },
            _ => return None,
        };
    }
    Some(t)
}

struct Plain<'a> {
    text: &'a str,
    b: &'a [u8],
    at: usize,
}

/// A byte TOML does not allow in a string or a comment (control characters but tab).
fn control(c: u8) -> bool {
    (c < 0x20 && c != b'\t') || c == 0x7f
}

fn bare_key_byte(c: u8) -> bool {
    c.is_ascii_alphanumeric() || c == b'_' || c == b'-'
}

impl<'a> Plain<'a> {
    fn peek(&self) -> Option<u8> {
        self.b.get(self.at).copied()
    }

    /// Spaces and tabs.
    fn blank(&mut self) {
        while matches!(self.peek(), Some(b' ' | b'\t')) {
            self.at += 1;
        }
    }

    /// A line break (LF or CRLF), or the end of the text.
    fn newline(&mut self) -> Option<()> {
        match self.peek() {
            None => Some(()),
            Some(b'\n') => {
                self.at += 1;
                Some(())
            }
            Some(b'\r') if self.b.get(self.at + 1) == Some(&b'\n') => {
                self.at += 2;
                Some(())
            }
            _ => None,
        }
    }

    /// A comment from `#` to the end of its line (the line break not taken).
    fn comment(&mut self) -> Option<()> {
        self.at += 1;
        while let Some(c) = self.peek() {
            if c == b'\n' || c == b'\r' {
                break;
            }
            if control(c) {
                return None;
            }
            self.at += 1;
        }
        Some(())
    }

    /// What may follow a key/value pair or a header: blanks, a comment, the line's end.
    fn end_of_line(&mut self) -> Option<()> {
        self.blank();
        if self.peek() == Some(b'#') {
            self.comment()?;
        }
        self.newline()
    }

    /// A bare key and its span.
    fn key(&mut self) -> Option<Spanned<Cow<'a, str>>> {
        let start = self.at;
        while self.peek().is_some_and(bare_key_byte) {
            self.at += 1;
        }
        (self.at > start)
            .then(|| Spanned::new(start..self.at, Cow::Borrowed(&self.text[start..self.at])))
    }

    /// `[a.b]` or `[[a.b]]`: makes (or finds) its table and returns the path to it.
    fn header(&mut self, root: &mut Map<'a>) -> Option<Vec<&'a str>> {
        let start = self.at;
        let array = self.b.get(self.at + 1) == Some(&b'[');
        self.at += if array { 2 } else { 1 };
        let mut keys: Vec<Spanned<Cow<'a, str>>> = Vec::new();
        loop {
            self.blank();
            keys.push(self.key()?);
            self.blank();
            match self.peek()? {
                b'.' => self.at += 1,
                b']' => break,
                _ => return None,
            }
        }
        self.at += 1;
        if array {
            if self.peek() != Some(b']') {
                return None;
            }
            self.at += 1;
        }
        let span = start..self.at;
        // bare keys are their text
        let text = self.text;
        let path: Vec<&'a str> = keys.iter().map(|k| &text[k.span()]).collect();
        let (last, parents) = keys.split_last()?;
        let mut t = root;
        for key in parents {
            t = step(t, key)?;
        }
        place(t, last, span, array)?;
        Some(path)
    }

    /// `key = value` into `table` (a key it already has is not this reader's to judge), on a line
    /// of its own (`depth` 0) or inside an inline table (`depth`: how deep its value sits).
    fn key_value(&mut self, table: &mut Map<'a>, depth: usize) -> Option<()> {
        let key = self.key()?;
        self.blank();
        if self.peek() != Some(b'=') {
            return None;
        }
        self.at += 1;
        self.blank();
        let value = self.value(depth)?;
        let i = table.find(key.get_ref()).err()?;
        table.entries.insert(i, (key, value));
        Some(())
    }

    /// A value and its span; `depth` counts the arrays and inline tables it is inside.
    fn value(&mut self, depth: usize) -> Option<Spanned<Value<'a>>> {
        if depth > 32 {
            return None;
        }
        let start = self.at;
        let value = match self.peek()? {
            b'"' => self.basic_string()?,
            b'\'' => self.literal_string()?,
            b'[' => self.array(depth)?,
            b'{' => self.inline_table(depth)?,
            b't' if self.b[self.at..].starts_with(b"true") => {
                self.at += 4;
                Value::Boolean(true)
            }
            b'f' if self.b[self.at..].starts_with(b"false") => {
                self.at += 5;
                Value::Boolean(false)
            }
            b'0'..=b'9' | b'+' | b'-' => self.number()?,
            _ => return None,
        };
        // a value ends at a blank, a comment, a line break or the bracket or comma after it
        if !matches!(
            self.peek(),
            None | Some(b' ' | b'\t' | b'#' | b'\n' | b'\r' | b',' | b']' | b'}')
        ) {
            return None;
        }
        Some(Spanned::new(start..self.at, value))
    }

    /// `"…"` on one line, with the escapes `\" \\ \b \f \n \r \t \uXXXX \UXXXXXXXX`.
    fn basic_string(&mut self) -> Option<Value<'a>> {
        self.at += 1;
        let start = self.at;
        let mut owned: Option<String> = None;
        let mut run = start;
        loop {
            let c = self.peek()?;
            match c {
                b'"' => {
                    let tail = &self.text[run..self.at];
                    self.at += 1;
                    return Some(Value::String(match owned {
                        None => Cow::Borrowed(tail),
                        Some(mut s) => {
                            s.push_str(tail);
                            Cow::Owned(s)
                        }
                    }));
                }
                b'\\' => {
                    let s = owned.get_or_insert_with(String::new);
                    s.push_str(&self.text[run..self.at]);
                    let (ch, len) = self.escape()?;
                    s.push(ch);
                    self.at += len;
                    run = self.at;
                }
                c if control(c) => return None,
                _ => self.at += 1,
            }
        }
    }

    /// The escape at `self.at` (a backslash): the character and the escape's length.
    fn escape(&self) -> Option<(char, usize)> {
        let hex = |n: usize| -> Option<(char, usize)> {
            let digits = self.text.get(self.at + 2..self.at + 2 + n)?;
            if !digits.bytes().all(|c| c.is_ascii_hexdigit()) {
                return None;
            }
            char::from_u32(u32::from_str_radix(digits, 16).ok()?).map(|c| (c, 2 + n))
        };
        match self.b.get(self.at + 1)? {
            b'"' => Some(('"', 2)),
            b'\\' => Some(('\\', 2)),
            b'b' => Some(('\u{8}', 2)),
            b'f' => Some(('\u{c}', 2)),
            b'n' => Some(('\n', 2)),
            b'r' => Some(('\r', 2)),
            b't' => Some(('\t', 2)),
            b'u' => hex(4),
            b'U' => hex(8),
            _ => None,
        }
    }

    /// `'…'` on one line.
    fn literal_string(&mut self) -> Option<Value<'a>> {
        self.at += 1;
        let start = self.at;
        loop {
            match self.peek()? {
                b'\'' => break,
                c if control(c) => return None,
                _ => self.at += 1,
            }
        }
        let s = &self.text[start..self.at];
        self.at += 1;
        Some(Value::String(Cow::Borrowed(s)))
    }

    /// A decimal integer or float (no underscores, no leading zeros, no `inf` or `nan`).
    fn number(&mut self) -> Option<Value<'a>> {
        let start = self.at;
        if matches!(self.peek(), Some(b'+' | b'-')) {
            self.at += 1;
        }
        let digits = |p: &mut Self| {
            let s = p.at;
            while p.peek().is_some_and(|c| c.is_ascii_digit()) {
                p.at += 1;
            }
            p.at - s
        };
        let whole_start = self.at;
        let whole = digits(self);
        if whole == 0 || (whole > 1 && self.b[whole_start] == b'0') {
            return None;
        }
        let mut float = false;
        if self.peek() == Some(b'.') {
            self.at += 1;
            if digits(self) == 0 {
                return None;
            }
            float = true;
        }
        if matches!(self.peek(), Some(b'e' | b'E')) {
            self.at += 1;
            if matches!(self.peek(), Some(b'+' | b'-')) {
                self.at += 1;
            }
            if digits(self) == 0 {
                return None;
            }
            float = true;
        }
        let text = &self.text[start..self.at];
        if float {
            text.parse::<f64>()
                .ok()
                .filter(|x| x.is_finite())
                .map(|_| Value::Float(Float(Cow::Borrowed(text))))
        } else {
            // a whole number the crate would hold as an i64 for certain
            (whole <= 18).then_some(Value::Integer(Integer {
                digits: Cow::Borrowed(text),
                radix: 10,
            }))
        }
    }

    /// Blanks, line breaks and comments inside an array.
    fn array_space(&mut self) -> Option<()> {
        loop {
            self.blank();
            match self.peek()? {
                b'\n' | b'\r' => self.newline()?,
                b'#' => self.comment()?,
                _ => return Some(()),
            }
        }
    }

    /// `[v, v, …]`, over lines if need be, a comma after the last value allowed.
    fn array(&mut self, depth: usize) -> Option<Value<'a>> {
        self.at += 1;
        let mut items = Vec::new();
        loop {
            self.array_space()?;
            if self.peek()? == b']' {
                break;
            }
            items.push(self.value(depth + 1)?);
            self.array_space()?;
            match self.peek()? {
                b',' => self.at += 1,
                b']' => break,
                _ => return None,
            }
        }
        self.at += 1;
        Some(Value::Array(Array {
            items,
            of_headers: false,
        }))
    }

    /// `{ k = v, … }` on one line, no comma after the last pair.
    fn inline_table(&mut self, depth: usize) -> Option<Value<'a>> {
        self.at += 1;
        let mut table = Map::with_origin(Origin::Inline);
        self.blank();
        if self.peek()? == b'}' {
            self.at += 1;
            return Some(Value::Table(table));
        }
        loop {
            self.blank();
            self.key_value(&mut table, depth + 1)?;
            self.blank();
            match self.peek()? {
                b',' => self.at += 1,
                b'}' => break,
                _ => return None,
            }
        }
        self.at += 1;
        Some(Value::Table(table))
    }
}

/// Steps from `t` into its table `key` on the way to a header's table, making it if need be.
fn step<'m, 'a>(t: &'m mut Map<'a>, key: &Spanned<Cow<'a, str>>) -> Option<&'m mut Map<'a>> {
    let i = match t.find(key.get_ref()) {
        Ok(i) => i,
        Err(i) => {
            let span = key.span();
            let value = Value::Table(Map::with_origin(Origin::Implied));
            t.entries
                .insert(i, (key.clone(), Spanned::new(span, value)));
            i
        }
    };
    match t.entries[i].1.get_mut() {
        Value::Table(m) if m.origin != Origin::Inline => Some(m),
        Value::Array(a) if a.of_headers => match a.items.last_mut()?.get_mut() {
            Value::Table(m) => Some(m),
            _ => None,
        },
        _ => None,
    }
}

/// Makes the table a header names as `key` of `t` (`array`: adds one to its array of tables).
fn place<'a>(
    t: &mut Map<'a>,
    key: &Spanned<Cow<'a, str>>,
    span: Range<usize>,
    array: bool,
) -> Option<()> {
    let new_table = || Value::Table(Map::with_origin(Origin::Header));
    match t.find(key.get_ref()) {
        Err(i) => {
            let value = if array {
                Value::Array(Array {
                    items: vec![Spanned::new(span.clone(), new_table())],
                    of_headers: true,
                })
            } else {
                new_table()
            };
            t.entries
                .insert(i, (key.clone(), Spanned::new(span, value)));
            Some(())
        }
        Ok(i) => {
            let entry = &mut t.entries[i];
            match entry.1.get_mut() {
                Value::Array(a) if array && a.of_headers => {
                    a.items.push(Spanned::new(span, new_table()));
                    Some(())
                }
                // `[a]` after `[a.b]`: the table named on the way is defined here
                Value::Table(m) if !array && m.origin == Origin::Implied => {
                    m.origin = Origin::Header;
                    let value = std::mem::take(entry.1.get_mut());
                    *entry = (key.clone(), Spanned::new(span, value));
                    Some(())
                }
                _ => None,
            }
        }
    }
}

impl Default for Value<'_> {
    fn default() -> Self {
        Value::Boolean(false)
    }
}

#[cfg(test)]
mod tests;
