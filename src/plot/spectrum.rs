//! Spectrum figure: molar absorptivity epsilon against wavelength, with the
//! underlying transitions as vertical sticks whose heights are oscillator
//! strengths f, read on a right-hand axis of their own (0 to 1.08 f_max).
//!
//! The relation between f and the integrated band is given e.g. in
//! P. Atkins and J. de Paula, Physical Chemistry, 8th ed., Sect. 13.2; the
//! figure only draws the numbers it is given.

use super::axes::{
    axis_range, bounds_of, check, check_finite, check_len, draw_err, extent, frame, label_areas,
    nice, polyline, text, titled, usable, y_area, y_ticks, Pt,
};
use super::style::Px;
use super::{PlotError, Style};
use plotters::coord::Shift;
use plotters::prelude::*;
use std::ops::DerefMut;

/// One transition drawn as a stick.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stick {
    /// Transition wavelength in the figure's wavelength unit.
    pub wavelength: f64,
    /// Oscillator strength (dimensionless, >= 0).
    pub strength: f64,
}

/// An absorption spectrum with transition sticks.
#[derive(Debug, Clone, PartialEq)]
pub struct SpectrumFigure {
    /// Wavelength grid (any order), in `wavelength_unit`.
    pub wavelength: Vec<f64>,
    /// Molar absorptivity on the grid, in `epsilon_unit`.
    pub epsilon: Vec<f64>,
    /// Transitions; may be empty.
    pub sticks: Vec<Stick>,
    /// Wavelength unit, default "nm".
    pub wavelength_unit: String,
    /// Absorptivity unit, default "L mol⁻¹ cm⁻¹".
    pub epsilon_unit: String,
}

impl SpectrumFigure {
    /// A figure with units "nm" and "L mol⁻¹ cm⁻¹".
    pub fn new(wavelength: Vec<f64>, epsilon: Vec<f64>, sticks: Vec<Stick>) -> Self {
        SpectrumFigure {
            wavelength,
            epsilon,
            sticks,
            wavelength_unit: "nm".into(),
            epsilon_unit: "L mol⁻¹ cm⁻¹".into(),
        }
    }

    /// Checks lengths, finiteness and non-negative strengths.
    pub(super) fn validate(&self) -> Result<(), PlotError> {
        check("wavelength grid", &self.wavelength)?;
        check_len("epsilon", self.wavelength.len(), self.epsilon.len())?;
        check_finite("epsilon", &self.epsilon)?;
        for (i, s) in self.sticks.iter().enumerate() {
            if !(s.wavelength.is_finite() && s.strength.is_finite()) {
                return Err(PlotError::NotFinite {
                    what: "sticks".into(),
                    index: i,
                });
            }
            if s.strength < 0.0 {
                return Err(PlotError::Invalid(format!(
                    "stick {i}: negative oscillator strength {}",
                    s.strength
                )));
            }
        }
        Ok(())
    }
}

