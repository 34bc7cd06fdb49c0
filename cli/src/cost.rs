//! What a run will cost, before it starts: steps, cells, estimated wall time and output
//! size. `check` prints it; `run` and `sweep` refuse a run over [`MAX_CELL_STEPS`] or
//! [`MAX_OUTPUT_BYTES`] unless `--allow-large` is given.
//!
//! The step count is an upper bound from the user's step settings
//! ([`boreflux_solver::cost`]); the time and size follow from it with the per-step figures
//! below, so they are upper estimates too.

use crate::case::LoadedCase;
use crate::case::Storage;
use crate::output::envelope::MAX_BUFFERED_VALUES;
use anyhow::anyhow;
use boreflux_solver::cost::{estimate, possible_events};

/// Largest run accepted without `--allow-large`, in cells × steps. Assumption: at the
/// measured rate below this is a few minutes of computing.
pub const MAX_CELL_STEPS: f64 = 5e8;
use boreflux_solver::model::Multiscale;

/// Largest output accepted without `--allow-large`, bytes (HDF5 and CSV together).
/// Assumption: 2 GB.
pub const MAX_OUTPUT_BYTES: f64 = 2e9;
/// Wall time per cell-step with all diagnostics and output, s. Measured on the
/// development machine (2-core virtual machine) with the shipped demo cases: 100 to
/// 180 ns; the upper figure is used.
const SECONDS_PER_CELL_STEP: f64 = 180e-9;
/// Series written per reported step (the output schema's per-step entries).
fn series_per_row() -> f64 {
    crate::output::schema::Step::all().len() as f64
}
/// Bytes per reported step in the CSV file: one column of up to 24 characters per series
/// (`-1.2345678901234567e-300,`).
fn csv_bytes_per_row() -> f64 {
    series_per_row() * 25.0
}
/// Size of the compressed series against 8 bytes a value (shuffle + deflate, level 1).
/// Measured: a 30-minute surge-block run, 12.56 MB against 26.0 MB uncompressed (0.48) at
/// level 4, and 0.49 on the recorded surge run at level 1; the upper figure 0.55 allows
/// for series that compress less.
const COMPRESSED_FRACTION: f64 = 0.55;

/// Bytes of `datasets` datasets of `values` 8-byte values each, in chunks of `chunk`
/// values: compressed once a dataset fills its first chunk, written whole and uncompressed
/// below that; a small chunk's last one is stored whole and uncompressed, counted here as
/// one more chunk (`output/h5.rs`, docs/formats.md).
fn stored_bytes(datasets: f64, values: f64, chunk: usize) -> f64 {
    if values < chunk as f64 {
        return 8.0 * datasets * values;
    }
    let last = if 8 * chunk <= crate::output::h5::UNFILTERED_LAST_CHUNK_BYTES {
        8.0 * chunk as f64
    } else {
        0.0
    };
    datasets * (COMPRESSED_FRACTION * 8.0 * values + last)
}
/// Fixed part of an HDF5 file: grid, attributes, cycle tables, headers. Measured
/// (2026-12-04): the shipped cases cut to 1 s of simulated time write 99 to 199 kB; 0.5 MB
/// allows for longer cycle tables and the case text (assumption).
const H5_FIXED_BYTES: f64 = 0.5e6;
/// Headers of the `/jumps` group's five datasets (assumption: 8 kB bounds them; an empty
/// group measured about 2 kB more than a file without it).
const JUMPS_FIXED_BYTES: f64 = 8e3;

/// What the size estimate of an envelope run assumes (`output.store` "envelopes",
/// docs/formats.md "Storage choice" and "Events").
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct KeptCycles {
    /// Cycles of the run: its duration over the drive's period, rounded up.
    pub cycles: f64,
    /// `output.detail_cycles`: kept at the start and at the end.
    pub detail_cycles: u64,
    /// Stage starts (stages after the first), each kept with one cycle each side.
    pub stage_starts: f64,
    /// Event kinds the run can raise ([`boreflux_solver::cost::possible_events`]).
    pub event_kinds: usize,
    /// `output.event_windows`.
    pub event_windows: u64,
    /// Upper bound on the cycles the event windows add.
    pub event_cycles: f64,
    /// Upper bound on the cycles kept step by step, all reasons together (at most
    /// `cycles`).
    pub kept: f64,
    /// A cycle may hold more values than the envelope writer buffers (4 000 000 values,
    /// `output::envelope`): such a cycle is written through in full, so every step counts.
    pub long_cycles: bool,
}

