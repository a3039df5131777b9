//! Guided path: an index window of a banded (possibly generalized, possibly
//! periodic) problem from one approximate eigenvalue per wanted level.
//!
//! Typical source of the guesses: the order-2 discretisation of the same
//! potential on the same grid, whose eigenvalues differ from the order-2p ones
//! by O(h^2) relative, far less than the level spacing.
//!
//! * **Inverse iteration** (Parlett, *The Symmetric Eigenvalue Problem*, 1998,
//!   sec. 4.2; Wilkinson, *The Algebraic Eigenvalue Problem*, 1965, ch. 9):
//!   for each level j, one LDL^T factorisation of A - g_j B
//!   ([`super::ldlt::factor_guarded`]) and x <- (A - g_j B)^-1 B x from a fixed
//!   pseudo-random start, B-normalised, until the Rayleigh quotient
//!   ||A x - rho B x||_1 (rho = x^T A x / x^T B x) is below N eps ||A||_1, or
//!   rho changes by at most 4 eps ||A||_1 while the residual stops shrinking
//!   (at most [`MAX_STEPS`] steps). If three steps at the guess do not
//!   converge (a guess far from its level compared with the spacing), the
//!   shift moves once to rho (Rayleigh-quotient iteration, Parlett 1998,
//!   sec. 4.6), which then converges in one or two steps.
//!   Levels are independent and run in parallel; each result depends only on
//!   its own guess, so the output does not depend on the number of threads.
//! * **Rayleigh-Ritz** on the k vectors restores B-orthogonality and removes
//!   the components along the other wanted levels
//!   ([`super::subspace::rayleigh_ritz_in_place`]).
//! * **Proof.** With Z B-orthonormal, Theta = Z^T A Z diagonal and residual
//!   block R = A Z - B Z Theta, there are k eigenvalues with *distinct*
//!   indices, one within eta = ||B^-1/2 R||_2 <= ||R||_F / sqrt(lambda_min(B))
//!   of each Ritz value (Kahan's theorem for the symmetric matrix
//!   B^-1/2 A B^-1/2; Parlett 1998, sec. 11.5). If the inertia of
//!   A - a B is `first` and that of A - b B is `first + count`, with
//!   a < theta_0 - eta and theta_{k-1} + eta < b (Sylvester's law), the
//!   interval [a, b) holds exactly the wanted levels, so those k eigenvalues
//!   are the window. Requiring consecutive Ritz values to be more than
//!   2 eta apart makes the j-th Ritz value the approximation of level
//!   `first + j`. Any failed check returns `None` and the caller falls back
//!   to shift-invert Lanczos: a wrong guess costs time, never correctness.

use rayon::prelude::*;

use super::dense::fix_sign;
use super::error::EigenError;
use super::ldlt::factor_guarded;
use super::matrix::{Problem, SymBanded};
use super::subspace::{dot, rayleigh_ritz_in_place};

/// Maximum inverse-iteration steps per level.
pub const MAX_STEPS: usize = 6;

/// Steps at the guess before the shift moves to the Rayleigh quotient.
pub const REFACTOR_AFTER: usize = 3;

/// Result of the guided path.
pub type GuidedOutput = super::params::PathOutput;

/// The start vector of level `j` of the window.
fn start_vector(n: usize, j: usize) -> Vec<f64> {
    super::subspace::start_vector(n, (j as u64 + 1).wrapping_mul(0xD1B5_4A32_D192_ED03))
}

/// Lower Gershgorin bound of a banded matrix (wrap included).
fn gershgorin_low(m: &SymBanded) -> f64 {
    let n = m.n;
    let mut off = vec![0.0; n];
    for (dd, band) in m.bands.iter().enumerate().skip(1) {
        for (i, &v) in band.iter().enumerate() {
            off[i] += v.abs();
            off[(i + dd) % n] += v.abs();
        }
    }
    m.bands[0]
        .iter()
        .zip(&off)
        .map(|(d, o)| d - o)
        .fold(f64::INFINITY, f64::min)
}

/// Vector (B-normalised), steps taken, converged, shift moved.
type Run = (Vec<f64>, usize, bool, bool);

/// One level: inverse iteration at the shift `guess` (moved once to the
/// Rayleigh quotient after [`REFACTOR_AFTER`] steps without convergence).
fn iterate(problem: &Problem, guess: f64, j: usize, anorm: f64) -> Result<Run, EigenError> {
    let n = problem.n();
    let mut f = factor_guarded(problem, guess)?;
    let mut refactored = false;
    let mut x = start_vector(n, j);
    let mut bx = vec![0.0; n];
    let mut ax = vec![0.0; n];
    let mut rho_prev = f64::NAN;
    let mut res_prev = f64::INFINITY;
    let res_tol = n as f64 * f64::EPSILON * anorm;
    for step in 1..=MAX_STEPS {
        problem.mul_b(&x, &mut bx);
        x.copy_from_slice(&bx);
        f.solve(&mut x);
        problem.mul_b(&x, &mut bx);
        let xbx = dot(&x, &bx);
        if !(xbx.is_finite() && xbx > 0.0) {
            return Ok((x, step, false, refactored));
        }
        let s = 1.0 / xbx.sqrt();
        x.iter_mut().for_each(|v| *v *= s);
        bx.iter_mut().for_each(|v| *v *= s);
        problem.a.mul_vec(&x, &mut ax);
        let rho = dot(&x, &ax);
        let res: f64 = ax.iter().zip(&bx).map(|(a, b)| (a - rho * b).abs()).sum();
        let xn = dot(&x, &x).sqrt();
        // converged: residual at the LAPACK scale, or the Rayleigh quotient
        // settled and the residual no longer shrinks (rounding floor)
        let settled = (rho - rho_prev).abs() <= 4.0 * f64::EPSILON * anorm;
        if res <= res_tol * xn || (settled && res > 0.25 * res_prev) {
            return Ok((x, step, true, refactored));
        }
        rho_prev = rho;
        res_prev = res;
        if step == REFACTOR_AFTER {
            // slow contraction (a guess far from its level relative to the
            // spacing): move the shift to the Rayleigh quotient once
            f = factor_guarded(problem, rho)?;
            refactored = true;
        }
    }
    Ok((x, MAX_STEPS, false, refactored))
}

