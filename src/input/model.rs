//! The checked input: the typed model the numerics use.
//!
//! Every value is in chainwell's internal units (ångström, eV, electron
//! masses) and has passed its range checks. Nothing here refers to TOML.

use serde::Serialize;

use crate::grid::{Domain, Order, Scheme};
use crate::input::error::Location;
use crate::potential::chain::ChainSpec;
use crate::potential::Potential;
use crate::units::Units;

/// Default finite-difference order when `[grid]` gives none.
pub const DEFAULT_ORDER: u32 = 4;
/// Default grid spacing in Å when `[grid]` gives neither points nor spacing
/// (about 100 points per ångström; common practice, no source).
pub const DEFAULT_SPACING_ANGSTROM: f64 = 0.01;
/// Default number of levels when neither `count` nor `electrons` is given.
pub const DEFAULT_COUNT: usize = 10;
/// Default chain bond length, Å (an average C–C bond of a polyene, about
/// 1.40 Å; from memory).
pub const DEFAULT_BOND_LENGTH: f64 = 1.40;
/// Default width (standard deviation) of a chain site, Å.
pub const DEFAULT_SITE_WIDTH: f64 = 0.5;
/// Default full width at half maximum of an absorption band, eV.
pub const DEFAULT_FWHM_EV: f64 = 0.3;
/// Default upper limit on grid points when refining to a tolerance.
pub const DEFAULT_MAX_POINTS: usize = 2_000_000;

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
