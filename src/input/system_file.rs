//! Reads a system file (`annulus system SYSTEM.toml`): the air system's ducts, each an existing
//! survey, their roles and designs, the fan, the terminal readings and the deficiencies; then every
//! duct's survey and the terminals CSV.
//!
//! Every problem of every file is reported in one pass: the system file's own structure and values
//! (through [`super::toml_doc`]), the relations between ducts ([`crate::system::validate`], located
//! at the key that makes them wrong), each survey's and readings file's problems, and the terminals
//! CSV's cells ([`super::terminals_file`]).

use super::survey::options::design_flow;
use super::terminals_file::{locate_terminal_error, read_terminals};
use super::toml_doc::{did_you_mean, Field, Table, TomlDoc};
use super::{load_referenced, read_referenced, read_text_with, FileKind, FileSource, Loaded};
use super::{MemoryFiles, SourceFile};
use crate::diag::{Diagnostic, Error, Location};
use crate::input::toml_doc::Value;
use crate::limits::MAX_SYSTEM_DUCTS;
use crate::system::rules::DEFAULT_TOLERANCE;
use crate::system::{
    validate, Deficiency, DeficiencyStatus, DuctSpec, FanSpec, Role, SpecError, SystemSpec,
    Tolerance,
};
use crate::units::Dimension;
use std::path::Path;

const HINT_FORMAT: &str =
    "see the system file format in the README (sample-data/building/ahu-2.toml is a complete example)";

/// Who signs the submittal, as the system file's `[signoff]` says (the surveys and the user's
/// configuration fill the gaps): the survey's own sign-off type.
pub use crate::survey::Signoff as SystemSignoff;

/// Where the values that relations refer to are written, to place a relation's problem.
#[derive(Debug, Clone, Default)]
struct Places {
    duct_tag: Vec<Location>,
    duct_role: Vec<Location>,
    duct_of: Vec<Option<Location>>,
    duct_design: Vec<Location>,
    duct_tolerance: Vec<Option<Location>>,
    system: Location,
    system_tolerance: Option<Location>,
    fan: Option<Location>,
    fan_duct: Option<Location>,
    fan_keys: Vec<(&'static str, Location)>,
    fan_tolerance: Option<Location>,
}

/// A system file as read, before its surveys are loaded.
#[derive(Debug, Clone)]
pub struct ParsedSystem {
    pub spec: SystemSpec,
    pub signoff: SystemSignoff,
    /// Where each duct's `survey` is written (its problems are reported there).
    pub survey_locations: Vec<Location>,
    /// The terminals CSV as written and where.
    terminals: Option<(String, Location)>,
    places: Places,
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
    /// Every file the system was read from, as paths on this machine: the files an output must
    /// never replace.
    pub fn input_paths(&self) -> Vec<std::path::PathBuf> {
        let mut v = vec![self.file.path.clone()];
        for d in &self.ducts {
            v.extend(super::fs::input_paths(d));
        }
        v.extend(self.terminals.iter().map(|t| t.path.clone()));
        v
    }

