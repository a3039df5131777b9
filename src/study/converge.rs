//! Convergence studies: the levels on grids whose spacing halves each time,
//! with the observed order of convergence between consecutive grids.

use serde::Serialize;

use crate::eigen::EigenParams;
use crate::grid::Grid;
use crate::input::Model;
use crate::pipeline::accuracy::{expected, observed_order, richardson, Limit};
use crate::pipeline::{energies_on, grid_near, solve_on, wanted_steps, SolveError};

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
    /// The order this level should converge with.
    pub expected: f64,
    /// What holds it below the scheme's order, if anything.
    pub limited_by: Option<Limit>,
}

/// A convergence study: the levels on grids whose spacing halves each time.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Convergence {
    /// Unknowns of each grid, coarsest first.
    pub points: Vec<usize>,
    /// Spacing of each grid, Å.
    pub spacings: Vec<f64>,
    /// The order the levels should converge with: the scheme's, or lower
    /// for the cause in `limited_by`.
    pub expected_order: f64,
    /// The scheme's own order.
    pub scheme_order: f64,
    /// What holds the expected order below the scheme's, if anything.
    pub limited_by: Option<Limit>,
    /// The round-off floor on the finest grid, eV.
    pub roundoff_floor: f64,
    /// One row per level.
    pub rows: Vec<ConvergenceRow>,
}

/// Most grids a study asks for: halving a grid 30 times leaves fewer
/// points than any level needs, whatever the finest grid.
pub const MAX_GRIDS: usize = 31;

/// The finest grid of a study of `grids` grids (the model's own, aligned
/// so that halving keeps every jump on a grid point).
fn finest_grid(model: &Model, grids: usize) -> Grid {
    let grids = grids.clamp(3, MAX_GRIDS);
    grid_near(model, wanted_steps(model), 1usize << (grids - 1))
}

/// Points of the finest grid of a study of `grids` grids.
pub fn finest_points(model: &Model, grids: usize) -> usize {
    finest_grid(model, grids).points
}

/// How many of `grids` grids [`converge`] can use: the finest and those of
/// the halved grids that still hold the levels asked for (a study of
/// `levels.below` counts its levels only after the solve, so there all are
/// counted here). Known before any solve, so that a request for more grids
/// than the model allows is refused at once.
pub fn usable_grids(model: &Model, grids: usize) -> usize {
    if model.levels.below.is_some() {
        return grids;
    }
    let finest = finest_grid(model, grids);
    let (first, count) = model.levels.window();
    let need = model.grid.points_for_levels(first + count);
    let coarse = (1..grids.clamp(3, MAX_GRIDS))
        .filter(|&k| {
            let steps = (finest.steps() as f64 / (1usize << k) as f64).round() as usize;
            Grid::with_steps(&model.domain, steps.max(1)).points >= need
        })
        .count();
    coarse + 1
}

/// Solves the model on `grids` grids (3 to [`MAX_GRIDS`]), the finest the
/// model's own (aligned so that every grid keeps jumps on grid points),
/// each coarser one with half the steps; a coarser grid that cannot hold
/// the levels is left out (see [`usable_grids`]).
pub fn converge(
    model: &Model,
    grids: usize,
    params: &EigenParams,
) -> Result<Convergence, SolveError> {
    let grids = grids.clamp(3, MAX_GRIDS);
    let finest = finest_grid(model, grids);
    let fine = solve_on(model, &finest, params)?;
    let first = fine.levels.first().map_or(0, |l| l.n - 1);
    let count = fine.levels.len();
    let mut all: Vec<(Grid, Vec<f64>)> = Vec::new();
    for k in (1..grids).rev() {
        let steps = (finest.steps() as f64 / (1usize << k) as f64).round() as usize;
        let g = Grid::with_steps(&model.domain, steps);
        if g.points < model.grid.points_for_levels(first + count) {
            continue;
        }
        let e = energies_on(model, &g, first, count, params)?;
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
    let want = expected(model, &fine.edges);
    let order = want.order;
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
                expected: order,
                limited_by: want.limited_by,
            }
        })
        .collect();
    Ok(Convergence {
        points: all.iter().map(|(g, _)| g.points).collect(),
        spacings: all.iter().map(|(g, _)| g.spacing).collect(),
        expected_order: order,
        scheme_order: f64::from(model.grid.accuracy_order()),
        limited_by: want.limited_by,
        roundoff_floor: floor,
        rows,
    })
}
