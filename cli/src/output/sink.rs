//! The run's observer: streams every reported step into the HDF5 layout of docs/formats.md (and
//! optionally a CSV file) while the solver runs, so memory stays flat in run length.

use super::csv::{Column, CsvWriter};
use super::envelope::{EnvelopePlan, Envelopes};
use super::events::{EventLog, EventPlan};
use super::h5::{H5Writer, MatrixHandle, SeriesHandle};
use super::relay::Consumer;
use super::schema::{Cycle, Group, SnapshotData, Step, CYCLE_INDEX};
use super::OutputError;
use boreflux_solver::{CycleView, JumpView, StepObserver, StepValues, StepView};
use std::path::Path;

/// Values per chunk of the time series: 64 KiB of f64. The report and the other readers
/// read whole series, so no chunk is ever read for part of its values: the chunk is only
/// the unit of compression and of the write buffer. Larger chunks compress a little better
/// (30-min municipal surge run, level 4: 12.75 MB at 4 096 values, 12.56 MB at 8 192,
/// 12.38 MB at 32 768; 26.0 MB uncompressed) while ~30 series buffer about 2 MB at 8 192,
/// and one chunk sits well inside HDF5's default 1 MiB chunk cache of a reader.
pub(crate) const CHUNK: usize = 8192;

/// Deflate level of the run's datasets, after the byte shuffle. Levels 1, 4 and 6 gave
/// 12.73, 12.56 and 12.51 MB on the run above: the series are full-precision doubles whose
/// mantissas do not compress; the shuffle groups the sign and exponent bytes, which do.
/// Level 1 is zlib's fast match search (levels 4 and up search lazily): on the 60 M
/// cell-step sine case with every step written (benches/cases/sine-60m.json, 41.6 MB of
/// series) it wrote 10.33 MB against 10.14 MB at level 4, and the whole process took
/// 0.80 s against 0.91 s (least of 5 runs each, loaded 2-core machine); Python's zlib on
/// the same shuffled chunks: 0.83 s against 1.23 s.
const DEFLATE_LEVEL: u8 = 1;

/// Writes the run into an HDF5 file (and CSV).
pub struct ResultSink {
    writer: H5Writer,
    /// Every per-step series with its dataset, in CSV column order.
    series: Columns,
    cycle_index: SeriesHandle<u64>,
    /// Every per-cycle value with its dataset.
    cycles: Vec<(Cycle, SeriesHandle)>,
    snap_time: SeriesHandle,
    snap_head: MatrixHandle,
    snapshots: Snapshots,
    csv: Option<CsvWriter>,
    row: Vec<f64>,
    /// Per-cycle envelopes, when the case keeps them (`/series` then holds the detail).
    envelopes: Option<Envelopes>,
    /// The step being reported ends a complete cycle (`on_cycle` comes first).
    closing: bool,
    /// The run's events (`/events`), which also mark the detail windows.
    events: EventLog,
    /// First write error; the run stops at it.
    pub error: Option<OutputError>,
}

