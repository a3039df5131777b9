//! Sturm counts of a symmetric tridiagonal matrix T (diagonal `d`, off-diagonal `e`):
//! the number of eigenvalues of T strictly below sigma equals the number of
//! negative pivots q_i of the LDL^T factorisation of T - sigma I,
//!
//! q_0 = d_0 - sigma,  q_i = (d_i - sigma) - e_{i-1}^2 / q_{i-1},
//!
//! (Sylvester's law of inertia; Wilkinson, *The Algebraic Eigenvalue Problem*,
//! 1965, ch. 5). A pivot with |q_i| <= pivmin is replaced by -pivmin, the
//! safeguard of LAPACK's dstebz (Demmel & Kahan, SIAM J. Sci. Stat. Comput.
//! 11 (1990) 873-912; Kahan, "Accurate eigenvalues of a symmetric tridiagonal
//! matrix", 1966): pivmin = safe_min * max(1, max e_i^2).
//!
//! [`sturm_counts`] evaluates several shifts in one sweep over the data (the
//! recurrences for distinct shifts are independent, so they run in SIMD lanes).

use rayon::prelude::*;

/// Squared off-diagonal and the pivot floor for a tridiagonal matrix.
#[derive(Debug, Clone)]
pub struct SturmData<'a> {
    /// Diagonal, length n.
    pub d: &'a [f64],
    /// Squared off-diagonal e_i^2, length n - 1.
    pub e2: Vec<f64>,
    /// Pivot floor (dstebz's pivmin).
    pub pivmin: f64,
}

impl<'a> SturmData<'a> {
    /// Prepares counts for T with diagonal `d` (len n) and off-diagonal `e` (len n - 1).
    pub fn new(d: &'a [f64], e: &[f64]) -> Self {
        let e2: Vec<f64> = e.iter().map(|v| v * v).collect();
        let emax = e2.iter().copied().fold(1.0, f64::max);
        Self {
            d,
            e2,
            pivmin: f64::MIN_POSITIVE * emax,
        }
    }

    /// Number of eigenvalues strictly below `sigma` (one shift).
    pub fn count(&self, sigma: f64) -> usize {
        sturm_count(self.d, &self.e2, self.pivmin, sigma)
    }
}

/// Number of eigenvalues of T below `sigma`; `e2` holds the squared off-diagonal.
pub fn sturm_count(d: &[f64], e2: &[f64], pivmin: f64, sigma: f64) -> usize {
    let mut q = d[0] - sigma;
    if q.abs() <= pivmin {
        q = -pivmin;
    }
    let mut c = usize::from(q < 0.0);
    for (&di, &ei) in d[1..].iter().zip(e2) {
        q = (di - sigma) - ei / q;
        if q.abs() <= pivmin {
            q = -pivmin;
        }
        c += usize::from(q < 0.0);
    }
    c
}

const LANES: usize = 8;

fn counts_lanes(d: &[f64], e2: &[f64], pivmin: f64, s: &[f64; LANES]) -> [usize; LANES] {
    let mut q = [0.0; LANES];
    let mut c = [0usize; LANES];
    for l in 0..LANES {
        q[l] = d[0] - s[l];
        if q[l].abs() <= pivmin {
            q[l] = -pivmin;
        }
        c[l] += usize::from(q[l] < 0.0);
    }
    for (&di, &ei) in d[1..].iter().zip(e2) {
        for l in 0..LANES {
            let mut v = (di - s[l]) - ei / q[l];
            if v.abs() <= pivmin {
                v = -pivmin;
            }
            q[l] = v;
            c[l] += usize::from(v < 0.0);
        }
    }
    c
}

/// Sturm counts at many shifts, several per sweep, groups in parallel.
/// The result is independent of the number of threads.
pub fn sturm_counts(data: &SturmData, shifts: &[f64]) -> Vec<usize> {
    if shifts.len() == 1 {
        return vec![data.count(shifts[0])];
    }
    let groups: Vec<Vec<usize>> = shifts
        .par_chunks(LANES)
        .map(|chunk| {
            let mut s = [chunk[0]; LANES];
            s[..chunk.len()].copy_from_slice(chunk);
            let c = counts_lanes(data.d, &data.e2, data.pivmin, &s);
            c[..chunk.len()].to_vec()
        })
        .collect();
    groups.into_iter().flatten().collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn box_counts_match_closed_form() {
        // T = tridiag(-1, 2, -1), eigenvalues 2 - 2 cos(j pi/(n+1)) // closed form
        let n = 50;
        let d = vec![2.0; n];
        let e = vec![-1.0; n - 1];
        let data = SturmData::new(&d, &e);
        let ev: Vec<f64> = (1..=n)
            .map(|j| 2.0 - 2.0 * (j as f64 * std::f64::consts::PI / (n as f64 + 1.0)).cos())
            .collect();
        let shifts: Vec<f64> = (0..=40).map(|i| -0.1 + 4.2 * i as f64 / 40.0).collect();
        let many = sturm_counts(&data, &shifts);
        for (s, c) in shifts.iter().zip(&many) {
            let want = ev.iter().filter(|&&v| v < *s).count();
            assert_eq!(*c, want, "shift {s}");
            assert_eq!(data.count(*s), want);
        }
    }
}
