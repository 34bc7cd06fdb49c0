//! The headline table: one row per quantity from `/summary`, one column per run, SI
//! values with the common US unit in brackets; checks against rules of thumb and ratings
//! are highlighted. Values the table does not know are listed separately.

use std::collections::BTreeSet;

use boreflux_solver::safety::ENTRANCE_VELOCITY_RULE_M_S;

use super::format::{
    change, count, duration, shown_for, sig, with_units, Shown, ENERGY, FLOW, FLUX, HEAD, NUMBER,
    PORE_VELOCITY, PRESSURE, SHEAR, SLOT_VELOCITY, SMALL_LENGTH, SPECIFIC_CAPACITY,
};
use super::page::{Cell, Column, CompareTable, TableRow};
use super::read::{Run, Summary};
use super::tables::compare_table;
use super::{run_letter, run_title};
use crate::output::schema::Figure;
use boreflux_solver::grid::Zone;

/// The headline table and the summary keys it showed.
pub fn headline(runs: &[Run]) -> (CompareTable, BTreeSet<String>) {
    let mut used = BTreeSet::new();
    let mut t = CompareTable {
        class: "headline",
        first: "Quantity".to_owned(),
        columns: runs
            .iter()
            .enumerate()
            .map(|(i, run)| Column {
                letter: run_letter(i),
                sub: Some(run_title(run)),
            })
            .collect(),
        close_head_row: false,
        rows: Vec::new(),
    };
    let summaries: Vec<Summary> = runs.iter().map(completed_summary).collect();
    let section = |t: &mut CompareTable, name: &str| {
        t.rows.push(TableRow::Section(name.to_owned()));
    };
    let mut row =
        |t: &mut CompareTable, label: &str, keys: &[Figure], cell: &dyn Fn(&Summary) -> Cell| {
            used.extend(keys.iter().map(|k| k.name()));
            t.rows.push(TableRow::Values {
                label: label.to_owned(),
                code: false,
                cells: summaries.iter().map(cell).collect(),
            });
        };
    let one = |key: Figure, shown: Shown| {
        move |s: &Summary| {
            s.get(key)
                .map_or_else(Cell::missing, |v| Cell::plain(with_units(v, &shown)))
        }
    };
    let pair = |a: Figure, b: Figure, shown: Shown| {
        move |s: &Summary| match (s.get(a), s.get(b)) {
            (Some(x), Some(y)) => Cell::plain(change(x, y, &shown)),
            _ => Cell::missing(),
        }
    };

    section(&mut t, "Flow at the borehole wall");
    row(
        &mut t,
        "Peak outward face flux (Darcy)",
        &[Figure::PeakOutwardFlux],
        &one(Figure::PeakOutwardFlux, FLUX),
    );
    row(
        &mut t,
        "Peak inward face flux (Darcy, magnitude)",
        &[Figure::PeakInwardFlux],
        &one(Figure::PeakInwardFlux, FLUX),
    );
    row(
        &mut t,
        "Peak outward pore velocity",
        &[Figure::PeakOutwardPoreVelocity],
        &one(Figure::PeakOutwardPoreVelocity, PORE_VELOCITY),
    );
    row(
        &mut t,
        "Peak inward pore velocity (magnitude)",
        &[Figure::PeakInwardPoreVelocity],
        &one(Figure::PeakInwardPoreVelocity, PORE_VELOCITY),
    );
    row(
        &mut t,
        "RMS face flux",
        &[Figure::RmsFaceFlux],
        &one(Figure::RmsFaceFlux, FLUX),
    );
    row(
        &mut t,
        "Peak shear proxy (pack side)",
        &[Figure::PeakShear],
        &one(Figure::PeakShear, SHEAR),
    );
    row(
        &mut t,
        "Peak flow through the screen (magnitude)",
        &[Figure::PeakScreenFlow],
        &one(Figure::PeakScreenFlow, FLOW),
    );

    section(&mut t, "Energy dissipated over the run (work)");
    for zone in Zone::ALL {
        let key = Figure::Work(zone);
        row(
            &mut t,
            &format!("Work in the {}", zone.name()),
            &[key],
            &one(key, ENERGY),
        );
    }

    section(&mut t, "Development progress");
    row(
        &mut t,
        "Cake thickness, start → end",
        &[Figure::CakeThicknessStart, Figure::CakeThicknessEnd],
        &pair(
            Figure::CakeThicknessStart,
            Figure::CakeThicknessEnd,
            SMALL_LENGTH,
        ),
    );
    row(
        &mut t,
        "Cake removal time: the cake's skin down to a tenth of its start (lift-off and erosion, docs/physics.md §13a)",
        &[Figure::CakeRemovalTime],
        &|s: &Summary| {
            Cell::plain(
                s.get(Figure::CakeRemovalTime)
                    .map_or_else(|| "not reached".to_owned(), duration),
            )
        },
    );
    row(
        &mut t,
        "Skin of the cake, start → end (it falls as lift-off opens the wall, even where the thickness stays)",
        &[Figure::SkinCakeStart, Figure::SkinCakeEnd],
        &pair(Figure::SkinCakeStart, Figure::SkinCakeEnd, NUMBER),
    );
    row(
        &mut t,
        "Time for the cake's thickness to fall by 50 % / 90 % (erosion thins it; lift-off opens it without thinning)",
        &[Figure::TimeToHalfCake, Figure::TimeTo90pctCake],
        &|s: &Summary| {
            let f = |k| s.get(k).map_or_else(|| "not reached".to_owned(), duration);
            Cell::plain(format!(
                "{} / {}",
                f(Figure::TimeToHalfCake),
                f(Figure::TimeTo90pctCake)
            ))
        },
    );
    row(
        &mut t,
        "Skin, start → end",
        &[Figure::SkinStart, Figure::SkinEnd],
        &pair(Figure::SkinStart, Figure::SkinEnd, NUMBER),
    );
    row(
        &mut t,
        "Virtual tests: design rate; constant-rate test; step duration",
        &[
            Figure::DesignRate,
            Figure::TestDuration,
            Figure::StepDuration,
        ],
        &|s: &Summary| match (
            s.get(Figure::DesignRate),
            s.get(Figure::TestDuration),
            s.get(Figure::StepDuration),
        ) {
            (Some(q), Some(t), Some(st)) => Cell::plain(format!(
                "{}; {}; {}",
                with_units(q, &FLOW),
                duration(t),
                duration(st)
            )),
            _ => Cell::missing(),
        },
    );
    row(
        &mut t,
        "Drawdown at the end of the constant-rate test, start → end (undamaged well)",
        &[
            Figure::TestDrawdownStart,
            Figure::TestDrawdownEnd,
            Figure::TestDrawdownUndamaged,
        ],
        &|s: &Summary| match (
            s.get(Figure::TestDrawdownStart),
            s.get(Figure::TestDrawdownEnd),
            s.get(Figure::TestDrawdownUndamaged),
        ) {
            (Some(a), Some(b), Some(c)) => Cell::plain(format!(
                "{} ({})",
                change(a, b, &HEAD),
                with_units(c, &HEAD)
            )),
            _ => Cell::missing(),
        },
    );
    row(
        &mut t,
        "Step test B (after one step), start → end [s/m²]",
        &[Figure::StepBStart, Figure::StepBEnd],
        &pair(Figure::StepBStart, Figure::StepBEnd, NUMBER),
    );
    row(
        &mut t,
        "Step test C, start → end [s²/m⁵]",
        &[Figure::StepCStart, Figure::StepCEnd],
        &pair(Figure::StepCStart, Figure::StepCEnd, NUMBER),
    );
    row(
        &mut t,
        "Nonlinear share C Q/(B + C Q) at the design rate, start → end",
        &[Figure::NonlinearShareStart, Figure::NonlinearShareEnd],
        &|s: &Summary| match (
            s.get(Figure::NonlinearShareStart),
            s.get(Figure::NonlinearShareEnd),
        ) {
            (Some(a), Some(b)) => {
                Cell::plain(format!("{} % → {} %", sig(100.0 * a), sig(100.0 * b)))
            }
            _ => Cell::missing(),
        },
    );
    row(
        &mut t,
        "Well efficiency, start → end (definition below)",
        &[Figure::EfficiencyStart, Figure::EfficiencyEnd],
        &|s: &Summary| match (s.get(Figure::EfficiencyStart), s.get(Figure::EfficiencyEnd)) {
            (Some(a), Some(b)) if (0.0..=1.0).contains(&a) && (0.0..=1.0).contains(&b) => {
                Cell::plain(format!(
                    "{} → {} ({} % → {} %)",
                    sig(a),
                    sig(b),
                    sig(100.0 * a),
                    sig(100.0 * b)
                ))
            }
            (Some(a), Some(b)) => Cell::plain(change(a, b, &NUMBER)),
            _ => Cell::missing(),
        },
    );
    row(
        &mut t,
        "Specific capacity, start → end",
        &[Figure::SpecificCapacityStart, Figure::SpecificCapacityEnd],
        &pair(
            Figure::SpecificCapacityStart,
            Figure::SpecificCapacityEnd,
            SPECIFIC_CAPACITY,
        ),
    );

    section(&mut t, "Screen and safety checks");
    row(
        &mut t,
        "Peak slot (entrance) velocity vs the 0.03 m/s (0.1 ft/s) rule of thumb (not a limit)",
        &[Figure::PeakSlotVelocity],
        &|s: &Summary| {
            let Some(v) = s.get(Figure::PeakSlotVelocity) else {
                return Cell::missing();
            };
            let ratio = v / ENTRANCE_VELOCITY_RULE_M_S;
            let text = format!(
                "{}: {} × the rule, {}",
                with_units(v, &SLOT_VELOCITY),
                sig(ratio),
                if ratio > 1.0 { "above it" } else { "below it" }
            );
            Cell {
                text: Some(text),
                class: if ratio > 1.0 { "flag" } else { "" },
            }
        },
    );
    row(
        &mut t,
        "Peak grain Reynolds number (pack d50)",
        &[Figure::PeakGrainReynolds],
        &|s: &Summary| {
            s.get(Figure::PeakGrainReynolds).map_or_else(
                || Cell::plain("— (no pack d50 given)".into()),
                |v| Cell::plain(sig(v)),
            )
        },
    );
    row(
        &mut t,
        "Wall gradient ÷ Terzaghi's critical gradient (Gs − 1)(1 − n), formation side: a figure, not a warning (the pack holds the grains a gradient above 1 would lift; docs/physics.md §9b, §9e)",
        &[Figure::PipingRatio],
        &|s: &Summary| {
            s.get(Figure::PipingRatio)
                .map_or_else(Cell::missing, |v| Cell::plain(sig(v)))
        },
    );
    row(
        &mut t,
        "Peak collapse load: inward difference across the screen, or in-well drawdown against the formation (larger)",
        &[Figure::PeakCollapsePressure],
        &one(Figure::PeakCollapsePressure, PRESSURE),
    );
    row(
        &mut t,
        "Peak outward (burst-direction) pressure difference across the screen only (in-well head above the pack side; not the in-well head against the formation)",
        &[Figure::PeakBurstPressure],
        &one(Figure::PeakBurstPressure, PRESSURE),
    );
    // Each element's rating beside the margin computed from it (screen: the peak collapse
    // load; blank casing: the peak in-well drawdown pressure), then the lower margin, which
    // governs the warning.
    let rating = |f: Figure, missing: &'static str| {
        move |s: &Summary| {
            s.get(f).map_or_else(
                || Cell::plain(missing.into()),
                |v| Cell::plain(with_units(v, &PRESSURE)),
            )
        }
    };
    let margin = |f: Figure, missing: &'static str| {
        move |s: &Summary| match s.get(f) {
            Some(m) if m < 1.0 => Cell {
                text: Some(format!("{} — BELOW 1", sig(m))),
                class: "alarm",
            },
            Some(m) => Cell::plain(sig(m)),
            None => Cell::plain(missing.into()),
        }
    };
    const NO_RATING: &str = "not computed (no rating)";
    row(
        &mut t,
        "Collapse rating of the screen",
        &[Figure::ScreenCollapseRating],
        &rating(
            Figure::ScreenCollapseRating,
            "not given — enter the manufacturer's rating",
        ),
    );
    row(
        &mut t,
        "Screen collapse margin: screen rating ÷ (safety factor × peak collapse load)",
        &[Figure::ScreenCollapseMargin],
        &margin(Figure::ScreenCollapseMargin, NO_RATING),
    );
    row(
        &mut t,
        "Collapse rating of the blank casing",
        &[Figure::CollapseRating],
        &rating(
            Figure::CollapseRating,
            "not given — enter the manufacturer's rating, or the material and dimension ratio",
        ),
    );
    row(
        &mut t,
        "Casing collapse margin: casing rating ÷ (safety factor × peak in-well drawdown pressure)",
        &[Figure::CasingCollapseMargin],
        &margin(Figure::CasingCollapseMargin, NO_RATING),
    );
    row(
        &mut t,
        "Collapse margin, the lower of screen and casing; below 1 is a warning",
        &[Figure::CollapseMargin],
        &margin(
            Figure::CollapseMargin,
            "not computed: both the screen and the blank casing need a rating (an unrated \
             screen may govern)",
        ),
    );

    section(&mut t, "Numerical quality");
    row(
        &mut t,
        "Largest step volume-balance residual (relative)",
        &[Figure::MaxMassResidual],
        &one(Figure::MaxMassResidual, NUMBER),
    );
    row(
        &mut t,
        "Energy closure over the run (relative)",
        &[Figure::EnergyClosure],
        &one(Figure::EnergyClosure, NUMBER),
    );
    row(
        &mut t,
        "Grid cells / time steps / complete cycles",
        &[Figure::Cells, Figure::Steps, Figure::Cycles],
        &|s: &Summary| {
            let f = |k| s.get(k).map_or_else(|| "—".to_owned(), count);
            Cell::plain(format!(
                "{} / {} / {}",
                f(Figure::Cells),
                f(Figure::Steps),
                f(Figure::Cycles)
            ))
        },
    );
    row(
        &mut t,
        "Most Newton iterations in one step",
        &[Figure::MaxNewtonIterations],
        &|s: &Summary| {
            s.get(Figure::MaxNewtonIterations)
                .map_or_else(Cell::missing, |v| Cell::plain(count(v)))
        },
    );
    row(
        &mut t,
        "Simulated time",
        &[Figure::EndTime],
        &|s: &Summary| {
            s.get(Figure::EndTime)
                .map_or_else(Cell::missing, |v| Cell::plain(duration(v)))
        },
    );
    row(
        &mut t,
        "Outer radius of the model",
        &[Figure::OuterRadius],
        &one(Figure::OuterRadius, HEAD),
    );
    (t, used)
}

