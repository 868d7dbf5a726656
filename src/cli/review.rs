//! `annulus review DIR`: walks a folder tree, then verifies every report (and calibration
//! certificate, and RATA summary) and recomputes and checks every survey in parallel, matching
//! each survey with the reports made from it (the per-file work is `archive::review`). Prints a
//! summary table, CSV or JSON at the end, or streams one JSON object per file as each is done
//! (`--format ndjson`); a progress bar goes to stderr on long runs when stderr is a terminal.
//!
//! Exit codes: 0 no file has a status named by `--fail-on` (default `fail,error`); 3 some file
//! has; 1 the folder, a key or the trust list cannot be read at all.

use super::output::{csv_text, json_text, status, Ctx, Table};
use super::verify::{trust_from, RerenderArg};
use crate::archive::review::{
    is_candidate, review_stream, Kind, Outcome, Review, ReviewSettings, ReviewStatus, Reviewed,
    SharedSource, Skipped,
};
use crate::diag::{Diagnostic, Error, Location};
use clap::{Args, ValueEnum};
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};
use std::sync::Arc;
use std::time::Duration;

/// Below this many files a progress bar would only flicker.
const PROGRESS_MIN_FILES: usize = 50;

/// How the review is printed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ReviewFormat {
    /// A summary table, then details of every file that is suspect, fails or could not be reviewed.
    Table,
    /// One object: the summary, every file, every skipped file.
    Json,
    /// One row per file with the identity columns.
    Csv,
    /// One JSON object per line, per file, written as soon as the file is reviewed.
    Ndjson,
}

/// A review status, as `--fail-on` takes it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum StatusArg {
    Pass,
    Warn,
    Suspect,
    Fail,
    Error,
}

impl StatusArg {
    fn status(self) -> ReviewStatus {
        match self {
            StatusArg::Pass => ReviewStatus::Pass,
            StatusArg::Warn => ReviewStatus::Warn,
            StatusArg::Suspect => ReviewStatus::Suspect,
            StatusArg::Fail => ReviewStatus::Fail,
            StatusArg::Error => ReviewStatus::Error,
        }
    }
}

#[derive(Debug, Args)]
pub struct ReviewArgs {
    /// The folder to review (searched recursively for *.toml surveys and *.pdf reports; folders
    /// whose names start with `.` are skipped). A single file is reviewed on its own.
    pub dir: PathBuf,
    /// Trust signatures by this public key (a .pub file); may repeat. Any --key or --trust
    /// replaces the configuration's trust list; with a trust list, other signers fail.
    #[arg(long, value_name = "PUB")]
    pub key: Vec<PathBuf>,
    /// Trust the keys of this folder of .pub files or trust list file; may repeat.
    #[arg(long, value_name = "PATH")]
    pub trust: Vec<PathBuf>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = ReviewFormat::Table)]
    pub format: ReviewFormat,
    /// Which statuses make the exit code 3, comma-separated.
    #[arg(
        long,
        value_enum,
        value_delimiter = ',',
        value_name = "STATUS,…",
        default_value = "fail,error"
    )]
    pub fail_on: Vec<StatusArg>,
    /// When to re-render reports from their embedded inputs (see `annulus verify --help`).
    #[arg(long, value_enum, default_value_t = RerenderArg::Auto)]
    pub rerender: RerenderArg,
    /// Per-file time budget in seconds: a file still under review after it is an error row.
    #[arg(long, value_name = "SECONDS", default_value_t = 60.0)]
    pub file_time_limit: f64,
    /// Per-file size budget in MiB: a larger file (survey, readings or PDF) is an error row.
    #[arg(long, value_name = "MiB", default_value_t = 256)]
    pub file_size_limit: u64,
    /// Also read files a survey names outside the reviewed folder (absolute paths, or `../` that
    /// climbs out of it). Without it such a survey is an error row and the file is not opened.
    #[arg(long)]
    pub allow_outside: bool,
}

/// Reads a regular file of at most `cap` bytes; larger files give `FileTooLarge`, anything that
/// is not a regular file (a FIFO, a device, a folder) an error, never a wait.
fn read_capped(path: &Path, cap: u64) -> std::io::Result<Vec<u8>> {
    // the input rules (regular files only, opened so a FIFO cannot block), with review's budget
    capped(crate::input::fs::read_limited(path, cap), cap)
}

