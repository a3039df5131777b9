//! The unit cell of `chainwell bands`, built from a checked model.
//!
//! Two kinds of input give a cell:
//!
//! - **An explicit domain.** The domain `[from, to)` is one cell, its length
//!   the period `a = to - from` (the boundary key is not used: the Bloch
//!   condition replaces it). `grid.points` is the number `M` of cell points;
//!   `grid.spacing` gives `M = round(a / h)`; a `grid.tolerance` starts from
//!   the default spacing.
//! - **A `[chain]`.** The repeat unit of the chain is two bonds, one period
//!   of the bond-alternation ripple: the cell is `[x0, x0 + 2 b)` with `x0`
//!   the position of atom 1 (`end_extension`), so that it covers bond 1
//!   (a ripple minimum, a double bond) and bond 2. The ripple is the one of
//!   [`crate::potential::chain`] (same phase relative to the atoms), and any
//!   `[[term]]` is added, evaluated in the chain's coordinates. End caps and
//!   sites are not periodic and are left out (a warning says so for sites).
//!   The grid spacing is the finite chain's (from `grid.points` over the
//!   chain's box or `grid.spacing`), so that finite chains and the cell are
//!   discretised alike: `M = round(2 b / h)`.
//!
//! The cell points are `x_j = x0 + j a / M`, `j = 0..M-1`, the layout
//! [`CellProblem`] reads; the second-derivative weights are Fornberg's of
//! order `grid.order` (B. Fornberg, Math. Comp. 51, 699 (1988)). A Bloch
//! solve joins the cell's ends, so a potential that does not repeat
//! (`V(x0) != V(x0 + a)`) is warned about.

use serde::Serialize;

use super::grid_for;
use crate::bands::CellProblem;
use crate::grid::{second_derivative_weights, Grid};
use crate::grid::{Boundary, Domain, Scheme};
use crate::input::model::DEFAULT_SPACING_ANGSTROM;
use crate::input::model::{Model, Resolution};
use crate::potential::chain::ChainSpec;
use crate::potential::{chain, NonFinite, Potential};

/// Where a cell came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum CellSource {
    /// The input's `[domain]` is the cell.
    Domain,
    /// The repeat unit (two bonds) of the input's `[chain]`.
    Chain,
}

/// One periodic cell, sampled and ready for the band solver.
#[derive(Debug, Clone)]
pub struct Cell {
    /// Where the cell was taken from.
    pub source: CellSource,
    /// Left end `x0` of the cell, Å (chain coordinates for a chain).
    pub from: f64,
    /// Period `a`, Å.
    pub period: f64,
    /// V in eV at the cell points `x0 + j a / M`, `j = 0..M-1`.
    pub potential: Vec<f64>,
    /// Kinetic prefactor `hbar^2 / (2 m)` of the particle, eV Å².
    pub kinetic: f64,
    /// Second-derivative weights `c_0..c_p` of the grid's order.
    pub weights: Vec<f64>,
    /// Accuracy order of the stencil (2, 4, 6 or 8).
    pub order: u32,
    /// Pi electrons per cell when known: 2 for a chain's repeat unit (one per
    /// atom), `levels.electrons` for an explicit domain.
    pub electrons_per_cell: Option<usize>,
    /// What the user should know about the cell.
    pub warnings: Vec<String>,
}

impl Cell {
    /// The view the band solver reads.
    pub fn problem(&self) -> CellProblem<'_> {
        CellProblem {
            potential: &self.potential,
            period: self.period,
            kinetic: self.kinetic,
            weights: &self.weights,
        }
    }

    /// Number of cell points `M`.
    pub fn points(&self) -> usize {
        self.potential.len()
    }

    /// Grid spacing `a / M`, Å.
    pub fn spacing(&self) -> f64 {
        self.period / self.potential.len().max(1) as f64
    }

    /// Positions of the cell points, Å.
    pub fn positions(&self) -> Vec<f64> {
        let h = self.spacing();
        (0..self.points())
            .map(|j| self.from + j as f64 * h)
            .collect()
    }
}

/// Cell points above which the dense band solver becomes slow (its cost grows
/// as `M^3` per k point; common practice, no source).
pub const SLOW_CELL_POINTS: usize = 1500;

