//! The one error type of the `augment` crate.
//!
//! Outcomes such as "infeasible" or "unbounded" are [`crate::Status`] values, never errors; an
//! [`AugmentError`] means inconsistent input or an integer result that does not fit.

/// Result alias used throughout the crate.
pub type Result<T> = std::result::Result<T, AugmentError>;

/// Bad input or an arithmetic limit, with the field or variable concerned.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum AugmentError {
    /// Two inputs that must agree in length do not.
    #[error("{what} has length {found}, expected {expected}")]
    Dimension {
        /// Which input has the wrong length (for example `x0` or `lower`).
        what: &'static str,
        /// The length implied by the other inputs.
        expected: usize,
        /// The length given.
        found: usize,
    },
    /// The flat move storage is not a whole number of rows.
    #[error("move data has {len} entries, not a multiple of the width {width}")]
    RaggedMoves {
        /// Number of entries given.
        len: usize,
        /// Number of variables per move.
        width: usize,
    },
    /// A [`crate::Fitting`] cut for one box was given a problem with another.
    #[error("the moves were cut for another box")]
    OtherBox,
    /// A move is the zero vector, which can never improve anything.
    #[error("move {index} is the zero vector")]
    ZeroMove {
        /// Index of the move in the set.
        index: usize,
    },
    /// A quadratic term `a x^2 + c x` with `a < 0` is not convex.
    #[error("variable {variable}: quadratic coefficient {a} is negative, the term is not convex")]
    NegativeQuadratic {
        /// The variable whose term is rejected.
        variable: usize,
        /// The offending coefficient.
        a: i64,
    },
    /// A piecewise-linear term has fewer than two breakpoints.
    #[error(
        "variable {variable}: a piecewise-linear term needs at least two breakpoints, got {count}"
    )]
    TooFewBreakpoints {
        /// The variable whose term is rejected.
        variable: usize,
        /// Number of breakpoints given.
        count: usize,
    },
    /// Breakpoint abscissae are not strictly increasing.
    #[error("variable {variable}: breakpoint x = {x} does not come after x = {previous}")]
    UnsortedBreakpoints {
        /// The variable whose term is rejected.
        variable: usize,
        /// The abscissa before.
        previous: i64,
        /// The abscissa that should be larger.
        x: i64,
    },
    /// A segment between breakpoints has a slope that is not an integer, so the term would take
    /// fractional values at integer points.
    #[error("variable {variable}: the slope between x = {from} and x = {to} is not an integer")]
    FractionalSlope {
        /// The variable whose term is rejected.
        variable: usize,
        /// Left end of the segment.
        from: i64,
        /// Right end of the segment.
        to: i64,
    },
    /// Slopes of a piecewise-linear term decrease at a breakpoint: the term is not convex.
    #[error(
        "variable {variable}: not convex at x = {at}: slope {left} on the left exceeds slope {right} on the right"
    )]
    NotConvex {
        /// The variable whose term is rejected.
        variable: usize,
        /// The breakpoint where convexity fails.
        at: i64,
        /// Slope of the segment ending at `at`.
        left: i64,
        /// Slope of the segment starting at `at`.
        right: i64,
    },
    /// An exact integer result does not fit 64-bit (coordinates) or 128-bit (objective values).
    #[error("integer overflow while {during}; the data are too large for exact arithmetic")]
    Overflow {
        /// The computation that overflowed.
        during: &'static str,
    },
}

/// Shorthand for an [`AugmentError::Overflow`], for use with `ok_or`.
pub(crate) const fn overflow(during: &'static str) -> AugmentError {
    AugmentError::Overflow { during }
}
