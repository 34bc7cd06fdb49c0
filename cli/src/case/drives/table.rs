//! The `table` drive: a time series of in-well head or pumping rate, from a CSV file
//! next to the case or from inline `points`.
//!
//! CSV layout: two comma-separated columns, time in s and value in SI (head in m, or
//! pumping rate in m³/s, positive = withdrawal); an optional header row; blank lines and
//! lines starting with `#` are skipped. A time written twice makes a jump. The resolved
//! case carries the points themselves, so it reproduces the run without the file.

use super::{into_map, read_keys, DriveContext, ParsedDrive};
use crate::case::error::CaseError;
use boreflux_solver::drive::{TableDrive, TableQuantity};
use boreflux_solver::Drive;
use schemars::JsonSchema;
use serde::Deserialize;
use serde_json::{json, Map, Value};

/// Largest table file read, bytes: 200 MB holds about five million rows.
pub const MAX_TABLE_BYTES: u64 = 200_000_000;

/// What the table gives.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum TableQuantityName {
    /// In-well head, m.
    Head,
    /// Pumping rate, m³/s, positive = withdrawal.
    PumpingRate,
}

/// Keys of `table`: exactly one of `file` and `points`.
#[derive(Debug, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct TableKeys {
    /// CSV file relative to the case file: columns time (s), value (SI); header optional.
    pub file: Option<String>,
    /// Inline points [[time_s, value], …] in SI, instead of `file`.
    pub points: Option<Vec<[f64; 2]>>,
    /// What the values are.
    pub quantity: TableQuantityName,
    /// Repeat the table with a period equal to its last time [false].
    pub repeat: Option<bool>,
}

/// Parser of the `table` drive (registered in [`super::DRIVE_KINDS`]).
pub fn table(map: Map<String, Value>, ctx: &DriveContext<'_>) -> Result<ParsedDrive, CaseError> {
    let k: TableKeys = read_keys(map)?;
    let (field, rows, source) = match (&k.file, &k.points) {
        (Some(file), None) => {
            let path = ctx.base_dir.join(file);
            let text = crate::case::read_limited(&path, MAX_TABLE_BYTES, "table file")
                .map_err(|e| CaseError::new("drive.file", e.to_string()))?;
            let rows = read_csv(&text)
                .map_err(|m| CaseError::new("drive.file", format!("{file}: {m}")))?;
            ("drive.file", rows, format!("file {file}"))
        }
        (None, Some(points)) => {
            let rows = points
                .iter()
                .enumerate()
                .map(|(i, p)| (i + 1, p[0], p[1]))
                .collect();
            ("drive.points", rows, "inline points".to_owned())
        }
        (Some(_), Some(_)) => {
            return Err(CaseError::new(
                "drive.points",
                "give either file or points, not both",
            ))
        }
        (None, None) => {
            return Err(CaseError::new(
                "drive.file",
                "required key is missing (or give `points`)",
            ))
        }
    };
    check_rows(&rows).map_err(|e| CaseError::new(field, e.to_string()))?;
    let span = rows.last().map_or(0.0, |r| r.1);
    boreflux_solver::limits::DURATION
        .check(field, span)
        .map_err(|e| {
            CaseError::new(
                field,
                format!("the table's time span {}", CaseError::from(e).message),
            )
        })?;
    let repeat = k.repeat.unwrap_or(false);
    let quantity = match k.quantity {
        TableQuantityName::Head => TableQuantity::Head,
        TableQuantityName::PumpingRate => TableQuantity::PumpingRate,
    };
    let (times_s, values): (Vec<f64>, Vec<f64>) = rows.iter().map(|&(_, t, v)| (t, v)).unzip();
    let last = times_s.last().copied().unwrap_or(0.0);
    let points: Vec<Value> = rows.iter().map(|&(_, t, v)| json!([t, v])).collect();
    let what = match quantity {
        TableQuantity::Head => "head (m)",
        TableQuantity::PumpingRate => "pumping rate (m3/s)",
    };
    let note = format!(
        "drive: table of {what} from {source}, {} rows over {last} s{}",
        rows.len(),
        if repeat {
            format!(", repeated with period {last} s")
        } else {
            String::new()
        }
    );
    Ok(ParsedDrive {
        drive: Drive::Table(TableDrive {
            times_s,
            values,
            quantity,
            repeat,
        }),
        resolved: into_map(json!({
            "points": points,
            "quantity": match quantity {
                TableQuantity::Head => "head",
                TableQuantity::PumpingRate => "pumping_rate",
            },
            "repeat": repeat,
        })),
        notes: vec![note],
    })
}

/// What is wrong with a table's rows; each names the line (from 1) where it can.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum RowsError {
    /// A line without exactly two columns.
    #[error("line {line}: expected two columns (time_s,value), got {columns}")]
    Columns {
        /// Line number.
        line: usize,
        /// Columns found.
        columns: usize,
    },
    /// A value that is not finite.
    #[error("line {line}: expected finite numbers, got {value}")]
    NotFinite {
        /// Line number.
        line: usize,
        /// The value.
        value: f64,
    },
    /// A column that is not a number (after the optional header).
    #[error("line {line}: expected two numbers (time_s,value); column {column} is not a number")]
    NotANumber {
        /// Line number.
        line: usize,
        /// Column, from 1.
        column: usize,
    },
    /// Fewer than two rows.
    #[error("needs at least two rows of time and value, got {0}")]
    TooFew(usize),
    /// The first time is not 0.
    #[error("row at line {line}: the first time must be 0 s, got {time} s")]
    FirstTime {
        /// Line number.
        line: usize,
        /// The first time, s.
        time: f64,
    },
    /// A time smaller than the one before.
    #[error("row at line {line}: times must not decrease, got {time} s after {previous} s")]
    Decreasing {
        /// Line number.
        line: usize,
        /// The time, s.
        time: f64,
        /// The time before, s.
        previous: f64,
    },
    /// A time written three times.
    #[error("row at line {line}: time {time} s appears three times (a jump needs two)")]
    ThreeTimes {
        /// Line number.
        line: usize,
        /// The time, s.
        time: f64,
    },
    /// The last time is not positive.
    #[error("the table must span a positive time, got {0} s")]
    NoSpan(f64),
}

