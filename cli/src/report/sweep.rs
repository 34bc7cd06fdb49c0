//! The report of a sweep table (`boreflux sweep`): what was varied, the cautions, one chart
//! per key figure against the first varied value (one line per combination of the
//! others), and the table of every scenario, filled into templates/sweep.html (pieces
//! shared with the comparison page in templates/partials/sweep.html). Everything is read
//! from the table file.

use std::collections::{BTreeMap, BTreeSet};

use askama::Template;
use boreflux_solver::safety::CAUTION;

use super::figures::{quantity_chart, run_style};
use super::format::{number_in, shown_for, Shown};
use super::input_units::si_unit_of_path;
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

/// Smallest span of a sweep chart's y axis, as a fraction of the largest magnitude drawn:
/// 5 % (±2.5 % about the middle). Assumption, a display choice: the scenario table shows 3
/// significant digits, which resolve 0.1–1 % of a value, so a spread below the table's last
/// digit (solver round-off between scenarios, e.g. 2.9990 … 3.0000 mm) takes less than a
/// fifth of the axis height instead of all of it, and a real change of a few per cent still
/// fills most of it. A figure whose values all read the same at 3 significant digits also
/// says so in its caption.
const SWEEP_MIN_SPAN: f64 = 0.05;

/// A varied value as the sweep pages show it: a bare number where the case reads it in an
/// SI unit gets that unit (`drive.lift_rate` `0.25` → `0.25 m/s`, from the case schema);
/// a value written with its unit (`2 m`), a pure number (`drive.strokes_per_minute`) or a
/// word is shown as written.
pub(super) fn value_label(path: &str, label: &str) -> String {
    match si_unit_of_path(path) {
        Some(unit) if label.trim().parse::<f64>().is_ok_and(f64::is_finite) => {
            format!("{} {unit}", label.trim())
        }
        _ => label.to_owned(),
    }
}

