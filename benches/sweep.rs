//! Sweep throughput: scenarios per second when the shipped demo case (invented data) is
//! varied over 8 stroke rates and run on 1 and on 2 threads. Each scenario is a whole run
//! with the headline figures (no files); the case is shortened to 10 strokes. And a
//! 1 000-scenario sweep of 2-stroke runs on 2 threads (`sweep_1000_scenarios`).
//!
//! Run with `cargo bench -p boreflux --bench sweep`; criterion reports elements
//! (scenarios) per second.

use boreflux::sweep::exec::{prepare, run_all};
use boreflux::sweep::plan::{Plan, Shard};
use boreflux::sweep::spec::parse_vary;
use criterion::{criterion_group, criterion_main, Criterion, Throughput};
use std::path::Path;

fn bench_sweep(c: &mut Criterion) {
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let text = std::fs::read_to_string(cases.join("municipal-sand-gravel.json")).unwrap();
    let mut base: serde_json::Value = serde_json::from_str(&text).unwrap();
    base["duration"] = serde_json::json!("10 cycles");
    let plan = Plan::new(
        base,
        vec![parse_vary("drive.strokes_per_minute=6..30:8").unwrap()],
    )
    .unwrap();
    let ready = prepare(&plan, Shard::WHOLE, &cases, false).unwrap();
    let mut group = c.benchmark_group("sweep_8_scenarios");
    group.sample_size(10);
    group.throughput(Throughput::Elements(ready.len() as u64));
    for jobs in [1, 2] {
        group.bench_function(format!("{jobs}_threads"), |b| {
            b.iter(|| run_all(&ready, &plan, &cases, jobs, &|| false, &|_| {}).unwrap())
        });
    }
    group.finish();
}

/// 1 000 small scenarios: the demo case shortened to 2 strokes, its stroke rate varied over
/// 1 000 values from 6 to 30 per minute, on 2 threads (each scenario includes the virtual
/// well tests of its end state, most of its cost; the tests of the well as built are the
/// same for every scenario and run once).
fn bench_sweep_1000(c: &mut Criterion) {
    let cases = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases");
    let text = std::fs::read_to_string(cases.join("municipal-sand-gravel.json")).unwrap();
    let mut base: serde_json::Value = serde_json::from_str(&text).unwrap();
    base["duration"] = serde_json::json!("2 cycles");
    let plan = Plan::new(
        base,
        vec![parse_vary("drive.strokes_per_minute=6..30:1000").unwrap()],
    )
    .unwrap();
    let ready = prepare(&plan, Shard::WHOLE, &cases, false).unwrap();
    let mut group = c.benchmark_group("sweep_1000_scenarios");
    group.sample_size(10);
    group.throughput(Throughput::Elements(ready.len() as u64));
    group.bench_function("2_threads", |b| {
        b.iter(|| run_all(&ready, &plan, &cases, 2, &|| false, &|_| {}).unwrap())
    });
    group.finish();
}

criterion_group!(benches, bench_sweep, bench_sweep_1000);
criterion_main!(benches);
