//! The θ-scheme time step, with a Newton iteration for the nonlinear losses.
//!
//! Semi-discrete system (docs/physics.md §1.2): `S dh/dt = −div F(h) + f`, with F the face laws
//! of [`crate::faces`]. One step of length Δt solves for the θ-point head
//! `y = θ h^{n+1} + (1−θ) h^n`:
//!
//! ```text
//! S_j (y_j − h_j^n)/(θΔt) − F_{j−1}(y_{j−1} − y_j) + F_j(y_j − y_{j+1}) = f_j(t^n + θΔt, y)
//! h^{n+1} = (y − (1−θ) h^n) / θ
//! ```
//! For linear faces this is exactly the θ-scheme of docs/physics.md §1.3 (θ = ½: Crank–Nicolson,
//! θ = 1: backward Euler). Evaluating the face laws at y (the midpoint form) makes the
//! discrete energy identity of §1.5 exact for nonlinear faces too: multiplying the step by
//! y gives storage-energy change + numerical dissipation (θ−½)Σ S Δh² = Δt (power in −
//! dissipation), with no remainder.
//!
//! A linear system (Darcy faces, no head-dependent device flow) is eliminated once per step
//! length and each step costs two sweeps; otherwise Newton's method runs on the tridiagonal
//! Jacobian until every cell's residual, relative to the largest flow term of a cell row,
//! their sum (the cells' volume balance) likewise, and the well row's residual relative to
//! its own terms fall below the tolerance (or to the round-off of the face flows). The step
//! never allocates.
//!
//! A head-dependent device (surge-block leakage, swab parting) puts square-root laws in
//! series at the well: the clearance orifice and the screen's entrance loss. As a function
//! of the pack head y₁ the flow the well delivers, W(y₁), is then square-root-like, and
//! Newton linearizing it overshoots across zero head at every stroke reversal. The well is
//! therefore eliminated nonlinearly: each Newton step linearizes only the cells, whose
//! response to the screen inflow Q₀ is affine, and meets the exact well law there
//! (w = J_c⁻¹ e₁, the cells' head response to a unit inflow at cell 1, s/m²; nonlinear
//! elimination in Newton's method, e.g. Lanzkron, Rose & Wilkes 1996, SIAM J. Sci. Comput.
//! 17(2), cited from memory):
//!
//! ```text
//! J_c δ_a = −R(y)        cells alone, screen inflow held at W(y₁)                 δ_a in m
//! Q₀ = W(y₁ + δ_a,1 + (Q₀ − W(y₁)) w₁)    one increasing scalar equation         Q₀ in m³/s
//! δ = δ_a + (Q₀ − W(y₁)) w                Newton update of the cells             m
//! ```
//! When the cells are linear (Darcy faces) the update is exact in one step, whatever the
//! well's laws.

use crate::cake::CakeState;
use crate::devices::VapourState;
use crate::drive::Control;
use crate::error::SolverError;
use crate::grid::ZONE_COUNT;
use crate::model::Model;
use crate::system::Discretization;
use crate::tridiag::Factored;

mod column;
mod kernels;
mod newton;
mod power;
mod predictor;
mod residual;
mod trbdf2;
mod well;

pub use column::column_inertance;
pub use trbdf2::{ErrorNorm, Tolerances, GAMMA};

/// A face flow within this many ulps of ε g |h| is round-off (as in Newton's acceptance).
const ROUND_OFF_ULPS: f64 = 4.0;

/// Relative volume residual below which a step's round-off floor is not computed.
const NEGLIGIBLE_RESIDUAL: f64 = 1e-10;

/// The part of `x` above `floor` (0 below it; NaN stays NaN, unlike `f64::max`).
pub(crate) fn beyond(x: f64, floor: f64) -> f64 {
    let d = x - floor;
    if d <= 0.0 {
        0.0
    } else {
        d
    }
}

/// Error norm reported for a backward-Euler step at a device's limit: 0.9³, for which the
/// step controller's factor 0.9 ν^(−1/3) is 1 (the step length is kept).
pub const KEEP_STEP_NORM: f64 = 0.729;

use predictor::Predictor;

/// Independent accumulators per running sum (lets the compiler vectorise reductions).
const LANES: usize = 4;

/// Step length of [`Stepper::solve_steady`], s: storage terms S/Δt vanish beside any
/// conductance.
const STEADY_STEP_S: f64 = 1e30;

