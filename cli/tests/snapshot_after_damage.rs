//! The well as it stands after a development run with every damage-removal law on (cake
//! lift-off with holes, fines leaving the invaded zone): the snapshot the virtual tests run on
//! must carry the damage the run's faces had, and the cheap progress estimate must agree with
//! the full virtual test on that snapshot. The reference is the full virtual test
//! (verification group `virtual_tests`, Theis / Papadopulos–Cooper within 0.5 %), not a
//! number of this file.

mod common;

use boreflux::case::load_case;
use boreflux_solver::assess::{self, progress::ProgressBasis};
use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::run::{run, Reporting};
use boreflux_solver::slow::SlowState;
use common::cases_dir;

#[test]
fn snapshot_after_lift_off_and_fines_matches_the_run_and_the_full_test() {
    // A surge run, and the same well developed in stages ending with pumping.
    for name in ["municipal-sand-gravel.json", "staged-development.json"] {
        check(name);
    }
}

fn check(name: &str) {
    let path = cases_dir().join(name);
    let case = load_case(&path).expect("demo case loads");
    let m = &case.model;
    let lift = m
        .cake
        .and_then(|c| c.lift_off)
        .expect("demo case has lift-off");
    assert!(!lift.frozen);
    assert!(
        m.invaded.as_ref().and_then(|z| z.fines).is_some(),
        "demo case has fines"
    );
    let s = run(m, &mut NullObserver, Reporting::default()).expect("run");
    let end = &s.final_state;
    // Development moved something, or this test would check nothing.
    let (skin0, skin1) = end.skin();
    assert!(skin1 < 0.9 * skin0, "skin {skin0} → {skin1}");
    assert!(s.fines_removed_kg > 0.0);

    // The snapshot started afresh has the skin the run ended with: the opened patches keep
    // their hole geometry (a frozen lift-off law) and the invaded zone its rings. Both are
    // computed by the same formulas from the same state, so only round-off separates them.
    let snap = end.snapshot_model(m);
    assert!(snap
        .cake
        .is_none_or(|c| c.lift_off.is_none_or(|l| l.frozen)));
    let again = SlowState::new(&snap).skin().1;
    assert!(
        (again - skin1).abs() <= 1e-9 * skin1.abs().max(1.0),
        "{name}: snapshot skin {again} vs run {skin1}"
    );

    // The cheap progress estimate against the full virtual test on the same state, to the
    // tolerance of the verification group (1e-3 relative: storage of the damage zones).
    let plan = &case.assessment;
    let clean = assess::undamaged_drawdown_m(m, plan).expect("undamaged test");
    let full = assess::figures_with(m, end, plan, clean).expect("virtual test");
    let est = ProgressBasis::new(m, plan.design_rate_m3_s, clean).point(end);
    let rel = (est.drawdown_m / full.drawdown_m - 1.0).abs();
    assert!(
        rel < 1e-3,
        "{name}: estimate {} m vs full test {} m ({rel:.2e})",
        est.drawdown_m,
        full.drawdown_m
    );
    // A frozen law removes nothing during the test itself: the snapshot is unchanged by a run.
    let s2 = run(&snap, &mut NullObserver, Reporting::default()).expect("run on snapshot");
    assert_eq!(s2.final_state.skin().1, again);
}
