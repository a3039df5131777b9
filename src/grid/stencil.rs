//! Central finite-difference weights for the second derivative.
//!
//! The weights of the symmetric `2p+1`-point stencil of accuracy order `2p`,
//! `f''(x) ≈ h⁻² Σ_{d=-p}^{p} c_|d| f(x + d h)`, are computed by Fornberg's
//! recursion (B. Fornberg, "Generation of finite difference formulas on
//! arbitrarily spaced grids", Math. Comp. 51, 699–706 (1988)) in exact
//! arithmetic on the offsets `-p..p`, then checked against the tabulated values
//! in the tests.

use std::fmt;

/// Accuracy order of a finite-difference scheme: 2, 4, 6 or 8.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(into = "u32")]
pub struct Order(u32);

impl Order {
    /// The orders chainwell offers.
    pub const ALLOWED: [u32; 4] = [2, 4, 6, 8];

    /// The order, if it is one of [`Order::ALLOWED`].
    pub fn new(order: u32) -> Option<Self> {
        Self::ALLOWED.contains(&order).then_some(Self(order))
    }

    /// The order as a number.
    pub fn get(self) -> u32 {
        self.0
    }

    /// Half-width `p` of the stencil (order / 2): the Hamiltonian's half-bandwidth.
    pub fn half_width(self) -> usize {
        (self.0 / 2) as usize
    }
}

impl From<Order> for u32 {
    fn from(o: Order) -> u32 {
        o.0
    }
}

impl fmt::Display for Order {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        self.0.fmt(f)
    }
}

/// Weights `c_0 .. c_p` of the central second-derivative stencil of the given
/// order, for unit spacing: `f'' ≈ (c_0 f_0 + Σ_{d≥1} c_d (f_d + f_{-d})) / h²`.
///
/// ```
/// use chainwell::grid::{second_derivative_weights, Order};
/// // The five-point stencil: (-1/12, 4/3, -5/2, 4/3, -1/12).
/// let w = second_derivative_weights(Order::new(4).unwrap());
/// assert!((w[0] + 2.5).abs() < 1e-14 && (w[1] - 4.0 / 3.0).abs() < 1e-14);
/// ```
pub fn second_derivative_weights(order: Order) -> Vec<f64> {
    let p = order.half_width() as i64;
    let offsets: Vec<f64> = (-p..=p).map(|d| d as f64).collect();
    let w = fornberg(0.0, &offsets, 2);
    // Index of offset d is d + p.
    (0..=p as usize).map(|d| w[2][d + p as usize]).collect()
}

/// Fornberg's algorithm: weights `w[m][j]` of the `m`-th derivative at `z`
/// from values at `x[j]`, for `m = 0..=max_derivative` (any distinct
/// nodes, one-sided ones included).
pub fn fornberg(z: f64, x: &[f64], max_derivative: usize) -> Vec<Vec<f64>> {
    let n = x.len();
    let mut c = vec![vec![0.0; n]; max_derivative + 1];
    c[0][0] = 1.0;
    let mut c1 = 1.0;
    let mut c4 = x[0] - z;
    for i in 1..n {
        let mn = i.min(max_derivative);
        let mut c2 = 1.0;
        let c5 = c4;
        c4 = x[i] - z;
        for j in 0..i {
            let c3 = x[i] - x[j];
            c2 *= c3;
            if j == i - 1 {
                for k in (1..=mn).rev() {
                    c[k][i] = c1 * (k as f64 * c[k - 1][i - 1] - c5 * c[k][i - 1]) / c2;
                }
                c[0][i] = -c1 * c5 * c[0][i - 1] / c2;
            }
            for k in (1..=mn).rev() {
                c[k][j] = (c4 * c[k][j] - k as f64 * c[k - 1][j]) / c3;
            }
            c[0][j] = c4 * c[0][j] / c3;
        }
        c1 = c2;
    }
    c
}

/// The discrete dispersion of the stencil: the eigenvalue of `-D2` on the
/// plane wave `e^{i q x}`, `(-c_0 - 2 Σ c_d cos(q d h)) / h²`. It equals `q²`
/// up to `O(h^order)`, and it is exactly the eigenvalue of the hard-wall
/// matrix for `q = n pi / L` (the odd reflection at the walls makes the sine
/// states exact eigenvectors).
pub fn dispersion(weights: &[f64], q: f64, h: f64) -> f64 {
    let mut s = -weights[0];
    for (d, c) in weights.iter().enumerate().skip(1) {
        s -= 2.0 * c * (q * d as f64 * h).cos();
    }
    s / (h * h)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn weights_match_the_published_table() {
        // Fornberg (1988), Table 1, second derivative, centred.
        let table: [(u32, &[f64]); 4] = [
            (2, &[-2.0, 1.0]),
            (4, &[-5.0 / 2.0, 4.0 / 3.0, -1.0 / 12.0]),
            (6, &[-49.0 / 18.0, 3.0 / 2.0, -3.0 / 20.0, 1.0 / 90.0]),
            (
                8,
                &[
                    -205.0 / 72.0,
                    8.0 / 5.0,
                    -1.0 / 5.0,
                    8.0 / 315.0,
                    -1.0 / 560.0,
                ],
            ),
        ];
        for (order, expected) in table {
            let w = second_derivative_weights(Order::new(order).unwrap());
            assert_eq!(w.len(), expected.len());
            for (a, b) in w.iter().zip(expected) {
                assert_relative_eq!(a, b, max_relative = 1e-13);
            }
        }
    }

    #[test]
    fn dispersion_error_falls_with_the_stencil_order() {
        // The stencil's truncation error on e^{iqx} is O((qh)^order): halving h
        // divides it by about 2^order (common practice, no source).
        for order in Order::ALLOWED {
            let w = second_derivative_weights(Order::new(order).unwrap());
            let q = 1.0;
            let err = |h: f64| (dispersion(&w, q, h) - q * q).abs();
            let (h1, h2) = (0.2, 0.1);
            let ratio = err(h1) / err(h2);
            let expected = 2f64.powi(order as i32);
            assert!(
                (ratio / expected - 1.0).abs() < 0.1,
                "order {order}: ratio {ratio}, expected {expected}"
            );
        }
    }

    #[test]
    fn only_even_orders_two_to_eight_exist() {
        assert!(Order::new(3).is_none());
        assert!(Order::new(10).is_none());
        assert_eq!(Order::new(6).unwrap().half_width(), 3);
    }
}
