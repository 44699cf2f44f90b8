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
        let minimal: Vec<bool> = (0..self.len() as u32)
            .into_par_iter()
            .map(|id| {
                self.reducer
                    .find(&self.store, self.store.get(id), Some(id))
                    .is_none()
            })
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

    /// The members satisfying `keep`, as orbits made one at a time (no list of them all), with
    /// how many members they hold (a symmetric orbit counts twice).
    pub(crate) fn kept_orbits(
        &self,
        keep: impl Fn(&[Entry]) -> bool,
    ) -> (usize, impl Iterator<Item = Orbit> + '_) {
        let mut widened = vec![0; self.store.width()];
        let kept: Vec<bool> = (0..self.len() as u32)
            .map(|id| {
                self.store.widen_into(id, &mut widened);
                keep(&widened)
            })
            .collect();
        let members = kept.iter().filter(|&&k| k).count();
        (members, self.orbits_of(kept))
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
