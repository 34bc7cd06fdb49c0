//! The calibration as a table (stdout) and as JSON (SI units) for scripts.

use super::fit::{Calibration, Fitted};
use crate::steptest::text::sig;
use boreflux_solver::calibrate::verdict::{WIDE_DECADES, WIDE_SHARE};
use boreflux_solver::calibrate::{Bound, Label, Scale};
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

/// The interval in the display unit, marked "(not valid)" when it may not be read as an
/// interval of the parameter (the fit did not converge, or the value is at or near a
/// bound); "—" when there is none. `to` joins the ends (" .. ", " to ").
pub fn interval_text(p: &Fitted, to: &str) -> String {
    match p.interval {
        Some((lo, hi)) => {
            let mut s = format!("{}{to}{}", sig(p.display(lo)), sig(p.display(hi)));
            if !p.verdict.interval_valid {
                s.push_str(" (not valid)");
            }
            s
        }
        None => "—".into(),
    }
}

fn bound_value(p: &Fitted, b: Bound) -> String {
    let x = match b {
        Bound::Lower => p.bounds.0,
        Bound::Upper => p.bounds.1,
    };
    format!("{}{}", sig(p.display(x)), p.unit_suffix())
}

/// What may be said of a fitted value (docs/calibration.md §5a): its label with the reason,
/// and whether it is at a bound or its interval crosses one when the label does not say so.
pub fn verdict_text(p: &Fitted) -> String {
    let v = &p.verdict;
    let crossed: Vec<Bound> = [(v.crosses.0, Bound::Lower), (v.crosses.1, Bound::Upper)]
        .into_iter()
        .filter_map(|(c, b)| c.then_some(b))
        .collect();
    let mut s = match v.label {
        Label::NotConverged => "NOT CONVERGED: the value is where the fit stopped, not a \
                                fitted value; its interval is not valid"
            .to_owned(),
        Label::NotConstrained => p.status.describe().to_owned(),
        Label::AtBound => {
            let b = v.at_bound.unwrap_or(Bound::Lower);
            let records = if p.status.constrained() {
                String::new()
            } else {
                format!("; {}", p.status.describe())
            };
            format!(
                "AT THE {} BOUND ({}): the optimum may lie beyond it and the bound may be too \
                 tight; the interval is not reliable{records}",
                b.word().to_uppercase(),
                bound_value(p, b)
            )
        }
        Label::NearBound => {
            let b = crossed.first().copied().unwrap_or(Bound::Lower);
            format!(
                "NEAR THE {} BOUND: the interval crosses it ({}), so the records cannot tell \
                 the value from the bound, which may be too tight; the interval is not \
                 reliable",
                b.word().to_uppercase(),
                bound_value(p, b)
            )
        }
        Label::Wide => match (v.width, p.scale) {
            (Some(w), Scale::Log) => {
                format!("weakly constrained: the interval spans {w:.1} decades")
            }
            (Some(w), Scale::Linear) => format!(
                "weakly constrained: the interval is ± {:.0} % of the value",
                100.0 * w
            ),
            (None, _) => "weakly constrained".to_owned(),
        },
        Label::Constrained => "constrained".to_owned(),
    };
    if v.label == Label::NearBound {
        match (v.width, p.scale) {
            (Some(w), Scale::Log) if w > WIDE_DECADES => {
                s.push_str(&format!("; the interval spans {w:.1} decades"));
            }
            (Some(w), Scale::Linear) if w > WIDE_SHARE => {
                s.push_str(&format!(
                    "; the interval is ± {:.0} % of the value",
                    100.0 * w
                ));
            }
            _ => {}
        }
    }
    if v.label != Label::AtBound {
        if let Some(b) = v.at_bound {
            s.push_str(&format!(
                "; at the {} bound ({})",
                b.word(),
                bound_value(p, b)
            ));
        }
    }
    if !matches!(v.label, Label::AtBound | Label::NearBound) {
        for b in crossed {
            s.push_str(&format!(
                "; the interval crosses the {} bound ({})",
                b.word(),
                bound_value(p, b)
            ));
        }
    }
    s
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
    let unit = |p: &Fitted| {
        if p.shown.0.is_empty() {
            "-".to_owned()
        } else {
            p.shown.0.clone()
        }
    };
    let uw = c
        .params
        .iter()
        .map(|p| unit(p).len())
        .max()
        .unwrap_or(4)
        .max(4);
    let intervals: Vec<String> = c.params.iter().map(|p| interval_text(p, " .. ")).collect();
    let iw = intervals
        .iter()
        .map(|t| t.chars().count())
        .max()
        .unwrap_or(0)
        .max(27);
    s.push_str(&format!(
        "{:<w$}  {:<uw$}  {:>11}  {:>11}  {:<iw$}  {}\n",
        "parameter",
        "unit",
        "start",
        "fitted",
        format!("{:.0} % interval", confidence * 100.0),
        "records"
    ));
    for (j, p) in c.params.iter().enumerate() {
        let mut status = verdict_text(p);
        if p.profile.is_some() {
            status.push_str(&format!("; profile interval {}", profile_text(c, j)));
        }
        s.push_str(&format!(
            "{:<w$}  {:<uw$}  {:>11}  {:>11}  {:<iw$}  {}\n",
            p.name,
            unit(p),
            sig(p.display(p.start)),
            sig(p.display(p.value)),
            intervals[j],
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
    if !c.converged() {
        s.push_str(&not_converged_advice(c));
        s.push('\n');
    }
    s
}

/// Why a fit that did not converge is not a calibration, and what to try.
pub fn not_converged_advice(c: &Calibration) -> String {
    format!(
        "The fit did NOT converge ({}): the values are where it stopped and the intervals are \
         not valid. Raise --max-runs, or start from other values or bounds.",
        termination_text(c)
    )
}

/// Why the iteration stopped, in words.
pub fn termination_text(c: &Calibration) -> &'static str {
    use boreflux_solver::calibrate::Termination;
    match c.termination {
        Termination::Cost => "the cost no longer falls",
        Termination::Step => "the step became negligible",
        Termination::Gradient => "the gradient became negligible",
        Termination::Evaluations => "the allowed model runs (--max-runs) were used up",
        Termination::Stalled => "no step lowered the misfit although the damping became huge",
    }
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
            "interval_valid": p.verdict.interval_valid,
            "interval_crosses": {"lower": p.verdict.crosses.0, "upper": p.verdict.crosses.1},
            "interval_decades": if p.scale == Scale::Log { p.verdict.width.map(num) } else { None },
            "interval_relative_half_width":
                if p.scale == Scale::Linear { p.verdict.width.map(num) } else { None },
            "bounds_si": [num(p.bounds.0), num(p.bounds.1)],
            "unit": {"label": p.shown.0, "per_si": num(p.shown.1)},
            "profile_interval_si": p.profile.map(|(lo, hi)| json!([lo.map(num), hi.map(num)])),
            "label": p.verdict.label.word(),
            "constrained": matches!(p.verdict.label, Label::Constrained | Label::Wide),
            "identifiability": p.status.describe(),
            "status": verdict_text(p),
            "at_bound": p.verdict.at_bound.map(Bound::word),
            "on_bound": p.verdict.at_bound.is_some(),
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
