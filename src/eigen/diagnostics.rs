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

/// ||A z_j - E_j B z_j||_1 of every pair, in parallel: the one residual
/// computation of a solve, which [`residual_ratio`] and the caller's own
/// per-level checks ([`pair_ratio`]) both read.
pub fn residual_norms(problem: &Problem, values: &[f64], vectors: &[Vec<f64>]) -> Vec<f64> {
    vectors
        .par_iter()
        .zip(values)
        .map(|(z, &e)| residual_norm1(problem, e, z))
        .collect()
}

/// max_j ||A z_j - E_j B z_j||_1 / (||A||_1 N eps) from the residual norms
/// of [`residual_norms`]; 0 for an empty set (NaN norms are skipped here:
/// the per-level checks catch them).
pub fn residual_ratio(problem: &Problem, norms: &[f64]) -> f64 {
    let n = problem.n();
    let anorm = problem.a.norm_one().max(f64::MIN_POSITIVE);
    let worst = norms.iter().copied().fold(0.0, f64::max);
    worst / (anorm * n as f64 * f64::EPSILON)
}

/// The scaled residual of one pair from its residual norm `r1 = ||A z - E B
/// z||_1`: `r1 / ((||A||_1 + |E| ||B||_1) N eps ||z||_2)` (the pencil's scale,
/// LAPACK Users' Guide sec. 4.7); NaN or infinite when E or z is not finite.
pub fn pair_ratio(problem: &Problem, energy: f64, z: &[f64], r1: f64) -> f64 {
    let scale = match problem.b {
        Some(b) => problem.a.norm_one() + energy.abs() * b.norm_one(),
        None => problem.a.norm_one(),
    };
    let length = z.iter().map(|x| x * x).sum::<f64>().sqrt();
    r1 / (scale.max(f64::MIN_POSITIVE) * z.len() as f64 * f64::EPSILON * length)
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
