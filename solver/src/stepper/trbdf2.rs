//! The TR-BDF2 step (Bank et al. 1985, IEEE Trans. Electron Devices 32(10); Hosea &
//! Shampine 1996, Appl. Numer. Math. 20): a one-step, second-order, L-stable scheme built from
//! two θ-stages of the parent module, with an embedded estimate of its local error.
//!
//! With γ = 2 − √2 and v = hⁿ:
//!
//! ```text
//! stage 1 (θ = ½, length γΔt):   S (u − v)/(γΔt)  = −div F((u + v)/2) + f(tⁿ + γΔt/2)
//! stage 2 (θ = 1, length dΔt):   S (w − h̃)/(dΔt)  = −div F(w) + f(tⁿ⁺¹)
//!        h̃ = a u − b v,   a = 1/(γ(2−γ)),  b = (1−γ)²/(γ(2−γ)),  a − b = 1,
//!        d = (1−γ)/(2−γ) = γ/2
//! ```
//! Stage 2 is BDF2 on the nodes tⁿ, tⁿ⁺ᵞ, tⁿ⁺¹ written as a backward-Euler step from the
//! affine combination h̃. Because d = γ/2 both stages have the same matrix S/(dΔt) + G, so a
//! linear model factors once per step length. The stability function
//! R(z) = (a (1 + γz/2)/(1 − γz/2) − b)/(1 − dz) tends to 0 as z → −∞ (L-stable): a stiff
//! mode excited by a jump (a cake gone, a pump switched) is damped within the step instead
//! of ringing as under Crank–Nicolson, whose R(−∞) = −1.
//!
//! Balances. Volumes: S(w − v) = S(w − h̃) + a S(u − v), so the step's volumes are
//! a × stage 1's plus stage 2's (the quadrature weights aγ + d = 1) and the volume balance
//! closes to round-off. Energy: with h̃² = a u² − b v² + ab (u − v)² (a − b = 1),
//!
//! ```text
//! ½ Σ S (w² − v²) + N = Δt-weighted (power in − dissipation),
//! N = ½ Σ S (w − h̃)² − ½ ab Σ S (u − v)²       (computed from this formula)
//! ```
//! N is the scheme's numerical dissipation (it may have either sign within a step, and is
//! O(Δt³) for smooth solutions).
//!
//! Local error (derived here from the stability function; matches the constant of Hosea &
//! Shampine): the error per step is C Δt³ h''' with C = √2/2 − 2/3 ≈ 0.0404, and
//! Δt² h'''/2 ≈ f[tⁿ, tⁿ⁺ᵞ, tⁿ⁺¹], the second divided difference of the slopes f = dh/dt:
//!
//! ```text
//! est = 2 C Δt (fⁿ/γ − fⁿ⁺ᵞ/(γ(1−γ)) + fⁿ⁺¹/(1−γ))
//! ```
//! fⁿ and fⁿ⁺ᵞ are the slopes from the face laws (and the device's flow for a well that
//! stores water) at v and u; fⁿ⁺¹ = (w − h̃)/(dΔt) is stage 2's own. The estimate is
//! filtered (see `filter_estimate`) and measured unknown by unknown (the well head too when
//! it is a state) against `absolute + relative × max(|v|, |w|)` (max norm).

use super::{beyond, left_limit, Stage, StepBalance, Stepper};
use crate::devices::VapourState;
use crate::drive::Control;
use crate::error::SolverError;
use crate::model::Model;
use crate::system::Discretization;
use std::f64::consts::SQRT_2;

/// γ of TR-BDF2, the fraction of the step taken by the trapezoidal (midpoint) stage.
pub const GAMMA: f64 = 2.0 - SQRT_2;
/// Weight of u in h̃ = a u − b v.
const A: f64 = 1.0 / (GAMMA * (2.0 - GAMMA));
/// Weight of v in h̃ = a u − b v.
const B: f64 = (1.0 - GAMMA) * (1.0 - GAMMA) / (GAMMA * (2.0 - GAMMA));
/// Leading local-error constant C of TR-BDF2 (error ≈ C Δt³ h'''), from the Taylor expansion
/// of R(z) − eᶻ (checked in the tests below).
const ERROR_CONSTANT: f64 = SQRT_2 / 2.0 - 2.0 / 3.0;

