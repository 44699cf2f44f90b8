//! `kernstep solve MODEL`: re-optimise one instance of a model with its cached Graver basis and
//! print the plan with its certificate.

use std::io::{self, Write};
use std::process::ExitCode;

use augment::Coverage;
use clap::Args;
use kernstep::testset::{Served, Source};
use kernstep::trace::{
    certificate_words, solve_document, BoundDoc, Outcome, SolveDocument, StepCounts,
};

use super::explain::{count_moves, wrap};
use super::instance::{cancelled, Instance, InstanceArgs};
use super::table::{write_pairs, write_table};

/// Output width of the human summary.
const WIDTH: usize = 100;
/// At most this many plan values are listed in the human summary.
const PLAN_ROWS: usize = 40;

/// Arguments of `solve`.
#[derive(Debug, Args)]
pub struct SolveArgs {
    #[command(flatten)]
    pub instance: InstanceArgs,
    /// Print one JSON document (layout in the README) instead of the summary.
    #[arg(long)]
    pub json: bool,
}

/// Solves the instance, re-checks the claim and prints the result.
pub fn run(args: &SolveArgs) -> anyhow::Result<ExitCode> {
    let instance = args.instance.load()?;
    let doc = solve_document(
        &instance.prepared,
        &instance.model,
        &instance.options,
        instance.context(),
        &cancelled,
    )?;
    let mut out = io::stdout().lock();
    if args.json {
        writeln!(out, "{}", serde_json::to_string_pretty(&doc)?)?;
    } else {
        write_summary(&mut out, &instance, &doc)?;
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

/// `4 moves, complete Graver basis, cache entry 1a2b3c4d5e6f`, or the implicit set of a
/// network.
pub fn set_text(set: &Served) -> String {
    if set.source == Source::Network {
        return "the cycles of the network (its Graver basis, implicit: nothing enumerated)"
            .to_string();
    }
    let coverage = match set.coverage {
        Coverage::Complete => "complete Graver basis".to_string(),
        Coverage::BoxValid => "Graver basis truncated to the build's box".to_string(),
        Coverage::NormTruncated { norm } => format!("Graver basis up to ℓ1 norm {norm}"),
    };
    format!(
        "{}, {coverage}, {}",
        count_moves(set.set.elements.len()),
        set.source
    )
}

fn write_summary(
    out: &mut impl Write,
    instance: &Instance,
    doc: &SolveDocument,
) -> anyhow::Result<()> {
    let mut rows = vec![("model".to_string(), doc.model.clone())];
    if let Some(id) = &doc.variant {
        rows.push(("variant".to_string(), id.clone()));
    }
    let start = if doc.warm_start {
        "warm (previous plan + particular solution of the change)"
    } else if instance.base.is_some() {
        "from the optimum of the model's own numbers (network)"
    } else {
        "cold (integer solution of A x = b)"
    };
    rows.push(("start".to_string(), start.to_string()));
    rows.push(("status".to_string(), doc.status.to_string()));
    if doc.x.is_some() {
        match (doc.objective, doc.violation) {
            (Some(objective), _) => {
                rows.push(("objective".to_string(), objective.to_string()));
                if let Some(bound) = &doc.bound {
                    rows.push(("dual bound".to_string(), bound_text(bound)));
                }
            }
            (None, violation) => rows.push((
                "violation".to_string(),
                violation.map_or_else(String::new, |v| v.to_string()),
            )),
        }
        let StepCounts { feasibility, cost } = doc.steps;
        rows.push((
            "steps".to_string(),
            format!("{feasibility} in phase I (feasibility), {cost} in phase II (cost)"),
        ));
        rows.push(("time".to_string(), format!("{:.3} ms", doc.seconds * 1e3)));
    }
    rows.push(("moves".to_string(), set_text(&instance.set)));
    write_pairs(out, &rows)?;
    if let Some(x) = &doc.x {
        writeln!(out)?;
        if let Some(heading) = point_heading(&doc.status) {
            writeln!(out, "{heading}")?;
        }
        write_plan(out, x, &doc.variables)?;
    }
    writeln!(out)?;
    for line in wrap(
        &certificate_words(&doc.status, doc.recheck.as_ref(), &instance.model),
        WIDTH,
        2,
    ) {
        writeln!(out, "{line}")?;
    }
    Ok(())
}

/// `2780, meets the cost` or `2750, gap 30 (1.08%)`, with where the bound came from.
pub fn bound_text(bound: &BoundDoc) -> String {
    let reach = if bound.gap == "0" {
        "meets the cost: no plan is cheaper".to_string()
    } else {
        format!("gap {} ({:.2}%)", bound.gap, bound.relative_gap * 100.0)
    };
    format!(
        "{}, {reach} (LP relaxation's dual, evaluated exactly)",
        bound.value
    )
}

/// What the listed point is, when it is not an optimal plan.
fn point_heading(outcome: &Outcome) -> Option<&'static str> {
    match outcome {
        Outcome::Optimal | Outcome::OptimalForMovesUpTo { .. } => None,
        Outcome::Unbounded { .. } => Some("the feasible plan the ray starts from:"),
        Outcome::StepLimit | Outcome::Cancelled => Some("the point reached so far:"),
        _ => Some("the point where phase I stopped (outside the bounds):"),
    }
}

/// The nonzero plan values by variable name, at most [`PLAN_ROWS`] of them.
fn write_plan(out: &mut impl Write, x: &[i64], names: &[String]) -> io::Result<()> {
    let nonzero: Vec<Vec<String>> = x
        .iter()
        .zip(names)
        .filter(|(&v, _)| v != 0)
        .map(|(v, name)| vec![name.clone(), v.to_string()])
        .collect();
    if nonzero.is_empty() {
        return writeln!(out, "every variable is 0");
    }
    let shown = nonzero.len().min(PLAN_ROWS);
    write_table(out, &["variable", "value"], &nonzero[..shown])?;
    if shown < nonzero.len() {
        writeln!(
            out,
            "... and {} more nonzero values (--json lists the whole plan)",
            nonzero.len() - shown
        )?;
    }
    Ok(())
}
