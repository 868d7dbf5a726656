//! Reads a run's readings CSV (row form or matrix form) and matches it to the layout.
//!
//! Header names carry their unit in brackets (`dp[inH2O]`, `temperature[F]`, `yaw[deg]`); cells
//! hold plain numbers. Every bad cell is reported with file, line, column, header, the raw value and
//! a hint; all problems of a file are collected before stopping. No reading is ever dropped: a row
//! that does not belong to the layout, a duplicate or a missing point is an error.

use super::header::{Header, HeaderError};
use crate::diag::{Diagnostic, Diagnostics, Error, Location};
use crate::layout::Layout;
use crate::limits::MAX_READING_ROWS;
use crate::readings::{Dp, Reading, RunReadings, WallReading, WallReadings};
use crate::units::{convert_in, parse_number, Dimension, Unit};

#[derive(Debug, Clone, Copy, PartialEq)]
enum Col {
    Line,
    Point,
    Dp(&'static Unit),
    Temperature(&'static Unit),
    Yaw,
    Pitch,
    Static(&'static Unit),
    Time,
    /// Method 2H wall-effects readings only: distance from the wall.
    Distance(&'static Unit),
}

const HINT_CELL: &str = "use `.` as the decimal separator; put units in the header, not the cell";

/// The column a `name[unit]` header names.
fn parse_header(h: &str) -> Result<Col, HeaderError> {
    let header = Header::parse(h)?;
    let angle = |col: Col| header.no_unit(Some("deg")).map(|()| col);
    match header.name {
        "line" => header.no_unit(None).map(|()| Col::Line),
        "point" => header.no_unit(None).map(|()| Col::Point),
        "dp" => Ok(Col::Dp(header.unit_of(
            &[Dimension::Pressure, Dimension::Length],
            "dp[inH2O]",
        )?)),
        "temperature" => Ok(Col::Temperature(
            header.unit_of(&[Dimension::Temperature], "temperature[F]")?,
        )),
        "yaw" => angle(Col::Yaw),
        "pitch" => angle(Col::Pitch),
        "static" => Ok(Col::Static(
            header.unit_of(&[Dimension::Pressure], "static[inH2O]")?,
        )),
        "time" => header.no_unit(None).map(|()| Col::Time),
        "distance" => Ok(Col::Distance(
            header.unit_of(&[Dimension::Length], "distance[in]")?,
        )),
        other => Err((
            format!("unknown column `{other}`"),
            "columns are line, point, dp[…], and optionally temperature[…], yaw[deg], pitch[deg], static[…], time".into(),
        )),
    }
}

fn decimals(raw: &str) -> usize {
    // byte by byte: `.` and ASCII digits are one byte each in UTF-8 (and blanks around the
    // number change nothing: the count stops at the first byte that is not a digit)
    let b = raw.as_bytes();
    b.iter().position(|&c| c == b'.').map_or(0, |dot| {
        b[dot + 1..]
            .iter()
            .take_while(|c| c.is_ascii_digit())
            .count()
    })
}

struct Cell<'a> {
    file: &'a str,
    line: usize,
    column: usize,
    header: &'a str,
    /// The row's line label and point as written, for the message (worded only on an error).
    line_label: &'a str,
    point: &'a str,
}

impl Cell<'_> {
    fn error(&self, msg: String, hint: &str) -> Diagnostic {
        Diagnostic::new(msg)
            .at(
                Location::at(self.file, self.line, self.column).with_context(format!(
                    "line {}, point {}, column `{}`",
                    self.line_label, self.point, self.header
                )),
            )
            .hint(hint)
    }
}

fn number(cell: &Cell, raw: &str, what: &str) -> Result<f64, Diagnostic> {
    match parse_number(raw) {
        Some(v) if v.is_finite() && !raw.contains('/') => Ok(v),
        _ => Err(cell.error(format!("{what} is not a number: `{raw}`"), HINT_CELL)),
    }
}

/// A number in `unit` whose SI value is finite: `1e308` inches of water is a number, but no
/// pressure (it overflows when converted).
fn number_in(cell: &Cell, raw: &str, what: &str, unit: &Unit) -> Result<f64, Diagnostic> {
    let v = number(cell, raw, what)?;
    if (v * unit.factor + unit.offset).is_finite() {
        Ok(v)
    } else {
        Err(cell.error(
            format!("{what} is too large to be a reading: `{raw}`"),
            "check the value and the unit in the header",
        ))
    }
}

fn to_dp(unit: &Unit, v: f64) -> Dp {
    match unit.dimension {
        Dimension::Length => Dp::Column {
            height_m: v * unit.factor,
        },
        _ => Dp::Pressure {
            pa: v * unit.factor,
        },
    }
}

/// "row has 5 fields, the header has 6": a record whose width is not its header's.
pub(crate) fn width_words(rec: &Cells, headers: &Cells) -> String {
    format!(
        "row has {} fields, the header has {}",
        rec.len(),
        headers.len()
    )
}

/// A CSV record (or why it could not be read) with its 1-based line number.
pub(crate) type CsvRow<'t> = (usize, Result<Cells<'t>, String>);

/// The trimmed cells of one CSV record.
#[derive(Debug, Clone, Default)]
pub(crate) struct Cells<'t>(CellsInner<'t>);

#[derive(Debug, Clone)]
enum CellsInner<'t> {
    /// Split straight from the text (a file without quotes has nothing to unescape).
    Split(Vec<&'t str>),
    /// Read by the csv crate.
    Record(csv::StringRecord),
}

impl Default for CellsInner<'_> {
    fn default() -> Self {
        CellsInner::Split(Vec::new())
    }
}

