//! Sweep figure: how levels (or one derived quantity) change as one input
//! parameter is varied.
//!
//! Levels mode draws, at each swept value, a short horizontal bar per
//! level (a level ladder) and joins level j of neighbouring cases by a thin
//! light line, so crossings and trends can be followed (a correlation
//! diagram in the sense of e.g. T. A. Albright, J. K. Burdett and M.-H.
//! Whangbo, Orbital Interactions in Chemistry, 2nd ed., Ch. 4). The highest
//! occupied and lowest unoccupied levels (HOMO, LUMO) are marked with a
//! filled circle and a filled triangle in the first two series colours.
//! Quantity mode draws one value per case (e.g. the gap or the
//! wavelength) as points joined by a line.

use super::axes::{
    axis_range, bounds_of, check, check_finite, check_len, draw_err, frame, label_areas, legend,
    polyline, square, titled, usable, y_area, y_ticks, Pt, Swatch,
};
use super::style::{Px, Rgb, LEVEL_INK};
use super::{PlotError, Style};
use plotters::coord::Shift;
use plotters::prelude::*;

/// Colour of the thin lines joining level j across cases.
const JOIN_INK: Rgb = Rgb(0xBB, 0xBB, 0xBB);

/// The levels of one case of a sweep.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepCase {
    /// Level energies in increasing order, in the figure's y unit.
    pub energies: Vec<f64>,
    /// Index into `energies` of the HOMO, if known.
    pub homo: Option<usize>,
    /// Index into `energies` of the LUMO, if known.
    pub lumo: Option<usize>,
}

/// What is plotted against the swept parameter.
#[derive(Debug, Clone, PartialEq)]
pub enum SweepData {
    /// One [`SweepCase`] per swept value.
    Levels(Vec<SweepCase>),
    /// One number per swept value.
    Quantity {
        /// Name for the axis title, e.g. "HOMO-LUMO gap" or "λ_max".
        name: String,
        /// One value per swept value, in the figure's y unit.
        values: Vec<f64>,
    },
}

/// A measured value to draw over a sweep: at `x`, value `y`, with one
/// standard uncertainty `sigma` (0 when unknown).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Measured {
    /// The swept value.
    pub x: f64,
    /// The measured value, in the figure's y unit.
    pub y: f64,
    /// Its standard uncertainty (0 when unknown).
    pub sigma: f64,
}

/// Levels or a quantity against a varied parameter.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepFigure {
    /// Name of the varied key, e.g. "box length" or "N".
    pub key: String,
    /// Unit of the key (may be empty).
    pub key_unit: String,
    /// Values of the key, one per case (any order).
    pub values: Vec<f64>,
    /// Levels or a single quantity per case.
    pub data: SweepData,
    /// Unit of the y axis, e.g. "eV" or "nm".
    pub y_unit: String,
    /// Measured values to draw over the computed ones (open squares), in
    /// the figure's units; may be empty.
    pub measured: Vec<Measured>,
}

impl SweepFigure {
    /// Checks lengths, finiteness and HOMO/LUMO indices.
    pub(super) fn validate(&self) -> Result<(), PlotError> {
        check("swept values", &self.values)?;
        for (i, m) in self.measured.iter().enumerate() {
            check_finite(&format!("measured point {}", i + 1), &[m.x, m.y, m.sigma])?;
            if m.sigma < 0.0 {
                return Err(PlotError::Invalid(format!(
                    "measured point {}: negative uncertainty {}",
                    i + 1,
                    m.sigma
                )));
            }
        }
        match &self.data {
            SweepData::Levels(cases) => {
                check_len("sweep cases", self.values.len(), cases.len())?;
                for (i, c) in cases.iter().enumerate() {
                    check_finite(&format!("case {i} energies"), &c.energies)?;
                    for (name, idx) in [("HOMO", c.homo), ("LUMO", c.lumo)] {
                        if let Some(k) = idx {
                            if k >= c.energies.len() {
                                return Err(PlotError::Invalid(format!(
                                    "case {i}: {name} index {k} beyond {} levels",
                                    c.energies.len()
                                )));
                            }
                        }
                    }
                }
                if cases.iter().all(|c| c.energies.is_empty()) {
                    return Err(PlotError::Empty("sweep levels".into()));
                }
                Ok(())
            }
            SweepData::Quantity { values, .. } => {
                check_len("sweep quantity", self.values.len(), values.len())?;
                check_finite("sweep quantity", values)
            }
        }
    }
}

