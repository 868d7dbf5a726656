//! How many points a plane needs: EPA Method 1, EN 15259 and HVAC field guidance, side by side.
//!
//! Owns the point-count rules as labelled step tables. Several breakpoints are from memory and not yet
//! confirmed against the published figures (methods.md §3–1.4): every such step carries
//! `confirmed: false` and the advice says so in words, so a report never presents it as a verified
//! requirement. Distances are in duct (equivalent) diameters: `upstream_d` is the straight run from
//! the upstream disturbance to the plane (Method 1's "B"), `downstream_d` from the plane to the next
//! disturbance or the exit ("A").

use super::rect::{tab_spacing_counts, TABLE_1_1};
use crate::geometry::Duct;
use crate::text;
use crate::wording::{q, Kind, Text};

const IN: f64 = 0.0254;

/// EPA Method 1 §1.2 / §11.1: not for stacks under 0.30 m (12 in) or 0.071 m² (113 in²).
pub const EPA_MIN_DIAMETER_M: f64 = 12.0 * IN;
pub const EPA_MIN_AREA_M2: f64 = 113.0 * IN * IN;
/// EPA Method 1 §11.2.1: over 0.61 m (24 in) -> 12 points at a preferred site.
pub const EPA_LARGE_M: f64 = 24.0 * IN;

/// One step of a step table: distances at or above `from_d` (and below the next step) need `points`.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Step {
    pub from_d: f64,
    pub points: usize,
    pub confirmed: bool,
}

/// A labelled step table keyed on a distance in diameters.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct StepTable {
    pub name: &'static str,
    pub source: &'static str,
    pub steps: &'static [Step],
}

const fn s(from_d: f64, points: usize, confirmed: bool) -> Step {
    Step {
        from_d,
        points,
        confirmed,
    }
}

/// EPA Method 1 Figure 1-1 (particulate traverses), diameters downstream of the disturbance (B).
/// Steps from memory (methods.md §3 \[M\]); the 8 D step is §11.2.1's published 12-point rule.
pub const FIG_1_1_UPSTREAM: StepTable = StepTable {
    name: "EPA Method 1 Figure 1-1, distance from upstream disturbance",
    source: "EPA Method 1 (40 CFR 60 App. A-1) Figure 1-1; intermediate steps from memory, not yet confirmed",
    steps: &[
        s(2.0, 24, false),
        s(5.0, 20, false),
        s(6.0, 16, false),
        s(7.0, 12, false),
        s(8.0, 12, true),
    ],
};
/// EPA Method 1 Figure 1-1, diameters upstream of the next disturbance (A).
pub const FIG_1_1_DOWNSTREAM: StepTable = StepTable {
    name: "EPA Method 1 Figure 1-1, distance to downstream disturbance",
    source: "EPA Method 1 (40 CFR 60 App. A-1) Figure 1-1; intermediate steps from memory, not yet confirmed",
    steps: &[
        s(0.5, 24, false),
        s(1.25, 20, false),
        s(1.5, 16, false),
        s(1.75, 12, false),
        s(2.0, 12, true),
    ],
};
/// EPA Method 1 Figure 1-2 (velocity traverses): top step 16 points; breakpoints from memory with
/// low confidence (methods.md §3 \[M\]).
pub const FIG_1_2_UPSTREAM: StepTable = StepTable {
    name: "EPA Method 1 Figure 1-2, distance from upstream disturbance",
    source: "EPA Method 1 (40 CFR 60 App. A-1) Figure 1-2; breakpoints from memory (low confidence), not yet confirmed",
    steps: &[s(2.0, 16, false), s(5.0, 12, false), s(8.0, 12, true)],
};
pub const FIG_1_2_DOWNSTREAM: StepTable = StepTable {
    name: "EPA Method 1 Figure 1-2, distance to downstream disturbance",
    source: "EPA Method 1 (40 CFR 60 App. A-1) Figure 1-2; breakpoints from memory (low confidence), not yet confirmed",
    steps: &[s(0.5, 16, false), s(1.25, 12, false), s(2.0, 12, true)],
};

impl StepTable {
    /// The step for a distance, or `None` below the first step (site unacceptable).
    pub fn lookup(&self, distance_d: f64) -> Option<Step> {
        self.steps
            .iter()
            .rev()
            .find(|st| distance_d >= st.from_d)
            .copied()
    }
}

/// Which Method 1 figure applies.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum TraverseKind {
    /// Velocity (non-particulate) traverse: Figure 1-2.
    Velocity,
    /// Particulate sampling traverse: Figure 1-1.
    Particulate,
}

