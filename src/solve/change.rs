//! The price of changing a plan: `sum_i w_i |x_i - p_i|` against a previous plan `p`, added to
//! the cost of a day so that today's optimum moves only the units worth moving.
//!
//! `w_i |x_i - p_i|` is a separable convex function of `x_i`, and a Graver basis is a test set
//! for separable convex objectives (Murota, Saito and Weismantel 2004; De Loera, Hemmecke and
//! Köppe 2013, on separable convex minimisation), so the same set serves priced days and the
//! certificate of optimality covers the whole objective. The price enters the convex costs of
//! the instance ([`Pieces`] with one break at `p_i` and slopes `-w_i, w_i`, added to a convex
//! cost the variable already has), so the solver, the dual bounds and the re-checks all see
//! it. A [`Pieces`] is 0 at `x = 0`, so it equals `w_i |x_i - p_i| - w_i |p_i|`: the solver's
//! objective is the whole objective less the constant `sum_i w_i |p_i|`
//! ([`ChangePrice::constant`]), which the reports add back.
//!
//! Engine rule: the network solver takes linear costs only, so a priced day of a network
//! matrix is served by the enumerated Graver basis (for a network matrix, its cycles); the
//! model to serve is [`ChangePrice::model_to_serve`].

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use super::variant::Numbers;
use crate::error::{Error, Result};
use crate::model::{ConvexCosts, Model, Pieces, VALUE_LIMIT};

/// A price per unit changed, one weight `w_i >= 0` per variable.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ChangePrice {
    weights: Vec<i64>,
}

/// One plan against the previous plan: what it costs and how much it changes.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
pub struct PlanFigures {
    /// The plan's own cost (linear and convex), without the change price.
    #[serde(with = "crate::trace::decimal::text")]
    #[schemars(with = "crate::trace::Decimal")]
    pub plan_cost: i128,
    /// `sum_i w_i |x_i - p_i|`.
    #[serde(with = "crate::trace::decimal::text")]
    #[schemars(with = "crate::trace::Decimal")]
    pub change_cost: i128,
    /// Variables whose value differs from the previous plan.
    pub changed: usize,
    /// Units moved: `sum_i |x_i - p_i|`.
    #[serde(with = "crate::trace::decimal::text")]
    #[schemars(with = "crate::trace::Decimal")]
    pub moved: u128,
}

/// The figures of a priced plan and, when asked for, of the plan without the price.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
pub struct Stability {
    /// The plan that minimises cost plus change price.
    pub priced: PlanFigures,
    /// The plan that minimises the cost alone, priced against the same previous plan.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub unpriced: Option<PlanFigures>,
}

impl ChangePrice {
    /// The same weight for each of `variables` variables; `origin` names where the weight
    /// came from in errors.
    pub fn uniform(weight: i64, variables: usize, origin: &str) -> Result<ChangePrice> {
        checked_weight(weight, origin, "change cost")?;
        Ok(ChangePrice {
            weights: vec![weight; variables],
        })
    }

    /// `default` for every variable of `model` but those its file prices itself
    /// ([`Model::change_cost`]); `origin` names where `default` came from in errors.
    pub fn of_model(model: &Model, default: i64, origin: &str) -> Result<ChangePrice> {
        let mut price = ChangePrice::uniform(default, model.variables(), origin)?;
        for &(i, w) in &model.change_cost {
            let slot = price.weights.get_mut(i).ok_or_else(|| {
                Error::Dimension(format!(
                    "a change cost names variable {i} of {}",
                    model.variables()
                ))
            })?;
            *slot = w;
        }
        Ok(price)
    }

    /// One weight per variable; `origin` names the file in errors, which give the entry.
    pub fn per_variable(weights: Vec<i64>, origin: &str) -> Result<ChangePrice> {
        for (i, &w) in weights.iter().enumerate() {
            checked_weight(w, origin, &format!("change_cost[{i}]"))?;
        }
        Ok(ChangePrice { weights })
    }

    /// The weights, one per variable.
    pub fn weights(&self) -> &[i64] {
        &self.weights
    }

    /// `convex` plus `w_i |x_i - p_i|` for every variable with a positive weight (see the
    /// module documentation for the constant it leaves out).
    pub fn priced(&self, convex: &ConvexCosts, previous: &[i64]) -> Result<ConvexCosts> {
        self.fits(previous.len(), "the previous plan")?;
        let mut entries = Vec::new();
        for (i, (&w, &p)) in self.weights.iter().zip(previous).enumerate() {
            let own = convex.get(i);
            let entry = match (w, own) {
                (0, None) => continue,
                (0, Some(own)) => own.clone(),
                (w, own) => {
                    let change = Pieces::new(vec![p], vec![-w, w]).map_err(|_| {
                        Error::Overflow(format!("the change price of variable {i}"))
                    })?;
                    match own {
                        None => change,
                        Some(own) => own.plus(&change).map_err(|_| {
                            Error::Overflow(format!(
                                "the convex cost of variable {i} with its change price"
                            ))
                        })?,
                    }
                }
            };
            entries.push((i, entry));
        }
        Ok(ConvexCosts::new(entries))
    }

