//! Convergence figure: absolute error of each level against the grid
//! spacing h on log-log axes, with a dashed reference line of slope p, the
//! order of the discretisation, `|error| = C h^p`. A scheme of order p
//! shows as data parallel to the line once h is small enough (R. J.
//! LeVeque, Finite Difference Methods for Ordinary and Partial Differential
//! Equations, SIAM 2007, Appendix A.6).
//!
//! The reference line passes a factor 0.4 below the first series' error at
//! its smallest spacing, so it runs beside the data rather than on it.
//! Zero or negative errors cannot be shown on a log axis and are skipped.

use super::axes::{
    check, check_finite, check_len, clip_polyline, draw_err, extent, label_areas, nice, outline,
    superscript, text, titled, usable, Bounds, Pt,
};
use super::style::Px;
use super::{PlotError, Style};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// Factor by which the reference line sits below the anchoring point.
pub const REFERENCE_OFFSET: f64 = 0.4;

/// Errors of one level (or quantity) at each spacing.
#[derive(Debug, Clone, PartialEq)]
pub struct ErrorSeries {
    /// Legend text, e.g. "n = 1".
    pub label: String,
    /// Absolute errors, one per spacing, in the figure's error unit.
    pub error: Vec<f64>,
}

/// Error against spacing on log-log axes.
#[derive(Debug, Clone, PartialEq)]
pub struct ConvergeFigure {
    /// Grid spacings (> 0), in `h_unit`.
    pub h: Vec<f64>,
    /// One series per level.
    pub series: Vec<ErrorSeries>,
    /// Expected order p of the scheme (> 0): slope of the reference line.
    pub order: f64,
    /// Unit of h, default "Å".
    pub h_unit: String,
    /// Unit of the error, default "eV".
    pub error_unit: String,
}

impl ConvergeFigure {
    /// A figure with units "Å" and "eV".
    pub fn new(h: Vec<f64>, series: Vec<ErrorSeries>, order: f64) -> Self {
        ConvergeFigure {
            h,
            series,
            order,
            h_unit: "Å".into(),
            error_unit: "eV".into(),
        }
    }

    /// Checks lengths, finiteness, positive spacings and order.
    pub(super) fn validate(&self) -> Result<(), PlotError> {
        check("spacings", &self.h)?;
        if let Some(i) = self.h.iter().position(|h| *h <= 0.0) {
            return Err(PlotError::Invalid(format!(
                "spacing {i} is not positive ({})",
                self.h[i]
            )));
        }
        if self.series.is_empty() {
            return Err(PlotError::Empty("error series".into()));
        }
        for s in &self.series {
            check_len(&format!("errors {}", s.label), self.h.len(), s.error.len())?;
            check_finite(&format!("errors {}", s.label), &s.error)?;
        }
        if !(self.order.is_finite() && self.order > 0.0) {
            return Err(PlotError::Invalid(format!(
                "order {} must be positive",
                self.order
            )));
        }
        Ok(())
    }
}

/// Clips a polyline in log10 space and maps the pieces back.
fn clip_log(pts: &[Pt], b: &Bounds) -> Vec<Vec<Pt>> {
    let lb = Bounds {
        x0: b.x0.log10(),
        x1: b.x1.log10(),
        y0: b.y0.log10(),
        y1: b.y1.log10(),
    };
    let lp: Vec<Pt> = pts.iter().map(|p| (p.0.log10(), p.1.log10())).collect();
    clip_polyline(&lp, &lb)
        .into_iter()
        .map(|piece| {
            piece
                .into_iter()
                .map(|(x, y)| (10f64.powf(x), 10f64.powf(y)))
                .collect()
        })
        .collect()
}

/// Reference line `C h^p` over `[h0, h1]`: `C` from the first series'
/// positive error at its smallest spacing.
fn reference(fig: &ConvergeFigure, (h0, h1): (f64, f64)) -> Option<[Pt; 2]> {
    let s = fig.series.first()?;
    let (h, e) = fig
        .h
        .iter()
        .zip(&s.error)
        .filter(|(h, e)| **e > 0.0 && **h >= h0 && **h <= h1)
        .min_by(|a, b| a.0.total_cmp(b.0))?;
    let c = REFERENCE_OFFSET * e / h.powf(fig.order);
    Some([(h0, c * h0.powf(fig.order)), (h1, c * h1.powf(fig.order))])
}

