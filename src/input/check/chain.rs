//! Checking `[chain]` and its `[[chain.site]]` entries into a
//! [`ChainSpec`].

use super::{Checker, Result};
use crate::input::model::*;
use crate::input::raw::RawChain;
use crate::potential::chain::{ChainSpec, Site};

/// Bond lengths of conjugated chains, Å: from a triple bond (about 1.20 Å)
/// to a single C–C or C–N bond (about 1.54 and 1.47 Å), with a little
/// room (from memory). Outside this range the length is more likely in
/// another unit than a real chain.
pub const PLAUSIBLE_BOND_LENGTH: (f64, f64) = (1.2, 1.6);
/// Alternation amplitude above which a warning is given, eV: a few eV, far
/// above the ripple that fits polyene spectra (common practice, no source).
pub const PLAUSIBLE_ALTERNATION_EV: f64 = 3.0;
/// Site height above which a warning is given, eV (common practice, no
/// source).
pub const PLAUSIBLE_SITE_HEIGHT_EV: f64 = 5.0;
/// End extension, in bond lengths, above which a warning is given: Kuhn's
/// box reaches about one bond past each terminal atom (H. Kuhn, J. Chem.
/// Phys. 17, 1198 (1949)); three is generous.
pub const PLAUSIBLE_END_EXTENSION_BONDS: f64 = 3.0;

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
        let atoms = bonds + 1;
        let mut sites: Vec<Site> = Vec::new();
        for (i, s) in c.site.iter().flatten().enumerate() {
            let key = |k: &str| format!("chain.site[{}].{k}", i + 1);
            let raw = s.get_ref();
            let atom = self.atom(&raw.atom, &key("atom"), atoms)?;
            let height = match &raw.height {
                Some(h) => self.energy(h, &key("height"))?,
                None => 0.0,
            };
            let width = match &raw.width {
                Some(w) => self.units.length_in(self.positive(w, &key("width"))?),
                None => DEFAULT_SITE_WIDTH,
            };
            let electrons = match &raw.electrons {
                Some(e) => {
                    let n = self.count(e, &key("electrons"), 0)?;
                    if n > 2 {
                        return Err(self.err(
                            e.span(),
                            &key("electrons"),
                            format!("an atom gives 0, 1 or 2 pi electrons, got {n}"),
                        ));
                    }
                    if let Some(j) = sites
                        .iter()
                        .position(|o| o.atom == atom && o.electrons.is_some())
                    {
                        return Err(self.err(
                            e.span(),
                            &key("electrons"),
                            format!(
                                "chain.site[{}] already sets the electrons of atom {atom}",
                                j + 1
                            ),
                        ));
                    }
                    Some(n)
                }
                None => None,
            };
            sites.push(Site {
                atom,
                height,
                width,
                electrons,
            });
        }
        let charge = match &c.charge {
            Some(q) => *q.get_ref(),
            None => 0,
        };
        let spec = ChainSpec {
            bonds,
            bond_length,
            end_extension,
            alternation,
            end_cap_height,
            end_cap_width,
            sites,
            charge,
        };
        // Between one pi electron and two per atom (a full pi shell).
        let electrons = spec.electrons();
        let most = i64::try_from(atoms).unwrap_or(i64::MAX).saturating_mul(2);
        if electrons < 1 || electrons > most {
            let (span, key) = match &c.charge {
                Some(q) => (q.span(), "chain.charge"),
                None => (c.bonds.span(), "chain.site"),
            };
            return Err(self.err(
                span,
                key,
                format!(
                    "the chain's {atoms} atoms give {} pi electrons and its charge is {charge}: that leaves {electrons}, but a chain holds 1 to {} (two per atom)",
                    spec.contributions(),
                    most
                ),
            ));
        }
        Ok(spec)
    }

    /// Warnings, each naming its key, about chain values that pass the
    /// checks but are unlikely for a conjugated chain.
    pub(super) fn chain_warnings(&self, c: &ChainSpec) -> Vec<String> {
        let u = &self.units;
        let (l, e) = (u.length.label(), u.energy.label());
        let mut out = Vec::new();
        let (lo, hi) = PLAUSIBLE_BOND_LENGTH;
        if !(lo..=hi).contains(&c.bond_length) {
            out.push(format!(
                "chain.bond_length = {} {l} is outside {} to {} {l}, the bond lengths of conjugated chains: is it written in another unit? (a bond of 1.4 Å is 0.14 nm; [units] length = \"nm\" reads lengths in nm)",
                u.length_out(c.bond_length),
                u.length_out(lo),
                u.length_out(hi)
            ));
        }
        if c.end_extension > PLAUSIBLE_END_EXTENSION_BONDS * c.bond_length {
            out.push(format!(
                "chain.end_extension = {} {l} is more than {PLAUSIBLE_END_EXTENSION_BONDS} bond lengths: the box reaches far beyond the terminal atoms (about one bond is usual)",
                u.length_out(c.end_extension)
            ));
        }
        if c.alternation.abs() > PLAUSIBLE_ALTERNATION_EV {
            out.push(format!(
                "chain.alternation = {} {e} is beyond a few eV ({} {e}): the ripple then dominates the box and the electrons sit in separate wells",
                u.energy_out(c.alternation),
                u.energy_out(PLAUSIBLE_ALTERNATION_EV)
            ));
        }
        if c.alternation < 0.0 {
            out.push(format!(
                "chain.alternation = {} {e} is negative: the ripple's minima (the double bonds) then sit on bonds 2, 4, 6, ... instead of 1, 3, 5, ...; with an even number of bonds the two patterns are mirror images with the same levels, so a fit may return either sign",
                u.energy_out(c.alternation)
            ));
        }
        for (i, s) in c.sites.iter().enumerate() {
            if s.height.abs() > PLAUSIBLE_SITE_HEIGHT_EV {
                out.push(format!(
                    "chain.site[{}].height = {} {e} is beyond a few eV ({} {e}): a well or barrier that deep dominates the chain",
                    i + 1,
                    u.energy_out(s.height),
                    u.energy_out(PLAUSIBLE_SITE_HEIGHT_EV)
                ));
            }
        }
        out
    }

    /// A 1-based atom number of a chain of `atoms` atoms; a negative number
    /// counts from the right end (−1 is the last atom).
    pub(super) fn atom(
        &self,
        v: &crate::input::raw::Int,
        key: &str,
        atoms: usize,
    ) -> Result<usize> {
        let a = *v.get_ref();
        let n = atoms as i64;
        let resolved = if a < 0 { n + 1 + a } else { a };
        if a == 0 || resolved < 1 || resolved > n {
            return Err(self.err(
                v.span(),
                key,
                format!(
                    "the atoms are numbered 1 to {atoms} (or -1 to -{atoms} from the right end), got {a}"
                ),
            ));
        }
        Ok(resolved as usize)
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