/// Tolerances of the local error estimate on heads.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Tolerances {
    /// Relative tolerance, –.
    pub relative: f64,
    /// Absolute tolerance, m.
    pub absolute_m: f64,
}

/// The local error of a step measured against the tolerances (≤ 1: acceptable).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ErrorNorm {
    /// Largest |est_j| / (absolute + relative max(|hⁿ_j|, |hⁿ⁺¹_j|)).
    pub value: f64,
    /// Unknown where it is reached (1.. = cells).
    pub index: usize,
}

/// Storage of the well node at time t when its head is a state of the system (the well
/// row is a storage balance with storage), m²; None when the head is prescribed or
/// algebraic.
fn well_storage(model: &Model, disc: &Discretization, t: f64) -> Option<f64> {
    match model.drive.control_at(t) {
        Control::Flow => Some(model.drive.well_storage_m2(t, disc.storage[0])).filter(|&s| s > 0.0),
        Control::Head => None,
    }
}

/// Slopes dh/dt from the face laws at heads `h` at time t: the cells, and the well node
/// when it stores water (S_w dH/dt = Q_device − Q_screen); otherwise entry 0 is 0.
///
/// `column`: the column's flow when it is a state (it is then the screen's flow).
fn slopes(
    model: &Model,
    disc: &Discretization,
    vapour: VapourState,
    t: f64,
    h: &[f64],
    column: Option<f64>,
    out: &mut [f64],
) {
    let n = h.len();
    let last = n - 1;
    let mut q_in = column.unwrap_or_else(|| disc.faces[0].flow(h[0] - h[1]).0);
    out[0] = match well_storage(model, disc, t) {
        Some(sw) => (model.drive.device_flow(t, h[0], vapour).total() - q_in) / sw,
        None => 0.0,
    };
    if disc.is_linear() && n >= 2 {
        // Q = c Δh on every face: one vectorised pass (`stepper/kernels.rs`), same bits.
        super::kernels::linear_slopes(
            h,
            &disc.conductance,
            &disc.storage,
            q_in,
            disc.outer_open,
            out,
        );
        return;
    }
    for j in 1..n {
        let q_out = if j < last {
            disc.faces[j].flow(h[j] - h[j + 1]).0
        } else if disc.outer_open {
            disc.faces[j].flow(h[j]).0
        } else {
            0.0
        };
        let s = disc.storage[j];
        out[j] = if s > 0.0 { (q_in - q_out) / s } else { 0.0 };
        q_in = q_out;
    }
}

