//! Sweeps: one solve per case of a grid of `--vary` values.
//!
//! Each case is the input with the `--set` overrides and then the case's own
//! overrides applied, checked like a file ([`crate::input::load`]), so
//! varying `chain.bonds` also changes the chain's default electron count.
//! Every case is checked before any is solved, so a bad value stops the
//! sweep at once. Cases run in parallel (rayon); each is computed on its own
//! and the rows are kept in case order, so the document does not depend on
//! the number of threads.
//!
//! A row carries the same `levels` and `occupancy` objects as
//! `chainwell solve --json` ([`crate::pipeline::record`]).

use std::path::Path;
use std::sync::Mutex;

use rayon::prelude::*;
use serde_json::{json, Value};

use super::cases::{Case, CaseGrid, CaseValue, Shard};
use super::runner::Runner;
use crate::input::{Document, InputError, Model, Override, SourceText};
use crate::pipeline::record::{level_records, occupancy_record, LevelRecord, OccupancyRecord};
use crate::pipeline::response::ResponseRecord;
use crate::pipeline::{self, SolveError};

/// The format name of sweep documents.
pub const FORMAT: &str = "chainwell.sweep/1";

/// What a sweep is: the input, its overrides, the cases and the shard.
#[derive(Debug)]
pub struct SweepSpec {
    /// The input, read once.
    pub document: Document,
    /// `--set` overrides, applied before each case's own.
    pub overrides: Vec<Override>,
    /// The grid of cases.
    pub grid: CaseGrid,
    /// Which share of the cases to run (all when `None`).
    pub shard: Option<Shard>,
}

/// Everything about a sweep except its rows: equal for every shard of one
/// study (apart from `shard`), which is what merge and resume check.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepHeader {
    /// The varied keys, in the order of the flags.
    pub keys: Vec<String>,
    /// The `--vary` flags as written.
    pub specs: Vec<String>,
    /// Number of cases in the whole study.
    pub cases: usize,
    /// The shard this document holds (none for a whole study).
    pub shard: Option<Shard>,
    /// The `units` object of the first case.
    pub units: Value,
    /// The echo of the input: file name, text and `--set` overrides.
    pub input: Value,
}

/// One finished case.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepRow {
    /// 1-based case number in the whole study.
    pub case: usize,
    /// The value of each varied key.
    pub values: Vec<CaseValue>,
    /// The levels, as `solve --json` writes them.
    pub levels: Vec<LevelRecord>,
    /// The filling, when electrons are filled.
    pub occupancy: Option<OccupancyRecord>,
    /// The solve's warnings for this case.
    pub warnings: Vec<String>,
    /// The static response, when `[response]` asks for it.
    pub response: Option<ResponseRecord>,
}

impl SweepRow {
    /// `(n, energy)` of each computed level, in the input's energy unit.
    pub fn energies(&self) -> Vec<(usize, f64)> {
        self.levels.iter().map(|l| (l.n, l.energy)).collect()
    }

    /// The HOMO–LUMO gap, in the input's energy unit.
    pub fn gap(&self) -> Option<f64> {
        self.occupancy.as_ref().and_then(|o| o.gap)
    }

    /// The HOMO → LUMO wavelength, nm.
    pub fn wavelength_nm(&self) -> Option<f64> {
        self.occupancy.as_ref().and_then(|o| o.wavelength_nm)
    }

    /// The HOMO's level number.
    pub fn homo(&self) -> Option<usize> {
        self.occupancy.as_ref().map(|o| o.homo)
    }

    /// The LUMO's level number.
    pub fn lumo(&self) -> Option<usize> {
        self.occupancy.as_ref().and_then(|o| o.lumo)
    }

    /// Electrons in level `n` (0, 1 or 2), when electrons are filled.
    pub fn electrons_in(&self, n: usize) -> Option<usize> {
        let electrons = self.occupancy.as_ref()?.electrons;
        Some(electrons.saturating_sub(2 * (n - 1)).min(2))
    }
}

/// A sweep's result: the header and the finished rows in case order.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepResult {
    /// What was swept.
    pub header: SweepHeader,
    /// Finished cases, ascending by case number.
    pub rows: Vec<SweepRow>,
    /// Whether every case of the header's shard (or study) is among the rows.
    pub complete: bool,
}

