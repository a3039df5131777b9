//! The pipeline of one solve: model → grid → potential → Hamiltonian →
//! selected eigenpairs → levels and wavefunctions.

use std::time::Instant;

use serde::Serialize;

use crate::eigen::{self, EigenError, EigenParams, Method, Problem, Selection};
use crate::grid::Boundary;
use crate::grid::{align, Grid};
use crate::hamiltonian;
use crate::input::model::{Model, Resolution};
use crate::observables::{
    self, states, Occupancy, OccupancyError, StateSummary, SumRule, Transition,
};
use crate::potential::NonFinite;

/// One computed level.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Level {
    /// Level number, 1 for the lowest.
    pub n: usize,
    /// Energy, eV.
    pub energy: f64,
    /// Sign changes of the wavefunction.
    pub nodes: usize,
    /// The ideal-box level `n² h² / (8 m L²)` for the domain's length (hard walls only), eV.
    pub box_energy: Option<f64>,
    /// Estimated absolute discretisation error of `energy`, eV, when known.
    pub error_estimate: Option<f64>,
    /// Richardson-extrapolated energy, eV, when estimated.
    pub extrapolated: Option<f64>,
    /// Observed order of convergence, when measurable.
    pub observed_order: Option<f64>,
    /// Length of the ideal box that gives this level's energy above the
    /// potential's floor, Å (none when the level lies at or below the floor).
    pub effective_length: Option<f64>,
}

/// How the eigenpairs were found and how good they are.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Diagnostics {
    /// `max_j ||H z_j - E_j z_j||_1 / (||H||_1 N eps)` (LAPACK DSTT21 form).
    pub residual_ratio: f64,
    /// `||Z^T Z - I||_1 / (k eps)` (LAPACK DSTT22 form).
    pub orthogonality_ratio: f64,
    /// The eigen-method used.
    pub method: String,
    /// Iterations of the eigen-method.
    pub iterations: usize,
    /// Eigenvalues below the top of the returned set, by inertia count.
    pub inertia_below: usize,
}

/// The potential's jumps and the grid.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EdgeReport {
    /// Positions of the jumps inside the domain, Å.
    pub positions: Vec<f64>,
    /// Whether every jump sits on a grid point.
    pub aligned: bool,
}

/// Wall-clock seconds.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Timing {
    /// In the eigen-solver alone.
    pub solve_s: f64,
    /// The whole solve, grid to levels.
    pub total_s: f64,
}

/// Everything one solve computes.
#[derive(Debug, Clone)]
pub struct Solution {
    /// The grid used.
    pub grid: Grid,
    /// Positions of the unknowns, Å.
    pub x: Vec<f64>,
    /// V at the unknowns, eV.
    pub potential: Vec<f64>,
    /// Length of the domain (the box length for walls), Å.
    pub box_length: f64,
    /// The levels, ascending.
    pub levels: Vec<Level>,
    /// Normalised wavefunctions at the unknowns, one per level.
    pub psi: Vec<Vec<f64>>,
    /// Moments and classically allowed regions, one per level.
    pub states: Vec<StateSummary>,
    /// Filling of the levels, when `levels.electrons` is given.
    pub occupancy: Option<Occupancy>,
    /// Transitions between computed levels (occupied to empty, or every
    /// pair when asked).
    pub transitions: Vec<Transition>,
    /// Thomas–Reiche–Kuhn sum of level 1 over the computed levels (when
    /// level 1 is computed, and not on a ring).
    pub sum_rule: Option<SumRule>,
    /// Quality of the eigenpairs.
    pub diagnostics: Diagnostics,
    /// The round-off floor of the eigenvalues on this grid, eV.
    pub roundoff_floor: f64,
    /// Whether the potential jumps inside the domain, and whether every jump
    /// sits on a grid point.
    pub edges: EdgeReport,
    /// How the grid was refined to a tolerance, when one was asked for.
    pub refinement: Option<crate::accuracy::Refinement>,
    /// What the user should know.
    pub warnings: Vec<String>,
    /// Seconds spent.
    pub timing: Timing,
}

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
    /// The solve would need more memory than [`MEMORY_LIMIT_BYTES`] (a
    /// computation that cannot finish here).
    #[error("a grid of {points} points with {levels} levels would need about {:.1} GiB, above the limit of {:.0} GiB; lower grid.points (or raise grid.spacing) or levels.count", .bytes / GIB, MEMORY_LIMIT_BYTES / GIB)]
    TooLarge {
        /// Unknowns of the grid.
        points: usize,
        /// Levels asked for (at most `points`).
        levels: usize,
        /// The estimate, bytes.
        bytes: f64,
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
        /// The rounding level [`ROUNDING_FACTOR`]` * eps * ||H||_1`, eV.
        rounding: f64,
        /// `hbar^2/2m (pi / L)^2` for the domain's length `L`, eV.
        scale: f64,
        /// Lowest value of the potential on the grid, eV.
        vmin: f64,
        /// Highest value of the potential on the grid, eV.
        vmax: f64,
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
}

