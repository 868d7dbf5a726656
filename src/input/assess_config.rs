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

//!
//! Flows in `[reported]` carry a basis: the key names it (`acfm`/`actual_flow`, `scfm`/
//! `standard_flow`, `dscfm`/`dry_standard_flow`, `normal_flow`, `dry_normal_flow`), or the key
//! `flow` takes it from the unit (`"36803 dscfm"`, `"61000 Nm3/h"`; plain `cfm` and `m3/h` are
//! actual). A unit that names a basis must agree with the key's; a plain unit takes the key's.
//! The figure is compared with the recomputed flow on that basis.

use super::toml_doc::{Field, Table, TomlDoc};
use super::Loaded;
use crate::checks::config::AssessConfig;
use crate::checks::instruments::{
    Calibration, DpGauge, GasAnalysis, Instruments, Pitot, PressureGauge, Tape,
    TemperatureAccuracy, Thermometer,
};
use crate::checks::integrity::{ReportedQuantity, ReportedScope, ReportedValue};
use crate::checks::{self, LimitKind, Override, Settings};
use crate::diag::Error;
use crate::uncertainty::SpatialMethod;
use crate::units::{flow_basis, lookup_unit, parse_quantity, Dimension, FlowBasis, Unit};

/// Reads `[checks]`, `[instruments]` and `[reported]` from a survey's top level; `run_ids` are
/// the survey's runs (`[reported.run.<id>]` must name one). Problems are recorded in the
/// document.
pub fn read_assess_config(root: &Table, run_ids: &[&str]) -> Option<AssessConfig> {
    let checks = root.opt_table("checks").map(|t| parse_checks(&t));
    let instruments = root.opt_table("instruments").map(|t| parse_instruments(&t));
    let reported = root
        .opt_table("reported")
        .map(|t| parse_reported(&t, run_ids));
    Some(AssessConfig {
        checks: checks.unwrap_or_default(),
        instruments: instruments.unwrap_or_default(),
        reported: reported.unwrap_or_default(),
    })
}

/// Parses the assessment sections of survey `text` (`file` names it in diagnostics), ignoring
/// the survey's other sections; `run_ids` as in [`read_assess_config`].
pub fn parse_assess_config(
    file: &str,
    text: &str,
    run_ids: &[&str],
) -> Result<AssessConfig, Error> {
    let doc = TomlDoc::parse(file, text, "survey")?;
    let config = {
        let root = doc.root();
        root.allow(&[
            "survey", "duct", "layout", "probe", "gas", "design", "flow", "signoff", "run", "notes",
        ]);
        read_assess_config(&root, run_ids)
    };
    doc.finish(config)
}

/// A loaded survey's `[checks]`, `[instruments]` and `[reported]` (read with the survey).
pub fn load_assess_config(loaded: &Loaded) -> Result<AssessConfig, Error> {
    Ok(loaded.config.clone())
}

fn parse_checks(t: &Table) -> Settings {
    let mut overrides = Vec::new();
    for entry in t.entries() {
        let id = entry.path();
        let id = id
            .rsplit_once('.')
            .map(|(_, k)| k)
            .unwrap_or(&id)
            .to_string();
        let Some(def) = checks::find(&id) else {
            entry.doc.error(
                entry.key_span.clone(),
                "checks",
                format!("unknown check `{id}`"),
                Some(format!("valid check ids: {}", checks::ids().join(", "))),
            );
            continue;
        };
        let Some(table) = entry.table() else { continue };
        if let Some(o) = parse_override(def, &table, &entry) {
            overrides.push(o);
        }
    }
    // map keys are unique, so no check is configured twice
    Settings::new(overrides).unwrap_or_default()
}

/// One check's `enabled`, `reason` and limits.
fn parse_override(def: &'static checks::CheckDef, t: &Table, entry: &Field) -> Option<Override> {
    let mut enabled = true;
    let mut reason = None;
    let mut limits = Vec::new();
    let mut ok = true;
    for f in t.entries() {
        let path = f.path();
        let key = path.rsplit_once('.').map(|(_, k)| k).unwrap_or(&path);
        match key {
            "enabled" => match f.bool() {
                Some(b) => enabled = b,
                None => ok = false,
            },
            "reason" => match f.str() {
                Some(s) => reason = Some(s.to_string()),
                None => ok = false,
            },
            _ => {
                let Some(spec) = def.limit(key) else {
                    f.doc.error(
                        f.key_span.clone(),
                        &path,
                        format!("check `{}` has no limit `{key}`", def.id),
                        Some(checks::limit_keys_hint(def)),
                    );
                    ok = false;
                    continue;
                };
                match limit_value(&f, spec.kind) {
                    Some(x) => limits.push((key.to_string(), x)),
                    None => ok = false,
                }
            }
        }
    }
    if !ok {
        return None;
    }
    match Override::new(def, enabled, reason, limits) {
        Ok(o) => Some(o),
        Err(e) => {
            let at = e.key.as_deref().and_then(|k| t.get_named(k));
            let (span, key) = match &at {
                Some(f) => (f.key_span.clone(), f.path()),
                None => (entry.key_span.clone(), entry.path()),
            };
            entry.doc.error(span, &key, e.message, e.hint);
            None
        }
    }
}

