//! Deciding whether a matrix is a network matrix up to row signs, and finding the signs.
//!
//! `A` is accepted when every entry is `-1`, `0` or `1`, every column has at most two
//! nonzeros, and some choice of a sign `s_i = ±1` per row makes every column with two
//! nonzeros have one `+1` and one `-1` (Schrijver, "Combinatorial Optimization", 2003, §13.2:
//! such a matrix, with the implicit root row, is the node-arc incidence matrix of a directed
//! graph). The signs are a 2-colouring problem over the rows: a column with two equal entries
//! asks for opposite signs of its rows, a column with opposite entries for equal ones. A
//! union-find with the parity to the representative (Tarjan 1975) decides it column by
//! column; the first column that closes an odd cycle is refused together with the columns of
//! that cycle.
//!
//! A zero column is accepted as a loop at the root: a variable in no row, whose optimum
//! depends on its cost and bounds alone. Within each connected set of rows, the smallest row
//! gets sign `+1`.

use std::fmt;

use super::graph::{ArcEnds, Network};
use crate::matrix::IntMatrix;

/// Why a matrix is no network matrix; each names the first offending column in column order.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum NotNetwork {
    /// An entry other than `-1`, `0` or `1`.
    Entry {
        /// The column.
        column: usize,
        /// The row of the entry.
        row: usize,
        /// The entry.
        value: i64,
    },
    /// A column with more than two nonzeros: an arc has two ends.
    TooManyNonzeros {
        /// The column.
        column: usize,
        /// The rows of its nonzeros.
        rows: Vec<usize>,
    },
    /// The columns form an odd cycle over the rows, so `row` would need both signs.
    BothWays {
        /// The row that cannot be signed.
        row: usize,
        /// The columns of the odd cycle; the last one is the column that closed it.
        columns: Vec<usize>,
    },
}

impl fmt::Display for NotNetwork {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            NotNetwork::Entry { column, row, value } => write!(
                f,
                "column {column} has an entry {value} (row {row}); a network matrix has entries -1, 0 and 1 only"
            ),
            NotNetwork::TooManyNonzeros { column, rows } => write!(
                f,
                "column {column} has {} nonzeros (rows {}); a network column has at most two",
                rows.len(),
                list(rows)
            ),
            NotNetwork::BothWays { row, columns } => write!(
                f,
                "columns {} need row {row} both ways: no signs of the rows make each of them one +1 and one -1",
                list(columns)
            ),
        }
    }
}

/// `2`, `2 and 5`, `2, 3 and 5`.
fn list(items: &[usize]) -> String {
    match items {
        [] => String::new(),
        [only] => only.to_string(),
        [init @ .., last] => {
            let init: Vec<String> = init.iter().map(usize::to_string).collect();
            format!("{} and {last}", init.join(", "))
        }
    }
}

/// Union-find over the rows with the parity of each row's sign relative to its parent.
struct Parity {
    parent: Vec<usize>,
    /// `true` when the row's sign is opposite to its parent's.
    flip: Vec<bool>,
    /// The columns that joined two sets, per row: the forest that explains a conflict.
    joins: Vec<Vec<(usize, usize)>>,
}

impl Parity {
    fn new(rows: usize) -> Self {
        Self {
            parent: (0..rows).collect(),
            flip: vec![false; rows],
            joins: vec![Vec::new(); rows],
        }
    }

    /// The representative of `i` and whether `i`'s sign is opposite to it; compresses the
    /// path, keeping each row's parity now relative to the representative.
    fn find(&mut self, i: usize) -> (usize, bool) {
        let mut path = Vec::new();
        let mut v = i;
        while self.parent[v] != v {
            path.push(v);
            v = self.parent[v];
        }
        let mut parity = false;
        for &w in path.iter().rev() {
            parity ^= self.flip[w];
            self.flip[w] = parity;
            self.parent[w] = v;
        }
        (v, parity)
    }

    /// Records that rows `a` and `b` differ in sign iff `opposite`; on a contradiction
    /// returns the columns of the joins that connect `a` to `b`.
    fn relate(
        &mut self,
        a: usize,
        b: usize,
        opposite: bool,
        column: usize,
    ) -> Result<(), Vec<usize>> {
        let (ra, fa) = self.find(a);
        let (rb, fb) = self.find(b);
        if ra == rb {
            return if fa ^ fb == opposite {
                Ok(())
            } else {
                Err(self.path(a, b))
            };
        }
        self.parent[rb] = ra;
        self.flip[rb] = fa ^ fb ^ opposite;
        self.joins[a].push((b, column));
        self.joins[b].push((a, column));
        Ok(())
    }

