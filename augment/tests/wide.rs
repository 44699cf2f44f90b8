//! Problems with more than 64 variables, where every sign mask of the scans spans several
//! machine words: many independent blocks `x_a + x_b + x_c = b_k` side by side.
//!
//! The Graver basis of `[1 1 1]` is its three circuits `e_i - e_j` (Sturmfels 1996, Ch. 4:
//! the Graver basis of a unimodular matrix is its set of circuits), so the basis of the block
//! matrix is the union over blocks. The oracle is independent of augmentation: per block, the
//! minimum of `c.x` over `x_a + x_b + x_c = b`, `0 <= x <= u` fills the cheapest variables
//! first (the greedy rule for a single knapsack-free equality, common practice); the block is
//! infeasible exactly when `b > u_a + u_b + u_c`.

#[path = "../../tests/proptest_cases/mod.rs"]
mod proptest_cases;
use proptest_cases::Class;

use augment::{
    certify, solve, Certificate, Coverage, MoveSet, Objective, Options, Problem, Status,
};
use proptest::prelude::*;

const BLOCK: usize = 3;

fn block_moves(blocks: usize) -> MoveSet {
    let width = BLOCK * blocks;
    let mut rows = Vec::new();
    for k in 0..blocks {
        for (i, j) in [(0, 1), (0, 2), (1, 2)] {
            let mut g = vec![0i64; width];
            g[BLOCK * k + i] = 1;
            g[BLOCK * k + j] = -1;
            rows.push(g);
        }
    }
    MoveSet::from_rows(width, &rows, Coverage::Complete).unwrap()
}

/// The greedy optimum of one block, or `None` when its box cannot hold `b`.
fn greedy(cost: &[i64], upper: &[i64], b: i64) -> Option<i64> {
    let mut order: Vec<usize> = (0..cost.len()).collect();
    order.sort_by_key(|&i| cost[i]);
    let (mut left, mut total) = (b, 0);
    for i in order {
        let take = left.min(upper[i]);
        total += take * cost[i];
        left -= take;
    }
    (left == 0).then_some(total)
}

proptest! {
    #![proptest_config(proptest_cases::config(Class::WideAugmentation))]

    #[test]
    fn block_optima_match_the_greedy_oracle_beyond_64_variables(
        blocks in 22usize..45,
        seed in prop::collection::vec((-9i64..10, 0i64..6, 0i64..13), 3 * 45),
        parallel in any::<bool>(),
        overfull in any::<bool>(),
    ) {
        let width = BLOCK * blocks;
        let cost: Vec<i64> = seed[..width].iter().map(|s| s.0).collect();
        let upper: Vec<i64> = seed[..width].iter().map(|s| s.1).collect();
        // Each block asks for at most what its box holds, except block 0 when `overfull`.
        let room = |k: usize| upper[BLOCK * k..BLOCK * (k + 1)].iter().sum::<i64>();
        let rhs: Vec<i64> = (0..blocks)
            .map(|k| match (k, overfull) {
                (0, true) => room(0) + 1,
                _ => seed[k].2 % (room(k) + 1),
            })
            .collect();
        // Start with each block's whole amount on its first variable: inside the lower
        // bounds, often above an upper bound, so phase I has work to do.
        let mut x0 = vec![0i64; width];
        for k in 0..blocks {
            x0[BLOCK * k] = rhs[k];
        }
        let problem = Problem::new(
            Objective::linear(cost.clone()),
            vec![Some(0); width],
            upper.iter().map(|&u| Some(u)).collect(),
        )
        .unwrap();
        let moves = block_moves(blocks);
        let solution = solve(&problem, &moves, &x0, &Options::default().parallel(parallel)).unwrap();
        let expected: Option<i64> = (0..blocks)
            .map(|k| {
                let r = BLOCK * k..BLOCK * (k + 1);
                greedy(&cost[r.clone()], &upper[r], rhs[k])
            })
            .sum();
        match expected {
            Some(total) => {
                prop_assert_eq!(&solution.status, &Status::Optimal);
                prop_assert_eq!(solution.objective, Some(i128::from(total)));
                prop_assert!(problem.in_box(&solution.x));
                prop_assert_eq!(
                    certify(&problem, &moves, &solution.x).unwrap(),
                    Certificate::NoImprovingMove
                );
            }
            None => {
                prop_assert!(overfull);
                prop_assert!(matches!(solution.status, Status::Infeasible(_)));
            }
        }
        prop_assert_eq!(expected.is_none(), overfull);
    }
}
