//! Throughput of the time step: cell-steps per second for a linear (Darcy) Crank–Nicolson
//! step on 300 cells, the same step with Forchheimer and screen entrance losses (Newton),
//! and whole runs of both with diagnostics (startup steps, balances, dissipation per zone).
//!
//! Run with `cargo bench -p boreflux-solver --bench step`. Throughput is reported by
//! criterion in elements (cell-steps) per second.

use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::drive::{Drive, SineHead};
use boreflux_solver::model::*;
use boreflux_solver::run::{run, Reporting};
use boreflux_solver::stepper::Stepper;
use criterion::{black_box, criterion_group, criterion_main, Criterion, Throughput};

/// A pack–formation case with exactly `cells` cells, driven by a 0.5 Hz sine head.
fn model(cells: usize, nonlinear: bool) -> Model {
    let mut pack = Medium::darcy(5e-3, 1e-5);
    let mut formation = Medium::darcy(2e-4, 1e-5);
    if nonlinear {
        pack.forchheimer_beta_s2_m2 = 1.35e3;
        formation.forchheimer_beta_s2_m2 = 1.35e4;
    }
    Model {
        fluid: Fluid::WATER_20C,
        well: Well {
            screen_radius_m: 0.1,
            screen_length_m: 6.0,
            open_area: 0.12,
            casing_radius_m: 0.1,
            linear_loss_s: 0.0,
            discharge_coefficient: nonlinear.then_some(0.6),
            storage_m2: 0.0,
        },
        pack: Pack {
            outer_radius_m: 0.2,
            medium: pack,
        },
        cake: None,
        invaded: None,
        formation: Formation {
            medium: formation,
            outer_radius_m: Some(60.0),
            outer_boundary: OuterBoundary::FixedHead,
        },
        drive: Drive::SineHead(SineHead {
            amplitude_m: 1.5,
            frequency_hz: 0.5,
            offset_m: 0.0,
            ramp_cycles: 0.0,
        }),
        duration_s: 20.0,
        numerics: Numerics {
            grid: GridSpec::Total(cells),
            time: TimeSpec::StepsPerCycle(200),
            ..Numerics::default()
        },
    }
}

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
