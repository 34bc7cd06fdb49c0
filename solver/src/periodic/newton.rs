//! Newton–Krylov for a fixed point x = Φ(x) of a map given only by its values: the Newton
//! system (Φ'(x) − I) d = −(Φ(x) − x) solved by restarted GMRES with forward-difference
//! products, Eisenstat–Walker forcing terms and an Armijo line search on ‖Φ(x) − x‖₂
//! (Kelley 2003, "Solving Nonlinear Equations with Newton's Method", SIAM, ch. 1 and 3,
//! from memory — verify). Used by the shooting method of the parent module, where Φ is one
//! period of time stepping; tested on its own with a scalar periodic ODE.

use super::gmres::{combine, norm, Gmres};

/// Relative size of the finite-difference step of a Jacobian–vector product, in the scaled
/// unknowns: near √(noise of Φ) for a Φ accurate to ~1e-11 relative (Kelley 2003 §3.2.1,
/// from memory — verify).
const FD_STEP: f64 = 1e-6;

/// Largest forcing term η (Eisenstat & Walker 1996, SIAM J. Sci. Comput. 17(1), choice 2
/// with γ = 0.9, safeguarded as in Kelley 2003 §3.2.3; from memory — verify). 0.1 rather
/// than Kelley's 0.9 keeps the Newton steps few, since each costs at least two periods.
const ETA_MAX: f64 = 0.1;
/// γ of the forcing term.
const ETA_GAMMA: f64 = 0.9;
/// Sufficient decrease of the Armijo rule (the customary 1e-4, Kelley 2003 §1.6; from memory
/// — verify).
const ARMIJO: f64 = 1e-4;
/// Most halvings of a Newton step (numerical choice, assumption).
const HALVINGS: usize = 8;

/// Settings of the fixed-point solve.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Settings {
    /// Stop when ‖Φ(x) − x‖∞ ≤ this (in the caller's scaled units).
    pub tolerance: f64,
    /// Most Newton iterations.
    pub max_newton: usize,
    /// Most evaluations of Φ.
    pub max_evaluations: usize,
    /// Restart length of GMRES.
    pub restart: usize,
}

/// How the solve ended.
#[derive(Debug, Clone, PartialEq)]
pub struct Outcome {
    /// ‖Φ(x) − x‖∞ at the returned x.
    pub defect: f64,
    /// Whether the defect is at most the tolerance.
    pub converged: bool,
    /// Defect at the start and after each Newton iteration.
    pub history: Vec<f64>,
    /// Newton iterations.
    pub newton: usize,
    /// Jacobian–vector products (one Φ each).
    pub products: usize,
    /// Evaluations of Φ in all.
    pub evaluations: usize,
}

/// ‖v‖∞, NaN when any entry is NaN (`f64::max` would drop it and report convergence).
fn max_abs(v: &[f64]) -> f64 {
    v.iter().fold(0.0f64, |a, x| {
        if x.is_nan() || a.is_nan() {
            f64::NAN
        } else {
            a.max(x.abs())
        }
    })
}

