//! Reads a step-test CSV file.
//!
//! The first line that is neither blank nor a `#` comment is the header. Each column is
//! named `time`, `rate` or `drawdown`, followed by `_` and a unit (`time_min`, `rate_L/s`,
//! `drawdown_ft`); a bare name is in SI (s, m³/s, m). Units are those of the case file
//! (`crate::units`: time s, min, h, d; rate m3/s, L/s, m3/h, gpm, …; drawdown m, cm, mm,
//! in, ft). Two layouts:
//!
//! ```text
//! rate_L/s,drawdown_m              one row per step (drawdown at the end of the step)
//! time_min,rate_L/s,drawdown_m     the readings of the whole test, time from the start of pumping
//! ```
//!
//! Fields are separated by commas and trimmed; quoting is not supported. Errors name the
//! line (counted from 1, comments included) and the column.

use crate::units::{parse_quantity, Quantity};
use boreflux_solver::steptest::{Sample, Step};
use serde_json::Value;

/// What is wrong with a step-test file; its text names the line (and column).
#[derive(Debug, Clone, PartialEq)]
pub enum StepFileError {
    /// No header line: the file is empty or only comments.
    NoHeader,
    /// A header cell that is not `time`, `rate` or `drawdown` (with a unit).
    UnknownColumn {
        /// Header line.
        line: usize,
        /// The cell.
        cell: String,
    },
    /// A header cell whose unit is not understood.
    BadUnit {
        /// Header line.
        line: usize,
        /// The cell.
        cell: String,
        /// Why the unit was refused.
        reason: String,
    },
    /// Two columns of the same kind.
    DuplicateColumn {
        /// Header line.
        line: usize,
        /// The first column's header.
        first: String,
        /// The second column's header.
        second: String,
        /// The kind (`time`, `rate`, `drawdown`).
        kind: &'static str,
    },
    /// The rate or drawdown column is missing.
    MissingColumns {
        /// Header line.
        line: usize,
        /// The kinds missing.
        kinds: Vec<&'static str>,
    },
    /// A row with a different number of fields than the header.
    FieldCount {
        /// Row line.
        line: usize,
        /// Fields in the row.
        got: usize,
        /// Fields in the header.
        want: usize,
    },
    /// A field that is not a number, or not a finite one.
    NotANumber {
        /// Row line.
        line: usize,
        /// The column's header.
        column: String,
        /// The field.
        cell: String,
        /// Whether it parsed but is infinite or NaN.
        parsed: bool,
    },
    /// No data rows after the header.
    NoData {
        /// Header line.
        line: usize,
    },
}

impl std::fmt::Display for StepFileError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            StepFileError::NoHeader => {
                write!(f, "no header line: the file is empty or only comments")
            }
            StepFileError::UnknownColumn { line, cell } => write!(
                f,
                "line {line}: unknown column \"{cell}\"; expected time_<unit>, rate_<unit> and \
                 drawdown_<unit>, e.g. time_min,rate_L/s,drawdown_m (or rate_L/s,drawdown_m, one \
                 row per step)"
            ),
            StepFileError::BadUnit { line, cell, reason } => {
                write!(f, "line {line}: column \"{cell}\": {reason}")
            }
            StepFileError::DuplicateColumn {
                line,
                first,
                second,
                kind,
            } => write!(
                f,
                "line {line}: columns \"{first}\" and \"{second}\" are both {kind}"
            ),
            StepFileError::MissingColumns { line, kinds } => write!(
                f,
                "line {line}: no {} column; the header needs rate_<unit> and drawdown_<unit>, \
                 and time_<unit> for a time series",
                kinds.join(" or ")
            ),
            StepFileError::FieldCount { line, got, want } => {
                write!(f, "line {line}: {got} field(s), the header has {want}")
            }
            StepFileError::NotANumber {
                line,
                column,
                cell,
                parsed,
            } => write!(
                f,
                "line {line}, column \"{column}\": \"{cell}\" is not a{} number",
                if *parsed { " finite" } else { "" }
            ),
            StepFileError::NoData { line } => {
                write!(f, "no data rows after the header on line {line}")
            }
        }
    }
}

impl std::error::Error for StepFileError {}

/// The data of a step-test file, in SI.
#[derive(Debug, Clone, PartialEq)]
pub enum StepData {
    /// One row per step.
    Steps {
        /// The steps.
        steps: Vec<Step>,
        /// File line of each step.
        lines: Vec<usize>,
    },
    /// A time series.
    Series {
        /// The readings.
        samples: Vec<Sample>,
        /// File line of each reading.
        lines: Vec<usize>,
    },
}

impl StepData {
    /// File line of data row `k` (from 1), for messages.
    pub fn line_of(&self, k: usize) -> Option<usize> {
        let lines = match self {
            StepData::Steps { lines, .. } | StepData::Series { lines, .. } => lines,
        };
        k.checked_sub(1).and_then(|i| lines.get(i)).copied()
    }
}

/// The three column kinds and the quantity each carries.
const COLUMNS: [(&str, Quantity); 3] = [
    ("time", Quantity::Time),
    ("rate", Quantity::FlowRate),
    ("drawdown", Quantity::Length),
];

/// One header column: which kind, and its factor to SI.
struct Column {
    kind: usize,
    header: String,
    factor: f64,
}

