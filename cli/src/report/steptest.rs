//! The HTML page of a step-drawdown analysis: cautions, B and C with their intervals, the
//! per-step table and an SVG plot of s/Q against Q with the fitted line and its pointwise
//! confidence band.

use std::fmt::Write;

use super::escape::esc;
use super::html::STYLE;
use super::svg::{render, Chart, Series, Style, FITTED, READINGS};
use crate::steptest::text::{sig, EFFICIENCY_DEFINITION, INTERVAL_NOTE};
use crate::steptest::Outcome;
use boreflux_solver::steptest::Estimate;

/// Points of the fitted line and band (more than the chart's marker limit, so no markers).
const LINE_POINTS: usize = 101;

const CORRECTED: Style = Style {
    color: "#1f5fa8",
    dash: "",
    width: 0.0,
};
const BAND: Style = Style {
    color: "#1f5fa8",
    dash: "4 3",
    width: 1.0,
};

/// The s/Q–Q chart as an `<svg>` element. Q is shown in L/s, s/Q in s/m².
pub fn chart(o: &Outcome) -> String {
    let f = &o.fit;
    let q: Vec<f64> = o.figures.iter().map(|g| g.rate_m3_s).collect();
    let q_max = q.iter().copied().fold(0.0, f64::max) * 1.05;
    let x: Vec<f64> = (0..LINE_POINTS)
        .map(|k| q_max * k as f64 / (LINE_POINTS - 1) as f64)
        .collect();
    let line: Vec<f64> = x.iter().map(|q| f.b.value + f.c.value * q).collect();
    let (vb, vc) = (f.b.std_error.powi(2), f.c.std_error.powi(2));
    let half = |q: f64| f.t_quantile * (vb + q * q * vc + 2.0 * q * f.cov_bc).max(0.0).sqrt();
    let upper: Vec<f64> = x.iter().zip(&line).map(|(q, y)| y + half(*q)).collect();
    let lower: Vec<f64> = x.iter().zip(&line).map(|(q, y)| y - half(*q)).collect();
    let measured: Vec<f64> = o
        .figures
        .iter()
        .zip(&o.measured_m)
        .map(|(g, m)| m / g.rate_m3_s)
        .collect();
    let fitted_points: Vec<f64> = o.figures.iter().map(|g| g.drawdown_per_rate).collect();
    let pct = 100.0 * f.confidence;

    let mut c = Chart::new(
        "steptest",
        "Specific drawdown s/Q against rate Q",
        "Rate Q [L/s]",
        "s/Q [s/m²]",
    );
    c.x_factor = 1e3;
    c.series.push(Series {
        label: "fitted s/Q = B + C Q".to_owned(),
        x: &x,
        y: &line,
        style: FITTED,
    });
    c.series.push(Series {
        label: format!("{pct:.0} % confidence band of the line"),
        x: &x,
        y: &upper,
        style: BAND,
    });
    c.series.push(Series {
        label: String::new(),
        x: &x,
        y: &lower,
        style: BAND,
    });
    if o.series.is_some() {
        c.series.push(Series {
            label: "steps, measured at the end of each step".to_owned(),
            x: &q,
            y: &measured,
            style: READINGS,
        });
        c.series.push(Series {
            label: "steps, corrected to the common time (fitted)".to_owned(),
            x: &q,
            y: &fitted_points,
            style: CORRECTED,
        });
    } else {
        c.series.push(Series {
            label: "steps (fitted)".to_owned(),
            x: &q,
            y: &measured,
            style: READINGS,
        });
    }
    render(&c)
}

fn estimate_row(h: &mut String, name: &str, e: &Estimate, unit: &str) {
    let _ = writeln!(
        h,
        "<tr><th>{name}</th><td>{}</td><td>{} to {}</td><td>{}</td><td>{}</td></tr>",
        sig(e.value),
        sig(e.lower),
        sig(e.upper),
        sig(e.std_error),
        esc(unit)
    );
}

