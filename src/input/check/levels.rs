//! Checking `[levels]` (which levels, how many electrons) and `[spectrum]`
//! (how absorption bands are broadened).

use toml::Spanned;

use super::{Checker, Result};
use crate::input::model::*;
use crate::input::raw::{RawLevels, RawSpectrum};

impl Checker<'_> {
    pub(super) fn check_levels(
        &self,
        l: Option<&Spanned<RawLevels>>,
        electrons_default: Option<usize>,
    ) -> Result<LevelSpec> {
        let raw = l.map(Spanned::get_ref);
        let electrons_given = raw.and_then(|r| r.electrons.as_ref()).is_some();
        let electrons = match raw.and_then(|r| r.electrons.as_ref()) {
            Some(e) => Some(self.count(e, "levels.electrons", 1)?),
            None => electrons_default,
        };
        let first = match raw.and_then(|r| r.first.as_ref()) {
            Some(f) => self.count(f, "levels.first", 1)?,
            None => 1,
        };
        let below = match raw.and_then(|r| r.below.as_ref()) {
            Some(b) => {
                if let Some(f) = raw.and_then(|r| r.first.as_ref()) {
                    return Err(self.err(
                        f.span(),
                        "levels.first",
                        "levels.below selects every level under an energy; it cannot be combined with levels.first",
                    ));
                }
                if let Some(c) = raw.and_then(|r| r.count.as_ref()) {
                    return Err(self.err(
                        c.span(),
                        "levels.count",
                        "levels.below selects every level under an energy, however many; it cannot be combined with levels.count (remove one of the two)",
                    ));
                }
                Some(self.energy(b, "levels.below")?)
            }
            None => None,
        };
        let count = match raw.and_then(|r| r.count.as_ref()) {
            Some(c) => self.count(c, "levels.count", 1)?,
            None => match (electrons, below) {
                // Enough for the LUMO and three levels above it: the levels
                // from `first` up to HOMO + 4, HOMO = ceil(e / 2).
                (Some(e), None) => (e.div_ceil(2) + 4 + 1)
                    .saturating_sub(first)
                    .max(DEFAULT_COUNT),
                (_, Some(_)) => usize::MAX,
                (None, None) => DEFAULT_COUNT,
            },
        };
        Ok(LevelSpec {
            count,
            first,
            below,
            electrons,
            count_given: raw.and_then(|r| r.count.as_ref()).is_some(),
            first_given: raw.and_then(|r| r.first.as_ref()).is_some(),
            electrons_given,
        })
    }

    pub(super) fn check_spectrum(&self, s: Option<&Spanned<RawSpectrum>>) -> Result<SpectrumSpec> {
        let mut spec = SpectrumSpec {
            lorentzian: false,
            fwhm: DEFAULT_FWHM_EV,
            all_pairs: false,
        };
        let Some(s) = s else { return Ok(spec) };
        let raw = s.get_ref();
        if let Some(shape) = &raw.shape {
            spec.lorentzian = match shape.get_ref().as_str() {
                "gaussian" => false,
                "lorentzian" => true,
                other => {
                    return Err(self.err(
                        shape.span(),
                        "spectrum.shape",
                        format!("unknown line shape `{other}`; use \"gaussian\" or \"lorentzian\""),
                    ))
                }
            };
        }
        if let Some(w) = &raw.width {
            spec.fwhm = self.units.energy_in(self.positive(w, "spectrum.width")?);
        }
        if let Some(a) = &raw.all_pairs {
            spec.all_pairs = *a.get_ref();
        }
        Ok(spec)
    }
}

#[cfg(test)]
mod tests {
    use std::path::Path;

    use crate::input::model::{LevelSpec, DEFAULT_COUNT};

    fn levels(extra: &str) -> LevelSpec {
        let text = format!("[chain]\nbonds = 7\n[grid]\npoints = 200\n{extra}");
        let (model, _) = crate::input::load_str("t.toml", text, Path::new("."), &[]).unwrap();
        model.levels
    }

    #[test]
    fn what_was_written_is_recorded() {
        let l = levels("");
        assert!(!l.count_given && !l.first_given && !l.electrons_given);
        // A chain of 8 atoms has 8 pi electrons: HOMO 4, levels up to 8
        // wanted, fewer than the default count.
        assert_eq!((l.first, l.count, l.electrons), (1, DEFAULT_COUNT, Some(8)));
        let l = levels("[levels]\ncount = 3\n");
        assert!(l.count_given && !l.first_given && !l.electrons_given);
        let l = levels("[levels]\nfirst = 2\nelectrons = 6\n");
        assert!(!l.count_given && l.first_given && l.electrons_given);
        assert_eq!(l.window(), (1, DEFAULT_COUNT));
    }

    #[test]
    fn overrides_count_as_written() {
        let text = "[domain]\nfrom = 0.0\nto = 10.0\n[grid]\npoints = 100\n".to_string();
        let sets = [crate::input::Override::parse("levels.count=4").unwrap()];
        let (model, _) = crate::input::load_str("t.toml", text, Path::new("."), &sets).unwrap();
        assert!(model.levels.count_given);
        assert_eq!(model.levels.count, 4);
    }

    #[test]
    fn many_electrons_ask_for_levels_up_to_four_above_the_homo() {
        // 30 electrons: HOMO 15, levels up to 19 from first = 3: 17 levels.
        let l = levels("[levels]\nfirst = 3\nelectrons = 30\n");
        assert_eq!(l.count, 17);
        assert_eq!(l.last(), 19);
    }
}
