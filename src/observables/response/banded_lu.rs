//! Banded LU factorisation with partial pivoting (row interchanges) for the
//! shifted, nearly singular systems of the response equations.
//!
//! The algorithm is LAPACK's `dgbtrf`/`dgbtrs` in its plainest form (Golub &
//! Van Loan, *Matrix Computations*, 4th ed., sec. 4.3.5, "band Gaussian
//! elimination with partial pivoting"): for a matrix of lower and upper
//! half-bandwidth `p`, row `k` of `U` reaches at most `2p` columns right of
//! the diagonal, and at step `k` only the rows `k..=k + p` can hold a
//! non-zero in column `k`. Those `p + 1` rows, restricted to the columns
//! `k..=k + 2p`, form a small sliding window; the pivot is chosen in it, the
//! pivot row becomes row `k` of `U`, and the others are reduced.
//!
//! Unlike the LDL^T factorisation of the eigen-solver, this one pivots, so a
//! small pivot in the middle of the band (a state localised near one end of
//! the domain is nearly an eigenvector of a leading block) does no harm.
//! A pivot whose magnitude falls below `tiny` is replaced by `tiny` (with
//! its sign), as LAPACK's inverse iteration `dstein` does, and counted.

/// The factors `P A = L U` of a band matrix.
#[derive(Debug, Clone)]
pub struct BandedLu {
    n: usize,
    p: usize,
    /// Row `k` of `U`: `u[k * (2p + 1) + j] = U[k][k + j]`, `j = 0..=2p`.
    u: Vec<f64>,
    /// Multipliers of step `k`: `l[k * p + s - 1]` for window slot `s`.
    l: Vec<f64>,
    /// Window slot of the pivot chosen at step `k`.
    piv: Vec<usize>,
    /// Pivots replaced by `tiny`.
    pub guarded: usize,
}

impl BandedLu {
    /// Factors the `n x n` matrix whose entry `(i, j)` is `entry(i, j)`;
    /// only entries with `|i - j| <= p` are read. Pivots below `tiny` in
    /// magnitude are replaced by `tiny` with their sign.
    pub fn factor(n: usize, p: usize, entry: impl Fn(usize, usize) -> f64, tiny: f64) -> Self {
        let w = 2 * p + 1;
        let mut buf = vec![0.0; (p + 1) * w];
        let mut u = vec![0.0; n * w];
        let mut l = vec![0.0; n * p];
        let mut piv = vec![0; n];
        let mut guarded = 0;
        // Slot s holds the row `top + s` restricted to columns top..=top+2p.
        let load = |buf: &mut [f64], slot: usize, top: usize| {
            let r = top + slot;
            for j in 0..w {
                let c = top + j;
                buf[slot * w + j] = if r < n && c < n && c.abs_diff(r) <= p {
                    entry(r, c)
                } else {
                    0.0
                };
            }
        };
        for s in 0..=p {
            load(&mut buf, s, 0);
        }
        for k in 0..n {
            let rows = (p + 1).min(n - k);
            // The first largest, as LAPACK's idamax picks.
            let mut best = 0;
            for s in 1..rows {
                if buf[s * w].abs() > buf[best * w].abs() {
                    best = s;
                }
            }
            piv[k] = best;
            if best != 0 {
                for j in 0..w {
                    buf.swap(j, best * w + j);
                }
            }
            if buf[0].abs() <= tiny || buf[0].is_nan() {
                buf[0] = if buf[0] < 0.0 { -tiny } else { tiny };
                guarded += 1;
            }
            u[k * w..(k + 1) * w].copy_from_slice(&buf[..w]);
            let d = buf[0];
            for s in 1..rows {
                let f = buf[s * w] / d;
                l[k * p + s - 1] = f;
                for j in 1..w {
                    buf[s * w + j] -= f * u[k * w + j];
                }
            }
            // Slide the window one column right and one row down.
            for s in 1..=p {
                for j in 0..w - 1 {
                    buf[(s - 1) * w + j] = buf[s * w + j + 1];
                }
                buf[(s - 1) * w + w - 1] = 0.0;
            }
            load(&mut buf, p, k + 1);
        }
        Self {
            n,
            p,
            u,
            l,
            piv,
            guarded,
        }
    }

