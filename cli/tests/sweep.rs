//! End-to-end tests of `boreflux sweep` and `boreflux merge`: the table against a
//! property of the equations (superposition), against `boreflux run` of the same
//! scenario, shards merged against the whole sweep, and the refusals (exit 2, nothing
//! written).

mod common;

use assert_cmd::Command;
use common::{boreflux, interrupt, linear_case, merge, sweep_whole_and_shards, write};
use std::path::Path;

/// The linear well of the common helpers for 4 cycles. The θ-scheme at fixed steps: the
/// adaptive default chooses its steps against an absolute tolerance in metres, so its step
/// sequence (and so the last digits) depends on the amplitude, which superposition to
/// round-off cannot allow.
fn linear() -> String {
    linear_case(
        r#""4 cycles""#,
        r#"{ "steps_per_cycle": 40, "scheme": "theta" }"#,
    )
}

fn write_case(dir: &Path) -> std::path::PathBuf {
    write(dir, "linear.json", &linear())
}

/// `boreflux sweep CASE -q -o OUT`, the `--vary` arguments still to add.
fn sweep(case: &Path, out: &Path) -> Command {
    let mut c = boreflux();
    c.arg("sweep").arg(case).arg("-q").arg("-o").arg(out);
    c
}

/// Rows of a CSV as name → text maps (no quoted commas in these tables' numbers).
fn csv_rows(path: &Path) -> Vec<std::collections::BTreeMap<String, String>> {
    let text = std::fs::read_to_string(path).unwrap();
    let mut lines = text.lines();
    let header: Vec<String> = lines
        .next()
        .unwrap()
        .split(',')
        .map(str::to_owned)
        .collect();
    lines
        .map(|l| {
            header
                .iter()
                .cloned()
                .zip(l.split(',').map(str::to_owned))
                .collect()
        })
        .collect()
}

fn num(row: &std::collections::BTreeMap<String, String>, k: &str) -> f64 {
    row[k]
        .parse()
        .unwrap_or_else(|_| panic!("{k} = {:?}", row[k]))
}

#[test]
fn a_linear_well_scales_with_the_drive_amplitude() {
    let dir = tempfile::tempdir().unwrap();
    let case = write_case(dir.path());
    let out = dir.path().join("amp");
    let assert = sweep(&case, &out)
        .args(["--vary", "drive.amplitude=0.5 m,1 m,2 m"])
        .assert()
        .success();
    let stdout = String::from_utf8_lossy(&assert.get_output().stdout).to_string();
    assert!(
        stdout.contains("3 scenarios") && stdout.contains("Caution"),
        "{stdout}"
    );
    let rows = csv_rows(&out.with_extension("csv"));
    assert_eq!(rows.len(), 3);
    // Superposition (the discrete Darcy system is linear and starts at rest; common
    // knowledge, no source): fluxes scale with the amplitude, dissipated work with its
    // square, to round-off.
    let base = &rows[0];
    for (row, a) in rows.iter().zip([1.0, 2.0, 4.0]) {
        assert_eq!(row["status"], "ok");
        assert_eq!(num(row, "drive.amplitude_value"), 0.5 * a);
        for k in [
            "peak_outward_flux_m_s",
            "peak_inward_flux_m_s",
            "peak_shear_pa",
        ] {
            let ratio = num(row, k) / num(base, k);
            assert!(
                (ratio - a).abs() <= 1e-9 * a,
                "{k}: ratio {ratio}, expected {a}"
            );
        }
        for k in ["work_pack_j", "work_formation_j"] {
            let ratio = num(row, k) / num(base, k);
            assert!((ratio - a * a).abs() <= 1e-9 * a * a, "{k}: {ratio}");
        }
    }
}

