//! Flow: point velocities, averages and reference flows under a named convention.
//!
//! Owns the arithmetic from a validated survey, its layout and one run's readings to velocities and
//! flows. It never reads files or prints; problems with the data (a negative reading under the
//! `reject` policy, an impossible gas) come back as [`FlowError`] naming the point, and the caller
//! locates them in the readings file.

pub mod convention;
pub mod design;
pub mod gas_state;
pub mod run;
pub mod wall_effects;

pub use convention::{angle_notes, Convention, EpaForm};
pub use gas_state::{method4_form, resolve_gas, GasState};
pub use run::{
    average_runs, compute_run, epa_vs, method_notes, wall_factor, wall_factor_note,
    wall_point_velocities, Average, PointResult, RunResult,
};
pub use wall_effects::{wall_effects, WallEffects};

use std::fmt;

/// Why a run could not be computed.
#[derive(Debug, Clone, PartialEq)]
pub enum FlowError {
    /// A zero or negative Δp under the `reject` policy, or a reading the method cannot use.
    Reading {
        line: String,
        point: usize,
        source_line: usize,
        message: String,
        hint: String,
    },
    /// The gas description cannot give a density.
    Gas { message: String, hint: String },
}

impl fmt::Display for FlowError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            FlowError::Reading {
                line,
                point,
                message,
                ..
            } => write!(f, "line {line}, point {point}: {message}"),
            FlowError::Gas { message, .. } => write!(f, "{message}"),
        }
    }
}

impl std::error::Error for FlowError {}
