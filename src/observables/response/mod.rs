//! Static response of the filled levels to a field along the chain axis:
//! the polarizability α and the hyperpolarizabilities β and γ.
//!
//! # Convention
//! For a static field `F` along x the energy of the filled levels is
//!
//! ```text
//! E(F) = E0 - μ F - α F²/2 - β F³/6 - γ F⁴/24
//! ```
//!
//! (the Taylor convention, "T" in A. Willetts, J. E. Rice, D. M. Burland and
//! D. P. Shelton, J. Chem. Phys. 97, 7590 (1992)). An electron (charge -e)
//! in the field gains the potential `+e F x`, so each level's energy is the
//! series of the pencil `(A + F V) z = E M z` ([`mod@series`]); for independent
//! electrons the energy is the sum of the filled levels' energies weighted
//! by their electrons, and so are α = -2 E2, β = -6 E3 and γ = -24 E4.
//!
//! # Exact on the grid
//! No sum over a truncated set of states: each filled level costs one banded
//! LU and two or three solves of its response equations (Sternheimer's
//! method, R. M. Sternheimer, Phys. Rev. 96, 951 (1954)), and β and γ come
//! from the first- and second-order vectors by the 2n+1 rule. The sum over
//! the computed states ([`alpha_sum_over_states`]) is offered beside, to
//! show how much a truncated sum misses.
//!
//! # Symmetry
//! β is odd in the field: it vanishes when the potential is a mirror image
//! of itself about the middle of the box ([`mirror_symmetric`]); callers
//! then report 0 instead of the rounding noise the series leaves.
//!
//! Internal units: e = 1, Å, eV, the field in V/Å; [`units`] converts.

pub mod banded_lu;
pub mod series;
pub mod units;

pub use banded_lu::BandedLu;
pub use series::{series, FieldPencil, Series, SeriesError};

/// One filled level's part of the response (its electrons times the
/// per-electron coefficients), internal units.
#[derive(Debug, Clone, PartialEq)]
pub struct LevelResponse {
    /// Level number (1-based).
    pub n: usize,
    /// Electrons in the level (1 or 2).
    pub electrons: f64,
    /// The level's energy, eV.
    pub energy: f64,
    /// `⟨x⟩` of the level, Å.
    pub mean_x: f64,
    /// Its part of α, `e² Å² / eV`.
    pub alpha: f64,
    /// Its part of β, `e³ Å³ / eV²` (when asked for).
    pub beta: Option<f64>,
    /// Its part of γ, `e⁴ Å⁴ / eV³` (when asked for).
    pub gamma: Option<f64>,
}

/// The response of the filled levels, internal units.
#[derive(Debug, Clone, PartialEq)]
pub struct StaticResponse {
    /// α, `e² Å² / eV`.
    pub alpha: f64,
    /// β, `e³ Å³ / eV²` (0 when zero by symmetry; `None` when not asked for).
    pub beta: Option<f64>,
    /// γ, `e⁴ Å⁴ / eV³` (`None` when not asked for).
    pub gamma: Option<f64>,
    /// β was set to 0 because the potential is mirror-symmetric; the
    /// computed value (rounding noise) is kept in `beta_computed`.
    pub beta_zero_by_symmetry: bool,
    /// β as the series gave it, before the symmetry rule.
    pub beta_computed: Option<f64>,
    /// Each filled level's part.
    pub levels: Vec<LevelResponse>,
    /// Worst relative residual of the response equations.
    pub residual: f64,
}

/// Why the response could not be computed.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("level {level}: {source}")]
pub struct ResponseError {
    /// The level (1-based).
    pub level: usize,
    /// What went wrong.
    pub source: SeriesError,
}

/// One filled level as input to [`static_response`]: its number, its
/// electrons and its vector of the pencil (any normalisation).
#[derive(Debug, Clone, Copy)]
pub struct FilledLevel<'a> {
    /// Level number (1-based).
    pub n: usize,
    /// Electrons in it.
    pub electrons: f64,
    /// Its vector of the pencil.
    pub vector: &'a [f64],
}

