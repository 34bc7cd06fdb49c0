//! The per-cycle log and the inputs table (from `case_json`), as data for the page
//! templates (templates/partials/table.html), which escape every text.

use serde_json::Value;

use super::format::{
    count, duration, sig, temperature, with_units, AREA, CONDUCTIVITY, ERODIBILITY, FLOW,
    FORCHHEIMER_BETA, FREQUENCY, HEAD, NUMBER, PRESSURE, SHEAR, SMALL_LENGTH, SPECIFIC_STORAGE,
};
use super::input_units::{self, InputUnit};
use super::page::{Cell, Column, CompareTable, TableRow};
use super::read::Run;
use super::run_letter;

/// Cycle-log rows shown at the start and at the end of a long run.
const CYCLE_ROWS_EACH_END: usize = 10;

/// A comparison table with a first header cell `first`, one column per run (its letter)
/// and no rows yet.
pub fn compare_table(runs: &[Run], class: &'static str, first: &str) -> CompareTable {
    CompareTable {
        class,
        first: first.to_owned(),
        columns: (0..runs.len())
            .map(|i| Column {
                letter: run_letter(i),
                sub: None,
            })
            .collect(),
        close_head_row: true,
        rows: Vec::new(),
    }
}

/// The per-cycle log of one run (templates/partials/table.html, `cycle_log`).
pub struct CycleLog {
    /// The rows shown.
    pub rows: Vec<CycleRow>,
}

/// A row of the cycle log.
pub enum CycleRow {
    /// Cycles left out of a long log.
    Gap {
        /// How many.
        hidden: usize,
    },
    /// One cycle.
    Cycle {
        /// Cycle number, from 1.
        number: String,
        /// Start time [s].
        start: String,
        /// End time [s].
        end: String,
        /// Peak outward, peak inward and RMS flux [mm/s], peak shear [Pa], work in the
        /// cake [J], cake removed [mm].
        values: Vec<String>,
    },
}

/// The per-cycle log of one run, or `None` without cycles. Long logs show the first and
/// last cycles.
pub fn cycle_log(run: &Run) -> Option<CycleLog> {
    let c = &run.cycles;
    let n = c.index.len();
    if n == 0 {
        return None;
    }
    let shown: Vec<usize> = if n <= 2 * CYCLE_ROWS_EACH_END + 1 {
        (0..n).collect()
    } else {
        (0..CYCLE_ROWS_EACH_END)
            .chain(n - CYCLE_ROWS_EACH_END..n)
            .collect()
    };
    let mut rows = Vec::with_capacity(shown.len() + 1);
    for (k, &i) in shown.iter().enumerate() {
        if k == CYCLE_ROWS_EACH_END && shown.len() < n {
            rows.push(CycleRow::Gap {
                hidden: n - shown.len(),
            });
        }
        rows.push(CycleRow::Cycle {
            number: count(c.index[i] + 1.0),
            start: sig(c.start_time[i]),
            end: sig(c.end_time[i]),
            values: vec![
                sig(c.peak_outward_flux[i] * 1e3),
                sig(c.peak_inward_flux[i] * 1e3),
                sig(c.rms_face_flux[i] * 1e3),
                sig(c.peak_shear[i]),
                sig(c.work_cake[i]),
                sig(c.cake_removed[i] * 1e3),
            ],
        });
    }
    Some(CycleLog { rows })
}

/// The resolved case of every run (`case_json`), `None` where absent or not readable.
fn cases(runs: &[Run]) -> Vec<Option<Value>> {
    runs.iter()
        .map(|r| {
            r.meta
                .case_json
                .as_deref()
                .and_then(|j| serde_json::from_str(j).ok())
        })
        .collect()
}

/// The sections of the cases in the Inputs table's order: the usual ones first, then any
/// other in first-seen order (the title and description are shown elsewhere).
fn sections(cases: &[Option<Value>]) -> Vec<String> {
    const ORDER: [&str; 9] = [
        "fluid",
        "well",
        "pack",
        "cake",
        "invaded",
        "formation",
        "drive",
        "duration",
        "numerics",
    ];
    let mut sections: Vec<String> = ORDER.iter().map(|s| (*s).to_owned()).collect();
    for case in cases.iter().flatten() {
        if let Some(map) = case.as_object() {
            for k in map.keys() {
                if !sections.contains(k) && k != "title" && k != "description" {
                    sections.push(k.clone());
                }
            }
        }
    }
    sections
}

/// One section of every case, flattened to dotted keys, and the union of those keys over
/// the cases in first-seen order.
fn flat_section(
    cases: &[Option<Value>],
    section: &str,
) -> (Vec<Vec<(String, Value)>>, Vec<String>) {
    let flat: Vec<Vec<(String, Value)>> = cases
        .iter()
        .map(|c| {
            let mut out = Vec::new();
            if let Some(v) = c.as_ref().and_then(|c| c.get(section)) {
                flatten(section, v, &mut out);
            }
            out
        })
        .collect();
    let mut keys: Vec<String> = Vec::new();
    for (k, _) in flat.iter().flatten() {
        if !keys.contains(k) {
            keys.push(k.clone());
        }
    }
    (flat, keys)
}

