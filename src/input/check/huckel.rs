//! Checking `[huckel]` and its `[[huckel.site]]` shifts into a
//! [`HuckelSpec`]: the atoms are the chain's, or `huckel.atoms` for an input
//! with a `[domain]` (a ring when the domain is periodic).

use toml::Spanned;

use super::{Checker, Result};
use crate::grid::{Boundary, Domain};
use crate::input::raw::{Num, RawHuckel};
use crate::observables::huckel::HuckelSpec;
use crate::potential::chain::ChainSpec;

impl Checker<'_> {
    pub(super) fn check_huckel(
        &self,
        h: &Spanned<RawHuckel>,
        chain: Option<&ChainSpec>,
        domain: &Domain,
    ) -> Result<HuckelSpec> {
        let raw = h.get_ref();
        let alpha = match &raw.alpha {
            Some(a) => self.energy(a, "huckel.alpha")?,
            None => 0.0,
        };
        let (beta_double, beta_single) =
            match (&raw.beta, &raw.beta_double, &raw.beta_single) {
                (Some(b), None, None) => {
                    let b = self.beta(b, "huckel.beta")?;
                    (b, b)
                }
                (None, Some(d), Some(s)) => (
                    self.beta(d, "huckel.beta_double")?,
                    self.beta(s, "huckel.beta_single")?,
                ),
                (Some(b), _, _) => {
                    return Err(self.err(
                        b.span(),
                        "huckel.beta",
                        "give either beta (one for every bond) or beta_double and beta_single, not both",
                    ))
                }
                (None, Some(x), None) | (None, None, Some(x)) => {
                    return Err(self.err(
                        x.span(),
                        "huckel",
                        "beta_double and beta_single go together (the odd bonds 1, 3, ... are the double ones)",
                    ))
                }
                (None, None, None) => {
                    return Err(self.err(
                        h.span(),
                        "huckel.beta",
                        "[huckel] needs beta (eV, negative), or beta_double and beta_single",
                    ))
                }
            };
        let (atoms, ring) = match (chain, &raw.atoms) {
            (Some(_), Some(a)) => {
                return Err(self.err(
                    a.span(),
                    "huckel.atoms",
                    "the atoms are the chain's (bonds + 1); remove huckel.atoms",
                ))
            }
            (Some(c), None) => {
                if let Some(r) = raw.ring.as_ref().filter(|r| *r.get_ref()) {
                    return Err(self.err(
                        r.span(),
                        "huckel.ring",
                        "a [chain] is an open chain; a ring needs a [domain] with boundary = \"periodic\" and huckel.atoms",
                    ));
                }
                (c.atoms(), false)
            }
            (None, Some(a)) => {
                let ring = match &raw.ring {
                    Some(r) => *r.get_ref(),
                    None => domain.boundary == Boundary::Periodic,
                };
                let min = if ring { 3 } else { 2 };
                (self.count(a, "huckel.atoms", min)?, ring)
            }
            (None, None) => {
                return Err(self.err(
                    h.span(),
                    "huckel.atoms",
                    "without a [chain], [huckel] needs atoms (how many sites)",
                ))
            }
        };
        let mut shifts = Vec::new();
        for (i, s) in raw.site.iter().flatten().enumerate() {
            let key = |k: &str| format!("huckel.site[{}].{k}", i + 1);
            let site = s.get_ref();
            let atom = self.atom(&site.atom, &key("atom"), atoms)?;
            shifts.push((atom, self.energy(&site.alpha, &key("alpha"))?));
        }
        // The chain's bond; for a [domain], the ring's circumference shared
        // by its atoms, or a line of atoms one bond in from each end.
        let bond_length = match chain {
            Some(c) => c.bond_length,
            None if ring => domain.length() / atoms as f64,
            None => domain.length() / (atoms + 1) as f64,
        };
        Ok(HuckelSpec {
            bond_length,
            atoms,
            ring,
            alpha,
            beta_double,
            beta_single,
            shifts,
        })
    }

    /// A resonance integral: finite and negative (bonding lowers the energy).
    fn beta(&self, v: &Num, key: &str) -> Result<f64> {
        let b = self.energy(v, key)?;
        if b >= 0.0 {
            return Err(self.err(
                v.span(),
                key,
                format!(
                    "a resonance integral is negative (bonding lowers the energy), got {}",
                    v.get_ref()
                ),
            ));
        }
        Ok(b)
    }
}

#[cfg(test)]
mod tests {
    use std::path::Path;

    use crate::input::model::Model;

    fn model(text: &str) -> Result<Model, String> {
        crate::input::load_str("t.toml", text.into(), Path::new("."), &[])
            .map(|m| m.0)
            .map_err(|e| e.render())
    }

    #[test]
    fn a_chain_lends_its_atoms_and_sites_count_from_the_right() {
        let m = model(
            "[chain]\nbonds = 6\n[huckel]\nbeta_double = -2.6\nbeta_single = -2.2\n[[huckel.site]]\natom = -1\nalpha = -1.0\n",
        )
        .unwrap();
        let h = m.huckel.unwrap();
        assert_eq!((h.atoms, h.ring), (7, false));
        assert_eq!(h.shifts, vec![(7, -1.0)]);
        assert_eq!((h.beta(1), h.beta(2)), (-2.6, -2.2));
    }

    #[test]
    fn a_periodic_domain_makes_a_ring() {
        let m = model(
            "[domain]\nfrom = 0.0\nto = 16.8\nboundary = \"periodic\"\n[huckel]\natoms = 12\nbeta = -2.4\n",
        )
        .unwrap();
        let h = m.huckel.unwrap();
        assert_eq!((h.atoms, h.ring, h.alpha), (12, true, 0.0));
    }

    #[test]
    fn faults_name_the_key() {
        let base = "[chain]\nbonds = 4\n[huckel]\n";
        for (extra, key) in [
            ("", "huckel.beta"),
            ("beta = 2.4\n", "huckel.beta"),
            ("beta = -2.4\nbeta_double = -2.0\n", "huckel.beta"),
            ("beta_double = -2.0\n", "huckel"),
            ("beta = -2.4\natoms = 5\n", "huckel.atoms"),
            ("beta = -2.4\nring = true\n", "huckel.ring"),
            (
                "beta = -2.4\n[[huckel.site]]\natom = 9\nalpha = 1.0\n",
                "huckel.site[1].atom",
            ),
        ] {
            let e = model(&format!("{base}{extra}")).unwrap_err();
            assert!(e.contains(&format!("`{key}`")), "{extra}: {e}");
        }
        let e = model("[domain]\nfrom = 0.0\nto = 5.0\n[huckel]\nbeta = -2.4\n").unwrap_err();
        assert!(e.contains("`huckel.atoms`"), "{e}");
    }
}
