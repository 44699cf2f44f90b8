//! Published extremal column numbers: the largest number of pairwise non-parallel nonzero
//! columns of a rank-`r` matrix whose `r x r` minors are at most `Δ` in absolute value.
//!
//! The class "minors at most `Δ`" grows with `Δ`, so a value published for `Δ` also caps a
//! matrix for which `Δ` is only known as an upper bound.

use num_bigint::BigInt;
use schemars::JsonSchema;
use serde::Serialize;

/// For which ranks a published value is proven.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum RankCondition {
    /// Every rank `r >= 1` (and trivially `r = 0`).
    EveryRank,
    /// Only for ranks beyond some threshold that the source does not make explicit; a smaller
    /// rank may exceed the value.
    LargeRank,
}

/// A published maximum number of pairwise non-parallel nonzero columns.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, JsonSchema)]
pub struct PublishedColumnNumber {
    /// The `Δ` the value belongs to.
    pub delta: u8,
    /// The maximum, evaluated at the matrix's rank (`u128`, so no rank can overflow it).
    pub value: u128,
    /// The formula in `r`.
    pub formula: &'static str,
    /// Where it was published.
    pub source: &'static str,
    /// For which ranks it is proven.
    pub condition: RankCondition,
}

/// The published value for `Δ = delta` at rank `r`, when one is known (`Δ` in 1..=3).
pub fn published_column_number(delta: &BigInt, r: usize) -> Option<PublishedColumnNumber> {
    let r = r as u128;
    let base = r * (r + 1) / 2;
    let below = r.saturating_sub(1);
    let (d, value, formula, source, condition) = match u8::try_from(delta).ok()? {
        1 => (
            1,
            base,
            "r(r+1)/2",
            "Heller 1957, On linear systems with integral valued solutions, Pacific J. Math. 7",
            RankCondition::EveryRank,
        ),
        2 => (
            2,
            base + below,
            "r(r+1)/2 + r - 1",
            // The two sources below are quoted from memory.
            "Oxley and Walsh, 2-modular matrices, SIAM J. Discrete Math. (2022)",
            RankCondition::LargeRank,
        ),
        3 => (
            3,
            base + 2 * below,
            "r(r+1)/2 + 2(r - 1)",
            "Paat, Walsh and Xu, column number of 3-modular matrices",
            RankCondition::LargeRank,
        ),
        _ => return None,
    };
    Some(PublishedColumnNumber {
        delta: d,
        value,
        formula,
        source,
        condition,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn formulas_at_small_ranks() {
        // Heller: rank 3 gives 6 = C(4, 2), the edges of K_4 (Heller 1957).
        let one = published_column_number(&BigInt::from(1), 3).unwrap();
        assert_eq!((one.value, one.condition), (6, RankCondition::EveryRank));
        // r = 2: 3 + 1 = 4 for Δ = 2 and 3 + 2 = 5 for Δ = 3 (formulas as cited above).
        assert_eq!(
            published_column_number(&BigInt::from(2), 2).unwrap().value,
            4
        );
        let three = published_column_number(&BigInt::from(3), 2).unwrap();
        assert_eq!(
            (three.value, three.condition),
            (5, RankCondition::LargeRank)
        );
        assert_eq!(published_column_number(&BigInt::from(4), 2), None);
        assert_eq!(published_column_number(&BigInt::from(300), 2), None);
    }
}
