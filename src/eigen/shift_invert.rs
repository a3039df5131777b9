//! Selected eigenpairs of a banded (p = 1..4), possibly periodic, possibly
//! generalized problem A x = E B x by shift-and-invert Lanczos.
//!
//! * **Shift**: sigma is placed inside the wanted index window by bisection on
//!   the inertia count of A - sigma B ([`super::ldlt`], Sylvester's law), with
//!   geometric splitting above the lower spectral bound while the bracket spans
//!   a large ratio (the low levels of finite-difference Hamiltonians sit
//!   ~1e-9 ||A|| above it).
//! * **Lanczos** on the operator Op = (A - sigma B)^-1 B, self-adjoint in the
//!   B inner product, with full re-orthogonalisation (classical Gram-Schmidt,
//!   applied twice) against the Krylov basis and all locked vectors
//!   (Ericsson & Ruhe, Math. Comp. 35 (1980) 1251-1268; Grimes, Lewis & Simon,
//!   SIAM J. Matrix Anal. Appl. 15 (1994) 228-272). Ritz values theta give
//!   E = sigma + 1/theta; a pair is converged when beta_m |s_mi| <= tol |theta_max|.
//! * **Proof of completeness**: the converged values are assigned indices from
//!   the inertia at sigma; counts at check points between the wanted window and
//!   its neighbours (or below/above the ends) must equal the assigned indices.
//!   A mismatch means a level was missed (e.g. the second member of a
//!   degenerate pair on a ring, invisible to a single Krylov sequence), and
//!   Lanczos restarts from a new vector B-orthogonal to the locked ones.

use nalgebra::DMatrix;
use rayon::prelude::*;

use super::dense::fix_sign;
use super::diagnostics::residual_norm1;
use super::error::EigenError;
use super::ldlt::{factor_guarded, ShiftedLdlt};
use super::matrix::{Problem, SymBanded};
use super::subspace::{combine, dot, project, rayleigh_ritz, subtract_combination};

/// Result of the shift-invert path.
pub type ShiftInvertOutput = super::params::PathOutput;

/// Gershgorin interval [lo, hi] of a banded matrix.
fn gershgorin(a: &SymBanded) -> (f64, f64) {
    let n = a.n;
    let mut off = vec![0.0; n];
    for (dd, band) in a.bands.iter().enumerate().skip(1) {
        for (i, &v) in band.iter().enumerate() {
            off[i] += v.abs();
            off[(i + dd) % n] += v.abs();
        }
    }
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for (d, o) in a.bands[0].iter().zip(&off) {
        lo = lo.min(d - o);
        hi = hi.max(d + o);
    }
    (lo, hi)
}

/// The start vector of Lanczos run `seed` (1 for the first run).
fn start_vector(n: usize, seed: u64) -> Vec<f64> {
    let state = seed
        .wrapping_mul(0x9E37_79B9_7F4A_7C15)
        .wrapping_add(0x1234_5678);
    super::subspace::start_vector(n, state)
}

struct Counter<'p, 'a> {
    problem: &'p Problem<'a>,
    factorizations: usize,
}

impl Counter<'_, '_> {
    fn factor(&mut self, sigma: f64) -> Result<ShiftedLdlt, EigenError> {
        self.factorizations += 1;
        factor_guarded(self.problem, sigma)
    }
    fn count(&mut self, sigma: f64) -> Result<usize, EigenError> {
        Ok(self.factor(sigma)?.negatives)
    }
}

