//! `Δ`: the largest absolute `r x r` minor of the full-row-rank version `B` of `A`.
//!
//! Exact when the number of column subsets to enumerate stays within a limit; otherwise
//! Hadamard's inequality gives a labelled upper bound. Two reductions keep the enumeration
//! small without changing the maximum: zero columns lie in no nonzero minor, and of a parallel
//! class `{t_1 p, t_2 p, ...}` a nonzero minor uses at most one member, whose minor is `t_k`
//! times the one with `p`, so only the member with the largest `|t_k|` can attain the maximum.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{Signed, Zero};
use schemars::JsonSchema;
use serde::Serialize;

use super::columns::Representative;
use super::minors::{binomial, minor};
use crate::matrix::IntMatrix;

/// The value of `Δ`, or an upper bound on it when enumeration was too expensive.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, JsonSchema)]
#[serde(tag = "kind", content = "value", rename_all = "snake_case")]
pub enum Delta {
    /// `Δ` itself, from every maximal minor.
    Exact(
        #[serde(serialize_with = "super::decimal::serialize")]
        #[schemars(with = "crate::trace::Decimal")]
        BigInt,
    ),
    /// `Δ <= value` by Hadamard's inequality: the floor of the square root of the smaller of
    /// the product of the `r` largest squared column norms and the product of the squared row
    /// norms of `B` (one column per parallel class).
    UpperBound(
        #[serde(serialize_with = "super::decimal::serialize")]
        #[schemars(with = "crate::trace::Decimal")]
        BigInt,
    ),
}

impl Delta {
    /// The number held: `Δ` or its upper bound. Bounds derived from it stay valid either way.
    pub fn value(&self) -> &BigInt {
        match self {
            Delta::Exact(v) | Delta::UpperBound(v) => v,
        }
    }

    /// Whether the value is `Δ` itself.
    pub fn is_exact(&self) -> bool {
        matches!(self, Delta::Exact(_))
    }
}

/// What enumerating the maximal minors of `B` over a set of columns found.
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct MinorSummary {
    /// `Δ` or a bound.
    pub delta: Delta,
    /// Number of minors evaluated (0 when only the bound was computed).
    pub evaluated: u64,
    /// The gcd of all maximal minors over the columns (exact case only).
    pub gcd: Option<BigInt>,
    /// Whether all nonzero maximal minors share one absolute value (exact case only).
    pub equal_abs: Option<bool>,
}

impl MinorSummary {
    /// The summary for a totally unimodular matrix of positive rank, known without
    /// enumeration: every maximal minor is 0 or ±1 and one is nonzero.
    pub(crate) fn totally_unimodular() -> Self {
        Self {
            delta: Delta::Exact(BigInt::from(1)),
            evaluated: 0,
            gcd: Some(BigInt::from(1)),
            equal_abs: Some(true),
        }
    }
}

/// Enumerates the `r x r` minors of `b` (`r = b.rows()`, full row rank) over one
/// representative column per parallel class, when there are at most `limit` column subsets;
/// otherwise bounds `Δ`. The gcd is that of the minors over *all* columns: a subset of
/// classes contributes its representatives' minor divided by the product of their spreads.
pub(crate) fn maximal_minors(b: &IntMatrix, reps: &[Representative], limit: u64) -> MinorSummary {
    let r = b.rows();
    let cols: Vec<usize> = reps.iter().map(|rep| rep.col).collect();
    let subsets = binomial(cols.len(), r);
    if subsets > u128::from(limit) {
        return MinorSummary {
            delta: Delta::UpperBound(hadamard_bound(b, &cols)),
            evaluated: 0,
            gcd: None,
            equal_abs: None,
        };
    }
    let rows: Vec<usize> = (0..r).collect();
    let (mut max, mut gcd) = (BigInt::zero(), BigInt::zero());
    let mut first_abs: Option<BigInt> = None;
    let mut equal = true;
    for subset in itertools::Itertools::combinations(0..reps.len(), r) {
        let chosen: Vec<usize> = subset.iter().map(|&k| reps[k].col).collect();
        let d = minor(b, &rows, &chosen).abs();
        if d.is_zero() {
            continue;
        }
        let spread: BigInt = subset
            .iter()
            .map(|&k| BigInt::from(reps[k].spread))
            .product();
        gcd = gcd.gcd(&(&d / spread));
        match &first_abs {
            Some(f) => equal &= *f == d,
            None => first_abs = Some(d.clone()),
        }
        if d > max {
            max = d;
        }
    }
    MinorSummary {
        gcd: Some(gcd),
        delta: Delta::Exact(max),
        evaluated: u64::try_from(subsets).unwrap_or(u64::MAX),
        equal_abs: Some(equal),
    }
}

