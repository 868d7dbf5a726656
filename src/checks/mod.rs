//! Acceptance checks and data-quality findings.
//!
//! Owns the registry of every check ([`REGISTRY`]): its stable id, a one-line description, the
//! standard and clause behind it, its limits as data, the conventions it applies to, and the
//! function that judges it. A check produces [`Finding`]s; findings are results, not errors.
//! The survey's `[checks]` section becomes [`Settings`]: a limit can be tightened, relaxed (a
//! reason is required) or the check disabled (a reason is required), and every change is written
//! into the finding it affects.
//!
//! Families live one per file: [`plane`] (site and layout), [`flow_quality`] (the traverse of one
//! run), [`runs`] (leak checks, temperatures, run-to-run agreement), [`records`] (calibrations) and
//! [`integrity`] (patterns a reviewer looks for, reported values). [`instruments`] holds the
//! instrument data the survey states.
//!
//! Must not read files, print, or look at the clock (the survey date is the reference date), and
//! imports nothing from `input`: the stage in `assess` hands it a [`Subject`].
//!
//! Limits marked *from memory* in methods.md (\[M\]) carry `from_memory: true`: every finding of such
//! a check says so in words and never presents the rule as a verified requirement.

pub mod config;
pub mod flow_quality;
pub mod instruments;
pub mod integrity;
pub mod plane;
pub mod plausibility;
pub mod records;
pub mod runs;

use crate::display::{number, Arg, DisplayTable, Kind, Message, Text};
use crate::flow::{Average, Convention, RunResult};
use crate::plane::Plane;
use crate::readings::RunReadings;
use crate::survey::{ConventionId, RunSpec, Survey};
use crate::units::Unit;
use instruments::Instruments;
use integrity::ReportedValue;
use serde::Serialize;
use std::borrow::Cow;
use std::fmt;

/// The family a finding belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Group {
    /// Where the plane is and how it is laid out.
    Plane,
    /// The velocity traverse of a run.
    Flow,
    /// A run as a whole, or runs against each other.
    Run,
    /// Calibrations and other records.
    Records,
    /// Data integrity: patterns a reviewer looks for.
    Data,
}

/// How a finding's message carries the survey's setting of the check: ` (limit relaxed …: reason)`.
fn setting_suffix(setting: Text) -> Text {
    crate::text!(" ({})", setting)
}

impl Finding {
    /// The message without the survey's setting, in the job's units, for a page that prints each
    /// setting once on its own (the report's deviations).
    pub fn message_without_setting(&self) -> String {
        let table = self.message.table();
        let message = self.message.render(table);
        match &self.setting {
            Some(s) => message.replacen(&setting_suffix(s.text().clone()).render(table), "", 1),
            None => message,
        }
    }
}

/// The outcome of one check.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Status {
    NotApplicable,
    Pass,
    Warn,
    Fail,
}

impl Status {
    pub fn name(self) -> &'static str {
        match self {
            Status::Pass => "pass",
            Status::Warn => "warn",
            Status::Fail => "fail",
            Status::NotApplicable => "not-applicable",
        }
    }
}

impl fmt::Display for Status {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// One judged check. Serialised with the contract's keys (`id`, `status`, `message`, `source`)
/// plus `group`, `measured` (SI; angles in degrees, fractions as fractions, distances in
/// diameters; `null` when there is no single value), `unit` (the SI symbol of `measured`),
/// `limit` (in words), and where they apply `subject` (what the finding is about when a check
/// yields several) and `setting` (how the survey changed the check).
///
/// The words (`message`, `limit`, `setting`) are kept as values with their quantities in SI and
/// rendered only when printed: in the job's units by `Display` and in JSON, in any other
/// table's units by [`Message::render`].
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Finding {
    /// The check's id (the registry's own words: not copied per finding).
    pub id: Cow<'static, str>,
    pub group: Group,
    pub status: Status,
    pub message: Message,
    pub source: Cow<'static, str>,
    pub measured: Option<f64>,
    pub unit: &'static str,
    pub limit: LimitWords,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub subject: Option<String>,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub setting: Option<Message>,
}

/// The most limits one check has (the registry is checked against it).
pub const MAX_LIMITS: usize = 4;

/// A finding's limits in words (`mean |yaw| ≤ 20°`), worded only when printed: a check states
/// its limit in every finding, and most findings are never read (`review` prints only what
/// fails or warns).
#[derive(Debug, Clone, PartialEq)]
pub struct LimitWords(LimitInner);

#[derive(Debug, Clone, PartialEq)]
enum LimitInner {
    /// A check's own criterion and limits with the values in force (`None`: a computed limit
    /// with no value, worded by what it is computed from).
    Rule {
        criterion: &'static str,
        specs: &'static [LimitSpec],
        values: [Option<f64>; MAX_LIMITS],
        table: DisplayTable,
    },
    /// Words a check set itself.
    Words(Message),
}

impl LimitWords {
    /// Words a check sets itself in place of its limits.
    pub fn words(text: impl Into<Text>, table: DisplayTable) -> LimitWords {
        LimitWords(LimitInner::Words(Message::new(text, table)))
    }

