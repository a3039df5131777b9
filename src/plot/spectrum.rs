//! Spectrum figure: molar absorptivity epsilon against wavelength (or
//! photon energy, or wavenumber), with the underlying transitions as
//! vertical sticks whose heights are oscillator strengths f, read on a
//! right-hand axis of their own (0 to 1.08 f_max), and optionally a
//! measured spectrum drawn over it.
//!
//! Without a window the range is the spectrum's own: where ε is above
//! 0.2 % of its peak, with every stick. ε tick labels stay short: from
//! 10⁴ up they are divided by the axis's power of ten, named in the title
//! ("ε (10⁵ L mol⁻¹ cm⁻¹)").
//!
//! The relation between f and the integrated band is given e.g. in
//! P. Atkins and J. de Paula, Physical Chemistry, 8th ed., Sect. 13.2; the
//! figure only draws the numbers it is given.

use super::axes::superscript;
use super::axes::{
    axis_range, bounds_of, check, check_finite, check_len, draw_err, extent, frame, label_areas,
    legend, nice, polyline, text, title_scale, titled, usable, y_area, y_ticks, Pt, Swatch,
};
use super::style::Px;
use super::{PlotError, Style};
use plotters::coord::Shift;
use plotters::prelude::*;
use std::ops::DerefMut;

/// One transition drawn as a stick.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stick {
    /// Transition wavelength in nm.
    pub wavelength: f64,
    /// Oscillator strength (dimensionless, >= 0).
    pub strength: f64,
}

/// The quantity on the horizontal axis of a spectrum.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SpectrumAxis {
    /// Wavelength λ in nm (default).
    #[default]
    Wavelength,
    /// Photon energy in eV, `hc / λ`.
    Energy,
    /// Wavenumber in cm⁻¹, `1 / λ`.
    Wavenumber,
}

/// hc in eV nm from the CODATA values of h, c and e (exact since 2019).
fn hc_ev_nm() -> f64 {
    use crate::constants::{ELEMENTARY_CHARGE_C, PLANCK_J_S, SPEED_OF_LIGHT_M_S};
    PLANCK_J_S * SPEED_OF_LIGHT_M_S / ELEMENTARY_CHARGE_C * 1e9
}

impl SpectrumAxis {
    /// Reads `wavelength`, `energy` or `wavenumber`.
    pub fn parse(s: &str) -> Option<SpectrumAxis> {
        match s {
            "wavelength" => Some(SpectrumAxis::Wavelength),
            "energy" => Some(SpectrumAxis::Energy),
            "wavenumber" => Some(SpectrumAxis::Wavenumber),
            _ => None,
        }
    }

    /// The axis value of a wavelength in nm (non-positive wavelengths give
    /// infinity on the reciprocal axes).
    pub fn from_nm(self, nm: f64) -> f64 {
        match self {
            SpectrumAxis::Wavelength => nm,
            SpectrumAxis::Energy => hc_ev_nm() / nm,
            SpectrumAxis::Wavenumber => 1e7 / nm,
        }
    }

    /// The axis title with its unit.
    pub fn title(self) -> &'static str {
        match self {
            SpectrumAxis::Wavelength => "wavelength λ (nm)",
            SpectrumAxis::Energy => "photon energy (eV)",
            SpectrumAxis::Wavenumber => "wavenumber (cm⁻¹)",
        }
    }
}

/// A measured spectrum to draw over the computed one.
#[derive(Debug, Clone, PartialEq)]
pub struct MeasuredSpectrum {
    /// Wavelengths in nm.
    pub wavelength_nm: Vec<f64>,
    /// Absorbance (any scale) or molar absorptivity in L mol⁻¹ cm⁻¹.
    pub values: Vec<f64>,
    /// True for absorbance, drawn scaled to the computed ε; false for ε.
    pub absorbance: bool,
}

