//! Refinement of the grid until every requested level is as accurate as a
//! relative tolerance asks.
//!
//! The refinement predicts rather than creeps: on each grid it splits every
//! level's estimate into the discretisation part `D` (Richardson's term,
//! falling as `h^q` with the order `q` the estimate used) and the round-off
//! floor `R = eps ||H||_1` (the kinetic part of which grows as `1/h²`), and
//! asks for the coarsest spacing `ρ h` where `D ρ^q + R(ρ)` is within half of
//! every level's allowance. That may be coarser than the grid it has: a
//! high order on a small domain reaches a tight tolerance with a few hundred
//! points, where a finer grid would drown it in round-off. When no spacing
//! brings `D ρ^q + R(ρ)` under the allowance, the tolerance is refused with
//! the best this order can do and what to change.

use crate::grid::{align, Scheme};
use crate::input::Model;

use super::{estimate, expected_order, smoothness, Smoothness};
use crate::pipeline::solution::{Refinement, RefinementStep};
use crate::pipeline::{
    grid_near_within, solve_on, wanted_steps, Solution, SolveError, SolveOptions,
};

/// Most grids a refinement tries.
pub const MAX_REFINEMENTS: usize = 10;

/// The share of a level's allowance the next grid aims at (common
/// practice, no source: half, so that an estimate a little off the
/// prediction still passes).
const AIM: f64 = 0.5;

/// Most a spacing may grow (coarsen) or shrink in one step of the
/// refinement.
const MOST_COARSER: f64 = 4.0;
const MOST_FINER: f64 = 1.0 / 16.0;

/// How far above the wanted steps a refinement may go to put breaks that
/// a grid within [`align::SEARCH_SLACK`] cannot hold on grid points: up
/// to 8 times the steps (corrected corners converge at order 6 there,
/// while a corner between grid points converges at order 2, erratically).
const BREAK_SLACK: f64 = 7.0;

/// The allowance of a level: `tolerance` times its height above the
/// potential's minimum (a relative tolerance that stays meaningful for
/// levels near zero energy).
fn allowance(tol: f64, energy: f64, floor_v: f64) -> f64 {
    tol * (energy - floor_v).abs().max(f64::MIN_POSITIVE)
}

/// The predicted error of a level at spacing `ρ h`: `D ρ^q + R_V + R_T /
/// ρ²`, with `R_V` the potential's and `R_T` the kinetic share of the
/// round-off floor.
#[derive(Debug, Clone, Copy)]
struct Prediction {
    discretisation: f64,
    order: f64,
    floor_v: f64,
    floor_t: f64,
}

impl Prediction {
    fn at(&self, rho: f64) -> f64 {
        self.discretisation * rho.powf(self.order) + self.floor_v + self.floor_t / (rho * rho)
    }

    /// The spacing ratio of the smallest predicted error.
    fn best(&self) -> f64 {
        if self.discretisation <= 0.0 {
            return f64::INFINITY;
        }
        (2.0 * self.floor_t / (self.order * self.discretisation)).powf(1.0 / (self.order + 2.0))
    }

