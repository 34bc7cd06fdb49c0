//! The headline table: one row per quantity from `/summary`, one column per run, SI
//! values with the common US unit in brackets; checks against rules of thumb and ratings
//! are highlighted. Values the table does not know are listed separately.

use std::collections::BTreeSet;
use std::fmt::Write;

use boreflux_solver::safety::ENTRANCE_VELOCITY_RULE_M_S;

use super::escape::esc;
use super::format::{
    change, count, duration, sig, summary_unit, with_units, Shown, ENERGY, FLOW, FLUX, HEAD,
    NUMBER, PORE_VELOCITY, PRESSURE, SHEAR, SLOT_VELOCITY, SMALL_LENGTH, SPECIFIC_CAPACITY,
};
use super::read::{Run, Summary, ZONES};
use super::tables::header_row;
use super::{run_letter, run_title};

/// A table cell: HTML-safe text and a CSS class ("" for none).
struct Cell {
    html: String,
    class: &'static str,
}

impl Cell {
    fn plain(text: String) -> Self {
        Cell {
            html: esc(&text),
            class: "",
        }
    }

    fn missing() -> Self {
        Cell {
            html: r#"<span title="not in the run file">—</span>"#.to_owned(),
            class: "",
        }
    }
}

/// The headline table and the summary keys it showed.
pub fn headline(runs: &[Run]) -> (String, BTreeSet<String>) {
    let mut used = BTreeSet::new();
    let mut t = String::new();
    t.push_str(r#"<table class="headline"><thead><tr><th scope="col">Quantity</th>"#);
    for (i, run) in runs.iter().enumerate() {
        let _ = write!(
            t,
            r#"<th scope="col">Run {}<br><span class="sub">{}</span></th>"#,
            run_letter(i),
            esc(&run_title(run))
        );
    }
    t.push_str("</thead><tbody>");
    let ncols = runs.len() + 1;
    let summaries: Vec<Summary> = runs.iter().map(completed_summary).collect();
    let section = |t: &mut String, name: &str| {
        let _ = write!(
            t,
            r#"<tr class="section"><th colspan="{ncols}">{name}</th></tr>"#
        );
    };
    let mut row = |t: &mut String, label: &str, keys: &[&str], cell: &dyn Fn(&Summary) -> Cell| {
        used.extend(keys.iter().map(|k| (*k).to_owned()));
        let _ = write!(t, r#"<tr><th scope="row">{label}</th>"#);
        for summary in &summaries {
            let c = cell(summary);
            if c.class.is_empty() {
                let _ = write!(t, "<td>{}</td>", c.html);
            } else {
                let _ = write!(t, r#"<td class="{}">{}</td>"#, c.class, c.html);
            }
        }
        t.push_str("</tr>");
    };
    let one = |key: &'static str, shown: Shown| {
        move |s: &Summary| {
            s.get(key)
                .map_or_else(Cell::missing, |v| Cell::plain(with_units(v, &shown)))
        }
    };
    let pair = |a: &'static str, b: &'static str, shown: Shown| {
        move |s: &Summary| match (s.get(a), s.get(b)) {
            (Some(x), Some(y)) => Cell::plain(change(x, y, &shown)),
            _ => Cell::missing(),
        }
    };

    section(&mut t, "Flow at the borehole wall");
    row(
        &mut t,
        "Peak outward face flux (Darcy)",
        &["peak_outward_flux_m_s"],
        &one("peak_outward_flux_m_s", FLUX),
    );
    row(
        &mut t,
        "Peak inward face flux (Darcy, magnitude)",
        &["peak_inward_flux_m_s"],
        &one("peak_inward_flux_m_s", FLUX),
    );
    row(
        &mut t,
        "Peak outward pore velocity",
        &["peak_outward_pore_velocity_m_s"],
        &one("peak_outward_pore_velocity_m_s", PORE_VELOCITY),
    );
    row(
        &mut t,
        "Peak inward pore velocity (magnitude)",
        &["peak_inward_pore_velocity_m_s"],
        &one("peak_inward_pore_velocity_m_s", PORE_VELOCITY),
    );
    row(
        &mut t,
        "RMS face flux",
        &["rms_face_flux_m_s"],
        &one("rms_face_flux_m_s", FLUX),
    );
    row(
        &mut t,
        "Peak shear proxy (pack side)",
        &["peak_shear_pa"],
        &one("peak_shear_pa", SHEAR),
    );
    row(
        &mut t,
        "Peak flow through the screen (magnitude)",
        &["peak_screen_flow_m3_s"],
        &one("peak_screen_flow_m3_s", FLOW),
    );

    section(&mut t, "Energy dissipated over the run (work)");
    for zone in ZONES {
        let key: &'static str = match zone {
            "screen" => "work_screen_j",
            "pack" => "work_pack_j",
            "cake" => "work_cake_j",
            "invaded" => "work_invaded_j",
            _ => "work_formation_j",
        };
        row(
            &mut t,
            &format!("Work in the {zone}"),
            &[key],
            &one(key, ENERGY),
        );
    }

    section(&mut t, "Development progress");
    row(
        &mut t,
        "Cake thickness, start → end",
        &["cake_thickness_start_m", "cake_thickness_end_m"],
        &pair(
            "cake_thickness_start_m",
            "cake_thickness_end_m",
            SMALL_LENGTH,
        ),
    );
    row(
        &mut t,
        "Time to remove 50 % / 90 % of the cake",
        &["time_to_half_cake_s", "time_to_90pct_cake_s"],
        &|s: &Summary| {
            let f = |k| s.get(k).map_or_else(|| "not reached".to_owned(), duration);
            Cell::plain(format!(
                "{} / {}",
                f("time_to_half_cake_s"),
                f("time_to_90pct_cake_s")
            ))
        },
    );
    row(
        &mut t,
        "Skin, start → end",
        &["skin_start", "skin_end"],
        &pair("skin_start", "skin_end", NUMBER),
    );
    row(
        &mut t,
        "Well efficiency, start → end (definition below)",
        &["efficiency_start", "efficiency_end"],
        &|s: &Summary| match (s.get("efficiency_start"), s.get("efficiency_end")) {
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
        &["specific_capacity_start_m2_s", "specific_capacity_end_m2_s"],
        &pair(
            "specific_capacity_start_m2_s",
            "specific_capacity_end_m2_s",
            SPECIFIC_CAPACITY,
        ),
    );

    section(&mut t, "Screen and safety checks");
    row(
        &mut t,
        "Peak slot (entrance) velocity vs the 0.03 m/s (0.1 ft/s) rule of thumb (not a limit)",
        &["peak_slot_velocity_m_s"],
        &|s: &Summary| {
            let Some(v) = s.get("peak_slot_velocity_m_s") else {
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
                html: esc(&text),
                class: if ratio > 1.0 { "flag" } else { "" },
            }
        },
    );
    row(
        &mut t,
        "Peak grain Reynolds number (pack d50)",
        &["peak_grain_reynolds"],
        &|s: &Summary| {
            s.get("peak_grain_reynolds").map_or_else(
                || Cell::plain("— (no pack d50 given)".into()),
                |v| Cell::plain(sig(v)),
            )
        },
    );
    row(
        &mut t,
        "Wall gradient ÷ critical gradient (formation side)",
        &["piping_ratio"],
        &|s: &Summary| {
            s.get("piping_ratio").map_or_else(Cell::missing, |v| Cell {
                html: esc(&sig(v)),
                class: if v > 1.0 { "flag" } else { "" },
            })
        },
    );
    row(
        &mut t,
        "Peak collapse load: inward difference across the screen, or in-well drawdown against the formation (larger)",
        &["peak_collapse_pressure_pa"],
        &one("peak_collapse_pressure_pa", PRESSURE),
    );
    row(
        &mut t,
        "Peak outward (burst-direction) pressure difference",
        &["peak_burst_pressure_pa"],
        &one("peak_burst_pressure_pa", PRESSURE),
    );
    row(
        &mut t,
        "Collapse rating of screen or casing",
        &["collapse_rating_pa"],
        &|s: &Summary| {
            s.get("collapse_rating_pa").map_or_else(
                || Cell::plain("not given — enter the manufacturer's rating".into()),
                |v| Cell::plain(with_units(v, &PRESSURE)),
            )
        },
    );
    row(
        &mut t,
        "Collapse margin: rating ÷ (safety factor × peak); below 1 is a warning",
        &["collapse_margin"],
        &|s: &Summary| match s.get("collapse_margin") {
            Some(m) if m < 1.0 => Cell {
                html: esc(&format!("{} — BELOW 1", sig(m))),
                class: "alarm",
            },
            Some(m) => Cell::plain(sig(m)),
            None => Cell::plain("not computed (no rating)".into()),
        },
    );

    section(&mut t, "Numerical quality");
    row(
        &mut t,
        "Largest step volume-balance residual (relative)",
        &["max_mass_residual"],
        &one("max_mass_residual", NUMBER),
    );
    row(
        &mut t,
        "Energy closure over the run (relative)",
        &["energy_closure"],
        &one("energy_closure", NUMBER),
    );
    row(
        &mut t,
        "Grid cells / time steps / complete cycles",
        &["cells", "steps", "cycles"],
        &|s: &Summary| {
            let f = |k| s.get(k).map_or_else(|| "—".to_owned(), count);
            Cell::plain(format!("{} / {} / {}", f("cells"), f("steps"), f("cycles")))
        },
    );
    row(
        &mut t,
        "Most Newton iterations in one step",
        &["max_newton_iterations"],
        &|s: &Summary| {
            s.get("max_newton_iterations")
                .map_or_else(Cell::missing, |v| Cell::plain(count(v)))
        },
    );
    row(&mut t, "Simulated time", &["end_time_s"], &|s: &Summary| {
        s.get("end_time_s")
            .map_or_else(Cell::missing, |v| Cell::plain(duration(v)))
    });
    row(
        &mut t,
        "Outer radius of the model",
        &["outer_radius_m"],
        &one("outer_radius_m", HEAD),
    );
    t.push_str("</tbody></table>");
    (t, used)
}

/// The run's summary with values that older files lack filled in from the series.
fn completed_summary(run: &Run) -> Summary {
    let mut s = run.summary.clone();
    let flow = &run.series.screen_flow;
    if s.get("peak_screen_flow_m3_s").is_none() && !flow.is_empty() {
        let peak = flow.iter().fold(0.0, |m: f64, q| m.max(q.abs()));
        s.values.insert("peak_screen_flow_m3_s".to_owned(), peak);
    }
    s
}

/// Numeric `/summary` values the headline table did not show, or `None` when there are none.
pub fn other_values(runs: &[Run], used: &BTreeSet<String>) -> Option<String> {
    let keys: BTreeSet<&String> = runs
        .iter()
        .flat_map(|r| r.summary.values.keys())
        .filter(|k| !used.contains(*k))
        .collect();
    if keys.is_empty() {
        return None;
    }
    let mut t = header_row(runs, "Attribute in /summary");
    for key in keys {
        let _ = write!(t, r#"<tr><th scope="row"><code>{}</code></th>"#, esc(key));
        for run in runs {
            let cell = match (run.summary.get(key), summary_unit(key)) {
                (Some(v), Some(shown)) => with_units(v, &shown),
                (Some(v), None) => sig(v),
                (None, _) => "—".to_owned(),
            };
            let _ = write!(t, "<td>{}</td>", esc(&cell));
        }
        t.push_str("</tr>");
    }
    t.push_str("</tbody></table>");
    Some(t)
}
