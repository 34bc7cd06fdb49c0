//! Case files, through the library: every shipped case loads and validates, its resolved
//! form reloads to the same model, unit conversions land on the solver in SI for every
//! drive kind, defaults are filled, and every file in `bad_cases/` fails with the
//! expected field path and a message naming the bad value.

mod common;

use boreflux::case::{load_case, parse_case, scenario_companions, scenarios, schema, LoadedCase};
use boreflux_solver::devices::{Backflow, Kinematics, PumpLaw};
use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::drive::{Drive, TableQuantity};
use boreflux_solver::model::{GridSpec, OuterBoundary, TimeSpec};
use boreflux_solver::run::DEFAULT_STEPS_PER_CYCLE;
use boreflux_solver::{run, Reporting};
use common::{bad_dir, cases_dir};
use serde_json::Value;
use std::f64::consts::PI;
use std::fmt::Debug;
use std::path::Path;

fn rel(got: f64, want: f64) -> f64 {
    (got - want).abs() / want.abs()
}

fn parse(text: &str) -> LoadedCase {
    parse_case(text, &cases_dir()).unwrap_or_else(|e| panic!("{e}"))
}

/// Conversions multiply exact decimal constants; a handful of roundings of at most half an
/// ulp each (1.1e-16) stay below this.
const EXACT: f64 = 1e-15;

/// JSON values equal, numbers to `EXACT` relative (serde_json's default float parser may
/// be an ulp off on the way back in).
fn json_close(a: &Value, b: &Value, path: &str) {
    match (a, b) {
        (Value::Number(x), Value::Number(y)) => {
            let (x, y) = (x.as_f64().unwrap(), y.as_f64().unwrap());
            assert!(x == y || rel(x, y) < EXACT, "{path}: {x} vs {y}");
        }
        (Value::Object(x), Value::Object(y)) => {
            let kx: Vec<_> = x.keys().collect();
            let ky: Vec<_> = y.keys().collect();
            assert_eq!(kx, ky, "{path}");
            for (k, v) in x {
                json_close(v, &y[k], &format!("{path}.{k}"));
            }
        }
        (Value::Array(x), Value::Array(y)) => {
            assert_eq!(x.len(), y.len(), "{path}");
            for (i, (u, v)) in x.iter().zip(y).enumerate() {
                json_close(u, v, &format!("{path}[{i}]"));
            }
        }
        _ => assert_eq!(a, b, "{path}"),
    }
}

/// Two values whose `Debug` texts agree token by token, numbers to `EXACT` relative: the
/// whole model is compared this way, so a field the resolved case forgot shows up.
fn debug_close(a: &impl Debug, b: &impl Debug, what: &str) {
    let (sa, sb) = (format!("{a:?}"), format!("{b:?}"));
    let tokens = |s: &str| -> Vec<String> {
        s.split(|c: char| c.is_whitespace() || ",(){}[]:".contains(c))
            .filter(|t| !t.is_empty())
            .map(str::to_owned)
            .collect()
    };
    let (ta, tb) = (tokens(&sa), tokens(&sb));
    assert_eq!(ta.len(), tb.len(), "{what}:\n{sa}\nvs\n{sb}");
    for (x, y) in ta.iter().zip(&tb) {
        match (x.parse::<f64>(), y.parse::<f64>()) {
            (Ok(u), Ok(v)) => assert!(u == v || rel(u, v) < EXACT, "{what}: {u} vs {v}"),
            _ => assert_eq!(x, y, "{what}"),
        }
    }
}

/// The resolved case of `c`, loaded again: the same model and the same resolved case.
fn reload(c: &LoadedCase, what: &str) -> LoadedCase {
    let text = serde_json::to_string_pretty(&c.resolved).unwrap();
    let again = parse_case(&text, Path::new("/nonexistent"))
        .unwrap_or_else(|e| panic!("{what} resolved: {e}"));
    debug_close(&again.model, &c.model, what);
    json_close(&again.resolved, &c.resolved, what);
    again
}

#[test]
fn shipped_cases_load_and_validate() {
    assert_eq!(
        scenarios()[0].0,
        "municipal-sand-gravel",
        "the default demo comes first"
    );
    for (name, text) in scenarios() {
        let path = cases_dir().join(format!("{name}.json"));
        let on_disk = std::fs::read_to_string(&path).unwrap();
        assert_eq!(
            &on_disk, text,
            "{name}: compiled-in text differs from the file"
        );
        let case = load_case(&path).unwrap_or_else(|e| panic!("{name}: {e}"));
        case.model.validate().unwrap();
        assert!(
            case.description
                .starts_with("Invented demo data, not from any source"),
            "{name}: the description must say the data are invented"
        );
        assert!(!case.title.is_empty(), "{name}");
        assert!(!case.notes.is_empty(), "{name}");
        // Loaded from text with the cases folder as base: the same model.
        let again = parse_case(text, &cases_dir()).unwrap();
        assert_eq!(again.model, case.model, "{name}");
        // The resolved case is itself a loadable case in SI that gives the same model.
        let reloaded = reload(&case, name);
        assert_eq!(reloaded.safety, case.safety, "{name}");
    }
}

#[test]
fn every_case_file_is_a_scenario() {
    let names: Vec<&str> = scenarios().iter().map(|(n, _)| *n).collect();
    let companions: Vec<&str> = scenario_companions().iter().map(|(_, f, _)| *f).collect();
    for entry in std::fs::read_dir(cases_dir()).unwrap() {
        let file = entry.unwrap().file_name().into_string().unwrap();
        if let Some(stem) = file.strip_suffix(".json") {
            assert!(names.contains(&stem), "{file} is not listed in scenarios()");
        } else if file.ends_with(".csv") {
            assert!(
                companions.contains(&file.as_str()),
                "{file} is not a companion"
            );
        }
    }
    for (scenario, file, text) in scenario_companions() {
        assert!(names.contains(scenario));
        let on_disk = std::fs::read_to_string(cases_dir().join(file)).unwrap();
        assert_eq!(&on_disk, text);
    }
}

/// A case written with non-SI units everywhere.
const UNITS_CASE: &str = r#"{
  "title": "units",
  "fluid": { "temperature": "59 degF" },
  "well": { "screen_radius": "4 in", "screen_length": "20 ft", "open_area": "12 %",
            "casing_radius": "6 in", "screen_loss": "40 s",
            "collapse_rating": "117 psi", "youngs_modulus": "400000 psi" },
  "pack": { "outer_radius": "7 in", "porosity": "32 %", "conductivity": "700 m/d",
            "specific_storage": "3e-6 1/ft" },
  "cake": { "thickness": "2 mm", "conductivity": "1e-7 cm/s",
            "erosion": { "critical_shear": "0.1 psi", "erodibility": "1e-6 m/s/Pa" } },
  "invaded": { "thickness": "3 cm", "conductivity_ratio": "25 %" },
  "formation": { "conductivity": "20 ft/d", "specific_storage": "1e-5 1/m",
                 "outer_radius": "300 ft", "outer_boundary": "no_flow" },
  "drive": { "kind": "sine_head", "amplitude": "1.5 psi", "frequency": "30 strokes/min",
             "offset": "-6 in" },
  "duration": "10 cycles",
  "numerics": { "cells": { "per_decade": 25 }, "steps_per_cycle": 64, "scheme": "theta", "theta": 0.6,
                "startup_steps": 3, "output_every": 10 }
}"#;

