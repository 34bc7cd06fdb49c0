//! `boreflux report` through the library: run files are built here with the `hdf5` crate
//! following the documented layout (docs/formats.md "HDF5 layout"), so these tests do not depend
//! on the solver. All run data below are invented test data, not results of any well.

mod common;

use std::path::{Path, PathBuf};
use std::str::FromStr;

use boreflux::report::write_report;
use boreflux_solver::safety::CAUTION;
use common::dir_entries;
use hdf5::types::VarLenUnicode;
use hdf5::{File, Group, Location};
use ndarray::Array2;

/// Grid cells of the test runs.
const CELLS: usize = 12;
/// Steps of the long test run: enough that drawing every point would be far too big.
const LONG_STEPS: usize = 100_000;

/// What to write; `omit` leaves one dataset out, `units_of` overrides one unit.
struct Spec<'a> {
    title: &'a str,
    steps: usize,
    cycles: usize,
    omit: Option<&'a str>,
    units_of: Option<(&'a str, &'a str)>,
    truncate: Option<&'a str>,
    warnings: &'a str,
    /// The resolved case (`case_json`); `None` for the default below.
    case_json: Option<&'a str>,
}

impl Default for Spec<'_> {
    fn default() -> Self {
        Spec {
            title: "Test run",
            steps: 2_000,
            cycles: 5,
            omit: None,
            units_of: None,
            truncate: None,
            warnings: "",
            case_json: None,
        }
    }
}

fn set_str(loc: &Location, name: &str, value: &str) {
    let v = VarLenUnicode::from_str(value).unwrap();
    loc.new_attr::<VarLenUnicode>()
        .create(name)
        .unwrap()
        .write_scalar(&v)
        .unwrap();
}

fn set_f64(loc: &Location, name: &str, value: f64) {
    loc.new_attr::<f64>()
        .create(name)
        .unwrap()
        .write_scalar(&value)
        .unwrap();
}

fn group(file: &File, path: &str) -> Group {
    let mut g: Group = (**file).clone();
    for part in path.split('/').filter(|p| !p.is_empty()) {
        g = if g.link_exists(part) {
            g.group(part).unwrap()
        } else {
            g.create_group(part).unwrap()
        };
    }
    g
}

/// Writes a dataset with `units` and `description`, unless the spec omits it.
fn put<T: hdf5::H5Type>(file: &File, spec: &Spec, path: &str, data: &[T], units: &str) {
    if spec.omit == Some(path) {
        return;
    }
    let (parent, name) = path.rsplit_once('/').unwrap();
    let data = if spec.truncate == Some(path) {
        &data[1..]
    } else {
        data
    };
    let ds = group(file, parent)
        .new_dataset_builder()
        .with_data(data)
        .create(name)
        .unwrap();
    let units = match spec.units_of {
        Some((p, u)) if p == path => u,
        _ => units,
    };
    set_str(&ds, "units", units);
    set_str(&ds, "description", "invented test data");
}

/// The resolved case of the test runs (invented test data).
const CASE_JSON: &str = r#"{"title":"t","well":{"screen_radius":0.1,"screen_length":6.0,"open_area":0.12,"material":"pvc <DR 21>"},"pack":{"outer_radius":0.2,"porosity":0.32,"d50":0.0016},"drive":{"kind":"sine_head","amplitude":1.5,"frequency":0.5},"duration":1000.0,"numerics":{"cells":"auto","scheme":"theta","theta":0.5}}"#;

