//! Is the cost unbounded below? Given a feasible flow, it is exactly when a cycle of
//! negative cost can be pushed without limit: every arc it raises has no upper bound, every
//! arc it lowers no lower bound (Ahuja, Magnanti, Orlin 1993, §9.1). Such moves have infinite
//! room at every flow, so the question does not depend on the flow. Bellman-Ford with all
//! distances starting at 0 (Bellman 1958, Ford 1956) finds a negative cycle among them, or
//! proves there is none; usually no such move has negative cost and the check is one pass.

use super::graph::Network;
use super::outcome::{Cycle, CycleArc};

/// A residual move without limit: `(from, to, arc, forward, cost)`.
type Move = (usize, usize, usize, bool, i128);

/// A negative-cost cycle of moves without limit, if any.
pub(super) fn unbounded_cycle(
    net: &Network,
    cost: &[i64],
    lower: &[Option<i64>],
    upper: &[Option<i64>],
) -> Option<Cycle> {
    let open = |j: usize| {
        let c = i128::from(cost[j]);
        [
            (upper[j].is_none(), true, c),
            (lower[j].is_none(), false, -c),
        ]
        .into_iter()
        .filter(|&(open, _, _)| open)
        .map(|(_, forward, rate)| (forward, rate))
    };
    // Most days no move without limit has negative cost: one pass, nothing built.
    if (0..cost.len()).all(|j| open(j).all(|(_, rate)| rate >= 0)) {
        return None;
    }
    let mut moves: Vec<Move> = Vec::new();
    for (j, arc) in net.arcs().iter().enumerate() {
        for (forward, rate) in open(j) {
            if arc.is_loop() {
                if rate < 0 {
                    return Some(Cycle {
                        arcs: vec![CycleArc { arc: j, forward }],
                    });
                }
                continue;
            }
            let (from, to) = if forward {
                (arc.tail, arc.head)
            } else {
                (arc.head, arc.tail)
            };
            moves.push((from, to, j, forward, rate));
        }
    }
    negative_cycle(net.nodes(), &moves)
}

/// Bellman-Ford from a virtual source joined to every node at length 0.
fn negative_cycle(nodes: usize, moves: &[Move]) -> Option<Cycle> {
    let mut distance = vec![0i128; nodes];
    let mut via: Vec<Option<usize>> = vec![None; nodes];
    let mut changed_node = None;
    for _ in 0..nodes {
        changed_node = None;
        for (k, &(from, to, _, _, rate)) in moves.iter().enumerate() {
            let candidate = distance[from] + rate;
            if candidate < distance[to] {
                distance[to] = candidate;
                via[to] = Some(k);
                changed_node = Some(to);
            }
        }
        changed_node?;
    }
    // A change in the last pass: walking back `nodes` moves lands on the cycle.
    let mut v = changed_node?;
    for _ in 0..nodes {
        v = moves[via[v]?].0;
    }
    let start = v;
    let mut arcs = Vec::new();
    loop {
        let (from, _, arc, forward, _) = moves[via[v]?];
        arcs.push(CycleArc { arc, forward });
        v = from;
        if v == start {
            break;
        }
    }
    arcs.reverse();
    Some(Cycle { arcs })
}
