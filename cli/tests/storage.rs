//! The storage choice (`output.store`, docs/formats.md "Storage choice"): envelopes against a
//! hand-computed sine envelope and against the every-step series of the same run, every
//! choice read back by the report, and nothing left on disk by a refused choice.

mod common;

use std::path::{Path, PathBuf};

use boreflux::case::load_case;
use boreflux::report::read::read_run;
use boreflux::report::write_report;
use common::{boreflux, shipped_case, success};

/// A fresh scratch folder for one test, removed when the guard drops, also when the test
/// fails (a panic unwinds through the guard).
fn scratch(name: &str) -> tempfile::TempDir {
    tempfile::Builder::new()
        .prefix(&format!("boreflux-storage-{name}-"))
        .tempdir()
        .unwrap()
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
    let tmp = scratch("sine");
    let dir = tmp.path();
    let env_case = sine_case(dir, r#"{ "store": "envelopes", "detail_cycles": 2 }"#, "");
    let env_h5 = dir.join("env.h5");
    run(&env_case, &env_h5);
    let all_case = sine_case(dir, r#"{ "store": "steps" }"#, "");
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
}

#[test]
fn the_report_reads_every_storage_choice() {
    let tmp = scratch("report");
    let dir = tmp.path();
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
        let case = sine_case(dir, output, extra);
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
}

#[test]
fn a_refused_storage_choice_names_its_field_and_leaves_nothing() {
    let tmp = scratch("refused");
    let dir = tmp.path();
    for (output, field) in [
        (r#"{ "store": "every_pixel" }"#, "output.store"),
        (
            r#"{ "store": "envelopes", "detail_cycles": 0 }"#,
            "output.detail_cycles",
        ),
    ] {
        let case = sine_case(dir, output, "");
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
        let left: Vec<_> = std::fs::read_dir(dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().into_string().unwrap())
            .filter(|n| n != "case.json")
            .collect();
        assert!(left.is_empty(), "{left:?}");
    }
}

/// Cycles jumped over (`numerics.multiscale` "auto") have no envelope, and are listed in
/// `/jumps`: every cycle of the run is either enveloped or jumped over, never both.
#[test]
fn jumped_cycles_have_no_envelope() {
    let tmp = scratch("sine-jumps");
    let dir = tmp.path();
    let case = sine_case(
        dir,
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

/// The municipal demo's surge block (cases/municipal-sand-gravel.json, invented demo data)
/// ramped over 16 cycles instead of 5, every cycle computed, with the formation's
/// conductivity `formation_k` and `duration`; `output` is the output section. With 1e-5 m/s
/// the column under the block parts from the middle of the ramp on (the formation cannot
/// supply the stroke), with the demo's 4e-4 m/s it never does, but the grain Reynolds
/// number at the wall passes 1 in the ramp and every cycle after it.
fn ramped_surge_case(
    dir: &Path,
    name: &str,
    formation_k: &str,
    duration: &str,
    output: &str,
) -> PathBuf {
    let mut case = shipped_case("municipal-sand-gravel.json");
    case["title"] = "ramped surge block (invented test data)".into();
    case["drive"]["ramp_cycles"] = 16.into();
    case["formation"]["conductivity"] = formation_k.into();
    case["duration"] = duration.into();
    case["numerics"]["multiscale"] = "off".into();
    case["output"] = serde_json::from_str(output).unwrap();
    let p = dir.join(format!("{name}.json"));
    std::fs::write(&p, serde_json::to_string_pretty(&case).unwrap()).unwrap();
    p
}

/// The run's events: (cycle, kind name), in time order.
fn events(file: &hdf5::File) -> Vec<(u64, String)> {
    let cycles = file
        .dataset("events/cycle")
        .unwrap()
        .read_raw::<u64>()
        .unwrap();
    let kinds = file
        .dataset("events/kind")
        .unwrap()
        .read_raw::<u8>()
        .unwrap();
    let names = file
        .dataset("events/kinds")
        .unwrap()
        .read_raw::<hdf5::types::VarLenUnicode>()
        .unwrap();
    cycles
        .into_iter()
        .zip(
            kinds
                .iter()
                .map(|&k| names[usize::from(k)].as_str().to_owned()),
        )
        .collect()
}

/// The cycles (by envelope index; every cycle is computed) that have a step inside them in
/// `/series` (the step on a cycle's end also begins the next one: it is not counted).
fn kept_cycles(file: &hdf5::File) -> std::collections::BTreeSet<usize> {
    let (start, end) = (
        read(file, "envelopes/start_time"),
        read(file, "envelopes/end_time"),
    );
    let t = read(file, "series/time");
    (0..start.len())
        .filter(|&k| t.iter().any(|&x| x > start[k] && x < end[k]))
        .collect()
}

/// Names of the datasets of `/series` (the power and work of each zone in subgroups).
/// The run's warnings, `/summary` attribute `warnings`, one per line.
fn summary_warnings(file: &hdf5::File) -> String {
    file.group("summary")
        .unwrap()
        .attr("warnings")
        .unwrap()
        .read_scalar::<hdf5::types::VarLenUnicode>()
        .unwrap()
        .as_str()
        .to_owned()
}

fn series_names(file: &hdf5::File) -> Vec<String> {
    let g = file.group("series").unwrap();
    let mut names = Vec::new();
    for n in g.member_names().unwrap() {
        match g.group(&n) {
            Ok(sub) => names.extend(
                sub.member_names()
                    .unwrap()
                    .into_iter()
                    .map(|m| format!("{n}/{m}")),
            ),
            Err(_) => names.push(n),
        }
    }
    names
}

/// A column parting and a warning's limit crossed mid-run: the cycle holding the first of
/// each kind and one each side are in `/series` in full, and equal bit for bit to the
/// every-step run of the same case at those times (same stepper, same steps; the storage
/// choice does not touch the solver).
#[test]
fn the_cycles_around_a_mid_run_parting_are_kept_in_full() {
    let tmp = scratch("parting");
    let dir = tmp.path();
    let out = r#"{ "store": "envelopes", "detail_cycles": 2, "event_windows": 1 }"#;
    let env_case = ramped_surge_case(dir, "env", "1e-5 m/s", "90 s", out);
    let all_case = ramped_surge_case(dir, "all", "1e-5 m/s", "90 s", r#"{ "store": "steps" }"#);
    let (env_h5, all_h5) = (dir.join("env.h5"), dir.join("all.h5"));
    run(&env_case, &env_h5);
    run(&all_case, &all_h5);
    let env = hdf5::File::open(&env_h5).unwrap();
    let all = hdf5::File::open(&all_h5).unwrap();
    // The events are the solver's and the checks', whatever the storage.
    assert_eq!(events(&env), events(&all));
    let ev = events(&env);
    let (start, end) = (
        read(&env, "envelopes/start_time"),
        read(&env, "envelopes/end_time"),
    );
    let n = start.len();
    assert_eq!(n, 30, "90 s at 20 strokes per minute");
    let first_parting = ev
        .iter()
        .find(|(_, k)| k == "column_parting")
        .expect("the column parts in this case")
        .0 as usize;
    // Mid-run: outside the first and the last 2 cycles, with a cycle each side.
    assert!(
        (3..n - 3).contains(&first_parting),
        "first parting in cycle {first_parting}"
    );
    let warnings = summary_warnings(&all);
    assert!(warnings.contains("parted"), "{warnings}");
    // The report marks the first parting on the time charts, one line per chart.
    let html = dir.join("env.html");
    write_report(std::slice::from_ref(&env_h5), &html).unwrap();
    let page = std::fs::read_to_string(&html).unwrap();
    let marked = page.matches(">column parting (first)</text>").count();
    assert!((5..=10).contains(&marked), "{marked} parting marks");
    let kept = kept_cycles(&env);
    let t_all = read(&all, "series/time");
    let t_env = read(&env, "series/time");
    let names = series_names(&env);
    assert!(names.len() > 20, "{names:?}");
    let mut kinds: Vec<&str> = ev.iter().map(|(_, k)| k.as_str()).collect();
    kinds.sort_unstable();
    kinds.dedup();
    for kind in kinds {
        let c = ev.iter().find(|(_, k)| k == kind).unwrap().0 as usize;
        let (lo, hi) = (c.saturating_sub(1), (c + 1).min(n - 1));
        for k in lo..=hi {
            assert!(
                kept.contains(&k),
                "{kind}: cycle {k} of {c}'s window not kept"
            );
        }
        // Every step of the window, row for row.
        let (t0, t1) = (start[lo], end[hi]);
        let rows_all: Vec<usize> = (0..t_all.len())
            .filter(|&i| t_all[i] >= t0 && t_all[i] <= t1)
            .collect();
        let rows_env: Vec<usize> = (0..t_env.len())
            .filter(|&i| t_env[i] >= t0 && t_env[i] <= t1)
            .collect();
        assert_eq!(
            rows_all.len(),
            rows_env.len(),
            "{kind}: steps of cycles {lo}..={hi}"
        );
        for name in &names {
            let (a, e) = (
                read(&all, &format!("series/{name}")),
                read(&env, &format!("series/{name}")),
            );
            for (&i, &j) in rows_all.iter().zip(&rows_env) {
                assert_eq!(
                    a[i].to_bits(),
                    e[j].to_bits(),
                    "{kind}: series/{name} at t = {}",
                    t_all[i]
                );
            }
        }
    }
}

/// A warning's limit crossed in every cycle from the middle of the ramp on: the detail
/// windows stay bounded by `output.event_windows` (docs/formats.md "Events"): the first
/// `event_windows` cycles holding it with one each side, and the last late window (3
/// cycles) before the closing cycles — the kept set is exactly that, whatever the number of
/// repeats.
#[test]
fn a_warning_repeated_every_cycle_keeps_bounded_windows() {
    let tmp = scratch("repeated");
    let dir = tmp.path();
    let d = 2usize;
    for windows in [0usize, 1, 3] {
        let out = format!(
            r#"{{ "store": "envelopes", "detail_cycles": {d}, "event_windows": {windows} }}"#
        );
        let case = ramped_surge_case(dir, "rep", "4e-4 m/s", "3 min", &out);
        let h5 = dir.join(format!("rep{windows}.h5"));
        run(&case, &h5);
        let f = hdf5::File::open(&h5).unwrap();
        let ev = events(&f);
        let n = read(&f, "envelopes/start_time").len();
        assert_eq!(n, 60);
        // The premise: one kind only, in every cycle from its first to the end.
        assert!(ev.iter().all(|(_, k)| k == "grain_reynolds"), "{ev:?}");
        let c = ev[0].0 as usize;
        let cycles: std::collections::BTreeSet<usize> =
            ev.iter().map(|&(c, _)| c as usize).collect();
        assert_eq!(cycles, (c..n).collect(), "repeats every cycle from {c}");
        assert!(c > d + 1 && c + windows + 1 < n - d - 3, "cycle {c}");
        let mut expected: std::collections::BTreeSet<usize> = (0..d).collect();
        expected.extend(n - d..n);
        if windows > 0 {
            expected.extend(c - 1..=c + windows);
            expected.extend(n - d - 3..n - d);
        }
        assert_eq!(kept_cycles(&f), expected, "event_windows {windows}");
    }
}

/// The run-size estimate of an envelope run (`check`; docs/formats.md "Run size") allows
/// for the event windows, whose number is not known before the run, by an upper bound.
/// The ramped surge case raises the grain Reynolds warning in every cycle from the ramp on
/// (one kind of the 8 the estimate allows for a surge block without a thrust bound): the
/// estimated cycles kept step by step bound those in the file, and the estimated size
/// bounds the file's and is within 10 times it (docs/formats.md states the factor and
/// what makes it: the 2× step allowance of the adaptive scheme, windows counted for kinds
/// that are not raised, the compression assumed). The estimate before the event windows
/// were counted fails the first two checks with 20 windows and 1 detail cycle.
#[test]
fn the_size_estimate_bounds_an_envelope_run_with_events_every_cycle() {
    let tmp = scratch("estimate");
    let dir = tmp.path();
    for (detail, windows) in [(1u64, 20u64), (1, 3), (10, 3)] {
        let out = format!(
            r#"{{ "store": "envelopes", "detail_cycles": {detail}, "event_windows": {windows} }}"#
        );
        let case = ramped_surge_case(dir, "est", "4e-4 m/s", "10 min", &out);
        let cost = boreflux::cost::run_cost(&load_case(&case).unwrap(), false, 0);
        let bound = cost.kept.expect("an envelope run");
        let h5 = dir.join(format!("est-{detail}-{windows}.h5"));
        run(&case, &h5);
        let got = std::fs::metadata(&h5).unwrap().len() as f64;
        let f = hdf5::File::open(&h5).unwrap();
        // The premise: one kind, raised in nearly every one of the 200 cycles.
        let ev = events(&f);
        assert!(ev.iter().all(|(_, k)| k == "grain_reynolds"), "{ev:?}");
        assert!(ev.len() > 150, "{} events", ev.len());
        assert_eq!(bound.cycles, 200.0);
        let kept = kept_cycles(&f).len() as f64;
        let what = format!("detail_cycles {detail}, event_windows {windows}");
        assert!(
            bound.kept >= kept,
            "{what}: {kept} cycles kept, estimate {}",
            bound.kept
        );
        assert!(
            cost.bytes >= got,
            "{what}: estimate {} B below the {got} B written",
            cost.bytes
        );
        assert!(
            cost.bytes <= 10.0 * got,
            "{what}: estimate {} B over 10 times the {got} B written",
            cost.bytes
        );
    }
}

/// A schedule whose stages differ in period has no common period, so its run closes no
/// drive cycle: `"envelopes"` is refused naming `output.store`, and `"auto"` keeps every
/// step even when the run is long (docs/formats.md "Storage choice"): the shipped staged
/// development (two surge-block stages, then a constant rate).
#[test]
fn a_schedule_without_a_common_period_gets_no_envelopes() {
    let tmp = scratch("no-period");
    let dir = tmp.path();
    let mut case = shipped_case("staged-development.json");
    case["output"] = serde_json::json!({ "store": "envelopes", "detail_cycles": 1 });
    let p = dir.join("staged.json");
    std::fs::write(&p, case.to_string()).unwrap();
    let err = format!("{:#}", load_case(&p).unwrap_err());
    assert!(err.contains("output.store"), "{err}");
    // "auto" over 250 000 estimated steps (the staged case lengthened) still keeps steps.
    case["output"] = serde_json::json!({ "store": "auto" });
    case["drive"]["stages"][1]["duration"] = "3000 cycles".into();
    std::fs::write(&p, case.to_string()).unwrap();
    let loaded = load_case(&p).unwrap();
    assert!(
        boreflux_solver::cost::estimate(&loaded.model).steps > 250_000.0,
        "the lengthened schedule is long enough for \"auto\" to choose"
    );
    assert!(
        matches!(loaded.storage, boreflux::case::Storage::Steps),
        "{:?}",
        loaded.storage
    );
}

/// A run that closes no drive cycle says why beside its count of 0 (the shipped staged
/// development: its stages differ in period).
#[test]
fn a_run_without_cycles_says_why() {
    let tmp = scratch("no-cycles");
    let out = tmp.path().join("staged.h5");
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let o = success(
        boreflux()
            .args(["run", "-q", "-o"])
            .arg(&out)
            .arg(cases.join("staged-development.json")),
        "staged run",
    );
    let text = String::from_utf8_lossy(&o.stdout);
    assert!(
        text.contains(" / 0 (no complete drive cycle: the drive has no single period"),
        "{text}"
    );
}

/// Every warning of `/summary` that names a moment of the run has events of its kind, and
/// every such kind raised has its warning, and is among the kinds the size estimate counts
/// for the drive: the shipped swab (partings, vapour suction, slot
/// velocity) and the staged development case (grain Reynolds, stage starts).
#[test]
fn the_summary_warnings_and_the_events_agree() {
    let tmp = scratch("agree");
    let dir = tmp.path();
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let pairs = [
        ("column_parting", "parted"),
        ("slot_velocity", "slot velocity"),
        ("grain_reynolds", "grain Reynolds number"),
        ("collapse_load", "COLLAPSE RISK"),
        ("pump_suction", "broke suction"),
        ("thrust_bound", "drive.max_thrust) for"),
    ];
    for name in ["swab-deep", "staged-development", "municipal-sand-gravel"] {
        let h5 = dir.join(format!("{name}.h5"));
        run(&cases.join(format!("{name}.json")), &h5);
        let f = hdf5::File::open(&h5).unwrap();
        let ev = events(&f);
        // The size estimate counts windows only for the kinds it deems possible for the
        // case (`possible_events`): every kind raised must be one of them.
        let loaded = load_case(&cases.join(format!("{name}.json"))).unwrap();
        let limits = boreflux::summary::watch_limits(&loaded);
        let possible: Vec<&str> = boreflux_solver::cost::possible_events(&loaded.model, &limits)
            .iter()
            .map(|k| k.name())
            .collect();
        for (_, k) in &ev {
            assert!(
                k == "stage_start" || possible.contains(&k.as_str()),
                "{name}: {k} raised, not among {possible:?}"
            );
        }
        let warnings = summary_warnings(&f);
        for (kind, words) in pairs {
            assert_eq!(
                ev.iter().any(|(_, k)| k == kind),
                warnings.contains(words),
                "{name}: event {kind} against warning \"{words}\":\n{warnings}"
            );
        }
        if name == "staged-development" {
            assert!(ev.iter().any(|(_, k)| k == "stage_start"));
        }
        if name == "swab-deep" {
            assert!(ev.iter().any(|(_, k)| k == "column_parting"));
        }
        let t = read(&f, "events/time");
        assert!(t.windows(2).all(|w| w[0] <= w[1]), "{name}: time order");
    }
}
