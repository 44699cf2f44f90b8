//! The file's own units: how the numbers kernstep solves with relate to the ones the model
//! file wrote, so that reports speak the file's language.
//!
//! kernstep always minimises an integer cost over integer columns. A model file may ask to
//! maximise, write costs with decimals or have rows that need added columns (the slacks of an
//! MPS file's `L` and `G` rows); its reader then solves an equivalent model and records the
//! translation here:
//!
//! - the model's cost is the file's cost times `10^cost_scale`, negated when the file
//!   maximises, so a model objective `v` is the file objective `-v / 10^cost_scale` (MAX) or
//!   `v / 10^cost_scale` (MIN), an exact decimal ([`Units::objective`]);
//! - the model's last [`Units::added_columns`] columns are the reader's own, never shown in a
//!   plan ([`Units::own`]); a plan read back ([`Units::complete_plan`]) gets them again from the
//!   rows.
//!
//! JSON and TOML models and scenarios are in their own units already: [`Units::default`]
//! (minimise, scale 0, no added columns) changes nothing.

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Signed;
use schemars::JsonSchema;

use super::Model;
use crate::error::{Error, Result};
use crate::trace::decimal::point_text;
use crate::trace::Decimal;

/// How a model's objective and columns relate to its file's (see the module documentation).
#[derive(
    Clone, Copy, Debug, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize, JsonSchema,
)]
pub struct Units {
    /// The file maximises; the model's cost is the file's negated.
    pub maximize: bool,
    /// The model's cost is the file's times `10^cost_scale`.
    pub cost_scale: u32,
    /// The model's last `added_columns` columns were added by the reader (slacks).
    pub added_columns: usize,
}

impl Units {
    /// Whether the model is in the file's own units (minimise, no scale, no added columns).
    pub fn is_identity(&self) -> bool {
        *self == Units::default()
    }

    /// The file's objective for the model objective `value`: negated for a maximising file,
    /// with `cost_scale` decimal places.
    pub fn objective(&self, value: i128) -> Result<Decimal> {
        let overflow = || Error::Overflow("the objective in the file's own units".into());
        let signed = match self.maximize {
            true => value.checked_neg().ok_or_else(overflow)?,
            false => value,
        };
        Decimal::scaled(signed, self.cost_scale).ok_or_else(overflow)
    }

    /// An objective value of the model given as a big integer (a dual bound), in the file's
    /// units: its exact decimal text.
    pub fn value_text(&self, value: &BigInt) -> String {
        let signed = if self.maximize { -value } else { value.clone() };
        point_text(&signed.to_string(), self.cost_scale)
    }

    /// A nonnegative difference of two model objectives (a gap) in the file's units: only the
    /// scale applies, a gap between a plan and its bound stays `>= 0` in either sense.
    pub fn gap_text(&self, gap: &BigInt) -> String {
        point_text(&gap.to_string(), self.cost_scale)
    }

    /// An objective value of the model given as a fraction, in the file's units, as a reduced
    /// fraction (`"-7/20"`), or an integer when it is one.
    pub fn fraction_text(&self, value: &BigRational) -> String {
        let scale = BigRational::from_integer(BigInt::from(10u8).pow(self.cost_scale));
        let file = value / scale;
        let file = if self.maximize { -file } else { file };
        file.to_string()
    }

    /// The gap `gap` between a plan of model objective `objective` and its bound, relative to
    /// the objective: `|gap| / max(1, |objective|)`, both taken in the file's units.
    pub fn relative_gap(&self, gap: &BigInt, objective: i128) -> f64 {
        let scale = 10f64.powi(self.cost_scale.min(300) as i32);
        let gap = num_traits::ToPrimitive::to_f64(&gap.abs()).unwrap_or(f64::INFINITY) / scale;
        let objective = objective.unsigned_abs() as f64 / scale;
        gap / objective.max(1.0)
    }

