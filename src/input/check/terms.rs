//! Checking `[[term]]` entries: which keys each shape takes, their ranges
//! and units; formula terms; table terms, whose CSV file is read through
//! the document's [`TableCache`](crate::input::tables::TableCache) and
//! located at the file's own line and column when it is at fault.

use std::collections::BTreeMap;
use std::ops::Range;
use std::sync::Arc;

use toml::Spanned;

use super::{Checker, Result};
use crate::input::error::InputError;
use crate::input::raw::{Num, RawTerm, Text};
use crate::potential::formula::{Formula, FormulaErrorKind};
use crate::potential::table::{Interpolation, Outside};
use crate::potential::Term;

impl Checker<'_> {
    pub(super) fn check_term(&self, t: &Spanned<RawTerm>, key: &str) -> Result<Term> {
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

    pub(super) fn check_table(&self, raw: &RawTerm, key: &str) -> Result<Term> {
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
        let table = self
            .tables
            .get(&path, interpolation, outside)
            .map_err(|fault| {
                let location = fault.at.unwrap_or_else(|| self.loc(file.span()));
                InputError::new(location, format!("{key}.file"), fault.message)
            })?;
        Ok(Term::Table {
            table,
            length_unit: self.units.length.in_angstrom(),
            energy_unit: self.units.energy.in_ev(),
        })
    }

    pub(super) fn check_formula(&self, raw: &RawTerm, key: &str) -> Result<Term> {
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
            let at = if span.start >= crate::input::error::OVERRIDE_BASE {
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
