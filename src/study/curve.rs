//! The fitted model as a curve: the observed quantity evaluated with the
//! fitted parameters on values of the data's key spread over the data's
//! whole range, between the data points as well as at them, so a figure
//! can draw the model as a continuous line.
//!
//! A whole-number key (`chain.bonds`) is evaluated only on the lattice the
//! data lie on (from the smallest value in steps of the greatest common
//! divisor of the differences: chains of odd bond counts stay odd, since an
//! even count is another kind of molecule): every such value when there
//! are at most `points` of them, else `points` of them spread evenly. A real key is evaluated at `points`
//! evenly spaced values from the smallest to the largest data value.

use std::sync::atomic::{AtomicBool, Ordering};

use rayon::prelude::*;

use super::cases::CaseValue;
use super::fit::{evaluate, EvalError, FitSpec};
use crate::input::Override;

/// Values of the key at which the curve is evaluated, increasing and
/// distinct, covering the data's range.
pub fn abscissae(data: &[CaseValue], points: usize) -> Vec<CaseValue> {
    let points = points.max(2);
    let whole = data.iter().all(|v| matches!(v, CaseValue::Int(_)));
    let xs: Vec<f64> = data.iter().map(|v| v.as_f64()).collect();
    let lo = xs.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = xs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if !(lo.is_finite() && hi.is_finite()) {
        return Vec::new();
    }
    if whole {
        let (a, b) = (lo as i64, hi as i64);
        // Counts of one parity (odd bond counts, say) stay on that parity:
        // between them lies a different kind of molecule.
        let one_parity = xs.iter().all(|x| ((*x as i64).wrapping_sub(a)) % 2 == 0);
        let step = if one_parity && b > a { 2 } else { 1 };
        let count = b.saturating_sub(a) / step;
        if count < points as i64 {
            return (0..=count).map(|k| CaseValue::Int(a + k * step)).collect();
        }
        let mut v: Vec<i64> = (0..points)
            .map(|i| a + step * ((count as f64) * i as f64 / (points - 1) as f64).round() as i64)
            .collect();
        v.dedup();
        return v.into_iter().map(CaseValue::Int).collect();
    }
    if hi <= lo {
        return vec![CaseValue::Float(lo)];
    }
    (0..points)
        .map(|i| {
            let t = i as f64 / (points - 1) as f64;
            // The ends exactly, so the curve spans the data.
            let x = if i + 1 == points {
                hi
            } else {
                lo + (hi - lo) * t
            };
            CaseValue::Float(x)
        })
        .collect()
}

/// The curve a fit reports: [`curve`] when the data have one key column;
/// with several, a row sets keys the abscissa alone cannot interpolate
/// (electrons with bonds, say), so the model runs through its values at
/// the data only (`model`, one per data row).
pub fn fitted_curve(
    spec: &FitSpec,
    p: &[f64],
    model: &[f64],
    points: usize,
    stop: Option<&AtomicBool>,
) -> Result<Vec<(f64, f64)>, EvalError> {
    if spec.data.keys.len() > 1 {
        return Ok(spec
            .data
            .rows
            .iter()
            .zip(model)
            .map(|(r, m)| (r.value.as_f64(), *m))
            .collect());
    }
    curve(spec, p, points, stop)
}

/// The model quantity at the fitted external values `p` of the free keys,
/// on [`abscissae`] of the data (in parallel). Values at which the model
/// cannot be evaluated (a level not computed, an input the checker
/// refuses) are left out; only an interruption is an error.
pub fn curve(
    spec: &FitSpec,
    p: &[f64],
    points: usize,
    stop: Option<&AtomicBool>,
) -> Result<Vec<(f64, f64)>, EvalError> {
    let data: Vec<CaseValue> = spec.data.rows.iter().map(|r| r.value).collect();
    let xs = abscissae(&data, points);
    let out: Vec<Option<(f64, f64)>> = xs
        .par_iter()
        .map(|x| {
            if stop.is_some_and(|s| s.load(Ordering::SeqCst)) {
                return Err(EvalError::Interrupted);
            }
            let mut extra = vec![Override {
                key: spec.data.key.clone(),
                value: x.toml_text(),
            }];
            extra.extend(spec.free.iter().zip(p).map(|(f, v)| Override {
                key: f.key.clone(),
                value: format!("{v:?}"),
            }));
            match evaluate(&spec.document, &spec.overrides, &extra, spec.data.quantity) {
                Ok(y) if y.is_finite() => Ok(Some((x.as_f64(), y))),
                Ok(_) => Ok(None),
                Err(EvalError::Interrupted) => Err(EvalError::Interrupted),
                Err(_) => Ok(None),
            }
        })
        .collect::<Result<_, _>>()?;
    Ok(out.into_iter().flatten().collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn whole_numbers_stay_on_the_datas_lattice() {
        // Odd counts 3, 5, 9: step 2, so 3, 5, 7, 9 and no even count.
        let d = [CaseValue::Int(3), CaseValue::Int(9), CaseValue::Int(5)];
        let v = abscissae(&d, 100);
        assert_eq!(v, [3, 5, 7, 9].map(CaseValue::Int));
        let d = [CaseValue::Int(3), CaseValue::Int(4), CaseValue::Int(9)];
        assert_eq!(abscissae(&d, 100).len(), 7);
        let d = [CaseValue::Int(2), CaseValue::Int(1000)];
        let v = abscissae(&d, 100);
        assert_eq!(v.len(), 100);
        assert_eq!(v.last(), Some(&CaseValue::Int(1000)));
    }

    #[test]
    fn reals_spread_evenly_between_the_data() {
        let d = [CaseValue::Float(0.5), CaseValue::Float(1.5)];
        let v = abscissae(&d, 101);
        assert_eq!(v.len(), 101);
        assert_eq!(v[50], CaseValue::Float(1.0));
        assert_eq!(v[100], CaseValue::Float(1.5));
    }
}
