//! The time loop: chooses steps, restarts backward-Euler steps after jumps, lands on sync
//! times and cycle ends, streams diagnostics to an observer and returns a summary.
//!
//! Step choice (PHYSICS.md §1.3, §10):
//! - periodic drives: `steps_per_cycle` equal steps per period (default 200);
//! - other drives: geometric steps, Δt = max(Δt₀, t (10^{1/n} − 1)), n = 40 per decade;
//! - after t = 0 and after every jump of the forcing, the next `startup_steps` steps are
//!   each replaced by two backward-Euler half steps (Rannacher 1984), which damps the
//!   stiff modes that Crank–Nicolson would leave ringing and keeps second order.

use crate::cake;
use crate::diagnostics::{face_state, power_now, CycleAccumulator, StepObserver, StepView};
use crate::error::SolverError;
use crate::grid::ZONE_COUNT;
use crate::model::{Model, TimeSpec};
use crate::stepper::Stepper;
use crate::system::CakeState;
use crate::water::GRAVITY_M_S2;

/// Default steps per period for periodic drives.
pub const DEFAULT_STEPS_PER_CYCLE: usize = 200;
/// Default steps per decade of time for non-periodic drives.
pub const DEFAULT_STEPS_PER_DECADE: f64 = 40.0;

/// Headline results of a run.
#[derive(Debug, Clone, PartialEq)]
pub struct RunSummary {
    /// Steps taken.
    pub steps: u64,
    /// Complete cycles of a periodic drive.
    pub cycles: u64,
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
    /// Largest per-step relative volume residual of the well node.
    pub max_well_residual: f64,
    /// Gross volume the device moved (Σ|displacement| Δt), m³.
    pub gross_device_volume_m3: f64,
    /// Largest per-step relative energy residual.
    pub max_energy_residual: f64,
    /// Energy identity over the whole run: |in − dissipated − stored − numerical| / in.
    pub energy_closure: f64,
    /// Most Newton iterations in one step.
    pub max_newton_iterations: usize,
    /// Cake thickness at the start and at the end, m.
    pub cake_thickness_m: (f64, f64),
    /// Skin at the start and at the end, –.
    pub skin: (f64, f64),
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
    /// Warnings that did not stop the run.
    pub warnings: Vec<String>,
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
    let dt = match (model.numerics.time, period) {
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
    };
    model.drive.max_step_s().map_or(dt, |m| dt.min(m))
}

/// First step of the geometric sequence: 1e−8 of the duration, at least 1e−5 s.
pub fn default_first_step(model: &Model) -> f64 {
    (model.duration_s * 1e-8).max(1e-5)
}

/// Total skin referred to the formation with the cake in state `cake` (PHYSICS.md §2.4).
pub fn total_skin(model: &Model, cake: Option<CakeState>) -> f64 {
    let kf = model.formation.medium.conductivity_m_s;
    let rs = model.well.screen_radius_m;
    let rb = model.borehole_radius_m();
    let mut s = crate::skin::hawkins_skin(kf, model.pack.medium.conductivity_m_s, rs, rb);
    if let Some(z) = &model.invaded {
        s += crate::skin::hawkins_skin(kf, z.medium.conductivity_m_s, rb, rb + z.thickness_m);
    }
    if let (Some(c), Some(st)) = (&model.cake, cake) {
        s += cake::skin(model, c, st);
    }
    s
}

