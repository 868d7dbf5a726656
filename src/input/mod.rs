//! The only code that reads files: survey TOML, readings CSV. Everything read is kept byte-exact
//! (the report embeds it) and turned into validated domain values with located diagnostics.

pub mod assess_config;
pub mod calibration_file;
pub mod rata_file;
pub mod readings;
pub mod survey;
pub mod text;

use crate::diag::{Diagnostic, Diagnostics, Error, Location};
use crate::readings::RunReadings;
use crate::survey::{ReadingsForm, Survey};
use std::path::{Path, PathBuf};

/// A file as read: its display name, path and exact bytes.
#[derive(Debug, Clone, PartialEq)]
pub struct SourceFile {
    /// Name used in diagnostics and as the attachment name (the path as the user wrote it).
    pub name: String,
    pub path: PathBuf,
    pub bytes: Vec<u8>,
}

/// A survey with every run's readings, as read.
#[derive(Debug, Clone)]
pub struct Loaded {
    pub survey_file: SourceFile,
    pub survey: Survey,
    /// One per `[[run]]`, in survey order.
    pub runs: Vec<(SourceFile, RunReadings)>,
    /// The probe calibration file and its readings, when the survey references one.
    pub calibration: Option<(SourceFile, SourceFile)>,
}

/// Reads a file as UTF-8 text, with a located error.
pub fn read_text(path: &Path, name: &str) -> Result<(Vec<u8>, String), Diagnostic> {
    read_text_with(path, name, &|p| std::fs::read(p))
}

/// Where file bytes come from: the file system, or memory in tests and when re-deriving a report.
pub type FileSource<'a> = &'a dyn Fn(&Path) -> std::io::Result<Vec<u8>>;

/// Files held in memory by path (a report's embedded inputs, test fixtures); use
/// `&|p| files.read(p)` as a [`FileSource`].
#[derive(Debug, Clone, Default)]
pub struct MemoryFiles(std::collections::HashMap<PathBuf, Vec<u8>>);

impl MemoryFiles {
    pub fn new() -> Self {
        Self::default()
    }

    pub fn insert(&mut self, path: impl Into<PathBuf>, bytes: impl Into<Vec<u8>>) {
        self.0.insert(path.into(), bytes.into());
    }

    /// The bytes at `path`, or `NotFound`.
    pub fn read(&self, path: &Path) -> std::io::Result<Vec<u8>> {
        self.0.get(path).cloned().ok_or_else(|| {
            std::io::Error::new(
                std::io::ErrorKind::NotFound,
                "no such file among these files",
            )
        })
    }
}

fn read_text_with(
    path: &Path,
    name: &str,
    source: FileSource,
) -> Result<(Vec<u8>, String), Diagnostic> {
    let bytes = source(path).map_err(|e| {
        Diagnostic::new(format!("cannot read `{name}`: {e}"))
            .at(Location::file(name))
            .hint("check the path; readings paths in a survey are relative to the survey file")
    })?;
    let text = String::from_utf8(bytes.clone()).map_err(|e| {
        let (l, c) = text::line_column(
            &String::from_utf8_lossy(&bytes[..e.utf8_error().valid_up_to()]),
            e.utf8_error().valid_up_to(),
        );
        Diagnostic::new(format!("`{name}` is not UTF-8 text"))
            .at(Location::at(name, l, c))
            .hint("save the file as UTF-8 (CSV UTF-8 in spreadsheet programs)")
    })?;
    // A spreadsheet's byte-order mark is not part of the first header.
    let text = text
        .strip_prefix('\u{feff}')
        .map(str::to_string)
        .unwrap_or(text);
    Ok((bytes, text))
}

/// Reads and validates a survey and all its readings files; reports every problem found.
pub fn load(path: &Path) -> Result<Loaded, Error> {
    load_with(path, &|p| std::fs::read(p))
}

/// [`load`] with the bytes of each file supplied by `source`.
pub fn load_with(path: &Path, source: FileSource) -> Result<Loaded, Error> {
    let name = path.display().to_string();
    let (bytes, text) = read_text_with(path, &name, source)?;
    let dir = path.parent().unwrap_or(Path::new("."));
    let calibration_files = std::cell::RefCell::new(None);
    let resolve = |rel: &str| {
        let c = calibration_file::load_with(&dir.join(rel), source)?;
        let record = c.record();
        *calibration_files.borrow_mut() = Some((c.file, c.readings_file));
        Ok(record)
    };
    let survey = survey::parse_survey_with(&name, &text, Some(&resolve))?;
    let mut diags = Diagnostics::new();
    let mut runs = Vec::new();
    for run in &survey.runs {
        let rpath = dir.join(&run.readings);
        let rname = rpath.display().to_string();
        let (rbytes, rtext) = match read_text_with(&rpath, &rname, source) {
            Ok(x) => x,
            Err(d) => {
                diags.push(d);
                continue;
            }
        };
        let parsed = match &run.form {
            ReadingsForm::Rows => readings::parse_rows(&rname, &rtext),
            ReadingsForm::Matrix { header } => readings::parse_matrix(&rname, &rtext, header),
        };
        match parsed {
            Ok(r) => runs.push((
                SourceFile {
                    name: run.readings.clone(),
                    path: rpath,
                    bytes: rbytes,
                },
                r,
            )),
            Err(Error::Input(d)) => diags.extend(d),
            Err(e) => return Err(e),
        }
    }
    diags.finish(Loaded {
        survey_file: SourceFile {
            name: path
                .file_name()
                .map(|n| n.to_string_lossy().to_string())
                .unwrap_or(name),
            path: path.to_path_buf(),
            bytes,
        },
        survey,
        runs,
        calibration: calibration_files.into_inner(),
    })
}
