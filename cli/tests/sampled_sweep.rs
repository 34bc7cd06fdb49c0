//! End-to-end tests of sampled sweeps (`boreflux sweep --sample`): shards merged equal the
//! unsharded run bit for bit (CSV bytes and every HDF5 dataset), the Latin-hypercube
//! stratification survives into the table, refusals name the bad input (exit 2), and the
//! GNU parallel recipe of docs/sweeps.md runs and merges.

mod common;

use common::{
    boreflux, cases_dir, linear_case, merge, repo_dir, run_sweep, shortened_case,
    sweep_whole_and_shards, write,
};
use hdf5::types::VarLenUnicode;
use std::path::{Path, PathBuf};

const SAMPLE: [&str; 4] = [
    "--sample",
    "drive.amplitude=uniform(0.5 m, 1.5 m)",
    "--sample",
    "pack.conductivity=lognormal(8e-3 m/s, 0.5, min=1e-3 m/s, max=5e-2 m/s)",
];

/// The linear well of the common helpers for 4 cycles at fixed steps, so each scenario is
/// a pure function of its inputs.
fn write_case(dir: &Path) -> PathBuf {
    let case = linear_case(
        r#""4 cycles""#,
        r#"{ "steps_per_cycle": 40, "scheme": "theta" }"#,
    );
    write(dir, "linear.json", &case)
}

/// The page `boreflux report TABLE` writes beside the table (`mc.html`).
fn report_page(table: &Path) -> String {
    let html = table.with_file_name("mc.html");
    boreflux()
        .arg("report")
        .arg(table)
        .arg("-o")
        .arg(&html)
        .assert()
        .success();
    std::fs::read_to_string(&html).unwrap()
}

/// Every dataset below `group`, by path, as raw bytes of its values (text as UTF-8).
fn datasets(file: &hdf5::File, group: &str, out: &mut Vec<(String, Vec<u8>)>) {
    let g = file.group(group).unwrap();
    for name in g.member_names().unwrap() {
        let path = format!("{group}/{name}");
        if let Ok(d) = file.dataset(&path) {
            let bytes = if let Ok(v) = d.read_raw::<f64>() {
                v.iter().flat_map(|x| x.to_bits().to_le_bytes()).collect()
            } else if let Ok(v) = d.read_raw::<u64>() {
                v.iter().flat_map(|x| x.to_le_bytes()).collect()
            } else {
                let v = d.read_raw::<VarLenUnicode>().unwrap();
                v.iter()
                    .flat_map(|s| s.as_str().bytes().chain([0]))
                    .collect()
            };
            out.push((path, bytes));
        } else {
            datasets(file, &path, out);
        }
    }
}

fn all_datasets(path: &Path) -> Vec<(String, Vec<u8>)> {
    let f = hdf5::File::open(path).unwrap();
    let mut out = Vec::new();
    datasets(&f, "/table", &mut out);
    out
}

#[test]
fn sampled_shards_merge_into_the_unsharded_table_bit_for_bit() {
    let dir = tempfile::tempdir().unwrap();
    let case = write_case(dir.path());
    let mut args = SAMPLE.to_vec();
    args.extend(["--samples", "7", "--seed", "20261204", "-j", "2"]);
    let parts = sweep_whole_and_shards(dir.path(), &case, &args, 3);
    merge(&parts, &dir.path().join("merged")).success();
    let read = |n: &str| std::fs::read(dir.path().join(n)).unwrap();
    assert_eq!(read("merged.csv"), read("whole.csv"));
    let (m, w) = (
        all_datasets(&dir.path().join("merged.h5")),
        all_datasets(&dir.path().join("whole.h5")),
    );
    assert!(m.len() > 10, "{} datasets", m.len());
    assert_eq!(m, w);
    // A shard of another seed is another sample: merge refuses it.
    let mut args = SAMPLE.to_vec();
    args.extend(["--samples", "7", "--seed", "1", "--shard", "3/3"]);
    run_sweep(&case, &dir.path().join("other"), &args);
    let mixed = [
        parts[0].clone(),
        parts[1].clone(),
        dir.path().join("other.h5"),
    ];
    let out = merge(&mixed, &dir.path().join("mixed")).code(2);
    let err = String::from_utf8_lossy(&out.get_output().stderr).to_string();
    assert!(err.contains("sample design, count or seed differ"), "{err}");
}

