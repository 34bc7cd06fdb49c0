//! The report of a sweep table (`boreflux sweep`): what was varied, the cautions, one chart
//! per key figure against the first varied value (one line per combination of the
//! others), and the table of every scenario, filled into templates/sweep.html (pieces
//! shared with the comparison page in templates/partials/sweep.html). Everything is read
//! from the table file.

use std::collections::BTreeMap;

use askama::Template;
use boreflux_solver::safety::CAUTION;

use super::figures::{quantity_chart, run_style};
use super::format::{shown_for, sig, Shown};
use super::page::{render as render_page, svg, Figure as PageFigure};
use super::svg::{render, Series};
use super::ticks::Scale;
use crate::output::schema::Figure;
use crate::sweep::table::Table;
use boreflux_solver::grid::Zone;

/// The figures charted and tabled, with their chart titles and table headings: what a
/// development plan is judged by.
const KEY: [(Figure, &str, &str); 15] = [
    (
        Figure::PeakOutwardFlux,
        "Peak outward Darcy flux at the wall",
        "Flux out",
    ),
    (
        Figure::PeakInwardFlux,
        "Peak inward Darcy flux at the wall",
        "Flux in",
    ),
    (Figure::PeakShear, "Peak shear proxy at the wall", "Shear"),
    (
        Figure::CakeThicknessEnd,
        "Cake thickness at the end",
        "Cake end",
    ),
    (Figure::SkinEnd, "Skin at the end", "Skin end"),
    (
        Figure::EfficiencyEnd,
        "Well efficiency at the end (virtual test)",
        "Efficiency end",
    ),
    (
        Figure::SpecificCapacityEnd,
        "Specific capacity at the end (virtual test)",
        "Spec. capacity end",
    ),
    (
        Figure::StepCEnd,
        "Step-test C at the end (virtual test)",
        "C end",
    ),
    (
        Figure::Work(Zone::Cake),
        "Work dissipated in the cake",
        "Cake work",
    ),
    (
        Figure::PeakSlotVelocity,
        "Peak slot velocity",
        "Slot velocity",
    ),
    (
        Figure::PeakCollapsePressure,
        "Peak collapse load on screen or casing",
        "Collapse load",
    ),
    (
        Figure::CollapseMargin,
        "Collapse margin, rating / (safety factor × load), the lower of screen and casing",
        "Collapse margin",
    ),
    (
        Figure::PipingRatio,
        "Wall gradient over the critical gradient",
        "Gradient ratio",
    ),
    (
        Figure::PeakGrainReynolds,
        "Peak grain Reynolds number (pack d50)",
        "Reynolds",
    ),
    (
        Figure::ColumnPartings,
        "Column partings at the vapour bound",
        "Partings",
    ),
];

/// Whether a key figure's value is a warning in a single-run report too: a collapse margin
/// below 1, a slot velocity above the rule of thumb, a grain Reynolds number above 1, a
/// parted column. The gradient ratio is a figure, not a warning (docs/physics.md §9e).
fn flagged(figure: Figure, v: f64) -> bool {
    match figure {
        Figure::CollapseMargin => v < 1.0,
        Figure::PeakSlotVelocity => v > boreflux_solver::safety::ENTRANCE_VELOCITY_RULE_M_S,
        Figure::PeakGrainReynolds => v > 1.0,
        Figure::ColumnPartings => v > 0.0,
        _ => false,
    }
}

/// How a figure is shown: in the display unit of its schema unit, with finer units for the
/// cake thickness, the slot velocity and the shear.
fn shown(figure: Figure) -> Shown {
    match figure {
        Figure::CakeThicknessEnd => super::format::SMALL_LENGTH,
        Figure::PeakSlotVelocity => super::format::SLOT_VELOCITY,
        Figure::PeakShear => super::format::SHEAR,
        other => shown_for(other.entry().unit),
    }
}

