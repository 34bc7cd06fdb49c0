//! End-to-end tests of `boreflux report` on sweep tables: two grid sweeps of a shipped case
//! compared on one page (one chart per key figure, one line per table, each table's
//! scenarios), the named refusals (exit 2, nothing written), and `--title` on a sweep page.

mod common;

use common::{boreflux, shortened_case};
use std::path::{Path, PathBuf};

/// The shipped domestic demo case, shortened to one minute so a sweep takes a moment.
fn write_case(dir: &Path) -> PathBuf {
    shortened_case(dir, "domestic-fine-sand-pvc.json", "1 min", "domestic.json")
}

/// `boreflux sweep CASE -q -o DIR/STEM ARGS…`; returns the table's .h5 path.
fn sweep(case: &Path, stem: &str, args: &[&str]) -> PathBuf {
    let out = case.with_file_name(stem);
    boreflux()
        .arg("sweep")
        .arg(case)
        .args(["-q", "-o"])
        .arg(&out)
        .args(args)
        .assert()
        .success();
    out.with_extension("h5")
}

/// `boreflux report INPUTS… -o OUT [EXTRA…]`.
fn report(inputs: &[&Path], out: &Path, extra: &[&str]) -> assert_cmd::assert::Assert {
    boreflux()
        .arg("report")
        .args(inputs)
        .arg("-o")
        .arg(out)
        .args(extra)
        .assert()
}

/// The two sweeps of the comparison: the stroke alone, and the stroke with half the cake
/// coverage (a second varied parameter with one value).
fn two_sweeps(dir: &Path) -> (PathBuf, PathBuf, PathBuf) {
    let case = write_case(dir);
    let a = sweep(&case, "plain", &["--vary", "drive.stroke=1 ft,2 ft"]);
    let b = sweep(
        &case,
        "half",
        &[
            "--vary",
            "drive.stroke=1 ft,1.5 ft,2 ft",
            "--vary",
            "cake.coverage=0.5",
        ],
    );
    (case, a, b)
}

#[test]
fn two_sweep_tables_share_one_chart_per_key_figure() {
    let dir = tempfile::tempdir().unwrap();
    let (_, a, b) = two_sweeps(dir.path());
    let out = dir.path().join("compare.html");
    report(&[&a, &b], &out, &[]).success();
    let html = std::fs::read_to_string(&out).unwrap();
    assert!(html.contains("<h1>Well development sweep comparison</h1>"));
    assert!(html.contains(boreflux_solver::safety::CAUTION.split('.').next().unwrap()));
    // One chart per key figure of the single-table page, each with both tables' lines.
    let single = dir.path().join("plain.html");
    report(&[&a], &single, &[]).success();
    let single = std::fs::read_to_string(&single).unwrap();
    let charts = html.matches("<figure>").count();
    assert!(charts >= 10, "{charts} charts");
    assert_eq!(
        charts,
        single.matches("<figure>").count(),
        "one per key figure"
    );
    assert_eq!(html.matches("<svg").count(), charts);
    // Legends name each table by letter and file (B with its other varied value); the
    // single table's legend has no name, as before.
    let legend_a = "A: plain.h5</text>";
    let legend_b = "B: half.h5, cake.coverage = 0.5</text>";
    assert_eq!(html.matches(legend_a).count(), charts, "legend A in {html}");
    assert_eq!(html.matches(legend_b).count(), charts, "legend B");
    assert!(!single.contains("plain.h5</text>"));
    // The tables one after another: 2 + 3 scenario rows under their own headings.
    assert!(html.contains("<h2>Scenarios of A: plain.h5</h2>"));
    assert!(html.contains("<h2>Scenarios of B: half.h5</h2>"));
    assert!(
        html.find("Scenarios of A").unwrap() < html.find("Scenarios of B").unwrap(),
        "A before B"
    );
    assert_eq!(html.matches("<tr><td>").count(), 5, "table rows");
}

/// Each refusal is named, exits 2 and writes nothing.
#[test]
fn sweep_comparisons_that_cannot_be_drawn_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let (case, a, _) = two_sweeps(dir.path());
    let out = dir.path().join("refused.html");
    let refused = |inputs: &[&Path], wants: &str| {
        let o = report(inputs, &out, &[]).code(2).get_output().clone();
        let err = String::from_utf8_lossy(&o.stderr).into_owned();
        assert!(err.contains(wants), "{wants:?} not in {err}");
        assert!(!out.exists(), "nothing written");
    };
    // A different first parameter.
    let freq = sweep(
        &case,
        "freq",
        &["--vary", "drive.frequency=10 strokes/min,15 strokes/min"],
    );
    refused(
        &[&a, &freq],
        "freq.h5: its first varied parameter is `drive.frequency`, but",
    );
    // A sweep table with a run file.
    let run = dir.path().join("run.h5");
    boreflux()
        .arg("run")
        .arg(&case)
        .args(["-q", "-o"])
        .arg(&run)
        .assert()
        .success();
    refused(
        &[&a, &run],
        "a sweep table cannot be reported with run files",
    );
    refused(
        &[&run, &a],
        "a sweep table cannot be reported with run files",
    );
    // A sampled sweep is reported on its own.
    let sampled = case.with_file_name("sampled");
    boreflux()
        .arg("sweep")
        .arg(&case)
        .args(["-q", "-o"])
        .arg(&sampled)
        .args(["--sample", "drive.stroke=uniform(1 ft, 2 ft)"])
        .args(["--samples", "2", "--seed", "1"])
        .assert()
        .success();
    refused(
        &[&a, &sampled.with_extension("h5")],
        "a sampled sweep (--sample) is reported on its own",
    );
}

/// `--title` sets the sweep page's browser title and heading, escaped as on run reports;
/// without it the page keeps its own.
#[test]
fn a_sweep_page_title_can_be_set_and_is_escaped() {
    let dir = tempfile::tempdir().unwrap();
    let (_, a, b) = two_sweeps(dir.path());
    let want = "Well 7 &lt;east&gt; &amp; &quot;B&quot;";
    for inputs in [vec![a.as_path()], vec![a.as_path(), b.as_path()]] {
        let out = dir.path().join(format!("titled{}.html", inputs.len()));
        report(&inputs, &out, &["--title", "Well 7 <east> & \"B\""]).success();
        let html = std::fs::read_to_string(&out).unwrap();
        assert!(html.contains(&format!("<title>{want}</title>")), "title");
        assert!(html.contains(&format!("<h1>{want}</h1>")), "heading");
        assert!(!html.contains("<east>"));
    }
    let plain = dir.path().join("plain.html");
    report(&[&a], &plain, &[]).success();
    let html = std::fs::read_to_string(&plain).unwrap();
    let case = dir.path().join("domestic.json");
    assert!(html.contains(&format!("<title>Sweep report: {}</title>", case.display())));
    assert!(html.contains("<h1>Well development sweep report</h1>"));
}
