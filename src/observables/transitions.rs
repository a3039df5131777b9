//! Transition dipoles, oscillator strengths and the Thomas-Reiche-Kuhn sum.
//!
//! # Dipole
//! For real states on the grid, `<i|x|j> = h * sum_k psi_i(x_k) x_k psi_j(x_k)`
//! in Å; times the charge of the particle this is the transition dipole (for
//! an electron, of magnitude `|<i|x|j>|` e Å; 1 e Å is about 4.803 D). For a
//! periodic ring `x` is not a periodic operator, so ring dipoles depend on
//! where the period starts and should be read with care.
//!
//! # Oscillator strength
//! In the isotropic convention used for solution spectra (randomly oriented
//! molecules whose transition moment lies along the chain axis)
//!
//! `f = (2 m_e / (3 hbar^2)) dE |<i|x|j>|^2 g = dE |<i|x|j>|^2 g / (3 hbar^2/(2 m_e))`
//!
//! with `dE = E_j - E_i` in eV, the dipole in Å and `hbar^2/(2 m_e)` in eV Å^2
//! (R. C. Hilborn, "Einstein coefficients, cross sections, f values, dipole
//! moments, and all that", Am. J. Phys. 50, 982 (1982)). The electron mass
//! enters because `f` compares with a classical electron oscillator, whatever
//! the mass used for the kinetic energy of the model.
//!
//! The occupancy factor `g = n_i (2 - n_j) / 2` counts the electrons that can
//! make the jump with spin conserved: `n_i` electrons in the lower level, a
//! fraction `(2 - n_j) / 2` of the spin slots free in the upper one. It is 2
//! for a closed-shell HOMO -> LUMO excitation (both electrons can go), 1 from
//! a singly occupied level into an empty one, and 1 from a full level into a
//! singly occupied one; 0 when the lower level is empty or the upper full.
//! Without the factor (`g = 1`) `f` is the one-electron strength.
//!
//! # Thomas-Reiche-Kuhn sum rule
//! For one particle of mass `m` in one dimension,
//! `sum_j (E_j - E_i) |<i|x|j>|^2 = hbar^2 / (2m)` over the complete set of
//! states (W. Thomas, Naturwiss. 13, 627 (1925); W. Kuhn, Z. Phys. 33, 408
//! (1925)). The strengths above use the electron mass, so the sum is
//! reported in the same convention: [`trk_sum`] divides by `hbar^2/(2 m_e)`,
//! giving the sum of the one-electron strengths along the axis,
//! `S = (2 m_e / hbar^2) sum_j (E_j - E_i) |<i|x|j>|^2` (three times the sum
//! of the isotropic `f` with `g = 1`). Over a complete set `S = m_e / m`: 1
//! for an electron, `1/2` for `particle.mass = 2`, larger for a light
//! effective mass. `completeness = S / (m_e / m)` is the fraction of that
//! total the computed levels capture: 1 when the set is complete, less when
//! higher levels matter. On an `N`-point
//! finite-difference grid even all `N` eigenvectors give `h * sum_k
//! psi_i(x_k) psi_i(x_{k+1})` (with the three-point kinetic stencil) rather
//! than 1, short by `O(h^2 <p^2>)`, so a value a little below 1 on a coarse
//! grid is a discretisation effect, not missing levels.

use super::boxlimit::box_dipole;
use crate::constants::{debye_per_e_angstrom, hbar2_over_2me_ev_a2, hc_ev_nm};
use serde::Serialize;

/// Matrix element `<i|x|j> = h * sum_k psi_i[k] x[k] psi_j[k]` in Å (e Å for
/// unit charge). `h` is the grid spacing in Å. Extra entries of a longer
/// slice are ignored.
pub fn dipole(x: &[f64], psi_i: &[f64], psi_j: &[f64], h: f64) -> f64 {
    h * x
        .iter()
        .zip(psi_i)
        .zip(psi_j)
        .map(|((xk, a), b)| a * xk * b)
        .sum::<f64>()
}

/// `h * sum_k weighted[k] psi[k]` where `weighted = x * psi_i` was formed once.
fn dipole_from_weighted(weighted: &[f64], psi: &[f64], h: f64) -> f64 {
    h * weighted.iter().zip(psi).map(|(w, p)| w * p).sum::<f64>()
}

