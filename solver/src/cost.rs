//! Up-front cost of a run: an upper bound on the number of time steps and the cell-steps,
//! computed from the model without stepping, so that a run that would take days or fill a
//! disk can be refused before it starts.
//!
//! The bound follows the step choice: the user's step (fixed, or a period over the steps
//! per cycle) is an upper bound on every step, so
//! `ceil(interval / step)` steps fill each interval between the drive's breakpoints; every
//! breakpoint adds at most one landing step, and every jump `startup_steps` more (each
//! start-up step is two half steps). Geometric steps (non-periodic drives) restart at every
//! breakpoint: from a first step d₀ growing by r = 10^(1/n) once `t (r − 1) > d₀`, an interval
//! of length L takes at most `1/(r−1) + ln(L (r−1)/d₀)/ln r + 1` steps. Periodic drives are
//! walked over one period and the count multiplied by the number of periods. Under the
//! adaptive scheme (the default) that count is multiplied by an allowance
//! (`ADAPTIVE_FACTOR`) for its restarts and refinements: measured, not a proof.

use crate::assess::watch::Limits;
use crate::diagnostics::{EventKind, EventSet};
use crate::drive::Drive;
use crate::model::{Model, Scheme, TimeSpec};
use crate::run::{default_first_step, DEFAULT_STEPS_PER_CYCLE, DEFAULT_STEPS_PER_DECADE};

/// Breakpoints walked one by one before the rest of an interval is extrapolated.
const WALK_CAP: usize = 1_000_000;

/// The estimate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Cost {
    /// Cells of the grid.
    pub cells: f64,
    /// Upper bound on the time steps.
    pub steps: f64,
    /// `cells × steps`.
    pub cell_steps: f64,
}

/// How steps are chosen over an interval.
#[derive(Debug, Clone, Copy)]
enum Mode {
    /// At most this long, s.
    Bounded(f64),
    /// Geometric from `first`, `per_decade` steps per decade of time since the last jump.
    Geometric { first: f64, per_decade: f64 },
}

fn interval_steps(len: f64, mode: Mode) -> f64 {
    if len <= 0.0 {
        return 0.0;
    }
    match mode {
        Mode::Bounded(dt) => (len / dt).ceil().max(1.0),
        Mode::Geometric { first, per_decade } => {
            let g = 10f64.powf(1.0 / per_decade) - 1.0;
            let knee = first / g;
            if len <= knee {
                (len / first).ceil().max(1.0)
            } else {
                (knee / first).ceil() + ((len / knee).ln() / (1.0 + g).ln()).ceil() + 1.0
            }
        }
    }
}

fn mode(model: &Model, period: Option<f64>) -> Mode {
    let geometric = |first: f64, per_decade: f64| Mode::Geometric { first, per_decade };
    match (model.numerics.time, period) {
        (TimeSpec::Fixed(dt), _) => Mode::Bounded(dt),
        (TimeSpec::StepsPerCycle(n), Some(p)) => Mode::Bounded(p / n as f64),
        (TimeSpec::Auto, Some(p)) => Mode::Bounded(p / DEFAULT_STEPS_PER_CYCLE as f64),
        (
            TimeSpec::StepsPerDecade {
                per_decade,
                first_step_s,
            },
            _,
        ) => geometric(first_step_s, per_decade),
        (_, None) => geometric(default_first_step(model), DEFAULT_STEPS_PER_DECADE),
    }
}

/// Allowance of the adaptive scheme over the nominal count. Its steps are bounded above by
/// the nominal step, but it restarts small after every breakpoint and refines where its
/// error estimate asks, so the nominal count is not a bound. Assumption, measured on the
/// shipped cases: at most 1.85 times the nominal count (a swab whose column rejoins with a
/// jump of the well head of several metres after every lift), the others within 1 %.
const ADAPTIVE_FACTOR: f64 = 2.0;

/// Steps over [0, end) of drive `d` (local time), walking its breakpoints.
fn walk(model: &Model, d: &Drive, end: f64, mode: Mode) -> f64 {
    let startup = model.numerics.startup_steps as f64;
    let mut t = 0.0;
    let mut steps = 0.0;
    for _ in 0..WALK_CAP {
        let eps = 1e-12 * end.max(1.0);
        match d
            .next_event_s(t + eps)
            .filter(|&(te, _)| te > t + eps && te < end - eps)
        {
            Some((te, jump)) => {
                steps += interval_steps(te - t, mode) + 1.0 + if jump { startup } else { 0.0 };
                t = te;
            }
            None => return steps + interval_steps(end - t, mode) + startup,
        }
    }
    // Too many breakpoints to walk: extrapolate at the rate seen so far.
    steps * end / t + startup
}

/// Upper bound on the steps of drive `d` over `duration` s.
fn segment(model: &Model, d: &Drive, duration: f64) -> f64 {
    let Some(p) = d.period_s() else {
        return walk(model, d, duration, mode(model, None));
    };
    let periodic = match d {
        Drive::Swab(s) if s.strokes > 0 => duration.min(s.strokes as f64 * p),
        Drive::PumpBackwash(b) if b.cycles > 0 => duration.min(b.cycles as f64 * p),
        Drive::Swab(_)
        | Drive::PumpBackwash(_)
        | Drive::SineHead(_)
        | Drive::ConstantRate { .. }
        | Drive::Slug { .. }
        | Drive::Table(_)
        | Drive::SurgeBlock(_)
        | Drive::JetPulse(_)
        | Drive::Schedule(_) => duration,
    };
    let per_period = walk(model, d, p.min(periodic), mode(model, Some(p)));
    let mut steps = per_period * (periodic / p).ceil();
    let rest = duration - periodic;
    if rest > 0.0 {
        steps += interval_steps(rest, mode(model, None)) + model.numerics.startup_steps as f64;
    }
    steps
}

