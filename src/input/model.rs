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

impl GridSpec {
    /// The order `p` with which the discretisation error of the levels falls
    /// as the spacing `h` shrinks (`O(h^p)`): the finite-difference order,
    /// and 4 for Numerov's scheme (M. Pillai, J. Goglio and T. G. Walker,
    /// Am. J. Phys. 80, 1017 (2012)). The one place that says so.
    pub fn accuracy_order(&self) -> u32 {
        match self.scheme {
            Scheme::FiniteDifference => self.order.get(),
            Scheme::Numerov => 4,
        }
    }

    /// Half-width of the discretised Hamiltonian's band: `p` of the order-`2p`
    /// stencil, 2 for Numerov's pentadiagonal pair.
    pub fn half_width(&self) -> usize {
        match self.scheme {
            Scheme::FiniteDifference => self.order.half_width(),
            Scheme::Numerov => 2,
        }
    }

    /// The fewest unknowns the discretisation works on: one whole stencil,
    /// `2p + 1` points for finite differences of order `2p`, and 5 for
    /// Numerov (its pentadiagonal pair).
    pub fn min_points(&self) -> usize {
        match self.scheme {
            Scheme::FiniteDifference => 2 * self.order.half_width() + 1,
            Scheme::Numerov => 5,
        }
    }

    /// The fewest unknowns of a grid that can hold the levels up to `highest`
    /// (1-based): `highest + 2 * half_width + 2`, so that the highest level
    /// stays a stencil's width and a margin below the top of the grid's
    /// spectrum, where the discrete levels stop following the continuous
    /// ones (common practice, no source). Used to decide whether a coarser
    /// grid can still carry the levels (error estimates, convergence
    /// studies).
    pub fn points_for_levels(&self, highest: usize) -> usize {
        highest
            .saturating_add(2 * self.half_width())
            .saturating_add(2)
    }
}

/// `[levels]`, checked, with a record of what the input wrote.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct LevelSpec {
    /// Number of levels wanted (for `below`, the most that may be returned).
    /// At least 1. When not written: enough for the LUMO and three levels
    /// above it when electrons are known, else [`DEFAULT_COUNT`];
    /// `usize::MAX` with `below`.
    pub count: usize,
    /// 1-based number of the lowest level wanted (at least 1; default 1).
    pub first: usize,
    /// Every level below this energy (eV), instead of `first`/`count`.
    pub below: Option<f64>,
    /// Electrons to fill, two per level from the bottom.
    pub electrons: Option<usize>,
    /// Whether `count` was written in the input (or an override) rather
    /// than chosen by default.
    pub count_given: bool,
    /// Whether `first` was written in the input (or an override).
    pub first_given: bool,
    /// Whether `electrons` was written in the input (or an override) rather
    /// than taken from a chain's one-per-atom default.
    pub electrons_given: bool,
}

impl LevelSpec {
    /// The wanted levels as a 0-based window: the index of the lowest level
    /// (`first - 1`) and how many. The one place where the user's 1-based
    /// level numbers become 0-based indices.
    pub fn window(&self) -> (usize, usize) {
        (self.first.saturating_sub(1), self.count)
    }

    /// 1-based number of the highest level wanted, `first + count - 1`
    /// (saturating: `count` is `usize::MAX` with `below`).
    pub fn last(&self) -> usize {
        self.first.saturating_add(self.count).saturating_sub(1)
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

/// `[response]`, checked: what of the static response to compute.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ResponseSpec {
    /// β and γ beside α (default true); α alone costs about half.
    pub hyperpolarizabilities: bool,
    /// α as a sum over the computed states beside the exact one (default
    /// true).
    pub sum_over_states: bool,
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
    /// Static response along x, when `[response]` asks for it.
    pub response: Option<ResponseSpec>,
    /// Where some keys were written (`levels.count`, `levels.electrons`,
    /// `grid.points`, ...), for locating faults that only the solve can
    /// find. Whether a key was written is recorded in the typed specs
    /// ([`LevelSpec::count_given`], ...), not here.
    pub key_locations: std::collections::BTreeMap<String, Location>,
    /// What the user should know about values that pass the checks but are
    /// implausible for the system they describe (a bond length in nm, an
    /// alternation of 90 eV), each naming its key.
    pub warnings: Vec<String>,
    /// The Hückel picture of the same atoms (`[huckel]`), if asked for.
    pub huckel: Option<crate::observables::huckel::HuckelSpec>,
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

#[cfg(test)]
mod tests {
    use super::*;

    fn grid(order: u32, scheme: Scheme) -> GridSpec {
        GridSpec {
            resolution: Resolution::Points(100),
            order: Order::new(order).unwrap(),
            scheme,
            max_points: DEFAULT_MAX_POINTS,
        }
    }

    #[test]
    fn numerov_is_of_order_four_and_pentadiagonal() {
        // Numerov's scheme: fourth order, a pentadiagonal pair (Pillai,
        // Goglio and Walker, Am. J. Phys. 80, 1017 (2012)).
        let n = grid(4, Scheme::Numerov);
        assert_eq!(n.accuracy_order(), 4);
        assert_eq!(n.half_width(), 2);
        assert_eq!(n.min_points(), 5);
        // Finite differences of order 2p: a (2p + 1)-point stencil (Fornberg,
        // Math. Comp. 51, 699 (1988)).
        for (order, min) in [(2, 3), (4, 5), (6, 7), (8, 9)] {
            let g = grid(order, Scheme::FiniteDifference);
            assert_eq!(g.accuracy_order(), order);
            assert_eq!(g.min_points(), min);
            assert_eq!(g.half_width(), (order / 2) as usize);
        }
    }

    #[test]
    fn a_grid_for_levels_leaves_a_stencil_and_a_margin_above_them() {
        // Levels up to n = 10 with an order-4 stencil: 10 + 2*2 + 2.
        assert_eq!(grid(4, Scheme::FiniteDifference).points_for_levels(10), 16);
        assert_eq!(grid(8, Scheme::FiniteDifference).points_for_levels(10), 20);
        assert_eq!(grid(4, Scheme::Numerov).points_for_levels(1), 7);
        // No overflow for `below`'s unbounded count.
        assert_eq!(
            grid(2, Scheme::FiniteDifference).points_for_levels(usize::MAX),
            usize::MAX
        );
    }

    #[test]
    fn the_level_window_is_zero_based() {
        let spec = LevelSpec {
            count: 4,
            first: 7,
            below: None,
            electrons: None,
            count_given: true,
            first_given: true,
            electrons_given: false,
        };
        assert_eq!(spec.window(), (6, 4));
        assert_eq!(spec.last(), 10);
        let all = LevelSpec {
            count: usize::MAX,
            first: 1,
            ..spec
        };
        assert_eq!(all.window(), (0, usize::MAX));
        assert_eq!(all.last(), usize::MAX - 1);
    }
}
