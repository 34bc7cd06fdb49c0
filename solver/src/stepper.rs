//! The θ-scheme time step, with a Newton iteration for the nonlinear losses.
//!
//! Semi-discrete system (PHYSICS.md §1.2): `S dh/dt = −div F(h) + f`, with F the face laws
//! of [`crate::faces`]. One step of length Δt solves for the θ-point head
//! `y = θ h^{n+1} + (1−θ) h^n`:
//!
//! ```text
//! S_j (y_j − h_j^n)/(θΔt) − F_{j−1}(y_{j−1} − y_j) + F_j(y_j − y_{j+1}) = f_j(t^n + θΔt, y)
//! h^{n+1} = (y − (1−θ) h^n) / θ
//! ```
//! For linear faces this is exactly the θ-scheme of PHYSICS.md §1.3 (θ = ½: Crank–Nicolson,
//! θ = 1: backward Euler). Evaluating the face laws at y (the midpoint form) makes the
//! discrete energy identity of §1.5 exact for nonlinear faces too: multiplying the step by
//! y gives storage-energy change + numerical dissipation (θ−½)Σ S Δh² = Δt (power in −
//! dissipation), with no remainder.
//!
//! A linear system (Darcy faces, no head-dependent device flow) is eliminated once per step
//! length and each step costs two sweeps; otherwise Newton's method runs on the tridiagonal
//! Jacobian until the residual, relative to the largest flow term, falls below the
//! tolerance. The step never allocates.
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

use crate::drive::Control;
use crate::error::SolverError;
use crate::grid::ZONE_COUNT;
use crate::model::Model;
use crate::system::{CakeState, Discretization};
use crate::tridiag::Factored;

/// A residual row within this many ulps of its face flows' round-off is converged.
const ROUND_OFF_ULPS: f64 = 4.0;

/// Largest relative residual accepted when the iteration has stalled at round-off.
const STALL_RESIDUAL: f64 = 1e-9;
/// A full Newton step that moves no head by more than this times the largest head (or
/// 1 mm) means the iteration has stalled: the heads are settled to twelve digits and what
/// is left of the residual is round-off of the face flows.
const STALL_UPDATE: f64 = 1e-12;

/// Largest magnitude in a slice (0 for an empty one), in lanes so it vectorises.
fn max_abs(v: &[f64]) -> f64 {
    let mut lanes = [0.0f64; LANES];
    let chunks = v.chunks_exact(LANES);
    let rest = chunks.remainder();
    for c in chunks {
        for (l, x) in lanes.iter_mut().zip(c) {
            let a = x.abs();
            *l = if a > *l { a } else { *l };
        }
    }
    for x in rest {
        lanes[0] = lanes[0].max(x.abs());
    }
    lanes.iter().fold(0.0, |a, &b| a.max(b))
}

/// The chord (reused) Jacobian is kept only while each iteration cuts the residual by at
/// least this factor; slower contraction means the Jacobian has changed, so it is refactored.
const CHORD_CONTRACTION: f64 = 1e-3;

/// A Newton step of fraction λ is accepted only if it cuts the residual by at least
/// this × λ (Armijo's condition); full steps that barely reduce it are the signature of
/// Newton's cycling on square-root laws, and are halved.
const SUFFICIENT_DECREASE: f64 = 0.25;

/// Relative residual below which the backtracking stops comparing residuals.
const BACKTRACK_ABOVE: f64 = 1e-8;

/// Smallest fraction of a Newton update tried by the backtracking.
const MIN_STEP_FRACTION: f64 = 1.0 / 64.0;

/// Iterations allowed for the in-well head of a well without storage.
const ALGEBRAIC_MAX_ITERATIONS: usize = 50;

