//! Steps not at equilibrium: the Hantush (1964) – Bierschenk (1963) procedure with the
//! Cooper–Jacob time correction.
//!
//! With the Cooper–Jacob straight line for each rate increment ΔQ_i = Q_i − Q_{i−1}
//! started at t_i, the drawdown in the well during step n is
//!
//! ```text
//! s(t) = Σ_{i≤n} ΔQ_i [a + b log10(t − t_i)] + C Q_n²
//!      = a Q_n + b Σ_{i≤n} ΔQ_i log10(t − t_i) + C Q_n²                     (t_n < t ≤ t_{n+1})
//! b = ln 10 / (4π T)  [s/m² per log cycle],  a [s/m²]: b log10(2.25 T / (r_w² S)) + linear
//! well loss,  B(Δt) = a + b log10 Δt: the linear coefficient after pumping for Δt
//! ```
//!
//! 1. The series is linear in (a, b, C): one least-squares fit over the readings of every
//!    step after its early part (`skip_fraction` of its duration, where well-bore storage
//!    and the Cooper–Jacob condition u = r_w² S / (4 T t) ≪ 1 may fail) gives b, and a and C
//!    as a by-product ([`SeriesFit`]).
//! 2. The drawdown at the end of step n, read at t_end,n, is corrected to a common elapsed
//!    time Δt (by default the shortest step) by removing the Cooper–Jacob growth that the
//!    earlier increments and the step itself add beyond Δt:
//!
//! ```text
//! s*_n = s(t_end,n) − b̂ [Σ_{i≤n} ΔQ_i log10(t_end,n − t_i) − Q_n log10 Δt]
//!      = B(Δt) Q_n + C Q_n²  (+ the reading's error)
//! ```
//!
//! 3. Jacob's straight line through s*_n / Q_n against Q_n gives B(Δt) and C with the
//!    intervals of [`super::jacob`] (n − 2 degrees of freedom). Those intervals treat b̂ as
//!    known; its own standard error is reported so that can be judged.
//!
//! Hantush, M.S., 1964, "Hydraulics of wells", in Chow, V.T. (ed.), Advances in
//! Hydroscience 1, Academic Press, 281–432; Bierschenk, W.H., 1963, "Determining well
//! efficiency by multiple step-drawdown tests", IASH Publ. 64, 493–507; Cooper, H.H. and
//! Jacob, C.E., 1946, "A generalized graphical method for evaluating formation constants
//! and summarizing well-field history", Trans. AGU 27(4), 526–534 (all from memory —
//! verify).

use super::checks::{self, Concern};
use super::jacob::{self, JacobAnalysis};
use super::series::{self, StepSpan};
use super::{lsq, student, Estimate, Sample, Step, StepTestError, Weighting};

/// Options of the time-series analysis.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SeriesOptions {
    /// Weighting of the step-level line (see [`Weighting`]).
    pub weighting: Weighting,
    /// Confidence level of the intervals, e.g. 0.95.
    pub confidence: f64,
    /// Fraction of each step's duration left out at its start (0 ≤ f < 1).
    pub skip_fraction: f64,
    /// Common elapsed time Δt the steps are corrected to \[s\]; `None`: the shortest step.
    pub reference_time_s: Option<f64>,
}

/// Defaults: equal weights and 95 % intervals (common practice, no source); a quarter of
/// each step skipped (assumption: calibrate to the well-bore storage time of the well, which
/// this module does not know); Δt the shortest step.
impl Default for SeriesOptions {
    fn default() -> Self {
        Self {
            weighting: Weighting::Equal,
            confidence: 0.95,
            skip_fraction: 0.25,
            reference_time_s: None,
        }
    }
}

/// The least-squares fit of the whole series to s = a Q_n + b Σ ΔQ_i log10(t − t_i) + C Q_n².
#[derive(Debug, Clone, PartialEq)]
pub struct SeriesFit {
    /// a [s/m²]: B at one second of pumping.
    pub a: Estimate,
    /// b [s/m² per log10 cycle of time]: the Cooper–Jacob slope per unit rate.
    pub b: Estimate,
    /// C [s²/m⁵] from the series.
    pub c: Estimate,
    /// Covariance matrix of (a, b, C), row-major.
    pub covariance: [f64; 9],
    /// Readings used.
    pub readings_used: usize,
    /// Degrees of freedom, readings used − 3.
    pub dof: u32,
    /// Residual standard deviation of the drawdown \[m\].
    pub residual_std_m: f64,
    /// Transmissivity T = ln 10 / (4π b) [m²/s] (Cooper–Jacob; confined, fully penetrating,
    /// homogeneous, no boundaries reached).
    pub transmissivity_m2_s: f64,
}