fn limit_value(f: &Field, kind: LimitKind) -> Option<f64> {
    match kind {
        LimitKind::Quantity(kind) => match (kind.dimension(), &f.value) {
            // a kind without a unit (molar mass) is a plain number
            (None, _) => f.number(),
            (Some(dim), crate::input::toml_doc::Value::String(_)) => f.quantity(dim),
            (Some(dim), _) => {
                f.error(
                    format!(
                        "`{}` must be a quantity string with a unit, found `{}`",
                        f.path(),
                        f.text()
                    ),
                    Some(format!(
                        "a {} takes one of: {}",
                        dim.name(),
                        crate::units::symbols_for(dim).join(", ")
                    )),
                );
                None
            }
        },
        LimitKind::Number => f.number(),
        LimitKind::Count | LimitKind::Months => match f.integer() {
            Some(i) if i >= 1 => Some(i as f64),
            Some(i) => {
                f.error(
                    format!(
                        "`{}` must be a positive whole number, found `{i}`",
                        f.path()
                    ),
                    None,
                );
                None
            }
            None => None,
        },
    }
}

/// A non-negative quantity (accuracies, resolutions).
fn bound(t: &Table, key: &'static str, dim: Dimension) -> Option<f64> {
    let f = t.get(key)?;
    let x = f.quantity(dim)?;
    if x >= 0.0 {
        Some(x)
    } else {
        f.error(
            format!("`{}` cannot be negative, found `{}`", f.path(), f.text()),
            None,
        );
        None
    }
}

/// A fraction between 0 and 100 %.
fn fraction(t: &Table, key: &'static str) -> Option<f64> {
    let x = bound(t, key, Dimension::Fraction)?;
    if x <= 1.0 {
        return Some(x);
    }
    if let Some(f) = t.get(key) {
        f.error(
            format!("`{}` must be at most 100 %, found `{}`", f.path(), f.text()),
            None,
        );
    }
    None
}

fn positive_number(t: &Table, key: &'static str) -> Option<f64> {
    let f = t.get(key)?;
    let x = f.number()?;
    if x > 0.0 {
        Some(x)
    } else {
        f.error(
            format!("`{}` must be greater than zero, found {x}", f.path()),
            None,
        );
        None
    }
}

/// The calibration record every instrument table may carry.
fn calibration(t: &Table) -> Calibration {
    Calibration {
        serial: t.opt_text("serial"),
        calibrated: t.opt_date("calibrated", "2026-05-11"),
        interval_months: t.opt_count("interval_months", 1..=240).map(|n| n as u32),
    }
}

