//! The two phases of a network solve, each a sequence of cycles pushed by integer amounts.
//!
//! The state is a flow that balances every node (so `A x = b` holds throughout) and node
//! potentials. An arc is *in kilter* when it lies within its bounds and its reduced cost has
//! the sign of an optimum: `>= 0` unless at the upper bound, `<= 0` unless at the lower one.
//! Each arc out of kilter is repaired in turn, as in the out-of-kilter method (Fulkerson 1961;
//! Ahuja, Magnanti, Orlin, "Network Flows", 1993, §9.11): a shortest-path search in the
//! residual network from the arc's head to its tail (for the direction the arc must move)
//! either closes a cycle with the arc, which is then pushed, or moves the potentials far
//! enough to put the arc in kilter. The potential update keeps every arc already in kilter in
//! kilter, so one pass over the arcs per phase suffices.
//!
//! - Phase I repairs the arcs outside their bounds, each by cycles that move it towards them
//!   and move no other arc away from its bounds: the total violation falls by the amount of
//!   every step. When the search cannot reach the arc's tail, the nodes it reached form a
//!   [`Cut`] whose supply cannot leave through the arcs' capacities.
//! - Then, with a feasible flow, the cost is unbounded exactly when a negative cycle of arcs
//!   without the limiting bounds exists (see `unbounded.rs`).
//! - Phase II repairs the arcs whose reduced cost has the wrong sign; every cycle it pushes
//!   has negative cost, and the search for it stops once it cannot beat the arc's reduced
//!   cost. At the end every arc is in kilter: the flow is optimal and the potentials prove it.

use augment::Phase;

use super::graph::Network;
use super::input::{FlowNumbers, FlowOptions, Warm};
use super::outcome::{Cut, Cycle, CycleArc, FlowOutcome, FlowSolution, Infeasibility, Step};
use super::residual::Residual;
use super::search::{Reach, Search};
use super::start::{start, Start};
use super::unbounded::unbounded_cycle;
use crate::error::{Error, Result};

/// Why a phase stopped before its end.
enum Halt {
    StepLimit,
    Cancelled,
    Infeasible(Cut),
    Unbounded(Cycle),
}

/// One solve in progress.
struct Run<'a, 'c> {
    state: Residual<'a>,
    search: Search,
    options: &'c FlowOptions,
    cancel: &'c dyn Fn() -> bool,
    feasibility_steps: u64,
    optimality_steps: u64,
    searches: u64,
    trace: Option<Vec<Step>>,
}

impl Network {
    /// Solves `min c.x, A x = b, l <= x <= u` over this network for `numbers`, from `warm`
    /// (typically yesterday's optimum) or from a cold start. `cancel` is consulted before
    /// every augmentation. Outcomes are data; `Err` means an input (numbers or warm start) of
    /// the wrong length, or an integer overflow.
    pub fn solve(
        &self,
        numbers: FlowNumbers<'_>,
        warm: Option<Warm<'_>>,
        options: &FlowOptions,
        cancel: &dyn Fn() -> bool,
    ) -> Result<FlowSolution> {
        self.check_lengths(&numbers, warm.as_ref())?;
        let finished = |outcome| FlowSolution {
            outcome,
            feasibility_steps: 0,
            optimality_steps: 0,
            searches: 0,
            trace: options.traced().then(Vec::new),
        };
        let (lower, upper) = (numbers.lower, numbers.upper);
        if let Some(arc) =
            (0..lower.len()).find(|&j| matches!((lower[j], upper[j]), (Some(l), Some(u)) if l > u))
        {
            return Ok(finished(FlowOutcome::Infeasible(
                Infeasibility::EmptyRange { arc },
            )));
        }
        let (flow, potential) = match start(self, &numbers, warm)? {
            Start::Balanced { flow, potential } => (flow, potential),
            Start::Unbalanced(cut) => {
                return Ok(finished(FlowOutcome::Infeasible(Infeasibility::Cut(cut))));
            }
        };
        let mut run = Run {
            state: Residual {
                net: self,
                cost: numbers.cost,
                lower,
                upper,
                flow,
                potential,
            },
            search: Search::new(self.nodes()),
            options,
            cancel,
            feasibility_steps: 0,
            optimality_steps: 0,
            searches: 0,
            trace: options.traced().then(Vec::new),
        };
        let halt = match run.phase_one()? {
            Some(halt) => Some(halt),
            None => match unbounded_cycle(self, numbers.cost, lower, upper) {
                Some(cycle) => Some(Halt::Unbounded(cycle)),
                None => run.phase_two()?,
            },
        };
        run.finish(halt)
    }

