//! Least-squares fits of input values to a measured series.
//!
//! The data give, for values `x_i` of one input key (e.g. `chain.bonds`),
//! an observed quantity `y_i` (see [`Quantity`]) with an optional
//! uncertainty `s_i`. The free keys `p` are fitted by minimising
//! `chi^2 = sum_i ((m_i(p) - y_i) / s_i)^2` (`s_i = 1` without
//! uncertainties), `m_i(p)` being the quantity of the input with the key set
//! to `x_i` and the free keys to `p`, with the Levenberg–Marquardt method
//! (K. Levenberg, Q. Appl. Math. 2, 164 (1944); D. W. Marquardt,
//! J. SIAM 11, 431 (1963)) of the `levenberg-marquardt` crate, a port of
//! MINPACK's LMDER (J. J. Moré, Lecture Notes in Mathematics 630 (1978)).
//!
//! - **Jacobian**: central differences, step `h_j = eps^(1/3) max(|p_j|, 1e-3)`,
//!   the step that balances truncation against rounding
//!   (W. H. Press et al., *Numerical Recipes*, 3rd ed., sec. 5.7).
//! - **Bounds** are kept by the transformations of MINUIT
//!   (F. James, M. Roos, Comput. Phys. Commun. 10, 343 (1975)):
//!   `p = lo + (hi - lo)(sin u + 1)/2` for two bounds,
//!   `p = lo - 1 + sqrt(u^2 + 1)` for a lower one (mirrored for an upper one);
//!   LM works on the unbounded `u`.
//! - **Covariance** `C = (J^T W J)^-1` with `J` the Jacobian in `p` at the
//!   solution and `W = diag(1/s_i^2)`, scaled by `chi^2 / (m - n)` when the
//!   data give no uncertainties (the residual scatter then estimates them);
//!   standard errors `sqrt(C_jj)`, correlations `C_jk / sqrt(C_jj C_kk)`.
//! - **Determination**: when the column-scaled `J` has a singular value
//!   below `1e-8` of its largest, a combination of the free keys does not
//!   change the model, and the fit fails naming the keys involved.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Mutex;

use levenberg_marquardt::{LeastSquaresProblem, LevenbergMarquardt};
use nalgebra::storage::Owned;
use nalgebra::{DMatrix, DVector, Dyn};
use rayon::prelude::*;

use super::cases::CaseValue;
pub use super::data::{Data, DataError, DataRow};
use super::quantity::{Quantity, QuantityError};
use super::runner::Runner;
pub use super::termination::termination_word;
use crate::input::{Document, InputError, Override};
use crate::pipeline::{self, SolveError};

/// The format name of fit documents.
pub const FORMAT: &str = "chainwell.fit/1";

/// Relative singular value below which the free keys are not determined
/// (common practice, no source).
pub const DETERMINATION_LIMIT: f64 = 1e-8;

