//! The discretised Hamiltonian `H = -(hbar²/2m) d²/dx² + V(x)` on a grid.
//!
//! **Finite differences.** The central stencil of order `2p` (weights from
//! [`crate::grid::second_derivative_weights`], Fornberg 1988) gives a symmetric
//! matrix of half-bandwidth `p`:
//! `H_ii = -t c_0 / h² + V_i`, `H_{i,i±d} = -t c_d / h²`, `t = hbar²/2m`.
//! Near a hard wall the stencil reaches past the wall; there the wavefunction
//! is continued by odd reflection, `psi(w - s) = -psi(w + s)`, which keeps the
//! matrix symmetric and makes the box's sine states exact eigenvectors. On a
//! ring the stencil wraps around.
//!
//! **Numerov.** In the matrix form of M. Pillai, J. Goglio and T. G. Walker,
//! Am. J. Phys. 80, 1017 (2012): `A = (T - 2I)/h²`, `B = (T + 10 I)/12` with
//! `T` the nearest-neighbour shift, and `(-t A + B V) psi = E B psi`. With
//! `psi = B phi` this becomes the symmetric-definite pair
//! `K phi = E M phi`, `K = -t A B + B V B`, `M = B²` (A and B commute: both are
//! polynomials in `T`), pentadiagonal and fourth order.

use crate::eigen::SymBanded;
use crate::grid::kink::{corner_entries, Corner};
use crate::grid::{second_derivative_weights, Grid, Order};
use crate::grid::{Boundary, Scheme};

/// A discretised eigenproblem `A x = E B x` and how to recover `psi` from `x`.
#[derive(Debug, Clone)]
pub struct Discretisation {
    /// The Hamiltonian (finite differences) or `K` (Numerov).
    pub a: SymBanded,
    /// `M = B²` for Numerov; `None` (identity) for finite differences.
    pub b: Option<SymBanded>,
    /// Numerov's `B`, mapping the solution `phi` to `psi = B phi`.
    pub to_psi: Option<SymBanded>,
}

impl Discretisation {
    /// The wavefunction values from an eigenvector of the pair.
    pub fn psi(&self, x: Vec<f64>) -> Vec<f64> {
        match &self.to_psi {
            // Finite differences: the eigenvector is psi (no copy).
            None => x,
            Some(b) => {
                let mut y = vec![0.0; x.len()];
                mul(b, &x, &mut y);
                y
            }
        }
    }
}

/// Builds the discretisation of `-t d²/dx² + V` on `grid`, with `v` the
/// potential at the grid's unknowns (eV) and `kinetic = t = hbar²/2m` (eV Å²).
///
/// # Panics
/// If `v.len() != grid.points`, or the grid is too small for the stencil
/// (the checked input guarantees neither happens).
#[track_caller]
pub fn build(grid: &Grid, v: &[f64], kinetic: f64, order: Order, scheme: Scheme) -> Discretisation {
    assert_eq!(v.len(), grid.points, "one potential value per unknown");
    match scheme {
        Scheme::FiniteDifference => Discretisation {
            a: finite_difference(grid, v, kinetic, order),
            b: None,
            to_psi: None,
        },
        Scheme::Numerov => numerov(grid, v, kinetic),
    }
}

fn finite_difference(grid: &Grid, v: &[f64], kinetic: f64, order: Order) -> SymBanded {
    let n = grid.points;
    let c = second_derivative_weights(order);
    let p = order.half_width();
    let s = kinetic / (grid.spacing * grid.spacing);
    let wrap = grid.boundary == Boundary::Periodic;
    assert!(
        n > 2 * p,
        "grid of {n} points too small for a stencil of half-width {p}"
    );
    let mut bands: Vec<Vec<f64>> = Vec::with_capacity(p + 1);
    bands.push(v.iter().map(|vi| vi - s * c[0]).collect());
    for (d, cd) in c.iter().enumerate().skip(1) {
        let len = if wrap { n } else { n - d };
        bands.push(vec![-s * cd; len]);
    }
    if !wrap {
        // Odd reflection at both walls: the ghost value psi_{m-d} (1-based
        // m, m - d <= -1) is -psi_{d-m}; the ghost beyond the right wall
        // psi_{m+d} (m + d >= N + 2) is -psi_{2N+2-m-d}. Each such coupling
        // is one symmetric matrix element, stored once (from the row with
        // the smaller index).
        for r in 0..n {
            let m = r + 1;
            for (d, cd) in c.iter().enumerate().skip(1) {
                if d > m {
                    let col = d - m - 1;
                    add_sym(&mut bands, r, col, s * cd);
                }
                if m + d >= n + 2 {
                    let col = 2 * n - r - d;
                    add_sym(&mut bands, r, col, s * cd);
                }
            }
        }
    }
    SymBanded { n, bands, wrap }
}

