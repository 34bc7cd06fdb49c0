//! A step test's time series: checks, the split into constant-rate steps, and the
//! drawdown at the end of each step.
//!
//! Convention: time counts from the start of pumping (the first step starts at t = 0 from
//! the static level). Each reading carries the rate pumped up to it. A rate change takes
//! effect at the time of the last reading at the previous rate, so step k (k ≥ 2) starts at
//! the time of the last reading of step k − 1.

use super::{Sample, Step, StepTestError};

/// The readings of one constant-rate step.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StepSpan {
    /// Rate of the step [m³/s].
    pub rate_m3_s: f64,
    /// Time the step began \[s\].
    pub start_s: f64,
    /// Index of its first reading.
    pub first: usize,
    /// Index of its last reading (inclusive).
    pub last: usize,
}

impl StepSpan {
    /// Time from the start of the step to its last reading \[s\].
    pub fn duration_s(&self, samples: &[Sample]) -> f64 {
        samples[self.last].time_s - self.start_s
    }
}

/// Checks the readings (finite values, times above zero and increasing, rates above zero)
/// and splits them into steps of constant rate.
pub fn split_steps(samples: &[Sample]) -> Result<Vec<StepSpan>, StepTestError> {
    let bad = |row: usize, field, value, reason| StepTestError::BadSample {
        row,
        field,
        value,
        reason,
    };
    let mut prev = 0.0;
    for (i, s) in samples.iter().enumerate() {
        if !(s.time_s.is_finite() && s.time_s > prev) {
            return Err(bad(
                i + 1,
                "time",
                s.time_s,
                if i == 0 {
                    "must be after the start of pumping (t > 0)"
                } else {
                    "must be later than the reading before"
                },
            ));
        }
        prev = s.time_s;
        if !(s.rate_m3_s.is_finite() && s.rate_m3_s > 0.0) {
            return Err(bad(
                i + 1,
                "rate",
                s.rate_m3_s,
                "must be a finite rate above zero",
            ));
        }
        if !s.drawdown_m.is_finite() {
            return Err(bad(i + 1, "drawdown", s.drawdown_m, "must be finite"));
        }
    }
    let mut spans: Vec<StepSpan> = Vec::new();
    for (i, s) in samples.iter().enumerate() {
        match spans.last_mut() {
            Some(span) if span.rate_m3_s == s.rate_m3_s => span.last = i,
            _ => {
                let start_s = if i == 0 { 0.0 } else { samples[i - 1].time_s };
                spans.push(StepSpan {
                    rate_m3_s: s.rate_m3_s,
                    start_s,
                    first: i,
                    last: i,
                });
            }
        }
    }
    Ok(spans)
}

/// The drawdown at the last reading of each step.
pub fn end_of_step(samples: &[Sample], spans: &[StepSpan]) -> Vec<Step> {
    spans
        .iter()
        .map(|sp| Step {
            rate_m3_s: sp.rate_m3_s,
            drawdown_m: samples[sp.last].drawdown_m,
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sample(t: f64, q: f64, s: f64) -> Sample {
        Sample {
            time_s: t,
            rate_m3_s: q,
            drawdown_m: s,
        }
    }

    #[test]
    fn steptest_series_split_and_end_of_step() {
        let x = [
            sample(60.0, 0.01, 1.0),
            sample(120.0, 0.01, 1.1),
            sample(180.0, 0.02, 2.3),
            sample(240.0, 0.02, 2.4),
            sample(300.0, 0.03, 3.9),
        ];
        let spans = split_steps(&x).unwrap();
        assert_eq!(spans.len(), 3);
        assert_eq!(
            (spans[0].start_s, spans[0].first, spans[0].last),
            (0.0, 0, 1)
        );
        assert_eq!(
            (spans[1].start_s, spans[1].first, spans[1].last),
            (120.0, 2, 3)
        );
        assert_eq!(
            (spans[2].start_s, spans[2].first, spans[2].last),
            (240.0, 4, 4)
        );
        assert_eq!(spans[1].duration_s(&x), 120.0);
        let ends = end_of_step(&x, &spans);
        assert_eq!(
            ends.iter().map(|s| s.drawdown_m).collect::<Vec<_>>(),
            vec![1.1, 2.4, 3.9]
        );
    }

    #[test]
    fn steptest_series_rejects_bad_readings() {
        let e = split_steps(&[sample(60.0, 0.01, 1.0), sample(60.0, 0.01, 1.0)]).unwrap_err();
        assert!(
            matches!(
                e,
                StepTestError::BadSample {
                    row: 2,
                    field: "time",
                    ..
                }
            ),
            "{e}"
        );
        let e = split_steps(&[sample(0.0, 0.01, 1.0)]).unwrap_err();
        assert!(
            matches!(
                e,
                StepTestError::BadSample {
                    row: 1,
                    field: "time",
                    ..
                }
            ),
            "{e}"
        );
        let e = split_steps(&[sample(1.0, -0.01, 1.0)]).unwrap_err();
        assert!(
            matches!(
                e,
                StepTestError::BadSample {
                    row: 1,
                    field: "rate",
                    ..
                }
            ),
            "{e}"
        );
        let e = split_steps(&[sample(1.0, 0.01, 1.0), sample(2.0, 0.01, f64::NAN)]).unwrap_err();
        assert!(
            matches!(
                e,
                StepTestError::BadSample {
                    row: 2,
                    field: "drawdown",
                    ..
                }
            ),
            "{e}"
        );
    }
}