impl SolveError {
    /// Whether the fault lies in the input (exit status 2) rather than in a
    /// computation that could not finish (exit status 1).
    pub fn is_input_error(&self) -> bool {
        match self {
            SolveError::TooLarge { .. }
            | SolveError::IllConditioned { .. }
            | SolveError::NotConverged { .. } => false,
            SolveError::Eigen(e) => matches!(e, EigenError::SelectionOutOfRange { .. }),
            _ => true,
        }
    }
}

const GIB: f64 = 1024.0 * 1024.0 * 1024.0;

/// Most memory a solve may plan for, bytes: 8 GiB, a third of the 24 GiB
/// machines chainwell is tested on, so that a mistyped `grid.points` is
/// refused at once instead of exhausting the machine.
pub const MEMORY_LIMIT_BYTES: f64 = 8.0 * GIB;

/// Estimated bytes of a solve on `points` unknowns with a stencil of
/// half-width `half_width` and `levels` levels: the banded matrix
/// (`half_width + 1` diagonals), one vector per level, and four work
/// vectors (positions, potential, two for the eigen-solver), in `f64`:
/// `points * (half_width + 1 + levels + 4) * 8`. Computed in floating point,
/// so that it cannot overflow.
pub fn memory_estimate(points: usize, half_width: usize, levels: usize) -> f64 {
    points as f64 * (half_width as f64 + 1.0 + levels as f64 + 4.0) * 8.0
}

/// The number of steps across the domain a model asks for (before
/// alignment). A tolerance starts from the default spacing.
pub fn wanted_steps(model: &Model) -> usize {
    match model.grid.resolution {
        Resolution::Points(n) => Grid::with_points(&model.domain, n).steps(),
        Resolution::Spacing(h) => Grid::with_spacing(&model.domain, h).steps(),
        Resolution::Tolerance(_) => {
            Grid::with_spacing(&model.domain, crate::input::model::DEFAULT_SPACING_ANGSTROM).steps()
        }
    }
}

/// The jumps of the model's potential strictly inside its domain, Å.
pub fn interior_edges(model: &Model) -> Vec<f64> {
    align::interior_edges(&model.domain, &model.potential.discontinuities())
}

/// A grid of about `steps` steps for the model: when the potential jumps,
/// the nearest step count (a multiple of `multiple`, at most 10 % more)
/// that puts every jump on a grid point, so that halving the spacing keeps
/// them there.
pub fn grid_near(model: &Model, steps: usize, multiple: usize) -> Grid {
    let edges = interior_edges(model);
    let steps = if edges.is_empty() {
        steps
    } else {
        align::aligned_steps(&model.domain, &edges, steps, multiple).unwrap_or(steps)
    };
    Grid::with_steps(&model.domain, steps)
}

/// The grid a model asks for, aligned with the potential's jumps.
pub fn grid_for(model: &Model) -> Grid {
    grid_near(model, wanted_steps(model), 4)
}

/// Options of a solve.
#[derive(Debug, Clone)]
pub struct SolveOptions {
    /// Eigen-solver parameters.
    pub eigen: EigenParams,
    /// Estimate each level's discretisation error from two coarser grids
    /// (Richardson); costs about 0.75 of one more solve.
    pub estimate: bool,
}

impl Default for SolveOptions {
    fn default() -> Self {
        Self {
            eigen: EigenParams::default(),
            estimate: true,
        }
    }
}

/// Solves the model on its own grid, with error estimates (or, for a
/// tolerance, on the grid the refinement settles on).
pub fn solve(model: &Model) -> Result<Solution, SolveError> {
    solve_with(model, &SolveOptions::default())
}

