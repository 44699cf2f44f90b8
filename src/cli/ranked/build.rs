//! `mpirun -np N kernstep build MODEL ...`: one build shared by the ranks.

use std::process::ExitCode;

use anyhow::bail;
use kernstep::scenario::PlanInput;

use super::Ranks;
use crate::cli::build::{follow, run_with, would_complete, BuildArgs, MethodArg};

/// Rank 0 leads (the cache lock, checkpoints, the stored entry, the summary); the others
/// follow with their share of every round. The ranks first agree whether a completion runs
/// at all (a stored entry or a network's implicit one needs none: rank 0 reports it alone).
pub fn run(args: &BuildArgs, ranks: Ranks) -> anyhow::Result<ExitCode> {
    let paths = PlanInput::files(&args.models)?;
    let [path] = paths.as_slice() else {
        bail!(
            "a build across MPI ranks takes exactly one model ({} given)",
            paths.len()
        );
    };
    if args.budget.is_some() {
        bail!("--budget is not shared across MPI ranks yet; run the budgeted build in one process");
    }
    if args.method == MethodArg::Pottier {
        bail!("a build across MPI ranks runs project-and-lift (--method lift)");
    }
    let lead = if ranks.rank == 0 {
        if would_complete(args, path)? {
            "build"
        } else {
            "alone"
        }
    } else {
        ""
    };
    let decided = ranks.all_gather_text(lead)?;
    match (decided[0].as_str(), ranks.rank) {
        ("build", 0) => run_with(args, Some(&ranks)),
        ("build", _) => follow(args, path, &ranks),
        (_, 0) => run_with(args, None),
        _ => Ok(ExitCode::SUCCESS),
    }
}
