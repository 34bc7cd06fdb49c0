//! `boreflux check` prints the periodic steady state of a linear case by the harmonic
//! method and of a nonlinear one by shooting; checked here against `boreflux run`
//! time-stepping the same case for 40 periods (the harmonic method shares only the grid and
//! the face laws with it).

mod common;

use common::{cases_dir, json_of, linear_case, write};
use serde_json::Value;

#[test]
fn the_periodic_state_agrees_with_time_stepping() {
    let dir = tempfile::tempdir().unwrap();
    // The linear well of the common helpers (invented numbers) for 40 periods.
    let case = write(
        dir.path(),
        "linear.json",
        &linear_case(r#""40 cycles""#, r#"{ "steps_per_cycle": 400 }"#),
    );
    // Peak face flux at the wall: the run's largest over its steps, the check's over 256
    // samples of the period. Crank–Nicolson at 400 steps per period errs by about
    // (ωΔt)²/12 = 2e-5 and sampling a sine's crest by 1 − cos(π/256) = 7.5e-5 (common
    // knowledge, no source); 1e-3 covers both with room. Mean power per zone against the
    // run's work over its 80 s: the start-up transient of the first periods adds to the
    // run's work (0.1–0.2 % when the bound was set); 1 %. Every zone that works is checked.
    let p = check_and_run(dir.path(), &case, 0.0);
    assert_eq!(p["method"], "harmonic", "{p}");
}

/// Runs `check --json` and `run --json` on `case` and compares the periodic state with the
/// run: the peak face flux at the wall within 1e-3, the mean power of every zone whose work
/// exceeds `work_floor_w` times the run's duration within 1 % of its work over the run.
/// Returns the periodic state. Why those bounds: at each caller.
fn check_and_run(dir: &std::path::Path, case: &std::path::Path, work_floor_w: f64) -> Value {
    let case = case.to_str().unwrap();
    let p = json_of(&["check", case, "--json"])["periodic_state"].clone();
    let h5 = dir.join("run.h5");
    let run = json_of(&["run", case, "-q", "--json", "-o", h5.to_str().unwrap()]);
    let (want, got) = (
        run["peak_outward_flux_m_s"].as_f64().unwrap(),
        p["peak_wall_face_flux_m_s"].as_f64().unwrap(),
    );
    assert!((got / want - 1.0).abs() < 1e-3, "{got} vs {want}");
    let duration = run["end_time_s"].as_f64().unwrap();
    let zones = run["zones"].as_array().unwrap();
    let work = run["work_j"].as_array().unwrap();
    for (z, w) in zones.iter().zip(work) {
        let (z, w) = (z.as_str().unwrap(), w.as_f64().unwrap());
        if w > work_floor_w * duration {
            let mean = p["mean_power_w"][z].as_f64().unwrap();
            assert!(
                (mean * duration / w - 1.0).abs() < 1e-2,
                "{z}: {mean} W vs {w} J"
            );
        }
    }
    p
}

/// The same well with the screen's orifice entrance loss (its default discharge
/// coefficient) and a Forchheimer term in the pack: nonlinear, so `check` shoots.
/// Invented numbers.
const NONLINEAR_CASE: &str = r#"{
  "well": { "screen_radius": 0.1, "screen_length": 6, "open_area": 0.03 },
  "pack": { "outer_radius": 0.2, "porosity": 0.32, "conductivity": 8e-3,
            "forchheimer_beta": 3e4 },
  "formation": { "conductivity": 2e-4, "specific_storage": 1e-5 },
  "drive": { "kind": "sine_head", "amplitude": 1.0, "frequency": 0.5 },
  "duration": "40 cycles",
  "numerics": { "steps_per_cycle": 400 }
}"#;

#[test]
fn the_shooting_state_of_a_nonlinear_case_agrees_with_time_stepping() {
    let dir = tempfile::tempdir().unwrap();
    let case = write(dir.path(), "nonlinear.json", NONLINEAR_CASE);
    // Peak wall flux: the run's largest over its steps (adaptive TR-BDF2 under the nominal
    // 400 steps a period) against the periodic cycle's at 400 fixed steps; both are
    // second-order schemes, erring by about (ωΔt)² = 2.5e-4 relative (common knowledge,
    // no source), and the run's start-up from rest stays below the periodic peak here
    // (the response grows to it). 1e-3 covers both with room. Mean power per zone against
    // the run's work over its 80 s, as for the linear case: the start-up transient adds to
    // the run's work; 1 %, for the zones doing more than 1 µW on average.
    let p = check_and_run(dir.path(), &case, 1e-6);
    assert_eq!(p["method"], "shooting", "{p}");
    assert!(p["defect"].as_f64().unwrap() <= 1e-8, "{p}");
}

#[test]
fn a_nonlinear_case_is_shot_and_a_schedule_says_why_not() {
    let cases = cases_dir();
    let case = cases.join("municipal-sand-gravel.json");
    let v = json_of(&["check", case.to_str().unwrap(), "--json"]);
    assert_eq!(v["periodic_state"]["method"], "shooting");
    let case = cases.join("staged-development.json");
    let v = json_of(&["check", case.to_str().unwrap(), "--json"]);
    let why = v["periodic_state"]["not_applicable"].as_str().unwrap();
    assert!(
        why.contains("Forchheimer") && why.contains("schedule"),
        "{why}"
    );
}
