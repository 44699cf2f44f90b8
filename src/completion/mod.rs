//! Test-set completion: the ⊑-minimal nonzero elements of `ker_Z(A)` within sign constraints.
//!
//! With every variable free the result is the Graver basis of `A`; with every variable
//! `>= 0` it is the Hilbert basis of the pointed cone `{x >= 0 : A x = 0}`. In general it is
//! the set of Graver elements that satisfy the signs (a ⊑-minimal element of the restricted
//! lattice is a conformal sum of Graver elements, each of which satisfies the same signs).
//!
//! Two methods give the same answers: [`Method::ProjectAndLift`] (Hemmecke 2003), the
//! production path, and [`Method::Pottier`] (Pottier 1996), the simple baseline kept for
//! cross-checks and benchmarks.
//!
//! Output invariant: one element per `±` pair where the signs allow both, oriented so that its
//! first nonzero entry is positive; elements sorted by l1 norm, then lexicographically.

mod checkpoint;
mod control;
mod element_set;
mod lift;
mod limits;
mod packed_rows;
mod partners;
mod pottier;
mod projection;
mod reducer;
mod state_view;
mod store;
mod working;

use serde::{Deserialize, Serialize};

pub use checkpoint::{Checkpoint, InStage, StagePoint};
pub use control::{Control, Progress, StopReason, WorkShare};
pub use element_set::{moves_of, ElementSet, Rows};
use limits::admits;
pub use limits::Truncation;
pub use packed_rows::PackedRows;
use reducer::MAX_WORDS;
pub use state_view::StateView;

use crate::error::{Error, Result};
use crate::lattice::reduced_kernel_basis;
use crate::matrix::IntMatrix;
use store::{to_entries, Entry};
use working::Orbit;

/// The sign allowed for one variable in the moves (the one recorded in cache keys).
pub use cache::Sign;

/// `1` for `>= 0`, `-1` for `<= 0`, `0` for free.
fn sign_code(sign: Sign) -> i8 {
    match sign {
        Sign::Free => 0,
        Sign::NonNegative => 1,
        Sign::NonPositive => -1,
    }
}

/// The algorithm that completes the set.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub enum Method {
    /// Project-and-lift (Hemmecke 2003): the fast production path.
    ProjectAndLift,
    /// Pottier's completion procedure (Pottier 1996): the baseline.
    Pottier,
}

/// What to compute.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Request {
    /// Sign constraint per variable.
    pub signs: Vec<Sign>,
    /// Limits on the returned elements (default: none, the complete set).
    pub truncation: Truncation,
    /// Algorithm (default: project-and-lift).
    pub method: Method,
    /// Check whether the truncation cut anything (see [`Cut`]), so that a truncated request
    /// whose result is the whole set says so; costs at most the reductions of the pairs the
    /// truncation skips (default: false).
    pub check_cuts: bool,
}

impl Request {
    /// The complete Graver basis of a lattice in `Z^n`, by project-and-lift.
    pub fn graver(n: usize) -> Self {
        Self {
            signs: vec![Sign::Free; n],
            truncation: Truncation::default(),
            method: Method::ProjectAndLift,
            check_cuts: false,
        }
    }

    /// The complete Hilbert basis of `{x >= 0 : x in the lattice}`, by project-and-lift.
    pub fn hilbert(n: usize) -> Self {
        Self {
            signs: vec![Sign::NonNegative; n],
            ..Self::graver(n)
        }
    }
}

/// Whether the truncation of a finished completion left anything out.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Cut {
    /// Nothing: the set is the untruncated one. Either there was no truncation, or every pair
    /// the truncation kept from forming reduces to zero against the final set of its stage and
    /// no minimal element was beyond the limits (the completion criterion holds as without
    /// the truncation; Hemmecke 2003).
    Nothing,
    /// Elements beyond the truncation may be missing (or [`Request::check_cuts`] was off).
    Possibly,
}

/// How a completion ended.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Completion {
    /// Finished: the set asked for, and whether its truncation cut anything.
    Finished(ElementSet, Cut),
    /// Stopped early by a limit or a cancellation; no partial set is returned.
    Stopped(StopReason),
}

