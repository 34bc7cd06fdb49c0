//! Per-cycle envelopes of the per-step series and the detail windows kept beside them
//! (`output.store` = "envelopes", docs/formats.md "Storage choice").
//!
//! Every step's row (one value per per-step series) is folded into the current cycle's
//! minimum, maximum and ∫x² dt (trapezoidal rule between consecutive steps); at the end of
//! each complete cycle the three are written under `/envelopes/<stat>/<series>` (the RMS as
//! sqrt(∫x² dt / cycle time)). The step that ends a cycle belongs to it and also begins the
//! next. The rows of the current and the previous cycle are buffered; a cycle's rows go to
//! `/series` when it is among the first `detail_cycles`, ends within the last `detail_cycles`
//! periods of the run, or holds or follows an event (or the next one holds an event, in
//! which case it is written before it). Events: a stage start of a schedule, and a step in
//! which the cake's cover or thickness changes by more than 1 % of its starting value (a
//! lift-off patch opening, the cake's removal). The steps after the last complete cycle are
//! always written.

use super::h5::{H5Writer, SeriesHandle};
use super::schema::{EnvelopeStat, Step, ENVELOPES};
use super::OutputError;

/// A cycle's rows are written through once the buffer holds this many values, whatever
/// the cycle (a long stage without a cycle end must not grow memory without bound).
const MAX_BUFFERED_VALUES: usize = 4_000_000;

/// Change of the cake's cover or thickness within one step, relative to its starting
/// value, that counts as an event. Assumption: a lift-off patch or removal shows as a jump
/// of this size; the smooth erosion of a step is far smaller.
const CAKE_EVENT_FRACTION: f64 = 0.01;

/// Where the detail windows are and what counts as an event.
#[derive(Debug, Clone)]
pub struct EnvelopePlan {
    /// Cycles kept step by step at the start and the end, and 1 each side of an event.
    pub detail_cycles: u64,
    /// Steps after this time are kept (the last `detail_cycles` periods), s.
    pub detail_from_s: f64,
    /// Stage start times (events), s, ascending.
    pub event_times_s: Vec<f64>,
}

/// The envelope writer of one run.
pub struct Envelopes {
    plan: EnvelopePlan,
    /// Index in the row of the series `time`, the cake cover and the cake thickness.
    time_col: usize,
    cake_cols: [usize; 2],
    /// Per series (row order): min, max handles; rms handle.
    handles: Vec<[SeriesHandle; 3]>,
    start: SeriesHandle,
    end: SeriesHandle,
    min: Vec<f64>,
    max: Vec<f64>,
    sq: Vec<f64>,
    /// Previous row (the trapezoid's left end), empty before the first step.
    last: Vec<f64>,
    cycle_start_s: f64,
    cake_ref: [f64; 2],
    /// Rows of the current cycle, its first row being the previous cycle's last.
    cur: Vec<f64>,
    /// Whether the first row of `cur` is in the file already.
    cur_first_written: bool,
    /// The current cycle was written through in part: the rest is kept too.
    cur_forced: bool,
    prev: Vec<f64>,
    prev_first_written: bool,
    prev_written: bool,
    event_here: bool,
    detail_next: bool,
    cycles: u64,
    next_event: usize,
    row_len: usize,
}

impl Envelopes {
    /// Creates the `/envelopes` datasets for the series `steps` (in row order).
    pub fn create(
        w: &mut H5Writer,
        steps: &[Step],
        plan: EnvelopePlan,
    ) -> Result<Self, OutputError> {
        let mut handles = Vec::with_capacity(steps.len());
        for step in steps {
            let e = step.entry();
            let mut mk = |stat: EnvelopeStat| {
                w.growable_series(
                    &format!("/{ENVELOPES}/{}/{}", stat.name(), e.name),
                    e.unit.symbol(),
                    &format!("{} ({})", stat.entry().description, e.description),
                    1024,
                )
            };
            handles.push([
                mk(EnvelopeStat::Min)?,
                mk(EnvelopeStat::Max)?,
                mk(EnvelopeStat::Rms)?,
            ]);
        }
        let start = w.growable_series(
            &format!("/{ENVELOPES}/start_time"),
            "s",
            "start of the cycle",
            1024,
        )?;
        let end = w.growable_series(
            &format!("/{ENVELOPES}/end_time"),
            "s",
            "end of the cycle",
            1024,
        )?;
        let col = |s: Step| steps.iter().position(|&x| x == s).unwrap_or(0);
        let n = steps.len();
        Ok(Envelopes {
            plan,
            time_col: col(Step::Time),
            cake_cols: [col(Step::CakeCoverage), col(Step::CakeThickness)],
            handles,
            start,
            end,
            min: vec![f64::INFINITY; n],
            max: vec![f64::NEG_INFINITY; n],
            sq: vec![0.0; n],
            last: Vec::with_capacity(n),
            cycle_start_s: 0.0,
            cake_ref: [f64::NAN; 2],
            cur: Vec::new(),
            cur_first_written: false,
            cur_forced: false,
            prev: Vec::new(),
            prev_first_written: false,
            prev_written: true,
            event_here: false,
            detail_next: false,
            cycles: 0,
            next_event: 0,
            row_len: n,
        })
    }

