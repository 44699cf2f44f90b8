//! What a network solve returns: the outcome as data, the counts and the recorded steps.

use augment::Phase;

/// One arc of a cycle and the way the cycle runs through it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct CycleArc {
    /// The arc (column).
    pub arc: usize,
    /// `true` when the cycle raises the arc's flow (runs from tail to head).
    pub forward: bool,
}

/// A simple cycle of the underlying undirected graph, possibly through the root: the vector
/// with `+1` on its forward arcs and `-1` on its backward ones is a circuit of `A`, hence an
/// element of its Graver basis.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Cycle {
    /// The arcs in the order the cycle visits them.
    pub arcs: Vec<CycleArc>,
}

impl Cycle {
    /// The cycle as a vector of `columns` entries (`A g = 0`).
    pub fn vector(&self, columns: usize) -> Vec<i64> {
        let mut g = vec![0; columns];
        for a in &self.arcs {
            g[a.arc] += if a.forward { 1 } else { -1 };
        }
        g
    }
}

/// A set `S` of nodes that no flow within the bounds can balance.
///
/// `weights[i]` is the sign of row `i` (see
/// [`Network::row_signs`](super::Network::row_signs)) for the rows of `S` and `0` elsewhere;
/// `S` never holds the root. The weighted sum of the rows of `A x = b`, `w^T A x = w^T b`,
/// is the balance of `S`: the net supply `w^T b` must leave `S` through its arcs, and the
/// bounds let `w^T A x` range only over an interval that does not contain it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Cut {
    /// Per row, `-1`, `0` or `1`.
    pub weights: Vec<i64>,
}

impl Cut {
    /// The rows of `S`.
    pub fn rows(&self) -> Vec<usize> {
        (0..self.weights.len())
            .filter(|&i| self.weights[i] != 0)
            .collect()
    }
}

/// Why no flow exists.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Infeasibility {
    /// Arc `arc` has a lower bound above its upper bound.
    EmptyRange {
        /// The first such arc.
        arc: usize,
    },
    /// The nodes of the cut cannot be balanced.
    Cut(Cut),
}

/// How a network solve ended.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum FlowOutcome {
    /// `flow` is optimal; `potentials` prove it.
    Optimal {
        /// The optimal flow, one value per arc (column).
        flow: Vec<i64>,
        /// One per row of `A`, in the matrix's own row signs: with `y = potentials`, the
        /// reduced cost `c_j - (y^T A)_j` of every arc is `>= 0` unless the arc is at its
        /// upper bound and `<= 0` unless it is at its lower bound. In network terms `y_i` is
        /// `row_signs[i] * pi_i` for node potentials `pi` with `pi_root = 0`, and the reduced
        /// cost of arc `(u, v)` is `c_j - pi_u + pi_v`.
        potentials: Vec<i64>,
        /// `c.x`.
        objective: i128,
    },
    /// No flow meets `A x = b` within the bounds.
    Infeasible(Infeasibility),
    /// The cost is unbounded below: from the feasible `flow`, the cycle can be pushed any
    /// amount (every arc it raises has no upper bound, every arc it lowers no lower bound) and
    /// its cost is negative.
    Unbounded {
        /// A feasible flow.
        flow: Vec<i64>,
        /// The ray.
        cycle: Cycle,
    },
    /// The step limit was reached; `flow` meets `A x = b` but may be outside the bounds.
    StepLimit {
        /// The flow when the solve stopped.
        flow: Vec<i64>,
    },
    /// The cancellation hook asked to stop; `flow` as for [`FlowOutcome::StepLimit`].
    Cancelled {
        /// The flow when the solve stopped.
        flow: Vec<i64>,
    },
}

/// One augmentation: a cycle pushed by an integer amount.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Step {
    /// Feasibility (phase I, lowers the bound violation) or optimality (phase II, lowers
    /// the cost).
    pub phase: Phase,
    /// The cycle, a Graver element of `A`.
    pub cycle: Cycle,
    /// How many times it was added to the flow (at least 1).
    pub amount: u64,
    /// The total bound violation `sum_j dist(x_j, [l_j, u_j])` (phase I) or `c.x` (phase II)
    /// before the step.
    pub before: i128,
    /// The same after the step; always below `before`.
    pub after: i128,
}

/// The result of a network solve.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct FlowSolution {
    /// How it ended.
    pub outcome: FlowOutcome,
    /// Augmentations in phase I.
    pub feasibility_steps: u64,
    /// Augmentations in phase II.
    pub optimality_steps: u64,
    /// Shortest-path searches run (augmenting or only moving potentials).
    pub searches: u64,
    /// Every augmentation, when the options asked for a trace.
    pub trace: Option<Vec<Step>>,
}

impl FlowSolution {
    /// Augmentations over both phases.
    pub fn steps(&self) -> u64 {
        self.feasibility_steps + self.optimality_steps
    }
}
