//! What a step-test fit cannot vouch for: checks of the steps and of the fitted
//! coefficients that do not stop the analysis, but must be shown beside its numbers. The
//! numbers themselves are left as the least-squares fit gives them.
//!
//! ```text
//! repeated rate      Q_j = Q_k for j ≠ k          a repeated rate adds nothing to the slope
//! rate decreases     Q_k < Q_{k−1}                the method assumes each step above the last
//! C < 0              no non-linear loss           s/Q falls as Q rises: not Jacob's form
//! B < 0              negative linear loss         not physical
//! E ∉ [0, 1]         E = B / (B + C Q)            follows from C < 0 or B < 0
//! Δt outside the     B(Δt) = a + b log10 Δt       the straight line is extrapolated
//! fitted readings
//! power law C < 0    s = B Q + C Qⁿ               no non-linear loss
//! ```
//!
//! What each means and what usually causes it is written out in docs/step-test.md §4a.

use super::jacob::LineFit;
use super::rorabaugh::PowerFit;
use super::{Step, StepFigures};

/// A finding about a step test that the user must see beside the fit. Step numbers count
/// from 1, in the order of the test.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum Concern {
    /// Two or more steps were pumped at the same rate.
    RepeatedRate {
        /// The shared rate [m³/s].
        rate_m3_s: f64,
        /// The steps pumped at it.
        steps: Vec<usize>,
        /// Number of distinct rates in the whole test.
        distinct_rates: usize,
    },
    /// A step's rate is below that of the step before it.
    RateDecreases {
        /// The step.
        step: usize,
        /// Its rate [m³/s].
        rate_m3_s: f64,
        /// The rate of the step before [m³/s].
        previous_m3_s: f64,
    },
    /// The fitted C is below zero: no physical non-linear loss.
    NegativeC {
        /// C [s²/m⁵].
        value: f64,
        /// Upper end of its confidence interval [s²/m⁵].
        upper: f64,
        /// Confidence level of that interval.
        confidence: f64,
    },
    /// The fitted B is below zero: a negative linear loss.
    NegativeB {
        /// B [s/m²].
        value: f64,
    },
    /// The step efficiency E = B Q / (B Q + C Q²) lies outside 0…1 (or is not a number).
    EfficiencyOutOfRange {
        /// (step, E) of every step concerned.
        steps: Vec<(usize, f64)>,
    },
    /// The common time Δt of the Hantush–Bierschenk correction lies outside the elapsed
    /// times of the readings the straight line was fitted to.
    ReferenceTimeOutside {
        /// Δt \[s\].
        reference_s: f64,
        /// Shortest elapsed time, from the start of its step, of a reading in the fit \[s\].
        first_s: f64,
        /// Time of the last reading, from the start of pumping \[s\].
        last_s: f64,
    },
    /// The power law's C is below zero.
    NegativePowerC {
        /// C [s^n/m^(3n−1)].
        value: f64,
        /// The exponent n.
        n: f64,
    },
}

impl Concern {
    /// A short stable name for machine-readable output.
    pub fn kind(&self) -> &'static str {
        match self {
            Concern::RepeatedRate { .. } => "repeated_rate",
            Concern::RateDecreases { .. } => "rate_decreases",
            Concern::NegativeC { .. } => "negative_c",
            Concern::NegativeB { .. } => "negative_b",
            Concern::EfficiencyOutOfRange { .. } => "efficiency_out_of_range",
            Concern::ReferenceTimeOutside { .. } => "reference_time_outside_data",
            Concern::NegativePowerC { .. } => "negative_power_c",
        }
    }
}