    /// The words as a [`Text`].
    pub fn text(&self) -> Text {
        match &self.0 {
            LimitInner::Words(m) => m.text().clone(),
            LimitInner::Rule {
                criterion,
                specs,
                values,
                ..
            } => {
                let criterion = (!criterion.is_empty()).then(|| Text::from(*criterion));
                Text::join(
                    criterion
                        .into_iter()
                        .chain(
                            specs
                                .iter()
                                .zip(values)
                                .map(|(spec, v)| match (v, spec.default) {
                                    (Some(v), _) => spec.words(limit_arg(*v, spec.kind)),
                                    (None, LimitDefault::Computed(what)) => spec.words(what.into()),
                                    (None, LimitDefault::Fixed(d)) => {
                                        spec.words(limit_arg(d, spec.kind))
                                    }
                                }),
                        ),
                    "; ",
                )
            }
        }
    }

    /// The words in another table's units.
    pub fn render(&self, table: &DisplayTable) -> String {
        self.text().render(table)
    }

    fn table(&self) -> &DisplayTable {
        match &self.0 {
            LimitInner::Words(m) => m.table(),
            LimitInner::Rule { table, .. } => table,
        }
    }
}

impl fmt::Display for LimitWords {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.render(self.table()))
    }
}

impl PartialEq<&str> for LimitWords {
    fn eq(&self, other: &&str) -> bool {
        self.render(self.table()) == *other
    }
}

impl Serialize for LimitWords {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_str(self)
    }
}

/// What a check is judged over.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Scope {
    /// Once per survey (the plane, the records).
    Survey,
    /// Once per run.
    Run,
}

/// How a limit value is written in `[checks]` and printed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LimitKind {
    /// A quantity string with a unit (`"25 deg"`, `"0.03 inH2O"`, `"10 %"`, `"6 D"`), shown
    /// as this kind of quantity.
    Quantity(Kind),
    /// A plain number (a ratio such as the T factor).
    Number,
    /// A plain whole count (points, readings).
    Count,
    /// A plain whole number of months.
    Months,
}

/// Which way a limit becomes stricter.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Stricter {
    /// A smaller value is stricter (a maximum: mean |yaw| ≤ 20°).
    Lower,
    /// A larger value is stricter (a minimum: 8 D straight run).
    Higher,
}

/// Where a limit's default comes from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum LimitDefault {
    /// A fixed value, SI.
    Fixed(f64),
    /// Worked out for the plane by the check (e.g. the point-count advisor); any change in
    /// `[checks]` needs a reason, since the parser cannot know whether it relaxes.
    Computed(&'static str),
}

/// One configurable limit of a check.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LimitSpec {
    /// Key in the check's `[checks.<id>]` table.
    pub key: &'static str,
    /// The limit in words with `{}` where the value goes, e.g. `"mean |yaw| ≤ {}"`, then one
    /// `{}` for each of [`LimitSpec::quoting`].
    pub text: &'static str,
    pub default: LimitDefault,
    pub kind: LimitKind,
    pub stricter: Stricter,
    /// Fixed quantities of the rule the words quote besides the limit (SI), shown in the job's
    /// units like the limit: `"diameter ≥ {} and area ≥ {}"` quotes Method 1's 113 in².
    pub quoting: &'static [(Kind, f64)],
}

impl LimitSpec {
    /// A limit with a fixed default and no quoted quantities (most checks' limits).
    pub const fn fixed(
        key: &'static str,
        text: &'static str,
        v: f64,
        kind: LimitKind,
        stricter: Stricter,
    ) -> LimitSpec {
        LimitSpec {
            key,
            text,
            default: LimitDefault::Fixed(v),
            kind,
            stricter,
            quoting: &[],
        }
    }
}

/// Judges a survey-scope check.
pub type SurveyCheck = fn(&Rule, &Subject) -> Vec<Finding>;
/// Judges a run-scope check for one run.
pub type RunCheck = fn(&Rule, &Subject, &RunView) -> Finding;

/// The function behind a check.
#[derive(Clone, Copy)]
pub enum Judge {
    Survey(SurveyCheck),
    Run(RunCheck),
}

impl fmt::Debug for Judge {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Judge::Survey(_) => f.write_str("Judge::Survey"),
            Judge::Run(_) => f.write_str("Judge::Run"),
        }
    }
}

