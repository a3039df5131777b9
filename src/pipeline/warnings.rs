//! What the user should know about a solve: coarse grids, artificial walls,
//! rounding, near-degenerate levels.

use crate::grid::{Boundary, Grid};
use crate::input::Model;

use super::limits::{DEGENERATE_FACTOR, MIN_POINTS_PER_LOBE, ROUNDING_WARNING};
use super::{EdgeReport, Level};

/// Warnings about the grid and the domain: a grid too coarse for the
/// highest level, and levels that feel hard walls that are not part of the
/// model.
pub fn warnings(model: &Model, grid: &Grid, v: &[f64], levels: &[Level]) -> Vec<String> {
    let mut out = Vec::new();
    let vmin = v.iter().copied().fold(f64::INFINITY, f64::min);
    if let Some(top) = levels.last() {
        let kinetic_energy = top.energy - vmin;
        if kinetic_energy > 0.0 {
            let k = (kinetic_energy / model.kinetic()).sqrt();
            let per_lobe = std::f64::consts::PI / (k * grid.spacing);
            if per_lobe < MIN_POINTS_PER_LOBE {
                out.push(format!(
                    "grid too coarse for level {}: about {:.1} points per half-wavelength where it is fastest (want at least {}); raise grid.points",
                    top.n, per_lobe, MIN_POINTS_PER_LOBE
                ));
            }
        }
    }
    // Hard walls are part of the model for a box or a chain; for any other
    // potential they are an artefact, and a level above the potential at an
    // edge feels them.
    let artificial_walls = grid.boundary == Boundary::Walls
        && model.chain.is_none()
        && !model.potential.terms.is_empty();
    if artificial_walls {
        let edge = model
            .potential
            .eval(model.domain.from)
            .min(model.potential.eval(model.domain.to));
        let feeling: Vec<usize> = levels
            .iter()
            .filter(|l| l.energy >= edge)
            .map(|l| l.n)
            .collect();
        if let (Some(first), Some(last)) = (feeling.first(), feeling.last()) {
            out.push(format!(
                "levels {first}..{last} lie above the potential at the domain's edges ({}) and feel its hard walls; widen the domain if they should be free of them",
                model.units.energy_out(edge)
            ));
        }
    }
    out
}

/// Warnings about rounding: energies whose last digits are noise, and
/// adjacent levels that rounding cannot tell apart. Degenerate pairs are
/// expected on a ring (the two directions of travel) and not flagged there.
pub fn precision_warnings(
    model: &Model,
    grid: &Grid,
    levels: &[Level],
    rounding: f64,
    scale: f64,
) -> Vec<String> {
    let mut out = Vec::new();
    let unit = model.units.energy.label();
    if rounding > ROUNDING_WARNING * scale {
        out.push(format!(
            "rounding limits the energies to about ±{:.1e} {unit} (the matrix's norm is large: a deep or high potential, or a very fine grid); digits beyond that are noise",
            model.units.energy_out(rounding)
        ));
    }
    if grid.boundary == Boundary::Walls {
        for pair in levels.windows(2) {
            let gap = pair[1].energy - pair[0].energy;
            if gap < DEGENERATE_FACTOR * rounding {
                out.push(format!(
                    "levels {} and {} are degenerate to within rounding (they differ by {:.1e} {unit}): their wavefunctions may be any mixture of the two, so their nodes, signs and transition dipoles are not reliable",
                    pair[0].n,
                    pair[1].n,
                    model.units.energy_out(gap)
                ));
            }
        }
    }
    out
}

/// The warning for jumps of the potential that could not be put on grid
/// points.
pub fn jump_warning(model: &Model, edges: &EdgeReport) -> Option<String> {
    (!edges.aligned).then(|| format!(
        "the potential jumps at x = {:?} between grid points: levels then converge at low, erratic order and error estimates are unreliable; put the jumps at simple fractions of the domain",
        edges.positions.iter().map(|x| model.units.length_out(*x)).collect::<Vec<_>>()
    ))
}
