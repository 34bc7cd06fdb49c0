//! CSV writer for series and sweep tables: a header of `name [unit]` columns, then one
//! row of numbers per line.
//!
//! ```text
//! time [s],well_head [m],porosity
//! 0,0,0.32
//! 0.5,1.25,0.32
//! ```
//!
//! Records are written by the `csv` crate (RFC 4180 quoting where a field needs it, `\n`
//! line ends). Numbers are written in Rust's shortest form that reads back to the same
//! `f64`, in scientific notation below 1e-4 or from 1e15 in magnitude. The one NaN
//! convention of every CSV boreflux writes (run series and sweep tables): **NaN is an empty
//! field**; infinities are `inf` and `-inf`. Like the HDF5 writer, the file appears at its
//! path only on [`CsvWriter::finish`]; a writer dropped before that deletes its temporary
//! file.

use std::fmt::Write as _;
use std::fs::File;
use std::io::BufWriter;
use std::path::{Path, PathBuf};

use super::{OutputError, TempTarget};

/// A CSV file being written; see the module docs.
pub struct CsvWriter {
    out: Option<csv::Writer<BufWriter<File>>>,
    target: TempTarget,
    ncols: usize,
    /// One field's text, reused so that a row allocates nothing.
    field: String,
}

/// One column: its name and unit (empty for a pure number or a label).
#[derive(Debug, Clone, Copy)]
pub struct Column<'a> {
    /// Column name, e.g. `well_head`.
    pub name: &'a str,
    /// Unit shown in brackets after the name, e.g. `m`; no brackets when empty.
    pub unit: &'a str,
}

impl CsvWriter {
    /// Starts a CSV file that will be renamed to `final_path` by [`finish`](Self::finish),
    /// and writes its header line.
    pub fn create(
        final_path: impl AsRef<Path>,
        columns: &[Column<'_>],
    ) -> Result<Self, OutputError> {
        let target = TempTarget::new(final_path.as_ref())?;
        if columns.is_empty() {
            return Err(OutputError::Invalid {
                object: target.dest().display().to_string(),
                message: "a CSV file needs at least one column".to_owned(),
            });
        }
        let file = File::create(target.tmp()).map_err(|source| OutputError::Io {
            path: target.tmp().to_path_buf(),
            source,
        })?;
        let mut w = Self {
            out: Some(
                csv::WriterBuilder::new()
                    .terminator(csv::Terminator::Any(b'\n'))
                    .from_writer(BufWriter::new(file)),
            ),
            target,
            ncols: columns.len(),
            field: String::new(),
        };
        let header: Vec<String> = columns.iter().map(header_cell).collect();
        let out = w.out.as_mut().expect("writer is open until finish");
        let result = out.write_record(&header);
        result.map_err(|e| w.csv_err(e))?;
        Ok(w)
    }

    /// Writes one row of exactly as many values as there are columns.
    pub fn write_row(&mut self, values: &[f64]) -> Result<(), OutputError> {
        if values.len() != self.ncols {
            return Err(OutputError::RowLength {
                object: self.target.dest().display().to_string(),
                expected: self.ncols,
                got: values.len(),
            });
        }
        let out = self.out.as_mut().expect("writer is open until finish");
        let mut result = Ok(());
        for &v in values {
            self.field.clear();
            push_number(&mut self.field, v);
            result = result.and_then(|()| out.write_field(self.field.as_bytes()));
        }
        let result = result.and_then(|()| out.write_record(None::<&[u8]>));
        result.map_err(|e| self.csv_err(e))
    }

    /// Flushes, closes and renames the file to its final path, which it returns.
    pub fn finish(mut self) -> Result<PathBuf, OutputError> {
        let out = self.out.take().expect("writer is open until finish");
        let buffered = out.into_inner().map_err(|e| self.io_err(e.into_error()))?;
        let file = buffered
            .into_inner()
            .map_err(|e| self.io_err(e.into_error()))?;
        drop(file);
        self.target.commit()?;
        Ok(self.target.dest().to_path_buf())
    }

    fn csv_err(&self, e: csv::Error) -> OutputError {
        match e.into_kind() {
            csv::ErrorKind::Io(source) => self.io_err(source),
            other => OutputError::Invalid {
                object: self.target.dest().display().to_string(),
                message: format!("{other:?}"),
            },
        }
    }

    fn io_err(&self, source: std::io::Error) -> OutputError {
        OutputError::Io {
            path: self.target.tmp().to_path_buf(),
            source,
        }
    }
}

/// `name [unit]` (the `csv` writer quotes it when it holds a comma, quote or line break).
fn header_cell(c: &Column<'_>) -> String {
    if c.unit.is_empty() {
        c.name.to_owned()
    } else {
        format!("{} [{}]", c.name, c.unit)
    }
}

/// A number as the module doc says; NaN as an empty field.
pub(crate) fn push_number(line: &mut String, v: f64) {
    if v.is_nan() {
        return;
    }
    let a = v.abs();
    // Writing to a String cannot fail.
    let _ = if a != 0.0 && a.is_finite() && !(1e-4..1e15).contains(&a) {
        write!(line, "{v:e}")
    } else {
        write!(line, "{v}")
    };
}

#[cfg(test)]
mod tests {
    use super::*;

