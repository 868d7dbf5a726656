//! The sign-off block: who tested and who reviewed, with the attestation.

use super::Job;
use crate::report::model::SignOff;

pub(super) fn section(job: &Job) -> SignOff {
    let s = job.survey();
    SignOff {
        tested_by: s.signoff.tested_by.clone().unwrap_or_default(),
        certificate: s.signoff.certificate.clone().unwrap_or_default(),
        tested_date: s.date.to_string(),
        reviewed_by: s.signoff.reviewed_by.clone().unwrap_or_default(),
        reviewed_date: String::new(),
        organisation: s.signoff.organisation.clone().unwrap_or_default(),
        statement: "I confirm that this test was carried out and its data recorded as described, \
                    and that the results were computed from the attached readings by the method \
                    stated."
            .into(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::testkit::evaluated;

    #[test]
    fn the_survey_names_the_tester_and_reviewer() {
        let (e, a) = evaluated("hvac");
        let s = section(&Job::new(&e, &a));
        // sample-data/hvac [signoff]
        assert_eq!(s.tested_by, "Sam Adeyemi-Hart");
        assert_eq!(s.certificate, "TAB-FIC-40817");
        assert_eq!(s.reviewed_by, "Noor Castellanos");
        assert_eq!(s.tested_date, "2026-11-03");
        assert!(s.reviewed_date.is_empty(), "dated by hand when reviewed");
    }
}
