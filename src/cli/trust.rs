//! Reading trust lists for `verify` and `review`: `.pub` files, trust list files and folders of
//! `.pub` files (see [`crate::archive::trust`] for the formats). Reading keys is the command
//! line's job, like reading the report to verify.

use crate::archive::trust::TrustList;
use crate::diag::{Diagnostic, Error, Location};
use std::path::{Path, PathBuf};

/// Largest key or trust list file read.
pub const MAX_TRUST_FILE_BYTES: u64 = 1 << 20;

/// Most `.pub` files read from one folder.
pub const MAX_FOLDER_KEYS: usize = 10_000;

fn located(name: &str, message: String, hint: &str) -> Error {
    Error::input(
        Diagnostic::new(message)
            .at(Location::file(name))
            .hint(hint.to_string()),
    )
}

/// Adds the keys of one file to `list`.
fn add_file(list: &mut TrustList, path: &Path) -> Result<(), Error> {
    let name = path.display().to_string();
    let meta = std::fs::metadata(path).map_err(|e| {
        located(
            &name,
            format!("cannot read the key file `{name}`: {e}"),
            "pass a .pub file written by `annulus keygen NAME`, a trust list file or a folder of .pub files",
        )
    })?;
    if !meta.is_file() {
        return Err(located(
            &name,
            format!("`{name}` is not a regular file"),
            "pass a .pub file, a trust list file or a folder of .pub files",
        ));
    }
    if meta.len() > MAX_TRUST_FILE_BYTES {
        return Err(located(
            &name,
            format!(
                "`{name}` is {} bytes, more than a key file or trust list holds (at most {MAX_TRUST_FILE_BYTES})",
                meta.len()
            ),
            "pass a .pub file or a trust list file",
        ));
    }
    let (_, text) = crate::input::read_text(path, &name, crate::limits::FileKind::Settings)?;
    let stem = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| name.clone());
    list.add_text(&text, &stem).map_err(|e| {
        located(
            &name,
            format!("`{name}`: {e}"),
            "a .pub file from `annulus keygen`, or [[key]] tables with `name` and `public_key`",
        )
    })?;
    Ok(())
}

/// Adds the keys of a `.pub` file, a trust list file, or every `.pub` file of a folder.
pub fn add_path(list: &mut TrustList, path: &Path) -> Result<(), Error> {
    let name = path.display().to_string();
    if path.is_dir() {
        let entries = std::fs::read_dir(path).map_err(|e| {
            located(
                &name,
                format!("cannot list the trust folder `{name}`: {e}"),
                "give a folder of .pub files",
            )
        })?;
        let mut files: Vec<PathBuf> = entries
            .filter_map(|e| e.ok().map(|e| e.path()))
            .filter(|p| {
                p.extension()
                    .is_some_and(|x| x.to_string_lossy().eq_ignore_ascii_case("pub"))
            })
            .take(MAX_FOLDER_KEYS + 1)
            .collect();
        if files.len() > MAX_FOLDER_KEYS {
            return Err(located(
                &name,
                format!("the trust folder `{name}` holds more than {MAX_FOLDER_KEYS} .pub files"),
                "split the keys into a trust list file",
            ));
        }
        if files.is_empty() {
            return Err(located(
                &name,
                format!("the trust folder `{name}` holds no .pub files"),
                "copy the .pub files of the keys you trust into it",
            ));
        }
        files.sort();
        for f in &files {
            add_file(list, f)?;
        }
    } else {
        add_file(list, path)?;
    }
    list.sources.push(name);
    Ok(())
}

/// The trust list in force: `--key` files and `--trust` paths when any is given, else the
/// configuration's `trust`; `None` when neither says whose signatures count.
pub fn load_trust(
    keys: &[PathBuf],
    trust: &[PathBuf],
    config: Option<&crate::config::Config>,
) -> Result<Option<TrustList>, Error> {
    let mut list = TrustList::new();
    if keys.is_empty() && trust.is_empty() {
        let Some(path) = config.and_then(|c| c.trust.as_ref()) else {
            return Ok(None);
        };
        add_path(&mut list, path).map_err(|e| match e {
            Error::Input(mut d) => {
                if let Some(c) = config {
                    let hint = format!(
                        "the trust list is set by `trust` in the configuration file `{}`",
                        c.path.display()
                    );
                    d.push(Diagnostic::new(hint));
                }
                Error::Input(d)
            }
            other => other,
        })?;
        return Ok(Some(list));
    }
    for p in keys.iter().chain(trust) {
        add_path(&mut list, p)?;
    }
    Ok(Some(list))
}
