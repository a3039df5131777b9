//! Energy bands of the infinite-chain limit of a conjugated polymer.
//!
//! A chain long enough to be treated as infinite has a periodic potential
//! `V(x + a) = V(x)`, and its one-electron states are Bloch waves
//! `psi(x + a) = e^{i k a} psi(x)` (F. Bloch, Z. Phys. 52, 555 (1929)). One
//! cell is discretised with `M` points and the finite-difference Laplacian
//! of order `2 p` (B. Fornberg, Math. Comp. 51, 699 (1988)); stencil
//! neighbours outside the cell are folded back with the Bloch phase, giving a
//! dense Hermitian matrix `H_k` whose eigenvalues are the band energies at
//! wavevector `k` (see [`bloch`] for the matrix).
//!
//! - [`bloch`]: the cell description [`CellProblem`], the matrix
//!   [`bloch_hamiltonian`], single-`k` solves [`solve_k`] and the sampled
//!   [`band_structure`] over `[0, pi / a]` (parallel over `k` with rayon,
//!   bit-identical for any thread count).
//! - [`edges`]: band bottoms and tops with refined positions, effective masses
//!   `m* / m_e = hbar^2 / (m_e d^2E/dk^2)` ([`band_edges`]) and the gaps
//!   between consecutive bands ([`gaps`]).
//!
//! Units: length in ångström, wavevector in 1/Å, energy in eV, masses in
//! electron masses.

pub mod bloch;
pub mod edges;

pub use bloch::{band_structure, bloch_hamiltonian, solve_k, BandStructure, CellProblem};
pub use edges::{band_edges, gaps, BandEdge, Gap};

/// Errors of the band solver.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum BandsError {
    /// The cell has fewer grid points than the stencil width `2 p + 1`.
    #[error("the cell has {points} grid points but the stencil needs at least {needed}")]
    TooFewPoints {
        /// Number of points `M` given.
        points: usize,
        /// Minimum `2 p + 1` for the given weights.
        needed: usize,
    },
    /// The period is not a finite positive number of ångström.
    #[error("the cell period must be finite and positive, got {period} Å")]
    BadPeriod {
        /// The rejected period in ångström.
        period: f64,
    },
    /// A potential value is NaN or infinite.
    #[error("the potential at cell point {index} is not finite")]
    NonFinitePotential {
        /// Zero-based index of the first bad point.
        index: usize,
    },
    /// More bands were asked for than the matrix has eigenvalues.
    #[error("asked for {asked} bands but the cell supports only {available}")]
    TooFewBands {
        /// Number of bands requested.
        asked: usize,
        /// Number of eigenvalues available (`M`).
        available: usize,
    },
    /// Fewer than two k points were asked for (the grid needs `0` and `pi / a`).
    #[error("a band structure needs at least 2 k points, got {kpoints}")]
    TooFewKpoints {
        /// The rejected number of k points.
        kpoints: usize,
    },
    /// The kinetic prefactor is not a finite positive number of eV Å².
    #[error("the kinetic prefactor hbar^2/2m must be finite and positive, got {kinetic} eV Å²")]
    BadKinetic {
        /// The rejected prefactor in eV Å².
        kinetic: f64,
    },
    /// The stencil weights are fewer than two or not all finite.
    #[error("the stencil needs at least 2 finite weights c_0..c_p, got {count} values")]
    BadWeights {
        /// Number of weights given.
        count: usize,
    },
    /// The wavevector is NaN or infinite.
    #[error("the wavevector must be finite, got {k} 1/Å")]
    NonFiniteWavevector {
        /// The rejected wavevector in 1/Å.
        k: f64,
    },
}
