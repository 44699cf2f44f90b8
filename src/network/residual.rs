//! The solver's state: a flow and node potentials over the network, with the residual view
//! the searches read.
//!
//! An arc `j = (u, v)` can be raised while `x_j < u_j` and lowered while `x_j > l_j`; an arc
//! outside its bounds can only be moved towards them, so no residual move ever makes the
//! bound violation worse. Its reduced cost is `c_j - pi_u + pi_v`; raising it costs that,
//! lowering it the negative. Reduced costs are `i128` (three `i64` terms cannot overflow it);
//! the searches keep path lengths in checked `i64`.

use super::graph::Network;
use crate::error::{Error, Result};

/// A flow with potentials on one network for one instance's costs and bounds.
pub(super) struct Residual<'a> {
    pub net: &'a Network,
    pub cost: &'a [i64],
    pub lower: &'a [Option<i64>],
    pub upper: &'a [Option<i64>],
    /// One value per arc.
    pub flow: Vec<i64>,
    /// One per node; only differences matter.
    pub potential: Vec<i64>,
}

impl Residual<'_> {
    /// Whether arc `j` can be raised.
    pub fn can_raise(&self, j: usize) -> bool {
        self.upper[j].is_none_or(|u| self.flow[j] < u)
    }

    /// Whether arc `j` can be lowered.
    pub fn can_lower(&self, j: usize) -> bool {
        self.lower[j].is_none_or(|l| self.flow[j] > l)
    }

    /// `c_j - pi_tail + pi_head`.
    pub fn reduced(&self, j: usize) -> i128 {
        let arc = self.net.arcs()[j];
        i128::from(self.cost[j]) - i128::from(self.potential[arc.tail])
            + i128::from(self.potential[arc.head])
    }

    /// How far arc `j` can move in the given direction without worsening its violation;
    /// `None` for no limit.
    pub fn room(&self, j: usize, forward: bool) -> Option<i128> {
        let x = i128::from(self.flow[j]);
        if forward {
            self.upper[j].map(|u| (i128::from(u) - x).max(0))
        } else {
            self.lower[j].map(|l| (x - i128::from(l)).max(0))
        }
    }

    /// `dist(x_j, [l_j, u_j])`.
    pub fn violation_of(&self, j: usize) -> i128 {
        let x = i128::from(self.flow[j]);
        let below = self.lower[j].map_or(0, |l| (i128::from(l) - x).max(0));
        let above = self.upper[j].map_or(0, |u| (x - i128::from(u)).max(0));
        below + above
    }

    /// The total bound violation.
    pub fn violation(&self) -> Result<i128> {
        (0..self.flow.len()).try_fold(0i128, |acc, j| {
            acc.checked_add(self.violation_of(j))
                .ok_or_else(|| Error::Overflow("network flow: total violation".into()))
        })
    }

    /// `c.x`.
    pub fn objective(&self) -> Result<i128> {
        self.flow
            .iter()
            .zip(self.cost)
            .try_fold(0i128, |acc, (&x, &c)| {
                acc.checked_add(i128::from(x) * i128::from(c))
            })
            .ok_or_else(|| Error::Overflow("network flow: objective".into()))
    }

    /// Adds `amount` (or its negative) to arc `j`; the caller keeps it within `i64` by
    /// never moving past a bound.
    pub fn push(&mut self, j: usize, forward: bool, amount: i128) -> Result<()> {
        let x = i128::from(self.flow[j]);
        let moved = if forward { x + amount } else { x - amount };
        self.flow[j] = i64::try_from(moved)
            .map_err(|_| Error::Overflow(format!("network flow: flow on arc {j}")))?;
        Ok(())
    }

    /// Adds `shift` to the potential of node `v`.
    pub fn raise_potential(&mut self, v: usize, shift: i128) -> Result<()> {
        let p = i128::from(self.potential[v]) + shift;
        self.potential[v] = i64::try_from(p)
            .map_err(|_| Error::Overflow(format!("network flow: potential of node {v}")))?;
        Ok(())
    }
}
