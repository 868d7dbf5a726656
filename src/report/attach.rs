//! Files embedded in a report PDF: what goes in ([`Attachment`]) and reading them back out
//! ([`embedded_files`]).
//!
//! Owns the attachment list handed to the engine and the extraction of embedded files from a
//! finished PDF (for `annulus verify` and for tests). Must not read or write files on disk: bytes
//! come in and go out as values.
//!
//! The engine embeds each attachment with Typst's `pdf.attach` (relationship `data`), which under
//! PDF/A-3b (ISO 19005-3) also lists it in the catalog's `/AF` array. Extraction walks the
//! `/EmbeddedFiles` name tree of the catalog (ISO 32000-1 §7.11.4 file specifications, §7.9.6 name
//! trees) with lopdf.

use std::collections::BTreeSet;
use std::fmt;

/// A file to embed: name shown by PDF readers, bytes, MIME type and a description (PDF/A-3 requires
/// one). A value that exists has a usable name, MIME type and description.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Attachment {
    name: String,
    bytes: Vec<u8>,
    mime: String,
    description: String,
}

/// Why an attachment was rejected.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum AttachmentError {
    /// The name is empty, has a path separator or control character, or starts with a dot.
    BadName {
        name: String,
        reason: &'static str,
    },
    /// MIME type not of the form `type/subtype`.
    BadMime {
        name: String,
        mime: String,
    },
    EmptyDescription {
        name: String,
    },
    /// Two attachments share a name.
    Duplicate {
        name: String,
    },
}

impl fmt::Display for AttachmentError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            AttachmentError::BadName { name, reason } => {
                write!(f, "attachment name `{name}` is not usable: {reason}")
            }
            AttachmentError::BadMime { name, mime } => write!(
                f,
                "attachment `{name}`: MIME type must look like `type/subtype`, found `{mime}`"
            ),
            AttachmentError::EmptyDescription { name } => write!(
                f,
                "attachment `{name}` needs a description (PDF/A-3 requires one)"
            ),
            AttachmentError::Duplicate { name } => {
                write!(f, "two attachments are named `{name}`")
            }
        }
    }
}

impl std::error::Error for AttachmentError {}

impl Attachment {
    /// Validates and builds an attachment. The name is a plain file name (`survey.toml`,
    /// `run-1.csv`): no `/` or `\`, no control characters, not starting with `.`, at most 200
    /// bytes.
    pub fn new(
        name: impl Into<String>,
        bytes: Vec<u8>,
        mime: impl Into<String>,
        description: impl Into<String>,
    ) -> Result<Attachment, AttachmentError> {
        let name = name.into();
        let mime = mime.into();
        let description = description.into();
        let reason = if name.trim().is_empty() {
            Some("it is empty")
        } else if name.contains(['/', '\\']) {
            Some("it contains a path separator; pass the file name only")
        } else if name.chars().any(char::is_control) {
            Some("it contains a control character")
        } else if name.starts_with('.') {
            Some("it starts with `.`")
        } else if name.len() > 200 {
            Some("it is longer than 200 bytes")
        } else {
            None
        };
        if let Some(reason) = reason {
            return Err(AttachmentError::BadName { name, reason });
        }
        let mime_ok = match mime.split_once('/') {
            Some((a, b)) => {
                let token = |s: &str| {
                    !s.is_empty()
                        && s.chars()
                            .all(|c| c.is_ascii_alphanumeric() || "!#$&-^_.+".contains(c))
                };
                token(a) && token(b)
            }
            None => false,
        };
        if !mime_ok {
            return Err(AttachmentError::BadMime { name, mime });
        }
        if description.trim().is_empty() {
            return Err(AttachmentError::EmptyDescription { name });
        }
        Ok(Attachment {
            name,
            bytes,
            mime,
            description,
        })
    }

    pub fn name(&self) -> &str {
        &self.name
    }

    pub fn bytes(&self) -> &[u8] {
        &self.bytes
    }