fn parse_header_cell(line: usize, cell: &str) -> Result<Column, StepFileError> {
    let (name, unit) = match cell.split_once('_') {
        Some((n, u)) => (n, Some(u)),
        None => (cell, None),
    };
    let Some(kind) = COLUMNS.iter().position(|(n, _)| *n == name) else {
        return Err(StepFileError::UnknownColumn {
            line,
            cell: cell.to_owned(),
        });
    };
    let q = COLUMNS[kind].1;
    let factor = match unit {
        None => 1.0,
        Some(u) => parse_quantity(&Value::String(format!("1 {u}")), q).map_err(|e| {
            StepFileError::BadUnit {
                line,
                cell: cell.to_owned(),
                reason: e.to_string(),
            }
        })?,
    };
    Ok(Column {
        kind,
        header: cell.to_owned(),
        factor,
    })
}

/// Parses the text of a step-test file. Errors are one line of text naming the line and
/// column.
pub fn parse(text: &str) -> Result<StepData, StepFileError> {
    let mut rows = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim()))
        .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'));
    let Some((header_line, header)) = rows.next() else {
        return Err(StepFileError::NoHeader);
    };
    let cols = header
        .split(',')
        .map(|c| parse_header_cell(header_line, c.trim()))
        .collect::<Result<Vec<Column>, StepFileError>>()?;
    let mut index = [None; 3];
    for (i, c) in cols.iter().enumerate() {
        if let Some(j) = index[c.kind] {
            let first: &Column = &cols[j];
            return Err(StepFileError::DuplicateColumn {
                line: header_line,
                first: first.header.clone(),
                second: c.header.clone(),
                kind: COLUMNS[c.kind].0,
            });
        }
        index[c.kind] = Some(i);
    }
    let missing: Vec<&str> = [1, 2]
        .iter()
        .filter(|&&k| index[k].is_none())
        .map(|&k| COLUMNS[k].0)
        .collect();
    if !missing.is_empty() {
        return Err(StepFileError::MissingColumns {
            line: header_line,
            kinds: missing,
        });
    }
    let mut values: Vec<[f64; 3]> = Vec::new();
    let mut lines = Vec::new();
    for (line, row) in rows {
        let cells: Vec<&str> = row.split(',').map(str::trim).collect();
        if cells.len() != cols.len() {
            return Err(StepFileError::FieldCount {
                line,
                got: cells.len(),
                want: cols.len(),
            });
        }
        let mut v = [f64::NAN; 3];
        for (cell, col) in cells.iter().zip(&cols) {
            let bad = |parsed: bool| StepFileError::NotANumber {
                line,
                column: col.header.clone(),
                cell: (*cell).to_owned(),
                parsed,
            };
            let x: f64 = cell.parse().map_err(|_| bad(false))?;
            if !x.is_finite() {
                return Err(bad(true));
            }
            v[col.kind] = x * col.factor;
        }
        values.push(v);
        lines.push(line);
    }
    if values.is_empty() {
        return Err(StepFileError::NoData { line: header_line });
    }
    Ok(if index[0].is_some() {
        StepData::Series {
            samples: values
                .iter()
                .map(|v| Sample {
                    time_s: v[0],
                    rate_m3_s: v[1],
                    drawdown_m: v[2],
                })
                .collect(),
            lines,
        }
    } else {
        StepData::Steps {
            steps: values
                .iter()
                .map(|v| Step {
                    rate_m3_s: v[1],
                    drawdown_m: v[2],
                })
                .collect(),
            lines,
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_steps_and_series_with_units() {
        let d = parse("# demo\nrate_L/s, drawdown_cm\n5,55\n10,120\n").unwrap();
        let StepData::Steps { steps, lines } = d else {
            panic!()
        };
        // 1 L/s = 1e-3 m³/s and 1 cm = 1e-2 m (exact by definition).
        assert_eq!(
            steps[1],
            Step {
                rate_m3_s: 0.01,
                drawdown_m: 1.2
            }
        );
        assert_eq!(lines, vec![3, 4]);
        let d = parse("drawdown_m,time_min,rate\n1.5,2,0.01\n").unwrap();
        let StepData::Series { samples, .. } = d else {
            panic!()
        };
        assert_eq!(
            samples[0],
            Sample {
                time_s: 120.0,
                rate_m3_s: 0.01,
                drawdown_m: 1.5
            }
        );
    }

    #[test]
    fn errors_name_line_and_column() {
        let e = parse("rate_L/s,drawdown_m\n5,abc\n")
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("line 2") && e.contains("drawdown_m") && e.contains("abc"),
            "{e}"
        );
        let e = parse("rate_L/s,level_m\n5,1\n").unwrap_err().to_string();
        assert!(e.contains("line 1") && e.contains("level_m"), "{e}");
        let e = parse("rate_furlongs,drawdown_m\n5,1\n")
            .unwrap_err()
            .to_string();
        assert!(e.contains("rate_furlongs") && e.contains("L/s"), "{e}");
        let e = parse("rate_L/s,drawdown_m\n5\n").unwrap_err().to_string();
        assert!(e.contains("line 2"), "{e}");
        let e = parse("rate_L/s,rate_m3/s,drawdown_m\n5,1,1\n")
            .unwrap_err()
            .to_string();
        assert!(e.contains("both rate"), "{e}");
        let e = parse("time_s,drawdown_m\n5,1\n").unwrap_err().to_string();
        assert!(e.contains("no rate column"), "{e}");
        assert_eq!(parse("# only\n\n"), Err(StepFileError::NoHeader));
        assert!(parse("rate_L/s,drawdown_m\n")
            .unwrap_err()
            .to_string()
            .contains("no data rows"));
    }
}
