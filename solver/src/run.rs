//! The time loop: chooses steps, lands on sync times, events and cycle ends, advances the
//! slow state, watches every step, streams diagnostics to an observer and returns a summary
//! (docs/time-stepping.md).
//!
//! Nominal step (docs/physics.md §1.3, §10), the upper bound of every step:
//! - periodic drives: `steps_per_cycle` equal steps per period (default 200);
//! - other drives: geometric steps, Δt = max(Δt₀, t (10^{1/n} − 1)), n = 40 per decade;
//! - the stage active at t may cap it further (jet pulses).
//!
//! Default scheme, TR-BDF2 (`stepper/trbdf2.rs`): the step follows the local error estimate
//! with the usual controller Δt_new = Δt · clamp(0.9 err^{−1/3}, 0.2, 5) (Hairer & Wanner,
//! Solving ODEs II, §IV.8), capped by the nominal step; a step with err > 1 is undone and
//! retried shorter; a step whose solve fails (Newton, non-finite heads) is retried a quarter
//! as long, up to [`MAX_RETRIES`] times, before the run stops with an error saying where.
//! After t = 0 and every jump (forcing, abrupt change of the slow state) the next step is
//! [`RESTART_FRACTION`] of the nominal one.
//!
//! The θ-scheme (`numerics.scheme = theta`): nominal steps; after t = 0 and after every jump
//! the next `startup_steps` steps are each replaced by two backward-Euler half steps
//! (Rannacher 1984).

mod multiscale;
mod watch;

use crate::diagnostics::{
    face_state, power_now, CycleAccumulator, Edge, EventKind, EventSet, StepObserver, StepValues,
    StepView,
};
use crate::error::SolverError;
use crate::grid::ZONE_COUNT;
use crate::model::{Model, Scheme, TimeSpec};
use crate::slow::{Change, SkinParts, SlowState};
use crate::stepper::{left_limit, Stepper, Tolerances};
use crate::water::GRAVITY_M_S2;
use std::f64::consts::PI;
use watch::{check_finite, Alternation};

pub use crate::slow::total_skin;

/// Failed solves of one step retried with a quarter of the step before the run gives up
/// (4⁻¹² ≈ 6e−8 of the first try).
pub const MAX_RETRIES: usize = 12;
/// Steps in a row the error control may reject before the run gives up.
pub const MAX_REJECTIONS: usize = 60;
/// First step after t = 0 or a jump, as a fraction of the nominal step (assumption: the
/// error control grows it fivefold per step, so about three steps reach the nominal one).
pub const RESTART_FRACTION: f64 = 1e-2;
/// Steps shorter than this fraction of the duration (and of 1 s) are accepted whatever
/// their error estimate, counted and reported (round-off of the clock).
const SMALLEST_STEP: f64 = 1e-12;

/// The push of a surge block on its downstroke over a run (docs/devices.md §2).
#[derive(Debug, Default)]
struct BlockPush {
    /// Highest head under the block, m.
    peak_head_m: f64,
    /// Area of the block there, m².
    area_m2: f64,
    /// Whether the block's thrust was bounded (`drive.max_thrust`).
    bounded: bool,
    /// Time the block was held at its thrust bound, s.
    stalled_s: f64,
    /// That bound, m.
    bound_m: f64,
}

impl BlockPush {
    /// The run's warning on the block's downstroke thrust, if any.
    fn warn(&self, model: &Model, warnings: &mut Vec<String>) {
        if self.peak_head_m <= 0.0 {
            return;
        }
        let thrust_n = model.fluid.density_kg_m3 * GRAVITY_M_S2 * self.peak_head_m * self.area_m2;
        if self.bounded && self.stalled_s > 0.0 {
            warnings.push(format!(
                "the surge block reached its downstroke thrust (drive.max_thrust) for {:.3} s in \
                 all: the head under it was held at {:.2} m and the block lagged its stroke; \
                 the stroke delivered less than its displacement",
                self.stalled_s, self.bound_m
            ));
        } else if !self.bounded {
            warnings.push(format!(
                "the downstroke pushed the head under the surge block up to {:.2} m, a thrust \
                 of {:.3} kN on the block (density x g x head x block area); a block worked on \
                 a cable pushes only with its own and the string's weight in water: if that is \
                 less, give drive.max_thrust, or the push and the outward flow are overstated",
                self.peak_head_m,
                thrust_n / 1e3
            ));
        }
    }
}

/// Default steps per period for periodic drives (numerical choice, assumption: with the
/// adaptive error control on top, docs/time-stepping.md).
pub const DEFAULT_STEPS_PER_CYCLE: usize = 200;
/// Default steps per decade of time for non-periodic drives (numerical choice, assumption, as
/// above).
pub const DEFAULT_STEPS_PER_DECADE: f64 = 40.0;

