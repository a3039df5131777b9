//! Banded LDL^T factorisation of M = A - sigma B without pivoting, with the
//! inertia of M (Sylvester's law: the number of negative pivots of D equals
//! the number of eigenvalues of the pencil (A, B) below sigma when B is
//! positive definite; Parlett, *The Symmetric Eigenvalue Problem*, 1998,
//! sec. 3.3 and 15.2).
//!
//! Banded recurrence (Golub & Van Loan, *Matrix Computations*, 4th ed.,
//! sec. 4.3.5), for i = 0..m with `L[i][k]` = 0 for |i - k| > p:
//!
//! ```text
//! L[i][k] = (M[i][k] - sum_{s<k} L[i][s] D_s L[k][s]) / D_k,
//! D_i = M[i][i] - sum_{k<i} L[i][k]^2 D_k.
//! ```
//!
//! Periodic (wrap) matrices: the last p indices form a border. With
//! m = n - p, `M = [[M11, M12], [M12^T, M22]]` where M11 is banded and M12 holds
//! the corner couplings; M11 = L D L^T, S = M22 - M12^T M11^-1 M12 (p x p), and
//! inertia(M) = inertia(D) + inertia(S) (Haynsworth inertia additivity,
//! Linear Algebra Appl. 1 (1968) 73-81). Solves use the block elimination.
//!
//! Pivot guard: a pivot (or an eigenvalue of S) with magnitude below
//! `64 eps ||M||_1` makes the factorisation fail; [`factor_guarded`] then
//! perturbs sigma by a growing multiple of `eps ||A||_1` and refactors.

use nalgebra::DMatrix;

use super::error::EigenError;
use super::matrix::Problem;

/// Corner part of a periodic factorisation.
#[derive(Debug, Clone)]
struct Border {
    /// Columns of M12 as (row, value) lists.
    m12: Vec<Vec<(usize, f64)>>,
    /// W = M11^-1 M12, p columns of length m.
    w: Vec<Vec<f64>>,
    /// S^-1.
    s_inv: DMatrix<f64>,
}

/// LDL^T factorisation of A - sigma B.
#[derive(Debug, Clone)]
pub struct ShiftedLdlt {
    n: usize,
    m: usize,
    p: usize,
    /// The shift actually factored (may differ from the requested one by the guard).
    pub sigma: f64,
    d: Vec<f64>,
    /// Row-wise strict lower band: l[i * p + (dd - 1)] = L[i][i - dd].
    l: Vec<f64>,
    border: Option<Border>,
    /// Number of negative eigenvalues of A - sigma B (eigenvalues below sigma).
    pub negatives: usize,
}

/// Entry (i, j) of M = A - sigma B.
fn m_entry(problem: &Problem, sigma: f64, i: usize, j: usize) -> f64 {
    let b = match problem.b {
        Some(b) => b.get(i, j),
        None => f64::from(u8::from(i == j)),
    };
    problem.a.get(i, j) - sigma * b
}

