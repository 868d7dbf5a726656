//! Reads the survey's optional `[checks]`, `[instruments]` and `[reported]` sections into an
//! [`AssessConfig`], and finds the unit each run's Δp column was recorded in.
//!
//! The whole survey text is deserialised again with serde and `toml::Spanned`, looking only at
//! these three sections (every other section is the survey parser's and is ignored here). Every
//! problem is located (file, line, column of the key or value) and all are reported in one pass.
//!
//! ```toml
//! [checks]
//! cyclonic-flow = { limit = "25 deg", reason = "swirl vanes upstream; agreed with the agency" }
//! distribution = { enabled = false, reason = "…" }
//! [checks.gauge-sensitivity]
//! t_factor = 1.04                   # tightening needs no reason
//!
//! [instruments]
//! spatial_method = "point-scatter"  # | line-half-difference | model-bias (then model_bias = "2 %")
//! positioning = "0.5 %"             # relative standard u of the mean velocity
//! wall_factor = "0.3 %"             # relative standard u of an applied wall factor
//! pitot = { coefficient_uncertainty = "2 %", coverage_factor = 2, serial = "P-7", calibrated = "2026-05-11" }
//! dp = { accuracy = "1 %", resolution = "0.01 inH2O", zero = "0.005 inH2O", interval_months = 12 }
//! thermometer = { accuracy = "2 K" }          # or "1.5 %" of the absolute temperature
//! barometer = { accuracy = "0.1 inHg" }
//! static = { accuracy = "0.1 inH2O" }
//! tape = { accuracy = "0.125 in" }
//! gas = { molar_mass = "0.5 %" }              # relative standard u of the wet molar mass
//!
//! [reported]
//! average = { dscfm = "36803 cfm" }
//! [reported.run.1]
//! velocity = "50.94 ft/s"
//! acfm = "60008 cfm"
//! ```
//! Accuracy figures are ± bounds (taken as rectangular); `coefficient_uncertainty` is an expanded
//! uncertainty at `coverage_factor` (default 2).

use super::text::{span_location, Spanned};
use super::Loaded;
use crate::assess::AssessConfig;
use crate::checks::instruments::{
    Calibration, DpGauge, GasAnalysis, Instruments, Pitot, PressureGauge, Tape,
    TemperatureAccuracy, Thermometer,
};
use crate::checks::integrity::{ReportedQuantity, ReportedScope, ReportedValue};
use crate::checks::{self, LimitKind, Override, Settings};
use crate::diag::{Diagnostic, Diagnostics, Error, Location};
use crate::survey::{ReadingsForm, Survey};
use crate::uncertainty::SpatialMethod;
use crate::units::{lookup_unit, parse_quantity, Dimension, Unit};
use chrono::NaiveDate;
use serde::Deserialize;
use std::collections::BTreeMap;
use std::ops::Range;

type S = Spanned<String>;
type V = Spanned<toml::Value>;

