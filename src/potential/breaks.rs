//! Where a term is not smooth: jumps of V, corners and weaker breaks, each
//! with the term it comes from.
//!
//! A value or slope "is zero" below a few units of round-off of the numbers
//! it is computed from (`cos` of `2π (edge - phase) / period` is about
//! `6e-17`, not 0, at a zero of the cosine).

use super::terms::Term;

/// The lowest derivative of V that jumps at a [`Break`].
///
/// | kind | V, V', V'' | where |
/// |------|------------|-------|
/// | `Jump` | V jumps | step edges; window edges where the term is not zero; table ends whose value is not the outside value |
/// | `Kink` | V continuous, V' jumps | inner knots of linear tables; window edges where the term is zero; table ends meeting the outside value with a slope; `abs`, `min`, `max` in formulas |
/// | `Weak` | V, V', V'' continuous, V''' jumps | inner knots of natural cubic spline tables; a spline end meeting the outside value with zero slope |
///
/// Since `ψ'' = 2m (V - E) ψ / ħ²`, the lowest derivative of ψ that jumps
/// is of order `q = 2, 3, 5` for the three kinds. A stencil whose points
/// straddle the break then errs by `O(h^(q-2))` at the few points beside
/// it, which moves a level by about `O(h^(q-1))` (a first-order
/// perturbation estimate of ours, no source): `h`, `h^2` and `h^4`, with a
/// coefficient that depends on where the break falls between two grid
/// points, and so varies erratically with `h` unless the break stays on a
/// grid point as the grid is refined. A jump or a kink thus limits every
/// stencil; a weak break only stencils of order 6 and 8 and Numerov.
/// (Measured for `2*abs(x - 0.005)` on [-20, 20] Å, ground level: with the
/// corner on a grid point the error falls by 4.00 per halving of `h` at
/// orders 4 and 8 alike, -3.30e-6 eV at h = 0.005 Å; off the grid points
/// its sign and size jump from grid to grid.)
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum BreakKind {
    /// V itself jumps.
    Jump,
    /// V is continuous, V' jumps (a corner).
    Kink,
    /// V, V' and V'' are continuous, V''' jumps.
    Weak,
}

/// A point where one term of the potential is not smooth.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Break {
    /// Position, Å.
    pub at: f64,
    /// What jumps there.
    pub kind: BreakKind,
    /// 0-based index of the term in [`super::Potential::terms`].
    pub term: usize,
}

/// Round-off allowance, in units of `f64::EPSILON`, when deciding that a
/// value computed from input numbers is zero (common practice, no source).
const ROUND_OFF: f64 = 16.0;

/// Relative size below which a slope or third derivative of a table counts
/// as zero against the largest in the table (common practice, no source).
const TABLE_FLAT: f64 = 1e-12;

impl Term {
    /// Where this term jumps, Å: step edges, window edges where the inside
    /// value is not zero, table ends whose value differs from the outside
    /// value. A window edge where the value is zero on both sides is a
    /// corner instead (see [`BreakKind`]).
    pub fn discontinuities(&self) -> Vec<f64> {
        self.fixed_breaks()
            .into_iter()
            .filter(|b| b.1 == BreakKind::Jump)
            .map(|b| b.0)
            .collect()
    }

    /// The breaks of this term that do not depend on the domain (every
    /// shape but `formula`), Å, in no particular order.
    pub(super) fn fixed_breaks(&self) -> Vec<(f64, BreakKind)> {
        match self {
            Term::Step { from, to, height } => {
                if *height != 0.0 && from < to {
                    vec![(*from, BreakKind::Jump), (*to, BreakKind::Jump)]
                } else {
                    vec![]
                }
            }
            Term::Ripple {
                window: Some((a, b)),
                amplitude,
                ..
            }
            | Term::Linear {
                window: Some((a, b)),
                slope: amplitude,
                ..
            } => {
                if *amplitude == 0.0 {
                    return vec![];
                }
                [*a, *b]
                    .into_iter()
                    .map(|e| {
                        let kind = if self.vanishes_inside_at(e) {
                            BreakKind::Kink
                        } else {
                            BreakKind::Jump
                        };
                        (e, kind)
                    })
                    .collect()
            }
            Term::Table {
                table, length_unit, ..
            } => table_breaks(table)
                .into_iter()
                .map(|(x, kind)| (x * length_unit, kind))
                .collect(),
            Term::Ripple { window: None, .. }
            | Term::Linear { window: None, .. }
            | Term::Harmonic { .. }
            | Term::Morse { .. }
            | Term::Gauss { .. }
            | Term::Formula { .. } => vec![],
        }
    }

