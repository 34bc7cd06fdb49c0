//! End-to-end tests of the built `boreflux` binary: every command is run as a user would
//! run it, and its exit code, output text and files are checked.
//!
//! Where a check compares with a value, the value's source is named beside it. Most values
//! come from the program itself by a second route (the library, the solver run in-process,
//! the HDF5 file against the JSON summary), so the tests catch disagreements between the
//! binary and the code it is built from, and breaks of the documented contracts: the HDF5
//! layout (docs/formats.md, checked against `output/sink.rs` and `commands/run.rs`, which
//! are authoritative), the exit codes (0 success, 1 runtime failure, 2 bad input;
//! `args.rs`), and "nothing partial is left behind" (`output/mod.rs`).

mod common;

use assert_cmd::Command;
use boreflux::case::{load_case, scenario_companions, scenarios};
use boreflux_solver::grid::Zone;
use boreflux_solver::safety::CAUTION;
use boreflux_solver::{Reporting, StepObserver, StepView};
use common::{
    bad_dir, boreflux, cases_dir, dir_entries, interrupt, repo_dir, shipped_cases, stderr_of,
    stdout_of, write,
};
use hdf5::types::VarLenUnicode;
use hdf5::Location;
use serde_json::Value;
use std::collections::BTreeSet;
use std::path::{Path, PathBuf};
use std::process::Output;

// ---------------------------------------------------------------------------------------
// Helpers
// ---------------------------------------------------------------------------------------

/// The default demo case (the first scenario, `boreflux::case::scenarios`).
fn demo_case() -> PathBuf {
    cases_dir().join(format!("{}.json", scenarios()[0].0))
}

/// Runs the command and returns its output, whatever the exit status.
fn output(cmd: &mut Command) -> Output {
    cmd.output().expect("the binary starts")
}

/// Asserts the exit code, showing both streams when it differs.
fn assert_code(o: &Output, code: i32, what: &str) {
    assert_eq!(
        o.status.code(),
        Some(code),
        "{what}: exit status {:?}\n--- stdout\n{}\n--- stderr\n{}",
        o.status,
        stdout_of(o),
        stderr_of(o)
    );
}

/// `boreflux run CASE -o OUT --csv -q` in `dir`, whatever the exit status.
fn run_with_csv(dir: &Path, case: &Path, out: &Path) -> Output {
    output(
        boreflux()
            .current_dir(dir)
            .arg("run")
            .arg(case)
            .arg("-o")
            .arg(out)
            .args(["--csv", "-q"]),
    )
}

/// Asserts that `o` refused bad input: exit 2 and no panic; returns its standard error.
fn refused(o: &Output, what: &str) -> String {
    assert_code(o, 2, what);
    let stderr = stderr_of(o);
    assert_no_panic(&stderr, what);
    stderr
}

/// Asserts that `dir` is empty: nothing written, nothing partial left behind.
fn assert_nothing_left(dir: &Path, what: &str) {
    assert!(
        dir_entries(dir).is_empty(),
        "{what}: left {:?}",
        dir_entries(dir)
    );
}

/// No panic message and no backtrace hint on stderr.
fn assert_no_panic(stderr: &str, what: &str) {
    for bad in ["panicked", "RUST_BACKTRACE"] {
        assert!(
            !stderr.contains(bad),
            "{what}: {bad:?} on stderr:\n{stderr}"
        );
    }
}

/// The lines of `stderr` that start with `error:`.
fn error_lines(stderr: &str) -> Vec<&str> {
    stderr.lines().filter(|l| l.starts_with("error:")).collect()
}

/// Relative difference |a − b| / max(|a|, |b|), 0 when both are 0.
fn rel_diff(a: f64, b: f64) -> f64 {
    let scale = a.abs().max(b.abs());
    if scale == 0.0 {
        0.0
    } else {
        (a - b).abs() / scale
    }
}

/// serde_json's default float parser (no `float_roundtrip` feature) may land one ulp
/// (2.2e-16 relative) away from the printed shortest decimal; a few ulp cover it.
const JSON_PARSE: f64 = 1e-15;

// ---------------------------------------------------------------------------------------
// 1. new → check round trip
// ---------------------------------------------------------------------------------------

/// Checks: `new --list` lists the compiled-in scenarios; `new --scenario NAME` prints a
/// case that, written to a fresh folder with its companion files copied from cases/,
/// passes `check` (exit 0) with the zone table, the resistance shares (summing to 100 %)
/// and the caution; without a needed companion `check` fails with exit 2 on `drive.file`.
/// Checks: `new -o` writes the scenario and every file it reads beside it (the compiled-in
/// texts, byte for byte), so the written case passes `check` as it stands; an existing file
/// is kept without `--force` and nothing else is written; a missing folder writes nothing.
#[test]
fn new_writes_a_scenario_with_the_files_it_reads() {
    for (name, json) in scenarios() {
        let companions: Vec<(&str, &str)> = scenario_companions()
            .iter()
            .filter(|(s, ..)| s == name)
            .map(|&(_, f, t)| (f, t))
            .collect();
        let dir = tempfile::tempdir().unwrap();
        let case = dir.path().join("my-case.json");
        let o = output(
            boreflux()
                .args(["new", "--scenario", name, "-o"])
                .arg(&case),
        );
        assert_code(&o, 0, &format!("new --scenario {name} -o"));
        assert_eq!(std::fs::read_to_string(&case).unwrap(), *json, "{name}");
        let mut want = vec!["my-case.json".to_owned()];
        for (file, text) in &companions {
            assert_eq!(
                std::fs::read_to_string(dir.path().join(file)).unwrap(),
                *text,
                "{name}: {file}"
            );
            want.push((*file).to_owned());
        }
        want.sort();
        assert_eq!(
            dir_entries(dir.path()),
            want,
            "{name}: nothing else written"
        );
        let o = output(boreflux().arg("check").arg(&case));
        assert_code(&o, 0, &format!("check {name} as written by new -o"));
        if let Some((file, _)) = companions.first() {
            // The companion exists: refused without --force, the case file untouched.
            std::fs::write(dir.path().join(file), "edited").unwrap();
            std::fs::remove_file(&case).unwrap();
            let o = output(
                boreflux()
                    .args(["new", "--scenario", name, "-o"])
                    .arg(&case),
            );
            assert_code(
                &o,
                2,
                &format!("new --scenario {name} -o over its companion"),
            );
            assert!(
                stderr_of(&o).contains("already exists"),
                "{}",
                stderr_of(&o)
            );
            assert!(!case.exists(), "{name}: nothing written after a refusal");
            let o = output(
                boreflux()
                    .args(["new", "--scenario", name, "--force", "-o"])
                    .arg(&case),
            );
            assert_code(&o, 0, &format!("new --scenario {name} --force -o"));
            assert_ne!(
                std::fs::read_to_string(dir.path().join(file)).unwrap(),
                "edited"
            );
        }
    }
    let dir = tempfile::tempdir().unwrap();
    let o = output(
        boreflux()
            .args(["new", "-o"])
            .arg(dir.path().join("no-such-folder/x.json")),
    );
    assert_code(&o, 2, "new -o into a missing folder");
    assert!(dir_entries(dir.path()).is_empty());
}