/// A read's `FileTooLarge` worded as review's size budget.
fn capped(read: std::io::Result<Vec<u8>>, cap: u64) -> std::io::Result<Vec<u8>> {
    read.map_err(|e| {
        if e.kind() == std::io::ErrorKind::FileTooLarge {
            std::io::Error::new(
                std::io::ErrorKind::FileTooLarge,
                format!(
                    "not reviewed: larger than the per-file size budget of {} (--file-size-limit)",
                    crate::pdf::bytes_text(cap as usize)
                ),
            )
        } else {
            e
        }
    })
}

/// `p` made absolute against the working folder `cwd`, with `.` and `..` resolved by name.
fn absolute(cwd: &Path, p: &Path) -> PathBuf {
    use std::path::Component;
    let joined = if p.is_absolute() {
        p.to_path_buf()
    } else {
        cwd.join(p)
    };
    let mut out = PathBuf::new();
    for c in joined.components() {
        match c {
            Component::CurDir => {}
            Component::ParentDir => {
                out.pop();
            }
            other => out.push(other.as_os_str()),
        }
    }
    out
}

/// The reviewed folder: as the user named it, and made absolute.
struct Bounds {
    given: PathBuf,
    root: PathBuf,
}

/// Whether `p` is the folder `given` followed by plain names only (no `..`, no root): then it
/// lies inside that folder by its name whatever the working folder is, and `p` need not be made
/// absolute to tell (review asks this for every file it reads). `false` says nothing.
fn below(given: &Path, p: &Path) -> bool {
    use std::path::Component;
    p.strip_prefix(given).is_ok_and(|rest| {
        rest.components()
            .all(|c| matches!(c, Component::Normal(_) | Component::CurDir))
    })
}

/// Reads a file a survey names if it lies inside the reviewed folder (`bounds`): by name,
/// and, when the file itself is a symbolic link, by where the link leads. A plain file is opened
/// without following a link ([`crate::input::fs::read_unless_link`]); a link, or a path that
/// does not open, is looked at with `lstat` first. `shown` is the folder as the user named it,
/// for the message.
fn read_inside(
    bounds: &Bounds,
    shown: &str,
    cwd: &Path,
    p: &Path,
    cap: u64,
) -> std::io::Result<Vec<u8>> {
    let outside = || -> std::io::Result<Vec<u8>> {
        Err(std::io::Error::new(
            std::io::ErrorKind::PermissionDenied,
            format!(
                "not read: it is outside the reviewed folder `{shown}` (review --allow-outside reads it)"
            ),
        ))
    };
    let below = below(&bounds.given, p);
    let abs = || absolute(cwd, p);
    if !below && !abs().starts_with(&bounds.root) {
        return outside();
    }
    // the common case, a plain file: one lookup (a link, or any problem, is looked at below)
    #[cfg(unix)]
    if let Some(read) = crate::input::fs::read_unless_link(p, cap) {
        return capped(read, cap);
    }
    let (abs, root) = (abs(), &bounds.root);
    match std::fs::symlink_metadata(&abs) {
        Ok(m) if m.file_type().is_symlink() => {
            let target = match std::fs::canonicalize(&abs) {
                Ok(t) => t,
                // a link to nothing is no file outside the folder: it is missing (nothing read)
                Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
                    return Err(std::io::Error::new(
                        std::io::ErrorKind::NotFound,
                        "it is a symbolic link whose target does not exist",
                    ))
                }
                Err(_) => return outside(),
            };
            let inside = std::fs::canonicalize(root).is_ok_and(|r| target.starts_with(r));
            if inside {
                read_capped(p, cap)
            } else {
                outside()
            }
        }
        Ok(m) => capped(crate::input::fs::read_limited_after(p, &m, cap), cap),
        // not there (or not to be looked at): the read reports why
        Err(_) => read_capped(p, cap),
    }
}

