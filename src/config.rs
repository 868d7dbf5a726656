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
