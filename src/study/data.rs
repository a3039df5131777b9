//! Measured series for fits: a small CSV reader.
//!
//! The header names one or more input keys (dotted keys such as
//! `chain.bonds`, `chain.charge`, `levels.electrons`), one observed quantity
//! (see [`Quantity`]) and optionally `uncertainty`, one standard deviation
//! of each observation. Each row sets every key it carries; the first key
//! is the series' axis (reports and figures plot against it). Lines starting with `#` and blank
//! lines are skipped; every fault names the file and line.

use std::path::Path;

use super::cases::CaseValue;
use super::quantity::Quantity;

/// One row of the data file.
#[derive(Debug, Clone, PartialEq)]
pub struct DataRow {
    /// Value of the data's first key (the series' axis).
    pub value: CaseValue,
    /// Values of every key column, in the order of [`Data::keys`] (the
    /// first is `value`).
    pub values: Vec<CaseValue>,
    /// Observed quantity.
    pub observed: f64,
    /// Its uncertainty (one standard deviation), when given.
    pub uncertainty: Option<f64>,
    /// 1-based line in the file.
    pub line: usize,
}

/// A data file: one input key, one quantity, rows.
#[derive(Debug, Clone, PartialEq)]
pub struct Data {
    /// The file's name, for messages.
    pub file: String,
    /// The input key of the first column that is not a quantity.
    pub key: String,
    /// Every key column, in the file's order (the first is `key`).
    pub keys: Vec<String>,
    /// The observed quantity.
    pub quantity: Quantity,
    /// The rows.
    pub rows: Vec<DataRow>,
}

/// A fault in a data file, with its line.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("error: {file}{}: {message}", line_suffix(*.line))]
pub struct DataError {
    /// The file.
    pub file: String,
    /// 1-based line (0: the file as a whole).
    pub line: usize,
    /// What is wrong.
    pub message: String,
}

/// `:LINE` for a fault on a line; nothing for the file as a whole (line 0).
fn line_suffix(line: usize) -> String {
    if line == 0 {
        String::new()
    } else {
        format!(":{line}")
    }
}

impl Data {
    /// Reads a CSV with a header naming the key column (a dotted input key),
    /// the quantity column (`gap`, `wavelength_nm`, `homo`, `lumo`,
    /// `energy.N`) and optionally `uncertainty`. Lines starting with `#` and
    /// blank lines are skipped.
    pub fn read(path: &Path) -> Result<Self, DataError> {
        let file = path.display().to_string();
        let err = |line: usize, message: String| DataError {
            file: file.clone(),
            line,
            message,
        };
        let bytes =
            crate::files::read_capped(path).map_err(|e| err(0, format!("cannot read: {e}")))?;
        let text = String::from_utf8(bytes).map_err(|e| {
            let line = 1 + e.as_bytes()[..e.utf8_error().valid_up_to()]
                .iter()
                .filter(|&&b| b == b'\n')
                .count();
            err(line, "the file is not UTF-8 text".into())
        })?;
        Self::parse(&file, &text)
    }

