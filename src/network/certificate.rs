//! Independent checks of a network solve's claims, from the matrix `A` and the numbers alone.
//!
//! Nothing here uses the detected network, the solver's state or its row signs: each check is
//! the linear-programming argument behind the claim, stated for any integer matrix and done
//! in exact arithmetic (`i128`, checked where a sum of products could leave it).
//!
//! - Optimal: `A x = b` and `l <= x <= u`, and the row potentials `y` give every column the
//!   reduced cost `d_j = c_j - (y^T A)_j` with `d_j >= 0` where `x_j < u_j` and `d_j <= 0`
//!   where `x_j > l_j`. Then for every feasible `x'`, `c.x' - c.x = d.(x' - x) >= 0` (weak
//!   duality), so no point of the box, integer or not, is cheaper.
//! - Infeasible: for a cut with row weights `w`, the sum `w^T A x = w^T b` of the rows is
//!   impossible because `w^T A x` ranges over `[min, max]` on the box and `w^T b` lies
//!   outside; or some `l_j > u_j`.
//! - Unbounded: `x` is feasible, `A g = 0`, `c.g < 0`, and `g` raises only variables without
//!   an upper bound and lowers only variables without a lower bound, so `x + t g` is feasible
//!   for every `t >= 0` and its cost falls without end.

use super::input::FlowNumbers;
use super::outcome::{Cut, Cycle, FlowOutcome, Infeasibility};
use crate::error::{Error, Result};
use crate::matrix::IntMatrix;

/// Checks the claim of `outcome` for `A` and `numbers`; a stopped solve (step limit,
/// cancelled) claims nothing and passes.
pub fn check(a: &IntMatrix, numbers: FlowNumbers<'_>, outcome: &FlowOutcome) -> Result<()> {
    match outcome {
        FlowOutcome::Optimal {
            flow,
            potentials,
            objective,
        } => {
            check_optimal(a, numbers, flow, potentials)?;
            let cost = dot(numbers.cost, flow, "objective")?;
            if cost != *objective {
                return Err(refuted(
                    OPTIMAL,
                    format!("c.x is {cost}, the claim says {objective}"),
                ));
            }
            Ok(())
        }
        FlowOutcome::Infeasible(why) => check_infeasible(a, numbers, why),
        FlowOutcome::Unbounded { flow, cycle } => check_unbounded(a, numbers, flow, cycle),
        FlowOutcome::StepLimit { .. } | FlowOutcome::Cancelled { .. } => Ok(()),
    }
}

const OPTIMAL: &str = "the flow is optimal";
const INFEASIBLE: &str = "no flow exists";
const UNBOUNDED: &str = "the cost is unbounded below";

/// Checks that `flow` is feasible and the row potentials prove it optimal.
pub fn check_optimal(
    a: &IntMatrix,
    numbers: FlowNumbers<'_>,
    flow: &[i64],
    potentials: &[i64],
) -> Result<()> {
    check_lengths(a, &numbers)?;
    if potentials.len() != a.rows() {
        return Err(Error::Dimension(format!(
            "certificate: {} potentials for {} rows",
            potentials.len(),
            a.rows()
        )));
    }
    feasible(a, numbers, flow, OPTIMAL)?;
    let prices = weighted_columns(a, potentials)?;
    for (j, &price) in prices.iter().enumerate() {
        let reduced = i128::from(numbers.cost[j]) - price;
        let x = flow[j];
        let below_upper = numbers.upper[j].is_none_or(|u| x < u);
        let above_lower = numbers.lower[j].is_none_or(|l| x > l);
        if (below_upper && reduced < 0) || (above_lower && reduced > 0) {
            return Err(refuted(
                OPTIMAL,
                format!(
                    "column {j} has reduced cost {reduced} at value {x} (bounds {}), so moving it {} lowers the cost",
                    bounds_text(numbers.lower[j], numbers.upper[j]),
                    if reduced < 0 { "up" } else { "down" }
                ),
            ));
        }
    }
    Ok(())
}

/// Checks that the reason given proves that no point of the box meets `A x = b`.
pub fn check_infeasible(
    a: &IntMatrix,
    numbers: FlowNumbers<'_>,
    why: &Infeasibility,
) -> Result<()> {
    check_lengths(a, &numbers)?;
    match why {
        Infeasibility::EmptyRange { arc } => {
            match (numbers.lower.get(*arc), numbers.upper.get(*arc)) {
                (Some(Some(l)), Some(Some(u))) if l > u => Ok(()),
                _ => Err(refuted(
                    INFEASIBLE,
                    format!("column {arc} does not have a lower bound above its upper bound"),
                )),
            }
        }
        Infeasibility::Cut(cut) => check_cut(a, numbers, cut),
    }
}

