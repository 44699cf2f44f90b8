//! Re-optimising many days of one model with one prepared test set: in parallel on the current
//! rayon pool, or chained, each day warm-started from the previous day's plan. On a network
//! the parallel days all start from the optimum of the model's own numbers (each day is a few
//! changes to them), computed once.
//!
//! A plan from a truncated set gets a dual bound ([`crate::bound`]), tried first with the
//! multipliers of the model's own numbers (or, chained, of the day before), which serve most
//! days without an LP solve.
//!
//! Results come back in input order whatever the thread count. Every day's claim (optimal,
//! infeasible, unbounded, a bound) is re-checked independently ([`crate::trace::recheck`])
//! before it is returned; a refuted claim makes the day an error. A day whose line was bad is an
//! error result and does not stop the others; once `cancel` returns true, days not yet begun
//! are [`DayOutcome::NotRun`] and a running solve ends as cancelled.

use std::time::{Duration, Instant};

use rayon::prelude::*;

use crate::bound::{DualBound, Multipliers};
use crate::certify::{judge, Answer};
use crate::error::Error;
use crate::model::Model;
use crate::network::FlowOutcome;
use crate::solve::{Numbers, ParsedLine, Prepared, Variant, Verdict, WarmStart};
use crate::trace::certify;

/// How to re-optimise the days.
#[derive(Clone, Copy, Debug, Default)]
pub struct ReplanSettings {
    /// Solver settings for every day. Default: [`augment::Options::default`].
    pub options: augment::Options,
    /// Warm-start each day from the last feasible plan before it (sequential). Default: off.
    pub chain: bool,
}

/// The result of one day.
#[derive(Debug)]
pub struct DayResult {
    /// The line the day starts on in its file.
    pub line: usize,
    /// The day's name, when its line could be read.
    pub id: Option<String>,
    /// What happened.
    pub outcome: DayOutcome,
    /// The proven lower bound of a plan from a truncated set, re-checked (see
    /// [`crate::bound`]); `None` for a complete set, a network, or a day without such a plan.
    pub bound: Option<DualBound>,
    /// Wall-clock time spent on the day.
    pub elapsed: Duration,
}

/// What happened to one day.
#[derive(Debug)]
pub enum DayOutcome {
    /// The solver ran; the verdict says how it ended.
    Solved(Verdict),
    /// The day's line was unusable, or the solver refused it.
    Failed(Error),
    /// Cancelled before the day began.
    NotRun,
}

impl DayResult {
    /// The day's plan when it is feasible (inside every bound).
    pub fn feasible_plan(&self) -> Option<&[i64]> {
        match &self.outcome {
            DayOutcome::Solved(Verdict::Solved(s)) if s.violation == 0 => Some(&s.x),
            DayOutcome::Solved(Verdict::Flow(f)) => match &f.solution.outcome {
                FlowOutcome::Optimal { flow, .. } | FlowOutcome::Unbounded { flow, .. } => {
                    Some(flow)
                }
                _ => None,
            },
            _ => None,
        }
    }

    /// The certified answer of a solved day (see [`judge`]); `None` for a day that failed
    /// or did not run.
    pub fn answer(&self) -> Option<Answer> {
        match &self.outcome {
            DayOutcome::Solved(verdict) => Some(judge(verdict, self.bound.as_ref())),
            _ => None,
        }
    }

    /// True when the day's plan is proven optimal: by the set (complete, or a network), or by
    /// a dual bound that meets its cost.
    pub fn proven_optimal(&self) -> bool {
        matches!(self.answer(), Some(Answer::Optimal { .. }))
    }

    /// The row potentials that proved the day's plan optimal (network solves only).
    pub fn potentials(&self) -> Option<&[i64]> {
        match &self.outcome {
            DayOutcome::Solved(verdict) => verdict.potentials(),
            _ => None,
        }
    }
}

/// Solves every day of `days` (variants of `model`) with `prepared`; `origin` names the days'
/// file in error messages.
pub fn replan(
    prepared: &Prepared,
    model: &Model,
    days: Vec<ParsedLine>,
    settings: &ReplanSettings,
    origin: &str,
    cancel: &(dyn Fn() -> bool + Sync),
) -> Vec<DayResult> {
    let run = Run {
        prepared,
        model,
        settings,
        origin,
        cancel,
    };
    // The prices of the model's own numbers serve most days' bounds without an LP solve.
    let base_prices = prepared.base_multipliers(model);
    if settings.chain {
        let mut warm: Option<WarmStart> = None;
        let mut prices = base_prices;
        let mut out = Vec::with_capacity(days.len());
        for (line, parsed) in days {
            let (result, day_rhs) = run.day(line, parsed, warm.as_ref(), prices.as_ref());
            if let Some(bound) = &result.bound {
                prices = Some(bound.multipliers.clone());
            }
            if let (Some(x), Some(rhs)) = (result.feasible_plan(), day_rhs) {
                warm = Some(WarmStart {
                    rhs,
                    x: x.to_vec(),
                    potentials: result.potentials().map(<[i64]>::to_vec),
                });
            }
            out.push(result);
        }
        out
    } else {
        let base = prepared.base_start(model, &settings.options, cancel);
        days.into_par_iter()
            .map(|(line, parsed)| run.day(line, parsed, base.as_ref(), base_prices.as_ref()).0)
            .collect()
    }
}

/// What every day of one run shares.
struct Run<'a> {
    prepared: &'a Prepared,
    model: &'a Model,
    settings: &'a ReplanSettings,
    origin: &'a str,
    cancel: &'a (dyn Fn() -> bool + Sync),
}

impl Run<'_> {
    /// Solves one day, bounding a truncated set's plan from `prices` first; also returns the
    /// day's right-hand side for a warm start of the next.
    fn day(
        &self,
        line: usize,
        parsed: Result<Variant, Error>,
        warm: Option<&WarmStart>,
        prices: Option<&Multipliers>,
    ) -> (DayResult, Option<Vec<i64>>) {
        let started = Instant::now();
        let id = parsed.as_ref().ok().map(|v| v.id.clone());
        let finish = |outcome, bound| DayResult {
            line,
            id: id.clone(),
            outcome,
            bound,
            elapsed: started.elapsed(),
        };
        if (self.cancel)() {
            return (finish(DayOutcome::NotRun, None), None);
        }
        let variant = match parsed {
            Ok(v) => v,
            Err(e) => return (finish(DayOutcome::Failed(e), None), None),
        };
        let numbers = match variant.numbers(self.model, self.origin) {
            Ok(n) => n,
            Err(e) => return (finish(DayOutcome::Failed(e), None), None),
        };
        let solved = self
            .prepared
            .solve_numbers(numbers, &self.settings.options, warm, self.cancel)
            .and_then(|verdict| self.confirmed(numbers, verdict, prices));
        let result = match solved {
            Ok((verdict, bound)) => finish(DayOutcome::Solved(verdict), bound),
            Err(e) => finish(DayOutcome::Failed(e), None),
        };
        (result, Some(numbers.rhs.to_vec()))
    }

    /// The verdict with its dual bound (for a truncated set's plan) once the independent
    /// re-check confirms the claim; a refuted claim is an error, so a day is never reported
    /// optimal (or infeasible) without its check.
    fn confirmed(
        &self,
        numbers: Numbers<'_>,
        verdict: Verdict,
        prices: Option<&Multipliers>,
    ) -> Result<(Verdict, Option<DualBound>), Error> {
        let certified = certify(self.prepared, &self.model.matrix, numbers, verdict, prices)?;
        Ok((certified.verdict, certified.bound))
    }
}
