//! What a survey's `[checks]`, `[instruments]` and `[reported]` sections say, as values: read by
//! `input::assess_config`, used by `assess`.

use super::instruments::Instruments;
use super::integrity::ReportedValue;
use super::Settings;

/// The survey's own settings for the assessment.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct AssessConfig {
    pub checks: Settings,
    pub instruments: Instruments,
    pub reported: Vec<ReportedValue>,
}
