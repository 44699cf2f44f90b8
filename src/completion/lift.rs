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
//!
//! Between two batches the stage's state is a [`StagePoint`] over its working set; it is
//! saved when a save is due and when the stage stops, and a stage resumed from it repeats the
//! same steps (see [`super::checkpoint`]).
//!
//! Whether a truncation cut anything: the pairs it skipped are exactly those left out of the
//! completion criterion. If each of them still reduces to zero against the stage's final set,
//! every admissible pair has a conformal representation on `T`, the set has the positive sum
//! property there, and its minimal members are those of the untruncated stage (when the
//! stage's input was). If moreover the truncation removes no minimal member at the end, the
//! stage lost nothing.

use std::collections::BTreeMap;
use std::sync::Mutex;
use std::time::Instant;

use rayon::prelude::*;

use super::checkpoint::StagePoint;
use super::control::{Control, StopReason};
use super::limits::{admits, Truncation};
use super::partners::{marked, Group};
use super::reducer::{Reducer, SignMask};
use super::state_view::{Position, StateView};
use super::store::{add_into, to_entries, Entry, Stored};
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
    /// Whether the run has lost nothing so far (recorded in saved states).
    pub exact: bool,
    /// Whether to check that the truncation cuts nothing in this stage.
    pub check_cuts: bool,
}

/// A finished stage.
pub(crate) struct Lifted {
    /// The minimal members on `S ∪ {j}` within the signs and limits there.
    pub orbits: Vec<Orbit>,
    /// Whether the stage was checked and its truncation cut nothing.
    pub exact: bool,
}

/// Pair tasks (members, with their partners in one group) reduced between two checks of the
/// time limit, cancellation and saves; processes that share the work take this many each
/// between two exchanges. Every batch wakes the other threads and waits for the slowest, so
/// batches are large: on the 3x3x4 tables (1.1 M tasks over about 340 norm levels, well
/// under a microsecond a task) 16,384 instead of 1,024 made two threads 11% faster; on the
/// 3x3x5 tables a batch is still well under a second of work.
const BATCH: usize = 16_384;

/// Members on one side of component `j`, grouped by (norm on `S`, `|v_j|`).
type Groups = BTreeMap<(u64, u64), Group>;

/// A result that a limit or a cancellation may have cut short.
type Run<T> = Result<std::result::Result<T, StopReason>>;

/// How a pair of members on opposite sides of `j` is treated.
#[derive(Clone, Copy, PartialEq, Eq)]
enum PairKind {
    /// The mirror of a pair processed instead.
    Skipped,
    /// Left out by the truncation.
    Cut,
    /// Formed and reduced.
    Formed,
}

struct Lifting<'a, const W: usize, E> {
    stage: &'a Stage<'a>,
    /// Entries per vector.
    width: usize,
    set: WorkingSet<W, E>,
    /// Per member its norm on `S`.
    norms: Vec<u64>,
    /// Per member its signs on `S`.
    signs: Vec<SignMask<W>>,
    pos: Groups,
    neg: Groups,
    /// When the state was last saved (or the stage started).
    saved_at: Mutex<Instant>,
}

/// Runs one stage from `start` (the minimal members on `S`, or, with `at`, the working set
/// of a stage saved at that point); returns the minimal members on `S ∪ {j}` that satisfy
/// the signs and limits there, or why it stopped (after saving where it stood). Sign masks
/// take `W` words (at least the vectors' width over 64).
pub(crate) fn lift<const W: usize, E: Stored>(
    start: Vec<Orbit>,
    stage: &Stage<'_>,
    control: &Control<'_>,
    at: Option<StagePoint>,
) -> Run<Lifted> {
    let comps = lifted_comps(stage);
    let mut lifting = Lifting::<W, E>::new(start, stage, comps.clone())?;
    let point = at.unwrap_or(StagePoint::Pairs {
        from: 1,
        tasks_done: 0,
        sums: Vec::new(),
    });
    let end = match lifting.all_levels(point, control)? {
        Ok(end) => end,
        Err(stop) => return Ok(Err(stop)),
    };
    let exact = stage.check_cuts
        && match lifting.cut_pairs_vanish(control)? {
            Ok(vanish) => vanish,
            Err(stop) => {
                let (position, sums) = end.split();
                lifting.save(position, &narrow_all(sums)?, control);
                return Ok(Err(stop));
            }
        };
    Ok(Ok(lifting.finish(&comps, exact)?))
}

