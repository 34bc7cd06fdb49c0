//! Calibration checks on a small, fast case (Darcy pumping and recovery, coarse grid):
//! synthetic recovery with the coverage of the 95 % intervals over a seeded batch, and a
//! parameter the records cannot see.

mod common;

use boreflux::calibrate::fit::{Calibration, Problem};
use boreflux::calibrate::free::parse_free;
use boreflux::calibrate::record::{Activity, DevelopmentLog, Row};
use boreflux::calibrate::schedule::{evaluate, scheduled_case};
use boreflux_solver::calibrate::{Identifiability, LmOptions};
use common::{boreflux, success};
use serde_json::{json, Value};
use std::path::PathBuf;

/// Invented test well (not from any source): 10 m screen in a sand, pack and formation
/// only, 40 cells.
fn case(k: &str, ss: &str) -> Value {
    json!({
        "title": "calibration test well (invented)",
        "well": { "screen_radius": "100 mm", "screen_length": "10 m", "open_area": "10 %",
                  "casing_radius": "100 mm", "slot_width": "1 mm" },
        "pack": { "outer_radius": "180 mm", "porosity": 0.3, "conductivity": "2e-3 m/s",
                  "specific_storage": "1e-5 1/m" },
        "formation": { "conductivity": k, "specific_storage": ss, "porosity": 0.3,
                       "outer_radius": "auto" },
        "drive": { "kind": "constant_rate", "pumping_rate": "5 L/s" },
        "duration": "10 min",
        "numerics": { "cells": 40 }
    })
}

/// The log: 20 min pumping at 5 L/s, 10 min recovery, readings every 2 min
/// (drawdowns filled in by the caller).
fn log(drawdown: &[f64]) -> DevelopmentLog {
    let times: Vec<f64> = (0..=15).map(|k| 120.0 * k as f64).collect();
    let rows = times
        .iter()
        .enumerate()
        .map(|(i, &t)| Row {
            line: i + 2,
            time_s: t,
            activity: if i + 1 == times.len() {
                Activity::End
            } else if t < 1200.0 {
                Activity::Pump
            } else {
                Activity::Rest
            },
            rate_m3_s: if t < 1200.0 { 5e-3 } else { 0.0 },
            drawdown_m: drawdown.get(i).copied(),
            turbidity_ntu: None,
            sand_kg_m3: None,
        })
        .collect();
    DevelopmentLog { rows }
}

const TRUE_K: f64 = 1e-4;
const TRUE_SS: f64 = 2e-5;
/// Reading noise, m (a pressure transducer's few centimetres; common practice, no source).
const NOISE_M: f64 = 0.02;

/// SplitMix64 (Steele, Lea & Flood 2014), uniforms in (0, 1) and Box–Muller normals.
struct Rng(u64);
impl Rng {
    fn uniform(&mut self) -> f64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^= z >> 31;
        ((z >> 11) as f64 + 0.5) / (1u64 << 53) as f64
    }
    fn normal(&mut self) -> f64 {
        let (u1, u2) = (self.uniform(), self.uniform());
        (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
    }
}

fn truth() -> Vec<f64> {
    let l = log(&[0.0; 16]);
    let c = scheduled_case(&case("1e-4 m/s", "2e-5 1/m"), &l).unwrap();
    let times: Vec<f64> = l.rows.iter().map(|r| r.time_s).collect();
    evaluate(&c, &PathBuf::from("."), &times).unwrap()
}

/// The calibration of the `free` parameters (against a start of K = 3e-4 m/s,
/// Ss = 1e-4 1/m) to the drawdowns `observed`, without step tests or profiles.
fn problem(observed: &[f64], free: &[&str], threads: usize) -> Problem {
    let raw = case("3e-4 m/s", "1e-4 1/m");
    let free = free.iter().map(|f| parse_free(f, &raw).unwrap()).collect();
    Problem {
        raw_case: raw,
        base_dir: PathBuf::from("."),
        log: log(observed),
        free,
        steps_before: None,
        steps_after: None,
        threads,
        confidence: 0.95,
        options: LmOptions::default(),
        profile: false,
    }
}

fn fit(observed: &[f64], free: &[&str], threads: usize) -> Calibration {
    problem(observed, free, threads).solve().unwrap()
}

const K: &str = "formation.conductivity=1e-6 m/s..1e-2 m/s";
const SS: &str = "formation.specific_storage=1e-7 1/m..1e-2 1/m";

