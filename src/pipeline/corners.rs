//! The potential's corners on a grid: which kinks and weak breaks sit on
//! grid points, their one-sided derivatives, and which of them the stencil
//! correction of [`crate::grid::kink`] can remove; and the slope of the
//! potential at hard walls.

use crate::grid::kink::Corner;
use crate::grid::{fornberg, Boundary, Grid, Scheme};
use crate::input::Model;
use crate::potential::Potential;

use super::gridding::Breaks;

/// Nodes of the one-sided derivative formulas: `0, δ, ..., 6δ` (order 6 in
/// `δ` for `V'`, 4 for `V'''`).
const ONE_SIDED_NODES: usize = 7;

/// Why a corner's stencil was not corrected.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Uncorrected {
    /// Not on a grid point (no grid near the wanted one puts it on one).
    BetweenGridPoints,
    /// Closer to a hard wall than the correction's reach.
    NearWall,
    /// Closer to another break than the correction's reach.
    NearBreak,
    /// The Numerov scheme has no corner correction.
    Numerov,
    /// Order 2 loses nothing at a corner (its own error is of order 2).
    OrderTwo,
}

impl Uncorrected {
    /// Why, in words for a warning.
    pub fn reason(self) -> &'static str {
        match self {
            Uncorrected::BetweenGridPoints => "lies between grid points",
            Uncorrected::NearWall => "lies too close to a wall to correct the stencil",
            Uncorrected::NearBreak => "lies too close to another break to correct the stencil",
            Uncorrected::Numerov => "is not corrected by the Numerov scheme",
            Uncorrected::OrderTwo => "costs order 2 nothing",
        }
    }
}

/// The corners of a potential on one grid.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct CornerReport {
    /// Corners whose stencil is corrected.
    pub corners: Vec<Corner>,
    /// Their positions, Å.
    pub corrected: Vec<f64>,
    /// Kinks and weak breaks left as they are, Å, with the reason.
    pub uncorrected: Vec<(f64, Uncorrected)>,
}

/// `V'`, `V''`, `V'''` at `x` from one side (`direction` +1: from the
/// right, -1: from the left), from samples at `x + direction * s * step`,
/// `s = first..first + 7`; `None` when a sample is not finite.
pub fn one_sided(
    potential: &Potential,
    x: f64,
    direction: f64,
    step: f64,
    first: usize,
) -> Option<[f64; 3]> {
    let offsets: Vec<f64> = (first..first + ONE_SIDED_NODES)
        .map(|s| direction * s as f64 * step)
        .collect();
    let w = fornberg(0.0, &offsets, 3);
    let values: Vec<f64> = offsets.iter().map(|o| potential.eval(x + o)).collect();
    if values.iter().any(|v| !v.is_finite()) {
        return None;
    }
    let d = |m: usize| w[m].iter().zip(&values).map(|(a, b)| a * b).sum::<f64>();
    Some([d(1), d(2), d(3)])
}

