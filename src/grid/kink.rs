//! Corrections of the central stencil at corners of the potential that sit
//! on grid points.
//!
//! Where `V` is continuous but its slope jumps (a corner) at `c = x_k`, the
//! wavefunction is `C²` there but `ψ'''` jumps: from
//! `-t ψ'' + (V - E) ψ = 0` (`t = ħ²/2m`), the jumps `J_m = [ψ^(m)]`
//! (right minus left limit) are
//!
//! ```text
//! t J_3 = [V'] ψ
//! t J_4 = [V''] ψ + 2 [V'] ψ'
//! t J_5 = [V'''] ψ + 3 [V''] ψ' + 4 [V'] ψ''
//! ```
//!
//! at `c` (the last uses `(V(c) - E) ψ(c) = t ψ''(c)` to remove `E`). On the
//! far side of `c`, `ψ` is the smooth continuation of the near side plus
//! `Σ_m J_m s^m / m!`, `s = x - c`; a central stencil that straddles `c`
//! therefore errs at row `k ± j` (`j < p`) by the defect
//!
//! ```text
//! δ_{k-j} = Σ_m J_m h^(m-2) A_{m,j},   δ_{k+j} = Σ_m (-1)^(m+1) J_m h^(m-2) A_{m,j},
//! A_{m,j} = Σ_{d=j+1}^{p} c_d (d - j)^m / m!
//! ```
//!
//! (at `j = 0` both sides agree for odd `m`; for even `m` their mean, 0, is
//! used, and `A_{4,0} = 0` for every stencil of order 4 or more). This is
//! the jump-correction idea of the immersed interface method (R. J. LeVeque
//! and Z. Li, SIAM J. Numer. Anal. 31, 1019 (1994)) applied to a corner of
//! the potential rather than of the coefficient. Subtracting `δ` from the
//! stencil, with `ψ(c) = ψ_k`, `ψ'(c) ≈ (ψ_{k+1} - ψ_{k-1}) / 2h` and
//! `ψ''(c) ≈ (ψ_{k+1} - 2ψ_k + ψ_{k-1}) / h² - h J_3 / 6` (each accurate to
//! `O(h²)`, which is enough: they enter with a factor `h²` or `h³`), adds to
//! the Hamiltonian a few entries in rows `k - p + 1 ..= k + p - 1` and
//! columns `k - 1 ..= k + 1`, all inside the band. The entries are not
//! symmetric; their symmetric part is used, which moves each level by the
//! same first-order amount (`zᵀ C z = zᵀ (C + Cᵀ)/2 z`) and keeps the
//! problem symmetric for the eigen-solvers.
//!
//! What is left is the jump of `ψ^(6)`, which enters a level at `O(h^6)`:
//! a corrected corner limits a stencil to order [`CORRECTED_ORDER`] (the
//! uncorrected corner to order 2, measured in
//! [`crate::potential::BreakKind`]). The same correction removes a weak
//! break (only `[V''']` nonzero), which would otherwise cost orders 6 and 8
//! down to 4.

use super::{second_derivative_weights, Order};

/// The order of a level's error that a corrected corner leaves: the jump of
/// `ψ^(6)` is not corrected (see the module docs).
pub const CORRECTED_ORDER: u32 = 6;

/// A corner of the potential on a grid point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Corner {
    /// 0-based index of the unknown at the corner.
    pub index: usize,
    /// `[V']`, `[V'']`, `[V''']` there (right minus left limit), in eV/Å,
    /// eV/Å², eV/Å³.
    pub jumps: [f64; 3],
}

/// `A_{m,j} = Σ_{d=j+1}^{p} c_d (d - j)^m / m!` for the stencil weights `c`.
fn moment(c: &[f64], m: u32, j: usize) -> f64 {
    let factorial: f64 = (1..=m).map(f64::from).product();
    (j + 1..c.len())
        .map(|d| c[d] * ((d - j) as f64).powi(m as i32))
        .sum::<f64>()
        / factorial
}

/// The sign of the `m`-th jump's term in row offset `r` (see the module
/// docs): `+1` left of the corner, `(-1)^(m+1)` right of it, and at the
/// corner itself `1` for odd `m`, `0` for even `m`.
fn side_sign(r: isize, m: u32) -> f64 {
    let odd = m % 2 == 1;
    match r.signum() {
        -1 => 1.0,
        1 => {
            if odd {
                1.0
            } else {
                -1.0
            }
        }
        _ => {
            if odd {
                1.0
            } else {
                0.0
            }
        }
    }
}

/// The defect of the central stencil of `order` (spacing `spacing`) at rows
/// `k + r`, `|r| < p`, for a function whose derivatives 3, 4 and 5 jump by
/// `jumps` at `x_k`: `(D2 f)_{k+r} = f''(x_{k+r}) + δ_r + O(h^(2p)) + O(h^4
/// J_6)`. Rows whose stencil does not reach past the corner have no defect
/// and are left out.
pub fn defect(order: Order, spacing: f64, jumps: [f64; 3]) -> Vec<(isize, f64)> {
    let c = second_derivative_weights(order);
    let p = order.half_width() as isize;
    (-(p - 1)..=(p - 1))
        .map(|r| {
            let j = r.unsigned_abs();
            let value: f64 = (3..=5u32)
                .map(|m| {
                    jumps[(m - 3) as usize]
                        * spacing.powi(m as i32 - 2)
                        * moment(&c, m, j)
                        * side_sign(r, m)
                })
                .sum();
            (r, value)
        })
        .collect()
}

