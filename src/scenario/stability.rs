//! The price of stability of one day: how a day's plan cost falls as the price per unit
//! changed against the previous plan falls, found exactly.
//!
//! With a change price `λ w` (`w` the unit weights of a [`ChangePrice`], `λ >= 0`), the day's
//! optimum `F(λ) = min_x plan(x) + λ change(x)` is the minimum of one line per plan, so it is
//! concave and piecewise linear in `λ`, and each piece belongs to one plan. Its breakpoints are
//! found by parametric search (Eisner and Severance 1976, "Mathematical techniques for
//! efficient record segmentation in large shared databases", J. ACM 23): with plans optimal
//! at `λ_lo` and `λ_hi`, solve at the price where their lines cross; a plan strictly below
//! both lines there splits the interval, else the crossing is a breakpoint. Every solve is
//! certified optimal for its price ([`certify`]); a price `a / b` is solved exactly as the
//! integer objective `b plan(x) + a change(x)`.

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{ToPrimitive, Zero};
use schemars::JsonSchema;
use serde::Serialize;

use crate::certify::Answer;
use crate::error::{Error, Result};
use crate::model::ConvexCosts;
use crate::solve::{ChangePrice, Numbers, PlanFigures, Prepared, WarmStart};
use crate::trace::certify;

/// One piece of the curve: from price `from` on (to the next piece's), the plan with these
/// figures is optimal.
#[derive(Clone, Debug, PartialEq, Serialize, JsonSchema)]
pub struct CurvePiece {
    /// The multiplier `λ` of the unit weights where the piece starts (0 for the first),
    /// written as a reduced fraction (`"3/2"`).
    #[serde(serialize_with = "fraction")]
    #[schemars(with = "String")]
    pub from: BigRational,
    /// The figures of the plan optimal on the piece, priced with the unit weights.
    pub figures: PlanFigures,
}

/// One day, its previous plan and the unit weights of the price.
pub struct StabilityCurve<'a> {
    /// The set that serves the day (it must take convex costs).
    pub prepared: &'a Prepared,
    /// The matrix of the model the day belongs to.
    pub matrix: &'a crate::IntMatrix,
    /// The day's numbers.
    pub numbers: Numbers<'a>,
    /// The previous plan, also where every solve starts.
    pub previous: &'a WarmStart,
    /// The unit weights `w`.
    pub unit: &'a ChangePrice,
    /// Solver settings.
    pub options: &'a augment::Options,
}

impl StabilityCurve<'_> {
    /// The pieces of `F` over `0 <= λ <= top`, in increasing `λ`.
    pub fn pieces(&self, top: i64) -> Result<Vec<CurvePiece>> {
        let zero = BigRational::zero();
        let top = BigRational::from_integer(BigInt::from(top));
        let low = (zero.clone(), self.solve_at(&zero)?);
        let high = (top.clone(), self.solve_at(&top)?);
        let mut plans = vec![low.1];
        self.between(&low, &high, &mut plans)?;
        plans.push(high.1);
        Ok(envelope(plans, &top))
    }

    /// Pushes, in decreasing change cost, plans whose lines lie strictly below the lines of
    /// `low`'s and `high`'s plans where those cross, until no plan does: then the two lines
    /// are neighbours on the lower envelope.
    fn between(
        &self,
        low: &(BigRational, PlanFigures),
        high: &(BigRational, PlanFigures),
        out: &mut Vec<PlanFigures>,
    ) -> Result<()> {
        // Optimal at the lower price, `low` moves at least as much; equal change costs make
        // the two lines one (both are minimal at both ends).
        if low.1.change_cost <= high.1.change_cost {
            return Ok(());
        }
        let crossing = crossing(&low.1, &high.1);
        let middle = (crossing.clone(), self.solve_at(&crossing)?);
        if line(&middle.1, &crossing) == line(&low.1, &crossing) {
            return Ok(());
        }
        self.between(low, &middle, out)?;
        out.push(middle.1);
        self.between(&middle, high, out)
    }

    /// The figures of a plan certified optimal at the price `λ = a / b`, solved as
    /// `b plan(x) + a change(x)`.
    fn solve_at(&self, price: &BigRational) -> Result<PlanFigures> {
        let too_large = || Error::Overflow(format!("the stability curve at the price {price}"));
        let a = price.numer().to_i64().ok_or_else(too_large)?;
        let b = price.denom().to_i64().ok_or_else(too_large)?;
        let cost = (self.numbers.cost.iter())
            .map(|&c| c.checked_mul(b))
            .collect::<Option<Vec<i64>>>()
            .ok_or_else(too_large)?;
        let convex = scaled(self.numbers.convex, b).ok_or_else(too_large)?;
        let weights = (self.unit.weights().iter())
            .map(|&w| w.checked_mul(a))
            .collect::<Option<Vec<i64>>>()
            .ok_or_else(too_large)?;
        let price_at = ChangePrice::per_variable(weights, "the stability curve")?;
        let priced = price_at.priced(&convex, &self.previous.x)?;
        let numbers = Numbers {
            cost: &cost,
            convex: &priced,
            ..self.numbers
        };
        let verdict =
            self.prepared
                .solve_numbers(numbers, self.options, Some(self.previous), &|| false)?;
        let certified = certify(self.prepared, self.matrix, numbers, verdict, None)?;
        let optimum = match certified.answer {
            Answer::Optimal { .. } => certified.verdict.optimum(),
            _ => None,
        };
        let (_, x) = optimum.ok_or_else(|| {
            Error::Unsupported(format!(
                "the day has no certified optimum at the change price {price}"
            ))
        })?;
        self.unit
            .figures(self.numbers, &self.previous.x, x)
            .ok_or_else(too_large)
    }
}

