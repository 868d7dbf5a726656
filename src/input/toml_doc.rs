//! Reading a TOML input file key by key, with every problem of the file collected in one pass.
//!
//! The one TOML reader of `input`: the survey, its `[checks]` / `[instruments]` / `[reported]`
//! sections, calibration and RATA files (and any new file format) are read through it. The file is
//! parsed once into a tree that keeps the byte span of every key and value
//! ([`super::toml_tree`]); a parser then asks a [`Table`] for the keys it knows, each getter
//! checking the type and the unit and recording a located problem instead of stopping. What it
//! collects:
//!
//! - syntax errors (all of them, with the parser's recovery);
//! - a required key or table that is missing, located at its table's header;
//! - a value of the wrong type (a number where a string with a unit is expected …);
//! - a bad quantity, date or choice, with the raw value and a hint fit for its kind;
//! - keys nobody asked for, with a did-you-mean among the keys the table does take (a table
//!   checks this when it is dropped, so no parser can forget it).
//!
//! Owns no file format: the parsers decide which keys exist. Must not read files (callers pass
//! the text) or build domain values.

use super::text::span_location;
pub use super::toml_tree::Value;
use super::toml_tree::{Map, Spanned};
use crate::diag::{Diagnostic, Diagnostics, Error, Location};
use crate::units::{parse_quantity, Dimension, UnitError};
use chrono::NaiveDate;
use std::borrow::Cow;
use std::cell::RefCell;
use std::ops::Range;

/// A parsed TOML file and the problems found in it so far.
pub struct TomlDoc<'a> {
    file: &'a str,
    text: &'a str,
    /// What kind of file this is, for messages: "survey", "calibration file" …
    kind: &'static str,
    /// Where the format is documented, for hints about missing sections.
    guide: &'static str,
    root: Map<'a>,
    diags: RefCell<Diagnostics>,
    /// Line starts, found on the first location asked for.
    lines: std::cell::OnceCell<super::text::LineStarts>,
}

impl<'a> TomlDoc<'a> {
    /// Parses `text` (named `file` in diagnostics). Syntax errors are all reported, located, and
    /// end the reading: the tree after a syntax error is not what the user meant.
    pub fn parse(file: &'a str, text: &'a str, kind: &'static str) -> Result<Self, Error> {
        let root = super::toml_tree::parse(text)
            .map_err(|errors| syntax_errors(file, text, kind, errors))?;
        Ok(TomlDoc {
            file,
            text,
            kind,
            guide: "sample-data/ has complete examples",
            root,
            diags: RefCell::new(Diagnostics::new()),
            lines: std::cell::OnceCell::new(),
        })
    }

    /// Names where the file's format is documented (for the hint of a missing section).
    pub fn with_guide(mut self, guide: &'static str) -> Self {
        self.guide = guide;
        self
    }

