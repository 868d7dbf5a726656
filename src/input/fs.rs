//! Reading from the file system, bounded, and where a referenced file lies.
//!
//! Owns the rules every read obeys: only regular files are read (a FIFO, a device or a folder is an
//! error, never a hang or an endless read); no file larger than its kind's limit
//! ([`crate::limits::FileKind`]) is read; `-` means standard input where a command allows it. Also
//! classifies a path written in a survey as inside or outside the survey's folder, so commands can
//! note it and `review` can refuse it. Must not parse file contents or print.

use crate::diag::{Diagnostic, Location};
use crate::limits::{largest_limit, FileKind, SIZE_OVERRIDE_VAR};
use std::io::{self, Read};
use std::path::{Component, Path, PathBuf};

/// What a file is when it is not a regular file, in words for messages ("a FIFO (named pipe)");
/// `None` for a regular file.
pub fn special_kind(meta: &std::fs::Metadata) -> Option<&'static str> {
    let t = meta.file_type();
    if t.is_file() {
        return None;
    }
    if t.is_dir() {
        return Some("a folder");
    }
    #[cfg(unix)]
    {
        use std::os::unix::fs::FileTypeExt;
        if t.is_fifo() {
            return Some("a FIFO (named pipe)");
        }
        if t.is_socket() {
            return Some("a socket");
        }
        if t.is_char_device() {
            return Some("a character device");
        }
        if t.is_block_device() {
            return Some("a block device");
        }
    }
    Some("not a regular file")
}

fn ours(kind: io::ErrorKind, message: impl Into<String>) -> io::Error {
    io::Error::new(kind, message.into())
}

/// The error for a path that is not a regular file. Kind `InvalidInput`, so callers can tell it
/// from a missing file.
fn special_file_error(what: &str) -> io::Error {
    ours(
        io::ErrorKind::InvalidInput,
        format!("it is {what}, not a regular file"),
    )
}

/// Sizes in messages: "2.0 GiB", "9.5 MiB", "812 KiB", "300 bytes".
pub fn human_size(bytes: u64) -> String {
    const KIB: f64 = 1024.0;
    let b = bytes as f64;
    if b >= KIB * KIB * KIB {
        format!("{:.1} GiB", b / (KIB * KIB * KIB))
    } else if b >= KIB * KIB {
        format!("{:.1} MiB", b / (KIB * KIB))
    } else if b >= KIB {
        format!("{:.0} KiB", b / KIB)
    } else {
        format!("{bytes} bytes")
    }
}

/// The payload of a `FileTooLarge` error: the file's size when known, and the limit applied.
#[derive(Debug)]
struct TooLarge {
    size: Option<u64>,
    limit: u64,
}

impl TooLarge {
    fn size_words(&self) -> String {
        match self.size {
            Some(s) => human_size(s),
            None => format!("more than {}", human_size(self.limit)),
        }
    }
}

impl std::fmt::Display for TooLarge {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "it is {}; annulus reads at most {} from one file",
            self.size_words(),
            human_size(self.limit)
        )
    }
}

impl std::error::Error for TooLarge {}

fn too_large(size: Option<u64>, limit: u64) -> io::Error {
    io::Error::new(io::ErrorKind::FileTooLarge, TooLarge { size, limit })
}

/// Opens `path` for reading only if it is a regular file. The type is looked at before opening
/// (opening a FIFO would wait for a writer; opening some devices has effects): `meta` is the
/// path's `stat` (or its `lstat`, when that showed no symbolic link). [`read_open`] looks again
/// on the open file, which on Unix is opened non-blocking, so a path swapped for a FIFO in
/// between cannot hang the read either.
fn open_regular(path: &Path, meta: &std::fs::Metadata) -> io::Result<std::fs::File> {
    if let Some(what) = special_kind(meta) {
        return Err(special_file_error(what));
    }
    let mut options = std::fs::OpenOptions::new();
    options.read(true);
    #[cfg(unix)]
    {
        use std::os::unix::fs::OpenOptionsExt;
        options.custom_flags(libc::O_NONBLOCK);
    }
    options.open(path)
}

