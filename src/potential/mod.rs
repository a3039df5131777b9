//! The potential energy V(x): a sum of terms.
//!
//! The model's potential is `V(x) = Σ_t V_t(x)`, zero where no term reaches.
//! Each shape of the input contract is a [`Term`]; a `[chain]` is turned into
//! terms by [`chain`]. Tabulated profiles ([`table`]) and user formulas
//! ([`formula`]) are read once and evaluated at every grid point.
//!
//! Where `V` is not smooth ([`Potential::breaks`]) is sorted by the lowest
//! derivative that jumps: [`Potential::discontinuities`] (V jumps),
//! [`Potential::kinks`] (V' jumps) and [`Potential::weak_breaks`] (V'''
//! jumps); [`BreakKind`] says what each costs a finite-difference stencil.

mod breaks;
pub mod chain;
pub mod formula;
pub mod spline;
pub mod table;
mod terms;

pub use breaks::{Break, BreakKind};
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

    /// Positions (Å) where some term jumps: step edges, window edges where
    /// the term is not zero, table ends off the outside value; sorted, each
    /// once, wherever they lie. Finite differences lose their order there;
    /// the grid is laid so that these fall on grid points. A window edge
    /// where the term is zero on both sides is a kink, not a jump
    /// ([`Potential::kinks`]).
    pub fn discontinuities(&self) -> Vec<f64> {
        let mut d: Vec<f64> = self.terms.iter().flat_map(Term::discontinuities).collect();
        d.sort_by(f64::total_cmp);
        d.dedup();
        d
    }

    /// Every point strictly inside `(from, to)` (Å) where some term is not
    /// smooth, sorted by position (then kind, then term), with the term
    /// and what jumps there. Formulas are searched for corners on this
    /// interval only ([`formula::Formula::kinks`] says how, and what it can
    /// miss); all other breaks are known exactly. Empty unless `from < to`,
    /// both finite.
    pub fn breaks(&self, from: f64, to: f64) -> Vec<Break> {
        if !(from.is_finite() && to.is_finite() && from < to) {
            return Vec::new();
        }
        let mut all: Vec<Break> = self
            .terms
            .iter()
            .enumerate()
            .flat_map(|(term, t)| {
                t.breaks_in(from, to)
                    .into_iter()
                    .map(move |(at, kind)| Break { at, kind, term })
            })
            .collect();
        all.sort_by(|a, b| {
            a.at.total_cmp(&b.at)
                .then(a.kind.cmp(&b.kind))
                .then(a.term.cmp(&b.term))
        });
        all
    }

    /// Positions strictly inside `(from, to)` (Å) where `V` is continuous
    /// but its slope jumps: inner knots of linear tables, window edges of
    /// `ripple` and `linear` terms where the term is zero, table ends that
    /// meet the outside value with a slope, and corners of `abs`, `min` and
    /// `max` in formulas. Sorted; points closer than [`MERGE_TOLERANCE`]
    /// times `max(|from|, |to|)` are one; a point where some term jumps is
    /// left to [`Potential::discontinuities`].
    ///
    /// Finite differences of any order converge at a kink only as `h^2`,
    /// and erratically unless it is on a grid point.
    pub fn kinks(&self, from: f64, to: f64) -> Vec<f64> {
        self.positions_of(BreakKind::Kink, from, to)
    }

    /// Positions strictly inside `(from, to)` (Å) where `V`, `V'` and `V''`
    /// are continuous but `V'''` jumps: the inner knots of natural cubic
    /// spline tables (and a spline end meeting the outside value with zero
    /// slope). Much milder than a kink: it costs stencils of order 6 and 8
    /// (and Numerov) some accuracy, not orders 2 and 4. Sorted and merged
    /// as in [`Potential::kinks`]; points that are jumps or kinks are left
    /// out.
    pub fn weak_breaks(&self, from: f64, to: f64) -> Vec<f64> {
        self.positions_of(BreakKind::Weak, from, to)
    }

    /// Positions of breaks of `kind` inside `(from, to)`, merged, leaving
    /// out points that are also breaks of a stronger kind.
    fn positions_of(&self, kind: BreakKind, from: f64, to: f64) -> Vec<f64> {
        let all = self.breaks(from, to);
        let tol = MERGE_TOLERANCE * from.abs().max(to.abs());
        let stronger: Vec<f64> = all.iter().filter(|b| b.kind < kind).map(|b| b.at).collect();
        let mut out: Vec<f64> = all
            .iter()
            .filter(|b| b.kind == kind)
            .map(|b| b.at)
            .filter(|&x| stronger.iter().all(|&s| (s - x).abs() > tol))
            .collect();
        // Sorted already: breaks() sorts by position.
        out.dedup_by(|b, a| *b - *a <= tol);
        out
    }
}

/// Breaks closer together than this fraction of `max(|from|, |to|)` are
/// one point in [`Potential::kinks`] and [`Potential::weak_breaks`] (four
/// times the bisection width of [`formula::Formula::kinks`], so that the
/// same corner found through two terms is listed once).
pub const MERGE_TOLERANCE: f64 = 4.0 * formula::BRACKET_TOLERANCE;
