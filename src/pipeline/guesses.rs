//! Order-2 eigenvalues as starting guesses for the higher-order schemes.

use crate::eigen::{self, EigenParams, Method, Problem, Selection};
use crate::grid::{Boundary, Grid, Scheme};
use crate::hamiltonian;
use crate::input::Model;

use super::limits::GUESS_MIN_POINTS;

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
pub fn with_order2_guesses(
    model: &Model,
    grid: &Grid,
    v: &[f64],
    selection: &Selection,
    params: &EigenParams,
) -> Option<EigenParams> {
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
