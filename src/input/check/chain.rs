//! Checking `[chain]` and its `[[chain.site]]` entries into a
//! [`ChainSpec`].

use super::{Checker, Result};
use crate::input::model::*;
use crate::input::raw::RawChain;
use crate::potential::chain::{ChainSpec, Site};

impl Checker<'_> {
    pub(super) fn check_chain(&self, c: &RawChain) -> Result<ChainSpec> {
        let bonds = self.count(&c.bonds, "chain.bonds", 1)?;
        let bond_length = match &c.bond_length {
            Some(b) => self.units.length_in(self.positive(b, "chain.bond_length")?),
            None => DEFAULT_BOND_LENGTH,
        };
        let end_extension = match &c.end_extension {
            Some(e) => {
                let x = self.length(e, "chain.end_extension")?;
                if x < 0.0 {
                    return Err(self.err(
                        e.span(),
                        "chain.end_extension",
                        format!("must not be negative, got {}", e.get_ref()),
                    ));
                }
                x
            }
            None => bond_length,
        };
        let alternation = match &c.alternation {
            Some(a) => self.energy(a, "chain.alternation")?,
            None => 0.0,
        };
        let end_cap_height = match &c.end_cap_height {
            Some(h) => self.energy(h, "chain.end_cap_height")?,
            None => 0.0,
        };
        let length = bonds as f64 * bond_length + 2.0 * end_extension;
        let end_cap_width = match &c.end_cap_width {
            Some(w) => {
                let x = self.length(w, "chain.end_cap_width")?;
                if x < 0.0 || 2.0 * x > length {
                    return Err(self.err(
                        w.span(),
                        "chain.end_cap_width",
                        format!(
                            "must lie between 0 and half the box length ({}), got {}",
                            self.units.length_out(length / 2.0),
                            w.get_ref()
                        ),
                    ));
                }
                x
            }
            None => 0.0,
        };
        let mut sites = Vec::new();
        for (i, s) in c.site.iter().flatten().enumerate() {
            let key = |k: &str| format!("chain.site[{}].{k}", i + 1);
            let raw = s.get_ref();
            let atom = self.count(&raw.atom, &key("atom"), 1)?;
            if atom > bonds + 1 {
                return Err(self.err(
                    raw.atom.span(),
                    &key("atom"),
                    format!("the chain has atoms 1 to {}, got {atom}", bonds + 1),
                ));
            }
            let height = self.energy(&raw.height, &key("height"))?;
            let width = match &raw.width {
                Some(w) => self.units.length_in(self.positive(w, &key("width"))?),
                None => DEFAULT_SITE_WIDTH,
            };
            sites.push(Site {
                atom,
                height,
                width,
            });
        }
        Ok(ChainSpec {
            bonds,
            bond_length,
            end_extension,
            alternation,
            end_cap_height,
            end_cap_width,
            sites,
        })
    }
}

#[cfg(test)]
mod tests {
    use std::path::Path;

    use approx::assert_relative_eq;

    use crate::input::model::{Model, DEFAULT_BOND_LENGTH, DEFAULT_SITE_WIDTH};

    fn model(text: &str) -> Model {
        crate::input::load_str("t.toml", text.into(), Path::new("."), &[])
            .unwrap_or_else(|e| panic!("{}", e.render()))
            .0
    }

    #[test]
    fn an_ideal_chain_is_the_box_of_its_bonds_and_end_extensions() {
        // The free-electron box of a polyene: L = bonds * bond length + 2 *
        // end extension, the box reaching one bond length beyond each
        // terminal atom by default (the convention of H. Kuhn, J. Chem.
        // Phys. 17, 1198 (1949); from memory).
        let m = model("[chain]\nbonds = 7\n");
        let c = m.chain.as_ref().unwrap();
        assert_eq!(c.bond_length, DEFAULT_BOND_LENGTH);
        assert_eq!(c.end_extension, DEFAULT_BOND_LENGTH);
        assert_relative_eq!(
            m.domain.length(),
            9.0 * DEFAULT_BOND_LENGTH,
            max_relative = 1e-15
        );
        assert_eq!(m.levels.electrons, Some(8));
        assert!(!m.levels.electrons_given);
    }

    #[test]
    fn chain_lengths_are_converted_from_the_input_units() {
        // 1 nm = 10 angstrom (SI definitions of the units).
        let m = model(
            "[units]\nlength = \"nm\"\n[chain]\nbonds = 4\nbond_length = 0.14\nend_extension = 0.07\n[[chain.site]]\natom = 5\nheight = -1.0\n",
        );
        let c = m.chain.as_ref().unwrap();
        assert_relative_eq!(c.bond_length, 1.4, max_relative = 1e-15);
        assert_relative_eq!(c.end_extension, 0.7, max_relative = 1e-15);
        assert_relative_eq!(m.domain.length(), 4.0 * 1.4 + 1.4, max_relative = 1e-15);
        // A site's width defaults to DEFAULT_SITE_WIDTH, in angstrom.
        assert_eq!(c.sites[0].width, DEFAULT_SITE_WIDTH);
    }
}
