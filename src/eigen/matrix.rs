//! Storage of real symmetric banded matrices (optionally periodic, with
//! wrap-around corners) and the generalized problem `A x = E B x`.
//!
//! Storage by diagonals: `bands[0]` is the main diagonal, `bands[d][i] = A[i][i+d]`
//! for `d = 1..=p`; with `wrap`, `bands[d][i] = A[i][(i+d) % n]` and every band
//! has length `n` (the last `d` entries of band `d` are the corner couplings).

use nalgebra::DMatrix;

use super::error::EigenError;

/// Real symmetric banded matrix. `bands[0]` is the diagonal (len n);
/// `bands[d][i] = A[i][i+d]` for d = 1..=p (len n - d), or, when `wrap`,
/// `A[i][(i+d) % n]` (len n; requires n > 2p).
#[derive(Debug, Clone, PartialEq)]
pub struct SymBanded {
    /// Dimension.
    pub n: usize,
    /// Diagonals 0..=p (see type docs).
    pub bands: Vec<Vec<f64>>,
    /// Periodic (ring) storage with wrap-around corners.
    pub wrap: bool,
}

/// The generalized problem `A x = E B x`; `b = None` means B = I.
/// B must be symmetric positive definite, of the same or smaller bandwidth
/// and the same `n` and `wrap` as A.
#[derive(Debug, Clone, Copy)]
pub struct Problem<'a> {
    /// The Hamiltonian-like matrix A.
    pub a: &'a SymBanded,
    /// The metric matrix B (None = identity).
    pub b: Option<&'a SymBanded>,
}

impl SymBanded {
    /// Half-bandwidth p (number of off-diagonals stored).
    pub fn half_bandwidth(&self) -> usize {
        self.bands.len().saturating_sub(1)
    }

    /// Checks band lengths, the wrap condition n > 2p and finiteness.
    pub fn validate(&self) -> Result<(), EigenError> {
        let shape = |what: String| Err(EigenError::Shape { what });
        if self.n == 0 {
            return shape("matrix dimension is 0".into());
        }
        if self.bands.is_empty() {
            return shape("no diagonal given".into());
        }
        let p = self.half_bandwidth();
        if self.wrap && self.n <= 2 * p {
            return shape(format!("wrap needs n > 2p, got n = {}, p = {p}", self.n));
        }
        if !self.wrap && p >= self.n && p > 0 {
            return shape(format!("half-bandwidth {p} >= n = {}", self.n));
        }
        for (d, band) in self.bands.iter().enumerate() {
            let want = if self.wrap { self.n } else { self.n - d };
            if band.len() != want {
                return shape(format!(
                    "band {d} has length {}, expected {want}",
                    band.len()
                ));
            }
            if band.iter().any(|v| !v.is_finite()) {
                return shape(format!("band {d} holds a non-finite entry"));
            }
        }
        Ok(())
    }

    /// Entry `A[i][j]` (0 outside the band). Panics if i or j >= n.
    pub fn get(&self, i: usize, j: usize) -> f64 {
        assert!(i < self.n && j < self.n, "index out of range");
        let p = self.half_bandwidth();
        let n = self.n;
        if self.wrap {
            let d = (j + n - i) % n;
            if d <= p {
                return self.bands[d][i];
            }
            let d2 = n - d;
            if d2 <= p {
                return self.bands[d2][j];
            }
            0.0
        } else {
            let (lo, hi) = if i <= j { (i, j) } else { (j, i) };
            let d = hi - lo;
            if d <= p {
                self.bands[d][lo]
            } else {
                0.0
            }
        }
    }

    /// y = A x. Panics if `x` or `y` is shorter than n.
    pub fn mul_vec(&self, x: &[f64], y: &mut [f64]) {
        let n = self.n;
        let x = &x[..n];
        let y = &mut y[..n];
        for ((yi, di), xi) in y.iter_mut().zip(&self.bands[0]).zip(x) {
            *yi = di * xi;
        }
        for (d, band) in self.bands.iter().enumerate().skip(1) {
            if self.wrap {
                for (i, &a) in band.iter().enumerate() {
                    let j = (i + d) % n;
                    y[i] += a * x[j];
                    y[j] += a * x[i];
                }
            } else {
                let m = n - d;
                for ((yi, &a), &xj) in y[..m].iter_mut().zip(band).zip(&x[d..]) {
                    *yi += a * xj;
                }
                for ((yj, &a), &xi) in y[d..].iter_mut().zip(band).zip(&x[..m]) {
                    *yj += a * xi;
                }
            }
        }
    }

