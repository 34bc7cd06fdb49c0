//! Diagnostics of a run: what is reported at each step and each cycle, and the observer
//! trait through which they leave the solver (the solver itself writes nothing).
//!
//! Borehole-face quantities (docs/physics.md §6, §7):
//! ```text
//! face Darcy flux      q_b = Q_b / (2π r_b b)                     m/s, positive outward
//! face pore velocity   v_b = q_b / n_pack                         m/s
//! face gradient        i_b = q_b/K + β q_b|q_b|   (formation side of the wall, −dh/dr)
//! shear proxy          τ = ρ g |i_p| R_h          (pack side: pack K, β; Kozeny
//!                      hydraulic radius R_h = n d/(6(1−n)), or sqrt(5k/n) from K when the
//!                      grain size is unknown, which is the same model with Kozeny–Carman k)
//! power of a zone      P = ρ g Σ_segments Q·Δh_segment            W
//! ```

use crate::grid::{Grid, ZONE_COUNT};
use crate::model::{Medium, Model};
use crate::stepper::Stepper;
use crate::water::GRAVITY_M_S2;
use std::f64::consts::PI;

/// The values of a reported step, owned: what an observer can copy and hand to another
/// thread (the output of `boreflux run` is written on a thread of its own). Instantaneous
/// values are at the end of the step; work and residuals accumulate the θ-point values
/// that close the balances.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StepValues {
    /// Step counter (1 = first step).
    pub step: u64,
    /// Time at the end of the step, s.
    pub time_s: f64,
    /// Step length, s.
    pub dt_s: f64,
    /// In-well head, m.
    pub well_head_m: f64,
    /// Head on the pack side of the screen, m.
    pub screen_outer_head_m: f64,
    /// Flow through the screen, m³/s, positive outward.
    pub screen_flow_m3_s: f64,
    /// Darcy flux at the borehole wall r_b, m/s.
    pub face_flux_m_s: f64,
    /// Pore velocity at the borehole wall (flux / pack porosity), m/s.
    pub face_pore_velocity_m_s: f64,
    /// Gradient −dh/dr on the formation side of the wall, –.
    pub face_gradient: f64,
    /// Shear proxy on the pack side of the wall, Pa.
    pub shear_proxy_pa: f64,
    /// Cake thickness, m (0 without a cake).
    pub cake_thickness_m: f64,
    /// Covered fraction of the wall, –.
    pub cake_coverage: f64,
    /// Total skin referred to the formation (Hawkins), –.
    pub skin: f64,
    /// Inward pressure difference across the cake at the end of the step, Pa (0 for
    /// outward flow or without a cake).
    pub cake_pressure_pa: f64,
    /// Fines carried inward across the wall so far, kg.
    pub fines_removed_kg: f64,
    /// Power dissipated per zone, W (index by [`crate::grid::Zone`]).
    pub power_w: [f64; ZONE_COUNT],
    /// Cumulative work dissipated per zone, J.
    pub work_j: [f64; ZONE_COUNT],
    /// Volume through the screen during the step (θ-point flow × Δt), m³.
    pub screen_volume_m3: f64,
    /// Volume the device displaced into the well during the step, m³.
    pub device_volume_m3: f64,
    /// Volume that leaked past the device into the well node during the step, m³.
    pub bypass_volume_m3: f64,
    /// Relative volume-balance residual of the step.
    pub mass_residual: f64,
    /// Relative energy-balance residual of the step.
    pub energy_residual: f64,
    /// Newton iterations of the step.
    pub newton_iterations: usize,
    /// Head inside the screen: the in-well head less the column's inertial head
    /// (docs/physics.md §24), m. The pack side less this is the collapse differential.
    pub screen_inner_head_m: f64,
    /// Events the solver saw in the steps since the previous report, this one included
    /// ([`EventKind::SOLVER`]).
    pub events: EventSet,
}

/// What the observer sees after each reported step: the step's [`StepValues`] and, borrowed
/// from the time loop, the heads, the grid and the slow state.
///
/// `StepView` dereferences to its values, so `view.time_s` reads `view.values.time_s`: the
/// view *is* its values plus the borrowed state, every observer reads the scalars the same
/// way, and an observer that hands them on copies `view.values` (one `Copy` of plain data)
/// without a field list of its own.
#[derive(Debug, Clone, Copy)]
pub struct StepView<'a> {
    /// The step's own values.
    pub values: StepValues,
    /// Cell heads, m (N values, inner to outer).
    pub heads: &'a [f64],
    /// The grid.
    pub grid: &'a Grid,
    /// The well's slow state after the step (what a virtual test on the well as it stands
    /// now starts from: `SlowState::snapshot_model`).
    pub slow: &'a crate::slow::SlowState,
}

