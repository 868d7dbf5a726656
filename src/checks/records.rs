//! Record checks: the pitot's calibration and every instrument calibration `[instruments]` states,
//! judged on the survey date.
//!
//! Owns the date arithmetic of calibration intervals (calendar months, chrono). The survey date is
//! the reference: this module never looks at the clock. No files, no printing.

use super::instruments::{Calibration, Role};
use super::{
    CheckDef, Finding, Group, Judge, LimitDefault, LimitKind, LimitSpec, Rule, Status, Stricter,
    Subject, ALL,
};
use crate::survey::ProbeKind;
use crate::text;
use chrono::{Months, NaiveDate};
use serde::Serialize;

const INTERVAL: LimitSpec = LimitSpec {
    key: "interval_months",
    text: "calibrated within {} before the test",
    default: LimitDefault::Fixed(12.0),
    kind: LimitKind::Months,
    stricter: Stricter::Lower,
    quoting: &[],
};

pub static PROBE_CALIBRATION: CheckDef = CheckDef {
    id: "probe-calibration",
    group: Group::Records,
    description: "the pitot's calibration is recorded and not expired on the survey date",
    source: "EPA Method 2 (40 CFR 60 App. A-1) §10.1 Type S calibration; the 12-month interval is common practice",
    criterion: "",
    limits: &[INTERVAL],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Survey(probe_calibration),
};

pub static INSTRUMENT_CALIBRATION: CheckDef = CheckDef {
    id: "instrument-calibration",
    group: Group::Records,
    description: "each instrument in [instruments] with a calibration date is within its interval on the survey date",
    source: "common practice (the instrument's own interval where [instruments] states one)",
    criterion: "",
    limits: &[LimitSpec {
        text: "calibrated within {} before the test (unless the instrument states its own interval)",
        ..INTERVAL
    }],
    conventions: ALL,
    from_memory: false,
    on_violation: Status::Fail,
    judge: Judge::Survey(instrument_calibration),
};

/// The outcome of a calibration date against an interval, on the test date.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum CalibrationState {
    /// Within the interval; `valid_until` is the last day it covers.
    Current {
        valid_until: NaiveDate,
    },
    /// Calibrated after the test (a post-test calibration).
    AfterTest,
    Expired {
        expired_on: NaiveDate,
    },
}

/// The last day a calibration made on `calibrated` covers with an interval of `interval_months`
/// calendar months (chrono month arithmetic clamps to the month's end, e.g. 31 Jan + 1 month =
/// 28/29 Feb); `None` beyond the calendar's range. The one place a due date is worked out.
pub fn valid_until(calibrated: NaiveDate, interval_months: u32) -> Option<NaiveDate> {
    calibrated.checked_add_months(Months::new(interval_months))
}

/// A dated calibration on record, with the interval the calibration checks judge it by and the
/// last day it covers: the checks and the report's instrument table read the same datum.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CalibrationDue {
    /// `[instruments]` key of the instrument (`pitot`, `dp`, …); the survey's `[probe]` is `pitot`.
    pub key: &'static str,
    /// The instrument in words, e.g. `dp gauge`.
    pub instrument: &'static str,
    pub serial: Option<String>,
    pub calibrated: NaiveDate,
    pub interval_months: u32,
    pub valid_until: Option<NaiveDate>,
}

fn probe_interval(rule: &Rule) -> u32 {
    rule.value("interval_months").round() as u32
}

/// Every dated calibration of a survey: the probe's (`[probe] calibrated`), then each
/// `[instruments]` entry's, with the interval in force (the survey's `[checks]` setting, the
/// instrument's own `interval_months`, or the default).
pub fn calibration_dues(s: &Subject, settings: &super::Settings) -> Vec<CalibrationDue> {
    let rule = |def: &'static CheckDef| Rule::new(def, settings.get(def.id), s.table());
    let mut out = Vec::new();
    if let Some(date) = s.survey.probe.calibrated {
        let months = probe_interval(&rule(&PROBE_CALIBRATION));
        out.push(CalibrationDue {
            key: Role::Pitot.key(),
            instrument: Role::Pitot.name(),
            serial: s.survey.probe.serial.clone(),
            calibrated: date,
            interval_months: months,
            valid_until: valid_until(date, months),
        });
    }
    let default = probe_interval(&rule(&INSTRUMENT_CALIBRATION));
    for (role, cal) in s.instruments.calibrations() {
        let Some(date) = cal.calibrated else { continue };
        let months = cal.interval_months.unwrap_or(default);
        out.push(CalibrationDue {
            key: role.key(),
            instrument: role.name(),
            serial: cal.serial.clone(),
            calibrated: date,
            interval_months: months,
            valid_until: valid_until(date, months),
        });
    }
    out
}