/// Reads an open file within `limit` if it is a regular file (looked at on the open file).
fn read_open(file: std::fs::File, limit: u64) -> io::Result<Vec<u8>> {
    let meta = file.metadata()?;
    if let Some(what) = special_kind(&meta) {
        return Err(special_file_error(what));
    }
    if meta.len() > limit {
        return Err(too_large(Some(meta.len()), limit));
    }
    read_regular(file, limit, meta.len())
}

/// Reads `path` within `limit` with one path lookup, when it opens as no symbolic link: `None`
/// when the open fails for any reason (a link, a missing file, a socket …), for the caller to
/// look at the path and word the problem as usual.
///
/// `review` reads tens of thousands of small files; looking at each path before opening it was
/// a second lookup per file, about a tenth of review's time. The file is opened non-blocking
/// (a FIFO cannot hang), not as a controlling terminal, and not through a final symbolic link
/// (which review must resolve and place first); its type is looked at on the open file, before
/// anything is read. What the earlier look also spared, opening a device node that sits in the
/// reviewed folder itself, is given up for this: making one takes administrator rights.
#[cfg(unix)]
pub fn read_unless_link(path: &Path, limit: u64) -> Option<io::Result<Vec<u8>>> {
    use std::os::unix::fs::OpenOptionsExt;
    let mut options = std::fs::OpenOptions::new();
    options
        .read(true)
        .custom_flags(libc::O_NONBLOCK | libc::O_NOFOLLOW | libc::O_NOCTTY);
    let file = options.open(path).ok()?;
    Some(read_open(file, limit))
}

/// [`read_limited`] for a path whose `stat` (or symlink-free `lstat`) the caller already holds,
/// as `review` does when it checks where a file lies: one system call fewer per file.
pub fn read_limited_after(
    path: &Path,
    meta: &std::fs::Metadata,
    limit: u64,
) -> io::Result<Vec<u8>> {
    read_open(open_regular(path, meta)?, limit)
}

/// Reads an open regular file of `len` bytes (its size when opened), within `limit`. One read
/// when the file still has that size (a short read of a regular file is its end); otherwise, as
/// for any reader, until the end or the limit.
fn read_regular(mut file: std::fs::File, limit: u64, len: u64) -> io::Result<Vec<u8>> {
    let want = len.min(limit) as usize;
    let mut bytes = vec![0u8; want + 1];
    let n = loop {
        match file.read(&mut bytes) {
            Ok(n) => break n,
            Err(e) if e.kind() == io::ErrorKind::Interrupted => continue,
            Err(e) => return Err(e),
        }
    };
    if n == want {
        bytes.truncate(n);
        return Ok(bytes);
    }
    if n as u64 > limit {
        return Err(too_large(None, limit));
    }
    // the file changed size since it was opened, or the read was short: read the rest bounded
    bytes.truncate(n);
    let rest = read_bounded(file, limit.saturating_sub(n as u64), 0).map_err(|e| {
        if e.kind() == io::ErrorKind::FileTooLarge {
            too_large(None, limit)
        } else {
            e
        }
    })?;
    bytes.extend_from_slice(&rest);
    Ok(bytes)
}

/// Reads at most `limit` bytes from `reader`; more is a `FileTooLarge` error.
fn read_bounded(reader: impl Read, limit: u64, size_hint: u64) -> io::Result<Vec<u8>> {
    let mut bytes = Vec::with_capacity(size_hint.min(limit) as usize);
    reader
        .take(limit.saturating_add(1))
        .read_to_end(&mut bytes)?;
    if bytes.len() as u64 > limit {
        return Err(too_large(None, limit));
    }
    Ok(bytes)
}

/// Reads a regular file of at most `limit` bytes.
pub fn read_limited(path: &Path, limit: u64) -> io::Result<Vec<u8>> {
    read_limited_after(path, &std::fs::metadata(path)?, limit)
}

/// Reads a regular file of at most the largest size limit in force: the file-system
/// [`FileSource`](super::FileSource) of every loader (each loader then applies its kind's own
/// limit with [`check_size`]).
pub fn read_file(path: &Path) -> io::Result<Vec<u8>> {
    read_limited(path, largest_limit())
}

/// Reads a file of `kind` named on the command line: `-` is standard input (which must not be a
/// terminal), anything else a regular file within the kind's limit.
pub fn read_input(path: &Path, kind: FileKind) -> io::Result<Vec<u8>> {
    if is_stdio(path) {
        use std::io::IsTerminal;
        let stdin = io::stdin();
        if stdin.is_terminal() {
            return Err(ours(
                io::ErrorKind::InvalidInput,
                "standard input is a terminal; pipe or redirect the file in",
            ));
        }
        return read_bounded(stdin.lock(), kind.limit(), 0);
    }
    read_limited(path, kind.limit())
}

