//! The surge-block step against a plain Newton step on the same grid: the shipped municipal
//! demo case (invented data, 89 cells, cake, invaded zone, screen entrance and orifice
//! laws) stepped by TR-BDF2 at its nominal step under its surge block, and the same model
//! with the block replaced by a prescribed sine head of the same period and about the same
//! head range (3 m), whose step is Newton on the same nonlinear faces without the device's
//! well law. Goal: the surge step within 2× of the Newton step.
//!
//! Run with `cargo bench -p boreflux --bench surge_step`.

use boreflux::case::load_case;
use boreflux_solver::drive::{Drive, SineHead};
use boreflux_solver::model::{DEFAULT_ABSOLUTE_TOLERANCE_M, DEFAULT_RELATIVE_TOLERANCE};
use boreflux_solver::stepper::{Stepper, Tolerances};
use criterion::{black_box, criterion_group, criterion_main, Criterion};
use std::path::Path;

fn bench_surge_step(c: &mut Criterion) {
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let surge = load_case(&cases.join("municipal-sand-gravel.json"))
        .unwrap()
        .model;
    let period = surge.drive.period_s().unwrap();
    let mut newton = surge.clone();
    newton.drive = Drive::SineHead(SineHead {
        amplitude_m: 3.0,
        frequency_hz: 1.0 / period,
        offset_m: 0.0,
        ramp_cycles: 0.0,
    });
    let tol = Tolerances {
        relative: DEFAULT_RELATIVE_TOLERANCE,
        absolute_m: DEFAULT_ABSOLUTE_TOLERANCE_M,
    };
    let dt = period / 200.0;
    let mut group = c.benchmark_group("step_municipal_89_cells");
    for (name, m) in [
        ("surge_block_trbdf2", &surge),
        ("sine_head_newton_trbdf2", &newton),
    ] {
        let mut st = Stepper::new(m, None);
        // Past the ramp (5 cycles) so the block strokes at full length.
        for _ in 0..(6 * 200) {
            st.step_trbdf2(m, dt, tol).unwrap();
        }
        group.bench_function(name, |b| {
            b.iter(|| st.step_trbdf2(black_box(m), dt, tol).unwrap())
        });
    }
    group.finish();
}

criterion_group!(benches, bench_surge_step);
criterion_main!(benches);