/// Headline results of a run.
#[derive(Debug, Clone, PartialEq)]
pub struct RunSummary {
    /// Steps taken.
    pub steps: u64,
    /// Complete cycles of a periodic drive (computed and skipped).
    pub cycles: u64,
    /// Cycles jumped over, not computed (`numerics.multiscale`).
    pub skipped_cycles: u64,
    /// Jumps over cycles (`numerics.multiscale`).
    pub jumps: u64,
    /// Cells of the grid.
    pub cells: usize,
    /// Outer radius used, m.
    pub outer_radius_m: f64,
    /// Final time, s.
    pub end_time_s: f64,
    /// Largest outward face flux, m/s.
    pub peak_outward_flux_m_s: f64,
    /// Largest inward face flux (magnitude), m/s.
    pub peak_inward_flux_m_s: f64,
    /// RMS face flux over the run, m/s.
    pub rms_face_flux_m_s: f64,
    /// Largest shear proxy, Pa.
    pub peak_shear_pa: f64,
    /// Largest screen flow magnitude, m³/s.
    pub peak_screen_flow_m3_s: f64,
    /// Work dissipated per zone over the run, J.
    pub work_j: [f64; ZONE_COUNT],
    /// Energy delivered through the screen, J.
    pub energy_in_j: f64,
    /// Elastic storage energy at the end, J.
    pub storage_energy_j: f64,
    /// Numerical dissipation of the backward-Euler steps, J.
    pub numerical_dissipation_j: f64,
    /// Largest per-step relative volume residual.
    pub max_mass_residual: f64,
    /// Largest per-step relative volume residual beyond the step's round-off
    /// (`StepBalance::mass_excess`).
    pub max_mass_excess: f64,
    /// Largest per-step relative volume residual of the well node.
    pub max_well_residual: f64,
    /// Gross volume the device moved (Σ|displacement| Δt), m³.
    pub gross_device_volume_m3: f64,
    /// Largest per-step relative energy residual.
    pub max_energy_residual: f64,
    /// Energy identity over the whole run: |in − dissipated − stored − numerical| / in.
    pub energy_closure: f64,
    /// Most Newton iterations in one solve (one stage of a TR-BDF2 step).
    pub max_newton_iterations: usize,
    /// Cake thickness at the start and at the end, m.
    pub cake_thickness_m: (f64, f64),
    /// Skin at the start and at the end, –.
    pub skin: (f64, f64),
    /// Skin by zone at the start and at the end.
    pub skin_parts: (SkinParts, SkinParts),
    /// First time the cake's skin was down to a tenth of its start, s.
    pub cake_removed_at_s: Option<f64>,
    /// Largest inward pressure difference across the cake, Pa.
    pub peak_cake_pressure_pa: f64,
    /// Fines in the invaded zone at the start, kg (0 without `invaded.fines`).
    pub fines_initial_kg: f64,
    /// Fines carried inward across the wall, kg.
    pub fines_removed_kg: f64,
    /// Fines carried outward beyond the invaded zone, kg.
    pub fines_pushed_out_kg: f64,
    /// Fines in the invaded zone at the end (deposited and mobile), kg.
    pub fines_in_place_kg: f64,
    /// Volume displaced into the well by the device (pumping, lifting, block), m³.
    pub device_volume_m3: f64,
    /// Volume leaked into the well node past the device, m³.
    pub bypass_volume_m3: f64,
    /// Net volume through the screen into the formation, m³.
    pub screen_volume_m3: f64,
    /// Change of water stored in the well node, m³.
    pub well_storage_change_m3: f64,
    /// Largest head by which the pack side of the screen exceeded the inside (the
    /// collapse direction), m; 0 if never.
    pub peak_collapse_head_m: f64,
    /// Largest head by which the inside exceeded the pack side of the screen, m.
    pub peak_burst_head_m: f64,
    /// Lowest and highest in-well head, m.
    pub well_head_range_m: (f64, f64),
    /// Times the water column under a sealed tool parted at the vapour bound.
    pub column_partings: u64,
    /// Time the column spent parted, s.
    pub parted_time_s: f64,
    /// Whether the observer stopped the run early.
    pub stopped_early: bool,
    /// Steps the error control rejected and retried shorter.
    pub rejected_steps: u64,
    /// Solves that failed (Newton, non-finite heads) and were retried with a shorter step.
    pub retried_solves: u64,
    /// Newton iterations over the run.
    pub total_newton_iterations: u64,
    /// Shortest accepted step, s.
    pub min_step_s: f64,
    /// Warnings that did not stop the run.
    pub warnings: Vec<String>,
    /// The well's slow state at the end (cake, and every damage the run removes): with the
    /// model, what a virtual test of the developed well starts from
    /// (`SlowState::snapshot_model`, `assess::assess`).
    pub final_state: SlowState,
}

