//! The problem data the solver needs besides the moves: an objective and a box.
//!
//! `A` and `b` are not part of it: every move keeps `A x` fixed, so the caller fixes the fibre
//! `A x = b` by choosing the start point. Bounds are `None` when infinite.

use crate::error::{AugmentError, Result};
use crate::objective::{Objective, Recession, Separable};

/// `minimise f(x)` subject to `l <= x <= u` on the fibre of the start point.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Problem {
    objective: Objective,
    lower: Vec<Option<i64>>,
    upper: Vec<Option<i64>>,
}

impl Problem {
    /// Checks that the objective and both bound vectors have the same length.
    ///
    /// A variable with `l_i > u_i` is accepted here; solving reports it as infeasible.
    pub fn new(
        objective: Objective,
        lower: Vec<Option<i64>>,
        upper: Vec<Option<i64>>,
    ) -> Result<Self> {
        for (what, found) in [("lower", lower.len()), ("upper", upper.len())] {
            if found != objective.len() {
                return Err(AugmentError::Dimension {
                    what,
                    expected: objective.len(),
                    found,
                });
            }
        }
        Ok(Problem {
            objective,
            lower,
            upper,
        })
    }

    /// Number of variables.
    pub fn len(&self) -> usize {
        self.objective.len()
    }

    /// True for a problem over no variables.
    pub fn is_empty(&self) -> bool {
        self.objective.is_empty()
    }

    /// The objective to minimise.
    pub fn objective(&self) -> &Objective {
        &self.objective
    }

    /// Lower bounds, `None` meaning `-inf`.
    pub fn lower(&self) -> &[Option<i64>] {
        &self.lower
    }

    /// Upper bounds, `None` meaning `+inf`.
    pub fn upper(&self) -> &[Option<i64>] {
        &self.upper
    }

    /// The first variable whose range `[l_i, u_i]` is empty.
    pub fn empty_range(&self) -> Option<usize> {
        (0..self.len())
            .find(|&i| matches!((self.lower[i], self.upper[i]), (Some(l), Some(u)) if l > u))
    }

    /// True when `x` lies in the box.
    pub fn in_box(&self, x: &[i64]) -> bool {
        self.first_outside(x).is_none()
    }

    /// The first variable of `x` outside its range.
    pub fn first_outside(&self, x: &[i64]) -> Option<usize> {
        x.iter()
            .enumerate()
            .position(|(i, &v)| self.violation_at(i, v) != 0)
    }

    /// The total violation `sum_i dist(x_i, [l_i, u_i])`.
    pub fn violation(&self, x: &[i64]) -> Result<i128> {
        if x.len() != self.len() {
            return Err(AugmentError::Dimension {
                what: "point",
                expected: self.len(),
                found: x.len(),
            });
        }
        Ok(x.iter()
            .enumerate()
            .map(|(i, &v)| self.violation_at(i, v))
            .sum())
    }

    /// `dist(v, [l_i, u_i])`; cannot overflow in `i128`, and `n` of them cannot either.
    pub(crate) fn violation_at(&self, i: usize, v: i64) -> i128 {
        let v = i128::from(v);
        match (self.lower[i], self.upper[i]) {
            (Some(l), _) if v < i128::from(l) => i128::from(l) - v,
            (_, Some(u)) if v > i128::from(u) => v - i128::from(u),
            _ => 0,
        }
    }

    /// The separable violation function minimised in phase I.
    pub(crate) fn violation_function(&self) -> Violation<'_> {
        Violation { problem: self }
    }

    /// True when variable `i` has no bound in the direction of the sign of `d`.
    pub(crate) fn unbounded_towards(&self, i: usize, d: i64) -> bool {
        if d > 0 {
            self.upper[i].is_none()
        } else {
            self.lower[i].is_none()
        }
    }
}

/// `x -> sum_i dist(x_i, [l_i, u_i])`, a separable convex function.
pub(crate) struct Violation<'a> {
    problem: &'a Problem,
}

impl Separable for Violation<'_> {
    fn term(&self, variable: usize, value: i64) -> Result<i128> {
        Ok(self.problem.violation_at(variable, value))
    }

    fn recession(&self, variable: usize, direction: i64) -> Result<Recession> {
        let bound = if direction > 0 {
            self.problem.upper[variable]
        } else {
            self.problem.lower[variable]
        };
        Ok(Recession::Finite(if bound.is_some() {
            i128::from(direction).abs()
        } else {
            0
        }))
    }

    fn linear_costs(&self) -> Option<&[i64]> {
        None
    }
}
