//! The `[chain]` builder: a conjugated chain as a box with optional ripple,
//! end caps and heteroatom sites.
//!
//! The free-electron model of a conjugated chain puts its pi electrons in a
//! box of length `L = bonds * bond_length + 2 * end_extension` (atoms sit at
//! `end_extension + (a - 1) * bond_length`). Bond alternation is modelled by
//! a cosine ripple of period `2 * bond_length` whose minima sit at the centres
//! of bonds 1, 3, 5, ... (the double bonds of a polyene); a periodic potential
//! of this kind opens a gap at the zone edge, so the absorption of long chains
//! converges (H. Kuhn, J. Chem. Phys. 17, 1198 (1949) introduced the
//! sinusoidal correction). The ripple covers the whole box, which keeps V(x)
//! smooth inside it; it vanishes at every atom position.
//!
//! # Counting pi electrons
//! Every atom gives one pi electron unless a site says otherwise (an amine-
//! or pyrrole-type nitrogen, an ether oxygen: two; a boron: none), and the
//! net charge is taken away: `electrons = sum of contributions - charge`.
//! For the symmetric cyanine cation R2N-(CH=CH)k-CH=NR2+ of `2k + 3` atoms,
//! both nitrogens giving two and `charge = 1`, that is `2k + 4`, one more
//! than the atoms: the count that makes the free-electron model work for
//! these dyes (H. Kuhn, J. Chem. Phys. 17, 1198 (1949)).

use serde::Serialize;

use super::Term;
use crate::grid::{Boundary, Domain};

/// A `[[chain.site]]`, checked.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Site {
    /// Atom number, 1 ..= bonds + 1.
    pub atom: usize,
    /// Height of the Gaussian, eV.
    pub height: f64,
    /// Standard deviation, Å.
    pub width: f64,
    /// Pi electrons the atom gives, when the site says (else 1).
    pub electrons: Option<usize>,
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
    /// Net charge in units of e (positive: electrons removed).
    pub charge: i64,
}

impl ChainSpec {
    /// Number of atoms, `bonds + 1`.
    pub fn atoms(&self) -> usize {
        self.bonds.saturating_add(1)
    }
    /// Box length `bonds * bond_length + 2 * end_extension`, Å.
    pub fn box_length(&self) -> f64 {
        self.bonds as f64 * self.bond_length + 2.0 * self.end_extension
    }
    /// Pi electrons the atoms give before the charge: one per atom, or what
    /// a site on the atom says.
    pub fn contributions(&self) -> usize {
        let extra: i64 = self
            .sites
            .iter()
            .filter_map(|s| s.electrons.map(|e| e as i64 - 1))
            .sum();
        let atoms = i64::try_from(self.atoms()).unwrap_or(i64::MAX);
        atoms.saturating_add(extra).max(0) as usize
    }
    /// Pi electrons of the chain, `contributions - charge` (may be zero or
    /// negative for an impossible charge; the input checker refuses that).
    pub fn electrons(&self) -> i64 {
        i64::try_from(self.contributions())
            .unwrap_or(i64::MAX)
            .saturating_sub(self.charge)
    }
    /// Position of atom `a` (1-based), Å from the left end of the box.
    pub fn atom_position(&self, a: usize) -> f64 {
        self.end_extension + (a as f64 - 1.0) * self.bond_length
    }
}

