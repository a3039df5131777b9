//! The typeface shipped with the crate, and text laid out with it.
//!
//! No system font is assumed: DejaVu Sans (licence in
//! `assets/fonts/LICENSE-DejaVu.txt`) is embedded in the binary and read
//! with `ttf-parser`. Every writer lays text out here, the same way: glyphs
//! by the font's `cmap`, advances from `hmtx` (no kerning), the text box
//! from the `hhea` ascender to its descender, so a label placed at the
//! bottom of the canvas keeps its descenders. SVG and PNG draw the glyph
//! outlines themselves; PDF embeds the font and places the same glyphs.

use super::PlotError;
use std::sync::OnceLock;
use ttf_parser::{Face, GlyphId, OutlineBuilder};

/// The embedded DejaVu Sans regular face.
pub(super) static DEJAVU_SANS: &[u8] = include_bytes!("../../assets/fonts/DejaVuSans.ttf");

/// Family name given to plotters' text styles; every label is laid out
/// here whatever the name.
pub(super) const FAMILY: &str = "sans-serif";

/// The PostScript name of the embedded face (its `name` table, ID 6).
pub(super) const POSTSCRIPT_NAME: &str = "DejaVuSans";

static FACE: OnceLock<Option<Face<'static>>> = OnceLock::new();

/// The parsed face, parsed once per process.
pub(super) fn face() -> Result<&'static Face<'static>, PlotError> {
    FACE.get_or_init(|| Face::parse(DEJAVU_SANS, 0).ok())
        .as_ref()
        .ok_or_else(|| PlotError::Font("embedded DejaVu Sans could not be parsed".into()))
}

/// Vertical metrics of the face in font units: units per em, ascender and
/// descender (negative), from `head` and `hhea`.
pub(super) fn metrics(face: &Face<'_>) -> (f64, f64, f64) {
    (
        f64::from(face.units_per_em()),
        f64::from(face.ascender()),
        f64::from(face.descender()),
    )
}

/// A glyph of a laid-out line: its id and its pen position in font units.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Placed {
    /// Glyph id in the embedded face (0, `.notdef`, for a missing glyph).
    pub id: u16,
    /// The character it shows.
    pub ch: char,
    /// Pen position from the start of the line, font units.
    pub pen: f64,
}

/// A line of text laid out in font units: glyphs and total advance.
#[derive(Debug, Clone, PartialEq)]
pub(super) struct Line {
    pub glyphs: Vec<Placed>,
    pub advance: f64,
}

/// Lays `text` out on one line (control characters are dropped).
pub(super) fn layout(face: &Face<'_>, text: &str) -> Line {
    let mut pen = 0.0;
    let mut glyphs = Vec::with_capacity(text.len());
    for ch in text.chars().filter(|c| !c.is_control()) {
        let id = face.glyph_index(ch).unwrap_or(GlyphId(0));
        glyphs.push(Placed { id: id.0, ch, pen });
        pen += f64::from(face.glyph_hor_advance(id).unwrap_or(0));
    }
    Line {
        glyphs,
        advance: pen,
    }
}

/// Width and height in pixels of `text` at `size` pixels per em: the
/// advance, and ascender minus descender.
pub(super) fn text_size(face: &Face<'_>, text: &str, size: f64) -> (f64, f64) {
    let (upem, asc, desc) = metrics(face);
    let s = size / upem;
    (layout(face, text).advance * s, (asc - desc) * s)
}

/// One drawing command of a glyph outline, in font units (y up).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) enum Seg {
    Move(f64, f64),
    Line(f64, f64),
    Quad(f64, f64, f64, f64),
    Cubic(f64, f64, f64, f64, f64, f64),
    Close,
}

struct Collect(Vec<Seg>);

impl OutlineBuilder for Collect {
    fn move_to(&mut self, x: f32, y: f32) {
        self.0.push(Seg::Move(x.into(), y.into()));
    }
    fn line_to(&mut self, x: f32, y: f32) {
        self.0.push(Seg::Line(x.into(), y.into()));
    }
    fn quad_to(&mut self, x1: f32, y1: f32, x: f32, y: f32) {
        self.0
            .push(Seg::Quad(x1.into(), y1.into(), x.into(), y.into()));
    }
    fn curve_to(&mut self, x1: f32, y1: f32, x2: f32, y2: f32, x: f32, y: f32) {
        self.0.push(Seg::Cubic(
            x1.into(),
            y1.into(),
            x2.into(),
            y2.into(),
            x.into(),
            y.into(),
        ));
    }
    fn close(&mut self) {
        self.0.push(Seg::Close);
    }
}

/// The outline of glyph `id` in font units, and its bounding box
/// `(x_min, y_min, x_max, y_max)` (`None` for an empty glyph such as a
/// space).
pub(super) fn outline(face: &Face<'_>, id: u16) -> (Vec<Seg>, Option<[f64; 4]>) {
    let mut c = Collect(Vec::new());
    let bbox = face.outline_glyph(GlyphId(id), &mut c).map(|r| {
        [
            f64::from(r.x_min),
            f64::from(r.y_min),
            f64::from(r.x_max),
            f64::from(r.y_max),
        ]
    });
    (c.0, bbox)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_and_is_idempotent() {
        assert!(face().is_ok());
        assert!(face().is_ok());
        // TrueType files start with the version tag 0x00010000
        // (OpenType specification, table directory).
        assert_eq!(&DEJAVU_SANS[..4], &[0, 1, 0, 0]);
    }

    /// Reads a big-endian u16 at `at`.
    fn u16_at(b: &[u8], at: usize) -> u16 {
        u16::from_be_bytes([b[at], b[at + 1]])
    }

    /// Offset of table `tag` from the OpenType table directory.
    fn table(b: &[u8], tag: &[u8; 4]) -> usize {
        let n = u16_at(b, 4) as usize;
        (0..n)
            .map(|i| 12 + 16 * i)
            .find(|&r| &b[r..r + 4] == tag)
            .map(|r| u32::from_be_bytes([b[r + 8], b[r + 9], b[r + 10], b[r + 11]]) as usize)
            .expect("table present")
    }

    #[test]
    fn metrics_match_font_tables() {
        // OpenType spec: head.unitsPerEm at offset 18, hhea.ascender at 4,
        // hhea.descender at 6 (signed), read here by hand.
        let b = DEJAVU_SANS;
        let upem = f64::from(u16_at(b, table(b, b"head") + 18));
        let hhea = table(b, b"hhea");
        let asc = f64::from(u16_at(b, hhea + 4) as i16);
        let desc = f64::from(u16_at(b, hhea + 6) as i16);
        let f = face().unwrap();
        assert_eq!(metrics(f), (upem, asc, desc));
    }

    #[test]
    fn layout_advances_and_symbols() {
        let f = face().unwrap();
        // Every symbol the figures use has a glyph of its own.
        for ch in "Åλεσ⁻¹²³⁴⁵⁶⁷⁸⁹⁰×−–ψρ·μ₀ₑₕħαβüπ".chars()
        {
            assert!(f.glyph_index(ch).is_some(), "{ch}");
        }
        let l = layout(f, "AA");
        assert_eq!(l.glyphs.len(), 2);
        assert_eq!(l.glyphs[1].pen * 2.0, l.advance);
        let (w, h) = text_size(f, "", 10.0);
        assert_eq!(w, 0.0);
        assert!(h > 10.0, "ascender to descender spans more than the em");
        let (g, bbox) = outline(f, f.glyph_index('g').unwrap().0);
        assert!(matches!(g[0], Seg::Move(..)));
        assert!(bbox.unwrap()[1] < 0.0, "g has a descender");
    }
}
