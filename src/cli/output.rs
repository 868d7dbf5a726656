//! Output formats, the display units a screen uses, the terminal width, and an aligned-table
//! printer that fits that width.

use crate::display::{DisplayTable, UnitSystem};
use std::io::IsTerminal;

/// How results are printed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    Table,
    Json,
    Csv,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum ColorChoice {
    Auto,
    Always,
    Never,
}

impl ColorChoice {
    pub fn enabled(self) -> bool {
        match self {
            ColorChoice::Always => true,
            ColorChoice::Never => false,
            ColorChoice::Auto => {
                std::io::stdout().is_terminal() && std::env::var_os("NO_COLOR").is_none()
            }
        }
    }
}

/// Settings every command's printing shares.
#[derive(Debug, Clone, Copy)]
pub struct Ctx {
    pub quiet: bool,
    pub color: bool,
    /// Columns a screen fits in ([`terminal_width`]).
    pub width: usize,
}

/// Width when standard output is not a terminal and `COLUMNS` is not set.
pub const DEFAULT_WIDTH: usize = 100;
/// Narrowest width tables are fitted to (narrower terminals wrap the lines themselves).
const MIN_WIDTH: usize = 40;

/// The columns of the terminal on standard output; else `COLUMNS`; else [`DEFAULT_WIDTH`].
pub fn terminal_width() -> usize {
    let tty = std::io::stdout()
        .is_terminal()
        .then(|| {
            console::Term::stdout()
                .size_checked()
                .map(|(_, c)| c as usize)
        })
        .flatten();
    let env = || {
        std::env::var("COLUMNS")
            .ok()
            .and_then(|c| c.trim().parse::<usize>().ok())
    };
    tty.or_else(env)
        .filter(|w| *w > 0)
        .unwrap_or(DEFAULT_WIDTH)
        .max(MIN_WIDTH)
}

/// `--si` and `--units`: which units a screen prints in. JSON is SI whatever they say.
#[derive(Debug, Clone, Default, clap::Args)]
pub struct UnitsArgs {
    /// Print in SI units (mm, Pa, kPa, °C, m/s, m³/h) whatever the job's units.
    #[arg(long, conflicts_with = "units")]
    pub si: bool,
    /// Print in these units instead of the job's own (inch-pound for epa-method-2 and hvac-ip,
    /// EPA metric for a survey reduced in metric, SI for iso-16911 and hvac-si).
    #[arg(long, value_name = "SYSTEM", value_parser = units_parser())]
    pub units: Option<UnitSystem>,
}

fn units_parser() -> impl clap::builder::TypedValueParser<Value = UnitSystem> {
    use clap::builder::TypedValueParser;
    clap::builder::PossibleValuesParser::new(UnitSystem::ALL.map(UnitSystem::name))
        // the possible values are exactly the names `parse` knows
        .map(|s| UnitSystem::parse(&s).unwrap_or(UnitSystem::Si))
}

impl UnitsArgs {
    /// The system asked for, if any.
    pub fn system(&self) -> Option<UnitSystem> {
        if self.si {
            Some(UnitSystem::Si)
        } else {
            self.units
        }
    }

    /// The job's table, or the same table in the system asked for.
    pub fn table(&self, job: DisplayTable) -> DisplayTable {
        match self.system() {
            Some(system) => DisplayTable { system, ..job },
            None => job,
        }
    }
}

/// Status words, coloured when asked; the words themselves carry the meaning (never colour alone).
pub fn status(word: &str, color: bool) -> String {
    if !color {
        return word.to_string();
    }
    let code = match word {
        "pass" => "32",
        "warn" => "33",
        "fail" => "1;31",
        _ => "2",
    };
    format!("\x1b[{code}m{word}\x1b[0m")
}

fn visible_len(s: &str) -> usize {
    let mut n = 0;
    let mut in_esc = false;
    for c in s.chars() {
        if in_esc {
            if c == 'm' {
                in_esc = false;
            }
        } else if c == '\x1b' {
            in_esc = true;
        } else {
            n += 1;
        }
    }
    n
}