/// Why a sweep could not run.
#[derive(Debug, thiserror::Error)]
pub enum SweepError {
    /// A case fails the input checks; the location names the `--vary` flag
    /// when the fault is in a varied value.
    #[error("{}", .0.render())]
    Input(InputError),
    /// A case's solve failed.
    #[error("case {label}: {source}")]
    Solve {
        /// 1-based case number.
        case: usize,
        /// `key=value` of the case.
        label: String,
        /// What went wrong.
        source: SolveError,
    },
    /// A document to merge or resume from is not a sweep of this study.
    #[error("{0}")]
    Document(String),
}

/// The cases of a sweep with their checked models, ready to run.
#[derive(Debug)]
pub struct Prepared {
    /// The header of the document this run makes.
    pub header: SweepHeader,
    /// The cases of this run's shard, with their models.
    pub cases: Vec<(Case, Model)>,
}

/// Rewrites the location of a fault in a case's own override so that it
/// names the `--vary` flag instead of an internal `--set`.
pub fn vary_error(mut e: InputError, spec: &SweepSpec, case: &Case) -> InputError {
    for (i, ov) in case.overrides(&spec.grid.keys()).iter().enumerate() {
        if e.location.file == format!("--set {}", ov.text()) {
            e.location.file = format!("--vary {} (case {})", spec.grid.varies[i].spec, ov.text());
            if e.key.is_empty() {
                e.key = ov.key.clone();
            }
        }
    }
    e
}

/// Loads one case: the `--set` overrides, then the case's.
pub fn load_case(spec: &SweepSpec, case: &Case) -> Result<(Model, SourceText), InputError> {
    let mut ovs = spec.overrides.clone();
    ovs.extend(case.overrides(&spec.grid.keys()));
    spec.document
        .model(&ovs)
        .map_err(|e| vary_error(e, spec, case))
}

/// Checks every case of the shard and builds the header.
pub fn prepare(spec: &SweepSpec) -> Result<Prepared, SweepError> {
    let (base, source) = spec
        .document
        .model(&spec.overrides)
        .map_err(SweepError::Input)?;
    let cases = spec.grid.cases(spec.shard);
    let models = cases
        .par_iter()
        .map(|c| load_case(spec, c).map(|(m, _)| m))
        .collect::<Result<Vec<_>, _>>()
        .map_err(SweepError::Input)?;
    let header = SweepHeader {
        keys: spec.grid.keys(),
        specs: spec.grid.varies.iter().map(|v| v.spec.clone()).collect(),
        cases: spec.grid.len(),
        shard: spec.shard,
        units: base.units.to_json(),
        input: json!({
            "file": source.name,
            "text": source.text,
            "overrides": source.overrides,
        }),
    };
    Ok(Prepared {
        header,
        cases: cases.into_iter().zip(models).collect(),
    })
}

/// Solves one case into a row.
pub fn solve_case(case: &Case, model: &Model) -> Result<SweepRow, SolveError> {
    let sol = pipeline::solve(model)?;
    Ok(SweepRow {
        case: case.number,
        values: case.values.clone(),
        levels: level_records(model, &sol),
        occupancy: sol.occupancy.as_ref().map(|o| occupancy_record(model, o)),
        warnings: sol.warnings.clone(),
        response: sol
            .response
            .as_ref()
            .map(|r| r.record(model, sol.box_length)),
    })
}

/// Runs the prepared cases that are not already among `done` (rows of an
/// earlier, interrupted run of the same study). The runner's stop flag is
/// polled before each case; after each case the runner hears of the
/// progress and is offered the partial result (rows in case order,
/// `complete: false`) for its checkpoint. Returns the result, marked
/// incomplete when the stop flag cut it short.
pub fn run(
    prepared: &Prepared,
    done: Vec<SweepRow>,
    runner: &Runner<'_, SweepResult>,
) -> Result<SweepResult, SweepError> {
    let finished_cases: std::collections::HashSet<usize> = done.iter().map(|r| r.case).collect();
    let todo: Vec<&(Case, Model)> = prepared
        .cases
        .iter()
        .filter(|(c, _)| !finished_cases.contains(&c.number))
        .collect();
    let total = prepared.cases.len();
    let finished = Mutex::new(done);
    let results: Vec<Option<Result<SweepRow, SweepError>>> = todo
        .par_iter()
        .map(|(case, model)| {
            if runner.stopped() {
                return None;
            }
            let r = solve_case(case, model).map_err(|source| SweepError::Solve {
                case: case.number,
                label: case.label(&prepared.header.keys),
                source,
            });
            if let Ok(row) = &r {
                let mut f = finished.lock().unwrap_or_else(|p| p.into_inner());
                f.push(row.clone());
                runner.progress(f.len(), total);
                runner.save(false, || {
                    let mut rows = f.clone();
                    rows.sort_by_key(|r| r.case);
                    SweepResult {
                        header: prepared.header.clone(),
                        rows,
                        complete: false,
                    }
                });
            }
            Some(r)
        })
        .collect();
    // The first failing case in case order, so the message does not depend
    // on the threads.
    if let Some(Some(Err(e))) = results.into_iter().find(|r| matches!(r, Some(Err(_)))) {
        return Err(e);
    }
    let mut rows = finished.into_inner().unwrap_or_else(|p| p.into_inner());
    rows.sort_by_key(|r| r.case);
    let complete = rows.len() == total;
    Ok(SweepResult {
        header: prepared.header.clone(),
        rows,
        complete,
    })
}

