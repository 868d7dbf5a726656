//! Output files: the rules every file annulus writes obeys, in one place.
//!
//! - **Whole or not at all.** Bytes go to a temporary file `.annulus-*.tmp` in the target's own
//!   folder, are flushed to disk, then renamed over the target (a rename within one file system is
//!   atomic). If anything fails the temporary file is removed and the target is left as it was.
//!   [`write_all_or_none`] does the same for a set of files (`annulus init`).
//! - **Never over an input.** A target that is the same file as one of the command's inputs (by
//!   device and inode on Unix, so a hard link or another spelling of the path is caught too) is
//!   refused.
//! - **Only regular files are replaced.** A device node, FIFO, socket or folder at the target is
//!   refused and left as it is; so is a read-only file.
//! - **Symbolic links are written through.** A target that is a symbolic link is followed (up to
//!   [`MAX_SYMLINK_HOPS`] links): the file it points to is replaced, by the rules above, and the
//!   link stays a link. A link to nothing creates the file it names.
//! - **`-` is standard output** (refused when that is a terminal: a PDF would garble it), and a
//!   target that names a folder (an existing one, or any path ending in `/`) gets a default file
//!   name inside it ([`Destination::from_arg`]).
//! - **Left-overs are cleared.** Temporary files of ours in the target's folder, older than
//!   [`STALE_TEMPORARY_AGE`] and owned by the same user, come from a write that was killed; they
//!   are removed on the next write there.
//!
//! Errors never show the temporary file's path. Refusals are input errors (exit 1); a failure of
//! the file system (no space, no permission, no such folder) is an environment error (exit 2).
//! Must not decide file names beyond the default name it is given, or print.

use crate::diag::{Diagnostic, Error, Location};
use crate::input::fs::{reason, special_kind};
use crate::limits::{MAX_SYMLINK_HOPS, STALE_SCAN_ENTRIES, STALE_TEMPORARY_AGE};
use std::fmt;
use std::io::Write as _;
use std::path::{Path, PathBuf};

const TEMP_PREFIX: &str = ".annulus-";
const TEMP_SUFFIX: &str = ".tmp";

/// Where an output goes.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Destination {
    /// `-`: standard output.
    Stdout,
    /// A file path, as the user gave it (links not yet followed).
    File(PathBuf),
}

impl Destination {
    /// The destination an output argument names: `-` is standard output; a path that ends in a
    /// separator or names an existing folder means `default_name` inside that folder; anything
    /// else is the file itself.
    pub fn from_arg(arg: &Path, default_name: &str) -> Destination {
        if crate::input::fs::is_stdio(arg) {
            return Destination::Stdout;
        }
        let text = arg.as_os_str().to_string_lossy();
        let names_folder = text.ends_with('/')
            || text.ends_with(std::path::MAIN_SEPARATOR)
            || std::fs::metadata(arg).is_ok_and(|m| m.is_dir());
        if names_folder {
            Destination::File(arg.join(default_name))
        } else {
            Destination::File(arg.to_path_buf())
        }
    }

    /// Standard output?
    pub fn is_stdout(&self) -> bool {
        matches!(self, Destination::Stdout)
    }
}

impl fmt::Display for Destination {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            // reads as the end of "wrote …": "wrote to standard output"
            Destination::Stdout => write!(f, "to standard output"),
            Destination::File(p) => write!(f, "{}", p.display()),
        }
    }
}

/// The default file name for a document made from `input`: its stem with `extension`
/// (`site/survey.toml` → `survey.pdf`), or `fallback` when the input has no usable name.
pub fn default_name(input: &Path, extension: &str, fallback: &str) -> String {
    match input.file_stem().map(|s| s.to_string_lossy()) {
        Some(stem) if !stem.is_empty() && stem != "-" => format!("{stem}.{extension}"),
        _ => fallback.to_string(),
    }
}

