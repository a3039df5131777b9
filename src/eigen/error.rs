//! Error type of the `eigen` module.

use thiserror::Error;

/// Everything that can go wrong while computing selected eigenpairs.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum EigenError {
    /// The requested index window `first..first+count` does not fit in `0..n`.
    #[error("selection {first}..{first}+{count} is outside 0..{n}")]
    SelectionOutOfRange {
        /// First requested index (0-based).
        first: usize,
        /// Number of requested levels.
        count: usize,
        /// Matrix dimension.
        n: usize,
    },
    /// The metric matrix B is not positive definite (a non-positive pivot met
    /// in its LDL^T / Cholesky factorisation).
    #[error("matrix B is not positive definite")]
    NotPositiveDefinite,
    /// An iteration did not reach the requested accuracy.
    #[error(
        "no convergence for level {level} after {iterations} iterations (residual {residual:e})"
    )]
    NoConvergence {
        /// 1-based index of the level that failed (within the whole spectrum).
        level: usize,
        /// Iterations spent.
        iterations: usize,
        /// Last residual norm ||A z - E B z||_1 reached.
        residual: f64,
    },
    /// The estimated working memory exceeds `EigenParams::memory_limit`.
    #[error(
        "needs about {:.1} GB, above the limit of {:.1} GB",
        *.bytes_needed as f64 / 1e9,
        *.limit as f64 / 1e9
    )]
    TooLarge {
        /// Estimated bytes of working memory.
        bytes_needed: usize,
        /// The limit in force (bytes).
        limit: usize,
    },
    /// Inconsistent matrix storage (band lengths, bandwidths, wrap flags, dimensions).
    #[error("shape error: {what}")]
    Shape {
        /// Human-readable description of the inconsistency.
        what: String,
    },
}