    /// `sum_i w_i |p_i|`: the whole objective less the solver's, for a plan priced against
    /// `previous`; `None` if it does not fit in `i128`.
    pub fn constant(&self, previous: &[i64]) -> Option<i128> {
        self.weights
            .iter()
            .zip(previous)
            .try_fold(0i128, |sum, (&w, &p)| {
                sum.checked_add(i128::from(w).checked_mul(i128::from(p).abs())?)
            })
    }

    /// The figures of plan `x` of the instance `numbers` (without the price) against
    /// `previous`; `None` if a figure does not fit in 128 bits.
    pub fn figures(
        &self,
        numbers: Numbers<'_>,
        previous: &[i64],
        x: &[i64],
    ) -> Option<PlanFigures> {
        let plan_cost = numbers.convex.value(numbers.cost, x)?;
        let mut figures = PlanFigures {
            plan_cost,
            change_cost: 0,
            changed: 0,
            moved: 0,
        };
        for ((&w, &p), &v) in self.weights.iter().zip(previous).zip(x) {
            let step = (i128::from(v) - i128::from(p)).unsigned_abs();
            if step > 0 {
                figures.changed += 1;
                figures.moved = figures.moved.checked_add(step)?;
                let cost = i128::from(w).checked_mul(i128::try_from(step).ok()?)?;
                figures.change_cost = figures.change_cost.checked_add(cost)?;
            }
        }
        Some(figures)
    }

    /// The figures of the plan `x` a solve of `numbers` with this price against `previous`
    /// found at cost `cost` (the solver's objective), checked to add up: plan cost plus
    /// change cost is `cost` plus [`ChangePrice::constant`].
    pub fn priced_figures(
        &self,
        numbers: Numbers<'_>,
        previous: &[i64],
        (cost, x): (i128, &[i64]),
    ) -> Result<PlanFigures> {
        let whole = self
            .constant(previous)
            .and_then(|constant| cost.checked_add(constant));
        self.figures(numbers, previous, x)
            .filter(|f| whole.is_some() && f.plan_cost.checked_add(f.change_cost) == whole)
            .ok_or_else(|| Error::Overflow("the plan cost with its change price".into()))
    }

    /// `model` as the engine choice sees a priced day of it: its convex costs with the price
    /// against the zero plan. The network solver takes linear costs only, so a network matrix
    /// is then served by its enumerated Graver basis.
    pub fn model_to_serve(&self, model: &Model) -> Result<Model> {
        self.fits(model.variables(), "the model")?;
        Ok(Model {
            convex: self.priced(&model.convex, &vec![0; model.variables()])?,
            ..model.clone()
        })
    }

    /// Refuses `what` of `len` variables when the weights are for another number.
    fn fits(&self, len: usize, what: &str) -> Result<()> {
        if len == self.weights.len() {
            Ok(())
        } else {
            Err(Error::Dimension(format!(
                "{what} has {len} variables, the change price {}",
                self.weights.len()
            )))
        }
    }
}

/// Refuses a negative weight (the price would not be convex) or one beyond `2^62`.
fn checked_weight(weight: i64, origin: &str, field: &str) -> Result<()> {
    let message = if weight < 0 {
        format!("{weight} is negative; a change price must be 0 or more")
    } else if i128::from(weight) > VALUE_LIMIT {
        format!("{weight} is out of range (at most 2^62)")
    } else {
        return Ok(());
    };
    Err(Error::Input {
        file: origin.to_string(),
        field: field.to_string(),
        message,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_priced_cost_is_the_change_price_less_its_constant() {
        let own = Pieces::new(vec![2], vec![0, 3]).unwrap();
        let convex = ConvexCosts::new(vec![(1, own.clone())]);
        let price = ChangePrice::per_variable(vec![4, 2, 0], "test").unwrap();
        let previous = [-3, 5, 7];
        let priced = price.priced(&convex, &previous).unwrap();
        let constant = price.constant(&previous).unwrap();
        assert_eq!(constant, 4 * 3 + 2 * 5);
        let cost = [1, -1, 2];
        for x0 in -6..=6 {
            for x1 in -2..=9 {
                let x = [x0, x1, 4];
                let whole = convex.value(&cost, &x).unwrap()
                    + 4 * i128::from((x0 + 3).abs())
                    + 2 * i128::from((x1 - 5).abs());
                assert_eq!(priced.value(&cost, &x).unwrap() + constant, whole, "{x:?}");
            }
        }
    }

    #[test]
    fn figures_count_the_changes() {
        let model = Model::of_matrix(crate::IntMatrix::from_rows(&[vec![1, 1, 1]]).unwrap());
        let numbers = Numbers {
            cost: &[2, 3, 1],
            ..Numbers::of(&model)
        };
        let price = ChangePrice::uniform(5, 3, "test").unwrap();
        let figures = price.figures(numbers, &[4, 0, 2], &[1, 0, 5]).unwrap();
        assert_eq!(
            figures,
            PlanFigures {
                plan_cost: 2 + 5,
                change_cost: 5 * 6,
                changed: 2,
                moved: 6,
            }
        );
    }

    #[test]
    fn negative_weights_are_refused_by_entry() {
        let err = ChangePrice::per_variable(vec![1, -2], "m.toml").unwrap_err();
        assert_eq!(
            err.to_string(),
            "m.toml: change_cost[1]: -2 is negative; a change price must be 0 or more"
        );
    }
}