/// Ticks of a log axis over `[lo, hi]`: labelled ticks at powers of ten
/// (and at 2 and 5 times them when the range spans under 2.5 decades) and
/// unlabelled minor ticks at the other integer multiples. Powers beyond
/// 10^-3..10^4 are written `10ᵏ`.
fn log_ticks(lo: f64, hi: f64) -> (Vec<(f64, String)>, Vec<f64>) {
    let (mut major, mut minor) = (Vec::new(), Vec::new());
    if !(lo > 0.0 && hi > lo && lo.is_finite() && hi.is_finite()) {
        return (major, minor);
    }
    let few = (hi / lo).log10() < 2.5;
    let (k0, k1) = (lo.log10().floor() as i32, hi.log10().ceil() as i32);
    for k in k0..=k1 {
        let p = 10f64.powi(k);
        for m in 1..=9 {
            let v = f64::from(m) * p;
            if v < lo * (1.0 - 1e-12) || v > hi * (1.0 + 1e-12) {
                continue;
            }
            if m == 1 {
                let s = if (-3..=4).contains(&k) {
                    nice(v)
                } else {
                    format!("10{}", superscript(k))
                };
                major.push((v, s));
            } else if few && (m == 2 || m == 5) {
                major.push((v, nice(v)));
            } else {
                minor.push(v);
            }
        }
    }
    (major, minor)
}

/// Draws outward ticks and labels of both log axes of the chart.
fn log_axis_marks<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    to_px: &dyn Fn(Pt) -> (i32, i32),
    (xt, yt): (&LogTicks, &LogTicks),
    (h0, e0): (f64, f64),
    style: &Style,
    px: &Px,
) -> Result<(), PlotError> {
    let ink = style.ink.rgb().stroke_width(px.thin);
    let long = px.pt(3.0);
    let short = px.pt(1.8);
    let gap = px.pt(2.5);
    let xfont = text(px, style, 1.0).pos(Pos::new(HPos::Center, VPos::Top));
    let yfont = text(px, style, 1.0).pos(Pos::new(HPos::Right, VPos::Center));
    let tick = |a: (i32, i32), c: (i32, i32)| PathElement::new(vec![a, c], ink);
    for (v, s) in &xt.0 {
        let (x, y) = to_px((*v, e0));
        root.draw(&tick((x, y), (x, y + long))).map_err(draw_err)?;
        root.draw(&Text::new(s.clone(), (x, y + long + gap), xfont.clone()))
            .map_err(draw_err)?;
    }
    for v in &xt.1 {
        let (x, y) = to_px((*v, e0));
        root.draw(&tick((x, y), (x, y + short))).map_err(draw_err)?;
    }
    for (v, s) in &yt.0 {
        let (x, y) = to_px((h0, *v));
        root.draw(&tick((x - long, y), (x, y))).map_err(draw_err)?;
        root.draw(&Text::new(s.clone(), (x - long - gap, y), yfont.clone()))
            .map_err(draw_err)?;
    }
    for v in &yt.1 {
        let (x, y) = to_px((h0, *v));
        root.draw(&tick((x - short, y), (x, y))).map_err(draw_err)?;
    }
    Ok(())
}

/// Labelled and minor ticks of a log axis.
type LogTicks = (Vec<(f64, String)>, Vec<f64>);