/// Head below which the round-off of an in-well head is taken as absolute, m.
const HEAD_UNIT_M: f64 = 1e-3;

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
    /// Newton iterations taken (0 for the direct linear solve).
    pub newton_iterations: usize,
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
    factored_for: Option<(f64, Control, f64)>,
    /// Whether the device flow depends on the in-well head.
    head_dependent: bool,
    /// Head drop, flow and dQ/dΔh of every face at the current Newton iterate.
    face_dh: Vec<f64>,
    /// See `face_dh`.
    face_q: Vec<f64>,
    /// See `face_dh`.
    face_g: Vec<f64>,
    /// Newton iterate before the last update, m.
    y_prev: Vec<f64>,
    /// Last Newton update, m.
    delta: Vec<f64>,
    /// Head response of the linearized cells alone to a unit inflow into cell 1,
    /// w = J_c⁻¹ e₁ (index 0 unused), s/m².
    inflow_response: Vec<f64>,
    /// Change of the heads over the last step (Newton's initial guess), m.
    prev_change: Vec<f64>,
    /// Length of the last step, s (0 before the first).
    prev_dt: f64,
    /// Change of the heads over the step before the last, m.
    prev_change2: Vec<f64>,
    /// Length of the step before the last, s.
    prev_dt2: f64,
    /// S_j/(θΔt) of the factored matrix: the right-hand side is gain_j h_j (j ≥ 1).
    gain: Vec<f64>,
    linear: bool,
    newton_tolerance: f64,
    newton_max_iterations: usize,
    /// Current time, s.
    pub time_s: f64,
    /// Balance of the last step.
    pub balance: StepBalance,
}

