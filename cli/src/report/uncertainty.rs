//! The uncertainty section of a sampled sweep's report (`boreflux sweep --sample`):
//! P10/P50/P90 bands of the key series across the scenarios, the distribution of the
//! headline figures (percentiles and empirical CDFs), and the probability that the
//! collapse margin is below 1 with its 95 % Wilson interval. Percentiles are numpy's
//! default (linear, Hyndman & Fan definition 7), [`crate::sweep::stats`]. Shown by
//! templates/partials/uncertainty.html.

use super::figures::quantity_chart;
use super::format::{shown_for, sig, Shown};
use super::page::{svg, Svg};
use super::svg::{render, Mark, Series, Style};
use crate::output::schema::{Figure, SweepSeries};
use crate::sweep::stats::{percentile, sorted_finite, wilson};
use crate::sweep::table::Table;

/// The headline figures whose distribution is shown, with their headings.
const HEADLINE: [(Figure, &str); 8] = [
    (
        Figure::CyclesTo90pctCake,
        "Cycles until 90 % of the cake was gone",
    ),
    (
        Figure::TimeTo90pctCake,
        "Time until 90 % of the cake was gone",
    ),
    (Figure::SpecificCapacityEnd, "Specific capacity at the end"),
    (Figure::EfficiencyEnd, "Well efficiency at the end"),
    (Figure::SkinEnd, "Skin at the end"),
    (Figure::PeakCollapsePressure, "Peak collapse load"),
    (Figure::CollapseRating, "Collapse rating of the casing"),
    (
        Figure::CollapseMargin,
        "Collapse margin (lower of screen and casing)",
    ),
];

/// The key series drawn as bands.
const BANDS: [(SweepSeries, &str); 4] = [
    (SweepSeries::Skin, "Skin"),
    (
        SweepSeries::SpecificCapacity,
        "Specific capacity (virtual test)",
    ),
    (SweepSeries::Efficiency, "Well efficiency (virtual test)"),
    (
        SweepSeries::PeakOutwardFlux,
        "Peak outward flux at the wall, per interval",
    ),
];

const P50: Style = Style {
    color: "#1f5fa8",
    dash: "",
    width: 2.0,
};
const P10_90: Style = Style {
    color: "#1f5fa8",
    dash: "5 3",
    width: 1.2,
};

/// A figure's column, if the table has it.
fn column(t: &Table, f: Figure) -> Option<Vec<f64>> {
    let name = f.name();
    let k = t.figures.iter().position(|c| *c == name)?;
    Some(t.rows.iter().map(|r| r.figures[k]).collect())
}