/// Draws the figure on `root`.
pub(super) fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    fig: &ConvergeFigure,
    style: &Style,
    px: &Px,
) -> Result<(), PlotError> {
    let (h0, h1) = match style.x_window {
        Some((a, c)) => {
            if a <= 0.0 {
                return Err(PlotError::BadStyle(format!(
                    "spacing window ({a}, {c}) must be positive on a log axis"
                )));
            }
            (a, c)
        }
        None => {
            let (a, c) =
                extent(fig.h.iter().copied()).ok_or_else(|| PlotError::Empty("spacings".into()))?;
            (a / 1.3, c * 1.3)
        }
    };
    let errs: Vec<f64> = fig
        .series
        .iter()
        .flat_map(|s| {
            fig.h
                .iter()
                .zip(&s.error)
                .filter(|(h, e)| **e > 0.0 && **h >= h0 && **h <= h1)
                .map(|(_, e)| *e)
        })
        .collect();
    let (e0, e1) = extent(errs.iter().copied()).ok_or_else(|| {
        PlotError::NoDataInWindow(format!("no positive error at spacings inside ({h0}, {h1})"))
    })?;
    let reference = reference(fig, (h0, h1));
    let (e0, e1) = match reference {
        Some([a, _]) => (e0.min(a.1.max(e0 / 1e3)), e1),
        None => (e0, e1),
    };
    let (e0, e1) = (e0 / 2.5, e1 * 2.5);
    let (h0, h1) = usable("spacing", (h0, h1))?;
    let (e0, e1) = usable("error", (e0, e1))?;
    let b = Bounds {
        x0: h0,
        x1: h1,
        y0: e0,
        y1: e1,
    };

    let (_, bottom) = label_areas(px);
    let m = (px.font * 0.9) as u32;
    let xt = log_ticks(h0, h1);
    let yt = log_ticks(e0, e1);
    let font = text(px, style, 1.0);
    let widest =
        yt.0.iter()
            .filter_map(|(_, s)| root.estimate_text_size(s, &font).ok())
            .map(|(w, _)| w)
            .max()
            .unwrap_or((px.font * 2.0) as u32);
    let left = (f64::from(widest) * 1.1 + px.font * 2.1) as u32;
    let mut chart = ChartBuilder::on(root)
        .margin(m)
        .margin_right(px.pt(14.0))
        .x_label_area_size(bottom)
        .y_label_area_size(left)
        .build_cartesian_2d((h0..h1).log_scale(), (e0..e1).log_scale())
        .map_err(draw_err)?;
    chart
        .configure_mesh()
        .disable_mesh()
        .x_labels(0)
        .y_labels(0)
        .set_all_tick_mark_size(0)
        .x_label_formatter(&|_| String::new())
        .y_label_formatter(&|_| String::new())
        .axis_style(style.ink.rgb().stroke_width(px.thin))
        .axis_desc_style(text(px, style, 1.0))
        .x_desc(titled("spacing h", &fig.h_unit))
        .y_desc(titled("|error|", &fig.error_unit))
        .draw()
        .map_err(draw_err)?;
    outline(&chart.plotting_area().strip_coord_spec(), px, style)?;
    log_axis_marks(
        root,
        &|p| chart.backend_coord(&p),
        (&xt, &yt),
        (h0, e0),
        style,
        px,
    )?;

    // Data first, so the slope label can keep clear of it.
    let r = px.pt(2.6);
    let mut drawn: Vec<(i32, i32)> = Vec::new();
    for (j, s) in fig.series.iter().enumerate() {
        let look = Look::of(j, style);
        let colour = look.colour;
        let mut pts: Vec<Pt> = fig
            .h
            .iter()
            .copied()
            .zip(s.error.iter().copied())
            .filter(|p| p.1 > 0.0)
            .collect();
        pts.sort_by(|a, c| a.0.total_cmp(&c.0));
        let st = colour.stroke_width(px.line);
        for piece in clip_log(&pts, &b) {
            for w in piece.windows(2) {
                let (a, c) = (chart.backend_coord(&w[0]), chart.backend_coord(&w[1]));
                for k in 0..=8 {
                    let t = f64::from(k) / 8.0;
                    drawn.push((
                        a.0 + (f64::from(c.0 - a.0) * t) as i32,
                        a.1 + (f64::from(c.1 - a.1) * t) as i32,
                    ));
                }
            }
            match look.dash {
                Some((on, off)) => chart
                    .draw_series(DashedLineSeries::new(piece, px.pt(on), px.pt(off), st))
                    .map(|_| ()),
                None => chart
                    .draw_series(std::iter::once(PathElement::new(piece, st)))
                    .map(|_| ()),
            }
            .map_err(draw_err)?;
        }
        for p in pts.into_iter().filter(|p| b.contains(*p)) {
            let c = chart.backend_coord(&p);
            drawn.push(c);
            marker(root, c, look.marker, r, colour)?;
        }
        let w = px.pt(16.0);
        let (marker_kind, dash) = (look.marker, look.dash);
        chart
            .draw_series(std::iter::empty::<Circle<(f64, f64), i32>>())
            .map_err(draw_err)?
            .label(s.label.clone())
            .legend(move |(x, y)| {
                // Three pieces: joined for a solid line, apart for a dashed one.
                let gap = if dash.is_some() { w / 10 } else { 0 };
                let third = w / 3;
                let seg = |i: i32| {
                    let a = -w / 2 + i * third;
                    PathElement::new(vec![(a + gap / 2, 0), (a + third - gap / 2, 0)], st)
                };
                EmptyElement::at((x, y))
                    + seg(0)
                    + seg(1)
                    + seg(2)
                    + Polygon::new(marker_shape((0, 0), marker_kind, r), colour.filled())
            });
    }

    if let Some(line) = reference {
        let ink = style.ink.rgb().stroke_width(px.thin);
        for piece in clip_log(&line, &b) {
            chart
                .draw_series(DashedLineSeries::new(
                    piece.clone(),
                    px.pt(5.0),
                    px.pt(3.5),
                    ink,
                ))
                .map_err(draw_err)?;
            let ends = (
                chart.backend_coord(&piece[0]),
                chart.backend_coord(&piece[piece.len() - 1]),
            );
            let label = format!("slope {}", nice(fig.order));
            let area = chart.plotting_area().get_pixel_range();
            let (pos, anchor) = slope_place(root, &label, ends, &drawn, area, style, px);
            root.draw(&Text::new(label, pos, text(px, style, 0.9).pos(anchor)))
                .map_err(draw_err)?;
        }
    }

    chart
        .configure_series_labels()
        .position(SeriesLabelPosition::LowerRight)
        .margin(px.pt(6.0))
        .legend_area_size(px.pt(22.0))
        .label_font(text(px, style, 0.9))
        .border_style(style.ink.rgb().stroke_width(px.thin))
        .background_style(WHITE)
        .draw()
        .map_err(draw_err)?;
    Ok(())
}