/// Volumes and energies of the last step, from the θ-point heads (they close the balances).
/// Energies are in m⁴ (multiply by ρg for joules), volumes in m³.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct StepBalance {
    /// Length of the step, s.
    pub dt_s: f64,
    /// θ used.
    pub theta: f64,
    /// Volume through the screen into the pack, m³.
    pub volume_in_m3: f64,
    /// Volume across the outer boundary, m³.
    pub volume_out_m3: f64,
    /// Change of aquifer storage Σ S Δh, m³.
    pub storage_change_m3: f64,
    /// Volume the device displaced into the well (pumping, lifting, block), m³.
    pub device_volume_m3: f64,
    /// Volume that leaked into the well node past the device (clearance, valves), m³.
    pub bypass_volume_m3: f64,
    /// Change of water stored in the well node S_w ΔH, m³.
    pub well_storage_change_m3: f64,
    /// Energy into the aquifer at the screen (in-well head × flow), m⁴.
    pub energy_in: f64,
    /// Energy dissipated per zone, m⁴.
    pub dissipated: [f64; ZONE_COUNT],
    /// Change of elastic storage energy ½ Σ S h², m⁴.
    pub storage_energy_change: f64,
    /// Change of the water column's kinetic energy ½ M Q², m⁴ (0 without column inertia;
    /// see `stepper/column.rs`).
    pub kinetic_energy_change: f64,
    /// Numerical dissipation of the θ-scheme (θ−½) Σ S Δh², m⁴ (zero for Crank–Nicolson).
    pub numerical_dissipation: f64,
    /// Energy the device put into the well column (in-well head × device flow), m⁴.
    pub device_energy: f64,
    /// |volume residual| relative to the largest volume term.
    pub mass_residual: f64,
    /// |volume residual of the well node| relative to its largest term (flow control).
    pub well_residual: f64,
    /// |energy residual| relative to the largest energy term.
    pub energy_residual: f64,
    /// Round-off of the step's volume balance, m³: Δt times the sum of the cell rows'
    /// round-off floors (ε g |h| of their face flows); 0 when the residual is negligible
    /// (below 1e-10 relative) and the floor was not computed.
    pub round_off_m3: f64,
    /// The part of the volume residual beyond that round-off, relative like
    /// `mass_residual`: a residual at the round-off of nearly equal large heads (a sealing
    /// cake) is not a poor balance.
    pub mass_excess: f64,
    /// Newton iterations taken (0 for the direct linear solve), over all stages.
    pub newton_iterations: usize,
    /// Most Newton iterations of one stage's solve.
    pub max_solve_iterations: usize,
}

/// Time-stepping state of one run.
#[derive(Debug, Clone)]
pub struct Stepper {
    /// Discrete system.
    pub disc: Discretization,
    /// Heads at the current time (index 0 = well), m.
    h: Vec<f64>,
    y: Vec<f64>,
    lower: Vec<f64>,
    diag: Vec<f64>,
    upper: Vec<f64>,
    rhs: Vec<f64>,
    scratch: Vec<f64>,
    factored: Factored,
    /// (θΔt, control, S_w/(θΔt), column inertance m) of the factored matrix.
    factored_for: Option<(f64, Control, f64, f64)>,
    /// The linear path's factors before the last change of key, and their key: a run at a
    /// fixed step that lands on sync times (cycle ends) alternates between the nominal step
    /// and a landing step a few ulps off, and swaps these back instead of eliminating the
    /// nominal matrix again.
    spare: Factored,
    /// See `spare`.
    spare_for: Option<(f64, Control, f64, f64)>,
    /// Whether the device flow depends on the in-well head.
    head_dependent: bool,
    /// Head drop, flow and dQ/dΔh of every face at the current Newton iterate.
    face_dh: Vec<f64>,
    /// See `face_dh`.
    face_q: Vec<f64>,
    /// See `face_dh`.
    face_g: Vec<f64>,
    /// Head drop, flow and dQ/dΔh of every face at the end-of-step heads, for the power
    /// series (see `stepper/power.rs`).
    end_dh: Vec<f64>,
    /// See `end_dh`.
    end_q: Vec<f64>,
    /// See `end_dh`.
    end_g: Vec<f64>,
    /// Newton iterate before the last update, m.
    y_prev: Vec<f64>,
    /// Last Newton update, m.
    delta: Vec<f64>,
    /// Head response of the linearized cells alone to a unit inflow into cell 1,
    /// w = J_c⁻¹ e₁ (index 0 unused), s/m².
    inflow_response: Vec<f64>,
    /// Recent step changes, extrapolated for Newton's initial guess.
    predictor: Predictor,
    /// TR-BDF2: the θ-point heads of the trapezoidal stages (`predictor` then holds the
    /// ends of the steps).
    predictor_mid: Predictor,
    /// Work memory for S_j/(θΔt) when the linear path factors a matrix; the factors keep it
    /// (`Factored::keep_scale`) and the right-hand side is scale_j h_j (j ≥ 1).
    gain: Vec<f64>,
    linear: bool,
    /// Whether every face law is linear (the drive may still make the step nonlinear).
    faces_linear: bool,
    newton_tolerance: f64,
    newton_max_iterations: usize,
    /// TR-BDF2 work arrays (see `stepper/trbdf2.rs`): heads at the start of the step, m.
    h_start: Vec<f64>,
    /// Cell slopes dh/dt at the start of the step and at the end of the first stage, m/s.
    slope_start: Vec<f64>,
    /// See `slope_start`.
    slope_mid: Vec<f64>,
    /// Time at the start of the last TR-BDF2 step, s (None: nothing to undo).
    undo_time: Option<f64>,
    /// Factorization of the error estimate's filter.
    filter: Factored,
    /// (dΔt, well storage and dQ/dH) bits of `filter` while the faces are linear and
    /// unchanged (the filter's matrix is then the same); None: refactor.
    filter_for: Option<(u64, Option<(u64, u64)>)>,
    /// `slope_start` holds the slopes at the current heads (the last TR-BDF2 step's end),
    /// computed with the well head a state (true) or not; None: to be computed.
    end_slopes: Option<bool>,
    /// Newton's history holds end-of-stage heads (TR-BDF2, whose stages leave no sawtooth)
    /// rather than θ-point heads (θ-scheme).
    predict_end: bool,
    /// Stages taken so far (the stamp of `end_power_kept`).
    stages: u64,
    /// The end-of-step power of the pure runs of linear faces, formed by the θ-scheme's
    /// stage in its pass over the θ-point power; see [`power::KeptEndPower`].
    end_power_kept: Option<power::KeptEndPower>,
    /// Current time, s.
    pub time_s: f64,
    /// Balance of the last step.
    pub balance: StepBalance,
    /// Vapour gap under a sealed tool (see `crate::devices::vapour`).
    vapour: VapourState,
    /// Whether the well node had no storage (a sealed tool) in the last step.
    was_sealed: bool,
    /// Backward-Euler steps still to take after the column closed again.
    damped_steps: u32,
    /// Times the water column under a sealed tool parted.
    partings: u64,
    /// Time the column spent parted, s.
    parted_time_s: f64,
    /// The water column's flow and the current stage's inertance (`stepper/column.rs`).
    column: column::Column,
    /// `column` at the start of the last TR-BDF2 step (for `undo_step`).
    column_start: column::Column,
}

