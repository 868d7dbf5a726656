//! Reads a Type S pitot calibration file (TOML) and its paired-readings CSV into validated values,
//! and computes the calibration through [`crate::calibration::calibrate`].
//!
//! Owns the calibration file format and its located diagnostics. Must not print, render or decide
//! exit codes (the `calibrate` command does); the arithmetic lives in [`crate::calibration`].
//!
//! # Format
//!
//! A calibration is a TOML file naming the probe, the session and the standard pitot, plus a CSV of
//! paired readings (path relative to the TOML file). Quantities are strings with a unit, as in a
//! survey; the standard coefficient is a plain number.
//!
//! ```toml
//! [calibration]
//! probe = "TS-0417"                  # the probe id a survey's [probe] serial refers to
//! serial = "KX-55120"                # optional: maker's serial
//! date = "2026-05-11"
//! calibrated_by = "Oren Castellan"
//! organisation = "…"                 # optional
//! location = "Bench tunnel 2"        # optional: tunnel or duct used
//! velocity = "3000 fpm"              # optional: nominal calibration velocity
//! assembly = "probe with thermocouple" # optional: configuration calibrated
//! readings = "ts-0417.csv"
//! notes = ["…"]                      # optional
//!
//! [standard]                         # optional table
//! id = "STD-3"                       # optional
//! coefficient = 0.99                 # optional: absent → 0.99, recorded as assumed
//! ```
//!
//! The readings CSV has one row per simultaneous pair, `leg` saying which leg of the Type S tube
//! faced the flow (`A` or `B`), and the two velocity pressures with their unit in the header:
//!
//! ```text
//! leg,standard_dp[inH2O],s_type_dp[inH2O],note
//! A,0.600,0.840,
//! B,0.600,0.850,
//! ```
//!
//! `note` is optional; `#` starts a comment line. EPA Method 2 §10.1 asks for three pairs per leg;
//! more are accepted.

use super::header::{Header, HeaderError};
use super::readings::Cells;
use super::toml_doc::{Table, TomlDoc};
use super::{read_referenced, FileKind, SourceFile};
use crate::calibration::{
    calibrate, Calibration, CalibrationError, Leg, PairedReading, METHOD_2_LIMITS,
    MIN_READINGS_PER_SIDE,
};
use crate::diag::{Diagnostic, Diagnostics, Error, Location};
use crate::units::{parse_number, Dimension, Unit};
use chrono::NaiveDate;
use std::path::{Path, PathBuf};

/// Plausible coefficients of a standard (Prandtl) pitot tube: the same range a survey's
/// `probe.coefficient` accepts (0.5, 1.05]; common practice, a standard tube is near 0.99.
const STANDARD_COEFFICIENT_RANGE: (f64, f64) = (0.5, 1.05);

const HINT_FORMAT: &str =
    "see the calibration format in sample-data/calibration/README.md (ts-0417.toml is a complete example)";
const HINT_CELL: &str = "use `.` as the decimal separator; put units in the header, not the cell";

/// The descriptive part of a calibration file.
#[derive(Debug, Clone, PartialEq)]
pub struct CalibrationMeta {
    /// Probe id (what a survey's `[probe] serial` names).
    pub probe: String,
    /// Maker's serial, when different from the id.
    pub serial: Option<String>,
    pub date: NaiveDate,
    pub calibrated_by: String,
    pub organisation: Option<String>,
    /// Tunnel or duct the calibration was made in.
    pub location: Option<String>,
    /// Nominal calibration velocity, m/s, and the text it was given as.
    pub velocity: Option<(f64, String)>,
    /// Probe configuration calibrated (with or without thermocouple, nozzle …).
    pub assembly: Option<String>,
    /// Identifier of the standard pitot tube.
    pub standard_id: Option<String>,
    /// Cp(std) as given; `None` when the file gives none (0.99 is then assumed).
    pub standard_coefficient: Option<f64>,
    pub notes: Vec<String>,
}

/// A parsed calibration TOML: its metadata and the readings path as written.
#[derive(Debug, Clone, PartialEq)]
pub struct CalibrationSpec {
    pub meta: CalibrationMeta,
    /// The readings CSV, relative to the TOML file.
    pub readings: String,
    /// Where the TOML names it (a readings file that cannot be read is reported there).
    pub readings_at: Location,
}

