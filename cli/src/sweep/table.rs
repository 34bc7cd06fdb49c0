//! The result table of a sweep: one row per scenario, written as CSV and HDF5 (through a
//! temporary file renamed when complete), and read back from HDF5 to merge shards.
//!
//! ```text
//! HDF5   / attributes: kind = "sweep", tool_version, created_utc, case_file,
//!          base_case_json (the case file as read), vary_json ([{path, values}]),
//!          scenarios_total, shard ("K/N", or "merged"); a sampled sweep adds
//!          sampling_json ({design, samples, seed}) and its vary_json is
//!          [{path, distribution}]
//!        /table                     attribute figure_columns: the figure names in order
//!        /table/scenario            index in the whole sweep, from 0
//!        /table/status              "ok", or why the scenario failed
//!        /table/warnings            the run's warnings, one per line
//!        /table/vary/<path>         the value as written in the case (text)
//!        /table/vary_value/<path>   the same as a number: in SI base units when it carries a
//!                                   unit, otherwise as given (NaN for a word)
//!        /table/series/<name>       key series on a common grid (scenario × point;
//!                                   schema SweepSeries); absent in tables of earlier versions
//!        /table/<figure>            the run's headline figures (the names of a run file's
//!                                   /summary attributes; units in the suffix and attribute)
//! CSV    scenario, status, <path>…, <path>_value…, <figure>…, warnings; a sampled sweep
//!        adds design and seed after status
//! ```

use super::series::{run_fraction, POINTS};
use super::spec::label;
use crate::output::h5::H5Writer;
use crate::output::schema::{figure_values, Figure, SweepSeries};
use crate::output::TempTarget;
use crate::read_error::{FileKind, ReadError};
use crate::summary::Headline;
use hdf5::types::{TypeDescriptor, VarLenUnicode};
use hdf5::File;
use serde_json::Value;
use std::io::Write;
use std::path::{Path, PathBuf};

/// One scenario's results.
#[derive(Debug, Clone, PartialEq)]
pub struct Row {
    /// Index in the whole sweep, from 0.
    pub scenario: usize,
    /// The varied values as written in the case.
    pub labels: Vec<String>,
    /// The varied values as numbers: SI when they carry a unit, otherwise as given (NaN
    /// for a word).
    pub si: Vec<f64>,
    /// "ok", or why the scenario failed.
    pub status: String,
    /// Headline figures, in the order of [`Table::figures`] (NaN when failed).
    pub figures: Vec<f64>,
    /// Warnings of the run, one per line.
    pub warnings: String,
    /// Key series on the common grid, one vector per entry of
    /// [`SweepSeries::PER_SCENARIO`]; empty when the scenario failed.
    pub series: Vec<Vec<f64>>,
}

/// A sweep's table and what defines the sweep.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    /// The case file's path as given.
    pub case_file: String,
    /// The case file as read (JSON text).
    pub base_case_json: String,
    /// The `--vary` variables as JSON (for a sampled sweep: the paths and distributions).
    pub vary_json: String,
    /// A sampled sweep's design, sample count and seed as JSON; None for a grid sweep.
    pub sampling_json: Option<String>,
    /// Scenarios in the whole sweep.
    pub total: usize,
    /// `K/N` of this shard, or "merged".
    pub shard: String,
    /// Names of the varied paths.
    pub paths: Vec<String>,
    /// Names of the figure columns.
    pub figures: Vec<String>,
    /// The rows, by scenario index.
    pub rows: Vec<Row>,
}

/// The headline figures of a run as (name, value), in the schema's order
/// ([`crate::output::schema::Figure::all`]); a figure that was not computed is NaN. The names
/// are those of the /summary attributes of a run file.
pub fn figures(h: &Headline) -> Vec<(String, f64)> {
    figure_values(h)
        .into_iter()
        .map(|(f, v)| (f.name(), v.unwrap_or(f64::NAN)))
        .collect()
}

/// The SI unit of a figure column, from the output schema; `None` for a name that is no
/// headline figure.
pub fn units_of(name: &str) -> Option<&'static str> {
    Figure::from_name(name).map(|f| f.entry().unit.symbol())
}

/// A text field, guarded: a text cell that a spreadsheet would run as a formula gets a
/// leading apostrophe; numbers (-1.5, +3) stay numbers. Quoting is the `csv` writer's.
fn text_field(s: &str) -> String {
    if s.starts_with(['=', '+', '-', '@', '\t', '\r']) && s.trim().parse::<f64>().is_err() {
        format!("'{s}")
    } else {
        s.to_owned()
    }
}

