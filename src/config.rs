//! The user configuration: who is testing for which firm, the default signing key, the trust list
//! and the default convention. A validated value; `input::config_file` finds and reads the file.
//!
//! Every key is optional and a missing file means no configuration. Paths are already resolved
//! (relative to the configuration file's folder, `~/` to the home folder) when a [`Config`]
//! exists. Commands use what applies to them: `report --sign` without a path signs with
//! `signing_key`; `verify` and `review` take `trust` as the trust list unless `--trust` or `--key`
//! is given; `organisation`, `technician`, `certificate` and `convention` are the defaults new
//! surveys and reports take where a survey says nothing.

use crate::survey::ConventionId;
use std::path::PathBuf;

/// Environment variable naming the configuration file (empty: no configuration at all).
pub const CONFIG_ENV: &str = "ANNULUS_CONFIG";

/// The keys of the configuration file, in the order the documentation lists them.
pub const KEYS: [&str; 6] = [
    "organisation",
    "technician",
    "certificate",
    "signing_key",
    "trust",
    "convention",
];

/// A read and validated configuration.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Config {
    /// The file it was read from.
    pub path: PathBuf,
    /// The firm the technician tests for (printed as the organisation in sign-off blocks).
    pub organisation: Option<String>,
    /// The technician's name (`tested_by` when a survey gives none).
    pub technician: Option<String>,
    /// The technician's certificate or qualification number.
    pub certificate: Option<String>,
    /// The secret key `report --sign` uses when no path is given.
    pub signing_key: Option<PathBuf>,
    /// A folder of `.pub` files or a trust list file: whose signatures count.
    pub trust: Option<PathBuf>,
    /// The convention new surveys take when none is given.
    pub convention: Option<ConventionId>,
}

/// Who did the work, when the inputs name nobody: the configuration's firm, technician and
/// certificate. A survey's (or a system file's) `[signoff]` overrides each of them.
#[derive(Debug, Clone, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
pub struct SignoffDefaults {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub organisation: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub technician: Option<String>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub certificate: Option<String>,
}

impl SignoffDefaults {
    /// True when there is nothing to fill in.
    pub fn is_empty(&self) -> bool {
        self.organisation.is_none() && self.technician.is_none() && self.certificate.is_none()
    }

    /// `signoff` with every field it leaves empty taken from these defaults.
    pub fn fill(&self, signoff: &crate::survey::Signoff) -> crate::survey::Signoff {
        let pick = |own: &Option<String>, default: &Option<String>| {
            own.clone()
                .filter(|s| !s.trim().is_empty())
                .or_else(|| default.clone())
        };
        crate::survey::Signoff {
            tested_by: pick(&signoff.tested_by, &self.technician),
            certificate: pick(&signoff.certificate, &self.certificate),
            reviewed_by: signoff.reviewed_by.clone(),
            organisation: pick(&signoff.organisation, &self.organisation),
        }
    }
}

impl Config {
    /// The sign-off defaults this configuration gives.
    pub fn signoff_defaults(&self) -> SignoffDefaults {
        SignoffDefaults {
            organisation: self.organisation.clone(),
            technician: self.technician.clone(),
            certificate: self.certificate.clone(),
        }
    }
}

#[cfg(test)]
mod signoff_tests {
    use super::*;
    use crate::survey::Signoff;

    #[test]
    fn the_inputs_override_the_configuration_field_by_field() {
        let d = SignoffDefaults {
            organisation: Some("Configured firm".into()),
            technician: Some("Configured technician".into()),
            certificate: Some("CFG-1".into()),
        };
        let own = Signoff {
            tested_by: Some("Survey technician".into()),
            certificate: None,
            reviewed_by: Some("Reviewer".into()),
            organisation: Some(" ".into()),
        };
        let f = d.fill(&own);
        assert_eq!(f.tested_by.as_deref(), Some("Survey technician"));
        assert_eq!(f.certificate.as_deref(), Some("CFG-1"));
        assert_eq!(f.organisation.as_deref(), Some("Configured firm"));
        assert_eq!(f.reviewed_by.as_deref(), Some("Reviewer"));
        assert!(SignoffDefaults::default().is_empty());
    }
}