    /// The file's own columns of a per-column vector of the model (its leading entries).
    pub fn own<'a, T>(&self, all: &'a [T]) -> &'a [T] {
        &all[..all.len().saturating_sub(self.added_columns)]
    }

    /// A plan of `model` from its file's own columns `x` and the right-hand side `rhs` it
    /// meets: each added column is the one column of its row that `rhs` leaves to settle
    /// (a slack, coefficient `1` or `-1` in exactly one row). A plan that already has every
    /// column is returned as it is. `origin` names the plan's source in errors.
    pub fn complete_plan(
        &self,
        model: &Model,
        rhs: &[i64],
        x: Vec<i64>,
        origin: &str,
    ) -> Result<Vec<i64>> {
        let n = model.variables();
        let own = n.saturating_sub(self.added_columns);
        let bad = |message: String| Error::Input {
            file: origin.to_string(),
            field: "x".to_string(),
            message,
        };
        if x.len() == n || x.len() != own || rhs.len() != model.constraints() {
            return Ok(x);
        }
        let mut plan = x;
        for j in own..n {
            let rows: Vec<usize> = (0..model.constraints())
                .filter(|&i| model.matrix.get(i, j) != 0)
                .collect();
            let [row] = rows[..] else {
                return Err(bad(format!(
                    "column {} is not a slack of one row, so the plan needs every column",
                    model.variable_names[j]
                )));
            };
            let coefficient = model.matrix.get(row, j);
            let rest = (0..own).try_fold(i128::from(rhs[row]), |acc, k| {
                acc.checked_sub(i128::from(model.matrix.get(row, k)) * i128::from(plan[k]))
            });
            let value = rest
                .filter(|r| r % i128::from(coefficient) == 0)
                .and_then(|r| i64::try_from(r / i128::from(coefficient)).ok())
                .ok_or_else(|| {
                    bad(format!(
                        "row {} leaves no integer value for {}",
                        model.row_names[row], model.variable_names[j]
                    ))
                })?;
            plan.push(value);
        }
        Ok(plan)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::matrix::IntMatrix;

    fn units(maximize: bool, cost_scale: u32, added_columns: usize) -> Units {
        Units {
            maximize,
            cost_scale,
            added_columns,
        }
    }

    #[test]
    fn objectives_take_the_files_sense_and_places() {
        assert_eq!(
            units(true, 2, 0).objective(-1250).unwrap().to_string(),
            "12.50"
        );
        assert_eq!(
            units(false, 1, 0).objective(-125).unwrap().to_string(),
            "-12.5"
        );
        assert_eq!(units(true, 0, 0).objective(7).unwrap().to_string(), "-7");
        assert_eq!(Units::default().objective(7).unwrap().integer(), Some(7));
        assert!(units(true, 0, 0).objective(i128::MIN).is_err());
        assert!(units(false, 39, 0).objective(1).is_err());
    }

    #[test]
    fn bounds_and_gaps_take_the_files_sense_and_places() {
        let max = units(true, 1, 0);
        assert_eq!(max.value_text(&BigInt::from(-55)), "5.5");
        assert_eq!(max.gap_text(&BigInt::from(5)), "0.5");
        let value = BigRational::new(BigInt::from(-111), BigInt::from(2));
        assert_eq!(max.fraction_text(&value), "111/20");
        assert_eq!(Units::default().fraction_text(&value), "-111/2");
        assert!((max.relative_gap(&BigInt::from(5), -50) - 0.1).abs() < 1e-12);
    }

    #[test]
    fn slacks_leave_plans_and_come_back_from_the_rows() {
        // x + y + s = 10 (an L row), 2x - y - t = 1 (a G row).
        let matrix = IntMatrix::from_rows(&[vec![1, 1, 1, 0], vec![2, -1, 0, -1]]).unwrap();
        let mut model = Model::of_matrix(matrix);
        model.rhs = vec![10, 1];
        let slacks = units(false, 0, 2);
        assert_eq!(slacks.own(&[3, 4, 3, 1]), &[3, 4]);
        let plan = slacks
            .complete_plan(&model, &[10, 1], vec![3, 4], "p")
            .unwrap();
        assert_eq!(plan, vec![3, 4, 3, 1]);
        let whole = slacks.complete_plan(&model, &[10, 1], plan.clone(), "p");
        assert_eq!(whole.unwrap(), plan);
        model.matrix.set(1, 2, 1);
        let shared = slacks.complete_plan(&model, &[10, 1], vec![3, 4], "p");
        assert!(shared
            .unwrap_err()
            .to_string()
            .contains("x3 is not a slack"));
    }
}