/// Every candidate file under `dir` (sorted), and the folders that could not be listed (as
/// findings). Folders are listed by a few threads at once: listing is mostly waiting on the
/// file system (a 10,000-survey archive took 0.12–0.25 s to list on one thread).
fn walk(dir: &Path) -> (Vec<PathBuf>, Vec<Reviewed>) {
    use std::sync::{Condvar, Mutex};
    /// Folders waiting to be listed, how many are being listed, how many listers wait.
    struct Queue {
        folders: Vec<PathBuf>,
        busy: usize,
        waiting: usize,
    }
    let queue = Mutex::new(Queue {
        folders: vec![dir.to_path_buf()],
        busy: 0,
        waiting: 0,
    });
    let ready = Condvar::new();
    let threads = std::thread::available_parallelism()
        .map(|n| n.get())
        .unwrap_or(1)
        .clamp(1, 4);
    let lists: Vec<(Vec<PathBuf>, Vec<Reviewed>)> = std::thread::scope(|scope| {
        let workers: Vec<_> = (0..threads)
            .map(|_| {
                scope.spawn(|| {
                    let mut mine = (Vec::new(), Vec::new());
                    loop {
                        let d = {
                            let Ok(mut q) = queue.lock() else { break };
                            loop {
                                if let Some(d) = q.folders.pop() {
                                    q.busy += 1;
                                    break Some(d);
                                }
                                if q.busy == 0 {
                                    break None;
                                }
                                q.waiting += 1;
                                q = match ready.wait(q) {
                                    Ok(q) => q,
                                    Err(_) => return mine,
                                };
                                q.waiting -= 1;
                            }
                        };
                        let Some(d) = d else {
                            ready.notify_all();
                            break;
                        };
                        let sub = list_folder(&d, &mut mine.0, &mut mine.1);
                        // a lister that waits is woken only when there is something for it:
                        // new folders, or the end (waking on every folder was a system call
                        // per folder)
                        let wake = match queue.lock() {
                            Ok(mut q) => {
                                let found = !sub.is_empty();
                                q.folders.extend(sub);
                                q.busy -= 1;
                                q.waiting > 0 && (found || q.busy == 0)
                            }
                            Err(_) => true,
                        };
                        if wake {
                            ready.notify_all();
                        }
                    }
                    mine
                })
            })
            .collect();
        workers.into_iter().filter_map(|w| w.join().ok()).collect()
    });
    let (mut files, mut bad) = (Vec::new(), Vec::new());
    for (f, b) in lists {
        files.extend(f);
        bad.extend(b);
    }
    files.sort();
    bad.sort_by(|a, b| a.file.cmp(&b.file));
    (files, bad)
}

/// Lists one folder: candidate files into `files`, a folder that cannot be listed into `bad`;
/// returns its sub-folders (hidden ones and links to folders are not followed: no cycles).
fn list_folder(d: &Path, files: &mut Vec<PathBuf>, bad: &mut Vec<Reviewed>) -> Vec<PathBuf> {
    let mut sub = Vec::new();
    let entries = match std::fs::read_dir(d) {
        Ok(e) => e,
        Err(e) => {
            bad.push(Reviewed::unreadable(
                d,
                Kind::File,
                format!("cannot list the folder: {e}"),
            ));
            return sub;
        }
    };
    for entry in entries {
        let entry = match entry {
            Ok(e) => e,
            Err(e) => {
                bad.push(Reviewed::unreadable(
                    d,
                    Kind::File,
                    format!("cannot list the folder: {e}"),
                ));
                continue;
            }
        };
        // symbolic links to folders are not followed (no cycles); linked files are read
        let Ok(kind) = entry.file_type() else {
            continue;
        };
        let path = entry.path();
        if kind.is_dir() {
            let hidden = path
                .file_name()
                .is_some_and(|n| n.as_encoded_bytes().starts_with(b"."));
            if !hidden {
                sub.push(path);
            }
        } else if is_candidate(&path) && (kind.is_file() || (kind.is_symlink() && path.is_file())) {
            files.push(path);
        }
    }
    sub
}

