//! Selected eigenpairs of a symmetric tridiagonal matrix T (order-2
//! finite differences: p = 1, B = I, no wrap) in O(N k) work.
//!
//! 1. **Isolation** by Sturm bisection ([`super::sturm`]), run only until every
//!    wanted level j sits alone in a bracket [l_j, u_j) with count(l_j) = j and
//!    count(u_j) = j + 1. All open brackets are bisected together, several
//!    shifts per sweep. While a bracket spans a large ratio above the
//!    Gershgorin lower bound g, its split point is the geometric mean
//!    g + sqrt((l - g)(u - g)), so the ~40 binary orders between ||T|| and the
//!    tiny low-lying gaps are crossed in a handful of rounds.
//! 2. **Rayleigh-quotient iteration with twisted factorisations**: for a shift
//!    sigma, T - sigma I = L+ D+ L+^T = U- D- U-^T; the twist index r minimising
//!    |gamma_r|, gamma_r = D+_r + D-_r - (d_r - sigma), gives the vector
//!    z_r = 1, z_i = -l+_i z_{i+1} (i < r), z_{i} = -u-_i z_{i-1} (i > r), one
//!    inverse-iteration step from the best unit vector (Parlett & Dhillon,
//!    Linear Algebra Appl. 267 (1997) 247-279; Dhillon & Parlett, Linear
//!    Algebra Appl. 387 (2004) 1-28). The negatives of D+ are the Sturm count
//!    at sigma, which tightens the bracket; a Rayleigh quotient outside the
//!    bracket is replaced by the bracket midpoint (safeguard). Levels are
//!    independent and run in parallel.
//! 3. **Rayleigh-Ritz** on the k vectors (Cholesky of the Gram matrix, O(N k^2)
//!    once) restores the orthogonality that inverse iteration loses when
//!    gaps are tiny relative to ||T|| (error ~ eps ||T|| / gap); the Ritz
//!    values must fall in their brackets (checked), which proves with the
//!    Sturm counts that no level is skipped or duplicated.

use rayon::prelude::*;

use super::dense::fix_sign;
use super::error::EigenError;
use super::matrix::{Problem, SymBanded};
use super::sturm::{sturm_counts, SturmData};
use super::subspace::{dot, rayleigh_ritz_in_place};

/// Result of the tridiagonal path.
pub type TridiagonalOutput = super::params::PathOutput;

/// One converged level: vector (empty when only values are wanted), its
/// Rayleigh quotient, iterations, final bracket.
type LevelResult = (Vec<f64>, f64, usize, f64, f64);

struct Brackets {
    /// (shift, count) pairs, sorted by shift.
    points: Vec<(f64, usize)>,
}

impl Brackets {
    fn bracket(&self, j: usize) -> ((f64, usize), (f64, usize)) {
        let mut lo = self.points[0];
        let mut hi = self.points[self.points.len() - 1];
        for &pt in &self.points {
            if pt.1 <= j && pt.0 >= lo.0 {
                lo = pt;
            }
        }
        for &pt in self.points.iter().rev() {
            if pt.1 > j && pt.0 <= hi.0 {
                hi = pt;
            }
        }
        (lo, hi)
    }
    fn insert(&mut self, s: f64, c: usize) {
        let pos = self.points.partition_point(|p| p.0 < s);
        if pos < self.points.len() && self.points[pos].0 == s {
            return;
        }
        self.points.insert(pos, (s, c));
    }
}

/// Work arrays of one level's iteration.
/// Joint bisection rounds after isolation (each halves every bracket).
const EXTRA_ROUNDS: usize = 8;

struct Scratch {
    dp: Vec<f64>,
    dm: Vec<f64>,
    z: Vec<f64>,
}

