//! Cuts of a prepared test set to the boxes that recur over many instances.
//!
//! Phase II needs only the moves that fit the instance's box ([`Fitting`]); a batch of days
//! usually shares one box (most bounds are structural, such as the room left in a truck), so
//! the cut is made once and every later day of that box scans fewer moves. Making a cut costs
//! about as much as loading the set, so a box gets its cut on its second use (a single solve
//! never pays for one), boxes where no move is too wide get none, and at most [`LIMIT`] cuts
//! are kept; beyond that, instances are solved with the whole set, which selects the same
//! steps.

use std::sync::{Arc, Mutex};

use augment::{Fitting, MoveSet, Problem};

use crate::error::Result;

/// Most cuts kept for one prepared set.
const LIMIT: usize = 8;

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
        if state.made.len() >= LIMIT {
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
        let rows: Vec<Vec<i64>> = (1..=20).map(|k| vec![k, -k]).collect();
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
}
