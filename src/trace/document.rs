//! A replayable record of one solve: the instance, the start point, every augmenting step
//! with its signed move, and the outcome with its re-check.
//!
//! Replaying needs nothing else: `start + sum(length * direction)` over the steps is the
//! final plan, each step's `before`/`after` is the violation (phase `feasibility`) or the cost
//! `c.x + sum_i p_i(x_i)` (phase `cost`; `c.x` without convex costs) of the points on either
//! side, and `gain = before - after`.
//!
//! Every number is the model's as kernstep solves it: for a model read from MPS, with the
//! slack columns, the cost scaled to integers and minimised ([`crate::model::Units`]). The
//! solve document and the words of `kernstep trace` give the file's own objective.

use std::collections::BTreeMap;

use augment::Coverage;
use augment::{Options, Phase, TraceStep};
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use super::bound::BoundDoc;
use super::certified::{solve_reported, Reported};
use super::decimal::Decimal;
use super::outcome::{sign_number, Outcome};
use super::recheck::Recheck;
use crate::error::{Error, Result};
use crate::model::{ConvexCosts, Model, Pieces, Units};
use crate::network::Step;
use crate::solve::{Numbers, Prepared, Verdict, WarmStart};

/// The `schema` value of documents of this layout.
pub const TRACE_SCHEMA: &str = "kernstep.trace/2";

/// The phase of an augmenting step.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum StepPhase {
    /// Phase I: lowering the total bound violation.
    Feasibility,
    /// Phase II: lowering the cost inside the box.
    Cost,
}

/// One augmenting step.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
pub struct StepRecord {
    /// 1-based step number over both phases.
    pub step: usize,
    /// The phase the step belongs to.
    pub phase: StepPhase,
    /// Index of the move in the set; `null` for a cycle of a network, whose set is implicit.
    pub move_index: Option<usize>,
    /// `1` or `-1`: the sign in which the move was applied.
    pub sign: i8,
    /// How many times the signed move was added (a decimal string).
    #[serde(with = "crate::trace::decimal::text")]
    #[schemars(with = "Decimal")]
    pub length: i64,
    /// The signed move (`sign` times the stored move), not yet scaled by `length`.
    pub direction: Vec<i64>,
    /// Violation or cost before the step.
    pub before: Decimal,
    /// Violation or cost after the step.
    pub after: Decimal,
    /// `before - after`, positive.
    pub gain: Decimal,
}

/// One variable's convex cost as written in model files: `breaks` and `slopes`.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
pub struct PiecesDoc {
    /// The breaks, increasing.
    pub breaks: Vec<i64>,
    /// The slopes, one more than the breaks, nondecreasing.
    pub slopes: Vec<i64>,
}

/// Everything needed to replay and re-check one solve.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
pub struct TraceDocument {
    /// Always [`TRACE_SCHEMA`].
    pub schema: String,
    /// Variable names, one per column.
    pub variables: Vec<String>,
    /// The instance's right-hand side.
    pub rhs: Vec<i64>,
    /// The instance's linear cost.
    pub cost: Vec<i64>,
    /// Convex costs added to the linear cost, by variable name (omitted when there are none).
    #[serde(default, skip_serializing_if = "BTreeMap::is_empty")]
    pub convex_cost: BTreeMap<String, PiecesDoc>,
    /// Lower bounds, `null` for none.
    pub lower: Vec<Option<i64>>,
    /// Upper bounds, `null` for none.
    pub upper: Vec<Option<i64>>,
    /// Number of moves in the set (each tried in both signs); `null` for a network, whose
    /// set (its cycles) is implicit.
    pub moves: Option<usize>,
    /// What the set guarantees.
    pub coverage: Coverage,
    /// The solver's integer start point, with `A x = b` (recovered exactly from the final point
    /// and the steps); `null` when there is none. Each value a decimal string.
    #[serde(with = "crate::trace::decimal::text_option_vec")]
    #[schemars(with = "Option<Vec<Decimal>>")]
    pub start: Option<Vec<i64>>,
    /// Every augmenting step, in order.
    pub steps: Vec<StepRecord>,
    /// The final point; `null` when there is no integer solution. Each value a decimal
    /// string.
    #[serde(with = "crate::trace::decimal::text_option_vec")]
    #[schemars(with = "Option<Vec<Decimal>>")]
    pub x: Option<Vec<i64>>,
    /// The cost at `x`, once phase II was reached.
    pub objective: Option<Decimal>,
    /// How the model relates to its file when it is not in the file's own units (an MPS
    /// file that maximises, writes costs with decimals or needed slack columns, which are
    /// the last `added_columns` variables); every other field is the model's, so that the
    /// trace replays exactly. Omitted for a model in its file's units.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub units: Option<Units>,
    /// `objective` in the file's own sense and units, when `units` is given.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub file_objective: Option<Decimal>,
    /// The total bound violation at `x`.
    pub violation: Option<Decimal>,
    /// How the solve ended.
    pub outcome: Outcome,
    /// The dual bound of a truncated set's plan (`null` for a complete set or a network).
    #[serde(default)]
    pub bound: Option<BoundDoc>,
    /// The independent re-check of the outcome's claim, when it makes one.
    pub recheck: Option<Recheck>,
    /// Wall-clock seconds of the augmentation.
    pub seconds: f64,
}

