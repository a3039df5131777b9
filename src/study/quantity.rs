//! Observed quantities a fit or a target compares with a solve.
//!
//! `gap` is `E_LUMO - E_HOMO` and `wavelength_nm` is `hc / gap`
//! (hc = 1239.841 984 eV nm, CODATA 2022, exact), both from the aufbau filling of
//! the free-electron model (H. Kuhn, J. Chem. Phys. 17, 1198 (1949));
//! `homo` and `lumo` are those levels' energies and `energy.N` the energy of
//! level N. Energies are in the input's energy unit.

use crate::input::Model;
use crate::pipeline::Solution;

/// A quantity read off one solve.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Quantity {
    /// HOMO–LUMO gap, input energy unit.
    Gap,
    /// Wavelength of the HOMO → LUMO absorption, nm.
    WavelengthNm,
    /// Energy of the HOMO.
    Homo,
    /// Energy of the LUMO.
    Lumo,
    /// Energy of level `n` (1-based).
    Energy(usize),
}

/// Why a quantity cannot be read.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum QuantityError {
    /// The name is none of the known quantities.
    #[error("`{0}` is not a quantity; use gap, wavelength_nm, homo, lumo or energy.N (N a level number)")]
    Unknown(String),
    /// The solve has no occupancy (no electrons).
    #[error(
        "{0} needs the electron count: the input gives no levels.electrons and is not a chain"
    )]
    NoOccupancy(&'static str),
    /// The HOMO shares a degenerate group with room left: no gap.
    #[error("{what}: levels {levels} are degenerate and partly filled (an open shell), so there is no HOMO-LUMO gap; fit energy.N or another electron count")]
    OpenShell {
        /// The quantity asked for.
        what: &'static str,
        /// The group, as `6-7`.
        levels: String,
    },
    /// The level was not computed.
    #[error("level {0} was not computed; raise levels.count or lower levels.first")]
    NotComputed(usize),
}

impl Quantity {
    /// Reads `gap`, `wavelength_nm`, `homo`, `lumo` or `energy.N`.
    pub fn parse(name: &str) -> Result<Self, QuantityError> {
        match name.trim() {
            "gap" => Ok(Quantity::Gap),
            "wavelength_nm" => Ok(Quantity::WavelengthNm),
            "homo" => Ok(Quantity::Homo),
            "lumo" => Ok(Quantity::Lumo),
            other => other
                .strip_prefix("energy.")
                .and_then(|n| n.parse::<usize>().ok())
                .filter(|&n| n >= 1)
                .map(Quantity::Energy)
                .ok_or_else(|| QuantityError::Unknown(other.to_string())),
        }
    }

    /// The name as written in data files and documents.
    pub fn name(&self) -> String {
        match self {
            Quantity::Gap => "gap".into(),
            Quantity::WavelengthNm => "wavelength_nm".into(),
            Quantity::Homo => "homo".into(),
            Quantity::Lumo => "lumo".into(),
            Quantity::Energy(n) => format!("energy.{n}"),
        }
    }

    /// The quantity of a solution, in the model's output units.
    pub fn of(&self, model: &Model, sol: &Solution) -> Result<f64, QuantityError> {
        let u = &model.units;
        let level = |n: usize| {
            sol.levels
                .iter()
                .find(|l| l.n == n)
                .map(|l| l.energy)
                .ok_or(QuantityError::NotComputed(n))
        };
        let occ = |what: &'static str| {
            sol.occupancy
                .as_ref()
                .ok_or(QuantityError::NoOccupancy(what))
        };
        let gap = |what: &'static str| {
            let o = occ(what)?;
            match (o.gap, o.open_shell) {
                (Some(g), _) => Ok((o, g)),
                (None, true) => Err(QuantityError::OpenShell {
                    what,
                    levels: format!("{}-{}", o.homo_group.first().unwrap_or(&o.homo), o.homo),
                }),
                (None, false) => Err(QuantityError::NotComputed(o.homo + 1)),
            }
        };
        match self {
            Quantity::Gap => Ok(u.energy_out(gap("gap")?.1)),
            Quantity::WavelengthNm => {
                let (o, _) = gap("wavelength_nm")?;
                Ok(o.wavelength_nm.unwrap_or(f64::INFINITY))
            }
            Quantity::Homo => Ok(u.energy_out(level(occ("homo")?.homo)?)),
            Quantity::Lumo => {
                let o = occ("lumo")?;
                Ok(u.energy_out(level(o.lumo.unwrap_or(o.homo + 1))?))
            }
            Quantity::Energy(n) => Ok(u.energy_out(level(*n)?)),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_round_trip() {
        for q in [
            Quantity::Gap,
            Quantity::WavelengthNm,
            Quantity::Homo,
            Quantity::Lumo,
            Quantity::Energy(7),
        ] {
            assert_eq!(Quantity::parse(&q.name()), Ok(q));
        }
        assert!(Quantity::parse("energy.0").is_err());
        assert!(Quantity::parse("colour").is_err());
    }
}
