//! Potentials tabulated in a CSV file and interpolated between rows.
//!
//! # File format
//!
//! Plain UTF-8 text, comma separated. Blank lines and lines whose first
//! non-blank character is `#` are ignored anywhere. The first other line is
//! a header naming the columns; it must contain the exact names `x`
//! (position, angstrom) and `V` (potential, eV). Other columns are allowed
//! and ignored. Whitespace around cells is trimmed. Every data row has as
//! many fields as the header; `x` must increase strictly from row to row.
//!
//! ```text
//! # double well, from a fit
//! x, V, note
//! -2.0, 1.5, edge
//! -1.0, 0.0,
//!  0.0, 0.4, barrier
//! ```
//!
//! # Interpolation
//!
//! [`Interpolation::Linear`] joins neighbouring rows by straight lines; at
//! the midpoint of a row spacing `h` its error is `h^2 |f''| / 8` for a
//! smooth `f` (Burden and Faires, *Numerical Analysis*, sec. 3.1, the
//! interpolation error `f''(xi)/2 (x - x_i)(x - x_{i+1})`).
//! [`Interpolation::Cubic`] uses the natural cubic spline of
//! `super::spline`, error `O(h^4)` away from the ends. Outside the table's
//! `x` range the potential is set by [`Outside`].

use std::path::{Path, PathBuf};

use super::spline::{NaturalCubicSpline, SplineError};

/// How values between table rows are found.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Interpolation {
    /// Straight lines between neighbouring rows; needs at least 2 rows.
    Linear,
    /// Natural cubic spline through all rows; needs at least 3 rows.
    Cubic,
}

impl Interpolation {
    /// Fewest data rows this interpolation accepts (2 linear, 3 cubic).
    pub fn rows_needed(self) -> usize {
        match self {
            Interpolation::Linear => 2,
            Interpolation::Cubic => 3,
        }
    }
}

/// The potential outside the table's `x` range.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Outside {
    /// A constant value in eV; the default is `Value(0.0)`.
    Value(f64),
    /// The first row's `V` below the table, the last row's `V` above it.
    Hold,
}

impl Default for Outside {
    fn default() -> Self {
        Outside::Value(0.0)
    }
}

/// What kind of fault a [`TableError`] reports. Messages are written to
/// follow a location prefix such as `error: FILE:LINE:COL: `.
#[derive(Debug, thiserror::Error)]
pub enum TableErrorKind {
    /// The file does not exist.
    #[error("potential table `{}` not found", path.display())]
    NotFound {
        /// The path as given.
        path: PathBuf,
    },
    /// Any other failure reading the file.
    #[error("cannot read potential table `{}`: {source}", path.display())]
    Io {
        /// The path as given.
        path: PathBuf,
        /// The operating system's error.
        source: std::io::Error,
    },
    /// The file is not valid UTF-8; the error's line is where the first
    /// bad byte is.
    #[error("potential table `{}` is not UTF-8 text", path.display())]
    NotUtf8 {
        /// The path as given.
        path: PathBuf,
    },
    /// No header line: the text is empty, blank or only comments.
    #[error("potential table has no header line naming the columns `x` and `V`")]
    NoHeader,
    /// The header lacks a required column (`x` or `V`).
    #[error("potential table header has no column named `{name}`")]
    MissingColumn {
        /// The missing column's name.
        name: String,
    },
    /// The header names the same column twice.
    #[error("potential table header names column `{name}` twice")]
    DuplicateColumn {
        /// The repeated name.
        name: String,
    },
    /// A cell in the `x` or `V` column is not a number.
    #[error("`{text}` is not a number")]
    BadNumber {
        /// The cell's trimmed text.
        text: String,
    },
    /// A cell in the `x` or `V` column is infinite or NaN.
    #[error("`{text}` is not a finite number")]
    NonFinite {
        /// The cell's trimmed text.
        text: String,
    },
    /// A data row has a different number of fields from the header.
    #[error("row has {found} fields but the header has {expected}")]
    WrongFieldCount {
        /// Fields in the header.
        expected: usize,
        /// Fields in this row.
        found: usize,
    },
    /// `x` decreases from the previous row.
    #[error("x = {this} comes after x = {previous}; rows must be in increasing x")]
    Unsorted {
        /// `x` of the previous data row.
        previous: f64,
        /// `x` of this row.
        this: f64,
    },
    /// `x` repeats the previous row's value.
    #[error("x = {x} appears twice")]
    Duplicate {
        /// The repeated `x`.
        x: f64,
    },
    /// The cubic spline could not be built (not expected after the row
    /// checks above; kept so that no error is swallowed).
    #[error("cannot build the cubic spline: {0}")]
    Spline(SplineError),
    /// Not enough data rows for the interpolation chosen.
    #[error("potential table has {found} data row{} but needs at least {needed}",
        if *found == 1 { "" } else { "s" })]
    TooFewRows {
        /// Data rows found.
        found: usize,
        /// Rows needed: 2 for linear, 3 for cubic interpolation.
        needed: usize,
    },
}

