//! Harmonic method against time stepping, on the linear model of `step.rs` (pack and
//! formation, 300 cells, 0.5 Hz sine head): the time each takes to reach the periodic
//! steady state with the screen flow's first harmonic within 1e-3 (complex relative error,
//! so amplitude and phase both) of the discrete periodic state, which the harmonic solve
//! gives exactly.
//!
//! The time stepping's recipe is found before timing: for each steps-per-period count, the
//! run from rest (two backward-Euler half-step pairs, then Crank–Nicolson, as the run loop
//! starts) is fitted period by period until the error stays below the target; the cheapest
//! count (fewest steps in all) is timed. Its cost is the bare step loop, without the
//! diagnostics `run` adds, and without the monitoring that found the recipe.
//!
//! Run with `cargo bench -p boreflux-solver --bench harmonic`.

use boreflux_solver::harmonic::{self, Complex};
use boreflux_solver::model::*;
use boreflux_solver::stepper::Stepper;
use criterion::{black_box, criterion_group, criterion_main, Criterion};

use std::f64::consts::PI;

/// Complex relative error of the screen flow that counts as the periodic steady state.
const TARGET: f64 = 1e-3;
/// Periods the search runs at most for one steps-per-period count.
const MAX_PERIODS: usize = 2000;

/// The linear pack–formation case of `step.rs` with exactly 300 cells.
fn model() -> Model {
    boreflux_solver::fixtures::bench_well(300, false)
}

/// Runs `periods` periods of `steps` steps from rest; passes the period's index and the
/// complex amplitudes over it (discrete Fourier sums of the end-of-step values) of the
/// screen flow and of the head at unknown `node`.
fn stepped(
    m: &Model,
    steps: usize,
    periods: usize,
    node: usize,
    mut per_period: impl FnMut(usize, Complex, Complex),
) {
    let p = m.drive.period_s().unwrap();
    let dt = p / steps as f64;
    let mut st = Stepper::new(m, None);
    for _ in 0..4 {
        st.step(m, 0.5 * dt, 1.0).unwrap();
    }
    let c0 = st.disc.conductance[0];
    let (mut q, mut hn) = (Complex::ZERO, Complex::ZERO);
    for s in 3..=steps * periods {
        st.step(m, dt, 0.5).unwrap();
        let h = st.heads();
        let phasor = Complex::cis(-2.0 * PI * s as f64 / steps as f64) * (2.0 / steps as f64);
        q += phasor * (c0 * (h[0] - h[1]));
        hn += phasor * h[node];
        if s % steps == 0 {
            per_period(s / steps, q, hn);
            (q, hn) = (Complex::ZERO, Complex::ZERO);
        }
    }
}

/// Periods after which the screen flow stays within TARGET of `want`, for `steps` steps
/// per period (None when it does not within MAX_PERIODS).
fn periods_needed(m: &Model, steps: usize, want: Complex) -> Option<usize> {
    let mut last_bad = 0;
    let mut err = f64::INFINITY;
    stepped(m, steps, MAX_PERIODS, 0, |k, q, _| {
        err = (q - want).abs() / want.abs();
        if err > TARGET {
            last_bad = k;
        }
    });
    // The first period is incomplete (it started at step 3); it never counts as settled.
    (err <= TARGET).then_some((last_bad + 1).max(2))
}

/// Time-stepping cost to the target: the step loop alone, from rest.
fn time_stepping(m: &Model, steps: usize, periods: usize) -> f64 {
    let p = m.drive.period_s().unwrap();
    let dt = p / steps as f64;
    let mut st = Stepper::new(m, None);
    for _ in 0..4 {
        st.step(m, 0.5 * dt, 1.0).unwrap();
    }
    for _ in 3..=steps * periods {
        st.step(m, dt, 0.5).unwrap();
    }
    st.heads()[1]
}

fn bench_harmonic(c: &mut Criterion) {
    let m = model();
    let sol = harmonic::solve(&m, 1).unwrap();
    let want = sol.flow_amplitude(0, 1);
    let mut best: Option<(usize, usize)> = None;
    for steps in [8, 12, 16, 20, 25, 50, 100, 200] {
        let needed = periods_needed(&m, steps, want);
        match needed {
            Some(p) => eprintln!("{steps} steps per period: within {TARGET:e} after {p} periods"),
            None => eprintln!(
                "{steps} steps per period: not within {TARGET:e} in {MAX_PERIODS} periods"
            ),
        }
        if let Some(periods) = needed {
            if best.is_none_or(|(s, p)| steps * periods < s * p) {
                best = Some((steps, periods));
            }
        }
    }
    let (steps, periods) = best.expect("time stepping reaches the target");
    eprintln!(
        "timed recipe: {steps} steps per period × {periods} periods = {} steps",
        steps * periods
    );
    // Away from the well the same recipe is less accurate: the head near r = 5 m.
    let rc = &sol.disc.grid.r_center;
    let node = 1 + rc.partition_point(|&r| r < 5.0);
    let (head_want, well) = (sol.amplitudes(1)[node], sol.amplitudes(1)[0]);
    stepped(&m, steps, periods, node, |k, q, h| {
        if k == periods {
            eprintln!(
                "at the timed recipe's end: screen flow error {:.2e}, head error at r = {:.2} m \
                 {:.2e} of its amplitude ({:.2e} of the well head's)",
                (q - want).abs() / want.abs(),
                rc[node - 1],
                (h - head_want).abs() / head_want.abs(),
                (h - head_want).abs() / well.abs(),
            );
        }
    });

    let mut group = c.benchmark_group("periodic_state_300_cells");
    group.sample_size(10);
    group.bench_function("harmonic_solve", |b| {
        b.iter(|| harmonic::solve(black_box(&m), 1).unwrap())
    });
    group.bench_function("harmonic_solve_and_200_samples", |b| {
        b.iter(|| harmonic::solve(black_box(&m), 1).unwrap().series(200))
    });
    group.bench_function(
        format!("time_stepping_{steps}_per_period_{periods}_periods"),
        |b| b.iter(|| time_stepping(black_box(&m), steps, periods)),
    );
    group.finish();
}

criterion_group!(benches, bench_harmonic);
criterion_main!(benches);