/// Why an output was not written. The target is as the user named it, never a temporary file.
#[derive(Debug)]
pub enum WriteError {
    /// The target is one of the command's inputs.
    IsInput { path: PathBuf },
    /// The target exists and is not a regular file (`what`: "a FIFO (named pipe)" …).
    NotRegular { path: PathBuf, what: &'static str },
    /// The target is a read-only file.
    ReadOnly { path: PathBuf },
    /// Standard output is a terminal.
    Terminal,
    /// Too many symbolic links (or a loop) from the target.
    LinkLoop { path: PathBuf },
    /// The target's folder does not exist.
    NoFolder { path: PathBuf, folder: PathBuf },
    /// The file system failed while `stage`.
    Io {
        path: PathBuf,
        stage: &'static str,
        source: std::io::Error,
    },
}

impl WriteError {
    fn io(path: &Path, stage: &'static str) -> impl FnOnce(std::io::Error) -> WriteError {
        let path = path.to_path_buf();
        move |source| WriteError::Io {
            path,
            stage,
            source,
        }
    }

    /// A refusal by the rules (exit 1), as opposed to a failure of the file system (exit 2).
    pub fn is_refusal(&self) -> bool {
        !matches!(self, WriteError::Io { .. } | WriteError::NoFolder { .. })
    }

    fn hint(&self) -> &'static str {
        match self {
            WriteError::IsInput { .. } => "name a new file for the output (inputs are never replaced)",
            WriteError::NotRegular { .. } => {
                "name a regular file (or `-` for standard output); annulus replaces only regular files"
            }
            WriteError::ReadOnly { .. } => {
                "make the file writable first if it should be replaced, or name another file"
            }
            WriteError::Terminal => "redirect the output to a file (`> out.pdf`) or name a file with -o",
            WriteError::LinkLoop { .. } => "name the file itself rather than a chain of links",
            WriteError::NoFolder { .. } => "create the folder first, or name a file in an existing one",
            WriteError::Io { .. } => "check the free space and the permissions of the folder",
        }
    }

    fn path(&self) -> Option<&Path> {
        match self {
            WriteError::Terminal => None,
            WriteError::IsInput { path }
            | WriteError::NotRegular { path, .. }
            | WriteError::ReadOnly { path }
            | WriteError::LinkLoop { path }
            | WriteError::NoFolder { path, .. }
            | WriteError::Io { path, .. } => Some(path),
        }
    }
}

impl fmt::Display for WriteError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            WriteError::IsInput { path } => write!(
                f,
                "refusing to write over `{}`: it is one of this command's inputs",
                path.display()
            ),
            WriteError::NotRegular { path, what } => write!(
                f,
                "refusing to write over `{}`: it is {what}, not a regular file",
                path.display()
            ),
            WriteError::ReadOnly { path } => write!(
                f,
                "refusing to replace `{}`: it is read-only",
                path.display()
            ),
            WriteError::Terminal => write!(
                f,
                "refusing to write a PDF to standard output: it is a terminal"
            ),
            WriteError::LinkLoop { path } => write!(
                f,
                "cannot write `{}`: too many symbolic links (or a loop)",
                path.display()
            ),
            WriteError::NoFolder { path, folder } => write!(
                f,
                "cannot write `{}`: the folder `{}` does not exist",
                path.display(),
                folder.display()
            ),
            WriteError::Io {
                path,
                stage,
                source,
            } => write!(
                f,
                "cannot write `{}` ({stage}): {}",
                path.display(),
                reason(source)
            ),
        }
    }
}

impl std::error::Error for WriteError {}

impl From<WriteError> for Error {
    /// A refusal is a located input diagnostic (exit 1); a file-system failure an environment
    /// error (exit 2) in the same shape, with its hint.
    fn from(e: WriteError) -> Error {
        if e.is_refusal() {
            let mut d = Diagnostic::new(e.to_string()).hint(e.hint());
            if let Some(p) = e.path() {
                d = d.at(Location::file(p.display().to_string()));
            }
            Error::input(d)
        } else {
            Error::Environment(format!("{e}\n   = hint: {}", e.hint()))
        }
    }
}

