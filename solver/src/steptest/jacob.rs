//! Jacob's (1947) straight-line fit of a step test, s/Q = B + C Q, with standard errors
//! and confidence intervals.
//!
//! ```text
//! x_j = Q_j,  y_j = s_j / Q_j,  weights w_j (1, or Q_j² — see Weighting)
//! W = Σ w,  x̄ = Σ w x / W,  ȳ = Σ w y / W
//! Sxx = Σ w (x − x̄)²,  Sxy = Σ w (x − x̄)(y − ȳ)
//! C = Sxy / Sxx,  B = ȳ − C x̄
//! σ̂² = Σ w (y − B − C x)² / (n − 2)
//! Var C = σ̂² / Sxx,  Var B = σ̂² (1/W + x̄² / Sxx),  Cov(B, C) = −x̄ σ̂² / Sxx
//! interval: value ± t_{(1+γ)/2, n−2} · standard error      (γ: confidence level)
//! ```
//!
//! These are the textbook weighted least-squares line and its covariance (e.g. Draper, N.R.
//! and Smith, H., 1998, "Applied Regression Analysis", 3rd ed., Wiley, ch. 1 and 9 — from
//! memory, verify). The intervals are exact when the errors of y are independent, normal
//! and of variance σ²/w_j, and the model s = B Q + C Q² holds; the tests check the coverage
//! on synthetic data.
//!
//! Jacob, C.E., 1947, "Drawdown test to determine effective radius of artesian well",
//! Trans. ASCE 112, 1047–1070 (pages from memory — verify).

use super::checks::{self, Concern};
use super::{student, Estimate, Step, StepFigures, StepTestError, Weighting};

/// The fitted line s/Q = B + C Q.
#[derive(Debug, Clone, PartialEq)]
pub struct LineFit {
    /// Intercept B [s/m²]: aquifer loss and linear well loss per unit rate.
    pub b: Estimate,
    /// Slope C [s²/m⁵]: non-linear well-loss coefficient.
    pub c: Estimate,
    /// Estimated covariance of B and C [s³/m⁷].
    pub cov_bc: f64,
    /// Degrees of freedom, n − 2.
    pub dof: u32,
    /// Confidence level of the intervals, e.g. 0.95.
    pub confidence: f64,
    /// Student t quantile used for the intervals.
    pub t_quantile: f64,
    /// Residual standard deviation of s/Q at unit weight, σ̂ [s/m²] (for weights Q², of s
    /// scaled by the largest rate: σ̂ · Q_max is the drawdown scatter in m).
    pub residual_std: f64,
    /// The weighting used.
    pub weighting: Weighting,
}

/// A step test fitted by Jacob's straight line.
#[derive(Debug, Clone, PartialEq)]
pub struct JacobAnalysis {
    /// The steps fitted.
    pub steps: Vec<Step>,
    /// The fitted line.
    pub fit: LineFit,
    /// Per-step figures at the fitted B and C.
    pub figures: Vec<StepFigures>,
    /// What the fit cannot vouch for (repeated or falling rates, C or B below zero,
    /// efficiencies outside 0…1), in that order; empty for a sound test.
    pub concerns: Vec<Concern>,
}

/// Checks the steps: at least three, finite positive rates and drawdowns, not all rates
/// equal.
pub fn check_steps(steps: &[Step]) -> Result<(), StepTestError> {
    for (i, st) in steps.iter().enumerate() {
        if !(st.rate_m3_s.is_finite() && st.rate_m3_s > 0.0) {
            return Err(StepTestError::BadStep {
                step: i + 1,
                field: "rate",
                value: st.rate_m3_s,
                reason: "must be a finite rate above zero",
            });
        }
        if !(st.drawdown_m.is_finite() && st.drawdown_m > 0.0) {
            return Err(StepTestError::BadStep {
                step: i + 1,
                field: "drawdown",
                value: st.drawdown_m,
                reason: "must be a finite drawdown above zero",
            });
        }
    }
    if steps.len() < 3 {
        return Err(StepTestError::TooFewSteps { steps: steps.len() });
    }
    if steps.iter().all(|s| s.rate_m3_s == steps[0].rate_m3_s) {
        return Err(StepTestError::SameRates);
    }
    Ok(())
}

