//! The Hückel picture of the same atoms: tight-binding pi levels beside the
//! free-electron box.
//!
//! One 2p orbital per atom, the Coulomb integral `alpha` (plus a shift
//! `delta_a` on a heteroatom) on the diagonal and the resonance integral
//! `beta` between bonded neighbours (E. Hückel, Z. Phys. 70, 204 (1931);
//! e.g. A. Streitwieser, *Molecular Orbital Theory for Organic Chemists*,
//! 1961, ch. 2):
//!
//! `H_aa = alpha + delta_a`, `H_a,a+1 = beta_b` for bond `b = a`.
//!
//! Bond `b` joins atoms `b` and `b + 1`; with alternation the odd bonds
//! 1, 3, 5, ... are the double bonds (`beta_double`) and the even ones single
//! (`beta_single`), the same pattern as the chain's ripple. A ring also joins
//! atom `N` to atom 1 by bond `N`. With one `beta` the levels have the closed
//! forms `alpha + 2 beta cos(k pi / (N + 1))`, `k = 1..N`, for the chain and
//! `alpha + 2 beta cos(2 pi j / N)` for the ring; `beta` is negative, so the
//! bonding levels lie below `alpha`.
//!
//! A linear chain's matrix is tridiagonal and is solved by the Sturm-bracketed
//! tridiagonal path of [`crate::eigen`]; a ring's, with its corner coupling,
//! by the eigen-solver's choice (dense for small rings).

use serde::Serialize;

use crate::eigen::{self, EigenError, EigenParams, Method, Problem, Selection, SymBanded};

use super::occupancy::{fill, Occupancy, OccupancyError};
use super::transitions::{transitions, Transition};

/// The checked `[huckel]` table, in eV.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct HuckelSpec {
    /// Number of atoms (at least 2; 3 for a ring).
    pub atoms: usize,
    /// Whether atom `N` is bonded to atom 1.
    pub ring: bool,
    /// Coulomb integral, eV.
    pub alpha: f64,
    /// Resonance integral of the odd bonds 1, 3, 5, ..., eV.
    pub beta_double: f64,
    /// Resonance integral of the even bonds 2, 4, 6, ..., eV.
    pub beta_single: f64,
    /// Coulomb-integral shifts `(atom, delta)` (1-based atoms, eV).
    pub shifts: Vec<(usize, f64)>,
    /// Distance between bonded atoms, Å, for the transition dipoles.
    pub bond_length: f64,
}

impl HuckelSpec {
    /// The resonance integral of bond `b` (1-based; bond `b` joins atoms
    /// `b` and `b + 1`, bond `N` of a ring atoms `N` and 1).
    pub fn beta(&self, bond: usize) -> f64 {
        if bond % 2 == 1 {
            self.beta_double
        } else {
            self.beta_single
        }
    }

    /// The Hückel matrix as a symmetric band (tridiagonal; wrapped for a ring).
    pub fn matrix(&self) -> SymBanded {
        let n = self.atoms;
        let mut diagonal = vec![self.alpha; n];
        for &(a, d) in &self.shifts {
            diagonal[a - 1] += d;
        }
        let bonds = if self.ring { n } else { n - 1 };
        let off: Vec<f64> = (1..=bonds).map(|b| self.beta(b)).collect();
        SymBanded {
            n,
            bands: vec![diagonal, off],
            wrap: self.ring,
        }
    }

    /// Atom positions, Å: along a line `(a - 1) * bond_length` for a chain;
    /// on a circle of circumference `N * bond_length` for a ring, as the
    /// two coordinates `(R cos theta_a, R sin theta_a)`.
    fn positions(&self) -> Vec<Vec<f64>> {
        let n = self.atoms;
        if !self.ring {
            return vec![(0..n).map(|a| a as f64 * self.bond_length).collect()];
        }
        let radius = n as f64 * self.bond_length / (2.0 * std::f64::consts::PI);
        let theta = |a: usize| 2.0 * std::f64::consts::PI * a as f64 / n as f64;
        vec![
            (0..n).map(|a| radius * theta(a).cos()).collect(),
            (0..n).map(|a| radius * theta(a).sin()).collect(),
        ]
    }
}

