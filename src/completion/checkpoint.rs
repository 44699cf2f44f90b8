//! The state of project-and-lift between two stages, or inside one, from which a run can
//! resume.
//!
//! After a stage the working set is exactly the ⊑-minimal elements of the lattice projected
//! to the lifted components (within the signs and limits there). That set and the list of
//! components determine the rest of the run, whatever basis or machine produced them, so
//! resuming from a checkpoint gives the identical final set.
//!
//! Inside a stage ([`InStage`]) the state is the stage's whole working set in insertion order
//! (so that every member gets back its id), the component being lifted and where the norm
//! levels stand ([`StagePoint`]), with the remainders already reduced but not yet merged.
//! Replaying from there repeats the run's own steps in the same order, so the resumed stage
//! ends with the same working set as an uninterrupted one.

use serde::{Deserialize, Serialize};

use super::packed_rows::PackedRows;
use super::store::to_entries;
use super::working::Orbit;
use crate::error::{Error, Result};
use crate::lattice::echelon;
use crate::matrix::IntMatrix;

/// A resumable state: the components lifted so far and the minimal set on them.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Checkpoint {
    /// Components lifted so far, in lifting order (the start projection first).
    pub lifted: Vec<usize>,
    /// Representatives of the minimal set on those components (one byte per entry while
    /// they fit).
    pub elements: PackedRows,
    /// Whether each element's negation belongs to the set as well.
    pub symmetric: Vec<bool>,
    /// The stage in progress when the state was saved inside one (`elements` are then its
    /// working set in insertion order), `None` between stages.
    pub within: Option<InStage>,
    /// Whether the truncation has so far cut nothing that could change the set (see
    /// [`super::Cut`]).
    pub exact: bool,
}

/// A stage in progress.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct InStage {
    /// The component being lifted.
    pub component: usize,
    /// Where its work stands.
    pub point: StagePoint,
}

/// Where the work of a lifting stage stands between two batches.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum StagePoint {
    /// Every pair of norm level below `from` is done; the first `tasks_done` pair tasks of the
    /// next level with pairs are reduced, giving the remainders `sums` (not yet merged).
    Pairs {
        /// The smallest norm level not finished.
        from: u64,
        /// Pair tasks of that level already reduced.
        tasks_done: usize,
        /// Their remainders.
        sums: Vec<Vec<i64>>,
    },
    /// The remainders of norm level `level` are merged; the members from id `first_new` on
    /// still need their pairs up to that level: the first `members_done` of them are reduced,
    /// giving the remainders `sums`.
    CatchUp {
        /// The norm level being finished.
        level: u64,
        /// Id of the first member whose pairs are pending.
        first_new: u32,
        /// Pending members already reduced.
        members_done: usize,
        /// Their remainders.
        sums: Vec<Vec<i64>>,
    },
}

impl Checkpoint {
    /// Checks that every element and every pending remainder lies in `ker_Z(a)`.
    pub(crate) fn check_kernel(&self, a: &IntMatrix) -> Result<()> {
        let pending = self.within.iter().flat_map(|s| match &s.point {
            StagePoint::Pairs { sums, .. } | StagePoint::CatchUp { sums, .. } => sums,
        });
        for (i, e) in self.elements.rows().chain(pending.cloned()).enumerate() {
            if e.len() != a.cols() || a.mul_vec(&e).is_none_or(|v| v.iter().any(|&x| x != 0)) {
                return Err(invalid(format!(
                    "vector {i} is not in the kernel of the matrix"
                )));
            }
        }
        Ok(())
    }

    /// Checks the state against the lattice with basis `basis` in `Z^n` and returns the
    /// lifted components and the working set.
    pub(crate) fn restore(&self, basis: &[Vec<i64>], n: usize) -> Result<(Vec<usize>, Vec<Orbit>)> {
        let mut seen = vec![false; n];
        for &c in &self.lifted {
            if c >= n || std::mem::replace(&mut seen[c], true) {
                return Err(invalid(format!(
                    "lifted component {c} is repeated or out of range"
                )));
            }
        }
        if self.symmetric.len() != self.elements.len() {
            return Err(invalid("element and sign flag counts differ".into()));
        }
        let width = self.elements.width();
        if !self.elements.is_empty() && width != n {
            return Err(invalid(format!("element of width {width} in Z^{n}")));
        }
        if let Some(stage) = &self.within {
            if stage.component >= n || seen[stage.component] {
                return Err(invalid(format!(
                    "the component being lifted, {}, is lifted already or out of range",
                    stage.component
                )));
            }
            let (sums, first) = match &stage.point {
                StagePoint::Pairs { sums, .. } => (sums, None),
                StagePoint::CatchUp {
                    sums, first_new, ..
                } => (sums, Some(*first_new)),
            };
            if let Some(e) = sums.iter().find(|e| e.len() != n) {
                return Err(invalid(format!("remainder of width {} in Z^{n}", e.len())));
            }
            let members: usize = self.symmetric.iter().map(|&s| 1 + usize::from(s)).sum();
            if first.is_some_and(|f| f as usize > members) {
                return Err(invalid("pending members beyond the working set".into()));
            }
        }
        let projected: Vec<Vec<i64>> = basis
            .iter()
            .map(|b| self.lifted.iter().map(|&c| b[c]).collect())
            .collect();
        let rank = IntMatrix::from_rows(&projected).map(|m| echelon(&m).pivot_cols.len())?;
        if rank != basis.len() {
            return Err(invalid(
                "the projection to the lifted components is not injective".into(),
            ));
        }
        let orbits = self
            .elements
            .rows()
            .zip(&self.symmetric)
            .map(|(e, &symmetric)| {
                Ok(Orbit {
                    rep: to_entries(&e)?,
                    symmetric,
                })
            })
            .collect::<Result<Vec<_>>>()?;
        Ok((self.lifted.clone(), orbits))
    }
}

fn invalid(message: String) -> Error {
    Error::Input {
        file: "<checkpoint>".into(),
        field: "state".into(),
        message,
    }
}
