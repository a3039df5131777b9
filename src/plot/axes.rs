//! Helpers shared by the figure kinds: input checks, axis ranges, clipping
//! of data to the axis box, the frame and tick style, dashed lines.
//!
//! Line clipping uses the parametric method of Y.-D. Liang and B. A.
//! Barsky, "A new concept and method for line clipping", ACM Transactions
//! on Graphics 3(1), 1-22 (1984): a segment `p + t (q - p)`, `t` in
//! `[0, 1]`, is cut to the `t` interval where all four inequalities
//! `x0 <= x <= x1`, `y0 <= y <= y1` hold.

use super::font::FAMILY;
use super::style::{Px, Style};
use super::PlotError;
use plotters::coord::ranged1d::{Ranged, ValueFormatter};
use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;

/// A point in data coordinates.
pub(super) type Pt = (f64, f64);

/// An axis-aligned box in data coordinates, `x0 < x1`, `y0 < y1`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) struct Bounds {
    pub x0: f64,
    pub x1: f64,
    pub y0: f64,
    pub y1: f64,
}

impl Bounds {
    /// True if the point lies inside or on the box.
    pub fn contains(&self, (x, y): Pt) -> bool {
        x >= self.x0 && x <= self.x1 && y >= self.y0 && y <= self.y1
    }

    /// True if `x` lies in the horizontal range.
    pub fn has_x(&self, x: f64) -> bool {
        x >= self.x0 && x <= self.x1
    }
}

/// Turns a plotters drawing error into [`PlotError::Draw`].
pub(super) fn draw_err<E: std::error::Error + Send + Sync>(
    e: DrawingAreaErrorKind<E>,
) -> PlotError {
    PlotError::Draw(e.to_string())
}

/// Checks that a data array is non-empty and finite.
pub(super) fn check(what: &str, v: &[f64]) -> Result<(), PlotError> {
    if v.is_empty() {
        return Err(PlotError::Empty(what.to_string()));
    }
    check_finite(what, v)
}

/// Checks that every value is finite (empty is fine).
pub(super) fn check_finite(what: &str, v: &[f64]) -> Result<(), PlotError> {
    match v.iter().position(|x| !x.is_finite()) {
        Some(index) => Err(PlotError::NotFinite {
            what: what.to_string(),
            index,
        }),
        None => Ok(()),
    }
}

/// Checks that two arrays have the same length.
pub(super) fn check_len(what: &str, expected: usize, got: usize) -> Result<(), PlotError> {
    if expected == got {
        Ok(())
    } else {
        Err(PlotError::Length {
            what: what.to_string(),
            expected,
            got,
        })
    }
}

/// Smallest and largest of the values, `None` if there are none.
pub(super) fn extent<I: IntoIterator<Item = f64>>(v: I) -> Option<(f64, f64)> {
    v.into_iter().fold(None, |acc, x| match acc {
        None => Some((x, x)),
        Some((lo, hi)) => Some((lo.min(x), hi.max(x))),
    })
}

/// Widens `(lo, hi)` by `frac` of its span on both sides; a span below
/// 1e-9 of the larger end counts as zero and is widened to `max(|lo| 0.05, 1e-3)` each side (common practice, no source).
pub(super) fn pad((lo, hi): (f64, f64), frac: f64) -> (f64, f64) {
    let span = hi - lo;
    if span > 1e-9 * lo.abs().max(hi.abs()) {
        (lo - frac * span, hi + frac * span)
    } else {
        let d = (lo.abs() * 0.05).max(1e-3);
        (lo - d, hi + d)
    }
}

/// The axis range: the window if one is given, else the padded data extent.
/// Errors with [`PlotError::NoDataInWindow`] when no value falls in the
/// window.
pub(super) fn axis_range(
    what: &str,
    window: Option<(f64, f64)>,
    data: &[f64],
    frac: f64,
) -> Result<(f64, f64), PlotError> {
    match window {
        Some((lo, hi)) => {
            if data.iter().any(|v| *v >= lo && *v <= hi) {
                Ok((lo, hi))
            } else {
                Err(PlotError::NoDataInWindow(format!(
                    "no {what} inside the window ({lo}, {hi})"
                )))
            }
        }
        None => extent(data.iter().copied())
            .map(|e| pad(e, frac))
            .ok_or_else(|| PlotError::Empty(what.to_string())),
    }
}