impl MeasuredSpectrum {
    /// Reads a two-column CSV: a header naming the abscissa
    /// (`wavelength (nm)` or `energy (eV)`, also `wavelength_nm`,
    /// `energy_eV`) and the ordinate (`absorbance`, or `epsilon` / `ε` for
    /// molar absorptivity in L mol⁻¹ cm⁻¹), then one pair of numbers per
    /// line. Blank lines and lines starting with `#` are skipped. A fault
    /// comes with its 1-based line (0 for the file as a whole).
    pub fn parse_csv(text: &str) -> Result<MeasuredSpectrum, (usize, String)> {
        let mut lines = text
            .lines()
            .enumerate()
            .map(|(i, l)| (i + 1, l.trim()))
            .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'));
        let (hline, header) = lines
            .next()
            .ok_or((0, "the file has no header".to_string()))?;
        let names: Vec<String> = header.split(',').map(|n| n.trim().to_lowercase()).collect();
        if names.len() != 2 {
            return Err((
                hline,
                format!(
                    "{} columns; a measured spectrum has two: wavelength (nm) or energy (eV), then absorbance or epsilon",
                    names.len()
                ),
            ));
        }
        let energy = if names[0].starts_with("wavelength") {
            false
        } else if names[0].starts_with("energy") {
            true
        } else {
            return Err((
                hline,
                format!(
                    "first column `{}`: expected wavelength (nm) or energy (eV)",
                    names[0]
                ),
            ));
        };
        let absorbance = if names[1].starts_with("absorbance") {
            true
        } else if names[1].starts_with("epsilon") || names[1].starts_with('ε') {
            false
        } else {
            return Err((
                hline,
                format!(
                    "second column `{}`: expected absorbance or epsilon",
                    names[1]
                ),
            ));
        };
        let mut out = MeasuredSpectrum {
            wavelength_nm: Vec::new(),
            values: Vec::new(),
            absorbance,
        };
        for (line, l) in lines {
            let cells: Vec<&str> = l.split(',').map(str::trim).collect();
            if cells.len() != 2 {
                return Err((line, format!("{} cells, the header has 2", cells.len())));
            }
            let num = |c: &str| c.parse::<f64>().ok().filter(|x| x.is_finite());
            let (Some(x), Some(y)) = (num(cells[0]), num(cells[1])) else {
                return Err((line, format!("`{l}` is not two numbers")));
            };
            if x <= 0.0 {
                return Err((line, format!("{} {x} must be positive", names[0])));
            }
            out.wavelength_nm
                .push(if energy { hc_ev_nm() / x } else { x });
            out.values.push(y);
        }
        if out.values.len() < 2 {
            return Err((0, "a measured spectrum needs at least two rows".into()));
        }
        Ok(out)
    }
}

/// An absorption spectrum with transition sticks.
#[derive(Debug, Clone, PartialEq)]
pub struct SpectrumFigure {
    /// Wavelength grid in nm (any order).
    pub wavelength: Vec<f64>,
    /// Molar absorptivity on the grid, in L mol⁻¹ cm⁻¹.
    pub epsilon: Vec<f64>,
    /// Transitions; may be empty.
    pub sticks: Vec<Stick>,
    /// The horizontal axis: wavelength, energy or wavenumber.
    pub axis: SpectrumAxis,
    /// A measured spectrum drawn over the computed one, if any.
    pub measured: Option<MeasuredSpectrum>,
}

impl SpectrumFigure {
    /// A figure against wavelength with no measured spectrum.
    pub fn new(wavelength: Vec<f64>, epsilon: Vec<f64>, sticks: Vec<Stick>) -> Self {
        SpectrumFigure {
            wavelength,
            epsilon,
            sticks,
            axis: SpectrumAxis::Wavelength,
            measured: None,
        }
    }

