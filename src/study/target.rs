//! Design targets: the value of one key that gives a wanted quantity.
//!
//! Solves `q(p) = target` for `p` in `[lo, hi]`. The ends are checked for a
//! change of sign of `q(p) - target`; when they show none, the interval is
//! scanned at [`SCAN_POINTS`] evenly spaced values for one (the quantity need
//! not be monotonic). The root of the first bracket is then found by
//! Brent's method, bisection safeguarding inverse quadratic interpolation
//! (R. P. Brent, *Algorithms for Minimization without Derivatives*,
//! Prentice-Hall 1973, ch. 4, procedure `zero`).

use std::sync::atomic::AtomicBool;

use super::fit::{evaluate, EvalError};
use super::quantity::Quantity;
use crate::input::Override;

/// Interior values tried when the ends do not bracket the target.
pub const SCAN_POINTS: usize = 16;

/// Most evaluations Brent's method may take.
pub const MAX_EVALUATIONS: usize = 100;

/// What to solve for.
#[derive(Debug)]
pub struct TargetSpec {
    /// The input, read once.
    pub document: crate::input::Document,
    /// `--set` overrides.
    pub overrides: Vec<Override>,
    /// The key to solve for.
    pub key: String,
    /// Its bounds `(lo, hi)`, `lo < hi`.
    pub bounds: (f64, f64),
    /// The quantity.
    pub quantity: Quantity,
    /// Its wanted value.
    pub target: f64,
    /// Absolute tolerance on the key's value.
    pub tolerance: f64,
}

/// The solution.
#[derive(Debug, Clone, PartialEq)]
pub struct TargetResult {
    /// The key.
    pub key: String,
    /// Its value that gives the target.
    pub value: f64,
    /// The quantity.
    pub quantity: Quantity,
    /// The wanted value.
    pub target: f64,
    /// The quantity at `value`.
    pub achieved: f64,
    /// The bracket the root was found in.
    pub bracket: (f64, f64),
    /// Solves made.
    pub evaluations: usize,
}

/// Why no value was found.
#[derive(Debug, thiserror::Error)]
pub enum TargetError {
    /// Evaluating the model failed.
    #[error("{key}={at}: {source}")]
    Eval {
        /// The key.
        key: String,
        /// The value tried.
        at: f64,
        /// What went wrong.
        source: Box<EvalError>,
    },
    /// No value in the bounds reaches the target.
    #[error("no value of {key} in [{lo}, {hi}] gives {quantity} = {target}: there it ranges from {min:.6} to {max:.6}; widen --bounds or change another key")]
    Unreachable {
        /// The key.
        key: String,
        /// Lower bound.
        lo: f64,
        /// Upper bound.
        hi: f64,
        /// The quantity's name.
        quantity: String,
        /// The wanted value.
        target: f64,
        /// Smallest value seen.
        min: f64,
        /// Largest value seen.
        max: f64,
    },
    /// Brent's method did not meet the tolerance.
    #[error("no convergence within {0} evaluations")]
    NoConvergence(usize),
}

/// Brent's `zero` on `[a, b]` with `f(a) f(b) <= 0`, tolerance `t` (plus
/// `4 eps |x|`). Returns the root and the number of calls of `f`.
pub fn brent<E>(
    mut f: impl FnMut(f64) -> Result<f64, E>,
    a: f64,
    b: f64,
    fa: f64,
    fb: f64,
    t: f64,
    max_evaluations: usize,
) -> Result<Option<(f64, usize)>, E> {
    let (mut a, mut b, mut fa, mut fb) = (a, b, fa, fb);
    let mut c = a;
    let mut fc = fa;
    let mut d = b - a;
    let mut e = d;
    let mut calls = 0;
    loop {
        if fb.abs() > 0.0 && (fb > 0.0) == (fc > 0.0) {
            c = a;
            fc = fa;
            d = b - a;
            e = d;
        }
        if fc.abs() < fb.abs() {
            a = b;
            b = c;
            c = a;
            fa = fb;
            fb = fc;
            fc = fa;
        }
        let tol = 2.0 * f64::EPSILON * b.abs() + t;
        let m = 0.5 * (c - b);
        if m.abs() <= tol || fb == 0.0 {
            return Ok(Some((b, calls)));
        }
        if calls >= max_evaluations {
            return Ok(None);
        }
        if e.abs() < tol || fa.abs() <= fb.abs() {
            d = m;
            e = m;
        } else {
            let s = fb / fa;
            let (mut p, mut q);
            if a == c {
                // Secant step.
                p = 2.0 * m * s;
                q = 1.0 - s;
            } else {
                // Inverse quadratic interpolation.
                let qa = fa / fc;
                let r = fb / fc;
                p = s * (2.0 * m * qa * (qa - r) - (b - a) * (r - 1.0));
                q = (qa - 1.0) * (r - 1.0) * (s - 1.0);
            }
            if p > 0.0 {
                q = -q;
            } else {
                p = -p;
            }
            if 2.0 * p < 3.0 * m * q - (tol * q).abs() && p < (0.5 * e * q).abs() {
                e = d;
                d = p / q;
            } else {
                d = m;
                e = m;
            }
        }
        a = b;
        fa = fb;
        b += if d.abs() > tol { d } else { tol * m.signum() };
        fb = f(b)?;
        calls += 1;
    }
}

