//! Natural cubic spline interpolation through tabulated points.
//!
//! Given knots `x_0 < x_1 < ... < x_{n-1}` with values `y_i`, the spline is
//! the twice continuously differentiable piecewise cubic that passes through
//! every knot and has zero second derivative at both ends ("natural" end
//! conditions, `M_0 = M_{n-1} = 0`). With `h_i = x_{i+1} - x_i` the second
//! derivatives `M_i` at the interior knots solve the tridiagonal system
//!
//! ```text
//! h_{i-1} M_{i-1} + 2 (h_{i-1} + h_i) M_i + h_i M_{i+1}
//!     = 6 [ (y_{i+1} - y_i) / h_i - (y_i - y_{i-1}) / h_{i-1} ],   i = 1..n-2,
//! ```
//!
//! which is strictly diagonally dominant and is solved by the Thomas
//! algorithm (Gaussian elimination without pivoting specialised to three
//! diagonals). On `[x_i, x_{i+1}]`, with `t = x - x_i`,
//!
//! ```text
//! S(x) = y_i + b_i t + (M_i / 2) t^2 + (M_{i+1} - M_i) / (6 h_i) t^3,
//! b_i  = (y_{i+1} - y_i) / h_i - h_i (2 M_i + M_{i+1}) / 6.
//! ```
//!
//! Sources: C. de Boor, *A Practical Guide to Splines* (Springer, rev. ed.
//! 2001), ch. IV; R. L. Burden and J. D. Faires, *Numerical Analysis*,
//! sec. 3.5 (natural spline and its tridiagonal system); the Thomas algorithm
//! as in W. H. Press et al., *Numerical Recipes*, 3rd ed., sec. 2.4. For a
//! smooth function the interpolation error away from the ends is `O(h^4)`;
//! near an end where the function's second derivative is not zero the
//! natural condition reduces it to `O(h^2)`.
//!
//! With two knots the spline is the straight line through them.

/// Errors building a [`NaturalCubicSpline`]. Indices are 0-based positions
/// in the knot arrays.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SplineError {
    /// Fewer than two knots.
    #[error("a spline needs at least 2 knots, got {found}")]
    TooFewKnots {
        /// Number of knots given.
        found: usize,
    },
    /// `xs` and `ys` differ in length.
    #[error("spline knots and values differ in length ({xs} x values, {ys} y values)")]
    LengthMismatch {
        /// Length of `xs`.
        xs: usize,
        /// Length of `ys`.
        ys: usize,
    },
    /// A knot or value is infinite or NaN.
    #[error("spline knot {index} is not finite")]
    NonFinite {
        /// Position of the offending knot.
        index: usize,
    },
    /// `xs[index]` is not greater than `xs[index - 1]`.
    #[error("spline knots must increase strictly, but knot {index} does not")]
    NotIncreasing {
        /// Position of the first knot out of order.
        index: usize,
    },
}

/// A natural cubic spline through strictly increasing knots.
///
/// Evaluation is meant for `x` inside `[x_0, x_{n-1}]`. Outside, [`eval`]
/// and [`eval_derivative`] simply continue the end cubic pieces, which is
/// rarely what a model wants: callers decide what happens outside the
/// table (see `super::table::Outside`).
///
/// [`eval`]: NaturalCubicSpline::eval
/// [`eval_derivative`]: NaturalCubicSpline::eval_derivative
#[derive(Debug, Clone, PartialEq)]
pub struct NaturalCubicSpline {
    xs: Vec<f64>,
    ys: Vec<f64>,
    /// Per interval `[b, c, d]` of `y_i + b t + c t^2 + d t^3`.
    coeffs: Vec<[f64; 3]>,
    /// Second derivatives `M_i` at the knots.
    second: Vec<f64>,
}