/// Half width of a level bar: 0.3 of the smallest gap between distinct
/// swept values, or 5 % of |value| (0.5 if zero) for a single value.
fn half_width(values: &[f64]) -> f64 {
    let mut v = values.to_vec();
    v.sort_by(f64::total_cmp);
    let gap = v
        .windows(2)
        .map(|w| w[1] - w[0])
        .filter(|d| *d > 0.0)
        .fold(f64::INFINITY, f64::min);
    if gap.is_finite() {
        0.3 * gap
    } else {
        let a = v.first().map_or(0.0, |x| x.abs());
        if a > 0.0 {
            0.05 * a
        } else {
            0.5
        }
    }
}

/// Draws the figure on `root`.
pub(super) fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    fig: &SweepFigure,
    style: &Style,
    px: &Px,
) -> Result<(), PlotError> {
    let hw = half_width(&fig.values);
    let (ys, y_name, window) = match &fig.data {
        SweepData::Levels(cases) => (
            cases.iter().flat_map(|c| c.energies.clone()).collect(),
            "level energy".to_string(),
            style.energy_window,
        ),
        SweepData::Quantity { name, values } => (values.clone(), name.clone(), None),
    };
    let ys: Vec<f64> = ys
        .into_iter()
        .chain(
            fig.measured
                .iter()
                .filter(|m| style.x_window.is_none_or(|(a, b)| m.x >= a && m.x <= b))
                .flat_map(|m| [m.y - m.sigma, m.y + m.sigma]),
        )
        .collect();
    let xs: Vec<f64> = fig
        .values
        .iter()
        .copied()
        .chain(fig.measured.iter().map(|m| m.x))
        .collect();
    let (x0, x1) = match style.x_window {
        Some(w) => axis_range("swept values", Some(w), &fig.values, 0.0)?,
        None => {
            let (a, b) = axis_range("swept values", None, &xs, 0.0)?;
            let slack = hw + 0.04 * (b - a);
            (a - slack, b + slack)
        }
    };
    let (y0, y1) = axis_range(&y_name, window, &ys, 0.06)?;
    let (x0, x1) = usable("swept values", (x0, x1))?;
    let (y0, y1) = usable(&y_name, (y0, y1))?;
    let b = bounds_of((x0, x1), (y0, y1));

    let (_, bottom) = label_areas(px);
    let m = (px.font * 0.9) as u32;
    let mut chart = ChartBuilder::on(root)
        .margin(m)
        .margin_top((px.font * 1.8) as u32)
        .x_label_area_size(bottom)
        .y_label_area_size(y_area(root, px, style, (y0, y1), y_ticks(px.h, px)))
        .build_cartesian_2d(x0..x1, y0..y1)
        .map_err(draw_err)?;
    frame(
        &mut chart,
        px,
        style,
        &titled(&fig.key, &fig.key_unit),
        &titled(&y_name, &fig.y_unit),
        true,
    )?;

    let (xs_px, ys_px) = chart.plotting_area().get_pixel_range();
    let key_at = (xs_px.end, ys_px.start - (px.font * 0.8) as i32);
    let sq = px.pt(3.0);
    let measured_swatch = (Swatch::Square(style.ink.rgb(), sq, px.thin), "measured");
    draw_measured(root, &mut chart, fig, &b, style, px, sq)?;
    match &fig.data {
        SweepData::Quantity { values, .. } => {
            let colour = style.series(0).rgb();
            let mut pts: Vec<Pt> = fig.values.iter().copied().zip(values.clone()).collect();
            pts.sort_by(|a, c| a.0.total_cmp(&c.0));
            polyline(&mut chart, &pts, &b, colour.stroke_width(px.line))?;
            let r = px.pt(2.6);
            chart
                .draw_series(
                    pts.into_iter()
                        .filter(|p| b.contains(*p))
                        .map(|p| Circle::new(p, r, colour.filled())),
                )
                .map_err(draw_err)?;
            if !fig.measured.is_empty() {
                legend(
                    root,
                    px,
                    style,
                    key_at,
                    &[(Swatch::Dot(colour, r), "computed"), measured_swatch],
                )?;
            }
        }
        SweepData::Levels(cases) => {
            let mut order: Vec<usize> = (0..cases.len()).collect();
            order.sort_by(|&i, &j| fig.values[i].total_cmp(&fig.values[j]));
            let join = JOIN_INK.rgb().stroke_width(px.thin);
            for w in order.windows(2) {
                let (a, c) = (&cases[w[0]], &cases[w[1]]);
                let (xa, xc) = (fig.values[w[0]] + hw, fig.values[w[1]] - hw);
                for (ea, ec) in a.energies.iter().zip(&c.energies) {
                    polyline(&mut chart, &[(xa, *ea), (xc, *ec)], &b, join)?;
                }
            }
            let bar = LEVEL_INK.rgb().stroke_width(px.line);
            for (i, c) in cases.iter().enumerate() {
                let x = fig.values[i];
                for e in &c.energies {
                    polyline(&mut chart, &[(x - hw, *e), (x + hw, *e)], &b, bar)?;
                }
            }
            let extra = (!fig.measured.is_empty()).then_some(measured_swatch);
            marks(root, &mut chart, fig, cases, &b, style, px, key_at, extra)?;
        }
    }
    Ok(())
}

