//! The checks a solve makes before and after the eigen-solver: memory,
//! conditioning (rounding against the level spacing) and residuals, with the
//! round-off floor they share.

use crate::eigen::{self, Eigenpairs, Problem};
use crate::grid::Grid;
use crate::input::Model;

use super::discretise::Discretised;
use super::limits::{
    memory_estimate, MEMORY_LIMIT_BYTES, REFUSE_ROUNDING, RESIDUAL_LIMIT, SMALLEST_BOX_LEVEL_EV,
};
use super::SolveError;

/// The round-off floor of the eigenvalues of a discretised problem, eV: the
/// one rounding figure `R = eps ||H||_1` ([`super::limits::REFUSE_ROUNDING`]
/// says where it comes from). Every warning and estimate uses this value.
pub fn roundoff_floor(d: &Discretised) -> f64 {
    f64::EPSILON * d.disc.a.norm_one()
}

/// The residual ratio of one returned pair (see [`RESIDUAL_LIMIT`]); NaN or
/// infinite when the pair holds a value that is not finite.
pub fn residual_ratio(
    a: &eigen::SymBanded,
    b: Option<&eigen::SymBanded>,
    energy: f64,
    z: &[f64],
) -> f64 {
    let scale = match b {
        Some(b) => a.norm_one() + energy.abs() * b.norm_one(),
        None => a.norm_one(),
    };
    let r = eigen::diagnostics::residual_norm1(&Problem { a, b }, energy, z);
    let length = z.iter().map(|x| x * x).sum::<f64>().sqrt();
    r / (scale.max(f64::MIN_POSITIVE) * z.len() as f64 * f64::EPSILON * length)
}

/// Refuses a grid the stencil does not fit on, or a solve whose memory
/// estimate ([`memory_estimate`]) is above [`MEMORY_LIMIT_BYTES`], before
/// anything is allocated.
pub fn check_size(model: &Model, grid: &Grid) -> Result<(), SolveError> {
    let p = model.grid.half_width();
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
    let bytes = memory_estimate(grid.points, p, levels_wanted);
    if bytes > MEMORY_LIMIT_BYTES {
        return Err(SolveError::TooLarge {
            points: grid.points,
            levels: levels_wanted,
            bytes,
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
/// (or not a number): the eigen-solver did not converge for it.
pub fn check_residuals(d: &Discretised, pairs: &Eigenpairs) -> Result<(), SolveError> {
    for (j, (energy, vector)) in pairs.values.iter().zip(&pairs.vectors).enumerate() {
        let residual = residual_ratio(&d.disc.a, d.disc.b.as_ref(), *energy, vector);
        if residual.is_nan() || residual > RESIDUAL_LIMIT {
            return Err(SolveError::NotConverged {
                level: pairs.first + j + 1,
                residual,
            });
        }
    }
    Ok(())
}