/// [`read_input`] as UTF-8 text (kind `InvalidData` if it is not).
pub fn read_input_text(path: &Path, kind: FileKind) -> io::Result<String> {
    String::from_utf8(read_input(path, kind)?)
        .map_err(|_| ours(io::ErrorKind::InvalidData, "it is not UTF-8 text"))
}

/// `-`: standard input or output.
pub fn is_stdio(path: &Path) -> bool {
    path.as_os_str() == "-"
}

/// A file's bytes within its kind's limit, whatever source they came from (a file, memory, a
/// report's attachments); `name` as the user knows the file.
pub fn check_size(name: &str, kind: FileKind, len: usize) -> Result<(), Diagnostic> {
    if len as u64 <= kind.limit() {
        return Ok(());
    }
    Err(oversized(name, kind, &human_size(len as u64)))
}

fn oversized(name: &str, kind: FileKind, size: &str) -> Diagnostic {
    Diagnostic::new(format!(
        "`{name}` is {size}; {} may be at most {}",
        kind.words(),
        human_size(kind.limit())
    ))
    .at(Location::file(name))
    .hint(format!(
        "check that the path names the right file; if it does, set {SIZE_OVERRIDE_VAR} to a larger number of MiB"
    ))
}

/// A count of things in a file (runs, rows, pairs) within its limit; `what` in the plural.
pub fn check_count(name: &str, what: &str, found: usize, limit: usize) -> Result<(), Diagnostic> {
    if found <= limit {
        return Ok(());
    }
    Err(Diagnostic::new(format!(
        "`{name}` has {found} {what}; annulus accepts at most {limit}"
    ))
    .at(Location::file(name))
    .hint(format!(
        "split the work into several files of at most {limit} {what}"
    )))
}

/// Why a file of `kind` could not be read, in words, and a hint when the reason calls for one
/// of its own (a size limit, a special file); `None` leaves the caller's hint for its file.
pub fn explain(kind: FileKind, e: &io::Error) -> (String, Option<String>) {
    if let Some(t) = e.get_ref().and_then(|x| x.downcast_ref::<TooLarge>()) {
        return (
            format!(
                "it is {}; {} may be at most {}",
                t.size_words(),
                kind.words(),
                human_size(kind.limit())
            ),
            Some(format!(
                "check that the path names the right file; if it does, set {SIZE_OVERRIDE_VAR} to a larger number of MiB"
            )),
        );
    }
    let hint = (e.kind() == io::ErrorKind::InvalidInput)
        .then(|| format!("give the path of {} saved on disk", kind.words()));
    (reason(e), hint)
}

/// The located diagnostic for a file named on the command line that could not be read.
pub fn read_diagnostic(name: &str, kind: FileKind, e: &io::Error) -> Diagnostic {
    if let Some(t) = e.get_ref().and_then(|x| x.downcast_ref::<TooLarge>()) {
        return oversized(name, kind, &t.size_words());
    }
    let (reason, hint) = explain(kind, e);
    Diagnostic::new(format!("cannot read `{name}`: {reason}"))
        .at(Location::file(name))
        .hint(hint.unwrap_or_else(|| "check the path".to_string()))
}

/// An I/O error's reason without any path a library may have attached: the operating system's
/// words for its error code, or the error's own message with tempfile's ` at path "…"` suffix
/// (the temporary file, which a user never named) cut off.
pub fn reason(e: &io::Error) -> String {
    if let Some(code) = e.raw_os_error() {
        return io::Error::from_raw_os_error(code).to_string();
    }
    let text = e.to_string();
    match text.find(" at path \"") {
        Some(i) => text[..i].to_string(),
        None => text,
    }
}

/// Where a path written in a survey (or a calibration file) lies relative to the folder of the
/// file that names it, judged from the text alone.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Place {
    /// In that folder or below it.
    Inside,
    /// An absolute path (or, on Windows, one with a drive).
    Absolute,
    /// A relative path that climbs out with `..`.
    Above,
}

impl Place {
    pub fn is_inside(self) -> bool {
        self == Place::Inside
    }
}

