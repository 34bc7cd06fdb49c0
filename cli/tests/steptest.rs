//! End-to-end tests of `boreflux steptest`: exit codes (0 ok, 2 bad input), error messages
//! that name the line and column, the JSON values against synthetic data of known B and C,
//! and the HTML output (temporary file renamed, no overwrite without --force).

mod common;

use common::{boreflux, cases_dir, json_of, write};
use serde_json::Value;

fn stderr_of_failure(args: &[&str], code: i32) -> String {
    let out = boreflux().args(args).output().unwrap();
    assert_eq!(
        out.status.code(),
        Some(code),
        "{}",
        String::from_utf8_lossy(&out.stdout)
    );
    String::from_utf8_lossy(&out.stderr).into_owned()
}

#[test]
fn steptest_good_files_print_table() {
    for (file, method) in [
        ("step-tests/demo-series.csv", "Hantush–Bierschenk"),
        ("step-tests/demo-steps.csv", "Jacob"),
    ] {
        let path = cases_dir().join(file);
        let out = boreflux().arg("steptest").arg(&path).output().unwrap();
        assert!(
            out.status.success(),
            "{file}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
        let text = String::from_utf8_lossy(&out.stdout);
        assert!(text.contains(method), "{text}");
        assert!(text.contains("B = ") && text.contains("C = ") && text.contains("95 % interval"));
        assert!(
            text.contains("E = B Q / (B Q + C Q^2)"),
            "efficiency definition missing"
        );
        assert!(text.contains("CAUTION"));
    }
}

/// docs/physics.md §9d synthetic check: B = 100 s/m², C = 2000 s²/m⁵ at 5, 10, 15, 20 L/s
/// (s = 0.55, 1.20, 1.95, 2.80 m); `numpy.linalg.lstsq` of s/Q on [1, Q] returns
/// [100, 2000], E = 0.909091 … 0.714286. Exact data: the binary must return them to
/// round-off (1e-9 relative, the JSON carries 17 digits).
#[test]
fn steptest_json_recovers_exact_b_and_c() {
    let dir = tempfile::tempdir().unwrap();
    let f = write(
        dir.path(),
        "exact.csv",
        "# synthetic, docs/physics.md §9d\nrate_L/s,drawdown_cm\n5,55\n10,120\n15,195\n20,280\n",
    );
    for w in ["equal", "drawdown"] {
        let v = json_of(&["steptest", f.to_str().unwrap(), "--json", "--weights", w]);
        assert_eq!(v["method"], "jacob");
        assert!(
            (v["B"]["value"].as_f64().unwrap() / 100.0 - 1.0).abs() < 1e-9,
            "{v}"
        );
        assert!(
            (v["C"]["value"].as_f64().unwrap() / 2000.0 - 1.0).abs() < 1e-9,
            "{v}"
        );
        assert_eq!(v["dof"], 2);
        let e: Vec<f64> = v["steps"]
            .as_array()
            .unwrap()
            .iter()
            .map(|s| s["efficiency"].as_f64().unwrap())
            .collect();
        for (a, b) in e.iter().zip([0.909091, 0.833333, 0.769231, 0.714286]) {
            assert!((a - b).abs() < 5e-7, "{a} vs {b}");
        }
    }
}

/// The demo time series is Theis data with known parameters (its header comment: T = 4e-3
/// m²/s, S = 2e-4, r_w = 0.1 m, linear well loss 15 s/m², C = 2500 s²/m⁵, 5 mm noise,
/// seeded). For Theis at late time, B(Δt) = 15 + b log10(4 e^(−γ) T Δt / (r_w² S)) with
/// b = ln 10 / (4π T) (Cooper and Jacob 1946; 4 e^(−γ) = 2.2458). The 95 % intervals of
/// B(60 min) and C must hold the true values, and T must come back within 5 %.
#[test]
fn steptest_json_demo_series_intervals_hold_true_values() {
    let demo = cases_dir().join("step-tests/demo-series.csv");
    let v = json_of(&["steptest", demo.to_str().unwrap(), "--json"]);
    assert_eq!(v["method"], "hantush-bierschenk");
    let (t, s, rw) = (4e-3_f64, 2e-4_f64, 0.1_f64);
    let b = std::f64::consts::LN_10 / (4.0 * std::f64::consts::PI * t);
    let gamma = 0.577_215_664_901_532_9_f64;
    let b_true = 15.0 + b * (4.0 * (-gamma).exp() * t * 3600.0 / (rw * rw * s)).log10();
    let inside =
        |e: &Value, x: f64| e["lower"].as_f64().unwrap() <= x && x <= e["upper"].as_f64().unwrap();
    assert_eq!(v["series"]["reference_time_s"].as_f64().unwrap(), 3600.0);
    assert!(inside(&v["B"], b_true), "B {} vs {b_true}", v["B"]);
    assert!(inside(&v["C"], 2500.0), "C {}", v["C"]);
    let t_fit = v["series"]["transmissivity_m2_s"].as_f64().unwrap();
    assert!((t_fit / t - 1.0).abs() < 0.05, "T {t_fit}");
    // Another common time.
    let v = json_of(&[
        "steptest",
        demo.to_str().unwrap(),
        "--json",
        "--at",
        "30 min",
    ]);
    assert_eq!(v["series"]["reference_time_s"].as_f64().unwrap(), 1800.0);
}

/// `--power` on the exact docs/physics.md §9d data (s = B Q + C Q², B = 100, C = 2000):
/// the power law must find n = 2, B = 100, C = 2000 (1e-6 relative: golden-section search
/// in n), and on three steps it must say that four are needed.
#[test]
fn steptest_power_law_on_exact_data() {
    let dir = tempfile::tempdir().unwrap();
    let f = write(
        dir.path(),
        "exact.csv",
        "rate_L/s,drawdown_cm\n5,55\n10,120\n15,195\n20,280\n",
    );
    let v = json_of(&["steptest", f.to_str().unwrap(), "--json", "--power"]);
    let p = &v["power"];
    assert!(
        (p["n"]["value"].as_f64().unwrap() / 2.0 - 1.0).abs() < 1e-6,
        "{p}"
    );
    assert!(
        (p["B"]["value"].as_f64().unwrap() / 100.0 - 1.0).abs() < 1e-6,
        "{p}"
    );
    assert!(
        (p["C"]["value"].as_f64().unwrap() / 2000.0 - 1.0).abs() < 1e-6,
        "{p}"
    );
    let f = write(
        dir.path(),
        "three.csv",
        "rate_L/s,drawdown_cm\n5,55\n10,120\n15,195\n",
    );
    let v = json_of(&["steptest", f.to_str().unwrap(), "--json", "--power"]);
    assert!(
        v["power"]["error"].as_str().unwrap().contains("at least 4"),
        "{v}"
    );
    assert!(v["B"]["value"].is_number(), "the Jacob fit is still made");
}

#[test]
fn steptest_bad_header_names_the_column() {
    let dir = tempfile::tempdir().unwrap();
    let f = write(dir.path(), "h.csv", "rate_L/s,level_m\n5,1\n10,2\n15,3\n");
    let e = stderr_of_failure(&["steptest", f.to_str().unwrap()], 2);
    assert!(e.contains("line 1") && e.contains("level_m"), "{e}");
    let f = write(
        dir.path(),
        "u.csv",
        "rate_L/s,drawdown_m/s\n5,1\n10,2\n15,3\n",
    );
    let e = stderr_of_failure(&["steptest", f.to_str().unwrap()], 2);
    assert!(e.contains("drawdown_m/s") && e.contains("length"), "{e}");
}

#[test]
fn steptest_non_numeric_cell_names_line_and_column() {
    let dir = tempfile::tempdir().unwrap();
    let f = write(
        dir.path(),
        "n.csv",
        "# c\nrate_L/s,drawdown_m\n5,1\n10,two\n15,3\n",
    );
    let e = stderr_of_failure(&["steptest", f.to_str().unwrap()], 2);
    assert!(
        e.contains("line 4") && e.contains("drawdown_m") && e.contains("\"two\""),
        "{e}"
    );
    let f = write(dir.path(), "z.csv", "rate_L/s,drawdown_m\n5,1\n0,2\n15,3\n");
    let e = stderr_of_failure(&["steptest", f.to_str().unwrap()], 2);
    assert!(e.contains("line 3") && e.contains("rate"), "{e}");
    let f = write(
        dir.path(),
        "t.csv",
        "time_min,rate_L/s,drawdown_m\n1,5,1\n1,5,1.1\n",
    );
    let e = stderr_of_failure(&["steptest", f.to_str().unwrap()], 2);
    assert!(e.contains("line 3") && e.contains("time"), "{e}");
}

#[test]
fn steptest_two_steps_refused_with_reason() {
    let dir = tempfile::tempdir().unwrap();
    let f = write(
        dir.path(),
        "two.csv",
        "rate_L/s,drawdown_m\n5,0.55\n10,1.2\n",
    );
    let e = stderr_of_failure(&["steptest", f.to_str().unwrap()], 2);
    assert!(e.contains("2 step(s)") && e.contains("at least 3"), "{e}");
    assert!(e.contains("no degree of freedom"), "{e}");
    // A per-step file cannot be corrected to a common time.
    let f = write(
        dir.path(),
        "three.csv",
        "rate_L/s,drawdown_m\n5,0.55\n10,1.2\n15,1.95\n",
    );
    let e = stderr_of_failure(&["steptest", f.to_str().unwrap(), "--method", "hantush"], 2);
    assert!(e.contains("time series"), "{e}");
}

#[test]
fn steptest_html_written_whole_and_not_overwritten_without_force() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("st.html");
    let demo = cases_dir().join("step-tests/demo-series.csv");
    let args = [
        "steptest",
        demo.to_str().unwrap(),
        "-o",
        out.to_str().unwrap(),
    ];
    boreflux().args(args).assert().success();
    let html = std::fs::read_to_string(&out).unwrap();
    assert!(html.contains("<svg") && html.contains("s/Q") && html.contains("Cautions"));
    assert!(html.ends_with("</html>\n"));
    std::fs::write(&out, "keep").unwrap();
    let e = stderr_of_failure(&args, 2);
    assert!(e.contains("--force"), "{e}");
    assert_eq!(std::fs::read_to_string(&out).unwrap(), "keep");
    boreflux().args(args).arg("--force").assert().success();
    assert!(std::fs::read_to_string(&out).unwrap().contains("<svg"));
    // Nothing else left in the directory (no temporary file).
    let names: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(names.len(), 1, "{names:?}");
    // Bad input leaves no output.
    let bad = write(dir.path(), "bad.csv", "rate_L/s,drawdown_m\n5,x\n");
    let out2 = dir.path().join("none.html");
    stderr_of_failure(
        &[
            "steptest",
            bad.to_str().unwrap(),
            "-o",
            out2.to_str().unwrap(),
        ],
        2,
    );
    assert!(!out2.exists());
}

