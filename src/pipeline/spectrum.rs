//! Quantities derived from a finished solution: its absorption spectrum and
//! the degenerate groups of a ring.

use crate::grid::Boundary;
use crate::input::Model;
use crate::observables;

use super::limits::DEGENERACY_TOLERANCE;
use super::Solution;

/// The absorption spectrum of a solution's transitions, broadened as the
/// model's `[spectrum]` says, on a wavelength grid that covers the bands.
pub fn spectrum(model: &Model, sol: &Solution) -> observables::Spectrum {
    let lines: Vec<(f64, f64)> = sol
        .transitions
        .iter()
        .map(|t| (t.energy, t.strength))
        .collect();
    let shape = if model.spectrum.lorentzian {
        observables::LineShape::Lorentzian
    } else {
        observables::LineShape::Gaussian
    };
    let grid = observables::default_wavelength_grid(&lines, model.spectrum.fwhm);
    observables::absorption(&lines, shape, model.spectrum.fwhm, &grid)
}

/// The computed levels of a ring (periodic domain) grouped into degenerate
/// sets, e.g. the `+-j` pairs of a free ring; `None` with hard walls. A group
/// at the top or bottom of the computed levels may lack a partner that was
/// not computed.
pub fn ring_degeneracies(sol: &Solution) -> Option<Vec<crate::observables::Degeneracy>> {
    (sol.grid.boundary == Boundary::Periodic).then(|| {
        let energies: Vec<f64> = sol.levels.iter().map(|l| l.energy).collect();
        let first = sol.levels.first().map_or(1, |l| l.n);
        let mut groups = crate::observables::summarize_levels(&energies, DEGENERACY_TOLERANCE);
        for g in &mut groups {
            for n in &mut g.levels {
                *n += first - 1;
            }
        }
        groups
    })
}
