//! States figure: the potential V(x) with the bound levels drawn at their
//! energies.
//!
//! Each shown level is a horizontal line across its classically allowed
//! region(s) (where E >= V(x)); its wavefunction is drawn about that line,
//! `E + a psi(x) / max|psi|`, with `a = f dE` (`f` is
//! [`Style::amplitude`], default [`WAVE_FRACTION`]), where `dE` is the
//! level's spacing to its nearer neighbour among the shown levels, so with
//! `f < 0.5` neighbouring curves do not reach each other, and the widely
//! spaced upper levels of a box get waves as tall as their room allows
//! rather than the height the closest pair allows (a textbook way of drawing
//! stationary states, e.g. D. J. Griffiths, Introduction to Quantum
//! Mechanics, 2nd ed., Fig. 2.2). With `density = true` the curve is
//! `E + 2 a rho / max rho`, `rho = psi^2`, which only rises above its line.
//! With a single level shown, `dE_min` is taken as the distance from the
//! lowest potential value to the level (or 1 energy unit if that is zero).
//!
//! Occupied levels (occupation 1 or 2) are solid, empty ones dashed; the
//! right margin names each level `n` and shows one dot per electron.

use super::axes::{
    axis_range, bounds_of, check, check_finite, check_len, dashes, draw_err, extent, frame,
    label_areas, pad, polyline, text, titled, usable, y_area, y_ticks, Linear, Pt,
};
use super::style::{Px, LEVEL_INK};
use super::{PlotError, Style};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// Default fraction of the smallest level spacing used as the
/// wavefunction amplitude (0.4), so two neighbouring curves use at most
/// 80 % of the space between their lines; [`Style::amplitude`] changes it.
pub const WAVE_FRACTION: f64 = 0.4;

/// One level of a [`StatesFigure`].
#[derive(Debug, Clone, PartialEq)]
pub struct StateLevel {
    /// Quantum number (label), as counted by the caller (1 = ground state
    /// in chainwell).
    pub n: usize,
    /// Energy in the figure's energy unit.
    pub energy: f64,
    /// Wavefunction on the figure's x grid (any normalisation; drawn scaled
    /// to its own maximum modulus).
    pub psi: Vec<f64>,
    /// Classically allowed intervals `(x_start, x_end)` in the x unit; empty
    /// draws the level across the whole x range.
    pub allowed: Vec<(f64, f64)>,
    /// Electrons in the level: 0, 1 or 2.
    pub occupation: u8,
}

/// Potential and levels on a grid.
#[derive(Debug, Clone, PartialEq)]
pub struct StatesFigure {
    /// Grid positions, increasing, in `x_unit`.
    pub x: Vec<f64>,
    /// Potential on the grid, in `energy_unit`.
    pub potential: Vec<f64>,
    /// Levels (any order); which are shown is chosen by `Style::levels`
    /// (by `n`) and `Style::energy_window`.
    pub levels: Vec<StateLevel>,
    /// Draw densities `psi^2` instead of amplitudes.
    pub density: bool,
    /// Unit of x for the axis title, e.g. "Å".
    pub x_unit: String,
    /// Unit of energy for the axis title, e.g. "eV".
    pub energy_unit: String,
    /// Hard walls at these two positions (x unit), drawn as heavy vertical
    /// lines rising from the potential to the top of the plot; `None` for
    /// open or periodic ends.
    pub walls: Option<(f64, f64)>,
}

impl StatesFigure {
    /// A figure with units "Å" and "eV", amplitudes drawn.
    pub fn new(x: Vec<f64>, potential: Vec<f64>, levels: Vec<StateLevel>) -> Self {
        StatesFigure {
            x,
            potential,
            levels,
            density: false,
            x_unit: "Å".into(),
            energy_unit: "eV".into(),
            walls: None,
        }
    }

    /// Checks the data and that at least one level is shown.
    pub(super) fn validate(&self, style: &Style) -> Result<(), PlotError> {
        check("x grid", &self.x)?;
        check_len("potential", self.x.len(), self.potential.len())?;
        check_finite("potential", &self.potential)?;
        if let Some((a, b)) = self.walls {
            check_finite("walls", &[a, b])?;
        }
        if self.levels.is_empty() {
            return Err(PlotError::Empty("levels".into()));
        }
        for l in &self.levels {
            let what = format!("level n={}", l.n);
            check_len(&format!("{what} psi"), self.x.len(), l.psi.len())?;
            check_finite(&format!("{what} psi"), &l.psi)?;
            check_finite(&format!("{what} energy"), &[l.energy])?;
            for &(a, b) in &l.allowed {
                check_finite(&format!("{what} allowed interval"), &[a, b])?;
                if a > b {
                    return Err(PlotError::Invalid(format!(
                        "{what}: allowed interval ({a}, {b}) reversed"
                    )));
                }
            }
            if l.occupation > 2 {
                return Err(PlotError::Invalid(format!(
                    "{what}: occupation {} (0, 1 or 2 allowed)",
                    l.occupation
                )));
            }
        }
        self.shown(style).map(|_| ())
    }