/// A number field in the convention of every boreflux CSV (`output::csv`): shortest form
/// that reads back to the same value, NaN as an empty field.
fn number_field(x: f64) -> String {
    let mut out = String::new();
    crate::output::csv::push_number(&mut out, x);
    out
}

/// Most rows read from a sweep table: ten million scenarios. A crafted file declaring more
/// is refused before anything is allocated.
pub const MAX_ROWS: usize = 10_000_000;

impl Table {
    /// The CSV text.
    pub fn csv(&self) -> String {
        let mut w = csv::WriterBuilder::new()
            .terminator(csv::Terminator::Any(b'\n'))
            .from_writer(Vec::new());
        let mut header = vec!["scenario".to_owned(), "status".to_owned()];
        let sampling: Option<(String, String)> = self.sampling_json.as_deref().map(|j| {
            let v: Value = serde_json::from_str(j).unwrap_or_default();
            (label(&v["design"]), label(&v["seed"]))
        });
        if sampling.is_some() {
            header.extend(["design".to_owned(), "seed".to_owned()]);
        }
        header.extend(self.paths.iter().cloned());
        header.extend(self.paths.iter().map(|p| format!("{p}_value")));
        header.extend(self.figures.iter().cloned());
        header.push("warnings".to_owned());
        // Writing into memory cannot fail.
        let _ = w.write_record(header.iter().map(|h| text_field(h)));
        for r in &self.rows {
            let mut f = vec![r.scenario.to_string(), text_field(&r.status)];
            if let Some((design, seed)) = &sampling {
                f.extend([text_field(design), seed.clone()]);
            }
            f.extend(r.labels.iter().map(|l| text_field(l)));
            f.extend(r.si.iter().map(|&x| number_field(x)));
            f.extend(r.figures.iter().map(|&x| number_field(x)));
            f.push(text_field(&r.warnings.replace('\n', "; ")));
            let _ = w.write_record(&f);
        }
        String::from_utf8(w.into_inner().unwrap_or_default()).unwrap_or_default()
    }

    /// Writes `<stem>.csv` and `<stem>.h5`, each through a temporary file renamed when
    /// complete; returns the two paths.
    pub fn write(&self, stem: &Path) -> anyhow::Result<(PathBuf, PathBuf)> {
        let csv_path = stem.with_extension("csv");
        let h5_path = stem.with_extension("h5");
        let mut csv = TempTarget::new(&csv_path)?;
        std::fs::File::create(csv.tmp())
            .and_then(|mut f| f.write_all(self.csv().as_bytes()))
            .map_err(|e| anyhow::anyhow!("writing {}: {e}", csv_path.display()))?;
        let mut w = H5Writer::create(&h5_path)?;
        self.write_h5(&mut w)?;
        w.finish()?;
        csv.commit()?;
        Ok((csv_path, h5_path))
    }

