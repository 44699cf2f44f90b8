//! Limits, cancellation and progress reporting for long completions.
//!
//! The completion consults a [`Control`] between batches of work (never inside the inner
//! loops), so a stop is clean: the caller gets a [`StopReason`], not a half-built set.

use std::sync::atomic::{AtomicBool, Ordering};
use std::time::{Duration, Instant};

use schemars::JsonSchema;

use super::state_view::StateView;
use crate::error::{Error, Result};

/// Why a completion stopped before finishing.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize, serde::Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum StopReason {
    /// The working set grew past the element limit.
    ElementLimit,
    /// The time limit ran out.
    TimeLimit,
    /// The caller asked to stop (for example on Ctrl-C).
    Cancelled,
}

/// A snapshot of a running completion, passed to the progress callback.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Progress {
    /// Stage number (0 is the projected start set), of `stages` in all.
    pub stage: usize,
    /// Number of stages.
    pub stages: usize,
    /// Norm level of the candidate sums being processed.
    pub level: u64,
    /// Members of the working set (each sign counted).
    pub elements: usize,
    /// Time since the completion started.
    pub elapsed: Duration,
}

/// Processes that share the work of one completion, such as the ranks of an MPI job: each
/// reduces its part of every round of sums (`lift.rs`), and every process receives all the
/// remainders and adds them in the same canonical order, so each keeps the whole working set
/// and all end with the set one process computes. Stops are agreed in the same exchange, so
/// that all processes stop at the same round.
pub trait WorkShare: Sync {
    /// This process's index and the number of processes.
    fn part(&self) -> (usize, usize);

    /// One round: every process passes its remainders (concatenated vectors of one width)
    /// and its own stop request; returns the remainders of all processes, in process order,
    /// and the first stop request of any process.
    fn exchange(
        &self,
        remainders: Vec<i32>,
        stop: Option<StopReason>,
    ) -> Result<(Vec<i32>, Option<StopReason>)>;
}

/// Limits and hooks consulted by a running completion.
#[derive(Clone, Copy)]
pub struct Control<'a> {
    start: Instant,
    time_limit: Option<Duration>,
    max_elements: Option<usize>,
    cancel: Option<&'a AtomicBool>,
    progress: Option<&'a (dyn Fn(&Progress) + Sync)>,
    save: Option<&'a (dyn Fn(&StateView<'_>) + Sync)>,
    save_every: Option<Duration>,
    share: Option<&'a dyn WorkShare>,
}

impl Default for Control<'_> {
    fn default() -> Self {
        Self::new()
    }
}

impl<'a> Control<'a> {
    /// No limits, no hooks; the clock starts now.
    pub fn new() -> Self {
        Self {
            start: Instant::now(),
            time_limit: None,
            max_elements: None,
            cancel: None,
            progress: None,
            save: None,
            save_every: None,
            share: None,
        }
    }

    /// Share the work with other processes through `share` (default: this process alone).
    pub fn shared(mut self, share: &'a dyn WorkShare) -> Self {
        self.share = Some(share);
        self
    }

    /// This process's index and the number of processes sharing the work.
    pub(crate) fn part(&self) -> (usize, usize) {
        self.share.map_or((0, 1), |s| s.part())
    }

    /// One round of a shared completion (see [`WorkShare::exchange`]): the remainders of every
    /// process and the stop agreed on; alone, `remainders` and `stop` as given.
    pub(crate) fn exchange(
        &self,
        width: usize,
        remainders: Vec<Vec<i32>>,
        stop: Option<StopReason>,
    ) -> Result<(Vec<Vec<i32>>, Option<StopReason>)> {
        let Some(share) = self.share else {
            return Ok((remainders, stop));
        };
        let flat: Vec<i32> = remainders.into_iter().flatten().collect();
        let (all, stop) = share.exchange(flat, stop)?;
        if all.is_empty() {
            return Ok((Vec::new(), stop));
        }
        if width == 0 || all.len() % width != 0 {
            return Err(Error::Dimension(format!(
                "a shared round returned {} entries, not a whole number of vectors of width {width}",
                all.len()
            )));
        }
        Ok((all.chunks(width).map(<[i32]>::to_vec).collect(), stop))
    }

    /// Stop with [`StopReason::TimeLimit`] after `limit` (default: no limit).
    pub fn time_limit(mut self, limit: Duration) -> Self {
        self.time_limit = Some(limit);
        self
    }

    /// Stop with [`StopReason::ElementLimit`] once the working set exceeds `max` (default: none).
    pub fn max_elements(mut self, max: usize) -> Self {
        self.max_elements = Some(max);
        self
    }

    /// Stop with [`StopReason::Cancelled`] once `flag` is set (default: never).
    pub fn cancel_flag(mut self, flag: &'a AtomicBool) -> Self {
        self.cancel = Some(flag);
        self
    }

    /// Call `report` between batches (default: no reporting).
    pub fn progress(mut self, report: &'a (dyn Fn(&Progress) + Sync)) -> Self {
        self.progress = Some(report);
        self
    }

    /// Call `save` with a resumable state after every finished stage but the last, inside a
    /// stage whenever `every` has passed since the last save, and when a limit or a
    /// cancellation stops the completion, so that an interrupted run loses at most `every` of
    /// work (default: no saving).
    pub fn on_save(mut self, save: &'a (dyn Fn(&StateView<'_>) + Sync), every: Duration) -> Self {
        self.save = Some(save);
        self.save_every = Some(every);
        self
    }

    /// Hands the resumable state `state` to the saving hook, if any.
    pub(crate) fn save(&self, state: &StateView<'_>) {
        if let Some(save) = self.save {
            save(state);
        }
    }

    /// Whether a mid-stage save is due, `since` the last one (never without a saving hook).
    pub(crate) fn save_due(&self, since: Instant) -> bool {
        self.save_every
            .is_some_and(|every| since.elapsed() >= every)
    }

    /// Whether a saving hook is set (states are only built for one).
    pub(crate) fn saves(&self) -> bool {
        self.save.is_some()
    }

    /// The same limits and hooks with the time limit brought forward, if need be, to `within`
    /// from now: one attempt inside a larger budget.
    pub fn within(mut self, within: Duration) -> Self {
        let sooner = self.elapsed().saturating_add(within);
        self.time_limit = Some(self.time_limit.map_or(sooner, |t| t.min(sooner)));
        self
    }

    /// Time left before the time limit; `None` without one.
    pub fn remaining(&self) -> Option<Duration> {
        self.time_limit.map(|t| t.saturating_sub(self.elapsed()))
    }

    /// Time since the clock started.
    pub fn elapsed(&self) -> Duration {
        self.start.elapsed()
    }

    /// Whether a time limit or cancellation asks to stop now (no progress report; cheap
    /// enough to call inside long batches).
    pub(crate) fn interrupted(&self) -> Option<StopReason> {
        if self.cancel.is_some_and(|f| f.load(Ordering::Relaxed)) {
            return Some(StopReason::Cancelled);
        }
        self.time_limit
            .is_some_and(|t| self.elapsed() > t)
            .then_some(StopReason::TimeLimit)
    }

    /// Reports progress and tells whether the completion must stop now.
    pub(crate) fn checkpoint(
        &self,
        stage: usize,
        stages: usize,
        level: u64,
        elements: usize,
    ) -> Option<StopReason> {
        if let Some(report) = self.progress {
            report(&Progress {
                stage,
                stages,
                level,
                elements,
                elapsed: self.elapsed(),
            });
        }
        if self.max_elements.is_some_and(|m| elements > m) {
            return Some(StopReason::ElementLimit);
        }
        self.interrupted()
    }
}
