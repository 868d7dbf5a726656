//! `annulus verify`: checks that a report (or calibration certificate, or RATA summary) is what was
//! sealed, page by page; that its results follow from its embedded inputs; and who signed it.
//! Reads the files and prints; the judgement is `archive::verify`.
//!
//! Exit codes: 0 verified; 3 not verified (content altered or damaged, results not reproduced, a
//! signature that does not count); 1 not a document of ours (or an unreadable key or trust list);
//! 2 the PDF cannot be read from disk.

use super::output::{csv_text, json_text, status, Ctx, Format, Table};
use crate::archive::trust::TrustList;
use crate::archive::verify::{
    verify, ContentState, Recomputation, RerenderPolicy, SignatureStatus, TrustPolicy,
    Verification, VerifyOptions,
};
use crate::diag::{Diagnostic, Error, Location};
use clap::{Args, ValueEnum};
use std::path::{Path, PathBuf};

/// At most this many differing values are listed in the table (JSON lists them all).
const MAX_SHOWN_DIFFERENCES: usize = 25;

/// When to re-render (see README, Verify).
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum RerenderArg {
    /// When the seal alone cannot settle it: unsigned, unknown or invalid signature, no seal.
    Auto,
    /// Always, even for a report signed by a trusted key.
    Always,
    /// Never: check the seal only (fastest).
    Never,
}

impl RerenderArg {
    pub fn policy(self) -> RerenderPolicy {
        match self {
            RerenderArg::Auto => RerenderPolicy::Auto,
            RerenderArg::Always => RerenderPolicy::Always,
            RerenderArg::Never => RerenderPolicy::Never,
        }
    }
}

#[derive(Debug, Args)]
pub struct VerifyArgs {
    /// The report PDF (or calibration certificate, or RATA summary); `-` reads it from standard
    /// input.
    pub report: PathBuf,
    /// Trust signatures by this public key (the .pub file from `annulus keygen`); may repeat.
    /// Any --key or --trust replaces the configuration's trust list.
    #[arg(long, value_name = "PUB")]
    pub key: Vec<PathBuf>,
    /// Trust the keys of this folder of .pub files or trust list file; may repeat.
    #[arg(long, value_name = "PATH")]
    pub trust: Vec<PathBuf>,
    /// When to re-render the pages from the embedded inputs and compare them.
    #[arg(long, value_enum, default_value_t = RerenderArg::Auto)]
    pub rerender: RerenderArg,
    /// Output format: a table of what holds and what differs, a CSV row per part and per
    /// differing value, or the full record as JSON.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
}

/// The trust list in force and whether one is: `--key`/`--trust`, else the configuration's.
pub(crate) fn trust_from(keys: &[PathBuf], trust: &[PathBuf]) -> Result<(TrustList, bool), Error> {
    let config = if keys.is_empty() && trust.is_empty() {
        crate::input::config_file::load_config()?
    } else {
        None
    };
    Ok(
        match super::trust::load_trust(keys, trust, config.as_ref())? {
            Some(list) => (list, true),
            None => (TrustList::new(), false),
        },
    )
}

/// Reads the report (`-`: standard input) by the input rules (a regular file, within the PDF size
/// limit), with a located diagnostic.
pub(crate) fn read_report(path: &Path) -> Result<Vec<u8>, Error> {
    let kind = crate::limits::FileKind::Pdf;
    crate::input::fs::read_input(path, kind).map_err(|e| {
        Error::input(crate::input::fs::read_diagnostic(
            &path.display().to_string(),
            kind,
            &e,
        ))
    })
}

pub fn run(args: VerifyArgs, ctx: &Ctx) -> Result<i32, Error> {
    let (list, required) = trust_from(&args.key, &args.trust)?;
    let name = args.report.display().to_string();
    let bytes = read_report(&args.report)?;
    let options = VerifyOptions {
        trust: TrustPolicy {
            list: &list,
            required,
        },
        rerender: args.rerender.policy(),
        limits: Default::default(),
    };
    let v = verify(&bytes, &options).map_err(|e| {
        Error::input(
            Diagnostic::new(format!("`{name}` is {e}"))
                .at(Location::file(&name))
                .hint("`annulus verify` checks PDFs written by `annulus report`, `calibrate -o` and `rata -o`"),
        )
    })?;
    let text = match args.format {
        Format::Json => json_text(&v),
        Format::Csv => csv(&v),
        Format::Table => table(&name, &v, ctx),
    };
    super::emit(&text)?;
    Ok(if v.verified { 0 } else { 3 })
}

fn word(holds: bool) -> &'static str {
    if holds {
        "pass"
    } else {
        "fail"
    }
}

fn signature_word(v: &Verification) -> &'static str {
    match (v.signature.status, v.signature.accepted) {
        (_, false) => "fail",
        (SignatureStatus::Trusted, true) => "pass",
        _ => "note",
    }
}