/// The overwrite policy of every writing command: `-o` naming the input CSV is refused even
/// with `--force`, and the input is left as it was.
#[test]
fn steptest_never_writes_over_its_input() {
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("steps.csv");
    std::fs::copy(cases_dir().join("step-tests/demo-series.csv"), &csv).unwrap();
    let before = std::fs::read_to_string(&csv).unwrap();
    let args = [
        "steptest",
        csv.to_str().unwrap(),
        "-o",
        csv.to_str().unwrap(),
        "--force",
    ];
    let e = stderr_of_failure(&args, 2);
    assert!(e.contains("never writes over its inputs"), "{e}");
    assert_eq!(std::fs::read_to_string(&csv).unwrap(), before);
}

/// `--case` puts the model's virtual step test beside the field fit, as built and after
/// the case's development (the coefficients themselves are verified against the analytic
/// nonlinear loss in the `virtual_tests` group); a missing case is bad input (exit 2).
#[test]
fn steptest_with_a_case_shows_the_model_beside_the_field() {
    let steps = cases_dir().join("step-tests/demo-series.csv");
    let case = cases_dir().join("municipal-sand-gravel.json");
    let v = json_of(&[
        "steptest",
        steps.to_str().unwrap(),
        "--json",
        "--case",
        case.to_str().unwrap(),
    ]);
    let m = &v["model"];
    let rates = m["rates_m3_s"].as_array().unwrap();
    assert_eq!(rates.len(), v["steps"].as_array().unwrap().len());
    // The field series has 60-min steps; Hantush–Bierschenk corrects to the shortest.
    assert_eq!(m["step_duration_s"].as_f64(), Some(3600.0));
    for state in ["as_built", "after_development"] {
        let b = m[state]["B_s_m2"].as_f64().unwrap();
        assert!(b > 0.0, "{state}: B = {b}");
        assert!(m[state]["C_s2_m5"].as_f64().unwrap().is_finite());
    }
    // Development removes damage: B after is not above B as built.
    assert!(
        m["after_development"]["B_s_m2"].as_f64().unwrap()
            <= m["as_built"]["B_s_m2"].as_f64().unwrap()
    );
    let out = boreflux()
        .args(["steptest", steps.to_str().unwrap(), "--case"])
        .arg(&case)
        .output()
        .unwrap();
    assert!(out.status.success());
    assert!(String::from_utf8_lossy(&out.stdout).contains("Model of the case"));
    let err = stderr_of_failure(
        &[
            "steptest",
            steps.to_str().unwrap(),
            "--case",
            "no-such-case.json",
        ],
        2,
    );
    assert!(err.contains("no-such-case.json"), "{err}");
}

