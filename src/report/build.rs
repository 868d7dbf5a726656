//! Fills the presentation model from computed results: an [`Evaluation`] with its [`Assessment`]
//! becomes a [`ReportData`]; a plane becomes a [`FieldSheetData`].
//!
//! Formatting only: every number here was computed upstream; this file chooses units, decimals and
//! words. The convention decides the units (US for EPA Method 2 English and hvac-ip, SI otherwise) and
//! SI is printed alongside.

use super::format::{fixed, grouped};
use super::model::*;
use crate::assess::{Assessment, UncertaintyReport, Verdict};
use crate::checks::{Finding, Status as CheckStatus};
use crate::flow::EpaForm;
use crate::geometry::Shape as GShape;
use crate::layout::{probe_marks, Layout, MarkStep, ProbeMark};
use crate::pipeline::{run_is_valid, Evaluation};
use crate::readings::Dp;
use crate::results::{DisplayUnits as ResultUnits, Shown};
use crate::survey::{ConventionId, DryGas, LeakResult, Moisture, NegativePolicy, Survey};
use crate::units::{to_unit, UnitSystem, PA_PER_INH2O, PA_PER_MMH2O};

/// What the report's identity block needs besides the results.
#[derive(Debug, Clone)]
pub struct Identity {
    pub report_id: String,
    pub content_sha256: String,
    pub signer_key_fingerprint: Option<String>,
}

fn status(s: CheckStatus) -> Status {
    match s {
        CheckStatus::Pass => Status::Pass,
        CheckStatus::Warn => Status::Warn,
        CheckStatus::Fail => Status::Fail,
        CheckStatus::NotApplicable => Status::NotApplicable,
    }
}

struct Units {
    sys: UnitSystem,
    len: &'static str,
    len_dec: usize,
    dp: &'static str,
    dp_per_pa: f64,
    dp_dec: usize,
    temp: &'static str,
    shown: ResultUnits,
}

fn units(e: &Evaluation) -> Units {
    let c = &e.convention;
    let sys = match (c.id, c.epa_form) {
        (ConventionId::EpaMethod2, EpaForm::Metric) => UnitSystem::Si,
        (id, _) => id.unit_system(),
    };
    let (dp, dp_per_pa, dp_dec) = match (c.id, c.epa_form, sys) {
        (ConventionId::EpaMethod2, EpaForm::Metric, _) => ("mmH2O", 1.0 / PA_PER_MMH2O, 2),
        (_, _, UnitSystem::Us) => ("inH2O", 1.0 / PA_PER_INH2O, 3),
        _ => ("Pa", 1.0, 1),
    };
    Units {
        sys,
        len: if sys == UnitSystem::Us { "in" } else { "mm" },
        len_dec: if sys == UnitSystem::Us { 2 } else { 0 },
        dp,
        dp_per_pa,
        dp_dec,
        temp: if sys == UnitSystem::Us { "F" } else { "C" },
        shown: ResultUnits::for_convention(c),
    }
}

impl Units {
    fn temperature(&self, k: f64) -> String {
        format!("{} °{}", fixed(to_unit(k, self.temp), 1), self.temp)
    }
    fn model(&self) -> DisplayUnits {
        DisplayUnits {
            length: self.len.to_string(),
            length_per_m: to_unit(1.0, self.len),
            length_decimals: if self.len == "in" { 1 } else { 0 },
            velocity: self.shown.velocity.unit.to_string(),
            velocity_per_m_s: self.shown.velocity.per_si,
            velocity_decimals: self.shown.velocity.decimals.min(2),
            dp: self.dp.to_string(),
            temperature: format!("°{}", self.temp),
        }
    }
}

fn shown(s: &Shown, si: f64) -> String {
    grouped(si * s.per_si, s.decimals)
}

fn si_flow(m3_s: f64) -> String {
    format!("{} m³/s", fixed(m3_s, 3))
}

fn convention_name(e: &Evaluation) -> String {
    match (e.convention.id, e.convention.epa_form) {
        (ConventionId::EpaMethod2, EpaForm::English) => "EPA Method 2 (English units)".into(),
        (ConventionId::EpaMethod2, EpaForm::Metric) => "EPA Method 2 (metric units)".into(),
        (ConventionId::Iso16911, _) => "EN ISO 16911-1 style (SI, exact constants)".into(),
        (ConventionId::HvacIp, _) => "HVAC, inch-pound".into(),
        (ConventionId::HvacSi, _) => "HVAC, SI".into(),
    }
}

fn method_words(l: &Layout) -> String {
    match l.method() {
        crate::layout::Method::EqualArea => "Equal-area (centroids of equal areas)".into(),
        crate::layout::Method::LogLinear => "Log-linear (equal weights)".into(),
        crate::layout::Method::LogTchebycheff => "Log-Tchebycheff (equal weights)".into(),
    }
}

