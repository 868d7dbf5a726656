//! Demo scenarios for the presentation model: invented sites, people and readings.
//!
//! Owns [`ReportData::demo`] (a round stack, 2 lines × 12 points, 3 runs, EPA Method 2 in
//! inch-pound units), [`ReportData::demo_rectangular`] (an HVAC supply duct, log-Tchebycheff 5 × 5,
//! 2 runs with a negative reading) and [`FieldSheetData::demo`]. Tests and template previews use
//! them.
//!
//! Must not stand in for the calculation modules: the few formulas here only make the invented
//! readings and results agree with each other so that the report reads plausibly. Every name, site
//! and certificate below is fictional.

use super::format::{fixed, grouped};
use super::model::*;

/// EPA Method 2 pitot constant Kp, ft/s·[(lb/lb-mol)(inHg)/((°R)(inH2O))]^½ (EPA Method 2, Eq.
/// 2-7).
const KP_FT_S: f64 = 85.49;
/// Inches of water per inch of mercury used by EPA Method 2 for `Ps = Pbar + Pg/13.6`.
const INH2O_PER_INHG: f64 = 13.6;
/// Universal gas constant, inHg·ft³/(lb-mol·°R) (EPA Method 5 value, 21.85).
const R_INHG_FT3: f64 = 21.85;
const M_PER_FT: f64 = 0.3048;
const M3_S_PER_CFM: f64 = 0.000_471_947_443_2;
const KG_S_PER_LB_H: f64 = 0.453_592_37 / 3600.0;
const M_PER_IN: f64 = 0.0254;

fn q(label: &str, value: String, si: String) -> Quantity {
    Quantity::new(label, value, si)
}

fn mean(values: &[f64]) -> f64 {
    if values.is_empty() {
        0.0
    } else {
        values.iter().sum::<f64>() / values.len() as f64
    }
}

fn inch_units(velocity: &str, velocity_per_m_s: f64, velocity_decimals: usize) -> DisplayUnits {
    DisplayUnits {
        length: "in".into(),
        length_per_m: 1.0 / M_PER_IN,
        length_decimals: 2,
        velocity: velocity.into(),
        velocity_per_m_s,
        velocity_decimals,
        dp: "inH2O".into(),
        temperature: "°F".into(),
    }
}

fn result_row(label: &str, unit: &str, values: &[f64], decimals: usize) -> ResultRow {
    ResultRow {
        label: label.into(),
        unit: unit.into(),
        values: values.iter().map(|v| grouped(*v, decimals)).collect(),
        si_unit: String::new(),
        si_values: Vec::new(),
    }
}

fn result_row_si(
    label: &str,
    unit: &str,
    values: &[f64],
    decimals: usize,
    si_unit: &str,
    si_factor: f64,
    si_decimals: usize,
) -> ResultRow {
    ResultRow {
        si_unit: si_unit.into(),
        si_values: values
            .iter()
            .map(|v| grouped(v * si_factor, si_decimals))
            .collect(),
        ..result_row(label, unit, values, decimals)
    }
}

/// Equal-area positions on a diameter as fractions of D (EPA Method 1 §11.2, centroids of
/// equal-area annuli: r_i/R = sqrt((2i − 1)/(2n)) for n rings), near wall first.
fn equal_area_fractions(points_per_diameter: usize) -> Vec<f64> {
    let n = points_per_diameter / 2;
    let mut near: Vec<f64> = (1..=n)
        .rev()
        .map(|i| (1.0 - ((2 * i - 1) as f64 / (2 * n) as f64).sqrt()) / 2.0)
        .collect();
    let far: Vec<f64> = near.iter().rev().map(|x| 1.0 - x).collect();
    near.extend(far);
    near
}

fn sheet_units() -> DisplayUnits {
    inch_units("ft/s", 1.0 / M_PER_FT, 1)
}

/// The round-stack plane of the demo: 40 in inside diameter, ports A (0°) and B (90°), 12
/// equal-area points per diameter, the 1 in wall rule of EPA Method 1 §11.3 moving the outermost
/// points.
fn round_plane() -> Plane {
    let d_in = 40.0;
    let port_in = 5.0;
    let wall_in = 1.0;
    let fractions = equal_area_fractions(12);
    let lines = [("A", "Port A (north)", 0.0), ("B", "Port B (east)", 90.0)]
        .iter()
        .map(|&(name, port, angle)| TraverseLine {
            name: name.into(),
            port: port.into(),
            orientation: LineOrientation::AngleDeg(angle),
            orientation_text: format!("{angle:.0}°"),
            length: format!("{d_in:.2} in"),
            points: fractions
                .iter()
                .enumerate()
                .map(|(i, f)| {
                    let raw = f * d_in;
                    let pos = raw.clamp(wall_in, d_in - wall_in);
                    PointPosition {
                        point: i as u32 + 1,
                        position_m: pos * M_PER_IN,
                        position: format!("{pos:.2} in"),
                        fraction: format!("{:.1} %", pos / d_in * 100.0),
                        insertion: format!("{:.2} in", pos + port_in),
                        adjusted: (pos - raw).abs() > 1e-9,
                    }
                })
                .collect(),
        })
        .collect();
    let area_ft2 = std::f64::consts::PI / 4.0 * (d_in / 12.0_f64).powi(2);
    Plane {
        shape: Shape::Round {
            diameter_m: d_in * M_PER_IN,
        },
        description: "Round stack, 40.00 in inside diameter, steel".into(),
        dimensions: vec![
            q(
                "Inside diameter",
                "40.00 in".into(),
                format!("{:.4} m", d_in * M_PER_IN),
            ),
            q(
                "Area",
                format!("{area_ft2:.4} ft²"),
                format!("{:.4} m²", area_ft2 * M_PER_FT * M_PER_FT),
            ),
            q(
                "Port length (nipple + wall)",
                "5.00 in".into(),
                "0.127 m".into(),
            ),
            q("Construction", "steel".into(), String::new()),
        ],
        method: "Equal-area (centroids of equal-area annuli)".into(),
        method_source: "EPA Method 1, Table 1-2; wall rule §11.3 (1.00 in)".into(),
        point_count: "24 (2 × 12)".into(),
        points_required: "24 (EPA Method 1, Figure 1-1, at 4.2 D / 2.4 D)".into(),
        point_count_status: Status::Pass,
        straight_runs: vec![
            StraightRun {
                label: "Upstream disturbance to plane".into(),
                value: "4.2 D (14.0 ft)".into(),
                requirement: "≥ 2 D minimum; ≥ 8 D preferred".into(),
                status: Status::Pass,
            },
            StraightRun {
                label: "Plane to stack exit".into(),
                value: "2.4 D (8.0 ft)".into(),
                requirement: "≥ 0.5 D minimum; ≥ 2 D preferred".into(),
                status: Status::Pass,
            },
        ],
        lines,
    }
}