/// Classifies `written`, a path relative to the folder of the file that names it. Lexical: it
/// does not look at the disk (a symbolic link inside the folder that points elsewhere is
/// `Inside`); `a/../b` stays inside, `../b` and `a/../../b` do not.
pub fn classify_reference(written: &str) -> Place {
    let path = Path::new(written);
    if path.has_root() || path.is_absolute() {
        return Place::Absolute;
    }
    let mut depth: i64 = 0;
    for c in path.components() {
        match c {
            Component::Prefix(_) | Component::RootDir => return Place::Absolute,
            Component::CurDir => {}
            Component::ParentDir => {
                depth -= 1;
                if depth < 0 {
                    return Place::Above;
                }
            }
            Component::Normal(_) => depth += 1,
        }
    }
    Place::Inside
}

/// A file a survey reads from outside its own folder.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct OutsideReference {
    /// What the file is, e.g. "run 2 readings", "the probe calibration".
    pub what: String,
    /// The path as written (for a calibration's readings: relative to the survey's folder).
    pub written: String,
    pub place: Place,
}

/// The files a loaded survey reads from outside the survey's folder (readings, the probe
/// calibration and its readings), in survey order.
pub fn outside_references(loaded: &super::Loaded) -> Vec<OutsideReference> {
    let mut out = Vec::new();
    let mut note = |what: String, written: &str| {
        let place = classify_reference(written);
        if !place.is_inside() {
            out.push(OutsideReference {
                what,
                written: written.to_string(),
                place,
            });
        }
    };
    for run in &loaded.survey.runs {
        note(format!("run {} readings", run.id), &run.readings);
    }
    if let Some(pc) = &loaded.survey.probe.calibration {
        note("the probe calibration".into(), &pc.file);
    }
    let calibration_inside = loaded
        .survey
        .probe
        .calibration
        .as_ref()
        .is_none_or(|pc| classify_reference(&pc.file).is_inside());
    // the calibration's readings are noted only when the calibration itself is inside: a shared
    // calibration elsewhere is one note, not two
    if let (Some((_, readings)), true) = (&loaded.calibration, calibration_inside) {
        let dir = loaded.survey_file.path.parent().unwrap_or(Path::new(""));
        // relative to the survey's folder when it is below it, else as the path stands
        let written = match readings.path.strip_prefix(dir) {
            Ok(rel) if !dir.as_os_str().is_empty() || readings.path.is_relative() => {
                rel.to_string_lossy().into_owned()
            }
            _ => readings.path.to_string_lossy().into_owned(),
        };
        note("the probe calibration's readings".into(), &written);
    }
    out
}

/// A report embeds the survey byte-exact and records every file by its path relative to the
/// survey; an absolute path would carry this machine's folder names into the report (and could not
/// be laid out again by `verify`), so a survey that names one cannot be made into a report.
pub fn check_embeddable(loaded: &super::Loaded) -> Result<(), crate::diag::Error> {
    let mut diags = crate::diag::Diagnostics::new();
    for r in outside_references(loaded) {
        if r.place == Place::Absolute {
            diags.push(
                Diagnostic::new(format!(
                    "{} `{}` is an absolute path, which a report does not carry",
                    r.what, r.written
                ))
                .at(Location::file(loaded.survey_file.path.display().to_string()))
                .hint("write the path relative to the survey file (e.g. `../shared/run1.csv`), or copy the file beside the survey"),
            );
        }
    }
    diags.finish(())
}

/// Whether the readings sheet at `path` holds readings (see [`super::readings::holds_readings`]);
/// a file that cannot be read as text counts as holding something, a missing one as not.
pub fn sheet_holds_readings(path: &Path) -> bool {
    match read_limited(path, FileKind::Readings.limit()) {
        Ok(bytes) => match std::str::from_utf8(&bytes) {
            Ok(text) => super::readings::holds_readings(text),
            Err(_) => true,
        },
        Err(e) => e.kind() != io::ErrorKind::NotFound,
    }
}