#[test]
fn intervals_cover_the_truth_at_the_nominal_rate() {
    let clean = truth();
    // Drawdown of the true well after 20 min, for scale: a few metres.
    assert!(clean[10] > 0.5, "{}", clean[10]);
    let fits = 50;
    let mut rng = Rng(2026);
    let mut covered = [0usize; 2];
    for _ in 0..fits {
        let noisy: Vec<f64> = clean.iter().map(|s| s + NOISE_M * rng.normal()).collect();
        let c = fit(&noisy, &[K, SS], 2);
        assert!(c.termination.converged(), "{:?}", c.termination);
        for (j, truth) in [TRUE_K, TRUE_SS].iter().enumerate() {
            let (lo, hi) = c.params[j].interval.expect("constrained");
            covered[j] += usize::from(lo <= *truth && *truth <= hi);
        }
    }
    eprintln!(
        "coverage of the 95 % intervals over {fits} fits: K {}, Ss {}",
        covered[0], covered[1]
    );
    // Binomial(50, 0.95) (scipy.stats.binom.cdf(42, 50, 0.95) = 0.0032): a procedure with
    // the nominal coverage gives 43 or more covered intervals in 99.7 % of batches.
    for c in covered {
        assert!(c >= 43, "coverage {c} of {fits}");
    }
}

#[test]
fn a_parameter_that_does_not_act_on_drawdown_is_reported_unconstrained() {
    // The formation's porosity enters only pore velocities in this Darcy case, not the
    // drawdown (docs/physics.md: storage is the specific storage).
    let clean = truth();
    let mut rng = Rng(7);
    let noisy: Vec<f64> = clean.iter().map(|s| s + NOISE_M * rng.normal()).collect();
    let c = fit(&noisy, &[K, SS, "formation.porosity=0.2..0.4"], 2);
    let p = &c.params[2];
    assert!(
        matches!(p.status, Identifiability::NoEffect | Identifiability::Flat),
        "{:?}",
        p.status
    );
    assert!(p.interval.is_none());
    // The two that act are still constrained, and cover the truth.
    for (j, truth) in [TRUE_K, TRUE_SS].iter().enumerate() {
        let (lo, hi) = c.params[j].interval.expect("constrained");
        assert!(lo <= *truth && *truth <= hi, "{j}: {lo} .. {hi}");
    }
}

/// Top-level keys of the test case in the order written to its file: not alphabetical, so a
/// writer that sorts keys shows.
const KEY_ORDER: [&str; 7] = [
    "title",
    "well",
    "pack",
    "formation",
    "drive",
    "duration",
    "numerics",
];

/// The case's text with its top-level keys in [`KEY_ORDER`].
fn ordered_text(v: &Value) -> String {
    let items: Vec<String> = KEY_ORDER
        .iter()
        .map(|k| format!("  \"{k}\": {}", v[*k]))
        .collect();
    format!("{{\n{}\n}}\n", items.join(",\n"))
}

fn write_inputs(dir: &std::path::Path) -> (PathBuf, PathBuf) {
    let case_path = dir.join("well.json");
    let v = case("3e-4 m/s", "1e-4 1/m");
    assert_eq!(v.as_object().unwrap().len(), KEY_ORDER.len());
    std::fs::write(&case_path, ordered_text(&v)).unwrap();
    let clean = truth();
    let mut rng = Rng(99);
    let mut csv = String::from("# invented test log\ntime_min,activity,rate_L/s,drawdown_cm\n");
    for (i, r) in log(&clean).rows.iter().enumerate() {
        let s = if i == 0 {
            0.0
        } else {
            clean[i] + NOISE_M * rng.normal()
        };
        let rate = if r.activity == Activity::Pump {
            "5"
        } else {
            ""
        };
        csv.push_str(&format!(
            "{},{},{rate},{:.1}\n",
            r.time_s / 60.0,
            r.activity.word(),
            100.0 * s
        ));
    }
    let log_path = dir.join("log.csv");
    std::fs::write(&log_path, csv).unwrap();
    (case_path, log_path)
}

