//! One run: point velocities, the mean velocity and the flows; and the average of several runs.

use super::convention::{Convention, EpaForm, EPA_KP_ENGLISH, EPA_KP_METRIC, HVAC_IP_CONSTANT};
use super::gas_state::{resolve_gas, GasState};
use super::wall_effects::WallPointVelocity;
use super::FlowError;
use crate::layout::Layout;
use crate::readings::{Dp, Reading, RunReadings, WallReadings};
use crate::survey::{
    AngleCorrection, ConventionId, DesignFlow, NegativePolicy, RunSpec, Survey, WallFactor,
};
use crate::units::{PA_PER_INH2O, PA_PER_MMH2O};
use serde::Serialize;

/// Standard gravity, for gauge-fluid columns.
const G_N: f64 = 9.80665;
/// Conventional water, 1000 kg/m³: a column h of fluid of specific gravity SG reads h × SG of the
/// conventional inch (or millimetre) of water, the unit `inH2O`/`mmH2O` is (units.rs). Under EPA
/// Method 2 a reviewer computes exactly that.
const WATER_CONVENTIONAL_KG_M3: f64 = 1000.0;
/// The optional gas-column correction refers specific gravity to water at 60 °F (999.012 kg/m³),
/// common practice for gauge oils.
const WATER_60F_KG_M3: f64 = 999.012;
const FT_M: f64 = 0.3048;
/// Method 2H default wall-effects factors (40 CFR 60 App. A-2, Method 2H §2.2.2 and §8.1): 0.9900
/// for brick and mortar walls, 0.9950 for all other construction.
pub const WAF_DEFAULT_BRICK: f64 = 0.9900;
pub const WAF_DEFAULT_OTHER: f64 = 0.9950;

/// One point's result.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PointResult {
    pub line: String,
    pub point: usize,
    pub position_m: f64,
    pub dp_pa: f64,
    pub temperature_k: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub yaw_deg: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub pitch_deg: Option<f64>,
    /// Axial point velocity as used in the average (signed under the `signed` policy).
    pub velocity_m_s: f64,
    pub weight: f64,
    pub adjusted: bool,
    /// Δp below zero.
    pub negative: bool,
    /// 1-based line of the readings file.
    pub source_line: usize,
}

/// EPA Method 2 intermediate values in the form's own units, for reviewers who recompute by hand.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EpaFigures {
    pub form: EpaForm,
    /// (√Δp)avg in √inH2O or √mmH2O.
    pub sqrt_dp_avg: f64,
    /// Mean absolute temperature (°R with 460, or K with 273).
    pub ts_abs: f64,
    /// Ps in inHg or mmHg.
    pub ps: f64,
    pub md: f64,
    pub ms: f64,
    /// vs in ft/s or m/s, after the wall factor.
    pub vs: f64,
    /// Qsd in dscf/h or dscm/h.
    pub qsd_per_hour: f64,
}

/// Results of one run.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RunResult {
    pub id: String,
    pub points: Vec<PointResult>,
    pub gas: GasState,
    pub mean_temperature_k: f64,
    pub density_kg_m3: f64,
    pub wall_factor: f64,
    pub mean_velocity_m_s: f64,
    pub actual_flow_m3_s: f64,
    pub standard_flow_m3_s: f64,
    pub dry_standard_flow_m3_s: f64,
    pub mass_flow_kg_s: f64,
    /// Mean of √Δp and √ of mean Δp (√Pa): the second is the classic error.
    pub mean_sqrt_dp_pa: f64,
    pub sqrt_mean_dp_pa: f64,
    /// The mean velocity a √(mean Δp) calculation would report.
    pub wrong_average_velocity_m_s: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub epa: Option<EpaFigures>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub percent_of_design: Option<f64>,
}

fn reading_err(r: &Reading, message: String, hint: &str) -> FlowError {
    FlowError::Reading {
        line: r.line.clone(),
        point: r.point,
        source_line: r.source_line,
        message,
        hint: hint.to_string(),
    }
}

