//! The page of a calibration (`boreflux calibrate -o`): the fitted parameters with their
//! intervals and what the records do not constrain, the correlation matrix, observed and
//! modelled drawdown against time, and the residuals against time and against the
//! modelled drawdown (a trend or a funnel there means the model or the weights are wrong,
//! and the intervals are not to be trusted).

use std::fmt::Write;

use super::escape::esc;
use super::html::STYLE;
use super::svg::{render, Chart, Series, Style, FITTED, READINGS};
use crate::calibrate::fit::Calibration;
use crate::calibrate::record::DevelopmentLog;
use crate::steptest::text::sig;

const START: Style = Style {
    color: "#7f8c8d",
    dash: "4 3",
    width: 1.0,
};
const ZERO: Style = Style {
    color: "#7f8c8d",
    dash: "2 2",
    width: 0.8,
};

fn drawdown_chart(c: &Calibration) -> String {
    let mut ch = Chart::new(
        "cal-drawdown",
        "Drawdown against time: readings, the model with the case's values and fitted",
        "Time [h]",
        "Drawdown [m]",
    );
    ch.x_factor = 1.0 / 3600.0;
    ch.series.push(Series {
        label: "readings".into(),
        x: &c.times_s,
        y: &c.observed_m,
        style: READINGS,
    });
    ch.series.push(Series {
        label: "model, case's values".into(),
        x: &c.times_s,
        y: &c.start_m,
        style: START,
    });
    ch.series.push(Series {
        label: "model, fitted".into(),
        x: &c.times_s,
        y: &c.fitted_m,
        style: FITTED,
    });
    render(&ch)
}

fn residual_charts(c: &Calibration) -> (String, String) {
    let res: Vec<f64> = c
        .observed_m
        .iter()
        .zip(&c.fitted_m)
        .map(|(o, m)| o - m)
        .collect();
    let t_ends = [
        c.times_s.first().copied().unwrap_or(0.0),
        c.times_s.last().copied().unwrap_or(1.0),
    ];
    let zeros = [0.0, 0.0];
    let mut a = Chart::new(
        "cal-res-time",
        "Residual (observed − fitted) against time",
        "Time [h]",
        "Residual [m]",
    );
    a.x_factor = 1.0 / 3600.0;
    a.series.push(Series {
        label: String::new(),
        x: &t_ends,
        y: &zeros,
        style: ZERO,
    });
    a.series.push(Series {
        label: "residual".into(),
        x: &c.times_s,
        y: &res,
        style: READINGS,
    });
    let first = render(&a);
    // Against the modelled drawdown: points sorted by it so no line joins them out of order.
    let mut order: Vec<usize> = (0..res.len()).collect();
    order.sort_by(|&i, &j| c.fitted_m[i].total_cmp(&c.fitted_m[j]));
    let xs: Vec<f64> = order.iter().map(|&i| c.fitted_m[i]).collect();
    let ys: Vec<f64> = order.iter().map(|&i| res[i]).collect();
    let s_ends = [
        xs.first().copied().unwrap_or(0.0),
        xs.last().copied().unwrap_or(1.0),
    ];
    let mut b = Chart::new(
        "cal-res-fitted",
        "Residual against the fitted drawdown",
        "Fitted drawdown [m]",
        "Residual [m]",
    );
    b.series.push(Series {
        label: String::new(),
        x: &s_ends,
        y: &zeros,
        style: ZERO,
    });
    b.series.push(Series {
        label: "residual".into(),
        x: &xs,
        y: &ys,
        style: Style {
            width: 0.0,
            ..READINGS
        },
    });
    (first, render(&b))
}

