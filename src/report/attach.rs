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
//! trees) with the bounded reader of `crate::pdf`.

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

pub use crate::pdf::files::EmbeddedFile;

/// Why embedded files could not be read from a PDF.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum ExtractError {
    /// The bytes are not a PDF.
    NotPdf { detail: String },
    /// A PDF whose structure could not be read (damaged, or beyond a cap of the reader).
    Malformed { detail: String },
}

impl fmt::Display for ExtractError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ExtractError::NotPdf { detail } => write!(f, "not a readable PDF: {detail}"),
            ExtractError::Malformed { detail } => write!(f, "malformed PDF: {detail}"),
        }
    }
}

impl std::error::Error for ExtractError {}

/// Every embedded file in the PDF, in name-tree order (sorted by name, as the tree requires),
/// read with the bounded reader of [`crate::pdf`] and its default caps.
pub fn embedded_files(pdf: &[u8]) -> Result<Vec<EmbeddedFile>, ExtractError> {
    use crate::pdf::{files, Limits, Pdf, PdfError};
    let convert = |e: PdfError| match e {
        PdfError::NotPdf => ExtractError::NotPdf {
            detail: e.to_string(),
        },
        other => ExtractError::Malformed {
            detail: other.to_string(),
        },
    };
    let doc = Pdf::parse(pdf, Limits::default()).map_err(convert)?;
    Ok(files::embedded(&doc, &[])
        .map_err(convert)?
        .into_iter()
        .map(|(f, _)| f)
        .collect())
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
}
