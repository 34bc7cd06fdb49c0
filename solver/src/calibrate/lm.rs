//! Levenberg–Marquardt for small nonlinear least-squares problems with box bounds.
//!
//! ```text
//! minimise ½‖r(u)‖²,  l ≤ u ≤ h
//! step δ:   min ‖r + J δ‖² + μ ‖D δ‖²       (solved as the stacked least-squares problem
//!                                            [J; √μ D] δ = [−r; 0], by QR)
//! D_j   = largest ‖J_j‖ seen so far        (Moré 1978, the scaling that makes the method
//!                                            invariant to the units of each parameter)
//! trial u⁺ = clamp(u + δ, l, h); gain ρ = (‖r‖² − ‖r(u⁺)‖²) / (‖r‖² − ‖r + J δ⁺‖²)
//! ρ > 1e-4: accept, μ ← μ · max(⅓, 1 − (2ρ − 1)³), ν ← 2;  else μ ← μ ν, ν ← 2ν
//! ```
//!
//! Moré, J. J. (1978), "The Levenberg–Marquardt algorithm: implementation and theory",
//! Numerical Analysis (G. A. Watson, ed.), Springer LNM 630, 105–116 (the scaled
//! trust region form and the stopping tests); the μ update is Nielsen's (Nielsen, H. B.,
//! 1999, "Damping parameter in Marquardt's method", IMM-REP-1999-05, DTU) — both from
//! memory, verify. Bounds by projection of the trial point (assumption: adequate when the
//! optimum is inside the box, which the caller reports on when it is not).
//! Stopping tests as MINPACK's: relative reduction of the cost (`ftol`), relative step
//! (`xtol`), cosine of the angle between r and the columns of J (`gtol`).

use crate::steptest::lsq;

/// Stopping and effort settings.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LmOptions {
    /// Stop when an accepted step lowers the cost by less than this fraction.
    pub ftol: f64,
    /// Stop when the scaled step is below this fraction of the scaled parameters.
    pub xtol: f64,
    /// Stop when every column of J is this close to orthogonal to r.
    pub gtol: f64,
    /// Most residual evaluations (Jacobian columns not counted).
    pub max_evaluations: usize,
}

impl Default for LmOptions {
    fn default() -> Self {
        // MINPACK's customary tolerances are √ε ≈ 1.5e-8; a model run carries its own
        // time-stepping error of about 1e-5 relative, so tighter tests on the cost and the
        // step only chase that noise (assumption: calibrate).
        LmOptions {
            ftol: 1e-6,
            xtol: 1e-6,
            gtol: 1e-8,
            max_evaluations: 200,
        }
    }
}

/// Why the iteration stopped.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Termination {
    /// The cost no longer falls (`ftol`).
    Cost,
    /// The step is negligible (`xtol`).
    Step,
    /// The gradient is negligible (`gtol`), or the residuals are zero.
    Gradient,
    /// `max_evaluations` reached: not converged.
    Evaluations,
    /// No step lowered the cost although the damping became huge: not converged.
    Stalled,
}

impl Termination {
    /// Whether the fit converged.
    pub fn converged(self) -> bool {
        matches!(
            self,
            Termination::Cost | Termination::Step | Termination::Gradient
        )
    }
}

/// The result of a fit.
#[derive(Debug, Clone)]
pub struct LmOutcome {
    /// The parameters (fit coordinates).
    pub u: Vec<f64>,
    /// Residuals there.
    pub residuals: Vec<f64>,
    /// Jacobian columns there.
    pub jacobian: Vec<Vec<f64>>,
    /// ‖r‖².
    pub ssr: f64,
    /// Accepted steps.
    pub iterations: usize,
    /// Residual evaluations.
    pub evaluations: usize,
    /// Jacobian evaluations.
    pub jacobians: usize,
    /// Why it stopped.
    pub termination: Termination,
}

/// Why a fit could not start or continue.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum LmError {
    /// The residuals at the starting point could not be evaluated.
    Start,
    /// The Jacobian could not be evaluated at an accepted point.
    Jacobian,
    /// Fewer residuals than parameters, or no parameters.
    Shape,
}

impl std::fmt::Display for LmError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            LmError::Start => write!(f, "the model failed at the starting values"),
            LmError::Jacobian => write!(f, "a model run for the Jacobian failed"),
            LmError::Shape => write!(f, "fewer observations than free parameters"),
        }
    }
}

impl std::error::Error for LmError {}

fn sumsq(v: &[f64]) -> f64 {
    v.iter().map(|x| x * x).sum()
}

/// Where the search stands: the accepted point, its residuals, Jacobian and cost, and the
/// work so far. Every exit returns it whole with the reason.
struct Search {
    u: Vec<f64>,
    r: Vec<f64>,
    jac: Vec<Vec<f64>>,
    ssr: f64,
    iterations: usize,
    evaluations: usize,
    jacobians: usize,
}