/// Solves the model with the given options.
pub fn solve_with(model: &Model, opts: &SolveOptions) -> Result<Solution, SolveError> {
    if let Resolution::Tolerance(tol) = model.grid.resolution {
        return crate::accuracy::refine(model, tol, opts);
    }
    let mut sol = solve_on(model, &grid_for(model), &opts.eigen)?;
    if opts.estimate {
        crate::accuracy::estimate(model, &mut sol, &opts.eigen)?;
    }
    Ok(sol)
}

/// The round-off floor of eigenvalues on `grid`: `eps ||H||_1`, with
/// `||H||_1 <= (t / h^2) sum_d |c_d| + max |V|` (any backward-stable
/// eigen-solver is accurate to a small multiple of it; J. Demmel, Applied
/// Numerical Linear Algebra, SIAM 1997, sec. 5.2).
pub fn roundoff_floor(model: &Model, grid: &Grid, v: &[f64]) -> f64 {
    let c = crate::grid::second_derivative_weights(model.grid.order);
    let sum: f64 = c[0].abs() + 2.0 * c[1..].iter().map(|x| x.abs()).sum::<f64>();
    let vmax = v.iter().fold(0.0f64, |m, x| m.max(x.abs()));
    f64::EPSILON * (model.kinetic() / (grid.spacing * grid.spacing) * sum + vmax)
}

/// The grid's positions, the potential's jumps inside the domain, V at the
/// positions (the mean of both sides at a jump on a grid point) and the
/// discretised Hamiltonian: what every solve on a grid starts from.
struct Discretised {
    x: Vec<f64>,
    edges: Vec<f64>,
    v: Vec<f64>,
    disc: hamiltonian::Discretisation,
}

fn discretise(model: &Model, grid: &Grid) -> Result<Discretised, SolveError> {
    let x = grid.positions();
    let edges = interior_edges(model);
    let v = model
        .potential
        .sample_with_edges(&x, &edges, 1e-9 * grid.spacing)?;
    let disc = hamiltonian::build(
        grid,
        &v,
        model.kinetic(),
        model.grid.order,
        model.grid.scheme,
    );
    Ok(Discretised { x, edges, v, disc })
}

/// The energies of levels `first..first + count` (0-based) on `grid`, with
/// nothing else computed: the coarse grids of an error estimate.
pub fn energies_on(
    model: &Model,
    grid: &Grid,
    first: usize,
    count: usize,
    params: &EigenParams,
) -> Result<Vec<f64>, SolveError> {
    let Discretised { v, disc, .. } = discretise(model, grid)?;
    let problem = Problem {
        a: &disc.a,
        b: disc.b.as_ref(),
    };
    let selection = Selection::Index { first, count };
    let guided = with_order2_guesses(model, grid, &v, &selection, params);
    let (pairs, _) = eigen::solve(&problem, &selection, guided.as_ref().unwrap_or(params))?;
    Ok(pairs.values)
}

/// Grids with at most this many points skip the order-2 guesses: there the
/// shift-invert path takes a fraction of a second anyway, and the extra
/// order-2 solve would not pay for itself (common practice, no source).
pub const GUESS_MIN_POINTS: usize = 5000;

/// Parameters with [`EigenParams::guesses`] set to the order-2 eigenvalues of
/// the same potential on the same grid, when the model's discretisation is of
/// higher order (finite differences of order 4-8, or Numerov), the levels are
/// chosen by index, the grid has walls (a ring's order-2 matrix is not
/// tridiagonal) and more than [`GUESS_MIN_POINTS`] points, and the caller
/// left the method and the guesses to chainwell. The two discretisations
/// differ by O(h^2) relative, far less than the level spacing on a grid that
/// resolves the levels; the eigen-solver proves its result by inertia and
/// ignores guesses that do not lead to a proof. `None`: no guesses (also when
/// the order-2 solve fails).
fn with_order2_guesses(
    model: &Model,
    grid: &Grid,
    v: &[f64],
    selection: &Selection,
    params: &EigenParams,
) -> Option<EigenParams> {
    use crate::grid::Scheme;
    let higher = match model.grid.scheme {
        Scheme::FiniteDifference => model.grid.order.get() > 2,
        Scheme::Numerov => true,
    };
    if !higher
        || !matches!(selection, Selection::Index { .. })
        || grid.boundary != Boundary::Walls
        || grid.points <= GUESS_MIN_POINTS
        || params.method != Method::Auto
        || params.guesses.is_some()
    {
        return None;
    }
    let order2 = crate::grid::Order::new(2)?;
    let disc = hamiltonian::build(grid, v, model.kinetic(), order2, Scheme::FiniteDifference);
    let problem = Problem {
        a: &disc.a,
        b: None,
    };
    let (pairs, _) = eigen::solve(&problem, selection, params).ok()?;
    Some(EigenParams {
        guesses: Some(pairs.values),
        ..params.clone()
    })
}

