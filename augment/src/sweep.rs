//! One pass over every move for the selection rule's choice, sequentially or in parallel: the
//! only selection loop of the crate, used by every scan (phase I in `repair.rs`, phase II in
//! `linear.rs` for a linear objective and in `separable.rs` for any other).
//!
//! A scan only says which moves are worth a look (64 at a time, as a bit mask) and how one
//! move is evaluated; this driver owns the order. Candidates are offered to
//! [`keep_better`] in index order, so ties go to the lowest move index (and, inside a move,
//! to `+`) and a ray beats every finite step; the parallel pass splits the moves into chunks
//! whose winners are combined in index order, so both passes return the same candidate. Under
//! Graver-best, the best gain found so far is handed to the next evaluation as a floor (a move
//! that cannot beat it may be dropped early), and a candidate reaching the scan's ceiling (a
//! gain nothing can exceed) ends its chunk.

use rayon::prelude::*;

use crate::choice::{keep_better, Candidate, Rule};
use crate::error::Result;
use crate::moves::MoveSet;
use crate::search::Step;

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
    let (rule, ceiling) = (scan.rule(), ceiling(scan));
    let mut best = None;
    for found in chunks {
        best = keep_better(rule, scan.moves(), best, found?);
        // Stop where the sequential pass stops, so an error in a later chunk is not reported.
        if best.is_some_and(|b| ends_pass(rule, ceiling, &b)) {
            return Ok(best);
        }
    }
    Ok(best)
}

/// The rule's choice among the moves of `range`, in index order: the sequential pass, and the
/// pass over one chunk of the parallel one.
fn select_in<E: Evaluate>(scan: &E, range: std::ops::Range<usize>) -> Result<Option<Candidate>> {
    let (rule, ceiling) = (scan.rule(), ceiling(scan));
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
            best = keep_better(rule, scan.moves(), best, Some(found));
            if ends_pass(rule, ceiling, &found) {
                return Ok(best);
            }
        }
    }
    Ok(best)
}

/// The scan's ceiling where the rule uses it (Graver-best only).
fn ceiling<E: Evaluate>(scan: &E) -> Option<i128> {
    scan.ceiling().filter(|_| scan.rule() == Rule::GraverBest)
}

/// True when no later move can replace `found` under `rule`: it is a ray, the rule takes the
/// first improving step, or its gain reaches the `ceiling`.
fn ends_pass(rule: Rule, ceiling: Option<i128>, found: &Candidate) -> bool {
    match found.step {
        Step::Ray => true,
        Step::Finite { gain, .. } => {
            rule == Rule::FirstImproving || ceiling.is_some_and(|c| gain >= c)
        }
        Step::Useless => false,
    }
}
