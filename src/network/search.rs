//! Shortest paths over the residual network (Dijkstra 1959 with a binary heap), with the
//! potential update of the primal-dual methods (Ahuja, Magnanti, Orlin, "Network Flows",
//! 1993, §9.7 and §9.11). Near an optimum most residual moves have reduced cost 0, so a node
//! reached at the distance being settled goes on a plain stack instead of the heap: every
//! node at that distance is a minimum, and they may be settled in any order.
//!
//! A residual move of reduced cost `r` has length `max(r, 0)`. Moves of negative reduced cost
//! are the out-of-kilter ones; clamping them to 0 keeps every length nonnegative. A search
//! from `source` stops when `target` is settled, when the nearest unsettled node is at least
//! `limit` away, or when nothing more can be reached. With `D` the distance at which it
//! stopped, every settled node `v` gets `pi_v += D - d(v)` (the rest, all at distance `>= D`,
//! keep theirs): the truncated distances `min(d(v), D)` obey the triangle inequality on every
//! residual move, so a move of nonnegative reduced cost keeps it nonnegative, and the moves on
//! the shortest path end with reduced cost `<= 0`.

use std::cmp::Reverse;
use std::collections::BinaryHeap;

use super::outcome::CycleArc;
use super::residual::Residual;
use crate::error::{Error, Result};

/// How a search ended.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(super) enum Reach {
    /// The target was settled at this distance (below the limit).
    Found(i64),
    /// Every node nearer than the limit was settled; the target is not among them.
    Limit,
    /// The target cannot be reached; the settled nodes are all that can.
    Exhausted,
}

/// Reusable search buffers, sized for one network.
pub(super) struct Search {
    distance: Vec<i64>,
    /// The residual move into each reached node.
    via: Vec<CycleArc>,
    /// Per node, the search that last reached it; distances of older searches are stale.
    reached: Vec<u32>,
    /// Per node, the search that settled it.
    settled_in: Vec<u32>,
    epoch: u32,
    settled: Vec<usize>,
    heap: BinaryHeap<Reverse<(i64, usize)>>,
    /// Nodes reached at the distance being settled (by moves of length 0), which need no
    /// heap: they are settled next, in any order.
    level: Vec<usize>,
}

impl Search {
    /// Buffers for `nodes` nodes.
    pub fn new(nodes: usize) -> Self {
        Self {
            distance: vec![0; nodes],
            via: vec![
                CycleArc {
                    arc: 0,
                    forward: true
                };
                nodes
            ],
            reached: vec![0; nodes],
            settled_in: vec![0; nodes],
            epoch: 0,
            settled: Vec::with_capacity(nodes),
            heap: BinaryHeap::with_capacity(nodes),
            level: Vec::with_capacity(nodes),
        }
    }

    /// Runs one search from `source` towards `target`, never using arc `excluded`; a distance
    /// beyond `i64` is an overflow error.
    pub fn run(
        &mut self,
        state: &Residual<'_>,
        source: usize,
        target: usize,
        excluded: usize,
        limit: Option<i128>,
    ) -> Result<Reach> {
        // A limit beyond `i64` cannot be reached without an overflow error first.
        let limit = limit.and_then(|l| i64::try_from(l).ok());
        let epoch = self.begin(source);
        let incidence = state.net.incidence();
        while let Some((d, v)) = self
            .level
            .pop()
            .map(|v| (self.distance[v], v))
            .or_else(|| self.heap.pop().map(|Reverse(entry)| entry))
        {
            if self.settled_in[v] == epoch || d > self.distance[v] {
                continue;
            }
            if limit.is_some_and(|l| d >= l) {
                return Ok(Reach::Limit);
            }
            self.settled_in[v] = epoch;
            self.settled.push(v);
            if v == target {
                return Ok(Reach::Found(d));
            }
            let from = i128::from(state.potential[v]);
            for &(j, w, v_is_tail) in incidence.of(v) {
                if j == excluded || self.settled_in[w] == epoch {
                    continue;
                }
                self.relax(state, d, from, (j, w, v_is_tail))?;
            }
        }
        Ok(Reach::Exhausted)
    }

    /// Starts a new search from `source`: a new epoch (so no per-node reset is needed, except
    /// when the counter wraps), empty buffers, `source` reached at distance 0. Returns the
    /// epoch.
    fn begin(&mut self, source: usize) -> u32 {
        self.epoch = self.epoch.wrapping_add(1);
        if self.epoch == 0 {
            self.reached.fill(0);
            self.settled_in.fill(0);
            self.epoch = 1;
        }
        let epoch = self.epoch;
        self.settled.clear();
        self.heap.clear();
        self.level.clear();
        self.distance[source] = 0;
        self.reached[source] = epoch;
        self.heap.push(Reverse((0, source)));
        epoch
    }

    /// Relaxes one incident arc of the node just settled at distance `d` with potential
    /// `from`: `(j, w, v_is_tail)` is the arc, the other end and whether the settled node is
    /// the tail. If the residual move is open and shortens the way to `w`, `w` is (re)reached
    /// through it, onto the stack when at distance `d` and the heap otherwise. Kept apart from
    /// the search loop for readability; inlined since it runs once per arc scanned.
    #[inline]
    fn relax(
        &mut self,
        state: &Residual<'_>,
        d: i64,
        from: i128,
        (j, w, v_is_tail): (usize, usize, bool),
    ) -> Result<()> {
        let (flow, cost) = (&state.flow, state.cost);
        // Raising arc (v, w) costs c_j - pi_v + pi_w, lowering arc (w, v) costs
        // -(c_j - pi_w + pi_v): the same with the cost's sign flipped.
        let (open, c) = if v_is_tail {
            (
                state.upper[j].is_none_or(|u| flow[j] < u),
                i128::from(cost[j]),
            )
        } else {
            (
                state.lower[j].is_none_or(|l| flow[j] > l),
                -i128::from(cost[j]),
            )
        };
        if !open {
            return Ok(());
        }
        let length = (c + i128::from(state.potential[w]) - from).max(0);
        let candidate = i64::try_from(length)
            .ok()
            .and_then(|length| d.checked_add(length))
            .ok_or_else(|| Error::Overflow("network search: path length".into()))?;
        if self.reached[w] != self.epoch || candidate < self.distance[w] {
            self.reached[w] = self.epoch;
            self.distance[w] = candidate;
            self.via[w] = CycleArc {
                arc: j,
                forward: v_is_tail,
            };
            if candidate == d {
                self.level.push(w);
            } else {
                self.heap.push(Reverse((candidate, w)));
            }
        }
        Ok(())
    }

    /// The nodes the last search settled.
    pub fn settled(&self) -> &[usize] {
        &self.settled
    }

    /// Moves the potentials of the settled nodes after a search that stopped at distance
    /// `stop` (see the module doc).
    pub fn update_potentials(&self, state: &mut Residual<'_>, stop: i128) -> Result<()> {
        for &v in &self.settled {
            let shift = stop - i128::from(self.distance[v]);
            if shift != 0 {
                state.raise_potential(v, shift)?;
            }
        }
        Ok(())
    }

    /// The residual moves of the path the last search found from its source to `target`, in
    /// path order.
    pub fn path_to(&self, state: &Residual<'_>, source: usize, target: usize) -> Vec<CycleArc> {
        let arcs = state.net.arcs();
        let mut path = Vec::new();
        let mut v = target;
        while v != source {
            let step = self.via[v];
            path.push(step);
            let arc = arcs[step.arc];
            v = if step.forward { arc.tail } else { arc.head };
        }
        path.reverse();
        path
    }
}
