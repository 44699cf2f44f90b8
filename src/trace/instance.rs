//! One instance ready to solve: a model (with a variant's numbers), the set that serves it,
//! prepared once, where the solve starts and the solver settings; solved into a solve
//! document or a trace.

use augment::Options;

use super::document::{record, TraceDocument};
use super::solve_doc::{solve_document, ChangeContext, SolveContext, SolveDocument};
use crate::error::{Error, Result};
use crate::model::Model;
use crate::scenario::{CurvePiece, StabilityCurve};
use crate::solve::{ChangePrice, Numbers, Prepared, WarmStart};
use crate::testset::Served;

/// A model variant ready to solve.
#[non_exhaustive]
pub struct Instance {
    /// The model with the variant's numbers (compiled from a scenario and its day).
    pub model: Model,
    /// The model or scenario file, as documents name it.
    pub path: String,
    /// The variant's id (a scenario's day name), when one was applied.
    pub variant: Option<String>,
    /// The previous plan the solve starts from.
    pub warm: Option<WarmStart>,
    /// Without a warm start, for a variant of a network model: the optimum of the model's
    /// own numbers, where the solve starts (as a batch of days does).
    pub base: Option<WarmStart>,
    /// The moves and where they came from.
    pub set: Served,
    /// The Hermite form and move set of the matrix.
    pub prepared: Prepared,
    /// The solver settings.
    pub options: Options,
    /// A price per unit changed against the warm start's plan.
    pub change: Option<ChangePrice>,
    /// With a change price, also solve without it and report the unpriced plan's figures.
    pub compare: bool,
}

impl Instance {
    /// `model` (read from `path`) served by `set`, which is prepared here; a cold start.
    pub fn new(model: Model, path: &str, set: Served, options: Options) -> Result<Instance> {
        let prepared = set.prepare(&model.matrix)?;
        Ok(Instance {
            model,
            path: path.to_string(),
            variant: None,
            warm: None,
            base: None,
            set,
            prepared,
            options,
            change: None,
            compare: false,
        })
    }

    /// Prices every unit changed against the warm start's plan with `price` (a solve without
    /// a warm start is then refused); `compare` also solves without the price. The set must
    /// serve convex costs: [`ChangePrice::model_to_serve`] is the model to serve.
    pub fn priced(mut self, price: ChangePrice, compare: bool) -> Instance {
        self.change = Some(price);
        self.compare = compare;
        self
    }

    /// Starts from `warm`, a previous plan (checked against the model by its reader).
    pub fn warm_start(mut self, warm: WarmStart) -> Instance {
        self.warm = Some(warm);
        self
    }

    /// Names the instance as variant `id` of `original` (the model with its own numbers).
    /// Without a warm start (give it first), a network variant then starts from the optimum
    /// of `original`, as the days of a batch do.
    pub fn variant_of(
        mut self,
        id: String,
        original: &Model,
        cancel: &dyn Fn() -> bool,
    ) -> Instance {
        if self.warm.is_none() {
            self.base = self.prepared.base_start(original, &self.options, cancel);
        }
        self.variant = Some(id);
        self
    }

    /// The start the solve takes: the warm start, else the base optimum, else none (cold).
    pub fn start(&self) -> Option<&WarmStart> {
        self.warm.as_ref().or(self.base.as_ref())
    }

    /// The price of stability of this instance against the warm start's plan: the plans
    /// optimal for the change prices `λ w`, `0 <= λ <= top`, `w` the change price given
    /// ([`Instance::priced`]), exactly (see [`StabilityCurve`]).
    pub fn stability_curve(&self, top: i64) -> Result<Vec<CurvePiece>> {
        let (Some(unit), Some(previous)) = (&self.change, &self.warm) else {
            return Err(Error::Unsupported(
                "a stability curve needs a change price and the previous plan (a warm start)"
                    .into(),
            ));
        };
        let curve = StabilityCurve {
            prepared: &self.prepared,
            matrix: &self.model.matrix,
            numbers: Numbers::of(&self.model),
            previous,
            unit,
            options: &self.options,
        };
        curve.pieces(top)
    }

    /// The instance as a solve document names it.
    pub fn context(&self) -> SolveContext<'_> {
        SolveContext {
            model: &self.path,
            variant: self.variant.as_deref(),
            warm: self.warm.as_ref(),
            base: self.base.as_ref(),
            set: &self.set,
            change: self.change.as_ref().map(|price| ChangeContext {
                price,
                compare: self.compare,
            }),
        }
    }

    /// Solves, certifies and records the solve document ([`solve_document`]).
    pub fn solve(&self, cancel: &dyn Fn() -> bool) -> Result<SolveDocument> {
        let context = self.context();
        solve_document(&self.prepared, &self.model, &self.options, context, cancel)
    }

    /// Solves with the trace on and records every step ([`record`]).
    pub fn trace(&self, cancel: &dyn Fn() -> bool) -> Result<TraceDocument> {
        record(
            &self.prepared,
            &self.model,
            &self.options,
            self.start(),
            cancel,
        )
    }
}
