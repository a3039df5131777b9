//! Grid choice: the grid a model asks for, aligned with the potential's
//! jumps (see [`crate::grid::align`]).

use crate::grid::{align, Grid};
use crate::input::model::{Model, Resolution};

/// The number of steps across the domain a model asks for (before
/// alignment). A tolerance starts from the default spacing.
pub fn wanted_steps(model: &Model) -> usize {
    match model.grid.resolution {
        Resolution::Points(n) => Grid::with_points(&model.domain, n).steps(),
        Resolution::Spacing(h) => Grid::with_spacing(&model.domain, h).steps(),
        Resolution::Tolerance(_) => {
            Grid::with_spacing(&model.domain, crate::input::model::DEFAULT_SPACING_ANGSTROM).steps()
        }
    }
}

/// The jumps of the model's potential strictly inside its domain, Å.
pub fn interior_edges(model: &Model) -> Vec<f64> {
    align::interior_edges(&model.domain, &model.potential.discontinuities())
}

/// A grid of about `steps` steps for the model: when the potential jumps,
/// the nearest step count (a multiple of `multiple`, at most 10 % more)
/// that puts every jump on a grid point, so that halving the spacing keeps
/// them there.
pub fn grid_near(model: &Model, steps: usize, multiple: usize) -> Grid {
    let edges = interior_edges(model);
    let steps = if edges.is_empty() {
        steps
    } else {
        align::aligned_steps(&model.domain, &edges, steps, multiple).unwrap_or(steps)
    };
    Grid::with_steps(&model.domain, steps)
}

/// The grid a model asks for, aligned with the potential's jumps.
pub fn grid_for(model: &Model) -> Grid {
    grid_near(model, wanted_steps(model), 4)
}