#[test]
fn a_scenario_row_matches_a_run_of_the_same_case() {
    let dir = tempfile::tempdir().unwrap();
    let case = write_case(dir.path());
    let out = dir.path().join("f");
    sweep(&case, &out)
        .args(["--vary", "drive.frequency=0.25,0.5,1", "--jobs", "2"])
        .assert()
        .success();
    let rows = csv_rows(&out.with_extension("csv"));
    assert_eq!(rows.len(), 3);
    // Each scenario written out and run on its own (`boreflux run --json`). The three share
    // the well: the third starts after one of the first two has kept the tests of the well
    // as built, and takes them from there.
    for (row, frequency) in rows.iter().zip([0.25, 0.5, 1.0]) {
        let mut v: serde_json::Value = serde_json::from_str(&linear()).unwrap();
        v["drive"]["frequency"] = serde_json::json!(frequency);
        let single = dir.path().join(format!("single-{frequency}.json"));
        std::fs::write(&single, v.to_string()).unwrap();
        let run = boreflux()
            .args(["run", single.to_str().unwrap(), "-q", "--json", "-o"])
            .arg(dir.path().join(format!("single-{frequency}.h5")))
            .assert()
            .success();
        let h: serde_json::Value = serde_json::from_slice(&run.get_output().stdout).unwrap();
        for k in [
            "peak_outward_flux_m_s",
            "rms_face_flux_m_s",
            "skin_end",
            "steps",
            "efficiency_start",
            "efficiency_end",
            "specific_capacity_start_m2_s",
            "specific_capacity_end_m2_s",
        ] {
            let want = h[k]
                .as_f64()
                .unwrap_or_else(|| panic!("{k} in the run's JSON"));
            let got = num(row, k);
            assert!(
                (got - want).abs() <= 1e-15 * want.abs(),
                "frequency {frequency}, {k}: {got} vs {want}"
            );
        }
    }
}

#[test]
fn shards_merge_into_the_whole_sweep() {
    let dir = tempfile::tempdir().unwrap();
    let case = write_case(dir.path());
    let parts = sweep_whole_and_shards(
        dir.path(),
        &case,
        &[
            "--vary",
            "drive.frequency=0.25..1:3",
            "--vary",
            "pack.outer_radius=0.15,0.25",
        ],
        4,
    );
    // Leaving one shard out is refused, naming what is missing.
    let missing = merge(&parts[..3], &dir.path().join("merged")).code(2);
    let err = String::from_utf8_lossy(&missing.get_output().stderr).to_string();
    assert!(
        err.contains("1 of 6 scenarios are missing (scenario 3)"),
        "{err}"
    );
    assert!(!dir.path().join("merged.csv").exists());
    let merged = merge(&parts, &dir.path().join("merged")).success();
    // The merged table's overview carries the standing cautions, as the sweep's does.
    let out = String::from_utf8_lossy(&merged.get_output().stdout).to_string();
    assert!(
        out.contains(&format!("Caution: {}", boreflux_solver::safety::CAUTION)),
        "{out}"
    );
    let read = |n: &str| std::fs::read_to_string(dir.path().join(n)).unwrap();
    assert_eq!(read("merged.csv"), read("whole.csv"));
}

