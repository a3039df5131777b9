//! From a model and a grid to the discretised eigenproblem.

use crate::grid::{Grid, Scheme};
use crate::hamiltonian;
use crate::input::Model;

use super::corners::{find_corners, CornerReport};
use super::gridding::{breaks, Breaks};
use super::SolveError;

/// The grid's positions, the potential's breaks inside the domain, V at the
/// positions (the mean of both sides at a jump on a grid point), the
/// corners whose stencil is corrected, and the discretised Hamiltonian:
/// what every solve on a grid starts from.
pub struct Discretised {
    /// Positions of the unknowns, Å.
    pub x: Vec<f64>,
    /// Jumps of the potential strictly inside the domain, Å.
    pub edges: Vec<f64>,
    /// Every break of the potential strictly inside the domain.
    pub breaks: Breaks,
    /// Kinks and weak breaks on this grid, corrected or not.
    pub corners: CornerReport,
    /// V at the unknowns, eV.
    pub v: Vec<f64>,
    /// The discretised eigenproblem.
    pub disc: hamiltonian::Discretisation,
}

/// Samples the potential on `grid` (the mean of both sides at a jump on a
/// grid point), builds the discretised Hamiltonian and corrects its
/// stencil at the corners on grid points ([`crate::grid::kink`]).
pub fn discretise(model: &Model, grid: &Grid) -> Result<Discretised, SolveError> {
    let x = grid.positions();
    let breaks = breaks(model);
    let edges = breaks.jumps.clone();
    let v = model
        .potential
        .sample_with_edges(&x, &edges, 1e-9 * grid.spacing)?;
    let mut disc = hamiltonian::build(
        grid,
        &v,
        model.kinetic(),
        model.grid.order,
        model.grid.scheme,
    );
    let corners = find_corners(model, grid, &breaks);
    if model.grid.scheme == Scheme::FiniteDifference && !corners.corners.is_empty() {
        hamiltonian::correct_corners(
            &mut disc.a,
            grid,
            &corners.corners,
            model.grid.order,
            model.kinetic(),
        );
    }
    Ok(Discretised {
        x,
        edges,
        breaks,
        corners,
        v,
        disc,
    })
}