/// Adds the symmetric part of the corner corrections
/// ([`crate::grid::kink`]) to a finite-difference Hamiltonian of `order` on
/// `grid`, `kinetic = hbar²/2m`. Each corner must lie at least `2p` points
/// from a wall (its entries reach `p - 1` rows and one column beyond the
/// corner); on a ring the entries wrap.
///
/// # Panics
/// If a corner's entries fall outside the matrix (a corner too close to a
/// wall, which the pipeline never passes).
#[track_caller]
pub fn correct_corners(
    a: &mut SymBanded,
    grid: &Grid,
    corners: &[Corner],
    order: Order,
    kinetic: f64,
) {
    let n = a.n as isize;
    for corner in corners {
        for (r, c, value) in corner_entries(corner, order, grid.spacing, kinetic) {
            let (row, col) = (corner.index as isize + r, corner.index as isize + c);
            let (row, col) = if a.wrap {
                (row.rem_euclid(n), col.rem_euclid(n))
            } else {
                assert!(
                    (0..n).contains(&row) && (0..n).contains(&col),
                    "corner at unknown {} too close to a wall",
                    corner.index
                );
                (row, col)
            };
            // C_sym = (C + C^T) / 2: an off-diagonal entry adds half of
            // itself to the one stored element of the pair.
            let share = if row == col { value } else { 0.5 * value };
            add_element(a, row as usize, col as usize, share);
        }
    }
}

/// Adds `value` to the stored element `(i, j)` (= `(j, i)`) of a symmetric
/// banded matrix, wrapped couplings included.
fn add_element(a: &mut SymBanded, i: usize, j: usize, value: f64) {
    let n = a.n;
    let p = a.bands.len() - 1;
    if a.wrap {
        let d = (j + n - i) % n;
        if d <= p {
            a.bands[d][i] += value;
        } else {
            a.bands[(i + n - j) % n][j] += value;
        }
    } else {
        let (lo, hi) = if i <= j { (i, j) } else { (j, i) };
        a.bands[hi - lo][lo] += value;
    }
}

fn add_sym(bands: &mut [Vec<f64>], r: usize, c: usize, value: f64) {
    if c >= r {
        bands[c - r][r] += value;
    }
}

fn numerov(grid: &Grid, v: &[f64], kinetic: f64) -> Discretisation {
    let n = grid.points;
    let wrap = grid.boundary == Boundary::Periodic;
    let h2 = grid.spacing * grid.spacing;
    let off_len = if wrap { n } else { n - 1 };
    let a = SymBanded {
        n,
        bands: vec![vec![-2.0 / h2; n], vec![1.0 / h2; off_len]],
        wrap,
    };
    let b = SymBanded {
        n,
        bands: vec![vec![10.0 / 12.0; n], vec![1.0 / 12.0; off_len]],
        wrap,
    };
    let ab = product(&a, None, &b);
    let bvb = product(&b, Some(v), &b);
    let mut k = ab;
    for (kb, vb) in k.bands.iter_mut().zip(&bvb.bands) {
        for (x, y) in kb.iter_mut().zip(vb) {
            *x = -kinetic * *x + y;
        }
    }
    let m = product(&b, None, &b);
    Discretisation {
        a: k,
        b: Some(m),
        to_psi: Some(b),
    }
}

/// Element `(i, j)` of a symmetric banded matrix (0 outside the band).
fn get(m: &SymBanded, i: usize, j: usize) -> f64 {
    let n = m.n;
    let p = m.bands.len() - 1;
    let (lo, hi) = if i <= j { (i, j) } else { (j, i) };
    let mut total = 0.0;
    let d = hi - lo;
    if d <= p && hi < n {
        total += if d == 0 {
            m.bands[0][lo]
        } else {
            m.bands[d][lo]
        };
    }
    if m.wrap && d > 0 {
        // The wrapped coupling from `hi` forward to `lo`: distance n - d.
        let dw = n - d;
        if dw <= p {
            total += m.bands[dw][hi];
        }
    }
    total
}

/// `X diag(w) Y` for symmetric banded `X`, `Y` whose product is symmetric
/// (they commute here), banded with the summed half-bandwidth.
fn product(x: &SymBanded, w: Option<&[f64]>, y: &SymBanded) -> SymBanded {
    let n = x.n;
    let px = x.bands.len() - 1;
    let py = y.bands.len() - 1;
    let p = px + py;
    let wrap = x.wrap;
    let mut bands = Vec::with_capacity(p + 1);
    for d in 0..=p {
        let len = if wrap { n } else { n - d.min(n) };
        let mut band = vec![0.0; len];
        for (i, out) in band.iter_mut().enumerate() {
            let j = if wrap { (i + d) % n } else { i + d };
            let mut sum = 0.0;
            for off in -(px as isize)..=(px as isize) {
                let k = i as isize + off;
                let k = if wrap {
                    k.rem_euclid(n as isize) as usize
                } else if k < 0 || k >= n as isize {
                    continue;
                } else {
                    k as usize
                };
                let wk = w.map_or(1.0, |w| w[k]);
                sum += get(x, i, k) * wk * get(y, k, j);
            }
            *out = sum;
        }
        bands.push(band);
    }
    SymBanded { n, bands, wrap }
}

