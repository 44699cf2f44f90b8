//! Which test set serves the solves of a model: the library's policy, so that every caller
//! (the command line, an embedding program) gets the same set for the same request.
//!
//! A network matrix with linear costs needs no stored set: its cycles are its Graver basis
//! (De Loera, Hemmecke and Köppe 2013, ch. 3), and the network solver runs on them. Any other
//! model is served from the cache in this order: the complete Graver basis; a set truncated
//! to a box that holds the model's box (a test set for every instance inside it); then, when
//! no build is asked for, the largest set truncated by norm alone, whose answers say
//! "optimal among moves up to norm N" unless a dual bound proves more. On a miss with a
//! build asked for, the complete set is built under the caller's [`Control`] and stored.

use std::sync::Arc;

use augment::{Coverage, MoveSet};
use cache::EntryKey;

use super::build::{build, default_graver_keys, BuildOutcome, BuiltSet};
use super::library::{Obtained, SetAside, SetLibrary};
use super::spec::BuildSpec;
use crate::analysis::{AnalysisOptions, MatrixAnalysis};
use crate::completion::{moves_of, Control};
use crate::error::{Error, Result};
use crate::model::Model;
use crate::network::Network;
use crate::solve::{coverage_of, Prepared};

/// Which test set serves a model's instances.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub enum Engine {
    /// A network matrix with linear costs is solved along its cycles; any other model with
    /// its enumerated Graver basis.
    #[default]
    Auto,
    /// Always the enumerated Graver basis, also for network matrices.
    Moves,
    /// The cycles of the network; an error when the matrix is no network matrix.
    Cycles,
}

/// Where a served set came from.
#[derive(Clone, Debug, PartialEq, Eq)]
#[non_exhaustive]
pub enum Source {
    /// A cache entry, named by its digest in hex.
    Cached(String),
    /// Built for this request (and stored, when a cache was given).
    Built,
    /// None needed: the matrix is a network, whose cycles are its Graver basis.
    Network,
    /// A set document read from this file (and checked in full).
    File(String),
}

impl std::fmt::Display for Source {
    /// `loaded from the cache (1a2b3c4d5e6f)`, `built for this run` or `the network's cycles`.
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Source::Cached(digest) => write!(
                f,
                "loaded from the cache ({})",
                &digest[..digest.len().min(12)]
            ),
            Source::Built => f.write_str("built for this run"),
            Source::Network => f.write_str("the network's cycles"),
            Source::File(path) => write!(f, "read from {path}"),
        }
    }
}

/// A test set ready to serve the solves of one model.
#[derive(Clone, Debug)]
#[non_exhaustive]
pub struct Served {
    /// The moves in the solver's form, decoded once and shared by every preparation (empty
    /// for a network, whose cycles are implicit).
    pub moves: Arc<MoveSet>,
    /// What the set guarantees.
    pub coverage: Coverage,
    /// Where it came from.
    pub source: Source,
    /// The box the set was truncated to, if any (it serves only instances inside it).
    pub box_limit: Option<Vec<u64>>,
    /// The network, when the matrix is one: then the network solver runs.
    pub network: Option<Network>,
    /// A checkpoint found unusable and set aside while building, for the caller to report.
    pub set_aside: Option<SetAside>,
}

impl Served {
    /// The set prepared for solving instances of `matrix`, refusing instances wider than its
    /// box.
    pub fn prepare(&self, matrix: &crate::IntMatrix) -> Result<Prepared> {
        if let Some(network) = &self.network {
            return Ok(Prepared::network(matrix, network.clone()));
        }
        Ok(Prepared::with_moves(matrix, Arc::clone(&self.moves))?
            .with_box_limit(self.box_limit.clone()))
    }

    fn network(model: &Model, network: Network) -> Self {
        Served {
            moves: Arc::new(MoveSet::empty(model.variables(), Coverage::Complete)),
            coverage: Coverage::Complete,
            source: Source::Network,
            box_limit: None,
            network: Some(network),
            set_aside: None,
        }
    }

    /// The stored set `stored`, its entries read straight into the solver's form.
    fn cached(stored: &cache::StoredSet) -> Result<Self> {
        let coverage = coverage_of(&stored.metadata.completeness);
        Ok(Served {
            moves: Arc::new(moves_of(&stored.data, coverage)?),
            coverage,
            source: Source::Cached(stored.digest.to_hex()),
            box_limit: stored.key.truncation.bounds.clone(),
            network: None,
            set_aside: None,
        })
    }

