//! Input and output types of [`solve`](fn@super::solve): level selection, method
//! choice, tolerances and the returned eigenpairs with their diagnostics.

/// Which levels to compute.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Selection {
    /// Levels `first..first+count` in ascending order (0-based: `first = 0` is the ground state).
    Index {
        /// 0-based index of the lowest wanted level.
        first: usize,
        /// Number of wanted levels (may be 0).
        count: usize,
    },
    /// Every level strictly below `energy` (same unit as the matrix entries, eV in chainwell).
    Below {
        /// Upper energy bound (exclusive).
        energy: f64,
    },
}

/// Algorithm choice.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Method {
    /// `Dense` when `n <=` [`DenseParams::limit`]; `Tridiagonal` when p = 1, B = I and no wrap;
    /// `ShiftInvert` otherwise.
    Auto,
    /// Full dense symmetric eigensolver (O(n^3) time, O(n^2) memory).
    Dense,
    /// Sturm bisection + Rayleigh-quotient inverse iteration + Rayleigh-Ritz
    /// (p = 1, B = I, no wrap only).
    Tridiagonal,
    /// Lanczos on (A - sigma B)^-1 B with a banded (or bordered, for wrap) LDL^T.
    ShiftInvert,
    /// Index windows only, and only with [`GuidedParams::guesses`]: inverse
    /// iteration at each guess, Rayleigh-Ritz, and an inertia proof of the
    /// window; falls back to `ShiftInvert` when the proof fails
    /// ([`super::guided`]). `Auto` takes it for a non-tridiagonal problem
    /// with n > [`DenseParams::limit`] when guesses are given.
    Guided,
}

/// Tuning parameters of [`solve`](fn@super::solve), one nested struct per
/// method (each with its own documented defaults) beside the choices that
/// concern every method. See [`EigenParams::default`].
#[derive(Debug, Clone, PartialEq)]
pub struct EigenParams {
    /// Algorithm (default [`Method::Auto`]).
    pub method: Method,
    /// Refuse work whose estimated memory ([`super::memory`]) exceeds this
    /// many bytes (default [`super::memory::default_limit`]: half the
    /// machine's memory, 4 GiB where it cannot be read).
    pub memory_limit: usize,
    /// The dense reference solver.
    pub dense: DenseParams,
    /// The order-2 (tridiagonal) path.
    pub tridiagonal: TridiagonalParams,
    /// Shift-invert Lanczos, the general path and everyone's fallback.
    pub lanczos: LanczosParams,
    /// The guided path (inverse iteration at given guesses).
    pub guided: GuidedParams,
}

impl Default for EigenParams {
    fn default() -> Self {
        Self {
            method: Method::Auto,
            memory_limit: super::memory::default_limit(),
            dense: DenseParams::default(),
            tridiagonal: TridiagonalParams::default(),
            lanczos: LanczosParams::default(),
            guided: GuidedParams::default(),
        }
    }
}

/// Parameters of [`Method::Dense`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct DenseParams {
    /// Largest n that `Auto` sends to the dense solver (default 300).
    pub limit: usize,
}

impl Default for DenseParams {
    fn default() -> Self {
        Self { limit: 300 }
    }
}

/// Parameters of [`Method::Tridiagonal`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TridiagonalParams {
    /// A level's Rayleigh-quotient iteration stops when the residual 2-norm
    /// ||T z - rho z|| <= residual_tol * eps * ||T||_1 (default 4.0); it also
    /// stops on stagnation once the residual is below N eps ||T||_1 / 2 (the
    /// LAPACK test scale).
    pub residual_tol: f64,
    /// Maximum Rayleigh-quotient / inverse iteration steps per level (default 40).
    pub max_iterations: usize,
}

impl Default for TridiagonalParams {
    fn default() -> Self {
        Self {
            residual_tol: 4.0,
            max_iterations: 40,
        }
    }
}

/// Parameters of [`Method::ShiftInvert`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct LanczosParams {
    /// Maximum Lanczos steps per restart (default 0 = automatic:
    /// 2 (k + 4) + 40 on the first run, doubled on each restart, capped by n).
    pub max_steps: usize,
    /// Maximum Lanczos restarts to recover missed (e.g. degenerate) levels (default 8).
    pub max_restarts: usize,
}

impl Default for LanczosParams {
    fn default() -> Self {
        Self {
            max_steps: 0,
            max_restarts: 8,
        }
    }
}

/// Parameters of [`Method::Guided`].
#[derive(Debug, Clone, PartialEq, Default)]
pub struct GuidedParams {
    /// Approximate eigenvalues of the wanted levels, one per level of a
    /// [`Selection::Index`] window, ascending (default `None`). They should
    /// be much closer to their levels than the level spacing (e.g. the
    /// Rayleigh quotients of the order-2 eigenvectors of the same potential
    /// on the same grid for an order-2p problem). They only choose the
    /// shifts of [`Method::Guided`]: the result is proven by inertia counts,
    /// and wrong or missing guesses cost time (a fallback to `ShiftInvert`),
    /// never correctness. Ignored by the other methods and for
    /// `Selection::Below`.
    pub guesses: Option<Vec<f64>>,
}

/// Computed eigenpairs.
#[derive(Debug, Clone, PartialEq)]
pub struct Eigenpairs {
    /// 0-based index (in the whole ascending spectrum) of `values[0]`.
    pub first: usize,
    /// Eigenvalues, ascending.
    pub values: Vec<f64>,
    /// Eigenvectors, `vectors[j]` belongs to `values[j]`; B-orthonormal
    /// (x^T B x = 1), unit 2-norm when B = I.
    pub vectors: Vec<Vec<f64>>,
}

/// How the result was obtained and how good it is.
#[derive(Debug, Clone, PartialEq)]
pub struct EigenInfo {
    /// Method actually used (never `Auto`).
    pub method: Method,
    /// Iterations: inverse-iteration steps (tridiagonal, guided), Lanczos steps (shift-invert), 0 (dense).
    pub iterations: usize,
    /// Number of O(N) / O(N p^2) factorisations or Sturm sweeps performed.
    pub factorizations: usize,
    /// Count of eigenvalues below the upper end of the returned set's isolating
    /// interval, confirmed by a Sturm count / Sylvester inertia (equals
    /// `first + values.len()` on success).
    pub inertia_below: usize,
    /// max_j ||A z_j - E_j B z_j||_1 / (||A||_1 N eps) (LAPACK DSTT21 form).
    pub residual_ratio: f64,
    /// ||A z_j - E_j B z_j||_1 of each returned pair, in the order of the
    /// values: computed once, for [`Self::residual_ratio`] and for the
    /// caller's per-level checks ([`super::diagnostics::pair_ratio`]).
    pub residual_norms: Vec<f64>,
    /// ||Z^T B Z - I||_1 / (k eps) (LAPACK DSTT21 form).
    pub orthogonality_ratio: f64,
}

/// What each eigen-method returns to [`solve`](fn@super::solve).
#[derive(Debug, Clone)]
pub struct PathOutput {
    /// Ascending eigenvalues.
    pub values: Vec<f64>,
    /// B-orthonormal eigenvectors (unit 2-norm when B = I).
    pub vectors: Vec<Vec<f64>>,
    /// The method's own steps in total (Rayleigh-quotient, Lanczos or
    /// inverse-iteration steps).
    pub iterations: usize,
    /// Factorisations and Sturm sweeps, inertia counts included.
    pub factorizations: usize,
    /// Inertia count at the upper check point of the returned window.
    pub inertia_below: usize,
}