impl<'t> Cells<'t> {
    /// How many cells the record has.
    pub fn len(&self) -> usize {
        match &self.0 {
            CellsInner::Split(v) => v.len(),
            CellsInner::Record(r) => r.len(),
        }
    }

    /// Cell `i`, if the record has it.
    pub fn get(&self, i: usize) -> Option<&str> {
        match &self.0 {
            CellsInner::Split(v) => v.get(i).copied(),
            CellsInner::Record(r) => r.get(i),
        }
    }

    /// The cells in order.
    pub fn iter(&self) -> impl Iterator<Item = &str> + '_ {
        (0..self.len()).map(|i| self.get(i).unwrap_or_default())
    }
}

impl std::ops::Index<usize> for Cells<'_> {
    type Output = str;
    fn index(&self, i: usize) -> &str {
        match &self.0 {
            CellsInner::Split(v) => v[i],
            CellsInner::Record(r) => &r[i],
        }
    }
}

/// `s.trim()`, without looking at characters when the cell starts and ends in a visible ASCII
/// character (nearly every cell of a sheet).
fn trim(s: &str) -> &str {
    match (s.as_bytes().first(), s.as_bytes().last()) {
        (Some(a), Some(z)) if a.is_ascii_graphic() && z.is_ascii_graphic() => s,
        _ => s.trim(),
    }
}

/// The records of a CSV text with their 1-based line numbers, header first; comment (`#`) and
/// blank lines are skipped and fields trimmed. A file without a quote character is split
/// directly: building a csv reader was a quarter of `annulus review`'s time in the profile, and
/// such a file has no escapes to interpret. Anything quoted goes through the csv crate. At most
/// `max_records` records are returned (the header included); the caller compares the count with
/// its limit, so a huge file is never held whole as records.
pub(crate) fn csv_rows(text: &str, max_records: usize) -> Vec<CsvRow<'_>> {
    if !text.as_bytes().contains(&b'"') {
        let mut width = 0;
        return text
            .lines()
            .enumerate()
            .filter(|(_, l)| !l.starts_with('#') && !l.trim().is_empty())
            .take(max_records)
            .map(|(i, l)| {
                let l = l.trim_end_matches('\r');
                // split at the comma bytes (a comma is one byte in UTF-8, never inside another
                // character); each row is sized like the one before it
                let mut cells = Vec::with_capacity(width.max(4));
                let mut start = 0;
                for (j, _) in l.bytes().enumerate().filter(|(_, b)| *b == b',') {
                    cells.push(trim(&l[start..j]));
                    start = j + 1;
                }
                cells.push(trim(&l[start..]));
                width = cells.len();
                (i + 1, Ok(Cells(CellsInner::Split(cells))))
            })
            .collect();
    }
    let mut rdr = csv::ReaderBuilder::new()
        .trim(csv::Trim::All)
        .comment(Some(b'#'))
        .flexible(true)
        .has_headers(false)
        .from_reader(text.as_bytes());
    // The csv crate does not count comment lines in its line numbers: count from the byte offset.
    // A record's offset may point at the LF of a CRLF before it, or at comment lines skipped
    // before it; the record's own line starts after those. Records come in increasing byte
    // order, so the newlines are counted once, from where the previous record's count stopped
    // (counting from the start each time was quadratic: 100,000 quoted rows took 47 s).
    let bytes = text.as_bytes();
    let mut counted_to = 0usize;
    let mut newlines = 0usize;
    let mut line_at = |byte: u64| {
        let mut start = (byte as usize).min(bytes.len());
        if bytes.get(start) == Some(&b'\n') {
            start += 1;
        }
        while bytes.get(start) == Some(&b'#') {
            start = match bytes[start..].iter().position(|&c| c == b'\n') {
                Some(i) => start + i + 1,
                None => bytes.len(),
            };
        }
        if start < counted_to {
            // never expected; recount rather than give a wrong line
            counted_to = 0;
            newlines = 0;
        }
        newlines += bytes[counted_to..start]
            .iter()
            .filter(|&&c| c == b'\n')
            .count();
        counted_to = start;
        newlines + 1
    };
    let mut out = Vec::new();
    for r in rdr.records() {
        if out.len() >= max_records {
            break;
        }
        let row = match r {
            Ok(rec) => {
                let line = rec.position().map(|p| line_at(p.byte())).unwrap_or(0);
                (line, Ok(Cells(CellsInner::Record(rec))))
            }
            Err(e) => {
                let line = e.position().map(|p| line_at(p.byte())).unwrap_or(0);
                (line, Err(e.to_string()))
            }
        };
        if !matches!(&row.1, Ok(rec) if rec.iter().all(str::is_empty)) {
            out.push(row);
        }
    }
    out
}

/// The rows of a readings file, at most [`MAX_READING_ROWS`] data rows after the header; more is
/// an error naming the limit.
fn limited_rows<'t>(file: &str, text: &'t str) -> Result<Vec<CsvRow<'t>>, Error> {
    let rows = csv_rows(text, MAX_READING_ROWS + 2);
    if rows.len() > MAX_READING_ROWS + 1 {
        return Err(Error::input(
            Diagnostic::new(format!(
                "the readings file has more than {MAX_READING_ROWS} rows; annulus accepts at most {MAX_READING_ROWS}"
            ))
            .at(Location::at(file, rows[MAX_READING_ROWS + 1].0, 1))
            .hint("a readings file holds one row per traverse point; check that the path names the right file"),
        ));
    }
    Ok(rows)
}