impl NaturalCubicSpline {
    /// Builds the spline through `(xs[i], ys[i])`.
    ///
    /// Needs at least two knots, equal lengths, finite numbers and strictly
    /// increasing `xs`. Cost `O(n)`.
    pub fn new(xs: Vec<f64>, ys: Vec<f64>) -> Result<Self, SplineError> {
        if xs.len() != ys.len() {
            return Err(SplineError::LengthMismatch {
                xs: xs.len(),
                ys: ys.len(),
            });
        }
        let n = xs.len();
        if n < 2 {
            return Err(SplineError::TooFewKnots { found: n });
        }
        if let Some(index) = (0..n).find(|&i| !xs[i].is_finite() || !ys[i].is_finite()) {
            return Err(SplineError::NonFinite { index });
        }
        if let Some(index) = (1..n).find(|&i| xs[i] <= xs[i - 1]) {
            return Err(SplineError::NotIncreasing { index });
        }
        let h: Vec<f64> = xs.windows(2).map(|w| w[1] - w[0]).collect();
        let slope: Vec<f64> = (0..n - 1).map(|i| (ys[i + 1] - ys[i]) / h[i]).collect();
        let mut second = vec![0.0; n];
        if n > 2 {
            // Unknowns M_1..M_{n-2}; row k (k = i - 1) has sub-diagonal
            // h_{i-1}, diagonal 2 (h_{i-1} + h_i), super-diagonal h_i.
            let m = n - 2;
            let mut diag = Vec::with_capacity(m);
            let mut rhs = Vec::with_capacity(m);
            for i in 1..n - 1 {
                diag.push(2.0 * (h[i - 1] + h[i]));
                rhs.push(6.0 * (slope[i] - slope[i - 1]));
            }
            // Forward elimination (Thomas algorithm).
            for k in 1..m {
                let sub = h[k]; // h_{i-1} with i = k + 1
                let sup_prev = h[k]; // h_i of the previous row, i = k
                let w = sub / diag[k - 1];
                diag[k] -= w * sup_prev;
                rhs[k] -= w * rhs[k - 1];
            }
            // Back substitution.
            second[m] = rhs[m - 1] / diag[m - 1];
            for k in (0..m - 1).rev() {
                second[k + 1] = (rhs[k] - h[k + 1] * second[k + 2]) / diag[k];
            }
        }
        let coeffs = (0..n - 1)
            .map(|i| {
                let (mi, mj) = (second[i], second[i + 1]);
                [
                    slope[i] - h[i] * (2.0 * mi + mj) / 6.0,
                    0.5 * mi,
                    (mj - mi) / (6.0 * h[i]),
                ]
            })
            .collect();
        Ok(NaturalCubicSpline {
            xs,
            ys,
            coeffs,
            second,
        })
    }

    /// The knots `x_i`, strictly increasing.
    pub fn knots(&self) -> &[f64] {
        &self.xs
    }

    /// The values `y_i` at the knots.
    pub fn values(&self) -> &[f64] {
        &self.ys
    }

    /// The second derivatives `M_i` at the knots (zero at both ends).
    pub fn second_derivatives(&self) -> &[f64] {
        &self.second
    }

    /// Index `i` of the interval `[x_i, x_{i+1}]` holding `x`, clamped to
    /// the first / last interval outside the knots. Binary search.
    fn interval(&self, x: f64) -> usize {
        let above = self.xs.partition_point(|&k| k <= x);
        above.saturating_sub(1).min(self.xs.len() - 2)
    }

    /// Like [`interval`](Self::interval) but tries `hint` and the interval
    /// after it first; cheap for monotone sequential queries.
    fn interval_from(&self, x: f64, hint: usize) -> usize {
        let last = self.xs.len() - 2;
        for i in [hint, hint.saturating_add(1)] {
            if i <= last && (x >= self.xs[i] || i == 0) && (x < self.xs[i + 1] || i == last) {
                return i;
            }
        }
        self.interval(x)
    }

    fn eval_in(&self, i: usize, x: f64) -> f64 {
        if x == self.xs[self.xs.len() - 1] {
            return self.ys[self.ys.len() - 1];
        }
        let t = x - self.xs[i];
        let [b, c, d] = self.coeffs[i];
        self.ys[i] + t * (b + t * (c + t * d))
    }

    fn derivative_in(&self, i: usize, x: f64) -> f64 {
        let t = x - self.xs[i];
        let [b, c, d] = self.coeffs[i];
        b + t * (2.0 * c + t * 3.0 * d)
    }

    /// Spline value at `x`, for `x` in `[x_0, x_{n-1}]`; exact `y_i` at the
    /// knots. Outside the knots the end cubic pieces are continued; callers
    /// handle outside points themselves. NaN gives NaN.
    pub fn eval(&self, x: f64) -> f64 {
        self.eval_in(self.interval(x), x)
    }

    /// As [`eval`](Self::eval), starting the interval search at `*cursor`
    /// and leaving the interval found there. Start with `*cursor = 0`; for
    /// increasing queries most calls skip the binary search. Any cursor
    /// value is safe.
    pub fn eval_with_cursor(&self, x: f64, cursor: &mut usize) -> f64 {
        let i = self.interval_from(x, *cursor);
        *cursor = i;
        self.eval_in(i, x)
    }

    /// First derivative `dS/dx` at `x`, for `x` in `[x_0, x_{n-1}]` (the
    /// spline is continuously differentiable, so knots need no care).
    pub fn eval_derivative(&self, x: f64) -> f64 {
        self.derivative_in(self.interval(x), x)
    }