/// A check in the registry.
#[derive(Debug, Clone, Copy)]
pub struct CheckDef {
    /// Stable kebab-case id (ours; printed, used in `[checks]`; never renamed).
    pub id: &'static str,
    pub group: Group,
    pub description: &'static str,
    /// Standard and clause, or "common practice".
    pub source: &'static str,
    /// The part of the rule that is not configurable, in words (may be empty), e.g.
    /// "no negative Δp".
    pub criterion: &'static str,
    pub limits: &'static [LimitSpec],
    pub conventions: &'static [ConventionId],
    /// The limit is from memory (methods.md \[M\]): findings say so.
    pub from_memory: bool,
    /// The status a violated limit gives (`Fail`, or `Warn` for indicators).
    pub on_violation: Status,
    pub judge: Judge,
}

impl CheckDef {
    pub fn scope(&self) -> Scope {
        match self.judge {
            Judge::Survey(_) => Scope::Survey,
            Judge::Run(_) => Scope::Run,
        }
    }

    pub fn limit(&self, key: &str) -> Option<&'static LimitSpec> {
        self.limits.iter().find(|l| l.key == key)
    }

    pub fn applies_to(&self, convention: ConventionId) -> bool {
        self.conventions.contains(&convention)
    }
}

/// Convention sets used by the registry.
pub const ALL: &[ConventionId] = &ConventionId::ALL;
pub const STACK: &[ConventionId] = &[ConventionId::EpaMethod2, ConventionId::Iso16911];
pub const EPA: &[ConventionId] = &[ConventionId::EpaMethod2];
pub const ISO: &[ConventionId] = &[ConventionId::Iso16911];
pub const HVAC: &[ConventionId] = &[ConventionId::HvacIp, ConventionId::HvacSi];

/// Every check, in the order findings are listed.
pub static REGISTRY: &[&CheckDef] = &[
    &plane::STRAIGHT_RUN_EPA,
    &plane::STRAIGHT_RUN_EN15259,
    &plane::STRAIGHT_RUN_HVAC,
    &plane::DUCT_SIZE,
    &plane::METHOD_2H_SIZE,
    &plane::POINT_COUNT,
    &plausibility::GEOMETRY_RANGE_STACK,
    &plausibility::GEOMETRY_RANGE_HVAC,
    &plausibility::PROBE_REACH,
    &plausibility::METHOD_2H_DEFAULT_POINTS,
    &plausibility::METHOD_2H_WALL_TRAVERSE,
    &plane::WALL_DISTANCE_EPA,
    &plane::WALL_DISTANCE_EN15259,
    &flow_quality::CYCLONIC_FLOW,
    &flow_quality::RESULTANT_ANGLE,
    &flow_quality::EN15259_FLOW_ANGLE,
    &flow_quality::EN15259_REVERSE_FLOW,
    &flow_quality::EN15259_MINIMUM_DP,
    &flow_quality::EN15259_VELOCITY_RATIO,
    &flow_quality::DISTRIBUTION,
    &flow_quality::NEGATIVE_READINGS,
    &flow_quality::GAUGE_SENSITIVITY,
    &flow_quality::METHOD_2F_VELOCITY,
    &flow_quality::LINE_ASYMMETRY,
    &flow_quality::OFF_CENTRE_PEAK,
    &runs::LEAK_CHECK,
    &runs::RUNS_COMPLETE,
    &plausibility::GAS_COMPOSITION,
    &plausibility::MOISTURE_SATURATION,
    &plausibility::METHOD4_SAMPLE_VOLUME,
    &runs::STACK_TEMPERATURE_RANGE,
    &runs::AIR_TEMPERATURE_RANGE,
    &runs::RUN_AGREEMENT,
    &runs::STEADY_FLOW_METHOD_1A,
    &records::PROBE_CALIBRATION,
    &records::INSTRUMENT_CALIBRATION,
    &plausibility::POINT_OUTLIER,
    &plausibility::DP_RESOLUTION,
    &integrity::IDENTICAL_SEQUENCES,
    &integrity::REPEATED_VALUES,
    &integrity::RECORDED_RESOLUTION,
    &integrity::ROUND_NUMBERS,
    &integrity::REPORTED_VALUES,
];

/// A registry entry in words, for `--help`, the README and the report's list of rules.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CheckInfo {
    pub id: &'static str,
    pub group: Group,
    pub scope: Scope,
    pub description: &'static str,
    pub source: &'static str,
    /// The default limits in words.
    pub limit: String,
    /// `[checks]` keys that set a limit.
    pub keys: Vec<&'static str>,
    pub conventions: Vec<&'static str>,
    pub from_memory: bool,
    pub on_violation: Status,
}

/// Every check in words, with its default limits shown in `table`'s units.
pub fn describe(table: &DisplayTable) -> Vec<CheckInfo> {
    REGISTRY
        .iter()
        .map(|def| CheckInfo {
            id: def.id,
            group: def.group,
            scope: def.scope(),
            description: def.description,
            source: def.source,
            limit: Rule::new(def, None, *table).limit_text(&[]).render(table),
            keys: def.limits.iter().map(|l| l.key).collect(),
            conventions: def.conventions.iter().map(|c| c.name()).collect(),
            from_memory: def.from_memory,
            on_violation: def.on_violation,
        })
        .collect()
}

