//! The sign-off block: who tested and who reviewed, with the attestation.

use super::{Identity, Job};
use crate::report::model::SignOff;

/// The sign-off block: the survey's `[signoff]`, each empty field taken from the user
/// configuration's defaults (`id.defaults`).
pub(super) fn section(job: &Job, id: &Identity) -> SignOff {
    let s = job.survey();
    let so = id.defaults.fill(&s.signoff);
    SignOff {
        tested_by: so.tested_by.clone().unwrap_or_default(),
        certificate: so.certificate.clone().unwrap_or_default(),
        tested_date: s.date.to_string(),
        reviewed_by: so.reviewed_by.clone().unwrap_or_default(),
        reviewed_date: String::new(),
        organisation: so.organisation.clone().unwrap_or_default(),
        statement: "I confirm that this test was carried out and its data recorded as described, \
                    and that the results were computed from the attached readings by the method \
                    stated."
            .into(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::config::SignoffDefaults;
    use crate::report::testkit::{evaluated, identity};

    #[test]
    fn the_survey_names_the_tester_and_reviewer() {
        let (e, a) = evaluated("hvac");
        let s = section(&Job::new(&e, &a), &identity());
        // sample-data/hvac [signoff]
        assert_eq!(s.tested_by, "Sam Adeyemi-Hart");
        assert_eq!(s.certificate, "TAB-FIC-40817");
        assert_eq!(s.reviewed_by, "Noor Castellanos");
        assert_eq!(s.tested_date, "2026-11-03");
        assert!(s.reviewed_date.is_empty(), "dated by hand when reviewed");
    }

    #[test]
    fn the_configuration_fills_what_the_survey_leaves_empty() {
        let (e, a) = evaluated("hvac");
        let mut id = identity();
        id.defaults = SignoffDefaults {
            organisation: Some("Configured firm".into()),
            technician: Some("Configured technician".into()),
            certificate: None,
        };
        let s = section(&Job::new(&e, &a), &id);
        // the survey names its technician; it names no firm, so the configuration's is printed
        assert_eq!(s.tested_by, "Sam Adeyemi-Hart");
        assert_eq!(s.organisation, "Configured firm");
    }
}
