//! The Lagrangian dual bound `L(y)` of one instance, exactly (see the module documentation of
//! [`crate::bound`]).
//!
//! With `y = p / D` (integer numerators, one positive common denominator),
//! `D L(y) = p.b + sum_i min over x in [l_i, u_i] of g_i(x)`, `g_i(x) = D f_i(x) - (A^T p)_i x`,
//! all in big integers. Each `g_i` is convex and piecewise linear (linear without a convex
//! cost), so its minimum over an interval lies at an end or a break inside it, and it is
//! minus infinity exactly when an infinite side has a tail slope pointing down.

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{Signed, Zero};
use serde::{Deserialize, Serialize};

use super::implied::Range;
use crate::error::{Error, Result};
use crate::matrix::IntMatrix;
use crate::model::{ConvexCosts, Pieces};

/// Row multipliers `y = numerators / denominator`, exactly.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Multipliers {
    /// One numerator per row.
    pub numerators: Vec<BigInt>,
    /// The common denominator, positive.
    pub denominator: BigInt,
}

impl Multipliers {
    /// The multipliers as reduced fractions, one per row (`"-3/2"`, `"4"`).
    pub fn fractions(&self) -> Vec<BigRational> {
        self.numerators
            .iter()
            .map(|p| BigRational::new(p.clone(), self.denominator.clone()))
            .collect()
    }
}

/// `L(y)` for the instance `(rhs, cost + convex, ranges)` of `matrix`; `None` when it is minus
/// infinity (an infinite side of the box along which `f_i - (A^T y)_i x` falls).
pub fn lagrangian_bound(
    matrix: &IntMatrix,
    rhs: &[i64],
    cost: &[i64],
    convex: &ConvexCosts,
    ranges: &[Range],
    y: &Multipliers,
) -> Result<Option<BigRational>> {
    if y.numerators.len() != matrix.rows() || !y.denominator.is_positive() {
        return Err(Error::Dimension(format!(
            "{} multipliers with denominator {} for {} rows (need one per row and a positive denominator)",
            y.numerators.len(),
            y.denominator,
            matrix.rows()
        )));
    }
    let d = &y.denominator;
    let mut total: BigInt = y.numerators.iter().zip(rhs).map(|(p, &b)| p * b).sum();
    let weights = column_weights(matrix, &y.numerators);
    for (i, q) in weights.iter().enumerate() {
        let linear = BigInt::from(cost[i]) * d - q;
        match term_minimum(&linear, d, convex.get(i), ranges[i]) {
            Some(m) => total += m,
            None => return Ok(None),
        }
    }
    Ok(Some(BigRational::new(total, d.clone())))
}

/// `(A^T p)_i` for every column.
fn column_weights(matrix: &IntMatrix, p: &[BigInt]) -> Vec<BigInt> {
    let mut weights = vec![BigInt::zero(); matrix.cols()];
    for (i, p) in p.iter().enumerate().filter(|(_, p)| !p.is_zero()) {
        for (w, &a) in weights.iter_mut().zip(matrix.row(i)) {
            if a != 0 {
                *w += p * a;
            }
        }
    }
    weights
}

/// `min over x in range of linear x + D p(x)` (`p` the convex cost, if any); `None` for minus
/// infinity.
fn term_minimum(
    linear: &BigInt,
    d: &BigInt,
    pieces: Option<&Pieces>,
    (lower, upper): Range,
) -> Option<BigInt> {
    let (breaks, slopes): (&[i64], &[i64]) = match pieces {
        Some(p) => (p.breaks(), p.slopes()),
        None => (&[], &[0]),
    };
    let tail = |slope: i64| linear + d * slope;
    if lower.is_none() && tail(slopes[0]).is_positive() {
        return None;
    }
    if upper.is_none() && tail(slopes[slopes.len() - 1]).is_negative() {
        return None;
    }
    let inside = |x: &i64| lower.is_none_or(|l| l <= *x) && upper.is_none_or(|u| *x <= u);
    let mut candidates: Vec<i64> = lower.into_iter().chain(upper).collect();
    candidates.extend(breaks.iter().copied().filter(inside));
    if candidates.is_empty() {
        // No finite side and no break inside: g is linear with slope 0 (checked above).
        candidates.push(0);
    }
    let value = |x: i64| {
        let convex = pieces.map_or(BigInt::zero(), |p| d * p.value(x));
        linear * x + convex
    };
    candidates.into_iter().map(value).min()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn whole(value: i64) -> Multipliers {
        Multipliers {
            numerators: vec![BigInt::from(value)],
            denominator: BigInt::from(1),
        }
    }

    #[test]
    fn a_single_row_bound_by_hand() {
        // min 3 x1 + 5 x2, x1 + x2 = 4, 0 <= x <= 10. With y = 3 the reduced costs are (0, 2),
        // so L = 12 + 0 + 2 * 0 = 12, the optimum (x = (4, 0)); with y = 5 they are (-2, 0):
        // L = 20 - 2 * 10 = 0.
        let a = IntMatrix::from_rows(&[vec![1, 1]]).unwrap();
        let ranges = [(Some(0), Some(10)); 2];
        let none = ConvexCosts::default();
        let at = |y| lagrangian_bound(&a, &[4], &[3, 5], &none, &ranges, &whole(y)).unwrap();
        assert_eq!(at(3), Some(BigRational::from(BigInt::from(12))));
        assert_eq!(at(5), Some(BigRational::from(BigInt::from(0))));
    }

    #[test]
    fn a_falling_infinite_side_gives_no_bound() {
        // Reduced cost -2 on a variable without an upper bound: L is minus infinity.
        let a = IntMatrix::from_rows(&[vec![1, 1]]).unwrap();
        let ranges = [(Some(0), None); 2];
        let none = ConvexCosts::default();
        let bound = lagrangian_bound(&a, &[4], &[3, 5], &none, &ranges, &whole(5)).unwrap();
        assert_eq!(bound, None);
    }

    #[test]
    fn a_convex_cost_is_minimised_at_a_break() {
        // min p(x1) + x2 with p of slopes 1 then 4 beyond 3, x1 + x2 = 6, x >= 0, x1 free
        // above. With y = 2: g1(x) = p(x) - 2x has slopes -1 then 2, minimum at x = 3:
        // 3 - 6 = -3; g2 = -x2 on [0, 6] (implied), minimum -6; L = 12 - 3 - 6 = 3. The optimum
        // is x = (0, 6) at cost 6, or x = (3, 3) at cost 6 (by hand).
        let a = IntMatrix::from_rows(&[vec![1, 1]]).unwrap();
        let pieces = Pieces::new(vec![3], vec![1, 4]).unwrap();
        let convex = ConvexCosts::new(vec![(0, pieces)]);
        let ranges = [(Some(0), None), (Some(0), Some(6))];
        let bound = lagrangian_bound(&a, &[6], &[0, 1], &convex, &ranges, &whole(2)).unwrap();
        assert_eq!(bound, Some(BigRational::from(BigInt::from(3))));
        // y = 1 is the LP optimum: g1 = p(x) - x has slopes 0 then 3, minimum 0; g2 = 0: L = 6.
        let bound = lagrangian_bound(&a, &[6], &[0, 1], &convex, &ranges, &whole(1)).unwrap();
        assert_eq!(bound, Some(BigRational::from(BigInt::from(6))));
    }
}
