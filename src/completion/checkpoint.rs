//! The state of project-and-lift between two stages, from which a run can resume.
//!
//! After a stage the working set is exactly the ⊑-minimal elements of the lattice projected
//! to the lifted components (within the signs and limits there). That set and the list of
//! components determine the rest of the run, whatever basis or machine produced them, so
//! resuming from a checkpoint gives the identical final set.

use serde::{Deserialize, Serialize};

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
    /// Representatives of the minimal set on those components.
    pub elements: Vec<Vec<i64>>,
    /// Whether each element's negation belongs to the set as well.
    pub symmetric: Vec<bool>,
}

impl Checkpoint {
    /// The state after a stage.
    pub(crate) fn of(lifted: &[usize], orbits: &[Orbit]) -> Self {
        Self {
            lifted: lifted.to_vec(),
            elements: orbits
                .iter()
                .map(|o| o.rep.iter().map(|&x| i64::from(x)).collect())
                .collect(),
            symmetric: orbits.iter().map(|o| o.symmetric).collect(),
        }
    }

    /// Checks that every element lies in `ker_Z(a)`.
    pub(crate) fn check_kernel(&self, a: &IntMatrix) -> Result<()> {
        for (i, e) in self.elements.iter().enumerate() {
            if e.len() != a.cols() || a.mul_vec(e).is_none_or(|v| v.iter().any(|&x| x != 0)) {
                return Err(invalid(format!(
                    "element {i} is not in the kernel of the matrix"
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
            .iter()
            .zip(&self.symmetric)
            .map(|(e, &symmetric)| {
                if e.len() != n {
                    return Err(invalid(format!("element of width {} in Z^{n}", e.len())));
                }
                Ok(Orbit {
                    rep: to_entries(e)?,
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
