//! The whole `boreflux run` process of the 60 M cell-step sine case
//! (`benches/cases/sine-60m.json`, invented benchmark data: 300 cells, Crank–Nicolson,
//! 200 steps per cycle, 1 000 cycles of a 0.5 Hz sine head, per-cycle envelopes), as a user
//! runs it: the release binary spawned on the case file, writing its HDF5 file, until it
//! exits. Everything outside the time step is in the figure: process start, reading the
//! case, the virtual well tests before and after (docs/physics.md §25), the HDF5 set-up and
//! finish, the per-step observers, the summary.
//!
//! Three benchmarks, each its own name:
//! - `envelopes_1000_cycles`: the case as shipped;
//! - `steps_1000_cycles`: the same with every step written (`output.store` "steps");
//! - `envelopes_1_cycle`: the case cut to one cycle (`duration` 2 s): the fixed cost.
//!
//! Run with `cargo bench -p boreflux --bench sine_60m_process`. The reference loop is
//! `benches/reference/sine_60m_numpy.py`; DEVELOPERS.md keeps the figures measured.

use criterion::{criterion_group, criterion_main, Criterion};
use std::path::Path;
use std::process::Command;

fn bench_process(c: &mut Criterion) {
    let here = Path::new(env!("CARGO_MANIFEST_DIR")).join("../benches/cases");
    let text = std::fs::read_to_string(here.join("sine-60m.json")).unwrap();
    let dir = tempfile::tempdir().unwrap();
    let mut group = c.benchmark_group("sine_60m_whole_process");
    group.sample_size(10);
    for (name, store, duration) in [
        ("envelopes_1000_cycles", "envelopes", 2000.0),
        ("steps_1000_cycles", "steps", 2000.0),
        ("envelopes_1_cycle", "envelopes", 2.0),
    ] {
        let mut case: serde_json::Value = serde_json::from_str(&text).unwrap();
        case["output"]["store"] = serde_json::json!(store);
        case["duration"] = serde_json::json!(duration);
        let path = dir.path().join(format!("{name}.json"));
        std::fs::write(&path, case.to_string()).unwrap();
        let out = dir.path().join(format!("{name}.h5"));
        group.bench_function(name, |b| {
            b.iter(|| {
                let status = Command::new(env!("CARGO_BIN_EXE_boreflux"))
                    .arg("run")
                    .arg(&path)
                    .arg("-o")
                    .arg(&out)
                    .args(["--force", "--quiet"])
                    .stdout(std::process::Stdio::null())
                    .status()
                    .unwrap();
                assert!(status.success());
            })
        });
    }
    group.finish();
}

criterion_group!(benches, bench_process);
criterion_main!(benches);
