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
            if bar.is_some_and(|bar| self.reach(&dir) <= bar) {
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

    /// The total distance to the box of the coordinates `dir` moves towards it from outside:
    /// an upper bound on the violation any multiple of `dir` removes.
    fn reach(&self, dir: &Direction) -> i128 {
        let (lower, upper, x) = (self.problem.lower(), self.problem.upper(), self.x);
        dir.support
            .iter()
            .map(|(i, v)| {
                let raises = (v > 0) == (dir.sign > 0);
                match (raises, lower[i], upper[i]) {
                    (true, Some(l), _) if x[i] < l => i128::from(l) - i128::from(x[i]),
                    (false, _, Some(u)) if x[i] > u => i128::from(x[i]) - i128::from(u),
                    _ => 0,
                }
            })
            .sum()
    }
}
