//! Guards of the command line: the overwrite policy (`--force`), outputs that are inputs
//! or folders, bad result files given to `report`, the up-front run size limit
//! (`--allow-large`), drive files that are not regular files, a byte-order mark, and the
//! step estimate against real runs.

mod common;

use assert_cmd::Command;
use boreflux::case::{load_case, parse_case};
use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::{run, Reporting};
use common::{boreflux, cases_dir, dir_entries};
use std::path::{Path, PathBuf};

/// A short valid case (sine head, 20 cycles) written into `dir`.
fn short_case(dir: &Path) -> PathBuf {
    let p = dir.join("case.json");
    std::fs::write(
        &p,
        r#"{
  "well": { "screen_radius": 0.1, "screen_length": 6, "open_area": 0.12 },
  "pack": { "outer_radius": 0.2, "porosity": 0.32, "conductivity": 8e-3 },
  "formation": { "conductivity": 2e-4, "specific_storage": 1e-5 },
  "drive": { "kind": "sine_head", "amplitude": 1.5, "frequency": 0.5 },
  "duration": 40
}"#,
    )
    .unwrap();
    p
}

fn code(out: &std::process::Output) -> i32 {
    out.status.code().unwrap()
}

fn stderr(out: &std::process::Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

/// `boreflux run CASE -o OUT -q`.
fn quiet_run(case: &Path, out: &Path) -> Command {
    let mut c = boreflux();
    c.arg("run").arg(case).arg("-o").arg(out).arg("-q");
    c
}

/// The command `cmd()` writes its outputs (exit 0), is refused when run again because they
/// exist (exit 2), and writes over them with `--force` (exit 0).
fn needs_force_the_second_time(cmd: impl Fn() -> Command) {
    assert_eq!(code(&cmd().output().unwrap()), 0);
    let out = cmd().output().unwrap();
    assert_eq!(code(&out), 2);
    assert!(stderr(&out).contains("already exists"), "{}", stderr(&out));
    assert_eq!(code(&cmd().arg("--force").output().unwrap()), 0);
}

#[test]
fn existing_outputs_need_force_for_every_command() {
    let dir = tempfile::tempdir().unwrap();
    let case = short_case(dir.path());
    let h5 = dir.path().join("r.h5");
    let csv = dir.path().join("r.csv");
    let run = |extra: &[&str]| {
        boreflux()
            .arg("run")
            .arg(&case)
            .arg("-o")
            .arg(&h5)
            .args(["-q", "--csv"])
            .args(extra)
            .output()
            .unwrap()
    };
    assert_eq!(code(&run(&[])), 0);
    // The CSV beside the HDF5 file counts too: with only it present, run still refuses.
    std::fs::remove_file(&h5).unwrap();
    let out = run(&[]);
    assert_eq!(code(&out), 2, "{}", stderr(&out));
    assert!(stderr(&out).contains("r.csv already exists") && stderr(&out).contains("--force"));
    assert!(!h5.exists());
    assert_eq!(code(&run(&["--force"])), 0);
    let before = std::fs::read(&h5).unwrap();
    let out = run(&[]);
    assert_eq!(code(&out), 2);
    assert!(
        stderr(&out).contains("r.h5 already exists"),
        "{}",
        stderr(&out)
    );
    assert_eq!(std::fs::read(&h5).unwrap(), before);
    assert!(csv.exists());

    let html = dir.path().join("r.html");
    needs_force_the_second_time(|| {
        let mut c = boreflux();
        c.arg("report").arg(&h5).arg("-o").arg(&html);
        c
    });
    needs_force_the_second_time(|| {
        let mut c = boreflux();
        c.arg("sweep")
            .arg(&case)
            .args(["--vary", "drive.amplitude=1,2", "-q", "-o"])
            .arg(dir.path().join("s"));
        c
    });

    for k in ["1/2", "2/2"] {
        boreflux()
            .arg("sweep")
            .arg(&case)
            .args(["--vary", "drive.amplitude=1,2", "-q", "--shard", k, "-o"])
            .arg(dir.path().join(format!("p{}", &k[..1])))
            .assert()
            .success();
    }
    needs_force_the_second_time(|| {
        let mut c = boreflux();
        c.arg("merge")
            .arg(dir.path().join("p1.h5"))
            .arg(dir.path().join("p2.h5"))
            .arg("-o")
            .arg(dir.path().join("m"));
        c
    });
    // No temporary file is left behind by any of this.
    assert!(
        dir_entries(dir.path()).iter().all(|n| !n.contains(".tmp-")),
        "{:?}",
        dir_entries(dir.path())
    );
}

#[test]
fn report_never_writes_over_its_input() {
    let dir = tempfile::tempdir().unwrap();
    let case = short_case(dir.path());
    let h5 = dir.path().join("r.h5");
    quiet_run(&case, &h5).assert().success();
    let before = std::fs::read(&h5).unwrap();
    // Even with --force, and through another spelling of the same path.
    let same = dir.path().join(".").join("r.h5");
    let out = boreflux()
        .arg("report")
        .arg(&h5)
        .arg("-o")
        .arg(&same)
        .arg("--force")
        .output()
        .unwrap();
    assert_eq!(code(&out), 2);
    assert!(
        stderr(&out).contains("never writes over its inputs"),
        "{}",
        stderr(&out)
    );
    assert_eq!(std::fs::read(&h5).unwrap(), before);
}

#[test]
fn report_on_files_that_are_not_results_is_bad_input() {
    let dir = tempfile::tempdir().unwrap();
    let text = dir.path().join("notes.h5");
    std::fs::write(&text, "time,head\n0,1\n").unwrap();
    let empty = dir.path().join("empty.h5");
    std::fs::write(&empty, "").unwrap();
    let case = short_case(dir.path());
    let good = dir.path().join("good.h5");
    quiet_run(&case, &good).assert().success();
    let bytes = std::fs::read(&good).unwrap();
    let truncated = dir.path().join("truncated.h5");
    std::fs::write(&truncated, &bytes[..bytes.len() / 3]).unwrap();
    let foreign = dir.path().join("foreign.h5");
    hdf5::File::create(&foreign)
        .unwrap()
        .new_dataset::<f64>()
        .shape(3)
        .create("x")
        .unwrap();
    for f in [&text, &empty, &truncated, &foreign] {
        let out = boreflux()
            .arg("report")
            .arg(f)
            .arg("-o")
            .arg(dir.path().join("r.html"))
            .output()
            .unwrap();
        assert_eq!(code(&out), 2, "{}: {}", f.display(), stderr(&out));
        assert!(stderr(&out).contains("not a boreflux"), "{}", stderr(&out));
    }
    assert!(!dir.path().join("r.html").exists());
}

#[test]
fn crafted_result_files_give_clear_errors() {
    let dir = tempfile::tempdir().unwrap();
    let case = short_case(dir.path());
    let good = dir.path().join("good.h5");
    quiet_run(&case, &good).assert().success();
    // A series declaring 2e9 values (chunked, never written: the file stays small).
    let huge = dir.path().join("huge.h5");
    std::fs::copy(&good, &huge).unwrap();
    {
        let f = hdf5::File::open_rw(&huge).unwrap();
        f.unlink("series/face_flux").unwrap();
        let ds = f
            .new_dataset::<f64>()
            .chunk(4096)
            .shape(2_000_000_000usize)
            .create("series/face_flux")
            .unwrap();
        ds.new_attr::<hdf5::types::VarLenUnicode>()
            .create("units")
            .unwrap()
            .write_scalar(&"m/s".parse::<hdf5::types::VarLenUnicode>().unwrap())
            .unwrap();
    }
    let out = boreflux()
        .arg("report")
        .arg(&huge)
        .arg("-o")
        .arg(dir.path().join("h.html"))
        .output()
        .unwrap();
    assert_eq!(code(&out), 2, "{}", stderr(&out));
    assert!(stderr(&out).contains("declares"), "{}", stderr(&out));
    // Values of ±1e308 in a series: a report, or a clear error, never a panic.
    let extreme = dir.path().join("extreme.h5");
    std::fs::copy(&good, &extreme).unwrap();
    {
        let f = hdf5::File::open_rw(&extreme).unwrap();
        for name in ["series/face_flux", "series/well_head", "series/shear_proxy"] {
            let ds = f.dataset(name).unwrap();
            let n = ds.size();
            let v: Vec<f64> = (0..n)
                .map(|i| if i % 2 == 0 { 1e308 } else { -1e308 })
                .collect();
            ds.write_raw(&v).unwrap();
        }
    }
    let out = boreflux()
        .arg("report")
        .arg(&extreme)
        .arg("-o")
        .arg(dir.path().join("e.html"))
        .output()
        .unwrap();
    assert!(
        code(&out) == 0 || code(&out) == 2,
        "exit {}: {}",
        code(&out),
        stderr(&out)
    );
    assert!(!stderr(&out).contains("panicked"), "{}", stderr(&out));
}

#[test]
fn output_folder_and_missing_folder_are_refused_before_the_run() {
    let dir = tempfile::tempdir().unwrap();
    let case = short_case(dir.path());
    for (out, what) in [
        (dir.path().to_path_buf(), "is a folder"),
        (dir.path().join("nowhere/r.h5"), "does not exist"),
    ] {
        let o = boreflux()
            .arg("run")
            .arg(&case)
            .arg("-o")
            .arg(&out)
            .args(["-q", "--force"])
            .output()
            .unwrap();
        assert_eq!(code(&o), 2);
        assert!(stderr(&o).contains(what), "{}", stderr(&o));
        // Refused before the run: nothing was simulated, so no summary on stdout.
        assert!(o.stdout.is_empty());
    }
}

#[test]
fn runs_over_the_size_limit_need_allow_large() {
    let dir = tempfile::tempdir().unwrap();
    let case = dir.path().join("long.json");
    // 1e-5 s steps for a day: 8.6e9 nominal steps, twice that with the adaptive scheme's
    // allowance (solver/src/cost.rs).
    std::fs::write(
        &case,
        r#"{
  "well": { "screen_radius": 0.1, "screen_length": 6, "open_area": 0.12 },
  "pack": { "outer_radius": 0.2, "porosity": 0.32, "conductivity": 8e-3 },
  "formation": { "conductivity": 2e-4, "specific_storage": 1e-5 },
  "drive": { "kind": "constant_rate", "pumping_rate": "5 L/s" },
  "duration": "1 d",
  "numerics": { "time_step": 1e-5 }
}"#,
    )
    .unwrap();
    let h5 = dir.path().join("r.h5");
    let out = quiet_run(&case, &h5).output().unwrap();
    assert_eq!(code(&out), 2);
    let e = stderr(&out);
    assert!(
        e.contains("too large") && e.contains("--allow-large"),
        "{e}"
    );
    assert!(e.contains("1.728e10 steps"), "{e}");
    assert_eq!(dir_entries(dir.path()), ["long.json"]);
    let out = boreflux().arg("check").arg(&case).output().unwrap();
    assert_eq!(code(&out), 0);
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        text.contains("Run size: up to about 1.728e10 steps"),
        "{text}"
    );
    assert!(text.contains("needs --allow-large"), "{text}");
    let out = boreflux()
        .arg("sweep")
        .arg(&case)
        .args(["--vary", "drive.pumping_rate=1,2", "-q", "-o"])
        .arg(dir.path().join("s"))
        .output()
        .unwrap();
    assert_eq!(code(&out), 2);
    assert!(stderr(&out).contains("too large"), "{}", stderr(&out));
}

