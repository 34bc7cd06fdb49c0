//! Cycle jumping (docs/time-stepping.md §Multiscale stepping) on a slow law with a closed
//! form: a cake that erodes at a constant amount per cycle. A cake a thousand times more
//! conductive than the pack adds no resistance worth the name, so the flow cycle, the wall
//! shear and the erosion per cycle E∮max(0, wτ − τ_c) dt do not change as it thins:
//! the thickness is linear in the cycle count, δ(n) = δ(n₀) − (n − n₀) Δ (derived here from
//! the erosion law, docs/physics.md §13). Linear extrapolation is exact for that law, so the
//! jumps must reproduce it to the error bound the method states (tolerance × scale per jump).

use boreflux_solver::diagnostics::{CycleView, StepObserver, StepView};
use boreflux_solver::drive::Drive;
use boreflux_solver::fixtures;
use boreflux_solver::model::*;
use boreflux_solver::{run, Reporting};

/// Invented numbers (the demo well of the fixtures), not from a source: a cake a thousand
/// times more conductive than the pack over the whole wall, eroding at 1e-5 m/(s Pa).
fn model(multiscale: Multiscale) -> Model {
    let mut m = fixtures::demo_well();
    m.cake = Some(Cake {
        erosion: Some(fixtures::erosion(1e-5, 0.0)),
        ..fixtures::cake(2e-3, 5.0, 1.0)
    });
    m.duration_s = 800.0;
    m.numerics.multiscale = multiscale;
    m
}

/// Keeps the cake removed in each computed cycle, and the jumps.
#[derive(Default)]
struct Cycles {
    removed: Vec<(u64, f64)>,
    jumps: Vec<(u64, u64)>,
    /// Σ of the jumps' estimated errors over the tolerance.
    estimated: f64,
}

impl StepObserver for Cycles {
    fn on_step(&mut self, _s: &StepView<'_>) -> bool {
        true
    }
    fn on_cycle(&mut self, c: &CycleView) {
        self.removed.push((c.index, c.cake_removed_m));
    }
    fn on_jump(&mut self, j: &boreflux_solver::JumpView) {
        self.jumps.push((j.first_cycle, j.cycles));
        self.estimated += j.error_estimate;
    }
}

#[test]
fn jumps_reproduce_a_constant_erosion_per_cycle() {
    let tolerance = DEFAULT_MULTISCALE_TOLERANCE;
    let base = model(Multiscale::Off);
    let d0 = base.cake.unwrap().thickness_m;
    let mut full = Cycles::default();
    let f = run(&base, &mut full, Reporting::default()).expect("full run");
    // The premise: after the start, every cycle removes the same thickness Δ.
    let n = f.cycles as usize;
    let delta = full.removed[n - 1].1;
    assert!(delta > 1e-4 * d0, "the cake erodes: Δ = {delta}");
    for &(i, r) in &full.removed[20..] {
        assert!(
            (r - delta).abs() <= 1e-6 * delta,
            "cycle {i}: {r} vs {delta}"
        );
    }
    // The closed form from cycle n₀ = 20 on.
    let n0 = 20;
    let before: f64 = full.removed[..n0].iter().map(|x| x.1).sum();
    let closed = d0 - before - (n - n0) as f64 * delta;
    assert!(
        (f.cake_thickness_m.1 - closed).abs() <= 1e-6 * (d0 - closed),
        "full run {} vs closed form {closed}",
        f.cake_thickness_m.1
    );

    let mut multi = Cycles::default();
    let m = run(
        &model(Multiscale::Auto { tolerance }),
        &mut multi,
        Reporting::default(),
    )
    .expect("multiscale run");
    assert!(
        m.skipped_cycles > 0 && !multi.jumps.is_empty(),
        "no jump: the test checks nothing"
    );
    assert_eq!(m.cycles, f.cycles);
    assert_eq!(
        m.skipped_cycles,
        multi.jumps.iter().map(|j| j.1).sum::<u64>()
    );
    // Each jump's extrapolation error is what it estimated (its error estimate × tolerance ×
    // scale, the starting thickness; at most tolerance × scale); the full run's own
    // departure from the closed form is added.
    assert!(multi.estimated <= m.jumps as f64);
    let bound = multi.estimated * tolerance * d0 + 1e-6 * (d0 - closed);
    let err = (m.cake_thickness_m.1 - closed).abs();
    assert!(
        err <= bound,
        "multiscale {} vs closed form {closed}: {err:.3e} > {bound:.3e}",
        m.cake_thickness_m.1
    );
    // Sharper for this law: the thickness has no curvature beyond the scatter of the
    // per-cycle removal (1e-6 Δ, checked above), so extrapolating it is exact to that
    // level. The heads a jump holds (docs/time-stepping.md §Multiscale stepping) are off by
    // at most the steps' tolerance atol + rtol |h| (defaults 1 mm, 1e-3), at most
    // (1 mm + 1e-3 × 1.5 m)/1.5 m of the drive's 1.5 m amplitude, which disturbs the
    // erosion of the cycle after the jump by as much relative: that much of Δ per jump.
    // A cycle too many or too few in a jump (an error of Δ) still fails here.
    let amplitude = 1.5;
    let held = (DEFAULT_ABSOLUTE_TOLERANCE_M + DEFAULT_RELATIVE_TOLERANCE * amplitude) / amplitude;
    assert!(m.jumps as f64 * held < 0.5, "{} jumps", m.jumps);
    let exact = 1e-6 * (d0 - closed)
        + 1e-6 * m.skipped_cycles as f64 * delta
        + held * m.jumps as f64 * delta;
    assert!(err <= exact, "{err:.3e} > {exact:.3e}");
    // Much fewer steps, and the same removal as the full run within the same bound.
    assert!(m.steps * 2 < f.steps, "{} vs {} steps", m.steps, f.steps);
    assert!((m.cake_thickness_m.1 - f.cake_thickness_m.1).abs() <= bound);
}