    /// Rows `rows` of A x into `out` (`out.len() == rows.len()`): the same
    /// sums as [`Self::mul_vec`] for those rows, for kernels that work on a
    /// block of rows at a time. Panics if `x` is shorter than n or the rows
    /// run past n.
    pub fn mul_rows(&self, x: &[f64], rows: std::ops::Range<usize>, out: &mut [f64]) {
        let n = self.n;
        for (o, i) in out.iter_mut().zip(rows) {
            let mut s = self.bands[0][i] * x[i];
            for (d, band) in self.bands.iter().enumerate().skip(1) {
                if self.wrap {
                    s += band[i] * x[(i + d) % n];
                    let j = (i + n - d % n) % n;
                    s += band[j] * x[j];
                } else {
                    if i + d < n {
                        s += band[i] * x[i + d];
                    }
                    if i >= d {
                        s += band[i - d] * x[i - d];
                    }
                }
            }
            *o = s;
        }
    }

    /// 1-norm (= infinity norm, A symmetric): max over columns of sum |A_ij|.
    pub fn norm_one(&self) -> f64 {
        let n = self.n;
        let mut s: Vec<f64> = self.bands[0].iter().map(|v| v.abs()).collect();
        for (d, band) in self.bands.iter().enumerate().skip(1) {
            for (i, &a) in band.iter().enumerate() {
                let j = (i + d) % n;
                s[i] += a.abs();
                s[j] += a.abs();
            }
        }
        s.into_iter().fold(0.0, f64::max)
    }

    /// Dense copy (wrap corners included).
    pub fn to_dense(&self) -> DMatrix<f64> {
        let n = self.n;
        let mut m = DMatrix::zeros(n, n);
        for (d, band) in self.bands.iter().enumerate() {
            for (i, &a) in band.iter().enumerate() {
                let j = (i + d) % n;
                if d == 0 {
                    m[(i, i)] = a;
                } else {
                    m[(i, j)] += a;
                    m[(j, i)] += a;
                }
            }
        }
        m
    }
}

impl Problem<'_> {
    /// Checks both matrices and their compatibility (same n and wrap,
    /// bandwidth of B <= bandwidth of A).
    pub fn validate(&self) -> Result<(), EigenError> {
        self.a.validate()?;
        if let Some(b) = self.b {
            b.validate()?;
            if b.n != self.a.n || b.wrap != self.a.wrap {
                return Err(EigenError::Shape {
                    what: "A and B differ in n or wrap".into(),
                });
            }
            if b.half_bandwidth() > self.a.half_bandwidth() {
                return Err(EigenError::Shape {
                    what: "B has a larger bandwidth than A".into(),
                });
            }
        }
        Ok(())
    }

    /// Dimension n.
    pub fn n(&self) -> usize {
        self.a.n
    }

    /// y = B x (copy when B = I).
    pub fn mul_b(&self, x: &[f64], y: &mut [f64]) {
        match self.b {
            Some(b) => b.mul_vec(x, y),
            None => y[..x.len()].copy_from_slice(x),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ring(n: usize) -> SymBanded {
        SymBanded {
            n,
            bands: vec![vec![2.0; n], vec![-1.0; n], vec![0.25; n]],
            wrap: true,
        }
    }

    #[test]
    fn dense_get_and_mul_agree() {
        for a in [
            ring(7),
            SymBanded {
                n: 6,
                bands: vec![
                    vec![1.0, 2.0, 3.0, 4.0, 5.0, 6.0],
                    vec![0.1, 0.2, 0.3, 0.4, 0.5],
                    vec![-1.0, -2.0, -3.0, -4.0],
                ],
                wrap: false,
            },
        ] {
            a.validate().unwrap();
            let d = a.to_dense();
            let x: Vec<f64> = (0..a.n).map(|i| (i as f64 * 0.7).sin()).collect();
            let mut y = vec![0.0; a.n];
            a.mul_vec(&x, &mut y);
            let yd = &d * nalgebra::DVector::from_column_slice(&x);
            for i in 0..a.n {
                approx::assert_abs_diff_eq!(y[i], yd[i], epsilon = 1e-14);
                for j in 0..a.n {
                    assert_eq!(a.get(i, j), d[(i, j)]);
                }
            }
            let n1 = (0..a.n)
                .map(|j| (0..a.n).map(|i| d[(i, j)].abs()).sum::<f64>())
                .fold(0.0, f64::max);
            approx::assert_abs_diff_eq!(a.norm_one(), n1, epsilon = 1e-14);
        }
        // corner of the ring: A[0][6] = band1[6] = -1, A[0][5] = band2[5] = 0.25
        let r = ring(7);
        assert_eq!(r.get(0, 6), -1.0);
        assert_eq!(r.get(5, 0), 0.25);
    }

    #[test]
    fn shape_errors() {
        let bad = SymBanded {
            n: 4,
            bands: vec![vec![1.0; 4], vec![1.0; 4]],
            wrap: false,
        };
        assert!(matches!(bad.validate(), Err(EigenError::Shape { .. })));
        let small_ring = ring(4);
        assert!(matches!(
            small_ring.validate(),
            Err(EigenError::Shape { .. })
        ));
    }
}
