//! The test-and-balance submittal: its typed model (`templates/submittal.typ`), built from an
//! evaluated air system, and its rendering with every duct's plane drawing and velocity maps.
//!
//! Formatting only: the figures come from [`crate::system`] (worded by [`crate::system::words`], the
//! same sentences `annulus system` prints) and each duct's traverse from the single report's section
//! builders ([`super::build::report_data`]). Must not compute, read files or look at the clock.

use serde::Serialize;

use super::build::{hvac_cautions, report_data, software, Identity};
use super::engine::{meta_attachments, meta_date, report_charts, to_json, Engine, Job, Meta};
use super::model::{Paper, ReportData, SignOff};
use super::{RenderError, RenderOptions, Rendered};
use crate::checks::Status;
use crate::config::SignoffDefaults;
use crate::display::{DisplayTable, Kind, UnitSystem};
use crate::submittal::SystemEvaluation;
use crate::system::relations::OutsideAirMethod;
use crate::system::{words, DeficiencyStatus, TerminalReading};
use typst_pdf::PdfStandard;

/// The built-in submittal template.
pub const SUBMITTAL_TEMPLATE: &str = include_str!("../../templates/submittal.typ");
const SUBMITTAL_NAME: &str = "submittal.typ";

/// Everything the submittal shows, in reading order.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Submittal {
    pub header: SubmittalHeader,
    pub summary: SubmittalSummary,
    pub ducts: DuctTable,
    pub relations: Vec<Relation>,
    pub fan: Option<FanSheet>,
    pub terminals: Option<TerminalTable>,
    /// Each duct's traverse as the single report shows it, in the system file's order.
    pub traverses: Vec<Traverse>,
    pub deficiencies: Vec<DeficiencyRow>,
    pub notes: Vec<String>,
    /// Where the rules and laws used come from.
    pub sources: Vec<String>,
    /// HVAC safety cautions.
    pub safety: Vec<String>,
    pub signoff: SignOff,
}

/// Identification printed on the first page and in every page header and footer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SubmittalHeader {
    pub kind: String,
    pub title: String,
    pub site: String,
    pub organisation: String,
    pub test_date: String,
    pub report_id: String,
    pub content_sha256: String,
    pub signer_key_fingerprint: Option<String>,
    /// The signing key's name, printed with its fingerprint.
    pub signer_name: Option<String>,
    pub software: String,
    pub paper: Paper,
}

/// A labelled value.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Fact {
    pub label: String,
    pub value: String,
}

fn fact(label: &str, value: impl Into<String>) -> Fact {
    Fact {
        label: label.into(),
        value: value.into(),
    }
}

/// The first page: who, what, and the verdict.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SubmittalSummary {
    /// `pass`, `warn` or `fail`.
    pub verdict: Status,
    pub verdict_text: String,
    pub facts: Vec<Fact>,
    /// Key figures printed large (supply, return, outside air, fan).
    pub headline: Vec<Fact>,
    /// Items outside tolerance, one line each.
    pub outside: Vec<String>,
    pub warnings: Vec<String>,
}

/// The table of every duct.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DuctTable {
    /// Unit heads: size, area, velocity and static pressure.
    pub size_unit: String,
    pub area_unit: String,
    pub velocity_unit: String,
    pub static_unit: String,
    pub rows: Vec<DuctRow>,
    /// What each flow unit in the table means (`acfm: actual air at duct conditions`).
    pub bases: Vec<String>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DuctRow {
    pub tag: String,
    pub role: String,
    pub of: String,
    pub size: String,
    pub area: String,
    pub design: String,
    pub measured: String,
    /// The flow unit, which names the basis (`acfm`, `scfm`).
    pub unit: String,
    pub percent: String,
    pub tolerance: String,
    pub velocity: String,
    pub static_pressure: String,
    pub status: Status,
}

/// A relation between flows, in sentences.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Relation {
    pub title: String,
    pub status: Status,
    pub lines: Vec<String>,
}

/// The fan sheet.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FanSheet {
    pub tag: String,
    pub status: Status,
    pub motor: Status,
    pub rows: Vec<Fact>,
    pub sources: Vec<String>,
}