/// The whole page. `source` is the input file's name, shown in the title.
pub fn page(o: &Outcome, source: &str) -> String {
    let f = &o.fit;
    let pct = 100.0 * f.confidence;
    let mut h = String::new();
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <title>Step-drawdown analysis: {src}</title>\n<style>\n{STYLE}</style>\n</head>\n<body>\n\
         <h1>Step-drawdown analysis</h1>\n<p class=\"lead\">File <code>{src}</code>, method: {}.</p>\n",
        match &o.series {
            Some(hb) => format!(
                "Hantush–Bierschenk, each step's drawdown corrected to {} min of pumping",
                sig(hb.reference_time_s / 60.0)
            ),
            None => "Jacob, the drawdown at the end of each step".to_owned(),
        },
        src = esc(source)
    );
    let _ = write!(
        h,
        "<section class=\"caution\">\n<h2>Cautions</h2>\n<p>A step test describes the well at \
         the rates tested; do not extrapolate far beyond the largest step. Rates and levels \
         must respect the pump, screen and casing ratings and the local well construction \
         code; a licensed driller or engineer decides what is done with the well.</p>\n</section>\n"
    );
    let _ = write!(
        h,
        "<h2>Well-loss coefficients</h2>\n<p>s = B Q + C Q², fitted as s/Q = B + C Q; weights: \
         {}; {} steps, {} degrees of freedom, Student t = {}.</p>\n<table><thead><tr><th></th>\
         <th>value</th><th>{pct:.0} % interval</th><th>standard error</th><th>unit</th></tr>\
         </thead><tbody>\n",
        match f.weighting {
            boreflux_solver::steptest::Weighting::Equal => "equal",
            boreflux_solver::steptest::Weighting::Drawdown => "drawdown (Q²)",
        },
        o.figures.len(),
        f.dof,
        sig(f.t_quantile)
    );
    estimate_row(&mut h, "B", &f.b, "s/m²");
    estimate_row(&mut h, "C", &f.c, "s²/m⁵");
    if let Some(hb) = &o.series {
        let sf = &hb.series;
        estimate_row(&mut h, "b (series fit)", &sf.b, "s/m² per log10 cycle");
        estimate_row(&mut h, "B(Δt) (series fit)", &hb.b_series, "s/m²");
        estimate_row(&mut h, "C (series fit)", &sf.c, "s²/m⁵");
        let _ = writeln!(
            h,
            "<tr><th>T = ln 10 / (4π b)</th><td>{}</td><td colspan=\"2\">Cooper–Jacob: \
             confined, no boundaries, late time</td><td>m²/s</td></tr>",
            sig(sf.transmissivity_m2_s)
        );
    }
    match &o.power {
        None => {}
        Some(Err(e)) => {
            let _ = writeln!(
                h,
                "<tr><th>power law s = B Q + C Qⁿ</th><td colspan=\"4\">not fitted: {}</td></tr>",
                esc(&e.to_string())
            );
        }
        Some(Ok(p)) => {
            estimate_row(&mut h, "n (power law, linearised)", &p.n, "-");
            estimate_row(&mut h, "B (power law)", &p.b, "s/m²");
            estimate_row(&mut h, "C (power law)", &p.c, "s^n/m^(3n−1)");
        }
    }
    h.push_str("</tbody></table>\n");
    let _ = writeln!(
        h,
        "<p>{}</p>\n<p>{}</p>",
        esc(INTERVAL_NOTE),
        esc(EFFICIENCY_DEFINITION)
    );
    let _ = write!(
        h,
        "<figure><figcaption>Points: s/Q of each step; line: the fitted s/Q = B + C Q; dashed: \
         its pointwise {pct:.0} % confidence band.</figcaption>\n{}\n</figure>\n",
        chart(o)
    );
    h.push_str(
        "<h2>Steps</h2>\n<table><thead><tr><th>step</th><th>Q [L/s]</th><th>s measured [m]</th>",
    );
    if o.series.is_some() {
        h.push_str("<th>s corrected [m]</th>");
    }
    let _ = writeln!(
        h,
        "<th>s/Q [s/m²]</th><th>Q/s [L/s/m]</th><th>B Q [m]</th><th>C Q² [m]</th>\
         <th>linear share</th><th>non-linear share</th><th>E ± {pct:.0} %</th></tr></thead><tbody>"
    );
    for (i, (g, m)) in o.figures.iter().zip(&o.measured_m).enumerate() {
        let _ = write!(
            h,
            "<tr><td>{}</td><td>{}</td><td>{}</td>",
            i + 1,
            sig(g.rate_m3_s * 1e3),
            sig(*m)
        );
        if o.series.is_some() {
            let _ = write!(h, "<td>{}</td>", sig(g.drawdown_m));
        }
        let _ = writeln!(
            h,
            "<td>{}</td><td>{}</td><td>{}</td><td>{}</td><td>{:.1} %</td><td>{:.1} %</td>\
             <td>{:.1} ± {:.1} %</td></tr>",
            sig(g.drawdown_per_rate),
            sig(g.specific_capacity * 1e3),
            sig(g.linear_loss_m),
            sig(g.nonlinear_loss_m),
            100.0 * g.efficiency,
            100.0 * (1.0 - g.efficiency),
            100.0 * g.efficiency,
            100.0 * f.t_quantile * g.efficiency_std_error
        );
    }
    h.push_str("</tbody></table>\n</body>\n</html>\n");
    h
}

/// The section that shows the model's virtual step test beside the field fit
/// (`steptest --case`), from its printed text.
pub fn model_section(text: &str) -> String {
    format!(
        "<h2>Model of the same well</h2>\n<pre>{}</pre>\n",
        esc(text)
    )
}
