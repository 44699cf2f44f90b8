//! Re-optimising many days of one model with one prepared test set: in parallel on the current
//! rayon pool, or chained, each day warm-started from the previous day's plan. On a network
//! the parallel days all start from the optimum of the model's own numbers (each day is a few
//! changes to them), computed once.
//!
//! A plan from a truncated set gets a dual bound ([`crate::bound`]), tried first with the
//! multipliers of the model's own numbers (or, chained, of the day before), which serve most
//! days without an LP solve.
//!
//! Chained days may carry a change price ([`ChangePrice`]): each day after the first then
//! minimises its cost plus `sum_i w_i |x_i - p_i|` against the plan of the day before, and its
//! result gives the plan cost and the change cost apart ([`Stability`]), with the same
//! figures for the plan without the price when [`ReplanSettings::compare`] asks for them.
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
use crate::solve::{
    ChangePrice, Numbers, ParsedLine, Prepared, Stability, Variant, Verdict, WarmStart,
};
use crate::trace::certify;

/// How to re-optimise the days.
#[derive(Clone, Debug, Default)]
pub struct ReplanSettings {
    /// Solver settings for every day. Default: [`augment::Options::default`].
    pub options: augment::Options,
    /// Warm-start each day from the last feasible plan before it (sequential). Default: off.
    pub chain: bool,
    /// Chained days: the price per unit changed against the day before. Default: none.
    pub change: Option<ChangePrice>,
    /// With a change price, also solve each priced day without it and report its figures.
    /// Default: off.
    pub compare: bool,
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
    /// A day priced against the day before: the figures of its plan (and, compared, of the
    /// plan without the price), and the constant the solver's objective leaves out
    /// ([`ChangePrice::constant`]).
    pub change: Option<DayChange>,
}

/// The change figures of a priced day.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct DayChange {
    /// The figures of the plan, and of the plan without the price when compared.
    pub stability: Stability,
    /// The whole objective less the solver's: add it to the verdict's cost and bound.
    pub constant: i128,
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
        let id = match &parsed {
            Ok(v) => Some(v.id.clone()),
            Err(e) => e.day().map(String::from),
        };
        let finish = |outcome, bound| DayResult {
            line,
            id: id.clone(),
            outcome,
            bound,
            elapsed: started.elapsed(),
            change: None,
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
        let priced = match (&self.settings.change, warm) {
            (Some(price), Some(warm)) if self.settings.chain => Some((price, warm)),
            _ => None,
        };
        let solved = match priced {
            Some((price, previous)) => self.priced_day(numbers, price, previous, prices),
            None => self
                .solve(numbers, warm, prices)
                .map(|(verdict, bound)| (verdict, bound, None)),
        };
        let result = match solved {
            Ok((verdict, bound, change)) => DayResult {
                change,
                ..finish(DayOutcome::Solved(verdict), bound)
            },
            Err(e) => finish(DayOutcome::Failed(e), None),
        };
        (result, Some(numbers.rhs.to_vec()))
    }

    /// Solves the instance `numbers` from `warm` and confirms the verdict ([`Run::confirmed`]).
    fn solve(
        &self,
        numbers: Numbers<'_>,
        warm: Option<&WarmStart>,
        prices: Option<&Multipliers>,
    ) -> Result<(Verdict, Option<DualBound>), Error> {
        let verdict =
            self.prepared
                .solve_numbers(numbers, &self.settings.options, warm, self.cancel)?;
        self.confirmed(numbers, verdict, prices)
    }

    /// Solves the instance `numbers` plus the change price against the previous plan (also
    /// the start), and figures its plan (and, compared, the plan without the price).
    fn priced_day(
        &self,
        numbers: Numbers<'_>,
        price: &ChangePrice,
        previous: &WarmStart,
        prices: Option<&Multipliers>,
    ) -> Result<(Verdict, Option<DualBound>, Option<DayChange>), Error> {
        let convex = price.priced(numbers.convex, &previous.x)?;
        let with_price = Numbers {
            convex: &convex,
            ..numbers
        };
        let (verdict, bound) = self.solve(with_price, Some(previous), prices)?;
        let Some(optimum) = verdict.optimum() else {
            return Ok((verdict, bound, None));
        };
        let priced = price.priced_figures(numbers, &previous.x, optimum)?;
        let constant = price
            .constant(&previous.x)
            .ok_or_else(|| Error::Overflow("the change price of the previous plan".into()))?;
        let unpriced = if self.settings.compare {
            let (plain, _) = self.solve(numbers, Some(previous), prices)?;
            plain
                .optimum()
                .and_then(|(_, x)| price.figures(numbers, &previous.x, x))
        } else {
            None
        };
        let stability = Stability { priced, unpriced };
        Ok((
            verdict,
            bound,
            Some(DayChange {
                stability,
                constant,
            }),
        ))
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