#[derive(Deserialize)]
struct RawAssess {
    checks: Option<BTreeMap<S, Spanned<BTreeMap<S, V>>>>,
    instruments: Option<RawInstruments>,
    reported: Option<RawReported>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawInstruments {
    spatial_method: Option<S>,
    model_bias: Option<S>,
    positioning: Option<S>,
    wall_factor: Option<S>,
    pitot: Option<RawPitot>,
    dp: Option<RawDp>,
    thermometer: Option<RawAccuracy>,
    barometer: Option<RawAccuracy>,
    #[serde(rename = "static")]
    static_: Option<RawAccuracy>,
    tape: Option<RawAccuracy>,
    gas: Option<RawGas>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawPitot {
    coefficient_uncertainty: Option<S>,
    coverage_factor: Option<V>,
    dof: Option<V>,
    serial: Option<String>,
    calibrated: Option<V>,
    interval_months: Option<Spanned<i64>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawDp {
    accuracy: Option<S>,
    resolution: Option<S>,
    zero: Option<S>,
    serial: Option<String>,
    calibrated: Option<V>,
    interval_months: Option<Spanned<i64>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawAccuracy {
    accuracy: Option<S>,
    serial: Option<String>,
    calibrated: Option<V>,
    interval_months: Option<Spanned<i64>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawGas {
    molar_mass: Option<S>,
    serial: Option<String>,
    calibrated: Option<V>,
    interval_months: Option<Spanned<i64>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawReported {
    average: Option<BTreeMap<S, S>>,
    run: Option<BTreeMap<S, BTreeMap<S, S>>>,
}

/// Collects located problems.
struct Ctx<'a> {
    file: &'a str,
    text: &'a str,
    diags: Diagnostics,
}

impl Ctx<'_> {
    fn error(&mut self, span: Range<usize>, key: &str, msg: String, hint: Option<String>) {
        let mut d = Diagnostic::new(msg)
            .at(span_location(self.file, self.text, span.start).with_context(format!("`{key}`")));
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

    /// A non-negative quantity (accuracies, resolutions).
    fn bound(&mut self, v: &Option<S>, key: &str, dim: Dimension) -> Option<f64> {
        let v = v.as_ref()?;
        let x = self.quantity(v, key, dim)?;
        if x >= 0.0 {
            Some(x)
        } else {
            self.error(
                v.span(),
                key,
                format!("`{key}` cannot be negative, found `{}`", v.get_ref()),
                None,
            );
            None
        }
    }

    /// A fraction between 0 and 100 %.
    fn fraction(&mut self, v: &Option<S>, key: &str) -> Option<f64> {
        let x = self.bound(v, key, Dimension::Fraction)?;
        if x <= 1.0 {
            Some(x)
        } else {
            if let Some(v) = v {
                self.error(
                    v.span(),
                    key,
                    format!("`{key}` must be at most 100 %, found `{}`", v.get_ref()),
                    None,
                );
            }
            None
        }
    }

    fn number(&mut self, v: &V, key: &str) -> Option<f64> {
        match v.get_ref() {
            toml::Value::Float(x) if x.is_finite() => Some(*x),
            toml::Value::Integer(i) => Some(*i as f64),
            other => {
                self.error(
                    v.span(),
                    key,
                    format!("`{key}` must be a plain number, found `{other}`"),
                    None,
                );
                None
            }
        }
    }

    fn positive_number(&mut self, v: &Option<V>, key: &str) -> Option<f64> {
        let v = v.as_ref()?;
        let x = self.number(v, key)?;
        if x > 0.0 {
            Some(x)
        } else {
            self.error(
                v.span(),
                key,
                format!("`{key}` must be greater than zero, found {x}"),
                None,
            );
            None
        }
    }

    fn date(&mut self, v: &Option<V>, key: &str) -> Option<NaiveDate> {
        let v = v.as_ref()?;
        let (text, parsed) = super::text::toml_date(v.get_ref());
        match parsed {
            Some(d) => Some(d),
            None => {
                self.error(
                    v.span(),
                    key,
                    format!("`{key}` is not a date: `{text}`"),
                    Some("write the date as YYYY-MM-DD, e.g. \"2026-05-11\"".into()),
                );
                None
            }
        }
    }

    fn months(&mut self, v: &Option<Spanned<i64>>, key: &str) -> Option<u32> {
        let v = v.as_ref()?;
        let n = *v.get_ref();
        if (1..=240).contains(&n) {
            Some(n as u32)
        } else {
            self.error(
                v.span(),
                key,
                format!("`{key}` must be a whole number of months from 1 to 240, found {n}"),
                None,
            );
            None
        }
    }

    fn calibration(
        &mut self,
        role: &str,
        serial: &Option<String>,
        calibrated: &Option<V>,
        interval: &Option<Spanned<i64>>,
    ) -> Calibration {
        Calibration {
            serial: serial.clone(),
            calibrated: self.date(calibrated, &format!("instruments.{role}.calibrated")),
            interval_months: self.months(interval, &format!("instruments.{role}.interval_months")),
        }
    }
}

/// Parses the assessment sections of survey `text` (`file` names it in diagnostics). `survey` is
/// the already-validated survey, used to check run ids in `[reported]`.
pub fn parse_assess_config(file: &str, text: &str, survey: &Survey) -> Result<AssessConfig, Error> {
    let raw: RawAssess = toml::from_str(text).map_err(|e| {
        let loc = match e.span() {
            Some(span) => span_location(file, text, span.start),
            None => Location::file(file),
        };
        Error::input(
            Diagnostic::new(format!(
                "the survey's [checks], [instruments] or [reported] section is not valid: {}",
                e.message().trim()
            ))
            .at(loc)
            .hint("see the [checks], [instruments] and [reported] formats in the README"),
        )
    })?;
    let mut cx = Ctx {
        file,
        text,
        diags: Diagnostics::new(),
    };
    let checks = raw
        .checks
        .as_ref()
        .map(|c| parse_checks(&mut cx, c))
        .unwrap_or_default();
    let instruments = raw
        .instruments
        .as_ref()
        .map(|i| parse_instruments(&mut cx, i))
        .unwrap_or_default();
    let reported = raw
        .reported
        .as_ref()
        .map(|r| parse_reported(&mut cx, r, survey))
        .unwrap_or_default();
    cx.diags.finish(AssessConfig {
        checks,
        instruments,
        reported,
    })
}

/// [`parse_assess_config`] on a loaded survey's own text.
pub fn load_assess_config(loaded: &Loaded) -> Result<AssessConfig, Error> {
    let name = &loaded.survey_file.name;
    let text = String::from_utf8_lossy(&loaded.survey_file.bytes);
    let text = text.strip_prefix('\u{feff}').unwrap_or(&text);
    parse_assess_config(name, text, &loaded.survey)
}

fn parse_checks(cx: &mut Ctx, raw: &BTreeMap<S, Spanned<BTreeMap<S, V>>>) -> Settings {
    let mut overrides = Vec::new();
    for (id, entry) in raw {
        let Some(def) = checks::find(id.get_ref()) else {
            cx.error(
                id.span(),
                "checks",
                format!("unknown check `{}`", id.get_ref()),
                Some(format!("valid check ids: {}", checks::ids().join(", "))),
            );
            continue;
        };
        let key_of = |k: &str| format!("checks.{}.{k}", def.id);
        let mut enabled = true;
        let mut reason = None;
        let mut limits = Vec::new();
        let mut ok = true;
        for (k, v) in entry.get_ref() {
            let key = k.get_ref().as_str();
            match (key, v.get_ref()) {
                ("enabled", toml::Value::Boolean(b)) => enabled = *b,
                ("enabled", other) => {
                    cx.error(
                        v.span(),
                        &key_of(key),
                        format!("`enabled` must be true or false, found `{other}`"),
                        None,
                    );
                    ok = false;
                }
                ("reason", toml::Value::String(s)) => reason = Some(s.clone()),
                ("reason", other) => {
                    cx.error(
                        v.span(),
                        &key_of(key),
                        format!("`reason` must be a string, found `{other}`"),
                        None,
                    );
                    ok = false;
                }
                _ => {
                    let Some(spec) = def.limit(key) else {
                        cx.error(
                            k.span(),
                            &key_of(key),
                            format!("check `{}` has no limit `{key}`", def.id),
                            Some(checks::limit_keys_hint(def)),
                        );
                        ok = false;
                        continue;
                    };
                    match limit_value(cx, v, &key_of(key), spec.kind) {
                        Some(x) => limits.push((key.to_string(), x)),
                        None => ok = false,
                    }
                }
            }
        }
        if !ok {
            continue;
        }
        match Override::new(def, enabled, reason, limits) {
            Ok(o) => overrides.push(o),
            Err(e) => {
                let span = e
                    .key
                    .as_deref()
                    .and_then(|k| entry.get_ref().keys().find(|x| x.get_ref() == k))
                    .map(|k| k.span())
                    .unwrap_or_else(|| id.span());
                let key = e.key.as_deref().map(key_of).unwrap_or_else(|| key_of(""));
                cx.error(span, &key, e.message, e.hint);
            }
        }
    }
    // map keys are unique, so no check is configured twice
    Settings::new(overrides).unwrap_or_default()
}

fn limit_value(cx: &mut Ctx, v: &V, key: &str, kind: LimitKind) -> Option<f64> {
    match kind {
        LimitKind::Quantity(dim) => match v.get_ref() {
            toml::Value::String(s) => cx.quantity(&Spanned::new(v.span(), s.clone()), key, dim),
            other => {
                cx.error(
                    v.span(),
                    key,
                    format!("`{key}` must be a quantity string with a unit, found `{other}`"),
                    Some(format!(
                        "a {} takes one of: {}",
                        dim.name(),
                        crate::units::symbols_for(dim).join(", ")
                    )),
                );
                None
            }
        },
        LimitKind::Number => cx.number(v, key),
        LimitKind::Count | LimitKind::Months => match v.get_ref() {
            toml::Value::Integer(i) if *i >= 1 => Some(*i as f64),
            other => {
                cx.error(
                    v.span(),
                    key,
                    format!("`{key}` must be a positive whole number, found `{other}`"),
                    None,
                );
                None
            }
        },
    }
}

fn parse_instruments(cx: &mut Ctx, r: &RawInstruments) -> Instruments {
    let spatial_method = r.spatial_method.as_ref().and_then(|v| {
        let m = SpatialMethod::from_name(v.get_ref().trim());
        if m.is_none() {
            cx.error(
                v.span(),
                "instruments.spatial_method",
                format!(
                    "`instruments.spatial_method` must be one of {}, found `{}`",
                    SpatialMethod::ALL.map(|m| m.name()).join(" | "),
                    v.get_ref()
                ),
                None,
            );
        }
        m
    });
    let model_bias_fraction = cx.fraction(&r.model_bias, "instruments.model_bias");
    if let (Some(SpatialMethod::ModelBias), None, Some(v)) =
        (spatial_method, &r.model_bias, &r.spatial_method)
    {
        cx.error(
            v.span(),
            "instruments.spatial_method",
            "the model-bias spatial option needs a judged bound".into(),
            Some(
                "add model_bias = \"2 %\" (a ± bound on the integration bias) to [instruments]"
                    .into(),
            ),
        );
    }
    let mut ins = Instruments {
        spatial_method,
        model_bias_fraction,
        positioning_u_rel: cx.fraction(&r.positioning, "instruments.positioning"),
        wall_factor_u_rel: cx.fraction(&r.wall_factor, "instruments.wall_factor"),
        ..Instruments::default()
    };
    if let Some(p) = &r.pitot {
        ins.pitot = Pitot {
            coefficient_uncertainty: cx.fraction(
                &p.coefficient_uncertainty,
                "instruments.pitot.coefficient_uncertainty",
            ),
            coverage_factor: cx
                .positive_number(&p.coverage_factor, "instruments.pitot.coverage_factor"),
            dof: cx.positive_number(&p.dof, "instruments.pitot.dof"),
            calibration: cx.calibration("pitot", &p.serial, &p.calibrated, &p.interval_months),
        };
    }
    if let Some(d) = &r.dp {
        let resolution_pa = cx.bound(
            &d.resolution,
            "instruments.dp.resolution",
            Dimension::Pressure,
        );
        if let (Some(0.0), Some(v)) = (resolution_pa, &d.resolution) {
            cx.error(
                v.span(),
                "instruments.dp.resolution",
                "`instruments.dp.resolution` must be greater than zero".into(),
                None,
            );
        }
        ins.dp = DpGauge {
            accuracy_fraction: cx.fraction(&d.accuracy, "instruments.dp.accuracy"),
            resolution_pa: resolution_pa.filter(|r| *r > 0.0),
            zero_pa: cx.bound(&d.zero, "instruments.dp.zero", Dimension::Pressure),
            calibration: cx.calibration("dp", &d.serial, &d.calibrated, &d.interval_months),
        };
    }
    if let Some(t) = &r.thermometer {
        let accuracy = t.accuracy.as_ref().and_then(|v| {
            let key = "instruments.thermometer.accuracy";
            match parse_quantity(v.get_ref(), Dimension::Fraction) {
                Ok(f) if (0.0..=1.0).contains(&f) => Some(TemperatureAccuracy::FractionOfAbsolute(f)),
                Ok(_) => {
                    cx.error(
                        v.span(),
                        key,
                        format!("`{key}` must be between 0 and 100 %, found `{}`", v.get_ref()),
                        None,
                    );
                    None
                }
                Err(_) => match parse_quantity(v.get_ref(), Dimension::TemperatureDifference) {
                    Ok(k) if k >= 0.0 => Some(TemperatureAccuracy::Kelvin(k)),
                    Ok(_) => {
                        cx.error(v.span(), key, format!("`{key}` cannot be negative"), None);
                        None
                    }
                    Err(e) => {
                        cx.error(
                            v.span(),
                            key,
                            format!("`{key}`: {e}"),
                            Some("write a ± bound such as \"2 K\", \"3 F\" or \"1.5 %\" of the absolute temperature".into()),
                        );
                        None
                    }
                },
            }
        });
        ins.thermometer = Thermometer {
            accuracy,
            calibration: cx.calibration(
                "thermometer",
                &t.serial,
                &t.calibrated,
                &t.interval_months,
            ),
        };
    }
    let gauge = |cx: &mut Ctx, g: &Option<RawAccuracy>, role: &str| {
        g.as_ref().map(|g| PressureGauge {
            accuracy_pa: cx.bound(
                &g.accuracy,
                &format!("instruments.{role}.accuracy"),
                Dimension::Pressure,
            ),
            calibration: cx.calibration(role, &g.serial, &g.calibrated, &g.interval_months),
        })
    };
    if let Some(g) = gauge(cx, &r.barometer, "barometer") {
        ins.barometer = g;
    }
    if let Some(g) = gauge(cx, &r.static_, "static") {
        ins.static_gauge = g;
    }
    if let Some(t) = &r.tape {
        ins.tape = Tape {
            accuracy_m: cx.bound(&t.accuracy, "instruments.tape.accuracy", Dimension::Length),
            calibration: cx.calibration("tape", &t.serial, &t.calibrated, &t.interval_months),
        };
    }
    if let Some(g) = &r.gas {
        ins.gas = GasAnalysis {
            molar_mass_u_rel: cx.fraction(&g.molar_mass, "instruments.gas.molar_mass"),
            calibration: cx.calibration("gas", &g.serial, &g.calibrated, &g.interval_months),
        };
    }
    ins
}

/// The unit a quantity string was written in (the recomputed value is shown in it).
fn written_unit(raw: &str, dim: Dimension) -> &'static Unit {
    let t = raw.trim();
    let idx = t
        .find(char::is_whitespace)
        .or_else(|| t.find(|c: char| c.is_alphabetic() || c == '%' || c == '°'));
    idx.and_then(|i| lookup_unit(t[i..].trim()))
        .filter(|u| u.dimension == dim)
        .or_else(|| lookup_unit(dim.si_symbol()))
        .unwrap_or(&crate::units::UNITS[0])
}

fn parse_reported(cx: &mut Ctx, r: &RawReported, survey: &Survey) -> Vec<ReportedValue> {
    let mut out = Vec::new();
    let mut values = |cx: &mut Ctx, scope: ReportedScope, map: &BTreeMap<S, S>, prefix: &str| {
        for (k, v) in map {
            let key = format!("{prefix}.{}", k.get_ref());
            let Some(quantity) = ReportedQuantity::parse(k.get_ref()) else {
                cx.error(
                    k.span(),
                    &key,
                    format!("unknown reported quantity `{}`", k.get_ref()),
                    Some(format!(
                        "use one of: {}, or acfm, scfm, dscfm",
                        ReportedQuantity::ALL.map(|q| q.key()).join(", ")
                    )),
                );
                continue;
            };
            if scope == ReportedScope::Average && quantity == ReportedQuantity::Density {
                cx.error(
                    k.span(),
                    &key,
                    "density is compared per run, not for the average".into(),
                    Some("move it to [reported.run.<id>]".into()),
                );
                continue;
            }
            let dim = quantity.dimension();
            if let Some(si) = cx.quantity(v, &key, dim) {
                out.push(ReportedValue {
                    scope: scope.clone(),
                    quantity,
                    value_si: si,
                    raw: v.get_ref().trim().to_string(),
                    unit: written_unit(v.get_ref(), dim),
                });
            }
        }
    };
    if let Some(avg) = &r.average {
        values(cx, ReportedScope::Average, avg, "reported.average");
    }
    if let Some(runs) = &r.run {
        for (id, map) in runs {
            if !survey.runs.iter().any(|s| &s.id == id.get_ref()) {
                cx.error(
                    id.span(),
                    "reported.run",
                    format!(
                        "[reported] names run `{}`, which the survey does not have",
                        id.get_ref()
                    ),
                    Some(format!(
                        "the survey's runs are: {}",
                        survey
                            .runs
                            .iter()
                            .map(|r| r.id.as_str())
                            .collect::<Vec<_>>()
                            .join(", ")
                    )),
                );
                continue;
            }
            values(
                cx,
                ReportedScope::Run(id.get_ref().clone()),
                map,
                &format!("reported.run.{}", id.get_ref()),
            );
        }
    }
    out
}

/// The unit of the Δp column of each run's readings file (survey order): from the CSV header in
/// row form, from the `matrix` header otherwise. `None` where it cannot be found.
pub fn dp_record_units(loaded: &Loaded) -> Vec<Option<&'static Unit>> {
    loaded
        .survey
        .runs
        .iter()
        .zip(&loaded.runs)
        .map(|(spec, (_, readings))| match &spec.form {
            ReadingsForm::Matrix { header } => header_unit(header),
            // recorded by the readings parser from the header, so the file is not read twice
            ReadingsForm::Rows => readings.dp_unit,
        })
        .collect()
}

/// The unit of a `dp[unit]` header, `None` for any other header.
fn header_unit(h: &str) -> Option<&'static Unit> {
    let (name, rest) = h.trim().split_once('[')?;
    if name.trim() != "dp" {
        return None;
    }
    lookup_unit(rest.strip_suffix(']')?.trim())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::checks::testkit::{run_block, EPA_SURVEY};
    use crate::input::survey::parse_survey;

    fn text(extra: &str) -> String {
        format!(
            "{EPA_SURVEY}{}\n{extra}",
            run_block("1", Some("pass"), Some("pass"))
        )
    }

    fn parse(extra: &str) -> Result<AssessConfig, Error> {
        let t = text(extra);
        let survey = parse_survey("s.toml", &t).unwrap_or_else(|e| panic!("{e}"));
        parse_assess_config("s.toml", &t, &survey)
    }

    /// 1-based line and column of the first occurrence of `needle` in the survey text.
    fn at(extra: &str, needle: &str) -> (Option<usize>, Option<usize>) {
        let t = text(extra);
        let i = t
            .find(needle)
            .unwrap_or_else(|| panic!("`{needle}` not in the text"));
        let (l, c) = crate::input::text::line_column(&t, i);
        (Some(l), Some(c))
    }

    fn one_error(extra: &str) -> Diagnostic {
        match parse(extra) {
            Err(Error::Input(d)) => {
                assert_eq!(d.len(), 1, "{d}");
                d.items()[0].clone()
            }
            Err(e) => panic!("{e}"),
            Ok(_) => panic!("accepted"),
        }
    }

    fn position(d: &Diagnostic) -> (Option<usize>, Option<usize>) {
        let l = d.location.as_ref().expect("located");
        assert_eq!(l.file, "s.toml");
        (l.line, l.column)
    }

    #[test]
    fn other_sections_are_ignored() {
        let c = parse("").unwrap();
        assert_eq!(c, AssessConfig::default());
    }

    #[test]
    fn relax_tighten_and_disable_are_parsed() {
        let c = parse(
            "[checks]\ncyclonic-flow = { limit = \"25 deg\", reason = \"vanes\" }\ndistribution = { enabled = false, reason = \"not an HVAC test\" }\n[checks.gauge-sensitivity]\nt_factor = 1.04\n",
        )
        .unwrap();
        let o = c.checks.get("cyclonic-flow").unwrap();
        assert_eq!(o.limits(), &[("limit", 25.0)]);
        assert_eq!(o.reason(), Some("vanes"));
        assert!(!c.checks.get("distribution").unwrap().enabled());
        assert_eq!(
            c.checks.get("gauge-sensitivity").unwrap().limits(),
            &[("t_factor", 1.04)]
        );
        assert!(c
            .checks
            .get("gauge-sensitivity")
            .unwrap()
            .reason()
            .is_none());
    }

    #[test]
    fn unknown_check_is_located_with_the_valid_ids() {
        let extra = "[checks]\ncyclonic = { limit = \"25 deg\", reason = \"x\" }\n";
        let d = one_error(extra);
        assert_eq!(d.message, "unknown check `cyclonic`");
        assert_eq!(position(&d), at(extra, "cyclonic ="));
        let hint = d.hint.unwrap();
        assert!(
            hint.contains("cyclonic-flow") && hint.contains("reported-values"),
            "{hint}"
        );
    }

    #[test]
    fn relaxing_or_disabling_without_a_reason_is_located() {
        let extra = "[checks]\ncyclonic-flow = { limit = \"25 deg\" }\n";
        let d = one_error(extra);
        assert!(
            d.message.contains("relaxed without a reason"),
            "{}",
            d.message
        );
        assert_eq!(position(&d), at(extra, "limit = \"25"));
        let extra = "[checks.distribution]\nenabled = false\n";
        let d = one_error(extra);
        assert!(
            d.message.contains("disabled without a reason"),
            "{}",
            d.message
        );
        assert_eq!(position(&d), at(extra, "enabled"));
        assert!(d.hint.unwrap().contains("reason"));
    }

    #[test]
    fn bad_limit_values_are_located() {
        // a unitless angle
        let extra = "[checks]\ncyclonic-flow = { limit = 15 }\n";
        let d = one_error(extra);
        assert!(
            d.message.contains("quantity string with a unit"),
            "{}",
            d.message
        );
        assert_eq!(position(&d), at(extra, "15 }"));
        // a wrong unit, with its raw value
        let extra = "[checks]\ncyclonic-flow = { limit = \"15 Pa\" }\n";
        let d = one_error(extra);
        assert!(d.message.contains("`15 Pa`"), "{}", d.message);
        assert_eq!(position(&d), at(extra, "\"15 Pa\""));
        // a limit the check does not have, with the keys it does
        let extra = "[checks]\ngauge-sensitivity = { mean = \"0.04 inH2O\" }\n";
        let d = one_error(extra);
        assert_eq!(d.message, "check `gauge-sensitivity` has no limit `mean`");
        assert_eq!(position(&d), at(extra, "mean ="));
        assert!(d.hint.unwrap().contains("`t_factor`"));
        // an entry that is not a table: the TOML layer's error, located
        let extra = "[checks]\ncyclonic-flow = 3\n";
        let d = one_error(extra);
        assert!(d.message.contains("expected a map"), "{}", d.message);
        assert_eq!(position(&d).0, at(extra, "cyclonic-flow = 3").0);
    }

    #[test]
    fn every_problem_in_one_pass() {
        let extra = "[checks]\ncyclonic = { limit = \"25 deg\" }\nline-asymmetry = { enabled = false }\n[instruments]\ndp = { accuracy = \"1 furlong\" }\n";
        let Err(Error::Input(d)) = parse(extra) else {
            panic!("accepted")
        };
        assert_eq!(d.len(), 3, "{d}");
    }

    #[test]
    fn instruments_are_parsed_and_checked() {
        let c = parse(
            "[instruments]\nspatial_method = \"model-bias\"\nmodel_bias = \"2 %\"\npitot = { coefficient_uncertainty = \"2 %\", coverage_factor = 2, serial = \"P-7\", calibrated = \"2026-05-11\" }\ndp = { accuracy = \"1 %\", resolution = \"0.01 inH2O\", interval_months = 6 }\nthermometer = { accuracy = \"1.5 %\" }\nbarometer = { accuracy = \"0.1 inHg\" }\ntape = { accuracy = \"3 mm\" }\n",
        )
        .unwrap();
        let i = &c.instruments;
        assert_eq!(i.spatial_method, Some(SpatialMethod::ModelBias));
        assert_eq!(i.model_bias_fraction, Some(0.02));
        assert_eq!(i.pitot.coefficient_uncertainty, Some(0.02));
        assert_eq!(i.pitot.coverage_factor, Some(2.0));
        assert_eq!(i.pitot.calibration.serial.as_deref(), Some("P-7"));
        assert_eq!(i.dp.calibration.interval_months, Some(6));
        assert!((i.dp.resolution_pa.unwrap() - 0.01 * crate::units::PA_PER_INH2O).abs() < 1e-12);
        assert_eq!(
            i.thermometer.accuracy,
            Some(TemperatureAccuracy::FractionOfAbsolute(0.015))
        );
        assert!((i.tape.accuracy_m.unwrap() - 0.003).abs() < 1e-15);
        // a temperature bound in °F is a difference: 3 F = 5/3 K
        let c = parse("[instruments]\nthermometer = { accuracy = \"3 F\" }\n").unwrap();
        let Some(TemperatureAccuracy::Kelvin(k)) = c.instruments.thermometer.accuracy else {
            panic!("not kelvin")
        };
        assert!((k - 5.0 / 3.0).abs() < 1e-12);
        // model-bias needs its bound
        let extra = "[instruments]\nspatial_method = \"model-bias\"\n";
        let d = one_error(extra);
        assert!(d.message.contains("judged bound"), "{}", d.message);
        assert_eq!(position(&d), at(extra, "\"model-bias\""));
        // unknown keys are refused where they are
        let extra = "[instruments]\ndp = { acuracy = \"1 %\" }\n";
        let d = one_error(extra);
        assert!(d.message.contains("acuracy"), "{}", d.message);
        assert_eq!(position(&d).0, at(extra, "acuracy").0);
        let extra = "[instruments]\ndp = { calibrated = \"May 2026\" }\n";
        let d = one_error(extra);
        assert!(d.message.contains("not a date"), "{}", d.message);
        assert_eq!(position(&d), at(extra, "\"May 2026\""));
    }

    #[test]
    fn reported_values_are_parsed_and_checked() {
        let c = parse(
            "[reported]\naverage = { dscfm = \"36803 cfm\" }\n[reported.run.1]\nvelocity = \"50.94 ft/s\"\nactual_flow = \"28.3 m3/s\"\n",
        )
        .unwrap();
        assert_eq!(c.reported.len(), 3);
        let avg = &c.reported[0];
        assert_eq!(avg.scope, ReportedScope::Average);
        assert_eq!(avg.quantity, ReportedQuantity::DryStandardFlow);
        assert_eq!(avg.unit.symbol, "cfm");
        assert_eq!(avg.raw, "36803 cfm");
        let flow = c
            .reported
            .iter()
            .find(|r| r.quantity == ReportedQuantity::ActualFlow)
            .unwrap();
        assert_eq!((flow.unit.symbol, flow.value_si), ("m3/s", 28.3));
        assert_eq!(flow.scope, ReportedScope::Run("1".into()));
        let extra = "[reported.run.7]\nvelocity = \"50 ft/s\"\n";
        let d = one_error(extra);
        assert!(d.message.contains("run `7`"), "{}", d.message);
        assert_eq!(position(&d), at(extra, "7]"));
        assert!(d.hint.unwrap().contains("1"));
        let extra = "[reported]\naverage = { cfm = \"5000 cfm\" }\n";
        let d = one_error(extra);
        assert!(
            d.message.contains("unknown reported quantity `cfm`"),
            "{}",
            d.message
        );
        assert!(d.hint.unwrap().contains("dscfm"));
        let extra = "[reported]\naverage = { density = \"0.05 lb/ft3\" }\n";
        assert!(one_error(extra).message.contains("per run"));
        let extra = "[reported]\naverage = { velocity = \"50 cfm\" }\n";
        let d = one_error(extra);
        assert_eq!(position(&d), at(extra, "\"50 cfm\""));
    }

    #[test]
    fn dp_units_come_from_the_readings_headers() {
        assert_eq!(header_unit("dp[inH2O]").map(|u| u.symbol), Some("inH2O"));
        assert_eq!(header_unit(" dp [ Pa ] ").map(|u| u.symbol), Some("Pa"));
        assert_eq!(header_unit("temperature[F]"), None);
        let mut s = EPA_SURVEY.to_string();
        s += &run_block("1", Some("pass"), Some("pass"));
        s += "\n[[run]]\nid = \"2\"\nreadings = \"run2.csv\"\nmatrix = \"dp[mmH2O]\"\nleak_check = { before = \"pass\", after = \"pass\" }\n";
        let rows = "# a comment line\nline,point,temperature[F],dp[inH2O]\n".to_string()
            + &(1..=12)
                .map(|i| {
                    format!(
                        "{},{},300,0.5\n",
                        if i <= 6 { "A" } else { "B" },
                        (i - 1) % 6 + 1
                    )
                })
                .collect::<String>();
        let matrix = "line,1,2,3,4,5,6\nA,12,13,14,14,13,12\nB,12,13,14,14,13,12\n".to_string();
        let e = crate::checks::testkit::eval(&s, &[("run1.csv", rows), ("run2.csv", matrix)]);
        let units: Vec<_> = dp_record_units(&e.loaded)
            .iter()
            .map(|u| u.map(|u| u.symbol))
            .collect();
        assert_eq!(units, vec![Some("inH2O"), Some("mmH2O")]);
    }
}
