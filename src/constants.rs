//! Physical constants and unit conversions, in one place.
//!
//! Every value is a CODATA 2018 recommended value (E. Tiesinga, P. J. Mohr,
//! D. B. Newell and B. N. Taylor, Rev. Mod. Phys. 93, 025010 (2021)); since the
//! 2019 SI redefinition `h`, `e`, `c` and `N_A` are exact. Derived values are
//! computed here from those, never typed in, so they stay consistent.
//!
//! Internally chainwell works in ångström (length), electronvolt (energy) and
//! electron masses (mass); everything else is converted at the edges.

use std::f64::consts::PI;

/// Planck constant in J s (CODATA 2018, exact).
pub const PLANCK_J_S: f64 = 6.626_070_15e-34;
/// Elementary charge in C (CODATA 2018, exact).
pub const ELEMENTARY_CHARGE_C: f64 = 1.602_176_634e-19;
/// Speed of light in vacuum in m/s (CODATA 2018, exact).
pub const SPEED_OF_LIGHT_M_S: f64 = 299_792_458.0;
/// Electron mass in kg (CODATA 2018).
pub const ELECTRON_MASS_KG: f64 = 9.109_383_701_5e-31;
/// Avogadro constant in 1/mol (CODATA 2018, exact).
pub const AVOGADRO_PER_MOL: f64 = 6.022_140_76e23;
/// Bohr radius in ångström (CODATA 2018: 0.529 177 210 903 e-10 m).
pub const BOHR_ANGSTROM: f64 = 0.529_177_210_903;
/// Hartree energy in eV (CODATA 2018: 27.211 386 245 988 eV).
pub const HARTREE_EV: f64 = 27.211_386_245_988;
/// Atomic mass constant in electron masses (CODATA 2018: m_u / m_e = 1822.888 486 209).
pub const DALTON_IN_ELECTRON_MASSES: f64 = 1_822.888_486_209;

/// Metres per ångström (definition of the ångström).
pub const METRE_PER_ANGSTROM: f64 = 1e-10;

/// Reduced Planck constant in J s, `h / (2 pi)`.
pub fn hbar_j_s() -> f64 {
    PLANCK_J_S / (2.0 * PI)
}

/// `hbar^2 / (2 m_e)` in eV Å² (about 3.80998 eV Å²): the kinetic prefactor
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
        // hbar^2/(2 m_e) = 3.809 982 12 eV Å²: from memory, consistent with
        // CODATA 2018 hbar = 1.054 571 817e-34 J s.
        assert_relative_eq!(hbar2_over_2me_ev_a2(), 3.809_982_12, max_relative = 1e-8);
        // hc = 1239.841 984 eV nm (CODATA 2018 lists hc = 1.239 841 984e-6 eV m).
        assert_relative_eq!(hc_ev_nm(), 1_239.841_984, max_relative = 1e-9);
        // 1 cm^-1 = 1.239 841 984e-4 eV (CODATA 2018 conversion table).
        assert_relative_eq!(ev_per_wavenumber(), 1.239_841_984e-4, max_relative = 1e-9);
        // 1 eV = 96.485 332 12 kJ/mol (CODATA 2018, Faraday constant / 1000).
        assert_relative_eq!(1.0 / ev_per_kj_mol(), 96.485_332_12, max_relative = 1e-9);
        // 1 e Å = 4.803 204 7 D: from memory.
        assert_relative_eq!(debye_per_e_angstrom(), 4.803_204_7, max_relative = 1e-7);
        // Hartree = hbar^2/(m_e a0^2): consistency of the tabulated a0 and E_h.
        let hartree = 2.0 * hbar2_over_2me_ev_a2() / (BOHR_ANGSTROM * BOHR_ANGSTROM);
        assert_relative_eq!(hartree, HARTREE_EV, max_relative = 1e-9);
    }
}