impl Stepper {
    /// Sets up a run of a validated model at t = 0, at rest but for the initial well head.
    pub fn new(model: &Model, cake: Option<CakeState>) -> Stepper {
        let disc = Discretization::new(model, cake);
        let n = disc.unknowns();
        let mut h = vec![0.0; n];
        h[0] = model.drive.initial_well_head_m();
        let linear = disc.is_linear() && !model.drive.is_head_dependent();
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
            gain: vec![0.0; n],
            prev_change: vec![0.0; n],
            y_prev: vec![0.0; n],
            face_dh: vec![0.0; n],
            face_q: vec![0.0; n],
            face_g: vec![0.0; n],
            head_dependent: model.drive.is_head_dependent(),
            delta: vec![0.0; n],
            inflow_response: vec![0.0; n],
            prev_dt: 0.0,
            prev_change2: vec![0.0; n],
            prev_dt2: 0.0,
            linear,
            newton_tolerance: model.numerics.newton_tolerance,
            newton_max_iterations: model.numerics.newton_max_iterations,
            time_s: 0.0,
            balance: StepBalance::default(),
        }
    }

    /// Heads at the current time: index 0 is the in-well head, 1..=N the cells, m.
    pub fn heads(&self) -> &[f64] {
        &self.h
    }

    /// θ-point heads of the last step, m.
    pub fn theta_heads(&self) -> &[f64] {
        &self.y
    }

    /// Rebuilds the face laws after the cake changed.
    pub fn set_cake(&mut self, model: &Model, cake: Option<CakeState>) {
        self.disc.rebuild_faces(model, cake);
        self.factored_for = None;
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
        let r = self.step(model, STEADY_STEP_S, 1.0);
        self.time_s = t;
        self.factored_for = None;
        r
    }

    /// Advances by `dt` with the θ-scheme. On error the state is unchanged.
    pub fn step(&mut self, model: &Model, dt: f64, theta: f64) -> Result<(), SolverError> {
        let tdt = theta * dt;
        let t_new = self.time_s + dt;
        let t_theta = self.time_s + tdt;
        let iterations = if self.linear {
            self.solve_linear(model, tdt, theta, t_new, t_theta)?;
            0
        } else {
            self.solve_newton(model, tdt, theta, t_new, t_theta)?
        };
        // Extrapolate to the end of the step and keep the balance, in one pass.
        let n = self.h.len();
        let inv_theta = 1.0 / theta;
        let carry = (1.0 - theta) / theta;
        self.scratch[0] = self.y[0] * inv_theta - carry * self.h[0];
        // Four independent lanes per sum so the loop vectorises.
        let mut acc = [[0.0f64; LANES]; 4];
        let out = &mut self.scratch[1..];
        let (y, h, s) = (&self.y[1..], &self.h[1..], &self.disc.storage[1..]);
        let body = |k: usize, lane: usize, acc: &mut [[f64; LANES]; 4], out: &mut [f64]| {
            let h_new = y[k] * inv_theta - carry * h[k];
            let sdh = s[k] * (h_new - h[k]);
            acc[0][lane] += sdh;
            acc[1][lane] += sdh * (h_new + h[k]);
            acc[2][lane] += sdh * (h_new - h[k]);
            acc[3][lane] += sdh.abs();
            out[k] = h_new;
        };
        let full = out.len() / LANES * LANES;
        for k0 in (0..full).step_by(LANES) {
            for lane in 0..LANES {
                body(k0 + lane, lane, &mut acc, out);
            }
        }
        for k in full..out.len() {
            body(k, 0, &mut acc, out);
        }
        let [storage_change, mut energy_change, dh2, vol_scale] =
            acc.map(|a| a.iter().sum::<f64>());
        energy_change *= 0.5;
        let numerical = (theta - 0.5) * dh2;
        if !(energy_change.is_finite() && self.scratch[0].is_finite()) {
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
        self.dissipation(&mut dissipated);
        let faces = &self.disc.faces;
        let last = n - 1;
        let q_out = if self.disc.outer_open {
            faces[last].flow(self.y[last]).0
        } else {
            0.0
        };
        let q_in = faces[0].flow(self.y[0] - self.y[1]).0;
        let dev = match model.drive.control_at(t_theta) {
            Control::Head => crate::drive::DeviceFlow::default(),
            Control::Flow => model.drive.device_flow(t_theta, self.y[0]),
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
        let energy_in = dt * self.y[0] * q_in;
        let diss: f64 = dissipated.iter().sum();
        let e_res = energy_change + numerical + diss - energy_in;
        let escale = energy_change
            .abs()
            .max(numerical.abs())
            .max(diss)
            .max(energy_in.abs());
        self.balance = StepBalance {
            dt_s: dt,
            theta,
            volume_in_m3: volume_in,
            volume_out_m3: volume_out,
            storage_change_m3: storage_change,
            device_volume_m3: dt * dev.displacement_m3_s,
            bypass_volume_m3: dt * dev.bypass_m3_s,
            well_storage_change_m3: well_storage * (self.scratch[0] - self.h[0]),
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
            numerical_dissipation: numerical,
            device_energy: dt * self.y[0] * dev.total(),
            mass_residual: if vscale > 0.0 {
                mass.abs() / vscale
            } else {
                0.0
            },
            energy_residual: if escale > 0.0 {
                e_res.abs() / escale
            } else {
                0.0
            },
            newton_iterations: iterations,
        };
        if !self.linear {
            std::mem::swap(&mut self.prev_change, &mut self.prev_change2);
            for ((d, &new), &old) in self.prev_change.iter_mut().zip(&self.scratch).zip(&self.h) {
                *d = new - old;
            }
            self.prev_dt2 = self.prev_dt;
            self.prev_dt = dt;
        }
        std::mem::swap(&mut self.h, &mut self.scratch);
        self.time_s = t_new;
        if model.drive.control_at(t_theta) == Control::Flow && well_storage <= 0.0 {
            self.h[0] = self.algebraic_well_head(model, t_new)?;
        }
        Ok(())
    }

    /// Dissipation per zone at the θ-point heads, m⁴/s (times ρg: watts).
    fn dissipation(&self, out: &mut [f64; ZONE_COUNT]) {
        let d = &self.disc;
        let y = &self.y;
        let n = y.len();
        for (run, zone) in &d.pure_runs {
            let mut lanes = [0.0f64; LANES];
            if self.linear {
                let end = run.end.min(n - 1);
                let (c, y0, y1) = (
                    &d.conductance[run.start..end],
                    &y[run.start..end],
                    &y[run.start + 1..=end],
                );
                for (k, ((&c, &a), &b)) in c.iter().zip(y0).zip(y1).enumerate() {
                    lanes[k % LANES] += c * (a - b) * (a - b);
                }
                if run.end == n {
                    lanes[0] += d.conductance[n - 1] * y[n - 1] * y[n - 1];
                }
            } else {
                // The Newton iteration left the flows of the converged heads in face_q.
                let (q, dh) = (&self.face_q[run.clone()], &self.face_dh[run.clone()]);
                for (k, (&q, &dh)) in q.iter().zip(dh).enumerate() {
                    lanes[k % LANES] += q * dh;
                }
            }
            out[*zone as usize] += lanes.iter().sum::<f64>();
        }
        for &f in &d.mixed_faces {
            let dh = y[f] - if f + 1 < n { y[f + 1] } else { 0.0 };
            d.faces[f].add_dissipation(dh, out);
        }
    }

    /// True when every residual row from `first` on is within the Newton tolerance (relative
    /// to `scale`) or within [`ROUND_OFF_ULPS`] ulps of the round-off of its face flows.
    fn rows_at_round_off(&self, first: usize, faces: usize, scale: f64) -> bool {
        let n = self.y.len();
        let bound = self.newton_tolerance * scale;
        let g_y = |f: usize| {
            if f >= faces {
                return 0.0;
            }
            let y_next = if f + 1 < n { self.y[f + 1].abs() } else { 0.0 };
            self.face_g[f] * self.y[f].abs().max(y_next)
        };
        (first..n).all(|j| {
            let floor = if j > 0 { g_y(j - 1) } else { 0.0 } + g_y(j);
            self.rhs[j].abs() <= bound.max(ROUND_OFF_ULPS * f64::EPSILON * floor)
        })
    }

    /// Factors the Jacobian assembled in `lower`, `diag`, `upper` (well row decoupled, cell 1
    /// without the screen face) and stores the cells' response to a unit inflow into cell 1,
    /// `inflow_response` = J_c⁻¹ e₁. False when the factorization fails or the response is
    /// not positive and finite (J_c is an M-matrix, so w > 0 whenever it is regular).
    fn factor_cells_alone(&mut self) -> bool {
        if self
            .factored
            .factor(&self.lower, &self.diag, &self.upper)
            .is_err()
        {
            return false;
        }
        self.inflow_response.fill(0.0);
        self.inflow_response[1] = 1.0;
        self.factored.solve(&mut self.inflow_response);
        let w1 = self.inflow_response[1];
        w1.is_finite() && w1 > 0.0
    }

    /// Screen inflow Q₀ at which the well's exact flow law meets the linearized cells.
    /// With the cells' head at cell 1 `y1a` for the current inflow `q_now` and response w₁
    /// (s/m²), the pack head, the in-well head through the screen law (face 0, resistances
    /// in series) and the well row are
    ///
    /// ```text
    /// y₁(Q) = y1a + (Q − q_now) w₁                                  m
    /// H(Q)  = y₁(Q) + R_lin Q + R_nl Q|Q|                           m
    /// φ(Q)  = s (H − h₀) + Q − Q_device(t, H) = 0                   m³/s
    /// dφ/dQ = (s − dQ_device/dH)(w₁ + R_lin + 2 R_nl |Q|) + 1 ≥ 1
    /// ```
    /// φ increases strictly (storage, screen and leakage all resist), so the bracketed
    /// iteration of [`bracketed_root`] finds the one root. The unknown is a flow: the head
    /// laws of screen and cells are smooth in it, and the leakage's square root is met
    /// exactly rather than linearized.
    fn well_inflow(
        &self,
        model: &Model,
        t: f64,
        s: f64,
        y1a: f64,
        q_now: f64,
        w1: f64,
    ) -> Result<f64, SolverError> {
        let (h0, face) = (self.h[0], &self.disc.faces[0]);
        let (r_lin, r_nl) = (face.r_lin(), face.r_nl());
        let f = |q: f64| {
            let hw = y1a + (q - q_now) * w1 + r_lin * q + r_nl * q * q.abs();
            let dev = model.drive.device_flow(t, hw);
            let st = s * (hw - h0);
            (
                st + q - dev.total(),
                (s - dev.d_dh_m2_s) * (w1 + r_lin + 2.0 * r_nl * q.abs()) + 1.0,
                st.abs() + q.abs() + dev.displacement_m3_s.abs() + dev.bypass_m3_s.abs(),
            )
        };
        // Flows below the current screen and device flows are round-off in absolute terms.
        let unit = (q_now.abs() + model.drive.device_flow(t, self.y[0]).total().abs())
            .max(f64::MIN_POSITIVE);
        bracketed_root(t, q_now, unit, f)
    }

    /// Puts the well head of a Newton iterate back on its row: the prescribed value, or,
    /// for an eliminated well row, its exact solution for the current y₁.
    fn reset_well_head(
        &mut self,
        model: &Model,
        well: WellRow,
        eliminate_well: bool,
        t_theta: f64,
    ) -> Result<(), SolverError> {
        match well {
            WellRow::Fixed(v) => self.y[0] = v,
            WellRow::Storage { s_over_tdt, .. } if eliminate_well => {
                self.y[0] = self
                    .solve_well_row(model, t_theta, self.y[0], s_over_tdt, self.h[0], self.y[1])?;
            }
            WellRow::Storage { .. } => {}
        }
        Ok(())
    }

    /// In-well head of a well node without storage at the end of the step. Such a node holds
    /// no water of its own: its head is not a state but the solution of the constraint
    /// `F₀(H − h₁) = Q_device(t, H)` at the step's end time (extrapolating it like a state
    /// would let Crank–Nicolson's −1 amplification ring). Scalar Newton from the
    /// extrapolated value.
    fn algebraic_well_head(&self, model: &Model, t: f64) -> Result<f64, SolverError> {
        self.solve_well_row(model, t, self.h[0], 0.0, self.h[0], self.h[1])
    }

    /// Solves the well row `s (H − h₀) + F₀(H − h₁) − Q_device(t, H) = 0` for H, from the
    /// guess `guess`. The left side increases strictly with H (storage, the screen passes
    /// more, the device's leakage into the node falls), so a bracket plus safeguarded
    /// Newton always converges, even on the square-root orifice law where plain Newton
    /// cycles.
    fn solve_well_row(
        &self,
        model: &Model,
        t: f64,
        guess: f64,
        s: f64,
        h0: f64,
        h1: f64,
    ) -> Result<f64, SolverError> {
        let face = &self.disc.faces[0];
        let f = |h: f64| {
            let (q, g) = face.flow(h - h1);
            let dev = model.drive.device_flow(t, h);
            let st = s * (h - h0);
            (
                st + q - dev.total(),
                s + g - dev.d_dh_m2_s,
                st.abs() + q.abs() + dev.displacement_m3_s.abs() + dev.bypass_m3_s.abs(),
            )
        };
        bracketed_root(t, guess, HEAD_UNIT_M, f)
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
                let dev = model.drive.device_flow(t_theta, self.y[0]);
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
        let key = match well {
            WellRow::Fixed(_) => (tdt, Control::Head, 0.0),
            WellRow::Storage { s_over_tdt, .. } => (tdt, Control::Flow, s_over_tdt),
        };
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
                let c = self.disc.faces[j].conductance();
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
            self.factored_for = Some(key);
        }
        let d0 = match well {
            WellRow::Fixed(v) => v,
            WellRow::Storage { s_over_tdt, q, .. } => s_over_tdt * self.h[0] + q,
        };
        self.y[0] = d0;
        for ((y, &g), &h) in self.y[1..]
            .iter_mut()
            .zip(&self.gain[1..])
            .zip(&self.h[1..])
        {
            *y = g * h;
        }
        self.factored.solve(&mut self.y);
        Ok(())
    }

    fn solve_newton(
        &mut self,
        model: &Model,
        tdt: f64,
        theta: f64,
        t_new: f64,
        t_theta: f64,
    ) -> Result<usize, SolverError> {
        let n = self.h.len();
        let last = n - 1;
        // Initial guess: the last step's change, scaled to this step's θΔt.
        let ratio = if self.prev_dt > 0.0 {
            theta * (t_new - self.time_s) / self.prev_dt
        } else {
            0.0
        };
        for ((y, &h), &d) in self.y.iter_mut().zip(&self.h).zip(&self.prev_change) {
            *y = h + ratio * d;
        }
        let inv_tdt = 1.0 / tdt;
        let open = usize::from(self.disc.outer_open);
        let mut residual = f64::INFINITY;
        let (mut last_update, mut head_scale) = (f64::INFINITY, 1e-3);
        let (mut accepted_residual, mut accepted_worst, mut lambda) =
            (f64::INFINITY, f64::INFINITY, 1.0);
        // Chord iterations: the Jacobian is factored at the first iterate of the step and
        // reused while the residual falls at least a thousandfold per iteration; otherwise it is
        // refactored at the current iterate. (Reusing it across steps was tried: the
        // entrance and Forchheimer laws change enough within a cycle that it costs more
        // iterations than it saves.)
        let mut factored = false;
        // A head-dependent device (orifice leakage, a swab near its submergence) makes the
        // well row stiff and non-smooth. That row is solved exactly for y₀ given y₁ at every
        // iterate, and eliminated from the Newton system. Each update then meets the well's
        // exact flow law on the cells' linear response (module doc). Should the cells alone
        // give no usable response (a steady solve behind a closed boundary), the well is
        // linearized instead: cell 1 sees the screen face and the well in series,
        // g_eff = g₀ (s − dq)/(s + g₀ − dq), the exact derivative of the reduced system.
        let eliminate_well =
            self.head_dependent && model.drive.control_at(t_theta) == Control::Flow;
        let mut exact_well = eliminate_well;
        if eliminate_well {
            if let WellRow::Storage { s_over_tdt, .. } =
                self.well_row(model, tdt, theta, t_new, t_theta)
            {
                self.y[0] = self
                    .solve_well_row(model, t_theta, self.y[0], s_over_tdt, self.h[0], self.y[1])?;
            }
        }
        for iteration in 0..=self.newton_max_iterations {
            let well = self.well_row(model, tdt, theta, t_new, t_theta);
            // Face flows and derivatives, batched (faces 0..last, plus the outer one if open).
            let nf = last + open;
            for ((d, &a), &b) in self.face_dh[..last]
                .iter_mut()
                .zip(&self.y[..last])
                .zip(&self.y[1..])
            {
                *d = a - b;
            }
            if open == 1 {
                self.face_dh[last] = self.y[last];
            } else {
                self.face_q[last] = 0.0;
            }
            crate::faces::flows(
                &self.face_dh[..nf],
                &self.disc.r_lin[..nf],
                &self.disc.r_nl[..nf],
                &mut self.face_q[..nf],
                &mut self.face_g[..nf],
            );
            // −R in rhs and the row's flow scale in scratch, cells 1..n in one pass:
            // R_j = S_j (y_j − h_j)/(θΔt) − Q_{j−1} + Q_j.
            for (((((r, sc), &y), &h), &s), (&q_in, &q_out)) in self.rhs[1..]
                .iter_mut()
                .zip(self.scratch[1..].iter_mut())
                .zip(&self.y[1..])
                .zip(&self.h[1..])
                .zip(&self.disc.storage[1..])
                .zip(self.face_q[..last].iter().zip(&self.face_q[1..]))
            {
                let acc = s * inv_tdt * (y - h);
                *r = q_in - q_out - acc;
                *sc = acc.abs() + q_in.abs() + q_out.abs();
            }
            self.rhs[0] = -self.face_q[0];
            self.scratch[0] = self.face_q[0].abs();
            let fixed_ok = match well {
                WellRow::Fixed(v) => {
                    self.rhs[0] = v - self.y[0];
                    self.scratch[0] = 0.0;
                    self.y[0] == v
                }
                WellRow::Storage { s_over_tdt, q, .. } => {
                    let acc = s_over_tdt * (self.y[0] - self.h[0]);
                    self.rhs[0] -= acc - q;
                    self.scratch[0] += acc.abs() + q.abs();
                    true
                }
            };
            // The prescribed head row, and an eliminated well row (solved to round-off by its
            // own bracketed iteration), are not part of the Newton residual.
            let first = usize::from(matches!(well, WellRow::Fixed(_)) || eliminate_well);
            let scale = max_abs(&self.scratch);
            let worst = max_abs(&self.rhs[first..]);
            residual = if scale > 0.0 { worst / scale } else { 0.0 };
            if fixed_ok && residual <= self.newton_tolerance {
                return Ok(iteration);
            }
            // At round-off: a face flow is computed from a head difference, so its absolute
            // error is about ε g max(|y_i|, |y_i+1|); with near-equal heads on a stiff face
            // (a sealing cake behind a conductive pack and screen) that exceeds the tolerance
            // times the net flows. Every row must then be within the tolerance or within a
            // couple of ulps of its own floor.
            if fixed_ok
                && residual <= STALL_RESIDUAL * 10.0
                && self.rows_at_round_off(first, last + open, scale)
            {
                return Ok(iteration);
            }
            // Stalled at round-off: the last update and the correction each row asks for are
            // a few ulps of the largest head (the diagonal estimate uses the face derivatives).
            if fixed_ok && lambda == 1.0 && last_update <= STALL_UPDATE * head_scale {
                let well_diag = match well {
                    WellRow::Fixed(_) => 1.0,
                    WellRow::Storage { s_over_tdt, dq, .. } => s_over_tdt - dq,
                };
                let mut head_residual = 0.0f64;
                for j in 0..n {
                    let mut d = if j == 0 {
                        well_diag
                    } else {
                        self.disc.storage[j] * inv_tdt
                    };
                    if j > 0 {
                        d += self.face_g[j - 1];
                    }
                    if j < last || open == 1 {
                        d += self.face_g[j];
                    }
                    head_residual = head_residual.max((self.rhs[j] / d).abs());
                }
                if residual <= STALL_RESIDUAL || head_residual <= STALL_UPDATE * head_scale {
                    return Ok(iteration);
                }
            }
            if iteration == self.newton_max_iterations {
                break;
            }
            // Backtracking: a step that did not reduce the residual enough (Newton cycles on
            // square-root laws such as an orifice near zero head) is halved, down to 1/64.
            // Near convergence the residual is round-off noise and is not compared.
            // (The comparison uses the absolute residual: the flow scale of the relative one
            // moves with the iterate.)
            if worst >= (1.0 - SUFFICIENT_DECREASE * lambda) * accepted_worst
                && residual > BACKTRACK_ABOVE
                && lambda > MIN_STEP_FRACTION
            {
                lambda *= 0.5;
                for ((y, &y0), &d) in self.y.iter_mut().zip(&self.y_prev).zip(&self.delta) {
                    *y = y0 + lambda * d;
                }
                self.reset_well_head(model, well, eliminate_well, t_theta)?;
                factored = false;
                continue;
            }
            // Refactor unless the chord iteration is contracting fast.
            if !factored || residual > CHORD_CONTRACTION * accepted_residual {
                for j in 0..n {
                    self.diag[j] = if j == 0 {
                        0.0
                    } else {
                        self.disc.storage[j] * inv_tdt
                    };
                    self.lower[j] = 0.0;
                    self.upper[j] = 0.0;
                }
                for j in 0..last {
                    let g = self.face_g[j];
                    self.diag[j] += g;
                    self.diag[j + 1] += g;
                    self.upper[j] = -g;
                    self.lower[j + 1] = -g;
                }
                if open == 1 {
                    self.diag[last] += self.face_g[last];
                }
                match well {
                    WellRow::Fixed(_) => {
                        self.diag[0] = 1.0;
                        self.upper[0] = 0.0;
                    }
                    WellRow::Storage { s_over_tdt, dq, .. } if eliminate_well => {
                        // The cells alone first (the screen face leaves cell 1's row).
                        let g0 = self.face_g[0];
                        self.diag[0] = 1.0;
                        self.upper[0] = 0.0;
                        self.lower[1] = 0.0;
                        self.diag[1] -= g0;
                        if exact_well && !self.factor_cells_alone() {
                            exact_well = false;
                        }
                        // Linearized well: screen and well in series.
                        let sw = s_over_tdt - dq;
                        if !exact_well && sw + g0 > 0.0 {
                            self.diag[1] += g0 * sw / (sw + g0);
                        }
                    }
                    WellRow::Storage { s_over_tdt, dq, .. } => self.diag[0] += s_over_tdt - dq,
                }
                if !exact_well {
                    self.factored.factor(&self.lower, &self.diag, &self.upper)?;
                }
                self.factored_for = None;
                factored = true;
            }
            // Until the prescribed well head is in place the residual is not comparable.
            accepted_residual = if fixed_ok { residual } else { f64::INFINITY };
            accepted_worst = if fixed_ok { worst } else { f64::INFINITY };
            lambda = 1.0;
            if eliminate_well {
                self.rhs[0] = 0.0;
            }
            self.factored.solve(&mut self.rhs);
            // Exact well: the screen inflow where the well's law meets the cells' response,
            // and the cells' update for that inflow, δ = δ_a + (Q₀ − W(y₁)) w.
            if let (WellRow::Storage { s_over_tdt, .. }, true) = (well, exact_well) {
                let w1 = self.inflow_response[1];
                let q_now = self.face_q[0];
                let q_new = self.well_inflow(
                    model,
                    t_theta,
                    s_over_tdt,
                    self.y[1] + self.rhs[1],
                    q_now,
                    w1,
                )?;
                let dq = q_new - q_now;
                for (d, &w) in self.rhs[1..].iter_mut().zip(&self.inflow_response[1..]) {
                    *d += dq * w;
                }
            }
            last_update = 0.0;
            head_scale = 1e-3;
            self.y_prev.copy_from_slice(&self.y);
            self.delta.copy_from_slice(&self.rhs);
            for (y, d) in self.y.iter_mut().zip(&self.rhs) {
                *y += d;
                last_update = last_update.max(d.abs());
                head_scale = head_scale.max(y.abs());
            }
            self.reset_well_head(model, well, eliminate_well, t_theta)?;
        }
        Err(SolverError::NewtonFailed {
            time_s: t_new,
            iterations: self.newton_max_iterations,
            residual,
        })
    }
}