#[test]
fn bad_sweeps_are_refused_before_anything_runs() {
    let dir = tempfile::tempdir().unwrap();
    let case = write_case(dir.path());
    let refuse = |args: &[&str], expect: &str| {
        let a = boreflux()
            .args(["sweep", case.to_str().unwrap(), "-q"])
            .args(args)
            .assert()
            .code(2);
        let err = String::from_utf8_lossy(&a.get_output().stderr).to_string();
        assert!(err.contains(expect), "{args:?}: {err}");
    };
    let out = dir.path().join("t").display().to_string();
    refuse(
        &["-o", &out, "--vary", "pack.porosity=0.3,1.3"],
        "scenario 1 (pack.porosity = 1.3): pack.porosity: must be between 0 and 1",
    );
    refuse(
        &["-o", &out, "--vary", "drive.amplitud=1,2"],
        "did you mean `amplitude`",
    );
    refuse(&["-o", &out, "--vary", "drive.amplitude=1..2"], "A..B:N");
    refuse(
        &[
            "-o",
            &out,
            "--vary",
            "drive.amplitude=1,2",
            "--shard",
            "3/2",
        ],
        "--shard 3/2",
    );
    // The table would replace the case file itself (a case kept under a .csv name).
    let odd = dir.path().join("linear.csv");
    std::fs::copy(&case, &odd).unwrap();
    let a = boreflux()
        .args([
            "sweep",
            odd.to_str().unwrap(),
            "-q",
            "--vary",
            "drive.amplitude=1,2",
            "-o",
        ])
        .arg(dir.path().join("linear"))
        .assert()
        .code(2);
    let err = String::from_utf8_lossy(&a.get_output().stderr).to_string();
    assert!(err.contains("which is the case file itself"), "{err}");
    // Nothing was written: only the two case files are there.
    let mut names: Vec<String> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().to_string())
        .collect();
    names.sort();
    assert_eq!(names, ["linear.csv", "linear.json"]);
}

/// Ctrl-C (SIGINT) stops every scenario after its current step and writes no table
/// (docs/formats.md: nothing partial left behind).
#[test]
fn an_interrupted_sweep_writes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let mut v: serde_json::Value = serde_json::from_str(&linear()).unwrap();
    // Long enough to be running when the signal comes (a few seconds per scenario): every
    // cycle stepped, since cycle jumping runs this periodic case's 100 000 cycles in 0.4 s.
    v["duration"] = serde_json::json!("100000 cycles");
    v["numerics"]["multiscale"] = serde_json::json!("off");
    let case = dir.path().join("long.json");
    std::fs::write(&case, v.to_string()).unwrap();
    let out = dir.path().join("out");
    std::fs::create_dir(&out).unwrap();
    // assert_cmd cannot signal a running child; start the same binary with std.
    let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_boreflux"))
        .arg("sweep")
        .arg(&case)
        .args(["-q", "--vary", "drive.amplitude=1,2,3,4", "-o"])
        .arg(out.join("t"))
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    std::thread::sleep(std::time::Duration::from_millis(500));
    assert!(
        child.try_wait().unwrap().is_none(),
        "the sweep ended before it could be interrupted"
    );
    let (status, stderr) = interrupt(&mut child);
    assert!(!status.success(), "an interrupted sweep reported success");
    assert!(stderr.contains("interrupted by the user"), "{stderr}");
    assert_eq!(
        std::fs::read_dir(&out).unwrap().count(),
        0,
        "files left after Ctrl-C"
    );
}

/// Sweeps the linear case over three amplitudes (with units) and two frequencies (bare
/// numbers) into `dir/amp.csv` and `dir/amp.h5`; returns the stem `dir/amp`.
fn amplitude_frequency_sweep(dir: &Path) -> std::path::PathBuf {
    let case = write_case(dir);
    let stem = dir.join("amp");
    sweep(&case, &stem)
        .args([
            "--vary",
            "drive.amplitude=0.5 m,1 m,2 m",
            "--vary",
            "drive.frequency=0.25,0.5",
        ])
        .assert()
        .success();
    stem
}