/// Fits s/Q = B + C Q to the steps.
///
/// `confidence` is the level of the intervals (0.95 for 95 %). Needs three or more steps
/// with at least two distinct rates.
pub fn fit_line(
    steps: &[Step],
    weighting: Weighting,
    confidence: f64,
) -> Result<LineFit, StepTestError> {
    check_steps(steps)?;
    if !(confidence > 0.0 && confidence < 1.0) {
        return Err(StepTestError::BadConfidence(confidence));
    }
    let q_max = steps.iter().map(|s| s.rate_m3_s).fold(0.0, f64::max);
    let weight = |q: f64| match weighting {
        Weighting::Equal => 1.0,
        Weighting::Drawdown => (q / q_max).powi(2),
    };
    let w_sum: f64 = steps.iter().map(|s| weight(s.rate_m3_s)).sum();
    let x_mean = steps
        .iter()
        .map(|s| weight(s.rate_m3_s) * s.rate_m3_s)
        .sum::<f64>()
        / w_sum;
    let y_mean = steps
        .iter()
        .map(|s| weight(s.rate_m3_s) * s.drawdown_m / s.rate_m3_s)
        .sum::<f64>()
        / w_sum;
    let (mut sxx, mut sxy) = (0.0, 0.0);
    for s in steps {
        let w = weight(s.rate_m3_s);
        let dx = s.rate_m3_s - x_mean;
        sxx += w * dx * dx;
        sxy += w * dx * (s.drawdown_m / s.rate_m3_s - y_mean);
    }
    let c = sxy / sxx;
    let b = y_mean - c * x_mean;
    let rss: f64 = steps
        .iter()
        .map(|s| {
            let r = s.drawdown_m / s.rate_m3_s - b - c * s.rate_m3_s;
            weight(s.rate_m3_s) * r * r
        })
        .sum();
    let dof = (steps.len() - 2) as u32;
    let sigma2 = rss / f64::from(dof);
    let var_c = sigma2 / sxx;
    let var_b = sigma2 * (1.0 / w_sum + x_mean * x_mean / sxx);
    let t = student::two_sided(confidence, dof);
    Ok(LineFit {
        b: Estimate::new(b, var_b.sqrt(), t),
        c: Estimate::new(c, var_c.sqrt(), t),
        cov_bc: -x_mean * sigma2 / sxx,
        dof,
        confidence,
        t_quantile: t,
        residual_std: sigma2.sqrt(),
        weighting,
    })
}