/// The terminals and their sums per branch.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TerminalTable {
    pub file: String,
    /// The flow units of the table (`acfm`), each naming its basis.
    pub flow_units: String,
    pub rows: Vec<TerminalRow>,
    pub sums: Vec<Relation>,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TerminalRow {
    pub tag: String,
    pub branch: String,
    pub room: String,
    pub kind: String,
    pub design: String,
    /// How it was read: `hood` or `560 fpm × 0.90 ft²`.
    pub reading: String,
    pub measured: String,
    pub percent: String,
    pub status: Status,
}

/// One duct's traverse.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Traverse {
    pub tag: String,
    pub role: String,
    /// The survey file as the submittal embeds it.
    pub survey: String,
    pub data: ReportData,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DeficiencyRow {
    pub status: String,
    pub open: bool,
    pub item: String,
    pub note: String,
}

fn ducts(e: &SystemEvaluation) -> DuctTable {
    let dt = &e.display;
    let area = dt.get(Kind::Area);
    let sp = dt.get(Kind::StaticPressure);
    let rows = e
        .result
        .ducts
        .iter()
        .zip(&e.ducts)
        .map(|(d, (ev, _))| DuctRow {
            tag: d.tag.clone(),
            role: d.role.words().into(),
            of: d.of.clone().unwrap_or_default(),
            size: words::size_number(dt, &ev.loaded.survey.duct),
            area: area.number_with(d.area_m2, 2),
            design: words::flow_number(dt, d.design_basis, d.design_flow_m3_s),
            measured: words::flow_number(dt, d.design_basis, d.measured_flow_m3_s),
            unit: dt.get(Kind::flow(d.design_basis)).symbol.into(),
            percent: words::percent(d.percent_of_design),
            tolerance: words::tolerance(d.tolerance_percent),
            velocity: dt.tab_number(Kind::Velocity, d.mean_velocity_m_s),
            static_pressure: d.static_pa.map(|p| sp.number(p)).unwrap_or_default(),
            status: d.status,
        })
        .collect();
    let mut bases = Vec::new();
    for d in &e.result.ducts {
        let line = format!(
            "{}: {}",
            dt.get(Kind::flow(d.design_basis)).symbol,
            words::basis(d.design_basis)
        );
        if !bases.contains(&line) {
            bases.push(line);
        }
    }
    DuctTable {
        size_unit: dt.get(Kind::Length).symbol.into(),
        area_unit: area.symbol.into(),
        velocity_unit: dt.get(Kind::Velocity).symbol.into(),
        static_unit: sp.symbol.into(),
        rows,
        bases,
    }
}

fn relations(e: &SystemEvaluation) -> Vec<Relation> {
    let dt = &e.display;
    let mut v: Vec<Relation> = e
        .result
        .branches
        .iter()
        .map(|b| Relation {
            title: format!("Branches of {}", b.of),
            status: b.status,
            lines: vec![words::branch_sum(dt, b)],
        })
        .collect();
    if let Some(o) = &e.result.outside_air {
        v.push(Relation {
            title: match o.method {
                OutsideAirMethod::Difference => "Outside air (supply − return)".into(),
                OutsideAirMethod::Measured => "Outside air (measured)".into(),
            },
            status: o.status,
            lines: words::outside_air(dt, o),
        });
    }
    v
}

fn terminals(e: &SystemEvaluation) -> Option<TerminalTable> {
    let r = &e.result;
    if r.terminals.is_empty() {
        return None;
    }
    let dt = &e.display;
    let area = dt.get(Kind::Area);
    let rows = r
        .terminals
        .iter()
        .zip(&e.loaded.spec.terminals)
        .map(|(t, spec)| TerminalRow {
            tag: t.tag.clone(),
            branch: t.branch.clone(),
            room: t.room.clone().unwrap_or_default(),
            kind: t.kind.clone().unwrap_or_default(),
            design: words::flow_number(dt, t.basis, t.design_flow_m3_s),
            reading: match spec.reading {
                TerminalReading::Flow { .. } => "hood".into(),
                TerminalReading::VelocityArea {
                    velocity_m_s,
                    area_m2,
                } => format!(
                    "{} × {}",
                    dt.tab_format(Kind::Velocity, velocity_m_s),
                    area.with_unit(area.number_with(area_m2, 2))
                ),
            },
            measured: words::flow_number(dt, t.basis, t.measured_flow_m3_s),
            percent: words::percent(t.percent_of_design),
            status: t.status,
        })
        .collect();
    let mut units: Vec<&str> = Vec::new();
    for t in &r.terminals {
        let u = dt.get(Kind::flow(t.basis)).symbol;
        if !units.contains(&u) {
            units.push(u);
        }
    }
    Some(TerminalTable {
        file: e.loaded.spec.terminal_file.clone().unwrap_or_default(),
        flow_units: units.join(", "),
        rows,
        sums: r
            .terminal_sums
            .iter()
            .map(|s| Relation {
                title: format!("Terminals on {}", s.branch),
                status: s.status,
                lines: vec![words::terminal_sum(dt, s)],
            })
            .collect(),
    })
}

