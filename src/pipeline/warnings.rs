//! What the user should know about a solve: coarse grids, artificial walls,
//! rounding, near-degenerate levels, breaks of the potential off the grid.

use crate::grid::{Boundary, Grid};
use crate::input::Model;

use super::limits::{DEGENERATE_FACTOR, MIN_POINTS_PER_LOBE, ROUNDING_WARNING};
use super::{EdgeReport, Level};

/// Warnings about the grid and the domain: a grid too coarse for the
/// highest level, and levels that feel hard walls that are not part of the
/// model.
pub fn warnings(model: &Model, grid: &Grid, v: &[f64], levels: &[Level]) -> Vec<String> {
    let mut out = Vec::new();
    let vmin = v.iter().copied().fold(f64::INFINITY, f64::min);
    if let Some(top) = levels.last() {
        let kinetic_energy = top.energy - vmin;
        if kinetic_energy > 0.0 {
            let k = (kinetic_energy / model.kinetic()).sqrt();
            let per_lobe = std::f64::consts::PI / (k * grid.spacing);
            if per_lobe < MIN_POINTS_PER_LOBE {
                out.push(format!(
                    "grid too coarse for level {}: about {:.1} points per half-wavelength where it is fastest (want at least {}); raise grid.points",
                    top.n, per_lobe, MIN_POINTS_PER_LOBE
                ));
            }
        }
    }
    if grid.boundary == Boundary::Walls && model.chain.is_none() {
        out.extend(wall_warning(model, v, levels));
    }
    out
}

/// The warning for levels above the potential at a wall where V still rises
/// towards it: there the potential is cut off by the domain, and such a
/// level feels hard walls that are not part of the model. A wall where V is
/// flat (a box with terms inside it, a window ending exactly at the wall)
/// or falls is taken as meant. The edge values are the potential at the
/// first and last unknowns, the limit from inside (a half-open window
/// ending at `domain.to` reads 0 at `to` itself).
fn wall_warning(model: &Model, v: &[f64], levels: &[Level]) -> Option<String> {
    let n = v.len();
    if n < 2 || model.potential.terms.is_empty() {
        return None;
    }
    // A rise below 1e-9 of the potential's size (or of the lowest box
    // level) is flat: the tail of a Gaussian at a wall is meant.
    let size = v.iter().fold(0.0f64, |m, x| m.max(x.abs()))
        + model.kinetic() * (std::f64::consts::PI / model.domain.length()).powi(2);
    let rises = |edge: f64, inner: f64| edge > inner + 1e-9 * size;
    let mut edges: Vec<(&str, f64)> = Vec::new();
    if rises(v[0], v[1]) {
        edges.push(("left", v[0]));
    }
    if rises(v[n - 1], v[n - 2]) {
        edges.push(("right", v[n - 1]));
    }
    let lowest = edges.iter().map(|e| e.1).fold(f64::INFINITY, f64::min);
    let feeling: Vec<usize> = levels
        .iter()
        .filter(|l| l.energy >= lowest)
        .map(|l| l.n)
        .collect();
    let (first, last) = (feeling.first()?, feeling.last()?);
    let unit = model.units.energy.label();
    let values: Vec<String> = edges
        .iter()
        .map(|(side, value)| {
            format!(
                "{} {unit} next to the {side} wall",
                significant(model.units.energy_out(*value), 6)
            )
        })
        .collect();
    let which = if first == last {
        format!("level {first} lies")
    } else {
        format!("levels {first}..{last} lie")
    };
    Some(format!(
        "{which} above the potential at the domain's edges where it still rises towards them (V = {}) and feel hard walls that cut it off; widen the domain if they should be free of them",
        values.join(", ")
    ))
}

/// `x` with `digits` significant digits, trailing zeros dropped: plain
/// notation between 1e-3 and 1e6, scientific outside.
pub fn significant(x: f64, digits: usize) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    let digits = digits.max(1);
    let exponent = x.abs().log10().floor() as i32;
    if (-3..6).contains(&exponent) {
        let decimals = (digits as i32 - 1 - exponent).max(0) as usize;
        let s = format!("{x:.decimals$}");
        if s.contains('.') {
            s.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            s
        }
    } else {
        format!("{:.*e}", digits - 1, x)
    }
}