/// Why one evaluation of the model failed.
#[derive(Debug, thiserror::Error)]
pub enum EvalError {
    /// The input with these values fails its checks.
    #[error("{}", .0.render())]
    Input(InputError),
    /// The solve failed.
    #[error(transparent)]
    Solve(#[from] SolveError),
    /// The quantity cannot be read from the solve.
    #[error(transparent)]
    Quantity(#[from] QuantityError),
    /// Ctrl-C was pressed.
    #[error("interrupted")]
    Interrupted,
}

/// The quantity of the input at `path` with `overrides` and then `extra`.
pub fn evaluate(
    document: &Document,
    overrides: &[Override],
    extra: &[Override],
    quantity: Quantity,
) -> Result<f64, EvalError> {
    let mut ovs = overrides.to_vec();
    ovs.extend_from_slice(extra);
    let (model, _) = document.model(&ovs).map_err(EvalError::Input)?;
    let sol = pipeline::solve(&model)?;
    Ok(quantity.of(&model, &sol)?)
}

/// The current value of the dotted key `key` once `overrides` are applied,
/// in the input's units, and whether it is a whole number; chain keys left
/// at their defaults are read from the checked chain. `None` when the input
/// has no number there.
pub fn start_value(
    document: &Document,
    overrides: &[Override],
    key: &str,
) -> Result<Option<(f64, bool)>, InputError> {
    match document.value(key, overrides)? {
        Some(toml::Value::Integer(i)) => return Ok(Some((i as f64, true))),
        Some(toml::Value::Float(x)) => return Ok(Some((x, false))),
        Some(_) => return Ok(None),
        None => {}
    }
    let (model, _) = document.model(overrides)?;
    let u = &model.units;
    Ok(model.chain.as_ref().and_then(|c| match key {
        "chain.bond_length" => Some((u.length_out(c.bond_length), false)),
        "chain.end_extension" => Some((u.length_out(c.end_extension), false)),
        "chain.alternation" => Some((u.energy_out(c.alternation), false)),
        "chain.end_cap_height" => Some((u.energy_out(c.end_cap_height), false)),
        "chain.end_cap_width" => Some((u.length_out(c.end_cap_width), false)),
        _ => None,
    }))
}

/// A free key: its start value and bounds.
#[derive(Debug, Clone, PartialEq)]
pub struct Free {
    /// The dotted key.
    pub key: String,
    /// Start value, input units.
    pub start: f64,
    /// Lower bound.
    pub lower: Option<f64>,
    /// Upper bound.
    pub upper: Option<f64>,
}

impl Free {
    /// External value from the internal, unbounded one (MINUIT transforms).
    pub fn external(&self, u: f64) -> f64 {
        match (self.lower, self.upper) {
            (Some(lo), Some(hi)) => lo + (hi - lo) * (u.sin() + 1.0) / 2.0,
            (Some(lo), None) => lo - 1.0 + (u * u + 1.0).sqrt(),
            (None, Some(hi)) => hi + 1.0 - (u * u + 1.0).sqrt(),
            (None, None) => u,
        }
    }

    /// Internal value of an external one (clamped into the bounds).
    pub fn internal(&self, p: f64) -> f64 {
        match (self.lower, self.upper) {
            (Some(lo), Some(hi)) => (2.0 * (p.clamp(lo, hi) - lo) / (hi - lo) - 1.0).asin(),
            (Some(lo), None) => ((p.max(lo) - lo + 1.0).powi(2) - 1.0).sqrt(),
            (None, Some(hi)) => ((hi - p.min(hi) + 1.0).powi(2) - 1.0).sqrt(),
            (None, None) => p,
        }
    }
}

/// Everything a fit needs.
#[derive(Debug)]
pub struct FitSpec {
    /// The input, read once.
    pub document: Document,
    /// `--set` overrides.
    pub overrides: Vec<Override>,
    /// The data.
    pub data: Data,
    /// The free keys.
    pub free: Vec<Free>,
}

/// One fitted key.
#[derive(Debug, Clone, PartialEq)]
pub struct FitParameter {
    /// The dotted key.
    pub key: String,
    /// Fitted value.
    pub value: f64,
    /// Standard error from the covariance.
    pub uncertainty: f64,
    /// Start value.
    pub start: f64,
}

/// One data row with the fitted model.
#[derive(Debug, Clone, PartialEq)]
pub struct FitRow {
    /// The value of the data's first key.
    pub value: CaseValue,
    /// The values of every key column (the first is `value`).
    pub values: Vec<CaseValue>,
    /// Observed quantity.
    pub observed: f64,
    /// Model quantity at the fitted values.
    pub model: f64,
    /// Uncertainty of the observation, when given.
    pub uncertainty: Option<f64>,
}

/// The result of a fit.
#[derive(Debug, Clone, PartialEq)]
pub struct FitResult {
    /// The data's first key (the series' axis).
    pub key: String,
    /// Every key column of the data (the first is `key`).
    pub keys: Vec<String>,
    /// The observed quantity.
    pub quantity: Quantity,
    /// Fitted keys.
    pub parameters: Vec<FitParameter>,
    /// Correlation matrix, in the order of `parameters`.
    pub correlation: Vec<Vec<f64>>,
    /// Rows with observed and model values.
    pub rows: Vec<FitRow>,
    /// Root mean square of `model - observed`.
    pub rms: f64,
    /// Weighted sum of squares.
    pub chi2: f64,
    /// Degrees of freedom `m - n`.
    pub dof: usize,
    /// Model evaluations (each one solve per data row).
    pub evaluations: usize,
    /// Why the minimiser stopped.
    pub termination: String,
    /// The fitted model on about [`CURVE_POINTS`] values of the key over
    /// the data's range, between the data as well as at them
    /// ([`super::curve`]), as (key value, model) pairs.
    pub curve: Vec<(f64, f64)>,
    /// What the user should know about the fitted values (an implausible
    /// or negative alternation, ...), each text once.
    pub warnings: Vec<String>,
}

/// Values of the key at which the fitted model is evaluated for its curve.
pub const CURVE_POINTS: usize = 100;

/// Why a fit failed.
#[derive(Debug, thiserror::Error)]
pub enum FitError {
    /// The model could not be evaluated at the start values.
    #[error("at the start values: {0}")]
    Start(Box<EvalError>),
    /// The model could not be evaluated during the fit.
    #[error("at {at}: {source}")]
    Eval {
        /// The parameter values tried.
        at: String,
        /// What went wrong.
        source: Box<EvalError>,
    },
    /// Fewer data than needed.
    #[error("{rows} data rows cannot determine {free} free keys{}", if *.scaled { " with uncertainties estimated from the scatter (need more rows than keys, or an uncertainty column)" } else { "" })]
    TooFewRows {
        /// Data rows.
        rows: usize,
        /// Free keys.
        free: usize,
        /// Whether the covariance is scaled by the scatter.
        scaled: bool,
    },
    /// The data do not determine the free keys.
    #[error("the data do not determine {keys}: changing {what} leaves the model unchanged (relative singular value {ratio:.1e}); hold it fixed (leave it out of --free), or add data that depend on it")]
    NotDetermined {
        /// The keys involved.
        keys: String,
        /// The combination.
        what: String,
        /// Smallest over largest singular value.
        ratio: f64,
    },
    /// The minimiser did not converge.
    #[error("the fit did not converge ({reason}) after {evaluations} model evaluations; try other start values (--set) or bounds")]
    NoConvergence {
        /// The minimiser's reason.
        reason: String,
        /// Model evaluations.
        evaluations: usize,
    },
    /// Ctrl-C was pressed; the best values so far are kept.
    #[error("interrupted after {evaluations} model evaluations")]
    Interrupted {
        /// Best parameter values so far.
        best: Vec<f64>,
        /// Model evaluations.
        evaluations: usize,
    },
}

/// The state of a running fit, as its checkpoint keeps it: the best
/// values so far (external, in the order of the free keys).
#[derive(Debug, Clone, PartialEq)]
pub struct FitProgress {
    /// Best values so far.
    pub best: Vec<f64>,
    /// Model evaluations so far.
    pub evaluations: usize,
}

struct Problem<'a> {
    spec: &'a FitSpec,
    u: DVector<f64>,
    residuals: Option<DVector<f64>>,
    stop: Option<&'a AtomicBool>,
    runner: &'a Runner<'a, FitProgress>,
    failure: &'a Mutex<Option<FitError>>,
    evaluations: &'a Mutex<usize>,
    best: &'a Mutex<(f64, Vec<f64>)>,
}

fn overrides_for(spec: &FitSpec, p: &[f64], row: &DataRow) -> Vec<Override> {
    let mut v: Vec<Override> = spec
        .data
        .keys
        .iter()
        .zip(&row.values)
        .map(|(key, value)| Override {
            key: key.clone(),
            value: value.toml_text(),
        })
        .collect();
    v.extend(spec.free.iter().zip(p).map(|(f, x)| Override {
        key: f.key.clone(),
        value: format!("{x:?}"),
    }));
    v
}

/// The model quantity at every data row for external values `p`, in parallel
/// over rows (row order kept).
pub fn model_values(
    spec: &FitSpec,
    p: &[f64],
    stop: Option<&AtomicBool>,
) -> Result<Vec<f64>, EvalError> {
    spec.data
        .rows
        .par_iter()
        .map(|row| {
            if stop.is_some_and(|s| s.load(Ordering::SeqCst)) {
                return Err(EvalError::Interrupted);
            }
            evaluate(
                &spec.document,
                &spec.overrides,
                &overrides_for(spec, p, row),
                spec.data.quantity,
            )
        })
        .collect()
}

fn weights(spec: &FitSpec) -> Vec<f64> {
    spec.data
        .rows
        .iter()
        .map(|r| 1.0 / r.uncertainty.unwrap_or(1.0))
        .collect()
}

impl Problem<'_> {
    fn external(&self, u: &DVector<f64>) -> Vec<f64> {
        self.spec
            .free
            .iter()
            .zip(u.iter())
            .map(|(f, &x)| f.external(x))
            .collect()
    }

