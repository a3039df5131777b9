//! Grouping of (near-)degenerate levels.
//!
//! Exact symmetries produce exactly degenerate levels - on a ring of
//! circumference `L` the free levels `E_j = t (2 pi j / L)^2` come in pairs
//! `+-j` above the single `j = 0` level (e.g. L. Salem, *The Molecular Orbital
//! Theory of Conjugated Systems*, ch. 1, for the free-electron ring) - but a
//! numerical eigensolver returns them split by round-off. This module
//! collects levels whose spacing is below a tolerance so that callers can
//! report "levels 2-3 form a degenerate pair" instead of two levels.
//!
//! Tolerance rule (relative plus absolute, both from one dimensionless
//! `tol`): after sorting, neighbours `E_a <= E_b` are joined when
//!
//! `E_b - E_a <= tol * (max(|E_a|, |E_b|) + W)`,
//!
//! where `W = max E - min E` is the width of the whole (finite) list. The
//! relative part scales with the level itself; the absolute part `tol * W`
//! keeps levels near `E = 0` from needing an impossibly small splitting, and
//! is in the same unit as the energies, so the rule does not depend on the
//! energy unit or on where zero is put relative to the spectrum width.
//! Joining is transitive along the sorted list (a chain of close neighbours
//! forms one group). A `tol` that is negative or not finite is treated as 0
//! (only exactly equal values are grouped). NaN energies always stand alone.
//! `1e-8` suits eigenvalues from a dense solver; `1e-4` merges levels that a
//! weak perturbation has split.

use std::fmt;

use serde::Serialize;

/// Groups the indices of `energies` into sets of degenerate levels.
///
/// Returns zero-based indices into `energies`; groups are ordered by
/// ascending energy and the indices inside a group too. `energies` need not
/// be sorted. See the module docs for the tolerance rule (`tol` is
/// dimensionless).
pub fn group_levels(energies: &[f64], tol: f64) -> Vec<Vec<usize>> {
    let tol = if tol.is_finite() && tol > 0.0 {
        tol
    } else {
        0.0
    };
    let mut order: Vec<usize> = (0..energies.len()).collect();
    // total_cmp puts NaN last; stable sort keeps equal values in input order.
    order.sort_by(|&i, &j| energies[i].total_cmp(&energies[j]));
    let finite = energies.iter().copied().filter(|e| e.is_finite());
    let (lo, hi) = finite.fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), e| {
        (lo.min(e), hi.max(e))
    });
    let width = if hi >= lo { hi - lo } else { 0.0 };

    let mut groups: Vec<Vec<usize>> = Vec::new();
    for &i in &order {
        let joined = match groups.last() {
            Some(g) => {
                let prev = energies[g[g.len() - 1]];
                let cur = energies[i];
                let allowed = tol * (prev.abs().max(cur.abs()) + width);
                // NaN differences compare false and start a new group.
                cur - prev <= allowed
            }
            None => false,
        };
        match (joined, groups.last_mut()) {
            (true, Some(g)) => g.push(i),
            _ => groups.push(vec![i]),
        }
    }
    groups
}

/// One group of degenerate levels, for reporting.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Degeneracy {
    /// One-based level numbers in the group (level 1 is the first entry of the
    /// input list), ascending.
    pub levels: Vec<usize>,
    /// Mean energy of the group, in the unit of the input (eV in chainwell).
    pub energy: f64,
    /// Largest minus smallest energy in the group (0 for a single level), in
    /// the unit of the input: the numerical or physical splitting.
    pub spread: f64,
}

impl Degeneracy {
    /// Number of levels in the group (1 for a non-degenerate level).
    pub fn multiplicity(&self) -> usize {
        self.levels.len()
    }

    /// Whether the group holds more than one level.
    pub fn is_degenerate(&self) -> bool {
        self.levels.len() > 1
    }

    fn level_list(&self) -> String {
        let consecutive = self.levels.windows(2).all(|w| w[1] == w[0] + 1);
        match (self.levels.first(), self.levels.last()) {
            (Some(first), Some(last)) if consecutive && self.levels.len() > 1 => {
                format!("{first}-{last}")
            }
            _ => self
                .levels
                .iter()
                .map(|l| l.to_string())
                .collect::<Vec<_>>()
                .join(", "),
        }
    }
}

impl fmt::Display for Degeneracy {
    /// One line such as `levels 2-3 form a degenerate pair at 1.234567 eV`.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let list = self.level_list();
        match self.levels.len() {
            0 => write!(f, "no levels"),
            1 => write!(f, "level {list} is non-degenerate at {:.6} eV", self.energy),
            2 => write!(
                f,
                "levels {list} form a degenerate pair at {:.6} eV (split by {:.2e} eV)",
                self.energy, self.spread
            ),
            n => write!(
                f,
                "levels {list} form a {n}-fold degenerate set at {:.6} eV (split by {:.2e} eV)",
                self.energy, self.spread
            ),
        }
    }
}

