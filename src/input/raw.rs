//! The first stage of reading an input: serde structs that mirror the TOML
//! file one to one and keep the span of every value, so that the checking
//! stage can point at the exact line and column of a fault.
//!
//! Nothing here interprets a value; unknown keys are refused by serde
//! (`deny_unknown_fields`). A `Spanned` field inside a serde-tagged enum does
//! not deserialise, so a term is one flat struct whose `shape` is checked later.
//! Every section must be a TOML table: serde's derived structs would also
//! take a list of their fields in order (`domain = [0.0, 12.0, "walls"]`),
//! which [`TableOnly`] refuses.

use std::collections::BTreeMap;
use std::fmt;
use std::marker::PhantomData;

use serde::de::value::MapAccessDeserializer;
use serde::de::{Deserializer, MapAccess, Visitor};
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
    #[serde(default, deserialize_with = "table")]
    pub units: Option<Spanned<RawUnits>>,
    /// The particle.
    #[serde(default, deserialize_with = "table")]
    pub particle: Option<Spanned<RawParticle>>,
    /// The domain.
    #[serde(default, deserialize_with = "table")]
    pub domain: Option<Spanned<RawDomain>>,
    /// The grid.
    #[serde(default, deserialize_with = "table")]
    pub grid: Option<Spanned<RawGrid>>,
    /// Which levels to compute.
    #[serde(default, deserialize_with = "table")]
    pub levels: Option<Spanned<RawLevels>>,
    /// Potential terms.
    #[serde(default, deserialize_with = "tables")]
    pub term: Option<Vec<Spanned<RawTerm>>>,
    /// A conjugated chain.
    #[serde(default, deserialize_with = "table")]
    pub chain: Option<Spanned<RawChain>>,
    /// Absorption-spectrum options.
    #[serde(default, deserialize_with = "table")]
    pub spectrum: Option<Spanned<RawSpectrum>>,
    /// The Hückel (tight-binding) picture of the same atoms.
    #[serde(default, deserialize_with = "table")]
    pub huckel: Option<Spanned<RawHuckel>>,
    /// Static response to a field along x.
    #[serde(default, deserialize_with = "table")]
    pub response: Option<Spanned<RawResponse>>,
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
    /// Net charge of the chain (electrons = contributions − charge).
    pub charge: Option<Int>,
    #[serde(default, deserialize_with = "tables")]
    pub site: Option<Vec<Spanned<RawSite>>>,
}

/// `[[chain.site]]`.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawSite {
    /// 1-based from the left; negative counts from the right (−1 = last).
    pub atom: Int,
    pub height: Option<Num>,
    pub width: Option<Num>,
    /// Pi electrons the atom gives (default 1).
    pub electrons: Option<Int>,
}

/// `[huckel]`: the tight-binding levels of the chain's atoms.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawHuckel {
    pub alpha: Option<Num>,
    pub beta: Option<Num>,
    pub beta_double: Option<Num>,
    pub beta_single: Option<Num>,
    /// Atoms, for an input without a chain.
    pub atoms: Option<Int>,
    /// Close the atoms into a ring (default: the domain's boundary).
    pub ring: Option<Spanned<bool>>,
    #[serde(default, deserialize_with = "tables")]
    pub site: Option<Vec<Spanned<RawHuckelSite>>>,
}

/// `[[huckel.site]]`: a heteroatom's Coulomb-integral shift.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawHuckelSite {
    pub atom: Int,
    pub alpha: Num,
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

/// `[response]`: static polarizability and hyperpolarizabilities.
#[derive(Debug, Deserialize)]
#[serde(deny_unknown_fields)]
#[allow(missing_docs)]
pub struct RawResponse {
    pub enabled: Option<Spanned<bool>>,
    pub hyperpolarizabilities: Option<Spanned<bool>>,
    pub sum_over_states: Option<Spanned<bool>>,
}

/// A value that must be written as a TOML table. serde's derived structs
/// also accept a list of their fields in order; this wrapper takes a table
/// only, and says "expected a table" for anything else.
pub struct TableOnly<T>(pub T);

impl<'de, T: Deserialize<'de>> Deserialize<'de> for TableOnly<T> {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        struct Only<T>(PhantomData<T>);
        impl<'de, T: Deserialize<'de>> Visitor<'de> for Only<T> {
            type Value = TableOnly<T>;
            fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                f.write_str("a table")
            }
            fn visit_map<A: MapAccess<'de>>(self, map: A) -> Result<Self::Value, A::Error> {
                T::deserialize(MapAccessDeserializer::new(map)).map(TableOnly)
            }
        }
        d.deserialize_map(Only(PhantomData))
    }
}

/// A section that must be a table, with its span.
fn table<'de, D, T>(d: D) -> Result<Option<Spanned<T>>, D::Error>
where
    D: Deserializer<'de>,
    T: Deserialize<'de>,
{
    let s = Spanned::<TableOnly<T>>::deserialize(d)?;
    let span = s.span();
    Ok(Some(Spanned::new(span, s.into_inner().0)))
}

/// A list of sections (`[[term]]`), each a table, with their spans.
fn tables<'de, D, T>(d: D) -> Result<Option<Vec<Spanned<T>>>, D::Error>
where
    D: Deserializer<'de>,
    T: Deserialize<'de>,
{
    let items = Vec::<Spanned<TableOnly<T>>>::deserialize(d)?;
    Ok(Some(
        items
            .into_iter()
            .map(|s| {
                let span = s.span();
                Spanned::new(span, s.into_inner().0)
            })
            .collect(),
    ))
}
