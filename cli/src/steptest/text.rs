//! The printed table and the JSON document of a step-test analysis.

use super::Outcome;
use crate::output::schema::{estimate as E, steptest_json as K, JsonKey};
use boreflux_solver::steptest::checks::Concern;
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

/// The usual causes of a fit that the data do not support, shared by the warnings.
const USUAL_CAUSES: &str = "the well still developing during the test (fines removed, \
losses falling from step to step), too few steps or rates too close together for the \
scatter of the readings, a step read before its drawdown settled or after a different \
pumping time, or an error in a rate or a level";

/// "1 and 2", "1, 3 and 5".
fn step_list(steps: &[usize]) -> String {
    let n: Vec<String> = steps.iter().map(ToString::to_string).collect();
    match n.split_last() {
        None => String::new(),
        Some((last, [])) => last.clone(),
        Some((last, rest)) => format!("{} and {last}", rest.join(", ")),
    }
}

/// The text of a solver concern, with units (rates in L/s, times in min).
pub fn concern(c: &Concern) -> String {
    match c {
        Concern::RepeatedRate {
            rate_m3_s,
            steps,
            distinct_rates,
        } => {
            let mut m = format!(
                "steps {} share the rate {} L/s: a step test needs a different rate at each \
                 step, each higher than the last. A repeated rate adds nothing to the slope C, \
                 which rests on the {distinct_rates} distinct rates",
                step_list(steps),
                sig(rate_m3_s * 1e3)
            );
            if *distinct_rates == 2 {
                m += "; with two, the line passes through the mean s/Q at each rate, as in a \
                      two-step test, and its intervals come only from the scatter between \
                      the repeated steps";
            }
            m + "."
        }
        Concern::RateDecreases {
            step,
            rate_m3_s,
            previous_m3_s,
        } => format!(
            "step {step} is pumped at {} L/s, below the {} L/s of step {}: the analysis \
             assumes each step higher than the last. A lower step after a higher one starts \
             while the well recovers from it, and the higher rate may have developed the well \
             further, so its drawdown need not lie on the same line.",
            sig(rate_m3_s * 1e3),
            sig(previous_m3_s * 1e3),
            step - 1
        ),
        Concern::NegativeC {
            value,
            upper,
            confidence,
        } => {
            let pct = 100.0 * confidence;
            let interval = if *upper >= 0.0 {
                format!(
                    "Its {pct:.0} % interval reaches {} s²/m⁵, so the data cannot tell C from \
                     zero",
                    sig(*upper)
                )
            } else {
                format!("Its whole {pct:.0} % interval lies below zero")
            };
            format!(
                "C = {} s²/m⁵ is below zero: s/Q falls as Q rises, so the fit finds no \
                 non-linear well loss, and a negative one is not physical: the data do not \
                 support Jacob's form s = B Q + C Q². The usual causes: \
                 {USUAL_CAUSES}. {interval}. B, the losses and the efficiencies come from \
                 this line and do not describe the well: check the readings, and repeat the \
                 test once development is complete.",
                sig(*value)
            )
        }
        Concern::NegativeB { value } => format!(
            "B = {} s/m² is below zero: a negative linear loss is not physical, so the line \
             does not describe the well. The usual causes: {USUAL_CAUSES}.",
            sig(*value)
        ),
        Concern::EfficiencyOutOfRange { steps } => {
            let list: Vec<String> = steps
                .iter()
                .map(|(k, e)| format!("step {k} ({:.1} %)", 100.0 * e))
                .collect();
            format!(
                "the step efficiency E = B Q / (B Q + C Q²) lies outside 0 to 100 % at {}: \
                 E is the linear share of the fitted drawdown and stays within 0 to 100 % only \
                 when B and C are not negative. These values follow from the negative \
                 coefficient and are not efficiencies of the well.",
                list.join(", ")
            )
        }
        Concern::ReferenceTimeOutside {
            reference_s,
            first_s,
            last_s,
        } => {
            if reference_s < first_s {
                format!(
                    "--at {} min is earlier than any reading fitted (the earliest is {} min \
                     into its step; readings before it were left out by --skip or not taken): \
                     B(Δt) = a + b log10 Δt then extends the Cooper–Jacob straight line back to \
                     times where well-bore storage and early-time flow usually bend the \
                     drawdown curve, so B and the efficiencies at that time are not supported \
                     by the readings. C does not depend on --at. Choose a time within the \
                     steps (the default is the shortest step).",
                    sig(reference_s / 60.0),
                    sig(first_s / 60.0)
                )
            } else {
                format!(
                    "--at {} min is later than the last reading ({} min after pumping began): \
                     B(Δt) = a + b log10 Δt then extends the Cooper–Jacob straight line beyond \
                     the test, and a boundary, leakage or delayed yield not reached during the \
                     test would change it. C does not depend on --at.",
                    sig(reference_s / 60.0),
                    sig(last_s / 60.0)
                )
            }
        }
        Concern::NegativePowerC { value, n } => format!(
            "power law: C = {} s^n/m^(3n-1) (n = {}) is below zero: no physical non-linear \
             loss, so the law does not describe the well. The usual causes: {USUAL_CAUSES}.",
            sig(*value),
            sig(*n)
        ),
        other => other.kind().replace('_', " "),
    }
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
    if !o.warnings.is_empty() {
        s += &format!("WARNINGS ({}):\n", o.warnings.len());
        for w in &o.warnings {
            s += &format!("  - {}\n", w.message);
        }
        s += "\n";
    }
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

fn est_json(e: &Estimate, key: &JsonKey) -> Value {
    json!({
        (E::VALUE.key()): e.value, (E::STD_ERROR.key()): e.std_error,
        (E::LOWER.key()): e.lower, (E::UPPER.key()): e.upper, (E::UNIT.key()): key.unit,
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
                (K::RATE.key()): g.rate_m3_s,
                (K::MEASURED_DRAWDOWN.key()): m,
                (K::FITTED_DRAWDOWN.key()): g.drawdown_m,
                (K::DRAWDOWN_PER_RATE.key()): g.drawdown_per_rate,
                (K::SPECIFIC_CAPACITY.key()): g.specific_capacity,
                (K::LINEAR_LOSS.key()): g.linear_loss_m,
                (K::NONLINEAR_LOSS.key()): g.nonlinear_loss_m,
                (K::RESIDUAL.key()): g.residual_m,
                (K::LINEAR_SHARE.key()): g.efficiency,
                (K::NONLINEAR_SHARE.key()): 1.0 - g.efficiency,
                (K::EFFICIENCY.key()): g.efficiency,
                (K::EFFICIENCY_STD_ERROR.key()): g.efficiency_std_error,
            })
        })
        .collect();
    let mut v = json!({
        (K::METHOD.key()): o.method,
        (K::WEIGHTING.key()): weighting_name(f.weighting),
        (K::CONFIDENCE.key()): f.confidence,
        (K::DOF.key()): f.dof,
        (K::T_QUANTILE.key()): f.t_quantile,
        (K::B.key()): est_json(&f.b, &K::B),
        (K::C.key()): est_json(&f.c, &K::C),
        (K::COV_BC.key()): f.cov_bc,
        (K::RESIDUAL_STD.key()): f.residual_std,
        (K::EFFICIENCY_DEFINITION.key()): EFFICIENCY_DEFINITION,
        (K::WARNINGS.key()): o.warnings.iter().map(|w| json!({
            (K::WARNING_KIND.key()): w.kind, (K::WARNING_MESSAGE.key()): w.message,
        })).collect::<Vec<_>>(),
        (K::STEPS.key()): steps,
    });
    match &o.power {
        None => {}
        Some(Err(e)) => v[K::POWER.key()] = json!({ (K::POWER_ERROR.key()): e.to_string() }),
        Some(Ok(p)) => {
            v[K::POWER.key()] = json!({
                (K::POWER_LAW.key()): "s = B Q + C Q^n",
                (K::POWER_DOF.key()): p.dof,
                (K::POWER_RESIDUAL_STD.key()): p.residual_std_m,
                (K::POWER_N.key()): est_json(&p.n, &K::POWER_N),
                (K::POWER_B.key()): est_json(&p.b, &K::POWER_B),
                (K::POWER_C.key()): est_json(&p.c, &K::POWER_C),
            })
        }
    }
    if let Some(h) = &o.series {
        let sf = &h.series;
        v[K::SERIES.key()] = json!({
            (K::REFERENCE_TIME.key()): h.reference_time_s,
            (K::READINGS_USED.key()): sf.readings_used,
            (K::SERIES_DOF.key()): sf.dof,
            (K::SERIES_RESIDUAL_STD.key()): sf.residual_std_m,
            (K::SERIES_A.key()): est_json(&sf.a, &K::SERIES_A),
            (K::SERIES_B.key()): est_json(&sf.b, &K::SERIES_B),
            (K::SERIES_C.key()): est_json(&sf.c, &K::SERIES_C),
            (K::B_AT_REFERENCE.key()): est_json(&h.b_series, &K::B_AT_REFERENCE),
            (K::TRANSMISSIVITY.key()): sf.transmissivity_m2_s,
        });
    }
    v
}