/// Solves `model` with the trace on (whatever `options` says) and records the document.
pub fn record(
    prepared: &Prepared,
    model: &Model,
    options: &Options,
    warm: Option<&WarmStart>,
    cancel: &dyn Fn() -> bool,
) -> Result<TraceDocument> {
    let Reported {
        verdict,
        recheck,
        outcome,
        bound,
    } = solve_reported(
        prepared,
        model,
        &options.trace(true),
        (warm, 0),
        &Units::default(),
        cancel,
    )?;
    let moves = prepared.moves();
    let mut document = TraceDocument {
        schema: TRACE_SCHEMA.to_string(),
        variables: model.variable_names.clone(),
        rhs: model.rhs.clone(),
        cost: model.cost.clone(),
        convex_cost: model
            .convex
            .iter()
            .map(|(i, p)| {
                let doc = PiecesDoc {
                    breaks: p.breaks().to_vec(),
                    slopes: p.slopes().to_vec(),
                };
                (model.variable_names[i].clone(), doc)
            })
            .collect(),
        lower: model.lower.clone(),
        upper: model.upper.clone(),
        moves: moves.map(augment::MoveSet::len),
        coverage: moves.map_or(Coverage::Complete, augment::MoveSet::coverage),
        start: None,
        steps: Vec::new(),
        x: None,
        objective: None,
        units: (!model.units.is_identity()).then_some(model.units),
        file_objective: None,
        violation: None,
        outcome,
        bound,
        recheck,
        seconds: 0.0,
    };
    // The options above ask for a trace, so the solution carries one.
    match (&verdict, moves) {
        (Verdict::Solved(solution), Some(moves)) => {
            let trace = solution.trace.as_deref().unwrap_or_default();
            document.steps = step_records(trace, moves);
            document.objective = solution.objective.map(Decimal::from);
        }
        (Verdict::Flow(f), _) => {
            let trace = f.solution.trace.as_deref().unwrap_or_default();
            document.steps = cycle_records(trace, model.variables())?;
            document.objective = verdict.optimum().map(|(cost, _)| Decimal::from(cost));
        }
        _ => {}
    }
    let model_objective = document.objective.and_then(Decimal::integer);
    if let (Some(units), Some(value)) = (document.units, model_objective) {
        document.file_objective = Some(units.objective(value)?);
    }
    if let Some(x) = verdict.point() {
        let problem = Numbers::of(model).problem()?;
        document.start = Some(start_of(x, &document.steps)?);
        document.x = Some(x.to_vec());
        document.violation = Some(Decimal::from(problem.violation(x)?));
        document.seconds = verdict.elapsed().as_secs_f64();
    }
    Ok(document)
}

impl TraceDocument {
    /// The cost `sum_i c_i x_i + p_i(x_i)` at `x` (convex costs included), or `None` when it
    /// does not fit in `i128` or a convex cost of the document is invalid.
    pub fn cost_at(&self, x: &[i64]) -> Option<i128> {
        let entries = self
            .convex_cost
            .iter()
            .map(|(name, doc)| {
                let variable = self.variables.iter().position(|n| n == name)?;
                let pieces = Pieces::new(doc.breaks.clone(), doc.slopes.clone()).ok()?;
                Some((variable, pieces))
            })
            .collect::<Option<Vec<_>>>()?;
        ConvexCosts::new(entries).value(&self.cost, x)
    }
}

/// The point the solver started from: the final point minus every step. Taken from the
/// solution itself, so it is the solver's own start whatever rounding chose it.
fn start_of(x: &[i64], steps: &[StepRecord]) -> Result<Vec<i64>> {
    let mut point = x.to_vec();
    for step in steps {
        for (v, &d) in point.iter_mut().zip(&step.direction) {
            *v = d
                .checked_mul(step.length)
                .and_then(|change| v.checked_sub(change))
                .ok_or_else(|| Error::Overflow("undoing a step to find the start point".into()))?;
        }
    }
    Ok(point)
}

fn step_records(trace: &[TraceStep], moves: &augment::MoveSet) -> Vec<StepRecord> {
    trace
        .iter()
        .enumerate()
        .map(|(i, s)| StepRecord {
            step: i + 1,
            phase: match s.phase {
                Phase::Feasibility => StepPhase::Feasibility,
                Phase::Optimality => StepPhase::Cost,
            },
            move_index: Some(s.move_index),
            sign: sign_number(s.sign),
            length: s.length,
            // A move set admits only moves whose l1 norm fits in i64, so no entry is
            // i64::MIN and negating cannot overflow.
            direction: moves
                .row(s.move_index)
                .iter()
                .map(|&v| v * s.sign.factor())
                .collect(),
            before: Decimal::from(s.before),
            after: Decimal::from(s.after),
            gain: Decimal::from(s.gain),
        })
        .collect()
}

/// The steps of a network solve: each a cycle of `width` columns pushed `amount` times.
fn cycle_records(trace: &[Step], width: usize) -> Result<Vec<StepRecord>> {
    trace
        .iter()
        .enumerate()
        .map(|(i, s)| {
            let length = i64::try_from(s.amount)
                .map_err(|_| Error::Overflow("the amount of a cycle step".into()))?;
            Ok(StepRecord {
                step: i + 1,
                phase: match s.phase {
                    Phase::Feasibility => StepPhase::Feasibility,
                    Phase::Optimality => StepPhase::Cost,
                },
                move_index: None,
                sign: 1,
                length,
                direction: s.cycle.vector(width),
                before: Decimal::from(s.before),
                after: Decimal::from(s.after),
                gain: Decimal::from(s.before - s.after),
            })
        })
        .collect()
}
