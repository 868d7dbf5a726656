//! Point readings of one run, validated and in SI. Built by `input::readings`; no file handling.

use serde::Serialize;

/// A differential-pressure reading as recorded.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum Dp {
    /// A pressure, Pa (signed: negative readings are kept).
    Pressure { pa: f64 },
    /// A gauge-fluid column, m; converted with the survey's gauge-fluid specific gravity.
    Column { height_m: f64 },
}

/// One point reading.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Reading {
    pub line: String,
    pub point: usize,
    pub dp: Dp,
    /// Decimal places the Δp was written with (resolution of the record).
    pub dp_decimals: usize,
    pub temperature_k: Option<f64>,
    pub yaw_deg: Option<f64>,
    pub pitch_deg: Option<f64>,
    pub static_pa: Option<f64>,
    pub time: Option<String>,
    /// 1-based line of the readings file the value came from.
    pub source_line: usize,
}

/// All readings of one run, in file order.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RunReadings {
    pub file: String,
    pub readings: Vec<Reading>,
    /// The unit the Δp column was recorded in (from its header), for resolution checks.
    #[serde(skip)]
    pub dp_unit: Option<&'static crate::units::Unit>,
}

/// One Method 2H wall-effects reading: a point between the wall and a Method 1 exterior point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WallReading {
    /// `line` and `point` name the Method 1 exterior point whose sector the reading belongs to.
    pub reading: Reading,
    /// Distance from the wall nearest that point, m.
    pub distance_m: f64,
}

/// A run's wall-effects traverse, in file order.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct WallReadings {
    pub file: String,
    pub readings: Vec<WallReading>,
}
