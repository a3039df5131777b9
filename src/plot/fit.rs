//! Fit figure: observed values (with optional one-standard-uncertainty
//! error bars) against a fitted model, and below it a smaller panel of the
//! residuals on the same x axis, the usual way to judge a least-squares
//! fit (P. R. Bevington and D. K. Robinson, Data Reduction and Error
//! Analysis for the Physical Sciences, 3rd ed., Ch. 6 and 11). The
//! residual is `model_i - observed_i`, the sign of `rows[].residual` in
//! the fit document and its table.
//!
//! The model is drawn as a continuous curve through its values evaluated
//! over the whole range ([`FitFigure::curve`]), or, without them, as a line
//! through its values at the observed x. A key above the upper panel
//! names the observed points and the model line. The residual panel takes
//! [`RESIDUAL_SHARE`] of the height.

use super::axes::{
    axis_range, bounds_of, check, check_finite, check_len, dashes, draw_err, extent, frame,
    label_areas, legend, pad, polyline, titled, usable, y_area, y_ticks, Bounds, Linear, Pt,
    Swatch,
};
use super::style::{Px, Rgb};
use super::{PlotError, Style};
use plotters::coord::Shift;
use plotters::prelude::*;

/// Fraction of the figure height given to the residual panel (0.3).
pub const RESIDUAL_SHARE: f64 = 0.3;

/// Colour of the zero line in the residual panel.
const ZERO_INK: Rgb = Rgb(0x88, 0x88, 0x88);

/// Observed values against a model.
#[derive(Debug, Clone, PartialEq)]
pub struct FitFigure {
    /// Independent variable, in `x_unit`.
    pub x: Vec<f64>,
    /// Observed values, in `y_unit`.
    pub observed: Vec<f64>,
    /// Standard uncertainties of the observed values (>= 0), if known.
    pub uncertainty: Option<Vec<f64>>,
    /// Model values at `x`, in `y_unit`.
    pub model: Vec<f64>,
    /// The model evaluated between the data as well, `(x, model)` in any
    /// order; empty draws the model through `model` at `x` only.
    pub curve: Vec<(f64, f64)>,
    /// Name of x for the axis title.
    pub x_name: String,
    /// Unit of x (may be empty).
    pub x_unit: String,
    /// Name of y for the axis title.
    pub y_name: String,
    /// Unit of y (may be empty).
    pub y_unit: String,
}

impl FitFigure {
    /// Checks lengths, finiteness and non-negative uncertainties.
    pub(super) fn validate(&self) -> Result<(), PlotError> {
        check("fit x", &self.x)?;
        check_len("observed", self.x.len(), self.observed.len())?;
        check_finite("observed", &self.observed)?;
        check_len("model", self.x.len(), self.model.len())?;
        check_finite("model", &self.model)?;
        let (cx, cy): (Vec<f64>, Vec<f64>) = self.curve.iter().copied().unzip();
        check_finite("model curve x", &cx)?;
        check_finite("model curve", &cy)?;
        if let Some(u) = &self.uncertainty {
            check_len("uncertainty", self.x.len(), u.len())?;
            check_finite("uncertainty", u)?;
            if let Some(i) = u.iter().position(|s| *s < 0.0) {
                return Err(PlotError::Invalid(format!(
                    "uncertainty {i} is negative ({})",
                    u[i]
                )));
            }
        }
        Ok(())
    }

    fn sigma(&self, i: usize) -> f64 {
        self.uncertainty
            .as_ref()
            .and_then(|u| u.get(i).copied())
            .unwrap_or(0.0)
    }
}

/// An error bar with end caps as one path, clipped to the box.
fn bar<DB: DrawingBackend>(
    chart: &mut Linear<'_, DB>,
    (x, y, s): (f64, f64, f64),
    cap: f64,
    b: &Bounds,
    st: ShapeStyle,
) -> Result<(), PlotError> {
    if s <= 0.0 || !b.has_x(x) {
        return Ok(());
    }
    let (lo, hi) = (y - s, y + s);
    let path = [
        (x - cap, lo),
        (x + cap, lo),
        (x, lo),
        (x, hi),
        (x - cap, hi),
        (x + cap, hi),
    ];
    polyline(chart, &path, b, st)
}

