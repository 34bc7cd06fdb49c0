//! The page of a calibration (`boreflux calibrate -o`): the fitted parameters with their
//! intervals and what the records do not constrain, the correlation matrix, observed and
//! modelled drawdown against time, and the residuals against time and against the
//! modelled drawdown (a trend or a funnel there means the model or the weights are wrong,
//! and the intervals are not to be trusted). Filled into templates/calibration.html.

use askama::Template;

use super::page::{render as render_page, svg, Svg};
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

/// The calibration page (templates/calibration.html).
#[derive(Template)]
#[template(path = "calibration.html")]
struct CalibrationPage<'a> {
    head_title: String,
    version: &'static str,
    full_head: bool,
    source: &'a str,
    log_rows: usize,
    log_hours: String,
    readings: usize,
    converged: bool,
    /// Why a fit that did not converge is not a calibration ("" when it converged).
    not_converged: String,
    iterations: String,
    runs: String,
    sigma: String,
    dof: String,
    /// The confidence level in per cent.
    confidence: String,
    params: Vec<Param>,
    step_tests: Vec<StepTest>,
    drawdown: Svg,
    residuals_time: Svg,
    residuals_fitted: Svg,
}

/// One free parameter: its path, values, interval, what the records say of it, and its
/// row of the correlation matrix (`None`: not defined).
struct Param {
    name: String,
    /// The unit of start, value and interval ("-" for a pure number).
    unit: String,
    start: String,
    value: String,
    interval: String,
    status: String,
    correlation: Vec<Option<String>>,
}

/// A step test before or after development: field and model drawdowns per rate.
struct StepTest {
    label: String,
    /// "start" or "end" of the log.
    when: &'static str,
    /// Rate [L/s], field, model with the case's values, model fitted [m].
    rows: Vec<[String; 4]>,
}

/// The whole page. `source` is the log file's name.
pub fn page(c: &Calibration, log: &DevelopmentLog, source: &str, confidence: f64) -> String {
    let params = c
        .params
        .iter()
        .enumerate()
        .map(|(j, p)| {
            let mut status = crate::calibrate::text::verdict_text(p);
            if p.profile.is_some() {
                status.push_str(&format!(
                    "; profile interval {}",
                    crate::calibrate::text::profile_text(c, j)
                ));
            }
            Param {
                name: p.name.clone(),
                unit: if p.shown.0.is_empty() {
                    "-".to_owned()
                } else {
                    p.shown.0.clone()
                },
                start: sig(p.display(p.start)),
                value: sig(p.display(p.value)),
                interval: crate::calibrate::text::interval_text(p, " to "),
                status,
                correlation: c
                    .stats
                    .correlation
                    .get(j)
                    .map(|row| row.iter().map(|v| v.map(|v| format!("{v:.3}"))).collect())
                    .unwrap_or_default(),
            }
        })
        .collect();
    let step_tests = c
        .steps
        .iter()
        .map(|st| StepTest {
            label: st.label.to_string(),
            when: if st.label == "before" { "start" } else { "end" },
            rows: (0..st.rates_m3_s.len())
                .map(|k| {
                    [
                        sig(st.rates_m3_s[k] * 1e3),
                        sig(st.observed_m[k]),
                        sig(st.start_m[k]),
                        sig(st.fitted_m[k]),
                    ]
                })
                .collect(),
        })
        .collect();
    let (res_t, res_s) = residual_charts(c);
    render_page(&CalibrationPage {
        head_title: format!("Calibration: {source}"),
        version: env!("CARGO_PKG_VERSION"),
        full_head: false,
        source,
        log_rows: log.rows.len(),
        log_hours: sig(log.duration_s() / 3600.0),
        readings: c.observed_m.len(),
        converged: c.converged(),
        not_converged: if c.converged() {
            String::new()
        } else {
            crate::calibrate::text::not_converged_advice(c)
        },
        iterations: c.iterations.to_string(),
        runs: c.runs.to_string(),
        sigma: sig(c.stats.sigma),
        dof: c.stats.dof.to_string(),
        confidence: format!("{:.0}", 100.0 * confidence),
        params,
        step_tests,
        drawdown: svg(drawdown_chart(c)),
        residuals_time: svg(res_t),
        residuals_fitted: svg(res_s),
    })
}
