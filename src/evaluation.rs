//! What the pipeline computes from one survey ([`Evaluation`]) and which runs count toward the
//! average. Below both `pipeline` (which builds it) and `assess` (which judges it), so neither
//! needs the other's module to name it.

use crate::flow::{Average, Convention, RunResult};
use crate::input::Loaded;
use crate::plane::Plane;

/// Everything computed from one survey.
#[derive(Debug, Clone)]
pub struct Evaluation {
    pub loaded: Loaded,
    pub convention: Convention,
    pub plane: Plane,
    pub runs: Vec<RunResult>,
    /// Runs included in the average (ids), in order.
    pub average: Option<Average>,
}

/// A run counts toward the average unless its post-run leak check failed, or (for stack
/// conventions, where Method 2 §8.1 requires it) was not recorded: a failed post-test leak check
/// voids the run (methods.md §4). HVAC traverses do not record pitot leak checks.
pub fn run_is_valid(
    spec: &crate::survey::RunSpec,
    convention: crate::survey::ConventionId,
) -> bool {
    use crate::survey::LeakResult;
    match spec.leak_check.after {
        Some(LeakResult::Pass) => spec.leak_check.before != Some(LeakResult::Fail),
        Some(LeakResult::Fail) => false,
        None => convention.is_hvac(),
    }
}
