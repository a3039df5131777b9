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
                Some(self.energy(b, "levels.below")?)
            }
            None => None,
        };
        let count = match raw.and_then(|r| r.count.as_ref()) {
            Some(c) => self.count(c, "levels.count", 1)?,
            None => match (electrons, below) {
                // Enough for the LUMO and a few levels above it.
                (Some(e), None) => (e.div_ceil(2) + 4)
                    .saturating_sub(first - 1)
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
