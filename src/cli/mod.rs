//! The command line of the `kernstep` binary: [`args`] holds the raw clap structures, and one
//! module per verb turns them into library calls and renders the result. Only this module
//! knows both clap and the library.

mod analyze;
pub mod args;
mod batch;
mod build;
mod cache;
mod common;
mod demo;
mod instance;
mod limits;
mod parse;
mod progress;
#[cfg(feature = "mpi")]
mod ranked;
mod shell;
mod solve;
mod trace;

use std::process::ExitCode;

use args::{Cli, Command};
pub use common::render_chain;
#[cfg(feature = "mpi")]
pub use ranked::start as start_ranks;

/// Runs the verb chosen on the command line and returns the exit code its outcome maps to.
///
/// A build that a solving verb started on a cache miss and a limit stopped
/// ([`limits::BuildStopped`]) is printed here and exits 1 (after Ctrl-C, 130 or 143).
pub fn run(cli: Cli) -> anyhow::Result<ExitCode> {
    let outcome = match cli.command {
        Command::Analyze(a) => analyze::run(&a),
        Command::Build(a) => build::run(&a),
        Command::Cache(a) => cache::run(&a),
        Command::Solve(a) => solve::run(&a),
        Command::Trace(a) => trace::run(&a),
        Command::Batch(a) => batch::run(&a),
        Command::Demo(a) => demo::run(&a),
        Command::Completions(a) => shell::completions(&a),
        Command::Manual => shell::manual(),
    };
    match outcome {
        Err(err) => match err.downcast_ref::<limits::BuildStopped>() {
            Some(stop) => {
                eprintln!("kernstep: {}", render_chain(&err));
                Ok(ExitCode::from(stop.exit_status()))
            }
            None => Err(err),
        },
        done => done,
    }
}
