//! Drive lookups on long tables and schedules: the cost of one step's queries (value and
//! next breakpoint of a table; stage, head and next breakpoint of a schedule) at 1e3, 1e5
//! and 1e6 rows, or 1e2 to 1e4 stages. With binary search the cost grows with log n; a
//! scan grew with n (a 1e6-row table took over 100 s for a whole run).

use boreflux_solver::drive::{stages, Drive, TableDrive, TableQuantity};
use criterion::{black_box, criterion_group, criterion_main, BenchmarkId, Criterion};

fn table(n: usize) -> Drive {
    let times_s: Vec<f64> = (0..n).map(|i| i as f64).collect();
    let values = times_s.iter().map(|t| (0.01 * t).sin()).collect();
    Drive::Table(TableDrive {
        times_s,
        values,
        quantity: TableQuantity::Head,
        repeat: false,
    })
}

fn schedule(n: usize) -> Drive {
    Drive::Schedule(stages(
        (0..n)
            .map(|i| {
                (
                    Drive::Slug {
                        initial_head_m: i as f64,
                    },
                    1.0,
                )
            })
            .collect(),
    ))
}

fn bench(c: &mut Criterion) {
    let mut g = c.benchmark_group("lookup");
    for n in [1_000usize, 100_000, 1_000_000] {
        let d = table(n);
        let t = 0.737 * n as f64;
        g.bench_with_input(BenchmarkId::new("table", n), &d, |b, d| {
            b.iter(|| {
                let h = d.head_m(black_box(t));
                let e = d.next_event_s(black_box(t));
                (h, e)
            })
        });
    }
    for n in [100usize, 1_000, 10_000] {
        let d = schedule(n);
        let t = 0.737 * n as f64;
        g.bench_with_input(BenchmarkId::new("schedule", n), &d, |b, d| {
            b.iter(|| {
                let c = d.control_at(black_box(t));
                let f = d.device_flow(black_box(t), 0.0, Default::default());
                let e = d.next_event_s(black_box(t));
                (c, f, e)
            })
        });
    }
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
