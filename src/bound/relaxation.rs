//! Near-optimal row multipliers from the LP relaxation, by the interior-point conic solver
//! of the `clarabel` crate (Goulart and Chen 2024, "Clarabel: an interior-point solver for
//! conic programs with quadratic objectives"), which is pure Rust and returns the dual
//! variables, unlike the simplex solvers on the registries.
//!
//! The relaxation is `min c.x + sum_i t_i, A x = b, l <= x <= u`, with `t_i >= s_k x_i + e_k`
//! for every affine piece `s_k x + e_k` of a convex cost `p_i` (a convex piecewise-linear
//! function is the largest of its pieces). In the solver's form `G z + s = h, s in K` the
//! equality rows come first; their duals `w` satisfy `q + G^T w = 0` at the optimum, so the
//! Lagrange multipliers of `A x = b` are `y = -w`. The result is a floating-point guess:
//! the bound's validity never depends on it (see `lagrangian.rs`).

use clarabel::algebra::CscMatrix;
use clarabel::solver::{
    DefaultSettingsBuilder, DefaultSolver, IPSolver, SolverStatus, SupportedConeT,
};

use super::implied::Range;
use crate::matrix::IntMatrix;
use crate::model::{ConvexCosts, Pieces};

/// Interior-point iterations allowed before the guess is given up.
const MAX_ITERATIONS: u32 = 100;

/// The LP relaxation's row multipliers for the instance `(rhs, cost + convex, ranges)` of
/// `matrix`; `None` when the solver does not reach an optimum (an infeasible or unbounded
/// relaxation, or numerical trouble).
pub(super) fn relaxation_multipliers(
    matrix: &IntMatrix,
    rhs: &[i64],
    cost: &[i64],
    convex: &ConvexCosts,
    ranges: &[Range],
) -> Option<Vec<f64>> {
    let (m, n) = (matrix.rows(), matrix.cols());
    let epigraphs: Vec<(usize, &Pieces)> = convex.iter().collect();
    let width = n + epigraphs.len();
    // Columns of G as (row, value) lists, then the right-hand side h.
    let mut columns: Vec<Vec<(usize, f64)>> = vec![Vec::new(); width];
    let mut h: Vec<f64> = Vec::new();
    for (i, &b) in rhs.iter().enumerate() {
        for (j, &a) in matrix.row(i).iter().enumerate().filter(|(_, &a)| a != 0) {
            columns[j].push((i, a as f64));
        }
        h.push(b as f64);
    }
    for (j, &(l, u)) in ranges.iter().enumerate() {
        if let Some(l) = l {
            columns[j].push((h.len(), -1.0));
            h.push(-(l as f64));
        }
        if let Some(u) = u {
            columns[j].push((h.len(), 1.0));
            h.push(u as f64);
        }
    }
    for (k, (j, pieces)) in epigraphs.iter().enumerate() {
        for (slope, intercept) in affine_pieces(pieces) {
            columns[*j].push((h.len(), slope as f64));
            columns[n + k].push((h.len(), -1.0));
            h.push(-(intercept as f64));
        }
    }
    let mut q: Vec<f64> = cost.iter().map(|&c| c as f64).collect();
    q.resize(width, 1.0);
    let g = csc(h.len(), &columns);
    let p = CscMatrix::zeros((width, width));
    let cones = [
        SupportedConeT::ZeroConeT(m),
        SupportedConeT::NonnegativeConeT(h.len() - m),
    ];
    let settings = DefaultSettingsBuilder::default()
        .verbose(false)
        .max_iter(MAX_ITERATIONS)
        .build()
        .ok()?;
    let mut solver = DefaultSolver::new(&p, &q, &g, &h, &cones, settings).ok()?;
    solver.solve();
    let solution = &solver.solution;
    match solution.status {
        SolverStatus::Solved | SolverStatus::AlmostSolved => {
            Some(solution.z[..m].iter().map(|w| -w).collect())
        }
        _ => None,
    }
}

/// The affine pieces `(s_k, e_k)` of `p`, so that `p(x) = max_k s_k x + e_k`.
fn affine_pieces(pieces: &Pieces) -> Vec<(i64, i128)> {
    let (breaks, slopes) = (pieces.breaks(), pieces.slopes());
    slopes
        .iter()
        .enumerate()
        .map(|(k, &s)| {
            // Piece k passes through the break at its left (the first break for piece 0).
            let anchor = breaks.get(k.saturating_sub(1)).copied().unwrap_or(0);
            (s, pieces.value(anchor) - i128::from(s) * i128::from(anchor))
        })
        .collect()
}

/// The compressed-column matrix with `rows` rows and these columns.
fn csc(rows: usize, columns: &[Vec<(usize, f64)>]) -> CscMatrix<f64> {
    let mut colptr = Vec::with_capacity(columns.len() + 1);
    let (mut rowval, mut nzval) = (Vec::new(), Vec::new());
    colptr.push(0);
    for column in columns {
        for &(r, v) in column {
            rowval.push(r);
            nzval.push(v);
        }
        colptr.push(rowval.len());
    }
    CscMatrix::new(rows, columns.len(), colptr, rowval, nzval)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_row_multiplier_is_the_cheaper_cost() {
        // min 3 x1 + 5 x2, x1 + x2 = 4, 0 <= x <= 10: the LP dual is y = 3 (by hand).
        let a = IntMatrix::from_rows(&[vec![1, 1]]).unwrap();
        let ranges = [(Some(0), Some(10)); 2];
        let y = relaxation_multipliers(&a, &[4], &[3, 5], &ConvexCosts::default(), &ranges);
        let y = y.expect("the relaxation has an optimum");
        assert!((y[0] - 3.0).abs() < 1e-6, "{y:?}");
    }

    #[test]
    fn convex_pieces_pass_through_their_breaks() {
        // Slopes 1, 4, 6 with breaks 3, 5: p(3) = 3, p(5) = 11.
        let pieces = Pieces::new(vec![3, 5], vec![1, 4, 6]).unwrap();
        assert_eq!(affine_pieces(&pieces), [(1, 0), (4, -9), (6, -19)]);
        let p = |x: i64| {
            affine_pieces(&pieces)
                .iter()
                .map(|&(s, e)| i128::from(s) * i128::from(x) + e)
                .max()
        };
        for x in -4..9 {
            assert_eq!(p(x), Some(pieces.value(x)), "x = {x}");
        }
    }
}