/// The rectangular HVAC plane of the demo: 24 × 16 in, log-Tchebycheff 5 × 5 (ASHRAE Std 111-1988
/// Fig. D-10 fractions 0.074, 0.288, 0.500, 0.712, 0.926), ports in the 24 in side.
fn rect_plane() -> Plane {
    let (w_in, h_in, port_in) = (24.0, 16.0, 1.5);
    let fractions = [0.074, 0.288, 0.500, 0.712, 0.926];
    let lines = ["A", "B", "C", "D", "E"]
        .iter()
        .zip(fractions)
        .map(|(name, fx)| TraverseLine {
            name: name.to_string(),
            port: format!("Port {name} (top)"),
            orientation: LineOrientation::OffsetM(fx * w_in * M_PER_IN),
            orientation_text: format!("{:.2} in from the left wall", fx * w_in),
            length: format!("{h_in:.2} in"),
            points: fractions
                .iter()
                .enumerate()
                .map(|(i, fy)| {
                    let pos = fy * h_in;
                    PointPosition {
                        point: i as u32 + 1,
                        position_m: pos * M_PER_IN,
                        position: format!("{pos:.2} in"),
                        fraction: format!("{:.1} %", fy * 100.0),
                        insertion: format!("{:.2} in", pos + port_in),
                        adjusted: false,
                    }
                })
                .collect(),
        })
        .collect();
    Plane {
        shape: Shape::Rectangular {
            width_m: w_in * M_PER_IN,
            height_m: h_in * M_PER_IN,
        },
        description: "Rectangular supply duct, 24.00 × 16.00 in inside, galvanised steel".into(),
        dimensions: vec![
            q(
                "Inside width (port side)",
                "24.00 in".into(),
                "0.6096 m".into(),
            ),
            q("Inside height", "16.00 in".into(), "0.4064 m".into()),
            q("Area", "2.6667 ft²".into(), "0.2477 m²".into()),
            q("Port length", "1.50 in".into(), "0.038 m".into()),
        ],
        method: "Log-Tchebycheff, 5 × 5".into(),
        method_source: "ASHRAE Std 111-1988, Fig. D-10 (1997 errata)".into(),
        point_count: "25 (5 × 5)".into(),
        points_required: "25 (5 per side for a 24 in side)".into(),
        point_count_status: Status::Pass,
        straight_runs: vec![
            StraightRun {
                label: "Upstream elbow to plane".into(),
                value: "8.1 De (13.5 ft)".into(),
                requirement: "≥ 7.5 De preferred".into(),
                status: Status::Pass,
            },
            StraightRun {
                label: "Plane to downstream branch".into(),
                value: "3.2 De (5.3 ft)".into(),
                requirement: "≥ 3 De preferred".into(),
                status: Status::Pass,
            },
        ],
        lines,
    }
}

/// Invented Δp (inH2O) at a round-stack point: a 1/7-power profile with a mild skew toward 30°.
fn round_dp(plane: &Plane, angle_deg: f64, position_m: f64, run_factor: f64) -> f64 {
    let r_outer = plane.line_length_m() / 2.0;
    let r = (position_m - r_outer).abs() / r_outer;
    let side = if position_m < r_outer {
        angle_deg
    } else {
        angle_deg + 180.0
    };
    let shape = (1.0 - r).max(0.0).powf(1.0 / 7.0);
    let skew = 1.0 + 0.06 * r * (side - 30.0).to_radians().cos();
    let v = shape * skew * run_factor;
    (0.36 * v * v * 1000.0).round() / 1000.0
}

