//! Corners of a formula: where `abs`, `min` or `max` switch branches.
//!
//! `abs(g)` has a corner where `g` changes sign, `min(a, b)` and `max(a, b)`
//! where `a - b` does. Each such argument (a "site", see
//! [`super::fold::corner_sites`]) is sampled at [`KINK_SAMPLES`]` + 1`
//! equally spaced points of the interval; every pair of neighbouring
//! samples of opposite sign brackets a root, which bisection then narrows
//! until the bracket is at most [`BRACKET_TOLERANCE`] of the interval's
//! scale `max(|from|, |to|)` wide, or floating-point numbers run out
//! between its ends. Bisection keeps a bracket whatever the argument looks
//! like between samples, and the argument may itself have corners
//! (R. L. Burden and J. D. Faires, *Numerical Analysis*, sec. 2.1).
//!
//! A sign change that is not a root is dropped: at a pole (`abs(1/x)`) the
//! argument grows as the bracket closes, at a jump it keeps its size; a
//! root is kept only when the argument at the final bracket is below
//! [`SHRINK`] times its size at the first. A sample of exactly zero between
//! samples of opposite sign is bracketed by its neighbours; two or more
//! zero samples in a row mean the argument is zero on a whole stretch, whose
//! ends are corners of an inner `abs`, `min` or `max` (listed as their own
//! sites), so that stretch adds nothing.
//!
//! What sampling can miss: two sign changes closer together than the sample
//! spacing `(to - from) / KINK_SAMPLES` (they cancel between samples, as in
//! `abs(x^2 - 1e-8)` on a wide interval), and sign changes next to samples
//! where the argument is NaN (outside the domain of `ln` or `sqrt`).

use super::eval::Program;

/// Sampling intervals across the interval searched for corners.
pub const KINK_SAMPLES: usize = 4096;

/// Width at which bisection stops, relative to `max(|from|, |to|)` of the
/// interval searched (2^-50, about 8.9e-16).
pub const BRACKET_TOLERANCE: f64 = 8.881_784_197_001_252e-16;

/// A bracketed sign change is a root only when the argument's larger end
/// value shrank below this fraction of its value at the first bracket (a
/// simple root shrinks it by about `BRACKET_TOLERANCE * KINK_SAMPLES`).
pub const SHRINK: f64 = 1e-6;

/// Most bisection steps per root (a bracket of the whole range of `f64`
/// halves to adjacent numbers in fewer).
const MAX_BISECTIONS: usize = 2100;

/// The sign changes of every site's value on the open interval
/// `(from, to)`, sorted, with roots closer than the bisection tolerance
/// merged. Empty unless `from < to` and both are finite.
pub(super) fn corners(sites: &[Program], from: f64, to: f64) -> Vec<f64> {
    if !(from.is_finite() && to.is_finite() && from < to) {
        return Vec::new();
    }
    let tol = BRACKET_TOLERANCE * from.abs().max(to.abs());
    let mut out = Vec::new();
    for site in sites {
        sign_changes(site, from, to, tol, &mut out);
    }
    out.retain(|&r| r > from && r < to);
    out.sort_by(f64::total_cmp);
    out.dedup_by(|b, a| *b - *a <= tol);
    out
}

/// Appends the roots of `site` on `[from, to]` found by sampling.
fn sign_changes(site: &Program, from: f64, to: f64, tol: f64, out: &mut Vec<f64>) {
    // (1 - t) from + t to cannot overflow, and gives from and to exactly.
    let at = |i: usize| {
        let t = i as f64 / KINK_SAMPLES as f64;
        (1.0 - t) * from + t * to
    };
    // Last nonzero sample that is not NaN, and zero samples since.
    let mut last: Option<(f64, f64)> = None;
    let mut zeros = 0usize;
    for i in 0..=KINK_SAMPLES {
        let x = at(i);
        let g = site.eval(x);
        if g.is_nan() {
            last = None;
            zeros = 0;
            continue;
        }
        if g == 0.0 {
            zeros += 1;
            continue;
        }
        if let Some((xa, ga)) = last {
            if (ga < 0.0) != (g < 0.0) && zeros <= 1 {
                if let Some(r) = bisect(site, (xa, ga), (x, g), tol) {
                    out.push(r);
                }
            }
        }
        last = Some((x, g));
        zeros = 0;
    }
}