/// Summarises `energies` (eV) as groups of degenerate levels, using
/// [`group_levels`] with the dimensionless tolerance `tol`. Every level
/// appears in exactly one [`Degeneracy`], single levels included.
pub fn summarize_levels(energies: &[f64], tol: f64) -> Vec<Degeneracy> {
    group_levels(energies, tol)
        .into_iter()
        .map(|group| {
            let values: Vec<f64> = group.iter().map(|&i| energies[i]).collect();
            let mean = values.iter().sum::<f64>() / values.len() as f64;
            let lo = values.iter().copied().fold(f64::INFINITY, f64::min);
            let hi = values.iter().copied().fold(f64::NEG_INFINITY, f64::max);
            let mut levels: Vec<usize> = group.iter().map(|&i| i + 1).collect();
            levels.sort_unstable();
            Degeneracy {
                levels,
                energy: mean,
                spread: hi - lo,
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::constants::hbar2_over_2me_ev_a2;
    use proptest::prelude::*;
    use std::f64::consts::PI;

    /// Free-electron ring levels `t (2 pi j / L)^2`, j = 0, +1, -1, +2, -2, ...
    /// (closed form, periodic boundary conditions), with a little noise so that
    /// the pairs are only equal to round-off, as a solver would return them.
    fn ring_levels(circumference: f64, n: usize) -> Vec<f64> {
        let t = hbar2_over_2me_ev_a2();
        (0..n)
            .map(|i| {
                let j = i.div_ceil(2) as f64;
                let e = t * (2.0 * PI * j / circumference).powi(2);
                e * (1.0 + 1e-13 * (i % 3) as f64)
            })
            .collect()
    }

    #[test]
    fn free_ring_levels_group_as_one_then_pairs() {
        let e = ring_levels(8.4, 11);
        let groups = group_levels(&e, 1e-9);
        let sizes: Vec<usize> = groups.iter().map(Vec::len).collect();
        assert_eq!(sizes, vec![1, 2, 2, 2, 2, 2]); // closed form: j = 0 alone, +-j pairs
        assert_eq!(groups[0], vec![0]);
        assert_eq!(groups[1], vec![1, 2]);
    }

    #[test]
    fn unsorted_input_returns_original_indices() {
        let e = [3.0, 1.0, 3.0 + 1e-12, 0.5];
        let groups = group_levels(&e, 1e-9);
        assert_eq!(groups, vec![vec![3], vec![1], vec![0, 2]]);
    }

    #[test]
    fn splitting_above_tolerance_separates_levels() {
        // A 1e-3 relative splitting of the first pair (as from a weak ring
        // perturbation) must not be merged at tol = 1e-6 but merged at 1e-2.
        let mut e = ring_levels(8.4, 5);
        e[2] *= 1.0 + 1e-3;
        let sizes = |tol| {
            group_levels(&e, tol)
                .iter()
                .map(Vec::len)
                .collect::<Vec<_>>()
        };
        assert_eq!(sizes(1e-6), vec![1, 1, 1, 2]);
        assert_eq!(sizes(1e-2), vec![1, 2, 2]);
    }

    #[test]
    fn zero_negative_and_nan_tolerances_and_energies() {
        let e = [1.0, 1.0, 2.0];
        assert_eq!(group_levels(&e, -1.0), vec![vec![0, 1], vec![2]]);
        assert_eq!(group_levels(&e, f64::NAN), vec![vec![0, 1], vec![2]]);
        let e = [f64::NAN, 1.0, f64::NAN];
        assert_eq!(group_levels(&e, 0.5), vec![vec![1], vec![0], vec![2]]);
        assert!(group_levels(&[], 1e-9).is_empty());
    }

    #[test]
    fn summary_reads_as_a_sentence() {
        let e = ring_levels(8.4, 5);
        let s = summarize_levels(&e, 1e-9);
        assert_eq!(s.len(), 3);
        assert!(!s[0].is_degenerate());
        assert_eq!(s[1].levels, vec![2, 3]);
        assert_eq!(s[1].multiplicity(), 2);
        let text = s[1].to_string();
        assert!(
            text.starts_with("levels 2-3 form a degenerate pair at"),
            "{text}"
        );
        assert!(s[0].to_string().starts_with("level 1 is non-degenerate"));
        let triple = summarize_levels(&[0.0, 2.0, 2.0, 2.0], 1e-9);
        assert!(triple[1]
            .to_string()
            .starts_with("levels 2-4 form a 3-fold degenerate set"));
        let gapped = summarize_levels(&[2.0, 0.0, 2.0], 1e-9);
        assert!(gapped[1].to_string().starts_with("levels 1, 3 form"));
    }

    proptest! {
        // Invariant: the groups partition the indices, and group energies ascend.
        #[test]
        fn groups_partition_the_levels(
            e in proptest::collection::vec(-10.0f64..10.0, 0..30),
            tol in 0.0f64..0.1,
        ) {
            let groups = group_levels(&e, tol);
            let mut seen: Vec<usize> = groups.iter().flatten().copied().collect();
            seen.sort_unstable();
            prop_assert_eq!(seen, (0..e.len()).collect::<Vec<_>>());
            for w in groups.windows(2) {
                let last = w[0].iter().map(|&i| e[i]).fold(f64::NEG_INFINITY, f64::max);
                let first = w[1].iter().map(|&i| e[i]).fold(f64::INFINITY, f64::min);
                prop_assert!(last <= first);
            }
        }
    }
}