/// A small run file in the layout `boreflux run` writes.
fn write_run(path: &Path, spec: &Spec) {
    let file = File::create(path).unwrap();
    set_str(&file, "tool_version", "0.1.0");
    set_str(&file, "created_utc", "2025-01-01T00:00:00Z");
    set_str(&file, "title", spec.title);
    set_str(
        &file,
        "description",
        "Invented <script>alert(1)</script> test data.",
    );
    set_str(&file, "case_json", spec.case_json.unwrap_or(CASE_JSON));
    set_str(&file, "case_file", "cases/test.json");

    // Grid: faces from 0.1 m to 10 m, geometric; 3 pack, 2 invaded, 7 formation cells.
    let r_face: Vec<f64> = (0..=CELLS)
        .map(|i| 0.1 * 100f64.powf(i as f64 / CELLS as f64))
        .collect();
    let r_center: Vec<f64> = r_face.windows(2).map(|w| (w[0] * w[1]).sqrt()).collect();
    let zone: Vec<f64> = (0..CELLS)
        .map(|i| match i {
            0..=2 => 1.0,
            3..=4 => 3.0,
            _ => 4.0,
        })
        .collect();
    put(&file, spec, "grid/r_center", &r_center, "m");
    put(&file, spec, "grid/r_face", &r_face, "m");
    put(&file, spec, "grid/zone", &zone, "1");

    let n = spec.steps;
    let dt = 1_000.0 / n as f64;
    let time: Vec<f64> = (1..=n).map(|i| i as f64 * dt).collect();
    let w = 2.0 * std::f64::consts::PI * 0.5;
    let col = |f: &dyn Fn(f64) -> f64| -> Vec<f64> { time.iter().map(|&t| f(t)).collect() };
    put(&file, spec, "series/time", &time, "s");
    put(
        &file,
        spec,
        "series/well_head",
        &col(&|t| 1.5 * (w * t).sin()),
        "m",
    );
    put(
        &file,
        spec,
        "series/screen_flow",
        &col(&|t| 0.01 * (w * t).cos()),
        "m3/s",
    );
    put(
        &file,
        spec,
        "series/face_flux",
        &col(&|t| 1.5e-3 * (w * t).cos()),
        "m/s",
    );
    put(
        &file,
        spec,
        "series/shear_proxy",
        &col(&|t| 0.02 * (w * t).cos().abs()),
        "Pa",
    );
    let cake = |t: f64| 2e-3 * (-t / 500.0).exp();
    put(&file, spec, "series/cake_thickness", &col(&cake), "m");
    put(&file, spec, "series/skin", &col(&|t| 2.5e3 * cake(t)), "1");
    for (k, zone) in ["screen", "pack", "cake", "invaded", "formation"]
        .iter()
        .enumerate()
    {
        let rate = 10f64.powi(k as i32 - 3);
        put(
            &file,
            spec,
            &format!("series/work/{zone}"),
            &col(&|t| rate * t),
            "J",
        );
    }

    let c = spec.cycles;
    let index: Vec<u64> = (0..c as u64).collect();
    let per = |v: f64| vec![v; c];
    let starts: Vec<f64> = (0..c).map(|k| 2.0 * k as f64).collect();
    let ends: Vec<f64> = starts.iter().map(|s| s + 2.0).collect();
    put(&file, spec, "cycles/index", &index, "1");
    put(&file, spec, "cycles/start_time", &starts, "s");
    put(&file, spec, "cycles/end_time", &ends, "s");
    put(&file, spec, "cycles/peak_outward_flux", &per(1.5e-3), "m/s");
    put(&file, spec, "cycles/peak_inward_flux", &per(1.4e-3), "m/s");
    put(&file, spec, "cycles/rms_face_flux", &per(1.0e-3), "m/s");
    put(&file, spec, "cycles/peak_shear", &per(0.02), "Pa");
    put(&file, spec, "cycles/work_cake", &per(0.5), "J");
    put(&file, spec, "cycles/cake_removed", &per(1e-5), "m");

    let snap_t = [time[0], time[n / 2], time[n - 1]];
    let heads = Array2::from_shape_fn((3, CELLS), |(s, i)| {
        (s as f64 - 1.0) * (r_face[CELLS] / r_center[i]).ln() / 10.0
    });
    put(&file, spec, "snapshots/time", &snap_t, "s");
    if spec.omit != Some("snapshots/head") {
        let ds = group(&file, "snapshots")
            .new_dataset_builder()
            .with_data(&heads)
            .create("head")
            .unwrap();
        set_str(&ds, "units", "m");
    }

    if spec.omit != Some("summary") {
        let s = group(&file, "summary");
        for (name, v) in [
            ("peak_outward_flux_m_s", 1.5e-3),
            ("peak_inward_flux_m_s", 1.4e-3),
            ("peak_outward_pore_velocity_m_s", 4.7e-3),
            ("peak_inward_pore_velocity_m_s", 4.4e-3),
            ("rms_face_flux_m_s", 1.0e-3),
            ("peak_shear_pa", 0.02),
            ("work_screen_j", 1.0),
            ("work_pack_j", 10.0),
            ("work_cake_j", 100.0),
            ("work_invaded_j", 1_000.0),
            ("work_formation_j", 10_000.0),
            ("cake_thickness_start_m", 2e-3),
            ("cake_thickness_end_m", 2.7e-4),
            ("skin_start", 5.0),
            ("skin_end", 0.68),
            ("efficiency_start", 0.6),
            ("efficiency_end", 0.9),
            ("specific_capacity_start_m2_s", 1e-3),
            ("specific_capacity_end_m2_s", 1.5e-3),
            ("peak_slot_velocity_m_s", 0.045),
            ("peak_grain_reynolds", 0.8),
            ("peak_collapse_pressure_pa", 15e3),
            ("collapse_rating_pa", 810e3),
            ("screen_collapse_rating_pa", 405e3),
            // Screen: 405 kPa / (2 × 15 kPa); casing: 810 kPa / (2 × 1.5 m × 9.80665 m/s² ×
            // 1000 kg/m³) (hand arithmetic); the lower governs.
            ("screen_collapse_margin", 13.5),
            ("casing_collapse_margin", 27.53),
            ("collapse_margin", 13.5),
            ("energy_closure", 1e-9),
            ("max_mass_residual", 1e-10),
            ("cells", CELLS as f64),
            ("steps", n as f64),
            ("cycles", c as f64),
            ("outer_radius_m", 10.0),
            ("end_time_s", 1_000.0),
            ("mystery_volume_m3", 2.0),
            ("peak_in_well_drawdown_m", 1.5),
            ("piping_ratio", 2.5),
            ("cake_removal_time_s", 600.0),
            ("skin_cake_start", 4.0),
            ("skin_cake_end", 0.3),
            ("grain_critical_velocity_m_s", 0.0133),
            ("peak_wall_interstitial_velocity_m_s", 8.23e-3),
            ("column_partings", 16.0),
        ] {
            set_f64(&s, name, v);
        }
        set_str(&s, "warnings", spec.warnings);
        set_str(&s, "cautions", CAUTION);
        set_str(
            &s,
            "notes",
            "jet: 1-D approximation <test>\nwell.efficiency: 0.5 assumed",
        );
        set_str(
            &s,
            "efficiency_definition",
            "ideal over actual drawdown (test text)",
        );
    }
}

