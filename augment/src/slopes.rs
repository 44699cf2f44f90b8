//! The rates `c.g` of a linear objective along every move, and the moves' improving signs,
//! computed once per solve.
//!
//! With linear costs a move improves only in the sign where `c.g < 0` (`+` when `c.g < 0`, `-`
//! when `c.g > 0`, neither when `c.g = 0`), whatever the point. So phase II fixes, once per
//! solve, every move's improving sign; each scan's first pass then tests the sign masks of
//! that sign (one word per move with at most 32 variables, picked from the set's masks by the
//! sign without branches: is the improving sign blocked by a bound?) without looking at the
//! rate or the move again. A move with rate 0 gets full masks, which every bound blocks (at a
//! point on no bound the scan looks at it and finds the rate 0).
//!
//! `|c.g| <= max_i |c_i| * ||g||_1`; when that bound fits in `i16` or `i32` and the moves have
//! a narrow column-major copy, the rates are column sums `sum_i c_i * column_i` in lanes of that
//! width, which the compiler vectorises (nothing can overflow: every partial sum obeys the
//! bound). When the bound fits in `i64` they are plain `i64` sums per move; otherwise every
//! rate is computed in checked `i128`, and an overflow is an error.

use std::ops::{Add, Mul};

use crate::error::{overflow, Result};
use crate::moves::MoveSet;

/// `c.g` for every move of one set, and the moves' improving signs.
pub(crate) struct Slopes {
    rates: Rates,
    /// Per move the sign of its rate: `-1` (improving with `+`), `1` (with `-`) or `0`.
    signs: Vec<i8>,
}

/// The rates in the narrowest type their bound allows.
enum Rates {
    I16(Vec<i16>),
    I32(Vec<i32>),
    I64(Vec<i64>),
    I128(Vec<i128>),
}

impl Slopes {
    /// The rates of `costs` along `moves`; fails only when a rate overflows `i128`.
    pub(crate) fn new(costs: &[i64], moves: &MoveSet) -> Result<Self> {
        let rates = rates(costs, moves)?;
        let signs = match &rates {
            Rates::I16(r) => signs(r),
            Rates::I32(r) => signs(r),
            Rates::I64(r) => signs(r),
            Rates::I128(r) => signs(r),
        };
        Ok(Self { rates, signs })
    }

    /// `c.g` for move `index`.
    #[inline]
    pub(crate) fn get(&self, index: usize) -> i128 {
        match &self.rates {
            Rates::I16(r) => r[index].into(),
            Rates::I32(r) => r[index].into(),
            Rates::I64(r) => r[index].into(),
            Rates::I128(r) => r[index],
        }
    }

    /// Per move the sign of its rate: `-1` (improving with `+`), `1` (with `-`) or `0`.
    pub(crate) fn signs(&self) -> &[i8] {
        &self.signs
    }
}

/// The mask of a move's improving sign given its rate's `sign`: `own` (the mask of `+`) when it
/// is `-1`, `other` (that of `-`) when it is `1`, all ones when it is 0 (two conditional moves).
#[inline]
pub(crate) fn improving_mask(sign: i8, own: u64, other: u64) -> u64 {
    let signed = if sign < 0 { own } else { other };
    if sign == 0 {
        u64::MAX
    } else {
        signed
    }
}

/// Per move the sign of its rate: `-1`, `0` or `1` (compiled for the wider vector units too).
#[multiversion::multiversion(targets("x86_64+avx512f+avx512bw+avx512vl", "x86_64+avx2"))]
fn signs<T: Rate>(rates: &[T]) -> Vec<i8> {
    rates.iter().map(|&r| r.sign()).collect()
}

/// A stored rate type, whose sign the masks are built from (one comparison with the literal 0
/// per type: a generic `Ord` bound measured about 2% slower on a whole batch).
trait Rate: Copy {
    /// `-1`, `0` or `1`.
    fn sign(self) -> i8;
}

macro_rules! rate_sign {
    ($($t:ty),*) => {$(
        impl Rate for $t {
            #[inline]
            fn sign(self) -> i8 {
                i8::from(self > 0) - i8::from(self < 0)
            }
        }
    )*};
}

