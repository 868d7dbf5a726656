//! Reads a terminals CSV (grilles, registers, diffusers): tag, branch, design flow, and the
//! measured flow or the face velocity with the terminal's area factor. Header units name the flows'
//! basis; every bad cell is reported with file, line, column, the raw value and a hint.

use super::header::{Header, HeaderError};
use super::toml_doc::did_you_mean;
use crate::diag::{Diagnostic, Diagnostics, Error, Location};
use crate::limits::MAX_TERMINAL_ROWS;
use crate::system::{SpecError, SystemSpec, TerminalReading, TerminalSpec};
use crate::units::{convert_in, flow_basis, parse_number, Dimension, FlowBasis, Unit};

/// One terminals CSV column.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Col {
    Tag,
    Branch,
    Room,
    Type,
    Design(&'static Unit),
    Measured(&'static Unit),
    Velocity(&'static Unit),
    Area(&'static Unit),
}

fn terminal_column(h: &str) -> Result<Col, HeaderError> {
    let header = Header::parse(h)?;
    let plain = |col: Col| header.no_unit(None).map(|_| col);
    match header.name {
        "tag" => plain(Col::Tag),
        "branch" => plain(Col::Branch),
        "room" => plain(Col::Room),
        "type" => plain(Col::Type),
        "design" => Ok(Col::Design(header.unit_of(&[Dimension::Flow], "design[cfm]")?)),
        "measured" => Ok(Col::Measured(
            header.unit_of(&[Dimension::Flow], "measured[cfm]")?,
        )),
        "velocity" => Ok(Col::Velocity(
            header.unit_of(&[Dimension::Velocity], "velocity[fpm]")?,
        )),
        "area" => Ok(Col::Area(header.unit_of(&[Dimension::Area], "area[ft2]")?)),
        other => Err((
            format!("unknown column `{other}`"),
            match did_you_mean(other, &COLUMNS) {
                Some(c) => format!("did you mean `{c}`?"),
                None => "columns are tag, branch, design[…], and measured[…] or velocity[…] with area[…]; optionally room, type".into(),
            },
        )),
    }
}

/// The column names a terminals CSV takes.
const COLUMNS: [&str; 8] = [
    "tag", "branch", "room", "type", "design", "measured", "velocity", "area",
];

/// The terminals as read, and the line of each (for later problems).
#[derive(Debug, Clone, PartialEq)]
pub struct TerminalRows {
    pub terminals: Vec<TerminalSpec>,
    pub lines: Vec<usize>,
    /// Column of `branch` (1-based), to place an unknown branch.
    pub branch_column: usize,
}

const HINT_CELL: &str = "use `.` as the decimal separator; put units in the header, not the cell";

/// Parses a terminals CSV: `tag, branch, design[…]` and `measured[…]` or `velocity[…]` with
/// `area[…]` (the terminal's area factor); `room` and `type` optional.
pub fn parse_terminals(file: &str, text: &str) -> Result<TerminalRows, Error> {
    let (rows, diags) = read_terminals(file, text)?;
    diags.finish(rows)
}

/// [`parse_terminals`] that keeps the rows it could read beside the problems of the others, so
/// the caller can check those rows too before stopping. Header problems end the reading.
pub fn read_terminals(file: &str, text: &str) -> Result<(TerminalRows, Diagnostics), Error> {
    let empty = || {
        Error::input(
            Diagnostic::new("the terminals file has no readings")
                .at(Location::file(file))
                .hint("write a header such as `tag,branch,design[cfm],measured[cfm]` and one row per terminal"),
        )
    };
    let all = super::readings::csv_rows(text, MAX_TERMINAL_ROWS + 2);
    if all.len() > MAX_TERMINAL_ROWS + 1 {
        return Err(Error::input(
            Diagnostic::new(format!(
                "the terminals file has more than {MAX_TERMINAL_ROWS} rows; annulus accepts at most {MAX_TERMINAL_ROWS}"
            ))
            .at(Location::at(file, all[MAX_TERMINAL_ROWS + 1].0, 1))
            .hint("a terminals file holds one row per grille or diffuser; check that the path names the right file"),
        ));
    }
    let mut rows = all.into_iter();
    let (header_line, header) = match rows.next() {
        Some((l, Ok(h))) => (l, h),
        Some((l, Err(e))) => {
            return Err(Error::input(
                Diagnostic::new(format!("the terminals file cannot be read as CSV: {e}"))
                    .at(Location::at(file, l, 1)),
            ))
        }
        None => return Err(empty()),
    };
    let c = Columns::read(file, header_line, &header)?;
    let mut diags = Diagnostics::new();
    let mut terminals = Vec::new();
    let mut lines = Vec::new();
    for (line, rec) in rows {
        let rec = match rec {
            Ok(r) => r,
            Err(e) => {
                diags.push(
                    Diagnostic::new(format!("this row cannot be read as CSV: {e}"))
                        .at(Location::at(file, line, 1)),
                );
                continue;
            }
        };
        let at = RowPlace {
            file,
            line,
            header: &header,
        };
        if let Some(t) = c.terminal(&at, &rec, &mut diags) {
            terminals.push(t);
            lines.push(line);
        }
    }
    if terminals.is_empty() && diags.is_empty() {
        return Err(empty());
    }
    Ok((
        TerminalRows {
            terminals,
            lines,
            branch_column: c.branch.map(|i| i + 1).unwrap_or(1),
        },
        diags,
    ))
}

/// The columns a terminals header names, checked together, and the basis of its flows.
struct Columns {
    cols: Vec<Col>,
    tag: Option<usize>,
    branch: Option<usize>,
    design: Option<usize>,
    measured: Option<usize>,
    velocity: Option<usize>,
    area: Option<usize>,
    basis: FlowBasis,
}

/// Where a data row is: its file, line and the header naming its columns.
struct RowPlace<'a> {
    file: &'a str,
    line: usize,
    header: &'a super::readings::Cells<'a>,
}

impl Columns {
    /// Reads and checks the header: every problem of it in one pass.
    fn read(
        file: &str,
        header_line: usize,
        header: &super::readings::Cells,
    ) -> Result<Columns, Error> {
        let mut diags = Diagnostics::new();
        let mut cols = Vec::new();
        for (i, h) in header.iter().enumerate() {
            match terminal_column(h) {
                Ok(c) => cols.push(c),
                Err((msg, hint)) => diags.push(
                    Diagnostic::new(msg)
                        .at(Location::at(file, header_line, i + 1)
                            .with_context(format!("header `{h}`")))
                        .hint(hint),
                ),
            }
        }
        if !diags.is_empty() {
            return Err(Error::Input(diags));
        }
        let find = |f: fn(&Col) -> bool| cols.iter().position(f);
        let mut c = Columns {
            tag: find(|c| matches!(c, Col::Tag)),
            branch: find(|c| matches!(c, Col::Branch)),
            design: find(|c| matches!(c, Col::Design(_))),
            measured: find(|c| matches!(c, Col::Measured(_))),
            velocity: find(|c| matches!(c, Col::Velocity(_))),
            area: find(|c| matches!(c, Col::Area(_))),
            cols: cols.clone(),
            basis: FlowBasis::Actual,
        };
        let header_error = |msg: &str, hint: &str| {
            Diagnostic::new(msg.to_string())
                .at(Location::at(file, header_line, 1).with_context("header"))
                .hint(hint.to_string())
        };
        for (missing, name) in [
            (c.tag.is_none(), "tag"),
            (c.branch.is_none(), "branch"),
            (c.design.is_none(), "design[…]"),
        ] {
            if missing {
                diags.push(header_error(
                    &format!("the terminals file has no `{name}` column"),
                    "columns are tag, branch, design[…], and measured[…] or velocity[…] with area[…]",
                ));
            }
        }
        if c.measured.is_none() && (c.velocity.is_none() || c.area.is_none()) {
            diags.push(header_error(
                "the terminals file needs `measured[…]`, or `velocity[…]` and `area[…]`",
                "a capture-hood reading goes in measured[cfm]; a face velocity in velocity[fpm] with the terminal's area factor in area[ft2]",
            ));
        }
        if c.velocity.is_some() != c.area.is_some() {
            diags.push(header_error(
                "`velocity[…]` and `area[…]` go together",
                "the flow is the face velocity times the terminal's area factor",
            ));
        }
        // Every terminal flow is on the design's basis: the measured column must name the same
        // one, and velocity × area is an actual flow.
        c.basis = c
            .unit(c.design)
            .and_then(flow_basis)
            .unwrap_or(FlowBasis::Actual);
        if let (Some(mi), Some(mu)) = (c.measured, c.unit(c.measured)) {
            let mb = flow_basis(mu).unwrap_or(FlowBasis::Actual);
            if mb != c.basis {
                diags.push(
                    Diagnostic::new(format!(
                        "the measured flows are {} but the designs are {}",
                        mb.words(),
                        c.basis.words()
                    ))
                    .at(Location::at(file, header_line, mi + 1)
                        .with_context(format!("header `{}`", &header[mi])))
                    .hint("give design and measured flows in units of the same basis (cfm and cfm, or scfm and scfm)"),
                );
            }
        }
        if let Some(vi) = c.velocity {
            if c.basis != FlowBasis::Actual {
                diags.push(
                    Diagnostic::new(format!(
                        "velocity × area gives actual flow but the designs are {}",
                        c.basis.words()
                    ))
                    .at(Location::at(file, header_line, vi + 1)
                        .with_context(format!("header `{}`", &header[vi])))
                    .hint("write the designs in an actual-flow unit (cfm, m3/h, L/s)"),
                );
            }
        }
        diags.finish(c)
    }

    /// The unit a quantity column names.
    fn unit(&self, i: Option<usize>) -> Option<&'static Unit> {
        match i.map(|i| self.cols[i]) {
            Some(Col::Design(u) | Col::Measured(u) | Col::Velocity(u) | Col::Area(u)) => Some(u),
            _ => None,
        }
    }

    /// One data row as a terminal, or `None` with its problems added to `diags`.
    fn terminal(
        &self,
        at: &RowPlace<'_>,
        rec: &super::readings::Cells,
        diags: &mut Diagnostics,
    ) -> Option<TerminalSpec> {
        let (file, line, header) = (at.file, at.line, at.header);
        let cell = |i: Option<usize>| i.and_then(|i| rec.get(i)).unwrap_or("").trim();
        let tag = cell(self.tag).to_string();
        let who = if tag.is_empty() {
            String::new()
        } else {
            format!("terminal {tag}, ")
        };
        let mut row_ok = true;
        let mut number = |i: Option<usize>, what: &str, dim: Dimension| -> Option<f64> {
            let i = i?;
            let raw = cell(Some(i));
            if raw.is_empty() {
                return None;
            }
            let unit = self.unit(Some(i))?;
            match parse_number(raw).filter(|v| v.is_finite() && !raw.contains('/')) {
                Some(v) if v >= 0.0 => convert_in(v, unit, dim).ok(),
                Some(_) => {
                    row_ok = false;
                    diags.push(
                        Diagnostic::new(format!("{what} cannot be negative: `{raw}`"))
                            .at(Location::at(file, line, i + 1)
                                .with_context(format!("{who}column `{}`", &header[i])))
                            .hint("a terminal's flow, velocity and area are positive"),
                    );
                    None
                }
                None => {
                    row_ok = false;
                    diags.push(
                        Diagnostic::new(format!("{what} is not a number: `{raw}`"))
                            .at(Location::at(file, line, i + 1)
                                .with_context(format!("{who}column `{}`", &header[i])))
                            .hint(HINT_CELL),
                    );
                    None
                }
            }
        };
        let design = number(self.design, "the design flow", Dimension::Flow);
        let measured = number(self.measured, "the measured flow", Dimension::Flow);
        let velocity = number(self.velocity, "the face velocity", Dimension::Velocity);
        let area = number(self.area, "the area factor", Dimension::Area);
        let place = |i: Option<usize>| {
            Location::at(file, line, i.map(|i| i + 1).unwrap_or(1)).with_context(format!(
                "{who}column `{}`",
                i.map(|i| &header[i]).unwrap_or("")
            ))
        };
        if tag.is_empty() {
            diags.push(
                Diagnostic::new("a terminal has no tag")
                    .at(place(self.tag))
                    .hint("give each terminal its tag as drawn, e.g. `D-101`"),
            );
            row_ok = false;
        }
        let branch = cell(self.branch).to_string();
        if branch.is_empty() {
            diags.push(
                Diagnostic::new("a terminal does not say which duct serves it")
                    .at(place(self.branch))
                    .hint("write the tag of the branch (a duct of the system file) in `branch`"),
            );
            row_ok = false;
        }
        if design.is_none() && row_ok && cell(self.design).is_empty() {
            diags.push(
                Diagnostic::new("a terminal has no design flow")
                    .at(place(self.design))
                    .hint("fill in the design airflow from the drawings"),
            );
            row_ok = false;
        }
        let reading = match (measured, velocity, area) {
            (Some(q), _, _) => Some(TerminalReading::Flow { flow_m3_s: q }),
            (None, Some(v), Some(a)) => Some(TerminalReading::VelocityArea {
                velocity_m_s: v,
                area_m2: a,
            }),
            _ => None,
        };
        if reading.is_none() && row_ok {
            diags.push(
                Diagnostic::new(
                    "a terminal has no reading: no measured flow, or no velocity and area",
                )
                .at(place(self.measured.or(self.velocity)))
                .hint("fill in the measured flow, or the face velocity and the area factor"),
            );
            row_ok = false;
        }
        let find = |f: fn(&Col) -> bool| self.cols.iter().position(f);
        let text = |i: Option<usize>| Some(cell(i)).filter(|s| !s.is_empty()).map(String::from);
        match (row_ok, design, reading) {
            (true, Some(design), Some(reading)) => Some(TerminalSpec {
                tag,
                branch,
                room: text(find(|c| matches!(c, Col::Room))),
                kind: text(find(|c| matches!(c, Col::Type))),
                design_flow_m3_s: design,
                basis: self.basis,
                reading,
            }),
            _ => None,
        }
    }
}

/// The located diagnostic for a terminal problem [`crate::system::validate`] found (`None` for
/// other problems).
pub fn locate_terminal_error(
    file: &str,
    spec: &SystemSpec,
    rows: &TerminalRows,
    e: &SpecError,
) -> Option<Diagnostic> {
    match e {
        SpecError::TerminalBranchUnknown { index } => {
            let t = &spec.terminals[*index];
            let tags: Vec<&str> = spec.ducts.iter().map(|d| d.tag.as_str()).collect();
            Some(
                Diagnostic::new(format!(
                    "terminal `{}` is on `{}`, which is not a duct of the system file",
                    t.tag, t.branch
                ))
                .at(Location::at(file, rows.lines[*index], rows.branch_column)
                    .with_context(format!("terminal {}, column `branch`", t.tag)))
                .hint(match did_you_mean(&t.branch, &tags) {
                    Some(c) => format!("did you mean `{c}`?"),
                    None => format!("the ducts are: {}", tags.join(", ")),
                }),
            )
        }
        SpecError::TerminalValueNotPositive { index } => {
            let t = &spec.terminals[*index];
            Some(
                Diagnostic::new(format!(
                    "terminal `{}` has a design flow or an area factor of zero",
                    t.tag
                ))
                .at(Location::at(file, rows.lines[*index], 1)
                    .with_context(format!("terminal {}", t.tag)))
                .hint("a design flow and an area factor are positive"),
            )
        }
        SpecError::DuplicateTerminal { index, first } => {
            let t = &spec.terminals[*index];
            Some(
                Diagnostic::new(format!("two terminals are tagged `{}`", t.tag))
                    .at(Location::at(file, rows.lines[*index], 1)
                        .with_context(format!("terminal {}", t.tag)))
                    .hint(format!(
                        "the first is on line {}; give every terminal its own tag",
                        rows.lines[*first]
                    )),
            )
        }
        _ => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn at(d: &Diagnostic) -> (usize, usize) {
        let l = d.location.as_ref().expect("located");
        (l.line.unwrap_or(0), l.column.unwrap_or(0))
    }

    const CSV: &str = "tag,branch,room,design[cfm],measured[cfm],velocity[fpm],area[ft2]\n\
D-1,SA-1,101,250,262,,\n\
# a comment line\n\
D-2,SA-1,102,250,,480,0.55\n";

    #[test]
    fn terminals_read_flows_and_velocity_times_area() {
        let rows = parse_terminals("t.csv", CSV).expect("valid");
        assert_eq!(rows.terminals.len(), 2);
        assert_eq!(rows.lines, vec![2, 4]);
        let cfm = 0.028_316_846_592 / 60.0;
        assert!((rows.terminals[0].reading.flow_m3_s() - 262.0 * cfm).abs() < 1e-12);
        // 480 fpm × 0.55 ft² = 264 cfm
        assert!((rows.terminals[1].reading.flow_m3_s() - 264.0 * cfm).abs() < 1e-12);
        assert_eq!(rows.terminals[1].room.as_deref(), Some("102"));
    }

    #[test]
    fn terminal_problems_are_located_by_cell() {
        let csv = "tag,branch,design[cfm],measured[cfm]\nD-1,SA-1,250,26x\nD-2,,250,240\n";
        let e = match parse_terminals("t.csv", csv) {
            Err(Error::Input(d)) => d.items().to_vec(),
            other => panic!("{other:?}"),
        };
        assert_eq!(e.len(), 2);
        assert_eq!(at(&e[0]), (2, 4));
        assert!(e[0].message.contains("`26x`"));
        assert_eq!(at(&e[1]), (3, 2));
        let csv = "tag,branch,design[scfm],velocity[fpm],area[ft2]\nD-1,SA-1,250,480,0.5\n";
        let e = match parse_terminals("t.csv", csv) {
            Err(Error::Input(d)) => d.items().to_vec(),
            other => panic!("{other:?}"),
        };
        assert!(e[0].message.contains("actual flow"), "{}", e[0].message);
        assert_eq!(at(&e[0]), (1, 4));
    }
}