#[test]
fn drive_files_must_be_regular_and_are_not_quoted() {
    let dir = tempfile::tempdir().unwrap();
    let case = |file: &str| {
        format!(
            r#"{{
  "well": {{ "screen_radius": 0.1, "screen_length": 6, "open_area": 0.12 }},
  "pack": {{ "outer_radius": 0.2, "porosity": 0.32, "conductivity": 8e-3 }},
  "formation": {{ "conductivity": 2e-4, "specific_storage": 1e-5 }},
  "drive": {{ "kind": "table", "quantity": "head", "file": "{file}" }},
  "duration": 60
}}"#
        )
    };
    let e = parse_case(&case("/dev/zero"), dir.path()).unwrap_err();
    assert_eq!(e.field, "drive.file");
    assert!(e.message.contains("not a regular file"), "{e}");
    let fifo = dir.path().join("pipe");
    let made = std::process::Command::new("mkfifo").arg(&fifo).status();
    if made.is_ok_and(|s| s.success()) {
        let e = parse_case(&case("pipe"), dir.path()).unwrap_err();
        assert!(e.message.contains("not a regular file"), "{e}");
    }
    std::fs::write(dir.path().join("secret.txt"), "password=hunter2\n").unwrap();
    let e = parse_case(&case("secret.txt"), dir.path()).unwrap_err();
    assert!(!e.to_string().contains("hunter2"), "{e}");
    assert!(e.message.contains("line 1"), "{e}");
}