/// The domain and the terms a chain stands for.
pub fn build(chain: &ChainSpec) -> (Domain, Vec<Term>) {
    let length = chain.box_length();
    let domain = Domain {
        from: 0.0,
        to: length,
        boundary: Boundary::Walls,
    };
    let mut terms = Vec::new();
    if chain.alternation != 0.0 {
        // -A cos(2 pi (x - c1) / (2 b)) has its minima at c1, c1 + 2b, ...
        // (c1: centre of bond 1); written as A cos(2 pi (x - phase) / period)
        // with phase = c1 + b.
        let c1 = chain.end_extension + 0.5 * chain.bond_length;
        terms.push(Term::Ripple {
            amplitude: chain.alternation,
            period: 2.0 * chain.bond_length,
            phase: c1 + chain.bond_length,
            window: None,
        });
    }
    if chain.end_cap_height != 0.0 && chain.end_cap_width > 0.0 {
        terms.push(Term::Step {
            from: 0.0,
            to: chain.end_cap_width,
            height: chain.end_cap_height,
        });
        terms.push(Term::Step {
            from: length - chain.end_cap_width,
            to: length,
            height: chain.end_cap_height,
        });
    }
    // A site that only sets its electrons has no potential.
    for site in chain.sites.iter().filter(|s| s.height != 0.0) {
        terms.push(Term::Gauss {
            center: chain.atom_position(site.atom),
            height: site.height,
            width: site.width,
        });
    }
    (domain, terms)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    fn hexatriene_like() -> ChainSpec {
        ChainSpec {
            bonds: 5,
            bond_length: 1.4,
            end_extension: 1.4,
            alternation: 0.5,
            end_cap_height: 0.0,
            end_cap_width: 0.0,
            sites: vec![Site {
                atom: 3,
                height: -1.0,
                width: 0.4,
                electrons: None,
            }],
            charge: 0,
        }
    }

    #[test]
    fn ripple_minima_sit_on_odd_bonds_and_vanish_on_atoms() {
        let c = ChainSpec {
            sites: vec![],
            ..hexatriene_like()
        };
        let (d, terms) = build(&c);
        assert_abs_diff_eq!(d.to, 5.0 * 1.4 + 2.0 * 1.4, epsilon = 1e-12);
        let v = |x: f64| terms.iter().map(|t| t.eval(x)).sum::<f64>();
        for bond in 1..=5usize {
            let centre = c.atom_position(bond) + 0.7;
            let expected = if bond % 2 == 1 { -0.5 } else { 0.5 };
            assert_abs_diff_eq!(v(centre), expected, epsilon = 1e-12);
        }
        for a in 1..=6 {
            assert_abs_diff_eq!(v(c.atom_position(a)), 0.0, epsilon = 1e-12);
        }
    }

    #[test]
    fn ideal_chain_has_no_terms() {
        let c = ChainSpec {
            alternation: 0.0,
            sites: vec![],
            ..hexatriene_like()
        };
        let (_, terms) = build(&c);
        assert!(terms.is_empty());
    }

    #[test]
    fn site_sits_on_its_atom() {
        let c = hexatriene_like();
        let (_, terms) = build(&c);
        let Term::Gauss { center, .. } = terms[1] else {
            panic!("expected the site's Gaussian second");
        };
        assert_abs_diff_eq!(center, 1.4 + 2.0 * 1.4, epsilon = 1e-12);
    }

    #[test]
    fn electrons_are_the_atoms_contributions_less_the_charge() {
        // A streptocyanine R2N-CH=CH-CH=NR2+ (k = 1): 5 atoms, both
        // nitrogens give two pi electrons, charge +1: 6 pi electrons
        // (H. Kuhn, J. Chem. Phys. 17, 1198 (1949)).
        let n = |atom| Site {
            atom,
            height: 0.0,
            width: 0.5,
            electrons: Some(2),
        };
        let c = ChainSpec {
            bonds: 4,
            alternation: 0.0,
            sites: vec![n(1), n(5)],
            charge: 1,
            ..hexatriene_like()
        };
        assert_eq!(c.contributions(), 7);
        assert_eq!(c.electrons(), 6);
        // Sites that only set electrons add no potential.
        let (_, terms) = build(&c);
        assert!(terms.is_empty());
        // A boron-like site giving none, and an anion.
        let b = ChainSpec {
            sites: vec![Site {
                electrons: Some(0),
                ..n(3)
            }],
            charge: -1,
            ..c
        };
        // 5 atoms, one giving none: 4; the anion's extra one: 5.
        assert_eq!(b.contributions(), 4);
        assert_eq!(b.electrons(), 5);
    }
}
