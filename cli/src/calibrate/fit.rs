//! The calibration: free parameters in, the model run on the log's schedule, the fit by
//! Levenberg–Marquardt (`boreflux_solver::calibrate`), the intervals and identifiability.

use super::free::Free;
use super::record::DevelopmentLog;
use super::schedule::{evaluate_all, scheduled_case, Modelled};
use super::steps::FieldSteps;
use boreflux_solver::calibrate::{
    assess, forward_jacobian, minimize, profile_interval, uncertainty, Identifiability, LmOptions,
    Side, Termination, Uncertainty, Verdict,
};
use boreflux_solver::calibrate::{Scale, Setup};
use serde_json::Value;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicUsize, Ordering};

/// Relative difference step of the Jacobian (see `solve`).
const FD_STEP: f64 = 1e-2;

/// What to fit.
#[derive(Debug, Clone)]
pub struct Problem {
    /// The case file as read (JSON), its drive the development device.
    pub raw_case: Value,
    /// Folder the case's relative paths are taken from.
    pub base_dir: PathBuf,
    /// The development log.
    pub log: DevelopmentLog,
    /// Free parameters.
    pub free: Vec<Free>,
    /// Field step test before development (on the well at the log's start).
    pub steps_before: Option<FieldSteps>,
    /// Field step test after development (on the well at the log's end).
    pub steps_after: Option<FieldSteps>,
    /// Threads for the Jacobian's columns.
    pub threads: usize,
    /// Confidence level of the intervals.
    pub confidence: f64,
    /// Fit settings.
    pub options: LmOptions,
    /// Also compute profile intervals of the constrained parameters.
    pub profile: bool,
}

/// One fitted parameter, SI.
#[derive(Debug, Clone)]
pub struct Fitted {
    /// Case path.
    pub name: String,
    /// Start (the case's value).
    pub start: f64,
    /// Fitted value.
    pub value: f64,
    /// Interval (None when not constrained).
    pub interval: Option<(f64, f64)>,
    /// Standard error in the fit coordinates (ln x for a log scale).
    pub std_error_fit: Option<f64>,
    /// Profile interval (None when not computed); a side is None when the records do not
    /// bound it within the allowed range, NaN when a refit failed.
    pub profile: Option<(Option<f64>, Option<f64>)>,
    /// What the records say about it.
    pub status: Identifiability,
    /// What the value may be called: not converged, at or near a bound, weakly constrained,
    /// constrained (`boreflux_solver::calibrate::verdict`).
    pub verdict: Verdict,
    /// Bounds, SI.
    pub bounds: (f64, f64),
    /// Scale of the fit.
    pub scale: Scale,
    /// Unit the values are shown in and its factor (display = SI × factor); "" for a pure
    /// number.
    pub shown: (String, f64),
}

impl Fitted {
    /// A value of this parameter in its display unit.
    pub fn display(&self, x_si: f64) -> f64 {
        x_si * self.shown.1
    }

    /// The display unit with a leading space, "" for a pure number.
    pub fn unit_suffix(&self) -> String {
        if self.shown.0.is_empty() {
            String::new()
        } else {
            format!(" {}", self.shown.0)
        }
    }
}

/// A field step test beside the model's, at the start values and at the fit.
#[derive(Debug, Clone)]
pub struct StepComparison {
    /// "before" or "after".
    pub label: &'static str,
    /// Rates, m³/s.
    pub rates_m3_s: Vec<f64>,
    /// Field drawdown at the end of each step, m.
    pub observed_m: Vec<f64>,
    /// Model, start values, m.
    pub start_m: Vec<f64>,
    /// Model, fitted values, m.
    pub fitted_m: Vec<f64>,
}

/// The result of a calibration.
#[derive(Debug, Clone)]
pub struct Calibration {
    /// Parameters.
    pub params: Vec<Fitted>,
    /// Fit statistics (fit coordinates).
    pub stats: Uncertainty,
    /// Reading times, s.
    pub times_s: Vec<f64>,
    /// Observed drawdown, m.
    pub observed_m: Vec<f64>,
    /// Modelled drawdown with the start values, m.
    pub start_m: Vec<f64>,
    /// Modelled drawdown with the fitted values, m.
    pub fitted_m: Vec<f64>,
    /// Step tests compared (label "before"/"after", rates m³/s, observed, start, fitted, m).
    pub steps: Vec<StepComparison>,
    /// Residual sum of squares at the fit, m².
    pub ssr: f64,
    /// Why the iteration stopped.
    pub termination: Termination,
    /// Accepted iterations.
    pub iterations: usize,
    /// Model runs in all.
    pub runs: usize,
    /// The fitted values, SI, in the order of the free parameters.
    pub values_si: Vec<f64>,
}

impl Calibration {
    /// Whether the fit converged.
    pub fn converged(&self) -> bool {
        self.termination.converged()
    }
}

impl Problem {
    fn case_with(&self, base: &Value, u: &[f64]) -> Result<Value, String> {
        let mut c = base.clone();
        for (f, &ui) in self.free.iter().zip(u) {
            f.apply(&mut c, f.param.from_fit(ui))?;
        }
        Ok(c)
    }

