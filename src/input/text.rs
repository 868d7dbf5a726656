//! Byte offsets to 1-based line and column, the one place positions are converted.

use crate::diag::Location;

pub use toml::Spanned;

/// The 1-based line and column (in characters) of byte `offset` in `text`.
pub fn line_column(text: &str, offset: usize) -> (usize, usize) {
    let offset = offset.min(text.len());
    let before = &text[..text.floor_char_boundary(offset)];
    // counted byte by byte (a newline is one byte in UTF-8): the compiler vectorises this
    let line = before.bytes().filter(|&b| b == b'\n').count() + 1;
    let line_start = before
        .bytes()
        .rposition(|b| b == b'\n')
        .map(|i| i + 1)
        .unwrap_or(0);
    let column = before[line_start..].chars().count() + 1;
    (line, column)
}

/// Where the lines of a text start, for many [`line_column`] look-ups in one text (a survey
/// locates each run's readings file whether or not it can be read).
#[derive(Debug, Clone, Default)]
pub struct LineStarts(Vec<usize>);

impl LineStarts {
    pub fn of(text: &str) -> LineStarts {
        let mut starts = vec![0];
        starts.extend(
            text.bytes()
                .enumerate()
                .filter(|(_, b)| *b == b'\n')
                .map(|(i, _)| i + 1),
        );
        LineStarts(starts)
    }

    /// [`line_column`] of `offset` in `text` (the text this was made of).
    pub fn line_column(&self, text: &str, offset: usize) -> (usize, usize) {
        let offset = text.floor_char_boundary(offset.min(text.len()));
        // the last line start at or before the offset
        let line = self.0.partition_point(|&s| s <= offset);
        let start = self.0[line - 1];
        (line, text[start..offset].chars().count() + 1)
    }
}

/// A TOML value as the text a user wrote: strings unquoted, dates and numbers as printed.
pub fn toml_text(v: &toml::Value) -> String {
    match v {
        toml::Value::String(s) => s.clone(),
        toml::Value::Datetime(d) => d.to_string(),
        other => other.to_string(),
    }
}

/// A date written `YYYY-MM-DD` (as a TOML string or a bare TOML date); the text and the date.
pub fn toml_date(v: &toml::Value) -> (String, Option<chrono::NaiveDate>) {
    let text = toml_text(v);
    let date = chrono::NaiveDate::parse_from_str(text.trim(), "%Y-%m-%d").ok();
    (text, date)
}

/// A location for byte `offset` of `text` in `file`.
pub fn span_location(file: &str, text: &str, offset: usize) -> Location {
    let (l, c) = line_column(text, offset);
    Location::at(file, l, c)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn line_starts_agree_with_line_column_everywhere() {
        for t in [
            "",
            "a",
            "ab\ncdé\nf",
            "\n\nx\n",
            "é\r\nü\n\n",
            "x = 1\n[run]\nid = \"é\"\n",
        ] {
            let idx = LineStarts::of(t);
            for off in 0..t.len() + 3 {
                assert_eq!(
                    idx.line_column(t, off),
                    line_column(t, off),
                    "{t:?} at {off}"
                );
            }
        }
    }

    #[test]
    fn positions_are_one_based() {
        let t = "ab\ncdé\nf";
        assert_eq!(line_column(t, 0), (1, 1));
        assert_eq!(line_column(t, 3), (2, 1));
        assert_eq!(line_column(t, 7), (2, 4)); // after the two-byte é
        assert_eq!(line_column(t, 999), (3, 2));
    }
}
