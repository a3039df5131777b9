//! Aufbau filling of the computed levels: HOMO, LUMO, gap and total energy.
//!
//! Electrons are placed two per level (spin up and down) from level 1
//! upwards, the aufbau rule of the free-electron model of conjugated chains
//! (H. Kuhn, J. Chem. Phys. 17, 1198 (1949)). With `N` electrons the highest occupied level is
//! `HOMO = ceil(N / 2)`; for odd `N` it holds one electron.
//!
//! # LUMO rule for odd electron counts
//! In the strict sense the lowest level with room for an electron is the
//! singly occupied HOMO itself, which would make the gap zero. For a
//! researcher the useful number is the gap to the next level, so this module
//! always reports `LUMO = HOMO + 1` and `gap = E_LUMO - E_HOMO`, and flags the
//! half-filled level in `singly_occupied`. The excitation from the level
//! below into the singly occupied one appears among the transitions (see
//! `transitions`).
//!
//! # Open shells
//! Levels of one degenerate group (a ring's `+j`/`-j` pair, two equivalent
//! halves of a molecule) are filled together: when the HOMO belongs to a
//! group of `g` levels (levels within [`SHELL_TOLERANCE`], see
//! [`group_levels`]) that holds fewer than `2g` electrons, the shell is
//! open. The group's electrons are then spread evenly over its levels
//! (which of two degenerate states holds them is arbitrary, and any mixture
//! returned by an eigensolver is equally valid, so only the even share does
//! not depend on that choice), the HOMO is the group's highest level, the
//! LUMO the first level above the group, and there is no HOMO-LUMO gap: the
//! gap inside the group is zero and `hc / 0` is no absorption. The caller
//! names the lowest allowed excitation instead ([`Occupancy::name_lowest`]).
//! A single level holding one electron (an odd count) is an open shell too,
//! a radical; its gap to the next level is still reported.
//!
//! # Levels below the computed window
//! Eigensolvers may return a window of levels `first_n, first_n + 1, ...`
//! rather than all levels from 1. Levels below `first_n` are still filled
//! (doubly) but their energies are unknown, so `total_energy` then sums the
//! computed levels only and `total_energy_complete` is `false`.

use crate::constants::hc_ev_nm;
use crate::units::Units;
use serde::Serialize;
use thiserror::Error;

use super::degeneracy::group_levels;
use super::transitions::Transition;

/// Dimensionless tolerance for filling levels as one degenerate group (see
/// [`group_levels`]): far above an eigensolver's round-off, far below a
/// splitting worth a spectrum (common practice, no source).
pub const SHELL_TOLERANCE: f64 = 1e-7;

/// Oscillator strength, relative to the strongest listed transition, below
/// which an excitation counts as forbidden (common practice, no source).
pub const FORBIDDEN_RATIO: f64 = 1e-6;

/// Errors of [`fill`]; each names the numbers involved.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum OccupancyError {
    /// The electron count is zero, so there is no HOMO.
    #[error("no electrons to place: the electron count is 0")]
    NoElectrons,
    /// The HOMO or LUMO lies above the highest computed level.
    #[error(
        "{electrons} electrons need levels up to n = {needed_levels} (HOMO and LUMO), \
         but levels are computed only up to n = {computed_up_to}"
    )]
    TooFewLevels {
        /// Electron count asked for.
        electrons: usize,
        /// Highest level number needed (the LUMO, `ceil(electrons / 2) + 1`).
        needed_levels: usize,
        /// Highest computed level number (`first_n - 1` when none computed).
        computed_up_to: usize,
    },
    /// The HOMO lies below the first computed level.
    #[error(
        "{electrons} electrons put the HOMO at n = {homo}, \
         below the lowest computed level n = {first_n}"
    )]
    HomoBelowComputed {
        /// Electron count asked for.
        electrons: usize,
        /// Level number of the HOMO.
        homo: usize,
        /// Level number of the first computed level.
        first_n: usize,
    },
    /// Level numbers start at 1.
    #[error("level numbers start at 1, but the first computed level was given as n = 0")]
    ZeroFirstLevel,
    /// An energy is NaN or infinite.
    #[error("the energy of level n = {level} is not finite ({value})")]
    NonFiniteEnergy {
        /// Level number.
        level: usize,
        /// Offending value (eV).
        value: f64,
    },
    /// The energies are not in ascending order.
    #[error(
        "energies must be ascending, but level n = {level} ({value} eV) \
         lies below level n = {previous_level} ({previous} eV)"
    )]
    NotAscending {
        /// Level number of the out-of-order energy.
        level: usize,
        /// Its energy (eV).
        value: f64,
        /// Level number before it.
        previous_level: usize,
        /// Energy of the level before it (eV).
        previous: f64,
    },
}