impl std::ops::Deref for StepView<'_> {
    type Target = StepValues;

    fn deref(&self) -> &StepValues {
        &self.values
    }
}

/// A moment of a run that a warning refers to or that the output keeps in detail
/// (docs/formats.md, "Events"). The solver raises the kinds of [`EventKind::SOLVER`] in
/// [`StepValues::events`]; the limits of the run's checks (`assess::watch`) and the output
/// (stage starts, jumps of the cake) raise the others.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum EventKind {
    /// The water column under a sealed tool parted at the vapour bound (one per parting).
    ColumnParting,
    /// The in-well head under a sealed tool came within the vapour margin of its vapour
    /// bound (the suction is near the water's vapour pressure).
    VapourSuction,
    /// A pump's level reached its intake (it broke suction).
    PumpSuction,
    /// A surge block reached its downstroke thrust bound (`drive.max_thrust`).
    ThrustBound,
    /// A series alternated in sign from step to step (an undamped numerical mode).
    Oscillation,
    /// A step was accepted at the smallest step length above its error tolerance.
    SmallestStep,
    /// The slot velocity rose above the 0.03 m/s rule of thumb.
    SlotVelocity,
    /// The grain Reynolds number at the wall rose above 1.
    GrainReynolds,
    /// The collapse load rose above a collapse rating over the safety factor.
    CollapseLoad,
    /// A stage of a schedule started.
    StageStart,
    /// The cake's cover or thickness jumped within one step (a lift-off patch, removal).
    CakeChange,
}

impl EventKind {
    /// All kinds, in code order.
    pub const ALL: [EventKind; 11] = [
        EventKind::ColumnParting,
        EventKind::VapourSuction,
        EventKind::PumpSuction,
        EventKind::ThrustBound,
        EventKind::Oscillation,
        EventKind::SmallestStep,
        EventKind::SlotVelocity,
        EventKind::GrainReynolds,
        EventKind::CollapseLoad,
        EventKind::StageStart,
        EventKind::CakeChange,
    ];

    /// The kinds the solver raises itself: the first six of [`EventKind::ALL`].
    pub const SOLVER: [EventKind; 6] = {
        let mut out = [EventKind::ColumnParting; 6];
        let mut i = 0;
        while i < out.len() {
            out[i] = EventKind::ALL[i];
            i += 1;
        }
        out
    };

    /// The kind's name in files and reports.
    pub const fn name(self) -> &'static str {
        match self {
            EventKind::ColumnParting => "column_parting",
            EventKind::VapourSuction => "vapour_suction",
            EventKind::PumpSuction => "pump_suction",
            EventKind::ThrustBound => "thrust_bound",
            EventKind::Oscillation => "oscillation",
            EventKind::SmallestStep => "smallest_step",
            EventKind::SlotVelocity => "slot_velocity",
            EventKind::GrainReynolds => "grain_reynolds",
            EventKind::CollapseLoad => "collapse_load",
            EventKind::StageStart => "stage_start",
            EventKind::CakeChange => "cake_change",
        }
    }

    /// What it means, one line.
    pub const fn description(self) -> &'static str {
        match self {
            EventKind::ColumnParting => "the water column under a sealed tool parted at the vapour bound",
            EventKind::VapourSuction => "the head under a sealed tool came within the vapour margin (1 mm) of its vapour bound",
            EventKind::PumpSuction => "the level reached the pump's intake (suction broken)",
            EventKind::ThrustBound => "the surge block reached its downstroke thrust bound (drive.max_thrust)",
            EventKind::Oscillation => "a series alternated in sign from step to step (a numerical mode)",
            EventKind::SmallestStep => "a step was accepted at the smallest step length above its tolerance",
            EventKind::SlotVelocity => "the slot velocity rose above the 0.03 m/s rule of thumb",
            EventKind::GrainReynolds => "the grain Reynolds number at the wall rose above 1",
            EventKind::CollapseLoad => "the collapse load rose above a collapse rating over the safety factor",
            EventKind::StageStart => "a stage of the schedule started",
            EventKind::CakeChange => "the cake's cover or thickness changed by more than 1 % of its start in one step",
        }
    }

    /// The kind of a name, if any.
    pub fn from_name(name: &str) -> Option<EventKind> {
        EventKind::ALL.into_iter().find(|k| k.name() == name)
    }

    const fn bit(self) -> u16 {
        1 << self as u16
    }
}