    fn check_lengths(&self, numbers: &FlowNumbers<'_>, warm: Option<&Warm<'_>>) -> Result<()> {
        let arcs = self.arcs().len();
        let mut given = vec![
            ("rhs", numbers.rhs.len(), self.rows()),
            ("cost", numbers.cost.len(), arcs),
            ("lower", numbers.lower.len(), arcs),
            ("upper", numbers.upper.len(), arcs),
        ];
        if let Some(w) = warm {
            given.push(("warm flow", w.flow.len(), arcs));
            if let Some(y) = w.potentials {
                given.push(("warm potentials", y.len(), self.rows()));
            }
        }
        match given.into_iter().find(|&(_, len, want)| len != want) {
            None => Ok(()),
            Some((what, len, want)) => Err(Error::Dimension(format!(
                "network solve: {what} has {len} entries, the network needs {want}"
            ))),
        }
    }
}

impl Run<'_, '_> {
    fn phase_one(&mut self) -> Result<Option<Halt>> {
        let mut violation = self.state.violation()?;
        for j in 0..self.state.flow.len() {
            loop {
                let x = self.state.flow[j];
                let forward = if self.state.lower[j].is_some_and(|l| x < l) {
                    true
                } else if self.state.upper[j].is_some_and(|u| x > u) {
                    false
                } else {
                    break;
                };
                if let Some(halt) = self.may_step() {
                    return Ok(Some(halt));
                }
                let (a, b) = self.ends(j, forward);
                self.searches += 1;
                let Reach::Found(distance) = self.search.run(&self.state, b, a, j, None)? else {
                    return Ok(Some(Halt::Infeasible(self.reached_cut())));
                };
                self.search
                    .update_potentials(&mut self.state, i128::from(distance))?;
                let cycle = self.cycle(j, forward, a, b);
                let cap = self.state.violation_of(j);
                let amount = self.bottleneck(&cycle).map_or(cap, |room| room.min(cap));
                let before = violation;
                let old: i128 = cycle
                    .arcs
                    .iter()
                    .map(|c| self.state.violation_of(c.arc))
                    .sum();
                self.apply(&cycle, amount)?;
                let new: i128 = cycle
                    .arcs
                    .iter()
                    .map(|c| self.state.violation_of(c.arc))
                    .sum();
                violation = before - old + new;
                self.feasibility_steps += 1;
                self.record(Phase::Feasibility, cycle, amount, before, violation)?;
            }
        }
        Ok(None)
    }

    fn phase_two(&mut self) -> Result<Option<Halt>> {
        let mut objective = self.state.objective()?;
        for j in 0..self.state.flow.len() {
            loop {
                let reduced = self.state.reduced(j);
                let forward = if reduced < 0 && self.state.can_raise(j) {
                    true
                } else if reduced > 0 && self.state.can_lower(j) {
                    false
                } else {
                    break;
                };
                let (a, b) = self.ends(j, forward);
                let limit = reduced.abs();
                self.searches += 1;
                let distance = match self.search.run(&self.state, b, a, j, Some(limit))? {
                    Reach::Found(distance) => distance,
                    Reach::Limit | Reach::Exhausted => {
                        self.search.update_potentials(&mut self.state, limit)?;
                        continue;
                    }
                };
                if let Some(halt) = self.may_step() {
                    return Ok(Some(halt));
                }
                self.search
                    .update_potentials(&mut self.state, i128::from(distance))?;
                let cycle = self.cycle(j, forward, a, b);
                let Some(amount) = self.bottleneck(&cycle) else {
                    return Ok(Some(Halt::Unbounded(cycle)));
                };
                let rate = self.rate(&cycle);
                let before = objective;
                objective = rate
                    .checked_mul(amount)
                    .and_then(|d| before.checked_add(d))
                    .ok_or_else(|| Error::Overflow("network flow: objective".into()))?;
                self.apply(&cycle, amount)?;
                self.optimality_steps += 1;
                self.record(Phase::Optimality, cycle, amount, before, objective)?;
            }
        }
        Ok(None)
    }

    /// `(a, b)`: the move of arc `j` in direction `forward` runs from `a` to `b`.
    fn ends(&self, j: usize, forward: bool) -> (usize, usize) {
        let arc = self.state.net.arcs()[j];
        if forward {
            (arc.tail, arc.head)
        } else {
            (arc.head, arc.tail)
        }
    }

    /// The move of arc `j` followed by the path the last search found from `b` to `a`.
    fn cycle(&self, j: usize, forward: bool, a: usize, b: usize) -> Cycle {
        let mut arcs = vec![CycleArc { arc: j, forward }];
        arcs.extend(self.search.path_to(&self.state, b, a));
        Cycle { arcs }
    }

    /// The largest amount every move of the cycle allows; `None` when none limits it.
    fn bottleneck(&self, cycle: &Cycle) -> Option<i128> {
        cycle
            .arcs
            .iter()
            .filter_map(|c| self.state.room(c.arc, c.forward))
            .min()
    }

