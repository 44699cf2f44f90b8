//! Objectives: linear `c.x` and separable convex `sum_i f_i(x_i)`, evaluated exactly.
//!
//! Every value is an `i128` computed with checked arithmetic; a result that does not fit is an
//! [`AugmentError::Overflow`], never a wrapped number. Convexity is validated once, when the
//! objective is built, with the variable named in the error.

use serde::{Deserialize, Serialize};

use crate::error::{overflow, AugmentError, Result};

/// One convex term `f_i` of a separable objective, as given by the caller.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub enum Term {
    /// `c x`.
    Linear(i64),
    /// `a x^2 + c x` with `a >= 0`.
    Quadratic {
        /// Coefficient of `x^2`; must be nonnegative.
        a: i64,
        /// Coefficient of `x`.
        c: i64,
    },
    /// The piecewise-linear interpolation of breakpoints `(x, f(x))`, extended beyond the first
    /// and last breakpoint by the first and last segment. Abscissae must increase strictly,
    /// every segment slope must be an integer and slopes must not decrease (convexity).
    PiecewiseLinear(Vec<(i64, i64)>),
}

/// Asymptotic rate of change of a term along a direction: `f(x + t d) / t` as `t -> inf`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Recession {
    /// The term grows (or falls) linearly at this rate.
    Finite(i128),
    /// The term grows faster than linearly (a strictly convex quadratic).
    Infinite,
}

impl Recession {
    /// Sum of two rates; an infinite rate absorbs any finite one.
    pub(crate) fn add(self, other: Recession) -> Result<Recession> {
        match (self, other) {
            (Recession::Finite(a), Recession::Finite(b)) => a
                .checked_add(b)
                .map(Recession::Finite)
                .ok_or(overflow("adding recession slopes")),
            _ => Ok(Recession::Infinite),
        }
    }
}

/// A separable function of integer variables that the line search can evaluate term by term.
pub(crate) trait Separable: Sync {
    /// `f_i(value)`.
    fn term(&self, variable: usize, value: i64) -> Result<i128>;
    /// Asymptotic rate of `f_i(x_i + t direction)` as `t -> inf`.
    fn recession(&self, variable: usize, direction: i64) -> Result<Recession>;
    /// The cost vector when the function is linear, enabling the closed-form step.
    fn linear_costs(&self) -> Option<&[i64]>;
    /// `f_i` as linear pieces, when it is piecewise linear (a linear term is one piece),
    /// enabling the line search along kinks; `None` otherwise.
    fn pieces(&self, _variable: usize) -> Option<Pieces<'_>> {
        None
    }
}

/// A convex piecewise-linear term by its kinks and slopes: slope `slopes[k]` holds between
/// `kinks[k - 1]` and `kinks[k]` (the first and last without end), so there is one slope more
/// than kinks, and the slopes never decrease.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Pieces<'a> {
    /// The points where the slope changes, increasing.
    pub kinks: &'a [i64],
    /// The slopes between them.
    pub slopes: &'a [i64],
}

impl<'a> Pieces<'a> {
    /// The linear term of slope `c`: one piece.
    fn linear(c: &'a i64) -> Self {
        Pieces {
            kinks: &[],
            slopes: std::slice::from_ref(c),
        }
    }
}

/// A validated objective over `n` variables, to be minimised.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Objective {
    kind: Kind,
}

#[derive(Debug, Clone, PartialEq, Eq)]
enum Kind {
    Linear(Vec<i64>),
    Separable(Vec<Convex>),
}

#[derive(Debug, Clone, PartialEq, Eq)]
enum Convex {
    Linear(i64),
    Quadratic { a: i64, c: i64 },
    Piecewise(Piecewise),
}

/// Breakpoints with the integer slope of each of the `len - 1` segments.
#[derive(Debug, Clone, PartialEq, Eq)]
struct Piecewise {
    xs: Vec<i64>,
    ys: Vec<i64>,
    slopes: Vec<i64>,
}

