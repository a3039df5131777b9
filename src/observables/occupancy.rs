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
//! # Levels below the computed window
//! Eigensolvers may return a window of levels `first_n, first_n + 1, ...`
//! rather than all levels from 1. Levels below `first_n` are still filled
//! (doubly) but their energies are unknown, so `total_energy` then sums the
//! computed levels only and `total_energy_complete` is `false`.

use crate::constants::hc_ev_nm;
use serde::Serialize;
use thiserror::Error;

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
    /// Electrons in each computed level (0, 1 or 2), aligned with the input
    /// energies.
    pub occupations: Vec<f64>,
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
    let homo = electrons.div_ceil(2);
    let lumo = homo + 1;
    let computed_up_to = (first_n - 1).saturating_add(energies.len());
    if lumo > computed_up_to {
        return Err(OccupancyError::TooFewLevels {
            electrons,
            needed_levels: lumo,
            computed_up_to,
        });
    }
    if homo < first_n {
        return Err(OccupancyError::HomoBelowComputed {
            electrons,
            homo,
            first_n,
        });
    }
    let odd = electrons % 2 == 1;
    let occupations: Vec<f64> = (first_n..=computed_up_to)
        .map(|level| match level.cmp(&homo) {
            std::cmp::Ordering::Less => 2.0,
            std::cmp::Ordering::Equal if odd => 1.0,
            std::cmp::Ordering::Equal => 2.0,
            std::cmp::Ordering::Greater => 0.0,
        })
        .collect();
    let total_energy = occupations.iter().zip(energies).map(|(o, e)| o * e).sum();
    let gap = energies[lumo - first_n] - energies[homo - first_n];
    let wavelength_nm = (gap > 0.0).then(|| hc_ev_nm() / gap);
    Ok(Occupancy {
        electrons,
        first_level: first_n,
        homo,
        lumo: Some(lumo),
        singly_occupied: odd.then_some(homo),
        gap: Some(gap),
        wavelength_nm,
        total_energy,
        total_energy_complete: first_n == 1,
        occupations,
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
    fn degenerate_homo_lumo_has_no_wavelength() {
        // A ring's doubly degenerate pair (closed form, levels of a ring).
        let occ = fill(&[0.0, 1.0, 1.0, 4.0], 1, 4).expect("fits");
        assert_eq!(occ.gap, Some(0.0));
        assert_eq!(occ.wavelength_nm, None);
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
            prop_assert!(occ.occupations.windows(2).all(|w| w[0] >= w[1]));
            prop_assert!(occ.gap.unwrap_or(-1.0) > 0.0);
        }
    }
}
