//! A solve in words: the summary `kernstep solve` prints (status, objective, dual bound,
//! steps, the set, the plan by name, the certificate).

use std::fmt::Write;

use augment::Coverage;

use super::layout::{count_moves, pairs, table, wrapped};
use super::sense::in_file_sense;
use crate::model::Model;
use crate::scenario::CurvePiece;
use crate::solve::{PlanFigures, Stability};
use crate::testset::{Served, Source};
use crate::trace::{certificate_words, BoundDoc, Outcome, SolveDocument, StepCounts};

/// Output width of the human summary.
pub const WIDTH: usize = 100;
/// At most this many plan values are listed in the summary.
const PLAN_ROWS: usize = 40;

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
        count_moves(set.moves.len()),
        set.source
    )
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

/// `plan cost 298 + change cost 60 (8 variables changed, 20 units moved)`.
fn figures_text(f: &PlanFigures) -> String {
    format!(
        "plan cost {} + change cost {} ({} variables changed, {} units moved)",
        f.plan_cost, f.change_cost, f.changed, f.moved
    )
}

/// The rows of a priced plan's figures and, compared, of the unpriced plan's.
fn change_rows(change: &Stability) -> Vec<(String, String)> {
    let mut rows = vec![("with price".to_string(), figures_text(&change.priced))];
    if let Some(unpriced) = &change.unpriced {
        rows.push(("without".to_string(), figures_text(unpriced)));
    }
    rows
}

/// The stability curve as a table: one row per piece, from its price on.
pub fn curve_text(pieces: &[CurvePiece]) -> String {
    let rows: Vec<Vec<String>> = pieces
        .iter()
        .map(|p| {
            let f = &p.figures;
            let from = p.from.to_string();
            vec![from, f.plan_cost.to_string(), f.change_cost.to_string()]
                .into_iter()
                .chain([f.changed.to_string(), f.moved.to_string()])
                .collect()
        })
        .collect();
    let header = ["from price", "plan cost", "change", "changed", "moved"];
    table(&header, &rows)
}

/// The summary of `doc`, solved with `set` on `model`; `from_base` when the solve started
/// from the optimum of the model's own numbers (a network variant without a warm start).
pub fn solve_summary(doc: &SolveDocument, set: &Served, model: &Model, from_base: bool) -> String {
    let mut rows = vec![("model".to_string(), doc.model.clone())];
    if let Some(id) = &doc.variant {
        rows.push(("variant".to_string(), id.clone()));
    }
    let start = if doc.warm_start {
        "warm (previous plan + particular solution of the change)"
    } else if from_base {
        "from the optimum of the model's own numbers (network)"
    } else {
        "cold (integer solution of A x = b)"
    };
    rows.push(("start".to_string(), start.to_string()));
    let status = in_file_sense(doc.status.to_string(), &model.units);
    rows.push(("status".to_string(), status));
    if doc.x.is_some() {
        match (doc.objective, doc.violation) {
            (Some(objective), _) => {
                rows.push(("objective".to_string(), objective.to_string()));
                if let Some(change) = &doc.change {
                    rows.extend(change_rows(change));
                }
                if let Some(bound) = &doc.bound {
                    rows.push((
                        "dual bound".to_string(),
                        in_file_sense(bound_text(bound), &model.units),
                    ));
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
    rows.push(("moves".to_string(), set_text(set)));
    let mut out = pairs(&rows);
    if let Some(x) = &doc.x {
        out.push('\n');
        if let Some(heading) = point_heading(&doc.status) {
            let _ = writeln!(out, "{heading}");
        }
        out.push_str(&plan_text(x, &doc.variables));
    }
    out.push('\n');
    let words = certificate_words(&doc.status, doc.recheck.as_ref(), model);
    out.push_str(&wrapped(&in_file_sense(words, &model.units), WIDTH, 2));
    out
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
fn plan_text(x: &[i64], names: &[String]) -> String {
    let nonzero: Vec<Vec<String>> = x
        .iter()
        .zip(names)
        .filter(|(&v, _)| v != 0)
        .map(|(v, name)| vec![name.clone(), v.to_string()])
        .collect();
    if nonzero.is_empty() {
        return "every variable is 0\n".to_string();
    }
    let shown = nonzero.len().min(PLAN_ROWS);
    let mut out = table(&["variable", "value"], &nonzero[..shown]);
    if shown < nonzero.len() {
        let _ = writeln!(
            out,
            "... and {} more nonzero values (the JSON document lists the whole plan)",
            nonzero.len() - shown
        );
    }
    out
}