/// A set of event kinds (a bit set: no allocation in the time loop).
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct EventSet(u16);

impl EventSet {
    /// The empty set.
    pub const EMPTY: EventSet = EventSet(0);

    /// Adds a kind.
    pub fn insert(&mut self, k: EventKind) {
        self.0 |= k.bit();
    }

    /// Whether the set holds `k`.
    pub fn contains(self, k: EventKind) -> bool {
        self.0 & k.bit() != 0
    }

    /// Whether the set is empty.
    pub fn is_empty(self) -> bool {
        self.0 == 0
    }

    /// The union of two sets.
    #[must_use]
    pub fn union(self, other: EventSet) -> EventSet {
        EventSet(self.0 | other.0)
    }

    /// The kinds of the set, in code order.
    pub fn iter(self) -> impl Iterator<Item = EventKind> {
        EventKind::ALL
            .into_iter()
            .filter(move |k| self.contains(*k))
    }
}

/// Rising edges of a condition watched step by step: true when it holds now and did not at
/// the previous step (a condition held for many steps is one event).
#[derive(Debug, Clone, Copy, Default)]
pub struct Edge(bool);

impl Edge {
    /// The condition's value at this step; true on a rising edge.
    pub fn rises(&mut self, now: bool) -> bool {
        let rose = now && !self.0;
        self.0 = now;
        rose
    }
}

/// Aggregates of one cycle of a periodic drive.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CycleView {
    /// Cycle number, from 0.
    pub index: u64,
    /// Start time, s.
    pub start_s: f64,
    /// End time, s.
    pub end_s: f64,
    /// Largest outward face flux, m/s (≥ 0).
    pub peak_outward_flux_m_s: f64,
    /// Largest inward face flux, m/s (≥ 0, magnitude).
    pub peak_inward_flux_m_s: f64,
    /// Root-mean-square face flux over the cycle, m/s.
    pub rms_face_flux_m_s: f64,
    /// Largest shear proxy, Pa.
    pub peak_shear_pa: f64,
    /// Work dissipated per zone in the cycle, J.
    pub work_j: [f64; ZONE_COUNT],
    /// Cake thickness removed in the cycle, m.
    pub cake_removed_m: f64,
}

/// Receives results from the time loop. The solver never formats or writes them.
pub trait StepObserver {
    /// Called after each reported step. Return `false` to stop the run early.
    fn on_step(&mut self, step: &StepView<'_>) -> bool;
    /// Called at the end of each cycle of a periodic drive.
    fn on_cycle(&mut self, _cycle: &CycleView) {}
    /// Called when the run jumped over whole cycles (`numerics.multiscale`): no step and no
    /// cycle is reported between `jump.from_s` and `jump.to_s`.
    fn on_jump(&mut self, _jump: &JumpView) {}
}

/// A jump over whole cycles of a periodic drive (docs/time-stepping.md §Multiscale
/// stepping): the cycles `first_cycle .. first_cycle + cycles` were not computed; the
/// state at `to_s` is extrapolated from the last computed cycles.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct JumpView {
    /// Time the jump starts (the end of the last computed cycle), s.
    pub from_s: f64,
    /// Time the jump lands on, s.
    pub to_s: f64,
    /// Number of the first cycle skipped, from 0.
    pub first_cycle: u64,
    /// Cycles skipped.
    pub cycles: u64,
    /// The extrapolation error estimated for the jump, relative to the tolerance's scale, –.
    pub error_estimate: f64,
    /// What limited the jump's length.
    pub bound: JumpBound,
}

/// What limited the length K of a jump over cycles (docs/time-stepping.md §Multiscale
/// stepping), for the `/jumps` record and for tuning the controller.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum JumpBound {
    /// The estimated extrapolation error (the tolerance).
    Error,
    /// The largest move of a slow value in one jump.
    Move,
    /// An amount falling toward zero is not carried past it.
    TowardZero,
    /// The drive stops repeating (a last stroke, a schedule stage's end).
    Drive,
    /// A sync time.
    Sync,
    /// The most cycles in one jump.
    MaxCycles,
    /// An event of the cake (a thickness or removal mark, the cake gone): K halved.
    Event,
    /// The end of the run (cycles left to compute after the jump).
    End,
}

impl JumpBound {
    /// All, in the order of their codes.
    pub const ALL: [JumpBound; 8] = [
        JumpBound::Error,
        JumpBound::Move,
        JumpBound::TowardZero,
        JumpBound::Drive,
        JumpBound::Sync,
        JumpBound::MaxCycles,
        JumpBound::Event,
        JumpBound::End,
    ];

