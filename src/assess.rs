//! The assessment stage: runs every acceptance check on an [`Evaluation`] and builds the
//! uncertainty budget of each run and of the average.
//!
//! Owns the wiring from a computed survey to [`Assessment`]: which runs count (decided once by
//! `pipeline::run_is_valid`), the inputs of each run's GUM budget (what `[instruments]` states,
//! otherwise the defaults below, each with its source), and the verdict. The checks themselves are
//! in `checks`, the budget arithmetic in `uncertainty`. No printing, no clock; the only file data it
//! reads is what `input` already loaded.
//!
//! JSON: the types serialise with the contract's keys. An infinite number of degrees of freedom
//! (a component, or a budget whose components are all Type B taken as reliable) is written as
//! `null`, since JSON has no infinity.

use crate::checks::instruments::{Instruments, TemperatureAccuracy};
use crate::checks::{self, Finding, RunView, Status, Subject};
use crate::display::Kind;
use crate::evaluation::Evaluation;
use crate::flow::RunResult;
use crate::geometry::Shape;
use crate::readings::{Dp, RunReadings};
use crate::survey::ProbeKind;
use crate::uncertainty::{
    build_average_budget, build_run_budget, Budget, DuctDimensions, RunUncertaintyInputs,
    SpatialMethod,
};
use crate::units::{Unit, PA_PER_INH2O, PA_PER_INHG};
use serde::Serialize;

/// Default budget inputs used where `[instruments]` is silent. Each carries its source; the
/// assessment lists which were used ([`Assessment::assumptions`]).
pub mod defaults {
    use super::*;

    /// Type S pitot coefficient: expanded 2 % at k = 2 (typical calibration 1–3 %,
    /// calculations.md §5 \[P\]).
    pub const S_TYPE_CP_EXPANDED: f64 = 0.02;
    /// Standard pitot coefficient: expanded 1 % at k = 2 (common practice).
    pub const STANDARD_CP_EXPANDED: f64 = 0.01;
    /// Coverage factor assumed for a stated coefficient uncertainty (certificates state k = 2;
    /// common practice).
    pub const CERTIFICATE_K: f64 = 2.0;
    /// Δp gauge accuracy ±1 % of reading (common practice for a calibrated gauge).
    pub const DP_ACCURACY: f64 = 0.01;
    /// Stack thermometer ±1.5 % of the absolute temperature (EPA Method 2 §6.3 sensor
    /// requirement, from memory).
    pub const STACK_THERMOMETER_FRACTION: f64 = 0.015;
    /// HVAC thermometer ±1 K (common practice).
    pub const AIR_THERMOMETER_K: f64 = 1.0;
    /// Barometer ±0.1 inHg (EPA Method 2 §6.5 barometer requirement, from memory).
    pub const BAROMETER_PA: f64 = 0.1 * PA_PER_INHG;
    /// Static-pressure gauge ±0.1 inH2O (common practice).
    pub const STATIC_PA: f64 = 0.1 * PA_PER_INH2O;
    /// Inside dimensions ±1/8 in each (common practice for a tape or rule).
    pub const TAPE_M: f64 = 0.125 * 0.0254;
    /// Wet molar mass from composition and moisture, relative standard u: 0.5 % for stack gas
    /// (derived: moisture ±1 %-point and CO2 ±0.5 %-point give about that), 0.1 % for air.
    pub const STACK_MOLAR_MASS_U: f64 = 0.005;
    pub const AIR_MOLAR_MASS_U: f64 = 0.001;
    /// Probe positioning, relative standard u of the mean velocity (common practice).
    pub const POSITIONING_U: f64 = 0.005;
    /// An applied wall-effects factor, ±0.5 % rectangular (common practice: the spread of
    /// measured factors about the Method 2H defaults).
    pub const WALL_FACTOR_BOUND: f64 = 0.005;
}

/// What `[checks]`, `[instruments]` and `[reported]` say (read by `input::assess_config`).
pub use crate::checks::config::AssessConfig;

/// The overall outcome.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Verdict {
    Pass,
    Warn,
    Fail,
}

/// One budget component in the contract's shape.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ComponentReport {
    pub name: String,
    /// Relative standard uncertainty of the input (fraction).
    pub relative: f64,
    /// Relative sensitivity ∂ln Q/∂ln x.
    pub sensitivity: f64,
    /// Degrees of freedom; `null` for infinity.
    pub dof: Option<f64>,
    /// GUM evaluation type, `A` or `B`.
    pub kind: &'static str,
    pub basis: String,
}