/// The case inputs (dotted paths, in the Inputs table's order) whose resolved values differ
/// between the runs, or are given in some and not in others; empty for a single run or
/// when fewer than two runs have a readable case. Numbers are compared as the files hold
/// them (resolved SI), so `"1 min"` and `60` are the same duration.
pub fn differing_inputs(runs: &[Run]) -> Vec<String> {
    let cases: Vec<Option<Value>> = cases(runs).into_iter().filter(Option::is_some).collect();
    if cases.len() < 2 {
        return Vec::new();
    }
    let mut out = Vec::new();
    for section in sections(&cases) {
        let (flat, keys) = flat_section(&cases, &section);
        for key in keys {
            let values: Vec<Option<&Value>> = flat
                .iter()
                .map(|f| f.iter().find(|(k, _)| *k == key).map(|(_, v)| v))
                .collect();
            let same = values.windows(2).all(|w| match (w[0], w[1]) {
                (Some(Value::Number(a)), Some(Value::Number(b))) => a.as_f64() == b.as_f64(),
                (a, b) => a == b,
            });
            if !same {
                out.push(key);
            }
        }
    }
    out
}

/// Inputs of every run from `case_json`, one column per run, grouped by section.
pub fn inputs(runs: &[Run]) -> CompareTable {
    let cases = cases(runs);
    let mut t = compare_table(runs, "compare", "Input (resolved, SI; US in brackets)");
    for section in &sections(&cases) {
        // Union of the flattened keys of this section over all runs, in first-seen order.
        let (flat, keys) = flat_section(&cases, section);
        if keys.is_empty() {
            continue;
        }
        t.rows.push(TableRow::Section(section.clone()));
        for key in keys {
            let cells = flat
                .iter()
                .zip(&cases)
                .map(|(run_flat, case)| {
                    Cell::plain(match run_flat.iter().find(|(k, _)| *k == key) {
                        Some((_, v)) => input_value(&key, v),
                        None if case.is_none() => "case not readable".to_owned(),
                        None => "—".to_owned(),
                    })
                })
                .collect();
            t.rows.push(TableRow::Values {
                label: key,
                code: true,
                cells,
            });
        }
    }
    t
}

/// Nested objects become dotted keys: `cake.erosion.critical_shear`.
fn flatten(prefix: &str, v: &Value, out: &mut Vec<(String, Value)>) {
    match v {
        Value::Object(map) => {
            for (k, v) in map {
                flatten(&format!("{prefix}.{k}"), v, out);
            }
        }
        other => out.push((prefix.to_owned(), other.clone())),
    }
}

/// One input value with its unit, from the key name (the case holds SI numbers).
fn input_value(key: &str, v: &Value) -> String {
    match v {
        Value::Number(n) => {
            let x = n.as_f64().unwrap_or(f64::NAN);
            let name = key.rsplit('.').next().unwrap_or(key);
            match input_unit(name).or_else(|| input_units::of_path(key)) {
                Some(InputUnit::Fixed(s)) => with_units(x, &s),
                Some(InputUnit::Length) if x != 0.0 && x.abs() < 0.1 => {
                    with_units(x, &SMALL_LENGTH)
                }
                Some(InputUnit::Length) => with_units(x, &HEAD),
                Some(InputUnit::Time) => duration(x),
                Some(InputUnit::Temperature) => temperature(x),
                Some(InputUnit::Count) => count(x),
                None => format!("{} (SI)", sig(x)),
            }
        }
        Value::String(s) => s.clone(),
        Value::Bool(b) => if *b { "yes" } else { "no" }.to_owned(),
        Value::Null => "—".to_owned(),
        other => {
            let s = other.to_string();
            if s.chars().count() > 80 {
                format!("{}…", s.chars().take(80).collect::<String>())
            } else {
                s
            }
        }
    }
}

