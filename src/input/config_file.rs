//! Finding and reading the user configuration file (see [`crate::config`] for what it holds).
//!
//! Where it is looked for, first match wins:
//!
//! 1. `ANNULUS_CONFIG` when set: that file (an empty value means no configuration);
//! 2. Linux and other Unix: `$XDG_CONFIG_HOME/annulus/config.toml`, else
//!    `~/.config/annulus/config.toml`;
//!    macOS: `~/Library/Application Support/annulus/config.toml`;
//!    Windows: `%APPDATA%\annulus\config.toml`.
//!
//! A missing file is no configuration; a file that exists but cannot be read or parsed is an input
//! error located to its line and column (a typo in a key name too: unknown keys are refused).

use super::text::span_location;
use crate::config::{Config, CONFIG_ENV, KEYS};
use crate::diag::{Diagnostic, Diagnostics, Error, Location};
use crate::survey::ConventionId;
use std::path::{Path, PathBuf};
use toml::Spanned;

/// Largest configuration file read (it holds a few lines).
pub const MAX_CONFIG_BYTES: u64 = 64 * 1024;

/// The platform's configuration file path, from the environment given (`var` looks a variable up).
pub fn default_path(var: &dyn Fn(&str) -> Option<String>) -> Option<PathBuf> {
    let nonempty = |k: &str| var(k).filter(|v| !v.trim().is_empty());
    if cfg!(windows) {
        return nonempty("APPDATA").map(|d| PathBuf::from(d).join("annulus").join("config.toml"));
    }
    if cfg!(target_os = "macos") {
        return nonempty("HOME").map(|h| {
            PathBuf::from(h)
                .join("Library/Application Support/annulus")
                .join("config.toml")
        });
    }
    match nonempty("XDG_CONFIG_HOME") {
        Some(x) => Some(PathBuf::from(x).join("annulus").join("config.toml")),
        None => nonempty("HOME").map(|h| PathBuf::from(h).join(".config/annulus/config.toml")),
    }
}

/// Which file to read: `ANNULUS_CONFIG` (named explicitly, so it must exist) or the platform's
/// default (optional). `None`: no configuration.
pub fn config_path(var: &dyn Fn(&str) -> Option<String>) -> Option<(PathBuf, bool)> {
    match var(CONFIG_ENV) {
        Some(v) if v.trim().is_empty() => None,
        Some(v) => Some((PathBuf::from(v), true)),
        None => default_path(var).map(|p| (p, false)),
    }
}

/// Reads the configuration the environment points at; `Ok(None)` when there is none.
pub fn load_config() -> Result<Option<Config>, Error> {
    let var = |k: &str| std::env::var(k).ok();
    let Some((path, required)) = config_path(&var) else {
        return Ok(None);
    };
    let name = path.display().to_string();
    let meta = match std::fs::metadata(&path) {
        Ok(m) => m,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound && !required => return Ok(None),
        Err(e) => {
            return Err(Error::input(
                Diagnostic::new(format!("cannot read the configuration file `{name}`: {e}"))
                    .at(Location::file(&name))
                    .hint(format!(
                        "{CONFIG_ENV} names it; unset {CONFIG_ENV} to use the default place, or set it empty for no configuration"
                    )),
            ))
        }
    };
    if !meta.is_file() {
        return Err(Error::input(
            Diagnostic::new(format!("the configuration `{name}` is not a regular file"))
                .at(Location::file(&name)),
        ));
    }
    if meta.len() > MAX_CONFIG_BYTES {
        return Err(Error::input(
            Diagnostic::new(format!(
                "the configuration file `{name}` is {} bytes; a configuration holds a few lines (at most {MAX_CONFIG_BYTES} bytes)",
                meta.len()
            ))
            .at(Location::file(&name)),
        ));
    }
    let (_, text) = super::read_text(&path, &name, crate::limits::FileKind::Settings)?;
    let home = var("HOME")
        .or_else(|| var("USERPROFILE"))
        .map(PathBuf::from);
    parse_config(&path, &name, &text, home.as_deref()).map(Some)
}

#[derive(serde::Deserialize)]
#[serde(deny_unknown_fields)]
struct Raw {
    organisation: Option<Spanned<String>>,
    technician: Option<Spanned<String>>,
    certificate: Option<Spanned<String>>,
    signing_key: Option<Spanned<String>>,
    trust: Option<Spanned<String>>,
    convention: Option<Spanned<String>>,
}