    fn weighted(&self, u: &DVector<f64>) -> Option<DVector<f64>> {
        let p = self.external(u);
        let evaluations = {
            let mut n = self.evaluations.lock().unwrap_or_else(|e| e.into_inner());
            *n += 1;
            *n
        };
        match model_values(self.spec, &p, self.stop) {
            Ok(m) => {
                let w = weights(self.spec);
                let r = DVector::from_iterator(
                    m.len(),
                    m.iter()
                        .zip(&self.spec.data.rows)
                        .zip(&w)
                        .map(|((m, row), w)| (m - row.observed) * w),
                );
                let chi2 = r.norm_squared();
                let mut best = self.best.lock().unwrap_or_else(|e| e.into_inner());
                if chi2 < best.0 {
                    *best = (chi2, p);
                    self.runner.save(false, || FitProgress {
                        best: best.1.clone(),
                        evaluations,
                    });
                }
                Some(r)
            }
            Err(e) => {
                let mut f = self.failure.lock().unwrap_or_else(|e| e.into_inner());
                if f.is_none() {
                    *f = Some(match e {
                        EvalError::Interrupted => FitError::Interrupted {
                            best: Vec::new(),
                            evaluations: 0,
                        },
                        e => FitError::Eval {
                            at: describe(self.spec, &p),
                            source: Box::new(e),
                        },
                    });
                }
                None
            }
        }
    }
}