/// What the sweep pages show of one table.
pub(super) struct TableView {
    /// Scenarios in the table.
    pub scenario_count: usize,
    /// The case file the sweep started from, as named to `sweep`.
    pub case_file: String,
    /// (K/N, scenarios of the whole sweep) for a shard; `None` for a whole sweep.
    pub shard: Option<(String, usize)>,
    /// The failed scenarios, then the scenarios that warned.
    pub warnings: Vec<Warning>,
    /// A grid sweep's varied paths and their values, joined.
    pub varied: Vec<(String, String)>,
    /// Every scenario.
    pub scenarios: Scenarios,
    /// The base case, pretty-printed JSON.
    pub base_case: String,
}

/// A failed scenario (`failed`: its status) or one whose run warned (`lines`).
pub(super) struct Warning {
    pub(super) scenario: usize,
    pub(super) labels: String,
    pub(super) failed: Option<String>,
    pub(super) lines: Vec<String>,
}

/// The table of every scenario.
pub(super) struct Scenarios {
    pub(super) heading: String,
    pub(super) paths: Vec<String>,
    /// Key figure headings with their unit.
    pub(super) columns: Vec<String>,
    pub(super) rows: Vec<ScenarioRow>,
}

/// One scenario: its number, its values, the key figures (flagged where a single-run
/// report warns) and its status.
pub(super) struct ScenarioRow {
    pub(super) scenario: usize,
    pub(super) labels: Vec<String>,
    pub(super) values: Vec<(String, bool)>,
    pub(super) status: String,
    pub(super) failed: bool,
}

/// The charts of the sweep pages.
pub(super) enum Charts {
    /// No varied path.
    None,
    /// The first varied value is not a number in every scenario (or there is only one).
    NotNumbers,
    /// One figure per key figure.
    Figures {
        x_path: String,
        per_line: PerLine,
        figures: Vec<PageFigure>,
    },
}

/// What the lines of a chart stand for.
pub(super) enum PerLine {
    /// One line: the table.
    One,
    /// One per table and combination of its other varied values.
    Table,
    /// One per value of these other varied paths (joined).
    Value(String),
}

/// A sampled sweep: how it was drawn and its uncertainty section.
pub(super) struct Sampled {
    pub(super) samples: String,
    pub(super) design: &'static str,
    pub(super) seed: String,
    /// (path, distribution) of each sampled input.
    pub(super) inputs: Vec<(String, String)>,
    pub(super) uncertainty: super::uncertainty::Uncertainty,
}

/// The page of one sweep table (templates/sweep.html).
#[derive(Template)]
#[template(path = "sweep.html")]
struct SweepPage<'a> {
    head_title: String,
    heading: &'a str,
    version: &'static str,
    full_head: bool,
    caution: &'static str,
    table: TableView,
    sampled: Option<Sampled>,
    charts: Charts,
}

/// What the sweep pages show of table `t`, its scenarios under `heading`.
pub(super) fn table_view(t: &Table, heading: &str) -> TableView {
    let mut warnings: Vec<Warning> = t
        .rows
        .iter()
        .filter(|r| r.status != "ok")
        .map(|r| Warning {
            scenario: r.scenario,
            labels: r.labels.join(", "),
            failed: Some(r.status.clone()),
            lines: Vec::new(),
        })
        .collect();
    warnings.extend(
        t.rows
            .iter()
            .filter(|r| !r.warnings.is_empty())
            .map(|r| Warning {
                scenario: r.scenario,
                labels: r.labels.join(", "),
                failed: None,
                lines: r.warnings.lines().map(str::to_owned).collect(),
            }),
    );
    TableView {
        scenario_count: t.rows.len(),
        case_file: t.case_file.clone(),
        shard: (t.shard != "1/1" && t.shard != "merged").then(|| (t.shard.clone(), t.total)),
        warnings,
        varied: varied(t),
        scenarios: scenarios(t, heading),
        base_case: serde_json::from_str::<serde_json::Value>(&t.base_case_json)
            .and_then(|v| serde_json::to_string_pretty(&v))
            .unwrap_or_else(|_| t.base_case_json.clone()),
    }
}

