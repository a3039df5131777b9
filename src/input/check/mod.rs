//! The second stage of reading an input: checking the raw TOML mirror and
//! turning it into the typed [`Model`].
//!
//! Every value is range-checked here, converted to internal units, and every
//! fault is reported with the location of the value at fault. One file per
//! part of the input: `grid` (`[domain]`, `[grid]`), `levels` (`[levels]`,
//! `[spectrum]`), `chain` (`[chain]`), `huckel` (`[huckel]`), `response`
//! (`[response]`) and `terms` (`[[term]]`, formulas and tables among them);
//! this file holds the entry point, `[units]`, `[particle]` and the shared
//! value checks.

mod chain;
mod grid;
mod huckel;
mod levels;
mod response;
mod terms;

use std::collections::BTreeMap;
use std::ops::Range;
use std::path::Path;

use toml::Spanned;

use super::error::{InputError, Location, SourceText};
use super::model::*;
use super::raw::*;
use super::tables::TableCache;
use crate::potential::Potential;
use crate::units::{EnergyUnit, LengthUnit, Units};

/// The checker: the source (for locations), the input file's folder (for
/// table files) and the tables already read.
pub struct Checker<'a> {
    source: &'a SourceText,
    base_dir: &'a Path,
    tables: &'a TableCache,
    units: Units,
}

type Result<T> = std::result::Result<T, InputError>;

impl<'a> Checker<'a> {
    /// A checker for `source`, resolving table files against `base_dir` and
    /// reading them through `tables` (each file once).
    pub fn new(source: &'a SourceText, base_dir: &'a Path, tables: &'a TableCache) -> Self {
        Self {
            source,
            base_dir,
            tables,
            units: Units::default(),
        }
    }

    fn loc(&self, span: Range<usize>) -> Location {
        self.source.locate(Some(span))
    }

    fn err(&self, span: Range<usize>, key: &str, msg: impl Into<String>) -> InputError {
        InputError::new(self.loc(span), key, msg)
    }

    fn finite(&self, v: &Num, key: &str) -> Result<f64> {
        let x = *v.get_ref();
        if x.is_finite() {
            Ok(x)
        } else {
            Err(self.err(v.span(), key, format!("must be a finite number, got {x}")))
        }
    }

    fn positive(&self, v: &Num, key: &str) -> Result<f64> {
        let x = self.finite(v, key)?;
        if x > 0.0 {
            Ok(x)
        } else {
            Err(self.err(v.span(), key, format!("must be greater than 0, got {x}")))
        }
    }

    fn count(&self, v: &Int, key: &str, min: i64) -> Result<usize> {
        let n = *v.get_ref();
        if n < min {
            return Err(self.err(v.span(), key, format!("must be at least {min}, got {n}")));
        }
        usize::try_from(n).map_err(|_| self.err(v.span(), key, format!("{n} is too large")))
    }

    fn length(&self, v: &Num, key: &str) -> Result<f64> {
        Ok(self.units.length_in(self.finite(v, key)?))
    }

    fn energy(&self, v: &Num, key: &str) -> Result<f64> {
        Ok(self.units.energy_in(self.finite(v, key)?))
    }

