//! Figures of a constraint matrix that limit the test-set computation: rank, `Δ`, column
//! numbers, (total) unimodularity and the bounds on Graver norms that follow.
//!
//! The *full-row-rank version* `B` of `A` keeps the first maximal set of independent rows,
//! scanning from the top (row `i` is kept when it is independent of the rows kept before it).
//! `B` has the same kernel as `A`; `Δ`, unimodularity and the bounds refer to it.
//!
//! Definitions:
//! - `A` of rank `r` is *unimodular* when all nonzero `r x r` minors of `B` have the same
//!   absolute value (then equal to their gcd). This depends only on the row space, hence only
//!   on `ker_Z(A)`, and for such matrices the circuits are exactly the Graver basis
//!   (Sturmfels, "Gröbner Bases and Convex Polytopes", 1996, ch. 8; from memory). With gcd 1
//!   it is Schrijver's unimodularity ("Theory of Linear and Integer Programming", 1986, §21.4).
//! - `A` is *totally unimodular* when every square submatrix has determinant 0 or ±1.
//! - The column number `h` counts distinct nonzero columns with `a` and `-a` once; the
//!   parallel column number counts nonzero columns up to rational multiples.

mod bounds;
mod columns;
mod decimal;
mod delta;
mod extremal;
mod minors;
mod modularity;
mod options;
mod parity;

use num_bigint::BigInt;
use schemars::JsonSchema;
use serde::Serialize;

pub use bounds::NormBounds;
pub(crate) use columns::ColumnClasses;
pub use delta::Delta;
pub use extremal::{published_column_number, PublishedColumnNumber, RankCondition};
pub use modularity::Decision;
pub use options::AnalysisOptions;
pub use parity::norm_step;

use crate::lattice;
use crate::matrix::IntMatrix;
use columns::transpose;

/// Everything the analysis finds out about a matrix.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, JsonSchema)]
pub struct MatrixAnalysis {
    /// Number of variables (columns) `n`.
    pub variables: usize,
    /// Number of constraints (rows) `m`.
    pub constraints: usize,
    /// Rank `r` over the rationals.
    pub rank: usize,
    /// Dimension `n - r` of the kernel lattice.
    pub kernel_dimension: usize,
    /// Rows of `A` that form the full-row-rank version `B`, in increasing order.
    pub independent_rows: Vec<usize>,
    /// Largest absolute entry of `A`.
    pub max_abs_entry: u64,
    /// Number of zero columns.
    pub zero_columns: usize,
    /// Column number `h`: distinct nonzero columns, `a` and `-a` counted once.
    pub column_number: usize,
    /// Number of parallel classes: nonzero columns, rational multiples counted once.
    pub column_number_parallel: usize,
    /// `Δ` of `B`, or an upper bound on it.
    pub delta: Delta,
    /// How many maximal minors were evaluated (one column per parallel class).
    pub maximal_minors_evaluated: u64,
    /// The gcd of all maximal minors of `B` (every column counted), when `Δ` is exact.
    #[serde(serialize_with = "decimal::serialize_option")]
    #[schemars(with = "Option<crate::trace::Decimal>")]
    pub maximal_minor_gcd: Option<BigInt>,
    /// Whether `A` is unimodular (definition in the module documentation).
    pub unimodular: Decision,
    /// Whether every square subdeterminant of `A` is 0 or ±1.
    pub totally_unimodular: Decision,
    /// The published maximum of `column_number_parallel` for this rank and `Δ`, if any.
    pub published_column_number: Option<PublishedColumnNumber>,
    /// Whether `column_number_parallel` is within that published maximum.
    pub within_published_column_number: Option<bool>,
    /// Bounds on Graver norms and the proximity bound.
    pub bounds: NormBounds,
}

impl MatrixAnalysis {
    /// Analyses `a` within the work limits of `options`.
    pub fn of(a: &IntMatrix, options: &AnalysisOptions) -> Self {
        let independent_rows = lattice::echelon(&transpose(a)).pivot_cols;
        let b = a.select_rows(&independent_rows);
        let (n, r) = (a.cols(), independent_rows.len());
        let classes = ColumnClasses::of(a);
        let limit = options.current_subdet_limit();
        let structurally_tu = r > 0 && modularity::two_per_column(a) == Some(Decision::Yes);
        let minors = if structurally_tu {
            delta::MinorSummary::totally_unimodular()
        } else {
            delta::maximal_minors(&b, &classes.representatives(), limit)
        };
        let unimodular = modularity::unimodular(&classes, &minors);
        let totally_unimodular = match &minors.delta {
            _ if structurally_tu => Decision::Yes,
            Delta::Exact(d) if *d > BigInt::from(1) => Decision::No,
            _ => modularity::totally_unimodular(a, limit),
        };
        let parallel = classes.classes.len();
        let published = published_column_number(minors.delta.value(), r);
        let bounds = NormBounds::new(bounds::BoundInputs {
            n,
            r,
            h: classes.up_to_sign.len(),
            delta: minors.delta.value(),
            max_abs: b.max_abs(),
            unimodular: unimodular == Decision::Yes,
        });
        Self {
            variables: n,
            constraints: a.rows(),
            rank: r,
            kernel_dimension: n - r,
            independent_rows,
            max_abs_entry: a.max_abs(),
            zero_columns: classes.zero,
            column_number: classes.up_to_sign.len(),
            column_number_parallel: parallel,
            within_published_column_number: published.as_ref().map(|p| parallel as u128 <= p.value),
            published_column_number: published,
            delta: minors.delta,
            maximal_minors_evaluated: minors.evaluated,
            maximal_minor_gcd: minors.gcd,
            unimodular,
            totally_unimodular,
            bounds,
        }
    }

    /// The ℓ1 norm limit a completion uses: the smallest valid Graver norm bound, as `u64`
    /// saturating at `u64::MAX` (the exact value is in [`NormBounds`]).
    pub fn norm_limit(&self) -> u64 {
        u64::try_from(self.bounds.smallest()).unwrap_or(u64::MAX)
    }
}