/// Which of the kinks and weak breaks of `breaks` sit on grid points of
/// `grid`, and which of those the stencil correction can remove: a corner
/// needs `2p` clear points on each side (no wall, no other break), a
/// finite-difference scheme of order 4 or more, and one-sided derivatives
/// of `V` that are finite numbers.
pub fn find_corners(model: &Model, grid: &Grid, breaks: &Breaks) -> CornerReport {
    let mut report = CornerReport::default();
    let mut candidates: Vec<f64> = breaks.kinks.iter().chain(&breaks.weak).copied().collect();
    candidates.sort_by(f64::total_cmp);
    if candidates.is_empty() {
        return report;
    }
    let all = breaks.all();
    let h = grid.spacing;
    let n = grid.points;
    let p = model.grid.half_width();
    let steps = grid.steps() as f64;
    let length = model.domain.length();
    let ring = grid.boundary == Boundary::Periodic;
    for c in candidates {
        let f = (c - grid.from) / h;
        let nearest = f.round();
        if (f - nearest).abs() > 1e-9 * steps {
            report.uncorrected.push((c, Uncorrected::BetweenGridPoints));
            continue;
        }
        let why = if model.grid.scheme == Scheme::Numerov {
            Some(Uncorrected::Numerov)
        } else if p < 2 {
            Some(Uncorrected::OrderTwo)
        } else {
            None
        };
        if let Some(why) = why {
            report.uncorrected.push((c, why));
            continue;
        }
        let index = if ring {
            (nearest as usize) % n
        } else {
            // Unknown i sits at from + (i + 1) h.
            (nearest as usize).saturating_sub(1)
        };
        let reach = 2 * p;
        if !ring && (index + 1 < reach || index + reach > n) {
            report.uncorrected.push((c, Uncorrected::NearWall));
            continue;
        }
        let gap = all
            .iter()
            .filter(|&&b| (b - c).abs() > 1e-9 * length)
            .map(|&b| {
                let d = (b - c).abs();
                if ring {
                    d.min(length - d)
                } else {
                    d
                }
            })
            .fold(f64::INFINITY, f64::min);
        if gap < reach as f64 * h * (1.0 - 1e-9) || (ring && n < 2 * reach + 2) {
            report.uncorrected.push((c, Uncorrected::NearBreak));
            continue;
        }
        let step = (0.5 * h).min(gap / (ONE_SIDED_NODES as f64 + 1.0));
        let pot = &model.potential;
        let jumps = match (
            one_sided(pot, c, 1.0, step, 0),
            one_sided(pot, c, -1.0, step, 0),
        ) {
            (Some(r), Some(l)) => [r[0] - l[0], r[1] - l[1], r[2] - l[2]],
            _ => {
                report.uncorrected.push((c, Uncorrected::NearBreak));
                continue;
            }
        };
        report.corners.push(Corner { index, jumps });
        report.corrected.push(c);
    }
    report
}

/// Whether a hard wall cuts the potential with a slope that the levels
/// feel: `V'` at a wall (from inside) is not zero, and the wavefunction of
/// some computed level leaves the wall with a slope that is not negligible
/// (`|psi'(wall)| L > 1e-3 max |psi|`). The odd reflection that closes the
/// stencil there makes `psi''''` jump by `4 V' psi' / t`, which limits
/// every stencil to order 4 (the same count as for a corner's `J_4`, see
/// [`crate::grid::kink`]).
pub fn wall_slope_felt(model: &Model, grid: &Grid, v: &[f64], psis: &[Vec<f64>]) -> bool {
    if grid.boundary != Boundary::Walls || grid.points < 2 * ONE_SIDED_NODES {
        return false;
    }
    let vmax = v.iter().fold(0.0f64, |m, x| m.max(x.abs()));
    let length = model.domain.length();
    let scale = model.kinetic() * (std::f64::consts::PI / length).powi(2);
    let flat = 1e-8 * (vmax + scale) / length;
    let h = grid.spacing;
    let walls = [
        (model.domain.from, 1.0, 0usize),
        (model.domain.to, -1.0, grid.points - 1),
    ];
    walls.iter().any(|&(x, direction, first)| {
        let slope = one_sided(&model.potential, x, direction, 0.5 * h, 1).map_or(0.0, |d| d[0]);
        slope.abs() > flat
            && psis.iter().any(|psi| {
                let top = psi.iter().fold(0.0f64, |m, x| m.max(x.abs()));
                psi[first].abs() / h * length > 1e-3 * top
            })
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::potential::Term;

    #[test]
    fn one_sided_derivatives_of_a_cubic_are_exact() {
        // V = x^3 - 2 x^2 + x: V'(1) = 0, V''(1) = 2, V'''(1) = 6 (by hand);
        // seven nodes differentiate a cubic exactly, up to round-off.
        let p = Potential {
            terms: vec![Term::Formula {
                formula: std::sync::Arc::new(
                    crate::potential::formula::Formula::parse(
                        "x^3 - 2*x^2 + x",
                        &Default::default(),
                    )
                    .unwrap(),
                ),
                length_unit: 1.0,
                energy_unit: 1.0,
            }],
        };
        for dir in [1.0, -1.0] {
            let d = one_sided(&p, 1.0, dir, 0.01, 0).unwrap();
            assert!(d[0].abs() < 1e-9, "{d:?}");
            assert!((d[1] - 2.0).abs() < 1e-6, "{d:?}");
            assert!((d[2] - 6.0).abs() < 1e-3, "{d:?}");
        }
    }
}