/// The check with this id.
pub fn find(id: &str) -> Option<&'static CheckDef> {
    REGISTRY.iter().copied().find(|c| c.id == id)
}

/// All ids, for hints.
pub fn ids() -> Vec<&'static str> {
    REGISTRY.iter().map(|c| c.id).collect()
}

/// How the survey changed one check. Built by [`Override::new`], which validates it.
#[derive(Debug, Clone)]
pub struct Override {
    def: &'static CheckDef,
    enabled: bool,
    reason: Option<String>,
    /// (key, SI value) for each limit set.
    limits: Vec<(&'static str, f64)>,
}

impl PartialEq for Override {
    fn eq(&self, other: &Self) -> bool {
        self.def.id == other.def.id
            && self.enabled == other.enabled
            && self.reason == other.reason
            && self.limits == other.limits
    }
}

/// Why a `[checks]` entry is not acceptable. `key` names the entry's key the problem is about
/// (`None` for the entry as a whole) so the parser can point at it.
#[derive(Debug, Clone, PartialEq)]
pub struct OverrideError {
    pub key: Option<String>,
    pub message: String,
    pub hint: Option<String>,
}

impl fmt::Display for OverrideError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

/// What a new limit value does relative to the default.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Change {
    Tightened,
    Relaxed,
    Unchanged,
    /// The default is computed for the plane; the direction is known only when checking.
    Changed,
}

impl LimitSpec {
    /// The limit's words with `value` in its place and the quantities it quotes.
    pub fn words(&self, value: Arg) -> Text {
        let mut args = vec![value];
        args.extend(
            self.quoting
                .iter()
                .map(|&(kind, si)| crate::display::q(kind, si)),
        );
        Text::template(self.text, args)
    }

    /// Whether `value` tightens or relaxes this limit.
    pub fn change(&self, value: f64) -> Change {
        match self.default {
            LimitDefault::Computed(_) => Change::Changed,
            LimitDefault::Fixed(d) => compare(self.stricter, d, value),
        }
    }
}

fn compare(stricter: Stricter, default: f64, value: f64) -> Change {
    let tol = 1e-12 * default.abs().max(1e-300);
    if (value - default).abs() <= tol {
        Change::Unchanged
    } else if (value < default) == (stricter == Stricter::Lower) {
        Change::Tightened
    } else {
        Change::Relaxed
    }
}

impl Override {
    /// Validates a `[checks.<id>]` entry: every key names a limit of the check, values are
    /// finite (counts and months whole and positive), and a reason is given when the check is
    /// disabled, a limit relaxed, or a computed limit changed.
    pub fn new(
        def: &'static CheckDef,
        enabled: bool,
        reason: Option<String>,
        limits: Vec<(String, f64)>,
    ) -> Result<Override, OverrideError> {
        let reason = reason
            .map(|r| r.trim().to_string())
            .filter(|r| !r.is_empty());
        let mut out = Vec::with_capacity(limits.len());
        for (key, value) in limits {
            let Some(spec) = def.limit(&key) else {
                return Err(OverrideError {
                    message: format!("check `{}` has no limit `{key}`", def.id),
                    hint: Some(limit_keys_hint(def)),
                    key: Some(key),
                });
            };
            let whole = matches!(spec.kind, LimitKind::Count | LimitKind::Months);
            if !value.is_finite() || (whole && (value < 1.0 || value.fract() != 0.0)) {
                return Err(OverrideError {
                    message: format!(
                        "limit `{key}` of `{}` must be {}, found {value}",
                        def.id,
                        if whole {
                            "a positive whole number"
                        } else {
                            "a finite number"
                        }
                    ),
                    hint: None,
                    key: Some(key),
                });
            }
            if out.iter().any(|(k, _)| *k == spec.key) {
                return Err(OverrideError {
                    message: format!("limit `{key}` of `{}` is set twice", def.id),
                    hint: None,
                    key: Some(key),
                });
            }
            match spec.change(value) {
                Change::Relaxed | Change::Changed if reason.is_none() => {
                    return Err(OverrideError {
                        message: format!(
                            "limit `{key}` of `{}` is {} without a reason",
                            def.id,
                            if spec.change(value) == Change::Relaxed {
                                "relaxed"
                            } else {
                                "changed from the plane's computed value"
                            }
                        ),
                        hint: Some(format!(
                            "add reason = \"…\" to [checks.{}]; the reason is printed in the finding",
                            def.id
                        )),
                        key: Some(key),
                    });
                }
                _ => {}
            }
            out.push((spec.key, value));
        }
        if !enabled && reason.is_none() {
            return Err(OverrideError {
                key: Some("enabled".into()),
                message: format!("check `{}` is disabled without a reason", def.id),
                hint: Some(format!(
                    "add reason = \"…\" to [checks.{}]; the reason is printed in the report",
                    def.id
                )),
            });
        }
        Ok(Override {
            def,
            enabled,
            reason,
            limits: out,
        })
    }

