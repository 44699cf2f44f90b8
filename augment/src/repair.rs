//! The scan of phase I: which move lowers the bound violation most.
//!
//! The violation `V(x) = sum_i dist(x_i, [l_i, u_i])` is piecewise linear, and two facts about
//! it make most moves cheap to dismiss without a line search:
//! - a signed move lowers `V` only on the coordinates it moves from outside the box towards
//!   it, and by at most their distance to the box; so that sum, the move's *reach*, bounds its
//!   gain, and a move whose reach does not beat the best gain so far cannot be chosen;
//! - no step gains more than `V(x)` itself, so under Graver-best a step reaching violation 0
//!   ends the scan (later moves could at most tie, and ties keep the lower index).
//!
//! The remaining moves get the exact line search, once a plain pass has shown that a first
//! step lowers the violation at all (the line search's own first test). The selection is
//! exactly what evaluating every move would give.

use crate::choice::{choose_sign, Candidate, Rule};
use crate::error::Result;
use crate::marks::Filter;
use crate::moves::{MoveSet, Orientation};
use crate::problem::{Problem, Violation};
use crate::search::{Direction, LineSearch, Step};
use crate::sweep::Evaluate;

/// What a phase-I scan needs.
pub(crate) struct RepairScan<'a> {
    /// The violation function.
    pub function: Violation<'a>,
    /// The current point.
    pub x: &'a [i64],
    /// Restrict step lengths to powers of two.
    pub powers_of_two: bool,
    /// The moves.
    pub moves: &'a MoveSet,
    /// The box.
    pub problem: &'a Problem,
    /// `V(x)` at the current point.
    pub violation: i128,
    /// The selection rule.
    pub rule: Rule,
    /// Keeps only moves that repair a violated coordinate.
    pub filter: Filter,
    /// Per variable `i` the distance to the box that raising `x_i` repairs (entry `2 i`:
    /// `l_i - x_i` below the box, else 0) and that lowering it repairs (entry `2 i + 1`:
    /// `x_i - u_i` above the box, else 0), in the slots of the packed entries (`support.rs`).
    pub reaches: Vec<u64>,
}

/// The table of [`RepairScan::reaches`] at `x`.
pub(crate) fn reaches(problem: &Problem, x: &[i64]) -> Vec<u64> {
    let (lower, upper) = (problem.lower(), problem.upper());
    x.iter()
        .enumerate()
        .flat_map(|(i, &v)| {
            let below = lower[i].filter(|&l| v < l).map_or(0, |l| l.abs_diff(v));
            let above = upper[i].filter(|&u| v > u).map_or(0, |u| v.abs_diff(u));
            [below, above]
        })
        .collect()
}

impl Evaluate for RepairScan<'_> {
    fn moves(&self) -> &MoveSet {
        self.moves
    }

    fn rule(&self) -> Rule {
        self.rule
    }

    /// The rule's choice among the two signs of move `index`; under Graver-best a sign whose
    /// reach does not beat the `floor` or the other sign's gain is dismissed unsearched.
    fn evaluate(&self, index: usize, floor: Option<i128>) -> Result<Option<Candidate>> {
        choose_sign(self.rule, self.moves, |sign, best| {
            self.evaluate_sign(index, sign, floor, best)
        })
    }

    fn candidates(&self, start: usize, len: usize) -> u64 {
        self.filter.repairing_candidates(self.moves, start, len)
    }

    fn ceiling(&self) -> Option<i128> {
        Some(self.violation)
    }
}