/// An error reading or parsing a potential table.
///
/// Carries the 1-based line and field (column) of the fault in the CSV
/// text where there is one, and the path when the table came from
/// [`Table::read`]. Display gives the kind's message only.
#[derive(Debug, thiserror::Error)]
#[error("{kind}")]
pub struct TableError {
    kind: TableErrorKind,
    line: Option<usize>,
    column: Option<usize>,
    path: Option<PathBuf>,
}

impl TableError {
    fn new(kind: TableErrorKind, line: Option<usize>, column: Option<usize>) -> Self {
        TableError {
            kind,
            line,
            column,
            path: None,
        }
    }

    /// What went wrong.
    pub fn kind(&self) -> &TableErrorKind {
        &self.kind
    }

    /// 1-based line in the CSV text, if the fault has one.
    pub fn line(&self) -> Option<usize> {
        self.line
    }

    /// 1-based field number in the line (the header's column number), if
    /// the fault is in one cell.
    pub fn column(&self) -> Option<usize> {
        self.column
    }

    /// The file read, when the table came from [`Table::read`].
    pub fn path(&self) -> Option<&Path> {
        self.path.as_deref()
    }
}

/// The interpolating curve.
#[derive(Debug, Clone, PartialEq)]
enum Curve {
    Linear { xs: Vec<f64>, ys: Vec<f64> },
    Cubic(NaturalCubicSpline),
}

/// A potential `V(x)` tabulated at strictly increasing `x`.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    curve: Curve,
    outside: Outside,
}

/// Parses one `x` or `V` cell.
fn number(cell: &str, line: usize, column: usize) -> Result<f64, TableError> {
    match cell.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        Ok(_) => Err(TableError::new(
            TableErrorKind::NonFinite {
                text: cell.to_string(),
            },
            Some(line),
            Some(column),
        )),
        Err(_) => Err(TableError::new(
            TableErrorKind::BadNumber {
                text: cell.to_string(),
            },
            Some(line),
            Some(column),
        )),
    }
}

