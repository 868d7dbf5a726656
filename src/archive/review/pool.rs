//! Reviewing many files in parallel under a per-file budget, each record handed out as soon as it
//! is done.
//!
//! Owns [`review_stream`]: worker threads take files in turn; a supervisor (the caller's thread)
//! collects the finished records every few milliseconds and passes them to the caller's sink, so
//! an interrupted review keeps everything already printed and nothing accumulates. A file that
//! takes longer than the time budget becomes an `error` row ("over the review's time budget") and
//! its worker is abandoned (its late result is dropped) and replaced, so one hostile file cannot
//! stall the review. The size budget is the source's to enforce (it reports `FileTooLarge`).
//!
//! Reports are reviewed first, then surveys: each survey is matched against the reports found
//! ([`super::matching`]), which costs a lookup only when the review holds reports.

use super::matching::ReportIndex;
use super::{
    extension, review_path, review_report, FileContext, Kind, Note, Outcome, Review, Reviewed,
};
use crate::archive::trust::TrustList;
use crate::archive::verify::{RerenderPolicy, TrustPolicy, VerifyOptions};
use crate::pdf::Limits;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, AtomicUsize, Ordering};
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

/// A file source the worker threads share (the disk in the CLI, memory in tests).
pub type SharedSource = Arc<dyn Fn(&Path) -> std::io::Result<Vec<u8>> + Send + Sync>;

/// Default per-file time budget: a report is verified in well under a second and re-rendered in
/// a few; a survey takes a fraction of a millisecond.
pub const DEFAULT_TIME_BUDGET: Duration = Duration::from_secs(60);

/// Default per-file size budget (surveys and readings are kilobytes, reports megabytes).
pub const DEFAULT_SIZE_BUDGET: u64 = 256 << 20;

/// How a review runs.
#[derive(Debug, Clone)]
pub struct ReviewSettings {
    pub trust: Arc<TrustList>,
    /// A trust list is in force: only its keys' signatures count.
    pub trust_required: bool,
    pub rerender: RerenderPolicy,
    pub limits: Limits,
    /// Longest one file may take before it is reported as an error and left behind.
    pub time_budget: Duration,
    /// Worker threads (at least one).
    pub threads: usize,
}

impl Default for ReviewSettings {
    fn default() -> Self {
        ReviewSettings {
            trust: Arc::new(TrustList::new()),
            trust_required: false,
            rerender: RerenderPolicy::Auto,
            limits: Limits::default(),
            time_budget: DEFAULT_TIME_BUDGET,
            threads: std::thread::available_parallelism()
                .map(|n| n.get())
                .unwrap_or(1),
        }
    }
}

impl ReviewSettings {
    fn verify_options(&self) -> VerifyOptions<'_> {
        VerifyOptions {
            trust: TrustPolicy {
                list: &self.trust,
                required: self.trust_required,
            },
            rerender: self.rerender,
            limits: self.limits,
        }
    }
}

/// A worker's current file: its index (or [`IDLE`] / [`ABANDONED`]) and when it began; and the
/// records it has finished that the supervisor has not collected yet.
struct Slot {
    current: AtomicUsize,
    started_ms: AtomicU64,
    finished: Mutex<Vec<Done>>,
}

/// How often the supervisor collects finished records and looks for files over the budget.
/// Workers never wake it: a hand-over per file (a channel) cost a futex wake-up per survey, about
/// a tenth of a review of small surveys; collecting every 2 ms keeps the output streaming.
const POLL: Duration = Duration::from_millis(2);

const IDLE: usize = usize::MAX;
const ABANDONED: usize = usize::MAX - 1;

/// A report's verification, kept for matching surveys against it.
type Kept = Option<(String, Box<crate::archive::verify::Verification>)>;

/// What a worker hands back: the file's outcome and, for a report, what matching needs.
type Done = (Outcome, Kept);

/// The row for a file the review gave up on, or whose review failed inside.
fn error_row(path: &Path, message: String) -> Outcome {
    Outcome::Reviewed(Reviewed::bare(
        path,
        extension(path).unwrap_or(Kind::File),
        vec![Note::OverBudget { message }],
    ))
}

