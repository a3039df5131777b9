//! Bands figure: band energies E_j(k) of a periodic chain across the
//! Brillouin zone, with the energy gaps between bands shaded across the
//! plot, and optionally the discrete levels of finite chains drawn as
//! ladders in a narrow panel to the right on the same energy axis, the
//! usual comparison of a finite oligomer with its polymer limit (R.
//! Hoffmann, Solids and Surfaces, VCH 1988, Ch. 1).
//!
//! Gaps are found from the band extents: the intervals `[min E_j, max E_j]`
//! are sorted and merged where they overlap; each empty interval between
//! neighbours is a gap, shaded and labelled with its width.

use super::axes::{
    axis_range, bounds_of, check, check_finite, check_len, draw_err, frame, label_areas, nice,
    outline, polyline, text, titled, usable, y_area, y_ticks, Bounds, Linear,
};
use super::style::{Px, Rgb, LEVEL_INK};
use super::{PlotError, Style};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// Fill of gap shading (sky blue of the Okabe & Ito set, 25 % opaque).
const GAP_FILL: Rgb = Rgb(0x56, 0xB4, 0xE9);
const GAP_ALPHA: f64 = 0.25;

/// Share of the width given to the ladder panel when chains are shown.
pub const LADDER_SHARE: f64 = 0.28;

/// The levels of one finite chain.
#[derive(Debug, Clone, PartialEq)]
pub struct ChainLadder {
    /// Short label under the ladder, e.g. "N = 8".
    pub label: String,
    /// Level energies, in the figure's energy unit.
    pub energies: Vec<f64>,
}

/// Band structure, optionally beside finite-chain ladders.
#[derive(Debug, Clone, PartialEq)]
pub struct BandsFigure {
    /// Wavevectors, in `k_unit`.
    pub k: Vec<f64>,
    /// Bands: each has one energy per k.
    pub bands: Vec<Vec<f64>>,
    /// Finite-chain ladders; empty for the band plot alone.
    pub chains: Vec<ChainLadder>,
    /// Unit of k, default "Å⁻¹".
    pub k_unit: String,
    /// Unit of energy, default "eV".
    pub energy_unit: String,
}

impl BandsFigure {
    /// A figure with units "Å⁻¹" and "eV" and no ladders.
    pub fn new(k: Vec<f64>, bands: Vec<Vec<f64>>) -> Self {
        BandsFigure {
            k,
            bands,
            chains: Vec::new(),
            k_unit: "Å⁻¹".into(),
            energy_unit: "eV".into(),
        }
    }

    /// Checks lengths and finiteness.
    pub(super) fn validate(&self) -> Result<(), PlotError> {
        check("k grid", &self.k)?;
        if self.bands.is_empty() {
            return Err(PlotError::Empty("bands".into()));
        }
        for (j, e) in self.bands.iter().enumerate() {
            check_len(&format!("band {j}"), self.k.len(), e.len())?;
            check_finite(&format!("band {j}"), e)?;
        }
        for c in &self.chains {
            check_finite(&format!("chain {}", c.label), &c.energies)?;
        }
        Ok(())
    }

    /// Energy gaps `(top of lower band, bottom of upper band)`, increasing.
    pub fn gaps(&self) -> Vec<(f64, f64)> {
        let mut iv: Vec<(f64, f64)> = self
            .bands
            .iter()
            .filter_map(|e| super::axes::extent(e.iter().copied()))
            .collect();
        iv.sort_by(|a, b| a.0.total_cmp(&b.0));
        let mut merged: Vec<(f64, f64)> = Vec::new();
        for (lo, hi) in iv {
            match merged.last_mut() {
                Some(last) if lo <= last.1 => last.1 = last.1.max(hi),
                _ => merged.push((lo, hi)),
            }
        }
        merged.windows(2).map(|w| (w[0].1, w[1].0)).collect()
    }
}

/// Shades the gaps across a chart's full width.
fn shade<DB: DrawingBackend>(
    chart: &mut Linear<'_, DB>,
    gaps: &[(f64, f64)],
    b: &Bounds,
) -> Result<(), PlotError> {
    let fill = GAP_FILL.rgb().mix(GAP_ALPHA).filled();
    let rects = gaps.iter().filter_map(|&(lo, hi)| {
        let (lo, hi) = (lo.max(b.y0), hi.min(b.y1));
        (lo < hi).then(|| Rectangle::new([(b.x0, lo), (b.x1, hi)], fill))
    });
    chart.draw_series(rects).map_err(draw_err)?;
    Ok(())
}

