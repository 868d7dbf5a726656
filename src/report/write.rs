//! Atomic file output: a report (or any output file) appears whole or not at all.
//!
//! Owns writing bytes to a path through a temporary file in the same directory, flushed to disk and
//! then renamed over the target (a rename within one file system is atomic on POSIX and replaces
//! the target on Windows through `tempfile`'s persist). Must not decide paths or names: the caller
//! does. If anything fails, the temporary file is removed and the target is left as it was.

use std::fmt;
use std::io::Write as _;
use std::path::{Path, PathBuf};

/// Why an output file could not be written.
#[derive(Debug)]
pub struct WriteError {
    pub path: PathBuf,
    pub stage: &'static str,
    pub source: std::io::Error,
}

impl fmt::Display for WriteError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "cannot write `{}` ({}): {}",
            self.path.display(),
            self.stage,
            self.source
        )
    }
}

impl std::error::Error for WriteError {
    fn source(&self) -> Option<&(dyn std::error::Error + 'static)> {
        Some(&self.source)
    }
}

/// Writes `bytes` to `path` atomically. A new file gets mode 0644 on Unix (the temporary file is
/// created 0600); an existing file keeps its permissions.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), WriteError> {
    let err = |stage: &'static str| {
        move |source: std::io::Error| WriteError {
            path: path.to_path_buf(),
            stage,
            source,
        }
    };
    let dir = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    };
    let permissions = std::fs::metadata(path).ok().map(|m| m.permissions());
    let mut tmp = tempfile::Builder::new()
        .prefix(".annulus-")
        .suffix(".tmp")
        .tempfile_in(dir)
        .map_err(err("creating a temporary file beside it"))?;
    tmp.write_all(bytes).map_err(err("writing"))?;
    tmp.as_file().sync_all().map_err(err("flushing to disk"))?;
    match permissions {
        Some(p) => tmp
            .as_file()
            .set_permissions(p)
            .map_err(err("copying permissions"))?,
        None => set_default_mode(tmp.as_file()).map_err(err("setting permissions"))?,
    }
    tmp.persist(path).map_err(|e| WriteError {
        path: path.to_path_buf(),
        stage: "renaming into place",
        source: e.error,
    })?;
    Ok(())
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

    #[test]
    fn writes_whole_files_and_replaces_old_ones() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("out.pdf");
        write_atomic(&path, b"first").unwrap();
        write_atomic(&path, b"second, longer").unwrap();
        assert_eq!(std::fs::read(&path).unwrap(), b"second, longer");
        // No temporary file is left behind.
        let names: Vec<_> = std::fs::read_dir(dir.path())
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        assert_eq!(names, vec![std::ffi::OsString::from("out.pdf")]);
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
    fn a_missing_directory_fails_and_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("no-such-dir").join("out.pdf");
        let e = write_atomic(&path, b"x").unwrap_err();
        assert_eq!(e.stage, "creating a temporary file beside it");
        assert!(e.to_string().contains("out.pdf"));
        assert!(!path.exists());
    }
}
