//! The working set of a completion: stored vectors, their negations and the reducer index.
//!
//! Between stages a set is a list of [`Orbit`]s (a representative, and whether its negation
//! belongs to the set too). Inside a stage every member is stored explicitly, with a link to
//! its negation when that is a member, so pairs can be formed by plain addition.

use rayon::prelude::*;

use super::reducer::Reducer;
use super::store::{negate, Entry, Stored, VecStore};
use crate::error::Result;

/// A `±` class of lattice vectors: `rep`, and `-rep` as well when `symmetric`.
#[derive(Clone, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub(crate) struct Orbit {
    /// The representative.
    pub rep: Vec<Entry>,
    /// Whether `-rep` is a member too.
    pub symmetric: bool,
}

/// Members of a set during one stage, indexed for reduction on the stage's components
/// (sign masks of `W` words), kept as `E` entries.
pub(crate) struct WorkingSet<const W: usize, E = Entry> {
    pub store: VecStore<E>,
    pub mirror: Vec<Option<u32>>,
    pub reducer: Reducer<W>,
}

impl<const W: usize, E: Stored> WorkingSet<W, E> {
    /// An empty set of vectors with `width` entries, compared on `comps`.
    pub(crate) fn new(width: usize, comps: Vec<usize>) -> Self {
        Self {
            store: VecStore::new(width),
            mirror: Vec::new(),
            reducer: Reducer::new(comps),
        }
    }

    /// Makes room for `members` more members without growing by doubling.
    pub(crate) fn reserve(&mut self, members: usize) {
        self.store.reserve(members);
        self.mirror.reserve_exact(members);
    }

    /// Number of stored members (a symmetric orbit counts twice).
    pub(crate) fn len(&self) -> usize {
        self.store.len()
    }

    /// Adds an orbit; returns the ids of `rep` and, if symmetric, of `-rep`.
    /// [`crate::Error::EntryWidth`] when one of them does not fit `E`: the set is then
    /// abandoned (the completion starts again with wider stores).
    pub(crate) fn add(&mut self, rep: &[Entry], symmetric: bool) -> Result<(u32, Option<u32>)> {
        let a = self.store.push(rep)?;
        self.mirror.push(None);
        self.reducer.insert(&self.store, a);
        if !symmetric {
            return Ok((a, None));
        }
        let b = self.store.push(&negate(rep))?;
        self.mirror.push(Some(a));
        self.mirror[a as usize] = Some(b);
        self.reducer.insert(&self.store, b);
        Ok((a, Some(b)))
    }

    /// Reduces `w` to normal form: subtracts members `h ⊑ w` (on the stage's components)
    /// as long as one exists. Returns `true` if `w` became zero there.
    pub(crate) fn reduce(&self, w: &mut [Entry]) -> Result<bool> {
        self.reducer.reduce(&self.store, w)
    }

    /// Whether the unordered pair `{a, b}` is the one to process among `{a, b}` and its mirror
    /// `{-a, -b}` (whose sum is the negated sum), and is not `{a, -a}`.
    pub(crate) fn owns_pair(&self, a: u32, b: u32) -> bool {
        match (self.mirror[a as usize], self.mirror[b as usize]) {
            (Some(ma), _) if ma == b => false,
            (Some(ma), Some(mb)) => (a.min(b), a.max(b)) <= (ma.min(mb), ma.max(mb)),
            _ => true,
        }
    }

    /// The members that are ⊑-minimal on the stage's components, as orbits, each once. The
    /// members are tested on all threads (each test only reads the set).
    pub(crate) fn minimal_orbits(&self) -> Vec<Orbit> {
        self.minimal_orbits_among(|_| true)
    }

    /// The members satisfying `keep` that are ⊑-minimal on the stage's components, as orbits,
    /// each once, in id order. `keep` must hold for every `h ⊑ v` whenever it holds for `v`
    /// (a sign required at a component, a norm limit, a box): then a member that `keep`
    /// rejects never lies below a kept one, so testing the kept members against the whole set
    /// gives the minimal members of the kept ones, without a second set of them.
    pub(crate) fn minimal_orbits_among(
        &self,
        keep: impl Fn(&[Entry]) -> bool + Sync,
    ) -> Vec<Orbit> {
        let width = self.store.width();
        let minimal: Vec<bool> = (0..self.len() as u32)
            .into_par_iter()
            .map_init(
                || vec![0; width],
                |widened, id| {
                    self.store.widen_into(id, widened);
                    keep(widened)
                        && self
                            .reducer
                            .find(&self.store, self.store.get(id), Some(id))
                            .is_none()
                },
            )
            .collect();
        self.orbits_of(minimal).collect()
    }