pub fn run(args: ReviewArgs, ctx: &Ctx) -> Result<i32, Error> {
    let (list, required) = trust_from(&args.key, &args.trust)?;
    let name = args.dir.display().to_string();
    let meta = std::fs::metadata(&args.dir).map_err(|e| {
        Error::input(
            Diagnostic::new(format!("cannot read `{name}`: {e}"))
                .at(Location::file(&name))
                .hint("give the folder that holds the surveys and reports"),
        )
    })?;
    if !(args.file_time_limit > 0.0 && args.file_time_limit.is_finite()) {
        return Err(Error::input(
            Diagnostic::new(format!(
                "--file-time-limit must be a positive number of seconds, found {}",
                args.file_time_limit
            ))
            .hint("the default is 60"),
        ));
    }
    if args.file_size_limit == 0 || args.file_size_limit > 1 << 20 {
        return Err(Error::input(
            Diagnostic::new(format!(
                "--file-size-limit must be from 1 to 1048576 MiB, found {}",
                args.file_size_limit
            ))
            .hint("the default is 256"),
        ));
    }
    let (paths, bad) = if meta.is_dir() {
        walk(&args.dir)
    } else {
        (vec![args.dir.clone()], Vec::new())
    };
    let settings = ReviewSettings {
        trust: Arc::new(list),
        trust_required: required,
        rerender: args.rerender.policy(),
        time_budget: Duration::from_secs_f64(args.file_time_limit),
        ..ReviewSettings::default()
    };
    let cap = args.file_size_limit << 20;
    // a single file is reviewed with its own folder as the boundary
    let boundary = if meta.is_dir() {
        args.dir.clone()
    } else {
        args.dir.parent().map(Path::to_path_buf).unwrap_or_default()
    };
    // the working folder is read once, not once per file
    let cwd = std::env::current_dir().unwrap_or_default();
    let shown = boundary.display().to_string();
    let bounds = (!args.allow_outside).then(|| Bounds {
        root: absolute(&cwd, &boundary),
        given: boundary,
    });
    let source: SharedSource = Arc::new(move |p: &Path| match &bounds {
        Some(bounds) => read_inside(bounds, &shown, &cwd, p, cap),
        None => read_capped(p, cap),
    });
    let fail_on: Vec<ReviewStatus> = args.fail_on.iter().map(|s| s.status()).collect();
    let failing = |r: &Reviewed| fail_on.contains(&r.status);

    if args.format == ReviewFormat::Ndjson {
        let mut counts = Counts::default();
        let mut out = std::io::stdout().lock();
        let mut failed = false;
        let mut write_err = None;
        let mut emit = |line: String| {
            if write_err.is_none() {
                if let Err(e) = writeln!(out, "{line}").and_then(|_| out.flush()) {
                    write_err = Some(e);
                }
            }
        };
        for r in bad {
            failed |= failing(&r);
            counts.add(&Outcome::Reviewed(r.clone()));
            emit(serde_json::to_string(&r).unwrap_or_default());
        }
        review_stream(paths, source, Arc::new(settings), &mut |o| {
            counts.add(&o);
            let line = match &o {
                Outcome::Reviewed(r) => {
                    failed |= failing(r);
                    serde_json::to_string(r)
                }
                Outcome::Skipped(s) => serde_json::to_string(&SkippedLine::of(s)),
            };
            emit(line.unwrap_or_default());
        });
        match write_err {
            Some(e) if e.kind() != std::io::ErrorKind::BrokenPipe => {
                return Err(Error::Environment(format!(
                    "cannot write to standard output: {e}"
                )))
            }
            _ => {}
        }
        if !ctx.quiet {
            eprintln!("{}", counts.line());
        }
        return Ok(if failed { 3 } else { 0 });
    }

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
    if args.format == ReviewFormat::Json {
        // each file's entry is written as it arrives, while the rest are being reviewed
        let mut json = JsonEntries::default();
        bad.into_iter().for_each(|r| json.add(Outcome::Reviewed(r)));
        review_stream(paths, source, Arc::new(settings), &mut |o| {
            if let Some(b) = &bar {
                b.inc(1);
            }
            json.add(o);
        });
        if let Some(b) = &bar {
            b.finish_and_clear();
        }
        let failed = json.entries.iter().any(|e| fail_on.contains(&e.status));
        super::emit(&json.text())?;
        return Ok(if failed { 3 } else { 0 });
    }
    let mut outcomes: Vec<Outcome> = bad.into_iter().map(Outcome::Reviewed).collect();
    review_stream(paths, source, Arc::new(settings), &mut |o| {
        if let Some(b) = &bar {
            b.inc(1);
        }
        outcomes.push(o);
    });
    if let Some(b) = &bar {
        b.finish_and_clear();
    }
    let review = Review::collect(outcomes);
    let text = match args.format {
        ReviewFormat::Json => json_text(&JsonReview::new(&review)),
        ReviewFormat::Csv => csv(&review),
        _ => table(&name, &review, ctx),
    };
    super::emit(&text)?;
    Ok(if review.files.iter().any(failing) {
        3
    } else {
        0
    })
}

/// A skipped file as an NDJSON line.
#[derive(serde::Serialize)]
struct SkippedLine<'a> {
    file: &'a str,
    skipped: &'a str,
}

impl<'a> SkippedLine<'a> {
    fn of(s: &'a Skipped) -> Self {
        SkippedLine {
            file: &s.file,
            skipped: &s.reason,
        }
    }
}

