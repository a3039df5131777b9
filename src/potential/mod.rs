//! The potential energy V(x): a sum of terms.
//!
//! The model's potential is `V(x) = Σ_t V_t(x)`, zero where no term reaches.
//! Each shape of the input contract is a [`Term`]; a `[chain]` is turned into
//! terms by [`chain`]. Tabulated profiles ([`table`]) and user formulas
//! ([`formula`]) are read once and evaluated at every grid point.

pub mod chain;
pub mod formula;
pub mod spline;
pub mod table;
mod terms;

pub use terms::Term;

/// `V(x)` as the sum of its terms.
#[derive(Debug, Clone, Default)]
pub struct Potential {
    /// The terms, in input order.
    pub terms: Vec<Term>,
}

/// A term gave a value that is not a finite number, or made the sum of the
/// terms up to it infinite.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("term {} gives {value} at x = {x} angstrom", .term + 1)]
pub struct NonFinite {
    /// 0-based index of the term.
    pub term: usize,
    /// Where, Å.
    pub x: f64,
    /// What it gave.
    pub value: f64,
}

impl Potential {
    /// `V(x)` in eV at `x` in Å.
    pub fn eval(&self, x: f64) -> f64 {
        self.terms.iter().map(|t| t.eval(x)).sum()
    }

    /// `V` at every point of `xs`, checking that each term is finite there.
    pub fn sample(&self, xs: &[f64]) -> Result<Vec<f64>, NonFinite> {
        let mut v = vec![0.0; xs.len()];
        for (ti, term) in self.terms.iter().enumerate() {
            for (vi, &x) in v.iter_mut().zip(xs) {
                let value = term.eval(x);
                if !value.is_finite() {
                    return Err(NonFinite { term: ti, x, value });
                }
                *vi += value;
                // Finite terms can still add up to an infinite sum.
                if !vi.is_finite() {
                    return Err(NonFinite {
                        term: ti,
                        x,
                        value: *vi,
                    });
                }
            }
        }
        Ok(v)
    }

    /// Like [`Potential::sample`], but at a point within `tol` of one of the
    /// `edges` V is the mean of its left and right limits, so that a jump on
    /// a grid point keeps the discretisation error smooth in the spacing.
    pub fn sample_with_edges(
        &self,
        xs: &[f64],
        edges: &[f64],
        tol: f64,
    ) -> Result<Vec<f64>, NonFinite> {
        let mut v = self.sample(xs)?;
        if edges.is_empty() {
            return Ok(v);
        }
        for (vi, &x) in v.iter_mut().zip(xs) {
            if edges.iter().any(|&s| (x - s).abs() <= tol) {
                let d = 1e-9 * (1.0 + x.abs());
                *vi = 0.5 * (self.eval(x - d) + self.eval(x + d));
            }
        }
        Ok(v)
    }

    /// Positions (Å) where some term jumps: step edges, window ends, table
    /// ends. Finite differences lose their order there; the grid is laid so
    /// that these fall midway between grid points.
    pub fn discontinuities(&self) -> Vec<f64> {
        let mut d: Vec<f64> = self.terms.iter().flat_map(Term::discontinuities).collect();
        d.sort_by(f64::total_cmp);
        d.dedup();
        d
    }
}