/// Solves the model on the given grid.
pub fn solve_on(model: &Model, grid: &Grid, params: &EigenParams) -> Result<Solution, SolveError> {
    let start = Instant::now();
    let p = model.grid.order.half_width();
    let needed = match model.grid.scheme {
        crate::grid::Scheme::FiniteDifference => 2 * p + 1,
        crate::grid::Scheme::Numerov => 5,
    };
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
    let Discretised { x, edges, v, disc } = discretise(model, grid)?;
    let vmin = v.iter().copied().fold(f64::INFINITY, f64::min);
    let vmax = v.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let norm = disc.a.norm_one();
    let rounding = ROUNDING_FACTOR * f64::EPSILON * norm;
    let scale = model.kinetic() * (std::f64::consts::PI / model.domain.length()).powi(2);
    // An infinite norm (a spacing so small that 1/h^2 overflows) must be
    // refused too.
    if !rounding.is_finite() || rounding > scale {
        return Err(SolveError::IllConditioned {
            norm,
            kinetic: model.kinetic() / (grid.spacing * grid.spacing),
            rounding,
            scale,
            vmin,
            vmax,
        });
    }
    let selection = match model.levels.below {
        Some(energy) => Selection::Below { energy },
        None => {
            let last = model.levels.first + model.levels.count - 1;
            if last > grid.points {
                return Err(SolveError::TooManyLevels {
                    first: model.levels.first,
                    last,
                    points: grid.points,
                });
            }
            Selection::Index {
                first: model.levels.first - 1,
                count: model.levels.count,
            }
        }
    };
    let problem = Problem {
        a: &disc.a,
        b: disc.b.as_ref(),
    };
    let t0 = Instant::now();
    let guided = with_order2_guesses(model, grid, &v, &selection, params);
    let (pairs, info) = eigen::solve(&problem, &selection, guided.as_ref().unwrap_or(params))?;
    let solve_s = t0.elapsed().as_secs_f64();
    for (j, (energy, vector)) in pairs.values.iter().zip(&pairs.vectors).enumerate() {
        let residual = residual_ratio(&disc.a, disc.b.as_ref(), *energy, vector);
        if residual.is_nan() || residual > RESIDUAL_LIMIT {
            return Err(SolveError::NotConverged {
                level: pairs.first + j + 1,
                residual,
            });
        }
    }

    let h = grid.spacing;
    let box_length = model.domain.length();
    let mut levels = Vec::with_capacity(pairs.values.len());
    let mut psis = Vec::with_capacity(pairs.values.len());
    let first0 = pairs.first;
    for (j, (energy, vector)) in pairs.values.iter().zip(pairs.vectors).enumerate() {
        let n = first0 + j + 1;
        let mut psi = disc.psi(vector);
        states::normalise(&mut psi, h);
        let box_energy = (grid.boundary == Boundary::Walls)
            .then(|| model.kinetic() * (n as f64 * std::f64::consts::PI / box_length).powi(2));
        levels.push(Level {
            n,
            energy: *energy,
            nodes: states::count_nodes(&psi),
            box_energy,
            error_estimate: None,
            extrapolated: None,
            observed_order: None,
            effective_length: None,
        });
        psis.push(psi);
    }
    let floor = v.iter().copied().fold(f64::INFINITY, f64::min);
    let kinetic = model.kinetic();
    for l in &mut levels {
        l.effective_length = observables::effective_box_length(l.energy - floor, l.n, kinetic);
    }
    let energies: Vec<f64> = levels.iter().map(|l| l.energy).collect();
    let states_summary: Vec<StateSummary> = levels
        .iter()
        .zip(&psis)
        .map(|(l, psi)| observables::summarise(l.n, &x, &v, psi, h, l.energy))
        .collect();
    let first_n = pairs.first + 1;
    let mut skipped_filling = None;
    let occupancy = match model.levels.electrons {
        Some(e) => match observables::fill(&energies, first_n, e) {
            Ok(o) => Some(o),
            // A chain's default electrons (one per atom) that fall outside
            // the levels asked for are no fault of the input: skip the filling.
            Err(
                err @ (OccupancyError::TooFewLevels { .. }
                | OccupancyError::HomoBelowComputed { .. }),
            ) if !model.levels.electrons_given => {
                skipped_filling = Some(format!(
                    "no occupancy: {err}; set levels.first and levels.count around the HOMO (or levels.electrons) to fill the chain"
                ));
                None
            }
            Err(err) => return Err(err.into()),
        },
        None => None,
    };
    let occupations: Vec<f64> = occupancy
        .as_ref()
        .map(|o| o.occupations.clone())
        .unwrap_or_default();
    let ring = grid.boundary == Boundary::Periodic;
    let transitions = if occupancy.is_none() && !model.spectrum.all_pairs {
        vec![]
    } else if ring {
        ring_transitions(
            grid,
            &psis,
            &energies,
            first_n,
            &occupations,
            model.spectrum.all_pairs,
        )
    } else {
        observables::transitions(
            &x,
            &psis,
            &energies,
            first_n,
            &occupations,
            h,
            Some(box_length).filter(|_| model.potential.terms.is_empty() || model.chain.is_some()),
            model.spectrum.all_pairs,
        )
    };
    let sum_rule = (first_n == 1 && !ring && levels.len() > 1)
        .then(|| observables::trk_sum(&x, &psis, &energies, h, kinetic, 0));
    let edge_report = EdgeReport {
        aligned: align::is_aligned(&model.domain, &edges, grid.steps()),
        positions: edges,
    };
    let mut warnings = warnings(model, grid, &v, &levels);
    warnings.extend(precision_warnings(model, grid, &levels, rounding, scale));
    warnings.extend(skipped_filling);
    if !edge_report.aligned {
        warnings.push(format!(
            "the potential jumps at x = {:?} between grid points: levels then converge at low, erratic order and error estimates are unreliable; put the jumps at simple fractions of the domain",
            edge_report.positions.iter().map(|x| model.units.length_out(*x)).collect::<Vec<_>>()
        ));
    }
    let roundoff = roundoff_floor(model, grid, &v);
    Ok(Solution {
        grid: grid.clone(),
        x,
        potential: v,
        box_length,
        levels,
        psi: psis,
        states: states_summary,
        roundoff_floor: roundoff,
        edges: edge_report,
        refinement: None,
        occupancy,
        transitions,
        sum_rule,
        diagnostics: Diagnostics {
            residual_ratio: info.residual_ratio,
            orthogonality_ratio: info.orthogonality_ratio,
            method: method_name(info.method).to_string(),
            iterations: info.iterations,
            inertia_below: info.inertia_below,
        },
        warnings,
        timing: Timing {
            solve_s,
            total_s: start.elapsed().as_secs_f64(),
        },
    })
}

