//! Pottier's completion procedure (Pottier 1996, "The Euclidean algorithm in dimension n"):
//! start from `±` a lattice basis, add the sum of every pair that is not sign-compatible,
//! reduce it to normal form by conformal subtraction, keep nonzero remainders, and stop when
//! every pair reduces to zero; the ⊑-minimal members are then the Graver basis.
//!
//! Here it runs on a chosen set of active components (all of them for the plain baseline, the
//! injective projection for the start of project-and-lift), pairs are taken in increasing
//! norm of their sum, and a pair and its negated mirror are processed once.

use std::cmp::Reverse;
use std::collections::BinaryHeap;

use super::control::{Control, StopReason};
use super::reducer::SignMask;
use super::store::{add, Entry};
use super::working::{Orbit, WorkingSet};
use crate::error::Result;

/// How often (in processed pairs) the control hook is consulted.
const CHECK_EVERY: usize = 4096;

/// Runs the completion on `comps` from the lattice basis `basis`; returns the ⊑-minimal
/// members on `comps` (a symmetric set), or why it stopped. Sign masks take `W` words (at
/// least the vectors' width over 64).
pub(crate) fn complete<const W: usize>(
    basis: &[Vec<Entry>],
    comps: &[usize],
    control: &Control<'_>,
    stage: (usize, usize),
) -> Result<std::result::Result<Vec<Orbit>, StopReason>> {
    let width = basis.first().map_or(0, Vec::len);
    let mut set = WorkingSet::<W>::new(width, comps.to_vec());
    let mut masks: Vec<SignMask<W>> = Vec::new();
    let mut queue = BinaryHeap::new();
    for b in basis {
        let mut w = b.clone();
        if !set.reduce(&mut w)? {
            insert(&mut set, &mut masks, &mut queue, &w)?;
        }
    }
    let mut processed = 0usize;
    while let Some(Reverse((level, a, b))) = queue.pop() {
        processed += 1;
        if processed.is_multiple_of(CHECK_EVERY) {
            if let Some(stop) = control.checkpoint(stage.0, stage.1, level, set.len()) {
                return Ok(Err(stop));
            }
        }
        let mut w = add(set.store.get(a), set.store.get(b))?;
        if !set.reduce(&mut w)? {
            insert(&mut set, &mut masks, &mut queue, &w)?;
        }
    }
    if let Some(stop) = control.checkpoint(stage.0, stage.1, 0, set.len()) {
        return Ok(Err(stop));
    }
    Ok(Ok(set.minimal_orbits()))
}

type PairQueue = BinaryHeap<Reverse<(u64, u32, u32)>>;

/// Adds `±w` and queues its pairs with every earlier member it is not sign-compatible with.
fn insert<const W: usize>(
    set: &mut WorkingSet<W>,
    masks: &mut Vec<SignMask<W>>,
    queue: &mut PairQueue,
    w: &[Entry],
) -> Result<()> {
    let comps = set.reducer.comps().to_vec();
    let (a, b) = set.add(w, true)?;
    for id in std::iter::once(a).chain(b) {
        masks.push(SignMask::of(set.store.get(id), &comps));
    }
    for new in std::iter::once(a).chain(b) {
        for old in 0..a {
            if masks[old as usize].compatible(&masks[new as usize]) || !set.owns_pair(old, new) {
                continue;
            }
            let sum = pair_norm(set.store.get(old), set.store.get(new), &comps);
            queue.push(Reverse((sum, old, new)));
        }
    }
    Ok(())
}

/// The l1 norm on `comps` of `u + v`.
fn pair_norm(u: &[Entry], v: &[Entry], comps: &[usize]) -> u64 {
    comps
        .iter()
        .map(|&c| (i64::from(u[c]) + i64::from(v[c])).unsigned_abs())
        .sum()
}
