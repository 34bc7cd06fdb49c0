//! The well row solved on its own: the in-well head of a well node without storage, and
//! the bracketed scalar root finder that both this and the Newton elimination use.

use super::Stepper;
use crate::error::SolverError;
use crate::model::Model;

/// Iterations allowed for the in-well head of a well without storage.
const ALGEBRAIC_MAX_ITERATIONS: usize = 50;

/// First widening step of the bracket on an in-well head near zero, m.
const HEAD_UNIT_M: f64 = 1e-3;

impl Stepper {
    /// In-well head of a well node without storage at the end of the step. Such a node holds
    /// no water of its own: its head is not a state but the solution of the constraint
    /// `F₀(H − h₁) = Q_device(t, H)` at the step's end time (extrapolating it like a state
    /// would let Crank–Nicolson's −1 amplification ring). Scalar Newton from the
    /// extrapolated value.
    pub(super) fn algebraic_well_head(&self, model: &Model, t: f64) -> Result<f64, SolverError> {
        self.solve_well_row(model, t, self.h[0], 0.0, self.h[0], self.h[1])
    }

    /// Solves the well row `s (H − h₀) + F₀(H − h₁) − Q_device(t, H) = 0` for H, from the
    /// guess `guess`. The left side increases strictly with H (storage, the screen passes
    /// more, the device's leakage into the node falls), so a bracket plus safeguarded
    /// Newton always converges, even on the square-root orifice law where plain Newton
    /// cycles.
    pub(super) fn solve_well_row(
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
        // The screen face's flow is computed from H − h₁, whose round-off is ε max(|H|, |h₁|):
        // the head is settled when it moves by less than that.
        let settled = 1e-15 * h1.abs().max(h0.abs());
        bracketed_root(t, guess, HEAD_UNIT_M, settled, f)
    }
}

/// Root of a strictly increasing function `f` (returning value, derivative and the size of
/// the terms the value sums, for the round-off test), from `guess`: the root is bracketed by
/// widening steps from `unit` (or |guess|) and refined by Newton, bisecting whenever Newton
/// leaves the bracket, so it converges even on square-root laws where plain Newton cycles.
/// `unit` is the first widening step when |guess| is smaller; the iteration stops once the
/// variable moves by less than 1e-15 of its magnitude or than `settled`, whichever is larger.
pub(super) fn bracketed_root(
    t: f64,
    guess: f64,
    unit: f64,
    settled: f64,
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
    let tiny = |h: f64| (1e-15 * h.abs()).max(settled).max(f64::MIN_POSITIVE);
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
