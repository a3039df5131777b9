//! The checked input: the typed model the numerics use.
//!
//! Every value is in chainwell's internal units (ångström, eV, electron
//! masses) and has passed its range checks. Nothing here refers to TOML.

use serde::Serialize;

use crate::grid::Order;
use crate::input::error::Location;
use crate::potential::Potential;
use crate::units::Units;

/// Boundary condition of the domain.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Boundary {
    /// `psi = 0` at both ends (a box with hard walls).
    Walls,
    /// A ring: `psi(from) = psi(to)`.
    Periodic,
}

/// The interval the particle lives on.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Domain {
    /// Left end, Å.
    pub from: f64,
    /// Right end, Å (`to > from`).
    pub to: f64,
    /// Walls or a ring.
    pub boundary: Boundary,
}

impl Domain {
    /// Length `to - from`, Å.
    pub fn length(&self) -> f64 {
        self.to - self.from
    }
}

/// How the grid is chosen.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Resolution {
    /// This many unknowns.
    Points(usize),
    /// About this spacing, Å (rounded so that the domain holds whole steps).
    Spacing(f64),
    /// Refine until every level's error estimate is below this (relative).
    Tolerance(f64),
}

/// The discretisation of the kinetic energy.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Scheme {
    /// Central finite differences of the grid's order.
    FiniteDifference,
    /// Numerov's fourth-order scheme in matrix form.
    Numerov,
}

/// `[grid]`, checked.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct GridSpec {
    /// Points, spacing or tolerance.
    pub resolution: Resolution,
    /// Accuracy order of the finite differences.
    pub order: Order,
    /// Finite differences or Numerov.
    pub scheme: Scheme,
    /// Most points the refinement to a tolerance may use.
    pub max_points: usize,
}

/// `[levels]`, checked.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct LevelSpec {
    /// Number of levels wanted (for `below`, the most that may be returned).
    pub count: usize,
    /// 1-based number of the lowest level wanted.
    pub first: usize,
    /// Every level below this energy (eV), instead of `first`/`count`.
    pub below: Option<f64>,
    /// Electrons to fill, two per level from the bottom.
    pub electrons: Option<usize>,
    /// Whether `electrons` was written in the input (or an override) rather
    /// than taken from a chain's one-per-atom default.
    pub electrons_given: bool,
}

/// A `[[chain.site]]`, checked.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Site {
    /// Atom number, 1 ..= bonds + 1.
    pub atom: usize,
    /// Height of the Gaussian, eV.
    pub height: f64,
    /// Standard deviation, Å.
    pub width: f64,
}

/// `[chain]`, checked: kept beside the terms it made, for reports and for
/// the repeat unit of `bands`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ChainSpec {
    /// Bonds along the conjugated path (atoms = bonds + 1).
    pub bonds: usize,
    /// Average bond length, Å.
    pub bond_length: f64,
    /// How far the box reaches beyond each terminal atom, Å.
    pub end_extension: f64,
    /// Amplitude of the bond-alternation ripple, eV.
    pub alternation: f64,
    /// Height of the end-cap steps, eV.
    pub end_cap_height: f64,
    /// Width of the end-cap steps, Å.
    pub end_cap_width: f64,
    /// Heteroatom or substituent sites.
    pub sites: Vec<Site>,
}

impl ChainSpec {
    /// Number of atoms, `bonds + 1`.
    pub fn atoms(&self) -> usize {
        self.bonds + 1
    }
    /// Box length `bonds * bond_length + 2 * end_extension`, Å.
    pub fn box_length(&self) -> f64 {
        self.bonds as f64 * self.bond_length + 2.0 * self.end_extension
    }
    /// Position of atom `a` (1-based), Å from the left end of the box.
    pub fn atom_position(&self, a: usize) -> f64 {
        self.end_extension + (a as f64 - 1.0) * self.bond_length
    }
}

/// `[spectrum]`, checked.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SpectrumSpec {
    /// Line shape of each band.
    pub lorentzian: bool,
    /// Full width at half maximum, eV.
    pub fwhm: f64,
    /// List every pair of computed levels, not only occupied to empty.
    pub all_pairs: bool,
}

/// The checked input.
#[derive(Debug, Clone)]
pub struct Model {
    /// Free text.
    pub title: Option<String>,
    /// Units of input and output.
    pub units: Units,
    /// Particle mass in electron masses.
    pub mass: f64,
    /// The domain.
    pub domain: Domain,
    /// The grid.
    pub grid: GridSpec,
    /// Which levels.
    pub levels: LevelSpec,
    /// V(x), the sum of the terms.
    pub potential: Potential,
    /// Where each term of `potential` was written, for errors found later.
    pub term_locations: Vec<(String, Location)>,
    /// The chain the domain and terms came from, if any.
    pub chain: Option<ChainSpec>,
    /// Spectrum options.
    pub spectrum: SpectrumSpec,
    /// Where some keys were written (`levels.count`, `levels.electrons`,
    /// `grid.points`, ...), for faults that only the solve can find.
    pub key_locations: std::collections::BTreeMap<String, Location>,
}

impl Model {
    /// The error location for `key`: where it was written, else the section
    /// or the file.
    pub fn location_of(&self, key: &str, file: &Location) -> Location {
        self.key_locations
            .get(key)
            .cloned()
            .unwrap_or_else(|| file.clone())
    }
}

impl Model {
    /// Kinetic prefactor `hbar^2 / (2 m)` in eV Å² for this particle.
    pub fn kinetic(&self) -> f64 {
        crate::constants::hbar2_over_2me_ev_a2() / self.mass
    }
}