/// A table: header, rows, right-aligned numeric columns, and text columns that may wrap.
///
/// [`Table::fit`] fits it to a width: first text columns wrap at spaces, then headings break at
/// spaces, and if the numbers alone are still too wide the table is printed in panels, each
/// repeating the first column. Numbers are never cut.
#[derive(Debug, Default)]
pub struct Table {
    header: Vec<String>,
    rows: Vec<Vec<String>>,
    right: Vec<bool>,
    wrap: Vec<bool>,
}

const GAP: usize = 2;
/// A wrapping column is not made narrower than this (or its longest word, if longer).
const MIN_WRAP: usize = 16;

impl Table {
    pub fn new(header: &[&str]) -> Table {
        Table {
            header: header.iter().map(|s| s.to_string()).collect(),
            rows: Vec::new(),
            right: vec![false; header.len()],
            wrap: vec![false; header.len()],
        }
    }

    /// Right-aligns the given columns (numbers).
    pub fn right(mut self, cols: &[usize]) -> Table {
        for &c in cols {
            if c < self.right.len() {
                self.right[c] = true;
            }
        }
        self
    }

    /// Lets the given text columns wrap at spaces when the table is fitted to a width.
    pub fn wrap(mut self, cols: &[usize]) -> Table {
        for &c in cols {
            if c < self.wrap.len() {
                self.wrap[c] = true;
            }
        }
        self
    }

    pub fn row(&mut self, cells: Vec<String>) {
        self.rows.push(cells);
    }

    /// The table at its natural width (nothing wrapped).
    pub fn render(&self) -> String {
        self.fit(usize::MAX)
    }

    /// The table fitted to `width` columns.
    pub fn fit(&self, width: usize) -> String {
        let n = self.header.len();
        fn cell(r: &[String], i: usize) -> &str {
            r.get(i).map(String::as_str).unwrap_or("")
        }
        let longest_word = |s: &str| {
            units_kept_with_numbers(s)
                .iter()
                .map(|w| visible_len(w))
                .max()
                .unwrap_or(0)
        };
        let mut natural = vec![0; n];
        let mut min = vec![0; n];
        for i in 0..n {
            let cells = self.rows.iter().map(|r| cell(r, i));
            let widest = cells.clone().map(visible_len).max().unwrap_or(0);
            natural[i] = widest.max(visible_len(&self.header[i]));
            let head = longest_word(&self.header[i]);
            min[i] = if self.wrap[i] {
                let word = cells.map(longest_word).max().unwrap_or(0);
                head.max(word).max(MIN_WRAP.min(natural[i]))
            } else {
                head.max(widest)
            };
        }
        let total = |w: &[usize]| w.iter().sum::<usize>() + GAP * w.len().saturating_sub(1);
        let mut w = natural.clone();
        let now = total(&w);
        if now > width {
            // text columns wrap first, the widest first
            shrink(&mut w, &min, width, now, |i| self.wrap[i]);
        }
        let now = total(&w);
        if now > width {
            // then headings break at their spaces
            shrink(&mut w, &min, width, now, |i| !self.wrap[i]);
        }
        if total(&w) <= width || n <= 1 {
            return self.render_columns(&(0..n).collect::<Vec<_>>(), &w);
        }
        // still too wide: panels of columns, each led by the first column
        let mut out = String::new();
        let mut panel = vec![0];
        for i in 1..n {
            let used = total(&panel.iter().map(|&c| w[c]).collect::<Vec<_>>());
            if panel.len() > 1 && used + GAP + w[i] > width {
                out += &self.render_columns(&panel, &w);
                out.push('\n');
                panel = vec![0];
            }
            panel.push(i);
        }
        out += &self.render_columns(&panel, &w);
        out
    }