/// A budget in the contract's shape.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UncertaintyReport {
    /// Relative expanded uncertainty U = k·u_c at about 95 % (fraction).
    pub expanded_relative: f64,
    pub coverage_factor: f64,
    /// Welch–Satterthwaite ν_eff; `null` for infinity.
    pub effective_dof: Option<f64>,
    /// Relative combined standard uncertainty u_c (fraction).
    pub combined_relative: f64,
    /// The spatial-integration option (`point-scatter`, `line-half-difference`, `model-bias`).
    pub spatial_method: &'static str,
    pub components: Vec<ComponentReport>,
}

fn finite(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

impl UncertaintyReport {
    fn of(b: &Budget, spatial: SpatialMethod) -> UncertaintyReport {
        UncertaintyReport {
            expanded_relative: b.expanded_rel(),
            coverage_factor: b.coverage_factor(),
            effective_dof: finite(b.effective_dof()),
            combined_relative: b.combined_rel(),
            spatial_method: spatial.name(),
            components: b
                .components()
                .iter()
                .map(|c| ComponentReport {
                    name: c.name().to_string(),
                    relative: c.u_rel(),
                    sensitivity: c.sensitivity(),
                    dof: finite(c.dof()),
                    kind: c.kind().label(),
                    basis: c.basis().to_string(),
                })
                .collect(),
        }
    }
}

/// Findings and budget of one run.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RunAssessment {
    pub id: String,
    /// Counts toward the average (its post-run leak check passed, see the `leak-check` finding).
    pub valid: bool,
    pub checks: Vec<Finding>,
    pub uncertainty: Option<UncertaintyReport>,
    /// Why there is no budget, when there is none.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub uncertainty_note: Option<String>,
}

/// The budget of the average over valid runs.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AverageAssessment {
    pub runs: Vec<String>,
    pub uncertainty: Option<UncertaintyReport>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub uncertainty_note: Option<String>,
}

/// One input of the budgets and where its value came from.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Assumption {
    pub input: &'static str,
    pub value: AssumedValue,
    /// `[instruments]` or the default's source.
    pub basis: String,
}

/// The value of a budget input: a quantity a page prints in the job's units, or words.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum AssumedValue {
    /// A bound (`±`) or a step of a kind of quantity, SI (a temperature bound is a difference).
    Quantity {
        kind: crate::display::Kind,
        si: f64,
        plus_minus: bool,
    },
    /// A relative figure or a choice, in words (`u = 0.5 % of the mean velocity`).
    Words(String),
}

/// Everything the check stage found.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Assessment {
    /// `fail` if any finding fails, else `warn` if any warns, else `pass`.
    pub verdict: Verdict,
    /// Survey-level findings: plane, records, data across runs, run-to-run agreement.
    pub checks: Vec<Finding>,
    pub runs: Vec<RunAssessment>,
    pub average: Option<AverageAssessment>,
    /// The budget inputs and their sources (printed beside the budget).
    pub assumptions: Vec<Assumption>,
    /// Every dated calibration with the interval the checks judged it by.
    pub calibrations: Vec<checks::records::CalibrationDue>,
}

impl Assessment {
    /// Every finding, survey-level first, then each run's.
    pub fn findings(&self) -> impl Iterator<Item = &Finding> {
        self.checks
            .iter()
            .chain(self.runs.iter().flat_map(|r| r.checks.iter()))
    }

    /// True when any finding fails (the CLI exits with 3).
    pub fn failed(&self) -> bool {
        self.verdict == Verdict::Fail
    }
}

/// The checks' side of an assessment: every finding and the verdict they give, without the
/// uncertainty budgets. `review` judges a survey by this alone (its budgets would be built and
/// never printed); [`assess`] adds the budgets.
#[derive(Debug, Clone, PartialEq)]
pub struct Judgement {
    /// `fail` if any finding fails, else `warn` if any warns, else `pass`.
    pub verdict: Verdict,
    /// Survey-level findings.
    pub checks: Vec<Finding>,
    /// Each run's findings, in the survey's order.
    pub runs: Vec<RunFindings>,
}

/// One run's findings.
#[derive(Debug, Clone, PartialEq)]
pub struct RunFindings {
    pub id: String,
    /// Counts toward the average.
    pub valid: bool,
    pub checks: Vec<Finding>,
}

