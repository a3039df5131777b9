//! Accuracy you can cite: per-level error estimates, refinement to a
//! tolerance, and convergence reports.
//!
//! Every level of a solve is recomputed on two coarser grids (spacing `2h`
//! and `4h`); [`richardson`] turns the three values into an extrapolated
//! level, an observed order of convergence and an estimate of the error of
//! the fine-grid level. The estimate includes the round-off floor
//! `eps ||H||_1`, which grows as `1/h²`: refining past the spacing where it
//! dominates makes results worse, so higher orders at coarser grids are the
//! way to high accuracy.
//!
//! Orders: the finite-difference stencil's order, 4 for Numerov, and 2 when
//! the potential jumps inside the domain (the jumps are put on grid points,
//! see [`crate::grid::align`], which keeps the error smooth but of order 2).

pub mod richardson;

use serde::Serialize;

use crate::eigen::EigenParams;
use crate::grid::Scheme;
use crate::input::model::Model;
use crate::solve::{self, Solution, SolveError, SolveOptions};

pub use richardson::{analyse, observed_order, LevelError};

/// The order the error of the model's levels should fall with.
pub fn expected_order(model: &Model, has_edges: bool) -> f64 {
    let p = match model.grid.scheme {
        Scheme::FiniteDifference => model.grid.order.get() as f64,
        Scheme::Numerov => 4.0,
    };
    if has_edges {
        p.min(2.0)
    } else {
        p
    }
}

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
    let needed = first + count + 2 * model.grid.order.half_width() + 2;
    let g2 = crate::grid::Grid::with_steps(&model.domain, m2);
    if g2.points < needed {
        sol.warnings.push(format!(
            "the grid is too coarse to estimate errors (a grid of half its points cannot hold levels {}..{}); raise grid.points",
            first + 1,
            first + count
        ));
        return Ok(());
    }
    let e2 = solve::energies_on(model, &g2, first, count, params)?;
    let g3 = crate::grid::Grid::with_steps(&model.domain, m3);
    let e3 = if g3.points >= needed {
        Some(solve::energies_on(model, &g3, first, count, params)?)
    } else {
        None
    };
    let h = sol.grid.spacing;
    let (r2, r3) = (g2.spacing / h, g3.spacing / h);
    let order = expected_order(model, !sol.edges.positions.is_empty());
    for (j, level) in sol.levels.iter_mut().enumerate() {
        let a = analyse(
            level.energy,
            e2[j],
            e3.as_ref().map(|e| e[j]),
            r2,
            r3,
            order,
            sol.roundoff_floor,
        );
        level.error_estimate = Some(a.estimate);
        level.extrapolated = Some(a.extrapolated);
        level.observed_order = a.observed_order;
    }
    Ok(())
}

/// How a tolerance was met.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Refinement {
    /// The relative tolerance asked for.
    pub tolerance: f64,
    /// Each grid tried: its points and the worst ratio of a level's estimate
    /// to its allowance (at most 1 on the last).
    pub steps: Vec<RefinementStep>,
}

/// One grid of a refinement.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RefinementStep {
    /// Unknowns.
    pub points: usize,
    /// Worst estimate / allowance over the levels.
    pub worst_ratio: f64,
}

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
    let mut steps = solve::wanted_steps(model).clamp(64, 4096);
    let mut history = Vec::new();
    for _ in 0..MAX_REFINEMENTS {
        let grid = solve::grid_near(model, steps, 4);
        if grid.points > model.grid.max_points {
            return Err(SolveError::ToleranceUnreachable {
                tolerance: tol,
                reason: format!(
                    "it needs about {} points, more than grid.max_points = {}",
                    grid.points, model.grid.max_points
                ),
            });
        }
        let mut sol = solve::solve_on(model, &grid, &opts.eigen)?;
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

/// One level across a sequence of grids.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ConvergenceRow {
    /// Level number.
    pub n: usize,
    /// Its energy on each grid (coarsest first), eV.
    pub energies: Vec<f64>,
    /// Observed order from each consecutive triple of grids.
    pub orders: Vec<Option<f64>>,
    /// Richardson-extrapolated energy from the two finest grids, eV.
    pub extrapolated: f64,
    /// Error of each grid's energy against the extrapolated one, eV.
    pub errors: Vec<f64>,
    /// Whether the last observed order falls short of the expected one.
    pub short: bool,
}

