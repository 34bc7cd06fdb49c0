//! The report's figures: which quantities are plotted against what, in which units, with
//! runs overlaid (one colour and dash pattern per run, the same in every figure).

use super::format::{Shown, FLOW, FLUX, HEAD, NUMBER, SHEAR, SMALL_LENGTH};
use super::read::{Run, Series as RunSeries};
use super::svg::{render, Band, Chart, Mark, Scale, SecondAxis, Series, Style};
use super::{legend_name, run_letter};
use boreflux_solver::EventKind;

/// Head profiles drawn per run.
const SNAPSHOTS_SHOWN: usize = 5;
/// Cumulative work is drawn on a log axis when the zones' totals span more than this ratio.
const WORK_LOG_RATIO: f64 = 1e3;
/// Decades shown below the largest value on a log work axis.
const WORK_LOG_DECADES: f64 = 10.0;

/// Colours of runs A, B, C, … (the first six runs: each its own colour and dash).
const RUN_COLOURS: [&str; 6] = [
    "#1f5fa8", "#c0392b", "#1e8449", "#7d3c98", "#b9770e", "#222222",
];

/// Dash patterns of the runs, for grey-scale prints.
const RUN_DASHES: [&str; 6] = ["", "8 4", "2 3", "10 3 2 3", "5 2", "1 3"];

/// Line styles of the zones screen, pack, cake, invaded, formation.
const ZONE_STYLES: [Style; boreflux_solver::grid::ZONE_COUNT] = [
    style("#7f8c8d", "1 3"),
    style("#b7950b", "8 4"),
    style("#a04000", ""),
    style("#7d3c98", "2 3"),
    style("#1f5fa8", "10 3 2 3"),
];

const fn style(color: &'static str, dash: &'static str) -> Style {
    Style {
        color,
        dash,
        width: 1.6,
    }
}

/// Style of run number `i` (from 0): colour `i mod 6` with a dash pattern shifted by one
/// for each further six runs, so the first 36 runs (sweep lines) each get their own
/// colour and dash pair; the first six are colour k with dash k.
pub fn run_style(i: usize) -> Style {
    let n = RUN_COLOURS.len();
    style(
        RUN_COLOURS[i % n],
        RUN_DASHES[(i % n + i / n) % RUN_DASHES.len()],
    )
}

/// One figure: a title, a caption and one or more SVG charts.
#[derive(Debug, Clone)]
pub struct Figure {
    /// Heading of the figure.
    pub title: String,
    /// What is shown and how to read it (plain text).
    pub caption: String,
    /// Rendered `<svg>` elements.
    pub svgs: Vec<String>,
}

/// Time axis unit for runs ending at `end_s`: (label, factor from seconds).
fn time_unit(end_s: f64) -> (&'static str, f64) {
    if end_s > 3.0 * 3_600.0 {
        ("h", 1.0 / 3_600.0)
    } else if end_s > 600.0 {
        ("min", 1.0 / 60.0)
    } else {
        ("s", 1.0)
    }
}