#[test]
fn the_table_holds_a_latin_hypercube_of_the_inputs() {
    // Each of the N equal-probability strata of every input holds one scenario (McKay,
    // Beckman & Conover 1979, Technometrics 21(2), the defining property), read back from
    // the table's SI values through each distribution's CDF: (x − A)/(B − A) for the
    // uniform; Φ(ln(x/median)/SDLN) rescaled to the bounds for the truncated log-normal,
    // with Φ from erfc (Abramowitz & Stegun 26.2.29, from memory — verify).
    let dir = tempfile::tempdir().unwrap();
    let case = write_case(dir.path());
    let n = 12;
    let samples = n.to_string();
    let mut args = SAMPLE.to_vec();
    args.extend(["--samples", &samples, "--seed", "3"]);
    run_sweep(&case, &dir.path().join("lhs"), &args);
    let f = hdf5::File::open(dir.path().join("lhs.h5")).unwrap();
    let read = |p: &str| f.dataset(p).unwrap().read_raw::<f64>().unwrap();
    let amp = read("/table/vary_value/drive.amplitude");
    let k = read("/table/vary_value/pack.conductivity");
    let phi = |z: f64| 0.5 * libm::erfc(-z / 2f64.sqrt());
    let (ka, kb) = (
        phi((1e-3f64 / 8e-3).ln() / 0.5),
        phi((5e-2f64 / 8e-3).ln() / 0.5),
    );
    let strata = |u: Vec<f64>| {
        let mut s: Vec<usize> = u.iter().map(|u| (u * n as f64).floor() as usize).collect();
        s.sort_unstable();
        s
    };
    let all: Vec<usize> = (0..n).collect();
    assert_eq!(strata(amp.iter().map(|x| (x - 0.5) / 1.0).collect()), all);
    assert_eq!(
        strata(
            k.iter()
                .map(|x| (phi((x / 8e-3).ln() / 0.5) - ka) / (kb - ka))
                .collect()
        ),
        all
    );
    let attr = |name: &str| {
        f.attr(name)
            .unwrap()
            .read_scalar::<VarLenUnicode>()
            .unwrap()
            .as_str()
            .to_owned()
    };
    assert_eq!(
        attr("sampling_json"),
        r#"{"design":"lhs","samples":12,"seed":3}"#
    );
    assert!(attr("vary_json").contains(r#""distribution":"uniform(0.5 m, 1.5 m)""#));
}

#[test]
fn bad_sampled_sweeps_name_the_input_and_write_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let case = write_case(dir.path());
    let refuse = |args: &[&str], want: &str| {
        let out = boreflux()
            .arg("sweep")
            .arg(&case)
            .args(["-q", "-o"])
            .arg(dir.path().join("bad"))
            .args(args)
            .assert()
            .code(2);
        let err = String::from_utf8_lossy(&out.get_output().stderr).to_string();
        assert!(err.contains(want), "{args:?}: {err}");
        assert!(!dir.path().join("bad.csv").exists() && !dir.path().join("bad.h5").exists());
    };
    let s = ["--samples", "4", "--seed", "1"];
    refuse(
        &[&s[..], &["--sample", "drive.amplitude=normal(1 m, 2 ft)"]].concat(),
        "--sample drive.amplitude: the numbers of one distribution need one unit",
    );
    refuse(
        &[&s[..], &["--sample", "drive.amplitude=weibull(1, 2)"]].concat(),
        "unknown distribution `weibull`",
    );
    // A normal of a positive quantity without a lower bound: the case loader refuses the
    // negative draws, scenario by scenario, before anything runs.
    refuse(
        &[
            &s[..],
            &[
                "--sample",
                "pack.porosity=normal(0.3, 2)",
                "--design",
                "random",
            ],
        ]
        .concat(),
        "pack.porosity",
    );
    refuse(
        &[
            "--sample",
            "drive.amplitude=uniform(1 m, 2 m)",
            "--samples",
            "3",
        ],
        "--seed:",
    );
    refuse(
        &[
            "--vary",
            "drive.amplitude=1,2",
            "--sample",
            "drive.frequency=uniform(1, 2)",
        ],
        "cannot be used with",
    );
}

#[test]
fn a_scenarios_key_series_match_its_run_file() {
    // The key series of a sweep row against `boreflux run` of the same case: the run's
    // /series (skin at each step), /progress (the same virtual-test estimate, there every
    // 1/100 of the run) and /cycles (per-cycle peaks). A shipped case with a cake, so the
    // skin and specific capacity change during the run.
    let dir = tempfile::tempdir().unwrap();
    let case = cases_dir().join("domestic-fine-sand-pvc.json");
    run_sweep(
        &case,
        &dir.path().join("one"),
        &["--vary", "duration=3 min"],
    );
    boreflux()
        .arg("run")
        .arg(&case)
        .args(["-q", "-o"])
        .arg(dir.path().join("run.h5"))
        .assert()
        .success();
    let t = hdf5::File::open(dir.path().join("one.h5")).unwrap();
    let r = hdf5::File::open(dir.path().join("run.h5")).unwrap();
    let read = |f: &hdf5::File, p: &str| f.dataset(p).unwrap().read_raw::<f64>().unwrap();
    let grid = read(&t, "/table/series/run_fraction");
    assert_eq!(grid.len(), 51);
    let time = read(&t, "/table/series/time");
    let skin = read(&t, "/table/series/skin");
    let sc = read(&t, "/table/series/specific_capacity");
    let out = read(&t, "/table/series/peak_outward_flux");
    let (rt, rs) = (read(&r, "/series/time"), read(&r, "/series/skin"));
    let (pt, psc) = (
        read(&r, "/progress/time"),
        read(&r, "/progress/specific_capacity"),
    );
    let (ce, cp) = (
        read(&r, "/cycles/end_time"),
        read(&r, "/cycles/peak_outward_flux"),
    );
    let end = *rt.last().unwrap();
    let mut matched = 0;
    for k in 1..51 {
        // The first step at or after k/50 of the run (less 1e-9 of the run for round-off).
        let i = rt
            .iter()
            .position(|&x| x >= end * (grid[k] - 1e-9))
            .unwrap();
        assert_eq!(time[k], rt[i], "time at k = {k}");
        assert_eq!(skin[k], rs[i], "skin at k = {k}");
        // The run's progress point at the same time, where it has one.
        if let Some(j) = pt.iter().position(|&x| x == time[k]) {
            assert_eq!(sc[k], psc[j], "specific capacity at k = {k}");
            matched += 1;
        }
        // The largest peak of the cycles ending in the interval.
        let lo = end * grid[k - 1];
        let want = ce
            .iter()
            .zip(&cp)
            .filter(|(&e, _)| e > lo && ((e / end) * 50.0).ceil() as usize == k)
            .map(|(_, &p)| p)
            .fold(f64::NAN, f64::max);
        assert!(
            out[k] == want || (out[k].is_nan() && want.is_nan()),
            "peak outward flux at k = {k}: {} vs {want}",
            out[k]
        );
    }
    // The run's /progress takes strictly the first step at or after each of its times, so
    // where a step ends a round-off short of a grid time it takes the next one and the two
    // grids differ by a step; about half the points coincide (28 of 50 on this case).
    assert!(matched >= 20, "{matched} progress points matched");
    assert!(
        skin[50] < skin[0],
        "the cake came off: skin {} -> {}",
        skin[0],
        skin[50]
    );
}

#[test]
fn a_sampled_sweep_report_shows_bands_distributions_and_the_collapse_probability() {
    let dir = tempfile::tempdir().unwrap();
    let case = write_case(dir.path());
    let out = dir.path().join("mc");
    let mut args = SAMPLE.to_vec();
    args.extend(["--samples", "9", "--seed", "4"]);
    run_sweep(&case, &out, &args);
    let page = report_page(&out.with_extension("h5"));
    for want in [
        "9 scenarios drawn by Latin hypercube, seed 4",
        "<code>drive.amplitude</code> ~ <code>uniform(0.5 m, 1.5 m)</code>",
        "Hyndman &amp; Fan 1996, definition 7",
        "Headline figures across the scenarios",
        "Key series: P10, P50 and P90",
        "manufacturer",
        "Peak collapse load: distribution across the scenarios",
    ] {
        assert!(page.contains(want), "missing: {want}");
    }
    // This demo case has no collapse rating: the page says so instead of a probability.
    assert!(page.contains("No scenario has a collapse margin"));
}

#[test]
fn the_collapse_probability_counts_the_tables_margins() {
    // A shipped case with a PVC casing (so a collapse rating and margin), one minute long.
    let dir = tempfile::tempdir().unwrap();
    let case = shortened_case(
        dir.path(),
        "domestic-fine-sand-pvc.json",
        "1 min",
        "short.json",
    );
    let out = dir.path().join("mc");
    run_sweep(
        &case,
        &out,
        &[
            "--sample",
            "cake.thickness=triangular(2 mm, 4 mm, 8 mm)",
            "--samples",
            "6",
            "--seed",
            "2",
        ],
    );
    let f = hdf5::File::open(out.with_extension("h5")).unwrap();
    let m = f
        .dataset("/table/collapse_margin")
        .unwrap()
        .read_raw::<f64>()
        .unwrap();
    let n = m.iter().filter(|x| x.is_finite()).count();
    let k = m.iter().filter(|&&x| x < 1.0).count();
    assert_eq!(n, 6, "every scenario has a margin: {m:?}");
    let page = report_page(&out.with_extension("h5"));
    let want = format!("Probability that the collapse margin is below 1: {k} of {n} scenarios");
    assert!(page.contains(&want), "missing: {want}");
    assert!(page.contains("Wilson score interval"));
}

#[test]
fn the_gnu_parallel_recipe_runs_shards_that_merge_into_the_whole() {
    // examples/sampled-sweep-parallel.sh, as docs/sweeps.md gives it. GNU parallel comes
    // from the distribution's packages (scripts/setup-deps.sh installs it); without it the
    // test is skipped, except in CI, where it fails.
    let found = std::process::Command::new("parallel")
        .arg("--version")
        .output()
        .is_ok_and(|o| String::from_utf8_lossy(&o.stdout).contains("GNU parallel"));
    if !found {
        assert!(
            std::env::var("CI").as_deref() != Ok("true"),
            "GNU parallel is not installed in CI: scripts/setup-deps.sh installs it"
        );
        eprintln!(
            "SKIPPED the_gnu_parallel_recipe_runs_shards_that_merge_into_the_whole: GNU \
             parallel is not installed (scripts/setup-deps.sh installs it)"
        );
        return;
    }
    let dir = tempfile::tempdir().unwrap();
    let case = write_case(dir.path());
    let spec = dir.path().join("mc.json");
    std::fs::write(
        &spec,
        r#"{"design": "random", "samples": 5, "seed": 8, "inputs": [
            {"path": "drive.amplitude", "distribution": "normal(1 m, 0.2 m, min=0.2 m)"},
            {"path": "pack.conductivity", "distribution": "loguniform(2e-3 m/s, 2e-2 m/s)"}]}"#,
    )
    .unwrap();
    let script = repo_dir().join("examples/sampled-sweep-parallel.sh");
    let shards = dir.path().join("shards");
    // Captured (the harness does not capture a child's inherited stdout), shown on failure.
    let o = std::process::Command::new("bash")
        .arg(&script)
        .arg(&case)
        .arg(&shards)
        .arg("3")
        .arg(&spec)
        .env("BOREFLUX", assert_cmd::cargo::cargo_bin("boreflux"))
        .output()
        .unwrap();
    assert!(
        o.status.success(),
        "{}\n--- stdout\n{}\n--- stderr\n{}",
        o.status,
        String::from_utf8_lossy(&o.stdout),
        String::from_utf8_lossy(&o.stderr)
    );
    boreflux()
        .arg("sweep")
        .arg(&case)
        .args(["-q", "-o"])
        .arg(dir.path().join("whole"))
        .arg("--sample-file")
        .arg(&spec)
        .assert()
        .success();
    let read = |p: PathBuf| std::fs::read(p).unwrap();
    assert_eq!(
        read(shards.join("all.csv")),
        read(dir.path().join("whole.csv"))
    );
    assert_eq!(
        all_datasets(&shards.join("all.h5")),
        all_datasets(&dir.path().join("whole.h5"))
    );
}