impl Stepper {
    /// Sets up a run of a validated model at t = 0, at rest but for the initial well head.
    pub fn new(model: &Model, cake: Option<CakeState>) -> Stepper {
        let disc = Discretization::new(model, cake);
        let n = disc.unknowns();
        let mut h = vec![0.0; n];
        h[0] = model.drive.initial_well_head_m();
        let disc_linear = disc.is_linear();
        let linear = disc_linear && !model.drive.is_head_dependent();
        // The water is at rest at t = 0: a column with inertia starts with no flow (a slug
        // is an initial head, not an initial flow).
        let column = column::Column {
            inertial: column_inertance(model, 0.0) > 0.0,
            ..Default::default()
        };
        Stepper {
            disc,
            y: h.clone(),
            h,
            lower: vec![0.0; n],
            diag: vec![0.0; n],
            upper: vec![0.0; n],
            rhs: vec![0.0; n],
            scratch: vec![0.0; n],
            factored: Factored::with_size(n),
            factored_for: None,
            spare: Factored::with_size(n),
            spare_for: None,
            gain: vec![0.0; n],
            predictor: Predictor::new(n),
            predictor_mid: Predictor::new(n),
            y_prev: vec![0.0; n],
            face_dh: vec![0.0; n],
            face_q: vec![0.0; n],
            face_g: vec![0.0; n],
            end_dh: vec![0.0; n],
            end_q: vec![0.0; n],
            end_g: vec![0.0; n],
            head_dependent: model.drive.is_head_dependent(),
            delta: vec![0.0; n],
            inflow_response: vec![0.0; n],
            linear,
            faces_linear: disc_linear,
            newton_tolerance: model.numerics.newton_tolerance,
            newton_max_iterations: model.numerics.newton_max_iterations,
            h_start: vec![0.0; n],
            slope_start: vec![0.0; n],
            slope_mid: vec![0.0; n],
            undo_time: None,
            filter: Factored::with_size(n),
            filter_for: None,
            end_slopes: None,
            predict_end: false,
            stages: 0,
            end_power_kept: None,
            time_s: 0.0,
            balance: StepBalance::default(),
            vapour: VapourState::default(),
            was_sealed: false,
            damped_steps: 0,
            partings: 0,
            parted_time_s: 0.0,
            column,
            column_start: column,
        }
    }

    /// How often the water column under a sealed tool parted, and for how long in all, s.
    pub fn column_parting(&self) -> (u64, f64) {
        (self.partings, self.parted_time_s)
    }

    /// Volume of the vapour gap under a sealed tool now, m³.
    pub fn vapour_gap_m3(&self) -> f64 {
        self.vapour.gap_m3
    }

    /// Heads at the current time: index 0 is the in-well head, 1..=N the cells, m.
    pub fn heads(&self) -> &[f64] {
        &self.h
    }

    /// θ-point heads of the last step, m.
    pub fn theta_heads(&self) -> &[f64] {
        &self.y
    }

    /// Updates the face laws after the slow state changed (cake and invaded zone): only the
    /// faces whose inputs changed are recomputed, and the kept factorizations are dropped
    /// only if a face law changed. The next step's starting slopes are taken from the face
    /// laws again in either case (as after every change of the slow state).
    pub fn set_slow(&mut self, model: &Model, slow: &crate::slow::SlowState) {
        if self
            .disc
            .update_slow(model, slow.cake(), slow.invaded_conductivity())
        {
            self.faces_changed();
        } else {
            self.end_slopes = None;
        }
    }

    /// Rebuilds the face laws after the cake changed.
    pub fn set_cake(&mut self, model: &Model, cake: Option<CakeState>) {
        self.disc.rebuild_faces(model, cake);
        self.faces_changed();
    }