    pub fn id(&self) -> &'static str {
        self.def.id
    }
    pub fn enabled(&self) -> bool {
        self.enabled
    }
    pub fn reason(&self) -> Option<&str> {
        self.reason.as_deref()
    }
    pub fn limits(&self) -> &[(&'static str, f64)] {
        &self.limits
    }
}

/// The hint listing a check's limit keys.
pub fn limit_keys_hint(def: &CheckDef) -> String {
    if def.limits.is_empty() {
        format!(
            "`{}` has no configurable limit; it accepts `enabled` and `reason`",
            def.id
        )
    } else {
        format!(
            "`{}` accepts {}, `enabled` and `reason`",
            def.id,
            def.limits
                .iter()
                .map(|l| format!("`{}`", l.key))
                .collect::<Vec<_>>()
                .join(", ")
        )
    }
}

/// The survey's check settings: at most one override per check.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Settings {
    overrides: Vec<Override>,
}

impl Settings {
    /// Settings from validated overrides; a second override of the same check is refused.
    pub fn new(overrides: Vec<Override>) -> Result<Settings, OverrideError> {
        for (i, o) in overrides.iter().enumerate() {
            if overrides[..i].iter().any(|p| p.id() == o.id()) {
                return Err(OverrideError {
                    key: None,
                    message: format!("check `{}` is configured twice", o.id()),
                    hint: None,
                });
            }
        }
        Ok(Settings { overrides })
    }

    pub fn get(&self, id: &str) -> Option<&Override> {
        self.overrides.iter().find(|o| o.id() == id)
    }

    pub fn overrides(&self) -> &[Override] {
        &self.overrides
    }
}

/// One run as the checks see it.
#[derive(Debug, Clone, Copy)]
pub struct RunView<'a> {
    pub spec: &'a RunSpec,
    pub result: &'a RunResult,
    pub readings: &'a RunReadings,
    /// The unit the Δp column was recorded in (from the readings file header), if known.
    pub dp_unit: Option<&'static Unit>,
    /// Counts toward the average (`pipeline::run_validity`).
    pub valid: bool,
    /// Why the run is void, when it is.
    pub void_reason: Option<&'a str>,
}

/// Everything the checks judge.
#[derive(Debug, Clone)]
pub struct Subject<'a> {
    pub survey: &'a Survey,
    pub convention: &'a Convention,
    pub plane: &'a Plane,
    pub runs: Vec<RunView<'a>>,
    /// The average over valid runs.
    pub average: Option<&'a Average>,
    pub instruments: &'a Instruments,
    pub reported: &'a [ReportedValue],
    /// Valid runs the test needs (`[survey] runs_required`).
    pub runs_required: usize,
    /// The Method 2H calculational procedure per run that has a wall-effects traverse.
    pub wall_effects: &'a [(String, crate::flow::WallEffects)],
}

impl Subject<'_> {
    /// The job's display table: findings print in its units (JSON messages too).
    pub fn table(&self) -> DisplayTable {
        self.convention.display_table()
    }

    /// Runs that count toward the average.
    pub fn valid_runs(&self) -> usize {
        self.runs.iter().filter(|r| r.valid).count()
    }

    /// The valid runs reach `runs_required`.
    pub fn complete(&self) -> bool {
        self.valid_runs() >= self.runs_required
    }
}

/// A check with the survey's settings applied; builds the findings.
#[derive(Debug, Clone)]
pub struct Rule<'a> {
    pub def: &'static CheckDef,
    setting: Option<&'a Override>,
    table: DisplayTable,
}

impl<'a> Rule<'a> {
    pub fn new(def: &'static CheckDef, setting: Option<&'a Override>, table: DisplayTable) -> Self {
        Rule {
            def,
            setting,
            table,
        }
    }

    fn set_value(&self, key: &str) -> Option<f64> {
        self.setting?
            .limits
            .iter()
            .find(|(k, _)| *k == key)
            .map(|(_, v)| *v)
    }

    /// The value of a fixed-default limit, as the survey set it.
    pub fn value(&self, key: &str) -> f64 {
        match (self.set_value(key), self.def.limit(key)) {
            (Some(v), _) => v,
            (
                None,
                Some(LimitSpec {
                    default: LimitDefault::Fixed(d),
                    ..
                }),
            ) => *d,
            _ => {
                debug_assert!(false, "check {} has no fixed limit `{key}`", self.def.id);
                f64::NAN
            }
        }
    }

    /// The value of a computed-default limit: the survey's, else `computed`.
    pub fn value_or(&self, key: &str, computed: f64) -> f64 {
        self.set_value(key).unwrap_or(computed)
    }

