//! The `annulus` binary: parse, run, print diagnostics, exit with the documented code.

// mimalloc: review spends about a third of its time in the system allocator (many short strings
// per finding); mimalloc measured faster on the review benchmark.
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() {
    std::process::exit(annulus::cli::run(std::env::args_os()));
}