/// (A - sigma B)^-1 b with up to four steps of iterative refinement (Wilkinson; Higham,
/// *Accuracy and Stability of Numerical Algorithms*, 2nd ed., ch. 12), which
/// repairs the element growth an unpivoted indefinite LDL^T may suffer.
fn solve_refined(problem: &Problem, f: &ShiftedLdlt, b: &[f64]) -> Vec<f64> {
    let n = b.len();
    let mut x = b.to_vec();
    f.solve(&mut x);
    let mut ax = vec![0.0; n];
    let mut bx = vec![0.0; n];
    let scale = problem.a.norm_one() + f.sigma.abs() * problem.b.map_or(1.0, |m| m.norm_one());
    for _step in 0..4 {
        problem.a.mul_vec(&x, &mut ax);
        problem.mul_b(&x, &mut bx);
        let mut r: Vec<f64> = b
            .iter()
            .zip(ax.iter().zip(&bx))
            .map(|(bi, (a, m))| bi - (a - f.sigma * m))
            .collect();
        let rn = r.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        let xn = x.iter().fold(0.0f64, |m, v| m.max(v.abs()));
        if rn <= 4.0 * f64::EPSILON * scale * xn {
            break;
        }
        f.solve(&mut r);
        for (xi, ri) in x.iter_mut().zip(&r) {
            *xi += ri;
        }
    }
    x
}

/// B-orthogonalises `w` against `basis` (two classical Gram-Schmidt passes)
/// and returns its B-norm and B w.
fn b_orthogonalize(problem: &Problem, basis: &[&[f64]], w: &mut [f64]) -> (f64, Vec<f64>) {
    let n = w.len();
    let mut bw = vec![0.0; n];
    for _pass in 0..2 {
        problem.mul_b(w, &mut bw);
        let c = project(basis, &bw);
        subtract_combination(w, basis, &c);
    }
    problem.mul_b(w, &mut bw);
    (dot(w, &bw).max(0.0).sqrt(), bw)
}

/// Ritz pairs of one Lanczos run: (theta, converged, coefficients in the basis).
type RitzSet = Vec<(f64, bool, Vec<f64>)>;

/// Runs Lanczos on (A - sigma B)^-1 B from `start`, B-orthogonal to `locked`;
/// stops when `need` Ritz pairs of largest |theta| have converged or after
/// `max_steps`. Returns the basis and the Ritz set sorted by |theta| descending.
fn lanczos(
    problem: &Problem,
    f: &ShiftedLdlt,
    locked: &[Vec<f64>],
    start: Vec<f64>,
    need: usize,
    max_steps: usize,
    steps_done: &mut usize,
) -> (Vec<Vec<f64>>, RitzSet) {
    let n = problem.n();
    let tol = 64.0 * f64::EPSILON;
    let mut v: Vec<Vec<f64>> = Vec::new();
    let mut alpha: Vec<f64> = Vec::new();
    let mut beta: Vec<f64> = Vec::new();
    let mut w = start;
    {
        let basis: Vec<&[f64]> = locked.iter().map(|x| x.as_slice()).collect();
        let (nrm, _) = b_orthogonalize(problem, &basis, &mut w);
        if nrm > 0.0 {
            w.iter_mut().for_each(|x| *x /= nrm);
        }
    }
    v.push(w);
    let mut ritz: RitzSet;
    let mut bv = vec![0.0; n];
    loop {
        let j = v.len() - 1;
        problem.mul_b(&v[j], &mut bv);
        let mut w = solve_refined(problem, f, &bv);
        let a = dot(&w, &bv);
        alpha.push(a);
        {
            let basis: Vec<&[f64]> = locked
                .iter()
                .map(|x| x.as_slice())
                .chain(v.iter().map(|x| x.as_slice()))
                .collect();
            let (b, _) = b_orthogonalize(problem, &basis, &mut w);
            beta.push(b);
        }
        *steps_done += 1;
        let m = alpha.len();
        let bnext = beta[m - 1];
        let theta_scale = alpha.iter().map(|x| x.abs()).fold(0.0, f64::max);
        let breakdown =
            bnext <= 1e-14 * theta_scale.max(f64::MIN_POSITIVE) || m + locked.len() >= n;
        let check = breakdown || m >= max_steps || (m >= need && m.is_multiple_of(4));
        if check {
            let mut t = DMatrix::zeros(m, m);
            for i in 0..m {
                t[(i, i)] = alpha[i];
                if i + 1 < m {
                    t[(i, i + 1)] = beta[i];
                    t[(i + 1, i)] = beta[i];
                }
            }
            let eig = t.symmetric_eigen();
            let tmax = eig.eigenvalues.iter().map(|x| x.abs()).fold(0.0, f64::max);
            let mut set: RitzSet = (0..m)
                .map(|i| {
                    let th = eig.eigenvalues[i];
                    let est = if breakdown {
                        0.0
                    } else {
                        (bnext * eig.eigenvectors[(m - 1, i)]).abs()
                    };
                    let s: Vec<f64> = eig.eigenvectors.column(i).iter().copied().collect();
                    // strict (relative to the pair's own theta) while steps remain,
                    // relative to the operator norm on the last step
                    let ok = if breakdown || m >= max_steps {
                        est <= tol * tmax
                    } else {
                        est <= tol * th.abs()
                    };
                    (th, ok, s)
                })
                .collect();
            set.sort_by(|x, y| y.0.abs().total_cmp(&x.0.abs()));
            let good = set.iter().take(need).filter(|x| x.1).count();
            ritz = set;
            if breakdown || m >= max_steps || good >= need.min(m) {
                break;
            }
        }
        if bnext > 0.0 {
            w.iter_mut().for_each(|x| *x /= bnext);
        }
        v.push(w);
    }
    v.truncate(alpha.len());
    (v, ritz)
}

