//! Entry points: [`solve`] (selection handling, method choice, memory check,
//! diagnostics) and [`count_below`] (Sturm count / Sylvester inertia).

use super::dense::{dense_eigen, dense_values, pick_dense};
use super::diagnostics::{orthogonality_ratio, residual_norms, residual_ratio};
use super::error::EigenError;
use super::guided::solve_guided;
use super::ldlt::{factor, factor_guarded};
use super::matrix::Problem;
use super::memory::eigen_bytes;
use super::params::{EigenInfo, EigenParams, Eigenpairs, Method, PathOutput, Selection};
use super::shift_invert::solve_shift_invert;
use super::sturm::SturmData;
use super::tridiagonal::solve_tridiagonal;

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

/// The method [`Method::Auto`] takes for an n x n problem: `Dense` up to
/// [`DenseParams::limit`](super::DenseParams), `Tridiagonal` for a plain
/// tridiagonal matrix, `Guided` when guesses are given for an index window
/// (`guided`), `ShiftInvert` otherwise. The one owner of this rule: callers
/// that plan memory ([`super::memory::eigen_bytes`]) ask it too.
pub fn auto_method(params: &EigenParams, n: usize, tridiagonal: bool, guided: bool) -> Method {
    if n <= params.dense.limit {
        Method::Dense
    } else if tridiagonal {
        Method::Tridiagonal
    } else if guided {
        Method::Guided
    } else {
        Method::ShiftInvert
    }
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
    run(problem, selection, params, Output::Checked)
}

/// As [`solve`], without the diagnostics: `residual_ratio` and
/// `orthogonality_ratio` are NaN and `residual_norms` is empty. For callers
/// that use the pairs as a means (guesses, starting data), not as results:
/// it saves the k residual products and the O(N k^2) orthogonality check.
pub fn solve_unchecked(
    problem: &Problem,
    selection: &Selection,
    params: &EigenParams,
) -> Result<(Eigenpairs, EigenInfo), EigenError> {
    run(problem, selection, params, Output::Unchecked)
}

/// The eigenvalues of the selected levels only, proven complete by the same
/// inertia counts as [`solve`] (`vectors` empty, diagnostics NaN): the order-2
/// path keeps no vectors and skips Rayleigh-Ritz (each value is its level's
/// converged Rayleigh quotient, inside its Sturm bracket), the dense path
/// diagonalises once without vectors. The banded paths need their vectors
/// internally and only drop them and the diagnostics.
pub fn eigenvalues(
    problem: &Problem,
    selection: &Selection,
    params: &EigenParams,
) -> Result<(Eigenpairs, EigenInfo), EigenError> {
    run(problem, selection, params, Output::Values)
}

/// What a run returns.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Output {
    /// Pairs and diagnostics.
    Checked,
    /// Pairs, no diagnostics.
    Unchecked,
    /// Values only.
    Values,
}

fn run(
    problem: &Problem,
    selection: &Selection,
    params: &EigenParams,
    output: Output,
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
        Method::Auto => auto_method(
            params,
            n,
            is_tridiagonal(problem),
            params.guided.guesses.is_some() && matches!(selection, Selection::Index { .. }),
        ),
        Method::Tridiagonal if !is_tridiagonal(problem) => {
            return Err(EigenError::Shape {
                what: "Tridiagonal needs p = 1, B = I and no wrap".into(),
            })
        }
        Method::Guided
            if params.guided.guesses.is_none() || !matches!(selection, Selection::Index { .. }) =>
        {
            return Err(EigenError::Shape {
                what: "Guided needs an index selection and guesses".into(),
            })
        }
        m => m,
    };
    if method == Method::Guided
        && params
            .guided
            .guesses
            .as_ref()
            .is_some_and(|g| g.len() != count)
    {
        return Err(EigenError::Shape {
            what: format!("{count} levels wanted but guesses given for a different number"),
        });
    }
    let p = problem.a.half_bandwidth();
    let fits = |method: Method| {
        let bytes = eigen_bytes(method, n, p, count);
        if bytes > params.memory_limit {
            return Err(EigenError::TooLarge {
                bytes_needed: bytes,
                limit: params.memory_limit,
            });
        }
        Ok(())
    };
    fits(method)?;
    // Shift-invert Lanczos: the general path, and the fallback of the others
    // (which must fit too: its basis is larger than their vectors)
    let lanczos = || {
        fits(Method::ShiftInvert)?;
        solve_shift_invert(
            problem,
            first,
            count,
            params.lanczos.max_steps,
            params.lanczos.max_restarts,
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
                // one dense diagonalisation gives the window and the level
                // above it, which places the confirming inertia count
                let (all, vecs) = if output == Output::Values {
                    (dense_values(problem)?, Vec::new())
                } else {
                    let (all, vecs) = dense_eigen(problem)?;
                    let (_, picked) = pick_dense(&all, &vecs, first, count);
                    (all, picked)
                };
                let vals = all[first..first + count].to_vec();
                let top = match all.get(first + count) {
                    Some(&next) => 0.5 * (vals[count - 1] + next),
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
                    params.tridiagonal.residual_tol,
                    params.tridiagonal.max_iterations,
                    output != Output::Values,
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
                let guesses = params.guided.guesses.as_deref().unwrap_or_default();
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
    let vectors = if output == Output::Values {
        Vec::new()
    } else {
        vectors
    };
    let (residual_ratio, residual_norms, orthogonality_ratio) = if output == Output::Checked {
        let norms = residual_norms(problem, &values, &vectors);
        (
            residual_ratio(problem, &norms),
            norms,
            orthogonality_ratio(problem, &vectors),
        )
    } else {
        (f64::NAN, Vec::new(), f64::NAN)
    };
    let info = EigenInfo {
        method,
        iterations,
        factorizations,
        inertia_below,
        residual_ratio,
        residual_norms,
        orthogonality_ratio,
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
