//! Physical constants and unit conversions, in one place.
//!
//! Every value is a CODATA 2022 recommended value (E. Tiesinga, P. J. Mohr,
//! D. B. Newell, B. N. Taylor et al., "CODATA recommended values of the
//! fundamental physical constants: 2022", published 2024–2025); since the
//! 2019 SI redefinition `h`, `e`, `c` and `N_A` are exact. Derived values are
//! computed here from those, never typed in, so they stay consistent.
//! [`EDITION`] names the adjustment; every JSON document carries it.
//!
//! Internally chainwell works in ångström (length), electronvolt (energy) and
//! electron masses (mass); everything else is converted at the edges.

use std::f64::consts::PI;

/// The adjustment the values below come from, as every JSON document names
/// it (`"constants"`).
pub const EDITION: &str = "CODATA 2022";

/// Planck constant in J s (exact in the SI since 2019).
pub const PLANCK_J_S: f64 = 6.626_070_15e-34;
/// Elementary charge in C (exact in the SI since 2019).
pub const ELEMENTARY_CHARGE_C: f64 = 1.602_176_634e-19;
/// Speed of light in vacuum in m/s (exact).
pub const SPEED_OF_LIGHT_M_S: f64 = 299_792_458.0;
/// Electron mass in kg (CODATA 2022: 9.109 383 7139(28) e-31 kg; from
/// memory of the published table, 1.36e-9 above CODATA 2018's
/// 9.109 383 7015 e-31).
pub const ELECTRON_MASS_KG: f64 = 9.109_383_713_9e-31;
/// Avogadro constant in 1/mol (exact in the SI since 2019).
pub const AVOGADRO_PER_MOL: f64 = 6.022_140_76e23;
/// Bohr radius in ångström (CODATA 2022: 0.529 177 210 544(82) e-10 m;
/// from memory of the published table).
pub const BOHR_ANGSTROM: f64 = 0.529_177_210_544;
/// Hartree energy in eV (CODATA 2022: 27.211 386 245 981(30) eV; from
/// memory of the published table).
pub const HARTREE_EV: f64 = 27.211_386_245_981;
/// Relative atomic mass of the electron, `A_r(e) = m_e / m_u` (CODATA 2022:
/// 5.485 799 090 441(97) e-4; from memory of the published table).
pub const ELECTRON_RELATIVE_ATOMIC_MASS: f64 = 5.485_799_090_441e-4;
/// Atomic mass constant in electron masses, `m_u / m_e = 1 / A_r(e)`
/// (about 1822.888 486 28 with CODATA 2022).
pub const DALTON_IN_ELECTRON_MASSES: f64 = 1.0 / ELECTRON_RELATIVE_ATOMIC_MASS;

/// Metres per ångström (definition of the ångström).
pub const METRE_PER_ANGSTROM: f64 = 1e-10;

/// Reduced Planck constant in J s, `h / (2 pi)`.
pub fn hbar_j_s() -> f64 {
    PLANCK_J_S / (2.0 * PI)
}

/// `hbar^2 / (2 m_e)` in eV Å² (about 3.809 982 111 eV Å² with CODATA 2022): the kinetic prefactor
/// for a particle of one electron mass. Divide by the mass in electron masses
/// for another particle.
pub fn hbar2_over_2me_ev_a2() -> f64 {
    let hbar = hbar_j_s();
    hbar * hbar
        / (2.0 * ELECTRON_MASS_KG)
        / ELEMENTARY_CHARGE_C
        / (METRE_PER_ANGSTROM * METRE_PER_ANGSTROM)
}

/// `h c` in eV nm (about 1239.84 eV nm): `wavelength_nm = HC / energy_ev`.
pub fn hc_ev_nm() -> f64 {
    PLANCK_J_S * SPEED_OF_LIGHT_M_S / ELEMENTARY_CHARGE_C * 1e9
}

/// Energy in eV of one wavenumber (1 cm⁻¹), `h c * 100 m^-1`.
pub fn ev_per_wavenumber() -> f64 {
    PLANCK_J_S * SPEED_OF_LIGHT_M_S * 100.0 / ELEMENTARY_CHARGE_C
}

/// Energy in eV of 1 kJ/mol, `1000 / (N_A e)`.
pub fn ev_per_kj_mol() -> f64 {
    1000.0 / (AVOGADRO_PER_MOL * ELEMENTARY_CHARGE_C)
}

/// Debye per e·Å. One debye is `1e-21 / c` C m (its definition); one e·Å is
/// `e * 1e-10` C m, so 1 e·Å is about 4.803 D.
pub fn debye_per_e_angstrom() -> f64 {
    ELEMENTARY_CHARGE_C * METRE_PER_ANGSTROM / (1e-21 / SPEED_OF_LIGHT_M_S)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn derived_constants_match_their_published_values() {
        // hbar^2/(2 m_e) = E_h a0^2 / 2 = 3.809 982 110 97 eV Å² from the
        // CODATA 2022 Hartree energy and Bohr radius (the adjusted set is
        // consistent to their uncertainties, a few 1e-10).
        assert_relative_eq!(
            hbar2_over_2me_ev_a2(),
            3.809_982_110_97,
            max_relative = 1e-11
        );
        // CODATA 2022, not 2018: the electron mass moved by 1.36e-9 relative,
        // above the 1e-10 a tolerance may ask for (2018 gave 3.809 982 116 1).
        assert!((hbar2_over_2me_ev_a2() / 3.809_982_116_1 - 1.0).abs() > 1e-9);
        // m_u / m_e = 1 / A_r(e) = 1822.888 486 28 (CODATA 2022, from memory).
        assert_relative_eq!(
            DALTON_IN_ELECTRON_MASSES,
            1_822.888_486_28,
            max_relative = 1e-11
        );
        assert_eq!(EDITION, "CODATA 2022");
        // hc = 1239.841 984 eV nm (CODATA 2022, exact: hc = 1.239 841 984...e-6 eV m).
        assert_relative_eq!(hc_ev_nm(), 1_239.841_984, max_relative = 1e-9);
        // 1 cm^-1 = 1.239 841 984e-4 eV (CODATA 2022 conversion table; exact).
        assert_relative_eq!(ev_per_wavenumber(), 1.239_841_984e-4, max_relative = 1e-9);
        // 1 eV = 96.485 332 12 kJ/mol (CODATA 2022, Faraday constant / 1000; exact).
        assert_relative_eq!(1.0 / ev_per_kj_mol(), 96.485_332_12, max_relative = 1e-9);
        // 1 e Å = 4.803 204 7 D: from memory.
        assert_relative_eq!(debye_per_e_angstrom(), 4.803_204_7, max_relative = 1e-7);
        // Hartree = hbar^2/(m_e a0^2): consistency of the tabulated a0 and E_h.
        let hartree = 2.0 * hbar2_over_2me_ev_a2() / (BOHR_ANGSTROM * BOHR_ANGSTROM);
        assert_relative_eq!(hartree, HARTREE_EV, max_relative = 1e-9);
        assert_relative_eq!(hartree, HARTREE_EV, max_relative = 1e-11);
    }
}
