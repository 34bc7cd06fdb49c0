//! The events of a run (docs/formats.md, "Events"): what the solver raised in each step
//! (column partings, the suction and thrust limits, numerical alarms), the limits of the run
//! checks crossed (`assess::watch`), the stage starts of a schedule and the jumps of the
//! cake. Each is recorded with its time and cycle for `/events`, and handed to the
//! envelope writer, which keeps the cycles around it in full.

use super::h5::H5Writer;
use super::schema::EventSeries;
use super::OutputError;
use boreflux_solver::assess::watch::{LimitWatch, Limits};
use boreflux_solver::{EventKind, EventSet, Model, StepView};
use hdf5::types::VarLenUnicode;

/// Change of the cake's cover or thickness within one step, relative to its starting
/// value, that counts as an event. Assumption: a lift-off patch or removal shows as a jump
/// of this size; the smooth erosion of a step is far smaller.
const CAKE_EVENT_FRACTION: f64 = 0.01;

/// Events recorded in `/events` at most; beyond, they are counted (the `/events` group's
/// `unrecorded` attribute) and still mark detail windows. A run raises one event per rising
/// edge of a limit, a few per cycle: 10⁶ is about a hundred per cycle of an 8-hour run at
/// 20 strokes per minute (9 600 cycles), and at most 17 MB of memory.
pub const MAX_RECORDED: usize = 1_000_000;

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

/// The events of one run, in time order.
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
    time_s: Vec<f64>,
    cycle: Vec<u64>,
    kind: Vec<EventKind>,
    unrecorded: u64,
}

impl EventLog {
    /// An empty log.
    pub fn new(plan: EventPlan) -> Self {
        EventLog {
            watch: LimitWatch::new(&plan.model, plan.limits),
            stage_starts_s: plan.stage_starts_s,
            next_stage: 0,
            last_time_s: 0.0,
            cake_ref: [f64::NAN; 2],
            last_cake: [f64::NAN; 2],
            cycle_now: 0,
            closing: None,
            time_s: Vec::with_capacity(1024),
            cycle: Vec::with_capacity(1024),
            kind: Vec::with_capacity(1024),
            unrecorded: 0,
        }
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
    pub fn on_step(&mut self, s: &StepView<'_>) -> EventSet {
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
            if self.time_s.len() < MAX_RECORDED {
                self.time_s.push(s.time_s);
                self.cycle.push(cycle);
                self.kind.push(k);
            } else {
                self.unrecorded += 1;
            }
        }
        set
    }

    /// Writes `/events` (every series, empty when the run raised none).
    pub fn write(&self, w: &mut H5Writer) -> Result<(), OutputError> {
        w.group(&format!("/{}", EventSeries::GROUP))?;
        for series in EventSeries::ALL {
            let e = series.entry();
            let (path, unit) = (series.path(), e.unit.symbol());
            match series {
                EventSeries::Time => w.write_vector(&path, &self.time_s, unit, &e.description)?,
                EventSeries::Cycle => w.write_vector(&path, &self.cycle, unit, &e.description)?,
                EventSeries::Kind => {
                    let names = self
                        .kind
                        .iter()
                        .map(|k| k.name().parse::<VarLenUnicode>())
                        .collect::<Result<Vec<_>, _>>()
                        .map_err(|e| OutputError::Invalid {
                            object: path.clone(),
                            message: e.to_string(),
                        })?;
                    w.write_vector(&path, &names, unit, &e.description)?;
                }
            }
        }
        w.set_attr_f64(
            &format!("/{}", EventSeries::GROUP),
            "unrecorded",
            self.unrecorded as f64,
        )?;
        Ok(())
    }
}
