//! The case's `output` section: how much of the run the result file keeps (docs/formats.md,
//! "Storage choice"). Every key is optional.

use super::error::CaseError;
use boreflux_solver::Model;
use schemars::JsonSchema;
use serde::Deserialize;
use serde_json::{json, Value};

pub use crate::output::envelope::DEFAULT_EVENT_WINDOWS;

/// Default cycles kept step by step at the start, at the end and around each event.
pub const DEFAULT_DETAIL_CYCLES: u64 = 10;
/// Largest run that "auto" stores step by step, in estimated steps: about 60 MB of series
/// before compression (30 series of 8 bytes), 30 MB after. Assumption: a file of that size is
/// still quick to open and plot; beyond it a periodic run keeps envelopes.
pub const AUTO_STEPS_LIMIT: f64 = 250_000.0;

/// What the result file keeps of the per-step series [all automatic].
#[derive(Debug, Default, Deserialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RawOutput {
    /// "steps": every reported step (every `numerics.output_every`-th); "envelopes": the
    /// minimum, maximum and RMS of every series over each complete drive cycle, with every
    /// step kept only for the first and last `detail_cycles` cycles and around events (a
    /// stage change, a jump of the cake's cover or thickness, a warning's moment, a column
    /// parting); "auto": steps while the run's
    /// estimated steps are at most 250 000, envelopes beyond for a periodic drive [auto].
    pub store: Option<StoreChoice>,
    /// Cycles kept step by step at the start and end of an "envelopes" run, and the
    /// cycles kept before and after each event (1 each side) [10].
    pub detail_cycles: Option<u64>,
    /// Cycles holding each kind of event (a warning's moment, a column parting, a jump of
    /// the cake) kept step by step with one cycle each side, the first ones of the run; a
    /// later one only as the last before the next kept cycles; 0 keeps none. Stage starts
    /// are always kept [3].
    pub event_windows: Option<u64>,
}

/// The storage choice as written.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize, JsonSchema)]
#[serde(rename_all = "snake_case")]
pub enum StoreChoice {
    /// Steps or envelopes by the run's size.
    Auto,
    /// Every reported step.
    Steps,
    /// Per-cycle envelopes with detail windows.
    Envelopes,
}

/// The storage choice of a loaded case.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Storage {
    /// Every reported step in `/series`.
    Steps,
    /// `/envelopes` per complete cycle; `/series` holds the detail windows.
    Envelopes {
        /// The drive's common period, s: the cycles the run closes (a drive without one
        /// gets no envelopes).
        period_s: f64,
        /// Cycles kept in full at the start and end.
        detail_cycles: u64,
        /// Cycles holding each kind of event kept in full (`output.event_windows`).
        event_windows: u64,
    },
}

/// Reads the section and resolves "auto" from the run's estimated steps; the resolved
/// section goes into the case's `case_json`.
pub fn storage(raw: Option<&RawOutput>, model: &Model) -> Result<(Storage, Value), CaseError> {
    let choice = raw.and_then(|r| r.store).unwrap_or(StoreChoice::Auto);
    let detail_cycles = raw
        .and_then(|r| r.detail_cycles)
        .unwrap_or(DEFAULT_DETAIL_CYCLES);
    if detail_cycles == 0 {
        return Err(CaseError::new(
            "output.detail_cycles",
            "must be at least 1 (the last cycles are always kept step by step)",
        ));
    }
    let event_windows = raw
        .and_then(|r| r.event_windows)
        .unwrap_or(DEFAULT_EVENT_WINDOWS);
    // Envelopes are per drive cycle, and the run closes cycles only on a common period: a
    // schedule whose stages have other periods (or none) closes none, so it gets none.
    let period = model.drive.period_s();
    let storage =
        match (choice, period) {
            (StoreChoice::Steps, _) => Storage::Steps,
            (StoreChoice::Envelopes, None) => return Err(CaseError::new(
                "output.store",
                "\"envelopes\" needs a periodic drive (a surge block, swab, pump-and-backwash, \
                 jetting, sine head or repeating table; a schedule only when every stage has \
                 the same period and lasts whole cycles of it); use \"steps\"",
            )),
            (StoreChoice::Envelopes, Some(period_s)) => Storage::Envelopes {
                period_s,
                detail_cycles,
                event_windows,
            },
            (StoreChoice::Auto, Some(period_s))
                if boreflux_solver::cost::estimate(model).steps > AUTO_STEPS_LIMIT =>
            {
                Storage::Envelopes {
                    period_s,
                    detail_cycles,
                    event_windows,
                }
            }
            (StoreChoice::Auto, _) => Storage::Steps,
        };
    let store = match storage {
        Storage::Steps => "steps",
        Storage::Envelopes { .. } => "envelopes",
    };
    Ok((
        storage,
        json!({ "store": store, "detail_cycles": detail_cycles, "event_windows": event_windows }),
    ))
}