impl Objective {
    /// The linear objective `c.x`.
    pub fn linear(costs: Vec<i64>) -> Self {
        Objective {
            kind: Kind::Linear(costs),
        }
    }

    /// A separable convex objective, one term per variable; rejects non-convex terms, naming
    /// the variable.
    pub fn separable(terms: Vec<Term>) -> Result<Self> {
        let convex = terms
            .into_iter()
            .enumerate()
            .map(|(variable, term)| Convex::validate(variable, term))
            .collect::<Result<Vec<_>>>()?;
        Ok(Objective {
            kind: Kind::Separable(convex),
        })
    }

    /// Number of variables.
    pub fn len(&self) -> usize {
        match &self.kind {
            Kind::Linear(c) => c.len(),
            Kind::Separable(t) => t.len(),
        }
    }

    /// True for an objective over no variables.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The asymptotic rate `lim f(x + t d) / t` as `t -> inf` (the same for every `x`), or
    /// `None` when `f` grows faster than linearly along `d`: `d` is a descent ray of an
    /// unbounded problem only when the rate is negative.
    pub fn recession_rate(&self, d: &[i64]) -> Result<Option<i128>> {
        if d.len() != self.len() {
            return Err(AugmentError::Dimension {
                what: "direction",
                expected: self.len(),
                found: d.len(),
            });
        }
        let mut total = Recession::Finite(0);
        for (i, &v) in d.iter().enumerate().filter(|(_, &v)| v != 0) {
            total = total.add(self.recession(i, v)?)?;
        }
        Ok(match total {
            Recession::Finite(rate) => Some(rate),
            Recession::Infinite => None,
        })
    }

    /// `f(x)`, exactly.
    pub fn value(&self, x: &[i64]) -> Result<i128> {
        if x.len() != self.len() {
            return Err(AugmentError::Dimension {
                what: "point",
                expected: self.len(),
                found: x.len(),
            });
        }
        x.iter().enumerate().try_fold(0i128, |sum, (i, &v)| {
            sum.checked_add(self.term(i, v)?)
                .ok_or(overflow("summing the objective"))
        })
    }
}

impl Separable for Objective {
    fn term(&self, variable: usize, value: i64) -> Result<i128> {
        match &self.kind {
            Kind::Linear(c) => Ok(i128::from(c[variable]) * i128::from(value)),
            Kind::Separable(t) => t[variable].value(value),
        }
    }

    fn recession(&self, variable: usize, direction: i64) -> Result<Recession> {
        match &self.kind {
            Kind::Linear(c) => Ok(Recession::Finite(
                i128::from(c[variable]) * i128::from(direction),
            )),
            Kind::Separable(t) => Ok(t[variable].recession(direction)),
        }
    }

    fn linear_costs(&self) -> Option<&[i64]> {
        match &self.kind {
            Kind::Linear(c) => Some(c),
            Kind::Separable(_) => None,
        }
    }

    fn pieces(&self, variable: usize) -> Option<Pieces<'_>> {
        match &self.kind {
            Kind::Linear(c) => Some(Pieces::linear(&c[variable])),
            Kind::Separable(t) => match &t[variable] {
                Convex::Linear(c) => Some(Pieces::linear(c)),
                Convex::Quadratic { .. } => None,
                Convex::Piecewise(p) => Some(Pieces {
                    kinks: &p.xs[1..p.xs.len() - 1],
                    slopes: &p.slopes,
                }),
            },
        }
    }
}

impl Convex {
    fn validate(variable: usize, term: Term) -> Result<Convex> {
        match term {
            Term::Linear(c) => Ok(Convex::Linear(c)),
            Term::Quadratic { a, .. } if a < 0 => {
                Err(AugmentError::NegativeQuadratic { variable, a })
            }
            Term::Quadratic { a, c } => Ok(Convex::Quadratic { a, c }),
            Term::PiecewiseLinear(points) => {
                Piecewise::validate(variable, &points).map(Convex::Piecewise)
            }
        }
    }

