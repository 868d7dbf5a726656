//! What the pipeline computes from one survey ([`Evaluation`]) and which runs count toward the
//! average. Below both `pipeline` (which builds it) and `assess` (which judges it), so neither
//! needs the other's module to name it.

use crate::flow::{Average, Convention, RunResult, WallEffects};
use crate::input::Loaded;
use crate::plane::Plane;
use crate::survey::{ConventionId, LeakResult, RunSpec};
use serde::Serialize;

/// Everything computed from one survey.
#[derive(Debug, Clone)]
pub struct Evaluation {
    pub loaded: Loaded,
    pub convention: Convention,
    pub plane: Plane,
    pub runs: Vec<RunResult>,
    /// Whether each run counts, in survey order.
    pub validity: Vec<RunValidity>,
    /// The Method 2H calculational procedure, per run that has a wall-effects traverse (run id).
    pub wall_effects: Vec<(String, WallEffects)>,
    /// Runs included in the average (ids), in order.
    pub average: Option<Average>,
}

impl Evaluation {
    /// Runs that count.
    pub fn valid_runs(&self) -> usize {
        self.validity.iter().filter(|v| v.valid).count()
    }

    /// The runs the test needs, as the survey says.
    pub fn runs_required(&self) -> usize {
        self.loaded.survey.runs_required
    }

    /// The test has as many valid runs as it needs.
    pub fn complete(&self) -> bool {
        self.valid_runs() >= self.runs_required()
    }
}

/// Whether a run counts toward the average, and if not why.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct RunValidity {
    pub valid: bool,
    pub void_reason: Option<String>,
}

/// Whether a run counts. A run is void when the crew voided it (`void = "reason"`), when its
/// post-run leak check failed or (for stack conventions, where Method 2 §8.1 requires one) was not
/// recorded, or when its pre-run leak check failed: a failed post-test leak check voids the run
/// (methods.md §4). HVAC traverses do not record pitot leak checks.
pub fn run_validity(spec: &RunSpec, convention: ConventionId) -> RunValidity {
    let void = |reason: &str| RunValidity {
        valid: false,
        void_reason: Some(reason.to_string()),
    };
    if let Some(reason) = &spec.void {
        return void(reason);
    }
    match (spec.leak_check.before, spec.leak_check.after) {
        (_, Some(LeakResult::Fail)) => void("post-run leak check failed"),
        (Some(LeakResult::Fail), _) => void("pre-run leak check failed"),
        (_, None) if !convention.is_hvac() => void("post-run leak check not recorded"),
        _ => RunValidity {
            valid: true,
            void_reason: None,
        },
    }
}

/// True when the run counts toward the average (see [`run_validity`]).
pub fn run_is_valid(spec: &RunSpec, convention: ConventionId) -> bool {
    run_validity(spec, convention).valid
}
