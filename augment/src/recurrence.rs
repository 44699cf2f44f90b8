//! Rays that no single move gives. With a truncated set, an unbounded linear objective can
//! fall forever by moves that each hit a bound, taken in turn (say `(2, 1, 0)` and
//! `(1, -1, -1)` with the middle variable in `[0, 1]`, whose sum `(3, 0, -1)` is the ray).
//! Such a descent keeps coming back to the same values on the variables bounded on both
//! sides. When it does, the difference `d = x_k - x_j` of the two points is a ray if it also
//! moves every one-sided variable away from its bound (`d_i >= 0` under a lower bound alone,
//! `d_i <= 0` under an upper bound alone): `A d = 0` since both points solve `A x = b`,
//! `x_k + t d` stays in the box for every `t >= 0`, and the cost falls along `d` because
//! every step lowered it (`c.d = c.x_k - c.x_j < 0`).
//!
//! The descent starts watching only after [`WATCH_AFTER`] steps, so that the common short
//! descents pay nothing, and at most [`MEMORY`] positions are kept.

use std::collections::HashMap;

use crate::problem::Problem;

/// Optimality steps taken before the descent records positions.
pub(crate) const WATCH_AFTER: u64 = 1024;

/// Positions kept at most; the record starts afresh when it is full.
const MEMORY: usize = 4096;

/// The positions of a descent, by their values on the doubly bounded variables.
pub(crate) struct Recurrence {
    /// Per variable: the sign a ray's entry may have (`1`: `>= 0`, `-1`: `<= 0`, `0`: any);
    /// `None` for a variable bounded on both sides.
    allowed: Vec<Option<i8>>,
    /// The last point seen with each position on the doubly bounded variables.
    seen: HashMap<Vec<i64>, Vec<i64>>,
}

impl Recurrence {
    /// An empty record for the box of `problem`.
    pub(crate) fn new(problem: &Problem) -> Self {
        let allowed = problem
            .lower()
            .iter()
            .zip(problem.upper())
            .map(|(l, u)| match (l, u) {
                (Some(_), Some(_)) => None,
                (Some(_), None) => Some(1),
                (None, Some(_)) => Some(-1),
                (None, None) => Some(0),
            })
            .collect();
        Self {
            allowed,
            seen: HashMap::new(),
        }
    }

    /// Records the point `x` reached by a step; returns a ray when `x` comes back to an
    /// earlier position and the difference qualifies (see the module documentation).
    pub(crate) fn visit(&mut self, x: &[i64]) -> Option<Vec<i64>> {
        let position: Vec<i64> = x
            .iter()
            .zip(&self.allowed)
            .filter(|(_, a)| a.is_none())
            .map(|(&v, _)| v)
            .collect();
        if let Some(earlier) = self.seen.get(&position) {
            if let Some(ray) = self.ray(earlier, x) {
                return Some(ray);
            }
        }
        if self.seen.len() >= MEMORY {
            self.seen.clear();
        }
        self.seen.insert(position, x.to_vec());
        None
    }

    /// `x - earlier` when it is a nonzero direction that every bound allows.
    fn ray(&self, earlier: &[i64], x: &[i64]) -> Option<Vec<i64>> {
        let d: Vec<i64> = x
            .iter()
            .zip(earlier)
            .map(|(&a, &b)| a.checked_sub(b))
            .collect::<Option<_>>()?;
        let allowed = d.iter().zip(&self.allowed).all(|(&v, a)| match a {
            None => v == 0,
            Some(0) => true,
            Some(sign) => v == 0 || v.signum() == i64::from(*sign),
        });
        (allowed && d.iter().any(|&v| v != 0)).then_some(d)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::objective::Objective;

    fn problem() -> Problem {
        Problem::new(
            Objective::linear(vec![-1, 0, 0]),
            vec![Some(0), Some(0), None],
            vec![None, Some(1), None],
        )
        .unwrap()
    }

    #[test]
    fn a_return_on_the_boxed_variable_gives_the_ray() {
        let mut r = Recurrence::new(&problem());
        assert_eq!(r.visit(&[0, 0, 0]), None);
        assert_eq!(r.visit(&[2, 1, 0]), None);
        assert_eq!(r.visit(&[3, 0, -1]), Some(vec![3, 0, -1]));
    }

    #[test]
    fn a_difference_against_a_one_sided_bound_is_no_ray() {
        let mut r = Recurrence::new(&problem());
        assert_eq!(r.visit(&[5, 0, 0]), None);
        // x1 fell, and x1 has a lower bound only: no ray, the point is recorded instead.
        assert_eq!(r.visit(&[4, 0, 7]), None);
        assert_eq!(r.visit(&[6, 0, 7]), Some(vec![2, 0, 0]));
    }
}