impl Table {
    /// Parses CSV `text` (format in the module docs). Lines and fields in
    /// errors are 1-based.
    ///
    /// ```
    /// use chainwell::potential::table::{Interpolation, Outside, Table};
    /// let t = Table::parse("x,V\n0,0\n1,2\n2,0\n", Interpolation::Linear, Outside::Value(0.0)).unwrap();
    /// assert_eq!(t.eval(0.5), 1.0);
    /// assert_eq!(t.eval(5.0), 0.0); // outside the table
    /// ```
    pub fn parse(
        text: &str,
        interpolation: Interpolation,
        outside: Outside,
    ) -> Result<Table, TableError> {
        let text = text.strip_prefix('\u{feff}').unwrap_or(text);
        let mut rows = text
            .lines()
            .enumerate()
            .map(|(i, l)| (i + 1, l))
            .filter(|(_, l)| {
                let t = l.trim();
                !t.is_empty() && !t.starts_with('#')
            });
        let (header_line, header) = rows
            .next()
            .ok_or_else(|| TableError::new(TableErrorKind::NoHeader, None, None))?;
        let names: Vec<&str> = header.split(',').map(str::trim).collect();
        for (k, name) in names.iter().enumerate() {
            if (*name == "x" || *name == "V") && names[..k].contains(name) {
                return Err(TableError::new(
                    TableErrorKind::DuplicateColumn {
                        name: name.to_string(),
                    },
                    Some(header_line),
                    Some(k + 1),
                ));
            }
        }
        let find = |name: &str| {
            names.iter().position(|n| *n == name).ok_or_else(|| {
                TableError::new(
                    TableErrorKind::MissingColumn {
                        name: name.to_string(),
                    },
                    Some(header_line),
                    None,
                )
            })
        };
        let x_col = find("x")?;
        let v_col = find("V")?;
        let mut xs: Vec<f64> = Vec::new();
        let mut ys: Vec<f64> = Vec::new();
        for (line, row) in rows {
            let cells: Vec<&str> = row.split(',').map(str::trim).collect();
            if cells.len() != names.len() {
                return Err(TableError::new(
                    TableErrorKind::WrongFieldCount {
                        expected: names.len(),
                        found: cells.len(),
                    },
                    Some(line),
                    None,
                ));
            }
            let x = number(cells[x_col], line, x_col + 1)?;
            let v = number(cells[v_col], line, v_col + 1)?;
            if let Some(&previous) = xs.last() {
                let kind = if x == previous {
                    Some(TableErrorKind::Duplicate { x })
                } else if x < previous {
                    Some(TableErrorKind::Unsorted { previous, this: x })
                } else {
                    None
                };
                if let Some(kind) = kind {
                    return Err(TableError::new(kind, Some(line), Some(x_col + 1)));
                }
            }
            xs.push(x);
            ys.push(v);
        }
        let needed = interpolation.rows_needed();
        if xs.len() < needed {
            return Err(TableError::new(
                TableErrorKind::TooFewRows {
                    found: xs.len(),
                    needed,
                },
                None,
                None,
            ));
        }
        let curve = match interpolation {
            Interpolation::Linear => Curve::Linear { xs, ys },
            // The rows were checked above (finite, strictly increasing,
            // at least 3), so the spline does not refuse them; its error is
            // passed on rather than unwrapped all the same.
            Interpolation::Cubic => Curve::Cubic(
                NaturalCubicSpline::new(xs, ys)
                    .map_err(|e| TableError::new(TableErrorKind::Spline(e), None, None))?,
            ),
        };
        Ok(Table { curve, outside })
    }

    /// Reads and parses the CSV file at `path`. A missing file, any other
    /// read failure and text that is not UTF-8 are distinct errors naming
    /// the path; parse errors also carry the path ([`TableError::path`]).
    pub fn read(
        path: &Path,
        interpolation: Interpolation,
        outside: Outside,
    ) -> Result<Table, TableError> {
        let bytes = crate::files::read_capped(path).map_err(|e| {
            let kind = match e {
                crate::files::ReadError::NotFound => TableErrorKind::NotFound {
                    path: path.to_path_buf(),
                },
                crate::files::ReadError::Io(source) => TableErrorKind::Io {
                    path: path.to_path_buf(),
                    source,
                },
                other => TableErrorKind::Io {
                    path: path.to_path_buf(),
                    source: std::io::Error::other(other.to_string()),
                },
            };
            TableError::new(kind, None, None)
        })?;
        let text = std::str::from_utf8(&bytes).map_err(|e| {
            let good = &bytes[..e.valid_up_to()];
            let line = 1 + good.iter().filter(|&&b| b == b'\n').count();
            TableError::new(
                TableErrorKind::NotUtf8 {
                    path: path.to_path_buf(),
                },
                Some(line),
                None,
            )
        })?;
        Table::parse(text, interpolation, outside).map_err(|mut e| {
            e.path = Some(path.to_path_buf());
            e
        })
    }

    fn knots(&self) -> (&[f64], &[f64]) {
        match &self.curve {
            Curve::Linear { xs, ys } => (xs, ys),
            Curve::Cubic(s) => (s.knots(), s.values()),
        }
    }