#[test]
fn new_then_check_round_trips_every_scenario() {
    let o = output(boreflux().args(["new", "--list"]));
    assert_code(&o, 0, "new --list");
    let listed: Vec<String> = stdout_of(&o)
        .lines()
        .filter(|l| !l.trim().is_empty())
        .map(|l| l.split_whitespace().next().unwrap().to_owned())
        .collect();
    // Source: the compiled-in scenario list (`boreflux::case::scenarios`).
    let known: Vec<&str> = scenarios().iter().map(|(n, _)| *n).collect();
    assert_eq!(listed, known, "new --list");

    for name in &listed {
        let o = output(boreflux().args(["new", "--scenario", name]));
        assert_code(&o, 0, &format!("new --scenario {name}"));
        let text = stdout_of(&o);
        let json: Value = serde_json::from_str(&text)
            .unwrap_or_else(|e| panic!("{name}: `new` printed invalid JSON: {e}"));
        let title = json["title"].as_str().unwrap_or_default().to_owned();
        // Companions named by `new` on stderr, compared with the compiled-in list
        // (`boreflux::case::scenario_companions`).
        let stderr = stderr_of(&o);
        let mut noted: Vec<String> = stderr
            .lines()
            .filter_map(|l| l.split('`').nth(1).filter(|_| l.starts_with("note:")))
            .map(str::to_owned)
            .collect();
        noted.sort();
        let mut expected: Vec<String> = scenario_companions()
            .iter()
            .filter(|(s, ..)| s == name)
            .map(|(_, f, _)| (*f).to_owned())
            .collect();
        expected.sort();
        assert_eq!(noted, expected, "{name}: companion files named by `new`");

        let dir = tempfile::tempdir().unwrap();
        let case = dir.path().join(format!("{name}.json"));
        std::fs::write(&case, &text).unwrap();
        if !expected.is_empty() {
            // Without its drive table the case must not load.
            let o = output(boreflux().arg("check").arg(&case));
            assert_code(&o, 2, &format!("check {name} without its companion"));
            let errs = error_lines(&stderr_of(&o)).join("\n");
            assert!(errs.contains("drive.file"), "{name}: {errs}");
        }
        for f in &expected {
            std::fs::copy(cases_dir().join(f), dir.path().join(f)).unwrap();
        }

        let o = output(boreflux().arg("check").arg(&case));
        assert_code(&o, 0, &format!("check {name}"));
        let out = stdout_of(&o);
        assert_no_panic(&stderr_of(&o), name);
        assert!(out.starts_with(&title), "{name}: title first:\n{out}");
        // Zone table (check.rs): one row per zone, pack and formation always present.
        assert!(
            out.contains("Zones (radius from the well axis):"),
            "{name}:\n{out}"
        );
        for zone in ["pack", "formation"] {
            assert!(
                out.lines()
                    .any(|l| l.starts_with(&format!("  {zone} ")) && l.contains(" m  K ")),
                "{name}: no zone row for {zone}:\n{out}"
            );
        }
        // Resistance shares: a share of each zone's resistance in the total, so they sum
        // to 100 % (arithmetic); each is printed to 0.01 %, so rounding moves the sum by
        // at most 0.005 % per zone.
        assert!(
            out.contains("Resistance to steady radial flow"),
            "{name}:\n{out}"
        );
        let shares: Vec<f64> = out
            .lines()
            .filter(|l| l.contains(" s/m²") && l.trim_end().ends_with('%'))
            .map(|l| {
                let t = l.trim_end().trim_end_matches('%').trim_end();
                t.rsplit(' ').next().unwrap().parse::<f64>().unwrap()
            })
            .collect();
        assert!(
            shares.len() >= 2,
            "{name}: resistance shares missing:\n{out}"
        );
        let sum: f64 = shares.iter().sum();
        let tol = 0.005 * shares.len() as f64;
        assert!((sum - 100.0).abs() <= tol, "{name}: shares sum to {sum} %");
        assert!(out.contains("controls the flow"), "{name}:\n{out}");
        // The caution (boreflux_solver::safety::CAUTION), as docs/formats.md asks of `check`.
        assert!(
            out.contains(&format!("Caution: {CAUTION}")),
            "{name}: no caution"
        );
    }
}

// ---------------------------------------------------------------------------------------
// 2. run → HDF5 layout and CSV
// ---------------------------------------------------------------------------------------

/// Zone names in `/series/power/<zone>`, `/series/work/<zone>`, `/cycles/work_<zone>` and
/// `/summary` `work_<zone>_j` (docs/formats.md).
const ZONES: [&str; 5] = ["screen", "pack", "cake", "invaded", "formation"];

/// Per-step series and their units, in CSV column order (docs/formats.md, checked against
/// `output/sink.rs`; dimensionless quantities are written with unit "1" there, shown as
/// "-" in the note).
const SERIES: [(&str, &str); 16] = [
    ("time", "s"),
    ("well_head", "m"),
    ("screen_outer_head", "m"),
    ("screen_flow", "m3/s"),
    ("face_flux", "m/s"),
    ("face_pore_velocity", "m/s"),
    ("face_gradient", "1"),
    ("shear_proxy", "Pa"),
    ("cake_thickness", "m"),
    ("cake_coverage", "1"),
    ("skin", "1"),
    ("cake_pressure", "Pa"),
    ("fines_removed", "kg"),
    ("mass_residual", "1"),
    ("energy_residual", "1"),
    ("newton_iterations", "1"),
];

/// Per-cycle datasets besides `index` and `work_<zone>` (docs/formats.md, sink.rs).
const CYCLES: [(&str, &str); 7] = [
    ("start_time", "s"),
    ("end_time", "s"),
    ("peak_outward_flux", "m/s"),
    ("peak_inward_flux", "m/s"),
    ("rms_face_flux", "m/s"),
    ("peak_shear", "Pa"),
    ("cake_removed", "m"),
];

/// Root string attributes (docs/formats.md, run.rs `SinkPlan`).
const ROOT_ATTRS: [&str; 6] = [
    "tool_version",
    "created_utc",
    "title",
    "description",
    "case_json",
    "case_file",
];