/// The inertia counts accepted for the shift of a window `first..first +
/// count`: its middle half, and never a shift below the whole spectrum.
///
/// A count of `first` alone would also accept a shift anywhere below level
/// `first`; for `first = 0` that is anywhere below the whole spectrum, down
/// to the Gershgorin bound, which for a stencil of order 4-8 lies a sizeable
/// fraction of ||A|| below the lowest level. There all 1/(E - sigma) are
/// nearly equal and Lanczos needs hundreds of steps instead of tens.
/// Requiring at least one eigenvalue below the shift puts it above the
/// ground state and next to the wanted levels; the upper count then admits
/// one more level, so that a pair closer than rounding (a tunnel doublet)
/// can be stepped over.
fn shift_window(first: usize, count: usize) -> (usize, usize) {
    let lo = (first + count / 4).max(1);
    let hi = (first + count - count / 4).max(lo + 1);
    (lo, hi)
}

/// Factorises at a shift whose inertia count lies in `acc_lo..=acc_hi`, found
/// by bisection (geometric while the bracket spans a large ratio above `glo`).
fn place_shift(
    ctr: &mut Counter,
    glo: f64,
    ghi: f64,
    acc_lo: usize,
    acc_hi: usize,
) -> Result<ShiftedLdlt, EigenError> {
    let tiny = f64::EPSILON * glo.abs().max(ghi.abs());
    let (mut l, mut u) = (glo, ghi);
    for _ in 0..300 {
        let sl = (l - glo).max(tiny);
        let su = u - glo;
        let s = if su > 8.0 * sl {
            glo + (sl * su).sqrt()
        } else {
            0.5 * (l + u)
        };
        let f = ctr.factor(s)?;
        let c = f.negatives;
        if (c >= acc_lo && c <= acc_hi) || u - l <= 4.0 * f64::EPSILON * l.abs().max(u.abs()) {
            return Ok(f);
        }
        if c < acc_lo {
            l = f.sigma;
        } else {
            u = f.sigma;
        }
    }
    ctr.factor(0.5 * (l + u))
}