    fn render_columns(&self, cols: &[usize], w: &[usize]) -> String {
        let mut out = String::new();
        let emit = |cells: Vec<Vec<String>>, out: &mut String| {
            let height = cells.iter().map(Vec::len).max().unwrap_or(1).max(1);
            for k in 0..height {
                let mut s = String::new();
                for (j, &c) in cols.iter().enumerate() {
                    let text = cells[j].get(k).map(String::as_str).unwrap_or("");
                    let pad = w[c].saturating_sub(visible_len(text));
                    if j > 0 {
                        s.push_str(&" ".repeat(GAP));
                    }
                    if self.right[c] {
                        s.push_str(&" ".repeat(pad));
                        s.push_str(text);
                    } else {
                        s.push_str(text);
                        s.push_str(&" ".repeat(pad));
                    }
                }
                out.push_str(s.trim_end());
                out.push('\n');
            }
        };
        let lines = |text: &str, c: usize| {
            if visible_len(text) <= w[c] {
                vec![text.to_string()]
            } else {
                wrap_words(text, w[c])
            }
        };
        emit(
            cols.iter().map(|&c| lines(&self.header[c], c)).collect(),
            &mut out,
        );
        emit(
            cols.iter().map(|&c| vec!["-".repeat(w[c])]).collect(),
            &mut out,
        );
        for r in &self.rows {
            emit(
                cols.iter()
                    .map(|&c| lines(r.get(c).map(String::as_str).unwrap_or(""), c))
                    .collect(),
                &mut out,
            );
        }
        out
    }
}

/// Narrows the columns `which` accepts, widest first, toward their minimum, until the table
/// fits `width` or none can give more.
fn shrink(
    w: &mut [usize],
    min: &[usize],
    width: usize,
    mut total: usize,
    which: impl Fn(usize) -> bool,
) {
    while total > width {
        let Some(i) = (0..w.len())
            .filter(|&i| which(i) && w[i] > min[i])
            .max_by_key(|&i| w[i])
        else {
            return;
        };
        // give up to the excess, but not below the minimum or the next-widest column
        let next = (0..w.len())
            .filter(|&j| j != i && which(j) && w[j] > min[j])
            .map(|j| w[j])
            .max()
            .unwrap_or(0);
        let step = (total - width).min(w[i] - min[i]).min((w[i] - next).max(1));
        w[i] -= step;
        total -= step;
    }
}

/// Words of `text` in lines of at most `width` columns (a word longer than that is split).
pub fn wrap_words(text: &str, width: usize) -> Vec<String> {
    wrap_lines(text, width, width)
}

/// Words of `text` in lines: the first at most `first` columns, the others `rest`.
fn wrap_lines(text: &str, first: usize, rest: usize) -> Vec<String> {
    let mut lines: Vec<String> = Vec::new();
    let mut line = String::new();
    let width = |lines: &Vec<String>| if lines.is_empty() { first } else { rest }.max(1);
    for word in units_kept_with_numbers(text) {
        let needed = if line.is_empty() {
            visible_len(&word)
        } else {
            visible_len(&line) + 1 + visible_len(&word)
        };
        if needed <= width(&lines) {
            if !line.is_empty() {
                line.push(' ');
            }
            line.push_str(&word);
            continue;
        }
        if !line.is_empty() {
            lines.push(std::mem::take(&mut line));
        }
        let mut chars: Vec<char> = word.chars().collect();
        while chars.len() > width(&lines) {
            let w = width(&lines);
            lines.push(chars.drain(..w).collect());
        }
        line = chars.into_iter().collect();
    }
    if !line.is_empty() || lines.is_empty() {
        lines.push(line);
    }
    lines
}

/// The words of `text`, with a short word after a number kept with it (`609.6 mm`, `12 %`), so
/// a line never ends between a number and its unit.
fn units_kept_with_numbers(text: &str) -> Vec<String> {
    let mut words: Vec<String> = Vec::new();
    for w in text.split(' ').filter(|w| !w.is_empty()) {
        let after_number = words
            .last()
            .and_then(|p| p.chars().last())
            .is_some_and(|c| c.is_ascii_digit());
        let unit_like = w.chars().count() <= 6 && !w.starts_with(|c: char| c.is_ascii_digit());
        match words.last_mut() {
            Some(prev) if after_number && unit_like => {
                prev.push(' ');
                prev.push_str(w);
            }
            _ => words.push(w.to_string()),
        }
    }
    words
}

