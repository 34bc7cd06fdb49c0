//! Time stepping across a sudden change of an interface conductance (docs/time-stepping.md).
//!
//! A homogeneous annulus r_s ≤ r ≤ R with a constant head H₀ in the well and h = 0 at R is
//! in steady state behind a cake at r_b; at t = 0 the cake is gone. The well flow then rises
//! from the flow through the cake to the Thiem flow without it; the reference is the
//! Laplace-domain solution inverted with mpmath (`tests/data/conductance_jump.json`). The
//! run starts from the steady state of the solver itself (a backward-Euler step of 10³⁰ s)
//! and goes through the run loop with its default scheme and step control.
//!
//! Checks:
//! - the flow at each sampled time against the reference, relative. Tolerance 1 %: the
//!   automatic grid's spatial error is about 1e−3 (the Theis group's observation at this
//!   resolution) and the default step control holds the local error of the heads to 1e−3
//!   relative or 1 mm; the flow is a head difference across the first cells, and over the
//!   run the local errors add up to a few times that, hence a 10× margin above 1e−3.
//!   Checked also with tolerances 100× tighter, which must cut the error (the time-step
//!   part) or leave it at the grid's level.
//! - the flow before the first step and right after it: the change is away from the well,
//!   so the flow does not jump at t = 0 (reference Q(0+) = flow before the change).
//! - no alternation: successive increments of the well flow may not change sign from step
//!   to step (Crank–Nicolson at these steps rings after the change).

use crate::checks::Recorder;
use crate::models::homogeneous;
use crate::reference::{load, num, source};
use crate::CheckResult;
use boreflux_solver::cake::CakeState;
use boreflux_solver::drive::{Drive, TableDrive, TableQuantity};
use boreflux_solver::model::{Cake, Model, Scheme, TimeSpec};
use boreflux_solver::run::run_from_state;
use boreflux_solver::slow::SlowState;
use boreflux_solver::stepper::Stepper;
use boreflux_solver::Reporting;

/// Reference file.
const DATA: &str = include_str!("../data/conductance_jump.json");

/// The model of the reference problem with the given scheme, and the sample times.
fn model(v: &serde_json::Value, scheme: Scheme) -> (Model, Vec<f64>) {
    let p = |k: &str| num(v, &format!("/params/{k}"));
    let times: Vec<f64> = v["points"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| x["t"].as_f64().unwrap())
        .collect();
    let t_end = *times.last().unwrap();
    let h0 = p("H0");
    let drive = Drive::Table(TableDrive {
        times_s: vec![0.0, t_end],
        values: vec![h0, h0],
        quantity: TableQuantity::Head,
        repeat: false,
    });
    let mut m = homogeneous(p("K"), p("Ss"), p("b"), p("rs"), drive, t_end);
    m.pack.outer_radius_m = p("rb");
    m.formation.outer_radius_m = Some(p("R"));
    m.cake = Some(Cake {
        thickness_m: p("cake_thickness"),
        conductivity_m_s: p("cake_K"),
        coverage: 1.0,
        erosion: None,
        lift_off: None,
    });
    m.numerics.sync_times_s = times.clone();
    m.numerics.scheme = scheme;
    (m, times)
}

/// Runs from the steady state with the cake, the cake removed at t = 0. Returns the
/// recorder and the steady flow before the change.
fn run_jump(m: &Model) -> (Recorder, f64) {
    let p = m.cake.unwrap();
    let mut st = Stepper::new(
        m,
        Some(CakeState {
            thickness_m: p.thickness_m,
            coverage: 1.0,
        }),
    );
    st.solve_steady(m).expect("steady state");
    let h = st.heads();
    let q_before = st.disc.faces[0].flow(h[0] - h[1]).0;
    let removed = Some(CakeState {
        thickness_m: 0.0,
        coverage: 0.0,
    });
    st.set_cake(m, removed);
    let mut rec = Recorder::at(&[]);
    run_from_state(
        m,
        st,
        SlowState::with_cake(m, removed),
        &mut rec,
        Reporting::default(),
    )
    .expect("run");
    (rec, q_before)
}