/// `/summary` f64 attributes always present (docs/formats.md and run.rs `write_summary`,
/// besides `work_<zone>_j`). `peak_grain_reynolds` is present exactly when the pack's d50
/// is known (summary.rs); `collapse_rating_pa`, `collapse_margin`, `time_to_half_cake_s`
/// and `time_to_90pct_cake_s` may be absent.
const SUMMARY_F64: [&str; 19] = [
    "peak_outward_flux_m_s",
    "skin_start",
    "skin_end",
    "efficiency_start",
    "efficiency_end",
    "specific_capacity_start_m2_s",
    "specific_capacity_end_m2_s",
    "cake_thickness_start_m",
    "cake_thickness_end_m",
    "peak_slot_velocity_m_s",
    "peak_collapse_pressure_pa",
    "energy_closure",
    "max_mass_residual",
    "cells",
    "steps",
    "cycles",
    "outer_radius_m",
    "end_time_s",
    "peak_inward_flux_m_s",
];

const SUMMARY_OPTIONAL_F64: [&str; 4] = [
    "collapse_rating_pa",
    "collapse_margin",
    "time_to_half_cake_s",
    "time_to_90pct_cake_s",
];

fn attr_str(loc: &Location, name: &str, object: &str) -> String {
    loc.attr(name)
        .and_then(|a| a.read_scalar::<VarLenUnicode>())
        .unwrap_or_else(|e| panic!("{object}: string attribute {name}: {e}"))
        .as_str()
        .to_owned()
}

fn attr_f64(loc: &Location, name: &str) -> Option<f64> {
    loc.attr_names()
        .unwrap()
        .iter()
        .any(|n| n == name)
        .then(|| loc.attr(name).and_then(|a| a.read_scalar::<f64>()).unwrap())
}

/// Opens a dataset, checks its `units` (when given) and a non-empty `description`, and
/// returns its shape.
fn dataset_shape(file: &hdf5::File, path: &str, units: Option<&str>) -> Vec<usize> {
    let ds = file
        .dataset(path)
        .unwrap_or_else(|e| panic!("dataset {path}: {e}"));
    let u = attr_str(&ds, "units", path);
    if let Some(want) = units {
        assert_eq!(u, want, "{path}: units");
    }
    let d = attr_str(&ds, "description", path);
    assert!(!d.trim().is_empty(), "{path}: empty description");
    ds.shape()
}

fn read_f64(file: &hdf5::File, path: &str) -> Vec<f64> {
    file.dataset(path)
        .unwrap()
        .read_1d::<f64>()
        .unwrap()
        .to_vec()
}

/// Largest |face flux| over the reported steps, and how many steps were reported.
#[derive(Default)]
struct FaceFlux {
    max_abs: f64,
    reported: usize,
}

impl StepObserver for FaceFlux {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        self.max_abs = self.max_abs.max(s.face_flux_m_s.abs());
        self.reported += 1;
        true
    }
}

/// Checks one result file against the layout; returns the series length.
fn check_layout(h5: &Path, case_path: &Path, case_arg: &str) -> usize {
    let name = case_path.display().to_string();
    let case = load_case(case_path).unwrap();
    let file =
        hdf5::File::open(h5).unwrap_or_else(|e| panic!("{name}: open {}: {e}", h5.display()));

    // Root attributes.
    for a in ROOT_ATTRS {
        attr_str(&file, a, "/");
    }
    // Same package, so the test's version is the binary's (Cargo.toml).
    assert_eq!(
        attr_str(&file, "tool_version", "/"),
        env!("CARGO_PKG_VERSION")
    );
    let created = attr_str(&file, "created_utc", "/");
    humantime::parse_rfc3339(&created)
        .unwrap_or_else(|e| panic!("{name}: created_utc {created:?} is not RFC 3339: {e}"));
    assert_eq!(attr_str(&file, "title", "/"), case.title, "{name}");
    assert_eq!(
        attr_str(&file, "description", "/"),
        case.description,
        "{name}"
    );
    assert_eq!(attr_str(&file, "case_file", "/"), case_arg, "{name}");
    let case_json: Value = serde_json::from_str(&attr_str(&file, "case_json", "/"))
        .unwrap_or_else(|e| panic!("{name}: case_json does not parse: {e}"));
    // Source: the library's resolved case, through the same text route as run.rs.
    let want: Value = serde_json::from_str(&case.resolved.to_string()).unwrap();
    assert_eq!(
        case_json, want,
        "{name}: case_json is not the resolved case"
    );

    // Grid.
    let n = dataset_shape(&file, "grid/r_center", Some("m"));
    assert_eq!(n.len(), 1, "{name}: r_center rank");
    let n = n[0];
    assert!(n >= 1);
    assert_eq!(
        dataset_shape(&file, "grid/r_face", Some("m")),
        [n + 1],
        "{name}"
    );
    assert_eq!(dataset_shape(&file, "grid/zone", Some("1")), [n], "{name}");
    let rc = read_f64(&file, "grid/r_center");
    let rf = read_f64(&file, "grid/r_face");
    for i in 0..n {
        assert!(
            rf[i] < rc[i] && rc[i] < rf[i + 1],
            "{name}: node {i} outside its faces"
        );
    }
    // Zone codes of cells: 1 pack, 3 invaded, 4 formation (docs/formats.md).
    for z in read_f64(&file, "grid/zone") {
        assert!([1.0, 3.0, 4.0].contains(&z), "{name}: zone code {z}");
    }

    // Series: every one of the same length T >= 1.
    let t = dataset_shape(&file, "series/time", Some("s"));
    assert_eq!(t.len(), 1);
    let t = t[0];
    assert!(t >= 1, "{name}: empty series");
    for (s, unit) in SERIES {
        let p = format!("series/{s}");
        assert_eq!(dataset_shape(&file, &p, Some(unit)), [t], "{name}: {p}");
    }
    for z in ZONES {
        for (kind, unit) in [("power", "W"), ("work", "J")] {
            let p = format!("series/{kind}/{z}");
            assert_eq!(dataset_shape(&file, &p, Some(unit)), [t], "{name}: {p}");
        }
    }
    let time = read_f64(&file, "series/time");
    assert!(
        time.windows(2).all(|w| w[0] < w[1]),
        "{name}: time not increasing"
    );

    // Cycles: every one of the same length C (may be 0).
    let c = dataset_shape(&file, "cycles/index", Some("1"));
    assert_eq!(c.len(), 1);
    let c = c[0];
    for (s, unit) in CYCLES {
        let p = format!("cycles/{s}");
        assert_eq!(dataset_shape(&file, &p, Some(unit)), [c], "{name}: {p}");
    }
    for z in ZONES {
        let p = format!("cycles/work_{z}");
        assert_eq!(dataset_shape(&file, &p, Some("J")), [c], "{name}: {p}");
    }
    let index = file
        .dataset("cycles/index")
        .unwrap()
        .read_1d::<u64>()
        .unwrap();
    // The cycle numbers count from 0; those a jump over cycles skipped (`/jumps`,
    // numerics.multiscale) have no record, every other has one.
    let mut expected: Vec<u64> = (0..).take(index.len()).collect();
    if file.link_exists("jumps") {
        let first = read_f64(&file, "jumps/first_cycle");
        let cycles = read_f64(&file, "jumps/cycles");
        let skipped: Vec<u64> = first
            .iter()
            .zip(&cycles)
            .flat_map(|(&a, &k)| a as u64..(a + k) as u64)
            .collect();
        expected = (0..)
            .filter(|i| !skipped.contains(i))
            .take(index.len())
            .collect();
    }
    assert_eq!(index.to_vec(), expected, "{name}: cycle index");

    // Snapshots: S times, S × N heads.
    let s = dataset_shape(&file, "snapshots/time", Some("s"));
    assert_eq!(s.len(), 1);
    assert!(s[0] >= 1, "{name}: no snapshots");
    assert_eq!(
        dataset_shape(&file, "snapshots/head", Some("m")),
        [s[0], n],
        "{name}"
    );

    // Summary attributes.
    let summary = file
        .group("summary")
        .unwrap_or_else(|e| panic!("{name}: /summary: {e}"));
    let mut required: Vec<String> = SUMMARY_F64.iter().map(|s| (*s).to_owned()).collect();
    required.extend(ZONES.iter().map(|z| format!("work_{z}_j")));
    if case.model.pack.medium.grain_diameter_m.is_some() {
        required.push("peak_grain_reynolds".to_owned());
    }
    for a in &required {
        let v = attr_f64(&summary, a).unwrap_or_else(|| panic!("{name}: /summary {a} missing"));
        assert!(v.is_finite(), "{name}: /summary {a} = {v}");
    }
    for a in SUMMARY_OPTIONAL_F64 {
        if let Some(v) = attr_f64(&summary, a) {
            assert!(v.is_finite(), "{name}: /summary {a} = {v}");
        }
    }
    attr_str(&summary, "warnings", "/summary");
    assert_eq!(
        attr_str(&summary, "cautions", "/summary"),
        CAUTION,
        "{name}"
    );
    assert!(!attr_str(&summary, "efficiency_definition", "/summary").is_empty());
    // Counts agree with the datasets.
    assert_eq!(
        attr_f64(&summary, "cells"),
        Some(n as f64),
        "{name}: cells vs grid"
    );
    // Cycles = computed records + cycles jumped over.
    assert_eq!(
        attr_f64(&summary, "cycles"),
        Some(c as f64 + attr_f64(&summary, "skipped_cycles").unwrap_or(0.0)),
        "{name}: cycles vs /cycles"
    );
    let steps = attr_f64(&summary, "steps").unwrap();
    if case.output_every == 1 {
        // Every step is reported (solver Reporting { every: 1 }).
        assert_eq!(steps, t as f64, "{name}: steps vs series length");
    } else {
        assert!(t as f64 <= steps, "{name}: more rows than steps");
    }

    // Face flux: the same case solved in-process with the same reporting as run.rs. The
    // binary and this test call the same solver code on the same model, and HDF5 stores
    // f64 unchanged, so the two agree to round-off; 1e-12 relative (some 5000 ulp) admits
    // only floating-point evaluation-order differences, far below any change of physics.
    let mut obs = FaceFlux::default();
    boreflux_solver::run(
        &case.model,
        &mut obs,
        Reporting {
            every: case.output_every,
        },
    )
    .unwrap_or_else(|e| panic!("{name}: in-process run: {e}"));
    let face = read_f64(&file, "series/face_flux");
    let file_max = face.iter().fold(0.0f64, |m, x| m.max(x.abs()));
    assert_eq!(
        obs.reported, t,
        "{name}: reported steps in-process vs in the file"
    );
    assert!(obs.max_abs > 0.0, "{name}: no face flux at all");
    let d = rel_diff(file_max, obs.max_abs);
    assert!(
        d <= 1e-12,
        "{name}: max |face_flux| {file_max} in the file, {} in-process (rel {d:e})",
        obs.max_abs
    );
    t
}