/// The labels of a row's varied values, each with its unit where given as a bare number.
fn row_labels(paths: &[String], labels: &[String]) -> Vec<String> {
    paths
        .iter()
        .zip(labels)
        .map(|(p, l)| value_label(p, l))
        .collect()
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
            labels: row_labels(&t.paths, &r.labels).join(", "),
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
                labels: row_labels(&t.paths, &r.labels).join(", "),
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
            let path = v["path"].as_str().unwrap_or("");
            let values: Vec<String> = v["values"]
                .as_array()
                .into_iter()
                .flatten()
                .map(|value| value_label(path, &crate::sweep::spec::label(value)))
                .collect();
            (path.to_owned(), values.join(", "))
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
                .map(|(p, v)| format!("{p} = {}", value_label(p, v)))
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
    // The x values are SI numbers: the axis names the SI unit where the path has one.
    let x_label = match si_unit_of_path(x_path) {
        Some(unit) => format!("{x_path} [{unit}]"),
        None => x_path.clone(),
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
        let mut c = quantity_chart(&format!("sweep{n}"), title, &x_label, title, s);
        c.x_scale = x_scale;
        c.y_min_span = SWEEP_MIN_SPAN;
        // Every value the same at the table's precision: say so.
        let finite: Vec<f64> = ys
            .iter()
            .flatten()
            .copied()
            .filter(|y| y.is_finite())
            .collect();
        let read: BTreeSet<String> = finite.iter().map(|&y| number_in(y, &s)).collect();
        let caption = match read.iter().next() {
            Some(v) if read.len() == 1 => {
                let unit = if s.si.label.is_empty() {
                    String::new()
                } else {
                    format!(" {}", s.si.label)
                };
                Some(if finite.iter().all(|&y| y == finite[0]) {
                    format!("No change: every scenario reads {v}{unit}.")
                } else {
                    format!(
                        "No change at 3 significant digits: every scenario reads {v}{unit}; the axis spans at least {} % of the value, so what differences remain are round-off, not a trend.",
                        SWEEP_MIN_SPAN * 100.0
                    )
                })
            }
            _ => None,
        };
        for (i, (line, (x, y))) in lines.iter().zip(xs.iter().zip(&ys)).enumerate() {
            c.series.push(Series {
                label: line.label.clone(),
                x,
                y,
                style: run_style(i),
            });
        }
        // Numbered among the figures shown: a figure left out leaves no gap.
        figures.push(PageFigure {
            number: figures.len() + 1,
            title: (*title).to_owned(),
            caption,
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
                labels: row_labels(&t.paths, &r.labels),
                values: cols
                    .iter()
                    .map(|(i, figure, _, s)| {
                        let v = r.figures[*i];
                        (number_in(v, s), flagged(*figure, v))
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::sweep::table::Row;

    /// Numbers of the y-axis tick labels of a chart (SVG), in display units.
    fn y_ticks(svg: &str) -> Vec<f64> {
        svg.split(r#"text-anchor="end">"#)
            .skip(1)
            .filter_map(|s| s.split('<').next()?.replace('−', "-").parse().ok())
            .collect()
    }

    /// A grid sweep of `drive.lift_rate` (bare numbers) over three scenarios: the cake
    /// thickness differs only in the fifth digit (round-off), the partings are counts and
    /// the collapse margin was not computed (no rating). Invented test data.
    fn table() -> Table {
        let row = |k: usize, v: f64, cake_m: f64, partings: f64| Row {
            scenario: k,
            labels: vec![crate::sweep::spec::label(&serde_json::json!(v))],
            si: vec![v],
            status: "ok".to_owned(),
            figures: vec![cake_m, partings, f64::NAN],
            warnings: String::new(),
            series: Vec::new(),
        };
        Table {
            case_file: "swab.json".to_owned(),
            base_case_json: "{}".to_owned(),
            vary_json: r#"[{"path":"drive.lift_rate","values":[0.25,0.5,1]}]"#.to_owned(),
            sampling_json: None,
            total: 3,
            shard: "1/1".to_owned(),
            paths: vec!["drive.lift_rate".to_owned()],
            figures: ["cake_thickness_end_m", "column_partings", "collapse_margin"]
                .map(str::to_owned)
                .to_vec(),
            rows: vec![
                row(0, 0.25, 2.9990e-3, 12.0),
                row(1, 0.5, 2.9995e-3, 0.0),
                row(2, 1.0, 3.0000e-3, 3.0),
            ],
        }
    }

    #[test]
    fn bare_values_get_the_unit_the_case_reads_them_in() {
        assert_eq!(value_label("drive.lift_rate", "0.25"), "0.25 m/s");
        assert_eq!(value_label("drive.stroke", "2 m"), "2 m");
        assert_eq!(value_label("drive.strokes_per_minute", "10"), "10");
        assert_eq!(value_label("drive.kind", "swab"), "swab");
        let t = table();
        assert_eq!(
            varied(&t),
            [(
                "drive.lift_rate".to_owned(),
                "0.25 m/s, 0.5 m/s, 1 m/s".to_owned()
            )]
        );
        let s = scenarios(&t, "Scenarios");
        assert_eq!(s.rows[0].labels, ["0.25 m/s"]);
    }

    #[test]
    fn counts_are_whole_in_the_scenario_table() {
        let s = scenarios(&table(), "Scenarios");
        let partings = s
            .columns
            .iter()
            .position(|c| c == "Partings")
            .expect("a partings column");
        let shown: Vec<&str> = s
            .rows
            .iter()
            .map(|r| r.values[partings].0.as_str())
            .collect();
        assert_eq!(shown, ["12", "0", "3"]);
    }

    #[test]
    fn figures_are_numbered_among_those_shown_and_round_off_is_not_magnified() {
        let t = table();
        let Charts::Figures { figures, .. } = charts(&[(None, &t)]) else {
            panic!("charts expected");
        };
        // Cake thickness and partings; the collapse margin (all NaN) is left out.
        let numbers: Vec<usize> = figures.iter().map(|f| f.number).collect();
        assert_eq!(numbers, [1, 2]);
        let cake = &figures[0];
        assert_eq!(cake.title, "Cake thickness at the end");
        let caption = cake.caption.as_deref().unwrap_or_default();
        assert!(
            caption.starts_with("No change at 3 significant digits: every scenario reads 3.00 mm"),
            "{caption}"
        );
        // The y axis spans at least 5 % of 3 mm, not the 0.001 mm of round-off.
        let ticks = y_ticks(&cake.svgs[0].0);
        let (lo, hi) = ticks
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &y| {
                (a.min(y), b.max(y))
            });
        assert!(hi - lo >= 0.05 * 3.0 - 1e-12, "{ticks:?}");
        // Counts that differ: no caption.
        assert_eq!(figures[1].caption, None);
    }
}
