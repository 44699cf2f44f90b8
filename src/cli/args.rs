//! The raw command-line arguments as clap parses them; [`super`] turns them into library
//! settings. Each verb has its own argument struct.

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand};
use kernstep::analysis::AnalysisOptions;

/// Test sets of lattice moves, computed once, for fast certified re-optimisation of integer
/// models.
#[derive(Debug, Parser)]
#[command(name = "kernstep", version)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// The verbs.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Print the figures of a model's constraint matrix: rank, Δ, column numbers,
    /// unimodularity and the bounds on test-set move norms.
    Analyze(AnalyzeArgs),
    /// Compute test sets for model files (or directories of them) and store them in the
    /// cache; `--out` writes one set to a file instead.
    Build(super::build::BuildArgs),
    /// Look after the stored test sets: list, show, verify, remove, prune, export.
    Cache(super::cache::CacheVerbArgs),
    /// Re-optimise one instance (the model, a variant of it, or a day of a transport scenario)
    /// with the cached Graver basis and print the plan with its certificate.
    Solve(super::solve::SolveArgs),
    /// Solve one instance and show every augmenting step, the certificate and, with --svg, a
    /// plot of the violation and cost per step.
    Trace(super::trace::TraceArgs),
    /// Re-optimise every day of a transport scenario (or every variant of a model) with one
    /// cached test set, in parallel or chained, writing one result per day and a summary.
    Batch(super::batch::BatchArgs),
    /// Run the whole job on a built-in invented scenario: test set, 30 days, table, trace.
    Demo(super::demo::DemoArgs),
    /// Print the completion script of a shell (for example
    /// `kernstep completions bash > ~/.local/share/bash-completion/completions/kernstep`).
    Completions(super::shell::CompletionsArgs),
    /// Print the manual page (roff; `kernstep manual | man -l -`).
    Manual,
}

/// Arguments of `analyze`.
#[derive(Debug, Args)]
pub struct AnalyzeArgs {
    /// The model file (.json, .toml or .mps), or a transport scenario file (its compiled matrix).
    pub model: PathBuf,
    /// Print every figure as JSON instead of a table.
    #[arg(long)]
    pub json: bool,
    /// Largest number of subdeterminants to enumerate before Δ is only bounded and
    /// (total) unimodularity left undecided.
    #[arg(long, value_name = "N", default_value_t = AnalysisOptions::DEFAULT_SUBDET_LIMIT)]
    pub subdet_limit: u64,
    /// Estimate the size and time of a build: build the first norm levels for up to this
    /// long (`5s`, `1m`), then extrapolate the levels up to the proven bound (or N).
    #[arg(long, value_name = "PROBE", value_parser = super::parse::duration)]
    pub estimate: Option<std::time::Duration>,
    /// With --estimate: the last norm limit to project (default: the proven bound).
    #[arg(long, value_name = "N", requires = "estimate")]
    pub up_to: Option<u64>,
}