    fn format(&self, spec: &LimitSpec, v: f64) -> Arg {
        limit_arg(v, spec.kind)
    }

    /// The limits with the values in force (`computed` fills computed defaults), to be worded
    /// when printed.
    pub fn limit_words(&self, computed: &[(&str, f64)]) -> LimitWords {
        let mut values = [None; MAX_LIMITS];
        for (slot, spec) in values.iter_mut().zip(self.def.limits) {
            *slot = match spec.default {
                LimitDefault::Fixed(_) => Some(self.value(spec.key)),
                LimitDefault::Computed(_) => self.set_value(spec.key).or_else(|| {
                    computed
                        .iter()
                        .find(|(k, _)| *k == spec.key)
                        .map(|(_, v)| *v)
                }),
            };
        }
        debug_assert!(self.def.limits.len() <= MAX_LIMITS);
        LimitWords(LimitInner::Rule {
            criterion: self.def.criterion,
            specs: &self.def.limits[..self.def.limits.len().min(MAX_LIMITS)],
            values,
            table: self.table,
        })
    }

    /// The limits in words with the values in force (`computed` fills computed defaults).
    pub fn limit_text(&self, computed: &[(&str, f64)]) -> Text {
        self.limit_words(computed).text()
    }

    /// How the survey changed this check, in words, e.g. "limit relaxed from 20° to 25°: …".
    pub fn setting_text(&self, computed: &[(&str, f64)]) -> Option<Text> {
        let o = self.setting?;
        let mut parts = Vec::new();
        let single = self.def.limits.len() == 1;
        for (key, v) in &o.limits {
            let Some(spec) = self.def.limit(key) else {
                continue;
            };
            let name: Text = if single {
                "limit".into()
            } else {
                format!("limit `{key}`").into()
            };
            let default = match spec.default {
                LimitDefault::Fixed(d) => Some(d),
                LimitDefault::Computed(_) => {
                    computed.iter().find(|(k, _)| k == key).map(|(_, v)| *v)
                }
            };
            let Some(d) = default else {
                parts.push(crate::text!("{} set to {}", name, self.format(spec, *v)));
                continue;
            };
            let verb = match compare(spec.stricter, d, *v) {
                Change::Tightened => "tightened",
                Change::Relaxed => "relaxed",
                _ => "kept",
            };
            parts.push(if verb == "kept" {
                crate::text!("{} kept at {}", name, self.format(spec, d))
            } else {
                crate::text!(
                    "{} {} from {} to {}",
                    name,
                    verb,
                    self.format(spec, d),
                    self.format(spec, *v)
                )
            });
        }
        if parts.is_empty() {
            return None;
        }
        let mut s = Text::join(parts, ", ");
        if let Some(r) = &o.reason {
            s.push(": ");
            s.push(r.clone());
        }
        Some(s)
    }

    /// The status a violated limit gives.
    pub fn violated(&self) -> Status {
        self.def.on_violation
    }

    /// A finding of this check. `computed` gives the values of computed limits.
    pub fn finding(
        &self,
        status: Status,
        measured: Option<f64>,
        unit: &'static str,
        message: impl Into<Text>,
        computed: &[(&str, f64)],
    ) -> Finding {
        let mut message = message.into();
        let setting = self.setting_text(computed);
        if let Some(s) = &setting {
            message.push(setting_suffix(s.clone()));
        }
        if self.def.from_memory && status != Status::NotApplicable {
            message.push(" [limit from memory, not yet confirmed against the standard]");
        }
        Finding {
            id: Cow::Borrowed(self.def.id),
            group: self.def.group,
            status,
            message: Message::new(message, self.table),
            source: Cow::Borrowed(self.def.source),
            measured: measured.filter(|m| m.is_finite()),
            unit,
            limit: self.limit_words(computed),
            subject: None,
            setting: setting.map(|s| Message::new(s, self.table)),
        }
    }

    /// The job's display table (for words a check sets itself).
    pub fn table(&self) -> DisplayTable {
        self.table
    }

    /// A not-applicable finding saying why.
    pub fn not_applicable(&self, why: impl Into<Text>) -> Finding {
        self.finding(Status::NotApplicable, None, "", why, &[])
    }

    /// The finding of a disabled check.
    fn disabled(&self, reason: &str) -> Finding {
        let mut f = self.finding(
            Status::NotApplicable,
            None,
            "",
            format!("check disabled by the survey: {reason}"),
            &[],
        );
        f.setting = Some(Message::new(format!("disabled: {reason}"), self.table));
        f
    }
}

/// Findings of every check that applies, survey-scope and per run.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Findings {
    pub survey: Vec<Finding>,
    /// One list per run of the subject, in order.
    pub runs: Vec<Vec<Finding>>,
}