/// Draws the figure on `root`.
pub(super) fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    fig: &BandsFigure,
    style: &Style,
    px: &Px,
) -> Result<(), PlotError> {
    let (k0, k1) = axis_range("k grid", style.x_window, &fig.k, 0.0)?;
    let mut all: Vec<f64> = fig
        .k
        .iter()
        .enumerate()
        .filter(|(_, k)| **k >= k0 && **k <= k1)
        .flat_map(|(i, _)| fig.bands.iter().map(move |e| e[i]))
        .collect();
    all.extend(fig.chains.iter().flat_map(|c| c.energies.clone()));
    let (y0, y1) = axis_range("band energies", style.energy_window, &all, 0.05)?;
    let (k0, k1) = usable("k", (k0, k1))?;
    let (y0, y1) = usable("energy", (y0, y1))?;
    let gaps = fig.gaps();

    let (_, bottom) = label_areas(px);
    let m = (px.font * 0.9) as u32;
    let left = y_area(root, px, style, (y0, y1), y_ticks(px.h, px));
    let (main, side) = if fig.chains.is_empty() {
        (root.clone(), None)
    } else {
        let at = (f64::from(px.w) * (1.0 - LADDER_SHARE)) as i32;
        let (a, c) = root.split_horizontally(at);
        (a, Some(c))
    };

    let mut chart = ChartBuilder::on(&main)
        .margin(m)
        .x_label_area_size(bottom)
        .y_label_area_size(left)
        .build_cartesian_2d(k0..k1, y0..y1)
        .map_err(draw_err)?;
    let b = bounds_of((k0, k1), (y0, y1));
    shade(&mut chart, &gaps, &b)?;
    frame(
        &mut chart,
        px,
        style,
        &titled("wave vector k", &fig.k_unit),
        &titled("energy E", &fig.energy_unit),
        true,
    )?;
    for (j, e) in fig.bands.iter().enumerate() {
        let pts: Vec<(f64, f64)> = fig.k.iter().copied().zip(e.clone()).collect();
        polyline(
            &mut chart,
            &pts,
            &b,
            style.series(j).rgb().stroke_width(px.line),
        )?;
    }
    // Gap widths written inside the shading, at the right.
    let font = text(px, style, 0.85).pos(Pos::new(HPos::Right, VPos::Center));
    for &(lo, hi) in &gaps {
        let (vlo, vhi) = (lo.max(y0), hi.min(y1));
        if vlo >= vhi {
            continue;
        }
        let tall = chart.backend_coord(&(k1, vlo)).1 - chart.backend_coord(&(k1, vhi)).1;
        if tall > (px.font * 1.3) as i32 {
            let (x, y) = chart.backend_coord(&(k1, 0.5 * (vlo + vhi)));
            let s = format!(
                "gap {} {}",
                nice(((hi - lo) * 1000.0).round() / 1000.0),
                fig.energy_unit
            );
            root.draw(&Text::new(s, (x - px.pt(4.0), y), font.clone()))
                .map_err(draw_err)?;
        }
    }

    if let Some(side) = side {
        ladders(&side, fig, &gaps, (y0, y1), style, px, bottom, m)?;
    }
    Ok(())
}

/// The ladder panel: one column per chain, levels as bars.
#[allow(clippy::too_many_arguments)]
fn ladders<DB: DrawingBackend>(
    side: &DrawingArea<DB, Shift>,
    fig: &BandsFigure,
    gaps: &[(f64, f64)],
    (y0, y1): (f64, f64),
    style: &Style,
    px: &Px,
    bottom: u32,
    m: u32,
) -> Result<(), PlotError> {
    let n = fig.chains.len() as f64;
    let mut chart = ChartBuilder::on(side)
        .margin(m)
        .margin_left(px.pt(2.0))
        .x_label_area_size(bottom)
        .build_cartesian_2d(0.0..n, y0..y1)
        .map_err(draw_err)?;
    let b = bounds_of((0.0, n), (y0, y1));
    shade(&mut chart, gaps, &b)?;
    outline(&chart.plotting_area().strip_coord_spec(), px, style)?;
    let bar = LEVEL_INK.rgb().stroke_width(px.line);
    for (i, c) in fig.chains.iter().enumerate() {
        let x = i as f64;
        for e in &c.energies {
            polyline(&mut chart, &[(x + 0.2, *e), (x + 0.8, *e)], &b, bar)?;
        }
    }
    // Chain labels under the columns, and a title.
    let font = text(px, style, 0.85).pos(Pos::new(HPos::Center, VPos::Top));
    for (i, c) in fig.chains.iter().enumerate() {
        let (x, y) = chart.backend_coord(&(i as f64 + 0.5, y0));
        side.draw(&Text::new(
            c.label.clone(),
            (
                x - side.get_base_pixel().0,
                y - side.get_base_pixel().1 + px.pt(3.0),
            ),
            font.clone(),
        ))
        .map_err(draw_err)?;
    }
    let (xc, yb) = chart.backend_coord(&(n / 2.0, y0));
    let title = text(px, style, 1.0).pos(Pos::new(HPos::Center, VPos::Top));
    side.draw(&Text::new(
        "finite chains",
        (
            xc - side.get_base_pixel().0,
            yb - side.get_base_pixel().1 + (px.font * 1.6) as i32,
        ),
        title,
    ))
    .map_err(draw_err)?;
    Ok(())
}