/// Transitions on a ring of radius `R = L / 2 pi`: the dipole of a planar
/// ring has the components `<i|R cos theta|j>` and `<i|R sin theta|j>`
/// (`theta = 2 pi (x - from) / L`); the reported dipole is their length and
/// the strength, proportional to `|d|^2`, the sum of both components'.
fn ring_transitions(
    grid: &Grid,
    psis: &[Vec<f64>],
    energies: &[f64],
    first_n: usize,
    occupations: &[f64],
    all_pairs: bool,
) -> Vec<Transition> {
    let length = grid.spacing * grid.points as f64;
    let radius = length / (2.0 * std::f64::consts::PI);
    let theta: Vec<f64> = grid
        .positions()
        .iter()
        .map(|x| 2.0 * std::f64::consts::PI * (x - grid.from) / length)
        .collect();
    let cx: Vec<f64> = theta.iter().map(|t| radius * t.cos()).collect();
    let sy: Vec<f64> = theta.iter().map(|t| radius * t.sin()).collect();
    let h = grid.spacing;
    let tx = observables::transitions(
        &cx,
        psis,
        energies,
        first_n,
        occupations,
        h,
        None,
        all_pairs,
    );
    let ty = observables::transitions(
        &sy,
        psis,
        energies,
        first_n,
        occupations,
        h,
        None,
        all_pairs,
    );
    tx.into_iter()
        .zip(ty)
        .map(|(a, b)| Transition {
            dipole: a.dipole.hypot(b.dipole),
            dipole_debye: a.dipole_debye.hypot(b.dipole_debye),
            strength: a.strength + b.strength,
            ..a
        })
        .collect()
}

