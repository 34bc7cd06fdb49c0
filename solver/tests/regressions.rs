//! Regressions found by running the shipped scenarios.

use boreflux_solver::devices::Swab;
use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::drive::{Drive, Stage};
use boreflux_solver::model::*;
use boreflux_solver::{run, Reporting};

fn model(drive: Drive, duration_s: f64) -> Model {
    let m = Medium::darcy(2e-4, 1e-5);
    Model {
        fluid: Fluid::WATER_20C,
        well: Well {
            screen_radius_m: 0.084,
            screen_length_m: 9.0,
            open_area: 0.05,
            casing_radius_m: 0.077,
            linear_loss_s: 0.0,
            discharge_coefficient: Some(0.6),
            storage_m2: Well::free_surface_storage(0.077),
        },
        pack: Pack {
            outer_radius_m: 0.15,
            medium: Medium::darcy(2e-3, 1e-5),
        },
        cake: None,
        invaded: None,
        formation: Formation {
            medium: m,
            outer_radius_m: None,
            outer_boundary: OuterBoundary::FixedHead,
        },
        drive,
        duration_s,
        numerics: Numerics::default(),
    }
}

fn swab() -> Swab {
    // A period (4/1.2 + 15 s) that is not exact in floating point.
    Swab {
        cup_radius_m: 0.077,
        lift_rate_m_s: 1.2,
        stroke_m: 4.0,
        lowering_time_s: 15.0,
        submergence_m: 3.0,
        strokes: 10,
        ramp_cycles: 0.0,
    }
}

/// The clock once stalled at t ≈ 128.3 s when a device returned the current time as its
/// next event; the run must finish in about 200 steps per stroke.
#[test]
fn inexact_device_period_does_not_stall_the_clock() {
    let s = run(
        &model(Drive::Swab(swab()), 300.0),
        &mut NullObserver,
        Reporting::default(),
    )
    .unwrap();
    assert_eq!(s.end_time_s, 300.0);
    assert!(s.steps < 10 * 260 + 2000, "{} steps", s.steps);
}

/// A swab that outruns its submergence inside a schedule is reported too.
#[test]
fn swab_parting_is_reported_inside_a_schedule() {
    let stages = vec![
        Stage {
            drive: Drive::ConstantRate {
                pumping_rate_m3_s: 0.0,
            },
            duration_s: 10.0,
        },
        Stage {
            drive: Drive::Swab(swab()),
            duration_s: 60.0,
        },
    ];
    let s = run(
        &model(Drive::Schedule(stages), 70.0),
        &mut NullObserver,
        Reporting::default(),
    )
    .unwrap();
    assert!(
        s.warnings.iter().any(|w| w.contains("submergence")),
        "{:?}",
        s.warnings
    );
}

/// The demo municipal well (cases/municipal-sand-gravel.json, invented data) worked by a
/// solid surge block: 0.9 m stroke at 20 strokes/min, ramped over 5 strokes.
fn municipal_block(duration_s: f64) -> Model {
    use boreflux_solver::devices::{Kinematics, SurgeBlock};
    let block = SurgeBlock {
        block_radius_m: 0.178,
        casing_radius_m: 0.1905,
        stroke_m: 0.9,
        frequency_hz: 1.0 / 3.0,
        kinematics: Kinematics::Sinusoidal,
        discharge_coefficient: 0.6,
        valve_area_m2: 0.0,
        ramp_cycles: 5.0,
    };
    let mut m = model(Drive::SurgeBlock(block), duration_s);
    m.well = Well {
        screen_radius_m: 0.203,
        screen_length_m: 24.0,
        open_area: 0.15,
        casing_radius_m: 0.1905,
        linear_loss_s: 0.0,
        discharge_coefficient: Some(0.6),
        storage_m2: Well::free_surface_storage(0.1905),
    };
    m
}

/// A surge block against a sealing bentonite cake (K_c = 1e-9 m/s) once stopped with
/// Newton stuck at round-off: the pack and screen are stiff and their heads nearly equal,
/// so face flows carry ε g |h| errors larger than the tolerance times the net flow.
#[test]
fn surge_block_against_a_sealing_cake_runs() {
    let mut m = municipal_block(30.0);
    m.pack = Pack {
        outer_radius_m: 0.305,
        medium: Medium::darcy(8e-3, 1e-5),
    };
    m.cake = Some(Cake {
        thickness_m: 3e-3,
        conductivity_m_s: 1e-9,
        coverage: 1.0,
        erosion: None,
    });
    m.formation.medium = Medium::darcy(4e-4, 5e-5);
    let s = run(&m, &mut NullObserver, Reporting::default()).unwrap();
    assert_eq!(s.end_time_s, 30.0);
    // The volume balance closes well below the 1e-8 at which the run summary warns.
    assert!(s.max_mass_residual <= 1e-8, "{}", s.max_mass_residual);
    println!(
        "sealing cake: {} Newton iterations at most, volume residual {:.1e}",
        s.max_newton_iterations, s.max_mass_residual
    );
}