    /// Runs the calibration.
    pub fn solve(&self) -> Result<Calibration, String> {
        let scheduled = scheduled_case(&self.raw_case, &self.log)?;
        let readings = self.log.readings();
        let times: Vec<f64> = readings.iter().map(|r| r.0).collect();
        let log_observed: Vec<f64> = readings.iter().map(|r| r.1).collect();
        let (before, after) = (self.steps_before.as_ref(), self.steps_after.as_ref());
        let observed = Modelled {
            log: log_observed.clone(),
            before: before.map_or_else(Vec::new, |f| f.drawdown_m.clone()),
            after: after.map_or_else(Vec::new, |f| f.drawdown_m.clone()),
        };
        let observed_all = observed.all();
        let runs = AtomicUsize::new(0);
        let model = |u: &[f64]| -> Result<Modelled, String> {
            runs.fetch_add(1, Ordering::Relaxed);
            let c = self.case_with(&scheduled, u)?;
            evaluate_all(&c, &self.base_dir, &times, before, after)
        };
        let residual = |u: &[f64]| -> Option<Vec<f64>> {
            model(u).ok().map(|s| {
                s.all()
                    .iter()
                    .zip(&observed_all)
                    .map(|(m, o)| m - o)
                    .collect()
            })
        };
        let bounds: Vec<(f64, f64)> = self.free.iter().map(|f| f.param.fit_bounds()).collect();
        let u0: Vec<f64> = self.free.iter().map(|f| f.param.to_fit(f.start)).collect();
        let start_m = model(&u0).map_err(|e| format!("with the case's values: {e}"))?;
        // Difference steps: 1 % in ln x for a log scale; 1 % of the value (at least 1e-4 of
        // the range) for a linear one. The scheduled case's time-stepping tolerance
        // (relative 1e-5) keeps the model's noise near 1e-5, 1e-3 of these steps
        // (assumption: calibrate).
        let fd_steps: Vec<f64> = self
            .free
            .iter()
            .zip(&bounds)
            .map(|(f, (lo, hi))| match f.param.scale {
                Scale::Log => FD_STEP,
                Scale::Linear => FD_STEP * f.start.abs().max(1e-2 * (hi - lo)),
            })
            .collect();
        let jac = |u: &[f64], r: &[f64]| {
            forward_jacobian(&residual, u, r, &bounds, &fd_steps, self.threads)
        };
        let out =
            minimize(&residual, jac, &u0, &bounds, &self.options).map_err(|e| e.to_string())?;
        let stats = uncertainty(&out.jacobian, out.ssr, &bounds, self.confidence);
        let setup = Setup {
            bounds: &bounds,
            steps: &fd_steps,
            threads: self.threads,
            options: &self.options,
        };
        let profiles: Vec<Option<(Option<f64>, Option<f64>)>> = (0..self.free.len())
            .map(|j| {
                let h = stats.half_width[j]?;
                if !self.profile {
                    return None;
                }
                let nu = stats.dof as f64;
                let factor = 1.0 + stats.t * stats.t / nu;
                let (lo, hi) = profile_interval(&residual, &out.u, out.ssr, j, h, factor, &setup);
                let f = &self.free[j].param;
                let map = |s: Side| match s {
                    Side::At(u) => Some(f.from_fit(u)),
                    Side::Open => None,
                    Side::Failed => Some(f64::NAN),
                };
                Some((map(lo), map(hi)))
            })
            .collect();
        let params = self
            .free
            .iter()
            .enumerate()
            .map(|(j, f)| {
                let converged = out.termination.converged();
                let verdict = assess(
                    converged,
                    stats.status[j],
                    out.u[j],
                    stats.half_width[j],
                    bounds[j],
                    f.param.scale,
                );
                Fitted {
                    name: f.param.name.clone(),
                    start: f.start,
                    value: f.param.from_fit(out.u[j]),
                    interval: stats.half_width[j].map(|h| {
                        (
                            f.param.from_fit(out.u[j] - h),
                            f.param.from_fit(out.u[j] + h),
                        )
                    }),
                    std_error_fit: stats.std_error[j],
                    profile: profiles[j],
                    status: stats.status[j],
                    verdict,
                    bounds: (f.param.lower, f.param.upper),
                    scale: f.param.scale,
                    shown: f.shown.clone(),
                }
            })
            .collect();
        let fitted_all: Vec<f64> = out
            .residuals
            .iter()
            .zip(&observed_all)
            .map(|(r, o)| r + o)
            .collect();
        let n_log = log_observed.len();
        let n_before = observed.before.len();
        let fitted_m = fitted_all[..n_log].to_vec();
        let mut steps = Vec::new();
        if let Some(f) = before {
            steps.push(StepComparison {
                label: "before",
                rates_m3_s: f.rates_m3_s.clone(),
                observed_m: f.drawdown_m.clone(),
                start_m: start_m.before.clone(),
                fitted_m: fitted_all[n_log..n_log + n_before].to_vec(),
            });
        }
        if let Some(f) = after {
            steps.push(StepComparison {
                label: "after",
                rates_m3_s: f.rates_m3_s.clone(),
                observed_m: f.drawdown_m.clone(),
                start_m: start_m.after.clone(),
                fitted_m: fitted_all[n_log + n_before..].to_vec(),
            });
        }
        let values_si = self
            .free
            .iter()
            .zip(&out.u)
            .map(|(f, &u)| f.param.from_fit(u))
            .collect();
        Ok(Calibration {
            params,
            stats,
            times_s: times,
            observed_m: log_observed,
            start_m: start_m.log,
            fitted_m,
            steps,
            ssr: out.ssr,
            termination: out.termination,
            iterations: out.iterations,
            runs: runs.load(Ordering::Relaxed),
            values_si,
        })
    }
}

/// The base folder of a case path.
pub fn base_dir(case_path: &Path) -> PathBuf {
    case_path
        .parent()
        .map_or_else(|| PathBuf::from("."), Path::to_path_buf)
}