/// Checks the CSV beside the result: a header of `name [unit]` cells in the layout's
/// order, one row per step, and the time and face-flux columns equal to the HDF5 series.
fn check_csv(csv: &Path, h5: &Path, rows: usize) {
    let text = std::fs::read_to_string(csv).unwrap_or_else(|e| panic!("{}: {e}", csv.display()));
    let mut lines = text.lines();
    let header: Vec<&str> = lines.next().expect("CSV header").split(',').collect();
    let mut want: Vec<String> = SERIES.iter().map(|(n, u)| format!("{n} [{u}]")).collect();
    for z in ZONES {
        want.push(format!("power_{z} [W]"));
        want.push(format!("work_{z} [J]"));
    }
    assert_eq!(header, want, "{}: header", csv.display());
    let file = hdf5::File::open(h5).unwrap();
    let time = read_f64(&file, "series/time");
    let face = read_f64(&file, "series/face_flux");
    let mut count = 0;
    for (i, line) in lines.enumerate() {
        let cells: Vec<&str> = line.split(',').collect();
        assert_eq!(cells.len(), want.len(), "{}: row {}", csv.display(), i + 2);
        // Rust prints f64 as the shortest text that parses back to the same value and
        // parses correctly rounded (std docs), so the columns equal the HDF5 values.
        assert_eq!(cells[0].parse::<f64>().unwrap(), time[i], "row {}", i + 2);
        assert_eq!(cells[4].parse::<f64>().unwrap(), face[i], "row {}", i + 2);
        count += 1;
    }
    assert_eq!(count, rows, "{}: data rows vs HDF5 series", csv.display());
}

/// Checks: `run CASE -o DIR/NAME.h5 --csv -q` on every shipped case exits 0, leaves
/// exactly the HDF5 and CSV files, and the HDF5 file has every dataset and attribute of the
/// layout, consistent shapes, and the solver's face flux.
#[test]
fn run_writes_the_documented_layout_for_every_shipped_case() {
    for case in shipped_cases() {
        let stem = case.file_stem().unwrap().to_str().unwrap().to_owned();
        let dir = tempfile::tempdir().unwrap();
        let h5 = dir.path().join(format!("{stem}.h5"));
        let case_arg = case.display().to_string();
        let o = output(
            boreflux()
                .args(["run", &case_arg, "-o"])
                .arg(&h5)
                .args(["--csv", "-q"]),
        );
        assert_code(&o, 0, &format!("run {stem}"));
        assert_no_panic(&stderr_of(&o), &stem);
        assert!(
            stdout_of(&o).contains(&format!("Caution: {CAUTION}")),
            "{stem}: no caution"
        );
        assert_eq!(
            dir_entries(dir.path()),
            [format!("{stem}.csv"), format!("{stem}.h5")],
            "{stem}: files written"
        );
        let rows = check_layout(&h5, &case, &case_arg);
        check_csv(&dir.path().join(format!("{stem}.csv")), &h5, rows);
    }
}

// ---------------------------------------------------------------------------------------
// 3. Bad input
// ---------------------------------------------------------------------------------------

