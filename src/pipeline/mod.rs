//! One solve of a checked model: grid → potential → Hamiltonian → selected
//! eigenpairs → levels, wavefunctions and observables, with the checks that
//! keep the numbers honest and the error estimates that say how good they
//! are.
//!
//! The stages, each in its own file, every arrow pointing down:
//!
//! ```text
//! solve_with ──> accuracy (estimate, refine: Richardson over coarser grids)
//!     └────────> on_grid::solve_on ──> gridding, discretise, guards, guesses
//!                                 └──> eigen ──> assemble (levels, occupancy,
//!                                                transitions) ──> warnings
//! ```
//!
//! - [`gridding`]: the grid a model asks for, aligned with its breaks.
//! - [`discretise`]: the potential on the grid and the banded Hamiltonian.
//! - [`corners`]: kinks and weak breaks on grid points, and their stencil
//!   corrections; the potential's slope at hard walls.
//! - [`guards`]: memory, conditioning and residual checks; the round-off floor.
//! - [`limits`]: the thresholds those checks use, and the solve's memory
//!   beside the eigen-solver's.
//! - [`guesses`]: order-2 levels as shifts for the higher-order schemes.
//! - [`on_grid`]: one solve on one grid ([`solve_on`]) or its energies only
//!   ([`energies_on`]).
//! - [`assemble`]: eigenpairs to levels, states, filling and transitions.
//! - [`warnings`]: what the user should know about the numbers.
//! - [`accuracy`]: Richardson error estimates and refinement to a tolerance.
//! - [`spectrum`](mod@spectrum): the absorption spectrum and ring degeneracies of a solution.
//! - [`cell`]: the periodic cell of a model for the band solver.
//! - [`response`](mod@response): the static polarizability and
//!   hyperpolarizabilities of the filled levels, when `[response]` asks.
//! - [`solution`] and [`error`]: what a solve returns and why it can fail.

pub mod accuracy;
pub mod assemble;
pub mod cell;
pub mod corners;
pub mod discretise;
pub mod error;
pub mod gridding;
pub mod guards;
pub mod guesses;
pub mod limits;
pub mod on_grid;
pub mod record;
pub mod response;
pub mod solution;
pub mod spectrum;
pub mod warnings;

#[cfg(test)]
mod tests;

pub use error::{Fault, SolveError};
pub use gridding::{grid_for, grid_near, grid_near_within, interior_edges, wanted_steps, Breaks};
pub use guards::roundoff_floor;
pub use limits::memory_estimate;
pub use on_grid::{energies_on, solve_on};
pub use solution::{Diagnostics, EdgeReport, Level, Refinement, RefinementStep, Solution, Timing};
pub use spectrum::{ring_degeneracies, spectrum};

use crate::eigen::EigenParams;
use crate::input::model::{Model, Resolution};

/// Options of a solve.
#[derive(Debug, Clone)]
pub struct SolveOptions {
    /// Eigen-solver parameters.
    pub eigen: EigenParams,
    /// Estimate each level's discretisation error from two coarser grids
    /// (Richardson); costs about 0.75 of one more solve.
    pub estimate: bool,
}

impl Default for SolveOptions {
    fn default() -> Self {
        Self {
            eigen: EigenParams::default(),
            estimate: true,
        }
    }
}

/// Solves the model on its own grid, with error estimates (or, for a
/// tolerance, on the grid the refinement settles on).
pub fn solve(model: &Model) -> Result<Solution, SolveError> {
    solve_with(model, &SolveOptions::default())
}

/// Solves the model with the given options.
pub fn solve_with(model: &Model, opts: &SolveOptions) -> Result<Solution, SolveError> {
    let mut sol = if let Resolution::Tolerance(tol) = model.grid.resolution {
        accuracy::refine(model, tol, opts)?
    } else {
        let mut sol = solve_on(model, &grid_for(model), &opts.eigen)?;
        if opts.estimate {
            accuracy::estimate(model, &mut sol, &opts.eigen)?;
        }
        sol
    };
    response::attach(model, &mut sol)?;
    Ok(sol)
}
