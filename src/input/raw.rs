//! The first stage of reading an input: serde structs that mirror the TOML
//! file one to one and keep the span of every value, so that the checking
//! stage can point at the exact line and column of a fault.
//!
//! Nothing here interprets a value; unknown keys are refused by serde
//! (`deny_unknown_fields`). A `Spanned` field inside a serde-tagged enum does
//! not deserialise, so a term is one flat struct whose `shape` is checked later.

use std::collections::BTreeMap;

use serde::Deserialize;
use toml::Spanned;

/// A number with its place in the file.
pub type Num = Spanned<f64>;
/// An integer with its place in the file.
pub type Int = Spanned<i64>;
/// A string with its place in the file.
pub type Text = Spanned<String>;

/// The whole input file.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawInput {
    /// Free text.
    pub title: Option<Text>,
    /// Units of the input (and output).
    pub units: Option<Spanned<RawUnits>>,
    /// The particle.
    pub particle: Option<Spanned<RawParticle>>,
    /// The domain.
    pub domain: Option<Spanned<RawDomain>>,
    /// The grid.
    pub grid: Option<Spanned<RawGrid>>,
    /// Which levels to compute.
    pub levels: Option<Spanned<RawLevels>>,
    /// Potential terms.
    pub term: Option<Vec<Spanned<RawTerm>>>,
    /// A conjugated chain.
    pub chain: Option<Spanned<RawChain>>,
    /// Absorption-spectrum options.
    pub spectrum: Option<Spanned<RawSpectrum>>,
}

/// `[units]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawUnits {
    /// `angstrom`, `nm` or `bohr`.
    pub length: Option<Text>,
    /// `eV`, `meV`, `hartree`, `cm-1` or `kJ/mol`.
    pub energy: Option<Text>,
}

/// `[particle]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawParticle {
    /// Mass in electron masses.
    pub mass: Option<Num>,
}

/// `[domain]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawDomain {
    /// Left end.
    pub from: Option<Num>,
    /// Right end.
    pub to: Option<Num>,
    /// `walls` or `periodic`.
    pub boundary: Option<Text>,
}

/// `[grid]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawGrid {
    /// Number of unknowns.
    pub points: Option<Int>,
    /// Grid spacing.
    pub spacing: Option<Num>,
    /// Wanted accuracy of the levels.
    pub tolerance: Option<Num>,
    /// Finite-difference order.
    pub order: Option<Int>,
    /// `finite-difference` or `numerov`.
    pub scheme: Option<Text>,
    /// Upper limit on points when refining to a tolerance.
    pub max_points: Option<Int>,
}

/// `[levels]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RawLevels {
    /// How many levels.
    pub count: Option<Int>,
    /// Lowest level (1-based).
    pub first: Option<Int>,
    /// Every level below this energy.
    pub below: Option<Num>,
    /// Electrons to fill.
    pub electrons: Option<Int>,
}

/// One `[[term]]`: every key any shape uses; the checker refuses keys the
/// shape does not take.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawTerm {
    pub shape: Text,
    pub from: Option<Num>,
    pub to: Option<Num>,
    pub height: Option<Num>,
    pub amplitude: Option<Num>,
    pub period: Option<Num>,
    pub phase: Option<Num>,
    pub center: Option<Num>,
    pub stiffness: Option<Num>,
    pub depth: Option<Num>,
    pub range: Option<Num>,
    pub width: Option<Num>,
    pub slope: Option<Num>,
    pub origin: Option<Num>,
    pub file: Option<Text>,
    pub interpolation: Option<Text>,
    pub outside: Option<Spanned<toml::Value>>,
    pub expression: Option<Text>,
    pub constants: Option<Spanned<BTreeMap<String, Num>>>,
}

/// `[chain]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawChain {
    pub bonds: Int,
    pub bond_length: Option<Num>,
    pub end_extension: Option<Num>,
    pub alternation: Option<Num>,
    pub end_cap_height: Option<Num>,
    pub end_cap_width: Option<Num>,
    pub site: Option<Vec<Spanned<RawSite>>>,
}

/// `[[chain.site]]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawSite {
    pub atom: Int,
    pub height: Num,
    pub width: Option<Num>,
}

/// `[spectrum]`: how absorption bands are broadened.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawSpectrum {
    pub shape: Option<Text>,
    pub width: Option<Num>,
    pub all_pairs: Option<Spanned<bool>>,
}
