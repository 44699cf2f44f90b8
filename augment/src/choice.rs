//! The vocabulary of step selection shared by the driver and every scan: the rule, a chosen
//! step, and the one comparison that ranks two steps.
//!
//! Every rule breaks ties the same way: the step already held is kept unless the other is
//! strictly better, so a scan that offers moves in index order and, inside a move, `+` before
//! `-` ends with the lowest index and `+` on ties. A ray beats every finite step.

use std::cmp::Ordering;

use serde::{Deserialize, Serialize};

use crate::error::Result;
use crate::moves::{MoveSet, Orientation};
use crate::search::Step;

/// How the next augmenting step is chosen.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default, Serialize, Deserialize)]
pub enum Rule {
    /// The step (move, sign and length) with the largest improvement: Graver-best
    /// augmentation, with a polynomial number of steps (Hemmecke, Onn, Weismantel 2011).
    #[default]
    GraverBest,
    /// The first improving move in index order (`+` before `-`), with its best length.
    FirstImproving,
    /// The step with the largest improvement per unit l1 norm of the move, i.e. the best gain
    /// divided by `||g||_1`.
    Steepest,
}

/// A chosen step: which move, which sign, and how far.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Candidate {
    /// Index of the move in the set.
    pub index: usize,
    /// Orientation in which the move is applied.
    pub sign: Orientation,
    /// `Step::Finite` or `Step::Ray`, never `Step::Useless`.
    pub step: Step,
}

/// `current` unless `challenger` is strictly better under `rule` (a ray beats every finite
/// step; equal keys keep `current`). The only ranking of steps in the crate.
pub(crate) fn keep_better(
    rule: Rule,
    moves: &MoveSet,
    current: Option<Candidate>,
    challenger: Option<Candidate>,
) -> Option<Candidate> {
    let (Some(a), Some(b)) = (current, challenger) else {
        return current.or(challenger);
    };
    let better = match (a.step, b.step) {
        (Step::Ray, _) => false,
        (_, Step::Ray) => true,
        (Step::Finite { gain: ga, .. }, Step::Finite { gain: gb, .. }) => match rule {
            Rule::Steepest => ratio_cmp(gb, moves.norm(b.index), ga, moves.norm(a.index)).is_gt(),
            Rule::GraverBest | Rule::FirstImproving => gb > ga,
        },
        _ => false,
    };
    Some(if better { b } else { a })
}

/// The rule's candidate among the two signs of one move: under first-improving the first sign
/// that improves, otherwise the better one (`+` on ties). `each(sign, best)` evaluates one
/// sign, `best` being the candidate kept so far among the signs already tried (a scan may use
/// it to dismiss a sign early).
pub(crate) fn choose_sign(
    rule: Rule,
    moves: &MoveSet,
    mut each: impl FnMut(Orientation, Option<Candidate>) -> Result<Option<Candidate>>,
) -> Result<Option<Candidate>> {
    let mut best = None;
    for sign in Orientation::BOTH {
        let Some(found) = each(sign, best)? else {
            continue;
        };
        if rule == Rule::FirstImproving {
            return Ok(Some(found));
        }
        best = keep_better(rule, moves, best, Some(found));
    }
    Ok(best)
}

/// Compares `a / b` with `c / d` exactly for `a, c >= 0` and `b, d > 0`, without overflow.
fn ratio_cmp(a: i128, b: i64, c: i128, d: i64) -> Ordering {
    let (b, d) = (i128::from(b), i128::from(d));
    (a / b).cmp(&(c / d)).then_with(|| {
        // Both remainders are below 2^63, so the cross products stay below 2^126.
        ((a % b) * d).cmp(&((c % d) * b))
    })
}