/// Files per status, for the closing line of a streamed review.
#[derive(Default)]
struct Counts {
    by_status: [usize; 5],
    skipped: usize,
}

impl Counts {
    fn add(&mut self, o: &Outcome) {
        match o {
            Outcome::Reviewed(r) => self.by_status[r.status as usize] += 1,
            Outcome::Skipped(_) => self.skipped += 1,
        }
    }

    fn line(&self) -> String {
        let files: usize = self.by_status.iter().sum();
        format!(
            "{files} file{} reviewed: {} pass, {} warn, {} suspect, {} fail, {} could not be reviewed; {} skipped",
            if files == 1 { "" } else { "s" },
            self.by_status[0],
            self.by_status[1],
            self.by_status[2],
            self.by_status[3],
            self.by_status[4],
            self.skipped
        )
    }
}

#[derive(serde::Serialize)]
struct Summary {
    files: usize,
    pass: usize,
    warn: usize,
    suspect: usize,
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

/// A JSON review built as the files arrive: each reviewed file's entry is serialised when it
/// comes in (the workers are still reviewing others), so what is left at the end is sorting and
/// joining. Writes the same text as [`json_text`] of [`JsonReview`] (a test compares them).
#[derive(Default)]
struct JsonEntries {
    entries: Vec<JsonEntry>,
    skipped: Vec<Skipped>,
}

/// One reviewed file's entry, already written at its depth in the review.
struct JsonEntry {
    file: String,
    status: ReviewStatus,
    text: String,
}

impl JsonEntries {
    fn add(&mut self, o: Outcome) {
        match o {
            Outcome::Reviewed(r) => self.entries.push(JsonEntry {
                text: pretty_at(&r, 2),
                file: r.file,
                status: r.status,
            }),
            Outcome::Skipped(s) => self.skipped.push(s),
        }
    }

    /// The whole review, sorted by path as [`Review::collect`] sorts it.
    fn text(mut self) -> String {
        self.entries.sort_by(|a, b| a.file.cmp(&b.file));
        self.skipped.sort_by(|a, b| a.file.cmp(&b.file));
        let summary = Summary::of(self.entries.iter().map(|e| e.status), self.skipped.len());
        let size: usize = self.entries.iter().map(|e| e.text.len() + 6).sum();
        let mut out = String::with_capacity(size + 1024);
        out.push_str("{\n  \"summary\": ");
        out.push_str(&pretty_at(&summary, 1));
        out.push_str(",\n  \"files\": ");
        if self.entries.is_empty() {
            out.push_str("[]");
        } else {
            out.push_str("[\n");
            for (i, e) in self.entries.iter().enumerate() {
                if i > 0 {
                    out.push_str(",\n");
                }
                out.push_str("    ");
                out.push_str(&e.text);
            }
            out.push_str("\n  ]");
        }
        out.push_str(",\n  \"skipped\": ");
        out.push_str(&pretty_at(&self.skipped, 1));
        out.push_str("\n}\n");
        out
    }
}

/// `value` as pretty JSON nested `depth` levels deep (two spaces a level), as serde_json's
/// pretty printer writes it inside a larger value: every line after the first indented.
fn pretty_at<T: serde::Serialize>(value: &T, depth: usize) -> String {
    let mut out = Vec::with_capacity(1024);
    let mut ser = serde_json::Serializer::with_formatter(&mut out, Nested::at(depth));
    match value.serialize(&mut ser) {
        // serde_json writes valid UTF-8
        Ok(()) => String::from_utf8(out).unwrap_or_default(),
        Err(e) => format!("\"{e}\""),
    }
}

/// A pretty-printing JSON formatter that starts `depth` levels in: each value of an array or
/// object on a line of its own, indented two spaces a level, and an empty one written `[]`/`{}`.
/// Writing at the entry's depth directly spares re-indenting the text afterwards (a copy and a
/// scan of every entry of a review).
struct Nested {
    depth: usize,
    /// Whether the array or object being closed held anything.
    filled: bool,
}

impl Nested {
    fn at(depth: usize) -> Self {
        Nested {
            depth,
            filled: false,
        }
    }

    fn line<W: ?Sized + std::io::Write>(&self, w: &mut W) -> std::io::Result<()> {
        w.write_all(b"\n")?;
        for _ in 0..self.depth {
            w.write_all(b"  ")?;
        }
        Ok(())
    }

