//! One solve on one grid: the guards, the eigen-solver, the residual check,
//! then the assembly of levels and observables ([`super::assemble`]).

use std::time::Instant;

use crate::eigen::{self, EigenInfo, EigenParams, Eigenpairs, Problem, Selection};
use crate::grid::Grid;
use crate::input::Model;

use super::assemble::assemble;
use super::discretise::{discretise, Discretised};
use super::guards::{check_conditioning, check_residuals, check_scale, check_size};
use super::guesses::with_order2_guesses;
use super::{Solution, SolveError, Timing};

/// The energies of levels `first..first + count` (0-based) on `grid`, with
/// nothing else computed ([`eigen::eigenvalues`]: no vectors kept where the
/// method allows, no diagnostics): the coarse grids of an error estimate.
pub fn energies_on(
    model: &Model,
    grid: &Grid,
    first: usize,
    count: usize,
    params: &EigenParams,
) -> Result<Vec<f64>, SolveError> {
    check_size(model, grid, params)?;
    let d = discretise(model, grid)?;
    let selection = Selection::Index { first, count };
    let problem = Problem {
        a: &d.disc.a,
        b: d.disc.b.as_ref(),
    };
    let guided = with_order2_guesses(model, grid, &d.v, &problem, &selection, params);
    let (pairs, _) = eigen::eigenvalues(&problem, &selection, guided.as_ref().unwrap_or(params))?;
    Ok(pairs.values)
}

/// The eigen-solver's window for the model's `[levels]` on a grid of
/// `points` unknowns.
fn selection(model: &Model, points: usize) -> Result<Selection, SolveError> {
    Ok(match model.levels.below {
        Some(energy) => Selection::Below { energy },
        None => {
            let last = model.levels.last();
            if last > points {
                return Err(SolveError::TooManyLevels {
                    first: model.levels.first,
                    last,
                    points,
                });
            }
            let (first, count) = model.levels.window();
            Selection::Index { first, count }
        }
    })
}

/// The selected eigenpairs of the discretised problem, with order-2 guesses
/// where they pay ([`with_order2_guesses`]).
fn eigenpairs(
    model: &Model,
    grid: &Grid,
    d: &Discretised,
    selection: &Selection,
    params: &EigenParams,
) -> Result<(Eigenpairs, EigenInfo), SolveError> {
    let problem = Problem {
        a: &d.disc.a,
        b: d.disc.b.as_ref(),
    };
    let guided = with_order2_guesses(model, grid, &d.v, &problem, selection, params);
    Ok(eigen::solve(
        &problem,
        selection,
        guided.as_ref().unwrap_or(params),
    )?)
}

/// Solves the model on the given grid.
pub fn solve_on(model: &Model, grid: &Grid, params: &EigenParams) -> Result<Solution, SolveError> {
    let start = Instant::now();
    check_scale(model)?;
    check_size(model, grid, params)?;
    let d = discretise(model, grid)?;
    let rounding = check_conditioning(model, grid, &d)?;
    let selection = selection(model, grid.points)?;
    let t0 = Instant::now();
    let (pairs, info) = eigenpairs(model, grid, &d, &selection, params)?;
    let solve_s = t0.elapsed().as_secs_f64();
    check_residuals(&d, &pairs, &info)?;
    let mut sol = assemble(model, grid, d, pairs, &info, rounding)?;
    sol.timing = Timing {
        solve_s,
        total_s: start.elapsed().as_secs_f64(),
    };
    Ok(sol)
}