    /// The file's top level.
    pub fn root(&self) -> Table<'_> {
        Table {
            doc: self,
            path: std::rc::Rc::from(""),
            table: &self.root,
            span: 0..0,
            asked: RefCell::new(Vec::with_capacity(ASKED)),
        }
    }

    /// The file name used in diagnostics.
    pub fn file(&self) -> &str {
        self.file
    }

    /// The location of byte `span.start`, with `key` as context.
    pub fn location(&self, span: Range<usize>, key: &str) -> Location {
        let lines = self
            .lines
            .get_or_init(|| super::text::LineStarts::of(self.text));
        let (line, column) = lines.line_column(self.text, span.start);
        let at = Location::at(self.file, line, column);
        if key.is_empty() {
            at
        } else {
            at.with_context(format!("`{key}`"))
        }
    }

    /// Records a problem at `span` about `key`.
    pub fn error(&self, span: Range<usize>, key: &str, message: String, hint: Option<String>) {
        let mut d = Diagnostic::new(message).at(self.location(span, key));
        if let Some(h) = hint {
            d = d.hint(h);
        }
        self.push(d);
    }

    /// Records a problem made elsewhere (a referenced file's, for instance).
    pub fn push(&self, d: Diagnostic) {
        self.diags.borrow_mut().push(d);
    }

    /// Records every problem of `other`.
    pub fn extend(&self, other: Diagnostics) {
        self.diags.borrow_mut().extend(other);
    }

    /// True when a problem has been recorded.
    pub fn has_errors(&self) -> bool {
        !self.diags.borrow().is_empty()
    }

    /// The problems found, this file's in the order they appear in it (those in other files, or
    /// not located by line, after).
    pub fn into_diagnostics(self) -> Diagnostics {
        let file = self.file;
        let mut all = self.diags.into_inner();
        all.sort_by_key(|d| match &d.location {
            Some(l) if l.file == file && l.line.is_some() => (0, l.line, l.column),
            Some(l) if l.file == file => (1, None, None),
            _ => (2, None, None),
        });
        all
    }

    /// `Ok(value)` when nothing was recorded and `value` was built, else every problem.
    pub fn finish<T>(self, value: Option<T>) -> Result<T, Error> {
        let kind = self.kind;
        let file = self.file.to_string();
        let diags = self.into_diagnostics();
        match value {
            Some(v) if diags.is_empty() => Ok(v),
            _ if !diags.is_empty() => Err(Error::Input(diags)),
            _ => Err(Error::input(
                Diagnostic::new(format!("the {kind} could not be read")).at(Location::file(file)),
            )),
        }
    }
}

/// Every syntax error of a TOML text, located, in the order they appear in it.
fn syntax_errors(file: &str, text: &str, kind: &str, errors: Vec<toml::de::Error>) -> Error {
    let mut located: Vec<(usize, Diagnostic)> = errors
        .into_iter()
        .map(|e| {
            let at = e.span().map(|s| s.start).unwrap_or(0);
            let d = Diagnostic::new(format!(
                "the {kind} is not valid TOML: {}",
                e.message().trim()
            ))
            .at(span_location(file, text, at))
            .hint("TOML writes `key = \"value\"`; quantities are quoted strings such as \"24 in\"");
            (at, d)
        })
        .collect();
    located.sort_by_key(|(at, _)| *at);
    let mut all = Diagnostics::new();
    located.into_iter().for_each(|(_, d)| all.push(d));
    Error::Input(all)
}

/// A value with where it is and the dotted key it was found under.
#[derive(Clone)]
pub struct Field<'d> {
    pub doc: &'d TomlDoc<'d>,
    pub value: &'d Value<'d>,
    pub span: Range<usize>,
    /// Span of the key (the value's own for array items).
    pub key_span: Range<usize>,
    key: &'d str,
    /// The dotted path of the table it is in (shared: a field is made for every key read).
    parent: std::rc::Rc<str>,
}

impl<'d> Field<'d> {
    /// The dotted key, e.g. `gas.method4.meter_y`.
    pub fn path(&self) -> String {
        join(&self.parent, self.key)
    }

    /// Records a problem with this value.
    pub fn error(&self, message: String, hint: Option<String>) {
        self.doc
            .error(self.span.clone(), &self.path(), message, hint);
    }

    /// The value as a user wrote it: strings unquoted, numbers and dates as printed.
    pub fn text(&self) -> String {
        value_text(self.value)
    }

