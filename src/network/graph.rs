//! The directed graph of a network matrix: nodes, arcs, incidence lists and a spanning forest.
//!
//! Node `i < rows` is row `i` of the matrix; node `rows` is the root, the node whose row the
//! matrix leaves out (the negative sum of all the others). Arc `j` is column `j`: after row `i`
//! is multiplied by `row_signs[i]`, the column has `+1` in its tail's row and `-1` in its
//! head's row, and a missing entry belongs to the root. A zero column is a loop at the root
//! (tail = head = root): a variable in no row, whose value changes no balance.
//!
//! Flow conservation at node `i` reads `out_i(x) - in_i(x) = supply_i` with
//! `supply_i = row_signs[i] * b_i` for rows and `supply_root = -sum_i supply_i`, which is row
//! `i` of `A x = b` multiplied by its sign.

use std::cmp::Reverse;
use std::collections::BinaryHeap;

/// The two ends of one arc of the network, by node index (the root is [`Network::root`]);
/// named apart from `std::sync::Arc`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct ArcEnds {
    /// The node the arc leaves: its column has `+1` there after the row scaling.
    pub tail: usize,
    /// The node the arc enters: `-1` there after the row scaling.
    pub head: usize,
}

impl ArcEnds {
    /// True for a zero column: a loop at the root.
    pub fn is_loop(&self) -> bool {
        self.tail == self.head
    }
}

/// A network found in a matrix by [`Network::detect`](super::Network::detect).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Network {
    rows: usize,
    arcs: Vec<ArcEnds>,
    row_signs: Vec<i64>,
    incidence: Incidence,
    forest: Forest,
}

/// Per node, the arcs that touch it (loops excluded), in compressed rows.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(super) struct Incidence {
    /// `start[v]..start[v + 1]` indexes the entries of node `v`.
    pub start: Vec<usize>,
    /// `(arc, other end, v is the tail)`.
    pub entries: Vec<(usize, usize, bool)>,
}

/// A spanning forest of the underlying undirected graph, the root node's tree first.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(super) struct Forest {
    /// Nodes in breadth-first order; each tree's first node is its own root.
    pub order: Vec<usize>,
    /// Per node, the tree arc to its parent (`None` at a tree's root).
    pub parent_arc: Vec<Option<usize>>,
}

impl Network {
    /// Assembles the network of `arcs` over `rows` rows (node `rows` is the root) with the
    /// given row signs; the caller guarantees that every arc's ends are nodes.
    pub(super) fn new(rows: usize, arcs: Vec<ArcEnds>, row_signs: Vec<i64>) -> Self {
        let incidence = Incidence::new(rows + 1, &arcs);
        let forest = Forest::new(rows, &incidence);
        Self {
            rows,
            arcs,
            row_signs,
            incidence,
            forest,
        }
    }

    /// Number of nodes: the rows and the root.
    pub fn nodes(&self) -> usize {
        self.rows + 1
    }

    /// Number of rows of the matrix.
    pub fn rows(&self) -> usize {
        self.rows
    }

    /// The root's node index (`rows`).
    pub fn root(&self) -> usize {
        self.rows
    }

    /// The arcs, one per column.
    pub fn arcs(&self) -> &[ArcEnds] {
        &self.arcs
    }

    /// Per row, `+1` or `-1`: the factor that turns the row into a node's conservation row.
    pub fn row_signs(&self) -> &[i64] {
        &self.row_signs
    }

    pub(super) fn incidence(&self) -> &Incidence {
        &self.incidence
    }

    pub(super) fn forest(&self) -> &Forest {
        &self.forest
    }

    /// A spanning forest of cheap arcs for a cold start: Prim's algorithm (Prim 1957) with
    /// weights `|c_j|`, from the root first and then from each row not yet reached. Flow
    /// routed along cheap arcs starts nearer the optimum than along arbitrary ones.
    pub(super) fn cheap_forest(&self, cost: &[i64]) -> Forest {
        let nodes = self.nodes();
        let mut parent_arc = vec![None; nodes];
        let mut seen = vec![false; nodes];
        let mut order = Vec::with_capacity(nodes);
        let mut heap = BinaryHeap::new();
        for start in std::iter::once(self.rows).chain(0..self.rows) {
            if seen[start] {
                continue;
            }
            heap.push(Reverse((0u64, start, None)));
            while let Some(Reverse((_, v, arc))) = heap.pop() {
                if seen[v] {
                    continue;
                }
                seen[v] = true;
                parent_arc[v] = arc;
                order.push(v);
                for &(j, w, _) in self.incidence.of(v) {
                    if !seen[w] {
                        heap.push(Reverse((cost[j].unsigned_abs(), w, Some(j))));
                    }
                }
            }
        }
        Forest { order, parent_arc }
    }
}

impl Incidence {
    fn new(nodes: usize, arcs: &[ArcEnds]) -> Self {
        let mut degree = vec![0usize; nodes + 1];
        for arc in arcs.iter().filter(|a| !a.is_loop()) {
            degree[arc.tail + 1] += 1;
            degree[arc.head + 1] += 1;
        }
        for v in 0..nodes {
            degree[v + 1] += degree[v];
        }
        let start = degree;
        let mut fill = start.clone();
        let mut entries = vec![(0, 0, false); start[nodes]];
        for (j, arc) in arcs.iter().enumerate().filter(|(_, a)| !a.is_loop()) {
            entries[fill[arc.tail]] = (j, arc.head, true);
            fill[arc.tail] += 1;
            entries[fill[arc.head]] = (j, arc.tail, false);
            fill[arc.head] += 1;
        }
        Self { start, entries }
    }

    /// The entries of node `v`.
    pub fn of(&self, v: usize) -> &[(usize, usize, bool)] {
        &self.entries[self.start[v]..self.start[v + 1]]
    }
}

impl Forest {
    /// Breadth-first trees, from the root first and then from each row not yet reached.
    fn new(rows: usize, incidence: &Incidence) -> Self {
        let nodes = rows + 1;
        let mut parent_arc = vec![None; nodes];
        let mut seen = vec![false; nodes];
        let mut order = Vec::with_capacity(nodes);
        for start in std::iter::once(rows).chain(0..rows) {
            if seen[start] {
                continue;
            }
            seen[start] = true;
            let first = order.len();
            order.push(start);
            let mut next = first;
            while next < order.len() {
                let v = order[next];
                next += 1;
                for &(j, w, _) in incidence.of(v) {
                    if !seen[w] {
                        seen[w] = true;
                        parent_arc[w] = Some(j);
                        order.push(w);
                    }
                }
            }
        }
        Self { order, parent_arc }
    }
}