/// Marker shapes, in the order they are used.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Marker {
    Circle,
    Triangle,
    Square,
    Diamond,
}

const MARKERS: [Marker; 4] = [
    Marker::Circle,
    Marker::Triangle,
    Marker::Square,
    Marker::Diamond,
];

/// Dash patterns (on, off) in points, in the order they are used; `None`
/// is solid.
const DASHES: [Option<(f64, f64)>; 3] = [None, Some((5.0, 3.0)), Some((1.5, 2.0))];

/// How series `j` is drawn: colours cycle fastest, then markers, then
/// dash patterns, so the first `colours × 4 × 3` series all differ.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Look {
    colour: RGBColor,
    marker: Marker,
    dash: Option<(f64, f64)>,
}

impl Look {
    fn of(j: usize, style: &Style) -> Look {
        let n = style.palette.len().max(1);
        Look {
            colour: style.series(j).rgb(),
            marker: MARKERS[(j / n) % MARKERS.len()],
            dash: DASHES[(j / (n * MARKERS.len())) % DASHES.len()],
        }
    }
}

/// The outline of a marker of size `r` about pixel `c` (a circle as a
/// 16-gon).
fn marker_shape((x, y): (i32, i32), m: Marker, r: i32) -> Vec<(i32, i32)> {
    let rf = f64::from(r);
    let around = |n: usize, turn: f64, scale: f64| -> Vec<(i32, i32)> {
        (0..n)
            .map(|k| {
                let a = turn + std::f64::consts::TAU * k as f64 / n as f64;
                (
                    x + (scale * rf * a.cos()).round() as i32,
                    y + (scale * rf * a.sin()).round() as i32,
                )
            })
            .collect()
    };
    match m {
        Marker::Circle => around(16, 0.0, 1.0),
        Marker::Triangle => around(3, -std::f64::consts::FRAC_PI_2, 1.3),
        Marker::Square => around(4, std::f64::consts::FRAC_PI_4, 1.25),
        Marker::Diamond => around(4, 0.0, 1.35),
    }
}

