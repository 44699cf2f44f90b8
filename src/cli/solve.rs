//! `kernstep solve MODEL`: re-optimise one instance of a model with its cached Graver basis and
//! print the plan with its certificate.

use std::io::{self, Write};
use std::path::PathBuf;
use std::process::ExitCode;

use clap::Args;
use kernstep::formats::published::PriceCurve;
use kernstep::formats::tagged;
use kernstep::text::{curve_text, solve_summary};
use kernstep::trace::{curve_plot, Outcome};

use super::common::write_atomically;
use super::instance::{cancelled, InstanceArgs};

/// Arguments of `solve`.
#[derive(Debug, Args)]
pub struct SolveArgs {
    #[command(flatten)]
    pub instance: InstanceArgs,
    /// Print one JSON document (layout in the README) instead of the summary.
    #[arg(long)]
    pub json: bool,
    /// With --warm-start: add W per unit changed against the warm start's plan to the cost (a
    /// variable the model file prices with its own `change_cost` keeps that price).
    #[arg(long, value_name = "W", requires = "warm_start")]
    pub change_cost: Option<i64>,
    /// With --change-cost: also solve without the price and report its figures.
    #[arg(long, requires = "change_cost")]
    pub compare: bool,
    /// With --change-cost W: print the plans optimal for every price λ W, 0 <= λ <= MAX,
    /// found exactly (the price of stability) instead of one solve.
    #[arg(long, value_name = "MAX", requires = "change_cost")]
    pub price_curve: Option<i64>,
    /// With --price-curve: also draw the curve (plan cost against units moved) as SVG.
    #[arg(long, value_name = "FILE", requires = "price_curve")]
    pub svg: Option<PathBuf>,
}

/// Solves the instance, re-checks the claim and prints the result.
pub fn run(args: &SolveArgs) -> anyhow::Result<ExitCode> {
    let instance = args
        .instance
        .load(args.change_cost.map(|w| (w, args.compare)))?;
    if let Some(top) = args.price_curve {
        let pieces = instance.stability_curve(top)?;
        if let Some(path) = &args.svg {
            let title = match &instance.variant {
                Some(id) => format!("price of stability: {} / {id}", instance.path),
                None => format!("price of stability: {}", instance.path),
            };
            write_atomically(path, curve_plot(&pieces, &title)?.as_bytes())?;
        }
        let text = match args.json {
            false => curve_text(&pieces),
            true => tagged::pretty(&PriceCurve { pieces })? + "\n",
        };
        io::stdout().lock().write_all(text.as_bytes())?;
        return Ok(ExitCode::SUCCESS);
    }
    let doc = instance.solve(&cancelled)?;
    let mut out = io::stdout().lock();
    if args.json {
        writeln!(out, "{}", tagged::pretty(&doc)?)?;
    } else {
        let from_base = instance.base.is_some();
        let text = solve_summary(&doc, &instance.set, &instance.model, from_base);
        out.write_all(text.as_bytes())?;
    }
    out.flush()?;
    Ok(exit_code(&doc.status))
}

/// 0 for an optimal plan (also among truncated moves), 1 for every other outcome.
pub fn exit_code(outcome: &Outcome) -> ExitCode {
    if outcome.is_optimal() {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(1)
    }
}
