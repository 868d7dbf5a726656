//! PDF object syntax (ISO 32000-1 §7.2 lexical conventions, §7.3 objects): a bounded parser from
//! bytes to [`Object`] values.
//!
//! Owns tokens, strings, names, numbers, arrays, dictionaries and references. Never recurses deeper
//! than [`MAX_NESTING`] and never reads past the slice it is given, so hostile input costs time
//! proportional to its length.

use std::fmt;

/// Deepest nesting of arrays and dictionaries accepted (real documents stay below 10).
pub const MAX_NESTING: usize = 64;

/// An indirect reference `num gen R`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Ref {
    pub num: u32,
    pub gen: u16,
}

impl fmt::Display for Ref {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "object {} {}", self.num, self.gen)
    }
}

/// A direct PDF object.
#[derive(Debug, Clone, PartialEq)]
pub enum Object {
    Null,
    Bool(bool),
    Int(i64),
    Real(f64),
    /// A string, escapes decoded (literal or hex).
    Str(Vec<u8>),
    /// A name without the slash, `#xx` decoded.
    Name(Vec<u8>),
    Array(Vec<Object>),
    Dict(Dict),
    Ref(Ref),
}

/// A dictionary, keys in file order.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Dict(pub Vec<(Vec<u8>, Object)>);

impl Dict {
    /// The value of `key` (the first, if the file repeats a key).
    pub fn get(&self, key: &[u8]) -> Option<&Object> {
        self.0.iter().find(|(k, _)| k == key).map(|(_, v)| v)
    }

    pub fn iter(&self) -> impl Iterator<Item = (&[u8], &Object)> {
        self.0.iter().map(|(k, v)| (k.as_slice(), v))
    }

    pub fn len(&self) -> usize {
        self.0.len()
    }

    pub fn is_empty(&self) -> bool {
        self.0.is_empty()
    }

    /// `/Type` as bytes, when it is a name.
    pub fn type_name(&self) -> Option<&[u8]> {
        match self.get(b"Type") {
            Some(Object::Name(n)) => Some(n),
            _ => None,
        }
    }
}

impl Object {
    pub fn as_dict(&self) -> Option<&Dict> {
        match self {
            Object::Dict(d) => Some(d),
            _ => None,
        }
    }

    pub fn as_array(&self) -> Option<&[Object]> {
        match self {
            Object::Array(a) => Some(a),
            _ => None,
        }
    }

    pub fn as_int(&self) -> Option<i64> {
        match self {
            Object::Int(i) => Some(*i),
            _ => None,
        }
    }

    pub fn as_name(&self) -> Option<&[u8]> {
        match self {
            Object::Name(n) => Some(n),
            _ => None,
        }
    }

    pub fn as_ref(&self) -> Option<Ref> {
        match self {
            Object::Ref(r) => Some(*r),
            _ => None,
        }
    }
}

/// Why bytes are not PDF syntax, with the byte offset where the parser stopped.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SyntaxError {
    pub offset: usize,
    pub detail: &'static str,
}

impl fmt::Display for SyntaxError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} at byte {}", self.detail, self.offset)
    }
}

pub fn is_white(b: u8) -> bool {
    matches!(b, b'\0' | b'\t' | b'\n' | b'\x0c' | b'\r' | b' ')
}

pub fn is_delim(b: u8) -> bool {
    matches!(
        b,
        b'(' | b')' | b'<' | b'>' | b'[' | b']' | b'{' | b'}' | b'/' | b'%'
    )
}

fn is_regular(b: u8) -> bool {
    !is_white(b) && !is_delim(b)
}

/// A cursor over bytes; `base` is added to positions in errors (the slice's offset in the file).
pub struct Parser<'a> {
    pub buf: &'a [u8],
    pub pos: usize,
    pub base: usize,
}

impl<'a> Parser<'a> {
    pub fn new(buf: &'a [u8], pos: usize) -> Self {
        Parser { buf, pos, base: 0 }
    }

    pub fn err(&self, detail: &'static str) -> SyntaxError {
        SyntaxError {
            offset: self.base + self.pos,
            detail,
        }
    }

    fn peek(&self) -> Option<u8> {
        self.buf.get(self.pos).copied()
    }

    /// Skips white space and comments.
    pub fn skip_ws(&mut self) {
        while let Some(b) = self.peek() {
            if is_white(b) {
                self.pos += 1;
            } else if b == b'%' {
                while let Some(c) = self.peek() {
                    if c == b'\n' || c == b'\r' {
                        break;
                    }
                    self.pos += 1;
                }
            } else {
                break;
            }
        }
    }