impl Stepper {
    /// Advances by `dt` with TR-BDF2 and returns the local error estimate measured against
    /// `tol`. On error the state is unchanged; after success [`Stepper::undo_step`] puts
    /// the state back (a step rejected by the error control).
    pub fn step_trbdf2(
        &mut self,
        model: &Model,
        dt: f64,
        tol: Tolerances,
    ) -> Result<ErrorNorm, SolverError> {
        let t0 = self.time_s;
        let n = self.h.len();
        self.undo_time = None;
        if !self.predict_end {
            self.predict_end = true;
            self.forget_history();
        }
        self.h_start.copy_from_slice(&self.h);
        self.column_start = self.column;
        // The column's flow at the start, v, and its slope there (`stepper/column.rs`).
        let q_v = self.screen_flow();
        let col_state = |st: &Stepper| st.column.inertial.then_some(st.column.q);
        let col_slope_start = self.column_slope(&self.h, q_v, super::column_inertance(model, t0));
        // The slopes at the start are the last step's end slopes (its BDF2 stage gives them
        // exactly) unless the faces or the forcing changed since, or the well's role did.
        let well_now = well_storage(model, &self.disc, t0).is_some();
        if self.end_slopes != Some(well_now) {
            slopes(
                model,
                &self.disc,
                self.vapour,
                t0,
                &self.h,
                col_state(self),
                &mut self.slope_start,
            );
        }
        self.end_slopes = None;
        // Same bits for both stages: the linear path keeps one factorization.
        let tdt = 0.5 * GAMMA * dt;
        self.stage(
            model,
            Stage {
                tdt,
                theta: 0.5,
                weight: 2.0 * tdt,
                t_new: t0 + 2.0 * tdt,
                t_theta: t0 + tdt,
                ends_step: false,
            },
        )?;
        let b1 = self.balance;
        let (mass_1, q_u) = (self.column.mass, self.screen_flow());
        slopes(
            model,
            &self.disc,
            self.vapour,
            t0 + 2.0 * tdt,
            &self.h,
            col_state(self),
            &mut self.slope_mid,
        );
        let col_slope_mid = self.column_slope(&self.h, q_u, mass_1);
        let mut du2 = 0.0;
        for ((&u, &v), &s) in self.h[1..n]
            .iter()
            .zip(&self.h_start[1..n])
            .zip(&self.disc.storage[1..n])
        {
            let d = u - v;
            du2 += s * d * d;
        }
        for (h, &v) in self.h.iter_mut().zip(&self.h_start) {
            *h = A * *h - B * v;
        }
        // The column's flow is a state like the heads: stage 2 starts from Q̃ = a Q_u − b Q_v.
        let q_tilde = A * q_u - B * q_v;
        if self.column.inertial {
            self.column.q = q_tilde;
        }
        let second = self.stage(
            model,
            Stage {
                tdt,
                theta: 1.0,
                weight: tdt,
                t_new: t0 + dt,
                t_theta: left_limit(t0 + dt),
                ends_step: false,
            },
        );
        if let Err(e) = second {
            self.h.copy_from_slice(&self.h_start);
            self.column = self.column_start;
            self.time_s = t0;
            self.forget_history();
            return Err(e);
        }
        let b2 = self.balance;
        // After the stage, `scratch` holds its old heads h̃.
        let (w, ht, v) = (&self.h, &self.scratch, &self.h_start);
        let s = &self.disc.storage;
        let (mut storage, mut energy, mut vscale) = (0.0, 0.0, 0.0);
        let mut worst = ErrorNorm {
            value: 0.0,
            index: 0,
        };
        let k = 2.0 * ERROR_CONSTANT * dt;
        let (c0, c1, c2) = (k / GAMMA, k / (GAMMA * (1.0 - GAMMA)), k / (1.0 - GAMMA));
        let inv_tdt = 1.0 / tdt;
        let t_end = left_limit(t0 + dt);
        let well = well_storage(model, &self.disc, t_end);
        let first = if well.is_some() { 0 } else { 1 };
        self.delta[0] = 0.0;
        // est = k (fⁿ/γ − fⁿ⁺ᵞ/(γ(1−γ)) + fⁿ⁺¹/(1−γ)), fⁿ⁺¹ = (w − h̃)/tdt; the divisions
        // folded into constants (this loop runs on every step). fⁿ⁺¹ is kept as the next
        // step's starting slope. Entry 0 is the well head's when it is a state, otherwise it
        // has no slope to carry. Slices of one length: no bounds checks, and the estimate's
        // loop vectorises apart from the balance's sums.
        let f1_well = (w[0] - ht[0]) * inv_tdt;
        if first == 0 {
            self.delta[0] = c0 * self.slope_start[0] - c1 * self.slope_mid[0] + c2 * f1_well;
            self.slope_start[0] = f1_well;
        } else {
            self.slope_start[0] = 0.0;
        }
        let m = n - 1;
        let (wc, htc, vc, sc) = (&w[1..n], &ht[1..n], &v[1..n], &s[1..n]);
        let (dc, f0c, fmc) = (
            &mut self.delta[1..n],
            &mut self.slope_start[1..n],
            &self.slope_mid[1..n],
        );
        let (htc, vc, sc, f0c, fmc) = (&htc[..m], &vc[..m], &sc[..m], &mut f0c[..m], &fmc[..m]);
        for j in 0..m {
            let f1 = (wc[j] - htc[j]) * inv_tdt;
            dc[j] = c0 * f0c[j] - c1 * fmc[j] + c2 * f1;
            f0c[j] = f1;
        }
        for ((&w, &v), &s) in wc.iter().zip(vc).zip(sc) {
            let sdh = s * (w - v);
            storage += sdh;
            vscale += sdh.abs();
            energy += 0.5 * sdh * (w + v);
        }
        let device_slope =
            well.map(|_| model.drive.device_flow(t_end, w[0], self.vapour).d_dh_m2_s);
        self.filter_estimate(tdt, well.zip(device_slope));
        // Largest |est_j| / (atol + rtol max(|v_j|, |w_j|)) (`stepper/kernels.rs`).
        let (value, j) = super::kernels::error_scan(
            &self.delta[first..n],
            &self.h[first..n],
            &self.h_start[first..n],
            tol.absolute_m,
            tol.relative,
        );
        if j != usize::MAX {
            worst = ErrorNorm {
                value,
                index: first + j,
            };
        }
        // The column's flow: its local error, like the heads' (its stage-2 slope is
        // (Q_w − Q̃)/(dΔt)), filtered by its own stiffness 1 + dΔt R'(Q)/M (the heads held),
        // measured as a flow against relative × |Q| + absolute × the screen face's
        // conductance (a flow error δQ moves the head inside the screen by R' δQ).
        let mut col_du2 = 0.0;
        if self.column.inertial && self.column.mass > 0.0 {
            let (q_w, mass) = (self.column.q, self.column.mass);
            let f1 = (q_w - q_tilde) * inv_tdt;
            let face = &self.disc.faces[0];
            let r_prime = face.r_lin() + 2.0 * face.r_nl() * q_w.abs();
            let est = (c0 * col_slope_start - c1 * col_slope_mid + c2 * f1)
                / (1.0 + tdt * r_prime / mass);
            let den = tol.relative * q_v.abs().max(q_w.abs()) + tol.absolute_m / r_prime;
            if est.is_nan() || est.abs() > worst.value * den {
                worst = ErrorNorm {
                    value: est.abs() / den,
                    index: 0,
                };
            }
            col_du2 = mass_1 * (q_u - q_v) * (q_u - q_v);
        }
        // Column: a × stage 1's and stage 2's kinetic energy changes plus ½ab M (Q_u − Q_v)²
        // is ½ M (Q_w² − Q_v²) when M is constant over the step; the same term leaves the
        // numerical dissipation (as for the heads' du2).
        let kinetic =
            A * b1.kinetic_energy_change + b2.kinetic_energy_change + 0.5 * A * B * col_du2;
        let numerical = b2.numerical_dissipation - 0.5 * A * B * (du2 + col_du2);
        let mut dissipated = b2.dissipated;
        for (d, &d1) in dissipated.iter_mut().zip(&b1.dissipated) {
            *d += A * d1;
        }
        let volume_in = A * b1.volume_in_m3 + b2.volume_in_m3;
        let volume_out = A * b1.volume_out_m3 + b2.volume_out_m3;
        let mass = storage - volume_in + volume_out;
        let vscale = vscale
            .max(volume_in.abs())
            .max(volume_out.abs())
            .max(storage.abs());
        let energy_in = A * b1.energy_in + b2.energy_in;
        let diss: f64 = dissipated.iter().sum();
        let e_res = energy + kinetic + numerical + diss - energy_in;
        let escale = energy
            .abs()
            .max(kinetic.abs())
            .max(numerical.abs())
            .max(diss)
            .max(energy_in.abs())
            .max(0.5 * A * B * du2);
        self.balance = StepBalance {
            dt_s: dt,
            theta: 0.0,
            volume_in_m3: volume_in,
            volume_out_m3: volume_out,
            storage_change_m3: storage,
            device_volume_m3: A * b1.device_volume_m3 + b2.device_volume_m3,
            bypass_volume_m3: A * b1.bypass_volume_m3 + b2.bypass_volume_m3,
            well_storage_change_m3: A * b1.well_storage_change_m3 + b2.well_storage_change_m3,
            energy_in,
            dissipated,
            storage_energy_change: energy,
            kinetic_energy_change: kinetic,
            numerical_dissipation: numerical,
            device_energy: A * b1.device_energy + b2.device_energy,
            mass_residual: (if vscale > 0.0 {
                mass.abs() / vscale
            } else {
                0.0
            })
            .max(b1.mass_residual)
            .max(b2.mass_residual),
            // Stage 1's volumes enter the step with weight a, stage 2's with 1.
            round_off_m3: A * b1.round_off_m3 + b2.round_off_m3,
            mass_excess: (if vscale > 0.0 {
                beyond(mass.abs(), A * b1.round_off_m3 + b2.round_off_m3) / vscale
            } else {
                0.0
            })
            .max(b1.mass_excess)
            .max(b2.mass_excess),
            well_residual: b1.well_residual.max(b2.well_residual),
            energy_residual: if escale > 0.0 {
                e_res.abs() / escale
            } else {
                0.0
            },
            newton_iterations: b1.newton_iterations + b2.newton_iterations,
            max_solve_iterations: b1.newton_iterations.max(b2.newton_iterations),
        };
        self.undo_time = Some(t0);
        self.end_slopes = Some(well.is_some());
        Ok(worst)
    }