/// The run's summary with values that older files lack filled in from the series.
fn completed_summary(run: &Run) -> Summary {
    let mut s = run.summary.clone();
    let flow = &run.series.screen_flow;
    if s.get(Figure::PeakScreenFlow).is_none() && !flow.is_empty() {
        let peak = flow.iter().fold(0.0, |m: f64, q| m.max(q.abs()));
        s.values.insert(Figure::PeakScreenFlow.name(), peak);
    }
    s
}

/// Numeric `/summary` values the headline table did not show, or `None` when there are none.
pub fn other_values(runs: &[Run], used: &BTreeSet<String>) -> Option<CompareTable> {
    let keys: BTreeSet<&String> = runs
        .iter()
        .flat_map(|r| r.summary.values.keys())
        .filter(|k| !used.contains(*k))
        .collect();
    if keys.is_empty() {
        return None;
    }
    let mut t = compare_table(runs, "compare", "Attribute in /summary");
    for key in keys {
        let shown = Figure::from_name(key).map(|f| shown_for(f.entry().unit));
        let cells = runs
            .iter()
            .map(|run| {
                Cell::plain(match (run.summary.get_named(key), &shown) {
                    (Some(v), Some(shown)) => with_units(v, shown),
                    (Some(v), None) => sig(v),
                    (None, _) => "—".to_owned(),
                })
            })
            .collect();
        t.rows.push(TableRow::Values {
            label: key.clone(),
            code: true,
            cells,
        });
    }
    Some(t)
}