/// Narrows the bracket `[a, b]` (values of opposite sign) by bisection;
/// the midpoint of the last bracket, or `None` when the sign change is a
/// pole, a jump or meets NaN.
fn bisect(
    site: &Program,
    (mut a, mut ga): (f64, f64),
    (mut b, mut gb): (f64, f64),
    tol: f64,
) -> Option<f64> {
    let first = [ga, gb]
        .iter()
        .filter(|g| g.is_finite())
        .fold(0.0f64, |m, g| m.max(g.abs()));
    if first == 0.0 {
        return None;
    }
    for _ in 0..MAX_BISECTIONS {
        if b - a <= tol {
            break;
        }
        let m = 0.5 * a + 0.5 * b;
        if m <= a || m >= b {
            break;
        }
        let gm = site.eval(m);
        if gm == 0.0 {
            return Some(m);
        }
        if gm.is_nan() {
            return None;
        }
        if (gm < 0.0) == (ga < 0.0) {
            (a, ga) = (m, gm);
        } else {
            (b, gb) = (m, gm);
        }
    }
    let last = ga.abs().max(gb.abs());
    (last.is_finite() && last <= SHRINK * first).then_some(0.5 * a + 0.5 * b)
}

#[cfg(test)]
mod tests {
    use super::super::eval::{BinOp, Func1, Op};
    use super::*;

    /// `x - r`.
    fn shifted(r: f64) -> Program {
        Program::new(vec![Op::X, Op::Const(r), Op::Bin(BinOp::Sub)])
    }

    #[test]
    fn a_simple_root_to_the_bracket_tolerance() {
        // x - 1/3 changes sign at 1/3 (closed form).
        let r = corners(&[shifted(1.0 / 3.0)], -2.0, 2.0);
        assert_eq!(r.len(), 1);
        assert!((r[0] - 1.0 / 3.0).abs() <= 2.0 * BRACKET_TOLERANCE * 2.0);
    }

    #[test]
    fn a_root_on_a_sample_point_is_found_once() {
        // x on [-1, 1]: sample 2048 is exactly 0.
        assert_eq!(corners(&[shifted(0.0)], -1.0, 1.0), vec![0.0]);
    }

    #[test]
    fn roots_at_or_beyond_the_ends_are_not_listed() {
        assert!(corners(&[shifted(-1.0)], -1.0, 1.0).is_empty());
        assert!(corners(&[shifted(1.0)], -1.0, 1.0).is_empty());
        assert!(corners(&[shifted(5.0)], -1.0, 1.0).is_empty());
    }

    #[test]
    fn a_pole_is_not_a_root() {
        // 1 / (x - 0.3): a sign change through infinity.
        let pole = Program::new(vec![
            Op::Const(1.0),
            Op::X,
            Op::Const(0.3),
            Op::Bin(BinOp::Sub),
            Op::Bin(BinOp::Div),
        ]);
        assert!(corners(&[pole], -1.0, 1.0).is_empty());
        // tan x on [1, 4]: pole at pi/2 dropped, root at pi kept (DLMF 4.14).
        let tan = Program::new(vec![Op::X, Op::Call1(Func1::Tan)]);
        let r = corners(&[tan], 1.0, 4.0);
        assert_eq!(r.len(), 1);
        assert!((r[0] - std::f64::consts::PI).abs() < 1e-14);
    }

    #[test]
    fn bad_intervals_give_nothing() {
        assert!(corners(&[shifted(0.0)], 1.0, -1.0).is_empty());
        assert!(corners(&[shifted(0.0)], f64::NEG_INFINITY, 1.0).is_empty());
        assert!(corners(&[shifted(0.0)], f64::NAN, 1.0).is_empty());
    }

    #[test]
    fn an_extreme_interval_does_not_overflow() {
        // Sampling [-1e308, 1e308] must neither overflow nor lose the root.
        let r = corners(&[shifted(1e300)], -1e308, 1e308);
        assert_eq!(r.len(), 1);
        assert!((r[0] - 1e300).abs() <= 1e308 * 2.0 * BRACKET_TOLERANCE);
    }
}
