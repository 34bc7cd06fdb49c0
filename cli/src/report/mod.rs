//! `boreflux report`: a self-contained HTML report with inline SVG figures from one or more
//! run files, compared side by side (one table column and one line style per run).
//!
//! The report reads only the HDF5 files that `boreflux run` writes (layout in docs/formats.md,
//! "HDF5 layout"), never solver internals; the one thing taken from the solver crate is
//! the caution text and the slot-velocity rule of thumb it quotes.
//!
//! ```text
//! read.rs     run file → plain structs (Run), with errors naming the missing object
//! format.rs   SI → display units, US units in brackets, number formatting
//! svg.rs      line charts: axes with units, second axis, legend, reference lines
//! ticks.rs    tick positions and labels, linear and log
//! decimate.rs per-pixel-column reduction of long series
//! figures.rs  which charts the report draws
//! headline.rs the headline table (one column per run)
//! tables.rs   cycle log, inputs
//! html.rs     the run page
//! page.rs     what the templates are given (figures, tables, SVG as safe markup); render
//! escape.rs   the templates' escaper and `esc` for SVG text
//! sweep.rs    the page of a sweep table (`boreflux sweep`): charts against the varied value
//! sweep_compare.rs  the page comparing grid sweep tables: one line per table in each chart
//! uncertainty.rs  a sampled sweep's section: bands, distributions, collapse probability
//! steptest.rs, calibration.rs  the step-test and calibration pages
//! ```
//!
//! The HTML of every page is in askama templates (`cli/templates/`, one per page kind, with
//! shared partials for the cautions, figures and tables); they escape every text they insert
//! with `escape::Entities` and take the SVG charts as already-safe markup. This module
//! gathers the data and builds the charts; it writes no page HTML itself.
//!
//! Nothing partial is left behind: the page is written to a hidden temporary file beside
//! the destination and renamed over it only when complete.

pub mod calibration;
mod decimate;
mod escape;
mod figures;
mod format;
mod headline;
mod html;
pub(crate) mod input_units;
mod page;
pub mod read;
pub mod steptest;
mod svg;
mod sweep;
mod sweep_compare;
mod tables;
mod ticks;
mod uncertainty;

use std::path::{Path, PathBuf};

use crate::output::{OutputError, TempTarget};
use crate::read_error::ReadError;
use read::Run;

/// Why a report could not be written.
#[derive(Debug, thiserror::Error)]
pub enum ReportError {
    /// No run files were named.
    #[error("no run files given; name one or more .h5 files written by `boreflux run`")]
    NoInputs,
    /// A run file is missing, not a boreflux result file, or lacks a dataset.
    #[error("{}: {source}", path.display())]
    Input {
        /// The run file as given.
        path: PathBuf,
        /// What is wrong with it, naming the missing or bad object.
        #[source]
        source: ReadError,
    },
    /// A sweep table was named with run files.
    #[error("{}: a sweep table cannot be reported with run files; name only sweep tables (compared on one page) or only run files", path.display())]
    SweepMixed {
        /// The sweep table.
        path: PathBuf,
    },
    /// Sweep tables to compare vary different first parameters.
    #[error("{}: its first varied parameter is `{found}`, but {} varies `{expected}` first; sweep tables are compared against the same first parameter", path.display(), first.display())]
    SweepFirstDiffers {
        /// The table that differs.
        path: PathBuf,
        /// Its first varied path.
        found: String,
        /// The first table.
        first: PathBuf,
        /// The first table's first varied path.
        expected: String,
    },
    /// A sampled sweep was named for a comparison.
    #[error("{}: a sampled sweep (--sample) is reported on its own; comparisons take grid sweep tables", path.display())]
    SweepSampled {
        /// The sampled sweep table.
        path: PathBuf,
    },
    /// The report file could not be written.
    #[error("cannot write report {}: {source}", path.display())]
    Write {
        /// The report path.
        path: PathBuf,
        /// The underlying error.
        #[source]
        source: OutputError,
    },
}

/// Reads every run file in `inputs` (or one sweep table, or several grid sweep tables to
/// compare) and writes the HTML report to `output`.
///
/// All inputs are read before anything is written; on any error no file appears at
/// `output` (an existing file there is left as it was).
pub fn write_report(inputs: &[PathBuf], output: &Path) -> Result<(), ReportError> {
    write_titled_report(inputs, output, None)
}