/// Draws one marker at pixel `c`.
fn marker<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: (i32, i32),
    m: Marker,
    r: i32,
    colour: RGBColor,
) -> Result<(), PlotError> {
    match m {
        Marker::Circle => root.draw(&Circle::new(c, r, colour.filled())),
        _ => root.draw(&Polygon::new(marker_shape(c, m, r), colour.filled())),
    }
    .map_err(draw_err)
}

/// Where the slope label goes: of a few places beside the reference line
/// (near either end or the middle, above or below it), the one inside the
/// plot whose box stays farthest from the drawn data.
fn slope_place<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    label: &str,
    (a, c): ((i32, i32), (i32, i32)),
    drawn: &[(i32, i32)],
    (xs, ys): (std::ops::Range<i32>, std::ops::Range<i32>),
    style: &Style,
    px: &Px,
) -> ((i32, i32), Pos) {
    let font = text(px, style, 0.9);
    let (w, h) = root
        .estimate_text_size(label, &font)
        .map(|(w, h)| (w as i32, h as i32))
        .unwrap_or(((px.font * 4.0) as i32, px.font as i32));
    let gap = (px.font * 0.5) as i32;
    let mut best: Option<(f64, (i32, i32), Pos)> = None;
    for t in [0.2, 0.5, 0.8] {
        let p = (
            a.0 + (f64::from(c.0 - a.0) * t) as i32,
            a.1 + (f64::from(c.1 - a.1) * t) as i32,
        );
        for below in [true, false] {
            // The box's top-left corner and the anchor that puts it there.
            let (top, pos, anchor) = if below {
                (
                    p.1 + gap,
                    (p.0 + gap, p.1 + gap),
                    Pos::new(HPos::Left, VPos::Top),
                )
            } else {
                (
                    p.1 - gap - h,
                    (p.0 - gap, p.1 - gap),
                    Pos::new(HPos::Right, VPos::Bottom),
                )
            };
            let left = if below { p.0 + gap } else { p.0 - gap - w };
            if left < xs.start || left + w > xs.end || top < ys.start || top + h > ys.end {
                continue;
            }
            let clear = drawn
                .iter()
                .map(|&(x, y)| {
                    let dx = (left - x).max(x - (left + w)).max(0);
                    let dy = (top - y).max(y - (top + h)).max(0);
                    f64::from(dx).hypot(f64::from(dy))
                })
                .fold(f64::INFINITY, f64::min);
            if best.as_ref().is_none_or(|b| clear > b.0) {
                best = Some((clear, pos, anchor));
            }
        }
    }
    match best {
        Some((_, pos, anchor)) => (pos, anchor),
        None => {
            let mid = ((a.0 + c.0) / 2, (a.1 + c.1) / 2);
            ((mid.0 + gap, mid.1 + gap), Pos::new(HPos::Left, VPos::Top))
        }
    }
}