/// Index window `first..first+count` of the pencil by shift-invert Lanczos.
pub fn solve_shift_invert(
    problem: &Problem,
    first: usize,
    count: usize,
    max_lanczos: usize,
    max_restarts: usize,
) -> Result<ShiftInvertOutput, EigenError> {
    let n = problem.n();
    let mut ctr = Counter {
        problem,
        factorizations: 0,
    };
    // spectral bounds of the pencil
    let (alo, ahi) = gershgorin(problem.a);
    let (blo, bhi) = match problem.b {
        Some(b) => gershgorin(b),
        None => (1.0, 1.0),
    };
    let anorm = problem.a.norm_one().max(f64::MIN_POSITIVE);
    let (mut glo, mut ghi) = if blo > 0.0 {
        (
            if alo >= 0.0 { alo / bhi } else { alo / blo },
            if ahi >= 0.0 { ahi / blo } else { ahi / bhi },
        )
    } else {
        let bmin = problem.b.map_or(1.0, |b| b.norm_one()) * 1e-8;
        (-anorm / bmin, anorm / bmin)
    };
    let pad = 1e-8 * (glo.abs() + ghi.abs()) + f64::MIN_POSITIVE;
    glo -= pad;
    ghi += pad;
    for _ in 0..60 {
        if ctr.count(glo)? == 0 {
            break;
        }
        glo -= 4.0 * (glo.abs() + 1.0);
    }
    for _ in 0..60 {
        if ctr.count(ghi)? == n {
            break;
        }
        ghi += 4.0 * (ghi.abs() + 1.0);
    }
    let (acc_lo, acc_hi) = shift_window(first, count);
    let mut f = place_shift(&mut ctr, glo, ghi, acc_lo, acc_hi)?;
    let mut c_sigma = f.negatives;
    let mut sigma = f.sigma;
    let mut need_next = count + 4;
    // Lanczos with locking until the window is proven complete
    let mut locked: Vec<Vec<f64>> = Vec::new();
    let mut locked_vals: Vec<f64> = Vec::new();
    let mut steps = 0usize;
    let extra = 4;
    for restart in 0..=max_restarts {
        let need = if restart == 0 {
            count + extra
        } else {
            need_next.max(2)
        };
        let max_steps = if max_lanczos > 0 {
            max_lanczos
        } else {
            (2 * need + 40) << restart.min(6)
        }
        .min(n - locked.len());
        if max_steps == 0 {
            break;
        }
        let (basis, ritz) = lanczos(
            problem,
            &f,
            &locked,
            start_vector(n, restart as u64 + 1),
            need,
            max_steps,
            &mut steps,
        );
        let chosen: Vec<&(f64, bool, Vec<f64>)> = ritz.iter().filter(|x| x.1).collect();
        if !chosen.is_empty() {
            let mut q = DMatrix::zeros(basis.len(), chosen.len());
            for (c, r) in chosen.iter().enumerate() {
                for (i, &s) in r.2.iter().enumerate() {
                    q[(i, c)] = s;
                }
            }
            let xs = combine(&basis, &q);
            for (r, x) in chosen.iter().zip(xs) {
                locked_vals.push(sigma + 1.0 / r.0);
                locked.push(x);
            }
        }
        drop(basis);
        // try to prove the window
        if let Some(out) =
            prove_window(&mut ctr, first, count, c_sigma, sigma, &locked_vals, anorm)?
        {
            let (lo_idx, inertia_below) = out;
            // Rayleigh-Ritz with the exact pencil on all locked vectors removes
            // the rounding contamination along the levels nearest sigma
            // one more application of the operator (k solves with the same
            // factorisation) before the projection damps the remaining error
            // repeated while a window member (e.g. one far from sigma when the
            // window straddles a wide gap) still has a large residual
            let target = 4.0 * n as f64 * f64::EPSILON * anorm;
            for _refine in 0..16 {
                let refined: Vec<Vec<f64>> = locked
                    .par_iter()
                    .map(|x| {
                        let mut bx = vec![0.0; n];
                        problem.mul_b(x, &mut bx);
                        let mut y = solve_refined(problem, &f, &bx);
                        // unit scale: Op multiplies by theta, which spans many decades
                        let nrm = dot(&y, &y).sqrt();
                        if nrm > 0.0 && nrm.is_finite() {
                            y.iter_mut().for_each(|v| *v /= nrm);
                        }
                        y
                    })
                    .collect();
                match rayleigh_ritz(problem, &refined) {
                    Ok((vals, vecs)) => {
                        locked_vals = vals;
                        locked = vecs;
                    }
                    Err(_) => break,
                }
                let worst = (lo_idx..lo_idx + count)
                    .into_par_iter()
                    .map(|i| residual_norm1(problem, locked_vals[i], &locked[i]))
                    .collect::<Vec<f64>>()
                    .into_iter()
                    .fold(0.0, f64::max);
                if worst <= target {
                    break;
                }
            }
            let mut order: Vec<usize> = (0..locked_vals.len()).collect();
            order.sort_by(|&a, &b| locked_vals[a].total_cmp(&locked_vals[b]));
            let sel = &order[lo_idx..lo_idx + count];
            let values: Vec<f64> = sel.iter().map(|&i| locked_vals[i]).collect();
            let vectors: Vec<Vec<f64>> = sel
                .iter()
                .map(|&i| {
                    let mut v = locked[i].clone();
                    fix_sign(&mut v);
                    v
                })
                .collect();
            return Ok(ShiftInvertOutput {
                values,
                vectors,
                iterations: steps,
                factorizations: ctr.factorizations + 1,
                inertia_below,
            });
        }
        // not proven: if the converged levels miss one end of the window,
        // move sigma into the missing part (spectrum slicing)
        let mut sv = locked_vals.clone();
        sv.sort_by(|a, b| a.total_cmp(b));
        let nb = sv.iter().filter(|&&v| v < sigma).count();
        need_next = extra;
        if c_sigma >= nb {
            let base = c_sigma - nb;
            let top = base + sv.len();
            let missing = if first < base {
                Some((first, base.min(first + count)))
            } else if first + count > top {
                Some((top.max(first), first + count))
            } else {
                None
            };
            if let Some((mlo, mhi)) = missing {
                let w = mhi - mlo;
                let (acc_lo, acc_hi) = shift_window(mlo, w);
                f = place_shift(&mut ctr, glo, ghi, acc_lo, acc_hi)?;
                c_sigma = f.negatives;
                sigma = f.sigma;
                need_next = w + extra;
            }
        }
    }
    Err(EigenError::NoConvergence {
        level: first + 1,
        iterations: steps,
        residual: f64::NAN,
    })
}