rate_sign!(i16, i32, i64, i128);

/// The rates of `costs` along `moves`, by the cheapest exact path.
fn rates(costs: &[i64], moves: &MoveSet) -> Result<Rates> {
    let widest = costs.iter().map(|c| c.unsigned_abs()).max().unwrap_or(0);
    let bound = u128::from(widest) * u128::from(moves.max_norm().unsigned_abs());
    if bound <= i16::MAX as u128 {
        if let Some(rates) = column_rates(costs, moves) {
            return Ok(Rates::I16(rates));
        }
    }
    if bound <= i32::MAX as u128 {
        if let Some(rates) = column_rates(costs, moves) {
            return Ok(Rates::I32(rates));
        }
    }
    if bound <= i64::MAX as u128 {
        return Ok(Rates::I64(
            (0..moves.len())
                .map(|index| moves.support(index).iter().map(|(i, v)| costs[i] * v).sum())
                .collect(),
        ));
    }
    Ok(Rates::I128(
        (0..moves.len())
            .map(|index| checked_rate(costs, moves, index))
            .collect::<Result<_>>()?,
    ))
}

/// The rates as column sums over the narrow column-major copy of `moves`, in lanes of `T`;
/// the caller has checked that `max_i |c_i| * max ||g||_1` fits in `T`. `None` when the set
/// has no narrow copy.
fn column_rates<T>(costs: &[i64], moves: &MoveSet) -> Option<Vec<T>>
where
    T: Copy + Default + Add<Output = T> + Mul<Output = T> + From<i8> + TryFrom<i64>,
{
    // Blocks of moves, every column's share of a block before the next block, so that the
    // block's sums stay in the first-level cache instead of being streamed once per column.
    const BLOCK: usize = 2048;
    let mut columns = Vec::new();
    for (variable, &cost) in costs.iter().enumerate() {
        if cost != 0 {
            columns.push((moves.column(variable)?, T::try_from(cost).ok()?));
        }
    }
    let mut sums = vec![T::default(); moves.len()];
    for (block, chunk) in sums.chunks_mut(BLOCK).enumerate() {
        let at = block * BLOCK;
        for &(column, cost) in &columns {
            add_scaled(chunk, &column[at..at + chunk.len()], cost);
        }
    }
    Some(sums)
}

/// `sums += cost * column`, lane by lane: compiled for the wider vector units too and picked
/// at run time (with the mask tests of `marks.rs`, the loops a table variant spends most in).
#[multiversion::multiversion(targets("x86_64+avx512f+avx512bw+avx512vl", "x86_64+avx2"))]
fn add_scaled<T>(sums: &mut [T], column: &[i8], cost: T)
where
    T: Copy + Add<Output = T> + Mul<Output = T> + From<i8>,
{
    for (sum, &g) in sums.iter_mut().zip(column) {
        *sum = *sum + cost * T::from(g);
    }
}

