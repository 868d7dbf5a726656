//! Reads a system file (`annulus system SYSTEM.toml`): the air system's ducts, each an existing
//! survey, their roles and designs, the fan, the terminal readings and the deficiencies; then every
//! duct's survey and the terminals CSV.
//!
//! Every problem of every file is reported in one pass: the system file's own values, the relations
//! between ducts ([`crate::system::validate`], located at the key that makes them wrong), each
//! survey's and readings file's problems, and the terminals CSV's cells ([`super::terminals_file`]).

use super::text::{span_location, Spanned};
use super::{read_text_with, FileSource, Loaded, SourceFile};
use crate::diag::{Diagnostic, Diagnostics, Error, Location};
use crate::system::{
    validate, Deficiency, DeficiencyStatus, DesignFlow, DuctSpec, FanSpec, Role, SpecError,
    SystemSpec, Tolerance,
};
use crate::units::{parse_flow, parse_quantity, Dimension};
use serde::Deserialize;
use std::ops::Range;
use std::path::Path;

type S = Spanned<String>;

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    system: RawSystem,
    fan: Option<RawFan>,
    #[serde(default, rename = "duct")]
    ducts: Vec<RawDuct>,
    terminals: Option<RawTerminals>,
    #[serde(default, rename = "deficiency")]
    deficiencies: Vec<RawDeficiency>,
    signoff: Option<RawSignoff>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSystem {
    title: String,
    site: Option<String>,
    date: Spanned<toml::Value>,
    organisation: Option<String>,
    tolerance: Option<S>,
    tolerance_reason: Option<String>,
}

