//! The instruments a survey states in `[instruments]`: identities, calibration dates and the
//! accuracy figures the uncertainty budget uses.
//!
//! Owns the data model only; `input::assess_config` builds it (validating every value: finite,
//! non-negative, dates as dates) and `assess` turns the figures into budget inputs, with the
//! defaults stated there. Every figure is optional: `None` means "not stated".

use crate::uncertainty::SpatialMethod;
use chrono::NaiveDate;

/// Identity and calibration of one instrument.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Calibration {
    pub serial: Option<String>,
    pub calibrated: Option<NaiveDate>,
    /// Calibration interval; the `instrument-calibration` check's default applies when absent.
    pub interval_months: Option<u32>,
}

/// The instrument roles `[instruments]` knows, by their table key.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Role {
    Pitot,
    DpGauge,
    Thermometer,
    Barometer,
    StaticGauge,
    Tape,
    GasAnalysis,
}

impl Role {
    pub const ALL: [Role; 7] = [
        Role::Pitot,
        Role::DpGauge,
        Role::Thermometer,
        Role::Barometer,
        Role::StaticGauge,
        Role::Tape,
        Role::GasAnalysis,
    ];

    /// The table key under `[instruments]`.
    pub fn key(self) -> &'static str {
        match self {
            Role::Pitot => "pitot",
            Role::DpGauge => "dp",
            Role::Thermometer => "thermometer",
            Role::Barometer => "barometer",
            Role::StaticGauge => "static",
            Role::Tape => "tape",
            Role::GasAnalysis => "gas",
        }
    }

    /// Name in findings.
    pub fn name(self) -> &'static str {
        match self {
            Role::Pitot => "pitot tube",
            Role::DpGauge => "Δp gauge",
            Role::Thermometer => "thermometer",
            Role::Barometer => "barometer",
            Role::StaticGauge => "static-pressure gauge",
            Role::Tape => "tape / rule for duct dimensions",
            Role::GasAnalysis => "gas analysis",
        }
    }
}

/// How a thermometer's accuracy is stated.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum TemperatureAccuracy {
    /// ± bound in kelvin.
    Kelvin(f64),
    /// ± bound as a fraction of the absolute temperature.
    FractionOfAbsolute(f64),
}

/// The pitot tube's coefficient uncertainty as stated (its identity is `[probe]`'s, or here).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Pitot {
    /// Expanded relative uncertainty of the coefficient (certificate), fraction.
    pub coefficient_uncertainty: Option<f64>,
    /// Coverage factor of that figure.
    pub coverage_factor: Option<f64>,
    /// Degrees of freedom of the coefficient's standard uncertainty.
    pub dof: Option<f64>,
    pub calibration: Calibration,
}

/// The differential-pressure gauge.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct DpGauge {
    /// ± bound as a fraction of reading.
    pub accuracy_fraction: Option<f64>,
    /// Display or scale resolution (smallest step), Pa.
    pub resolution_pa: Option<f64>,
    /// ± bound on the zero after zeroing, Pa.
    pub zero_pa: Option<f64>,
    pub calibration: Calibration,
}

#[derive(Debug, Clone, Default, PartialEq)]
pub struct Thermometer {
    pub accuracy: Option<TemperatureAccuracy>,
    pub calibration: Calibration,
}

/// A pressure gauge (barometer, static-pressure gauge).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct PressureGauge {
    /// ± bound, Pa.
    pub accuracy_pa: Option<f64>,
    pub calibration: Calibration,
}

#[derive(Debug, Clone, Default, PartialEq)]
pub struct Tape {
    /// ± bound on each inside dimension, m.
    pub accuracy_m: Option<f64>,
    pub calibration: Calibration,
}

#[derive(Debug, Clone, Default, PartialEq)]
pub struct GasAnalysis {
    /// Relative standard uncertainty of the wet molar mass from composition and moisture.
    pub molar_mass_u_rel: Option<f64>,
    pub calibration: Calibration,
}

/// Everything `[instruments]` states.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Instruments {
    pub pitot: Pitot,
    pub dp: DpGauge,
    pub thermometer: Thermometer,
    pub barometer: PressureGauge,
    pub static_gauge: PressureGauge,
    pub tape: Tape,
    pub gas: GasAnalysis,
    /// Spatial-integration option of the budget.
    pub spatial_method: Option<SpatialMethod>,
    /// ± bound on the integration-model bias (for `model-bias`), fraction.
    pub model_bias_fraction: Option<f64>,
    /// Relative standard uncertainty of the mean velocity from probe positioning.
    pub positioning_u_rel: Option<f64>,
    /// Relative standard uncertainty of an applied wall-effects factor.
    pub wall_factor_u_rel: Option<f64>,
}

impl Instruments {
    /// Each role's calibration record, in [`Role::ALL`] order.
    pub fn calibrations(&self) -> [(Role, &Calibration); 7] {
        [
            (Role::Pitot, &self.pitot.calibration),
            (Role::DpGauge, &self.dp.calibration),
            (Role::Thermometer, &self.thermometer.calibration),
            (Role::Barometer, &self.barometer.calibration),
            (Role::StaticGauge, &self.static_gauge.calibration),
            (Role::Tape, &self.tape.calibration),
            (Role::GasAnalysis, &self.gas.calibration),
        ]
    }
}
