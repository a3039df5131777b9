//! Publication figures for chainwell results, written as SVG, PNG or PDF.
//!
//! Six figure kinds, each a plain data struct filled by the caller:
//!
//! | kind | shows |
//! | --- | --- |
//! | [`StatesFigure`] | potential V(x), levels across their classically allowed regions, wavefunctions (or densities) drawn at their energies, occupations |
//! | [`SpectrumFigure`] | molar absorptivity against wavelength, transitions as sticks of oscillator strength on a right-hand axis |
//! | [`SweepFigure`] | levels (with HOMO and LUMO marked) or one quantity against a varied parameter |
//! | [`FitFigure`] | observed values with error bars, model, residual panel |
//! | [`BandsFigure`] | band structure E(k), gaps shaded, optional ladders of finite-chain levels |
//! | [`ConvergeFigure`] | absolute error against grid spacing on log-log axes with a reference slope |
//!
//! [`render`] draws a [`Figure`] with a [`Style`] and writes it atomically
//! ([`write_atomic`]); the format follows the file extension
//! ([`Format::from_path`]). A figure is drawn once into a recorded scene
//! (plotters on a backend of our own), then written: SVG with every label
//! as glyph outlines, PNG antialiased by `tiny-skia`, PDF with the font
//! embedded. The shipped DejaVu Sans face is used for all text, so no
//! system font is needed, and every format shows the same layout.
//!
//! All data are clipped to the axis box before drawing. Non-finite values,
//! empty data, mismatched lengths and windows holding no data are reported
//! as [`PlotError`]s, never panics. Values are plotted in whatever units the
//! caller uses (chainwell: angstrom, eV); each struct carries the unit
//! strings shown in the axis titles.
//!
//! Colours: the Okabe & Ito set (B. Wong, Nature Methods 8, 441 (2011)).

mod axes;
mod bands;
mod converge;
mod file;
mod fit;
mod font;
mod pdf;
mod raster;
mod render;
mod scene;
mod spectrum;
mod states;
mod style;
mod subset;
mod svg;
mod sweep;
mod titles;

pub use bands::{BandsFigure, ChainLadder, LADDER_SHARE};
pub use converge::{ConvergeFigure, ErrorSeries, REFERENCE_OFFSET};
pub use file::write_atomic;
pub use fit::{FitFigure, RESIDUAL_SHARE};
pub use render::{check, label_boxes, render, render_pdf, render_png, render_svg, Format};
pub use spectrum::{MeasuredSpectrum, SpectrumAxis, SpectrumFigure, Stick};
pub use states::{StateLevel, StatesFigure, WAVE_FRACTION};
pub use style::{Rgb, Size, Style, LEVEL_INK, MAX_PIXELS, OKABE_ITO, SCREEN_DPI, SERIES_ORDER};
pub use sweep::{Measured, SweepCase, SweepData, SweepFigure};
pub use titles::{key_title, quantity_parts, quantity_title, unit_symbol, with_unit};

use std::path::PathBuf;

/// One figure of any kind, as accepted by [`render`].
#[derive(Debug, Clone, PartialEq)]
pub enum Figure {
    /// Potential, levels and wavefunctions.
    States(StatesFigure),
    /// Absorption spectrum with transition sticks.
    Spectrum(SpectrumFigure),
    /// Levels or one quantity against a varied parameter.
    Sweep(SweepFigure),
    /// Observed against model with residuals.
    Fit(FitFigure),
    /// Band structure and finite-chain ladders.
    Bands(BandsFigure),
    /// Error against spacing, log-log.
    Converge(ConvergeFigure),
}

/// Errors of the plot module.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum PlotError {
    /// The file extension is not `.svg`, `.png` or `.pdf` (any case).
    #[error("unknown figure format for {0:?}: use .svg, .png or .pdf")]
    UnknownFormat(PathBuf),
    /// A required data array is empty.
    #[error("no data: {0} is empty")]
    Empty(String),
    /// A value is NaN or infinite.
    #[error("{what} has a non-finite value at index {index}")]
    NotFinite {
        /// Which array.
        what: String,
        /// Index of the first bad value.
        index: usize,
    },
    /// Two arrays that must match in length do not.
    #[error("{what}: expected {expected} values, got {got}")]
    Length {
        /// Which array.
        what: String,
        /// Required length.
        expected: usize,
        /// Given length.
        got: usize,
    },
    /// A window holds none of the data.
    #[error("window holds no data: {0}")]
    NoDataInWindow(String),
    /// Some other value is out of its valid range.
    #[error("invalid data: {0}")]
    Invalid(String),
    /// The requested output size is unusable.
    #[error("bad figure size: {0}")]
    BadSize(String),
    /// A style option is out of range.
    #[error("bad style: {0}")]
    BadStyle(String),
    /// The embedded font could not be registered.
    #[error("font: {0}")]
    Font(String),
    /// The drawing library reported an error.
    #[error("drawing failed: {0}")]
    Draw(String),
    /// PNG encoding failed.
    #[error("PNG encoding failed: {0}")]
    Encode(String),
    /// Reading or writing a file failed.
    #[error("i/o error on {path:?}: {message}")]
    Io {
        /// The file concerned.
        path: PathBuf,
        /// The system's message.
        message: String,
    },
}

#[cfg(test)]
mod testkit;
