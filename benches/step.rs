//! Throughput of the time step: cell-steps per second for a linear (Darcy) Crank–Nicolson
//! step on 300 cells, the same step with Forchheimer and screen entrance losses (Newton),
//! the TR-BDF2 step (two stages and the error estimate) of both, and whole runs of both with
//! diagnostics under the default scheme (TR-BDF2, adaptive) and under the θ-scheme; and one
//! solve with kept tridiagonal factors of the same size (301 unknowns), the floor of a linear
//! stage: a Crank–Nicolson step makes one such solve, a TR-BDF2 step three (two stages and the
//! error filter).
//!
//! Run with `cargo bench -p boreflux-solver --bench step`. Throughput is reported by
//! criterion in elements (cell-steps) per second.

use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::model::{Scheme, DEFAULT_ABSOLUTE_TOLERANCE_M, DEFAULT_RELATIVE_TOLERANCE};
use boreflux_solver::run::{run, Reporting};
use boreflux_solver::stepper::{Stepper, Tolerances};
use boreflux_solver::tridiag::Factored;
use criterion::{black_box, criterion_group, criterion_main, Criterion, Throughput};

use boreflux_solver::fixtures::bench_well as model;

fn bench_steps(c: &mut Criterion) {
    let mut group = c.benchmark_group("step_300_cells");
    for (name, nonlinear) in [("darcy_cn", false), ("forchheimer_newton", true)] {
        let m = model(300, nonlinear);
        let mut st = Stepper::new(&m, None);
        let cells = st.disc.unknowns() as u64 - 1;
        group.throughput(Throughput::Elements(cells));
        // Warm up past the start as the run loop does (two steps as backward-Euler halves,
        // then Crank–Nicolson), so Newton works on a moving state with its usual history.
        for _ in 0..4 {
            st.step(&m, 0.005, 1.0).unwrap();
        }
        for _ in 0..50 {
            st.step(&m, 0.01, 0.5).unwrap();
        }
        group.bench_function(name, |b| {
            b.iter(|| st.step(black_box(&m), 0.01, 0.5).unwrap())
        });
    }
    let tol = Tolerances {
        relative: DEFAULT_RELATIVE_TOLERANCE,
        absolute_m: DEFAULT_ABSOLUTE_TOLERANCE_M,
    };
    for (name, nonlinear) in [("darcy_trbdf2", false), ("forchheimer_trbdf2", true)] {
        let m = model(300, nonlinear);
        let mut st = Stepper::new(&m, None);
        let cells = st.disc.unknowns() as u64 - 1;
        group.throughput(Throughput::Elements(cells));
        for _ in 0..50 {
            st.step_trbdf2(&m, 0.01, tol).unwrap();
        }
        group.bench_function(name, |b| {
            b.iter(|| st.step_trbdf2(black_box(&m), 0.01, tol).unwrap())
        });
    }
    // One solve with kept factors: a diagonally dominant symmetric matrix of 301 rows (the
    // linear model's size; the values do not change the operation count).
    let n = 301;
    let off: Vec<f64> = (0..n).map(|i| 1.0 + (i % 7) as f64 * 0.1).collect();
    let diag: Vec<f64> = (0..n).map(|i| 2.5 + (i % 5) as f64 * 0.2).collect();
    let mut f = Factored::with_size(n);
    f.factor_symmetric(&diag, &off).unwrap();
    let rhs: Vec<f64> = (0..n).map(|i| (i as f64 * 0.37).sin()).collect();
    let mut x = rhs.clone();
    group.throughput(Throughput::Elements(n as u64 - 1));
    group.bench_function("tridiagonal_solve_kept_factors", |b| {
        b.iter(|| {
            x.copy_from_slice(&rhs);
            f.solve(black_box(&mut x));
        })
    });
    group.finish();

    let mut group = c.benchmark_group("run_10_cycles_300_cells");
    group.sample_size(20);
    for (name, nonlinear) in [
        ("darcy_with_diagnostics", false),
        ("forchheimer_with_diagnostics", true),
    ] {
        for (suffix, scheme) in [("", Scheme::default()), ("_theta", Scheme::Theta)] {
            let mut m = model(300, nonlinear);
            m.numerics.scheme = scheme;
            let cells = Stepper::new(&m, None).disc.unknowns() as u64 - 1;
            group.throughput(Throughput::Elements(cells * 2002));
            group.bench_function(format!("{name}{suffix}"), |b| {
                b.iter(|| run(black_box(&m), &mut NullObserver, Reporting::default()).unwrap())
            });
        }
    }
    group.finish();
}

criterion_group!(benches, bench_steps);
criterion_main!(benches);
