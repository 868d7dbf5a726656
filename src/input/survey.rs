//! Reads a survey file (TOML) into a validated [`Survey`].
//!
//! Every quantity is a string with a unit, parsed by `units`; every problem is located (file, line,
//! column of the value) and all of them are reported in one pass before anything is computed.

use super::text::{span_location, Spanned};
use crate::diag::{Diagnostic, Diagnostics, Error, Location};
use crate::geometry::Duct;
use crate::input::calibration_file::CalibrationRecord;
use crate::layout::Method;
use crate::survey::*;
use crate::units::{parse_quantity, Dimension};
use chrono::NaiveDate;
use serde::Deserialize;

type S = Spanned<String>;

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSurvey {
    survey: RawMeta,
    duct: RawDuct,
    layout: Option<RawLayout>,
    probe: RawProbe,
    gas: RawGas,
    design: Option<RawDesign>,
    flow: Option<RawFlow>,
    signoff: Option<RawSignoff>,
    #[serde(default, rename = "run")]
    runs: Vec<RawRun>,
    notes: Option<Vec<String>>,
    /// Read by later stages (checks, instruments, reported values); kept as tables here.
    #[allow(dead_code)]
    checks: Option<toml::Table>,
    #[allow(dead_code)]
    instruments: Option<toml::Table>,
    #[allow(dead_code)]
    reported: Option<toml::Table>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawMeta {
    title: String,
    site: Option<String>,
    client: Option<String>,
    plane: Option<String>,
    date: Spanned<toml::Value>,
    convention: S,
    reference: Option<RawReference>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawReference {
    temperature: S,
    pressure: S,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawDuct {
    shape: S,
    diameter: Option<S>,
    width: Option<S>,
    height: Option<S>,
    liner: Option<S>,
    construction: Option<S>,
    upstream: Option<S>,
    downstream: Option<S>,
    port_length: Option<S>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLayout {
    method: Option<S>,
    lines: Option<Spanned<i64>>,
    points_per_line: Option<Spanned<i64>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawProbe {
    kind: S,
    coefficient: Option<Spanned<f64>>,
    /// A calibration file (`annulus calibrate` format), relative to the survey.
    calibration: Option<S>,
    serial: Option<String>,
    calibrated: Option<Spanned<toml::Value>>,
    gauge_fluid_sg: Option<Spanned<f64>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawMethod4 {
    impinger_gain: S,
    silica_gain: S,
    meter_volume: S,
    meter_y: Spanned<f64>,
    meter_pressure: S,
    meter_temperature: S,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawGas {
    barometric: S,
    #[serde(rename = "static")]
    static_: Option<S>,
    o2: Option<S>,
    co2: Option<S>,
    co: Option<S>,
    ar: Option<S>,
    dry_molar_mass: Option<Spanned<f64>>,
    moisture: Option<S>,
    method4: Option<RawMethod4>,
    rh: Option<S>,
    wet_bulb: Option<S>,
    dew_point: Option<S>,
    temperature: Option<S>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawDesign {
    flow: S,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFlow {
    epa_units: Option<S>,
    negative: Option<S>,
    angles: Option<S>,
    wall_factor: Option<Spanned<toml::Value>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSignoff {
    tested_by: Option<String>,
    certificate: Option<String>,
    reviewed_by: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRun {
    id: Spanned<toml::Value>,
    readings: S,
    matrix: Option<S>,
    started: Option<Spanned<toml::Value>>,
    leak_check: Option<RawLeak>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLeak {
    before: Option<S>,
    after: Option<S>,
}

/// Collects problems while building the survey.
struct Ctx<'a> {
    file: &'a str,
    text: &'a str,
    diags: Diagnostics,
}

impl Ctx<'_> {
    fn loc(&self, span: std::ops::Range<usize>, key: &str) -> Location {
        span_location(self.file, self.text, span.start).with_context(format!("`{key}`"))
    }

    fn error(
        &mut self,
        span: std::ops::Range<usize>,
        key: &str,
        msg: String,
        hint: Option<String>,
    ) {
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

    fn fraction(&mut self, v: &Option<S>, key: &str) -> Option<f64> {
        let x = self.opt_quantity(v, key, Dimension::Fraction)?;
        if (0.0..=1.0).contains(&x) {
            Some(x)
        } else if let Some(v) = v {
            self.error(
                v.span(),
                key,
                format!(
                    "`{key}` must be between 0 and 100 %, found `{}`",
                    v.get_ref()
                ),
                None,
            );
            None
        } else {
            None
        }
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

    fn date(&mut self, v: &Spanned<toml::Value>, key: &str) -> Option<NaiveDate> {
        let (text, parsed) = super::text::toml_date(v.get_ref());
        match parsed {
            Some(d) => Some(d),
            None => {
                self.error(
                    v.span(),
                    key,
                    format!("`{key}` is not a date: `{text}`"),
                    Some("write the date as YYYY-MM-DD, e.g. \"2026-10-14\"".into()),
                );
                None
            }
        }
    }

    fn count(&mut self, v: &Option<Spanned<i64>>, key: &str) -> Option<usize> {
        let v = v.as_ref()?;
        let n = *v.get_ref();
        if (1..=1000).contains(&n) {
            Some(n as usize)
        } else {
            self.error(
                v.span(),
                key,
                format!("`{key}` must be a positive count, found {n}"),
                None,
            );
            None
        }
    }
}

/// Parses survey text. `file` names the file in diagnostics.
pub fn parse_survey(file: &str, text: &str) -> Result<Survey, Error> {
    parse_survey_with(file, text, None)
}

/// Reads a calibration file a survey references (path as written in the survey).
pub type CalibrationResolver<'a> = &'a dyn Fn(&str) -> Result<CalibrationRecord, Error>;

/// [`parse_survey`] with a way to read a `[probe] calibration` file; without one such a survey is
/// refused with a hint (files are read by `input::load`).
pub fn parse_survey_with(
    file: &str,
    text: &str,
    calibration: Option<CalibrationResolver>,
) -> Result<Survey, Error> {
    let raw: RawSurvey = toml::from_str(text).map_err(|e| toml_error(file, text, e))?;
    let mut cx = Ctx {
        file,
        text,
        diags: Diagnostics::new(),
    };
    let survey = build(&mut cx, raw, calibration);
    match survey {
        Some(s) if cx.diags.is_empty() => Ok(s),
        _ => {
            if cx.diags.is_empty() {
                cx.diags
                    .push(Diagnostic::new("the survey could not be read").at(Location::file(file)));
            }
            Err(Error::Input(cx.diags))
        }
    }
}

/// The plane parts of a survey (convention, duct, straight runs, port, layout request).
pub struct PlaneParts {
    pub convention: ConventionId,
    pub duct: Duct,
    pub construction: Construction,
    pub upstream_d: Option<f64>,
    pub downstream_d: Option<f64>,
    pub port_length_m: f64,
    pub liner_m: f64,
    pub layout: LayoutRequest,
    /// The survey's title, site and plane, for the blank field sheet's heading.
    pub title: String,
    pub site: Option<String>,
    pub plane: Option<String>,
    /// `[flow] epa_units = "metric"` (the sheet is printed in Method 2's metric units).
    pub epa_metric: bool,
}

fn build_plane(cx: &mut Ctx, raw: &RawSurvey) -> Option<PlaneParts> {
    let convention = cx.choice(
        &raw.survey.convention,
        "survey.convention",
        &ConventionId::ALL.map(|c| (c.name(), c)),
    );
    let d = &raw.duct;
    let shape = cx.choice(
        &d.shape,
        "duct.shape",
        &[("round", true), ("rectangular", false)],
    );
    let liner = cx
        .opt_quantity(&d.liner, "duct.liner", Dimension::Length)
        .unwrap_or(0.0);
    let duct = match shape {
        Some(true) => match &d.diameter {
            Some(v) => cx
                .quantity(v, "duct.diameter", Dimension::Length)
                .and_then(|dm| {
                    Duct::round_lined(dm, liner)
                        .map_err(|e| {
                            let msg = match e {
                                crate::geometry::GeometryError::NotPositive { .. } => format!(
                                    "`duct.diameter` must be a positive length, found `{}`",
                                    v.get_ref()
                                ),
                                other => other.to_string(),
                            };
                            let hint = "give the inside diameter, e.g. \"96 in\"".to_string();
                            cx.error(v.span(), "duct.diameter", msg, Some(hint))
                        })
                        .ok()
                }),
            None => {
                cx.error(
                    d.shape.span(),
                    "duct.shape",
                    "a round duct needs `diameter` (inside diameter)".into(),
                    Some("add e.g. diameter = \"96 in\" to [duct]".into()),
                );
                None
            }
        },
        Some(false) => {
            match (&d.width, &d.height) {
                (Some(w), Some(h)) => {
                    let wm = cx.quantity(w, "duct.width", Dimension::Length);
                    let hm = cx.quantity(h, "duct.height", Dimension::Length);
                    match (wm, hm) {
                    (Some(wm), Some(hm)) => Duct::rectangular_lined(wm, hm, liner)
                        .map_err(|e| {
                            let msg = match e {
                                crate::geometry::GeometryError::NotPositive { what, .. } => {
                                    let raw = if what == "width" { w.get_ref() } else { h.get_ref() };
                                    format!("`duct.{what}` must be a positive length, found `{raw}`")
                                }
                                other => other.to_string(),
                            };
                            let hint = "give inside dimensions, e.g. width = \"48 in\"".to_string();
                            cx.error(w.span(), "duct.width", msg, Some(hint))
                        })
                        .ok(),
                    _ => None,
                }
                }
                _ => {
                    cx.error(
                        d.shape.span(),
                        "duct.shape",
                        "a rectangular duct needs `width` (port side) and `height`".into(),
                        Some("add e.g. width = \"48 in\" and height = \"24 in\" to [duct]".into()),
                    );
                    None
                }
            }
        }
        None => None,
    };
    let construction = match &d.construction {
        Some(v) => cx.choice(
            v,
            "duct.construction",
            &[
                ("steel", Construction::Steel),
                ("brick", Construction::Brick),
            ],
        ),
        None => Some(Construction::Steel),
    };
    let distance = |cx: &mut Ctx, v: &Option<S>, key: &str| -> Option<f64> {
        let v = v.as_ref()?;
        // "6.2 D" in diameters, or a length divided by the (equivalent) diameter
        match parse_quantity(v.get_ref(), Dimension::Diameters) {
            Ok(x) if x >= 0.0 => Some(x),
            Ok(_) => {
                cx.error(v.span(), key, format!("`{key}` cannot be negative"), None);
                None
            }
            Err(_) => {
                let len = cx.quantity(v, key, Dimension::Length)?;
                duct.map(|d| len / d.equivalent_diameter_m())
            }
        }
    };
    let upstream_d = distance(cx, &d.upstream, "duct.upstream");
    let downstream_d = distance(cx, &d.downstream, "duct.downstream");
    let port_length_m = cx
        .opt_quantity(&d.port_length, "duct.port_length", Dimension::Length)
        .unwrap_or(0.0);

    let layout = {
        let l = raw.layout.as_ref();
        let method = match l.and_then(|l| l.method.as_ref()) {
            Some(v) => cx.choice(v, "layout.method", &Method::ALL.map(|m| (m.name(), m))),
            None => Some(Method::EqualArea),
        };
        LayoutRequest {
            method: method?,
            lines: l.and_then(|l| cx.count(&l.lines, "layout.lines")),
            points_per_line: l.and_then(|l| cx.count(&l.points_per_line, "layout.points_per_line")),
        }
    };

    Some(PlaneParts {
        convention: convention?,
        duct: duct?,
        construction: construction?,
        upstream_d,
        downstream_d,
        port_length_m,
        liner_m: liner,
        layout,
        title: raw.survey.title.clone(),
        site: raw.survey.site.clone(),
        plane: raw.survey.plane.clone(),
        epa_metric: raw
            .flow
            .as_ref()
            .and_then(|f| f.epa_units.as_ref())
            .is_some_and(|v| v.get_ref().trim() == "metric"),
    })
}

/// Parses only the plane of a survey (for `annulus layout` on a survey still being filled in):
/// problems in other sections are ignored, problems in the plane are reported.
pub fn parse_plane(file: &str, text: &str) -> Result<PlaneParts, Error> {
    let raw: RawSurvey = toml::from_str(text).map_err(|e| toml_error(file, text, e))?;
    let mut cx = Ctx {
        file,
        text,
        diags: Diagnostics::new(),
    };
    let plane = build_plane(&mut cx, &raw);
    match plane {
        Some(p) if cx.diags.is_empty() => Ok(p),
        _ => Err(Error::Input(cx.diags)),
    }
}

fn toml_error(file: &str, text: &str, e: toml::de::Error) -> Error {
    let loc = match e.span() {
        Some(span) => span_location(file, text, span.start),
        None => Location::file(file),
    };
    let msg = e.message().trim().to_string();
    let hint = did_you_mean(&msg).unwrap_or_else(|| {
        "see the survey format in the README (sample-data/ has complete examples)".to_string()
    });
    Error::input(
        Diagnostic::new(format!("the survey file is not valid: {msg}"))
            .at(loc)
            .hint(hint),
    )
}

/// For serde's "unknown field `x`, expected one of `a`, `b`": the closest expected name.
fn did_you_mean(msg: &str) -> Option<String> {
    let rest = msg.strip_prefix("unknown field `")?;
    let (found, rest) = rest.split_once('`')?;
    let expected: Vec<&str> = rest.split('`').skip(1).step_by(2).collect();
    let best = expected
        .iter()
        .map(|e| (edit_distance(found, e), *e))
        .min()?;
    (best.0 <= 3).then(|| format!("did you mean `{}`?", best.1))
}

/// Levenshtein distance (small strings: keys of a survey).
fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut cur = vec![i + 1];
        for (j, cb) in b.iter().enumerate() {
            let sub = prev[j] + usize::from(ca != *cb);
            cur.push(sub.min(prev[j + 1] + 1).min(cur[j] + 1));
        }
        prev = cur;
    }
    prev[b.len()]
}

fn build(cx: &mut Ctx, raw: RawSurvey, resolver: Option<CalibrationResolver>) -> Option<Survey> {
    let m = &raw.survey;
    let date = cx.date(&m.date, "survey.date");
    let reference = m.reference.as_ref().and_then(|r| {
        let t = cx.quantity(
            &r.temperature,
            "survey.reference.temperature",
            Dimension::Temperature,
        );
        let p = cx.quantity(
            &r.pressure,
            "survey.reference.pressure",
            Dimension::Pressure,
        );
        Some(ReferenceOverride {
            temperature_k: t?,
            pressure_pa: p?,
        })
    });

    let plane = build_plane(cx, &raw);
    let p = &raw.probe;
    let kind = cx.choice(
        &p.kind,
        "probe.kind",
        &[
            ("s-type", ProbeKind::SType),
            ("standard", ProbeKind::Standard),
        ],
    );
    let given = p.coefficient.as_ref().map(|c| (*c.get_ref(), c.span()));
    if let Some((c, span)) = &given {
        if !(*c > 0.5 && *c <= 1.05) {
            cx.error(
                span.clone(),
                "probe.coefficient",
                format!("a pitot coefficient of {c} is not plausible"),
                Some("S-type pitots calibrate near 0.84, standard pitots 0.99".into()),
            );
        }
    }
    let mut calibrated = p
        .calibrated
        .as_ref()
        .and_then(|v| cx.date(v, "probe.calibrated"));
    let mut calibration = None;
    let coefficient = match (&p.calibration, given) {
        (None, Some((c, _))) => Some(c),
        (None, None) => {
            cx.error(
                p.kind.span(),
                "probe",
                "[probe] needs a `coefficient` or a `calibration` file".into(),
                Some("add coefficient = 0.84, or calibration = \"ts-0417.toml\" (annulus calibrate format)".into()),
            );
            None
        }
        (Some(path), given) => match resolver {
            None => {
                cx.error(
                    path.span(),
                    "probe.calibration",
                    "a calibration file is read only when the survey is loaded with its files"
                        .into(),
                    None,
                );
                None
            }
            Some(resolve) => match resolve(path.get_ref()) {
                Err(Error::Input(d)) => {
                    cx.diags.extend(d);
                    None
                }
                Err(other) => {
                    cx.error(path.span(), "probe.calibration", other.to_string(), None);
                    None
                }
                Ok(rec) => {
                    let assigned = rec.assigned_coefficient;
                    let given_value = given.as_ref().map(|(c, _)| *c);
                    match given {
                        Some((c, span)) if (c - assigned).abs() > 0.0005 => {
                            cx.error(
                                span,
                                "probe.coefficient",
                                format!(
                                    "coefficient {c} differs from {assigned:.4} assigned by the calibration file `{}`",
                                    path.get_ref()
                                ),
                                Some("remove `coefficient` to use the calibration's, or fix one of them".into()),
                            );
                        }
                        _ => {}
                    }
                    if calibrated.is_none() {
                        calibrated = Some(rec.date);
                    }
                    calibration = Some(ProbeCalibration {
                        file: path.get_ref().clone(),
                        probe: rec.probe.clone(),
                        date: rec.date,
                        assigned_coefficient: assigned,
                        accepted: rec.accepted,
                    });
                    Some(given_value.unwrap_or(assigned))
                }
            },
        },
    };
    let gauge_fluid_sg = p.gauge_fluid_sg.as_ref().and_then(|v| {
        let sg = *v.get_ref();
        if sg > 0.0 && sg < 20.0 {
            Some(sg)
        } else {
            cx.error(
                v.span(),
                "probe.gauge_fluid_sg",
                format!("specific gravity {sg} is not plausible"),
                None,
            );
            None
        }
    });

    let g = &raw.gas;
    let barometric_pa = cx.quantity(&g.barometric, "gas.barometric", Dimension::Pressure);
    if let Some(b) = barometric_pa {
        if !(50_000.0..=120_000.0).contains(&b) {
            cx.error(
                g.barometric.span(),
                "gas.barometric",
                format!(
                    "barometric pressure `{}` is outside 50 to 120 kPa",
                    g.barometric.get_ref()
                ),
                Some(
                    "barometric pressure is absolute, e.g. \"29.62 inHg\" or \"100.3 kPa\"".into(),
                ),
            );
        }
    }
    let static_pa = cx
        .opt_quantity(&g.static_, "gas.static", Dimension::Pressure)
        .unwrap_or(0.0);
    let dry = if let Some(md) = &g.dry_molar_mass {
        Some(DryGas::MolarMass {
            g_mol: *md.get_ref(),
        })
    } else if g.o2.is_some() || g.co2.is_some() || g.co.is_some() || g.ar.is_some() {
        let o2 = cx.fraction(&g.o2, "gas.o2").unwrap_or(0.0);
        let co2 = cx.fraction(&g.co2, "gas.co2").unwrap_or(0.0);
        let co = cx.fraction(&g.co, "gas.co").unwrap_or(0.0);
        let ar = cx.fraction(&g.ar, "gas.ar");
        Some(DryGas::Composition { o2, co2, co, ar })
    } else {
        Some(DryGas::Air)
    };
    let given: Vec<&str> = [
        ("moisture", g.moisture.is_some()),
        ("method4", g.method4.is_some()),
        ("rh", g.rh.is_some()),
        ("wet_bulb", g.wet_bulb.is_some()),
        ("dew_point", g.dew_point.is_some()),
    ]
    .iter()
    .filter(|(_, b)| *b)
    .map(|(n, _)| *n)
    .collect();
    if given.len() > 1 {
        cx.error(
            g.barometric.span(),
            "gas",
            format!(
                "[gas] gives moisture more than one way: {}",
                given.join(", ")
            ),
            Some("keep one of moisture, method4, rh, wet_bulb or dew_point".into()),
        );
    }
    let moisture = if let Some(v) = &g.moisture {
        cx.fraction(&Some(v.clone()), "gas.moisture")
            .map(|bws| Moisture::Fraction { bws })
    } else if let Some(m4) = &g.method4 {
        let q = |cx: &mut Ctx, v: &S, k: &str, dim| cx.quantity(v, k, dim);
        let a = q(
            cx,
            &m4.impinger_gain,
            "gas.method4.impinger_gain",
            Dimension::Volume,
        );
        let b = q(
            cx,
            &m4.silica_gain,
            "gas.method4.silica_gain",
            Dimension::Mass,
        );
        let c = q(
            cx,
            &m4.meter_volume,
            "gas.method4.meter_volume",
            Dimension::Volume,
        );
        let d = q(
            cx,
            &m4.meter_pressure,
            "gas.method4.meter_pressure",
            Dimension::Pressure,
        );
        let e = q(
            cx,
            &m4.meter_temperature,
            "gas.method4.meter_temperature",
            Dimension::Temperature,
        );
        match (a, b, c, d, e) {
            (Some(a), Some(b), Some(c), Some(d), Some(e)) => Some(Moisture::Method4(Method4Data {
                impinger_gain_m3: a,
                silica_gain_kg: b,
                meter_volume_m3: c,
                meter_y: *m4.meter_y.get_ref(),
                meter_pressure_pa: d,
                meter_temperature_k: e,
            })),
            _ => None,
        }
    } else if g.rh.is_some() {
        cx.fraction(&g.rh, "gas.rh")
            .map(|rh| Moisture::RelativeHumidity { rh })
    } else if let Some(v) = &g.wet_bulb {
        cx.quantity(v, "gas.wet_bulb", Dimension::Temperature)
            .map(|t| Moisture::WetBulb { temperature_k: t })
    } else if let Some(v) = &g.dew_point {
        cx.quantity(v, "gas.dew_point", Dimension::Temperature)
            .map(|t| Moisture::DewPoint { temperature_k: t })
    } else {
        Some(Moisture::Dry)
    };
    let temperature_k = cx.opt_quantity(&g.temperature, "gas.temperature", Dimension::Temperature);

    let design_flow_m3_s = raw
        .design
        .as_ref()
        .and_then(|d| cx.quantity(&d.flow, "design.flow", Dimension::Flow));

    let options = {
        let f = raw.flow.as_ref();
        let negative = match f.and_then(|f| f.negative.as_ref()) {
            Some(v) => cx.choice(
                v,
                "flow.negative",
                &[
                    ("reject", NegativePolicy::Reject),
                    ("zero", NegativePolicy::Zero),
                    ("signed", NegativePolicy::Signed),
                ],
            ),
            None => Some(NegativePolicy::Reject),
        };
        let angles = match f.and_then(|f| f.angles.as_ref()) {
            Some(v) => cx.choice(
                v,
                "flow.angles",
                &[
                    ("none", AngleCorrection::None),
                    ("yaw", AngleCorrection::Yaw),
                    ("yaw-pitch", AngleCorrection::YawPitch),
                ],
            ),
            None => Some(AngleCorrection::None),
        };
        let wall_factor = match f.and_then(|f| f.wall_factor.as_ref()) {
            None => Some(WallFactor::None),
            Some(v) => match v.get_ref() {
                toml::Value::String(s) if s == "method-2h-default" => {
                    Some(WallFactor::Method2hDefault)
                }
                toml::Value::String(s) if s == "none" => Some(WallFactor::None),
                toml::Value::Float(x) if *x > 0.9 && *x <= 1.0 => {
                    Some(WallFactor::Given { factor: *x })
                }
                toml::Value::Integer(1) => Some(WallFactor::Given { factor: 1.0 }),
                other => {
                    cx.error(
                        v.span(),
                        "flow.wall_factor",
                        format!("`flow.wall_factor` must be \"none\", \"method-2h-default\" or a factor between 0.9 and 1.0, found `{other}`"),
                        None,
                    );
                    None
                }
            },
        };
        let epa_metric = match f.and_then(|f| f.epa_units.as_ref()) {
            Some(v) => cx.choice(v, "flow.epa_units", &[("english", false), ("metric", true)]),
            None => Some(false),
        };
        FlowOptions {
            epa_metric: epa_metric?,
            negative: negative?,
            angles: angles?,
            wall_factor: wall_factor?,
        }
    };

    let mut runs = Vec::new();
    if raw.runs.is_empty() {
        cx.diags.push(
            Diagnostic::new("the survey has no [[run]]")
                .at(Location::file(cx.file))
                .hint("add [[run]] id = \"1\" readings = \"run1.csv\""),
        );
    }
    for r in &raw.runs {
        let id = super::text::toml_text(r.id.get_ref());
        if runs.iter().any(|x: &RunSpec| x.id == id) {
            cx.error(
                r.id.span(),
                "run.id",
                format!("run id `{id}` is used twice"),
                None,
            );
        }
        let leak = |cx: &mut Ctx, v: &Option<S>, k: &str| {
            v.as_ref().and_then(|v| {
                cx.choice(
                    v,
                    k,
                    &[("pass", LeakResult::Pass), ("fail", LeakResult::Fail)],
                )
            })
        };
        let leak_check = match &r.leak_check {
            Some(l) => LeakCheck {
                before: leak(cx, &l.before, "run.leak_check.before"),
                after: leak(cx, &l.after, "run.leak_check.after"),
            },
            None => LeakCheck::default(),
        };
        runs.push(RunSpec {
            id,
            readings: r.readings.get_ref().clone(),
            form: match &r.matrix {
                Some(h) => ReadingsForm::Matrix {
                    header: h.get_ref().clone(),
                },
                None => ReadingsForm::Rows,
            },
            started: r
                .started
                .as_ref()
                .map(|v| super::text::toml_text(v.get_ref())),
            leak_check,
        });
    }

    let signoff = raw
        .signoff
        .map(|s| Signoff {
            tested_by: s.tested_by,
            certificate: s.certificate,
            reviewed_by: s.reviewed_by,
        })
        .unwrap_or_default();

    let plane = plane?;
    Some(Survey {
        convention: plane.convention,
        duct: plane.duct,
        construction: plane.construction,
        upstream_d: plane.upstream_d,
        downstream_d: plane.downstream_d,
        port_length_m: plane.port_length_m,
        liner_m: plane.liner_m,
        layout: plane.layout,
        title: raw.survey.title.clone(),
        site: raw.survey.site.clone(),
        client: raw.survey.client.clone(),
        plane: raw.survey.plane.clone(),
        date: date?,
        reference,
        probe: Probe {
            kind: kind?,
            coefficient: coefficient?,
            serial: raw.probe.serial.clone(),
            calibrated,
            gauge_fluid_sg,
            calibration,
        },
        gas: Gas {
            barometric_pa: barometric_pa?,
            static_pa,
            dry: dry?,
            moisture: moisture?,
            temperature_k,
        },
        design_flow_m3_s,
        options,
        signoff,
        runs,
        notes: raw.notes.unwrap_or_default(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    pub const GOOD: &str = r#"
[survey]
title = "Unit 4 stack, annual flow test"
site = "Harrow Fen works (fictional)"
date = "2026-10-14"
convention = "epa-method-2"

[duct]
shape = "round"
diameter = "96 in"
upstream = "6.2 D"
downstream = "3.1 D"
port_length = "5 in"

[layout]
method = "equal-area"
lines = 2
points_per_line = 12

[probe]
kind = "s-type"
coefficient = 0.84

[gas]
barometric = "29.62 inHg"
static = "-0.85 inH2O"
o2 = "8.1 %"
co2 = "10.6 %"
moisture = "9.8 %"
temperature = "300 F"

[[run]]
id = "1"
readings = "run1.csv"
leak_check = { before = "pass", after = "pass" }
"#;

    #[test]
    fn parses_a_complete_survey() {
        let s = parse_survey("s.toml", GOOD).unwrap();
        assert_eq!(s.convention, ConventionId::EpaMethod2);
        assert!((s.duct.line_length_m() - 96.0 * 0.0254).abs() < 1e-12);
        assert!((s.upstream_d.unwrap() - 6.2).abs() < 1e-12);
        assert!((s.port_length_m - 0.127).abs() < 1e-12);
        assert!(
            matches!(s.gas.moisture, Moisture::Fraction { bws } if (bws - 0.098).abs() < 1e-12)
        );
        assert_eq!(s.runs[0].leak_check.after, Some(LeakResult::Pass));
        assert_eq!(s.layout.points_per_line, Some(12));
    }

    #[test]
    fn a_bad_quantity_is_located_with_its_raw_value() {
        let text = GOOD.replace("\"96 in\"", "\"96 furlong\"");
        let Err(Error::Input(d)) = parse_survey("s.toml", &text) else {
            panic!("accepted")
        };
        let first = &d.items()[0];
        assert!(first.message.contains("`96 furlong`"), "{}", first.message);
        let loc = first.location.as_ref().unwrap();
        // line 10 of GOOD (the leading newline is line 1), column of the value's opening quote
        assert_eq!((loc.line, loc.column), (Some(10), Some(12)));
    }

    #[test]
    fn reports_every_problem_in_one_pass() {
        let text = GOOD
            .replace("\"96 in\"", "\"-96 in\"")
            .replace("\"epa-method-2\"", "\"epa\"")
            .replace("\"8.1 %\"", "\"181 %\"");
        let Err(Error::Input(d)) = parse_survey("s.toml", &text) else {
            panic!("accepted")
        };
        assert_eq!(d.len(), 3, "{d}");
    }

    #[test]
    fn unknown_keys_get_a_suggestion() {
        let text = GOOD.replace("port_length", "port_lenght");
        let Err(Error::Input(d)) = parse_survey("s.toml", &text) else {
            panic!("accepted")
        };
        assert_eq!(
            d.items()[0].hint.as_deref(),
            Some("did you mean `port_length`?")
        );
        assert_eq!(edit_distance("kitten", "sitting"), 3);
    }

    #[test]
    fn unknown_keys_are_refused_with_location() {
        let text = GOOD.replace("port_length", "port_lenght");
        let Err(Error::Input(d)) = parse_survey("s.toml", &text) else {
            panic!("accepted")
        };
        let msg = d.to_string();
        assert!(msg.contains("port_lenght"), "{msg}");
        assert!(msg.contains("s.toml:"), "{msg}");
    }
}