impl KeptCycles {
    /// The bound: the first and last `detail_cycles`; 3 cycles around each stage start;
    /// 3 cycles around each of the first `event_windows` cycles holding each kind that can
    /// occur; and, when `event_windows` > 0, one late window of 3 cycles before each kept
    /// stretch but the first (a stretch begins at most at each of those windows and at the
    /// closing cycles). Every window is counted whole, as if none overlapped another: the
    /// events are not known before the run.
    pub(crate) fn new(
        cycles: f64,
        detail_cycles: u64,
        stage_starts: f64,
        event_kinds: usize,
        event_windows: u64,
        long_cycles: bool,
    ) -> Self {
        let windows = event_kinds as f64 * event_windows as f64;
        let late = if event_windows > 0 {
            3.0 * (windows + stage_starts + 1.0)
        } else {
            0.0
        };
        let event_cycles = 3.0 * windows + late;
        let kept = if long_cycles {
            cycles
        } else {
            (2.0 * detail_cycles as f64 + 3.0 * stage_starts + event_cycles).min(cycles)
        };
        KeptCycles {
            cycles,
            detail_cycles,
            stage_starts,
            event_kinds,
            event_windows,
            event_cycles,
            kept,
            long_cycles,
        }
    }
}

/// The estimate of one run.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RunCost {
    /// Upper bound on the steps.
    pub steps: f64,
    /// Cells of the grid.
    pub cells: f64,
    /// Steps × cells.
    pub cell_steps: f64,
    /// Estimated wall time, s.
    pub seconds: f64,
    /// Estimated output size (HDF5, and CSV when asked for), bytes.
    pub bytes: f64,
    /// For an envelope run, the cycles the size estimate counts as kept step by step.
    pub kept: Option<KeptCycles>,
}

/// Cost of running `case`, writing CSV too when `csv`, a head profile every
/// `snapshot_every` steps (0 = about 200 in all, as `run` does).
pub fn run_cost(case: &LoadedCase, csv: bool, snapshot_every: u64) -> RunCost {
    let c = estimate(&case.model);
    let (rows, envelope_bytes, kept) = match case.storage {
        Storage::Steps => (
            (c.steps / case.output_every.max(1) as f64).ceil(),
            0.0,
            None,
        ),
        Storage::Envelopes {
            period_s,
            detail_cycles,
            event_windows,
        } => {
            let cycles = (case.model.duration_s / period_s).ceil().max(1.0);
            let long_cycles = c.steps / cycles * series_per_row() >= MAX_BUFFERED_VALUES as f64;
            let stages = match &case.model.drive {
                boreflux_solver::drive::Drive::Schedule(s) => s.len() as f64,
                _ => 1.0,
            };
            let k = KeptCycles::new(
                cycles,
                detail_cycles,
                stages - 1.0,
                possible_events(&case.model, &crate::summary::watch_limits(case))
                    .iter()
                    .count(),
                event_windows,
                long_cycles,
            );
            // Min, max and RMS of every series but time, and the two cycle times.
            let envelopes = 3.0 * (series_per_row() - 1.0) + 2.0;
            // The kept cycles at the mean steps of a cycle.
            let rows = if long_cycles {
                c.steps
            } else {
                c.steps * k.kept / cycles
            };
            (
                rows,
                stored_bytes(envelopes, cycles, crate::output::envelope::CHUNK),
                Some(k),
            )
        }
    };
    let snapshots = if snapshot_every == 0 {
        c.steps.min(201.0)
    } else {
        (c.steps / snapshot_every as f64).ceil()
    };
    let mut bytes = H5_FIXED_BYTES
        + stored_bytes(series_per_row(), rows, crate::output::sink::CHUNK)
        + envelope_bytes
        + stored_bytes(
            1.0,
            snapshots * c.cells,
            crate::output::h5::MATRIX_CHUNK_BYTES / 8,
        );
    // The steps are those of full stepping, an upper bound when cycles are jumped over;
    // the `/jumps` group adds its headers and at most one jump per five cycles of five
    // 8-byte values.
    if let (Multiscale::Auto { .. }, Some(p)) =
        (case.model.numerics.multiscale, case.model.drive.period_s())
    {
        bytes += JUMPS_FIXED_BYTES + 8.0 * case.model.duration_s / p;
    }
    if csv {
        bytes += rows * csv_bytes_per_row();
    }
    RunCost {
        steps: c.steps,
        cells: c.cells,
        cell_steps: c.cell_steps,
        seconds: c.cell_steps * SECONDS_PER_CELL_STEP,
        bytes,
        kept,
    }
}

