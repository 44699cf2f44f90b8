//! Exact integer linear algebra: rank, determinants, Hermite normal form, the kernel lattice,
//! integer solutions of `A x = b` and the canonical row-space key.
//!
//! Everything here runs on `num_bigint::BigInt`, so no intermediate value can overflow; results
//! are converted back to `i64` with an explicit [`crate::Error::Overflow`] when they do not fit.
//! The one exception is [`QuickSolver`], a checked machine-integer copy of a Hermite form for
//! repeated solves, which gives up (and leaves the case to the exact solver) rather than
//! overflow.

mod bareiss;
mod convert;
mod hermite;
mod key;
mod lll;
mod quick;
mod reduction;
mod solve;

pub use bareiss::{det, echelon, rank, Echelon};
pub use convert::{to_big_vec, to_i64_vec};
pub use hermite::HermiteForm;
pub use key::RowSpaceKey;
pub use quick::QuickSolver;
pub use reduction::reduced_kernel_basis;
pub use solve::{Certificate, IntegerSolution};