/// The wall factor a survey asks for; 1.0 (unadjusted) for the calculated Method 2H factor, which
/// the pipeline derives from the runs' wall-effects traverses and applies afterwards.
pub fn wall_factor(survey: &Survey) -> f64 {
    match survey.options.wall_factor {
        WallFactor::None | WallFactor::Method2hCalculated => 1.0,
        WallFactor::Given { factor } => factor,
        WallFactor::Method2hDefault => match survey.construction {
            crate::survey::Construction::Brick => WAF_DEFAULT_BRICK,
            crate::survey::Construction::Steel => WAF_DEFAULT_OTHER,
        },
    }
}

/// The methods a survey's results rest on beyond the convention's own equations, in words: the
/// 2F/2G per-point equations, the wall-effects factor with its clause, the Method 4 equations.
/// `traverses` is the number of Method 2H wall-effects traverses behind a calculated factor.
pub fn method_notes(
    survey: &Survey,
    convention: &Convention,
    runs: &[RunResult],
    traverses: usize,
) -> Vec<String> {
    let mut out = super::convention::angle_notes(convention, survey.options.angles);
    if let Some(r) = runs.first() {
        out.extend(wall_factor_note(survey, r.wall_factor, traverses));
    }
    if let Some(m4) = runs.iter().find_map(|r| r.gas.method4.as_ref()) {
        out.extend(m4.form.describe());
    }
    out
}

/// The wall factor applied, in words with the clause behind it; `None` when there is none.
/// `traverses` is the number of wall-effects traverses a calculated factor was derived from.
pub fn wall_factor_note(survey: &Survey, applied: f64, traverses: usize) -> Option<String> {
    match survey.options.wall_factor {
        WallFactor::None => None,
        WallFactor::Method2hDefault => Some(format!(
            "wall effects: EPA Method 2H default factor {applied:.4} for {} (Method 2H §2.2.2: 0.9900 for brick and mortar stacks, 0.9950 for all other construction)",
            match survey.construction {
                crate::survey::Construction::Brick => "a brick and mortar stack",
                crate::survey::Construction::Steel => "a stack other than brick and mortar",
            }
        )),
        WallFactor::Method2hCalculated => Some(format!(
            "wall effects: EPA Method 2H calculated factor {applied:.4}, {} (Method 2H §12; applied to every run, §2.3)",
            if traverses == 1 {
                "from one wall-effects traverse".to_string()
            } else {
                format!("the mean of {traverses} wall-effects traverses")
            }
        )),
        WallFactor::Given { factor } => {
            Some(format!("wall effects: factor {factor} given by the survey"))
        }
    }
}

fn wmean(pairs: impl Iterator<Item = (f64, f64)>) -> f64 {
    let (mut s, mut w) = (0.0, 0.0);
    for (x, wi) in pairs {
        s += x * wi;
        w += wi;
    }
    s / w
}

/// The axial share of a point velocity under the survey's angle correction: 1 (plain Method 2),
/// cos yaw (Method 2G) or cos yaw · cos pitch (Method 2F).
fn axial_factor(angles: AngleCorrection, r: &Reading) -> Result<f64, FlowError> {
    Ok(match angles {
        AngleCorrection::None => 1.0,
        AngleCorrection::Yaw | AngleCorrection::YawPitch => {
            let yaw = r.yaw_deg.ok_or_else(|| {
                reading_err(
                    r,
                    "no yaw angle is given but the survey corrects for yaw".into(),
                    "add a yaw[deg] column, or set [flow] angles = \"none\"",
                )
            })?;
            let pitch = if angles == AngleCorrection::YawPitch {
                r.pitch_deg.ok_or_else(|| {
                    reading_err(
                        r,
                        "no pitch angle is given but the survey corrects for pitch".into(),
                        "add a pitch[deg] column, or set [flow] angles = \"yaw\"",
                    )
                })?
            } else {
                0.0
            };
            yaw.to_radians().cos() * pitch.to_radians().cos()
        }
    })
}

