//! A whole development day: the shipped municipal demo case (invented data; surge block at
//! 20 strokes/min, cake with lift-off and erosion, invaded-zone fines) run for 8 hours,
//! 9 600 cycles, with every step's diagnostics handed to a null observer (no file; the
//! file of the same job is measured with `boreflux run`, docs/formats.md "Storage choice").
//!
//! Two ways of stepping, each its own benchmark name so figures are never mixed up:
//! - `multiscale_auto`: the default (`numerics.multiscale` "auto", cycle jumping over the
//!   slow state, docs/time-stepping.md);
//! - `full_stepping`: every cycle stepped in time (`numerics.multiscale` "off"), the
//!   reference the multiscale figures are checked against.
//!
//! Run with `cargo bench -p boreflux --bench long_job -- multiscale` for the default (a few
//! seconds an iteration); the full-stepping one takes a minute or more an iteration on the
//! 2-core development machine (criterion's 10 samples: 10 minutes or more).

use boreflux::case::parse_case;
use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::run::{run, Reporting};
use criterion::{criterion_group, criterion_main, Criterion};
use std::path::Path;

fn bench_long_job(c: &mut Criterion) {
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let text = std::fs::read_to_string(cases.join("municipal-sand-gravel.json")).unwrap();
    let mut group = c.benchmark_group("municipal_surge_8_hours");
    group.sample_size(10);
    for (name, multiscale) in [("multiscale_auto", "auto"), ("full_stepping", "off")] {
        let mut case: serde_json::Value = serde_json::from_str(&text).unwrap();
        case["duration"] = serde_json::json!("8 h");
        case["numerics"]["multiscale"] = serde_json::json!(multiscale);
        let model = parse_case(&case.to_string(), &cases).unwrap().model;
        group.bench_function(name, |b| {
            b.iter(|| run(&model, &mut NullObserver, Reporting { every: 1 }).unwrap())
        });
    }
    group.finish();
}

criterion_group!(benches, bench_long_job);
criterion_main!(benches);
