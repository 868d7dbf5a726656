//! `annulus report`: compute, check and write the signed-off PDF test report.

use super::output::Ctx;
use crate::archive::make::{make_report, MakeError, ReportSettings};
use crate::archive::manifest::SignerEntry;
use crate::archive::SecretKey;
use crate::diag::{Diagnostic, Error, Location};
use crate::pipeline::evaluate_and_assess;
use crate::report::{Engine, UserTemplate};
use clap::Args;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct ReportArgs {
    /// The survey file.
    pub survey: PathBuf,
    /// Where to write the PDF: a file (written whole or not at all, never over an input), a
    /// folder (the PDF is named after the survey), or `-` for standard output.
    #[arg(short, long, value_name = "OUT.pdf")]
    pub output: PathBuf,
    /// A firm's own Typst template, laid out against the same data as the built-in one.
    #[arg(long, value_name = "PATH")]
    pub template: Option<PathBuf>,
    /// Sign the report with this Ed25519 secret key (see `annulus keygen`); its name is printed
    /// in the sign-off block. `--sign` without a path uses `signing_key` of the configuration file.
    #[arg(long, value_name = "KEY", num_args = 0..=1)]
    #[allow(clippy::option_option)]
    pub sign: Option<Option<PathBuf>>,
}

/// The document date: `SOURCE_DATE_EPOCH` when set (reproducible builds), else the survey date.
pub(crate) fn document_date(survey_date: chrono::NaiveDate) -> Result<chrono::NaiveDate, Error> {
    match std::env::var("SOURCE_DATE_EPOCH") {
        Ok(v) if !v.trim().is_empty() => {
            let secs: i64 = v.trim().parse().map_err(|_| {
                Error::input(
                    Diagnostic::new(format!(
                        "SOURCE_DATE_EPOCH is not a whole number of seconds: `{v}`"
                    ))
                    .hint("unset it to date the report by the survey date"),
                )
            })?;
            chrono::DateTime::from_timestamp(secs, 0)
                .map(|d| d.date_naive())
                .ok_or_else(|| {
                    Error::input(Diagnostic::new(format!(
                        "SOURCE_DATE_EPOCH `{v}` is out of range"
                    )))
                })
        }
        _ => Ok(survey_date),
    }
}

/// The key `--sign` names and its file: the path given, or the configuration's `signing_key` for
/// a bare `--sign`.
pub(crate) fn signing_key(arg: &Option<PathBuf>) -> Result<(SecretKey, PathBuf), Error> {
    if let Some(p) = arg {
        return Ok((read_key(p)?, p.clone()));
    }
    let config = crate::input::config_file::load_config()?;
    match config.as_ref().and_then(|c| c.signing_key.as_ref()) {
        Some(p) => Ok((read_key(p)?, p.clone())),
        None => Err(Error::input(
            Diagnostic::new("`--sign` was given without a key, and no configuration names a `signing_key`")
                .hint("give the key file (`--sign dana-ferrow.key`), or set `signing_key` in the configuration file (see README, Configuration)"),
        )),
    }
}

/// Who signs: the key's name, else the key file's stem for keys made before keys had names.
pub(crate) fn signer_entry(k: &SecretKey, path: &std::path::Path) -> SignerEntry {
    let stem = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .filter(|s| !s.is_empty())
        .unwrap_or_else(|| "signing key".into());
    SignerEntry::new(k.name().unwrap_or(&stem), &k.public())
}

/// The configuration's firm, technician and certificate (none without a configuration file).
pub(crate) fn signoff_defaults() -> Result<crate::config::SignoffDefaults, Error> {
    Ok(crate::input::config_file::load_config()?
        .map(|c| c.signoff_defaults())
        .unwrap_or_default())
}

pub(crate) fn read_key(path: &std::path::Path) -> Result<SecretKey, Error> {
    let name = path.display().to_string();
    let text =
        crate::input::fs::read_input_text(path, crate::limits::FileKind::Key).map_err(|e| {
            Error::input(
                Diagnostic::new(format!("cannot read the signing key `{name}`: {e}"))
                    .at(Location::file(&name))
                    .hint("make a key pair with `annulus keygen NAME`"),
            )
        })?;
    SecretKey::parse(&text).map_err(|e| {
        Error::input(
            Diagnostic::new(format!("`{name}`: {e}"))
                .at(Location::file(&name))
                .hint("pass the .key file (the secret half), not the .pub file"),
        )
    })
}

pub fn run(args: ReportArgs, ctx: &Ctx) -> Result<i32, Error> {
    let key_and_path = args.sign.as_ref().map(signing_key).transpose()?;
    let key = key_and_path.as_ref().map(|(k, _)| k);
    let template = match &args.template {
        Some(p) => {
            let name = p.display().to_string();
            let (_, text) = crate::input::read_text(p, &name, crate::limits::FileKind::Template)?;
            Some(UserTemplate {
                display_name: name,
                text,
            })
        }
        None => None,
    };
    let loaded = super::files::load_noted(&args.survey, ctx)?;
    crate::input::fs::check_embeddable(&loaded)?;
    let mut inputs = crate::input::fs::input_paths(&loaded);
    inputs.extend(args.template.iter().cloned());
    inputs.extend(key_and_path.iter().map(|(_, p)| p.clone()));
    let out = super::files::destination(&args.output, &args.survey, &inputs)?;
    let (e, a) = evaluate_and_assess(loaded)?;
    let signer = key_and_path.as_ref().map(|(k, path)| signer_entry(k, path));
    let settings = ReportSettings {
        template: template.as_ref(),
        document_date: document_date(e.loaded.survey.date)?,
        signer: signer.clone(),
        defaults: signoff_defaults()?,
    };
    let made = make_report(&Engine::new(), &e, &a, &settings, key).map_err(|err| {
        match (&err, &template) {
            (MakeError::Render(r), Some(t)) => Error::input(
                Diagnostic::new(format!("the template could not be laid out:\n{r}"))
                    .at(Location::file(&t.display_name))
                    .hint("the data a template receives is documented in src/report/model.rs (ReportData)"),
            ),
            (MakeError::Render(r), None) => {
                Error::Environment(format!("the built-in report template failed: {r}"))
            }
            _ => Error::Environment(err.to_string()),
        }
    })?;
    crate::write::write(&out, &made.pdf, &inputs)?;
    if !ctx.quiet {
        for w in &made.warnings {
            eprintln!("warning: {w}");
        }
        eprintln!(
            "wrote {out} — report {}{}; checks: {}",
            made.manifest.report_id(),
            match (&signer, &key) {
                (Some(s), Some(k)) =>
                    format!(", signed by {} (key {})", s.name, k.public().fingerprint()),
                _ => ", unsigned".into(),
            },
            match a.verdict {
                crate::assess::Verdict::Pass => "pass",
                crate::assess::Verdict::Warn => "pass with warnings",
                crate::assess::Verdict::Fail => "FAIL (see the checks section)",
            }
        );
    }
    Ok(0)
}
