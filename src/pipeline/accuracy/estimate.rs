//! Error estimates of a solution's levels from the same levels on grids of
//! spacing `2h` and `4h` (Richardson extrapolation, see [`super::richardson`]).

use crate::eigen::EigenParams;
use crate::grid::Grid;
use crate::input::Model;

use super::{analyse, expected_order, smoothness, Smoothness};
use crate::pipeline::{energies_on, Solution, SolveError};

/// Coarse step counts for the estimate: `M/2` and `M/4` (rounded).
fn coarse_steps(steps: usize) -> (usize, usize) {
    (
        (steps as f64 / 2.0).round() as usize,
        (steps as f64 / 4.0).round() as usize,
    )
}

/// Adds error estimates, extrapolated levels and observed orders to a
/// solution, from the same levels on grids of spacing `2h` and `4h`. When
/// those grids are too coarse to hold the levels, the levels keep no
/// estimate and a warning says why.
pub fn estimate(model: &Model, sol: &mut Solution, params: &EigenParams) -> Result<(), SolveError> {
    let Some(first) = sol.levels.first().map(|l| l.n - 1) else {
        return Ok(());
    };
    let count = sol.levels.len();
    let steps = sol.grid.steps();
    let (m2, m3) = coarse_steps(steps);
    let needed = model.grid.points_for_levels(first + count);
    let g2 = Grid::with_steps(&model.domain, m2);
    if g2.points < needed {
        sol.warnings.push(format!(
            "the grid is too coarse to estimate errors (a grid of half its points cannot hold levels {}..{}); raise grid.points",
            first + 1,
            first + count
        ));
        return Ok(());
    }
    let e2 = energies_on(model, &g2, first, count, params)?;
    let g3 = Grid::with_steps(&model.domain, m3);
    let e3 = if g3.points >= needed {
        Some(energies_on(model, &g3, first, count, params)?)
    } else {
        None
    };
    let h = sol.grid.spacing;
    let (r2, r3) = (g2.spacing / h, g3.spacing / h);
    let order = expected_order(model, &sol.edges);
    let smooth = smoothness(&sol.edges);
    // The scheme's own order: a level that does not feel what lowers the
    // expected order (a wall slope where the state has died away) may
    // converge at up to this order, which is then no sign of accident.
    let nominal = f64::from(model.grid.accuracy_order());
    for (j, level) in sol.levels.iter_mut().enumerate() {
        let at = |order: f64| {
            analyse(
                level.energy,
                e2[j],
                e3.as_ref().map(|e| e[j]),
                r2,
                r3,
                order,
                sol.roundoff_floor,
                smooth,
            )
        };
        let mut a = at(order);
        if a.widened
            && smooth == Smoothness::Smooth
            && nominal > order
            && a.observed_order
                .is_some_and(|q| q <= nominal + super::richardson::ORDER_EXCESS)
        {
            a = at(nominal);
        }
        level.error_estimate = Some(a.estimate);
        level.extrapolated = Some(a.extrapolated);
        level.observed_order = a.observed_order;
        level.estimate_widened = a.widened;
    }
    Ok(())
}