fn method_name(m: Method) -> &'static str {
    match m {
        Method::Auto => "auto",
        Method::Dense => "dense",
        Method::Tridiagonal => "tridiagonal",
        Method::ShiftInvert => "shift-invert",
        Method::Guided => "guided",
    }
}

/// Points per half-wavelength below which a level is poorly resolved
/// (common practice, no source).
pub const MIN_POINTS_PER_LOBE: f64 = 10.0;

fn warnings(model: &Model, grid: &Grid, v: &[f64], levels: &[Level]) -> Vec<String> {
    let mut out = Vec::new();
    let vmin = v.iter().copied().fold(f64::INFINITY, f64::min);
    if let Some(top) = levels.last() {
        let kinetic_energy = top.energy - vmin;
        if kinetic_energy > 0.0 {
            let k = (kinetic_energy / model.kinetic()).sqrt();
            let per_lobe = std::f64::consts::PI / (k * grid.spacing);
            if per_lobe < MIN_POINTS_PER_LOBE {
                out.push(format!(
                    "grid too coarse for level {}: about {:.1} points per half-wavelength where it is fastest (want at least {}); raise grid.points",
                    top.n, per_lobe, MIN_POINTS_PER_LOBE
                ));
            }
        }
    }
    // Hard walls are part of the model for a box or a chain; for any other
    // potential they are an artefact, and a level above the potential at an
    // edge feels them.
    let artificial_walls = grid.boundary == Boundary::Walls
        && model.chain.is_none()
        && !model.potential.terms.is_empty();
    if artificial_walls {
        let edge = model
            .potential
            .eval(model.domain.from)
            .min(model.potential.eval(model.domain.to));
        let feeling: Vec<usize> = levels
            .iter()
            .filter(|l| l.energy >= edge)
            .map(|l| l.n)
            .collect();
        if let (Some(first), Some(last)) = (feeling.first(), feeling.last()) {
            out.push(format!(
                "levels {first}..{last} lie above the potential at the domain's edges ({}) and feel its hard walls; widen the domain if they should be free of them",
                model.units.energy_out(edge)
            ));
        }
    }
    out
}

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

/// Dimensionless tolerance for calling two ring levels degenerate (see
/// [`crate::bands::group_levels`]): far above the eigen-solver's round-off,
/// far below any physical splitting worth reporting (common practice, no
/// source).
pub const DEGENERACY_TOLERANCE: f64 = 1e-7;

/// The computed levels of a ring (periodic domain) grouped into degenerate
/// sets, e.g. the `+-j` pairs of a free ring; `None` with hard walls. A group
/// at the top or bottom of the computed levels may lack a partner that was
/// not computed.
pub fn ring_degeneracies(sol: &Solution) -> Option<Vec<crate::bands::Degeneracy>> {
    (sol.grid.boundary == Boundary::Periodic).then(|| {
        let energies: Vec<f64> = sol.levels.iter().map(|l| l.energy).collect();
        let first = sol.levels.first().map_or(1, |l| l.n);
        let mut groups = crate::bands::summarize_levels(&energies, DEGENERACY_TOLERANCE);
        for g in &mut groups {
            for n in &mut g.levels {
                *n += first - 1;
            }
        }
        groups
    })
}

/// Energies are blurred by rounding by about `ROUNDING_FACTOR * eps *
/// ||H||_1`: LAPACK's error bounds for computed symmetric eigenvalues are of
/// the form `p(n) eps ||H||` with a modestly growing `p(n)` (E. Anderson et
/// al., *LAPACK Users' Guide*, 3rd ed., SIAM 1999, sec. 4.7); 10 is a
/// common practice, no source.
pub const ROUNDING_FACTOR: f64 = 10.0;

/// Largest residual ratio `||H z - E z||_1 / (||H||_1 N eps)` accepted for a
/// returned eigenpair. LAPACK's tests fail a routine above 30 (the DSTT21
/// threshold); a pair that did not converge is many orders above that. 1e4
/// leaves a wide margin (common practice, no source).
pub const RESIDUAL_LIMIT: f64 = 1e4;