    /// A submittal embeds every input under its path relative to the system file; an absolute
    /// path (in the system file or in a duct's survey) would carry this machine's folder names
    /// into the submittal and could not be laid out again by `verify`, so it is refused, every
    /// such path in one pass.
    pub fn check_embeddable(&self) -> Result<(), Error> {
        let mut diags = crate::diag::Diagnostics::new();
        let system = self.file.path.display().to_string();
        let absolute = |w: &str| super::fs::classify_reference(w) == super::fs::Place::Absolute;
        for (d, at) in self.spec.ducts.iter().zip(&self.survey_locations) {
            if absolute(&d.survey) {
                diags.push(
                    Diagnostic::new(format!(
                        "duct {}'s survey `{}` is an absolute path, which a submittal does not carry",
                        d.tag, d.survey
                    ))
                    .at(at.clone())
                    .hint("write the path relative to the system file (e.g. `supply-main/survey.toml`)"),
                );
            }
        }
        if let Some(t) = self.terminals.as_ref().filter(|t| absolute(&t.name)) {
            diags.push(
                Diagnostic::new(format!(
                    "the terminals file `{}` is an absolute path, which a submittal does not carry",
                    t.name
                ))
                .at(Location::file(&system))
                .hint("write the path relative to the system file (e.g. `terminals.csv`)"),
            );
        }
        for d in &self.ducts {
            if let Err(Error::Input(more)) = super::fs::check_embeddable(d) {
                diags.extend(more);
            }
        }
        diags.finish(())
    }

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
    let mut files = MemoryFiles::new();
    for i in inputs {
        files.insert(&i.path, i.bytes.clone());
    }
    load_system_with(Path::new(&system.path), &|p| files.read(p))
}

/// A ± tolerance on percent of design (`"10 %"`) with its optional reason.
fn tolerance(t: &Table, key: &'static str) -> Option<Option<Tolerance>> {
    let Some(f) = t.get(key) else {
        if let Some(r) = t.get("tolerance_reason") {
            r.error(
                format!("`{}` explains a tolerance that is not given", r.path()),
                Some(format!("add {key} = \"10 %\", or remove the reason")),
            );
        }
        return Some(None);
    };
    let fraction = f.quantity(Dimension::Fraction)?;
    let reason = t.opt_text("tolerance_reason");
    Some(Some(Tolerance { fraction, reason }))
}

/// A fan speed: a plain number of rpm, or the same with its unit (`"1150 rpm"`).
fn rpm(f: &Field) -> Option<f64> {
    match f.value {
        Value::String(_) => f.quantity(Dimension::RotationalSpeed),
        Value::Integer(_) | Value::Float(_) => f.number(),
        _ => {
            f.wrong_type(
                "a number of revolutions per minute",
                Some(format!(
                    "write e.g. {} = 1150",
                    f.path().rsplit('.').next().unwrap_or("rpm")
                )),
            );
            None
        }
    }
}

/// The tags a fan's `duct` names: one string or a list of them.
fn tags(f: &Field) -> Option<Vec<String>> {
    match f.value {
        Value::String(s) => Some(vec![s.trim().to_string()]),
        Value::Array(_) => f
            .strings()
            .map(|v| v.into_iter().map(|t| t.trim().to_string()).collect()),
        _ => {
            f.wrong_type(
                "a duct tag or a list of them",
                Some("write e.g. duct = \"SA-main\" or duct = [\"SA-1\", \"SA-2\"]".into()),
            );
            None
        }
    }
}

fn read_fan(t: &Table, places: &mut Places) -> Option<FanSpec> {
    let doc = t.doc();
    places.fan = Some(doc.location(t.span(), "fan"));
    let tag = t.text("tag", "\"SF-1\"");
    let design = t.required("design_flow", "\"8000 cfm\"");
    if let Some(f) = &design {
        places
            .fan_keys
            .push(("design_flow", doc.location(f.span.clone(), &f.path())));
    }
    let design = design.and_then(|f| design_flow(&f));
    let ducts = match t.get("duct") {
        None => Some(Vec::new()),
        Some(f) => {
            places.fan_duct = Some(doc.location(f.span.clone(), "fan.duct"));
            tags(&f)
        }
    };
    let mut speed = |key: &'static str| -> Option<Option<f64>> {
        match t.get(key) {
            None => Some(None),
            Some(f) => {
                places
                    .fan_keys
                    .push((key, doc.location(f.span.clone(), &f.path())));
                rpm(&f).map(Some)
            }
        }
    };
    let design_rpm = speed("design_rpm");
    let measured_rpm = speed("measured_rpm");
    let mut figure = |key: &'static str, dim: Dimension| -> Option<Option<f64>> {
        match t.get(key) {
            None => Some(None),
            Some(f) => {
                places
                    .fan_keys
                    .push((key, doc.location(f.span.clone(), &f.path())));
                f.quantity(dim).map(Some)
            }
        }
    };
    let design_static = figure("design_static", Dimension::Pressure);
    let measured_static = figure("measured_static", Dimension::Pressure);
    let amps_rated = figure("motor_amps_rated", Dimension::Current);
    let amps = figure("measured_amps", Dimension::Current);
    let power_rated = figure("motor_power_rated", Dimension::Power);
    let power = figure("measured_power", Dimension::Power);
    places.fan_tolerance = t
        .get("tolerance")
        .map(|f| doc.location(f.span, "fan.tolerance"));
    let tolerance = tolerance(t, "tolerance");
    Some(FanSpec {
        tag: tag?,
        design_flow: design?,
        ducts: ducts?,
        design_rpm: design_rpm?,
        measured_rpm: measured_rpm?,
        design_static_pa: design_static?,
        measured_static_pa: measured_static?,
        motor_amps_rated: amps_rated?,
        measured_amps: amps?,
        motor_power_rated_w: power_rated?,
        measured_power_w: power?,
        tolerance: tolerance?,
    })
}

