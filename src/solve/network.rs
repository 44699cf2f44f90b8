//! Solving instances of a network matrix with the network solver: the same numbers and warm
//! starts as the test-set path, answered by cycles found in the residual network
//! ([`crate::network`]) instead of a scan over stored moves.

use std::time::Instant;

use super::instance::{Attempt, FlowAnswer, Verdict};
use super::variant::Numbers;
use crate::error::{Error, Result};
use crate::matrix::IntMatrix;
use crate::network::{FlowOptions, Network, Warm};

/// A network matrix with its detected network.
#[derive(Clone, Debug)]
pub(super) struct NetworkEngine {
    matrix: IntMatrix,
    network: Network,
}

impl NetworkEngine {
    pub(super) fn new(a: &IntMatrix, network: Network) -> Self {
        Self {
            matrix: a.clone(),
            network,
        }
    }

    pub(super) fn network(&self) -> &Network {
        &self.network
    }

    /// Solves one instance; the step limit and the trace setting come from `options` (the
    /// selection rule is the solver's own: cheapest cycles by shortest paths).
    pub(super) fn solve_numbers(
        &self,
        numbers: Numbers<'_>,
        attempt: Attempt<'_>,
    ) -> Result<Verdict> {
        if !numbers.convex.is_empty() {
            return Err(Error::Unsupported(
                "the network solver takes linear costs only; a model with convex costs is solved with its enumerated Graver basis".into(),
            ));
        }
        if let Some(w) = attempt.warm {
            w.check(&self.matrix, "warm start")?;
        }
        let started = Instant::now();
        let warm = attempt.warm.map(|w| Warm {
            flow: &w.x,
            potentials: w.potentials.as_deref(),
        });
        let flow_options = FlowOptions::default()
            .max_steps(attempt.options.step_limit())
            .trace(attempt.options.records_trace());
        let solution =
            self.network
                .solve(numbers.linear_flow(), warm, &flow_options, attempt.cancel)?;
        Ok(Verdict::Flow(FlowAnswer {
            solution,
            elapsed: started.elapsed(),
        }))
    }
}