#[test]
fn the_command_writes_json_page_and_calibrated_case_and_refuses_bad_input() {
    let dir = tempfile::tempdir().unwrap();
    let (case_path, log_path) = write_inputs(dir.path());
    let page = dir.path().join("cal.html");
    let out_case = dir.path().join("calibrated.json");
    let bin = boreflux;
    let ok = success(
        bin()
            .arg("calibrate")
            .arg(&case_path)
            .arg(&log_path)
            .args(["--free", K, "--free", SS, "--json", "--jobs", "2", "-o"])
            .arg(&page)
            .arg("--write-case")
            .arg(&out_case),
        "calibrate",
    );
    let v: Value = serde_json::from_slice(&ok.stdout).unwrap();
    assert_eq!(v["converged"], true);
    assert_eq!(v["parameters"][0]["unit"]["label"], "m/s");
    assert_eq!(v["parameters"][1]["unit"]["label"], "1/m");
    let k = v["parameters"][0]["fitted_si"].as_f64().unwrap();
    let iv = &v["parameters"][0]["interval_si"];
    assert!(iv[0].as_f64().unwrap() <= k && k <= iv[1].as_f64().unwrap());
    let html = std::fs::read_to_string(&page).unwrap();
    assert!(html.contains("Residual against the fitted drawdown") && html.contains("<svg"));
    // The calibrated case: the input with only the free values changed, the title marked
    // and a description recording the calibration.
    let written_text = std::fs::read_to_string(&out_case).unwrap();
    let written: Value = serde_json::from_str(&written_text).unwrap();
    let mut expected = case("3e-4 m/s", "1e-4 1/m");
    expected["formation"]["conductivity"] = written["formation"]["conductivity"].clone();
    expected["formation"]["specific_storage"] = written["formation"]["specific_storage"].clone();
    expected["title"] = json!("calibration test well (invented) (calibrated to log.csv)");
    expected["description"] = written["description"].clone();
    assert_eq!(written, expected);
    let d = written["description"].as_str().unwrap();
    assert!(
        d.contains("log.csv")
            && d.contains("formation.conductivity (1e-6 .. 0.01 m/s)")
            && d.contains("formation.specific_storage (1e-7 .. 0.01 1/m)")
            && d.contains("the fit converged"),
        "{d}"
    );
    // Keys in the file's order (the description after the title), not sorted.
    let at = |k: &str| written_text.find(&format!("\"{k}\"")).unwrap();
    assert!(at("title") < at("description") && at("description") < at("well"));
    assert!(
        KEY_ORDER.windows(2).all(|w| at(w[0]) < at(w[1])),
        "{written_text}"
    );
    // Six significant digits at most, in the case's unit, and within 5e-6 of the fit
    // (the rounding of six digits).
    for (path, unit, j) in [("conductivity", " m/s", 0), ("specific_storage", " 1/m", 1)] {
        let text = written["formation"][path].as_str().unwrap();
        let number = text.strip_suffix(unit).expect(text);
        let mantissa = number.split('e').next().unwrap().replace(['.', '-'], "");
        assert!(mantissa.trim_start_matches('0').len() <= 6, "{text}");
        let fitted = v["parameters"][j]["fitted_si"].as_f64().unwrap();
        let back: f64 = number.parse().unwrap();
        assert!((back / fitted - 1.0).abs() <= 5e-6, "{text} vs {fitted}");
    }
    // The written case loads.
    success(
        bin().arg("check").arg(&out_case),
        "check of the calibrated case",
    );
    // Bad input: exit 2, the message names what is wrong; nothing written.
    let bad_free = bin()
        .arg("calibrate")
        .arg(&case_path)
        .arg(&log_path)
        .args(["--free", "formation.conductivity=1e-3 m/s..1e-2 m/s"])
        .output()
        .unwrap();
    assert_eq!(bad_free.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&bad_free.stderr).contains("outside the bounds"));
    let bad_log = dir.path().join("bad.csv");
    std::fs::write(
        &bad_log,
        "time_min,activity,rate_L/s,drawdown_m\n0,pump,5,0\n10,rest,,1\n",
    )
    .unwrap();
    let fresh = dir.path().join("none.html");
    let r = bin()
        .arg("calibrate")
        .arg(&case_path)
        .arg(&bad_log)
        .args(["--free", K, "-o"])
        .arg(&fresh)
        .output()
        .unwrap();
    assert_eq!(r.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&r.stderr).contains("line 3: the last row ends the log"));
    assert!(!fresh.exists());
    // --step-duration needs a unit (is "100" seconds or minutes?).
    let r = bin()
        .arg("calibrate")
        .arg(&case_path)
        .arg(&log_path)
        .args(["--free", K, "--step-duration", "100", "-o"])
        .arg(&fresh)
        .output()
        .unwrap();
    assert_eq!(r.status.code(), Some(2));
    let err = String::from_utf8_lossy(&r.stderr);
    assert!(
        err.contains("--step-duration") && err.contains("has no unit"),
        "{err}"
    );
    assert!(!fresh.exists());
}

