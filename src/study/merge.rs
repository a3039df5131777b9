//! Joining the documents of a sharded sweep into the unsharded one.
//!
//! Every part must come from the same study: the same input text and
//! overrides (compared by their digest, so shards run in different folders
//! merge), `--vary` flags and case count (the headers must agree apart
//! from `shard` and the input's file name). Every row of every part has
//! been checked against the case it claims when the part was read
//! ([`SweepResult::check_rows`]). The rows are joined in case order; a case found in two
//! parts must be the same in both. The result is the document an unsharded
//! run prints, byte for byte, when every case is present.

use super::sweep::{SweepHeader, SweepResult, SweepRow};

/// Why documents cannot be merged.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum MergeError {
    /// No document was given.
    #[error("merge needs at least one sweep document")]
    Nothing,
    /// A part comes from another study.
    #[error("{part}: not a shard of the same sweep as {first} ({what} differs)")]
    Different {
        /// The odd part.
        part: String,
        /// The first part.
        first: String,
        /// Which header item differs.
        what: &'static str,
    },
    /// A case appears twice with different results.
    #[error("{part}: case {case} differs from the same case in an earlier part")]
    Conflict {
        /// The part with the second copy.
        part: String,
        /// The case number.
        case: usize,
    },
    /// Some cases are in no part.
    #[error("{count} of {cases} cases are in none of the parts (first missing: {first:?}); merge every shard's output, or rerun the missing shards")]
    Missing {
        /// How many are missing.
        count: usize,
        /// Cases in the study.
        cases: usize,
        /// Up to ten missing case numbers.
        first: Vec<usize>,
    },
}

/// Which header item differs between two documents, if any (`shard`
/// aside).
pub fn differs(a: &SweepHeader, b: &SweepHeader) -> Option<&'static str> {
    if a.keys != b.keys {
        Some("the varied keys")
    } else if a.specs != b.specs {
        Some("the --vary flags")
    } else if a.cases != b.cases {
        Some("the case count")
    } else if a.digest() != b.digest() {
        Some("the input or its --set overrides")
    } else if a.units != b.units {
        Some("the units")
    } else {
        None
    }
}

/// Merges named parts (`(name, document)`) into one result. The result is
/// complete when every case of the study is present; parts that are
/// themselves incomplete are fine as long as together they cover every case.
pub fn merge(parts: &[(String, SweepResult)]) -> Result<SweepResult, MergeError> {
    let (first_name, first) = parts.first().ok_or(MergeError::Nothing)?;
    let mut rows: std::collections::BTreeMap<usize, SweepRow> = std::collections::BTreeMap::new();
    for (name, part) in parts {
        if let Some(what) = differs(&first.header, &part.header) {
            return Err(MergeError::Different {
                part: name.clone(),
                first: first_name.clone(),
                what,
            });
        }
        for row in &part.rows {
            match rows.get(&row.case) {
                Some(r) if r != row => {
                    return Err(MergeError::Conflict {
                        part: name.clone(),
                        case: row.case,
                    })
                }
                Some(_) => {}
                None => {
                    rows.insert(row.case, row.clone());
                }
            }
        }
    }
    let cases = first.header.cases;
    let missing: Vec<usize> = (1..=cases).filter(|c| !rows.contains_key(c)).collect();
    if !missing.is_empty() {
        return Err(MergeError::Missing {
            count: missing.len(),
            cases,
            first: missing.into_iter().take(10).collect(),
        });
    }
    let mut header = first.header.clone();
    header.shard = None;
    Ok(SweepResult {
        header,
        rows: rows.into_values().collect(),
        complete: true,
    })
}
