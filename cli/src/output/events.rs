//! The events of a run (docs/formats.md, "Events"): what the solver raised in each step
//! (column partings, the suction and thrust limits, numerical alarms), the limits of the run
//! checks crossed (`assess::watch`), the stage starts of a schedule and the jumps of the
//! cake. Each is recorded with its time and cycle for `/events`, and handed to the
//! envelope writer, which keeps the cycles around it in full.

use super::h5::{H5Writer, SeriesHandle};
use super::schema::EventSeries;
use super::OutputError;
use boreflux_solver::assess::watch::{LimitWatch, Limits};
use boreflux_solver::{EventKind, EventSet, Model, StepValues};
use hdf5::types::VarLenUnicode;

/// Events per chunk of the `/events` series (compressed like the series).
const CHUNK: usize = 4096;

/// Change of the cake's cover or thickness within one step, relative to its starting
/// value, that counts as an event. Assumption: a lift-off patch or removal shows as a jump
/// of this size; the smooth erosion of a step is far smaller.
const CAKE_EVENT_FRACTION: f64 = 0.01;

/// What marks events, set up from the case.
#[derive(Debug, Clone)]
pub struct EventPlan {
    /// The model run (for the limits' formulas).
    pub model: Model,
    /// The run checks' limits.
    pub limits: Limits,
    /// Stage start times, s, ascending (0 left out).
    pub stage_starts_s: Vec<f64>,
}

/// The events of one run, streamed to `/events` in time order.
pub struct EventLog {
    watch: LimitWatch,
    stage_starts_s: Vec<f64>,
    next_stage: usize,
    last_time_s: f64,
    cake_ref: [f64; 2],
    /// Cover and thickness at the previous step; NaN at the first step and after a jump.
    last_cake: [f64; 2],
    cycle_now: u64,
    closing: Option<u64>,
    time: SeriesHandle,
    cycle: SeriesHandle<u64>,
    kind: SeriesHandle<u8>,
}

impl EventLog {
    /// Creates `/events` (the series, and the names of the kinds).
    pub fn create(w: &mut H5Writer, plan: EventPlan) -> Result<Self, OutputError> {
        w.group(&format!("/{}", EventSeries::GROUP))?;
        let names = EventKind::ALL
            .iter()
            .map(|k| k.name().parse::<VarLenUnicode>())
            .collect::<Result<Vec<_>, _>>()
            .map_err(|e| OutputError::Invalid {
                object: EventSeries::Kinds.path(),
                message: e.to_string(),
            })?;
        let e = EventSeries::Kinds.entry();
        w.write_vector(
            &EventSeries::Kinds.path(),
            &names,
            e.unit.symbol(),
            &e.description,
        )?;
        let (t, c, k) = (
            EventSeries::Time.entry(),
            EventSeries::Cycle.entry(),
            EventSeries::Kind.entry(),
        );
        Ok(EventLog {
            watch: LimitWatch::new(&plan.model, plan.limits),
            stage_starts_s: plan.stage_starts_s,
            next_stage: 0,
            last_time_s: 0.0,
            cake_ref: [f64::NAN; 2],
            last_cake: [f64::NAN; 2],
            cycle_now: 0,
            closing: None,
            time: w.growable_series(
                &EventSeries::Time.path(),
                t.unit.symbol(),
                &t.description,
                CHUNK,
            )?,
            cycle: w.growable_series_of::<u64>(
                &EventSeries::Cycle.path(),
                c.unit.symbol(),
                &c.description,
                CHUNK,
            )?,
            kind: w.growable_series_of::<u8>(
                &EventSeries::Kind.path(),
                k.unit.symbol(),
                &k.description,
                CHUNK,
            )?,
        })
    }

    /// A cycle ended (its last step is reported next).
    pub fn on_cycle(&mut self, index: u64) {
        self.closing = Some(index);
        self.cycle_now = index + 1;
    }

    /// The run jumped over cycles; the next step is in cycle `next_cycle`.
    pub fn on_jump(&mut self, next_cycle: u64) {
        self.cycle_now = next_cycle;
        self.last_cake = [f64::NAN; 2];
    }

    /// The events of a reported step, recorded.
    pub fn on_step(&mut self, s: &StepValues) -> Result<EventSet, OutputError> {
        let mut set = s.events.union(self.watch.check(s));
        let cake = [s.cake_coverage, s.cake_thickness_m];
        if self.cake_ref[0].is_nan() {
            self.cake_ref = cake.map(f64::abs);
        }
        let jumped = cake.iter().zip(&self.last_cake).zip(&self.cake_ref).any(
            |((now, before), reference)| {
                (now - before).abs() > CAKE_EVENT_FRACTION * reference.max(f64::MIN_POSITIVE)
            },
        );
        if jumped {
            set.insert(EventKind::CakeChange);
        }
        self.last_cake = cake;
        while let Some(&te) = self.stage_starts_s.get(self.next_stage) {
            if te > s.time_s {
                break;
            }
            if te > self.last_time_s {
                set.insert(EventKind::StageStart);
            }
            self.next_stage += 1;
        }
        self.last_time_s = s.time_s;
        let cycle = self.closing.take().unwrap_or(self.cycle_now);
        for k in set.iter() {
            self.time.append(&[s.time_s])?;
            self.cycle.append(&[cycle])?;
            self.kind.append(&[k as u8])?;
        }
        Ok(set)
    }
}