/// Computes the set described by `request` for the lattice spanned by the rows of `basis`,
/// from the beginning or, with `resume`, from a checkpoint of an earlier run of the same
/// request on the same lattice.
///
/// `basis` must be a basis of a saturated lattice such as `ker_Z(A)` (the kernel basis from
/// [`crate::lattice`]); every row has `request.signs.len()` entries.
pub fn complete(
    basis: &[Vec<i64>],
    request: &Request,
    control: &Control<'_>,
    resume: Option<&Checkpoint>,
) -> Result<Completion> {
    let n = request.signs.len();
    if let Some(row) = basis.iter().find(|r| r.len() != n) {
        return Err(Error::Dimension(format!(
            "basis vector has {} entries, the sign vector {n}",
            row.len()
        )));
    }
    if let Some(b) = &request.truncation.bounds {
        if b.len() != n {
            return Err(Error::Dimension(format!(
                "box has {} entries, the sign vector {n}",
                b.len()
            )));
        }
    }
    if n > MAX_WORDS * 64 {
        return Err(Error::Dimension(format!(
            "{n} variables; the completion handles at most {}",
            MAX_WORDS * 64
        )));
    }
    let signs: Vec<i8> = request.signs.iter().map(|&s| sign_code(s)).collect();
    let entries: Vec<Vec<Entry>> = basis.iter().map(|b| to_entries(b)).collect::<Result<_>>()?;
    // Sign masks in the fewest 64-bit words that hold every component.
    let run = |e: &[Vec<Entry>], s: &[i8]| match (request.method, n.div_ceil(64)) {
        (Method::ProjectAndLift, 0 | 1) => by_lifting::<1>(basis, e, s, request, control, resume),
        (Method::ProjectAndLift, 2) => by_lifting::<2>(basis, e, s, request, control, resume),
        (Method::ProjectAndLift, _) => {
            by_lifting::<MAX_WORDS>(basis, e, s, request, control, resume)
        }
        (Method::Pottier, 0 | 1) => by_pottier::<1>(e, s, request, control),
        (Method::Pottier, 2) => by_pottier::<2>(e, s, request, control),
        (Method::Pottier, _) => by_pottier::<MAX_WORDS>(e, s, request, control),
    };
    let orbits = run(&entries, &signs)?;
    Ok(match orbits {
        Ok((orbits, exact)) => {
            let cut = if exact || request.truncation.is_none() {
                Cut::Nothing
            } else {
                Cut::Possibly
            };
            Completion::Finished(canonical(n, orbits)?, cut)
        }
        Err(stop) => Completion::Stopped(stop),
    })
}

/// Computes the set described by `request` for `ker_Z(a)`, starting from the LLL-reduced
/// kernel basis of the lattice core (or from `resume`, after checking that its elements lie
/// in `ker_Z(a)`).
pub fn complete_kernel(
    a: &IntMatrix,
    request: &Request,
    control: &Control<'_>,
    resume: Option<&Checkpoint>,
) -> Result<Completion> {
    if let Some(checkpoint) = resume {
        checkpoint.check_kernel(a)?;
    }
    complete(&reduced_kernel_basis(a)?, request, control, resume)
}

/// Runs the checks [`complete_kernel`] makes before resuming from `resume` for `ker_Z(a)`
/// (its vectors lie in the kernel, its components and working set fit the lattice), so that
/// a caller can set an unusable checkpoint aside and start over instead of failing.
pub fn check_resumable(a: &IntMatrix, resume: &Checkpoint) -> Result<()> {
    resume.check_kernel(a)?;
    resume
        .restore(&reduced_kernel_basis(a)?, a.cols())
        .map(drop)
}

/// The final orbits and whether the truncation was shown to cut nothing, or why the
/// completion stopped.
type Staged = Result<std::result::Result<(Vec<Orbit>, bool), StopReason>>;