/// How a site's straight runs rate under a rule book.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum SiteRating {
    Preferred,
    Acceptable,
    BelowMinimum,
    /// Distances not given.
    Unknown,
    /// The rule book does not cover this duct.
    NotApplicable,
}

/// The minimum under one rule book.
#[derive(Debug, Clone, PartialEq)]
pub struct Requirement {
    pub framework: &'static str,
    pub minimum_points: Option<usize>,
    pub site: SiteRating,
    /// False when any step used is from memory.
    pub confirmed: bool,
    /// The rule in words, printed on the layout and the report in the job's units.
    pub basis: Text,
}

/// Advice from all three rule books.
#[derive(Debug, Clone, PartialEq)]
pub struct Advice {
    pub epa_method_1: Requirement,
    pub en_15259: Requirement,
    pub hvac: Requirement,
}

/// A straight run as the advice quotes it (`8.5 D`).
fn diameters(d: f64) -> crate::wording::Arg {
    q(Kind::Diameters, d)
}

/// Gives the minimum point counts for a duct and its straight runs.
pub fn advise(
    duct: &Duct,
    upstream_d: Option<f64>,
    downstream_d: Option<f64>,
    kind: TraverseKind,
) -> Advice {
    Advice {
        epa_method_1: epa(duct, upstream_d, downstream_d, kind),
        en_15259: en_15259(duct, upstream_d, downstream_d),
        hvac: hvac(duct, upstream_d, downstream_d),
    }
}

/// The Table 1-1 count at or above `n` (rectangular stacks), falling back to `n`.
fn rect_count(n: usize) -> usize {
    TABLE_1_1
        .iter()
        .map(|(t, _, _)| *t)
        .find(|t| *t >= n)
        .unwrap_or(n)
}

fn epa(duct: &Duct, up: Option<f64>, down: Option<f64>, kind: TraverseKind) -> Requirement {
    let framework = "EPA Method 1";
    let d = duct.equivalent_diameter_m();
    if d < EPA_MIN_DIAMETER_M || duct.area_m2() < EPA_MIN_AREA_M2 {
        return Requirement {
            framework,
            minimum_points: None,
            site: SiteRating::NotApplicable,
            confirmed: true,
            basis: text!(
                "Method 1 does not apply below {} diameter or {}: use Method 1A ({} to {}, \
                 standard pitot, velocity site apart from sampling)",
                q(Kind::Length, EPA_MIN_DIAMETER_M),
                q(Kind::Area, EPA_MIN_AREA_M2),
                q(Kind::Length, 4.0 * IN),
                q(Kind::Length, EPA_MIN_DIAMETER_M)
            ),
        };
    }
    let large = d > EPA_LARGE_M;
    let small_count = if duct.is_round() { 8 } else { 9 };
    let top = if large { 12 } else { small_count };
    let (Some(b), Some(a)) = (up, down) else {
        return Requirement {
            framework,
            minimum_points: Some(if duct.is_round() { 24 } else { 25 }),
            site: SiteRating::Unknown,
            confirmed: false,
            basis: "straight runs not given: assuming the worst Figure 1-1 step (24 round / 25 \
                    rectangular); give upstream and downstream distances"
                .into(),
        };
    };
    if b >= 8.0 && a >= 2.0 {
        return Requirement {
            framework,
            minimum_points: Some(top),
            site: SiteRating::Preferred,
            confirmed: true,
            basis: text!(
                "{} after the disturbance and {} before the next meet 8 D / 2 D: {} points \
                 ({}) per Method 1 §11.2.1",
                diameters(b),
                diameters(a),
                top,
                if large {
                    text!("diameter over {}", q(Kind::Length, EPA_LARGE_M))
                } else {
                    text!(
                        "diameter {} to {}",
                        q(Kind::Length, EPA_MIN_DIAMETER_M),
                        q(Kind::Length, EPA_LARGE_M)
                    )
                }
            ),
        };
    }
    let (t_up, t_down, fig) = match kind {
        TraverseKind::Velocity => (FIG_1_2_UPSTREAM, FIG_1_2_DOWNSTREAM, "Figure 1-2"),
        TraverseKind::Particulate => (FIG_1_1_UPSTREAM, FIG_1_1_DOWNSTREAM, "Figure 1-1"),
    };
    match (t_up.lookup(b), t_down.lookup(a)) {
        (Some(su), Some(sd)) => {
            let step_points = |st: Step, top_step: bool| if top_step { top } else { st.points };
            let pu = step_points(su, su.from_d >= 8.0);
            let pd = step_points(sd, sd.from_d >= 2.0);
            let mut n = pu.max(pd);
            n = if duct.is_round() {
                n.div_ceil(4) * 4
            } else {
                rect_count(n)
            };
            Requirement {
                framework,
                minimum_points: Some(n),
                site: SiteRating::Acceptable,
                confirmed: su.confirmed && sd.confirmed,
                basis: text!(
                    "{} after / {} before disturbances: {} gives {} and {}; the larger, rounded \
                     to {}, is {}{}",
                    diameters(b),
                    diameters(a),
                    fig,
                    pu,
                    pd,
                    if duct.is_round() {
                        "a multiple of 4"
                    } else {
                        "a Table 1-1 count"
                    },
                    n,
                    if su.confirmed && sd.confirmed {
                        ""
                    } else {
                        " (figure step from memory, not yet confirmed)"
                    }
                ),
            }
        }
        _ => Requirement {
            framework,
            minimum_points: None,
            site: SiteRating::BelowMinimum,
            confirmed: true,
            basis: text!(
                "{} after / {} before disturbances is below Method 1's minimum of 2 D / 0.5 D: use \
                 the alternative (directional probe) site procedure or move the plane",
                diameters(b),
                diameters(a)
            ),
        },
    }
}