/// Judges `calibrated + interval_months` against `test_date`. A calibration covers the test up to
/// and including the same calendar day `interval_months` later (chrono month arithmetic clamps to
/// the month's end, e.g. 31 Jan + 1 month = 28/29 Feb).
pub fn calibration_state(
    calibrated: NaiveDate,
    interval_months: u32,
    test_date: NaiveDate,
) -> CalibrationState {
    if calibrated > test_date {
        return CalibrationState::AfterTest;
    }
    match valid_until(calibrated, interval_months) {
        Some(until) if test_date <= until => CalibrationState::Current { valid_until: until },
        Some(until) => CalibrationState::Expired { expired_on: until },
        None => CalibrationState::Current {
            valid_until: NaiveDate::MAX,
        },
    }
}

fn judge(
    rule: &Rule,
    what: &str,
    calibrated: NaiveDate,
    interval: u32,
    test_date: NaiveDate,
) -> Finding {
    let age_days = (test_date - calibrated).num_days();
    let base = format!(
        "{what} calibrated {calibrated}, {} before the test on {test_date}; interval {interval} months",
        if age_days >= 0 {
            format!("{age_days} days")
        } else {
            format!("{} days after, not", -age_days)
        }
    );
    let (status, msg) = match calibration_state(calibrated, interval, test_date) {
        CalibrationState::Current { valid_until } => (
            Status::Pass,
            text!("{}: valid until {}", base, valid_until.to_string()),
        ),
        CalibrationState::AfterTest => (Status::Pass, text!("{}: a post-test calibration", base)),
        CalibrationState::Expired { expired_on } => (
            rule.violated(),
            text!("{}: EXPIRED on {}", base, expired_on.to_string()),
        ),
    };
    rule.finding(status, Some(age_days as f64), "d", msg, &[])
}

fn probe_calibration(rule: &Rule, s: &Subject) -> Vec<Finding> {
    let p = &s.survey.probe;
    let interval = probe_interval(rule);
    let what = match &p.serial {
        Some(serial) => format!("pitot {serial}"),
        None => "the pitot".to_string(),
    };
    let mut out = Vec::new();
    if let Some(c) = &p.calibration {
        // EPA Method 2 §10.1: a Type S tube whose calibration fails acceptance may not be used.
        let mut f = if c.accepted {
            rule.finding(
                Status::Pass,
                Some(c.assigned_coefficient),
                "1",
                format!(
                    "calibration `{}` of {} on {} meets Method 2 §10.1 acceptance; assigned Cp {:.4}",
                    c.file, c.probe, c.date, c.assigned_coefficient
                ),
                &[],
            )
        } else {
            rule.finding(
                Status::Fail,
                Some(c.assigned_coefficient),
                "1",
                format!(
                    "calibration `{}` of {} on {} FAILS Method 2 §10.1 acceptance (leg deviations or A–B difference over 0.01): the probe's coefficient is not usable",
                    c.file, c.probe, c.date
                ),
                &[],
            )
        };
        f.subject = Some("calibration file".into());
        out.push(f);
    }
    out.push(match p.calibrated {
        Some(date) => judge(rule, &what, date, interval, s.survey.date),
        None if p.kind == ProbeKind::SType => rule.finding(
            Status::Warn,
            None,
            "d",
            format!("{what} is a Type S pitot with no calibration date ([probe] calibrated): its coefficient {} is not traceable in this record", p.coefficient),
            &[],
        ),
        None => rule.not_applicable(
            "standard pitot with no calibration date: its coefficient is taken by design",
        ),
    });
    out
}