fn by_pottier<const W: usize>(
    basis: &[Vec<Entry>],
    signs: &[i8],
    request: &Request,
    control: &Control<'_>,
) -> Staged {
    let n = signs.len();
    let all: Vec<usize> = (0..n).collect();
    let graver = match pottier::complete::<W>(basis, &all, control, (0, 1))? {
        Ok(g) => g,
        Err(stop) => return Ok(Err(stop)),
    };
    Ok(Ok(restrict::<W>(graver, signs, &all, &request.truncation)?))
}

/// Project-and-lift with stores one byte per entry where they hold a stage's vectors; when a
/// vector outgrows its store, the completion starts again with wider ones (rare: Graver
/// elements of small-Δ matrices have small entries).
fn by_lifting<const W: usize>(
    basis: &[Vec<i64>],
    entries: &[Vec<Entry>],
    signs: &[i8],
    request: &Request,
    control: &Control<'_>,
    resume: Option<&Checkpoint>,
) -> Staged {
    let mut floor = StoreWidth::Byte;
    loop {
        match lift_all::<W>(basis, entries, signs, request, control, resume, floor) {
            Err(Error::EntryWidth) if floor != StoreWidth::Full => floor = floor.wider(),
            done => return done,
        }
    }
}

/// Project-and-lift with stores at least `floor` wide.
fn lift_all<const W: usize>(
    basis: &[Vec<i64>],
    entries: &[Vec<Entry>],
    signs: &[i8],
    request: &Request,
    control: &Control<'_>,
    resume: Option<&Checkpoint>,
    floor: StoreWidth,
) -> Staged {
    let n = signs.len();
    let stages = n - basis.len() + 1;
    let checked = request.check_cuts && !request.truncation.is_none();
    let (mut done, mut orbits, mut exact, mut within) = match resume {
        Some(checkpoint) => {
            let (done, orbits) = checkpoint.restore(basis, n)?;
            (done, orbits, checkpoint.exact, checkpoint.within.clone())
        }
        None => {
            let projection = projection::choose(basis)?;
            let comps = projection.comps.clone();
            let start = match &projection.unit_lifts {
                Some(lifts) => lifts
                    .iter()
                    .map(|l| {
                        Ok(Orbit {
                            rep: to_entries(l)?,
                            symmetric: true,
                        })
                    })
                    .collect::<Result<Vec<_>>>()?,
                None => match pottier::complete::<W>(entries, &comps, control, (0, stages))? {
                    Ok(g) => g,
                    Err(stop) => return Ok(Err(stop)),
                },
            };
            let (orbits, exact) = restrict::<W>(start, signs, &comps, &request.truncation)?;
            let exact = checked && exact;
            control.save(&StateView::between(&comps, &orbits, exact));
            (comps, orbits, exact, None)
        }
    };
    for number in done.len() + 1 - basis.len()..stages {
        let (j, at) = match within.take() {
            Some(stage) => (stage.component, Some(stage.point)),
            None => (next_component(&orbits, &done, signs), None),
        };
        let stage = lift::Stage {
            old: &done,
            new: j,
            signs,
            truncation: &request.truncation,
            number: (number, stages),
            exact,
            check_cuts: checked && exact,
        };
        let lifted = match lift_stored::<W>(orbits, &stage, control, at, floor)? {
            Ok(lifted) => lifted,
            Err(stop) => return Ok(Err(stop)),
        };
        orbits = lifted.orbits;
        exact = exact && lifted.exact;
        done.push(j);
        if number + 1 < stages {
            control.save(&StateView::between(&done, &orbits, exact));
        }
    }
    Ok(Ok((orbits, exact)))
}

/// The component to lift next: sign-restricted ones first (they halve the set), then the one
/// where the fewest elements are nonzero (fewest pairs to form).
fn next_component(orbits: &[Orbit], done: &[usize], signs: &[i8]) -> usize {
    (0..signs.len())
        .filter(|c| !done.contains(c))
        .min_by_key(|&c| {
            let nonzero = orbits.iter().filter(|o| o.rep[c] != 0).count();
            (signs[c] == 0, nonzero, c)
        })
        .expect("a component is left to lift")
}

