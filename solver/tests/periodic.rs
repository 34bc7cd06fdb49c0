//! The periodic state by Newton–shooting (docs/numerics.md §Periodic state by shooting)
//! against references outside the method: the harmonic method on a linear model (itself
//! verified against analytic solutions, docs/verification.md), and plain cycling of the
//! same stepper run until its cycle-to-cycle change is below 1e-10 on a nonlinear model.

use boreflux_solver::drive::Drive;
use boreflux_solver::fixtures;
use boreflux_solver::harmonic;
use boreflux_solver::model::*;
use boreflux_solver::periodic::{plain_cycles, shoot, Options};
use boreflux_solver::slow::SlowState;

/// A linear (Darcy) well under a sine head; invented numbers (a demo well), not from a source.
fn linear() -> Model {
    Model {
        duration_s: 100.0,
        ..fixtures::demo_well()
    }
}

/// The same well with a Forchheimer term in the pack and the formation and an orifice
/// entrance loss at the screen (invented β and C_d of a plausible size: β q in the pack
/// is ~10 % of 1/K at the peak flux).
fn nonlinear() -> Model {
    let mut m = linear();
    m.pack.medium.forchheimer_beta_s2_m2 = 3e4;
    m.formation.medium.forchheimer_beta_s2_m2 = 2e5;
    m.well.discharge_coefficient = Some(0.6);
    m
}

fn options(m: &Model, steps: usize, tolerance: f64) -> Options {
    Options {
        steps_per_cycle: steps,
        tolerance,
        ..Options::for_model(m)
    }
}

#[test]
fn linear_shooting_meets_the_harmonic_method_at_second_order() {
    let m = linear();
    let slow = SlowState::new(&m);
    let sol = harmonic::solve(&m, 1).expect("harmonic");
    let mut errors = Vec::new();
    for steps in [50, 100, 200] {
        let p = shoot(&m, &slow, &options(&m, steps, 1e-11)).expect("shooting");
        assert!(p.defect <= 1e-11, "{p:?}");
        // The state at a whole number of periods is the harmonic solution at phase 0.
        let err = (1..p.heads_m.len())
            .map(|j| (p.heads_m[j] - sol.head_m(j, 0.0)).abs())
            .fold(0.0, f64::max);
        eprintln!(
            "{steps} steps: error {err:.3e} m, {} Newton, {} products, {} periods",
            p.newton_iterations, p.krylov_products, p.cycles
        );
        errors.push(err);
    }
    // TR-BDF2 is second order (Bank et al. 1985): halving Δt divides the error by 4. The
    // ratio differs from 4 by O(Δt) terms; 3.5–4.5 at 50–200 steps per period.
    for w in errors.windows(2) {
        let ratio = w[0] / w[1];
        assert!((3.5..=4.5).contains(&ratio), "{errors:?}: ratio {ratio}");
    }
    // And the size: (ωΔt)² C with C of order 0.1 at 200 steps, relative to the 1.5 m drive.
    assert!(errors[2] < 1e-3 * 1.5, "{errors:?}");
}

#[test]
fn nonlinear_shooting_meets_plain_cycling_to_the_newton_tolerance() {
    let m = nonlinear();
    assert!(
        harmonic::solve(&m, 1).is_err(),
        "the harmonic method refuses"
    );
    let slow = SlowState::new(&m);
    let opts = options(&m, 100, 1e-10);
    let p = shoot(&m, &slow, &opts).expect("shooting");
    let plain = plain_cycles(&m, &slow, &opts, 5000).expect("plain cycling");
    let cycles = plain.cycles_to_tolerance.expect("plain cycling converges");
    eprintln!(
        "shooting: defect {:.2e}, {} Newton, {} products, {} periods ({} warm-up); plain \
         cycling: {} cycles after the warm-up to 1e-10",
        p.defect, p.newton_iterations, p.krylov_products, p.cycles, p.warmup_cycles, cycles
    );
    // Both stop at a defect of 1e-10 of the head scale; the state of a contraction with
    // rate ρ lies within defect/(1 − ρ) of the fixed point: measure ρ from plain cycling's
    // last cycles and bound the distance by the sum of both.
    let d = &plain.defects;
    let rho = (d[d.len() - 1] / d[d.len() - 11]).powf(0.1);
    let bound = (1e-10 + 1e-10) / (1.0 - rho) * p.head_scale_m;
    let diff = p
        .heads_m
        .iter()
        .zip(&plain.heads_m)
        .map(|(a, b)| (a - b).abs())
        .fold(0.0, f64::max);
    eprintln!("rate {rho:.4}, difference {diff:.3e} m, bound {bound:.3e} m");
    assert!(diff <= bound, "{diff:.3e} > {bound:.3e}");
    // The point of the method: far fewer periods than plain cycling.
    assert!(
        p.cycles * 3 < cycles + p.warmup_cycles,
        "{} vs {cycles}",
        p.cycles
    );
}

#[test]
fn refuses_drives_without_a_period() {
    let mut m = linear();
    m.drive = Drive::Slug {
        initial_head_m: 1.0,
    };
    let e = shoot(&m, &SlowState::new(&m), &Options::for_model(&m)).unwrap_err();
    assert!(e.to_string().contains("a slug"), "{e}");
}