    /// The next regular-character token (a keyword or number), without consuming it.
    pub fn peek_word(&self) -> &'a [u8] {
        let start = self.pos;
        let mut end = start;
        while end < self.buf.len() && is_regular(self.buf[end]) {
            end += 1;
        }
        &self.buf[start..end]
    }

    /// Consumes `word` (after white space) if it is next, as a whole token.
    pub fn eat_keyword(&mut self, word: &[u8]) -> bool {
        self.skip_ws();
        if self.peek_word() == word {
            self.pos += word.len();
            true
        } else {
            false
        }
    }

    /// An unsigned integer token.
    pub fn uint(&mut self) -> Result<u64, SyntaxError> {
        self.skip_ws();
        let w = self.peek_word();
        if w.is_empty() || w.len() > 19 || !w.iter().all(u8::is_ascii_digit) {
            return Err(self.err("expected a whole number"));
        }
        self.pos += w.len();
        Ok(w.iter().fold(0u64, |n, d| n * 10 + u64::from(d - b'0')))
    }

    /// One object; `R` references are recognised after two integers.
    pub fn object(&mut self, depth: usize) -> Result<Object, SyntaxError> {
        if depth > MAX_NESTING {
            return Err(self.err("arrays or dictionaries nested too deeply"));
        }
        self.skip_ws();
        let Some(b) = self.peek() else {
            return Err(self.err("unexpected end of data"));
        };
        match b {
            b'/' => {
                self.pos += 1;
                Ok(Object::Name(self.name_body()))
            }
            b'(' => self.literal_string().map(Object::Str),
            b'<' if self.buf.get(self.pos + 1) == Some(&b'<') => self.dict(depth).map(Object::Dict),
            b'<' => self.hex_string().map(Object::Str),
            b'[' => {
                self.pos += 1;
                let mut items = Vec::new();
                loop {
                    self.skip_ws();
                    match self.peek() {
                        Some(b']') => {
                            self.pos += 1;
                            return Ok(Object::Array(items));
                        }
                        None => return Err(self.err("unterminated array")),
                        _ => items.push(self.object(depth + 1)?),
                    }
                }
            }
            _ => self.word_object(),
        }
    }

    /// `<< … >>`, the cursor on the first `<`.
    pub fn dict(&mut self, depth: usize) -> Result<Dict, SyntaxError> {
        self.pos += 2;
        let mut entries = Vec::new();
        loop {
            self.skip_ws();
            match self.peek() {
                Some(b'>') if self.buf.get(self.pos + 1) == Some(&b'>') => {
                    self.pos += 2;
                    return Ok(Dict(entries));
                }
                Some(b'/') => {
                    self.pos += 1;
                    let key = self.name_body();
                    let value = self.object(depth + 1)?;
                    entries.push((key, value));
                }
                None => return Err(self.err("unterminated dictionary")),
                _ => return Err(self.err("dictionary key is not a name")),
            }
        }
    }

    fn name_body(&mut self) -> Vec<u8> {
        let mut out = Vec::new();
        while let Some(b) = self.peek() {
            if !is_regular(b) {
                break;
            }
            if b == b'#' {
                let hex = |c: u8| (c as char).to_digit(16);
                if let (Some(h), Some(l)) = (
                    self.buf.get(self.pos + 1).and_then(|&c| hex(c)),
                    self.buf.get(self.pos + 2).and_then(|&c| hex(c)),
                ) {
                    out.push((h * 16 + l) as u8);
                    self.pos += 3;
                    continue;
                }
            }
            out.push(b);
            self.pos += 1;
        }
        out
    }

    fn literal_string(&mut self) -> Result<Vec<u8>, SyntaxError> {
        self.pos += 1;
        let mut out = Vec::new();
        let mut depth = 1usize;
        loop {
            let Some(b) = self.peek() else {
                return Err(self.err("unterminated string"));
            };
            self.pos += 1;
            match b {
                b'(' => {
                    depth += 1;
                    out.push(b);
                }
                b')' => {
                    depth -= 1;
                    if depth == 0 {
                        return Ok(out);
                    }
                    out.push(b);
                }
                b'\\' => {
                    let Some(e) = self.peek() else {
                        return Err(self.err("unterminated string"));
                    };
                    self.pos += 1;
                    match e {
                        b'n' => out.push(b'\n'),
                        b'r' => out.push(b'\r'),
                        b't' => out.push(b'\t'),
                        b'b' => out.push(8),
                        b'f' => out.push(12),
                        b'\r' => {
                            if self.peek() == Some(b'\n') {
                                self.pos += 1;
                            }
                        }
                        b'\n' => {}
                        b'0'..=b'7' => {
                            let mut v = u32::from(e - b'0');
                            for _ in 0..2 {
                                match self.peek() {
                                    Some(d @ b'0'..=b'7') => {
                                        v = v * 8 + u32::from(d - b'0');
                                        self.pos += 1;
                                    }
                                    _ => break,
                                }
                            }
                            out.push((v & 0xff) as u8);
                        }
                        other => out.push(other),
                    }
                }
                _ => out.push(b),
            }
        }
    }

    fn hex_string(&mut self) -> Result<Vec<u8>, SyntaxError> {
        self.pos += 1;
        let mut out = Vec::new();
        let mut high: Option<u8> = None;
        loop {
            let Some(b) = self.peek() else {
                return Err(self.err("unterminated hex string"));
            };
            self.pos += 1;
            if b == b'>' {
                if let Some(h) = high {
                    out.push(h << 4);
                }
                return Ok(out);
            }
            if is_white(b) {
                continue;
            }
            let Some(v) = (b as char).to_digit(16) else {
                return Err(self.err("bad digit in a hex string"));
            };
            match high.take() {
                Some(h) => out.push((h << 4) | v as u8),
                None => high = Some(v as u8),
            }
        }
    }

    /// A number, a reference, `true`, `false` or `null`.
    fn word_object(&mut self) -> Result<Object, SyntaxError> {
        let w = self.peek_word();
        if w.is_empty() {
            return Err(self.err("unexpected delimiter"));
        }
        match w {
            b"true" => {
                self.pos += 4;
                return Ok(Object::Bool(true));
            }
            b"false" => {
                self.pos += 5;
                return Ok(Object::Bool(false));
            }
            b"null" => {
                self.pos += 4;
                return Ok(Object::Null);
            }
            _ => {}
        }
        let number = parse_number(w).ok_or_else(|| self.err("unknown keyword"))?;
        self.pos += w.len();
        // `num gen R`: two non-negative integers followed by R
        if let Object::Int(num) = number {
            let save = self.pos;
            self.skip_ws();
            let g = self.peek_word();
            if !g.is_empty() && g.len() <= 5 && g.iter().all(u8::is_ascii_digit) {
                let gen_pos = self.pos + g.len();
                let gen: u32 = g.iter().fold(0, |n, d| n * 10 + u32::from(d - b'0'));
                self.pos = gen_pos;
                self.skip_ws();
                if self.peek_word() == b"R" {
                    self.pos += 1;
                    return match (u32::try_from(num), u16::try_from(gen)) {
                        (Ok(num), Ok(gen)) => Ok(Object::Ref(Ref { num, gen })),
                        _ => Err(self.err("reference out of range")),
                    };
                }
            }
            self.pos = save;
        }
        Ok(number)
    }
}

