//! `annulus review DIR`: walks a folder tree, then recomputes and checks every survey and verifies
//! every report in parallel (the per-file work is `archive::review`). Prints a summary table, CSV
//! or JSON; a progress bar goes to stderr on long runs when stderr is a terminal.
//!
//! Exit codes: 0 everything passes (warnings allowed); 3 anything fails (a failed check, a report
//! that does not verify, a wrong reported figure, a file that could not be reviewed); 1 the folder
//! or key cannot be read at all.

use super::output::{csv_text, json_text, status, Ctx, Format, Table};
use crate::archive::review::{is_candidate, review_all, Kind, Review, ReviewStatus, Reviewed};
use crate::diag::{Diagnostic, Error, Location};
use clap::Args;
use std::io::IsTerminal;
use std::path::{Path, PathBuf};

/// Below this many files a progress bar would only flicker.
const PROGRESS_MIN_FILES: usize = 50;

#[derive(Debug, Args)]
pub struct ReviewArgs {
    /// The folder to review (searched recursively for *.toml surveys and *.pdf reports; folders
    /// whose names start with `.` are skipped). A single file is reviewed on its own.
    pub dir: PathBuf,
    /// Require every report to carry a valid signature by this public key.
    #[arg(long, value_name = "PUB")]
    pub key: Option<PathBuf>,
    /// Output format: a summary table with details, one CSV row per file, or the full JSON.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
}

/// Every candidate file under `dir`, and the folders that could not be listed (as findings).
fn walk(dir: &Path) -> (Vec<PathBuf>, Vec<Reviewed>) {
    let mut files = Vec::new();
    let mut bad = Vec::new();
    let mut pending = vec![dir.to_path_buf()];
    while let Some(d) = pending.pop() {
        let entries = match std::fs::read_dir(&d) {
            Ok(e) => e,
            Err(e) => {
                bad.push(Reviewed::unreadable(
                    &d,
                    Kind::File,
                    format!("cannot list the folder: {e}"),
                ));
                continue;
            }
        };
        for entry in entries {
            let entry = match entry {
                Ok(e) => e,
                Err(e) => {
                    bad.push(Reviewed::unreadable(
                        &d,
                        Kind::File,
                        format!("cannot list the folder: {e}"),
                    ));
                    continue;
                }
            };
            let path = entry.path();
            // symbolic links to folders are not followed (no cycles); linked files are read
            let Ok(kind) = entry.file_type() else {
                continue;
            };
            if kind.is_dir() {
                if !entry.file_name().to_string_lossy().starts_with('.') {
                    pending.push(path);
                }
            } else if (kind.is_file() || (kind.is_symlink() && path.is_file()))
                && is_candidate(&path)
            {
                files.push(path);
            }
        }
    }
    files.sort();
    (files, bad)
}

pub fn run(args: ReviewArgs, ctx: &Ctx) -> Result<i32, Error> {
    let key = args
        .key
        .as_deref()
        .map(super::verify::read_public_key)
        .transpose()?;
    let name = args.dir.display().to_string();
    let meta = std::fs::metadata(&args.dir).map_err(|e| {
        Error::input(
            Diagnostic::new(format!("cannot read `{name}`: {e}"))
                .at(Location::file(&name))
                .hint("give the folder that holds the surveys and reports"),
        )
    })?;
    let (paths, bad) = if meta.is_dir() {
        walk(&args.dir)
    } else {
        (vec![args.dir.clone()], Vec::new())
    };
    let bar = (!ctx.quiet && paths.len() >= PROGRESS_MIN_FILES && std::io::stderr().is_terminal())
        .then(|| {
            let bar = indicatif::ProgressBar::new(paths.len() as u64);
            if let Ok(style) = indicatif::ProgressStyle::with_template(
                "reviewing {bar:30} {pos}/{len} files, {per_sec}, {eta} left",
            ) {
                bar.set_style(style);
            }
            bar
        });
    let tick = || {
        if let Some(b) = &bar {
            b.inc(1);
        }
    };
    let source = |p: &Path| std::fs::read(p);
    let mut review = review_all(&paths, &source, key.as_ref(), &tick);
    if let Some(b) = &bar {
        b.finish_and_clear();
    }
    if !bad.is_empty() {
        review.files.extend(bad);
        review.files.sort_by(|a, b| a.path.cmp(&b.path));
    }
    let text = match args.format {
        Format::Json => json_text(&JsonReview::new(&review)),
        Format::Csv => csv(&review),
        Format::Table => table(&name, &review, ctx),
    };
    super::emit(&text)?;
    Ok(if review.failed() { 3 } else { 0 })
}

