//! Figure options: output size, type sizes, line widths, colours and the
//! data windows shared by all figure kinds.
//!
//! Colours come from the eight-colour set of Okabe and Ito that stays
//! distinguishable under the common forms of colour-vision deficiency, as
//! reproduced by B. Wong, "Points of view: Color blindness", Nature Methods
//! 8, 441 (2011).

use super::PlotError;
use plotters::style::RGBColor;

/// A colour given as 8-bit red, green and blue channels.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct Rgb(pub u8, pub u8, pub u8);

impl Rgb {
    /// The colour as `#RRGGBB` with upper-case hex digits, as it appears in
    /// the SVG output.
    pub fn hex(self) -> String {
        format!("#{:02X}{:02X}{:02X}", self.0, self.1, self.2)
    }

    pub(super) fn rgb(self) -> RGBColor {
        RGBColor(self.0, self.1, self.2)
    }
}

/// The Okabe & Ito colour-blind-safe colours in their published order
/// (Wong 2011): black, orange, sky blue, bluish green, yellow, blue,
/// vermillion, reddish purple.
pub const OKABE_ITO: [Rgb; 8] = [
    Rgb(0x00, 0x00, 0x00),
    Rgb(0xE6, 0x9F, 0x00),
    Rgb(0x56, 0xB4, 0xE9),
    Rgb(0x00, 0x9E, 0x73),
    Rgb(0xF0, 0xE4, 0x42),
    Rgb(0x00, 0x72, 0xB2),
    Rgb(0xD5, 0x5E, 0x00),
    Rgb(0xCC, 0x79, 0xA7),
];

/// The default series order: the Okabe & Ito colours rearranged so that the
/// first few series get the colours with the most contrast on white (blue,
/// vermillion, bluish green, reddish purple, orange, sky blue, yellow, black).
///
/// Black is the ink of potentials and frames, and yellow is too faint on
/// white for thin lines, so the series cycle through the other six.
pub const SERIES_ORDER: [Rgb; 6] = [
    OKABE_ITO[5],
    OKABE_ITO[6],
    OKABE_ITO[3],
    OKABE_ITO[7],
    OKABE_ITO[1],
    OKABE_ITO[2],
];

/// Colour of energy-level lines (states, sweep ladders, chain ladders).
///
/// A neutral dark grey used for nothing else, so level lines can be told
/// apart from data curves, and counted in the SVG output.
pub const LEVEL_INK: Rgb = Rgb(0x4D, 0x4D, 0x4D);

/// Output size of a figure.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Size {
    /// Width and height in pixels. Type and line sizes given in points are
    /// converted at 96 dots per inch.
    Pixels {
        /// Width in pixels, 16..=20000.
        w: u32,
        /// Height in pixels, 16..=20000.
        h: u32,
    },
    /// Width and height in centimetres at a resolution in dots per inch;
    /// the pixel size is `round(cm / 2.54 * dpi)`.
    Centimetres {
        /// Width in cm (> 0).
        w: f64,
        /// Height in cm (> 0).
        h: f64,
        /// Resolution in dots per inch (> 0).
        dpi: f64,
    },
}

/// Resolution assumed for [`Size::Pixels`] when converting points to pixels.
pub const SCREEN_DPI: f64 = 96.0;

/// Largest accepted width or height in pixels.
pub const MAX_PIXELS: u32 = 20_000;

impl Size {
    /// Pixel width, pixel height and resolution (dpi) of this size.
    ///
    /// Errors with [`PlotError::BadSize`] for sizes outside 16..=20000 px or
    /// non-finite / non-positive centimetre values.
    pub fn pixels(&self) -> Result<(u32, u32, f64), PlotError> {
        let (w, h, dpi) = match *self {
            Size::Pixels { w, h } => (f64::from(w), f64::from(h), SCREEN_DPI),
            Size::Centimetres { w, h, dpi } => {
                if !(w.is_finite() && h.is_finite() && dpi.is_finite())
                    || w <= 0.0
                    || h <= 0.0
                    || dpi <= 0.0
                {
                    return Err(PlotError::BadSize(format!("{w} cm x {h} cm at {dpi} dpi")));
                }
                ((w / 2.54 * dpi).round(), (h / 2.54 * dpi).round(), dpi)
            }
        };
        let ok = |v: f64| (16.0..=f64::from(MAX_PIXELS)).contains(&v);
        if !ok(w) || !ok(h) {
            return Err(PlotError::BadSize(format!(
                "{w} x {h} pixels (allowed 16..={MAX_PIXELS} each)"
            )));
        }
        Ok((w as u32, h as u32, dpi))
    }
}

/// Options shared by all figure kinds.
#[derive(Debug, Clone, PartialEq)]
pub struct Style {
    /// Output size. Default `Size::Pixels { w: 1000, h: 700 }`.
    pub size: Size,
    /// Type size in points at the output resolution (tick labels and axis
    /// titles; level labels are 0.9 of it). Default 12 pt. Range 2..=72.
    pub font_pt: f64,
    /// Width of data lines in points. Frame, ticks and level lines are
    /// drawn at about 0.6 of it, potentials at 2.5 times. Default 1.2 pt.
    /// Range 0.1..=20. Widths are rounded to whole pixels (at least 1).
    pub line_pt: f64,
    /// Series colours in the order they are used; cycles when there are more
    /// series than colours. Must not be empty. Default [`SERIES_ORDER`].
    pub palette: Vec<Rgb>,
    /// Colour of text, frame, ticks and potentials. Default black.
    pub ink: Rgb,
    /// Energy (vertical) window for states, sweep-of-levels and bands
    /// figures, in the figure's energy unit; `None` fits the data.
    pub energy_window: Option<(f64, f64)>,
    /// Horizontal window in the figure's x unit (position, wavelength,
    /// swept value, fit x, k, or spacing h); `None` fits the data.
    pub x_window: Option<(f64, f64)>,
    /// Levels to show in the states figure, by quantum number `n`; `None`
    /// shows all given levels.
    pub levels: Option<Vec<usize>>,
    /// Wavefunction amplitude in the states figure as a fraction of the
    /// smallest spacing between shown levels. Default
    /// [`super::WAVE_FRACTION`] (0.4). Range (0, 5].
    pub amplitude: f64,
}