fn finding_measured(f: &Finding) -> String {
    match f.measured {
        None => "—".into(),
        Some(v) => {
            // "1" marks counts, ratios and fractions alike: print the plain number
            let (x, unit) = match f.unit {
                "1" | "" => (v, ""),
                "d" => (v, "days"),
                u => (v, u),
            };
            let dec = if x.fract() == 0.0 && x.abs() < 1e9 {
                0
            } else if x.abs() >= 100.0 {
                1
            } else if x.abs() >= 1.0 {
                3
            } else {
                4
            };
            if unit.is_empty() {
                fixed(x, dec)
            } else {
                format!("{} {unit}", fixed(x, dec))
            }
        }
    }
}

fn group_name(f: &Finding) -> String {
    match f.group {
        crate::checks::Group::Plane => "Plane",
        crate::checks::Group::Flow => "Flow",
        crate::checks::Group::Run => "Run",
        crate::checks::Group::Records => "Records",
        crate::checks::Group::Data => "Data",
    }
    .to_string()
}

fn budget(
    u: Option<&UncertaintyReport>,
    applies_to: String,
    flow: Option<(f64, &Shown)>,
    note: Option<&String>,
) -> UncertaintyBudget {
    match u {
        None => UncertaintyBudget {
            applies_to,
            spatial_method: "—".into(),
            rows: vec![],
            combined: "—".into(),
            effective_dof: "—".into(),
            coverage_factor: "—".into(),
            expanded: "—".into(),
            expanded_absolute: "—".into(),
            note: note
                .cloned()
                .unwrap_or_else(|| "no budget could be formed".into()),
        },
        Some(u) => {
            let uc2: f64 = u
                .components
                .iter()
                .map(|c| (c.relative * c.sensitivity).powi(2))
                .sum();
            UncertaintyBudget {
                applies_to,
                spatial_method: u.spatial_method.to_string(),
                rows: u
                    .components
                    .iter()
                    .map(|c| BudgetRow {
                        name: c.name.clone(),
                        relative_u: format!("{} %", fixed(c.relative * 100.0, 2)),
                        sensitivity: fixed(c.sensitivity, 2),
                        dof: c.dof.map(|d| fixed(d, 0)).unwrap_or_else(|| "∞".into()),
                        contribution: if uc2 > 0.0 {
                            format!(
                                "{} %",
                                fixed(100.0 * (c.relative * c.sensitivity).powi(2) / uc2, 0)
                            )
                        } else {
                            "—".into()
                        },
                    })
                    .collect(),
                combined: format!("{} %", fixed(u.combined_relative * 100.0, 2)),
                effective_dof: u
                    .effective_dof
                    .map(|d| fixed(d, 1))
                    .unwrap_or_else(|| "∞".into()),
                coverage_factor: fixed(u.coverage_factor, 2),
                expanded: format!("±{} %", fixed(u.expanded_relative * 100.0, 1)),
                expanded_absolute: match flow {
                    Some((q, s)) => format!(
                        "±{} {} (±{})",
                        shown(s, q * u.expanded_relative),
                        s.unit,
                        si_flow(q * u.expanded_relative)
                    ),
                    None => "—".into(),
                },
                note: "expanded uncertainty at about 95 % coverage: k from Student's t at the \
                       Welch–Satterthwaite effective degrees of freedom (GUM, JCGM 100:2008)"
                    .into(),
            }
        }
    }
}

/// The headline flow of a convention: dry standard for stacks, actual for HVAC.
fn headline_flow(e: &Evaluation) -> (&'static str, fn(&crate::flow::Average) -> f64) {
    if e.convention.id.is_hvac() {
        ("actual", |a| a.actual_flow_m3_s)
    } else {
        ("dry standard", |a| a.dry_standard_flow_m3_s)
    }
}

fn run_range(ids: &[String]) -> String {
    match ids.len() {
        0 => "no runs".into(),
        1 => format!("run {}", ids[0]),
        _ => format!("runs {}", ids.join(", ")),
    }
}

