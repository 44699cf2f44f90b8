//! Cuts of a prepared test set to the boxes that recur over many instances.
//!
//! Phase II needs only the moves that fit the instance's box ([`Fitting`]); a batch of days
//! usually shares one box (most bounds are structural, such as the room left in a truck), so
//! the cut is made once and every later day of that box scans fewer moves. Making a cut costs
//! about as much as loading the set, so a box gets its cut on its second use (a single solve
//! never pays for one), boxes where no move is too wide get none, and at most [`LIMIT`] cuts
//! holding together at most [`BUDGET`] times the moves of the set are made; beyond that,
//! instances are solved with the whole set, which selects the same steps.

use std::sync::{Arc, Mutex};

use augment::{Fitting, MoveSet, Problem};

use crate::error::Result;

/// Most cuts kept for one prepared set.
const LIMIT: usize = 8;

/// Most moves in all cuts together, as a multiple of the moves of the set (the memory the cuts
/// may take beside it).
const BUDGET: usize = 2;

/// Most boxes remembered as seen once.
const SEEN_LIMIT: usize = 64;

/// The cuts made so far, shared by the threads of a batch.
#[derive(Debug, Default)]
pub(crate) struct Fittings {
    state: Mutex<State>,
}

#[derive(Debug, Default)]
struct State {
    /// Keys of boxes used once, without a cut yet.
    seen: Vec<Vec<u64>>,
    /// The cuts made.
    made: Vec<Arc<Fitting>>,
}

impl Fittings {
    /// The cut of `moves` for the box of `problem`, when it has one or this is the box's
    /// second use; `None` when the whole set should be used.
    pub(crate) fn for_box(
        &self,
        moves: &Arc<MoveSet>,
        problem: &Problem,
    ) -> Result<Option<Arc<Fitting>>> {
        let key = Fitting::key_of(moves, problem)?;
        if key.iter().all(|&w| w == u64::MAX) {
            return Ok(None);
        }
        let mut state = self.state.lock().unwrap_or_else(|e| e.into_inner());
        if let Some(made) = state.made.iter().find(|f| f.key() == key) {
            return Ok(Some(Arc::clone(made)));
        }
        let held: usize = state.made.iter().map(|f| f.moves().len()).sum();
        if state.made.len() >= LIMIT || held >= BUDGET * moves.len() {
            return Ok(None);
        }
        let Some(at) = state.seen.iter().position(|k| *k == key) else {
            if state.seen.len() < SEEN_LIMIT {
                state.seen.push(key);
            }
            return Ok(None);
        };
        state.seen.swap_remove(at);
        let made = Arc::new(Fitting::new(Arc::clone(moves), problem)?);
        state.made.push(Arc::clone(&made));
        Ok(Some(made))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use augment::{Coverage, Objective};

    fn problem(upper: i64) -> Problem {
        Problem::new(
            Objective::linear(vec![1, 1]),
            vec![Some(0), Some(0)],
            vec![Some(upper), None],
        )
        .unwrap()
    }

    #[test]
    fn a_box_gets_its_cut_on_its_second_use_and_keeps_it() {
        let moves = Arc::new(
            MoveSet::from_rows(2, &[vec![1, -1], vec![3, -3]], Coverage::Complete).unwrap(),
        );
        let fittings = Fittings::default();
        assert!(fittings.for_box(&moves, &problem(2)).unwrap().is_none());
        let cut = fittings.for_box(&moves, &problem(2)).unwrap().unwrap();
        assert_eq!(cut.origin(), &[0]);
        let again = fittings.for_box(&moves, &problem(2)).unwrap().unwrap();
        assert!(Arc::ptr_eq(&cut, &again));
        // A box as wide as every move cuts nothing.
        assert!(fittings.for_box(&moves, &problem(3)).unwrap().is_none());
        assert!(fittings.for_box(&moves, &problem(3)).unwrap().is_none());
    }

    #[test]
    fn no_more_than_the_limit_of_cuts_is_made() {
        // Many long moves, which every box cuts, so that only the count limits the cuts.
        let rows: Vec<Vec<i64>> = (1..=20).chain(100..=300).map(|k| vec![k, -k]).collect();
        let moves = Arc::new(MoveSet::from_rows(2, &rows, Coverage::Complete).unwrap());
        let fittings = Fittings::default();
        let mut made = 0;
        for width in 1..20 {
            for _ in 0..2 {
                made += usize::from(fittings.for_box(&moves, &problem(width)).unwrap().is_some());
            }
        }
        assert_eq!(made, LIMIT);
    }

    #[test]
    fn the_cuts_hold_at_most_the_budget_of_moves() {
        let rows: Vec<Vec<i64>> = (1..=20).map(|k| vec![k, -k]).collect();
        let moves = Arc::new(MoveSet::from_rows(2, &rows, Coverage::Complete).unwrap());
        let fittings = Fittings::default();
        let mut held = 0;
        for width in (1..20).rev() {
            for _ in 0..2 {
                if let Some(cut) = fittings.for_box(&moves, &problem(width)).unwrap() {
                    held += cut.moves().len();
                }
            }
        }
        // Cuts of 19, 18 and 17 moves were made; the next would start beyond 40.
        assert_eq!(held, 19 + 18 + 17);
        assert!(held < BUDGET * moves.len() + moves.len());
    }
}
