//! Units of input and output.
//!
//! chainwell computes in ångström and electronvolt. An input may choose other
//! units in its `[units]` table; every value it gives is converted once, when
//! the input is checked, and every reported value is converted back, so the
//! output speaks the input's units and says which in its `units` key.

use serde::Serialize;

use crate::constants;

/// A unit of length.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum LengthUnit {
    /// Ångström (the default).
    #[serde(rename = "angstrom")]
    Angstrom,
    /// Nanometre, 10 Å.
    #[serde(rename = "nm")]
    Nanometre,
    /// Bohr radius, CODATA 2022.
    #[serde(rename = "bohr")]
    Bohr,
}

/// A unit of energy.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum EnergyUnit {
    /// Electronvolt (the default).
    #[serde(rename = "eV")]
    ElectronVolt,
    /// Millielectronvolt.
    #[serde(rename = "meV")]
    MilliElectronVolt,
    /// Hartree, CODATA 2022.
    #[serde(rename = "hartree")]
    Hartree,
    /// Wavenumber, cm⁻¹ (energy `h c / lambda`).
    #[serde(rename = "cm-1")]
    Wavenumber,
    /// Kilojoule per mole.
    #[serde(rename = "kJ/mol")]
    KilojoulePerMole,
}

impl LengthUnit {
    /// All accepted spellings, for messages.
    pub const NAMES: &'static [&'static str] = &["angstrom", "nm", "bohr"];

    /// Parses a unit name as written in `[units]`.
    pub fn parse(name: &str) -> Option<Self> {
        match name {
            "angstrom" | "Angstrom" | "A" | "Å" => Some(Self::Angstrom),
            "nm" => Some(Self::Nanometre),
            "bohr" | "a0" => Some(Self::Bohr),
            _ => None,
        }
    }

    /// Ångström per unit.
    pub fn in_angstrom(self) -> f64 {
        match self {
            Self::Angstrom => 1.0,
            Self::Nanometre => 10.0,
            Self::Bohr => constants::BOHR_ANGSTROM,
        }
    }

    /// The unit's name as written in output.
    pub fn label(self) -> &'static str {
        match self {
            Self::Angstrom => "angstrom",
            Self::Nanometre => "nm",
            Self::Bohr => "bohr",
        }
    }
}

impl EnergyUnit {
    /// All accepted spellings, for messages.
    pub const NAMES: &'static [&'static str] = &["eV", "meV", "hartree", "cm-1", "kJ/mol"];

    /// Parses a unit name as written in `[units]`.
    pub fn parse(name: &str) -> Option<Self> {
        match name {
            "eV" | "ev" => Some(Self::ElectronVolt),
            "meV" => Some(Self::MilliElectronVolt),
            "hartree" | "Eh" => Some(Self::Hartree),
            "cm-1" | "cm^-1" => Some(Self::Wavenumber),
            "kJ/mol" => Some(Self::KilojoulePerMole),
            _ => None,
        }
    }

    /// Electronvolt per unit.
    pub fn in_ev(self) -> f64 {
        match self {
            Self::ElectronVolt => 1.0,
            Self::MilliElectronVolt => 1e-3,
            Self::Hartree => constants::HARTREE_EV,
            Self::Wavenumber => constants::ev_per_wavenumber(),
            Self::KilojoulePerMole => constants::ev_per_kj_mol(),
        }
    }

    /// The unit's name as written in output.
    pub fn label(self) -> &'static str {
        match self {
            Self::ElectronVolt => "eV",
            Self::MilliElectronVolt => "meV",
            Self::Hartree => "hartree",
            Self::Wavenumber => "cm-1",
            Self::KilojoulePerMole => "kJ/mol",
        }
    }
}

/// The units an input speaks; output uses the same.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub struct Units {
    /// Unit of every length (positions, widths, the grid spacing).
    pub length: LengthUnit,
    /// Unit of every energy (term heights, levels, gaps).
    pub energy: EnergyUnit,
}

impl Default for Units {
    fn default() -> Self {
        Self {
            length: LengthUnit::Angstrom,
            energy: EnergyUnit::ElectronVolt,
        }
    }
}

impl Units {
    /// A length in input units, in ångström.
    pub fn length_in(&self, value: f64) -> f64 {
        value * self.length.in_angstrom()
    }
    /// A length in ångström, in input units.
    pub fn length_out(&self, angstrom: f64) -> f64 {
        angstrom / self.length.in_angstrom()
    }
    /// An energy in input units, in eV.
    pub fn energy_in(&self, value: f64) -> f64 {
        value * self.energy.in_ev()
    }
    /// An energy in eV, in input units.
    pub fn energy_out(&self, ev: f64) -> f64 {
        ev / self.energy.in_ev()
    }
    /// A dipole in e·Å, in e·(input length).
    pub fn dipole_out(&self, e_angstrom: f64) -> f64 {
        self.length_out(e_angstrom)
    }
    /// The `units` object of every JSON document.
    pub fn to_json(&self) -> serde_json::Value {
        serde_json::json!({"energy": self.energy.label(), "length": self.length.label()})
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn conversions_round_trip_and_match_codata() {
        let u = Units {
            length: LengthUnit::Bohr,
            energy: EnergyUnit::Hartree,
        };
        assert_relative_eq!(u.length_out(u.length_in(3.7)), 3.7, max_relative = 1e-15);
        // 1 hartree = 27.211 386 245 981 eV (CODATA 2022).
        assert_relative_eq!(u.energy_in(1.0), 27.211_386_245_981, max_relative = 1e-15);
        // 8065.543 94 cm^-1 per eV (CODATA 2022 conversion table; exact).
        let w = Units {
            length: LengthUnit::Nanometre,
            energy: EnergyUnit::Wavenumber,
        };
        assert_relative_eq!(w.energy_out(1.0), 8_065.543_94, max_relative = 1e-9);
        assert_relative_eq!(w.length_in(1.0), 10.0);
    }

    #[test]
    fn every_listed_name_parses() {
        for n in LengthUnit::NAMES {
            assert!(LengthUnit::parse(n).is_some(), "{n}");
        }
        for n in EnergyUnit::NAMES {
            assert!(EnergyUnit::parse(n).is_some(), "{n}");
        }
        assert!(EnergyUnit::parse("kcal").is_none());
    }
}
