//! The only code that reads input files: surveys (TOML) with their readings (CSV), calibration
//! files, RATA files. Everything read is kept byte-exact (the report embeds it) and turned into
//! validated domain values with located diagnostics. Loading produces values only: nothing here
//! computes results (that is `pipeline`'s job), prints or reads the clock.
//!
//! The helpers every parser shares: [`toml_doc`] (TOML read key by key, every problem of a file
//! in one pass, unknown keys with a did-you-mean), [`header`] (`name[unit]` CSV headers),
//! [`text`] (byte offsets to lines and columns) and [`read_referenced`] (a file named by another,
//! located at the line that names it).

pub mod assess_config;
pub mod calibration_file;
pub mod config_file;
pub mod fs;
pub mod header;
pub mod rata_file;
pub mod readings;
pub mod survey;
pub mod system_file;
pub mod terminals_file;
pub mod text;
pub mod toml_doc;
pub mod toml_tree;

use crate::checks::config::AssessConfig;
use crate::diag::{Diagnostic, Error, Location};
use crate::limits;
use crate::readings::RunReadings;
use crate::survey::{ReadingsForm, Survey};
use std::path::{Path, PathBuf};
use toml_doc::TomlDoc;

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
    /// The survey's `[checks]`, `[instruments]` and `[reported]` sections.
    pub config: AssessConfig,
    /// One per `[[run]]`: the run's Method 2H wall-effects readings, when it has them.
    pub wall_readings: Vec<Option<(SourceFile, crate::readings::WallReadings)>>,
}

/// Reads a file of `kind` as UTF-8 text (a regular file within the kind's size limit), with a
/// located error.
pub fn read_text(
    path: &Path,
    name: &str,
    kind: limits::FileKind,
) -> Result<(Vec<u8>, String), Diagnostic> {
    read_text_with(path, name, kind, &|p| fs::read_file(p))
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

/// What a file named by another file holds, for the message when it cannot be read.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FileKind {
    /// A run's readings CSV, named by a survey's `[[run]] readings`.
    Readings,
    /// A calibration TOML, named by a survey's `[probe] calibration`.
    Calibration,
    /// A calibration's paired readings CSV, named by its `readings`.
    CalibrationReadings,
    /// A survey, named by a RATA run's `survey`.
    Survey,
    /// A run's Method 2H wall-effects readings CSV, named by `[[run]] wall_readings`.
    WallReadings,
    /// A duct's survey, named by a system file's `[[duct]] survey`.
    SystemSurvey,
    /// A terminals CSV, named by a system file's `[terminals] readings`.
    Terminals,
}

impl FileKind {
    /// Words for the file in messages.
    pub fn what(self) -> &'static str {
        match self {
            FileKind::Readings => "readings file",
            FileKind::Calibration => "calibration file",
            FileKind::CalibrationReadings => "calibration readings file",
            FileKind::Survey | FileKind::SystemSurvey => "survey",
            FileKind::WallReadings => "wall-effects readings file",
            FileKind::Terminals => "terminals file",
        }
    }

    /// The hint for a file of this kind that cannot be read.
    pub fn hint(self) -> &'static str {
        match self {
            FileKind::Readings => "readings paths are relative to the survey file; `annulus init` writes a blank readings sheet",
            FileKind::Calibration => "calibration paths are relative to the survey file; the file is in the `annulus calibrate` format",
            FileKind::CalibrationReadings => "the readings path is relative to the calibration file; its header is `leg,standard_dp[unit],s_type_dp[unit]`",
            FileKind::Survey => "survey paths in a RATA file are relative to the RATA file",
            FileKind::WallReadings => "wall-effects readings paths are relative to the survey file; the header is `line,point,distance[in],dp[inH2O]`",
            FileKind::SystemSurvey => "survey paths in a system file are relative to the system file",
            FileKind::Terminals => "the terminals path is relative to the system file; its header is `tag,branch,design[unit],measured[unit]`",
        }
    }

    /// The kind whose size limit applies.
    pub fn size_kind(self) -> limits::FileKind {
        match self {
            FileKind::Readings => limits::FileKind::Readings,
            FileKind::Calibration => limits::FileKind::Calibration,
            FileKind::CalibrationReadings => limits::FileKind::CalibrationReadings,
            FileKind::Survey | FileKind::SystemSurvey => limits::FileKind::Survey,
            FileKind::WallReadings => limits::FileKind::Readings,
            FileKind::Terminals => limits::FileKind::Terminals,
        }
    }
}