/// HOMO and LUMO markers, with a key above the plot's top right corner.
#[allow(clippy::too_many_arguments)]
fn marks<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    chart: &mut super::axes::Linear<'_, DB>,
    fig: &SweepFigure,
    cases: &[SweepCase],
    b: &super::axes::Bounds,
    style: &Style,
    px: &Px,
    key_at: (i32, i32),
    extra: Option<(Swatch, &str)>,
) -> Result<(), PlotError> {
    let r = px.pt(3.2);
    let (hc, lc) = (style.series(0).rgb(), style.series(1).rgb());
    let pick = |f: fn(&SweepCase) -> Option<usize>| -> Vec<Pt> {
        cases
            .iter()
            .zip(&fig.values)
            .filter_map(|(c, x)| f(c).and_then(|k| c.energies.get(k)).map(|e| (*x, *e)))
            .filter(|p| b.contains(*p))
            .collect()
    };
    let homo = pick(|c| c.homo);
    let lumo = pick(|c| c.lumo);
    let has = (!homo.is_empty(), !lumo.is_empty());
    chart
        .draw_series(homo.into_iter().map(|p| Circle::new(p, r, hc.filled())))
        .map_err(draw_err)?;
    chart
        .draw_series(
            lumo.into_iter()
                .map(|p| TriangleMarker::new(p, r + 1, lc.filled())),
        )
        .map_err(draw_err)?;

    // Key, right-aligned above the frame.
    let mut entries = Vec::new();
    if has.0 {
        entries.push((Swatch::Dot(hc, r), "HOMO"));
    }
    if has.1 {
        entries.push((Swatch::Triangle(lc, r), "LUMO"));
    }
    entries.extend(extra);
    legend(root, px, style, key_at, &entries)
}