    /// Reads the CSV text of a series, as [`Data::read`] reads a file;
    /// `file` names it in messages.
    pub fn parse(file: &str, text: &str) -> Result<Self, DataError> {
        let file = file.to_string();
        let err = |line: usize, message: String| DataError {
            file: file.clone(),
            line,
            message,
        };
        // A byte-order mark, as spreadsheet programs write, is not part of
        // the header (tables accept it too).
        let text = text.strip_prefix('\u{feff}').unwrap_or(text);
        let mut lines = text
            .lines()
            .enumerate()
            .map(|(i, l)| (i + 1, l.trim()))
            .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'));
        let (hline, header) = lines
            .next()
            .ok_or_else(|| err(0, "the file has no header".into()))?;
        let names: Vec<&str> = header.split(',').map(str::trim).collect();
        let mut key_cols: Vec<usize> = Vec::new();
        let mut q_col = None;
        let mut u_col = None;
        for (i, n) in names.iter().enumerate() {
            if *n == "uncertainty" {
                u_col = Some(i);
            } else if let Ok(q) = Quantity::parse(n) {
                if q_col.is_some() {
                    return Err(err(
                        hline,
                        format!("two quantity columns; keep one (found `{n}`)"),
                    ));
                }
                q_col = Some((i, q));
            } else if n.contains('.') {
                if let Some(&j) = key_cols.iter().find(|&&j| names[j] == *n) {
                    return Err(err(
                        hline,
                        format!("the key `{n}` names columns {} and {}", j + 1, i + 1),
                    ));
                }
                key_cols.push(i);
            } else {
                return Err(err(hline, format!("column `{n}` is neither an input key (such as chain.bonds), a quantity (gap, wavelength_nm, homo, lumo, energy.N) nor `uncertainty`")));
            }
        }
        if key_cols.is_empty() {
            return Err(err(
                hline,
                "no column names an input key (such as chain.bonds)".into(),
            ));
        }
        let (q_col, quantity) = q_col.ok_or_else(|| {
            err(
                hline,
                "no column names a quantity (gap, wavelength_nm, homo, lumo or energy.N)".into(),
            )
        })?;
        let mut rows = Vec::new();
        for (line, l) in lines {
            let cells: Vec<&str> = l.split(',').map(str::trim).collect();
            if cells.len() != names.len() {
                return Err(err(
                    line,
                    format!("{} cells, the header has {}", cells.len(), names.len()),
                ));
            }
            let num = |c: usize| -> Result<f64, DataError> {
                cells[c]
                    .parse::<f64>()
                    .ok()
                    .filter(|x| x.is_finite())
                    .ok_or_else(|| {
                        err(
                            line,
                            format!("`{}` under `{}` is not a number", cells[c], names[c]),
                        )
                    })
            };
            let values = key_cols
                .iter()
                .map(|&c| match cells[c].parse::<i64>() {
                    Ok(i) => Ok(CaseValue::Int(i)),
                    Err(_) => num(c).map(CaseValue::Float),
                })
                .collect::<Result<Vec<_>, _>>()?;
            let uncertainty = match u_col {
                Some(c) => {
                    let s = num(c)?;
                    if s <= 0.0 {
                        return Err(err(line, format!("the uncertainty {s} must be positive")));
                    }
                    Some(s)
                }
                None => None,
            };
            rows.push(DataRow {
                value: values[0],
                values,
                observed: num(q_col)?,
                uncertainty,
                line,
            });
        }
        if rows.is_empty() {
            return Err(err(0, "the file has no data rows".into()));
        }
        Ok(Self {
            file,
            key: names[key_cols[0]].to_string(),
            keys: key_cols.iter().map(|&c| names[c].to_string()).collect(),
            quantity,
            rows,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn read(text: &str) -> Result<Data, DataError> {
        let p = std::env::temp_dir().join(format!(
            "chainwell-data-{}-{}.csv",
            std::process::id(),
            text.len()
        ));
        std::fs::write(&p, text).unwrap();
        let r = Data::read(&p);
        std::fs::remove_file(&p).unwrap();
        r
    }

    #[test]
    fn reads_key_quantity_and_uncertainty() {
        let d =
            read("# comment\nchain.bonds,energy.3,uncertainty\n3,1.5,0.1\n\n5,1.25,0.2\n").unwrap();
        assert_eq!(d.key, "chain.bonds");
        assert_eq!(d.quantity, Quantity::Energy(3));
        assert_eq!(d.rows.len(), 2);
        assert_eq!(d.rows[1].value, CaseValue::Int(5));
        assert_eq!(d.rows[1].uncertainty, Some(0.2));
        assert_eq!(d.rows[1].line, 5);
    }

    #[test]
    fn text_reads_as_a_file_does() {
        let text = "chain.bonds,gap,uncertainty\n3,1.5,0.1\n5,1.25,0.2\n";
        let mut from_file = read(text).unwrap();
        from_file.file = "series".into();
        assert_eq!(Data::parse("series", text).unwrap(), from_file);
        let e = Data::parse("series", "chain.bonds,gap\n3,x\n").unwrap_err();
        assert_eq!((e.file.as_str(), e.line), ("series", 2));
    }

    #[test]
    fn several_key_columns_set_every_key_of_a_row() {
        let d = read("chain.bonds,levels.electrons,chain.end_extension,wavelength_nm\n4,6,1.5,300\n6,8,1.5,400\n").unwrap();
        assert_eq!(d.key, "chain.bonds");
        assert_eq!(
            d.keys,
            ["chain.bonds", "levels.electrons", "chain.end_extension"]
        );
        assert_eq!(d.quantity, Quantity::WavelengthNm);
        assert_eq!(
            d.rows[1].values,
            [CaseValue::Int(6), CaseValue::Int(8), CaseValue::Float(1.5)]
        );
        assert_eq!(d.rows[1].value, CaseValue::Int(6));
        let e = read("chain.bonds,chain.bonds,gap\n3,3,1\n").unwrap_err();
        assert!(e.message.contains("columns 1 and 2"), "{e}");
        let e = read("chain.bonds,levels.electrons,gap\n3,x,1\n").unwrap_err();
        assert!(e.message.contains("levels.electrons"), "{e}");
    }

    #[test]
    fn faults_name_the_line() {
        let e = read("chain.bonds,gap\n3,1.5\n4,x\n").unwrap_err();
        assert_eq!(e.line, 3);
        assert!(e.message.contains("`x`"), "{e}");
        let e = read("chain.bonds,colour\n3,1\n").unwrap_err();
        assert!(e.message.contains("colour"), "{e}");
        let e = read("chain.bonds,gap,uncertainty\n3,1,0\n").unwrap_err();
        assert!(e.message.contains("positive"), "{e}");
        assert!(read("chain.bonds,gap\n").is_err());
    }
}