/// α (and with `hyper` β and γ) of the filled levels; β is reported 0
/// when `symmetric` (see the module docs).
pub fn static_response(
    pencil: &FieldPencil,
    filled: &[FilledLevel],
    hyper: bool,
    symmetric: bool,
) -> Result<StaticResponse, ResponseError> {
    let mut levels = Vec::with_capacity(filled.len());
    let mut residual = 0.0f64;
    for f in filled {
        let s = series(pencil, f.vector, hyper)
            .map_err(|source| ResponseError { level: f.n, source })?;
        residual = residual.max(s.residual);
        levels.push(LevelResponse {
            n: f.n,
            electrons: f.electrons,
            energy: s.e0,
            mean_x: s.e1,
            alpha: -2.0 * f.electrons * s.e2,
            beta: s.e3.map(|e3| -6.0 * f.electrons * e3),
            gamma: s.e4.map(|e4| -24.0 * f.electrons * e4),
        });
    }
    let total =
        |part: fn(&LevelResponse) -> Option<f64>| -> Option<f64> { levels.iter().map(part).sum() };
    let beta_computed = if hyper { total(|l| l.beta) } else { None };
    Ok(StaticResponse {
        alpha: levels.iter().map(|l| l.alpha).sum(),
        beta: beta_computed.map(|b| if symmetric { 0.0 } else { b }),
        gamma: if hyper { total(|l| l.gamma) } else { None },
        beta_zero_by_symmetry: hyper && symmetric,
        beta_computed,
        levels,
        residual,
    })
}

/// Whether the samples `v` of a potential on a grid symmetric about its
/// middle are a mirror image of themselves, `|v_i - v_{N-1-i}| <= tol`.
pub fn mirror_symmetric(v: &[f64], tol: f64) -> bool {
    v.iter()
        .zip(v.iter().rev())
        .all(|(a, b)| (a - b).abs() <= tol)
}

/// α of the filled levels as a sum over the computed states only,
/// `Σ_i f_i Σ_{k≠i} 2 |⟨i|x|k⟩|² / (E_k - E_i)` (f_i the electrons of
/// level i, dipoles as grid integrals `h Σ psi_i x psi_k`), internal units.
/// Short of the exact α by what the states above the computed ones carry.
pub fn alpha_sum_over_states(
    x: &[f64],
    psis: &[Vec<f64>],
    energies: &[f64],
    electrons: &[f64],
    h: f64,
) -> f64 {
    let mut total = 0.0;
    for (i, (&fi, psi_i)) in electrons.iter().zip(psis).enumerate() {
        if fi == 0.0 {
            continue;
        }
        let xi: Vec<f64> = psi_i.iter().zip(x).map(|(p, x)| p * x).collect();
        for (k, psi_k) in psis.iter().enumerate() {
            if k == i {
                continue;
            }
            let d = h * xi.iter().zip(psi_k).map(|(a, b)| a * b).sum::<f64>();
            total += fi * 2.0 * d * d / (energies[k] - energies[i]);
        }
    }
    total
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::eigen::SymBanded;

    #[test]
    fn beta_of_a_mirror_image_is_zero_and_flagged() {
        let n = 21;
        let x: Vec<f64> = (0..n).map(|i| (i + 1) as f64 * 0.5).collect();
        let v: Vec<f64> = x.iter().map(|x| (x - 5.5).powi(2) * 0.1).collect();
        assert!(mirror_symmetric(&v, 1e-12));
        let a = SymBanded {
            n,
            bands: vec![v.iter().map(|v| v + 8.0).collect(), vec![-4.0; n - 1]],
            wrap: false,
        };
        let dense = a.to_dense().symmetric_eigen();
        let k = (0..n)
            .min_by(|&i, &j| dense.eigenvalues[i].total_cmp(&dense.eigenvalues[j]))
            .unwrap();
        let z: Vec<f64> = dense.eigenvectors.column(k).iter().copied().collect();
        let pencil = FieldPencil {
            a: &a,
            m: None,
            b: None,
            x: &x,
        };
        let filled = [FilledLevel {
            n: 1,
            electrons: 2.0,
            vector: &z,
        }];
        let r = static_response(&pencil, &filled, true, true).unwrap();
        assert_eq!(r.beta, Some(0.0));
        assert!(r.beta_zero_by_symmetry);
        // The computed value is rounding noise against alpha's scale.
        assert!(r.beta_computed.unwrap().abs() < 1e-9 * r.alpha * 5.5);
        assert!(r.alpha > 0.0 && r.gamma.is_some());
        let lopsided: Vec<f64> = v.iter().zip(&x).map(|(v, x)| v + 1e-3 * x).collect();
        assert!(!mirror_symmetric(&lopsided, 1e-12));
    }
}