/// `c.g` in checked `i128`.
fn checked_rate(costs: &[i64], moves: &MoveSet, index: usize) -> Result<i128> {
    moves.support(index).iter().try_fold(0i128, |sum, (i, v)| {
        sum.checked_add(i128::from(costs[i]) * i128::from(v))
            .ok_or(overflow("computing the cost of a move"))
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::moves::Coverage;

    fn dot(row: &[i64], costs: &[i64]) -> i128 {
        row.iter()
            .zip(costs)
            .map(|(&g, &c)| i128::from(g) * i128::from(c))
            .sum()
    }

    #[test]
    fn every_path_agrees_with_the_dot_product() {
        let rows = vec![vec![1, -2, 0], vec![0, 3, -1], vec![-4, 0, 5]];
        let wide_rows = vec![vec![1, -2, 0], vec![0, 300, -1], vec![-4, 0, 5]];
        for rows in [rows, wide_rows] {
            let moves = MoveSet::from_rows(3, &rows, Coverage::Complete).unwrap();
            for costs in [
                vec![7, -1, 2],
                vec![i64::from(i32::MAX) / 600, 1, -3],
                vec![i64::MAX / 4000, 1, -3],
                vec![i64::MIN, 0, 0],
            ] {
                let slopes = Slopes::new(&costs, &moves).unwrap();
                for (index, row) in rows.iter().enumerate() {
                    assert_eq!(
                        slopes.get(index),
                        dot(row, &costs),
                        "{costs:?} move {index}"
                    );
                }
            }
        }
    }

    /// The column sums, taken block by block, agree with the dot products over several blocks
    /// and a partial last one (rows of a linear congruential draw, common practice).
    #[test]
    fn column_sums_over_many_blocks_agree_with_the_dot_product() {
        let mut seed = 5u64;
        let mut next = || {
            seed = seed
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((seed >> 33) % 7) as i64 - 3
        };
        let rows: Vec<Vec<i64>> = (0..5000)
            .map(|_| (0..5).map(|_| next()).collect())
            .filter(|r: &Vec<i64>| r.iter().any(|&v| v != 0))
            .collect();
        let moves = MoveSet::from_rows(5, &rows, Coverage::Complete).unwrap();
        let costs = [3, -7, 0, 11, -2];
        let sums = column_rates::<i16>(&costs, &moves).unwrap();
        for (index, row) in rows.iter().enumerate() {
            assert_eq!(i128::from(sums[index]), dot(row, &costs), "move {index}");
        }
    }

    #[test]
    fn small_costs_over_narrow_moves_take_the_column_path() {
        let rows = vec![vec![1, -2, 0], vec![0, 3, -1]];
        let moves = MoveSet::from_rows(3, &rows, Coverage::Complete).unwrap();
        let costs = [i64::from(i32::MAX) / 5, -1, 2];
        assert!(column_rates::<i32>(&costs, &moves).is_some());
        let wide = MoveSet::from_rows(3, &[vec![1, 200, 0]], Coverage::Complete).unwrap();
        assert!(
            column_rates::<i32>(&costs, &wide).is_none(),
            "200 does not fit in i8"
        );
    }

    #[test]
    fn every_move_gets_the_sign_of_its_rate() {
        for width in [3, 70] {
            let row = |entries: &[(usize, i64)]| {
                let mut r = vec![0; width];
                for &(i, v) in entries {
                    r[i] = v;
                }
                r
            };
            let rows = [
                row(&[(0, 1), (width - 1, -1)]),
                row(&[(1, 1), (width - 1, 1)]),
                row(&[(0, -2), (1, 1)]),
            ];
            let moves = MoveSet::from_rows(width, &rows, Coverage::Complete).unwrap();
            let mut costs = vec![0; width];
            costs[0] = 1;
            costs[1] = 2;
            costs[width - 1] = -2;
            // Rates 3, 0 and 0: only move 0 improves, in the sign `-`.
            let slopes = Slopes::new(&costs, &moves).unwrap();
            assert_eq!(slopes.signs(), [1, 0, 0], "width {width}");
            costs[1] = 1;
            // Rates 3, -1 and -1: move 0 improves in `-`, the others in `+`.
            let slopes = Slopes::new(&costs, &moves).unwrap();
            assert_eq!(slopes.signs(), [1, -1, -1], "width {width}");
        }
    }

    #[test]
    fn the_improving_mask_follows_the_sign() {
        assert_eq!(improving_mask(-1, 0b01, 0b10), 0b01);
        assert_eq!(improving_mask(1, 0b01, 0b10), 0b10);
        assert_eq!(improving_mask(0, 0b01, 0b10), u64::MAX);
    }

    #[test]
    fn rates_beyond_i64_are_exact_in_checked_arithmetic() {
        let big = 1i64 << 62;
        let moves = MoveSet::from_rows(2, &[vec![big, big / 2]], Coverage::Complete).unwrap();
        let slopes = Slopes::new(&[i64::MAX, -3], &moves).unwrap();
        assert!(matches!(slopes.rates, Rates::I128(_)));
        let expected = i128::from(big) * i128::from(i64::MAX) - 3 * i128::from(big / 2);
        assert_eq!(slopes.get(0), expected);
    }
}
