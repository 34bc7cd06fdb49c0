//! Newton's iteration for a step with nonlinear losses: residual and Jacobian of the
//! θ-point system, chord reuse, Armijo backtracking, nonlinear elimination of a
//! head-dependent well through the screen inflow, and the round-off-aware acceptance. See the
//! parent module for the equations.

use super::residual::{max_abs, residual_avx_or_rows, Residuals};
use super::well::bracketed_root;
use super::{Stepper, WellRow};
use crate::drive::Control;
use crate::error::SolverError;
use crate::model::Model;

// The thresholds below are numerical choices (assumption), each explained where it is
// defined; the verification groups and the random-case harness (DEVELOPERS.md) hold them to
// account. Armijo's condition itself: Kelley 2003, "Solving Nonlinear Equations with
// Newton's Method", §1.6 (from memory — verify).

/// A residual row within this many ulps of its face flows' round-off is converged.
const ROUND_OFF_ULPS: f64 = 4.0;

/// Largest relative residual accepted when the iteration has stalled at round-off.
const STALL_RESIDUAL: f64 = 1e-9;
/// A full Newton step that moves no head by more than this times the largest head (or
/// 1 mm) means the iteration has stalled: the heads are settled to twelve digits and what
/// is left of the residual is round-off of the face flows.
const STALL_UPDATE: f64 = 1e-12;

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

impl Stepper {
    /// True when every cell row is within the Newton tolerance (relative to the cells' flow
    /// scale) or within [`ROUND_OFF_ULPS`] ulps of the round-off of its face flows, so is
    /// their sum `sum` (the volume balance) within the tolerance or the sum of those floors,
    /// and the well row (from `first` = 0) within the tolerance of its own scale.
    pub(super) fn rows_at_round_off(
        &self,
        first: usize,
        faces: usize,
        cell_scale: f64,
        well_scale: f64,
        sum: f64,
    ) -> bool {
        let n = self.y.len();
        let bound = self.newton_tolerance * cell_scale;
        let g_y = |f: usize| {
            if f >= faces {
                return 0.0;
            }
            let y_next = if f + 1 < n { self.y[f + 1].abs() } else { 0.0 };
            self.face_g[f] * self.y[f].abs().max(y_next)
        };
        let mut floors = 0.0;
        let rows_ok = (1..n).all(|j| {
            let floor =
                ROUND_OFF_ULPS * f64::EPSILON * (if j > 0 { g_y(j - 1) } else { 0.0 } + g_y(j));
            floors += floor;
            self.rhs[j].abs() <= bound.max(floor)
        });
        let well_ok = first > 0
            || self.rhs[0].abs()
                <= (self.newton_tolerance * well_scale).max(ROUND_OFF_ULPS * f64::EPSILON * g_y(0));
        well_ok && rows_ok && sum.abs() <= bound.max(floors)
    }