/// Checks that an axis range can be drawn: finite ends, `lo < hi`, a
/// finite span that is not lost to rounding (over 1e-9 of the larger end)
/// and ends below 1e300 in magnitude.
pub(super) fn usable(what: &str, (lo, hi): (f64, f64)) -> Result<(f64, f64), PlotError> {
    let big = lo.abs().max(hi.abs());
    let span = hi - lo;
    if lo.is_finite() && hi.is_finite() && span.is_finite() && span > 1e-9 * big && big < 1e300 {
        Ok((lo, hi))
    } else {
        Err(PlotError::Invalid(format!(
            "{what} range ({lo}, {hi}) cannot be drawn"
        )))
    }
}

/// Clips segment `p`-`q` to the box (Liang & Barsky 1984); `None` when it
/// misses the box.
pub(super) fn clip_segment(p: Pt, q: Pt, b: &Bounds) -> Option<(Pt, Pt)> {
    let (dx, dy) = (q.0 - p.0, q.1 - p.1);
    let mut t0 = 0.0_f64;
    let mut t1 = 1.0_f64;
    for (pk, qk) in [
        (-dx, p.0 - b.x0),
        (dx, b.x1 - p.0),
        (-dy, p.1 - b.y0),
        (dy, b.y1 - p.1),
    ] {
        if pk == 0.0 {
            if qk < 0.0 {
                return None;
            }
        } else {
            let r = qk / pk;
            if pk < 0.0 {
                t0 = t0.max(r);
            } else {
                t1 = t1.min(r);
            }
        }
    }
    if t0 > t1 {
        return None;
    }
    let at = |t: f64| (p.0 + t * dx, p.1 + t * dy);
    Some((at(t0), at(t1)))
}

/// Clips a polyline to the box, giving the visible pieces (each with at
/// least two points).
pub(super) fn clip_polyline(pts: &[Pt], b: &Bounds) -> Vec<Vec<Pt>> {
    let mut out: Vec<Vec<Pt>> = Vec::new();
    let mut cur: Vec<Pt> = Vec::new();
    for w in pts.windows(2) {
        match clip_segment(w[0], w[1], b) {
            Some((a, c)) => {
                if cur.last() != Some(&a) {
                    if cur.len() >= 2 {
                        out.push(std::mem::take(&mut cur));
                    }
                    cur.clear();
                    cur.push(a);
                }
                cur.push(c);
            }
            None => {
                if cur.len() >= 2 {
                    out.push(std::mem::take(&mut cur));
                }
                cur.clear();
            }
        }
    }
    if cur.len() >= 2 {
        out.push(cur);
    }
    out
}

/// Splits the horizontal segment from `xa` to `xb` at height `y` into dashes
/// `dash` long with gaps `gap` long (data units).
pub(super) fn dashes(xa: f64, xb: f64, y: f64, dash: f64, gap: f64) -> Vec<[Pt; 2]> {
    let mut out = Vec::new();
    if !(dash > 0.0 && gap >= 0.0) || xb <= xa {
        return out;
    }
    let mut x = xa;
    while x < xb && out.len() < 10_000 {
        out.push([(x, y), ((x + dash).min(xb), y)]);
        x += dash + gap;
    }
    out
}

/// Text style for tick labels and axis titles at `scale` times the type
/// size.
pub(super) fn text(px: &Px, style: &Style, scale: f64) -> TextStyle<'static> {
    (FAMILY, px.font * scale)
        .into_font()
        .color(&style.ink.rgb())
}

/// Label-area sizes in pixels: (left, bottom) for tick labels plus title,
/// a fixed estimate used where the labels are not measured.
pub(super) fn label_areas(px: &Px) -> (u32, u32) {
    ((px.font * 4.4) as u32, (px.font * 2.7) as u32)
}

/// Number of tick labels for an axis `len` pixels long: one per `per`
/// type sizes, 2 to 8.
pub(super) fn tick_count(len: u32, px: &Px, per: f64) -> usize {
    ((f64::from(len) / (px.font * per)) as usize).clamp(2, 8)
}