/// Ground-state occupation of the computed levels.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Occupancy {
    /// Number of electrons placed.
    pub electrons: usize,
    /// Level number of the first computed level (the first entry of
    /// `occupations`).
    pub first_level: usize,
    /// Level number of the highest occupied level, `ceil(electrons / 2)`.
    pub homo: usize,
    /// Level number of the lowest unoccupied level, `homo + 1` (also for odd
    /// counts, see the module docs). Always `Some` on success; kept optional
    /// for serialisation by callers that report a missing LUMO.
    pub lumo: Option<usize>,
    /// The singly occupied level for an odd electron count (equal to `homo`).
    pub singly_occupied: Option<usize>,
    /// HOMO-LUMO gap `E_lumo - E_homo` in eV.
    pub gap: Option<f64>,
    /// Wavelength `hc / gap` in nm; `None` when the gap is not positive
    /// (degenerate HOMO and LUMO).
    pub wavelength_nm: Option<f64>,
    /// Sum of occupation times energy over the computed levels, in eV.
    pub total_energy: f64,
    /// Whether `total_energy` covers every occupied level (true only when
    /// the computed levels start at level 1).
    pub total_energy_complete: bool,
    /// Electrons in each computed level (0 to 2; a share for the levels of
    /// an open degenerate group), aligned with the input energies.
    pub occupations: Vec<f64>,
    /// Whether the HOMO's degenerate group holds fewer electrons than it
    /// has room for (a radical, or a partly filled degenerate group).
    pub open_shell: bool,
    /// Level numbers of the HOMO's degenerate group (one level when it is
    /// not degenerate).
    pub homo_group: Vec<usize>,
    /// For an open shell without a gap: the lowest excitation with a
    /// non-negligible oscillator strength, set by [`Occupancy::name_lowest`].
    pub lowest_allowed: Option<Excitation>,
}

/// One excitation named by the filling: from, to, energy (eV), wavelength
/// (nm) and oscillator strength.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Excitation {
    /// Lower level.
    pub from: usize,
    /// Upper level.
    pub to: usize,
    /// `E_to - E_from`, eV.
    pub energy: f64,
    /// `hc / energy`, nm.
    pub wavelength_nm: f64,
    /// Oscillator strength (with the occupancy factor).
    pub strength: f64,
}

impl Occupancy {
    /// Whether a transition is a real excitation of this filling: `false`
    /// for one between two levels of the HOMO's degenerate group (zero
    /// energy, no absorption).
    pub fn keeps(&self, t: &Transition) -> bool {
        !(self.homo_group.len() > 1
            && self.homo_group.contains(&t.from)
            && self.homo_group.contains(&t.to))
    }

    /// For an open shell without a gap, records the lowest-energy
    /// transition of `list` whose strength is above [`FORBIDDEN_RATIO`] of
    /// the strongest, as [`Occupancy::lowest_allowed`].
    pub fn name_lowest(&mut self, list: &[Transition]) {
        if !self.open_shell || self.gap.is_some() {
            return;
        }
        let strongest = list.iter().map(|t| t.strength).fold(0.0, f64::max);
        self.lowest_allowed = list
            .iter()
            .filter(|t| self.keeps(t) && t.energy > 0.0)
            .filter(|t| strongest > 0.0 && t.strength > FORBIDDEN_RATIO * strongest)
            .min_by(|a, b| a.energy.total_cmp(&b.energy))
            .map(|t| Excitation {
                from: t.from,
                to: t.to,
                energy: t.energy,
                wavelength_nm: t.wavelength_nm,
                strength: t.strength,
            });
    }