/// A header that names none of the columns a readings file has is a file of some other kind (a
/// wrong path): it is reported without quoting its text, which is not ours to echo.
fn foreign_header(file: &str, line: usize, headers: &Cells) -> Option<Error> {
    let ours = headers.iter().any(|h| {
        let name = h.split('[').next().unwrap_or("").trim();
        matches!(
            name,
            "line" | "point" | "dp" | "temperature" | "yaw" | "pitch" | "static" | "time"
        ) || name.parse::<usize>().is_ok()
    });
    (!ours).then(|| {
        Error::input(
            Diagnostic::new("this is not a readings file: its first line names none of the readings columns")
                .at(Location::at(file, line, 1))
                .hint("check the path; a readings file starts with a header such as `line,point,dp[inH2O]` (annulus init writes a blank sheet)"),
        )
    })
}

/// Whether a readings sheet holds anything a person wrote: a value in any column other than
/// `line` and `point`, a comment, or anything that is not a readings sheet at all. Only a sheet
/// for which this is `false` (as `annulus init` writes it) may be replaced by `init --force`.
pub fn holds_readings(text: &str) -> bool {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    if text.lines().any(|l| l.trim_start().starts_with('#')) {
        return true;
    }
    let mut rows = csv_rows(text, MAX_READING_ROWS + 2).into_iter();
    let headers = match rows.next() {
        Some((_, Ok(h))) => h,
        Some((_, Err(_))) => return true,
        None => return false,
    };
    let kinds: Vec<Option<Col>> = headers.iter().map(|h| parse_header(h).ok()).collect();
    if kinds.iter().any(Option::is_none) || rows.len() > MAX_READING_ROWS {
        return true;
    }
    rows.any(|(_, rec)| match rec {
        Err(_) => true,
        Ok(rec) => rec.iter().enumerate().any(|(i, cell)| {
            !cell.is_empty() && !matches!(kinds.get(i), Some(Some(Col::Line | Col::Point)))
        }),
    })
}

/// The header record: its line in the file and its cells.
fn header_record<'t>(file: &str, first: Option<CsvRow<'t>>) -> Result<(usize, Cells<'t>), Error> {
    match first {
        Some((line, Ok(h))) => Ok((line, h)),
        Some((_, Err(e))) => Err(Error::input(
            Diagnostic::new(format!("the readings file cannot be read as CSV: {e}"))
                .at(Location::file(file)),
        )),
        None => Ok((1, Cells::default())),
    }
}

/// The columns a row-form header names, or every problem with it (unknown names, bad units,
/// repeated or missing columns).
fn columns(
    file: &str,
    line: usize,
    headers: &Cells,
    wall: bool,
) -> Result<Vec<(usize, Col)>, Error> {
    let same = |a: &Col, b: &Col| std::mem::discriminant(a) == std::mem::discriminant(b);
    let mut diags = Diagnostics::new();
    let mut cols: Vec<(usize, Col)> = Vec::new();
    for (i, h) in headers.iter().enumerate() {
        match parse_header(h) {
            Ok(Col::Distance(_)) if !wall => diags.push(
                Diagnostic::new("a `distance` column belongs in a wall-effects readings file")
                    .at(Location::at(file, line, i + 1).with_context(format!("header `{h}`")))
                    .hint("traverse points are placed by the layout; give Method 2H wall-effects readings in the run's wall_readings file"),
            ),
            Ok(c) => {
                if cols.iter().any(|(_, x)| same(x, &c)) {
                    diags.push(
                        Diagnostic::new(format!("column `{h}` appears twice")).at(Location::at(
                            file,
                            line,
                            i + 1,
                        )),
                    );
                }
                cols.push((i, c));
            }
            Err((m, hint)) => diags.push(
                Diagnostic::new(m)
                    .at(Location::at(file, line, i + 1).with_context(format!("header `{h}`")))
                    .hint(hint),
            ),
        }
    }
    for (req, name) in [
        (Col::Line, "line"),
        (Col::Point, "point"),
        (Col::Dp(&crate::units::UNITS[0]), "dp[…]"),
    ] {
        if !cols.iter().any(|(_, c)| same(c, &req)) {
            diags.push(
                Diagnostic::new(format!("the readings file has no `{name}` column"))
                    .at(Location::at(file, line, 1))
                    .hint("the header must name line, point and dp[unit], e.g. `line,point,dp[inH2O]`"),
            );
        }
    }
    if wall && !cols.iter().any(|(_, c)| matches!(c, Col::Distance(_))) {
        diags.push(
            Diagnostic::new("the wall-effects readings file has no `distance[…]` column")
                .at(Location::at(file, line, 1))
                .hint("write the header as `line,point,distance[in],dp[inH2O]`"),
        );
    }
    diags.finish(cols)
}

/// Parses a readings file in row form.
pub fn parse_rows(file: &str, text: &str) -> Result<RunReadings, Error> {
    parse_rows_with(file, text, false).map(|(r, _)| r)
}

/// Parses a Method 2H wall-effects readings file: rows `line,point,distance[in],dp[…],…` where
/// `line` and `point` name the Method 1 exterior point whose sector the reading belongs to and
/// `distance` is measured from the wall nearest that point.
pub fn parse_wall(file: &str, text: &str) -> Result<WallReadings, Error> {
    let (readings, distances) = parse_rows_with(file, text, true)?;
    let mut diags = Diagnostics::new();
    let mut out = Vec::with_capacity(readings.readings.len());
    for (r, d) in readings.readings.into_iter().zip(distances) {
        match d {
            Some(distance_m) => out.push(WallReading {
                reading: r,
                distance_m,
            }),
            None => diags.push(
                Diagnostic::new(format!(
                    "line {}, point {}: the distance from the wall is missing",
                    r.line, r.point
                ))
                .at(Location::at(file, r.source_line, 1))
                .hint(
                    "each wall-effects reading needs its distance from the wall, e.g. 1, 2, 3 … in",
                ),
            ),
        }
    }
    diags.finish(WallReadings {
        file: file.to_string(),
        readings: out,
    })
}