/// Formats a tick value: up to six decimals with trailing zeros removed,
/// scientific notation below 1e-4 or from 1e7 in magnitude, and the
/// typographic minus sign U+2212 instead of a hyphen.
pub(super) fn nice(v: f64) -> String {
    plain(v).replace('-', "\u{2212}")
}

/// [`nice`] with ASCII hyphens.
fn plain(v: f64) -> String {
    let a = v.abs();
    if a == 0.0 {
        return "0".into();
    }
    if !(1e-4..1e7).contains(&a) {
        let s = format!("{v:e}");
        return match s.split_once('e') {
            Some((m, e)) => {
                let m = if m.contains('.') {
                    m.trim_end_matches('0').trim_end_matches('.')
                } else {
                    m
                };
                format!("{m}e{e}")
            }
            None => s,
        };
    }
    let s = format!("{v:.6}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    if s == "-0" {
        "0".into()
    } else {
        s.to_string()
    }
}

/// Width of a vertical-axis label area in pixels: the widest tick label
/// of a linear axis over `range` with about `n` ticks, plus tick, gaps
/// and a rotated title line.
pub(super) fn y_area<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    px: &Px,
    style: &Style,
    range: (f64, f64),
    n: usize,
) -> u32 {
    let font = text(px, style, 1.0);
    let keys = RangedCoordf64::from(range.0..range.1).key_points(n);
    let widest = keys
        .iter()
        .filter_map(|v| root.estimate_text_size(&nice(*v), &font).ok())
        .map(|(w, _)| w)
        .max()
        .unwrap_or((px.font * 2.0) as u32);
    (f64::from(widest) * 1.1 + px.font * 2.1) as u32
}

/// Ticks per vertical axis of a panel `h` pixels high (type sizes per
/// tick: 2.6).
pub(super) fn y_ticks(h: u32, px: &Px) -> usize {
    tick_count(h, px, 2.6).max(3)
}

/// Draws ticks, tick labels and axis titles (no grid lines), short ticks
/// outside the plotting area, then a thin frame around it.
/// `x_labels = false` leaves the x tick labels empty (for stacked panels).
pub(super) fn frame<DB, X, Y>(
    chart: &mut ChartContext<'_, DB, Cartesian2d<X, Y>>,
    px: &Px,
    style: &Style,
    x_desc: &str,
    y_desc: &str,
    x_labels: bool,
) -> Result<(), PlotError>
where
    DB: DrawingBackend,
    X: Ranged<ValueType = f64> + ValueFormatter<f64>,
    Y: Ranged<ValueType = f64> + ValueFormatter<f64>,
{
    let ink = style.ink.rgb();
    let blank = |_: &f64| String::new();
    let fmt = |v: &f64| nice(*v);
    let (w, h) = chart.plotting_area().dim_in_pixel();
    let shrink = title_scale(
        &chart.plotting_area().strip_coord_spec(),
        px,
        style,
        &[(x_desc, w), (y_desc, h)],
    );
    let mut mesh = chart.configure_mesh();
    mesh.disable_mesh()
        .set_all_tick_mark_size(px.pt(3.0))
        .axis_style(ink.stroke_width(px.thin))
        .label_style(text(px, style, 1.0))
        .axis_desc_style(text(px, style, shrink))
        .x_labels(tick_count(w, px, 5.0))
        .y_labels(y_ticks(h, px))
        .y_label_formatter(&fmt)
        .x_desc(x_desc)
        .y_desc(y_desc);
    if x_labels {
        mesh.x_label_formatter(&fmt);
    } else {
        mesh.x_label_formatter(&blank);
    }
    mesh.draw().map_err(draw_err)?;
    outline(&chart.plotting_area().strip_coord_spec(), px, style)
}

/// The type scale (at most 1) at which every axis title fits the length
/// of its axis: a title longer than its axis at the full type size (a
/// long title on a small printed figure) is set smaller rather than run
/// past the canvas.
pub(super) fn title_scale<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    px: &Px,
    style: &Style,
    titles: &[(&str, u32)],
) -> f64 {
    let font = text(px, style, 1.0);
    titles
        .iter()
        .filter(|(t, _)| !t.is_empty())
        .filter_map(|(t, len)| {
            let (w, _) = area.estimate_text_size(t, &font).ok()?;
            (w > 0).then(|| 0.98 * f64::from(*len) / f64::from(w))
        })
        .fold(1.0, f64::min)
        .max(0.3)
}

