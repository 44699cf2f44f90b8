//! The document of one certified solve (`solve --json`), its writer and its reader, and the
//! warm start read back from it (or from a trace document).

use augment::Coverage;
use schemars::JsonSchema;
use serde::{Deserialize, Serialize};

use super::bound::BoundDoc;
use super::certified::{solve_reported, Reported};
use super::decimal::Decimal;
use super::document::TRACE_SCHEMA;
use super::outcome::Outcome;
use super::recheck::Recheck;
use crate::error::{Error, Result};
use crate::model::Model;
use crate::solve::{ChangePrice, Numbers, Prepared, Stability, Verdict, WarmStart};
use crate::testset::{Served, Source};

/// The `schema` value of solve documents.
pub const SOLVE_SCHEMA: &str = "kernstep.solve/2";

/// The schema values of earlier solve and trace documents, still read as warm starts (they
/// wrote plan values as JSON numbers).
const EARLIER_SCHEMAS: [&str; 2] = ["kernstep.solve/1", "kernstep.trace/1"];

/// Augmenting steps per phase.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
pub struct StepCounts {
    /// Steps of phase I (towards the box).
    pub feasibility: u64,
    /// Steps of phase II (down the cost).
    pub cost: u64,
}

/// Where the moves of a solve came from.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize, JsonSchema)]
pub struct SetRecord {
    /// `cache`, `built`, `network` or `file`.
    pub source: String,
    /// The cache entry's digest in hex, for a cached set.
    pub digest: Option<String>,
    /// The set document's file, for a set read from one.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub file: Option<String>,
    /// Moves in the set (0 for a network's implicit cycles).
    pub moves: usize,
}

impl SetRecord {
    /// The record of `served`.
    pub fn of(served: &Served) -> Self {
        let (source, digest, file) = match &served.source {
            Source::Cached(d) => ("cache", Some(d.clone()), None),
            Source::Built => ("built", None, None),
            Source::Network => ("network", None, None),
            Source::File(path) => ("file", None, Some(path.clone())),
        };
        SetRecord {
            source: source.to_string(),
            digest,
            file,
            moves: served.moves.len(),
        }
    }
}

/// Which instance a solve document is about, as the caller named it.
#[derive(Clone, Copy, Debug)]
pub struct SolveContext<'a> {
    /// The model or scenario file.
    pub model: &'a str,
    /// The variant's id (a scenario's day), when one was applied.
    pub variant: Option<&'a str>,
    /// The start given by the caller (a previous plan), if any.
    pub warm: Option<&'a WarmStart>,
    /// Where the solve starts when no previous plan is given (a network variant starts from
    /// the optimum of the model's own numbers), if anywhere but cold.
    pub base: Option<&'a WarmStart>,
    /// The set that serves the solve.
    pub set: &'a Served,
    /// A price per unit changed against the warm start's plan, if any.
    pub change: Option<ChangeContext<'a>>,
}

/// A change price for one solve: the plan minimises its cost plus the price against the
/// previous plan (the warm start, which it needs).
#[derive(Clone, Copy, Debug)]
pub struct ChangeContext<'a> {
    /// The price.
    pub price: &'a ChangePrice,
    /// Also solve without the price and give the unpriced plan's figures.
    pub compare: bool,
}

