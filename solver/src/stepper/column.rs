//! The mass of the water column between the well node's head and the screen
//! (docs/physics.md §24).
//!
//! The well node's head H is the head at the top of the column that moves with the screen
//! flow: the free surface, or the water just below a sealing tool. The column of effective
//! length L_e in the casing of area A_c carries the screen flow Q (positive toward the
//! formation); its momentum balance, in heads, is
//!
//! ```text
//! M dQ/dt = H − H_s,      M = L_e/(g A_c)  (s²/m²)
//! H_s = h₁ + R_lin Q + R_nl Q|Q|          the head inside the screen, through face 0
//! ```
//! so H_s is algebraic and Q is a state. Over a θ-stage of storage length θΔt, with
//! Q^θ = θ Q^{n+1} + (1−θ) Qⁿ, the balance reads `M (Q^θ − Qⁿ)/(θΔt) = H^θ − H_s^θ`: a
//! linear resistance m = M/(θΔt) in series with face 0, with the head offset m Qⁿ,
//!
//! ```text
//! H^θ − y₁ + m Qⁿ = (R_lin + m) Q^θ + R_nl Q^θ|Q^θ|
//! ```
//! which is the face law of [`crate::faces`] with R_lin + m and a shifted head drop. Every
//! solve of the stage (the direct linear one, Newton with the eliminated well row, the
//! scalar well row) uses this path law in place of face 0's. The stage's end gives
//! Q^{n+1} = (Q^θ − (1−θ) Qⁿ)/θ.
//!
//! Energy: Δt H^θ Q^θ = Δt H_s^θ Q^θ + M (Q^{n+1} − Qⁿ) Q^θ and the second term is
//! ½ M (Q^{n+1}² − Qⁿ²) + (θ − ½) M (Q^{n+1} − Qⁿ)²: the column's kinetic energy
//! ½ ρ L_e v² A_c = ρ g ½ M Q² and the scheme's numerical dissipation. The stage's balance
//! carries both, and the zone dissipation is taken at H_s.

use super::Stepper;
use crate::drive::Control;
use crate::faces::quadratic_law;
use crate::model::Model;
use crate::water::GRAVITY_M_S2;
use std::f64::consts::PI;

/// Inertance of the column at time t, M = L/(g A_c) with L = L_e − d the column below the
/// top of the moving water (a tool at depth d, or the static level), s²/m²; 0 when the
/// column has no length, the well has no column inertia (L_e = 0) or the head is
/// prescribed (the drive then sets the head at the screen).
pub fn column_inertance(model: &Model, t: f64) -> f64 {
    let w = &model.well;
    if w.column_length_m <= 0.0 || model.drive.control_at(t) != Control::Flow {
        return 0.0;
    }
    let l = w.column_length_m - model.drive.column_top_depth_m(t);
    if l > 0.0 {
        l / (GRAVITY_M_S2 * PI * w.casing_radius_m * w.casing_radius_m)
    } else {
        0.0
    }
}

/// The column's state and the current stage's inertance.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub(super) struct Column {
    /// Column (= screen) flow at the current time, m³/s, when `inertial`.
    pub q: f64,
    /// Whether Q is a state now (the last stage had inertia); otherwise the screen flow
    /// follows from the heads through face 0.
    pub inertial: bool,
    /// Q at the start of the stage being solved, m³/s.
    pub q_old: f64,
    /// M/(θΔt) of the stage being solved, s/m² (0: no inertia).
    pub m: f64,
    /// M of the stage being solved, s²/m².
    pub mass: f64,
}

impl Stepper {
    /// Flow through the screen path for the head drop Δh = y₀ − y₁ and dQ/dΔh: face 0, and
    /// in a stage with inertia the column in series (module doc).
    #[inline]
    pub(super) fn screen_path_flow(&self, dh: f64) -> (f64, f64) {
        let c = &self.column;
        let face = &self.disc.faces[0];
        if c.m == 0.0 {
            face.flow(dh)
        } else {
            quadratic_law(face.r_lin() + c.m, face.r_nl(), dh + c.m * c.q_old)
        }
    }

    /// Flow through the screen now, m³/s (positive into the formation): the column's
    /// flow when it is a state, else face 0's law at the current heads.
    pub fn screen_flow(&self) -> f64 {
        if self.column.inertial {
            self.column.q
        } else {
            self.disc.faces[0].flow(self.h[0] - self.h[1]).0
        }
    }

    /// Head inside the screen now, m: the well head, less the column's inertial head when
    /// the column has inertia (H_s = h₁ + R(Q)).
    pub fn screen_head(&self) -> f64 {
        if self.column.inertial {
            self.path_screen_head(self.h[1], self.column.q)
        } else {
            self.h[0]
        }
    }

    /// H_s = h₁ + R_lin Q + R_nl Q|Q| through face 0, m.
    pub(super) fn path_screen_head(&self, h1: f64, q: f64) -> f64 {
        let face = &self.disc.faces[0];
        h1 + face.r_lin() * q + face.r_nl() * q * q.abs()
    }

    /// dQ/dt of the column at heads `h` and column flow q with inertance `mass`, m³/s².
    pub(super) fn column_slope(&self, h: &[f64], q: f64, mass: f64) -> f64 {
        if mass > 0.0 {
            (h[0] - self.path_screen_head(h[1], q)) / mass
        } else {
            0.0
        }
    }

    /// Sets up the column for a stage of storage length `tdt` with the forcing at
    /// `t_theta`: its inertance, and Qⁿ from the state or the heads.
    pub(super) fn begin_column_stage(&mut self, model: &Model, tdt: f64, t_theta: f64) {
        let mass = column_inertance(model, t_theta);
        self.column.q_old = self.screen_flow();
        self.column.mass = mass;
        self.column.m = if mass > 0.0 { mass / tdt } else { 0.0 };
    }

    /// Ends a stage whose θ-point screen flow is `q_theta`: the column's new flow, its
    /// kinetic-energy change ½ M (Q^{n+1}² − Qⁿ²) and numerical dissipation
    /// (θ − ½) M (Q^{n+1} − Qⁿ)², m⁴.
    pub(super) fn end_column_stage(&mut self, q_theta: f64, theta: f64) -> (f64, f64) {
        let c = &mut self.column;
        if c.m == 0.0 {
            c.inertial = false;
            return (0.0, 0.0);
        }
        let q_new = (q_theta - (1.0 - theta) * c.q_old) / theta;
        c.q = q_new;
        c.inertial = true;
        let dq = q_new - c.q_old;
        (
            0.5 * c.mass * (q_new + c.q_old) * dq,
            (theta - 0.5) * c.mass * dq * dq,
        )
    }
}