/// A thin rectangle around a drawing area.
pub(super) fn outline<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    px: &Px,
    style: &Style,
) -> Result<(), PlotError> {
    let (w, h) = area.dim_in_pixel();
    let (w, h) = (w as i32 - 1, h as i32 - 1);
    area.draw(&Rectangle::new(
        [(0, 0), (w, h)],
        style.ink.rgb().stroke_width(px.thin),
    ))
    .map_err(draw_err)
}

/// An axis title: `name (unit)` with the unit as its symbol
/// ([`super::unit_symbol`]), or just `name` when the unit is empty.
pub(super) fn titled(name: &str, unit: &str) -> String {
    super::titles::with_unit(name, unit)
}

/// The sample drawn beside a legend entry.
#[derive(Debug, Clone, Copy)]
pub(super) enum Swatch {
    /// A filled circle of radius `r` pixels.
    Dot(RGBColor, i32),
    /// A filled triangle of size `r`.
    Triangle(RGBColor, i32),
    /// An open square of half side `r`, stroked `w` pixels.
    Square(RGBColor, i32, u32),
    /// A short line, `w` pixels wide.
    Line(RGBColor, u32),
}

/// An open square of half side `r` centred on pixel `c`.
pub(super) fn square(c: (i32, i32), r: i32, colour: RGBColor, w: u32) -> PathElement<(i32, i32)> {
    let (x, y) = c;
    PathElement::new(
        vec![
            (x - r, y - r),
            (x + r, y - r),
            (x + r, y + r),
            (x - r, y + r),
            (x - r, y - r),
        ],
        colour.stroke_width(w),
    )
}

/// Draws a one-line legend whose last entry ends at pixel `right` of
/// `area`, centred on row `y`: each entry its swatch then its words,
/// entries laid out from right to left.
pub(super) fn legend<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    px: &Px,
    style: &Style,
    (right, y): (i32, i32),
    entries: &[(Swatch, &str)],
) -> Result<(), PlotError> {
    use plotters::style::text_anchor::{HPos, Pos, VPos};
    let font = text(px, style, 0.9).pos(Pos::new(HPos::Left, VPos::Center));
    let mut x = right;
    for (swatch, words) in entries.iter().rev() {
        let w = area
            .estimate_text_size(words, &font)
            .map(|(w, _)| w as i32)
            .unwrap_or((px.font * 3.0) as i32);
        x -= w;
        area.draw(&Text::new(words.to_string(), (x, y), font.clone()))
            .map_err(draw_err)?;
        x -= px.pt(4.0);
        match *swatch {
            Swatch::Dot(c, r) => {
                area.draw(&Circle::new((x - r, y), r, c.filled()))
                    .map_err(draw_err)?;
                x -= 2 * r;
            }
            Swatch::Triangle(c, r) => {
                area.draw(&TriangleMarker::new((x - r, y), r + 1, c.filled()))
                    .map_err(draw_err)?;
                x -= 2 * r;
            }
            Swatch::Square(c, r, w) => {
                area.draw(&square((x - r, y), r, c, w)).map_err(draw_err)?;
                x -= 2 * r;
            }
            Swatch::Line(c, w) => {
                let len = px.pt(14.0);
                area.draw(&PathElement::new(
                    vec![(x - len, y), (x, y)],
                    c.stroke_width(w),
                ))
                .map_err(draw_err)?;
                x -= len;
            }
        }
        x -= px.pt(12.0);
    }
    Ok(())
}

/// A plain linear chart type used by most figures.
pub(super) type Linear<'a, DB> = ChartContext<'a, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>;

/// Draws the clipped pieces of a polyline.
pub(super) fn polyline<DB: DrawingBackend>(
    chart: &mut Linear<'_, DB>,
    pts: &[Pt],
    b: &Bounds,
    st: ShapeStyle,
) -> Result<(), PlotError> {
    for piece in clip_polyline(pts, b) {
        chart
            .draw_series(std::iter::once(PathElement::new(piece, st)))
            .map_err(draw_err)?;
    }
    Ok(())
}