/// Runs `work` over `paths` on `threads` worker threads, passing each result to `sink` as it
/// arrives; a file still running after `budget` becomes an error row and its worker is replaced.
fn run_pool<W>(
    paths: Arc<Vec<PathBuf>>,
    threads: usize,
    budget: Duration,
    work: Arc<W>,
    sink: &mut dyn FnMut(Done),
) where
    W: Fn(&Path) -> Done + Send + Sync + 'static,
{
    if paths.is_empty() {
        return;
    }
    let next = Arc::new(AtomicUsize::new(0));
    let t0 = Instant::now();
    let spawn = || -> Arc<Slot> {
        let slot = Arc::new(Slot {
            current: AtomicUsize::new(IDLE),
            started_ms: AtomicU64::new(0),
            finished: Mutex::new(Vec::new()),
        });
        let (s, paths, next, work) = (slot.clone(), paths.clone(), next.clone(), work.clone());
        std::thread::spawn(move || loop {
            let i = next.fetch_add(1, Ordering::SeqCst);
            if i >= paths.len() {
                return;
            }
            s.started_ms
                .store(t0.elapsed().as_millis() as u64, Ordering::SeqCst);
            s.current.store(i, Ordering::SeqCst);
            let path = &paths[i];
            let done = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| work(path)))
                .unwrap_or_else(|_| {
                    (
                        error_row(
                            path,
                            "not reviewed: an internal error stopped the review of this file (please report it)".into(),
                        ),
                        None,
                    )
                });
            // the supervisor may have given up on this file: then the result is dropped and this
            // worker ends (a replacement has taken its place)
            if s.current
                .compare_exchange(i, IDLE, Ordering::SeqCst, Ordering::SeqCst)
                .is_err()
            {
                return;
            }
            match s.finished.lock() {
                Ok(mut f) => f.push(done),
                Err(_) => return,
            }
        });
        slot
    };
    let mut slots: Vec<Arc<Slot>> = (0..threads.clamp(1, paths.len()))
        .map(|_| spawn())
        .collect();
    // slots whose worker was given up on: what they finished before is still collected
    let mut retired: Vec<Arc<Slot>> = Vec::new();
    let tick = budget
        .min(Duration::from_millis(100))
        .max(Duration::from_millis(1));
    let budget_ms = u64::try_from(budget.as_millis()).unwrap_or(u64::MAX);
    let mut done = 0usize;
    let mut last_check = Instant::now();
    let mut batch = Vec::new();
    while done < paths.len() {
        std::thread::sleep(POLL.min(tick));
        for slot in slots.iter().chain(&retired) {
            if let Ok(mut f) = slot.finished.lock() {
                std::mem::swap(&mut *f, &mut batch);
            }
            done += batch.len();
            batch.drain(..).for_each(&mut *sink);
        }
        if last_check.elapsed() < tick {
            continue;
        }
        last_check = Instant::now();
        let now_ms = t0.elapsed().as_millis() as u64;
        for slot in slots.iter_mut() {
            let s = slot.clone();
            let i = s.current.load(Ordering::SeqCst);
            if i >= ABANDONED
                || now_ms.saturating_sub(s.started_ms.load(Ordering::SeqCst)) <= budget_ms
            {
                continue;
            }
            if s.current
                .compare_exchange(i, ABANDONED, Ordering::SeqCst, Ordering::SeqCst)
                .is_ok()
            {
                done += 1;
                sink((
                    error_row(
                        &paths[i],
                        format!(
                            "not reviewed: still running after the per-file time budget of {} s (--file-time-limit); the file may be built to be slow",
                            budget.as_secs_f64()
                        ),
                    ),
                    None,
                ));
                retired.push(std::mem::replace(slot, spawn()));
            }
        }
    }
}

/// Reviews `paths` (reports first, then surveys, each matched against the reports), calling
/// `sink` with every outcome as soon as it is known. Order is completion order.
pub fn review_stream(
    paths: Vec<PathBuf>,
    source: SharedSource,
    settings: Arc<ReviewSettings>,
    sink: &mut dyn FnMut(Outcome),
) {
    let (pdfs, rest): (Vec<PathBuf>, Vec<PathBuf>) = paths
        .into_iter()
        .partition(|p| extension(p).is_some_and(|k| k != Kind::Survey));
    let mut index = ReportIndex::new();
    {
        let (threads, budget) = (settings.threads, settings.time_budget);
        let (source, settings) = (source.clone(), settings.clone());
        let work = Arc::new(move |p: &Path| {
            let bytes = match source(p) {
                Ok(b) => b,
                Err(e) => {
                    let note = if e.kind() == std::io::ErrorKind::FileTooLarge {
                        Note::OverBudget {
                            message: e.to_string(),
                        }
                    } else {
                        Note::Unreadable {
                            message: format!("cannot read: {e}"),
                        }
                    };
                    return (
                        Outcome::Reviewed(Reviewed::bare(p, Kind::Report, vec![note])),
                        None,
                    );
                }
            };
            let (r, v) = review_report(p, &bytes, &settings.verify_options());
            let keep = v
                .filter(|v| v.kind == Some(crate::archive::manifest::DocKind::Report))
                .map(|v| (r.file.clone(), Box::new(v)));
            (Outcome::Reviewed(r), keep)
        });
        run_pool(Arc::new(pdfs), threads, budget, work, &mut |(
            outcome,
            extra,
        )| {
            if let Some((file, v)) = extra {
                index.add(&file, &v);
            }
            sink(outcome);
        });
    }
    let index = Arc::new(index);
    let threads = settings.threads;
    let budget = settings.time_budget;
    let work = Arc::new(move |p: &Path| {
        let cx = FileContext {
            verify: settings.verify_options(),
            reports: (!index.is_empty()).then_some(index.as_ref()),
        };
        let src = |q: &Path| source(q);
        (review_path(p, &src, &cx), None)
    });
    run_pool(Arc::new(rest), threads, budget, work, &mut |(
        outcome,
        _,
    )| {
        sink(outcome)
    });
}

/// [`review_stream`] collected and sorted by path (for tables, CSV, JSON and benchmarks).
pub fn review_all(
    paths: Vec<PathBuf>,
    source: SharedSource,
    settings: Arc<ReviewSettings>,
) -> Review {
    let mut out = Vec::new();
    review_stream(paths, source, settings, &mut |o| out.push(o));
    Review::collect(out)
}