#[derive(Deserialize)]
#[serde(untagged)]
enum OneOrMany {
    One(String),
    Many(Vec<String>),
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFan {
    tag: S,
    design_flow: S,
    duct: Option<Spanned<OneOrMany>>,
    design_rpm: Option<Spanned<toml::Value>>,
    measured_rpm: Option<Spanned<toml::Value>>,
    design_static: Option<S>,
    measured_static: Option<S>,
    motor_amps_rated: Option<S>,
    measured_amps: Option<S>,
    motor_power_rated: Option<S>,
    measured_power: Option<S>,
    tolerance: Option<S>,
    tolerance_reason: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawDuct {
    tag: S,
    survey: S,
    role: S,
    design: S,
    of: Option<S>,
    tolerance: Option<S>,
    tolerance_reason: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawTerminals {
    readings: S,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawDeficiency {
    item: String,
    status: S,
    note: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSignoff {
    tested_by: Option<String>,
    certificate: Option<String>,
    reviewed_by: Option<String>,
}

/// Who signs the submittal, as the system file says (the user configuration fills the gaps).
#[derive(Debug, Clone, Default, PartialEq, serde::Serialize)]
pub struct SystemSignoff {
    pub tested_by: Option<String>,
    pub certificate: Option<String>,
    pub reviewed_by: Option<String>,
}

/// Where the values that relations refer to sit in the system file, to place a relation's problem.
#[derive(Debug, Clone, Default)]
struct Spans {
    duct_tag: Vec<Range<usize>>,
    duct_role: Vec<Range<usize>>,
    duct_of: Vec<Option<Range<usize>>>,
    duct_design: Vec<Range<usize>>,
    duct_tolerance: Vec<Option<Range<usize>>>,
    system_tolerance: Option<Range<usize>>,
    system_header: Range<usize>,
    fan_tag: Option<Range<usize>>,
    fan_duct: Option<Range<usize>>,
    fan_keys: Vec<(&'static str, Range<usize>)>,
    fan_tolerance: Option<Range<usize>>,
}

/// A system file as read, before its surveys are loaded.
#[derive(Debug, Clone)]
pub struct ParsedSystem {
    pub spec: SystemSpec,
    pub signoff: SystemSignoff,
    /// The terminals CSV path as written, and where it is written (to place a read error).
    terminals: Option<(String, Range<usize>)>,
    survey_spans: Vec<Range<usize>>,
    spans: Spans,
}

/// A system with every file it names, read and validated.
#[derive(Debug, Clone)]
pub struct LoadedSystem {
    pub file: SourceFile,
    pub spec: SystemSpec,
    pub signoff: SystemSignoff,
    /// One per duct, in the system file's order.
    pub ducts: Vec<Loaded>,
    /// Where each duct's `survey` is written in the system file (for later problems).
    pub survey_locations: Vec<Location>,
    pub terminals: Option<SourceFile>,
}

/// One file a system was read from: its role, its path relative to the system file's folder
/// (`/`-separated), and its bytes as read. What a submittal embeds, and what it is re-read from.
#[derive(Debug, Clone, PartialEq)]
pub struct SystemInput {
    /// `system`, `survey`, `readings`, `calibration`, `calibration-readings` or `terminals`.
    pub role: &'static str,
    pub path: String,
    pub bytes: Vec<u8>,
}

impl LoadedSystem {
    /// Every file the system was read from, the system file first, each once.
    pub fn inputs(&self) -> Vec<SystemInput> {
        let dir = self.file.path.parent().unwrap_or(Path::new(""));
        let rel = |p: &Path| -> String {
            let r = p.strip_prefix(dir).unwrap_or(p);
            r.components()
                .map(|c| c.as_os_str().to_string_lossy().into_owned())
                .collect::<Vec<_>>()
                .join("/")
        };
        let mut out: Vec<SystemInput> = Vec::new();
        let mut add = |role: &'static str, f: &SourceFile| {
            let path = rel(&f.path);
            if !out.iter().any(|x| x.path == path) {
                out.push(SystemInput {
                    role,
                    path,
                    bytes: f.bytes.clone(),
                });
            }
        };
        add("system", &self.file);
        for d in &self.ducts {
            add("survey", &d.survey_file);
            for (f, _) in &d.runs {
                add("readings", f);
            }
            if let Some((c, r)) = &d.calibration {
                add("calibration", c);
                add("calibration-readings", r);
            }
        }
        if let Some(t) = &self.terminals {
            add("terminals", t);
        }
        out
    }
}

/// Reads a system again from its files held in memory (paths relative to the system file's
/// folder, as [`LoadedSystem::inputs`] gives them): how a submittal is re-derived from what it
/// embeds.
pub fn load_system_from(inputs: &[SystemInput]) -> Result<LoadedSystem, Error> {
    let Some(system) = inputs.iter().find(|i| i.role == "system") else {
        return Err(Error::input(Diagnostic::new(
            "no system file among the embedded files",
        )));
    };
    let mut files = super::MemoryFiles::new();
    for i in inputs {
        files.insert(&i.path, i.bytes.clone());
    }
    load_system_with(Path::new(&system.path), &|p| files.read(p))
}

struct Ctx<'a> {
    file: &'a str,
    text: &'a str,
    diags: Diagnostics,
}

impl Ctx<'_> {
    fn loc(&self, span: Range<usize>, key: &str) -> Location {
        span_location(self.file, self.text, span.start).with_context(format!("`{key}`"))
    }

    fn error(&mut self, span: Range<usize>, key: &str, msg: String, hint: Option<String>) {
        let mut d = Diagnostic::new(msg).at(self.loc(span, key));
        if let Some(h) = hint {
            d = d.hint(h);
        }
        self.diags.push(d);
    }

    fn quantity(&mut self, v: &S, key: &str, dim: Dimension) -> Option<f64> {
        match parse_quantity(v.get_ref(), dim) {
            Ok(x) => Some(x),
            Err(e) => {
                self.error(v.span(), key, format!("`{key}`: {e}"), Some(e.hint()));
                None
            }
        }
    }

    fn opt_quantity(&mut self, v: &Option<S>, key: &str, dim: Dimension) -> Option<f64> {
        v.as_ref().and_then(|v| self.quantity(v, key, dim))
    }

    fn flow(&mut self, v: &S, key: &str) -> Option<DesignFlow> {
        match parse_flow(v.get_ref()) {
            Ok((flow_m3_s, basis)) => Some(DesignFlow { flow_m3_s, basis }),
            Err(e) => {
                self.error(
                    v.span(),
                    key,
                    format!("`{key}`: {e}"),
                    Some(format!(
                        "{}; `cfm` is actual air, `scfm` standard air",
                        e.hint()
                    )),
                );
                None
            }
        }
    }

    fn tolerance(
        &mut self,
        v: &Option<S>,
        reason: &Option<String>,
        key: &str,
    ) -> Option<Tolerance> {
        let v = v.as_ref()?;
        let fraction = self.quantity(v, key, Dimension::Fraction)?;
        Some(Tolerance {
            fraction,
            reason: reason.clone(),
        })
    }

    fn rpm(&mut self, v: &Option<Spanned<toml::Value>>, key: &str) -> Option<f64> {
        let v = v.as_ref()?;
        // a plain number, or the same with its unit written out ("1150 rpm")
        let n = match v.get_ref() {
            toml::Value::Integer(i) => Some(*i as f64),
            toml::Value::Float(f) if f.is_finite() => Some(*f),
            toml::Value::String(s) => s
                .trim()
                .strip_suffix("rpm")
                .and_then(crate::units::parse_number)
                .filter(|n| n.is_finite()),
            _ => None,
        };
        if n.is_none() {
            let short = key.rsplit('.').next().unwrap_or(key);
            self.error(
                v.span(),
                key,
                format!(
                    "`{key}` must be a number of revolutions per minute, found `{}`",
                    super::text::toml_text(v.get_ref())
                ),
                Some(format!("write e.g. {short} = 1150")),
            );
        }
        n
    }

    fn choice<T: Copy>(&mut self, v: &S, key: &str, options: &[(&str, T)]) -> Option<T> {
        let found = v.get_ref().trim();
        if let Some((_, t)) = options.iter().find(|(n, _)| *n == found) {
            return Some(*t);
        }
        let names: Vec<&str> = options.iter().map(|(n, _)| *n).collect();
        self.error(
            v.span(),
            key,
            format!(
                "`{key}` must be one of {}, found `{found}`",
                names.join(" | ")
            ),
            None,
        );
        None
    }
}

fn toml_error(file: &str, text: &str, e: toml::de::Error) -> Error {
    let loc = match e.span() {
        Some(span) => span_location(file, text, span.start),
        None => Location::file(file),
    };
    Error::input(
        Diagnostic::new(format!(
            "the system file is not valid: {}",
            e.message().trim()
        ))
        .at(loc)
        .hint("see the system file format in the README (sample-data/building/ is a complete example)"),
    )
}

/// Parses a system file's text (`file` names it in diagnostics). The relations between ducts are
/// validated here; the surveys and the terminals CSV are not read ([`load_system`] does that).
pub fn parse_system(file: &str, text: &str) -> Result<ParsedSystem, Error> {
    let raw: RawFile = toml::from_str(text).map_err(|e| toml_error(file, text, e))?;
    let mut cx = Ctx {
        file,
        text,
        diags: Diagnostics::new(),
    };
    let parsed = build(&mut cx, raw);
    if let Some(p) = &parsed {
        for e in validate(&p.spec) {
            // terminals are validated after their CSV is read
            if let Some(d) = locate_spec_error(&cx, p, &e) {
                cx.diags.push(d);
            }
        }
    }
    match parsed {
        Some(p) if cx.diags.is_empty() => Ok(p),
        _ => {
            if cx.diags.is_empty() {
                cx.diags.push(
                    Diagnostic::new("the system file could not be read").at(Location::file(file)),
                );
            }
            Err(Error::Input(cx.diags))
        }
    }
}

fn build(cx: &mut Ctx, raw: RawFile) -> Option<ParsedSystem> {
    let s = &raw.system;
    let (date_text, date) = super::text::toml_date(s.date.get_ref());
    if date.is_none() {
        cx.error(
            s.date.span(),
            "system.date",
            format!("`system.date` is not a date: `{date_text}`"),
            Some("write the date as YYYY-MM-DD, e.g. \"2026-11-20\"".into()),
        );
    }
    let system_tolerance = cx.tolerance(&s.tolerance, &s.tolerance_reason, "system.tolerance");
    let mut spans = Spans {
        system_tolerance: s.tolerance.as_ref().map(|t| t.span()),
        system_header: s.date.span(),
        ..Spans::default()
    };
    if raw.ducts.is_empty() {
        cx.error(
            s.date.span(),
            "duct",
            "a system file needs at least one [[duct]]".into(),
            Some("add [[duct]] tables with tag, survey, role and design".into()),
        );
    }
    let roles = Role::ALL.map(|r| (r.name(), r));
    let mut ducts = Vec::new();
    let mut survey_spans = Vec::new();
    let mut complete = true;
    for d in &raw.ducts {
        let role = cx.choice(&d.role, "duct.role", &roles);
        let design = cx.flow(&d.design, "duct.design");
        let tolerance = cx.tolerance(&d.tolerance, &d.tolerance_reason, "duct.tolerance");
        if d.tolerance.is_some() && tolerance.is_none() {
            complete = false;
        }
        let tag = d.tag.get_ref().trim().to_string();
        if tag.is_empty() {
            cx.error(
                d.tag.span(),
                "duct.tag",
                "`duct.tag` is empty".into(),
                Some("give each duct a short tag such as \"SA-1\"".into()),
            );
        }
        match (role, design) {
            (Some(role), Some(design)) => ducts.push(DuctSpec {
                tag,
                survey: d.survey.get_ref().clone(),
                role,
                of: d.of.as_ref().map(|o| o.get_ref().trim().to_string()),
                design,
                tolerance,
            }),
            _ => complete = false,
        }
        spans.duct_tag.push(d.tag.span());
        spans.duct_role.push(d.role.span());
        spans.duct_of.push(d.of.as_ref().map(|o| o.span()));
        spans.duct_design.push(d.design.span());
        spans
            .duct_tolerance
            .push(d.tolerance.as_ref().map(|t| t.span()));
        survey_spans.push(d.survey.span());
    }
    let fan = raw.fan.as_ref().and_then(|f| {
        spans.fan_tag = Some(f.tag.span());
        spans.fan_tolerance = f.tolerance.as_ref().map(|t| t.span());
        let design_flow = cx.flow(&f.design_flow, "fan.design_flow");
        let ducts = match &f.duct {
            None => Vec::new(),
            Some(d) => {
                spans.fan_duct = Some(d.span());
                match d.get_ref() {
                    OneOrMany::One(t) => vec![t.trim().to_string()],
                    OneOrMany::Many(v) => v.iter().map(|t| t.trim().to_string()).collect(),
                }
            }
        };
        let mut key = |k: &'static str, v: &Option<S>| {
            if let Some(v) = v {
                spans.fan_keys.push((k, v.span()));
            }
        };
        key("design_static", &f.design_static);
        key("measured_static", &f.measured_static);
        key("motor_amps_rated", &f.motor_amps_rated);
        key("measured_amps", &f.measured_amps);
        key("motor_power_rated", &f.motor_power_rated);
        key("measured_power", &f.measured_power);
        key("design_flow", &Some(f.design_flow.clone()));
        if let Some(v) = &f.design_rpm {
            spans.fan_keys.push(("design_rpm", v.span()));
        }
        if let Some(v) = &f.measured_rpm {
            spans.fan_keys.push(("measured_rpm", v.span()));
        }
        let spec = FanSpec {
            tag: f.tag.get_ref().trim().to_string(),
            design_flow: design_flow?,
            ducts,
            design_rpm: cx.rpm(&f.design_rpm, "fan.design_rpm"),
            measured_rpm: cx.rpm(&f.measured_rpm, "fan.measured_rpm"),
            design_static_pa: cx.opt_quantity(
                &f.design_static,
                "fan.design_static",
                Dimension::Pressure,
            ),
            measured_static_pa: cx.opt_quantity(
                &f.measured_static,
                "fan.measured_static",
                Dimension::Pressure,
            ),
            motor_amps_rated: cx.opt_quantity(
                &f.motor_amps_rated,
                "fan.motor_amps_rated",
                Dimension::Current,
            ),
            measured_amps: cx.opt_quantity(
                &f.measured_amps,
                "fan.measured_amps",
                Dimension::Current,
            ),
            motor_power_rated_w: cx.opt_quantity(
                &f.motor_power_rated,
                "fan.motor_power_rated",
                Dimension::Power,
            ),
            measured_power_w: cx.opt_quantity(
                &f.measured_power,
                "fan.measured_power",
                Dimension::Power,
            ),
            tolerance: cx.tolerance(&f.tolerance, &f.tolerance_reason, "fan.tolerance"),
        };
        Some(spec)
    });
    if raw.fan.is_some() && fan.is_none() {
        complete = false;
    }
    let statuses = [
        ("open", DeficiencyStatus::Open),
        ("resolved", DeficiencyStatus::Resolved),
    ];
    let deficiencies: Vec<Deficiency> = raw
        .deficiencies
        .iter()
        .filter_map(|d| {
            let status = cx.choice(&d.status, "deficiency.status", &statuses)?;
            Some(Deficiency {
                item: d.item.clone(),
                status,
                note: d.note.clone(),
            })
        })
        .collect();
    let signoff = raw
        .signoff
        .as_ref()
        .map(|s| SystemSignoff {
            tested_by: s.tested_by.clone(),
            certificate: s.certificate.clone(),
            reviewed_by: s.reviewed_by.clone(),
        })
        .unwrap_or_default();
    if !complete || date.is_none() || (s.tolerance.is_some() && system_tolerance.is_none()) {
        return None;
    }
    Some(ParsedSystem {
        spec: SystemSpec {
            title: s.title.clone(),
            site: s.site.clone(),
            date: date?,
            organisation: s.organisation.clone(),
            tolerance_given: system_tolerance.is_some(),
            tolerance: system_tolerance
                .unwrap_or_else(|| Tolerance::new(crate::system::rules::DEFAULT_TOLERANCE)),
            fan,
            ducts,
            terminal_file: raw.terminals.as_ref().map(|t| t.readings.get_ref().clone()),
            terminals: Vec::new(),
            deficiencies,
        },
        signoff,
        terminals: raw
            .terminals
            .as_ref()
            .map(|t| (t.readings.get_ref().clone(), t.readings.span())),
        survey_spans,
        spans,
    })
}

/// The located diagnostic for a relation problem of the system file (`None` for terminal
/// problems, which belong to the terminals CSV).
fn locate_spec_error(cx: &Ctx, p: &ParsedSystem, e: &SpecError) -> Option<Diagnostic> {
    let sp = &p.spans;
    let ducts = &p.spec.ducts;
    let at = |span: &Range<usize>, key: &str| cx.loc(span.clone(), key);
    let d = match e {
        SpecError::DuplicateTag { index, first } => Diagnostic::new(format!(
            "two ducts are tagged `{}`",
            ducts[*index].tag
        ))
        .at(at(&sp.duct_tag[*index], "duct.tag"))
        .hint(format!(
            "the first is at line {}; give every duct its own tag",
            super::text::line_column(cx.text, sp.duct_tag[*first].start).0
        )),
        SpecError::BranchWithoutParent { index } => Diagnostic::new(format!(
            "duct `{}` is a branch but does not say which duct it branches from",
            ducts[*index].tag
        ))
        .at(at(&sp.duct_role[*index], "duct.role"))
        .hint("add `of = \"TAG\"` naming the duct it is taken off"),
        SpecError::ParentOnNonBranch { index } => Diagnostic::new(format!(
            "duct `{}` has `of` but its role is `{}`, not `branch`",
            ducts[*index].tag,
            ducts[*index].role.name()
        ))
        .at(at(
            sp.duct_of[*index].as_ref().unwrap_or(&sp.duct_role[*index]),
            "duct.of",
        ))
        .hint("set role = \"branch\", or remove `of`"),
        SpecError::UnknownParent { index } => {
            let of = ducts[*index].of.clone().unwrap_or_default();
            let tags: Vec<&str> = ducts.iter().map(|d| d.tag.as_str()).collect();
            Diagnostic::new(format!(
                "duct `{}` is a branch of `{of}`, which is not a duct of this system",
                ducts[*index].tag
            ))
            .at(at(
                sp.duct_of[*index].as_ref().unwrap_or(&sp.duct_role[*index]),
                "duct.of",
            ))
            .hint(match closest(&of, &tags) {
                Some(t) => format!("did you mean `{t}`?"),
                None => format!("the ducts are: {}", tags.join(", ")),
            })
        }
        SpecError::Circle { index, path } => Diagnostic::new(format!(
            "the branches go round in a circle: {}",
            path.join(" → ")
        ))
        .at(at(
            sp.duct_of[*index].as_ref().unwrap_or(&sp.duct_role[*index]),
            "duct.of",
        ))
        .hint("a branch is taken off a duct nearer the fan; one duct of the circle must be a supply, return or other main"),
        SpecError::DesignNotPositive { index } => Diagnostic::new(format!(
            "the design flow of duct `{}` must be positive",
            ducts[*index].tag
        ))
        .at(at(&sp.duct_design[*index], "duct.design"))
        .hint("write the design airflow, e.g. \"8000 cfm\""),
        SpecError::ToleranceOutOfRange { duct } => {
            let (span, key) = match duct {
                Some(i) => (sp.duct_tolerance[*i].clone(), "duct.tolerance"),
                None => (
                    sp.system_tolerance
                        .clone()
                        .or_else(|| sp.fan_tolerance.clone()),
                    "tolerance",
                ),
            };
            Diagnostic::new("a tolerance must be more than 0 % and less than 100 % of design")
                .at(at(&span.unwrap_or(sp.system_header.clone()), key))
                .hint("write e.g. tolerance = \"10 %\"")
        }
        SpecError::FanDuctUnknown { index } => {
            let tag = p
                .spec
                .fan
                .as_ref()
                .and_then(|f| f.ducts.get(*index))
                .cloned()
                .unwrap_or_default();
            let tags: Vec<&str> = ducts.iter().map(|d| d.tag.as_str()).collect();
            Diagnostic::new(format!("the fan's duct `{tag}` is not a duct of this system"))
                .at(at(
                    sp.fan_duct.as_ref().unwrap_or(&sp.system_header),
                    "fan.duct",
                ))
                .hint(match closest(&tag, &tags) {
                    Some(t) => format!("did you mean `{t}`?"),
                    None => format!("the ducts are: {}", tags.join(", ")),
                })
        }
        SpecError::FanWithoutDuct => Diagnostic::new(
            "the fan's flow is taken from the supply ducts, and this system has none",
        )
        .at(at(sp.fan_tag.as_ref().unwrap_or(&sp.system_header), "fan.tag"))
        .hint("name the duct(s) that carry the fan's air: duct = \"RA-main\""),
        SpecError::FanValueNotPositive { key } => {
            let span = sp
                .fan_keys
                .iter()
                .find(|(k, _)| k == key)
                .map(|(_, s)| s.clone())
                .unwrap_or(sp.system_header.clone());
            Diagnostic::new(format!("`fan.{key}` must be positive"))
                .at(at(&span, &format!("fan.{key}")))
                .hint("leave out a figure that was not read")
        }
        SpecError::TerminalBranchUnknown { .. }
        | SpecError::TerminalValueNotPositive { .. }
        | SpecError::DuplicateTerminal { .. } => return None,
    };
    Some(d)
}

/// The closest of `known` to `found` by edit distance (at most 2 edits), for did-you-mean hints.
pub(super) fn closest<'k>(found: &str, known: &[&'k str]) -> Option<&'k str> {
    fn distance(a: &str, b: &str) -> usize {
        let b: Vec<char> = b.chars().collect();
        let mut prev: Vec<usize> = (0..=b.len()).collect();
        for (i, ca) in a.chars().enumerate() {
            let mut cur = vec![i + 1];
            for (j, cb) in b.iter().enumerate() {
                cur.push(
                    (prev[j] + usize::from(ca != *cb))
                        .min(prev[j + 1] + 1)
                        .min(cur[j] + 1),
                );
            }
            prev = cur;
        }
        prev[b.len()]
    }
    known
        .iter()
        .map(|k| (distance(found, k), *k))
        .filter(|(d, _)| *d <= 2)
        .min()
        .map(|(_, k)| k)
}

