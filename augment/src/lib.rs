//! Augmentation over a given set of lattice moves.
//!
//! The crate minimises `f(x) = sum_i f_i(x_i)` (linear, or separable convex: quadratic and
//! piecewise linear) over `{x in Z^n : A x = b, l <= x <= u}` by walking along improving moves
//! of a test set `G` of `ker_Z(A)`. It takes the moves as plain data ([`MoveSet`]) and a start
//! point `x0` with `A x0 = b`; it never sees `A`, files, caches or how the set was computed.
//!
//! - Phase I minimises the bound violation from `x0` (which may lie outside the box). With a
//!   complete Graver basis a positive minimum proves that the box holds no lattice point of the
//!   fibre (Murota, Saito, Weismantel 2004).
//! - Phase II augments by the chosen [`Rule`] (Graver-best by default) until no move improves,
//!   detecting unbounded rays (also those no single move of a truncated set gives, from a
//!   descent that keeps returning to one position on the doubly bounded variables), and
//!   reports a [`Status`] that is honest about the set's [`Coverage`].
//! - [`certify`] independently checks that no move improves a point.
//!
//! Arithmetic is exact: coordinates in checked `i64`, objective values in checked `i128`;
//! overflow is an [`AugmentError`], never a wrong answer.
//!
//! ```
//! use augment::{certify, solve, Certificate, Coverage, MoveSet, Objective, Options, Problem, Status};
//!
//! // Two depots (supplies 3 and 2) serve three shops (demands 1, 2, 2); variable x_ij is the
//! // flow from depot i to shop j, row-major. The Graver basis of this 2x3 transport matrix is
//! // its three 4-cycles.
//! let moves = MoveSet::from_rows(
//!     6,
//!     &[vec![1, -1, 0, -1, 1, 0], vec![1, 0, -1, -1, 0, 1], vec![0, 1, -1, 0, -1, 1]],
//!     Coverage::Complete,
//! )?;
//! let costs = vec![4, 1, 3, 2, 5, 1];
//! let problem = Problem::new(Objective::linear(costs), vec![Some(0); 6], vec![None; 6])?;
//! let start = [0, 1, 2, 1, 1, 0]; // row sums 3, 2; column sums 1, 2, 2; cost 14
//! let solution = solve(&problem, &moves, &start, &Options::default())?;
//! assert_eq!(solution.status, Status::Optimal);
//! assert_eq!(solution.objective, Some(8));
//! assert_eq!(certify(&problem, &moves, &solution.x)?, Certificate::NoImprovingMove);
//! # Ok::<(), augment::AugmentError>(())
//! ```
#![deny(missing_docs)]

mod certify;
mod choice;
mod error;
mod fitting;
mod gaps;
mod linear;
mod marks;
mod moves;
mod objective;
mod options;
mod problem;
mod recurrence;
mod repair;
mod search;
mod select;
mod separable;
mod slopes;
mod solution;
mod solve;
mod support;
mod sweep;

pub use certify::{certify, violation_decrease, Certificate, Checker, Decrease};
pub use choice::Rule;
pub use error::{AugmentError, Result};
pub use fitting::Fitting;
pub use moves::{Coverage, MoveSet, Orientation};
pub use objective::{Objective, Term};
pub use options::Options;
pub use problem::Problem;
pub use solution::{InfeasibleReason, Phase, Ray, Solution, Status, TraceStep};
pub use solve::{solve, solve_fitted, solve_with_cancel};
pub use support::Support;
