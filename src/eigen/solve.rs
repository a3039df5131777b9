//! Entry points: [`solve`] (selection handling, method choice, memory check,
//! diagnostics) and [`count_below`] (Sturm count / Sylvester inertia).

use super::dense::{dense_bytes, dense_eigen, solve_dense};
use super::diagnostics::{orthogonality_ratio, residual_ratio};
use super::error::EigenError;
use super::guided::solve_guided;
use super::ldlt::{factor, factor_guarded};
use super::matrix::Problem;
use super::params::{EigenInfo, EigenParams, Eigenpairs, Method, PathOutput, Selection};
use super::shift_invert::{shift_invert_bytes, solve_shift_invert};
use super::sturm::SturmData;
use super::tridiagonal::{solve_tridiagonal, tridiagonal_bytes};

/// Checks that B (if given) is positive definite by an LDL^T factorisation.
fn check_b(problem: &Problem) -> Result<(), EigenError> {
    if let Some(b) = problem.b {
        let pb = Problem { a: b, b: None };
        match factor(&pb, 0.0)? {
            Some(f) if f.negatives == 0 => Ok(()),
            _ => Err(EigenError::NotPositiveDefinite),
        }
    } else {
        Ok(())
    }
}

fn is_tridiagonal(problem: &Problem) -> bool {
    problem.a.half_bandwidth() == 1 && problem.b.is_none() && !problem.a.wrap
}

/// Number of eigenvalues strictly below `sigma` (Sturm count for a plain
/// tridiagonal A, otherwise the Sylvester inertia of A - sigma B from a
/// banded/bordered LDL^T; a pivot within rounding of zero moves sigma by a
/// few eps ||A||_1, see [`super::ldlt`]).
pub fn count_below(problem: &Problem, sigma: f64) -> Result<usize, EigenError> {
    problem.validate()?;
    if !sigma.is_finite() {
        return Err(EigenError::Shape {
            what: "sigma is not finite".into(),
        });
    }
    check_b(problem)?;
    if is_tridiagonal(problem) {
        let data = SturmData::new(&problem.a.bands[0], &problem.a.bands[1]);
        return Ok(data.count(sigma));
    }
    Ok(factor_guarded(problem, sigma)?.negatives)
}