    fn value(&self, v: i64) -> Result<i128> {
        let v128 = i128::from(v);
        match self {
            Convex::Linear(c) => Ok(i128::from(*c) * v128),
            Convex::Quadratic { a, c } => (v128 * v128)
                .checked_mul(i128::from(*a))
                .and_then(|q| q.checked_add(i128::from(*c) * v128))
                .ok_or(overflow("evaluating a quadratic term")),
            Convex::Piecewise(p) => p.value(v),
        }
    }

    fn recession(&self, direction: i64) -> Recession {
        let d = i128::from(direction);
        match self {
            Convex::Linear(c) => Recession::Finite(i128::from(*c) * d),
            Convex::Quadratic { a, .. } if *a > 0 => Recession::Infinite,
            Convex::Quadratic { c, .. } => Recession::Finite(i128::from(*c) * d),
            Convex::Piecewise(p) => {
                let slope = if direction > 0 {
                    p.slopes[p.slopes.len() - 1]
                } else {
                    p.slopes[0]
                };
                Recession::Finite(i128::from(slope) * d)
            }
        }
    }
}

/// The slope `(y1 - y0) / (x1 - x0)` of a segment with `x1 > x0`, or `None` when it is not
/// an integer; in `i64` when the differences fit (a unit step divides nothing), in `i128`
/// otherwise.
fn segment_slope(x0: i64, y0: i64, x1: i64, y1: i64) -> Result<Option<i64>> {
    if let (Some(dx), Some(dy)) = (x1.checked_sub(x0), y1.checked_sub(y0)) {
        return Ok(match dx {
            1 => Some(dy),
            _ => (dy % dx == 0).then_some(dy / dx),
        });
    }
    let (dx, dy) = (
        i128::from(x1) - i128::from(x0),
        i128::from(y1) - i128::from(y0),
    );
    if dy % dx != 0 {
        return Ok(None);
    }
    i64::try_from(dy / dx)
        .map(Some)
        .map_err(|_| overflow("taking a segment slope"))
}

impl Piecewise {
    fn validate(variable: usize, points: &[(i64, i64)]) -> Result<Piecewise> {
        if points.len() < 2 {
            return Err(AugmentError::TooFewBreakpoints {
                variable,
                count: points.len(),
            });
        }
        let mut slopes = Vec::with_capacity(points.len() - 1);
        for pair in points.windows(2) {
            let ((x0, y0), (x1, y1)) = (pair[0], pair[1]);
            if x1 <= x0 {
                return Err(AugmentError::UnsortedBreakpoints {
                    variable,
                    previous: x0,
                    x: x1,
                });
            }
            let Some(slope) = segment_slope(x0, y0, x1, y1)? else {
                return Err(AugmentError::FractionalSlope {
                    variable,
                    from: x0,
                    to: x1,
                });
            };
            if let Some(&left) = slopes.last() {
                if slope < left {
                    return Err(AugmentError::NotConvex {
                        variable,
                        at: x0,
                        left,
                        right: slope,
                    });
                }
            }
            slopes.push(slope);
        }
        Ok(Piecewise {
            xs: points.iter().map(|p| p.0).collect(),
            ys: points.iter().map(|p| p.1).collect(),
            slopes,
        })
    }

    fn value(&self, v: i64) -> Result<i128> {
        // The segment is the number of inner points at or left of `v`; terms have few points,
        // so a linear pass beats a binary search.
        let inner = &self.xs[1..self.xs.len() - 1];
        let segment = if inner.len() <= 8 {
            inner.iter().take_while(|&&x| x <= v).count()
        } else {
            inner.partition_point(|&x| x <= v)
        };
        // In i64 when the product fits (the sum of two i64 values always fits in i128).
        if let Some(rise) = v
            .checked_sub(self.xs[segment])
            .and_then(|offset| offset.checked_mul(self.slopes[segment]))
        {
            return Ok(i128::from(rise) + i128::from(self.ys[segment]));
        }
        let offset = i128::from(v) - i128::from(self.xs[segment]);
        i128::from(self.slopes[segment])
            .checked_mul(offset)
            .and_then(|t| t.checked_add(i128::from(self.ys[segment])))
            .ok_or(overflow("evaluating a piecewise-linear term"))
    }
}