impl RepairScan<'_> {
    /// The best step along move `index` in direction `sign`, if it improves and, under
    /// Graver-best, its reach beats both the `floor` and the gain of `best`.
    fn evaluate_sign(
        &self,
        index: usize,
        sign: Orientation,
        floor: Option<i128>,
        best: Option<Candidate>,
    ) -> Result<Option<Candidate>> {
        if !self.filter.admits(self.moves, index, sign) {
            return Ok(None);
        }
        let dir = Direction::of(self.moves, index, sign);
        if self.rule == Rule::GraverBest {
            let bar = match best.map(|b| b.step) {
                Some(Step::Finite { gain, .. }) => Some(floor.map_or(gain, |f| f.max(gain))),
                _ => floor,
            };
            if bar.is_some_and(|bar| self.reach(index, sign) <= bar) {
                return Ok(None);
            }
        }
        // The line search's first test (does one step lower the violation?) in one plain
        // pass; most candidates fail it when many coordinates lie outside the box.
        if self.first_step_gain(&dir).is_some_and(|gain| gain <= 0) {
            return Ok(None);
        }
        let search = LineSearch {
            f: &self.function,
            x: self.x,
            powers_of_two: self.powers_of_two,
        };
        Ok(match search.best(&dir, None, None)? {
            Step::Useless => None,
            step => Some(Candidate { index, sign, step }),
        })
    }

    /// `V(x) - V(x + dir)`, or `None` when a coordinate would overflow (the line search then
    /// reports it).
    fn first_step_gain(&self, dir: &Direction) -> Option<i128> {
        let mut gain = 0i128;
        for (i, v) in dir.support.iter() {
            let moved = self.x[i].checked_add(v.checked_mul(dir.sign)?)?;
            gain += self.problem.violation_at(i, self.x[i]) - self.problem.violation_at(i, moved);
        }
        Some(gain)
    }

    /// The total distance to the box of the coordinates move `index` with `sign` moves
    /// towards it from outside: an upper bound on the violation any multiple of it removes.
    fn reach(&self, index: usize, sign: Orientation) -> i128 {
        let total = (self.moves).fold_steps((index, sign), 0u128, |total, slot, _| {
            total + u128::from(self.reaches[slot])
        });
        // At most n distances below 2^64 each.
        i128::try_from(total).unwrap_or(i128::MAX)
    }
}

#[cfg(test)]
mod tests {
    use proptest::prelude::*;

    use super::*;
    use crate::moves::Coverage;
    use crate::objective::Objective;

    proptest! {
        /// The reach read from the table is its definition summed over the move's entries
        /// (the distance to the box of every coordinate it moves towards the box from
        /// outside), for packed entries and for wide ones (an entry of 300 does not pack).
        #[test]
        fn reach_is_the_distance_the_move_can_repair(
            box_of in prop::collection::vec((prop::option::of(-3i64..=0), prop::option::of(0i64..=3)), 3),
            x in prop::collection::vec(-6i64..=6, 3),
            g in prop::collection::vec(-2i64..=2, 3),
            wide in any::<bool>(),
        ) {
            prop_assume!(g.iter().any(|&v| v != 0));
            let (lower, upper): (Vec<_>, Vec<_>) = box_of.into_iter().unzip();
            let problem = Problem::new(Objective::linear(vec![0; 3]), lower.clone(), upper.clone()).unwrap();
            let mut rows = vec![g.clone()];
            if wide {
                rows.push(vec![300, 0, 0]);
            }
            let moves = MoveSet::from_rows(3, &rows, Coverage::Complete).unwrap();
            let scan = RepairScan {
                function: problem.violation_function(),
                x: &x,
                powers_of_two: false,
                moves: &moves,
                problem: &problem,
                violation: problem.violation(&x).unwrap(),
                rule: Rule::GraverBest,
                filter: Filter::repairing(&problem, &x, moves.words()),
                reaches: reaches(&problem, &x),
            };
            for sign in Orientation::BOTH {
                let expected: i128 = (0..3).map(|i| {
                    let d = g[i] * sign.factor();
                    match (lower[i], upper[i]) {
                        (Some(l), _) if d > 0 && x[i] < l => i128::from(l - x[i]),
                        (_, Some(u)) if d < 0 && x[i] > u => i128::from(x[i] - u),
                        _ => 0,
                    }
                }).sum();
                prop_assert_eq!(scan.reach(0, sign), expected);
            }
        }
    }
}