/// Computes the selected eigenpairs of A x = E B x.
///
/// Errors: `Shape` for inconsistent input, `SelectionOutOfRange`,
/// `NotPositiveDefinite` (B), `TooLarge` (estimated memory above
/// `params.memory_limit`), `NoConvergence`.
///
/// ```
/// use chainwell::eigen::{solve, EigenParams, Problem, Selection, SymBanded};
/// // tridiag(-1, 2, -1) of order 50: eigenvalues 2 - 2 cos(j pi / 51).
/// let n = 50;
/// let a = SymBanded { n, bands: vec![vec![2.0; n], vec![-1.0; n - 1]], wrap: false };
/// let problem = Problem { a: &a, b: None };
/// let (pairs, info) = solve(&problem, &Selection::Index { first: 0, count: 3 }, &EigenParams::default()).unwrap();
/// let exact = 2.0 - 2.0 * (std::f64::consts::PI / 51.0).cos();
/// assert!((pairs.values[0] - exact).abs() < 1e-13);
/// assert_eq!(info.inertia_below, 3);
/// ```
pub fn solve(
    problem: &Problem,
    selection: &Selection,
    params: &EigenParams,
) -> Result<(Eigenpairs, EigenInfo), EigenError> {
    problem.validate()?;
    check_b(problem)?;
    let n = problem.n();
    let (first, count) = match *selection {
        Selection::Index { first, count } => {
            if first.checked_add(count).is_none_or(|end| end > n) {
                return Err(EigenError::SelectionOutOfRange { first, count, n });
            }
            (first, count)
        }
        Selection::Below { energy } => (0, count_below(problem, energy)?),
    };
    let mut method = match params.method {
        Method::Auto => {
            if n <= params.dense_limit {
                Method::Dense
            } else if is_tridiagonal(problem) {
                Method::Tridiagonal
            } else if params.guesses.is_some() && matches!(selection, Selection::Index { .. }) {
                Method::Guided
            } else {
                Method::ShiftInvert
            }
        }
        Method::Tridiagonal if !is_tridiagonal(problem) => {
            return Err(EigenError::Shape {
                what: "Tridiagonal needs p = 1, B = I and no wrap".into(),
            })
        }
        Method::Guided
            if params.guesses.is_none() || !matches!(selection, Selection::Index { .. }) =>
        {
            return Err(EigenError::Shape {
                what: "Guided needs an index selection and guesses".into(),
            })
        }
        m => m,
    };
    if method == Method::Guided && params.guesses.as_ref().is_some_and(|g| g.len() != count) {
        return Err(EigenError::Shape {
            what: format!("{count} levels wanted but guesses given for a different number"),
        });
    }
    let p = problem.a.half_bandwidth();
    let bytes = match method {
        Method::Dense => dense_bytes(n),
        Method::Tridiagonal => tridiagonal_bytes(n, count),
        _ => {
            let steps = if params.max_lanczos > 0 {
                params.max_lanczos
            } else {
                2 * count + 48
            };
            shift_invert_bytes(n, p, count, steps)
        }
    };
    if bytes > params.memory_limit {
        return Err(EigenError::TooLarge {
            bytes_needed: bytes,
            limit: params.memory_limit,
        });
    }
    // Shift-invert Lanczos: the general path, and the fallback of the others.
    let lanczos = || {
        solve_shift_invert(
            problem,
            first,
            count,
            params.max_lanczos,
            params.max_restarts,
        )
    };
    let PathOutput {
        values,
        vectors,
        iterations,
        factorizations,
        inertia_below,
    } = if count == 0 {
        PathOutput {
            values: Vec::new(),
            vectors: Vec::new(),
            iterations: 0,
            factorizations: 0,
            inertia_below: first,
        }
    } else {
        match method {
            Method::Dense => {
                let (vals, vecs) = solve_dense(problem, first, count)?;
                // confirm the window with one inertia count above it
                let all = dense_eigen_upper(problem, first + count)?;
                let top = match all {
                    Some(next) => 0.5 * (vals[count - 1] + next),
                    None => vals[count - 1] + 1.0 + vals[count - 1].abs(),
                };
                PathOutput {
                    values: vals,
                    vectors: vecs,
                    iterations: 0,
                    factorizations: 1,
                    inertia_below: count_below(problem, top)?,
                }
            }
            Method::Tridiagonal => {
                match solve_tridiagonal(
                    problem.a,
                    first,
                    count,
                    params.residual_tol,
                    params.max_iterations,
                ) {
                    Ok(o) => o,
                    // levels closer than rounding: Auto falls back to Lanczos with locking
                    Err(_) if params.method == Method::Auto => {
                        method = Method::ShiftInvert;
                        lanczos()?
                    }
                    Err(e) => return Err(e),
                }
            }
            Method::Guided => {
                let guesses = params.guesses.as_deref().unwrap_or_default();
                if let Some(o) = solve_guided(problem, first, count, guesses)? {
                    o
                } else {
                    // the guesses did not lead to a proven window
                    method = Method::ShiftInvert;
                    lanczos()?
                }
            }
            _ => lanczos()?,
        }
    };
    let info = EigenInfo {
        method,
        iterations,
        factorizations,
        inertia_below,
        residual_ratio: residual_ratio(problem, &values, &vectors),
        orthogonality_ratio: orthogonality_ratio(problem, &vectors),
    };
    Ok((
        Eigenpairs {
            first,
            values,
            vectors,
        },
        info,
    ))
}

/// The eigenvalue with index `idx` (None past the end), dense.
fn dense_eigen_upper(problem: &Problem, idx: usize) -> Result<Option<f64>, EigenError> {
    if idx >= problem.n() {
        return Ok(None);
    }
    let (vals, _) = dense_eigen(problem)?;
    Ok(Some(vals[idx]))
}
