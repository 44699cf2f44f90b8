//! Solver settings, with their defaults.

use serde::{Deserialize, Serialize};

use crate::choice::Rule;

/// Settings of a solve; build with [`Options::default`] and the setters.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct Options {
    rule: Rule,
    powers_of_two: bool,
    max_steps: u64,
    parallel: bool,
    trace: bool,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            rule: Rule::GraverBest,
            powers_of_two: false,
            max_steps: 1_000_000,
            parallel: false,
            trace: false,
        }
    }
}

impl Options {
    /// How the next step is chosen. Default: [`Rule::GraverBest`].
    pub fn rule(mut self, rule: Rule) -> Self {
        self.rule = rule;
        self
    }

    /// Restrict step lengths to `1, 2, 4, ...`, which keeps Graver-best augmentation polynomial
    /// (Hemmecke, Onn, Weismantel 2011) with a cheaper line search. Default: `false`.
    pub fn powers_of_two(mut self, on: bool) -> Self {
        self.powers_of_two = on;
        self
    }

    /// Stop with [`crate::Status::StepLimit`] when a further step would exceed this many steps
    /// over both phases. Default: `1_000_000`.
    pub fn max_steps(mut self, steps: u64) -> Self {
        self.max_steps = steps;
        self
    }

    /// Evaluate the moves of each step on the rayon thread pool; the result is identical to
    /// the sequential scan. Worth it only for large sets. Default: `false`.
    pub fn parallel(mut self, on: bool) -> Self {
        self.parallel = on;
        self
    }

    /// Record every step in [`crate::Solution::trace`]. Default: `false`.
    pub fn trace(mut self, on: bool) -> Self {
        self.trace = on;
        self
    }

    /// The selection rule.
    pub fn selected_rule(&self) -> Rule {
        self.rule
    }

    /// Whether step lengths are restricted to powers of two.
    pub fn uses_powers_of_two(&self) -> bool {
        self.powers_of_two
    }

    /// The step limit.
    pub fn step_limit(&self) -> u64 {
        self.max_steps
    }

    /// Whether moves are evaluated in parallel.
    pub fn is_parallel(&self) -> bool {
        self.parallel
    }

    /// Whether a trace is recorded.
    pub fn records_trace(&self) -> bool {
        self.trace
    }
}