/// A convergence study: the levels on grids whose spacing halves each time.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Convergence {
    /// Unknowns of each grid, coarsest first.
    pub points: Vec<usize>,
    /// Spacing of each grid, Å.
    pub spacings: Vec<f64>,
    /// The scheme's expected order.
    pub expected_order: f64,
    /// The round-off floor on the finest grid, eV.
    pub roundoff_floor: f64,
    /// One row per level.
    pub rows: Vec<ConvergenceRow>,
}

/// Solves the model on `grids` grids, the finest the model's own (aligned
/// so that every grid keeps jumps on grid points), each coarser one with
/// half the steps.
pub fn converge(
    model: &Model,
    grids: usize,
    params: &EigenParams,
) -> Result<Convergence, SolveError> {
    let grids = grids.max(3);
    let multiple = 1usize << (grids - 1);
    let finest = solve::grid_near(model, solve::wanted_steps(model), multiple);
    let fine = solve::solve_on(model, &finest, params)?;
    let first = fine.levels.first().map_or(0, |l| l.n - 1);
    let count = fine.levels.len();
    let mut all: Vec<(crate::grid::Grid, Vec<f64>)> = Vec::new();
    for k in (1..grids).rev() {
        let steps = (finest.steps() as f64 / (1usize << k) as f64).round() as usize;
        let g = crate::grid::Grid::with_steps(&model.domain, steps);
        if g.points < first + count + 2 * model.grid.order.half_width() + 2 {
            continue;
        }
        let e = solve::energies_on(model, &g, first, count, params)?;
        all.push((g, e));
    }
    all.push((
        finest.clone(),
        fine.levels.iter().map(|l| l.energy).collect(),
    ));
    if all.len() < 3 {
        return Err(SolveError::TooCoarseToConverge {
            points: finest.points,
        });
    }
    let order = expected_order(model, !fine.edges.positions.is_empty());
    let floor = fine.roundoff_floor;
    let rows = (0..count)
        .map(|j| {
            let energies: Vec<f64> = all.iter().map(|(_, e)| e[j]).collect();
            let hs: Vec<f64> = all.iter().map(|(g, _)| g.spacing).collect();
            let orders: Vec<Option<f64>> = (0..energies.len() - 2)
                .map(|i| {
                    let (e3, e2, e1) = (energies[i], energies[i + 1], energies[i + 2]);
                    observed_order(
                        e1,
                        e2,
                        e3,
                        hs[i + 1] / hs[i + 2],
                        hs[i] / hs[i + 2],
                        4.0 * floor,
                    )
                })
                .collect();
            let k = energies.len();
            let r = hs[k - 2] / hs[k - 1];
            let extrapolated =
                energies[k - 1] - (energies[k - 2] - energies[k - 1]) / (r.powf(order) - 1.0);
            let errors = energies.iter().map(|e| (e - extrapolated).abs()).collect();
            let short =
                matches!(orders.last(), Some(Some(q)) if *q < order - richardson::ORDER_SLACK);
            ConvergenceRow {
                n: first + j + 1,
                energies,
                orders,
                extrapolated,
                errors,
                short,
            }
        })
        .collect();
    Ok(Convergence {
        points: all.iter().map(|(g, _)| g.points).collect(),
        spacings: all.iter().map(|(g, _)| g.spacing).collect(),
        expected_order: order,
        roundoff_floor: floor,
        rows,
    })
}