/// Factorises A - sigma B. `Ok(None)` means a pivot below the guard threshold.
pub fn factor(problem: &Problem, sigma: f64) -> Result<Option<ShiftedLdlt>, EigenError> {
    let a = problem.a;
    let n = a.n;
    let p = a.half_bandwidth();
    let m = if a.wrap { n - p } else { n };
    let bnorm = problem.b.map_or(1.0, |b| b.norm_one());
    let mnorm = a.norm_one() + sigma.abs() * bnorm;
    let tiny = 64.0 * f64::EPSILON * mnorm.max(f64::MIN_POSITIVE);
    let band = |dd: usize, i: usize| -> f64 {
        // M[i][i + dd] for i + dd < m
        let av = a.bands[dd][i];
        let bv = match problem.b {
            Some(b) => {
                if dd < b.bands.len() {
                    b.bands[dd][i]
                } else {
                    0.0
                }
            }
            None => f64::from(u8::from(dd == 0)),
        };
        av - sigma * bv
    };
    let mut d = vec![0.0; m];
    let mut l = vec![0.0; m * p.max(1)];
    let mut negatives = 0usize;
    let mut w = vec![0.0; p + 1];
    for i in 0..m {
        let k0 = i.saturating_sub(p);
        // w[s - k0] = L[i][s] * D[s]
        for k in k0..i {
            let mut v = band(i - k, k);
            for s in k0.max(k.saturating_sub(p))..k {
                v -= w[s - k0] * l[k * p + (k - s - 1)];
            }
            let lik = v / d[k];
            l[i * p + (i - k - 1)] = lik;
            w[k - k0] = lik * d[k];
        }
        let mut di = band(0, i);
        for k in k0..i {
            di -= w[k - k0] * l[i * p + (i - k - 1)];
        }
        if di.abs() <= tiny || !di.is_finite() {
            return Ok(None);
        }
        negatives += usize::from(di < 0.0);
        d[i] = di;
    }
    let mut f = ShiftedLdlt {
        n,
        m,
        p,
        sigma,
        d,
        l,
        border: None,
        negatives,
    };
    if a.wrap {
        let mut m12 = Vec::with_capacity(p);
        let mut w = Vec::with_capacity(p);
        for c in 0..p {
            let col = m + c;
            let mut entries = Vec::new();
            for r in (0..p).chain(m.saturating_sub(p)..m) {
                let v = m_entry(problem, sigma, r, col);
                if v != 0.0 && !entries.iter().any(|&(rr, _)| rr == r) {
                    entries.push((r, v));
                }
            }
            let mut rhs = vec![0.0; m];
            for &(r, v) in &entries {
                rhs[r] = v;
            }
            f.solve_interior(&mut rhs);
            m12.push(entries);
            w.push(rhs);
        }
        let mut s = DMatrix::zeros(p, p);
        for i in 0..p {
            for j in 0..p {
                let corr: f64 = m12[i].iter().map(|&(r, v)| v * w[j][r]).sum();
                s[(i, j)] = m_entry(problem, sigma, m + i, m + j) - corr;
            }
        }
        let s = (&s + s.transpose()) * 0.5;
        let eig = s.clone().symmetric_eigen();
        if eig.eigenvalues.iter().any(|v| v.abs() <= tiny) {
            return Ok(None);
        }
        f.negatives += eig.eigenvalues.iter().filter(|&&v| v < 0.0).count();
        let s_inv = s.try_inverse().ok_or(EigenError::NotPositiveDefinite)?;
        f.border = Some(Border { m12, w, s_inv });
    }
    Ok(Some(f))
}

/// Factorises A - sigma' B for sigma' = sigma, then sigma perturbed by
/// +-64 eps ||A||_1 * 16^t (t = 0..8) until no pivot is tiny.
pub fn factor_guarded(problem: &Problem, sigma: f64) -> Result<ShiftedLdlt, EigenError> {
    let scale = 64.0 * f64::EPSILON * problem.a.norm_one().max(f64::MIN_POSITIVE);
    let mut delta = scale;
    let mut s = sigma;
    for t in 0..10 {
        if let Some(f) = factor(problem, s)? {
            return Ok(f);
        }
        let sign = if t % 2 == 0 { 1.0 } else { -1.0 };
        s = sigma + sign * delta;
        delta *= 16.0;
    }
    Err(EigenError::NoConvergence {
        level: 0,
        iterations: 10,
        residual: f64::NAN,
    })
}

impl ShiftedLdlt {
    /// Overwrites x (len m) by M11^-1 x.
    fn solve_interior(&self, x: &mut [f64]) {
        let p = self.p;
        let m = self.m;
        for i in 1..m {
            let k0 = i.saturating_sub(p);
            let row = &self.l[i * p..i * p + p];
            let (done, rest) = x.split_at_mut(i);
            let mut v = rest[0];
            for (lv, xk) in row.iter().zip(done[k0..].iter().rev()) {
                v -= lv * xk;
            }
            rest[0] = v;
        }
        for (xi, di) in x.iter_mut().zip(&self.d) {
            *xi /= di;
        }
        for i in (0..m).rev() {
            let mut v = x[i];
            for dd in 1..=p {
                let r = i + dd;
                if r >= m {
                    break;
                }
                v -= self.l[r * p + (dd - 1)] * x[r];
            }
            x[i] = v;
        }
    }