    /// The cost of pushing the cycle once.
    fn rate(&self, cycle: &Cycle) -> i128 {
        cycle
            .arcs
            .iter()
            .map(|c| {
                let cost = i128::from(self.state.cost[c.arc]);
                if c.forward {
                    cost
                } else {
                    -cost
                }
            })
            .sum()
    }

    fn apply(&mut self, cycle: &Cycle, amount: i128) -> Result<()> {
        for c in &cycle.arcs {
            self.state.push(c.arc, c.forward, amount)?;
        }
        Ok(())
    }

    fn record(
        &mut self,
        phase: Phase,
        cycle: Cycle,
        amount: i128,
        before: i128,
        after: i128,
    ) -> Result<()> {
        if let Some(trace) = &mut self.trace {
            let amount = u64::try_from(amount)
                .map_err(|_| Error::Overflow("network flow: step amount".into()))?;
            trace.push(Step {
                phase,
                cycle,
                amount,
                before,
                after,
            });
        }
        Ok(())
    }

    fn may_step(&self) -> Option<Halt> {
        if self.feasibility_steps + self.optimality_steps >= self.options.step_limit() {
            Some(Halt::StepLimit)
        } else if (self.cancel)() {
            Some(Halt::Cancelled)
        } else {
            None
        }
    }

    /// The cut of the nodes the last (exhausted) search reached, or of the others when the
    /// root is among them.
    fn reached_cut(&self) -> Cut {
        let net = self.state.net;
        let mut inside = vec![false; net.nodes()];
        for &v in self.search.settled() {
            inside[v] = true;
        }
        let keep = !inside[net.root()];
        let weights = (0..net.rows())
            .map(|i| {
                if inside[i] == keep {
                    net.row_signs()[i]
                } else {
                    0
                }
            })
            .collect();
        Cut { weights }
    }