/// The entries the corner adds to the finite-difference Hamiltonian
/// `-t D2 + V` (stencil of `order`, spacing `spacing`, `t = kinetic`), as
/// `(row offset, column offset, value)` from the corner's unknown; not
/// symmetric (the caller adds the symmetric part). Empty for order 2, whose
/// own error is of the corner's order already.
pub fn corner_entries(
    corner: &Corner,
    order: Order,
    spacing: f64,
    kinetic: f64,
) -> Vec<(isize, isize, f64)> {
    if order.half_width() < 2 {
        return Vec::new();
    }
    let h = spacing;
    let [v1, v2, v3] = corner.jumps;
    // t J_m as forms over (psi, psi', psi'') at the corner.
    let forms = [
        [v1, 0.0, 0.0],
        [v2, 2.0 * v1, 0.0],
        [v3, 3.0 * v2, 4.0 * v1],
    ];
    let c = second_derivative_weights(order);
    let p = order.half_width() as isize;
    let mut out = Vec::new();
    for r in -(p - 1)..=(p - 1) {
        let j = r.unsigned_abs();
        let mut f = [0.0f64; 3];
        for (i, form) in forms.iter().enumerate() {
            let m = i as u32 + 3;
            let w = h.powi(m as i32 - 2) * moment(&c, m, j) * side_sign(r, m);
            for (fk, gk) in f.iter_mut().zip(form) {
                *fk += w * gk;
            }
        }
        // psi(c) = psi_k; psi'(c) and psi''(c) from the three points around.
        let centre = f[0] + f[2] * (-2.0 / (h * h) - h * v1 / (6.0 * kinetic));
        let side = f[2] / (h * h);
        let slope = f[1] / (2.0 * h);
        out.push((r, 0, centre));
        out.push((r, -1, side - slope));
        out.push((r, 1, side + slope));
    }
    out.retain(|e| e.2 != 0.0);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    /// `sin x` plus, right of `c`, the jump terms `Σ J_m s^m / m!`: its
    /// derivatives 3, 4, 5 jump by `J` at `c`, all others are continuous.
    fn kinked(x: f64, c: f64, j: [f64; 3]) -> (f64, f64) {
        let s = x - c;
        let (mut f, mut f2) = (x.sin(), -x.sin());
        if s > 0.0 {
            f += j[0] * s.powi(3) / 6.0 + j[1] * s.powi(4) / 24.0 + j[2] * s.powi(5) / 120.0;
            f2 += j[0] * s + j[1] * s * s / 2.0 + j[2] * s.powi(3) / 6.0;
        }
        (f, f2)
    }

    #[test]
    fn the_defect_restores_the_stencil_at_a_corner() {
        // The stencil minus the defect gives f'' to the smooth truncation
        // error c h^(2p) (Fornberg 1988), where the plain stencil is off by
        // about J_3 h.
        let jumps = [1.3, -0.7, 2.1];
        for order in [4u32, 6, 8] {
            let order = Order::new(order).unwrap();
            let w = second_derivative_weights(order);
            let p = order.half_width() as isize;
            let h = 0.02;
            let c = 0.4;
            let x = |i: isize| c + i as f64 * h;
            let mut worst_plain = 0.0f64;
            let mut worst_fixed = 0.0f64;
            for (r, d) in defect(order, h, jumps) {
                let stencil: f64 = (-p..=p)
                    .map(|s| w[s.unsigned_abs()] * kinked(x(r + s), c, jumps).0)
                    .sum::<f64>()
                    / (h * h);
                let exact = kinked(x(r), c, jumps).1;
                worst_plain = worst_plain.max((stencil - exact).abs());
                worst_fixed = worst_fixed.max((stencil - d - exact).abs());
            }
            assert!(worst_plain > 1e-3, "order {order}: {worst_plain:e}");
            assert!(worst_fixed < 1e-7, "order {order}: {worst_fixed:e}");
        }
    }

    #[test]
    fn entries_stay_in_the_band_and_vanish_without_jumps() {
        for order in [4u32, 6, 8] {
            let order = Order::new(order).unwrap();
            let p = order.half_width() as isize;
            let corner = Corner {
                index: 50,
                jumps: [2.0, 0.5, -1.0],
            };
            let e = corner_entries(&corner, order, 0.01, 3.81);
            assert!(!e.is_empty());
            assert!(e.iter().all(|&(r, c, _)| (r - c).abs() <= p));
            let flat = Corner {
                index: 50,
                jumps: [0.0; 3],
            };
            assert!(corner_entries(&flat, order, 0.01, 3.81).is_empty());
        }
        let two = Order::new(2).unwrap();
        let corner = Corner {
            index: 5,
            jumps: [1.0, 0.0, 0.0],
        };
        assert!(corner_entries(&corner, two, 0.01, 1.0).is_empty());
    }
}
