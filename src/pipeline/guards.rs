//! The checks a solve makes before and after the eigen-solver: memory,
//! conditioning (rounding against the level spacing) and residuals, with the
//! round-off floor they share.

use crate::eigen::diagnostics::{pair_ratio, residual_norm1};
use crate::eigen::memory::eigen_bytes;
use crate::eigen::{self, EigenInfo, EigenParams, Eigenpairs, Method, Problem, Selection};
use crate::grid::{Boundary, Grid, Scheme};
use crate::input::Model;

use super::discretise::Discretised;
use super::guesses::takes_order2_guesses;
use super::limits::{memory_estimate, REFUSE_ROUNDING, RESIDUAL_LIMIT, SMALLEST_BOX_LEVEL_EV};
use super::SolveError;

/// The round-off floor of the eigenvalues of a discretised problem, eV: the
/// one rounding figure `R = eps ||H||_1` ([`super::limits::REFUSE_ROUNDING`]
/// says where it comes from). Every warning and estimate uses this value.
pub fn roundoff_floor(d: &Discretised) -> f64 {
    f64::EPSILON * d.disc.a.norm_one()
}

/// The residual ratio of one returned pair (see [`RESIDUAL_LIMIT`]); NaN or
/// infinite when the pair holds a value that is not finite. Solves read the
/// eigen-solver's own residual norms instead ([`check_residuals`]); this
/// recomputes one for a pair from elsewhere.
pub fn residual_ratio(
    a: &eigen::SymBanded,
    b: Option<&eigen::SymBanded>,
    energy: f64,
    z: &[f64],
) -> f64 {
    let problem = Problem { a, b };
    pair_ratio(&problem, energy, z, residual_norm1(&problem, energy, z))
}

/// Estimated bytes of a solve of `model` on `grid` with `levels` levels
/// ([`memory_estimate`] around the eigen-solver's own model, for the method
/// it will take).
fn solve_bytes(model: &Model, grid: &Grid, params: &EigenParams, levels: usize) -> f64 {
    let p = model.grid.half_width();
    let n = grid.points;
    let numerov = model.grid.scheme == Scheme::Numerov;
    let tridiagonal = p == 1 && !numerov && grid.boundary == Boundary::Walls;
    let selection = Selection::Index {
        first: 0,
        count: levels,
    };
    let method = match params.method {
        Method::Auto => eigen::auto_method(
            params,
            n,
            tridiagonal,
            takes_order2_guesses(model, grid, &selection, params),
        ),
        m => m,
    };
    memory_estimate(n, p, numerov, eigen_bytes(method, n, p, levels))
}

/// The largest `k` in `0..=hi` with `fits(k)`, for a `fits` that holds up
/// to some value and fails above it.
fn largest_fitting(hi: usize, fits: &dyn Fn(usize) -> bool) -> usize {
    let (mut lo, mut hi) = (0usize, hi);
    while lo < hi {
        let mid = lo + (hi - lo).div_ceil(2);
        if fits(mid) {
            lo = mid;
        } else {
            hi = mid - 1;
        }
    }
    lo
}

/// Refuses a grid the stencil does not fit on, or a solve whose memory
/// estimate ([`memory_estimate`] with the eigen-solver's model) is above
/// `params.memory_limit`, before anything is allocated; the refusal says how
/// many levels, or how many points, would fit.
pub fn check_size(model: &Model, grid: &Grid, params: &EigenParams) -> Result<(), SolveError> {
    let needed = model.grid.min_points();
    if grid.points < needed {
        return Err(SolveError::GridTooSmall {
            points: grid.points,
            order: model.grid.order.get(),
            needed,
        });
    }
    let levels_wanted = match model.levels.below {
        Some(_) => grid.points,
        None => model.levels.count.min(grid.points),
    };
    let limit = params.memory_limit as f64;
    let bytes = solve_bytes(model, grid, params, levels_wanted);
    if bytes > limit {
        let max_levels = largest_fitting(levels_wanted, &|k| {
            solve_bytes(model, grid, params, k) <= limit
        });
        let max_points = largest_fitting(grid.points, &|n| {
            let g = Grid {
                points: n,
                ..grid.clone()
            };
            solve_bytes(model, &g, params, levels_wanted.min(n)) <= limit
        });
        return Err(SolveError::TooLarge {
            points: grid.points,
            levels: levels_wanted,
            bytes,
            limit,
            max_levels,
            max_points,
        });
    }
    Ok(())
}

/// The domain's lowest box level `hbar^2/2m (pi/L)^2`, eV, the scale every
/// energy of the solve is compared with; refuses a domain or a mass that
/// makes it smaller than [`SMALLEST_BOX_LEVEL_EV`] (or not a number), where
/// every level would print as a confident 0.
pub fn check_scale(model: &Model) -> Result<f64, SolveError> {
    let scale = model.kinetic() * (std::f64::consts::PI / model.domain.length()).powi(2);
    if scale >= SMALLEST_BOX_LEVEL_EV {
        Ok(scale)
    } else {
        Err(SolveError::Underflow {
            length: model.domain.length(),
            mass: model.mass,
            scale,
        })
    }
}

/// How much rounding blurs the energies of a discretised problem.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Rounding {
    /// The rounding figure `R = eps * ||H||_1` ([`roundoff_floor`]), eV.
    pub rounding: f64,
    /// The domain's lowest box level `hbar^2/2m (pi / L)^2`, eV: the scale
    /// the rounding is compared with.
    pub scale: f64,
}

/// Refuses a matrix whose rounding ([`REFUSE_ROUNDING`]` * R`) blurs every energy by more
/// than that level (no level could be told from the next); returns `R`
/// otherwise.
pub fn check_conditioning(
    model: &Model,
    grid: &Grid,
    d: &Discretised,
) -> Result<Rounding, SolveError> {
    let vmin = d.v.iter().copied().fold(f64::INFINITY, f64::min);
    let vmax = d.v.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let norm = d.disc.a.norm_one();
    let rounding = roundoff_floor(d);
    let scale = check_scale(model)?;
    // An infinite norm (a spacing so small that 1/h^2 overflows) must be
    // refused too.
    if !rounding.is_finite() || REFUSE_ROUNDING * rounding > scale {
        return Err(SolveError::IllConditioned {
            norm,
            kinetic: model.kinetic() / (grid.spacing * grid.spacing),
            rounding: REFUSE_ROUNDING * rounding,
            scale,
            vmin,
            vmax,
        });
    }
    Ok(Rounding { rounding, scale })
}

/// Refuses a returned pair whose residual ratio is above [`RESIDUAL_LIMIT`]
/// (or not a number): the eigen-solver did not converge for it. Reads the
/// residual norms the eigen-solver computed for its diagnostics
/// ([`EigenInfo::residual_norms`]): one residual per level per solve.
pub fn check_residuals(
    d: &Discretised,
    pairs: &Eigenpairs,
    info: &EigenInfo,
) -> Result<(), SolveError> {
    let problem = Problem {
        a: &d.disc.a,
        b: d.disc.b.as_ref(),
    };
    for (j, ((energy, vector), &r1)) in pairs
        .values
        .iter()
        .zip(&pairs.vectors)
        .zip(&info.residual_norms)
        .enumerate()
    {
        let residual = pair_ratio(&problem, *energy, vector, r1);
        if residual.is_nan() || residual > RESIDUAL_LIMIT {
            return Err(SolveError::NotConverged {
                level: pairs.first + j + 1,
                residual,
            });
        }
    }
    Ok(())
}