#[test]
fn units_land_on_the_solver_in_si() {
    let c = parse(UNITS_CASE);
    let m = &c.model;
    // Lengths: 1 in = 0.0254 m, 1 ft = 0.3048 m, exact (NIST SP 811, Appendix B).
    assert!(rel(m.well.screen_radius_m, 0.1016) < EXACT);
    assert!(rel(m.well.screen_length_m, 6.096) < EXACT);
    assert!(rel(m.well.casing_radius_m, 0.1524) < EXACT);
    assert!(rel(m.pack.outer_radius_m, 0.1778) < EXACT);
    assert!(rel(m.cake.unwrap().thickness_m, 0.002) < EXACT);
    assert!(rel(m.invaded.as_ref().unwrap().thickness_m, 0.03) < EXACT);
    assert!(rel(m.formation.outer_radius_m.unwrap(), 91.44) < EXACT);
    assert_eq!(m.formation.outer_boundary, OuterBoundary::NoFlow);
    // Percent: 1 % = 0.01, exact by definition.
    assert!(rel(m.well.open_area, 0.12) < EXACT);
    assert!(rel(m.pack.medium.porosity, 0.32) < EXACT);
    assert!(rel(m.well.linear_loss_s, 40.0) < EXACT);
    // Conductivity: 700 m/d = 700/86400 m/s (1 d = 86400 s, exact); 20 ft/d =
    // 20 × 0.3048/86400 m/s (NIST SP 811); 1e-7 cm/s = 1e-9 m/s (SI prefix).
    assert!(rel(m.pack.medium.conductivity_m_s, 700.0 / 86_400.0) < EXACT);
    assert!(
        rel(
            m.formation.medium.conductivity_m_s,
            7.055_555_555_555_556e-5
        ) < EXACT
    );
    assert!(rel(m.cake.unwrap().conductivity_m_s, 1e-9) < EXACT);
    // Invaded zone: 25 % of the formation's conductivity.
    let kf = m.formation.medium.conductivity_m_s;
    assert!(
        rel(
            m.invaded.as_ref().unwrap().medium.conductivity_m_s,
            0.25 * kf
        ) < EXACT
    );
    // Specific storage: 3e-6 1/ft = 3e-6/0.3048 1/m (NIST SP 811).
    assert!(
        rel(
            m.pack.medium.specific_storage_per_m,
            9.842_519_685_039_37e-6
        ) < EXACT
    );
    // Pressure: 1 psi = 6894.757293168362 Pa (NIST SP 811, lbf and in exact).
    let psi = 6_894.757_293_168_362;
    let e = m.cake.unwrap().erosion.unwrap();
    assert!(rel(e.critical_shear_pa, 0.1 * psi) < EXACT);
    assert!(rel(e.erodibility_m_s_pa, 1e-6) < EXACT);
    assert!(rel(c.safety.collapse_rating_pa.unwrap(), 117.0 * psi) < EXACT);
    assert!(rel(c.safety.youngs_modulus_pa.unwrap(), 400_000.0 * psi) < EXACT);
    // Temperature: 59 degF = 15 degC (NIST SP 811). Water at 15 degC: ρ = 999.102621
    // kg/m³, μ = 1.1375676e-3 Pa s (iapws.IAPWS95, docs/physics.md §5.3). Tolerances: the
    // density formula is within 1.1e-3 kg/m³ of IAPWS-95; the viscosity table node prints
    // 6 digits (≤ 5e-9 Pa s).
    assert!((m.fluid.density_kg_m3 - 999.102_621).abs() < 2e-3);
    assert!((m.fluid.viscosity_pa_s - 1.137_567_6e-3).abs() < 5e-9);
    let t = c.resolved["fluid"]["temperature"].as_f64().unwrap();
    assert!((t - 288.15).abs() < 1e-12, "{t}");
    // Head from pressure: 1.5 psi / (ρ g), ρ = 999.102621 (as above), g = 9.80665 exact:
    // 1.5 × 6894.757293 / (999.102621 × 9.80665) = 1.055554 m. Tolerance 2e-6 relative
    // from the density formula's 1.1e-3 kg/m³.
    let Drive::SineHead(s) = &m.drive else {
        panic!("not a sine drive: {:?}", m.drive)
    };
    let want = 1.5 * psi / (999.102_621 * 9.806_65);
    assert!(
        rel(s.amplitude_m, want) < 2e-6,
        "{} vs {want}",
        s.amplitude_m
    );
    assert!(rel(s.offset_m, -0.1524) < EXACT);
    // 30 strokes/min = 0.5 Hz (1 min = 60 s); 10 cycles of 2 s = 20 s.
    assert!(rel(s.frequency_hz, 0.5) < EXACT);
    assert!(rel(m.duration_s, 20.0) < EXACT);
    assert_eq!(m.numerics.grid, GridSpec::PerDecade(25.0));
    assert_eq!(m.numerics.time, TimeSpec::StepsPerCycle(64));
    assert_eq!(m.numerics.theta, 0.6);
    assert_eq!(m.numerics.startup_steps, 3);
    assert_eq!(c.output_every, 10);
    // The resolved case carries the same SI numbers.
    assert_eq!(
        c.resolved["well"]["screen_radius"].as_f64(),
        Some(m.well.screen_radius_m)
    );
    assert_eq!(c.resolved["duration"].as_f64(), Some(20.0));
    assert_eq!(c.resolved["drive"]["kind"], "sine_head");
}

/// The smallest case: only required keys.
const MINIMAL_CASE: &str = r#"{
  "well": { "screen_radius": 0.1, "screen_length": 6, "open_area": 0.12 },
  "pack": { "outer_radius": 0.2, "porosity": 0.32, "conductivity": 8e-3 },
  "formation": { "conductivity": 2e-4, "specific_storage": 1e-5 },
  "drive": { "kind": "sine_head", "amplitude": 1.5, "frequency": 0.5 },
  "duration": 600
}"#;

#[test]
fn defaults_are_filled() {
    let c = parse(MINIMAL_CASE);
    let m = &c.model;
    let r = &c.resolved;
    // docs/formats.md defaults: water at 15 degC (ρ from iapws.IAPWS95, docs/physics.md §5.3, within
    // the density formula's 1.1e-3 kg/m³).
    assert!((m.fluid.density_kg_m3 - 999.102_621).abs() < 2e-3);
    assert_eq!(r["fluid"]["temperature"], 288.15);
    // casing_radius = screen_radius; storage = π r_c² (free water surface).
    assert_eq!(m.well.casing_radius_m, 0.1);
    assert!(rel(m.well.storage_m2, PI * 0.01) < EXACT);
    assert_eq!(m.well.discharge_coefficient, Some(0.6));
    assert_eq!(r["well"]["discharge_coefficient"], 0.6);
    assert_eq!(m.well.linear_loss_s, 0.0);
    // Pack storage is the formation's; formation porosity 0.3; Darcy without d50.
    assert_eq!(m.pack.medium.specific_storage_per_m, 1e-5);
    assert_eq!(m.formation.medium.porosity, 0.3);
    assert_eq!(m.pack.medium.forchheimer_beta_s2_m2, 0.0);
    assert_eq!(m.formation.outer_radius_m, None);
    assert_eq!(r["formation"]["outer_radius"], "auto");
    assert_eq!(r["formation"]["outer_boundary"], "fixed_head");
    assert_eq!(m.formation.outer_boundary, OuterBoundary::FixedHead);
    assert!(m.cake.is_none() && m.invaded.is_none());
    assert!(r.get("cake").is_none());
    // Numerics: 200 steps per cycle (the solver's default), θ 0.5, 2 start-up steps.
    assert_eq!(
        m.numerics.time,
        TimeSpec::StepsPerCycle(boreflux_solver::run::DEFAULT_STEPS_PER_CYCLE)
    );
    assert_eq!(r["numerics"]["steps_per_cycle"], 200);
    assert_eq!(r["numerics"]["method"], "time");
    assert_eq!(r["numerics"]["cells"], "auto");
    assert_eq!(m.numerics.theta, 0.5);
    assert_eq!(m.numerics.startup_steps, 2);
    assert_eq!(c.output_every, 1);
    assert_eq!(r["drive"]["offset"], 0.0);
    assert_eq!(r["drive"]["ramp_cycles"], 0.0);
    // Collapse-check defaults.
    assert_eq!(c.safety.safety_factor, 2.0);
    assert_eq!(c.safety.formation_specific_gravity, 2.65);
    assert_eq!(c.safety.material, None);
    assert_eq!(c.title, "");
}