    fn built(built: BuiltSet, set_aside: Option<SetAside>) -> Result<Self> {
        let coverage = coverage_of(&built.metadata.completeness);
        let moves = built.set.moves(coverage)?;
        Ok(Served {
            moves: Arc::new(moves),
            coverage,
            source: Source::Built,
            box_limit: None,
            network: None,
            set_aside,
        })
    }
}

/// The network cycles that serve `model` under `engine`, when they do: what [`serve`] gives
/// without looking at any cache (so a caller need not open one for a network).
pub fn by_cycles(model: &Model, engine: Engine) -> Result<Option<Served>> {
    Ok(network_engine(model, engine)?.map(|network| Served::network(model, network)))
}

/// The test set that serves `model` under `engine` (see the module documentation).
/// `library` is the cache (`None` when there is none to use); `build_under` builds the
/// complete set on a miss under that control, else a miss is [`Error::NotCached`]. A build
/// that stops is [`Error::BuildStopped`]; the cycles engine on a matrix that is no network is
/// [`Error::Unsupported`].
pub fn serve(
    model: &Model,
    library: Option<&SetLibrary>,
    engine: Engine,
    build_under: Option<&Control<'_>>,
) -> Result<Served> {
    if let Some(served) = by_cycles(model, engine)? {
        return Ok(served);
    }
    let Some(library) = library else {
        let Some(control) = build_under else {
            return Err(Error::Unsupported(
                "no cache to look in and no build asked for".to_string(),
            ));
        };
        let (analysis, spec) = complete_request(model)?;
        return match build(&model.matrix, &analysis, &spec, control, None)? {
            BuildOutcome::Built(built) => Served::built(*built, None),
            BuildOutcome::Stopped(reason) => Err(Error::BuildStopped {
                reason,
                kept: None,
                set_aside: None,
            }),
        };
    };
    let (complete, boxed) = default_graver_keys(model);
    for key in std::iter::once(&complete).chain(&boxed) {
        if let Some(stored) = library.find(key)? {
            return Served::cached(&stored);
        }
    }
    let Some(control) = build_under else {
        let by_norm = EntryKey {
            truncation: cache::Truncation {
                norm_limit: Some(1),
                bounds: None,
            },
            ..complete
        };
        return match library.find_largest(&by_norm)? {
            Some(stored) => Served::cached(&stored),
            None => Err(Error::NotCached {
                dir: library.store().dir().to_path_buf(),
            }),
        };
    };
    let (analysis, spec) = complete_request(model)?;
    match library.obtain(&model.matrix, &analysis, &spec, control, false)? {
        Obtained::Reused(stored) => Served::cached(&stored),
        Obtained::Built {
            built, set_aside, ..
        } => Served::built(*built, set_aside),
        Obtained::Stopped {
            reason,
            kept,
            set_aside,
        } => Err(Error::BuildStopped {
            reason,
            kept,
            set_aside: set_aside.map(Box::new),
        }),
    }
}

/// The network whose cycles serve `model` under `engine`, if they do. Convex costs are left
/// to the enumerated set, which serves them.
fn network_engine(model: &Model, engine: Engine) -> Result<Option<Network>> {
    match engine {
        Engine::Auto if model.convex.is_empty() => Ok(Network::detect(&model.matrix).ok()),
        Engine::Auto | Engine::Moves => Ok(None),
        Engine::Cycles if !model.convex.is_empty() => Err(Error::Unsupported(
            "the model has convex costs (a change price is one), which the network solver does not take"
                .to_string(),
        )),
        Engine::Cycles => Network::detect(&model.matrix)
            .map(Some)
            .map_err(|why| Error::Unsupported(format!("not a network matrix: {why}"))),
    }
}

/// The figures and the resolved request of `model`'s complete Graver basis (the analysis, of
/// subdeterminants, is only needed to build; lookups use keys without it).
fn complete_request(model: &Model) -> Result<(MatrixAnalysis, super::spec::ResolvedSpec)> {
    let analysis = MatrixAnalysis::of(&model.matrix, &AnalysisOptions::new());
    let spec = BuildSpec::default().resolve(model, &analysis)?;
    Ok((analysis, spec))
}
