//! `[design]`, `[flow]` and `[signoff]`: the design flow with its basis, the computation choices
//! a survey makes, and who signs.

use crate::input::toml_doc::Value;
use crate::input::toml_doc::{Field, Table};
use crate::survey::{
    AngleCorrection, DesignFlow, FlowOptions, NegativePolicy, Signoff, WallFactor,
};
use crate::units::{parse_flow, FlowBasis};

/// Reads `[design]`: `Some(None)` when there is none, `None` after a recorded problem.
pub fn read_design(root: &Table) -> Option<Option<DesignFlow>> {
    let Some(t) = root.opt_table("design") else {
        return Some(None);
    };
    let f = t.required("flow", "\"5000 cfm\"")?;
    design_flow(&f).map(Some)
}

/// A flow whose unit names its basis (`8000 acfm`, `8000 dscfm`, `12000 Nm3/h`; plain `cfm` and
/// `m3/h` are actual).
pub fn design_flow(f: &Field) -> Option<DesignFlow> {
    let raw = f.str()?;
    match parse_flow(raw) {
        Ok((m3_s, _)) if m3_s <= 0.0 => {
            f.error(
                format!("`{}` must be a positive flow, found `{raw}`", f.path()),
                None,
            );
            None
        }
        Ok((m3_s, basis)) => f
            .within(m3_s, crate::plausibility::DESIGN_FLOW)
            .map(|m3_s| DesignFlow {
                m3_s,
                basis,
                raw: raw.trim().to_string(),
            }),
        Err(e) => {
            f.error(format!("`{}`: {e}", f.path()), Some(flow_hint()));
            None
        }
    }
}

/// The flow units and the basis each names, for hints.
pub fn flow_hint() -> String {
    let by_basis = |b: FlowBasis| match b {
        FlowBasis::Actual => "cfm, acfm, m3/h, m3/s, L/s (actual)",
        FlowBasis::Standard => "scfm, wscfm (standard, wet)",
        FlowBasis::DryStandard => "dscfm (dry standard)",
        FlowBasis::Normal => "Nm3/h (normal, wet)",
        FlowBasis::NormalDry => "dNm3/h (normal, dry)",
    };
    format!(
        "write the flow with a unit that names its basis: {}",
        FlowBasis::ALL.map(by_basis).join("; ")
    )
}

/// Reads `[flow]`; its defaults when absent.
pub fn read_flow_options(root: &Table) -> Option<FlowOptions> {
    let Some(t) = root.opt_table("flow") else {
        return Some(FlowOptions {
            epa_metric: false,
            negative: NegativePolicy::Reject,
            angles: AngleCorrection::None,
            wall_factor: WallFactor::None,
        });
    };
    let negative = t.choice_or(
        "negative",
        &NegativePolicy::choices(),
        NegativePolicy::Reject,
    );
    let angles = t.choice_or("angles", &AngleCorrection::choices(), AngleCorrection::None);
    let wall_factor = match t.get("wall_factor") {
        None => Some(WallFactor::None),
        Some(f) => wall_factor(&f),
    };
    let epa_metric = t.choice_or("epa_units", &[("english", false), ("metric", true)], false);
    Some(FlowOptions {
        epa_metric: epa_metric?,
        negative: negative?,
        angles: angles?,
        wall_factor: wall_factor?,
    })
}

fn wall_factor(f: &Field) -> Option<WallFactor> {
    let factor = match f.value {
        Value::String(s) if s == "method-2h-default" => return Some(WallFactor::Method2hDefault),
        Value::String(s) if s == "method-2h-calculated" => {
            return Some(WallFactor::Method2hCalculated)
        }
        Value::String(s) if s == "none" => return Some(WallFactor::None),
        Value::Float(_) | Value::Integer(_) => f.number(),
        _ => None,
    };
    match factor {
        Some(x) if x > 0.9 && x <= 1.0 => Some(WallFactor::Given { factor: x }),
        _ => {
            f.error(
                format!(
                    "`flow.wall_factor` must be \"none\", \"method-2h-default\", \"method-2h-calculated\" or a factor between 0.9 and 1.0, found `{}`",
                    f.text()
                ),
                None,
            );
            None
        }
    }
}

/// Reads `[signoff]` (a survey's, or a system file's).
pub fn read_signoff(root: &Table) -> Signoff {
    let Some(t) = root.opt_table("signoff") else {
        return Signoff::default();
    };
    Signoff {
        tested_by: t.opt_text("tested_by"),
        certificate: t.opt_text("certificate"),
        reviewed_by: t.opt_text("reviewed_by"),
        organisation: t.opt_text("organisation"),
    }
}