fn parse_instruments(r: &Table) -> Instruments {
    let spatial_method = r.get("spatial_method").and_then(|f| {
        let choices: Vec<_> = SpatialMethod::ALL.iter().map(|m| (m.name(), *m)).collect();
        f.choice(&choices)
    });
    let model_bias_fraction = fraction(r, "model_bias");
    if let (Some(SpatialMethod::ModelBias), None) = (spatial_method, r.get("model_bias")) {
        r.error_at(
            "spatial_method",
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
        positioning_u_rel: fraction(r, "positioning"),
        wall_factor_u_rel: fraction(r, "wall_factor"),
        ..Instruments::default()
    };
    if let Some(p) = r.opt_table("pitot") {
        ins.pitot = Pitot {
            coefficient_uncertainty: fraction(&p, "coefficient_uncertainty"),
            coverage_factor: positive_number(&p, "coverage_factor"),
            dof: positive_number(&p, "dof"),
            calibration: calibration(&p),
        };
    }
    if let Some(d) = r.opt_table("dp") {
        ins.dp = dp_gauge(&d);
    }
    if let Some(t) = r.opt_table("thermometer") {
        ins.thermometer = Thermometer {
            accuracy: t.get("accuracy").and_then(|f| thermometer_accuracy(&f)),
            calibration: calibration(&t),
        };
    }
    let gauge = |g: &Table| PressureGauge {
        accuracy_pa: bound(g, "accuracy", Dimension::Pressure),
        calibration: calibration(g),
    };
    if let Some(g) = r.opt_table("barometer") {
        ins.barometer = gauge(&g);
    }
    if let Some(g) = r.opt_table("static") {
        ins.static_gauge = gauge(&g);
    }
    if let Some(t) = r.opt_table("tape") {
        ins.tape = Tape {
            accuracy_m: bound(&t, "accuracy", Dimension::Length),
            calibration: calibration(&t),
        };
    }
    if let Some(g) = r.opt_table("gas") {
        ins.gas = GasAnalysis {
            molar_mass_u_rel: fraction(&g, "molar_mass"),
            calibration: calibration(&g),
        };
    }
    ins
}

fn dp_gauge(d: &Table) -> DpGauge {
    let resolution_pa = bound(d, "resolution", Dimension::Pressure);
    if let (Some(0.0), Some(f)) = (resolution_pa, d.get("resolution")) {
        f.error(
            "`instruments.dp.resolution` must be greater than zero".into(),
            None,
        );
    }
    DpGauge {
        accuracy_fraction: fraction(d, "accuracy"),
        resolution_pa: resolution_pa.filter(|r| *r > 0.0),
        zero_pa: bound(d, "zero", Dimension::Pressure),
        calibration: calibration(d),
    }
}

/// A ± bound in kelvin (or °F as a difference), or a percentage of the absolute temperature.
fn thermometer_accuracy(f: &Field) -> Option<TemperatureAccuracy> {
    let key = f.path();
    let raw = f.str()?;
    match parse_quantity(raw, Dimension::Fraction) {
        Ok(x) if (0.0..=1.0).contains(&x) => Some(TemperatureAccuracy::FractionOfAbsolute(x)),
        Ok(_) => {
            f.error(
                format!("`{key}` must be between 0 and 100 %, found `{raw}`"),
                None,
            );
            None
        }
        Err(_) => match parse_quantity(raw, Dimension::TemperatureDifference) {
            Ok(k) if k >= 0.0 => Some(TemperatureAccuracy::Kelvin(k)),
            Ok(_) => {
                f.error(format!("`{key}` cannot be negative"), None);
                None
            }
            Err(e) => {
                f.error(
                    format!("`{key}`: {e}"),
                    Some("write a ± bound such as \"2 K\", \"3 F\" or \"1.5 %\" of the absolute temperature".into()),
                );
                None
            }
        },
    }
}

/// The unit a quantity string was written in (the recomputed value is shown in it).
fn written_unit(raw: &str, dim: Dimension) -> &'static Unit {
    let t = raw.trim();
    let idx = t
        .find(char::is_whitespace)
        .or_else(|| t.find(|c: char| c.is_alphabetic() || c == '%' || c == '°' || c == '"'));
    idx.and_then(|i| lookup_unit(t[i..].trim()))
        .filter(|u| u.dimension == dim)
        .or_else(|| lookup_unit(dim.si_symbol()))
        .unwrap_or(&crate::units::UNITS[0])
}

/// The basis a reported flow is on: the key's, or for the key `flow` the unit's; a unit naming
/// another basis than its key is a recorded problem.
fn reported_flow(f: &Field, key: &str) -> Option<ReportedQuantity> {
    let raw = f.str()?;
    let unit = written_unit(raw, Dimension::Flow);
    let named = (!matches!(
        unit.symbol,
        "cfm" | "ft3/min" | "cfh" | "ft3/h" | "m3/h" | "m3/s" | "L/s"
    ))
    .then(|| flow_basis(unit))
    .flatten();
    if key == "flow" {
        return Some(ReportedQuantity::flow(named.unwrap_or(FlowBasis::Actual)));
    }
    let q = ReportedQuantity::parse(key)?;
    match (q.basis(), named) {
        (Some(b), Some(n)) if b != n => {
            f.error(
                format!(
                    "`{}` is a flow on the {} basis, but `{raw}` names the {} basis",
                    f.path(),
                    b.words(),
                    n.words()
                ),
                Some(format!(
                    "write the figure in plain cfm or m3/h, or under `flow = \"{raw}\"`"
                )),
            );
            None
        }
        _ => Some(q),
    }
}