    /// A string, or a recorded problem.
    pub fn str(&self) -> Option<&'d str> {
        match self.value {
            Value::String(s) => Some(s.as_ref()),
            _ => {
                self.wrong_type("a string", None);
                None
            }
        }
    }

    /// A string with something in it, trimmed; an empty one is a recorded problem with `hint`.
    pub fn filled(&self, hint: &str) -> Option<String> {
        let s = self.str()?.trim();
        if s.is_empty() {
            self.error(
                format!("`{}` is empty", self.path()),
                Some(hint.to_string()),
            );
            return None;
        }
        Some(s.to_string())
    }

    /// A quantity string of `dimension` in SI, or a recorded problem.
    pub fn quantity(&self, dimension: Dimension) -> Option<f64> {
        match self.value {
            Value::String(s) => match parse_quantity(s, dimension) {
                Ok(x) => Some(x),
                Err(e) => {
                    self.error(format!("`{}`: {e}", self.path()), Some(e.hint()));
                    None
                }
            },
            _ => {
                let hint = format!(
                    "write the number and its unit in quotes, e.g. {path_key} = \"{}\"",
                    dimension.example(),
                    path_key = self.key
                );
                self.wrong_type(&format!("a {} with its unit", dimension.name()), Some(hint));
                None
            }
        }
    }

    /// A quantity of `dimension` that must also lie in a plausibility range
    /// (`crate::plausibility`): a value no duct or stack can have is a recorded problem.
    pub fn quantity_in(
        &self,
        dimension: Dimension,
        range: crate::plausibility::Range,
    ) -> Option<f64> {
        let x = self.quantity(dimension)?;
        self.within(x, range)
    }

    /// `x`, read from this field, checked against a plausibility range.
    pub fn within(&self, x: f64, range: crate::plausibility::Range) -> Option<f64> {
        match range.check(x) {
            Ok(x) => Some(x),
            Err(e) => {
                let unit = crate::units::unit_of(&self.text());
                let hint = match unit {
                    // the bounds are already shown in the writer's unit
                    Some(_) => "check the number and its unit".to_string(),
                    None => format!(
                        "check the number (`{}` was read as {} {})",
                        self.text(),
                        // a value far outside the range reads better in powers of ten
                        if x != 0.0 && !(1e-4..1e7).contains(&x.abs()) {
                            format!("{x:.3e}")
                        } else {
                            crate::checks::num(x)
                        },
                        range.unit
                    ),
                };
                self.error(
                    format!(
                        "`{}` = `{}`: {}",
                        self.path(),
                        self.text(),
                        e.words_in(unit)
                    ),
                    Some(hint),
                );
                None
            }
        }
    }

    /// [`Field::quantity`] with a value of this key's own for the hint of an empty one (a static
    /// pressure's `"-0.85 inH2O"` rather than a barometric pressure's `"29.92 inHg"`).
    pub fn quantity_like(&self, dimension: Dimension, example: &str) -> Option<f64> {
        match self.value {
            Value::String(s) if s.trim().is_empty() => {
                let e = UnitError::Empty {
                    expected: dimension,
                };
                self.error(
                    format!("`{}`: {e}", self.path()),
                    Some(format!("write a number and a unit, e.g. `{example}`")),
                );
                None
            }
            _ => self.quantity(dimension),
        }
    }

    /// A plain number (integer or float), or a recorded problem.
    pub fn number(&self) -> Option<f64> {
        let x = match self.value {
            Value::Float(f) => f.as_str().parse::<f64>().ok(),
            Value::Integer(i) => i64::from_str_radix(i.as_str(), i.radix())
                .ok()
                .map(|i| i as f64),
            _ => {
                self.wrong_type("a plain number", self.unquote_hint());
                return None;
            }
        };
        match x {
            Some(x) if x.is_finite() => Some(x),
            _ => {
                self.error(
                    format!(
                        "`{}` must be a finite number, found `{}`",
                        self.path(),
                        self.text()
                    ),
                    None,
                );
                None
            }
        }
    }

    /// A whole number, or a recorded problem.
    pub fn integer(&self) -> Option<i64> {
        match self.value {
            Value::Integer(i) => match i64::from_str_radix(i.as_str(), i.radix()) {
                Ok(n) => Some(n),
                Err(_) => {
                    self.error(
                        format!("`{}` is too large: `{}`", self.path(), self.text()),
                        None,
                    );
                    None
                }
            },
            _ => {
                self.wrong_type("a whole number", self.unquote_hint());
                None
            }
        }
    }

    /// True or false, or a recorded problem.
    pub fn bool(&self) -> Option<bool> {
        match self.value {
            Value::Boolean(b) => Some(*b),
            _ => {
                self.wrong_type("true or false", None);
                None
            }
        }
    }

    /// A date written `YYYY-MM-DD` (a string or a bare TOML date), or a recorded problem whose
    /// hint shows `example`.
    pub fn date(&self, example: &str) -> Option<NaiveDate> {
        let text = self.text();
        match NaiveDate::parse_from_str(text.trim(), "%Y-%m-%d") {
            Ok(d) => Some(d),
            Err(_) => {
                self.error(
                    format!("`{}` is not a date: `{text}`", self.path()),
                    Some(format!("write the date as YYYY-MM-DD, e.g. \"{example}\"")),
                );
                None
            }
        }
    }

    /// One of `options` (by name), or a recorded problem naming them all.
    pub fn choice<T: Copy>(&self, options: &[(&str, T)]) -> Option<T> {
        let found = self.str()?.trim();
        if let Some((_, t)) = options.iter().find(|(n, _)| *n == found) {
            return Some(*t);
        }
        let names: Vec<&str> = options.iter().map(|(n, _)| *n).collect();
        let close = did_you_mean(found, &names);
        self.error(
            format!(
                "`{}` must be one of {}, found `{found}`",
                self.path(),
                names.join(" | ")
            ),
            match close {
                Some(c) if !found.is_empty() => Some(format!("did you mean `{c}`?")),
                _ if found.is_empty() => Some(format!(
                    "write one of them, e.g. {} = \"{}\"",
                    self.key,
                    names.first().copied().unwrap_or_default()
                )),
                _ => None,
            },
        );
        None
    }

    /// A list of strings, or a recorded problem.
    pub fn strings(&self) -> Option<Vec<String>> {
        match self.value {
            Value::Array(a) => {
                let mut out = Vec::new();
                for item in a.iter() {
                    match item.get_ref() {
                        Value::String(s) => out.push(s.to_string()),
                        other => {
                            self.doc.error(
                                item.span(),
                                &self.path(),
                                format!(
                                    "`{}` must list strings, found {}",
                                    self.path(),
                                    describe(other)
                                ),
                                None,
                            );
                            return None;
                        }
                    }
                }
                Some(out)
            }
            _ => {
                self.wrong_type("a list of strings, e.g. [\"…\"]", None);
                None
            }
        }
    }

    /// This value as a table (a `[section]` or an inline `{ … }`), or a recorded problem.
    pub fn table(&self) -> Option<Table<'d>> {
        match self.value {
            Value::Table(t) => Some(Table {
                doc: self.doc,
                path: self.path().into(),
                table: t,
                span: self.span.clone(),
                asked: RefCell::new(Vec::with_capacity(ASKED)),
            }),
            _ => {
                self.wrong_type("a table", None);
                None
            }
        }
    }

    /// For a number written in quotes: write it without them.
    fn unquote_hint(&self) -> Option<String> {
        match self.value {
            Value::String(s) if s.trim().parse::<f64>().is_ok() => Some(format!(
                "write the number without quotes: {} = {}",
                self.key,
                s.trim()
            )),
            _ => None,
        }
    }

    /// Records that this value is not of the type `expected` ("a string", "a whole number" …).
    pub fn wrong_type(&self, expected: &str, hint: Option<String>) {
        self.error(
            format!(
                "`{}` must be {expected}, found {}",
                self.path(),
                describe(self.value)
            ),
            hint,
        );
    }
}