/// (file stem, expected field) of every row of `BAD_CASES` in `case_files.rs`, read from
/// that file's text so the two tests cannot drift apart.
fn bad_case_table() -> Vec<(String, String)> {
    let src =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/case_files.rs"))
            .unwrap();
    let start = src
        .find("const BAD_CASES")
        .expect("BAD_CASES in case_files.rs");
    let body = &src[start..];
    let end = body.find("\n];").expect("end of BAD_CASES");
    let rows: Vec<(String, String)> = body[..end]
        .lines()
        .map(str::trim)
        .filter(|l| l.starts_with("(\""))
        .map(|l| {
            let parts: Vec<&str> = l.split('"').collect();
            assert!(parts.len() >= 4, "cannot read BAD_CASES row {l}");
            (parts[1].to_owned(), parts[3].to_owned())
        })
        .collect();
    assert!(
        rows.len() >= 20,
        "only {} rows read from BAD_CASES",
        rows.len()
    );
    rows
}

/// Checks: every file in bad_cases/ given to `run` exits 2 with exactly one `error:` line
/// that names the file and the field expected by `BAD_CASES` (and equals the library's
/// error), shows no panic, and leaves nothing in the output folder or the working folder.
#[test]
fn run_rejects_every_bad_case_cleanly() {
    let table = bad_case_table();
    let mut from_table: Vec<String> = table.iter().map(|(n, _)| format!("{n}.json")).collect();
    from_table.sort();
    let on_disk = dir_entries(&bad_dir());
    assert_eq!(
        on_disk, from_table,
        "bad_cases/ and BAD_CASES list different files"
    );

    for (stem, field) in &table {
        let file = bad_dir().join(format!("{stem}.json"));
        let dir = tempfile::tempdir().unwrap();
        let o = output(
            boreflux()
                .current_dir(dir.path())
                .arg("run")
                .arg(&file)
                .arg("-o")
                .arg(dir.path().join("out.h5"))
                .arg("--csv"),
        );
        let stderr = refused(&o, stem);
        let errs = error_lines(&stderr);
        assert_eq!(errs.len(), 1, "{stem}: one error line expected:\n{stderr}");
        let prefix = if field.is_empty() {
            format!("error: {}: ", file.display())
        } else {
            format!("error: {}: {field}: ", file.display())
        };
        assert!(
            errs[0].starts_with(&prefix),
            "{stem}: expected {prefix:?}…, got {:?}",
            errs[0]
        );
        // Source: the library's error for the same file (`boreflux::case::load_case`).
        let lib = load_case(&file).expect_err("a bad case loads");
        assert_eq!(&lib.field, field, "{stem}");
        assert_eq!(
            errs[0],
            format!("error: {}: {lib}", file.display()),
            "{stem}"
        );
        assert!(o.stdout.is_empty(), "{stem}: stdout {:?}", stdout_of(&o));
        assert_nothing_left(dir.path(), stem);
    }
}

/// Checks: a case file that does not exist is bad input (exit 2) named in one error line,
/// and nothing is written.
#[test]
fn run_reports_a_missing_case_file() {
    let dir = tempfile::tempdir().unwrap();
    let missing = dir.path().join("no-such-case.json");
    let o = output(
        boreflux()
            .current_dir(dir.path())
            .arg("run")
            .arg(&missing)
            .arg("-o")
            .arg(dir.path().join("out.h5")),
    );
    let stderr = refused(&o, "missing case file");
    let errs = error_lines(&stderr);
    assert_eq!(errs.len(), 1, "{stderr}");
    assert!(
        errs[0].contains(&missing.display().to_string()),
        "{}",
        errs[0]
    );
    assert_nothing_left(dir.path(), "missing case file");
}

/// Checks: an output path that cannot be created (a folder that does not exist under
/// /proc, and a "folder" that is a regular file) is bad input (exit 2), named in one
/// error line, with nothing left behind.
#[test]
fn run_rejects_unwritable_output_paths() {
    let case = demo_case();

    let o = output(boreflux().args(["run"]).arg(&case).args([
        "-o",
        "/proc/boreflux/out.h5",
        "--csv",
        "-q",
    ]));
    let stderr = refused(&o, "output under /proc");
    let errs = error_lines(&stderr);
    assert_eq!(errs.len(), 1, "{stderr}");
    assert!(errs[0].contains("/proc/boreflux/out.h5"), "{}", errs[0]);
    assert!(!Path::new("/proc/boreflux").exists());

    let dir = tempfile::tempdir().unwrap();
    let plain = dir.path().join("plain");
    std::fs::write(&plain, "not a folder").unwrap();
    let out = plain.join("out.h5");
    let o = run_with_csv(dir.path(), &case, &out);
    let stderr = refused(&o, "output under a regular file");
    let errs = error_lines(&stderr);
    assert_eq!(errs.len(), 1, "{stderr}");
    assert!(errs[0].contains(&out.display().to_string()), "{}", errs[0]);
    assert_eq!(dir_entries(dir.path()), ["plain"]);
    assert_eq!(std::fs::read_to_string(&plain).unwrap(), "not a folder");

    // A name the checks accept but whose temporary file the file system refuses (255 bytes
    // at most in a name, common practice on Linux file systems; the temporary adds a dot
    // and `.tmp-<pid>`): the output thread cannot open it, and the run stops with the
    // error of opening it, as the checks above would say it.
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join(format!("{}.h5", "a".repeat(248)));
    let o = run_with_csv(dir.path(), &case, &out);
    let stderr = refused(&o, "output whose temporary name is too long");
    let errs = error_lines(&stderr);
    assert_eq!(errs.len(), 1, "{stderr}");
    assert!(
        errs[0].contains(&format!("cannot write output {}", out.display())),
        "{}",
        errs[0]
    );
    assert_nothing_left(dir.path(), "output whose temporary name is too long");
}