/// The rates: steps sharing a rate, and steps below the step before.
pub fn rate_concerns(steps: &[Step]) -> Vec<Concern> {
    let mut out = Vec::new();
    let mut distinct: Vec<f64> = Vec::new();
    for s in steps {
        if !distinct.contains(&s.rate_m3_s) {
            distinct.push(s.rate_m3_s);
        }
    }
    for &q in &distinct {
        let at: Vec<usize> = steps
            .iter()
            .enumerate()
            .filter(|(_, s)| s.rate_m3_s == q)
            .map(|(i, _)| i + 1)
            .collect();
        if at.len() > 1 {
            out.push(Concern::RepeatedRate {
                rate_m3_s: q,
                steps: at,
                distinct_rates: distinct.len(),
            });
        }
    }
    for (k, pair) in steps.windows(2).enumerate() {
        if pair[1].rate_m3_s < pair[0].rate_m3_s {
            out.push(Concern::RateDecreases {
                step: k + 2,
                rate_m3_s: pair[1].rate_m3_s,
                previous_m3_s: pair[0].rate_m3_s,
            });
        }
    }
    out
}

/// The fitted line: C and B below zero, efficiencies outside 0…1.
pub fn fit_concerns(fit: &LineFit, figures: &[StepFigures]) -> Vec<Concern> {
    let mut out = Vec::new();
    if fit.c.value < 0.0 {
        out.push(Concern::NegativeC {
            value: fit.c.value,
            upper: fit.c.upper,
            confidence: fit.confidence,
        });
    }
    if fit.b.value < 0.0 {
        out.push(Concern::NegativeB { value: fit.b.value });
    }
    let outside: Vec<(usize, f64)> = figures
        .iter()
        .enumerate()
        .filter(|(_, g)| !(0.0..=1.0).contains(&g.efficiency))
        .map(|(i, g)| (i + 1, g.efficiency))
        .collect();
    if !outside.is_empty() {
        out.push(Concern::EfficiencyOutOfRange { steps: outside });
    }
    out
}

/// The power law: C below zero.
pub fn power_concerns(p: &PowerFit) -> Vec<Concern> {
    if p.c.value < 0.0 {
        vec![Concern::NegativePowerC {
            value: p.c.value,
            n: p.n.value,
        }]
    } else {
        Vec::new()
    }
}