fn check_cut(a: &IntMatrix, numbers: FlowNumbers<'_>, cut: &Cut) -> Result<()> {
    if cut.weights.len() != a.rows() {
        return Err(Error::Dimension(format!(
            "certificate: cut has {} weights for {} rows",
            cut.weights.len(),
            a.rows()
        )));
    }
    let target = dot(&cut.weights, numbers.rhs, "cut supply")?;
    let coefficients = weighted_columns(a, &cut.weights)?;
    let (mut low, mut high) = (Some(0i128), Some(0i128));
    for (j, &k) in coefficients.iter().enumerate() {
        let (l, u) = (numbers.lower[j], numbers.upper[j]);
        let (at_low, at_high) = if k >= 0 { (l, u) } else { (u, l) };
        low = add_term(low, k, at_low)?;
        high = add_term(high, k, at_high)?;
    }
    let below = low.is_some_and(|low| target < low);
    let above = high.is_some_and(|high| target > high);
    if below || above {
        return Ok(());
    }
    let range = |v: Option<i128>, inf: &str| v.map_or(inf.to_string(), |v| v.to_string());
    Err(refuted(
        INFEASIBLE,
        format!(
            "the cut's rows sum to {target} on the right, and the bounds let the left side reach anything in [{}, {}]",
            range(low, "-inf"),
            range(high, "inf")
        ),
    ))
}

/// `sum + k * bound`, `None` (infinite) once a term is infinite; a zero coefficient adds 0
/// whatever the bound.
fn add_term(sum: Option<i128>, k: i128, bound: Option<i64>) -> Result<Option<i128>> {
    if k == 0 {
        return Ok(sum);
    }
    let (Some(sum), Some(bound)) = (sum, bound) else {
        return Ok(None);
    };
    k.checked_mul(i128::from(bound))
        .and_then(|t| sum.checked_add(t))
        .map(Some)
        .ok_or_else(|| Error::Overflow("certificate: cut capacity".into()))
}

/// Checks that `flow` is feasible and `cycle` is a ray of negative cost from it.
pub fn check_unbounded(
    a: &IntMatrix,
    numbers: FlowNumbers<'_>,
    flow: &[i64],
    cycle: &Cycle,
) -> Result<()> {
    check_lengths(a, &numbers)?;
    feasible(a, numbers, flow, UNBOUNDED)?;
    if let Some(bad) = cycle.arcs.iter().find(|c| c.arc >= a.cols()) {
        return Err(refuted(
            UNBOUNDED,
            format!("the cycle names column {}, A has {}", bad.arc, a.cols()),
        ));
    }
    let g = cycle.vector(a.cols());
    if g.iter().all(|&v| v == 0) {
        return Err(refuted(UNBOUNDED, "the cycle is empty".into()));
    }
    if let Some((row, value)) = a.first_unmet_row(&g, &vec![0; a.rows()]) {
        return Err(refuted(
            UNBOUNDED,
            format!("the cycle is no kernel vector: row {row} of A g is {value}"),
        ));
    }
    for (j, &v) in g.iter().enumerate() {
        let limit = if v > 0 {
            numbers.upper[j]
        } else if v < 0 {
            numbers.lower[j]
        } else {
            None
        };
        if let Some(limit) = limit {
            return Err(refuted(
                UNBOUNDED,
                format!("the cycle moves column {j} towards its bound {limit}"),
            ));
        }
    }
    let rate = dot(numbers.cost, &g, "cycle cost")?;
    if rate >= 0 {
        return Err(refuted(
            UNBOUNDED,
            format!("the cycle's cost c.g is {rate}, not negative"),
        ));
    }
    Ok(())
}

fn check_lengths(a: &IntMatrix, numbers: &FlowNumbers<'_>) -> Result<()> {
    let given = [
        ("rhs", numbers.rhs.len(), a.rows()),
        ("cost", numbers.cost.len(), a.cols()),
        ("lower", numbers.lower.len(), a.cols()),
        ("upper", numbers.upper.len(), a.cols()),
    ];
    match given.iter().find(|&&(_, len, want)| len != want) {
        None => Ok(()),
        Some((what, len, want)) => Err(Error::Dimension(format!(
            "certificate: {what} has {len} entries, the matrix needs {want}"
        ))),
    }
}

/// `A x = b` and the bounds.
fn feasible(a: &IntMatrix, numbers: FlowNumbers<'_>, x: &[i64], claim: &'static str) -> Result<()> {
    if x.len() != a.cols() {
        return Err(Error::Dimension(format!(
            "certificate: flow has {} values for {} columns",
            x.len(),
            a.cols()
        )));
    }
    if let Some((row, value)) = a.first_unmet_row(x, numbers.rhs) {
        return Err(refuted(
            claim,
            format!("row {row} of A x is {value}, b is {}", numbers.rhs[row]),
        ));
    }
    for (j, &v) in x.iter().enumerate() {
        let (l, u) = (numbers.lower[j], numbers.upper[j]);
        if l.is_some_and(|l| v < l) || u.is_some_and(|u| v > u) {
            return Err(refuted(
                claim,
                format!("column {j} is {v}, outside {}", bounds_text(l, u)),
            ));
        }
    }
    Ok(())
}

