//! Profile intervals: for one parameter, the values whose best fit of the others raises the
//! residual sum of squares to the F-test threshold (Bates & Watts 1988, §6.1 — from memory,
//! verify):
//!
//! ```text
//! S(u_j) = min over the other parameters of ‖r‖²
//! interval: { u_j : S(u_j) ≤ S(û) · (1 + t²_{(1+c)/2, ν} / ν) },  ν = m − p
//! ```
//!
//! (F_{1,ν} = t²_ν.) For a model linear in its parameters this is exactly the Jacobian
//! interval; where they differ, the model is nonlinear over the interval and the profile is
//! the one to believe. Each side is found by stepping out from û by the Jacobian half-width,
//! doubling until S exceeds the threshold or the bound is reached, then bisecting.

use super::jacobian::forward_jacobian;
use super::lm::{minimize, LmOptions};

/// What every refit of a profile uses: bounds and difference steps (fit coordinates),
/// threads for the Jacobian, LM settings.
#[derive(Debug, Clone, Copy)]
pub struct Setup<'a> {
    /// Bounds of every parameter.
    pub bounds: &'a [(f64, f64)],
    /// Difference steps of every parameter.
    pub steps: &'a [f64],
    /// Threads for the Jacobian's columns.
    pub threads: usize,
    /// LM settings of the refits.
    pub options: &'a LmOptions,
}

/// One side of a profile interval.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Side {
    /// The threshold is crossed at this value (fit coordinates).
    At(f64),
    /// S stays below the threshold up to the bound: the records do not bound this side.
    Open,
    /// A refit failed on the way.
    Failed,
}

/// The best ‖r‖² with parameter `j` held at `uj`, the others refitted from `u_hat`.
fn held<F>(residual: &F, u_hat: &[f64], j: usize, uj: f64, setup: &Setup<'_>) -> Option<f64>
where
    F: Fn(&[f64]) -> Option<Vec<f64>> + Sync,
{
    let Setup {
        bounds,
        steps,
        threads,
        options: opts,
    } = *setup;
    let n = u_hat.len();
    let full = |v: &[f64]| -> Vec<f64> {
        let mut u = Vec::with_capacity(n);
        u.extend_from_slice(&v[..j]);
        u.push(uj);
        u.extend_from_slice(&v[j..]);
        u
    };
    let sub = |u: &[f64]| -> Vec<f64> {
        u.iter()
            .enumerate()
            .filter(|(k, _)| *k != j)
            .map(|(_, x)| *x)
            .collect()
    };
    if n == 1 {
        return residual(&[uj]).map(|r| r.iter().map(|x| x * x).sum());
    }
    let r = |v: &[f64]| residual(&full(v));
    let sb = sub(&bounds.iter().map(|b| b.0).collect::<Vec<_>>())
        .into_iter()
        .zip(sub(&bounds.iter().map(|b| b.1).collect::<Vec<_>>()))
        .collect::<Vec<_>>();
    let ss = sub(steps);
    let jac = |v: &[f64], rv: &[f64]| forward_jacobian(&r, v, rv, &sb, &ss, threads);
    minimize(&r, jac, &sub(u_hat), &sb, opts)
        .ok()
        .map(|o| o.ssr)
}

/// Both sides of the profile interval of parameter `j` (fit coordinates).
pub fn profile_interval<F>(
    residual: &F,
    u_hat: &[f64],
    ssr_min: f64,
    j: usize,
    half_width: f64,
    threshold_factor: f64,
    setup: &Setup<'_>,
) -> (Side, Side)
where
    F: Fn(&[f64]) -> Option<Vec<f64>> + Sync,
{
    let target = ssr_min * threshold_factor;
    let bounds = setup.bounds;
    let side = |dir: f64| -> Side {
        let limit = if dir < 0.0 { bounds[j].0 } else { bounds[j].1 };
        let mut inside = u_hat[j];
        let mut d = half_width.max(1e-6);
        loop {
            let trial = u_hat[j] + dir * d;
            let clamped = if dir < 0.0 {
                trial.max(limit)
            } else {
                trial.min(limit)
            };
            let Some(s) = held(residual, u_hat, j, clamped, setup) else {
                return Side::Failed;
            };
            if s > target {
                // Bisect between `inside` and `clamped`: S is a continuous function.
                let (mut a, mut b) = (inside, clamped);
                for _ in 0..6 {
                    let mid = 0.5 * (a + b);
                    match held(residual, u_hat, j, mid, setup) {
                        Some(sm) if sm > target => b = mid,
                        Some(_) => a = mid,
                        None => return Side::Failed,
                    }
                }
                return Side::At(0.5 * (a + b));
            }
            if clamped == limit {
                return Side::Open;
            }
            inside = clamped;
            d *= 2.0;
        }
    };
    (side(-1.0), side(1.0))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::calibrate::stats::uncertainty;

    #[test]
    fn a_linear_model_gives_the_jacobian_interval() {
        // y = a + b x with fixed "noise": for a model linear in its parameters the profile
        // (F-test) interval and the t interval coincide (Bates & Watts 1988, §6.1).
        let x = [0.0, 1.0, 2.0, 3.0, 4.0, 5.0];
        let e = [0.1, -0.2, 0.05, 0.15, -0.1, 0.02];
        let y: Vec<f64> = x.iter().zip(&e).map(|(x, e)| 1.0 + 0.5 * x + e).collect();
        let r = |u: &[f64]| {
            Some(
                x.iter()
                    .zip(&y)
                    .map(|(x, y)| u[0] + u[1] * x - y)
                    .collect::<Vec<f64>>(),
            )
        };
        let bounds = [(-10.0, 10.0); 2];
        let steps = [1e-6; 2];
        let jac = |u: &[f64], rv: &[f64]| forward_jacobian(&r, u, rv, &bounds, &steps, 1);
        let opts = LmOptions {
            ftol: 1e-14,
            xtol: 1e-14,
            gtol: 1e-14,
            max_evaluations: 200,
        };
        let fit = minimize(&r, jac, &[0.0, 0.0], &bounds, &opts).unwrap();
        let u = uncertainty(&fit.jacobian, fit.ssr, &bounds, 0.95);
        let nu = u.dof as f64;
        let factor = 1.0 + u.t * u.t / nu;
        for j in 0..2 {
            let h = u.half_width[j].unwrap();
            let setup = Setup {
                bounds: &bounds,
                steps: &steps,
                threads: 1,
                options: &opts,
            };
            let (lo, hi) = profile_interval(&r, &fit.u, fit.ssr, j, h, factor, &setup);
            let (Side::At(lo), Side::At(hi)) = (lo, hi) else {
                panic!("{lo:?} {hi:?}")
            };
            // Bisection to 1/64 of the last bracket (≤ h): within 2 % of h.
            assert!(
                (lo - (fit.u[j] - h)).abs() < 0.02 * h,
                "{j}: {lo} vs {}",
                fit.u[j] - h
            );
            assert!(
                (hi - (fit.u[j] + h)).abs() < 0.02 * h,
                "{j}: {hi} vs {}",
                fit.u[j] + h
            );
        }
        // A bound inside the interval leaves that side open.
        let tight = [
            (-10.0, 10.0),
            (-10.0, fit.u[1] + 0.1 * u.half_width[1].unwrap()),
        ];
        let (_, hi) = profile_interval(
            &r,
            &fit.u,
            fit.ssr,
            1,
            u.half_width[1].unwrap(),
            factor,
            &Setup {
                bounds: &tight,
                steps: &steps,
                threads: 1,
                options: &opts,
            },
        );
        assert_eq!(hi, Side::Open);
    }
}
