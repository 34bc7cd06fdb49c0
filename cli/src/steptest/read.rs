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

fn parse_header_cell(cell: &str) -> Result<Column, String> {
    let (name, unit) = match cell.split_once('_') {
        Some((n, u)) => (n, Some(u)),
        None => (cell, None),
    };
    let Some(kind) = COLUMNS.iter().position(|(n, _)| *n == name) else {
        return Err(format!(
            "unknown column \"{cell}\"; expected time_<unit>, rate_<unit> and drawdown_<unit>, \
             e.g. time_min,rate_L/s,drawdown_m (or rate_L/s,drawdown_m, one row per step)"
        ));
    };
    let q = COLUMNS[kind].1;
    let factor = match unit {
        None => 1.0,
        Some(u) => parse_quantity(&Value::String(format!("1 {u}")), q)
            .map_err(|e| format!("column \"{cell}\": {e}"))?,
    };
    Ok(Column {
        kind,
        header: cell.to_owned(),
        factor,
    })
}

/// Parses the text of a step-test file. Errors are one line of text naming the line and
/// column.
pub fn parse(text: &str) -> Result<StepData, String> {
    let mut rows = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim()))
        .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'));
    let Some((header_line, header)) = rows.next() else {
        return Err("no header line: the file is empty or only comments".to_owned());
    };
    let cols = header
        .split(',')
        .map(|c| parse_header_cell(c.trim()).map_err(|e| format!("line {header_line}: {e}")))
        .collect::<Result<Vec<Column>, String>>()?;
    let mut index = [None; 3];
    for (i, c) in cols.iter().enumerate() {
        if let Some(j) = index[c.kind] {
            let first: &Column = &cols[j];
            return Err(format!(
                "line {header_line}: columns \"{}\" and \"{}\" are both {}",
                first.header, c.header, COLUMNS[c.kind].0
            ));
        }
        index[c.kind] = Some(i);
    }
    let missing: Vec<&str> = [1, 2]
        .iter()
        .filter(|&&k| index[k].is_none())
        .map(|&k| COLUMNS[k].0)
        .collect();
    if !missing.is_empty() {
        return Err(format!(
            "line {header_line}: no {} column; the header needs rate_<unit> and \
             drawdown_<unit>, and time_<unit> for a time series",
            missing.join(" or ")
        ));
    }
    let mut values: Vec<[f64; 3]> = Vec::new();
    let mut lines = Vec::new();
    for (line, row) in rows {
        let cells: Vec<&str> = row.split(',').map(str::trim).collect();
        if cells.len() != cols.len() {
            return Err(format!(
                "line {line}: {} field(s), the header has {}",
                cells.len(),
                cols.len()
            ));
        }
        let mut v = [f64::NAN; 3];
        for (cell, col) in cells.iter().zip(&cols) {
            let x: f64 = cell.parse().map_err(|_| {
                format!(
                    "line {line}, column \"{}\": \"{cell}\" is not a number",
                    col.header
                )
            })?;
            if !x.is_finite() {
                return Err(format!(
                    "line {line}, column \"{}\": \"{cell}\" is not a finite number",
                    col.header
                ));
            }
            v[col.kind] = x * col.factor;
        }
        values.push(v);
        lines.push(line);
    }
    if values.is_empty() {
        return Err(format!(
            "no data rows after the header on line {header_line}"
        ));
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
        let e = parse("rate_L/s,drawdown_m\n5,abc\n").unwrap_err();
        assert!(
            e.contains("line 2") && e.contains("drawdown_m") && e.contains("abc"),
            "{e}"
        );
        let e = parse("rate_L/s,level_m\n5,1\n").unwrap_err();
        assert!(e.contains("line 1") && e.contains("level_m"), "{e}");
        let e = parse("rate_furlongs,drawdown_m\n5,1\n").unwrap_err();
        assert!(e.contains("rate_furlongs") && e.contains("L/s"), "{e}");
        let e = parse("rate_L/s,drawdown_m\n5\n").unwrap_err();
        assert!(e.contains("line 2"), "{e}");
        let e = parse("rate_L/s,rate_m3/s,drawdown_m\n5,1,1\n").unwrap_err();
        assert!(e.contains("both rate"), "{e}");
        let e = parse("time_s,drawdown_m\n5,1\n").unwrap_err();
        assert!(e.contains("no rate column"), "{e}");
        assert!(parse("# only\n\n").is_err());
        assert!(parse("rate_L/s,drawdown_m\n")
            .unwrap_err()
            .contains("no data rows"));
    }
}
