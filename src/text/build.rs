//! A build job's report in words: what was done, and for a stop why, what was kept and how
//! to go on (the status column of `kernstep build`).

use crate::completion::StopReason;
use crate::testset::{BudgetRecord, JobReport, JobStatus, StateRecord};

/// How a caller names the limits that stop builds (its own option names, say) and the command
/// that resumes the build.
pub trait StopWords {
    /// The limit behind `reason`, in the caller's words.
    fn limit(&self, reason: StopReason) -> String;
    /// The command that runs the same build again (and so resumes it).
    fn resume(&self) -> String;
}

/// `stage 3/5 (mid-stage), 1200 moves, 42 s of work`.
pub fn state_text(state: &StateRecord) -> String {
    let within = if state.mid_stage { " (mid-stage)" } else { "" };
    format!(
        "stage {}/{}{within}, {} moves, {:.0} s of work",
        state.stage, state.stages, state.moves, state.work_seconds
    )
}

/// The report in words; `budgeted` when a budget was asked for.
pub fn job_text(report: &JobReport, budgeted: bool, words: &dyn StopWords) -> String {
    let mut status = match (report.status, &report.written_to) {
        (JobStatus::Stopped { reason }, _) => return stopped_text(report, reason, words),
        (JobStatus::Present, _) if budgeted => {
            "present (the whole request; no deepening needed)".to_string()
        }
        (JobStatus::Present, _) => "present".to_string(),
        (_, Some(path)) => format!("written to {}", path.display()),
        _ if report.implicit() => {
            "built (implicit: the network's cycles, nothing enumerated)".to_string()
        }
        _ => "built".to_string(),
    };
    if report.cut_nothing {
        status.push_str(" (complete: the truncation cut nothing)");
    }
    if let Some(state) = &report.resumed {
        status.push_str(&format!(" (resumed from {})", state_text(state)));
    }
    if let Some(damage) = &report.replaced {
        status.push_str(&format!(" (replaced a damaged entry: {damage})"));
    }
    if let Some(budget) = &report.budget {
        status.push_str(&budget_text(budget, words));
    }
    status
}

/// What a budgeted build reached, after the status word.
fn budget_text(budget: &BudgetRecord, words: &dyn StopWords) -> String {
    let limit = budget.norm_limit.unwrap_or_default();
    let mut text = match (budget.complete, budget.proven_bound) {
        (false, bound) => format!(
            " within the budget: norm limit {limit} ({}; partial)",
            bound.map_or("no finite proven bound".to_string(), |b| format!(
                "proven bound {b}"
            ))
        ),
        (true, Some(bound)) if limit >= bound => {
            format!(" within the budget: complete (norm limit {limit} reached the proven bound)")
        }
        (true, _) => format!(" within the budget: complete (norm limit {limit} cut nothing)"),
    };
    if let Some(level) = budget.stopped_level() {
        let reason = level.stopped.expect("a stopped level has a reason");
        text.push_str(&format!(
            "; norm limit {} stopped ({}) after {:.1} s",
            level.norm_limit,
            words.limit(reason),
            level.seconds
        ));
    }
    text
}

/// A stopped build in words: why, what was kept, and how to go on.
fn stopped_text(report: &JobReport, reason: StopReason, words: &dyn StopWords) -> String {
    let why = words.limit(reason);
    if let Some(level) = report.budget.as_ref().and_then(BudgetRecord::stopped_level) {
        return format!(
            "stopped: {why} at norm limit {}, the first level; nothing stored",
            level.norm_limit
        );
    }
    match &report.kept {
        None => format!("stopped: {why}; nothing kept"),
        Some(state) => format!(
            "stopped: {why}; kept {}; resume with: {}",
            state_text(state),
            words.resume()
        ),
    }
}