/// Upper bound on the steps of a validated model, and its cells.
pub fn estimate(model: &Model) -> Cost {
    let steps = match &model.drive {
        Drive::Schedule(stages) => stages
            .iter()
            .map(|s| segment(model, &s.drive, s.duration_s) + 1.0)
            .sum(),
        d => segment(model, d, model.duration_s),
    } * scheme_factor(model);
    let cells = crate::grid::planned_cells(model);
    Cost {
        cells,
        steps,
        cell_steps: cells * steps,
    }
}

/// The kinds of event a run of `model` watched against `limits` can raise, stage starts left
/// out (one per stage after the first, known before the run). How many of them a run
/// raises, and when, is not known before it runs; this is the set an output-size bound
/// must allow for: the numerical alarms (`oscillation`, `smallest_step`) and
/// `slot_velocity` always; `grain_reynolds` with a pack grain size (the number needs it);
/// `collapse_load` with a collapse rating of the screen or the casing; `cake_change` with a
/// cake that has a removal law (lift-off or erosion: without one the cake never changes);
/// `column_parting` and `vapour_suction` under a sealed tool (surge block, swab: the only
/// devices with a vapour gap), `thrust_bound` under a surge block with a thrust bound,
/// `pump_suction` with a pump-and-backwash stage (docs/formats.md "Events").
pub fn possible_events(model: &Model, limits: &Limits) -> EventSet {
    let mut set = EventSet::EMPTY;
    for k in [
        EventKind::Oscillation,
        EventKind::SmallestStep,
        EventKind::SlotVelocity,
    ] {
        set.insert(k);
    }
    if model.pack.medium.grain_diameter_m.is_some() {
        set.insert(EventKind::GrainReynolds);
    }
    if limits.screen_rating_pa.is_some() || limits.casing_rating_pa.is_some() {
        set.insert(EventKind::CollapseLoad);
    }
    if model
        .cake
        .as_ref()
        .is_some_and(|c| c.erosion.is_some() || c.lift_off.is_some())
    {
        set.insert(EventKind::CakeChange);
    }
    for d in model.drive.stage_drives() {
        let own: &[EventKind] = match d {
            // Without `drive.max_thrust` the block's push has no bound to reach.
            Drive::SurgeBlock(b) if b.max_head_m().is_finite() => &[
                EventKind::ColumnParting,
                EventKind::VapourSuction,
                EventKind::ThrustBound,
            ],
            Drive::SurgeBlock(_) => &[EventKind::ColumnParting, EventKind::VapourSuction],
            Drive::Swab(_) => &[EventKind::ColumnParting, EventKind::VapourSuction],
            Drive::PumpBackwash(_) => &[EventKind::PumpSuction],
            Drive::SineHead(_)
            | Drive::ConstantRate { .. }
            | Drive::Slug { .. }
            | Drive::Table(_)
            | Drive::JetPulse(_)
            | Drive::Schedule(_) => &[],
        };
        for &k in own {
            set.insert(k);
        }
    }
    set
}

fn scheme_factor(model: &Model) -> f64 {
    match model.numerics.scheme {
        Scheme::Theta => 1.0,
        Scheme::TrBdf2 { .. } => ADAPTIVE_FACTOR,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Each conditional kind appears exactly when the watch that raises it can fire
    /// (`assess/watch.rs`, `cli/src/output/events.rs`): grain Reynolds number with a pack
    /// grain size, collapse load with a rating, cake change with a removal law.
    #[test]
    fn possible_events_follow_what_the_watches_need() {
        let names = |m: &Model, l: &Limits| -> Vec<&'static str> {
            possible_events(m, l).iter().map(EventKind::name).collect()
        };
        let none = Limits {
            grain_reynolds: 1.0,
            screen_rating_pa: None,
            casing_rating_pa: None,
            safety_factor: 2.0,
        };
        let mut m = crate::fixtures::demo_well();
        let always = ["oscillation", "smallest_step", "slot_velocity"];
        assert_eq!(names(&m, &none), always);
        m.pack.medium.grain_diameter_m = Some(1.5e-3);
        assert!(names(&m, &none).contains(&"grain_reynolds"));
        let rated = Limits {
            casing_rating_pa: Some(4e5),
            ..none
        };
        assert!(names(&m, &rated).contains(&"collapse_load"));
        m.cake = Some(crate::fixtures::cake(2e-3, 1e-7, 1.0));
        assert!(!names(&m, &none).contains(&"cake_change"));
        m.cake.as_mut().unwrap().erosion = Some(crate::fixtures::erosion(1e-6, 1.0));
        assert!(names(&m, &none).contains(&"cake_change"));
    }

    #[test]
    fn geometric_interval_counts_match_a_direct_walk() {
        // Direct walk of the rule dt = max(first, t (r − 1)) (the rule itself, no source
        // needed): the closed form must not undercount it.
        for (first, n, len) in [(1e-5, 40.0, 1e4), (1e-3, 10.0, 5.0), (0.1, 40.0, 0.05)] {
            let g = 10f64.powf(1.0 / n) - 1.0;
            let (mut t, mut k) = (0.0, 0.0);
            while t < len {
                t += f64::max(first, t * g).min(len - t);
                k += 1.0;
            }
            let est = interval_steps(
                len,
                Mode::Geometric {
                    first,
                    per_decade: n,
                },
            );
            assert!(
                est >= k && est <= k + 3.0,
                "{first} {n} {len}: {est} vs {k}"
            );
        }
    }
}