fn summary(e: &SystemEvaluation, organisation: &str, signoff: &SignOff) -> SubmittalSummary {
    let spec = &e.loaded.spec;
    let r = &e.result;
    let dt = &e.display;
    let mut facts = Vec::new();
    for (label, value) in [
        ("Site", spec.site.clone().unwrap_or_default()),
        ("Firm", organisation.to_string()),
        ("Technician", signoff.tested_by.clone()),
        ("Certificate", signoff.certificate.clone()),
    ] {
        if !value.is_empty() {
            facts.push(fact(label, value));
        }
    }
    facts.push(fact("Test date", spec.date.to_string()));
    facts.push(fact("Tolerance", words::system_tolerance(spec)));
    facts.push(fact(
        "Units",
        format!(
            "{}; flows rounded to {} {} and velocities to {} {}, as balancing reports round them",
            match dt.system {
                UnitSystem::InchPound => "inch-pound",
                UnitSystem::Si | UnitSystem::EpaMetric => "SI",
            },
            dt.tab_step(Kind::ActualFlow).unwrap_or(1.0),
            dt.get(Kind::ActualFlow).symbol.trim_start_matches('a'),
            dt.tab_step(Kind::Velocity)
                .map(|s| crate::display::significant(s, 2))
                .unwrap_or_default(),
            dt.get(Kind::Velocity).symbol
        ),
    ));
    let mut headline = Vec::new();
    let sum_role = |role: crate::system::Role| {
        r.ducts
            .iter()
            .filter(|d| d.role == role)
            .map(|d| (d.measured_flow_m3_s, d.design_flow_m3_s, d.design_basis))
            .collect::<Vec<_>>()
    };
    for (label, role) in [
        ("Supply", crate::system::Role::Supply),
        ("Return", crate::system::Role::Return),
    ] {
        let ducts = sum_role(role);
        if let Some((_, _, basis)) = ducts.first() {
            let m: f64 = ducts.iter().map(|d| d.0).sum();
            let d: f64 = ducts.iter().map(|d| d.1).sum();
            headline.push(fact(
                label,
                format!(
                    "{} · {} of design",
                    words::flow(dt, *basis, m),
                    words::percent(crate::system::rules::percent_of(m, d))
                ),
            ));
        }
    }
    if let Some(o) = &r.outside_air {
        headline.push(fact(
            "Outside air",
            format!(
                "{} · {} of supply",
                words::flow(dt, o.basis, o.flow_m3_s),
                words::percent(o.percent_of_supply)
            ),
        ));
    }
    if let Some(f) = &r.fan {
        headline.push(fact(
            &format!("Fan {}", f.tag),
            format!(
                "{} · {} of design",
                words::flow(dt, f.basis, f.measured_flow_m3_s),
                words::percent(f.percent_of_design)
            ),
        ));
    }
    let mut outside = Vec::new();
    for d in r.ducts.iter().filter(|d| d.status == Status::Fail) {
        outside.push(format!(
            "duct {}: {} of design, outside {}",
            d.tag,
            words::percent(d.percent_of_design),
            words::tolerance(d.tolerance_percent)
        ));
    }
    for b in r.branches.iter().filter(|b| b.status == Status::Fail) {
        outside.push(format!(
            "branches of {}: {} from the main's traverse, outside {}",
            b.of,
            words::signed_percent(b.difference_percent),
            words::tolerance(b.tolerance_percent)
        ));
    }
    if let Some(o) = r.outside_air.as_ref().filter(|o| o.status == Status::Fail) {
        outside.push(format!(
            "outside air: {} of design, outside {}",
            words::percent(o.percent_of_design),
            words::tolerance(o.tolerance_percent)
        ));
    }
    if let Some(f) = r.fan.as_ref().filter(|f| f.status == Status::Fail) {
        outside.push(format!(
            "fan {}: {} of design, outside {}",
            f.tag,
            words::percent(f.percent_of_design),
            words::tolerance(f.tolerance_percent)
        ));
    }
    for t in r.terminals.iter().filter(|t| t.status == Status::Fail) {
        outside.push(format!(
            "terminal {} on {}: {} of design, outside {}",
            t.tag,
            t.branch,
            words::percent(t.percent_of_design),
            words::tolerance(t.tolerance_percent)
        ));
    }
    for s in r.terminal_sums.iter().filter(|s| s.status == Status::Fail) {
        outside.push(format!(
            "terminals on {}: {} from the branch's traverse, outside {}",
            s.branch,
            words::signed_percent(s.difference_percent),
            words::tolerance(s.tolerance_percent)
        ));
    }
    let mut warnings: Vec<String> = r
        .fan
        .iter()
        .flat_map(|f| f.motor_findings.iter().map(|m| words::motor_finding(dt, m)))
        .collect();
    warnings.extend(words::notes(spec, &r.ducts));
    let judged = r.statuses().filter(|s| *s != Status::NotApplicable).count();
    let open = spec
        .deficiencies
        .iter()
        .filter(|d| d.status == DeficiencyStatus::Open)
        .count();
    let verdict_text = match r.verdict {
        Status::Fail => format!(
            "{} of {judged} judged items are outside tolerance.",
            r.failures()
        ),
        Status::Warn => format!("All {judged} judged items are within tolerance, with warnings."),
        _ => format!("All {judged} judged items are within tolerance."),
    } + &match open {
        0 => String::new(),
        1 => " One deficiency is open.".into(),
        n => format!(" {n} deficiencies are open."),
    };
    SubmittalSummary {
        verdict: r.verdict,
        verdict_text,
        facts,
        headline,
        outside,
        warnings,
    }
}