/// A grid sweep's varied paths and their values.
fn varied(t: &Table) -> Vec<(String, String)> {
    let vary: serde_json::Value = serde_json::from_str(&t.vary_json).unwrap_or_default();
    vary.as_array()
        .into_iter()
        .flatten()
        .map(|v| {
            let values: Vec<String> = v["values"]
                .as_array()
                .into_iter()
                .flatten()
                .map(crate::sweep::spec::label)
                .collect();
            (
                v["path"].as_str().unwrap_or("").to_owned(),
                values.join(", "),
            )
        })
        .collect()
}

/// The whole page for one sweep table, under `title` when given (else "Sweep report:"
/// and the case file in the browser's title, and the default heading).
pub fn page(t: &Table, title: Option<&str>) -> String {
    let head_title = title.map_or_else(|| format!("Sweep report: {}", t.case_file), str::to_owned);
    let sampled = t.sampling_json.as_deref().map(|s| {
        let vary: serde_json::Value = serde_json::from_str(&t.vary_json).unwrap_or_default();
        let s: serde_json::Value = serde_json::from_str(s).unwrap_or_default();
        Sampled {
            samples: crate::sweep::spec::label(&s["samples"]),
            design: match s["design"].as_str() {
                Some("lhs") => "Latin hypercube",
                Some("random") => "independent random draws",
                _ => "unknown design",
            },
            seed: crate::sweep::spec::label(&s["seed"]),
            inputs: vary
                .as_array()
                .into_iter()
                .flatten()
                .map(|v| {
                    (
                        v["path"].as_str().unwrap_or("").to_owned(),
                        v["distribution"].as_str().unwrap_or("").to_owned(),
                    )
                })
                .collect(),
            uncertainty: super::uncertainty::section(t),
        }
    });
    let charts = if sampled.is_some() {
        Charts::None
    } else {
        charts(&[(None, t)])
    };
    render_page(&SweepPage {
        head_title,
        heading: title.unwrap_or("Well development sweep report"),
        version: env!("CARGO_PKG_VERSION"),
        full_head: true,
        caution: CAUTION,
        table: table_view(t, "Scenarios"),
        sampled,
        charts,
    })
}

/// One line of a chart: the rows of one table that share the other varied values, in
/// order of the first, and the legend text.
struct Line<'a> {
    table: &'a Table,
    rows: Vec<usize>,
    label: String,
}

