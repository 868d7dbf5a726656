//! The `annulus` binary: parse, run, print diagnostics, exit with the documented code.

// mimalloc: review spends about a third of its time in the system allocator (many short strings
// per finding); mimalloc measured faster on the review benchmark.
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() {
    if !is_command("verify") {
        no_huge_pages();
    }
    std::process::exit(annulus::cli::run(std::env::args_os()));
}

/// Whether the command line's subcommand (its first word that is neither an option nor the value
/// of `--color`, the one global option that takes a value) is `name`.
fn is_command(name: &str) -> bool {
    let mut after_color = false;
    for a in std::env::args_os().skip(1) {
        let text = a.to_string_lossy();
        if std::mem::replace(&mut after_color, text == "--color") {
            continue;
        }
        if !text.starts_with('-') {
            return a == name;
        }
    }
    false
}

/// Transparent huge pages off for this process, except for `verify`. mimalloc reserves its arenas
/// 2 MiB-aligned, so on a system whose THP setting is `always` each arena it touches is faulted
/// in, and zeroed, 2 MiB at a time. Measured with benches/timing.py (3 interleaved rounds against
/// the build before, see README, Speed): `report` of the sample stack 154 -> 88 MiB peak and
/// 0.35 -> 0.30 s, a 1 600-point-per-run report 6.7 -> 5.7 s, `review` of 10 000 surveys 65 -> 46
/// MiB at the same speed; but `verify` of a 10 MB report 0.25 -> 0.38 s (it reads and inflates
/// large buffers once, where 2 MiB pages save faults), so `verify` keeps them. The same as
/// mimalloc's `MIMALLOC_ALLOW_THP=0`, which only takes effect from the environment.
fn no_huge_pages() {
    #[cfg(target_os = "linux")]
    // SAFETY: prctl(PR_SET_THP_DISABLE) takes plain integers and touches no memory of ours; on a
    // kernel without it the call fails and nothing changes.
    unsafe {
        libc::prctl(libc::PR_SET_THP_DISABLE, 1, 0, 0, 0);
    }
}