impl ReportData {
    /// A round stack (40 in, 2 lines × 12 points, 3 runs, EPA Method 2 in inch-pound units). All
    /// names are fictional; the results follow from the invented readings.
    pub fn demo() -> ReportData {
        let plane = round_plane();
        let units = inch_units("ft/s", 1.0 / M_PER_FT, 1);
        let cp = 0.84;
        let p_bar = 29.62;
        let p_static = -0.85;
        let p_s = p_bar + p_static / INH2O_PER_INHG;
        let (o2, co2, bws) = (8.1, 10.6, 0.098);
        let md = 0.44 * co2 + 0.32 * o2 + 0.28 * (100.0 - o2 - co2);
        let ms = md * (1.0 - bws) + 18.0 * bws;
        let area_ft2 = std::f64::consts::PI / 4.0 * (40.0_f64 / 12.0).powi(2);
        let run_setup = [
            ("1", "09:12", "09:48", 1.000, 351.0),
            ("2", "10:05", "10:41", 1.018, 353.0),
            ("3", "10:58", "11:34", 0.987, 352.0),
        ];
        let mut runs = Vec::new();
        let mut per_run = Vec::new();
        let (mut yaw_means, mut dp_means) = (Vec::new(), Vec::new());
        for (k, &(id, started, ended, factor, t_base)) in run_setup.iter().enumerate() {
            let mut readings = Vec::new();
            let mut field = Vec::new();
            let (mut sqrt_dps, mut temps_r, mut yaws) = (Vec::new(), Vec::new(), Vec::new());
            let mut dps = Vec::new();
            for (li, line) in plane.lines.iter().enumerate() {
                let LineOrientation::AngleDeg(angle) = line.orientation else {
                    continue;
                };
                for p in &line.points {
                    let dp = round_dp(&plane, angle, p.position_m, factor);
                    let t_f = t_base + ((p.point as usize * 7 + li * 3 + k) % 5) as f64 - 2.0;
                    let yaw = ((p.point as usize * 5 + li * 11 + k * 3) % 9) as f64 - 3.0;
                    let t_r = t_f + 460.0;
                    let v = KP_FT_S * cp * dp.sqrt() * (t_r / (p_s * ms)).sqrt();
                    sqrt_dps.push(dp.sqrt());
                    dps.push(dp);
                    temps_r.push(t_r);
                    yaws.push(yaw.abs());
                    readings.push(ReadingRow {
                        line: line.name.clone(),
                        point: p.point,
                        position: p.position.clone(),
                        dp: fixed(dp, 3),
                        temperature: fixed(t_f, 0),
                        yaw: fixed(yaw, 0),
                        velocity: fixed(v, 1),
                        adjusted: p.adjusted,
                        negative: false,
                        excluded: false,
                        note: if p.adjusted {
                            "moved to 1.00 in from the wall".into()
                        } else {
                            String::new()
                        },
                    });
                    let (x, y) = plane.point_xy(line.orientation, p.position_m);
                    field.push(FieldPoint {
                        line: line.name.clone(),
                        point: p.point,
                        position_m: p.position_m,
                        x_m: x,
                        y_m: y,
                        velocity_m_s: v * M_PER_FT,
                        excluded: false,
                    });
                }
            }
            // EPA Method 2, Eq. 2-7: mean of square roots and mean absolute temperature.
            let sqrt_dp = mean(&sqrt_dps);
            let t_s = mean(&temps_r);
            let vs = KP_FT_S * cp * sqrt_dp * (t_s / (p_s * ms)).sqrt();
            let acfm = vs * area_ft2 * 60.0;
            let scfm = acfm * (528.0 / t_s) * (p_s / 29.92);
            let dscfm = scfm * (1.0 - bws);
            let rho_lb_ft3 = p_s * ms / (R_INHG_FT3 * t_s);
            let lb_h = acfm * 60.0 * rho_lb_ft3;
            per_run.push([vs, t_s - 460.0, acfm, scfm, dscfm, lb_h]);
            yaw_means.push(mean(&yaws));
            dp_means.push(mean(&dps));
            runs.push(RunData {
                id: id.into(),
                label: format!("Run {id}"),
                started: format!("2026-10-14 {started}"),
                ended: format!("2026-10-14 {ended}"),
                leak_check: "before: pass · after: pass".into(),
                readings,
                summary: vec![
                    q(
                        "Mean √Δp",
                        format!("{} √inH2O", fixed(sqrt_dp, 4)),
                        String::new(),
                    ),
                    q(
                        "Mean stack temperature",
                        format!("{} °F", fixed(t_s - 460.0, 1)),
                        format!("{} °C", fixed((t_s - 460.0 - 32.0) / 1.8, 1)),
                    ),
                    q(
                        "Mean |yaw|",
                        format!("{}°", fixed(mean(&yaws), 1)),
                        String::new(),
                    ),
                    q(
                        "Stack gas velocity",
                        format!("{} ft/s", fixed(vs, 2)),
                        format!("{} m/s", fixed(vs * M_PER_FT, 3)),
                    ),
                ],
                field,
            });
        }
        let column = |i: usize| -> Vec<f64> {
            let mut v: Vec<f64> = per_run.iter().map(|r| r[i]).collect();
            v.push(mean(&v));
            v
        };
        let avg = |i: usize| column(i).last().copied().unwrap_or(0.0);
        let temperatures_c: Vec<f64> = column(1).iter().map(|t| (t - 32.0) / 1.8).collect();
        let mut temperature_row = result_row("Stack temperature", "°F", &column(1), 1);
        temperature_row.si_unit = "°C".into();
        temperature_row.si_values = temperatures_c.iter().map(|t| fixed(*t, 1)).collect();
        let dscfm_avg = avg(4);
        let yaw_text = yaw_means
            .iter()
            .map(|y| format!("{}°", fixed(*y, 1)))
            .collect::<Vec<_>>()
            .join(" / ");
        let min_dp = dp_means.iter().copied().fold(f64::INFINITY, f64::min);
        let spread = column(4)[..3]
            .iter()
            .map(|q| (q - dscfm_avg).abs() / dscfm_avg * 100.0)
            .fold(0.0, f64::max);
        let expanded_pct = 4.4;
        let results = ResultsTable {
            columns: vec![
                "Run 1".into(),
                "Run 2".into(),
                "Run 3".into(),
                "Average".into(),
            ],
            rows: vec![
                result_row_si(
                    "Stack gas velocity",
                    "ft/s",
                    &column(0),
                    2,
                    "m/s",
                    M_PER_FT,
                    3,
                ),
                temperature_row,
                result_row_si(
                    "Actual flow",
                    "acfm",
                    &column(2),
                    0,
                    "m³/s",
                    M3_S_PER_CFM,
                    3,
                ),
                result_row_si(
                    "Wet standard flow",
                    "scfm",
                    &column(3),
                    0,
                    "m³/s",
                    M3_S_PER_CFM,
                    3,
                ),
                result_row_si(
                    "Dry standard flow",
                    "dscfm",
                    &column(4),
                    0,
                    "m³/s",
                    M3_S_PER_CFM,
                    3,
                ),
                result_row_si(
                    "Mass flow (wet)",
                    "lb/h",
                    &column(5),
                    0,
                    "kg/s",
                    KG_S_PER_LB_H,
                    3,
                ),
                result_row("Moisture", "% v/v", &[9.8, 9.8, 9.8, 9.8], 1),
                result_row(
                    "Expanded uncertainty (k = 2.02)",
                    "%",
                    &[expanded_pct; 4],
                    1,
                ),
            ],
        };
        let fingerprint = "9f3c2a7b01de4c58a6b7e2f0d13c9a4e5b6f708192a3b4c5d6e7f8091a2b3c4d";
        ReportData {
            header: Header {
                title: "Boiler 2 stack — annual flow test".into(),
                client: "Corvale Paperboard Co. (fictional)".into(),
                site: "Corvale mill, boiler house".into(),
                plane_location: "Boiler 2 stack, sampling platform at 62 ft, ports A (north) and B (east)"
                    .into(),
                test_date: "2026-10-14".into(),
                report_id: "AN-9F3C-2A7B".into(),
                content_sha256: fingerprint.into(),
                signer_key_fingerprint: Some(
                    "ed25519:4be1 07c2 9a5d e330 1f6b 8c24 d9e7 0a51".into(),
                ),
                software: format!("annulus {}", env!("CARGO_PKG_VERSION")),
                paper: Paper::UsLetter,
            },
            units,
            conditions: Conditions {
                convention: "EPA Method 2 (inch-pound)".into(),
                convention_id: "epa-method-2".into(),
                reference_temperature: q("Reference temperature", "68 °F".into(), "293.15 K".into()),
                reference_pressure: q("Reference pressure", "29.92 inHg".into(), "101.32 kPa".into()),
                basis: "dry".into(),
                statement: "Standard flows are at 68 °F and 29.92 inHg; dscfm is on a dry basis, scfm \
                            wet. Velocities and actual flows are at stack conditions."
                    .into(),
                gas: vec![
                    q("Barometric pressure", "29.62 inHg".into(), "100.30 kPa".into()),
                    q("Static pressure", "−0.85 inH2O".into(), "−212 Pa".into()),
                    q(
                        "Absolute stack pressure",
                        format!("{} inHg", fixed(p_s, 3)),
                        format!("{} kPa", fixed(p_s * 3.386_389, 2)),
                    ),
                    q("O2 / CO2 / CO (dry)", "8.1 / 10.6 / 0 %".into(), String::new()),
                    q("Moisture (EPA Method 4)", "9.8 % v/v".into(), String::new()),
                    q(
                        "Dry / wet molar mass",
                        format!("{} / {} lb/lb-mol", fixed(md, 2), fixed(ms, 2)),
                        format!("{} / {} g/mol", fixed(md, 2), fixed(ms, 2)),
                    ),
                    q("Pitot coefficient Cp", "0.84 (Type S)".into(), String::new()),
                ],
            },
            summary: Summary {
                verdict: Status::Pass,
                verdict_text: "All 10 acceptance checks pass. Four points were moved to the 1.00 in \
                               wall limit (EPA Method 1 §11.3)."
                    .into(),
                headline: vec![
                    q(
                        "Dry standard flow",
                        format!("{} dscfm", grouped(dscfm_avg, 0)),
                        format!("{} m³/s", fixed(dscfm_avg * M3_S_PER_CFM, 3)),
                    ),
                    q(
                        "Actual flow",
                        format!("{} acfm", grouped(avg(2), 0)),
                        format!("{} m³/s", fixed(avg(2) * M3_S_PER_CFM, 3)),
                    ),
                    q(
                        "Stack gas velocity",
                        format!("{} ft/s", fixed(avg(0), 2)),
                        format!("{} m/s", fixed(avg(0) * M_PER_FT, 3)),
                    ),
                    q(
                        "Expanded uncertainty",
                        format!("±{expanded_pct:.1} %"),
                        "k = 2.02, about 95 %".into(),
                    ),
                ],
                design: None,
                basis_text: "Average of runs 1–3".into(),
            },
            results,
            plane,
            runs,
            checks: vec![
                check(
                    "Site",
                    "site.min-diameter",
                    Status::Pass,
                    "40.00 in",
                    "≥ 12.00 in",
                    "EPA Method 1 (applicability)",
                    "Stack is large enough for Method 1 points.",
                ),
                check(
                    "Site",
                    "site.straight-run",
                    Status::Pass,
                    "4.2 D / 2.4 D",
                    "≥ 2 D / ≥ 0.5 D",
                    "EPA Method 1 §11.1",
                    "Plane meets the minimum distances; Figure 1-1 sets the point count.",
                ),
                check(
                    "Site",
                    "site.point-count",
                    Status::Pass,
                    "24",
                    "≥ 24",
                    "EPA Method 1, Figure 1-1",
                    "Point count meets the requirement for these distances.",
                ),
                check(
                    "Site",
                    "site.wall-rule",
                    Status::Pass,
                    "4 points moved",
                    "≥ 1.00 in from the wall",
                    "EPA Method 1 §11.3",
                    "A1, A12, B1 and B12 moved to 1.00 in from the wall.",
                ),
                check(
                    "Flow",
                    "flow.cyclonic",
                    Status::Pass,
                    &yaw_text,
                    "mean |yaw| ≤ 20°",
                    "EPA Method 1 §11.4",
                    "No cyclonic flow in any run.",
                ),
                check(
                    "Traverse",
                    "traverse.gauge-sensitivity",
                    Status::Pass,
                    &format!("min mean Δp {} inH2O", fixed(min_dp, 2)),
                    "≥ 0.05 inH2O",
                    "EPA Method 2 §8.1",
                    "Gauge resolution is adequate.",
                ),
                check(
                    "Traverse",
                    "traverse.negative",
                    Status::Pass,
                    "0 of 72",
                    "none",
                    "common practice",
                    "No negative or zero readings.",
                ),
                check(
                    "Traverse",
                    "traverse.distribution",
                    Status::Pass,
                    "100 %",
                    "> 75 % above 1/10 of max",
                    "AMCA Publication 203",
                    "Readings are well distributed.",
                ),
                check(
                    "Equipment",
                    "equipment.leak-check",
                    Status::Pass,
                    "6 of 6 pass",
                    "pass before and after each run",
                    "EPA Method 2 §8.1",
                    "Pitot lines held before and after every run.",
                ),
                check(
                    "Results",
                    "results.run-agreement",
                    Status::Pass,
                    &format!("max {} %", fixed(spread, 1)),
                    "≤ 5 % from the average",
                    "common practice",
                    "Runs agree.",
                ),
            ],
            uncertainty: UncertaintyBudget {
                applies_to: "Dry standard flow, average of runs 1–3".into(),
                spatial_method: "scatter of point velocities, s/(√n·v̄), ν = n − 1".into(),
                rows: budget_rows(&[
                    ("Pitot coefficient Cp", "1.00", "1", "50", "21.1"),
                    ("Differential pressure (gauge)", "1.00", "0.5", "∞", "5.3"),
                    ("Gas temperature", "0.40", "0.5", "∞", "0.8"),
                    ("Barometric pressure", "0.10", "−0.5", "∞", "0.1"),
                    ("Static pressure", "0.05", "−0.5", "∞", "< 0.1"),
                    ("Molar mass (composition, moisture)", "0.60", "−0.5", "20", "1.9"),
                    ("Duct area", "0.50", "1", "∞", "5.3"),
                    ("Probe positioning", "0.50", "1", "∞", "5.3"),
                    ("Spatial integration", "1.40", "1", "23", "41.4"),
                    ("Temporal variation (between runs)", "0.90", "1", "2", "17.1"),
                    ("Wall effect", "0.29", "1", "∞", "1.8"),
                ]),
                combined: "2.18 %".into(),
                effective_dof: "43.5".into(),
                coverage_factor: "2.02".into(),
                expanded: format!("±{expanded_pct:.1} %"),
                expanded_absolute: format!(
                    "±{} dscfm (±{} m³/s)",
                    grouped(dscfm_avg * expanded_pct / 100.0, 0),
                    fixed(dscfm_avg * expanded_pct / 100.0 * M3_S_PER_CFM, 3)
                ),
                note: "Coverage factor from Student's t at 97.5 % for ν_eff (Welch–Satterthwaite): \
                       about 95 % coverage (JCGM 100:2008)."
                    .into(),
            },
            instruments: vec![
                InstrumentRow {
                    name: "Type S pitot tube, 5 ft".into(),
                    identifier: "PT-0417".into(),
                    detail: "Cp 0.84 (A 0.842, B 0.838)".into(),
                    calibrated: "2026-05-11".into(),
                    due: "2026-11-11".into(),
                    reference: "calibration sheet CAL-26-0117 (EPA Method 2 §10.1)".into(),
                },
                InstrumentRow {
                    name: "Electronic micromanometer".into(),
                    identifier: "MM-2209".into(),
                    detail: "0–10 inH2O, resolution 0.001 inH2O".into(),
                    calibrated: "2026-08-02".into(),
                    due: "2027-08-02".into(),
                    reference: "certificate 26-4471".into(),
                },
                InstrumentRow {
                    name: "Type K thermocouple and readout".into(),
                    identifier: "TC-0031 / TR-0120".into(),
                    detail: "0–1000 °F, ±2 °F".into(),
                    calibrated: "2026-07-19".into(),
                    due: "2027-01-19".into(),
                    reference: "certificate 26-3920".into(),
                },
                InstrumentRow {
                    name: "Aneroid barometer".into(),
                    identifier: "BA-0007".into(),
                    detail: "±0.01 inHg".into(),
                    calibrated: "2026-09-30".into(),
                    due: "2027-03-30".into(),
                    reference: "checked against station barometer".into(),
                },
            ],
            notes: vec![
                "Boiler 2 held at 92 % of rated steam load during all runs (operator log).".into(),
                "Moisture from a concurrent EPA Method 4 train (2 runs averaged).".into(),
            ],
            deviations: vec![
                "None. The plane is short of the preferred 8 D / 2 D; the point count was raised to 24 \
                 as Figure 1-1 requires."
                    .into(),
            ],
            safety: standard_safety_cautions(),
            signoff: SignOff {
                tested_by: "Mira Taskovic".into(),
                certificate: "Field certificate DEMO-0417".into(),
                tested_date: "2026-10-14".into(),
                reviewed_by: "Ilse Brandvold".into(),
                reviewed_date: "2026-10-16".into(),
                organisation: "Larchmere Field Testing (fictional)".into(),
                statement: "The measurements in this report were made as described and the results \
                            follow from the recorded data, which are embedded in this file."
                    .into(),
            },
        }
    }