/// `x[k] * psi[k]` for reuse over many partners.
fn weigh(x: &[f64], psi: &[f64]) -> Vec<f64> {
    x.iter().zip(psi).map(|(xk, p)| xk * p).collect()
}

/// Occupancy factor `g = n_i (2 - n_j) / 2` for a jump from a level holding
/// `n_i` electrons into one holding `n_j` (see the module docs).
pub fn occupancy_factor(n_i: f64, n_j: f64) -> f64 {
    n_i * (2.0 - n_j) / 2.0
}

/// Oscillator strength `f = dE |x|^2 g / (3 hbar^2/(2 m_e))` (dimensionless)
/// from the transition energy `energy` (eV), the dipole `dipole` (Å) and the
/// occupancy factor `g`.
pub fn oscillator_strength(energy: f64, dipole: f64, occupancy_factor: f64) -> f64 {
    energy * dipole * dipole * occupancy_factor / (3.0 * hbar2_over_2me_ev_a2())
}

/// One transition between two computed levels.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Transition {
    /// Level number of the lower (initial) level.
    pub from: usize,
    /// Level number of the upper (final) level.
    pub to: usize,
    /// Transition energy `E_to - E_from` in eV.
    pub energy: f64,
    /// Wavelength `hc / energy` in nm; infinite when the energy is not
    /// positive (degenerate levels).
    pub wavelength_nm: f64,
    /// Transition dipole `<from|x|to>` in e Å (unit charge); its sign follows
    /// the sign convention of the states.
    pub dipole: f64,
    /// The same dipole in debye.
    pub dipole_debye: f64,
    /// Oscillator strength including the occupancy factor (dimensionless).
    pub strength: f64,
    /// Closed-form dipole of the ideal box of the given length between the
    /// same level numbers, for comparison (`None` when no length is given).
    pub box_dipole: Option<f64>,
    /// Occupancy factor `g = n_from (2 - n_to) / 2`.
    pub occupancy_factor: f64,
}

/// Transitions among the computed levels.
///
/// `x` (Å) are the grid points, `psis[k]` the normalised states of levels
/// `first_n + k` with energies `energies[k]` (eV, ascending), `occupations[k]`
/// their electron counts (as from `occupancy::fill`; missing entries count as
/// empty), `h` the grid spacing (Å). With `all_pairs = false` the list holds
/// every upward pair `i < j` whose occupancy factor is positive (an occupied
/// or singly occupied lower level, an empty or singly occupied upper level);
/// with `all_pairs = true` every pair `i < j`, where `strength` is 0 for
/// pairs the ground state cannot excite (use [`oscillator_strength`] with
/// `g = 1` for the one-electron value). Ordered by `from`, then `to`.
/// `box_length` (Å) adds the ideal-box dipole for comparison. Only levels
/// present in both `psis` and `energies` are used.
#[allow(clippy::too_many_arguments)]
pub fn transitions(
    x: &[f64],
    psis: &[Vec<f64>],
    energies: &[f64],
    first_n: usize,
    occupations: &[f64],
    h: f64,
    box_length: Option<f64>,
    all_pairs: bool,
) -> Vec<Transition> {
    let count = psis.len().min(energies.len());
    let occupation = |k: usize| occupations.get(k).copied().unwrap_or(0.0);
    let hc = hc_ev_nm();
    let debye = debye_per_e_angstrom();
    let mut list = Vec::new();
    for i in 0..count {
        let mut weighted: Option<Vec<f64>> = None;
        for j in (i + 1)..count {
            let g = occupancy_factor(occupation(i), occupation(j));
            if !all_pairs && g <= 0.0 {
                continue;
            }
            let w = weighted.get_or_insert_with(|| weigh(x, &psis[i]));
            let d = dipole_from_weighted(w, &psis[j], h);
            let energy = energies[j] - energies[i];
            let wavelength_nm = if energy > 0.0 {
                hc / energy
            } else {
                f64::INFINITY
            };
            list.push(Transition {
                from: first_n + i,
                to: first_n + j,
                energy,
                wavelength_nm,
                dipole: d,
                dipole_debye: d * debye,
                strength: oscillator_strength(energy, d, g),
                box_dipole: box_length.map(|l| box_dipole(first_n + i, first_n + j, l)),
                occupancy_factor: g,
            });
        }
    }
    list
}

