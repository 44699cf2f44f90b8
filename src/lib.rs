//! kernstep: test sets of lattice moves for the integer models that planners re-optimise daily.
//!
//! For a constraint matrix `A` the library computes, once, a test set of lattice moves (the
//! Graver basis of `ker_Z(A)`, or the Hilbert basis of a sign-restricted kernel) and then
//! re-optimises any variant `(b, c, l, u)` of `min c.x, A x = b, l <= x <= u, x integer` by
//! augmentation along improving moves.
//!
//! Layers (arrows point down): [`model`] reads files, [`lattice`] does exact integer linear
//! algebra, [`analysis`] derives the bounds that limit a completion, [`completion`] builds the
//! sets; the workspace crates `augment` (the augmentation loop) and `cache` (the on-disk store)
//! know nothing of this crate. The library never prints.
//!
//! # Example
//!
//! The lane plan of `examples/lane_plan.toml`: two depots ship to two zones, `x = (Brackwater
//! to North, Brackwater to East, Fennick to North, Fennick to East)`, Brackwater ships 7,
//! North needs 5, East needs 6, the lanes cost 4, 6, 5 and 3 per pallet, and the lanes to
//! North carry at most 5 (from Brackwater) and 4 (from Fennick). The test set is built for the
//! matrix once, prepared, and the plan solved:
//!
//! ```
//! use kernstep::analysis::{AnalysisOptions, MatrixAnalysis};
//! use kernstep::completion::Control;
//! use kernstep::model::{Model, ModelKind};
//! use kernstep::solve::{coverage_of, Prepared, Verdict};
//! use kernstep::testset::{build, BuildOutcome, BuildSpec};
//!
//! let text = r#"
//!     matrix = [[1, 1, 0, 0], [1, 0, 1, 0], [0, 1, 0, 1]]
//!     rhs = [7, 5, 6]
//!     cost = [4, 6, 5, 3]
//!     lower = [0, 0, 0, 0]
//!     upper = [5, "inf", 4, "inf"]
//! "#;
//! let model = Model::from_str(text, ModelKind::Toml, "lane_plan.toml")?;
//!
//! // The test set: the Graver basis of the matrix (its default build request).
//! let analysis = MatrixAnalysis::of(&model.matrix, &AnalysisOptions::new());
//! let spec = BuildSpec::default().resolve(&model, &analysis)?;
//! let outcome = build(&model.matrix, &analysis, &spec, &Control::new(), None)?;
//! let BuildOutcome::Built(built) = outcome else {
//!     unreachable!("a build without limits finishes");
//! };
//! // The kernel is spanned by one primitive vector, so the basis is that move and its negation.
//! assert_eq!(built.set.to_rows(), [[1, -1, -1, 1]]);
//!
//! // Prepared once per matrix; then any variant of the numbers is solved with it.
//! let coverage = coverage_of(&built.metadata.completeness);
//! let prepared = Prepared::new(&model.matrix, &built.set, coverage)?;
//! let options = kernstep::augment::Options::default();
//! let Verdict::Solved(plan) = prepared.solve(&model, &options, None, &|| false)? else {
//!     unreachable!("the rows have integer solutions");
//! };
//!
//! // By hand: with x_1 = t the rows give x = (t, 7 - t, 5 - t, t - 1), feasible for
//! // 1 <= t <= 5, at cost 64 - 4t; the optimum is t = 5: 4*5 + 6*2 + 5*0 + 3*4 = 44.
//! assert_eq!(plan.status, kernstep::augment::Status::Optimal);
//! assert_eq!(plan.x, [5, 2, 0, 4]);
//! assert_eq!(plan.objective, Some(44));
//! # Ok::<(), kernstep::Error>(())
//! ```
//!
//! # What `kernstep solve --build` does
//!
//! The same plan through the library's policies: [`testset::serve`] picks the stored set that
//! serves the model (building and storing the complete set on a miss) and
//! [`certify::judge`] says what the solve proved, with the dual bound of a partial set's plan.
//!
//! ```
//! use kernstep::certify::{judge, Answer, Claim};
//! use kernstep::completion::Control;
//! use kernstep::solve::Numbers;
//! use kernstep::testset::{serve, Engine, SetLibrary};
//!
//! # let text = "matrix = [[1, 1, 0, 0], [1, 0, 1, 0], [0, 1, 0, 1]]\nrhs = [7, 5, 6]\n\
//! #     cost = [4, 6, 5, 3]\nlower = [0, 0, 0, 0]\nupper = [5, \"inf\", 4, \"inf\"]";
//! # let model = kernstep::model::Model::from_str(text, kernstep::model::ModelKind::Toml, "m")?;
//! # let dir = tempfile::tempdir().unwrap();
//! let library = SetLibrary::open(Some(dir.path()))?;
//! let served = serve(&model, Some(&library), Engine::Auto, Some(&Control::new()))?;
//! let prepared = served.prepare(&model.matrix)?;
//! let options = kernstep::augment::Options::default();
//! let verdict = prepared.solve(&model, &options, None, &|| false)?;
//! let bound = prepared.bound(Numbers::of(&model), &verdict, None)?;
//! let answer = judge(&verdict, bound.as_ref());
//! // The lanes form a network, so its cycles serve it and row potentials prove the plan.
//! assert_eq!(answer, Answer::Optimal { objective: 44, claim: Claim::Potentials });
//! # Ok::<(), kernstep::Error>(())
//! ```
#![deny(missing_docs)]

pub mod analysis;
pub mod bound;
pub mod certify;
pub mod completion;
pub mod error;
pub mod formats;
pub mod input;
pub mod lattice;
pub mod matrix;
pub mod model;
pub mod network;
pub mod scenario;
pub mod solve;
pub mod testset;
pub mod text;
pub mod trace;

/// The augmentation loop (options, statuses, move sets), so that a library user needs only
/// this crate.
pub use augment;
/// The on-disk store of test sets.
pub use cache;
pub use certify::{judge, Answer, Claim};
pub use error::{Error, Result};
pub use matrix::IntMatrix;
pub use model::Model;
pub use solve::{Numbers, Prepared, Verdict};
pub use testset::{serve, Engine, Job, JobReport, Served, SetLibrary};
pub use trace::{solve_document, Outcome, SolveDocument};