/// The `d` attributes of all `<path>` elements: number of points in each.
fn path_points(html: &str) -> Vec<usize> {
    html.split(" d=\"")
        .skip(1)
        .map(|rest| rest.split('"').next().unwrap().matches(['M', 'L']).count())
        .collect()
}

fn report_of(dir: &Path, runs: &[PathBuf]) -> String {
    let out = dir.join("report.html");
    write_report(runs, &out).unwrap_or_else(|e| panic!("{e}"));
    std::fs::read_to_string(out).unwrap()
}

#[test]
fn report_has_figures_cautions_units_and_escaped_text() {
    let dir = tempfile::tempdir().unwrap();
    let run = dir.path().join("run.h5");
    write_run(
        &run,
        &Spec {
            title: "Surge <test> & \"quotes\"",
            steps: LONG_STEPS,
            warnings: "first warning\nsecond <warning> & more\n",
            ..Spec::default()
        },
    );
    let html = report_of(dir.path(), &[run]);
    assert_eq!(
        dir_entries(dir.path()),
        ["report.html", "run.h5"],
        "no temporary file left"
    );

    // Self-contained: no scripts, no external resources.
    assert!(html.starts_with("<!DOCTYPE html>"));
    assert!(!html.contains("<script"), "file text must be escaped");
    assert!(html.contains("Invented &lt;script&gt;alert(1)&lt;/script&gt; test data."));
    for external in ["src=", "href=", "<link", "@import", "url(http"] {
        assert!(!html.contains(external), "external resource: {external}");
    }

    // Title escaped, cautions and warnings shown.
    assert!(html.contains("Surge &lt;test&gt; &amp; &quot;quotes&quot;"));
    // The model's notes (defaults and approximations, as `check` prints them) listed, escaped.
    assert!(html.contains("<h2>Model assumptions: defaults and approximations</h2>"));
    assert!(html.contains("<li>jet: 1-D approximation &lt;test&gt;</li>"));
    assert!(html.contains("<li>well.efficiency: 0.5 assumed</li>"));
    assert!(!html.contains("Surge <test>"));
    assert!(html.contains(&CAUTION.replace('\'', "&#39;")));
    assert!(html.contains("<li>second &lt;warning&gt; &amp; more</li>"));
    assert!(html.contains("Warnings (2)"));
    assert!(html.contains("ideal over actual drawdown (test text)"));

    // One or more inline SVG charts in every figure.
    let figures: Vec<&str> = html.split("<figure>").skip(1).collect();
    assert_eq!(
        figures.len(),
        7,
        "head/flow, flux, shear, work, cake/skin, cycles, profiles"
    );
    for f in &figures {
        let f = f.split("</figure>").next().unwrap();
        assert!(
            f.contains("<svg"),
            "figure without a chart: {}",
            &f[..80.min(f.len())]
        );
    }
    for title in [
        "In-well head",
        "Flow through the screen",
        "Darcy flux at the borehole wall",
        "Shear proxy",
        "Cumulative work per zone, run A",
        "Cake thickness",
        "Skin",
        "Peak outward flux per cycle",
        "Head against radius, run A",
    ] {
        assert!(html.contains(&format!(">{title}")), "missing chart {title}");
    }
    assert!(html.contains("borehole wall r_b"));

    // 100 000 steps per series, yet every line is decimated and the page stays small.
    let points = path_points(&html);
    assert!(points.iter().all(|&n| n <= 2_000), "{points:?}");
    assert!(
        points.iter().any(|&n| n > 500),
        "long series still drawn: {points:?}"
    );
    assert!(html.len() < 600_000, "report is {} bytes", html.len());

    // Units: SI with US in brackets. The conversions are exact by definition (NIST SP 811,
    // 2008, Appendix B): 810 kPa / 6894.757 Pa/psi = 117.48 psi.
    assert!(html.contains("810 kPa (117 psi)"));
    // Each element's collapse rating sits beside the margin computed from it, then the
    // lower margin (the values of the file's `/summary`, above).
    let cell = |label: &str| -> String {
        let at = html.find(label).unwrap_or_else(|| panic!("no row {label}"));
        let td = &html[at..];
        let td = &td[td.find("<td").unwrap()..];
        td[td.find('>').unwrap() + 1..td.find("</td>").unwrap()].to_owned()
    };
    assert_eq!(cell("Collapse rating of the screen<"), "405 kPa (58.7 psi)");
    assert_eq!(cell("Screen collapse margin: "), "13.5");
    assert_eq!(
        cell("Collapse rating of the blank casing<"),
        "810 kPa (117 psi)"
    );
    assert_eq!(cell("Casing collapse margin: "), "27.5");
    assert_eq!(cell("Collapse margin, the lower of"), "13.5");
    // The gradient ratio is a figure, not a warning (docs/physics.md §9e): shown, not flagged.
    assert_eq!(cell("Wall gradient ÷ Terzaghi"), "2.50");
    assert!(!html.contains(r#"<td class="flag">2.50</td>"#));
    // Removal by the cake's skin (lift-off opens the wall without thinning it) beside the
    // thickness-based times.
    assert_eq!(cell("Cake removal time: the cake"), "600 s (10.0 min)");
    assert_eq!(cell("Skin of the cake, start"), "4.00 → 0.300");
    assert!(html.contains("across the screen only"));
    // 1.5e-3 m/s × 86400 s/d × 0.3048² m²/ft² / 3.785411784e-3 m³/gal = 3180.7 gpd/ft².
    assert!(html.contains("1.50 mm/s (3181 gpd/ft²)"));
    assert!(html.contains("1.00 → 1.50 L/s/m (4.83 → 7.25 gpm/ft)"));
    assert!(html.contains("2.00 → 0.270 mm (0.0787 → 0.0106 in)"));
    assert!(
        html.contains("Time [min]") && html.contains("Head [ft]") && html.contains("Flow [gpm]")
    );
    assert!(html.contains("0.100 m (0.328 ft)"));
    // The slot velocity is above the 0.03048 m/s rule of thumb (0.1 ft/s) and is flagged.
    assert!(html
        .contains(r#"<td class="flag">0.0450 m/s (0.148 ft/s): 1.48 × the rule, above it</td>"#));
    // Efficiency shown as a fraction and in per cent.
    assert!(html.contains("0.600 → 0.900 (60.0 % → 90.0 %)"));
    // A summary value the output schema does not know is listed by its name as a bare
    // number: its unit is not guessed from the name.
    assert!(html.contains("<code>mystery_volume_m3</code></th><td>2.00</td>"));
    // A schema figure the headline table does not show is listed with its schema unit:
    // 1.5 m / 0.3048 m/ft = 4.92 ft (NIST SP 811, 2008, Appendix B).
    assert!(html.contains("<code>peak_in_well_drawdown_m</code></th><td>1.50 m (4.92 ft)</td>"));
    // Velocities (interstitial, settling) in ft/min, not in the loading rate gpd/ft² of a
    // Darcy flux: 0.0133 m/s × 60 s/min / 0.3048 m/ft = 2.618 ft/min, 8.23e-3 m/s → 1.620
    // ft/min (NIST SP 811, 2008, Appendix B: 1 ft = 0.3048 m exactly).
    assert!(html
        .contains("<code>grain_critical_velocity_m_s</code></th><td>13.3 mm/s (2.62 ft/min)</td>"));
    assert!(html.contains(
        "<code>peak_wall_interstitial_velocity_m_s</code></th><td>8.23 mm/s (1.62 ft/min)</td>"
    ));
    // A count is a whole number.
    assert!(html.contains("<code>column_partings</code></th><td>16</td>"));
    // One run: no notice of runs on different bases.
    assert!(!html.contains("Runs on different bases"));
    // Inputs from case_json, escaped, with units.
    assert!(html.contains("pvc &lt;DR 21&gt;"));
    assert!(html.contains("1.60 mm (0.0630 in)"));
    assert!(html.contains("0.500 Hz (30.0/min)"));
}

/// Checks: `--title` (through `write_titled_report`) sets the page's title and heading,
/// escaped; without it the default heading stays.
#[test]
fn the_report_title_can_be_set_and_is_escaped() {
    let dir = tempfile::tempdir().unwrap();
    let run = dir.path().join("run.h5");
    write_run(&run, &Spec::default());
    let out = dir.path().join("titled.html");
    boreflux::report::write_titled_report(
        std::slice::from_ref(&run),
        &out,
        Some("Well 7 <east> & \"B\""),
    )
    .unwrap();
    let html = std::fs::read_to_string(&out).unwrap();
    let want = "Well 7 &lt;east&gt; &amp; &quot;B&quot;";
    assert!(html.contains(&format!("<title>{want}</title>")), "title");
    assert!(html.contains(&format!("<h1>{want}</h1>")), "heading");
    assert!(!html.contains("<east>"));
    let plain = report_of(dir.path(), &[run]);
    assert!(plain.contains("<h1>Well development simulation report</h1>"));
}

#[test]
fn two_runs_give_two_columns_and_overlaid_lines() {
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("slow.h5");
    let b = dir.path().join("fast.h5");
    write_run(
        &a,
        &Spec {
            title: "Slow surge",
            ..Spec::default()
        },
    );
    write_run(
        &b,
        &Spec {
            title: "Fast surge",
            cycles: 0,
            ..Spec::default()
        },
    );
    let html = report_of(dir.path(), &[a, b]);

    let head = html
        .split(r#"<table class="headline">"#)
        .nth(1)
        .unwrap()
        .split("</thead>")
        .next()
        .unwrap();
    assert_eq!(head.matches(r#"<th scope="col">"#).count(), 3, "{head}");
    assert!(head.contains("Run A") && head.contains("Slow surge"));
    assert!(head.contains("Run B") && head.contains("Fast surge"));
    // Every headline row has one value cell per run.
    let body = html
        .split(r#"<table class="headline">"#)
        .nth(1)
        .unwrap()
        .split("</thead>")
        .nth(1)
        .unwrap()
        .split("</table>")
        .next()
        .unwrap();
    for row in body.split("<tr>").skip(1) {
        assert_eq!(row.matches("<td").count(), 2, "{row}");
    }
    // Overlaid time series: both runs in the legend of the head chart, distinct dashes.
    let head_chart = html.split(">In-well head</text>").nth(1).unwrap();
    let head_chart = head_chart.split("</svg>").next().unwrap();
    assert!(head_chart.contains("A: Slow surge") && head_chart.contains("B: Fast surge"));
    assert!(head_chart.contains(r#"stroke-dasharray="8 4""#));
    // Run B has no cycles: the cycle log has run A's table and says why run B has none.
    let log = html.split("<h2>Cycle log</h2>").nth(1).unwrap();
    let log = log.split("<h2>").next().unwrap();
    // Cycle numbering: the file's /cycles/index starts at 0 (written above), the log's
    // first row is cycle 1, and the caption says how the two relate.
    assert!(
        log.contains("<tbody><tr><td>1</td>"),
        "first cycle is numbered 1"
    );
    assert!(log.contains("<code>/cycles/index</code> counts from 0 (cycle 1 is index 0)"));
    assert!(log.contains("Run A: Slow surge") && !log.contains("Run B: Fast surge"));
    assert!(log.contains("<p>Run B: no complete drive cycle, so no per-cycle figures."));
}

/// The text of the notice on runs compared on different bases, if the page has one.
fn bases_notice(html: &str) -> Option<String> {
    let at = html.find(r#"<section class="notice">"#)?;
    let rest = &html[at..];
    Some(rest[..rest.find("</section>").unwrap()].to_owned())
}

/// Runs whose resolved cases differ get a notice near the top naming the differing inputs
/// (at most ten, then how many more); runs of the same case get none.
#[test]
fn runs_on_different_bases_are_noticed() {
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("a.h5");
    let b = dir.path().join("b.h5");
    let c = dir.path().join("c.h5");
    write_run(&a, &Spec::default());
    // Run B: a shorter duration and a design rate of its own, as a case giving "1 min" and
    // "60 L/s" resolves them (SI); the title differs too, which is no input.
    let shorter = CASE_JSON
        .replace(r#""title":"t""#, r#""title":"other""#)
        .replace(r#""duration":1000.0"#, r#""duration":60.0"#)
        .replace(
            r#""numerics":"#,
            r#""assessment":{"design_rate":0.06},"numerics":"#,
        );
    write_run(
        &b,
        &Spec {
            case_json: Some(&shorter),
            ..Spec::default()
        },
    );
    // Run C: the same case as A, numbers written differently (1000 and 1000.0 are equal).
    let same = CASE_JSON.replace(r#""duration":1000.0"#, r#""duration":1000"#);
    write_run(
        &c,
        &Spec {
            case_json: Some(&same),
            ..Spec::default()
        },
    );
    let html = report_of(dir.path(), &[a.clone(), b.clone()]);
    let notice = bases_notice(&html).expect("a notice");
    assert!(
        notice.contains("<code>duration</code>, <code>assessment.design_rate</code> (values"),
        "{notice}"
    );
    assert!(notice.contains("work in each zone"), "{notice}");
    assert!(
        !notice.contains("title") && !notice.contains("more"),
        "{notice}"
    );
    // Above the headline table and the cautions.
    assert!(html.find("Runs on different bases") < html.find("<h2>Cautions</h2>"));
    assert!(bases_notice(&report_of(dir.path(), &[a.clone(), c])).is_none());

    // Twelve differing inputs: ten named, then "and 2 more".
    let many = (1..=12).fold(CASE_JSON.to_owned(), |j, k| {
        j.replace(
            r#""numerics":{"#,
            &format!(r#""numerics":{{"extra_{k:02}":{k},"#),
        )
    });
    write_run(
        &b,
        &Spec {
            case_json: Some(&many),
            ..Spec::default()
        },
    );
    let notice = bases_notice(&report_of(dir.path(), &[a, b])).expect("a notice");
    assert_eq!(notice.matches("<code>").count(), 10, "{notice}");
    assert!(notice.contains(" and 2 more (values"), "{notice}");
}

#[test]
fn missing_dataset_is_named_and_leaves_no_output() {
    let dir = tempfile::tempdir().unwrap();
    let good = dir.path().join("good.h5");
    let bad = dir.path().join("bad.h5");
    write_run(&good, &Spec::default());
    write_run(
        &bad,
        &Spec {
            omit: Some("series/face_flux"),
            ..Spec::default()
        },
    );
    let out = dir.path().join("report.html");
    let err = write_report(&[good, bad.clone()], &out).unwrap_err();
    assert_eq!(
        err.to_string(),
        format!("{}: missing dataset /series/face_flux", bad.display())
    );
    assert_eq!(dir_entries(dir.path()), ["bad.h5", "good.h5"]);

    // An existing report is left as it was.
    std::fs::write(&out, "old report").unwrap();
    let e = write_report(std::slice::from_ref(&bad), &out).unwrap_err();
    assert!(e.to_string().contains("/series/face_flux"), "{e}");
    assert_eq!(std::fs::read_to_string(&out).unwrap(), "old report");
    assert_eq!(
        dir_entries(dir.path()),
        ["bad.h5", "good.h5", "report.html"]
    );
}

#[test]
fn other_missing_objects_are_named() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("r.html");
    for (omit, expected) in [
        (
            "summary",
            "missing group /summary (the run may not have finished)",
        ),
        ("snapshots/head", "missing dataset /snapshots/head"),
        ("cycles/work_cake", "missing dataset /cycles/work_cake"),
        ("grid/zone", "missing dataset /grid/zone"),
    ] {
        let p = dir.path().join("x.h5");
        write_run(
            &p,
            &Spec {
                omit: Some(omit),
                ..Spec::default()
            },
        );
        let e = write_report(std::slice::from_ref(&p), &out).unwrap_err();
        assert_eq!(e.to_string(), format!("{}: {expected}", p.display()));
        std::fs::remove_file(&p).unwrap();
    }
    assert!(dir_entries(dir.path()).is_empty());
}

#[test]
fn non_boreflux_files_are_rejected() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("r.html");

    let other = dir.path().join("other.h5");
    let f = File::create(&other).unwrap();
    f.create_group("data").unwrap();
    drop(f);
    let e = write_report(std::slice::from_ref(&other), &out).unwrap_err();
    assert_eq!(
        e.to_string(),
        format!(
            "{}: not a boreflux result file (no /series/time)",
            other.display()
        )
    );

    let text = dir.path().join("notes.txt");
    std::fs::write(&text, "not hdf5").unwrap();
    let e = write_report(std::slice::from_ref(&text), &out).unwrap_err();
    let msg = e.to_string();
    assert!(
        msg.starts_with(&format!(
            "{}: not a boreflux result file (cannot open it as HDF5",
            text.display()
        )),
        "{msg}"
    );

    let missing = dir.path().join("missing.h5");
    let e = write_report(std::slice::from_ref(&missing), &out).unwrap_err();
    assert_eq!(
        e.to_string(),
        format!("{}: no such file", missing.display())
    );

    let e = write_report(&[], &out).unwrap_err();
    assert!(e.to_string().starts_with("no run files given"), "{e}");
    assert!(!out.exists());
}

#[test]
fn wrong_units_and_lengths_are_rejected() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("r.html");
    let p = dir.path().join("u.h5");
    write_run(
        &p,
        &Spec {
            units_of: Some(("series/screen_flow", "gpm")),
            ..Spec::default()
        },
    );
    let e = write_report(std::slice::from_ref(&p), &out).unwrap_err();
    assert_eq!(
        e.to_string(),
        format!(
            "{}: /series/screen_flow has units \"gpm\", the report expects \"m3/s\"",
            p.display()
        )
    );
    // A series shorter than /series/time.
    std::fs::remove_file(&p).unwrap();
    write_run(
        &p,
        &Spec {
            truncate: Some("series/skin"),
            ..Spec::default()
        },
    );
    let e = write_report(std::slice::from_ref(&p), &out).unwrap_err();
    assert_eq!(
        e.to_string(),
        format!(
            "{}: /series/skin has 1999 values but /series/time has 2000",
            p.display()
        )
    );
    // Equivalent spellings of a unit are accepted.
    std::fs::remove_file(&p).unwrap();
    write_run(
        &p,
        &Spec {
            units_of: Some(("series/screen_flow", "m³/s")),
            ..Spec::default()
        },
    );
    write_report(std::slice::from_ref(&p), &out).unwrap();
    assert!(out.exists());
}