/// Warnings about rounding: energies whose last digits are noise, and
/// adjacent levels that rounding cannot tell apart. Degenerate pairs are
/// expected on a ring (the two directions of travel) and not flagged there.
pub fn precision_warnings(
    model: &Model,
    grid: &Grid,
    levels: &[Level],
    rounding: f64,
    scale: f64,
) -> Vec<String> {
    let mut out = Vec::new();
    let unit = model.units.energy.label();
    if rounding > ROUNDING_WARNING * scale {
        out.push(format!(
            "rounding limits the energies to about ±{:.1e} {unit} (eps ||H||_1: the matrix's norm is large: a deep or high potential, or a very fine grid); digits beyond that are noise",
            model.units.energy_out(rounding)
        ));
    }
    if grid.boundary == Boundary::Walls {
        for pair in levels.windows(2) {
            let gap = pair[1].energy - pair[0].energy;
            if gap < DEGENERATE_FACTOR * rounding {
                out.push(format!(
                    "levels {} and {} are degenerate to within rounding (they differ by {:.1e} {unit}): their wavefunctions may be any mixture of the two, so their nodes, signs and transition dipoles are not reliable",
                    pair[0].n,
                    pair[1].n,
                    model.units.energy_out(gap)
                ));
            }
        }
    }
    out
}

/// The warning for kinks and weak breaks whose stencil is not corrected
/// where that costs the scheme order: each is named with the reason, and
/// the error estimate is widened (between grid points) or uses the lower
/// order ([`super::accuracy::expected`]).
pub fn corner_warning(model: &Model, edges: &EdgeReport) -> Option<String> {
    use super::corners::Uncorrected;
    let scheme = model.grid.accuracy_order();
    let costly: Vec<String> = edges
        .uncorrected
        .iter()
        .filter(|(x, why)| {
            let kink = edges.kinks.contains(x);
            // What the break costs: a kink order 2, a weak break order 4;
            // between grid points both are erratic whatever the scheme.
            *why == Uncorrected::BetweenGridPoints || scheme > if kink { 2 } else { 4 }
        })
        .map(|(x, why)| {
            let what = if edges.kinks.contains(x) {
                "kink (V' jumps)"
            } else {
                "weak break (V''' jumps)"
            };
            format!(
                "a {what} at x = {} {} {}",
                significant(model.units.length_out(*x), 10),
                model.units.length.label(),
                why.reason()
            )
        })
        .collect();
    (!costly.is_empty()).then(|| {
        format!(
            "{}: the levels converge at a lower order there than the scheme's {scheme}, and erratically when between grid points; the error estimates allow for it. Put it at a simple fraction of the domain, or use grid.tolerance",
            costly.join("; ")
        )
    })
}

/// The warning for jumps of the potential that could not be put on grid
/// points.
pub fn jump_warning(model: &Model, edges: &EdgeReport) -> Option<String> {
    (!edges.aligned).then(|| format!(
        "the potential jumps at x = {:?} between grid points: levels then converge at low, erratic order and error estimates are unreliable; put the jumps at simple fractions of the domain",
        edges.positions.iter().map(|x| model.units.length_out(*x)).collect::<Vec<_>>()
    ))
}

#[cfg(test)]
mod tests {
    use super::significant;

    #[test]
    fn edge_values_print_with_sensible_digits() {
        assert_eq!(significant(12.500000000000002, 6), "12.5");
        assert_eq!(significant(-0.30000000000000004, 6), "-0.3");
        assert_eq!(significant(3.80998211096858, 6), "3.80998");
        assert_eq!(significant(1.5e-7, 6), "1.50000e-7");
        assert_eq!(significant(0.0, 6), "0");
        assert_eq!(significant(123456.0, 6), "123456");
        assert_eq!(significant(1234567.0, 6), "1.23457e6");
    }
}
