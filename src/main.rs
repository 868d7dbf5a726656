//! The `annulus` binary: parse, run, print diagnostics, exit with the documented code.

// mimalloc: review spends about a third of its time in the system allocator (many short strings
// per finding); mimalloc measured faster on the review benchmark.
#[global_allocator]
static GLOBAL: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() {
    no_huge_pages();
    std::process::exit(annulus::cli::run(std::env::args_os()));
}

/// Transparent huge pages off for this process. mimalloc reserves its arenas 2 MiB-aligned, so on a
/// system whose THP setting is `always` each arena it touches is faulted in, and zeroed, 2 MiB at a
/// time. Measured with benches/timing.py (interleaved runs, see README, Speed): the peak memory of
/// `report` of the sample stack falls from about 150 to 90 MiB and of `review` of 10 000 surveys
/// from 64 to under 50 MiB, no slower. (The same as mimalloc's `MIMALLOC_ALLOW_THP=0`, which only
/// takes effect from the environment, before the program starts.)
fn no_huge_pages() {
    #[cfg(target_os = "linux")]
    // SAFETY: prctl(PR_SET_THP_DISABLE) takes plain integers and touches no memory of ours; on a
    // kernel without it the call fails and nothing changes.
    unsafe {
        libc::prctl(libc::PR_SET_THP_DISABLE, 1, 0, 0, 0);
    }
}
