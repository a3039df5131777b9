//! Block kernels on a set of k long vectors, cache-blocked over rows so that
//! every vector is streamed once: Gram matrices X^T Y and linear combinations
//! X Q, plus the Rayleigh-Ritz projection (Parlett, *The Symmetric Eigenvalue
//! Problem*, 1998, sec. 11.3). Partial sums are combined in a fixed row-block
//! order, so results do not depend on the number of threads.

use nalgebra::DMatrix;
use rayon::prelude::*;

use super::error::EigenError;
use super::matrix::Problem;

const BLOCK: usize = 2048;

/// Dot product with 8 independent partial sums (vectorisable, fixed order).
pub fn dot(x: &[f64], y: &[f64]) -> f64 {
    let mut acc = [0.0; 8];
    let xc = x.chunks_exact(8);
    let yc = y.chunks_exact(8);
    let (xr, yr) = (xc.remainder(), yc.remainder());
    for (a, b) in xc.zip(yc) {
        for l in 0..8 {
            acc[l] += a[l] * b[l];
        }
    }
    let mut s = ((acc[0] + acc[4]) + (acc[1] + acc[5])) + ((acc[2] + acc[6]) + (acc[3] + acc[7]));
    for (a, b) in xr.iter().zip(yr) {
        s += a * b;
    }
    s
}

/// G = X^T Y (k1 x k2). When `symmetric`, X = Y is assumed and only the upper
/// triangle is computed and mirrored.
pub fn gram(x: &[Vec<f64>], y: &[Vec<f64>], symmetric: bool) -> DMatrix<f64> {
    let (k1, k2) = (x.len(), y.len());
    if k1 == 0 || k2 == 0 {
        return DMatrix::zeros(k1, k2);
    }
    let n = x[0].len();
    let nb = n.div_ceil(BLOCK);
    let parts: Vec<DMatrix<f64>> = (0..nb)
        .into_par_iter()
        .map(|b| {
            let r = b * BLOCK..((b + 1) * BLOCK).min(n);
            let mut g = DMatrix::zeros(k1, k2);
            for i in 0..k1 {
                let j0 = if symmetric { i } else { 0 };
                for j in j0..k2 {
                    g[(i, j)] = dot(&x[i][r.clone()], &y[j][r.clone()]);
                }
            }
            g
        })
        .collect();
    let mut g = DMatrix::zeros(k1, k2);
    for p in parts {
        g += p;
    }
    if symmetric {
        for i in 0..k1 {
            for j in 0..i {
                g[(i, j)] = g[(j, i)];
            }
        }
    }
    g
}

/// H = (X^T Y + Y^T X)/2 from the upper triangle only (Y = A X with A symmetric).
pub fn gram_sym_pair(x: &[Vec<f64>], y: &[Vec<f64>]) -> DMatrix<f64> {
    let k = x.len();
    if k == 0 {
        return DMatrix::zeros(0, 0);
    }
    let n = x[0].len();
    let nb = n.div_ceil(BLOCK);
    let parts: Vec<DMatrix<f64>> = (0..nb)
        .into_par_iter()
        .map(|b| {
            let r = b * BLOCK..((b + 1) * BLOCK).min(n);
            let mut g = DMatrix::zeros(k, k);
            for i in 0..k {
                for j in i..k {
                    let v = if i == j {
                        dot(&x[i][r.clone()], &y[j][r.clone()])
                    } else {
                        0.5 * (dot(&x[i][r.clone()], &y[j][r.clone()])
                            + dot(&x[j][r.clone()], &y[i][r.clone()]))
                    };
                    g[(i, j)] = v;
                }
            }
            g
        })
        .collect();
    let mut g = DMatrix::zeros(k, k);
    for p in parts {
        g += p;
    }
    for i in 0..k {
        for j in 0..i {
            g[(i, j)] = g[(j, i)];
        }
    }
    g
}

/// Z = X Q: `z[j] = sum_i x[i] * q[(i, j)]`.
pub fn combine(x: &[Vec<f64>], q: &DMatrix<f64>) -> Vec<Vec<f64>> {
    let k = q.ncols();
    if x.is_empty() {
        return vec![Vec::new(); k];
    }
    let n = x[0].len();
    let mut z = vec![vec![0.0; n]; k];
    // parallel over output row blocks: each entry is computed by one thread
    let nb = n.div_ceil(BLOCK);
    let blocks: Vec<Vec<Vec<f64>>> = (0..nb)
        .into_par_iter()
        .map(|b| {
            let r = b * BLOCK..((b + 1) * BLOCK).min(n);
            let mut out = vec![vec![0.0; r.len()]; k];
            for (j, o) in out.iter_mut().enumerate() {
                for (i, xi) in x.iter().enumerate() {
                    let c = q[(i, j)];
                    if c != 0.0 {
                        for (ov, xv) in o.iter_mut().zip(&xi[r.clone()]) {
                            *ov += c * xv;
                        }
                    }
                }
            }
            out
        })
        .collect();
    for (b, out) in blocks.into_iter().enumerate() {
        let s = b * BLOCK;
        for (zj, oj) in z.iter_mut().zip(out) {
            zj[s..s + oj.len()].copy_from_slice(&oj);
        }
    }
    z
}