/// EN 15259 minimum by plane area (methods.md §1.4 [M]). Keyed on area; the rounding rule is printed.
fn en_15259(duct: &Duct, up: Option<f64>, down: Option<f64>) -> Requirement {
    let a = duct.area_m2();
    let area = |m2: f64| q(Kind::Area, m2);
    let (n, rule) = if a < 0.1 {
        (1, text!("under {}: 1 point", area(0.1)))
    } else if a <= 1.0 {
        (4, text!("{} to {}: 4 points", area(0.1), area(1.0)))
    } else if a <= 2.0 {
        let n = if duct.is_round() { 8 } else { 9 };
        (
            n,
            text!("over {} to {}: {} points", area(1.0), area(2.0), n),
        )
    } else {
        let raw = ((4.0 * a) - 1e-9).ceil().max(12.0) as usize;
        let n = if duct.is_round() {
            raw.div_ceil(4) * 4
        } else {
            rect_count(raw)
        };
        (
            n,
            text!(
                "over {}: at least 12 and 4 per {} of plane area ({}) = {}, rounded up to a \
                 symmetric layout ({}) = {}",
                area(2.0),
                area(1.0),
                area(a),
                raw,
                if duct.is_round() {
                    "2 diameters, even count per diameter"
                } else {
                    "a Table 1-1 grid"
                },
                n
            ),
        )
    };
    let site = match (up, down) {
        (Some(u), Some(d)) if u >= 5.0 && d >= 2.0 => SiteRating::Preferred,
        (Some(_), Some(_)) => SiteRating::BelowMinimum,
        _ => SiteRating::Unknown,
    };
    Requirement {
        framework: "EN 15259",
        minimum_points: Some(n),
        site,
        confirmed: false,
        basis: text!(
            "{} (EN 15259 area bands from memory, not yet confirmed); plane criteria usually met \
             with 5 hydraulic diameters upstream and 2 downstream",
            rule
        ),
    }
}

