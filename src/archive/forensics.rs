//! Forensics: which known mistake reproduces a reported figure.
//!
//! Each mistake is modelled as what it does to the published equations, applied to the correctly
//! recomputed intermediates of a run: v ∝ Cp·(√Δp)avg·√(Ts/(Ps·Ms)), Q = v·A, Qstd = Q·(Tstd/Ts)·(Ps/Pstd),
//! dry = ×(1 − Bws). So a reported number can be explained without re-reading any file, and the list is
//! data: add a mistake by adding a row.

use crate::flow::{EpaForm, RunResult};
use crate::pipeline::{run_is_valid, Evaluation};
use crate::survey::{ConventionId, ProbeKind, Survey};
use serde::Serialize;

/// Which reported quantity is being explained.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Quantity {
    Velocity,
    ActualFlow,
    StandardFlow,
    DryStandardFlow,
}

impl Quantity {
    fn of(self, r: &RunResult) -> f64 {
        match self {
            Quantity::Velocity => r.mean_velocity_m_s,
            Quantity::ActualFlow => r.actual_flow_m3_s,
            Quantity::StandardFlow => r.standard_flow_m3_s,
            Quantity::DryStandardFlow => r.dry_standard_flow_m3_s,
        }
    }
}

/// A mistake and the value it would have produced.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Explanation {
    pub id: &'static str,
    pub description: String,
    pub value_si: f64,
    pub relative_difference: f64,
}

/// Relative factors a mistake applies to (velocity and actual flow, standard flows).
struct Effect {
    id: &'static str,
    description: String,
    velocity: f64,
    /// Factor on the actual flow: the velocity's, times any area error.
    actual: f64,
    standard: f64,
    /// Extra factor on the dry standard flow only (basis mistakes).
    dry_only: f64,
}

/// Records a mistake whose actual-flow factor is its velocity factor.
fn add(
    v: &mut Vec<Effect>,
    id: &'static str,
    description: String,
    velocity: f64,
    standard: f64,
    dry_only: f64,
) {
    v.push(Effect {
        id,
        description,
        velocity,
        actual: velocity,
        standard,
        dry_only,
    })
}

fn effects(s: &Survey, r: &RunResult, form: EpaForm, conv: ConventionId) -> Vec<Effect> {
    let mut v = Vec::new();
    // 1. √(mean Δp) instead of the mean of √Δp
    if r.mean_sqrt_dp_pa > 0.0 {
        let f = r.sqrt_mean_dp_pa / r.mean_sqrt_dp_pa;
        add(
            &mut v,
            "sqrt-of-mean-dp",
            "averaged Δp before taking the square root (√ of mean Δp)".into(),
            f,
            f,
            1.0,
        );
    }
    temperature_effects(&mut v, r, form, conv);
    pressure_and_probe_effects(&mut v, s);
    gas_and_area_effects(&mut v, s, r);
    v
}

/// Mistakes 2 and 3: the absolute-temperature offset and another rule book's standard temperature.
fn temperature_effects(v: &mut Vec<Effect>, r: &RunResult, form: EpaForm, conv: ConventionId) {
    // 2. absolute temperature offset: 459.67 vs 460, 273.15 vs 273
    let (ts, off, name) = match (conv, form) {
        (ConventionId::EpaMethod2, EpaForm::English) => (
            r.epa
                .as_ref()
                .map(|e| e.ts_abs)
                .unwrap_or(r.mean_temperature_k * 1.8),
            -0.33,
            "459.67 instead of Method 2's 460 for °R",
        ),
        (ConventionId::EpaMethod2, EpaForm::Metric) => (
            r.epa
                .as_ref()
                .map(|e| e.ts_abs)
                .unwrap_or(r.mean_temperature_k),
            0.15,
            "273.15 instead of Method 2's 273 for K",
        ),
        _ => (r.mean_temperature_k, -0.15, "273 instead of 273.15 for K"),
    };
    let t2 = ts + off;
    add(
        v,
        "absolute-temperature-offset",
        name.into(),
        (t2 / ts).sqrt(),
        (ts / t2).sqrt(),
        1.0,
    );
    // 3. standard temperature of another rule book (flows at reference conditions only)
    let tref_k = match (conv, form) {
        (ConventionId::EpaMethod2, EpaForm::English) => 528.0 / 1.8,
        (ConventionId::EpaMethod2, EpaForm::Metric) => 293.0,
        _ => 273.15,
    };
    for (id, label, t) in [
        // (id, words, reference temperature in K)
        (
            "standard-temperature-70f",
            "70 °F (530 °R) standard temperature",
            530.0_f64 / 1.8,
        ),
        (
            "standard-temperature-0c",
            "0 °C standard temperature",
            273.15,
        ),
        (
            "standard-temperature-20c",
            "20 °C standard temperature",
            293.15,
        ),
        (
            "standard-temperature-25c",
            "25 °C standard temperature",
            298.15,
        ),
    ] {
        if (t - tref_k).abs() > 0.2 {
            add(
                v,
                id,
                format!("{label} instead of the convention's"),
                1.0,
                t / tref_k,
                1.0,
            );
        }
    }
}