    /// The shown levels, sorted by energy.
    fn shown(&self, style: &Style) -> Result<Vec<&StateLevel>, PlotError> {
        let mut v: Vec<&StateLevel> = self
            .levels
            .iter()
            .filter(|l| style.levels.as_ref().is_none_or(|ns| ns.contains(&l.n)))
            .collect();
        if v.is_empty() {
            return Err(PlotError::Invalid(
                "none of the requested levels is in the figure".into(),
            ));
        }
        if let Some((lo, hi)) = style.energy_window {
            v.retain(|l| l.energy >= lo && l.energy <= hi);
            if v.is_empty() {
                return Err(PlotError::NoDataInWindow(format!(
                    "no level energy inside ({lo}, {hi})"
                )));
            }
        }
        v.sort_by(|a, b| a.energy.total_cmp(&b.energy));
        Ok(v)
    }
}

/// Wavefunction amplitude of each shown level (sorted by energy) in energy
/// units: `fraction` of its spacing to the nearer neighbour (see module
/// docs); a level with no neighbour at a distance uses the distance from
/// the potential's minimum, or 1 energy unit.
fn amplitudes(shown: &[&StateLevel], v_min: f64, fraction: f64) -> Vec<f64> {
    let gap = |i: usize, j: usize| -> f64 {
        match (shown.get(i), shown.get(j)) {
            (Some(a), Some(b)) => {
                let d = (b.energy - a.energy).abs();
                if d > 0.0 {
                    d
                } else {
                    f64::INFINITY
                }
            }
            _ => f64::INFINITY,
        }
    };
    (0..shown.len())
        .map(|i| {
            let near = gap(i, i + 1).min(if i > 0 { gap(i - 1, i) } else { f64::INFINITY });
            let spacing = if near.is_finite() {
                near
            } else {
                let d = shown[i].energy - v_min;
                if d > 0.0 {
                    d
                } else {
                    1.0
                }
            };
            fraction * spacing
        })
        .collect()
}

/// The curve drawn for a level: energy plus scaled psi or density.
fn curve(fig: &StatesFigure, l: &StateLevel, a: f64) -> Vec<Pt> {
    let vals: Vec<f64> = if fig.density {
        l.psi.iter().map(|p| p * p).collect()
    } else {
        l.psi.clone()
    };
    let m = vals.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
    let k = if m > 0.0 {
        if fig.density {
            2.0 * a / m
        } else {
            a / m
        }
    } else {
        0.0
    };
    fig.x
        .iter()
        .zip(vals)
        .map(|(&x, v)| (x, l.energy + k * v))
        .collect()
}

