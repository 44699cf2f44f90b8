//! Budgeted builds: the largest norm limit whose truncated set finishes within the limits of
//! a [`Control`] (a time budget, an element cap), found by deepening the limit (iterative
//! deepening; Korf 1985, "Depth-first iterative-deepening", Artificial Intelligence 27).
//! Each level is a fresh build, so a level that runs out of time costs nothing but that
//! time, and the set kept is exactly the Graver elements up to its limit. A level whose
//! completion shows that its limit cut nothing (see [`crate::completion::Cut`]) is the
//! complete set and ends the deepening, as does reaching the proven norm bound; this is what
//! keeps a budget from rebuilding a set that is already whole at ever larger limits. Levels
//! that cannot add a move are skipped: when every kernel vector has even norm
//! ([`crate::analysis::norm_step`]) the limits are even.
//!
//! Proven bounds can be far above the norms where the elements are (hundreds of thousands
//! for a truckload matrix whose elements stop at a few hundred), so the step gallops: it
//! doubles after each level that took under [`CHEAP`] of the time left, returns to one after
//! a dear level, and a jump of more than one level may use only half the time left; a jump
//! that runs out of it (or of memory) falls back to a quarter of its step from the last level kept.

use std::time::{Duration, Instant};

use cache::Completeness;

use super::build::{build, BuildOutcome, BuiltSet};
use super::spec::{BuildSpec, NormLimit};
use crate::analysis::{norm_step, MatrixAnalysis};
use crate::completion::{Control, StopReason};
use crate::error::Result;
use crate::model::Model;

/// The first norm limit tried: no nonzero kernel vector of an integer matrix without zero
/// columns has ℓ1 norm 1.
pub const FIRST_LEVEL: u64 = 2;

/// A level that took less than this share of the time left lets the step double.
const CHEAP: f64 = 1.0 / 16.0;

/// How one level of a deepening ended.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum LevelEnd {
    /// The set up to the level's limit, with this many elements.
    Built {
        /// Elements of the set (one per `±` pair).
        elements: usize,
    },
    /// A limit stopped the level.
    Stopped(StopReason),
}

/// One level of a deepening.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Level {
    /// The ℓ1 norm limit of the level.
    pub limit: u64,
    /// How it ended.
    pub end: LevelEnd,
    /// Wall-clock time of the level.
    pub elapsed: Duration,
}

/// The result of a deepening.
#[derive(Debug)]
pub struct Deepened {
    /// The set of the last level that finished, if any did.
    pub kept: Option<Box<BuiltSet>>,
    /// Every level tried, in order.
    pub levels: Vec<Level>,
    /// The proven norm bound of the matrix: a kept set at this limit is complete.
    pub proven_bound: u64,
    /// The step between the norms of moves (2 when all are even), whose multiples the levels are.
    pub norm_step: u64,
}

impl Deepened {
    /// The norm limit of the kept set.
    pub fn limit_reached(&self) -> Option<u64> {
        self.levels
            .iter()
            .rev()
            .find(|l| matches!(l.end, LevelEnd::Built { .. }))
            .map(|l| l.limit)
    }
}

/// Builds `spec` (whose norm limit is the largest one tried: `AtMost(N)` caps the
/// deepening at `N`, otherwise the proven bound does) for `model`, deepening from
/// [`FIRST_LEVEL`] until the cap is reached or a limit of `control` stops a level for good;
/// `on_level` sees each level as it ends.
pub fn deepen(
    model: &Model,
    analysis: &MatrixAnalysis,
    spec: &BuildSpec,
    control: &Control<'_>,
    on_level: &mut dyn FnMut(&Level),
) -> Result<Deepened> {
    let proven_bound = analysis.norm_limit();
    let step_of_norms = norm_step(&model.matrix)?;
    let cap = match spec.norm_limit {
        NormLimit::AtMost(n) => n.min(proven_bound),
        NormLimit::Auto | NormLimit::Unlimited => proven_bound,
    }
    .max(FIRST_LEVEL);
    let mut deepened = Deepened {
        kept: None,
        levels: Vec::new(),
        proven_bound,
        norm_step: step_of_norms,
    };
    let (mut kept_limit, mut step) = (FIRST_LEVEL - step_of_norms, step_of_norms);
    loop {
        let limit = next_limit(kept_limit, step, step_of_norms, cap);
        let attempt = match (step > step_of_norms, control.remaining()) {
            (true, Some(left)) => control.within(left / 2),
            _ => *control,
        };
        let level_spec = BuildSpec {
            norm_limit: NormLimit::AtMost(limit),
            ..spec.clone()
        };
        let resolved = level_spec.resolve(model, analysis)?;
        let started = Instant::now();
        let outcome = build(&model.matrix, analysis, &resolved, &attempt, None)?;
        let level = Level {
            limit,
            end: match &outcome {
                BuildOutcome::Built(built) => LevelEnd::Built {
                    elements: built.set.len(),
                },
                BuildOutcome::Stopped(reason) => LevelEnd::Stopped(*reason),
            },
            elapsed: started.elapsed(),
        };
        on_level(&level);
        deepened.levels.push(level);
        match outcome {
            BuildOutcome::Built(built) => {
                let whole = built.metadata.completeness == Completeness::Complete;
                deepened.kept = Some(built);
                kept_limit = limit;
                if whole || limit == cap {
                    break;
                }
                let cheap = control
                    .remaining()
                    .is_none_or(|left| level.elapsed.as_secs_f64() < CHEAP * left.as_secs_f64());
                step = if cheap {
                    step.saturating_mul(2)
                } else {
                    step_of_norms
                };
            }
            // A jump that ran out of its share of the time, or of memory: closer steps may
            // still fit.
            BuildOutcome::Stopped(StopReason::TimeLimit | StopReason::ElementLimit)
                if step > step_of_norms
                    && control.remaining().is_none_or(|left| !left.is_zero()) =>
            {
                step = (step / 4).max(step_of_norms);
            }
            BuildOutcome::Stopped(_) => break,
        }
    }
    Ok(deepened)
}

/// The limit `step` past `kept`, a multiple of the norm step `of_norms` (a level between two
/// multiples holds no more moves than the lower one), at most `cap` (which is tried as given).
fn next_limit(kept: u64, step: u64, of_norms: u64, cap: u64) -> u64 {
    let limit = kept.saturating_add(step);
    let limit = limit - limit % of_norms;
    limit.max(kept + 1).min(cap)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn limits_are_multiples_of_the_norm_step_up_to_the_cap() {
        assert_eq!(next_limit(0, 2, 2, 100), 2);
        assert_eq!(next_limit(2, 4, 2, 100), 6);
        assert_eq!(next_limit(6, 3, 2, 100), 8);
        assert_eq!(next_limit(1, 1, 1, 100), 2);
        assert_eq!(next_limit(96, 8, 2, 99), 99);
    }
}