/// Reads a file that another file names: a problem is located at `named_at` (the line of the
/// naming file, e.g. a survey's `readings = "run1.csv"`) and quotes the path as written and as
/// resolved.
pub fn read_referenced(
    path: &Path,
    written: &str,
    named_at: &Location,
    kind: FileKind,
    source: FileSource,
) -> Result<(Vec<u8>, String), Diagnostic> {
    read_referenced_at(path, written, &|| named_at.clone(), kind, source)
}

/// [`read_referenced`] with the naming line's location worded only for a problem.
fn read_referenced_at(
    path: &Path,
    written: &str,
    named_at: &dyn Fn() -> Location,
    kind: FileKind,
    source: FileSource,
) -> Result<(Vec<u8>, String), Diagnostic> {
    let name = path.display().to_string();
    let size_kind = kind.size_kind();
    let bytes = source(path).map_err(|e| {
        let (reason, hint) = fs::explain(size_kind, &e);
        Diagnostic::new(format!(
            "cannot read the {} `{written}` (resolved to `{name}`): {reason}",
            kind.what()
        ))
        .at(named_at())
        .hint(hint.unwrap_or_else(|| kind.hint().to_string()))
    })?;
    fs::check_size(&name, size_kind, bytes.len())?;
    decode(bytes, &name)
}

pub(crate) fn read_text_with(
    path: &Path,
    name: &str,
    kind: limits::FileKind,
    source: FileSource,
) -> Result<(Vec<u8>, String), Diagnostic> {
    let bytes = source(path).map_err(|e| fs::read_diagnostic(name, kind, &e))?;
    fs::check_size(name, kind, bytes.len())?;
    decode(bytes, name)
}

/// The bytes as UTF-8 text without a byte-order mark, or a located error.
fn decode(bytes: Vec<u8>, name: &str) -> Result<(Vec<u8>, String), Diagnostic> {
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
    load_with(path, &|p| fs::read_file(p))
}

/// [`load`] with the bytes of each file supplied by `source`. Every problem of the survey (its
/// structure, its values, its `[checks]` / `[instruments]` / `[reported]`), of the files it names
/// and of each readings file is reported in the same pass.
pub fn load_with(path: &Path, source: FileSource) -> Result<Loaded, Error> {
    let name = path.display().to_string();
    let (bytes, text) = read_text_with(path, &name, limits::FileKind::Survey, source)?;
    load_survey(path, bytes, &text, source)
}

/// [`load_with`] for a survey another file names (a RATA run's `survey`): a survey that cannot
/// be read is reported at `named_at`, the line that names it.
pub fn load_referenced(
    path: &Path,
    written: &str,
    named_at: &Location,
    kind: FileKind,
    source: FileSource,
) -> Result<Loaded, Error> {
    let (bytes, text) = read_referenced(path, written, named_at, kind, source)?;
    load_survey(path, bytes, &text, source)
}