    /// Factors the Jacobian assembled in `diag` and `upper` (well row decoupled, cell 1
    /// without the screen face) and stores the cells' response to a unit inflow into cell 1,
    /// `inflow_response` = J_c⁻¹ e₁. False when the factorization fails or the response is
    /// not positive and finite (J_c is an M-matrix, so w > 0 whenever it is regular).
    pub(super) fn factor_cells_alone(&mut self) -> bool {
        if self
            .factored
            .factor_symmetric(&self.diag, &self.upper)
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
    /// H(Q)  = y₁(Q) + R_lin Q + R_nl Q|Q|  (+ m (Q − Qⁿ), the column)   m
    /// φ(Q)  = s (H − h₀) + Q − Q_device(t, H) = 0                   m³/s
    /// dφ/dQ = (s − dQ_device/dH)(w₁ + R_lin + m + 2 R_nl |Q|) + 1 ≥ 1
    /// ```
    /// φ increases strictly (storage, screen and leakage all resist), so the bracketed
    /// iteration of [`bracketed_root`] finds the one root. The unknown is a flow: the head
    /// laws of screen and cells are smooth in it, and the leakage's square root is met
    /// exactly rather than linearized.
    pub(super) fn well_inflow(
        &self,
        model: &Model,
        t: f64,
        s: f64,
        y1a: f64,
        q_now: f64,
        w1: f64,
    ) -> Result<f64, SolverError> {
        let (h0, face) = (self.h[0], &self.disc.faces[0]);
        // The column's inertance m in series with the screen (`stepper/column.rs`).
        let (m, q_old) = (self.column.m, self.column.q_old);
        let (r_lin, r_nl) = (face.r_lin() + m, face.r_nl());
        let device = model.drive.device_at(t, self.vapour);
        let f = |q: f64| {
            let hw = y1a + (q - q_now) * w1 + r_lin * q - m * q_old + r_nl * q * q.abs();
            let dev = device.flow(hw);
            let st = s * (hw - h0);
            (
                st + q - dev.total(),
                (s - dev.d_dh_m2_s) * (w1 + r_lin + 2.0 * r_nl * q.abs()) + 1.0,
                st.abs() + q.abs() + dev.displacement_m3_s.abs() + dev.bypass_m3_s.abs(),
            )
        };
        // Flows below the current screen and device flows are round-off in absolute terms.
        let unit = (q_now.abs() + device.flow(self.y[0]).total().abs()).max(f64::MIN_POSITIVE);
        bracketed_root(t, q_now, unit, 1e-15 * unit, f)
    }

    /// Puts the well head of a Newton iterate back on its row: the prescribed value, or,
    /// for an eliminated well row, its exact solution for the current y₁.
    pub(super) fn reset_well_head(
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

    /// Writes −R_j of every cell row into `rhs[1..]` from the face flows in `face_q` and
    /// returns the largest |R_j|, the largest flow term |S_j (y_j − h_j)/(θΔt)| + |Q_{j−1}|
    /// + |Q_j| of a row and Σ R_j, in m³/s.
    fn cell_residuals(&mut self, inv_tdt: f64) -> Residuals {
        let n = self.y.len();
        let (rhs, y, h, s) = (
            &mut self.rhs[1..n],
            &self.y[1..n],
            &self.h[1..n],
            &self.disc.storage[1..n],
        );
        let (q_in, q_out) = (&self.face_q[..n - 1], &self.face_q[1..n]);
        residual_avx_or_rows(y, h, s, q_in, q_out, inv_tdt, rhs)
    }

    /// The Jacobian from the face derivatives in `face_g` (the outer face only when
    /// `outer_open`): it is symmetric, −g_j coupling nodes j and j + 1, so `diag` gets the
    /// diagonal and `upper` the couplings g_j. Row 0 gets the screen face alone; the caller
    /// completes it with the well's own terms.
    fn assemble_jacobian(&mut self, inv_tdt: f64, outer_open: bool) {
        let n = self.y.len();
        let last = n - 1;
        let (g, s, diag) = (
            &self.face_g[..n],
            &self.disc.storage[..n],
            &mut self.diag[..n],
        );
        diag[0] = g[0];
        for (((d, &s), &g0), &g1) in diag[1..last]
            .iter_mut()
            .zip(&s[1..last])
            .zip(&g[..last - 1])
            .zip(&g[1..last])
        {
            *d = s * inv_tdt + g0 + g1;
        }
        diag[last] = s[last] * inv_tdt + g[last - 1] + if outer_open { g[last] } else { 0.0 };
        self.upper[..last].copy_from_slice(&g[..last]);
    }

    pub(super) fn solve_newton(
        &mut self,
        model: &Model,
        tdt: f64,
        theta: f64,
        t_new: f64,
        t_theta: f64,
    ) -> Result<usize, SolverError> {
        let n = self.h.len();
        let last = n - 1;
        // Initial guess: the recent θ-point heads extrapolated to this step's θ-point.
        if self.predict_end && theta == 1.0 {
            // TR-BDF2's second stage: the ends of the last steps extrapolated.
            self.predictor.guess(&self.h, t_new, &mut self.y);
        } else if self.predict_end {
            // Its trapezoidal stage: the last such stages' θ-points.
            self.predictor_mid.guess(&self.h, t_theta, &mut self.y);
        } else {
            self.predictor.guess(&self.h, t_theta, &mut self.y);
        }
        let inv_tdt = 1.0 / tdt;
        let open = usize::from(self.disc.outer_open);
        let mut residual = f64::INFINITY;
        let mut updated = false;
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
        // Unless the device's flow depends on the in-well head, the well row is the same at
        // every iterate of the step.
        let step_well =
            (!self.head_dependent).then(|| self.well_row(model, tdt, theta, t_new, t_theta));
        for iteration in 0..=self.newton_max_iterations {
            let well = match step_well {
                Some(w) => w,
                None => self.well_row(model, tdt, theta, t_new, t_theta),
            };
            // Face flows and derivatives, batched (faces 0..last, plus the outer one if open).
            crate::faces::flows(
                &self.y,
                &self.disc.r_lin[..last],
                &self.disc.r_nl[..last],
                &mut self.face_dh[..last],
                &mut self.face_q[..last],
                &mut self.face_g[..last],
            );
            if open == 1 {
                self.face_dh[last] = self.y[last];
                (self.face_q[last], self.face_g[last]) = crate::faces::quadratic_law(
                    self.disc.r_lin[last],
                    self.disc.r_nl[last],
                    self.y[last],
                );
            } else {
                self.face_q[last] = 0.0;
            }
            // With column inertia the screen path is face 0 and the column in series.
            if self.column.m > 0.0 {
                (self.face_q[0], self.face_g[0]) = self.screen_path_flow(self.face_dh[0]);
            }
            // −R in rhs, cells 1..n in one pass, with the largest |R| and the largest flow
            // term of a row: R_j = S_j (y_j − h_j)/(θΔt) − Q_{j−1} + Q_j.
            let cells = self.cell_residuals(inv_tdt);
            self.rhs[0] = -self.face_q[0];
            let mut well_scale = self.face_q[0].abs();
            let fixed_ok = match well {
                WellRow::Fixed(v) => {
                    self.rhs[0] = v - self.y[0];
                    well_scale = 0.0;
                    self.y[0] == v
                }
                WellRow::Storage { s_over_tdt, q, .. } => {
                    let acc = s_over_tdt * (self.y[0] - self.h[0]);
                    self.rhs[0] -= acc - q;
                    well_scale += acc.abs() + q.abs();
                    true
                }
            };
            // The prescribed head row, and an eliminated well row (solved to round-off by its
            // own bracketed iteration), are not part of the Newton residual.
            let first = usize::from(matches!(well, WellRow::Fixed(_)) || eliminate_well);
            // The cells and the well row are each measured against their own flows: a pump
            // drawing litres per second from a well behind a sealing cake must not set the
            // scale for the cells' flows of millilitres.
            let relative = |r: f64, scale: f64| if scale > 0.0 { r / scale } else { 0.0 };
            let well_residual = if first == 0 {
                relative(self.rhs[0].abs(), well_scale)
            } else {
                0.0
            };
            let worst = if first == 0 {
                cells.worst.max(self.rhs[0].abs())
            } else {
                cells.worst
            };
            residual = relative(cells.worst, cells.scale).max(well_residual);
            // The cells' residuals must also not add up: their sum is the step's volume
            // balance, which a tolerance on each row alone bounds only by N times it.
            let balance = relative(cells.sum.abs(), cells.scale);
            if fixed_ok && residual <= self.newton_tolerance && balance <= self.newton_tolerance {
                return Ok(iteration);
            }
            // At round-off: a face flow is computed from a head difference, so its absolute
            // error is about ε g max(|y_i|, |y_i+1|); with near-equal heads on a stiff face
            // (a sealing cake behind a conductive pack and screen) that exceeds the tolerance
            // times the net flows. Every row must then be within the tolerance or within a
            // couple of ulps of its own floor.
            if fixed_ok
                && residual <= STALL_RESIDUAL * 10.0
                && self.rows_at_round_off(first, last + open, cells.scale, well_scale, cells.sum)
            {
                return Ok(iteration);
            }
            // Stalled at round-off: the last update and the correction each row asks for are
            // a few ulps of the largest head (the diagonal estimate uses the face derivatives).
            // (Measured only here, after an update that did not converge.)
            let head_scale = if fixed_ok && lambda == 1.0 && updated {
                max_abs(&self.y).max(1e-3)
            } else {
                0.0
            };
            if head_scale > 0.0 && max_abs(&self.delta) <= STALL_UPDATE * head_scale {
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
            // An eliminated well row takes no part in the cells' update; a prescribed one
            // moves by rhs[0] (zero once the head is in place), which cell 1 sees through
            // the screen face: with that row decoupled the matrix stays symmetric.
            if eliminate_well {
                self.rhs[0] = 0.0;
            } else if let WellRow::Fixed(_) = well {
                self.rhs[1] += self.face_g[0] * self.rhs[0];
            }
            // Refactor unless the chord iteration is contracting fast.
            let mut solved = false;
            if !factored || residual > CHORD_CONTRACTION * accepted_residual {
                self.assemble_jacobian(inv_tdt, open == 1);
                match well {
                    // The prescribed head row is decoupled: its update, rhs[0], enters cell
                    // 1's right-hand side below.
                    WellRow::Fixed(_) => {
                        self.diag[0] = 1.0;
                        self.upper[0] = 0.0;
                    }
                    WellRow::Storage { s_over_tdt, dq, .. } if eliminate_well => {
                        // The cells alone first (the screen face leaves cell 1's row).
                        let g0 = self.face_g[0];
                        self.diag[0] = 1.0;
                        self.upper[0] = 0.0;
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
                    // Eliminated and swept in one pass.
                    self.factored
                        .factor_solve_symmetric(&self.diag, &self.upper, &mut self.rhs)?;
                    solved = true;
                }
                self.factored_for = None;
                factored = true;
            }
            // Until the prescribed well head is in place the residual is not comparable.
            accepted_residual = if fixed_ok { residual } else { f64::INFINITY };
            accepted_worst = if fixed_ok { worst } else { f64::INFINITY };
            lambda = 1.0;
            if !solved {
                self.factored.solve(&mut self.rhs);
            }
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
            // Keep the iterate and the update for the backtracking, and apply it.
            std::mem::swap(&mut self.y, &mut self.y_prev);
            std::mem::swap(&mut self.rhs, &mut self.delta);
            for ((y, &y0), &d) in self.y.iter_mut().zip(&self.y_prev).zip(&self.delta) {
                *y = y0 + d;
            }
            updated = true;
            self.reset_well_head(model, well, eliminate_well, t_theta)?;
        }
        Err(SolverError::NewtonFailed {
            time_s: t_new,
            iterations: self.newton_max_iterations,
            residual,
        })
    }
}
