//! What a network solve takes: the day's numbers, an optional warm start and the settings.

/// The numbers of one instance `min c.x, A x = b, l <= x <= u` of a network matrix.
///
/// Linear costs only: a caller whose model also has convex costs must not use the network
/// solver for it (its answer would ignore them).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct FlowNumbers<'a> {
    /// Right-hand side `b`, one entry per row of `A` (in the matrix's own row signs).
    pub rhs: &'a [i64],
    /// Linear cost `c`, one per column (arc).
    pub cost: &'a [i64],
    /// Lower bounds, `None` for `-inf`.
    pub lower: &'a [Option<i64>],
    /// Upper bounds, `None` for `+inf`.
    pub upper: &'a [Option<i64>],
}

/// A previous answer to start from, typically yesterday's optimum of the same network.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Warm<'a> {
    /// A flow, one value per arc; it need not meet today's `A x = b` or bounds.
    pub flow: &'a [i64],
    /// Row potentials as [`FlowOutcome::Optimal`](super::FlowOutcome::Optimal) returns them;
    /// `None` starts from potentials that price every arc of a spanning forest at 0.
    pub potentials: Option<&'a [i64]>,
}

/// Settings of a network solve; build with [`FlowOptions::default`] and the setters.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct FlowOptions {
    max_steps: u64,
    trace: bool,
}

impl Default for FlowOptions {
    fn default() -> Self {
        Self {
            max_steps: 1_000_000,
            trace: false,
        }
    }
}

impl FlowOptions {
    /// Stop with [`FlowOutcome::StepLimit`](super::FlowOutcome::StepLimit) rather than take
    /// more than this many augmentations over both phases. Default: `1_000_000`.
    pub fn max_steps(mut self, steps: u64) -> Self {
        self.max_steps = steps;
        self
    }

    /// Record every augmentation in [`FlowSolution::trace`](super::FlowSolution::trace).
    /// Default: `false`.
    pub fn trace(mut self, on: bool) -> Self {
        self.trace = on;
        self
    }

    /// The step limit.
    pub fn step_limit(&self) -> u64 {
        self.max_steps
    }

    /// Whether steps are recorded.
    pub fn traced(&self) -> bool {
        self.trace
    }
}