    /// Checks lengths, finiteness, positive wavelengths and non-negative
    /// strengths.
    pub(super) fn validate(&self) -> Result<(), PlotError> {
        check("wavelength grid", &self.wavelength)?;
        check_len("epsilon", self.wavelength.len(), self.epsilon.len())?;
        check_finite("epsilon", &self.epsilon)?;
        if self.wavelength.iter().any(|w| *w <= 0.0) {
            return Err(PlotError::Invalid("wavelengths must be positive".into()));
        }
        for (i, s) in self.sticks.iter().enumerate() {
            if !(s.wavelength.is_finite() && s.strength.is_finite()) {
                return Err(PlotError::NotFinite {
                    what: "sticks".into(),
                    index: i,
                });
            }
            if s.strength < 0.0 || s.wavelength <= 0.0 {
                return Err(PlotError::Invalid(format!(
                    "stick {i}: oscillator strength {} at {} nm",
                    s.strength, s.wavelength
                )));
            }
        }
        if let Some(m) = &self.measured {
            check("measured wavelengths", &m.wavelength_nm)?;
            check_len("measured values", m.wavelength_nm.len(), m.values.len())?;
            check_finite("measured values", &m.values)?;
        }
        Ok(())
    }

    /// The default wavelength range (nm): where the computed ε exceeds
    /// 0.2 % of its maximum, with every stick and the measured spectrum,
    /// widened by 8 % of the span each side (common practice, no source).
    fn default_range(&self) -> Option<(f64, f64)> {
        let top = self.epsilon.iter().copied().fold(0.0_f64, f64::max);
        let strong = self
            .wavelength
            .iter()
            .zip(&self.epsilon)
            .filter(|(_, e)| top > 0.0 && **e >= 2e-3 * top)
            .map(|(w, _)| *w);
        let lines = self.sticks.iter().map(|s| s.wavelength);
        let measured = self
            .measured
            .iter()
            .flat_map(|m| m.wavelength_nm.iter().copied());
        let (lo, hi) = extent(strong.chain(lines).chain(measured))?;
        let span = (hi - lo).max(0.1 * hi);
        Some(((lo - 0.08 * span).max(0.5 * lo), hi + 0.08 * span))
    }
}

/// The power of ten that ε tick labels are divided by: the decade of the
/// axis top from 10⁴ up, else 0 (ticks written in full).
fn epsilon_power(top: f64) -> i32 {
    if top >= 1e4 && top.is_finite() {
        top.log10().floor() as i32
    } else {
        0
    }
}

