//! One lifting stage of project-and-lift (Hemmecke 2003, "On the positive sum property and the
//! computation of Graver test sets"; De Loera, Hemmecke, Köppe 2013, ch. on project-and-lift).
//!
//! Input: the ⊑-minimal elements `C` of the lattice projected to the components `S` (lifted
//! back uniquely, since the projection is injective). Output: those of the projection to
//! `T = S ∪ {j}`.
//!
//! Why only few pairs are needed: every `v` of the projection to `T` is a sum of members of
//! `C` that are ⊑ `v` on `S` (positive sum property). Among such representations take one
//! with the least `Σ |c_j|`; if it is not also conformal at `j`, two of its members `p, q`
//! have opposite signs at `j` and are sign-compatible on `S` (both are ⊑ `v` there). Once
//! `p + q` has a representation conformal on `T`, substituting it lowers `Σ |c_j|`. So the
//! completion only forms sums `p + q` with `p_j > 0 > q_j` and `p, q` sign-compatible on `S`,
//! and every member it ever needs for `v` is ⊑ `v` on `S`: its norm and entries on `S` are at
//! most those of `v`, which makes truncation by norm or box exact when applied on `S`.
//!
//! Sums are processed by norm level `||p||_S + ||q||_S + |p_j + q_j|` (the norm of `p + q`
//! on `T`, by sign-compatibility); one level is reduced in parallel against the set as it was
//! at the start of the level, and the remainders are merged in a canonical order, so the
//! result does not depend on the number of threads. Processes that share the work (see
//! [`super::WorkShare`]) each reduce every `k`-th pair of a batch and exchange the
//! remainders; the same canonical merge makes the set the same as one process's.

use std::collections::BTreeMap;

use rayon::prelude::*;

use super::control::{Control, StopReason};
use super::limits::Truncation;
use super::reducer::SignMask;
use super::store::{add_into, norm_on, Entry};
use super::working::{Orbit, WorkingSet};
use crate::error::Result;

/// What one stage lifts and under which limits.
pub(crate) struct Stage<'a> {
    /// Components lifted so far (`S`).
    pub old: &'a [usize],
    /// The component lifted now (`j`).
    pub new: usize,
    /// Sign required at each component: `+1`, `-1`, or `0` for free.
    pub signs: &'a [i8],
    /// Limits of the requested set.
    pub truncation: &'a Truncation,
    /// Stage number and count, for progress reports.
    pub number: (usize, usize),
}

/// Members whose pairs are reduced between two checks of the time limit.
const BATCH: usize = 1024;

/// Members on one side of component `j`, grouped by (norm on `S`, `|v_j|`).
type Groups = BTreeMap<(u64, u64), Vec<u32>>;

struct Lifting<'a> {
    stage: &'a Stage<'a>,
    /// Entries per vector.
    width: usize,
    set: WorkingSet,
    masks: Vec<SignMask>,
    norms: Vec<u64>,
    pos: Groups,
    neg: Groups,
}

/// Runs one stage; returns the minimal members on `S ∪ {j}` that satisfy the signs and limits
/// there, or why it stopped.
pub(crate) fn lift(
    start: Vec<Orbit>,
    stage: &Stage<'_>,
    control: &Control<'_>,
) -> Result<std::result::Result<Vec<Orbit>, StopReason>> {
    let width = start.first().map_or(0, |o| o.rep.len());
    let mut comps = stage.old.to_vec();
    comps.push(stage.new);
    let mut lifting = Lifting {
        stage,
        width,
        set: WorkingSet::new(width, comps.clone()),
        masks: Vec::new(),
        norms: Vec::new(),
        pos: Groups::new(),
        neg: Groups::new(),
    };
    for orbit in &start {
        lifting.add(&orbit.rep, orbit.symmetric);
    }
    let mut next = lifting.next_level(1);
    while let Some(level) = next {
        let sums = match lifting.level_sums(level, control)? {
            Ok(sums) => sums,
            Err(stop) => return Ok(Err(stop)),
        };
        let fresh = lifting.merge(sums)?;
        if let Err(stop) = lifting.catch_up(fresh, level, control)? {
            return Ok(Err(stop));
        }
        let (n, m) = stage.number;
        let local = control.checkpoint(n, m, level, lifting.set.len());
        if let (_, Some(stop)) = control.exchange(width, Vec::new(), local)? {
            return Ok(Err(stop));
        }
        next = lifting.next_level(level + 1);
    }
    Ok(Ok(lifting.finish(&comps)))
}