/// A PDF number token (§7.3.3): an integer, or a real with a point and no exponent.
fn parse_number(w: &[u8]) -> Option<Object> {
    let text = std::str::from_utf8(w).ok()?;
    let digits = text.strip_prefix(['+', '-']).unwrap_or(text);
    if digits.is_empty() || !digits.bytes().all(|c| c.is_ascii_digit() || c == b'.') {
        return None;
    }
    if !digits.contains('.') {
        return text.parse::<i64>().ok().map(Object::Int);
    }
    if digits.matches('.').count() > 1 || digits == "." {
        return None;
    }
    text.parse::<f64>()
        .ok()
        .filter(|v| v.is_finite())
        .map(Object::Real)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parse(s: &str) -> Object {
        Parser::new(s.as_bytes(), 0).object(0).unwrap()
    }

    #[test]
    fn objects_of_every_kind() {
        // ISO 32000-1 §7.3 examples
        assert_eq!(parse("  % comment\n 42"), Object::Int(42));
        assert_eq!(parse("-.5"), Object::Real(-0.5));
        assert_eq!(parse("/A#20B"), Object::Name(b"A B".to_vec()));
        assert_eq!(
            parse("(a\\(b\\) (c) \\101\\\nd)"),
            Object::Str(b"a(b) (c) Ad".to_vec())
        );
        assert_eq!(parse("<48 65 6C6C 6F7>"), Object::Str(b"Hellop".to_vec()));
        assert_eq!(parse("12 0 R"), Object::Ref(Ref { num: 12, gen: 0 }));
        assert_eq!(
            parse("[1 2 R 3]"),
            Object::Array(vec![Object::Ref(Ref { num: 1, gen: 2 }), Object::Int(3)])
        );
        let d = parse("<</Type/Page/Kids[1 0 R 2 0 R]/N null/B true>>");
        let d = d.as_dict().unwrap();
        assert_eq!(d.type_name(), Some(b"Page".as_slice()));
        assert_eq!(d.get(b"N"), Some(&Object::Null));
        assert_eq!(d.get(b"Kids").unwrap().as_array().unwrap().len(), 2);
    }

    #[test]
    fn damaged_syntax_is_an_error_not_a_panic() {
        for bad in [
            "(unterminated",
            "<<",
            "[1 2",
            "<zz>",
            "<</A>>",
            "<<1 2>>",
            ")",
            "",
            "1e5",
        ] {
            assert!(Parser::new(bad.as_bytes(), 0).object(0).is_err(), "{bad:?}");
        }
        let deep = "[".repeat(MAX_NESTING + 5);
        let e = Parser::new(deep.as_bytes(), 0).object(0).unwrap_err();
        assert_eq!(e.detail, "arrays or dictionaries nested too deeply");
    }
}