/// What the checks judge: the evaluation seen run by run, with the assessment settings.
fn subject<'a>(eval: &'a Evaluation, config: &'a AssessConfig) -> Subject<'a> {
    let survey = &eval.loaded.survey;
    let views: Vec<RunView> = eval
        .runs
        .iter()
        .zip(&survey.runs)
        .zip(&eval.loaded.runs)
        .enumerate()
        .map(|(i, ((result, spec), (_, readings)))| {
            let validity = eval.validity.get(i);
            RunView {
                spec,
                result,
                readings,
                // the unit the run's Δp column was recorded in, from its header
                dp_unit: readings.dp_unit,
                valid: validity.is_none_or(|v| v.valid),
                void_reason: validity.and_then(|v| v.void_reason.as_deref()),
            }
        })
        .collect();
    Subject {
        survey,
        convention: &eval.convention,
        plane: &eval.plane,
        runs: views,
        average: eval.average.as_ref(),
        instruments: &config.instruments,
        reported: &config.reported,
        runs_required: survey.runs_required,
        wall_effects: &eval.wall_effects,
    }
}

/// Runs every check on `subject`: the findings, a void run's failures turned to warnings.
fn run_checks(subject: &Subject, config: &AssessConfig) -> checks::Findings {
    let mut findings = checks::run_all(subject, &config.checks);
    // A void run is out of the average: what its own data show cannot fail the test. Its failing
    // findings stay in the report, as warnings that say so (the leak-check finding already words
    // the void itself).
    for (view, run_checks) in subject.runs.iter().zip(findings.runs.iter_mut()) {
        if view.valid {
            continue;
        }
        for f in run_checks.iter_mut() {
            if f.status == Status::Fail && f.id != "leak-check" {
                f.status = Status::Warn;
                f.message.text_mut().push(format!(
                    " (run {} is void and does not count)",
                    view.spec.id
                ));
            }
        }
    }
    findings
}

/// The verdict of a set of findings.
fn verdict<'a>(findings: impl IntoIterator<Item = &'a Finding>) -> Verdict {
    match checks::worst(findings) {
        Status::Fail => Verdict::Fail,
        Status::Warn => Verdict::Warn,
        _ => Verdict::Pass,
    }
}

/// Runs all checks: the findings and the verdict, without budgets (see [`Judgement`]).
pub fn judge(eval: &Evaluation, config: &AssessConfig) -> Judgement {
    let subject = subject(eval, config);
    let findings = run_checks(&subject, config);
    let runs: Vec<RunFindings> = subject
        .runs
        .iter()
        .zip(findings.runs)
        .map(|(view, checks)| RunFindings {
            id: view.spec.id.clone(),
            valid: view.valid,
            checks,
        })
        .collect();
    Judgement {
        verdict: verdict(
            findings
                .survey
                .iter()
                .chain(runs.iter().flat_map(|r| &r.checks)),
        ),
        checks: findings.survey,
        runs,
    }
}

/// Runs all checks and builds the budgets.
pub fn assess(eval: &Evaluation, config: &AssessConfig) -> Assessment {
    let subject = subject(eval, config);
    let findings = run_checks(&subject, config);
    let calibrations = checks::records::calibration_dues(&subject, &config.checks);

    let mut assumptions = Vec::new();
    let mut budgets: Vec<Option<Budget>> = Vec::new();
    let mut runs = Vec::new();
    for (i, (view, run_checks)) in subject.runs.iter().zip(findings.runs).enumerate() {
        let (inputs, used) = run_inputs(eval, view, &config.instruments);
        if i == 0 {
            assumptions = used;
        }
        let (report, note, budget) = match build_run_budget(&inputs) {
            Ok(rb) => (
                Some(UncertaintyReport::of(&rb.budget, rb.spatial_method)),
                None,
                Some(rb.budget),
            ),
            Err(e) => (None, Some(format!("uncertainty not evaluated: {e}")), None),
        };
        budgets.push(budget);
        runs.push(RunAssessment {
            id: view.spec.id.clone(),
            valid: view.valid,
            checks: run_checks,
            uncertainty: report,
            uncertainty_note: note,
        });
    }
    let spatial = config
        .instruments
        .spatial_method
        .unwrap_or(SpatialMethod::Scatter);
    let average = average_budget(&subject, &budgets, spatial);
    Assessment {
        verdict: verdict(
            findings
                .survey
                .iter()
                .chain(runs.iter().flat_map(|r| &r.checks)),
        ),
        checks: findings.survey,
        runs,
        average,
        assumptions,
        calibrations,
    }
}