#[test]
fn a_byte_order_mark_is_accepted() {
    let dir = tempfile::tempdir().unwrap();
    let case = short_case(dir.path());
    let text = std::fs::read_to_string(&case).unwrap();
    std::fs::write(&case, format!("\u{feff}{text}")).unwrap();
    assert!(load_case(&case).is_ok());
    boreflux().arg("check").arg(&case).assert().success();
}

#[test]
fn step_estimate_bounds_the_shipped_runs() {
    // The estimate must not undercount (it is what the size limit trusts), and should not
    // overcount by much on ordinary cases (a limit that refuses them would be useless).
    for entry in std::fs::read_dir(cases_dir()).unwrap() {
        let path = entry.unwrap().path();
        if path.extension().is_none_or(|e| e != "json") {
            continue;
        }
        let mut case = load_case(&path).unwrap();
        let est = boreflux_solver::cost::estimate(&case.model);
        // The estimate is that of full stepping; jumps over cycles only take fewer steps.
        let jumping = run(&case.model, &mut NullObserver, Reporting::default()).unwrap();
        assert!(est.steps >= jumping.steps as f64, "{}", path.display());
        case.model.numerics.multiscale = boreflux_solver::model::Multiscale::Off;
        let s = run(&case.model, &mut NullObserver, Reporting::default()).unwrap();
        let steps = s.steps as f64;
        assert!(
            est.steps >= steps,
            "{}: estimate {} below the {steps} steps taken",
            path.display(),
            est.steps
        );
        assert!(
            est.steps <= 3.0 * steps + 100.0,
            "{}: estimate {} far above the {steps} steps taken",
            path.display(),
            est.steps
        );
        assert_eq!(est.cells, s.cells as f64, "{}", path.display());
    }
}

