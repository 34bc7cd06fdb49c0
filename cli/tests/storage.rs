//! The storage choice (`output.store`, docs/formats.md "Storage choice"): envelopes against a
//! hand-computed sine envelope and against the every-step series of the same run, every
//! choice read back by the report, and nothing left on disk by a refused choice.

mod common;

use std::path::{Path, PathBuf};

use boreflux::report::read::read_run;
use boreflux::report::write_report;
use common::{boreflux, success};

fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("boreflux-storage-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

/// A sine-head case (amplitude 1.5 m, 0.5 Hz, 60 cycles, 200 steps per cycle), a Darcy well
/// without cake; `output` is the case's output section. Every cycle is computed
/// (`numerics.multiscale` off) unless `numerics_extra` says otherwise, so each has its
/// envelope.
fn sine_case(dir: &Path, output: &str, numerics_extra: &str) -> PathBuf {
    let numerics_extra = if numerics_extra.contains("multiscale") {
        numerics_extra.to_owned()
    } else {
        format!(r#"{numerics_extra}, "multiscale": "off""#)
    };
    let text = format!(
        r#"{{
  "title": "sine envelope test (invented test data)",
  "well": {{ "screen_radius": 0.1, "screen_length": 6, "open_area": 0.12 }},
  "pack": {{ "outer_radius": 0.2, "porosity": 0.32, "conductivity": 8e-3 }},
  "formation": {{ "conductivity": 2e-4, "specific_storage": 1e-5 }},
  "drive": {{ "kind": "sine_head", "amplitude": 1.5, "frequency": 0.5 }},
  "duration": 120,
  "numerics": {{ "steps_per_cycle": 200 {numerics_extra} }},
  "output": {output}
}}"#
    );
    let p = dir.join("case.json");
    std::fs::write(&p, text).unwrap();
    p
}

fn run(case: &Path, out: &Path) {
    success(
        boreflux()
            .args(["run", "-q", "--force"])
            .arg(case)
            .arg("-o")
            .arg(out),
        "run",
    );
}

fn read(file: &hdf5::File, path: &str) -> Vec<f64> {
    file.dataset(path).unwrap().read_raw::<f64>().unwrap()
}