/// Sorted sync times plus the drive's own events.
struct Clock {
    syncs: Vec<f64>,
    next_sync: usize,
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
            let k = ((t + eps) / p).floor() + 1.0;
            let end = k * p;
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
    let mut cake_state = model.cake.map(|c| CakeState {
        thickness_m: c.thickness_m,
        coverage: c.coverage,
    });
    let mut st = Stepper::new(model, cake_state);
    let rho_g = model.fluid.density_kg_m3 * GRAVITY_M_S2;
    let n_unknowns = st.disc.unknowns();
    let mut clock = Clock::new(model);
    let theta = model.numerics.theta;
    let startup_halves = 2 * model.numerics.startup_steps;
    let mut startup_left = startup_halves;
    let cake0 = cake_state.map_or(0.0, |c| c.thickness_m);
    let skin0 = total_skin(model, cake_state);
    let mut summary = RunSummary {
        steps: 0,
        cycles: 0,
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
        max_energy_residual: 0.0,
        max_well_residual: 0.0,
        gross_device_volume_m3: 0.0,
        energy_closure: 0.0,
        max_newton_iterations: 0,
        cake_thickness_m: (cake0, cake0),
        skin: (skin0, skin0),
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
        warnings: Vec::new(),
    };
    let mut last_jump = 0.0;
    let mut cycles = model
        .drive
        .period_s()
        .map(|p| CycleAccumulator::new(p, cake0));
    let mut sum_q2_dt = 0.0;
    let mut second_half: Option<f64> = None;
    let mut skin_now = skin0;
    let end = model.duration_s;
    let eps = 1e-12 * end.max(1.0);
    while st.time_s < end - eps {
        let t = st.time_s;
        let (target, jump) = clock.next_target(model, t);
        let remaining = target - t;
        let nominal = nominal_dt(model, t, t - last_jump);
        let (dt, th) = if let Some(second) = second_half.take() {
            startup_left -= 1;
            (second.min(remaining), 1.0)
        } else if startup_left > 0 {
            // A full step done as two backward-Euler halves; the second lands where the
            // full step would have.
            let full = full_step(remaining, nominal);
            second_half = Some(0.5 * full);
            startup_left -= 1;
            (0.5 * full, 1.0)
        } else {
            (full_step(remaining, nominal), theta)
        };
        let landing = (t + dt - target).abs() <= 1e-9 * dt;
        st.step(model, if landing { target - t } else { dt }, th)?;
        if landing {
            st.time_s = target;
            if jump {
                last_jump = target;
                startup_left = startup_halves;
                st.forget_history();
            }
        }
        summary.steps += 1;
        let b = st.balance;
        for (k, w) in summary.work_j.iter_mut().enumerate() {
            *w += rho_g * b.dissipated[k];
        }
        summary.energy_in_j += rho_g * b.energy_in;
        summary.storage_energy_j += rho_g * b.storage_energy_change;
        summary.numerical_dissipation_j += rho_g * b.numerical_dissipation;
        summary.max_mass_residual = summary.max_mass_residual.max(b.mass_residual);
        summary.max_energy_residual = summary.max_energy_residual.max(b.energy_residual);
        summary.max_newton_iterations = summary.max_newton_iterations.max(b.newton_iterations);
        summary.device_volume_m3 += b.device_volume_m3;
        summary.gross_device_volume_m3 += b.device_volume_m3.abs();
        summary.max_well_residual = summary.max_well_residual.max(b.well_residual);
        summary.bypass_volume_m3 += b.bypass_volume_m3;
        summary.screen_volume_m3 += b.volume_in_m3;
        summary.well_storage_change_m3 += b.well_storage_change_m3;
        let face = face_state(model, &st);
        if let (Some(c), Some(state)) = (&model.cake, cake_state.as_mut()) {
            if cake::erode(c, state, face.shear_pa, face.flux_m_s, b.dt_s) {
                st.set_cake(model, cake_state);
                skin_now = total_skin(model, cake_state);
            }
        }
        let h_well = st.heads()[0];
        summary.peak_collapse_head_m = summary
            .peak_collapse_head_m
            .max(face.screen_outer_head_m - h_well);
        summary.peak_burst_head_m = summary
            .peak_burst_head_m
            .max(h_well - face.screen_outer_head_m);
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
        if report {
            let view = StepView {
                step: summary.steps,
                time_s: st.time_s,
                dt_s: b.dt_s,
                well_head_m: st.heads()[0],
                screen_outer_head_m: face.screen_outer_head_m,
                screen_flow_m3_s: face.screen_flow_m3_s,
                face_flux_m_s: face.flux_m_s,
                face_pore_velocity_m_s: face.flux_m_s / model.pack.medium.porosity,
                face_gradient: face.gradient,
                shear_proxy_pa: face.shear_pa,
                cake_thickness_m: cake_state.map_or(0.0, |c| c.thickness_m),
                cake_coverage: cake_state.map_or(0.0, |c| c.coverage),
                skin: skin_now,
                power_w: power_now(model, &mut st),
                work_j: summary.work_j,
                screen_volume_m3: b.volume_in_m3,
                device_volume_m3: b.device_volume_m3,
                bypass_volume_m3: b.bypass_volume_m3,
                mass_residual: b.mass_residual,
                energy_residual: b.energy_residual,
                newton_iterations: b.newton_iterations,
                heads: &st.heads()[1..],
                grid: &st.disc.grid,
            };
            if let Some(acc) = cycles.as_mut() {
                if let Some(c) = acc.add(&view) {
                    summary.cycles += 1;
                    observer.on_cycle(&c);
                }
            }
            let stop = (landing || last || summary.steps % reporting.every == 0)
                && !observer.on_step(&view);
            if stop {
                summary.stopped_early = true;
                break;
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
    summary.cake_thickness_m.1 = cake_state.map_or(0.0, |c| c.thickness_m);
    (summary.column_partings, summary.parted_time_s) = st.column_parting();
    if summary.column_partings > 0 {
        summary.warnings.push(format!(
            "the water column under the sealed tool parted {} time(s), {:.3} s in all: the \
             head under it reached the vapour bound (atmospheric pressure less the vapour \
             pressure, plus the tool's depth below the static level) because the formation \
             could not supply the tool's displacement; the suction and the collapse load are \
             capped there, and the tool's work beyond it went into the vapour gap",
            summary.column_partings, summary.parted_time_s
        ));
    }
    summary.skin.1 = skin_now;
    Ok(summary)
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