fn read_duct(t: &Table, places: &mut Places) -> (Option<DuctSpec>, Option<Location>) {
    let doc = t.doc();
    let at = |f: &Option<Field>, key: &str| {
        f.as_ref()
            .map(|f| doc.location(f.span.clone(), key))
            .unwrap_or_else(|| doc.location(t.span(), key))
    };
    let tag_field = t.required("tag", "\"SA-1\"");
    let role_field = t.required("role", "\"supply\"");
    let design_field = t.required("design", "\"8000 cfm\"");
    let survey_field = t.required("survey", "\"sa-1/survey.toml\"");
    let of_field = t.get("of");
    places.duct_tag.push(at(&tag_field, "duct.tag"));
    places.duct_role.push(at(&role_field, "duct.role"));
    places.duct_design.push(at(&design_field, "duct.design"));
    places.duct_of.push(
        of_field
            .as_ref()
            .map(|f| doc.location(f.span.clone(), "duct.of")),
    );
    places.duct_tolerance.push(
        t.get("tolerance")
            .map(|f| doc.location(f.span, "duct.tolerance")),
    );
    let survey_at = survey_field
        .as_ref()
        .map(|f| doc.location(f.span.clone(), "duct.survey"));
    let tag = tag_field.and_then(|f| f.filled("give each duct a short tag such as \"SA-1\""));
    let role = role_field.and_then(|f| f.choice(&Role::ALL.map(|r| (r.name(), r))));
    let design = design_field.and_then(|f| design_flow(&f));
    let survey = survey_field.and_then(|f| f.str().map(|s| s.trim().to_string()));
    let of = match &of_field {
        None => Some(None),
        Some(f) => f.str().map(|s| Some(s.trim().to_string())),
    };
    let tolerance = tolerance(t, "tolerance");
    let spec = (|| {
        Some(DuctSpec {
            tag: tag?,
            survey: survey?,
            role: role?,
            of: of?,
            design: design?,
            tolerance: tolerance?,
        })
    })();
    (spec, survey_at)
}

/// Reads the system file's tables; relations are not checked here.
fn read_system(root: &Table) -> Option<ParsedSystem> {
    let doc = root.doc();
    let s = root.table("system");
    let mut places = Places {
        system: doc.location(s.as_ref().map(|t| t.span()).unwrap_or(0..0), "system"),
        ..Places::default()
    };
    let (title, date, organisation, site, sys_tolerance) = match &s {
        Some(s) => {
            places.system_tolerance = s
                .get("tolerance")
                .map(|f| doc.location(f.span, "system.tolerance"));
            (
                s.text("title", "\"AHU-1 air system\""),
                s.date("date", "2026-11-20"),
                s.opt_text("organisation"),
                s.opt_text("site"),
                tolerance(s, "tolerance"),
            )
        }
        None => (None, None, None, None, None),
    };
    let signoff = super::survey::options::read_signoff(root);
    let fan = match root.opt_table("fan") {
        None => Some(None),
        Some(t) => read_fan(&t, &mut places).map(Some),
    };
    let duct_tables = root.tables("duct");
    if duct_tables.is_empty() {
        doc.push(
            Diagnostic::new("the system file has no [[duct]]")
                .at(places.system.clone())
                .hint("add one [[duct]] per traversed duct: tag, survey, role and design"),
        );
    }
    let mut ducts = Vec::new();
    let mut survey_locations = Vec::new();
    let mut complete = !duct_tables.is_empty();
    for t in &duct_tables {
        let (d, at) = read_duct(t, &mut places);
        survey_locations.push(at.unwrap_or_else(|| doc.location(t.span(), "duct")));
        match d {
            Some(d) => ducts.push(d),
            None => complete = false,
        }
    }
    let terminals = root.opt_table("terminals").and_then(|t| {
        let f = t.required("readings", "\"terminals.csv\"")?;
        let path = f.str()?.trim().to_string();
        Some((path, doc.location(f.span.clone(), "terminals.readings")))
    });
    let statuses = [
        ("open", DeficiencyStatus::Open),
        ("resolved", DeficiencyStatus::Resolved),
    ];
    let mut deficiencies = Vec::new();
    for t in root.tables("deficiency") {
        let item = t.text("item", "\"Damper VD-3 seized\"");
        let status = t.choice("status", &statuses);
        let note = t.opt_text("note");
        if let (Some(item), Some(status)) = (item, status) {
            deficiencies.push(Deficiency { item, status, note });
        } else {
            complete = false;
        }
    }
    if !complete {
        return None;
    }
    let tolerance = sys_tolerance?;
    Some(ParsedSystem {
        spec: SystemSpec {
            title: title?,
            site,
            date: date?,
            organisation,
            tolerance_given: tolerance.is_some(),
            tolerance: tolerance.unwrap_or_else(|| Tolerance::new(DEFAULT_TOLERANCE)),
            fan: fan?,
            ducts,
            terminal_file: terminals.as_ref().map(|(p, _)| p.clone()),
            terminals: Vec::new(),
            deficiencies,
        },
        signoff,
        survey_locations,
        terminals,
        places,
    })
}