    /// An HVAC supply duct (24 × 16 in, log-Tchebycheff 5 × 5, `hvac-ip`), two runs, the second
    /// with a negative reading that is excluded, so the verdict is a failure. All names are
    /// fictional.
    pub fn demo_rectangular() -> ReportData {
        let plane = rect_plane();
        // Velocity-pressure rows of the worked check in calculations.md §8 (HVAC rectangular, 5 ×
        // 5), one row per line; run 2 is invented from it.
        let vp1: [[f64; 5]; 5] = [
            [0.18, 0.22, 0.24, 0.22, 0.17],
            [0.22, 0.28, 0.31, 0.28, 0.21],
            [0.24, 0.30, 0.33, 0.30, 0.23],
            [0.22, 0.27, 0.30, 0.27, 0.21],
            [0.17, 0.21, 0.23, 0.21, 0.16],
        ];
        let mut vp2 = vp1;
        for row in vp2.iter_mut() {
            for v in row.iter_mut() {
                *v = (*v * 0.96 * 100.0).round() / 100.0;
            }
        }
        vp2[4][4] = -0.01;
        let p_bar = 29.42;
        let t_f = 85.0;
        // Dry-air density shortcut ρ = 1.325·Pb/T (calculations.md §2, derived).
        let rho = 1.325 * p_bar / (t_f + 459.67);
        let area_ft2 = 24.0 * 16.0 / 144.0;
        let design_cfm = 5000.0;
        let mut runs = Vec::new();
        let mut per_run = Vec::new();
        for (k, vp) in [vp1, vp2].iter().enumerate() {
            let id = (k + 1).to_string();
            let mut readings = Vec::new();
            let mut field = Vec::new();
            let mut sqrt_vps = Vec::new();
            for (li, line) in plane.lines.iter().enumerate() {
                for (pi, p) in line.points.iter().enumerate() {
                    let dp = vp[li][pi];
                    let negative = dp < 0.0;
                    let v_fpm = 1096.2 * (dp.abs() / rho).sqrt() * dp.signum();
                    if !negative {
                        sqrt_vps.push(dp.sqrt());
                    }
                    readings.push(ReadingRow {
                        line: line.name.clone(),
                        point: p.point,
                        position: p.position.clone(),
                        dp: fixed(dp, 2),
                        temperature: fixed(t_f, 0),
                        yaw: "—".into(),
                        velocity: grouped(v_fpm, 0),
                        adjusted: false,
                        negative,
                        excluded: negative,
                        note: if negative {
                            "negative Δp; excluded from the average".into()
                        } else {
                            String::new()
                        },
                    });
                    let (x, y) = plane.point_xy(line.orientation, p.position_m);
                    field.push(FieldPoint {
                        line: line.name.clone(),
                        point: p.point,
                        position_m: p.position_m,
                        x_m: x,
                        y_m: y,
                        velocity_m_s: v_fpm * M_PER_FT / 60.0,
                        excluded: negative,
                    });
                }
            }
            let v = 1096.2 * mean(&sqrt_vps) / rho.sqrt();
            let acfm = v * area_ft2;
            let scfm = acfm * rho / 0.075;
            per_run.push([v, acfm, scfm, acfm / design_cfm * 100.0]);
            runs.push(RunData {
                id: id.clone(),
                label: format!("Run {id}"),
                started: format!("2026-03-03 {}", ["14:05", "14:40"][k]),
                ended: format!("2026-03-03 {}", ["14:25", "15:02"][k]),
                leak_check: "not applicable (electronic manometer, zeroed)".into(),
                readings,
                summary: vec![
                    q(
                        "Mean √VP (valid points)",
                        format!("{} √inH2O", fixed(mean(&sqrt_vps), 6)),
                        String::new(),
                    ),
                    q(
                        "Air density",
                        format!("{} lb/ft³", fixed(rho, 6)),
                        format!("{} kg/m³", fixed(rho * 16.018_463, 4)),
                    ),
                    q(
                        "Mean velocity",
                        format!("{} fpm", grouped(v, 1)),
                        format!("{} m/s", fixed(v * M_PER_FT / 60.0, 3)),
                    ),
                ],
                field,
            });
        }
        let column = |i: usize| -> Vec<f64> {
            let mut v: Vec<f64> = per_run.iter().map(|r| r[i]).collect();
            v.push(mean(&v));
            v
        };
        let avg = |i: usize| column(i).last().copied().unwrap_or(0.0);
        let results = ResultsTable {
            columns: vec!["Run 1".into(), "Run 2".into(), "Average".into()],
            rows: vec![
                result_row_si(
                    "Mean velocity",
                    "fpm",
                    &column(0),
                    1,
                    "m/s",
                    M_PER_FT / 60.0,
                    3,
                ),
                result_row_si("Actual flow", "cfm", &column(1), 1, "m³/s", M3_S_PER_CFM, 4),
                result_row_si(
                    "Standard-air flow",
                    "scfm",
                    &column(2),
                    1,
                    "m³/s",
                    M3_S_PER_CFM,
                    4,
                ),
                result_row("Percent of design", "%", &column(3), 1),
                result_row("Expanded uncertainty (k = 2.06)", "%", &[8.2; 3], 1),
            ],
        };
        ReportData {
            header: Header {
                title: "AHU-3 supply duct — air balance verification".into(),
                client: "Brightwater Municipal Library (fictional)".into(),
                site: "Brightwater library, mechanical room 2".into(),
                plane_location: "AHU-3 main supply, level 2 ceiling, 13.5 ft after the first elbow".into(),
                test_date: "2026-03-03".into(),
                report_id: "AN-41D0-77C2".into(),
                content_sha256: "41d077c2a9e05b3f18c6d4e2b7a90f1325c8e6d4a1b3f507e92c4d6b8a0f1e37"
                    .into(),
                signer_key_fingerprint: None,
                software: format!("annulus {}", env!("CARGO_PKG_VERSION")),
                paper: Paper::UsLetter,
            },
            units: inch_units("fpm", 60.0 / M_PER_FT, 0),
            conditions: Conditions {
                convention: "HVAC inch-pound (standard air)".into(),
                convention_id: "hvac-ip".into(),
                reference_temperature: q(
                    "Reference temperature",
                    "70 °F (nominal)".into(),
                    "294.26 K".into(),
                ),
                reference_pressure: q(
                    "Reference pressure",
                    "29.92 inHg (nominal)".into(),
                    "101.32 kPa".into(),
                ),
                basis: "dry".into(),
                statement: "Standard-air flow is actual flow scaled to a density of 0.075 lb/ft³ \
                            (1.2 kg/m³), dry air."
                    .into(),
                gas: vec![
                    q("Barometric pressure", "29.42 inHg".into(), "99.63 kPa".into()),
                    q("Air temperature", "85 °F".into(), "29.4 °C".into()),
                    q("Moisture", "dry air assumed".into(), String::new()),
                    q(
                        "Air density (1.325·Pb/T)",
                        format!("{} lb/ft³", fixed(rho, 6)),
                        format!("{} kg/m³", fixed(rho * 16.018_463, 4)),
                    ),
                    q("Pitot tube", "standard (C = 1.00)".into(), String::new()),
                ],
            },
            summary: Summary {
                verdict: Status::Fail,
                verdict_text: "1 of 7 checks fails: run 2 has a negative velocity pressure at E5 \
                               (excluded from its average)."
                    .into(),
                headline: vec![
                    q(
                        "Actual flow",
                        format!("{} cfm", grouped(avg(1), 0)),
                        format!("{} m³/s", fixed(avg(1) * M3_S_PER_CFM, 3)),
                    ),
                    q(
                        "Standard-air flow",
                        format!("{} scfm", grouped(avg(2), 0)),
                        format!("{} m³/s", fixed(avg(2) * M3_S_PER_CFM, 3)),
                    ),
                    q(
                        "Percent of design",
                        format!("{} %", fixed(avg(3), 1)),
                        "design 5,000 cfm".into(),
                    ),
                    q("Expanded uncertainty", "±8.2 %".into(), "k = 2.06, about 95 %".into()),
                ],
                design: Some(Design {
                    flow: q("Design flow", "5,000 cfm".into(), "2.360 m³/s".into()),
                    percent: format!("{} %", fixed(avg(3), 1)),
                }),
                basis_text: "Average of runs 1–2".into(),
            },
            results,
            plane,
            runs,
            checks: vec![
                check(
                    "Site",
                    "site.straight-run",
                    Status::Pass,
                    "8.1 De / 3.2 De",
                    "≥ 7.5 De / ≥ 3 De",
                    "TAB practice (preferred distances)",
                    "Plane is in a good location.",
                ),
                check(
                    "Site",
                    "site.point-spacing",
                    Status::Pass,
                    "4.8 in max",
                    "≤ 6 in",
                    "TAB practice",
                    "Points are close enough.",
                ),
                check(
                    "Site",
                    "site.point-count",
                    Status::Pass,
                    "25",
                    "≥ 25 for 5 per side",
                    "ASHRAE Std 111-1988 Fig. D-10",
                    "Point count follows the log-Tchebycheff rule.",
                ),
                check(
                    "Traverse",
                    "traverse.distribution",
                    Status::Pass,
                    "25/25, 24/25",
                    "> 75 % above 1/10 of max",
                    "AMCA Publication 203",
                    "Readings are well distributed.",
                ),
                check(
                    "Traverse",
                    "traverse.negative",
                    Status::Fail,
                    "1 (run 2, E5)",
                    "none",
                    "TAB procedures",
                    "Negative velocity pressure at run 2, line E point 5; excluded from the average.",
                ),
                check(
                    "Traverse",
                    "traverse.gauge-sensitivity",
                    Status::Pass,
                    "min 0.16 inH2O",
                    "≥ 0.05 inH2O (valid points)",
                    "EPA Method 2 §8.1 (by analogy)",
                    "Gauge resolution is adequate.",
                ),
                check(
                    "Results",
                    "results.run-agreement",
                    Status::NotApplicable,
                    "2 runs",
                    "≥ 3 runs",
                    "common practice",
                    "Too few runs to judge agreement.",
                ),
            ],
            uncertainty: UncertaintyBudget {
                applies_to: "Actual flow, average of runs 1–2".into(),
                spatial_method: "model bias, Type B (log-Tchebycheff 5 × 5)".into(),
                rows: budget_rows(&[
                    ("Pitot tube coefficient", "0.50", "1", "∞", "1.0"),
                    ("Velocity pressure (gauge)", "2.00", "0.5", "∞", "4.0"),
                    ("Air density", "0.50", "−0.5", "∞", "0.3"),
                    ("Duct dimensions", "0.60", "1", "∞", "1.4"),
                    ("Spatial integration", "3.00", "1", "8", "35.9"),
                    ("Temporal variation", "3.50", "1", "1", "48.9"),
                    ("Probe positioning", "1.20", "1", "∞", "5.7"),
                    ("Wall effect", "0.75", "1", "∞", "2.2"),
                ]),
                combined: "4.00 %".into(),
                effective_dof: "12.7".into(),
                coverage_factor: "2.06".into(),
                expanded: "±8.2 %".into(),
                expanded_absolute: format!(
                    "±{} cfm (±{} m³/s)",
                    grouped(avg(1) * 0.082, 0),
                    fixed(avg(1) * 0.082 * M3_S_PER_CFM, 3)
                ),
                note: "Coverage factor from Student's t at 97.5 % for ν_eff (Welch–Satterthwaite)."
                    .into(),
            },
            instruments: vec![
                InstrumentRow {
                    name: "Standard pitot tube, 24 in".into(),
                    identifier: "SP-118".into(),
                    detail: "C 1.00".into(),
                    calibrated: "n/a (standard geometry)".into(),
                    due: "inspect before use".into(),
                    reference: "visual inspection 2026-03-03".into(),
                },
                InstrumentRow {
                    name: "Digital manometer".into(),
                    identifier: "DM-5530".into(),
                    detail: "0–5 inH2O, resolution 0.01 inH2O".into(),
                    calibrated: "2025-11-20".into(),
                    due: "2026-11-20".into(),
                    reference: "certificate 25-9812".into(),
                },
            ],
            notes: vec![
                "Supply fan on VFD at 48.0 Hz; all zone dampers at the balanced positions.".into(),
            ],
            deviations: vec![
                "Run 2, point E5 read a negative velocity pressure (reverse flow in the corner behind \
                 a turning vane); the reading is excluded from the run 2 average as the survey option \
                 `negative = exclude` directs."
                    .into(),
            ],
            safety: standard_safety_cautions(),
            signoff: SignOff {
                tested_by: "Tomasz Oyelaran".into(),
                certificate: "TAB technician DEMO-2231".into(),
                tested_date: "2026-03-03".into(),
                reviewed_by: "Renske Duval".into(),
                reviewed_date: "2026-03-05".into(),
                organisation: "Northline Balancing (fictional)".into(),
                statement: "The measurements in this report were made as described and the results \
                            follow from the recorded data, which are embedded in this file."
                    .into(),
            },
        }
    }
}

