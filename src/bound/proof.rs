//! The best dual bound found for a plan: a hint first (the multipliers of a related instance),
//! then the rounded multipliers of the LP relaxation.

use num_bigint::BigInt;
use num_rational::BigRational;

use super::implied::{implied_box, Range};
use super::lagrangian::{lagrangian_bound, Multipliers};
use super::relaxation::relaxation_multipliers;
use super::rounding::candidates;
use crate::error::Result;
use crate::matrix::IntMatrix;
use crate::model::ConvexCosts;

/// One instance as the bound sees it: the rows, the costs and the box tightened by the rows
/// ([`implied_box`]).
#[derive(Clone, Debug)]
pub struct BoundInstance<'a> {
    matrix: &'a IntMatrix,
    rhs: &'a [i64],
    cost: &'a [i64],
    convex: &'a ConvexCosts,
    ranges: Vec<Range>,
}

impl<'a> BoundInstance<'a> {
    /// The instance `min cost.x + convex(x), matrix x = rhs, lower <= x <= upper`.
    pub fn new(
        matrix: &'a IntMatrix,
        rhs: &'a [i64],
        (cost, convex): (&'a [i64], &'a ConvexCosts),
        lower: &[Option<i64>],
        upper: &[Option<i64>],
    ) -> Self {
        Self {
            matrix,
            rhs,
            cost,
            convex,
            ranges: implied_box(matrix, rhs, lower, upper),
        }
    }

    /// `L(y)` exactly over the tightened box; `None` for minus infinity.
    pub fn evaluate(&self, y: &Multipliers) -> Result<Option<BigRational>> {
        lagrangian_bound(
            self.matrix,
            self.rhs,
            self.cost,
            self.convex,
            &self.ranges,
            y,
        )
    }

    /// The floating-point multipliers of the LP relaxation over the tightened box.
    fn relaxation(&self) -> Option<Vec<f64>> {
        relaxation_multipliers(self.matrix, self.rhs, self.cost, self.convex, &self.ranges)
    }
}

/// A proven lower bound on the cost of every plan of an instance, with the multipliers that
/// prove it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct DualBound {
    /// The row multipliers `y`.
    pub multipliers: Multipliers,
    /// `L(y)`, exactly.
    pub value: BigRational,
}

impl DualBound {
    /// `ceil(L(y))`: plans cost integers, so no plan costs less.
    pub fn ceiling(&self) -> BigInt {
        self.value.ceil().to_integer()
    }

    /// True when the bound proves a plan of cost `objective` optimal.
    pub fn meets(&self, objective: i128) -> bool {
        self.ceiling() >= BigInt::from(objective)
    }

    /// `objective - ceil(L(y))`: how much a plan of cost `objective` could still be improved.
    pub fn gap(&self, objective: i128) -> BigInt {
        BigInt::from(objective) - self.ceiling()
    }
}

/// The best bound found for a plan of cost `objective`: `hint` first, then the LP
/// relaxation's multipliers rounded both ways; the search stops at the first bound that meets
/// `objective`. `None` when every candidate is minus infinity or the relaxation fails.
pub fn prove(
    instance: &BoundInstance<'_>,
    objective: i128,
    hint: Option<&Multipliers>,
) -> Result<Option<DualBound>> {
    let mut best: Option<DualBound> = None;
    let mut consider = |multipliers: Multipliers| -> Result<bool> {
        if let Some(value) = instance.evaluate(&multipliers)? {
            if best.as_ref().is_none_or(|b| value > b.value) {
                best = Some(DualBound { multipliers, value });
            }
        }
        Ok(best.as_ref().is_some_and(|b| b.meets(objective)))
    };
    if let Some(hint) = hint {
        if hint.numerators.len() == instance.matrix.rows() && consider(hint.clone())? {
            return Ok(best);
        }
    }
    if let Some(guess) = instance.relaxation() {
        for multipliers in candidates(&guess) {
            if consider(multipliers)? {
                break;
            }
        }
    }
    Ok(best)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_lane_plan_is_proven_optimal() {
        // The lane plan of the crate example: optimum 44 at (5, 2, 0, 4), and the lane
        // network's LP relaxation is integral (total unimodularity; Schrijver 1986, ch. 19).
        let a =
            IntMatrix::from_rows(&[vec![1, 1, 0, 0], vec![1, 0, 1, 0], vec![0, 1, 0, 1]]).unwrap();
        let convex = ConvexCosts::default();
        let lower = [Some(0); 4];
        let upper = [Some(5), None, Some(4), None];
        let instance = BoundInstance::new(&a, &[7, 5, 6], (&[4, 6, 5, 3], &convex), &lower, &upper);
        let bound = prove(&instance, 44, None).unwrap().expect("a finite bound");
        assert!(bound.meets(44));
        assert_eq!(bound.ceiling(), BigInt::from(44));
        assert_eq!(bound.gap(45), BigInt::from(1));
    }
}