/// Root of a strictly increasing function `f` (returning value, derivative and the size of
/// the terms the value sums, for the round-off test), from `guess`: the root is bracketed by
/// widening steps from `unit` (or |guess|) and refined by Newton, bisecting whenever Newton
/// leaves the bracket, so it converges even on square-root laws where plain Newton cycles.
/// `unit` is the magnitude below which the variable's round-off is taken as absolute.
fn bracketed_root(
    t: f64,
    guess: f64,
    unit: f64,
    f: impl Fn(f64) -> (f64, f64, f64),
) -> Result<f64, SolverError> {
    let mut h = guess;
    let (mut lo, mut hi) = (h, h);
    let mut width = unit.max(h.abs());
    while f(lo).0 > 0.0 {
        lo -= width;
        width *= 2.0;
        if !lo.is_finite() {
            return Err(SolverError::NonFinite {
                time_s: t,
                index: 0,
            });
        }
    }
    width = unit.max(h.abs());
    while f(hi).0 < 0.0 {
        hi += width;
        width *= 2.0;
        if !hi.is_finite() {
            return Err(SolverError::NonFinite {
                time_s: t,
                index: 0,
            });
        }
    }
    // Stop when the Newton correction is at round-off of the variable: the residual itself
    // cannot be driven below the round-off of the steep screen and orifice laws.
    let tiny = |h: f64| 1e-15 * h.abs().max(unit);
    for _ in 0..ALGEBRAIC_MAX_ITERATIONS {
        let (v, d, scale) = f(h);
        if v == 0.0 || v.abs() <= 1e-15 * scale || hi - lo <= tiny(h) {
            return Ok(h);
        }
        if v < 0.0 {
            lo = h;
        } else {
            hi = h;
        }
        let newton = h - v / d;
        if newton > lo && newton < hi {
            if (newton - h).abs() <= tiny(h) {
                return Ok(newton);
            }
            h = newton;
        } else {
            h = 0.5 * (lo + hi);
        }
    }
    Ok(h)
}

#[derive(Debug, Clone, Copy)]
enum WellRow {
    Fixed(f64),
    Storage { s_over_tdt: f64, q: f64, dq: f64 },
}