/// Builds every figure the runs support.
pub fn figures(runs: &[Run]) -> Vec<Figure> {
    let end = runs
        .iter()
        .filter_map(|r| r.series.time.last().copied())
        .fold(0.0, f64::max);
    let (t_label, t_factor) = time_unit(end);
    let time_axis = format!("Time [{t_label}]");
    let mut ids = 0usize;
    let mut next_id = || {
        ids += 1;
        format!("fig{ids}")
    };
    let mut time_chart =
        |title: &str, quantity: &str, shown: Shown, get: fn(&RunSeries) -> &[f64]| {
            let mut c = quantity_chart(&next_id(), title, &time_axis, quantity, shown);
            c.x_factor = t_factor;
            for (i, run) in runs.iter().enumerate() {
                let style = run_style(i);
                if let Some(env) = &run.envelopes {
                    c.bands.push(Band {
                        x: &env.min.time,
                        lo: get(&env.min),
                        hi: get(&env.max),
                        color: style.color,
                    });
                }
                // The first event of each kind, as a labelled vertical line.
                for &(t, kind) in run.series.first_events.iter().take(MAX_EVENT_MARKS) {
                    c.marks.push(Mark {
                        x: t * t_factor,
                        label: event_label(kind, i, runs.len()),
                    });
                }
                // Detail windows of an envelope file are drawn apart, not joined.
                let y = get(&run.series);
                for (k, (a, b)) in windows(&run.series.time, run.envelopes.is_some())
                    .into_iter()
                    .enumerate()
                {
                    c.series.push(Series {
                        label: if k == 0 {
                            legend_name(i, run)
                        } else {
                            String::new()
                        },
                        x: &run.series.time[a..b],
                        y: &y[a..b],
                        style,
                    });
                }
            }
            render(&c)
        };
    let mut decimated = String::from(
        "Long series are drawn from the lowest and highest value in each pixel column, so \
         peaks are kept.",
    );
    if runs.iter().any(|r| r.envelopes.is_some()) {
        decimated.push_str(
            " A file that keeps per-cycle envelopes shows each cycle's range (lowest to \
             highest value) as a shaded band, and its stored windows of every step as lines.",
        );
    }
    if runs.iter().any(|r| !r.series.gaps.is_empty()) {
        decimated.push_str(
            " The lines break where the run jumped over whole cycles (numerics.multiscale): \
             those cycles were not computed, their state was extrapolated (listed in /jumps).",
        );
    }
    let mut out = vec![
        Figure {
            title: "In-well head and flow through the screen".into(),
            caption: format!(
                "Head in the well relative to the static level, and flow through the screen \
                 (positive outward, from the well into the formation). {decimated}"
            ),
            svgs: vec![
                time_chart("In-well head", "Head", HEAD, |s| &s.well_head),
                time_chart("Flow through the screen (outward +)", "Flow", FLOW, |s| {
                    &s.screen_flow
                }),
            ],
        },
        Figure {
            title: "Darcy flux at the borehole wall".into(),
            caption: "Darcy flux (flow per unit area) through the borehole wall r_b, positive \
                      outward; the right axis gives the same flux as a loading rate."
                .into(),
            svgs: vec![time_chart(
                "Darcy flux at the borehole wall (outward +)",
                "Flux",
                FLUX,
                |s| &s.face_flux,
            )],
        },
        Figure {
            title: "Shear proxy at the borehole wall".into(),
            caption: "Pore-scale shear proxy on the pack side of the wall, the quantity the \
                      cake erosion law compares with its critical shear."
                .into(),
            svgs: vec![time_chart(
                "Shear proxy, pack side of the wall",
                "Shear",
                SHEAR,
                |s| &s.shear_proxy,
            )],
        },
        Figure {
            title: "Wall cake and skin".into(),
            caption: "Cake thickness left on the borehole wall and the total skin referred to \
                      the formation. Erosion thins the cake; lift-off opens patches of the \
                      wall without thinning the rest, so the skin can fall while the \
                      thickness stays (docs/physics.md §13, §13a)."
                .into(),
            svgs: vec![
                time_chart("Cake thickness", "Thickness", SMALL_LENGTH, |s| {
                    &s.cake_thickness
                }),
                time_chart("Skin", "Skin", NUMBER, |s| &s.skin),
            ],
        },
    ];
    // Placed before "Wall cake and skin"; built here because `time_chart` holds `next_id`.
    out.insert(
        3,
        Figure {
            title: "Cumulative work dissipated per zone".into(),
            caption: "Energy dissipated by flow in each zone since the start, one chart per \
                      run. A logarithmic axis is used when the zones differ by more than a \
                      factor of 1000."
                .into(),
            svgs: runs
                .iter()
                .enumerate()
                .map(|(i, run)| work_chart(&next_id(), i, run, &time_axis, t_factor))
                .collect(),
        },
    );
    if runs.iter().any(|r| !r.cycles.index.is_empty()) {
        out.push(cycle_figure(runs, &mut next_id));
    }
    if runs.iter().any(|r| !r.progress.time.is_empty()) {
        out.push(progress_figure(runs, &time_axis, t_factor, &mut next_id));
    }
    if runs.iter().any(|r| !r.snapshots.time.is_empty()) {
        out.push(Figure {
            title: "Head against radius".into(),
            caption: format!(
                "Head profiles at up to {SNAPSHOTS_SHOWN} of the stored times, one chart per \
                 run, on a logarithmic radius axis; dashed lines mark the screen r_s and the \
                 borehole wall r_b."
            ),
            svgs: runs
                .iter()
                .enumerate()
                .filter(|(_, r)| !r.snapshots.time.is_empty())
                .map(|(i, run)| profile_chart(&next_id(), i, run))
                .collect(),
        });
    }
    out
}

