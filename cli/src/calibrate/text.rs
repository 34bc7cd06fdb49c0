//! The calibration as a table (stdout) and as JSON (SI units) for scripts.

use super::fit::Calibration;
use crate::steptest::text::sig;
use serde_json::{json, Value};

fn side(v: Option<f64>, open: &str) -> String {
    match v {
        Some(v) if v.is_nan() => "refit failed".into(),
        Some(v) => sig(v),
        None => open.into(),
    }
}

/// The profile interval as text, "" when not computed.
pub fn profile_text(c: &Calibration, j: usize) -> String {
    match c.params[j].profile {
        Some((lo, hi)) => format!("{} .. {}", side(lo, "(bound)"), side(hi, "(bound)")),
        None => String::new(),
    }
}

fn interval_text(c: &Calibration, j: usize) -> String {
    let p = &c.params[j];
    match p.interval {
        Some((lo, hi)) => format!("{} .. {}", sig(lo), sig(hi)),
        None => "—".into(),
    }
}

/// The table printed by `boreflux calibrate`.
pub fn table(c: &Calibration, confidence: f64) -> String {
    let mut s = String::new();
    s.push_str(&format!(
        "Calibration to {} drawdown readings{}: {} ({} iterations, {} model runs)\n",
        c.observed_m.len(),
        if c.steps.is_empty() {
            String::new()
        } else {
            format!(" and {} step test(s)", c.steps.len())
        },
        if c.termination.converged() {
            "converged"
        } else {
            "NOT converged"
        },
        c.iterations,
        c.runs
    ));
    s.push_str(&format!(
        "residual standard deviation {} m ({} degrees of freedom); RMS misfit with the case's values {} m\n\n",
        sig(c.stats.sigma),
        c.stats.dof,
        sig(rms(&c.start_m, &c.observed_m)),
    ));
    let w = c
        .params
        .iter()
        .map(|p| p.name.len())
        .max()
        .unwrap_or(9)
        .max(9);
    s.push_str(&format!(
        "{:<w$}  {:>11}  {:>11}  {:<27}  {}\n",
        "parameter",
        "start (SI)",
        "fitted (SI)",
        format!("{:.0} % interval (SI)", confidence * 100.0),
        "records"
    ));
    for (j, p) in c.params.iter().enumerate() {
        let mut status = p.status.describe().to_owned();
        if p.on_bound {
            status.push_str("; ON A BOUND: the optimum may lie outside the bounds");
        }
        if p.profile.is_some() {
            status.push_str(&format!("; profile interval {}", profile_text(c, j)));
        }
        s.push_str(&format!(
            "{:<w$}  {:>11}  {:>11}  {:<27}  {}\n",
            p.name,
            sig(p.start),
            sig(p.value),
            interval_text(c, j),
            status
        ));
    }
    if c.params.len() > 1 {
        s.push_str("\ncorrelation (fit coordinates: ln x for log-scaled parameters)\n");
        for (j, row) in c.stats.correlation.iter().enumerate() {
            s.push_str(&format!("{:<w$}", c.params[j].name));
            for v in row {
                match v {
                    Some(v) => s.push_str(&format!("  {v:>6.3}")),
                    None => s.push_str("       —"),
                }
            }
            s.push('\n');
        }
    }
    for st in &c.steps {
        s.push_str(&format!(
            "\nstep test {}: rate (L/s), drawdown at the end of the step (m): field, model with \
             the case's values, model fitted\n",
            st.label
        ));
        for k in 0..st.rates_m3_s.len() {
            s.push_str(&format!(
                "  {:>9}  {:>9}  {:>9}  {:>9}\n",
                sig(st.rates_m3_s[k] * 1e3),
                sig(st.observed_m[k]),
                sig(st.start_m[k]),
                sig(st.fitted_m[k])
            ));
        }
    }
    s.push_str(
        "\nIntervals are from the Jacobian (linearised) and hold only if the model is right and \
         the reading errors are independent with one spread. Check the residuals before \
         relying on them.\n",
    );
    s
}

fn rms(a: &[f64], b: &[f64]) -> f64 {
    (a.iter().zip(b).map(|(x, y)| (x - y).powi(2)).sum::<f64>() / a.len().max(1) as f64).sqrt()
}

fn num(v: f64) -> Value {
    if v.is_finite() {
        json!(v)
    } else {
        Value::Null
    }
}

/// JSON of the calibration.
pub fn to_json(c: &Calibration, confidence: f64) -> Value {
    json!({
        "converged": c.termination.converged(),
        "termination": format!("{:?}", c.termination).to_lowercase(),
        "iterations": c.iterations,
        "model_runs": c.runs,
        "confidence": confidence,
        "sigma_m": num(c.stats.sigma),
        "degrees_of_freedom": c.stats.dof,
        "t_quantile": num(c.stats.t),
        "ssr_m2": num(c.ssr),
        "parameters": c.params.iter().map(|p| json!({
            "path": p.name,
            "start_si": num(p.start),
            "fitted_si": num(p.value),
            "interval_si": p.interval.map(|(a, b)| json!([a, b])),
            "std_error_fit": p.std_error_fit,
            "profile_interval_si": p.profile.map(|(lo, hi)| json!([lo.map(num), hi.map(num)])),
            "constrained": p.status.constrained(),
            "status": p.status.describe(),
            "on_bound": p.on_bound,
        })).collect::<Vec<_>>(),
        "correlation": c.stats.correlation,
        "step_tests": c.steps.iter().map(|st| json!({
            "when": st.label,
            "rate_m3_s": st.rates_m3_s,
            "observed_m": st.observed_m,
            "start_m": st.start_m.iter().map(|v| num(*v)).collect::<Vec<_>>(),
            "fitted_m": st.fitted_m.iter().map(|v| num(*v)).collect::<Vec<_>>(),
        })).collect::<Vec<_>>(),
        "readings": {
            "time_s": c.times_s,
            "observed_m": c.observed_m,
            "start_m": c.start_m.iter().map(|v| num(*v)).collect::<Vec<_>>(),
            "fitted_m": c.fitted_m.iter().map(|v| num(*v)).collect::<Vec<_>>(),
        },
    })
}