/// Runs every registered check that applies to the survey's convention.
pub fn run_all(subject: &Subject, settings: &Settings) -> Findings {
    let table = subject.table();
    // room for every check's finding up front: a finding is a few hundred bytes, and growing
    // the lists moved them again and again
    let mut out = Findings {
        survey: Vec::with_capacity(REGISTRY.len()),
        runs: (0..subject.runs.len())
            .map(|_| Vec::with_capacity(REGISTRY.len()))
            .collect(),
    };
    for def in REGISTRY.iter().copied() {
        if !def.applies_to(subject.survey.convention) {
            continue;
        }
        let setting = settings.get(def.id);
        let rule = Rule::new(def, setting, table);
        let disabled = setting
            .filter(|s| !s.enabled())
            .map(|s| s.reason().unwrap_or(""));
        match def.judge {
            Judge::Survey(f) => match disabled {
                Some(r) => out.survey.push(rule.disabled(r)),
                None => out.survey.extend(f(&rule, subject)),
            },
            Judge::Run(f) => {
                for (i, run) in subject.runs.iter().enumerate() {
                    out.runs[i].push(match disabled {
                        Some(r) => rule.disabled(r),
                        None => f(&rule, subject, run),
                    });
                }
            }
        }
    }
    out
}

/// The worst status of a set of findings (`NotApplicable` when empty).
pub fn worst<'a>(findings: impl IntoIterator<Item = &'a Finding>) -> Status {
    findings
        .into_iter()
        .map(|f| f.status)
        .max()
        .unwrap_or(Status::NotApplicable)
}

/// A number to about five significant figures, without trailing zeros (for words built outside
/// a [`Text`], e.g. review notes).
pub fn num(x: f64) -> String {
    crate::display::significant(x, 5)
}

/// A fraction as a percentage, e.g. `0.7` → `70 %`.
pub fn pct(fraction: f64) -> String {
    format!("{} %", crate::display::significant(fraction * 100.0, 4))
}

/// A limit value, as an argument of a limit's words.
pub fn limit_arg(v: f64, kind: LimitKind) -> Arg {
    match kind {
        LimitKind::Quantity(k) => crate::display::q(k, v),
        LimitKind::Number => number(v),
        LimitKind::Count => Arg::Int(v.round() as i64),
        LimitKind::Months => crate::text!("{} months", v.round() as i64).into(),
    }
}

