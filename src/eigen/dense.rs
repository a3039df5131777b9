//! Dense reference solver: the full spectrum of A (or of the pencil (A, B))
//! with nalgebra's symmetric QR algorithm (Golub & Van Loan, *Matrix
//! Computations*, 4th ed., 2013, sec. 8.3). The generalized pencil is reduced
//! to standard form with the Cholesky factor B = L L^T:
//! C = L^-1 A L^-T, C y = E y, x = L^-T y (Golub & Van Loan sec. 8.7.2),
//! which makes the x B-orthonormal. Wrap corners come in through
//! [`SymBanded::to_dense`](super::SymBanded::to_dense).
//! O(n^3) time and O(n^2) memory: meant for n up to a few thousand.

use nalgebra::DMatrix;

use super::error::EigenError;
use super::matrix::Problem;

/// The matrix whose eigenvalues are those of the pencil: A itself, or
/// C = L^-1 A L^-T with B = L L^T; and L^-T, which maps C's eigenvectors
/// back to the pencil's.
type Reduced = (DMatrix<f64>, Option<DMatrix<f64>>);

fn reduce(problem: &Problem) -> Result<Reduced, EigenError> {
    let a = problem.a.to_dense();
    Ok(match problem.b {
        None => (a, None),
        Some(b) => {
            let chol = b
                .to_dense()
                .cholesky()
                .ok_or(EigenError::NotPositiveDefinite)?;
            let linv = chol
                .l()
                .try_inverse()
                .ok_or(EigenError::NotPositiveDefinite)?;
            let c = &linv * a * linv.transpose();
            let c = (&c + c.transpose()) * 0.5;
            (c, Some(linv.transpose()))
        }
    })
}

/// All eigenvalues, ascending, without vectors (one symmetric QR that
/// never accumulates the rotations).
pub fn dense_values(problem: &Problem) -> Result<Vec<f64>, EigenError> {
    let (c, _) = reduce(problem)?;
    let mut values: Vec<f64> = c.symmetric_eigenvalues().iter().copied().collect();
    values.sort_by(|x, y| x.total_cmp(y));
    Ok(values)
}

/// All eigenvalues (ascending) and the matching eigenvectors (columns).
pub fn dense_eigen(problem: &Problem) -> Result<(Vec<f64>, DMatrix<f64>), EigenError> {
    let (c, linv_t) = reduce(problem)?;
    let eig = c.symmetric_eigen();
    let n = eig.eigenvalues.len();
    let mut order: Vec<usize> = (0..n).collect();
    order.sort_by(|&x, &y| eig.eigenvalues[x].total_cmp(&eig.eigenvalues[y]));
    let values: Vec<f64> = order.iter().map(|&i| eig.eigenvalues[i]).collect();
    let mut vecs = DMatrix::zeros(n, n);
    for (jn, &jo) in order.iter().enumerate() {
        vecs.set_column(jn, &eig.eigenvectors.column(jo));
    }
    if let Some(t) = linv_t {
        vecs = t * vecs;
    }
    Ok((values, vecs))
}

/// Levels `first..first+count` by the dense solver, vectors normalised
/// (unit 2-norm, or x^T B x = 1) with the largest-magnitude entry positive.
pub fn solve_dense(
    problem: &Problem,
    first: usize,
    count: usize,
) -> Result<(Vec<f64>, Vec<Vec<f64>>), EigenError> {
    let (vals, vecs) = dense_eigen(problem)?;
    Ok(pick_dense(&vals, &vecs, first, count))
}

/// Levels `first..first+count` out of a full dense decomposition
/// ([`dense_eigen`]), vectors with the sign convention of [`fix_sign`].
pub fn pick_dense(
    vals: &[f64],
    vecs: &DMatrix<f64>,
    first: usize,
    count: usize,
) -> (Vec<f64>, Vec<Vec<f64>>) {
    let values = vals[first..first + count].to_vec();
    let vectors = (first..first + count)
        .map(|j| {
            let mut v: Vec<f64> = vecs.column(j).iter().copied().collect();
            fix_sign(&mut v);
            v
        })
        .collect();
    (values, vectors)
}

/// Flips `v` so that its entry of largest magnitude is positive (a
/// deterministic sign convention shared by all paths).
pub fn fix_sign(v: &mut [f64]) {
    let mut best = 0.0f64;
    let mut s = 1.0;
    for &x in v.iter() {
        if x.abs() > best {
            best = x.abs();
            s = x.signum();
        }
    }
    if s < 0.0 {
        v.iter_mut().for_each(|x| *x = -*x);
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::eigen::matrix::SymBanded;

    #[test]
    fn box_matches_closed_form_and_generalized_is_b_orthonormal() {
        // tridiag(-1, 2, -1): 2 - 2 cos(j pi/(n+1)) // closed form
        let n = 30;
        let a = SymBanded {
            n,
            bands: vec![vec![2.0; n], vec![-1.0; n - 1]],
            wrap: false,
        };
        let (v, _) = dense_eigen(&Problem { a: &a, b: None }).unwrap();
        for (j, x) in v.iter().enumerate() {
            let want = 2.0 - 2.0 * ((j + 1) as f64 * std::f64::consts::PI / (n as f64 + 1.0)).cos();
            approx::assert_abs_diff_eq!(*x, want, epsilon = 1e-13);
        }
        // B = tridiag(1/12, 10/12, 1/12) (Numerov metric), positive definite
        let b = SymBanded {
            n,
            bands: vec![vec![10.0 / 12.0; n], vec![1.0 / 12.0; n - 1]],
            wrap: false,
        };
        let pr = Problem { a: &a, b: Some(&b) };
        let (vals, vecs) = solve_dense(&pr, 3, 4).unwrap();
        for (i, x) in vecs.iter().enumerate() {
            let mut bx = vec![0.0; n];
            b.mul_vec(x, &mut bx);
            for (j, y) in vecs.iter().enumerate() {
                let g: f64 = y.iter().zip(&bx).map(|(p, q)| p * q).sum();
                approx::assert_abs_diff_eq!(g, if i == j { 1.0 } else { 0.0 }, epsilon = 1e-13);
            }
            let r = crate::eigen::diagnostics::residual_norm1(&pr, vals[i], x);
            assert!(r < 1e-12);
        }
    }
}