#[cfg(test)]
pub(super) fn sample() -> ConvergeFigure {
    // Second-order scheme: error = c_n h^2 with c_n = 0.01 n^2 (synthetic).
    let h: Vec<f64> = vec![0.4, 0.2, 0.1, 0.05, 0.025];
    let series = (1..=3)
        .map(|n| ErrorSeries {
            label: format!("n = {n}"),
            error: h.iter().map(|h| 0.01 * (n * n) as f64 * h * h).collect(),
        })
        .collect();
    ConvergeFigure::new(h, series, 2.0)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plot::testkit::{count, render_both, stroked};
    use crate::plot::Figure;
    use approx::assert_relative_eq;

    #[test]
    fn reference_has_order_slope() {
        let f = sample();
        let [a, c] = reference(&f, (0.01, 1.0)).unwrap();
        // Slope in log space equals the order (closed form).
        let slope = (c.1.log10() - a.1.log10()) / (c.0.log10() - a.0.log10());
        assert_relative_eq!(slope, 2.0, max_relative = 1e-12);
        // Anchored 0.4 below n = 1 at h = 0.025: 0.4 * 0.01 * 0.025^2.
        let at = 0.4 * 0.01 * 0.025f64.powi(2);
        assert_relative_eq!(a.1 * (0.025f64 / 0.01).powi(2), at, max_relative = 1e-12);
    }

    #[test]
    fn log_tick_choice() {
        // Worked out by hand for 0.019..0.52 (under 2.5 decades).
        let (major, minor) = log_ticks(0.019, 0.52);
        let v: Vec<f64> = major.iter().map(|m| m.0).collect();
        let expect = [0.02, 0.05, 0.1, 0.2, 0.5];
        assert_eq!(v.len(), expect.len());
        for (a, b) in v.iter().zip(expect) {
            assert_relative_eq!(*a, b, max_relative = 1e-12);
        }
        // Minor: 0.03, 0.04, 0.06, 0.07, 0.08, 0.09, 0.3, 0.4.
        assert_eq!(minor.len(), 8);
        let (major, _) = log_ticks(1e-7, 1e-2);
        let s: Vec<&str> = major.iter().map(|m| m.1.as_str()).collect();
        assert_eq!(s, ["10⁻⁷", "10⁻⁶", "10⁻⁵", "10⁻⁴", "0.001", "0.01"]);
    }

    #[test]
    fn renders_series() {
        let style = Style::default();
        let svg = render_both(&Figure::Converge(sample()), &style, "converge");
        for j in 0..3 {
            let c = style.series(j).hex();
            assert_eq!(count(&svg, "circle", "fill", &c), 5);
            // One data line plus its legend swatch in three pieces.
            assert_eq!(stroked(&svg, &c).len(), 4);
        }
    }

    #[test]
    fn many_series_stay_distinct() {
        // 30 levels: no two share colour, marker and dash.
        let style = Style::default();
        let looks: Vec<Look> = (0..30).map(|j| Look::of(j, &style)).collect();
        for i in 0..looks.len() {
            for j in 0..i {
                assert_ne!(looks[i], looks[j], "series {j} and {i}");
            }
        }
        // n = 1 and n = 7 share a colour but not a marker.
        assert_eq!(looks[0].colour, looks[6].colour);
        assert_ne!(looks[0].marker, looks[6].marker);
        let h: Vec<f64> = vec![0.4, 0.2, 0.1, 0.05];
        let series = (1..=14)
            .map(|n| ErrorSeries {
                label: format!("n = {n}"),
                error: h.iter().map(|h| 0.01 * f64::from(n) * h * h).collect(),
            })
            .collect();
        let svg = render_both(
            &Figure::Converge(ConvergeFigure::new(h, series, 2.0)),
            &style,
            "converge_many",
        );
        // Series 7..12 draw triangles, squares or diamonds as polygons.
        assert!(svg.matches("<polygon").count() >= 4 * 8);
    }

    #[test]
    fn skips_zero_errors_and_rejects_bad() {
        let mut f = sample();
        f.series[0].error[4] = 0.0;
        let style = Style::default();
        let svg = render_both(&Figure::Converge(f), &style, "converge_zero");
        assert_eq!(count(&svg, "circle", "fill", &style.series(0).hex()), 4);
        let mut f = sample();
        f.h[0] = 0.0;
        assert!(f.validate().is_err());
        let mut f = sample();
        f.order = f64::NAN;
        assert!(f.validate().is_err());
        let style = Style {
            x_window: Some((5.0, 10.0)),
            ..Style::default()
        };
        let r = crate::plot::render_svg(&Figure::Converge(sample()), &style);
        assert!(matches!(r, Err(PlotError::NoDataInWindow(_))));
    }
}
