//! Output formats and a small aligned-table printer.

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

/// A table: header, rows, right-aligned numeric columns.
#[derive(Debug, Default)]
pub struct Table {
    header: Vec<String>,
    rows: Vec<Vec<String>>,
    right: Vec<bool>,
}

impl Table {
    pub fn new(header: &[&str]) -> Table {
        Table {
            header: header.iter().map(|s| s.to_string()).collect(),
            rows: Vec::new(),
            right: vec![false; header.len()],
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

    pub fn row(&mut self, cells: Vec<String>) {
        self.rows.push(cells);
    }

    pub fn render(&self) -> String {
        let n = self.header.len();
        let mut w = vec![0; n];
        for r in std::iter::once(&self.header).chain(&self.rows) {
            for (i, c) in r.iter().enumerate().take(n) {
                w[i] = w[i].max(visible_len(c));
            }
        }
        let mut out = String::new();
        let line = |cells: &Vec<String>, out: &mut String| {
            let mut s = String::new();
            for (i, width) in w.iter().enumerate() {
                let c = cells.get(i).map(String::as_str).unwrap_or("");
                let pad = width.saturating_sub(visible_len(c));
                if i > 0 {
                    s.push_str("  ");
                }
                if self.right[i] {
                    s.push_str(&" ".repeat(pad));
                    s.push_str(c);
                } else {
                    s.push_str(c);
                    if i + 1 < n {
                        s.push_str(&" ".repeat(pad));
                    }
                }
            }
            out.push_str(s.trim_end());
            out.push('\n');
        };
        line(&self.header, &mut out);
        let rule: Vec<String> = w.iter().map(|&k| "-".repeat(k)).collect();
        line(&rule, &mut out);
        for r in &self.rows {
            line(r, &mut out);
        }
        out
    }
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
    fn csv_quotes() {
        let s = csv_text(&["a", "b"], &[vec!["x,y".into(), "1".into()]]);
        assert_eq!(s, "a,b\n\"x,y\",1\n");
    }
}