fn input_unit(name: &str) -> Option<InputUnit> {
    use InputUnit::*;
    let dimensionless = [
        "porosity",
        "open_area",
        "coverage",
        "sphericity",
        "theta",
        "safety_factor",
        "poisson_ratio",
        "dimension_ratio",
        "conductivity_ratio",
        "specific_gravity",
        "inward_weight",
        "outward_weight",
        "coverage_exponent",
        "discharge_coefficient",
        "efficiency",
    ];
    let counts = [
        "cells",
        "steps_per_cycle",
        "steps_per_decade",
        "per_decade",
        "startup_steps",
        "output_every",
        "ramp_cycles",
        "points",
    ];
    Some(match name {
        n if dimensionless.contains(&n) => Fixed(NUMBER),
        n if counts.contains(&n) => Count,
        "temperature" => Temperature,
        "conductivity" => Fixed(CONDUCTIVITY),
        "specific_storage" => Fixed(SPECIFIC_STORAGE),
        "frequency" => Fixed(FREQUENCY),
        "pumping_rate" | "pump_rate" | "rate" => Fixed(FLOW),
        "critical_shear" => Fixed(SHEAR),
        "collapse_rating" | "youngs_modulus" => Fixed(PRESSURE),
        "erodibility" => Fixed(ERODIBILITY),
        "forchheimer_beta" => Fixed(FORCHHEIMER_BETA),
        "storage" => Fixed(AREA),
        "duration" | "period" | "time_step" | "first_step" | "screen_loss" => Time,
        n if n.ends_with("_time") => Time,
        n if n.ends_with("radius")
            || n.ends_with("length")
            || n.ends_with("thickness")
            || n.ends_with("width")
            || n.ends_with("head")
            || (n.len() > 1
                && n.starts_with('d')
                && n[1..].chars().all(|c| c.is_ascii_digit()))
            || ["amplitude", "offset", "stroke", "submergence", "clearance"].contains(&n) =>
        {
            Length
        }
        _ => return None,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn input_value_works() {
        assert_eq!(
            input_value("well.screen_radius", &json!(0.203)),
            "0.203 m (0.666 ft)"
        );
        assert_eq!(
            input_value("pack.d50", &json!(0.0017)),
            "1.70 mm (0.0669 in)"
        );
        assert_eq!(
            input_value("fluid.temperature", &json!(286.15)),
            "286 K (13.0 °C)"
        );
        assert_eq!(input_value("numerics.cells", &json!("auto")), "auto");
        assert_eq!(input_value("numerics.cells", &json!(120)), "120");
        assert_eq!(input_value("drive.kind", &json!("sine_head")), "sine_head");
        assert_eq!(input_value("drive.unknown_key", &json!(2.5)), "2.50 (SI)");
        // Units from the case schema's quantity types, where the names give none. US units
        // by their exact definitions (US gal = 3.785411784 L, psi = 6894.757 Pa,
        // lb/ft³ = 16.018463 kg/m³): 2.59 L/s = 41.05 gpm, 10 kPa = 1.450 psi,
        // 2650 kg/m³ = 165.4 lb/ft³.
        assert_eq!(
            input_value("assessment.design_rate", &json!(0.00259)),
            "2.59 L/s (41.1 gpm)"
        );
        assert_eq!(
            input_value("cake.lift_off.median", &json!(1e4)),
            "10.0 kPa (1.45 psi)"
        );
        assert_eq!(
            input_value("invaded.fines.grain_density", &json!(2650.0)),
            "2650 kg/m³ (165 lb/ft³)"
        );
        assert_eq!(input_value("drive.strokes", &json!(10)), "10");
        assert_eq!(
            input_value("numerics.relative_tolerance", &json!(1e-3)),
            "0.00100"
        );
        assert_eq!(input_value("duration", &json!(300)), "300 s (5.00 min)");
        assert_eq!(input_value("drive.offset", &json!(0.0)), "0 m (0 ft)");
        assert_eq!(
            input_value("well.storage", &json!(0.1295)),
            "0.130 m² (1.39 ft²)"
        );
        assert_eq!(input_value("drive.ramp", &json!(true)), "yes");
    }

    /// Every numeric input of every shipped case (as resolved, what `case_json` holds) is
    /// shown with its unit or as a pure number, never as a bare "(SI)" value.
    #[test]
    fn every_shipped_input_has_its_unit() {
        let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
        let mut checked = 0;
        for entry in std::fs::read_dir(dir).unwrap() {
            let path = entry.unwrap().path();
            if path.extension().is_none_or(|e| e != "json") {
                continue;
            }
            let case = crate::case::load_case(&path).unwrap();
            let mut flat = Vec::new();
            for (section, v) in case.resolved.as_object().unwrap() {
                flatten(section, v, &mut flat);
            }
            for (k, v) in flat {
                let shown = input_value(&k, &v);
                assert!(
                    !shown.ends_with("(SI)"),
                    "{}: {k} = {shown}",
                    path.display()
                );
                checked += 1;
            }
        }
        assert!(checked > 100, "{checked}");
    }

    #[test]
    fn flatten_works() {
        let mut out = Vec::new();
        flatten(
            "cake",
            &json!({"thickness": 0.003, "erosion": {"critical_shear": 1e-5}}),
            &mut out,
        );
        let mut keys: Vec<_> = out.iter().map(|(k, _)| k.as_str()).collect();
        keys.sort_unstable();
        assert_eq!(keys, ["cake.erosion.critical_shear", "cake.thickness"]);
    }
}
