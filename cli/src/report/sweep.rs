//! The report of a sweep table (`boreflux sweep`): what was varied, the cautions, one chart
//! per key figure against the first varied value (one line per combination of the
//! others), and the table of every scenario. Everything is read from the table file.

use std::collections::BTreeMap;
use std::fmt::Write;

use boreflux_solver::safety::CAUTION;

use super::escape::esc;
use super::figures::{quantity_chart, run_style};
use super::format::{shown_for, sig, Shown};
use super::html::STYLE;
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
/// below 1, a gradient above the critical one, a slot velocity above the rule of thumb, a
/// grain Reynolds number above 1, a parted column.
fn flagged(figure: Figure, v: f64) -> bool {
    match figure {
        Figure::CollapseMargin => v < 1.0,
        Figure::PipingRatio => v > 1.0,
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

/// The page's head and heading: `head_title` in the browser's title, `heading` as `<h1>`.
pub(super) fn open(h: &mut String, head_title: &str, heading: &str) {
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n\
         <meta name=\"generator\" content=\"boreflux {v}\">\n<title>{t}</title>\n\
         <style>\n{STYLE}</style>\n</head>\n<body>\n<h1>{heading}</h1>\n",
        v = env!("CARGO_PKG_VERSION"),
        t = esc(head_title),
        heading = esc(heading),
    );
}

/// " (shard K/N, of T in the whole sweep)" for a shard, empty for a whole sweep.
pub(super) fn shard_note(t: &Table) -> String {
    if t.shard == "1/1" || t.shard == "merged" {
        String::new()
    } else {
        format!(
            " (shard {}, of {} in the whole sweep)",
            esc(&t.shard),
            t.total
        )
    }
}

/// The cautions box of a sweep page.
pub(super) fn cautions(h: &mut String) {
    let _ = write!(
        h,
        "<section class=\"caution\">\n<h2>Cautions</h2>\n<p>{}</p>\n<p>A sweep explores \
         settings; before taking the hardest of them to a well, compare its collapse load with \
         the manufacturer's rating and start gently.</p>\n</section>\n",
        esc(CAUTION)
    );
}

/// The failed scenarios and the warnings of the table's runs, as list items; `prefix`
/// (empty for a single table) names the table in each item.
pub(super) fn warning_items(h: &mut String, t: &Table, prefix: &str) {
    for r in t.rows.iter().filter(|r| r.status != "ok") {
        let _ = writeln!(
            h,
            "<li>{prefix}Scenario {} ({}) did not run to the end: {}</li>",
            r.scenario,
            esc(&r.labels.join(", ")),
            esc(&r.status)
        );
    }
    for r in t.rows.iter().filter(|r| !r.warnings.is_empty()) {
        let _ = writeln!(
            h,
            "<li>{prefix}Scenario {} ({}):<ul>{}</ul></li>",
            r.scenario,
            esc(&r.labels.join(", ")),
            r.warnings
                .lines()
                .map(|w| format!("<li>{}</li>", esc(w)))
                .collect::<String>()
        );
    }
}

/// Whether any scenario of the table failed or warned.
pub(super) fn has_warnings(t: &Table) -> bool {
    t.rows
        .iter()
        .any(|r| r.status != "ok" || !r.warnings.is_empty())
}

/// The list items of a grid sweep's varied paths and their values.
pub(super) fn varied_items(h: &mut String, t: &Table) {
    let vary: serde_json::Value = serde_json::from_str(&t.vary_json).unwrap_or_default();
    for v in vary.as_array().into_iter().flatten() {
        let values: Vec<String> = v["values"]
            .as_array()
            .into_iter()
            .flatten()
            .map(crate::sweep::spec::label)
            .collect();
        let _ = writeln!(
            h,
            "<li><code>{}</code>: {}</li>",
            esc(v["path"].as_str().unwrap_or("")),
            esc(&values.join(", "))
        );
    }
}

/// The whole page for one sweep table, under `title` when given (else "Sweep report:"
/// and the case file in the browser's title, and the default heading).
pub fn page(t: &Table, title: Option<&str>) -> String {
    let mut h = String::new();
    let head_title = title.map_or_else(|| format!("Sweep report: {}", t.case_file), str::to_owned);
    open(
        &mut h,
        &head_title,
        title.unwrap_or("Well development sweep report"),
    );
    let _ = writeln!(
        h,
        "<p class=\"lead\">{n} scenarios of <code>{case}</code>{shard}; every number and figure \
         below is read from the sweep table. Built by boreflux {v}.</p>",
        v = env!("CARGO_PKG_VERSION"),
        case = esc(&t.case_file),
        n = t.rows.len(),
        shard = shard_note(t),
    );
    cautions(&mut h);
    if has_warnings(t) {
        h.push_str("<section class=\"warnings\">\n<h2>Warnings</h2>\n<ul>\n");
        warning_items(&mut h, t, "");
        h.push_str("</ul>\n</section>\n");
    }
    h.push_str("<h2>What was varied</h2>\n<ul>\n");
    if let Some(s) = &t.sampling_json {
        let vary: serde_json::Value = serde_json::from_str(&t.vary_json).unwrap_or_default();
        let s: serde_json::Value = serde_json::from_str(s).unwrap_or_default();
        let design = match s["design"].as_str() {
            Some("lhs") => "Latin hypercube",
            Some("random") => "independent random draws",
            _ => "unknown design",
        };
        let _ = writeln!(
            h,
            "<li>{} scenarios drawn by {design}, seed {} (the sample is a function of the \
             distributions, the design, the count and the seed):</li>",
            esc(&crate::sweep::spec::label(&s["samples"])),
            esc(&crate::sweep::spec::label(&s["seed"]))
        );
        for v in vary.as_array().into_iter().flatten() {
            let _ = writeln!(
                h,
                "<li><code>{}</code> ~ <code>{}</code></li>",
                esc(v["path"].as_str().unwrap_or("")),
                esc(v["distribution"].as_str().unwrap_or(""))
            );
        }
        h.push_str("</ul>\n");
        super::uncertainty::section(&mut h, t);
        table(&mut h, t, "Scenarios");
        finish(&mut h, t, "Case file the sweep started from");
        h.push_str("</body>\n</html>\n");
        return h;
    }
    varied_items(&mut h, t);
    h.push_str("</ul>\n");
    charts(&mut h, &[(None, t)]);
    table(&mut h, t, "Scenarios");
    finish(&mut h, t, "Case file the sweep started from");
    h.push_str("</body>\n</html>\n");
    h
}

/// The base case of a table under the heading `heading`.
pub(super) fn finish(h: &mut String, t: &Table, heading: &str) {
    let _ = writeln!(
        h,
        "<h2>{}</h2>\n<pre>{}</pre>",
        esc(heading),
        esc(
            &serde_json::from_str::<serde_json::Value>(&t.base_case_json)
                .and_then(|v| serde_json::to_string_pretty(&v))
                .unwrap_or_else(|_| t.base_case_json.clone())
        )
    );
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
pub(super) fn charts(h: &mut String, tables: &[(Option<String>, &Table)]) {
    let Some(x_path) = tables.first().and_then(|(_, t)| t.paths.first()) else {
        return;
    };
    let all_rows = || tables.iter().flat_map(|(_, t)| t.rows.iter());
    if all_rows().any(|r| !r.si[0].is_finite()) || all_rows().count() < 2 {
        h.push_str(
            "<p>No charts: the first varied value is not a number in every scenario \
                    (or there is only one); the table below has the results.</p>\n",
        );
        return;
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
    h.push_str("<h2>Figures</h2>\n");
    let per_line = if tables.len() > 1 {
        "; one line for each table (its letter and file in the legend) and each \
         combination of that table's other varied values"
            .to_owned()
    } else if lines.len() > 1 {
        format!(
            "; one line for each value of {}",
            esc(&tables[0].1.paths[1..].join(", "))
        )
    } else {
        String::new()
    };
    let _ = writeln!(
        h,
        "<p>Each figure against <code>{}</code> (in SI base units when it carries a unit, \
         otherwise as given){per_line}. Failed scenarios are left out.</p>",
        esc(x_path),
    );
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
        let _ = write!(
            h,
            "<figure>\n<h3>Figure {}. {}</h3>\n{}\n</figure>\n",
            n + 1,
            esc(title),
            render(&c)
        );
    }
}

/// The table of every scenario under the heading `heading`: its values, the key figures
/// and its status.
pub(super) fn table(h: &mut String, t: &Table, heading: &str) {
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
    let _ = writeln!(h, "<h2>{}</h2>", esc(heading));
    h.push_str(
        "<p>Peaks are at the borehole wall (flux, shear) and on the screen \
         or casing (collapse load); highlighted cells are the checks a single-run report \
         warns of (collapse margin below 1, gradient above critical, slot velocity above the \
         rule of thumb, grain Reynolds number above 1, a parted column); the sweep table holds \
         every figure of every run.</p>\n\
         <div style=\"overflow-x:auto\">\n<table>\n<thead><tr><th>#</th>",
    );
    for p in &t.paths {
        let _ = write!(h, "<th><code>{}</code></th>", esc(p));
    }
    for (_, _, title, s) in &cols {
        let unit = if s.si.label.is_empty() {
            String::new()
        } else {
            format!(" [{}]", s.si.label)
        };
        let _ = write!(h, "<th>{}{}</th>", esc(title), esc(&unit));
    }
    h.push_str("<th>Status</th></tr></thead>\n<tbody>\n");
    for r in &t.rows {
        let _ = write!(h, "<tr><td>{}</td>", r.scenario);
        for l in &r.labels {
            let _ = write!(h, "<td>{}</td>", esc(l));
        }
        for (i, figure, _, s) in &cols {
            let v = r.figures[*i];
            let class = if flagged(*figure, v) {
                " class=\"flag\""
            } else {
                ""
            };
            let _ = write!(h, "<td{class}>{}</td>", sig(v * s.si.per_si));
        }
        let warnings = r.warnings.lines().count();
        let status = match (r.status.as_str(), warnings) {
            ("ok", 0) => "ok".to_owned(),
            ("ok", w) => format!("ok, {w} warning{}", if w == 1 { "" } else { "s" }),
            (s, _) => s.to_owned(),
        };
        let class = if r.status == "ok" {
            ""
        } else {
            " class=\"alarm\""
        };
        let _ = writeln!(h, "<td{class}>{}</td></tr>", esc(&status));
    }
    h.push_str("</tbody>\n</table>\n</div>\n");
}