fn average_budget(
    s: &Subject,
    budgets: &[Option<Budget>],
    spatial: SpatialMethod,
) -> Option<AverageAssessment> {
    let valid: Vec<(&RunView, &Option<Budget>)> = s
        .runs
        .iter()
        .zip(budgets)
        .filter(|(v, _)| v.valid)
        .collect();
    if valid.is_empty() {
        return None;
    }
    let ids: Vec<String> = valid.iter().map(|(v, _)| v.spec.id.clone()).collect();
    if let Some((v, _)) = valid.iter().find(|(_, b)| b.is_none()) {
        return Some(AverageAssessment {
            runs: ids,
            uncertainty: None,
            uncertainty_note: Some(format!(
                "uncertainty of the average not evaluated: run {} has no budget",
                v.spec.id
            )),
        });
    }
    let run_budgets: Vec<Budget> = valid.iter().filter_map(|(_, b)| (*b).clone()).collect();
    if run_budgets.len() == 1 {
        return Some(AverageAssessment {
            runs: ids,
            uncertainty: Some(UncertaintyReport::of(&run_budgets[0], spatial)),
            uncertainty_note: Some(
                "one valid run: the run's own budget, with no run-to-run term".to_string(),
            ),
        });
    }
    let flows: Vec<f64> = valid
        .iter()
        .map(|(v, _)| v.result.actual_flow_m3_s)
        .collect();
    match build_average_budget(&run_budgets, &flows) {
        Ok(b) => Some(AverageAssessment {
            runs: ids,
            uncertainty: Some(UncertaintyReport::of(&b, spatial)),
            uncertainty_note: None,
        }),
        Err(e) => Some(AverageAssessment {
            runs: ids,
            uncertainty: None,
            uncertainty_note: Some(format!("uncertainty of the average not evaluated: {e}")),
        }),
    }
}

/// The Δp step the readings were written to (the last decimal in the recorded unit), Pa.
fn recording_step_pa(result: &RunResult, readings: &RunReadings, unit: Option<&Unit>) -> f64 {
    let Some(unit) = unit else { return 0.0 };
    let decimals = readings
        .readings
        .iter()
        .map(|r| r.dp_decimals)
        .max()
        .unwrap_or(0)
        .min(12);
    let step = unit.factor * 10f64.powi(-(decimals as i32));
    // A liquid column: scale the length step by the run's Pa per metre of column.
    let column = readings.readings.iter().find_map(|r| match r.dp {
        Dp::Column { height_m } if height_m > 0.0 => Some((r, height_m)),
        _ => None,
    });
    match column {
        Some((r, h)) => result
            .points
            .iter()
            .find(|p| p.line == r.line && p.point == r.point)
            .map(|p| step * p.dp_pa / h)
            .unwrap_or(0.0),
        None => step,
    }
}

fn line_means(result: &RunResult) -> Vec<f64> {
    let mut acc: Vec<(&str, f64, f64)> = Vec::new();
    for p in &result.points {
        match acc.iter_mut().find(|(l, _, _)| *l == p.line) {
            Some(e) => {
                e.1 += p.velocity_m_s * p.weight;
                e.2 += p.weight;
            }
            None => acc.push((&p.line, p.velocity_m_s * p.weight, p.weight)),
        }
    }
    acc.into_iter().map(|(_, s, w)| s / w).collect()
}

fn words(text: String) -> AssumedValue {
    AssumedValue::Words(text)
}

fn quantity(kind: Kind, si: f64, plus_minus: bool) -> AssumedValue {
    AssumedValue::Quantity {
        kind,
        si,
        plus_minus,
    }
}

/// The assumptions behind a run's budget, in the order the inputs are met.
struct Notes(Vec<Assumption>);

impl Notes {
    /// Records one input: stated in `[instruments]`, or a default on `default_basis`.
    fn add(&mut self, input: &'static str, value: AssumedValue, stated: bool, default_basis: &str) {
        self.0.push(Assumption {
            input,
            value,
            basis: if stated {
                "[instruments]".to_string()
            } else {
                format!("default: {default_basis}")
            },
        });
    }
}