    /// Drops what was built from the old face laws.
    fn faces_changed(&mut self) {
        self.end_slopes = None;
        self.end_power_kept = None;
        self.faces_linear = self.disc.is_linear();
        self.factored_for = None;
        self.spare_for = None;
        self.filter_for = None;
    }

    /// Moves the clock on by `dt_s` and the heads by `dh` (m, index 0 = well) without
    /// stepping: a jump over whole cycles of a periodic drive (`run/multiscale.rs`). The
    /// column flow and the vapour gap are kept (the drive's phase is the same), the step
    /// history is forgotten, and nothing is left to undo.
    pub fn jump(&mut self, dt_s: f64, dh: &[f64]) {
        for (h, d) in self.h.iter_mut().zip(dh) {
            *h += d;
        }
        self.y.copy_from_slice(&self.h);
        self.time_s += dt_s;
        self.undo_time = None;
        self.forget_history();
    }

    /// Forgets the recent steps Newton extrapolates its initial guess from: call it after a
    /// jump of the forcing, across which the old trend predicts nothing.
    pub fn forget_history(&mut self) {
        self.end_slopes = None;
        self.end_power_kept = None;
        self.predictor.forget();
        self.predictor_mid.forget();
    }

    /// The water column's flow when it is a state of the well (a column with inertia in the
    /// last stage), m³/s; None otherwise (the screen flow then follows from the heads).
    pub fn column_flow(&self) -> Option<f64> {
        self.column.inertial.then_some(self.column.q)
    }

    /// Restarts from `from`'s state (clock, the column's role, vapour gap, sealed flag and
    /// damped steps) with the heads `heads` and, when the column is a state, its flow
    /// `column_flow`: what a shooting method (`crate::periodic`) needs to take one period
    /// from a state of its choosing. The faces are not touched (they must be `from`'s),
    /// the step history is forgotten, nothing is left to undo, nothing is allocated.
    pub fn restart_from(&mut self, from: &Stepper, heads: &[f64], column_flow: f64) {
        self.h.copy_from_slice(heads);
        self.y.copy_from_slice(heads);
        self.time_s = from.time_s;
        self.vapour = from.vapour;
        self.was_sealed = from.was_sealed;
        self.damped_steps = from.damped_steps;
        self.partings = from.partings;
        self.parted_time_s = from.parted_time_s;
        self.column = from.column;
        if self.column.inertial {
            self.column.q = column_flow;
        }
        self.column_start = self.column;
        self.undo_time = None;
        self.predict_end = from.predict_end;
        self.forget_history();
    }

    /// True when the step is solved directly (no Newton iteration).
    pub fn is_linear(&self) -> bool {
        self.linear
    }

    /// Replaces the state by the steady state under the drive's value at the current time:
    /// a backward-Euler step so long (1e30 s) that storage drops out, then the clock is
    /// put back. Only meaningful for a constant drive (constant rate or constant head).
    pub fn solve_steady(&mut self, model: &Model) -> Result<(), SolverError> {
        let t = self.time_s;
        // The transient so far predicts nothing about the steady state, nor it about what
        // follows.
        self.forget_history();
        let r = self.step(model, STEADY_STEP_S, 1.0);
        self.forget_history();
        self.time_s = t;
        self.factored_for = None;
        self.spare_for = None;
        r
    }

    /// Advances by `dt` with the θ-scheme. On error the state is unchanged.
    ///
    /// A vapour gap under a sealed tool is carried across the step (`devices::vapour`).
    /// When the well is no longer sealed (the swab's cups are lowered, a stage ends), the
    /// sealed head gives way to one free surface, drawn down by the volume the tool took
    /// and the water did not fill: `H = −V/S_w` (0 when the column did not part).
    pub fn step(&mut self, model: &Model, dt: f64, theta: f64) -> Result<(), SolverError> {
        let (h0, vapour, was_sealed, col) = (self.h[0], self.vapour, self.was_sealed, self.column);
        // The step belongs to the stage it ends (as in `stage`): a step that lands on the end
        // of a sealed stage is still sealed.
        let t_theta = (self.time_s + theta * dt).min(left_limit(self.time_s + dt));
        let storage = model.drive.well_storage_m2(t_theta, self.disc.storage[0]);
        // A free surface again (or a gap left when a sealed stage ended): the sealed head
        // gives way to the free surface drawn down by the gap.
        if storage > 0.0 && (self.was_sealed || self.vapour.gap_m3 > 0.0) {
            self.h[0] = -self.vapour.gap_m3 / storage;
            self.vapour.gap_m3 = 0.0;
        }
        self.was_sealed = storage <= 0.0;
        self.vapour.min_rate_m3_s = -self.vapour.gap_m3 / dt;
        // At a device's limit (a parted column pinned at the vapour bound, a pump that has
        // broken suction) the well head is held by a kink in the device's law, which
        // Crank–Nicolson would leave ringing in the stiff pack cells. Those steps, and the
        // two after the column closes again, are backward Euler (its numerical dissipation
        // is in the step's energy balance).
        let at_limit =
            |st: &Stepper| st.vapour.gap_m3 > 0.0 || model.drive.at_limit(st.time_s, st.h[0]);
        let theta = if at_limit(self) || self.damped_steps > 0 {
            1.0
        } else {
            theta
        };
        let start = (
            self.vapour,
            self.partings,
            self.parted_time_s,
            self.damped_steps,
            self.time_s,
            self.column,
        );
        let mut r = self.step_inner(model, dt, theta);
        if r.is_ok() && theta != 1.0 && at_limit(self) {
            // The step reached a limit: redo it as backward Euler, since the
            // Crank–Nicolson end-of-step heads overshoot the kink. After the step the
            // scratch array holds the heads it started from.
            std::mem::swap(&mut self.h, &mut self.scratch);
            (
                self.vapour,
                self.partings,
                self.parted_time_s,
                self.damped_steps,
                self.time_s,
                self.column,
            ) = start;
            self.predictor.forget();
            r = self.step_inner(model, dt, 1.0);
        }
        if r.is_err() {
            self.h[0] = h0;
            self.vapour = vapour;
            self.was_sealed = was_sealed;
            self.column = col;
        }
        r
    }

