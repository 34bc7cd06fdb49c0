//! Watches on every accepted step: the finite-value guard and the oscillation detector.
//!
//! Finite values: every quantity handed to the observer and the summary must be a number;
//! the first that is NaN or infinite stops the run with [`SolverError::NonFiniteResult`]
//! naming it (f64::max skips NaN, so a NaN would otherwise vanish from the maxima).
//!
//! Oscillation: a stiff mode that a scheme does not damp (Crank–Nicolson after a jump of a
//! conductance) shows as increments of a series that alternate in sign from step to step
//! without decaying. [`Alternation`] counts consecutive alternating increments that are
//! not small beside the series' scale and do not shrink fast (an L-stable scheme leaves a
//! stiff mode alternating too, but cut by |R(z)| ≪ 1 per step, which this ignores).

use crate::error::SolverError;

/// Consecutive alternating increments that make an oscillation (assumption: a physical
/// period spans at least several steps; eight sign flips in a row is a two-step period).
pub const ALTERNATING_STEPS: usize = 8;
/// Increments smaller than this times the series' largest magnitude are round-off-like and
/// break a run (assumption).
const SMALL_INCREMENT: f64 = 1e-6;
/// An increment must keep at least this fraction of the previous one's magnitude to count
/// (a mode damped faster than that is decaying, not ringing; assumption).
const PERSISTENCE: f64 = 0.25;

/// Detector of step-to-step sign alternation in one series.
#[derive(Debug, Clone, Default)]
pub struct Alternation {
    last: Option<f64>,
    last_increment: f64,
    scale: f64,
    run: usize,
}

impl Alternation {
    /// Adds the next value; true when the last [`ALTERNATING_STEPS`] increments alternated
    /// (the run then starts over).
    pub fn push(&mut self, x: f64) -> bool {
        self.scale = self.scale.max(x.abs());
        let Some(prev) = self.last.replace(x) else {
            return false;
        };
        let inc = x - prev;
        let floor = SMALL_INCREMENT * self.scale;
        let alternates = inc * self.last_increment < 0.0
            && inc.abs() > floor
            && self.last_increment.abs() > floor
            && inc.abs() >= PERSISTENCE * self.last_increment.abs();
        self.last_increment = inc;
        self.run = if alternates { self.run + 1 } else { 0 };
        if self.run >= ALTERNATING_STEPS {
            self.run = 0;
            true
        } else {
            false
        }
    }

    /// Forgets the history (after a jump, where a sign change is expected).
    pub fn reset(&mut self) {
        self.last = None;
        self.last_increment = 0.0;
        self.run = 0;
    }
}

/// `check_finite!(time_s, step; "name" => value, …)`: the first value that is not finite,
/// as [`SolverError::NonFiniteResult`] naming it, at `time_s`, step `step`; `Ok(())` when
/// all are. Each name stays beside its value; the values are checked as an array by
/// [`first_non_finite`], without building the named list.
macro_rules! check_finite {
    ($time_s:expr, $step:expr; $($name:literal => $value:expr),+ $(,)?) => {
        $crate::run::watch::first_non_finite(&[$($name),+], [$($value),+], $time_s, $step)
    };
}
pub(crate) use check_finite;

/// The first of `values` that is not finite, named by the same entry of `names`, as an
/// error at `time_s`, step `step`. The usual case, all finite, is one test: 0 × x is ±0
/// for a finite x and NaN otherwise, and a sum of zeros is 0.
pub fn first_non_finite<const N: usize>(
    names: &[&'static str; N],
    values: [f64; N],
    time_s: f64,
    step: u64,
) -> Result<(), SolverError> {
    if values.iter().fold(0.0, |a, &x| a + 0.0 * x) == 0.0 {
        return Ok(());
    }
    match names.iter().zip(values).find(|(_, v)| !v.is_finite()) {
        Some((&quantity, value)) => Err(SolverError::NonFiniteResult {
            quantity,
            value,
            time_s,
            step,
        }),
        None => Ok(()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sawtooth_is_found_and_smooth_series_are_not() {
        // A sawtooth on a slow ramp (Crank–Nicolson's undamped mode, R = −1).
        let mut a = Alternation::default();
        let hits = (0..40)
            .filter(|&k| a.push(0.01 * k as f64 + if k % 2 == 0 { 0.4 } else { -0.4 }))
            .count();
        assert!(hits >= 3, "{hits}");
        // A sine at 20 steps per period: never.
        let mut a = Alternation::default();
        assert!(!(0..400).any(|k| a.push((k as f64 * 0.314).sin())));
        // A stiff mode damped by 0.05 per step on a constant: not ringing.
        let mut a = Alternation::default();
        assert!(!(0..40).any(|k| a.push(1.0 + (-0.05f64).powi(k))));
    }

    #[test]
    fn non_finite_values_are_named() {
        let names = ["well head", "face flux", "screen flow"];
        let e = first_non_finite(&names, [1.0, f64::NAN, f64::INFINITY], 2.0, 7);
        match e {
            Err(SolverError::NonFiniteResult { quantity, step, .. }) => {
                assert_eq!(quantity, "face flux");
                assert_eq!(step, 7);
            }
            other => panic!("{other:?}"),
        }
        for bad in [f64::INFINITY, f64::NEG_INFINITY, f64::NAN] {
            assert!(first_non_finite(&["x", "y"], [-0.0, bad], 0.0, 1).is_err());
        }
        assert!(first_non_finite(&["x", "y"], [1e308, -1e308], 0.0, 1).is_ok());
    }
}