    /// Replaces the raw estimate in `delta[1..]` by (S/(dΔt) + G)⁻¹ S/(dΔt) est, G the face
    /// conductances dQ/dΔh at the end of the step and the well head held (Shampine's filter,
    /// Hairer & Wanner, Solving ODEs II, §IV.8): smooth components pass unchanged, a stiff
    /// component's estimate, which grows like |λ|Δt where the scheme's own error does not,
    /// is divided by about 1 + dΔt|λ|. Left raw if the solve fails.
    ///
    /// `well`: the well node's storage and dQ_device/dH when its head is a state (its row
    /// then takes part); otherwise the well head is held.
    fn filter_estimate(&mut self, tdt: f64, well: Option<(f64, f64)>) {
        let n = self.h.len();
        let inv_tdt = 1.0 / tdt;
        // With linear faces G does not depend on the heads: the matrix is the same for the
        // same dΔt and well row, and its factors are kept (`filter_for`) until the faces
        // change. The bits are those of a fresh factorization.
        let key = (tdt.to_bits(), well.map(|(s, d)| (s.to_bits(), d.to_bits())));
        if !(self.faces_linear && self.filter_for == Some(key)) {
            self.filter_for = None;
            let last = n - 1;
            // Face derivatives at the end heads w.
            let h = &self.h;
            for j in 0..n {
                let dh = if j < last { h[j] - h[j + 1] } else { h[j] };
                self.upper[j] = if j < last || self.disc.outer_open {
                    self.disc.faces[j].flow(dh).1
                } else {
                    0.0
                };
            }
            for j in 1..n {
                self.diag[j] = self.disc.storage[j] * inv_tdt + self.upper[j - 1] + self.upper[j];
            }
            match well {
                Some((sw, dq)) => self.diag[0] = sw / tdt + self.upper[0] - dq,
                None => {
                    self.diag[0] = 1.0;
                    self.upper[0] = 0.0;
                }
            }
            if self
                .filter
                .factor_symmetric(&self.diag, &self.upper)
                .is_err()
            {
                // Left raw.
                return;
            }
            if self.faces_linear {
                self.filter_for = Some(key);
            }
        }
        self.scratch[0] = match well {
            Some((sw, _)) => self.delta[0] * sw / tdt,
            None => 0.0,
        };
        for ((x, &d), &s) in self.scratch[1..n]
            .iter_mut()
            .zip(&self.delta[1..n])
            .zip(&self.disc.storage[1..n])
        {
            *x = d * s * inv_tdt;
        }
        self.filter.solve(&mut self.scratch);
        if super::kernels::all_finite(&self.scratch) {
            self.delta.copy_from_slice(&self.scratch);
        }
    }