    /// The number written for it (its place in [`JumpBound::ALL`]).
    pub fn code(self) -> u8 {
        JumpBound::ALL.iter().position(|&b| b == self).unwrap_or(0) as u8
    }

    /// Its name in the docs and the output schema.
    pub fn name(self) -> &'static str {
        match self {
            JumpBound::Error => "error",
            JumpBound::Move => "move",
            JumpBound::TowardZero => "toward-zero",
            JumpBound::Drive => "drive",
            JumpBound::Sync => "sync",
            JumpBound::MaxCycles => "max",
            JumpBound::Event => "event",
            JumpBound::End => "end",
        }
    }
}

/// An observer that ignores everything.
#[derive(Debug, Default)]
pub struct NullObserver;

impl StepObserver for NullObserver {
    fn on_step(&mut self, _step: &StepView<'_>) -> bool {
        true
    }
}

/// Kozeny hydraulic radius of a medium, m (docs/physics.md §6.1): n d/(6(1−n)) from the grain
/// size, or sqrt(5k/n) from K through Kozeny–Carman (k = n R_h²/5) when it is unknown.
pub fn hydraulic_radius_m(m: &Medium, rho: f64, mu: f64) -> f64 {
    match m.grain_diameter_m {
        Some(d) => crate::media::hydraulic_radius(d, m.porosity),
        None => {
            let k = m.conductivity_m_s * mu / (rho * GRAVITY_M_S2);
            (5.0 * k / m.porosity).sqrt()
        }
    }
}

/// Head gradient −dh/dr for flux q in a Forchheimer medium.
pub fn gradient(m: &Medium, q: f64) -> f64 {
    crate::media::forchheimer_gradient(q, m.conductivity_m_s, m.forchheimer_beta_s2_m2)
}

/// Instantaneous borehole-face state at the end of the last step.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct FaceState {
    /// Flow through the screen, m³/s.
    pub screen_flow_m3_s: f64,
    /// Head on the pack side of the screen, m.
    pub screen_outer_head_m: f64,
    /// Flow across the borehole wall, m³/s.
    pub wall_flow_m3_s: f64,
    /// Darcy flux at r_b, m/s.
    pub flux_m_s: f64,
    /// Gradient on the formation side, –.
    pub gradient: f64,
    /// Shear proxy on the pack side, Pa.
    pub shear_pa: f64,
    /// Inward pressure difference across the cake, Pa (≥ 0; docs/physics.md §13a).
    pub cake_pressure_pa: f64,
}

/// Computes the face state from the heads at the end of the step.
pub fn face_state(model: &Model, st: &Stepper) -> FaceState {
    let d = &st.disc;
    let h = st.heads();
    let g = &d.grid;
    let b = model.well.screen_length_m;
    // The column's flow when it has inertia, else face 0's law (`Stepper::screen_flow`).
    let q_screen = st.screen_flow();
    let screen = d.faces[0].segments()[0];
    let screen_drop = crate::faces::Face::segment_drop(&screen, q_screen);
    let kb = g.borehole_face;
    let (q_wall, _) = d.faces[kb].flow(h[kb] - h[kb + 1]);
    let rb = g.r_face[kb];
    let q = q_wall / (2.0 * PI * rb * b);
    let outer = &d.media[kb];
    let pack = &model.pack.medium;
    let rho = model.fluid.density_kg_m3;
    let r_h = hydraulic_radius_m(pack, rho, model.fluid.viscosity_pa_s);
    FaceState {
        screen_flow_m3_s: q_screen,
        screen_outer_head_m: st.screen_head() - screen_drop,
        wall_flow_m3_s: q_wall,
        flux_m_s: q,
        gradient: gradient(outer, q),
        shear_pa: rho * GRAVITY_M_S2 * gradient(pack, q).abs() * r_h,
        cake_pressure_pa: cake_pressure_pa(model, d, kb, q_wall),
    }
}

/// Inward pressure difference across the cake segment of the wall face for the wall flow
/// `q_wall`, Pa (docs/physics.md §13a).
fn cake_pressure_pa(
    model: &Model,
    d: &crate::system::Discretization,
    kb: usize,
    q_wall: f64,
) -> f64 {
    let rho_g = model.fluid.density_kg_m3 * GRAVITY_M_S2;
    d.faces[kb]
        .segments()
        .iter()
        .find(|s| s.zone == crate::grid::Zone::Cake)
        .map_or(0.0, |s| {
            crate::damage::liftoff::inward_pressure_pa(rho_g, s.r_lin, q_wall)
        })
}

