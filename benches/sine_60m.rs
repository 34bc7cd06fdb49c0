//! The 60 M cell-step sine-head case: the benchmarks' linear (Darcy) model of 300 cells
//! (`fixtures::bench_well`, invented numbers) under a 0.5 Hz sine head for 1 000 cycles at 200 steps
//! per cycle, 2·10⁵ steps × 300 cells = 6·10⁷ cell-steps, run whole (`run::run` with every
//! step's diagnostics handed to a null observer) under the default scheme (TR-BDF2,
//! adaptive, the nominal step as its bound) and under Crank–Nicolson (θ = ½, fixed step).
//! Its reference is `benches/reference/sine_60m_numpy.py` (a pre-factored LAPACK
//! tridiagonal loop in NumPy/SciPy); the goal is ≥ 10× its cell-steps per second.
//!
//! Run with `cargo bench -p boreflux-solver --bench sine_60m`; criterion reports elements
//! (cell-steps) per second.

use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::model::Scheme;
use boreflux_solver::run::{run, Reporting};
use criterion::{black_box, criterion_group, criterion_main, Criterion, Throughput};

use boreflux_solver::fixtures::bench_well as model;

/// Cycles of the 0.5 Hz drive.
const CYCLES: f64 = 1_000.0;

fn bench_sine_60m(c: &mut Criterion) {
    let mut group = c.benchmark_group("sine_head_300_cells_1000_cycles");
    group.sample_size(10);
    for (name, scheme) in [
        ("trbdf2_default", None),
        ("crank_nicolson", Some(Scheme::Theta)),
    ] {
        let mut m = model(300, false);
        m.duration_s = CYCLES * 2.0;
        if let Some(s) = scheme {
            m.numerics.scheme = s;
        }
        let cells = 300u64;
        let steps = 200 * CYCLES as u64;
        group.throughput(Throughput::Elements(cells * steps));
        group.bench_function(name, |b| {
            b.iter(|| run(black_box(&m), &mut NullObserver, Reporting { every: 1 }).unwrap())
        });
    }
    group.finish();
}

criterion_group!(benches, bench_sine_60m);
criterion_main!(benches);
