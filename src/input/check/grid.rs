//! Checking `[domain]` and `[grid]`: the interval, its boundary, and how
//! finely it is cut.

use std::ops::Range;

use toml::Spanned;

use super::number;
use super::{Checker, Result};
use crate::grid::{Boundary, Domain, Grid, Order, Scheme};
use crate::input::model::*;
use crate::input::raw::{RawDomain, RawGrid, RawInput};

impl Checker<'_> {
    pub(super) fn check_domain(&self, d: &Spanned<RawDomain>) -> Result<Domain> {
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

    pub(super) fn check_grid(
        &self,
        g: Option<&Spanned<RawGrid>>,
        domain: &Domain,
    ) -> Result<GridSpec> {
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
            // Only Numerov has an order of its own: a written order must
            // agree with it.
            let own = spec.accuracy_order();
            if spec.order.get() != own {
                return Err(self.err(
                    o.span(),
                    "grid.order",
                    format!("the Numerov scheme is of order {own}; remove grid.order or set it to {own} (got {v})"),
                ));
            }
        } else {
            spec.order =
                Order::new(spec.accuracy_order()).expect("a scheme's own order is allowed");
        }
        Ok(spec)
    }

    /// A grid chosen by spacing (written, or the default) must leave the
    /// stencil its [`GridSpec::min_points`]. A written spacing is at fault
    /// when it does not; with the default spacing, the key that made the box
    /// so short is: `chain.bond_length` (or `chain.end_extension`) for a
    /// chain, `domain.to` for a domain. A tolerance starts from the default
    /// spacing but refines until the levels are resolved, so it is not
    /// refused here.
    pub(super) fn check_grid_fits(
        &self,
        spec: &GridSpec,
        domain: &Domain,
        raw: &RawInput,
    ) -> Result<()> {
        let Resolution::Spacing(h) = spec.resolution else {
            return Ok(());
        };
        let min = spec.min_points();
        if Grid::with_spacing(domain, h).points >= min {
            return Ok(());
        }
        let u = &self.units;
        let needs = format!(
            "fewer than the {min} points an order-{} stencil needs",
            spec.accuracy_order()
        );
        let written = raw.grid.as_ref().and_then(|g| g.get_ref().spacing.as_ref());
        if let Some(s) = written {
            return Err(self.err(
                s.span(),
                "grid.spacing",
                format!(
                    "{} is too coarse for a domain of length {}: it leaves {needs}",
                    s.get_ref(),
                    number(u.length_out(domain.length()))
                ),
            ));
        }
        let chain = raw.chain.as_ref().map(Spanned::get_ref);
        let (key, span) = match (chain, &raw.domain) {
            (Some(c), _) => match (&c.bond_length, &c.end_extension) {
                (Some(b), _) => ("chain.bond_length", b.span()),
                (None, Some(e)) => ("chain.end_extension", e.span()),
                (None, None) => ("chain.bonds", c.bonds.span()),
            },
            (None, Some(d)) => match &d.get_ref().to {
                Some(to) => ("domain.to", to.span()),
                None => ("domain", d.span()),
            },
            (None, None) => ("domain", 0..0),
        };
        Err(self.err(
            span,
            key,
            format!(
                "makes the box {} {l} long: the default grid spacing of {} {l} leaves {needs}; make the box longer or set grid.points",
                number(u.length_out(domain.length())),
                number(u.length_out(h)),
                l = u.length.label(),
            ),
        ))
    }
}