impl Search {
    fn stop(self, termination: Termination) -> LmOutcome {
        LmOutcome {
            u: self.u,
            residuals: self.r,
            jacobian: self.jac,
            ssr: self.ssr,
            iterations: self.iterations,
            evaluations: self.evaluations,
            jacobians: self.jacobians,
            termination,
        }
    }
}

/// Minimises ½‖r(u)‖² from `u0` within `bounds` (fit coordinates). `residual` returns
/// `None` where the model fails (the trial step is then rejected); `jacobian(u, r)`
/// returns the columns of ∂r/∂u.
pub fn minimize<R, J>(
    mut residual: R,
    mut jacobian: J,
    u0: &[f64],
    bounds: &[(f64, f64)],
    opts: &LmOptions,
) -> Result<LmOutcome, LmError>
where
    R: FnMut(&[f64]) -> Option<Vec<f64>>,
    J: FnMut(&[f64], &[f64]) -> Option<Vec<Vec<f64>>>,
{
    let n = u0.len();
    let clamp = |u: &[f64]| -> Vec<f64> {
        u.iter()
            .zip(bounds)
            .map(|(&x, &(lo, hi))| x.clamp(lo, hi))
            .collect()
    };
    let u = clamp(u0);
    let r = residual(&u).ok_or(LmError::Start)?;
    let m = r.len();
    if n == 0 || m < n {
        return Err(LmError::Shape);
    }
    let jac = jacobian(&u, &r).ok_or(LmError::Jacobian)?;
    let mut at = Search {
        ssr: sumsq(&r),
        u,
        r,
        jac,
        iterations: 0,
        evaluations: 1,
        jacobians: 1,
    };
    let mut d = vec![0.0_f64; n];
    let mut mu: f64 = 1e-3;
    let mut nu = 2.0;
    loop {
        let norms: Vec<f64> = at.jac.iter().map(|c| sumsq(c).sqrt()).collect();
        for (dj, nj) in d.iter_mut().zip(&norms) {
            *dj = dj.max(*nj);
        }
        let dmax = d.iter().copied().fold(0.0, f64::max);
        let floor = if dmax > 0.0 { 1e-8 * dmax } else { 1.0 };
        let dd: Vec<f64> = d.iter().map(|x| x.max(floor)).collect();
        // Gradient test: the largest cosine between r and a column of J.
        let rnorm = at.ssr.sqrt();
        let cos_max = at
            .jac
            .iter()
            .zip(&norms)
            .filter(|(_, nj)| **nj > 0.0)
            .map(|(c, nj)| {
                (c.iter().zip(&at.r).map(|(a, b)| a * b).sum::<f64>() / (nj * rnorm)).abs()
            })
            .fold(0.0, f64::max);
        if at.ssr == 0.0 || cos_max <= opts.gtol {
            return Ok(at.stop(Termination::Gradient));
        }
        // Inner loop: find an acceptable step for this Jacobian.
        loop {
            if at.evaluations >= opts.max_evaluations {
                return Ok(at.stop(Termination::Evaluations));
            }
            if mu > 1e20 {
                return Ok(at.stop(Termination::Stalled));
            }
            let sq = mu.sqrt();
            let cols: Vec<Vec<f64>> = (0..n)
                .map(|j| {
                    let mut c = at.jac[j].clone();
                    c.extend((0..n).map(|k| if k == j { sq * dd[j] } else { 0.0 }));
                    c
                })
                .collect();
            let mut rhs: Vec<f64> = at.r.iter().map(|x| -x).collect();
            rhs.extend(std::iter::repeat_n(0.0, n));
            let Some(sol) = lsq::solve(&cols, &rhs) else {
                mu *= nu;
                nu *= 2.0;
                continue;
            };
            let trial: Vec<f64> = clamp(
                &at.u
                    .iter()
                    .zip(&sol.coef)
                    .map(|(a, b)| a + b)
                    .collect::<Vec<f64>>(),
            );
            let step: Vec<f64> = trial.iter().zip(&at.u).map(|(a, b)| a - b).collect();
            let dstep = step
                .iter()
                .zip(&dd)
                .map(|(s, w)| (s * w).powi(2))
                .sum::<f64>()
                .sqrt();
            let du =
                at.u.iter()
                    .zip(&dd)
                    .map(|(s, w)| (s * w).powi(2))
                    .sum::<f64>()
                    .sqrt();
            if dstep <= opts.xtol * (du + opts.xtol) {
                return Ok(at.stop(Termination::Step));
            }
            let linear: Vec<f64> = (0..m)
                .map(|i| at.r[i] + (0..n).map(|j| at.jac[j][i] * step[j]).sum::<f64>())
                .collect();
            let predicted = at.ssr - sumsq(&linear);
            let evaluated = residual(&trial);
            at.evaluations += 1;
            let (rho, new) = match evaluated {
                Some(rn)
                    if rn.len() == m && rn.iter().all(|x| x.is_finite()) && predicted > 0.0 =>
                {
                    let s = sumsq(&rn);
                    ((at.ssr - s) / predicted, Some((rn, s)))
                }
                _ => (-1.0, None),
            };
            match new {
                Some((rn, s)) if rho > 1e-4 => {
                    let reduction = (at.ssr - s) / at.ssr;
                    at.u = trial;
                    at.r = rn;
                    at.ssr = s;
                    at.iterations += 1;
                    mu *= (1.0 - (2.0 * rho - 1.0).powi(3)).max(1.0 / 3.0);
                    nu = 2.0;
                    at.jac = jacobian(&at.u, &at.r).ok_or(LmError::Jacobian)?;
                    at.jacobians += 1;
                    if reduction <= opts.ftol {
                        return Ok(at.stop(Termination::Cost));
                    }
                    break;
                }
                _ => {
                    mu *= nu;
                    nu *= 2.0;
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// NIST StRD nonlinear regression, Misra1a (lower difficulty): y = b1 (1 − exp(−b2 x)),
    /// 14 observations. Data and certified values from the NIST Statistical Reference
    /// Datasets page for Misra1a (from memory — verify; the data reproduce the certified
    /// residual sum of squares 1.2455138894E-01 with scipy.optimize.least_squares(
    /// method='lm'), which converged to b1 = 238.942121…, b2 = 5.50156454e-4).
    const X: [f64; 14] = [
        77.6, 114.9, 141.1, 190.8, 239.9, 289.0, 332.8, 378.4, 434.8, 477.3, 536.8, 593.1, 689.1,
        760.0,
    ];
    const Y: [f64; 14] = [
        10.07, 14.73, 17.94, 23.93, 29.61, 35.18, 40.02, 44.82, 50.76, 55.05, 61.01, 66.40, 75.47,
        81.78,
    ];
    const B1: f64 = 2.3894212918e2;
    const B2: f64 = 5.5015643181e-4;
    const SD1: f64 = 2.7070075241;
    const SD2: f64 = 7.2668688436e-6;
    const SSR: f64 = 1.2455138894e-1;

    fn misra(start: [f64; 2]) -> LmOutcome {
        let r = |b: &[f64]| {
            Some(
                X.iter()
                    .zip(&Y)
                    .map(|(x, y)| b[0] * (1.0 - (-b[1] * x).exp()) - y)
                    .collect(),
            )
        };
        let j = |b: &[f64], _: &[f64]| {
            Some(vec![
                X.iter().map(|x| 1.0 - (-b[1] * x).exp()).collect(),
                X.iter().map(|x| b[0] * x * (-b[1] * x).exp()).collect(),
            ])
        };
        let opts = LmOptions {
            ftol: 1e-15,
            xtol: 1e-15,
            gtol: 1e-15,
            max_evaluations: 1000,
        };
        minimize(r, j, &start, &[(-1e9, 1e9), (-1e9, 1e9)], &opts).unwrap()
    }

    #[test]
    fn misra1a_reaches_the_certified_values_from_both_nist_starts() {
        // NIST start 1 (500, 1e-4) and start 2 (250, 5e-4).
        for start in [[500.0, 1e-4], [250.0, 5e-4]] {
            let o = misra(start);
            assert!(o.termination.converged(), "{:?}", o.termination);
            // Certified values carry 11 significant digits; a converged double-precision
            // fit of this well-conditioned problem matches them to ~1e-9.
            assert!((o.u[0] / B1 - 1.0).abs() < 1e-8, "b1 = {}", o.u[0]);
            assert!((o.u[1] / B2 - 1.0).abs() < 1e-8, "b2 = {}", o.u[1]);
            assert!((o.ssr / SSR - 1.0).abs() < 1e-9, "ssr = {}", o.ssr);
            // Certified standard deviations: σ² (JᵀJ)⁻¹ with σ² = SSR/(n − p).
            let u =
                crate::calibrate::stats::uncertainty(&o.jacobian, o.ssr, &[(-1e9, 1e9); 2], 0.95);
            let se = u.std_error;
            assert!(
                (se[0].unwrap() / SD1 - 1.0).abs() < 1e-7,
                "sd1 = {:?}",
                se[0]
            );
            assert!(
                (se[1].unwrap() / SD2 - 1.0).abs() < 1e-7,
                "sd2 = {:?}",
                se[1]
            );
        }
    }

    #[test]
    fn the_bounds_hold_and_a_failing_model_rejects_the_step() {
        // Minimum of (u − 3)² at 3, outside the box [0, 2]: the fit stops on the bound.
        let r = |u: &[f64]| {
            if u[0] > 2.5 {
                None
            } else {
                Some(vec![u[0] - 3.0, 0.0])
            }
        };
        let j = |_: &[f64], _: &[f64]| Some(vec![vec![1.0, 0.0]]);
        let o = minimize(r, j, &[0.5], &[(0.0, 2.0)], &LmOptions::default()).unwrap();
        assert!((o.u[0] - 2.0).abs() < 1e-12, "{}", o.u[0]);
        assert!(minimize(
            |_: &[f64]| None,
            j,
            &[0.5],
            &[(0.0, 2.0)],
            &LmOptions::default()
        )
        .is_err());
    }
}