/// Checks: `run` refuses (exit 2, one error line naming the path and the option to change,
/// nothing written) output names that are the case file or a file the case reads: `--csv`
/// beside `-o <table>.h5` for a table drive, `-o` naming the case itself, and a table read
/// by a schedule stage reached through `..` (compared by canonical path); and `-o x.csv
/// --csv`, where both outputs would be one file. A name that clashes with nothing still
/// runs (exit 0) and leaves the inputs as they were.
#[test]
fn run_refuses_to_overwrite_its_inputs() {
    // The shipped table-drive case and its CSV table (cases/irrigation-table.*).
    let dir = tempfile::tempdir().unwrap();
    for f in ["irrigation-table.json", "irrigation-table.csv"] {
        std::fs::copy(cases_dir().join(f), dir.path().join(f)).unwrap();
    }
    let case_text = std::fs::read(dir.path().join("irrigation-table.json")).unwrap();
    let table_text = std::fs::read(dir.path().join("irrigation-table.csv")).unwrap();
    let inputs_unchanged = |what: &str| {
        assert_eq!(
            std::fs::read(dir.path().join("irrigation-table.json")).unwrap(),
            case_text,
            "{what}: case file changed"
        );
        assert_eq!(
            std::fs::read(dir.path().join("irrigation-table.csv")).unwrap(),
            table_text,
            "{what}: table file changed"
        );
    };
    let refusals: [(&[&str], &str, &str); 3] = [
        (
            &["-o", "irrigation-table.h5", "--csv"],
            "irrigation-table.csv",
            "--csv",
        ),
        (
            &["-o", "irrigation-table.json"],
            "irrigation-table.json",
            "-o/--output",
        ),
        // Both outputs would be one file: the CSV name is the -o name with .csv.
        (&["-o", "results.csv", "--csv"], "results.csv", "--csv"),
    ];
    for (args, named, flag) in refusals {
        let o = output(
            boreflux()
                .current_dir(dir.path())
                .args(["run", "irrigation-table.json", "-q"])
                .args(args),
        );
        let stderr = refused(&o, &format!("{args:?}"));
        let errs = error_lines(&stderr);
        assert_eq!(errs.len(), 1, "{args:?}: {stderr}");
        assert!(
            errs[0].contains(named) && errs[0].contains(flag),
            "{args:?}: {}",
            errs[0]
        );
        assert_eq!(
            dir_entries(dir.path()),
            ["irrigation-table.csv", "irrigation-table.json"],
            "{args:?}"
        );
        inputs_unchanged(&format!("{args:?}"));
    }

    // A schedule whose first stage reads a table in the case's folder, run from the parent
    // folder with an output name that reaches the same folder through `..`.
    let mut case: Value = serde_json::from_slice(&case_text).unwrap();
    let mut stage = case["drive"].clone();
    stage["file"] = Value::from("stage.csv");
    case["drive"] = serde_json::json!({
        "kind": "schedule",
        "stages": [
            { "duration": "1 cycle", "drive": stage },
            { "duration": "1 min", "drive": { "kind": "constant_rate", "pumping_rate": "10 L/s" } }
        ]
    });
    case.as_object_mut().unwrap().remove("duration");
    let top = tempfile::tempdir().unwrap();
    let sub = top.path().join("sub");
    std::fs::create_dir(&sub).unwrap();
    std::fs::write(sub.join("staged.json"), case.to_string()).unwrap();
    std::fs::write(sub.join("stage.csv"), &table_text).unwrap();
    let o = output(boreflux().current_dir(top.path()).args([
        "run",
        "sub/staged.json",
        "-o",
        "sub/../sub/stage.h5",
        "--csv",
        "-q",
    ]));
    assert_code(&o, 2, "schedule stage table");
    let errs = error_lines(&stderr_of(&o)).join("\n");
    assert!(
        errs.contains("sub/../sub/stage.csv") && errs.contains("--csv"),
        "{errs}"
    );
    assert_eq!(dir_entries(&sub), ["stage.csv", "staged.json"]);
    assert_eq!(std::fs::read(sub.join("stage.csv")).unwrap(), table_text);

    // Control: the same case with names that clash with nothing runs and writes them.
    let o = output(boreflux().current_dir(dir.path()).args([
        "run",
        "irrigation-table.json",
        "-o",
        "results.h5",
        "--csv",
        "-q",
    ]));
    assert_code(&o, 0, "non-clashing output names");
    assert_eq!(
        dir_entries(dir.path()),
        [
            "irrigation-table.csv",
            "irrigation-table.json",
            "results.csv",
            "results.h5"
        ]
    );
    inputs_unchanged("non-clashing output names");
}

/// Checks: usage errors (unknown subcommand, unknown flag, missing required option) exit
/// 2 naming the offending word, and write nothing.
#[test]
fn usage_errors_exit_2() {
    let dir = tempfile::tempdir().unwrap();
    let case = demo_case();
    let case = case.to_str().unwrap();
    let cases: [(&[&str], &str); 4] = [
        (&["frobnicate"], "frobnicate"),
        (
            &["run", case, "-o", "out.h5", "--no-such-flag"],
            "--no-such-flag",
        ),
        (&["run", case], "--output"),
        (&["check"], "<CASE>"),
    ];
    for (args, named) in cases {
        let o = output(boreflux().current_dir(dir.path()).args(args));
        let stderr = refused(&o, &format!("{args:?}"));
        assert!(
            stderr.starts_with("error:") && stderr.contains(named),
            "{args:?}:\n{stderr}"
        );
        assert_nothing_left(dir.path(), &format!("{args:?}"));
    }
}

// ---------------------------------------------------------------------------------------
// 4. verify
// ---------------------------------------------------------------------------------------

/// Checks: `verify --json` parses and every entry passed, with `group` the id of the group
/// that produced it; `verify` exits 0, its table has one `pass` row per check of every
/// group of `boreflux_verify::groups()`, in order, with the group id in its second column,
/// and ends with `N passed, 0 failed`; each group's title is announced on stderr.
#[test]
fn verify_passes_and_lists_every_group() {
    // Source: the verification crate's groups, run in-process; each must contribute checks.
    let groups = boreflux_verify::groups();
    let mut names: Vec<String> = Vec::new();
    let mut ids: Vec<&str> = Vec::new();
    for g in &groups {
        let before = names.len();
        names.extend((g.run)().into_iter().map(|r| r.name));
        assert!(names.len() > before, "group {} has no checks", g.id);
        ids.resize(names.len(), g.id);
    }

    let o = output(boreflux().args(["verify", "--json"]));
    assert_code(&o, 0, "verify --json");
    let entries: Vec<Value> =
        serde_json::from_str(&stdout_of(&o)).expect("verify --json is a JSON array");
    for e in &entries {
        assert_eq!(e["passed"], Value::Bool(true), "failed check: {e}");
    }
    let json_names: Vec<&str> = entries
        .iter()
        .map(|e| e["name"].as_str().unwrap())
        .collect();
    assert_eq!(
        json_names, names,
        "checks in verify --json vs boreflux_verify::groups()"
    );
    let json_groups: Vec<&str> = entries
        .iter()
        .map(|e| e["group"].as_str().unwrap())
        .collect();
    assert_eq!(
        json_groups, ids,
        "group of each check in verify --json vs boreflux_verify::groups() ids"
    );

    let o = output(boreflux().arg("verify"));
    assert_code(&o, 0, "verify");
    let out = stdout_of(&o);
    let rows: Vec<&str> = out
        .lines()
        .filter(|l| l.starts_with("pass ") || l.starts_with("FAIL "))
        .collect();
    assert_eq!(rows.len(), names.len(), "rows in the table vs checks");
    for ((row, name), id) in rows.iter().zip(&names).zip(&ids) {
        assert!(
            row.starts_with("pass ") && row.contains(name.as_str()),
            "{row:?} vs {name:?}"
        );
        assert_eq!(
            row.split_whitespace().nth(1),
            Some(*id),
            "group column of {row:?}"
        );
    }
    let last = out.lines().rev().find(|l| !l.trim().is_empty()).unwrap();
    assert_eq!(last, format!("{} passed, 0 failed", names.len()));
    let stderr = stderr_of(&o);
    assert_no_panic(&stderr, "verify");
    for g in &groups {
        assert!(
            stderr.contains(g.title),
            "group {:?} not announced:\n{stderr}",
            g.title
        );
    }
}