    /// The warning that explains an open degenerate shell (no gap is
    /// reported), in `units`; `None` for a closed shell or a radical.
    pub fn open_shell_warning(&self, units: &Units) -> Option<String> {
        if !self.open_shell {
            return None;
        }
        let e = units.energy.label();
        // A radical keeps its gap (to the next level) and is flagged by
        // `open_shell` and `singly_occupied`: nothing is withheld to explain.
        if self.homo_group.len() == 1 {
            return None;
        }
        let first = self.homo_group[0];
        let held: f64 = self
            .homo_group
            .iter()
            .filter_map(|n| self.occupations.get(n.checked_sub(self.first_level)?))
            .sum();
        let mut text = format!(
            "open shell: levels {first}-{} are degenerate and hold {held} of their {} electrons, so there is no HOMO-LUMO gap (it would be 0) and no absorption at its wavelength",
            self.homo,
            2 * self.homo_group.len()
        );
        match &self.lowest_allowed {
            Some(x) => text.push_str(&format!(
                "; the lowest allowed excitation is {} -> {} at {:.6} {e} ({:.1} nm)",
                x.from,
                x.to,
                units.energy_out(x.energy),
                x.wavelength_nm
            )),
            None => text.push_str("; no allowed excitation among the computed levels"),
        }
        text.push_str(". A molecule with this count distorts or is a diradical, which one-electron levels do not describe");
        Some(text)
    }
}

