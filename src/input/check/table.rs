//! Checking `table` terms: reading the CSV file and locating its faults at
//! the file's own line and column.

use std::sync::Arc;

use super::{Checker, Result};
use crate::input::error::{InputError, Location};
use crate::input::raw::RawTerm;
use crate::potential::table::{Interpolation, Outside, Table};
use crate::potential::Term;

impl Checker<'_> {
    pub(super) fn check_table(&self, raw: &RawTerm, key: &str) -> Result<Term> {
        let file = raw.file.as_ref().ok_or_else(|| {
            self.err(
                raw.shape.span(),
                &format!("{key}.file"),
                "a `table` term needs `file`",
            )
        })?;
        let interpolation = match &raw.interpolation {
            None => Interpolation::Linear,
            Some(i) => match i.get_ref().as_str() {
                "linear" => Interpolation::Linear,
                "cubic" => Interpolation::Cubic,
                other => {
                    return Err(self.err(
                        i.span(),
                        &format!("{key}.interpolation"),
                        format!("unknown interpolation `{other}`; use \"linear\" or \"cubic\""),
                    ))
                }
            },
        };
        let outside = match &raw.outside {
            None => Outside::Value(0.0),
            Some(o) => match o.get_ref() {
                toml::Value::String(s) if s == "hold" => Outside::Hold,
                toml::Value::Float(x) if x.is_finite() => Outside::Value(*x),
                toml::Value::Integer(n) => Outside::Value(*n as f64),
                _ => {
                    return Err(self.err(
                        o.span(),
                        &format!("{key}.outside"),
                        "must be a number (the value outside the table) or \"hold\" (keep the end values)",
                    ))
                }
            },
        };
        let path = self.base_dir.join(file.get_ref());
        let table = Table::read(&path, interpolation, outside).map_err(|e| {
            let location = match e.line() {
                Some(line) => {
                    let text = std::fs::read_to_string(&path).ok();
                    let line_text = text
                        .as_deref()
                        .and_then(|t| t.lines().nth(line - 1))
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
                }
                None => self.loc(file.span()),
            };
            InputError::new(location, format!("{key}.file"), e.to_string())
        })?;
        Ok(Term::Table {
            table: Arc::new(table),
            length_unit: self.units.length.in_angstrom(),
            energy_unit: self.units.energy.in_ev(),
        })
    }
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
