//! The limits that keep annulus bounded on any input: how large a file it reads, how many runs,
//! rows and pairs it accepts, how old a temporary file of ours must be before it is cleared.
//!
//! Owns the numbers and the reason for each, in one place; [`crate::input::fs`],
//! [`crate::write`] and the constructors they bound ([`crate::geometry::Duct`]) enforce them. Every value sits far above what a real job produces (a stack test
//! has 3 runs of at most 48 points; the largest sample file is under 4 KiB), so a limit is reached
//! only by a wrong path or a hostile file, and its message names the limit. The traverse counts
//! a layout accepts (lines, points per line) are method rules, not safety limits; they live with
//! the methods in [`crate::layout`] (1 to 8 diameters and up to 100 points per diameter for a
//! round duct, 1 to 40 lines and points per line for a rectangular one).
//!
//! Must not read files or the environment except through [`size_override`].

/// One mebibyte.
const MIB: u64 = 1024 * 1024;

/// The kinds of file annulus reads, each with its own size limit.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FileKind {
    /// A survey TOML.
    Survey,
    /// A run's readings CSV.
    Readings,
    /// A pitot calibration TOML.
    Calibration,
    /// A pitot calibration's paired-readings CSV.
    CalibrationReadings,
    /// A RATA TOML.
    Rata,
    /// A system file TOML (`annulus system`).
    System,
    /// A system's terminal readings CSV.
    Terminals,
    /// A firm's Typst report template.
    Template,
    /// A signing key or a public key.
    Key,
    /// The configuration file or a trust list (named public keys).
    Settings,
    /// A PDF report, certificate or RATA summary (read by `verify` and `review`).
    Pdf,
}

impl FileKind {
    /// Every kind.
    pub const ALL: [FileKind; 11] = [
        FileKind::Survey,
        FileKind::Readings,
        FileKind::Calibration,
        FileKind::CalibrationReadings,
        FileKind::Rata,
        FileKind::System,
        FileKind::Terminals,
        FileKind::Template,
        FileKind::Key,
        FileKind::Settings,
        FileKind::Pdf,
    ];

    /// Words for messages: "a readings file".
    pub fn words(self) -> &'static str {
        match self {
            FileKind::Survey => "a survey file",
            FileKind::Readings => "a readings file",
            FileKind::Calibration => "a calibration file",
            FileKind::CalibrationReadings => "a calibration readings file",
            FileKind::Rata => "a RATA file",
            FileKind::System => "a system file",
            FileKind::Terminals => "a terminals file",
            FileKind::Template => "a report template",
            FileKind::Key => "a key file",
            FileKind::Settings => "a configuration or trust list file",
            FileKind::Pdf => "a PDF document",
        }
    }

    /// The built-in size limit in bytes, before [`size_override`].
    pub fn default_limit(self) -> u64 {
        match self {
            // A complete survey is about 3 KiB; 1 MiB leaves room for long notes and the
            // largest run count (MAX_RUNS) many times over.
            FileKind::Survey | FileKind::Calibration | FileKind::Rata => MIB,
            // A system file of a large air handler (dozens of ducts, deficiencies) is a few KiB.
            FileKind::System => MIB,
            // MAX_TERMINAL_ROWS rows of a few dozen bytes each.
            FileKind::Terminals => MIB,
            // MAX_READING_ROWS rows of up to ~400 bytes (all optional columns, a long time stamp).
            FileKind::Readings => MIB,
            // A Method 2 §10.1 calibration has 6 pairs; MAX_CALIBRATION_PAIRS pairs fit in 1 MiB.
            FileKind::CalibrationReadings => MIB,
            // Typst layout text; images cannot be loaded by a template, so text only.
            FileKind::Template => 4 * MIB,
            // A key file is about 100 bytes of text.
            FileKind::Key => 64 * 1024,
            // A few lines of settings, or a trust list of about 150 bytes per key: thousands of
            // keys (the configuration and trust-list readers apply their own, smaller limits too).
            FileKind::Settings => MIB,
            // A report is 0.1 to a few MiB; 256 MiB (review's default per-file budget) leaves room
            // for very large attachments while keeping a wrong path from being read whole.
            FileKind::Pdf => 256 * MIB,
        }
    }

    /// The size limit in bytes in force: the built-in one, raised by [`SIZE_OVERRIDE_VAR`].
    pub fn limit(self) -> u64 {
        match size_override() {
            Some(bytes) => bytes.max(self.default_limit()),
            None => self.default_limit(),
        }
    }
}

/// Environment variable that raises every input size limit to this many MiB (a whole number),
/// for the rare file that needs more (e.g. a report with very large attachments).
pub const SIZE_OVERRIDE_VAR: &str = "ANNULUS_MAX_INPUT_MB";