/// Room for the keys a parser asks of one table, made once (a table of a survey is asked for
/// about a dozen; growing the list step by step was a tenth of reading the survey's fields).
const ASKED: usize = 16;

/// One table of the file, asked for its keys by a parser.
pub struct Table<'d> {
    doc: &'d TomlDoc<'d>,
    /// Dotted path of the table (`gas.method4`); empty for the top level.
    path: std::rc::Rc<str>,
    table: &'d Map<'d>,
    /// The table's header (`[gas]`), or the inline table.
    span: Range<usize>,
    /// Keys a parser asked for: every other key present is unknown.
    asked: RefCell<Vec<Cow<'static, str>>>,
}

impl<'d> Table<'d> {
    /// The document this table belongs to.
    pub fn doc(&self) -> &'d TomlDoc<'d> {
        self.doc
    }

    /// The dotted path of this table (`gas.method4`; empty at the top level).
    pub fn path(&self) -> &str {
        &self.path
    }

    /// Where the table starts (its header, or its opening brace).
    pub fn span(&self) -> Range<usize> {
        self.span.clone()
    }

    /// The name used in messages: `[gas.method4]`, or "the survey" at the top level.
    pub fn name(&self) -> String {
        if self.path.is_empty() {
            format!("the {}", self.doc.kind)
        } else {
            format!("[{}]", self.path)
        }
    }

