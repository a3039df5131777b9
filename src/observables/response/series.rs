//! The perturbation series of one level in a static field, exact on the grid:
//! linear-response (Sternheimer) equations solved with a banded LU, and the
//! energies to fourth order by Wigner's 2n+1 rule.
//!
//! For the pencil `(A + F V) z = E(F) M z` (finite differences: `M = I`,
//! `V = diag(x)`; Numerov: `M = B²`, `V = B diag(x) B`), with `z0` the
//! level's vector normalised so that `z0ᵀ M z0 = 1`, `L = A - E0 M` and the
//! intermediate normalisation `z0ᵀ M z_k = 0` (Rayleigh–Schrödinger theory;
//! J. O. Hirschfelder, W. Byers Brown and S. T. Epstein, Adv. Quantum Chem.
//! 1, 255 (1964), sec. 2):
//!
//! ```text
//! E1 = z0ᵀ V z0
//! L z1 = -(V - E1 M) z0                        E2 = z0ᵀ V z1
//! L z2 = -(V - E1 M) z1 + E2 M z0              E3 = z1ᵀ (V - E1 M) z1
//!                                              E4 = z1ᵀ (V - E1 M) z2 - E2 z1ᵀ M z1
//! ```
//!
//! (`E3` and `E4` from the first- and second-order vectors: the 2n+1 rule,
//! E. P. Wigner, Math. natur. Anz. ungar. Akad. Wiss. 53, 477 (1935)).
//! `L` is singular along `z0`; each system is solved in the M-orthogonal
//! complement of `z0`: the right-hand side is made orthogonal to `z0`, the
//! LU of `A - (E0 + δ) M` (δ a few hundred rounding units of `||L||`, so the
//! factored matrix is not singular) gives a first solution, its `z0`
//! component is removed, and iterative refinement with the true `L` removes
//! the error of the shift (it falls by `δ / gap` per step).

use crate::eigen::SymBanded;

use super::banded_lu::BandedLu;

/// The field's pencil on a grid: `(A + F V, M)`.
#[derive(Debug, Clone, Copy)]
pub struct FieldPencil<'a> {
    /// The Hamiltonian (finite differences) or Numerov's `K`.
    pub a: &'a SymBanded,
    /// Numerov's metric `M = B²`; `None` for the identity.
    pub m: Option<&'a SymBanded>,
    /// Numerov's `B` (the field enters as `B diag(x) B`); `None` for finite
    /// differences (the field enters as `diag(x)`).
    pub b: Option<&'a SymBanded>,
    /// Positions of the unknowns, Å: the field's potential per unit field.
    pub x: &'a [f64],
}

impl FieldPencil<'_> {
    fn n(&self) -> usize {
        self.a.n
    }

    fn apply_m(&self, z: &[f64], out: &mut [f64]) {
        match self.m {
            Some(m) => m.mul_vec(z, out),
            None => out.copy_from_slice(z),
        }
    }

    fn apply_v(&self, z: &[f64], out: &mut [f64]) {
        match self.b {
            Some(b) => {
                let mut t = vec![0.0; z.len()];
                b.mul_vec(z, &mut t);
                for (ti, xi) in t.iter_mut().zip(self.x) {
                    *ti *= xi;
                }
                b.mul_vec(&t, out);
            }
            None => {
                for ((o, zi), xi) in out.iter_mut().zip(z).zip(self.x) {
                    *o = zi * xi;
                }
            }
        }
    }

    fn m_norm_one(&self) -> f64 {
        self.m.map_or(1.0, SymBanded::norm_one)
    }

    fn m_entry(&self, i: usize, j: usize) -> f64 {
        match self.m {
            Some(m) => m.get(i, j),
            None => f64::from(u8::from(i == j)),
        }
    }
}

/// The energy of one level as a power series in the field,
/// `E(F) = e0 + e1 F + e2 F² + e3 F³ + e4 F⁴` (eV, field in V/Å).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Series {
    /// The level's energy (Rayleigh quotient of its vector), eV.
    pub e0: f64,
    /// `⟨x⟩`, Å.
    pub e1: f64,
    /// Second order, `Å²/eV` (e = 1: the field in V/Å).
    pub e2: f64,
    /// Third order, `Å³/eV²` (`None` when only the polarizability was asked for).
    pub e3: Option<f64>,
    /// Fourth order, `Å⁴/eV³` (`None` when only the polarizability was asked for).
    pub e4: Option<f64>,
    /// Worst relative residual of the response equations after refinement,
    /// `||r - L z|| / (||L|| ||z|| + ||r||)`.
    pub residual: f64,
    /// Iterative-refinement steps taken, summed over the systems.
    pub refinements: usize,
}