    /// `V(x)` in eV: interpolated inside [`x_range`](Self::x_range) (ends
    /// included), set by [`Outside`] beyond it. NaN gives NaN.
    pub fn eval(&self, x: f64) -> f64 {
        let (xs, ys) = self.knots();
        let n = xs.len();
        if x.is_nan() {
            return f64::NAN;
        }
        if x < xs[0] || x > xs[n - 1] {
            return match self.outside {
                Outside::Value(v) => v,
                Outside::Hold if x < xs[0] => ys[0],
                Outside::Hold => ys[n - 1],
            };
        }
        match &self.curve {
            Curve::Cubic(s) => s.eval(x),
            Curve::Linear { xs, ys } => {
                let i = xs.partition_point(|&k| k <= x).saturating_sub(1).min(n - 2);
                let t = (x - xs[i]) / (xs[i + 1] - xs[i]);
                if t == 1.0 {
                    ys[i + 1]
                } else {
                    ys[i] + t * (ys[i + 1] - ys[i])
                }
            }
        }
    }

    /// Smallest and largest tabulated `x`, angstrom.
    pub fn x_range(&self) -> (f64, f64) {
        let (xs, _) = self.knots();
        (xs[0], xs[xs.len() - 1])
    }

    /// Number of data rows.
    pub fn len(&self) -> usize {
        self.knots().0.len()
    }

    /// Always false: a table has at least two rows (kept for the usual
    /// `len` / `is_empty` pair).
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The tabulated `x` values (angstrom) and `V` values (eV).
    pub fn rows(&self) -> (&[f64], &[f64]) {
        self.knots()
    }

    /// How values between rows are found.
    pub fn interpolation(&self) -> Interpolation {
        match self.curve {
            Curve::Linear { .. } => Interpolation::Linear,
            Curve::Cubic(_) => Interpolation::Cubic,
        }
    }

    /// The potential outside the table's `x` range.
    pub fn outside(&self) -> Outside {
        self.outside
    }

    /// The spline through the rows, for [`Interpolation::Cubic`].
    pub fn spline(&self) -> Option<&NaturalCubicSpline> {
        match &self.curve {
            Curve::Cubic(s) => Some(s),
            Curve::Linear { .. } => None,
        }
    }

