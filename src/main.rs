//! The `annulus` binary: parse, run, print diagnostics, exit with the documented code.

fn main() {
    std::process::exit(annulus::cli::run(std::env::args_os()));
}