/// One row of the readings CSV.
#[derive(Debug, Clone, PartialEq)]
pub struct CalibrationReading {
    pub leg: Leg,
    /// 1-based number within its leg, in file order.
    pub number: usize,
    pub standard_dp_pa: f64,
    pub s_type_dp_pa: f64,
    /// The cells as written (printed back in the file's own units).
    pub standard_raw: String,
    pub s_type_raw: String,
    pub note: Option<String>,
    /// 1-based line in the CSV.
    pub source_line: usize,
}

/// The readings CSV: rows and the units named in its header.
#[derive(Debug, Clone, PartialEq)]
pub struct CalibrationReadings {
    pub rows: Vec<CalibrationReading>,
    /// Unit symbol of `standard_dp[…]`.
    pub standard_unit: String,
    /// Unit symbol of `s_type_dp[…]`.
    pub s_type_unit: String,
}

impl CalibrationReadings {
    /// The pairs with the given leg facing the flow, in file order.
    pub fn leg(&self, leg: Leg) -> Vec<PairedReading> {
        self.rows
            .iter()
            .filter(|r| r.leg == leg)
            .map(|r| PairedReading {
                standard_dp_pa: r.standard_dp_pa,
                s_type_dp_pa: r.s_type_dp_pa,
            })
            .collect()
    }
}

/// A calibration file with its readings, as read, and the computed calibration.
#[derive(Debug, Clone)]
pub struct LoadedCalibration {
    pub file: SourceFile,
    pub readings_file: SourceFile,
    pub meta: CalibrationMeta,
    pub readings: CalibrationReadings,
    pub calibration: Calibration,
}

/// What a survey needs from a calibration it references (`calibration = "path.toml"` in
/// `[probe]`).
#[derive(Debug, Clone, PartialEq)]
pub struct CalibrationRecord {
    /// The calibration file, as given.
    pub path: PathBuf,
    pub probe: String,
    pub serial: Option<String>,
    pub date: NaiveDate,
    /// Mean of the leg A and leg B means ([`Calibration::assigned_coefficient`]).
    pub assigned_coefficient: f64,
    /// All three EPA Method 2 §10.1 criteria met.
    pub accepted: bool,
    pub standard_coefficient: f64,
    pub standard_coefficient_assumed: bool,
}

impl LoadedCalibration {
    /// The summary a survey references.
    pub fn record(&self) -> CalibrationRecord {
        CalibrationRecord {
            path: self.file.path.clone(),
            probe: self.meta.probe.clone(),
            serial: self.meta.serial.clone(),
            date: self.meta.date,
            assigned_coefficient: self.calibration.assigned_coefficient(),
            accepted: self.calibration.accepted(),
            standard_coefficient: self.calibration.standard_coefficient,
            standard_coefficient_assumed: self.calibration.standard_coefficient_assumed,
        }
    }
}

/// Reads a calibration file and its readings and computes the calibration; every input problem
/// is reported, located, in one pass.
pub fn load(path: &Path) -> Result<LoadedCalibration, Error> {
    load_with(path, &|p| crate::input::fs::read_file(p))
}

/// [`load`] with the bytes of each file supplied by `source` (a survey loaded from memory).
pub fn load_with(
    path: &Path,
    source: crate::input::FileSource,
) -> Result<LoadedCalibration, Error> {
    let name = path.display().to_string();
    let (bytes, text) =
        crate::input::read_text_with(path, &name, crate::limits::FileKind::Calibration, source)?;
    load_text(path, bytes, &text, source)
}

/// [`load_with`] for a calibration file another file names (a survey's `[probe] calibration`):
/// a file that cannot be read is reported at `named_at`, the line that names it.
pub fn load_referenced(
    path: &Path,
    written: &str,
    named_at: &Location,
    source: crate::input::FileSource,
) -> Result<LoadedCalibration, Error> {
    let (bytes, text) = read_referenced(path, written, named_at, FileKind::Calibration, source)?;
    load_text(path, bytes, &text, source)
}

fn load_text(
    path: &Path,
    bytes: Vec<u8>,
    text: &str,
    source: crate::input::FileSource,
) -> Result<LoadedCalibration, Error> {
    let name = path.display().to_string();
    let spec = parse_calibration(&name, text)?;
    let dir = path.parent().unwrap_or(Path::new("."));
    let rpath = dir.join(&spec.readings);
    let rname = rpath.display().to_string();
    let (rbytes, rtext) = read_referenced(
        &rpath,
        &spec.readings,
        &spec.readings_at,
        FileKind::CalibrationReadings,
        source,
    )?;
    let readings = parse_readings(&rname, &rtext)?;
    let calibration = calibrate(
        &readings.leg(Leg::A),
        &readings.leg(Leg::B),
        spec.meta.standard_coefficient,
        METHOD_2_LIMITS,
    )
    .map_err(|e| core_error(e, &name, &rname))?;
    Ok(LoadedCalibration {
        file: SourceFile {
            name: file_name(path, &name),
            path: path.to_path_buf(),
            bytes,
        },
        readings_file: SourceFile {
            name: file_name(&rpath, &spec.readings),
            path: rpath,
            bytes: rbytes,
        },
        meta: spec.meta,
        readings,
        calibration,
    })
}