/// A price as its reduced fraction in words.
fn fraction<S: serde::Serializer>(
    price: &BigRational,
    serializer: S,
) -> std::result::Result<S::Ok, S::Error> {
    serializer.collect_str(price)
}

/// The pieces of the lower envelope over `0 <= λ <= top` of the lines of `plans`: plans in
/// decreasing change cost, each optimal at some price, with every envelope line among them.
/// A plan optimal at one price only (the solver may pick it at a breakpoint, where several
/// plans tie) gets no piece: its piece would have length zero.
fn envelope(plans: Vec<PlanFigures>, top: &BigRational) -> Vec<CurvePiece> {
    let mut pieces: Vec<CurvePiece> = Vec::new();
    for figures in plans {
        loop {
            let Some(last) = pieces.last() else {
                pieces.push(CurvePiece {
                    from: BigRational::zero(),
                    figures,
                });
                break;
            };
            if last.figures.change_cost <= figures.change_cost {
                break;
            }
            let from = crossing(&last.figures, &figures);
            if from <= last.from {
                pieces.pop();
                continue;
            }
            if from < *top {
                pieces.push(CurvePiece { from, figures });
            }
            break;
        }
    }
    pieces
}

/// The price where the lines of `low` and of `high` (which moves less) meet.
fn crossing(low: &PlanFigures, high: &PlanFigures) -> BigRational {
    BigRational::new(
        BigInt::from(high.plan_cost) - BigInt::from(low.plan_cost),
        BigInt::from(low.change_cost) - BigInt::from(high.change_cost),
    )
}

/// `plan + λ change` of a plan's figures.
fn line(figures: &PlanFigures, price: &BigRational) -> BigRational {
    BigRational::from_integer(BigInt::from(figures.plan_cost))
        + price * BigRational::from_integer(BigInt::from(figures.change_cost))
}

/// `convex` times `factor >= 1`; `None` when a slope or break does not fit.
fn scaled(convex: &ConvexCosts, factor: i64) -> Option<ConvexCosts> {
    let entries = convex
        .iter()
        .map(|(i, p)| {
            let slopes = (p.slopes().iter())
                .map(|&s| s.checked_mul(factor))
                .collect::<Option<Vec<i64>>>()?;
            crate::model::Pieces::new(p.breaks().to_vec(), slopes)
                .ok()
                .map(|p| (i, p))
        })
        .collect::<Option<Vec<_>>>()?;
    Some(ConvexCosts::new(entries))
}