/// One twisted-factorisation step at shift `sigma`: returns the Sturm count
/// at sigma, the Rayleigh quotient and the residual 2-norm of the vector
/// left (not normalised) in `w.z`.
fn twisted_step(
    t: &SymBanded,
    e2: &[f64],
    pivmin: f64,
    sigma: f64,
    w: &mut Scratch,
) -> (usize, f64, f64) {
    let d = &t.bands[0];
    let e = &t.bands[1];
    let n = d.len();
    let (dp, dm, z) = (&mut w.dp, &mut w.dm, &mut w.z);
    let guard = |v: f64| if v.abs() <= pivmin { -pivmin } else { v };
    // forward (stationary) and backward (progressive) factorisations, interleaved
    dp[0] = guard(d[0] - sigma);
    dm[n - 1] = guard(d[n - 1] - sigma);
    let mut count = usize::from(dp[0] < 0.0);
    for i in 1..n {
        let ib = n - 1 - i;
        let a = guard((d[i] - sigma) - e2[i - 1] / dp[i - 1]);
        dp[i] = a;
        count += usize::from(a < 0.0);
        dm[ib] = guard((d[ib] - sigma) - e2[ib] / dm[ib + 1]);
    }
    let mut r = 0;
    let mut gamma = f64::INFINITY;
    for (i, ((&a, &b), &di)) in dp.iter().zip(dm.iter()).zip(d).enumerate() {
        let g = a + b - (di - sigma);
        if g.abs() < gamma.abs() {
            gamma = g;
            r = i;
        }
    }
    const BIG: f64 = 1e150;
    let mut scale = 1.0;
    z[r] = 1.0;
    let mut nrm2 = 1.0;
    for i in (0..r).rev() {
        let v = -(e[i] / dp[i]) * z[i + 1];
        if v.is_finite() {
            z[i] = v;
        } else if v.is_nan() {
            z[i] = 0.0;
        } else {
            // the entry dominates everything computed so far
            z[i + 1..=r].iter_mut().for_each(|x| *x = 0.0);
            z[i] = 1.0;
            nrm2 = 0.0;
            scale = 0.0;
        }
        if z[i].abs() > BIG {
            z[i..=r].iter_mut().for_each(|x| *x /= BIG);
            nrm2 /= BIG * BIG;
            scale /= BIG;
        }
        nrm2 += z[i] * z[i];
    }
    for i in r + 1..n {
        let v = -(e[i - 1] / dm[i]) * z[i - 1];
        if v.is_finite() {
            z[i] = v;
        } else if v.is_nan() {
            z[i] = 0.0;
        } else {
            z[..i].iter_mut().for_each(|x| *x = 0.0);
            z[i] = 1.0;
            nrm2 = 0.0;
            scale = 0.0;
        }
        if z[i].abs() > BIG {
            z[..=i].iter_mut().for_each(|x| *x /= BIG);
            nrm2 /= BIG * BIG;
            scale /= BIG;
        }
        nrm2 += z[i] * z[i];
    }
    if !(nrm2.is_finite() && nrm2 > 0.0) {
        return (count, f64::NAN, f64::INFINITY);
    }
    let nrm = nrm2.sqrt();
    if scale == 1.0 {
        // (T - sigma I) z = gamma_r e_r with z_r = 1 (Parlett & Dhillon 1997):
        // rho = sigma + gamma_r / ||z||^2, ||T zhat - rho zhat|| = |gamma_r| / ||z|| sqrt(1 - 1/||z||^2)
        let rho = sigma + gamma / nrm2;
        let res = gamma.abs() / nrm * (1.0 - 1.0 / nrm2).max(0.0).sqrt();
        (count, rho, res)
    } else {
        // rescaled or reset: fall back to an explicit Rayleigh quotient
        let inv = 1.0 / nrm;
        z.iter_mut().for_each(|x| *x *= inv);
        t.mul_vec(z, dp);
        let rho = dot(z, dp);
        let mut s = 0.0;
        for (a, b) in dp.iter().zip(z.iter()) {
            let q = a - rho * b;
            s += q * q;
        }
        z.iter_mut().for_each(|x| *x *= nrm);
        (count, rho, s.sqrt())
    }
}

