//! The per-matrix state every instance of a model shares, whichever solver serves it: a test
//! set of moves (the Graver basis, complete or truncated) with its lattice data, or, for a
//! network matrix, the network itself, whose cycles are its Graver basis.

use std::sync::Arc;

use augment::{Coverage, Options, Status};

use super::instance::{Attempt, MoveEngine, Verdict, WarmStart};
use super::network::NetworkEngine;
use super::variant::Numbers;
use crate::bound::{prove, DualBound, Multipliers};
use crate::completion::ElementSet;
use crate::error::Result;
use crate::matrix::IntMatrix;
use crate::model::Model;
use crate::network::Network;

/// What is computed once per matrix and shared by every instance of it.
#[derive(Clone, Debug)]
pub struct Prepared {
    engine: Engine,
}

#[derive(Clone, Debug)]
enum Engine {
    Moves(Box<MoveEngine>),
    Network(Arc<NetworkEngine>),
}

impl Prepared {
    /// Prepares `a` with its test set `set`, whose coverage is `coverage`.
    pub fn new(a: &IntMatrix, set: &ElementSet, coverage: Coverage) -> Result<Self> {
        let moves = set.moves(coverage)?;
        Self::with_moves(a, Arc::new(moves))
    }

    /// Prepares `a` with its test set already in the solver's form (shared, not copied).
    pub fn with_moves(a: &IntMatrix, moves: Arc<augment::MoveSet>) -> Result<Self> {
        Ok(Self {
            engine: Engine::Moves(Box::new(MoveEngine::new(a, moves)?)),
        })
    }

    /// Prepares the network matrix `a`, detected as `network`: its test set is implicit (the
    /// cycles of the network), and every solve runs the network solver.
    pub fn network(a: &IntMatrix, network: Network) -> Self {
        Self {
            engine: Engine::Network(Arc::new(NetworkEngine::new(a, network))),
        }
    }

    /// Records that the set was truncated to the box `widths` (`|g_i| <= widths[i]`): it is a
    /// test set only for instances whose ranges `u_i - l_i` fit inside, and any other instance
    /// is refused with [`crate::Error::BeyondSetBox`] instead of being given an unfounded
    /// "optimal". A network's implicit set is complete, so there it changes nothing.
    pub fn with_box_limit(mut self, widths: Option<Vec<u64>>) -> Self {
        if let Engine::Moves(engine) = &mut self.engine {
            engine.set_box_limit(widths);
        }
        self
    }

    /// The moves as the solver sees them; `None` for a network, whose set is implicit.
    pub fn moves(&self) -> Option<&augment::MoveSet> {
        match &self.engine {
            Engine::Moves(engine) => Some(engine.moves()),
            Engine::Network(_) => None,
        }
    }

    /// The independent re-check of the moves (see [`crate::trace::recheck`]);
    /// `None` for a network, whose verdicts carry their own certificates.
    pub fn checker(&self) -> Option<&augment::Checker> {
        match &self.engine {
            Engine::Moves(engine) => Some(engine.checker()),
            Engine::Network(_) => None,
        }
    }

    /// The network, when the matrix is one and is solved as one.
    pub fn network_of(&self) -> Option<&Network> {
        match &self.engine {
            Engine::Moves(_) => None,
            Engine::Network(engine) => Some(engine.network()),
        }
    }

    /// For a network, the optimum of `model`'s own numbers with its potentials, from which
    /// every variant of `model` (a day that changes a few of its numbers) starts: the network
    /// solver's fast path. `None` for a set of moves, whose cold starts are already rounded
    /// into the box, or when the model's own numbers have no optimum.
    pub fn base_start(
        &self,
        model: &Model,
        options: &Options,
        cancel: &dyn Fn() -> bool,
    ) -> Option<WarmStart> {
        self.network_of()?;
        let verdict = self.solve(model, options, None, cancel).ok()?;
        let (_, flow) = verdict.optimum()?;
        Some(WarmStart {
            rhs: model.rhs.clone(),
            x: flow.to_vec(),
            potentials: verdict.potentials().map(<[i64]>::to_vec),
        })
    }

    /// A proven lower bound for the plan of `verdict`, when the set is norm-truncated and the
    /// solve ended at a plan no move of the set improves (a complete set, or a network, needs
    /// none): `hint` (the multipliers of a related instance) is tried first, then the LP
    /// relaxation of `numbers` (see [`crate::bound::prove`]). `None` when no finite bound
    /// was found.
    pub fn bound(
        &self,
        numbers: Numbers<'_>,
        verdict: &Verdict,
        hint: Option<&Multipliers>,
    ) -> Result<Option<DualBound>> {
        let Engine::Moves(engine) = &self.engine else {
            return Ok(None);
        };
        match verdict {
            Verdict::Solved(s) if matches!(s.status, Status::OptimalForMovesUpTo(_)) => {
                let Some(objective) = s.objective else {
                    return Ok(None);
                };
                prove(&numbers.bound_instance(engine.matrix()), objective, hint)
            }
            _ => Ok(None),
        }
    }

    /// The multipliers of the best dual bound of `model`'s own numbers, the hint for the
    /// bounds of its variants (days that change a few of its numbers keep most of its
    /// prices); `None` for a complete set or a network, which need no bound, or when there is
    /// no finite bound.
    pub fn base_multipliers(&self, model: &Model) -> Option<Multipliers> {
        let Engine::Moves(engine) = &self.engine else {
            return None;
        };
        if !matches!(engine.moves().coverage(), Coverage::NormTruncated { .. }) {
            return None;
        }
        let instance = Numbers::of(model).bound_instance(&model.matrix);
        let best = prove(&instance, i128::MAX, None).ok()??;
        Some(best.multipliers)
    }

    /// Solves `model` (whose matrix is the prepared one), from `warm` if given.
    pub fn solve(
        &self,
        model: &Model,
        options: &Options,
        warm: Option<&WarmStart>,
        cancel: &dyn Fn() -> bool,
    ) -> Result<Verdict> {
        self.solve_numbers(Numbers::of(model), options, warm, cancel)
    }

    /// Solves the instance with these numbers of the prepared matrix, from `warm` if given.
    pub fn solve_numbers(
        &self,
        numbers: Numbers<'_>,
        options: &Options,
        warm: Option<&WarmStart>,
        cancel: &dyn Fn() -> bool,
    ) -> Result<Verdict> {
        let attempt = Attempt {
            options,
            warm,
            cancel,
        };
        match &self.engine {
            Engine::Moves(engine) => engine.solve_numbers(numbers, attempt),
            Engine::Network(engine) => engine.solve_numbers(numbers, attempt),
        }
    }
}