// ---------------------------------------------------------------------------------------
// 5. schema and completions
// ---------------------------------------------------------------------------------------

/// Checks: `schema` prints a JSON Schema with every top-level key of docs/formats.md's case table
/// and its required keys; `completions bash` prints a script naming every subcommand.
#[test]
fn schema_and_completions() {
    let o = output(boreflux().arg("schema"));
    assert_code(&o, 0, "schema");
    let s: Value = serde_json::from_str(&stdout_of(&o)).expect("schema is JSON");
    // docs/formats.md, table "Top level"; bold keys are required, except `duration`, which
    // a schedule drive may leave out (its stages sum to it), so the schema cannot require it.
    let top = [
        "title",
        "description",
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
    for k in top {
        assert!(
            s["properties"].get(k).is_some(),
            "schema lacks top-level key {k}"
        );
    }
    let required: BTreeSet<&str> = s["required"]
        .as_array()
        .expect("schema lists required keys")
        .iter()
        .map(|v| v.as_str().unwrap())
        .collect();
    for k in ["well", "pack", "formation", "drive"] {
        assert!(required.contains(k), "{k} not required in the schema");
    }

    let o = output(boreflux().args(["completions", "bash"]));
    assert_code(&o, 0, "completions bash");
    let script = stdout_of(&o);
    assert!(!script.trim().is_empty());
    // Subcommands from args.rs.
    for sub in [
        "run",
        "check",
        "report",
        "verify",
        "new",
        "schema",
        "completions",
    ] {
        assert!(script.contains(sub), "completion script lacks {sub}");
    }
}

// ---------------------------------------------------------------------------------------
// 6. run --json
// ---------------------------------------------------------------------------------------

/// Runs the demo case with `--json` into `h5` and returns the printed document.
fn run_demo_json(h5: &Path) -> Value {
    let o = output(
        boreflux()
            .arg("run")
            .arg(demo_case())
            .arg("-o")
            .arg(h5)
            .args(["--json", "-q"]),
    );
    assert_code(&o, 0, "run --json");
    serde_json::from_str(&stdout_of(&o)).expect("stdout is one JSON document")
}

/// Checks: `run --json` prints only JSON with the headline keys, and its figures are the
/// ones stored in the file's `/summary`.
#[test]
fn run_json_prints_the_headline() {
    let dir = tempfile::tempdir().unwrap();
    let h5 = dir.path().join("out.h5");
    let j = run_demo_json(&h5);
    for k in [
        "peak_outward_flux_m_s",
        "peak_inward_flux_m_s",
        "rms_face_flux_m_s",
        "work_j",
        "zones",
        "skin_start",
        "skin_end",
        "efficiency_start",
        "efficiency_end",
        "steps",
        "cycles",
        "cells",
        "warnings",
    ] {
        assert!(j.get(k).is_some(), "run --json lacks {k}:\n{j:#}");
    }
    // Zone order of work_j: the solver's (`Zone::ALL`).
    let zones: Vec<&str> = j["zones"]
        .as_array()
        .unwrap()
        .iter()
        .map(|z| z.as_str().unwrap())
        .collect();
    assert_eq!(zones, Zone::ALL.map(Zone::name));
    let work = j["work_j"].as_array().unwrap();
    assert_eq!(work.len(), zones.len());
    // The standing cautions travel with the figures (a report built from the JSON keeps them).
    assert_eq!(j["cautions"], CAUTION);
    let warnings: Vec<&str> = j["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w.as_str().unwrap())
        .collect();

    // Source: the `/summary` group of the file written by the same run.
    let file = hdf5::File::open(&h5).unwrap();
    let summary = file.group("summary").unwrap();
    for k in [
        "peak_outward_flux_m_s",
        "peak_inward_flux_m_s",
        "skin_start",
        "skin_end",
        "steps",
        "cycles",
    ] {
        let a = attr_f64(&summary, k).unwrap();
        let b = j[k].as_f64().unwrap();
        assert!(rel_diff(a, b) <= JSON_PARSE, "{k}: file {a}, JSON {b}");
    }
    for (z, w) in zones.iter().zip(work) {
        let a = attr_f64(&summary, &format!("work_{z}_j")).unwrap();
        let b = w.as_f64().unwrap();
        assert!(rel_diff(a, b) <= JSON_PARSE, "work {z}: file {a}, JSON {b}");
    }
    assert_eq!(
        attr_str(&summary, "warnings", "/summary"),
        warnings.join("\n")
    );
    // The notes end with how the collapse ratings were found, as the JSON states it.
    let notes = attr_str(&summary, "notes", "/summary");
    assert_eq!(
        notes.lines().last().unwrap(),
        format!(
            "collapse ratings: {}",
            j["collapse_rating_basis"].as_str().unwrap()
        )
    );
}

/// Checks: a library user who runs the demo case through the crate (solver run, the
/// solver's `Extremes` observer, the virtual tests, the headline) gets every figure of the
/// output schema exactly as `run --json` prints it, and `/summary` holds the same ones.
/// Source: the same run, once through the binary (runs are deterministic).
#[test]
fn a_library_user_gets_the_figures_of_run_json() {
    use boreflux::output::schema::{Figure, Num};
    let dir = tempfile::tempdir().unwrap();
    let h5 = dir.path().join("out.h5");
    let j = run_demo_json(&h5);
    let case = demo_case();

    let loaded = load_case(&case).unwrap();
    let mut extremes = boreflux_solver::assess::figures::Extremes::new(&loaded.model);
    let s = boreflux_solver::run(
        &loaded.model,
        &mut extremes,
        Reporting {
            every: loaded.output_every,
        },
    )
    .unwrap();
    let a = boreflux::summary::assessment(&loaded, &s);
    let h = boreflux::summary::headline(&loaded, &s, &extremes, &a);
    let file = hdf5::File::open(&h5).unwrap();
    let summary = file.group("summary").unwrap();
    for f in Figure::all() {
        let lib = f.value(&h.figures);
        let cli = match f {
            Figure::Work(z) => &j["work_j"][z as usize],
            _ => &j[f.name().as_str()],
        };
        match lib {
            Some(Num::Count(n)) => assert_eq!(cli.as_u64(), Some(n), "{}", f.name()),
            Some(Num::Real(x)) if x.is_finite() => {
                let c = cli.as_f64().unwrap_or(f64::NAN);
                assert!(rel_diff(c, x) <= JSON_PARSE, "{}: {c} vs {x}", f.name());
                assert_eq!(attr_f64(&summary, &f.name()), Some(x), "{}", f.name());
            }
            _ => {
                assert!(cli.is_null(), "{}: {cli}", f.name());
                assert_eq!(attr_f64(&summary, &f.name()), None, "{}", f.name());
            }
        }
    }
}

// ---------------------------------------------------------------------------------------
// 7. Nothing partial left behind
// ---------------------------------------------------------------------------------------

/// Checks: an output folder that cannot be written (read-only; or, when running as root,
/// which ignores permissions, a "folder" that is a regular file) gives exit 2 and leaves no
/// file, temporary or final.
#[test]
fn unwritable_output_folder_leaves_nothing() {
    use std::os::unix::fs::PermissionsExt;
    let case = demo_case();
    let dir = tempfile::tempdir().unwrap();
    let ro = dir.path().join("read-only");
    std::fs::create_dir(&ro).unwrap();
    std::fs::set_permissions(&ro, std::fs::Permissions::from_mode(0o555)).unwrap();
    let probe = ro.join("probe");
    let enforced = std::fs::write(&probe, "x").is_err();
    let out = if enforced {
        ro.join("out.h5")
    } else {
        // Root: permissions are not enforced; a path under a regular file fails for anyone.
        std::fs::remove_file(&probe).unwrap();
        std::fs::set_permissions(&ro, std::fs::Permissions::from_mode(0o755)).unwrap();
        std::fs::write(ro.join("plain"), "").unwrap();
        ro.join("plain").join("out.h5")
    };
    let o = run_with_csv(dir.path(), &case, &out);
    std::fs::set_permissions(&ro, std::fs::Permissions::from_mode(0o755)).unwrap();
    assert_code(&o, 2, &format!("output {}", out.display()));
    assert_no_panic(&stderr_of(&o), "unwritable output");
    let left = dir_entries(&ro);
    let want: &[&str] = if enforced { &[] } else { &["plain"] };
    assert_eq!(left, want, "files left in {}", ro.display());
    assert_eq!(dir_entries(dir.path()), ["read-only"]);
}

/// Checks: a run stopped by Ctrl-C (SIGINT) part way through leaves neither the output
/// files nor their temporary files (output/mod.rs: "a writer dropped without `finish()`
/// (an error, a panic, Ctrl-C handled as an early return) deletes its temporary file";
/// docs/formats.md: "nothing partial left behind").
#[test]
fn interrupted_run_leaves_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let case_dir = tempfile::tempdir().unwrap();
    // The default demo made long enough (50 min simulated) to be interrupted mid-run.
    let mut case: Value = serde_json::from_str(scenarios()[0].1).unwrap();
    case["duration"] = Value::from("50 min");
    let case_path = case_dir.path().join("long.json");
    std::fs::write(&case_path, case.to_string()).unwrap();
    // assert_cmd cannot signal a running child; start the same binary with std.
    let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_boreflux"))
        .current_dir(dir.path())
        .arg("run")
        .arg(&case_path)
        .args(["-o", "out.h5", "--csv", "-q"])
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    // Wait until both temporary files exist: the time loop is running.
    let started = std::time::Instant::now();
    while dir_entries(dir.path()).len() < 2 {
        assert!(
            child.try_wait().unwrap().is_none(),
            "the run ended before it could be interrupted"
        );
        assert!(
            started.elapsed().as_secs() < 30,
            "no output files after 30 s"
        );
        std::thread::sleep(std::time::Duration::from_millis(5));
    }
    let (status, stderr) = interrupt(&mut child);
    assert_no_panic(&stderr, "interrupted run");
    assert!(!status.success(), "an interrupted run reported success");
    assert_nothing_left(dir.path(), &format!("after Ctrl-C (exit status {status})"));
}

/// Checks: a write that fails in the middle of a run (the CSV file over the size limit
/// `ulimit -f` sets, with SIGXFSZ ignored so the write returns an error instead of
/// killing the process) stops the run with exit 1 naming the file, and leaves neither
/// output nor temporary file (output/mod.rs; the writing is on its own thread when there
/// are two cores, output/relay.rs). The case, the shipped sine benchmark case cut to
/// 300 s with every step kept (invented benchmark data), writes about 10 MB of CSV; the
/// limit is 2 000 blocks (1 or 2 MB, by the shell's block size).
#[cfg(unix)]
#[test]
fn a_write_error_mid_run_leaves_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let case_dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(repo_dir().join("benches/cases/sine-60m.json")).unwrap();
    let mut case: Value = serde_json::from_str(&text).unwrap();
    case["duration"] = Value::from(300.0);
    case["output"]["store"] = Value::from("steps");
    let case_path = write(case_dir.path(), "sine.json", &case.to_string());
    let o = std::process::Command::new("sh")
        .current_dir(dir.path())
        .arg("-c")
        .arg(r#"trap '' XFSZ; ulimit -f 2000 && exec "$0" run "$1" -o out.h5 --csv -q"#)
        .arg(env!("CARGO_BIN_EXE_boreflux"))
        .arg(&case_path)
        .output()
        .unwrap();
    assert_code(&o, 1, "run over the file size limit");
    let stderr = stderr_of(&o);
    assert_no_panic(&stderr, "write error");
    assert!(
        stderr.contains("out.csv"),
        "the error names the file: {stderr}"
    );
    assert_nothing_left(dir.path(), "after a write error");
}

// ---------------------------------------------------------------------------------------
// 8. report
// ---------------------------------------------------------------------------------------

/// Checks: `report` on two result files exits 0 and writes an HTML file with SVG figures,
/// leaving no temporary file beside it.
#[test]
fn report_on_two_runs_writes_html_with_svg() {
    let dir = tempfile::tempdir().unwrap();
    let mut inputs = Vec::new();
    // The first two shipped scenarios (`boreflux::case::scenarios`), run from cases/.
    let stems: Vec<&str> = scenarios().iter().take(2).map(|(n, _)| *n).collect();
    for stem in &stems {
        let h5 = dir.path().join(format!("{stem}.h5"));
        let o = output(
            boreflux()
                .arg("run")
                .arg(cases_dir().join(format!("{stem}.json")))
                .arg("-o")
                .arg(&h5)
                .arg("-q"),
        );
        assert_code(&o, 0, &format!("run {stem}"));
        inputs.push(h5);
    }
    let html = dir.path().join("compare.html");
    let o = output(boreflux().arg("report").args(&inputs).arg("-o").arg(&html));
    assert_code(&o, 0, "report");
    assert_no_panic(&stderr_of(&o), "report");
    let text = std::fs::read_to_string(&html).expect("report file written");
    assert!(text.contains("<svg"), "no SVG figure in the report");
    let mut want: Vec<String> = stems.iter().map(|s| format!("{s}.h5")).collect();
    want.push("compare.html".to_owned());
    want.sort();
    assert_eq!(dir_entries(dir.path()), want, "files beside the report");
}
