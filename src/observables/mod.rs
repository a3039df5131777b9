//! Observables of computed levels: per-state summaries, the ideal-box
//! reference, aufbau occupation, transition dipoles with oscillator
//! strengths, and broadened absorption spectra.
//!
//! Everything here is a pure function over plain slices (no I/O), in
//! chainwell's internal units: Å, eV, electron masses.
//!
//! # Conventions
//! * Levels are numbered `n = 1, 2, ...` from the lowest.
//! * The grid is uniform with spacing `h`; `x[i]` are the unknowns'
//!   positions (for hard walls the interior points only). The grid integral
//!   of `f` is `h * sum_i f_i`: the trapezoid rule with zero end values for
//!   hard walls, the plain sum over one period for a periodic ring.
//! * Wavefunctions are real, normalised to `h * sum psi_i^2 = 1`, with the
//!   sign fixed so that the first non-negligible sample from the left (the
//!   first with `|psi_i| > 1e-3 max|psi|`) is positive ([`normalise`]).
//!
//! # Contents
//! * [`states`]: [`normalise`], [`count_nodes`], [`density`],
//!   [`summarise`] / [`StateSummary`] (moments, classically allowed regions).
//! * [`boxlimit`]: the ideal box, [`box_energy`], [`effective_box_length`],
//!   [`box_dipole`] (Griffiths sec. 2.2; derivation in the item docs).
//! * [`occupancy`]: aufbau filling, [`fill`] / [`Occupancy`] (H. Kuhn,
//!   J. Chem. Phys. 17, 1198 (1949)).
//! * [`transitions`](mod@transitions): [`dipole`], [`transitions()`] /
//!   [`Transition`], oscillator strengths (R. C. Hilborn, Am. J. Phys. 50, 982
//!   (1982)) and the Thomas-Reiche-Kuhn sum [`trk_sum`] / [`SumRule`].
//! * [`huckel`]: the tight-binding levels of the same atoms, [`HuckelSpec`] /
//!   [`Huckel`] (E. Hückel, Z. Phys. 70, 204 (1931)).
//! * [`degeneracy`]: grouping of (near-)degenerate levels, e.g. the `+-j`
//!   pairs of a ring ([`group_levels`], [`summarize_levels`], [`Degeneracy`]).
//! * [`spectrum`]: [`absorption`] / [`Spectrum`] with [`LineShape`],
//!   [`default_wavelength_grid`], [`integrated_strength`]
//!   (`f = 4.319e-9 int epsilon d nu~`, Atkins' *Physical Chemistry*).
//! * [`response`]: static polarizability and hyperpolarizabilities of the
//!   filled levels along x ([`static_response`]; Sternheimer equations on
//!   the grid, the 2n+1 rule).

pub mod boxlimit;
pub mod degeneracy;
pub mod huckel;
pub mod occupancy;
pub mod response;
pub mod spectrum;
pub mod states;
pub mod transitions;

pub use boxlimit::{box_dipole, box_energy, effective_box_length};
pub use degeneracy::{group_levels, summarize_levels, Degeneracy};
pub use huckel::{Huckel, HuckelError, HuckelSpec};
pub use occupancy::{fill, Excitation, Occupancy, OccupancyError};
pub use response::{static_response, StaticResponse};
pub use spectrum::{
    absorption, default_wavelength_grid, integrated_strength, LineShape, Spectrum,
    STRENGTH_PER_ABSORPTIVITY,
};
pub use states::{allowed_intervals, count_nodes, density, normalise, summarise, StateSummary};
pub use transitions::{
    dipole, occupancy_factor, oscillator_strength, transitions, trk_sum, SumRule, Transition,
};