impl ResultSink {
    /// Creates the file (at a temporary path) and its datasets. `cells` is the grid size.
    pub fn create(
        path: &Path,
        csv: Option<&Path>,
        cells: usize,
        snapshot_every: u64,
        envelopes: Option<EnvelopePlan>,
        events: EventPlan,
    ) -> Result<Self, OutputError> {
        let mut w = H5Writer::create(path)?;
        w.set_deflate(Some(DEFLATE_LEVEL));
        // Scalars first, then power and work of each zone: the datasets are created in the
        // order of earlier versions (scalars, then power and work zone by zone).
        let mut series = Vec::new();
        for step in Step::all() {
            let e = step.entry();
            let h = w.growable_series(
                &Group::Series.member(&e.name),
                e.unit.symbol(),
                &e.description,
                CHUNK,
            )?;
            series.push((step, h));
        }
        let cycle_index = w.growable_series_of::<u64>(
            &Group::Cycles.member(CYCLE_INDEX),
            "1",
            "cycle number from 0",
            256,
        )?;
        let mut cycles = Vec::new();
        for cycle in Cycle::all() {
            let e = cycle.entry();
            let h = w.growable_series(
                &Group::Cycles.member(&e.name),
                e.unit.symbol(),
                &e.description,
                256,
            )?;
            cycles.push((cycle, h));
        }
        let (time, head) = (SnapshotData::Time.entry(), SnapshotData::Head.entry());
        let snap_time = w.growable_series(
            &SnapshotData::Time.path(),
            time.unit.symbol(),
            &time.description,
            256,
        )?;
        let snap_head = w.growable_matrix(
            &SnapshotData::Head.path(),
            cells,
            head.unit.symbol(),
            &head.description,
        )?;
        let csv = match csv {
            Some(p) => {
                let names: Vec<(String, &str)> = series
                    .iter()
                    .map(|(step, _)| (step.csv_name(), step.entry().unit.symbol()))
                    .collect();
                let cols: Vec<Column<'_>> = names
                    .iter()
                    .map(|(n, u)| Column { name: n, unit: u })
                    .collect();
                Some(CsvWriter::create(p, &cols)?)
            }
            None => None,
        };
        let events = EventLog::create(&mut w, events)?;
        let n_series = series.len();
        let envelopes = match envelopes {
            Some(plan) => {
                let steps: Vec<Step> = series.iter().map(|(s, _)| *s).collect();
                Some(Envelopes::create(&mut w, &steps, plan)?)
            }
            None => None,
        };
        Ok(ResultSink {
            writer: w,
            series: Columns::new(series),
            cycle_index,
            cycles,
            snap_time,
            snap_head,
            snapshots: Snapshots::every(snapshot_every),
            csv,
            row: Vec::with_capacity(n_series),
            envelopes,
            closing: false,
            events,
            error: None,
        })
    }

    /// The writer, for the grid, attributes and the summary.
    pub fn writer(&mut self) -> &mut H5Writer {
        &mut self.writer
    }

    /// Writes a step; `heads` are read only at the steps [`Self::snapshots`] wants.
    fn write_step(&mut self, s: &StepValues, heads: &[f64]) -> Result<(), OutputError> {
        self.row.clear();
        for (step, _) in &self.series.handles {
            self.row.push(step.value(s));
        }
        let events = self.events.on_step(s)?;
        let (series, csv) = (&mut self.series, &mut self.csv);
        let mut write = |row: &[f64]| write_row(series, csv, row);
        match self.envelopes.as_mut() {
            Some(env) => env.add(&self.row, self.closing, events, &mut write)?,
            None => write(&self.row)?,
        }
        self.closing = false;
        if self.snapshots.wants(s.step) {
            self.snap_time.append(&[s.time_s])?;
            self.snap_head.append_row(heads)?;
        }
        Ok(())
    }

    fn write_cycle(&mut self, c: &CycleView) -> Result<(), OutputError> {
        self.events.on_cycle(c.index);
        self.cycle_index.push(c.index)?;
        for (cycle, h) in &mut self.cycles {
            h.push(cycle.value(c))?;
        }
        Ok(())
    }

    /// Writes out the rest of the run's series (the envelopes' last cycles, every buffered
    /// value) and closes their datasets; the grid, summary and other fixed datasets can
    /// still be written. Called by [`Self::finish`] if not before; nothing may be reported
    /// after it.
    pub fn write_series(&mut self) -> Result<(), OutputError> {
        if let Some(mut env) = self.envelopes.take() {
            let (series, csv) = (&mut self.series, &mut self.csv);
            env.finish(|row| write_row(series, csv, row))?;
        }
        self.series.flush()?;
        self.writer.close_growables()
    }