#[test]
fn step_tests_before_and_after_join_the_records() {
    use boreflux::calibrate::schedule::evaluate_all;
    use boreflux::calibrate::steps::FieldSteps;
    let l = log(&[0.0; 16]);
    let times: Vec<f64> = l.rows.iter().map(|r| r.time_s).collect();
    let steps = |s: Vec<f64>| FieldSteps {
        rates_m3_s: vec![2e-3, 4e-3, 6e-3],
        drawdown_m: s,
        step_duration_s: 600.0,
    };
    let truth_case = scheduled_case(&case("1e-4 m/s", "2e-5 1/m"), &l).unwrap();
    let blank = steps(vec![0.0; 3]);
    let clean = evaluate_all(
        &truth_case,
        &PathBuf::from("."),
        &times,
        Some(&blank),
        Some(&blank),
    )
    .unwrap();
    assert_eq!((clean.before.len(), clean.after.len()), (3, 3));
    // Continuous steps: each step's drawdown exceeds the last.
    assert!(
        clean.before.windows(2).all(|w| w[1] > w[0]),
        "{:?}",
        clean.before
    );
    let mut rng = Rng(31);
    let mut noisy =
        |v: &[f64]| -> Vec<f64> { v.iter().map(|s| s + NOISE_M * rng.normal()).collect() };
    let (log_obs, before, after) = (noisy(&clean.log), noisy(&clean.before), noisy(&clean.after));
    let c = Problem {
        steps_before: Some(steps(before.clone())),
        steps_after: Some(steps(after)),
        ..problem(&log_obs, &[K, SS], 2)
    }
    .solve()
    .unwrap();
    assert!(c.termination.converged());
    assert_eq!(c.stats.dof, 16 + 6 - 2);
    for (j, truth) in [TRUE_K, TRUE_SS].iter().enumerate() {
        let (lo, hi) = c.params[j].interval.expect("constrained");
        assert!(lo <= *truth && *truth <= hi, "{j}: {lo} .. {hi}");
    }
    // The fitted model's step drawdowns lie within 4 σ of the field's (noise 2 cm).
    for (f, o) in c.steps[0].fitted_m.iter().zip(&before) {
        assert!((f - o).abs() < 4.0 * NOISE_M, "{f} vs {o}");
    }
}

#[test]
fn profile_intervals_bracket_the_fit_and_match_the_jacobian_where_the_model_is_near_linear() {
    let clean = truth();
    let mut rng = Rng(5);
    let noisy: Vec<f64> = clean.iter().map(|s| s + NOISE_M * rng.normal()).collect();
    let c = Problem {
        profile: true,
        ..problem(&noisy, &[K, SS], 2)
    }
    .solve()
    .unwrap();
    for p in &c.params {
        let (Some(lo), Some(hi)) = p.profile.unwrap() else {
            panic!("{:?}", p.profile)
        };
        let (jlo, jhi) = p.interval.unwrap();
        eprintln!(
            "{}: profile {lo:e} .. {hi:e}, Jacobian {jlo:e} .. {jhi:e}",
            p.name
        );
        assert!(lo < p.value && p.value < hi);
        // Drawdown is close to linear in ln K and ln Ss over a few per cent (Cooper–Jacob:
        // s ∝ (1/K)·ln(2.25 K t / (r² Ss))), so the two intervals agree to a fraction of
        // their width; the bisection resolves 1/64 of a bracket.
        let w = (jhi / jlo).ln();
        assert!((lo / jlo).ln().abs() < 0.25 * w && (hi / jhi).ln().abs() < 0.25 * w);
    }
}

/// The table and the page of the small case: each parameter with its unit.
#[test]
fn the_table_and_the_page_show_each_parameters_unit() {
    let dir = tempfile::tempdir().unwrap();
    let (case_path, log_path) = write_inputs(dir.path());
    let page = dir.path().join("cal.html");
    let ok = success(
        boreflux()
            .arg("calibrate")
            .arg(&case_path)
            .arg(&log_path)
            .args([
                "--free",
                "formation.conductivity=1e-6 m/s..1e-2 m/s",
                "--free",
                "formation.specific_storage=1e-7 1/m..1e-2 1/m",
                "--jobs",
                "2",
                "-o",
            ])
            .arg(&page),
        "calibrate",
    );
    let out = String::from_utf8_lossy(&ok.stdout);
    assert!(!out.contains("(SI)"), "{out}");
    let row = |name: &str| {
        out.lines()
            .find(|l| l.starts_with(name))
            .unwrap_or_else(|| panic!("{out}"))
            .split_whitespace()
            .map(str::to_owned)
            .collect::<Vec<_>>()
    };
    // parameter, unit, start (the case's 3e-4 m/s and 1e-4 1/m), fitted, ...
    let k = row("formation.conductivity");
    assert_eq!((k[1].as_str(), k[2].as_str()), ("m/s", "3.000e-4"), "{out}");
    let ss = row("formation.specific_storage");
    assert_eq!(
        (ss[1].as_str(), ss[2].as_str()),
        ("1/m", "1.000e-4"),
        "{out}"
    );
    let html = std::fs::read_to_string(&page).unwrap();
    assert!(!html.contains("(SI)"));
    assert!(html.contains("<code>formation.conductivity</code></th><td>m/s</td><td>3.000e-4</td>"));
}

