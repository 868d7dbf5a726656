//! Safety cautions fitting the trade, printed near the end of every report.
//!
//! Common practice (no single source): the hazards named are those stack-testing and
//! test-and-balance field procedures warn about. The wording is the project's own. Both lists end
//! by deferring to local codes, permits and licensed professional judgment.

use super::Trade;

const STACK: &[&str] = &[
    "Work at height: sampling platforms, ladders and roofs need fall protection, guard rails and \
     toe boards in good condition; keep tools and probes tethered and the area below kept clear.",
    "Hot and toxic gases: stack gases may be hot, under positive pressure, oxygen-deficient or \
     contain carbon monoxide, sulphur dioxide or other toxic components. Open ports only with \
     suitable gloves, eye and face protection and gas monitoring; stand upwind and clear of the port.",
    "Hot surfaces and probes: a probe withdrawn from a hot stack stays hot; handle it with \
     heat-resistant gloves and lay it where no one can touch it.",
    "Confined spaces: never enter a duct, flue or stack interior without a confined-space permit, \
     atmospheric testing, ventilation and a standby attendant.",
    "Process equipment: fans, dampers and burners can change state without warning; agree the \
     test with the plant operator and keep clear of moving parts.",
    "Electrical: keep instrument leads and extension cables clear of hot surfaces and water; use \
     equipment rated for the area classification where flammable gases or dusts may be present.",
];

const HVAC: &[&str] = &[
    "Rotating equipment: fans, belts, pulleys and couplings can start without warning under \
     automatic control; keep guards in place and hands, clothing and instruments clear.",
    "Electrical lock-out: isolate, lock and tag fans, motors and heaters before opening \
     air-handling unit panels or reaching inside equipment, and verify zero energy first.",
    "Duct access: access doors and test holes can release air under pressure or draw objects in; \
     sheet-metal edges and drilling swarf cut. Check for wiring, pipes and fire dampers before \
     drilling and plug every test hole afterwards.",
    "Ladders and lifts: set ladders on firm footing at the right angle and keep three points of \
     contact; use a platform or lift for work above head height and keep the area below clear.",
    "Ceiling voids and plant rooms: watch for hot water and steam pipework, dust, fibres and \
     biological growth on coils and filters; wear eye and respiratory protection where needed.",
];

const DEFER: &str = "These cautions are general. They do not replace site rules, local codes and \
                     regulations, permits to work, or the judgment of a competent, licensed \
                     professional responsible for the work.";

pub(super) fn cautions(trade: Trade) -> Vec<String> {
    let list = match trade {
        Trade::Stack => STACK,
        Trade::Hvac => HVAC,
    };
    list.iter()
        .chain(std::iter::once(&DEFER))
        .map(|s| s.to_string())
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn hvac_cautions_speak_of_fans_and_lock_out_not_stack_gas() {
        let text = cautions(Trade::Hvac).join(" ");
        for word in [
            "fans",
            "lock",
            "Duct access",
            "Ladders",
            "licensed professional",
        ] {
            assert!(text.contains(word), "no `{word}`");
        }
        for word in ["stack", "toxic", "sulphur", "sampling platform"] {
            assert!(!text.contains(word), "HVAC cautions mention `{word}`");
        }
    }

    #[test]
    fn stack_cautions_keep_the_stack_hazards() {
        let text = cautions(Trade::Stack).join(" ");
        for word in [
            "sampling platforms",
            "toxic",
            "Confined spaces",
            "licensed professional",
        ] {
            assert!(text.contains(word), "no `{word}`");
        }
    }
}
