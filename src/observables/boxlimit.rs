//! The ideal particle in a box as a reference: closed-form levels, the
//! length of the box that reproduces a given level, and closed-form
//! transition dipoles.
//!
//! For a particle of mass `m` confined to `[0, L]` by infinite walls the
//! states are `psi_n(x) = sqrt(2/L) sin(n pi x / L)`, `n = 1, 2, ...`, with
//! energies `E_n = (hbar^2 / 2m) (n pi / L)^2 = n^2 h^2 / (8 m L^2)`
//! (D. J. Griffiths, *Introduction to Quantum Mechanics*, sec. 2.2). In
//! chainwell's units `hbar^2 / 2m` is the `kinetic` prefactor in eV Å^2
//! (about 3.81 eV Å^2 for an electron, see
//! [`crate::constants::hbar2_over_2me_ev_a2`]).
//!
//! The free-electron (Kuhn) picture of a conjugated chain treats the pi
//! electrons as such a box, so these functions are the natural yardstick for
//! levels and dipoles computed from a realistic potential.

use std::f64::consts::PI;

/// Level `n` of an ideal box of length `length` (Å):
/// `kinetic * (n pi / L)^2` in eV, where `kinetic = hbar^2 / (2m)` in eV Å^2.
///
/// `n = 0` gives 0 (there is no such state). A non-positive length gives a
/// non-finite or meaningless value; the caller supplies `L > 0`.
pub fn box_energy(n: usize, length: f64, kinetic: f64) -> f64 {
    let k = n as f64 * PI / length;
    kinetic * k * k
}

/// Length (Å) of the ideal box whose level `n` lies `energy_above_floor`
/// (eV) above the bottom of the box: `L = n pi sqrt(kinetic / E)`.
///
/// Useful to express a computed level of a realistic potential, measured
/// from the potential minimum, as an effective box length. Returns `None`
/// when the energy is not positive, when `n = 0`, or when `kinetic` is not
/// positive, or any input is not finite.
pub fn effective_box_length(energy_above_floor: f64, n: usize, kinetic: f64) -> Option<f64> {
    let valid = energy_above_floor.is_finite()
        && energy_above_floor > 0.0
        && kinetic.is_finite()
        && kinetic > 0.0
        && n > 0;
    valid.then(|| n as f64 * PI * (kinetic / energy_above_floor).sqrt())
}