/// Unit copy of `z`.
fn unit(z: &[f64]) -> Vec<f64> {
    let inv = 1.0 / dot(z, z).sqrt();
    z.iter().map(|x| x * inv).collect()
}

/// Levels `first..first+count` of the tridiagonal matrix `t` (p = 1, no
/// wrap). With `vectors` false only the values come back (`vectors` empty):
/// each level's Rayleigh quotient, no vector kept and no Rayleigh-Ritz, in
/// O(N) memory per thread instead of O(N k).
pub fn solve_tridiagonal(
    t: &SymBanded,
    first: usize,
    count: usize,
    residual_tol: f64,
    max_iterations: usize,
    vectors: bool,
) -> Result<TridiagonalOutput, EigenError> {
    let want_vectors = vectors;
    let n = t.n;
    let d = &t.bands[0];
    let e: &[f64] = if t.bands.len() > 1 { &t.bands[1] } else { &[] };
    let data = SturmData::new(d, e);
    let mut factorizations = 0usize;
    // Gershgorin bounds
    let mut glo = f64::INFINITY;
    let mut ghi = f64::NEG_INFINITY;
    for i in 0..n {
        let off =
            if i > 0 { e[i - 1].abs() } else { 0.0 } + if i + 1 < n { e[i].abs() } else { 0.0 };
        glo = glo.min(d[i] - off);
        ghi = ghi.max(d[i] + off);
    }
    let tnorm = t
        .norm_one()
        .max(glo.abs())
        .max(ghi.abs())
        .max(f64::MIN_POSITIVE);
    let pad = 2.0 * f64::EPSILON * tnorm * n as f64 + 2.0 * data.pivmin;
    glo -= pad;
    ghi += pad;
    let tiny = f64::EPSILON * tnorm;
    let mut br = Brackets {
        points: vec![(glo, 0), (ghi, n)],
    };
    let wanted: Vec<usize> = (first..first + count).collect();
    let split = |l: f64, u: f64| -> f64 {
        let sl = (l - glo).max(tiny);
        let su = u - glo;
        if su > 8.0 * sl {
            glo + (sl * su).sqrt()
        } else {
            0.5 * (l + u)
        }
    };
    // phase 1: isolation
    for _round in 0..200 {
        let mut shifts: Vec<f64> = Vec::new();
        for &j in &wanted {
            let ((l, cl), (u, cu)) = br.bracket(j);
            if cl == j && cu == j + 1 {
                continue;
            }
            let width_floor = 4.0 * f64::EPSILON * l.abs().max(u.abs()) + data.pivmin;
            if u - l <= width_floor {
                continue;
            }
            let s = split(l, u);
            if shifts.last() != Some(&s) {
                shifts.push(s);
            }
        }
        if shifts.is_empty() {
            break;
        }
        let counts = sturm_counts(&data, &shifts);
        factorizations += shifts.len().div_ceil(8);
        for (s, c) in shifts.into_iter().zip(counts) {
            br.insert(s, c);
        }
    }
    // a few extra joint rounds so that each bracket is narrow compared with its neighbours
    for _round in 0..EXTRA_ROUNDS {
        let shifts: Vec<f64> = wanted
            .iter()
            .map(|&j| {
                let ((l, _), (u, _)) = br.bracket(j);
                split(l, u)
            })
            .collect();
        let counts = sturm_counts(&data, &shifts);
        factorizations += shifts.len().div_ceil(8);
        for (s, c) in shifts.into_iter().zip(counts) {
            br.insert(s, c);
        }
    }
    let brackets: Vec<(f64, f64, bool)> = wanted
        .iter()
        .map(|&j| {
            let ((l, cl), (u, cu)) = br.bracket(j);
            (l, u, cl == j && cu == j + 1)
        })
        .collect();
    // phase 2: Rayleigh-quotient iteration per level
    let target = residual_tol * f64::EPSILON * tnorm;
    let accept = 0.5 * (n as f64) * f64::EPSILON * tnorm;
    let per_level: Vec<Result<LevelResult, EigenError>> = wanted
        .par_iter()
        .zip(&brackets)
        .map(|(&j, &(l0, u0, _))| {
            let (mut l, mut u) = (l0, u0);
            let mut w = Scratch {
                dp: vec![0.0; n],
                dm: vec![0.0; n],
                z: vec![0.0; n],
            };
            let keep = |z: &[f64]| if want_vectors { unit(z) } else { Vec::new() };
            let mut best: Option<(Vec<f64>, f64)> = None;
            let mut best_res = f64::INFINITY;
            let mut sigma = 0.5 * (l + u);
            let mut prev_res = f64::INFINITY;
            for it in 1..=max_iterations {
                let (c, rho, res) = twisted_step(t, &data.e2, data.pivmin, sigma, &mut w);
                if c <= j {
                    l = l.max(sigma);
                } else {
                    u = u.min(sigma);
                }
                let slack = res + 4.0 * f64::EPSILON * tnorm;
                let inside = rho >= l - slack && rho <= u + slack;
                if inside && res < best_res {
                    best_res = res;
                    best = Some((keep(&w.z), rho));
                }
                if inside && (res <= target || (res > 0.5 * prev_res && res <= accept)) {
                    let (v, r) = best.take().unwrap_or_else(|| (keep(&w.z), rho));
                    return Ok((v, r, it, l, u));
                }
                if inside {
                    prev_res = res;
                    sigma = rho.clamp(l, u);
                } else {
                    prev_res = f64::INFINITY;
                    sigma = 0.5 * (l + u);
                }
            }
            match best {
                Some((v, r)) if best_res <= accept => Ok((v, r, max_iterations, l, u)),
                _ => Err(EigenError::NoConvergence {
                    level: j + 1,
                    iterations: max_iterations,
                    residual: best_res,
                }),
            }
        })
        .collect();
    let mut vectors = Vec::with_capacity(count);
    let mut quotients = Vec::with_capacity(count);
    let mut iterations = 0;
    let mut final_brackets = Vec::with_capacity(count);
    for r in per_level {
        let (v, rho, it, l, u) = r?;
        iterations += it;
        factorizations += it;
        vectors.push(v);
        quotients.push(rho);
        final_brackets.push((l, u));
    }
    // phase 3: Rayleigh-Ritz
    let problem = Problem { a: t, b: None };
    let (values, mut vectors) = if !want_vectors {
        (quotients, Vec::new())
    } else if count > 1 {
        rayleigh_ritz_in_place(&problem, vectors)?
    } else {
        let v = vectors.pop().map(|v| vec![v]).unwrap_or_default();
        let vals = v
            .iter()
            .map(|z| {
                let mut tz = vec![0.0; n];
                t.mul_vec(z, &mut tz);
                dot(z, &tz)
            })
            .collect();
        (vals, v)
    };
    for v in vectors.iter_mut() {
        fix_sign(v);
    }
    let slack = 16.0 * f64::EPSILON * tnorm + accept;
    for (j, (&v, &(l, u))) in values.iter().zip(&final_brackets).enumerate() {
        if v < l - slack || v > u + slack {
            return Err(EigenError::NoConvergence {
                level: first + j + 1,
                iterations,
                residual: (v - 0.5 * (l + u)).abs(),
            });
        }
    }
    let inertia_below = match final_brackets.last() {
        Some(&(_, u)) => {
            factorizations += 1;
            data.count(u)
        }
        None => first,
    };
    Ok(TridiagonalOutput {
        values,
        vectors,
        iterations,
        factorizations,
        inertia_below,
    })
}