impl Lifting<'_> {
    fn add(&mut self, rep: &[Entry], symmetric: bool) -> Vec<u32> {
        let (a, b) = self.set.add(rep, symmetric);
        let ids: Vec<u32> = std::iter::once(a).chain(b).collect();
        for &id in &ids {
            let v = self.set.store.get(id);
            let norm = norm_on(v, self.stage.old);
            self.masks.push(SignMask::of(v, self.stage.old));
            self.norms.push(norm);
            let x = v[self.stage.new];
            let key = (norm, u64::from(x.unsigned_abs()));
            match x.signum() {
                1 => self.pos.entry(key).or_default().push(id),
                -1 => self.neg.entry(key).or_default().push(id),
                _ => {}
            }
        }
        ids
    }

    /// The smallest norm level at least `from` that some pair of groups has, if any (levels
    /// without pairs are skipped, so entries of any size cost nothing extra).
    fn next_level(&self, from: u64) -> Option<u64> {
        self.pos
            .keys()
            .flat_map(|&(a, x)| self.neg.keys().map(move |&(b, y)| a + b + x.abs_diff(y)))
            .filter(|&level| level >= from)
            .min()
    }

    /// Normal forms of all admissible sums `p + q` of norm exactly `level`, in batches between
    /// which a time limit or cancellation can stop the stage.
    fn level_sums(
        &self,
        level: u64,
        control: &Control<'_>,
    ) -> Result<std::result::Result<Vec<Vec<Entry>>, StopReason>> {
        let mut tasks: Vec<(u32, &[u32])> = Vec::new();
        for (&(a, x), ps) in &self.pos {
            for (&(b, y), qs) in &self.neg {
                if a + b + x.abs_diff(y) == level {
                    tasks.extend(ps.iter().map(|&p| (p, qs.as_slice())));
                }
            }
        }
        let (rank, size) = control.part();
        let mut sums = Vec::new();
        for batch in tasks.chunks(BATCH * size) {
            let local = control.interrupted();
            let mine: Vec<&(u32, &[u32])> = match local {
                Some(_) => Vec::new(),
                None => batch.iter().skip(rank).step_by(size).collect(),
            };
            let chunks: Vec<Vec<Vec<Entry>>> = mine
                .par_iter()
                .map(|&&(p, qs)| self.reduce_pairs(p, qs.iter().copied()))
                .collect::<Result<_>>()?;
            let mine = chunks.into_iter().flatten().collect();
            let (all, stop) = control.exchange(self.width, mine, local)?;
            if let Some(stop) = stop {
                return Ok(Err(stop));
            }
            sums.extend(all);
        }
        Ok(Ok(sums))
    }

    /// Normal forms of the admissible sums of `p` with each of `partners`.
    fn reduce_pairs(&self, p: u32, partners: impl Iterator<Item = u32>) -> Result<Vec<Vec<Entry>>> {
        let mut out = Vec::new();
        let mut w = vec![0; self.set.store.get(p).len()];
        for q in partners {
            if !self.admissible(p, q) {
                continue;
            }
            add_into(&mut w, self.set.store.get(p), self.set.store.get(q))?;
            if !self.set.reduce(&mut w)? {
                out.push(w.clone());
            }
        }
        Ok(out)
    }

    /// Whether the sum of `p` and `q` (opposite signs at `j`) must be formed.
    fn admissible(&self, p: u32, q: u32) -> bool {
        let (pi, qi) = (p as usize, q as usize);
        if !self.masks[pi].compatible(&self.masks[qi]) || !self.set.owns_pair(p, q) {
            return false;
        }
        let t = self.stage.truncation;
        if t.norm_limit
            .is_some_and(|n| self.norms[pi] + self.norms[qi] > n)
        {
            return false;
        }
        let (u, v) = (self.set.store.get(p), self.set.store.get(q));
        t.bounds.as_ref().is_none_or(|b| {
            self.stage
                .old
                .iter()
                .all(|&c| u64::from(u[c].unsigned_abs()) + u64::from(v[c].unsigned_abs()) <= b[c])
        })
    }

    /// Adds the remainders in canonical order, reducing each against what is already there.
    /// Returns the ids of the new members.
    fn merge(&mut self, mut sums: Vec<Vec<Entry>>) -> Result<Vec<u32>> {
        sums.sort_unstable();
        sums.dedup();
        let mut fresh = Vec::new();
        for mut w in sums {
            if !self.set.reduce(&mut w)? {
                let symmetric = self
                    .stage
                    .old
                    .iter()
                    .all(|&c| self.stage.signs[c] == 0 || w[c] == 0);
                fresh.extend(self.add(&w, symmetric));
            }
        }
        Ok(fresh)
    }

    /// Processes the pairs of new members whose norm is at most `level` (later levels see them
    /// through the groups), until no new member appears.
    fn catch_up(
        &mut self,
        mut fresh: Vec<u32>,
        level: u64,
        control: &Control<'_>,
    ) -> Result<std::result::Result<(), StopReason>> {
        let (rank, size) = control.part();
        while !fresh.is_empty() {
            let local = control.interrupted();
            let first_new = fresh[0];
            let j = self.stage.new;
            let mine: Vec<u32> = match local {
                Some(_) => Vec::new(),
                None => fresh.iter().copied().skip(rank).step_by(size).collect(),
            };
            let sums: Vec<Vec<Vec<Entry>>> = mine
                .par_iter()
                .map(|&e| {
                    let x = self.set.store.get(e)[j];
                    let side = match x.signum() {
                        1 => &self.neg,
                        -1 => &self.pos,
                        _ => return Ok(Vec::new()),
                    };
                    let x = u64::from(x.unsigned_abs());
                    let room = level.saturating_sub(self.norms[e as usize]);
                    let partners = side
                        .iter()
                        .filter(|(&(b, y), _)| b + x.abs_diff(y) <= room)
                        .flat_map(|(_, ids)| ids.iter().copied())
                        .filter(|&f| f < first_new || f < e);
                    self.reduce_pairs(e, partners)
                })
                .collect::<Result<_>>()?;
            let mine = sums.into_iter().flatten().collect();
            let (all, stop) = control.exchange(self.width, mine, local)?;
            if let Some(stop) = stop {
                return Ok(Err(stop));
            }
            fresh = self.merge(all)?;
        }
        Ok(Ok(()))
    }

    /// Applies the sign of `j` and the limits on `T`, then keeps the minimal members.
    fn finish(self, comps: &[usize]) -> Vec<Orbit> {
        let j = self.stage.new;
        let sign = self.stage.signs[j];
        let t = self.stage.truncation;
        let kept = self.set.orbits_where(|v| {
            (sign == 0 || v[j].signum() * Entry::from(sign) >= 0) && t.admits(v, comps)
        });
        minimal(kept, comps)
    }
}

/// The ⊑-minimal orbits (on `comps`) among `orbits`.
pub(crate) fn minimal(orbits: Vec<Orbit>, comps: &[usize]) -> Vec<Orbit> {
    let width = orbits.first().map_or(0, |o| o.rep.len());
    let mut set = WorkingSet::new(width, comps.to_vec());
    for o in &orbits {
        set.add(&o.rep, o.symmetric);
    }
    set.minimal_orbits()
}