/// Mistakes 4 and 5: the static pressure mis-converted or left out, a nominal pitot coefficient.
fn pressure_and_probe_effects(v: &mut Vec<Effect>, s: &Survey) {
    // 4. static pressure: added in inH2O as if inHg (no ÷13.6), or left out
    let pbar = s.gas.barometric_pa;
    let pg = s.gas.static_pa;
    if pg != 0.0 {
        let p = pbar + pg;
        let wrong = pbar + pg * 13.6;
        if wrong > 0.0 {
            add(
                v,
                "static-without-13.6",
                "static pressure added without the ÷13.6 water-to-mercury conversion".into(),
                (p / wrong).sqrt(),
                (wrong / p).sqrt(),
                1.0,
            );
        }
        add(
            v,
            "static-ignored",
            "static pressure left out of the absolute stack pressure".into(),
            (p / pbar).sqrt(),
            (pbar / p).sqrt(),
            1.0,
        );
    }
    // 5. nominal pitot coefficient instead of the calibrated one
    let nominal = match s.probe.kind {
        ProbeKind::SType => 0.84,
        ProbeKind::Standard => 0.99,
    };
    if (nominal - s.probe.coefficient).abs() > 1e-6 {
        let f = nominal / s.probe.coefficient;
        add(
            v,
            "nominal-cp",
            format!(
                "nominal Cp {nominal} instead of the calibrated {}",
                s.probe.coefficient
            ),
            f,
            f,
            1.0,
        );
    }
}

/// Mistakes 6 to 9: wet for dry, the wall factor left out, the molar mass, the liner missed.
fn gas_and_area_effects(v: &mut Vec<Effect>, s: &Survey, r: &RunResult) {
    // 7. wet and dry basis swapped
    if r.gas.bws > 0.0 {
        add(
            v,
            "wet-for-dry",
            "wet-basis standard flow reported as dry".into(),
            1.0,
            1.0,
            1.0 / (1.0 - r.gas.bws),
        );
    }
    // 8. wall factor left out
    if r.wall_factor != 1.0 {
        let f = 1.0 / r.wall_factor;
        add(
            v,
            "missing-wall-factor",
            format!("wall-effects factor {} left out", r.wall_factor),
            f,
            f,
            1.0,
        );
    }
    // 9. molecular weight: the 29.0 default, or the dry Md used as the wet Ms
    let ms = r.gas.wet_molar_mass_g_mol;
    let bws = r.gas.bws;
    let ms29 = 29.0 * (1.0 - bws) + 18.0 * bws;
    if (ms29 - ms).abs() > 1e-3 {
        let f = (ms / ms29).sqrt();
        add(
            v,
            "molecular-weight-29",
            "Md of 29.0 (air) instead of the measured composition".into(),
            f,
            f,
            1.0,
        );
    }
    if bws > 0.0 {
        let f = (ms / r.gas.dry_molar_mass_g_mol).sqrt();
        add(
            v,
            "dry-molecular-weight",
            "dry Md used where the wet Ms belongs".into(),
            f,
            f,
            1.0,
        );
    }
    // 6. liner missed: the sheet-metal dimensions used for the area (flows only, not velocity)
    if s.liner_m > 0.0 {
        let f = match s.duct.shape() {
            crate::geometry::Shape::Round { diameter_m } => {
                ((diameter_m + 2.0 * s.liner_m) / diameter_m).powi(2)
            }
            crate::geometry::Shape::Rectangular { width_m, height_m } => {
                (width_m + 2.0 * s.liner_m) * (height_m + 2.0 * s.liner_m) / (width_m * height_m)
            }
        };
        v.push(Effect {
            id: "missed-liner",
            description: "area from dimensions outside the liner".into(),
            velocity: 1.0,
            actual: f,
            standard: f,
            dry_only: 1.0,
        });
    }
}

