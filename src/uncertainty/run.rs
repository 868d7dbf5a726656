//! The uncertainty budget of one traverse run, built from plain inputs.
//!
//! Owns the choice of components for a run and how each input becomes one (distribution,
//! sensitivity, degrees of freedom). Must not compute velocities or flows: the caller passes the
//! point readings it already has.
//!
//! Modelling choices, each with its source:
//! * Sensitivities are those of `Q = A·C·sqrt(2Δp/ρ)·F` ([`super::sensitivity`], calculations.md §5).
//! * Instrument specifications quoted as "± x" are bounds with nothing known inside them, so
//!   rectangular (JCGM 100:2008 §4.3.7).
//! * A display or scale resolution δ is a rectangular bound of half-width δ/2 on each reading
//!   (JCGM 100:2008 §F.2.2.1).
//! * Type B components from bounds and certificates get ν = ∞: the bounds are taken as reliable
//!   (JCGM 100:2008 §G.4.2, common practice). Where a bound is doubtful, pass a component with a
//!   finite ν from [`super::dof_from_reliability`] in `extra`.
//! * The Δp accuracy (% of reading) and the zero offset are the same instrument error at every
//!   point (fully correlated across points), so they are not reduced by averaging (common
//!   practice, conservative). The resolution error is independent from reading to reading.
//! * The point mean is taken as the equal-weight mean of velocities ∝ √Δp_i (equal-area and
//!   log-rule layouts weight points equally).
//! * Barometric and static pressure come from different instruments, as do width and height
//!   readings: taken as uncorrelated (common practice).

use super::budget::Budget;
use super::component::{rectangular_standard_uncertainty, Component, EvaluationKind};
use super::error::{non_negative, positive, UncertaintyError};
use super::sensitivity::FlowInput;
use super::spatial::{
    spatial_line_half_difference, spatial_model_bias, spatial_scatter, SpatialMethod,
};

/// Stable component names (printed in the report and JSON; do not change).
pub mod names {
    /// Pitot tube coefficient.
    pub const PITOT_COEFFICIENT: &str = "pitot coefficient";
    /// Δp instrument accuracy (% of reading).
    pub const DP_ACCURACY: &str = "dp instrument accuracy";
    /// Δp display or scale resolution.
    pub const DP_RESOLUTION: &str = "dp resolution";
    /// Δp zero offset.
    pub const DP_ZERO: &str = "dp zero offset";
    /// Gas temperature.
    pub const TEMPERATURE: &str = "gas temperature";
    /// Barometric pressure.
    pub const BAROMETRIC: &str = "barometric pressure";
    /// Duct static pressure.
    pub const STATIC: &str = "static pressure";
    /// Gas composition and moisture (molar mass).
    pub const COMPOSITION: &str = "gas composition and moisture";
    /// Round duct inside diameter.
    pub const DIAMETER: &str = "duct diameter";
    /// Rectangular duct width.
    pub const WIDTH: &str = "duct width";
    /// Rectangular duct height.
    pub const HEIGHT: &str = "duct height";
    /// Wall-effects adjustment factor.
    pub const WALL_FACTOR: &str = "wall factor";
    /// Probe positioning.
    pub const POSITIONING: &str = "probe positioning";
}

/// Inside dimensions of the measurement plane.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DuctDimensions {
    /// Round duct of inside diameter `diameter_m`.
    Round {
        /// Inside diameter, m.
        diameter_m: f64,
    },
    /// Rectangular duct of inside `width_m` × `height_m`.
    Rectangular {
        /// Inside width, m.
        width_m: f64,
        /// Inside height, m.
        height_m: f64,
    },
}

