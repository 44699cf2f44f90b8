//! What the user asks to build, and how that resolves against a model and its analysis.
//!
//! A [`BuildSpec`] holds the user's choices (kind, signs, norm limit, box, method); resolving
//! it against a model gives the [`ResolvedSpec`] that the completion runs and the cache keys:
//! the exact sign vector, the truncation handed to the completion, and the honest
//! [`Completeness`] of the result.

use cache::{Completeness, SetKind};

use crate::analysis::MatrixAnalysis;
use crate::completion::{Method, Sign, Truncation};
use crate::error::{Error, Result};
use crate::model::Model;

/// How the l1 norm limit of a build is chosen.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum NormLimit {
    /// The smallest proven bound on Graver norms: prunes the work, loses nothing.
    Auto,
    /// No limit at all.
    Unlimited,
    /// A user value; below the proven bound it makes the set partial (recorded as such).
    AtMost(u64),
}

/// Whether the set is truncated to the model's box `|g_i| <= u_i - l_i`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum BoxPolicy {
    /// Truncate to the box of the model's bounds (valid for every instance inside it).
    FromBounds,
    /// No box.
    Unlimited,
}

/// The user's request for one test set.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct BuildSpec {
    /// Graver basis or Hilbert basis of a sign-restricted kernel (default: Graver).
    pub kind: SetKind,
    /// Sign per variable; `None` means all free for Graver, all `>= 0` for Hilbert.
    pub signs: Option<Vec<Sign>>,
    /// Norm limit policy (default: [`NormLimit::Auto`]).
    pub norm_limit: NormLimit,
    /// Box policy (default: [`BoxPolicy::Unlimited`], so one set serves every variant).
    pub bounds: BoxPolicy,
    /// Completion method (default: project-and-lift).
    pub method: Method,
}

impl Default for BuildSpec {
    fn default() -> Self {
        Self {
            kind: SetKind::Graver,
            signs: None,
            norm_limit: NormLimit::Auto,
            bounds: BoxPolicy::Unlimited,
            method: Method::ProjectAndLift,
        }
    }
}

/// A request made concrete for one model.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ResolvedSpec {
    /// Graver or Hilbert.
    pub kind: SetKind,
    /// Sign per variable.
    pub signs: Vec<Sign>,
    /// Truncation passed to the completion (includes an `Auto` norm limit).
    pub truncation: Truncation,
    /// Truncation that changes the set, as recorded in the cache key.
    pub key_truncation: Truncation,
    /// What the result will be.
    pub completeness: Completeness,
    /// The proven norm bound, if it fits `u64`.
    pub proven_bound: u64,
    /// Completion method.
    pub method: Method,
}

impl BuildSpec {
    /// Resolves the request for `model`, whose matrix has the figures `analysis`.
    pub fn resolve(&self, model: &Model, analysis: &MatrixAnalysis) -> Result<ResolvedSpec> {
        let n = model.variables();
        let signs = match (&self.signs, self.kind) {
            (Some(s), _) if s.len() != n => {
                return Err(Error::Input {
                    file: "<arguments>".into(),
                    field: "signs".into(),
                    message: format!("{} signs given, the model has {n} variables", s.len()),
                })
            }
            (Some(s), _) => s.clone(),
            (None, SetKind::Graver) => vec![Sign::Free; n],
            (None, SetKind::Hilbert) => vec![Sign::NonNegative; n],
            (None, SetKind::Cycles) => {
                return Err(Error::Input {
                    file: "<arguments>".into(),
                    field: "kind".into(),
                    message: "the cycles of a network are not completed; see testset::cycles_entry"
                        .into(),
                })
            }
        };
        let proven = analysis.norm_limit();
        let bounds = match self.bounds {
            BoxPolicy::FromBounds => model_box(model),
            BoxPolicy::Unlimited => None,
        };
        let user_limit = match self.norm_limit {
            NormLimit::AtMost(limit) if limit < proven => Some(limit),
            _ => None,
        };
        let completeness = match (user_limit, &bounds) {
            (Some(limit), _) => Completeness::NormTruncated { limit },
            (None, Some(_)) => Completeness::BoxTruncated,
            (None, None) => Completeness::Complete,
        };
        let run_limit = match self.norm_limit {
            NormLimit::Auto => Some(proven),
            NormLimit::Unlimited => None,
            NormLimit::AtMost(limit) => Some(limit.min(proven)),
        };
        Ok(ResolvedSpec {
            kind: self.kind,
            signs,
            truncation: Truncation {
                norm_limit: run_limit.filter(|&l| l < u64::MAX),
                bounds: bounds.clone(),
            },
            key_truncation: Truncation {
                norm_limit: user_limit,
                bounds,
            },
            completeness,
            proven_bound: proven,
            method: self.method,
        })
    }
}

/// `u_i - l_i` per variable (`u64::MAX` where a bound is infinite); `None` if no variable
/// has both bounds.
pub(crate) fn model_box(model: &Model) -> Option<Vec<u64>> {
    let widths: Vec<u64> = model
        .lower
        .iter()
        .zip(&model.upper)
        .map(|(l, u)| match (l, u) {
            (Some(l), Some(u)) => u.abs_diff(*l),
            _ => u64::MAX,
        })
        .collect();
    widths.iter().any(|&w| w < u64::MAX).then_some(widths)
}