    /// Whether the windowed term's inside formula is zero (to round-off)
    /// at the window edge `e`, so that the edge is continuous.
    fn vanishes_inside_at(&self, e: f64) -> bool {
        let eps = ROUND_OFF * f64::EPSILON;
        match self {
            Term::Ripple {
                amplitude,
                period,
                phase,
                ..
            } => {
                let arg = 2.0 * std::f64::consts::PI * (e - phase) / period;
                (amplitude * arg.cos()).abs() <= eps * amplitude.abs() * (1.0 + arg.abs())
            }
            Term::Linear { slope, origin, .. } => {
                (slope * (e - origin)).abs() <= eps * slope.abs() * e.abs().max(origin.abs())
            }
            _ => false,
        }
    }

    /// Every break of this term strictly inside `(from, to)`, Å, in no
    /// particular order; formulas are searched on that interval
    /// ([`super::formula::Formula::kinks`]).
    pub(super) fn breaks_in(&self, from: f64, to: f64) -> Vec<(f64, BreakKind)> {
        let mut b = match self {
            Term::Formula {
                formula,
                length_unit,
                ..
            } => formula
                .kinks(from / length_unit, to / length_unit)
                .into_iter()
                .map(|x| (x * length_unit, BreakKind::Kink))
                .collect(),
            _ => self.fixed_breaks(),
        };
        b.retain(|&(x, _)| x > from && x < to);
        b
    }
}