fn check(
    group: &str,
    id: &str,
    status: Status,
    measured: &str,
    limit: &str,
    source: &str,
    message: &str,
) -> CheckRow {
    CheckRow {
        group: group.into(),
        id: id.into(),
        status,
        measured: measured.into(),
        limit: limit.into(),
        source: source.into(),
        message: message.into(),
    }
}

fn budget_rows(rows: &[(&str, &str, &str, &str, &str)]) -> Vec<BudgetRow> {
    rows.iter()
        .map(|(name, u, c, dof, share)| BudgetRow {
            name: name.to_string(),
            relative_u: format!("{u} %"),
            sensitivity: c.to_string(),
            dof: dof.to_string(),
            contribution: format!("{share} %"),
        })
        .collect()
}

impl FieldSheetData {
    /// A blank sheet for the round demo plane, probe and Cp pre-filled, the rest left to fill in.
    pub fn demo() -> FieldSheetData {
        FieldSheetData {
            title: "Boiler 2 stack — velocity traverse".into(),
            site: "Corvale mill, boiler house (fictional)".into(),
            plane_location: "Boiler 2 stack, sampling platform at 62 ft".into(),
            plane: round_plane(),
            units: sheet_units(),
            fields: SheetFields {
                probe: Some("Type S, PT-0417".into()),
                cp: Some("0.84".into()),
                ..SheetFields::default()
            },
            yaw_column: true,
            paper: Paper::UsLetter,
            software: format!("annulus {}", env!("CARGO_PKG_VERSION")),
        }
    }