    /// Round-off of the cells' volume balance at the θ-point heads, m³/s: each cell row is
    /// solved only to the round-off of its terms, which are computed from differences of
    /// heads: ε g max(|y_i|, |y_i+1|) per face flow (a sealing cake behind a stiff pack makes
    /// them large beside the net flows) and ε S max(|y_j|, |h_j|)/(θΔt) for the storage term
    /// (large in the short steps after a jump of the forcing); the rows' floors summed.
    /// `tdt` is the stage's θΔt; `h` still holds the stage's old heads.
    fn flow_round_off(&self, tdt: f64) -> f64 {
        let n = self.y.len();
        let mut sum = 0.0;
        for j in 1..n {
            sum += self.disc.storage[j] * self.y[j].abs().max(self.h[j].abs()) / tdt;
        }
        for f in 0..n {
            let (dy, far) = if f + 1 < n {
                (self.y[f] - self.y[f + 1], self.y[f + 1].abs())
            } else if self.disc.outer_open {
                (self.y[f], 0.0)
            } else {
                continue;
            };
            let g = self.disc.faces[f].flow(dy).1;
            // A face enters the rows of the cells on both of its sides (the well row and the
            // outer boundary are not cell rows).
            let rows = if f == 0 || f + 1 == n { 1.0 } else { 2.0 };
            sum += rows * g * self.y[f].abs().max(far);
        }
        ROUND_OFF_ULPS * f64::EPSILON * sum
    }

    /// Whether the next step starts at a device's limit: a parted column pinned at the vapour
    /// bound, a pump that has broken suction, the steps just after the column closed, or a
    /// change of the well between sealed and free surface at `t`.
    fn at_device_limit(&self, model: &Model, t: f64) -> bool {
        let sealed = model
            .drive
            .well_storage_m2(left_limit(t), self.disc.storage[0])
            <= 0.0;
        self.vapour.gap_m3 > 0.0
            || self.damped_steps > 0
            || sealed != self.was_sealed
            || model.drive.at_limit(self.time_s, self.h[0])
    }

    /// One step of the adaptive scheme: TR-BDF2 with its error estimate, except where a
    /// device's limit holds the well head (a kink in the device's law, with a vapour gap or
    /// a broken suction carried from step to step): such a step, and a TR-BDF2 step that
    /// ends at a limit (redone), is one backward-Euler step, first order, as under the
    /// θ-scheme. Its error norm is its own first-order estimate capped at [`KEEP_STEP_NORM`]
    /// (`Stepper::step_at_limit`): never rejected, growing where the limit holds smoothly. On
    /// error the state is unchanged.
    pub fn step_adaptive(
        &mut self,
        model: &Model,
        dt: f64,
        tol: Tolerances,
    ) -> Result<ErrorNorm, SolverError> {
        if self.at_device_limit(model, self.time_s + dt) {
            return self.step_at_limit(model, dt, tol);
        }
        let saved = (
            self.vapour,
            self.partings,
            self.parted_time_s,
            self.damped_steps,
        );
        let restore = |st: &mut Stepper| {
            (st.vapour, st.partings, st.parted_time_s, st.damped_steps) = saved;
        };
        let err = match self.step_trbdf2(model, dt, tol) {
            Ok(e) => e,
            Err(e) => {
                restore(self);
                return Err(e);
            }
        };
        if self.vapour.gap_m3 > 0.0 || model.drive.at_limit(self.time_s, self.h[0]) {
            self.undo_step();
            restore(self);
            return self.step_at_limit(model, dt, tol);
        }
        Ok(err)
    }

    /// Adds the step's vapour volume to the gap and counts partings (the flow at the
    /// θ-point heads, as in the step's volume balance).
    fn update_vapour(&mut self, model: &Model, dt: f64, t_theta: f64) {
        let before = self.vapour.gap_m3;
        let q = model
            .drive
            .device_flow(t_theta, self.y[0], self.vapour)
            .vapour_m3_s;
        // The closing rate is floored at −V/Δt, so the gap can only undershoot 0 by round-off.
        self.vapour.gap_m3 = (before + dt * q).max(0.0);
        self.damped_steps = self.damped_steps.saturating_sub(1);
        if (before > 0.0) != (self.vapour.gap_m3 > 0.0) {
            self.damped_steps = 2;
        }
        if self.vapour.gap_m3 > 0.0 {
            self.parted_time_s += dt;
            if before == 0.0 {
                self.partings += 1;
            }
        }
        self.vapour.min_rate_m3_s = -self.vapour.gap_m3 / dt;
    }

