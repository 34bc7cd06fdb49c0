//! Regressions found by running the shipped scenarios.

use boreflux_solver::devices::Swab;
use boreflux_solver::diagnostics::NullObserver;
use boreflux_solver::drive::{stages, Drive, Stage};
use boreflux_solver::fixtures;
use boreflux_solver::model::*;
use boreflux_solver::{run, Reporting};

/// A 0.084 m screen 9 m long under a 0.077 m casing in a 0.15 m pack of 2e-3 m/s and an
/// infinite formation of 2e-4 m/s (invented demo numbers).
fn model(drive: Drive, duration_s: f64) -> Model {
    let mut m = fixtures::demo_well();
    m.well = fixtures::cased_screen(0.084, 9.0, 0.05, 0.077);
    m.pack = Pack {
        outer_radius_m: 0.15,
        medium: Medium::darcy(2e-3, 1e-5),
    };
    m.formation.outer_radius_m = None;
    m.drive = drive;
    m.duration_s = duration_s;
    m
}

/// A cake over the whole wall that erodes by the demo erosion parameters of the shipped
/// cases (invented): no erosion below 1e-5 Pa, 5e-4 m/(s Pa), outward flow weighted half.
fn eroding_cake(thickness_m: f64, conductivity_m_s: f64) -> Cake {
    Cake {
        erosion: Some(Erosion {
            critical_shear_pa: 1e-5,
            erodibility_m_s_pa: 5e-4,
            inward_weight: 1.0,
            outward_weight: 0.5,
            coverage_exponent: 0.0,
        }),
        ..fixtures::cake(thickness_m, conductivity_m_s, 1.0)
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
        // About the standard atmosphere less the vapour pressure at 15 °C, in m of water.
        net_atmospheric_head_m: 10.2,
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

/// A swab whose sealed column parts at the vapour bound inside a schedule is reported too.
#[test]
fn swab_parting_is_reported_inside_a_schedule() {
    let stages = vec![
        Stage {
            drive: Drive::ConstantRate {
                pumping_rate_m3_s: 0.0,
            },
            duration_s: 10.0,
            start_s: 0.0,
        },
        Stage {
            drive: Drive::Swab(swab()),
            duration_s: 60.0,
            start_s: 10.0,
        },
    ];
    // A formation a hundred times tighter than the default, so the swab outruns it.
    let mut m = model(Drive::Schedule(stages), 70.0);
    m.formation.medium.conductivity_m_s = 2e-6;
    let s = run(&m, &mut NullObserver, Reporting::default()).unwrap();
    assert!(
        s.column_partings > 0 && s.warnings.iter().any(|w| w.contains("parted")),
        "{:?}",
        s.warnings
    );
}

/// The demo municipal well (cases/municipal-sand-gravel.json, invented data) worked by a
/// solid surge block: 0.9 m stroke at 20 strokes/min, ramped over 5 strokes.
fn municipal_block(duration_s: f64) -> Model {
    use boreflux_solver::devices::{Kinematics, SurgeBlock};
    let block = SurgeBlock {
        max_push_head_m: f64::INFINITY,
        block_radius_m: 0.178,
        casing_radius_m: 0.1905,
        stroke_m: 0.9,
        frequency_hz: 1.0 / 3.0,
        kinematics: Kinematics::Sinusoidal,
        discharge_coefficient: 0.6,
        valve_area_m2: 0.0,
        ramp_cycles: 5.0,
        // 40 m below the static level (the demo's screen top is 42 m down), with about the
        // standard atmosphere less the vapour pressure at 13 °C: 10.2 m of water.
        depth_m: 40.0,
        net_atmospheric_head_m: 10.2,
    };
    let mut m = model(Drive::SurgeBlock(block), duration_s);
    m.well = fixtures::cased_screen(0.203, 24.0, 0.15, 0.1905);
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
    m.cake = Some(fixtures::cake(3e-3, 1e-9, 1.0));
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
    m.cake = Some(eroding_cake(3e-3, 1e-6));
    m.invaded = Some(Invaded {
        thickness_m: 0.075,
        medium: medium(4e-5, 5e-5, 7.711e3),
        fines: None,
        profile: None,
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
    m.cake = Some(fixtures::cake(3e-3, 1e-9, 1.0));
    m.formation.medium = Medium::darcy(4e-4, 5e-5);
    m.numerics.time = TimeSpec::StepsPerCycle(200);
    let s = run(&m, &mut NullObserver, Reporting::default()).unwrap();
    assert_eq!(s.end_time_s, 12.0);
    // Issue #4's bound on Newton iterations in a step.
    assert!(s.max_newton_iterations <= 8, "{}", s.max_newton_iterations);
}

/// An alluvial well pumped and backwashed at 15 L/s (a demo well, invented numbers: 30 m
/// screen of radius 0.162 m, 0.28 m borehole, pack 2e-3 m/s, formation 1e-3 m/s) behind a
/// 1 mm polymer cake of 1e-8 m/s that erodes (the demo erosion parameters of the shipped
/// cases) and is gone within the first pumping period; steps of 0.9 s.
fn pumped_cake_model(scheme: Scheme, dt: f64) -> Model {
    use boreflux_solver::devices::{Backflow, PumpBackwash, PumpLaw};
    let riser = std::f64::consts::PI * 0.0762f64.powi(2) * 29.0;
    let mut m = model(
        Drive::PumpBackwash(PumpBackwash {
            pump: PumpLaw::ConstantRate(0.015),
            on_time_s: 180.0,
            off_time_s: 120.0,
            // The intake at the foot of the 29 m riser (invented demo value).
            intake_depth_m: 29.0,
            discharge_height_m: 0.0,
            backflow: Backflow::Volume(riser),
            drain_time_s: 10.0,
            cycles: 0,
            ramp_cycles: 2.0,
        }),
        900.0,
    );
    m.well = fixtures::cased_screen(0.162, 30.0, 0.12, 0.162);
    m.pack = Pack {
        outer_radius_m: 0.28,
        medium: Medium::darcy(2e-3, 1e-5),
    };
    m.cake = Some(eroding_cake(1e-3, 1e-8));
    m.formation.medium = Medium::darcy(1e-3, 1e-5);
    m.numerics.time = TimeSpec::Fixed(dt);
    m.numerics.scheme = scheme;
    m
}

/// Face flux series and the time the cake was gone.
#[derive(Default)]
struct FluxSeries {
    flux: Vec<f64>,
    screen: Vec<f64>,
    gone_at: Option<usize>,
}

impl boreflux_solver::StepObserver for FluxSeries {
    fn on_step(&mut self, s: &boreflux_solver::StepView<'_>) -> bool {
        if s.cake_thickness_m == 0.0 && self.gone_at.is_none() {
            self.gone_at = Some(self.flux.len());
        }
        self.flux.push(s.face_flux_m_s);
        self.screen.push(s.screen_flow_m3_s);
        true
    }
}

/// Longest run of successive increments that alternate in sign.
fn longest_alternation(x: &[f64]) -> usize {
    let (mut best, mut run) = (0, 0);
    for w in x.windows(3) {
        let (a, b) = (w[1] - w[0], w[2] - w[1]);
        run = if a * b < 0.0 { run + 1 } else { 0 };
        best = best.max(run);
    }
    best
}

/// Under Crank–Nicolson the moment the cake was gone the face flux alternated from step to
/// step (the cake's conductance jumps; CN's R(−∞) = −1 leaves the stiff modes ringing) and
/// the peaks were several times the true ones. The default L-stable scheme must show no
/// alternation after the removal and a peak inward flux within 5 % of the same model at 18
/// times shorter steps (the 0.9 s run's own step error: 1.8 % when measured; common
/// practice, no source); the θ-scheme's ringing must be reported by the detector.
#[test]
fn cake_removed_under_pumping_does_not_ring() {
    let mut coarse = FluxSeries::default();
    let s = run(
        &pumped_cake_model(Scheme::default(), 0.9),
        &mut coarse,
        Reporting::default(),
    )
    .unwrap();
    let gone = coarse.gone_at.expect("the cake is removed");
    let after = &coarse.flux[gone..];
    let alternation = longest_alternation(after);
    assert!(alternation <= 2, "{alternation} alternating increments");
    assert!(
        !s.warnings.iter().any(|w| w.contains("alternated")),
        "{:?}",
        s.warnings
    );
    let mut fine = FluxSeries::default();
    let f = run(
        &pumped_cake_model(Scheme::default(), 0.05),
        &mut fine,
        Reporting::default(),
    )
    .unwrap();
    let rel = (s.peak_inward_flux_m_s - f.peak_inward_flux_m_s).abs() / f.peak_inward_flux_m_s;
    println!(
        "peak inward flux {:.4e} (0.9 s) vs {:.4e} (0.05 s): {rel:.2e}; peak screen flow {:.4} \
         vs {:.4} m3/s at a pump rate of 0.015; {} steps, {} rejected",
        s.peak_inward_flux_m_s,
        f.peak_inward_flux_m_s,
        s.peak_screen_flow_m3_s,
        f.peak_screen_flow_m3_s,
        s.steps,
        s.rejected_steps
    );
    assert!(rel < 0.05, "{rel}");
    let rel_q = (s.peak_screen_flow_m3_s - f.peak_screen_flow_m3_s).abs() / f.peak_screen_flow_m3_s;
    assert!(rel_q < 0.05, "{rel_q}");
    // Crank–Nicolson at the same steps rings, and the detector says so.
    let mut cn = FluxSeries::default();
    let c = run(
        &pumped_cake_model(Scheme::Theta, 0.9),
        &mut cn,
        Reporting::default(),
    )
    .unwrap();
    println!(
        "Crank–Nicolson: longest alternation {}, peak inward flux {:.4e}, warnings {:?}",
        longest_alternation(&cn.flux[cn.gone_at.unwrap()..]),
        c.peak_inward_flux_m_s,
        c.warnings
    );
    assert!(c.warnings.iter().any(|w| w.contains("alternated")));
}

/// A schedule with a 1 m slug stage followed by a surge-block stage stopped at t = 5e−5 s:
/// Newton failed on the first step of the stiff start. This simplified model (Darcy media)
/// runs under both schemes; the exact case, which the θ-scheme still loses, is rebuilt from
/// the shipped case in cli/tests/step_retries.rs.
#[test]
fn slug_stage_then_surge_block_stage_runs() {
    let mut block = municipal_block(60.0);
    block.pack = Pack {
        outer_radius_m: 0.305,
        medium: Medium::darcy(8e-3, 1e-5),
    };
    let Drive::SurgeBlock(b) = block.drive else {
        unreachable!()
    };
    let mut m = block.clone();
    m.drive = Drive::Schedule(stages(vec![
        (
            Drive::Slug {
                initial_head_m: 1.0,
            },
            60.0,
        ),
        (Drive::SurgeBlock(b), 60.0),
    ]));
    m.duration_s = 120.0;
    m.numerics.time = TimeSpec::StepsPerDecade {
        per_decade: 40.0,
        first_step_s: 1e-5,
    };
    let s = run(&m, &mut NullObserver, Reporting::default()).unwrap();
    assert_eq!(s.end_time_s, 120.0);
    println!(
        "{} steps, {} retried solves, {} rejected",
        s.steps, s.retried_solves, s.rejected_steps
    );
}

/// The shipped deep-swab case (cases/swab-deep.json, invented demo data) in a formation of
/// 1e−9 m/s stopped at t ≈ 92.6 s with Newton not converging. This simplified model (Darcy
/// media, no screen entrance loss) runs under both schemes; the exact case, which the
/// θ-scheme still loses, is in cli/tests/step_retries.rs.
#[test]
fn deep_swab_in_a_tight_formation_runs() {
    let mut m = model(
        Drive::Swab(Swab {
            cup_radius_m: 0.077,
            lift_rate_m_s: 1.0,
            stroke_m: 4.0,
            lowering_time_s: 16.0,
            submergence_m: 3.0,
            strokes: 10,
            ramp_cycles: 0.0,
            // Standard atmosphere (101 325 Pa) over water at 15 °C.
            net_atmospheric_head_m: boreflux_solver::devices::net_atmospheric_head_m(
                101_325.0, 15.0, 999.1,
            ),
        }),
        600.0,
    );
    m.well.screen_radius_m = 0.08415;
    m.pack = Pack {
        outer_radius_m: 0.127,
        medium: Medium::darcy(2e-3, 1e-5),
    };
    m.invaded = Some(Invaded {
        thickness_m: 0.02,
        medium: Medium::darcy(5e-6, 2e-4),
        fines: None,
        profile: None,
    });
    m.formation.medium = Medium::darcy(1e-9, 2e-4);
    let s = run(&m, &mut NullObserver, Reporting::default()).unwrap();
    assert_eq!(s.end_time_s, 600.0);
    // The swab outruns a sealed formation: the column under its cups parts at the vapour
    // bound, and the run says so.
    assert!(s.column_partings > 0, "{s:?}");
    assert!(
        s.warnings.iter().any(|w| w.contains("parted")),
        "{:?}",
        s.warnings
    );
}

/// Inputs beyond what double precision carries gave NaN or infinite series with a clean
/// exit; they must stop the run with an error naming what went wrong.
#[test]
fn non_finite_results_are_an_error() {
    let mut m = model(
        Drive::ConstantRate {
            pumping_rate_m3_s: 0.01,
        },
        100.0,
    );
    m.well.screen_length_m = 1e308;
    let e = run(&m, &mut NullObserver, Reporting::default());
    assert!(e.is_err(), "{e:?}");
    println!("screen length 1e308: {}", e.unwrap_err());
    let mut m = municipal_block(30.0);
    m.pack = Pack {
        outer_radius_m: 0.305,
        medium: Medium::darcy(8e-3, 1e-5),
    };
    if let Drive::SurgeBlock(b) = &mut m.drive {
        b.stroke_m = 1e308;
    }
    let e = run(&m, &mut NullObserver, Reporting::default());
    assert!(e.is_err(), "{e:?}");
    println!("stroke 1e308: {}", e.unwrap_err());
}

/// A jet-pulse stage imposed its fine step on every other stage of a schedule (a 15-minute
/// pumping stage took 76 655 steps instead of 287). The pumping stage must take about as
/// many steps inside the schedule as alone: at most 10 % more plus the restart at the
/// stage end (common practice, no source).
#[test]
fn a_jet_stage_keeps_its_step_to_itself() {
    use boreflux_solver::devices::JetPulse;
    struct UpTo(f64, u64);
    impl boreflux_solver::StepObserver for UpTo {
        fn on_step(&mut self, s: &boreflux_solver::StepView<'_>) -> bool {
            self.1 += u64::from(s.time_s <= self.0 + 1e-9);
            true
        }
    }
    let pumping = Drive::ConstantRate {
        pumping_rate_m3_s: 0.005,
    };
    // The same grid for both (the automatic outer radius depends on the drive).
    let fixed = |mut m: Model| {
        m.formation.outer_radius_m = Some(300.0);
        m
    };
    let alone = run(
        &fixed(model(pumping.clone(), 900.0)),
        &mut NullObserver,
        Reporting::default(),
    )
    .unwrap();
    let jet = JetPulse {
        nozzle_velocity_m_s: 45.0,
        efficiency: 0.5,
        rotation_period_s: 30.0,
        nozzles: 2,
        jet_width_m: 0.01,
        screen_radius_m: 0.084,
        screen_length_m: 6.0,
        nozzle_diameter_m: 0.008,
        well_storage_m2: boreflux_solver::model::Well::free_surface_storage(0.084),
        pumping_rate_m3_s: 0.0,
        ramp_cycles: 0.0,
    };
    let m = fixed(model(
        Drive::Schedule(stages(vec![(pumping, 900.0), (Drive::JetPulse(jet), 60.0)])),
        960.0,
    ));
    let mut count = UpTo(900.0, 0);
    let s = run(&m, &mut count, Reporting::default()).unwrap();
    println!(
        "pumping stage: {} steps in the schedule ({} cells, {} rejected), {} alone ({} cells, {} rejected)",
        count.1, s.cells, s.rejected_steps, alone.steps, alone.cells, alone.rejected_steps
    );
    let alone = alone.steps;
    assert!(
        count.1 as f64 <= 1.1 * alone as f64 + 5.0,
        "{} vs {alone}",
        count.1
    );
}
