//! Cost of the well assessment (docs/physics.md §25): one progress point (the cheap
//! estimate `run` records 100 times per run), one virtual constant-rate test of 24 h, and
//! the whole before/after assessment of a run (undamaged test, then for each state a
//! constant-rate test and four step rates), on the Forchheimer well of `fixtures::bench_well` with a
//! cake and an invaded zone added (invented numbers).
//!
//! Run with `cargo bench -p boreflux-solver --bench assess`.

use boreflux_solver::assess::progress::ProgressBasis;
use boreflux_solver::assess::{self, virtual_test, TestPlan};
use boreflux_solver::fixtures;
use boreflux_solver::model::*;
use boreflux_solver::slow::SlowState;
use boreflux_solver::system::CakeState;
use criterion::{black_box, criterion_group, criterion_main, Criterion};

fn damaged() -> Model {
    let mut m = fixtures::bench_well(300, true);
    m.well.storage_m2 = Well::free_surface_storage(0.1);
    m.cake = Some(fixtures::cake(2e-3, 1e-7, 0.8));
    // Added after the Forchheimer terms: a Darcy invaded zone.
    m.invaded = Some(fixtures::invaded(0.05, 5e-5));
    m
}

fn plan() -> TestPlan {
    TestPlan {
        design_rate_m3_s: 0.005,
        constant_duration_s: 86_400.0,
        step_fractions: vec![0.5, 0.75, 1.0, 1.5],
        step_duration_s: 7_200.0,
    }
}

fn bench(c: &mut Criterion) {
    let m = damaged();
    let plan = plan();
    let clean = assess::undamaged_drawdown_m(&m, &plan).expect("test runs");
    let basis = ProgressBasis::new(&m, plan.design_rate_m3_s, clean);
    let thinned = SlowState::with_cake(
        &m,
        Some(CakeState {
            thickness_m: 1e-3,
            coverage: 0.5,
        }),
    );
    c.bench_function("progress point", |b| {
        b.iter(|| black_box(basis.point(black_box(&thinned))))
    });
    let mut g = c.benchmark_group("virtual tests");
    g.sample_size(10);
    g.bench_function("constant rate, 24 h", |b| {
        b.iter(|| virtual_test::constant_rate(black_box(&m), 0.005, &[86_400.0]).unwrap())
    });
    g.bench_function("assessment before and after", |b| {
        b.iter(|| assess::assess(black_box(&m), black_box(&thinned), &plan).unwrap())
    });
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