    fn open<W: ?Sized + std::io::Write>(
        &mut self,
        w: &mut W,
        bracket: &[u8],
    ) -> std::io::Result<()> {
        self.depth += 1;
        self.filled = false;
        w.write_all(bracket)
    }

    fn close<W: ?Sized + std::io::Write>(
        &mut self,
        w: &mut W,
        bracket: &[u8],
    ) -> std::io::Result<()> {
        self.depth -= 1;
        if self.filled {
            self.line(w)?;
        }
        w.write_all(bracket)
    }

    fn item<W: ?Sized + std::io::Write>(&mut self, w: &mut W, first: bool) -> std::io::Result<()> {
        if !first {
            w.write_all(b",")?;
        }
        self.line(w)
    }
}

impl serde_json::ser::Formatter for Nested {
    fn begin_array<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.open(w, b"[")
    }

    fn end_array<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.close(w, b"]")
    }

    fn begin_array_value<W: ?Sized + std::io::Write>(
        &mut self,
        w: &mut W,
        first: bool,
    ) -> std::io::Result<()> {
        self.item(w, first)
    }

    fn end_array_value<W: ?Sized + std::io::Write>(&mut self, _w: &mut W) -> std::io::Result<()> {
        self.filled = true;
        Ok(())
    }

    fn begin_object<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.open(w, b"{")
    }

    fn end_object<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        self.close(w, b"}")
    }

    fn begin_object_key<W: ?Sized + std::io::Write>(
        &mut self,
        w: &mut W,
        first: bool,
    ) -> std::io::Result<()> {
        self.item(w, first)
    }

    fn begin_object_value<W: ?Sized + std::io::Write>(&mut self, w: &mut W) -> std::io::Result<()> {
        w.write_all(b": ")
    }

    fn end_object_value<W: ?Sized + std::io::Write>(&mut self, _w: &mut W) -> std::io::Result<()> {
        self.filled = true;
        Ok(())
    }
}

fn summary(r: &Review) -> Summary {
    Summary::of(r.files.iter().map(|f| f.status), r.skipped.len())
}

impl Summary {
    /// Files per status, from each reviewed file's status.
    fn of(statuses: impl Iterator<Item = ReviewStatus>, skipped: usize) -> Summary {
        let mut s = Summary {
            files: 0,
            pass: 0,
            warn: 0,
            suspect: 0,
            fail: 0,
            error: 0,
            skipped,
        };
        for status in statuses {
            s.files += 1;
            *match status {
                ReviewStatus::Pass => &mut s.pass,
                ReviewStatus::Warn => &mut s.warn,
                ReviewStatus::Suspect => &mut s.suspect,
                ReviewStatus::Fail => &mut s.fail,
                ReviewStatus::Error => &mut s.error,
            } += 1;
        }
        s
    }
}

fn findings_short(f: &Reviewed) -> String {
    let shown: Vec<String> = f
        .findings
        .iter()
        .filter(|n| {
            !matches!(
                n,
                crate::archive::review::Note::Signature { counts: true, .. }
            )
        })
        .map(|n| n.short())
        .collect();
    if shown.is_empty() {
        "-".to_string()
    } else {
        shown.join("; ")
    }
}

fn opt(v: &Option<String>) -> String {
    v.clone().unwrap_or_default()
}

fn figure(f: &Reviewed) -> String {
    f.key_figure_detail
        .as_ref()
        .map(|k| k.shown.clone())
        .unwrap_or_default()
}

fn csv(r: &Review) -> String {
    let rows: Vec<Vec<String>> = r
        .files
        .iter()
        .map(|f| {
            vec![
                f.file.clone(),
                f.kind.name().to_string(),
                f.status.name().to_string(),
                opt(&f.report_id),
                opt(&f.title),
                opt(&f.site),
                opt(&f.date),
                opt(&f.tested_by),
                opt(&f.signer),
                opt(&f.convention),
                f.key_figure.map(|v| v.to_string()).unwrap_or_default(),
                opt(&f.key_figure_unit),
                f.findings
                    .iter()
                    .map(|n| n.long())
                    .collect::<Vec<_>>()
                    .join("; "),
                f.mistakes().join(" "),
                f.key_figure_detail
                    .as_ref()
                    .map(|k| format!("{}", k.value_si))
                    .unwrap_or_default(),
            ]
        })
        .collect();
    csv_text(
        &[
            "file",
            "kind",
            "status",
            "report_id",
            "title",
            "site",
            "date",
            "tested_by",
            "signer",
            "convention",
            "key_figure",
            "key_figure_unit",
            "findings",
            "mistakes",
            "key_figure_si",
        ],
        &rows,
    )
}

