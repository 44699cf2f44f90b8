//! A dual bound in the form of the `--json` documents and batch records.

use num_bigint::BigInt;
use num_rational::BigRational;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use crate::bound::DualBound;
use crate::model::Units;

/// What a dual bound proves about a plan of cost `objective`, in the model file's own units
/// ([`Units`]): for a file that maximises, `value` and `exact` bound its objective from above.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct BoundDoc {
    /// `ceil(L(y))`: no plan costs less (decimal string).
    pub value: String,
    /// `L(y)` as a reduced fraction.
    pub exact: String,
    /// `|objective - value|`: `"0"` proves the plan optimal.
    pub gap: String,
    /// `gap / max(1, |objective|)`.
    pub relative_gap: f64,
    /// Where the multipliers came from: `"lp_dual"`, the LP relaxation's dual, rounded.
    pub source: String,
    /// The row multipliers `y` of the rows as the model holds them (an MPS file's rows
    /// scaled to integers, the objective minimised), as reduced fractions.
    pub multipliers: Vec<String>,
}

impl BoundDoc {
    /// The document of `bound` for a plan of cost `objective` (both the model's), written
    /// in `units`.
    pub fn of(bound: &DualBound, objective: i128, units: &Units) -> Self {
        let gap = bound.gap(objective);
        BoundDoc {
            value: units.value_text(&bound.ceiling()),
            exact: units.fraction_text(&bound.value),
            relative_gap: units.relative_gap(&gap, objective),
            gap: units.gap_text(&gap),
            source: "lp_dual".to_string(),
            multipliers: bound
                .multipliers
                .fractions()
                .iter()
                .map(ToString::to_string)
                .collect(),
        }
    }

    /// This document, written in the model's units (a trace document's), for a plan of
    /// cost `objective`, rewritten in `units`; `None` when its numbers do not parse.
    pub fn in_units(&self, objective: i128, units: &Units) -> Option<BoundDoc> {
        let value: BigInt = self.value.parse().ok()?;
        let exact: BigRational = self.exact.parse().ok()?;
        let gap: BigInt = self.gap.parse().ok()?;
        Some(BoundDoc {
            value: units.value_text(&value),
            exact: units.fraction_text(&exact),
            gap: units.gap_text(&gap),
            relative_gap: units.relative_gap(&gap, objective),
            ..self.clone()
        })
    }
}
