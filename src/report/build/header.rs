//! The identity block: title, client, site, plane, date, report id and fingerprint, the paper.

use super::{Identity, Job};
use crate::display::UnitSystem;
use crate::report::model::{Header, Paper};

pub(super) fn section(job: &Job, id: &Identity) -> Header {
    let s = job.survey();
    Header {
        kind: job.trade.document().to_string(),
        title: s.title.clone(),
        client: s.client.clone().unwrap_or_default(),
        site: s.site.clone().unwrap_or_default(),
        plane_location: s.plane.clone().unwrap_or_default(),
        test_date: s.date.to_string(),
        report_id: id.report_id.clone(),
        content_sha256: id.content_sha256.clone(),
        signer_key_fingerprint: id.signer_key_fingerprint.clone(),
        signer_name: id.signer_name.clone(),
        software: software(),
        paper: paper(job.table.system),
    }
}

/// Program name and version as every page footer prints it.
pub(crate) fn software() -> String {
    format!("annulus {}", env!("CARGO_PKG_VERSION"))
}

/// US Letter for inch-pound jobs, A4 otherwise (common practice).
pub(crate) fn paper(system: UnitSystem) -> Paper {
    match system {
        UnitSystem::InchPound => Paper::UsLetter,
        UnitSystem::Si | UnitSystem::EpaMetric => Paper::A4,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::testkit::{evaluated, identity};

    #[test]
    fn the_header_names_the_survey_and_the_report() {
        let (e, a) = evaluated("hvac");
        let h = section(&Job::new(&e, &a), &identity());
        assert_eq!(h.kind, "Duct traverse report");
        assert_eq!(h.title, "AHU-3 supply main, airflow verification");
        assert_eq!(h.site, "Larchmere Clinic, plant room 2 (fictional)");
        assert_eq!(h.test_date, "2026-11-03");
        assert_eq!(h.report_id, identity().report_id);
        assert_eq!(h.paper, Paper::UsLetter);
        let (e, a) = evaluated("en-stack");
        let h = section(&Job::new(&e, &a), &identity());
        assert_eq!((h.kind.as_str(), h.paper), ("Flow test report", Paper::A4));
    }
}
