//! Bounds on the ℓ1 norms of Graver basis elements, and the proximity bound.
//!
//! With `n` variables, rank `r`, column number `h` and `Δ` as in [`super::Delta`]:
//! - every Graver element is a conformal sum `sum λ_i c_i` of at most `n - r` circuits with
//!   `0 <= λ_i < 1`, and a circuit has at most `r + 1` nonzero entries, each an `r x r` minor
//!   divided by a common factor, so `||g||_1 <= (n - r)(r + 1) Δ`;
//! - merging columns equal up to sign changes no nontrivial Graver element's norm (the
//!   trivial ones have norm 2), and zero columns give unit vectors, which gives
//!   `||g||_1 <= max(2, (h - r)(r + 1) Δ)`;
//! - Steinitz-type bound `||g||_1 <= (2 r ||B||_inf + 1)^r` for the `r x n` full-row-rank
//!   version `B` (Eisenbrand, Hunkenschröder, Klein, Koutecký, Levin, Onn, "An algorithmic
//!   theory of integer programming", 2019, Lemma 2; from memory).
//!
//! - when `A` is unimodular its Graver basis is its set of circuits (Sturmfels, "Gröbner
//!   Bases and Convex Polytopes", 1996, Prop. 8.11), whose entries are then `0, ±1` on at
//!   most `r + 1` variables, so `||g||_1 <= max(2, r + 1)`.
//!
//! When `Δ` is only an upper bound the `Δ`-based bounds remain valid upper bounds.

use num_bigint::BigInt;
use schemars::JsonSchema;
use serde::Serialize;

/// The bounds, exactly, as big integers (serialised as decimal strings).
#[derive(Clone, Debug, PartialEq, Eq, Serialize, JsonSchema)]
pub struct NormBounds {
    /// `(n - r)(r + 1) Δ`.
    #[serde(serialize_with = "super::decimal::serialize")]
    #[schemars(with = "crate::trace::Decimal")]
    pub by_variables: BigInt,
    /// `max(2, (h - r)(r + 1) Δ)`.
    #[serde(serialize_with = "super::decimal::serialize")]
    #[schemars(with = "crate::trace::Decimal")]
    pub by_column_number: BigInt,
    /// `(2 r ||B||_inf + 1)^r`.
    #[serde(serialize_with = "super::decimal::serialize")]
    #[schemars(with = "crate::trace::Decimal")]
    pub steinitz: BigInt,
    /// `max(2, r + 1)` when `A` is unimodular, else absent.
    #[serde(serialize_with = "super::decimal::serialize_option")]
    #[schemars(with = "Option<crate::trace::Decimal>")]
    pub unimodular: Option<BigInt>,
    /// `n Δ`: some optimal integer point lies within this ∞-distance of an optimal LP
    /// solution (Cook, Gerards, Schrijver, Tardos 1986, "Sensitivity theorems in integer
    /// linear programming", Math. Programming 34); the circuit form of their proof needs only
    /// circuit entries bounded by `Δ`, which holds for the maximal-minor `Δ` used here.
    #[serde(serialize_with = "super::decimal::serialize")]
    #[schemars(with = "crate::trace::Decimal")]
    pub proximity: BigInt,
}

/// The figures the bounds are computed from.
#[derive(Clone, Copy, Debug)]
pub(crate) struct BoundInputs<'a> {
    /// Number of variables `n`.
    pub n: usize,
    /// Rank `r`.
    pub r: usize,
    /// Column number `h`.
    pub h: usize,
    /// `Δ` or an upper bound on it.
    pub delta: &'a BigInt,
    /// Largest absolute entry of `B`.
    pub max_abs: u64,
    /// Whether `A` is known to be unimodular.
    pub unimodular: bool,
}

impl NormBounds {
    /// All bounds from the given figures; requires `r <= h <= n`.
    pub(crate) fn new(f: BoundInputs<'_>) -> Self {
        let big = |v: usize| BigInt::from(v);
        let per_circuit = big(f.r + 1) * f.delta;
        let by_column_number = (big(f.h - f.r) * &per_circuit).max(BigInt::from(2));
        let base = BigInt::from(2u8) * big(f.r) * BigInt::from(f.max_abs) + 1u8;
        Self {
            by_variables: big(f.n - f.r) * &per_circuit,
            by_column_number,
            steinitz: num_traits::pow(base, f.r),
            unimodular: f.unimodular.then(|| big(f.r + 1).max(BigInt::from(2))),
            proximity: big(f.n) * f.delta,
        }
    }

    /// The smallest of the Graver norm bounds.
    pub fn smallest(&self) -> &BigInt {
        [&self.by_variables, &self.by_column_number, &self.steinitz]
            .into_iter()
            .chain(&self.unimodular)
            .min()
            .unwrap_or(&self.by_column_number)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn twisted_cubic_bounds() {
        // n = 4, r = 2, h = 4, Δ = 3, ||A||_inf = 3: 2*3*3 = 18, 18, (12 + 1)^2 = 169, 12.
        let delta = BigInt::from(3);
        let b = NormBounds::new(BoundInputs {
            n: 4,
            r: 2,
            h: 4,
            delta: &delta,
            max_abs: 3,
            unimodular: false,
        });
        assert_eq!(b.by_variables, BigInt::from(18));
        assert_eq!(b.by_column_number, BigInt::from(18));
        assert_eq!(b.steinitz, BigInt::from(169));
        assert_eq!(b.proximity, BigInt::from(12));
        assert_eq!(b.smallest(), &BigInt::from(18));
    }

    #[test]
    fn merged_duplicates_and_small_steinitz() {
        // [1 1 1]: n = 3, r = 1, h = 1, Δ = 1: (3-1)*2 = 4, max(2, 0) = 2, (2+1)^1 = 3.
        let one = BigInt::from(1);
        let b = NormBounds::new(BoundInputs {
            n: 3,
            r: 1,
            h: 1,
            delta: &one,
            max_abs: 1,
            unimodular: true,
        });
        assert_eq!(b.by_variables, BigInt::from(4));
        assert_eq!(b.by_column_number, BigInt::from(2));
        assert_eq!(b.steinitz, BigInt::from(3));
        assert_eq!(b.unimodular, Some(BigInt::from(2)));
        assert_eq!(b.smallest(), &BigInt::from(2));
    }
}