/// Row-form readings and, for a wall-effects file (`wall`), each row's distance from the wall.
fn parse_rows_with(
    file: &str,
    text: &str,
    wall: bool,
) -> Result<(RunReadings, Vec<Option<f64>>), Error> {
    if text.trim().is_empty() {
        return Err(Error::input(
            Diagnostic::new("the readings file is empty")
                .at(Location::file(file))
                .hint("fill in one row per traverse point under a header such as `line,point,dp[inH2O]` (annulus init writes a blank sheet)"),
        ));
    }
    let mut rows = limited_rows(file, text)?.into_iter();
    let room = rows.len();
    let (header_line, headers) = header_record(file, rows.next())?;
    if let Some(e) = foreign_header(file, header_line, &headers) {
        return Err(e);
    }
    let cols = columns(file, header_line, &headers, wall)?;
    let dp_col = cols
        .iter()
        .find_map(|(i, c)| matches!(c, Col::Dp(_)).then_some(*i));
    let col_of = |c: Col| cols.iter().find(|(_, x)| *x == c).map(|(i, _)| *i);
    let label_cols = (col_of(Col::Line), col_of(Col::Point));
    let mut diags = Diagnostics::new();
    let mut readings = Vec::with_capacity(room);
    let mut distances = Vec::with_capacity(room);
    // rows with a line and point but no Δp: a sheet not filled in yet is one problem, not one
    // per point
    let (mut rows_seen, mut dp_blank) = (0usize, 0usize);
    for (line_no, rec) in rows {
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
        // a blank row is skipped
        if rec.iter().all(str::is_empty) {
            continue;
        }
        rows_seen += 1;
        dp_blank += usize::from(dp_col.and_then(|i| rec.get(i)).is_some_and(str::is_empty));
        let row = Row {
            file,
            line_no,
            rec: &rec,
            headers: &headers,
            cols: &cols,
            label_cols,
        };
        if let Err(d) = row.read(&mut readings, &mut distances) {
            diags.extend(d);
        }
    }
    if rows_seen > 1 && dp_blank == rows_seen {
        return Err(Error::input(
            Diagnostic::new(format!(
                "the readings file is not filled in: all {rows_seen} rows have an empty Δp"
            ))
            .at(Location::file(file))
            .hint("enter the velocity pressure read at each point in the `dp[…]` column"),
        ));
    }
    if readings.is_empty() && diags.is_empty() {
        diags.push(
            Diagnostic::new("the readings file has no readings")
                .at(Location::file(file))
                .hint("fill in one row per traverse point (annulus init writes a blank sheet)"),
        );
    }
    let dp_unit = cols.iter().find_map(|(_, c)| match c {
        Col::Dp(u) => Some(*u),
        _ => None,
    });
    diags.finish((
        RunReadings {
            dp_unit,
            file: file.to_string(),
            readings,
        },
        distances,
    ))
}

/// One non-blank row of a row-form readings file, with what reading it takes.
struct Row<'r, 't> {
    file: &'r str,
    line_no: usize,
    rec: &'r Cells<'t>,
    headers: &'r Cells<'t>,
    cols: &'r [(usize, Col)],
    /// The columns of the line label and the point number.
    label_cols: (Option<usize>, Option<usize>),
}

impl Row<'_, '_> {
    /// Adds the row's reading (and, in a wall-effects file, its distance from the wall) to
    /// `readings` and `distances`; every bad cell of the row otherwise.
    fn read(
        &self,
        readings: &mut Vec<Reading>,
        distances: &mut Vec<Option<f64>>,
    ) -> Result<(), Diagnostics> {
        let (file, line_no, rec, headers) = (self.file, self.line_no, self.rec, self.headers);
        let mut diags = Diagnostics::new();
        if rec.len() != headers.len() {
            diags.push(
                Diagnostic::new(width_words(rec, headers))
                .at(Location::at(file, line_no, 1).with_context(format!(
                    "`{}`",
                    rec.iter().collect::<Vec<_>>().join(",")
                )))
                .hint("every row needs a value (or an empty field) for each column; look for a stray comma"),
            );
            return Err(diags);
        }
        let line_raw = self.label_cols.0.map(|i| &rec[i]).unwrap_or_default();
        let point_raw = self.label_cols.1.map(|i| &rec[i]).unwrap_or_default();
        // written in place: a reading is moved no more than it must be
        readings.push(Reading {
            line: line_raw.to_string(),
            point: 0,
            dp: Dp::Pressure { pa: f64::NAN },
            dp_decimals: 0,
            temperature_k: None,
            yaw_deg: None,
            pitch_deg: None,
            static_pa: None,
            time: None,
            source_line: line_no,
        });
        let mut distance = None;
        if let Some(r) = readings.last_mut() {
            for (i, col) in self.cols {
                let cell = Cell {
                    file,
                    line: line_no,
                    column: i + 1,
                    header: &headers[*i],
                    line_label: line_raw,
                    point: point_raw,
                };
                if let Err(d) = read_cell(*col, &rec[*i], &cell, r, &mut distance) {
                    diags.push(d);
                }
            }
        }
        if diags.is_empty() {
            distances.push(distance);
            Ok(())
        } else {
            readings.pop();
            Err(diags)
        }
    }
}