/// `report` on a sweep table writes the sweep page: cautions, one chart per key figure
/// against the first varied value, and every scenario's row (comparisons and refusals:
/// cli/tests/sweep_compare.rs).
#[test]
fn a_sweep_table_gets_its_own_report() {
    let dir = tempfile::tempdir().unwrap();
    let stem = amplitude_frequency_sweep(dir.path());
    let html_path = dir.path().join("amp.html");
    // The CSV twin of the table is refused, naming the HDF5 file to give instead; a missing
    // file says so.
    let csv = boreflux()
        .args(["report", stem.with_extension("csv").to_str().unwrap(), "-o"])
        .arg(&html_path)
        .assert()
        .code(2);
    let err = String::from_utf8_lossy(&csv.get_output().stderr).to_string();
    let h5 = stem.with_extension("h5");
    assert!(
        err.contains("not CSV tables") && err.contains(&format!("give {}", h5.display())),
        "{err}"
    );
    let none = boreflux()
        .args(["report", dir.path().join("nope.h5").to_str().unwrap(), "-o"])
        .arg(&html_path)
        .assert()
        .code(2);
    let err = String::from_utf8_lossy(&none.get_output().stderr).to_string();
    assert!(err.contains("nope.h5: no such file"), "{err}");
    assert!(!html_path.exists());
    boreflux()
        .args(["report", stem.with_extension("h5").to_str().unwrap(), "-o"])
        .arg(&html_path)
        .assert()
        .success();
    let html = std::fs::read_to_string(&html_path).unwrap();
    assert!(html.contains("Well development sweep report"));
    assert!(html.contains(boreflux_solver::safety::CAUTION.split('.').next().unwrap()));
    // Six scenarios in the table, two lines (one per frequency) in each chart.
    assert_eq!(html.matches("<tr><td>").count(), 6, "table rows");
    assert!(html.contains("drive.frequency = 0.25") && html.contains("drive.frequency = 0.5"));
    let charts = html.matches("<svg").count();
    assert!(charts >= 5, "{charts} charts");
    // The figures are the table's: scenario 0's peak outward flux, in mm/s with three
    // significant digits as the report writes numbers (report/format.rs, `sig`).
    let rows = csv_rows(&stem.with_extension("csv"));
    let q = num(&rows[0], "peak_outward_flux_m_s") * 1e3;
    let decimals = (2 - q.log10().floor() as i32).max(0) as usize;
    let shown = format!("{q:.decimals$}");
    assert!(
        html.contains(&format!("<td>{shown}</td>")),
        "{shown} not in the table"
    );
}

/// The sweep page shows a varied value given as a bare number with the SI unit the case
/// reads it in (`drive.frequency` `0.25` is 0.25 Hz; `0.5 m` stays as written), names the
/// x axis's unit, numbers its figures 1, 2, 3, … among those shown (this case has no
/// collapse rating, so the collapse-margin figure is left out), and says "no change" of a
/// figure every scenario shares.
#[test]
fn sweep_page_values_have_units_and_figures_are_numbered_in_order() {
    let dir = tempfile::tempdir().unwrap();
    let stem = amplitude_frequency_sweep(dir.path());
    let html_path = dir.path().join("amp.html");
    boreflux()
        .args(["report", stem.with_extension("h5").to_str().unwrap(), "-o"])
        .arg(&html_path)
        .assert()
        .success();
    let html = std::fs::read_to_string(&html_path).unwrap();
    // The list of varied values, the table and the legends.
    assert!(
        html.contains("<li><code>drive.frequency</code>: 0.25 Hz, 0.5 Hz</li>"),
        "varied list"
    );
    assert!(html.contains("<li><code>drive.amplitude</code>: 0.5 m, 1 m, 2 m</li>"));
    assert!(html.contains("<td>0.5 m</td><td>0.25 Hz</td>"), "table row");
    assert!(html.contains(">drive.frequency = 0.25 Hz<"), "legend");
    assert!(html.contains(">drive.amplitude [m]</text>"), "x axis");
    // Figures numbered without gaps, and fewer than the 15 key figures (one left out).
    let numbers: Vec<usize> = html
        .split("<h3>Figure ")
        .skip(1)
        .map(|s| s.split('.').next().unwrap().parse().unwrap())
        .collect();
    assert!(numbers.len() < 15, "{numbers:?}");
    assert_eq!(numbers, (1..=numbers.len()).collect::<Vec<_>>());
    // The skin has no cake or invaded zone to lose: the same in every scenario.
    assert!(
        html.contains("No change: every scenario reads"),
        "no-change caption"
    );
}