/// Everything a run's budget needs. Standard uncertainties are at k = 1 unless the field says
/// "bound"; relative values are fractions (0.01 = 1 %). A zero uncertainty is allowed and the
/// component is still listed, showing it was considered.
#[derive(Debug, Clone, PartialEq)]
pub struct RunUncertaintyInputs {
    /// Relative standard uncertainty of the pitot coefficient (typical calibration 1–3 %,
    /// calculations.md §5 \[P\]).
    pub pitot_coefficient_u_rel: f64,
    /// Its degrees of freedom (∞ when from a certificate taken as reliable).
    pub pitot_coefficient_dof: f64,
    /// Where it comes from, e.g. "calibration certificate, U = 2 % (k = 2)".
    pub pitot_coefficient_basis: String,
    /// Δp instrument accuracy, a ± bound as a fraction of reading (0.01 = ±1 % of reading).
    pub dp_accuracy_fraction_of_reading: f64,
    /// Δp display/scale resolution (smallest step), Pa.
    pub dp_resolution_pa: f64,
    /// Bound on the Δp zero offset after zeroing, Pa (0 when the zero was checked and held).
    pub dp_zero_bound_pa: f64,
    /// The run's point Δp values, Pa (all > 0; they weight the resolution and zero terms).
    pub point_dp_pa: Vec<f64>,
    /// Standard uncertainty of the mean gas temperature, K.
    pub temperature_u_k: f64,
    /// Mean absolute gas temperature, K.
    pub temperature_k: f64,
    /// Standard uncertainty of the barometric pressure, Pa.
    pub barometric_u_pa: f64,
    /// Standard uncertainty of the duct static pressure, Pa.
    pub static_u_pa: f64,
    /// Absolute duct pressure p = p_bar + p_static, Pa.
    pub absolute_pressure_pa: f64,
    /// Relative standard uncertainty of the wet molar mass from composition and moisture.
    pub composition_u_rel: f64,
    /// Standard uncertainty of each measured inside dimension, m.
    pub dimension_u_m: f64,
    /// The inside dimensions.
    pub duct: DuctDimensions,
    /// Point velocities, m/s (used by [`SpatialMethod::Scatter`]).
    pub point_velocities_m_s: Vec<f64>,
    /// The spatial-integration option.
    pub spatial_method: SpatialMethod,
    /// Mean velocity of each independent traverse line, m/s (needed by
    /// [`SpatialMethod::LineHalfDifference`]).
    pub line_mean_velocities_m_s: Option<Vec<f64>>,
    /// Judged ± bound on the integration-model bias, fraction (needed by
    /// [`SpatialMethod::ModelBias`]).
    pub model_bias_bound_fraction: Option<f64>,
    /// Relative standard uncertainty of the wall-effects factor (0 when none is applied and the
    /// wall effect is covered elsewhere).
    pub wall_factor_u_rel: f64,
    /// Relative standard uncertainty of the mean velocity from probe positioning.
    pub positioning_u_rel: f64,
    /// Further components (temporal variation, dry-basis factor, ...), appended as given.
    pub extra: Vec<Component>,
}

/// A run's budget and the spatial option it used.
#[derive(Debug, Clone, PartialEq)]
pub struct RunBudget {
    /// The combined budget.
    pub budget: Budget,
    /// Which spatial-integration option produced the "spatial integration" line.
    pub spatial_method: SpatialMethod,
}