/// Random convex terms for the crate's property tests.
#[cfg(test)]
pub(crate) mod strategies {
    use std::ops::RangeInclusive;

    use proptest::prelude::*;

    use super::Term;

    /// The points of a convex piecewise-linear term: from `(x0, y0)`, one segment per
    /// `(gap, slope)` of `segments`, their slopes taken in increasing order.
    pub(crate) fn joined(x0: i64, y0: i64, segments: &[(i64, i64)]) -> Vec<(i64, i64)> {
        let mut slopes: Vec<i64> = segments.iter().map(|s| s.1).collect();
        slopes.sort_unstable();
        let mut points = vec![(x0, y0)];
        for (gap, slope) in segments.iter().map(|s| s.0).zip(slopes) {
            let &(px, py) = points.last().expect("starts nonempty");
            points.push((px + gap, py + slope * gap));
        }
        points
    }

    /// A convex piecewise-linear term starting in `starts`, of 1 to `most` segments with gaps
    /// of 1 to `gap` and slopes of `-slope` to `slope`.
    pub(crate) fn piecewise(
        starts: RangeInclusive<i64>,
        (gap, slope): (i64, i64),
        most: usize,
    ) -> impl Strategy<Value = Term> {
        (
            starts,
            prop::collection::vec((1..=gap, -slope..=slope), 1..=most),
        )
            .prop_map(|(x0, segments)| Term::PiecewiseLinear(joined(x0, 0, &segments)))
    }
}

#[cfg(test)]
mod tests {

    /// A segment's slope by hand: unit steps, wider steps that divide and that do not, and
    /// differences beyond `i64` (taken in `i128`).
    #[test]
    fn segment_slopes_are_exact_or_refused() {
        assert_eq!(segment_slope(3, 10, 4, -2).unwrap(), Some(-12));
        assert_eq!(segment_slope(-2, 1, 4, 19).unwrap(), Some(3));
        assert_eq!(segment_slope(0, 0, 4, 6).unwrap(), None);
        assert_eq!(segment_slope(0, 0, 3, -7).unwrap(), None);
        // x1 - x0 = y1 - y0 = 2^64 - 2, beyond i64: slope 1, found in i128.
        assert_eq!(
            segment_slope(i64::MIN + 1, i64::MIN + 1, i64::MAX, i64::MAX).unwrap(),
            Some(1)
        );
        assert_eq!(
            segment_slope(-(1 << 62), -(1 << 62), 1 << 62, (1 << 62) + 1).unwrap(),
            None
        );
    }

    use proptest::prelude::*;

    use super::strategies::joined;
    use super::*;

    proptest! {
        /// A piecewise-linear term is its points joined by segments and extended by its end
        /// slopes (the reference takes the last point at or left of `v`, the first one when
        /// there is none, and the slope to the point after, in i128), near zero and at the
        /// ends of i64, where the product leaves i64.
        #[test]
        fn a_piecewise_term_joins_its_points(
            x0 in -20i64..=20,
            segments in prop::collection::vec((1i64..=6, -9i64..=9), 1..=12),
            near in -60i64..=60,
            far in prop::sample::select(vec![i64::MIN, i64::MIN + 7, i64::MAX - 7, i64::MAX]),
        ) {
            let points = joined(x0, 3, &segments);
            let f = Objective::separable(vec![Term::PiecewiseLinear(points.clone())]).unwrap();
            for v in [near, far] {
                let k = points[..points.len() - 1].iter().rposition(|p| p.0 <= v).unwrap_or(0);
                let (xk, yk) = points[k];
                let slope = i128::from(points[k + 1].1 - yk) / i128::from(points[k + 1].0 - xk);
                let want = i128::from(yk) + slope * (i128::from(v) - i128::from(xk));
                prop_assert_eq!(f.term(0, v).unwrap(), want, "at {}", v);
            }
        }
    }
}
