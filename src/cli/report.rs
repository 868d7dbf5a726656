//! `annulus report`: compute, check and write the signed-off PDF test report.

use super::output::{json_text, Ctx};
use crate::archive::bundle::pack;
use crate::archive::{SecretKey, Signature};
use crate::diag::{Diagnostic, Error, Location};
use crate::input::load;
use crate::pipeline::evaluate_and_assess;
use crate::report::build::{report_data, Identity};
use crate::report::{write_atomic, Engine, RenderOptions, UserTemplate};
use crate::results::ResultsDoc;
use clap::Args;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct ReportArgs {
    /// The survey file.
    pub survey: PathBuf,
    /// Where to write the PDF (written atomically: never half a file).
    #[arg(short, long, value_name = "OUT.pdf")]
    pub output: PathBuf,
    /// A firm's own Typst template, laid out against the same data as the built-in one.
    #[arg(long, value_name = "PATH")]
    pub template: Option<PathBuf>,
    /// Sign the report's manifest with this Ed25519 secret key (see `annulus keygen`).
    #[arg(long, value_name = "KEY")]
    pub sign: Option<PathBuf>,
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

pub(crate) fn read_key(path: &std::path::Path) -> Result<SecretKey, Error> {
    let name = path.display().to_string();
    let text = std::fs::read_to_string(path).map_err(|e| {
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
    let key = args.sign.as_deref().map(read_key).transpose()?;
    let template = match &args.template {
        Some(p) => {
            let name = p.display().to_string();
            let (_, text) = crate::input::read_text(p, &name)?;
            Some(UserTemplate {
                display_name: name,
                text,
            })
        }
        None => None,
    };
    let loaded = load(&args.survey)?;
    let (e, a) = evaluate_and_assess(loaded)?;
    let doc = ResultsDoc::new(&e, &a);
    let program = format!("annulus {}", env!("CARGO_PKG_VERSION"));
    let bundle = pack(&e.loaded, json_text(&doc).into_bytes(), &program);
    let signature = key.as_ref().map(|k| Signature::sign(&bundle.manifest, k));
    let identity = Identity {
        report_id: bundle.manifest.report_id(),
        content_sha256: bundle.manifest.fingerprint(),
        signer_key_fingerprint: signature.as_ref().map(|s| s.fingerprint.clone()),
    };
    let data = report_data(&e, &a, &identity);
    let attachments = bundle
        .attachments(signature.as_ref())
        .map_err(|err| Error::Environment(format!("cannot embed the data files: {err}")))?;
    let options = RenderOptions {
        date: document_date(e.loaded.survey.date)?,
        attachments,
    };
    let engine = Engine::new();
    let rendered = match &template {
        Some(t) => engine.render_report_with_template(t, &data, &options),
        None => engine.render_report(&data, &options),
    }
    .map_err(|err| match &template {
        Some(t) => Error::input(
            Diagnostic::new(format!("the template could not be laid out:\n{err}"))
                .at(Location::file(&t.display_name))
                .hint("the data a template receives is documented in src/report/model.rs (ReportData)"),
        ),
        None => Error::Environment(format!("the built-in report template failed: {err}")),
    })?;
    write_atomic(&args.output, &rendered.pdf).map_err(|err| {
        Error::Environment(format!("cannot write `{}`: {err}", args.output.display()))
    })?;
    if !ctx.quiet {
        for w in &rendered.warnings {
            eprintln!("warning: {w}");
        }
        eprintln!(
            "wrote {} — report {}{}; checks: {}",
            args.output.display(),
            identity.report_id,
            match &identity.signer_key_fingerprint {
                Some(f) => format!(", signed by key {f}"),
                None => ", unsigned".into(),
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