#[test]
fn envelopes_match_the_sine_and_the_every_step_series() {
    let dir = scratch("sine");
    let env_case = sine_case(&dir, r#"{ "store": "envelopes", "detail_cycles": 2 }"#, "");
    let env_h5 = dir.join("env.h5");
    run(&env_case, &env_h5);
    let all_case = sine_case(&dir, r#"{ "store": "steps" }"#, "");
    let all_h5 = dir.join("all.h5");
    run(&all_case, &all_h5);
    let env = hdf5::File::open(&env_h5).unwrap();
    let all = hdf5::File::open(&all_h5).unwrap();
    let start = read(&env, "envelopes/start_time");
    let end = read(&env, "envelopes/end_time");
    let (min, max, rms) = (
        read(&env, "envelopes/min/well_head"),
        read(&env, "envelopes/max/well_head"),
        read(&env, "envelopes/rms/well_head"),
    );
    // 60 complete cycles of 2 s.
    assert_eq!(start.len(), 60);
    // Hand-computed envelope of h = A sin(2πft), A = 1.5 m: max A, min −A, RMS A/√2. Sampled
    // at 200 points per period, the largest sample is within A (1 − cos(π/200)) = 1.9e-4 m
    // of A (the peak lies at most half a step from a sample); the trapezoidal rule over a
    // whole period of equally spaced samples integrates sin² exactly (its error terms are
    // Fourier modes above the 100th), so the RMS is A/√2 to round-off where the steps are
    // equal; the bound 1e-9 allows for unequal steps at the cycle ends. The first cycle
    // starts at the first step, not at t = 0 (the file has no step at 0): from the second.
    let a = 1.5_f64;
    let sample = a * (1.0 - (std::f64::consts::PI / 200.0).cos());
    for k in 1..start.len() {
        assert!(
            max[k] <= a + 1e-12 && max[k] >= a - sample - 1e-12,
            "cycle {k}: max {}",
            max[k]
        );
        assert!(
            min[k] >= -a - 1e-12 && min[k] <= -a + sample + 1e-12,
            "cycle {k}: min {}",
            min[k]
        );
        assert!(
            (rms[k] - a / 2f64.sqrt()).abs() <= 1e-9 * a,
            "cycle {k}: rms {}",
            rms[k]
        );
    }
    // Against the every-step series of the same case (the solver does not depend on the
    // storage choice): min, max and the trapezoidal RMS of every series, cycle by cycle.
    let t = read(&all, "series/time");
    for name in [
        "well_head",
        "screen_flow",
        "face_flux",
        "power/pack",
        "shear_proxy",
    ] {
        let x = read(&all, &format!("series/{name}"));
        let (emin, emax, erms) = (
            read(&env, &format!("envelopes/min/{name}")),
            read(&env, &format!("envelopes/max/{name}")),
            read(&env, &format!("envelopes/rms/{name}")),
        );
        for k in 0..start.len() {
            let idx: Vec<usize> = (0..t.len())
                .filter(|&i| t[i] >= start[k] && t[i] <= end[k])
                .collect();
            let lo = idx.iter().map(|&i| x[i]).fold(f64::INFINITY, f64::min);
            let hi = idx.iter().map(|&i| x[i]).fold(f64::NEG_INFINITY, f64::max);
            let sq: f64 = idx
                .windows(2)
                .map(|w| 0.5 * (t[w[1]] - t[w[0]]) * (x[w[0]].powi(2) + x[w[1]].powi(2)))
                .sum();
            let r = (sq / (end[k] - start[k])).sqrt();
            assert_eq!((emin[k], emax[k]), (lo, hi), "{name} cycle {k}");
            assert!(
                (erms[k] - r).abs() <= 1e-12 * r.abs().max(1e-300),
                "{name} cycle {k}: {} vs {r}",
                erms[k]
            );
        }
    }
    // The detail windows: the first 2 and the last 2 cycles, every step of them.
    let te = read(&env, "series/time");
    let first: Vec<f64> = t.iter().copied().filter(|&x| x <= end[1]).collect();
    let last: Vec<f64> = t.iter().copied().filter(|&x| x > 120.0 - 4.0).collect();
    assert_eq!(&te[..first.len()], &first[..]);
    assert_eq!(&te[te.len() - last.len()..], &last[..]);
    assert!(
        te.len() < t.len() / 5,
        "{} of {} steps kept",
        te.len(),
        t.len()
    );
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn the_report_reads_every_storage_choice() {
    let dir = scratch("report");
    let choices = [
        ("steps", r#"{ "store": "steps" }"#, ""),
        (
            "every5",
            r#"{ "store": "steps" }"#,
            r#", "output_every": 5"#,
        ),
        ("envelopes", r#"{ "store": "envelopes" }"#, ""),
    ];
    for (name, output, extra) in choices {
        let case = sine_case(&dir, output, extra);
        let h5 = dir.join(format!("{name}.h5"));
        run(&case, &h5);
        let r = read_run(&h5).unwrap();
        let html = dir.join(format!("{name}.html"));
        write_report(std::slice::from_ref(&h5), &html).unwrap();
        let page = std::fs::read_to_string(&html).unwrap();
        let bands = page.matches(r#"fill-opacity="0.3""#).count();
        match name {
            "envelopes" => {
                let env = r.envelopes.expect("envelopes read back");
                assert_eq!(env.min.time.len(), 60);
                assert_eq!(env.max.well_head.len(), 60);
                // One band per time chart of the run.
                assert!(bands >= 5, "{bands} bands");
            }
            _ => {
                assert!(r.envelopes.is_none());
                assert_eq!(bands, 0);
            }
        }
        if name == "every5" {
            let all = read_run(&dir.join("steps.h5")).unwrap();
            // Every 5th step, plus the steps that land on sync times.
            assert!(r.series.time.len() < all.series.time.len() / 4);
        }
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_refused_storage_choice_names_its_field_and_leaves_nothing() {
    let dir = scratch("refused");
    for (output, field) in [
        (r#"{ "store": "every_pixel" }"#, "output.store"),
        (
            r#"{ "store": "envelopes", "detail_cycles": 0 }"#,
            "output.detail_cycles",
        ),
    ] {
        let case = sine_case(&dir, output, "");
        let out = dir.join("out.h5");
        let o = boreflux()
            .args(["run", "-q"])
            .arg(&case)
            .arg("-o")
            .arg(&out)
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(2));
        let err = String::from_utf8_lossy(&o.stderr);
        assert!(err.contains(field), "{err}");
        let left: Vec<_> = std::fs::read_dir(&dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().into_string().unwrap())
            .filter(|n| n != "case.json")
            .collect();
        assert!(left.is_empty(), "{left:?}");
    }
    let _ = std::fs::remove_dir_all(&dir);
}

/// Cycles jumped over (`numerics.multiscale` "auto") have no envelope, and are listed in
/// `/jumps`: every cycle of the run is either enveloped or jumped over, never both.
#[test]
fn jumped_cycles_have_no_envelope() {
    let dir = scratch("sine-jumps");
    let case = sine_case(
        &dir,
        r#"{ "store": "envelopes", "detail_cycles": 2 }"#,
        r#", "multiscale": "auto""#,
    );
    let h5 = dir.join("env.h5");
    run(&case, &h5);
    let f = hdf5::File::open(&h5).unwrap();
    let start = read(&f, "envelopes/start_time");
    let end = read(&f, "envelopes/end_time");
    let skipped: f64 = read(&f, "jumps/cycles").iter().sum();
    let (from, to) = (read(&f, "jumps/from_time"), read(&f, "jumps/to_time"));
    assert!(skipped > 0.0, "the periodic sine case jumps over cycles");
    // 60 cycles of 2 s in all.
    assert_eq!(start.len() as f64 + skipped, 60.0);
    for (s, e) in start.iter().zip(&end) {
        for (a, b) in from.iter().zip(&to) {
            assert!(
                *e <= *a + 1e-9 || *s >= *b - 1e-9,
                "envelope {s}..{e} inside jump {a}..{b}"
            );
        }
    }
}
