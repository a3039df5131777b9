//! Response coefficients from chainwell's internal units (e = 1, Å, eV; the
//! field in V/Å) to the units they are reported in.
//!
//! With `E(F) = E0 - μF - αF²/2 - βF³/6 - γF⁴/24`, α is in `e² Å² / eV`,
//! β in `e³ Å³ / eV²` and γ in `e⁴ Å⁴ / eV³`. The atomic units are
//! `e² a0² / Eh`, `e³ a0³ / Eh²` and `e⁴ a0⁴ / Eh³`; the polarizability
//! volume is `α / (4 π ε0)` and `e² / (4 π ε0) = Eh a0` (the definition of
//! the hartree), so `α' = α Eh a0` in Å³ when Eh is in eV and a0 in Å. The
//! esu (Gaussian) values multiply the atomic ones by `e³ a0³ / Eh²` and
//! `e⁴ a0⁴ / Eh³` written in statcoulomb, centimetre and erg, with
//! `1 statC = 1 C / (10 c)` (c in m/s) and `1 erg = 1e-7 J` (J. D. Jackson,
//! *Classical Electrodynamics*, 3rd ed., appendix on units).

use crate::constants::{BOHR_ANGSTROM, ELEMENTARY_CHARGE_C, HARTREE_EV, SPEED_OF_LIGHT_M_S};

/// `e² a0² / Eh` in the internal unit `e² Å² / eV`.
fn alpha_unit() -> f64 {
    BOHR_ANGSTROM.powi(2) / HARTREE_EV
}

/// α in atomic units from `e² Å² / eV`.
pub fn alpha_au(alpha: f64) -> f64 {
    alpha / alpha_unit()
}

/// The polarizability volume `α / (4 π ε0)` in Å³ from `e² Å² / eV`.
pub fn alpha_angstrom3(alpha: f64) -> f64 {
    alpha * HARTREE_EV * BOHR_ANGSTROM
}

/// β in atomic units from `e³ Å³ / eV²`.
pub fn beta_au(beta: f64) -> f64 {
    beta * HARTREE_EV.powi(2) / BOHR_ANGSTROM.powi(3)
}

/// γ in atomic units from `e⁴ Å⁴ / eV³`.
pub fn gamma_au(gamma: f64) -> f64 {
    gamma * HARTREE_EV.powi(3) / BOHR_ANGSTROM.powi(4)
}

/// The elementary charge in statcoulomb, the bohr in cm and the hartree in
/// erg.
fn gaussian() -> (f64, f64, f64) {
    let e = ELEMENTARY_CHARGE_C * 10.0 * SPEED_OF_LIGHT_M_S;
    let a0 = BOHR_ANGSTROM * 1e-8;
    let eh = HARTREE_EV * ELEMENTARY_CHARGE_C * 1e7;
    (e, a0, eh)
}

/// esu per atomic unit of β: `e³ a0³ / Eh²` in Gaussian units.
pub fn esu_per_au_beta() -> f64 {
    let (e, a0, eh) = gaussian();
    (e * a0).powi(3) / eh.powi(2)
}

/// esu per atomic unit of γ: `e⁴ a0⁴ / Eh³` in Gaussian units.
pub fn esu_per_au_gamma() -> f64 {
    let (e, a0, eh) = gaussian();
    (e * a0).powi(4) / eh.powi(3)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn conversion_factors_match_their_published_values() {
        // 1 a.u. of polarizability volume = a0³ = 0.148 184 7 Å³ (a0 from
        // CODATA 2018).
        assert_relative_eq!(
            alpha_angstrom3(alpha_unit()),
            0.529_177_210_903f64.powi(3),
            max_relative = 1e-12
        );
        // e²/(4 pi eps0) = 14.399 645 eV Å: from memory.
        assert_relative_eq!(alpha_angstrom3(1.0), 14.399_645, max_relative = 1e-7);
        // 1 a.u. of beta = 8.639 e-33 esu and of gamma = 5.037 e-40 esu
        // (the factors quoted with hyperpolarizabilities in the literature;
        // from memory).
        assert_relative_eq!(esu_per_au_beta(), 8.6392e-33, max_relative = 1e-4);
        assert_relative_eq!(esu_per_au_gamma(), 5.0367e-40, max_relative = 1e-4);
        // Round trips of the atomic units.
        assert_relative_eq!(alpha_au(alpha_unit()), 1.0, max_relative = 1e-14);
        let b = BOHR_ANGSTROM.powi(3) / HARTREE_EV.powi(2);
        assert_relative_eq!(beta_au(b), 1.0, max_relative = 1e-14);
        let g = BOHR_ANGSTROM.powi(4) / HARTREE_EV.powi(3);
        assert_relative_eq!(gamma_au(g), 1.0, max_relative = 1e-14);
    }
}