/// Result of the Hantush–Bierschenk analysis.
#[derive(Debug, Clone, PartialEq)]
pub struct HantushAnalysis {
    /// The steps found in the series.
    pub spans: Vec<StepSpan>,
    /// Measured drawdown at the end of each step.
    pub measured: Vec<Step>,
    /// Common elapsed time Δt \[s\].
    pub reference_time_s: f64,
    /// Fit of the whole series.
    pub series: SeriesFit,
    /// B(Δt) = a + b log10 Δt from the series fit, with its interval [s/m²].
    pub b_series: Estimate,
    /// Jacob's line through the corrected drawdowns: the procedure's B(Δt) and C.
    pub corrected: JacobAnalysis,
    /// Elapsed times the straight line was fitted over \[s\]: the earliest reading in the
    /// series fit, from the start of its step, and the last reading of the test, from the
    /// start of pumping.
    pub fitted_times_s: (f64, f64),
    /// What the analysis cannot vouch for: those of the corrected line
    /// (`corrected.concerns`), then a common time Δt outside [`Self::fitted_times_s`].
    pub concerns: Vec<Concern>,
}

/// Σ_{i≤n} ΔQ_i log10(t − t_i) for a time t in step n (index into `spans`).
fn superposed_log(spans: &[StepSpan], n: usize, t: f64) -> f64 {
    let mut prev_q = 0.0;
    let mut sum = 0.0;
    for sp in &spans[..=n] {
        sum += (sp.rate_m3_s - prev_q) * (t - sp.start_s).log10();
        prev_q = sp.rate_m3_s;
    }
    sum
}