fn parse_reported(r: &Table, run_ids: &[&str]) -> Vec<ReportedValue> {
    let mut out = Vec::new();
    if let Some(avg) = r.opt_table("average") {
        reported_values(&avg, ReportedScope::Average, &mut out);
    }
    if let Some(runs) = r.opt_table("run") {
        for entry in runs.entries() {
            let path = entry.path();
            let id = path
                .strip_prefix("reported.run.")
                .unwrap_or(&path)
                .to_string();
            if !run_ids.contains(&id.as_str()) {
                entry.doc.error(
                    entry.key_span.clone(),
                    "reported.run",
                    format!("[reported] names run `{id}`, which the survey does not have"),
                    Some(format!("the survey's runs are: {}", run_ids.join(", "))),
                );
                continue;
            }
            if let Some(t) = entry.table() {
                reported_values(&t, ReportedScope::Run(id), &mut out);
            }
        }
    }
    out
}

fn reported_values(t: &Table, scope: ReportedScope, out: &mut Vec<ReportedValue>) {
    for f in t.entries() {
        let path = f.path();
        let key = path.rsplit_once('.').map(|(_, k)| k).unwrap_or(&path);
        let quantity = if key == "flow"
            || ReportedQuantity::parse(key)
                .and_then(|q| q.basis())
                .is_some()
        {
            reported_flow(&f, key)
        } else if let Some(q) = ReportedQuantity::parse(key) {
            Some(q)
        } else {
            f.doc.error(
                f.key_span.clone(),
                &path,
                format!("unknown reported quantity `{key}`"),
                Some(format!(
                    "use one of: {}, flow, or acfm, scfm, dscfm",
                    ReportedQuantity::ALL.map(|q| q.key()).join(", ")
                )),
            );
            continue;
        };
        let Some(quantity) = quantity else { continue };
        if scope == ReportedScope::Average && quantity == ReportedQuantity::Density {
            f.doc.error(
                f.key_span.clone(),
                &path,
                "density is compared per run, not for the average".into(),
                Some("move it to [reported.run.<id>]".into()),
            );
            continue;
        }
        let dim = quantity.dimension();
        if let Some(si) = f.quantity(dim) {
            let raw = f.text().trim().to_string();
            out.push(ReportedValue {
                scope: scope.clone(),
                quantity,
                value_si: si,
                unit: written_unit(&raw, dim),
                raw,
            });
        }
    }
}

/// The unit of the Δp column of each run's readings file (survey order), as recorded by the
/// readings parser from the `dp[unit]` header (row form) or the `matrix` header.
pub fn dp_record_units(loaded: &Loaded) -> Vec<Option<&'static Unit>> {
    loaded.runs.iter().map(|(_, r)| r.dp_unit).collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::checks::testkit::{run_block, EPA_SURVEY};
    use crate::diag::Diagnostic;
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
        let ids: Vec<&str> = survey.runs.iter().map(|r| r.id.as_str()).collect();
        parse_assess_config("s.toml", &t, &ids)
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
        assert_eq!(
            d.message,
            "`checks.cyclonic-flow` must be a table, found the number `3`"
        );
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
    fn reported_flows_take_their_basis_from_the_key_or_the_unit() {
        let c = parse(
            "[reported]\naverage = { flow = \"61000 Nm3/h\", scfm = \"40000 cfm\" }\n[reported.run.1]\nflow = \"36803 dscfm\"\nactual_flow = \"28.3 m3/s\"\ndry_normal_flow = \"12 m3/s\"\n",
        )
        .unwrap();
        let q: Vec<ReportedQuantity> = c.reported.iter().map(|r| r.quantity).collect();
        assert_eq!(
            q,
            [
                ReportedQuantity::NormalFlow,
                ReportedQuantity::StandardFlow,
                ReportedQuantity::DryStandardFlow,
                ReportedQuantity::ActualFlow,
                ReportedQuantity::DryNormalFlow,
            ]
        );
        // `flow` in plain cfm is actual (common practice: cfm without a prefix is actual)
        let c = parse("[reported]\naverage = { flow = \"5000 cfm\" }\n").unwrap();
        assert_eq!(c.reported[0].quantity, ReportedQuantity::ActualFlow);
        // a unit that names another basis than its key
        let extra = "[reported]\naverage = { dscfm = \"36803 acfm\" }\n";
        let d = one_error(extra);
        assert_eq!(
            d.message,
            "`reported.average.dscfm` is a flow on the standard, dry basis, but `36803 acfm` names the actual basis"
        );
        assert_eq!(position(&d), at(extra, "\"36803 acfm\""));
    }

    #[test]
    fn dp_units_come_from_the_readings_headers() {
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