/// Solves x = Φ(x) from the initial x in `z` (overwritten with the last iterate).
/// `phi(x, out)` sets out = Φ(x); its error ends the solve.
pub fn fixed_point<E>(
    z: &mut [f64],
    settings: &Settings,
    mut phi: impl FnMut(&[f64], &mut [f64]) -> Result<(), E>,
) -> Result<Outcome, E> {
    let n = z.len();
    let mut phi_z = vec![0.0; n];
    let mut f = vec![0.0; n];
    let mut rhs = vec![0.0; n];
    let mut trial = vec![0.0; n];
    let mut phi_trial = vec![0.0; n];
    let mut f_trial = vec![0.0; n];
    let mut d = vec![0.0; n];
    let mut pert = vec![0.0; n];
    let mut gmres = Gmres::new(n, settings.restart);
    let mut evaluations = 1;
    phi(z, &mut phi_z)?;
    combine(&mut f, &phi_z, -1.0, z);
    let mut history = vec![max_abs(&f)];
    let (mut newton, mut products) = (0, 0);
    let mut f_norm = norm(&f);
    let mut eta = ETA_MAX;
    let mut f_prev: Option<f64> = None;
    let done = |f: &[f64]| max_abs(f) <= settings.tolerance;
    // A defect that is not finite (NaN or ∞ from Φ) ends the solve unconverged.
    while !done(&f) && max_abs(&f).is_finite() {
        // One evaluation is kept for the line search.
        let budget = settings.max_evaluations.saturating_sub(evaluations + 1);
        if newton >= settings.max_newton || budget == 0 {
            break;
        }
        if let Some(prev) = f_prev {
            let e = ETA_GAMMA * (f_norm / prev).powi(2);
            let floor = ETA_GAMMA * eta * eta;
            eta = if floor > 0.1 { e.max(floor) } else { e }.min(ETA_MAX);
        }
        // No more accuracy in the step than the tolerance needs.
        eta = eta.max(0.5 * settings.tolerance / max_abs(&f));
        for (b, v) in rhs.iter_mut().zip(&f) {
            *b = -v;
        }
        let z_scale = 1.0 + norm(z) / (n as f64).sqrt();
        let z_ref: &[f64] = z;
        let out = gmres.solve(&rhs, &mut d, eta, budget, |v, out| {
            let vn = norm(v);
            if vn == 0.0 {
                out.fill(0.0);
                return Ok(());
            }
            let eps = FD_STEP * z_scale / vn;
            combine(&mut pert, z_ref, eps, v);
            phi(&pert, out)?;
            for ((o, p), x) in out.iter_mut().zip(&phi_z).zip(v) {
                *o = (*o - p) / eps - x;
            }
            Ok(())
        })?;
        products += out.products;
        evaluations += out.products;
        newton += 1;
        let mut lambda = 1.0;
        let mut accepted = false;
        for _ in 0..HALVINGS {
            if evaluations >= settings.max_evaluations {
                break;
            }
            combine(&mut trial, z, lambda, &d);
            phi(&trial, &mut phi_trial)?;
            evaluations += 1;
            combine(&mut f_trial, &phi_trial, -1.0, &trial);
            let tn = norm(&f_trial);
            if tn <= (1.0 - ARMIJO * lambda) * f_norm {
                accepted = true;
                z.copy_from_slice(&trial);
                phi_z.copy_from_slice(&phi_trial);
                f.copy_from_slice(&f_trial);
                f_prev = Some(f_norm);
                f_norm = tn;
                break;
            }
            lambda *= 0.5;
        }
        history.push(max_abs(&f));
        if !accepted {
            break;
        }
    }
    let defect = max_abs(&f);
    Ok(Outcome {
        defect,
        converged: defect <= settings.tolerance,
        history,
        newton,
        products,
        evaluations,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// One period P = 2π/ω of x' = −x|x| + g(t) by classical RK4 with `steps` steps, where
    /// g is manufactured so that x*(t) = 2 + sin ωt solves it: g = x*' + x*|x*|.
    fn period(x0: f64, steps: usize) -> f64 {
        let w = 1.3;
        let star = |t: f64| 2.0 + (w * t).sin();
        let g = |t: f64| w * (w * t).cos() + star(t) * star(t).abs();
        let f = |t: f64, x: f64| -x * x.abs() + g(t);
        let h = 2.0 * std::f64::consts::PI / w / steps as f64;
        let mut x = x0;
        for k in 0..steps {
            let t = k as f64 * h;
            let k1 = f(t, x);
            let k2 = f(t + 0.5 * h, x + 0.5 * h * k1);
            let k3 = f(t + 0.5 * h, x + 0.5 * h * k2);
            let k4 = f(t + h, x + h * k3);
            x += h / 6.0 * (k1 + 2.0 * k2 + 2.0 * k3 + k4);
        }
        x
    }

    #[test]
    fn finds_the_periodic_solution_of_a_scalar_nonlinear_ode() {
        // Closed form by construction: x*(0) = 2 (manufactured solution, derived here).
        // RK4 with 2 000 steps per period errs by about (ωh)⁴ ~ 1e-11 relative (fourth
        // order, common knowledge), so 1e-9 bounds the distance to x*(0) with room.
        let settings = Settings {
            tolerance: 1e-12,
            max_newton: 20,
            max_evaluations: 200,
            restart: 5,
        };
        let mut z = [0.3];
        let out = fixed_point(&mut z, &settings, |x: &[f64], o: &mut [f64]| {
            o[0] = period(x[0], 2000);
            Ok::<(), ()>(())
        })
        .unwrap();
        assert!(out.converged, "{out:?}");
        assert!((z[0] - 2.0).abs() < 1e-9, "{}", z[0]);
        // Newton converges fast here (superlinearly from a poor start): a handful of steps.
        assert!(out.newton <= 8, "{out:?}");
    }

    #[test]
    fn a_map_that_gives_nan_is_not_converged() {
        let settings = Settings {
            tolerance: 1e-8,
            max_newton: 5,
            max_evaluations: 50,
            restart: 5,
        };
        let mut z = [1.0, 2.0];
        let out = fixed_point(&mut z, &settings, |x: &[f64], o: &mut [f64]| {
            o[0] = x[0];
            o[1] = f64::NAN;
            Ok::<(), ()>(())
        })
        .unwrap();
        assert!(!out.converged && out.defect.is_nan(), "{out:?}");
        assert_eq!(out.evaluations, 1);
    }

    #[test]
    fn a_budget_too_small_reports_no_convergence() {
        let settings = Settings {
            tolerance: 1e-12,
            max_newton: 20,
            max_evaluations: 3,
            restart: 5,
        };
        let mut z = [0.3];
        let out = fixed_point(&mut z, &settings, |x: &[f64], o: &mut [f64]| {
            o[0] = period(x[0], 200);
            Ok::<(), ()>(())
        })
        .unwrap();
        assert!(!out.converged);
        assert!(out.evaluations <= 3, "{out:?}");
    }
}