/// Reads a calibration file for a survey that references it: the probe, date, assigned
/// coefficient and acceptance. A calibration that fails acceptance is returned (with
/// `accepted: false`), not refused: the caller decides.
pub fn load_calibration(path: &Path) -> Result<CalibrationRecord, Error> {
    load(path).map(|c| c.record())
}

fn file_name(path: &Path, fallback: &str) -> String {
    path.file_name()
        .map(|n| n.to_string_lossy().to_string())
        .unwrap_or_else(|| fallback.to_string())
}

/// The parser validates everything the core checks, so this is reached only if the two disagree;
/// it still gives a usable message.
fn core_error(e: CalibrationError, file: &str, readings: &str) -> Error {
    let at = match e {
        CalibrationError::BadStandardCoefficient { .. } => file,
        _ => readings,
    };
    Error::input(Diagnostic::new(e.to_string()).at(Location::file(at)))
}

/// Parses a calibration TOML. `file` names it in diagnostics.
pub fn parse_calibration(file: &str, text: &str) -> Result<CalibrationSpec, Error> {
    let doc = TomlDoc::parse(file, text, "calibration file")?.with_guide(HINT_FORMAT);
    let spec = {
        let root = doc.root();
        let c = root.table("calibration");
        let meta = c.as_ref().and_then(|c| read_meta(c, &root));
        let readings = c.as_ref().and_then(|c| {
            let path = c.text("readings", "\"ts-0417.csv\"")?;
            let at = c
                .get("readings")
                .map(|f| f.doc.location(f.span.clone(), &f.path()))?;
            Some((path.trim().to_string(), at))
        });
        meta.zip(readings)
            .map(|(meta, (readings, readings_at))| CalibrationSpec {
                meta,
                readings,
                readings_at,
            })
    };
    doc.finish(spec)
}

fn read_meta(c: &Table, root: &Table) -> Option<CalibrationMeta> {
    let probe = c.text("probe", "\"TS-0417\"");
    let calibrated_by = c.text("calibrated_by", "\"A. Name\"");
    let date = c.date("date", "2026-05-11");
    let velocity = c.get("velocity").and_then(|f| {
        let x = f.quantity(Dimension::Velocity)?;
        if x > 0.0 {
            Some((x, f.text().trim().to_string()))
        } else {
            f.error(
                format!(
                    "`calibration.velocity` must be greater than zero, found `{}`",
                    f.text()
                ),
                None,
            );
            None
        }
    });
    let standard = root.opt_table("standard");
    let standard_id = standard.as_ref().and_then(|s| s.opt_text("id"));
    let given = standard.as_ref().and_then(|s| s.get("coefficient"));
    let standard_coefficient = match &given {
        None => Some(None),
        Some(f) => f.number().and_then(|x| {
            let (lo, hi) = STANDARD_COEFFICIENT_RANGE;
            if x > lo && x <= hi {
                Some(Some(x))
            } else {
                f.error(
                    format!("a standard pitot coefficient of {x} is not plausible"),
                    Some(
                        "a standard pitot tube is near 0.99; leave `coefficient` out to use 0.99"
                            .into(),
                    ),
                );
                None
            }
        }),
    };
    // every key is asked before a missing one ends the reading (a key not asked is reported
    // as unknown)
    let (serial, organisation) = (c.opt_text("serial"), c.opt_text("organisation"));
    let (location, assembly) = (c.opt_text("location"), c.opt_text("assembly"));
    let notes = c.opt_strings("notes").unwrap_or_default();
    Some(CalibrationMeta {
        probe: probe?.trim().to_string(),
        serial,
        date: date?,
        calibrated_by: calibrated_by?.trim().to_string(),
        organisation,
        location,
        velocity,
        assembly,
        standard_id,
        standard_coefficient: standard_coefficient?,
        notes,
    })
}

