//! Outcomes and their certificates in words: what a solve proved and the evidence behind it,
//! the same sentences for every caller (the command line, embedders).

use std::fmt;

use super::outcome::Outcome;
use super::recheck::{Claim, Recheck};
use super::sparse::named_entries;
use crate::model::Model;
use crate::solve::Numbers;

/// The signed nonzero entries of `vector` by name: `+2 brackwater_north, -2 fennick_north`.
pub fn terms(vector: &[i64], names: &[String]) -> Vec<String> {
    named_entries(vector, names)
        .into_iter()
        .map(|e| format!("{:+} {}", e.value, e.name))
        .collect()
}

/// One line saying how the solve ended, with the truncation caveat where it applies.
impl fmt::Display for Outcome {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let text = match self {
            Outcome::Optimal => "optimal".to_string(),
            Outcome::OptimalForMovesUpTo { norm } => format!(
                "optimal among moves of ℓ1 norm up to {norm} (the set is truncated there; a \
             longer move could still improve)"
            ),
            Outcome::NoIntegerSolution { .. } => {
                "infeasible: A x = b has no integer solution".into()
            }
            Outcome::EmptyRange { variable } => {
                format!("infeasible: {variable} has its lower bound above its upper bound")
            }
            Outcome::NoLatticePointInBox { .. } => {
                "infeasible: no integer plan meets the bounds".to_string()
            }
            Outcome::InfeasibleCut { rows, .. } => format!(
            "infeasible: no plan meets the bounds ({} rows ask for more than their lanes carry)",
            rows.len()
        ),
            Outcome::InfeasibleUnproven { .. } => {
                "no feasible plan found (not a proof: the move set is incomplete)".to_string()
            }
            Outcome::Unbounded { .. } => "unbounded: the cost falls without limit".to_string(),
            Outcome::StepLimit => "stopped at the step limit; not optimal".into(),
            Outcome::Cancelled => "interrupted; the plan is not proven optimal".to_string(),
        };
        f.write_str(&text)
    }
}

/// The evidence behind `outcome` in words: what was re-checked and why it proves the claim.
pub fn certificate_words(outcome: &Outcome, recheck: Option<&Recheck>, model: &Model) -> String {
    let checked = recheck.map_or(0, |r| r.moves_checked);
    let re = |claim: Claim| recheck.is_some_and(|r| r.claim == claim && r.holds);
    match outcome {
        Outcome::Optimal if re(Claim::DualPotentials) => "certified: row potentials give \
             every variable a reduced cost of the sign its bounds allow, so no plan in the box \
             is cheaper (LP duality; the cycles of the network are its test set)"
            .to_string(),
        Outcome::InfeasibleCut { rows, weights } if re(Claim::Cut) => format!(
            "certified: the rows {} summed with weights ({}) ask for a total the bounds of \
             their lanes cannot give",
            rows.join(", "),
            weights
                .iter()
                .map(|w| format!("{w:+}"))
                .collect::<Vec<_>>()
                .join(", ")
        ),
        Outcome::Optimal if re(Claim::BoundMet) => "certified: the dual bound, re-evaluated \
             exactly from its row multipliers, rounds up to the plan's cost, so no plan is \
             cheaper (Lagrangian duality; the set itself is truncated)"
            .to_string(),
        Outcome::Optimal if re(Claim::NoImprovingMove) => format!(
            "certified: {} in either sign, and the set is a test set",
            none_improves(checked)
        ),
        Outcome::OptimalForMovesUpTo { norm } if re(Claim::NoImprovingMove) => format!(
            "checked: {} (ℓ1 norm up to {norm}) in either sign; longer moves were not computed",
            none_improves(checked)
        ),
        Outcome::NoIntegerSolution { multipliers } => {
            format!(
            "certified{}: the row multipliers y = ({}) make y^T A integral but y^T b fractional",
            if re(Claim::LatticeCertificate) { "" } else { " (re-check failed)" },
            multipliers.join(", ")
        )
        }
        Outcome::NoLatticePointInBox { min_violation } if re(Claim::NoViolationDecrease) => {
            format!(
                "certified: no lattice point of this fibre lies in the box; phase I ended at \
                 violation {min_violation} and {} in either sign",
                none_of(checked, "lowers it", "lower it")
            )
        }
        Outcome::InfeasibleUnproven { violation } => format!(
            "no certificate: phase I ended at violation {violation}, but the set is not the \
             whole Graver basis"
        ),
        Outcome::EmptyRange { variable } => format!("certified: the range of {variable} is empty"),
        Outcome::Unbounded { direction, .. } if re(Claim::Ray) => format!(
            "certified: the ray {} has A d = 0, changes only variables without a bound in its \
             direction and lowers the cost by {} per unit step",
            terms(direction, &model.variable_names).join(", "),
            descent(direction, model)
                .map_or("an unrepresentable amount".into(), |s| (-s).to_string())
        ),
        Outcome::StepLimit | Outcome::Cancelled => {
            "no certificate: the solve did not finish".to_string()
        }
        _ => "no certificate: the re-check did not confirm the claim".to_string(),
    }
}

/// `none of the 42 moves improves`, or `the only move does not improve`.
fn none_improves(moves: usize) -> String {
    none_of(moves, "improves", "improve")
}

fn none_of(moves: usize, verb: &str, bare: &str) -> String {
    match moves {
        0 => "the set is empty, so no move".to_string() + " " + verb,
        1 => format!("the only move does not {bare}"),
        n => format!("none of the {n} moves {verb}"),
    }
}

/// The asymptotic cost rate along the ray `d` (convex costs included).
fn descent(d: &[i64], model: &Model) -> Option<i128> {
    let problem = Numbers::of(model).problem().ok()?;
    problem.objective().recession_rate(d).ok().flatten()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn terms_are_signed_and_named() {
        let names: Vec<String> = ["north", "east", "south"].map(String::from).to_vec();
        assert_eq!(terms(&[2, 0, -1], &names), ["+2 north", "-1 south"]);
    }

    #[test]
    fn truncated_optimum_carries_its_caveat() {
        let line = Outcome::OptimalForMovesUpTo { norm: 6 }.to_string();
        assert!(line.contains("up to 6") && line.contains("could still improve"));
    }
}
