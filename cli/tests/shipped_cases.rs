//! Every shipped case runs cleanly: Newton converges within 8 iterations in every step
//! (issue #4), no numerical warning is raised, heads, flows and work stay finite, and
//! every drive kind is used by at least one shipped case (issue #5).

use boreflux::case::load_case;
use boreflux::summary::{headline, Tracker};
use boreflux_solver::{run, Reporting, StepObserver, StepView};
use std::collections::BTreeSet;
use std::path::PathBuf;

fn cases() -> Vec<PathBuf> {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .expect("cases/ exists")
        .map(|e| e.expect("entry").path())
        .filter(|p| p.extension().is_some_and(|x| x == "json"))
        .collect();
    v.sort();
    v
}

/// Tracks the headline extremes and checks every value is finite.
struct Checked {
    tracker: Tracker,
    finite: bool,
}

impl StepObserver for Checked {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        self.finite &= [s.well_head_m, s.screen_flow_m3_s, s.face_flux_m_s, s.shear_proxy_pa]
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
    for path in cases() {
        let name = path.file_name().unwrap().to_string_lossy().to_string();
        let case = load_case(&path).unwrap_or_else(|e| panic!("{name}: {e}"));
        kinds(&case.resolved["drive"], &mut used);
        let mut obs = Checked { tracker: Tracker::new(&case.model), finite: true };
        let summary = run(&case.model, &mut obs, Reporting::default()).unwrap_or_else(|e| panic!("{name}: {e}"));
        let h = headline(&case, &summary, &obs.tracker);
        assert!(obs.finite, "{name}: non-finite values");
        // Issue #4: Newton converges (relative residual ≤ 1e-10) in at most 8 iterations.
        assert!(summary.max_newton_iterations <= 8, "{name}: {} Newton iterations", summary.max_newton_iterations);
        assert!(!h.warnings.iter().any(|w| w.contains("numerical")), "{name}: {:?}", h.warnings);
        assert!(summary.energy_closure <= 1e-6, "{name}: energy closure {}", summary.energy_closure);
        if name.starts_with("swab") {
            assert!(h.warnings.iter().any(|w| w.contains("submergence")), "{name}: swab warning missing: {:?}", h.warnings);
        }
    }
    // Issue #5: every development drive runs on a shipped case.
    for kind in ["surge_block", "swab", "pump_backwash", "jet_pulse", "schedule", "table"] {
        assert!(used.contains(kind), "no shipped case uses drive kind {kind}; used: {used:?}");
    }
}