/// Draws the figure on `root`.
pub(super) fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    fig: &SpectrumFigure,
    style: &Style,
    px: &Px,
) -> Result<(), PlotError> {
    let ax = fig.axis;
    let to_x = |nm: f64| ax.from_nm(nm);
    // The window is in the axis's own unit; the default range comes from
    // the spectrum's lines.
    let mut xs: Vec<f64> = fig.wavelength.iter().map(|w| to_x(*w)).collect();
    xs.extend(fig.sticks.iter().map(|s| to_x(s.wavelength)));
    let (x0, x1) = match (style.x_window, fig.default_range()) {
        (Some(w), _) => axis_range("spectrum", Some(w), &xs, 0.0)?,
        (None, Some((a, b))) => {
            let (a, b) = (to_x(a), to_x(b));
            (a.min(b), a.max(b))
        }
        (None, None) => axis_range("spectrum", None, &xs, 0.0)?,
    };
    let inside = |nm: f64| {
        let x = to_x(nm);
        x >= x0 && x <= x1
    };

    let eps_max = extent(
        fig.wavelength
            .iter()
            .zip(&fig.epsilon)
            .filter(|(w, _)| inside(**w))
            .map(|(_, e)| *e),
    )
    .map_or(0.0, |e| e.1);
    // A measured absorbance is scaled so its highest point in the window
    // meets the computed maximum; a measured ε is drawn as it is.
    let (m_scale, m_max) = match &fig.measured {
        Some(m) => {
            let top = m
                .wavelength_nm
                .iter()
                .zip(&m.values)
                .filter(|(w, _)| inside(**w))
                .fold(0.0_f64, |t, (_, v)| t.max(*v));
            if m.absorbance {
                let k = if top > 0.0 && eps_max > 0.0 {
                    eps_max / top
                } else {
                    1.0
                };
                (k, top * k)
            } else {
                (1.0, top)
            }
        }
        None => (1.0, 0.0),
    };
    let eps_min = extent(fig.epsilon.iter().copied()).map_or(0.0, |e| e.0);
    let y0 = eps_min.min(0.0);
    let top = eps_max.max(m_max);
    let y1 = if top > y0 { top * 1.08 } else { y0 + 1.0 };
    let power = epsilon_power(y1);
    let unit = 10f64.powi(power);
    let (y0, y1) = (y0 / unit, y1 / unit);
    let f_max = fig
        .sticks
        .iter()
        .filter(|s| inside(s.wavelength))
        .fold(0.0_f64, |m, s| m.max(s.strength));
    let f1 = if f_max > 0.0 { f_max * 1.08 } else { 1.0 };

    let (x0, x1) = usable("spectrum axis", (x0, x1))?;
    let (y0, y1) = usable("epsilon", (y0, y1))?;
    let f1 = usable("oscillator strength", (0.0, f1))?.1;
    let (_, bottom) = label_areas(px);
    let m = (px.font * 0.9) as u32;
    let ny = y_ticks((f64::from(px.h) * 0.8) as u32, px);
    let mut chart = ChartBuilder::on(root)
        .margin(m)
        .margin_top((px.font * 1.8) as u32)
        .x_label_area_size(bottom)
        .y_label_area_size(y_area(root, px, style, (y0, y1), ny))
        .right_y_label_area_size(y_area(root, px, style, (0.0, f1), ny))
        .build_cartesian_2d(x0..x1, y0..y1)
        .map_err(draw_err)?
        .set_secondary_coord(x0..x1, 0.0..f1);
    let eps_unit = if power == 0 {
        "L mol⁻¹ cm⁻¹".to_string()
    } else {
        format!("10{} L mol⁻¹ cm⁻¹", superscript(power))
    };
    frame(
        chart.deref_mut(),
        px,
        style,
        ax.title(),
        &titled("ε", &eps_unit),
        true,
    )?;
    let stick_colour = style.series(1).rgb();
    let f_title = "oscillator strength f";
    let shrink = title_scale(
        &chart.plotting_area().strip_coord_spec(),
        px,
        style,
        &[(f_title, chart.plotting_area().dim_in_pixel().1)],
    );
    chart
        .configure_secondary_axes()
        .set_all_tick_mark_size(px.pt(3.0))
        .axis_style(style.ink.rgb().stroke_width(px.thin))
        .label_style(text(px, style, 1.0))
        .axis_desc_style(text(px, style, shrink).color(&stick_colour))
        .y_labels(ny)
        .y_label_formatter(&|v| nice(*v))
        .y_desc(f_title)
        .draw()
        .map_err(draw_err)?;

    let b = bounds_of((x0, x1), (y0, y1));
    let sorted = |w: &[f64], v: &[f64], k: f64| {
        let mut c: Vec<Pt> = w
            .iter()
            .zip(v)
            .map(|(w, v)| (to_x(*w), v * k / unit))
            .collect();
        c.sort_by(|a, b| a.0.total_cmp(&b.0));
        c
    };
    // Measured first, so the computed curve lies on top.
    let mut entries = vec![
        (Swatch::Line(style.series(0).rgb(), px.line), "computed ε"),
        (Swatch::Line(stick_colour, px.line + 1), "transitions (f)"),
    ];
    if let Some(ms) = &fig.measured {
        let curve = sorted(&ms.wavelength_nm, &ms.values, m_scale);
        polyline(
            chart.deref_mut(),
            &curve,
            &b,
            style.ink.rgb().stroke_width(px.thin),
        )?;
        let name = if ms.absorbance {
            "measured (scaled)"
        } else {
            "measured"
        };
        entries.push((Swatch::Line(style.ink.rgb(), px.thin), name));
    }
    let curve = sorted(&fig.wavelength, &fig.epsilon, 1.0);
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
            let x = to_x(s.wavelength);
            PathElement::new(vec![(x, 0.0), (x, s.strength)], stick_style)
        });
    chart.draw_secondary_series(sticks).map_err(draw_err)?;
    let (xs_px, ys_px) = chart.plotting_area().get_pixel_range();
    legend(
        root,
        px,
        style,
        (xs_px.end, ys_px.start - (px.font * 0.8) as i32),
        &entries,
    )
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
        // Three sticks and the key's sample; one curve and its sample.
        let sticks = stroked(&svg, &style.series(1).hex());
        assert_eq!(sticks.iter().filter(|s| s.0 == "polyline").count(), 4);
        assert_eq!(stroked(&svg, &style.series(0).hex()).len(), 2);
        // Peak 4.8e4 x 1.08 (sample below): ticks in units of 10^4.
        let doc = roxmltree::Document::parse(&svg).unwrap();
        assert!(doc
            .descendants()
            .any(|n| n.attribute("aria-label") == Some("ε (10⁴ L mol⁻¹ cm⁻¹)")));
    }

    #[test]
    fn default_range_follows_the_lines() {
        // Bands 15 nm wide at 330..450 nm on a grid 250..550 nm: the range
        // ends a few widths beyond the outer lines, not at the grid's ends.
        let (a, b) = sample().default_range().unwrap();
        assert!(a > 250.0 && a < 330.0, "{a}");
        assert!(b > 450.0 && b < 550.0, "{b}");
    }

    #[test]
    fn axes_convert_wavelength() {
        // hc = 1239.84198 eV nm (CODATA 2018, exact h, c, e).
        approx::assert_abs_diff_eq!(
            SpectrumAxis::Energy.from_nm(500.0),
            2.479_683_968,
            epsilon = 1e-8
        );
        assert_eq!(SpectrumAxis::Wavenumber.from_nm(500.0), 20000.0);
        assert_eq!(SpectrumAxis::parse("energy"), Some(SpectrumAxis::Energy));
        assert_eq!(SpectrumAxis::parse("nm"), None);
        assert_eq!(epsilon_power(3.2e5), 5);
        assert_eq!(epsilon_power(8000.0), 0);
        assert_eq!(superscript(-12), "⁻¹²");
        let mut f = sample();
        f.axis = SpectrumAxis::Wavenumber;
        let style = Style::default();
        let svg = render_both(&Figure::Spectrum(f), &style, "spectrum_wavenumber");
        assert!(svg.contains("wavenumber (cm⁻¹)"));
    }

    #[test]
    fn measured_spectrum_csv() {
        let m =
            MeasuredSpectrum::parse_csv("# film\nenergy (eV), absorbance\n2.0, 0.1\n2.5, 0.4\n")
                .unwrap();
        assert!(m.absorbance);
        approx::assert_abs_diff_eq!(m.wavelength_nm[0], 619.920_992, epsilon = 1e-5);
        let e = MeasuredSpectrum::parse_csv("wavelength (nm),epsilon\n400,1\n410,x\n").unwrap_err();
        assert_eq!(e.0, 3);
        let e = MeasuredSpectrum::parse_csv("nm,absorbance\n1,2\n").unwrap_err();
        assert_eq!(e.0, 1);
        let e = MeasuredSpectrum::parse_csv("wavelength (nm),epsilon\n-4,1\n5,1\n").unwrap_err();
        assert_eq!(e.0, 2);
        let mut f = sample();
        f.measured = Some(
            MeasuredSpectrum::parse_csv("wavelength_nm,absorbance\n300,0.1\n450,0.9\n500,0.2\n")
                .unwrap(),
        );
        let style = Style::default();
        let svg = render_both(&Figure::Spectrum(f), &style, "spectrum_measured");
        assert!(svg.contains("aria-label=\"measured (scaled)\""));
        // The measured line and its key sample, in the ink colour.
        assert!(
            stroked(&svg, &style.ink.hex())
                .iter()
                .filter(|s| s.0 == "polyline")
                .count()
                >= 2
        );
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
        assert_eq!(sticks.iter().filter(|s| s.0 == "polyline").count(), 3);
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