/// Relative mismatch `|V(x0) - V(x0 + a)| / (max V - min V)` above which the
/// cell's potential is reported as not periodic (common practice, no source).
pub const PERIODICITY_TOLERANCE: f64 = 1e-6;

/// Builds the cell of `model` (see the module docs for the rules).
///
/// Fails when a term is not finite at a cell point.
pub fn cell_from_model(model: &Model) -> Result<Cell, NonFinite> {
    let mut warnings = Vec::new();
    let (source, from, period, potential, spacing) = match &model.chain {
        Some(c) => {
            let (potential, notes) = chain_cell_potential(model, c);
            warnings.extend(notes);
            let spacing = grid_for(model).spacing;
            (
                CellSource::Chain,
                c.atom_position(1),
                2.0 * c.bond_length,
                potential,
                spacing,
            )
        }
        None => {
            let spacing = match model.grid.resolution {
                Resolution::Points(n) => model.domain.length() / n as f64,
                Resolution::Spacing(h) => h,
                Resolution::Tolerance(_) => DEFAULT_SPACING_ANGSTROM,
            };
            (
                CellSource::Domain,
                model.domain.from,
                model.domain.length(),
                model.potential.clone(),
                spacing,
            )
        }
    };
    let ring = Domain {
        from,
        to: from + period,
        boundary: Boundary::Periodic,
    };
    let grid = Grid::with_spacing(&ring, spacing);
    let x = grid.positions();
    let v = potential.sample(&x)?;
    let order = model.grid.order;
    if model.grid.scheme == Scheme::Numerov {
        warnings.push(format!(
            "bands use central finite differences of order {order}; grid.scheme = \"numerov\" applies to finite solves only"
        ));
    }
    if grid.points > SLOW_CELL_POINTS {
        warnings.push(format!(
            "the cell has {} points; the dense band solver's time grows as the cube of that, so a coarser grid.spacing (or fewer grid.points) is much faster",
            grid.points
        ));
    }
    let (lo, hi) = v
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &e| {
            (lo.min(e), hi.max(e))
        });
    let v_start = potential.eval(from);
    let v_end = potential.eval(from + period);
    let range = (hi - lo).max(0.0);
    if (v_start - v_end).abs() > PERIODICITY_TOLERANCE * range.max(f64::MIN_POSITIVE)
        && (v_start - v_end).abs() > 1e-12
    {
        let u = &model.units;
        warnings.push(format!(
            "the potential does not repeat over the cell: V = {:.6} {e} at x = {:.6} and {:.6} {e} at x = {:.6} {l}; the Bloch condition joins the two ends anyway",
            u.energy_out(v_start),
            u.length_out(from),
            u.energy_out(v_end),
            u.length_out(from + period),
            e = u.energy.label(),
            l = u.length.label(),
        ));
    }
    let electrons_per_cell = match source {
        CellSource::Chain => Some(2),
        // A domain has no chain, so its electrons are the ones written.
        CellSource::Domain => model
            .levels
            .electrons_given
            .then_some(model.levels.electrons)
            .flatten(),
    };
    Ok(Cell {
        source,
        from,
        period,
        potential: v,
        kinetic: model.kinetic(),
        weights: second_derivative_weights(order),
        order: order.get(),
        electrons_per_cell,
        warnings,
    })
}

