//! One pass over every move for the selection rule's choice, sequentially or in parallel.
//!
//! The specialised scans (linear phase II in `linear.rs`, phase I in `repair.rs`) only say
//! which moves are worth a look (64 at a time, as a bit mask) and how one move is evaluated;
//! this driver owns the order. Ties go to the lowest move index
//! (and, inside a move, to `+`), a ray beats every finite step, and the parallel pass splits
//! the moves into chunks whose winners are combined in index order, so both passes return the
//! same candidate. Under Graver-best, the best gain found so far is handed to the next
//! evaluation as a floor (a move that cannot beat it may be dropped early), and a candidate
//! reaching the scan's ceiling (a gain nothing can exceed) ends its chunk.

use rayon::prelude::*;

use crate::error::Result;
use crate::moves::MoveSet;
use crate::search::Step;
use crate::select::{ratio_cmp, Candidate, Rule};

/// Moves per parallel chunk (a multiple of 64, the moves of one candidate mask).
const CHUNK: usize = 256;

/// How one kind of scan evaluates a single move.
pub(crate) trait Evaluate: Sync {
    /// The moves scanned.
    fn moves(&self) -> &MoveSet;
    /// The selection rule.
    fn rule(&self) -> Rule;
    /// Bit `j` set when move `start + j` is worth evaluating, for `j < len <= 64` (a superset
    /// of the moves that improve).
    fn candidates(&self, start: usize, len: usize) -> u64;
    /// The rule's candidate for move `index` (its better sign, or its first improving sign
    /// under first-improving), or `None` when it does not improve. Called only for moves
    /// that [`Evaluate::candidates`] kept. Given a `floor`, a move that cannot gain strictly
    /// more than it may also give `None`.
    fn evaluate(&self, index: usize, floor: Option<i128>) -> Result<Option<Candidate>>;
    /// A gain no step can exceed at the current point, if one is known.
    fn ceiling(&self) -> Option<i128>;
}

/// The step the rule selects among all moves, or `None` when no move improves.
pub(crate) fn select<E: Evaluate>(scan: &E, parallel: bool) -> Result<Option<Candidate>> {
    let count = scan.moves().len();
    if !parallel {
        return select_in(scan, 0..count);
    }
    let chunks: Vec<Result<Option<Candidate>>> = (0..count.div_ceil(CHUNK))
        .into_par_iter()
        .map(|c| select_in(scan, c * CHUNK..((c + 1) * CHUNK).min(count)))
        .collect();
    let mut best = None;
    for found in chunks {
        let found = found?;
        if scan.rule() == Rule::FirstImproving && found.is_some() {
            return Ok(found);
        }
        best = keep_better(scan.rule(), scan.moves(), best, found);
    }
    Ok(best)
}

fn select_in<E: Evaluate>(scan: &E, range: std::ops::Range<usize>) -> Result<Option<Candidate>> {
    let rule = scan.rule();
    let ceiling = scan.ceiling().filter(|_| rule == Rule::GraverBest);
    let mut best: Option<Candidate> = None;
    for start in range.clone().step_by(64) {
        let mut mask = scan.candidates(start, (range.end - start).min(64));
        while mask != 0 {
            let index = start + mask.trailing_zeros() as usize;
            mask &= mask - 1;
            let floor = match (rule, best.map(|b| b.step)) {
                (Rule::GraverBest, Some(Step::Finite { gain, .. })) => Some(gain),
                _ => None,
            };
            let Some(found) = scan.evaluate(index, floor)? else {
                continue;
            };
            let last = match found.step {
                Step::Ray => true,
                Step::Finite { gain, .. } => {
                    rule == Rule::FirstImproving || ceiling.is_some_and(|c| gain >= c)
                }
                Step::Useless => false,
            };
            best = keep_better(rule, scan.moves(), best, Some(found));
            if last {
                return Ok(best);
            }
        }
    }
    Ok(best)
}

/// `current` unless `challenger` is strictly better under `rule` (a ray beats every finite
/// step; equal keys keep `current`).
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
