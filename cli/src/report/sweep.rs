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

/// The whole page for one sweep table.
pub fn page(t: &Table) -> String {
    let mut h = String::new();
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n\
         <meta name=\"generator\" content=\"boreflux {v}\">\n<title>Sweep report: {case}</title>\n\
         <style>\n{STYLE}</style>\n</head>\n<body>\n<h1>Well development sweep report</h1>\n\
         <p class=\"lead\">{n} scenarios of <code>{case}</code>{shard}; every number and figure \
         below is read from the sweep table. Built by boreflux {v}.</p>\n",
        v = env!("CARGO_PKG_VERSION"),
        case = esc(&t.case_file),
        n = t.rows.len(),
        shard = if t.shard == "1/1" || t.shard == "merged" {
            String::new()
        } else {
            format!(
                " (shard {}, of {} in the whole sweep)",
                esc(&t.shard),
                t.total
            )
        },
    );
    let _ = write!(
        h,
        "<section class=\"caution\">\n<h2>Cautions</h2>\n<p>{}</p>\n<p>A sweep explores \
         settings; before taking the hardest of them to a well, compare its collapse load with \
         the manufacturer's rating and start gently.</p>\n</section>\n",
        esc(CAUTION)
    );
    let failed: Vec<_> = t.rows.iter().filter(|r| r.status != "ok").collect();
    let warned = t.rows.iter().filter(|r| !r.warnings.is_empty()).count();
    if !failed.is_empty() || warned > 0 {
        h.push_str("<section class=\"warnings\">\n<h2>Warnings</h2>\n<ul>\n");
        for r in &failed {
            let _ = writeln!(
                h,
                "<li>Scenario {} ({}) did not run to the end: {}</li>",
                r.scenario,
                esc(&r.labels.join(", ")),
                esc(&r.status)
            );
        }
        for r in t.rows.iter().filter(|r| !r.warnings.is_empty()) {
            let _ = writeln!(
                h,
                "<li>Scenario {} ({}):<ul>{}</ul></li>",
                r.scenario,
                esc(&r.labels.join(", ")),
                r.warnings
                    .lines()
                    .map(|w| format!("<li>{}</li>", esc(w)))
                    .collect::<String>()
            );
        }
        h.push_str("</ul>\n</section>\n");
    }
    h.push_str("<h2>What was varied</h2>\n<ul>\n");
    let vary: serde_json::Value = serde_json::from_str(&t.vary_json).unwrap_or_default();
    if let Some(s) = &t.sampling_json {
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
        table(&mut h, t);
        return finish(h, t);
    }
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
    h.push_str("</ul>\n");
    charts(&mut h, t);
    table(&mut h, t);
    finish(h, t)
}

/// The base case and the end of the page.
fn finish(mut h: String, t: &Table) -> String {
    let _ = write!(
        h,
        "<h2>Case file the sweep started from</h2>\n<pre>{}</pre>\n</body>\n</html>\n",
        esc(
            &serde_json::from_str::<serde_json::Value>(&t.base_case_json)
                .and_then(|v| serde_json::to_string_pretty(&v))
                .unwrap_or_else(|_| t.base_case_json.clone())
        )
    );
    h
}

/// One chart per key figure against the first varied value (in SI), one line per
/// combination of the other varied values. Left out when that value is not a number.
fn charts(h: &mut String, t: &Table) {
    let Some(x_path) = t.paths.first() else {
        return;
    };
    if t.rows.iter().any(|r| !r.si[0].is_finite()) || t.rows.len() < 2 {
        h.push_str(
            "<p>No charts: the first varied value is not a number in every scenario \
                    (or there is only one); the table below has the results.</p>\n",
        );
        return;
    }
    // Lines: rows grouped by the other varied values, in order of the first.
    let mut lines: BTreeMap<Vec<String>, Vec<usize>> = BTreeMap::new();
    for (k, r) in t.rows.iter().enumerate() {
        lines.entry(r.labels[1..].to_vec()).or_default().push(k);
    }
    for rows in lines.values_mut() {
        rows.sort_by(|&a, &b| t.rows[a].si[0].total_cmp(&t.rows[b].si[0]));
    }
    let xs: Vec<Vec<f64>> = lines
        .values()
        .map(|rows| rows.iter().map(|&k| t.rows[k].si[0]).collect())
        .collect();
    let positive = t.rows.iter().all(|r| r.si[0] > 0.0);
    let (lo, hi) = t.rows.iter().fold((f64::INFINITY, 0.0f64), |(a, b), r| {
        (a.min(r.si[0]), b.max(r.si[0]))
    });
    let x_scale = if positive && hi / lo >= 20.0 {
        Scale::Log
    } else {
        Scale::Linear
    };
    h.push_str("<h2>Figures</h2>\n");
    let _ = writeln!(
        h,
        "<p>Each figure against <code>{}</code> (in SI base units when it carries a unit, \
         otherwise as given){}. Failed scenarios are left out.</p>",
        esc(x_path),
        if lines.len() > 1 {
            format!(
                "; one line for each value of {}",
                esc(&t.paths[1..].join(", "))
            )
        } else {
            String::new()
        }
    );
    for (n, (figure, title, _)) in KEY.iter().enumerate() {
        let name = figure.name();
        let Some(col) = t.figures.iter().position(|f| *f == name) else {
            continue;
        };
        let ys: Vec<Vec<f64>> = lines
            .values()
            .map(|rows| rows.iter().map(|&k| t.rows[k].figures[col]).collect())
            .collect();
        if ys.iter().flatten().all(|y| !y.is_finite()) {
            continue;
        }
        let s = shown(*figure);
        let mut c = quantity_chart(&format!("sweep{n}"), title, x_path, title, s);
        c.x_scale = x_scale;
        for (i, (key, (x, y))) in lines.keys().zip(xs.iter().zip(&ys)).enumerate() {
            let label = t.paths[1..]
                .iter()
                .zip(key)
                .map(|(p, v)| format!("{p} = {v}"))
                .collect::<Vec<_>>()
                .join(", ");
            c.series.push(Series {
                label,
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

/// The table of every scenario: its values, the key figures and its status.
fn table(h: &mut String, t: &Table) {
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
    h.push_str(
        "<h2>Scenarios</h2>\n<p>Peaks are at the borehole wall (flux, shear) and on the screen \
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