    /// Flushes and renames both files into place.
    pub fn finish(mut self) -> Result<(), OutputError> {
        self.write_series()?;
        if let Some(csv) = self.csv {
            csv.finish()?;
        }
        self.writer.finish()?;
        Ok(())
    }
}

/// The steps whose cell heads the sink keeps in `/snapshots`: the first and every
/// `every`-th.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Snapshots {
    every: u64,
}

impl Snapshots {
    /// Every `every`-th step (and the first).
    pub fn every(every: u64) -> Self {
        Snapshots {
            every: every.max(1),
        }
    }

    /// Whether the heads of step `step` are kept.
    pub fn wants(self, step: u64) -> bool {
        step % self.every == 0 || step == 1
    }
}

/// Fed on the relay's worker thread (`output/relay.rs`), from the step's owned values.
impl Consumer for ResultSink {
    fn step(&mut self, values: &StepValues, heads: &[f64]) {
        if self.error.is_none() {
            if let Err(e) = self.write_step(values, heads) {
                self.error = Some(e);
            }
        }
    }

    fn cycle(&mut self, cycle: &CycleView) {
        StepObserver::on_cycle(self, cycle);
    }

    fn jump(&mut self, jump: &JumpView) {
        StepObserver::on_jump(self, jump);
    }

    fn end(&mut self) {
        if self.error.is_none() {
            if let Err(e) = self.write_series() {
                self.error = Some(e);
            }
        }
    }

    fn failed(&self) -> bool {
        self.error.is_some()
    }

    fn snapshots(&self) -> Snapshots {
        self.snapshots
    }
}

/// Fed directly on the solver's thread.
impl StepObserver for ResultSink {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        Consumer::step(self, &s.values, s.heads);
        self.error.is_none()
    }

    fn on_jump(&mut self, jump: &JumpView) {
        self.events.on_jump(jump.first_cycle + jump.cycles);
        if let Some(env) = self.envelopes.as_mut() {
            let (series, csv) = (&mut self.series, &mut self.csv);
            if let Err(e) = env.jump(|row| write_row(series, csv, row)) {
                self.error.get_or_insert(e);
            }
        }
    }

    fn on_cycle(&mut self, c: &CycleView) {
        self.closing = true;
        if self.error.is_none() {
            if let Err(e) = self.write_cycle(c) {
                self.error = Some(e);
            }
        }
    }
}

/// The per-step series: rows are gathered into one column buffer per series and handed to
/// the datasets a chunk at a time, so a step costs no lock per value.
struct Columns {
    handles: Vec<(Step, SeriesHandle)>,
    /// One buffer per series (capacity one chunk), all the same length.
    pending: Vec<Vec<f64>>,
}

impl Columns {
    fn new(handles: Vec<(Step, SeriesHandle)>) -> Self {
        let pending = handles.iter().map(|_| Vec::with_capacity(CHUNK)).collect();
        Columns { handles, pending }
    }

    fn push_row(&mut self, row: &[f64]) -> Result<(), OutputError> {
        for (col, &x) in self.pending.iter_mut().zip(row) {
            col.push(x);
        }
        if self.pending.first().is_some_and(|c| c.len() >= CHUNK) {
            self.flush()?;
        }
        Ok(())
    }

    /// Hands the gathered values to the datasets.
    fn flush(&mut self) -> Result<(), OutputError> {
        if self.pending.first().is_none_or(Vec::is_empty) {
            return Ok(());
        }
        for ((_, h), col) in self.handles.iter_mut().zip(&mut self.pending) {
            h.append(col)?;
            col.clear();
        }
        Ok(())
    }
}

/// Appends one row to every per-step series and the CSV file.
fn write_row(
    series: &mut Columns,
    csv: &mut Option<CsvWriter>,
    row: &[f64],
) -> Result<(), OutputError> {
    series.push_row(row)?;
    if let Some(csv) = csv.as_mut() {
        csv.write_row(row)?;
    }
    Ok(())
}