fn factor(q: Quantity, e: &Effect) -> f64 {
    match q {
        Quantity::Velocity => e.velocity,
        Quantity::ActualFlow => e.actual,
        Quantity::StandardFlow => e.standard,
        Quantity::DryStandardFlow => e.standard * e.dry_only,
    }
}

/// Every modelled mistake for `quantity` of run `run` (index), or of the average of the valid runs
/// when `run` is `None`, with the value it would give and its difference from `reported_si`.
pub fn explain(
    eval: &Evaluation,
    run: Option<usize>,
    quantity: Quantity,
    reported_si: f64,
) -> Vec<Explanation> {
    let s = &eval.loaded.survey;
    let form = eval.convention.epa_form;
    let idx: Vec<usize> = match run {
        Some(i) if i < eval.runs.len() => vec![i],
        Some(_) => vec![],
        None => (0..eval.runs.len())
            .filter(|&i| {
                s.runs
                    .get(i)
                    .is_some_and(|spec| run_is_valid(spec, s.convention))
            })
            .collect(),
    };
    if idx.is_empty() {
        return Vec::new();
    }
    let mut sums: Vec<(&'static str, String, f64)> = Vec::new();
    for &i in &idx {
        let r = &eval.runs[i];
        let base = quantity.of(r);
        for e in effects(s, r, form, s.convention) {
            // a mistake that does not touch this quantity cannot explain it
            let f = factor(quantity, &e);
            if (f - 1.0).abs() < 1e-12 {
                continue;
            }
            let v = base * f;
            match sums.iter_mut().find(|(id, _, _)| *id == e.id) {
                Some(x) => x.2 += v,
                None => sums.push((e.id, e.description, v)),
            }
        }
    }
    let n = idx.len() as f64;
    let mut out: Vec<Explanation> = sums
        .into_iter()
        .map(|(id, description, total)| {
            let value_si = total / n;
            Explanation {
                id,
                description,
                value_si,
                relative_difference: (reported_si - value_si) / value_si,
            }
        })
        .collect();
    out.sort_by(|a, b| {
        a.relative_difference
            .abs()
            .partial_cmp(&b.relative_difference.abs())
            .unwrap_or(std::cmp::Ordering::Equal)
    });
    out
}

/// The recomputed (correct) value of a quantity for a run or the average of the valid runs.
pub fn recomputed(eval: &Evaluation, run: Option<usize>, quantity: Quantity) -> Option<f64> {
    match run {
        Some(i) => eval.runs.get(i).map(|r| quantity.of(r)),
        None => eval.average.as_ref().map(|a| match quantity {
            Quantity::Velocity => a.mean_velocity_m_s,
            Quantity::ActualFlow => a.actual_flow_m3_s,
            Quantity::StandardFlow => a.standard_flow_m3_s,
            Quantity::DryStandardFlow => a.dry_standard_flow_m3_s,
        }),
    }
}

/// The mistake that reproduces `reported_si` within `tolerance` (relative) and closer than the
/// correct value does; `None` when the reported figure is right or no modelled mistake explains it.
pub fn identify(
    eval: &Evaluation,
    run: Option<usize>,
    quantity: Quantity,
    reported_si: f64,
    tolerance: f64,
) -> Option<Explanation> {
    let correct = recomputed(eval, run, quantity)?;
    let correct_diff = ((reported_si - correct) / correct).abs();
    explain(eval, run, quantity, reported_si)
        .into_iter()
        .next()
        .filter(|e| e.relative_difference.abs() <= tolerance)
        .filter(|e| e.relative_difference.abs() < correct_diff)
}