fn load_survey(
    path: &Path,
    bytes: Vec<u8>,
    text: &str,
    source: FileSource,
) -> Result<Loaded, Error> {
    let name = path.display().to_string();
    let dir = path.parent().unwrap_or(Path::new("."));
    let doc = TomlDoc::parse(&name, text, "survey")?;
    let calibration_files = std::cell::RefCell::new(None);
    let resolve = |written: &str, at: &Location| {
        let c = calibration_file::load_referenced(&dir.join(written), written, at, source)?;
        let record = c.record();
        *calibration_files.borrow_mut() = Some((c.file, c.readings_file));
        Ok(record)
    };
    let (survey, config, entries) = {
        let root = doc.root();
        let (survey, entries) = survey::read_survey(&root, Some(&resolve));
        // before any readings file is read: 3,000 runs took 45 s and 2.4 GB
        fs::check_count(&name, "runs", entries.len(), limits::MAX_RUNS)?;
        let ids: Vec<&str> = entries.iter().map(|e| e.spec.id.as_str()).collect();
        let config = assess_config::read_assess_config(&root, &ids);
        (survey, config, entries)
    };
    let mut runs = Vec::new();
    let mut wall_readings = Vec::new();
    // where the survey names a file, worded for a file that cannot be read
    let at = |named: &Option<survey::runs::Named>| match named {
        Some(n) => doc.location(n.span.clone(), &n.key),
        None => Location::file(doc.file()),
    };
    for entry in &entries {
        match load_readings(dir, entry, &|| at(&entry.readings_at), source) {
            Ok(r) => runs.push(r),
            Err(Error::Input(d)) => doc.extend(d),
            Err(e) => return Err(e),
        }
        let wall_at = || match &entry.wall_readings_at {
            Some(_) => at(&entry.wall_readings_at),
            None => at(&entry.readings_at),
        };
        match load_wall_readings(dir, entry, &wall_at, source) {
            Ok(w) => wall_readings.push(w),
            Err(Error::Input(d)) => {
                doc.extend(d);
                wall_readings.push(None);
            }
            Err(e) => return Err(e),
        }
    }
    let (survey, config) = doc.finish(survey.zip(config))?;
    Ok(Loaded {
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
        config,
        wall_readings,
    })
}

/// Reads and parses a run's Method 2H wall-effects readings, when it names a file.
fn load_wall_readings(
    dir: &Path,
    entry: &survey::runs::RunEntry,
    at: &dyn Fn() -> Location,
    source: FileSource,
) -> Result<Option<(SourceFile, crate::readings::WallReadings)>, Error> {
    let Some(written) = &entry.spec.wall_readings else {
        return Ok(None);
    };
    let path = dir.join(written);
    let name = path.display().to_string();
    let (bytes, text) = read_referenced_at(&path, written, at, FileKind::WallReadings, source)?;
    let parsed = readings::parse_wall(&name, &text)?;
    Ok(Some((
        SourceFile {
            name: written.clone(),
            path,
            bytes,
        },
        parsed,
    )))
}

