//! The rates `c.g` of a linear objective along the moves, each computed when first needed.
//!
//! A scan consults a move's rate only when a bound does not already block both of its signs;
//! on the sparse points augmentation visits that is a small share of the set (a 3x3x3
//! three-way table: about 30% of the evaluations, a truckload model: 12%), so rates are cached
//! lazily. `|c.g| <= max_i |c_i| * ||g||_1`; when that bound fits in `i64` for the widest move
//! the rates are plain `i64` sums (nothing can overflow) kept in atomic cells, so parallel
//! scans can fill the cache concurrently (both writers store the same value). Otherwise every
//! rate is computed up front in checked `i128`, and an overflow is an error.

use std::sync::atomic::{AtomicI64, Ordering};

use crate::error::{overflow, Result};
use crate::moves::MoveSet;

/// Marks a rate not computed yet; no cached rate can equal it, as `|c.g| < 2^63`.
const UNKNOWN: i64 = i64::MIN;

/// `c.g` for every move of one set. (Norms below `2^63` and costs of at most `2^63` in size keep
/// every rate below `2^126`, so the checked sums never fail in practice; the check stays.)
pub(crate) struct Slopes<'a> {
    costs: &'a [i64],
    moves: &'a MoveSet,
    cache: Cache,
}

enum Cache {
    /// Rates that fit in `i64`, filled on demand.
    Lazy(Vec<AtomicI64>),
    /// Every rate, computed with checked arithmetic.
    Eager(Vec<i128>),
}

impl<'a> Slopes<'a> {
    /// The rates of `costs` along `moves`; fails only when a rate overflows `i128`.
    pub(crate) fn new(costs: &'a [i64], moves: &'a MoveSet) -> Result<Self> {
        let widest = costs.iter().map(|c| c.unsigned_abs()).max().unwrap_or(0);
        let bound = u128::from(widest) * u128::from(moves.max_norm().unsigned_abs());
        let cache = if bound <= i64::MAX as u128 {
            Cache::Lazy((0..moves.len()).map(|_| AtomicI64::new(UNKNOWN)).collect())
        } else {
            Cache::Eager(
                (0..moves.len())
                    .map(|index| checked_rate(costs, moves, index))
                    .collect::<Result<_>>()?,
            )
        };
        Ok(Self {
            costs,
            moves,
            cache,
        })
    }

    /// `c.g` for move `index`.
    #[inline]
    pub(crate) fn get(&self, index: usize) -> i128 {
        match &self.cache {
            Cache::Eager(rates) => rates[index],
            Cache::Lazy(cells) => {
                let known = cells[index].load(Ordering::Relaxed);
                if known != UNKNOWN {
                    return i128::from(known);
                }
                let (indices, values) = self.moves.support(index);
                let rate: i64 = indices
                    .iter()
                    .zip(values)
                    .map(|(&i, &v)| self.costs[i] * v)
                    .sum();
                cells[index].store(rate, Ordering::Relaxed);
                i128::from(rate)
            }
        }
    }
}

/// `c.g` in checked `i128`.
fn checked_rate(costs: &[i64], moves: &MoveSet, index: usize) -> Result<i128> {
    let (indices, values) = moves.support(index);
    indices.iter().zip(values).try_fold(0i128, |sum, (&i, &v)| {
        sum.checked_add(i128::from(costs[i]) * i128::from(v))
            .ok_or(overflow("computing the cost of a move"))
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::moves::Coverage;

    #[test]
    fn lazy_and_eager_rates_agree_with_the_dot_product() {
        let rows = vec![vec![1, -2, 0], vec![0, 3, -1], vec![-4, 0, 5]];
        let moves = MoveSet::from_rows(3, &rows, Coverage::Complete).unwrap();
        for costs in [
            vec![7, -1, 2],
            vec![i64::MAX / 4, 1, -3],
            vec![i64::MIN, 0, 0],
        ] {
            let slopes = Slopes::new(&costs, &moves).unwrap();
            for (index, row) in rows.iter().enumerate() {
                let expected: i128 = row
                    .iter()
                    .zip(&costs)
                    .map(|(&g, &c)| i128::from(g) * i128::from(c))
                    .sum();
                assert_eq!(slopes.get(index), expected, "{costs:?} move {index}");
                assert_eq!(slopes.get(index), expected, "cached");
            }
        }
    }

    #[test]
    fn rates_beyond_i64_are_exact_in_the_eager_cache() {
        let big = 1i64 << 62;
        let moves = MoveSet::from_rows(2, &[vec![big, big / 2]], Coverage::Complete).unwrap();
        let slopes = Slopes::new(&[i64::MAX, -3], &moves).unwrap();
        assert!(matches!(slopes.cache, Cache::Eager(_)));
        let expected = i128::from(big) * i128::from(i64::MAX) - 3 * i128::from(big / 2);
        assert_eq!(slopes.get(0), expected);
    }
}