/// One certified solve: the outcome, the plan and its cost, the dual bound of a partial
/// set's plan and the independent re-check.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, JsonSchema)]
#[non_exhaustive]
pub struct SolveDocument {
    /// Always [`SOLVE_SCHEMA`].
    pub schema: String,
    /// The model or scenario file.
    pub model: String,
    /// The variant's id, when one was applied.
    pub variant: Option<String>,
    /// Whether the solve started from a previous plan.
    pub warm_start: bool,
    /// How the solve ended.
    pub status: Outcome,
    /// The dual bound of a partial set's plan.
    pub bound: Option<BoundDoc>,
    /// The cost at `x`, once inside the box, in the model file's own sense and units
    /// ([`crate::model::Units`]: a maximising MPS file's maximum, with its decimals).
    pub objective: Option<Decimal>,
    /// The total bound violation at `x`.
    pub violation: Option<Decimal>,
    /// The point reached (`null` without an integer solution), over the file's own columns
    /// (an MPS file's slacks left out), each value a decimal string.
    #[serde(with = "crate::trace::decimal::text_option_vec")]
    #[schemars(with = "Option<Vec<Decimal>>")]
    pub x: Option<Vec<i64>>,
    /// The instance's right-hand side, as the model holds it (an MPS file's rows scaled to
    /// integers).
    pub rhs: Vec<i64>,
    /// Variable names, one per entry of `x`.
    pub variables: Vec<String>,
    /// Steps per phase.
    pub steps: StepCounts,
    /// Wall-clock seconds of the augmentation.
    pub seconds: f64,
    /// What the set guarantees.
    pub coverage: Coverage,
    /// Where the moves came from.
    pub set: SetRecord,
    /// The independent re-check of the outcome's claim, when it makes one.
    pub recheck: Option<Recheck>,
    /// With a change price: the plan cost and change cost apart, variables changed and units
    /// moved (and the same for the unpriced plan, when compared). `objective` and `bound`
    /// are then those of the whole objective.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub change: Option<Stability>,
}

/// Solves `model` with `prepared` from the context's start, certifies the verdict
/// ([`super::certify`]) and records the document.
pub fn solve_document(
    prepared: &Prepared,
    model: &Model,
    options: &augment::Options,
    context: SolveContext<'_>,
    cancel: &dyn Fn() -> bool,
) -> Result<SolveDocument> {
    let start = context.warm.or(context.base);
    let priced = match (context.change, context.warm) {
        (None, _) => None,
        (Some(change), Some(warm)) => Some(PricedSolve::new(model, change, &warm.x)?),
        (Some(_), None) => {
            return Err(Error::Unsupported(
                "a change price needs the previous plan: give a warm start".into(),
            ))
        }
    };
    let solved = priced.as_ref().map_or(model, |p| &p.model);
    let constant = priced.as_ref().map_or(0, |p| p.constant);
    let Reported {
        verdict,
        recheck,
        outcome,
        bound,
    } = solve_reported(
        prepared,
        solved,
        options,
        (start, constant),
        &model.units,
        cancel,
    )?;
    let (x, objective, violation) = reached(solved, &verdict)?;
    let objective = objective
        .map(|o| o.checked_add(constant).ok_or_else(too_large))
        .transpose()?;
    let change = match &priced {
        Some(p) => p.stability(prepared, options, &verdict, (start, cancel))?,
        None => None,
    };
    let (feasibility, cost) = verdict.steps();
    let units = &model.units;
    Ok(SolveDocument {
        schema: SOLVE_SCHEMA.to_string(),
        model: context.model.to_string(),
        variant: context.variant.map(String::from),
        warm_start: context.warm.is_some(),
        status: outcome,
        bound,
        objective: objective.map(|o| units.objective(o)).transpose()?,
        violation: violation.map(Decimal::from),
        x: x.map(|x| units.own(&x).to_vec()),
        rhs: model.rhs.clone(),
        variables: units.own(&model.variable_names).to_vec(),
        steps: StepCounts { feasibility, cost },
        seconds: verdict.elapsed().as_secs_f64(),
        coverage: context.set.coverage,
        set: SetRecord::of(context.set),
        recheck,
        change,
    })
}

/// The overflow of a cost with its change price.
fn too_large() -> Error {
    Error::Overflow("the plan cost with its change price".into())
}

/// One solve with a change price: the priced model and what the figures need.
struct PricedSolve<'a> {
    /// The model with the price in its convex costs.
    model: Model,
    /// The model without it.
    plain: &'a Model,
    change: ChangeContext<'a>,
    previous: &'a [i64],
    /// The whole objective less the solver's.
    constant: i128,
}