/// Event lines per run on a time chart at most (the first kinds in kind order: the
/// partings and suction limits come first); `/events` lists them all.
const MAX_EVENT_MARKS: usize = 4;

/// The label of an event line: its kind in words, "first", and the run's letter when the
/// page compares runs.
fn event_label(kind: EventKind, run: usize, runs: usize) -> String {
    let words = kind.name().replace('_', " ");
    if runs > 1 {
        format!("{words} (first, {})", run_letter(run))
    } else {
        format!("{words} (first)")
    }
}

fn axis_label(quantity: &str, unit: &str) -> String {
    if unit.is_empty() {
        format!("{quantity} [–]")
    } else {
        format!("{quantity} [{unit}]")
    }
}

/// An empty chart whose y axis shows `quantity` as `shown` says: the SI-side display unit on
/// the left, the US-customary one (when there is one) on the right.
pub(super) fn quantity_chart<'a>(
    id: &str,
    title: &str,
    x_label: &str,
    quantity: &str,
    shown: Shown,
) -> Chart<'a> {
    let mut c = Chart::new(id, title, x_label, &axis_label(quantity, shown.si.label));
    c.y_factor = shown.si.per_si;
    c.y2 = shown.us.map(|us| SecondAxis {
        label: axis_label(quantity, us.label),
        per_primary: us.per_si / shown.si.per_si,
    });
    c
}

fn work_chart(id: &str, i: usize, run: &Run, time_axis: &str, t_factor: f64) -> String {
    let title = format!("Cumulative work per zone, run {}", run_letter(i));
    let mut c = Chart::new(id, &title, time_axis, "Work [J]");
    c.x_factor = t_factor;
    let finals: Vec<f64> = run
        .series
        .work
        .iter()
        .filter_map(|(_, w)| w.last().copied())
        .filter(|&w| w > 0.0)
        .collect();
    let hi = finals.iter().copied().fold(0.0, f64::max);
    let lo = finals.iter().copied().fold(f64::INFINITY, f64::min);
    if hi > 0.0 && hi / lo > WORK_LOG_RATIO {
        c.y_scale = Scale::Log;
        c.y_min = Some(hi * 10f64.powf(-WORK_LOG_DECADES));
        c.title.push_str(" (log scale)");
    }
    for (zone, w) in &run.series.work {
        let k = *zone as usize;
        let name = zone.name();
        let last = w.last().copied().unwrap_or(0.0);
        let label = match c.y_min {
            Some(_) if last <= 0.0 => format!("{name} (zero, not drawn)"),
            Some(floor) if last < floor => format!("{name} (below the axis)"),
            Some(_) | None => name.to_owned(),
        };
        c.series.push(Series {
            label,
            x: &run.series.time,
            y: w,
            style: ZONE_STYLES[k],
        });
    }
    render(&c)
}

fn cycle_figure(runs: &[Run], next_id: &mut impl FnMut() -> String) -> Figure {
    // Cycle numbers from 1 for display (the file counts from 0).
    let numbers: Vec<Vec<f64>> = runs
        .iter()
        .map(|r| r.cycles.index.iter().map(|k| k + 1.0).collect())
        .collect();
    let mut chart = |title: &str, quantity: &str, shown: Shown, get: fn(&Run) -> &[f64]| {
        let mut c = quantity_chart(&next_id(), title, "Cycle number", quantity, shown);
        for (i, run) in runs.iter().enumerate() {
            c.series.push(Series {
                label: legend_name(i, run),
                x: &numbers[i],
                y: get(run),
                style: run_style(i),
            });
        }
        render(&c)
    };
    Figure {
        title: "Per-cycle peaks and work".into(),
        caption: "Largest outward and inward Darcy flux at the wall in each complete cycle \
                  (inward as a magnitude), and the work dissipated in the cake per cycle."
            .into(),
        svgs: vec![
            chart("Peak outward flux per cycle", "Flux", FLUX, |r| {
                &r.cycles.peak_outward_flux
            }),
            chart(
                "Peak inward flux per cycle (magnitude)",
                "Flux",
                FLUX,
                |r| &r.cycles.peak_inward_flux,
            ),
            chart(
                "Work dissipated in the cake per cycle",
                "Work",
                super::format::ENERGY,
                |r| &r.cycles.work_cake,
            ),
        ],
    }
}

