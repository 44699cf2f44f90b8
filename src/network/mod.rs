//! Network plans at any size: for a network matrix the Graver basis is known in closed form,
//! so plans are re-optimised along its elements without enumerating them.
//!
//! A matrix whose rows can be signed so that every column has at most one `+1` and one `-1`
//! (and nothing else) is the node-arc incidence matrix of a directed graph with one node left
//! out, the root. Its circuits, the signed simple cycles of the underlying undirected graph,
//! are its Graver basis (totally unimodular case; De Loera, Hemmecke, Köppe, "Algebraic and
//! Geometric Ideas in the Theory of Discrete Optimization", SIAM 2013, ch. 3). Every step of
//! the solver here pushes one such cycle by an integer amount, found by a shortest-path search
//! instead of a scan over a stored set.
//!
//! - [`Network::detect`] finds the row signs and the arcs, or says which column or row stands
//!   in the way ([`NotNetwork`]); the `lanes` scenario kind compiles to a network matrix.
//! - [`Network::solve`] solves one day's [`FlowNumbers`], cold or from a [`Warm`] start
//!   (yesterday's flow and potentials), and returns a [`FlowSolution`] whose
//!   [`FlowOutcome`] is data: optimal with potentials, infeasible with a [`Cut`], unbounded
//!   with a [`Cycle`], or stopped.
//! - [`certificate`] re-checks each claim from the matrix and the numbers alone.
//!
//! # Why this algorithm
//!
//! The solver is a primal-dual cycle method with exact integer potentials: each arc out of
//! kilter (outside its bounds, or with a reduced cost of the wrong sign) is repaired by
//! Dijkstra's algorithm in the residual network from the arc's head to its tail, which either
//! closes a cycle with the arc or moves the potentials until the arc is in kilter (the
//! out-of-kilter method: Fulkerson 1961; Ahuja, Magnanti, Orlin, "Network Flows", 1993,
//! §9.11; see `solver.rs`). The choice is driven by the daily re-optimisation:
//!
//! - Warm starts are its natural case. Any flow and potentials are a valid start; yesterday's
//!   optimum with today's changed supplies routed along a spanning forest leaves only the
//!   arcs on those forest paths (and arcs whose cost changed) out of kilter, so a day that
//!   changes a few demands costs a few searches. A spanning-tree simplex would first need a
//!   basis rebuilt around the changed flow.
//! - Cold starts begin from a tree solution as the network simplex method does: flow routed
//!   along a spanning forest of cheap arcs (Prim's algorithm on `|c_j|`), potentials that
//!   price the forest at 0, every other arc at the bound its reduced cost prefers. Then only
//!   forest arcs pushed past a bound are out of kilter, and each repair routes flow along a
//!   cheapest path under the current potentials as successive shortest paths do (AMO §9.7):
//!   on 20 depots x 100 zones about 46 searches a day, each a few hundred arc looks.
//! - Every augmentation is a cycle (a Graver element of `A`) with an integer amount, so a
//!   trace is the same kind of object as the test-set solver's.
//! - All arithmetic is exact: flows and potentials in `i64`, reduced costs and distances in
//!   `i128`, overflow an error.

pub mod certificate;
mod detect;
mod graph;
mod input;
mod outcome;
mod residual;
mod search;
mod solver;
mod start;
mod unbounded;

pub use detect::NotNetwork;
pub use graph::{ArcEnds, Network};
pub use input::{FlowNumbers, FlowOptions, Warm};
pub use outcome::{Cut, Cycle, CycleArc, FlowOutcome, FlowSolution, Infeasibility, Step};

/// Small networks shared by the unit tests of this module.
#[cfg(test)]
pub(crate) mod examples {
    use crate::matrix::IntMatrix;

    /// Two depots (supplies 3 and 2) and three shops (demands 1, 2, 2), `x_ij` row-major: the
    /// example of the `augment` crate's documentation, optimum 8.
    pub(crate) fn transport() -> IntMatrix {
        IntMatrix::transportation(2, 3)
    }
}