/// Velocities of a run's Method 2H wall-effects readings, each computed like a traverse point with
/// the run's gas (`run` is the run's result) and the survey's probe and angle correction.
pub fn wall_point_velocities(
    survey: &Survey,
    convention: &Convention,
    spec: &RunSpec,
    run: &RunResult,
    wall: &WallReadings,
) -> Result<Vec<WallPointVelocity>, FlowError> {
    let gas = &run.gas;
    let ps_form = convention.epa_ps(gas.barometric_pa, gas.static_pa);
    let run_gas = survey.gas_for(spec);
    let mut out = Vec::with_capacity(wall.readings.len());
    for w in &wall.readings {
        let r = &w.reading;
        let t = r
            .temperature_k
            .or(run_gas.temperature_k)
            .unwrap_or(run.mean_temperature_k);
        let rho = gas.density_kg_m3(t)?;
        let dp = reading_dp_pa(survey, r, rho)?;
        // Method 2H §8.4.3 (from memory): a velocity pressure too small to read near the wall is
        // recorded as zero; a negative reading counts as zero velocity here.
        let s = dp.max(0.0).sqrt();
        let v = point_velocity(
            convention,
            gas,
            ps_form,
            survey.probe.coefficient,
            s,
            t,
            rho,
        ) * axial_factor(survey.options.angles, r)?;
        out.push(WallPointVelocity {
            line: r.line.clone(),
            point: r.point,
            distance_m: w.distance_m,
            velocity_m_s: v,
            source_line: r.source_line,
        });
    }
    Ok(out)
}

/// Δp in Pa from a reading as recorded: a pressure as is; a liquid column as h × SG of conventional
/// water, or, when the survey asks for it, less the column of gas it displaces.
fn reading_dp_pa(survey: &Survey, r: &Reading, gas_density: f64) -> Result<f64, FlowError> {
    match r.dp {
        Dp::Pressure { pa } => Ok(pa),
        Dp::Column { height_m } => {
            let sg = survey.probe.gauge_fluid_sg.ok_or_else(|| {
                reading_err(
                    r,
                    "Δp is a liquid column but the gauge fluid is not given".into(),
                    "set [probe] gauge_fluid_sg (1.0 for water), or write dp in a pressure unit",
                )
            })?;
            Ok(if survey.probe.gauge_gas_column {
                (sg * WATER_60F_KG_M3 - gas_density) * G_N * height_m
            } else {
                sg * WATER_CONVENTIONAL_KG_M3 * G_N * height_m
            })
        }
    }
}

