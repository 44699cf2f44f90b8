//! Piecewise-linear convex costs per variable, added to the linear cost.
//!
//! A variable's convex cost is given by increasing `breaks` `b_1 < ... < b_K` and `K + 1`
//! nondecreasing integer `slopes` `s_0 <= ... <= s_K`: the marginal cost is `s_0` below
//! `b_1`, `s_k` between `b_k` and `b_{k+1}` and `s_K` above `b_K`, and the cost is 0 at
//! `x = 0`. In closed form
//! `p(x) = s_0 x + sum_k (s_k - s_{k-1}) (max(0, x - b_k) - max(0, -b_k))`, which is convex
//! exactly when the slopes do not decrease. Every Graver basis is a test set for such
//! separable convex objectives (Murota, Saito, Weismantel 2004), so the same cached set serves
//! them; the solver sees the sum `c_i x + p_i(x)` as one [`augment::Term`].

use augment::{Objective, Term};

use crate::error::{Error, Result};

/// One variable's convex cost: breaks and slopes, validated (see the module documentation).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Pieces {
    breaks: Vec<i64>,
    slopes: Vec<i64>,
}

/// Why breaks and slopes do not describe a convex cost; `index` is the offending entry.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum PiecesFault {
    /// There must be one more slope than breaks.
    Count {
        /// Number of breaks.
        breaks: usize,
        /// Number of slopes.
        slopes: usize,
    },
    /// `breaks[index]` is not above the break before it.
    Unsorted {
        /// The entry.
        index: usize,
    },
    /// `slopes[index]` is below the slope before it: the cost would not be convex.
    NotConvex {
        /// The entry.
        index: usize,
    },
    /// A slope plus the linear cost, or the cost at a break, does not fit in 64 bits.
    TooLarge,
}

impl std::fmt::Display for PiecesFault {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            PiecesFault::Count { breaks, slopes } => write!(
                f,
                "{slopes} slopes for {breaks} breaks; give one slope more than breaks"
            ),
            PiecesFault::Unsorted { index } => write!(
                f,
                "breaks[{index}] is not above breaks[{}]; breaks must increase",
                index - 1
            ),
            PiecesFault::NotConvex { index } => write!(
                f,
                "slopes[{index}] is below slopes[{}]: the cost would not be convex (slopes must not decrease)",
                index - 1
            ),
            PiecesFault::TooLarge => write!(f, "the cost values do not fit in 64 bits"),
        }
    }
}

impl Pieces {
    /// Validates breaks and slopes: `slopes.len() == breaks.len() + 1`, breaks strictly
    /// increasing, slopes nondecreasing.
    pub fn new(breaks: Vec<i64>, slopes: Vec<i64>) -> std::result::Result<Self, PiecesFault> {
        if slopes.len() != breaks.len() + 1 {
            return Err(PiecesFault::Count {
                breaks: breaks.len(),
                slopes: slopes.len(),
            });
        }
        if let Some(index) = (1..breaks.len()).find(|&k| breaks[k] <= breaks[k - 1]) {
            return Err(PiecesFault::Unsorted { index });
        }
        if let Some(index) = (1..slopes.len()).find(|&k| slopes[k] < slopes[k - 1]) {
            return Err(PiecesFault::NotConvex { index });
        }
        Ok(Pieces { breaks, slopes })
    }

    /// The breaks, increasing.
    pub fn breaks(&self) -> &[i64] {
        &self.breaks
    }

    /// The slopes, one more than the breaks, nondecreasing.
    pub fn slopes(&self) -> &[i64] {
        &self.slopes
    }

    /// `p(x)` exactly (the closed form of the module documentation).
    pub fn value(&self, x: i64) -> i128 {
        let x = i128::from(x);
        let mut total = i128::from(self.slopes[0]) * x;
        for (k, &b) in self.breaks.iter().enumerate() {
            let rise = i128::from(self.slopes[k + 1]) - i128::from(self.slopes[k]);
            let b = i128::from(b);
            total += rise * ((x - b).max(0) - (-b).max(0));
        }
        total
    }

    /// The slope just above `x`: `s_k` with `k` the number of breaks at or below `x`.
    fn slope_above(&self, x: i64) -> i64 {
        self.slopes[self.breaks.partition_point(|&b| b <= x)]
    }

