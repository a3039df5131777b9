//! The pipeline's thresholds and its share of the memory model, in one
//! place: what a solve plans to allocate besides the eigen-solver (whose
//! model and limit are in [`crate::eigen::memory`]), which residuals and
//! rounding levels are accepted, and when a number earns a warning.

/// Estimated bytes of a solve on `points` unknowns with a stencil of
/// half-width `half_width` (and a metric B of half-width 1 when
/// `generalized`, Numerov), whose eigen-solver needs `eigen_bytes`
/// ([`crate::eigen::memory::eigen_bytes`], the one memory model): the
/// banded matrices, four vectors of the grid (positions, potential, two
/// work vectors), in `f64`, plus the eigen-solver's peak. The level
/// vectors become the wavefunctions in place (finite differences), so they
/// are counted once. Computed in floating point, so that it cannot overflow.
pub fn memory_estimate(
    points: usize,
    half_width: usize,
    generalized: bool,
    eigen_bytes: usize,
) -> f64 {
    let metric = if generalized { 2.0 } else { 0.0 };
    points as f64 * (half_width as f64 + 1.0 + metric + 4.0) * 8.0 + eigen_bytes as f64
}

/// **The one rounding figure** `R = eps ||H||_1` (eV; for Numerov `||K||_1`):
/// any backward-stable eigen-solver returns eigenvalues within a small
/// multiple of it (J. Demmel, *Applied Numerical Linear Algebra*, SIAM 1997,
/// sec. 5.2; LAPACK's bounds are `p(n) eps ||H||` with a modestly growing
/// `p(n)`, E. Anderson et al., *LAPACK Users' Guide*, 3rd ed., SIAM 1999,
/// sec. 4.7). It is `grid.roundoff_floor` in JSON, the floor added to every
/// error estimate, and what every threshold below is a multiple of.
///
/// A matrix is refused when `REFUSE_ROUNDING * R` exceeds the domain's
/// lowest box level `hbar^2/2m (pi/L)^2`: then rounding could blur every
/// energy by more than the spacing of the lowest levels (10 stands for
/// `p(n)`; common practice, no source).
pub const REFUSE_ROUNDING: f64 = 10.0;

/// Largest residual ratio `||H z - E z||_1 / (||H||_1 N eps)` accepted for a
/// returned eigenpair. LAPACK's tests fail a routine above 30 (the DSTT21
/// threshold); a pair that did not converge is many orders above that. 1e4
/// leaves a wide margin (common practice, no source).
pub const RESIDUAL_LIMIT: f64 = 1e4;

/// Points per half-wavelength below which a level is poorly resolved
/// (common practice, no source).
pub const MIN_POINTS_PER_LOBE: f64 = 10.0;

/// `R` relative to the domain's lowest box level above which the energies'
/// last digits are flagged as noise (common practice, no source): with `R`
/// above 1e-7 of the lowest level, fewer than seven digits of it are sure.
pub const ROUNDING_WARNING: f64 = 1e-7;

/// Two adjacent levels closer than this many times `R` are treated as
/// degenerate: their eigenvectors may be any mixture of the two (the angle
/// of an eigenvector's error is about `R / gap`; Davis and Kahan, SIAM J.
/// Numer. Anal. 7, 1 (1970)), so below `1e3 R` it can exceed 1e-3.
pub const DEGENERATE_FACTOR: f64 = 1e3;

/// Smallest box level `hbar^2/2m (pi/L)^2`, eV, that a solve accepts: a
/// domain so long or a particle so heavy that it falls below this would
/// print every level as a confident 0 (or lose all digits to underflow);
/// `1e-200` eV is far below any physical level and far above the
/// subnormal range (common practice, no source).
pub const SMALLEST_BOX_LEVEL_EV: f64 = 1e-200;

/// Grids with at most this many points skip the order-2 guesses: there the
/// shift-invert path takes a fraction of a second anyway, and the extra
/// order-2 solve would not pay for itself (common practice, no source).
pub const GUESS_MIN_POINTS: usize = 5000;

/// Dimensionless tolerance for calling two ring levels degenerate (see
/// [`crate::observables::group_levels`]): far above the eigen-solver's round-off,
/// far below any physical splitting worth reporting (common practice, no
/// source).
pub const DEGENERACY_TOLERANCE: f64 = 1e-7;