    fn step_inner(&mut self, model: &Model, dt: f64, theta: f64) -> Result<(), SolverError> {
        self.end_slopes = None;
        if self.predict_end {
            self.predict_end = false;
            self.forget_history();
        }
        let tdt = theta * dt;
        self.stage(
            model,
            Stage {
                tdt,
                theta,
                weight: dt,
                t_new: self.time_s + dt,
                t_theta: self.time_s + tdt,
                ends_step: true,
            },
        )
    }

    /// One θ-stage from the heads in `h` (see [`Stage`]). On error the state is unchanged.
    fn stage(&mut self, model: &Model, s: Stage) -> Result<(), SolverError> {
        let Stage {
            tdt,
            theta,
            weight: dt,
            t_new,
            t_theta,
            ends_step,
        } = s;
        self.stages += 1;
        // The forcing at the end of the stage is its value just before t_new: a stage that
        // ends on a jump (a schedule's next stage, a pump switched) belongs to what it ends.
        let t_end = left_limit(t_new);
        let t_theta = t_theta.min(t_end);
        let column_start = self.column;
        self.begin_column_stage(model, tdt, t_theta);
        let solved = if self.linear {
            self.solve_linear(model, tdt, theta, t_end, t_theta)
                .map(|_| 0)
        } else {
            self.solve_newton(model, tdt, theta, t_end, t_theta)
        };
        let iterations = match solved {
            Ok(i) => i,
            Err(e) => {
                self.column = column_start;
                return Err(e);
            }
        };
        // Extrapolate to the end of the step and keep the balance, in one pass.
        let n = self.h.len();
        let inv_theta = 1.0 / theta;
        let carry = (1.0 - theta) / theta;
        self.scratch[0] = self.y[0] * inv_theta - carry * self.h[0];
        let (out, y, h, s) = (
            &mut self.scratch[1..n],
            &self.y[1..n],
            &self.h[1..n],
            &self.disc.storage[1..n],
        );
        // Crank–Nicolson's stages have no numerical dissipation: its sum is not formed.
        let half = theta == 0.5;
        let [storage_change, mut energy_change, dh2, vol_scale] = if half {
            kernels::extrapolate::<true>(out, y, h, s, inv_theta, carry)
        } else {
            kernels::extrapolate::<false>(out, y, h, s, inv_theta, carry)
        };
        energy_change *= 0.5;
        let numerical = if half { 0.0 } else { (theta - 0.5) * dh2 };
        // The screen flow at the θ-point heads (through the column when it has inertia),
        // and the column's new flow and energy.
        let q_in = self.screen_path_flow(self.y[0] - self.y[1]).0;
        let col_before = self.column;
        let (kinetic, col_numerical) = self.end_column_stage(q_in, theta);
        let numerical = numerical + col_numerical;
        if !(energy_change.is_finite() && self.scratch[0].is_finite() && kinetic.is_finite()) {
            self.column = column_start;
            let index = self
                .scratch
                .iter()
                .position(|v| !v.is_finite())
                .unwrap_or(0);
            return Err(SolverError::NonFinite {
                time_s: t_new,
                index,
            });
        }
        let mut dissipated = [0.0; ZONE_COUNT];
        // With column inertia the screen's losses are taken at the head inside the screen,
        // H_s = y₁ + R(Q), not at the well head (the difference accelerates the column).
        let y0 = self.y[0];
        if col_before.m > 0.0 {
            self.y[0] = self.path_screen_head(self.y[1], q_in);
            self.face_dh[0] = self.y[0] - self.y[1];
            self.face_q[0] = q_in;
        }
        if self.linear && self.faces_linear && ends_step {
            // The end-of-step power of the pure runs in the same pass (`end_power`).
            let pure = self.linear_zone_powers(&self.y, &self.scratch, &mut dissipated);
            self.end_power_kept = Some(power::KeptEndPower {
                stage: self.stages,
                well_head: self.scratch[0],
                pure,
            });
        } else {
            // The Newton iteration left the flows of the converged heads in face_q.
            let faces = (!self.linear).then_some((&self.face_q[..], &self.face_dh[..]));
            self.zone_power(&self.y, faces, &mut dissipated);
        }
        self.y[0] = y0;
        let faces = &self.disc.faces;
        let last = n - 1;
        let q_out = if self.disc.outer_open {
            faces[last].flow(self.y[last]).0
        } else {
            0.0
        };
        let dev = match model.drive.control_at(t_theta) {
            Control::Head => crate::drive::DeviceFlow::default(),
            Control::Flow => model.drive.device_flow(t_theta, self.y[0], self.vapour),
        };
        let well_storage = model.drive.well_storage_m2(t_theta, self.disc.storage[0]);
        for d in &mut dissipated {
            *d *= dt;
        }
        let volume_in = dt * q_in;
        let volume_out = dt * q_out;
        let mass = storage_change - volume_in + volume_out;
        let vscale = vol_scale
            .max(volume_in.abs())
            .max(volume_out.abs())
            .max(storage_change.abs());
        // The round-off floor of the volume balance, computed only when the residual is not
        // already negligible (it costs a pass over the faces).
        let round_off = if mass.abs() > NEGLIGIBLE_RESIDUAL * vscale {
            dt * self.flow_round_off(tdt)
        } else {
            0.0
        };
        let energy_in = dt * self.y[0] * q_in;
        let diss: f64 = dissipated.iter().sum();
        let e_res = energy_change + kinetic + numerical + diss - energy_in;
        let escale = energy_change
            .abs()
            .max(kinetic.abs())
            .max(numerical.abs())
            .max(diss)
            .max(energy_in.abs());
        self.balance = StepBalance {
            dt_s: dt,
            theta,
            volume_in_m3: volume_in,
            volume_out_m3: volume_out,
            storage_change_m3: storage_change,
            // A vapour gap under a sealed tool is water missing from the well: it counts as a
            // (negative) change of the well's storage, not as a flow past the tool.
            // The jet's head offset likewise shifts the node's head without moving water.
            device_volume_m3: dt * (dev.displacement_m3_s - dev.offset_m3_s),
            bypass_volume_m3: dt * (dev.bypass_m3_s - dev.vapour_m3_s),
            well_storage_change_m3: well_storage * (self.scratch[0] - self.h[0])
                - dt * (dev.vapour_m3_s + dev.offset_m3_s),
            well_residual: {
                let stored = well_storage * (self.scratch[0] - self.h[0]);
                let dev_vol = dt * dev.total();
                let scale = stored
                    .abs()
                    .max(dev_vol.abs())
                    .max(volume_in.abs())
                    .max(dt * dev.displacement_m3_s.abs());
                if scale > 0.0 && matches!(model.drive.control_at(t_theta), Control::Flow) {
                    (stored - dev_vol + volume_in).abs() / scale
                } else {
                    0.0
                }
            },
            energy_in,
            dissipated,
            storage_energy_change: energy_change,
            kinetic_energy_change: kinetic,
            numerical_dissipation: numerical,
            device_energy: dt * self.y[0] * dev.total(),
            mass_residual: if vscale > 0.0 {
                mass.abs() / vscale
            } else {
                0.0
            },
            round_off_m3: round_off,
            mass_excess: if vscale > 0.0 {
                beyond(mass.abs(), round_off) / vscale
            } else {
                0.0
            },
            energy_residual: if escale > 0.0 {
                e_res.abs() / escale
            } else {
                0.0
            },
            newton_iterations: iterations,
            max_solve_iterations: iterations,
        };
        if !self.linear {
            if self.predict_end {
                // TR-BDF2: the BDF2 stage records its end (the L-stable end of the step), the
                // trapezoidal stage its θ-point (its end carries the stiff modes'
                // alternation, as Crank–Nicolson's does), each in its own history.
                if theta == 1.0 {
                    self.predictor.push(&self.scratch, t_new);
                } else {
                    self.predictor_mid.push(&self.y, t_theta);
                }
            } else {
                self.predictor.push(&self.y, t_theta);
            }
        }
        std::mem::swap(&mut self.h, &mut self.scratch);
        self.time_s = t_new;
        if self.head_dependent {
            self.update_vapour(model, dt, t_theta);
        }
        if model.drive.control_at(t_theta) == Control::Flow && well_storage <= 0.0 {
            if !self.column.inertial {
                self.h[0] = self.algebraic_well_head(model, t_end)?;
            } else if theta < 1.0 {
                // The head under a sealing tool is set by the tool's law for the column's
                // flow (the extrapolated θ-point head would ring); a tool without leakage
                // fixes no head for a given flow, and keeps the extrapolated one.
                if let Ok(h) = self.tool_head_for_flow(model, t_end, self.column.q) {
                    self.h[0] = h;
                }
            }
        }
        Ok(())
    }

