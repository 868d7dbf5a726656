//! The results document: what `compute --format json` prints, what the report embeds and what
//! `verify` re-derives and compares. SI units, the unit in every key (see the contract).
//!
//! How a quantity is shown is not its business: every presenter asks
//! [`crate::display::DisplayTable`].

use crate::assess::{Assessment, RunAssessment};
use crate::flow::{Average, PointResult, RunResult};
use crate::pipeline::{Evaluation, RunValidity};
use serde::Serialize;

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Reference {
    pub temperature_k: f64,
    pub pressure_pa: f64,
    pub dry: bool,
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PointDoc {
    pub line: String,
    pub point: usize,
    pub position_m: f64,
    pub dp_pa: f64,
    pub temperature_k: f64,
    pub velocity_m_s: f64,
    pub weight: f64,
    pub adjusted: bool,
    pub negative: bool,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub yaw_deg: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub pitch_deg: Option<f64>,
}

impl From<&PointResult> for PointDoc {
    fn from(p: &PointResult) -> Self {
        PointDoc {
            line: p.line.clone(),
            point: p.point,
            position_m: p.position_m,
            dp_pa: p.dp_pa,
            temperature_k: p.temperature_k,
            velocity_m_s: p.velocity_m_s,
            weight: p.weight,
            adjusted: p.adjusted,
            negative: p.negative,
            yaw_deg: p.yaw_deg,
            pitch_deg: p.pitch_deg,
        }
    }
}

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RunDoc {
    pub id: String,
    /// Counts toward the average (post-run leak check passed, or not required; not voided).
    pub valid: bool,
    /// Why the run does not count; `null` for a valid run.
    pub void_reason: Option<String>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub started: Option<String>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub ended: Option<String>,
    pub points: Vec<PointDoc>,
    pub density_kg_m3: f64,
    pub mean_temperature_k: f64,
    /// The run's own barometric and static pressure (given in its `[[run]]` or the survey's).
    pub barometric_pa: f64,
    pub static_pa: f64,
    pub absolute_pressure_pa: f64,
    /// The run's dry gas as used: a composition (fractions), a molar mass, or air.
    pub dry_gas: crate::survey::DryGas,
    pub dry_molar_mass_g_mol: f64,
    pub wet_molar_mass_g_mol: f64,
    /// The water vapour mole fraction used (Bws).
    pub moisture_fraction: f64,
    /// The measured or given value before the saturation limit, when saturation was considered.
    pub measured_moisture_fraction: Option<f64>,
    /// Saturation at the run's mean stack temperature, when considered (may exceed 1).
    pub saturation_moisture_fraction: Option<f64>,
    pub moisture_basis: String,
    /// The Method 4 train with every intermediate, in the form's own units, when the moisture is
    /// from a train.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub method4: Option<crate::gas::Method4Result>,
    /// The Method 2H calculational procedure of this run's wall-effects traverse.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub wall_effects: Option<crate::flow::WallEffects>,
    pub wall_factor: f64,
    pub mean_velocity_m_s: f64,
    pub actual_flow_m3_s: f64,
    pub standard_flow_m3_s: f64,
    pub dry_standard_flow_m3_s: f64,
    pub mass_flow_kg_s: f64,
    /// The velocity a √(mean Δp) average would have given (the classic error), for reviewers.
    pub sqrt_of_mean_dp_velocity_m_s: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub percent_of_design: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub epa: Option<crate::flow::run::EpaFigures>,
    /// The GUM budget of this run (contract shape; `null` degrees of freedom mean infinite).
    pub uncertainty: Option<crate::assess::UncertaintyReport>,
    /// This run's findings.
    pub checks: Vec<crate::checks::Finding>,
}

/// The whole results document.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ResultsDoc {
    pub program: String,
    pub convention: String,
    pub convention_notes: Vec<String>,
    pub reference: Reference,
    pub area_m2: f64,
    pub layout_method: String,
    pub points_per_run: usize,
    pub required_points: Option<usize>,
    pub negative_policy: crate::survey::NegativePolicy,
    /// Valid runs the test needs, how many it has, and whether that is enough.
    pub runs_required: usize,
    pub valid_runs: usize,
    pub complete: bool,
    pub runs: Vec<RunDoc>,
    pub average: Option<Average>,
    /// The budget of the average of the valid runs (adds run-to-run variation).
    pub average_uncertainty: Option<crate::assess::UncertaintyReport>,
    /// Findings about the plane and the test as a whole.
    pub checks: Vec<crate::checks::Finding>,
    pub verdict: crate::assess::Verdict,
}

