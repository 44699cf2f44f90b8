//! Settings of the matrix analysis.

/// How much enumeration the analysis may do.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct AnalysisOptions {
    subdet_limit: u64,
}

impl AnalysisOptions {
    /// The default limit on enumerated subdeterminants.
    pub const DEFAULT_SUBDET_LIMIT: u64 = 200_000;

    /// Options with every default.
    pub fn new() -> Self {
        Self {
            subdet_limit: Self::DEFAULT_SUBDET_LIMIT,
        }
    }

    /// Sets the largest number of column subsets whose maximal minors are enumerated for
    /// `Δ` and unimodularity, and the largest number of square submatrices examined for
    /// total unimodularity; past it `Δ` is bounded and the question left undecided.
    /// Default: 200 000.
    pub fn subdet_limit(mut self, limit: u64) -> Self {
        self.subdet_limit = limit;
        self
    }

    /// The current subdeterminant limit.
    pub fn current_subdet_limit(&self) -> u64 {
        self.subdet_limit
    }
}

impl Default for AnalysisOptions {
    fn default() -> Self {
        Self::new()
    }
}
