//! From a model and a grid to the discretised eigenproblem.

use crate::grid::Grid;
use crate::hamiltonian;
use crate::input::Model;

use super::gridding::interior_edges;
use super::SolveError;

/// The grid's positions, the potential's jumps inside the domain, V at the
/// positions (the mean of both sides at a jump on a grid point) and the
/// discretised Hamiltonian: what every solve on a grid starts from.
pub struct Discretised {
    /// Positions of the unknowns, Å.
    pub x: Vec<f64>,
    /// Jumps of the potential strictly inside the domain, Å.
    pub edges: Vec<f64>,
    /// V at the unknowns, eV.
    pub v: Vec<f64>,
    /// The discretised eigenproblem.
    pub disc: hamiltonian::Discretisation,
}

/// Samples the potential on `grid` (the mean of both sides at a jump on a
/// grid point) and builds the discretised Hamiltonian.
pub fn discretise(model: &Model, grid: &Grid) -> Result<Discretised, SolveError> {
    let x = grid.positions();
    let edges = interior_edges(model);
    let v = model
        .potential
        .sample_with_edges(&x, &edges, 1e-9 * grid.spacing)?;
    let disc = hamiltonian::build(
        grid,
        &v,
        model.kinetic(),
        model.grid.order,
        model.grid.scheme,
    );
    Ok(Discretised { x, edges, v, disc })
}