/// Draws the figure on `root`.
pub(super) fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    fig: &FitFigure,
    style: &Style,
    px: &Px,
) -> Result<(), PlotError> {
    let (x0, x1) = axis_range("fit x", style.x_window, &fig.x, 0.04)?;
    let idx: Vec<usize> = (0..fig.x.len())
        .filter(|&i| fig.x[i] >= x0 && fig.x[i] <= x1)
        .collect();
    let span = |f: &dyn Fn(usize) -> (f64, f64)| {
        extent(idx.iter().flat_map(|&i| {
            let (a, c) = f(i);
            [a, c]
        }))
        .map(|e| pad(e, 0.06))
        .unwrap_or((-1.0, 1.0))
    };
    let top = span(&|i| {
        let s = fig.sigma(i);
        let lo = (fig.observed[i] - s).min(fig.model[i]);
        let hi = (fig.observed[i] + s).max(fig.model[i]);
        (lo, hi)
    });
    // The curve between the data may reach beyond the points.
    let top = match extent(
        fig.curve
            .iter()
            .filter(|(x, _)| *x >= x0 && *x <= x1)
            .map(|(_, y)| *y),
    ) {
        Some((lo, hi)) if !idx.is_empty() => {
            let (a, b) = (top.0.min(lo), top.1.max(hi));
            if a < top.0 || b > top.1 {
                pad((a, b), 0.04)
            } else {
                top
            }
        }
        _ => top,
    };
    let res = span(&|i| {
        let r = fig.model[i] - fig.observed[i];
        let s = fig.sigma(i);
        (r - s, r + s)
    });
    // Symmetric residual range about zero.
    let rmax = res.0.abs().max(res.1.abs());
    let res = (-rmax, rmax);

    let (x0, x1) = usable("x", (x0, x1))?;
    let top = usable("y", top)?;
    let res = usable("residual", res)?;
    let split = (f64::from(px.h) * (1.0 - RESIDUAL_SHARE)) as i32;
    let (upper, lower) = root.split_vertically(split);
    let (_, bottom) = label_areas(px);
    let m = (px.font * 0.9) as u32;
    let ny_top = y_ticks((f64::from(px.h) * 0.55) as u32, px);
    let ny_low = y_ticks((f64::from(px.h) * 0.2) as u32, px).max(3);
    let left = y_area(root, px, style, top, ny_top).max(y_area(root, px, style, res, ny_low));
    let point = style.series(0).rgb();
    let r = px.pt(2.6);
    let cap = 0.006 * (x1 - x0);

    // Upper panel, with room above it for the key.
    let mut chart = ChartBuilder::on(&upper)
        .margin_top((px.font * 1.8) as u32)
        .margin_left(m)
        .margin_right(m)
        .x_label_area_size(px.pt(4.0))
        .y_label_area_size(left)
        .build_cartesian_2d(x0..x1, top.0..top.1)
        .map_err(draw_err)?;
    frame(
        &mut chart,
        px,
        style,
        "",
        &titled(&fig.y_name, &fig.y_unit),
        false,
    )?;
    let b = bounds_of((x0, x1), top);
    let mut model: Vec<Pt> = if fig.curve.len() >= 2 {
        fig.curve.clone()
    } else {
        fig.x.iter().copied().zip(fig.model.clone()).collect()
    };
    model.sort_by(|a, c| a.0.total_cmp(&c.0));
    polyline(
        &mut chart,
        &model,
        &b,
        style.series(1).rgb().stroke_width(px.line),
    )?;
    for &i in &idx {
        let p = (fig.x[i], fig.observed[i], fig.sigma(i));
        bar(&mut chart, p, cap, &b, point.stroke_width(px.thin))?;
    }
    chart
        .draw_series(
            idx.iter()
                .map(|&i| (fig.x[i], fig.observed[i]))
                .filter(|p| b.contains(*p))
                .map(|p| Circle::new(p, r, point.filled())),
        )
        .map_err(draw_err)?;
    key(&upper, &chart, style, px, r)?;

    // Residual panel.
    let mut chart = ChartBuilder::on(&lower)
        .margin_left(m)
        .margin_right(m)
        .margin_bottom(m)
        .margin_top(px.pt(4.0))
        .x_label_area_size(bottom)
        .y_label_area_size(left)
        .build_cartesian_2d(x0..x1, res.0..res.1)
        .map_err(draw_err)?;
    frame(
        &mut chart,
        px,
        style,
        &titled(&fig.x_name, &fig.x_unit),
        &titled("model − obs.", &fig.y_unit),
        true,
    )?;
    let b = bounds_of((x0, x1), res);
    let zero = ZERO_INK.rgb().stroke_width(px.thin);
    let w = x1 - x0;
    for d in dashes(x0, x1, 0.0, 0.01 * w, 0.008 * w) {
        polyline(&mut chart, &d, &b, zero)?;
    }
    for &i in &idx {
        let p = (fig.x[i], fig.model[i] - fig.observed[i], fig.sigma(i));
        bar(&mut chart, p, cap, &b, point.stroke_width(px.thin))?;
    }
    chart
        .draw_series(
            idx.iter()
                .map(|&i| (fig.x[i], fig.model[i] - fig.observed[i]))
                .filter(|p| b.contains(*p))
                .map(|p| Circle::new(p, r, point.filled())),
        )
        .map_err(draw_err)?;
    Ok(())
}