/// The pitot coefficient's expanded uncertainty and coverage factor, from `[instruments.pitot]`
/// or the default for the probe kind, with the words of its basis.
fn pitot_coefficient(
    survey: &crate::survey::Survey,
    ins: &Instruments,
    notes: &mut Notes,
) -> (f64, f64, String) {
    let (cp_big_u, cp_k, cp_stated) = match ins.pitot.coefficient_uncertainty {
        Some(u) => (
            u,
            ins.pitot.coverage_factor.unwrap_or(defaults::CERTIFICATE_K),
            true,
        ),
        None => (
            if survey.probe.kind == ProbeKind::SType {
                defaults::S_TYPE_CP_EXPANDED
            } else {
                defaults::STANDARD_CP_EXPANDED
            },
            defaults::CERTIFICATE_K,
            false,
        ),
    };
    let cp_basis = format!(
        "U = {} % (k = {}){}",
        checks::num(cp_big_u * 100.0),
        checks::num(cp_k),
        if cp_stated {
            ", [instruments.pitot]"
        } else if survey.probe.kind == ProbeKind::SType {
            ", default for a calibrated Type S pitot (typically 1–3 %, common practice)"
        } else {
            ", default for a standard pitot (common practice)"
        }
    );
    notes.add(
        "pitot coefficient",
        words(format!(
            "U = {} % (k = {})",
            checks::num(cp_big_u * 100.0),
            checks::num(cp_k)
        )),
        cp_stated,
        if survey.probe.kind == ProbeKind::SType {
            "a calibrated Type S pitot, typically 1–3 % (common practice)"
        } else {
            "a standard pitot (common practice)"
        },
    );
    (cp_big_u, cp_k, cp_basis)
}

/// The bound of the gas temperature's error (K) at the run's mean temperature `t`.
fn temperature_bound(t: f64, hvac: bool, ins: &Instruments, notes: &mut Notes) -> f64 {
    let (t_bound, t_text, t_basis) = match ins.thermometer.accuracy {
        Some(TemperatureAccuracy::Kelvin(a)) => {
            (a, quantity(Kind::TemperatureDifference, a, true), "")
        }
        Some(TemperatureAccuracy::FractionOfAbsolute(f)) => (
            f * t,
            words(format!("±{} % of absolute", checks::num(f * 100.0))),
            "",
        ),
        None if hvac => (
            defaults::AIR_THERMOMETER_K,
            quantity(
                Kind::TemperatureDifference,
                defaults::AIR_THERMOMETER_K,
                true,
            ),
            "common practice",
        ),
        None => (
            defaults::STACK_THERMOMETER_FRACTION * t,
            words("±1.5 % of absolute".to_string()),
            "EPA Method 2 §6.3 sensor requirement (from memory)",
        ),
    };
    notes.add(
        "gas temperature",
        t_text,
        ins.thermometer.accuracy.is_some(),
        t_basis,
    );
    t_bound
}