    fn write_h5(&self, w: &mut H5Writer) -> anyhow::Result<()> {
        w.set_root_attr_str("kind", "sweep")?;
        w.set_root_attr_str("tool_version", env!("CARGO_PKG_VERSION"))?;
        w.set_root_attr_str(
            "created_utc",
            &humantime::format_rfc3339_seconds(std::time::SystemTime::now()).to_string(),
        )?;
        w.set_root_attr_str("case_file", &self.case_file)?;
        w.set_root_attr_str("base_case_json", &self.base_case_json)?;
        w.set_root_attr_str("vary_json", &self.vary_json)?;
        if let Some(j) = &self.sampling_json {
            w.set_root_attr_str("sampling_json", j)?;
        }
        w.set_attr_f64("/", "scenarios_total", self.total as f64)?;
        w.set_root_attr_str("shard", &self.shard)?;
        w.group("/table")?;
        let columns = serde_json::to_string(&self.figures)?;
        w.set_attr_str("/table", "figure_columns", &columns)?;
        let index: Vec<u64> = self.rows.iter().map(|r| r.scenario as u64).collect();
        w.write_vector(
            "/table/scenario",
            &index,
            "1",
            "index of the scenario in the whole sweep, from 0 (odometer order of --vary)",
        )?;
        let text = |f: &dyn Fn(&Row) -> &str| -> anyhow::Result<Vec<VarLenUnicode>> {
            self.rows
                .iter()
                .map(|r| {
                    f(r).parse::<VarLenUnicode>()
                        .map_err(|e| anyhow::anyhow!("text with a NUL character: {e}"))
                })
                .collect()
        };
        w.write_vector(
            "/table/status",
            &text(&|r| r.status.as_str())?,
            "",
            "ok, or why the scenario failed",
        )?;
        w.write_vector(
            "/table/warnings",
            &text(&|r| r.warnings.as_str())?,
            "",
            "warnings of the scenario's run, one per line",
        )?;
        w.group("/table/vary")?;
        w.group("/table/vary_value")?;
        for (k, p) in self.paths.iter().enumerate() {
            w.write_vector(
                &format!("/table/vary/{p}"),
                &text(&|r| r.labels[k].as_str())?,
                "",
                "the varied value as written in the case file",
            )?;
            let si: Vec<f64> = self.rows.iter().map(|r| r.si[k]).collect();
            w.write_vector(
                &format!("/table/vary_value/{p}"),
                &si,
                "SI, or as given",
                "the varied value as a number: in SI base units when it carries a unit (as the \
                 resolved case holds it), otherwise as given; NaN for a word",
            )?;
        }
        for (k, name) in self.figures.iter().enumerate() {
            let v: Vec<f64> = self.rows.iter().map(|r| r.figures[k]).collect();
            w.write_vector(
                &format!("/table/{name}"),
                &v,
                units_of(name)
                    .ok_or_else(|| anyhow::anyhow!("{name}: not a headline figure of boreflux"))?,
                "headline figure of the scenario's run (as in a run file's /summary)",
            )?;
        }
        if self.rows.iter().any(|r| !r.series.is_empty()) {
            self.write_series(w)?;
        }
        Ok(())
    }

    /// The key series (`/table/series`): the grid, then one matrix per series, a row per
    /// scenario (NaN for a failed one).
    fn write_series(&self, w: &mut H5Writer) -> anyhow::Result<()> {
        w.group(&format!("/{}", SweepSeries::GROUP))?;
        let grid = SweepSeries::RunFraction;
        let e = grid.entry();
        w.write_vector(
            &grid.path(),
            &run_fraction(),
            e.unit.symbol(),
            &e.description,
        )?;
        let missing = vec![f64::NAN; POINTS];
        for (j, s) in SweepSeries::PER_SCENARIO.into_iter().enumerate() {
            let e = s.entry();
            let mut m = w.growable_matrix(&s.path(), POINTS, e.unit.symbol(), &e.description)?;
            for r in &self.rows {
                m.append_row(r.series.get(j).unwrap_or(&missing))?;
            }
        }
        Ok(())
    }