/// The periodic part of a chain's potential: its ripple (from the chain
/// builder, so the phase is the same) plus the input's `[[term]]`s, and the
/// warnings about what was left out.
fn chain_cell_potential(model: &Model, c: &ChainSpec) -> (Potential, Vec<String>) {
    // The checker puts the chain's own terms first, then the [[term]]s.
    let (_, chain_terms) = chain::build(c);
    let user_terms = model
        .potential
        .terms
        .get(chain_terms.len()..)
        .unwrap_or(&[])
        .to_vec();
    let ripple_only = ChainSpec {
        end_cap_height: 0.0,
        end_cap_width: 0.0,
        sites: Vec::new(),
        ..c.clone()
    };
    let (_, mut terms) = chain::build(&ripple_only);
    terms.extend(user_terms);
    let mut notes = Vec::new();
    let with_potential = c.sites.iter().filter(|s| s.height != 0.0).count();
    if with_potential > 0 {
        notes.push(format!(
            "the chain's {with_potential} site(s) are not periodic and are left out of the cell (bands describe the repeating chain only)"
        ));
    }
    (Potential { terms }, notes)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;
    use std::path::Path;

    fn model(text: &str) -> Model {
        crate::input::load_str("t.toml", text.into(), Path::new("."), &[])
            .unwrap_or_else(|e| panic!("{}", e.render()))
            .0
    }

    #[test]
    fn domain_cell_takes_points_and_period_from_the_input() {
        let m = model("[domain]\nfrom = 1.0\nto = 4.0\n[grid]\npoints = 60\norder = 8\n");
        let c = cell_from_model(&m).unwrap();
        assert_eq!(c.source, CellSource::Domain);
        assert_eq!(c.points(), 60);
        assert_abs_diff_eq!(c.period, 3.0, epsilon = 1e-15);
        assert_abs_diff_eq!(c.positions()[1], 1.05, epsilon = 1e-14);
        assert_eq!(c.weights.len(), 5);
        assert!(c.warnings.is_empty(), "{:?}", c.warnings);
        assert_eq!(c.electrons_per_cell, None);
    }

    #[test]
    fn chain_cell_is_two_bonds_with_the_chain_ripple_phase() {
        let m = model(
            "[chain]\nbonds = 9\nbond_length = 1.4\nend_extension = 1.4\nalternation = 0.8\n\
             end_cap_height = 2.0\nend_cap_width = 0.5\n[[chain.site]]\natom = 3\nheight = -1.0\n\
             [grid]\nspacing = 0.02\n",
        );
        let c = cell_from_model(&m).unwrap();
        assert_eq!(c.source, CellSource::Chain);
        assert_abs_diff_eq!(c.period, 2.8, epsilon = 1e-15);
        assert_abs_diff_eq!(c.from, 1.4, epsilon = 1e-15);
        assert_eq!(c.points(), 140);
        assert_eq!(c.electrons_per_cell, Some(2));
        // Atom 1 sits at the cell's start, where the ripple vanishes; the centre
        // of bond 1 (a double bond, x0 + b/2) is a minimum -A, that of bond 2
        // (x0 + 3b/2) a maximum +A (chain builder's convention).
        assert_abs_diff_eq!(c.potential[0], 0.0, epsilon = 1e-12);
        assert_abs_diff_eq!(c.potential[35], -0.8, epsilon = 1e-12);
        assert_abs_diff_eq!(c.potential[105], 0.8, epsilon = 1e-12);
        // The site and the end caps are not in the cell.
        assert!(c.warnings.iter().any(|w| w.contains("site")));
        let vmin = c.potential.iter().copied().fold(f64::INFINITY, f64::min);
        assert_abs_diff_eq!(vmin, -0.8, epsilon = 1e-12);
    }

    #[test]
    fn chain_terms_are_evaluated_in_chain_coordinates() {
        // A step on [1.4, 2.8) covers exactly bond 1 of the cell.
        let m = model(
            "[chain]\nbonds = 5\n[grid]\nspacing = 0.05\n\
             [[term]]\nshape = \"step\"\nfrom = 1.4\nto = 2.8\nheight = -0.3\n",
        );
        let c = cell_from_model(&m).unwrap();
        assert_eq!(c.points(), 56);
        assert_abs_diff_eq!(c.potential[10], -0.3, epsilon = 1e-15);
        assert_abs_diff_eq!(c.potential[40], 0.0, epsilon = 1e-15);
    }

    #[test]
    fn a_potential_that_does_not_repeat_is_warned_about() {
        let m = model(
            "[domain]\nfrom = 0.0\nto = 3.0\n[grid]\npoints = 30\n\
             [[term]]\nshape = \"linear\"\nslope = 0.5\n",
        );
        let c = cell_from_model(&m).unwrap();
        assert!(
            c.warnings.iter().any(|w| w.contains("does not repeat")),
            "{:?}",
            c.warnings
        );
    }
}