/// Largest relative error at the sample times.
fn worst_error(rec: &Recorder, times: &[f64], want: &[f64]) -> f64 {
    times
        .iter()
        .zip(want)
        .map(|(&t, &q)| match rec.index_of(t) {
            Some(i) => ((rec.screen_flow[i] - q) / q).abs(),
            None => f64::INFINITY,
        })
        .fold(0.0, f64::max)
}

/// Longest run of successive increments that alternate in sign.
pub fn longest_alternation(x: &[f64]) -> usize {
    let (mut best, mut run) = (0, 0);
    for w in x.windows(3) {
        run = if (w[1] - w[0]) * (w[2] - w[1]) < 0.0 {
            run + 1
        } else {
            0
        };
        best = best.max(run);
    }
    best
}

/// The group.
pub fn conductance_jump() -> Vec<CheckResult> {
    let v = load(DATA);
    let src = source(&v);
    let want: Vec<f64> = v["points"]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| x["Q"].as_f64().unwrap())
        .collect();
    let q_before_ref = num(&v, "/params/Q_before");
    let (m, times) = model(&v, Scheme::default());
    let (rec, q_before) = run_jump(&m);
    let err = worst_error(&rec, &times, &want);
    let mut out = vec![
        CheckResult::new(
            "conductance_jump",
            "steady flow behind the cake vs Thiem with the cake's resistance",
            &src,
            ((q_before - q_before_ref) / q_before_ref).abs(),
            // Spatial error of the automatic grid (the Theis group's 1e-3 level), margin 2.
            2e-3,
            "relative",
        ),
        CheckResult::new(
            "conductance_jump",
            "well flow after the cake is removed, default step control",
            &src,
            err,
            1e-2,
            "relative",
        ),
        CheckResult::new(
            "conductance_jump",
            "well flow right after the change vs before (no jump at the well)",
            &src,
            ((rec.screen_flow[0] - q_before) / q_before).abs(),
            // The first (restart) step is short; the flow moves by its own O(Δt) there.
            1e-2,
            "relative",
        ),
    ];
    let alternation = longest_alternation(&rec.screen_flow);
    out.push(CheckResult::new(
        "conductance_jump",
        format!(
            "no step-to-step alternation of the well flow ({} steps; longest run {alternation})",
            rec.time.len()
        ),
        &src,
        alternation as f64,
        1.0,
        "steps",
    ));
    // A coarse nominal step (1 s, as a user might set for a slow drive): the step control
    // must still resolve the fast start and leave no alternation. (Crank–Nicolson without
    // start-up steps at this step alternates; see docs/time-stepping.md.)
    let (mut coarse, _) = model(&v, Scheme::default());
    coarse.numerics.time = TimeSpec::Fixed(1.0);
    let (rec_coarse, _) = run_jump(&coarse);
    let alternation = longest_alternation(&rec_coarse.screen_flow);
    out.push(CheckResult::new(
        "conductance_jump",
        format!(
            "1 s nominal step: no alternation ({} steps; longest run {alternation})",
            rec_coarse.time.len()
        ),
        &src,
        alternation as f64,
        1.0,
        "steps",
    ));
    out.push(CheckResult::new(
        "conductance_jump",
        "1 s nominal step: well flow after the change",
        &src,
        worst_error(&rec_coarse, &times, &want),
        // Same reasoning as the default run.
        1e-2,
        "relative",
    ));
    let (tight, _) = model(
        &v,
        Scheme::TrBdf2 {
            relative: 1e-5,
            absolute_m: 1e-5,
        },
    );
    let (rec_tight, _) = run_jump(&tight);
    let err_tight = worst_error(&rec_tight, &times, &want);
    out.push(CheckResult::new(
        "conductance_jump",
        format!("well flow with 100x tighter step control (default: {err:.2e})"),
        &src,
        err_tight,
        // No worse than the default run (the time part shrinks, the grid part stays).
        err.max(2e-3),
        "relative",
    ));
    out
}