/// Above this, no file is read whatever [`SIZE_OVERRIDE_VAR`] says: the whole file is held in
/// memory (it is embedded byte-exact in reports), so 4 GiB keeps a mistaken override from
/// exhausting memory.
pub const HARD_SIZE_LIMIT: u64 = 4096 * MIB;

/// The size limit set by [`SIZE_OVERRIDE_VAR`], if it is set to a whole number of MiB; capped at
/// [`HARD_SIZE_LIMIT`]. A value that is not a whole number is ignored (the defaults stay).
///
/// Read from the environment once per process: every file read asks for its limit, and `review`
/// reads tens of thousands of files.
pub fn size_override() -> Option<u64> {
    static OVERRIDE: std::sync::OnceLock<Option<u64>> = std::sync::OnceLock::new();
    *OVERRIDE.get_or_init(|| {
        let v = std::env::var(SIZE_OVERRIDE_VAR).ok()?;
        let mb: u64 = v.trim().parse().ok()?;
        Some(mb.saturating_mul(MIB).min(HARD_SIZE_LIMIT))
    })
}

/// The largest limit in force among the files a survey, calibration or RATA file names: what the
/// loaders' file-system reader reads before the kind's own limit is applied (it does not know
/// which kind a path is).
pub fn largest_limit() -> u64 {
    [
        FileKind::Survey,
        FileKind::Readings,
        FileKind::Calibration,
        FileKind::CalibrationReadings,
        FileKind::Rata,
        FileKind::System,
        FileKind::Terminals,
    ]
    .iter()
    .map(|k| k.limit())
    .max()
    .unwrap_or(HARD_SIZE_LIMIT)
}

/// The largest inside dimension (diameter, width or height) of a duct, in metres. The widest
/// stack flues are about 15 m across; 100 m leaves a wide margin and keeps every count derived
/// from the area (EN 15259: 4 points per m²) and every position finite: a `1e308 in` diameter
/// made the area infinite and the point count overflow.
pub const MAX_DUCT_SIZE_M: f64 = 100.0;

/// Runs in one survey (and blank sheets `annulus init` writes). EPA Methods 2 and 4 ask for 3 runs,
/// an HVAC traverse is usually 1, and a RATA's 9 to 12 runs are each their own survey; 50 allows
/// every real job with a wide margin. The run-by-run checks compare runs pairwise, and a report
/// lays out pages per run: 3,000 runs took 45 s and 2.4 GB before this limit.
pub const MAX_RUNS: usize = 50;

/// Runs in one RATA file: 40 CFR 75 asks for at least 9; 100 leaves room for repeated levels.
pub const MAX_RATA_RUNS: usize = 100;

/// Data rows (readings) in one readings file. Each point is read once (a second reading of a point
/// is an error) and the largest layouts have 8 × 100 (round) or 40 × 40 = 1,600 (rectangular)
/// points, so no valid file has more than 1,600 rows.
pub const MAX_READING_ROWS: usize = 2_000;

/// Data rows (grilles, diffusers) in one terminals file. A large air handler serves a few hundred
/// terminals; 5,000 leaves a wide margin and keeps the submittal's terminal table bounded.
pub const MAX_TERMINAL_ROWS: usize = 5_000;

/// Ducts in one system file: an air handler's mains, branches, returns and outside air are a few
/// dozen at most, and each duct is a survey evaluated and drawn in the submittal.
pub const MAX_SYSTEM_DUCTS: usize = 200;

/// Pairs in one calibration readings file: Method 2 §10.1 asks for 3 per leg; 1,000 leaves room
/// for repeated sessions.
pub const MAX_CALIBRATION_PAIRS: usize = 1_000;

/// A temporary file of ours (`.annulus-*.tmp`) older than this is left over from a write that was
/// killed, and is removed on the next write to its folder. An hour is far longer than any write
/// takes (a report is written in well under a second), so a write in progress is never touched.
pub const STALE_TEMPORARY_AGE: std::time::Duration = std::time::Duration::from_secs(3600);

/// At most this many folder entries are looked at when clearing stale temporary files, so a
/// write into a huge folder stays quick.
pub const STALE_SCAN_ENTRIES: usize = 10_000;

/// Symbolic links followed from an output path before giving up (Linux's own limit is 40).
pub const MAX_SYMLINK_HOPS: usize = 40;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_default_is_below_the_hard_limit() {
        for k in FileKind::ALL {
            assert!(k.default_limit() > 0 && k.default_limit() < HARD_SIZE_LIMIT);
            assert!(k.limit() >= k.default_limit());
        }
        assert!(largest_limit() >= FileKind::Readings.limit());
    }

    #[test]
    fn row_limit_fits_in_the_readings_size_limit() {
        // A full row `A,12,0.123,300,5,-0.85,2026-10-14T09:12:33` is 40 bytes; the size cap must
        // not bite first.
        assert!(MAX_READING_ROWS as u64 * 400 < FileKind::Readings.default_limit());
    }
}