/// Reads one cell of column `col` into the reading.
fn read_cell(
    col: Col,
    raw: &str,
    cell: &Cell,
    r: &mut Reading,
    distance: &mut Option<f64>,
) -> Result<(), Diagnostic> {
    match col {
        Col::Line if raw.is_empty() => Err(cell.error(
            "the line label is empty".into(),
            "label lines A, B, C … in port order",
        )),
        Col::Point => match raw.parse::<usize>() {
            Ok(p) if p >= 1 => {
                r.point = p;
                Ok(())
            }
            _ => Err(cell.error(
                format!("point is not a positive whole number: `{raw}`"),
                "points count from the near wall starting at 1",
            )),
        },
        Col::Dp(_) if raw.is_empty() => Err(cell.error(
            "differential pressure is missing".into(),
            "every point needs a reading; a point that could not be read must be re-read, not left out",
        )),
        Col::Dp(unit) => {
            let v = number_in(cell, raw, "differential pressure", unit)?;
            r.dp = to_dp(unit, v);
            r.dp_decimals = decimals(raw);
            // a column of a water-like fluid for the range check (the SG is applied later); the
            // range is wide enough for any gauge fluid
            let pa = match r.dp {
                Dp::Pressure { pa } => pa,
                Dp::Column { height_m } => height_m * 1000.0 * 9.80665,
            };
            crate::plausibility::VELOCITY_PRESSURE
                .check(pa)
                .map(|_| ())
                .map_err(|e| {
                    cell.error(
                        format!("differential pressure `{raw}`: {}", e.words_in(Some(unit))),
                        "a reading this large is a slipped decimal point or the wrong unit in the header",
                    )
                })
        }
        Col::Temperature(unit) if !raw.is_empty() => {
            let v = number_in(cell, raw, "temperature", unit)?;
            let k = convert_in(v, unit, Dimension::Temperature).unwrap_or(f64::NAN);
            if k <= 0.0 {
                Err(cell.error(
                    format!("temperature `{raw}` is below absolute zero"),
                    "check the unit in the header",
                ))
            } else if let Err(e) = crate::plausibility::GAS_TEMPERATURE.check(k) {
                Err(cell.error(
                    format!("temperature `{raw}`: {}", e.words_in(Some(unit))),
                    "check the number and the unit in the header",
                ))
            } else {
                r.temperature_k = Some(k);
                Ok(())
            }
        }
        Col::Yaw | Col::Pitch if !raw.is_empty() => {
            let v = number(cell, raw, "flow angle")?;
            if !(-90.0..=90.0).contains(&v) {
                return Err(cell.error(
                    format!("flow angle `{raw}` is outside -90 to 90 degrees"),
                    "record the null angle of the probe from the axial direction",
                ));
            }
            if col == Col::Yaw {
                r.yaw_deg = Some(v);
            } else {
                r.pitch_deg = Some(v);
            }
            Ok(())
        }
        Col::Static(unit) if !raw.is_empty() => {
            number_in(cell, raw, "static pressure", unit).map(|v| r.static_pa = Some(v * unit.factor))
        }
        Col::Time if !raw.is_empty() => {
            r.time = Some(raw.to_string());
            Ok(())
        }
        Col::Distance(unit) if !raw.is_empty() => {
            let m = number(cell, raw, "distance")? * unit.factor;
            if m > 0.0 && m < crate::plausibility::DUCT_DIMENSION.max {
                *distance = Some(m);
                Ok(())
            } else {
                Err(cell.error(
                    format!("distance from the wall `{raw}` is not a positive length"),
                    "measure each wall-effects point from the inside of the wall",
                ))
            }
        }
        _ => Ok(()),
    }
}

/// Parses a readings file in matrix form: `line,1,2,…,n`, one row per line, one quantity named by
/// `header` (e.g. `dp[inH2O]`).
pub fn parse_matrix(file: &str, text: &str, header: &str) -> Result<RunReadings, Error> {
    let unit = match parse_header(header) {
        Ok(Col::Dp(u)) => u,
        _ => {
            return Err(Error::input(
                Diagnostic::new(format!(
                    "a matrix readings file holds Δp; `{header}` is not a dp column"
                ))
                .at(Location::file(file))
                .hint("write matrix = \"dp[inH2O]\" (or another pressure unit) in the [[run]]"),
            ))
        }
    };
    let mut diags = Diagnostics::new();
    let mut rows = limited_rows(file, text)?.into_iter();
    let (header_line, headers) = header_record(file, rows.next())?;
    if let Some(e) = foreign_header(file, header_line, &headers) {
        return Err(e);
    }
    let mut points = Vec::new();
    for (i, h) in headers.iter().enumerate().skip(1) {
        match h.parse::<usize>() {
            Ok(p) if p >= 1 => points.push(p),
            _ => diags.push(
                Diagnostic::new(format!("matrix column header `{h}` is not a point number"))
                    .at(Location::at(file, 1, i + 1))
                    .hint("the header of a matrix file is `line,1,2,3,…`"),
            ),
        }
    }
    if headers.get(0) != Some("line") {
        diags.push(
            Diagnostic::new("the first column of a matrix file must be `line`")
                .at(Location::at(file, 1, 1)),
        );
    }
    if !diags.is_empty() {
        return Err(Error::Input(diags));
    }
    let cells = points.len().saturating_mul(rows.len());
    if cells > MAX_READING_ROWS {
        return Err(Error::input(
            Diagnostic::new(format!(
                "the matrix holds {cells} readings; annulus accepts at most {MAX_READING_ROWS} in one file"
            ))
            .at(Location::file(file))
            .hint("a matrix holds one row per traverse line and one column per point; check that the path names the right file"),
        ));
    }
    let mut readings = Vec::new();
    for (line_no, rec) in rows {
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
        if rec.len() != headers.len() {
            diags.push(
                Diagnostic::new(width_words(&rec, &headers)).at(Location::at(file, line_no, 1)),
            );
            continue;
        }
        let label = rec[0].to_string();
        for (k, &p) in points.iter().enumerate() {
            let raw = &rec[k + 1];
            let point = p.to_string();
            let cell = Cell {
                file,
                line: line_no,
                column: k + 2,
                header,
                line_label: &label,
                point: &point,
            };
            match number_in(&cell, raw, "differential pressure", unit) {
                Ok(v) => readings.push(Reading {
                    line: label.clone(),
                    point: p,
                    dp: to_dp(unit, v),
                    dp_decimals: decimals(raw),
                    temperature_k: None,
                    yaw_deg: None,
                    pitch_deg: None,
                    static_pa: None,
                    time: None,
                    source_line: line_no,
                }),
                Err(d) => diags.push(d),
            }
        }
    }
    diags.finish(RunReadings {
        dp_unit: Some(unit),
        file: file.to_string(),
        readings,
    })
}