/// Every file a loaded survey was read from (survey, readings, calibration and its readings): the
/// files an output must never replace.
pub fn input_paths(loaded: &super::Loaded) -> Vec<PathBuf> {
    let mut v = vec![loaded.survey_file.path.clone()];
    v.extend(loaded.runs.iter().map(|(f, _)| f.path.clone()));
    if let Some((c, r)) = &loaded.calibration {
        v.push(c.path.clone());
        v.push(r.path.clone());
    }
    v
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn classifies_references_by_their_text() {
        assert_eq!(classify_reference("run1.csv"), Place::Inside);
        assert_eq!(classify_reference("./data/run1.csv"), Place::Inside);
        assert_eq!(classify_reference("data/../run1.csv"), Place::Inside);
        assert_eq!(classify_reference("../run1.csv"), Place::Above);
        assert_eq!(classify_reference("data/../../run1.csv"), Place::Above);
        assert_eq!(classify_reference("/etc/passwd"), Place::Absolute);
    }

    #[test]
    fn reads_regular_files_within_the_limit() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("a.csv");
        std::fs::write(&p, b"0123456789").unwrap();
        assert_eq!(read_limited(&p, 10).unwrap(), b"0123456789");
        let e = read_limited(&p, 9).unwrap_err();
        assert_eq!(e.kind(), io::ErrorKind::FileTooLarge);
        assert!(e.to_string().contains("it is 10 bytes"), "{e}");
        assert!(e.to_string().contains("at most 9 bytes"), "{e}");
    }

    #[test]
    fn a_file_that_grew_after_its_size_was_taken_is_read_whole_within_the_limit() {
        // read_regular is given the size seen when the file was opened; a file longer by then
        // (still being written) is read to its end, and past the limit it is too large
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("a.csv");
        std::fs::write(&p, b"0123456789").unwrap();
        let open = || std::fs::File::open(&p).unwrap();
        assert_eq!(read_regular(open(), 100, 4).unwrap(), b"0123456789");
        assert_eq!(read_regular(open(), 10, 4).unwrap(), b"0123456789");
        let e = read_regular(open(), 8, 4).unwrap_err();
        assert_eq!(e.kind(), io::ErrorKind::FileTooLarge);
        assert!(e.to_string().contains("at most 8 bytes"), "{e}");
        // one that shrank is read as it now is
        assert_eq!(read_regular(open(), 100, 20).unwrap(), b"0123456789");
        std::fs::write(&p, b"").unwrap();
        assert_eq!(read_regular(open(), 100, 0).unwrap(), b"");
    }

    #[test]
    fn a_folder_is_not_read() {
        let dir = tempfile::tempdir().unwrap();
        let e = read_file(dir.path()).unwrap_err();
        assert_eq!(e.kind(), io::ErrorKind::InvalidInput);
        assert_eq!(e.to_string(), "it is a folder, not a regular file");
    }

    #[cfg(unix)]
    #[test]
    fn devices_are_not_read() {
        // /dev/zero would never end; /dev/null is empty: both are refused by type, unread.
        for dev in ["/dev/zero", "/dev/null"] {
            let e = read_file(Path::new(dev)).unwrap_err();
            assert_eq!(
                e.to_string(),
                "it is a character device, not a regular file"
            );
        }
    }

    #[test]
    fn oversized_files_name_the_kind_and_the_limit() {
        let d = check_size("run1.csv", FileKind::Readings, 5 * 1024 * 1024).unwrap_err();
        assert_eq!(
            d.message,
            "`run1.csv` is 5.0 MiB; a readings file may be at most 1.0 MiB"
        );
        assert!(d.hint.unwrap().contains(SIZE_OVERRIDE_VAR));
        assert!(check_size("run1.csv", FileKind::Readings, 1024 * 1024).is_ok());
    }

    #[test]
    fn reasons_carry_no_paths() {
        let dir = tempfile::tempdir().unwrap();
        let e = tempfile::NamedTempFile::new_in(dir.path().join("gone")).unwrap_err();
        // the library's message names the path; the reason does not
        assert!(e.to_string().contains("gone"), "{e}");
        assert!(!reason(&e).contains("gone"), "{}", reason(&e));
        assert!(reason(&e).ends_with("(os error 2)"), "{}", reason(&e));
        // an error straight from the system keeps the system's words
        let e = std::fs::File::open(dir.path().join("gone")).unwrap_err();
        assert!(reason(&e).contains("os error 2"), "{}", reason(&e));
        // our own messages pass through
        assert_eq!(
            reason(&special_file_error("a folder")),
            "it is a folder, not a regular file"
        );
    }
}