    /// Every member as orbits, each once, in id order (the order a state saved inside a
    /// stage lists them in, so that every member gets its id back).
    pub(crate) fn all_orbits(&self) -> impl Iterator<Item = Orbit> + '_ {
        (0..self.len() as u32).filter_map(move |id| {
            let mirror = self.mirror[id as usize];
            mirror.is_none_or(|m| m >= id).then(|| Orbit {
                rep: self.store.widened(id),
                symmetric: mirror.is_some(),
            })
        })
    }

    /// How many orbits [`Self::all_orbits`] lists.
    pub(crate) fn orbit_total(&self) -> usize {
        let paired = self.mirror.iter().filter(|m| m.is_some()).count();
        self.len() - paired / 2
    }

    /// The members whose flag in `keep` is set, as orbits (a symmetric one when both signs
    /// are kept), each once, in id order.
    fn orbits_of(&self, keep: Vec<bool>) -> impl Iterator<Item = Orbit> + '_ {
        (0..self.len() as u32).filter_map(move |id| {
            let mirror = self.mirror[id as usize];
            if mirror.is_some_and(|m| m < id) {
                return None;
            }
            let keep_rep = keep[id as usize];
            let keep_neg = mirror.is_some_and(|m| keep[m as usize]);
            let rep = match (keep_rep, keep_neg, mirror) {
                (true, _, _) => self.store.widened(id),
                (false, true, Some(m)) => self.store.widened(m),
                _ => return None,
            };
            Some(Orbit {
                rep,
                symmetric: keep_rep && keep_neg,
            })
        })
    }
}

#[cfg(test)]
mod tests {
    use std::collections::BTreeSet;

    use super::*;

    /// Pseudo-random entries in -2..=2, mostly 0 (a linear congruential generator, common
    /// practice).
    fn generator(mut seed: u64) -> impl FnMut() -> Entry {
        move || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            match (seed >> 33) % 9 {
                d @ 0..=4 => d as Entry - 2,
                _ => 0,
            }
        }
    }

    /// The minimal pass on the working set itself, with a condition that holds below every
    /// member meeting it (a sign at one component and a norm limit), gives the members
    /// minimal among the kept ones, by a brute-force test of every kept pair.
    #[test]
    fn minimal_members_among_the_kept_ones() {
        let comps: Vec<usize> = (0..7).collect();
        let below = |h: &[Entry], v: &[Entry]| {
            h != v
                && comps
                    .iter()
                    .all(|&c| h[c] * v[c] >= 0 && h[c].abs() <= v[c].abs())
        };
        let keep = |v: &[Entry]| v[3] >= 0 && v.iter().map(|x| x.abs()).sum::<Entry>() <= 7;
        for seed in 1..6 {
            let mut next = generator(seed);
            let mut set = WorkingSet::<1, i8>::new(7, comps.clone());
            let mut seen = BTreeSet::new();
            for k in 0..300 {
                let v: Vec<Entry> = (0..7).map(|_| next()).collect();
                let symmetric = k % 3 != 0;
                if v.iter().all(|&x| x == 0) || seen.contains(&v) || seen.contains(&negate(&v)) {
                    continue;
                }
                seen.insert(v.clone());
                set.add(&v, symmetric).unwrap();
            }
            let members: Vec<Vec<Entry>> = (0..set.len() as u32)
                .map(|i| set.store.widened(i))
                .collect();
            let kept: Vec<&Vec<Entry>> = members.iter().filter(|v| keep(v)).collect();
            let want: BTreeSet<Vec<Entry>> = kept
                .iter()
                .filter(|v| !kept.iter().any(|h| below(h, v)))
                .map(|v| v.to_vec())
                .collect();
            let got: BTreeSet<Vec<Entry>> = set
                .minimal_orbits_among(keep)
                .into_iter()
                .flat_map(|o| {
                    let neg = o.symmetric.then(|| negate(&o.rep));
                    std::iter::once(o.rep).chain(neg)
                })
                .collect();
            assert!(want.len() > 10 && want.len() < kept.len(), "seed {seed}");
            assert_eq!(got, want, "seed {seed}");
        }
    }
}
