//! The `kernstep` command line.
//!
//! Exit codes: 0 when the verb completed (for optimisation verbs: an optimal answer), 1 when
//! a verb finds no feasible or improving answer (infeasible, unbounded), 2 on any error, which
//! is printed once on stderr as `kernstep: <error chain>`. A closed stdout (broken pipe) is
//! not an error.

mod cli;

use std::process::ExitCode;

use clap::Parser;

fn main() -> ExitCode {
    fix_mmap_threshold();
    let args = cli::args::Cli::parse();
    // Under `mpirun`, MPI lives until the verb has run (finalised when this is dropped).
    #[cfg(feature = "mpi")]
    let _mpi = cli::start_ranks();
    match cli::run(args) {
        Ok(code) => code,
        Err(err) if is_broken_pipe(&err) => ExitCode::SUCCESS,
        Err(err) => {
            eprintln!("kernstep: {}", cli::render_chain(&err));
            ExitCode::from(2)
        }
    }
}

/// Fixes glibc's threshold above which blocks are mapped on their own (and unmapped when
/// freed), at 4 MiB. Left to itself, glibc raises the threshold each time a large block is
/// freed (up to 32 MiB, `mallopt(3)`), after which the completion's growing buffers of a few
/// megabytes are carved from the heap, and what they leave behind there stays resident: the
/// 3x3x5 tables built into the cache peaked at 175-198 MiB of RSS, against 112 MiB with the
/// threshold fixed (any fixed value turns the adjustment off).
#[cfg(all(target_os = "linux", target_env = "gnu"))]
fn fix_mmap_threshold() {
    // SAFETY: `mallopt` only sets an allocator parameter, before any other thread exists.
    unsafe {
        libc::mallopt(libc::M_MMAP_THRESHOLD, 4 << 20);
    }
}

/// Other allocators keep their own policy.
#[cfg(not(all(target_os = "linux", target_env = "gnu")))]
fn fix_mmap_threshold() {}

fn is_broken_pipe(err: &anyhow::Error) -> bool {
    err.chain().any(|e| {
        e.downcast_ref::<std::io::Error>()
            .is_some_and(|io| io.kind() == std::io::ErrorKind::BrokenPipe)
    })
}