    /// The dotted path of `key` in this table.
    pub fn key_path(&self, key: &'static str) -> String {
        join(&self.path, key)
    }

    /// Declares keys this table takes that are read elsewhere (or not at all).
    pub fn allow(&self, keys: &[&str]) {
        self.asked
            .borrow_mut()
            .extend(keys.iter().map(|k| Cow::Owned(k.to_string())));
    }

    /// The value of `key` without asking for it (the key is not marked as known, nothing is
    /// checked): for a parser that only glances at a table another parser reads.
    pub fn peek(&self, key: &'static str) -> Option<&'d Value<'d>> {
        self.table.get(key).map(|v| v.get_ref())
    }

    /// [`Table::get`] for a key named at run time (a check's limit).
    pub fn get_named(&self, key: &str) -> Option<Field<'d>> {
        self.asked.borrow_mut().push(Cow::Owned(key.to_string()));
        let (k, v) = self.table.get_key_value(key)?;
        Some(self.field(k, v))
    }

    /// The value of `key`, if present (the key counts as known either way).
    pub fn get(&self, key: &'static str) -> Option<Field<'d>> {
        self.asked.borrow_mut().push(Cow::Borrowed(key));
        let (k, v) = self.table.get_key_value(key)?;
        Some(self.field(k, v))
    }

    fn field(&self, k: &'d Spanned<Cow<'d, str>>, v: &'d Spanned<Value<'d>>) -> Field<'d> {
        Field {
            doc: self.doc,
            value: v.get_ref(),
            span: v.span(),
            key_span: k.span(),
            key: k.get_ref().as_ref(),
            parent: self.path.clone(),
        }
    }

    /// The value of a key this table must have; a missing one is recorded with `example` as
    /// the hint's value (`"29.92 inHg"`, `0.84` …).
    pub fn required(&self, key: &'static str, example: &str) -> Option<Field<'d>> {
        self.required_with(key, || example.to_string())
    }

    /// [`Table::required`] with the example built only when the key is missing.
    fn required_with(
        &self,
        key: &'static str,
        example: impl FnOnce() -> String,
    ) -> Option<Field<'d>> {
        let f = self.get(key);
        if f.is_none() {
            self.missing(key, &example());
        }
        f
    }

    /// Records that `key` is missing from this table.
    pub fn missing(&self, key: &'static str, example: &str) {
        self.doc.error(
            self.span.clone(),
            &self.path,
            format!("{} has no `{key}`", self.name()),
            Some(format!("add {key} = {example}")),
        );
    }

    /// Records a problem located at `key`'s value (or at the table when the key is absent).
    pub fn error_at(&self, key: &'static str, message: String, hint: Option<String>) {
        let span = self
            .table
            .get(key)
            .map(|v| v.span())
            .unwrap_or_else(|| self.span.clone());
        self.doc.error(span, &self.key_path(key), message, hint);
    }

    /// A required string (a missing or empty one is recorded).
    pub fn text(&self, key: &'static str, example: &str) -> Option<String> {
        let f = self.required(key, example)?;
        let s = f.str()?;
        if s.trim().is_empty() {
            f.error(
                format!("`{}` is empty", f.path()),
                Some(format!("write e.g. {key} = {example}")),
            );
            return None;
        }
        Some(s.to_string())
    }

    /// An optional string.
    pub fn opt_text(&self, key: &'static str) -> Option<String> {
        self.get(key)?.str().map(str::to_string)
    }

    /// A required quantity of `dimension`, SI.
    pub fn quantity(&self, key: &'static str, dimension: Dimension) -> Option<f64> {
        self.required_with(key, || format!("\"{}\"", dimension.example()))?
            .quantity(dimension)
    }

    /// An optional quantity of `dimension`, SI.
    pub fn opt_quantity(&self, key: &'static str, dimension: Dimension) -> Option<f64> {
        self.get(key)?.quantity(dimension)
    }

    /// A required quantity within a plausibility range (see [`Field::quantity_in`]).
    pub fn quantity_in(
        &self,
        key: &'static str,
        dimension: Dimension,
        range: crate::plausibility::Range,
    ) -> Option<f64> {
        self.required_with(key, || format!("\"{}\"", dimension.example()))?
            .quantity_in(dimension, range)
    }

    /// An optional quantity within a plausibility range (see [`Field::quantity_in`]).
    pub fn opt_quantity_in(
        &self,
        key: &'static str,
        dimension: Dimension,
        range: crate::plausibility::Range,
    ) -> Option<f64> {
        self.get(key)?.quantity_in(dimension, range)
    }

    /// An optional fraction written in percent, within 0…100 %.
    pub fn opt_fraction(&self, key: &'static str) -> Option<f64> {
        let f = self.get(key)?;
        let x = f.quantity(Dimension::Fraction)?;
        if (0.0..=1.0).contains(&x) {
            Some(x)
        } else {
            f.error(
                format!(
                    "`{}` must be between 0 and 100 %, found `{}`",
                    f.path(),
                    f.text()
                ),
                None,
            );
            None
        }
    }

    /// A required date; `example` (`2026-10-14`) for the hints.
    pub fn date(&self, key: &'static str, example: &str) -> Option<NaiveDate> {
        self.required_with(key, || format!("\"{example}\""))?
            .date(example)
    }

    /// An optional date; `example` for the hint.
    pub fn opt_date(&self, key: &'static str, example: &str) -> Option<NaiveDate> {
        self.get(key)?.date(example)
    }

    /// A required choice among `options`.
    pub fn choice<T: Copy>(&self, key: &'static str, options: &[(&str, T)]) -> Option<T> {
        let example = || {
            options
                .first()
                .map(|(n, _)| format!("\"{n}\""))
                .unwrap_or_default()
        };
        self.required_with(key, example)?.choice(options)
    }

    /// An optional choice among `options`; `default` when the key is absent, `None` after a
    /// recorded problem.
    pub fn choice_or<T: Copy>(
        &self,
        key: &'static str,
        options: &[(&str, T)],
        default: T,
    ) -> Option<T> {
        match self.get(key) {
            Some(f) => f.choice(options),
            None => Some(default),
        }
    }

    /// An optional whole number within `range`.
    pub fn opt_count(
        &self,
        key: &'static str,
        range: std::ops::RangeInclusive<i64>,
    ) -> Option<usize> {
        let f = self.get(key)?;
        let n = f.integer()?;
        if range.contains(&n) {
            Some(n as usize)
        } else {
            f.error(
                format!(
                    "`{}` must be a whole number from {} to {}, found {n}",
                    f.path(),
                    range.start(),
                    range.end()
                ),
                None,
            );
            None
        }
    }

    /// An optional plain number.
    pub fn opt_number(&self, key: &'static str) -> Option<f64> {
        self.get(key)?.number()
    }

    /// An optional list of strings.
    pub fn opt_strings(&self, key: &'static str) -> Option<Vec<String>> {
        self.get(key)?.strings()
    }

    /// A table this table must have (`[gas]` in a survey).
    pub fn table(&self, key: &'static str) -> Option<Table<'d>> {
        self.asked.borrow_mut().push(Cow::Borrowed(key));
        match self.table.get_key_value(key) {
            Some((k, v)) => self.field(k, v).table(),
            None => {
                self.doc.error(
                    self.span.clone(),
                    "",
                    format!("{} has no [{}] section", self.name(), self.key_path(key)),
                    Some(format!(
                        "add a [{}] section; {}",
                        self.key_path(key),
                        self.doc.guide
                    )),
                );
                None
            }
        }
    }

    /// A table this table may have.
    pub fn opt_table(&self, key: &'static str) -> Option<Table<'d>> {
        self.get(key)?.table()
    }

    /// The tables of an array of tables (`[[run]]`); empty when absent.
    pub fn tables(&self, key: &'static str) -> Vec<Table<'d>> {
        let Some(f) = self.get(key) else {
            return Vec::new();
        };
        match f.value {
            Value::Array(items) => items
                .iter()
                .filter_map(|item| {
                    let field = Field {
                        span: item.span(),
                        key_span: item.span(),
                        value: item.get_ref(),
                        ..f.clone()
                    };
                    field.table()
                })
                .collect(),
            _ => {
                f.wrong_type(&format!("a list of [[{}]] tables", f.path()), None);
                Vec::new()
            }
        }
    }

    /// Every entry, in the order written (for tables whose keys are data: check ids, run ids).
    /// All count as known.
    pub fn entries(&self) -> Vec<Field<'d>> {
        let mut v: Vec<Field<'d>> = self.table.iter().map(|(k, v)| self.field(k, v)).collect();
        v.sort_by_key(|f| f.key_span.start);
        self.allow(&v.iter().map(|f| f.key).collect::<Vec<_>>());
        v
    }

    /// Records every key present that no parser asked for.
    fn report_unknown(&self) {
        let asked = self.asked.borrow();
        let mut unknown: Vec<_> = self
            .table
            .iter()
            .filter(|(k, _)| !asked.iter().any(|a| a == k.get_ref().as_ref()))
            .collect();
        if unknown.is_empty() {
            return;
        }
        unknown.sort_by_key(|(k, _)| k.span().start);
        let mut known: Vec<&str> = asked.iter().map(|k| k.as_ref()).collect();
        known.sort_unstable();
        known.dedup();
        for (k, _) in unknown {
            let found = k.get_ref().as_ref();
            let hint = match did_you_mean(found, &known) {
                Some(best) => format!("did you mean `{best}`?"),
                None if known.is_empty() => format!("{} takes no keys", self.name()),
                None => format!("{} takes: {}", self.name(), known.join(", ")),
            };
            let what = if self.path.is_empty() {
                format!("unknown section or key `{found}` in {}", self.name())
            } else {
                format!("unknown key `{found}` in {}", self.name())
            };
            self.doc.error(k.span(), "", what, Some(hint));
        }
    }
}

impl Drop for Table<'_> {
    fn drop(&mut self) {
        self.report_unknown();
    }
}

