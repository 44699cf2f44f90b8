//! The one sequence after every solve: bound the plan of a partial set, re-check the claim
//! independently, and judge what is proven ([`crate::certify::judge`]). solve, trace and the
//! re-planning of days all run it, so none derives a status or skips a check.

use super::recheck::{recheck_with_bound, Recheck};
use crate::bound::{DualBound, Multipliers};
use crate::certify::{judge, Answer};
use crate::error::Result;
use crate::matrix::IntMatrix;
use crate::solve::{Numbers, Prepared, Verdict};

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
