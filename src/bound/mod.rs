//! Proven lower bounds for answers from a partial (norm-truncated) set: the Lagrangian dual
//! bound of the instance for row multipliers `y`, evaluated exactly.
//!
//! For `min f(x) = sum_i f_i(x_i), A x = b, l <= x <= u`, every rational `y` gives
//! `L(y) = y.b + sum_i min over x_i in [l_i, u_i] of (f_i(x_i) - (A^T y)_i x_i) <= f(x)` for
//! every feasible `x` (weak Lagrangian duality; Nemhauser and Wolsey 1988, section II.3.6).
//! Its best value over `y` is the optimum of the LP relaxation. The objective of an integer
//! plan is an integer, so `ceil(L(y)) = f(x)` proves the plan optimal whatever set found it.
//!
//! - `implied.rs` tightens the box first by row propagation (Savelsbergh 1994): a bound that
//!   holds for every integer point of the rows keeps `L` valid and turns most infinite sides
//!   finite, where a slightly wrong multiplier would otherwise cost the whole bound.
//! - `relaxation.rs` finds a near-optimal `y` from the LP relaxation with an interior-point
//!   solver in floating point (only a guess: nothing depends on its accuracy for validity).
//! - `rounding.rs` turns the guess into rational multipliers.
//! - `lagrangian.rs` evaluates `L(y)` exactly with big integers, which is the only step a
//!   bound's validity rests on; the re-check repeats it.

mod implied;
mod lagrangian;
mod proof;
mod relaxation;
mod rounding;

pub use implied::{implied_box, Range};
pub use lagrangian::{lagrangian_bound, Multipliers};
pub use proof::{prove, BoundInstance, DualBound};