    /// The sum `p + q` of two convex costs: convex again, with the union of the breaks and
    /// the slopes added on every segment (both are 0 at `x = 0`, so is the sum).
    pub fn plus(&self, other: &Pieces) -> std::result::Result<Pieces, PiecesFault> {
        let mut breaks: Vec<i64> = self.breaks.iter().chain(&other.breaks).copied().collect();
        breaks.sort_unstable();
        breaks.dedup();
        let first = self.slopes[0].checked_add(other.slopes[0]);
        let slopes = std::iter::once(first)
            .chain(
                breaks
                    .iter()
                    .map(|&b| self.slope_above(b).checked_add(other.slope_above(b))),
            )
            .collect::<Option<Vec<i64>>>()
            .ok_or(PiecesFault::TooLarge)?;
        Pieces::new(breaks, slopes)
    }

    /// The solver's term for `c x + p(x)`: the breakpoints `(b, c b + p(b))` with one point
    /// beyond each end, so that the first and last segments carry `c + s_0` and `c + s_K`.
    pub fn term(&self, linear: i64) -> std::result::Result<Term, PiecesFault> {
        if self.slopes.iter().any(|s| s.checked_add(linear).is_none()) {
            return Err(PiecesFault::TooLarge);
        }
        let fits = |y: i128| i64::try_from(y).map_err(|_| PiecesFault::TooLarge);
        let (Some(&first), Some(&last)) = (self.breaks.first(), self.breaks.last()) else {
            return Ok(Term::PiecewiseLinear(vec![
                (0, 0),
                (1, linear + self.slopes[0]),
            ]));
        };
        let (Some(before), Some(after)) = (first.checked_sub(1), last.checked_add(1)) else {
            return Err(PiecesFault::TooLarge);
        };
        // Each point from the one before along its segment's slope `c + s_k` (exact in
        // `i128`), instead of evaluating `p` afresh at every point.
        let mut y = i128::from(linear) * i128::from(before) + self.value(before);
        let mut points = Vec::with_capacity(self.breaks.len() + 2);
        points.push((before, fits(y)?));
        let mut x = before;
        for (&next, &s) in self.breaks.iter().chain([&after]).zip(&self.slopes) {
            y += i128::from(linear + s) * (i128::from(next) - i128::from(x));
            points.push((next, fits(y)?));
            x = next;
        }
        Ok(Term::PiecewiseLinear(points))
    }
}

/// The convex costs of a model: at most one [`Pieces`] per variable, in variable order.
///
/// Invariant: variables are strictly increasing.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct ConvexCosts {
    entries: Vec<(usize, Pieces)>,
}

impl ConvexCosts {
    /// The costs of `entries` (variable, pieces); a variable named twice keeps its last.
    pub fn new(mut entries: Vec<(usize, Pieces)>) -> Self {
        entries.reverse();
        entries.sort_by_key(|(v, _)| *v);
        entries.dedup_by_key(|(v, _)| *v);
        ConvexCosts { entries }
    }

    /// True when no variable has a convex cost: the objective is linear.
    pub fn is_empty(&self) -> bool {
        self.entries.is_empty()
    }

    /// The variables with a convex cost and their pieces, in variable order.
    pub fn iter(&self) -> impl Iterator<Item = (usize, &Pieces)> {
        self.entries.iter().map(|(v, p)| (*v, p))
    }

    /// The convex cost of `variable`, if it has one.
    pub fn get(&self, variable: usize) -> Option<&Pieces> {
        self.entries
            .binary_search_by_key(&variable, |(v, _)| *v)
            .ok()
            .map(|k| &self.entries[k].1)
    }

    /// The objective `sum_i c_i x_i + p_i(x_i)`: linear when there are no convex costs;
    /// `names` name the variables in errors.
    pub fn objective(&self, cost: &[i64], names: Option<&[String]>) -> Result<Objective> {
        if self.is_empty() {
            return Ok(Objective::linear(cost.to_vec()));
        }
        let mut terms: Vec<Term> = cost.iter().map(|&c| Term::Linear(c)).collect();
        for (variable, pieces) in self.iter() {
            let slot = terms.get_mut(variable).ok_or_else(|| {
                Error::Dimension(format!(
                    "a convex cost names variable {variable} of {}",
                    cost.len()
                ))
            })?;
            *slot = pieces.term(cost[variable]).map_err(|_| {
                let name = names.map_or(format!("variable {variable}"), |n| n[variable].clone());
                Error::Overflow(format!(
                    "the convex cost of {name} with its linear cost {}",
                    cost[variable]
                ))
            })?;
        }
        Ok(Objective::separable(terms)?)
    }