    /// The largest spacing ratio (up to `most`) whose predicted error is at
    /// most `target`; `None` when even the best ratio misses it.
    fn coarsest_within(&self, target: f64, most: f64) -> Option<f64> {
        let best = self.best().min(most);
        if self.at(best) > target {
            return None;
        }
        if self.at(most) <= target {
            return Some(most);
        }
        // The error grows with rho above `best`: bisect on [best, most].
        let (mut lo, mut hi) = (best, most);
        for _ in 0..80 {
            let mid = (lo * hi).sqrt();
            if self.at(mid) <= target {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        Some(lo)
    }
}

/// Refines the grid until every requested level's error estimate is within
/// the relative tolerance `tol` of its height above the potential's minimum.
/// Fails (as bad input, naming the numbers and what to change) when that
/// needs more than `grid.max_points` points or when round-off would
/// dominate first.
pub fn refine(model: &Model, tol: f64, opts: &SolveOptions) -> Result<Solution, SolveError> {
    let mut steps = wanted_steps(model).clamp(64, 4096);
    let mut history: Vec<RefinementStep> = Vec::new();
    // The coarse grids of the estimate (a quarter of the steps) must hold
    // the levels.
    let highest = match model.levels.below {
        Some(_) => model.levels.first,
        None => model.levels.last(),
    };
    let fewest_steps = 4 * (model.grid.points_for_levels(highest) + 1);
    let mut tried: Vec<usize> = Vec::new();
    for _ in 0..MAX_REFINEMENTS {
        let mut grid = grid_near_within(model, steps, 4, align::SEARCH_SLACK);
        if grid.points > model.grid.max_points {
            return Err(too_many_points(tol, grid.points, model));
        }
        let mut sol = solve_on(model, &grid, &opts.eigen)?;
        if smoothness(&sol.edges) == Smoothness::Erratic {
            // A break between grid points: a finer grid that holds it
            // converges smoothly (and, for a corner, much faster).
            let wider = grid_near_within(model, steps, 4, BREAK_SLACK);
            if wider.points <= model.grid.max_points && wider != grid {
                let retry = solve_on(model, &wider, &opts.eigen)?;
                if smoothness(&retry.edges) == Smoothness::Smooth {
                    grid = wider;
                    sol = retry;
                }
            }
        }
        estimate(model, &mut sol, &opts.eigen)?;
        let vmin = sol.potential.iter().copied().fold(f64::INFINITY, f64::min);
        let vmax = sol.potential.iter().fold(0.0f64, |m, x| m.max(x.abs()));
        let floor = sol.roundoff_floor;
        let floor_v = (f64::EPSILON * vmax).min(floor);
        let order = expected_order(model, &sol.edges);
        let mut worst = 0.0f64;
        let mut rho = MOST_COARSER;
        let mut best_relative = 0.0f64;
        let mut unreachable = false;
        // Whether a level that misses its allowance at every predicted
        // spacing has its discretisation error hidden in round-off (then
        // the prediction knows too little, and a coarser grid is tried
        // before refusing).
        let mut unresolved = false;
        for l in &sol.levels {
            let allow = allowance(tol, l.energy, vmin);
            let est = l.error_estimate.unwrap_or(f64::INFINITY);
            worst = worst.max(est / allow);
            if !est.is_finite() {
                rho = rho.min(0.5);
                continue;
            }
            let q = if l.estimate_widened && smoothness(&sol.edges) == Smoothness::Erratic {
                2.0
            } else {
                l.observed_order.unwrap_or(order).clamp(1.0, order)
            };
            let p = Prediction {
                discretisation: (est - floor).max(0.0),
                order: q,
                floor_v,
                floor_t: floor - floor_v,
            };
            match p.coarsest_within(AIM * allow, MOST_COARSER) {
                Some(r) => rho = rho.min(r),
                None => {
                    unreachable = true;
                    unresolved |= p.discretisation <= 8.0 * floor;
                    let best = p.at(p.best().min(MOST_COARSER));
                    best_relative = best_relative.max(best / (l.energy - vmin).abs());
                }
            }
        }
        history.push(RefinementStep {
            points: grid.points,
            worst_ratio: worst,
        });
        tried.push(grid.steps());
        if worst <= 1.0 {
            sol.refinement = Some(Refinement {
                tolerance: tol,
                steps: history,
            });
            return Ok(sol);
        }
        if unreachable {
            let coarser = grid.steps() / 2;
            let new = !tried.iter().any(|&t| t * 10 <= coarser * 11);
            if unresolved && new && coarser >= fewest_steps {
                steps = coarser;
                continue;
            }
            return Err(round_off_bound(model, tol, best_relative, grid.points));
        }
        let rho = rho.max(MOST_FINER);
        let next = ((grid.steps() as f64 / rho).round() as usize).max(fewest_steps);
        // Never the same grid twice: a prediction that repeats itself
        // refines by a half.
        steps = if tried.contains(&next) {
            grid.steps() * 3 / 2
        } else {
            next
        };
    }
    Err(SolveError::ToleranceUnreachable {
        tolerance: tol,
        reason: format!(
            "{MAX_REFINEMENTS} grids did not reach it (last ratio of estimate to allowance {:.2e}); raise grid.tolerance",
            history.last().map_or(f64::NAN, |s| s.worst_ratio)
        ),
    })
}

/// The refusal when a grid would need more than `grid.max_points`.
fn too_many_points(tol: f64, points: usize, model: &Model) -> SolveError {
    let advice = if model.grid.scheme == Scheme::FiniteDifference && model.grid.order.get() < 8 {
        "raise grid.max_points, or grid.order (up to 8) to need fewer points"
    } else {
        "raise grid.max_points, or grid.tolerance"
    };
    SolveError::ToleranceUnreachable {
        tolerance: tol,
        reason: format!(
            "it needs about {points} points, more than grid.max_points = {}; {advice}",
            model.grid.max_points
        ),
    }
}

/// The refusal when round-off keeps some level from its allowance at every
/// spacing: the best relative accuracy this order reaches, and what the
/// user can change.
fn round_off_bound(model: &Model, tol: f64, best: f64, points: usize) -> SolveError {
    let advice = match model.grid.scheme {
        Scheme::FiniteDifference if model.grid.order.get() < 8 => {
            format!("raise grid.order (up to 8), or loosen grid.tolerance to {best:.1e} or more")
        }
        Scheme::Numerov => format!(
            "use finite differences of order 8 (grid.scheme = \"finite-difference\", grid.order = 8), or loosen grid.tolerance to {best:.1e} or more"
        ),
        Scheme::FiniteDifference => format!(
            "loosen grid.tolerance to {best:.1e} or more (a shallower potential, or one shifted so that its values are small, also lowers round-off)"
        ),
    };
    SolveError::ToleranceUnreachable {
        tolerance: tol,
        reason: format!(
            "round-off (eps ||H||_1) and the discretisation error together stay above it at every spacing (best about {best:.1e} relative, predicted from {points} points); {advice}"
        ),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn prediction_coarsens_when_round_off_dominates() {
        // D = 1e-14 at order 8, floor 4e-12 (all kinetic): coarser is
        // better, up to where D rho^8 catches up.
        let p = Prediction {
            discretisation: 1e-14,
            order: 8.0,
            floor_v: 0.0,
            floor_t: 4e-12,
        };
        let r = p.coarsest_within(2e-12, 4.0).unwrap();
        assert!(r > 1.4, "{r}");
        assert!(p.at(r) <= 2e-12 * (1.0 + 1e-9));
        // Nothing reaches 1e-13: refused.
        assert!(p.coarsest_within(1e-13, 4.0).is_none());
        // Discretisation-bound: refine by 2^(1/q) per halving of the error.
        let p = Prediction {
            discretisation: 4e-9,
            order: 4.0,
            floor_v: 0.0,
            floor_t: 1e-15,
        };
        let r = p.coarsest_within(1e-9, 4.0).unwrap();
        assert!((r - 0.25f64.powf(0.25)).abs() < 1e-3, "{r}");
    }
}