/// Rayleigh-Ritz on span(X) for A z = E B z: solves the projected pencil
/// (X^T A X, X^T B X) via Cholesky of X^T B X and returns ascending Ritz values
/// and B-orthonormal Ritz vectors. Fails with `NotPositiveDefinite` when the
/// vectors are numerically dependent.
pub fn rayleigh_ritz(
    problem: &Problem,
    x: &[Vec<f64>],
) -> Result<(Vec<f64>, Vec<Vec<f64>>), EigenError> {
    let n = problem.n();
    let ax: Vec<Vec<f64>> = x
        .par_iter()
        .map(|v| {
            let mut y = vec![0.0; n];
            problem.a.mul_vec(v, &mut y);
            y
        })
        .collect();
    let g = match problem.b {
        None => gram(x, x, true),
        Some(b) => {
            let bx: Vec<Vec<f64>> = x
                .par_iter()
                .map(|v| {
                    let mut y = vec![0.0; n];
                    b.mul_vec(v, &mut y);
                    y
                })
                .collect();
            let g = gram(x, &bx, false);
            (&g + g.transpose()) * 0.5
        }
    };
    let h = gram_sym_pair(x, &ax);
    let (vals, coef) = small_pencil(&h, &g)?;
    Ok((vals, combine(x, &coef)))
}

/// Rayleigh-Ritz as [`rayleigh_ritz`], but lean on memory: it takes the
/// vectors, forms the projected matrices one product `A x_j` (and `B x_j`) at
/// a time, and turns the vectors into the Ritz vectors in place. Peak memory
/// is the k vectors plus a few work vectors, instead of about four copies of
/// the k vectors: what makes N = 10^7 fit.
pub fn rayleigh_ritz_in_place(
    problem: &Problem,
    mut x: Vec<Vec<f64>>,
) -> Result<(Vec<f64>, Vec<Vec<f64>>), EigenError> {
    let k = x.len();
    let n = problem.n();
    let projected = |m: &super::matrix::SymBanded| -> DMatrix<f64> {
        let cols: Vec<Vec<f64>> = (0..k)
            .into_par_iter()
            .map(|j| {
                let mut y = vec![0.0; n];
                m.mul_vec(&x[j], &mut y);
                (0..k).map(|i| dot(&x[i], &y)).collect()
            })
            .collect();
        let mut h = DMatrix::zeros(k, k);
        for (j, col) in cols.iter().enumerate() {
            for (i, v) in col.iter().enumerate() {
                h[(i, j)] = *v;
            }
        }
        (&h + h.transpose()) * 0.5
    };
    let h = projected(problem.a);
    let g = match problem.b {
        None => gram(&x, &x, true),
        Some(b) => projected(b),
    };
    let (vals, coef) = small_pencil(&h, &g)?;
    combine_in_place(&mut x, &coef);
    Ok((vals, x))
}

/// `X <- X Q` in place, row block by row block (blocks in parallel).
pub fn combine_in_place(x: &mut [Vec<f64>], q: &DMatrix<f64>) {
    let k = x.len();
    if k == 0 || q.ncols() != k {
        return;
    }
    let n = x[0].len();
    let nb = n.div_ceil(BLOCK);
    // blocks[b][j]: rows of block b of vector j (disjoint mutable slices).
    let mut blocks: Vec<Vec<&mut [f64]>> = (0..nb).map(|_| Vec::with_capacity(k)).collect();
    for v in x.iter_mut() {
        for (b, chunk) in v.chunks_mut(BLOCK).enumerate() {
            blocks[b].push(chunk);
        }
    }
    blocks.into_par_iter().for_each(|mut cols| {
        let len = cols.first().map_or(0, |c| c.len());
        let mut out = vec![vec![0.0; len]; k];
        for (j, o) in out.iter_mut().enumerate() {
            for (i, xi) in cols.iter().enumerate() {
                let c = q[(i, j)];
                if c != 0.0 {
                    for (ov, xv) in o.iter_mut().zip(xi.iter()) {
                        *ov += c * xv;
                    }
                }
            }
        }
        for (dst, src) in cols.iter_mut().zip(out) {
            dst.copy_from_slice(&src);
        }
    });
}