/// The breaks of a table, in its own length unit: its ends (against the
/// outside values) and its inner knots.
fn table_breaks(table: &super::table::Table) -> Vec<(f64, BreakKind)> {
    let (xs, ys) = table.rows();
    let n = xs.len();
    let (below, above) = table.outside_values();
    let mut out = Vec::new();
    match table.spline() {
        None => {
            let slopes: Vec<f64> = (0..n - 1)
                .map(|i| (ys[i + 1] - ys[i]) / (xs[i + 1] - xs[i]))
                .collect();
            let flat = TABLE_FLAT * slopes.iter().fold(0.0f64, |m, s| m.max(s.abs()));
            let end = |x: f64, y: f64, outside: f64, slope: f64| {
                if y != outside {
                    Some((x, BreakKind::Jump))
                } else if slope.abs() > flat {
                    Some((x, BreakKind::Kink))
                } else {
                    None
                }
            };
            out.extend(end(xs[0], ys[0], below, slopes[0]));
            for i in 1..n - 1 {
                if (slopes[i] - slopes[i - 1]).abs() > flat {
                    out.push((xs[i], BreakKind::Kink));
                }
            }
            out.extend(end(xs[n - 1], ys[n - 1], above, slopes[n - 2]));
        }
        Some(spline) => {
            let m = spline.second_derivatives();
            // Third derivative on each interval; V'' is M_i at the knots,
            // zero at both ends (natural spline).
            let third: Vec<f64> = (0..n - 1)
                .map(|i| (m[i + 1] - m[i]) / (xs[i + 1] - xs[i]))
                .collect();
            let third_flat = TABLE_FLAT * third.iter().fold(0.0f64, |a, d| a.max(d.abs()));
            let slope_scale = (0..n - 1)
                .map(|i| ((ys[i + 1] - ys[i]) / (xs[i + 1] - xs[i])).abs())
                .fold(0.0f64, f64::max);
            let end = |x: f64, y: f64, outside: f64, third: f64| {
                if y != outside {
                    Some((x, BreakKind::Jump))
                } else if spline.eval_derivative(x).abs() > TABLE_FLAT * slope_scale {
                    Some((x, BreakKind::Kink))
                } else if third.abs() > third_flat {
                    Some((x, BreakKind::Weak))
                } else {
                    None
                }
            };
            out.extend(end(xs[0], ys[0], below, third[0]));
            for i in 1..n - 1 {
                if (third[i] - third[i - 1]).abs() > third_flat {
                    out.push((xs[i], BreakKind::Weak));
                }
            }
            out.extend(end(xs[n - 1], ys[n - 1], above, third[n - 2]));
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use std::collections::BTreeMap;
    use std::sync::Arc;

    use super::super::formula::Formula;
    use super::super::table::{Interpolation, Outside, Table};
    use super::super::Potential;
    use super::*;

    fn potential(terms: Vec<Term>) -> Potential {
        Potential { terms }
    }

    fn table_term(text: &str, how: Interpolation, outside: Outside, unit: f64) -> Term {
        match Table::parse(text, how, outside) {
            Ok(t) => Term::Table {
                table: Arc::new(t),
                length_unit: unit,
                energy_unit: 1.0,
            },
            Err(e) => panic!("table: {e}"),
        }
    }

    fn formula_term(source: &str, unit: f64) -> Term {
        match Formula::parse(source, &BTreeMap::new()) {
            Ok(f) => Term::Formula {
                formula: Arc::new(f),
                length_unit: unit,
                energy_unit: 1.0,
            },
            Err(e) => panic!("`{source}`: {e}"),
        }
    }

    fn assert_close(got: &[f64], want: &[f64]) {
        assert_eq!(got.len(), want.len(), "{got:?}, want {want:?}");
        for (g, w) in got.iter().zip(want) {
            assert!((g - w).abs() <= 1e-12, "{got:?}, want {want:?}");
        }
    }

    /// Regression: every window edge was listed as a jump, also where the
    /// term is zero on both sides and only its slope jumps.
    #[test]
    fn continuous_window_edge_is_a_kink_not_a_discontinuity() {
        // 0.1 (x - 0) on [0, 5): 0 at x = 0 (a corner), 0.5 at x = 5 (a jump).
        let linear = Term::Linear {
            slope: 0.1,
            origin: 0.0,
            window: Some((0.0, 5.0)),
        };
        // 0.3 cos(pi x) on [0.5, 3): cos(pi/2) = 0 (a corner), cos(3 pi) = -1
        // (a jump).
        let ripple = Term::Ripple {
            amplitude: 0.3,
            period: 2.0,
            phase: 0.0,
            window: Some((0.5, 3.0)),
        };
        let p = potential(vec![linear, ripple]);
        assert_eq!(p.discontinuities(), vec![3.0, 5.0]);
        assert_eq!(p.kinks(-10.0, 10.0), vec![0.0, 0.5]);
        assert!(p.weak_breaks(-10.0, 10.0).is_empty());
        // Where the windows sit, the values agree with the classification.
        let v = |x: f64| p.eval(x);
        assert!((v(0.5 - 1e-9) - v(0.5 + 1e-9)).abs() < 1e-8);
        assert!((v(5.0 - 1e-9) - v(5.0 + 1e-9)).abs() > 0.4);
    }

    #[test]
    fn a_jump_stays_a_discontinuity() {
        let p = potential(vec![
            Term::Step {
                from: 1.0,
                to: 2.0,
                height: -0.5,
            },
            // A corner at a jump is listed as the jump only.
            formula_term("abs(x - 1)", 1.0),
        ]);
        assert_eq!(p.discontinuities(), vec![1.0, 2.0]);
        assert!(p.kinks(-5.0, 5.0).is_empty());
        // breaks() keeps both, the corner found by bisection within
        // round-off of 1.
        let mut kinds: Vec<BreakKind> = p.breaks(-5.0, 5.0).iter().map(|b| b.kind).collect();
        kinds.sort();
        assert_eq!(
            kinds,
            vec![BreakKind::Jump, BreakKind::Jump, BreakKind::Kink]
        );
        // A step of height 0 is no jump at all.
        let flat = potential(vec![Term::Step {
            from: 1.0,
            to: 2.0,
            height: 0.0,
        }]);
        assert!(flat.discontinuities().is_empty());
    }

    #[test]
    fn linear_table_knots_are_kinks() {
        // Slopes 1, 0, -1: corners at the inner knots x = 1 and 2; the ends
        // meet the outside value 0 with slopes 1 and -1.
        let text = "x,V\n0,0\n1,1\n2,1\n3,0\n";
        let p = potential(vec![table_term(
            text,
            Interpolation::Linear,
            Outside::Value(0.0),
            1.0,
        )]);
        assert!(p.discontinuities().is_empty());
        assert_eq!(p.kinks(-1.0, 4.0), vec![0.0, 1.0, 2.0, 3.0]);
        // Only inside the interval.
        assert_eq!(p.kinks(0.0, 3.0), vec![1.0, 2.0]);
        // Off the outside value the ends jump; lengths follow the unit
        // (x in nm: 10 angstrom).
        let p = potential(vec![table_term(
            text,
            Interpolation::Linear,
            Outside::Value(0.5),
            10.0,
        )]);
        assert_eq!(p.discontinuities(), vec![0.0, 30.0]);
        assert_eq!(p.kinks(-10.0, 40.0), vec![10.0, 20.0]);
        // Collinear rows make no corner.
        let p = potential(vec![table_term(
            "x,V\n0,0\n1,2\n2,4\n",
            Interpolation::Linear,
            Outside::Hold,
            1.0,
        )]);
        assert_eq!(p.kinks(-1.0, 3.0), vec![0.0, 2.0]);
    }

    /// Regression: a held table end was listed as a jump (V just inside was
    /// compared with V beyond it), though holding keeps V continuous.
    #[test]
    fn held_table_end_is_a_kink_not_a_jump() {
        let p = potential(vec![table_term(
            "x,V\n0,1\n1,0\n2,0.5\n",
            Interpolation::Linear,
            Outside::Hold,
            1.0,
        )]);
        assert!(p.discontinuities().is_empty());
        assert_eq!(p.kinks(-1.0, 3.0), vec![0.0, 1.0, 2.0]);
    }

    #[test]
    fn spline_knots_are_weak_breaks() {
        // Generic rows: the spline's third derivative (M_{i+1} - M_i) / h_i
        // differs from interval to interval.
        let text = "x,V\n0,0.6\n1,0.3\n2,0.0\n3,0.1\n4,0.5\n";
        let p = potential(vec![table_term(
            text,
            Interpolation::Cubic,
            Outside::Hold,
            1.0,
        )]);
        assert!(p.discontinuities().is_empty());
        // Held ends: V continuous, the end slopes are not zero.
        assert_eq!(p.kinks(-1.0, 5.0), vec![0.0, 4.0]);
        assert_eq!(p.weak_breaks(-1.0, 5.0), vec![1.0, 2.0, 3.0]);
        // A straight line through the rows is a spline with no breaks
        // inside; its ends still meet the outside value with a slope.
        let p = potential(vec![table_term(
            "x,V\n0,0\n1,1\n2,2\n3,3\n",
            Interpolation::Cubic,
            Outside::Hold,
            1.0,
        )]);
        assert!(p.weak_breaks(-1.0, 4.0).is_empty());
        assert_eq!(p.kinks(-1.0, 4.0), vec![0.0, 3.0]);
        // Off the outside value: jumps, not kinks.
        let p = potential(vec![table_term(
            text,
            Interpolation::Cubic,
            Outside::Value(0.0),
            1.0,
        )]);
        assert_eq!(p.discontinuities(), vec![0.0, 4.0]);
        assert!(p.kinks(-1.0, 5.0).is_empty());
    }

    #[test]
    fn formula_corners_in_angstrom() {
        // x in nm (10 angstrom): abs(x - 0.5) has its corner at 5 angstrom;
        // abs(x - 1) + min(x, 2 x) at 0 and 10 angstrom.
        let p = potential(vec![
            formula_term("abs(x - 0.5)", 10.0),
            formula_term("abs(x - 1) + min(x, 2*x)", 10.0),
        ]);
        assert_close(&p.kinks(-20.0, 20.0), &[0.0, 5.0, 10.0]);
        let terms: Vec<usize> = p.breaks(-20.0, 20.0).iter().map(|b| b.term).collect();
        assert_eq!(terms, vec![1, 0, 1]);
        // The same corner through two terms is listed once.
        let p = potential(vec![
            formula_term("abs(x - 0.005)", 1.0),
            formula_term("max(x, 0.005)", 1.0),
        ]);
        assert_close(&p.kinks(-20.0, 20.0), &[0.005]);
        assert_eq!(p.breaks(-20.0, 20.0).len(), 2);
    }

    #[test]
    fn smooth_terms_have_no_breaks() {
        let p = potential(vec![
            Term::Harmonic {
                center: 1.0,
                stiffness: 4.0,
            },
            Term::Morse {
                center: 1.0,
                depth: 4.0,
                range: 2.0,
            },
            Term::Gauss {
                center: 0.0,
                height: 2.0,
                width: 0.5,
            },
            Term::Ripple {
                amplitude: 0.3,
                period: 2.8,
                phase: 0.7,
                window: None,
            },
            formula_term("x^2 * exp(-x)", 1.0),
        ]);
        assert!(p.discontinuities().is_empty());
        assert!(p.breaks(-10.0, 10.0).is_empty());
        // A bad interval gives nothing rather than a panic.
        assert!(p.kinks(1.0, -1.0).is_empty());
    }
}
