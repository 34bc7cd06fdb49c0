//! Cycle jumping (`numerics.multiscale = "auto"`, docs/time-stepping.md §Multiscale
//! stepping) against full stepping, the reference: the same case run both ways must give the
//! headline figures within 1 % (the accuracy target stated in the docs), the jumps must be
//! recorded in `/jumps` and no `/cycles` record may exist for a skipped cycle.
//!
//! The reference numbers are those of the full-stepping run of the same case, computed in the
//! test; nothing here is a recorded number.

mod common;

use common::{boreflux, shipped_case as case, success};
use serde_json::Value;
use std::path::{Path, PathBuf};

/// Accuracy target of multiscale against full stepping on the headline figures (stated in
/// docs/time-stepping.md §Multiscale stepping).
const TARGET: f64 = 0.01;

/// The figures compared: cake removal time, final skin, fines removed, peak face (pore)
/// velocity both ways, peak collapse load, final specific capacity.
const FIGURES: [&str; 7] = [
    "cake_removal_time_s",
    "skin_end",
    "fines_removed_kg",
    "peak_outward_pore_velocity_m_s",
    "peak_inward_pore_velocity_m_s",
    "peak_collapse_pressure_pa",
    "specific_capacity_end_m2_s",
];

/// Runs `c` and returns the JSON summary and the output file.
fn run(dir: &Path, tag: &str, c: &Value) -> (Value, PathBuf) {
    let path = dir.join(format!("{tag}.json"));
    std::fs::write(&path, serde_json::to_string_pretty(c).unwrap()).unwrap();
    let out = dir.join(format!("{tag}.h5"));
    let o = success(
        boreflux()
            .args(["run", "-q", "--json", "-o"])
            .arg(&out)
            .arg(&path),
        tag,
    );
    (serde_json::from_slice(&o.stdout).unwrap(), out)
}

/// Runs `c` in full and with cycle jumping (`tolerance`: None = the default) and compares.
fn compare(c: &Value, tolerance: Option<f64>) -> (Value, Value, PathBuf, tempfile::TempDir) {
    let dir = tempfile::tempdir().unwrap();
    let mut f = c.clone();
    f["numerics"]["multiscale"] = "off".into();
    let (full, _) = run(dir.path(), "full", &f);
    let mut m = c.clone();
    m["numerics"]["multiscale"] = "auto".into();
    if let Some(t) = tolerance {
        m["numerics"]["multiscale_tolerance"] = t.into();
    }
    let (multi, out) = run(dir.path(), "multi", &m);
    assert_eq!(full["skipped_cycles"], 0);
    let skipped = multi["skipped_cycles"].as_u64().unwrap();
    assert!(
        skipped > 0,
        "no cycle was jumped over: the test checks nothing"
    );
    assert!(multi["steps"].as_u64().unwrap() < full["steps"].as_u64().unwrap());
    assert_eq!(multi["cycles"], full["cycles"]);
    for f in FIGURES {
        match (full[f].as_f64(), multi[f].as_f64()) {
            (Some(a), Some(b)) => {
                let rel = (b - a).abs() / a.abs();
                assert!(rel <= TARGET, "{f}: full {a}, multiscale {b} ({rel:.2e})");
            }
            (a, b) => assert_eq!(a, b, "{f} present in one run only"),
        }
    }
    (full, multi, out, dir)
}

#[test]
fn municipal_surge_block_for_30_min_matches_full_stepping() {
    let mut c = case("municipal-sand-gravel.json");
    c["duration"] = "30 min".into();
    let (_, multi, out, _dir) = compare(&c, None);
    // The jumps are in /jumps, and /cycles holds only the computed cycles.
    let f = hdf5::File::open(&out).unwrap();
    let skipped: Vec<f64> = f.dataset("jumps/cycles").unwrap().read_raw().unwrap();
    let first: Vec<f64> = f.dataset("jumps/first_cycle").unwrap().read_raw().unwrap();
    let error: Vec<f64> = f
        .dataset("jumps/error_estimate")
        .unwrap()
        .read_raw()
        .unwrap();
    let total: f64 = skipped.iter().sum();
    assert_eq!(total as u64, multi["skipped_cycles"].as_u64().unwrap());
    assert!(error.iter().all(|&e| (0.0..=1.0).contains(&e)), "{error:?}");
    let index: Vec<u64> = f.dataset("cycles/index").unwrap().read_raw().unwrap();
    let cycles = multi["cycles"].as_u64().unwrap();
    assert_eq!(index.len() as u64 + total as u64, cycles);
    for (a, k) in first.iter().zip(&skipped) {
        let (a, b) = (*a as u64, (*a + *k) as u64);
        assert!(
            !index.iter().any(|&i| (a..b).contains(&i)),
            "a /cycles record lies in the skipped cycles {a}..{b}"
        );
    }
    // The last cycles are computed.
    assert_eq!(*index.last().unwrap() + 1, cycles);
}

#[test]
fn pump_and_backwash_matches_full_stepping() {
    // The drawdown cone of the net pumping deepens like ln t: at the default tolerance
    // its change of change allows no jump in 40 cycles (measured), so the largest
    // tolerance accepted is used, where jumps happen.
    let mut c = case("irrigation-pump-surge.json");
    c["duration"] = "40 cycles".into();
    compare(&c, Some(1e-2));
}

#[test]
fn municipal_surge_block_for_a_whole_8_hour_day_matches_full_stepping() {
    // The whole development day of the benchmark (benches/long_job.rs): 9 600 cycles,
    // full stepping about 20 s of the suite's time on the 2-core machine.
    let mut c = case("municipal-sand-gravel.json");
    c["duration"] = "8 h".into();
    let (_, multi, out, _dir) = compare(&c, None);
    // Most of the day is jumped over, and every jump says which bound set its length.
    let skipped = multi["skipped_cycles"].as_u64().unwrap();
    assert!(
        skipped * 10 > 9 * 9600,
        "{skipped} of 9 600 cycles jumped over"
    );
    let f = hdf5::File::open(&out).unwrap();
    let bound: Vec<f64> = f.dataset("jumps/bound").unwrap().read_raw().unwrap();
    let cycles: Vec<f64> = f.dataset("jumps/cycles").unwrap().read_raw().unwrap();
    assert_eq!(bound.len(), cycles.len());
    assert_eq!(cycles.iter().sum::<f64>() as u64, skipped);
    let codes = boreflux_solver::JumpBound::ALL.len() as f64;
    assert!(
        bound
            .iter()
            .all(|&b| b.fract() == 0.0 && (0.0..codes).contains(&b)),
        "{bound:?}"
    );
}