    /// The columns on the forest path from `a` to `b` (breadth-first over the joins).
    fn path(&self, a: usize, b: usize) -> Vec<usize> {
        let mut came = vec![None; self.parent.len()];
        let mut queue = std::collections::VecDeque::from([a]);
        came[a] = Some((a, usize::MAX));
        while let Some(v) = queue.pop_front() {
            if v == b {
                break;
            }
            for &(w, column) in &self.joins[v] {
                if came[w].is_none() {
                    came[w] = Some((v, column));
                    queue.push_back(w);
                }
            }
        }
        let mut columns = Vec::new();
        let mut v = b;
        while v != a {
            let (from, column) = came[v].expect("a and b are in one tree of the joins");
            columns.push(column);
            v = from;
        }
        columns.reverse();
        columns
    }

    /// Per row, `+1` or `-1`, with the smallest row of every set at `+1`.
    fn signs(&mut self) -> Vec<i64> {
        let rows = self.parent.len();
        let mut first_flip: Vec<Option<bool>> = vec![None; rows];
        (0..rows)
            .map(|i| {
                let (root, flip) = self.find(i);
                let base = *first_flip[root].get_or_insert(flip);
                if flip == base {
                    1
                } else {
                    -1
                }
            })
            .collect()
    }
}

impl Network {
    /// The network of `a`, or the first reason (in column order) why `a` is none.
    pub fn detect(a: &IntMatrix) -> Result<Network, NotNetwork> {
        let (rows, cols) = (a.rows(), a.cols());
        let mut parity = Parity::new(rows);
        let mut supports = Vec::with_capacity(cols);
        for column in 0..cols {
            let mut support = Vec::with_capacity(2);
            for row in 0..rows {
                let value = a.get(row, column);
                if value == 0 {
                    continue;
                }
                if value.abs() != 1 {
                    return Err(NotNetwork::Entry { column, row, value });
                }
                support.push((row, value));
            }
            if support.len() > 2 {
                let rows = support.iter().map(|&(r, _)| r).collect();
                return Err(NotNetwork::TooManyNonzeros { column, rows });
            }
            if let [(r1, v1), (r2, v2)] = support[..] {
                parity
                    .relate(r1, r2, v1 == v2, column)
                    .map_err(|mut columns| {
                        columns.push(column);
                        NotNetwork::BothWays { row: r2, columns }
                    })?;
            }
            supports.push(support);
        }
        let signs = parity.signs();
        let root = rows;
        let arcs = supports
            .iter()
            .map(|support| {
                let (mut tail, mut head) = (root, root);
                for &(row, value) in support {
                    if value * signs[row] == 1 {
                        tail = row;
                    } else {
                        head = row;
                    }
                }
                ArcEnds { tail, head }
            })
            .collect();
        Ok(Network::new(rows, arcs, signs))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn matrix(rows: &[&[i64]]) -> IntMatrix {
        IntMatrix::from_rows(&rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap()
    }

    #[test]
    fn a_transport_matrix_is_signed_depots_plus_zones_minus() {
        // Two depots (rows 0, 1), two zones (rows 2, 3), lanes d0z0, d0z1, d1z0, then a kept
        // column for depot 1 and a zero column.
        let a = matrix(&[
            &[1, 1, 0, 0, 0],
            &[0, 0, 1, 1, 0],
            &[1, 0, 1, 0, 0],
            &[0, 1, 0, 0, 0],
        ]);
        let net = Network::detect(&a).unwrap();
        assert_eq!(net.row_signs(), &[1, 1, -1, -1]);
        assert_eq!(net.arcs()[0], ArcEnds { tail: 0, head: 2 });
        assert_eq!(net.arcs()[3], ArcEnds { tail: 1, head: 4 });
        assert!(net.arcs()[4].is_loop());
        assert_eq!(net.root(), 4);
    }

    #[test]
    fn the_first_bad_column_is_named() {
        let a = matrix(&[&[1, 1, 1], &[1, 2, 1], &[0, 1, 1]]);
        let err = Network::detect(&a).unwrap_err();
        assert_eq!(
            err,
            NotNetwork::Entry {
                column: 1,
                row: 1,
                value: 2
            }
        );
        assert_eq!(
            err.to_string(),
            "column 1 has an entry 2 (row 1); a network matrix has entries -1, 0 and 1 only"
        );
        let a = matrix(&[&[1, 1], &[0, -1], &[0, 1]]);
        assert_eq!(
            Network::detect(&a).unwrap_err().to_string(),
            "column 1 has 3 nonzeros (rows 0, 1 and 2); a network column has at most two"
        );
    }

    #[test]
    fn an_odd_cycle_over_the_rows_names_its_columns() {
        // Columns 0 and 1 make rows 0, 1 and 1, 2 opposite; column 2 asks rows 0, 2 opposite
        // too, but they are equal by then.
        let a = matrix(&[&[1, 0, 1], &[1, 1, 0], &[0, 1, 1]]);
        let err = Network::detect(&a).unwrap_err();
        assert_eq!(
            err,
            NotNetwork::BothWays {
                row: 2,
                columns: vec![0, 1, 2]
            }
        );
        assert!(err
            .to_string()
            .starts_with("columns 0, 1 and 2 need row 2 both ways"));
    }
}
