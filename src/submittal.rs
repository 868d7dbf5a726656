//! The pipeline of a test-and-balance submittal: a loaded system → each duct's survey evaluated and
//! assessed as a single report would be → the system arithmetic ([`crate::system`]). No printing;
//! no clock.

use crate::assess::{Assessment, Verdict};
use crate::checks::Status;
use crate::diag::{Diagnostic, Diagnostics, Error};
use crate::display::{DisplayTable, UnitSystem};
use crate::flow::design::{flow_on_basis, Flows};
use crate::input::system_file::LoadedSystem;
use crate::input::system_file::SystemSignoff;
use crate::pipeline::{evaluate_and_assess, Evaluation};
use crate::survey::ConventionId;
use crate::system::evaluate::EvaluateError;
use crate::system::Deficiency;
use crate::system::{evaluate, DuctMeasurement, FlowSet, SystemResult};
use crate::units::FlowBasis;
use chrono::NaiveDate;
use serde::Serialize;

/// A system with every duct evaluated, and the system's results.
#[derive(Debug, Clone)]
pub struct SystemEvaluation {
    pub loaded: LoadedSystem,
    /// One per duct, in the system file's order.
    pub ducts: Vec<(Evaluation, Assessment)>,
    pub result: SystemResult,
    /// How the submittal is shown: the first duct's convention and its unit system.
    pub display: DisplayTable,
    /// The surveys' conventions differ in unit system (the first duct's is used).
    pub mixed_units: bool,
}

fn measurement(e: &Evaluation, a: &Assessment) -> Option<DuctMeasurement> {
    let avg = e.average.as_ref()?;
    let flows = Flows {
        actual_m3_s: avg.actual_flow_m3_s,
        standard_m3_s: avg.standard_flow_m3_s,
        dry_standard_m3_s: avg.dry_standard_flow_m3_s,
    };
    // every basis by the one rule a survey's design comparison uses
    let on = |b: FlowBasis| flow_on_basis(flows, b, &e.convention);
    Some(DuctMeasurement {
        flows: FlowSet {
            actual_m3_s: on(FlowBasis::Actual),
            standard_m3_s: on(FlowBasis::Standard),
            dry_standard_m3_s: on(FlowBasis::DryStandard),
            normal_m3_s: on(FlowBasis::Normal),
            normal_dry_m3_s: on(FlowBasis::NormalDry),
        },
        mean_velocity_m_s: avg.mean_velocity_m_s,
        area_m2: e.loaded.survey.duct.area_m2(),
        static_pa: Some(e.loaded.survey.gas.static_pa),
        expanded_uncertainty: a
            .average
            .as_ref()
            .and_then(|x| x.uncertainty.as_ref())
            .map(|u| u.expanded_relative),
        traverse_checks: match a.verdict {
            Verdict::Pass => Status::Pass,
            Verdict::Warn => Status::Warn,
            Verdict::Fail => Status::Fail,
        },
    })
}