/// [`write_report`] with the page's own `title` (browser title and heading; run reports,
/// sweep pages and sweep comparisons alike).
pub fn write_titled_report(
    inputs: &[PathBuf],
    output: &Path,
    title: Option<&str>,
) -> Result<(), ReportError> {
    if inputs.is_empty() {
        return Err(ReportError::NoInputs);
    }
    // Sweep tables are reported on their own: one alone, or several compared.
    let mut sweeps = Vec::new();
    let mut first_run = None;
    for p in inputs {
        match crate::sweep::table::Table::read(p) {
            Ok(t) => sweeps.push((p.clone(), t)),
            Err(_) => {
                first_run.get_or_insert(p);
            }
        }
    }
    let page = if let Some((path, table)) = sweeps.first() {
        if let Some(run) = first_run {
            // A file that is neither a sweep table nor a run file is named as such.
            read::read_run(run).map_err(|source| ReportError::Input {
                path: run.clone(),
                source,
            })?;
            return Err(ReportError::SweepMixed { path: path.clone() });
        }
        if sweeps.len() == 1 {
            sweep::page(table, title)
        } else {
            check_comparable(&sweeps)?;
            sweep_compare::page(&sweeps, title)
        }
    } else {
        let runs = inputs
            .iter()
            .map(|path| {
                read::read_run(path).map_err(|source| ReportError::Input {
                    path: path.clone(),
                    source,
                })
            })
            .collect::<Result<Vec<Run>, _>>()?;
        html::page(&runs, title)
    };
    let write_err = |source| ReportError::Write {
        path: output.to_path_buf(),
        source,
    };
    let mut target = TempTarget::new(output).map_err(write_err)?;
    let tmp = target.tmp().to_path_buf();
    std::fs::write(&tmp, page.as_bytes()).map_err(|source| {
        write_err(OutputError::Io {
            path: tmp.clone(),
            source,
        })
    })?;
    target.commit().map_err(write_err)
}

/// Sweep tables can be compared when all are grid sweeps varying the same first path.
fn check_comparable(sweeps: &[(PathBuf, crate::sweep::table::Table)]) -> Result<(), ReportError> {
    if let Some((path, _)) = sweeps.iter().find(|(_, t)| t.sampling_json.is_some()) {
        return Err(ReportError::SweepSampled { path: path.clone() });
    }
    let (first, t0) = &sweeps[0];
    let expected = t0.paths.first().cloned().unwrap_or_default();
    for (path, t) in &sweeps[1..] {
        let found = t.paths.first().cloned().unwrap_or_default();
        if found != expected {
            return Err(ReportError::SweepFirstDiffers {
                path: path.clone(),
                found,
                first: first.clone(),
                expected,
            });
        }
    }
    Ok(())
}

/// Letter naming run number `i` (from 0): A, B, …, Z, AA, AB, …
pub(crate) fn run_letter(i: usize) -> String {
    let mut n = i + 1;
    let mut s = Vec::new();
    while n > 0 {
        let r = (n - 1) % 26;
        s.push(b'A' + r as u8);
        n = (n - 1) / 26;
    }
    s.reverse();
    String::from_utf8(s).expect("ASCII letters")
}

/// The run's title, or its file name when the title is empty or missing.
pub(crate) fn run_title(run: &Run) -> String {
    match run.meta.title.as_deref().map(str::trim) {
        Some(t) if !t.is_empty() => t.to_owned(),
        _ => run.path.file_name().map_or_else(
            || run.path.display().to_string(),
            |n| n.to_string_lossy().into_owned(),
        ),
    }
}

/// Legend text of run `i`: `A: title`, shortened to fit a legend row.
pub(crate) fn legend_name(i: usize, run: &Run) -> String {
    const MAX_CHARS: usize = 48;
    let title = run_title(run);
    let short: String = if title.chars().count() > MAX_CHARS {
        title.chars().take(MAX_CHARS - 1).chain(['…']).collect()
    } else {
        title
    };
    format!("{}: {short}", run_letter(i))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn run_letter_works() {
        assert_eq!(run_letter(0), "A");
        assert_eq!(run_letter(25), "Z");
        assert_eq!(run_letter(26), "AA");
        assert_eq!(run_letter(27), "AB");
    }
}
