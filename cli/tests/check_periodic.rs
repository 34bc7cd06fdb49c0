//! `boreflux check` prints the periodic steady state of a linear case by the harmonic
//! method; checked here against `boreflux run` time-stepping the same case for 40 periods
//! (the two methods share only the grid and the face laws).

mod common;

use common::{cases_dir, json_of, linear_case, write};

#[test]
fn the_periodic_state_agrees_with_time_stepping() {
    let dir = tempfile::tempdir().unwrap();
    // The linear well of the common helpers (invented numbers) for 40 periods.
    let case = write(
        dir.path(),
        "linear.json",
        &linear_case(r#""40 cycles""#, r#"{ "steps_per_cycle": 400 }"#),
    );
    let case = case.to_str().unwrap();
    let p = &json_of(&["check", case, "--json"])["periodic_state"];
    let h5 = dir.path().join("run.h5");
    let run = json_of(&["run", case, "-q", "--json", "-o", h5.to_str().unwrap()]);
    // Peak face flux at the wall: the run's largest over its steps, the check's over 256
    // samples of the period. Crank–Nicolson at 400 steps per period errs by about
    // (ωΔt)²/12 = 2e-5 and sampling a sine's crest by 1 − cos(π/256) = 7.5e-5 (common
    // knowledge, no source); 1e-3 covers both with room.
    let (want, got) = (
        run["peak_outward_flux_m_s"].as_f64().unwrap(),
        p["peak_wall_face_flux_m_s"].as_f64().unwrap(),
    );
    assert!((got / want - 1.0).abs() < 1e-3, "{got} vs {want}");
    // Mean power per zone against the run's work over its 80 s: the start-up transient
    // of the first periods adds to the run's work (0.1–0.2 % when the bound was set); 1 %.
    let duration = run["end_time_s"].as_f64().unwrap();
    let zones = run["zones"].as_array().unwrap();
    let work = run["work_j"].as_array().unwrap();
    for (z, w) in zones.iter().zip(work) {
        let (z, w) = (z.as_str().unwrap(), w.as_f64().unwrap());
        if w > 0.0 {
            let mean = p["mean_power_w"][z].as_f64().unwrap();
            assert!(
                (mean * duration / w - 1.0).abs() < 1e-2,
                "{z}: {mean} W vs {w} J"
            );
        }
    }
}

#[test]
fn a_nonlinear_case_says_why_the_method_does_not_apply() {
    let case = cases_dir().join("municipal-sand-gravel.json");
    let v = json_of(&["check", case.to_str().unwrap(), "--json"]);
    let why = v["periodic_state"]["not_applicable"].as_str().unwrap();
    assert!(why.contains("Forchheimer"), "{why}");
}