/// Evaluates every duct's survey and then the system; every problem of every duct is reported.
/// `units` overrides the unit system the surveys imply.
pub fn evaluate_system(
    loaded: LoadedSystem,
    units: Option<UnitSystem>,
) -> Result<SystemEvaluation, Error> {
    let mut diags = Diagnostics::new();
    let mut ducts = Vec::new();
    let mut measured = Vec::new();
    for ((spec, survey), at) in loaded
        .spec
        .ducts
        .iter()
        .zip(&loaded.ducts)
        .zip(&loaded.survey_locations)
    {
        if !survey.survey.convention.is_hvac() {
            diags.push(
                Diagnostic::new(format!(
                    "duct `{}`: its survey is a {} test; a system submittal takes HVAC surveys",
                    spec.tag,
                    survey.survey.convention.name()
                ))
                .at(at.clone())
                .hint("use convention = \"hvac-ip\" or \"hvac-si\" in the duct's survey"),
            );
            continue;
        }
        match evaluate_and_assess(survey.clone()) {
            Ok((e, a)) => match measurement(&e, &a) {
                Some(m) => {
                    measured.push(m);
                    ducts.push((e, a));
                }
                None => diags.push(
                    Diagnostic::new(format!(
                        "duct `{}`: its survey has no valid run to take a flow from",
                        spec.tag
                    ))
                    .at(at.clone())
                    .hint("every run of the survey is void; add a valid run"),
                ),
            },
            Err(Error::Input(d)) => diags.extend(d),
            Err(e) => return Err(e),
        }
    }
    if !diags.is_empty() {
        return Err(Error::Input(diags));
    }
    let result = evaluate(&loaded.spec, &measured).map_err(|e| match e {
        // the reader validated the spec and loaded one survey per duct: neither can happen
        EvaluateError::Spec(errors) => Error::Environment(format!(
            "internal: the system passed its reader but not its evaluation: {errors:?}"
        )),
        EvaluateError::MeasurementCount {
            ducts,
            measurements,
        } => Error::Environment(format!(
            "internal: {measurements} measurements for {ducts} ducts"
        )),
    })?;
    let Some((first, _)) = ducts.first() else {
        return Err(Error::Environment(
            "internal: a system without ducts passed its reader".into(),
        ));
    };
    let convention = first.loaded.survey.convention;
    let own = UnitSystem::of(convention, false);
    let mixed_units = ducts
        .iter()
        .any(|(e, _)| UnitSystem::of(e.loaded.survey.convention, false) != own);
    let display = DisplayTable::new(convention, units.unwrap_or(own));
    Ok(SystemEvaluation {
        loaded,
        ducts,
        result,
        display,
        mixed_units,
    })
}

/// One duct's survey, as the submittal names it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SurveyRef {
    pub tag: String,
    /// The survey file as written in the system file.
    pub survey: String,
    pub title: String,
    pub convention: ConventionId,
    pub date: NaiveDate,
    pub tested_by: Option<String>,
}

/// The submittal's results document (`annulus system --format json`): SI values with the unit in
/// every key name, the contract's keys (`ducts`, `branches`, `outside_air`, `fan`, `terminals`,
/// `verdict`) and the system's identity around them.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SystemDoc<'a> {
    pub title: &'a str,
    pub site: Option<&'a str>,
    pub date: NaiveDate,
    pub organisation: Option<&'a str>,
    pub signoff: &'a SystemSignoff,
    pub tolerance_percent: f64,
    pub units: UnitSystem,
    pub surveys: Vec<SurveyRef>,
    #[serde(flatten)]
    pub result: &'a SystemResult,
    pub deficiencies: &'a [Deficiency],
}

impl SystemEvaluation {
    /// The system's verdict in the words of a survey's checks (`fail` when anything is outside
    /// tolerance).
    pub fn verdict(&self) -> Verdict {
        match self.result.verdict {
            Status::Fail => Verdict::Fail,
            Status::Warn => Verdict::Warn,
            _ => Verdict::Pass,
        }
    }

    /// The results document.
    pub fn doc(&self) -> SystemDoc<'_> {
        let spec = &self.loaded.spec;
        SystemDoc {
            title: &spec.title,
            site: spec.site.as_deref(),
            date: spec.date,
            organisation: spec.organisation.as_deref(),
            signoff: &self.loaded.signoff,
            tolerance_percent: 100.0 * spec.tolerance.fraction,
            units: self.display.system,
            surveys: spec
                .ducts
                .iter()
                .zip(&self.ducts)
                .map(|(d, (e, _))| {
                    let s = &e.loaded.survey;
                    SurveyRef {
                        tag: d.tag.clone(),
                        survey: d.survey.clone(),
                        title: s.title.clone(),
                        convention: s.convention,
                        date: s.date,
                        tested_by: s.signoff.tested_by.clone(),
                    }
                })
                .collect(),
            result: &self.result,
            deficiencies: &spec.deficiencies,
        }
    }
}