    /// Overwrites `b` (length `n`) by `A^-1 b`.
    pub fn solve(&self, b: &mut [f64]) {
        let (n, p) = (self.n, self.p);
        let w = 2 * p + 1;
        let mut window: Vec<f64> = (0..=p).map(|s| if s < n { b[s] } else { 0.0 }).collect();
        let mut y = vec![0.0; n];
        for k in 0..n {
            window.swap(0, self.piv[k]);
            y[k] = window[0];
            let rows = (p + 1).min(n - k);
            let yk = y[k];
            for (ws, l) in window[1..rows].iter_mut().zip(&self.l[k * p..]) {
                *ws -= l * yk;
            }
            window.rotate_left(1);
            window[p] = if k + 1 + p < n { b[k + 1 + p] } else { 0.0 };
        }
        for k in (0..n).rev() {
            let row = &self.u[k * w..(k + 1) * w];
            let mut v = y[k];
            for (j, uj) in row.iter().enumerate().skip(1) {
                if k + j >= n {
                    break;
                }
                v -= uj * b[k + j];
            }
            b[k] = v / row[0];
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::{DMatrix, DVector};

    fn band(n: usize, p: usize, f: impl Fn(usize, usize) -> f64) -> DMatrix<f64> {
        DMatrix::from_fn(n, n, |i, j| if i.abs_diff(j) <= p { f(i, j) } else { 0.0 })
    }

    fn check(a: &DMatrix<f64>, p: usize) {
        let n = a.nrows();
        let lu = BandedLu::factor(n, p, |i, j| a[(i, j)], 0.0);
        assert_eq!(lu.guarded, 0);
        let b = DVector::from_fn(n, |i, _| ((i * 7 + 3) % 11) as f64 - 5.0);
        let mut x = b.as_slice().to_vec();
        lu.solve(&mut x);
        // Reference: nalgebra's dense LU with partial pivoting.
        let want = a.clone().lu().solve(&b).unwrap();
        let scale = want.amax().max(1.0);
        for (i, (got, want)) in x.iter().zip(want.iter()).enumerate() {
            assert!((got - want).abs() < 1e-11 * scale, "{i}: {got} vs {want}");
        }
    }

    #[test]
    fn matches_a_dense_solve_where_pivoting_is_needed() {
        for p in 1..=4 {
            for n in [1, 2, p + 1, 3 * p + 2, 40] {
                // Zero diagonal: elimination without row interchanges fails.
                let a = band(n, p, |i, j| {
                    if i == j {
                        0.0
                    } else {
                        ((i * 3 + j * 5) % 7) as f64 - 2.5
                    }
                });
                if a.clone().lu().solve(&DVector::zeros(n)).is_some()
                    && a.determinant().abs() > 1e-6
                {
                    check(&a, p);
                }
                let s = band(n, p, |i, j| {
                    if i == j {
                        (i as f64 * 0.9).sin()
                    } else {
                        1.0 / (1.0 + (i + j) as f64)
                    }
                });
                if s.determinant().abs() > 1e-8 {
                    check(&s, p);
                }
            }
        }
    }

    #[test]
    fn a_zero_pivot_is_guarded_not_divided_by() {
        // A singular matrix: the second row is twice the first.
        let a = DMatrix::from_row_slice(3, 3, &[1.0, 2.0, 0.0, 2.0, 4.0, 0.0, 0.0, 0.0, 1.0]);
        let lu = BandedLu::factor(3, 2, |i, j| a[(i, j)], 1e-12);
        assert_eq!(lu.guarded, 1);
        let mut x = vec![1.0, 2.0, 3.0];
        lu.solve(&mut x);
        assert!(x.iter().all(|v| v.is_finite()));
    }
}