    /// Right-hand side of the well row and its diagonal term from the device.
    /// The well row: the prescribed head (θ-point value) or the storage balance of the well
    /// water with the device's flow.
    fn well_row(&self, model: &Model, tdt: f64, theta: f64, t_new: f64, t_theta: f64) -> WellRow {
        match model.drive.control_at(t_theta) {
            Control::Head => {
                WellRow::Fixed(theta * model.drive.head_m(t_new) + (1.0 - theta) * self.h[0])
            }
            Control::Flow => {
                let dev = model.drive.device_flow(t_theta, self.y[0], self.vapour);
                let storage = model.drive.well_storage_m2(t_theta, self.disc.storage[0]);
                WellRow::Storage {
                    s_over_tdt: storage / tdt,
                    q: dev.total(),
                    dq: dev.d_dh_m2_s,
                }
            }
        }
    }

    fn solve_linear(
        &mut self,
        model: &Model,
        tdt: f64,
        theta: f64,
        t_new: f64,
        t_theta: f64,
    ) -> Result<(), SolverError> {
        let n = self.h.len();
        let well = self.well_row(model, tdt, theta, t_new, t_theta);
        let m = self.column.m;
        let key = match well {
            WellRow::Fixed(_) => (tdt, Control::Head, 0.0, m),
            WellRow::Storage { s_over_tdt, .. } => (tdt, Control::Flow, s_over_tdt, m),
        };
        // The screen path: face 0, with the column in series when it has inertia
        // (`stepper/column.rs`): Q = c₀ (y₀ − y₁ + m Qⁿ).
        let c0 = 1.0 / (self.disc.faces[0].r_lin() + m);
        if self.factored_for != Some(key) {
            std::mem::swap(&mut self.factored, &mut self.spare);
            std::mem::swap(&mut self.factored_for, &mut self.spare_for);
        }
        if self.factored_for != Some(key) {
            for j in 0..n {
                self.lower[j] = 0.0;
                self.upper[j] = 0.0;
                self.diag[j] = if j == 0 {
                    0.0
                } else {
                    self.disc.storage[j] / tdt
                };
            }
            let last = n - 1;
            for j in 0..last {
                let c = if j == 0 {
                    c0
                } else {
                    self.disc.faces[j].conductance()
                };
                self.diag[j] += c;
                self.upper[j] = -c;
                self.diag[j + 1] += c;
                self.lower[j + 1] = -c;
            }
            if self.disc.outer_open {
                self.diag[last] += self.disc.faces[last].conductance();
            }
            match well {
                WellRow::Fixed(_) => {
                    self.diag[0] = 1.0;
                    self.upper[0] = 0.0;
                }
                WellRow::Storage { s_over_tdt, .. } => self.diag[0] += s_over_tdt,
            }
            self.factored.factor(&self.lower, &self.diag, &self.upper)?;
            for (g, &s) in self.gain.iter_mut().zip(&self.disc.storage) {
                *g = s / tdt;
            }
            self.factored.keep_scale(&self.gain, 2);
            self.factored_for = Some(key);
        }
        let d0 = match well {
            WellRow::Fixed(v) => v,
            WellRow::Storage { s_over_tdt, q, .. } => s_over_tdt * self.h[0] + q,
        };
        // Right-hand side gain_j h_j (j ≥ 1), built within the forward sweep from row 2 on;
        // rows 0 and 1 carry the well and the column's shift.
        self.y[0] = d0;
        // The scale kept with the factors in use (after a swap with the spare, `gain` holds
        // the other factors' scale).
        self.y[1] = self.factored.kept_scale()[1] * self.h[1];
        if m > 0.0 {
            let shift = c0 * m * self.column.q_old;
            self.y[0] -= shift;
            self.y[1] += shift;
        }
        self.factored.solve_scaled(&mut self.y, &self.h);
        Ok(())
    }
}

