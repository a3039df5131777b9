//! Absorption spectra: molar absorptivity from transition energies and
//! oscillator strengths, broadened by Gaussian or Lorentzian lines.
//!
//! # Formula
//! The oscillator strength of a band equals its integrated molar
//! absorptivity,
//!
//! `f = 4.319e-9 * int epsilon(nu~) d nu~`
//!
//! with `epsilon` in L mol^-1 cm^-1 and the wavenumber `nu~` in cm^-1
//! (P. Atkins and J. de Paula, *Atkins' Physical Chemistry*, chapter on
//! electronic transitions, the oscillator strength; R. C. Hilborn, Am. J.
//! Phys. 50, 982 (1982)). The constant is `4 ln(10) eps_0 m_e c^2 /
//! (N_A e^2)` in these units, see [`STRENGTH_PER_ABSORPTIVITY`]. So each
//! transition `i` contributes
//!
//! `epsilon(nu~) = sum_i f_i g_i(nu~) / 4.319e-9`,
//!
//! where `g_i` is a line of unit area in wavenumber, centred at the
//! transition's wavenumber `E_i / (h c)`, whose full width at half maximum
//! is the given width in eV converted to cm^-1. Spectra are evaluated on a
//! wavelength grid (nm) through `nu~ = 1e7 / lambda`.
//!
//! # Line shapes
//! Gaussian (inhomogeneous broadening): `g = exp(-d^2 / (2 s^2)) / (s sqrt(2 pi))`
//! with `s = FWHM / (2 sqrt(2 ln 2))`. Lorentzian (lifetime broadening):
//! `g = (w / pi) / (d^2 + w^2)` with `w = FWHM / 2`. Both in terms of the
//! offset `d = nu~ - nu~_i`.
//!
//! A Lorentzian's area converges slowly: a window of half-width `W` around
//! the centre holds only `(2/pi) atan(W / w)` of it, about `1 - 2w/(pi W)`. The
//! default grid (4 FWHM either side of the bands) therefore recovers about
//! 92 % of a Lorentzian band's strength but all of a Gaussian's; use a wide
//! grid when integrating Lorentzian spectra.

use crate::constants::{ev_per_wavenumber, hc_ev_nm};
use serde::Serialize;

/// `f / int epsilon d nu~` in mol L^-1 cm^2 (4.319e-9): the oscillator
/// strength per unit integrated molar absorptivity, with `epsilon` in
/// L mol^-1 cm^-1 and `nu~` in cm^-1 (Atkins' *Physical Chemistry*; Hilborn,
/// Am. J. Phys. 50, 982 (1982)). It equals `4 ln(10) eps_0 m_e c^2 /
/// (N_A e^2)` = 4.318 999e-9 with CODATA 2022 values.
pub const STRENGTH_PER_ABSORPTIVITY: f64 = 4.319e-9;

/// Bands are laid out this many FWHM beyond the outermost centres by
/// [`default_wavelength_grid`].
pub const GRID_MARGIN_FWHM: f64 = 4.0;

/// Grid steps per FWHM in [`default_wavelength_grid`].
pub const GRID_STEPS_PER_FWHM: f64 = 20.0;

/// Fewest and most points of [`default_wavelength_grid`].
pub const GRID_POINTS_RANGE: (usize, usize) = (201, 20_001);

/// Shape of each broadened absorption line.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum LineShape {
    /// Gaussian line of the given FWHM.
    Gaussian,
    /// Lorentzian line of the given FWHM.
    Lorentzian,
}

/// A sampled absorption spectrum.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Spectrum {
    /// Wavelengths in nm, as supplied.
    pub wavelength_nm: Vec<f64>,
    /// Molar absorptivity in L mol^-1 cm^-1 at each wavelength.
    pub epsilon: Vec<f64>,
}