/// The value every duct's survey gives for a sign-off field, when they all give the same one.
fn common(
    e: &SystemEvaluation,
    field: fn(&crate::survey::Signoff) -> &Option<String>,
) -> Option<String> {
    let mut values = e
        .ducts
        .iter()
        .map(|(ev, _)| field(&ev.loaded.survey.signoff).clone());
    let first = values.next()??;
    values
        .all(|v| v.as_deref() == Some(first.as_str()))
        .then_some(first)
}

/// The firm and the sign-off block: the system file first, then what every survey agrees on, then
/// the user's configuration.
pub fn identity_of(e: &SystemEvaluation, defaults: &SignoffDefaults) -> (String, SignOff) {
    let spec = &e.loaded.spec;
    let so = &e.loaded.signoff;
    let pick = |own: &Option<String>,
                field: fn(&crate::survey::Signoff) -> &Option<String>,
                fallback: &Option<String>| {
        own.clone()
            .or_else(|| common(e, field))
            .or_else(|| fallback.clone())
            .unwrap_or_default()
    };
    let organisation = spec
        .organisation
        .clone()
        .or_else(|| so.organisation.clone())
        .or_else(|| common(e, |s| &s.organisation))
        .or_else(|| defaults.organisation.clone())
        .unwrap_or_default();
    let signoff = SignOff {
        tested_by: pick(&so.tested_by, |s| &s.tested_by, &defaults.technician),
        certificate: pick(&so.certificate, |s| &s.certificate, &defaults.certificate),
        tested_date: spec.date.to_string(),
        reviewed_by: pick(&so.reviewed_by, |s| &s.reviewed_by, &None),
        reviewed_date: String::new(),
        organisation: organisation.clone(),
        statement: "I confirm that this air system was tested as described, that the readings of \
                    every duct and terminal were recorded as attached, and that the results were \
                    computed from them by the methods stated."
            .into(),
    };
    (organisation, signoff)
}