fn describe(spec: &FitSpec, p: &[f64]) -> String {
    spec.free
        .iter()
        .zip(p)
        .map(|(f, x)| format!("{}={x}", f.key))
        .collect::<Vec<_>>()
        .join(", ")
}

impl LeastSquaresProblem<f64, Dyn, Dyn> for Problem<'_> {
    type ResidualStorage = Owned<f64, Dyn>;
    type JacobianStorage = Owned<f64, Dyn, Dyn>;
    type ParameterStorage = Owned<f64, Dyn>;

    fn set_params(&mut self, u: &DVector<f64>) {
        self.u.copy_from(u);
        self.residuals = self.weighted(u);
    }

    fn params(&self) -> DVector<f64> {
        self.u.clone()
    }

    fn residuals(&self) -> Option<DVector<f64>> {
        self.residuals.clone()
    }

    fn jacobian(&self) -> Option<DMatrix<f64>> {
        let m = self.spec.data.rows.len();
        let n = self.u.len();
        let mut j = DMatrix::zeros(m, n);
        for k in 0..n {
            let h = step(self.u[k]);
            let mut up = self.u.clone();
            up[k] += h;
            let mut down = self.u.clone();
            down[k] -= h;
            let col = (self.weighted(&up)? - self.weighted(&down)?) / (2.0 * h);
            j.set_column(k, &col);
        }
        Some(j)
    }
}

fn step(x: f64) -> f64 {
    f64::EPSILON.cbrt() * x.abs().max(1e-3)
}

/// Jacobian of the weighted residuals in the external values at `p`, by
/// central differences kept inside the bounds.
fn external_jacobian(
    spec: &FitSpec,
    p: &[f64],
    stop: Option<&AtomicBool>,
) -> Result<DMatrix<f64>, EvalError> {
    let w = weights(spec);
    let m = spec.data.rows.len();
    let mut j = DMatrix::zeros(m, p.len());
    for (k, f) in spec.free.iter().enumerate() {
        let h = step(p[k]);
        let a = (p[k] - h).max(f.lower.unwrap_or(f64::NEG_INFINITY));
        let b = (p[k] + h).min(f.upper.unwrap_or(f64::INFINITY));
        let mut pa = p.to_vec();
        pa[k] = a;
        let mut pb = p.to_vec();
        pb[k] = b;
        let ma = model_values(spec, &pa, stop)?;
        let mb = model_values(spec, &pb, stop)?;
        for i in 0..m {
            j[(i, k)] = (mb[i] - ma[i]) / (b - a) * w[i];
        }
    }
    Ok(j)
}