/// A sampled sweep's uncertainty section.
pub(super) struct Uncertainty {
    /// Scenarios that ran to the end.
    pub(super) ok: usize,
    /// Scenarios in the table.
    pub(super) count: usize,
    /// The share of scenarios with a collapse margin below 1; `None` when none has a margin.
    pub(super) collapse: Option<CollapseShare>,
    /// Percentiles of the headline figures.
    pub(super) headline: Vec<HeadlineRow>,
    /// Empirical distributions.
    pub(super) distributions: Vec<Distribution>,
    /// Whether the table holds key series (tables of earlier versions do not).
    pub(super) has_series: bool,
    /// P10/P50/P90 bands: title and chart.
    pub(super) bands: Vec<(&'static str, Svg)>,
}

/// How many scenarios have a collapse margin below 1, with the Wilson interval.
pub(super) struct CollapseShare {
    pub(super) below: usize,
    pub(super) count: usize,
    pub(super) share: String,
    pub(super) low: String,
    pub(super) high: String,
}

/// Percentiles of one headline figure: min, P10, P50, P90, max.
pub(super) struct HeadlineRow {
    pub(super) title: &'static str,
    pub(super) unit: &'static str,
    pub(super) with_it: usize,
    pub(super) values: [String; 5],
}

/// The empirical distribution of one figure.
pub(super) struct Distribution {
    pub(super) title: &'static str,
    pub(super) svg: Svg,
    /// Scenarios drawn.
    pub(super) shown: usize,
    /// Scenarios without the figure.
    pub(super) left_out: usize,
}

/// The whole section.
pub(super) fn section(t: &Table) -> Uncertainty {
    let (has_series, bands) = bands(t);
    Uncertainty {
        ok: t.rows.iter().filter(|r| r.status == "ok").count(),
        count: t.rows.len(),
        collapse: collapse(t),
        headline: headline_table(t),
        distributions: cdfs(t),
        has_series,
        bands,
    }
}

/// The probability that the collapse margin is below 1, with its Wilson interval.
fn collapse(t: &Table) -> Option<CollapseShare> {
    let margins: Vec<f64> = column(t, Figure::CollapseMargin)
        .unwrap_or_default()
        .into_iter()
        .filter(|x| x.is_finite())
        .collect();
    if margins.is_empty() {
        return None;
    }
    let n = margins.len();
    let k = margins.iter().filter(|&&m| m < 1.0).count();
    let (lo, hi) = wilson(k, n, 0.95).unwrap_or((f64::NAN, f64::NAN));
    Some(CollapseShare {
        below: k,
        count: n,
        share: pct(k as f64 / n as f64),
        low: pct(lo),
        high: pct(hi),
    })
}

fn pct(p: f64) -> String {
    if p.is_finite() {
        format!("{} %", sig(100.0 * p))
    } else {
        "—".into()
    }
}

/// How a headline figure is shown.
fn shown(f: Figure) -> Shown {
    shown_for(f.entry().unit)
}

/// Percentiles of each headline figure, and how many scenarios have it.
fn headline_table(t: &Table) -> Vec<HeadlineRow> {
    let mut rows = Vec::new();
    for (f, title) in HEADLINE {
        let Some(col) = column(t, f) else { continue };
        let v = sorted_finite(col);
        if v.is_empty() {
            continue;
        }
        let s = shown(f);
        let cell = |x: f64| sig(x * s.si.per_si);
        rows.push(HeadlineRow {
            title,
            unit: s.si.label,
            with_it: v.len(),
            values: [
                cell(v[0]),
                cell(percentile(&v, 10.0)),
                cell(percentile(&v, 50.0)),
                cell(percentile(&v, 90.0)),
                cell(v[v.len() - 1]),
            ],
        });
    }
    rows
}

/// The empirical CDF of `v` (sorted) as a staircase: (x_i, i/n) to (x_i, (i+1)/n).
fn staircase(v: &[f64]) -> (Vec<f64>, Vec<f64>) {
    let n = v.len() as f64;
    let mut x = Vec::with_capacity(2 * v.len());
    let mut y = Vec::with_capacity(2 * v.len());
    for (i, &xi) in v.iter().enumerate() {
        x.extend([xi, xi]);
        y.extend([i as f64 / n, (i + 1) as f64 / n]);
    }
    (x, y)
}

/// Empirical CDFs of time to clean, final specific capacity, collapse load and margin.
fn cdfs(t: &Table) -> Vec<Distribution> {
    let clean =
        if column(t, Figure::CyclesTo90pctCake).is_some_and(|c| c.iter().any(|x| x.is_finite())) {
            Figure::CyclesTo90pctCake
        } else {
            Figure::TimeTo90pctCake
        };
    let charts = [
        clean,
        Figure::SpecificCapacityEnd,
        Figure::PeakCollapsePressure,
        Figure::CollapseMargin,
    ];
    let mut out = Vec::new();
    for f in charts {
        let Some(col) = column(t, f) else { continue };
        let v = sorted_finite(col.iter().copied());
        if v.is_empty() {
            continue;
        }
        let title = HEADLINE
            .iter()
            .find(|(g, _)| *g == f)
            .map_or("", |(_, title)| *title);
        let s = shown(f);
        let (x, y) = staircase(&v);
        let mut c = quantity_chart(&format!("ecdf{}", out.len()), title, "", title, s);
        // The quantity on x, the share of scenarios on y.
        c.x_label = if s.si.label.is_empty() {
            title.to_owned()
        } else {
            format!("{title} [{}]", s.si.label)
        };
        c.y_label = "Share of scenarios at or below".into();
        c.x_factor = s.si.per_si;
        c.y_factor = 1.0;
        c.y2 = None;
        if f == Figure::CollapseMargin {
            c.marks.push(Mark {
                x: 1.0,
                label: "margin 1".into(),
            });
        }
        if f == Figure::PeakCollapsePressure {
            let ratings = sorted_finite(column(t, Figure::CollapseRating).unwrap_or_default());
            if let (Some(&lo), Some(&hi)) = (ratings.first(), ratings.last()) {
                if lo == hi {
                    c.marks.push(Mark {
                        x: lo * s.si.per_si,
                        label: "casing rating".into(),
                    });
                }
            }
        }
        c.series.push(Series {
            label: String::new(),
            x: &x,
            y: &y,
            style: P50,
        });
        out.push(Distribution {
            title,
            svg: svg(render(&c)),
            shown: v.len(),
            left_out: col.len() - v.len(),
        });
    }
    out
}

/// P10/P50/P90 of each key series at every grid point: whether the table has key series,
/// and the charts.
fn bands(t: &Table) -> (bool, Vec<(&'static str, Svg)>) {
    let rows: Vec<_> = t.rows.iter().filter(|r| !r.series.is_empty()).collect();
    if rows.is_empty() {
        return (false, Vec::new());
    }
    let slot = |s: SweepSeries| {
        SweepSeries::PER_SCENARIO
            .iter()
            .position(|&x| x == s)
            .unwrap_or(0)
    };
    let points = rows[0].series[0].len();
    // One time axis when every scenario ran the same time; else the fraction of the run.
    let time = slot(SweepSeries::Time);
    let ends: Vec<f64> = rows.iter().map(|r| r.series[time][points - 1]).collect();
    let same_end = ends.iter().all(|&e| e == ends[0]);
    let x: Vec<f64> = (0..points)
        .map(|k| {
            let f = k as f64 / (points - 1) as f64;
            if same_end {
                f * ends[0]
            } else {
                100.0 * f
            }
        })
        .collect();
    let x_label = if same_end {
        "Time [s]"
    } else {
        "Share of the run [%] (the scenarios' durations differ)"
    };
    let mut out = Vec::new();
    for (n, (s, title)) in BANDS.iter().enumerate() {
        let j = slot(*s);
        let mut p = [
            vec![f64::NAN; points],
            vec![f64::NAN; points],
            vec![f64::NAN; points],
        ];
        for k in 0..points {
            let v = sorted_finite(rows.iter().map(|r| r.series[j][k]));
            if v.is_empty() {
                continue;
            }
            for (q, line) in [10.0, 50.0, 90.0].into_iter().zip(p.iter_mut()) {
                line[k] = percentile(&v, q);
            }
        }
        if p[1].iter().all(|y| !y.is_finite()) {
            continue;
        }
        let shown = shown_for(s.entry().unit);
        let mut c = quantity_chart(&format!("band{n}"), title, x_label, title, shown);
        for (label, y, style) in [
            ("P90", &p[2], P10_90),
            ("P50", &p[1], P50),
            ("P10", &p[0], P10_90),
        ] {
            c.series.push(Series {
                label: label.into(),
                x: &x,
                y,
                style,
            });
        }
        out.push((*title, svg(render(&c))));
    }
    (true, out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_staircase_rises_by_one_over_n_at_each_value() {
        let (x, y) = staircase(&[1.0, 2.0, 4.0]);
        assert_eq!(x, [1.0, 1.0, 2.0, 2.0, 4.0, 4.0]);
        assert_eq!(y, [0.0, 1.0 / 3.0, 1.0 / 3.0, 2.0 / 3.0, 2.0 / 3.0, 1.0]);
    }
}
