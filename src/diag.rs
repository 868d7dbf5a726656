//! Diagnostics: what went wrong with the input, where, and one hint.
//!
//! Owns the located-error type every input problem becomes, its rendering, and the error type the
//! library returns to `main` (which maps it to an exit code). Locations are 1-based and made where the
//! problem is found (the parsers), never reconstructed later.

use std::fmt;

/// Where in which file a problem sits. `line`/`column` are 1-based.
#[derive(Debug, Clone, PartialEq, Eq, Default, serde::Serialize)]
pub struct Location {
    pub file: String,
    pub line: Option<usize>,
    pub column: Option<usize>,
    /// Extra words placed after the position, e.g. "line B, point 3, column `dp[inH2O]`".
    pub context: Option<String>,
}

impl Location {
    pub fn file(file: impl Into<String>) -> Self {
        Location {
            file: file.into(),
            ..Default::default()
        }
    }

    pub fn at(file: impl Into<String>, line: usize, column: usize) -> Self {
        Location {
            file: file.into(),
            line: Some(line),
            column: Some(column),
            context: None,
        }
    }

    pub fn with_context(mut self, context: impl Into<String>) -> Self {
        self.context = Some(context.into());
        self
    }
}

impl fmt::Display for Location {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file)?;
        if let Some(l) = self.line {
            write!(f, ":{l}")?;
            if let Some(c) = self.column {
                write!(f, ":{c}")?;
            }
        }
        if let Some(ctx) = &self.context {
            write!(f, " ({ctx})")?;
        }
        Ok(())
    }
}

/// One problem with the input.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct Diagnostic {
    pub message: String,
    pub location: Option<Location>,
    pub hint: Option<String>,
}

impl Diagnostic {
    pub fn new(message: impl Into<String>) -> Self {
        Diagnostic {
            message: message.into(),
            location: None,
            hint: None,
        }
    }

    pub fn at(mut self, location: Location) -> Self {
        self.location = Some(location);
        self
    }

    pub fn hint(mut self, hint: impl Into<String>) -> Self {
        self.hint = Some(hint.into());
        self
    }
}

impl fmt::Display for Diagnostic {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "error: {}", self.message)?;
        if let Some(loc) = &self.location {
            write!(f, "\n --> {loc}")?;
        }
        if let Some(h) = &self.hint {
            write!(f, "\n   = hint: {h}")?;
        }
        Ok(())
    }
}

/// At most this many input problems are reported in one pass; the rest are counted. Enough for
/// every empty value of a blank survey from `annulus init` with its runs (about 30) several times
/// over; a file with thousands of bad rows is still answered in a screenful or two.
pub const MAX_DIAGNOSTICS: usize = 100;

/// Input problems collected in one pass.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Diagnostics {
    items: Vec<Diagnostic>,
    dropped: usize,
}

impl Diagnostics {
    pub fn new() -> Self {
        Self::default()
    }

    pub fn push(&mut self, d: Diagnostic) {
        if self.items.len() < MAX_DIAGNOSTICS {
            self.items.push(d);
        } else {
            self.dropped += 1;
        }
    }

    pub fn extend(&mut self, other: Diagnostics) {
        let dropped = other.dropped;
        for d in other.items {
            self.push(d);
        }
        self.dropped += dropped;
    }

    pub fn is_empty(&self) -> bool {
        self.items.is_empty() && self.dropped == 0
    }

    pub fn len(&self) -> usize {
        self.items.len() + self.dropped
    }

    pub fn items(&self) -> &[Diagnostic] {
        &self.items
    }

    /// Orders the problems shown by `key` (stably); the count of those not shown is kept.
    pub fn sort_by_key<K: Ord>(&mut self, key: impl FnMut(&Diagnostic) -> K) {
        self.items.sort_by_key(key);
    }

    /// `Ok(value)` when nothing was collected, else the collected problems as an [`Error`].
    pub fn finish<T>(self, value: T) -> Result<T, Error> {
        if self.is_empty() {
            Ok(value)
        } else {
            Err(Error::Input(self))
        }
    }
}

impl fmt::Display for Diagnostics {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (i, d) in self.items.iter().enumerate() {
            if i > 0 {
                writeln!(f)?;
            }
            write!(f, "{d}")?;
        }
        if self.dropped > 0 {
            write!(f, "\n... and {} more problems not shown", self.dropped)?;
        }
        let n = self.len();
        write!(
            f,
            "\n{n} problem{} found; nothing was computed",
            if n == 1 { "" } else { "s" }
        )
    }
}

/// Why a command did not finish. Acceptance-check failures are not errors: they are results.
#[derive(Debug)]
pub enum Error {
    /// The input was rejected (exit code 1).
    Input(Diagnostics),
    /// The environment failed us: a file could not be written, a font could not load (exit code 2).
    Environment(String),
}

impl Error {
    pub fn input(d: Diagnostic) -> Self {
        let mut all = Diagnostics::new();
        all.push(d);
        Error::Input(all)
    }

    /// The process exit code documented in the README.
    pub fn exit_code(&self) -> i32 {
        match self {
            Error::Input(_) => 1,
            Error::Environment(_) => 2,
        }
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Error::Input(d) => write!(f, "{d}"),
            Error::Environment(m) => write!(f, "error: {m}"),
        }
    }
}

impl std::error::Error for Error {}

impl From<Diagnostic> for Error {
    fn from(d: Diagnostic) -> Self {
        Error::input(d)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn renders_in_the_documented_shape() {
        let d = Diagnostic::new("differential pressure is not a number: `0.3l`")
            .at(Location::at("run-2.csv", 14, 3)
                .with_context("line B, point 3, column `dp[inH2O]`"))
            .hint("use `.` as the decimal separator; put units in the header, not the cell");
        assert_eq!(
            d.to_string(),
            "error: differential pressure is not a number: `0.3l`\n --> run-2.csv:14:3 (line B, point 3, column `dp[inH2O]`)\n   = hint: use `.` as the decimal separator; put units in the header, not the cell"
        );
    }

    #[test]
    fn caps_and_counts() {
        let mut all = Diagnostics::new();
        for i in 0..(MAX_DIAGNOSTICS + 5) {
            all.push(Diagnostic::new(format!("p{i}")));
        }
        assert_eq!(all.items().len(), MAX_DIAGNOSTICS);
        assert_eq!(all.len(), MAX_DIAGNOSTICS + 5);
        assert!(all.to_string().contains("5 more problems"));
        assert_eq!(Error::Input(all).exit_code(), 1);
    }
}