/// The file that writing at `path` replaces: symbolic links followed.
fn follow_links(path: &Path) -> Result<PathBuf, WriteError> {
    let mut p = path.to_path_buf();
    for _ in 0..=MAX_SYMLINK_HOPS {
        match std::fs::symlink_metadata(&p) {
            Ok(m) if m.file_type().is_symlink() => {
                let target = std::fs::read_link(&p)
                    .map_err(WriteError::io(path, "following its symbolic link"))?;
                p = match p.parent() {
                    Some(dir) if target.is_relative() => dir.join(target),
                    _ => target,
                };
            }
            _ => return Ok(p),
        }
    }
    Err(WriteError::LinkLoop {
        path: path.to_path_buf(),
    })
}

#[cfg(unix)]
fn same_file(a: &std::fs::Metadata, b: &Path) -> bool {
    use std::os::unix::fs::MetadataExt;
    std::fs::metadata(b).is_ok_and(|b| a.dev() == b.dev() && a.ino() == b.ino())
}

#[cfg(not(unix))]
fn same_file(_: &std::fs::Metadata, _: &Path) -> bool {
    false
}

/// The rules for replacing `target` (links already followed); `shown` is the path as the user
/// named it, for messages.
fn check_target(target: &Path, shown: &Path, inputs: &[PathBuf]) -> Result<(), WriteError> {
    let meta = match std::fs::metadata(target) {
        Ok(m) => m,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
            let folder = folder_of(target);
            return match std::fs::metadata(folder) {
                Ok(m) if m.is_dir() => Ok(()),
                _ => Err(WriteError::NoFolder {
                    path: shown.to_path_buf(),
                    folder: folder.to_path_buf(),
                }),
            };
        }
        Err(e) => return Err(WriteError::io(shown, "looking at it")(e)),
    };
    let is_input = inputs.iter().any(|i| {
        same_file(&meta, i)
            || (!cfg!(unix) && std::fs::canonicalize(i).ok() == std::fs::canonicalize(target).ok())
    });
    if is_input {
        return Err(WriteError::IsInput {
            path: shown.to_path_buf(),
        });
    }
    if let Some(what) = special_kind(&meta) {
        return Err(WriteError::NotRegular {
            path: shown.to_path_buf(),
            what,
        });
    }
    if meta.permissions().readonly() {
        return Err(WriteError::ReadOnly {
            path: shown.to_path_buf(),
        });
    }
    Ok(())
}

/// Checks that `dest` may be written by these rules, without writing: for a command to refuse
/// before doing expensive work. [`write()`] checks again.
pub fn check(dest: &Destination, inputs: &[PathBuf]) -> Result<(), WriteError> {
    match dest {
        Destination::Stdout => check_stdout(),
        Destination::File(p) => check_target(&follow_links(p)?, p, inputs),
    }
}

fn check_stdout() -> Result<(), WriteError> {
    use std::io::IsTerminal;
    if std::io::stdout().is_terminal() {
        Err(WriteError::Terminal)
    } else {
        Ok(())
    }
}

/// Writes `bytes` to `dest` by the rules of this module, never over one of `inputs`.
pub fn write(dest: &Destination, bytes: &[u8], inputs: &[PathBuf]) -> Result<(), WriteError> {
    match dest {
        Destination::Stdout => {
            check_stdout()?;
            let mut out = std::io::stdout().lock();
            match out.write_all(bytes).and_then(|_| out.flush()) {
                // a reader that stopped early (`| head`) lost nothing of ours
                Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => Err(WriteError::Io {
                    path: PathBuf::from("-"),
                    stage: "writing to standard output",
                    source: e,
                }),
                _ => Ok(()),
            }
        }
        Destination::File(p) => write_file(p, bytes, inputs),
    }
}

/// Writes `bytes` to `path` by the rules of this module, with no inputs to protect.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), WriteError> {
    write_file(path, bytes, &[])
}

/// A temporary file beside its target, written and flushed, with the permissions the target
/// will have.
struct Prepared {
    shown: PathBuf,
    target: PathBuf,
    existed: bool,
    tmp: tempfile::NamedTempFile,
}

fn folder_of(target: &Path) -> &Path {
    match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    }
}