/// Fits the steps and derives the per-step figures (losses, efficiency, specific capacity)
/// and the concerns of [`checks`].
pub fn fit_steps(
    steps: &[Step],
    weighting: Weighting,
    confidence: f64,
) -> Result<JacobAnalysis, StepTestError> {
    let fit = fit_line(steps, weighting, confidence)?;
    let figures = super::step_figures(steps, &fit);
    let mut concerns = checks::rate_concerns(steps);
    concerns.extend(checks::fit_concerns(&fit, &figures));
    Ok(JacobAnalysis {
        steps: steps.to_vec(),
        fit,
        figures,
        concerns,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::steptest::testutil::Rng;

    fn steps_from(b: f64, c: f64, rates: &[f64]) -> Vec<Step> {
        rates
            .iter()
            .map(|&q| Step {
                rate_m3_s: q,
                drawdown_m: b * q + c * q * q,
            })
            .collect()
    }

    /// docs/physics.md §9d synthetic check: B = 100 s/m², C = 2000 s²/m⁵ at
    /// Q = 5, 10, 15, 20 L/s; `numpy.linalg.lstsq` of s/Q on [1, Q] returns [100, 2000], and
    /// E = B Q / s_w = 0.909091, 0.833333, 0.769231, 0.714286 (printed to 6 decimals).
    /// Without noise the fit must return them to round-off (1e-12 relative) under both
    /// weightings, with zero standard errors.
    #[test]
    fn steptest_jacob_exact_data_recovered_to_round_off() {
        let steps: Vec<Step> = [(0.005, 0.55), (0.010, 1.20), (0.015, 1.95), (0.020, 2.80)]
            .iter()
            .map(|&(q, s)| Step {
                rate_m3_s: q,
                drawdown_m: s,
            })
            .collect();
        for w in [Weighting::Equal, Weighting::Drawdown] {
            let a = fit_steps(&steps, w, 0.95).unwrap();
            assert!(
                (a.fit.b.value / 100.0 - 1.0).abs() < 1e-12,
                "{w:?} B {}",
                a.fit.b.value
            );
            assert!(
                (a.fit.c.value / 2000.0 - 1.0).abs() < 1e-12,
                "{w:?} C {}",
                a.fit.c.value
            );
            assert!(a.fit.b.std_error < 1e-9 && a.fit.c.std_error < 1e-7);
            for (f, e) in a
                .figures
                .iter()
                .zip([0.909091, 0.833333, 0.769231, 0.714286])
            {
                assert!((f.efficiency - e).abs() < 5e-7, "{}", f.efficiency);
                assert!((f.linear_loss_m + f.nonlinear_loss_m - f.drawdown_m).abs() < 1e-12);
                assert!((f.specific_capacity * f.drawdown_per_rate - 1.0).abs() < 1e-15);
            }
            assert_eq!(a.fit.dof, 2);
        }
    }

    /// One seeded noisy test (5 steps, σ = 2 cm on s): the 95 % intervals hold the true
    /// B and C (invented values, B = 150 s/m², C = 4000 s²/m⁵).
    #[test]
    fn steptest_jacob_noisy_fit_inside_interval() {
        let (b, c) = (150.0, 4000.0);
        let mut rng = Rng::new(7);
        let mut steps = steps_from(b, c, &[0.004, 0.008, 0.012, 0.016, 0.020]);
        for s in &mut steps {
            s.drawdown_m += 0.02 * rng.normal();
        }
        let fit = fit_line(&steps, Weighting::Drawdown, 0.95).unwrap();
        assert!(fit.b.contains(b), "B {:?}", fit.b);
        assert!(fit.c.contains(c), "C {:?}", fit.c);
        assert!(fit.b.std_error > 0.0 && fit.c.std_error > 0.0);
    }

    /// Coverage over 200 seeded fits: the count of 95 % intervals holding the true value is
    /// Binomial(200, 0.95) when the intervals are exact. Accepted: 179 ≤ count ≤ 199;
    /// `scipy.stats.binom(200, 0.95).cdf(178)` = 4.8e-4 and `.sf(199)` = 3.5e-5, so a
    /// correct method fails this with probability about 5e-4. Each weighting is tested with
    /// the noise model it assumes (constant error of s for `Drawdown`, of s/Q for `Equal`).
    #[test]
    fn steptest_jacob_interval_coverage_near_95_percent() {
        let (b, c) = (120.0, 2500.0);
        let rates = [0.005, 0.010, 0.015, 0.020, 0.025];
        for (w, seed) in [(Weighting::Drawdown, 11), (Weighting::Equal, 12)] {
            let mut rng = Rng::new(seed);
            let (mut hit_b, mut hit_c) = (0, 0);
            for _ in 0..200 {
                let mut steps = steps_from(b, c, &rates);
                for s in &mut steps {
                    match w {
                        Weighting::Drawdown => s.drawdown_m += 0.03 * rng.normal(),
                        Weighting::Equal => s.drawdown_m += s.rate_m3_s * 4.0 * rng.normal(),
                    }
                }
                let fit = fit_line(&steps, w, 0.95).unwrap();
                hit_b += usize::from(fit.b.contains(b));
                hit_c += usize::from(fit.c.contains(c));
            }
            assert!((179..=199).contains(&hit_b), "{w:?}: B covered {hit_b}/200");
            assert!((179..=199).contains(&hit_c), "{w:?}: C covered {hit_c}/200");
        }
    }

    #[test]
    fn steptest_jacob_refuses_bad_input() {
        let two = steps_from(100.0, 2000.0, &[0.01, 0.02]);
        let e = fit_line(&two, Weighting::Equal, 0.95).unwrap_err();
        assert_eq!(e, StepTestError::TooFewSteps { steps: 2 });
        assert!(e.to_string().contains("no degree of freedom"));
        let same = steps_from(100.0, 2000.0, &[0.01, 0.01, 0.01]);
        assert_eq!(
            fit_line(&same, Weighting::Equal, 0.95),
            Err(StepTestError::SameRates)
        );
        let mut bad = steps_from(100.0, 2000.0, &[0.01, 0.02, 0.03]);
        bad[1].rate_m3_s = 0.0;
        assert!(matches!(
            fit_line(&bad, Weighting::Equal, 0.95),
            Err(StepTestError::BadStep {
                step: 2,
                field: "rate",
                ..
            })
        ));
        bad[1].rate_m3_s = 0.02;
        bad[2].drawdown_m = f64::NAN;
        assert!(matches!(
            fit_line(&bad, Weighting::Equal, 0.95),
            Err(StepTestError::BadStep {
                step: 3,
                field: "drawdown",
                ..
            })
        ));
        bad[2].drawdown_m = 1.0;
        assert_eq!(
            fit_line(&bad, Weighting::Equal, 1.0),
            Err(StepTestError::BadConfidence(1.0))
        );
    }
}
