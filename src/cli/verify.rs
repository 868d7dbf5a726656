//! `annulus verify`: re-derives a report's results from its embedded survey and readings and checks
//! its hashes and signature. Reads the files and prints; the judgement is `archive::verify`.
//!
//! Exit codes: 0 everything verifies, 3 anything does not, 1 not a report of ours (or an
//! unreadable key file), 2 the PDF cannot be read from disk.

use super::output::{csv_text, json_text, status, Ctx, Format, Table};
use crate::archive::verify::{verify, Recomputation, Verification};
use crate::archive::PublicKey;
use crate::diag::{Diagnostic, Error, Location};
use clap::Args;
use std::path::{Path, PathBuf};

/// At most this many differing values are listed in the table (JSON lists them all).
const MAX_SHOWN_DIFFERENCES: usize = 25;

#[derive(Debug, Args)]
pub struct VerifyArgs {
    /// The report PDF.
    pub report: PathBuf,
    /// Require a valid signature by this public key (the .pub file from `annulus keygen`).
    #[arg(long, value_name = "PUB")]
    pub key: Option<PathBuf>,
    /// Output format: a table of what holds and what differs, a CSV row per part and per
    /// differing value, or the full record as JSON.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
}

/// Reads a public key file, with a located diagnostic.
pub(crate) fn read_public_key(path: &Path) -> Result<PublicKey, Error> {
    let name = path.display().to_string();
    let text = std::fs::read_to_string(path).map_err(|e| {
        Error::input(
            Diagnostic::new(format!("cannot read the public key `{name}`: {e}"))
                .at(Location::file(&name))
                .hint("pass the .pub file written by `annulus keygen NAME`"),
        )
    })?;
    PublicKey::parse(&text).map_err(|e| {
        Error::input(
            Diagnostic::new(format!("`{name}`: {e}"))
                .at(Location::file(&name))
                .hint("pass the .pub file (the public half), not the .key file"),
        )
    })
}

pub fn run(args: VerifyArgs, ctx: &Ctx) -> Result<i32, Error> {
    let key = args.key.as_deref().map(read_public_key).transpose()?;
    let name = args.report.display().to_string();
    let bytes = std::fs::read(&args.report).map_err(|e| {
        Error::input(
            Diagnostic::new(format!("cannot read `{name}`: {e}"))
                .at(Location::file(&name))
                .hint("check the path to the report PDF"),
        )
    })?;
    let v = verify(&bytes, key.as_ref()).map_err(|e| {
        Error::input(
            Diagnostic::new(format!("`{name}` is {e}"))
                .at(Location::file(&name))
                .hint("`annulus verify` checks PDFs written by `annulus report`"),
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

/// One row per part checked, then one per differing value.
fn csv(v: &Verification) -> String {
    let mut rows: Vec<Vec<String>> = Vec::new();
    let mut row = |part: &str, role: &str, holds: &str, finding: String| {
        rows.push(vec![part.into(), role.into(), holds.into(), finding]);
    };
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
    let what = match &v.recomputation {
        Recomputation::Matches { compared } => format!("{compared} values reproduced"),
        Recomputation::Differs {
            compared,
            differences,
        } => format!("{} of {compared} values differ", differences.len()),
        Recomputation::Impossible { reason } => format!("not possible: {reason}"),
    };
    row("recomputation", "", word(v.recomputation.holds()), what);
    row(
        "signature",
        "",
        word(v.signature.holds()),
        v.signature.describe(),
    );
    if let Recomputation::Differs { differences, .. } = &v.recomputation {
        for d in differences {
            row("difference", "", "fail", d.to_string());
        }
    }
    csv_text(&["part", "role", "result", "finding"], &rows)
}

fn table(name: &str, v: &Verification, ctx: &Ctx) -> String {
    let mut out = format!(
        "{name}: report {}\n",
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
    let mut t = Table::new(&["result", "part", "finding"]);
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
    let recompute = match &v.recomputation {
        Recomputation::Matches { compared } => format!(
            "all {compared} values of results.json reproduced from the embedded survey and readings"
        ),
        Recomputation::Differs {
            compared,
            differences,
        } => format!(
            "{} of {compared} values of results.json not reproduced from the embedded survey and readings (listed below)",
            differences.len()
        ),
        Recomputation::Impossible { reason } => format!("not possible: {reason}"),
    };
    t.row(vec![
        status(word(v.recomputation.holds()), ctx.color),
        "recomputation".into(),
        recompute,
    ]);
    let sig_word = match v.signature {
        crate::archive::verify::SignatureState::Unsigned => "note",
        ref s => word(s.holds()),
    };
    t.row(vec![
        status(sig_word, ctx.color),
        "signature".into(),
        v.signature.describe(),
    ]);
    out.push('\n');
    out += &t.render();
    if let Recomputation::Differs { differences, .. } = &v.recomputation {
        out += "\ndifferences (embedded results.json vs recomputed; headline values first)\n";
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
        "\n{}\n",
        if v.verified {
            format!("verdict: {}", status("pass", ctx.color))
        } else {
            format!(
                "verdict: {} ({problems} problem{} found)",
                status("fail", ctx.color),
                if problems == 1 { "" } else { "s" }
            )
        }
    );
    out
}