/// The measured points: open squares in the ink colour with their error
/// bars, clipped to the plot.
fn draw_measured<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    chart: &mut super::axes::Linear<'_, DB>,
    fig: &SweepFigure,
    b: &super::axes::Bounds,
    style: &Style,
    px: &Px,
    half: i32,
) -> Result<(), PlotError> {
    let ink = style.ink.rgb();
    for m in &fig.measured {
        if m.sigma > 0.0 {
            polyline(
                chart,
                &[(m.x, m.y - m.sigma), (m.x, m.y + m.sigma)],
                b,
                ink.stroke_width(px.thin),
            )?;
        }
        if b.contains((m.x, m.y)) {
            let c = chart.backend_coord(&(m.x, m.y));
            root.draw(&square(c, half, ink, px.thin))
                .map_err(draw_err)?;
        }
    }
    Ok(())
}

#[cfg(test)]
pub(super) fn sample() -> SweepFigure {
    // Box levels E_n = c n^2 / L^2 (Griffiths 2.27) for L = 6..14, c = 37.6
    // eV A^2 (hbar^2 pi^2 / 2 m_e, from memory), 4 electrons: HOMO n = 2.
    let values: Vec<f64> = vec![6.0, 8.0, 10.0, 12.0, 14.0];
    let cases = values
        .iter()
        .map(|l| SweepCase {
            energies: (1..=4).map(|n| 37.6 * (n * n) as f64 / (l * l)).collect(),
            homo: Some(1),
            lumo: Some(2),
        })
        .collect();
    SweepFigure {
        key: "box length".into(),
        key_unit: "Å".into(),
        values,
        data: SweepData::Levels(cases),
        y_unit: "eV".into(),
        measured: Vec::new(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plot::testkit::{count, render_both, stroked};
    use crate::plot::Figure;
    use approx::assert_abs_diff_eq;

    #[test]
    fn bar_width() {
        // 0.3 of the smallest spacing 2 (closed form).
        assert_abs_diff_eq!(half_width(&[6.0, 10.0, 8.0]), 0.6, epsilon = 1e-12);
        assert_abs_diff_eq!(half_width(&[4.0]), 0.2, epsilon = 1e-12);
    }

    #[test]
    fn renders_levels_with_homo_lumo() {
        let style = Style::default();
        let svg = render_both(&Figure::Sweep(sample()), &style, "sweep_levels");
        // 5 cases x 4 levels, all inside the fitted window.
        assert_eq!(stroked(&svg, &LEVEL_INK.hex()).len(), 20);
        // 4 joins between neighbouring cases x 4 levels.
        assert_eq!(stroked(&svg, &JOIN_INK.hex()).len(), 16);
        // 5 HOMO circles plus one in the key.
        assert_eq!(count(&svg, "circle", "fill", &style.series(0).hex()), 6);
    }

    #[test]
    fn window_cuts_levels() {
        // Levels above 3 eV (closed form with c above): L=6: n=2,3,4
        // (4.18, 9.4, 16.7); L=8: n=3,4; L=10: n=3,4; L=12: n=4 (4.18);
        // L=14: n=4 (3.07). 9 of 20 bars hidden.
        let style = Style {
            energy_window: Some((0.0, 3.0)),
            ..Style::default()
        };
        let svg = render_both(&Figure::Sweep(sample()), &style, "sweep_window");
        assert_eq!(stroked(&svg, &LEVEL_INK.hex()).len(), 11);
    }

    #[test]
    fn renders_quantity() {
        let mut f = sample();
        f.data = SweepData::Quantity {
            name: "HOMO-LUMO gap".into(),
            values: f.values.iter().map(|l| 37.6 * 5.0 / (l * l)).collect(),
        };
        let style = Style::default();
        let svg = render_both(&Figure::Sweep(f), &style, "sweep_gap");
        assert_eq!(count(&svg, "circle", "fill", &style.series(0).hex()), 5);
    }

    #[test]
    fn bad_input() {
        let mut f = sample();
        if let SweepData::Levels(c) = &mut f.data {
            c[0].homo = Some(9);
        }
        assert!(f.validate().is_err());
        let mut f = sample();
        f.values.push(3.0);
        assert!(matches!(f.validate(), Err(PlotError::Length { .. })));
        let mut f = sample();
        f.values[2] = f64::NAN;
        assert!(f.validate().is_err());
    }
}
