//! The well row solved on its own: the in-well head of a well node without storage, and
//! the bracketed scalar root finder that both this and the Newton elimination use.

use super::Stepper;
use crate::error::SolverError;
use crate::model::Model;

/// Iterations allowed for a scalar root (Newton with bisection; bisection alone narrows a
/// bracket to round-off in about 60).
const ALGEBRAIC_MAX_ITERATIONS: usize = 200;

/// Newton steps taken toward a side of the bracket that is still open before widening
/// steps take over (a convex law approached from its flat side converges in a few; one that
/// does not is bracketed by doubling).
const OPEN_NEWTON_STEPS: usize = 6;

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
        let device = model.drive.device_at(t, self.vapour);
        let f = |h: f64| {
            let (q, g) = self.screen_path_flow(h - h1);
            let dev = device.flow(h);
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

impl Stepper {
    /// Head under a sealing tool at which the tool's law passes the column flow `q`:
    /// `Q_device(t, H) = q`, increasing in −Q_device (leakage and the vapour law fall
    /// with H). Fails when the law does not depend on H (no leakage) or has no root.
    pub(super) fn tool_head_for_flow(
        &self,
        model: &Model,
        t: f64,
        q: f64,
    ) -> Result<f64, SolverError> {
        let device = model.drive.device_at(t, self.vapour);
        let f = |h: f64| {
            let dev = device.flow(h);
            (
                q - dev.total(),
                -dev.d_dh_m2_s,
                q.abs() + dev.displacement_m3_s.abs() + dev.bypass_m3_s.abs(),
            )
        };
        let settled = 1e-15 * self.h[0].abs().max(self.h[1].abs());
        bracketed_root(t, self.h[0], HEAD_UNIT_M, settled, f)
    }
}

/// Root of a strictly increasing function `f` (returning value, derivative and the size of
/// the terms the value sums, for the round-off test), from `guess` (warm: the last
/// iterate's or step's root): safeguarded Newton. Each evaluation narrows a bracket; while
/// one side of it is still open, Newton steps toward it are taken as they come (on a
/// monotone law they either converge or cross the root and close the bracket), and a
/// widening step from `unit` (or |guess|), doubling, is taken instead when Newton points the
/// wrong way, is not finite or has not closed the bracket after a few steps. Once both sides
/// are known, Newton is replaced by bisection whenever it would leave the bracket or would
/// not halve the previous step, so it converges even on square-root laws where plain
/// Newton cycles. The iteration stops once the variable moves by less than 1e-15 of its
/// magnitude or than `settled`, whichever is larger. A smooth law near the guess costs two
/// or three evaluations.
pub(super) fn bracketed_root(
    t: f64,
    guess: f64,
    unit: f64,
    settled: f64,
    f: impl Fn(f64) -> (f64, f64, f64),
) -> Result<f64, SolverError> {
    let non_finite = || SolverError::NonFinite {
        time_s: t,
        index: 0,
    };
    let mut h = guess;
    let (mut lo, mut hi) = (f64::NEG_INFINITY, f64::INFINITY);
    let mut width = unit.max(h.abs());
    // Stop when the Newton correction is at round-off of the variable: the residual itself
    // cannot be driven below the round-off of the steep screen and orifice laws. A step
    // that small settles the root only where the function is smooth, so it is confirmed by
    // a probe a few round-off steps toward the root: beside a square-root law's vertical
    // tangent (an orifice at zero head difference) the derivative is huge and the step tiny
    // while the value is not. With both sides known, Newton is replaced by bisection when it
    // would leave the bracket or would not halve the previous step (the safeguard of Press
    // et al., Numerical Recipes, "rtsafe", from memory), since on a square-root law it
    // cycles between the two sides.
    let tiny = |h: f64| (1e-15 * h.abs()).max(settled).max(f64::MIN_POSITIVE);
    let mut last = (f64::INFINITY, 1.0);
    let mut step = f64::INFINITY;
    let mut open_steps = 0;
    for _ in 0..ALGEBRAIC_MAX_ITERATIONS {
        if !h.is_finite() {
            return Err(non_finite());
        }
        let (v, d, scale) = f(h);
        last = (v, scale);
        if v == 0.0 || v.abs() <= 1e-15 * scale || hi - lo <= tiny(h) {
            return Ok(h);
        }
        if v < 0.0 {
            lo = h;
        } else {
            hi = h;
        }
        let newton = h - v / d;
        let inside = newton > lo && newton < hi;
        if inside && (newton - h).abs() <= tiny(h) {
            let probe = if v < 0.0 {
                (h + 4.0 * tiny(h)).min(hi)
            } else {
                (h - 4.0 * tiny(h)).max(lo)
            };
            let vp = f(probe).0;
            if vp == 0.0 {
                return Ok(probe);
            }
            if (vp > 0.0) != (v > 0.0) {
                // The root lies between h and the probe, and so does the Newton point (its
                // step is shorter than the probe's): on a smooth law it is the closer.
                return Ok(newton);
            }
            // Still short of the root: the probe narrows the bracket.
            if v < 0.0 {
                lo = probe;
            } else {
                hi = probe;
            }
        }
        let bracketed = lo.is_finite() && hi.is_finite();
        let good_newton = inside && (newton - h).abs() > tiny(h);
        if !bracketed {
            // Toward the open side: Newton while it heads there (a few times), else widen.
            open_steps += 1;
            if good_newton && open_steps <= OPEN_NEWTON_STEPS {
                step = newton - h;
                h = newton;
            } else {
                step = if v < 0.0 { width } else { -width };
                h = if v < 0.0 { lo + width } else { hi - width };
                width *= 2.0;
            }
        } else if good_newton && 2.0 * (newton - h).abs() <= step.abs() {
            step = newton - h;
            h = newton;
        } else {
            step = 0.5 * (hi - lo);
            h = lo + step;
        }
    }
    Err(SolverError::NewtonFailed {
        time_s: t,
        iterations: ALGEBRAIC_MAX_ITERATIONS,
        residual: last.0.abs() / last.1.max(f64::MIN_POSITIVE),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// f(x) = c + x + k sign(x) sqrt|x|: strictly increasing, with a vertical tangent at
    /// x = 0 where f(0) = c ≠ 0, the shape of a clearance orifice's flow near zero head
    /// difference. Root where k sqrt|x| ≈ c, x < 0.
    fn orifice_like(c: f64, k: f64) -> impl Fn(f64) -> (f64, f64, f64) {
        move |x: f64| {
            let r = x.abs().sqrt();
            let d = if r > 0.0 {
                1.0 + 0.5 * k / r
            } else {
                f64::INFINITY
            };
            (c + x + k * r.copysign(x), d, c.abs() + x.abs() + k * r)
        }
    }

    #[test]
    fn a_vertical_tangent_beside_the_root_is_not_taken_for_it() {
        // Newton from the right creeps toward x = 0 with steps that shrink with 1/f'; a
        // round-off-small step there once ended the iteration at f = c. The root is where
        // x + k sign(x) sqrt|x| = −c: x = −((−k + sqrt(k² + 4c))/2)² (quadratic in sqrt|x|,
        // derived here).
        for (c, k) in [(1e-3, 10.0), (2.9e-3, 0.0385 * 381.8), (1e-6, 1.0)] {
            let f = orifice_like(c, k);
            let x = bracketed_root(0.0, 1.0, 1e-3, 1e-18, &f).unwrap();
            let s = (-k + (k * k + 4.0 * c).sqrt()) / 2.0;
            let want = -s * s;
            let (v, _, scale) = f(x);
            assert!(v.abs() <= 1e-12 * scale, "c {c}: f({x:e}) = {v:e}");
            assert!(
                (x - want).abs() <= 1e-9 * want.abs(),
                "c {c}: {x:e} vs {want:e}"
            );
        }
    }

    #[test]
    fn a_jump_across_zero_closes_the_bracket_on_it() {
        // An increasing function without a root: a jump from −1 to +1 at x = 0.3 (a valve
        // opening, say). Bisection closes the bracket on the jump to round-off, the best a
        // sign change allows, and the jump's place is returned.
        let f = |x: f64| (if x < 0.3 { -1.0 } else { 1.0 }, 0.0, 1.0);
        let x = bracketed_root(0.0, 0.0, 1.0, 1e-18, f).unwrap();
        assert!((x - 0.3).abs() < 1e-12, "{x}");
    }

    #[test]
    fn a_warm_guess_on_a_smooth_law_costs_few_evaluations() {
        // f(x) = x³ + x − 2 (root x = 1, by hand: 1 + 1 − 2 = 0), increasing. From a guess
        // 1e-3 off, Newton's error squares each step (e ≈ f''/(2f') e² = 6/8 e²): 1e-3, 8e-7,
        // 5e-13, round-off; so at most four evaluations plus the round-off probe.
        let calls = std::cell::Cell::new(0);
        let f = |x: f64| {
            calls.set(calls.get() + 1);
            (
                x * x * x + x - 2.0,
                3.0 * x * x + 1.0,
                (x * x * x).abs() + x.abs() + 2.0,
            )
        };
        let x = bracketed_root(0.0, 1.001, 1e-3, 0.0, f).unwrap();
        assert!((x - 1.0).abs() <= 4.0 * f64::EPSILON, "{x}");
        assert!(calls.get() <= 5, "{} evaluations", calls.get());
        // A cold guess far on the flat side is still found (Newton toward the open side,
        // then widening): from −50 the law is steep and Newton crosses the root at once.
        calls.set(0);
        let x = bracketed_root(0.0, -50.0, 1e-3, 0.0, f).unwrap();
        assert!((x - 1.0).abs() <= 4.0 * f64::EPSILON, "{x}");
        assert!(calls.get() <= 40, "{} evaluations", calls.get());
    }
}
