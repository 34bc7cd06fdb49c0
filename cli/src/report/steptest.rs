//! The HTML page of a step-drawdown analysis: cautions, the warnings of the analysis, B and
//! C with their intervals, the per-step table and an SVG plot of s/Q against Q with the fitted line and its pointwise
//! confidence band, filled into templates/steptest.html.

use askama::Template;

use super::page::{render as render_page, svg, Svg};
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

/// The step-test page (templates/steptest.html).
#[derive(Template)]
#[template(path = "steptest.html")]
struct StepTestPage<'a> {
    head_title: String,
    version: &'static str,
    full_head: bool,
    source: &'a str,
    /// Minutes of pumping the drawdowns are corrected to (Hantush–Bierschenk); `None`
    /// for Jacob's method.
    corrected_to: Option<String>,
    weights: &'static str,
    steps: usize,
    dof: String,
    t_quantile: String,
    /// The confidence level in per cent.
    confidence: String,
    estimates: Vec<EstimateRow>,
    transmissivity: Option<String>,
    power_error: Option<String>,
    power: Vec<EstimateRow>,
    interval_note: &'static str,
    efficiency_definition: &'static str,
    chart: Svg,
    rows: Vec<StepRow>,
    /// The outcome's warnings, as printed.
    warnings: Vec<String>,
}

/// One estimate of the well-loss table.
struct EstimateRow {
    name: &'static str,
    value: String,
    lower: String,
    upper: String,
    std_error: String,
    unit: &'static str,
}

impl EstimateRow {
    fn new(name: &'static str, e: &Estimate, unit: &'static str) -> Self {
        EstimateRow {
            name,
            value: sig(e.value),
            lower: sig(e.lower),
            upper: sig(e.upper),
            std_error: sig(e.std_error),
            unit,
        }
    }
}

/// One step of the per-step table.
struct StepRow {
    number: usize,
    rate: String,
    measured: String,
    corrected: Option<String>,
    per_rate: String,
    capacity: String,
    linear: String,
    nonlinear: String,
    linear_share: String,
    nonlinear_share: String,
    efficiency_error: String,
}

/// The whole page. `source` is the input file's name, shown in the title.
pub fn page(o: &Outcome, source: &str) -> String {
    let f = &o.fit;
    let mut estimates = vec![
        EstimateRow::new("B", &f.b, "s/m²"),
        EstimateRow::new("C", &f.c, "s²/m⁵"),
    ];
    if let Some(hb) = &o.series {
        let sf = &hb.series;
        estimates.push(EstimateRow::new(
            "b (series fit)",
            &sf.b,
            "s/m² per log10 cycle",
        ));
        estimates.push(EstimateRow::new("B(Δt) (series fit)", &hb.b_series, "s/m²"));
        estimates.push(EstimateRow::new("C (series fit)", &sf.c, "s²/m⁵"));
    }
    let (power_error, power) = match &o.power {
        None => (None, Vec::new()),
        Some(Err(e)) => (Some(e.to_string()), Vec::new()),
        Some(Ok(p)) => (
            None,
            vec![
                EstimateRow::new("n (power law, linearised)", &p.n, "-"),
                EstimateRow::new("B (power law)", &p.b, "s/m²"),
                EstimateRow::new("C (power law)", &p.c, "s^n/m^(3n−1)"),
            ],
        ),
    };
    let rows = o
        .figures
        .iter()
        .zip(&o.measured_m)
        .enumerate()
        .map(|(i, (g, m))| StepRow {
            number: i + 1,
            rate: sig(g.rate_m3_s * 1e3),
            measured: sig(*m),
            corrected: o.series.as_ref().map(|_| sig(g.drawdown_m)),
            per_rate: sig(g.drawdown_per_rate),
            capacity: sig(g.specific_capacity * 1e3),
            linear: sig(g.linear_loss_m),
            nonlinear: sig(g.nonlinear_loss_m),
            linear_share: format!("{:.1}", 100.0 * g.efficiency),
            nonlinear_share: format!("{:.1}", 100.0 * (1.0 - g.efficiency)),
            efficiency_error: format!("{:.1}", 100.0 * f.t_quantile * g.efficiency_std_error),
        })
        .collect();
    render_page(&StepTestPage {
        head_title: format!("Step-drawdown analysis: {source}"),
        version: env!("CARGO_PKG_VERSION"),
        full_head: false,
        source,
        corrected_to: o.series.as_ref().map(|hb| sig(hb.reference_time_s / 60.0)),
        weights: match f.weighting {
            boreflux_solver::steptest::Weighting::Equal => "equal",
            boreflux_solver::steptest::Weighting::Drawdown => "drawdown (Q²)",
        },
        steps: o.figures.len(),
        dof: f.dof.to_string(),
        t_quantile: sig(f.t_quantile),
        confidence: format!("{:.0}", 100.0 * f.confidence),
        estimates,
        transmissivity: o
            .series
            .as_ref()
            .map(|hb| sig(hb.series.transmissivity_m2_s)),
        power_error,
        power,
        interval_note: INTERVAL_NOTE,
        efficiency_definition: EFFICIENCY_DEFINITION,
        chart: svg(chart(o)),
        rows,
        warnings: o.warnings.iter().map(|w| w.message.clone()).collect(),
    })
}

/// The model's virtual step test beside the field fit (`steptest --case`), from its
/// printed text (templates/steptest-model.html).
#[derive(Template)]
#[template(path = "steptest-model.html")]
struct ModelSection<'a> {
    text: &'a str,
}

/// The section that shows the model's virtual step test beside the field fit
/// (`steptest --case`), from its printed text.
pub fn model_section(text: &str) -> String {
    render_page(&ModelSection { text })
}