/// Checks that the columns of `j` are independent; returns the error naming
/// the keys of the weakest combination when they are not.
fn check_determined(spec: &FitSpec, j: &DMatrix<f64>) -> Result<(), FitError> {
    let n = j.ncols();
    let mut scaled = j.clone();
    for k in 0..n {
        let norm = j.column(k).norm();
        if norm == 0.0 || !norm.is_finite() {
            return Err(FitError::NotDetermined {
                keys: spec.free[k].key.clone(),
                what: spec.free[k].key.clone(),
                ratio: 0.0,
            });
        }
        scaled.column_mut(k).scale_mut(1.0 / norm);
    }
    let svd = scaled.svd(false, true);
    let smax = svd.singular_values.max();
    let (imin, smin) = svd.singular_values.argmin();
    let ratio = smin / smax;
    if ratio < DETERMINATION_LIMIT {
        let v_t = svd.v_t.as_ref().map(|v| v.row(imin).clone_owned());
        let involved: Vec<(String, f64)> = match v_t {
            Some(v) => spec
                .free
                .iter()
                .zip(v.iter())
                .filter(|(_, c)| c.abs() > 0.1)
                .map(|(f, c)| (f.key.clone(), *c))
                .collect(),
            None => spec.free.iter().map(|f| (f.key.clone(), 1.0)).collect(),
        };
        return Err(FitError::NotDetermined {
            keys: involved
                .iter()
                .map(|(k, _)| k.as_str())
                .collect::<Vec<_>>()
                .join(" and "),
            what: involved
                .iter()
                .map(|(k, c)| format!("{c:+.2}·{k}"))
                .collect::<Vec<_>>()
                .join(" "),
            ratio,
        });
    }
    Ok(())
}