#[test]
fn pack_conductivity_is_estimated_from_the_gradation() {
    let text = MINIMAL_CASE.replace(
        r#""pack": { "outer_radius": 0.2, "porosity": 0.32, "conductivity": 8e-3 }"#,
        r#""pack": { "outer_radius": 0.2, "porosity": 0.35, "d10": "1.2 mm",
                         "d50": "2 mm", "d60": "2.1 mm" },
               "fluid": { "temperature": "20 degC" }"#,
    );
    let c = parse(&text);
    let pack = c.model.pack.medium;
    // Cu = 1.75 (well sorted): Kozeny–Carman on d50 = 2 mm, n = 0.35, water at 20 degC:
    // 2.204010e-2 m/s (computed with numpy, docs/physics.md §4.2). Tolerance 1e-5: the table's
    // water is IAPWS at 20 degC; ours is within 1.1e-6 (density) and 5e-6 (viscosity).
    assert!(
        rel(pack.conductivity_m_s, 2.204_010e-2) < 1e-5,
        "{}",
        pack.conductivity_m_s
    );
    // Ergun β for d = 2 mm, n = 0.35: 1.352685e3 s²/m² (numpy, docs/physics.md §4.2, 7 digits).
    assert!(rel(pack.forchheimer_beta_s2_m2, 1.352_685e3) < 1e-6);
    assert_eq!(pack.grain_diameter_m, Some(2e-3));
    let all = c.notes.join("\n");
    assert!(all.contains("estimated from the gradation"), "{all}");
    assert!(all.contains("well sorted"), "{all}");
    assert!(all.contains("Hazen"), "{all}");
    // The resolved case keeps the estimate as the conductivity.
    assert_eq!(
        c.resolved["pack"]["conductivity"].as_f64(),
        Some(pack.conductivity_m_s)
    );

    // Shape ψ = 0.73 (subangular class): ψ d replaces d (media.rs convention), so
    // K scales by ψ² and β by 1/ψ from the same table row.
    let angular = text.replace(
        r#""d60": "2.1 mm""#,
        r#""d60": "2.1 mm", "grain_shape": "subangular_sand""#,
    );
    let a = parse(&angular).model.pack.medium;
    assert!(rel(a.conductivity_m_s, 2.204_010e-2 * 0.73 * 0.73) < 1e-5);
    assert!(rel(a.forchheimer_beta_s2_m2, 1.352_685e3 / 0.73) < 1e-6);

    // A given conductivity overrides; ten times the estimate draws a warning.
    let given = text.replace(
        r#""porosity": 0.35,"#,
        r#""porosity": 0.35, "conductivity": "0.22 m/s","#,
    );
    let g = parse(&given);
    assert_eq!(g.model.pack.medium.conductivity_m_s, 0.22);
    assert!(
        g.warnings.iter().any(|w| w.contains("factor of 10")),
        "{:?}",
        g.warnings
    );
}

#[test]
fn non_periodic_drives_get_geometric_steps() {
    let text = MINIMAL_CASE
        .replace(
            r#""kind": "sine_head", "amplitude": 1.5, "frequency": 0.5"#,
            r#""kind": "constant_rate", "pumping_rate": "25 gpm""#,
        )
        .replace(r#""duration": 600"#, r#""duration": "2 h""#);
    let c = parse(&text);
    // 25 gpm = 25 × 3.785411784e-3 / 60 m³/s (US gallon exact, NIST SP 811).
    let Drive::ConstantRate { pumping_rate_m3_s } = c.model.drive else {
        panic!("{:?}", c.model.drive)
    };
    assert!(rel(pumping_rate_m3_s, 25.0 * 3.785_411_784e-3 / 60.0) < EXACT);
    assert!(rel(c.model.duration_s, 7200.0) < EXACT);
    // Solver defaults: 40 steps per decade from max(1e-8 × duration, 1e-5 s) = 7.2e-5 s.
    assert_eq!(
        c.model.numerics.time,
        TimeSpec::StepsPerDecade {
            per_decade: 40.0,
            first_step_s: 7200.0 * 1e-8
        }
    );
    assert_eq!(c.resolved["numerics"]["steps_per_decade"], 40.0);

    let slug = MINIMAL_CASE.replace(
        r#""kind": "sine_head", "amplitude": 1.5, "frequency": 0.5"#,
        r#""kind": "slug", "initial_head": "-2 ft""#,
    );
    let s = parse(&slug);
    // -2 ft = -0.6096 m (NIST SP 811).
    assert_eq!(
        s.model.drive,
        Drive::Slug {
            initial_head_m: -0.6096
        }
    );
}

#[test]
fn table_drive_reads_its_csv_beside_the_case() {
    let c = load_case(&cases_dir().join("irrigation-table.json")).unwrap();
    let Drive::Table(t) = &c.model.drive else {
        panic!("{:?}", c.model.drive)
    };
    // cases/irrigation-table.csv: 50 L/s for 3 min, then off until 5 min.
    assert_eq!(t.times_s, [0.0, 180.0, 180.0, 300.0]);
    assert_eq!(t.values, [0.05, 0.05, 0.0, 0.0]);
    assert_eq!(t.quantity, TableQuantity::PumpingRate);
    assert!(t.repeat);
    // "3 cycles" of the 300 s table period.
    assert_eq!(c.model.duration_s, 900.0);
    assert_eq!(
        c.resolved["drive"]["points"][1],
        serde_json::json!([180.0, 0.05])
    );
    assert!(c.resolved["drive"].get("file").is_none());
    // 64.4 degF = 18 degC (NIST SP 811).
    let t_k = c.resolved["fluid"]["temperature"].as_f64().unwrap();
    assert!((t_k - 291.15).abs() < 1e-9, "{t_k}");
}

#[test]
fn table_files_with_errors_name_the_line() {
    let dir = tempfile::tempdir().unwrap();
    let case = |csv: &str| {
        std::fs::write(dir.path().join("t.csv"), csv).unwrap();
        let text = MINIMAL_CASE.replace(
            r#""kind": "sine_head", "amplitude": 1.5, "frequency": 0.5"#,
            r#""kind": "table", "file": "t.csv", "quantity": "head""#,
        );
        parse_case(&text, dir.path())
    };
    let ok = case("0,0\n10,1\n20,0\n").unwrap();
    assert_eq!(ok.model.drive.period_s(), None);
    let e = case("time_s,head_m\n0,0\n10,abc\n").unwrap_err();
    assert_eq!(e.field, "drive.file");
    assert!(
        // The line is located, not quoted (the file may be someone else's, not a table).
        e.message.contains("line 3")
            && e.message.contains("column 2 is not a number")
            && !e.message.contains("abc"),
        "{e}"
    );
    let e = case("0,0\n10,inf\n").unwrap_err();
    assert!(
        e.message.contains("line 2") && e.message.contains("inf"),
        "{e}"
    );
    let e = case("0,0\n10,1\n5,1\n").unwrap_err();
    assert!(
        e.message.contains("line 3") && e.message.contains("5 s after 10 s"),
        "{e}"
    );
    let e = case("0;0\n").unwrap_err();
    assert!(e.message.contains("two columns"), "{e}");
}

#[test]
fn safety_inputs_are_read() {
    let c = load_case(&cases_dir().join("domestic-fine-sand-pvc.json")).unwrap();
    assert_eq!(c.safety.material.as_deref(), Some("pvc"));
    assert_eq!(c.safety.dimension_ratio, Some(21.0));
    assert_eq!(c.safety.safety_factor, 2.0);
    let text = MINIMAL_CASE
        .replace(
            r#""open_area": 0.12 }"#,
            r#""open_area": 0.12, "material": "PVC", "poisson_ratio": 0.38,
                "safety_factor": 1.5 }"#,
        )
        .replace(
            r#""specific_storage": 1e-5 }"#,
            r#""specific_storage": 1e-5, "specific_gravity": 2.7 }"#,
        );
    let c = parse(&text);
    assert_eq!(c.safety.material.as_deref(), Some("pvc"));
    assert_eq!(c.safety.poisson_ratio, Some(0.38));
    assert_eq!(c.safety.safety_factor, 1.5);
    assert_eq!(c.safety.formation_specific_gravity, 2.7);
    // pvc without dimension ratio or rating: the collapse check cannot be made.
    assert!(
        c.warnings.iter().any(|w| w.contains("collapse")),
        "{:?}",
        c.warnings
    );
}