#[cfg(test)]
pub(crate) mod testkit;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn no_check_has_more_limits_than_a_finding_keeps() {
        for def in REGISTRY.iter() {
            assert!(
                def.limits.len() <= MAX_LIMITS,
                "{} has {} limits; LimitWords keeps {MAX_LIMITS}",
                def.id,
                def.limits.len()
            );
        }
    }

    #[test]
    fn registry_ids_are_unique_kebab_case_and_described() {
        let ids = ids();
        for (i, id) in ids.iter().enumerate() {
            assert!(!ids[..i].contains(id), "duplicate id {id}");
            assert!(
                id.chars()
                    .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '-')
                    && !id.starts_with('-')
                    && !id.ends_with('-'),
                "{id} is not kebab-case"
            );
        }
        for def in REGISTRY {
            assert!(
                !def.description.is_empty() && !def.source.is_empty(),
                "{}",
                def.id
            );
            assert!(!def.conventions.is_empty(), "{}", def.id);
            assert!(
                !def.limits.is_empty() || !def.criterion.is_empty(),
                "{} states no limit",
                def.id
            );
            assert!(
                matches!(def.on_violation, Status::Fail | Status::Warn),
                "{}",
                def.id
            );
            for l in def.limits {
                assert_eq!(
                    l.text.matches("{}").count(),
                    1 + l.quoting.len(),
                    "{} {}",
                    def.id,
                    l.key
                );
                if let LimitKind::Quantity(kind) = l.kind {
                    assert!(kind.dimension().is_some(), "{} {}", def.id, l.key);
                }
            }
            // the words carry no quantity of their own: those are quoted in the job's units
            for words in [def.description, def.criterion]
                .into_iter()
                .chain(def.limits.iter().map(|l| l.text))
            {
                let w: Vec<&str> = words.split(' ').collect();
                for pair in w.windows(2) {
                    let number = pair[0].chars().last().is_some_and(|c| c.is_ascii_digit());
                    let unit = pair[1].trim_end_matches([',', ')', ';']);
                    // percent, diameters and degrees read the same in every system
                    let system_bound = crate::units::lookup_unit(unit).is_some_and(|u| {
                        use crate::units::Dimension::{Angle, Diameters, Fraction};
                        !matches!(u.dimension, Fraction | Diameters | Angle)
                    });
                    assert!(
                        !(number && system_bound),
                        "{}: `{} {unit}` in {words:?}",
                        def.id,
                        pair[0]
                    );
                }
            }
        }
        assert!(find("cyclonic-flow").is_some());
        assert!(find("cyclonic").is_none());
    }

    #[test]
    fn override_needs_a_reason_to_relax_or_disable() {
        let def = find("cyclonic-flow").unwrap();
        // tightening needs no reason
        let o = Override::new(def, true, None, vec![("limit".into(), 15.0)]).unwrap();
        assert_eq!(o.limits(), &[("limit", 15.0)]);
        let e = Override::new(def, true, None, vec![("limit".into(), 25.0)]).unwrap_err();
        assert_eq!(e.key.as_deref(), Some("limit"));
        assert!(
            e.message.to_string().contains("relaxed without a reason"),
            "{e}"
        );
        let e = Override::new(def, false, Some("  ".into()), vec![]).unwrap_err();
        assert_eq!(e.key.as_deref(), Some("enabled"));
        let e = Override::new(def, true, None, vec![("mean".into(), 15.0)]).unwrap_err();
        assert!(e.hint.unwrap().contains("`limit`"));
        // whole counts only
        let pc = find("repeated-values").unwrap();
        assert!(Override::new(
            pc,
            true,
            Some("x".into()),
            vec![("longest_run".into(), 2.5)]
        )
        .is_err());
    }

    fn ip() -> DisplayTable {
        DisplayTable::new(
            ConventionId::EpaMethod2,
            crate::display::UnitSystem::InchPound,
        )
    }

    #[test]
    fn describe_lists_every_check_with_its_default_limits() {
        let all = describe(&ip());
        assert_eq!(all.len(), REGISTRY.len());
        let c = all.iter().find(|c| c.id == "gauge-sensitivity").unwrap();
        assert!(c.limit.contains("mean Δp ≥ 0.05 inH2O"), "{}", c.limit);
        assert_eq!(c.keys, ["mean_dp", "fraction_below", "t_factor"]);
        assert_eq!(c.conventions, ["epa-method-2"]);
        let si = describe(&ip().si());
        let w = si.iter().find(|c| c.id == "wall-distance-epa").unwrap();
        assert!(w.limit.contains("25.4 mm"), "{}", w.limit);
        // a computed limit is named, not given a number
        let p = all.iter().find(|c| c.id == "point-count").unwrap();
        assert_eq!(p.limit, "≥ the layout advisor's minimum number of points");
    }

    #[test]
    fn settings_refuse_two_overrides_of_one_check() {
        let def = find("cyclonic-flow").unwrap();
        let a = Override::new(def, true, None, vec![]).unwrap();
        assert!(Settings::new(vec![a.clone(), a]).is_err());
    }

    #[test]
    fn setting_text_records_the_change() {
        let def = find("cyclonic-flow").unwrap();
        let o = Override::new(
            def,
            true,
            Some("swirl vanes upstream, agreed with the agency".into()),
            vec![("limit".into(), 25.0)],
        )
        .unwrap();
        let rule = Rule::new(def, Some(&o), ip());
        assert_eq!(rule.value("limit"), 25.0);
        assert_eq!(
            rule.setting_text(&[]).unwrap().render(&ip()),
            "limit relaxed from 20° to 25°: swirl vanes upstream, agreed with the agency"
        );
        let f = rule.finding(Status::Pass, Some(22.0), "deg", "mean |yaw| 22°", &[]);
        assert!(
            f.message
                .to_string()
                .contains("limit relaxed from 20° to 25°"),
            "{}",
            f.message
        );
        assert_eq!(f.limit, "mean |yaw| ≤ 25°");
    }

    #[test]
    fn numbers_print_without_noise() {
        assert_eq!(num(16.666666), "16.667");
        assert_eq!(num(1.0757), "1.0757");
        assert_eq!(num(20.0), "20");
        assert_eq!(num(0.05), "0.05");
        assert_eq!(pct(0.7), "70 %");
        let limit = |v, k| Text::from(limit_arg(v, k)).render(&ip());
        // NIST SP 811 B.8: 0.05 inH2O (conventional) = 12.454 Pa; 1 in = 0.0254 m exactly
        assert_eq!(
            limit(
                0.05 * crate::units::PA_PER_INH2O,
                LimitKind::Quantity(Kind::VelocityPressure)
            ),
            "0.05 inH2O"
        );
        assert_eq!(
            limit(12.0 * 0.0254, LimitKind::Quantity(Kind::Length)),
            "12 in"
        );
        assert_eq!(limit(12.0, LimitKind::Months), "12 months");
    }

    #[test]
    fn the_readme_documents_every_check_and_its_limit_keys() {
        let readme = include_str!("../../README.md");
        for def in REGISTRY {
            let row = readme
                .lines()
                .find(|l| l.starts_with(&format!("| `{}` |", def.id)))
                .unwrap_or_else(|| panic!("README has no row for `{}`", def.id));
            for l in def.limits {
                assert!(
                    row.contains(&format!("`{}`", l.key)),
                    "{}: {}",
                    def.id,
                    l.key
                );
            }
        }
    }
}