/// Keeps the members that satisfy the signs on `comps`, then the minimal ones, then those
/// within the limits (cutting after the minimal pass gives the same set as before it:
/// anything ⊑ a member within the limits is within them too); tells whether the limits
/// removed none.
fn restrict<const W: usize>(
    orbits: Vec<Orbit>,
    signs: &[i8],
    comps: &[usize],
    t: &Truncation,
) -> Result<(Vec<Orbit>, bool)> {
    let fits = |v: &[Entry]| {
        comps
            .iter()
            .all(|&c| signs[c] == 0 || v[c].signum() * Entry::from(signs[c]) >= 0)
    };
    let mut kept = Vec::new();
    for o in orbits {
        let neg: Vec<Entry> = o.rep.iter().map(|&x| -x).collect();
        let (a, b) = (fits(&o.rep), o.symmetric && fits(&neg));
        match (a, b) {
            (true, _) => kept.push(Orbit {
                rep: o.rep,
                symmetric: b,
            }),
            (false, true) => kept.push(Orbit {
                rep: neg,
                symmetric: false,
            }),
            (false, false) => {}
        }
    }
    let minimal = lift::minimal::<W, Entry>(kept, comps)?;
    let total = minimal.len();
    let within: Vec<Orbit> = minimal
        .into_iter()
        .filter(|o| admits(t, &o.rep, comps))
        .collect();
    let exact = within.len() == total;
    Ok((within, exact))
}

/// Orients and sorts the final orbits, then lays them out flat (no per-element copy: the
/// representatives are turned in place and the set is written once, narrow).
fn canonical(width: usize, mut orbits: Vec<Orbit>) -> Result<ElementSet> {
    for o in &mut orbits {
        if o.symmetric && o.rep.iter().find(|&&x| x != 0).is_some_and(|&x| x < 0) {
            o.rep.iter_mut().for_each(|x| *x = -*x);
        }
    }
    let norm = |o: &Orbit| {
        o.rep
            .iter()
            .map(|x| u64::from(x.unsigned_abs()))
            .sum::<u64>()
    };
    orbits.sort_unstable_by(|a, b| norm(a).cmp(&norm(b)).then_with(|| b.rep.cmp(&a.rep)));
    ElementSet::from_orbits(width, &orbits)
}

/// How wide the stores of the lifting stages keep entries, at the least.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
enum StoreWidth {
    Byte,
    Half,
    Full,
}

impl StoreWidth {
    /// The next wider one (`Full` stays).
    fn wider(self) -> Self {
        match self {
            StoreWidth::Byte => StoreWidth::Half,
            StoreWidth::Half | StoreWidth::Full => StoreWidth::Full,
        }
    }

    /// The narrowest width, at least `self`, whose type holds four times the largest entry
    /// of `orbits` (room for the sums and remainders of a stage, which rarely outgrow it).
    fn for_stage(self, orbits: &[Orbit]) -> Self {
        let largest = orbits
            .iter()
            .flat_map(|o| &o.rep)
            .map(|x| x.unsigned_abs())
            .max()
            .unwrap_or(0);
        let fit = match largest.saturating_mul(4) {
            0..=127 => StoreWidth::Byte,
            128..=32_767 => StoreWidth::Half,
            _ => StoreWidth::Full,
        };
        self.max(fit)
    }
}

/// One lifting stage with its stores as narrow as [`StoreWidth::for_stage`] allows from
/// `floor`; a vector too wide for them is [`Error::EntryWidth`], and the caller starts the
/// completion again with a wider floor.
fn lift_stored<const W: usize>(
    orbits: Vec<Orbit>,
    stage: &lift::Stage<'_>,
    control: &Control<'_>,
    at: Option<checkpoint::StagePoint>,
    floor: StoreWidth,
) -> Result<std::result::Result<lift::Lifted, StopReason>> {
    match floor.for_stage(&orbits) {
        StoreWidth::Byte => lift::lift::<W, i8>(orbits, stage, control, at),
        StoreWidth::Half => lift::lift::<W, i16>(orbits, stage, control, at),
        StoreWidth::Full => lift::lift::<W, Entry>(orbits, stage, control, at),
    }
}
