//! Budgeted builds: the largest norm limit whose truncated set finishes within the limits of
//! a [`Control`] (a time budget, an element cap), found by deepening the limit (iterative
//! deepening; Korf 1985, "Depth-first iterative-deepening", Artificial Intelligence 27).
//! Each level is a fresh build, so a level that runs out of time costs nothing but that
//! time, and the set kept is exactly the Graver elements up to its limit. Reaching the
//! proven norm bound gives the complete set.
//!
//! Proven bounds can be far above the norms where the elements are (hundreds of thousands
//! for a truckload matrix whose elements stop at a few hundred), so the step gallops: it
//! doubles after each level that took under [`CHEAP`] of the time left, returns to one after
//! a dear level, and a jump of more than one level may use only half the time left; a jump
//! that runs out of it (or of memory) falls back to a quarter of its step from the last level kept.

use std::time::{Duration, Instant};

use super::build::{build, BuildOutcome, BuiltSet};
use super::spec::{BuildSpec, NormLimit};
use crate::analysis::MatrixAnalysis;
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
    let cap = match spec.norm_limit {
        NormLimit::AtMost(n) => n.min(proven_bound),
        NormLimit::Auto | NormLimit::Unlimited => proven_bound,
    }
    .max(FIRST_LEVEL);
    let mut deepened = Deepened {
        kept: None,
        levels: Vec::new(),
        proven_bound,
    };
    let (mut kept_limit, mut step) = (FIRST_LEVEL - 1, 1u64);
    loop {
        let limit = kept_limit.saturating_add(step).min(cap);
        let attempt = match (step > 1, control.remaining()) {
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
                    elements: built.set.elements.len(),
                },
                BuildOutcome::Stopped(reason) => LevelEnd::Stopped(*reason),
            },
            elapsed: started.elapsed(),
        };
        on_level(&level);
        deepened.levels.push(level);
        match outcome {
            BuildOutcome::Built(built) => {
                deepened.kept = Some(built);
                kept_limit = limit;
                if limit == cap {
                    break;
                }
                let cheap = control
                    .remaining()
                    .is_none_or(|left| level.elapsed.as_secs_f64() < CHEAP * left.as_secs_f64());
                step = if cheap { step.saturating_mul(2) } else { 1 };
            }
            // A jump that ran out of its share of the time, or of memory: closer steps may
            // still fit.
            BuildOutcome::Stopped(StopReason::TimeLimit | StopReason::ElementLimit)
                if step > 1 && control.remaining().is_none_or(|left| !left.is_zero()) =>
            {
                step = (step / 4).max(1);
            }
            BuildOutcome::Stopped(_) => break,
        }
    }
    Ok(deepened)
}