/// The window `first..first + count` from `guesses` (one per level,
/// ascending), or `None` when a vector does not converge or the inertia
/// proof fails (see the module docs).
pub fn solve_guided(
    problem: &Problem,
    first: usize,
    count: usize,
    guesses: &[f64],
) -> Result<Option<GuidedOutput>, EigenError> {
    let n = problem.n();
    if count == 0
        || guesses.len() != count
        || guesses.iter().any(|g| !g.is_finite())
        || guesses.windows(2).any(|w| w[1] < w[0])
    {
        return Ok(None);
    }
    let anorm = problem.a.norm_one().max(f64::MIN_POSITIVE);
    let bnorm = problem.b.map_or(1.0, |b| b.norm_one());
    let bmin = problem.b.map_or(1.0, gershgorin_low);
    if bmin.is_nan() || bmin <= 0.0 {
        return Ok(None);
    }
    let runs: Vec<Run> = guesses
        .par_iter()
        .enumerate()
        .map(|(j, &g)| iterate(problem, g, j, anorm))
        .collect::<Result<_, _>>()?;
    let iterations = runs.iter().map(|r| r.1).sum();
    let refactors = runs.iter().filter(|r| r.3).count();
    if runs.iter().any(|r| !r.2) {
        return Ok(None);
    }
    let x: Vec<Vec<f64>> = runs.into_iter().map(|r| r.0).collect();
    let (vals, mut vecs) = match rayleigh_ritz_in_place(problem, x) {
        Ok(r) => r,
        Err(_) => return Ok(None),
    };
    // residual block: eta = ||R||_F / sqrt(lambda_min(B)) plus the rounding
    // of the residual evaluation itself
    let p = problem.a.half_bandwidth();
    let sq: Vec<(f64, f64)> = vecs
        .par_iter()
        .zip(&vals)
        .map(|(z, &e)| {
            let mut az = vec![0.0; n];
            let mut bz = vec![0.0; n];
            problem.a.mul_vec(z, &mut az);
            problem.mul_b(z, &mut bz);
            let r2: f64 = az.iter().zip(&bz).map(|(a, b)| (a - e * b).powi(2)).sum();
            let r1: f64 = az.iter().zip(&bz).map(|(a, b)| (a - e * b).abs()).sum();
            let round =
                (4 * p + 8) as f64 * f64::EPSILON * (anorm + e.abs() * bnorm) * dot(z, z).sqrt();
            (r2, r1 + round)
        })
        .collect();
    let frob: f64 = sq.iter().map(|s| s.0).sum::<f64>().sqrt();
    let round_max = sq.iter().map(|s| s.1).fold(0.0, f64::max);
    let eta = frob / bmin.sqrt() + (4 * p + 8) as f64 * f64::EPSILON * (anorm + bnorm);
    // keep the LAPACK-style residual ratio well inside 30
    if round_max > 8.0 * n as f64 * f64::EPSILON * anorm {
        return Ok(None);
    }
    if vals.windows(2).any(|w| w[1] - w[0] <= 2.0 * eta) {
        return Ok(None);
    }
    // check points: a twentieth of the smallest Ritz gap outside the ends
    // (the spacing to the unseen neighbours may be smaller than inside the
    // window: levels spread out upwards), or, for a single level, a margin
    // far above eta and the guard's shifts
    let min_gap = vals
        .windows(2)
        .map(|w| w[1] - w[0])
        .fold(f64::INFINITY, f64::min);
    // the first shift of the pivot guard; a larger one is caught by the
    // checks on the shifts actually factored below
    let guard = 64.0 * f64::EPSILON * anorm;
    let delta = if min_gap.is_finite() {
        min_gap / 20.0
    } else {
        (1e3 * eta).max(1e4 * f64::EPSILON * anorm)
    };
    if delta <= eta + guard {
        return Ok(None);
    }
    let (lo, hi) = (vals[0], vals[count - 1]);
    let (fa, fb) = rayon::join(
        || factor_guarded(problem, lo - delta),
        || factor_guarded(problem, hi + delta),
    );
    let (fa, fb) = (fa?, fb?);
    let proven = fa.sigma < lo - eta
        && fb.sigma > hi + eta
        && fa.negatives == first
        && fb.negatives == first + count;
    if !proven {
        return Ok(None);
    }
    vecs.iter_mut().for_each(|v| fix_sign(v));
    Ok(Some(GuidedOutput {
        values: vals,
        vectors: vecs,
        iterations,
        factorizations: count + refactors + 2,
        inertia_below: fb.negatives,
    }))
}