    /// Checks the whole input.
    pub fn check(mut self, raw: RawInput) -> Result<Model> {
        if let Some(u) = &raw.units {
            self.units = self.check_units(u.get_ref())?;
        }
        let mass = match raw
            .particle
            .as_ref()
            .and_then(|p| p.get_ref().mass.as_ref())
        {
            Some(m) => self.positive(m, "particle.mass")?,
            None => 1.0,
        };
        let chain = match &raw.chain {
            Some(c) => Some(self.check_chain(c.get_ref())?),
            None => None,
        };
        let (domain, mut terms, mut term_locations) = match (&chain, &raw.domain) {
            (Some(_), Some(d)) => {
                return Err(self.err(
                    d.span(),
                    "domain",
                    "an input with [chain] takes its domain from the chain; remove [domain]",
                ))
            }
            (Some(c), None) => {
                let (d, t) = crate::potential::chain::build(c);
                let span = raw.chain.as_ref().map(|c| c.span()).unwrap_or(0..0);
                let locs = t
                    .iter()
                    .map(|_| ("chain".to_string(), self.loc(span.clone())))
                    .collect();
                (d, t, locs)
            }
            (None, Some(d)) => (self.check_domain(d)?, vec![], vec![]),
            (None, None) => {
                return Err(InputError::new(
                    self.source.locate(Some(0..0)),
                    "domain",
                    "the input needs a [domain] (from, to) or a [chain]",
                ))
            }
        };
        for (i, t) in raw.term.iter().flatten().enumerate() {
            let key = format!("term[{}]", i + 1);
            terms.push(self.check_term(t, &key)?);
            term_locations.push((key, self.loc(t.get_ref().shape.span())));
        }
        let grid = self.check_grid(raw.grid.as_ref(), &domain)?;
        self.check_grid_fits(&grid, &domain, &raw)?;
        // The chain's own count (checked to be at least 1); an explicit
        // levels.electrons wins.
        let electrons_default = chain.as_ref().map(|c| c.electrons().max(1) as usize);
        let levels = self.check_levels(raw.levels.as_ref(), electrons_default)?;
        let spectrum = self.check_spectrum(raw.spectrum.as_ref())?;
        let huckel = match &raw.huckel {
            Some(h) => Some(self.check_huckel(h, chain.as_ref(), &domain)?),
            None => None,
        };
        let response = self.check_response(raw.response.as_ref(), &domain, &levels, &raw)?;
        let mut key_locations = BTreeMap::new();
        let mut note = |key: &str, span: Option<Range<usize>>| {
            if let Some(span) = span {
                key_locations.insert(key.to_string(), self.loc(span));
            }
        };
        let lv = raw.levels.as_ref().map(Spanned::get_ref);
        note("levels", raw.levels.as_ref().map(Spanned::span));
        note(
            "levels.count",
            lv.and_then(|l| l.count.as_ref().map(Spanned::span)),
        );
        note(
            "levels.first",
            lv.and_then(|l| l.first.as_ref().map(Spanned::span)),
        );
        note(
            "levels.below",
            lv.and_then(|l| l.below.as_ref().map(Spanned::span)),
        );
        note(
            "levels.electrons",
            lv.and_then(|l| l.electrons.as_ref().map(Spanned::span))
                .or_else(|| raw.chain.as_ref().map(|c| c.get_ref().bonds.span())),
        );
        note("response", raw.response.as_ref().map(Spanned::span));
        let gr = raw.grid.as_ref().map(Spanned::get_ref);
        note("grid", raw.grid.as_ref().map(Spanned::span));
        note(
            "grid.points",
            gr.and_then(|g| g.points.as_ref().map(Spanned::span)),
        );
        note(
            "grid.spacing",
            gr.and_then(|g| g.spacing.as_ref().map(Spanned::span)),
        );
        let mut warnings = Vec::new();
        if let Some(c) = &chain {
            warnings.extend(self.chain_warnings(c));
        }
        Ok(Model {
            warnings,
            huckel,
            title: raw.title.map(Spanned::into_inner),
            units: self.units,
            mass,
            domain,
            grid,
            levels,
            potential: Potential { terms },
            term_locations,
            chain,
            spectrum,
            response,
            key_locations,
        })
    }

    fn check_units(&self, u: &RawUnits) -> Result<Units> {
        let mut units = Units::default();
        if let Some(l) = &u.length {
            units.length = LengthUnit::parse(l.get_ref()).ok_or_else(|| {
                self.err(
                    l.span(),
                    "units.length",
                    format!(
                        "unknown length unit `{}`; use one of {}",
                        l.get_ref(),
                        LengthUnit::NAMES.join(", ")
                    ),
                )
            })?;
        }
        if let Some(e) = &u.energy {
            units.energy = EnergyUnit::parse(e.get_ref()).ok_or_else(|| {
                self.err(
                    e.span(),
                    "units.energy",
                    format!(
                        "unknown energy unit `{}`; use one of {}",
                        e.get_ref(),
                        EnergyUnit::NAMES.join(", ")
                    ),
                )
            })?;
        }
        Ok(units)
    }
}

/// A number for a message: plain decimals for everyday sizes, the exponent
/// form for very small or very large ones (`6e-300`, not three hundred
/// zeros).
fn number(x: f64) -> String {
    let a = x.abs();
    if a == 0.0 || (1e-4..1e9).contains(&a) {
        format!("{x}")
    } else {
        format!("{x:e}")
    }
}