/// `lead` then `text` fitted to `width`, continuation lines indented under the text. Ends with
/// a newline.
pub fn paragraph(lead: &str, text: &str, width: usize) -> String {
    let indent = visible_len(lead);
    let room = width.saturating_sub(indent).max(MIN_WRAP);
    let mut out = String::new();
    for (i, l) in wrap_lines(text, room, room).iter().enumerate() {
        out.push_str(&if i == 0 {
            lead.to_string()
        } else {
            " ".repeat(indent)
        });
        out.push_str(l);
        out.push('\n');
    }
    out
}

/// CSV text from a header and rows (the csv crate quotes what needs quoting).
pub fn csv_text(header: &[&str], rows: &[Vec<String>]) -> String {
    let mut w = csv::Writer::from_writer(Vec::new());
    let _ = w.write_record(header);
    for r in rows {
        let _ = w.write_record(r);
    }
    String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
}

/// JSON text, pretty-printed, with a final newline.
pub fn json_text<T: serde::Serialize>(value: &T) -> String {
    let mut s =
        serde_json::to_string_pretty(value).unwrap_or_else(|e| format!("{{\"error\": \"{e}\"}}"));
    s.push('\n');
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn table_aligns_and_ignores_colour_codes() {
        let mut t = Table::new(&["a", "value"]).right(&[1]);
        t.row(vec!["x".into(), "1.5".into()]);
        t.row(vec![status("fail", true), "10.25".into()]);
        let r = t.render();
        let lines: Vec<&str> = r.lines().collect();
        assert_eq!(lines[0], "a     value");
        assert_eq!(lines[2], "x       1.5");
        assert!(lines[3].ends_with(" 10.25"));
    }

    #[test]
    fn text_columns_wrap_to_the_width_and_numbers_stay_whole() {
        let mut t = Table::new(&["status", "finding"]).wrap(&[1]);
        t.row(vec![
            "pass".into(),
            "mean |yaw| 4.5833° over 24 points, limit 20°, and more words after that".into(),
        ]);
        let r = t.fit(40);
        for l in r.lines() {
            assert!(visible_len(l) <= 40, "{l:?} is wider than 40");
        }
        assert!(r.contains("4.5833°") && r.contains("20°,"), "{r}");
        assert_eq!(r.lines().next().unwrap(), "status  finding");
        // the continuation line starts under the text column
        assert!(r.lines().nth(3).unwrap().starts_with("        "), "{r}");
    }

    #[test]
    fn headings_break_then_panels_repeat_the_first_column() {
        let mut t = Table::new(&[
            "run",
            "Q actual [m³/h]",
            "Q std wet [m³/h]",
            "Q std dry [m³/h]",
        ])
        .right(&[1, 2, 3]);
        t.row(vec![
            "average".into(),
            "234429".into(),
            "154302".into(),
            "128379".into(),
        ]);
        // headings break at their spaces; no number is cut
        let r = t.fit(40);
        assert!(r.lines().all(|l| visible_len(l) <= 40), "{r}");
        assert!(r.contains("234429") && r.contains("128379"), "{r}");
        assert!(r.lines().next().unwrap().contains("Q actual"), "{r}");
        // narrower than the numbers need: panels, each led by the first column
        let p = t.fit(16);
        assert_eq!(p.matches("average").count(), 3, "{p}");
        assert!(p.contains("234429") && p.contains("154302") && p.contains("128379"));
    }

    #[test]
    fn paragraphs_indent_their_continuation() {
        let p = paragraph(
            "run 1: ",
            "Bws 9.80 % (given moisture), Ms 28.842 lb/lb-mol",
            30,
        );
        assert_eq!(
            p,
            "run 1: Bws 9.80 % (given\n       moisture), Ms 28.842\n       lb/lb-mol\n"
        );
    }

    #[test]
    fn csv_quotes() {
        let s = csv_text(&["a", "b"], &[vec!["x,y".into(), "1".into()]]);
        assert_eq!(s, "a,b\n\"x,y\",1\n");
    }
}
