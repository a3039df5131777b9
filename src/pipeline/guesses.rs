//! Order-2 eigenvalues as starting guesses for the higher-order schemes.

use rayon::prelude::*;

use crate::eigen::subspace::dot;
use crate::eigen::{self, EigenParams, GuidedParams, Method, Problem, Selection};
use crate::grid::{Boundary, Grid, Scheme};
use crate::hamiltonian;
use crate::input::Model;

use super::limits::GUESS_MIN_POINTS;

/// Parameters with [`GuidedParams::guesses`] set from the order-2
/// eigenpairs of the same potential on the same grid, when the model's
/// discretisation is of higher order (finite differences of order 4-8, or
/// Numerov), the levels are chosen by index, the grid has walls (a ring's
/// order-2 matrix is not tridiagonal) and more than [`GUESS_MIN_POINTS`]
/// points, and the caller left the method and the guesses to chainwell.
///
/// Each guess is the Rayleigh quotient of an order-2 eigenvector z_2 in the
/// model's own pencil, z_2^T A z_2 / z_2^T B z_2 = E_2 + z_2^T (H - H_2) z_2
/// for unit z_2 and B = I: the first-order perturbation correction of the
/// order-2 value (Rayleigh-Schrödinger; J. J. Sakurai, *Modern Quantum
/// Mechanics*, rev. ed. 1994, sec. 5.1), one banded product per level.
/// The order-2 values alone differ from the order-2p ones by O(h^2)
/// relative, which high in a long chain's spectrum is several level
/// spacings; the corrected ones are off by the square of that difference
/// over the spacing. The eigen-solver proves its result by inertia and
/// ignores guesses that do not lead to a proof. `None`: no guesses (also
/// when the order-2 solve fails).
pub fn with_order2_guesses(
    model: &Model,
    grid: &Grid,
    v: &[f64],
    problem: &Problem,
    selection: &Selection,
    params: &EigenParams,
) -> Option<EigenParams> {
    if !takes_order2_guesses(model, grid, selection, params) {
        return None;
    }
    let order2 = crate::grid::Order::new(2)?;
    let disc = hamiltonian::build(grid, v, model.kinetic(), order2, Scheme::FiniteDifference);
    let order2_problem = Problem {
        a: &disc.a,
        b: None,
    };
    let (pairs, _) = eigen::solve_unchecked(&order2_problem, selection, params).ok()?;
    drop(disc);
    let mut guesses: Vec<f64> = pairs
        .vectors
        .par_iter()
        .map(|z| rayleigh_quotient(problem, z))
        .collect();
    if guesses.iter().any(|g| !g.is_finite()) {
        return None;
    }
    guesses.sort_by(|a, b| a.total_cmp(b));
    Some(EigenParams {
        guided: GuidedParams {
            guesses: Some(guesses),
        },
        ..params.clone()
    })
}

/// z^T A z / z^T B z.
fn rayleigh_quotient(problem: &Problem, z: &[f64]) -> f64 {
    let n = z.len();
    let mut y = vec![0.0; n];
    problem.a.mul_vec(z, &mut y);
    let num = dot(z, &y);
    problem.mul_b(z, &mut y);
    num / dot(z, &y)
}

/// Whether [`with_order2_guesses`] computes guesses for this solve (the
/// conditions in its docs); the memory plan asks too.
pub fn takes_order2_guesses(
    model: &Model,
    grid: &Grid,
    selection: &Selection,
    params: &EigenParams,
) -> bool {
    let higher = match model.grid.scheme {
        Scheme::FiniteDifference => model.grid.order.get() > 2,
        Scheme::Numerov => true,
    };
    higher
        && matches!(selection, Selection::Index { .. })
        && grid.boundary == Boundary::Walls
        && grid.points > GUESS_MIN_POINTS
        && params.method == Method::Auto
        && params.guided.guesses.is_none()
}