/// Parses configuration text read from `path` (`name` in messages); `home` expands `~/`.
pub fn parse_config(
    path: &Path,
    name: &str,
    text: &str,
    home: Option<&Path>,
) -> Result<Config, Error> {
    let raw: Raw = toml::from_str(text).map_err(|e| {
        let at = e
            .span()
            .map(|s| span_location(name, text, s.start))
            .unwrap_or_else(|| Location::file(name));
        let msg = e.message().trim().to_string();
        let hint = if msg.contains("unknown field") {
            format!("the keys are {}", KEYS.join(", "))
        } else {
            "the file is TOML: `key = \"value\"`, one per line".to_string()
        };
        Error::input(
            Diagnostic::new(format!("the configuration file is not valid: {msg}"))
                .at(at)
                .hint(hint),
        )
    })?;
    let mut diags = Diagnostics::new();
    let dir = path.parent().unwrap_or(Path::new("."));
    let text_value = |v: &Option<Spanned<String>>, key: &str, diags: &mut Diagnostics| {
        v.as_ref().and_then(|s| {
            let t = s.get_ref().trim();
            if t.is_empty() {
                diags.push(
                    Diagnostic::new(format!("`{key}` is empty"))
                        .at(span_location(name, text, s.span().start))
                        .hint(format!("give a value or remove the `{key}` line")),
                );
                None
            } else {
                Some(t.to_string())
            }
        })
    };
    let path_value = |v: &Option<Spanned<String>>, key: &str, diags: &mut Diagnostics| {
        text_value(v, key, diags).and_then(|t| {
            let p = match t.strip_prefix("~/").or_else(|| t.strip_prefix("~\\")) {
                Some(rest) => match home {
                    Some(h) => h.join(rest),
                    None => {
                        diags.push(
                            Diagnostic::new(format!(
                                "`{key}` starts with `~/` but the home folder is not known"
                            ))
                            .at(span_location(
                                name,
                                text,
                                v.as_ref().map(|s| s.span().start).unwrap_or(0),
                            ))
                            .hint("write the full path"),
                        );
                        return None;
                    }
                },
                None => dir.join(&t),
            };
            Some(p)
        })
    };
    let convention = raw.convention.as_ref().and_then(|s| {
        let c = ConventionId::parse(s.get_ref());
        if c.is_none() {
            diags.push(
                Diagnostic::new(format!("unknown convention `{}`", s.get_ref()))
                    .at(span_location(name, text, s.span().start))
                    .hint(format!(
                        "use one of {}",
                        ConventionId::ALL.map(|c| c.name()).join(", ")
                    )),
            );
        }
        c
    });
    let config = Config {
        path: path.to_path_buf(),
        organisation: text_value(&raw.organisation, "organisation", &mut diags),
        technician: text_value(&raw.technician, "technician", &mut diags),
        certificate: text_value(&raw.certificate, "certificate", &mut diags),
        signing_key: path_value(&raw.signing_key, "signing_key", &mut diags),
        trust: path_value(&raw.trust, "trust", &mut diags),
        convention,
    };
    diags.finish(config)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parse(text: &str) -> Result<Config, Error> {
        parse_config(
            Path::new("/cfg/annulus/config.toml"),
            "config.toml",
            text,
            Some(Path::new("/home/dana")),
        )
    }

    #[test]
    fn every_key_is_read_and_paths_resolved() {
        let c = parse(
            "organisation = \"Ridgeline Air Testing (fictional)\"\ntechnician = \"Dana Ferrow\"\ncertificate = \"QSTI-FIC-2291\"\nsigning_key = \"~/keys/dana.key\"\ntrust = \"trusted\"\nconvention = \"hvac-ip\"\n",
        )
        .unwrap();
        assert_eq!(
            c.organisation.as_deref(),
            Some("Ridgeline Air Testing (fictional)")
        );
        assert_eq!(c.technician.as_deref(), Some("Dana Ferrow"));
        assert_eq!(c.certificate.as_deref(), Some("QSTI-FIC-2291"));
        assert_eq!(
            c.signing_key,
            Some(PathBuf::from("/home/dana/keys/dana.key"))
        );
        assert_eq!(c.trust, Some(PathBuf::from("/cfg/annulus/trusted")));
        assert_eq!(c.convention, Some(ConventionId::HvacIp));
        // an empty file is an empty configuration
        assert_eq!(parse("").unwrap().trust, None);
    }

    #[test]
    fn mistakes_are_located() {
        let Err(Error::Input(d)) = parse("technician = \"Dana\"\ntrust_list = \"x\"\n") else {
            panic!("accepted an unknown key")
        };
        let first = &d.items()[0];
        assert!(first.message.contains("trust_list"), "{}", first.message);
        assert_eq!(first.location.as_ref().unwrap().line, Some(2));
        assert!(first.hint.as_ref().unwrap().contains("signing_key"));
        let Err(Error::Input(d)) = parse("convention = \"epa\"\norganisation = \"\"\n") else {
            panic!("accepted a bad convention")
        };
        assert_eq!(d.len(), 2);
        assert_eq!(d.items()[0].location.as_ref().unwrap().line, Some(1));
        assert_eq!(d.items()[1].location.as_ref().unwrap().line, Some(2));
        assert!(parse("organisation = [").is_err());
    }

    #[test]
    fn the_file_is_found_where_the_platform_keeps_it() {
        let env = |pairs: &'static [(&'static str, &'static str)]| {
            move |k: &str| {
                pairs
                    .iter()
                    .find(|(n, _)| *n == k)
                    .map(|(_, v)| v.to_string())
            }
        };
        // the variable wins, and an empty one means none
        assert_eq!(
            config_path(&env(&[("ANNULUS_CONFIG", "/tmp/a.toml"), ("HOME", "/h")])),
            Some((PathBuf::from("/tmp/a.toml"), true))
        );
        assert_eq!(
            config_path(&env(&[("ANNULUS_CONFIG", ""), ("HOME", "/h")])),
            None
        );
        if cfg!(all(unix, not(target_os = "macos"))) {
            assert_eq!(
                config_path(&env(&[("XDG_CONFIG_HOME", "/x"), ("HOME", "/h")])),
                Some((PathBuf::from("/x/annulus/config.toml"), false))
            );
            assert_eq!(
                config_path(&env(&[("HOME", "/h")])),
                Some((PathBuf::from("/h/.config/annulus/config.toml"), false))
            );
        }
        assert_eq!(config_path(&env(&[])), None);
    }
}