#[test]
fn missing_file_is_reported() {
    let e = load_case(Path::new("/nonexistent/case.json")).unwrap_err();
    assert_eq!(e.field, "");
    assert!(
        e.to_string()
            .starts_with("cannot read case file /nonexistent/case.json: "),
        "{e}"
    );
}

/// (file in bad_cases/, expected field, substrings the message must contain).
#[rustfmt::skip]
const BAD_CASES: &[(&str, &str, &[&str])] = &[
    ("malformed_json", "", &["line 3 column 3", "invalid JSON", "expected `,` or `}`"]),
    ("nan_literal", "", &["line 3 column 24", "invalid JSON"]),
    ("unknown_key_hint", "pack.porosty", &["unknown key `porosty`", "did you mean `porosity`?"]),
    ("unknown_section", "formaton", &["unknown key `formaton`", "did you mean `formation`?"]),
    ("material_misspelt", "well.material", &["unknown material \"pcv\"", "did you mean `pvc`?", "pvc, steel, stainless"]),
    ("unknown_drive_key", "drive.amplitud", &["`amplitud`", "did you mean `amplitude`?"]),
    ("missing_required_key", "well.screen_length", &["required key is missing"]),
    ("missing_drive", "drive", &["required key is missing"]),
    ("nan_as_string", "pack.porosity", &["\"NaN\""]),
    ("negative_formation_k", "formation.conductivity", &["must be positive", "-0.0002 m/s"]),
    ("negative_pack_k", "pack.conductivity", &["must be positive", "-0.008 m/s"]),
    ("negative_screen_length", "well.screen_length", &["must be positive", "got -6 m"]),

    ("negative_cake_k", "cake.conductivity", &["must be a positive", "got -0.00000001"]),
    ("zero_frequency", "drive.frequency", &["must be positive", "got 0 Hz"]),
    ("frequency_and_period", "drive.period", &["either frequency or period"]),
    ("duration_shorter_than_step", "duration", &["shorter than one time step (10 s)", "got 5 s"]),
    ("negative_duration", "duration", &["must be positive", "got -300 s"]),
    ("cake_thicker_than_annulus", "cake.thickness", &["thinner than the annulus (0.1 m)", "got 0.15 m"]),
    ("pack_inside_screen", "pack.outer_radius", &["larger than well.screen_radius (0.1 m)", "got 0.08 m"]),
    ("outer_radius_inside_borehole", "formation.outer_radius", &["well beyond the borehole", "got 0.2 m"]),
    ("unknown_drive_kind", "drive.kind", &["unknown drive kind \"surge\"", "sine_head, constant_rate, slug, table"]),
    ("harmonic_method", "numerics.method", &["\"harmonic\" is not available for a run", "`boreflux check` prints the periodic steady state"]),
    ("conductivity_in_length_unit", "pack.conductivity", &["\"mm\" is a unit of length", "conductivity is expected"]),
    ("unknown_unit", "well.screen_radius", &["unknown unit \"inchs\"", "m, cm, mm, in, ft"]),
    ("unit_letter_case", "drive.frequency", &["unknown unit \"hz\"", "did you mean \"Hz\"?"]),
    ("flow_rate_for_head", "drive.amplitude", &["\"L/s\" is a unit of flow rate", "head is expected"]),
    ("porosity_above_one", "pack.porosity", &["must be between 0 and 1, got 1.3"]),
    ("open_area_as_percent_number", "well.open_area", &["got 30", "\"30 %\""]),
    ("open_area_zero", "well.open_area", &["must be in (0, 1], got 0"]),
    ("temperature_bare_number", "fluid.temperature", &["got 12 K", "a bare number is kelvin"]),
    ("temperature_below_freezing", "fluid.temperature", &["-5.00 degC"]),
    // -20 degC is 253.15 K exactly (0 degC = 273.15 K by definition, SI Brochure 2019); in
    // binary the sum is 253.14999999999998, shown without that round-off.
    ("temperature_round_off", "fluid.temperature", &["got 253.15 K (-20.00 degC)"]),
    ("cycles_without_period", "duration", &["\"10 cycles\" needs a periodic drive"]),
    ("invaded_both_conductivities", "invaded.conductivity", &["not both"]),
    ("pack_without_k_or_grains", "pack.conductivity", &["give a conductivity or grain sizes (d10, or d50)"]),
    ("grain_sizes_out_of_order", "pack.d50", &["must not be smaller than d10 (0.0018 m)", "got 0.0012 m"]),
    ("quantity_wrong_type", "well.screen_length", &["got true"]),
    ("bad_outer_boundary", "formation.outer_boundary", &["unknown value \"fixed\"", "did you mean `fixed_head`?"]),
    ("steps_per_cycle_not_periodic", "numerics.steps_per_cycle", &["periodic drives, got 100"]),
    ("too_few_cells", "numerics.cells", &["at least 10, got 5"]),
    ("per_decade_below_one", "numerics.cells.per_decade", &["at least 1, got 0.5"]),
    ("theta_below_half", "numerics.theta", &["got 0.3"]),
    ("theta_under_tr_bdf2", "numerics.theta", &["is for the θ-scheme", "scheme"]),
    ("table_file_missing", "drive.file", &["cannot read table file", "no-such-table.csv"]),
    ("table_not_from_zero", "drive.points", &["first time must be 0 s, got 5 s"]),
    ("dimension_ratio_too_small", "well.dimension_ratio", &["greater than 2", "got 1.5"]),
    ("sphericity_and_shape", "pack.grain_shape", &["either sphericity or grain_shape"]),
    ("erosion_missing_erodibility", "cake.erosion.erodibility", &["required key is missing"]),
    ("block_radius_beyond_casing", "drive.block_radius", &["must not exceed the casing radius (0.1 m)", "got 0.12 m"]),
    ("reversal_time_on_sinusoidal", "drive.reversal_time", &["\"trapezoidal\" only"]),
    ("trapezoidal_without_reversal", "drive.reversal_time", &["required key is missing for kinematics \"trapezoidal\""]),
    ("frequency_and_strokes_per_minute", "drive.strokes_per_minute", &["either frequency or strokes_per_minute"]),
    ("backflow_volume_and_riser", "drive.backflow_volume", &["either backflow_volume or riser_radius", "not both"]),
    ("intake_depth_missing", "drive.intake_depth", &["missing"]),
    ("pumping_rate_and_curve", "drive.pump_curve", &["either pumping_rate or pump_curve"]),
    ("zero_nozzles", "drive.nozzles", &["at least 1, got 0"]),
    ("jet_passes_overlap", "drive.jet_width", &["wider than the screen's circumference"]),
    ("negative_lift_rate", "drive.lift_rate", &["must be positive", "got -0.5 m/s"]),
    ("cup_radius_beyond_casing", "drive.cup_radius", &["must not exceed well.casing_radius (0.1 m)", "got 0.127 m"]),
    ("nested_schedule", "drive.stages[1].drive.kind", &["stages cannot nest"]),
    ("unknown_key_in_stage", "drive.stages[1].drive.strok", &["unknown key `strok`", "did you mean `stroke`?"]),
    ("stage_duration_missing", "drive.stages[0].duration", &["required key is missing"]),
    ("stage_reversal_too_long", "drive.stages[0].drive.reversal_time", &["shorter than half a stroke period (1.5 s)", "got 2 s"]),
    ("schedule_duration_mismatch", "duration", &["must equal the sum of the stage durations (300 s)", "or be left out", "got 600 s"]),
    ("duration_missing", "duration", &["required key is missing", "only a schedule may leave it out"]),
    // Ranges (solver/src/limits.rs): each message gives the range and its reason.
    ("cells_too_many", "numerics.cells", &["at most 100000", "got 1000000000"]),
    ("cells_u64_max", "numerics.cells", &["at most 100000", "got 18446744073709551615"]),
    ("cells_per_decade_huge", "numerics.cells.per_decade", &["between 1 and 10000", "got 1e300"]),
    ("outer_radius_huge", "formation.outer_radius", &["between 0.01 m and 100000 m", "got 1e308 m"]),
    ("screen_length_huge", "well.screen_length", &["between 0.01 m and 2000 m", "screened lengths", "got 1e308 m"]),
    ("amplitude_huge", "drive.amplitude", &["at most 2000 m in magnitude", "got 1e6 m"]),
    ("duration_huge", "duration", &["between 0.001 s and 1e8 s", "got 1e12 s"]),
    ("time_step_tiny", "numerics.time_step", &["between 1e-6 s and 1e8 s", "got 1e-300 s"]),
    ("surge_stroke_huge", "drive.stroke", &["between 0.001 m and 10 m", "got 1e308 m"]),
    ("strokes_per_minute_huge", "drive.strokes_per_minute", &["as a frequency (strokes_per_minute / 60)", "at most 600 a minute", "got 16666.666666666668 Hz"]),
    ("stage_strokes_per_minute_huge", "drive.stages[1].drive.strokes_per_minute", &["as a frequency (strokes_per_minute / 60)", "got 1666.6666666666667 Hz"]),
    ("collapse_rating_huge", "well.collapse_rating", &["between 1000 Pa and 1e9 Pa", "got 1e308 Pa"]),
    ("grain_size_huge", "pack.d10", &["between 1e-7 m and 1 m", "got 1e308 m"]),
    ("surge_discharge_coefficient_above_one", "drive.discharge_coefficient", &["must be in (0, 1]", "got 5"]),
    ("jet_width_nanometres", "drive.jet_width", &["between 0.0001 m and 5 m", "got 1e-8 m"]),
    ("table_period_nanoseconds", "drive.points", &["time span", "between 0.001 s and 1e8 s", "got 1e-9 s"]),
    // Geometry that cannot exist.
    ("casing_outside_borehole", "well.casing_radius", &["smaller than the borehole radius pack.outer_radius (0.2 m)", "got 0.3 m"]),
    ("valve_area_beyond_casing", "drive.valve_area", &["smaller than the casing's cross-section (0.031416 m2", "got 0.05 m2"]),
    // Text and JSON structure.
    ("title_with_nul", "title", &["NUL character"]),
    ("duplicate_key", "pack.porosity", &["key written twice"]),
    ("duplicate_drive", "drive", &["key written twice"]),
    ("top_level_array", "", &["one JSON object", "holds an array"]),
];