/// How often the observer is called.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Reporting {
    /// Report every k-th step (and every sync time and the last step).
    pub every: u64,
}

impl Default for Reporting {
    fn default() -> Self {
        Reporting { every: 1 }
    }
}

/// Nominal step at time t; `since_jump` is the time since the last jump of the forcing
/// (geometric steps restart from it).
fn nominal_dt(model: &Model, t: f64, since_jump: f64) -> f64 {
    let period = model.drive.period_at(t);
    match (model.numerics.time, period) {
        (TimeSpec::Fixed(dt), _) => dt,
        (TimeSpec::StepsPerCycle(n), Some(p)) => p / n as f64,
        (TimeSpec::Auto, Some(p)) => p / DEFAULT_STEPS_PER_CYCLE as f64,
        (
            TimeSpec::StepsPerDecade {
                per_decade,
                first_step_s,
            },
            _,
        ) => first_step_s.max(since_jump * (10f64.powf(1.0 / per_decade) - 1.0)),
        (_, None) => {
            let first = default_first_step(model);
            first.max(since_jump * (10f64.powf(1.0 / DEFAULT_STEPS_PER_DECADE) - 1.0))
        }
    }
}

/// First step of the geometric sequence: 1e−8 of the duration, at least 1e−5 s.
pub fn default_first_step(model: &Model) -> f64 {
    (model.duration_s * 1e-8).max(1e-5)
}

/// Sorted sync times plus the drive's own events.
struct Clock {
    syncs: Vec<f64>,
    next_sync: usize,
    /// k = ⌊(t + ε)/P⌋ + 1 of the last call, the period that ends next: t never decreases,
    /// so k changes only when (t + ε)/P reaches it (0: not formed yet).
    period_count: f64,
}

impl Clock {
    fn new(model: &Model) -> Clock {
        let mut syncs: Vec<f64> = model
            .numerics
            .sync_times_s
            .iter()
            .copied()
            .filter(|&t| t > 0.0 && t <= model.duration_s)
            .collect();
        syncs.push(model.duration_s);
        syncs.sort_by(f64::total_cmp);
        syncs.dedup();
        Clock {
            syncs,
            next_sync: 0,
            period_count: 0.0,
        }
    }

    /// The next time the stepper must land on, and whether the forcing jumps there.
    fn next_target(&mut self, model: &Model, t: f64) -> (f64, bool) {
        let eps = 1e-12 * model.duration_s.max(1.0);
        while self.next_sync < self.syncs.len() && self.syncs[self.next_sync] <= t + eps {
            self.next_sync += 1;
        }
        let sync = self
            .syncs
            .get(self.next_sync)
            .copied()
            .unwrap_or(model.duration_s);
        let mut target = (sync, false);
        // Events are asked for just after t and must lie beyond it: a device whose period
        // is not exact in floating point could otherwise return t itself and stall the clock.
        if let Some((te, jump)) = model
            .drive
            .next_event_s(t + eps)
            .filter(|&(te, _)| te > t + eps)
        {
            if te < target.0 - eps {
                target = (te, jump);
            } else if (te - target.0).abs() <= eps {
                target.1 |= jump;
            }
        }
        if let Some(p) = model.drive.period_s() {
            let periods = (t + eps) / p;
            if periods >= self.period_count {
                self.period_count = periods.floor() + 1.0;
            }
            let end = self.period_count * p;
            if end < target.0 - eps {
                target = (end, false);
            }
        }
        target
    }
}

/// Runs the model, streaming diagnostics to `observer`.
pub fn run(
    model: &Model,
    observer: &mut dyn StepObserver,
    reporting: Reporting,
) -> Result<RunSummary, SolverError> {
    model.validate()?;
    let slow = SlowState::new(model);
    let st = Stepper::new(model, slow.cake());
    run_from_state(model, st, slow, observer, reporting)
}