impl SweepHeader {
    /// Reads the header back from a document.
    pub fn from_json(doc: &Value) -> Result<Self, String> {
        if doc["format"] != FORMAT {
            return Err(format!(
                "not a {FORMAT} document (format {})",
                doc["format"]
            ));
        }
        let strings = |v: &Value| -> Option<Vec<String>> {
            v.as_array()?
                .iter()
                .map(|s| s.as_str().map(String::from))
                .collect()
        };
        let keys = match doc.get("keys") {
            Some(k) => strings(k).ok_or("`keys` is not a list of strings")?,
            None => vec![doc["key"].as_str().ok_or("no `key`")?.to_string()],
        };
        let specs = strings(&doc["vary"]).ok_or("no `vary` list")?;
        let cases = doc["cases"].as_u64().ok_or("no `cases` count")? as usize;
        let shard = match doc.get("shard") {
            Some(s) => Some(Shard {
                index: s["index"].as_u64().ok_or("bad `shard`")? as usize,
                count: s["count"].as_u64().ok_or("bad `shard`")? as usize,
            }),
            None => None,
        };
        Ok(Self {
            keys,
            specs,
            cases,
            shard,
            units: doc["units"].clone(),
            input: doc["input"].clone(),
        })
    }
}

impl SweepRow {
    /// Reads a row back.
    pub fn from_json(v: &Value) -> Result<Self, String> {
        let case = v["case"].as_u64().ok_or("a row has no `case` number")? as usize;
        let values = match v.get("values") {
            Some(vs) => vs
                .as_array()
                .ok_or("`values` is not a list")?
                .iter()
                .map(CaseValue::from_json)
                .collect::<Option<Vec<_>>>()
                .ok_or("`values` holds a non-number")?,
            None => vec![CaseValue::from_json(&v["value"]).ok_or("a row has no `value`")?],
        };
        Ok(Self {
            case,
            values,
            levels: serde_json::from_value(v["levels"].clone())
                .map_err(|e| format!("case {case}: bad `levels`: {e}"))?,
            occupancy: match v.get("occupancy") {
                Some(o) => Some(
                    serde_json::from_value(o.clone())
                        .map_err(|e| format!("case {case}: bad `occupancy`: {e}"))?,
                ),
                None => None,
            },
            warnings: v
                .get("warnings")
                .and_then(|w| serde_json::from_value(w.clone()).ok())
                .unwrap_or_default(),
            response: match v.get("response") {
                Some(r) => Some(
                    serde_json::from_value(r.clone())
                        .map_err(|e| format!("case {case}: bad `response`: {e}"))?,
                ),
                None => None,
            },
        })
    }
}

impl SweepResult {
    /// Reads a document back.
    pub fn from_json(doc: &Value) -> Result<Self, String> {
        let header = SweepHeader::from_json(doc)?;
        let rows = doc["rows"]
            .as_array()
            .ok_or("no `rows` list")?
            .iter()
            .map(SweepRow::from_json)
            .collect::<Result<Vec<_>, _>>()?;
        Ok(Self {
            header,
            rows,
            complete: doc["complete"].as_bool().unwrap_or(true),
        })
    }

    /// Reads a document from a file.
    pub fn read(path: &Path) -> Result<Self, String> {
        let text = std::fs::read_to_string(path)
            .map_err(|e| format!("{}: cannot read: {e}", path.display()))?;
        let doc: Value = serde_json::from_str(&text)
            .map_err(|e| format!("{}: not JSON: {e}", path.display()))?;
        Self::from_json(&doc).map_err(|e| format!("{}: {e}", path.display()))
    }
}
