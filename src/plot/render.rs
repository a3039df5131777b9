//! The dispatch from [`Figure`] to the figure kinds, drawn once into a
//! recording [`Scene`], then written as SVG, PNG or PDF.

use super::axes::draw_err;
use super::file::write_atomic;
use super::scene::{Recorder, Scene};
use super::style::Px;
use super::{bands, converge, fit, font, pdf, raster, spectrum, states, svg, sweep};
use super::{Figure, PlotError, Style};
use plotters::coord::Shift;
use plotters::prelude::*;
use std::path::Path;

/// The file formats chainwell writes figures in.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    /// Scalable vector graphics, text as glyph outlines (no font named).
    Svg,
    /// Antialiased 8-bit RGB raster at the style's size.
    Png,
    /// One-page PDF, vector, with the font embedded.
    Pdf,
}

impl Format {
    /// The format named by the file extension (`.svg`, `.png`, `.pdf`, any
    /// case); anything else is [`PlotError::UnknownFormat`].
    pub fn from_path(path: &Path) -> Result<Format, PlotError> {
        let ext = path
            .extension()
            .map(|e| e.to_string_lossy().to_ascii_lowercase());
        match ext.as_deref() {
            Some("svg") => Ok(Format::Svg),
            Some("png") => Ok(Format::Png),
            Some("pdf") => Ok(Format::Pdf),
            _ => Err(PlotError::UnknownFormat(path.to_path_buf())),
        }
    }
}

/// Checks the figure data without drawing.
fn validate(figure: &Figure, style: &Style) -> Result<(), PlotError> {
    match figure {
        Figure::States(f) => f.validate(style),
        Figure::Spectrum(f) => f.validate(),
        Figure::Sweep(f) => f.validate(),
        Figure::Fit(f) => f.validate(),
        Figure::Bands(f) => f.validate(),
        Figure::Converge(f) => f.validate(),
    }
}

fn draw_on<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    figure: &Figure,
    style: &Style,
    px: &Px,
) -> Result<(), PlotError> {
    root.fill(&WHITE).map_err(draw_err)?;
    match figure {
        Figure::States(f) => states::draw(root, f, style, px),
        Figure::Spectrum(f) => spectrum::draw(root, f, style, px),
        Figure::Sweep(f) => sweep::draw(root, f, style, px),
        Figure::Fit(f) => fit::draw(root, f, style, px),
        Figure::Bands(f) => bands::draw(root, f, style, px),
        Figure::Converge(f) => converge::draw(root, f, style, px),
    }?;
    root.present().map_err(draw_err)
}

/// Draws the figure into a recorded scene, with the resolution in dpi.
pub(super) fn scene(figure: &Figure, style: &Style) -> Result<(Scene, f64), PlotError> {
    let px = Px::new(style)?;
    validate(figure, style)?;
    let face = font::face()?;
    let dpi = style.size.pixels()?.2;
    let mut sc = Scene::new(px.w, px.h, face);
    {
        let root = Recorder(&mut sc).into_drawing_area();
        draw_on(&root, figure, style, &px)?;
    }
    Ok((sc, dpi))
}

/// Draws the figure as an SVG document, text as glyph outlines.
pub fn render_svg(figure: &Figure, style: &Style) -> Result<String, PlotError> {
    let (sc, _) = scene(figure, style)?;
    Ok(svg::write(&sc))
}

/// Draws the figure antialiased and encodes it as PNG bytes.
pub fn render_png(figure: &Figure, style: &Style) -> Result<Vec<u8>, PlotError> {
    let (sc, dpi) = scene(figure, style)?;
    let rgb = raster::pixels(&sc)?;
    raster::encode(&rgb, sc.w, sc.h, dpi)
}

/// Draws the figure as a one-page PDF with the font embedded; the page is
/// the figure's size at its resolution.
pub fn render_pdf(figure: &Figure, style: &Style) -> Result<Vec<u8>, PlotError> {
    let (sc, dpi) = scene(figure, style)?;
    pdf::write(&sc, dpi)
}

/// Labels with the box `[x0, y0, x1, y1]` their glyphs cover, and the
/// canvas size (width, height) in pixels.
pub type LabelBoxes = (Vec<(String, [f64; 4])>, (u32, u32));

/// Every label of the drawn figure with the box `[x0, y0, x1, y1]` its
/// glyphs cover, in pixels from the top left, and the canvas size.
pub fn label_boxes(figure: &Figure, style: &Style) -> Result<LabelBoxes, PlotError> {
    let (sc, _) = scene(figure, style)?;
    let boxes = sc
        .label_boxes()
        .into_iter()
        .map(|(t, b)| (t.to_string(), b))
        .collect();
    Ok((boxes, (sc.w, sc.h)))
}

/// Checks, before anything is computed, that `path` names a figure format
/// chainwell writes and that `style` is usable (size, type size, line
/// width, windows, amplitude): the faults [`render`] would otherwise find
/// only after the work.
pub fn check(style: &Style, path: &Path) -> Result<(), PlotError> {
    Format::from_path(path)?;
    style.validate()
}