fn instrument_calibration(rule: &Rule, s: &Subject) -> Vec<Finding> {
    let default = probe_interval(rule);
    let mut out = Vec::new();
    for (role, cal) in s.instruments.calibrations() {
        let Calibration {
            serial,
            calibrated,
            interval_months,
        } = cal;
        let what = match serial {
            Some(sn) => format!("{} {sn}", role.name()),
            None => role.name().to_string(),
        };
        let mut f = match calibrated {
            Some(date) => judge(
                rule,
                &what,
                *date,
                interval_months.unwrap_or(default),
                s.survey.date,
            ),
            None if serial.is_some() => rule.finding(
                Status::Warn,
                None,
                "d",
                format!("{what} is listed without a calibration date"),
                &[],
            ),
            None => continue,
        };
        if let Some(own) = interval_months {
            f.limit = super::LimitWords::words(
                text!(
                    "calibrated within {} months before the test (the instrument's stated interval)",
                    *own
                ),
                rule.table(),
            );
        }
        f.subject = Some(role.key().to_string());
        out.push(f);
    }
    if out.is_empty() {
        out.push(
            rule.not_applicable(
                "[instruments] lists no instrument with a serial or calibration date",
            ),
        );
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn date(s: &str) -> NaiveDate {
        NaiveDate::parse_from_str(s, "%Y-%m-%d").unwrap()
    }

    #[test]
    fn interval_counts_calendar_months() {
        // common practice: a 12-month calibration covers the test up to the same day a year on
        let cal = date("2025-10-14");
        assert_eq!(
            calibration_state(cal, 12, date("2026-10-14")),
            CalibrationState::Current {
                valid_until: date("2026-10-14")
            }
        );
        assert_eq!(
            calibration_state(cal, 12, date("2026-10-15")),
            CalibrationState::Expired {
                expired_on: date("2026-10-14")
            }
        );
        assert_eq!(
            calibration_state(date("2026-11-01"), 12, date("2026-10-14")),
            CalibrationState::AfterTest
        );
        // chrono clamps to the month's end
        assert_eq!(
            calibration_state(date("2026-01-31"), 1, date("2026-02-28")),
            CalibrationState::Current {
                valid_until: date("2026-02-28")
            }
        );
    }
}

#[cfg(test)]
mod assessed {
    use crate::checks::testkit::*;
    use crate::checks::Status;

    fn calibrated(date: &str, extra: &str) -> crate::assess::Assessment {
        let s = survey(EPA_SURVEY, &["1"], extra).replace("2026-05-11", date);
        assess_text(&s, &[("run1.csv", epa_csv())])
    }

    #[test]
    fn probe_calibration_expiry() {
        // common practice, 12 months: calibrated 2025-05-11, tested 2026-10-14 → expired 2026-05-11
        let a = calibrated("2025-05-11", "");
        let f = survey_finding(&a, "probe-calibration");
        assert_eq!(f.status, Status::Fail);
        assert!(
            f.message.to_string().contains("EXPIRED on 2026-05-11"),
            "{}",
            f.message
        );
        assert_eq!(f.measured, Some(521.0));
        assert!(a.failed());
        // within the interval
        assert_eq!(
            survey_finding(&calibrated("2025-10-14", ""), "probe-calibration").status,
            Status::Pass
        );
        // an 18-month interval, with its reason, recorded in the finding
        let a = calibrated(
            "2025-05-11",
            "[checks.probe-calibration]\ninterval_months = 18\nreason = \"manufacturer interval for this probe\"\n",
        );
        let f = survey_finding(&a, "probe-calibration");
        assert_eq!(f.status, Status::Pass, "{}", f.message);
        assert!(
            f.message.to_string().contains(
                "limit relaxed from 12 months to 18 months: manufacturer interval for this probe"
            ),
            "{}",
            f.message
        );
        // no date on a Type S pitot → warning
        let s = survey(EPA_SURVEY, &["1"], "").replace("calibrated = \"2026-05-11\"\n", "");
        let a = assess_text(&s, &[("run1.csv", epa_csv())]);
        assert_eq!(survey_finding(&a, "probe-calibration").status, Status::Warn);
    }

    #[test]
    fn instrument_calibrations() {
        let a = epa_one_run(
            "[instruments]\ndp = { serial = \"M-12\", calibrated = \"2025-01-10\" }\nbarometer = { serial = \"B-3\", calibrated = \"2026-09-01\" }\nthermometer = { serial = \"T-1\" }\n",
        );
        let found: Vec<_> = a
            .checks
            .iter()
            .filter(|f| f.id == "instrument-calibration")
            .collect();
        assert_eq!(found.len(), 3);
        assert_eq!(found[0].subject.as_deref(), Some("dp"));
        assert_eq!(found[0].status, Status::Fail, "{}", found[0].message);
        assert!(
            found[0].message.to_string().contains("Δp gauge M-12"),
            "{}",
            found[0].message
        );
        assert_eq!(found[1].subject.as_deref(), Some("thermometer"));
        assert_eq!(found[1].status, Status::Warn);
        assert_eq!(found[2].status, Status::Pass);
        // the instrument's own interval applies
        let a = epa_one_run(
            "[instruments]\ndp = { serial = \"M-12\", calibrated = \"2025-01-10\", interval_months = 24 }\n",
        );
        let f = survey_finding(&a, "instrument-calibration");
        assert_eq!(f.status, Status::Pass, "{}", f.message);
        assert!(f.limit.to_string().contains("24 months"));
    }
}
