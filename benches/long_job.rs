//! A whole development day: the shipped municipal demo case (invented data; surge block at
//! 20 strokes/min, cake with lift-off and erosion, invaded-zone fines) run for 8 hours,
//! 9 600 cycles, with every step's diagnostics handed to a null observer (no file; the
//! file of the same job is measured with `boreflux run`, docs/formats.md "Storage choice").
//!
//! Switch: [`STEPPING`]. `"full"` steps every cycle in time (the reference, today's only
//! way). When multiscale stepping (cycle jumping over the slow state) lands, set it to the
//! value of the case key that selects it and fill in [`stepping_keys`]; the benchmark name
//! carries the choice so figures from the two are never mixed up.
//!
//! Run with `cargo bench -p boreflux --bench long_job` (one iteration is a minute or more
//! on the 2-core development machine with full stepping: criterion's 10 samples take
//! 10 minutes or more).

use boreflux::case::parse_case;
use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::run::{run, Reporting};
use criterion::{criterion_group, criterion_main, Criterion};
use std::path::Path;

/// How the job is stepped: "full" (every cycle in time). See the module doc.
const STEPPING: &str = "full";

/// Case keys that select [`STEPPING`] (none for full stepping, the default).
fn stepping_keys(case: &mut serde_json::Value) {
    match STEPPING {
        "full" => {}
        other => panic!("stepping {other:?}: add its case keys here"),
    }
    let _ = case;
}

fn bench_long_job(c: &mut Criterion) {
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let text = std::fs::read_to_string(cases.join("municipal-sand-gravel.json")).unwrap();
    let mut case: serde_json::Value = serde_json::from_str(&text).unwrap();
    case["duration"] = serde_json::json!("8 h");
    stepping_keys(&mut case);
    let model = parse_case(&case.to_string(), &cases).unwrap().model;
    let mut group = c.benchmark_group("municipal_surge_8_hours");
    group.sample_size(10);
    group.bench_function(format!("{STEPPING}_stepping"), |b| {
        b.iter(|| run(&model, &mut NullObserver, Reporting { every: 1 }).unwrap())
    });
    group.finish();
}

criterion_group!(benches, bench_long_job);
criterion_main!(benches);
