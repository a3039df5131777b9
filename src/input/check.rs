//! The second stage of reading an input: checking the raw TOML mirror and
//! turning it into the typed [`Model`].
//!
//! Every value is range-checked here, converted to internal units, and every
//! fault is reported with the location of the value at fault.

use std::collections::BTreeMap;
use std::ops::Range;
use std::path::Path;
use std::sync::Arc;

use toml::Spanned;

use super::error::{InputError, Location, SourceText};
use super::model::*;
use super::raw::*;
use crate::grid::{Boundary, Domain, Order, Scheme};
use crate::potential::chain::{ChainSpec, Site};
use crate::potential::formula::{Formula, FormulaErrorKind};
use crate::potential::table::{Interpolation, Outside, Table};
use crate::potential::{chain, Potential, Term};
use crate::units::{EnergyUnit, LengthUnit, Units};

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

/// The checker: the source (for locations) and the input file's folder (for
/// table files).
pub struct Checker<'a> {
    source: &'a SourceText,
    base_dir: &'a Path,
    units: Units,
}

type Result<T> = std::result::Result<T, InputError>;

impl<'a> Checker<'a> {
    /// A checker for `source`, resolving table files against `base_dir`.
    pub fn new(source: &'a SourceText, base_dir: &'a Path) -> Self {
        Self {
            source,
            base_dir,
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
                let (d, t) = chain::build(c);
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
        let electrons_default = chain.as_ref().map(ChainSpec::atoms);
        let levels = self.check_levels(raw.levels.as_ref(), electrons_default)?;
        let spectrum = self.check_spectrum(raw.spectrum.as_ref())?;
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
        Ok(Model {
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

    fn check_domain(&self, d: &Spanned<RawDomain>) -> Result<Domain> {
        let raw = d.get_ref();
        let from = raw
            .from
            .as_ref()
            .ok_or_else(|| self.err(d.span(), "domain.from", "is missing"))?;
        let to = raw
            .to
            .as_ref()
            .ok_or_else(|| self.err(d.span(), "domain.to", "is missing"))?;
        let a = self.length(from, "domain.from")?;
        let b = self.length(to, "domain.to")?;
        if b <= a {
            return Err(self.err(
                to.span(),
                "domain.to",
                format!(
                    "must be greater than domain.from ({} <= {})",
                    to.get_ref(),
                    from.get_ref()
                ),
            ));
        }
        if !(b - a).is_finite() {
            return Err(self.err(
                to.span(),
                "domain.to",
                "the domain's length overflows: from and to are too far apart to compute with",
            ));
        }
        let boundary = match &raw.boundary {
            None => Boundary::Walls,
            Some(b) => match b.get_ref().as_str() {
                "walls" => Boundary::Walls,
                "periodic" => Boundary::Periodic,
                other => {
                    return Err(self.err(
                        b.span(),
                        "domain.boundary",
                        format!("unknown boundary `{other}`; use \"walls\" or \"periodic\""),
                    ))
                }
            },
        };
        Ok(Domain {
            from: a,
            to: b,
            boundary,
        })
    }

    fn check_grid(&self, g: Option<&Spanned<RawGrid>>, domain: &Domain) -> Result<GridSpec> {
        let mut spec = GridSpec {
            resolution: Resolution::Spacing(DEFAULT_SPACING_ANGSTROM),
            order: Order::new(DEFAULT_ORDER).expect("default order is allowed"),
            scheme: Scheme::FiniteDifference,
            max_points: DEFAULT_MAX_POINTS,
        };
        let Some(g) = g else { return Ok(spec) };
        let raw = g.get_ref();
        let given: Vec<(&str, Range<usize>)> = [
            raw.points.as_ref().map(|v| ("points", v.span())),
            raw.spacing.as_ref().map(|v| ("spacing", v.span())),
            raw.tolerance.as_ref().map(|v| ("tolerance", v.span())),
        ]
        .into_iter()
        .flatten()
        .collect();
        if given.len() > 1 {
            return Err(self.err(
                given[1].1.clone(),
                &format!("grid.{}", given[1].0),
                format!(
                    "give only one of grid.points, grid.spacing and grid.tolerance (found {} and {})",
                    given[0].0, given[1].0
                ),
            ));
        }
        if let Some(p) = &raw.points {
            let n = self.count(p, "grid.points", 3)?;
            spec.resolution = Resolution::Points(n);
        }
        if let Some(s) = &raw.spacing {
            let h = self.units.length_in(self.positive(s, "grid.spacing")?);
            if h >= domain.length() / 2.0 {
                return Err(self.err(
                    s.span(),
                    "grid.spacing",
                    format!(
                        "{} is too coarse for a domain of length {}: it leaves fewer than 3 points",
                        s.get_ref(),
                        self.units.length_out(domain.length())
                    ),
                ));
            }
            spec.resolution = Resolution::Spacing(h);
        }
        if let Some(t) = &raw.tolerance {
            let tol = self.positive(t, "grid.tolerance")?;
            if tol >= 0.1 {
                return Err(self.err(
                    t.span(),
                    "grid.tolerance",
                    format!("is a relative tolerance and must be below 0.1, got {tol}"),
                ));
            }
            spec.resolution = Resolution::Tolerance(tol);
        }
        if let Some(m) = &raw.max_points {
            spec.max_points = self.count(m, "grid.max_points", 3)?;
        }
        if let Some(s) = &raw.scheme {
            spec.scheme = match s.get_ref().as_str() {
                "finite-difference" => Scheme::FiniteDifference,
                "numerov" => Scheme::Numerov,
                other => {
                    return Err(self.err(
                        s.span(),
                        "grid.scheme",
                        format!(
                            "unknown scheme `{other}`; use \"finite-difference\" or \"numerov\""
                        ),
                    ))
                }
            };
        }
        if let Some(o) = &raw.order {
            let v = *o.get_ref();
            spec.order = u32::try_from(v).ok().and_then(Order::new).ok_or_else(|| {
                self.err(
                    o.span(),
                    "grid.order",
                    format!("must be 2, 4, 6 or 8, got {v}"),
                )
            })?;
            if spec.scheme == Scheme::Numerov && v != 4 {
                return Err(self.err(
                    o.span(),
                    "grid.order",
                    format!("the Numerov scheme is of order 4; remove grid.order or set it to 4 (got {v})"),
                ));
            }
        } else if spec.scheme == Scheme::Numerov {
            spec.order = Order::new(4).expect("4 is allowed");
        }
        Ok(spec)
    }

    fn check_levels(
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

    fn check_spectrum(&self, s: Option<&Spanned<RawSpectrum>>) -> Result<SpectrumSpec> {
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

    fn check_chain(&self, c: &RawChain) -> Result<ChainSpec> {
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

    fn check_term(&self, t: &Spanned<RawTerm>, key: &str) -> Result<Term> {
        let raw = t.get_ref();
        let shape = raw.shape.get_ref().as_str();
        let allowed: &[&str] = match shape {
            "step" => &["from", "to", "height"],
            "ripple" => &["amplitude", "period", "phase", "from", "to"],
            "harmonic" => &["center", "stiffness"],
            "morse" => &["center", "depth", "range"],
            "gauss" => &["center", "height", "width"],
            "linear" => &["slope", "origin", "from", "to"],
            "table" => &["file", "interpolation", "outside"],
            "formula" => &["expression", "constants"],
            other => {
                return Err(self.err(
                    raw.shape.span(),
                    &format!("{key}.shape"),
                    format!(
                        "unknown shape `{other}`; use one of step, ripple, harmonic, morse, gauss, linear, table, formula"
                    ),
                ))
            }
        };
        for (name, span) in present_keys(raw) {
            if !allowed.contains(&name) {
                return Err(self.err(
                    span,
                    &format!("{key}.{name}"),
                    format!(
                        "a `{shape}` term takes no `{name}` (it takes {})",
                        allowed.join(", ")
                    ),
                ));
            }
        }
        let need = |v: &Option<Num>, name: &str| -> Result<Num> {
            v.clone().ok_or_else(|| {
                self.err(
                    raw.shape.span(),
                    &format!("{key}.{name}"),
                    format!("a `{shape}` term needs `{name}`"),
                )
            })
        };
        let k = |name: &str| format!("{key}.{name}");
        let window = |from: &Option<Num>, to: &Option<Num>| -> Result<Option<(f64, f64)>> {
            match (from, to) {
                (None, None) => Ok(None),
                (Some(a), Some(b)) => {
                    let (x, y) = (self.length(a, &k("from"))?, self.length(b, &k("to"))?);
                    if y <= x {
                        return Err(self.err(
                            b.span(),
                            &k("to"),
                            format!(
                                "must be greater than `from` ({} <= {})",
                                b.get_ref(),
                                a.get_ref()
                            ),
                        ));
                    }
                    Ok(Some((x, y)))
                }
                (Some(a), None) => Ok(Some((self.length(a, &k("from"))?, f64::INFINITY))),
                (None, Some(b)) => Ok(Some((f64::NEG_INFINITY, self.length(b, &k("to"))?))),
            }
        };
        Ok(match shape {
            "step" => {
                let (from, to) = (need(&raw.from, "from")?, need(&raw.to, "to")?);
                let (a, b) = window(&Some(from), &Some(to))?.expect("both ends given");
                Term::Step {
                    from: a,
                    to: b,
                    height: self.energy(&need(&raw.height, "height")?, &k("height"))?,
                }
            }
            "ripple" => Term::Ripple {
                amplitude: self.energy(&need(&raw.amplitude, "amplitude")?, &k("amplitude"))?,
                period: self
                    .units
                    .length_in(self.positive(&need(&raw.period, "period")?, &k("period"))?),
                phase: match &raw.phase {
                    Some(p) => self.length(p, &k("phase"))?,
                    None => 0.0,
                },
                window: window(&raw.from, &raw.to)?,
            },
            "harmonic" => {
                let s = need(&raw.stiffness, "stiffness")?;
                let stiffness = self.finite(&s, &k("stiffness"))?;
                let lu = self.units.length.in_angstrom();
                Term::Harmonic {
                    center: self.length(&need(&raw.center, "center")?, &k("center"))?,
                    stiffness: self.units.energy_in(stiffness) / (lu * lu),
                }
            }
            "morse" => {
                let range = self.positive(&need(&raw.range, "range")?, &k("range"))?;
                Term::Morse {
                    center: self.length(&need(&raw.center, "center")?, &k("center"))?,
                    depth: self.energy(&need(&raw.depth, "depth")?, &k("depth"))?,
                    range: range / self.units.length.in_angstrom(),
                }
            }
            "gauss" => Term::Gauss {
                center: self.length(&need(&raw.center, "center")?, &k("center"))?,
                height: self.energy(&need(&raw.height, "height")?, &k("height"))?,
                width: self
                    .units
                    .length_in(self.positive(&need(&raw.width, "width")?, &k("width"))?),
            },
            "linear" => {
                let slope = self.finite(&need(&raw.slope, "slope")?, &k("slope"))?;
                Term::Linear {
                    slope: self.units.energy_in(slope) / self.units.length.in_angstrom(),
                    origin: match &raw.origin {
                        Some(o) => self.length(o, &k("origin"))?,
                        None => 0.0,
                    },
                    window: window(&raw.from, &raw.to)?,
                }
            }
            "table" => self.check_table(raw, key)?,
            "formula" => self.check_formula(raw, key)?,
            _ => unreachable!("shape was matched above"),
        })
    }

    fn check_table(&self, raw: &RawTerm, key: &str) -> Result<Term> {
        let file = raw.file.as_ref().ok_or_else(|| {
            self.err(
                raw.shape.span(),
                &format!("{key}.file"),
                "a `table` term needs `file`",
            )
        })?;
        let interpolation = match &raw.interpolation {
            None => Interpolation::Linear,
            Some(i) => match i.get_ref().as_str() {
                "linear" => Interpolation::Linear,
                "cubic" => Interpolation::Cubic,
                other => {
                    return Err(self.err(
                        i.span(),
                        &format!("{key}.interpolation"),
                        format!("unknown interpolation `{other}`; use \"linear\" or \"cubic\""),
                    ))
                }
            },
        };
        let outside = match &raw.outside {
            None => Outside::Value(0.0),
            Some(o) => match o.get_ref() {
                toml::Value::String(s) if s == "hold" => Outside::Hold,
                toml::Value::Float(x) if x.is_finite() => Outside::Value(*x),
                toml::Value::Integer(n) => Outside::Value(*n as f64),
                _ => {
                    return Err(self.err(
                        o.span(),
                        &format!("{key}.outside"),
                        "must be a number (the value outside the table) or \"hold\" (keep the end values)",
                    ))
                }
            },
        };
        let path = self.base_dir.join(file.get_ref());
        let table = Table::read(&path, interpolation, outside).map_err(|e| {
            let location = match e.line() {
                Some(line) => {
                    let text = std::fs::read_to_string(&path).ok();
                    let line_text = text
                        .as_deref()
                        .and_then(|t| t.lines().nth(line - 1))
                        .map(str::to_string);
                    let column = match (e.column(), &line_text) {
                        (Some(field), Some(text)) => field_column(text, field),
                        _ => 1,
                    };
                    Location {
                        file: path.display().to_string(),
                        line,
                        column,
                        line_text,
                    }
                }
                None => self.loc(file.span()),
            };
            InputError::new(location, format!("{key}.file"), e.to_string())
        })?;
        Ok(Term::Table {
            table: Arc::new(table),
            length_unit: self.units.length.in_angstrom(),
            energy_unit: self.units.energy.in_ev(),
        })
    }

    fn check_formula(&self, raw: &RawTerm, key: &str) -> Result<Term> {
        let expr = raw.expression.as_ref().ok_or_else(|| {
            self.err(
                raw.shape.span(),
                &format!("{key}.expression"),
                "a `formula` term needs `expression`",
            )
        })?;
        let mut constants = BTreeMap::new();
        if let Some(c) = &raw.constants {
            for (name, v) in c.get_ref() {
                let x = self.finite(v, &format!("{key}.constants.{name}"))?;
                constants.insert(name.clone(), x);
            }
        }
        let formula = Formula::parse(expr.get_ref(), &constants).map_err(|e| {
            // Point inside the string: skip the opening quote(s), then count
            // characters of the expression.
            let span = expr.span();
            let quote = self.source.text.get(span.start..).map_or(1, |s| {
                if s.starts_with("\"\"\"") || s.starts_with("'''") {
                    3
                } else {
                    1
                }
            });
            let byte = expr
                .get_ref()
                .char_indices()
                .nth(e.offset())
                .map_or(expr.get_ref().len(), |(b, _)| b);
            let at = if span.start >= super::error::OVERRIDE_BASE {
                span
            } else {
                let s = span.start + quote + byte;
                s..s + 1
            };
            // A fault in a constant (a reserved name) is found before the
            // expression is read: point at the constant.
            let constant = match e.kind() {
                FormulaErrorKind::ConstantShadows { name }
                | FormulaErrorKind::NonFiniteConstant { name } => raw
                    .constants
                    .as_ref()
                    .and_then(|c| c.get_ref().get(name).map(|v| (name, v.span()))),
                _ => None,
            };
            match constant {
                Some((name, span)) => {
                    self.err(span, &format!("{key}.constants.{name}"), e.to_string())
                }
                None => self.err(at, &format!("{key}.expression"), e.to_string()),
            }
        })?;
        Ok(Term::Formula {
            formula: Arc::new(formula),
            length_unit: self.units.length.in_angstrom(),
            energy_unit: self.units.energy.in_ev(),
        })
    }
}

/// The 1-based character column where field `field` (1-based) of a CSV line
/// starts, past the blanks that lead it, as the input file's messages count.
fn field_column(line: &str, field: usize) -> usize {
    let mut column = 1;
    for (i, cell) in line.split(',').enumerate() {
        if i + 1 == field {
            return column + cell.chars().take_while(|c| c.is_whitespace()).count();
        }
        column += cell.chars().count() + 1;
    }
    column
}

/// The optional keys a raw term carries, with their spans.
fn present_keys(t: &RawTerm) -> Vec<(&'static str, Range<usize>)> {
    let nums: [(&str, &Option<Num>); 13] = [
        ("from", &t.from),
        ("to", &t.to),
        ("height", &t.height),
        ("amplitude", &t.amplitude),
        ("period", &t.period),
        ("phase", &t.phase),
        ("center", &t.center),
        ("stiffness", &t.stiffness),
        ("depth", &t.depth),
        ("range", &t.range),
        ("width", &t.width),
        ("slope", &t.slope),
        ("origin", &t.origin),
    ];
    let mut out: Vec<(&'static str, Range<usize>)> = nums
        .into_iter()
        .filter_map(|(n, v)| v.as_ref().map(|v| (n, v.span())))
        .collect();
    let texts: [(&str, &Option<Text>); 3] = [
        ("file", &t.file),
        ("interpolation", &t.interpolation),
        ("expression", &t.expression),
    ];
    out.extend(
        texts
            .into_iter()
            .filter_map(|(n, v)| v.as_ref().map(|v| (n, v.span()))),
    );
    if let Some(o) = &t.outside {
        out.push(("outside", o.span()));
    }
    if let Some(c) = &t.constants {
        out.push(("constants", c.span()));
    }
    out.sort_by_key(|(_, s)| s.start);
    out
}