/// Checks with inertia counts that the locked values contain the whole
/// window. Returns (position of level `first` in the sorted locked values,
/// count at the upper check point) or None when levels are missing.
fn prove_window(
    ctr: &mut Counter,
    first: usize,
    count: usize,
    c_sigma: usize,
    sigma: f64,
    vals: &[f64],
    anorm: f64,
) -> Result<Option<(usize, usize)>, EigenError> {
    let mut s: Vec<f64> = vals.to_vec();
    s.sort_by(|a, b| a.total_cmp(b));
    let len = s.len();
    if len < count || count == 0 {
        return Ok(if count == 0 { Some((0, first)) } else { None });
    }
    let nb = s.iter().filter(|&&v| v < sigma).count();
    if c_sigma < nb {
        return Ok(None);
    }
    let base = c_sigma - nb; // tentative index of s[0]
    if first < base || first + count > base + len {
        return Ok(None);
    }
    let i0 = first - base;
    let i1 = i0 + count; // exclusive
    let deg = 1e3 * f64::EPSILON * anorm;
    let min_gap = s
        .windows(2)
        .map(|w| w[1] - w[0])
        .filter(|&g| g > deg)
        .fold(f64::INFINITY, f64::min);
    let delta = if min_gap.is_finite() {
        0.25 * min_gap
    } else {
        64.0 * deg
    };
    // lower check point: move down past any cluster straddling the boundary
    let mut a_i = i0;
    while a_i > 0 && s[a_i] - s[a_i - 1] <= deg {
        a_i -= 1;
    }
    let a = if a_i == 0 {
        s[0] - delta
    } else {
        0.5 * (s[a_i - 1] + s[a_i])
    };
    let mut b_i = i1; // first index above the window
    while b_i < len && b_i > 0 && s[b_i] - s[b_i - 1] <= deg {
        b_i += 1;
    }
    let b = if b_i >= len {
        s[len - 1] + delta
    } else {
        0.5 * (s[b_i - 1] + s[b_i])
    };
    let ca = ctr.count(a)?;
    let cb = ctr.count(b)?;
    if ca == base + a_i && cb == base + b_i {
        Ok(Some((i0, cb)))
    } else {
        Ok(None)
    }
}