/// The key above the upper panel's top right corner: a point for the
/// observed values, a line for the model.
fn key<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    chart: &Linear<'_, DB>,
    style: &Style,
    px: &Px,
    r: i32,
) -> Result<(), PlotError> {
    let (xs, ys) = chart.plotting_area().get_pixel_range();
    let (ax, ay) = area.get_base_pixel();
    let y = ys.start - ay - (px.font * 0.8) as i32;
    legend(
        area,
        px,
        style,
        (xs.end - ax, y),
        &[
            (Swatch::Dot(style.series(0).rgb(), r), "observed"),
            (Swatch::Line(style.series(1).rgb(), px.line), "model"),
        ],
    )
}

#[cfg(test)]
pub(super) fn sample() -> FitFigure {
    // Model E = a + b / N with small fixed deviations (synthetic).
    let x: Vec<f64> = (2..=9).map(|n| n as f64).collect();
    let model: Vec<f64> = x.iter().map(|n| 1.5 + 6.0 / n).collect();
    let dev = [0.05, -0.08, 0.03, 0.0, -0.04, 0.06, -0.02, 0.01];
    let observed = model.iter().zip(dev).map(|(m, d)| m + d).collect();
    FitFigure {
        x,
        observed,
        uncertainty: Some(vec![0.05; 8]),
        model,
        curve: (0..=70)
            .map(|i| 2.0 + 0.1 * f64::from(i))
            .map(|n| (n, 1.5 + 6.0 / n))
            .collect(),
        x_name: "chain length N".into(),
        x_unit: String::new(),
        y_name: "gap".into(),
        y_unit: "eV".into(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plot::testkit::{count, render_both, stroked};
    use crate::plot::Figure;

    #[test]
    fn renders_points_bars_and_residuals() {
        let style = Style::default();
        let svg = render_both(&Figure::Fit(sample()), &style, "fit");
        let c = style.series(0).hex();
        // 8 observed + 8 residual points, one in the key.
        assert_eq!(count(&svg, "circle", "fill", &c), 17);
        // 8 error bars in each panel.
        assert_eq!(stroked(&svg, &c).len(), 16);
        // One model curve and its sample in the key.
        assert_eq!(stroked(&svg, &style.series(1).hex()).len(), 2);
    }

    #[test]
    fn without_uncertainty_and_windowed() {
        let mut f = sample();
        f.uncertainty = None;
        let style = Style {
            x_window: Some((3.5, 9.5)),
            ..Style::default()
        };
        let svg = render_both(&Figure::Fit(f), &style, "fit_window");
        // N = 4..9 inside: 6 points per panel and the key's, no bars.
        assert_eq!(count(&svg, "circle", "fill", &style.series(0).hex()), 13);
        assert_eq!(stroked(&svg, &style.series(0).hex()).len(), 0);
    }

    #[test]
    fn bad_input() {
        let mut f = sample();
        f.uncertainty = Some(vec![-1.0; 8]);
        assert!(f.validate().is_err());
        let mut f = sample();
        f.model.pop();
        assert!(matches!(f.validate(), Err(PlotError::Length { .. })));
        let mut f = sample();
        f.x.clear();
        assert!(matches!(f.validate(), Err(PlotError::Empty(_))));
    }
}