    /// `V` just outside the first and the last row, eV.
    pub fn outside_values(&self) -> (f64, f64) {
        let (_, ys) = self.knots();
        match self.outside {
            Outside::Value(v) => (v, v),
            Outside::Hold => (ys[0], ys[ys.len() - 1]),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    fn table(text: &str, interpolation: Interpolation, outside: Outside) -> Table {
        match Table::parse(text, interpolation, outside) {
            Ok(t) => t,
            Err(e) => panic!("table failed at line {:?}: {e}", e.line()),
        }
    }

    fn parse_err(text: &str, interpolation: Interpolation) -> TableError {
        match Table::parse(text, interpolation, Outside::default()) {
            Ok(_) => panic!("table parsed but should fail:\n{text}"),
            Err(e) => e,
        }
    }

    /// A file in the temp folder, removed when dropped.
    struct TempFile(PathBuf);

    impl TempFile {
        fn new(tag: &str, bytes: &[u8]) -> Self {
            let path = std::env::temp_dir()
                .join(format!("potprims-table-{}-{tag}.csv", std::process::id()));
            std::fs::write(&path, bytes).expect("temp dir is writable");
            TempFile(path)
        }
    }

    impl Drop for TempFile {
        fn drop(&mut self) {
            let _ = std::fs::remove_file(&self.0);
        }
    }

    const PEAK: &str = "# a peak\nx,V\n0,0\n1,1\n2,0\n";

    #[test]
    fn linear_values() {
        let t = table(PEAK, Interpolation::Linear, Outside::default());
        // straight lines between the rows (by hand)
        assert_eq!(t.eval(0.0), 0.0);
        assert_eq!(t.eval(0.5), 0.5);
        assert_eq!(t.eval(1.0), 1.0);
        assert_eq!(t.eval(1.75), 0.25);
        assert_eq!(t.eval(2.0), 0.0);
        assert_eq!(t.len(), 3);
        assert!(!t.is_empty());
        assert_eq!(t.x_range(), (0.0, 2.0));
    }

    #[test]
    fn cubic_values() {
        // Natural spline through (0,0), (1,1), (2,0) is 1.5 x - 0.5 x^3 on
        // [0, 1] (closed form, see spline.rs), symmetric about x = 1.
        let t = table(PEAK, Interpolation::Cubic, Outside::default());
        assert_abs_diff_eq!(t.eval(0.5), 0.6875, epsilon = 1e-14);
        assert_abs_diff_eq!(t.eval(1.5), 0.6875, epsilon = 1e-14);
        assert_abs_diff_eq!(
            t.eval(0.25),
            1.5 * 0.25 - 0.5 * 0.25f64.powi(3),
            epsilon = 1e-14
        );
        assert_eq!(t.eval(2.0), 0.0);
    }

    #[test]
    fn outside_value_and_hold() {
        let text = "x,V\n-1,4\n0,2\n3,7\n";
        let t = table(text, Interpolation::Linear, Outside::default());
        assert_eq!(t.eval(-1.5), 0.0);
        assert_eq!(t.eval(3.5), 0.0);
        let t = table(text, Interpolation::Linear, Outside::Value(9.5));
        assert_eq!(t.eval(-100.0), 9.5);
        assert_eq!(t.eval(3.0001), 9.5);
        assert_eq!(t.eval(3.0), 7.0);
        let t = table(text, Interpolation::Cubic, Outside::Hold);
        assert_eq!(t.eval(-1.5), 4.0);
        assert_eq!(t.eval(1e9), 7.0);
        assert_eq!(t.eval(-1.0), 4.0);
        assert!(t.eval(f64::NAN).is_nan());
    }

    #[test]
    fn format_details() {
        // Extra columns anywhere, padding, CRLF, byte order mark, comments
        // and blank lines between rows.
        let text = "\u{feff}id , V ,x\r\n  # note\r\n\r\n a, 1.5 , -2\r\nb,2.5e0,  0\r\n\n";
        let t = table(text, Interpolation::Linear, Outside::Hold);
        assert_eq!(t.rows(), (&[-2.0, 0.0][..], &[1.5, 2.5][..]));
        assert_eq!(t.eval(-1.0), 2.0);
    }

    #[test]
    fn linear_midpoint_error_of_a_quadratic() {
        // Linear interpolation error at a midpoint is h^2/4 * |f''|/2
        // (Burden and Faires, sec. 3.1), here f = 3 x^2, f'' = 6, h = 0.25:
        // 0.0625 / 4 * 3 = 0.046875, interpolant above the parabola.
        let h = 0.25;
        let mut text = String::from("x,V\n");
        for k in 0..=40 {
            let x = k as f64 * h;
            text.push_str(&format!("{x},{}\n", 3.0 * x * x));
        }
        let t = table(&text, Interpolation::Linear, Outside::default());
        for k in 0..40 {
            let x = (k as f64 + 0.5) * h;
            assert_abs_diff_eq!(t.eval(x) - 3.0 * x * x, 0.046875, epsilon = 1e-12);
        }
        // The cubic spline does far better away from the ends.
        let c = table(&text, Interpolation::Cubic, Outside::default());
        assert!((c.eval(5.125) - 3.0 * 5.125 * 5.125).abs() < 1e-4);
    }

    #[test]
    fn error_lines_and_columns() {
        use TableErrorKind as K;
        let lin = Interpolation::Linear;

        let e = parse_err("# only a comment\n\n   \n", lin);
        assert!(matches!(e.kind(), K::NoHeader));
        assert_eq!(e.line(), None);

        let e = parse_err("# c\n\nx, v\n0, 1\n1, 2\n", lin);
        assert!(matches!(e.kind(), K::MissingColumn { name } if name == "V"));
        assert_eq!(e.line(), Some(3));

        let e = parse_err("position,V\n0,1\n", lin);
        assert!(matches!(e.kind(), K::MissingColumn { name } if name == "x"));
        assert_eq!(e.line(), Some(1));

        let e = parse_err("x,V,x\n0,1,0\n", lin);
        assert!(matches!(e.kind(), K::DuplicateColumn { name } if name == "x"));
        assert_eq!((e.line(), e.column()), (Some(1), Some(3)));

        let e = parse_err("x,V\n0,1\n# gap\n1, 2.0.1\n", lin);
        assert!(matches!(e.kind(), K::BadNumber { text } if text == "2.0.1"));
        assert_eq!((e.line(), e.column()), (Some(4), Some(2)));

        let e = parse_err("x,V\n0,1\n1,\n", lin);
        assert!(matches!(e.kind(), K::BadNumber { text } if text.is_empty()));
        assert_eq!((e.line(), e.column()), (Some(3), Some(2)));

        let e = parse_err("V,x\n1,0\nNaN,1\n", lin);
        assert!(matches!(e.kind(), K::NonFinite { text } if text == "NaN"));
        assert_eq!((e.line(), e.column()), (Some(3), Some(1)));

        let e = parse_err("x,V\n0,1\n1,2,3\n", lin);
        assert!(matches!(
            e.kind(),
            K::WrongFieldCount {
                expected: 2,
                found: 3
            }
        ));
        assert_eq!(e.line(), Some(3));

        let e = parse_err("x,V\n0,1\n2,1\n\n1,1\n", lin);
        assert!(matches!(
            e.kind(),
            K::Unsorted { previous, this } if *previous == 2.0 && *this == 1.0
        ));
        assert_eq!((e.line(), e.column()), (Some(5), Some(1)));

        let e = parse_err("x,V\n0,1\n1,1\n1.0,2\n", lin);
        assert!(matches!(e.kind(), K::Duplicate { x } if *x == 1.0));
        assert_eq!(e.line(), Some(4));

        let e = parse_err("x,V\n0,1\n", lin);
        assert!(matches!(
            e.kind(),
            K::TooFewRows {
                found: 1,
                needed: 2
            }
        ));
        assert_eq!(e.line(), None);

        let e = parse_err("x,V\n0,1\n1,1\n", Interpolation::Cubic);
        assert!(matches!(
            e.kind(),
            K::TooFewRows {
                found: 2,
                needed: 3
            }
        ));
        assert_eq!(
            e.to_string(),
            "potential table has 2 data rows but needs at least 3"
        );
    }

    #[test]
    fn read_from_files() {
        let good = TempFile::new("good", PEAK.as_bytes());
        let t = Table::read(&good.0, Interpolation::Linear, Outside::default()).unwrap();
        assert_eq!(t.eval(0.5), 0.5);

        let missing = std::env::temp_dir().join("potprims-table-no-such-file.csv");
        let e = Table::read(&missing, Interpolation::Linear, Outside::default()).unwrap_err();
        assert!(matches!(e.kind(), TableErrorKind::NotFound { path } if *path == missing));
        assert!(e.to_string().contains("potprims-table-no-such-file.csv"));

        let dir = std::env::temp_dir();
        let e = Table::read(&dir, Interpolation::Linear, Outside::default()).unwrap_err();
        assert!(matches!(e.kind(), TableErrorKind::Io { .. }), "{e:?}");

        let latin1 = TempFile::new("latin1", b"x,V\n0,1\n# caf\xe9\n1,2\n");
        let e = Table::read(&latin1.0, Interpolation::Linear, Outside::default()).unwrap_err();
        assert!(matches!(e.kind(), TableErrorKind::NotUtf8 { path } if *path == latin1.0));
        assert_eq!(e.line(), Some(3));

        // Parse errors from a file carry its path as well as the line.
        let bad = TempFile::new("bad", b"x,V\n0,1\n1,one\n");
        let e = Table::read(&bad.0, Interpolation::Linear, Outside::default()).unwrap_err();
        assert_eq!(e.path(), Some(bad.0.as_path()));
        assert_eq!((e.line(), e.column()), (Some(3), Some(2)));
    }
}
