//! Table files an input refers to, each read and parsed once.
//!
//! A study checks the same input many times (every case of a sweep, every
//! evaluation of a fit, every finite chain of a band study). The potential
//! tables its `table` terms name are read and parsed on first use and kept,
//! shared through an [`Arc`], for every later model of the same
//! [`Document`](super::Document). A fault is kept too, so that every model
//! reports it the same way without reading the file again.

use std::path::{Path, PathBuf};
use std::sync::{Arc, Mutex, PoisonError};

use super::error::Location;
use crate::potential::table::{Interpolation, Outside, Table, TableErrorKind};

/// A fault in a table file, ready to be reported.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct TableFault {
    /// Where in the CSV file the fault is (its own line and column), or
    /// `None` when the fault is the file as a whole (missing, unreadable,
    /// too few rows): then the input's `file` key is the place to point at.
    pub at: Option<Location>,
    /// What is wrong.
    pub message: String,
}

/// What a table was read with: two uses of one file share the parsed table
/// only when they interpolate alike and treat the outside alike.
#[derive(Debug, Clone, PartialEq)]
struct Key {
    path: PathBuf,
    interpolation: Interpolation,
    /// [`Outside`] with its value compared bit for bit.
    outside: Option<u64>,
}

impl Key {
    fn new(path: &Path, interpolation: Interpolation, outside: Outside) -> Self {
        Self {
            path: path.to_path_buf(),
            interpolation,
            outside: match outside {
                Outside::Value(v) => Some(v.to_bits()),
                Outside::Hold => None,
            },
        }
    }
}

type Entry = (Key, Result<Arc<Table>, TableFault>);

/// The tables read so far, shared between threads (cases are checked in
/// parallel). Few inputs name more than a handful of tables, so a list
/// searched in order is enough.
#[derive(Debug, Default)]
pub struct TableCache {
    entries: Mutex<Vec<Entry>>,
    reads: Mutex<usize>,
}

impl TableCache {
    /// An empty cache.
    pub fn new() -> Self {
        Self::default()
    }

    /// The table at `path` read with `interpolation` and `outside`: from the
    /// cache when it was read before, else read, parsed and kept. The lock
    /// is held while reading, so that threads asking for the same file at
    /// once read it once.
    pub fn get(
        &self,
        path: &Path,
        interpolation: Interpolation,
        outside: Outside,
    ) -> Result<Arc<Table>, TableFault> {
        let key = Key::new(path, interpolation, outside);
        let mut entries = self.entries.lock().unwrap_or_else(PoisonError::into_inner);
        if let Some((_, found)) = entries.iter().find(|(k, _)| *k == key) {
            return found.clone();
        }
        *self.reads.lock().unwrap_or_else(PoisonError::into_inner) += 1;
        let result = read(path, interpolation, outside);
        entries.push((key, result.clone()));
        result
    }

    /// The table files asked for so far (found or not), each once, as the
    /// input named them (joined to the input's folder).
    pub fn paths(&self) -> Vec<PathBuf> {
        let entries = self.entries.lock().unwrap_or_else(PoisonError::into_inner);
        let mut out: Vec<PathBuf> = Vec::new();
        for (k, _) in entries.iter() {
            if !out.contains(&k.path) {
                out.push(k.path.clone());
            }
        }
        out
    }

    /// How many times a table file was read (and parsed) through this cache.
    pub fn reads(&self) -> usize {
        *self.reads.lock().unwrap_or_else(PoisonError::into_inner)
    }
}

/// Reads and parses one table, turning a fault into a [`TableFault`] that
/// points at the CSV's own line and column where it has one.
fn read(
    path: &Path,
    interpolation: Interpolation,
    outside: Outside,
) -> Result<Arc<Table>, TableFault> {
    Table::read(path, interpolation, outside)
        .map(Arc::new)
        .map_err(|e| {
            // A fault in the header means the file may not be a table at
            // all (a path pointing at some other file): its lines are not
            // shown, only their place.
            let header_fault = matches!(
                e.kind(),
                TableErrorKind::NoHeader
                    | TableErrorKind::MissingColumn { .. }
                    | TableErrorKind::DuplicateColumn { .. }
                    | TableErrorKind::NotUtf8 { .. }
            );
            let at = e.line().map(|line| {
                let text = crate::files::read_capped(path)
                    .ok()
                    .filter(|_| !header_fault)
                    .and_then(|b| String::from_utf8(b).ok());
                let line_text = text
                    .as_deref()
                    .map(|t| t.strip_prefix('\u{feff}').unwrap_or(t))
                    .and_then(|t| t.lines().nth(line.saturating_sub(1)))
                    .map(str::to_string);
                let column = match (e.column(), &line_text) {
                    (Some(field), Some(text)) => field_column(text, field),
                    _ => 1,
                };
                Location {
                    file: path.display().to_string(),
                    line,
                    column,
                    line_text,
                }
            });
            TableFault {
                at,
                message: e.to_string(),
            }
        })
}

/// The 1-based character column where field `field` (1-based) of a CSV line
/// starts, past the blanks that lead it, as the input file's messages count.
fn field_column(line: &str, field: usize) -> usize {
    let mut column = 1;
    for (i, cell) in line.split(',').enumerate() {
        if i + 1 == field {
            return column + cell.chars().take_while(|c| c.is_whitespace()).count();
        }
        column += cell.chars().count() + 1;
    }
    column
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn field_column_skips_leading_blanks() {
        assert_eq!(field_column("x,V", 1), 1);
        assert_eq!(field_column("1,  one", 2), 5);
        // Characters, not bytes: `é` is one column.
        assert_eq!(field_column("é,2", 2), 3);
    }

    #[test]
    fn a_table_is_read_once_per_way_of_reading_it() {
        let dir = std::env::temp_dir().join(format!("chainwell-tables-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let path = dir.join("t.csv");
        std::fs::write(&path, "x,V\n0,1\n1,2\n2,0\n").unwrap();
        let cache = TableCache::new();
        let a = cache
            .get(&path, Interpolation::Linear, Outside::Value(0.0))
            .unwrap();
        let b = cache
            .get(&path, Interpolation::Linear, Outside::Value(0.0))
            .unwrap();
        assert!(Arc::ptr_eq(&a, &b));
        assert_eq!(cache.reads(), 1);
        // Another interpolation is another table.
        let c = cache
            .get(&path, Interpolation::Cubic, Outside::Value(0.0))
            .unwrap();
        assert!(!Arc::ptr_eq(&a, &c));
        assert_eq!(cache.reads(), 2);
        // A fault is kept as well: the file is not read again.
        let missing = dir.join("missing.csv");
        let e1 = cache
            .get(&missing, Interpolation::Linear, Outside::Hold)
            .unwrap_err();
        let e2 = cache
            .get(&missing, Interpolation::Linear, Outside::Hold)
            .unwrap_err();
        assert_eq!(e1, e2);
        assert!(e1.at.is_none(), "{e1:?}");
        assert_eq!(cache.reads(), 3);
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