/// One chart per key figure against the first varied value (in SI), one line per table
/// (named by its legend name when there are several; `None` for a single table) and per
/// combination of its other varied values. Left out when that value is not a number.
pub(super) fn charts(tables: &[(Option<String>, &Table)]) -> Charts {
    let Some(x_path) = tables.first().and_then(|(_, t)| t.paths.first()) else {
        return Charts::None;
    };
    let all_rows = || tables.iter().flat_map(|(_, t)| t.rows.iter());
    if all_rows().any(|r| !r.si[0].is_finite()) || all_rows().count() < 2 {
        return Charts::NotNumbers;
    }
    // Lines: per table, rows grouped by the other varied values, in order of the first.
    let mut lines: Vec<Line> = Vec::new();
    for (name, t) in tables {
        let mut groups: BTreeMap<Vec<String>, Vec<usize>> = BTreeMap::new();
        for (k, r) in t.rows.iter().enumerate() {
            groups.entry(r.labels[1..].to_vec()).or_default().push(k);
        }
        for (key, mut rows) in groups {
            rows.sort_by(|&a, &b| t.rows[a].si[0].total_cmp(&t.rows[b].si[0]));
            let others = t.paths[1..]
                .iter()
                .zip(&key)
                .map(|(p, v)| format!("{p} = {v}"))
                .collect::<Vec<_>>()
                .join(", ");
            let label = match name {
                None => others,
                Some(n) if others.is_empty() => n.clone(),
                Some(n) => format!("{n}, {others}"),
            };
            lines.push(Line {
                table: t,
                rows,
                label,
            });
        }
    }
    let xs: Vec<Vec<f64>> = lines
        .iter()
        .map(|l| l.rows.iter().map(|&k| l.table.rows[k].si[0]).collect())
        .collect();
    let positive = all_rows().all(|r| r.si[0] > 0.0);
    let (lo, hi) = all_rows().fold((f64::INFINITY, 0.0f64), |(a, b), r| {
        (a.min(r.si[0]), b.max(r.si[0]))
    });
    let x_scale = if positive && hi / lo >= 20.0 {
        Scale::Log
    } else {
        Scale::Linear
    };
    let per_line = if tables.len() > 1 {
        PerLine::Table
    } else if lines.len() > 1 {
        PerLine::Value(tables[0].1.paths[1..].join(", "))
    } else {
        PerLine::One
    };
    let mut figures = Vec::new();
    for (n, (figure, title, _)) in KEY.iter().enumerate() {
        let name = figure.name();
        let ys: Vec<Vec<f64>> = lines
            .iter()
            .map(|l| match l.table.figures.iter().position(|f| *f == name) {
                Some(col) => l
                    .rows
                    .iter()
                    .map(|&k| l.table.rows[k].figures[col])
                    .collect(),
                None => vec![f64::NAN; l.rows.len()],
            })
            .collect();
        if !tables.iter().any(|(_, t)| t.figures.contains(&name))
            || ys.iter().flatten().all(|y| !y.is_finite())
        {
            continue;
        }
        let s = shown(*figure);
        let mut c = quantity_chart(&format!("sweep{n}"), title, x_path, title, s);
        c.x_scale = x_scale;
        for (i, (line, (x, y))) in lines.iter().zip(xs.iter().zip(&ys)).enumerate() {
            c.series.push(Series {
                label: line.label.clone(),
                x,
                y,
                style: run_style(i),
            });
        }
        figures.push(PageFigure {
            number: n + 1,
            title: (*title).to_owned(),
            caption: None,
            svgs: vec![svg(render(&c))],
        });
    }
    Charts::Figures {
        x_path: x_path.clone(),
        per_line,
        figures,
    }
}

/// The table of every scenario under the heading `heading`: its values, the key figures
/// and its status.
fn scenarios(t: &Table, heading: &str) -> Scenarios {
    let cols: Vec<(usize, Figure, &str, Shown)> = KEY
        .iter()
        .filter_map(|(figure, _, heading)| {
            let name = figure.name();
            t.figures
                .iter()
                .position(|f| *f == name)
                .map(|i| (i, *figure, *heading, shown(*figure)))
        })
        .collect();
    let columns = cols
        .iter()
        .map(|(_, _, title, s)| {
            if s.si.label.is_empty() {
                (*title).to_owned()
            } else {
                format!("{title} [{}]", s.si.label)
            }
        })
        .collect();
    let rows = t
        .rows
        .iter()
        .map(|r| {
            let warnings = r.warnings.lines().count();
            ScenarioRow {
                scenario: r.scenario,
                labels: r.labels.clone(),
                values: cols
                    .iter()
                    .map(|(i, figure, _, s)| {
                        let v = r.figures[*i];
                        (sig(v * s.si.per_si), flagged(*figure, v))
                    })
                    .collect(),
                status: match (r.status.as_str(), warnings) {
                    ("ok", 0) => "ok".to_owned(),
                    ("ok", w) => format!("ok, {w} warning{}", if w == 1 { "" } else { "s" }),
                    (s, _) => s.to_owned(),
                },
                failed: r.status != "ok",
            }
        })
        .collect();
    Scenarios {
        heading: heading.to_owned(),
        paths: t.paths.clone(),
        columns,
        rows,
    }
}
