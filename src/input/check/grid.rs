//! Checking `[domain]` and `[grid]`: the interval, its boundary, and how
//! finely it is cut.

use std::ops::Range;

use toml::Spanned;

use super::{Checker, Result};
use crate::grid::{Boundary, Domain, Order, Scheme};
use crate::input::model::*;
use crate::input::raw::{RawDomain, RawGrid};

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
}