fn recompute_words(r: &Recomputation) -> String {
    match r {
        Recomputation::Matches { compared, reworded } if reworded.is_empty() => format!(
            "all {compared} values of the embedded results reproduced from the embedded inputs"
        ),
        Recomputation::Matches { compared, reworded } => format!(
            "all {compared} values of the embedded results reproduced from the embedded inputs; {} descriptive text{} (a check's source or limit, a message) worded differently by this version, listed in --format json",
            reworded.len(),
            if reworded.len() == 1 { "" } else { "s" }
        ),
        Recomputation::Differs {
            compared,
            differences,
        } => format!(
            "{} of {compared} values of the embedded results not reproduced from the embedded inputs (listed below)",
            differences.len()
        ),
        Recomputation::Impossible { reason } => format!("not possible: {reason}"),
        Recomputation::NotDone { reason } => format!("not re-derived: {reason}"),
    }
}

/// One row per part checked, then one per change and per differing value.
fn csv(v: &Verification) -> String {
    let mut rows: Vec<Vec<String>> = Vec::new();
    let mut row = |part: &str, role: &str, holds: &str, finding: String| {
        rows.push(vec![part.into(), role.into(), holds.into(), finding]);
    };
    row(
        "content",
        v.content.name(),
        word(v.content == ContentState::Intact),
        v.content_words(),
    );
    row(
        "signature",
        v.signature.status.name(),
        signature_word(v),
        v.signature.detail.clone(),
    );
    if let Some(p) = &v.manifest_problem {
        row("manifest", "", "fail", p.clone());
    }
    for f in &v.files {
        row(
            &f.name,
            f.role.as_deref().unwrap_or(""),
            word(f.holds()),
            f.describe(),
        );
    }
    row(
        "recomputation",
        "",
        word(v.recomputation.holds()),
        recompute_words(&v.recomputation),
    );
    row("re-rendering", "", "note", v.rerendering.describe());
    for c in &v.changes {
        row("change", c.found_by, "fail", c.what.clone());
    }
    if let Recomputation::Differs { differences, .. } = &v.recomputation {
        for d in differences {
            row("difference", "", "fail", d.to_string());
        }
    }
    csv_text(&["part", "role", "result", "finding"], &rows)
}

fn table(name: &str, v: &Verification, ctx: &Ctx) -> String {
    let what = v.kind.map(|k| k.words()).unwrap_or("document");
    let mut out = format!(
        "{name}: {what} {}\n",
        v.report_id.as_deref().unwrap_or("(no readable id)")
    );
    if !ctx.quiet {
        if let Some(sha) = &v.content_sha256 {
            out += &format!("content SHA-256  {sha}\n");
        }
        out += &format!(
            "made by          {}; verified by {}\n",
            v.made_by.as_deref().unwrap_or("(unknown)"),
            v.verified_by
        );
    }
    let mut t = Table::new(&["result", "part", "finding"]).wrap(&[2]);
    let content = match v.content {
        ContentState::Intact => v.content_words(),
        ContentState::Altered => format!(
            "altered: {} change{} (listed below)",
            v.changes.len(),
            if v.changes.len() == 1 { "" } else { "s" }
        ),
        ContentState::Damaged => v.content_words(),
    };
    t.row(vec![
        status(word(v.content == ContentState::Intact), ctx.color),
        "content".into(),
        content,
    ]);
    t.row(vec![
        status(signature_word(v), ctx.color),
        "signature".into(),
        format!("{}: {}", v.signature.status.name(), v.signature.detail),
    ]);
    if let Some(p) = &v.manifest_problem {
        t.row(vec![
            status("fail", ctx.color),
            "manifest".into(),
            p.clone(),
        ]);
    }
    for f in &v.files {
        t.row(vec![
            status(word(f.holds()), ctx.color),
            match &f.role {
                Some(r) => format!("{} ({r})", f.name),
                None => f.name.clone(),
            },
            f.describe(),
        ]);
    }
    if v.content != ContentState::Damaged {
        t.row(vec![
            status(word(v.recomputation.holds()), ctx.color),
            "recomputation".into(),
            recompute_words(&v.recomputation),
        ]);
        t.row(vec![
            status("note", ctx.color),
            "re-rendering".into(),
            v.rerendering.describe(),
        ]);
    }
    out.push('\n');
    out += &t.fit(ctx.width);
    if !v.changes.is_empty() {
        out += "\nwhat changed\n";
        for c in &v.changes {
            out += &format!("  - {} [{}]\n", c.what, c.found_by);
        }
    }
    if let Recomputation::Differs { differences, .. } = &v.recomputation {
        out += "\ndifferences (embedded results vs recomputed; headline values first)\n";
        // shallow paths (flows, the average) before per-point and per-component values
        let mut shown: Vec<_> = differences.iter().collect();
        shown.sort_by_key(|d| d.path.matches(['.', '[']).count());
        for d in shown.into_iter().take(MAX_SHOWN_DIFFERENCES) {
            out += &format!("  {d}\n");
        }
        if differences.len() > MAX_SHOWN_DIFFERENCES {
            out += &format!(
                "  ... and {} more (--format json lists them all)\n",
                differences.len() - MAX_SHOWN_DIFFERENCES
            );
        }
    }
    let problems = v.problems().len();
    out += &format!(
        "\nverdict: {} — content {}, signature {}{}\n",
        if v.verified {
            status("verified", ctx.color)
        } else {
            status("NOT verified", ctx.color)
        },
        v.content.name(),
        v.signature.short(),
        if v.verified {
            String::new()
        } else {
            format!(
                " ({problems} problem{} found)",
                if problems == 1 { "" } else { "s" }
            )
        }
    );
    out
}
