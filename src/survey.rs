//! The validated survey: everything about a measurement plane and its runs, in SI, with no file
//! handling. `input::survey` builds it from the TOML file; the calculation modules read it.
//!
//! A `Survey` that exists has a valid duct, layout request, probe and gas description; its readings
//! are attached per run by `input::readings` and checked against the layout there.

use crate::geometry::Duct;
use crate::layout::Method;
use crate::units::FlowBasis;
use chrono::NaiveDate;
use serde::Serialize;

/// Gives an enum `ALL` (every variant, in order), `name()` (its word in files and on the command
/// line) and `parse()`, from one list: a variant left out of the list makes `name` fail to
/// compile, so no list of names can fall behind the enum.
macro_rules! named {
    ($t:ident { $($v:ident => $n:literal),+ $(,)? }) => {
        impl $t {
            pub const ALL: &'static [$t] = &[$($t::$v),+];

            /// The word used in survey files and on the command line.
            pub fn name(self) -> &'static str {
                match self {
                    $($t::$v => $n),+
                }
            }

            /// The variant named `text` (exactly, after trimming).
            pub fn parse(text: &str) -> Option<$t> {
                Self::ALL.iter().copied().find(|v| v.name() == text.trim())
            }

            /// `(name, variant)` pairs, for parsers that list the choices in messages.
            pub fn choices() -> Vec<(&'static str, $t)> {
                Self::ALL.iter().map(|v| (v.name(), *v)).collect()
            }
        }
    };
}

/// The rule book results are computed under.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum ConventionId {
    EpaMethod2,
    Iso16911,
    HvacIp,
    HvacSi,
}

impl ConventionId {
    pub const ALL: [ConventionId; 4] = [
        ConventionId::EpaMethod2,
        ConventionId::Iso16911,
        ConventionId::HvacIp,
        ConventionId::HvacSi,
    ];

    pub fn name(self) -> &'static str {
        match self {
            ConventionId::EpaMethod2 => "epa-method-2",
            ConventionId::Iso16911 => "iso-16911",
            ConventionId::HvacIp => "hvac-ip",
            ConventionId::HvacSi => "hvac-si",
        }
    }

    pub fn parse(text: &str) -> Option<ConventionId> {
        ConventionId::ALL
            .into_iter()
            .find(|c| c.name() == text.trim())
    }

    pub fn is_hvac(self) -> bool {
        matches!(self, ConventionId::HvacIp | ConventionId::HvacSi)
    }
}

/// Duct wall material, for the Method 2H default wall-effects factor.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Construction {
    Steel,
    Brick,
}

named!(Construction {
    Steel => "steel",
    Brick => "brick",
});

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum ProbeKind {
    SType,
    Standard,
}

named!(ProbeKind {
    SType => "s-type",
    Standard => "standard",
});

/// The pitot tube used.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Probe {
    pub kind: ProbeKind,
    pub coefficient: f64,
    pub serial: Option<String>,
    pub calibrated: Option<NaiveDate>,
    /// Specific gravity of the gauge fluid when Δp is read as a liquid column (`dp[in]`, `dp[mm]`).
    pub gauge_fluid_sg: Option<f64>,
    /// The calibration file the coefficient came from, when the survey references one.
    pub calibration: Option<ProbeCalibration>,
    /// Correct a liquid-column Δp for the column of gas it displaces (`(SG·ρw − ρgas)·g·h`); off by
    /// default, refused under EPA Method 2, where a reading is h × SG inches of water.
    pub gauge_gas_column: bool,
    /// Usable length of the probe (tip to handle), to warn when the marks need a longer one.
    pub length_m: Option<f64>,
}

/// A Type S calibration a survey references (`annulus calibrate` format).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ProbeCalibration {
    /// Path as written in the survey.
    pub file: String,
    pub probe: String,
    pub date: NaiveDate,
    pub assigned_coefficient: f64,
    /// All EPA Method 2 §10.1 acceptance criteria met.
    pub accepted: bool,
}

/// The dry gas: a composition, a given molar mass, or air.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum DryGas {
    /// Dry-basis fractions (0..1); N2 is the balance.
    Composition {
        o2: f64,
        co2: f64,
        co: f64,
        ar: Option<f64>,
    },
    /// A given dry molar mass, g/mol.
    MolarMass { g_mol: f64 },
    /// Dry air (HVAC).
    Air,
}