    /// A blank sheet for the rectangular demo plane.
    pub fn demo_rectangular() -> FieldSheetData {
        FieldSheetData {
            title: "AHU-3 supply — velocity traverse".into(),
            site: "Brightwater library (fictional)".into(),
            plane_location: "AHU-3 main supply, level 2".into(),
            plane: rect_plane(),
            units: inch_units("fpm", 60.0 / M_PER_FT, 0),
            fields: SheetFields::default(),
            yaw_column: false,
            paper: Paper::UsLetter,
            software: format!("annulus {}", env!("CARGO_PKG_VERSION")),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // EPA Method 1 (40 CFR 60 App. A-1), Table 1-2, N = 12, transcribed in methods.md §1.1; the
    // table prints 0.1 % of D.
    #[test]
    fn demo_positions_follow_table_1_2() {
        const TABLE_TOL_PERCENT: f64 = 0.05;
        let table = [
            2.1, 6.7, 11.8, 17.7, 25.0, 35.6, 64.4, 75.0, 82.3, 88.2, 93.3, 97.9,
        ];
        for (x, t) in equal_area_fractions(12).iter().zip(table) {
            assert!((x * 100.0 - t).abs() <= TABLE_TOL_PERCENT, "{x} vs {t}");
        }
    }

    #[test]
    fn demos_are_valid_models() {
        for data in [ReportData::demo(), ReportData::demo_rectangular()] {
            assert_eq!(data.validate(), Ok(()));
        }
        let round = ReportData::demo();
        assert_eq!(round.runs.len(), 3);
        assert_eq!(round.plane.lines.len(), 2);
        assert!(round.plane.lines.iter().all(|l| l.points.len() == 12));
        // The 1.00 in wall rule moves points 1 and 12 on both lines of a 40 in stack.
        let adjusted: usize = round.runs[0].readings.iter().filter(|r| r.adjusted).count();
        assert_eq!(adjusted, 4);
        let rect = ReportData::demo_rectangular();
        assert_eq!(
            rect.runs[1].readings.iter().filter(|r| r.excluded).count(),
            1
        );
        assert_eq!(FieldSheetData::demo().validate(), Ok(()));
    }

    // Worked check in calculations.md §8 (HVAC rectangular 5 × 5, 24 × 16 in, 29.42 inHg, 85 °F):
    // 5318.8 acfm and 5075.4 scfm, derived from the published formulas; printed to 0.1 cfm.
    #[test]
    fn rectangular_demo_run_1_reproduces_the_worked_check() {
        let data = ReportData::demo_rectangular();
        let flow = &data.results.rows[1];
        assert_eq!(flow.values[0], "5,318.8");
        assert_eq!(data.results.rows[2].values[0], "5,075.4");
    }
}