/// Result of the Thomas-Reiche-Kuhn sum over the computed levels.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SumRule {
    /// `S = (2 m_e / hbar^2) sum_j (E_j - E_i) |<i|x|j>|^2`
    /// (dimensionless): the one-electron strengths along the axis, in the
    /// electron-mass convention of [`oscillator_strength`].
    pub value: f64,
    /// What `value` is over a complete set of states: `m_e / m` (1 for an
    /// electron).
    pub expected: f64,
    /// Number of computed levels entering the sum (the partner `j` runs over
    /// all of them; the term `j = i` is zero).
    pub levels_used: usize,
    /// Fraction of the complete sum captured, `value / expected`; values
    /// near 1 mean the computed levels carry essentially all the strength
    /// out of level `i`.
    pub completeness: f64,
}

/// Thomas-Reiche-Kuhn sum for the state `psis[from_index]` (index into
/// `psis`, 0 for the first computed level) over all computed levels.
///
/// `kinetic` is `hbar^2/(2m)` of the particle in eV Å^2 (not necessarily of
/// an electron): it sets `expected = kinetic / (hbar^2/(2 m_e)) = m_e / m`.
/// When `from_index` is out of range, or `kinetic` is not positive, the
/// result has `levels_used = 0` and value 0.
pub fn trk_sum(
    x: &[f64],
    psis: &[Vec<f64>],
    energies: &[f64],
    h: f64,
    kinetic: f64,
    from_index: usize,
) -> SumRule {
    let count = psis.len().min(energies.len());
    if from_index >= count || kinetic.is_nan() || kinetic <= 0.0 {
        return SumRule {
            value: 0.0,
            expected: 0.0,
            levels_used: 0,
            completeness: 0.0,
        };
    }
    let weighted = weigh(x, &psis[from_index]);
    let e_i = energies[from_index];
    let sum: f64 = (0..count)
        .filter(|&j| j != from_index)
        .map(|j| {
            let d = dipole_from_weighted(&weighted, &psis[j], h);
            (energies[j] - e_i) * d * d
        })
        .sum();
    let electron = hbar2_over_2me_ev_a2();
    SumRule {
        value: sum / electron,
        expected: kinetic / electron,
        levels_used: count,
        completeness: sum / kinetic,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::observables::boxlimit::box_energy;
    use crate::observables::occupancy::fill;
    use approx::assert_relative_eq;
    use std::f64::consts::PI;

    /// Harmonic-oscillator states psi_0..psi_{count-1} on `x`, built with the
    /// normalised Hermite-function recurrence
    /// psi_{n+1} = sqrt(2/(n+1)) xi psi_n - sqrt(n/(n+1)) psi_{n-1},
    /// psi_0 = (alpha/pi)^(1/4) exp(-xi^2/2), xi = sqrt(alpha) x, which
    /// follows from H_{n+1} = 2 xi H_n - 2 n H_{n-1} (Griffiths sec. 2.3.2).
    fn oscillator_states(x: &[f64], alpha: f64, count: usize) -> Vec<Vec<f64>> {
        let mut states: Vec<Vec<f64>> = Vec::with_capacity(count);
        let root = alpha.sqrt();
        states.push(
            x.iter()
                .map(|&xk| (alpha / PI).powf(0.25) * (-0.5 * alpha * xk * xk).exp())
                .collect(),
        );
        states.push(
            x.iter()
                .zip(&states[0])
                .map(|(&xk, p)| 2f64.sqrt() * root * xk * p)
                .collect(),
        );
        for n in 1..count.saturating_sub(1) {
            let nf = n as f64;
            let next = x
                .iter()
                .zip(&states[n])
                .zip(&states[n - 1])
                .map(|((&xk, p), q)| {
                    (2.0 / (nf + 1.0)).sqrt() * root * xk * p - (nf / (nf + 1.0)).sqrt() * q
                })
                .collect();
            states.push(next);
        }
        states.truncate(count);
        states
    }

    #[test]
    fn harmonic_dipoles_and_selection_rule() {
        // <n|x|n+1> = sqrt((n+1) hbar/(2 m w)) (Griffiths sec. 2.3.1, ladder
        // operators), hbar/(2 m w) = kinetic / (hbar w) with kinetic = hbar^2/2m;
        // alpha = m w / hbar = hbar w / (2 kinetic).
        let kinetic = hbar2_over_2me_ev_a2();
        let hw = 0.5;
        let x0_sq = kinetic / hw;
        let alpha = hw / (2.0 * kinetic);
        let h = 0.01;
        let x: Vec<f64> = (-6000..=6000).map(|i| i as f64 * h).collect();
        let states = oscillator_states(&x, alpha, 8);
        for (n, psi) in states.iter().enumerate() {
            let norm = h * psi.iter().map(|p| p * p).sum::<f64>();
            assert_relative_eq!(norm, 1.0, max_relative = 1e-12);
            assert_eq!(crate::observables::states::count_nodes(psi), n);
        }
        for n in 0..7 {
            let expected = ((n as f64 + 1.0) * x0_sq).sqrt();
            let got = dipole(&x, &states[n], &states[n + 1], h);
            assert_relative_eq!(got, expected, max_relative = 1e-10);
            for m in 0..8 {
                if m + 1 != n && m != n + 1 {
                    let other = dipole(&x, &states[n], &states[m], h);
                    assert!(other.abs() < 1e-8 * expected, "<{n}|x|{m}> = {other}");
                }
            }
        }
    }

    /// Normalised sine states of levels 1..=count of the box [0, length] on
    /// `points` interior points; these are also the exact eigenvectors of the
    /// three-point finite-difference Laplacian.
    fn box_states(length: f64, points: usize, count: usize) -> (Vec<f64>, f64, Vec<Vec<f64>>) {
        let h = length / (points + 1) as f64;
        let x: Vec<f64> = (1..=points).map(|i| i as f64 * h).collect();
        let amp = (2.0 / length).sqrt();
        let states = (1..=count)
            .map(|n| {
                x.iter()
                    .map(|&xk| amp * (n as f64 * PI * xk / length).sin())
                    .collect()
            })
            .collect();
        (x, h, states)
    }

    #[test]
    fn box_homo_lumo_strength_by_hand() {
        // 4 electrons in a box: HOMO 2, LUMO 3. By hand:
        // dE = kinetic pi^2 (9 - 4) / L^2, <2|x|3> = -8 L 6 / (25 pi^2),
        // f = dE x^2 g / (3 kinetic) with g = 2 gives 23040 / (1875 pi^2)
        // = 1.24505, independent of L.
        let length = 10.0;
        let kinetic = hbar2_over_2me_ev_a2();
        let (x, h, states) = box_states(length, 4000, 5);
        let energies: Vec<f64> = (1..=5).map(|n| box_energy(n, length, kinetic)).collect();
        let occ = fill(&energies, 1, 4).expect("fits");
        let list = transitions(
            &x,
            &states,
            &energies,
            1,
            &occ.occupations,
            h,
            Some(length),
            false,
        );
        let homo_lumo = list
            .iter()
            .find(|t| t.from == 2 && t.to == 3)
            .expect("listed");
        let by_hand = 23040.0 / (1875.0 * PI * PI);
        assert_relative_eq!(homo_lumo.strength, by_hand, max_relative = 1e-5);
        assert_relative_eq!(homo_lumo.occupancy_factor, 2.0);
        assert_relative_eq!(
            homo_lumo.dipole,
            -48.0 * length / (25.0 * PI * PI),
            max_relative = 1e-5
        );
        assert_relative_eq!(
            homo_lumo.box_dipole.unwrap_or(f64::NAN),
            homo_lumo.dipole,
            max_relative = 1e-5
        );
        assert_relative_eq!(
            homo_lumo.dipole_debye,
            homo_lumo.dipole * 4.803_204_7,
            max_relative = 1e-7
        );
        assert_relative_eq!(
            homo_lumo.wavelength_nm * homo_lumo.energy,
            hc_ev_nm(),
            max_relative = 1e-14
        );
        // Occupied levels 1, 2 to empty 3, 4, 5: six pairs, ordered.
        let pairs: Vec<(usize, usize)> = list.iter().map(|t| (t.from, t.to)).collect();
        assert_eq!(pairs, vec![(1, 3), (1, 4), (1, 5), (2, 3), (2, 4), (2, 5)]);
        // Parity: 1 -> 3 and 1 -> 5 and 2 -> 4 are forbidden (box_dipole 0).
        for t in &list {
            if (t.from + t.to) % 2 == 0 {
                assert!(t.strength < 1e-12, "{t:?}");
            }
        }
        let all = transitions(&x, &states, &energies, 1, &occ.occupations, h, None, true);
        assert_eq!(all.len(), 10);
        assert!(all.iter().all(|t| t.box_dipole.is_none()));
        let upper = all
            .iter()
            .find(|t| t.from == 3 && t.to == 4)
            .expect("listed");
        assert_eq!(upper.strength, 0.0); // empty lower level: g = 0
    }

    #[test]
    fn occupancy_factor_cases() {
        // g = n_i (2 - n_j) / 2 (module docs).
        assert_eq!(occupancy_factor(2.0, 0.0), 2.0); // closed shell
        assert_eq!(occupancy_factor(1.0, 0.0), 1.0); // from a singly occupied level
        assert_eq!(occupancy_factor(2.0, 1.0), 1.0); // into a singly occupied level
        assert_eq!(occupancy_factor(0.0, 0.0), 0.0);
        assert_eq!(occupancy_factor(2.0, 2.0), 0.0);
        // Odd count: 3 electrons, levels 1 (2) and 2 (1): the list holds
        // 1 -> 2 with g = 1 and 2 -> 3 with g = 1, 1 -> 3 with g = 2.
        let length = 8.0;
        let kinetic = hbar2_over_2me_ev_a2();
        let (x, h, states) = box_states(length, 800, 3);
        let energies: Vec<f64> = (1..=3).map(|n| box_energy(n, length, kinetic)).collect();
        let occ = fill(&energies, 1, 3).expect("fits");
        let list = transitions(&x, &states, &energies, 1, &occ.occupations, h, None, false);
        let got: Vec<(usize, usize, f64)> = list
            .iter()
            .map(|t| (t.from, t.to, t.occupancy_factor))
            .collect();
        assert_eq!(got, vec![(1, 2, 1.0), (1, 3, 2.0), (2, 3, 1.0)]);
        // f(1 -> 2) with g = 1, by hand: 3 pi^2/L^2 (16 L/(9 pi^2))^2 / 3
        // = 256 / (81 pi^2).
        assert_relative_eq!(
            list[0].strength,
            256.0 / (81.0 * PI * PI),
            max_relative = 1e-5
        );
    }

    #[test]
    fn trk_sum_with_analytic_box_levels() {
        // Sampled sine states with the continuum energies: the sum over 200
        // levels approaches 1 (tail about 1.4e-7, see boxlimit tests).
        let length = 5.0;
        let kinetic = 3.0; // any particle
        let (x, h, states) = box_states(length, 3000, 200);
        let energies: Vec<f64> = (1..=200).map(|n| box_energy(n, length, kinetic)).collect();
        let rule = trk_sum(&x, &states, &energies, h, kinetic, 0);
        assert_eq!(rule.levels_used, 200);
        assert!((rule.completeness - 1.0).abs() < 1e-4, "{rule:?}");
        // The value is in the electron-mass convention: m_e / m when complete.
        let ratio = kinetic / hbar2_over_2me_ev_a2();
        assert_relative_eq!(rule.expected, ratio, max_relative = 1e-15);
        assert_relative_eq!(rule.value, rule.completeness * ratio, max_relative = 1e-12);
        let few = trk_sum(&x, &states[..3], &energies[..3], h, kinetic, 0);
        // Only <1|x|2> contributes: 256 / (27 pi^2) = 0.9607 (by hand).
        assert_relative_eq!(
            few.completeness,
            256.0 / (27.0 * PI * PI),
            max_relative = 1e-5
        );
        assert_eq!(
            trk_sum(&x, &states, &energies, h, kinetic, 500).levels_used,
            0
        );
    }

    #[test]
    fn trk_sum_on_the_full_finite_difference_set() {
        // Complete set of the N-point three-point Laplacian: eigenvectors are
        // the sampled sines, E_n = (2 kinetic / h^2) (1 - cos(n pi/(N+1)))
        // (closed form). The sum is exactly h sum psi_k psi_{k+1} =
        // cos(n pi / (N+1)) (derived in the module docs), not 1.
        let points = 40;
        let length = 4.1;
        let kinetic = 3.81;
        let (x, h, states) = box_states(length, points, points);
        let theta = PI / (points + 1) as f64;
        let energies: Vec<f64> = (1..=points)
            .map(|n| 2.0 * kinetic / (h * h) * (1.0 - (n as f64 * theta).cos()))
            .collect();
        for from in [0, 3, 10] {
            let rule = trk_sum(&x, &states, &energies, h, kinetic, from);
            let expected = ((from + 1) as f64 * theta).cos();
            assert_relative_eq!(rule.completeness, expected, max_relative = 1e-11);
        }
    }
}