/// A fit of the conductivity alone (from 3e-4 m/s, truth 1e-4 m/s) stopped by --max-runs:
/// exit 1, every output says it did not converge, and no value is called constrained or given
/// a valid interval.
#[test]
fn a_fit_that_did_not_converge_exits_1_and_says_so_everywhere() {
    let dir = tempfile::tempdir().unwrap();
    let (case_path, log_path) = write_inputs(dir.path());
    let page = dir.path().join("cal.html");
    let out_case = dir.path().join("calibrated.json");
    let run = |extra: &[&str]| {
        boreflux()
            .arg("calibrate")
            .arg(&case_path)
            .arg(&log_path)
            .args(["--free", K, "--max-runs", "1", "--jobs", "2"])
            .args(extra)
            .output()
            .unwrap()
    };
    let j = run(&[
        "--json",
        "-o",
        page.to_str().unwrap(),
        "--write-case",
        out_case.to_str().unwrap(),
    ]);
    assert_eq!(
        j.status.code(),
        Some(1),
        "{}",
        String::from_utf8_lossy(&j.stderr)
    );
    assert!(String::from_utf8_lossy(&j.stderr).contains("did not converge"));
    let v: Value = serde_json::from_slice(&j.stdout).unwrap();
    assert_eq!(v["converged"], false);
    for p in v["parameters"].as_array().unwrap() {
        assert_eq!(p["label"], "not converged", "{p}");
        assert_eq!(p["constrained"], false, "{p}");
        assert_eq!(p["interval_valid"], false, "{p}");
        assert!(
            p["status"].as_str().unwrap().starts_with("NOT CONVERGED"),
            "{p}"
        );
    }
    // One free parameter whose interval exists where the fit stopped: it is shown, marked.
    assert!(v["parameters"][0]["interval_si"].is_array(), "{v}");
    let html = std::fs::read_to_string(&page).unwrap();
    assert!(html.contains("did not converge"));
    assert!(html.contains("(not valid)"));
    assert!(!html.contains("<td>constrained</td>"));
    let written: Value =
        serde_json::from_str(&std::fs::read_to_string(&out_case).unwrap()).unwrap();
    assert!(written["description"]
        .as_str()
        .unwrap()
        .contains("did NOT converge"));
    assert!(written["title"]
        .as_str()
        .unwrap()
        .ends_with("not converged)"));
    // The table: the same words, no "constrained" label.
    let t = run(&[]);
    assert_eq!(t.status.code(), Some(1));
    let out = String::from_utf8_lossy(&t.stdout);
    assert!(
        out.contains("NOT converged") && out.contains("(not valid)"),
        "{out}"
    );
    for l in out.lines().filter(|l| l.starts_with("formation.")) {
        assert!(
            l.contains("NOT CONVERGED") && !l.ends_with("constrained"),
            "{l}"
        );
    }
}

/// A lower bound above the true conductivity (1e-4 m/s): the fit ends on it, and the value is
/// reported at the bound with an interval that is not valid, not as constrained.
#[test]
fn a_value_at_its_bound_is_flagged_and_its_interval_not_valid() {
    let dir = tempfile::tempdir().unwrap();
    let (case_path, log_path) = write_inputs(dir.path());
    let o = success(
        boreflux()
            .arg("calibrate")
            .arg(&case_path)
            .arg(&log_path)
            .args([
                "--free",
                "formation.conductivity=2e-4 m/s..1e-2 m/s",
                "--free",
                SS,
                "--json",
                "--jobs",
                "2",
            ]),
        "calibrate",
    );
    let v: Value = serde_json::from_slice(&o.stdout).unwrap();
    let k = &v["parameters"][0];
    eprintln!("{k}");
    assert_eq!(k["label"], "at bound", "{k}");
    assert_eq!(k["at_bound"], "lower", "{k}");
    assert_eq!(k["interval_valid"], false, "{k}");
    assert_eq!(k["constrained"], false, "{k}");
    assert!(
        k["status"]
            .as_str()
            .unwrap()
            .contains("AT THE LOWER BOUND (2.000e-4 m/s)"),
        "{k}"
    );
}