/// Draws the figure on `root`.
pub(super) fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    fig: &StatesFigure,
    style: &Style,
    px: &Px,
) -> Result<(), PlotError> {
    let shown = fig.shown(style)?;
    let (x0, x1) = axis_range("x grid", style.x_window, &fig.x, 0.0)?;
    let v_in: Vec<f64> = fig
        .x
        .iter()
        .zip(&fig.potential)
        .filter(|(x, _)| **x >= x0 && **x <= x1)
        .map(|(_, v)| *v)
        .collect();
    let (v_min, _) = extent(v_in.iter().copied()).unwrap_or((0.0, 0.0));
    let amps = amplitudes(&shown, v_min, style.amplitude);
    let (y0, y1) = match style.energy_window {
        Some(w) => w,
        None => {
            let (a_lo, a_hi) = (amps[0], amps[amps.len() - 1]);
            let lo = shown.first().map_or(0.0, |l| l.energy);
            let hi = shown.last().map_or(0.0, |l| l.energy);
            let top = if fig.density {
                hi + 2.0 * a_hi
            } else {
                hi + a_hi
            };
            pad((v_min.min(lo - a_lo), top.max(hi + a_hi)), 0.06)
        }
    };
    let (x0, x1) = usable("x", (x0, x1))?;
    let (y0, y1) = usable("energy", (y0, y1))?;
    let b = bounds_of((x0, x1), (y0, y1));

    let (_, bottom) = label_areas(px);
    let left = y_area(root, px, style, (y0, y1), y_ticks(px.h, px));
    let m = (px.font * 0.9) as u32;
    let right = (px.font * 6.0) as u32;
    let mut chart = ChartBuilder::on(root)
        .margin_top(m)
        .margin_left(m)
        .margin_bottom(m)
        .margin_right(right)
        .x_label_area_size(bottom)
        .y_label_area_size(left)
        .build_cartesian_2d(x0..x1, y0..y1)
        .map_err(draw_err)?;
    frame(
        &mut chart,
        px,
        style,
        &titled("position x", &fig.x_unit),
        &titled("energy E", &fig.energy_unit),
        true,
    )?;

    // Potential, and the walls rising from its ends.
    let pot: Vec<Pt> = fig.x.iter().copied().zip(fig.potential.clone()).collect();
    let heavy = style.ink.rgb().stroke_width(px.heavy);
    polyline(&mut chart, &pot, &b, heavy)?;
    if let Some((wa, wb)) = fig.walls {
        let first = pot.first().map_or(y0, |p| p.1);
        let last = pot.last().map_or(y0, |p| p.1);
        for (x, v) in [(wa, first), (wb, last)] {
            polyline(&mut chart, &[(x, v.max(y0)), (x, y1)], &b, heavy)?;
        }
    }

    let level_style = LEVEL_INK.rgb().stroke_width(px.line);
    let mut labels: Vec<(i32, String, u8, RGBColor)> = Vec::new();
    for (i, l) in shown.iter().enumerate() {
        let colour = style.series(i).rgb();
        // Level line across its allowed intervals.
        let spans: Vec<(f64, f64)> = if l.allowed.is_empty() {
            vec![(x0, x1)]
        } else {
            l.allowed.clone()
        };
        for (sa, sb) in spans {
            let (sa, sb) = (sa.max(x0), sb.min(x1));
            if sa >= sb || l.energy < y0 || l.energy > y1 {
                continue;
            }
            if l.occupation > 0 {
                polyline(
                    &mut chart,
                    &[(sa, l.energy), (sb, l.energy)],
                    &b,
                    level_style,
                )?;
            } else {
                let span = x1 - x0;
                for d in dashes(sa, sb, l.energy, 0.012 * span, 0.008 * span) {
                    polyline(&mut chart, &d, &b, level_style)?;
                }
            }
        }
        // Wavefunction or density.
        polyline(
            &mut chart,
            &curve(fig, l, amps[i]),
            &b,
            colour.stroke_width(px.line),
        )?;
        if b.contains((x1, l.energy)) {
            let (_, py) = chart.backend_coord(&(x1, l.energy));
            labels.push((py, format!("n = {}", l.n), l.occupation, colour));
        }
    }
    side_labels(root, &chart, px, style, labels)
}

/// Writes the level names and electron dots in the right margin, pushed
/// apart vertically so they never overlap.
fn side_labels<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    chart: &Linear<'_, DB>,
    px: &Px,
    style: &Style,
    mut labels: Vec<(i32, String, u8, RGBColor)>,
) -> Result<(), PlotError> {
    let b = chart.plotting_area().get_pixel_range();
    let x_text = b.0.end + (px.font * 0.5) as i32;
    let gap = (px.font * 1.15).ceil() as i32;
    // Bottom to top: each label at least `gap` above the previous one.
    labels.sort_by_key(|l| -l.0);
    let mut last: Option<i32> = None;
    for l in labels.iter_mut() {
        if let Some(p) = last {
            l.0 = l.0.min(p - gap);
        }
        last = Some(l.0);
    }
    let font = text(px, style, 0.9);
    let r = px.pt(2.4);
    for (py, s, occ, colour) in labels {
        let st = font
            .clone()
            .color(&colour)
            .pos(Pos::new(HPos::Left, VPos::Center));
        root.draw(&Text::new(s.clone(), (x_text, py), st))
            .map_err(draw_err)?;
        let w = root
            .estimate_text_size(&s, &font)
            .map(|(w, _)| w as i32)
            .unwrap_or((px.font * 3.0) as i32);
        for k in 0..occ {
            let cx = x_text + w + (px.font * 0.5) as i32 + i32::from(k) * 3 * r;
            root.draw(&Circle::new((cx, py), r, style.ink.rgb().filled()))
                .map_err(draw_err)?;
        }
    }
    Ok(())
}