/// The warnings of a run, as (kind, message) pairs from `--json`.
fn warnings_of(v: &Value) -> Vec<(String, String)> {
    v["warnings"]
        .as_array()
        .expect("warnings is an array")
        .iter()
        .map(|w| {
            (
                w["kind"].as_str().unwrap().to_owned(),
                w["message"].as_str().unwrap().to_owned(),
            )
        })
        .collect()
}

/// s/Q falls as Q rises (invented steps: 5, 10, 15, 20 L/s; 0.98, 2.05, 2.6, 3.0 m), so
/// the fitted C is negative: `numpy.linalg.lstsq` of s/Q on [1, Q] (numpy 2.4.6) gives
/// B = 223.5 s/m², C = −3393.333 s²/m⁵, and E = B / (B + C Q) is above 1 at every step. The
/// numbers are printed unchanged (1e-9 relative, the JSON carries 17 digits), with warnings
/// in the table, the JSON and the HTML page; exit 0.
#[test]
fn steptest_negative_c_is_warned_everywhere_and_left_as_fitted() {
    let dir = tempfile::tempdir().unwrap();
    let f = write(
        dir.path(),
        "negc.csv",
        "rate_L/s,drawdown_m\n5,0.98\n10,2.05\n15,2.6\n20,3.0\n",
    );
    let out = boreflux().arg("steptest").arg(&f).output().unwrap();
    assert!(out.status.success());
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("WARNINGS (2):"), "{text}");
    assert!(
        text.contains("C = -3393 s²/m⁵ is below zero") && text.contains("Jacob's form"),
        "{text}"
    );
    assert!(text.contains("still developing during the test"), "{text}");
    assert!(
        text.contains("outside 0 to 100 % at step 1 (") && text.contains("step 4 ("),
        "{text}"
    );

    let v = json_of(&["steptest", f.to_str().unwrap(), "--json"]);
    let c = v["C"]["value"].as_f64().unwrap();
    assert!((c / -3_393.333_333_333 - 1.0).abs() < 1e-9, "C {c}");
    assert!((v["B"]["value"].as_f64().unwrap() / 223.5 - 1.0).abs() < 1e-9);
    let kinds: Vec<String> = warnings_of(&v).into_iter().map(|w| w.0).collect();
    assert_eq!(kinds, ["negative_c", "efficiency_out_of_range"]);

    let html = dir.path().join("negc.html");
    boreflux()
        .args(["steptest", f.to_str().unwrap(), "-o"])
        .arg(&html)
        .assert()
        .success();
    let page = std::fs::read_to_string(&html).unwrap();
    assert!(
        page.contains("<section class=\"warnings\">") && page.contains("Warnings (2)"),
        "no warnings section"
    );
    assert!(page.contains("is below zero"));
}