fn mul(m: &SymBanded, x: &[f64], y: &mut [f64]) {
    let n = m.n;
    for (i, yi) in y.iter_mut().enumerate() {
        let mut s = 0.0;
        let lo = i.saturating_sub(m.bands.len() - 1);
        let hi = (i + m.bands.len()).min(n);
        for (j, xj) in x.iter().enumerate().take(hi).skip(lo) {
            s += get(m, i, j) * xj;
        }
        if m.wrap {
            let p = m.bands.len() - 1;
            for d in 1..=p {
                let j = (i + n - d) % n;
                if j > i {
                    s += get(m, i, j) * x[j];
                }
                let j = (i + d) % n;
                if j < i {
                    s += get(m, i, j) * x[j];
                }
            }
        }
        *yi = s;
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::grid::dispersion;
    use crate::grid::Domain;
    use approx::assert_relative_eq;
    use nalgebra::DMatrix;
    use std::f64::consts::PI;

    fn box_grid(points: usize, boundary: Boundary) -> Grid {
        Grid::with_points(
            &Domain {
                from: 0.0,
                to: 10.0,
                boundary,
            },
            points,
        )
    }

    #[test]
    fn sine_states_are_exact_eigenvectors_with_walls() {
        // The odd reflection makes sin(n pi x / L) an exact eigenvector with
        // the stencil's discrete dispersion as eigenvalue (closed form).
        for order in Order::ALLOWED {
            let order = Order::new(order).unwrap();
            let g = box_grid(40, Boundary::Walls);
            let h = build(&g, &vec![0.0; 40], 1.0, order, Scheme::FiniteDifference)
                .a
                .to_dense();
            assert_eq!(h.clone(), h.transpose(), "symmetric");
            let w = second_derivative_weights(order);
            for n in [1usize, 2, 7, 20] {
                let q = n as f64 * PI / 10.0;
                let psi: Vec<f64> = g.positions().iter().map(|x| (q * x).sin()).collect();
                let psi = nalgebra::DVector::from_vec(psi);
                let lambda = dispersion(&w, q, g.spacing);
                let r = &h * &psi - lambda * &psi;
                assert!(
                    r.amax() < 1e-10 * lambda,
                    "order {order} n {n}: {}",
                    r.amax()
                );
            }
        }
    }

    #[test]
    fn ring_matrix_is_circulant() {
        let g = box_grid(12, Boundary::Periodic);
        let h = build(
            &g,
            &[0.0; 12],
            1.0,
            Order::new(8).unwrap(),
            Scheme::FiniteDifference,
        )
        .a
        .to_dense();
        for i in 0..12 {
            for j in 0..12 {
                assert_relative_eq!(h[(i, j)], h[((i + 1) % 12, (j + 1) % 12)], epsilon = 1e-12);
            }
        }
    }

    #[test]
    fn numerov_pair_matches_dense_products() {
        for boundary in [Boundary::Walls, Boundary::Periodic] {
            let n = 9;
            let g = box_grid(n, boundary);
            let v: Vec<f64> = (0..n).map(|i| (i as f64 * 0.7).sin()).collect();
            let d = build(&g, &v, 2.0, Order::new(4).unwrap(), Scheme::Numerov);
            let h2 = g.spacing * g.spacing;
            let mut t = DMatrix::<f64>::zeros(n, n);
            for i in 0..n {
                if boundary == Boundary::Periodic {
                    t[(i, (i + 1) % n)] = 1.0;
                    t[(i, (i + n - 1) % n)] = 1.0;
                } else {
                    if i + 1 < n {
                        t[(i, i + 1)] = 1.0;
                    }
                    if i > 0 {
                        t[(i, i - 1)] = 1.0;
                    }
                }
            }
            let id = DMatrix::<f64>::identity(n, n);
            let a = (&t - 2.0 * &id) / h2;
            let b = (&t + 10.0 * &id) / 12.0;
            let vd = DMatrix::from_diagonal(&nalgebra::DVector::from_vec(v.clone()));
            let k = -2.0 * &a * &b + &b * &vd * &b;
            let m = &b * &b;
            assert!((d.a.to_dense() - k).amax() < 1e-9, "{boundary:?}: K");
            assert!(
                (d.b.as_ref().unwrap().to_dense() - m).amax() < 1e-12,
                "{boundary:?}: M"
            );
        }
    }
}