/// Unit-area line of the given shape and FWHM (cm^-1) at offset `d` (cm^-1).
fn line(shape: LineShape, fwhm: f64, d: f64) -> f64 {
    match shape {
        LineShape::Gaussian => {
            let s = fwhm / (2.0 * (2.0 * std::f64::consts::LN_2).sqrt());
            (-0.5 * (d / s) * (d / s)).exp() / (s * (2.0 * std::f64::consts::PI).sqrt())
        }
        LineShape::Lorentzian => {
            let w = 0.5 * fwhm;
            w / std::f64::consts::PI / (d * d + w * w)
        }
    }
}

/// Usable transitions as (wavenumber in cm^-1, strength): positive finite
/// energy and finite strength.
fn bands(transitions: &[(f64, f64)]) -> Vec<(f64, f64)> {
    let per_wavenumber = ev_per_wavenumber();
    transitions
        .iter()
        .filter(|(e, f)| e.is_finite() && *e > 0.0 && f.is_finite())
        .map(|&(e, f)| (e / per_wavenumber, f))
        .collect()
}

/// Molar absorptivity (L mol^-1 cm^-1) of the `transitions` (energy in eV,
/// oscillator strength) broadened with `shape` of full width at half maximum
/// `fwhm_ev` (eV), at the wavelengths `wavelengths_nm` (nm).
///
/// Transitions with non-positive or non-finite energy or non-finite strength
/// are skipped. A non-positive or non-finite width, or a non-positive
/// wavelength, gives NaN at the affected points so that the mistake shows.
pub fn absorption(
    transitions: &[(f64, f64)],
    shape: LineShape,
    fwhm_ev: f64,
    wavelengths_nm: &[f64],
) -> Spectrum {
    let lines = bands(transitions);
    let width = fwhm_ev / ev_per_wavenumber();
    let width_ok = width.is_finite() && width > 0.0;
    let epsilon = wavelengths_nm
        .iter()
        .map(|&lambda| {
            if !(width_ok && lambda.is_finite() && lambda > 0.0) {
                return f64::NAN;
            }
            let nu = 1e7 / lambda;
            lines
                .iter()
                .map(|&(centre, f)| f * line(shape, width, nu - centre))
                .sum::<f64>()
                / STRENGTH_PER_ABSORPTIVITY
        })
        .collect();
    Spectrum {
        wavelength_nm: wavelengths_nm.to_vec(),
        epsilon,
    }
}

/// Wavelength grid (nm, ascending) covering the bands of `transitions`
/// (energy in eV, strength) broadened by `fwhm_ev` (eV).
///
/// The grid is uniform in wavenumber from `GRID_MARGIN_FWHM` widths below
/// the lowest band centre to as far above the highest (the lower end kept at
/// no less than a quarter of the lowest centre, so wavelengths stay finite),
/// with `GRID_STEPS_PER_FWHM` steps per width and between 201 and 20 001
/// points; the wavenumbers are then converted to nm and put in ascending
/// order. Empty when there is no usable transition (positive finite energy)
/// or the width is not positive and finite.
pub fn default_wavelength_grid(transitions: &[(f64, f64)], fwhm_ev: f64) -> Vec<f64> {
    let lines = bands(transitions);
    let width = fwhm_ev / ev_per_wavenumber();
    if lines.is_empty() || !(width.is_finite() && width > 0.0) {
        return Vec::new();
    }
    let lowest = lines.iter().map(|b| b.0).fold(f64::INFINITY, f64::min);
    let highest = lines.iter().map(|b| b.0).fold(0.0, f64::max);
    let start = (lowest - GRID_MARGIN_FWHM * width).max(0.25 * lowest);
    let stop = highest + GRID_MARGIN_FWHM * width;
    let wanted = ((stop - start) / width * GRID_STEPS_PER_FWHM).ceil() + 1.0;
    let (fewest, most) = GRID_POINTS_RANGE;
    let points = if wanted.is_finite() {
        (wanted as usize).clamp(fewest, most)
    } else {
        most
    };
    let step = (stop - start) / (points - 1) as f64;
    (0..points)
        .rev()
        .map(|k| 1e7 / (start + k as f64 * step))
        .collect()
}