    /// One backward-Euler step at a device's limit (see `Stepper::step_adaptive`), with
    /// the step's local-error estimate ½ Δt |f^{n+1} − fⁿ| (first order, from the slopes at
    /// both ends, the column's flow included) measured like TR-BDF2's. The norm is capped at
    /// [`super::KEEP_STEP_NORM`]: the step is never rejected (a kink of the device's law makes
    /// the slopes jump, where no shorter step would do better) but it may grow where the
    /// limit holds smoothly (a column parted over a whole swab lift). On error the state is
    /// unchanged.
    pub(super) fn step_at_limit(
        &mut self,
        model: &Model,
        dt: f64,
        tol: Tolerances,
    ) -> Result<ErrorNorm, SolverError> {
        let t0 = self.time_s;
        self.undo_time = None;
        self.h_start.copy_from_slice(&self.h);
        let col = |st: &Stepper| st.column.inertial.then_some(st.column.q);
        let well_before = well_storage(model, &self.disc, t0).is_some();
        slopes(
            model,
            &self.disc,
            self.vapour,
            t0,
            &self.h,
            col(self),
            &mut self.slope_mid,
        );
        let (q0, mass0) = (self.screen_flow(), super::column_inertance(model, t0));
        let fq0 = self.column_slope(&self.h, q0, mass0);
        self.step(model, dt, 1.0)?;
        let t1 = left_limit(self.time_s);
        slopes(
            model,
            &self.disc,
            self.vapour,
            t1,
            &self.h,
            col(self),
            &mut self.slope_start,
        );
        self.end_slopes = None;
        let first = if well_before && well_storage(model, &self.disc, t1).is_some() {
            0
        } else {
            1
        };
        let mut worst = ErrorNorm {
            value: 0.0,
            index: 0,
        };
        for j in first..self.h.len() {
            let e = 0.5 * dt * (self.slope_start[j] - self.slope_mid[j]).abs();
            let den = tol.absolute_m + tol.relative * self.h[j].abs().max(self.h_start[j].abs());
            if e.is_nan() || e > worst.value * den {
                worst = ErrorNorm {
                    value: e / den,
                    index: j,
                };
            }
        }
        let mass1 = super::column_inertance(model, t1);
        if self.column.inertial && mass0 > 0.0 && mass1 > 0.0 {
            let q1 = self.column.q;
            let fq1 = self.column_slope(&self.h, q1, mass1);
            let face = &self.disc.faces[0];
            let r_prime = face.r_lin() + 2.0 * face.r_nl() * q1.abs();
            let e = 0.5 * dt * (fq1 - fq0).abs();
            let den = tol.relative * q0.abs().max(q1.abs()) + tol.absolute_m / r_prime;
            if e.is_nan() || e > worst.value * den {
                worst = ErrorNorm {
                    value: e / den,
                    index: 0,
                };
            }
        }
        // The controller's factor 0.9 ν^(−1/3) assumes TR-BDF2's third-order local error;
        // for this first-order step it is cautious, which suits a step at a limit.
        worst.value = if worst.value.is_nan() {
            super::KEEP_STEP_NORM
        } else {
            worst.value.min(super::KEEP_STEP_NORM)
        };
        Ok(worst)
    }