/// The layout's label for a line as a reading writes it: the label itself in any case (`a` for
/// `A`), or its number counted from 1 (`2` for the second line).
fn layout_label<'l>(found: &str, labels: &'l [String]) -> Option<&'l String> {
    let found = found.trim();
    if let Some(l) = labels.iter().find(|l| l.eq_ignore_ascii_case(found)) {
        return Some(l);
    }
    let n: usize = found.parse().ok()?;
    labels.get(n.checked_sub(1)?)
}

/// Writes each reading's line label as the layout names it (`a` → `A`, `1` → `A`, `2` → `B` …).
/// Labels that match no line are one problem for the file, naming the labels found and those
/// expected, not one per reading.
pub fn label_lines(run: &mut RunReadings, layout: &Layout) -> Result<(), Diagnostic> {
    let labels = layout.line_labels();
    // (label as found, first line of the file it is on)
    let mut unknown: Vec<(String, usize)> = Vec::new();
    for r in &mut run.readings {
        match layout_label(&r.line, &labels) {
            // most sheets already write the layout's labels: nothing to copy
            Some(l) if *l == r.line => {}
            Some(l) => r.line = l.clone(),
            None if unknown.iter().any(|(u, _)| u == &r.line) => {}
            None => unknown.push((r.line.clone(), r.source_line)),
        }
    }
    let Some((_, first_line)) = unknown.first() else {
        return Ok(());
    };
    let quoted = |v: Vec<&str>| {
        v.iter()
            .map(|l| format!("`{l}`"))
            .collect::<Vec<_>>()
            .join(", ")
    };
    let found = quoted(unknown.iter().map(|(l, _)| l.as_str()).collect());
    Err(Diagnostic::new(format!(
        "line label{} {found} match{} no line of the layout, whose {} lines are {}",
        if unknown.len() == 1 { "" } else { "s" },
        if unknown.len() == 1 { "es" } else { "" },
        labels.len(),
        labels.join(", ")
    ))
    .at(Location::at(&run.file, *first_line, 1))
    .hint(format!(
        "label the lines {} in port order (any case), or number them 1 to {}; check [layout] lines in the survey",
        labels.join(", "),
        labels.len()
    )))
}

