//! The measurement plane of a survey: its layout chosen the way the survey's convention expects.
//!
//! EPA Method 2 surveys get the Method 1 minimum and wall rule; iso-16911 surveys the EN 15259
//! minimum; HVAC surveys the method's own field-practice counts. Counts given in the survey win.

use crate::geometry::Duct;
use crate::layout::{
    advise, advisor::TraverseKind, locate_points, Advice, Layout, LayoutError, LayoutSpec, WallRule,
};
use crate::survey::{ConventionId, LayoutRequest};

/// The layout for a plane with the advice it was sized from.
#[derive(Debug, Clone)]
pub struct Plane {
    pub layout: Layout,
    pub advice: Advice,
    /// The minimum under the survey's convention, where the rule book gives one.
    pub required_points: Option<usize>,
}

/// Lays out a plane for a convention.
pub fn lay_out(
    duct: &Duct,
    request: &LayoutRequest,
    convention: ConventionId,
    upstream_d: Option<f64>,
    downstream_d: Option<f64>,
) -> Result<Plane, LayoutError> {
    let advice = advise(duct, upstream_d, downstream_d, TraverseKind::Velocity);
    let required = match convention {
        ConventionId::EpaMethod2 => advice.epa_method_1.minimum_points,
        ConventionId::Iso16911 => advice.en_15259.minimum_points,
        ConventionId::HvacIp | ConventionId::HvacSi => None,
    };
    let spec = LayoutSpec {
        method: request.method,
        lines: request.lines,
        points_per_line: request.points_per_line,
        minimum_points: required,
        wall_rule: (convention == ConventionId::EpaMethod2).then_some(WallRule::EpaMethod1),
        printed_table: convention == ConventionId::EpaMethod2,
        reach: request.reach,
    };
    let layout = locate_points(duct, &spec)?;
    let required_points = match convention {
        // ASHRAE 111 log-Tchebycheff grids: at least 25 points (methods.md §2.2); the spacing
        // rule in the advice is for equal-area grids.
        ConventionId::HvacIp | ConventionId::HvacSi
            if !duct.is_round() && request.method == crate::layout::Method::LogTchebycheff =>
        {
            Some(25)
        }
        ConventionId::HvacIp | ConventionId::HvacSi => advice.hvac.minimum_points,
        _ => required,
    };
    Ok(Plane {
        layout,
        advice,
        required_points,
    })
}
