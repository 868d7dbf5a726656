//! Replacing one stream object of a PDF this program wrote, keeping it a single revision.
//!
//! Owns [`replace_stream`]: the object is written anew (same number, uncompressed data), every
//! later object's cross-reference offset is moved by the size difference, and the table, trailer,
//! `startxref` and `%%EOF` are written again. Only files with one classic cross-reference table
//! and no appended update are accepted (what the report engine writes); the result is a function
//! of its inputs alone, so reports stay byte-reproducible.

use super::syntax::Parser;
use super::{Object, Pdf, PdfError};
use std::fmt::Write as _;

fn refuse(m: &str) -> PdfError {
    PdfError::Damaged(format!("cannot replace the stream: {m}"))
}

/// Serialises a direct object (enough for stream dictionaries: names, numbers, strings, arrays,
/// dictionaries, references).
pub fn write_object(o: &Object, out: &mut Vec<u8>) {
    match o {
        Object::Null => out.extend_from_slice(b"null"),
        Object::Bool(b) => out.extend_from_slice(if *b { b"true" } else { b"false" }),
        Object::Int(i) => out.extend_from_slice(i.to_string().as_bytes()),
        Object::Real(r) => {
            let mut s = format!("{r}");
            if !s.contains('.') {
                s.push_str(".0");
            }
            out.extend_from_slice(s.as_bytes());
        }
        Object::Str(s) => {
            out.push(b'<');
            for b in s {
                out.extend_from_slice(format!("{b:02X}").as_bytes());
            }
            out.push(b'>');
        }
        Object::Name(n) => {
            out.push(b'/');
            for &b in n {
                if b.is_ascii_alphanumeric() || b"-_.+".contains(&b) {
                    out.push(b);
                } else {
                    out.extend_from_slice(format!("#{b:02X}").as_bytes());
                }
            }
        }
        Object::Array(a) => {
            out.push(b'[');
            for (i, x) in a.iter().enumerate() {
                if i > 0 {
                    out.push(b' ');
                }
                write_object(x, out);
            }
            out.push(b']');
        }
        Object::Dict(d) => {
            out.extend_from_slice(b"<<");
            for (k, v) in d.iter() {
                write_object(&Object::Name(k.to_vec()), out);
                if !matches!(
                    v,
                    Object::Name(_) | Object::Dict(_) | Object::Array(_) | Object::Str(_)
                ) {
                    out.push(b' ');
                }
                write_object(v, out);
            }
            out.extend_from_slice(b">>");
        }
        Object::Ref(r) => out.extend_from_slice(format!("{} {} R", r.num, r.gen).as_bytes()),
    }
}

/// The file with stream object `num` replaced by `dict` (its `/Length` set here) and `data`.
pub fn replace_stream(
    pdf: &Pdf,
    num: u32,
    dict: &super::Dict,
    data: &[u8],
) -> Result<Vec<u8>, PdfError> {
    let bytes = pdf.bytes();
    if !pdf.revisions().single() {
        return Err(refuse("the file has more than one revision"));
    }
    let xref_at = pdf.xref_offset();
    let mut p = Parser::new(bytes, xref_at);
    if !p.eat_keyword(b"xref") {
        return Err(refuse("the file has no classic cross-reference table"));
    }
    let span = pdf.object_span(num)?;
    if span.end > xref_at {
        return Err(refuse("the object is not before the cross-reference table"));
    }
    let gen = {
        let mut q = Parser::new(bytes, span.start);
        q.uint().ok();
        q.uint().unwrap_or(0)
    };
    let mut obj = format!("{num} {gen} obj\n").into_bytes();
    let mut d = dict.clone();
    d.0.retain(|(k, _)| k.as_slice() != b"Length");
    d.0.insert(0, (b"Length".to_vec(), Object::Int(data.len() as i64)));
    write_object(&Object::Dict(d), &mut obj);
    obj.extend_from_slice(b"\nstream\n");
    obj.extend_from_slice(data);
    obj.extend_from_slice(b"\nendstream\nendobj\n");
    let delta = obj.len() as i64 - span.len() as i64;

    let mut out = Vec::with_capacity(bytes.len() + obj.len());
    out.extend_from_slice(&bytes[..span.start]);
    out.extend_from_slice(&obj);
    out.extend_from_slice(&bytes[span.end..xref_at]);
    let new_xref = out.len();
    let size = pdf
        .trailer()
        .get(b"Size")
        .and_then(Object::as_int)
        .ok_or_else(|| refuse("the trailer has no /Size"))?;
    let size = u32::try_from(size).map_err(|_| refuse("the trailer's /Size is out of range"))?;
    let mut table = String::with_capacity(20 * size as usize + 32);
    let _ = write!(table, "xref\n0 {size}\n");
    for n in 0..size {
        match pdf.offset_of(n) {
            Some(off) => {
                let off = if off > span.start {
                    (off as i64 + delta) as usize
                } else {
                    off
                };
                let g = if n == num {
                    gen
                } else {
                    u64::from(pdf.generation_of(n).unwrap_or(0))
                };
                let _ = write!(table, "{off:010} {g:05} n\r\n");
            }
            None if n == 0 => table.push_str("0000000000 65535 f\r\n"),
            None => table.push_str("0000000000 00000 f\r\n"),
        }
    }
    out.extend_from_slice(table.as_bytes());
    out.extend_from_slice(b"trailer\n");
    write_object(&Object::Dict(pdf.trailer().clone()), &mut out);
    out.extend_from_slice(format!("\nstartxref\n{new_xref}\n%%EOF").as_bytes());
    Ok(out)
}
