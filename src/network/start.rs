//! Start flows: every arc at a chosen value, then the imbalances routed along a spanning
//! forest so that every node balances (`A x = b` holds exactly, the bounds may not).
//!
//! A cold start builds a forest of cheap arcs for the day's costs (`Network::cheap_forest`),
//! sets potentials that give every forest arc reduced cost 0, and puts every arc at the bound
//! its reduced cost prefers (lower for a positive one, upper for a negative one, the value
//! nearest 0 when that bound is infinite or the reduced cost is 0). Every arc off the forest
//! then starts in kilter, and a forest arc is out of kilter only where the routing pushes it
//! past a bound, as in a tree solution of the network simplex method.
//!
//! A warm start keeps the given flow and routes along the network's fixed breadth-first
//! forest, which costs nothing to build; when only a few supplies changed, only the forest
//! paths from those nodes towards their tree's root change, so phase I has a few violations
//! to repair.
//!
//! A tree whose nodes' supplies do not add up to zero (a set of rows that no arc joins to the
//! rest) has no solution of `A x = b` at all.

use super::graph::{Forest, Network};
use super::input::{FlowNumbers, Warm};
use super::outcome::Cut;
use crate::error::{Error, Result};

/// A start point, or the proof that `A x = b` has no solution at all.
pub(super) enum Start {
    /// A flow that balances every node, and potentials.
    Balanced {
        /// One value per arc.
        flow: Vec<i64>,
        /// One per node.
        potential: Vec<i64>,
    },
    /// A tree of the forest whose supplies do not add up to zero.
    Unbalanced(Cut),
}

/// The start for `numbers`: from `warm` when given, cold otherwise (see the module doc).
pub(super) fn start(
    net: &Network,
    numbers: &FlowNumbers<'_>,
    warm: Option<Warm<'_>>,
) -> Result<Start> {
    let cost = numbers.cost;
    let priced = |forest: &Forest| {
        forest_potentials(net, forest, cost).unwrap_or_else(|| vec![0; net.nodes()])
    };
    let cheap;
    let (forest, mut flow, potential) = match warm {
        Some(w) => {
            let potential = match w.potentials {
                Some(y) => node_potentials(net, y)?,
                None => priced(net.forest()),
            };
            (net.forest(), w.flow.to_vec(), potential)
        }
        None => {
            cheap = net.cheap_forest(cost);
            let potential = priced(&cheap);
            let flow = net
                .arcs()
                .iter()
                .enumerate()
                .map(|(j, arc)| {
                    let reduced = i128::from(cost[j]) - i128::from(potential[arc.tail])
                        + i128::from(potential[arc.head]);
                    preferred(reduced.signum(), numbers.lower[j], numbers.upper[j])
                })
                .collect();
            (&cheap, flow, potential)
        }
    };
    Ok(
        match route(net, forest, &supplies(net, numbers.rhs), &mut flow)? {
            Some(cut) => Start::Unbalanced(cut),
            None => Start::Balanced { flow, potential },
        },
    )
}

/// Node supplies `row_signs[i] * b_i`, the root's the negative sum (`i128` holds the sum of
/// any number of `i64` terms that fits in memory).
fn supplies(net: &Network, rhs: &[i64]) -> Vec<i128> {
    let mut supply: Vec<i128> = rhs
        .iter()
        .zip(net.row_signs())
        .map(|(&b, &s)| i128::from(b) * i128::from(s))
        .collect();
    supply.push(-supply.iter().sum::<i128>());
    supply
}

/// Node potentials from row potentials (the root at 0).
fn node_potentials(net: &Network, rows: &[i64]) -> Result<Vec<i64>> {
    rows.iter()
        .zip(net.row_signs())
        .map(|(&y, &s)| y.checked_mul(s))
        .chain(std::iter::once(Some(0)))
        .collect::<Option<Vec<i64>>>()
        .ok_or_else(|| Error::Overflow("network solve: warm potentials".into()))
}

/// The cold start value of an arc whose reduced cost has sign `sign`, with bounds `l <= u`:
/// the bound that sign prefers, or the value nearest 0 when that bound is infinite or the
/// sign is 0.
fn preferred(sign: i128, l: Option<i64>, u: Option<i64>) -> i64 {
    let below_upper = u.map_or(0, |u| u.min(0));
    let nearest_zero = l.map_or(below_upper, |l| below_upper.max(l));
    match sign {
        1 => l.unwrap_or(nearest_zero),
        -1 => u.unwrap_or(nearest_zero),
        _ => nearest_zero,
    }
}

/// Potentials that give every forest arc reduced cost 0 (each tree's root at 0), or `None`
/// when they would leave `i64`.
fn forest_potentials(net: &Network, forest: &Forest, cost: &[i64]) -> Option<Vec<i64>> {
    let arcs = net.arcs();
    let mut potential = vec![0i64; net.nodes()];
    for &v in &forest.order {
        let Some(j) = forest.parent_arc[v] else {
            continue;
        };
        let arc = arcs[j];
        // c_j - pi_tail + pi_head = 0.
        potential[v] = if arc.head == v {
            potential[arc.tail].checked_sub(cost[j])?
        } else {
            potential[arc.head].checked_add(cost[j])?
        };
    }
    Some(potential)
}

/// Makes `flow` balance every node for `supply` by changing forest arcs only; returns the
/// rows of a tree that cannot balance, as a [`Cut`], when there is one.
fn route(net: &Network, forest: &Forest, supply: &[i128], flow: &mut [i64]) -> Result<Option<Cut>> {
    let mut excess = supply.to_vec();
    for (j, arc) in net.arcs().iter().enumerate() {
        if arc.is_loop() {
            continue;
        }
        let x = i128::from(flow[j]);
        excess[arc.tail] -= x;
        excess[arc.head] += x;
    }
    let arcs = net.arcs();
    for (position, &v) in forest.order.iter().enumerate().rev() {
        let Some(j) = forest.parent_arc[v] else {
            if excess[v] != 0 && v != net.root() {
                return Ok(Some(tree_cut(net, forest, position)));
            }
            continue;
        };
        let arc = arcs[j];
        let (x, parent) = if arc.tail == v {
            (i128::from(flow[j]) + excess[v], arc.head)
        } else {
            (i128::from(flow[j]) - excess[v], arc.tail)
        };
        flow[j] = i64::try_from(x)
            .map_err(|_| Error::Overflow(format!("network start: flow on arc {j}")))?;
        excess[parent] += excess[v];
        excess[v] = 0;
    }
    debug_assert!(excess.iter().all(|&e| e == 0));
    Ok(None)
}

/// The rows of the tree that starts at `forest.order[position]`.
fn tree_cut(net: &Network, forest: &Forest, position: usize) -> Cut {
    let mut weights = vec![0; net.rows()];
    let tree = std::iter::once(forest.order[position]).chain(
        forest.order[position + 1..]
            .iter()
            .copied()
            .take_while(|&v| forest.parent_arc[v].is_some()),
    );
    for v in tree {
        weights[v] = net.row_signs()[v];
    }
    Cut { weights }
}