#[test]
fn bad_cases_name_the_field_and_the_value() {
    assert!(BAD_CASES.len() >= 20);
    let mut files: Vec<String> = std::fs::read_dir(bad_dir())
        .unwrap()
        .map(|e| e.unwrap().file_name().into_string().unwrap())
        .collect();
    files.sort();
    for f in &files {
        let stem = f
            .strip_suffix(".json")
            .expect("only .json files in bad_cases/");
        assert!(
            BAD_CASES.iter().any(|(n, ..)| *n == stem),
            "{f} has no expectation in BAD_CASES"
        );
    }
    for (name, field, parts) in BAD_CASES {
        let err = load_case(&bad_dir().join(format!("{name}.json")))
            .err()
            .unwrap_or_else(|| panic!("{name} loaded without error"));
        assert_eq!(err.field, *field, "{name}: {err}");
        for p in *parts {
            assert!(
                err.message.contains(p),
                "{name}: {p:?} not in {:?}",
                err.message
            );
        }
        let shown = err.to_string();
        if field.is_empty() {
            assert_eq!(shown, err.message);
        } else {
            assert_eq!(shown, format!("{field}: {}", err.message));
        }
    }
}

#[test]
fn bad_cases_differ_from_a_valid_case_in_one_place() {
    // The bad cases were written as this valid case plus one mistake, so each error above
    // comes from that mistake and not from something else in the file.
    let base = r#"{
      "title": "bad case",
      "well": {"screen_radius": "0.1 m", "screen_length": "6 m", "open_area": 0.12},
      "pack": {"outer_radius": "0.2 m", "porosity": 0.32, "conductivity": "8e-3 m/s"},
      "cake": {"thickness": "2 mm", "conductivity": "1e-8 m/s"},
      "formation": {"conductivity": "2e-4 m/s", "specific_storage": "1e-5 1/m"},
      "drive": {"kind": "sine_head", "amplitude": "1.5 m", "frequency": "0.5 Hz"},
      "duration": "10 min"
    }"#;
    parse_case(base, &bad_dir()).unwrap();
}

#[test]
fn schema_knows_every_key_of_the_shipped_cases() {
    let s = schema();
    let defs = &s["$defs"];
    let resolve = |v: &Value| -> Value {
        let mut v = v.clone();
        // Optional sections are `anyOf [{$ref}, null]` or a plain `$ref`.
        if let Some(alts) = v.get("anyOf").and_then(Value::as_array) {
            if let Some(r) = alts.iter().find(|a| a.get("$ref").is_some()) {
                v = r.clone();
            }
        }
        match v.get("$ref").and_then(Value::as_str) {
            Some(r) => defs[r.trim_start_matches("#/$defs/")].clone(),
            None => v,
        }
    };
    for (name, text) in scenarios() {
        let case: Value = serde_json::from_str(text).unwrap();
        for (section, body) in case.as_object().unwrap() {
            let sec = resolve(&s["properties"][section]);
            assert!(
                !sec.is_null(),
                "{name}: top-level key {section} not in the schema"
            );
            let Some(keys) = body.as_object() else {
                continue;
            };
            if section == "drive" {
                check_drive_keys(&sec, body, defs, &format!("{name}: drive"));
                continue;
            }
            for key in keys.keys() {
                let known = sec["properties"].get(key).is_some();
                assert!(known, "{name}: {section}.{key} not in the schema");
            }
        }
    }
}

/// Every key of `drive` is in the schema alternative of its own kind; the stages of a
/// schedule are checked the same way against the stage schema.
fn check_drive_keys(schema: &Value, drive: &Value, defs: &Value, at: &str) {
    let kind = drive["kind"].as_str().unwrap();
    let alt = schema["oneOf"]
        .as_array()
        .unwrap()
        .iter()
        .find(|a| a["properties"]["kind"]["const"] == kind)
        .unwrap_or_else(|| panic!("{at}: kind {kind} not in the schema"));
    for key in drive.as_object().unwrap().keys() {
        assert!(
            alt["properties"].get(key).is_some(),
            "{at}.{key} not in the schema of {kind}"
        );
    }
    if let Some(stages) = drive["stages"].as_array() {
        let r = alt["properties"]["stages"]["items"]["$ref"]
            .as_str()
            .unwrap();
        let stage = &defs[r.trim_start_matches("#/$defs/")];
        for (i, st) in stages.iter().enumerate() {
            for key in st.as_object().unwrap().keys() {
                assert!(
                    stage["properties"].get(key).is_some(),
                    "{at}.stages[{i}].{key} not in the schema"
                );
            }
            let inner = &stage["properties"]["drive"];
            check_drive_keys(
                inner,
                &st["drive"],
                defs,
                &format!("{at}.stages[{i}].drive"),
            );
        }
    }
}