/// Hadamard's inequality `|det M| <= prod ||column_k||_2` (and the same over rows), applied to
/// every `r x r` submatrix of `b` on the columns `cols`: the bound is the floor of the square
/// root of the smaller of (a) the product of the `r` largest squared column norms and (b) the
/// product of the squared row norms, both of `b` restricted to `cols`. At least 1 when `r >= 1`
/// and `b` has full row rank; 1 when `r = 0`.
pub(crate) fn hadamard_bound(b: &IntMatrix, cols: &[usize]) -> BigInt {
    let square = |v: i64| BigInt::from(v) * BigInt::from(v);
    let mut col_norms: Vec<BigInt> = cols
        .iter()
        .map(|&j| (0..b.rows()).map(|i| square(b.get(i, j))).sum())
        .collect();
    col_norms.sort_unstable_by(|x, y| y.cmp(x));
    let by_cols: BigInt = col_norms.iter().take(b.rows()).product();
    let by_rows: BigInt = (0..b.rows())
        .map(|i| cols.iter().map(|&j| square(b.get(i, j))).sum::<BigInt>())
        .product();
    by_cols.min(by_rows).sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_traits::One;

    fn plain(cols: &[usize]) -> Vec<Representative> {
        cols.iter()
            .map(|&col| Representative { col, spread: 1 })
            .collect()
    }

    fn m(rows: &[&[i64]]) -> IntMatrix {
        IntMatrix::from_rows(&rows.iter().map(|r| r.to_vec()).collect::<Vec<_>>()).unwrap()
    }

    #[test]
    fn twisted_cubic_minors() {
        // [[1,1,1,1],[0,1,2,3]]: the 2 x 2 minors are j - i for columns i < j (by hand):
        // 1, 2, 3, 1, 2, 1, so Δ = 3 and their gcd is 1.
        let b = m(&[&[1, 1, 1, 1], &[0, 1, 2, 3]]);
        let s = maximal_minors(&b, &plain(&[0, 1, 2, 3]), 100);
        assert_eq!(s.delta, Delta::Exact(BigInt::from(3)));
        assert_eq!(s.evaluated, 6);
        assert_eq!(s.gcd, Some(BigInt::one()));
        assert_eq!(s.equal_abs, Some(false));
    }

    #[test]
    fn over_the_limit_gives_a_hadamard_bound() {
        // Column norms^2: 1, 2, 5, 10; the two largest give 50. Row norms^2: 4 and 14 give 56.
        // floor(sqrt(50)) = 7 >= Δ = 3.
        let b = m(&[&[1, 1, 1, 1], &[0, 1, 2, 3]]);
        let s = maximal_minors(&b, &plain(&[0, 1, 2, 3]), 5);
        assert_eq!(s.delta, Delta::UpperBound(BigInt::from(7)));
        assert_eq!((s.evaluated, s.gcd, s.equal_abs), (0, None, None));
    }

    #[test]
    fn gcd_counts_every_member_of_a_parallel_class() {
        // Columns (2,0), (4,0), (0,1): minors 2, 4 and 0 (by hand), so Δ = 4 and gcd 2,
        // although only the representative (4,0) is enumerated.
        let b = m(&[&[2, 4, 0], &[0, 0, 1]]);
        let reps = crate::analysis::columns::ColumnClasses::of(&b).representatives();
        let s = maximal_minors(&b, &reps, 10);
        assert_eq!(s.delta, Delta::Exact(BigInt::from(4)));
        assert_eq!(s.gcd, Some(BigInt::from(2)));
        assert_eq!(s.evaluated, 1);
    }

    #[test]
    fn rank_zero_has_the_empty_minor() {
        // The 0 x 0 determinant is 1 by convention.
        let b = IntMatrix::zeros(0, 3);
        assert_eq!(
            maximal_minors(&b, &plain(&[]), 10).delta,
            Delta::Exact(BigInt::one())
        );
        assert_eq!(hadamard_bound(&b, &[]), BigInt::one());
    }
}