/// A duration for people: s, min, h or d.
pub fn show_seconds(s: f64) -> String {
    if s < 120.0 {
        format!("{s:.1} s")
    } else if s < 7200.0 {
        format!("{:.0} min", s / 60.0)
    } else if s < 172_800.0 {
        format!("{:.1} h", s / 3600.0)
    } else {
        format!("{:.3e} d", s / 86_400.0)
    }
}

/// A size for people: kB, MB, GB.
pub fn show_bytes(b: f64) -> String {
    if b < 1e6 {
        format!("{:.0} kB", b / 1e3)
    } else if b < 1e9 {
        format!("{:.1} MB", b / 1e6)
    } else if b < 1e12 {
        format!("{:.1} GB", b / 1e9)
    } else {
        format!("{:.3e} GB", b / 1e9)
    }
}

/// One line for `check` and for refusals.
pub fn describe(c: &RunCost) -> String {
    format!(
        "up to about {:.3e} steps on {} cells ({:.3e} cell-steps), about {} of computing, about {} \
         of output",
        c.steps,
        c.cells,
        c.cell_steps,
        show_seconds(c.seconds),
        show_bytes(c.bytes)
    )
}

/// What the size estimate of an envelope run counts as kept step by step, for `check`
/// (None for every-step storage).
pub fn describe_kept(c: &RunCost) -> Option<String> {
    let k = c.kept?;
    let mut t = format!(
        "the size counts the envelopes of {:.0} cycles and every step of at most {:.0} of \
         them: the first and last {} (output.detail_cycles)",
        k.cycles, k.kept, k.detail_cycles
    );
    if k.stage_starts > 0.0 {
        t += &format!(", 3 around each of {:.0} stage starts", k.stage_starts);
    }
    if k.event_windows > 0 {
        t += &format!(
            ", and for the events, whose number is not known before the run, an upper bound \
             of {:.0} cycles: 3 around each of the first {} cycles holding each of the {} \
             kinds this case can raise (output.event_windows), and one late window of 3 \
             before each kept stretch",
            k.event_cycles, k.event_windows, k.event_kinds
        );
    } else {
        t += " (output.event_windows 0: no event windows)";
    }
    if k.long_cycles {
        t += &format!(
            "; a cycle may hold more than {MAX_BUFFERED_VALUES} values, and such a cycle is \
             written in full: every cycle counted"
        );
    } else if k.kept >= k.cycles {
        t += "; that is every cycle";
    }
    Some(t)
}

/// Refuses a run over the limits (unless `allow`), saying what to change.
pub fn refuse_large(c: &RunCost, allow: bool) -> Result<(), anyhow::Error> {
    if allow {
        return Ok(());
    }
    // NaN counts as over.
    let over_steps = c.cell_steps.is_nan() || c.cell_steps > MAX_CELL_STEPS;
    let over_bytes = c.bytes.is_nan() || c.bytes > MAX_OUTPUT_BYTES;
    if !(over_steps || over_bytes) {
        return Ok(());
    }
    let what = match (over_steps, over_bytes) {
        (true, true) => format!(
            "more than {MAX_CELL_STEPS:.0e} cell-steps and {} of output",
            show_bytes(MAX_OUTPUT_BYTES)
        ),
        (true, false) => format!("more than {MAX_CELL_STEPS:.0e} cell-steps"),
        _ => format!("more than {} of output", show_bytes(MAX_OUTPUT_BYTES)),
    };
    Err(anyhow!(
        "this run is too large: {}; that is {what}. Check duration, the drive's frequency \
         and time scales, numerics.time_step / steps_per_cycle and numerics.output_every; \
         pass --allow-large to run it anyway. Nothing was written",
        describe(c)
    ))
}
