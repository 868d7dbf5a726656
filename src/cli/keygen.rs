//! `annulus keygen NAME`: writes a new Ed25519 key pair, `NAME.key` (secret) and `NAME.pub`, both
//! recording the key's name (NAME's last component: what signed reports print in their sign-off
//! block and what a trust folder of `.pub` files knows the key by), and prints the key fingerprint
//! reports show.
//!
//! The secret file is created with owner-only permissions (0600 on Unix) in the same call that
//! creates it, so it is never readable by others, not even for an instant; neither file is ever
//! overwritten (`create_new`).

use super::output::Ctx;
use crate::archive::keys::NamedKey;
use crate::archive::SecretKey;
use crate::diag::{Diagnostic, Error, Location};
use clap::Args;
use std::io::Write;
use std::path::{Path, PathBuf};

#[derive(Debug, Args)]
pub struct KeygenArgs {
    /// Base name of the pair: writes NAME.key (keep it private) and NAME.pub (give it out).
    pub name: PathBuf,
}

fn with_suffix(base: &Path, ext: &str) -> PathBuf {
    let mut s = base.as_os_str().to_os_string();
    s.push(ext);
    PathBuf::from(s)
}

/// Creates `path` (refusing an existing file) and writes `text` to it; `secret` files are owner
/// read/write only from creation.
fn create(path: &Path, text: &str, secret: bool) -> std::io::Result<()> {
    let mut options = std::fs::OpenOptions::new();
    options.write(true).create_new(true);
    #[cfg(unix)]
    {
        use std::os::unix::fs::OpenOptionsExt;
        options.mode(if secret { 0o600 } else { 0o644 });
    }
    #[cfg(not(unix))]
    let _ = secret;
    let mut f = options.open(path)?;
    f.write_all(text.as_bytes())?;
    f.sync_all()
}

pub fn run(args: KeygenArgs, ctx: &Ctx) -> Result<i32, Error> {
    let secret_path = with_suffix(&args.name, ".key");
    let public_path = with_suffix(&args.name, ".pub");
    for p in [&secret_path, &public_path] {
        if p.exists() {
            let n = p.display().to_string();
            return Err(Error::input(
                Diagnostic::new(format!(
                    "`{n}` already exists; a key file is never overwritten"
                ))
                .at(Location::file(&n))
                .hint("choose another NAME, or move the old pair away first"),
            ));
        }
    }
    let key_name = args
        .name
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let key = SecretKey::generate()
        .map_err(|e| Error::Environment(e.to_string()))?
        .named(&key_name)
        .map_err(|e| {
            let n = args.name.display().to_string();
            Error::input(
                Diagnostic::new(format!("`{n}` cannot name a key: {e}"))
                    .at(Location::file(&n))
                    .hint("give a name such as `dana-ferrow`; the key files are NAME.key and NAME.pub"),
            )
        })?;
    let public = key.public();
    let named = NamedKey {
        name: key.name().map(str::to_string),
        key: public.clone(),
    };
    let failed = |p: &Path, e: std::io::Error| {
        let n = p.display().to_string();
        if e.kind() == std::io::ErrorKind::AlreadyExists {
            Error::input(
                Diagnostic::new(format!(
                    "`{n}` already exists; a key file is never overwritten"
                ))
                .at(Location::file(&n)),
            )
        } else {
            Error::Environment(format!("cannot write `{n}`: {e}"))
        }
    };
    create(&secret_path, &key.to_text(), true).map_err(|e| failed(&secret_path, e))?;
    if let Err(e) = create(&public_path, &named.to_text(), false) {
        // Leave no half pair behind: the secret file is the one this call just created.
        let _ = std::fs::remove_file(&secret_path);
        return Err(failed(&public_path, e));
    }
    if !ctx.quiet {
        eprintln!(
            "wrote {} (secret: keep it private; sign with `annulus report … --sign {}`) and {} (public: give it to whoever verifies)",
            secret_path.display(),
            secret_path.display(),
            public_path.display()
        );
    }
    super::emit(&format!("key fingerprint {}\n", public.fingerprint()))?;
    Ok(0)
}