#[cfg(test)]
pub(super) fn sample() -> BandsFigure {
    // Two cosine bands of a dimerised chain, E = +-sqrt(a^2 + b^2 + 2ab cos
    // kd) with a = 2.5, b = 2.0 eV, d = 2.8 A (Hueckel-type dispersion, from
    // memory); gap 2|a - b| = 1 eV at the zone edge.
    let d = 2.8;
    let k: Vec<f64> = (0..=60)
        .map(|i| std::f64::consts::PI / d * i as f64 / 60.0)
        .collect();
    let e = |k: f64| (2.5f64.powi(2) + 2.0f64.powi(2) + 2.0 * 2.5 * 2.0 * (k * d).cos()).sqrt();
    let upper: Vec<f64> = k.iter().map(|&k| e(k)).collect();
    let lower: Vec<f64> = upper.iter().map(|v| -v).collect();
    let mut f = BandsFigure::new(k, vec![lower, upper]);
    f.chains = [2usize, 4, 8]
        .iter()
        .map(|&n| ChainLadder {
            label: format!("N = {n}"),
            energies: (1..=n)
                .map(|j| {
                    let kk = std::f64::consts::PI / d * j as f64 / (n as f64 + 1.0);
                    [-e(kk), e(kk)]
                })
                .flat_map(|p| p.into_iter())
                .collect(),
        })
        .collect();
    f
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plot::testkit::{render_both, stroked};
    use crate::plot::{Figure, Size};
    use approx::assert_abs_diff_eq;

    #[test]
    fn gap_of_dimerised_chain() {
        // 2 |a - b| = 1 eV at the zone edge (closed form for the sample).
        let g = sample().gaps();
        assert_eq!(g.len(), 1);
        assert_abs_diff_eq!(g[0].1 - g[0].0, 1.0, epsilon = 1e-9);
        // Overlapping bands have no gap.
        let f = BandsFigure::new(vec![0.0, 1.0], vec![vec![0.0, 2.0], vec![1.0, 3.0]]);
        assert!(f.gaps().is_empty());
    }

    #[test]
    fn renders_bands_and_ladders() {
        let style = Style::default();
        let svg = render_both(&Figure::Bands(sample()), &style, "bands");
        // Ladders of 2 N levels for N = 2, 4, 8.
        assert_eq!(stroked(&svg, &LEVEL_INK.hex()).len(), 28);
        assert_eq!(stroked(&svg, &style.series(0).hex()).len(), 1);
        assert_eq!(stroked(&svg, &style.series(1).hex()).len(), 1);
    }

    #[test]
    fn renders_bands_alone_in_window() {
        let mut f = sample();
        f.chains.clear();
        let style = Style {
            energy_window: Some((0.0, 6.0)),
            size: Size::Centimetres {
                w: 9.0,
                h: 7.0,
                dpi: 150.0,
            },
            ..Style::default()
        };
        let svg = render_both(&Figure::Bands(f), &style, "bands_window");
        assert_eq!(stroked(&svg, &style.series(0).hex()).len(), 0);
        assert_eq!(stroked(&svg, &style.series(1).hex()).len(), 1);
    }

    #[test]
    fn bad_input() {
        let mut f = sample();
        f.bands[1].pop();
        assert!(matches!(f.validate(), Err(PlotError::Length { .. })));
        let mut f = sample();
        f.bands.clear();
        assert!(matches!(f.validate(), Err(PlotError::Empty(_))));
        let mut f = sample();
        f.chains[0].energies[0] = f64::NAN;
        assert!(f.validate().is_err());
    }
}
