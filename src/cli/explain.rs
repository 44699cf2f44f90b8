//! Outcomes and their certificates in words, for the human output of `solve` and `trace`.

use kernstep::model::Model;
use kernstep::solve::Numbers;
use kernstep::trace::{named_entries, Claim, Outcome, Recheck};

/// The signed nonzero entries of `vector` by name: `+2 brackwater_north, -2 fennick_north`.
pub fn terms(vector: &[i64], names: &[String]) -> Vec<String> {
    named_entries(vector, names)
        .into_iter()
        .map(|e| format!("{:+} {}", e.value, e.name))
        .collect()
}

/// One line saying how the solve ended, with the truncation caveat where it applies.
pub fn status_line(outcome: &Outcome) -> String {
    match outcome {
        Outcome::Optimal => "optimal".to_string(),
        Outcome::OptimalForMovesUpTo { norm } => format!(
            "optimal among moves of ℓ1 norm up to {norm} (the set is truncated there; a \
             longer move could still improve)"
        ),
        Outcome::NoIntegerSolution { .. } => "infeasible: A x = b has no integer solution".into(),
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
        Outcome::StepLimit => "stopped at the step limit (--max-steps); not optimal".into(),
        Outcome::Cancelled => "interrupted; the plan is not proven optimal".to_string(),
    }
}

/// The evidence behind `outcome` in words: what was re-checked and why it proves the claim.
pub fn certificate_line(outcome: &Outcome, recheck: Option<&Recheck>, model: &Model) -> String {
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

/// Breaks `text` at spaces into lines of at most `width` characters (a longer word keeps its
/// own line); lines after the first start with `indent` spaces.
pub fn wrap(text: &str, width: usize, indent: usize) -> Vec<String> {
    wrap_units(text.split(' ').filter(|w| !w.is_empty()), width, indent)
}

/// Like [`wrap`], for units that must not be split (such as `+2 fennick_north,`).
pub fn wrap_units<'a>(
    units: impl IntoIterator<Item = &'a str>,
    width: usize,
    indent: usize,
) -> Vec<String> {
    let mut lines = Vec::new();
    let mut line = String::new();
    for unit in units {
        let used = line.chars().count();
        if used > 0 && used + 1 + unit.chars().count() > width {
            lines.push(std::mem::take(&mut line));
        }
        if line.is_empty() {
            if !lines.is_empty() {
                line.push_str(&" ".repeat(indent));
            }
        } else {
            line.push(' ');
        }
        line.push_str(unit);
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
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

/// `1 move`, `4 moves`.
pub fn count_moves(n: usize) -> String {
    if n == 1 {
        "1 move".to_string()
    } else {
        format!("{n} moves")
    }
}

/// `c.d`, or `None` on overflow.
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
    fn wrapped_lines_fit_and_indent() {
        let text = "certified: none of the 42 moves improves in either sign";
        let lines = wrap(text, 20, 2);
        assert!(lines.iter().all(|l| l.chars().count() <= 20), "{lines:?}");
        assert!(lines[1].starts_with("  ") && !lines[0].starts_with(' '));
        let words: Vec<&str> = lines.iter().flat_map(|l| l.split_whitespace()).collect();
        assert_eq!(words.join(" "), text);
    }

    #[test]
    fn truncated_optimum_carries_its_caveat() {
        let line = status_line(&Outcome::OptimalForMovesUpTo { norm: 6 });
        assert!(line.contains("up to 6") && line.contains("could still improve"));
    }
}