    /// Reads a table written by [`Table::write`] (at most [`MAX_ROWS`] rows). The error text does not repeat the path.
    pub fn read(path: &Path) -> Result<Table, ReadError> {
        if !path.exists() {
            return Err(ReadError::Missing);
        }
        let kind = FileKind::SweepTable;
        let file = File::open(path).map_err(|source| ReadError::NotHdf5 { kind, source })?;
        let attr = |name: &str| -> Result<String, ReadError> {
            let a = file.attr(name).map_err(|_| ReadError::NotOurs {
                kind,
                lacks: format!("no `{name}` attribute"),
            })?;
            let object = format!("attribute {name}");
            match a.dtype().and_then(|t| t.to_descriptor()) {
                Ok(TypeDescriptor::VarLenUnicode) => a
                    .read_scalar::<VarLenUnicode>()
                    .map(|s| s.as_str().to_owned())
                    .map_err(ReadError::hdf5(object)),
                Ok(TypeDescriptor::Float(_)) => a
                    .read_scalar::<f64>()
                    .map(|x| x.to_string())
                    .map_err(ReadError::hdf5(object)),
                _ => Err(ReadError::invalid(object, "unexpected type")),
            }
        };
        if attr("kind")? != "sweep" {
            return Err(ReadError::NotOurs {
                kind,
                lacks: "kind is not \"sweep\"".to_owned(),
            });
        }
        let total: f64 = attr("scenarios_total")?
            .parse()
            .map_err(|_| ReadError::invalid("attribute scenarios_total", "not a number"))?;
        let vary_json = attr("vary_json")?;
        let vary: Value = serde_json::from_str(&vary_json)
            .map_err(|e| ReadError::invalid("attribute vary_json", e.to_string()))?;
        let paths: Vec<String> = vary
            .as_array()
            .map(|a| {
                a.iter()
                    .filter_map(|v| v["path"].as_str().map(str::to_owned))
                    .collect()
            })
            .unwrap_or_default();
        let dataset = |name: &str| -> Result<hdf5::Dataset, ReadError> {
            let d = file
                .dataset(name)
                .map_err(ReadError::hdf5(format!("/{name}")))?;
            if d.size() > MAX_ROWS {
                return Err(ReadError::TooLarge {
                    object: format!("/{name}"),
                    values: d.size(),
                    max: MAX_ROWS,
                    kind,
                });
            }
            Ok(d)
        };
        let f64s = |name: &str| -> Result<Vec<f64>, ReadError> {
            dataset(name)?
                .read_raw::<f64>()
                .map_err(ReadError::hdf5(format!("/{name}")))
        };
        let texts = |name: &str| -> Result<Vec<String>, ReadError> {
            dataset(name)?
                .read_raw::<VarLenUnicode>()
                .map(|v| v.iter().map(|s| s.as_str().to_owned()).collect())
                .map_err(ReadError::hdf5(format!("/{name}")))
        };
        let index: Vec<u64> = dataset("table/scenario")?
            .read_raw::<u64>()
            .map_err(ReadError::hdf5("/table/scenario"))?;
        let n = index.len();
        let status = texts("table/status")?;
        let warnings = texts("table/warnings")?;
        let mut labels = Vec::new();
        let mut si = Vec::new();
        for p in &paths {
            labels.push(texts(&format!("table/vary/{p}"))?);
            si.push(f64s(&format!("table/vary_value/{p}"))?);
        }
        // The figure columns in the writer's order (HDF5 lists members by name).
        let names: Vec<String> = file
            .group("table")
            .and_then(|g| g.attr("figure_columns"))
            .and_then(|a| a.read_scalar::<VarLenUnicode>())
            .map_err(ReadError::hdf5("/table figure_columns"))
            .and_then(|t| {
                serde_json::from_str(t.as_str())
                    .map_err(|e| ReadError::invalid("/table figure_columns", e.to_string()))
            })?;
        let mut figures = Vec::new();
        for name in &names {
            if units_of(name).is_none() {
                return Err(ReadError::invalid(
                    "/table figure_columns",
                    format!("{name} is not a headline figure of this version of boreflux"),
                ));
            }
            figures.push((name.clone(), f64s(&format!("table/{name}"))?));
        }
        let columns = [status.len(), warnings.len()]
            .into_iter()
            .chain(labels.iter().map(Vec::len))
            .chain(si.iter().map(Vec::len))
            .chain(figures.iter().map(|f| f.1.len()));
        if let Some(bad) = columns.into_iter().find(|&l| l != n) {
            return Err(ReadError::invalid(
                "/table",
                format!("columns differ in length ({bad} against {n} scenarios)"),
            ));
        }
        // The key series, when the table has them (tables of earlier versions do not).
        let mut series: Vec<Vec<f64>> = Vec::new();
        if file.group(SweepSeries::GROUP).is_ok() {
            for s in SweepSeries::PER_SCENARIO {
                let name = &s.path()[1..];
                let d = dataset(name)?;
                if d.shape() != [n, POINTS] {
                    return Err(ReadError::invalid(
                        s.path(),
                        format!("shape {:?}, expected [{n}, {POINTS}]", d.shape()),
                    ));
                }
                series.push(d.read_raw::<f64>().map_err(ReadError::hdf5(s.path()))?);
            }
        }
        let rows = (0..n)
            .map(|i| Row {
                series: series
                    .iter()
                    .map(|m| m[i * POINTS..(i + 1) * POINTS].to_vec())
                    .collect(),
                scenario: index[i] as usize,
                labels: labels.iter().map(|c| c[i].clone()).collect(),
                si: si.iter().map(|c| c[i]).collect(),
                status: status[i].clone(),
                figures: figures.iter().map(|f| f.1[i]).collect(),
                warnings: warnings[i].clone(),
            })
            .collect();
        Ok(Table {
            case_file: attr("case_file")?,
            base_case_json: attr("base_case_json")?,
            vary_json,
            sampling_json: file
                .attr_names()
                .ok()
                .filter(|n| n.iter().any(|n| n == "sampling_json"))
                .map(|_| attr("sampling_json"))
                .transpose()?,
            total: total as usize,
            shard: attr("shard")?,
            paths,
            figures: figures.into_iter().map(|f| f.0).collect(),
            rows,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn table() -> Table {
        Table {
            case_file: "cases/x.json".into(),
            base_case_json: "{\"a\":1}".into(),
            vary_json: "[{\"path\":\"drive.stroke\",\"values\":[\"0.3 m\",\"0.6 m\"]}]".into(),
            sampling_json: None,
            total: 2,
            shard: "1/1".into(),
            paths: vec!["drive.stroke".into()],
            figures: vec!["peak_shear_pa".into(), "steps".into()],
            rows: vec![
                Row {
                    scenario: 0,
                    labels: vec!["0.3 m".into()],
                    si: vec![0.3],
                    status: "ok".into(),
                    figures: vec![1.5e-3, 1200.0],
                    warnings: "first, with a comma\nsecond".into(),
                    series: vec![vec![0.5; POINTS]; SweepSeries::PER_SCENARIO.len()],
                },
                Row {
                    scenario: 1,
                    labels: vec!["0.6 m".into()],
                    si: vec![0.6],
                    status: "simulation failed: \"Newton\"".into(),
                    figures: vec![f64::NAN, f64::NAN],
                    warnings: String::new(),
                    series: Vec::new(),
                },
            ],
        }
    }

    #[test]
    fn csv_quotes_text_and_leaves_missing_figures_empty() {
        let text = table().csv();
        let lines: Vec<&str> = text.lines().collect();
        assert_eq!(
            lines[0],
            "scenario,status,drive.stroke,drive.stroke_value,peak_shear_pa,steps,warnings"
        );
        assert_eq!(
            lines[1],
            "0,ok,0.3 m,0.3,0.0015,1200,\"first, with a comma; second\""
        );
        assert_eq!(
            lines[2],
            "1,\"simulation failed: \"\"Newton\"\"\",0.6 m,0.6,,,"
        );
    }

    #[test]
    fn csv_text_cells_cannot_run_as_formulas() {
        // The injection characters of the OWASP "CSV Injection" page: = + - @ tab CR.
        assert_eq!(text_field("=HYPERLINK(\"x\")"), "'=HYPERLINK(\"x\")");
        assert_eq!(text_field("+cmd"), "'+cmd");
        assert_eq!(text_field("-2+3"), "'-2+3");
        assert_eq!(text_field("@SUM(A1)"), "'@SUM(A1)");
        assert_eq!(text_field("-1.5 m"), "'-1.5 m");
        assert_eq!(text_field("-1.5"), "-1.5");
        assert_eq!(text_field("+3e-2"), "+3e-2");
        assert_eq!(text_field("0.3 m"), "0.3 m");
        assert_eq!(number_field(-1.5), "-1.5");
        assert_eq!(number_field(f64::NAN), "");
        // Quoting by the csv writer (RFC 4180 §2, rules 6 and 7).
        let mut t = table();
        t.rows[0].status = "=HYPERLINK(\"x\")".to_owned();
        let text = t.csv();
        assert_eq!(
            text.lines().nth(1).unwrap().split_once(',').unwrap().1,
            "\"'=HYPERLINK(\"\"x\"\")\",0.3 m,0.3,0.0015,1200,\"first, with a comma; second\""
        );
    }

    #[test]
    fn hdf5_table_reads_back_as_written() {
        let dir = tempfile::tempdir().unwrap();
        let t = table();
        let (csv, h5) = t.write(&dir.path().join("sweep")).unwrap();
        assert!(csv.ends_with("sweep.csv") && h5.ends_with("sweep.h5"));
        let back = Table::read(&h5).unwrap();
        assert_eq!(back.rows[0], t.rows[0]);
        // The failed scenario's series come back as NaN rows.
        assert!(back.rows[1].series.iter().flatten().all(|x| x.is_nan()));
        assert_eq!(back.rows[1].status, t.rows[1].status);
        assert!(back.rows[1].figures.iter().all(|x| x.is_nan()));
        assert_eq!(back.figures, t.figures);
        assert_eq!((back.total, back.shard.as_str()), (2, "1/1"));
        assert_eq!(back.vary_json, t.vary_json);
    }

    #[test]
    fn units_come_from_the_schema() {
        // The schema's units agree with the unit suffix of each name (docs/formats.md).
        assert_eq!(units_of("peak_outward_flux_m_s"), Some("m/s"));
        assert_eq!(units_of("specific_capacity_end_m2_s"), Some("m2/s"));
        assert_eq!(units_of("work_cake_j"), Some("J"));
        assert_eq!(units_of("time_to_half_cake_s"), Some("s"));
        assert_eq!(units_of("max_newton_iterations"), Some("1"));
        assert_eq!(units_of("no_such_figure_m"), None);
    }
}