    fn finish(self, halt: Option<Halt>) -> Result<FlowSolution> {
        let net = self.state.net;
        let flow = self.state.flow.clone();
        let outcome = match halt {
            Some(Halt::StepLimit) => FlowOutcome::StepLimit { flow },
            Some(Halt::Cancelled) => FlowOutcome::Cancelled { flow },
            Some(Halt::Infeasible(cut)) => FlowOutcome::Infeasible(Infeasibility::Cut(cut)),
            Some(Halt::Unbounded(cycle)) => FlowOutcome::Unbounded { flow, cycle },
            None => {
                let root = i128::from(self.state.potential[net.root()]);
                let potentials = (0..net.rows())
                    .map(|i| {
                        let y = (i128::from(self.state.potential[i]) - root)
                            * i128::from(net.row_signs()[i]);
                        i64::try_from(y).map_err(|_| {
                            Error::Overflow(format!("network flow: potential of row {i}"))
                        })
                    })
                    .collect::<Result<Vec<_>>>()?;
                FlowOutcome::Optimal {
                    objective: self.state.objective()?,
                    flow,
                    potentials,
                }
            }
        };
        Ok(FlowSolution {
            outcome,
            feasibility_steps: self.feasibility_steps,
            optimality_steps: self.optimality_steps,
            searches: self.searches,
            trace: self.trace,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::matrix::IntMatrix;
    use crate::network::certificate;
    use crate::network::examples::transport;

    fn solve(a: &IntMatrix, numbers: FlowNumbers<'_>, warm: Option<Warm<'_>>) -> FlowSolution {
        let net = Network::detect(a).unwrap();
        let options = FlowOptions::default().trace(true);
        let solution = net.solve(numbers, warm, &options, &|| false).unwrap();
        certificate::check(a, numbers, &solution.outcome).unwrap();
        solution
    }

    #[test]
    fn the_small_transport_plan_costs_8() {
        let a = transport();
        let numbers = FlowNumbers {
            rhs: &[3, 2, 1, 2, 2],
            cost: &[4, 1, 3, 2, 5, 1],
            lower: &[Some(0); 6],
            upper: &[None; 6],
        };
        let solution = solve(&a, numbers, None);
        let FlowOutcome::Optimal {
            objective, flow, ..
        } = &solution.outcome
        else {
            panic!("{:?}", solution.outcome);
        };
        assert_eq!(*objective, 8);
        let trace = solution.trace.as_ref().unwrap();
        assert_eq!(trace.len() as u64, solution.steps());
        for step in trace {
            assert!(step.after < step.before, "{step:?}");
            let g = step.cycle.vector(6);
            assert!(a.mul_vec(&g).unwrap().iter().all(|&v| v == 0), "{step:?}");
        }
        let warm = Warm {
            flow,
            potentials: None,
        };
        let again = solve(&a, numbers, Some(warm));
        assert_eq!(again.steps(), 0);
    }

    #[test]
    fn too_little_room_into_a_shop_is_a_cut() {
        let a = transport();
        let upper = [Some(1), Some(9), Some(9), Some(0), Some(9), Some(9)];
        let numbers = FlowNumbers {
            rhs: &[3, 2, 2, 2, 1],
            cost: &[1; 6],
            lower: &[Some(0); 6],
            upper: &upper,
        };
        let solution = solve(&a, numbers, None);
        let FlowOutcome::Infeasible(Infeasibility::Cut(cut)) = &solution.outcome else {
            panic!("{:?}", solution.outcome);
        };
        // Shop 0 (row 2) needs 2 and can receive 1: the cut parts it from the depots.
        assert_ne!(cut.rows().contains(&2), cut.rows().contains(&0), "{cut:?}");
    }

    #[test]
    fn a_free_negative_cycle_is_unbounded_and_an_empty_range_infeasible() {
        let a = transport();
        // Raising x_11 and x_00 while lowering x_01 and x_10 costs -6 and nothing limits it.
        let lower = [Some(0), None, Some(0), None, Some(0), Some(0)];
        let numbers = FlowNumbers {
            rhs: &[3, 2, 1, 2, 2],
            cost: &[1, 1, 1, 1, -5, 1],
            lower: &lower,
            upper: &[None; 6],
        };
        let solution = solve(&a, numbers, None);
        assert!(matches!(solution.outcome, FlowOutcome::Unbounded { .. }));
        let lower = [Some(0), Some(0), Some(0), Some(4), Some(0), Some(0)];
        let upper = [None, None, None, Some(3), None, None];
        let numbers = FlowNumbers {
            lower: &lower,
            upper: &upper,
            ..numbers
        };
        let solution = solve(&a, numbers, None);
        assert_eq!(
            solution.outcome,
            FlowOutcome::Infeasible(Infeasibility::EmptyRange { arc: 3 })
        );
    }

    #[test]
    fn zero_columns_follow_their_cost_and_isolated_rows_their_rhs() {
        // Column 1 is zero; row 1 touches no column.
        let a = IntMatrix::from_rows(&[vec![1, 0], vec![0, 0]]).unwrap();
        let numbers = FlowNumbers {
            rhs: &[4, 0],
            cost: &[1, -2],
            lower: &[Some(0), Some(-3)],
            upper: &[Some(9), Some(5)],
        };
        let solution = solve(&a, numbers, None);
        let FlowOutcome::Optimal {
            flow, objective, ..
        } = &solution.outcome
        else {
            panic!("{:?}", solution.outcome);
        };
        assert_eq!((flow.as_slice(), *objective), (&[4, 5][..], -6));
        let numbers = FlowNumbers {
            rhs: &[4, 1],
            ..numbers
        };
        let solution = solve(&a, numbers, None);
        let FlowOutcome::Infeasible(Infeasibility::Cut(cut)) = &solution.outcome else {
            panic!("{:?}", solution.outcome);
        };
        assert_eq!(cut.rows(), vec![1]);
        let numbers = FlowNumbers {
            rhs: &[4, 0],
            upper: &[Some(9), None],
            ..numbers
        };
        let solution = solve(&a, numbers, None);
        let FlowOutcome::Unbounded { cycle, .. } = &solution.outcome else {
            panic!("{:?}", solution.outcome);
        };
        assert_eq!(cycle.vector(2), vec![0, 1]);
    }

    #[test]
    fn the_step_limit_and_the_hook_stop_between_augmentations() {
        let a = transport();
        let net = Network::detect(&a).unwrap();
        // At most one unit per lane: the cheapest lanes cannot carry the plan alone.
        let numbers = FlowNumbers {
            rhs: &[3, 2, 1, 2, 2],
            cost: &[4, 1, 3, 2, 5, 1],
            lower: &[Some(0); 6],
            upper: &[Some(1); 6],
        };
        let full = net
            .solve(numbers, None, &FlowOptions::default(), &|| false)
            .unwrap();
        assert!(matches!(full.outcome, FlowOutcome::Optimal { .. }));
        assert!(full.steps() >= 1, "{full:?}");
        let limited = FlowOptions::default().max_steps(full.steps() - 1);
        let solution = net.solve(numbers, None, &limited, &|| false).unwrap();
        assert!(matches!(solution.outcome, FlowOutcome::StepLimit { .. }));
        assert_eq!(solution.steps(), full.steps() - 1);
        let solution = net
            .solve(numbers, None, &FlowOptions::default(), &|| true)
            .unwrap();
        assert!(matches!(solution.outcome, FlowOutcome::Cancelled { .. }));
        assert_eq!(solution.steps(), 0);
    }
}