fn hvac(duct: &Duct, up: Option<f64>, down: Option<f64>) -> Requirement {
    let (n, rule) = match duct.shape() {
        crate::geometry::Shape::Round { diameter_m } => {
            let per = if diameter_m <= 10.0 * IN { 6 } else { 8 };
            (
                2 * per,
                text!(
                    "round: 2 diameters (3 at 60° preferred) of {} points (6 up to {}, 8 to 10 above)",
                    per,
                    q(Kind::Length, 10.0 * IN)
                ),
            )
        }
        crate::geometry::Shape::Rectangular { width_m, height_m } => {
            let (w, h) = tab_spacing_counts(width_m, height_m);
            (
                w * h,
                text!(
                    "rectangular: readings no more than {} apart, 16 to 64 readings in all ({} × {}); log-Tchebycheff at least 25",
                    q(Kind::Length, 6.0 * IN),
                    w,
                    h
                ),
            )
        }
    };
    let site = match (up, down) {
        (Some(u), Some(d)) if u >= 7.5 && d >= 3.0 => SiteRating::Preferred,
        (Some(u), Some(d)) if u >= 2.0 && d >= 1.0 => SiteRating::Acceptable,
        (Some(_), Some(_)) => SiteRating::BelowMinimum,
        _ => SiteRating::Unknown,
    };
    Requirement {
        framework: "HVAC field practice",
        minimum_points: Some(n),
        site,
        confirmed: true,
        basis: text!(
            "{}; plane 7.5 D after and 3 D before disturbances preferred, 2 D / 1 D with reduced accuracy",
            rule
        ),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ip() -> crate::display::DisplayTable {
        crate::display::DisplayTable::new(
            crate::survey::ConventionId::EpaMethod2,
            crate::display::UnitSystem::InchPound,
        )
    }

    #[test]
    fn preferred_site_counts() {
        // EPA Method 1 §11.2.1 [P secondary, methods.md §3]: 8/2 met -> 12 points above 24 in,
        // 8 (round) or 9 (rectangular) for 12-24 in
        let big = Duct::round(96.0 * IN).unwrap();
        let a = advise(&big, Some(8.0), Some(2.0), TraverseKind::Velocity);
        assert_eq!(a.epa_method_1.minimum_points, Some(12));
        assert_eq!(a.epa_method_1.site, SiteRating::Preferred);
        let small = Duct::round(18.0 * IN).unwrap();
        assert_eq!(
            advise(&small, Some(9.0), Some(3.0), TraverseKind::Velocity)
                .epa_method_1
                .minimum_points,
            Some(8)
        );
        let rect = Duct::rectangular(20.0 * IN, 16.0 * IN).unwrap();
        assert_eq!(
            advise(&rect, Some(9.0), Some(3.0), TraverseKind::Velocity)
                .epa_method_1
                .minimum_points,
            Some(9)
        );
    }

    #[test]
    fn figure_steps_take_the_larger_and_are_labelled() {
        // methods.md §3 [M]: Figure 1-1, B 5-<6 -> 20; A 1.5-<1.75 -> 16: larger is 20
        let d = Duct::round(96.0 * IN).unwrap();
        let a = advise(&d, Some(5.5), Some(1.6), TraverseKind::Particulate);
        assert_eq!(a.epa_method_1.minimum_points, Some(20));
        assert!(!a.epa_method_1.confirmed);
        assert!(a
            .epa_method_1
            .basis
            .render(&ip())
            .contains("not yet confirmed"));
        // Figure 1-2 top step is 16 points (methods.md §3)
        let a = advise(&d, Some(2.5), Some(3.0), TraverseKind::Velocity);
        assert_eq!(a.epa_method_1.minimum_points, Some(16));
        // rectangular rounds 24 up to the Table 1-1 count 25
        let r = Duct::rectangular(60.0 * IN, 40.0 * IN).unwrap();
        let a = advise(&r, Some(3.0), Some(3.0), TraverseKind::Particulate);
        assert_eq!(a.epa_method_1.minimum_points, Some(25));
    }

    #[test]
    fn unacceptable_and_not_applicable_sites() {
        let d = Duct::round(96.0 * IN).unwrap();
        let a = advise(&d, Some(1.5), Some(3.0), TraverseKind::Velocity);
        assert_eq!(a.epa_method_1.site, SiteRating::BelowMinimum);
        assert_eq!(a.epa_method_1.minimum_points, None);
        let tiny = Duct::round(10.0 * IN).unwrap();
        let a = advise(&tiny, Some(10.0), Some(3.0), TraverseKind::Velocity);
        assert_eq!(a.epa_method_1.site, SiteRating::NotApplicable);
        assert!(a.epa_method_1.basis.render(&ip()).contains("Method 1A"));
    }

    #[test]
    fn en_15259_area_bands() {
        // methods.md §1.4 [M]: keyed on area; D = 1.6 m is 2.011 m² -> the > 2.0 band
        let d = Duct::round(1.6).unwrap();
        let a = advise(&d, None, None, TraverseKind::Velocity);
        // max(12, ceil(8.04)) = 12, a multiple of 4
        assert_eq!(a.en_15259.minimum_points, Some(12));
        assert!(!a.en_15259.confirmed);
        let d = Duct::round(2.4).unwrap(); // 4.524 m² -> ceil(18.1) = 19 -> 20
        assert_eq!(
            advise(&d, None, None, TraverseKind::Velocity)
                .en_15259
                .minimum_points,
            Some(20)
        );
        let d = Duct::round(0.5).unwrap(); // 0.196 m² -> 4
        assert_eq!(
            advise(&d, None, None, TraverseKind::Velocity)
                .en_15259
                .minimum_points,
            Some(4)
        );
    }

    #[test]
    fn hvac_guidance() {
        let d = Duct::round(8.0 * IN).unwrap();
        let a = advise(&d, Some(8.0), Some(3.0), TraverseKind::Velocity);
        assert_eq!(a.hvac.minimum_points, Some(12));
        assert_eq!(a.hvac.site, SiteRating::Preferred);
        let a = advise(&d, Some(2.5), Some(1.0), TraverseKind::Velocity);
        assert_eq!(a.hvac.site, SiteRating::Acceptable);
    }
}