/// Parses a system file's text (`file` names it in diagnostics) and checks the relations between
/// its ducts; the surveys and the terminals CSV are not read ([`load_system`] does that).
pub fn parse_system(file: &str, text: &str) -> Result<ParsedSystem, Error> {
    let doc = TomlDoc::parse(file, text, "system file")?;
    let parsed = read_checked(&doc);
    doc.finish(parsed)
}

/// Reads the tables and records every relation problem in `doc`.
fn read_checked(doc: &TomlDoc) -> Option<ParsedSystem> {
    let parsed = {
        let root = doc.root();
        read_system(&root)
    };
    if let Some(p) = &parsed {
        for e in validate(&p.spec) {
            if let Some(d) = locate_spec_error(p, &e) {
                doc.push(d);
            }
        }
    }
    if parsed.is_none() && !doc.has_errors() {
        doc.push(
            Diagnostic::new("the system file could not be read")
                .at(Location::file(doc.file()))
                .hint(HINT_FORMAT),
        );
    }
    parsed
}

/// Why a relation does not stand, at the key that makes it wrong (`None` for terminal problems,
/// which belong to the terminals CSV).
fn locate_spec_error(p: &ParsedSystem, e: &SpecError) -> Option<Diagnostic> {
    let pl = &p.places;
    let ducts = &p.spec.ducts;
    let tags: Vec<&str> = ducts.iter().map(|d| d.tag.as_str()).collect();
    let suggest = |found: &str| match did_you_mean(found, &tags) {
        Some(t) => format!("did you mean `{t}`?"),
        None => format!("the ducts are: {}", tags.join(", ")),
    };
    let of_or_role = |i: usize| pl.duct_of[i].clone().unwrap_or(pl.duct_role[i].clone());
    let d = match e {
        SpecError::DuplicateTag { index, first } => Diagnostic::new(format!(
            "two ducts are tagged `{}`",
            ducts[*index].tag
        ))
        .at(pl.duct_tag[*index].clone())
        .hint(format!(
            "the first is at line {}; give every duct its own tag",
            pl.duct_tag[*first].line.unwrap_or(0)
        )),
        SpecError::BranchWithoutParent { index } => Diagnostic::new(format!(
            "duct `{}` is a branch but does not say which duct it branches from",
            ducts[*index].tag
        ))
        .at(pl.duct_role[*index].clone())
        .hint("add `of = \"TAG\"` naming the duct it is taken off"),
        SpecError::ParentOnNonBranch { index } => Diagnostic::new(format!(
            "duct `{}` has `of` but its role is `{}`, not `branch`",
            ducts[*index].tag,
            ducts[*index].role.name()
        ))
        .at(of_or_role(*index))
        .hint("set role = \"branch\", or remove `of`"),
        SpecError::UnknownParent { index } => {
            let of = ducts[*index].of.clone().unwrap_or_default();
            Diagnostic::new(format!(
                "duct `{}` is a branch of `{of}`, which is not a duct of this system",
                ducts[*index].tag
            ))
            .at(of_or_role(*index))
            .hint(suggest(&of))
        }
        SpecError::Circle { index, path } => Diagnostic::new(format!(
            "the branches go round in a circle: {}",
            path.join(" → ")
        ))
        .at(of_or_role(*index))
        .hint("a branch is taken off a duct nearer the fan; one duct of the circle must be a supply, return or other main"),
        SpecError::DesignNotPositive { index } => Diagnostic::new(format!(
            "the design flow of duct `{}` must be positive",
            ducts[*index].tag
        ))
        .at(pl.duct_design[*index].clone())
        .hint("write the design airflow, e.g. \"8000 cfm\""),
        SpecError::ToleranceOutOfRange { duct } => {
            let at = match duct {
                Some(i) => pl.duct_tolerance[*i].clone(),
                None => pl.system_tolerance.clone().or(pl.fan_tolerance.clone()),
            };
            Diagnostic::new("a tolerance must be more than 0 % and less than 100 % of design")
                .at(at.unwrap_or(pl.system.clone()))
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
            Diagnostic::new(format!("the fan's duct `{tag}` is not a duct of this system"))
                .at(pl.fan_duct.clone().unwrap_or(pl.system.clone()))
                .hint(suggest(&tag))
        }
        SpecError::FanWithoutDuct => Diagnostic::new(
            "the fan's flow is taken from the supply ducts, and this system has none",
        )
        .at(pl.fan.clone().unwrap_or(pl.system.clone()))
        .hint("name the duct(s) that carry the fan's air: duct = \"RA-main\""),
        SpecError::FanValueNotPositive { key } => Diagnostic::new(format!(
            "`fan.{key}` must be positive"
        ))
        .at(pl
            .fan_keys
            .iter()
            .find(|(k, _)| k == key)
            .map(|(_, l)| l.clone())
            .unwrap_or(pl.system.clone()))
        .hint("leave out a figure that was not read"),
        SpecError::TerminalBranchUnknown { .. }
        | SpecError::TerminalValueNotPositive { .. }
        | SpecError::DuplicateTerminal { .. } => return None,
    };
    Some(d)
}

