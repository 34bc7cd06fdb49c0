//! The periodic state by Newton–shooting (docs/numerics.md §Periodic state by shooting) as
//! `boreflux check` computes it, on the shipped surge-block and swab demo cases (invented
//! data): from rest through the drive's ramp, the warm-up cycles and the Newton–Krylov
//! iterations to the default defect of 1e-8, and the figures' cycle. Goal: `check` stays
//! quick (well under 2 s a case).
//!
//! Run with `cargo bench -p boreflux --bench periodic_state`.

use boreflux::case::load_case;
use boreflux_solver::periodic::{shoot, Options};
use boreflux_solver::slow::SlowState;
use criterion::{black_box, criterion_group, criterion_main, Criterion};
use std::path::Path;

fn bench_periodic_state(c: &mut Criterion) {
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let mut group = c.benchmark_group("periodic_state_shooting");
    group.sample_size(10);
    for name in ["municipal-sand-gravel", "swab-deep"] {
        let m = load_case(&cases.join(format!("{name}.json")))
            .unwrap()
            .model;
        let slow = SlowState::new(&m);
        let opts = Options::for_model(&m);
        group.bench_function(name, |b| {
            b.iter(|| shoot(black_box(&m), &slow, &opts).unwrap())
        });
    }
    group.finish();
}

criterion_group!(benches, bench_periodic_state);
criterion_main!(benches);
