//! Throughput of the time step: cell-steps per second for a linear (Darcy) Crank–Nicolson
//! step on 300 cells, the same step with Forchheimer and screen entrance losses (Newton),
//! and whole runs of both with diagnostics (startup steps, balances, dissipation per zone).
//!
//! Run with `cargo bench -p boreflux-solver --bench step`. Throughput is reported by
//! criterion in elements (cell-steps) per second.

use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::run::{run, Reporting};
use boreflux_solver::stepper::Stepper;
use criterion::{black_box, criterion_group, criterion_main, Criterion, Throughput};

#[path = "models.rs"]
mod models;
use models::model;

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
    group.finish();

    let mut group = c.benchmark_group("run_10_cycles_300_cells");
    group.sample_size(20);
    for (name, nonlinear) in [
        ("darcy_with_diagnostics", false),
        ("forchheimer_with_diagnostics", true),
    ] {
        let m = model(300, nonlinear);
        let cells = Stepper::new(&m, None).disc.unknowns() as u64 - 1;
        group.throughput(Throughput::Elements(cells * 2002));
        group.bench_function(name, |b| {
            b.iter(|| run(black_box(&m), &mut NullObserver, Reporting::default()).unwrap())
        });
    }
    group.finish();
}

criterion_group!(benches, bench_steps);
criterion_main!(benches);