/// Rows `(line, time, value)` of a CSV table. Errors name the line.
pub fn read_csv(text: &str) -> Result<Vec<(usize, f64, f64)>, RowsError> {
    let mut rows = Vec::new();
    let mut header_allowed = true;
    for (i, line) in text.lines().enumerate() {
        let n = i + 1;
        let line = line.trim().trim_start_matches('\u{feff}');
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        let cols: Vec<&str> = line.split(',').map(str::trim).collect();
        if cols.len() != 2 {
            return Err(RowsError::Columns {
                line: n,
                columns: cols.len(),
            });
        }
        let parsed: Result<Vec<f64>, _> = cols.iter().map(|c| c.parse::<f64>()).collect();
        match parsed {
            Ok(v) => {
                if let Some(bad) = v.iter().find(|x| !x.is_finite()) {
                    return Err(RowsError::NotFinite {
                        line: n,
                        value: *bad,
                    });
                }
                rows.push((n, v[0], v[1]));
            }
            Err(_) if header_allowed => {}
            Err(_) => {
                // The line itself is not quoted: the file may not be a table at all.
                let col = cols
                    .iter()
                    .position(|c| c.parse::<f64>().is_err())
                    .unwrap_or(0);
                return Err(RowsError::NotANumber {
                    line: n,
                    column: col + 1,
                });
            }
        }
        header_allowed = false;
    }
    Ok(rows)
}

/// Checks the shape of a time series: at least two rows, starting at 0 s, times
/// non-decreasing, a time repeated at most once (a jump), spanning a positive time.
pub fn check_rows(rows: &[(usize, f64, f64)]) -> Result<(), RowsError> {
    if rows.len() < 2 {
        return Err(RowsError::TooFew(rows.len()));
    }
    if rows[0].1 != 0.0 {
        return Err(RowsError::FirstTime {
            line: rows[0].0,
            time: rows[0].1,
        });
    }
    for (i, w) in rows.windows(2).enumerate() {
        let ((_, t0, _), (n1, t1, _)) = (w[0], w[1]);
        if t1 < t0 {
            return Err(RowsError::Decreasing {
                line: n1,
                time: t1,
                previous: t0,
            });
        }
        if t1 == t0 && i > 0 && rows[i - 1].1 == t0 {
            return Err(RowsError::ThreeTimes { line: n1, time: t1 });
        }
    }
    let last = rows[rows.len() - 1].1;
    if last <= 0.0 {
        return Err(RowsError::NoSpan(last));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn read_csv_works() {
        let rows = read_csv("time_s,rate\n# comment\n0,0.05\n\n180, 0.05\n180,0\n").unwrap();
        assert_eq!(
            rows,
            vec![(3, 0.0, 0.05), (5, 180.0, 0.05), (6, 180.0, 0.0)]
        );
        // No header.
        assert_eq!(read_csv("0,1\n1,2").unwrap().len(), 2);
    }

    #[test]
    fn read_csv_captures_errors() {
        assert_eq!(
            read_csv("t,v\n0,1\nx,2\n").unwrap_err().to_string(),
            "line 3: expected two numbers (time_s,value); column 1 is not a number"
        );
        assert_eq!(
            read_csv("0,1\n1,NaN\n").unwrap_err().to_string(),
            "line 2: expected finite numbers, got NaN"
        );
        assert!(read_csv("0,1,2\n")
            .unwrap_err()
            .to_string()
            .contains("two columns"));
    }

    #[test]
    fn check_rows_captures_errors() {
        assert!(check_rows(&[(1, 0.0, 1.0)])
            .unwrap_err()
            .to_string()
            .contains("two rows"));
        assert!(check_rows(&[(1, 1.0, 1.0), (2, 2.0, 1.0)])
            .unwrap_err()
            .to_string()
            .contains("first time must be 0 s, got 1 s"));
        assert!(check_rows(&[(1, 0.0, 1.0), (2, 5.0, 1.0), (3, 4.0, 1.0)])
            .unwrap_err()
            .to_string()
            .contains("got 4 s after 5 s"));
        assert!(
            check_rows(&[(1, 0.0, 1.0), (2, 5.0, 1.0), (3, 5.0, 1.0), (4, 5.0, 2.0)])
                .unwrap_err()
                .to_string()
                .contains("three times")
        );
        assert!(check_rows(&[(1, 0.0, 1.0), (2, 0.0, 1.0)])
            .unwrap_err()
            .to_string()
            .contains("positive time"));
        assert!(check_rows(&[(1, 0.0, 1.0), (2, 3.0, 1.0), (3, 3.0, 0.0)]).is_ok());
    }
}
