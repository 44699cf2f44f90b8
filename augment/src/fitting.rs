//! The moves of a set that fit a box, shared by the many solves of one box.
//!
//! Phase II only visits points inside the box, where a move with `|g_i| > u_i - l_i` on some
//! variable can never be applied. A [`Fitting`] keeps the other moves, in the set's order, so
//! that phase II scans fewer moves and selects exactly what it selects with the whole set.
//! Phase I still uses the whole set: its points lie outside the box, and only the whole set
//! proves a box empty. Cutting the set costs about as much as building it, which pays only
//! when many solves (a batch of days) share a box; [`Fitting::key_of`] tells which boxes share
//! a cut.

use std::sync::Arc;

use crate::error::{AugmentError, Result};
use crate::moves::MoveSet;
use crate::problem::Problem;

/// The moves of a set that fit one box, with their indices in the set.
#[derive(Debug, Clone)]
pub struct Fitting {
    source: Arc<MoveSet>,
    key: Vec<u64>,
    moves: MoveSet,
    origin: Vec<usize>,
}

impl Fitting {
    /// The moves of `source` that fit the box of `problem`.
    pub fn new(source: Arc<MoveSet>, problem: &Problem) -> Result<Self> {
        let key = Fitting::key_of(&source, problem)?;
        let origin: Vec<usize> = (0..source.len())
            .filter(|&index| {
                source
                    .support(index)
                    .iter()
                    .all(|(i, v)| v.unsigned_abs() <= key[i])
            })
            .collect();
        let moves = source.subset(&origin)?;
        Ok(Self {
            source,
            key,
            moves,
            origin,
        })
    }

    /// Per variable the width of the box of `problem` that cuts moves of `set`: `u_i - l_i`,
    /// or `u64::MAX` when no move is wider there (an unbounded variable, or a box at least as
    /// wide as [`MoveSet::extent`]). Boxes with equal keys have equal cuts.
    pub fn key_of(set: &MoveSet, problem: &Problem) -> Result<Vec<u64>> {
        if problem.len() != set.width() {
            return Err(AugmentError::Dimension {
                what: "box",
                expected: set.width(),
                found: problem.len(),
            });
        }
        Ok(problem
            .lower()
            .iter()
            .zip(problem.upper())
            .enumerate()
            .map(|(i, bounds)| match bounds {
                (Some(l), Some(u)) if u.abs_diff(*l) < set.extent(i) => u.abs_diff(*l),
                _ => u64::MAX,
            })
            .collect())
    }

    /// Whether this is the cut for the box of `problem`.
    pub fn fits(&self, problem: &Problem) -> Result<bool> {
        Ok(Fitting::key_of(&self.source, problem)? == self.key)
    }

    /// The key of the box this cut was made for (see [`Fitting::key_of`]).
    pub fn key(&self) -> &[u64] {
        &self.key
    }

    /// The whole set the moves were cut from.
    pub fn source(&self) -> &MoveSet {
        &self.source
    }

    /// The moves that fit, in the order of the whole set.
    pub fn moves(&self) -> &MoveSet {
        &self.moves
    }

    /// Per kept move its index in the whole set.
    pub fn origin(&self) -> &[usize] {
        &self.origin
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::moves::Coverage;
    use crate::objective::Objective;

    fn problem(lower: Vec<Option<i64>>, upper: Vec<Option<i64>>) -> Problem {
        Problem::new(Objective::linear(vec![0; lower.len()]), lower, upper).unwrap()
    }

    #[test]
    fn keeps_the_moves_inside_the_box_widths_in_order() {
        let rows = vec![
            vec![3, -1, 1],
            vec![2, -6, 1],
            vec![1, 1, -9],
            vec![0, 2, 2],
        ];
        let set = Arc::new(MoveSet::from_rows(3, &rows, Coverage::Complete).unwrap());
        // Widths 2, 6 and unbounded: move 0 (|3| > 2) is cut, the others fit.
        let p = problem(
            vec![Some(0), Some(-1), None],
            vec![Some(2), Some(5), Some(4)],
        );
        let fitting = Fitting::new(set.clone(), &p).unwrap();
        assert_eq!(fitting.origin(), &[1, 2, 3]);
        for (k, &index) in fitting.origin().iter().enumerate() {
            assert_eq!(fitting.moves().row(k), set.row(index));
        }
        assert_eq!(
            Fitting::key_of(&set, &p).unwrap(),
            vec![2, u64::MAX, u64::MAX]
        );
        assert_eq!(fitting.key(), &[2, u64::MAX, u64::MAX]);
        assert!(fitting.fits(&p).unwrap());
        // A width of 7 on variable 1 cuts nothing more: the same key.
        let wider = problem(vec![Some(0), Some(-1), None], vec![Some(2), Some(6), None]);
        assert!(fitting.fits(&wider).unwrap());
        let narrower = problem(vec![Some(0), Some(0), None], vec![Some(2), Some(5), None]);
        assert!(!fitting.fits(&narrower).unwrap());
    }
}