/// Why the response of a level could not be computed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SeriesError {
    /// The vector has no length in the metric.
    #[error("the level's vector is zero or not finite")]
    BadVector,
    /// Refinement did not bring the residual of a response equation down.
    #[error("the response equations of this level did not converge (relative residual {residual:.1e}); a nearly degenerate neighbour makes them ill-conditioned")]
    NotConverged {
        /// The relative residual reached.
        residual: f64,
    },
}

/// Relative residual accepted for the response equations.
pub const RESIDUAL_LIMIT: f64 = 1e-9;
/// Most refinement steps per system.
const MAX_REFINEMENTS: usize = 12;
/// The factored shift `δ` in rounding units of `||L||_1` (see module docs).
const SHIFT_ROUNDING_UNITS: f64 = 256.0;

fn dot(a: &[f64], b: &[f64]) -> f64 {
    a.iter().zip(b).map(|(x, y)| x * y).sum()
}

fn norm(a: &[f64]) -> f64 {
    dot(a, a).sqrt()
}

/// The response of the level whose vector of the pencil is `z0` (any
/// normalisation; it is scaled to `z0ᵀ M z0 = 1`). With `hyper` the
/// series goes to fourth order, else to second.
pub fn series(pencil: &FieldPencil, z0: &[f64], hyper: bool) -> Result<Series, SeriesError> {
    let n = pencil.n();
    let mut z0 = z0.to_vec();
    let mut mz0 = vec![0.0; n];
    pencil.apply_m(&z0, &mut mz0);
    let len2 = dot(&z0, &mz0);
    if !(len2.is_finite() && len2 > 0.0) {
        return Err(SeriesError::BadVector);
    }
    let s = 1.0 / len2.sqrt();
    z0.iter_mut().chain(mz0.iter_mut()).for_each(|v| *v *= s);
    let mut az0 = vec![0.0; n];
    pencil.a.mul_vec(&z0, &mut az0);
    let e0 = dot(&z0, &az0);
    let mut vz0 = vec![0.0; n];
    pencil.apply_v(&z0, &mut vz0);
    let e1 = dot(&z0, &vz0);
    let norm_l = pencil.a.norm_one() + e0.abs() * pencil.m_norm_one();
    let delta = SHIFT_ROUNDING_UNITS * f64::EPSILON * norm_l;
    let shifted = e0 + delta;
    let p = pencil.a.half_bandwidth();
    let lu = BandedLu::factor(
        n,
        p,
        |i, j| pencil.a.get(i, j) - shifted * pencil.m_entry(i, j),
        f64::EPSILON * norm_l,
    );
    let solver = Orthogonal {
        pencil,
        lu: &lu,
        z0: &z0,
        mz0: &mz0,
        e0,
        norm_l,
    };
    let mut stats = (0.0f64, 0usize);
    // First order.
    let rhs1: Vec<f64> = vz0.iter().zip(&mz0).map(|(v, m)| -(v - e1 * m)).collect();
    let z1 = solver.solve(rhs1, &mut stats)?;
    let mut vz1 = vec![0.0; n];
    pencil.apply_v(&z1, &mut vz1);
    let e2 = dot(&z0, &vz1);
    let (e3, e4) = if hyper {
        let mut mz1 = vec![0.0; n];
        pencil.apply_m(&z1, &mut mz1);
        let e3 = dot(&z1, &vz1) - e1 * dot(&z1, &mz1);
        let rhs2: Vec<f64> = vz1
            .iter()
            .zip(&mz1)
            .zip(&mz0)
            .map(|((v, m1), m0)| -(v - e1 * m1) + e2 * m0)
            .collect();
        let z2 = solver.solve(rhs2, &mut stats)?;
        let mut vz2 = vec![0.0; n];
        pencil.apply_v(&z2, &mut vz2);
        let mut mz2 = vec![0.0; n];
        pencil.apply_m(&z2, &mut mz2);
        let e4 = dot(&z1, &vz2) - e1 * dot(&z1, &mz2) - e2 * dot(&z1, &mz1);
        (Some(e3), Some(e4))
    } else {
        (None, None)
    };
    Ok(Series {
        e0,
        e1,
        e2,
        e3,
        e4,
        residual: stats.0,
        refinements: stats.1,
    })
}

/// Solves `L y = r` in the M-orthogonal complement of `z0`.
struct Orthogonal<'a> {
    pencil: &'a FieldPencil<'a>,
    lu: &'a BandedLu,
    z0: &'a [f64],
    mz0: &'a [f64],
    e0: f64,
    norm_l: f64,
}