/// Checks that the readings cover the layout exactly: every point once, nothing else.
pub fn match_to_layout(run: &RunReadings, layout: &Layout) -> Result<(), Error> {
    let mut diags = Diagnostics::new();
    let mut seen = vec![None::<usize>; layout.total_points()];
    let points = layout.points();
    for (k, r) in run.readings.iter().enumerate() {
        let here = |p: &crate::layout::Point| p.line == r.line && p.point == r.point;
        // readings are usually written in layout order: the k-th point first, then a search
        // (a search per reading was quadratic in the points of a run)
        let idx = match points.get(k) {
            Some(p) if here(p) => Some(k),
            _ => points.iter().position(here),
        };
        match idx {
            None => diags.push(
                Diagnostic::new(format!(
                    "reading for line {}, point {} does not belong to the layout ({} lines {} of {} points)",
                    r.line,
                    r.point,
                    layout.lines(),
                    layout.line_labels().join(", "),
                    layout.points_per_line()
                ))
                .at(Location::at(&run.file, r.source_line, 1))
                .hint("check [layout] lines / points_per_line in the survey, or the line label"),
            ),
            Some(i) => {
                if let Some(first) = seen[i] {
                    diags.push(
                        Diagnostic::new(format!(
                            "line {}, point {} is read twice (first on line {first})",
                            r.line, r.point
                        ))
                        .at(Location::at(&run.file, r.source_line, 1))
                        .hint("keep one reading per point; a re-read replaces the first in the field sheet, not in the file"),
                    );
                } else {
                    seen[i] = Some(r.source_line);
                }
            }
        }
    }
    for (i, s) in seen.iter().enumerate() {
        if s.is_none() {
            let p = &layout.points()[i];
            diags.push(
                Diagnostic::new(format!("line {}, point {} has no reading", p.line, p.point))
                    .at(Location::file(&run.file))
                    .hint("every traverse point needs a reading"),
            );
        }
    }
    diags.finish(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn quoted_rows_keep_their_line_numbers() {
        // comments, a CRLF line end and a quoted field with a line break inside
        let text = "# sheet\r\nline,point,dp[Pa],time\r\n# after the header\nA,1,12,\"09:12\"\nA,2,13,\"note\nover two lines\"\n\nA,3,14,\"x\"\n";
        let lines: Vec<usize> = csv_rows(text, 100).iter().map(|(l, _)| *l).collect();
        assert_eq!(lines, vec![2, 4, 5, 8]);
    }

    /// The best of three timings of splitting `rows` quoted rows.
    fn split_time(rows: usize) -> std::time::Duration {
        let mut text = String::from("line,point,dp[Pa],time\n");
        for i in 0..rows {
            text += &format!("A,{},12.5,\"09:{:02}\"\n", i % 6 + 1, i % 60);
        }
        (0..3)
            .map(|_| {
                let t = std::time::Instant::now();
                let n = csv_rows(&text, usize::MAX).len();
                assert_eq!(n, rows + 1);
                t.elapsed()
            })
            .min()
            .unwrap()
    }

    #[test]
    fn quoted_csv_is_split_in_linear_time() {
        // 100,000 quoted rows took 47.6 s when each row's line was counted from the start
        let big = split_time(100_000);
        assert!(big < std::time::Duration::from_secs(5), "{big:?}");
        // ten times the rows, about ten times the time (quadratic would be a hundred)
        let small = split_time(10_000);
        let ratio = big.as_secs_f64() / small.as_secs_f64().max(1e-6);
        assert!(ratio < 35.0, "10× rows took {ratio:.1}× the time");
    }

    #[test]
    fn only_blank_sheets_hold_no_readings() {
        let blank = "line,point,dp[inH2O],temperature[F],yaw[deg]\nA,1,,,\nA,2,,,\n";
        assert!(!holds_readings(blank));
        assert!(!holds_readings(&format!("\u{feff}{blank}")));
        assert!(holds_readings(&blank.replace("A,2,,,", "A,2,0.51,,")));
        assert!(holds_readings(&blank.replace("A,2,,,", "A,2,,,3")));
        assert!(holds_readings(&format!("{blank}# re-read B line\n")));
        assert!(holds_readings("anything else\nat all\n"));
        assert!(!holds_readings(""));
    }

    fn err(text: &str) -> Diagnostics {
        match parse_rows("run-2.csv", text) {
            Err(Error::Input(d)) => d,
            other => panic!("accepted: {other:?}"),
        }
    }

    #[test]
    fn parses_rows_to_si() {
        let r = parse_rows(
            "r.csv",
            "line,point,dp[inH2O],temperature[F],yaw[deg]\nA,1,0.50,300,0\nA,2,0.55,302,5\n",
        )
        .unwrap();
        assert_eq!(r.readings.len(), 2);
        let Dp::Pressure { pa } = r.readings[1].dp else {
            panic!()
        };
        assert!((pa - 0.55 * 249.08891).abs() < 1e-6);
        assert_eq!(r.readings[1].yaw_deg, Some(5.0));
        assert_eq!(r.readings[1].source_line, 3);
        assert_eq!(r.readings[0].dp_decimals, 2);
    }

    #[test]
    fn bad_cell_is_located_exactly() {
        let d = err("line,point,dp[inH2O]\nA,1,0.5\nB,3,0.3l\n");
        assert_eq!(d.len(), 1);
        let text = d.items()[0].to_string();
        assert_eq!(
            text,
            "error: differential pressure is not a number: `0.3l`\n --> run-2.csv:3:3 (line B, point 3, column `dp[inH2O]`)\n   = hint: use `.` as the decimal separator; put units in the header, not the cell"
        );
    }

    #[test]
    fn header_problems() {
        let d = err("line,point,dp\nA,1,0.5\n");
        assert!(d.items()[0].message.contains("needs a unit"));
        let d = err("line,point,dp[inHg2]\nA,1,0.5\n");
        assert!(d.items()[0].message.contains("inHg2"));
        let d = err("line,pt,dp[Pa]\nA,1,0.5\n");
        assert!(d.to_string().contains("unknown column `pt`"));
        assert!(d.to_string().contains("no `point` column"));
    }

    #[test]
    fn collects_all_bad_cells_and_never_drops_quietly() {
        let d =
            err("line,point,dp[Pa],temperature[C]\nA,1,x,20\nA,two,5,20\nA,3,,20\nA,4,5,-300\n");
        assert_eq!(d.len(), 4, "{d}");
        assert!(d.to_string().contains("missing"));
    }

    #[test]
    fn a_sheet_not_filled_in_is_one_problem() {
        let d = err("line,point,dp[inH2O],temperature[F]\nA,1,,\nA,2,,\nB,1,,\nB,2,,\n");
        assert_eq!(d.len(), 1, "{d}");
        assert_eq!(
            d.items()[0].message,
            "the readings file is not filled in: all 4 rows have an empty Δp"
        );
        // one point left empty is still that point's own problem
        let d = err("line,point,dp[inH2O]\nA,1,0.5\nA,2,\n");
        assert_eq!(d.items()[0].message, "differential pressure is missing");
    }

    #[test]
    fn quoted_and_plain_files_read_the_same() {
        let plain = "# site note\nline,point,dp[Pa]\r\nA,1,5\n\nA,2, 6 \n";
        let quoted = "# site note\n\"line\",point,dp[Pa]\r\nA,1,\"5\"\n\nA,2, 6 \n";
        let a = parse_rows("r.csv", plain).unwrap();
        let b = parse_rows("r.csv", quoted).unwrap();
        assert_eq!(a.readings, b.readings);
        assert_eq!(a.readings[1].source_line, 5);
    }

    #[test]
    fn a_slipped_decimal_point_is_an_input_error_at_its_cell() {
        // 464 inH2O typed for 0.464: beyond any duct's velocity pressure (plausibility range)
        let d = err(
            "line,point,dp[inH2O],temperature[F]\nA,1,0.452,300\nA,2,464,300\nA,3,0.546,5000\n",
        );
        assert_eq!(d.len(), 2, "{d}");
        let first = &d.items()[0];
        assert!(
            first.message.contains("differential pressure `464`"),
            "{}",
            first.message
        );
        let loc = first.location.as_ref().unwrap();
        assert_eq!((loc.line, loc.column), (Some(3), Some(3)));
        assert!(loc
            .context
            .as_deref()
            .unwrap_or("")
            .contains("line A, point 2"));
        // 5000 °F is past any traversed gas
        assert!(d.items()[1].message.contains("temperature `5000`"));
        assert!(parse_rows("r.csv", "line,point,dp[inH2O]\nA,1,0.464\n").is_ok());
    }

    #[test]
    fn wall_effects_readings_need_their_distance() {
        let w = parse_wall(
            "w.csv",
            "line,point,distance[in],dp[inH2O]\nA,1,1,0.30\nA,1,2,0.38\n",
        )
        .unwrap();
        assert_eq!(w.readings.len(), 2);
        assert!((w.readings[1].distance_m - 0.0508).abs() < 1e-12);
        let Err(Error::Input(d)) = parse_wall("w.csv", "line,point,dp[inH2O]\nA,1,0.30\n") else {
            panic!("accepted")
        };
        assert!(d.to_string().contains("no `distance[…]` column"));
        // a traverse readings file takes no distance column
        let d = err("line,point,distance[in],dp[inH2O]\nA,1,1,0.30\n");
        assert!(d.to_string().contains("wall-effects readings file"));
    }

    #[test]
    fn gauge_column_is_kept_as_a_column() {
        let r = parse_rows("r.csv", "line,point,dp[in]\nA,1,0.5\n").unwrap();
        assert!(
            matches!(r.readings[0].dp, Dp::Column { height_m } if (height_m - 0.0127).abs() < 1e-12)
        );
    }

    #[test]
    fn matrix_form() {
        let r = parse_matrix(
            "m.csv",
            "line,1,2,3\nA,0.1,0.2,0.3\nB,0.4,0.5,0.6\n",
            "dp[inH2O]",
        )
        .unwrap();
        assert_eq!(r.readings.len(), 6);
        assert_eq!((r.readings[4].line.as_str(), r.readings[4].point), ("B", 2));
        assert!(parse_matrix("m.csv", "line,1\nA,0.1\n", "temperature[F]").is_err());
    }

    fn two_lines_of_two() -> Layout {
        use crate::geometry::Duct;
        use crate::layout::{locate_points, LayoutSpec, Method};
        let mut spec = LayoutSpec::new(Method::EqualArea);
        spec.lines = Some(2);
        spec.points_per_line = Some(2);
        locate_points(&Duct::round(1.0).unwrap(), &spec).unwrap()
    }

    /// Line labels as crews write them (common practice): the layout's letters in any case, or
    /// the lines numbered from 1 in port order.
    #[test]
    fn line_labels_in_any_case_or_by_number() {
        let layout = two_lines_of_two();
        for (text, form) in [
            (
                "line,point,dp[Pa]\na,1,5\na,2,5\nb,1,5\nb,2,5\n",
                "lower case",
            ),
            ("line,point,dp[Pa]\n1,1,5\n1,2,5\n2,1,5\n2,2,5\n", "numbers"),
            (
                "line,point,dp[Pa]\nA,1,5\nA,2,5\nB,1,5\nB,2,5\n",
                "as laid out",
            ),
        ] {
            let mut r = parse_rows("r.csv", text).unwrap();
            label_lines(&mut r, &layout).unwrap_or_else(|d| panic!("{form}: {d}"));
            let labels: Vec<&str> = r.readings.iter().map(|x| x.line.as_str()).collect();
            assert_eq!(labels, ["A", "A", "B", "B"], "{form}");
            assert!(match_to_layout(&r, &layout).is_ok(), "{form}");
        }
        // matrix files take the same labels
        let mut m = parse_matrix("m.csv", "line,1,2\n1,5,5\n2,5,5\n", "dp[Pa]").unwrap();
        label_lines(&mut m, &layout).unwrap();
        assert_eq!(m.readings[3].line, "B");
    }

    #[test]
    fn labels_that_match_no_line_are_one_problem() {
        let layout = two_lines_of_two();
        // three lines numbered on a two-line layout, and a stray label: one message for the file
        let mut r = parse_rows(
            "r.csv",
            "line,point,dp[Pa]\nX,1,5\nX,2,5\n1,1,5\n3,1,5\n3,2,5\nY,1,5\n",
        )
        .unwrap();
        let d = label_lines(&mut r, &layout).unwrap_err();
        assert_eq!(
            d.message,
            "line labels `X`, `3`, `Y` match no line of the layout, whose 2 lines are A, B"
        );
        let at = d.location.unwrap();
        assert_eq!((at.file.as_str(), at.line), ("r.csv", Some(2)));
        assert!(d.hint.unwrap().contains("number them 1 to 2"));
        // zero is not a line number
        let mut r = parse_rows("r.csv", "line,point,dp[Pa]\n0,1,5\n").unwrap();
        assert!(label_lines(&mut r, &layout)
            .unwrap_err()
            .message
            .starts_with("line label `0` matches no line"));
    }

    #[test]
    fn layout_matching_reports_missing_extra_and_duplicates() {
        use crate::geometry::Duct;
        use crate::layout::{locate_points, LayoutSpec, Method};
        let mut spec = LayoutSpec::new(Method::EqualArea);
        spec.lines = Some(1);
        spec.points_per_line = Some(2);
        let l = locate_points(&Duct::round(1.0).unwrap(), &spec).unwrap();
        let r = parse_rows("r.csv", "line,point,dp[Pa]\nA,1,5\nA,1,6\nB,1,5\n").unwrap();
        let Err(Error::Input(d)) = match_to_layout(&r, &l) else {
            panic!()
        };
        let s = d.to_string();
        assert!(s.contains("read twice"), "{s}");
        assert!(s.contains("does not belong"), "{s}");
        assert!(s.contains("point 2 has no reading"), "{s}");
        let ok = parse_rows("r.csv", "line,point,dp[Pa]\nA,2,5\nA,1,6\n").unwrap();
        assert!(match_to_layout(&ok, &l).is_ok());
    }
}
