//! The Bloch Hamiltonian of one periodic cell and its solution over the
//! wavevector.
//!
//! One cell `[x0, x0 + a)` carries `M` grid points `x_j = x0 + j h`, `h = a / M`
//! (no duplicated end point). The second derivative is the central
//! finite-difference stencil of order `2p` with weights `c_0..c_p`
//! (B. Fornberg, Math. Comp. 51, 699 (1988)):
//!
//! `psi''(x_j) ~ (1/h^2) sum_{d=-p}^{p} c_|d| psi_{j+d}`.
//!
//! A neighbour `j + d` that falls outside the cell is folded back with the
//! Bloch condition `psi(x + a) = e^{i k a} psi(x)`: the element picks up
//! `e^{i k a w}` where `w = floor((j + d) / M)` is the number of cells crossed
//! (F. Bloch, Z. Phys. 52, 555 (1929); Ashcroft & Mermin, *Solid State
//! Physics*, ch. 8). The matrix
//!
//! `H_k = -(t / h^2) C_k + diag(V)`, `t = hbar^2 / (2 m)`,
//!
//! is Hermitian because the stencil is symmetric (`c_d = c_-d`) and the phase
//! for `+d` is the conjugate of the phase for `-d`. Its eigenvalues are the
//! band energies at `k`; they depend on `k` only through `e^{i k a}`, so they
//! are periodic with period `2 pi / a`, and `H_{-k} = conj(H_k)` makes them
//! even in `k`.

use std::f64::consts::PI;

use nalgebra::{Complex, DMatrix};
use rayon::prelude::*;
use serde::Serialize;

use super::BandsError;

/// One periodic cell of a one-dimensional crystal, as the band solver reads it.
#[derive(Debug, Clone, Copy)]
pub struct CellProblem<'a> {
    /// Potential energy in eV at the `M` cell points `x_j = x0 + j a / M`,
    /// `j = 0..M-1` (the point `x0 + a` is not repeated). All values must be
    /// finite and `M` must exceed `2 p`.
    pub potential: &'a [f64],
    /// Cell length (lattice period) `a` in ångström; finite and positive.
    pub period: f64,
    /// Kinetic prefactor `t = hbar^2 / (2 m)` in eV Å²; finite and positive.
    /// For an electron this is `constants::hbar2_over_2me_ev_a2()` (about
    /// 3.80998 eV Å²).
    pub kinetic: f64,
    /// Central second-derivative weights `c_0..c_p` for accuracy order `2 p`,
    /// e.g. `[-2, 1]` (order 2) or `[-5/2, 4/3, -1/12]` (order 4). At least two
    /// finite values.
    pub weights: &'a [f64],
}

impl CellProblem<'_> {
    /// Number of grid points in the cell, `M`.
    pub fn points(&self) -> usize {
        self.potential.len()
    }

    /// Grid spacing `h = a / M` in ångström.
    pub fn spacing(&self) -> f64 {
        self.period / self.potential.len() as f64
    }

    /// Zone-boundary wavevector `pi / a` in 1/Å.
    pub fn zone_edge(&self) -> f64 {
        PI / self.period
    }

    /// Checks every input the solver reads; returns the first problem found.
    pub fn validate(&self) -> Result<(), BandsError> {
        if !(self.period.is_finite() && self.period > 0.0) {
            return Err(BandsError::BadPeriod {
                period: self.period,
            });
        }
        if !(self.kinetic.is_finite() && self.kinetic > 0.0) {
            return Err(BandsError::BadKinetic {
                kinetic: self.kinetic,
            });
        }
        if self.weights.len() < 2 || self.weights.iter().any(|w| !w.is_finite()) {
            return Err(BandsError::BadWeights {
                count: self.weights.len(),
            });
        }
        let needed = 2 * (self.weights.len() - 1) + 1;
        if self.potential.len() < needed {
            return Err(BandsError::TooFewPoints {
                points: self.potential.len(),
                needed,
            });
        }
        if let Some(index) = self.potential.iter().position(|v| !v.is_finite()) {
            return Err(BandsError::NonFinitePotential { index });
        }
        Ok(())
    }

    /// An upper bound in eV on the spectral radius of `H_k` for any `k`:
    /// `(t / h^2) (|c_0| + 2 sum_{d>0} |c_d|) + max |V|`.
    pub(super) fn norm_bound(&self) -> f64 {
        let h = self.spacing();
        let stencil: f64 = self
            .weights
            .iter()
            .enumerate()
            .map(|(d, c)| if d == 0 { c.abs() } else { 2.0 * c.abs() })
            .sum();
        let vmax = self.potential.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
        self.kinetic / (h * h) * stencil + vmax
    }

    /// Expected absolute round-off in one computed eigenvalue, in eV:
    /// `M * eps * norm_bound` (backward-stable Hermitian QR; the factor `M`
    /// is a generous stand-in for the accumulated rotations, Golub & Van Loan,
    /// *Matrix Computations*, 4th ed., sec. 8.3).
    pub(super) fn eigenvalue_noise(&self) -> f64 {
        (self.points().max(1) as f64) * f64::EPSILON * self.norm_bound()
    }
}

