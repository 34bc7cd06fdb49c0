//! Helpers the command-line tests share: the binary under test, the shipped and bad case
//! folders, small case files written into a scratch folder, the output of a command as
//! text or JSON, and an interrupted child process. Each test file takes them with
//! `mod common;`; Cargo does not build this folder as a test of its own.

// Each test file is its own crate and uses only some of these.
#![allow(dead_code)]

use assert_cmd::Command;
use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::{Child, ExitStatus, Output};

/// The binary under test.
pub fn boreflux() -> Command {
    Command::cargo_bin("boreflux").expect("the boreflux binary is built by cargo test")
}

/// The repository's root folder.
pub fn repo_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("..")
}

/// The shipped case files, `cases/`.
pub fn cases_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases")
}

/// The case files with one error each, `cli/tests/bad_cases/`.
pub fn bad_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/bad_cases")
}

/// Every shipped case file (`cases/*.json`), sorted.
pub fn shipped_cases() -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(cases_dir())
        .expect("cases/ exists")
        .map(|e| e.expect("entry").path())
        .filter(|p| p.extension().is_some_and(|x| x == "json"))
        .collect();
    v.sort();
    assert!(!v.is_empty(), "no case files in {}", cases_dir().display());
    v
}

/// The shipped case `cases/NAME` as JSON.
pub fn shipped_case(name: &str) -> Value {
    let p = cases_dir().join(name);
    serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap()
}

/// The shipped case `cases/NAME` with its duration set to `duration` (case-file text, such
/// as "1 min"), written to `dir/out`; returns the path.
pub fn shortened_case(dir: &Path, name: &str, duration: &str, out: &str) -> PathBuf {
    let mut v = shipped_case(name);
    v["duration"] = Value::from(duration);
    write(dir, out, &serde_json::to_string_pretty(&v).unwrap())
}

/// Writes `text` to `dir/name` and returns the path.
pub fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

/// A linear (Darcy) well under a 1 m, 0.5 Hz sine head: no grain sizes (so no Forchheimer
/// term), no screen entrance loss, no cake. Invented numbers (a demo case). `duration` and
/// `numerics` are the case's values of those keys, as JSON text.
pub fn linear_case(duration: &str, numerics: &str) -> String {
    format!(
        r#"{{
  "well": {{ "screen_radius": 0.1, "screen_length": 6, "open_area": 0.12,
            "discharge_coefficient": "none" }},
  "pack": {{ "outer_radius": 0.2, "porosity": 0.32, "conductivity": 8e-3 }},
  "formation": {{ "conductivity": 2e-4, "specific_storage": 1e-5 }},
  "drive": {{ "kind": "sine_head", "amplitude": 1.0, "frequency": 0.5 }},
  "duration": {duration},
  "numerics": {numerics}
}}"#
    )
}

/// Runs `boreflux sweep CASE -q -o OUT ARGS…`, which must succeed.
pub fn run_sweep(case: &Path, out: &Path, args: &[&str]) {
    boreflux()
        .arg("sweep")
        .arg(case)
        .args(["-q", "-o"])
        .arg(out)
        .args(args)
        .assert()
        .success();
}

/// Runs `boreflux sweep CASE -q -o DIR/whole ARGS…` and the same sweep in `shards` shards
/// (`-o DIR/part-K --shard K/SHARDS`), each of which must succeed; returns the shards'
/// tables (`DIR/part-K.h5`).
pub fn sweep_whole_and_shards(
    dir: &Path,
    case: &Path,
    args: &[&str],
    shards: usize,
) -> Vec<PathBuf> {
    let run = |out: &str, shard: Option<String>| {
        let shard = shard.map(|s| ["--shard".to_owned(), s]);
        let mut all: Vec<&str> = args.to_vec();
        all.extend(shard.iter().flatten().map(String::as_str));
        run_sweep(case, &dir.join(out), &all);
    };
    run("whole", None);
    (1..=shards)
        .map(|k| {
            run(&format!("part-{k}"), Some(format!("{k}/{shards}")));
            dir.join(format!("part-{k}.h5"))
        })
        .collect()
}

/// `boreflux merge PARTS… -o OUT`, run; the caller asserts on the outcome.
pub fn merge(parts: &[PathBuf], out: &Path) -> assert_cmd::assert::Assert {
    boreflux()
        .arg("merge")
        .args(parts)
        .arg("-o")
        .arg(out)
        .assert()
}

/// Names of everything in `dir`, hidden files included, sorted.
pub fn dir_entries(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

/// The standard output as text.
pub fn stdout_of(o: &Output) -> String {
    String::from_utf8(o.stdout.clone()).expect("stdout is UTF-8")
}

/// The standard error as text.
pub fn stderr_of(o: &Output) -> String {
    String::from_utf8(o.stderr.clone()).expect("stderr is UTF-8")
}

/// Runs `cmd`, asserts that it succeeded (showing `what` and its standard error when it
/// did not) and returns its output.
pub fn success(cmd: &mut Command, what: &str) -> Output {
    let o = cmd.output().expect("the binary starts");
    assert!(
        o.status.success(),
        "{what}: exit status {:?}\n{}",
        o.status,
        String::from_utf8_lossy(&o.stderr)
    );
    o
}

/// The JSON document `boreflux ARGS…` prints; the command must succeed.
pub fn json_of(args: &[&str]) -> Value {
    let o = success(boreflux().args(args), &format!("{args:?}"));
    serde_json::from_slice(&o.stdout).unwrap()
}

/// Sends an interrupt (Ctrl-C, SIGINT) to `child`, waits for it and returns its exit
/// status and standard error (which `child` must have piped).
pub fn interrupt(child: &mut Child) -> (ExitStatus, String) {
    let kill = std::process::Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(kill.success());
    let status = child.wait().unwrap();
    let mut stderr = String::new();
    std::io::Read::read_to_string(child.stderr.as_mut().unwrap(), &mut stderr).unwrap();
    (status, stderr)
}