/// Two steps at the same rate (5, 5, 15 L/s) and a rate below the step before (5, 10,
/// 7.5 L/s); drawdowns invented. Each is named with its steps and rate.
#[test]
fn steptest_repeated_and_falling_rates_are_warned() {
    let dir = tempfile::tempdir().unwrap();
    let f = write(
        dir.path(),
        "same.csv",
        "rate_L/s,drawdown_m\n5,0.98\n5,1.10\n15,3.21\n",
    );
    let v = json_of(&["steptest", f.to_str().unwrap(), "--json"]);
    let w = warnings_of(&v);
    assert_eq!(w[0].0, "repeated_rate", "{w:?}");
    assert!(
        w[0].1.contains("steps 1 and 2 share the rate 5.000 L/s"),
        "{}",
        w[0].1
    );
    let f = write(
        dir.path(),
        "down.csv",
        "rate_L/s,drawdown_m\n5,0.98\n10,2.05\n7.5,1.5\n",
    );
    let out = boreflux().arg("steptest").arg(&f).output().unwrap();
    assert!(out.status.success());
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(
        text.contains("step 3 is pumped at 7.500 L/s, below the 10.00 L/s of step 2"),
        "{text}"
    );
    // The demo steps (increasing rates, C > 0) raise none.
    let demo = cases_dir().join("step-tests/demo-steps.csv");
    let v = json_of(&["steptest", demo.to_str().unwrap(), "--json"]);
    assert_eq!(v["warnings"], serde_json::json!([]), "{}", v["warnings"]);
}