#[derive(serde::Serialize)]
struct Summary {
    files: usize,
    pass: usize,
    warn: usize,
    fail: usize,
    error: usize,
    skipped: usize,
}

#[derive(serde::Serialize)]
struct JsonReview<'a> {
    summary: Summary,
    #[serde(flatten)]
    review: &'a Review,
}

impl<'a> JsonReview<'a> {
    fn new(review: &'a Review) -> Self {
        JsonReview {
            summary: summary(review),
            review,
        }
    }
}

fn summary(r: &Review) -> Summary {
    Summary {
        files: r.files.len(),
        pass: r.count(ReviewStatus::Pass),
        warn: r.count(ReviewStatus::Warn),
        fail: r.count(ReviewStatus::Fail),
        error: r.count(ReviewStatus::Error),
        skipped: r.skipped.len(),
    }
}

fn findings_short(f: &Reviewed) -> String {
    let shown: Vec<String> = f.findings.iter().map(|n| n.short()).collect();
    if shown.is_empty() {
        "-".to_string()
    } else {
        shown.join("; ")
    }
}

fn csv(r: &Review) -> String {
    let rows: Vec<Vec<String>> = r
        .files
        .iter()
        .map(|f| {
            vec![
                f.path.clone(),
                f.kind.name().to_string(),
                f.status.name().to_string(),
                f.convention.clone().unwrap_or_default(),
                f.key_figure
                    .as_ref()
                    .map(|k| k.shown.clone())
                    .unwrap_or_default(),
                f.key_figure
                    .as_ref()
                    .map(|k| format!("{}", k.value_si))
                    .unwrap_or_default(),
                f.findings
                    .iter()
                    .map(|n| n.long())
                    .collect::<Vec<_>>()
                    .join("; "),
                f.mistakes().join(" "),
            ]
        })
        .collect();
    csv_text(
        &[
            "file",
            "kind",
            "status",
            "convention",
            "key_figure",
            "key_figure_si",
            "findings",
            "mistakes",
        ],
        &rows,
    )
}

fn table(name: &str, r: &Review, ctx: &Ctx) -> String {
    let mut t = Table::new(&[
        "file",
        "kind",
        "status",
        "convention",
        "key figure",
        "findings",
    ])
    .right(&[4]);
    for f in &r.files {
        t.row(vec![
            f.path.clone(),
            f.kind.name().to_string(),
            status(f.status.name(), ctx.color),
            f.convention.clone().unwrap_or_else(|| "-".into()),
            f.key_figure
                .as_ref()
                .map(|k| k.shown.clone())
                .unwrap_or_else(|| "-".into()),
            findings_short(f),
        ]);
    }
    let mut out = format!("review of {name}\n\n");
    if r.files.is_empty() {
        out += "no surveys or reports found\n";
    } else {
        out += &t.render();
    }
    let failing: Vec<&Reviewed> = r.files.iter().filter(|f| f.status.failed()).collect();
    if !failing.is_empty() {
        out += "\ndetails\n";
        for f in failing {
            out += &format!("{}\n", f.path);
            for n in f.findings.iter().filter(|n| n.fails()) {
                out += &format!("  - {}\n", n.long());
            }
        }
    }
    if !ctx.quiet && !r.skipped.is_empty() {
        out += "\nskipped\n";
        for s in &r.skipped {
            out += &format!("  {}: {}\n", s.path, s.reason);
        }
    }
    let s = summary(r);
    out += &format!(
        "\n{} file{} reviewed: {} pass, {} warn, {} fail, {} could not be reviewed; {} skipped\n",
        s.files,
        if s.files == 1 { "" } else { "s" },
        s.pass,
        s.warn,
        s.fail,
        s.error,
        s.skipped
    );
    out
}