/// EPA Method 4 train data as recorded, SI (see [`crate::gas::method4`]).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Method4Data {
    /// Impinger gain: a liquid volume (mL) or a weighed mass (g, taken as mL).
    pub impinger_gain: crate::gas::ImpingerGain,
    pub silica_gain_kg: f64,
    /// Dry gas meter volume as read (ft³, dcf, m³ or L), m³.
    pub meter_volume_m3: f64,
    pub meter_y: f64,
    /// Absolute pressure at the meter, or the orifice ΔH added to the barometric pressure.
    pub meter_pressure: crate::gas::MeterPressure,
    pub meter_temperature_k: f64,
}

/// How the water vapour content is given.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Moisture {
    /// Water vapour mole fraction Bws (0..1).
    Fraction {
        bws: f64,
    },
    Method4(Method4Data),
    RelativeHumidity {
        rh: f64,
    },
    WetBulb {
        temperature_k: f64,
    },
    DewPoint {
        temperature_k: f64,
    },
    Dry,
}

/// Gas state and composition for the plane.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Gas {
    pub barometric_pa: f64,
    /// Static (gauge) pressure in the duct; negative on induced-draught stacks.
    pub static_pa: f64,
    pub dry: DryGas,
    pub moisture: Moisture,
    /// Used for points whose readings have no temperature.
    pub temperature_k: Option<f64>,
}

impl Gas {
    /// The gas of one run: each condition the run gives replaces the survey's for that run. Dry
    /// composition keys replace one by one (a run giving only `o2` keeps the survey's `co2`); a
    /// run's `dry_molar_mass` replaces any composition; a run's moisture (in any form) replaces the
    /// survey's moisture.
    pub fn for_run(&self, c: &RunConditions) -> Gas {
        let dry = match &c.dry {
            None => self.dry.clone(),
            Some(DryOverride {
                dry_molar_mass: Some(g_mol),
                ..
            }) => DryGas::MolarMass { g_mol: *g_mol },
            Some(d) => {
                let (o2, co2, co, ar) = match &self.dry {
                    DryGas::Composition { o2, co2, co, ar } => (*o2, *co2, *co, *ar),
                    _ => (0.0, 0.0, 0.0, None),
                };
                DryGas::Composition {
                    o2: d.o2.unwrap_or(o2),
                    co2: d.co2.unwrap_or(co2),
                    co: d.co.unwrap_or(co),
                    ar: d.ar.or(ar),
                }
            }
        };
        Gas {
            barometric_pa: c.barometric_pa.unwrap_or(self.barometric_pa),
            static_pa: c.static_pa.unwrap_or(self.static_pa),
            dry,
            moisture: c.moisture.clone().unwrap_or_else(|| self.moisture.clone()),
            temperature_k: c.temperature_k.or(self.temperature_k),
        }
    }
}

/// Dry-gas values a run gives in place of the survey's (fractions 0..1, g/mol).
#[derive(Debug, Clone, PartialEq, Serialize, Default)]
pub struct DryOverride {
    pub o2: Option<f64>,
    pub co2: Option<f64>,
    pub co: Option<f64>,
    pub ar: Option<f64>,
    pub dry_molar_mass: Option<f64>,
}

/// Conditions a `[[run]]` gives for itself; each replaces `[gas]` for that run.
#[derive(Debug, Clone, PartialEq, Serialize, Default)]
pub struct RunConditions {
    pub barometric_pa: Option<f64>,
    pub static_pa: Option<f64>,
    pub temperature_k: Option<f64>,
    pub dry: Option<DryOverride>,
    pub moisture: Option<Moisture>,
}

impl RunConditions {
    /// True when the run gives none of its own conditions.
    pub fn is_empty(&self) -> bool {
        *self == RunConditions::default()
    }
}

/// What to do with zero or negative Δp readings (flow reversal or turbulence).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum NegativePolicy {
    /// Refuse to compute a run with negative readings (default).
    Reject,
    /// Count a negative reading as zero velocity.
    Zero,
    /// Signed velocity −C·√(2|Δp|/ρ) (HVAC diagnostics).
    Signed,
}

named!(NegativePolicy {
    Reject => "reject",
    Zero => "zero",
    Signed => "signed",
});

/// Which measured flow angles correct the point velocities.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum AngleCorrection {
    /// Angles are recorded only (e.g. the cyclonic-flow check).
    None,
    /// EPA Method 2G: axial velocity = v·cos(yaw).
    Yaw,
    /// EPA Method 2F: v·cos(yaw)·cos(pitch).
    YawPitch,
}

named!(AngleCorrection {
    None => "none",
    Yaw => "yaw",
    YawPitch => "yaw-pitch",
});