/// Builds the submittal model; `id.defaults` fill the firm and the sign-off where the system file
/// and the surveys say nothing.
pub fn submittal_data(e: &SystemEvaluation, id: &Identity) -> Submittal {
    let (organisation, signoff) = identity_of(e, &id.defaults);
    let organisation = organisation.as_str();
    let spec = &e.loaded.spec;
    let dt: &DisplayTable = &e.display;
    let traverses = e
        .loaded
        .spec
        .ducts
        .iter()
        .zip(&e.ducts)
        .map(|(d, (ev, a))| Traverse {
            tag: d.tag.clone(),
            role: d.role.words().into(),
            survey: d.survey.clone(),
            data: report_data(ev, a, id),
        })
        .collect();
    let mut sources = vec![
        crate::system::rules::DEFAULT_TOLERANCE_SOURCE.to_string(),
        "percent of design = measured ÷ design × 100, both on the design's basis; branch and \
         terminal sums compared as (sum − traverse) ÷ traverse × 100 (common practice)"
            .to_string(),
    ];
    if e.result.fan.is_some() {
        sources.extend(words::fan_sources());
    }
    if e.result.outside_air.is_some() {
        sources.push(
            "uncertainty of outside air by difference: root-sum-square of the traverses' expanded \
             uncertainties (GUM, JCGM 100:2008, §5.1.2, sensitivities ±1)"
                .to_string(),
        );
    }
    Submittal {
        header: SubmittalHeader {
            kind: "Test and balance submittal".into(),
            title: spec.title.clone(),
            site: spec.site.clone().unwrap_or_default(),
            organisation: organisation.to_string(),
            test_date: spec.date.to_string(),
            report_id: id.report_id.clone(),
            content_sha256: id.content_sha256.clone(),
            signer_key_fingerprint: id.signer_key_fingerprint.clone(),
            signer_name: id.signer_name.clone(),
            software: software(),
            paper: match dt.system {
                UnitSystem::InchPound => Paper::UsLetter,
                _ => Paper::A4,
            },
        },
        summary: summary(e, organisation, &signoff),
        ducts: ducts(e),
        relations: relations(e),
        fan: e.result.fan.as_ref().map(|f| FanSheet {
            tag: f.tag.clone(),
            status: f.status,
            motor: f.motor,
            rows: words::fan(dt, f)
                .into_iter()
                .map(|(k, v)| fact(&k, v))
                .collect(),
            sources: words::fan_sources(),
        }),
        terminals: terminals(e),
        traverses,
        deficiencies: spec
            .deficiencies
            .iter()
            .map(|d| DeficiencyRow {
                status: d.status.name().into(),
                open: d.status == DeficiencyStatus::Open,
                item: d.item.clone(),
                note: d.note.clone().unwrap_or_default(),
            })
            .collect(),
        notes: if e.mixed_units {
            vec![
                "The surveys are in different unit systems; this submittal shows the first duct's."
                    .into(),
            ]
        } else {
            Vec::new()
        },
        sources,
        safety: hvac_cautions(),
        signoff,
    }
}

/// Charts of each traverse, in the same order.
#[derive(Serialize)]
struct SubmittalCharts {
    traverses: Vec<super::engine::Charts>,
}