fn table(name: &str, r: &Review, ctx: &Ctx) -> String {
    let mut t = Table::new(&[
        "file",
        "kind",
        "status",
        "report id",
        "date",
        "signer",
        "key figure",
        "findings",
    ])
    .right(&[6]);
    let dash = |v: &Option<String>| v.clone().unwrap_or_else(|| "-".into());
    for f in &r.files {
        t.row(vec![
            f.file.clone(),
            f.kind.name().to_string(),
            status(f.status.name(), ctx.color),
            dash(&f.report_id),
            dash(&f.date),
            dash(&f.signer),
            Some(figure(f))
                .filter(|s| !s.is_empty())
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
    let flagged: Vec<&Reviewed> = r
        .files
        .iter()
        .filter(|f| f.status >= ReviewStatus::Suspect)
        .collect();
    if !flagged.is_empty() {
        out += "\ndetails\n";
        for f in flagged {
            out += &format!("{} ({})\n", f.file, f.status.name());
            for n in f.findings.iter().filter(|n| n.fails()) {
                out += &format!("  - {}\n", n.long());
            }
        }
    }
    if !ctx.quiet && !r.skipped.is_empty() {
        out += "\nskipped\n";
        for s in &r.skipped {
            out += &format!("  {}: {}\n", s.file, s.reason);
        }
    }
    let s = summary(r);
    out += &format!(
        "\n{} file{} reviewed: {} pass, {} warn, {} suspect, {} fail, {} could not be reviewed; {} skipped\n",
        s.files,
        if s.files == 1 { "" } else { "s" },
        s.pass,
        s.warn,
        s.suspect,
        s.fail,
        s.error,
        s.skipped
    );
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::archive::review::{Kind, Note};

    fn reviewed(path: &str, notes: Vec<Note>) -> Reviewed {
        Reviewed::bare(Path::new(path), Kind::Survey, notes)
    }

    /// Writing at a depth is serde_json's pretty text with every line after the first indented
    /// (empty and nested arrays and objects, strings holding brackets and line breaks).
    #[test]
    fn json_written_at_a_depth_is_the_pretty_text_indented() {
        let values = [
            serde_json::json!({}),
            serde_json::json!([]),
            serde_json::json!(1.5),
            serde_json::json!("a [b] {c}\n\"d\""),
            serde_json::json!({"a": [], "b": {}, "c": [1, [2, []], {"d": null}], "e": {"f": {"g": [true]}}}),
            serde_json::json!([{}, [], [[]], {"x": "y"}]),
        ];
        for v in values {
            for depth in 0..3 {
                let expected = serde_json::to_string_pretty(&v)
                    .unwrap()
                    .replace('\n', &format!("\n{}", "  ".repeat(depth)));
                assert_eq!(pretty_at(&v, depth), expected, "{v} at {depth}");
            }
        }
    }

    /// The JSON written entry by entry is the text the whole review serialises to.
    #[test]
    fn entries_written_as_they_arrive_join_into_the_review_text() {
        let cases: Vec<Vec<Outcome>> = vec![
            vec![],
            vec![Outcome::Skipped(Skipped {
                file: "a/notes.toml".into(),
                reason: "not a survey".into(),
            })],
            vec![
                Outcome::Reviewed(reviewed(
                    "z/survey.toml",
                    vec![Note::Warnings {
                        ids: vec!["cyclonic-flow".into(), "line \"B\"\n".into()],
                    }],
                )),
                Outcome::Skipped(Skipped {
                    file: "b/x.toml".into(),
                    reason: "no [survey]".into(),
                }),
                Outcome::Reviewed(reviewed(
                    "a/survey.toml",
                    vec![Note::BadInput {
                        message: "cannot read `run1.csv`".into(),
                        problems: 2,
                    }],
                )),
                Outcome::Reviewed(reviewed("m/survey.toml", vec![])),
            ],
        ];
        for outcomes in cases {
            let mut entries = JsonEntries::default();
            outcomes.iter().cloned().for_each(|o| entries.add(o));
            let whole = json_text(&JsonReview::new(&Review::collect(outcomes)));
            assert_eq!(entries.text(), whole);
        }
    }
}
