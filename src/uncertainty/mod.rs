//! Measurement uncertainty of a traverse flow result, following the GUM (JCGM 100:2008;
//! ISO 5168 defers to it).
//!
//! Owns: budget components and their GUM evaluations ([`component`]), the combination with
//! Welch–Satterthwaite and the 95 % coverage factor ([`budget`], [`coverage`]), the flow model's
//! sensitivities ([`sensitivity`]), the spatial-integration options ([`spatial`]), the per-run
//! budget ([`run`]) and the multi-run average ([`average`]).
//!
//! Pure computation: never reads files, prints, or looks at the clock. All uncertainties are
//! relative fractions (0.01 = 1 %); percent is a presentation matter.

pub mod average;
pub mod budget;
pub mod component;
pub mod coverage;
pub mod error;
pub mod run;
pub mod sensitivity;
pub mod spatial;

pub use average::{build_average_budget, RUN_TO_RUN_COMPONENT};
pub use budget::Budget;
pub use component::{
    dof_from_reliability, rectangular_standard_uncertainty, Component, EvaluationKind,
};
pub use coverage::{t_975, COVERAGE_PROBABILITY, NORMAL_QUANTILE_975};
pub use error::UncertaintyError;
pub use run::{build_run_budget, DuctDimensions, RunBudget, RunUncertaintyInputs};
pub use sensitivity::{FlowInput, FLOW_MODEL};
pub use spatial::{
    spatial_line_half_difference, spatial_model_bias, spatial_scatter, SpatialMethod,
    SPATIAL_COMPONENT,
};