/// Checks: every key of every drive kind, top level and in a stage, has a description in
/// the schema (the defaults in brackets live there), and a stage cannot be a schedule.
#[test]
fn every_drive_key_is_documented() {
    let s = schema();
    let drive = &s["properties"]["drive"];
    let stage = &s["$defs"]["StageKeys"]["properties"]["drive"];
    for (what, alternatives) in [("drive", drive), ("stage drive", stage)] {
        for alt in alternatives["oneOf"].as_array().unwrap() {
            let kind = alt["properties"]["kind"]["const"].as_str().unwrap();
            assert!(alt["description"].as_str().is_some_and(|d| !d.is_empty()));
            for (key, v) in alt["properties"].as_object().unwrap() {
                if key != "kind" {
                    let d = v["description"].as_str().unwrap_or("");
                    assert!(!d.is_empty(), "{what} {kind}.{key} has no description");
                }
            }
        }
    }
    let stage_kinds: Vec<&str> = stage["oneOf"]
        .as_array()
        .unwrap()
        .iter()
        .map(|a| a["properties"]["kind"]["const"].as_str().unwrap())
        .collect();
    assert_eq!(
        stage_kinds.len() + 1,
        drive["oneOf"].as_array().unwrap().len()
    );
    assert!(!stage_kinds.contains(&"schedule"));
    // Defaults the brief fixes are written in the descriptions.
    let text = drive.to_string();
    for d in [
        "[0.6]",
        "[0 = solid block]",
        "[5 s",
        "[0.5, an",
        "[2]",
        "[10 mm]",
    ] {
        assert!(text.contains(d), "no default {d} in the drive schema");
    }
}

// ---------------------------------------------------------------------------------------
// Development drives
// ---------------------------------------------------------------------------------------