/// Builds the budget of one run. Components, in order: pitot coefficient, Δp accuracy, Δp
/// resolution, Δp zero, temperature, barometric, static, composition, dimensions (diameter, or
/// width and height), spatial integration, wall factor, positioning, then `extra`.
pub fn build_run_budget(inputs: &RunUncertaintyInputs) -> Result<RunBudget, UncertaintyError> {
    let inf = f64::INFINITY;
    let b = EvaluationKind::TypeB;
    let mut parts = Vec::with_capacity(13 + inputs.extra.len());

    parts.push(Component::new(
        names::PITOT_COEFFICIENT,
        inputs.pitot_coefficient_u_rel,
        FlowInput::PitotCoefficient.relative_sensitivity(),
        inputs.pitot_coefficient_dof,
        b,
        inputs.pitot_coefficient_basis.clone(),
    )?);

    let dp_c = FlowInput::DifferentialPressure.relative_sensitivity();
    parts.push(Component::type_b_rectangular(
        names::DP_ACCURACY,
        inputs.dp_accuracy_fraction_of_reading,
        dp_c,
        inf,
        format!(
            "±{:.2} % of reading, rectangular, same at every point",
            inputs.dp_accuracy_fraction_of_reading * 100.0
        ),
    )?);
    let sums = DpSums::of(&inputs.point_dp_pa)?;
    let resolution_pa = non_negative("dp resolution [Pa]", inputs.dp_resolution_pa)?;
    parts.push(Component::new(
        names::DP_RESOLUTION,
        sums.independent_rel(rectangular_standard_uncertainty(resolution_pa / 2.0)),
        dp_c,
        inf,
        b,
        format!(
            "{resolution_pa} Pa step, rectangular ±half a step per reading, independent over {} points",
            sums.count
        ),
    )?);
    let zero_pa = non_negative("dp zero bound [Pa]", inputs.dp_zero_bound_pa)?;
    parts.push(Component::new(
        names::DP_ZERO,
        sums.correlated_rel(rectangular_standard_uncertainty(zero_pa)),
        dp_c,
        inf,
        b,
        format!("±{zero_pa} Pa, rectangular, same offset at every point"),
    )?);

    let temperature_k = positive("mean gas temperature [K]", inputs.temperature_k)?;
    let temperature_u_k = non_negative("gas temperature uncertainty [K]", inputs.temperature_u_k)?;
    parts.push(Component::new(
        names::TEMPERATURE,
        temperature_u_k / temperature_k,
        FlowInput::Temperature.relative_sensitivity(),
        inf,
        b,
        format!("u = {temperature_u_k} K at {temperature_k:.2} K"),
    )?);

    let p_pa = positive("absolute duct pressure [Pa]", inputs.absolute_pressure_pa)?;
    let p_c = FlowInput::AbsolutePressure.relative_sensitivity();
    let bar_u = non_negative(
        "barometric pressure uncertainty [Pa]",
        inputs.barometric_u_pa,
    )?;
    parts.push(Component::new(
        names::BAROMETRIC,
        bar_u / p_pa,
        p_c,
        inf,
        b,
        format!("u = {bar_u} Pa at p = {p_pa:.0} Pa"),
    )?);
    let static_u = non_negative("static pressure uncertainty [Pa]", inputs.static_u_pa)?;
    parts.push(Component::new(
        names::STATIC,
        static_u / p_pa,
        p_c,
        inf,
        b,
        format!("u = {static_u} Pa at p = {p_pa:.0} Pa"),
    )?);

    parts.push(Component::new(
        names::COMPOSITION,
        inputs.composition_u_rel,
        FlowInput::MolarMass.relative_sensitivity(),
        inf,
        b,
        "relative u of the wet molar mass",
    )?);

    let dim_u = non_negative("dimension uncertainty [m]", inputs.dimension_u_m)?;
    match inputs.duct {
        DuctDimensions::Round { diameter_m } => {
            let d = positive("duct diameter [m]", diameter_m)?;
            parts.push(Component::new(
                names::DIAMETER,
                dim_u / d,
                FlowInput::RoundDiameter.relative_sensitivity(),
                inf,
                b,
                format!("u = {dim_u} m on D = {d} m; A = πD²/4"),
            )?);
        }
        DuctDimensions::Rectangular { width_m, height_m } => {
            let w = positive("duct width [m]", width_m)?;
            let h = positive("duct height [m]", height_m)?;
            let c = FlowInput::RectangularSide.relative_sensitivity();
            parts.push(Component::new(
                names::WIDTH,
                dim_u / w,
                c,
                inf,
                b,
                format!("u = {dim_u} m on W = {w} m; A = W·H"),
            )?);
            parts.push(Component::new(
                names::HEIGHT,
                dim_u / h,
                c,
                inf,
                b,
                format!("u = {dim_u} m on H = {h} m; A = W·H"),
            )?);
        }
    }

    parts.push(spatial_component(inputs)?);

    parts.push(Component::new(
        names::WALL_FACTOR,
        inputs.wall_factor_u_rel,
        FlowInput::Factor.relative_sensitivity(),
        inf,
        b,
        "relative u of the wall-effects factor",
    )?);
    parts.push(Component::new(
        names::POSITIONING,
        inputs.positioning_u_rel,
        FlowInput::MeanVelocity.relative_sensitivity(),
        inf,
        b,
        "relative u of the mean velocity from probe positioning",
    )?);

    parts.extend(inputs.extra.iter().cloned());
    Ok(RunBudget {
        budget: Budget::new(parts)?,
        spatial_method: inputs.spatial_method,
    })
}

fn spatial_component(inputs: &RunUncertaintyInputs) -> Result<Component, UncertaintyError> {
    let method = inputs.spatial_method;
    match method {
        SpatialMethod::Scatter => spatial_scatter(&inputs.point_velocities_m_s),
        SpatialMethod::LineHalfDifference => match &inputs.line_mean_velocities_m_s {
            Some(means) => spatial_line_half_difference(means),
            None => Err(UncertaintyError::MissingSpatialInput {
                method: method.name(),
                missing: "the mean velocity of each traverse line",
            }),
        },
        SpatialMethod::ModelBias => match inputs.model_bias_bound_fraction {
            Some(a) => spatial_model_bias(a),
            None => Err(UncertaintyError::MissingSpatialInput {
                method: method.name(),
                missing: "a bound on the integration-model bias",
            }),
        },
    }
}