    /// Folds one step's row in; `closes_cycle` when the step ends a complete cycle. Rows
    /// to be kept are passed to `write` in time order.
    pub fn add(
        &mut self,
        row: &[f64],
        closes_cycle: bool,
        mut write: impl FnMut(&[f64]) -> Result<(), OutputError>,
    ) -> Result<(), OutputError> {
        let t = row[self.time_col];
        if self.last.is_empty() {
            // The run's first step, or the first after a jump over cycles.
            self.cycle_start_s = t;
            if self.cake_ref[0].is_nan() {
                self.cake_ref = [row[self.cake_cols[0]].abs(), row[self.cake_cols[1]].abs()];
            }
            self.begin(row);
        } else {
            let dt = t - self.last[self.time_col];
            for (k, &x) in row.iter().enumerate() {
                self.min[k] = self.min[k].min(x);
                self.max[k] = self.max[k].max(x);
                let y = self.last[k];
                self.sq[k] += 0.5 * dt * (x * x + y * y);
            }
            for (j, &c) in self.cake_cols.iter().enumerate() {
                let scale = self.cake_ref[j].max(f64::MIN_POSITIVE);
                if (row[c] - self.last[c]).abs() > CAKE_EVENT_FRACTION * scale {
                    self.event_here = true;
                }
            }
            let t0 = self.last[self.time_col];
            while let Some(&te) = self.plan.event_times_s.get(self.next_event) {
                if te > t {
                    break;
                }
                if te > t0 {
                    self.event_here = true;
                }
                self.next_event += 1;
            }
        }
        self.cur.extend_from_slice(row);
        self.last.clear();
        self.last.extend_from_slice(row);
        if self.cur.len() >= MAX_BUFFERED_VALUES {
            self.flush_prev(&mut write)?;
            write_rows(&self.cur, self.row_len, self.cur_first_written, &mut write)?;
            self.cur.drain(..self.cur.len() - self.row_len);
            self.cur_first_written = true;
            self.cur_forced = true;
        }
        if closes_cycle {
            self.close(t, &mut write)?;
            // The closing step begins the next cycle too.
            self.begin(row);
            self.cur.extend_from_slice(row);
        }
        Ok(())
    }

    /// The run jumped over whole cycles (`numerics.multiscale`) at a cycle's end: the cycle
    /// begun by that end's step is dropped, so no envelope spans the jump; the next step
    /// begins a cycle as the run's first step does. The cycle before the jump keeps what
    /// was decided for it (an event after the jump does not reach back across it).
    pub fn jump(&mut self) {
        self.last.clear();
        self.cur.clear();
        self.cur_first_written = false;
        self.cur_forced = false;
        self.prev_written = true;
        self.event_here = false;
    }

    fn begin(&mut self, row: &[f64]) {
        self.min.copy_from_slice(row);
        self.max.copy_from_slice(row);
        self.sq.fill(0.0);
    }

    /// Writes the previous cycle's rows if it was not kept (an event follows it).
    fn flush_prev(
        &mut self,
        write: &mut impl FnMut(&[f64]) -> Result<(), OutputError>,
    ) -> Result<(), OutputError> {
        if !self.prev_written {
            write_rows(&self.prev, self.row_len, self.prev_first_written, write)?;
            self.prev_written = true;
            // Its last row is the current cycle's first.
            self.cur_first_written = true;
        }
        Ok(())
    }

    fn close(
        &mut self,
        t: f64,
        write: &mut impl FnMut(&[f64]) -> Result<(), OutputError>,
    ) -> Result<(), OutputError> {
        let span = t - self.cycle_start_s;
        for (k, h) in self.handles.iter_mut().enumerate() {
            let rms = if span > 0.0 {
                (self.sq[k] / span).sqrt()
            } else {
                self.max[k].abs().max(self.min[k].abs())
            };
            h[0].append(&[self.min[k]])?;
            h[1].append(&[self.max[k]])?;
            h[2].append(&[rms])?;
        }
        self.start.append(&[self.cycle_start_s])?;
        self.end.append(&[t])?;
        let keep = self.cycles < self.plan.detail_cycles
            || t > self.plan.detail_from_s
            || self.event_here
            || self.detail_next
            || self.cur_forced;
        if self.event_here {
            self.flush_prev(write)?;
        }
        if keep {
            write_rows(&self.cur, self.row_len, self.cur_first_written, write)?;
        }
        self.detail_next = self.event_here;
        self.event_here = false;
        std::mem::swap(&mut self.prev, &mut self.cur);
        self.prev_first_written = self.cur_first_written;
        self.prev_written = keep;
        self.cur.clear();
        self.cur_first_written = keep;
        self.cur_forced = false;
        self.cycles += 1;
        self.cycle_start_s = t;
        Ok(())
    }

    /// Writes the steps after the last complete cycle (always kept) at the end of the run.
    pub fn finish(
        &mut self,
        mut write: impl FnMut(&[f64]) -> Result<(), OutputError>,
    ) -> Result<(), OutputError> {
        write_rows(&self.cur, self.row_len, self.cur_first_written, &mut write)?;
        self.cur.clear();
        Ok(())
    }
}

/// Writes the rows of `buf` (`n` values each), skipping the first when it is written.
fn write_rows(
    buf: &[f64],
    n: usize,
    first_written: bool,
    write: &mut impl FnMut(&[f64]) -> Result<(), OutputError>,
) -> Result<(), OutputError> {
    let skip = if first_written { n.min(buf.len()) } else { 0 };
    for r in buf[skip..].chunks(n) {
        write(r)?;
    }
    Ok(())
}
