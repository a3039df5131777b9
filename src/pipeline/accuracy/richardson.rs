//! Richardson extrapolation and error estimates from a sequence of grids.
//!
//! A level computed with spacing `h` by a scheme of order `p` behaves as
//! `E(h) = E + C h^p + O(h^{p+2})` (L. F. Richardson, Phil. Trans. R. Soc. A
//! 210, 307 (1911)). With a coarser grid of spacing `r h`,
//! `C h^p = (E(r h) - E(h)) / (r^p - 1)`: that is the estimated error of
//! `E(h)`, and `E(h) - C h^p` the extrapolated level. A third grid gives the
//! observed order `q`, from `(E(r3 h) - E(h)) / (E(r2 h) - E(h)) =
//! (r3^q - 1) / (r2^q - 1)`; when it falls short of `p` (a jump in the
//! potential, a grid far from the asymptotic range) the estimate uses `q`,
//! which is more cautious.
//!
//! **When not to trust it.** Richardson's formula assumes the error is
//! `C h^p` with a smooth `C`. Two signs that it is not, and the estimate is
//! then widened to [`SAFETY`] times the larger difference to a coarser grid
//! (`LevelError::widened`): the error is erratic in `h` (a break of the
//! potential between grid points moves from grid to grid, see
//! [`Smoothness`]), or the differences change sign, or the observed order
//! exceeds the scheme's by more than [`ORDER_EXCESS`] (the errors of the
//! three grids cancel by accident, and `C h^p` is no longer a bound).

/// Multiplies the Richardson estimate so that it bounds the true error in
/// the pre-asymptotic range too (common practice, no source; the tests check
/// it bounds the error of the box, oscillator and Morse levels at every
/// order without exceeding it 100-fold).
pub const SAFETY: f64 = 2.0;

/// Observed orders within this much of the scheme's count as the scheme's.
pub const ORDER_SLACK: f64 = 0.5;

/// An observed order more than this above the scheme's is not believed
/// (common practice, no source: a smooth error of order `p` shows `p` plus
/// a fraction in the asymptotic range, and up to about `p + 2` before it,
/// as the Morse levels at order 6 do).
pub const ORDER_EXCESS: f64 = 3.0;

/// Differences above this many round-off floors that no order explains
/// widen the estimate; below it they are taken as round-off (common
/// practice, no source: a computed level is within a few floors of the
/// exact eigenvalue, so a difference of three solves is within about ten).
pub const UNEXPLAINED_NOISE: f64 = 64.0;

/// Whether the error of a level is a smooth function of the spacing on the
/// grids of an estimate.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Smoothness {
    /// Every break of the potential stays on a grid point: `C h^p` holds.
    Smooth,
    /// A break lies between grid points and moves from grid to grid: the
    /// error's coefficient jumps with `h`.
    Erratic,
}

/// The error analysis of one level.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LevelError {
    /// The extrapolated level, eV.
    pub extrapolated: f64,
    /// Estimated absolute error of the fine-grid level, eV (the Richardson
    /// term times [`SAFETY`], plus the round-off floor).
    pub estimate: f64,
    /// Observed order of convergence (from three grids), if measurable.
    pub observed_order: Option<f64>,
    /// The order used for the estimate.
    pub order_used: f64,
    /// Whether the estimate was widened because Richardson's assumptions
    /// failed (see the module docs).
    pub widened: bool,
}