/// Sums over the point Δp that turn a per-reading Δp error into an error of the mean velocity.
///
/// With v_i ∝ √Δp_i and v̄ the equal-weight mean, an error δ_i on Δp_i moves v̄ by
/// ½·Σ(δ_i/√Δp_i)/Σ√Δp_i in relative terms \[D\]. The components carry sensitivity ½ (that of Δp),
/// so they report the "equivalent relative u of Δp", twice the relative u of v̄:
/// * independent δ_i of standard u: u·√(Σ 1/Δp_i) / Σ√Δp_i;
/// * one common δ of standard u:    u·Σ(1/√Δp_i) / Σ√Δp_i.
///
/// Both reduce to u/Δp when all points are equal (the first also divided by √n).
struct DpSums {
    count: usize,
    sum_sqrt: f64,
    sum_inv: f64,
    sum_inv_sqrt: f64,
}

impl DpSums {
    fn of(point_dp_pa: &[f64]) -> Result<Self, UncertaintyError> {
        if point_dp_pa.is_empty() {
            return Err(UncertaintyError::TooFewValues {
                quantity: "point dp values".to_string(),
                needed: 1,
                found: 0,
            });
        }
        let mut sums = Self {
            count: point_dp_pa.len(),
            sum_sqrt: 0.0,
            sum_inv: 0.0,
            sum_inv_sqrt: 0.0,
        };
        for (i, &dp) in point_dp_pa.iter().enumerate() {
            // A zero or negative reading has no finite relative sensitivity to a Δp error.
            if !(dp.is_finite() && dp > 0.0) {
                return Err(UncertaintyError::BadValueInSeries {
                    quantity: "point dp [Pa]".to_string(),
                    position: i + 1,
                    expected: "a finite number greater than zero",
                    value: dp,
                });
            }
            sums.sum_sqrt += dp.sqrt();
            sums.sum_inv += 1.0 / dp;
            sums.sum_inv_sqrt += 1.0 / dp.sqrt();
        }
        Ok(sums)
    }

    fn independent_rel(&self, u_pa: f64) -> f64 {
        u_pa * self.sum_inv.sqrt() / self.sum_sqrt
    }

    fn correlated_rel(&self, u_pa: f64) -> f64 {
        u_pa * self.sum_inv_sqrt / self.sum_sqrt
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Values derived by hand from exact arithmetic.
    const REL_TOL_DERIVED: f64 = 1e-12;

    fn inputs() -> RunUncertaintyInputs {
        RunUncertaintyInputs {
            pitot_coefficient_u_rel: 0.01,
            pitot_coefficient_dof: f64::INFINITY,
            pitot_coefficient_basis: "certificate U = 2 % (k = 2)".to_string(),
            dp_accuracy_fraction_of_reading: 0.01,
            dp_resolution_pa: 1.0,
            dp_zero_bound_pa: 0.5,
            point_dp_pa: vec![100.0; 4],
            temperature_u_k: 2.0,
            temperature_k: 400.0,
            barometric_u_pa: 50.0,
            static_u_pa: 20.0,
            absolute_pressure_pa: 100_000.0,
            composition_u_rel: 0.002,
            dimension_u_m: 0.005,
            duct: DuctDimensions::Round { diameter_m: 2.0 },
            point_velocities_m_s: vec![10.0, 12.0, 14.0, 12.0],
            spatial_method: SpatialMethod::Scatter,
            line_mean_velocities_m_s: Some(vec![11.0, 13.0]),
            model_bias_bound_fraction: None,
            wall_factor_u_rel: 0.003,
            positioning_u_rel: 0.004,
            extra: vec![],
        }
    }

    fn u(b: &Budget, name: &str) -> f64 {
        b.component(name).map(Component::u_rel).unwrap_or(f64::NAN)
    }

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= REL_TOL_DERIVED * b.abs().max(1e-3)
    }

    #[test]
    fn each_input_becomes_its_component() {
        let rb = build_run_budget(&inputs()).expect("valid");
        let b = &rb.budget;
        // Derived by hand from the modelling choices in the module doc:
        assert!(close(u(b, names::DP_ACCURACY), 0.01 / 3.0_f64.sqrt()));
        // resolution 1 Pa → u 0.5/√3 Pa per reading; 4 equal points of 100 Pa → /(100·√4).
        assert!(close(
            u(b, names::DP_RESOLUTION),
            0.5 / 3.0_f64.sqrt() / 200.0
        ));
        // zero ±0.5 Pa common to all points → (0.5/√3)/100.
        assert!(close(u(b, names::DP_ZERO), 0.5 / 3.0_f64.sqrt() / 100.0));
        assert!(close(u(b, names::TEMPERATURE), 2.0 / 400.0));
        assert!(close(u(b, names::BAROMETRIC), 50.0 / 100_000.0));
        assert!(close(u(b, names::STATIC), 20.0 / 100_000.0));
        assert!(close(u(b, names::DIAMETER), 0.005 / 2.0));
        assert_eq!(
            b.component(names::DIAMETER).map(Component::sensitivity),
            Some(2.0)
        );
        assert_eq!(rb.spatial_method, SpatialMethod::Scatter);
        // scatter of 10, 12, 14, 12: s = √(8/3), /√4, /12.
        assert!(close(
            u(b, super::super::SPATIAL_COMPONENT),
            (8.0_f64 / 3.0).sqrt() / 2.0 / 12.0
        ));
        assert_eq!(b.components().len(), 12);
    }