/// Reads and parses one run's readings file (relative to `dir`).
fn load_readings(
    dir: &Path,
    entry: &survey::runs::RunEntry,
    at: &dyn Fn() -> Location,
    source: FileSource,
) -> Result<(SourceFile, RunReadings), Error> {
    let run = &entry.spec;
    let rpath = dir.join(&run.readings);
    let rname = rpath.display().to_string();
    let (rbytes, rtext) =
        read_referenced_at(&rpath, &run.readings, at, FileKind::Readings, source)?;
    let parsed = match &run.form {
        ReadingsForm::Rows => readings::parse_rows(&rname, &rtext),
        ReadingsForm::Matrix { header } => readings::parse_matrix(&rname, &rtext, header),
    }?;
    Ok((
        SourceFile {
            name: run.readings.clone(),
            path: rpath,
            bytes: rbytes,
        },
        parsed,
    ))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::checks::testkit::{run_block, EPA_SURVEY};

    fn rows() -> String {
        let mut t = "line,point,dp[inH2O],temperature[F]\n".to_string();
        for l in ["A", "B"] {
            for p in 1..=6 {
                t += &format!("{l},{p},0.5,300\n");
            }
        }
        t
    }

    fn load_files(files: &[(&str, &str)]) -> Result<Loaded, Error> {
        let mut m = MemoryFiles::new();
        for (p, t) in files {
            m.insert(Path::new("site").join(p), t.as_bytes().to_vec());
        }
        load_with(Path::new("site/s.toml"), &|p| m.read(p))
    }

    fn problems(r: Result<Loaded, Error>) -> Vec<crate::diag::Diagnostic> {
        match r {
            Err(Error::Input(d)) => d.items().to_vec(),
            Err(e) => panic!("{e}"),
            Ok(_) => panic!("accepted"),
        }
    }

    #[test]
    fn a_missing_calibration_file_is_located_at_the_line_naming_it() {
        let survey = EPA_SURVEY.replace(
            "coefficient = 0.84\ncalibrated = \"2026-05-11\"",
            "calibration = \"cal/ts-0417.toml\"",
        ) + &run_block("1", Some("pass"), Some("pass"));
        let d = problems(load_files(&[("s.toml", &survey), ("run1.csv", &rows())]));
        assert_eq!(d.len(), 1, "{d:?}");
        assert_eq!(
            d[0].message,
            "cannot read the calibration file `cal/ts-0417.toml` (resolved to `site/cal/ts-0417.toml`): no such file among these files"
        );
        let at = d[0].location.clone().unwrap();
        let line = survey
            .lines()
            .position(|l| l.starts_with("calibration ="))
            .unwrap()
            + 1;
        assert_eq!(
            (at.file.as_str(), at.line, at.column),
            ("site/s.toml", Some(line), Some(15))
        );
        assert!(d[0]
            .hint
            .as_deref()
            .unwrap()
            .contains("`annulus calibrate` format"));
        // the calibration's own readings file is located in the calibration file
        let cal = "[calibration]\nprobe = \"TS-0417\"\ndate = \"2026-05-11\"\ncalibrated_by = \"A. Name\"\nreadings = \"ts.csv\"\n";
        let d = problems(load_files(&[
            ("s.toml", &survey),
            ("run1.csv", &rows()),
            ("cal/ts-0417.toml", cal),
        ]));
        assert_eq!(d.len(), 1, "{d:?}");
        assert!(d[0].message.starts_with("cannot read the calibration readings file `ts.csv` (resolved to `site/cal/ts.csv`)"), "{}", d[0].message);
        let at = d[0].location.clone().unwrap();
        assert_eq!(
            (at.file.as_str(), at.line),
            ("site/cal/ts-0417.toml", Some(5))
        );
        assert!(d[0]
            .hint
            .as_deref()
            .unwrap()
            .contains("relative to the calibration file"));
    }

    #[test]
    fn readings_are_checked_even_when_the_survey_has_problems() {
        let survey = EPA_SURVEY.replace("\"5.0 ft\"", "\"5.0 furlong\"")
            + &run_block("1", Some("pass"), Some("pass"));
        let bad = rows().replace("B,3,0.5", "B,3,0.5x");
        let d = problems(load_files(&[("s.toml", &survey), ("run1.csv", &bad)]));
        assert_eq!(d.len(), 2, "{d:?}");
        assert!(d[0].message.contains("furlong"));
        assert_eq!(d[1].location.as_ref().unwrap().file, "site/run1.csv");
    }

    #[test]
    fn the_assessment_sections_are_read_with_the_survey() {
        let survey = format!(
            "{EPA_SURVEY}{}\n[reported]\naverage = {{ dscfm = \"36803 cfm\" }}\n",
            run_block("1", Some("pass"), Some("pass"))
        );
        let l = load_files(&[("s.toml", &survey), ("run1.csv", &rows())]).unwrap();
        assert_eq!(l.config.reported.len(), 1);
        // a problem there and one in the survey come together
        let survey = survey
            .replace("36803 cfm", "36803 furlong")
            .replace("\"8 %\"", "\"108 %\"");
        let d = problems(load_files(&[("s.toml", &survey), ("run1.csv", &rows())]));
        assert_eq!(d.len(), 2, "{d:?}");
    }
}