/// Fills `electrons` electrons into the levels whose energies (eV, ascending)
/// are `energies`, numbered `first_n, first_n + 1, ...`.
///
/// Two electrons per level from level 1; levels below `first_n` are filled
/// but not computed (see the module docs). Both the HOMO and the LUMO
/// (`homo + 1`) must be among the computed levels.
///
/// # Errors
/// [`OccupancyError::NoElectrons`] for 0 electrons,
/// [`OccupancyError::ZeroFirstLevel`] for `first_n = 0`,
/// [`OccupancyError::TooFewLevels`] when the LUMO (or HOMO) lies above the
/// computed levels, [`OccupancyError::HomoBelowComputed`] when the HOMO lies
/// below them, and [`OccupancyError::NonFiniteEnergy`] /
/// [`OccupancyError::NotAscending`] for bad energies.
///
/// ```
/// use chainwell::observables::fill;
/// // Five electrons in levels 1..4: the third level is singly occupied.
/// let o = fill(&[1.0, 2.0, 3.0, 4.0], 1, 5).unwrap();
/// assert_eq!((o.homo, o.lumo, o.singly_occupied), (3, Some(4), Some(3)));
/// assert_eq!(o.gap, Some(1.0));
/// ```
pub fn fill(
    energies: &[f64],
    first_n: usize,
    electrons: usize,
) -> Result<Occupancy, OccupancyError> {
    if electrons == 0 {
        return Err(OccupancyError::NoElectrons);
    }
    if first_n == 0 {
        return Err(OccupancyError::ZeroFirstLevel);
    }
    for (i, &e) in energies.iter().enumerate() {
        let level = first_n + i;
        if !e.is_finite() {
            return Err(OccupancyError::NonFiniteEnergy { level, value: e });
        }
        if i > 0 && e < energies[i - 1] {
            return Err(OccupancyError::NotAscending {
                level,
                value: e,
                previous_level: level - 1,
                previous: energies[i - 1],
            });
        }
    }
    let aufbau_homo = electrons.div_ceil(2);
    let computed_up_to = (first_n - 1).saturating_add(energies.len());
    if aufbau_homo + 1 > computed_up_to {
        return Err(OccupancyError::TooFewLevels {
            electrons,
            needed_levels: aufbau_homo + 1,
            computed_up_to,
        });
    }
    if aufbau_homo < first_n {
        return Err(OccupancyError::HomoBelowComputed {
            electrons,
            homo: aufbau_homo,
            first_n,
        });
    }
    // The degenerate group of the aufbau HOMO: a run of consecutive levels.
    let groups = group_levels(energies, SHELL_TOLERANCE);
    let index = aufbau_homo - first_n;
    let group = groups
        .iter()
        .find(|g| g.contains(&index))
        .cloned()
        .unwrap_or_else(|| vec![index]);
    let lo = first_n + group.iter().copied().min().unwrap_or(index);
    let hi = first_n + group.iter().copied().max().unwrap_or(index);
    let lumo = hi + 1;
    if lumo > computed_up_to {
        return Err(OccupancyError::TooFewLevels {
            electrons,
            needed_levels: lumo,
            computed_up_to,
        });
    }
    let size = hi - lo + 1;
    let in_group = electrons - 2 * (lo - 1);
    let open_shell = in_group < 2 * size;
    let share = in_group as f64 / size as f64;
    let occupations: Vec<f64> = (first_n..=computed_up_to)
        .map(|level| {
            if level < lo {
                2.0
            } else if level <= hi {
                share
            } else {
                0.0
            }
        })
        .collect();
    let total_energy = occupations.iter().zip(energies).map(|(o, e)| o * e).sum();
    let homo = hi;
    // No gap inside an open degenerate group: it would be zero.
    let gap =
        (!open_shell || size == 1).then(|| energies[lumo - first_n] - energies[homo - first_n]);
    let wavelength_nm = gap.filter(|&g| g > 0.0).map(|g| hc_ev_nm() / g);
    Ok(Occupancy {
        electrons,
        first_level: first_n,
        homo,
        lumo: Some(lumo),
        singly_occupied: (size == 1 && open_shell).then_some(homo),
        gap,
        wavelength_nm,
        total_energy,
        total_energy_complete: first_n == 1,
        occupations,
        open_shell,
        homo_group: (lo..=hi).collect(),
        lowest_allowed: None,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;
    use proptest::prelude::*;

    const LEVELS: [f64; 6] = [0.5, 2.0, 4.5, 8.0, 12.5, 18.0]; // n^2 / 2, by hand

    #[test]
    fn even_count_fills_closed_shells() {
        let occ = fill(&LEVELS, 1, 6).expect("6 electrons fit");
        assert_eq!(occ.homo, 3);
        assert_eq!(occ.lumo, Some(4));
        assert_eq!(occ.singly_occupied, None);
        assert_eq!(occ.occupations, vec![2.0, 2.0, 2.0, 0.0, 0.0, 0.0]);
        // By hand: 2 (0.5 + 2 + 4.5) = 14; gap 8 - 4.5 = 3.5 eV.
        assert_relative_eq!(occ.total_energy, 14.0, max_relative = 1e-15);
        assert!(occ.total_energy_complete);
        assert_relative_eq!(occ.gap.unwrap_or(f64::NAN), 3.5, max_relative = 1e-15);
        // hc = 1239.841984 eV nm (CODATA 2022, exact), 1239.841984 / 3.5 nm.
        assert_relative_eq!(
            occ.wavelength_nm.unwrap_or(f64::NAN),
            354.240_567,
            max_relative = 1e-8
        );
    }

    #[test]
    fn odd_count_leaves_homo_singly_occupied() {
        let occ = fill(&LEVELS, 1, 5).expect("5 electrons fit");
        assert_eq!(occ.homo, 3);
        assert_eq!(occ.singly_occupied, Some(3));
        assert_eq!(occ.lumo, Some(4)); // researcher rule: homo + 1
        assert_eq!(occ.occupations, vec![2.0, 2.0, 1.0, 0.0, 0.0, 0.0]);
        // By hand: 2 * 0.5 + 2 * 2 + 4.5 = 9.5 eV.
        assert_relative_eq!(occ.total_energy, 9.5, max_relative = 1e-15);
        let one = fill(&LEVELS, 1, 1).expect("1 electron fits");
        assert_eq!((one.homo, one.singly_occupied), (1, Some(1)));
    }

    #[test]
    fn window_of_levels_above_one() {
        // Levels 3..=6 computed; 8 electrons: HOMO 4, LUMO 5.
        let occ = fill(&LEVELS[2..], 3, 8).expect("window holds HOMO and LUMO");
        assert_eq!(occ.first_level, 3);
        assert_eq!((occ.homo, occ.lumo), (4, Some(5)));
        assert_eq!(occ.occupations, vec![2.0, 2.0, 0.0, 0.0]);
        // Only levels 3 and 4: 2 (4.5 + 8) = 25 (by hand), flagged incomplete.
        assert_relative_eq!(occ.total_energy, 25.0, max_relative = 1e-15);
        assert!(!occ.total_energy_complete);
        assert_relative_eq!(occ.gap.unwrap_or(f64::NAN), 4.5, max_relative = 1e-15);
    }

    #[test]
    fn too_few_levels_names_both_numbers() {
        // 11 electrons: HOMO 6, LUMO 7, only 6 levels computed.
        let err = fill(&LEVELS, 1, 11).expect_err("LUMO missing");
        assert_eq!(
            err,
            OccupancyError::TooFewLevels {
                electrons: 11,
                needed_levels: 7,
                computed_up_to: 6
            }
        );
        let text = err.to_string();
        assert!(
            text.contains("11") && text.contains('7') && text.contains('6'),
            "{text}"
        );
        let below = fill(&LEVELS[3..], 4, 2).expect_err("HOMO below window");
        assert_eq!(
            below,
            OccupancyError::HomoBelowComputed {
                electrons: 2,
                homo: 1,
                first_n: 4
            }
        );
        let text = below.to_string();
        assert!(text.contains("n = 1") && text.contains("n = 4"), "{text}");
        assert!(matches!(
            fill(&[], 1, 2),
            Err(OccupancyError::TooFewLevels {
                computed_up_to: 0,
                ..
            })
        ));
    }

    #[test]
    fn no_electrons_and_bad_energies() {
        assert_eq!(fill(&LEVELS, 1, 0), Err(OccupancyError::NoElectrons));
        assert!(fill(&LEVELS, 1, 0)
            .map_err(|e| e.to_string())
            .unwrap_err()
            .contains('0'));
        assert_eq!(fill(&LEVELS, 0, 2), Err(OccupancyError::ZeroFirstLevel));
        assert!(matches!(
            fill(&[1.0, f64::NAN, 3.0], 1, 2),
            Err(OccupancyError::NonFiniteEnergy { level: 2, .. })
        ));
        assert!(matches!(
            fill(&[1.0, 3.0, 2.0], 1, 2),
            Err(OccupancyError::NotAscending {
                level: 3,
                previous_level: 2,
                ..
            })
        ));
    }

    #[test]
    fn a_half_filled_degenerate_pair_is_an_open_shell_without_a_gap() {
        // The free ring's levels j^2 (0, 1, 1, 4, 4, 9, 9: the pairs +-j;
        // L. Salem, The Molecular Orbital Theory of Conjugated Systems,
        // ch. 1): 4 electrons put 2 in the pair j = 1.
        let ring = [0.0, 1.0, 1.0, 4.0, 4.0, 9.0, 9.0];
        let occ = fill(&ring, 1, 4).expect("fits");
        assert!(occ.open_shell);
        assert_eq!(occ.homo_group, vec![2, 3]);
        assert_eq!((occ.homo, occ.lumo), (3, Some(4)));
        assert_eq!(occ.gap, None);
        assert_eq!(occ.wavelength_nm, None);
        assert_eq!(occ.singly_occupied, None);
        // The pair shares its two electrons evenly.
        assert_eq!(occ.occupations, vec![2.0, 1.0, 1.0, 0.0, 0.0, 0.0, 0.0]);
        // 4n + 2 electrons close the shell (Hückel's rule): 6 fill the pair.
        let closed = fill(&ring, 1, 6).expect("fits");
        assert!(!closed.open_shell);
        assert_eq!((closed.homo, closed.lumo), (3, Some(4)));
        assert_eq!(closed.gap, Some(3.0));
        // 5 electrons: 2 in j = 0, the other 3 shared by the pair j = 1.
        let five = fill(&ring, 1, 5).expect("fits");
        assert!(five.open_shell);
        assert_eq!(five.occupations[1..3], [1.5, 1.5]);
        let total: f64 = five.occupations.iter().sum();
        assert_eq!(total, 5.0);
    }

    #[test]
    fn an_odd_count_on_a_single_level_is_a_radical_with_a_gap() {
        let occ = fill(&LEVELS, 1, 5).expect("fits");
        assert!(occ.open_shell);
        assert_eq!(occ.homo_group, vec![3]);
        assert_eq!(occ.gap, Some(3.5));
        assert!(occ.open_shell_warning(&Units::default()).is_none());
        assert!(fill(&LEVELS, 1, 6)
            .expect("fits")
            .open_shell_warning(&Units::default())
            .is_none());
    }

    proptest! {
        #[test]
        fn occupations_add_up(electrons in 1usize..40, extra in 1usize..5) {
            let levels = electrons.div_ceil(2) + extra;
            let energies: Vec<f64> = (1..=levels).map(|n| (n * n) as f64).collect();
            let occ = fill(&energies, 1, electrons).expect("enough levels");
            let total: f64 = occ.occupations.iter().sum();
            prop_assert_eq!(total, electrons as f64);
            prop_assert!(occ.occupations.iter().all(|&o| o == 0.0 || o == 1.0 || o == 2.0));
            prop_assert_eq!(occ.open_shell, electrons % 2 == 1);
            prop_assert!(occ.occupations.windows(2).all(|w| w[0] >= w[1]));
            prop_assert!(occ.gap.unwrap_or(-1.0) > 0.0);
        }
    }
}