#[test]
fn output_size_estimate_bounds_the_shipped_files() {
    let dir = tempfile::tempdir().unwrap();
    for entry in std::fs::read_dir(cases_dir()).unwrap() {
        let path = entry.unwrap().path();
        if path.extension().is_none_or(|e| e != "json") {
            continue;
        }
        let out = boreflux()
            .arg("check")
            .arg(&path)
            .arg("--json")
            .output()
            .unwrap();
        assert_eq!(code(&out), 0, "{}", stderr(&out));
        let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        let est = v["cost"]["estimated_output_bytes"].as_f64().unwrap();
        let h5 = dir.path().join("r.h5");
        let run = |case: &std::path::Path| {
            let out = boreflux()
                .arg("run")
                .arg(case)
                .arg("-o")
                .arg(&h5)
                .args(["--json", "--force", "--csv"])
                .output()
                .unwrap();
            assert_eq!(code(&out), 0, "{}", stderr(&out));
            let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
            let bytes = std::fs::metadata(&h5).unwrap().len() as f64;
            (bytes, json["skipped_cycles"].as_u64().unwrap())
        };
        let (got, skipped) = run(&path);
        // The CSV is estimated separately (check prints the HDF5 estimate).
        assert!(
            est >= got,
            "{}: estimate {est} B below the {got} B written",
            path.display()
        );
        // The estimate is that of full stepping (an upper bound when cycles are jumped
        // over): where the run jumped, its closeness is checked on full stepping.
        let full = if skipped > 0 {
            let mut case: serde_json::Value =
                serde_json::from_str(&std::fs::read_to_string(&path).unwrap()).unwrap();
            case["numerics"]["multiscale"] = "off".into();
            let off = dir.path().join("full.json");
            std::fs::write(&off, case.to_string()).unwrap();
            run(&off).0
        } else {
            got
        };
        assert!(
            est <= 4.0 * full,
            "{}: estimate {est} B far above {full} B (full stepping)",
            path.display()
        );
        let csv = std::fs::metadata(h5.with_extension("csv")).unwrap().len() as f64;
        let rows = v["cost"]["steps_at_most"].as_f64().unwrap();
        assert!(
            csv <= 24.0 * 25.0 * (rows + 2.0),
            "{}: CSV {csv} B",
            path.display()
        );
    }
}
