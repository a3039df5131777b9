//! Refinement of the grid until every requested level is as accurate as a
//! relative tolerance asks.

use crate::input::Model;

use super::{estimate, expected_order};
use crate::pipeline::solution::{Refinement, RefinementStep};
use crate::pipeline::{grid_near, solve_on, wanted_steps, Solution, SolveError, SolveOptions};

/// Most grids a refinement tries.
pub const MAX_REFINEMENTS: usize = 10;

/// The allowance of a level: `tolerance` times its height above the
/// potential's minimum (a relative tolerance that stays meaningful for
/// levels near zero energy).
fn allowance(tol: f64, energy: f64, floor_v: f64) -> f64 {
    tol * (energy - floor_v).abs().max(f64::MIN_POSITIVE)
}

/// Refines the grid until every requested level's error estimate is within
/// the relative tolerance `tol` of its height above the potential's minimum.
/// Fails (as bad input, naming the numbers) when that needs more than
/// `grid.max_points` points or when round-off would dominate first.
pub fn refine(model: &Model, tol: f64, opts: &SolveOptions) -> Result<Solution, SolveError> {
    let mut steps = wanted_steps(model).clamp(64, 4096);
    let mut history = Vec::new();
    for _ in 0..MAX_REFINEMENTS {
        let grid = grid_near(model, steps, 4);
        if grid.points > model.grid.max_points {
            return Err(SolveError::ToleranceUnreachable {
                tolerance: tol,
                reason: format!(
                    "it needs about {} points, more than grid.max_points = {}",
                    grid.points, model.grid.max_points
                ),
            });
        }
        let mut sol = solve_on(model, &grid, &opts.eigen)?;
        estimate(model, &mut sol, &opts.eigen)?;
        let vmin = sol.potential.iter().copied().fold(f64::INFINITY, f64::min);
        let mut worst = 0.0f64;
        let mut floor_bound = false;
        for l in &sol.levels {
            let allow = allowance(tol, l.energy, vmin);
            let est = l.error_estimate.unwrap_or(f64::INFINITY);
            worst = worst.max(est / allow);
            if sol.roundoff_floor > 0.5 * allow {
                floor_bound = true;
            }
        }
        history.push(RefinementStep {
            points: grid.points,
            worst_ratio: worst,
        });
        if worst <= 1.0 {
            sol.refinement = Some(Refinement {
                tolerance: tol,
                steps: history,
            });
            return Ok(sol);
        }
        if floor_bound {
            return Err(SolveError::ToleranceUnreachable {
                tolerance: tol,
                reason: format!(
                    "round-off ({:.2e} eV at {} points) already takes half the allowance; use a higher grid.order instead of more points",
                    sol.roundoff_floor, grid.points
                ),
            });
        }
        let order = expected_order(model, !sol.edges.positions.is_empty());
        // Aim at 0.5 of the allowance; refine at least 1.5x, at most 16x.
        let factor = (2.0 * worst).powf(1.0 / order).clamp(1.5, 16.0);
        steps = (grid.steps() as f64 * factor).ceil() as usize;
    }
    Err(SolveError::ToleranceUnreachable {
        tolerance: tol,
        reason: format!("{MAX_REFINEMENTS} refinements did not reach it"),
    })
}