fn join(parent: &str, key: &str) -> String {
    if parent.is_empty() {
        key.to_string()
    } else {
        format!("{parent}.{key}")
    }
}

/// A TOML value as the text a user wrote: strings unquoted, numbers and dates as printed.
pub fn value_text(v: &Value) -> String {
    match v {
        Value::String(s) => s.to_string(),
        Value::Integer(i) => i.to_string(),
        Value::Float(f) => f.to_string(),
        Value::Boolean(b) => b.to_string(),
        Value::Datetime(d) => d.to_string(),
        Value::Array(_) => "[…]".to_string(),
        Value::Table(_) => "{…}".to_string(),
    }
}

/// What a value is, for "found …" in messages.
fn describe(v: &Value) -> String {
    match v {
        Value::String(s) => format!("the string `{s}`"),
        Value::Integer(i) => format!("the number `{i}`"),
        Value::Float(f) => format!("the number `{f}`"),
        Value::Boolean(b) => format!("`{b}`"),
        Value::Datetime(d) => format!("the date `{d}`"),
        Value::Array(_) => "a list".to_string(),
        Value::Table(_) => "a table".to_string(),
    }
}

/// The closest of `known` to `found`, if it is close enough to be a typo.
pub fn did_you_mean<'k>(found: &str, known: &[&'k str]) -> Option<&'k str> {
    let (distance, best) = known.iter().map(|k| (edit_distance(found, k), *k)).min()?;
    (distance <= 3 && distance < found.chars().count().max(2)).then_some(best)
}

/// Levenshtein distance (small strings: keys of a file).
pub fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut cur = vec![i + 1];
        for (j, cb) in b.iter().enumerate() {
            let sub = prev[j] + usize::from(ca != *cb);
            cur.push(sub.min(prev[j + 1] + 1).min(cur[j] + 1));
        }
        prev = cur;
    }
    prev[b.len()]
}
