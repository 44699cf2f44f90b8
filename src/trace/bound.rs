//! A dual bound in the form of the `--json` documents and batch records.

use num_traits::ToPrimitive;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use crate::bound::DualBound;

/// What a dual bound proves about a plan of cost `objective`.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct BoundDoc {
    /// `ceil(L(y))`: no plan costs less (decimal string).
    pub value: String,
    /// `L(y)` as a reduced fraction.
    pub exact: String,
    /// `objective - value`: `"0"` proves the plan optimal.
    pub gap: String,
    /// `gap / max(1, |objective|)`.
    pub relative_gap: f64,
    /// Where the multipliers came from: `"lp_dual"`, the LP relaxation's dual, rounded.
    pub source: String,
    /// The row multipliers `y`, as reduced fractions.
    pub multipliers: Vec<String>,
}

impl BoundDoc {
    /// The document of `bound` for a plan of cost `objective`.
    pub fn of(bound: &DualBound, objective: i128) -> Self {
        let gap = bound.gap(objective);
        let scale = objective.unsigned_abs().max(1) as f64;
        BoundDoc {
            value: bound.ceiling().to_string(),
            exact: bound.value.to_string(),
            relative_gap: gap.to_f64().unwrap_or(f64::INFINITY) / scale,
            gap: gap.to_string(),
            source: "lp_dual".to_string(),
            multipliers: bound
                .multipliers
                .fractions()
                .iter()
                .map(ToString::to_string)
                .collect(),
        }
    }
}