/// The components of `T = S ∪ {j}`, in the order the working set keeps them.
fn lifted_comps(stage: &Stage<'_>) -> Vec<usize> {
    let mut comps = stage.old.to_vec();
    comps.push(stage.new);
    comps
}

/// What one step of a stage leads to: the next point, or the end of the pairs.
enum Step {
    /// Continue from this point.
    Next(StagePoint),
    /// No norm level has pairs left; the stage's state at its end.
    Done(StagePoint),
}

impl<'a, const W: usize, E: Stored> Lifting<'a, W, E> {
    /// The working set of a stage over `comps` (`T`), holding the members of `start`.
    fn new(start: Vec<Orbit>, stage: &'a Stage<'a>, comps: Vec<usize>) -> Result<Self> {
        let width = start.first().map_or(0, |o| o.rep.len());
        let mut lifting = Lifting {
            stage,
            width,
            set: WorkingSet::new(width, comps),
            norms: Vec::new(),
            signs: Vec::new(),
            pos: Groups::new(),
            neg: Groups::new(),
            saved_at: Mutex::new(Instant::now()),
        };
        for orbit in start {
            lifting.add(&orbit.rep, orbit.symmetric)?;
        }
        Ok(lifting)
    }
}

impl<const W: usize, E: Stored> Lifting<'_, W, E> {
    /// Processes norm levels from `point` on until no level has pairs left; returns the state
    /// at the end (to save if the cut check stops), or why it stopped.
    fn all_levels(&mut self, mut point: StagePoint, control: &Control<'_>) -> Run<StagePoint> {
        loop {
            let step = match point {
                StagePoint::Pairs {
                    from,
                    tasks_done,
                    sums,
                } => self.pairs_step(from, tasks_done, sums, control)?,
                StagePoint::CatchUp {
                    level,
                    first_new,
                    members_done,
                    sums,
                } => self
                    .catch_up_step(level, first_new, members_done, sums, control)?
                    .map(Step::Next),
            };
            point = match step {
                Ok(Step::Next(next)) => next,
                Ok(Step::Done(end)) => return Ok(Ok(end)),
                Err(stop) => return Ok(Err(stop)),
            };
        }
    }

    /// Reduces the pairs of the next norm level from `from` on (resuming after `tasks_done`
    /// tasks with their remainders `sums`) and merges the remainders; the members they added
    /// then need their own pairs up to that level (the catch-up).
    fn pairs_step(
        &mut self,
        from: u64,
        tasks_done: usize,
        sums: Vec<Vec<i64>>,
        control: &Control<'_>,
    ) -> Run<Step> {
        let Some(level) = self.next_level(from) else {
            return Ok(Ok(Step::Done(StagePoint::Pairs {
                from,
                tasks_done,
                sums,
            })));
        };
        let sums = match self.level_sums(level, tasks_done, sums, control)? {
            Ok(sums) => sums,
            Err(stop) => return Ok(Err(stop)),
        };
        let first_new = self.set.len() as u32;
        self.merge(sums)?;
        Ok(Ok(Step::Next(StagePoint::CatchUp {
            level,
            first_new,
            members_done: 0,
            sums: Vec::new(),
        })))
    }

    /// Finishes norm level `level` by the catch-up of the members from `first_new` on, then
    /// reports the level done (exchanging stops with processes that share the work) and saves
    /// when a save is due; the next point is the following level.
    fn catch_up_step(
        &mut self,
        level: u64,
        first_new: u32,
        members_done: usize,
        sums: Vec<Vec<i64>>,
        control: &Control<'_>,
    ) -> Run<StagePoint> {
        let caught_up = self.catch_up(level, first_new, members_done, sums, control)?;
        if let Err(stop) = caught_up {
            return Ok(Err(stop));
        }
        let next = Position::Pairs {
            from: level + 1,
            tasks_done: 0,
        };
        let (n, m) = self.stage.number;
        let local = control.checkpoint(n, m, level, self.set.len());
        if let (_, Some(stop)) = control.exchange(self.width, Vec::new(), local)? {
            self.save(next, &[], control);
            return Ok(Err(stop));
        }
        self.save_if_due(next, &[], control);
        Ok(Ok(next.with_sums(Vec::new())))
    }

    fn add(&mut self, rep: &[Entry], symmetric: bool) -> Result<()> {
        let (a, b) = self.set.add(rep, symmetric)?;
        for id in std::iter::once(a).chain(b) {
            let v = self.set.store.get(id);
            let (signs, norm) = SignMask::with_norm(v, self.stage.old);
            self.norms.push(norm);
            self.signs.push(signs);
            let x: Entry = v[self.stage.new].into();
            let key = (norm, u64::from(x.unsigned_abs()));
            let side = match x.signum() {
                1 => &mut self.pos,
                -1 => &mut self.neg,
                _ => continue,
            };
            let group = side
                .entry(key)
                .or_insert_with(|| Group::new(self.stage.old.len()));
            group.push(id, &signs);
        }
        Ok(())
    }

    /// The smallest norm level at least `from` that some pair of groups has, if any (levels
    /// without pairs are skipped, so entries of any size cost nothing extra).
    fn next_level(&self, from: u64) -> Option<u64> {
        self.pos
            .keys()
            .flat_map(|&(a, x)| {
                self.neg
                    .keys()
                    .filter(move |&&(b, _)| !self.norms_cut(a, b))
                    .map(move |&(b, y)| a + b + x.abs_diff(y))
            })
            .filter(|&level| level >= from)
            .min()
    }

    /// Whether the norm limit cuts every pair of a member of norm `a` on `S` with one of norm
    /// `b` there: such pairs of groups are not formed at all (only the cut check visits them).
    fn norms_cut(&self, a: u64, b: u64) -> bool {
        self.stage.truncation.norm_limit.is_some_and(|n| a + b > n)
    }

    /// The pair tasks of norm level `level`: a member and the group of its partners, in a
    /// fixed order (that of the groups).
    fn level_tasks(&self, level: u64) -> Vec<(u32, &Group)> {
        let mut tasks: Vec<(u32, &Group)> = Vec::new();
        for (&(a, x), ps) in &self.pos {
            for (&(b, y), qs) in &self.neg {
                if a + b + x.abs_diff(y) == level && !self.norms_cut(a, b) {
                    tasks.extend(ps.ids().iter().map(|&p| (p, qs)));
                }
            }
        }
        tasks
    }

    /// Normal forms of all admissible sums `p + q` of norm exactly `level`, after the first
    /// `done` tasks whose remainders are `sums`, in batches between which a time limit or
    /// cancellation can stop the stage and a due save is made.
    fn level_sums(
        &self,
        level: u64,
        mut done: usize,
        sums: Vec<Vec<i64>>,
        control: &Control<'_>,
    ) -> Run<Vec<Vec<Entry>>> {
        let tasks = self.level_tasks(level);
        let mut sums = narrow_all(sums)?;
        let (rank, size) = control.part();
        let point = |done: usize| Position::Pairs {
            from: level,
            tasks_done: done,
        };
        for batch in tasks.get(done..).unwrap_or_default().chunks(BATCH * size) {
            self.save_if_due(point(done), &sums, control);
            let local = control.interrupted();
            let mine: Vec<&(u32, &Group)> = match local {
                Some(_) => Vec::new(),
                None => batch.iter().skip(rank).step_by(size).collect(),
            };
            let chunks: Vec<Vec<Vec<Entry>>> = mine
                .par_iter()
                .map(|&&(p, qs)| {
                    self.reduce_pairs(p, qs.compatible(&self.signs[p as usize], u32::MAX))
                })
                .collect::<Result<_>>()?;
            let mine = chunks.into_iter().flatten().collect();
            let (all, stop) = control.exchange(self.width, mine, local)?;
            if let Some(stop) = stop {
                self.save(point(done), &sums, control);
                return Ok(Err(stop));
            }
            sums.extend(all);
            done += batch.len();
        }
        Ok(Ok(sums))
    }

    /// Normal forms of the admissible sums of `p` with each of the partners the blocks mark
    /// (members sign-compatible with `p` on `S`; see [`Group::compatible`]).
    fn reduce_pairs<'g>(
        &self,
        p: u32,
        blocks: impl Iterator<Item = (u64, &'g [u32])> + 'g,
    ) -> Result<Vec<Vec<Entry>>> {
        let mut out = Vec::new();
        let mut w = vec![0; self.width];
        for q in marked(blocks) {
            if self.pair_kind(p, q) != PairKind::Formed {
                continue;
            }
            add_into(&mut w, self.set.store.get(p), self.set.store.get(q))?;
            if !self.set.reduce(&mut w)? {
                out.push(w.clone());
            }
        }
        Ok(out)
    }

    /// How the sum of `p` and `q` (opposite signs at `j`, sign-compatible on `S`) is
    /// treated.
    fn pair_kind(&self, p: u32, q: u32) -> PairKind {
        let (pi, qi) = (p as usize, q as usize);
        if !self.set.owns_pair(p, q) {
            return PairKind::Skipped;
        }
        let t = self.stage.truncation;
        if t.norm_limit
            .is_some_and(|n| self.norms[pi] + self.norms[qi] > n)
        {
            return PairKind::Cut;
        }
        let store = &self.set.store;
        let size = |id: u32, c: usize| u64::from(store.entry(id, c).unsigned_abs());
        let in_box = t.bounds.as_ref().is_none_or(|b| {
            self.stage
                .old
                .iter()
                .all(|&c| size(p, c) + size(q, c) <= b[c])
        });
        if in_box {
            PairKind::Formed
        } else {
            PairKind::Cut
        }
    }

    /// Adds the remainders in canonical order, reducing each against the members added before
    /// it. Every remainder is already irreducible against the set it was reduced against,
    /// which is the set the merge starts from, and what a reduction leaves of it is ⊑ it
    /// (on `T`), so no member of that set lies below it either (⊑ is transitive): only the
    /// members this merge adds can reduce a remainder, and they are indexed apart for it.
    fn merge(&mut self, mut sums: Vec<Vec<Entry>>) -> Result<()> {
        sums.sort_unstable();
        sums.dedup();
        let mut added = Reducer::<W>::new(self.set.reducer.comps().to_vec());
        for mut w in sums {
            if !added.reduce(&self.set.store, &mut w)? {
                let symmetric = self
                    .stage
                    .old
                    .iter()
                    .all(|&c| self.stage.signs[c] == 0 || w[c] == 0);
                let first = self.set.len() as u32;
                self.add(&w, symmetric)?;
                for id in first..self.set.len() as u32 {
                    added.insert(&self.set.store, id);
                }
            }
        }
        Ok(())
    }

    /// Processes the pairs of the members from id `first_new` on whose norm is at most
    /// `level` (later levels see them through the groups), after the first `done` of them
    /// whose remainders are `sums`, until no new member appears.
    fn catch_up(
        &mut self,
        level: u64,
        mut first_new: u32,
        mut done: usize,
        sums: Vec<Vec<i64>>,
        control: &Control<'_>,
    ) -> Run<()> {
        let (rank, size) = control.part();
        let mut collected = narrow_all(sums)?;
        while first_new < self.set.len() as u32 || !collected.is_empty() {
            let fresh: Vec<u32> = (first_new..self.set.len() as u32).collect();
            let point = |done: usize| Position::CatchUp {
                level,
                first_new,
                members_done: done,
            };
            for batch in fresh.get(done..).unwrap_or_default().chunks(BATCH * size) {
                self.save_if_due(point(done), &collected, control);
                let local = control.interrupted();
                let mine: Vec<u32> = match local {
                    Some(_) => Vec::new(),
                    None => batch.iter().copied().skip(rank).step_by(size).collect(),
                };
                let sums: Vec<Vec<Vec<Entry>>> = mine
                    .par_iter()
                    .map(|&e| self.catch_up_pairs(e, first_new, level))
                    .collect::<Result<_>>()?;
                let mine = sums.into_iter().flatten().collect();
                let (all, stop) = control.exchange(self.width, mine, local)?;
                if let Some(stop) = stop {
                    self.save(point(done), &collected, control);
                    return Ok(Err(stop));
                }
                collected.extend(all);
                done += batch.len();
            }
            first_new = self.set.len() as u32;
            done = 0;
            self.merge(std::mem::take(&mut collected))?;
        }
        Ok(Ok(()))
    }

    /// Normal forms of the sums of the new member `e` with the partners of norm level at most
    /// `level` that came before it (older members, or new ones with a smaller id).
    fn catch_up_pairs(&self, e: u32, first_new: u32, level: u64) -> Result<Vec<Vec<Entry>>> {
        let x = self.set.store.entry(e, self.stage.new);
        let side = match x.signum() {
            1 => &self.neg,
            -1 => &self.pos,
            _ => return Ok(Vec::new()),
        };
        let x = u64::from(x.unsigned_abs());
        let a = self.norms[e as usize];
        let room = level.saturating_sub(a);
        let before = first_new.max(e);
        let blocks = side
            .iter()
            .filter(|(&(b, y), _)| b + x.abs_diff(y) <= room && !self.norms_cut(a, b))
            .flat_map(|(_, group)| group.compatible(&self.signs[e as usize], before));
        self.reduce_pairs(e, blocks)
    }

    /// Whether every pair the truncation left out reduces to zero against the final working
    /// set (see the module documentation), checked in increasing norm level so that a pair
    /// that does not is usually met early.
    fn cut_pairs_vanish(&self, control: &Control<'_>) -> Run<bool> {
        let t = self.stage.truncation;
        let mut groups: Vec<(u64, u32, &Group)> = Vec::new();
        for (&(a, x), ps) in &self.pos {
            for (&(b, y), qs) in &self.neg {
                if t.bounds.is_some() || self.norms_cut(a, b) {
                    let level = a + b + x.abs_diff(y);
                    groups.extend(ps.ids().iter().map(|&p| (level, p, qs)));
                }
            }
        }
        groups.sort_by_key(|&(level, p, _)| (level, p));
        for batch in groups.chunks(BATCH) {
            if let (_, Some(stop)) =
                control.exchange(self.width, Vec::new(), control.interrupted())?
            {
                return Ok(Err(stop));
            }
            let survivor = batch
                .par_iter()
                .map(|&(_, p, qs)| self.cut_pair_survives(p, qs))
                .find_any(|r| !matches!(r, Ok(false)));
            match survivor {
                Some(Err(e)) => return Err(e),
                Some(Ok(_)) => return Ok(Ok(false)),
                None => {}
            }
        }
        Ok(Ok(true))
    }

    /// Whether some pair of `p` with a member of `qs` that the truncation cut has a nonzero
    /// normal form.
    fn cut_pair_survives(&self, p: u32, qs: &Group) -> Result<bool> {
        let mut w = vec![0; self.width];
        for q in marked(qs.compatible(&self.signs[p as usize], u32::MAX)) {
            if self.pair_kind(p, q) != PairKind::Cut {
                continue;
            }
            add_into(&mut w, self.set.store.get(p), self.set.store.get(q))?;
            if !self.set.reduce(&mut w)? {
                return Ok(true);
            }
        }
        Ok(false)
    }

    /// Saves the state at `position`, with the remainders `sums` not yet merged, through the
    /// control's hook, if it has one.
    fn save(&self, position: Position, sums: &[Vec<Entry>], control: &Control<'_>) {
        if !control.saves() {
            return;
        }
        control.save(&StateView::within(
            self.stage.old,
            &self.set,
            (self.stage.new, position),
            sums,
            self.stage.exact,
        ));
        if let Ok(mut at) = self.saved_at.lock() {
            *at = Instant::now();
        }
    }

    /// Saves the state at `position` if the control's interval has passed since the last save.
    fn save_if_due(&self, position: Position, sums: &[Vec<Entry>], control: &Control<'_>) {
        let due = self.saved_at.lock().is_ok_and(|at| control.save_due(*at));
        if due {
            self.save(position, sums, control);
        }
    }

    /// Applies the sign of `j` and the limits on `T`, then keeps the minimal members; with
    /// `exact`, reports whether the limits removed none of the minimal members. The pair
    /// groups and per-member figures are dropped first; the minimal pass runs on the working
    /// set itself (the sign and the limits hold below every member that meets them, see
    /// [`WorkingSet::minimal_orbits_among`]), so the stage's end holds no second set.
    fn finish(mut self, comps: &[usize], exact: bool) -> Result<Lifted> {
        self.pos = Groups::new();
        self.neg = Groups::new();
        self.norms = Vec::new();
        self.signs = Vec::new();
        let j = self.stage.new;
        let sign = self.stage.signs[j];
        let t = self.stage.truncation;
        let signed = |v: &[Entry]| sign == 0 || v[j].signum() * Entry::from(sign) >= 0;
        if !exact {
            return Ok(Lifted {
                orbits: self
                    .set
                    .minimal_orbits_among(|v| signed(v) && admits(t, v, comps)),
                exact: false,
            });
        }
        // Members above the limits are never needed to show that a member within them is
        // not minimal (anything ⊑ it is within them too), so cutting after the minimal
        // pass gives the same set as cutting before it.
        let all = self.set.minimal_orbits_among(signed);
        drop(self);
        let total = all.len();
        let orbits: Vec<Orbit> = all
            .into_iter()
            .filter(|o| admits(t, &o.rep, comps))
            .collect();
        Ok(Lifted {
            exact: orbits.len() == total,
            orbits,
        })
    }
}