/// The Hückel levels of a [`HuckelSpec`] and their filling.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Huckel {
    /// Every level, eV, ascending (level `n` is `energies[n - 1]`).
    pub energies: Vec<f64>,
    /// The orbital coefficients of each level (unit norm), `vectors[n - 1][a - 1]`.
    #[serde(skip)]
    pub vectors: Vec<Vec<f64>>,
    /// The filling, when the electrons are known.
    pub occupancy: Option<Occupancy>,
    /// Transitions from occupied to empty levels (with a filling), their
    /// dipoles `sum_a c_ia x_a c_ja` from the atom positions (the planar
    /// dipole on a ring, as for the continuum ring).
    pub transitions: Vec<Transition>,
}

/// Why the Hückel levels could not be found.
#[derive(Debug, thiserror::Error)]
pub enum HuckelError {
    /// The eigen-solver failed.
    #[error("Hückel levels: {0}")]
    Eigen(#[from] EigenError),
    /// The electrons do not fit the levels.
    #[error("Hückel occupancy: {0}")]
    Occupancy(#[from] OccupancyError),
}

/// Every level of `spec`, filled with `electrons` when given.
///
/// # Errors
/// [`HuckelError::Eigen`] when the eigen-solver fails its own checks, and
/// [`HuckelError::Occupancy`] for more electrons than the `N` levels hold
/// (the LUMO must exist: at most `2N - 1`).
pub fn solve(spec: &HuckelSpec, electrons: Option<usize>) -> Result<Huckel, HuckelError> {
    let a = spec.matrix();
    let problem = Problem { a: &a, b: None };
    let params = EigenParams {
        method: if spec.ring {
            Method::Auto
        } else {
            Method::Tridiagonal
        },
        ..EigenParams::default()
    };
    let selection = Selection::Index {
        first: 0,
        count: spec.atoms,
    };
    let (pairs, _) = eigen::solve(&problem, &selection, &params)?;
    let mut occupancy = match electrons {
        Some(e) => Some(fill(&pairs.values, 1, e)?),
        None => None,
    };
    let mut list = Vec::new();
    if let Some(o) = occupancy.as_mut() {
        // One component per coordinate (one for a chain, two for a ring),
        // added as for the continuum ring.
        for (c, x) in spec.positions().iter().enumerate() {
            let part = transitions(
                x,
                &pairs.vectors,
                &pairs.values,
                1,
                &o.occupations,
                1.0,
                None,
                false,
            );
            if c == 0 {
                list = part;
            } else {
                for (t, p) in list.iter_mut().zip(part) {
                    t.dipole = t.dipole.hypot(p.dipole);
                    t.dipole_debye = t.dipole_debye.hypot(p.dipole_debye);
                    t.strength += p.strength;
                }
            }
        }
        list.retain(|t| o.keeps(t));
        o.name_lowest(&list);
    }
    Ok(Huckel {
        energies: pairs.values,
        vectors: pairs.vectors,
        occupancy,
        transitions: list,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;
    use std::f64::consts::PI;

    fn spec(atoms: usize, ring: bool, bd: f64, bs: f64) -> HuckelSpec {
        HuckelSpec {
            atoms,
            ring,
            alpha: -1.5,
            beta_double: bd,
            beta_single: bs,
            shifts: vec![],
            bond_length: 1.4,
        }
    }

    #[test]
    fn a_uniform_chain_has_the_closed_form_levels() {
        // alpha + 2 beta cos(k pi / (N + 1)) (E. Hückel, Z. Phys. 70, 204
        // (1931)); beta < 0, so k = 1 is the lowest.
        for n in [2usize, 3, 6, 11, 40] {
            let h = solve(&spec(n, false, -2.4, -2.4), None).unwrap();
            for (k, e) in h.energies.iter().enumerate() {
                let exact = -1.5 + 2.0 * -2.4 * ((k + 1) as f64 * PI / (n + 1) as f64).cos();
                assert_abs_diff_eq!(*e, exact, epsilon = 1e-10);
            }
        }
    }

    #[test]
    fn a_uniform_ring_has_the_closed_form_levels() {
        // alpha + 2 beta cos(2 pi j / N), j = 0..N-1 (Hückel 1931), sorted.
        for n in [3usize, 6, 12, 15] {
            let h = solve(&spec(n, true, -2.4, -2.4), None).unwrap();
            let mut exact: Vec<f64> = (0..n)
                .map(|j| -1.5 + 2.0 * -2.4 * (2.0 * PI * j as f64 / n as f64).cos())
                .collect();
            exact.sort_by(f64::total_cmp);
            for (e, x) in h.energies.iter().zip(&exact) {
                assert_abs_diff_eq!(*e, *x, epsilon = 1e-10);
            }
        }
    }

    #[test]
    fn an_alternating_chain_matches_the_dense_solver() {
        // nalgebra's symmetric QR (Golub & Van Loan sec. 8.3) on the same
        // matrix, written out densely here.
        for (n, shifts) in [(8usize, vec![]), (9, vec![(1, -1.0), (9, -1.0)])] {
            let s = HuckelSpec {
                shifts,
                ..spec(n, false, -2.7, -2.1)
            };
            let mut m = nalgebra::DMatrix::<f64>::zeros(n, n);
            for a in 0..n {
                m[(a, a)] = s.alpha;
                if a + 1 < n {
                    m[(a, a + 1)] = s.beta(a + 1);
                    m[(a + 1, a)] = s.beta(a + 1);
                }
            }
            for &(a, d) in &s.shifts {
                m[(a - 1, a - 1)] += d;
            }
            let mut dense: Vec<f64> = m.symmetric_eigen().eigenvalues.iter().copied().collect();
            dense.sort_by(f64::total_cmp);
            let h = solve(&s, None).unwrap();
            for (e, x) in h.energies.iter().zip(&dense) {
                assert_abs_diff_eq!(*e, *x, epsilon = 1e-10);
            }
        }
    }

    #[test]
    fn an_alternating_ring_has_two_bands() {
        // A ring of N = 2M atoms with alternating beta1, beta2: levels
        // alpha +- |beta1 + beta2 exp(i theta)|, theta = 2 pi m / M
        // (W. P. Su, J. R. Schrieffer, A. J. Heeger, Phys. Rev. Lett. 42,
        // 1698 (1979), the tight-binding polyacetylene chain).
        let (b1, b2) = (-2.7f64, -2.1f64);
        let m = 6usize;
        let h = solve(&spec(2 * m, true, b1, b2), None).unwrap();
        let mut exact = Vec::new();
        for j in 0..m {
            let t = 2.0 * PI * j as f64 / m as f64;
            let r = (b1 * b1 + b2 * b2 + 2.0 * b1 * b2 * t.cos()).sqrt();
            exact.push(-1.5 - r);
            exact.push(-1.5 + r);
        }
        exact.sort_by(f64::total_cmp);
        for (e, x) in h.energies.iter().zip(&exact) {
            assert_abs_diff_eq!(*e, *x, epsilon = 1e-10);
        }
    }

    #[test]
    fn benzene_closes_its_shell_and_a_twelve_ring_does_not() {
        // Hückel's 4n + 2 rule: 6 electrons in a 6-ring fill j = 0 and the
        // pair j = +-1, gap -2 beta; 12 in a 12-ring half fill the pair at
        // alpha (j = +-3).
        let b = solve(&spec(6, true, -2.4, -2.4), Some(6)).unwrap();
        let o = b.occupancy.unwrap();
        assert!(!o.open_shell);
        assert_abs_diff_eq!(o.gap.unwrap(), 2.0 * 2.4, epsilon = 1e-10);
        let r = solve(&spec(12, true, -2.4, -2.4), Some(12)).unwrap();
        let o = r.occupancy.unwrap();
        assert!(o.open_shell);
        assert_eq!(o.homo_group, vec![6, 7]);
        assert_eq!(o.gap, None);
        // The lowest allowed excitation: from the pair j = +-2 into the
        // half-filled pair j = +-3 (a ring's dipole changes j by one), at
        // 2 beta (cos(pi/2) - cos(pi/3)) = -beta.
        let x = o.lowest_allowed.expect("an allowed excitation");
        assert_abs_diff_eq!(x.energy, 2.4, epsilon = 1e-10);
        assert!(r.transitions.iter().all(|t| t.energy > 1.0));
    }

    #[test]
    fn the_chain_dipole_of_ethylene_is_half_a_bond() {
        // Two atoms: the bonding and antibonding orbitals (1, 1)/sqrt 2 and
        // (1, -1)/sqrt 2 give <1|x|2> = (0 - b)/2 = -b/2, gap -2 beta
        // (closed form).
        let h = solve(&spec(2, false, -2.4, -2.4), Some(2)).unwrap();
        assert_eq!(h.transitions.len(), 1);
        let t = &h.transitions[0];
        assert_abs_diff_eq!(t.dipole.abs(), 0.7, epsilon = 1e-12);
        assert_abs_diff_eq!(t.energy, 4.8, epsilon = 1e-12);
    }
}
