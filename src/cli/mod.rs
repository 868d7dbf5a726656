//! The command line: clap definitions, validated settings, and printing (table, JSON, CSV).
//!
//! Two stages, as everywhere in annulus: clap parses raw arguments, then each command turns them
//! into a validated setting (quantities parsed, conflicts refused) before calling the library.
//! This is the only module that prints.

mod calibrate;
mod check;
mod choices;
mod completions;
mod compute;
mod fieldsheet;
mod files;
mod init;
mod keygen;
mod layout;
pub mod output;
mod plane_args;
mod rata;
mod report;
mod review;
mod system;
mod trust;
mod verify;

use crate::diag::Error;
use clap::{Parser, Subcommand};
use std::ffi::OsString;
use std::io::Write;

pub use output::{ColorChoice, Format};

/// Pitot-tube traverses of ducts and stacks: point layouts, flows, checks and signed reports.
#[derive(Debug, Parser)]
#[command(
    name = "annulus",
    version,
    about = "Pitot-tube velocity traverses of ducts and stacks: point layouts, verified flows, \
             acceptance checks and signed PDF test reports",
    after_help = "Exit codes: 0 success; 1 input rejected; 2 environment or internal failure; \
                  3 a check or verification failed.\n\nStart with `annulus layout --round 60in` or \
                  `annulus compute sample-data/stack/survey.toml`."
)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
    /// Print only results and errors, no notes.
    #[arg(long, global = true)]
    pub quiet: bool,
    /// Colour in terminal tables.
    #[arg(long, global = true, value_enum, default_value_t = ColorChoice::Auto)]
    pub color: ColorChoice,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Traverse point positions and probe insertion marks for a plane.
    #[command(
        after_help = "Examples:\n  annulus layout --round 60in --convention epa-method-2 --upstream 8D --downstream 2D\n  annulus layout --rect 48inx24in --method log-tchebycheff --port-length 2in\n  annulus layout sample-data/stack/survey.toml --format json"
    )]
    Layout(layout::LayoutArgs),
    /// Write a new survey file and a blank readings sheet, ready to fill in.
    #[command(
        after_help = "Example:\n  annulus init site-visit/ --round 96in --convention epa-method-2 --runs 3 --port-length 5in"
    )]
    Init(init::InitArgs),
    /// Velocities, density and flows for each run and their average.
    #[command(
        after_help = "Examples:\n  annulus compute sample-data/stack/survey.toml\n  annulus compute sample-data/stack/survey.toml --points --si\n  annulus compute sample-data/hvac/survey.toml --format json"
    )]
    Compute(compute::ComputeArgs),
    /// Acceptance checks, data-quality findings and the uncertainty budget; exit 3 if any check fails.
    #[command(after_help = "Example:\n  annulus check sample-data/stack/survey.toml")]
    Check(check::CheckArgs),
    /// The signed-off PDF test report, with the survey, readings and results embedded.
    #[command(
        after_help = "Examples:\n  annulus report sample-data/stack/survey.toml -o boiler2.pdf\n  annulus report sample-data/stack/survey.toml -o boiler2.pdf --sign me.key"
    )]
    Report(report::ReportArgs),
    /// A test-and-balance submittal: an air system's ducts, branches, outside air, fan and terminals against design; exit 3 if any is outside tolerance.
    #[command(
        after_help = "Examples:\n  annulus system sample-data/building/ahu-2.toml\n  annulus system sample-data/building/ahu-2.toml --format json\n  annulus system sample-data/building/ahu-2.toml -o ahu-2-submittal.pdf"
    )]
    System(system::SystemArgs),
    /// Re-derive a report's results from its embedded data and check its hashes and signature.
    #[command(after_help = "Example:\n  annulus verify boiler2.pdf --key me.pub")]
    Verify(verify::VerifyArgs),
    /// Recompute, check and verify every survey and report under a folder.
    #[command(after_help = "Example:\n  annulus review archive/ --format csv > review.csv")]
    Review(review::ReviewArgs),
    /// Write a new Ed25519 signing key pair.
    #[command(after_help = "Example:\n  annulus keygen dana-ferrow")]
    Keygen(keygen::KeygenArgs),
    /// Type S pitot calibration against a standard pitot (EPA Method 2 §10.1).
    #[command(after_help = "Example:\n  annulus calibrate sample-data/calibration/ts-0417.toml")]
    Calibrate(calibrate::CalibrateArgs),
    /// Flow-monitor relative accuracy test audit from paired runs.
    #[command(after_help = "Example:\n  annulus rata sample-data/rata/unit2-rata.toml")]
    Rata(rata::RataArgs),
    /// Shell completion script for bash, zsh, fish, elvish or PowerShell.
    #[command(
        after_help = "Example:\n  annulus completions bash > /etc/bash_completion.d/annulus"
    )]
    Completions(completions::CompletionsArgs),
    /// Man pages generated from the command definitions.
    #[command(after_help = "Example:\n  annulus man -o man/ && man -l man/annulus-layout.1")]
    Man(completions::ManArgs),
}

/// Today's date on this machine's clock: the one place the program reads the clock (a blank
/// survey or field sheet is dated the day it is made; everything else takes its dates from its
/// inputs).
pub(crate) fn today() -> chrono::NaiveDate {
    chrono::Local::now().date_naive()
}

/// Runs the program on `args`; returns the process exit code.
pub fn run<I, T>(args: I) -> i32
where
    I: IntoIterator<Item = T>,
    T: Into<OsString> + Clone,
{
    let cli = match Cli::try_parse_from(args) {
        Ok(c) => c,
        Err(e) => {
            let code = match e.kind() {
                clap::error::ErrorKind::DisplayHelp
                | clap::error::ErrorKind::DisplayVersion
                | clap::error::ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand => 0,
                _ => 1,
            };
            let _ = e.print();
            return code;
        }
    };
    let color = cli.color.enabled();
    let ctx = output::Ctx {
        quiet: cli.quiet,
        color,
        width: output::terminal_width(),
    };
    let result = match cli.command {
        Command::Layout(a) => layout::run(a, &ctx),
        Command::Init(a) => init::run(a, &ctx),
        Command::Compute(a) => compute::run(a, &ctx),
        Command::Check(a) => check::run(a, &ctx),
        Command::Report(a) => report::run(a, &ctx),
        Command::System(a) => system::run(a, &ctx),
        Command::Verify(a) => verify::run(a, &ctx),
        Command::Review(a) => review::run(a, &ctx),
        Command::Keygen(a) => keygen::run(a, &ctx),
        Command::Calibrate(a) => calibrate::run(a, &ctx),
        Command::Rata(a) => rata::run(a, &ctx),
        Command::Completions(a) => completions::completions(a, &ctx),
        Command::Man(a) => completions::man(a, &ctx),
    };
    match result {
        Ok(code) => code,
        Err(e) => {
            let mut err = std::io::stderr().lock();
            let _ = writeln!(err, "{e}");
            e.exit_code()
        }
    }
}

/// Writes to stdout; a closed pipe (e.g. `| head`) is not an error worth a message.
pub(crate) fn emit(text: &str) -> Result<(), Error> {
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|_| out.flush()) {
        Ok(()) => Ok(()),
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        Err(e) => Err(Error::Environment(format!(
            "cannot write to standard output: {e}"
        ))),
    }
}