/// A surge block in a municipal well (the demo well of cases/municipal-sand-gravel.json:
/// Forchheimer pack and formation, screen entrance loss, clearance leakage, a loosened
/// cake). At each stroke reversal the in-well head crosses zero, where the clearance and
/// screen orifice laws are square-root-like; Newton linearizing them overshot across zero
/// and needed 9 iterations once the cake had eroded. Issue #4 asks for at most 8 in every
/// step.
#[test]
fn surge_block_stroke_reversals_converge_within_eight_newton_iterations() {
    let mut m = municipal_block(90.0);
    // Demo media (invented, as in the case); β from Ergun's inertial term for the case's
    // grains, as the case loader derives it.
    let medium = |k: f64, ss: f64, beta: f64| Medium {
        forchheimer_beta_s2_m2: beta,
        ..Medium::darcy(k, ss)
    };
    m.pack = Pack {
        outer_radius_m: 0.305,
        medium: medium(8e-3, 1e-5, 2.358e3),
    };
    m.cake = Some(Cake {
        thickness_m: 3e-3,
        conductivity_m_s: 1e-6,
        coverage: 1.0,
        erosion: Some(Erosion {
            critical_shear_pa: 1e-5,
            erodibility_m_s_pa: 5e-4,
            inward_weight: 1.0,
            outward_weight: 0.5,
            coverage_exponent: 0.0,
        }),
    });
    m.invaded = Some(Invaded {
        thickness_m: 0.075,
        medium: medium(4e-5, 5e-5, 7.711e3),
    });
    m.formation.medium = medium(4e-4, 5e-5, 7.711e3);
    m.numerics.time = TimeSpec::StepsPerCycle(200);
    let s = run(&m, &mut NullObserver, Reporting::default()).unwrap();
    assert_eq!(s.end_time_s, 90.0);
    assert!(
        s.max_newton_iterations <= 8,
        "{} Newton iterations in a step",
        s.max_newton_iterations
    );
}

/// Newton's first guess extrapolates the θ-point heads of the last steps (cubic). Under a
/// smooth drive one update then meets the tolerance in nearly every step; extrapolating the
/// end-of-step heads instead (which carry Crank–Nicolson's sawtooth in the stiff cells near
/// the well) needed two or three. Bound: one update in at least 9 steps of 10 (the others
/// are the start and the turning points of the screen flow); when the bound was set, 93 of
/// the 2002 steps of this case needed a second update, and every step did with the current
/// heads as the first guess. Under TR-BDF2 the bound is one update per stage (two stages per
/// step); with a separate history for each stage 103 of 2004 steps needed more.
#[test]
fn a_smooth_drive_needs_about_one_newton_update_per_step() {
    use boreflux_solver::diagnostics::{StepObserver, StepView};
    use boreflux_solver::drive::SineHead;
    struct Count(usize, usize);
    impl StepObserver for Count {
        fn on_step(&mut self, s: &StepView<'_>) -> bool {
            self.0 += 1;
            // TR-BDF2 solves two stages per step: one update each.
            self.1 += usize::from(s.newton_iterations > 2);
            true
        }
    }
    let medium = |k: f64, beta: f64| Medium {
        forchheimer_beta_s2_m2: beta,
        ..Medium::darcy(k, 1e-5)
    };
    let mut m = model(
        Drive::SineHead(SineHead {
            amplitude_m: 1.5,
            frequency_hz: 0.5,
            offset_m: 0.0,
            ramp_cycles: 0.0,
        }),
        20.0,
    );
    m.pack.medium = medium(5e-3, 1.35e3);
    m.formation.medium = medium(2e-4, 1.35e4);
    m.numerics.time = TimeSpec::StepsPerCycle(200);
    let mut count = Count(0, 0);
    let s = run(&m, &mut count, Reporting::default()).unwrap();
    assert_eq!(s.end_time_s, 20.0);
    println!(
        "{} of {} steps needed more than one update per stage ({} updates in all)",
        count.1, count.0, s.total_newton_iterations
    );
    assert!(
        10 * count.1 <= count.0,
        "{} of {} steps needed more than one update",
        count.1,
        count.0
    );
}

/// Found by a sweep over cake conductivity and stroke rate: at 10 strokes a minute a surge
/// block against a fully covering sealing cake (K_c = 1e-9 m/s) stopped at the first stroke
/// reversals ("Newton iteration did not converge at t = 6 s"). The in-well flow law's
/// scalar root finder took a round-off-small Newton step beside the clearance orifice's
/// vertical tangent (zero head difference) for convergence and returned a value that was no
/// root; the cells' Newton iteration then cycled.
#[test]
fn slow_surge_block_against_a_sealing_cake_converges() {
    let mut m = municipal_block(12.0);
    if let Drive::SurgeBlock(b) = &mut m.drive {
        b.frequency_hz = 1.0 / 6.0;
    }
    m.pack = Pack {
        outer_radius_m: 0.305,
        medium: Medium {
            forchheimer_beta_s2_m2: 2.358e3,
            ..Medium::darcy(8e-3, 1e-5)
        },
    };
    m.cake = Some(Cake {
        thickness_m: 3e-3,
        conductivity_m_s: 1e-9,
        coverage: 1.0,
        erosion: None,
    });
    m.formation.medium = Medium::darcy(4e-4, 5e-5);
    m.numerics.time = TimeSpec::StepsPerCycle(200);
    let s = run(&m, &mut NullObserver, Reporting::default()).unwrap();
    assert_eq!(s.end_time_s, 12.0);
    // Issue #4's bound on Newton iterations in a step.
    assert!(s.max_newton_iterations <= 8, "{}", s.max_newton_iterations);
}
