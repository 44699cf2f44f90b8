//! A batch in words: the summary of a run of days (counts by status, the largest bound gap,
//! the total objective, times, the set and the caution that goes with every plan).

use super::layout::pairs;
use crate::formats::batch::RunSummary;

/// The labelled counts and figures of `summary`, then its caution.
pub fn summary_text(summary: &RunSummary) -> String {
    let t = &summary.tally;
    let mut rows = vec![("days".to_string(), t.days.to_string())];
    let counts = [
        ("optimal", t.optimal),
        ("  of which by dual bound", t.optimal_by_bound),
        ("optimal within norm", t.optimal_within_norm),
        ("infeasible", t.infeasible),
        ("unknown (partial set, no plan found)", t.unknown),
        ("unbounded", t.unbounded),
        ("step limit", t.step_limit),
        ("not solved (Ctrl-C)", t.interrupted),
        ("bad lines or errors", t.errors),
    ];
    rows.extend(
        counts
            .iter()
            .filter(|(label, n)| *n > 0 || *label == "optimal")
            .map(|(label, n)| (label.to_string(), n.to_string())),
    );
    if let Some(gap) = &t.largest_gap {
        rows.push(("largest bound gap".into(), gap.clone()));
    }
    rows.push(("total objective".into(), t.total_objective.to_string()));
    rows.push(("solve time".into(), format!("{:.3} s", t.solve_seconds)));
    rows.push(("wall time".into(), format!("{:.3} s", summary.wall_seconds)));
    rows.push((
        "test set".into(),
        match summary.set.as_str() {
            "network" => "the cycles of the network (implicit: nothing enumerated)".into(),
            _ => format!("{} moves, {}", summary.moves, summary.set),
        },
    ));
    format!("{}caution: {}\n", pairs(&rows), summary.caution)
}
