//! Selected eigenpairs of real symmetric banded matrices (finite-difference
//! Hamiltonians of order 2..8, half-bandwidth p = 1..4), of generalized pencils
//! A x = E B x with B symmetric positive definite (Numerov), and of periodic
//! (ring) matrices with wrap-around corners.
//!
//! Levels are asked for by index or as "all below an energy"; every returned
//! set is certified complete by Sturm counts (tridiagonal) or Sylvester's law
//! of inertia applied to an LDL^T factorisation of A - sigma B: the number of
//! eigenvalues below the upper end of the returned window's isolating interval
//! is reported as [`EigenInfo::inertia_below`].
//!
//! Methods ([`Method`]):
//! * `Dense` — reference solver, nalgebra's symmetric QR (+ Cholesky reduction
//!   for B), used by `Auto` for n <= [`DenseParams::limit`] (default 300).
//! * `Tridiagonal` — order-2 fast path: Sturm bisection to isolate, Rayleigh
//!   quotient iteration with twisted factorisations, Rayleigh-Ritz
//!   ([`tridiagonal`] module docs give the sources).
//! * `ShiftInvert` — shift-and-invert Lanczos with full
//!   re-orthogonalisation on a banded (bordered for wrap) LDL^T.
//! * `Guided` — with one guess per wanted level ([`GuidedParams::guesses`]):
//!   inverse iteration at each guess, Rayleigh-Ritz and an inertia proof
//!   ([`guided`]); falls back to `ShiftInvert` when the proof fails.
//!
//! Diagnostics follow LAPACK's DSTT21/DSTT22 scalings ([`diagnostics`]); the
//! memory each method needs, and the limit it is held to, are in [`memory`].
//! Each method has its own `*Params` nested in [`EigenParams`] (faer's
//! style), with documented defaults.

pub mod dense;
pub mod diagnostics;
pub mod error;
pub mod guided;
pub mod ldlt;
pub mod matrix;
pub mod memory;
pub mod params;
pub mod shift_invert;
pub mod solve;
pub mod sturm;
pub mod subspace;
pub mod tridiagonal;

#[cfg(test)]
mod tests;

pub use error::EigenError;
pub use matrix::{Problem, SymBanded};
pub use params::{
    DenseParams, EigenInfo, EigenParams, Eigenpairs, GuidedParams, LanczosParams, Method,
    PathOutput, Selection, TridiagonalParams,
};
pub use solve::{auto_method, count_below, eigenvalues, solve, solve_unchecked};