    const COLS: [Column<'static>; 3] = [
        Column {
            name: "time",
            unit: "s",
        },
        Column {
            name: "well_head",
            unit: "m",
        },
        Column {
            name: "porosity",
            unit: "",
        },
    ];

    #[test]
    fn write_and_read_back_works() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("s.csv");
        let mut w = CsvWriter::create(&path, &COLS).unwrap();
        w.write_row(&[0.0, 0.0, 0.32]).unwrap();
        w.write_row(&[0.5, -1.25, 1e-5]).unwrap();
        w.write_row(&[2e15, f64::NAN, f64::NEG_INFINITY]).unwrap();
        assert_eq!(w.finish().unwrap(), path);
        let text = std::fs::read_to_string(&path).unwrap();
        assert_eq!(
            text,
            "time [s],well_head [m],porosity\n0,0,0.32\n0.5,-1.25,1e-5\n2e15,,-inf\n"
        );
        // Every number reads back exactly.
        let back: Vec<f64> = text
            .lines()
            .nth(2)
            .unwrap()
            .split(',')
            .map(|c| c.parse().unwrap())
            .collect();
        assert_eq!(back, [0.5, -1.25, 1e-5]);
        let names: Vec<_> = std::fs::read_dir(dir.path())
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        assert_eq!(names, ["s.csv"]);
    }

    #[test]
    fn numbers_round_trip() {
        let mut line = String::new();
        for v in [
            0.1,
            1.0 / 3.0,
            1e-300,
            123456789.123,
            9.999e14,
            1e15,
            -7.25e-5,
            1e-4,
            5e-324,
        ] {
            line.clear();
            push_number(&mut line, v);
            assert_eq!(line.parse::<f64>().unwrap(), v, "{line}");
            assert!(line.len() <= 24, "{line}");
        }
    }

    #[test]
    fn header_cells_are_quoted_when_needed() {
        // RFC 4180 §2, rules 6 and 7: a field holding a comma or a quote is enclosed in
        // quotes, and a quote inside is doubled.
        let dir = tempfile::tempdir().unwrap();
        let cols = [
            Column {
                name: "a,b",
                unit: "m",
            },
            Column {
                name: "say \"hi\"",
                unit: "",
            },
            Column {
                name: "flow",
                unit: "m3/s",
            },
        ];
        let w = CsvWriter::create(dir.path().join("h.csv"), &cols).unwrap();
        let path = w.finish().unwrap();
        assert_eq!(
            std::fs::read_to_string(path).unwrap(),
            "\"a,b [m]\",\"say \"\"hi\"\"\",flow [m3/s]\n"
        );
    }

    #[test]
    fn drop_without_finish_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let mut w = CsvWriter::create(dir.path().join("s.csv"), &COLS).unwrap();
        w.write_row(&[1.0, 2.0, 3.0]).unwrap();
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
        drop(w);
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
    }

    #[test]
    fn writer_captures_errors() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("s.csv");
        let mut w = CsvWriter::create(&path, &COLS).unwrap();
        let e = w.write_row(&[1.0]).unwrap_err().to_string();
        assert_eq!(
            e,
            format!("{}: a row needs 3 values, got 1", path.display())
        );
        assert!(matches!(
            CsvWriter::create(&path, &[]),
            Err(OutputError::Invalid { .. })
        ));
        assert!(matches!(
            CsvWriter::create(dir.path().join("no/such/dir.csv"), &COLS),
            Err(OutputError::Io { .. })
        ));
    }
}