/// Oscillator strength recovered from a spectrum:
/// `4.319e-9 * int epsilon d nu~`, by the trapezoid rule in wavenumber
/// (`nu~ = 1e7 / lambda`) over the sampled points, in whichever order they
/// come. Points with non-finite values are not skipped (they make the result
/// NaN). For fewer than two points the result is 0.
pub fn integrated_strength(spectrum: &Spectrum) -> f64 {
    let nu: Vec<f64> = spectrum.wavelength_nm.iter().map(|&l| 1e7 / l).collect();
    let area: f64 = nu
        .windows(2)
        .zip(spectrum.epsilon.windows(2))
        .map(|(n, e)| 0.5 * (e[0] + e[1]) * (n[1] - n[0]).abs())
        .sum();
    area * STRENGTH_PER_ABSORPTIVITY
}

/// Wavelength (nm) of a transition energy (eV): `hc / E`.
pub fn wavelength_of(energy_ev: f64) -> f64 {
    hc_ev_nm() / energy_ev
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::constants::{
        AVOGADRO_PER_MOL, ELECTRON_MASS_KG, ELEMENTARY_CHARGE_C, PLANCK_J_S, SPEED_OF_LIGHT_M_S,
    };
    use approx::assert_relative_eq;
    use proptest::prelude::*;
    use std::f64::consts::{LN_10, LN_2, PI};

    #[test]
    fn constant_matches_its_derivation() {
        // 4 ln10 eps0 m_e c^2 / (N_A e^2), eps0 = e^2 / (2 alpha h c) with
        // alpha = 7.297 352 5643e-3 (CODATA 2022, from memory); the factor 10 converts
        // SI (m mol^-1) to L mol^-1 cm^-2.
        let alpha = 7.297_352_564_3e-3;
        let e = ELEMENTARY_CHARGE_C;
        let c = SPEED_OF_LIGHT_M_S;
        let eps0 = e * e / (2.0 * alpha * PLANCK_J_S * c);
        let derived =
            4.0 * LN_10 * eps0 * ELECTRON_MASS_KG * c * c / (AVOGADRO_PER_MOL * e * e) * 10.0;
        assert_relative_eq!(STRENGTH_PER_ABSORPTIVITY, derived, max_relative = 1e-6);
    }

    #[test]
    fn gaussian_area_equals_strength_sum() {
        let bands = [(3.0, 0.8), (4.2, 0.3), (2.4, 0.05)];
        let grid = default_wavelength_grid(&bands, 0.3);
        assert!(grid.windows(2).all(|w| w[0] < w[1]));
        // Covers every centre (hc/E, CODATA 2022 hc, exact).
        for (e, _) in bands {
            let centre = wavelength_of(e);
            assert!(grid[0] < centre && centre < grid[grid.len() - 1]);
        }
        let spectrum = absorption(&bands, LineShape::Gaussian, 0.3, &grid);
        let total: f64 = bands.iter().map(|b| b.1).sum();
        assert_relative_eq!(integrated_strength(&spectrum), total, max_relative = 1e-3);
    }

    #[test]
    fn peak_height_and_half_width_closed_form() {
        // Single band: eps_max = f / (C s sqrt(2 pi)) (Gaussian) and
        // f / (C pi w) (Lorentzian), half of that at +-FWHM/2 (closed form).
        let (e, f, fwhm) = (2.5, 0.7, 0.2);
        let width = fwhm / ev_per_wavenumber();
        let centre = e / ev_per_wavenumber();
        let lambdas = [
            1e7 / centre,
            1e7 / (centre + 0.5 * width),
            1e7 / (centre - 0.5 * width),
        ];
        let s = width / (2.0 * (2.0 * LN_2).sqrt());
        let gauss = absorption(&[(e, f)], LineShape::Gaussian, fwhm, &lambdas);
        let peak = f / (STRENGTH_PER_ABSORPTIVITY * s * (2.0 * PI).sqrt());
        assert_relative_eq!(gauss.epsilon[0], peak, max_relative = 1e-12);
        assert_relative_eq!(gauss.epsilon[1], 0.5 * peak, max_relative = 1e-10);
        assert_relative_eq!(gauss.epsilon[2], 0.5 * peak, max_relative = 1e-10);
        let lorentz = absorption(&[(e, f)], LineShape::Lorentzian, fwhm, &lambdas);
        let peak = f / (STRENGTH_PER_ABSORPTIVITY * PI * 0.5 * width);
        assert_relative_eq!(lorentz.epsilon[0], peak, max_relative = 1e-12);
        assert_relative_eq!(lorentz.epsilon[1], 0.5 * peak, max_relative = 1e-10);
        // 2.5 eV is 20 163.9 cm^-1 and 495.94 nm (CODATA 2022 hc, exact).
        assert_relative_eq!(centre, 20_163.87, max_relative = 1e-6);
        assert_relative_eq!(lambdas[0], 495.936_79, max_relative = 1e-7);
    }

    #[test]
    fn lorentzian_area_on_a_wide_grid() {
        // Uniform wavenumber grid from 100 cm^-1 to twice the centre. The
        // window holds (2/pi) atan(W/w) of the line, W ~ 24 100 cm^-1,
        // w ~ 81 cm^-1: a shortfall of about 2.1e-3, inside 1e-2.
        let (e, f, fwhm) = (3.0, 0.9, 0.02);
        let centre = e / ev_per_wavenumber();
        let (lo, hi) = (100.0, 2.0 * centre - 100.0);
        let points = 12_001;
        let grid: Vec<f64> = (0..points)
            .rev()
            .map(|k| 1e7 / (lo + (hi - lo) * k as f64 / (points - 1) as f64))
            .collect();
        let spectrum = absorption(&[(e, f)], LineShape::Lorentzian, fwhm, &grid);
        let got = integrated_strength(&spectrum);
        assert_relative_eq!(got, f, max_relative = 1e-2);
        let w = 0.5 * fwhm / ev_per_wavenumber();
        let window = (2.0 / PI) * ((centre - lo) / w).atan();
        assert_relative_eq!(got, f * window, max_relative = 2e-4);
        // The default grid (4 FWHM margin) keeps (2/pi) atan(8) = 92.1 %.
        let default = default_wavelength_grid(&[(e, f)], fwhm);
        let short = integrated_strength(&absorption(
            &[(e, f)],
            LineShape::Lorentzian,
            fwhm,
            &default,
        ));
        assert_relative_eq!(short / f, (2.0 / PI) * 8f64.atan(), max_relative = 2e-3);
    }

    #[test]
    fn bad_input_shows_as_nan_or_empty() {
        let grid = [400.0, 500.0];
        let bad = absorption(&[(3.0, 1.0)], LineShape::Gaussian, 0.0, &grid);
        assert!(bad.epsilon.iter().all(|e| e.is_nan()));
        let neg = absorption(&[(3.0, 1.0)], LineShape::Gaussian, 0.1, &[-5.0, 400.0]);
        assert!(neg.epsilon[0].is_nan() && neg.epsilon[1].is_finite());
        let none = absorption(&[(-1.0, 1.0)], LineShape::Lorentzian, 0.1, &grid);
        assert_eq!(none.epsilon, vec![0.0, 0.0]);
        assert!(default_wavelength_grid(&[], 0.1).is_empty());
        assert!(default_wavelength_grid(&[(3.0, 1.0)], -0.1).is_empty());
        assert_eq!(
            integrated_strength(&Spectrum {
                wavelength_nm: vec![500.0],
                epsilon: vec![1.0]
            }),
            0.0
        );
    }

    proptest! {
        #[test]
        fn gaussian_area_is_strength(e in 1.0f64..6.0, f in 0.0f64..3.0, fwhm in 0.05f64..0.5) {
            let grid = default_wavelength_grid(&[(e, f)], fwhm);
            let spectrum = absorption(&[(e, f)], LineShape::Gaussian, fwhm, &grid);
            prop_assert!(spectrum.epsilon.iter().all(|&v| v >= 0.0));
            prop_assert!((integrated_strength(&spectrum) - f).abs() <= 1e-3 * f.max(1e-12));
        }
    }
}