/// Finds the value of the key that gives the target.
pub fn solve_target(
    spec: &TargetSpec,
    stop: Option<&AtomicBool>,
) -> Result<TargetResult, TargetError> {
    let mut evaluations = 0usize;
    let mut eval = |x: f64| -> Result<f64, TargetError> {
        if stop.is_some_and(|s| s.load(std::sync::atomic::Ordering::SeqCst)) {
            return Err(TargetError::Eval {
                key: spec.key.clone(),
                at: x,
                source: Box::new(EvalError::Interrupted),
            });
        }
        evaluations += 1;
        let ov = Override {
            key: spec.key.clone(),
            value: format!("{x:?}"),
        };
        evaluate(&spec.document, &spec.overrides, &[ov], spec.quantity)
            .map(|q| q - spec.target)
            .map_err(|source| TargetError::Eval {
                key: spec.key.clone(),
                at: x,
                source: Box::new(source),
            })
    };
    let (lo, hi) = spec.bounds;
    let xs: Vec<f64> = (0..=SCAN_POINTS + 1)
        .map(|i| lo + (hi - lo) * i as f64 / (SCAN_POINTS + 1) as f64)
        .collect();
    // Ends first, then the scan only when they do not bracket.
    let f_lo = eval(lo)?;
    let f_hi = eval(hi)?;
    let mut bracket = None;
    let mut seen = vec![f_lo, f_hi];
    if f_lo == 0.0 || f_hi == 0.0 || (f_lo > 0.0) != (f_hi > 0.0) {
        bracket = Some((lo, hi, f_lo, f_hi));
    } else {
        let mut prev = (lo, f_lo);
        for &x in &xs[1..xs.len() - 1] {
            let fx = eval(x)?;
            seen.push(fx);
            if fx == 0.0 || (fx > 0.0) != (prev.1 > 0.0) {
                bracket = Some((prev.0, x, prev.1, fx));
                break;
            }
            prev = (x, fx);
        }
    }
    let Some((a, b, fa, fb)) = bracket else {
        let min = seen.iter().copied().fold(f64::INFINITY, f64::min) + spec.target;
        let max = seen.iter().copied().fold(f64::NEG_INFINITY, f64::max) + spec.target;
        return Err(TargetError::Unreachable {
            key: spec.key.clone(),
            lo,
            hi,
            quantity: spec.quantity.name(),
            target: spec.target,
            min,
            max,
        });
    };
    let (x, _) = brent(&mut eval, a, b, fa, fb, spec.tolerance, MAX_EVALUATIONS)?
        .ok_or(TargetError::NoConvergence(MAX_EVALUATIONS))?;
    let achieved = eval(x)? + spec.target;
    Ok(TargetResult {
        key: spec.key.clone(),
        value: x,
        quantity: spec.quantity,
        target: spec.target,
        achieved,
        bracket: (a, b),
        evaluations,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn brent_finds_the_cube_root_of_two() {
        // closed form: 2^(1/3)
        let f = |x: f64| -> Result<f64, ()> { Ok(x * x * x - 2.0) };
        let (x, calls) = brent(f, 0.0, 3.0, -2.0, 25.0, 1e-13, 100).unwrap().unwrap();
        assert!((x - 2f64.cbrt()).abs() < 1e-12, "{x}");
        assert!(calls < 20, "{calls}");
    }

    #[test]
    fn brent_handles_a_root_at_an_end() {
        let f = |x: f64| -> Result<f64, ()> { Ok(x - 1.0) };
        let (x, _) = brent(f, 1.0, 2.0, 0.0, 1.0, 1e-12, 100).unwrap().unwrap();
        assert_eq!(x, 1.0);
    }
}