/// The whole page. `source` is the log file's name.
pub fn page(c: &Calibration, log: &DevelopmentLog, source: &str, confidence: f64) -> String {
    let pct = 100.0 * confidence;
    let mut h = String::new();
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <title>Calibration: {src}</title>\n<style>\n{STYLE}</style>\n</head>\n<body>\n\
         <h1>Calibration to a development log</h1>\n<p class=\"lead\">Log <code>{src}</code>: \
         {} rows over {} h, {} drawdown readings. Fit {} after {} iterations and {} model runs; \
         residual standard deviation {} m with {} degrees of freedom.</p>\n",
        log.rows.len(),
        sig(log.duration_s() / 3600.0),
        c.observed_m.len(),
        if c.termination.converged() {
            "converged"
        } else {
            "<strong>did not converge</strong>"
        },
        c.iterations,
        c.runs,
        sig(c.stats.sigma),
        c.stats.dof,
        src = esc(source)
    );
    h.push_str(
        "<section class=\"caution\">\n<h2>Cautions</h2>\n<p>A calibrated model reproduces the \
         records it was fitted to; it is not proof that it predicts other rates, devices or \
         durations. The intervals are linearised and assume independent reading errors of one \
         spread: look at the residuals below first. Development and pumping plans must respect \
         the pump, screen and casing ratings and the local well construction code; a licensed \
         driller or engineer decides what is done with the well.</p>\n</section>\n",
    );
    let _ = write!(
        h,
        "<h2>Fitted parameters</h2>\n<table><thead><tr><th>case path</th><th>case's value \
         (SI)</th><th>fitted (SI)</th><th>{pct:.0} % interval (SI)</th><th>what the records \
         say</th></tr></thead><tbody>\n"
    );
    for (j, p) in c.params.iter().enumerate() {
        let interval = p.interval.map_or("—".to_owned(), |(a, b)| {
            format!("{} to {}", sig(a), sig(b))
        });
        let mut status = p.status.describe().to_owned();
        if p.on_bound {
            status.push_str("; on a bound: the optimum may lie outside the bounds");
        }
        if p.profile.is_some() {
            status.push_str(&format!(
                "; profile interval {}",
                crate::calibrate::text::profile_text(c, j)
            ));
        }
        let _ = writeln!(
            h,
            "<tr><th><code>{}</code></th><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
            esc(&p.name),
            sig(p.start),
            sig(p.value),
            interval,
            esc(&status)
        );
    }
    h.push_str("</tbody></table>\n");
    if c.params.len() > 1 {
        h.push_str(
            "<h2>Correlation of the estimates</h2>\n<p>In the fit's coordinates (ln x for \
             log-scaled parameters). Values near ±1: the records fix a combination, not each \
             parameter.</p>\n<table><thead><tr><th></th>",
        );
        for p in &c.params {
            let _ = write!(h, "<th><code>{}</code></th>", esc(&p.name));
        }
        h.push_str("</tr></thead><tbody>\n");
        for (p, row) in c.params.iter().zip(&c.stats.correlation) {
            let _ = write!(h, "<tr><th><code>{}</code></th>", esc(&p.name));
            for v in row {
                match v {
                    Some(v) => {
                        let _ = write!(h, "<td>{v:.3}</td>");
                    }
                    None => h.push_str("<td>—</td>"),
                }
            }
            h.push_str("</tr>\n");
        }
        h.push_str("</tbody></table>\n");
    }
    for st in &c.steps {
        let _ = write!(
            h,
            "<h2>Step test {}</h2>\n<p>Drawdown at the end of each step: the field test, and \
             the model's step test at the same rates and step length on the well at the {} of \
             the log.</p>\n<table><thead><tr><th>rate [L/s]</th><th>field [m]</th><th>model, \
             case's values [m]</th><th>model, fitted [m]</th></tr></thead><tbody>\n",
            st.label,
            if st.label == "before" { "start" } else { "end" }
        );
        for k in 0..st.rates_m3_s.len() {
            let _ = writeln!(
                h,
                "<tr><td>{}</td><td>{}</td><td>{}</td><td>{}</td></tr>",
                sig(st.rates_m3_s[k] * 1e3),
                sig(st.observed_m[k]),
                sig(st.start_m[k]),
                sig(st.fitted_m[k])
            );
        }
        h.push_str("</tbody></table>\n");
    }
    let (res_t, res_s) = residual_charts(c);
    let _ = write!(
        h,
        "<h2>Drawdown</h2>\n<figure>{}</figure>\n<h2>Residuals</h2>\n<p>Residuals should \
         scatter evenly about zero; a trend in time or a funnel against the drawdown means \
         the model or the equal weighting does not fit these records.</p>\n\
         <figure>{res_t}</figure>\n<figure>{res_s}</figure>\n</body>\n</html>\n",
        drawdown_chart(c)
    );
    h
}
