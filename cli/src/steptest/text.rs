//! The printed table and the JSON document of a step-test analysis.

use super::Outcome;
use boreflux_solver::steptest::{Estimate, Weighting};
use serde_json::{json, Value};

/// Definition of the efficiency the tool reports.
pub const EFFICIENCY_DEFINITION: &str = "E = B Q / (B Q + C Q^2): the linear share of the \
fitted drawdown (Jacob's step-test efficiency). B holds the aquifer loss and every laminar \
well loss (cake, invaded zone), so E overstates the well's efficiency when the damage is \
laminar.";

/// Reading of the intervals.
pub const INTERVAL_NOTE: &str = "Intervals: least-squares value ± Student t × standard \
error, with n − 2 degrees of freedom; they assume independent, normally distributed errors \
of the stated weighting and that s = B Q + C Q² holds. The efficiency's interval is first \
order (delta method).";

/// `v` to 4 significant digits: plain between 1e-3 and 1e5, else scientific
/// ([`crate::sigfig`]).
pub fn sig(v: f64) -> String {
    crate::sigfig::text(v, 4)
}

fn weighting_name(w: Weighting) -> &'static str {
    match w {
        Weighting::Equal => "equal",
        Weighting::Drawdown => "drawdown",
    }
}

fn estimate_line(name: &str, e: &Estimate, unit: &str, conf_pct: f64) -> String {
    format!(
        "  {name} = {} {unit}   {conf_pct:.0} % interval {} to {}   (standard error {})\n",
        sig(e.value),
        sig(e.lower),
        sig(e.upper),
        sig(e.std_error)
    )
}

/// The human-readable result.
pub fn table(o: &Outcome) -> String {
    let f = &o.fit;
    let pct = 100.0 * f.confidence;
    let mut s = String::new();
    match &o.series {
        Some(h) => {
            s += &format!(
            "Step-drawdown analysis: Hantush–Bierschenk, steps corrected to {} min of pumping\n",
            sig(h.reference_time_s / 60.0)
        )
        }
        None => s += "Step-drawdown analysis: Jacob, drawdown at the end of each step\n",
    }
    s += &format!(
        "  s = B Q + C Q², fitted as s/Q = B + C Q; weights: {}; {} steps, {} degrees of \
         freedom, t = {}\n\n",
        weighting_name(f.weighting),
        o.figures.len(),
        f.dof,
        sig(f.t_quantile)
    );
    s += &estimate_line("B", &f.b, "s/m²", pct);
    s += &estimate_line("C", &f.c, "s²/m⁵", pct);
    s += &format!("      C = {} min²/m⁵\n\n", sig(f.c.value / 3600.0));
    let corrected = o.series.is_some();
    s += &format!(
        "{:>4} {:>9} {:>9}{} {:>10} {:>11} {:>8} {:>8} {:>7} {:>7} {:>14}\n",
        "step",
        "Q [L/s]",
        "s [m]",
        if corrected {
            format!(" {:>9}", "s* [m]")
        } else {
            String::new()
        },
        "s/Q [s/m²]",
        "Q/s [L/s/m]",
        "BQ [m]",
        "CQ² [m]",
        "lin %",
        "nonlin %",
        format!("E % ± {pct:.0} %"),
    );
    for (i, (g, m)) in o.figures.iter().zip(&o.measured_m).enumerate() {
        let extra = if corrected {
            format!(" {:>9}", sig(g.drawdown_m))
        } else {
            String::new()
        };
        s += &format!(
            "{:>4} {:>9} {:>9}{extra} {:>10} {:>11} {:>8} {:>8} {:>7.1} {:>7.1} {:>14}\n",
            i + 1,
            sig(g.rate_m3_s * 1e3),
            sig(*m),
            sig(g.drawdown_per_rate),
            sig(g.specific_capacity * 1e3),
            sig(g.linear_loss_m),
            sig(g.nonlinear_loss_m),
            100.0 * g.efficiency,
            100.0 * (1.0 - g.efficiency),
            format!(
                "{:.1} ± {:.1}",
                100.0 * g.efficiency,
                100.0 * f.t_quantile * g.efficiency_std_error
            ),
        );
    }
    if let Some(h) = &o.series {
        let sf = &h.series;
        s += &format!(
            "\n  s: measured at the end of the step; s*: corrected to {} min (s/Q, Q/s and the \
             losses use s*).\n",
            sig(h.reference_time_s / 60.0)
        );
        s += &format!(
            "  Series fit ({} readings, {} degrees of freedom, residual {} m):\n",
            sf.readings_used,
            sf.dof,
            sig(sf.residual_std_m)
        );
        s += &estimate_line("  b", &sf.b, "s/m² per log10 cycle", pct);
        s += &estimate_line("  a", &sf.a, "s/m²", pct);
        s += &estimate_line("  C", &sf.c, "s²/m⁵", pct);
        s += &estimate_line("  B(Δt)", &h.b_series, "s/m²", pct);
        s += &format!(
            "    T = ln 10 / (4π b) = {} m²/s (Cooper–Jacob: confined, no boundaries, late \
             time)\n",
            sig(sf.transmissivity_m2_s)
        );
    }
    match &o.power {
        None => {}
        Some(Err(e)) => s += &format!("\n  Power law s = B Q + C Q^n not fitted: {e}\n"),
        Some(Ok(p)) => {
            s += &format!(
                "\n  Power law s = B Q + C Q^n (Rorabaugh; {} degrees of freedom, residual {} m, \
                 linearised intervals):\n",
                p.dof,
                sig(p.residual_std_m)
            );
            s += &estimate_line("  n", &p.n, "", pct);
            s += &estimate_line("  B", &p.b, "s/m²", pct);
            s += &estimate_line("  C", &p.c, "s^n/m^(3n-1)", pct);
        }
    }
    s += &format!("\n{EFFICIENCY_DEFINITION}\n{INTERVAL_NOTE}\n");
    s += "CAUTION: a step test describes the well at the rates tested; do not extrapolate \
          far beyond the largest step. Pumping rates and levels must respect the pump, \
          screen and casing ratings and the local well code.\n";
    s
}