/// Computes one run with the run's own conditions (`spec`) and the given wall factor (see
/// [`wall_factor`]). `readings` must already match `layout` (see `input::readings::match_to_layout`).
pub fn compute_run(
    survey: &Survey,
    convention: &Convention,
    layout: &Layout,
    spec: &RunSpec,
    readings: &RunReadings,
    waf: f64,
) -> Result<RunResult, FlowError> {
    let id = spec.id.as_str();
    let run_gas = survey.gas_for(spec);
    let (ordered, temps) = ordered_readings(layout, readings, &run_gas)?;
    let weights: Vec<f64> = ordered.iter().map(|(p, _)| p.weight).collect();
    let mean_t = wmean(temps.iter().copied().zip(weights.iter().copied()));
    let gas = resolve_gas(&run_gas, convention, mean_t)?;
    let ps_form = convention.epa_ps(gas.barometric_pa, gas.static_pa);
    let cp = survey.probe.coefficient;
    let policy = survey.options.negative;
    let angles = survey.options.angles;

    let mut points = Vec::with_capacity(ordered.len());
    // signed √Δp per point in Pa^½, for the averages
    let mut sqrt_dp = Vec::with_capacity(ordered.len());
    let mut rho_i = Vec::with_capacity(ordered.len());
    for ((p, r), &t) in ordered.iter().zip(&temps) {
        let rho = gas.density_kg_m3(t)?;
        let dp_pa = reading_dp_pa(survey, r, rho)?;
        let negative = dp_pa < 0.0;
        if negative && policy == NegativePolicy::Reject {
            return Err(reading_err(
                r,
                format!("Δp is negative ({dp_pa:.3} Pa): flow is reversed or turbulent here"),
                "re-read the point, move the plane, or choose [flow] negative = \"zero\" or \"signed\" (printed on the report)",
            ));
        }
        let s = match (negative, policy) {
            (true, NegativePolicy::Zero) => 0.0,
            (true, _) => -(-dp_pa).sqrt(),
            (false, _) => dp_pa.sqrt(),
        };
        let axial = axial_factor(angles, r)?;
        let v = point_velocity(convention, &gas, ps_form, cp, s, t, rho) * axial;
        sqrt_dp.push(s);
        rho_i.push(rho);
        points.push(PointResult {
            line: p.line.clone(),
            point: p.point,
            position_m: p.position_m,
            dp_pa,
            temperature_k: t,
            yaw_deg: r.yaw_deg,
            pitch_deg: r.pitch_deg,
            velocity_m_s: v,
            weight: p.weight,
            adjusted: p.adjusted,
            negative,
            source_line: r.source_line,
        });
    }

    let area = layout.duct().area_m2();
    let w = || weights.iter().copied();
    let mean_sqrt = wmean(sqrt_dp.iter().copied().zip(w()));
    let mean_dp = wmean(points.iter().map(|p| p.dp_pa.max(0.0)).zip(w()));
    let sqrt_mean = mean_dp.sqrt();
    let point_mean_v = wmean(points.iter().map(|p| p.velocity_m_s).zip(w()));
    let rho_mean = gas.density_kg_m3(mean_t)?;

    let mut epa = None;
    let (v_bar, q_std_wet, mass) = match convention.id {
        ConventionId::EpaMethod2 => {
            let to_form = |pa: f64| convention.epa_dp(pa);
            let sqrt_dp_avg = mean_sqrt * to_form(1.0).sqrt();
            let ts = wmean(temps.iter().map(|t| convention.epa_absolute_t(*t)).zip(w()));
            let ps = ps_form;
            let ms = gas.wet_molar_mass_g_mol;
            let (kp, unit_m_s) = match convention.epa_form {
                EpaForm::English => (EPA_KP_ENGLISH, FT_M),
                EpaForm::Metric => (EPA_KP_METRIC, 1.0),
            };
            // Methods 2F/2G average point velocities; plain Method 2 uses (√Δp)avg with mean Ts.
            let vs_form = if angles == AngleCorrection::None {
                epa_vs(kp, cp, sqrt_dp_avg, ts, ps, ms)
            } else {
                point_mean_v / unit_m_s
            } * waf;
            let v = vs_form * unit_m_s;
            let (tstd, pstd) = convention.epa_reference();
            let q_act = v * area;
            let q_std = q_act * (tstd / ts) * (ps / pstd);
            let qsd_per_hour = match convention.epa_form {
                EpaForm::English => q_std * (1.0 - gas.bws) * 3600.0 / (FT_M * FT_M * FT_M),
                EpaForm::Metric => q_std * (1.0 - gas.bws) * 3600.0,
            };
            epa = Some(EpaFigures {
                form: convention.epa_form,
                sqrt_dp_avg,
                ts_abs: ts,
                ps,
                md: gas.dry_molar_mass_g_mol,
                ms,
                vs: vs_form,
                qsd_per_hour,
            });
            (v, q_std, rho_mean * q_act)
        }
        ConventionId::Iso16911 => iso_flows(&points, &rho_i, &weights, area, waf, convention, &gas),
        ConventionId::HvacIp | ConventionId::HvacSi => {
            let v = point_mean_v * waf;
            let m = rho_mean * v * area;
            let rho_std = convention.standard_density_kg_m3.unwrap_or(1.2);
            (v, m / rho_std, m)
        }
    };
    let q_act = v_bar * area;
    let dry_std = match convention.id {
        ConventionId::HvacIp | ConventionId::HvacSi => {
            let rho_std = convention.standard_density_kg_m3.unwrap_or(1.2);
            mass / (1.0 + gas.humidity_ratio()) / rho_std
        }
        ConventionId::EpaMethod2 | ConventionId::Iso16911 => q_std_wet * (1.0 - gas.bws),
    };
    let wrong = if mean_sqrt > 0.0 {
        v_bar * sqrt_mean / mean_sqrt
    } else {
        v_bar
    };
    Ok(RunResult {
        id: id.to_string(),
        points,
        mean_temperature_k: mean_t,
        density_kg_m3: rho_mean,
        wall_factor: waf,
        mean_velocity_m_s: v_bar,
        actual_flow_m3_s: q_act,
        standard_flow_m3_s: q_std_wet,
        dry_standard_flow_m3_s: dry_std,
        mass_flow_kg_s: mass,
        mean_sqrt_dp_pa: mean_sqrt,
        sqrt_mean_dp_pa: sqrt_mean,
        wrong_average_velocity_m_s: wrong,
        epa,
        percent_of_design: survey.design.as_ref().map(|d| {
            let flows = super::design::Flows {
                actual_m3_s: q_act,
                standard_m3_s: q_std_wet,
                dry_standard_m3_s: dry_std,
            };
            super::design::percent_of_design(d, flows, convention)
        }),
        gas,
    })
}