/// Rounding, relative to the domain's lowest box level, above which the
/// energies' last digits are flagged as noise (common practice, no source).
pub const ROUNDING_WARNING: f64 = 1e-6;

/// Two adjacent levels closer than this many times the rounding level are
/// treated as degenerate: their eigenvectors may be any mixture of the two
/// (the angle of an eigenvector's error is about rounding / gap; Davis and
/// Kahan, SIAM J. Numer. Anal. 7, 1 (1970)).
pub const DEGENERATE_FACTOR: f64 = 1e2;

/// The residual ratio of one returned pair (see [`RESIDUAL_LIMIT`]); NaN or
/// infinite when the pair holds a value that is not finite.
fn residual_ratio(
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

/// Warnings about rounding: energies whose last digits are noise, and
/// adjacent levels that rounding cannot tell apart. Degenerate pairs are
/// expected on a ring (the two directions of travel) and not flagged there.
fn precision_warnings(
    model: &Model,
    grid: &Grid,
    levels: &[Level],
    rounding: f64,
    scale: f64,
) -> Vec<String> {
    let mut out = Vec::new();
    let unit = model.units.energy.label();
    if rounding > ROUNDING_WARNING * scale {
        out.push(format!(
            "rounding limits the energies to about ±{:.1e} {unit} (the matrix's norm is large: a deep or high potential, or a very fine grid); digits beyond that are noise",
            model.units.energy_out(rounding)
        ));
    }
    if grid.boundary == Boundary::Walls {
        for pair in levels.windows(2) {
            let gap = pair[1].energy - pair[0].energy;
            if gap < DEGENERATE_FACTOR * rounding {
                out.push(format!(
                    "levels {} and {} are degenerate to within rounding (they differ by {:.1e} {unit}): their wavefunctions may be any mixture of the two, so their nodes, signs and transition dipoles are not reliable",
                    pair[0].n,
                    pair[1].n,
                    model.units.energy_out(gap)
                ));
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use std::path::Path;

    use super::*;

    fn model(text: &str) -> Model {
        crate::input::load_str("t.toml", text.into(), Path::new("."), &[])
            .unwrap()
            .0
    }

    fn banded(wrap: bool) -> eigen::SymBanded {
        let n = 7;
        let off = |d: usize| if wrap { n } else { n - d };
        eigen::SymBanded {
            n,
            bands: (0..3)
                .map(|d| (0..off(d)).map(|i| (i * 3 + d) as f64 - 4.5).collect())
                .collect(),
            wrap,
        }
    }

    #[test]
    fn banded_product_and_norm_match_the_dense_matrix() {
        for wrap in [false, true] {
            let m = banded(wrap);
            let dense = m.to_dense();
            let x: Vec<f64> = (0..m.n).map(|i| (i as f64).sin() + 0.3).collect();
            let mut y = vec![0.0; m.n];
            m.mul_vec(&x, &mut y);
            let want = &dense * nalgebra::DVector::from_vec(x.clone());
            for (a, b) in y.iter().zip(want.iter()) {
                assert!((a - b).abs() < 1e-12, "{wrap}: {a} vs {b}");
            }
            let col_max = (0..m.n)
                .map(|j| dense.column(j).iter().map(|v| v.abs()).sum::<f64>())
                .fold(0.0, f64::max);
            assert!((m.norm_one() - col_max).abs() < 1e-12);
        }
    }

    #[test]
    fn a_vector_that_is_not_an_eigenvector_fails_the_residual_limit() {
        let sol = solve(&model(
            "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 60\n[levels]\ncount = 2\n",
        ))
        .unwrap();
        let grid = &sol.grid;
        let disc = hamiltonian::build(
            grid,
            &sol.potential,
            crate::constants::hbar2_over_2me_ev_a2(),
            crate::grid::Order::new(4).unwrap(),
            crate::grid::Scheme::FiniteDifference,
        );
        let z: Vec<f64> = sol.psi[0].iter().map(|p| p * grid.spacing.sqrt()).collect();
        let good = residual_ratio(&disc.a, None, sol.levels[0].energy, &z);
        assert!(good < 30.0, "{good}");
        let bad = residual_ratio(&disc.a, None, sol.levels[0].energy * 1.001, &z);
        assert!(bad > RESIDUAL_LIMIT, "{bad}");
        assert!(residual_ratio(&disc.a, None, f64::NAN, &z).is_nan());
    }

    #[test]
    fn a_potential_far_above_the_kinetic_scale_is_refused() {
        let m = model("[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 50\n[[term]]\nshape = \"step\"\nfrom = 0.0\nto = 10.0\nheight = 1e300\n");
        let e = solve(&m).unwrap_err();
        assert!(matches!(e, SolveError::IllConditioned { .. }), "{e}");
        assert!(!e.is_input_error());
    }

    #[test]
    fn a_deep_well_warns_that_rounding_limits_the_energies() {
        let deep = "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 100\n[levels]\ncount = 2\n[[term]]\nshape = \"step\"\nfrom = 4.0\nto = 6.0\nheight = -1e12\n";
        let sol = solve(&model(deep)).unwrap();
        assert!(
            sol.warnings.iter().any(|w| w.contains("rounding limits")),
            "{:?}",
            sol.warnings
        );
        // The same well 1 eV deep has no such warning.
        let shallow = deep.replace("-1e12", "-1.0");
        let sol = solve(&model(&shallow)).unwrap();
        assert!(
            !sol.warnings.iter().any(|w| w.contains("rounding")),
            "{:?}",
            sol.warnings
        );
    }

    #[test]
    fn degenerate_levels_are_flagged_on_walls_but_not_on_a_ring() {
        // Two wells 7 angstrom apart behind a barrier of about 4000 eV: the
        // tunnel splitting is far below rounding.
        let wells = "[domain]\nfrom = -6.0\nto = 6.0\n[grid]\npoints = 200\n[levels]\ncount = 2\n[[term]]\nshape = \"formula\"\nexpression = \"50 * (x^2 - 9)^2\"\n";
        let sol = solve(&model(wells)).unwrap();
        assert!(
            sol.warnings
                .iter()
                .any(|w| w.contains("levels 1 and 2 are degenerate")),
            "{:?}",
            sol.warnings
        );
        // On a free ring levels 2 and 3 are exactly degenerate (k = ±1) by
        // symmetry; that is no warning.
        let ring = "[domain]\nfrom = 0.0\nto = 10.0\nboundary = \"periodic\"\n[grid]\npoints = 60\n[levels]\ncount = 3\n";
        let sol = solve(&model(ring)).unwrap();
        assert!(
            (sol.levels[2].energy - sol.levels[1].energy).abs() < 1e-9,
            "the ring's levels 2 and 3 should be degenerate"
        );
        assert!(sol.warnings.is_empty(), "{:?}", sol.warnings);
    }

    #[test]
    fn large_higher_order_grids_take_order2_guesses_and_agree_with_shift_invert() {
        // invented test potential: a cosine ripple in a 40 angstrom box
        let text = "[domain]\nfrom = 0.0\nto = 40.0\n[grid]\npoints = 8000\nSCHEME\n[levels]\nfirst = 31\ncount = 6\n[[term]]\nshape = \"formula\"\nexpression = \"0.7 * cos(0.9 * x)\"\n";
        for scheme in ["order = 8", "order = 4", "scheme = \"numerov\""] {
            let m = model(&text.replace("SCHEME", scheme));
            let grid = grid_for(&m);
            assert!(grid.points > GUESS_MIN_POINTS);
            let guided = solve_on(&m, &grid, &EigenParams::default()).unwrap();
            assert_eq!(guided.diagnostics.method, "guided", "{scheme}");
            let plain = EigenParams {
                method: Method::ShiftInvert,
                ..Default::default()
            };
            let reference = solve_on(&m, &grid, &plain).unwrap();
            assert_eq!(reference.diagnostics.method, "shift-invert");
            let tol = 64.0 * roundoff_floor(&m, &grid, &guided.potential);
            for (a, b) in guided.levels.iter().zip(&reference.levels) {
                assert_eq!(a.n, b.n);
                assert!(
                    (a.energy - b.energy).abs() <= tol,
                    "{scheme} level {}: {} vs {}",
                    a.n,
                    a.energy,
                    b.energy
                );
            }
            let e = energies_on(&m, &grid, 30, 6, &EigenParams::default()).unwrap();
            for (a, b) in e.iter().zip(&reference.levels) {
                assert!((a - b.energy).abs() <= tol, "{scheme}: {a} vs {}", b.energy);
            }
        }
    }
}