/// The budget inputs of one run and, for the record, where each came from.
fn run_inputs(
    eval: &Evaluation,
    view: &RunView,
    ins: &Instruments,
) -> (RunUncertaintyInputs, Vec<Assumption>) {
    let survey = &eval.loaded.survey;
    let result = view.result;
    let hvac = survey.convention.is_hvac();
    let root3 = 3f64.sqrt();
    let mut notes = Notes(Vec::new());

    let (cp_big_u, cp_k, cp_basis) = pitot_coefficient(survey, ins, &mut notes);

    let dp_acc = ins.dp.accuracy_fraction.unwrap_or(defaults::DP_ACCURACY);
    notes.add(
        "dp accuracy",
        words(format!("±{} % of reading", checks::num(dp_acc * 100.0))),
        ins.dp.accuracy_fraction.is_some(),
        "common practice for a calibrated gauge",
    );
    let step = recording_step_pa(result, view.readings, view.dp_unit);
    let resolution = ins.dp.resolution_pa.unwrap_or(step);
    notes.add(
        "dp resolution",
        quantity(Kind::VelocityPressure, resolution, false),
        ins.dp.resolution_pa.is_some(),
        "the last recorded decimal of the readings",
    );
    let zero = ins.dp.zero_pa.unwrap_or(resolution / 2.0);
    notes.add(
        "dp zero",
        quantity(Kind::VelocityPressure, zero, true),
        ins.dp.zero_pa.is_some(),
        "half a resolution step (common practice: a zeroed gauge reads zero to its last digit)",
    );

    let t = result.mean_temperature_k;
    let t_bound = temperature_bound(t, hvac, ins, &mut notes);

    let bar = ins.barometer.accuracy_pa.unwrap_or(defaults::BAROMETER_PA);
    notes.add(
        "barometric pressure",
        quantity(Kind::Barometric, bar, true),
        ins.barometer.accuracy_pa.is_some(),
        if hvac {
            "common practice"
        } else {
            "EPA Method 2 §6.5 barometer requirement (from memory)"
        },
    );
    let stat = ins.static_gauge.accuracy_pa.unwrap_or(defaults::STATIC_PA);
    notes.add(
        "static pressure",
        quantity(Kind::StaticPressure, stat, true),
        ins.static_gauge.accuracy_pa.is_some(),
        "common practice",
    );
    let mm = ins.gas.molar_mass_u_rel.unwrap_or(if hvac {
        defaults::AIR_MOLAR_MASS_U
    } else {
        defaults::STACK_MOLAR_MASS_U
    });
    notes.add(
        "gas composition and moisture",
        words(format!(
            "u = {} % of the wet molar mass",
            checks::num(mm * 100.0)
        )),
        ins.gas.molar_mass_u_rel.is_some(),
        if hvac {
            "air (common practice)"
        } else {
            "moisture ±1 %-point and CO2 ±0.5 %-point (derived)"
        },
    );
    let tape = ins.tape.accuracy_m.unwrap_or(defaults::TAPE_M);
    notes.add(
        "duct dimensions",
        quantity(Kind::Length, tape, true),
        ins.tape.accuracy_m.is_some(),
        "common practice for a tape or rule",
    );
    let duct = match eval.plane.layout.duct().shape() {
        Shape::Round { diameter_m } => DuctDimensions::Round { diameter_m },
        Shape::Rectangular { width_m, height_m } => {
            DuctDimensions::Rectangular { width_m, height_m }
        }
    };
    let spatial = ins.spatial_method.unwrap_or(SpatialMethod::Scatter);
    notes.add(
        "spatial integration",
        words(spatial.name().to_string()),
        ins.spatial_method.is_some(),
        "point-scatter, the conservative option (JCGM 100:2008 Type A evaluation of the point \
         scatter; common practice)",
    );
    let wall_u = if result.wall_factor < 1.0 {
        let u = ins
            .wall_factor_u_rel
            .unwrap_or(defaults::WALL_FACTOR_BOUND / root3);
        notes.add(
            "wall factor",
            words(format!("u = {} %", checks::num(u * 100.0))),
            ins.wall_factor_u_rel.is_some(),
            "±0.5 %, rectangular (common practice)",
        );
        u
    } else {
        0.0
    };
    let positioning = ins.positioning_u_rel.unwrap_or(defaults::POSITIONING_U);
    notes.add(
        "probe positioning",
        words(format!(
            "u = {} % of the mean velocity",
            checks::num(positioning * 100.0)
        )),
        ins.positioning_u_rel.is_some(),
        "common practice",
    );

    let inputs = RunUncertaintyInputs {
        pitot_coefficient_u_rel: cp_big_u / cp_k,
        pitot_coefficient_dof: ins.pitot.dof.unwrap_or(f64::INFINITY),
        pitot_coefficient_basis: cp_basis,
        dp_accuracy_fraction_of_reading: dp_acc,
        dp_resolution_pa: resolution,
        dp_zero_bound_pa: zero,
        point_dp_pa: result.points.iter().map(|p| p.dp_pa).collect(),
        temperature_u_k: t_bound / root3,
        temperature_k: t,
        barometric_u_pa: bar / root3,
        static_u_pa: stat / root3,
        absolute_pressure_pa: result.gas.absolute_pressure_pa,
        composition_u_rel: mm,
        dimension_u_m: tape / root3,
        duct,
        point_velocities_m_s: result.points.iter().map(|p| p.velocity_m_s).collect(),
        spatial_method: spatial,
        line_mean_velocities_m_s: Some(line_means(result)),
        model_bias_bound_fraction: ins.model_bias_fraction,
        wall_factor_u_rel: wall_u,
        positioning_u_rel: positioning,
        extra: Vec::new(),
    };
    (inputs, notes.0)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::checks::testkit::*;
    use crate::uncertainty::run::names;

    /// Values derived here by exact arithmetic.
    const REL_TOL_DERIVED: f64 = 1e-12;

    fn component<'a>(u: &'a UncertaintyReport, name: &str) -> &'a ComponentReport {
        u.components
            .iter()
            .find(|c| c.name == name)
            .unwrap_or_else(|| panic!("no component {name}"))
    }

    #[test]
    fn json_has_the_contract_keys_and_null_for_infinite_dof() {
        let a = epa_one_run("");
        let v = serde_json::to_value(&a).unwrap();
        let check = &v["checks"][0];
        for key in [
            "id", "status", "message", "source", "group", "measured", "limit",
        ] {
            assert!(check.get(key).is_some(), "finding has no `{key}`");
        }
        assert_eq!(v["verdict"], "pass");
        let u = &v["runs"][0]["uncertainty"];
        for key in [
            "expanded_relative",
            "coverage_factor",
            "effective_dof",
            "components",
        ] {
            assert!(u.get(key).is_some(), "uncertainty has no `{key}`");
        }
        let c = &u["components"][0];
        for key in ["name", "relative", "sensitivity", "dof"] {
            assert!(c.get(key).is_some(), "component has no `{key}`");
        }
        // the pitot coefficient is Type B with ν = ∞: null in JSON
        assert_eq!(c["name"], "pitot coefficient");
        assert!(c["dof"].is_null());
        // the scatter term has ν = n − 1 = 11, so ν_eff is finite
        assert!(u["effective_dof"].as_f64().unwrap() > 11.0);
        // with the model-bias option every term is Type B with ν = ∞: ν_eff is null
        let a =
            epa_one_run("[instruments]\nspatial_method = \"model-bias\"\nmodel_bias = \"2 %\"\n");
        let v = serde_json::to_value(&a).unwrap();
        assert!(v["runs"][0]["uncertainty"]["effective_dof"].is_null());
        // JCGM 100:2008 Table G.2, ν = ∞: k = 1.960
        let k = v["runs"][0]["uncertainty"]["coverage_factor"]
            .as_f64()
            .unwrap();
        assert!((k - 1.959964).abs() < 1e-6);
    }

    #[test]
    fn defaults_and_stated_instruments_feed_the_budget() {
        let a = epa_one_run("");
        let u = a.runs[0].uncertainty.as_ref().unwrap();
        // default Type S coefficient: U = 2 % at k = 2 (calculations.md §5 range 1–3 %)
        assert!((component(u, names::PITOT_COEFFICIENT).relative - 0.01).abs() < REL_TOL_DERIVED);
        // default stack thermometer ±1.5 % of absolute, rectangular: 0.015/√3 relative
        assert!(
            (component(u, names::TEMPERATURE).relative - 0.015 / 3f64.sqrt()).abs()
                < REL_TOL_DERIVED
        );
        // JCGM 100:2008 §6.2.1: U = k·u_c
        assert!(
            (u.expanded_relative - u.coverage_factor * u.combined_relative).abs() < REL_TOL_DERIVED
        );
        assert!(a
            .assumptions
            .iter()
            .any(|x| x.input == "pitot coefficient" && x.basis.starts_with("default")));

        let a = epa_one_run(
            "[instruments]\npitot = { coefficient_uncertainty = \"3 %\", coverage_factor = 2, dof = 20 }\ndp = { accuracy = \"2 %\", resolution = \"0.01 inH2O\", zero = \"0 Pa\" }\nthermometer = { accuracy = \"3 K\" }\nspatial_method = \"line-half-difference\"\n",
        );
        let u = a.runs[0].uncertainty.as_ref().unwrap();
        let cp = component(u, names::PITOT_COEFFICIENT);
        assert!((cp.relative - 0.015).abs() < REL_TOL_DERIVED);
        assert_eq!(cp.dof, Some(20.0));
        assert!(
            (component(u, names::DP_ACCURACY).relative - 0.02 / 3f64.sqrt()).abs()
                < REL_TOL_DERIVED
        );
        assert_eq!(component(u, names::DP_ZERO).relative, 0.0);
        let t = &a.runs[0];
        let e = eval(&survey(EPA_SURVEY, &["1"], ""), &[("run1.csv", epa_csv())]);
        let tk = e.runs[0].mean_temperature_k;
        assert!(
            (component(u, names::TEMPERATURE).relative - 3.0 / 3f64.sqrt() / tk).abs()
                < REL_TOL_DERIVED
        );
        assert_eq!(u.spatial_method, "line-half-difference");
        // two lines → ν = 1 for the spatial term (calculations.md §5)
        assert_eq!(
            component(u, crate::uncertainty::SPATIAL_COMPONENT).dof,
            Some(1.0)
        );
        assert!(t.uncertainty_note.is_none());
    }

    #[test]
    fn average_budget_over_valid_runs() {
        let mut s = EPA_SURVEY.to_string();
        s += &run_block("1", Some("pass"), Some("pass"));
        s += &run_block("2", Some("pass"), Some("pass"));
        s += &run_block("3", Some("pass"), Some("fail"));
        let scaled: Vec<f64> = EPA_DP_A.iter().map(|d| d * 1.02).collect();
        let c2 = csv(
            &[("A", &scaled), ("B", &EPA_DP_B)],
            "inH2O",
            &[("temperature[F]", &EPA_T_F)],
        );
        let a = assess_text(
            &s,
            &[
                ("run1.csv", epa_csv()),
                ("run2.csv", c2.clone()),
                ("run3.csv", c2),
            ],
        );
        let avg = a.average.as_ref().unwrap();
        assert_eq!(avg.runs, vec!["1", "2"]);
        let u = avg.uncertainty.as_ref().unwrap();
        let r2r = component(u, crate::uncertainty::RUN_TO_RUN_COMPONENT);
        assert_eq!(r2r.dof, Some(1.0));
        for r in &a.runs[..2] {
            assert!(u.combined_relative >= r.uncertainty.as_ref().unwrap().combined_relative);
        }
        // one valid run: its own budget, said so
        let one = epa_one_run("");
        let avg = one.average.as_ref().unwrap();
        assert!(avg
            .uncertainty_note
            .as_deref()
            .unwrap()
            .contains("one valid run"));
    }

    #[test]
    fn no_budget_with_negative_readings_and_verdict_fails() {
        let mut a_line = EPA_DP_A;
        a_line[0] = -0.02;
        let c = csv(&[("A", &a_line), ("B", &EPA_DP_B)], "inH2O", &[]);
        let a = assess_text(
            &survey(EPA_SURVEY, &["1"], "[flow]\nnegative = \"zero\"\n"),
            &[("run1.csv", c)],
        );
        assert!(a.runs[0].uncertainty.is_none());
        assert!(a.runs[0]
            .uncertainty_note
            .as_deref()
            .unwrap()
            .starts_with("uncertainty not evaluated"));
        assert_eq!(a.verdict, Verdict::Fail);
        assert!(a
            .findings()
            .any(|f| f.id == "negative-readings" && f.status == Status::Fail));
    }

    #[test]
    fn relaxed_and_disabled_checks_are_recorded() {
        // methods.md §3 [D]: mean |yaw| 22.5° fails at 20°; relaxed to 25° with a reason it passes
        // and the finding says so
        let yaw = [20., 25., 30., 15., 25., 20., 30., 25., 20., 15., 25., 20.];
        let c = csv(
            &[("A", &EPA_DP_A), ("B", &EPA_DP_B)],
            "inH2O",
            &[("yaw[deg]", &yaw)],
        );
        let extra = "[checks]\ncyclonic-flow = { limit = \"25 deg\", reason = \"straightening vanes fitted upstream\" }\nline-asymmetry = { enabled = false, reason = \"one port blocked by a platform\" }\n";
        let a = assess_text(&survey(EPA_SURVEY, &["1"], extra), &[("run1.csv", c)]);
        let f = run_finding(&a, 0, "cyclonic-flow");
        assert_eq!(f.status, Status::Pass, "{}", f.message);
        assert!(
            f.message
                .to_string()
                .contains("(limit relaxed from 20° to 25°: straightening vanes fitted upstream)"),
            "{}",
            f.message
        );
        assert_eq!(f.limit, "mean |yaw| ≤ 25°");
        let f = run_finding(&a, 0, "line-asymmetry");
        assert_eq!(f.status, Status::NotApplicable);
        assert_eq!(
            f.message,
            "check disabled by the survey: one port blocked by a platform"
        );
        assert_eq!(
            f.setting.as_ref().map(|s| s.to_string()).as_deref(),
            Some("disabled: one port blocked by a platform")
        );
    }
}