/// `--at` needs a unit: a plain number is refused (exit 2) with the option named and an
/// example. A time before the readings fitted is warned about: the demo series has 60-min
/// steps read every 5 min and a quarter of each step skipped, so the earliest reading
/// fitted is 15 min into its step; 30 s lies before it. The time is used as given.
#[test]
fn steptest_at_needs_a_unit_and_a_time_within_the_readings() {
    let demo = cases_dir().join("step-tests/demo-series.csv");
    let d = demo.to_str().unwrap();
    let e = stderr_of_failure(&["steptest", d, "--at", "30"], 2);
    assert!(
        e.contains("--at") && e.contains("has no unit") && e.contains("\"60 min\""),
        "{e}"
    );
    let v = json_of(&["steptest", d, "--json", "--at", "30 s"]);
    assert_eq!(v["series"]["reference_time_s"].as_f64(), Some(30.0));
    let w = warnings_of(&v);
    assert_eq!(w.len(), 1, "{w:?}");
    assert_eq!(w[0].0, "reference_time_outside_data");
    assert!(
        w[0].1
            .contains("--at 0.5000 min is earlier than any reading fitted")
            && w[0].1.contains("15.00 min into its step"),
        "{}",
        w[0].1
    );
    // Later than the whole test (four 60-min steps).
    let v = json_of(&["steptest", d, "--json", "--at", "5 h"]);
    assert!(
        warnings_of(&v)[0]
            .1
            .contains("later than the last reading (240.0 min"),
        "{}",
        v["warnings"]
    );
    // Inside the readings: nothing to say.
    let v = json_of(&["steptest", d, "--json", "--at", "30 min"]);
    assert_eq!(v["warnings"], serde_json::json!([]), "{}", v["warnings"]);
}

/// `--at` and `--skip` act on a time series only: on a file of one row per step (and with
/// `--method jacob`) they are accepted with a warning that they have no effect, and the fit
/// is that without them.
#[test]
fn steptest_options_without_effect_are_warned() {
    let steps = cases_dir().join("step-tests/demo-steps.csv");
    let s = steps.to_str().unwrap();
    let plain = json_of(&["steptest", s, "--json"]);
    let v = json_of(&["steptest", s, "--json", "--at", "30 min", "--skip", "0.9"]);
    assert_eq!(v["B"], plain["B"]);
    assert_eq!(v["C"], plain["C"]);
    let w = warnings_of(&v);
    assert_eq!(w.len(), 2, "{w:?}");
    assert!(w.iter().all(|x| x.0 == "option_without_effect"));
    assert!(
        w[0].1
            .starts_with("--skip 0.9 has no effect on a file of one row per step"),
        "{}",
        w[0].1
    );
    assert!(
        w[1].1
            .starts_with("--at 30.00 min has no effect on a file of one row per step"),
        "{}",
        w[1].1
    );
    let out = boreflux()
        .args(["steptest", s, "--skip", "0.9"])
        .output()
        .unwrap();
    assert!(out.status.success());
    assert!(String::from_utf8_lossy(&out.stdout).contains("--skip 0.9 has no effect"));
    let series = cases_dir().join("step-tests/demo-series.csv");
    let v = json_of(&[
        "steptest",
        series.to_str().unwrap(),
        "--json",
        "--method",
        "jacob",
        "--skip",
        "0.4",
    ]);
    assert!(
        warnings_of(&v)[0]
            .1
            .contains("has no effect with --method jacob"),
        "{}",
        v["warnings"]
    );
}