    /// Puts back the state before the last [`Stepper::step_trbdf2`] (a step the error
    /// control rejected). Does nothing if there is no such step.
    pub fn undo_step(&mut self) {
        self.end_slopes = None;
        if let Some(t0) = self.undo_time.take() {
            self.h.copy_from_slice(&self.h_start);
            self.column = self.column_start;
            self.time_s = t0;
            self.forget_history();
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Stability function of the scheme for dh/dt = λh, z = λΔt.
    fn r(z: f64) -> f64 {
        (A * (1.0 + 0.5 * GAMMA * z) / (1.0 - 0.5 * GAMMA * z) - B) / (1.0 - 0.5 * GAMMA * z)
    }

    #[test]
    fn weights_are_consistent() {
        // a − b = 1 (h̃ is an affine combination) and aγ + d = 1 (the stage volumes add up
        // to a quadrature of the step): algebra of the scheme, Bank et al. 1985.
        assert!((A - B - 1.0).abs() < 1e-15);
        assert!((A * GAMMA + 0.5 * GAMMA - 1.0).abs() < 1e-15);
        // d = (1 − γ)/(2 − γ) equals γ/2 for γ = 2 − √2 (same matrix in both stages).
        assert!(((1.0 - GAMMA) / (2.0 - GAMMA) - 0.5 * GAMMA).abs() < 1e-15);
    }

    #[test]
    fn l_stable_and_error_constant() {
        // R(−∞) = 0: L-stability (Hosea & Shampine 1996).
        assert!(r(-1e12).abs() < 1e-11);
        // Decay like (a + b)/(d|z|) ≈ 4.83e−3 at z = −1000 (the limit of the formula above).
        assert!(r(-1e3).abs() < 4.9e-3);
        // R(z) − eᶻ = C z³ + O(z⁴): C = √2/2 − 2/3 (sympy series of R(z) − exp(z), by hand:
        // coefficient −2/3 + √2/2 ≈ 0.040440, next −67/24 + 2√2 ≈ 0.036760).
        for z in [1e-2f64, -1e-2, 5e-3] {
            let lte = r(z) - z.exp();
            let lead = ERROR_CONSTANT * z.powi(3) + (2.0 * SQRT_2 - 67.0 / 24.0) * z.powi(4);
            assert!(
                (lte - lead).abs() < 1e-4 * lead.abs(),
                "z = {z}: {lte} vs {lead}"
            );
        }
    }

    #[test]
    fn kept_filter_factors_give_the_bits_of_fresh_ones() {
        // A linear well (Darcy media, no entrance loss; invented numbers) under a sine head,
        // stepped with two step lengths in turn: the stepper that keeps the filter's factors
        // against one made to refactor at every step. Same operations: same bits.
        use crate::model::*;
        let mut m = crate::fixtures::demo_well();
        m.numerics.grid = GridSpec::Total(61);
        let tol = Tolerances {
            relative: 1e-4,
            absolute_m: 1e-5,
        };
        let (mut kept, mut fresh) = (Stepper::new(&m, None), Stepper::new(&m, None));
        assert!(kept.is_linear());
        for k in 0..300 {
            let dt = if (k / 7) % 2 == 0 { 0.01 } else { 0.004 };
            fresh.filter_for = None;
            let a = kept.step_trbdf2(&m, dt, tol).unwrap();
            let b = fresh.step_trbdf2(&m, dt, tol).unwrap();
            assert_eq!(a.value.to_bits(), b.value.to_bits(), "step {k}");
            assert_eq!(a.index, b.index);
            assert!(kept
                .heads()
                .iter()
                .zip(fresh.heads())
                .all(|(x, y)| x.to_bits() == y.to_bits()));
        }
        // The kept factors were used: the key is set after a step at a repeated length.
        assert!(kept.filter_for.is_some());
    }

    #[test]
    fn estimate_matches_true_error_on_smooth_decay() {
        // dh/dt = λh: the estimate from the slopes at v, u and w against R(z) − eᶻ (exact
        // solution). Asymptotically exact as z → 0; within 4 % at |z| = 0.1 (O(z) relative).
        for z in [0.1f64, -0.1, 0.01] {
            let v = 1.0;
            let u = (1.0 + 0.5 * GAMMA * z) / (1.0 - 0.5 * GAMMA * z);
            let ht = A * u - B * v;
            let w = ht / (1.0 - 0.5 * GAMMA * z);
            let (f0, fg, f1) = (z * v, z * u, (w - ht) / (0.5 * GAMMA));
            let est = 2.0
                * ERROR_CONSTANT
                * (f0 / GAMMA - fg / (GAMMA * (1.0 - GAMMA)) + f1 / (1.0 - GAMMA));
            let err = w - z.exp();
            assert!(
                ((est - err) / err).abs() < 0.4 * z.abs(),
                "z = {z}: est {est} err {err}"
            );
        }
    }
}
