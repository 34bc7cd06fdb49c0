//! Every shipped case runs cleanly: Newton converges in every step, no numerical warning
//! is raised, heads, flows and work stay finite, and
//! every drive kind is used by at least one shipped case (issue #5).

mod common;

use boreflux::case::load_case;
use boreflux::output::schema::Figure;
use boreflux::summary::{assessment, headline, Tracker};
use boreflux_solver::{run, Reporting, StepObserver, StepView};
use common::{cases_dir, json_of, shipped_cases};
use std::collections::BTreeSet;

/// Tracks the headline extremes and checks every value is finite.
struct Checked {
    tracker: Tracker,
    finite: bool,
}

impl StepObserver for Checked {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        self.finite &= [
            s.well_head_m,
            s.screen_flow_m3_s,
            s.face_flux_m_s,
            s.shear_proxy_pa,
        ]
        .iter()
        .chain(&s.power_w)
        .chain(&s.work_j)
        .all(|x| x.is_finite());
        self.tracker.on_step(s)
    }
}

fn kinds(drive: &serde_json::Value, out: &mut BTreeSet<String>) {
    if let Some(k) = drive["kind"].as_str() {
        out.insert(k.to_string());
    }
    if let Some(stages) = drive["stages"].as_array() {
        for s in stages {
            kinds(&s["drive"], out);
        }
    }
}

#[test]
fn every_shipped_case_runs_cleanly() {
    let mut used = BTreeSet::new();
    for path in shipped_cases() {
        let name = path.file_name().unwrap().to_string_lossy().to_string();
        let case = load_case(&path).unwrap_or_else(|e| panic!("{name}: {e}"));
        kinds(&case.resolved["drive"], &mut used);
        let mut obs = Checked {
            tracker: Tracker::new(&case.model),
            finite: true,
        };
        let summary = run(&case.model, &mut obs, Reporting::default())
            .unwrap_or_else(|e| panic!("{name}: {e}"));
        let a = assessment(&case, &summary);
        assert!(a.is_ok(), "{name}: virtual tests failed: {a:?}");
        let h = headline(&case, &summary, &obs.tracker, &a);
        assert!(obs.finite, "{name}: non-finite values");
        // Newton converged in every step (a failure would have ended the run above); the
        // iteration count is checked against issue #4's limit in the test below.
        assert!(
            !h.warnings.iter().any(|w| w.contains("numerical")),
            "{name}: {:?}",
            h.warnings
        );
        assert!(
            summary.energy_closure <= 1e-6,
            "{name}: energy closure {}",
            summary.energy_closure
        );
        if name.starts_with("irrigation-pump") {
            // The default design rate (0.03 m/s at the screen) draws this well down far below
            // its pump's 12 m intake in the virtual test: the headline must say so.
            assert!(
                h.warnings
                    .iter()
                    .any(|w| w.contains("below the pump intake")),
                "{name}: design-rate drawdown warning missing: {:?}",
                h.warnings
            );
        }
        if name.starts_with("swab") {
            assert!(
                h.warnings.iter().any(|w| w.contains("parted")),
                "{name}: swab warning missing: {:?}",
                h.warnings
            );
        }
    }
    // Issue #5: every development drive runs on a shipped case.
    for kind in [
        "surge_block",
        "swab",
        "pump_backwash",
        "jet_pulse",
        "schedule",
        "table",
    ] {
        assert!(
            used.contains(kind),
            "no shipped case uses drive kind {kind}; used: {used:?}"
        );
    }
}

/// Issue #4 asks for Newton convergence in at most 8 iterations on every shipped case. The
/// surge-block cases are the hard ones: at stroke reversals the in-well head crosses zero on
/// the clearance and screen orifice laws (they once needed 9 and 11 iterations there).
#[test]
fn newton_converges_within_eight_iterations_on_every_shipped_case() {
    let mut worst = Vec::new();
    for path in shipped_cases() {
        let name = path.file_name().unwrap().to_string_lossy().to_string();
        let case = load_case(&path).unwrap_or_else(|e| panic!("{name}: {e}"));
        let summary = run(
            &case.model,
            &mut boreflux_solver::diagnostics::NullObserver,
            Reporting::default(),
        )
        .unwrap_or_else(|e| panic!("{name}: {e}"));
        worst.push((name, summary.max_newton_iterations));
    }
    assert!(worst.iter().all(|(_, n)| *n <= 8), "{worst:?}");
}

