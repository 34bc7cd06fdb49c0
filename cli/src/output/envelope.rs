//! Per-cycle envelopes of the per-step series and the detail windows kept beside them
//! (`output.store` = "envelopes", docs/formats.md "Storage choice").
//!
//! Every step's row (one value per per-step series) is folded into the current cycle's
//! minimum, maximum and ∫x² dt (trapezoidal rule between consecutive steps); at the end of
//! each complete cycle the three are written under `/envelopes/<stat>/<series>` (the RMS as
//! sqrt(∫x² dt / cycle time)). The step that ends a cycle belongs to it and also begins the
//! next.
//!
//! A cycle's rows go to `/series` (in time order, each row once) when it is among the first
//! `detail_cycles`, ends within the last `detail_cycles` periods of the run, or is next to
//! or holds a kept event. Events (`output/events.rs`): a stage start keeps its window
//! always; every other kind keeps the windows of the first `event_windows` cycles holding
//! it. A later occurrence is "late": its window is held back and dropped when a newer late
//! window comes, and written when a kept cycle comes next — so the last late window before
//! each kept stretch (above all before the run's closing cycles) is kept too. A cycle is
//! decided when the next one ends (whether that holds an event), so two cycles and at most
//! three held-back ones are buffered. The steps after the last complete cycle are always
//! written.

use super::h5::{H5Writer, SeriesHandle};
use super::schema::{EnvelopeStat, Step, ENVELOPES};
use super::OutputError;
use boreflux_solver::{EventKind, EventSet};

/// A cycle's rows are written through once the buffer holds this many values, whatever
/// the cycle (a long stage without a cycle end must not grow memory without bound).
pub(crate) const MAX_BUFFERED_VALUES: usize = 4_000_000;

/// Default cycles holding each kind of event kept in full (`output.event_windows`): the
/// first shows the onset, the next two whether it repeats alike; a kind that repeats every
/// cycle is then seen in `/events` and the envelopes, and its last window before the run's
/// closing cycles is kept too. Assumption: enough to judge a warning by, at a bounded cost
/// (11 kinds × 3 windows × 3 cycles at most, beside the fixed windows).
pub const DEFAULT_EVENT_WINDOWS: u64 = 3;

/// Values per chunk of an envelope series (one value a cycle): 2 KiB of f64, as the per-cycle
/// datasets under `/cycles`. A run of 256 cycles or more fills a chunk, so the dataset is
/// created and its full chunks compressed on the output thread while the run goes on; only
/// the last chunk is left to the close (on the 60 M cell-step case's 1 000 cycles, 1024 → 256
/// values took the close's growable writing from about 15 to 9 ms). Readers read whole
/// series, so the chunk is only the unit of compression. Small chunks compress less well:
/// the 8-hour municipal job's file (9 600 cycles) grew from 1.04 to 1.18 MB.
pub(crate) const CHUNK: usize = 256;

/// Held-back cycles of late windows at most (one window: the cycle holding the event and
/// one each side).
const LATE_CYCLES: usize = 3;

/// Where the detail windows are.
#[derive(Debug, Clone)]
pub struct EnvelopePlan {
    /// Cycles kept step by step at the start and the end.
    pub detail_cycles: u64,
    /// Steps after this time are kept (the last `detail_cycles` periods), s.
    pub detail_from_s: f64,
    /// Cycles holding each kind of event (but stage starts, always kept) kept in full with
    /// one cycle each side; 0 keeps none (nor a late one).
    pub event_windows: u64,
}

/// A complete cycle's rows, waiting for the decision whether to keep them.
#[derive(Debug, Default)]
struct Closed {
    rows: Vec<f64>,
    /// Sequence number (jumps leave a gap: the cycles each side are not neighbours).
    seq: u64,
    keep: bool,
    late: bool,
    /// It holds a kept event.
    event: bool,
    /// It holds a late event.
    late_event: bool,
}

