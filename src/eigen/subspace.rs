//! Block kernels on a set of k long vectors, cache-blocked over rows so that
//! every vector is streamed once: Gram matrices X^T Y and linear combinations
//! X Q, plus the Rayleigh-Ritz projection (Parlett, *The Symmetric Eigenvalue
//! Problem*, 1998, sec. 11.3). Partial sums are combined in a fixed row-block
//! order, so results do not depend on the number of threads.

use std::ops::Range;

use nalgebra::DMatrix;
use rayon::prelude::*;

use super::error::EigenError;
use super::matrix::Problem;

const BLOCK: usize = 2048;

/// A deterministic pseudo-random start vector, entries in (-1, 1): the
/// splitmix64 stream (Steele, Lea & Flood, OOPSLA 2014) from the state
/// `state`. Every method draws its start vectors here; each picks its own
/// states (one stream per restart or per level), so results do not depend
/// on the order in which levels run.
pub fn start_vector(n: usize, state: u64) -> Vec<f64> {
    let mut s = state;
    (0..n)
        .map(|_| {
            s = s.wrapping_add(0x9E37_79B9_7F4A_7C15);
            let mut z = s;
            z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
            z ^= z >> 31;
            (z >> 11) as f64 / (1u64 << 53) as f64 * 2.0 - 1.0
        })
        .collect()
}

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

/// Rows `r` of the vectors as the columns of a matrix (`r.len()` x k), so
/// that a block's products run as one matrix product (nalgebra's blocked
/// kernels) instead of k^2 separate dot products.
fn pack<V: AsRef<[f64]>>(x: &[V], r: Range<usize>) -> DMatrix<f64> {
    let mut m = DMatrix::zeros(r.len(), x.len());
    for (j, v) in x.iter().enumerate() {
        m.column_mut(j).copy_from_slice(&v.as_ref()[r.clone()]);
    }
    m
}

/// The row blocks of vectors of length n.
fn row_blocks(n: usize) -> Vec<Range<usize>> {
    (0..n.div_ceil(BLOCK))
        .map(|b| b * BLOCK..((b + 1) * BLOCK).min(n))
        .collect()
}

/// Sums per-block matrices in block order (independent of the threads).
fn sum_parts(parts: Vec<DMatrix<f64>>, rows: usize, cols: usize) -> DMatrix<f64> {
    let mut g = DMatrix::zeros(rows, cols);
    for p in parts {
        g += p;
    }
    g
}

/// Copies the upper triangle onto the lower one.
fn mirror_upper(g: &mut DMatrix<f64>) {
    for i in 0..g.nrows() {
        for j in 0..i {
            g[(i, j)] = g[(j, i)];
        }
    }
}

/// G = X^T Y (k1 x k2). When `symmetric`, X = Y is assumed and the result
/// is made exactly symmetric from its upper triangle.
pub fn gram(x: &[Vec<f64>], y: &[Vec<f64>], symmetric: bool) -> DMatrix<f64> {
    let (k1, k2) = (x.len(), y.len());
    if k1 == 0 || k2 == 0 {
        return DMatrix::zeros(k1, k2);
    }
    let parts: Vec<DMatrix<f64>> = row_blocks(x[0].len())
        .into_par_iter()
        .map(|r| {
            let xb = pack(x, r.clone());
            if symmetric {
                xb.tr_mul(&xb)
            } else {
                xb.tr_mul(&pack(y, r))
            }
        })
        .collect();
    let mut g = sum_parts(parts, k1, k2);
    if symmetric {
        mirror_upper(&mut g);
    }
    g
}

/// H = (X^T Y + Y^T X)/2 (Y = A X with A symmetric).
pub fn gram_sym_pair(x: &[Vec<f64>], y: &[Vec<f64>]) -> DMatrix<f64> {
    let k = x.len();
    if k == 0 {
        return DMatrix::zeros(0, 0);
    }
    let parts: Vec<DMatrix<f64>> = row_blocks(x[0].len())
        .into_par_iter()
        .map(|r| pack(x, r.clone()).tr_mul(&pack(y, r)))
        .collect();
    let g = sum_parts(parts, k, k);
    let mut h = (&g + g.transpose()) * 0.5;
    mirror_upper(&mut h);
    h
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
    let blocks: Vec<(Range<usize>, DMatrix<f64>)> = row_blocks(n)
        .into_par_iter()
        .map(|r| {
            let out = pack(x, r.clone()) * q;
            (r, out)
        })
        .collect();
    for (r, out) in blocks {
        for (j, zj) in z.iter_mut().enumerate() {
            zj[r.clone()].copy_from_slice(out.column(j).as_slice());
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
    // X^T A X and X^T B X block by block: each block's A x_j (and B x_j)
    // rows are formed in a small buffer and multiplied as matrices
    let parts: Vec<(DMatrix<f64>, DMatrix<f64>)> = row_blocks(n)
        .into_par_iter()
        .map(|r| {
            let xb = pack(&x, r.clone());
            let applied = |m: &super::matrix::SymBanded| {
                let mut yb = DMatrix::zeros(r.len(), k);
                for (j, xj) in x.iter().enumerate() {
                    m.mul_rows(xj, r.clone(), yb.column_mut(j).as_mut_slice());
                }
                xb.tr_mul(&yb)
            };
            let h = applied(problem.a);
            let g = match problem.b {
                None => xb.tr_mul(&xb),
                Some(b) => applied(b),
            };
            (h, g)
        })
        .collect();
    let (hs, gs): (Vec<_>, Vec<_>) = parts.into_iter().unzip();
    let h = sum_parts(hs, k, k);
    let g = sum_parts(gs, k, k);
    let h = (&h + h.transpose()) * 0.5;
    let mut g = (&g + g.transpose()) * 0.5;
    if problem.b.is_none() {
        mirror_upper(&mut g);
    }
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
        let out = pack(&cols, 0..len) * q;
        for (j, dst) in cols.iter_mut().enumerate() {
            dst.copy_from_slice(out.column(j).as_slice());
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