/// Each traverse point with its reading, in layout order.
type Ordered<'a> = Vec<(&'a crate::layout::Point, &'a Reading)>;

/// The readings in layout order, each with its temperature (the reading's own, or the run's).
fn ordered_readings<'a>(
    layout: &'a Layout,
    readings: &'a RunReadings,
    run_gas: &crate::survey::Gas,
) -> Result<(Ordered<'a>, Vec<f64>), FlowError> {
    // Readings in layout order.
    let mut ordered: Vec<(&crate::layout::Point, &Reading)> =
        Vec::with_capacity(layout.total_points());
    for (k, p) in layout.points().iter().enumerate() {
        let here = |r: &&Reading| r.line == p.line && r.point == p.point;
        // the k-th reading first (readings are usually in layout order, and matched to the
        // layout without repeats), then a search
        let r = (readings.readings.get(k).filter(here))
            .or_else(|| readings.readings.iter().find(here))
            .ok_or_else(|| FlowError::Reading {
                line: p.line.clone(),
                point: p.point,
                source_line: 0,
                message: "no reading is given".into(),
                hint: "every traverse point needs a reading".into(),
            })?;
        ordered.push((p, r));
    }
    let mut temps = Vec::with_capacity(ordered.len());
    for (_, r) in &ordered {
        let t = r.temperature_k.or(run_gas.temperature_k).ok_or_else(|| {
            reading_err(
                r,
                "no temperature is given".into(),
                "add a temperature[…] column, or temperature to [gas] or the [[run]]",
            )
        })?;
        temps.push(t);
    }
    Ok((ordered, temps))
}

/// EN ISO 16911-1 style: the mean point velocity, the standard flow from the mean of v/T, and the
/// mass flow from the mean of ρ·v, each times the wall factor: (velocity, standard flow, mass flow).
fn iso_flows(
    points: &[PointResult],
    rho_i: &[f64],
    weights: &[f64],
    area: f64,
    waf: f64,
    convention: &Convention,
    gas: &GasState,
) -> (f64, f64, f64) {
    let w = || weights.iter().copied();
    let v = wmean(points.iter().map(|p| p.velocity_m_s).zip(w())) * waf;
    let v_over_t = wmean(
        points
            .iter()
            .map(|p| p.velocity_m_s / p.temperature_k)
            .zip(w()),
    );
    let q_std = area
        * waf
        * v_over_t
        * (convention.reference_temperature_k / convention.reference_pressure_pa)
        * gas.absolute_pressure_pa;
    let flux = wmean(
        points
            .iter()
            .zip(rho_i)
            .map(|(p, r)| p.velocity_m_s * r)
            .zip(w()),
    );
    (v, q_std, flux * area * waf)
}

/// EPA Method 2 eq. 2-9: vs = Kp·Cp·(√Δp)avg·√(Ts/(Ps·Ms)), in the form's units.
pub fn epa_vs(kp: f64, cp: f64, sqrt_dp_avg: f64, ts_abs: f64, ps: f64, ms: f64) -> f64 {
    kp * cp * sqrt_dp_avg * (ts_abs / (ps * ms)).sqrt()
}