fn est_json(e: &Estimate, unit: &str) -> Value {
    json!({
        "value": e.value, "std_error": e.std_error,
        "lower": e.lower, "upper": e.upper, "unit": unit,
    })
}

/// The machine-readable result (SI units, named in each key or `unit`).
pub fn to_json(o: &Outcome) -> Value {
    let f = &o.fit;
    let steps: Vec<Value> = o
        .figures
        .iter()
        .zip(&o.measured_m)
        .map(|(g, m)| {
            json!({
                "rate_m3_s": g.rate_m3_s,
                "measured_drawdown_m": m,
                "fitted_drawdown_m": g.drawdown_m,
                "drawdown_per_rate_s_m2": g.drawdown_per_rate,
                "specific_capacity_m2_s": g.specific_capacity,
                "linear_loss_m": g.linear_loss_m,
                "nonlinear_loss_m": g.nonlinear_loss_m,
                "residual_m": g.residual_m,
                "linear_share": g.efficiency,
                "nonlinear_share": 1.0 - g.efficiency,
                "efficiency": g.efficiency,
                "efficiency_std_error": g.efficiency_std_error,
            })
        })
        .collect();
    let mut v = json!({
        "method": o.method,
        "weighting": weighting_name(f.weighting),
        "confidence": f.confidence,
        "dof": f.dof,
        "t_quantile": f.t_quantile,
        "B": est_json(&f.b, "s/m2"),
        "C": est_json(&f.c, "s2/m5"),
        "cov_BC_s3_m7": f.cov_bc,
        "residual_std": f.residual_std,
        "efficiency_definition": EFFICIENCY_DEFINITION,
        "steps": steps,
    });
    match &o.power {
        None => {}
        Some(Err(e)) => v["power"] = json!({ "error": e.to_string() }),
        Some(Ok(p)) => {
            v["power"] = json!({
                "law": "s = B Q + C Q^n",
                "dof": p.dof,
                "residual_std_m": p.residual_std_m,
                "n": est_json(&p.n, ""),
                "B": est_json(&p.b, "s/m2"),
                "C": est_json(&p.c, "s^n/m^(3n-1)"),
            })
        }
    }
    if let Some(h) = &o.series {
        let sf = &h.series;
        v["series"] = json!({
            "reference_time_s": h.reference_time_s,
            "readings_used": sf.readings_used,
            "dof": sf.dof,
            "residual_std_m": sf.residual_std_m,
            "a": est_json(&sf.a, "s/m2"),
            "b": est_json(&sf.b, "s/m2 per log10 cycle"),
            "C": est_json(&sf.c, "s2/m5"),
            "B_at_reference": est_json(&h.b_series, "s/m2"),
            "transmissivity_m2_s": sf.transmissivity_m2_s,
        });
    }
    v
}