/// Reads a system file and every file it names; reports every problem of every file.
pub fn load_system(path: &Path) -> Result<LoadedSystem, Error> {
    load_system_with(path, &|p| super::fs::read_file(p))
}

/// [`load_system`] with the bytes of each file supplied by `source`.
pub fn load_system_with(path: &Path, source: FileSource) -> Result<LoadedSystem, Error> {
    let name = path.display().to_string();
    let (bytes, text) = read_text_with(path, &name, crate::limits::FileKind::System, source)?;
    let doc = TomlDoc::parse(&name, &text, "system file")?;
    let parsed = read_checked(&doc);
    if let Some(p) = &parsed {
        // before any survey is read: each duct is a survey evaluated and drawn in the submittal
        super::fs::check_count(&name, "ducts", p.spec.ducts.len(), MAX_SYSTEM_DUCTS)?;
    }
    let dir = path.parent().unwrap_or(Path::new("."));
    let mut ducts = Vec::new();
    let mut terminals_file = None;
    let loaded = parsed.map(|mut p| {
        for (d, at) in p.spec.ducts.iter().zip(&p.survey_locations) {
            let at = at.clone().with_context(format!("duct {}, `survey`", d.tag));
            match load_referenced(
                &dir.join(&d.survey),
                &d.survey,
                &at,
                FileKind::SystemSurvey,
                source,
            ) {
                Ok(l) => ducts.push(l),
                Err(Error::Input(diags)) => doc.extend(diags),
                Err(e) => doc.push(Diagnostic::new(e.to_string()).at(at)),
            }
        }
        if let Some((rel, at)) = &p.terminals {
            let tpath = dir.join(rel);
            match read_referenced(&tpath, rel, at, FileKind::Terminals, source) {
                Err(d) => doc.push(d),
                Ok((tbytes, ttext)) => {
                    let tname = tpath.display().to_string();
                    match read_terminals(&tname, &ttext) {
                        Err(Error::Input(d)) => doc.extend(d),
                        Err(e) => doc.push(Diagnostic::new(e.to_string()).at(at.clone())),
                        Ok((rows, cell_problems)) => {
                            // the rows that were read are checked against the ducts too: one pass
                            doc.extend(cell_problems);
                            p.spec.terminals = rows.terminals.clone();
                            for e in validate(&p.spec) {
                                if let Some(d) = locate_terminal_error(&tname, &p.spec, &rows, &e) {
                                    doc.push(d);
                                }
                            }
                            terminals_file = Some(SourceFile {
                                name: rel.clone(),
                                path: tpath,
                                bytes: tbytes,
                            });
                        }
                    }
                }
            }
        }
        p
    });
    let p = doc.finish(loaded)?;
    Ok(LoadedSystem {
        file: SourceFile {
            name: path
                .file_name()
                .map(|n| n.to_string_lossy().to_string())
                .unwrap_or(name),
            path: path.to_path_buf(),
            bytes,
        },
        spec: p.spec,
        signoff: p.signoff,
        ducts,
        survey_locations: p.survey_locations,
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
        // in the order of the file: the fan's speed (line 12) first
        assert!(e[0].message.contains("fan.measured_rpm"), "{e:?}");
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
        // the survey, located at the system file's line naming it
        assert!(
            e[0].message
                .contains("cannot read the survey `sa/survey.toml`"),
            "{}",
            e[0].message
        );
        assert_eq!(at(&e[0]), (20, 10));
        assert!(e[1].message.contains("sa1/survey.toml"), "{}", e[1].message);
        assert!(e[2].message.contains("`SA-2`"), "{}", e[2].message);
        assert_eq!(at(&e[2]), (2, 2));
        assert_eq!(e[2].hint.as_deref(), Some("did you mean `SA-1`?"));
    }
}