fn prepare(shown: &Path, bytes: &[u8], inputs: &[PathBuf]) -> Result<Prepared, WriteError> {
    let target = follow_links(shown)?;
    check_target(&target, shown, inputs)?;
    let dir = folder_of(&target);
    let existing = std::fs::metadata(&target).ok();
    let mut tmp = tempfile::Builder::new()
        .prefix(TEMP_PREFIX)
        .suffix(TEMP_SUFFIX)
        .tempfile_in(dir)
        .map_err(|e| {
            if matches!(
                e.kind(),
                std::io::ErrorKind::NotFound | std::io::ErrorKind::NotADirectory
            ) {
                WriteError::NoFolder {
                    path: shown.to_path_buf(),
                    folder: dir.to_path_buf(),
                }
            } else {
                WriteError::io(shown, "creating a file in its folder")(e)
            }
        })?;
    clear_stale_temporaries(dir, tmp.path());
    // through the plain file: tempfile's own writer would put the temporary path in its errors
    tmp.as_file_mut()
        .write_all(bytes)
        .map_err(WriteError::io(shown, "writing"))?;
    tmp.as_file()
        .sync_all()
        .map_err(WriteError::io(shown, "flushing to disk"))?;
    match &existing {
        Some(m) => tmp.as_file().set_permissions(m.permissions()),
        None => set_default_mode(tmp.as_file()),
    }
    .map_err(WriteError::io(shown, "setting permissions"))?;
    Ok(Prepared {
        shown: shown.to_path_buf(),
        target,
        existed: existing.is_some(),
        tmp,
    })
}

/// Renames a prepared file into place, after checking the rules once more (the target may have
/// changed while the bytes were written).
fn commit(p: Prepared, inputs: &[PathBuf]) -> Result<(), WriteError> {
    check_target(&p.target, &p.shown, inputs)?;
    let shown = p.shown;
    p.tmp
        .persist(&p.target)
        .map_err(|e| WriteError::io(&shown, "renaming into place")(e.error))?;
    sync_folder(folder_of(&p.target));
    Ok(())
}

fn write_file(path: &Path, bytes: &[u8], inputs: &[PathBuf]) -> Result<(), WriteError> {
    let prepared = prepare(path, bytes, inputs)?;
    commit(prepared, inputs)
}

/// Writes every file or none: all are prepared (written to temporaries and flushed) before the
/// first is renamed into place. If a rename fails, the files this call created are removed again;
/// files it replaced were regular, writable, non-input files the caller chose to replace.
pub fn write_all_or_none(
    files: &[(PathBuf, Vec<u8>)],
    inputs: &[PathBuf],
) -> Result<(), WriteError> {
    let mut prepared = Vec::with_capacity(files.len());
    for (path, bytes) in files {
        // an error drops the temporaries prepared so far, which removes them
        prepared.push(prepare(path, bytes, inputs)?);
    }
    let mut created: Vec<PathBuf> = Vec::new();
    for p in prepared {
        let (target, existed) = (p.target.clone(), p.existed);
        if let Err(e) = commit(p, inputs) {
            for c in &created {
                let _ = std::fs::remove_file(c);
            }
            return Err(e);
        }
        if !existed {
            created.push(target);
        }
    }
    Ok(())
}

/// Removes temporary files of ours in `dir` left by a write that was killed: named
/// `.annulus-*.tmp`, regular, owned by the user who just created `ours`, and older than
/// [`STALE_TEMPORARY_AGE`] by the file system's own clock (the age is measured against `ours`,
/// just created, so the program reads no clock). Errors are ignored: this is housekeeping.
fn clear_stale_temporaries(dir: &Path, ours: &Path) {
    let Ok(our_meta) = std::fs::metadata(ours) else {
        return;
    };
    let Ok(now) = our_meta.modified() else {
        return;
    };
    let Ok(entries) = std::fs::read_dir(dir) else {
        return;
    };
    for entry in entries.take(STALE_SCAN_ENTRIES).flatten() {
        let name = entry.file_name();
        let name = name.to_string_lossy();
        if !name.starts_with(TEMP_PREFIX) || !name.ends_with(TEMP_SUFFIX) {
            continue;
        }
        let path = entry.path();
        if path.file_name() == ours.file_name() {
            continue;
        }
        // entry metadata does not follow links: a link named like ours is left alone
        let Ok(meta) = entry.metadata() else {
            continue;
        };
        if !meta.file_type().is_file() || !same_owner(&meta, &our_meta) {
            continue;
        }
        let old = meta
            .modified()
            .ok()
            .and_then(|m| now.duration_since(m).ok())
            .is_some_and(|age| age >= STALE_TEMPORARY_AGE);
        if old {
            let _ = std::fs::remove_file(&path);
        }
    }
}