/// Runs the fit. The runner's stop flag (Ctrl-C) ends it early with
/// [`FitError::Interrupted`] carrying the best values so far; each new best
/// is offered to the runner's checkpoint.
pub fn fit(spec: &FitSpec, runner: &Runner<'_, FitProgress>) -> Result<FitResult, FitError> {
    let stop = runner.stop_flag();
    let m = spec.data.rows.len();
    let n = spec.free.len();
    let scaled = spec.data.rows.iter().any(|r| r.uncertainty.is_none());
    if m < n || (scaled && m <= n) {
        return Err(FitError::TooFewRows {
            rows: m,
            free: n,
            scaled,
        });
    }
    let start: Vec<f64> = spec.free.iter().map(|f| f.start).collect();
    model_values(spec, &start, stop).map_err(|e| FitError::Start(Box::new(e)))?;
    let failure = Mutex::new(None);
    let evaluations = Mutex::new(0usize);
    let best = Mutex::new((f64::INFINITY, start.clone()));
    let u0 = DVector::from_iterator(n, spec.free.iter().map(|f| f.internal(f.start)));
    let problem = Problem {
        spec,
        u: u0.clone(),
        residuals: None,
        stop,
        runner,
        failure: &failure,
        evaluations: &evaluations,
        best: &best,
    };
    let mut problem = problem;
    problem.set_params(&u0);
    let (done, report) = LevenbergMarquardt::new()
        .with_patience(50)
        .minimize(problem);
    let evals = *evaluations.lock().unwrap_or_else(|e| e.into_inner());
    let failed = failure.lock().unwrap_or_else(|e| e.into_inner()).take();
    if let Some(f) = failed {
        return Err(match f {
            FitError::Interrupted { .. } => FitError::Interrupted {
                best: best.lock().unwrap_or_else(|e| e.into_inner()).1.clone(),
                evaluations: evals,
            },
            other => other,
        });
    }
    if !report.termination.was_successful() {
        return Err(FitError::NoConvergence {
            reason: termination_word(&report.termination),
            evaluations: evals,
        });
    }
    let p = done.external(&done.u);
    let model = model_values(spec, &p, stop).map_err(|source| FitError::Eval {
        at: describe(spec, &p),
        source: Box::new(source),
    })?;
    let j = external_jacobian(spec, &p, stop).map_err(|source| FitError::Eval {
        at: describe(spec, &p),
        source: Box::new(source),
    })?;
    check_determined(spec, &j)?;
    let curve = super::curve::fitted_curve(spec, &p, &model, CURVE_POINTS, stop).map_err(|_| {
        FitError::Interrupted {
            best: p.clone(),
            evaluations: evals,
        }
    })?;
    let w = weights(spec);
    let chi2: f64 = model
        .iter()
        .zip(&spec.data.rows)
        .zip(&w)
        .map(|((m, r), w)| ((m - r.observed) * w).powi(2))
        .sum();
    let dof = m - n;
    let jtj = j.transpose() * &j;
    let mut cov = jtj
        .clone()
        .try_inverse()
        .ok_or_else(|| FitError::NotDetermined {
            keys: describe(spec, &p),
            what: "the free keys together".into(),
            ratio: 0.0,
        })?;
    if scaled {
        cov *= chi2 / dof as f64;
    }
    let sd: Vec<f64> = (0..n).map(|k| cov[(k, k)].max(0.0).sqrt()).collect();
    let correlation = (0..n)
        .map(|a| (0..n).map(|b| cov[(a, b)] / (sd[a] * sd[b])).collect())
        .collect();
    let rms = (model
        .iter()
        .zip(&spec.data.rows)
        .map(|(m, r)| (m - r.observed).powi(2))
        .sum::<f64>()
        / m as f64)
        .sqrt();
    let warnings = fitted_warnings(spec, &p);
    Ok(FitResult {
        key: spec.data.key.clone(),
        keys: spec.data.keys.clone(),
        warnings,
        quantity: spec.data.quantity,
        parameters: spec
            .free
            .iter()
            .zip(&p)
            .zip(&sd)
            .map(|((f, &value), &uncertainty)| FitParameter {
                key: f.key.clone(),
                value,
                uncertainty,
                start: f.start,
            })
            .collect(),
        correlation,
        rows: spec
            .data
            .rows
            .iter()
            .zip(&model)
            .map(|(r, &m)| FitRow {
                value: r.value,
                values: r.values.clone(),
                observed: r.observed,
                model: m,
                uncertainty: r.uncertainty,
            })
            .collect(),
        rms,
        chi2,
        dof,
        evaluations: evals,
        termination: termination_word(&report.termination),
        curve,
    })
}

/// The input's plausibility warnings at the fitted values `p` over every
/// data row, each text once in the order first met (a fitted negative
/// alternation, a box reaching far past the chain).
fn fitted_warnings(spec: &FitSpec, p: &[f64]) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for row in &spec.data.rows {
        let mut ovs = spec.overrides.clone();
        ovs.extend(overrides_for(spec, p, row));
        if let Ok((model, _)) = spec.document.model(&ovs) {
            for w in model.warnings {
                if !out.contains(&w) {
                    out.push(w);
                }
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn free(lower: Option<f64>, upper: Option<f64>) -> Free {
        Free {
            key: "k".into(),
            start: 0.0,
            lower,
            upper,
        }
    }

    proptest! {
        #[test]
        fn bound_transforms_round_trip_and_stay_inside(p in -50.0f64..50.0, lo in -60.0f64..-55.0, w in 1.0f64..200.0) {
            for f in [free(Some(lo), Some(lo + w + 110.0)), free(Some(lo), None), free(None, Some(lo + w + 110.0)), free(None, None)] {
                let back = f.external(f.internal(p));
                prop_assert!((back - p).abs() < 1e-6 * (1.0 + p.abs()), "{f:?} {p} {back}");
            }
        }

        #[test]
        fn any_internal_value_maps_inside_the_bounds(u in -1e3f64..1e3) {
            let f = free(Some(0.0), Some(3.0));
            let p = f.external(u);
            prop_assert!((0.0..=3.0).contains(&p));
            prop_assert!(free(Some(1.0), None).external(u) >= 1.0);
            prop_assert!(free(None, Some(1.0)).external(u) <= 1.0);
        }
    }
}
