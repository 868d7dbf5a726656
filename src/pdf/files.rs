//! The embedded files of a PDF (ISO 32000-1 §7.11.4 file specifications, found through the
//! catalog's `/Names /EmbeddedFiles` name tree, §7.9.6), decoded within the reader's caps.

use super::parts::{embedded_file_specs, file_stream_ref};
use super::{text_string, Indirect, Object, Pdf, PdfError, Ref};

/// A file found embedded in a PDF.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct EmbeddedFile {
    /// `/UF` or `/F` of the file specification, else its key in the name tree.
    pub name: String,
    pub bytes: Vec<u8>,
    /// `/Subtype` of the embedded stream, decoded (`text/csv`).
    pub mime: Option<String>,
    pub description: Option<String>,
}

/// Every embedded file, in name-tree order; `skip` names files whose data is not decoded (their
/// `bytes` are left empty).
pub fn embedded(pdf: &Pdf, skip: &[&str]) -> Result<Vec<(EmbeddedFile, Option<Ref>)>, PdfError> {
    let mut out = Vec::new();
    for (key, spec) in embedded_file_specs(pdf)? {
        let Some(dict) = pdf.dict_of(&spec)? else {
            return Err(PdfError::Damaged(format!(
                "the file specification of `{key}` is not a dictionary"
            )));
        };
        let string = |k: &[u8]| -> Result<Option<String>, PdfError> {
            Ok(match dict.get(k) {
                Some(o) => match pdf.resolve(o)? {
                    super::Resolved::Direct(Object::Str(s)) => Some(text_string(&s)),
                    super::Resolved::Indirect(_, ind) => match ind.as_ref() {
                        Indirect::Object(Object::Str(s)) => Some(text_string(s)),
                        _ => None,
                    },
                    _ => None,
                },
                None => None,
            })
        };
        let name = match string(b"UF")? {
            Some(n) => n,
            None => string(b"F")?.unwrap_or_else(|| key.clone()),
        };
        let description = string(b"Desc")?;
        let Some(r) = file_stream_ref(pdf, &spec)? else {
            return Err(PdfError::Damaged(format!(
                "embedded file `{key}` has no data stream (/EF /F)"
            )));
        };
        let Indirect::Stream(s) = pdf.get(r)?.as_ref().clone() else {
            return Err(PdfError::Damaged(format!(
                "embedded file `{key}`: /EF /F is not a stream"
            )));
        };
        let mime = s
            .dict
            .get(b"Subtype")
            .and_then(Object::as_name)
            .map(|n| String::from_utf8_lossy(n).into_owned());
        let bytes = if skip.contains(&name.as_str()) {
            Vec::new()
        } else {
            pdf.decode(&s).map_err(|e| match e {
                PdfError::Damaged(m) => PdfError::Damaged(format!("embedded file `{key}`: {m}")),
                PdfError::Limit(m) => PdfError::Limit(format!("embedded file `{key}`: {m}")),
                other => other,
            })?
        };
        out.push((
            EmbeddedFile {
                name,
                bytes,
                mime,
                description,
            },
            Some(r),
        ));
    }
    Ok(out)
}
