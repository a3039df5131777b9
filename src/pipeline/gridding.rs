//! Grid choice: the grid a model asks for, aligned with the potential's
//! breaks (see [`crate::grid::align`]): every jump, kink and weak break on
//! a grid point when a grid near the wanted one allows it, else the jumps
//! and kinks, else the jumps alone.

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

/// Where the model's potential is not smooth strictly inside its domain,
/// Å, by what jumps there ([`crate::potential::BreakKind`]).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Breaks {
    /// V jumps.
    pub jumps: Vec<f64>,
    /// V' jumps (corners).
    pub kinks: Vec<f64>,
    /// V''' jumps.
    pub weak: Vec<f64>,
}

impl Breaks {
    /// Every break, sorted.
    pub fn all(&self) -> Vec<f64> {
        let mut all: Vec<f64> = self
            .jumps
            .iter()
            .chain(&self.kinks)
            .chain(&self.weak)
            .copied()
            .collect();
        all.sort_by(f64::total_cmp);
        all
    }

    /// Whether there is no break at all.
    pub fn is_empty(&self) -> bool {
        self.jumps.is_empty() && self.kinks.is_empty() && self.weak.is_empty()
    }
}

/// The breaks of the model's potential strictly inside its domain.
pub fn breaks(model: &Model) -> Breaks {
    let d = &model.domain;
    let inside = |v: Vec<f64>| align::interior_edges(d, &v);
    Breaks {
        jumps: interior_edges(model),
        kinks: inside(model.potential.kinks(d.from, d.to)),
        weak: inside(model.potential.weak_breaks(d.from, d.to)),
    }
}

/// The jumps of the model's potential strictly inside its domain, Å.
pub fn interior_edges(model: &Model) -> Vec<f64> {
    align::interior_edges(&model.domain, &model.potential.discontinuities())
}

/// A grid of about `steps` steps for the model: when the potential has
/// breaks, the nearest step count (a multiple of `multiple`, at most 10 %
/// more) that puts them on grid points (all of them, else the jumps and
/// kinks, else the jumps), so that halving the spacing keeps them there.
pub fn grid_near(model: &Model, steps: usize, multiple: usize) -> Grid {
    grid_near_within(model, steps, multiple, align::SEARCH_SLACK)
}

/// Like [`grid_near`], searching up to `slack` (a fraction of `steps`)
/// above `steps` for an aligned grid.
pub fn grid_near_within(model: &Model, steps: usize, multiple: usize, slack: f64) -> Grid {
    let b = breaks(model);
    let d = &model.domain;
    let strong: Vec<f64> = b.jumps.iter().chain(&b.kinks).copied().collect();
    let found = [b.all(), strong, b.jumps.clone()]
        .iter()
        .filter(|set| !set.is_empty())
        .find_map(|set| align::aligned_steps_within(d, set, steps, multiple, slack));
    Grid::with_steps(d, found.unwrap_or(steps))
}

/// The grid a model asks for, aligned with the potential's breaks.
pub fn grid_for(model: &Model) -> Grid {
    grid_near(model, wanted_steps(model), 4)
}