#[cfg(unix)]
fn same_owner(a: &std::fs::Metadata, b: &std::fs::Metadata) -> bool {
    use std::os::unix::fs::MetadataExt;
    a.uid() == b.uid()
}

#[cfg(not(unix))]
fn same_owner(_: &std::fs::Metadata, _: &std::fs::Metadata) -> bool {
    true
}

/// Flushes the folder entry of a rename to disk where the system allows it (Unix); best effort.
fn sync_folder(dir: &Path) {
    #[cfg(unix)]
    if let Ok(d) = std::fs::File::open(dir) {
        let _ = d.sync_all();
    }
    #[cfg(not(unix))]
    let _ = dir;
}

#[cfg(unix)]
fn set_default_mode(file: &std::fs::File) -> std::io::Result<()> {
    use std::os::unix::fs::PermissionsExt;
    file.set_permissions(std::fs::Permissions::from_mode(0o644))
}

#[cfg(not(unix))]
fn set_default_mode(_file: &std::fs::File) -> std::io::Result<()> {
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn names(dir: &Path) -> Vec<String> {
        let mut v: Vec<String> = std::fs::read_dir(dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    }

    #[test]
    fn writes_whole_files_and_replaces_old_ones() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("out.pdf");
        write_atomic(&path, b"first").unwrap();
        write_atomic(&path, b"second, longer").unwrap();
        assert_eq!(std::fs::read(&path).unwrap(), b"second, longer");
        // No temporary file is left behind.
        assert_eq!(names(dir.path()), vec!["out.pdf"]);
    }

    #[cfg(unix)]
    #[test]
    fn new_files_are_readable_by_others() {
        use std::os::unix::fs::PermissionsExt;
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("r.pdf");
        write_atomic(&path, b"x").unwrap();
        let mode = std::fs::metadata(&path).unwrap().permissions().mode();
        assert_eq!(mode & 0o777, 0o644);
    }

    #[test]
    fn a_missing_folder_fails_and_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("no-such-dir").join("out.pdf");
        let e = write_atomic(&path, b"x").unwrap_err();
        assert!(matches!(e, WriteError::NoFolder { .. }), "{e:?}");
        assert!(
            e.to_string().ends_with("no-such-dir` does not exist"),
            "{e}"
        );
        assert!(!e.to_string().contains(TEMP_PREFIX), "{e}");
        assert!(!path.exists());
    }

    #[test]
    fn inputs_are_never_replaced() {
        let dir = tempfile::tempdir().unwrap();
        let input = dir.path().join("run1.csv");
        std::fs::write(&input, b"line,point,dp[Pa]\n").unwrap();
        // the same file under another spelling of its path
        let other = dir.path().join(".").join("run1.csv");
        let e = write(
            &Destination::File(other),
            b"%PDF",
            std::slice::from_ref(&input),
        )
        .unwrap_err();
        assert!(matches!(e, WriteError::IsInput { .. }), "{e:?}");
        assert_eq!(std::fs::read(&input).unwrap(), b"line,point,dp[Pa]\n");
        assert_eq!(names(dir.path()), vec!["run1.csv"]);
        let err: Error = e.into();
        assert_eq!(err.exit_code(), 1);
    }

    #[cfg(unix)]
    #[test]
    fn links_are_written_through_and_stay_links() {
        let dir = tempfile::tempdir().unwrap();
        let real = dir.path().join("real.pdf");
        std::fs::write(&real, b"old").unwrap();
        let link = dir.path().join("latest.pdf");
        std::os::unix::fs::symlink("real.pdf", &link).unwrap();
        write_atomic(&link, b"new").unwrap();
        assert!(std::fs::symlink_metadata(&link)
            .unwrap()
            .file_type()
            .is_symlink());
        assert_eq!(std::fs::read(&real).unwrap(), b"new");
        // a link to an input is refused like the input itself
        let e = write(&Destination::File(link), b"x", std::slice::from_ref(&real)).unwrap_err();
        assert!(matches!(e, WriteError::IsInput { .. }), "{e:?}");
        // a loop is an error, not a hang
        let a = dir.path().join("a.pdf");
        let b = dir.path().join("b.pdf");
        std::os::unix::fs::symlink("b.pdf", &a).unwrap();
        std::os::unix::fs::symlink("a.pdf", &b).unwrap();
        assert!(matches!(
            write_atomic(&a, b"x").unwrap_err(),
            WriteError::LinkLoop { .. }
        ));
    }

    #[test]
    fn read_only_files_are_not_replaced() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("signed.pdf");
        std::fs::write(&path, b"signed").unwrap();
        let mut p = std::fs::metadata(&path).unwrap().permissions();
        p.set_readonly(true);
        std::fs::set_permissions(&path, p).unwrap();
        let e = write_atomic(&path, b"x").unwrap_err();
        assert!(matches!(e, WriteError::ReadOnly { .. }), "{e:?}");
        assert_eq!(std::fs::read(&path).unwrap(), b"signed");
    }

    #[test]
    fn folders_get_the_default_name() {
        let dir = tempfile::tempdir().unwrap();
        assert_eq!(
            Destination::from_arg(dir.path(), "survey.pdf"),
            Destination::File(dir.path().join("survey.pdf"))
        );
        assert_eq!(
            Destination::from_arg(Path::new("new-folder/"), "survey.pdf"),
            Destination::File(PathBuf::from("new-folder/survey.pdf"))
        );
        assert_eq!(
            Destination::from_arg(Path::new("-"), "x.pdf"),
            Destination::Stdout
        );
        assert_eq!(
            default_name(Path::new("site/unit4.toml"), "pdf", "report.pdf"),
            "unit4.pdf"
        );
    }

    #[test]
    fn stale_temporaries_of_ours_are_cleared_fresh_ones_kept() {
        let dir = tempfile::tempdir().unwrap();
        let stale = dir.path().join(".annulus-old123.tmp");
        let fresh = dir.path().join(".annulus-new456.tmp");
        let other = dir.path().join(".other-old.tmp");
        for p in [&stale, &fresh, &other] {
            std::fs::write(p, b"partial").unwrap();
        }
        let two_hours_ago = std::time::SystemTime::now() - std::time::Duration::from_secs(7200);
        for p in [&stale, &other] {
            std::fs::File::options()
                .write(true)
                .open(p)
                .unwrap()
                .set_modified(two_hours_ago)
                .unwrap();
        }
        write_atomic(&dir.path().join("out.pdf"), b"x").unwrap();
        assert_eq!(
            names(dir.path()),
            vec![".annulus-new456.tmp", ".other-old.tmp", "out.pdf"]
        );
    }

    #[test]
    fn all_or_none_leaves_nothing_when_one_file_is_refused() {
        let dir = tempfile::tempdir().unwrap();
        std::fs::create_dir(dir.path().join("run2.csv")).unwrap();
        let files = vec![
            (dir.path().join("survey.toml"), b"[survey]".to_vec()),
            (dir.path().join("run1.csv"), b"line".to_vec()),
            (dir.path().join("run2.csv"), b"line".to_vec()),
        ];
        let e = write_all_or_none(&files, &[]).unwrap_err();
        assert!(
            matches!(
                e,
                WriteError::NotRegular {
                    what: "a folder",
                    ..
                }
            ),
            "{e:?}"
        );
        assert_eq!(names(dir.path()), vec!["run2.csv"]);
        write_all_or_none(&files[..2], &[]).unwrap();
        assert_eq!(
            names(dir.path()),
            vec!["run1.csv", "run2.csv", "survey.toml"]
        );
    }
}