/// Reads a system file and every file it names; reports every problem of every file.
pub fn load_system(path: &Path) -> Result<LoadedSystem, Error> {
    load_system_with(path, &|p| std::fs::read(p))
}

/// [`load_system`] with the bytes of each file supplied by `source`.
pub fn load_system_with(path: &Path, source: FileSource) -> Result<LoadedSystem, Error> {
    let name = path.display().to_string();
    let (bytes, text) = read_text_with(path, &name, source)?;
    let parsed = parse_system(&name, &text)?;
    let dir = path.parent().unwrap_or(Path::new("."));
    let mut diags = Diagnostics::new();
    let mut ducts = Vec::new();
    let mut survey_locations = Vec::new();
    for (d, span) in parsed.spec.ducts.iter().zip(&parsed.survey_spans) {
        let at = span_location(&name, &text, span.start)
            .with_context(format!("duct {}, `survey`", d.tag));
        survey_locations.push(at.clone());
        let spath = dir.join(&d.survey);
        if let Err(e) = source(&spath) {
            diags.push(
                Diagnostic::new(format!(
                    "the survey of duct `{}` cannot be read: `{}`: {e}",
                    d.tag,
                    spath.display()
                ))
                .at(at)
                .hint("survey paths are relative to the system file"),
            );
            continue;
        }
        match super::load_with(&spath, source) {
            Ok(l) => ducts.push(l),
            Err(Error::Input(d)) => diags.extend(d),
            Err(e) => return Err(e),
        }
    }
    let mut spec = parsed.spec;
    let mut terminals_file = None;
    if let Some((rel, span)) = &parsed.terminals {
        let tpath = dir.join(rel);
        let tname = tpath.display().to_string();
        match read_text_with(&tpath, &tname, source) {
            Err(e) => diags.push(
                Diagnostic::new(format!("the terminals file cannot be read: {}", e.message))
                    .at(span_location(&name, &text, span.start)
                        .with_context("`terminals.readings`"))
                    .hint("the readings path is relative to the system file"),
            ),
            Ok((tbytes, ttext)) => match super::terminals_file::read_terminals(&tname, &ttext) {
                Err(Error::Input(d)) => diags.extend(d),
                Err(e) => return Err(e),
                Ok((rows, cell_problems)) => {
                    // the rows that were read are checked against the ducts too: one pass
                    diags.extend(cell_problems);
                    spec.terminals = rows.terminals.clone();
                    for e in validate(&spec) {
                        if let Some(d) =
                            super::terminals_file::locate_terminal_error(&tname, &spec, &rows, &e)
                        {
                            diags.push(d);
                        }
                    }
                    terminals_file = Some(SourceFile {
                        name: rel.clone(),
                        path: tpath,
                        bytes: tbytes,
                    });
                }
            },
        }
    }
    diags.finish(LoadedSystem {
        file: SourceFile {
            name: path
                .file_name()
                .map(|n| n.to_string_lossy().to_string())
                .unwrap_or(name),
            path: path.to_path_buf(),
            bytes,
        },
        spec,
        signoff: parsed.signoff,
        ducts,
        survey_locations,
        terminals: terminals_file,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::input::MemoryFiles;
    use crate::units::FlowBasis;

    const SYSTEM: &str = r#"
[system]
title = "AHU-1 air system"
site = "Test site"
date = "2026-11-20"
organisation = "Test firm"

[fan]
tag = "SF-1"
design_flow = "8000 cfm"
design_rpm = 1150
measured_rpm = 1100
design_static = "2.5 inH2O"
measured_static = "2.2 inH2O"
motor_amps_rated = "21 A"
measured_amps = "18.4 A"

[[duct]]
tag = "SA-main"
survey = "sa/survey.toml"
role = "supply"
design = "8000 acfm"

[[duct]]
tag = "SA-1"
survey = "sa1/survey.toml"
role = "branch"
of = "SA-main"
design = "3000 cfm"
tolerance = "5 %"
tolerance_reason = "laboratory branch"

[terminals]
readings = "terminals.csv"

[[deficiency]]
item = "Damper VD-3 seized"
status = "open"
"#;

    fn errors(text: &str) -> Vec<Diagnostic> {
        match parse_system("system.toml", text) {
            Err(Error::Input(d)) => d.items().to_vec(),
            other => panic!("expected input errors, got {other:?}"),
        }
    }

    fn at(d: &Diagnostic) -> (usize, usize) {
        let l = d.location.as_ref().expect("located");
        (l.line.unwrap_or(0), l.column.unwrap_or(0))
    }

    #[test]
    fn parses_the_contract_example() {
        let p = parse_system("system.toml", SYSTEM).expect("valid");
        let s = &p.spec;
        assert_eq!(s.title, "AHU-1 air system");
        assert_eq!(s.organisation.as_deref(), Some("Test firm"));
        assert!(!s.tolerance_given);
        assert_eq!(s.tolerance.fraction, 0.10);
        assert_eq!(s.ducts.len(), 2);
        assert_eq!(s.ducts[1].role, Role::Branch);
        assert_eq!(s.ducts[1].of.as_deref(), Some("SA-main"));
        // cfm is actual (contract: flow units with a basis)
        assert_eq!(s.ducts[1].design.basis, FlowBasis::Actual);
        assert_eq!(
            s.ducts[1].tolerance,
            Some(Tolerance {
                fraction: 0.05,
                reason: Some("laboratory branch".into())
            })
        );
        let f = s.fan.as_ref().expect("fan");
        assert_eq!(f.measured_rpm, Some(1100.0));
        // NIST SP 811 B.8: 1 inH2O (conventional) = 249.0889 Pa
        assert!((f.measured_static_pa.unwrap_or(0.0) - 2.2 * 249.0889).abs() < 1e-3);
        assert_eq!(f.measured_amps, Some(18.4));
        assert_eq!(s.terminal_file.as_deref(), Some("terminals.csv"));
        assert_eq!(s.deficiencies[0].status, DeficiencyStatus::Open);
    }

    #[test]
    fn a_design_with_no_unit_is_located() {
        let text = SYSTEM.replace("design = \"8000 acfm\"", "design = \"8000\"");
        let e = errors(&text);
        assert_eq!(e.len(), 1);
        assert!(e[0].message.contains("has no unit"), "{}", e[0].message);
        // line 22 of SYSTEM, the value starts at column 10
        assert_eq!(at(&e[0]), (22, 10));
        assert!(e[0].hint.as_deref().unwrap_or("").contains("scfm"));
    }

    #[test]
    fn a_branch_of_an_unknown_duct_is_located_with_a_suggestion() {
        let text = SYSTEM.replace("of = \"SA-main\"", "of = \"SA-mian\"");
        let e = errors(&text);
        assert_eq!(e.len(), 1);
        assert!(e[0].message.contains("`SA-mian`"), "{}", e[0].message);
        assert_eq!(at(&e[0]), (28, 6));
        assert_eq!(e[0].hint.as_deref(), Some("did you mean `SA-main`?"));
    }

    #[test]
    fn a_circle_of_branches_is_located() {
        let text = SYSTEM.replace(
            "role = \"supply\"\ndesign = \"8000 acfm\"",
            "role = \"branch\"\nof = \"SA-1\"\ndesign = \"8000 acfm\"",
        );
        let e = errors(&text);
        assert!(
            e.iter()
                .any(|d| d.message.contains("SA-main → SA-1 → SA-main")),
            "{e:?}"
        );
        let circle = e
            .iter()
            .find(|d| d.message.contains("circle"))
            .expect("circle reported");
        assert_eq!(at(circle), (22, 6));
    }

    #[test]
    fn every_problem_is_reported_in_one_pass() {
        let text = SYSTEM
            .replace("design = \"3000 cfm\"", "design = \"3000 cfn\"")
            .replace("role = \"supply\"", "role = \"suply\"")
            .replace("measured_rpm = 1100", "measured_rpm = \"fast\"");
        let e = errors(&text);
        assert_eq!(e.len(), 3, "{e:?}");
        assert_eq!(e[2].hint.as_deref(), Some("write e.g. measured_rpm = 1150"));
        // a speed may carry its unit
        let text = SYSTEM.replace("measured_rpm = 1100", "measured_rpm = \"1100 rpm\"");
        let p = parse_system("system.toml", &text).expect("valid");
        assert_eq!(p.spec.fan.and_then(|f| f.measured_rpm), Some(1100.0));
        let text = SYSTEM
            .replace("design = \"3000 cfm\"", "design = \"3000 cfn\"")
            .replace("role = \"supply\"", "role = \"suply\"")
            .replace("measured_rpm = 1100", "measured_rpm = \"fast\"");
        let e = errors(&text);
        assert_eq!(e.len(), 3, "{e:?}");
    }

    #[test]
    fn unknown_keys_are_refused_with_their_place() {
        let text = SYSTEM.replace("organisation =", "organization =");
        let e = errors(&text);
        assert_eq!(e.len(), 1);
        assert!(e[0].message.contains("organization"), "{}", e[0].message);
        assert_eq!(at(&e[0]).0, 6);
    }

    #[test]
    fn a_system_reads_back_from_the_files_it_was_read_from() {
        let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-data/building/ahu-2.toml");
        let loaded = load_system(&path).expect("sample loads");
        let inputs = loaded.inputs();
        let roles: Vec<(&str, &str)> = inputs.iter().map(|i| (i.role, i.path.as_str())).collect();
        assert_eq!(roles[0], ("system", "ahu-2.toml"));
        assert!(roles.contains(&("survey", "sa-main/survey.toml")));
        assert!(roles.contains(&("readings", "sa-main/traverse.csv")));
        assert_eq!(roles.last(), Some(&("terminals", "terminals.csv")));
        // 1 system file, 6 surveys, 6 readings files, 1 terminals file
        assert_eq!(inputs.len(), 14);
        let again = load_system_from(&inputs).expect("reads back");
        assert_eq!(again.spec, loaded.spec);
        assert_eq!(again.inputs(), inputs);
    }

    #[test]
    fn a_missing_survey_and_an_unknown_terminal_branch_are_located_in_one_pass() {
        let mut files = MemoryFiles::new();
        files.insert("job/system.toml", SYSTEM);
        files.insert(
            "job/terminals.csv",
            "tag,branch,design[cfm],measured[cfm]\nD-1,SA-2,250,262\n",
        );
        let e = match load_system_with(Path::new("job/system.toml"), &|p| files.read(p)) {
            Err(Error::Input(d)) => d.items().to_vec(),
            other => panic!("{other:?}"),
        };
        assert_eq!(e.len(), 3, "{e:?}");
        assert!(e[0]
            .message
            .contains("survey of duct `SA-main` cannot be read"));
        assert_eq!(at(&e[0]), (20, 10));
        assert!(e[1].message.contains("SA-1"));
        assert!(e[2].message.contains("`SA-2`"), "{}", e[2].message);
        assert_eq!(at(&e[2]), (2, 2));
        assert_eq!(e[2].hint.as_deref(), Some("did you mean `SA-1`?"));
    }
}
