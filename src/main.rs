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

fn is_broken_pipe(err: &anyhow::Error) -> bool {
    err.chain().any(|e| {
        e.downcast_ref::<std::io::Error>()
            .is_some_and(|io| io.kind() == std::io::ErrorKind::BrokenPipe)
    })
}