/// Band energies sampled on a uniform grid of wavevectors in the irreducible
/// half zone `[0, pi / a]`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BandStructure {
    /// Wavevectors in 1/Å, ascending, from exactly `0` to exactly `pi / a`.
    pub k: Vec<f64>,
    /// `bands[b][i]` is the energy in eV of band `b + 1` at `k[i]`; bands are
    /// the eigenvalues of `H_k` sorted ascending at each `k`.
    pub bands: Vec<Vec<f64>>,
}

/// Builds the dense Bloch Hamiltonian `H_k` (eV) of `cell` at wavevector `k`
/// (1/Å).
///
/// The matrix is Hermitian for any input. It does not validate `cell`: when
/// `M <= 2 p` a stencil reaches around the cell more than once and the
/// contributions are summed with their Bloch phases (use [`CellProblem::validate`]
/// or [`solve_k`] to reject that case). An empty potential gives a 0 x 0 matrix.
pub fn bloch_hamiltonian(cell: &CellProblem, k: f64) -> DMatrix<Complex<f64>> {
    let m = cell.points();
    let mut h = DMatrix::from_element(m, m, Complex::new(0.0, 0.0));
    if m == 0 {
        return h;
    }
    let spacing = cell.spacing();
    let scale = -cell.kinetic / (spacing * spacing);
    let ka = k * cell.period;
    let mi = m as isize;
    for j in 0..m {
        h[(j, j)] += Complex::new(cell.potential[j], 0.0);
        for (d, &c) in cell.weights.iter().enumerate() {
            let offsets: &[isize] = if d == 0 {
                &[0]
            } else {
                &[d as isize, -(d as isize)]
            };
            for &off in offsets {
                let target = j as isize + off;
                let wraps = target.div_euclid(mi);
                let col = target.rem_euclid(mi) as usize;
                let phase = if wraps == 0 {
                    Complex::new(1.0, 0.0)
                } else {
                    let angle = ka * wraps as f64;
                    Complex::new(angle.cos(), angle.sin())
                };
                h[(j, col)] += phase * (scale * c);
            }
        }
    }
    h
}

/// Lowest `nbands` eigenvalues (eV, ascending) of `H_k` at wavevector `k`
/// (1/Å, any finite value).
///
/// Validates `cell` first. `nbands` may be 0 (empty result) and at most `M`.
/// Uses nalgebra's Hermitian tridiagonal QR on the dense `M x M` matrix, so the
/// cost grows as `M^3`.
pub fn solve_k(cell: &CellProblem, k: f64, nbands: usize) -> Result<Vec<f64>, BandsError> {
    cell.validate()?;
    solve_validated(cell, k, nbands)
}

/// [`solve_k`] without re-validating the cell (the caller has done it).
pub(super) fn solve_validated(
    cell: &CellProblem,
    k: f64,
    nbands: usize,
) -> Result<Vec<f64>, BandsError> {
    if !k.is_finite() {
        return Err(BandsError::NonFiniteWavevector { k });
    }
    let available = cell.points();
    if nbands > available {
        return Err(BandsError::TooFewBands {
            asked: nbands,
            available,
        });
    }
    let h = bloch_hamiltonian(cell, k);
    let mut values: Vec<f64> = h.symmetric_eigenvalues().iter().copied().collect();
    values.sort_by(f64::total_cmp);
    values.truncate(nbands);
    Ok(values)
}