    /// Overwrites x (len n) by (A - sigma B)^-1 x.
    pub fn solve(&self, x: &mut [f64]) {
        let m = self.m;
        match &self.border {
            None => self.solve_interior(&mut x[..self.n]),
            Some(bd) => {
                let (x1, x2) = x[..self.n].split_at_mut(m);
                self.solve_interior(x1);
                let p = self.p;
                let r: Vec<f64> = bd
                    .m12
                    .iter()
                    .zip(x2.iter())
                    .map(|(col, &x2c)| x2c - col.iter().map(|&(row, v)| v * x1[row]).sum::<f64>())
                    .collect();
                for (c, x2c) in x2.iter_mut().enumerate().take(p) {
                    *x2c = r
                        .iter()
                        .enumerate()
                        .map(|(j, rj)| bd.s_inv[(c, j)] * rj)
                        .sum();
                }
                for (c, wc) in bd.w.iter().enumerate() {
                    let s = x2[c];
                    for (xi, wi) in x1.iter_mut().zip(wc) {
                        *xi -= wi * s;
                    }
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::eigen::matrix::SymBanded;

    fn check(a: &SymBanded, b: Option<&SymBanded>, sigma: f64) {
        let pr = Problem { a, b };
        let f = factor_guarded(&pr, sigma).unwrap();
        let (vals, _) = crate::eigen::dense::dense_eigen(&pr).unwrap();
        let want = vals.iter().filter(|&&v| v < f.sigma).count();
        assert_eq!(f.negatives, want);
        // solve check: (A - sigma B) x = r
        let n = a.n;
        let r: Vec<f64> = (0..n).map(|i| ((i * 7 + 3) % 11) as f64 - 5.0).collect();
        let mut x = r.clone();
        f.solve(&mut x);
        let mut ax = vec![0.0; n];
        let mut bx = vec![0.0; n];
        a.mul_vec(&x, &mut ax);
        pr.mul_b(&x, &mut bx);
        let xn: f64 = x.iter().map(|v| v.abs()).sum();
        for i in 0..n {
            let back = ax[i] - f.sigma * bx[i];
            assert!(
                (back - r[i]).abs() <= 1e-13 * (1.0 + xn),
                "row {i}: {back} vs {}",
                r[i]
            );
        }
    }

    #[test]
    fn inertia_and_solve_match_dense() {
        let n = 25;
        let v: Vec<f64> = (0..n).map(|i| (i as f64 * 0.37).sin()).collect();
        let plain = SymBanded {
            n,
            bands: vec![
                v.iter().map(|x| 2.5 + x).collect(),
                vec![-1.33; n - 1],
                vec![0.083; n - 2],
            ],
            wrap: false,
        };
        let ring = SymBanded {
            n,
            bands: vec![
                v.iter().map(|x| 2.5 + x).collect(),
                vec![-1.33; n],
                vec![0.083; n],
            ],
            wrap: true,
        };
        let bmat = SymBanded {
            n,
            bands: vec![vec![10.0 / 12.0; n], vec![1.0 / 12.0; n - 1]],
            wrap: false,
        };
        let bring = SymBanded {
            n,
            bands: vec![vec![10.0 / 12.0; n], vec![1.0 / 12.0; n]],
            wrap: true,
        };
        for sigma in [-1.0, 0.3, 1.7, 2.9, 4.4, 9.0] {
            check(&plain, None, sigma);
            check(&ring, None, sigma);
            check(&plain, Some(&bmat), sigma);
            check(&ring, Some(&bring), sigma);
        }
    }
}