    /// Second derivative at `x`: linear between the `M_i`.
    pub fn eval_second_derivative(&self, x: f64) -> f64 {
        let i = self.interval(x);
        let [_, c, d] = self.coeffs[i];
        2.0 * c + 6.0 * d * (x - self.xs[i])
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;
    use proptest::prelude::*;
    use std::f64::consts::PI;

    fn spline(xs: &[f64], ys: &[f64]) -> NaturalCubicSpline {
        match NaturalCubicSpline::new(xs.to_vec(), ys.to_vec()) {
            Ok(s) => s,
            Err(e) => panic!("spline failed: {e}"),
        }
    }

    fn uniform(n: usize, a: f64, b: f64) -> Vec<f64> {
        (0..n)
            .map(|i| a + (b - a) * i as f64 / (n - 1) as f64)
            .collect()
    }

    #[test]
    fn straight_lines_are_exact() {
        // closed form: a natural spline reproduces linear data exactly.
        let xs = [-1.0, 0.3, 0.5, 2.0, 4.5, 4.6];
        let ys: Vec<f64> = xs.iter().map(|x| 2.5 * x - 1.0).collect();
        let s = spline(&xs, &ys);
        for k in 0..=100 {
            let x = -1.0 + 5.6 * k as f64 / 100.0;
            assert_abs_diff_eq!(s.eval(x), 2.5 * x - 1.0, epsilon = 1e-13);
            assert_abs_diff_eq!(s.eval_derivative(x), 2.5, epsilon = 1e-13);
        }
        for m in s.second_derivatives() {
            assert_abs_diff_eq!(*m, 0.0, epsilon = 1e-13);
        }
        // Two knots give the straight line through them.
        let two = spline(&[1.0, 3.0], &[2.0, -2.0]);
        assert_eq!(two.eval(2.0), 0.0);
        assert_eq!(two.eval_derivative(1.7), -2.0);
    }

    #[test]
    fn three_knot_closed_form() {
        // Closed form for 3 knots (worked by hand from the system in the
        // module docs): 2 (h0 + h1) M1 = 6 [(y2 - y1)/h1 - (y1 - y0)/h0],
        // i.e. M1 = 3 [(y2 - y1)/h1 - (y1 - y0)/h0] / (h0 + h1), and on
        // [x0, x1]
        //   S(x) = M1 (x - x0)^3 / (6 h0) + y0 (x1 - x)/h0
        //          + (y1/h0 - M1 h0/6) (x - x0).
        // Knots (0,0), (1,1), (2,0): M1 = -3, S(x) = 1.5 x - 0.5 x^3 on
        // [0, 1], so S(0.5) = 0.6875, S'(0) = 1.5, S'(1) = 0.
        let s = spline(&[0.0, 1.0, 2.0], &[0.0, 1.0, 0.0]);
        assert_abs_diff_eq!(s.second_derivatives()[1], -3.0, epsilon = 1e-14);
        assert_abs_diff_eq!(s.eval(0.5), 0.6875, epsilon = 1e-14);
        assert_abs_diff_eq!(s.eval(1.5), 0.6875, epsilon = 1e-14);
        assert_abs_diff_eq!(s.eval_derivative(0.0), 1.5, epsilon = 1e-14);
        assert_abs_diff_eq!(s.eval_derivative(1.0), 0.0, epsilon = 1e-14);
        // Uneven knots (0,1), (1,3), (3,2): h0 = 1, h1 = 2,
        // M1 = 3 (-1/2 - 2) / 3 = -2.5;
        // S(0.5) = -2.5 (0.125)/6 + 0.5 + (3 + 2.5/6) 0.5 = 2.15625;
        // on [1, 3]: S(2) = M1 (1)^3/12 + (3/2 + 2.5 * 2/6) + (2/2) = 3.125.
        let s = spline(&[0.0, 1.0, 3.0], &[1.0, 3.0, 2.0]);
        assert_abs_diff_eq!(s.second_derivatives()[1], -2.5, epsilon = 1e-14);
        assert_abs_diff_eq!(s.eval(0.5), 2.15625, epsilon = 1e-14);
        assert_abs_diff_eq!(s.eval(2.0), 3.125, epsilon = 1e-14);
    }

    #[test]
    fn natural_ends_have_zero_curvature() {
        let xs = [0.0, 0.4, 1.1, 1.5, 2.7, 3.0];
        let ys = [1.0, -2.0, 0.5, 3.0, 2.0, -1.0];
        let s = spline(&xs, &ys);
        assert_eq!(s.eval_second_derivative(0.0), 0.0);
        assert_abs_diff_eq!(s.eval_second_derivative(3.0), 0.0, epsilon = 1e-12);
        // Interior second derivatives are not all zero for this data.
        assert!(s.second_derivatives()[1..5].iter().any(|m| m.abs() > 1.0));
    }

    #[test]
    fn fourth_order_convergence_for_sine() {
        // de Boor, A Practical Guide to Splines, ch. IV: error O(h^4) away
        // from the ends for a smooth function, so halving h divides the
        // error by about 16.
        let max_error = |n: usize| {
            let xs = uniform(n, 0.0, PI);
            let ys: Vec<f64> = xs.iter().map(|x| x.sin()).collect();
            let s = spline(&xs, &ys);
            (0..=2000)
                .map(|k| PI / 4.0 + (PI / 2.0) * k as f64 / 2000.0)
                .map(|x| (s.eval(x) - x.sin()).abs())
                .fold(0.0f64, f64::max)
        };
        let coarse = max_error(11);
        let fine = max_error(21);
        let order = (coarse / fine).log2();
        assert!((3.5..=4.5).contains(&order), "observed order {order}");
        // Size check, h = pi/10: error about 5/384 h^4 (de Boor, ch. IV).
        assert!(coarse < 5.0 / 384.0 * (PI / 10.0).powi(4) * 2.0);
    }

    #[test]
    fn derivative_follows_cosine() {
        let xs = uniform(41, 0.0, PI);
        let ys: Vec<f64> = xs.iter().map(|x| x.sin()).collect();
        let s = spline(&xs, &ys);
        for k in 0..=50 {
            let x = PI * k as f64 / 50.0;
            // O(h^3) with h = pi/40: about 5e-4 at most (common practice, no source).
            assert_abs_diff_eq!(s.eval_derivative(x), x.cos(), epsilon = 1e-4);
        }
    }

    #[test]
    fn bad_input_is_an_error() {
        let new = NaturalCubicSpline::new;
        assert_eq!(
            new(vec![1.0], vec![1.0]),
            Err(SplineError::TooFewKnots { found: 1 })
        );
        assert_eq!(
            new(vec![1.0, 2.0], vec![1.0]),
            Err(SplineError::LengthMismatch { xs: 2, ys: 1 })
        );
        assert_eq!(
            new(vec![0.0, 1.0, 1.0], vec![0.0; 3]),
            Err(SplineError::NotIncreasing { index: 2 })
        );
        assert_eq!(
            new(vec![0.0, 1.0, 2.0], vec![0.0, f64::NAN, 0.0]),
            Err(SplineError::NonFinite { index: 1 })
        );
    }

    fn knots() -> impl Strategy<Value = (Vec<f64>, Vec<f64>)> {
        (2usize..25).prop_flat_map(|n| {
            (
                prop::collection::vec(0.01f64..2.0, n),
                prop::collection::vec(-10.0f64..10.0, n),
            )
                .prop_map(|(gaps, ys)| {
                    let mut x = -3.0;
                    let xs = gaps
                        .iter()
                        .map(|g| {
                            x += g;
                            x
                        })
                        .collect();
                    (xs, ys)
                })
        })
    }

    proptest! {
        #[test]
        fn interpolates_knots_and_is_c2(data in knots()) {
            let (xs, ys) = data;
            let s = NaturalCubicSpline::new(xs.clone(), ys.clone()).unwrap();
            let scale = 1.0 + ys.iter().fold(0.0f64, |a, y| a.max(y.abs()));
            for (x, y) in xs.iter().zip(&ys) {
                prop_assert!((s.eval(*x) - y).abs() <= 1e-12 * scale);
            }
            // First and second derivatives agree from both sides of each
            // interior knot.
            for i in 1..xs.len() - 1 {
                let left = s.derivative_in(i - 1, xs[i]);
                let right = s.derivative_in(i, xs[i]);
                let [_, c, d] = s.coeffs[i - 1];
                let left2 = 2.0 * c + 6.0 * d * (xs[i] - xs[i - 1]);
                let tol = 1e-8 * (1.0 + left.abs() + left2.abs()) * scale;
                prop_assert!((left - right).abs() <= tol, "S' jumps at knot {}", i);
                prop_assert!((left2 - s.second[i]).abs() <= tol, "S'' jumps at knot {}", i);
            }
        }

        #[test]
        fn cursor_search_matches_binary_search(
            data in knots(),
            queries in prop::collection::vec(0.0f64..1.0, 1..40),
        ) {
            let (xs, ys) = data;
            let s = NaturalCubicSpline::new(xs.clone(), ys).unwrap();
            let (a, b) = (xs[0], xs[xs.len() - 1]);
            let mut cursor = 0;
            let mut sorted = queries.clone();
            sorted.sort_by(f64::total_cmp);
            // Sorted queries (the fast path), then unsorted ones.
            for q in sorted.iter().chain(&queries) {
                let x = a + (b - a) * q;
                prop_assert_eq!(s.eval_with_cursor(x, &mut cursor), s.eval(x));
            }
            // Stale or out-of-range cursors are safe.
            let mut wild = usize::MAX;
            prop_assert_eq!(s.eval_with_cursor(b, &mut wild), s.eval(b));
        }
    }
}