impl Engine {
    /// Renders the submittal with its built-in template, embedding `options.attachments`.
    pub fn render_submittal(
        &self,
        data: &Submittal,
        options: &RenderOptions,
    ) -> Result<Rendered, RenderError> {
        super::attach::check_unique(&options.attachments)?;
        for t in &data.traverses {
            t.data.validate()?;
        }
        let charts = SubmittalCharts {
            traverses: data
                .traverses
                .iter()
                .map(|t| report_charts(&t.data))
                .collect(),
        };
        let h = &data.header;
        let mut author = vec![data.signoff.tested_by.as_str(), h.organisation.as_str()];
        author.retain(|a| !a.trim().is_empty());
        let meta = Meta {
            title: &h.title,
            author,
            keywords: vec![
                "test and balance".into(),
                "air system submittal".into(),
                h.report_id.clone(),
                format!("sha256:{}", h.content_sha256),
            ],
            description: format!(
                "Test and balance submittal {} — {}, {}; content SHA-256 {}",
                h.report_id, h.title, h.site, h.content_sha256
            ),
            date: meta_date(options.date),
            attachments: meta_attachments(&options.attachments),
        };
        self.run(Job {
            template: SUBMITTAL_TEMPLATE,
            template_name: SUBMITTAL_NAME,
            data: to_json(data)?,
            charts: to_json(&charts)?,
            meta: to_json(&meta)?,
            attachments: &options.attachments,
            date: options.date,
            ident: format!("annulus-submittal/{}/{}", h.report_id, h.content_sha256),
            standard: PdfStandard::A_3b,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::input::system_file::load_system;
    use crate::submittal::evaluate_system;
    use std::sync::OnceLock;

    fn building() -> &'static SystemEvaluation {
        static E: OnceLock<SystemEvaluation> = OnceLock::new();
        E.get_or_init(|| {
            let path = super::super::testkit::sample_dir("building").join("ahu-2.toml");
            let loaded = load_system(&path).unwrap_or_else(|e| panic!("{e}"));
            evaluate_system(loaded, None).unwrap_or_else(|e| panic!("{e}"))
        })
    }

    fn identity() -> Identity {
        Identity {
            report_id: "AN-0123456789AB".into(),
            content_sha256: "ab".repeat(32),
            signer_key_fingerprint: None,
            signer_name: None,
            defaults: Default::default(),
        }
    }

    #[test]
    fn the_firm_and_technician_come_from_the_system_file_then_the_surveys_then_the_configuration() {
        let e = building();
        let config = SignoffDefaults {
            organisation: Some("Configured firm".into()),
            technician: Some("Configured technician".into()),
            certificate: Some("CFG-1".into()),
        };
        // the sample system file names the firm and its [signoff]
        let (org, so) = identity_of(e, &config);
        assert_eq!(org, "Saltmarsh Air Balance Ltd (fictional)");
        assert_eq!(so.tested_by, "Tomasz Okafor-Lind");
        assert_eq!(so.organisation, org);
        // without them: the surveys agree on the technician; the firm comes from the configuration
        let mut bare = e.clone();
        bare.loaded.spec.organisation = None;
        bare.loaded.signoff = Default::default();
        let (org, so) = identity_of(&bare, &config);
        assert_eq!(org, "Configured firm");
        assert_eq!(so.tested_by, "Tomasz Okafor-Lind");
        assert_eq!(so.certificate, "TAB-FIC-52210");
        // surveys that disagree leave it to the configuration
        bare.ducts[0].0.loaded.survey.signoff.tested_by = Some("Someone else".into());
        let (_, so) = identity_of(&bare, &config);
        assert_eq!(so.tested_by, "Configured technician");
    }

    #[test]
    fn the_model_carries_every_section_in_the_job_units() {
        let s = submittal_data(building(), &identity());
        assert_eq!(s.summary.verdict, Status::Fail);
        assert_eq!(s.ducts.rows.len(), 6);
        assert_eq!(s.traverses.len(), 6);
        assert_eq!(s.ducts.velocity_unit, "fpm");
        assert_eq!(s.ducts.rows[0].design, "6,000");
        assert_eq!(s.ducts.rows[0].unit, "acfm");
        assert_eq!(s.ducts.rows[0].size, "30 × 20");
        // D-204: 410 of 500 cfm is 82 % (hand-worked), the one item outside tolerance
        assert_eq!(s.summary.outside.len(), 1);
        assert!(
            s.summary.outside[0].contains("D-204"),
            "{:?}",
            s.summary.outside
        );
        assert!(s.fan.as_ref().is_some_and(|f| f.motor == Status::Warn));
        // HVAC cautions, not stack ones
        let safety = s.safety.join(" ");
        assert!(safety.contains("Rotating equipment") && !safety.contains("toxic"));
        let t = s.terminals.as_ref().expect("terminals");
        assert_eq!(t.rows.len(), 12);
        // D-203 read as 560 fpm × 0.90 ft²
        assert_eq!(t.rows[6].reading, "560 fpm × 0.90 ft²");
    }

    #[test]
    fn the_submittal_renders_with_no_warnings() {
        let s = submittal_data(building(), &identity());
        let options = RenderOptions {
            date: building().loaded.spec.date,
            attachments: vec![],
        };
        let r = Engine::new()
            .render_submittal(&s, &options)
            .unwrap_or_else(|e| panic!("{e}"));
        assert!(r.warnings.is_empty(), "{:?}", r.warnings);
        assert!(r.pdf.starts_with(b"%PDF-"));
        if let Some(out) = std::env::var_os("ANNULUS_SUBMITTAL_PREVIEW") {
            std::fs::write(out, &r.pdf).expect("preview written");
        }
    }
}