/// The common time Δt against the elapsed times the straight line was fitted over: from
/// the earliest reading in the fit (from the start of its step) to the last reading of the
/// test (from the start of pumping).
pub fn reference_concern(reference_s: f64, first_s: f64, last_s: f64) -> Option<Concern> {
    (reference_s < first_s || reference_s > last_s).then_some(Concern::ReferenceTimeOutside {
        reference_s,
        first_s,
        last_s,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::steptest::jacob::fit_steps;
    use crate::steptest::Weighting;

    fn steps(rows: &[(f64, f64)]) -> Vec<Step> {
        rows.iter()
            .map(|&(q_l_s, s)| Step {
                rate_m3_s: q_l_s * 1e-3,
                drawdown_m: s,
            })
            .collect()
    }

    /// Steps whose s/Q falls from 196 to 150 s/m² as Q rises (5, 10, 15, 20 L/s; 0.98,
    /// 2.05, 2.6, 3.0 m; invented numbers). `numpy.linalg.lstsq` of s/Q on [1, Q]
    /// (numpy 2.4.6) gives B = 223.5 s/m², C = −3393.333 s²/m⁵; the closed form must agree
    /// to round-off (1e-9 relative). B > 0 and C < 0 put E = B / (B + C Q) above 1.
    #[test]
    fn steptest_checks_negative_c_and_efficiency_above_one() {
        let st = steps(&[(5.0, 0.98), (10.0, 2.05), (15.0, 2.6), (20.0, 3.0)]);
        let a = fit_steps(&st, Weighting::Equal, 0.95).unwrap();
        assert!(
            (a.fit.b.value / 223.5 - 1.0).abs() < 1e-9,
            "{}",
            a.fit.b.value
        );
        assert!(
            (a.fit.c.value / -3_393.333_333_333 - 1.0).abs() < 1e-9,
            "{}",
            a.fit.c.value
        );
        let c = fit_concerns(&a.fit, &a.figures);
        assert!(
            matches!(c[0], Concern::NegativeC { value, .. } if value == a.fit.c.value),
            "{c:?}"
        );
        match &c[1] {
            Concern::EfficiencyOutOfRange { steps } => {
                assert_eq!(steps.iter().map(|s| s.0).collect::<Vec<_>>(), [1, 2, 3, 4]);
                assert!(steps.iter().all(|s| s.1 > 1.0));
            }
            other => panic!("{other:?}"),
        }
        assert_eq!(c.len(), 2, "{c:?}");
        assert!(rate_concerns(&st).is_empty());
    }

    /// Exact data of docs/physics.md §9d (B = 100 s/m², C = 2000 s²/m⁵, increasing rates):
    /// nothing to report.
    #[test]
    fn steptest_checks_quiet_on_a_sound_test() {
        let st = steps(&[(5.0, 0.55), (10.0, 1.20), (15.0, 1.95), (20.0, 2.80)]);
        let a = fit_steps(&st, Weighting::Drawdown, 0.95).unwrap();
        assert!(a.concerns.is_empty(), "{:?}", a.concerns);
    }

    /// A repeated rate (5, 5, 15 L/s; invented drawdowns) and a rate below the step
    /// before (5, 10, 5 L/s).
    #[test]
    fn steptest_checks_repeated_and_decreasing_rates() {
        let st = steps(&[(5.0, 1.0), (5.0, 1.1), (15.0, 3.5)]);
        assert_eq!(
            rate_concerns(&st),
            vec![Concern::RepeatedRate {
                rate_m3_s: 5e-3,
                steps: vec![1, 2],
                distinct_rates: 2,
            }]
        );
        let a = fit_steps(&st, Weighting::Equal, 0.95).unwrap();
        assert_eq!(a.concerns[0].kind(), "repeated_rate");
        let st = steps(&[(5.0, 1.0), (10.0, 2.1), (5.0, 1.05)]);
        let c = rate_concerns(&st);
        assert_eq!(c.len(), 2, "{c:?}");
        assert!(matches!(&c[0], Concern::RepeatedRate { steps, .. } if steps == &[1, 3]));
        assert_eq!(
            c[1],
            Concern::RateDecreases {
                step: 3,
                rate_m3_s: 5e-3,
                previous_m3_s: 10e-3,
            }
        );
    }

    /// s/Q rising faster than Q allows for a positive intercept (invented: s/Q = −20 +
    /// 20000 Q exactly at 5, 10, 15 L/s): B < 0 and E < 0 at every step.
    #[test]
    fn steptest_checks_negative_b() {
        let st: Vec<Step> = [5e-3, 10e-3, 15e-3]
            .iter()
            .map(|&q| Step {
                rate_m3_s: q,
                drawdown_m: q * (-20.0 + 20000.0 * q),
            })
            .collect();
        let a = fit_steps(&st, Weighting::Equal, 0.95).unwrap();
        let kinds: Vec<_> = a.concerns.iter().map(Concern::kind).collect();
        assert_eq!(kinds, ["negative_b", "efficiency_out_of_range"]);
    }

    /// The power law's C: reported below zero only (invented values).
    #[test]
    fn steptest_checks_power_law_c() {
        use crate::steptest::Estimate;
        let fit = |c: f64| PowerFit {
            b: Estimate::new(100.0, 1.0, 2.0),
            c: Estimate::new(c, 1.0, 2.0),
            n: Estimate::new(2.5, 0.1, 2.0),
            dof: 1,
            confidence: 0.95,
            residual_std_m: 0.01,
        };
        assert!(power_concerns(&fit(3000.0)).is_empty());
        assert_eq!(
            power_concerns(&fit(-3000.0)),
            vec![Concern::NegativePowerC {
                value: -3000.0,
                n: 2.5
            }]
        );
    }

    #[test]
    fn steptest_checks_reference_time_window() {
        assert_eq!(reference_concern(600.0, 300.0, 7200.0), None);
        assert_eq!(reference_concern(300.0, 300.0, 7200.0), None);
        assert!(reference_concern(30.0, 300.0, 7200.0).is_some());
        assert!(reference_concern(7201.0, 300.0, 7200.0).is_some());
    }
}