    /// `sum_i c_i x_i + p_i(x_i)` exactly, or `None` if it does not fit in `i128`.
    pub fn value(&self, cost: &[i64], x: &[i64]) -> Option<i128> {
        let linear = cost.iter().zip(x).try_fold(0i128, |sum, (&c, &v)| {
            sum.checked_add(i128::from(c) * i128::from(v))
        })?;
        self.iter()
            .try_fold(linear, |sum, (i, p)| sum.checked_add(p.value(x[i])))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pieces(breaks: &[i64], slopes: &[i64]) -> Pieces {
        Pieces::new(breaks.to_vec(), slopes.to_vec()).unwrap()
    }

    #[test]
    fn value_integrates_the_slopes_from_zero() {
        // By hand: slope 2 up to 3, 5 from 3 to 7, 9 beyond; p(0) = 0.
        let p = pieces(&[3, 7], &[2, 5, 9]);
        let expect = |x: i64| -> i128 {
            let x = i128::from(x);
            if x <= 3 {
                2 * x
            } else if x <= 7 {
                6 + 5 * (x - 3)
            } else {
                6 + 20 + 9 * (x - 7)
            }
        };
        for x in -5..=12 {
            assert_eq!(p.value(x), expect(x), "x = {x}");
        }
        // A break below zero: slope -4 up to -2, 1 beyond; p(-3) = -(1 * 2 + -4 * 1) = 2.
        let q = pieces(&[-2], &[-4, 1]);
        assert_eq!(
            (q.value(0), q.value(-2), q.value(-3), q.value(5)),
            (0, -2, 2, 5)
        );
    }

    #[test]
    fn the_solver_term_equals_linear_plus_pieces_everywhere() {
        let p = pieces(&[-1, 2, 4], &[-3, 0, 0, 6]);
        let objective = ConvexCosts::new(vec![(1, p.clone())])
            .objective(&[7, 2], None)
            .unwrap();
        for x in -6..=9 {
            let want = 7 * 3 + 2 * i128::from(x) + p.value(x);
            assert_eq!(objective.value(&[3, x]).unwrap(), want, "x = {x}");
        }
    }

    proptest::proptest! {
        /// The term's points, found segment by segment, are `(x, c x + p(x))` by the closed
        /// form of `value`, at one point below the first break, every break and one above
        /// the last (a cost without breaks: at 0 and 1).
        #[test]
        fn term_points_follow_the_closed_form(
            mut breaks in proptest::collection::vec(-1_000i64..1_000, 0..5),
            steps in proptest::collection::vec(0i64..50, 6),
            first in -100i64..100,
            linear in -100i64..100,
        ) {
            breaks.sort_unstable();
            breaks.dedup();
            let slopes: Vec<i64> = (0..=breaks.len())
                .map(|k| first + steps[..k].iter().sum::<i64>())
                .collect();
            let p = Pieces::new(breaks.clone(), slopes).unwrap();
            let Term::PiecewiseLinear(points) = p.term(linear).unwrap() else {
                panic!("a piecewise-linear term");
            };
            let xs: Vec<i64> = match (breaks.first(), breaks.last()) {
                (Some(&a), Some(&b)) => [a - 1].into_iter().chain(breaks.clone()).chain([b + 1]).collect(),
                _ => vec![0, 1],
            };
            let want: Vec<(i64, i64)> = xs
                .iter()
                .map(|&x| (x, i64::try_from(i128::from(linear) * i128::from(x) + p.value(x)).unwrap()))
                .collect();
            proptest::prop_assert_eq!(points, want);
        }
    }

    #[test]
    fn a_sum_of_pieces_is_the_sum_of_their_values() {
        let p = pieces(&[-1, 2, 4], &[-3, 0, 0, 6]);
        let q = pieces(&[2, 5], &[-1, 1, 2]);
        let sum = p.plus(&q).unwrap();
        assert_eq!(sum.breaks(), &[-1, 2, 4, 5]);
        for x in -8..=12 {
            assert_eq!(sum.value(x), p.value(x) + q.value(x), "x = {x}");
        }
        let huge = pieces(&[0], &[0, i64::MAX]);
        assert_eq!(huge.plus(&huge), Err(PiecesFault::TooLarge));
    }

    #[test]
    fn faults_name_the_entry() {
        let fault = |b: &[i64], s: &[i64]| Pieces::new(b.to_vec(), s.to_vec()).unwrap_err();
        assert_eq!(
            fault(&[1], &[1]),
            PiecesFault::Count {
                breaks: 1,
                slopes: 1
            }
        );
        assert_eq!(
            fault(&[1, 1], &[1, 2, 3]),
            PiecesFault::Unsorted { index: 1 }
        );
        assert_eq!(
            fault(&[1, 4], &[1, 3, 2]),
            PiecesFault::NotConvex { index: 2 }
        );
        // p(2^62) = 4 * 2^62 = 2^64 does not fit in i64.
        let huge = pieces(&[1 << 62], &[4, 5]);
        assert_eq!(huge.term(0), Err(PiecesFault::TooLarge));
    }
}