/// The envelope writer of one run.
pub struct Envelopes {
    plan: EnvelopePlan,
    /// Index in the row of the series `time`.
    time_col: usize,
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
    /// Rows of the current cycle, its first row being the previous cycle's last.
    cur: Vec<f64>,
    cur_event: bool,
    cur_late: bool,
    /// Kinds seen in the current cycle (each counts once per cycle).
    cur_kinds: EventSet,
    /// The current cycle was written through in part: the rest is kept too.
    cur_forced: bool,
    /// The last complete cycle, undecided.
    prev: Option<Closed>,
    /// Held-back late cycles, oldest first.
    late: Vec<Closed>,
    /// Emptied buffers for reuse.
    spare: Vec<Vec<f64>>,
    /// Cycles holding each kind so far (index: the kind's code).
    seen: [u64; EventKind::ALL.len()],
    /// Time of the last row written (rows at or before it are in the file already).
    written_to_s: f64,
    /// Complete cycles so far.
    cycles: u64,
    seq: u64,
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
                    CHUNK,
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
            CHUNK,
        )?;
        let end = w.growable_series(
            &format!("/{ENVELOPES}/end_time"),
            "s",
            "end of the cycle",
            CHUNK,
        )?;
        let n = steps.len();
        Ok(Envelopes {
            plan,
            time_col: steps.iter().position(|&x| x == Step::Time).unwrap_or(0),
            handles,
            start,
            end,
            min: vec![f64::INFINITY; n],
            max: vec![f64::NEG_INFINITY; n],
            sq: vec![0.0; n],
            last: Vec::with_capacity(n),
            cycle_start_s: 0.0,
            cur: Vec::new(),
            cur_event: false,
            cur_late: false,
            cur_kinds: EventSet::EMPTY,
            cur_forced: false,
            prev: None,
            late: Vec::with_capacity(LATE_CYCLES + 1),
            spare: Vec::new(),
            seen: [0; EventKind::ALL.len()],
            written_to_s: f64::NEG_INFINITY,
            cycles: 0,
            seq: 0,
            row_len: n,
        })
    }

    /// Folds one step's row in, with the events of the step; `closes_cycle` when the step
    /// ends a complete cycle. Rows to be kept are passed to `write` in time order.
    pub fn add(
        &mut self,
        row: &[f64],
        closes_cycle: bool,
        events: EventSet,
        mut write: impl FnMut(&[f64]) -> Result<(), OutputError>,
    ) -> Result<(), OutputError> {
        let t = row[self.time_col];
        if self.last.is_empty() {
            // The run's first step, or the first after a jump over cycles.
            self.cycle_start_s = t;
            self.begin(row);
        } else {
            let dt = t - self.last[self.time_col];
            // Zipped slices of one length: no bounds checks, so the loop vectorises (each
            // value's arithmetic is the same, in the same order).
            let n = row.len();
            let (min, max, sq) = (&mut self.min[..n], &mut self.max[..n], &mut self.sq[..n]);
            for ((((lo, hi), q), &x), &y) in min
                .iter_mut()
                .zip(max.iter_mut())
                .zip(sq.iter_mut())
                .zip(row)
                .zip(&self.last[..n])
            {
                *lo = lo.min(x);
                *hi = hi.max(x);
                *q += 0.5 * dt * (x * x + y * y);
            }
        }
        self.note(events);
        self.cur.extend_from_slice(row);
        self.last.clear();
        self.last.extend_from_slice(row);
        if self.cur.len() >= MAX_BUFFERED_VALUES {
            if let Some(mut p) = self.prev.take() {
                p.keep = true;
                self.decide(p, &mut write)?;
            }
            self.flush_late(&mut write)?;
            let cur = std::mem::take(&mut self.cur);
            self.write(&cur, &mut write)?;
            self.cur = cur;
            self.cur.drain(..self.cur.len() - self.row_len);
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

    /// Counts the step's events for the current cycle.
    fn note(&mut self, events: EventSet) {
        for k in events.iter() {
            if self.cur_kinds.contains(k) {
                continue;
            }
            self.cur_kinds.insert(k);
            let seen = &mut self.seen[k as usize];
            *seen += 1;
            if k == EventKind::StageStart || *seen <= self.plan.event_windows {
                self.cur_event = true;
            } else if self.plan.event_windows > 0 {
                self.cur_late = true;
            }
        }
    }

    /// The run jumped over whole cycles (`numerics.multiscale`) at a cycle's end: the cycle
    /// begun by that end's step is dropped, so no envelope spans the jump; the next step
    /// begins a cycle as the run's first step does. The cycle before the jump is decided
    /// on what it holds itself (an event after the jump does not reach back across it).
    pub fn jump(
        &mut self,
        mut write: impl FnMut(&[f64]) -> Result<(), OutputError>,
    ) -> Result<(), OutputError> {
        if let Some(p) = self.prev.take() {
            self.decide(p, &mut write)?;
        }
        self.last.clear();
        self.cur.clear();
        self.cur_forced = false;
        self.cur_event = false;
        self.cur_late = false;
        self.cur_kinds = EventSet::EMPTY;
        self.seq += 1;
        Ok(())
    }

    fn begin(&mut self, row: &[f64]) {
        self.min.copy_from_slice(row);
        self.max.copy_from_slice(row);
        self.sq.fill(0.0);
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
            h[0].push(self.min[k])?;
            h[1].push(self.max[k])?;
            h[2].push(rms)?;
        }
        self.start.push(self.cycle_start_s)?;
        self.end.push(t)?;
        let (prev_event, prev_late_event) = self
            .prev
            .as_ref()
            .map_or((false, false), |p| (p.event, p.late_event));
        let rows = std::mem::replace(&mut self.cur, self.spare.pop().unwrap_or_default());
        let closed = Closed {
            rows,
            seq: self.seq,
            keep: self.cycles < self.plan.detail_cycles
                || t > self.plan.detail_from_s
                || self.cur_event
                || prev_event
                || self.cur_forced,
            late: self.cur_late || prev_late_event,
            event: self.cur_event,
            late_event: self.cur_late,
        };
        if let Some(mut p) = self.prev.take() {
            // The cycle before an event is part of its window.
            p.keep |= closed.event;
            p.late |= closed.late_event;
            self.decide(p, write)?;
        }
        self.prev = Some(closed);
        self.cur.clear();
        self.cur_event = false;
        self.cur_late = false;
        self.cur_kinds = EventSet::EMPTY;
        self.cur_forced = false;
        self.cycles += 1;
        self.seq += 1;
        self.cycle_start_s = t;
        Ok(())
    }

    /// Writes, holds back or drops a decided cycle.
    fn decide(
        &mut self,
        c: Closed,
        write: &mut impl FnMut(&[f64]) -> Result<(), OutputError>,
    ) -> Result<(), OutputError> {
        if c.keep {
            self.flush_late(write)?;
            self.write(&c.rows, write)?;
            self.recycle(c);
        } else if c.late {
            // A newer late window replaces an older one that is not its neighbour.
            if self.late.last().is_some_and(|l| l.seq + 1 != c.seq) {
                for l in std::mem::take(&mut self.late) {
                    self.recycle(l);
                }
            }
            self.late.push(c);
            if self.late.len() > LATE_CYCLES {
                let oldest = self.late.remove(0);
                self.recycle(oldest);
            }
        } else {
            self.recycle(c);
        }
        Ok(())
    }

    /// Writes the held-back late cycles (a kept cycle follows them).
    fn flush_late(
        &mut self,
        write: &mut impl FnMut(&[f64]) -> Result<(), OutputError>,
    ) -> Result<(), OutputError> {
        for l in std::mem::take(&mut self.late) {
            self.write(&l.rows, write)?;
            self.recycle(l);
        }
        Ok(())
    }

    fn recycle(&mut self, mut c: Closed) {
        c.rows.clear();
        self.spare.push(c.rows);
    }

    /// Writes the rows of `buf` later than the last row written.
    fn write(
        &mut self,
        buf: &[f64],
        write: &mut impl FnMut(&[f64]) -> Result<(), OutputError>,
    ) -> Result<(), OutputError> {
        for r in buf.chunks(self.row_len) {
            let t = r[self.time_col];
            if t > self.written_to_s {
                write(r)?;
                self.written_to_s = t;
            }
        }
        Ok(())
    }

    /// Writes the steps after the last complete cycle (always kept) at the end of the run,
    /// after the last complete cycle's decision.
    pub fn finish(
        &mut self,
        mut write: impl FnMut(&[f64]) -> Result<(), OutputError>,
    ) -> Result<(), OutputError> {
        if let Some(p) = self.prev.take() {
            self.decide(p, &mut write)?;
        }
        self.flush_late(&mut write)?;
        let cur = std::mem::take(&mut self.cur);
        self.write(&cur, &mut write)?;
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::collections::BTreeSet;

    /// Feeds `cycles` cycles of 4 steps (1 s each) with the events `at(cycle)` on each
    /// cycle's second step; returns the cycles with a step inside them that were written,
    /// and checks that every row was written once, in time order.
    fn kept(cycles: u64, plan: EnvelopePlan, at: impl Fn(u64) -> EventSet) -> BTreeSet<u64> {
        let dir = tempfile::tempdir().unwrap();
        let mut w = H5Writer::create(dir.path().join("e.h5")).unwrap();
        let steps = [Step::Time, Step::WellHead];
        let mut env = Envelopes::create(&mut w, &steps, plan).unwrap();
        let mut written: Vec<f64> = Vec::new();
        for c in 0..cycles {
            for k in 1..=4u64 {
                let t = (4 * c + k) as f64;
                let events = if k == 2 { at(c) } else { EventSet::EMPTY };
                env.add(&[t, t.sin()], k == 4, events, |r| {
                    written.push(r[0]);
                    Ok(())
                })
                .unwrap();
            }
        }
        env.finish(|r| {
            written.push(r[0]);
            Ok(())
        })
        .unwrap();
        assert!(written.windows(2).all(|p| p[0] < p[1]), "{written:?}");
        // A row at 4c + 1..=4c + 3 lies inside cycle c.
        written
            .iter()
            .filter(|&&t| t as u64 % 4 != 0)
            .map(|&t| t as u64 / 4)
            .collect()
    }

    fn one(k: EventKind) -> EventSet {
        let mut s = EventSet::EMPTY;
        s.insert(k);
        s
    }

    /// A warning in every cycle from 10 to 20 and a stage start in cycle 30, 40 cycles,
    /// 2 detail cycles, 1 event window: the first 2 and last 2 cycles, the first warning
    /// cycle with one each side, the last late window (cycles 19–21: the warning of
    /// cycle 20 and its neighbours) written before the stage start's window, and that
    /// window — the rule of docs/formats.md "Events", worked by hand.
    #[test]
    fn late_windows_are_written_before_the_next_kept_cycles() {
        let plan = EnvelopePlan {
            detail_cycles: 2,
            detail_from_s: 4.0 * 38.0,
            event_windows: 1,
        };
        let got = kept(40, plan.clone(), |c| match c {
            10..=20 => one(EventKind::GrainReynolds),
            30 => one(EventKind::StageStart),
            _ => EventSet::EMPTY,
        });
        let expected: BTreeSet<u64> = [0, 1, 9, 10, 11, 19, 20, 21, 29, 30, 31, 38, 39].into();
        assert_eq!(got, expected);
        // No event window at all with 0; the stage start keeps its own.
        let none = EnvelopePlan {
            event_windows: 0,
            ..plan
        };
        let got = kept(40, none, |c| match c {
            10..=20 => one(EventKind::GrainReynolds),
            30 => one(EventKind::StageStart),
            _ => EventSet::EMPTY,
        });
        assert_eq!(got, [0, 1, 29, 30, 31, 38, 39].into());
    }

    /// The run-size estimate's bound on the kept cycles (`crate::cost::KeptCycles`,
    /// docs/formats.md "Run size") holds whatever the events: 300 runs of pseudo-random
    /// events of 4 kinds (each kind in a cycle with a probability from 0.02 to 0.6) and
    /// stage starts, 20 to 119 cycles, 1 to 3 detail cycles, 0 to 3 event windows.
    #[test]
    fn kept_cycles_stay_within_the_size_estimates_bound() {
        let kinds = [
            EventKind::SlotVelocity,
            EventKind::GrainReynolds,
            EventKind::ColumnParting,
            EventKind::CakeChange,
        ];
        // xorshift64 (Marsaglia 2003): reproducible draws, no dependency.
        let mut x = 0x2545_f491_4f6c_dd1d_u64;
        let mut draw = move || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            (x >> 11) as f64 / (1u64 << 53) as f64
        };
        let mut tightest = 0.0_f64;
        for trial in 0..300u64 {
            let cycles = 20 + trial % 100;
            let detail = 1 + trial % 3;
            let windows = trial % 4;
            let p = 0.02 + 0.58 * draw();
            let mut stage_starts = 0.0;
            let table: Vec<EventSet> = (0..cycles)
                .map(|_| {
                    let mut s = EventSet::EMPTY;
                    for k in kinds {
                        if draw() < p {
                            s.insert(k);
                        }
                    }
                    if draw() < 0.03 {
                        s.insert(EventKind::StageStart);
                        stage_starts += 1.0;
                    }
                    s
                })
                .collect();
            let plan = EnvelopePlan {
                detail_cycles: detail,
                detail_from_s: 4.0 * (cycles - detail) as f64,
                event_windows: windows,
            };
            let got = kept(cycles, plan, |c| table[c as usize]).len() as f64;
            let bound = crate::cost::KeptCycles::new(
                cycles as f64,
                detail,
                stage_starts,
                kinds.len(),
                windows,
                false,
            )
            .kept;
            assert!(
                got <= bound,
                "trial {trial}: {got} cycles kept, bound {bound} ({cycles} cycles, \
                 {detail} detail, {windows} windows, {stage_starts} stage starts, p {p:.2})"
            );
            if bound < cycles as f64 {
                tightest = tightest.max(got / bound);
            }
        }
        // The draws reach the bound's neighbourhood somewhere (the test exercises it).
        assert!(tightest > 0.5, "largest kept / bound {tightest}");
    }

    /// Two kinds count apart: each keeps its own first windows; an isolated late event
    /// keeps its whole window (3 cycles) before the closing cycles.
    #[test]
    fn each_kind_has_its_own_first_windows() {
        let plan = EnvelopePlan {
            detail_cycles: 1,
            detail_from_s: 4.0 * 49.0,
            event_windows: 1,
        };
        let got = kept(50, plan, |c| match c {
            5 | 25 => one(EventKind::SlotVelocity),
            15 => one(EventKind::ColumnParting),
            40 => one(EventKind::ColumnParting),
            _ => EventSet::EMPTY,
        });
        let expected: BTreeSet<u64> = [0, 4, 5, 6, 14, 15, 16, 39, 40, 41, 49].into();
        assert_eq!(got, expected);
    }
}
