//! The typeface shipped with the crate.
//!
//! No system font is assumed: DejaVu Sans (licence in
//! `assets/fonts/LICENSE-DejaVu.txt`) is embedded in the binary and
//! registered with plotters' glyph renderer under the family name
//! `"sans-serif"` the first time a figure is drawn.

use super::PlotError;
use plotters::style::FontStyle;
use std::sync::OnceLock;

/// The embedded DejaVu Sans regular face.
static DEJAVU_SANS: &[u8] = include_bytes!("../../assets/fonts/DejaVuSans.ttf");

/// Family name under which the face is registered; all text uses it.
pub(super) const FAMILY: &str = "sans-serif";

/// Ratio of (ascender - descender) to the em square of DejaVu Sans,
/// (1901 + 483) / 2048 from its `hhea` and `head` tables. The glyph
/// rasteriser scales text so that ascender-to-descender equals the size it
/// is given, whereas SVG `font-size` is the em; bitmap output multiplies
/// the size by this ratio so both show type at the requested point size.
pub(super) const EM_RATIO: f64 = 2384.0 / 2048.0;

/// plotters' SVG backend writes `font-size` as the text size divided by
/// 1.24 (plotters-svg 0.3.7, `draw_text`); SVG output multiplies the size
/// by this factor so `font-size` equals the requested point size.
pub(super) const SVG_RATIO: f64 = 1.24;

static REGISTERED: OnceLock<bool> = OnceLock::new();

/// Registers the embedded face once per process; later calls only report
/// the outcome of the first.
pub(super) fn ensure() -> Result<(), PlotError> {
    let ok = *REGISTERED.get_or_init(|| {
        plotters::style::register_font(FAMILY, FontStyle::Normal, DEJAVU_SANS).is_ok()
    });
    if ok {
        Ok(())
    } else {
        Err(PlotError::Font(
            "embedded DejaVu Sans could not be parsed".into(),
        ))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn registers_and_is_idempotent() {
        assert!(ensure().is_ok());
        assert!(ensure().is_ok());
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
    fn em_ratio_matches_font_tables() {
        // OpenType spec: head.unitsPerEm at offset 18, hhea.ascender at 4,
        // hhea.descender at 6 (signed).
        let b = DEJAVU_SANS;
        let upem = f64::from(u16_at(b, table(b, b"head") + 18));
        let hhea = table(b, b"hhea");
        let asc = f64::from(u16_at(b, hhea + 4) as i16);
        let desc = f64::from(u16_at(b, hhea + 6) as i16);
        approx::assert_abs_diff_eq!((asc - desc) / upem, EM_RATIO, epsilon = 1e-12);
    }
}
