//! Why a solve could not finish, and whether the fault lies in the input.

use crate::eigen::memory::gigabytes;
use crate::eigen::EigenError;
use crate::input::{InputError, Model, SourceText};
use crate::observables::OccupancyError;
use crate::potential::NonFinite;

use super::limits::{RESIDUAL_LIMIT, SMALLEST_BOX_LEVEL_EV};

/// Why a solve could not finish.
#[derive(Debug, thiserror::Error)]
pub enum SolveError {
    /// A term is not a finite number at a grid point (bad input).
    #[error(transparent)]
    NonFinitePotential(#[from] NonFinite),
    /// More levels asked for than the grid has (bad input).
    #[error("levels {first}..{last} were asked for, but a grid of {points} points has only {points} levels; raise grid.points or lower levels.count")]
    TooManyLevels {
        /// First level asked for (1-based).
        first: usize,
        /// Last level asked for (1-based).
        last: usize,
        /// Unknowns of the grid.
        points: usize,
    },
    /// The grid is too small for the finite-difference stencil (bad input).
    #[error("a grid of {points} points is too small for an order-{order} stencil; use at least {needed} points")]
    GridTooSmall {
        /// Unknowns.
        points: usize,
        /// Stencil order.
        order: u32,
        /// Fewest unknowns that work.
        needed: usize,
    },
    /// The solve would need more memory than the limit
    /// ([`crate::eigen::EigenParams::memory_limit`], half the machine's
    /// memory by default; a computation that cannot finish here).
    #[error("{}", too_large(*.points, *.levels, *.bytes, *.limit, *.max_levels, *.max_points))]
    TooLarge {
        /// Unknowns of the grid.
        points: usize,
        /// Levels asked for (at most `points`).
        levels: usize,
        /// The estimate, bytes.
        bytes: f64,
        /// The limit in force, bytes.
        limit: f64,
        /// Most levels that fit on this grid.
        max_levels: usize,
        /// Most points that fit with these levels.
        max_points: usize,
    },
    /// Rounding in a matrix of this norm blurs every energy by more than the
    /// domain's lowest kinetic energy: no level can be told from the next (a
    /// computation that cannot finish).
    #[error("the matrix's norm is {norm:.3e} eV (the potential spans {vmin:.3e}..{vmax:.3e} eV, the kinetic term reaches {kinetic:.3e} eV on this grid): rounding blurs every energy by about {rounding:.3e} eV, more than the domain's lowest box level ({scale:.3e} eV), so no level can be told from the next; subtract a constant from the potential, make it shallower, or use a coarser grid on a longer domain")]
    IllConditioned {
        /// `||H||_1`, eV.
        norm: f64,
        /// `hbar^2 / (2 m h^2)` for the grid's spacing `h`, eV.
        kinetic: f64,
        /// The rounding level [`super::limits::REFUSE_ROUNDING`]` * eps * ||H||_1`, eV.
        rounding: f64,
        /// `hbar^2/2m (pi / L)^2` for the domain's length `L`, eV.
        scale: f64,
        /// Lowest value of the potential on the grid, eV.
        vmin: f64,
        /// Highest value of the potential on the grid, eV.
        vmax: f64,
    },
    /// The domain is so long, or the particle so heavy, that its lowest box
    /// level is below [`SMALLEST_BOX_LEVEL_EV`]: every level would print as
    /// 0 (bad input).
    #[error("the domain's lowest box level hbar^2/2m (pi/L)^2 is {scale:.3e} eV for L = {length:e} angstrom and a mass of {mass:e} electron masses, below {SMALLEST_BOX_LEVEL_EV:e} eV: every level would print as 0; use a shorter domain or a lighter particle")]
    Underflow {
        /// Length of the domain, Å.
        length: f64,
        /// Particle mass, electron masses.
        mass: f64,
        /// The lowest box level, eV.
        scale: f64,
    },
    /// The eigen-solver returned a pair that is not an eigenpair to working
    /// precision (a computation that could not finish).
    #[error("level {level} did not converge: its residual reached {residual:.3e} times eps ||H|| N (at most {RESIDUAL_LIMIT:.0e} is accepted)")]
    NotConverged {
        /// The level (1-based).
        level: usize,
        /// Its residual ratio `||H z - E z||_1 / (||H||_1 N eps)` (for the
        /// Numerov pair, `||K z - E M z||_1 / ((||K||_1 + |E| ||M||_1) N eps)`).
        residual: f64,
    },
    /// The electrons cannot be placed in the computed levels (bad input).
    #[error(transparent)]
    Occupancy(#[from] OccupancyError),
    /// A tolerance cannot be met (bad input: it names why).
    #[error("grid.tolerance = {tolerance} cannot be met: {reason}")]
    ToleranceUnreachable {
        /// The tolerance asked for.
        tolerance: f64,
        /// Why not.
        reason: String,
    },
    /// Too few points for a convergence study.
    #[error("a grid of {points} points is too coarse for a convergence study of these levels; raise grid.points")]
    TooCoarseToConverge {
        /// Unknowns of the finest grid.
        points: usize,
    },
    /// The eigen-solver failed (a computation that could not finish).
    #[error(transparent)]
    Eigen(#[from] EigenError),
    /// `[response]` without a filling of the levels from level 1 (bad
    /// input: the electrons' levels were not all computed).
    #[error("[response] needs every filled level and the LUMO among the computed levels, from level 1; raise levels.count")]
    ResponseNeedsFilling,
    /// The response equations could not be solved (a computation that
    /// could not finish).
    #[error("static response: {0}")]
    Response(crate::observables::response::ResponseError),
}

impl SolveError {
    /// Whether the fault lies in the input (exit status 2) rather than in a
    /// computation that could not finish (exit status 1).
    pub fn is_input_error(&self) -> bool {
        match self {
            SolveError::TooLarge { .. }
            | SolveError::IllConditioned { .. }
            | SolveError::NotConverged { .. }
            | SolveError::Response(_) => false,
            SolveError::Eigen(e) => matches!(e, EigenError::SelectionOutOfRange { .. }),
            _ => true,
        }
    }
}

/// A failure as the user meets it: a fault in the input, located at the key
/// that caused it (exit status 2), or a computation that could not finish
/// (exit status 1).
#[derive(Debug, thiserror::Error)]
pub enum Fault {
    /// A fault in the input file or an override.
    #[error("{}", .0.render())]
    Input(InputError),
    /// A fault in the options of the run: a command-line flag, or an
    /// argument of a library call (exit status 2).
    #[error("error: {0}")]
    Usage(String),
    /// A computation that could not finish, with the reason.
    #[error("error: {0}")]
    Compute(String),
}

impl SolveError {
    /// The fault as the user meets it: input faults are located at the key
    /// that caused them (where it was written, else its section, else the
    /// file), computations that could not finish keep their reason.
    pub fn locate(self, model: &Model, source: &SourceText) -> Fault {
        let file = source.locate(None);
        let at = |key: &str, fallback: &str, message: String| {
            let loc = model.location_of(key, &model.location_of(fallback, &file));
            Fault::Input(InputError::new(loc, key, message))
        };
        match &self {
            SolveError::NonFinitePotential(nf) => {
                let (key, location) = model
                    .term_locations
                    .get(nf.term)
                    .cloned()
                    .unwrap_or_else(|| ("term".into(), file.clone()));
                Fault::Input(InputError::new(
                    location,
                    key,
                    format!(
                        "gives {} at x = {} {}; the potential must be finite at every grid point",
                        nf.value,
                        model.units.length_out(nf.x),
                        model.units.length.label()
                    ),
                ))
            }
            SolveError::Occupancy(_) => at("levels.electrons", "levels", self.to_string()),
            SolveError::TooManyLevels { .. } => {
                if model.levels.count_given {
                    at("levels.count", "levels", self.to_string())
                } else {
                    at("grid.points", "grid", self.to_string())
                }
            }
            SolveError::GridTooSmall { .. } | SolveError::TooCoarseToConverge { .. } => {
                at("grid.points", "grid", self.to_string())
            }
            SolveError::ToleranceUnreachable { .. } => {
                at("grid.tolerance", "grid", self.to_string())
            }
            SolveError::Underflow { .. } => {
                if model.chain.is_some() {
                    at("chain", "particle", self.to_string())
                } else {
                    at("domain.to", "domain", self.to_string())
                }
            }
            SolveError::Eigen(_) if self.is_input_error() => {
                at("levels", "levels", self.to_string())
            }
            SolveError::ResponseNeedsFilling => at("levels.count", "response", self.to_string()),
            SolveError::TooLarge { .. }
            | SolveError::IllConditioned { .. }
            | SolveError::NotConverged { .. }
            | SolveError::Response(_)
            | SolveError::Eigen(_) => Fault::Compute(self.to_string()),
        }
    }
}

/// The message of [`SolveError::TooLarge`]: the sizes in GB and what to
/// change (fewer levels only when at least one level fits on the grid).
fn too_large(
    points: usize,
    levels: usize,
    bytes: f64,
    limit: f64,
    max_levels: usize,
    max_points: usize,
) -> String {
    let head = format!(
        "a grid of {points} points with {levels} levels would need about {}, above the limit of {} (half of this machine's memory)",
        gigabytes(bytes),
        gigabytes(limit)
    );
    if max_levels == 0 {
        format!("{head}; use at most {max_points} points (grid.points, or a larger grid.spacing)")
    } else {
        format!("{head}; use at most {max_levels} levels on this grid (levels.count), or at most {max_points} points for these levels (grid.points, or a larger grid.spacing)")
    }
}