/// Point velocity in m/s from the signed √Δp (Pa^½) under the convention. `ps_form` is the EPA
/// eq. 2-6 stack pressure in the form's unit (Pbar + Pg/13.6), used under EPA Method 2 only.
fn point_velocity(
    c: &Convention,
    gas: &GasState,
    ps_form: f64,
    cp: f64,
    sqrt_dp_pa: f64,
    t_k: f64,
    rho: f64,
) -> f64 {
    match c.id {
        ConventionId::EpaMethod2 => {
            let ps = ps_form;
            let ts = c.epa_absolute_t(t_k);
            match c.epa_form {
                EpaForm::English => {
                    EPA_KP_ENGLISH * cp * sqrt_dp_pa / PA_PER_INH2O.sqrt()
                        * (ts / (ps * gas.wet_molar_mass_g_mol)).sqrt()
                        * FT_M
                }
                EpaForm::Metric => {
                    EPA_KP_METRIC * cp * sqrt_dp_pa / PA_PER_MMH2O.sqrt()
                        * (ts / (ps * gas.wet_molar_mass_g_mol)).sqrt()
                }
            }
        }
        ConventionId::HvacIp => {
            let rho_lb = rho / super::convention::KG_M3_PER_LB_FT3;
            cp * HVAC_IP_CONSTANT * sqrt_dp_pa / PA_PER_INH2O.sqrt() / rho_lb.sqrt() * FT_M / 60.0
        }
        ConventionId::Iso16911 | ConventionId::HvacSi => cp * sqrt_dp_pa * (2.0 / rho).sqrt(),
    }
}

/// The average of several runs with their spread.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Average {
    pub runs: Vec<String>,
    pub mean_velocity_m_s: f64,
    pub actual_flow_m3_s: f64,
    pub standard_flow_m3_s: f64,
    pub dry_standard_flow_m3_s: f64,
    pub mass_flow_kg_s: f64,
    /// Sample standard deviation of the runs' actual flow over its mean (0 for one run).
    pub flow_relative_std_dev: f64,
    /// Largest deviation of a run's actual flow from the mean, relative.
    pub flow_max_deviation: f64,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub percent_of_design: Option<f64>,
    /// The design flow and the basis its unit names: the measured flow on that basis is what
    /// `percent_of_design` compares.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub design_flow_m3_s: Option<f64>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub design_basis: Option<crate::units::FlowBasis>,
}