#[test]
fn no_jump_without_a_period() {
    // A slug test has no cycles: "auto" falls back to full stepping.
    let mut m = model(Multiscale::Auto {
        tolerance: DEFAULT_MULTISCALE_TOLERANCE,
    });
    m.drive = Drive::Slug {
        initial_head_m: 1.0,
    };
    m.duration_s = 100.0;
    let mut seen = Cycles::default();
    let s = run(&m, &mut seen, Reporting::default()).unwrap();
    assert_eq!((s.jumps, s.skipped_cycles), (0, 0));
    assert!(seen.jumps.is_empty());
}

/// The model above without a cake and with an invaded zone as conductive as the formation
/// whose fines are entrained from the first motion and never redeposit (v_c = 0, α_d = 0;
/// invented numbers). The zone's conductivity then does not depend on the fines
/// (β = (K_f/K_d − 1)/σ₀ = 0, docs/physics.md §13b), so the flow cycle never changes and
/// the entrainment law ∂σ/∂t = −α_e (|u|/n) σ of each cell integrates over one cycle to a
/// fixed factor: σᵢ(n) = σᵢ(n₀) rᵢ^(n − n₀), rᵢ = exp(−α_e ∮ |uᵢ|/n dt) — an amount
/// decaying exponentially in the cycle count (derived here from the law).
fn fines_model(multiscale: Multiscale, cycles: u32) -> Model {
    let mut m = model(multiscale);
    m.cake = None;
    m.invaded = Some(Invaded {
        thickness_m: 0.05,
        medium: Medium::darcy(2e-4, 1e-5),
        fines: Some(Fines {
            deposit: 0.01,
            critical_velocity_m_s: 0.0,
            entrainment_per_m: 2.0,
            deposition_per_m: 0.0,
            grain_density_kg_m3: 2650.0,
        }),
        profile: None,
    });
    m.duration_s = f64::from(cycles) * 2.0;
    m
}

/// Deposited fines of each invaded cell at the end of a run.
fn deposited(s: &boreflux_solver::RunSummary) -> Vec<f64> {
    s.final_state.fines().expect("fines").deposited().to_vec()
}

#[test]
fn jumps_reproduce_fines_decaying_exponentially_per_cycle() {
    let tolerance = DEFAULT_MULTISCALE_TOLERANCE;
    let sigma0 = 0.01;
    // The per-cycle factor of each cell from two full runs, 100 and 200 cycles.
    let (n1, n2, n) = (100u32, 200u32, 400u32);
    let run_full = |cycles| {
        run(
            &fines_model(Multiscale::Off, cycles),
            &mut Cycles::default(),
            Reporting::default(),
        )
        .expect("full run")
    };
    let (a, b) = (deposited(&run_full(n1)), deposited(&run_full(n2)));
    let ratio: Vec<f64> = a
        .iter()
        .zip(&b)
        .map(|(x, y)| (y / x).powf(1.0 / f64::from(n2 - n1)))
        .collect();
    assert!(
        ratio.iter().all(|r| (0.9..0.9999).contains(r)),
        "the fines decay over hundreds of cycles: {ratio:?}"
    );
    // The closed form at n cycles, and the premise: the full run follows it (the per-cycle
    // factor is constant to the round-off of the steps).
    let closed: Vec<f64> = b
        .iter()
        .zip(&ratio)
        .map(|(y, r)| y * r.powi((n - n2) as i32))
        .collect();
    let f = run_full(n);
    for (i, (x, c)) in deposited(&f).iter().zip(&closed).enumerate() {
        assert!((x - c).abs() <= 1e-6 * sigma0, "cell {i}: full {x} vs {c}");
    }

    let mut multi = Cycles::default();
    let m = run(
        &fines_model(Multiscale::Auto { tolerance }, n),
        &mut multi,
        Reporting::default(),
    )
    .expect("multiscale run");
    assert!(
        m.skipped_cycles * 3 > u64::from(n),
        "a third of the cycles or more are jumped over: {} of {n}",
        m.skipped_cycles
    );
    assert_eq!(m.cycles, f.cycles);
    // Each jump's error is within its estimate (× tolerance × σ₀, the deposit's scale);
    // the premise's departure from the closed form is added.
    assert!(multi.estimated <= m.jumps as f64);
    let bound = multi.estimated * tolerance * sigma0 + 1e-6 * sigma0;
    for (i, (x, c)) in deposited(&m).iter().zip(&closed).enumerate() {
        let err = (x - c).abs();
        assert!(
            err <= bound,
            "cell {i}: multiscale {x} vs {c}: {err:.3e} > {bound:.3e}"
        );
    }
    // The fines removed across the wall, within the same relative bound of the volume.
    let rel = (m.fines_removed_kg - f.fines_removed_kg).abs() / f.fines_removed_kg;
    assert!(rel <= 1e-2, "fines removed: {rel:.2e} off the full run");
}