/// Builds the report model.
pub fn report_data(e: &Evaluation, a: &Assessment, id: &Identity) -> ReportData {
    let s = &e.loaded.survey;
    let u = units(e);
    let layout = &e.plane.layout;
    let marks = probe_marks(layout, s.port_length_m, mark_step(u.sys));
    let plane = plane_model(s, layout, &marks, &u, e);

    // results table
    let mut columns: Vec<String> = e.runs.iter().map(|r| format!("Run {}", r.id)).collect();
    if e.average.is_some() {
        columns.push("Average".into());
    }
    let sh = &u.shown;
    type Pick = fn(&crate::flow::RunResult) -> f64;
    type PickAvg = fn(&crate::flow::Average) -> f64;
    let mut rows = Vec::new();
    let flow_rows: [(&str, &Shown, Pick, PickAvg); 5] = [
        (
            "Mean velocity",
            &sh.velocity,
            |r| r.mean_velocity_m_s,
            |a| a.mean_velocity_m_s,
        ),
        (
            "Actual flow",
            &sh.actual,
            |r| r.actual_flow_m3_s,
            |a| a.actual_flow_m3_s,
        ),
        (
            sh.standard.label,
            &sh.standard,
            |r| r.standard_flow_m3_s,
            |a| a.standard_flow_m3_s,
        ),
        (
            sh.dry_standard.label,
            &sh.dry_standard,
            |r| r.dry_standard_flow_m3_s,
            |a| a.dry_standard_flow_m3_s,
        ),
        (
            "Mass flow",
            &sh.mass,
            |r| r.mass_flow_kg_s,
            |a| a.mass_flow_kg_s,
        ),
    ];
    for (label, unit, f, fa) in flow_rows {
        let mut values: Vec<String> = e.runs.iter().map(|r| shown(unit, f(r))).collect();
        let mut si: Vec<String> = e.runs.iter().map(|r| fixed(f(r), 3)).collect();
        if let Some(av) = &e.average {
            values.push(shown(unit, fa(av)));
            si.push(fixed(fa(av), 3));
        }
        let si_unit = match label {
            "Mean velocity" => "m/s",
            "Mass flow" => "kg/s",
            _ => "m³/s",
        };
        rows.push(ResultRow {
            label: {
                let mut l = label.to_string();
                if let Some(c) = l.get_mut(0..1) {
                    c.make_ascii_uppercase();
                }
                l
            },
            unit: unit.unit.to_string(),
            values,
            si_unit: si_unit.to_string(),
            si_values: si,
        });
    }
    let mut t_row: Vec<String> = e
        .runs
        .iter()
        .map(|r| fixed(to_unit(r.mean_temperature_k, u.temp), 1))
        .collect();
    let mut rho_row: Vec<String> = e.runs.iter().map(|r| fixed(r.density_kg_m3, 4)).collect();
    let mut u_row: Vec<String> = a
        .runs
        .iter()
        .map(|r| {
            r.uncertainty
                .as_ref()
                .map(|x| format!("±{}", fixed(x.expanded_relative * 100.0, 1)))
                .unwrap_or_else(|| "—".into())
        })
        .collect();
    if e.average.is_some() {
        t_row.push("".into());
        rho_row.push("".into());
        u_row.push(
            a.average
                .as_ref()
                .and_then(|x| x.uncertainty.as_ref())
                .map(|x| format!("±{}", fixed(x.expanded_relative * 100.0, 1)))
                .unwrap_or_else(|| "—".into()),
        );
    }
    rows.insert(
        0,
        ResultRow {
            label: "Mean gas temperature".into(),
            unit: format!("°{}", u.temp),
            values: t_row,
            si_unit: String::new(),
            si_values: vec![],
        },
    );
    rows.insert(
        1,
        ResultRow {
            label: "Gas density".into(),
            unit: "kg/m³".into(),
            values: rho_row,
            si_unit: String::new(),
            si_values: vec![],
        },
    );
    rows.push(ResultRow {
        label: "Expanded uncertainty (95 %)".into(),
        unit: "%".into(),
        values: u_row,
        si_unit: String::new(),
        si_values: vec![],
    });

    // summary
    let findings: Vec<&Finding> = a.findings().collect();
    let judged: Vec<&&Finding> = findings
        .iter()
        .filter(|f| f.status != CheckStatus::NotApplicable)
        .collect();
    let fails = judged
        .iter()
        .filter(|f| f.status == CheckStatus::Fail)
        .count();
    let warns = judged
        .iter()
        .filter(|f| f.status == CheckStatus::Warn)
        .count();
    let verdict = match a.verdict {
        Verdict::Pass => Status::Pass,
        Verdict::Warn => Status::Warn,
        Verdict::Fail => Status::Fail,
    };
    let verdict_text = match (fails, warns) {
        (0, 0) => format!("All {} applicable checks pass.", judged.len()),
        (0, w) => format!("No check fails; {w} of {} give a warning.", judged.len()),
        (f, w) => format!(
            "{f} of {} checks fail{}.",
            judged.len(),
            if w > 0 {
                format!(", {w} warn")
            } else {
                String::new()
            }
        ),
    };
    let mut headline = Vec::new();
    let (hname, hpick) = headline_flow(e);
    if let Some(av) = &e.average {
        let hs = if hname == "actual" {
            &sh.actual
        } else {
            &sh.dry_standard
        };
        headline.push(Quantity::new(
            if hname == "actual" {
                "Actual flow"
            } else {
                "Dry standard flow"
            },
            format!("{} {}", shown(hs, hpick(av)), hs.unit),
            si_flow(hpick(av)),
        ));
        if hname != "actual" {
            headline.push(Quantity::new(
                "Actual flow",
                format!(
                    "{} {}",
                    shown(&sh.actual, av.actual_flow_m3_s),
                    sh.actual.unit
                ),
                si_flow(av.actual_flow_m3_s),
            ));
        } else {
            headline.push(Quantity::new(
                "Standard air flow",
                format!(
                    "{} {}",
                    shown(&sh.standard, av.standard_flow_m3_s),
                    sh.standard.unit
                ),
                si_flow(av.standard_flow_m3_s),
            ));
        }
        headline.push(Quantity::new(
            "Mean velocity",
            format!(
                "{} {}",
                shown(&sh.velocity, av.mean_velocity_m_s),
                sh.velocity.unit
            ),
            if sh.velocity.unit == "m/s" {
                String::new()
            } else {
                format!("{} m/s", fixed(av.mean_velocity_m_s, 2))
            },
        ));
        if let Some(x) = a.average.as_ref().and_then(|x| x.uncertainty.as_ref()) {
            headline.push(Quantity::new(
                "Expanded uncertainty (95 %)",
                format!("±{} %", fixed(x.expanded_relative * 100.0, 1)),
                "",
            ));
        }
    }
    let design = match (
        s.design_flow_m3_s,
        e.average.as_ref().and_then(|x| x.percent_of_design),
    ) {
        (Some(d), Some(p)) => Some(Design {
            flow: Quantity::new(
                "Design flow",
                format!("{} {}", shown(&sh.actual, d), sh.actual.unit),
                si_flow(d),
            ),
            percent: format!("{} %", fixed(p, 1)),
        }),
        _ => None,
    };
    let excluded: Vec<String> = s
        .runs
        .iter()
        .filter(|r| !run_is_valid(r, s.convention))
        .map(|r| r.id.clone())
        .collect();
    let basis_text = match &e.average {
        Some(av) => {
            let mut t = format!("Average of {}", run_range(&av.runs));
            if !excluded.is_empty() {
                t += &format!(
                    "; {} excluded (post-run leak check failed or not recorded)",
                    run_range(&excluded)
                );
            }
            t
        }
        None => {
            "No valid run to average: every run's post-run leak check failed or is missing.".into()
        }
    };

    // conditions
    let c = &e.convention;
    let (tref, pref) = if u.sys == UnitSystem::Us {
        (
            format!("{} °R", fixed(c.reference_temperature_k * 1.8, 2)),
            format!(
                "{} inHg",
                fixed(to_unit(c.reference_pressure_pa, "inHg"), 2)
            ),
        )
    } else {
        (
            format!("{} K", fixed(c.reference_temperature_k, 2)),
            format!("{} kPa", fixed(c.reference_pressure_pa / 1000.0, 3)),
        )
    };
    let basis = if c.dry_basis {
        "dry"
    } else {
        "wet (standard air by density)"
    };
    let mut gas = vec![
        Quantity::new(
            "Barometric pressure",
            press(&u, s.gas.barometric_pa, true),
            format!("{} Pa", grouped(s.gas.barometric_pa, 0)),
        ),
        Quantity::new(
            "Static pressure",
            press(&u, s.gas.static_pa, false),
            format!("{} Pa", fixed(s.gas.static_pa, 1)),
        ),
    ];
    if let Some(r) = e.runs.first() {
        gas.push(Quantity::new(
            "Absolute duct pressure",
            press(&u, r.gas.absolute_pressure_pa, true),
            format!("{} Pa", grouped(r.gas.absolute_pressure_pa, 0)),
        ));
        match &s.gas.dry {
            DryGas::Composition { o2, co2, co, ar } => {
                let mut t = format!(
                    "O₂ {} %, CO₂ {} %, CO {} %",
                    fixed(o2 * 100.0, 1),
                    fixed(co2 * 100.0, 1),
                    fixed(co * 100.0, 1)
                );
                if let Some(ar) = ar {
                    t += &format!(", Ar {} %", fixed(ar * 100.0, 2));
                }
                t += ", N₂ balance (dry basis)";
                gas.push(Quantity::new("Dry composition", t, ""));
            }
            DryGas::MolarMass { .. } => {}
            DryGas::Air => gas.push(Quantity::new("Gas", "air", "")),
        }
        gas.push(Quantity::new(
            "Dry molar mass Md",
            format!("{} g/mol", fixed(r.gas.dry_molar_mass_g_mol, 3)),
            "",
        ));
        gas.push(Quantity::new(
            "Moisture Bws",
            format!(
                "{} % ({})",
                fixed(r.gas.bws * 100.0, 2),
                r.gas.moisture_basis
            ),
            "",
        ));
        gas.push(Quantity::new(
            "Wet molar mass Ms",
            format!("{} g/mol", fixed(r.gas.wet_molar_mass_g_mol, 3)),
            "",
        ));
        if r.wall_factor != 1.0 {
            gas.push(Quantity::new(
                "Wall-effects factor",
                fixed(r.wall_factor, 4),
                "",
            ));
        }
    }
    if let Moisture::Method4(_) = s.gas.moisture {
        gas.push(Quantity::new("Moisture method", "EPA Method 4 train", ""));
    }

    // runs
    let runs = e
        .runs
        .iter()
        .zip(&s.runs)
        .zip(&e.loaded.runs)
        .map(|((r, spec), (_, readings))| {
            let valid = run_is_valid(spec, s.convention);
            let rows = r
                .points
                .iter()
                .map(|p| {
                    let rd = readings
                        .readings
                        .iter()
                        .find(|x| x.line == p.line && x.point == p.point);
                    let dp_text = match rd.map(|x| x.dp) {
                        Some(Dp::Column { height_m }) => {
                            format!("{} {} col.", fixed(to_unit(height_m, u.len), 3), u.len)
                        }
                        _ => fixed(p.dp_pa * u.dp_per_pa, u.dp_dec),
                    };
                    let mut note = Vec::new();
                    if p.adjusted {
                        note.push("moved to the wall limit".to_string());
                    }
                    if p.negative {
                        note.push(match s.options.negative {
                            NegativePolicy::Zero => "negative Δp, counted as zero".to_string(),
                            NegativePolicy::Signed => "negative Δp, signed velocity".to_string(),
                            NegativePolicy::Reject => "negative Δp".to_string(),
                        });
                    }
                    if !valid {
                        note.push("run excluded".into());
                    }
                    ReadingRow {
                        line: p.line.clone(),
                        point: p.point as u32,
                        position: fixed(to_unit(p.position_m, u.len), u.len_dec.max(1)),
                        dp: dp_text,
                        temperature: fixed(to_unit(p.temperature_k, u.temp), 0),
                        yaw: p.yaw_deg.map(|y| fixed(y, 0)).unwrap_or_else(|| "—".into()),
                        velocity: fixed(
                            p.velocity_m_s * sh.velocity.per_si,
                            sh.velocity.decimals.max(1),
                        ),
                        adjusted: p.adjusted,
                        negative: p.negative,
                        excluded: !valid,
                        note: note.join("; "),
                    }
                })
                .collect();
            let mut summary = vec![
                Quantity::new(
                    "Mean velocity",
                    format!(
                        "{} {}",
                        shown(&sh.velocity, r.mean_velocity_m_s),
                        sh.velocity.unit
                    ),
                    "",
                ),
                Quantity::new("Mean temperature", u.temperature(r.mean_temperature_k), ""),
                Quantity::new(
                    "Gas density",
                    format!("{} kg/m³", fixed(r.density_kg_m3, 4)),
                    "",
                ),
                Quantity::new(
                    "√(mean Δp) would give",
                    format!(
                        "{} {} ({:+.2} %)",
                        shown(&sh.velocity, r.wrong_average_velocity_m_s),
                        sh.velocity.unit,
                        (r.wrong_average_velocity_m_s / r.mean_velocity_m_s - 1.0) * 100.0
                    ),
                    "",
                ),
            ];
            if let Some(f) = &r.epa {
                let (dpu, tu, pu) = match f.form {
                    EpaForm::English => ("inH₂O", "°R", "inHg"),
                    EpaForm::Metric => ("mmH₂O", "K", "mmHg"),
                };
                summary.push(Quantity::new(
                    "(√Δp)avg",
                    format!("{} √{dpu}", fixed(f.sqrt_dp_avg, 6)),
                    "",
                ));
                summary.push(Quantity::new(
                    "Ts (mean)",
                    format!("{} {tu}", fixed(f.ts_abs, 1)),
                    "",
                ));
                summary.push(Quantity::new("Ps", format!("{} {pu}", fixed(f.ps, 5)), ""));
            }
            let field = r
                .points
                .iter()
                .map(|p| {
                    let line = plane.line(&p.line);
                    let (x, y) = line
                        .map(|l| plane.point_xy(l.orientation, p.position_m))
                        .unwrap_or((0.0, 0.0));
                    FieldPoint {
                        line: p.line.clone(),
                        point: p.point as u32,
                        position_m: p.position_m,
                        x_m: x,
                        y_m: y,
                        velocity_m_s: p.velocity_m_s,
                        excluded: !valid,
                    }
                })
                .collect();
            let leak = |x: Option<LeakResult>| match x {
                Some(LeakResult::Pass) => "pass",
                Some(LeakResult::Fail) => "FAIL",
                None => "not recorded",
            };
            RunData {
                id: r.id.clone(),
                label: format!("Run {}", r.id),
                started: spec.started.clone().unwrap_or_default(),
                ended: String::new(),
                leak_check: format!(
                    "before: {} · after: {}",
                    leak(spec.leak_check.before),
                    leak(spec.leak_check.after)
                ),
                readings: rows,
                summary,
                field,
            }
        })
        .collect();

    let checks = findings
        .iter()
        .map(|f| CheckRow {
            group: group_name(f),
            id: match &f.subject {
                Some(sub) => format!("{} ({sub})", f.id),
                None => f.id.clone(),
            },
            status: status(f.status),
            measured: finding_measured(f),
            limit: f.limit.clone(),
            source: f.source.clone(),
            message: match &f.setting {
                Some(set) => format!("{} [{set}]", f.message),
                None => f.message.clone(),
            },
        })
        .collect();

    let (ub, applies_to, flow_q) = match (&a.average, &e.average) {
        (Some(avg), Some(av)) if avg.uncertainty.is_some() => (
            avg.uncertainty.as_ref(),
            format!("{} flow, average of {}", hname, run_range(&avg.runs)),
            Some(hpick(av)),
        ),
        _ => (
            a.runs.first().and_then(|r| r.uncertainty.as_ref()),
            format!(
                "{} flow, run {}",
                hname,
                e.runs.first().map(|r| r.id.as_str()).unwrap_or("—")
            ),
            e.runs.first().map(|r| {
                if hname == "actual" {
                    r.actual_flow_m3_s
                } else {
                    r.dry_standard_flow_m3_s
                }
            }),
        ),
    };
    let hs = if hname == "actual" {
        &sh.actual
    } else {
        &sh.dry_standard
    };
    let uncertainty = budget(
        ub,
        applies_to,
        flow_q.map(|q| (q, hs)),
        a.average.as_ref().and_then(|x| x.uncertainty_note.as_ref()),
    );

    let mut instruments = vec![InstrumentRow {
        name: match s.probe.kind {
            crate::survey::ProbeKind::SType => "Type S pitot tube".into(),
            crate::survey::ProbeKind::Standard => "Standard pitot tube".into(),
        },
        identifier: s.probe.serial.clone().unwrap_or_else(|| "—".into()),
        detail: format!("Cp {}", fixed(s.probe.coefficient, 3)),
        calibrated: s
            .probe
            .calibrated
            .map(|d| d.to_string())
            .unwrap_or_else(|| "not recorded".into()),
        due: s
            .probe
            .calibrated
            .and_then(|d| d.checked_add_months(chrono::Months::new(12)))
            .map(|d| d.to_string())
            .unwrap_or_else(|| "—".into()),
        reference: "survey [probe]".into(),
    }];
    for asm in &a.assumptions {
        instruments.push(InstrumentRow {
            name: asm.input.to_string(),
            identifier: "—".into(),
            detail: asm.value.clone(),
            calibrated: "—".into(),
            due: "—".into(),
            reference: asm.basis.clone(),
        });
    }

    let mut notes: Vec<String> = s.notes.clone();
    notes.extend(c.describe());
    notes.push(format!(
        "Negative Δp readings: policy `{}`.",
        match s.options.negative {
            NegativePolicy::Reject => "reject (a run with one is not computed)",
            NegativePolicy::Zero => "zero (counted as no flow)",
            NegativePolicy::Signed => "signed (reverse flow subtracts)",
        }
    ));
    notes.push(format!(
        "Layout: {} ({}).",
        method_words(layout),
        layout.source()
    ));
    let mut deviations: Vec<String> = Vec::new();
    for x in &excluded {
        deviations.push(format!("Run {x} is reported but left out of the average: its post-run leak check failed or was not recorded."));
    }
    for f in &findings {
        if let Some(set) = &f.setting {
            deviations.push(format!("Check {}: {set}.", f.id));
        }
    }
    for r in [&e.plane.advice.epa_method_1, &e.plane.advice.en_15259] {
        if !r.confirmed
            && ((r.framework == "EPA Method 1" && s.convention == ConventionId::EpaMethod2)
                || (r.framework == "EN 15259" && s.convention == ConventionId::Iso16911))
        {
            deviations.push(format!("The {} point-count step used is quoted from memory and not yet confirmed against the published text: {}", r.framework, r.basis));
        }
    }

    let sys_paper = if u.sys == UnitSystem::Us {
        Paper::UsLetter
    } else {
        Paper::A4
    };
    ReportData {
        header: Header {
            title: s.title.clone(),
            client: s.client.clone().unwrap_or_default(),
            site: s.site.clone().unwrap_or_default(),
            plane_location: s.plane.clone().unwrap_or_default(),
            test_date: s.date.to_string(),
            report_id: id.report_id.clone(),
            content_sha256: id.content_sha256.clone(),
            signer_key_fingerprint: id.signer_key_fingerprint.clone(),
            software: format!("annulus {}", env!("CARGO_PKG_VERSION")),
            paper: sys_paper,
        },
        units: u.model(),
        conditions: Conditions {
            convention: convention_name(e),
            convention_id: c.id.name().to_string(),
            reference_temperature: Quantity::new("Reference temperature", tref, format!("{} K", fixed(c.reference_temperature_k, 2))),
            reference_pressure: Quantity::new("Reference pressure", pref, format!("{} Pa", grouped(c.reference_pressure_pa, 0))),
            basis: basis.to_string(),
            statement: format!(
                "Standard flows are stated at {} K and {} Pa, {} basis{}.",
                fixed(c.reference_temperature_k, 2),
                grouped(c.reference_pressure_pa, 0),
                basis,
                if c.overridden { ", as set in the survey" } else { "" }
            ),
            gas,
        },
        summary: Summary {
            verdict,
            verdict_text,
            headline,
            design,
            basis_text,
        },
        results: ResultsTable { columns, rows },
        plane,
        runs,
        checks,
        uncertainty,
        instruments,
        notes,
        deviations,
        safety: standard_safety_cautions(),
        signoff: SignOff {
            tested_by: s.signoff.tested_by.clone().unwrap_or_default(),
            certificate: s.signoff.certificate.clone().unwrap_or_default(),
            tested_date: s.date.to_string(),
            reviewed_by: s.signoff.reviewed_by.clone().unwrap_or_default(),
            reviewed_date: String::new(),
            organisation: String::new(),
            statement: "I confirm that this test was carried out and its data recorded as described, and that the \
                        results were computed from the attached readings by the method stated."
                .into(),
        },
    }
}

