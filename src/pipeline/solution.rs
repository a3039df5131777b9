//! What one solve returns: levels, wavefunctions, observables and how good
//! they are.

use serde::Serialize;

use crate::grid::Grid;
use crate::observables::{Occupancy, StateSummary, SumRule, Transition};

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
    /// Whether the error estimate was widened because the levels did not
    /// converge as Richardson extrapolation assumes (erratic between grids,
    /// or an observed order far above the scheme's).
    pub estimate_widened: bool,
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

/// The potential's breaks and the grid.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EdgeReport {
    /// Positions of the jumps inside the domain, Å.
    pub positions: Vec<f64>,
    /// Whether every jump sits on a grid point.
    pub aligned: bool,
    /// Positions of the kinks (V continuous, V' jumps) inside the domain, Å.
    pub kinks: Vec<f64>,
    /// Whether every kink sits on a grid point.
    pub kinks_aligned: bool,
    /// Whether every kink's stencil is corrected ([`crate::grid::kink`]).
    pub kinks_corrected: bool,
    /// Positions of the weak breaks (V''' jumps) inside the domain, Å.
    pub weak_breaks: Vec<f64>,
    /// Whether every weak break sits on a grid point.
    pub weak_aligned: bool,
    /// Whether every weak break's stencil is corrected.
    pub weak_corrected: bool,
    /// Kinks and weak breaks left uncorrected, Å, with the reason.
    #[serde(skip)]
    pub uncorrected: Vec<(f64, crate::pipeline::corners::Uncorrected)>,
    /// Whether a hard wall cuts the potential with a slope that the levels
    /// feel ([`crate::pipeline::corners::wall_slope_felt`]).
    pub wall_slope: bool,
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
    pub refinement: Option<Refinement>,
    /// The Hückel levels of the same atoms, when the input has `[huckel]`.
    pub huckel: Option<crate::observables::Huckel>,
    /// What the user should know.
    pub warnings: Vec<String>,
    /// Seconds spent.
    pub timing: Timing,
    /// The static response of the filled levels, when `[response]` asks.
    pub response: Option<super::response::Response>,
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
