//! The one sequence after every solve: bound the plan of a partial set, re-check the claim
//! independently, and judge what is proven ([`crate::certify::judge`]). solve, trace and the
//! re-planning of days all run it, so none derives a status or skips a check.

use super::bound::BoundDoc;
use super::outcome::Outcome;
use super::recheck::{recheck_with_bound, Recheck};
use crate::bound::{DualBound, Multipliers};
use crate::certify::{judge, Answer};
use crate::error::Result;
use crate::matrix::IntMatrix;
use crate::model::{Model, Units};
use crate::solve::{Numbers, Prepared, Verdict, WarmStart};

/// A solve's verdict with its dual bound, its independent re-check and the answer they
/// certify.
#[derive(Debug)]
pub struct Certified {
    /// What the solver returned.
    pub verdict: Verdict,
    /// The proven lower bound of a partial set's plan (`None` for a complete set, a network,
    /// or a verdict without such a plan).
    pub bound: Option<DualBound>,
    /// The independent re-check of the verdict's claim (`None` when it claims nothing, such
    /// as a stop by a limit); it held, or there would be no [`Certified`].
    pub recheck: Option<Recheck>,
    /// What is proven.
    pub answer: Answer,
}

/// Bounds `verdict`'s plan (trying the multipliers `prices` first), re-checks its claim
/// against `matrix` and `numbers` with `prepared`'s own checker, and judges it. A claim the
/// re-check refutes is [`crate::Error::Refuted`], never an answer.
pub fn certify(
    prepared: &Prepared,
    matrix: &IntMatrix,
    numbers: Numbers<'_>,
    verdict: Verdict,
    prices: Option<&Multipliers>,
) -> Result<Certified> {
    let bound = prepared.bound(numbers, &verdict, prices)?;
    let recheck = recheck_with_bound(
        matrix,
        numbers,
        prepared.checker(),
        &verdict,
        bound.as_ref(),
    )?;
    if let Some(check) = &recheck {
        check.confirm()?;
    }
    let answer = judge(&verdict, bound.as_ref());
    Ok(Certified {
        verdict,
        bound,
        recheck,
        answer,
    })
}

/// One certified solve as the reports show it: the verdict, its re-check, the outcome with
/// variables and rows named, and the dual bound of a partial set's plan.
pub(crate) struct Reported {
    /// What the solver returned.
    pub verdict: Verdict,
    /// The independent re-check of its claim.
    pub recheck: Option<Recheck>,
    /// The certified answer, named.
    pub outcome: Outcome,
    /// The dual bound of the plan, when a partial set's plan has one.
    pub bound: Option<BoundDoc>,
}

/// Solves `model` with `prepared` from `start` and certifies the verdict ([`certify`]): the
/// sequence behind the solve and the trace documents. `constant` is what the whole objective
/// adds to the solver's (a change price's, see [`crate::solve::ChangePrice::constant`]; else
/// 0): the bound's document is that of the whole objective, written in `units`.
pub(crate) fn solve_reported(
    prepared: &Prepared,
    model: &Model,
    options: &augment::Options,
    (start, constant): (Option<&WarmStart>, i128),
    units: &Units,
    cancel: &dyn Fn() -> bool,
) -> Result<Reported> {
    let verdict = prepared.solve(model, options, start, cancel)?;
    let Certified {
        verdict,
        bound,
        recheck,
        answer,
    } = certify(prepared, &model.matrix, Numbers::of(model), verdict, None)?;
    Ok(Reported {
        outcome: Outcome::of_answer(&answer, &model.variable_names, &model.row_names),
        bound: verdict
            .optimum()
            .zip(bound.as_ref())
            .map(|((cost, _), b)| whole_bound(b, (cost, constant), units))
            .transpose()?,
        verdict,
        recheck,
    })
}

/// The document of `bound`, a bound of the solver's objective, for the whole objective: both
/// the bound and the cost `cost` plus `constant`.
fn whole_bound(
    bound: &DualBound,
    (cost, constant): (i128, i128),
    units: &Units,
) -> Result<BoundDoc> {
    let whole = cost
        .checked_add(constant)
        .ok_or_else(|| crate::Error::Overflow("the plan cost with its change price".into()))?;
    let shifted = DualBound {
        value: &bound.value + num_rational::BigRational::from_integer(constant.into()),
        multipliers: bound.multipliers.clone(),
    };
    Ok(BoundDoc::of(&shifted, whole, units))
}