#[derive(Debug, Clone, Copy, PartialEq)]
enum Col {
    Leg,
    Standard(&'static Unit),
    SType(&'static Unit),
    Note,
}

impl Col {
    fn same_kind(self, other: Col) -> bool {
        std::mem::discriminant(&self) == std::mem::discriminant(&other)
    }
}

const HINT_HEADER: &str = "the header is `leg,standard_dp[unit],s_type_dp[unit]` and optionally `note`, e.g. `leg,standard_dp[inH2O],s_type_dp[inH2O]`";

fn parse_header(h: &str) -> Result<Col, HeaderError> {
    let header = Header::parse(h)?;
    let pressure = |example: &str| header.unit_of(&[Dimension::Pressure], example);
    match header.name {
        "leg" => header.no_unit(None).map(|()| Col::Leg),
        "note" => header.no_unit(None).map(|()| Col::Note),
        "standard_dp" => Ok(Col::Standard(pressure("standard_dp[inH2O]")?)),
        "s_type_dp" => Ok(Col::SType(pressure("s_type_dp[inH2O]")?)),
        other => Err((format!("unknown column `{other}`"), HINT_HEADER.into())),
    }
}

/// Where the columns of a calibration readings file are.
struct Columns {
    leg: usize,
    standard: (usize, &'static Unit),
    s_type: (usize, &'static Unit),
    note: Option<usize>,
}

/// The columns the header names, or every problem with it.
fn read_columns(file: &str, header_line: usize, headers: &Cells) -> Result<Columns, Error> {
    let mut diags = Diagnostics::new();
    let mut cols: Vec<(usize, Col)> = Vec::new();
    for (i, h) in headers.iter().enumerate() {
        match parse_header(h) {
            Ok(c) => {
                if cols.iter().any(|(_, x)| x.same_kind(c)) {
                    diags.push(
                        Diagnostic::new(format!("column `{h}` appears twice")).at(Location::at(
                            file,
                            header_line,
                            i + 1,
                        )),
                    );
                }
                cols.push((i, c));
            }
            Err((m, hint)) => diags.push(
                Diagnostic::new(m)
                    .at(Location::at(file, header_line, i + 1)
                        .with_context(format!("header `{h}`")))
                    .hint(hint),
            ),
        }
    }
    if cols.is_empty() {
        // none of our columns: some other file (a wrong path), whose text is not ours to quote
        return Err(Error::input(
            Diagnostic::new(
                "this is not a calibration readings file: its first line names none of its columns",
            )
            .at(Location::at(file, header_line, 1))
            .hint(HINT_HEADER),
        ));
    }
    let find = |probe: Col| cols.iter().find(|(_, c)| c.same_kind(probe)).copied();
    let any_unit = &crate::units::UNITS[0];
    let leg_col = find(Col::Leg);
    let std_col = find(Col::Standard(any_unit));
    let s_col = find(Col::SType(any_unit));
    // A header with a bad name may be the missing column misspelt: report that, not both.
    let header_ok = diags.is_empty();
    for (present, name) in [
        (leg_col.is_some(), "leg"),
        (std_col.is_some(), "standard_dp[…]"),
        (s_col.is_some(), "s_type_dp[…]"),
    ] {
        if !present && header_ok {
            diags.push(
                Diagnostic::new(format!("the readings file has no `{name}` column"))
                    .at(Location::at(file, header_line, 1))
                    .hint(HINT_HEADER),
            );
        }
    }
    match (leg_col, std_col, s_col) {
        (Some((leg, _)), Some((si, Col::Standard(su))), Some((ti, Col::SType(tu))))
            if diags.is_empty() =>
        {
            Ok(Columns {
                leg,
                standard: (si, su),
                s_type: (ti, tu),
                note: find(Col::Note).map(|(i, _)| i),
            })
        }
        _ => Err(Error::Input(diags)),
    }
}

/// Parses the paired-readings CSV. Every bad cell is reported with its line, column, header and
/// raw value; a leg with fewer than three pairs is an error (EPA Method 2 §10.1).
pub fn parse_readings(file: &str, text: &str) -> Result<CalibrationReadings, Error> {
    use crate::limits::MAX_CALIBRATION_PAIRS;
    // split as a survey's readings are (quoted files through the csv crate), with true line
    // numbers; one record more than the limit allows is read, to tell that there are more
    let records = super::readings::csv_rows(text, MAX_CALIBRATION_PAIRS + 2);
    let capped = records.len() == MAX_CALIBRATION_PAIRS + 2;
    let mut records = records.into_iter();
    let (header_line, headers) = match records.next() {
        Some((line, Ok(h))) => (line, h),
        Some((_, Err(e))) => {
            return Err(Error::input(
                Diagnostic::new(format!("the readings file cannot be read as CSV: {e}"))
                    .at(Location::file(file)),
            ))
        }
        None => (1, Default::default()),
    };
    let cols = read_columns(file, header_line, &headers)?;
    let mut diags = Diagnostics::new();
    let mut rows = Vec::new();
    let mut counts = [0usize; 2];
    let too_many = || {
        let limit = MAX_CALIBRATION_PAIRS;
        Diagnostic::new(format!(
            "the readings file has more than {limit} rows; annulus accepts at most {limit} pairs"
        ))
        .at(Location::file(file))
        .hint("check that the path names the right file")
    };
    let mut limited = false;
    for (line_no, rec) in records {
        if rows.len() + diags.len() >= MAX_CALIBRATION_PAIRS {
            diags.push(too_many());
            limited = true;
            break;
        }
        let rec = match rec {
            Ok(r) => r,
            Err(e) => {
                diags.push(
                    Diagnostic::new(format!("unreadable CSV row: {e}"))
                        .at(Location::at(file, line_no, 1)),
                );
                continue;
            }
        };
        match read_pair(file, line_no, &rec, &headers, &cols) {
            Ok(Some(mut row)) => {
                let k = usize::from(row.leg == Leg::B);
                counts[k] += 1;
                row.number = counts[k];
                rows.push(row);
            }
            Ok(None) => {}
            Err(d) => diags.extend(d),
        }
    }
    // rows left unread after blank ones are never dropped quietly
    if capped && !limited {
        diags.push(too_many());
    }
    if diags.is_empty() {
        for leg in [Leg::A, Leg::B] {
            let found = rows.iter().filter(|r| r.leg == leg).count();
            if found < MIN_READINGS_PER_SIDE {
                diags.push(
                    Diagnostic::new(format!(
                        "leg {} needs at least {MIN_READINGS_PER_SIDE} paired readings, found {found}",
                        leg.label()
                    ))
                    .at(Location::file(file))
                    .hint(format!(
                        "EPA Method 2 §10.1 takes three pairs with leg A facing the flow and three with leg B; add rows `{},…`",
                        leg.label()
                    )),
                );
            }
        }
    }
    diags.finish(CalibrationReadings {
        rows,
        standard_unit: cols.standard.1.symbol.to_string(),
        s_type_unit: cols.s_type.1.symbol.to_string(),
    })
}

/// One row as a pair (numbered 0: the caller numbers pairs within their leg); `None` for a
/// blank row, every bad cell of the row otherwise.
fn read_pair(
    file: &str,
    line_no: usize,
    rec: &Cells,
    headers: &Cells,
    cols: &Columns,
) -> Result<Option<CalibrationReading>, Diagnostics> {
    let mut diags = Diagnostics::new();
    if rec.iter().all(|c| c.is_empty()) {
        return Ok(None);
    }
    if rec.len() != headers.len() {
        diags.push(
            Diagnostic::new(super::readings::width_words(rec, headers))
                .at(Location::at(file, line_no, 1))
            .hint(if rec.len() > headers.len() {
                "a decimal comma splits a number into two fields: use `.` as the decimal separator"
            } else {
                "every row needs a value (or an empty field) for each column"
            }),
        );
        return Err(diags);
    }
    let leg_raw = &rec[cols.leg];
    let leg = match leg_raw {
        "A" | "a" => Some(Leg::A),
        "B" | "b" => Some(Leg::B),
        _ => {
            diags.push(
                Diagnostic::new(format!("leg must be `A` or `B`, found `{leg_raw}`"))
                    .at(Location::at(file, line_no, cols.leg + 1)
                        .with_context(format!("column `{}`", &headers[cols.leg])))
                    .hint("write which leg of the Type S tube faced the flow: A or B"),
            );
            None
        }
    };
    // "leg A, " before a bad cell's column (worded only for a bad cell)
    let who = || match leg {
        Some(l) => format!("leg {}, ", l.label()),
        None => String::new(),
    };
    let mut cell = |(i, unit): (usize, &Unit), what: &str| -> Option<f64> {
        match pair_value(&rec[i], unit, what) {
            Ok(v) => Some(v),
            Err((message, hint)) => {
                let at = Location::at(file, line_no, i + 1).with_context(format!(
                    "{}column `{}`",
                    who(),
                    &headers[i]
                ));
                diags.push(Diagnostic::new(message).at(at).hint(hint));
                None
            }
        }
    };
    let std_pa = cell(cols.standard, "standard pitot Δp");
    let s_pa = cell(cols.s_type, "Type S pitot Δp");
    match (leg, std_pa, s_pa) {
        (Some(leg), Some(standard_dp_pa), Some(s_type_dp_pa)) if diags.is_empty() => {
            Ok(Some(CalibrationReading {
                leg,
                number: 0,
                standard_dp_pa,
                s_type_dp_pa,
                standard_raw: rec[cols.standard.0].to_string(),
                s_type_raw: rec[cols.s_type.0].to_string(),
                note: cols
                    .note
                    .map(|i| rec[i].to_string())
                    .filter(|n| !n.is_empty()),
                source_line: line_no,
            }))
        }
        _ => Err(diags),
    }
}

/// A calibration Δp cell in Pa: present, a number, greater than zero.
fn pair_value(raw: &str, unit: &Unit, what: &str) -> Result<f64, (String, &'static str)> {
    if raw.is_empty() {
        return Err((
            format!("{what} is missing"),
            "every pair needs both readings, taken at the same point",
        ));
    }
    match parse_number(raw) {
        Some(v) if v.is_finite() && !raw.contains('/') && v > 0.0 => Ok(v * unit.factor),
        Some(v) if v.is_finite() && !raw.contains('/') => Err((
            format!("{what} must be greater than zero, found `{raw}`"),
            "a calibration reading is a velocity pressure in a flowing tunnel; check the gauge connections",
        )),
        _ => Err((format!("{what} is not a number: `{raw}`"), HINT_CELL)),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const TOML: &str = r#"[calibration]
probe = "TS-0417"
date = "2026-05-11"
calibrated_by = "Oren Castellan"
velocity = "3000 fpm"
readings = "r.csv"
"#;

    /// calculations.md §6 [D]: the worked example's readings, inH2O.
    const CSV: &str = "leg,standard_dp[inH2O],s_type_dp[inH2O]\nA,0.600,0.840\nA,0.610,0.860\nA,0.590,0.830\nB,0.600,0.850\nB,0.610,0.855\nB,0.590,0.845\n";

    /// calculations.md §6 prints six decimals: half a unit in the last place.
    const ABS_TOL_PRINTED_6DP: f64 = 0.000_000_5;

    fn input_err<T: std::fmt::Debug>(r: Result<T, Error>) -> Diagnostics {
        match r {
            Err(Error::Input(d)) => d,
            other => panic!("accepted: {other:?}"),
        }
    }

    #[test]
    fn a_missing_probe_does_not_make_the_keys_after_it_unknown() {
        let text = TOML.replace(
            "probe = \"TS-0417\"\n",
            "serial = \"S-9\"\nnotes = [\"n\"]\n",
        );
        let d = input_err(parse_calibration("c.toml", &text));
        let s = d.to_string();
        assert_eq!(d.len(), 1, "{s}");
        assert!(
            s.contains("no `probe`") && !s.contains("unknown key"),
            "{s}"
        );
    }

    #[test]
    fn parses_the_file_and_assumes_the_standard_coefficient() {
        let spec = parse_calibration("c.toml", TOML).expect("valid");
        assert_eq!(spec.meta.probe, "TS-0417");
        assert_eq!(spec.meta.standard_coefficient, None);
        assert_eq!(spec.readings, "r.csv");
        let (v, raw) = spec.meta.velocity.expect("velocity");
        // 3000 ft/min = 15.24 m/s exactly (1 ft = 0.3048 m).
        assert!((v - 15.24).abs() < 1e-12);
        assert_eq!(raw, "3000 fpm");
    }

    #[test]
    fn worked_example_through_the_csv_format() {
        // calculations.md §6 [D] (EPA Method 2 §10.1 equations): means 0.835055 / 0.831741,
        // σ 0.001098 / 0.002999, |A−B| 0.003315, accepted with Cp(std) 0.99 assumed.
        let r = parse_readings("r.csv", CSV).expect("valid");
        assert_eq!(r.rows.len(), 6);
        assert_eq!((r.rows[4].leg, r.rows[4].number), (Leg::B, 2));
        assert_eq!(r.rows[4].source_line, 6);
        let cal = calibrate(&r.leg(Leg::A), &r.leg(Leg::B), None, METHOD_2_LIMITS).unwrap();
        assert!((cal.leg_a.mean - 0.835055).abs() <= ABS_TOL_PRINTED_6DP);
        assert!((cal.leg_b.mean - 0.831741).abs() <= ABS_TOL_PRINTED_6DP);
        assert!((cal.leg_a.deviation - 0.001098).abs() <= ABS_TOL_PRINTED_6DP);
        assert!((cal.leg_b.deviation - 0.002999).abs() <= ABS_TOL_PRINTED_6DP);
        assert!((cal.leg_difference - 0.003315).abs() <= ABS_TOL_PRINTED_6DP);
        assert!(cal.accepted());
    }

    #[test]
    fn mixed_units_only_the_ratio_matters() {
        // Derived: 0.600 inH2O = 149.45334 Pa (NIST SP 811 conventional inch of water), so the
        // pair (149.45334 Pa, 0.840 inH2O) gives the same Cp as (0.600, 0.840) inH2O.
        let text = "leg,standard_dp[Pa],s_type_dp[inH2O]\nA,149.45334,0.840\n";
        let r = parse_readings("r.csv", text);
        // One leg only: refused, but the row itself parsed to the same Pa values.
        let d = input_err(r);
        assert_eq!(d.len(), 2, "{d}");
        let ok = parse_readings(
            "r.csv",
            &format!("{text}A,149.45334,0.840\nA,149.45334,0.840\nB,1,1\nB,1,1\nB,1,1\n"),
        )
        .unwrap();
        assert!((ok.rows[0].standard_dp_pa / ok.rows[0].s_type_dp_pa - 0.6 / 0.84).abs() < 1e-7);
        assert_eq!(ok.standard_unit, "Pa");
        assert_eq!(ok.s_type_unit, "inH2O");
    }

    #[test]
    fn a_bad_cell_is_located_with_its_raw_value() {
        let text = CSV.replace("0.855", "0.85S");
        let d = input_err(parse_readings("r.csv", &text));
        assert_eq!(d.len(), 1);
        assert_eq!(
            d.items()[0].to_string(),
            "error: Type S pitot Δp is not a number: `0.85S`\n --> r.csv:6:3 (leg B, column `s_type_dp[inH2O]`)\n   = hint: use `.` as the decimal separator; put units in the header, not the cell"
        );
    }

    #[test]
    fn reports_every_bad_cell_in_one_pass() {
        let text = CSV
            .replace("A,0.610,0.860", "C,0.610,0.860")
            .replace("B,0.590,0.845", "B,0,0.845")
            .replace("A,0.590,0.830", "A,,0.830");
        let d = input_err(parse_readings("r.csv", &text));
        assert_eq!(d.len(), 3, "{d}");
        let s = d.to_string();
        assert!(s.contains("leg must be `A` or `B`, found `C`"), "{s}");
        assert!(s.contains("r.csv:3:1"), "{s}");
        assert!(s.contains("must be greater than zero, found `0`"), "{s}");
        assert!(s.contains("r.csv:7:2"), "{s}");
        assert!(s.contains("standard pitot Δp is missing"), "{s}");
    }

    #[test]
    fn comment_lines_count_in_a_bad_cells_line_number_quoted_or_not() {
        // line 5 of the file is `A,0.59X,0.830` whichever reader splits it
        let plain = "# tunnel run 3\nleg,standard_dp[inH2O],s_type_dp[inH2O]\nA,0.600,0.840\n# re-read\nA,0.59X,0.830\n";
        let quoted = plain.replace("A,0.600", "\"A\",0.600");
        for text in [plain.to_string(), quoted] {
            let d = input_err(parse_readings("r.csv", &text));
            assert!(d.to_string().contains("r.csv:5:2"), "{d}");
        }
    }

    #[test]
    fn rows_past_the_limit_are_never_dropped_quietly() {
        // blank rows do not count as pairs, but every record past the limit is reported
        let mut text = String::from("leg,standard_dp[inH2O],s_type_dp[inH2O]\n");
        for i in 0..crate::limits::MAX_CALIBRATION_PAIRS + 5 {
            text.push_str(if i % 2 == 0 {
                ",,\n"
            } else {
                "A,0.600,0.840\n"
            });
        }
        let d = input_err(parse_readings("r.csv", &text));
        assert_eq!(d.len(), 1, "{d}");
        assert!(d.items()[0].message.contains("more than 1000 rows"), "{d}");
        // at the limit, it is read
        let mut text = String::from("leg,standard_dp[inH2O],s_type_dp[inH2O]\n");
        for i in 0..crate::limits::MAX_CALIBRATION_PAIRS {
            text.push_str(if i % 2 == 0 {
                "B,0.600,0.850\n"
            } else {
                "A,0.600,0.840\n"
            });
        }
        assert_eq!(parse_readings("r.csv", &text).unwrap().rows.len(), 1000);
    }

    #[test]
    fn header_problems_are_located() {
        let d = input_err(parse_readings(
            "r.csv",
            "leg,standard_dp,s_type_dp[F]\nA,1,1\n",
        ));
        assert_eq!(d.len(), 2, "{d}");
        assert!(d.items()[0].message.contains("needs a unit"));
        assert_eq!(d.items()[1].location.as_ref().unwrap().column, Some(3));
        let d = input_err(parse_readings(
            "r.csv",
            "# comment\nleg,s_type_dp[Pa]\nA,1\n",
        ));
        assert_eq!(
            d.items()[0].to_string(),
            "error: the readings file has no `standard_dp[…]` column\n --> r.csv:2:1\n   = hint: the header is `leg,standard_dp[unit],s_type_dp[unit]` and optionally `note`, e.g. `leg,standard_dp[inH2O],s_type_dp[inH2O]`"
        );
    }

    #[test]
    fn short_leg_is_refused() {
        let text: String = CSV.lines().take(6).map(|l| format!("{l}\n")).collect();
        let d = input_err(parse_readings("r.csv", &text));
        assert_eq!(d.len(), 1);
        assert!(d.items()[0]
            .message
            .contains("leg B needs at least 3 paired readings, found 2"));
    }

    #[test]
    fn load_calibration_returns_what_a_survey_needs() {
        let dir = tempfile::tempdir().expect("temp dir");
        let toml_path = dir.path().join("c.toml");
        std::fs::write(&toml_path, TOML).expect("write");
        std::fs::write(dir.path().join("r.csv"), CSV).expect("write");
        let rec = load_calibration(&toml_path).expect("valid");
        assert_eq!(rec.probe, "TS-0417");
        assert_eq!(
            rec.date,
            NaiveDate::from_ymd_opt(2026, 5, 11).expect("date")
        );
        // Derived from calculations.md §6 [D]: (0.835055 + 0.831741)/2 = 0.833398.
        assert!((rec.assigned_coefficient - 0.833398).abs() <= ABS_TOL_PRINTED_6DP);
        assert!(rec.accepted);
        assert!(rec.standard_coefficient_assumed);
        // A calibration that fails acceptance is returned, flagged, not refused. Constructed:
        // leg B Type S readings 0.800, 0.950, 0.845 inH2O against 0.600, 0.610, 0.590 give
        // Cp 0.857365, 0.793302, 0.827243 → σ_B ≈ 0.0218 > 0.01.
        let bad = CSV
            .replace("B,0.600,0.850", "B,0.600,0.800")
            .replace("B,0.610,0.855", "B,0.610,0.950");
        std::fs::write(dir.path().join("r.csv"), bad).expect("write");
        let rec = load_calibration(&toml_path).expect("still read");
        assert!(!rec.accepted);
        std::fs::remove_file(dir.path().join("r.csv")).expect("remove");
        let Err(Error::Input(d)) = load_calibration(&toml_path) else {
            panic!("read a missing readings file")
        };
        assert!(d.items()[0].message.starts_with("cannot read"), "{d}");
    }

    #[test]
    fn toml_problems_are_located() {
        let text = TOML
            .replace("\"2026-05-11\"", "\"11/05/2026\"")
            .replace("\"3000 fpm\"", "\"3000 rpm\"")
            + "[standard]\ncoefficient = 9.9\n";
        let d = input_err(parse_calibration("c.toml", &text));
        assert_eq!(d.len(), 3, "{d}");
        let first = &d.items()[0];
        assert_eq!(
            first.message,
            "`calibration.date` is not a date: `11/05/2026`"
        );
        let loc = first.location.as_ref().unwrap();
        assert_eq!((loc.line, loc.column), (Some(3), Some(8)));
        assert!(d.items()[1].message.contains("`3000 rpm`"));
        assert!(d.items()[2].message.contains("9.9 is not plausible"));
        let d = input_err(parse_calibration("c.toml", &TOML.replace("probe", "prob")));
        assert!(d.to_string().contains("c.toml:2:1"), "{d}");
    }
}