/// The order `q` with `(e3 - e1) / (e2 - e1) = (r3^q - 1) / (r2^q - 1)`,
/// `1 < r2 < r3`, by bisection on `q` in (0.25, 16); `None` when the
/// differences are at round-off (`<= noise`) or not monotone.
pub fn observed_order(e1: f64, e2: f64, e3: f64, r2: f64, r3: f64, noise: f64) -> Option<f64> {
    let d2 = e2 - e1;
    let d3 = e3 - e1;
    if d2.abs() <= noise || d3.abs() <= noise || d2.signum() != d3.signum() {
        return None;
    }
    let target = d3 / d2;
    let g = |q: f64| (r3.powf(q) - 1.0) / (r2.powf(q) - 1.0) - target;
    let (mut lo, mut hi) = (0.25, 16.0);
    if g(lo) > 0.0 || g(hi) < 0.0 {
        return None;
    }
    for _ in 0..100 {
        let mid = 0.5 * (lo + hi);
        if g(mid) < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Some(0.5 * (lo + hi))
}

/// Error analysis of a level from its values on the fine grid (`e1`) and two
/// coarser grids (`e2` at spacing `r2 h`, `e3` at `r3 h`), for a scheme of
/// order `order`, with `floor` the round-off floor of the fine grid (eV) and
/// `smoothness` what the grids promise (see the module docs for when the
/// estimate is widened).
#[allow(clippy::too_many_arguments)]
pub fn analyse(
    e1: f64,
    e2: f64,
    e3: Option<f64>,
    r2: f64,
    r3: f64,
    order: f64,
    floor: f64,
    smoothness: Smoothness,
) -> LevelError {
    let noise = 4.0 * floor;
    let observed = e3.and_then(|e3| observed_order(e1, e2, e3, r2, r3, noise));
    let order_used = match observed {
        Some(q) if q < order - ORDER_SLACK => q.max(0.5),
        _ => order,
    };
    let term = (e2 - e1) / (r2.powf(order_used) - 1.0);
    let d2 = (e2 - e1).abs();
    let d3 = e3.map_or(0.0, |e3| (e3 - e1).abs());
    // Differences above noise that change sign, or whose ratio no order
    // explains: the error is not C h^p.
    // Differences within a few floors of each other are round-off, whose
    // sign means nothing.
    let unexplained = e3.is_some() && d2.min(d3) > UNEXPLAINED_NOISE * floor && observed.is_none();
    let too_fast = matches!(observed, Some(q) if q > order + ORDER_EXCESS);
    let widened = smoothness == Smoothness::Erratic || unexplained || too_fast;
    let estimate = if smoothness == Smoothness::Erratic || unexplained {
        SAFETY * d2.max(d3) + floor
    } else if too_fast {
        SAFETY * d2 + floor
    } else {
        SAFETY * term.abs() + floor
    };
    LevelError {
        extrapolated: e1 - term,
        estimate,
        observed_order: observed,
        order_used,
        widened,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn recovers_a_pure_power_law() {
        // E(h) = 2 + 3 h^4 exactly: the order, the limit and the error are
        // recovered.
        let e = |h: f64| 2.0 + 3.0 * h.powi(4);
        let h = 0.1;
        let a = analyse(
            e(h),
            e(2.0 * h),
            Some(e(4.0 * h)),
            2.0,
            4.0,
            4.0,
            0.0,
            Smoothness::Smooth,
        );
        assert!((a.observed_order.unwrap() - 4.0).abs() < 1e-9);
        assert!((a.extrapolated - 2.0).abs() < 1e-12);
        assert!((a.estimate - SAFETY * 3.0 * h.powi(4)).abs() < 1e-12);
    }

    #[test]
    fn uses_the_observed_order_when_it_falls_short() {
        // A second-order error seen by a fourth-order scheme.
        let e = |h: f64| 1.0 - 0.5 * h * h;
        let h = 0.05;
        let a = analyse(
            e(h),
            e(2.0 * h),
            Some(e(4.0 * h)),
            2.0,
            4.0,
            4.0,
            0.0,
            Smoothness::Smooth,
        );
        assert!((a.order_used - 2.0).abs() < 1e-6);
        assert!(a.estimate >= 0.5 * h * h);
        assert!((a.extrapolated - 1.0).abs() < 1e-9);
    }

    /// Regression: a kink between grid points made the error erratic; an
    /// observed order of 15 for an order-4 scheme gave an estimate of 1e-10
    /// where the error was 1e-6.
    #[test]
    fn an_order_far_above_the_schemes_widens_the_estimate() {
        // Differences 3e-11 and 3e-11 * 32769 = (4^15 - 1) / (2^15 - 1):
        // an observed order of 15, made up so that the grids agree by
        // accident.
        let e1 = 1.0 + 1e-6;
        let (e2, e3) = (e1 + 3e-11, e1 + 3e-11 * 32769.0);
        let a = analyse(e1, e2, Some(e3), 2.0, 4.0, 4.0, 0.0, Smoothness::Smooth);
        assert!(a.observed_order.unwrap() > 5.0, "{a:?}");
        assert!(a.widened);
        assert!(a.estimate >= SAFETY * (e2 - e1).abs(), "{a:?}");
        // The same numbers on grids known to be erratic: widened as well.
        let a = analyse(e1, e2, None, 2.0, 4.0, 4.0, 0.0, Smoothness::Erratic);
        assert!(a.widened && a.estimate >= SAFETY * (e2 - e1).abs());
        // Differences of opposite sign above noise: no order explains them.
        let a = analyse(
            1.0,
            1.0 + 1e-6,
            Some(1.0 - 2e-6),
            2.0,
            4.0,
            4.0,
            0.0,
            Smoothness::Smooth,
        );
        assert!(a.widened && a.estimate >= SAFETY * 1.99e-6, "{a:?}");
        // A clean order-4 sequence is not widened.
        let e = |h: f64| 2.0 + 3.0 * h.powi(4);
        let a = analyse(
            e(0.1),
            e(0.2),
            Some(e(0.4)),
            2.0,
            4.0,
            4.0,
            0.0,
            Smoothness::Smooth,
        );
        assert!(!a.widened);
    }

    #[test]
    fn order_is_not_measured_at_round_off() {
        assert!(observed_order(1.0, 1.0 + 1e-17, 1.0 + 2e-17, 2.0, 4.0, 1e-15).is_none());
        // Non-monotone differences: no order.
        assert!(observed_order(1.0, 1.1, 0.9, 2.0, 4.0, 0.0).is_none());
    }

    #[test]
    fn non_integer_ratios_work() {
        let e = |h: f64| 5.0 + h.powi(2);
        let h = 0.01;
        let q = observed_order(e(h), e(1.9 * h), e(3.7 * h), 1.9, 3.7, 0.0).unwrap();
        assert!((q - 2.0).abs() < 1e-9);
    }
}