/// Runs the procedure on a time series (see the module documentation).
pub fn fit_series(
    samples: &[Sample],
    opts: &SeriesOptions,
) -> Result<HantushAnalysis, StepTestError> {
    if !(opts.confidence > 0.0 && opts.confidence < 1.0) {
        return Err(StepTestError::BadConfidence(opts.confidence));
    }
    if !(0.0..1.0).contains(&opts.skip_fraction) {
        return Err(StepTestError::Underdetermined(format!(
            "skip fraction {} is not in [0, 1)",
            opts.skip_fraction
        )));
    }
    let spans = series::split_steps(samples)?;
    let measured = series::end_of_step(samples, &spans);
    jacob::check_steps(&measured)?;

    let (mut x_q, mut x_log, mut x_q2, mut y) = (Vec::new(), Vec::new(), Vec::new(), Vec::new());
    let mut first_elapsed = f64::INFINITY;
    for (n, sp) in spans.iter().enumerate() {
        let t0 = sp.start_s + opts.skip_fraction * sp.duration_s(samples);
        for s in &samples[sp.first..=sp.last] {
            if s.time_s < t0 {
                continue;
            }
            first_elapsed = first_elapsed.min(s.time_s - sp.start_s);
            x_q.push(sp.rate_m3_s);
            x_log.push(superposed_log(&spans, n, s.time_s));
            x_q2.push(sp.rate_m3_s * sp.rate_m3_s);
            y.push(s.drawdown_m);
        }
    }
    let m = y.len();
    if m < 4 {
        return Err(StepTestError::Underdetermined(format!(
            "{m} readings after the skipped early part of each step; at least 4 are needed to \
             fit a, b and C with an error estimate"
        )));
    }
    let sol = lsq::solve(&[x_q, x_log, x_q2], &y).ok_or_else(|| {
        StepTestError::Underdetermined(
            "the readings do not separate a, b and C (too few distinct rates or times)".into(),
        )
    })?;
    let dof = (m - 3) as u32;
    let sigma2 = sol.rss / f64::from(dof);
    let t_q = student::two_sided(opts.confidence, dof);
    let mut cov = [0.0; 9];
    for (c, x) in cov.iter_mut().zip(&sol.xtx_inv) {
        *c = sigma2 * x;
    }
    let est = |i: usize| Estimate::new(sol.coef[i], cov[i * 3 + i].sqrt(), t_q);
    let (a, b, c) = (est(0), est(1), est(2));
    let series_fit = SeriesFit {
        a,
        b,
        c,
        covariance: cov,
        readings_used: m,
        dof,
        residual_std_m: sigma2.sqrt(),
        transmissivity_m2_s: std::f64::consts::LN_10 / (4.0 * std::f64::consts::PI * b.value),
    };

    let dt_ref = match opts.reference_time_s {
        Some(t) if t.is_finite() && t > 0.0 => t,
        Some(t) => {
            return Err(StepTestError::Underdetermined(format!(
                "reference time {t} s must be a finite time above zero"
            )))
        }
        None => spans
            .iter()
            .map(|sp| sp.duration_s(samples))
            .fold(f64::INFINITY, f64::min),
    };
    let l_ref = dt_ref.log10();
    let var_b_ref = cov[0] + l_ref * l_ref * cov[4] + 2.0 * l_ref * cov[1];
    let b_series = Estimate::new(a.value + b.value * l_ref, var_b_ref.max(0.0).sqrt(), t_q);

    let corrected_steps: Vec<Step> = spans
        .iter()
        .enumerate()
        .map(|(n, sp)| {
            let t_end = samples[sp.last].time_s;
            let growth = superposed_log(&spans, n, t_end) - sp.rate_m3_s * l_ref;
            Step {
                rate_m3_s: sp.rate_m3_s,
                drawdown_m: samples[sp.last].drawdown_m - b.value * growth,
            }
        })
        .collect();
    let corrected = jacob::fit_steps(&corrected_steps, opts.weighting, opts.confidence)?;
    // `samples` is not empty: split_steps found at least three steps in it.
    let last_s = samples[samples.len() - 1].time_s;
    let fitted_times_s = (first_elapsed, last_s);
    let mut concerns = corrected.concerns.clone();
    concerns.extend(checks::reference_concern(dt_ref, first_elapsed, last_s));
    Ok(HantushAnalysis {
        spans,
        measured,
        reference_time_s: dt_ref,
        series: series_fit,
        b_series,
        corrected,
        fitted_times_s,
        concerns,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::steptest::testutil::Rng;
    use std::f64::consts::{LN_10, PI};

    /// Exponential integral E1(u) by its power series −γ − ln u − Σ (−u)^k / (k · k!),
    /// fine for u ≤ 1 (Abramowitz and Stegun 1964, 5.1.11 — from memory, verify).
    fn exp1(u: f64) -> f64 {
        const EULER_GAMMA: f64 = 0.577_215_664_901_532_9;
        let mut sum = 0.0;
        let mut term = 1.0;
        for k in 1..60 {
            let k = f64::from(k);
            term *= -u / k;
            sum += term / k;
        }
        -EULER_GAMMA - u.ln() - sum
    }

    /// `scipy.special.exp1` (scipy 1.17.1) at 2.5e-5, 1e-3, 0.5.
    #[test]
    fn steptest_exp1_matches_scipy() {
        for (u, want) in [
            (2.5e-5, 10.01944406803829),
            (1e-3, 6.331539364136149),
            (0.5, 0.5597735947761608),
        ] {
            assert!((exp1(u) / want - 1.0).abs() < 1e-14, "{u}: {}", exp1(u));
        }
    }

    /// Synthetic test, invented values: four 60-min steps at 5, 10, 15, 20 L/s, readings
    /// every minute; T = 5e-3 m²/s, S = 1e-4, r_w = 0.15 m, linear well loss 20 s/m²,
    /// C = 3000 s²/m⁵. `theis` switches the aquifer part from Cooper–Jacob to Theis.
    fn synthetic(theis: bool) -> (Vec<Sample>, f64, f64, f64) {
        let (t_aq, s_aq, rw, lin, c) = (5e-3, 1e-4, 0.15, 20.0, 3000.0);
        let rates = [0.005, 0.010, 0.015, 0.020];
        let dur = 3600.0;
        let mut out = Vec::new();
        for (n, &q) in rates.iter().enumerate() {
            for k in 1..=60 {
                let t = n as f64 * dur + f64::from(k) * 60.0;
                let mut s = lin * q + c * q * q;
                let mut prev = 0.0;
                for (i, &qi) in rates[..=n].iter().enumerate() {
                    let el = t - i as f64 * dur;
                    let u = rw * rw * s_aq / (4.0 * t_aq * el);
                    let w = if theis {
                        exp1(u)
                    } else {
                        (2.25 * t_aq * el / (rw * rw * s_aq)).ln()
                    };
                    s += (qi - prev) / (4.0 * PI * t_aq) * w;
                    prev = qi;
                }
                out.push(Sample {
                    time_s: t,
                    rate_m3_s: q,
                    drawdown_m: s,
                });
            }
        }
        let b = LN_10 / (4.0 * PI * t_aq);
        let a = lin + b * (2.25 * t_aq / (rw * rw * s_aq)).log10();
        (out, a, b, c)
    }

    /// Cooper–Jacob data without noise: a, b, C, T and B(Δt), C of the corrected line
    /// recovered to round-off (1e-10 relative; the design has condition number ~1e3).
    #[test]
    fn steptest_hantush_exact_cooper_jacob_recovered() {
        let (x, a, b, c) = synthetic(false);
        let r = fit_series(&x, &SeriesOptions::default()).unwrap();
        let rel = |u: f64, v: f64| (u / v - 1.0).abs();
        assert!(
            rel(r.series.a.value, a) < 1e-10,
            "a {} vs {a}",
            r.series.a.value
        );
        assert!(
            rel(r.series.b.value, b) < 1e-10,
            "b {} vs {b}",
            r.series.b.value
        );
        assert!(
            rel(r.series.c.value, c) < 1e-9,
            "C {} vs {c}",
            r.series.c.value
        );
        assert!(rel(r.series.transmissivity_m2_s, 5e-3) < 1e-10);
        assert_eq!(r.reference_time_s, 3600.0);
        let b_ref = a + b * 3600f64.log10();
        assert!(rel(r.b_series.value, b_ref) < 1e-10);
        assert!(
            rel(r.corrected.fit.b.value, b_ref) < 1e-10,
            "{}",
            r.corrected.fit.b.value
        );
        assert!(
            rel(r.corrected.fit.c.value, c) < 1e-9,
            "{}",
            r.corrected.fit.c.value
        );
        // The steps are not at equilibrium: the uncorrected end-of-step line is biased.
        let plain = jacob::fit_line(&r.measured, Weighting::Equal, 0.95).unwrap();
        assert!(
            rel(plain.c.value, c) > 0.05,
            "uncorrected C {}",
            plain.c.value
        );
    }

    /// Theis data: W(u) = −γ − ln u + O(u), and u = r_w² S / (4 T t) ≤ 1.3e-7 over the
    /// readings used (t ≥ 15 min), so b and C come back to about u / W ~ 1e-8. The
    /// intercept follows the exact constant 4 e^(−γ) = 2.2458… in place of the rounded
    /// 2.25 of the Cooper–Jacob form (which alone would shift B(Δt) by 1.1e-4 relative).
    /// Tolerance 1e-6 relative.
    #[test]
    fn steptest_hantush_theis_recovered_within_cooper_jacob_error() {
        const EULER_GAMMA: f64 = 0.577_215_664_901_532_9;
        let (x, a_rounded, b, c) = synthetic(true);
        let a = a_rounded + b * (4.0 * (-EULER_GAMMA).exp() / 2.25).log10();
        let r = fit_series(&x, &SeriesOptions::default()).unwrap();
        let rel = |u: f64, v: f64| (u / v - 1.0).abs();
        assert!(
            rel(r.series.b.value, b) < 1e-6,
            "b {} vs {b}",
            r.series.b.value
        );
        assert!(
            rel(r.series.a.value, a) < 1e-6,
            "a {} vs {a}",
            r.series.a.value
        );
        assert!(rel(r.corrected.fit.b.value, a + b * 3600f64.log10()) < 1e-6);
        assert!(
            rel(r.corrected.fit.c.value, c) < 1e-6,
            "C {}",
            r.corrected.fit.c.value
        );
    }

    /// Seeded noise, σ = 1 cm on every reading: the 95 % intervals of the corrected line
    /// hold the true B(Δt) and C, and so do those of the series fit.
    #[test]
    fn steptest_hantush_noisy_inside_interval() {
        let (mut x, a, b, c) = synthetic(false);
        let mut rng = Rng::new(3);
        for s in &mut x {
            s.drawdown_m += 0.01 * rng.normal();
        }
        let opts = SeriesOptions {
            weighting: Weighting::Drawdown,
            ..SeriesOptions::default()
        };
        let r = fit_series(&x, &opts).unwrap();
        let b_ref = a + b * 3600f64.log10();
        assert!(
            r.corrected.fit.b.contains(b_ref),
            "{:?} vs {b_ref}",
            r.corrected.fit.b
        );
        assert!(
            r.corrected.fit.c.contains(c),
            "{:?} vs {c}",
            r.corrected.fit.c
        );
        assert!(r.series.b.contains(b), "{:?} vs {b}", r.series.b);
        assert!(r.series.c.contains(c), "{:?} vs {c}", r.series.c);
        assert!(r.b_series.contains(b_ref), "{:?}", r.b_series);
    }

    /// Coverage of the corrected line's 95 % intervals over 200 seeded tests (Cooper–Jacob
    /// data, σ = 1 cm on every reading, weights Q²). Accepted 179 ≤ count ≤ 199, the bound of
    /// the Jacob coverage test (`scipy.stats.binom(200, 0.95)`: cdf(178) = 4.8e-4,
    /// sf(199) = 3.5e-5). The interval treats b̂ as known; this checks that b̂, fitted from
    /// some 180 readings, adds little to the error of four corrected drawdowns.
    #[test]
    fn steptest_hantush_interval_coverage_near_95_percent() {
        let (clean, a, b, c) = synthetic(false);
        let b_ref = a + b * 3600f64.log10();
        let opts = SeriesOptions {
            weighting: Weighting::Drawdown,
            ..SeriesOptions::default()
        };
        let mut rng = Rng::new(21);
        let (mut hit_b, mut hit_c) = (0, 0);
        let mut x = clean.clone();
        for _ in 0..200 {
            for (s, s0) in x.iter_mut().zip(&clean) {
                s.drawdown_m = s0.drawdown_m + 0.01 * rng.normal();
            }
            let r = fit_series(&x, &opts).unwrap();
            hit_b += usize::from(r.corrected.fit.b.contains(b_ref));
            hit_c += usize::from(r.corrected.fit.c.contains(c));
        }
        assert!((179..=199).contains(&hit_b), "B(Δt) covered {hit_b}/200");
        assert!((179..=199).contains(&hit_c), "C covered {hit_c}/200");
    }

    /// The common time against the readings fitted. The synthetic test has 60-min steps
    /// read every minute; a quarter of each step is skipped, so the earliest reading fitted
    /// is 15 min into its step and the last reading is at 240 min. A Δt outside 15…240 min
    /// is reported; inside, nothing is. Δt shifts every s*/Q by the same b log10 Δt, so C
    /// must not move (1e-9 relative, round-off of the fit) while B does.
    #[test]
    fn steptest_hantush_reference_time_outside_the_readings_is_reported() {
        let (x, ..) = synthetic(false);
        let base = fit_series(&x, &SeriesOptions::default()).unwrap();
        assert_eq!(base.fitted_times_s, (900.0, 14400.0));
        assert!(base.concerns.is_empty(), "{:?}", base.concerns);
        for (t, outside) in [
            (30.0, true),
            (900.0, false),
            (1800.0, false),
            (20000.0, true),
        ] {
            let o = SeriesOptions {
                reference_time_s: Some(t),
                ..SeriesOptions::default()
            };
            let r = fit_series(&x, &o).unwrap();
            let want = outside.then_some(Concern::ReferenceTimeOutside {
                reference_s: t,
                first_s: 900.0,
                last_s: 14400.0,
            });
            assert_eq!(r.concerns.first().cloned(), want, "Δt = {t} s");
            let c = (r.corrected.fit.c.value, base.corrected.fit.c.value);
            assert!((c.0 / c.1 - 1.0).abs() < 1e-9, "C {c:?} at Δt = {t} s");
            // B(Δt) = a + b log10 Δt grows with Δt (b > 0); the default Δt is 3600 s.
            assert_eq!(
                r.corrected.fit.b.value < base.corrected.fit.b.value,
                t < 3600.0
            );
        }
    }

    #[test]
    fn steptest_hantush_refuses_two_steps_and_bad_options() {
        let (x, ..) = synthetic(false);
        let e = fit_series(&x[..120], &SeriesOptions::default()).unwrap_err();
        assert_eq!(e, StepTestError::TooFewSteps { steps: 2 });
        let bad = SeriesOptions {
            skip_fraction: 1.0,
            ..SeriesOptions::default()
        };
        assert!(fit_series(&x, &bad).is_err());
        let bad = SeriesOptions {
            reference_time_s: Some(-1.0),
            ..SeriesOptions::default()
        };
        assert!(fit_series(&x, &bad).is_err());
    }
}