fn press(u: &Units, pa: f64, absolute: bool) -> String {
    if u.sys == UnitSystem::Us {
        if absolute {
            format!("{} inHg", fixed(to_unit(pa, "inHg"), 2))
        } else {
            format!("{} inH₂O", fixed(to_unit(pa, "inH2O"), 2))
        }
    } else if absolute {
        format!("{} kPa", fixed(pa / 1000.0, 2))
    } else {
        format!("{} Pa", fixed(pa, 0))
    }
}

fn mark_step(sys: UnitSystem) -> MarkStep {
    match sys {
        UnitSystem::Us => MarkStep::EIGHTH_INCH,
        UnitSystem::Si => MarkStep::MILLIMETRE,
    }
}

fn plane_model(
    s: &Survey,
    layout: &Layout,
    marks: &[ProbeMark],
    u: &Units,
    e: &Evaluation,
) -> Plane {
    plane_model_for(
        layout,
        marks,
        u.len,
        u.len_dec,
        s.port_length_m,
        s.upstream_d,
        s.downstream_d,
        s.convention,
        e.plane.required_points,
        Some(s),
    )
}

#[allow(clippy::too_many_arguments)]
fn plane_model_for(
    layout: &Layout,
    marks: &[ProbeMark],
    len: &'static str,
    len_dec: usize,
    port_length_m: f64,
    upstream_d: Option<f64>,
    downstream_d: Option<f64>,
    convention: ConventionId,
    required: Option<usize>,
    survey: Option<&Survey>,
) -> Plane {
    let l = |m: f64| format!("{} {len}", fixed(to_unit(m, len), len_dec));
    let duct = layout.duct();
    let (shape, description, mut dims) = match duct.shape() {
        GShape::Round { diameter_m } => (
            Shape::Round { diameter_m },
            format!("Round duct, {} inside diameter", l(diameter_m)),
            vec![Quantity::new(
                "Inside diameter",
                l(diameter_m),
                format!("{} m", fixed(diameter_m, 3)),
            )],
        ),
        GShape::Rectangular { width_m, height_m } => (
            Shape::Rectangular { width_m, height_m },
            format!(
                "Rectangular duct, {} × {} inside (ports in the {} side)",
                l(width_m),
                l(height_m),
                l(width_m)
            ),
            vec![
                Quantity::new(
                    "Inside width (port side)",
                    l(width_m),
                    format!("{} m", fixed(width_m, 3)),
                ),
                Quantity::new(
                    "Inside height",
                    l(height_m),
                    format!("{} m", fixed(height_m, 3)),
                ),
                Quantity::new(
                    "Equivalent diameter",
                    l(duct.equivalent_diameter_m()),
                    format!("{} m", fixed(duct.equivalent_diameter_m(), 3)),
                ),
            ],
        ),
    };
    let area = duct.area_m2();
    dims.push(Quantity::new(
        "Area",
        format!("{} ft²", fixed(area / (0.3048 * 0.3048), 3)),
        format!("{} m²", fixed(area, 4)),
    ));
    dims.push(Quantity::new(
        "Port length (nipple + wall)",
        l(port_length_m),
        "",
    ));
    if let Some(s) = survey {
        if s.liner_m > 0.0 {
            dims.push(Quantity::new("Liner (subtracted twice)", l(s.liner_m), ""));
        }
        dims.push(Quantity::new(
            "Construction",
            match s.construction {
                crate::survey::Construction::Steel => "steel (or other non-brick)",
                crate::survey::Construction::Brick => "brick and mortar",
            },
            "",
        ));
    }
    let (up_req, down_req, pref_up, pref_down, min_up, min_down) = match convention {
        ConventionId::EpaMethod2 => (
            "≥ 8 D preferred, ≥ 2 D minimum (EPA Method 1)",
            "≥ 2 D preferred, ≥ 0.5 D minimum",
            8.0,
            2.0,
            2.0,
            0.5,
        ),
        ConventionId::Iso16911 => (
            "≥ 5 D (EN 15259, from memory)",
            "≥ 2 D (EN 15259, from memory)",
            5.0,
            2.0,
            5.0,
            2.0,
        ),
        _ => (
            "≥ 7.5 D preferred, ≥ 2 D possible (HVAC practice)",
            "≥ 3 D preferred, ≥ 1 D possible",
            7.5,
            3.0,
            2.0,
            1.0,
        ),
    };
    let rate = |v: Option<f64>, pref: f64, min: f64| match v {
        None => Status::NotApplicable,
        Some(x) if x >= pref => Status::Pass,
        Some(x) if x >= min => Status::Warn,
        Some(_) => Status::Fail,
    };
    let straight_runs = vec![
        StraightRun {
            label: "Upstream (disturbance to plane)".into(),
            value: upstream_d
                .map(|d| format!("{} D", fixed(d, 1)))
                .unwrap_or_else(|| "not given".into()),
            requirement: up_req.into(),
            status: rate(upstream_d, pref_up, min_up),
        },
        StraightRun {
            label: "Downstream (plane to disturbance or exit)".into(),
            value: downstream_d
                .map(|d| format!("{} D", fixed(d, 1)))
                .unwrap_or_else(|| "not given".into()),
            requirement: down_req.into(),
            status: rate(downstream_d, pref_down, min_down),
        },
    ];
    let lines = (0..layout.lines())
        .map(|li| {
            let pts: Vec<(&crate::layout::Point, &ProbeMark)> = layout
                .points()
                .iter()
                .zip(marks)
                .filter(|(p, _)| p.line_index == li)
                .collect();
            let first = pts[0].0;
            let (orientation, orientation_text) = match (first.line_angle_deg, first.line_offset_m)
            {
                (Some(a), _) => (LineOrientation::AngleDeg(a), format!("{}°", fixed(a, 0))),
                (_, Some(o)) => (
                    LineOrientation::OffsetM(o),
                    format!("{} from the left wall", l(o)),
                ),
                _ => (LineOrientation::AngleDeg(0.0), "0°".into()),
            };
            TraverseLine {
                name: first.line.clone(),
                port: format!("Port {}", first.line),
                orientation,
                orientation_text,
                length: l(duct.line_length_m()),
                points: pts
                    .iter()
                    .map(|(p, m)| PointPosition {
                        point: p.point as u32,
                        position_m: p.position_m,
                        position: l(p.position_m),
                        fraction: format!("{} %", fixed(p.fraction * 100.0, 1)),
                        insertion: format!(
                            "{} {len}",
                            fixed(to_unit(m.mark_m, len), if len == "in" { 3 } else { 0 })
                        ),
                        adjusted: p.adjusted,
                    })
                    .collect(),
            }
        })
        .collect();
    let total = layout.total_points();
    let (points_required, point_count_status) = match required {
        Some(n) if total >= n => (format!("{n} ({})", convention.name()), Status::Pass),
        Some(n) => (
            format!("{n} ({}) — too few", convention.name()),
            Status::Fail,
        ),
        None => ("not set by the rule book".into(), Status::NotApplicable),
    };
    Plane {
        shape,
        description,
        dimensions: dims,
        method: method_words(layout),
        method_source: layout.source().to_string(),
        point_count: format!(
            "{total} ({} lines × {})",
            layout.lines(),
            layout.points_per_line()
        ),
        points_required,
        point_count_status,
        straight_runs,
        lines,
    }
}

