//! kernstep: test sets of lattice moves for the integer models that planners re-optimise daily.
//!
//! For a constraint matrix `A` the library computes, once, a test set of lattice moves (the
//! Graver basis of `ker_Z(A)`, or the Hilbert basis of a sign-restricted kernel) and then
//! re-optimises any variant `(b, c, l, u)` of `min c.x, A x = b, l <= x <= u, x integer` by
//! augmentation along improving moves.
//!
//! Layers (arrows point down): [`model`] reads files, [`lattice`] does exact integer linear
//! algebra, [`analysis`] derives the bounds that limit a completion, [`completion`] builds the
//! sets; the workspace crates `augment` (the augmentation loop) and `cache` (the on-disk store)
//! know nothing of this crate. The library never prints.
#![deny(missing_docs)]

pub mod analysis;
pub mod completion;
pub mod error;
pub mod lattice;
pub mod matrix;
pub mod model;
pub mod network;
pub mod scenario;
pub mod solve;
pub mod testset;
pub mod trace;

pub use error::{Error, Result};
pub use matrix::IntMatrix;