/// Instantaneous power per zone at the end of the step, W.
pub fn power_now(model: &Model, st: &mut Stepper) -> [f64; ZONE_COUNT] {
    let rho_g = model.fluid.density_kg_m3 * GRAVITY_M_S2;
    st.end_power().map(|x| x * rho_g)
}

/// Accumulates per-cycle aggregates from per-step values.
#[derive(Debug, Clone)]
pub struct CycleAccumulator {
    period_s: f64,
    index: u64,
    start_s: f64,
    peak_out: f64,
    peak_in: f64,
    sum_q2_dt: f64,
    peak_shear: f64,
    work_start: [f64; ZONE_COUNT],
    cake_start: f64,
}

impl CycleAccumulator {
    /// A new accumulator for cycles of length `period_s` starting at t = 0.
    pub fn new(period_s: f64, cake_thickness_m: f64) -> Self {
        CycleAccumulator {
            period_s,
            index: 0,
            start_s: 0.0,
            peak_out: 0.0,
            peak_in: 0.0,
            sum_q2_dt: 0.0,
            peak_shear: 0.0,
            work_start: [0.0; ZONE_COUNT],
            cake_start: cake_thickness_m,
        }
    }

    /// Adds a step; returns the finished cycle when the step ends one. The stepper lands on
    /// every cycle boundary, so a step never straddles two cycles.
    pub fn add(&mut self, v: &StepValues) -> Option<CycleView> {
        let q = v.face_flux_m_s;
        self.peak_out = self.peak_out.max(q);
        self.peak_in = self.peak_in.max(-q);
        self.peak_shear = self.peak_shear.max(v.shear_proxy_pa);
        self.sum_q2_dt += q * q * v.dt_s;
        let end = self.start_s + self.period_s;
        if v.time_s < end - 1e-9 * self.period_s {
            return None;
        }
        let mut work = [0.0; ZONE_COUNT];
        for (k, w) in work.iter_mut().enumerate() {
            *w = v.work_j[k] - self.work_start[k];
        }
        let cycle = CycleView {
            index: self.index,
            start_s: self.start_s,
            end_s: v.time_s,
            peak_outward_flux_m_s: self.peak_out,
            peak_inward_flux_m_s: self.peak_in,
            rms_face_flux_m_s: (self.sum_q2_dt / (v.time_s - self.start_s)).sqrt(),
            peak_shear_pa: self.peak_shear,
            work_j: work,
            cake_removed_m: self.cake_start - v.cake_thickness_m,
        };
        *self = CycleAccumulator {
            index: self.index + 1,
            start_s: v.time_s,
            work_start: v.work_j,
            cake_start: v.cake_thickness_m,
            ..CycleAccumulator::new(self.period_s, 0.0)
        };
        Some(cycle)
    }

    /// Skips `cycles` whole cycles (a jump, `run/multiscale.rs`): the next cycle starts at
    /// `time_s` with the run's work `work_j` and cake thickness `cake_m` there.
    pub fn skip(&mut self, cycles: u64, time_s: f64, work_j: [f64; ZONE_COUNT], cake_m: f64) {
        *self = CycleAccumulator {
            index: self.index + cycles,
            start_s: time_s,
            work_start: work_j,
            cake_start: cake_m,
            ..CycleAccumulator::new(self.period_s, 0.0)
        };
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn event_sets_hold_each_kind_once_in_code_order() {
        let mut s = EventSet::EMPTY;
        assert!(s.is_empty());
        s.insert(EventKind::CakeChange);
        s.insert(EventKind::ColumnParting);
        s.insert(EventKind::CakeChange);
        let kinds: Vec<EventKind> = s.iter().collect();
        assert_eq!(kinds, [EventKind::ColumnParting, EventKind::CakeChange]);
        for (code, k) in EventKind::ALL.into_iter().enumerate() {
            assert_eq!(k as usize, code);
            assert_eq!(EventKind::from_name(k.name()), Some(k));
        }
        assert!(EventKind::ALL.len() <= 16, "EventSet is 16 bits");
    }

    #[test]
    fn an_edge_rises_once_per_stretch() {
        let mut e = Edge::default();
        let seen: Vec<bool> = [false, true, true, false, true]
            .into_iter()
            .map(|x| e.rises(x))
            .collect();
        assert_eq!(seen, [false, true, false, false, true]);
    }
}