/// Draws `figure` with `style` and writes it to `path`, as SVG, PNG or
/// PDF by the extension (any case). The file is replaced atomically; on
/// any error an existing file at `path` is left untouched.
pub fn render(figure: &Figure, style: &Style, path: &Path) -> Result<(), PlotError> {
    let bytes = match Format::from_path(path)? {
        Format::Svg => render_svg(figure, style)?.into_bytes(),
        Format::Png => render_png(figure, style)?,
        Format::Pdf => render_pdf(figure, style)?,
    };
    write_atomic(path, &bytes)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plot::testkit::tmpdir;
    use crate::plot::{SweepData, SweepFigure};
    use proptest::prelude::*;

    fn quantity(values: Vec<f64>, y: Vec<f64>) -> Figure {
        Figure::Sweep(SweepFigure {
            key: "L".into(),
            key_unit: "Å".into(),
            values,
            data: SweepData::Quantity {
                name: "gap".into(),
                values: y,
            },
            y_unit: "eV".into(),
            measured: Vec::new(),
        })
    }

    #[test]
    fn svg_names_no_font_and_keeps_label_text() {
        let svg = render_svg(&quantity(vec![1.0, 2.0], vec![1.0, 2.0]), &Style::default()).unwrap();
        let doc = roxmltree::Document::parse(&svg).unwrap();
        assert!(!svg.contains("font-family") && !svg.contains("<text"));
        let labels: Vec<&str> = doc
            .descendants()
            .filter_map(|n| n.attribute("aria-label"))
            .collect();
        assert!(labels.contains(&"gap (eV)"), "{labels:?}");
    }

    #[test]
    fn failed_render_keeps_old_file() {
        let d = tmpdir("keep");
        for ext in ["svg", "png", "pdf"] {
            let p = d.join(format!("fig.{ext}"));
            std::fs::write(&p, b"old figure").unwrap();
            let bad = quantity(vec![1.0, 2.0], vec![0.5, f64::NAN]);
            let e = render(&bad, &Style::default(), &p).unwrap_err();
            assert!(matches!(e, PlotError::NotFinite { index: 1, .. }));
            assert_eq!(std::fs::read(&p).unwrap(), b"old figure");
            // A good figure then replaces it.
            let good = quantity(vec![1.0, 2.0], vec![0.5, 0.7]);
            render(&good, &Style::default(), &p).unwrap();
            assert_ne!(std::fs::read(&p).unwrap(), b"old figure");
        }
        let names: Vec<String> = std::fs::read_dir(&d)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        assert_eq!(names.len(), 3, "{names:?}");
        let e = render(
            &quantity(vec![1.0], vec![1.0]),
            &Style::default(),
            &d.join("fig.eps"),
        );
        assert!(matches!(e, Err(PlotError::UnknownFormat(_))));
        assert!(!d.join("fig.eps").exists());
        std::fs::remove_dir_all(&d).unwrap();
    }

    #[test]
    fn empty_and_bad_style_are_errors() {
        let e = render_svg(&quantity(vec![], vec![]), &Style::default());
        assert!(matches!(e, Err(PlotError::Empty(_))));
        let st = Style {
            font_pt: 0.0,
            ..Style::default()
        };
        let e = render_png(&quantity(vec![1.0], vec![1.0]), &st);
        assert!(matches!(e, Err(PlotError::BadStyle(_))));
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(48))]
        /// Any finite or non-finite input gives a picture or an error,
        /// never a panic.
        #[test]
        fn never_panics(
            pts in proptest::collection::vec(
                (prop_oneof![-1e300..1e300f64, -10.0..10.0f64, Just(f64::NAN), Just(f64::MAX), Just(0.0)],
                 prop_oneof![-1e300..1e300f64, -10.0..10.0f64, Just(f64::INFINITY), Just(-f64::MAX), Just(1.0)]),
                0..6),
            win in proptest::option::of((-20.0..0.0f64, 0.0..20.0f64)),
        ) {
            let (x, y): (Vec<f64>, Vec<f64>) = pts.into_iter().unzip();
            let st = Style {
                size: crate::plot::Size::Pixels { w: 200, h: 150 },
                x_window: win,
                ..Style::default()
            };
            let _ = render_svg(&quantity(x, y), &st);
        }

        /// Random states data: coincident or huge energies, zero or
        /// non-finite wavefunctions, odd windows.
        #[test]
        fn states_never_panic(
            energies in proptest::collection::vec(
                prop_oneof![-5.0..5.0f64, Just(1.0), Just(1e200), Just(f64::NAN)], 1..4),
            psi_scale in prop_oneof![Just(0.0), 1e-300..1e300f64, Just(f64::INFINITY)],
            ewin in proptest::option::of((-10.0..0.0f64, 0.0..10.0f64)),
        ) {
            let x: Vec<f64> = (0..20).map(|i| f64::from(i) * 0.5).collect();
            let v: Vec<f64> = x.iter().map(|x| (x - 5.0).powi(2) * 0.1).collect();
            let levels = energies
                .iter()
                .enumerate()
                .map(|(i, e)| crate::plot::StateLevel {
                    n: i + 1,
                    energy: *e,
                    psi: x.iter().map(|x| psi_scale * (x * (i + 1) as f64).sin()).collect(),
                    allowed: vec![(1.0, 9.0)],
                    occupation: (i % 3) as u8,
                })
                .collect();
            let fig = Figure::States(crate::plot::StatesFigure::new(x, v, levels));
            let st = Style {
                size: crate::plot::Size::Pixels { w: 200, h: 150 },
                energy_window: ewin,
                ..Style::default()
            };
            let _ = render_svg(&fig, &st);
        }
    }

    #[test]
    fn formats_from_extension() {
        let f = |p: &str| Format::from_path(Path::new(p));
        assert_eq!(f("a/b.SVG").unwrap(), Format::Svg);
        assert_eq!(f("b.png").unwrap(), Format::Png);
        assert_eq!(f("c.Pdf").unwrap(), Format::Pdf);
        let e = f("fig.eps").unwrap_err();
        assert_eq!(e, PlotError::UnknownFormat("fig.eps".into()));
        assert!(e.to_string().contains("fig.eps"));
        assert!(f("noext").is_err());
    }
}
