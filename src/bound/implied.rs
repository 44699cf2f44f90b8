//! Bounds implied by the rows for every integer point of `A x = b` in the box (bound
//! propagation, Savelsbergh 1994, "Preprocessing and probing techniques for mixed integer
//! programming problems", ORSA J. Computing 6(4), section 2).
//!
//! For a row `sum_k a_k x_k = b` and one of its variables `x_j`, the other terms lie between
//! their smallest and largest values over the box, so `a_j x_j` lies in
//! `[b - max_rest, b - min_rest]`; dividing by `a_j` and rounding inwards (the points are
//! integral) gives bounds on `x_j`. Passes repeat while they tighten something, at most
//! [`PASSES`] times. Every step is exact (`i128`, checked); a tightening that would overflow is
//! skipped, which is always safe.

use num_integer::Integer;

use crate::matrix::IntMatrix;

/// At most this many propagation passes over the rows.
const PASSES: usize = 4;

/// A variable's bounds, `None` for an infinite side.
pub type Range = (Option<i64>, Option<i64>);

/// The box `lower <= x <= upper` tightened by the bounds that the rows of `matrix` with
/// right-hand side `rhs` imply for every integer point of the rows inside it.
pub fn implied_box(
    matrix: &IntMatrix,
    rhs: &[i64],
    lower: &[Option<i64>],
    upper: &[Option<i64>],
) -> Vec<Range> {
    let mut ranges: Vec<Range> = lower.iter().copied().zip(upper.iter().copied()).collect();
    for _ in 0..PASSES {
        let mut changed = false;
        for (i, &b) in rhs.iter().enumerate() {
            changed |= tighten_row(matrix.row(i), i128::from(b), &mut ranges);
        }
        if !changed {
            break;
        }
    }
    ranges
}

/// The smallest and largest value of `a x` over `range`, `None` for an infinite one.
fn term_extremes(a: i64, (l, u): Range) -> (Option<i128>, Option<i128>) {
    let (a, l, u) = (i128::from(a), l.map(i128::from), u.map(i128::from));
    if a >= 0 {
        (l.map(|l| a * l), u.map(|u| a * u))
    } else {
        (u.map(|u| a * u), l.map(|l| a * l))
    }
}

/// The sum of the finite extremes with the number of infinite ones.
#[derive(Default)]
struct Activity {
    finite: i128,
    infinite: usize,
}

impl Activity {
    fn add(&mut self, value: Option<i128>) -> Option<()> {
        match value {
            Some(v) => self.finite = self.finite.checked_add(v)?,
            None => self.infinite += 1,
        }
        Some(())
    }

    /// The activity without one term's extreme `own`: finite only when every other term is.
    fn without(&self, own: Option<i128>) -> Option<i128> {
        match own {
            Some(v) if self.infinite == 0 => self.finite.checked_sub(v),
            None if self.infinite == 1 => Some(self.finite),
            _ => None,
        }
    }
}

/// One row's tightenings; true when a bound moved.
fn tighten_row(row: &[i64], b: i128, ranges: &mut [Range]) -> bool {
    let (mut least, mut most) = (Activity::default(), Activity::default());
    for (&a, &range) in row.iter().zip(ranges.iter()).filter(|(&a, _)| a != 0) {
        let (low, high) = term_extremes(a, range);
        if least.add(low).is_none() || most.add(high).is_none() {
            return false;
        }
    }
    let mut changed = false;
    for (j, &a) in row.iter().enumerate().filter(|(_, &a)| a != 0) {
        let (low, high) = term_extremes(a, ranges[j]);
        // a x_j lies in [b - most_rest, b - least_rest].
        let top = least.without(low).and_then(|rest| b.checked_sub(rest));
        let bottom = most.without(high).and_then(|rest| b.checked_sub(rest));
        let a = i128::from(a);
        let ceil = |v: i128| Integer::div_ceil(&v, &a);
        let floor = |v: i128| Integer::div_floor(&v, &a);
        let (new_lower, new_upper) = if a > 0 {
            (bottom.map(ceil), top.map(floor))
        } else {
            (top.map(ceil), bottom.map(floor))
        };
        let (l, u) = &mut ranges[j];
        if let Some(v) = new_lower.and_then(|v| i64::try_from(v).ok()) {
            if l.is_none_or(|l| v > l) {
                *l = Some(v);
                changed = true;
            }
        }
        if let Some(v) = new_upper.and_then(|v| i64::try_from(v).ok()) {
            if u.is_none_or(|u| v < u) {
                *u = Some(v);
                changed = true;
            }
        }
    }
    changed
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_supply_row_bounds_its_lanes() {
        // x1 + x2 = 7 with x >= 0: each lane carries at most 7 (by hand).
        let a = IntMatrix::from_rows(&[vec![1, 1]]).unwrap();
        let ranges = implied_box(&a, &[7], &[Some(0), Some(0)], &[None, None]);
        assert_eq!(ranges, [(Some(0), Some(7)), (Some(0), Some(7))]);
    }

    #[test]
    fn negative_coefficients_round_inwards() {
        // 2 x1 - 3 x2 = 1 with 0 <= x1 <= 5, x2 free (by hand): 3 x2 = 2 x1 - 1 in [-1, 9],
        // so x2 in [ceil(-1/3), 3] = [0, 3]; then 2 x1 = 1 + 3 x2 in [1, 10], x1 in [1, 5];
        // then 3 x2 in [1, 9], x2 in [1, 3]; then 2 x1 in [4, 10], x1 in [2, 5], and nothing
        // moves any more. The integer points are (2, 1) and (5, 3), at both ends.
        let a = IntMatrix::from_rows(&[vec![2, -3]]).unwrap();
        let ranges = implied_box(&a, &[1], &[Some(0), None], &[Some(5), None]);
        assert_eq!(ranges, [(Some(2), Some(5)), (Some(1), Some(3))]);
    }

    #[test]
    fn two_infinite_sides_imply_nothing() {
        let a = IntMatrix::from_rows(&[vec![1, -1, 1]]).unwrap();
        let ranges = implied_box(&a, &[0], &[Some(0), None, Some(0)], &[None, None, None]);
        assert_eq!(ranges[1], (Some(0), None));
        assert_eq!(ranges[0], (Some(0), None));
    }
}
