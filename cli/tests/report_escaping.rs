//! Text from the user (a case title, `--title`, a file name) is escaped on every page kind:
//! a run report, a grid sweep page, a sweep comparison, a step-test page and a calibration
//! page, each given a title or file name with all five markup characters.
//!
//! The expected entities are the five of OWASP's XSS Prevention Cheat Sheet, rule 1 (from
//! memory): & < > " ' as &amp; &lt; &gt; &quot; &#39; (cli/src/report/escape.rs).

mod common;

use common::boreflux as bin;
use std::path::{Path, PathBuf};

use serde_json::json;

/// A title that is markup if it is not escaped.
const TITLE: &str = r#"<script>&"'"#;
/// The same, escaped.
const ESCAPED: &str = "&lt;script&gt;&amp;&quot;&#39;";

/// Checks that `html` holds the escaped title `times` times or more and never the raw one.
fn assert_escaped(html: &str, times: usize, page: &str) {
    let found = html.matches(ESCAPED).count();
    assert!(found >= times, "{page}: escaped title {found} times");
    assert!(!html.contains(TITLE), "{page}: raw title");
    assert!(!html.contains("<script"), "{page}: a script element");
}

/// A small, fast case (invented test well, not from any source): pumping from a screen in
/// a sand, pack and formation only, 40 cells, 10 minutes; its title is [`TITLE`].
fn write_case(dir: &Path) -> PathBuf {
    let case = json!({
        "title": TITLE,
        "well": { "screen_radius": "100 mm", "screen_length": "10 m", "open_area": "10 %",
                  "casing_radius": "100 mm", "slot_width": "1 mm" },
        "pack": { "outer_radius": "180 mm", "porosity": 0.3, "conductivity": "2e-3 m/s",
                  "specific_storage": "1e-5 1/m" },
        "formation": { "conductivity": "1e-4 m/s", "specific_storage": "2e-5 1/m",
                       "porosity": 0.3, "outer_radius": "auto" },
        "drive": { "kind": "constant_rate", "pumping_rate": "5 L/s" },
        "duration": "10 min",
        "numerics": { "cells": 40 }
    });
    // The file name carries the title too (shown on sweep pages).
    let path = dir.join(format!("well {TITLE}.json"));
    std::fs::write(&path, case.to_string()).unwrap();
    path
}

fn read(path: &Path) -> String {
    std::fs::read_to_string(path).unwrap()
}

/// `boreflux report INPUTS… -o PAGE [--title TITLE]`, which must succeed; the page's text.
fn report(inputs: &[&Path], page: &Path, title: Option<&str>) -> String {
    let mut cmd = bin();
    cmd.arg("report").args(inputs).arg("-o").arg(page);
    if let Some(t) = title {
        cmd.args(["--title", t]);
    }
    cmd.assert().success();
    read(page)
}

#[test]
fn run_and_sweep_pages_escape_titles_and_file_names() {
    let dir = tempfile::tempdir().unwrap();
    let case = write_case(dir.path());
    let run = dir.path().join("run.h5");
    bin()
        .arg("run")
        .arg(&case)
        .arg("-o")
        .arg(&run)
        .arg("-q")
        .assert()
        .success();

    // The case title (in the run file) and `--title`.
    let page = dir.path().join("run.html");
    let html = report(&[&run], &page, Some(TITLE));
    assert!(html.contains(&format!("<title>{ESCAPED}</title>")));
    assert!(html.contains(&format!("<h1>{ESCAPED}</h1>")));
    assert!(html.contains(&format!("<h3>Run A: {ESCAPED}</h3>")));
    assert_escaped(&html, 4, "run page");

    // Without `--title` the case title goes into the browser's title.
    let plain = dir.path().join("plain.html");
    let html = report(&[&run], &plain, None);
    assert!(html.contains(&format!(
        "<title>Well development report: {ESCAPED}</title>"
    )));
    assert_escaped(&html, 3, "run page without --title");

    // A grid sweep of the case (its file name holds the title) and `--title`.
    let sweep = dir.path().join("grid");
    bin()
        .arg("sweep")
        .arg(&case)
        .arg("-o")
        .arg(&sweep)
        .args(["--vary", "drive.pumping_rate=4 L/s,5 L/s", "-q", "-j", "1"])
        .assert()
        .success();
    let table = dir.path().join("grid.h5");
    let page = dir.path().join("sweep.html");
    let html = report(&[&table], &page, Some(TITLE));
    assert!(html.contains(&format!("<title>{ESCAPED}</title>")));
    assert!(html.contains(&format!("<h1>{ESCAPED}</h1>")));
    // The case file's name in the lead paragraph, and the base case's title in its JSON.
    assert!(html.contains(&format!("well {ESCAPED}.json</code>")));
    assert_escaped(&html, 3, "sweep page");

    // Two sweep tables compared: the table's file names are not marked up, the case's are.
    let page = dir.path().join("compare.html");
    let html = report(&[&table, &table], &page, Some(TITLE));
    assert!(html.contains(&format!("<h1>{ESCAPED}</h1>")));
    assert_escaped(&html, 4, "sweep comparison");
}

#[test]
fn step_test_page_escapes_the_file_name() {
    let dir = tempfile::tempdir().unwrap();
    let root = Path::new(env!("CARGO_MANIFEST_DIR")).join("..");
    let input = dir.path().join(format!("steps {TITLE}.csv"));
    std::fs::copy(root.join("cases/step-tests/demo-steps.csv"), &input).unwrap();
    let page = dir.path().join("steps.html");
    bin()
        .arg("steptest")
        .arg(&input)
        .arg("-o")
        .arg(&page)
        .assert()
        .success();
    let html = read(&page);
    assert!(html.contains(&format!(
        "<title>Step-drawdown analysis: steps {ESCAPED}.csv</title>"
    )));
    assert!(html.contains(&format!("<code>steps {ESCAPED}.csv</code>")));
    assert_escaped(&html, 2, "step-test page");
}

#[test]
fn calibration_page_escapes_the_file_name() {
    let dir = tempfile::tempdir().unwrap();
    let case = write_case(dir.path());
    // An invented log (not a field record): 10 min pumping at 5 L/s, 5 min rest; drawdowns
    // of the right order for the case, not fitted to anything.
    let log = dir.path().join(format!("log {TITLE}.csv"));
    std::fs::write(
        &log,
        "# invented test log\ntime_min,activity,rate_L/s,drawdown_cm\n\
         0,pump,5,0\n2,pump,5,40\n4,pump,5,45\n6,pump,5,48\n8,pump,5,50\n\
         10,rest,,10\n12,rest,,5\n15,end,,3\n",
    )
    .unwrap();
    let page = dir.path().join("cal.html");
    let out = bin()
        .arg("calibrate")
        .arg(&case)
        .arg(&log)
        .args(["--free", "formation.conductivity=1e-5 m/s..1e-2 m/s"])
        .args(["--jobs", "1", "--max-runs", "12", "-o"])
        .arg(&page)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let html = read(&page);
    assert!(html.contains(&format!("<title>Calibration: log {ESCAPED}.csv</title>")));
    assert!(html.contains(&format!("<code>log {ESCAPED}.csv</code>")));
    assert_escaped(&html, 2, "calibration page");
}