/// Band energies of the lowest `nbands` bands at `kpoints` equally spaced
/// wavevectors `k_i = (i / (kpoints - 1)) pi / a`, `i = 0..kpoints-1`.
///
/// `kpoints >= 2` (the grid always holds `0` and `pi / a`). The k points are
/// solved in parallel with rayon; each point is an independent deterministic
/// computation collected in order, so the result is bit-identical for any
/// number of threads.
pub fn band_structure(
    cell: &CellProblem,
    kpoints: usize,
    nbands: usize,
) -> Result<BandStructure, BandsError> {
    cell.validate()?;
    if kpoints < 2 {
        return Err(BandsError::TooFewKpoints { kpoints });
    }
    if nbands > cell.points() {
        return Err(BandsError::TooFewBands {
            asked: nbands,
            available: cell.points(),
        });
    }
    let edge = cell.zone_edge();
    let last = (kpoints - 1) as f64;
    let k: Vec<f64> = (0..kpoints)
        .map(|i| {
            if i + 1 == kpoints {
                edge
            } else {
                (i as f64 / last) * edge
            }
        })
        .collect();
    let per_k: Vec<Vec<f64>> = k
        .par_iter()
        .map(|&kk| solve_validated(cell, kk, nbands))
        .collect::<Result<_, _>>()?;
    let bands = (0..nbands)
        .map(|b| per_k.iter().map(|levels| levels[b]).collect())
        .collect();
    Ok(BandStructure { k, bands })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::constants::hbar2_over_2me_ev_a2;
    use approx::assert_relative_eq;
    use proptest::prelude::*;

    // Central second-derivative weights, Fornberg, Math. Comp. 51, 699 (1988), table 1.
    const W2: [f64; 2] = [-2.0, 1.0];
    const W4: [f64; 3] = [-5.0 / 2.0, 4.0 / 3.0, -1.0 / 12.0];
    const W6: [f64; 4] = [-49.0 / 18.0, 3.0 / 2.0, -3.0 / 20.0, 1.0 / 90.0];
    const W8: [f64; 5] = [
        -205.0 / 72.0,
        8.0 / 5.0,
        -1.0 / 5.0,
        8.0 / 315.0,
        -1.0 / 560.0,
    ];

    fn free_cell<'a>(v: &'a [f64], w: &'a [f64], a: f64) -> CellProblem<'a> {
        CellProblem {
            potential: v,
            period: a,
            kinetic: hbar2_over_2me_ev_a2(),
            weights: w,
        }
    }

    /// Sorted folded free-particle energies `t (k + 2 pi j / a)^2`.
    fn folded_parabolas(t: f64, a: f64, k: f64, n: usize) -> Vec<f64> {
        let mut e: Vec<f64> = (-(n as i64)..=(n as i64))
            .map(|j| {
                let q = k + 2.0 * PI * j as f64 / a;
                t * q * q
            })
            .collect();
        e.sort_by(f64::total_cmp);
        e.truncate(n);
        e
    }

    /// Exact eigenvalues of the discrete V = 0 problem: plane waves
    /// `e^{i q x_j}`, `q = k + 2 pi j / a`, `j = 0..M-1`, give
    /// `(t/h^2) (-c_0 - 2 sum_d c_d cos(q d h))` (closed form, direct substitution).
    fn discrete_free(t: f64, a: f64, m: usize, w: &[f64], k: f64) -> Vec<f64> {
        let h = a / m as f64;
        let mut e: Vec<f64> = (0..m)
            .map(|j| {
                let q = k + 2.0 * PI * j as f64 / a;
                let s: f64 = w
                    .iter()
                    .enumerate()
                    .skip(1)
                    .map(|(d, c)| c * (q * d as f64 * h).cos())
                    .sum();
                t / (h * h) * (-w[0] - 2.0 * s)
            })
            .collect();
        e.sort_by(f64::total_cmp);
        e
    }

    #[test]
    fn hamiltonian_is_hermitian_with_bloch_corner_phases() {
        let v: Vec<f64> = (0..12).map(|j| (j as f64 * 0.7).sin()).collect();
        let cell = free_cell(&v, &W6, 3.0);
        let k = 0.37;
        let h = bloch_hamiltonian(&cell, k);
        let diff = (&h - h.adjoint()).camax();
        assert!(diff < 1e-12, "H - H^dagger = {diff}");
        // Corner element (M-1, 0): neighbour d = +1 of the last point wraps once,
        // so it carries -(t/h^2) c_1 e^{i k a} (the Bloch condition as stated).
        let sp = 3.0 / 12.0;
        let expect =
            Complex::new((k * 3.0).cos(), (k * 3.0).sin()) * (-cell.kinetic / (sp * sp) * W6[1]);
        assert_relative_eq!(h[(11, 0)].re, expect.re, max_relative = 1e-14);
        assert_relative_eq!(h[(11, 0)].im, expect.im, max_relative = 1e-14);
    }

    #[test]
    fn free_particle_matches_folded_parabolas_at_order_8() {
        // Order 2p: the plane-wave eigenvalue has relative error
        // 2 (p!)^2 / (2p+2)! (q h)^{2p} (Taylor expansion of the stencil symbol),
        // 3.2e-4 (q h)^8 for p = 4. Six bands reach |q| = 5 pi / a, so with
        // M = 96, q h <= 5 pi / 96 = 0.164 and the error is below 2e-10.
        let a = 2.8;
        let m = 96;
        let v = vec![0.0; m];
        let cell = free_cell(&v, &W8, a);
        let nb = 6;
        let bs = band_structure(&cell, 17, nb).unwrap();
        let mut worst: f64 = 0.0;
        for (i, &k) in bs.k.iter().enumerate() {
            let exact = folded_parabolas(cell.kinetic, a, k, nb);
            for (b, &ex) in exact.iter().enumerate() {
                let e = bs.bands[b][i];
                if ex == 0.0 {
                    // k = 0, band 1: E = 0 exactly (closed form).
                    assert!(e.abs() < 1e-10, "E = {e} at k = 0");
                } else {
                    let rel = (e - ex).abs() / ex;
                    worst = worst.max(rel);
                    assert!(rel < 1e-8, "band {} k {k}: {e} vs {ex}", b + 1);
                }
            }
        }
        eprintln!("free particle order 8, M = {m}: worst relative error {worst:e}");
    }

    #[test]
    fn free_particle_matches_discrete_dispersion_all_orders() {
        let a = 2.8;
        let m = 40;
        let v = vec![0.0; m];
        for w in [&W2[..], &W4[..], &W6[..], &W8[..]] {
            let cell = free_cell(&v, w, a);
            let mut worst: f64 = 0.0;
            for k in [0.0, 0.13, 0.5, cell.zone_edge()] {
                let got = solve_k(&cell, k, m).unwrap();
                let exact = discrete_free(cell.kinetic, a, m, w, k);
                for (g, e) in got.iter().zip(&exact) {
                    // closed form above; E = 0 only at k = 0 for the lowest level
                    if e.abs() < 1e-9 {
                        assert!(g.abs() < 1e-10, "{g} vs 0");
                    } else {
                        let rel = (g - e).abs() / e.abs();
                        worst = worst.max(rel);
                        assert!(rel < 1e-10, "order {}: {g} vs {e}", 2 * (w.len() - 1));
                    }
                }
            }
            eprintln!(
                "discrete dispersion order {}: worst relative {worst:e}",
                2 * (w.len() - 1)
            );
        }
    }

    /// Kronig-Penney function: `cos(k a)` equals this at a band energy `e`
    /// for wells of depth `v0` and width `b` alternating with barriers of
    /// height 0 and width `c` (R. de L. Kronig and W. G. Penney, Proc. R.
    /// Soc. A 130, 499 (1931); Kittel ch. 7). Inside the well
    /// `alpha = sqrt((e + v0)/t)`; in the barrier `beta = sqrt(e/t)` for
    /// `e > 0`, or `beta = i kappa` for `e < 0`, which turns cos/sin into
    /// cosh/sinh.
    fn kronig_penney(t: f64, v0: f64, b: f64, c: f64, e: f64) -> f64 {
        let alpha = ((e + v0) / t).sqrt();
        if e > 0.0 {
            let beta = (e / t).sqrt();
            (alpha * b).cos() * (beta * c).cos()
                - (alpha * alpha + beta * beta) / (2.0 * alpha * beta)
                    * (alpha * b).sin()
                    * (beta * c).sin()
        } else {
            let kappa = (-e / t).sqrt();
            (alpha * b).cos() * (kappa * c).cosh()
                + (kappa * kappa - alpha * alpha) / (2.0 * alpha * kappa)
                    * (alpha * b).sin()
                    * (kappa * c).sinh()
        }
    }

    /// The lowest `n` roots of `kronig_penney(e) = target` above `-v0`, by a
    /// scan in 1 meV steps and bisection of each sign change.
    fn kp_roots(t: f64, v0: f64, b: f64, c: f64, target: f64, n: usize) -> Vec<f64> {
        let g = |e: f64| kronig_penney(t, v0, b, c, e) - target;
        let mut roots = Vec::new();
        let step = 1e-3;
        let mut lo = -v0 + 1e-7;
        while roots.len() < n && lo < 50.0 {
            let hi = lo + step;
            if g(lo) * g(hi) < 0.0 {
                let (mut x0, mut x1) = (lo, hi);
                for _ in 0..100 {
                    let mid = 0.5 * (x0 + x1);
                    if g(x0) * g(mid) <= 0.0 {
                        x1 = mid;
                    } else {
                        x0 = mid;
                    }
                }
                roots.push(0.5 * (x0 + x1));
            }
            lo = hi;
        }
        roots
    }

    /// Largest error of bands 1-2 at k = 0 and pi/a against the Kronig-Penney
    /// roots, relative to the energy above the well bottom `E + V0` (what the
    /// discretisation error scales with).
    fn kp_worst_error(m: usize, a: f64, v0: f64) -> f64 {
        let v: Vec<f64> = (0..m).map(|j| if j < m / 2 { -v0 } else { 0.0 }).collect();
        let cell = free_cell(&v, &W2, a);
        let t = cell.kinetic;
        let mut worst: f64 = 0.0;
        for (k, target) in [(0.0, 1.0), (PI / a, -1.0)] {
            let exact = kp_roots(t, v0, a / 2.0, a / 2.0, target, 2);
            assert_eq!(exact.len(), 2);
            for &e in &exact {
                // the roots really solve cos(ka) = f(E)
                assert!((kronig_penney(t, v0, a / 2.0, a / 2.0, e) - (k * a).cos()).abs() < 1e-9);
            }
            let got = solve_k(&cell, k, 2).unwrap();
            for b in 0..2 {
                let rel = (got[b] - exact[b]).abs() / (exact[b] + v0);
                worst = worst.max(rel);
            }
        }
        worst
    }

    #[test]
    fn square_wells_match_kronig_penney_equation() {
        // Well of depth 3 eV on the first half of a 5 Å cell, order 2 stencil.
        // With M even the points j < M/2 are in the well, so the sampled well
        // spans exactly a/2 (interfaces half-way between points) and the error
        // is O(h^2): the stencil error plus the step discontinuity. The brief
        // expected ~1e-3 relative at M = 400; measured 1.9e-5 (relative to
        // E + V0), so the test allows 1e-4, and halving M must raise the
        // error by about 4 (second order).
        let fine = kp_worst_error(400, 5.0, 3.0);
        let coarse = kp_worst_error(200, 5.0, 3.0);
        eprintln!("Kronig-Penney worst relative error: M=400 {fine:e}, M=200 {coarse:e}");
        assert!(fine < 1e-4, "{fine}");
        let ratio = coarse / fine;
        assert!((3.0..5.0).contains(&ratio), "convergence ratio {ratio}");
    }

    #[test]
    fn band_structure_grid_and_shape() {
        let v = vec![0.1; 16];
        let cell = free_cell(&v, &W4, 2.0);
        let bs = band_structure(&cell, 5, 3).unwrap();
        assert_eq!(bs.k.len(), 5);
        assert_eq!(bs.k[0], 0.0);
        assert_eq!(bs.k[4], PI / 2.0);
        assert_eq!(bs.bands.len(), 3);
        assert!(bs.bands.iter().all(|b| b.len() == 5));
    }

    #[test]
    fn result_is_identical_for_any_thread_count() {
        let v: Vec<f64> = (0..24).map(|j| -(j as f64 * 0.3).cos()).collect();
        let cell = free_cell(&v, &W4, 3.0);
        let run = |threads: usize| {
            rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap()
                .install(|| band_structure(&cell, 9, 4).unwrap())
        };
        let one = run(1);
        let three = run(3);
        assert_eq!(one, three);
    }

    #[test]
    fn bad_inputs_are_errors() {
        let v = vec![0.0; 4];
        let cell = free_cell(&v, &W4, 2.0);
        assert!(matches!(
            solve_k(&cell, 0.0, 1),
            Err(BandsError::TooFewPoints {
                points: 4,
                needed: 5
            })
        ));
        let v = vec![0.0, 1.0, f64::NAN, 0.0, 0.0, 0.0];
        let cell = free_cell(&v, &W2, 2.0);
        assert!(matches!(
            solve_k(&cell, 0.0, 1),
            Err(BandsError::NonFinitePotential { index: 2 })
        ));
        let v = vec![0.0; 6];
        assert!(matches!(
            solve_k(&free_cell(&v, &W2, 0.0), 0.0, 1),
            Err(BandsError::BadPeriod { .. })
        ));
        assert!(matches!(
            solve_k(&free_cell(&v, &W2, 2.0), 0.0, 7),
            Err(BandsError::TooFewBands {
                asked: 7,
                available: 6
            })
        ));
        assert!(matches!(
            band_structure(&free_cell(&v, &W2, 2.0), 1, 1),
            Err(BandsError::TooFewKpoints { kpoints: 1 })
        ));
        assert!(matches!(
            solve_k(&free_cell(&v, &W2, 2.0), f64::INFINITY, 1),
            Err(BandsError::NonFiniteWavevector { .. })
        ));
        let mut bad = free_cell(&v, &W2, 2.0);
        bad.kinetic = -1.0;
        assert!(matches!(
            solve_k(&bad, 0.0, 1),
            Err(BandsError::BadKinetic { .. })
        ));
        assert!(matches!(
            solve_k(&free_cell(&v, &[1.0], 2.0), 0.0, 1),
            Err(BandsError::BadWeights { count: 1 })
        ));
        // The raw builder never panics, even on an empty cell.
        assert_eq!(bloch_hamiltonian(&free_cell(&[], &W2, 2.0), 0.0).nrows(), 0);
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(24))]

        // Evenness and 2 pi / a periodicity of the bands (Bloch's theorem;
        // Ashcroft & Mermin ch. 8), solved directly at -k and k + 2 pi / a.
        #[test]
        fn bands_are_even_and_periodic(
            v in proptest::collection::vec(-3.0f64..3.0, 12..20),
            a in 1.0f64..6.0,
            frac in -1.0f64..1.0,
        ) {
            let cell = free_cell(&v, &W4, a);
            let k = frac * PI / a;
            let n = 4;
            let e = solve_k(&cell, k, n).unwrap();
            let em = solve_k(&cell, -k, n).unwrap();
            let ep = solve_k(&cell, k + 2.0 * PI / a, n).unwrap();
            let tol = 1e3 * cell.eigenvalue_noise();
            for b in 0..n {
                prop_assert!((e[b] - em[b]).abs() <= tol, "even: {} vs {}", e[b], em[b]);
                prop_assert!((e[b] - ep[b]).abs() <= tol, "periodic: {} vs {}", e[b], ep[b]);
            }
        }

        // Hermiticity for arbitrary cells and k (construction argument in the module docs).
        #[test]
        fn hamiltonian_is_always_hermitian(
            v in proptest::collection::vec(-5.0f64..5.0, 3..15),
            k in -10.0f64..10.0,
        ) {
            let cell = free_cell(&v, &W8, 2.5);
            let h = bloch_hamiltonian(&cell, k);
            prop_assert!((&h - h.adjoint()).camax() <= 1e-12 * cell.norm_bound());
        }
    }
}