/// Averages the given runs (the caller excludes invalid ones); the percent of `design` compares
/// the average flow on the design's basis. `None` for no runs.
pub fn average_runs(
    runs: &[&RunResult],
    design: Option<&DesignFlow>,
    convention: &Convention,
) -> Option<Average> {
    if runs.is_empty() {
        return None;
    }
    let n = runs.len() as f64;
    let mean = |f: fn(&RunResult) -> f64| runs.iter().map(|r| f(r)).sum::<f64>() / n;
    let q = mean(|r| r.actual_flow_m3_s);
    let sd = if runs.len() > 1 {
        (runs
            .iter()
            .map(|r| (r.actual_flow_m3_s - q).powi(2))
            .sum::<f64>()
            / (n - 1.0))
            .sqrt()
    } else {
        0.0
    };
    Some(Average {
        runs: runs.iter().map(|r| r.id.clone()).collect(),
        mean_velocity_m_s: mean(|r| r.mean_velocity_m_s),
        actual_flow_m3_s: q,
        standard_flow_m3_s: mean(|r| r.standard_flow_m3_s),
        dry_standard_flow_m3_s: mean(|r| r.dry_standard_flow_m3_s),
        mass_flow_kg_s: mean(|r| r.mass_flow_kg_s),
        flow_relative_std_dev: if q != 0.0 { sd / q.abs() } else { 0.0 },
        flow_max_deviation: runs
            .iter()
            .map(|r| ((r.actual_flow_m3_s - q) / q).abs())
            .fold(0.0, f64::max),
        percent_of_design: design.map(|d| {
            let flows = super::design::Flows {
                actual_m3_s: q,
                standard_m3_s: mean(|r| r.standard_flow_m3_s),
                dry_standard_m3_s: mean(|r| r.dry_standard_flow_m3_s),
            };
            super::design::percent_of_design(d, flows, convention)
        }),
        design_flow_m3_s: design.map(|d| d.m3_s),
        design_basis: design.map(|d| d.basis),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::geometry::Duct;
    use crate::input::survey::parse_survey;
    use crate::layout::{locate_points, LayoutSpec, Method};
    use proptest::prelude::*;

    const SURVEY: &str = r#"
[survey]
title = "property survey"
date = "2026-01-01"
convention = "CONV"
[duct]
shape = "round"
diameter = "1 m"
[probe]
kind = "s-type"
coefficient = 0.84
[gas]
barometric = "101 kPa"
temperature = "150 C"
moisture = "5 %"
[flow]
negative = "signed"
[[run]]
id = "1"
readings = "r.csv"
"#;

    fn setup(conv: &str) -> (Survey, Convention, Layout) {
        let s = parse_survey("s.toml", &SURVEY.replace("CONV", conv)).unwrap();
        let c = Convention::new(s.convention, EpaForm::English, None);
        let mut spec = LayoutSpec::new(Method::EqualArea);
        spec.points_per_line = Some(4);
        let l = locate_points(&Duct::round(1.0).unwrap(), &spec).unwrap();
        (s, c, l)
    }

    /// One run of the survey `s` by id, unadjusted for wall effects.
    fn run(
        s: &Survey,
        c: &Convention,
        l: &Layout,
        id: &str,
        r: &RunReadings,
    ) -> Result<RunResult, FlowError> {
        let mut spec = s.runs[0].clone();
        spec.id = id.to_string();
        compute_run(s, c, l, &spec, r, 1.0)
    }

    fn readings(l: &Layout, dps: &[f64]) -> RunReadings {
        RunReadings {
            file: "r.csv".into(),
            dp_unit: None,
            readings: l
                .points()
                .iter()
                .zip(dps)
                .enumerate()
                .map(|(i, (p, dp))| Reading {
                    line: p.line.clone(),
                    point: p.point,
                    dp: Dp::Pressure { pa: *dp },
                    dp_decimals: 2,
                    temperature_k: None,
                    yaw_deg: None,
                    pitch_deg: None,
                    static_pa: None,
                    time: None,
                    source_line: i + 2,
                })
                .collect(),
        }
    }

    proptest! {
        /// house-style invariants for every convention: a uniform profile integrates to v·A exactly;
        /// scaling every Δp by k scales velocity by √k; row order does not change the flow.
        #[test]
        fn flow_invariants(dps in prop::collection::vec(1.0f64..500.0, 8), k in 0.1f64..10.0, conv in 0usize..4) {
            let name = crate::survey::ConventionId::ALL[conv].name();
            let (s, c, l) = setup(name);
            let uniform = run(&s, &c, &l, "1", &readings(&l, &[dps[0]; 8])).unwrap();
            let v0 = uniform.points[0].velocity_m_s;
            prop_assert!((uniform.mean_velocity_m_s - v0).abs() <= 1e-12 * v0);
            prop_assert!((uniform.actual_flow_m3_s - v0 * l.duct().area_m2()).abs() <= 1e-12 * uniform.actual_flow_m3_s);

            let base = run(&s, &c, &l, "1", &readings(&l, &dps)).unwrap();
            let scaled: Vec<f64> = dps.iter().map(|d| d * k).collect();
            let sc = run(&s, &c, &l, "1", &readings(&l, &scaled)).unwrap();
            prop_assert!((sc.mean_velocity_m_s / base.mean_velocity_m_s - k.sqrt()).abs() < 1e-9);

            let mut rev = readings(&l, &dps);
            rev.readings.reverse();
            let r = run(&s, &c, &l, "1", &rev).unwrap();
            prop_assert!((r.actual_flow_m3_s - base.actual_flow_m3_s).abs() <= 1e-12 * base.actual_flow_m3_s);
            // mean of square roots never exceeds the square root of the mean
            prop_assert!(base.wrong_average_velocity_m_s >= base.mean_velocity_m_s * (1.0 - 1e-12));
        }
    }

    #[test]
    fn negative_policies() {
        let (mut s, c, l) = setup("iso-16911");
        let mut dps = [100.0; 8];
        dps[3] = -25.0;
        let signed = run(&s, &c, &l, "1", &readings(&l, &dps)).unwrap();
        assert!(signed.points[3].negative && signed.points[3].velocity_m_s < 0.0);
        // the signed velocity is −√(25/100) = −half of a 100 Pa point's
        assert!(
            (signed.points[3].velocity_m_s + 0.5 * signed.points[0].velocity_m_s).abs() < 1e-12
        );
        s.options.negative = NegativePolicy::Zero;
        let zero = run(&s, &c, &l, "1", &readings(&l, &dps)).unwrap();
        assert_eq!(zero.points[3].velocity_m_s, 0.0);
        assert!(zero.mean_velocity_m_s > signed.mean_velocity_m_s);
        s.options.negative = NegativePolicy::Reject;
        let e = run(&s, &c, &l, "1", &readings(&l, &dps)).unwrap_err();
        assert!(
            matches!(
                e,
                FlowError::Reading {
                    point: 4,
                    source_line: 5,
                    ..
                }
            ),
            "{e:?}"
        );
    }

    #[test]
    fn yaw_correction_and_missing_angles() {
        let (mut s, c, l) = setup("iso-16911");
        s.options.angles = AngleCorrection::Yaw;
        let mut r = readings(&l, &[100.0; 8]);
        let e = run(&s, &c, &l, "1", &r).unwrap_err();
        assert!(e.to_string().contains("no yaw"), "{e}");
        for x in r.readings.iter_mut() {
            x.yaw_deg = Some(60.0);
        }
        let with = run(&s, &c, &l, "1", &r).unwrap();
        s.options.angles = AngleCorrection::None;
        let without = run(&s, &c, &l, "1", &r).unwrap();
        // EPA Method 2G: axial velocity = v·cos(yaw); cos 60° = 0.5
        assert!((with.mean_velocity_m_s / without.mean_velocity_m_s - 0.5).abs() < 1e-12);
    }

    #[test]
    fn averages_and_spread() {
        let (s, c, l) = setup("iso-16911");
        let a = run(&s, &c, &l, "1", &readings(&l, &[100.0; 8])).unwrap();
        let b = run(&s, &c, &l, "2", &readings(&l, &[121.0; 8])).unwrap();
        let c = Convention::new(ConventionId::HvacIp, EpaForm::English, None);
        let avg = average_runs(&[&a, &b], None, &c).unwrap();
        assert!(
            (avg.actual_flow_m3_s - (a.actual_flow_m3_s + b.actual_flow_m3_s) / 2.0).abs() < 1e-12
        );
        // two runs 10 % apart in velocity (√1.21 = 1.1): s = |a−b|/√2
        let want =
            (b.actual_flow_m3_s - a.actual_flow_m3_s).abs() / 2f64.sqrt() / avg.actual_flow_m3_s;
        assert!((avg.flow_relative_std_dev - want).abs() < 1e-12);
        assert!(average_runs(&[], None, &c).is_none());
    }

    #[test]
    fn a_liquid_column_is_h_times_sg_inches_of_water() {
        // EPA Method 2 takes a gauge reading of h inches of a fluid of specific gravity SG as
        // h × SG inches of water (the conventional inch of water, units.rs): SG 1.0 must give
        // exactly what dp[inH2O] gives.
        let (mut s, c, l) = setup("epa-method-2");
        let inch = 0.0254;
        let h = [0.50, 0.55, 0.60, 0.62, 0.58, 0.52, 0.48, 0.54];
        let as_pressure = readings(&l, &h.map(|x| x * crate::units::PA_PER_INH2O));
        let mut as_column = as_pressure.clone();
        for (r, x) in as_column.readings.iter_mut().zip(h) {
            r.dp = Dp::Column { height_m: x * inch };
        }
        s.probe.gauge_fluid_sg = Some(1.0);
        let p = run(&s, &c, &l, "1", &as_pressure).unwrap();
        let q = run(&s, &c, &l, "1", &as_column).unwrap();
        for (a, b) in p.points.iter().zip(&q.points) {
            assert!(
                (a.dp_pa - b.dp_pa).abs() <= 1e-12 * a.dp_pa,
                "{} {}",
                a.dp_pa,
                b.dp_pa
            );
        }
        assert!((p.mean_velocity_m_s - q.mean_velocity_m_s).abs() <= 1e-12 * p.mean_velocity_m_s);
        // gauge oil SG 0.826: 0.826 × h inches of water
        s.probe.gauge_fluid_sg = Some(0.826);
        let q = run(&s, &c, &l, "1", &as_column).unwrap();
        let want = 0.826 * 0.50 * crate::units::PA_PER_INH2O;
        assert!((q.points[0].dp_pa - want).abs() <= 1e-12 * want);
        // the optional gas-column correction (documented, off by default) reads lower
        s.probe.gauge_gas_column = true;
        let g = run(&s, &c, &l, "1", &as_column).unwrap();
        assert!(g.points[0].dp_pa < q.points[0].dp_pa);
    }
}