impl<'a> PricedSolve<'a> {
    fn new(plain: &'a Model, change: ChangeContext<'a>, previous: &'a [i64]) -> Result<Self> {
        Ok(PricedSolve {
            model: Model {
                convex: change.price.priced(&plain.convex, previous)?,
                ..plain.clone()
            },
            plain,
            change,
            previous,
            constant: change.price.constant(previous).ok_or_else(too_large)?,
        })
    }

    /// The figures of the priced plan of `verdict` (none without a plan) and, compared,
    /// of the certified unpriced plan from the same start.
    fn stability(
        &self,
        prepared: &Prepared,
        options: &augment::Options,
        verdict: &Verdict,
        (start, cancel): (Option<&WarmStart>, &dyn Fn() -> bool),
    ) -> Result<Option<Stability>> {
        let Some(optimum) = verdict.optimum() else {
            return Ok(None);
        };
        let (price, numbers) = (self.change.price, Numbers::of(self.plain));
        let priced = price.priced_figures(numbers, self.previous, optimum)?;
        let unpriced = if self.change.compare {
            let plain = solve_reported(
                prepared,
                self.plain,
                options,
                (start, 0),
                &self.plain.units,
                cancel,
            )?;
            plain
                .verdict
                .optimum()
                .and_then(|(_, x)| price.figures(numbers, self.previous, x))
        } else {
            None
        };
        Ok(Some(Stability { priced, unpriced }))
    }
}

/// The point `verdict` reached with its cost (once inside the box) and violation, evaluated
/// on the instance's own numbers.
type Reached = (Option<Vec<i64>>, Option<i128>, Option<i128>);

fn reached(model: &Model, verdict: &Verdict) -> Result<Reached> {
    let Some(x) = verdict.point() else {
        return Ok((None, None, None));
    };
    let problem = Numbers::of(model).problem()?;
    let violation = problem.violation(x)?;
    let objective = match verdict {
        Verdict::Solved(s) => s.objective,
        _ if violation == 0 => Some(problem.objective().value(x)?),
        _ => None,
    };
    Ok((Some(x.to_vec()), objective, Some(violation)))
}

/// The fields of a solve or trace document that a warm start uses.
#[derive(Deserialize)]
struct PreviousPlan {
    schema: String,
    rhs: Vec<i64>,
    #[serde(default, with = "crate::trace::decimal::text_option_vec")]
    x: Option<Vec<i64>>,
}

/// The plan of a previous solve (or trace) document `text`, checked against `model`
/// (`A x = rhs`); `origin` names the document in errors. A plan of the file's own columns (a
/// solve document of an MPS model) gets its slacks back from the rows
/// ([`crate::model::Units::complete_plan`]).
pub fn read_warm_start(text: &str, origin: &str, model: &Model) -> Result<WarmStart> {
    let bad = |field: &str, message: String| Error::Input {
        file: origin.to_string(),
        field: field.to_string(),
        message,
    };
    let previous: PreviousPlan = serde_json::from_str(text).map_err(|e| {
        bad(
            "document",
            format!("{e}; expected a solve document ({SOLVE_SCHEMA}) or a trace document ({TRACE_SCHEMA})"),
        )
    })?;
    let known = [SOLVE_SCHEMA, TRACE_SCHEMA].contains(&previous.schema.as_str())
        || EARLIER_SCHEMAS.contains(&previous.schema.as_str());
    if !known {
        return Err(bad(
            "schema",
            format!(
                "{:?} is neither {SOLVE_SCHEMA:?} nor {TRACE_SCHEMA:?}",
                previous.schema
            ),
        ));
    }
    let Some(x) = previous.x else {
        return Err(bad(
            "x",
            "the previous solve has no plan to start from".to_string(),
        ));
    };
    let x = model.units.complete_plan(model, &previous.rhs, x, origin)?;
    let warm = WarmStart {
        rhs: previous.rhs,
        x,
        potentials: None,
    };
    warm.check(&model.matrix, origin)?;
    Ok(warm)
}