/// `(w^T A)_j` for every column, exactly.
fn weighted_columns(a: &IntMatrix, w: &[i64]) -> Result<Vec<i128>> {
    if w.len() != a.rows() {
        return Err(Error::Dimension(format!(
            "certificate: {} weights for {} rows",
            w.len(),
            a.rows()
        )));
    }
    Ok(a.weighted_columns(w))
}

fn dot(u: &[i64], v: &[i64], what: &str) -> Result<i128> {
    u.iter()
        .zip(v)
        .try_fold(0i128, |acc, (&p, &q)| {
            acc.checked_add(i128::from(p) * i128::from(q))
        })
        .ok_or_else(|| Error::Overflow(format!("certificate: {what}")))
}

fn bounds_text(l: Option<i64>, u: Option<i64>) -> String {
    let text = |v: Option<i64>, inf: &str| v.map_or(inf.to_string(), |v| v.to_string());
    format!("[{}, {}]", text(l, "-inf"), text(u, "inf"))
}

fn refuted(claim: &'static str, why: String) -> Error {
    Error::Refuted { claim, why }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::network::examples::transport;
    use crate::network::CycleArc;

    const COST: [i64; 6] = [4, 1, 3, 2, 5, 1];

    fn numbers<'a>(lower: &'a [Option<i64>], upper: &'a [Option<i64>]) -> FlowNumbers<'a> {
        FlowNumbers {
            rhs: &[3, 2, 1, 2, 2],
            cost: &COST,
            lower,
            upper,
        }
    }

    /// Worked by hand: with `y = (0, -2, 4, 1, 3)` the reduced costs are `(0, 0, 0, 0, 6, 0)`;
    /// only `x_11` has a nonzero one, and it sits at its lower bound 0.
    #[test]
    fn hand_worked_potentials_prove_the_plan_of_cost_8() {
        let a = transport();
        let n = numbers(&[Some(0); 6], &[None; 6]);
        let flow = [0, 2, 1, 1, 0, 1];
        check_optimal(&a, n, &flow, &[0, -2, 4, 1, 3]).unwrap();
        // Shop 1's potential up by 7: x_01 (inside its bounds) gets reduced cost -7.
        let err = check_optimal(&a, n, &flow, &[0, -2, 4, 8, 3]).unwrap_err();
        assert!(
            err.to_string().contains("column 1 has reduced cost -7"),
            "{err}"
        );
        // A plan off A x = b is refused whatever the potentials.
        let err = check_optimal(&a, n, &[0, 2, 1, 1, 0, 0], &[0, -2, 4, 1, 3]).unwrap_err();
        assert!(
            err.to_string().contains("row 1 of A x is 1, b is 2"),
            "{err}"
        );
    }

    #[test]
    fn a_cut_must_exceed_its_capacity() {
        let a = transport();
        // Shop 0 (row 2, sign -1 in network terms) needs 1 and can receive at most 0.
        let upper = [Some(0), None, None, Some(0), None, None];
        let n = numbers(&[Some(0); 6], &upper);
        let shop = Cut {
            weights: vec![0, 0, -1, 0, 0],
        };
        check_infeasible(&a, n, &Infeasibility::Cut(shop.clone())).unwrap();
        let open = numbers(&[Some(0); 6], &[None; 6]);
        assert!(check_infeasible(&a, open, &Infeasibility::Cut(shop)).is_err());
    }

    #[test]
    fn a_ray_must_be_a_kernel_vector_of_negative_cost_without_limits() {
        let a = transport();
        let lower = [Some(0), None, Some(0), None, Some(0), Some(0)];
        let n = numbers(&lower, &[None; 6]);
        let flow = [0, 2, 1, 1, 0, 1];
        let arc = |arc, forward| CycleArc { arc, forward };
        // x_01 down, x_11 up, x_10 down, x_00 up: cost -1 + 5 - 2 + 4 = 6, not negative.
        let cycle = Cycle {
            arcs: vec![arc(1, false), arc(4, true), arc(3, false), arc(0, true)],
        };
        let err = check_unbounded(&a, n, &flow, &cycle).unwrap_err();
        assert!(err.to_string().contains("c.g is 6"), "{err}");
        let mut cheap = COST;
        cheap[4] = -9;
        let n = FlowNumbers { cost: &cheap, ..n };
        check_unbounded(&a, n, &flow, &cycle).unwrap();
        let broken = Cycle {
            arcs: cycle.arcs[..3].to_vec(),
        };
        assert!(check_unbounded(&a, n, &flow, &broken).is_err());
        let limited = [Some(0), Some(0), Some(0), None, Some(0), Some(0)];
        let n = FlowNumbers {
            lower: &limited,
            ..n
        };
        let err = check_unbounded(&a, n, &flow, &cycle).unwrap_err();
        assert!(
            err.to_string()
                .contains("moves column 1 towards its bound 0"),
            "{err}"
        );
    }
}