/// `MINIMAL_CASE` with `drive`, `duration` (left out when `None`) and a 4-in casing radius.
fn drive_case(drive: &str, duration: Option<&str>) -> String {
    let text = MINIMAL_CASE
        .replace(
            r#""open_area": 0.12 }"#,
            r#""open_area": 0.12, "casing_radius": "4 in" }"#,
        )
        .replace(
            r#""drive": { "kind": "sine_head", "amplitude": 1.5, "frequency": 0.5 }"#,
            &format!(r#""drive": {drive}"#),
        );
    match duration {
        Some(d) => text.replace(r#""duration": 600"#, &format!(r#""duration": {d}"#)),
        None => text.replace(",\n  \"duration\": 600", ""),
    }
}

fn parse_drive_case(drive: &str, duration: Option<&str>) -> LoadedCase {
    let c = parse(&drive_case(drive, duration));
    reload(&c, drive);
    c
}

/// 1 in = 0.0254 m, exact by definition (NIST SP 811, Appendix B); the 4-in casing radius.
const CASING_M: f64 = 0.1016;

#[test]
fn surge_block_keys_land_in_si() {
    let c = parse_drive_case(
        r#"{ "kind": "surge_block", "block_radius": "3.5 in", "stroke": "3 ft",
             "strokes_per_minute": 24, "kinematics": "trapezoidal", "reversal_time": "0.2 s",
             "discharge_coefficient": 0.7, "valve_area": "2 in2", "ramp_cycles": 2 }"#,
        Some(r#""10 cycles""#),
    );
    let Drive::SurgeBlock(b) = &c.model.drive else {
        panic!("{:?}", c.model.drive)
    };
    // 3.5 in = 0.0889 m, 3 ft = 0.9144 m, 2 in² = 2 × 6.4516e-4 m² (NIST SP 811, exact).
    assert!(rel(b.block_radius_m, 0.0889) < EXACT);
    assert!(rel(b.casing_radius_m, CASING_M) < EXACT);
    assert!(rel(b.stroke_m, 0.9144) < EXACT);
    assert!(rel(b.valve_area_m2, 1.290_32e-3) < EXACT);
    // 24 strokes per minute = 0.4 Hz (1 min = 60 s); 10 cycles of 2.5 s = 25 s.
    assert!(rel(b.frequency_hz, 0.4) < EXACT);
    assert!(rel(c.model.duration_s, 25.0) < EXACT);
    assert_eq!(b.kinematics, Kinematics::Trapezoidal { reversal_s: 0.2 });
    assert_eq!(b.discharge_coefficient, 0.7);
    assert_eq!(b.ramp_cycles, 2.0);
    let r = &c.resolved["drive"];
    assert_eq!(r["kind"], "surge_block");
    assert_eq!(r["kinematics"], "trapezoidal");
    assert_eq!(r["reversal_time"], 0.2);
    assert!(r.get("strokes_per_minute").is_none());
    // A periodic drive: the solver's default steps per cycle.
    assert_eq!(
        c.model.numerics.time,
        TimeSpec::StepsPerCycle(DEFAULT_STEPS_PER_CYCLE)
    );

    // Defaults: discs 1.5 mm radially inside the casing (an assumption, noted as such),
    // 5 m below the static level (an assumption), standard atmosphere; sinusoidal, Cd 0.6,
    // solid (no valves), no ramp.
    let d = parse_drive_case(
        r#"{ "kind": "surge_block", "stroke": "0.6 m", "frequency": "0.5 Hz" }"#,
        Some(r#""1 min""#),
    );
    let Drive::SurgeBlock(b) = &d.model.drive else {
        panic!("{:?}", d.model.drive)
    };
    assert!(rel(b.block_radius_m, CASING_M - 0.0015) < EXACT);
    assert_eq!(b.depth_m, 5.0);
    assert_eq!(d.resolved["drive"]["atmospheric_pressure"], 101_325.0);
    assert_eq!(b.kinematics, Kinematics::Sinusoidal);
    assert_eq!(b.discharge_coefficient, 0.6);
    assert_eq!(b.valve_area_m2, 0.0);
    assert_eq!(b.ramp_cycles, 0.0);
    assert!(d.resolved["drive"].get("reversal_time").is_none());
    let notes = d.notes.join("\n");
    assert!(notes.contains("casing radius − 1.5 mm"), "{notes}");
    assert!(notes.contains("measure it in the field"), "{notes}");
    assert!(notes.contains("surge block depth not given"), "{notes}");
    assert!(notes.contains("vapour bound"), "{notes}");
    assert!(notes.contains("solid surge block"), "{notes}");
}

#[test]
fn swab_keys_land_in_si() {
    let c = parse_drive_case(
        r#"{ "kind": "swab", "lift_rate": "3 ft/s", "stroke": "10 ft", "lowering_time": "0.5 min",
             "submergence": "50 ft", "strokes": 5, "ramp_cycles": 1 }"#,
        Some(r#""5 min""#),
    );
    let Drive::Swab(s) = &c.model.drive else {
        panic!("{:?}", c.model.drive)
    };
    // Cups default to the casing radius. 3 ft/s = 0.9144 m/s, 10 ft = 3.048 m, 50 ft =
    // 15.24 m (NIST SP 811, exact); 0.5 min = 30 s.
    assert!(rel(s.cup_radius_m, CASING_M) < EXACT);
    assert!(rel(s.lift_rate_m_s, 0.9144) < EXACT);
    assert!(rel(s.stroke_m, 3.048) < EXACT);
    assert!(rel(s.lowering_time_s, 30.0) < EXACT);
    assert!(rel(s.submergence_m, 15.24) < EXACT);
    assert_eq!((s.strokes, s.ramp_cycles), (5, 1.0));
    // Lift time 3.048/0.9144 = 10/3 s, plus 30 s of lowering.
    assert!(rel(s.period_s(), 10.0 / 3.0 + 30.0) < EXACT);
    // The cups seal the column below them while rising: the notes give the vapour bound
    // at the start of a lift and the pressures it comes from.
    let notes = c.notes.join("\n");
    assert!(
        notes.contains("the cups seal the casing while rising"),
        "{notes}"
    );
    assert!(notes.contains("vapour bound"), "{notes}");
    // A swab that stops after its strokes still counts steps per cycle; the solver goes
    // over to geometric steps once the strokes are done.
    assert_eq!(
        c.model.numerics.time,
        TimeSpec::StepsPerCycle(DEFAULT_STEPS_PER_CYCLE)
    );
    assert_eq!(c.model.drive.period_at(200.0), None);

    let narrow = parse_drive_case(
        r#"{ "kind": "swab", "cup_radius": "3.5 in", "lift_rate": "1 m/s", "stroke": "2 m",
             "lowering_time": 5, "submergence": "20 m" }"#,
        Some(r#""1 min""#),
    );
    let Drive::Swab(s) = &narrow.model.drive else {
        panic!("{:?}", narrow.model.drive)
    };
    assert!(rel(s.cup_radius_m, 0.0889) < EXACT);
    assert_eq!((s.strokes, s.ramp_cycles), (0, 0.0));
}

#[test]
fn pump_backwash_keys_land_in_si() {
    let c = parse_drive_case(
        r#"{ "kind": "pump_backwash", "pumping_rate": "800 gpm", "on_time": "3 min",
             "off_time": "2 min", "backflow_volume": "100 gal", "cycles": 4,
             "intake_depth": "40 ft" }"#,
        Some(r#""20 min""#),
    );
    let Drive::PumpBackwash(p) = &c.model.drive else {
        panic!("{:?}", c.model.drive)
    };
    // 1 US gal = 3.785411784e-3 m³, 1 ft = 0.3048 m (NIST SP 811, exact); 1 min = 60 s.
    assert_eq!(
        p.pump,
        PumpLaw::ConstantRate(800.0 * 3.785_411_784e-3 / 60.0)
    );
    let Backflow::Volume(v) = p.backflow else {
        panic!("{:?}", p.backflow)
    };
    assert!(rel(v, 0.378_541_178_4) < EXACT);
    assert!(rel(p.intake_depth_m, 12.192) < EXACT);
    assert_eq!((p.on_time_s, p.off_time_s, p.cycles), (180.0, 120.0, 4));
    // Drain time and discharge height defaults: 5 s and 0 m, assumptions the notes call so.
    assert_eq!((p.drain_time_s, p.discharge_height_m), (5.0, 0.0));
    assert!(c.notes.iter().any(|n| n.contains("drain time not given")));
    assert!(c
        .notes
        .iter()
        .any(|n| n.contains("discharge height not given")));

    // A pump curve through H0 = 40 m and 20 m at 50 L/s: a = 20/0.05² = 8000 s²/m⁵; the
    // riser of radius 3 in = 0.0762 m (NIST SP 811, exact) drains back.
    let r = parse_drive_case(
        r#"{ "kind": "pump_backwash", "on_time": "3 min", "off_time": "2 min",
             "pump_curve": { "shutoff_head": "40 m", "rated_rate": "50 L/s",
                             "rated_head": "20 m" },
             "riser_radius": "3 in", "intake_depth": "12 m", "discharge_height": "29 m",
             "drain_time": "12 s" }"#,
        Some(r#""3 cycles""#),
    );
    let Drive::PumpBackwash(p) = &r.model.drive else {
        panic!("{:?}", r.model.drive)
    };
    let PumpLaw::Quadratic {
        shutoff_head_m,
        coefficient_s2_m5,
    } = p.pump
    else {
        panic!("{:?}", p.pump)
    };
    assert_eq!(shutoff_head_m, 40.0);
    assert!(rel(coefficient_s2_m5, 8000.0) < EXACT);
    let Backflow::Riser(a) = p.backflow else {
        panic!("{:?}", p.backflow)
    };
    assert!(rel(a, PI * 0.0762 * 0.0762) < EXACT);
    assert_eq!(
        (p.drain_time_s, p.cycles, p.discharge_height_m),
        (12.0, 0, 29.0)
    );
    assert_eq!(r.model.duration_s, 900.0);
    let d = &r.resolved["drive"];
    assert!(rel(d["riser_radius"].as_f64().unwrap(), 0.0762) < EXACT);
    assert_eq!(d["pump_curve"]["rated_rate"].as_f64(), Some(0.05));
}

#[test]
fn jet_pulse_keys_land_in_si() {
    let c = parse_drive_case(
        r#"{ "kind": "jet_pulse", "nozzle_velocity": "150 ft/s", "rotation_period": "0.5 min",
             "nozzles": 4, "jet_width": "0.5 in", "nozzle_diameter": "0.375 in" }"#,
        Some(r#""2 min""#),
    );
    let Drive::JetPulse(j) = &c.model.drive else {
        panic!("{:?}", c.model.drive)
    };
    // 150 ft/s = 45.72 m/s, 0.5 in = 0.0127 m (NIST SP 811, exact); screen radius from
    // well.screen_radius; efficiency default 0.5 (an assumption, noted).
    assert!(rel(j.nozzle_velocity_m_s, 45.72) < EXACT);
    assert!(rel(j.jet_width_m, 0.0127) < EXACT);
    assert_eq!((j.rotation_period_s, j.nozzles), (30.0, 4));
    assert_eq!(j.screen_radius_m, 0.1);
    assert_eq!(j.efficiency, 0.5);
    // Velocity head η v²/(2g), g = 9.80665 m/s² (exact by definition).
    let head = 0.5 * 45.72 * 45.72 / (2.0 * 9.806_65);
    assert!(rel(j.pulse_head_m(), head) < EXACT);
    // Four nozzles: a pass every 30/4 s.
    assert_eq!(c.model.drive.period_s(), Some(7.5));
    let notes = c.notes.join("\n");
    assert!(notes.contains("one-dimensional radial model"), "{notes}");
    assert!(notes.contains("area-weighted excess head only"), "{notes}");
    assert!(notes.contains("efficiency not given"), "{notes}");
    // Four nozzles of 3/8 in = 9.525 mm at 45.72 m/s: 4 π (9.525e-3)²/4 × 45.72 m³/s; the
    // well is not pumped, so the notes recall the 115 % practice.
    let q = 4.0 * PI * 9.525e-3 * 9.525e-3 / 4.0 * 45.72;
    assert!(rel(j.jet_flow_m3_s(), q) < EXACT);
    assert_eq!(j.pumping_rate_m3_s, 0.0);
    assert!(notes.contains("115 %"), "{notes}");
    // Defaults: two nozzles, a 10 mm jet.
    let d = parse_drive_case(
        r#"{ "kind": "jet_pulse", "jet_rate": "3 L/s", "rotation_period": "30 s",
             "efficiency": 0.4, "nozzle_diameter": "8 mm", "pumping_rate": "4 L/s" }"#,
        Some(r#""1 min""#),
    );
    let Drive::JetPulse(j) = &d.model.drive else {
        panic!("{:?}", d.model.drive)
    };
    assert_eq!((j.nozzles, j.jet_width_m, j.efficiency), (2, 0.010, 0.4));
    // The rate through two 8 mm nozzles sets the velocity: 3e-3 / (2 π 0.008²/4) m/s.
    assert!(
        rel(
            j.nozzle_velocity_m_s,
            3e-3 / (2.0 * PI * 0.008 * 0.008 / 4.0)
        ) < EXACT
    );
    assert_eq!(j.pumping_rate_m3_s, 0.004);
}

const SCHEDULE: &str = r#"{ "kind": "schedule", "stages": [
      { "duration": "1 min",
        "drive": { "kind": "surge_block", "stroke": "2 ft", "strokes_per_minute": 12,
                   "ramp_cycles": 3 } },
      { "duration": "5 cycles",
        "drive": { "kind": "swab", "lift_rate": "1 m/s", "stroke": "2 m",
                   "lowering_time": "8 s", "submergence": "20 m" } },
      { "duration": "0.5 h",
        "drive": { "kind": "table", "quantity": "pumping_rate",
                   "points": [[0, 0.002], [600, 0.002], [600, 0], [1800, 0]] } }
    ] }"#;

#[test]
fn schedule_stages_land_in_si() {
    let c = parse_drive_case(SCHEDULE, None);
    let Drive::Schedule(stages) = &c.model.drive else {
        panic!("{:?}", c.model.drive)
    };
    assert_eq!(stages.len(), 3);
    // 1 min = 60 s; 5 cycles of the swab's 2 s lift + 8 s lowering = 50 s; 0.5 h = 1800 s.
    let durations: Vec<f64> = stages.iter().map(|s| s.duration_s).collect();
    assert_eq!(durations, [60.0, 50.0, 1800.0]);
    let Drive::SurgeBlock(b) = &stages[0].drive else {
        panic!("{:?}", stages[0].drive)
    };
    // 2 ft = 0.6096 m (NIST SP 811); 12 strokes/min = 0.2 Hz; block radius defaults from
    // the casing.
    assert!(rel(b.stroke_m, 0.6096) < EXACT);
    assert!(rel(b.frequency_hz, 0.2) < EXACT);
    assert!(rel(b.block_radius_m, CASING_M - 0.0015) < EXACT);
    assert_eq!(b.depth_m, 5.0);
    assert!(matches!(stages[1].drive, Drive::Swab(_)));
    let Drive::Table(t) = &stages[2].drive else {
        panic!("{:?}", stages[2].drive)
    };
    assert_eq!(t.quantity, TableQuantity::PumpingRate);
    // The top-level duration was left out: the sum of the stages.
    assert_eq!(c.model.duration_s, 1910.0);
    assert_eq!(c.resolved["duration"], 1910.0);
    let r = &c.resolved["drive"];
    assert_eq!(r["kind"], "schedule");
    assert_eq!(r["stages"][1]["duration"], 50.0);
    assert_eq!(r["stages"][2]["drive"]["kind"], "table");
    // Periodic stages take steps per cycle of their own period; the solver picks it.
    assert_eq!(
        c.model.numerics.time,
        TimeSpec::StepsPerCycle(DEFAULT_STEPS_PER_CYCLE)
    );
    assert_eq!(c.model.drive.period_at(30.0), Some(5.0));
    assert_eq!(c.model.drive.period_at(80.0), Some(10.0));
    assert_eq!(c.model.drive.period_at(500.0), None);
    assert!(c
        .notes
        .iter()
        .any(|n| n.starts_with("stages[1], 60 s to 110 s: ")));

    // A given total must equal the sum; a mismatch names both.
    assert_eq!(
        parse_drive_case(SCHEDULE, Some("1910")).model.duration_s,
        1910.0
    );
    let e = parse_case(&drive_case(SCHEDULE, Some(r#""31 min""#)), &cases_dir()).unwrap_err();
    assert_eq!(e.field, "duration");
    assert!(
        e.message.contains("sum of the stage durations (1910 s)"),
        "{e}"
    );
    assert!(e.message.contains("got 1860 s"), "{e}");

    // "<n> cycles" needs a periodic stage; errors name the stage.
    let e = parse_case(
        &drive_case(
            r#"{ "kind": "schedule", "stages": [ { "duration": "3 cycles",
                 "drive": { "kind": "constant_rate", "pumping_rate": "2 L/s" } } ] }"#,
            None,
        ),
        &cases_dir(),
    )
    .unwrap_err();
    assert_eq!(e.field, "drive.stages[0].duration");
    assert!(e.message.contains("needs a periodic drive"), "{e}");
    let e = parse_case(
        &drive_case(r#"{ "kind": "schedule", "stages": [] }"#, None),
        &cases_dir(),
    )
    .unwrap_err();
    assert_eq!(
        e.to_string(),
        "drive.stages: needs at least one stage, got none"
    );
    // A unit error inside a stage and a table file inside a stage keep the stage's path.
    let e = parse_case(
        &drive_case(&SCHEDULE.replace("2 ft", "2 fts"), None),
        &cases_dir(),
    )
    .unwrap_err();
    assert_eq!(e.field, "drive.stages[0].drive.stroke");
    let e = parse_case(
        &drive_case(
            &SCHEDULE.replace(
                r#""points": [[0, 0.002], [600, 0.002], [600, 0], [1800, 0]]"#,
                r#""file": "no-such-table.csv""#,
            ),
            None,
        ),
        &cases_dir(),
    )
    .unwrap_err();
    assert_eq!(e.field, "drive.stages[2].drive.file");

    // Stages that are all not periodic get geometric steps.
    let g = parse_drive_case(
        r#"{ "kind": "schedule", "stages": [
             { "duration": "10 min", "drive": { "kind": "constant_rate", "pumping_rate": "2 L/s" } },
             { "duration": "20 min", "drive": { "kind": "constant_rate", "pumping_rate": 0 } } ] }"#,
        None,
    );
    assert!(matches!(
        g.model.numerics.time,
        TimeSpec::StepsPerDecade { .. }
    ));
}