/// The blank field data sheet for a plane.
#[allow(clippy::too_many_arguments)]
pub fn field_sheet_data(
    layout: &Layout,
    marks: &[ProbeMark],
    convention: ConventionId,
    port_length_m: f64,
    upstream_d: Option<f64>,
    downstream_d: Option<f64>,
    required: Option<usize>,
    title: &str,
) -> FieldSheetData {
    let sys = convention.unit_system();
    let (len, len_dec) = if sys == UnitSystem::Us {
        ("in", 2)
    } else {
        ("mm", 0)
    };
    let plane = plane_model_for(
        layout,
        marks,
        len,
        len_dec,
        port_length_m,
        upstream_d,
        downstream_d,
        convention,
        required,
        None,
    );
    let shown = ResultUnits::for_convention(&crate::flow::Convention::new(
        convention,
        EpaForm::English,
        None,
    ));
    FieldSheetData {
        title: title.to_string(),
        site: String::new(),
        plane_location: String::new(),
        plane,
        units: DisplayUnits {
            length: len.to_string(),
            length_per_m: to_unit(1.0, len),
            length_decimals: if len == "in" { 1 } else { 0 },
            velocity: shown.velocity.unit.to_string(),
            velocity_per_m_s: shown.velocity.per_si,
            velocity_decimals: 1,
            dp: if sys == UnitSystem::Us {
                "inH2O".into()
            } else {
                "Pa".into()
            },
            temperature: if sys == UnitSystem::Us {
                "°F".into()
            } else {
                "°C".into()
            },
        },
        fields: SheetFields::default(),
        yaw_column: !convention.is_hvac(),
        paper: if sys == UnitSystem::Us {
            Paper::UsLetter
        } else {
            Paper::A4
        },
        software: format!("annulus {}", env!("CARGO_PKG_VERSION")),
    }
}