impl Default for Style {
    fn default() -> Self {
        Style {
            size: Size::Pixels { w: 1000, h: 700 },
            font_pt: 12.0,
            line_pt: 1.2,
            palette: SERIES_ORDER.to_vec(),
            ink: OKABE_ITO[0],
            energy_window: None,
            x_window: None,
            levels: None,
            amplitude: super::WAVE_FRACTION,
        }
    }
}

/// Pixel measures derived from a [`Style`].
#[derive(Debug, Clone, Copy)]
pub(super) struct Px {
    /// Width and height of the picture.
    pub w: u32,
    pub h: u32,
    /// Type size in pixels.
    pub font: f64,
    /// Data line width.
    pub line: u32,
    /// Thin line width (frame, ticks, levels).
    pub thin: u32,
    /// Heavy line width (potential).
    pub heavy: u32,
    /// Pixels per point.
    pub per_pt: f64,
}

impl Style {
    /// Checks every option: the size, type size, line width, palette,
    /// windows and amplitude, with the range each must lie in.
    pub fn validate(&self) -> Result<(), PlotError> {
        Px::new(self).map(|_| ())
    }
}

impl Px {
    /// Checks the style and derives pixel measures.
    pub fn new(style: &Style) -> Result<Px, PlotError> {
        let (w, h, dpi) = style.size.pixels()?;
        if !(style.amplitude > 0.0 && style.amplitude <= 5.0) {
            return Err(PlotError::BadStyle(format!(
                "wave amplitude {} outside (0, 5] (fraction of the level spacing)",
                style.amplitude
            )));
        }
        if !(2.0..=72.0).contains(&style.font_pt) {
            return Err(PlotError::BadStyle(format!(
                "font size {} pt outside 2..=72",
                style.font_pt
            )));
        }
        if !(0.1..=20.0).contains(&style.line_pt) {
            return Err(PlotError::BadStyle(format!(
                "line width {} pt outside 0.1..=20",
                style.line_pt
            )));
        }
        if style.palette.is_empty() {
            return Err(PlotError::BadStyle("empty palette".into()));
        }
        for (name, win) in [("energy", style.energy_window), ("x", style.x_window)] {
            if let Some((a, b)) = win {
                if !(a.is_finite() && b.is_finite()) || a >= b {
                    return Err(PlotError::BadStyle(format!(
                        "{name} window ({a}, {b}) must be finite with low < high"
                    )));
                }
            }
        }
        let per_pt = dpi / 72.0;
        let width = |pt: f64| ((pt * per_pt).round() as u32).max(1);
        Ok(Px {
            w,
            h,
            font: style.font_pt * per_pt,
            line: width(style.line_pt),
            thin: width(0.6 * style.line_pt),
            heavy: width(2.5 * style.line_pt),
            per_pt,
        })
    }

    /// A length given in points, in whole pixels (at least 1).
    pub fn pt(&self, pt: f64) -> i32 {
        ((pt * self.per_pt).round() as i32).max(1)
    }
}

impl Style {
    /// The colour of series `i`, cycling through the palette.
    pub(super) fn series(&self, i: usize) -> Rgb {
        // Px::new has rejected an empty palette before any drawing.
        self.palette
            .get(i % self.palette.len().max(1))
            .copied()
            .unwrap_or(OKABE_ITO[5])
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn centimetres_convert_at_dpi() {
        // 2.54 cm is one inch: 10.16 cm at 100 dpi is 400 px, closed form.
        let s = Size::Centimetres {
            w: 10.16,
            h: 5.08,
            dpi: 100.0,
        };
        assert_eq!(s.pixels().unwrap(), (400, 200, 100.0));
    }

    #[test]
    fn bad_sizes_are_errors() {
        assert!(Size::Pixels { w: 0, h: 100 }.pixels().is_err());
        assert!(Size::Pixels { w: 100, h: 30_000 }.pixels().is_err());
        let nan = Size::Centimetres {
            w: f64::NAN,
            h: 5.0,
            dpi: 100.0,
        };
        assert!(nan.pixels().is_err());
    }

    #[test]
    fn style_checks() {
        let mut s = Style::default();
        assert!(Px::new(&s).is_ok());
        s.palette.clear();
        assert!(Px::new(&s).is_err());
        let s = Style {
            energy_window: Some((1.0, 1.0)),
            ..Style::default()
        };
        assert!(Px::new(&s).is_err());
    }

    #[test]
    fn palette_is_okabe_ito() {
        // Wong, Nature Methods 8, 441 (2011).
        let hex: Vec<String> = OKABE_ITO.iter().map(|c| c.hex()).collect();
        assert_eq!(
            hex,
            [
                "#000000", "#E69F00", "#56B4E9", "#009E73", "#F0E442", "#0072B2", "#D55E00",
                "#CC79A7"
            ]
        );
    }
}