/// Remainders saved in a checkpoint, back as entries.
fn narrow_all(sums: Vec<Vec<i64>>) -> Result<Vec<Vec<Entry>>> {
    sums.iter().map(|v| to_entries(v)).collect()
}

/// The ⊑-minimal orbits (on `comps`, at most `64 * W` of them) among `orbits`, kept as `E`
/// meanwhile ([`crate::Error::EntryWidth`] when one does not fit).
pub(crate) fn minimal<const W: usize, E: Stored>(
    orbits: Vec<Orbit>,
    comps: &[usize],
) -> Result<Vec<Orbit>> {
    let width = orbits.first().map_or(0, |o| o.rep.len());
    let members = orbits.iter().map(|o| 1 + usize::from(o.symmetric)).sum();
    Ok(collect_set::<W, E>(orbits, members, width, comps)?.minimal_orbits())
}

/// A set of vectors `width` wide holding `orbits` (`members` members in all, a symmetric
/// orbit counting twice), indexed on `comps` and kept as `E`, its store reserved exactly.
fn collect_set<const W: usize, E: Stored>(
    orbits: impl IntoIterator<Item = Orbit>,
    members: usize,
    width: usize,
    comps: &[usize],
) -> Result<WorkingSet<W, E>> {
    let mut set = WorkingSet::<W, E>::new(width, comps.to_vec());
    set.reserve(members);
    for o in orbits {
        set.add(&o.rep, o.symmetric)?;
    }
    Ok(set)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn orbit(rep: &[Entry]) -> Orbit {
        Orbit {
            rep: rep.to_vec(),
            symmetric: true,
        }
    }

    /// A member beyond a byte is refused by a one-byte store (so the completion widens) and
    /// kept exactly by a two-byte one.
    #[test]
    fn narrow_stores_refuse_what_they_cannot_hold() {
        let orbits = || {
            vec![
                orbit(&[1, 200, 0]),
                orbit(&[0, 1, -1]),
                orbit(&[1, 201, -1]),
            ]
        };
        let comps = [0, 1, 2];
        assert!(matches!(
            minimal::<1, i8>(orbits(), &comps),
            Err(crate::Error::EntryWidth)
        ));
        let half = minimal::<1, i16>(orbits(), &comps).unwrap();
        assert_eq!(half, minimal::<1, Entry>(orbits(), &comps).unwrap());
        // (1, 201, -1) = (1, 200, 0) + (0, 1, -1) conformally: not minimal.
        assert_eq!(half.len(), 2);
    }
}
