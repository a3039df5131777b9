//! The pipeline of one solve: model → grid → potential → Hamiltonian →
//! selected eigenpairs → levels and wavefunctions.

use std::time::Instant;

use serde::Serialize;

use crate::eigen::{self, EigenError, EigenParams, Method, Problem, Selection};
use crate::grid::{align, Grid};
use crate::hamiltonian;
use crate::input::model::{Boundary, Model, Resolution};
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
        !matches!(self, SolveError::Eigen(e) if !matches!(e, EigenError::SelectionOutOfRange { .. }))
    }
}

/// The number of steps across the domain a model asks for (before
/// alignment). A tolerance starts from the default spacing.
pub fn wanted_steps(model: &Model) -> usize {
    match model.grid.resolution {
        Resolution::Points(n) => Grid::with_points(&model.domain, n).steps(),
        Resolution::Spacing(h) => Grid::with_spacing(&model.domain, h).steps(),
        Resolution::Tolerance(_) => {
            Grid::with_spacing(&model.domain, crate::input::check::DEFAULT_SPACING_ANGSTROM).steps()
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

/// The energies of levels `first..first + count` (0-based) on `grid`, with
/// nothing else computed: the coarse grids of an error estimate.
pub fn energies_on(
    model: &Model,
    grid: &Grid,
    first: usize,
    count: usize,
    params: &EigenParams,
) -> Result<Vec<f64>, SolveError> {
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
    let problem = Problem {
        a: &disc.a,
        b: disc.b.as_ref(),
    };
    let (pairs, _) = eigen::solve(&problem, &Selection::Index { first, count }, params)?;
    Ok(pairs.values)
}

/// Solves the model on the given grid.
pub fn solve_on(model: &Model, grid: &Grid, params: &EigenParams) -> Result<Solution, SolveError> {
    let start = Instant::now();
    let p = model.grid.order.half_width();
    let needed = match model.grid.scheme {
        crate::input::model::Scheme::FiniteDifference => 2 * p + 1,
        crate::input::model::Scheme::Numerov => 5,
    };
    if grid.points < needed {
        return Err(SolveError::GridTooSmall {
            points: grid.points,
            order: model.grid.order.get(),
            needed,
        });
    }
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
    let (pairs, info) = eigen::solve(&problem, &selection, params)?;
    let solve_s = t0.elapsed().as_secs_f64();

    let h = grid.spacing;
    let box_length = model.domain.length();
    let mut levels = Vec::with_capacity(pairs.values.len());
    let mut psis = Vec::with_capacity(pairs.values.len());
    for (j, (energy, vector)) in pairs.values.iter().zip(&pairs.vectors).enumerate() {
        let n = pairs.first + j + 1;
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
    let occupancy = match model.levels.electrons {
        Some(e) => Some(observables::fill(&energies, first_n, e)?),
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
