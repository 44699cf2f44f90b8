//! Heller's bound is attained: the node-arc incidence matrix of the complete directed graph on
//! `k` nodes (one column `e_i - e_j` per pair `i < j`) has rank `k - 1`, `k(k-1)/2 = r(r+1)/2`
//! pairwise non-parallel columns, `Δ = 1` and is totally unimodular (Heller 1957, "On linear
//! systems with integral valued solutions"; incidence matrices of digraphs are totally
//! unimodular: Schrijver 1986, "Theory of Linear and Integer Programming", §19.3, after
//! Poincaré).

use kernstep::analysis::{AnalysisOptions, Decision, Delta, MatrixAnalysis, RankCondition};
use kernstep::IntMatrix;
use num_bigint::BigInt;

fn complete_digraph_incidence(k: usize) -> IntMatrix {
    let pairs: Vec<(usize, usize)> = (0..k)
        .flat_map(|i| (i + 1..k).map(move |j| (i, j)))
        .collect();
    let mut a = IntMatrix::zeros(k, pairs.len());
    for (c, &(i, j)) in pairs.iter().enumerate() {
        a.set(i, c, 1);
        a.set(j, c, -1);
    }
    a
}

#[test]
fn complete_digraphs_attain_hellers_bound() {
    for k in 3..=6 {
        let a = MatrixAnalysis::of(&complete_digraph_incidence(k), &AnalysisOptions::new());
        let r = k - 1;
        assert_eq!(a.rank, r, "K_{k}: rank k - 1");
        assert_eq!(a.column_number, k * (k - 1) / 2, "K_{k}: column number");
        assert_eq!(
            a.column_number_parallel,
            r * (r + 1) / 2,
            "K_{k}: Heller's value"
        );
        assert_eq!(a.delta, Delta::Exact(BigInt::from(1)), "K_{k}: Δ");
        assert_eq!(a.unimodular, Decision::Yes, "K_{k}: unimodular");
        assert_eq!(a.totally_unimodular, Decision::Yes, "K_{k}: TU");
        let published = a.published_column_number.as_ref().expect("Heller's value");
        assert_eq!(published.value, (r * (r + 1) / 2) as u128, "K_{k}");
        assert_eq!(published.condition, RankCondition::EveryRank);
        assert_eq!(a.within_published_column_number, Some(true), "K_{k}");
    }
}

#[test]
fn one_more_column_breaks_unimodularity() {
    // Adding e_0 + e_1 (not a difference of unit vectors) to the K_4 incidence matrix gives
    // the 3 x 3 minor on columns (e_0 - e_2, e_1 - e_2, e_0 + e_1) equal to -2 (by
    // expansion), so total unimodularity fails; the rank becomes 4.
    let base = complete_digraph_incidence(4);
    let mut rows = base.to_rows();
    for (i, row) in rows.iter_mut().enumerate() {
        row.push(i64::from(i < 2));
    }
    let a = MatrixAnalysis::of(
        &IntMatrix::from_rows(&rows).unwrap(),
        &AnalysisOptions::new(),
    );
    assert_eq!(a.rank, 4);
    assert_eq!(a.totally_unimodular, Decision::No);
}