/// Transition dipole `<n|x|m>` (Å, per unit charge) of the ideal box on
/// `[0, L]` with `psi_n(x) = sqrt(2/L) sin(n pi x / L)`.
///
/// # Derivation
/// With `sin a sin b = [cos(a - b) - cos(a + b)] / 2` and, for an integer
/// `k != 0`, `int_0^L x cos(k pi x / L) dx = (L / (k pi))^2 ((-1)^k - 1)`
/// (integration by parts),
///
/// `<n|x|m> = (2/L) int_0^L x sin(n pi x/L) sin(m pi x/L) dx`
/// `        = (1/L) [ (L/((n-m) pi))^2 ((-1)^(n-m) - 1) - (L/((n+m) pi))^2 ((-1)^(n+m) - 1) ]`.
///
/// For `n + m` even both brackets vanish, so the dipole is 0 (the parity
/// selection rule about the box centre). For `n + m` odd both brackets are
/// `-2`, and
///
/// `<n|x|m> = (2L/pi^2) [1/(n+m)^2 - 1/(n-m)^2] = -8 L n m / (pi^2 (n^2 - m^2)^2)`,
///
/// negative for every allowed pair with this sign convention (both states
/// start positive at the left wall). This standard result appears among the
/// particle-in-a-box exercises of P. Atkins and R. Friedman, *Molecular
/// Quantum Mechanics* (Oxford University Press) (from memory); the
/// derivation above is self-contained and is checked numerically in the
/// tests.
///
/// For `n == m` the result is the mean position `L/2`. Off-diagonal values
/// do not depend on where the origin is; the diagonal does. Since
/// `psi_0` vanishes identically, `n = 0` or `m = 0` gives 0.
///
/// ```
/// use chainwell::observables::box_dipole;
/// use std::f64::consts::PI;
/// // <1|x|2> = -16 L / (9 pi^2).
/// assert!((box_dipole(1, 2, 3.0) + 16.0 * 3.0 / (9.0 * PI * PI)).abs() < 1e-15);
/// assert_eq!(box_dipole(1, 3, 3.0), 0.0);
/// ```
pub fn box_dipole(n: usize, m: usize, length: f64) -> f64 {
    if n == 0 || m == 0 {
        return 0.0;
    }
    if n == m {
        return length / 2.0;
    }
    if (n + m).is_multiple_of(2) {
        return 0.0;
    }
    // Evaluate with the smaller number first so that the value is exactly
    // symmetric in (n, m) in floating point too.
    let (nf, mf) = (n.min(m) as f64, n.max(m) as f64);
    let diff = nf * nf - mf * mf;
    -8.0 * length * nf * mf / (PI * PI * diff * diff)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::constants::hbar2_over_2me_ev_a2;
    use crate::observables::transitions::dipole;
    use approx::assert_relative_eq;
    use proptest::prelude::*;

    #[test]
    fn box_energy_closed_form() {
        // E_n = n^2 h^2 / (8 m_e L^2), Griffiths eq. 2.30, with h, m_e, e
        // from CODATA 2022 (independent of hbar2_over_2me_ev_a2).
        let h = crate::constants::PLANCK_J_S;
        let me = crate::constants::ELECTRON_MASS_KG;
        let e = crate::constants::ELEMENTARY_CHARGE_C;
        let length_m = 8.0e-10;
        for n in 1..6 {
            let nf = n as f64;
            let expected = nf * nf * h * h / (8.0 * me * length_m * length_m) / e;
            let got = box_energy(n, 8.0, hbar2_over_2me_ev_a2());
            assert_relative_eq!(got, expected, max_relative = 1e-12);
        }
        // 1 Å box, n = 1: 37.6 eV (from memory: pi^2 * 3.80998 = 37.603).
        assert_relative_eq!(
            box_energy(1, 1.0, hbar2_over_2me_ev_a2()),
            37.603,
            max_relative = 1e-4
        );
        assert_eq!(box_energy(0, 3.0, 3.8), 0.0);
    }

    #[test]
    fn effective_length_inverts_box_energy() {
        let kinetic = hbar2_over_2me_ev_a2();
        for n in 1..5 {
            let e = box_energy(n, 12.5, kinetic);
            let got = effective_box_length(e, n, kinetic);
            assert_relative_eq!(got.unwrap_or(f64::NAN), 12.5, max_relative = 1e-13);
        }
        assert_eq!(effective_box_length(0.0, 1, kinetic), None);
        assert_eq!(effective_box_length(-1.0, 1, kinetic), None);
        assert_eq!(effective_box_length(1.0, 0, kinetic), None);
        assert_eq!(effective_box_length(f64::NAN, 1, kinetic), None);
    }

    #[test]
    fn box_dipole_matches_numerical_integration() {
        // Trapezoid rule on sin states: the integrand x sin sin and its first
        // derivative vanish at both walls, so the error is O(h^4) (Euler-
        // Maclaurin), about 1e-14 here.
        let length = 6.0;
        let points = 20_000;
        let h = length / (points + 1) as f64;
        let x: Vec<f64> = (1..=points).map(|i| i as f64 * h).collect();
        let state = |n: usize| -> Vec<f64> {
            let amp = (2.0 / length).sqrt();
            x.iter()
                .map(|&xi| amp * (n as f64 * PI * xi / length).sin())
                .collect()
        };
        let states: Vec<Vec<f64>> = (1..=6).map(state).collect();
        for n in 1..=6 {
            for m in 1..=6 {
                let numeric = dipole(&x, &states[n - 1], &states[m - 1], h);
                let exact = box_dipole(n, m, length);
                if exact == 0.0 {
                    assert!(numeric.abs() < 1e-10, "({n},{m}) gave {numeric}");
                } else {
                    assert_relative_eq!(numeric, exact, max_relative = 1e-8);
                }
            }
        }
        // By hand: <1|x|2> = -16 L / (9 pi^2).
        assert_relative_eq!(
            box_dipole(1, 2, length),
            -16.0 * length / (9.0 * PI * PI),
            max_relative = 1e-15
        );
        assert_eq!(box_dipole(0, 3, length), 0.0);
    }

    #[test]
    fn trk_sum_of_the_box_converges_to_one() {
        // Thomas-Reiche-Kuhn: sum_j (E_j - E_1) |<1|x|j>|^2 = hbar^2/(2m)
        // (W. Thomas, Naturwiss. 13, 627 (1925); W. Kuhn, Z. Phys. 33, 408
        // (1925); from memory). The tail beyond j = 200 is about 1.4e-7.
        let kinetic = hbar2_over_2me_ev_a2();
        let length = 9.0;
        let e1 = box_energy(1, length, kinetic);
        let mut partial = 0.0;
        let mut previous = 0.0;
        for j in 2..=200 {
            let d = box_dipole(1, j, length);
            partial += (box_energy(j, length, kinetic) - e1) * d * d / kinetic;
            assert!(partial >= previous);
            previous = partial;
        }
        assert!(partial < 1.0);
        assert!((1.0 - partial).abs() < 1e-4, "partial sum {partial}");
        // The first term alone carries 96 %: by hand,
        // (3 pi^2 / L^2) (16 L / (9 pi^2))^2 = 256 / (27 pi^2) = 0.9607.
        let d12 = box_dipole(1, 2, length);
        let first = 3.0 * PI * PI / (length * length) * d12 * d12;
        assert_relative_eq!(first, 256.0 / (27.0 * PI * PI), max_relative = 1e-12);
    }

    proptest! {
        #[test]
        fn box_dipole_is_symmetric(n in 1usize..60, m in 1usize..60, length in 0.5f64..50.0) {
            prop_assert_eq!(box_dipole(n, m, length), box_dipole(m, n, length));
            if n != m && (n + m) % 2 == 1 {
                prop_assert!(box_dipole(n, m, length) < 0.0);
            }
        }
    }
}
