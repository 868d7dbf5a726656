//! `annulus completions SHELL` and `annulus man`: shell completion scripts and man pages generated
//! from the same clap definitions the program parses with, so they cannot drift.

use super::output::Ctx;
use super::Cli;
use crate::diag::Error;
use clap::{Args, CommandFactory};
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct CompletionsArgs {
    /// The shell to write completions for.
    #[arg(value_enum)]
    pub shell: clap_complete::Shell,
}

#[derive(Debug, Args)]
pub struct ManArgs {
    /// Folder to write annulus.1 and one page per subcommand into; prints annulus.1 when absent.
    #[arg(short, long, value_name = "DIR")]
    pub output: Option<PathBuf>,
}

pub fn completions(args: CompletionsArgs, _ctx: &Ctx) -> Result<i32, Error> {
    let mut cmd = Cli::command();
    let mut buf = Vec::new();
    clap_complete::generate(args.shell, &mut cmd, "annulus", &mut buf);
    super::emit(&String::from_utf8_lossy(&buf))?;
    Ok(0)
}

fn render(cmd: clap::Command) -> Result<Vec<u8>, Error> {
    let mut buf = Vec::new();
    clap_mangen::Man::new(cmd)
        .render(&mut buf)
        .map_err(|e| Error::Environment(format!("cannot render the man page: {e}")))?;
    Ok(buf)
}

pub fn man(args: ManArgs, ctx: &Ctx) -> Result<i32, Error> {
    let cmd = Cli::command();
    match &args.output {
        None => {
            super::emit(&String::from_utf8_lossy(&render(cmd)?))?;
        }
        Some(dir) => {
            std::fs::create_dir_all(dir).map_err(|e| {
                Error::Environment(format!("cannot create `{}`: {e}", dir.display()))
            })?;
            let mut written = vec![];
            let top = render(cmd.clone())?;
            let path = dir.join("annulus.1");
            crate::write::write_atomic(&path, &top)?;
            written.push(path);
            for sub in cmd.get_subcommands() {
                let name = format!("annulus-{}", sub.get_name());
                let page = render(sub.clone().name(name.clone()))?;
                let path = dir.join(format!("{name}.1"));
                crate::write::write_atomic(&path, &page)?;
                written.push(path);
            }
            if !ctx.quiet {
                eprintln!("wrote {} man pages in {}", written.len(), dir.display());
            }
        }
    }
    Ok(0)
}