/// Wall-effects adjustment (EPA Method 2H).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum WallFactor {
    None,
    /// Method 2H default by construction: 0.9900 brick, 0.9950 other (Method 2H §2.2.2).
    Method2hDefault,
    /// Method 2H calculational procedure: the factor is derived from the wall-effects traverse
    /// readings of the runs that have them and applied to every run (Method 2H §2.3).
    Method2hCalculated,
    Given {
        factor: f64,
    },
}

/// Computation choices a survey can make.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FlowOptions {
    /// EPA Method 2 reduced in metric units (eq. 2-9 with 34.97) instead of English (85.49).
    pub epa_metric: bool,
    pub negative: NegativePolicy,
    pub angles: AngleCorrection,
    pub wall_factor: WallFactor,
}

/// Reference conditions overriding the convention's.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ReferenceOverride {
    pub temperature_k: f64,
    pub pressure_pa: f64,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum LeakResult {
    Pass,
    Fail,
}

named!(LeakResult {
    Pass => "pass",
    Fail => "fail",
});

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Default)]
pub struct LeakCheck {
    pub before: Option<LeakResult>,
    pub after: Option<LeakResult>,
}

/// How a readings file is laid out.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum ReadingsForm {
    /// One row per point reading (`line,point,dp[…],…`).
    Rows,
    /// A row per line, a column per point, one quantity named by `header` (e.g. `dp[inH2O]`).
    Matrix { header: String },
}

/// One run as the survey describes it; its readings are read separately.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RunSpec {
    pub id: String,
    /// Path as written in the survey (relative to the survey file).
    pub readings: String,
    pub form: ReadingsForm,
    pub started: Option<String>,
    pub ended: Option<String>,
    pub leak_check: LeakCheck,
    /// The crew voided the run (`void = "reason"`); it stays in the report, out of the average.
    pub void: Option<String>,
    /// Conditions this run gives in place of `[gas]`.
    pub conditions: RunConditions,
    /// Method 2H wall-effects traverse readings of this run (path relative to the survey).
    pub wall_readings: Option<String>,
}

#[derive(Debug, Clone, PartialEq, Serialize, Default)]
pub struct Signoff {
    pub tested_by: Option<String>,
    pub certificate: Option<String>,
    pub reviewed_by: Option<String>,
    /// The firm the test was done for or by, printed in the sign-off block.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub organisation: Option<String>,
}

/// The requested layout.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LayoutRequest {
    pub method: Method,
    pub lines: Option<usize>,
    pub points_per_line: Option<usize>,
    /// Whether each port's line crosses the whole diameter or stops at the centre.
    pub reach: crate::layout::Reach,
}

/// The flow a system was designed for, with the basis its unit names (`8000 acfm` is actual,
/// `8000 scfm` standard, `dscfm` dry standard, `Nm3/h` normal …; plain `cfm` is actual).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DesignFlow {
    pub m3_s: f64,
    pub basis: FlowBasis,
    /// As written, e.g. `"8000 acfm"`.
    pub raw: String,
}

/// A validated survey.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Survey {
    pub title: String,
    pub site: Option<String>,
    pub client: Option<String>,
    pub plane: Option<String>,
    pub date: NaiveDate,
    pub convention: ConventionId,
    pub reference: Option<ReferenceOverride>,
    pub duct: Duct,
    pub construction: Construction,
    pub upstream_d: Option<f64>,
    pub downstream_d: Option<f64>,
    pub port_length_m: f64,
    /// Liner thickness already taken off the duct's inside dimensions (kept for reviews).
    pub liner_m: f64,
    pub layout: LayoutRequest,
    pub probe: Probe,
    pub gas: Gas,
    /// `[design] flow`, when given.
    pub design: Option<DesignFlow>,
    pub options: FlowOptions,
    pub signoff: Signoff,
    pub runs: Vec<RunSpec>,
    /// Valid runs the test needs (`[survey] runs_required`; 3 for stack conventions, 1 for HVAC).
    pub runs_required: usize,
    pub notes: Vec<String>,
}

/// Valid runs a test needs when the survey does not say: three for the stack conventions (the
/// usual test of three runs, e.g. 40 CFR 60.8(f) for performance tests; common practice for flow
/// tests), one for an HVAC traverse.
pub fn default_runs_required(convention: ConventionId) -> usize {
    if convention.is_hvac() {
        1
    } else {
        3
    }
}

impl Survey {
    /// The gas of `run`: the survey's `[gas]` with the run's own conditions in place.
    pub fn gas_for(&self, run: &RunSpec) -> Gas {
        self.gas.for_run(&run.conditions)
    }
}
