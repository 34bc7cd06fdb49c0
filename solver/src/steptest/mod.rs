//! Field step-drawdown analysis: the well-loss coefficients B and C of a step test, with
//! their uncertainty.
//!
//! A step test pumps a well at a few increasing constant rates Q_1 < Q_2 < … and records
//! the drawdown s_w in the well. Jacob (1947) split the drawdown into a part linear in the
//! rate (aquifer loss and laminar well loss) and a part quadratic in it (turbulent and
//! orifice losses at the well):
//!
//! ```text
//! s_w = B Q + C Q²          s_w / Q = B + C Q
//! B [s/m²]: aquifer loss and linear well loss; C [s²/m⁵]: non-linear well loss
//! ```
//!
//! Two ways in:
//! - [`jacob::fit_steps`]: one drawdown per step, all read after the same pumping time
//!   (or at near-equilibrium); a straight line through s/Q against Q with standard errors
//!   and confidence intervals.
//! - [`hantush::fit_series`]: the whole time series of a test whose steps are not at
//!   equilibrium (Hantush 1964; Bierschenk 1963). The drawdown of each step is corrected
//!   to a common elapsed time with the Cooper–Jacob straight line, then fitted as above.
//! - [`rorabaugh::fit_power`]: the generalised law s = B Q + C Qⁿ (Rorabaugh 1953) on four
//!   or more steps, with linearised intervals.
//!
//! [`checks`] lists what a fit cannot vouch for (C or B below zero, efficiencies outside
//! 0…100 %, repeated or falling rates, a common time outside the readings); the analyses
//! carry those findings beside their numbers and leave the numbers as fitted.
//!
//! Everything is in SI: rates in m³/s, drawdowns in m, times in s. Nothing here reads or
//! writes files. The formulas, their sources and the meaning of the intervals are written
//! out in `docs/step-test.md`.

pub mod checks;
pub mod hantush;
pub mod jacob;
pub(crate) mod lsq;
pub mod rorabaugh;
pub mod series;
pub mod student;

#[cfg(test)]
mod testutil;

/// One step of a step test: its constant rate and the drawdown it produced.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Step {
    /// Pumping rate Q [m³/s], positive for abstraction.
    pub rate_m3_s: f64,
    /// Drawdown s_w in the well at the reading used for the fit \[m\], positive downward.
    pub drawdown_m: f64,
}

/// One reading of a step test's time series.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sample {
    /// Time since pumping began \[s\].
    pub time_s: f64,
    /// The rate pumped up to this reading [m³/s].
    pub rate_m3_s: f64,
    /// Drawdown s_w in the well \[m\].
    pub drawdown_m: f64,
}

/// How the points of the line s/Q = B + C Q are weighted.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Weighting {
    /// Every step counts the same: ordinary least squares on s/Q, the straight line drawn
    /// through the classic plot. Assumes the error of s/Q is the same at every step.
    Equal,
    /// Weights Q²: assumes the error of the measured drawdown s is the same at every step
    /// (so s/Q scatters as 1/Q). Equivalent to fitting s = B Q + C Q² by ordinary least
    /// squares.
    Drawdown,
}

/// A fitted coefficient with its standard error and confidence interval.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Estimate {
    /// Least-squares value.
    pub value: f64,
    /// Standard error (square root of the diagonal of the estimated covariance).
    pub std_error: f64,
    /// Lower end of the confidence interval, value − t · std_error.
    pub lower: f64,
    /// Upper end of the confidence interval, value + t · std_error.
    pub upper: f64,
}

impl Estimate {
    fn new(value: f64, std_error: f64, t: f64) -> Self {
        Self {
            value,
            std_error,
            lower: value - t * std_error,
            upper: value + t * std_error,
        }
    }

    /// Whether `x` lies inside the interval (ends included).
    pub fn contains(&self, x: f64) -> bool {
        self.lower <= x && x <= self.upper
    }
}

/// What went wrong with a step test's data. Step and row numbers count from 1.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum StepTestError {
    /// Fewer than three steps: two steps give B and C exactly, with nothing left to
    /// estimate their error from.
    #[error(
        "{steps} step(s) given; at least 3 are needed: 2 steps determine B and C exactly \
         and leave no degree of freedom to estimate their uncertainty"
    )]
    TooFewSteps {
        /// Number of steps given.
        steps: usize,
    },
    /// A value is NaN or infinite, or outside its range.
    #[error("step {step}: {field} = {value} {reason}")]
    BadStep {
        /// Step number (from 1).
        step: usize,
        /// `rate` or `drawdown`.
        field: &'static str,
        /// The value.
        value: f64,
        /// What is wrong.
        reason: &'static str,
    },
    /// A reading of a time series is not usable.
    #[error("reading {row}: {field} = {value} {reason}")]
    BadSample {
        /// Reading number (from 1).
        row: usize,
        /// `time`, `rate` or `drawdown`.
        field: &'static str,
        /// The value.
        value: f64,
        /// What is wrong.
        reason: &'static str,
    },
    /// All steps have the same rate, so the slope C is undetermined.
    #[error("all steps have the same rate; B and C cannot be separated")]
    SameRates,
    /// The confidence level is not inside (0, 1).
    #[error("confidence level {0} is not between 0 and 1")]
    BadConfidence(f64),
    /// A time-series fit has too few usable readings or they do not determine the unknowns.
    #[error("{0}")]
    Underdetermined(String),
}

/// Derived figures of one step at the fitted B and C.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StepFigures {
    /// Rate Q [m³/s].
    pub rate_m3_s: f64,
    /// Drawdown used in the fit \[m\] (measured, or corrected to the common time).
    pub drawdown_m: f64,
    /// s/Q [s/m²].
    pub drawdown_per_rate: f64,
    /// Specific capacity Q/s [m²/s] of the drawdown used in the fit.
    pub specific_capacity: f64,
    /// Fitted linear loss B Q \[m\].
    pub linear_loss_m: f64,
    /// Fitted non-linear loss C Q² \[m\].
    pub nonlinear_loss_m: f64,
    /// Residual s − (B Q + C Q²) \[m\].
    pub residual_m: f64,
    /// Jacob's step-test efficiency E = B Q / (B Q + C Q²) [-]: the linear share of the
    /// fitted drawdown. The non-linear share is 1 − E.
    pub efficiency: f64,
    /// First-order (delta-method) standard error of E from the covariance of B and C.
    pub efficiency_std_error: f64,
}

/// Derived figures of every step from a fitted line.
pub fn step_figures(steps: &[Step], fit: &jacob::LineFit) -> Vec<StepFigures> {
    let (b, c) = (fit.b.value, fit.c.value);
    let (vb, vc, cov) = (fit.b.std_error.powi(2), fit.c.std_error.powi(2), fit.cov_bc);
    steps
        .iter()
        .map(|st| {
            let q = st.rate_m3_s;
            let lin = b * q;
            let non = c * q * q;
            let denom = (b + c * q).powi(2);
            let (gb, gc) = (c * q / denom, -b * q / denom);
            let var_e = gb * gb * vb + gc * gc * vc + 2.0 * gb * gc * cov;
            StepFigures {
                rate_m3_s: q,
                drawdown_m: st.drawdown_m,
                drawdown_per_rate: st.drawdown_m / q,
                specific_capacity: q / st.drawdown_m,
                linear_loss_m: lin,
                nonlinear_loss_m: non,
                residual_m: st.drawdown_m - lin - non,
                efficiency: b / (b + c * q),
                efficiency_std_error: var_e.max(0.0).sqrt(),
            }
        })
        .collect()
}