/// `check --annulus` simulates each width of the municipal case (it once stopped on a
/// Newton stall); the peak face flux falls as the annulus widens, since the same in-well
/// stroke then drives the flow through a longer pack path (a direction check, no value).
#[test]
fn annulus_widths_are_simulated_by_check() {
    let case = cases_dir().join("municipal-sand-gravel.json");
    let v = json_of(&[
        "check",
        case.to_str().unwrap(),
        "--annulus",
        "60mm,150mm",
        "--json",
    ]);
    let rows = v["annulus"].as_array().unwrap();
    assert_eq!(rows.len(), 2);
    let q: Vec<f64> = rows
        .iter()
        .map(|r| r["peak_face_flux_m_s"].as_f64().unwrap())
        .collect();
    assert!(
        q.iter().all(|x| x.is_finite() && *x > 0.0) && q[1] < q[0],
        "{q:?}"
    );
}

/// Issue 12: the same well reported 17.6 gpm/ft after a surge run and 12.2 gpm/ft after a
/// pump-and-backwash run, because the figures came from the run's own outer radius. The
/// before-figures of the virtual tests depend on the well only: the municipal case's well
/// under its surge block, a pump-and-backwash and a jetting drive gives the same start
/// specific capacity and efficiency within 0.1 % (they are in fact computed on the same
/// test model; the tolerance is the issue's).
#[test]
fn the_same_well_gives_the_same_before_figures_whatever_the_drive() {
    let dir = cases_dir();
    let text = std::fs::read_to_string(dir.join("municipal-sand-gravel.json")).unwrap();
    let base: serde_json::Value = serde_json::from_str(&text).unwrap();
    let pump = serde_json::json!({"kind": "pump_backwash", "ramp_cycles": 2,
        "pumping_rate": "50 L/s", "on_time": "3 min", "off_time": "2 min",
        "riser_radius": "3 in", "intake_depth": "12 m", "discharge_height": "29 m",
        "drain_time": "10 s"});
    let jet = serde_json::json!({"kind": "jet_pulse", "ramp_cycles": 5,
        "nozzle_velocity": "45 m/s", "nozzle_diameter": "8 mm", "pumping_rate": "5.2 L/s",
        "rotation_period": "30 s", "nozzles": 2, "jet_width": "10 mm"});
    let mut figures = Vec::new();
    for (label, drive, duration) in [
        (
            "surge block",
            base["drive"].clone(),
            base["duration"].clone(),
        ),
        ("pump and backwash", pump, serde_json::json!("2 cycles")),
        ("jetting", jet, serde_json::json!("1 min")),
    ] {
        let mut c = base.clone();
        c["drive"] = drive;
        c["duration"] = duration;
        let case = boreflux::case::parse_case(&c.to_string(), &dir)
            .unwrap_or_else(|e| panic!("{label}: {e}"));
        let mut obs = Checked {
            tracker: Tracker::new(&case.model),
            finite: true,
        };
        let summary = run(&case.model, &mut obs, Reporting::default()).unwrap();
        let a = assessment(&case, &summary);
        let h = headline(&case, &summary, &obs.tracker, &a);
        figures.push((
            label,
            h.get(Figure::SpecificCapacityStart)
                .expect("virtual tests ran"),
            h.get(Figure::EfficiencyStart).expect("virtual tests ran"),
        ));
    }
    let (_, sc0, e0) = figures[0];
    for &(label, sc, e) in &figures[1..] {
        assert!(
            (sc - sc0).abs() <= 1e-3 * sc0 && (e - e0).abs() <= 1e-3 * e0,
            "{label}: specific capacity {sc} vs {sc0}, efficiency {e} vs {e0}"
        );
    }
}