/// A small synthetic figure for tests.
#[cfg(test)]
pub(super) fn sample() -> StatesFigure {
    // Infinite square well of width L = 10 on [0, 10]: psi_n = sin(n pi x /
    // L), E_n proportional to n^2 (Griffiths 2.2); walls drawn at 5 units.
    let nx = 201;
    let x: Vec<f64> = (0..nx)
        .map(|i| -1.0 + 12.0 * i as f64 / (nx - 1) as f64)
        .collect();
    let potential: Vec<f64> = x
        .iter()
        .map(|&x| if (0.0..=10.0).contains(&x) { 0.0 } else { 5.0 })
        .collect();
    let levels = (1..=4)
        .map(|n| StateLevel {
            n,
            energy: 0.2 * (n * n) as f64,
            psi: x
                .iter()
                .map(|&x| {
                    if (0.0..=10.0).contains(&x) {
                        (n as f64 * std::f64::consts::PI * x / 10.0).sin()
                    } else {
                        0.0
                    }
                })
                .collect(),
            allowed: vec![(0.0, 10.0)],
            occupation: if n <= 2 { 2 } else { 0 },
        })
        .collect();
    StatesFigure::new(x, potential, levels)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    #[test]
    fn amplitude_is_fraction_of_the_nearer_spacing() {
        // Levels 0.2, 0.8, 1.8, 3.2: spacings 0.6, 1.0, 1.4 (closed form).
        let f = sample();
        let shown: Vec<&StateLevel> = f.levels.iter().collect();
        let a = amplitudes(&shown, 0.0, WAVE_FRACTION);
        for (got, want) in a.iter().zip([0.6, 0.6, 1.0, 1.4]) {
            assert_abs_diff_eq!(*got, 0.4 * want, epsilon = 1e-12);
        }
        let one = amplitudes(&shown[..1], 0.0, WAVE_FRACTION);
        assert_abs_diff_eq!(one[0], 0.4 * 0.2, epsilon = 1e-12);
        assert_abs_diff_eq!(amplitudes(&shown, 0.0, 1.0)[3], 1.4, epsilon = 1e-12);
    }

    #[test]
    fn neighbouring_curves_do_not_meet() {
        let f = sample();
        let shown: Vec<&StateLevel> = f.levels.iter().collect();
        let a = amplitudes(&shown, 0.0, WAVE_FRACTION);
        for k in 0..3 {
            let c1 = curve(&f, shown[k], a[k]);
            let c2 = curve(&f, shown[k + 1], a[k + 1]);
            let top1 = c1.iter().fold(f64::MIN, |m, p| m.max(p.1));
            let bot2 = c2.iter().fold(f64::MAX, |m, p| m.min(p.1));
            assert!(top1 < bot2, "{k}: {top1} >= {bot2}");
        }
    }

    #[test]
    fn selection_and_window() {
        let f = sample();
        let st = Style {
            levels: Some(vec![2, 4, 9]),
            ..Style::default()
        };
        let n: Vec<usize> = f.shown(&st).unwrap().iter().map(|l| l.n).collect();
        assert_eq!(n, [2, 4]);
        let st = Style {
            energy_window: Some((10.0, 20.0)),
            ..Style::default()
        };
        assert!(matches!(f.validate(&st), Err(PlotError::NoDataInWindow(_))));
        let st = Style {
            levels: Some(vec![7]),
            ..Style::default()
        };
        assert!(f.validate(&st).is_err());
    }

    #[test]
    fn bad_data_is_error() {
        let mut f = sample();
        f.levels[1].psi[3] = f64::NAN;
        assert!(matches!(
            f.validate(&Style::default()),
            Err(PlotError::NotFinite { index: 3, .. })
        ));
        let mut f = sample();
        f.potential.pop();
        assert!(matches!(
            f.validate(&Style::default()),
            Err(PlotError::Length { .. })
        ));
        let mut f = sample();
        f.levels[0].occupation = 3;
        assert!(f.validate(&Style::default()).is_err());
        let f = StatesFigure::new(vec![], vec![], vec![]);
        assert!(matches!(
            f.validate(&Style::default()),
            Err(PlotError::Empty(_))
        ));
    }
}

#[cfg(test)]
mod render_tests {
    use super::*;
    use crate::plot::testkit::{distinct_rows, render_both};
    use crate::plot::{Figure, Size};

    #[test]
    fn renders_four_levels() {
        let fig = Figure::States(sample());
        let svg = render_both(&fig, &Style::default(), "states");
        // Four levels, each one row of level-ink lines (two dashed).
        assert_eq!(distinct_rows(&svg, &LEVEL_INK.hex()), 4);
    }

    #[test]
    fn renders_selection_in_centimetres_with_density() {
        let mut f = sample();
        f.density = true;
        let style = Style {
            size: Size::Centimetres {
                w: 12.0,
                h: 9.0,
                dpi: 200.0,
            },
            levels: Some(vec![1, 3]),
            x_window: Some((-0.5, 10.5)),
            ..Style::default()
        };
        let svg = render_both(&Figure::States(f), &style, "states_density");
        assert_eq!(distinct_rows(&svg, &LEVEL_INK.hex()), 2);
    }
}
