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
            let (dx, dy) = (
                i128::from(x1) - i128::from(x0),
                i128::from(y1) - i128::from(y0),
            );
            if dy % dx != 0 {
                return Err(AugmentError::FractionalSlope {
                    variable,
                    from: x0,
                    to: x1,
                });
            }
            let slope = i64::try_from(dy / dx).map_err(|_| overflow("taking a segment slope"))?;
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
        let segment = self
            .xs
            .partition_point(|&x| x <= v)
            .saturating_sub(1)
            .min(self.slopes.len() - 1);
        let offset = i128::from(v) - i128::from(self.xs[segment]);
        i128::from(self.slopes[segment])
            .checked_mul(offset)
            .and_then(|t| t.checked_add(i128::from(self.ys[segment])))
            .ok_or(overflow("evaluating a piecewise-linear term"))
    }
}