/// Solves the small dense pencil H c = theta G c (G positive definite):
/// ascending values and G-orthonormal coefficient columns.
pub fn small_pencil(
    h: &DMatrix<f64>,
    g: &DMatrix<f64>,
) -> Result<(Vec<f64>, DMatrix<f64>), EigenError> {
    let chol = g
        .clone()
        .cholesky()
        .ok_or(EigenError::NotPositiveDefinite)?;
    let l = chol.l();
    let linv = l
        .clone()
        .try_inverse()
        .ok_or(EigenError::NotPositiveDefinite)?;
    let c = &linv * h * linv.transpose();
    let c = (&c + c.transpose()) * 0.5;
    let eig = c.symmetric_eigen();
    let mut order: Vec<usize> = (0..eig.eigenvalues.len()).collect();
    order.sort_by(|&a, &b| eig.eigenvalues[a].total_cmp(&eig.eigenvalues[b]));
    let k = order.len();
    let mut u = DMatrix::zeros(k, k);
    let mut vals = Vec::with_capacity(k);
    for (jn, &jo) in order.iter().enumerate() {
        vals.push(eig.eigenvalues[jo]);
        u.set_column(jn, &eig.eigenvectors.column(jo));
    }
    Ok((vals, linv.transpose() * u))
}

/// c_i = q_i . y for every vector of the block (one cache-blocked pass).
pub fn project(q: &[&[f64]], y: &[f64]) -> Vec<f64> {
    let k = q.len();
    if k == 0 {
        return Vec::new();
    }
    let n = y.len();
    let nb = n.div_ceil(BLOCK);
    let parts: Vec<Vec<f64>> = (0..nb)
        .into_par_iter()
        .map(|b| {
            let r = b * BLOCK..((b + 1) * BLOCK).min(n);
            q.iter()
                .map(|qi| dot(&qi[r.clone()], &y[r.clone()]))
                .collect()
        })
        .collect();
    let mut c = vec![0.0; k];
    for p in parts {
        for (ci, pi) in c.iter_mut().zip(p) {
            *ci += pi;
        }
    }
    c
}

/// w -= sum_i c_i q_i (row blocks in parallel; each entry owned by one thread).
pub fn subtract_combination(w: &mut [f64], q: &[&[f64]], c: &[f64]) {
    w.par_chunks_mut(BLOCK).enumerate().for_each(|(b, wb)| {
        let s = b * BLOCK;
        let len = wb.len();
        for (qi, &ci) in q.iter().zip(c) {
            for (wv, qv) in wb.iter_mut().zip(&qi[s..s + len]) {
                *wv -= ci * qv;
            }
        }
    });
}

#[cfg(test)]
mod tests {
    use super::super::matrix::SymBanded;
    use super::*;

    fn vectors(k: usize, n: usize) -> Vec<Vec<f64>> {
        (0..k)
            .map(|j| {
                (0..n)
                    .map(|i| ((i * (j + 3)) as f64 * 0.37).sin() + 0.1 * j as f64)
                    .collect()
            })
            .collect()
    }

    #[test]
    fn in_place_rayleigh_ritz_equals_the_copying_one() {
        // Two blocks and a remainder, so the block split is exercised.
        let n = 2 * BLOCK + 77;
        let a = SymBanded {
            n,
            bands: vec![
                (0..n).map(|i| 2.0 + (i as f64 * 0.01).cos()).collect(),
                vec![-1.0; n - 1],
            ],
            wrap: false,
        };
        let problem = Problem { a: &a, b: None };
        let x = vectors(4, n);
        let (v1, z1) = rayleigh_ritz(&problem, &x).unwrap();
        let (v2, z2) = rayleigh_ritz_in_place(&problem, x).unwrap();
        for (a, b) in v1.iter().zip(&v2) {
            assert!((a - b).abs() < 1e-12 * a.abs().max(1.0), "{a} vs {b}");
        }
        for (za, zb) in z1.iter().zip(&z2) {
            let d = za
                .iter()
                .zip(zb)
                .map(|(p, q)| (p - q).abs())
                .fold(0.0, f64::max);
            assert!(d < 1e-10, "{d}");
        }
    }

    #[test]
    fn combine_in_place_equals_combine() {
        let n = BLOCK + 5;
        let x = vectors(3, n);
        let q = DMatrix::from_row_slice(3, 3, &[1.0, 0.5, -2.0, 0.0, 3.0, 0.25, -1.0, 0.0, 1.0]);
        let z = combine(&x, &q);
        let mut y = x.clone();
        combine_in_place(&mut y, &q);
        assert_eq!(z, y);
    }
}