/// Draws the figure on `root`.
pub(super) fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    fig: &SpectrumFigure,
    style: &Style,
    px: &Px,
) -> Result<(), PlotError> {
    let mut xs = fig.wavelength.clone();
    xs.extend(fig.sticks.iter().map(|s| s.wavelength));
    let (x0, x1) = axis_range("wavelength", style.x_window, &xs, 0.0)?;
    let inside = |x: f64| x >= x0 && x <= x1;

    let eps_max = extent(
        fig.wavelength
            .iter()
            .zip(&fig.epsilon)
            .filter(|(w, _)| inside(**w))
            .map(|(_, e)| *e),
    )
    .map_or(0.0, |e| e.1);
    let eps_min = extent(fig.epsilon.iter().copied()).map_or(0.0, |e| e.0);
    let y0 = eps_min.min(0.0);
    let y1 = if eps_max > y0 {
        eps_max * 1.08
    } else {
        y0 + 1.0
    };
    let f_max = fig
        .sticks
        .iter()
        .filter(|s| inside(s.wavelength))
        .fold(0.0_f64, |m, s| m.max(s.strength));
    let f1 = if f_max > 0.0 { f_max * 1.08 } else { 1.0 };

    let (x0, x1) = usable("wavelength", (x0, x1))?;
    let (y0, y1) = usable("epsilon", (y0, y1))?;
    let f1 = usable("oscillator strength", (0.0, f1))?.1;
    let (_, bottom) = label_areas(px);
    let m = (px.font * 0.9) as u32;
    let ny = y_ticks((f64::from(px.h) * 0.8) as u32, px);
    let mut chart = ChartBuilder::on(root)
        .margin(m)
        .x_label_area_size(bottom)
        .y_label_area_size(y_area(root, px, style, (y0, y1), ny))
        .right_y_label_area_size(y_area(root, px, style, (0.0, f1), ny))
        .build_cartesian_2d(x0..x1, y0..y1)
        .map_err(draw_err)?
        .set_secondary_coord(x0..x1, 0.0..f1);
    frame(
        chart.deref_mut(),
        px,
        style,
        &titled("wavelength", &fig.wavelength_unit),
        &titled("ε", &fig.epsilon_unit),
        true,
    )?;
    let stick_colour = style.series(1).rgb();
    chart
        .configure_secondary_axes()
        .set_all_tick_mark_size(px.pt(3.0))
        .axis_style(style.ink.rgb().stroke_width(px.thin))
        .label_style(text(px, style, 1.0))
        .axis_desc_style(text(px, style, 1.0).color(&stick_colour))
        .y_labels(ny)
        .y_label_formatter(&|v| nice(*v))
        .y_desc("oscillator strength f")
        .draw()
        .map_err(draw_err)?;

    // Curve, sorted by wavelength.
    let mut curve: Vec<Pt> = fig
        .wavelength
        .iter()
        .copied()
        .zip(fig.epsilon.iter().copied())
        .collect();
    curve.sort_by(|a, b| a.0.total_cmp(&b.0));
    let b = bounds_of((x0, x1), (y0, y1));
    polyline(
        chart.deref_mut(),
        &curve,
        &b,
        style.series(0).rgb().stroke_width(px.line),
    )?;

    // Sticks on the secondary scale.
    let stick_style = stick_colour.stroke_width(px.line + 1);
    let sticks = fig
        .sticks
        .iter()
        .filter(|s| inside(s.wavelength) && s.strength > 0.0)
        .map(|s| {
            PathElement::new(
                vec![(s.wavelength, 0.0), (s.wavelength, s.strength)],
                stick_style,
            )
        });
    chart.draw_secondary_series(sticks).map_err(draw_err)?;
    Ok(())
}

#[cfg(test)]
pub(super) fn sample() -> SpectrumFigure {
    // Gaussian bands of width 15 nm about each stick, heights 4e4 per unit
    // f (common practice, no source).
    let sticks = vec![
        Stick {
            wavelength: 450.0,
            strength: 1.2,
        },
        Stick {
            wavelength: 380.0,
            strength: 0.3,
        },
        Stick {
            wavelength: 330.0,
            strength: 0.05,
        },
    ];
    let wl: Vec<f64> = (0..=300).map(|i| 250.0 + i as f64).collect();
    let eps = wl
        .iter()
        .map(|w| {
            sticks
                .iter()
                .map(|s| 4.0e4 * s.strength * (-((w - s.wavelength) / 15.0).powi(2) / 2.0).exp())
                .sum()
        })
        .collect();
    SpectrumFigure::new(wl, eps, sticks)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plot::testkit::{render_both, stroked};
    use crate::plot::{Figure, Size};

    #[test]
    fn renders_sticks() {
        let style = Style::default();
        let svg = render_both(&Figure::Spectrum(sample()), &style, "spectrum");
        let sticks = stroked(&svg, &style.series(1).hex());
        assert_eq!(sticks.iter().filter(|s| s.0 == "polyline").count(), 3);
        assert_eq!(stroked(&svg, &style.series(0).hex()).len(), 1);
    }

    #[test]
    fn window_keeps_inside_sticks() {
        let style = Style {
            x_window: Some((360.0, 520.0)),
            size: Size::Centimetres {
                w: 8.0,
                h: 6.0,
                dpi: 300.0,
            },
            ..Style::default()
        };
        let svg = render_both(&Figure::Spectrum(sample()), &style, "spectrum_window");
        let sticks = stroked(&svg, &style.series(1).hex());
        assert_eq!(sticks.iter().filter(|s| s.0 == "polyline").count(), 2);
    }

    #[test]
    fn bad_input() {
        let mut f = sample();
        f.sticks[0].strength = -1.0;
        assert!(f.validate().is_err());
        let mut f = sample();
        f.epsilon[0] = f64::INFINITY;
        assert!(matches!(f.validate(), Err(PlotError::NotFinite { .. })));
        let style = Style {
            x_window: Some((900.0, 1000.0)),
            ..Style::default()
        };
        let r = crate::plot::render_svg(&Figure::Spectrum(sample()), &style);
        assert!(matches!(r, Err(PlotError::NoDataInWindow(_))));
    }
}