/// The time just before `t` (a few ulps): where a drive defined on half-open intervals
/// [start, end) still has the value it ends with.
pub(crate) fn left_limit(t: f64) -> f64 {
    t - 4.0 * f64::EPSILON * t.abs().max(1.0)
}

/// One implicit stage: the θ-point head y = θ h^{new} + (1−θ) h solves the step of
/// storage length `tdt` (S/tdt multiplies y − h) with the forcing at `t_theta`; the clock
/// moves to `t_new`; volumes and energies are the stage's fluxes times `weight`
/// (= tdt/θ, the stage's own quadrature weight, s).
#[derive(Debug, Clone, Copy)]
struct Stage {
    tdt: f64,
    theta: f64,
    weight: f64,
    t_new: f64,
    t_theta: f64,
    /// The stage's end is the step's end, kept unless the step is redone (the θ-scheme's
    /// stage; TR-BDF2's stages are followed by its error test, which may undo the step).
    ends_step: bool,
}

#[derive(Debug, Clone, Copy)]
enum WellRow {
    Fixed(f64),
    Storage { s_over_tdt: f64, q: f64, dq: f64 },
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The spare factors of the linear path give the bits of a fresh elimination: a run at
    /// a fixed step that lands on sync times a few ulps off the nominal step (and back)
    /// against the same steps with both kept factorizations dropped before every step.
    #[test]
    fn spare_factors_give_the_bits_of_a_fresh_elimination() {
        let m = crate::fixtures::bench_well(60, false);
        let mut kept = Stepper::new(&m, None);
        let mut fresh = Stepper::new(&m, None);
        assert!(kept.is_linear());
        let d = 0.01;
        let steps = [
            d,
            d,
            d * (1.0 + 1e-12),
            d,
            d,
            d * (1.0 - 3e-13),
            d,
            2.0 * d,
            d,
            d,
        ];
        for (i, &dt) in steps.iter().enumerate() {
            kept.step(&m, dt, 0.5).unwrap();
            fresh.factored_for = None;
            fresh.spare_for = None;
            fresh.step(&m, dt, 0.5).unwrap();
            let bits = |s: &Stepper| s.heads().iter().map(|h| h.to_bits()).collect::<Vec<_>>();
            assert_eq!(bits(&kept), bits(&fresh), "step {i}");
        }
        // The landing steps swapped the nominal factors out and back.
        assert!(kept.spare_for.is_some() && kept.factored_for.is_some());
        assert_ne!(kept.spare_for, kept.factored_for);
    }
}
