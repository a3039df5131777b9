//! Accuracy measures of computed eigenpairs, in the scaled forms of LAPACK's
//! test routines DSTT21/DSTT22 (Anderson et al., *LAPACK Users' Guide*, 3rd
//! ed., SIAM 1999, sec. 7.7 and the test-suite documentation):
//!
//! residual_ratio = max_j ||A z_j - E_j B z_j||_1 / (||A||_1 N eps),
//! orthogonality_ratio = ||Z^T B Z - I||_1 / (k eps).
//!
//! Values below ~30 are "passed" in LAPACK's sense. The orthogonality measure
//! costs O(N k^2): use it for reporting, never inside iterations.

use rayon::prelude::*;

use super::matrix::Problem;
use super::subspace::gram;

/// max_j ||A z_j - E_j B z_j||_1 / (||A||_1 N eps); 0 for an empty set.
pub fn residual_ratio(problem: &Problem, values: &[f64], vectors: &[Vec<f64>]) -> f64 {
    let n = problem.n();
    let anorm = problem.a.norm_one().max(f64::MIN_POSITIVE);
    let worst = vectors
        .par_iter()
        .zip(values)
        .map(|(z, &e)| residual_norm1(problem, e, z))
        .collect::<Vec<_>>()
        .into_iter()
        .fold(0.0, f64::max);
    worst / (anorm * n as f64 * f64::EPSILON)
}

/// ||A z - e B z||_1 for one pair.
pub fn residual_norm1(problem: &Problem, e: f64, z: &[f64]) -> f64 {
    let n = problem.n();
    let mut az = vec![0.0; n];
    let mut bz = vec![0.0; n];
    problem.a.mul_vec(z, &mut az);
    problem.mul_b(z, &mut bz);
    az.iter().zip(&bz).map(|(a, b)| (a - e * b).abs()).sum()
}

/// ||Z^T B Z - I||_1 / (k eps); 0 for an empty set.
pub fn orthogonality_ratio(problem: &Problem, vectors: &[Vec<f64>]) -> f64 {
    let k = vectors.len();
    if k == 0 {
        return 0.0;
    }
    let n = problem.n();
    let g = match problem.b {
        None => gram(vectors, vectors, true),
        Some(_) => {
            let bz: Vec<Vec<f64>> = vectors
                .par_iter()
                .map(|z| {
                    let mut y = vec![0.0; n];
                    problem.mul_b(z, &mut y);
                    y
                })
                .collect();
            gram(vectors, &bz, false)
        }
    };
    let mut worst: f64 = 0.0;
    for j in 0..k {
        let s: f64 = (0..k)
            .map(|i| (g[(i, j)] - if i == j { 1.0 } else { 0.0 }).abs())
            .sum();
        worst = worst.max(s);
    }
    worst / (k as f64 * f64::EPSILON)
}
