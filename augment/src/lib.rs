//! Augmentation over a given set of lattice moves.
#![deny(missing_docs)]