impl ResultsDoc {
    pub fn new(e: &Evaluation, a: &Assessment) -> ResultsDoc {
        let s = &e.loaded.survey;
        let c = &e.convention;
        let mut notes = c.describe();
        notes.extend(crate::flow::method_notes(
            s,
            c,
            &e.runs,
            e.wall_effects.len(),
        ));
        ResultsDoc {
            program: format!("annulus {}", env!("CARGO_PKG_VERSION")),
            convention: c.id.name().to_string(),
            convention_notes: notes,
            reference: Reference {
                temperature_k: c.reference_temperature_k,
                pressure_pa: c.reference_pressure_pa,
                dry: c.dry_basis,
            },
            area_m2: e.plane.layout.duct().area_m2(),
            layout_method: e.plane.layout.method().name().to_string(),
            points_per_run: e.plane.layout.total_points(),
            required_points: e.plane.required_points,
            negative_policy: s.options.negative,
            runs_required: e.runs_required(),
            valid_runs: e.valid_runs(),
            complete: e.complete(),
            runs: e
                .runs
                .iter()
                .zip(&s.runs)
                .zip(&e.validity)
                .map(|((r, spec), v)| {
                    let ra = a.runs.iter().find(|x| x.id == r.id);
                    let wall = e
                        .wall_effects
                        .iter()
                        .find(|(id, _)| *id == r.id)
                        .map(|(_, w)| w.clone());
                    run_doc(r, spec, v, wall, ra)
                })
                .collect(),
            average: e.average.clone(),
            average_uncertainty: a.average.as_ref().and_then(|x| x.uncertainty.clone()),
            checks: a.checks.clone(),
            verdict: a.verdict,
        }
    }
}

fn run_doc(
    r: &RunResult,
    spec: &crate::survey::RunSpec,
    v: &RunValidity,
    wall_effects: Option<crate::flow::WallEffects>,
    a: Option<&RunAssessment>,
) -> RunDoc {
    RunDoc {
        id: r.id.clone(),
        valid: v.valid,
        void_reason: v.void_reason.clone(),
        started: spec.started.clone(),
        ended: spec.ended.clone(),
        points: r.points.iter().map(PointDoc::from).collect(),
        density_kg_m3: r.density_kg_m3,
        mean_temperature_k: r.mean_temperature_k,
        barometric_pa: r.gas.barometric_pa,
        static_pa: r.gas.static_pa,
        absolute_pressure_pa: r.gas.absolute_pressure_pa,
        dry_gas: r.gas.dry.clone(),
        dry_molar_mass_g_mol: r.gas.dry_molar_mass_g_mol,
        wet_molar_mass_g_mol: r.gas.wet_molar_mass_g_mol,
        moisture_fraction: r.gas.bws,
        measured_moisture_fraction: r.gas.measured_bws,
        saturation_moisture_fraction: r.gas.saturation_bws,
        moisture_basis: r.gas.moisture_basis.clone(),
        method4: r.gas.method4,
        wall_effects,
        wall_factor: r.wall_factor,
        mean_velocity_m_s: r.mean_velocity_m_s,
        actual_flow_m3_s: r.actual_flow_m3_s,
        standard_flow_m3_s: r.standard_flow_m3_s,
        dry_standard_flow_m3_s: r.dry_standard_flow_m3_s,
        mass_flow_kg_s: r.mass_flow_kg_s,
        sqrt_of_mean_dp_velocity_m_s: r.wrong_average_velocity_m_s,
        percent_of_design: r.percent_of_design,
        epa: r.epa.clone(),
        uncertainty: a.and_then(|x| x.uncertainty.clone()),
        checks: a.map(|x| x.checks.clone()).unwrap_or_default(),
    }
}