    pub fn mime(&self) -> &str {
        &self.mime
    }

    pub fn description(&self) -> &str {
        &self.description
    }
}

/// Rejects a list in which two attachments share a name.
pub fn check_unique(attachments: &[Attachment]) -> Result<(), AttachmentError> {
    let mut seen = BTreeSet::new();
    for a in attachments {
        if !seen.insert(a.name()) {
            return Err(AttachmentError::Duplicate {
                name: a.name().to_string(),
            });
        }
    }
    Ok(())
}

/// A file found embedded in a PDF.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct EmbeddedFile {
    pub name: String,
    pub bytes: Vec<u8>,
    /// `/Subtype` of the embedded stream, decoded (`text/csv`).
    pub mime: Option<String>,
    pub description: Option<String>,
}

/// Why embedded files could not be read from a PDF.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum ExtractError {
    /// The bytes are not a PDF lopdf can parse.
    NotPdf { detail: String },
    /// The structure is not what ISO 32000-1 describes (the path to the bad object is given).
    Malformed { at: String, detail: String },
}

impl fmt::Display for ExtractError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ExtractError::NotPdf { detail } => write!(f, "not a readable PDF: {detail}"),
            ExtractError::Malformed { at, detail } => {
                write!(f, "malformed PDF at {at}: {detail}")
            }
        }
    }
}

impl std::error::Error for ExtractError {}

fn malformed(at: &str, e: impl fmt::Display) -> ExtractError {
    ExtractError::Malformed {
        at: at.to_string(),
        detail: e.to_string(),
    }
}