/// The data bounds of a linear chart.
pub(super) fn bounds_of(x: (f64, f64), y: (f64, f64)) -> Bounds {
    Bounds {
        x0: x.0,
        x1: x.1,
        y0: y.0,
        y1: y.1,
    }
}

/// Writes an integer exponent with Unicode superscript digits.
pub(super) fn superscript(k: i32) -> String {
    k.to_string()
        .chars()
        .map(|c| match c {
            '-' => '⁻',
            '0' => '⁰',
            '1' => '¹',
            '2' => '²',
            '3' => '³',
            '4' => '⁴',
            '5' => '⁵',
            '6' => '⁶',
            '7' => '⁷',
            '8' => '⁸',
            _ => '⁹',
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;
    use proptest::prelude::*;

    const B: Bounds = Bounds {
        x0: 0.0,
        x1: 1.0,
        y0: 0.0,
        y1: 1.0,
    };

    #[test]
    fn clips_crossing_segment() {
        // Line y = x from (-1,-1) to (2,2) enters at (0,0) and leaves at
        // (1,1): closed form.
        let (a, c) = clip_segment((-1.0, -1.0), (2.0, 2.0), &B).unwrap();
        assert_abs_diff_eq!(a.0, 0.0, epsilon = 1e-12);
        assert_abs_diff_eq!(a.1, 0.0, epsilon = 1e-12);
        assert_abs_diff_eq!(c.0, 1.0, epsilon = 1e-12);
        assert_abs_diff_eq!(c.1, 1.0, epsilon = 1e-12);
        assert!(clip_segment((2.0, 0.0), (3.0, 1.0), &B).is_none());
    }

    #[test]
    fn polyline_splits_at_excursion() {
        // Goes out of the top and comes back: two visible pieces.
        let pts = [(0.1, 0.5), (0.3, 2.0), (0.5, 0.5), (0.9, 0.5)];
        let pieces = clip_polyline(&pts, &B);
        assert_eq!(pieces.len(), 2);
        assert_abs_diff_eq!(pieces[0][1].1, 1.0, epsilon = 1e-12);
        assert_eq!(pieces[1].len(), 3);
    }

    #[test]
    fn window_without_data_is_error() {
        let r = axis_range("x", Some((5.0, 6.0)), &[1.0, 2.0], 0.05);
        assert!(matches!(r, Err(PlotError::NoDataInWindow(_))));
        let r = axis_range("x", None, &[1.0, 3.0], 0.5).unwrap();
        assert_eq!(r, (0.0, 4.0));
        assert!(usable("x", (-f64::MAX, f64::MAX)).is_err());
        assert!(usable("x", (1.0, 1.0 + 1e-12)).is_err());
        assert!(usable("x", (2.0, 1.0)).is_err());
        assert!(usable("x", (0.0, 1e-20)).is_ok());
    }

    #[test]
    fn tick_text() {
        // Expected strings written out by hand (common practice, no source).
        assert_eq!(nice(50000.0), "50000");
        assert_eq!(nice(0.1 + 0.2), "0.3");
        assert_eq!(nice(-0.0), "0");
        assert_eq!(nice(2.5e-6), "2.5e\u{2212}6");
        assert_eq!(nice(1e-5), "1e\u{2212}5");
        assert_eq!(nice(-1.25), "\u{2212}1.25");
        assert_eq!(nice(-2.5e-6), "\u{2212}2.5e\u{2212}6");
    }

    #[test]
    fn dashes_cover_segment() {
        let d = dashes(0.0, 1.0, 0.5, 0.2, 0.1);
        // 0, 0.3, 0.6, 0.9 start dashes; the last is cut at 1.0.
        assert_eq!(d.len(), 4);
        assert_abs_diff_eq!(d[3][1].0, 1.0, epsilon = 1e-12);
    }

    proptest! {
        #[test]
        fn clipped_points_lie_in_box(
            pts in proptest::collection::vec((-3.0..3.0f64, -3.0..3.0f64), 2..20)
        ) {
            for piece in clip_polyline(&pts, &B) {
                prop_assert!(piece.len() >= 2);
                for p in piece {
                    prop_assert!(p.0 >= -1e-12 && p.0 <= 1.0 + 1e-12);
                    prop_assert!(p.1 >= -1e-12 && p.1 <= 1.0 + 1e-12);
                }
            }
        }
    }
}