impl Orthogonal<'_> {
    /// Removes the `z0` part of a right-hand side: `r -= (z0ᵀ r) M z0`.
    fn project_rhs(&self, r: &mut [f64]) {
        let c = dot(self.z0, r);
        for (ri, mi) in r.iter_mut().zip(self.mz0) {
            *ri -= c * mi;
        }
    }

    /// Removes the `z0` part of a solution: `y -= (z0ᵀ M y) z0`.
    fn project_solution(&self, y: &mut [f64]) {
        let c = dot(self.mz0, y);
        for (yi, zi) in y.iter_mut().zip(self.z0) {
            *yi -= c * zi;
        }
    }

    /// `r - L y`, projected.
    fn residual(&self, r: &[f64], y: &[f64]) -> Vec<f64> {
        let n = y.len();
        let mut ay = vec![0.0; n];
        self.pencil.a.mul_vec(y, &mut ay);
        let mut my = vec![0.0; n];
        self.pencil.apply_m(y, &mut my);
        let mut res: Vec<f64> = r
            .iter()
            .zip(&ay)
            .zip(&my)
            .map(|((ri, a), m)| ri - (a - self.e0 * m))
            .collect();
        self.project_rhs(&mut res);
        res
    }

    fn solve(&self, mut r: Vec<f64>, stats: &mut (f64, usize)) -> Result<Vec<f64>, SeriesError> {
        self.project_rhs(&mut r);
        let mut y = r.clone();
        self.lu.solve(&mut y);
        self.project_solution(&mut y);
        let rnorm = norm(&r);
        let mut rel = f64::INFINITY;
        for step in 0..=MAX_REFINEMENTS {
            let res = self.residual(&r, &y);
            let scale = self.norm_l * norm(&y) + rnorm;
            rel = if scale > 0.0 { norm(&res) / scale } else { 0.0 };
            // Stop at the rounding level of the residual itself.
            if rel <= 8.0 * f64::EPSILON || step == MAX_REFINEMENTS || !rel.is_finite() {
                break;
            }
            let mut dy = res;
            self.lu.solve(&mut dy);
            self.project_solution(&mut dy);
            for (yi, d) in y.iter_mut().zip(&dy) {
                *yi += d;
            }
            stats.1 += 1;
        }
        if rel.is_nan() || rel > RESIDUAL_LIMIT {
            return Err(SeriesError::NotConverged { residual: rel });
        }
        stats.0 = stats.0.max(rel);
        Ok(y)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::{DMatrix, DVector};

    /// A small finite-difference Hamiltonian with a lopsided potential.
    fn hamiltonian(n: usize) -> (SymBanded, Vec<f64>) {
        let h = 0.2;
        let t = 1.0 / (h * h);
        let x: Vec<f64> = (0..n).map(|i| (i + 1) as f64 * h).collect();
        let v: Vec<f64> = x.iter().map(|x| 0.3 * (1.3 * x).sin() + 0.05 * x).collect();
        let a = SymBanded {
            n,
            bands: vec![v.iter().map(|vi| 2.0 * t + vi).collect(), vec![-t; n - 1]],
            wrap: false,
        };
        (a, x)
    }

    /// Sum-over-states forms of the same orders over every eigenpair of the
    /// dense matrix (nalgebra's dense symmetric solver; the formulas of
    /// Hirschfelder, Byers Brown and Epstein, sec. 2): with `Δk = Ek - E0`,
    /// `W = V - E1`, E2 = -Σ V0k²/Δk, E3 = Σ V0k Wkl Vl0 /(Δk Δl),
    /// E4 = -Σ V0k Wkl Wlm Vm0 /(Δk Δl Δm) - E2 Σ V0k²/Δk².
    fn sum_over_states(c: &DMatrix<f64>, v: &DMatrix<f64>, level: usize) -> [f64; 4] {
        let eig = c.clone().symmetric_eigen();
        let mut order: Vec<usize> = (0..c.nrows()).collect();
        order.sort_by(|&a, &b| eig.eigenvalues[a].total_cmp(&eig.eigenvalues[b]));
        let u = DMatrix::from_fn(c.nrows(), c.nrows(), |i, j| eig.eigenvectors[(i, order[j])]);
        let e: Vec<f64> = order.iter().map(|&k| eig.eigenvalues[k]).collect();
        let vm = u.transpose() * v * &u;
        let e1 = vm[(level, level)];
        let others: Vec<usize> = (0..e.len()).filter(|&k| k != level).collect();
        let d = |k: usize| e[k] - e[level];
        let w = |k: usize, l: usize| vm[(k, l)] - if k == l { e1 } else { 0.0 };
        let e2: f64 = -others
            .iter()
            .map(|&k| vm[(level, k)].powi(2) / d(k))
            .sum::<f64>();
        let mut e3 = 0.0;
        let mut e4 = 0.0;
        for &k in &others {
            for &l in &others {
                let a = vm[(level, k)] * w(k, l) / (d(k) * d(l));
                e3 += a * vm[(l, level)];
                for &m in &others {
                    e4 -= a * w(l, m) * vm[(m, level)] / d(m);
                }
            }
        }
        e4 -= e2
            * others
                .iter()
                .map(|&k| vm[(level, k)].powi(2) / d(k).powi(2))
                .sum::<f64>();
        [e1, e2, e3, e4]
    }

    fn assert_close(got: f64, want: f64, what: &str) {
        assert!(
            (got - want).abs() <= 1e-9 * want.abs().max(1e-6),
            "{what}: {got} vs {want}"
        );
    }

    #[test]
    fn finite_differences_match_the_dense_sum_over_states() {
        let n = 40;
        let (a, x) = hamiltonian(n);
        let dense = a.to_dense();
        let eig = dense.clone().symmetric_eigen();
        let mut order: Vec<usize> = (0..n).collect();
        order.sort_by(|&i, &j| eig.eigenvalues[i].total_cmp(&eig.eigenvalues[j]));
        let vd = DMatrix::from_diagonal(&DVector::from_vec(x.clone()));
        let pencil = FieldPencil {
            a: &a,
            m: None,
            b: None,
            x: &x,
        };
        for level in [0, 1, 5] {
            let z: Vec<f64> = eig
                .eigenvectors
                .column(order[level])
                .iter()
                .copied()
                .collect();
            let s = series(&pencil, &z, true).unwrap();
            let [e1, e2, e3, e4] = sum_over_states(&dense, &vd, level);
            assert_close(s.e1, e1, "E1");
            assert_close(s.e2, e2, "E2");
            assert_close(s.e3.unwrap(), e3, "E3");
            assert_close(s.e4.unwrap(), e4, "E4");
            assert!(s.residual <= RESIDUAL_LIMIT);
        }
    }

    #[test]
    fn a_generalised_pencil_matches_its_standard_form() {
        // (A + F B X B) z = E M z with M = B B: with C = B^-1 A B^-1 the
        // standard form is (C + F X) w = E w, w = B z (B symmetric).
        let n = 30;
        let (a, x) = hamiltonian(n);
        let b = SymBanded {
            n,
            bands: vec![vec![10.0 / 12.0; n], vec![1.0 / 12.0; n - 1]],
            wrap: false,
        };
        let bd = b.to_dense();
        let md = &bd * &bd;
        let m = SymBanded {
            n,
            bands: vec![
                (0..n).map(|i| md[(i, i)]).collect(),
                (0..n - 1).map(|i| md[(i, i + 1)]).collect(),
                (0..n - 2).map(|i| md[(i, i + 2)]).collect(),
            ],
            wrap: false,
        };
        // A of bandwidth 2 so that M fits in its band.
        let a2 = SymBanded {
            n,
            bands: vec![a.bands[0].clone(), a.bands[1].clone(), vec![0.0; n - 2]],
            wrap: false,
        };
        let binv = bd.clone().try_inverse().unwrap();
        let c = &binv * a2.to_dense() * &binv;
        let c = (&c + c.transpose()) * 0.5;
        let vd = DMatrix::from_diagonal(&DVector::from_vec(x.clone()));
        let eig = c.clone().symmetric_eigen();
        let mut order: Vec<usize> = (0..n).collect();
        order.sort_by(|&i, &j| eig.eigenvalues[i].total_cmp(&eig.eigenvalues[j]));
        let pencil = FieldPencil {
            a: &a2,
            m: Some(&m),
            b: Some(&b),
            x: &x,
        };
        for level in [0, 3] {
            let w = eig.eigenvectors.column(order[level]).into_owned();
            let z: Vec<f64> = (&binv * w).iter().copied().collect();
            let s = series(&pencil, &z, true).unwrap();
            let [e1, e2, e3, e4] = sum_over_states(&c, &vd, level);
            assert_close(s.e1, e1, "E1");
            assert_close(s.e2, e2, "E2");
            assert_close(s.e3.unwrap(), e3, "E3");
            assert_close(s.e4.unwrap(), e4, "E4");
        }
    }
}