/// A PDF text string: UTF-16BE with a byte-order mark, else PDFDocEncoding (read as Latin-1, which
/// agrees with it for the characters file names use).
fn text_string(bytes: &[u8]) -> String {
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

/// PDF name bytes (lopdf has already decoded `#xx` escapes).
fn name_string(bytes: &[u8]) -> String {
    String::from_utf8_lossy(bytes).into_owned()
}

/// Every embedded file in the PDF, in name-tree order (sorted by name, as the tree requires).
pub fn embedded_files(pdf: &[u8]) -> Result<Vec<EmbeddedFile>, ExtractError> {
    use lopdf::{Document, Object};

    let doc = Document::load_mem(pdf).map_err(|e| ExtractError::NotPdf {
        detail: e.to_string(),
    })?;
    let catalog = doc.catalog().map_err(|e| malformed("/Root", e))?;
    let names = match catalog.get_deref(b"Names", &doc) {
        Ok(obj) => obj.as_dict().map_err(|e| malformed("/Root/Names", e))?,
        Err(_) => return Ok(Vec::new()),
    };
    let tree = match names.get_deref(b"EmbeddedFiles", &doc) {
        Ok(obj) => obj
            .as_dict()
            .map_err(|e| malformed("/Root/Names/EmbeddedFiles", e))?,
        Err(_) => return Ok(Vec::new()),
    };

    // Walk the name tree iteratively (depth-limited against reference cycles).
    let mut out = Vec::new();
    let mut pending: Vec<(&lopdf::Dictionary, usize)> = vec![(tree, 0)];
    while let Some((node, depth)) = pending.pop() {
        if depth > 32 {
            return Err(malformed(
                "/EmbeddedFiles",
                "name tree deeper than 32 levels",
            ));
        }
        if let Ok(kids) = node.get_deref(b"Kids", &doc) {
            let kids = kids
                .as_array()
                .map_err(|e| malformed("/EmbeddedFiles/Kids", e))?;
            // Push in reverse so kids are visited in order.
            for kid in kids.iter().rev() {
                let (_, kid) = doc
                    .dereference(kid)
                    .map_err(|e| malformed("/EmbeddedFiles/Kids", e))?;
                let kid = kid
                    .as_dict()
                    .map_err(|e| malformed("/EmbeddedFiles/Kids", e))?;
                pending.push((kid, depth + 1));
            }
        }
        if let Ok(pairs) = node.get_deref(b"Names", &doc) {
            let pairs = pairs
                .as_array()
                .map_err(|e| malformed("/EmbeddedFiles/Names", e))?;
            for pair in pairs.chunks(2) {
                let [key, spec] = pair else {
                    return Err(malformed("/EmbeddedFiles/Names", "odd number of entries"));
                };
                let key = match doc.dereference(key) {
                    Ok((_, Object::String(s, _))) => text_string(s),
                    _ => return Err(malformed("/EmbeddedFiles/Names", "key is not a string")),
                };
                let (_, spec) = doc
                    .dereference(spec)
                    .map_err(|e| malformed(&format!("file spec `{key}`"), e))?;
                let spec = spec
                    .as_dict()
                    .map_err(|e| malformed(&format!("file spec `{key}`"), e))?;
                let name = [b"UF".as_slice(), b"F".as_slice()]
                    .iter()
                    .find_map(|k| match spec.get_deref(k, &doc) {
                        Ok(Object::String(s, _)) => Some(text_string(s)),
                        _ => None,
                    })
                    .unwrap_or_else(|| key.clone());
                let description = match spec.get_deref(b"Desc", &doc) {
                    Ok(Object::String(s, _)) => Some(text_string(s)),
                    _ => None,
                };
                let ef = spec
                    .get_deref(b"EF", &doc)
                    .and_then(|o| o.as_dict())
                    .map_err(|e| malformed(&format!("file spec `{key}` /EF"), e))?;
                let stream = ef
                    .get_deref(b"F", &doc)
                    .and_then(|o| o.as_stream())
                    .map_err(|e| malformed(&format!("file spec `{key}` /EF/F"), e))?;
                let mime = match stream.dict.get(b"Subtype") {
                    Ok(Object::Name(n)) => Some(name_string(n)),
                    _ => None,
                };
                let bytes = if stream.dict.get(b"Filter").is_ok() {
                    stream
                        .decompressed_content()
                        .map_err(|e| malformed(&format!("embedded file `{key}`"), e))?
                } else {
                    stream.content.clone()
                };
                out.push(EmbeddedFile {
                    name,
                    bytes,
                    mime,
                    description,
                });
            }
        }
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_mime_types_and_descriptions_are_validated() {
        let ok = Attachment::new("run-1.csv", b"a".to_vec(), "text/csv", "Run 1 readings");
        assert!(ok.is_ok());
        let cases = [
            ("", "text/csv", "d"),
            ("dir/run.csv", "text/csv", "d"),
            (".hidden", "text/csv", "d"),
            ("a\u{7}b", "text/csv", "d"),
        ];
        for (name, mime, desc) in cases {
            assert!(
                matches!(
                    Attachment::new(name, vec![], mime, desc),
                    Err(AttachmentError::BadName { .. })
                ),
                "{name:?}"
            );
        }
        assert!(matches!(
            Attachment::new("a.csv", vec![], "csv", "d"),
            Err(AttachmentError::BadMime { .. })
        ));
        assert!(matches!(
            Attachment::new("a.csv", vec![], "text/csv", "  "),
            Err(AttachmentError::EmptyDescription { .. })
        ));
        let a = Attachment::new("a.csv", vec![], "text/csv", "d").unwrap();
        assert_eq!(
            check_unique(&[a.clone(), a]),
            Err(AttachmentError::Duplicate {
                name: "a.csv".into()
            })
        );
    }

    #[test]
    fn garbage_is_not_a_pdf() {
        assert!(matches!(
            embedded_files(b"hello"),
            Err(ExtractError::NotPdf { .. })
        ));
    }

    #[test]
    fn text_strings_decode_utf16_and_latin1() {
        assert_eq!(text_string(&[0xFE, 0xFF, 0x00, 0x41, 0x00, 0xD8]), "AØ");
        assert_eq!(text_string(b"run-1.csv"), "run-1.csv");
    }
}