/// Specific capacity and efficiency of the virtual constant-rate test during the run.
fn progress_figure(
    runs: &[Run],
    time_axis: &str,
    t_factor: f64,
    next_id: &mut impl FnMut() -> String,
) -> Figure {
    let mut chart = |title: &str, quantity: &str, shown: Shown, get: fn(&Run) -> &[f64]| {
        let mut c = quantity_chart(&next_id(), title, time_axis, quantity, shown);
        c.x_factor = t_factor;
        for (i, run) in runs.iter().enumerate() {
            c.series.push(Series {
                label: legend_name(i, run),
                x: &run.progress.time,
                y: get(run),
                style: run_style(i),
            });
        }
        render(&c)
    };
    Figure {
        title: "Development progress: specific capacity and efficiency".into(),
        caption: "Specific capacity and efficiency of the virtual constant-rate test (design \
                  rate and duration of the assessment section) for the well as it stood at \
                  each time, estimated from its near-well losses (docs/physics.md §25.3); to \
                  lay over the driller's log of specific capacity. Efficiency is against the \
                  same well with no damage."
            .into(),
        svgs: vec![
            chart(
                "Specific capacity during development",
                "Specific capacity",
                super::format::SPECIFIC_CAPACITY,
                |r| &r.progress.specific_capacity,
            ),
            chart("Efficiency during development", "Efficiency", NUMBER, |r| {
                &r.progress.efficiency
            }),
        ],
    }
}

fn profile_chart(id: &str, i: usize, run: &Run) -> String {
    let title = format!("Head against radius, run {}", run_letter(i));
    let mut c = quantity_chart(
        id,
        &title,
        "Radius from the well axis [m] (log scale)",
        "Head",
        HEAD,
    );
    c.x_scale = Scale::Log;
    if let Some(rs) = run.screen_radius() {
        c.marks.push(Mark {
            x: rs,
            label: "screen r_s".into(),
        });
    }
    if let Some(rb) = run.borehole_radius() {
        c.marks.push(Mark {
            x: rb,
            label: "borehole wall r_b".into(),
        });
    }
    let s = run.snapshots.time.len();
    let rows: Vec<usize> = if s <= SNAPSHOTS_SHOWN {
        (0..s).collect()
    } else {
        let mut v: Vec<usize> = (0..SNAPSHOTS_SHOWN)
            .map(|k| (k * (s - 1) + (SNAPSHOTS_SHOWN - 1) / 2) / (SNAPSHOTS_SHOWN - 1))
            .collect();
        v.dedup();
        v
    };
    for (k, &row) in rows.iter().enumerate() {
        c.series.push(Series {
            label: format!("t = {}", super::format::duration(run.snapshots.time[row])),
            x: &run.grid.r_center,
            y: &run.snapshots.head[row],
            style: run_style(k),
        });
    }
    render(&c)
}

/// Index ranges of the stretches of `time` to draw as separate lines: one for a file that
/// keeps every step; for an envelope file (`split`), a new stretch wherever the step
/// between two stored times is more than 20 times the median step (a window left out).
fn windows(time: &[f64], split: bool) -> Vec<(usize, usize)> {
    if !split || time.len() < 3 {
        return vec![(0, time.len())];
    }
    let mut steps: Vec<f64> = time.windows(2).map(|w| w[1] - w[0]).collect();
    steps.sort_by(f64::total_cmp);
    let median = steps[steps.len() / 2];
    let mut out = Vec::new();
    let mut start = 0;
    for k in 1..time.len() {
        if time[k] - time[k - 1] > 20.0 * median {
            out.push((start, k));
            start = k;
        }
    }
    out.push((start, time.len()));
    out
}

#[cfg(test)]
mod style_tests {
    use super::*;

    /// A legend needs one look per line: the first 36 runs differ in colour or dash, the
    /// first six in both.
    #[test]
    fn run_styles_do_not_repeat_after_six() {
        let pairs: std::collections::BTreeSet<(&str, &str)> =
            (0..36).map(run_style).map(|s| (s.color, s.dash)).collect();
        assert_eq!(pairs.len(), 36);
        let first: std::collections::BTreeSet<&str> = (0..6).map(|i| run_style(i).dash).collect();
        assert_eq!(first.len(), 6);
        assert_eq!(run_style(1).dash, "8 4");
        assert_ne!(run_style(6).dash, run_style(0).dash);
    }
}