    #[test]
    fn combined_matches_a_hand_sum() {
        let rb = build_run_budget(&inputs()).expect("valid");
        let by_hand: f64 = rb
            .budget
            .components()
            .iter()
            .map(|c| (c.sensitivity() * c.u_rel()).powi(2))
            .sum::<f64>()
            .sqrt();
        assert!(close(rb.budget.combined_rel(), by_hand));
        // Only the spatial term is finite-ν (3), so ν_eff = 3·(u_c/contribution)⁴ ≥ 3.
        assert!(rb.budget.effective_dof() >= 3.0);
    }

    #[test]
    fn rectangular_duct_has_width_and_height() {
        let mut i = inputs();
        i.duct = DuctDimensions::Rectangular {
            width_m: 0.6,
            height_m: 0.4,
        };
        let b = build_run_budget(&i).expect("valid").budget;
        assert!(close(u(&b, names::WIDTH), 0.005 / 0.6));
        assert!(close(u(&b, names::HEIGHT), 0.005 / 0.4));
        assert!(b.component(names::DIAMETER).is_none());
    }

    #[test]
    fn unequal_points_weight_the_small_readings() {
        // Derived: Δp 25 and 100 Pa, u = 1 Pa independent → √(1/25 + 1/100)/(5 + 10);
        // common → (1/5 + 1/10)/(5 + 10).
        let sums = DpSums::of(&[25.0, 100.0]).expect("valid");
        assert!(close(sums.independent_rel(1.0), (0.05_f64).sqrt() / 15.0));
        assert!(close(sums.correlated_rel(1.0), 0.3 / 15.0));
    }

    #[test]
    fn spatial_options_need_their_inputs() {
        let mut i = inputs();
        i.spatial_method = SpatialMethod::LineHalfDifference;
        let rb = build_run_budget(&i).expect("valid");
        assert_eq!(rb.spatial_method.name(), "line-half-difference");
        assert_eq!(
            rb.budget
                .component(super::super::SPATIAL_COMPONENT)
                .map(Component::dof),
            Some(1.0)
        );
        i.line_mean_velocities_m_s = None;
        assert!(matches!(
            build_run_budget(&i),
            Err(UncertaintyError::MissingSpatialInput {
                method: "line-half-difference",
                ..
            })
        ));
        i.spatial_method = SpatialMethod::ModelBias;
        assert!(build_run_budget(&i).is_err());
        i.model_bias_bound_fraction = Some(0.02);
        let rb = build_run_budget(&i).expect("valid");
        assert_eq!(rb.budget.effective_dof(), f64::INFINITY);
    }

    #[test]
    fn extra_components_are_appended() {
        let mut i = inputs();
        let temporal = Component::new(
            "temporal variation",
            0.01,
            1.0,
            5.0,
            EvaluationKind::TypeA,
            "",
        )
        .expect("valid");
        i.extra.push(temporal);
        let without = build_run_budget(&inputs()).expect("valid").budget;
        let with = build_run_budget(&i).expect("valid").budget;
        assert_eq!(
            with.components().last().map(Component::name),
            Some("temporal variation")
        );
        assert!(with.combined_rel() > without.combined_rel());
    }

    #[test]
    fn rejects_bad_inputs() {
        let mut i = inputs();
        i.point_dp_pa = vec![100.0, 0.0];
        assert!(matches!(
            build_run_budget(&i),
            Err(UncertaintyError::BadValueInSeries { position: 2, .. })
        ));
        let mut i = inputs();
        i.temperature_k = 0.0;
        assert!(build_run_budget(&i).is_err());
        let mut i = inputs();
        i.dimension_u_m = -0.001;
        assert!(build_run_budget(&i).is_err());
        let mut i = inputs();
        i.duct = DuctDimensions::Round {
            diameter_m: f64::NAN,
        };
        assert!(build_run_budget(&i).is_err());
        let mut i = inputs();
        i.pitot_coefficient_dof = 0.0;
        assert!(build_run_budget(&i).is_err());
    }
}