#[test]
fn pumping_table_runs_in_a_schedule_stage() {
    // A rest, then a table of pumping rate: 2 L/s for 60 s, then off. The device volume
    // of the run is the table's volume, 0.002 m³/s × 60 s = 0.12 m³ out of the well
    // (the rate is constant on each piece and the steps land on the jump, so the sum of
    // rate × step is exact to round-off; 1e-9 as the solver's volume checks use).
    let c = parse_drive_case(
        r#"{ "kind": "schedule", "stages": [
             { "duration": "30 s", "drive": { "kind": "constant_rate", "pumping_rate": 0 } },
             { "duration": "2 min", "drive": { "kind": "table", "quantity": "pumping_rate",
               "points": [[0, 0.002], [60, 0.002], [60, 0], [120, 0]] } } ] }"#,
        None,
    );
    assert_eq!(c.model.duration_s, 150.0);
    let s = run(&c.model, &mut NullObserver, Reporting::default()).expect("run");
    assert!(
        rel(s.device_volume_m3, -0.12) < 1e-9,
        "{}",
        s.device_volume_m3
    );
    assert!(rel(s.end_time_s, 150.0) < EXACT);
}

#[test]
fn scenarios_use_the_development_drives() {
    let load = |name: &str| load_case(&cases_dir().join(format!("{name}.json"))).unwrap();
    // Default demo: a solid block, 0.9 m at 20 strokes/min, ramp 5, 3 min; radius from the
    // 381 mm casing ID less the 1.5 mm default disc clearance.
    let m = load("municipal-sand-gravel");
    let Drive::SurgeBlock(b) = &m.model.drive else {
        panic!("{:?}", m.model.drive)
    };
    assert_eq!(
        (b.stroke_m, b.ramp_cycles, b.valve_area_m2),
        (0.9, 5.0, 0.0)
    );
    assert!(rel(b.frequency_hz, 1.0 / 3.0) < EXACT);
    assert!(rel(b.block_radius_m, 0.1905 - 0.0015) < EXACT);
    assert_eq!(b.depth_m, 40.0);
    assert_eq!(m.model.duration_s, 180.0);
    // Domestic: a vented block in the 4-in PVC SDR 21 casing, collapse inputs kept.
    let d = load("domestic-fine-sand-pvc");
    let Drive::SurgeBlock(b) = &d.model.drive else {
        panic!("{:?}", d.model.drive)
    };
    assert!(b.valve_area_m2 > 0.0);
    assert_eq!(d.safety.material.as_deref(), Some("pvc"));
    assert_eq!(d.safety.dimension_ratio, Some(21.0));
    assert!(matches!(
        load("irrigation-pump-surge").model.drive,
        Drive::PumpBackwash(_)
    ));
    assert!(matches!(
        load("jetting-wire-wrap").model.drive,
        Drive::JetPulse(_)
    ));
    let s = load("staged-development");
    let Drive::Schedule(stages) = &s.model.drive else {
        panic!("{:?}", s.model.drive)
    };
    let kinds: Vec<&str> = stages
        .iter()
        .map(|st| match st.drive {
            Drive::SurgeBlock(_) => "surge_block",
            Drive::ConstantRate { .. } => "constant_rate",
            _ => "other",
        })
        .collect();
    assert_eq!(kinds, ["surge_block", "surge_block", "constant_rate"]);
    assert_eq!(s.model.duration_s, 1200.0);
    assert!(matches!(load("swab-deep").model.drive, Drive::Swab(_)));
}

/// Checks: `boreflux run` on the swab scenario prints the solver's warning that the
/// column parted, and no warning of a poor numerical balance.
#[test]
fn swab_scenario_warns_that_the_column_parted() {
    let dir = tempfile::tempdir().unwrap();
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_boreflux"))
        .arg("run")
        .arg(cases_dir().join("swab-deep.json"))
        .arg("-o")
        .arg(dir.path().join("swab.h5"))
        .arg("-q")
        .output()
        .unwrap();
    assert!(out.status.success(), "{out:?}");
    let stdout = String::from_utf8(out.stdout).unwrap();
    assert!(
        stdout.contains("the water column under the sealed tool parted"),
        "{stdout}"
    );
    assert!(!stdout.contains("numerical balance is poor"), "{stdout}");
}