/// Runs the model from a prepared state: `st` (heads, clock) and `slow` (the cake the faces
/// of `st` were built from), e.g. a steady state under one cake followed by a sudden change
/// of the cake (the verification of docs/time-stepping.md). The first step is a restart.
pub fn run_from_state(
    model: &Model,
    mut st: Stepper,
    mut slow: SlowState,
    observer: &mut dyn StepObserver,
    reporting: Reporting,
) -> Result<RunSummary, SolverError> {
    model.validate()?;
    // Inputs whose products overflow (a length of 1e308 m) leave the grid with infinite or
    // zero storage and conductances; say so before any step.
    for (quantity, values) in [
        ("storage of a grid cell", &st.disc.storage[1..]),
        ("radius of a grid face", &st.disc.grid.r_face[..]),
    ] {
        if let Some(&v) = values.iter().find(|v| !(v.is_finite() && **v > 0.0)) {
            return Err(SolverError::NonFiniteResult {
                quantity,
                value: v,
                time_s: 0.0,
                step: 0,
            });
        }
    }
    let used = st.disc.unknowns() - 1 + usize::from(st.disc.outer_open);
    for f in &st.disc.faces[..used] {
        let (r, q) = (f.r_lin(), f.r_nl());
        if !(r.is_finite() && q.is_finite() && r + q > 0.0) {
            return Err(SolverError::NonFiniteResult {
                quantity: "resistance of a grid face",
                value: if r.is_finite() { q } else { r },
                time_s: 0.0,
                step: 0,
            });
        }
    }
    let rho_g = model.fluid.density_kg_m3 * GRAVITY_M_S2;
    let n_unknowns = st.disc.unknowns();
    let mut clock = Clock::new(model);
    let cake0 = slow.cake_thickness_m().0;
    let skin0 = slow.skin().0;
    let mut summary = RunSummary {
        steps: 0,
        cycles: 0,
        skipped_cycles: 0,
        jumps: 0,
        cells: n_unknowns - 1,
        outer_radius_m: st.disc.grid.outer_radius_m(),
        end_time_s: 0.0,
        peak_outward_flux_m_s: 0.0,
        peak_inward_flux_m_s: 0.0,
        rms_face_flux_m_s: 0.0,
        peak_shear_pa: 0.0,
        peak_screen_flow_m3_s: 0.0,
        work_j: [0.0; ZONE_COUNT],
        energy_in_j: 0.0,
        storage_energy_j: 0.0,
        numerical_dissipation_j: 0.0,
        max_mass_residual: 0.0,
        max_mass_excess: 0.0,
        max_energy_residual: 0.0,
        max_well_residual: 0.0,
        gross_device_volume_m3: 0.0,
        energy_closure: 0.0,
        max_newton_iterations: 0,
        cake_thickness_m: (cake0, cake0),
        skin: (skin0, skin0),
        skin_parts: slow.skin_parts_now(),
        cake_removed_at_s: None,
        peak_cake_pressure_pa: 0.0,
        fines_initial_kg: slow
            .fines()
            .map_or(0.0, |f| f.initial_m3() * f.grain_density()),
        fines_removed_kg: 0.0,
        fines_pushed_out_kg: 0.0,
        fines_in_place_kg: 0.0,
        device_volume_m3: 0.0,
        bypass_volume_m3: 0.0,
        screen_volume_m3: 0.0,
        well_storage_change_m3: 0.0,
        peak_collapse_head_m: 0.0,
        peak_burst_head_m: 0.0,
        well_head_range_m: (f64::INFINITY, f64::NEG_INFINITY),
        column_partings: 0,
        parted_time_s: 0.0,
        stopped_early: false,
        rejected_steps: 0,
        retried_solves: 0,
        total_newton_iterations: 0,
        min_step_s: f64::INFINITY,
        warnings: Vec::new(),
        final_state: slow.clone(),
    };
    let mut push = BlockPush::default();
    let mut chooser = StepChooser::new(model);
    let mut last_jump = 0.0;
    let mut cycles = model
        .drive
        .period_s()
        .map(|p| CycleAccumulator::new(p, cake0));
    let mut sum_q2_dt = 0.0;
    let mut flux_watch = Alternation::default();
    let mut head_watch = Alternation::default();
    let mut oscillation: Option<(f64, &'static str)> = None;
    let mut forced_steps = 0u64;
    // Events since the last report, and the conditions watched for their rising edges.
    let mut events = EventSet::EMPTY;
    let mut partings_seen = 0u64;
    let (mut near_vapour, mut pump_suction, mut at_thrust) =
        (Edge::default(), Edge::default(), Edge::default());
    let mut jumper = multiscale::CycleJumper::new(model, &st, &slow);
    let end = model.duration_s;
    let eps = 1e-12 * end.max(1.0);
    while st.time_s < end - eps {
        let (target, jump) = clock.next_target(model, st.time_s);
        let taken = chooser.advance(model, &mut st, target, last_jump, &mut summary)?;
        forced_steps += u64::from(taken.forced);
        if taken.forced {
            events.insert(EventKind::SmallestStep);
        }
        let landing = taken.landing;
        if landing {
            st.time_s = target;
            if jump {
                last_jump = target;
                chooser.restart();
                st.forget_history();
                flux_watch.reset();
                head_watch.reset();
            }
        }
        summary.steps += 1;
        let b = st.balance;
        let face = face_state(model, &st);
        let h_well = st.heads()[0];
        check_finite!(
            st.time_s,
            summary.steps;
            "well head" => h_well,
            "screen flow" => face.screen_flow_m3_s,
            "face flux" => face.flux_m_s,
            "face gradient" => face.gradient,
            "shear proxy" => face.shear_pa,
            "screen outer head" => face.screen_outer_head_m,
            "energy into the screen" => b.energy_in,
            "storage energy change" => b.storage_energy_change,
            "numerical dissipation" => b.numerical_dissipation,
            "dissipated energy" => b.dissipated.iter().sum(),
            "screen volume" => b.volume_in_m3,
            "device volume" => b.device_volume_m3,
            "bypass volume" => b.bypass_volume_m3,
            "well storage change" => b.well_storage_change_m3,
            "volume residual" => b.mass_residual,
            "energy residual" => b.energy_residual,
            "well volume residual" => b.well_residual,
        )?;
        for (k, w) in summary.work_j.iter_mut().enumerate() {
            *w += rho_g * b.dissipated[k];
        }
        summary.energy_in_j += rho_g * b.energy_in;
        // Stored energy: the formation's elastic storage and the water column's kinetic energy.
        summary.storage_energy_j += rho_g * (b.storage_energy_change + b.kinetic_energy_change);
        summary.numerical_dissipation_j += rho_g * b.numerical_dissipation;
        summary.max_mass_residual = summary.max_mass_residual.max(b.mass_residual);
        summary.max_mass_excess = summary.max_mass_excess.max(b.mass_excess);
        summary.max_energy_residual = summary.max_energy_residual.max(b.energy_residual);
        summary.max_newton_iterations = summary.max_newton_iterations.max(b.max_solve_iterations);
        summary.total_newton_iterations += b.newton_iterations as u64;
        summary.min_step_s = summary.min_step_s.min(b.dt_s);
        summary.device_volume_m3 += b.device_volume_m3;
        summary.gross_device_volume_m3 += b.device_volume_m3.abs();
        summary.max_well_residual = summary.max_well_residual.max(b.well_residual);
        summary.bypass_volume_m3 += b.bypass_volume_m3;
        summary.screen_volume_m3 += b.volume_in_m3;
        summary.well_storage_change_m3 += b.well_storage_change_m3;
        // Oscillation watch on the end-of-step series, before the slow state moves.
        let ringing = if flux_watch.push(face.flux_m_s) {
            Some("face flux")
        } else if head_watch.push(h_well) {
            Some("well head")
        } else {
            None
        };
        if let Some(what) = ringing {
            oscillation.get_or_insert((st.time_s, what));
            events.insert(EventKind::Oscillation);
            chooser.refine();
        }
        match slow.advance(model, &face, st.time_s, b.dt_s, &st.disc, st.heads()) {
            Change::None => {}
            Change::Smooth => st.set_slow(model, &slow),
            Change::Jump => {
                st.set_slow(model, &slow);
                st.forget_history();
                chooser.restart();
                if let Some(j) = jumper.as_mut() {
                    j.reset();
                }
            }
        }
        // The differential across the screen: the head inside it is the well head less the
        // column's inertial head (docs/physics.md §24).
        let h_screen = st.screen_head();
        summary.peak_collapse_head_m = summary
            .peak_collapse_head_m
            .max(face.screen_outer_head_m - h_screen);
        summary.peak_burst_head_m = summary
            .peak_burst_head_m
            .max(h_screen - face.screen_outer_head_m);
        // The head a surge block pushed under it, and the time it was held at its thrust.
        if let Some(block) = model.drive.surge_block_at(left_limit(st.time_s)) {
            if h_well > push.peak_head_m {
                push.peak_head_m = h_well;
                push.area_m2 = PI * block.block_radius_m * block.block_radius_m;
                push.bounded = block.max_head_m().is_finite();
            }
            let stalled = h_well > block.max_head_m() - crate::devices::VAPOUR_MARGIN_M;
            if stalled {
                push.stalled_s += b.dt_s;
                push.bound_m = block.max_head_m();
            }
            if at_thrust.rises(stalled) {
                events.insert(EventKind::ThrustBound);
            }
        }
        // The suction limits of the stage the step ran in, and new partings of the column.
        let t_in = left_limit(st.time_s);
        if near_vapour.rises(model.drive.near_vapour(t_in, h_well)) {
            events.insert(EventKind::VapourSuction);
        }
        if pump_suction.rises(model.drive.pump_suction_broken(t_in, h_well)) {
            events.insert(EventKind::PumpSuction);
        }
        let partings = st.column_parting().0;
        if partings > partings_seen {
            events.insert(EventKind::ColumnParting);
        }
        partings_seen = partings;
        summary.well_head_range_m = (
            summary.well_head_range_m.0.min(h_well),
            summary.well_head_range_m.1.max(h_well),
        );
        summary.peak_outward_flux_m_s = summary.peak_outward_flux_m_s.max(face.flux_m_s);
        summary.peak_inward_flux_m_s = summary.peak_inward_flux_m_s.max(-face.flux_m_s);
        summary.peak_shear_pa = summary.peak_shear_pa.max(face.shear_pa);
        summary.peak_screen_flow_m3_s = summary
            .peak_screen_flow_m3_s
            .max(face.screen_flow_m3_s.abs());
        sum_q2_dt += face.flux_m_s * face.flux_m_s * b.dt_s;
        let last = st.time_s >= end - eps;
        let report = landing || last || summary.steps % reporting.every == 0 || cycles.is_some();
        let mut cycle_done = None;
        if report {
            let power_w = power_now(model, &mut st);
            check_finite!(st.time_s, summary.steps; "power" => power_w.iter().sum())?;
            let values = StepValues {
                step: summary.steps,
                time_s: st.time_s,
                dt_s: b.dt_s,
                well_head_m: h_well,
                screen_outer_head_m: face.screen_outer_head_m,
                screen_flow_m3_s: face.screen_flow_m3_s,
                face_flux_m_s: face.flux_m_s,
                face_pore_velocity_m_s: face.flux_m_s / model.pack.medium.porosity,
                face_gradient: face.gradient,
                shear_proxy_pa: face.shear_pa,
                cake_thickness_m: slow.cake_thickness_m().1,
                cake_coverage: slow.cake_coverage(),
                skin: slow.skin().1,
                cake_pressure_pa: face.cake_pressure_pa,
                fines_removed_kg: slow.fines_removed_kg(),
                power_w,
                work_j: summary.work_j,
                screen_volume_m3: b.volume_in_m3,
                device_volume_m3: b.device_volume_m3,
                bypass_volume_m3: b.bypass_volume_m3,
                mass_residual: b.mass_residual,
                energy_residual: b.energy_residual,
                newton_iterations: b.newton_iterations,
                screen_inner_head_m: h_screen,
                events,
            };
            let view = StepView {
                values,
                heads: &st.heads()[1..],
                grid: &st.disc.grid,
                slow: &slow,
            };
            if let Some(acc) = cycles.as_mut() {
                if let Some(c) = acc.add(&view) {
                    summary.cycles += 1;
                    observer.on_cycle(&c);
                    cycle_done = Some(c.index);
                }
            }
            let reported = landing || last || summary.steps % reporting.every == 0;
            if reported {
                events = EventSet::EMPTY;
            }
            let stop = reported && !observer.on_step(&view);
            if stop {
                summary.stopped_early = true;
                break;
            }
        }
        // At a computed cycle's end: jump over whole cycles where the state changes
        // smoothly (numerics.multiscale, run/multiscale.rs).
        if let (Some(j), Some(index), Some(acc)) = (jumper.as_mut(), cycle_done, cycles.as_mut()) {
            if let Some(jumped) = j.at_cycle_end(
                model,
                &mut st,
                &mut slow,
                &mut summary,
                &mut sum_q2_dt,
                &mut push.stalled_s,
                index + 1,
            ) {
                acc.skip(
                    jumped.view.cycles,
                    st.time_s,
                    summary.work_j,
                    slow.cake_thickness_m().1,
                );
                flux_watch.reset();
                head_watch.reset();
                // Partings the jump extrapolated are no event.
                partings_seen = st.column_parting().0;
                observer.on_jump(&jumped.view);
            }
        }
    }
    summary.end_time_s = st.time_s;
    summary.rms_face_flux_m_s = if st.time_s > 0.0 {
        (sum_q2_dt / st.time_s).sqrt()
    } else {
        0.0
    };
    let diss: f64 = summary.work_j.iter().sum();
    let imbalance =
        summary.energy_in_j - diss - summary.storage_energy_j - summary.numerical_dissipation_j;
    let scale = summary
        .energy_in_j
        .abs()
        .max(diss)
        .max(summary.storage_energy_j.abs());
    summary.energy_closure = if scale > 0.0 {
        imbalance.abs() / scale
    } else {
        0.0
    };
    summary.cake_thickness_m.1 = slow.cake_thickness_m().1;
    summary.skin.1 = slow.skin().1;
    summary.skin_parts = slow.skin_parts_now();
    summary.cake_removed_at_s = slow.cake_removed_at_s();
    summary.peak_cake_pressure_pa = slow.lift_peak_pa();
    if let Some(f) = slow.fines() {
        summary.fines_removed_kg = f.removed_kg();
        summary.fines_pushed_out_kg = f.pushed_out_m3() * f.grain_density();
        summary.fines_in_place_kg = f.in_place_m3() * f.grain_density();
    }
    summary.final_state = slow.clone();
    (summary.column_partings, summary.parted_time_s) = st.column_parting();
    if summary.column_partings > 0 {
        summary.warnings.push(format!(
            "the water column under the sealed tool parted {} time(s), {:.3} s in all: the \
             head under it reached the vapour bound (atmospheric pressure less the vapour \
             pressure, plus the tool's depth below the static level) because the formation \
             could not supply the tool's displacement; the suction and the collapse load are \
             capped there, and the tool's work beyond it went into the vapour gap; {}",
            summary.column_partings,
            summary.parted_time_s,
            if model.well.column_length_m > 0.0 {
                "the column keeps its momentum when it parts and rejoins (water-column \
                 inertia), but water and casing are taken rigid: the head spike when the column \
                 strikes the tool again is resolved only to the step length and is not a \
                 reliable pressure (a water-hammer estimate, density x wave speed x the \
                 velocity change, bounds it)"
            } else {
                "the column rejoins at once in this model (no water-column inertia), so the \
                 flows just after each rejoining are an upper bound"
            }
        ));
    }
    push.warn(model, &mut summary.warnings);
    if let Some((t, what)) = oscillation {
        summary.warnings.push(format!(
            "the {what} alternated in sign from step to step over {} steps in a row (first at \
             t = {t:.4e} s): an undamped numerical mode, not physics; peaks near that time are \
             unreliable{}",
            watch::ALTERNATING_STEPS,
            if matches!(model.numerics.scheme, Scheme::Theta) {
                " (use the default scheme, or more startup_steps or steps)"
            } else {
                " (steps were refined there)"
            }
        ));
    }
    if forced_steps > 0 {
        summary.warnings.push(format!(
            "{forced_steps} steps reached the smallest step length and were accepted above the \
             error tolerance"
        ));
    }
    Ok(summary)
}

/// What [`StepChooser::advance`] did.
struct Taken {
    /// The step ended on the target.
    landing: bool,
    /// The step was accepted at the smallest step length above its tolerance.
    forced: bool,
}

/// Chooses, takes and (for the adaptive scheme) retries steps.
struct StepChooser {
    scheme: Scheme,
    /// Adaptive: the step the controller proposes next, s (None: a restart).
    proposal: Option<f64>,
    theta: f64,
    startup_halves: usize,
    startup_left: usize,
    second_half: Option<f64>,
    smallest: f64,
    /// Restart steps are never shorter than the first step of the geometric sequence, s.
    first_step: f64,
    restarts: u64,
}

impl StepChooser {
    fn new(model: &Model) -> StepChooser {
        let startup_halves = 2 * model.numerics.startup_steps;
        StepChooser {
            scheme: model.numerics.scheme,
            proposal: None,
            theta: model.numerics.theta,
            startup_halves,
            startup_left: startup_halves,
            second_half: None,
            smallest: SMALLEST_STEP * model.duration_s.min(1.0),
            first_step: match model.numerics.time {
                TimeSpec::StepsPerDecade { first_step_s, .. } if first_step_s > 0.0 => first_step_s,
                _ => default_first_step(model),
            },
            restarts: 0,
        }
    }

    /// After a jump: the next step is short again (adaptive) or backward-Euler halves (θ).
    fn restart(&mut self) {
        self.restarts += 1;
        self.proposal = None;
        self.startup_left = self.startup_halves;
    }

    /// After an oscillation was seen: halve the next step (adaptive only).
    fn refine(&mut self) {
        if let Some(p) = self.proposal.as_mut() {
            *p *= 0.5;
        }
    }

    /// Takes one accepted step toward `target`.
    fn advance(
        &mut self,
        model: &Model,
        st: &mut Stepper,
        target: f64,
        last_jump: f64,
        summary: &mut RunSummary,
    ) -> Result<Taken, SolverError> {
        let t = st.time_s;
        let remaining = target - t;
        let nominal = nominal_dt(model, t, t - last_jump);
        let Scheme::TrBdf2 {
            relative,
            absolute_m,
        } = self.scheme
        else {
            return self
                .advance_theta(model, st, target, nominal)
                .map(|landing| Taken {
                    landing,
                    forced: false,
                });
        };
        let tol = Tolerances {
            relative,
            absolute_m,
        };
        let mut want = self
            .proposal
            .unwrap_or((RESTART_FRACTION * nominal).max(self.first_step))
            .min(nominal);
        let (mut retries, mut rejections) = (0usize, 0usize);
        loop {
            let mut dt = full_step(remaining, want);
            let landing = (t + dt - target).abs() <= 1e-9 * dt;
            if landing {
                dt = target - t;
            }
            match st.step_adaptive(model, dt, tol) {
                Err(e) => {
                    retries += 1;
                    summary.retried_solves += 1;
                    // A singular matrix is not cured by a shorter step.
                    let hopeless = matches!(e, SolverError::TridiagSingular { .. });
                    if retries > MAX_RETRIES || dt <= self.smallest || hopeless {
                        let (k, n) = model.drive.stage_index_at(t);
                        return Err(SolverError::StepFailed {
                            time_s: t,
                            step: summary.steps + 1,
                            stage: if n > 1 {
                                format!(" (stage {} of {n})", k + 1)
                            } else {
                                String::new()
                            },
                            retries: retries - 1,
                            dt_s: dt,
                            cause: Box::new(e),
                        });
                    }
                    st.forget_history();
                    want = 0.25 * dt;
                }
                // A NaN estimate (non-finite slopes) is a failed solve, not a small error.
                Ok(err) if err.value.is_nan() => {
                    st.undo_step();
                    retries += 1;
                    summary.retried_solves += 1;
                    if retries > MAX_RETRIES || dt <= self.smallest {
                        return Err(SolverError::NonFiniteResult {
                            quantity: "local error estimate",
                            value: err.value,
                            time_s: t + dt,
                            step: summary.steps + 1,
                        });
                    }
                    st.forget_history();
                    want = 0.25 * dt;
                }
                Ok(err) if err.value > 1.0 && dt > self.smallest => {
                    st.undo_step();
                    rejections += 1;
                    summary.rejected_steps += 1;
                    if rejections > MAX_REJECTIONS {
                        return Err(SolverError::StepFailed {
                            time_s: t,
                            step: summary.steps + 1,
                            stage: String::new(),
                            retries: rejections,
                            dt_s: dt,
                            cause: Box::new(SolverError::invalid(
                                "numerics.relative_tolerance",
                                format!(
                                    "the local error estimate stayed {:.3e} times the \
                                     tolerance at unknown {}",
                                    err.value, err.index
                                ),
                            )),
                        });
                    }
                    // The usual controller of an order-2 error estimate: safety 0.9, the
                    // factor clamped (Hairer & Wanner, Solving ODEs II, §IV.8; from memory
                    // — verify; the clamps are numerical choices).
                    want = dt * (0.9 * err.value.powf(-1.0 / 3.0)).clamp(0.1, 0.9);
                }
                Ok(err) => {
                    let grow = if err.value > 0.0 {
                        (0.9 * err.value.powf(-1.0 / 3.0)).clamp(0.2, 5.0)
                    } else {
                        5.0
                    };
                    // A step cut short to land keeps the proposal it was cut from.
                    let next = dt * grow;
                    self.proposal = Some(if landing && grow >= 1.0 {
                        next.max(want)
                    } else {
                        next
                    });
                    return Ok(Taken {
                        landing,
                        forced: err.value > 1.0,
                    });
                }
            }
        }
    }

    /// One step of the θ-scheme with Rannacher start-up; true when it landed on `target`.
    fn advance_theta(
        &mut self,
        model: &Model,
        st: &mut Stepper,
        target: f64,
        nominal: f64,
    ) -> Result<bool, SolverError> {
        let t = st.time_s;
        let remaining = target - t;
        let (dt, th) = if let Some(second) = self.second_half.take() {
            self.startup_left -= 1;
            (second.min(remaining), 1.0)
        } else if self.startup_left > 0 {
            // A full step done as two backward-Euler halves; the second lands where the
            // full step would have.
            let full = full_step(remaining, nominal);
            self.second_half = Some(0.5 * full);
            self.startup_left -= 1;
            (0.5 * full, 1.0)
        } else {
            (full_step(remaining, nominal), self.theta)
        };
        let landing = (t + dt - target).abs() <= 1e-9 * dt;
        st.step(model, if landing { target - t } else { dt }, th)?;
        Ok(landing)
    }
}

/// A full step toward a target `remaining` away: land exactly when close, split the
/// remainder in two rather than leave a sliver.
fn full_step(remaining: f64, nominal: f64) -> f64 {
    if remaining <= nominal * (1.0 + 1e-9) {
        remaining
    } else if remaining < 2.0 * nominal {
        0.5 * remaining
    } else {
        nominal
    }
}
